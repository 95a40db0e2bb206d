"""Model text generators shared by the tests (all numbers invented for testing)."""

import numpy as np


def node(name, mass_kg, at=(0.0, 0.0, 0.0), dofs=("z",)):
    d = ", ".join(f'"{x}"' for x in dofs)
    return f'[[node]]\nname = "{name}"\nmass_kg = {mass_kg!r}\nat_m = [{at[0]!r}, {at[1]!r}, {at[2]!r}]\ndofs = [{d}]\n'


def spring(name, frm, to, k, at=(0.0, 0.0, 0.0), direction=(0.0, 0.0, 1.0), loss=None, c=None):
    s = (
        f'[[spring]]\nname = "{name}"\nfrom = "{frm}"\nto = "{to}"\n'
        f"at_m = [{at[0]!r}, {at[1]!r}, {at[2]!r}]\n"
        f"direction = [{direction[0]!r}, {direction[1]!r}, {direction[2]!r}]\n"
        f"stiffness_n_per_m = {k!r}\n"
    )
    if loss is not None:
        s += f"loss_factor = {loss!r}\n"
    if c is not None:
        s += f"damping_ns_per_m = {c!r}\n"
    return s


def sdof_toml(m=2.0, k=1.0e4, loss=None, c=None):
    return node("mass", m) + spring("support", "ground", "mass", k, loss=loss, c=c)


def two_dof_toml(m1=3.0, m2=1.5, k1=2.0e5, k2=5.0e4, loss=None, c1=None, c2=None):
    """Ground – k1 – n1 – k2 – n2, vertical."""
    return (
        node("n1", m1)
        + node("n2", m2, at=(0.0, 0.0, 0.5))
        + spring("k1", "ground", "n1", k1, loss=loss, c=c1)
        + spring("k2", "n1", "n2", k2, at=(0.0, 0.0, 0.25), loss=loss, c=c2)
    )


def random_chain_toml(seed, n_nodes=5):
    """A 3-D chain of point masses; each joined to the previous one (the first to the ground)
    by three springs in random directions, with random loss factors and dashpots."""
    rng = np.random.default_rng(seed)
    parts = []
    prev = "ground"
    for i in range(n_nodes):
        name = f"p{i}"
        at = tuple(float(v) for v in rng.uniform(-0.3, 0.3, 3) + np.array([0, 0, 0.4 * i]))
        parts.append(node(name, float(rng.uniform(0.5, 20.0)), at=at, dofs=("x", "y", "z")))
        for j in range(3):
            d = rng.normal(size=3)
            d /= np.linalg.norm(d)
            parts.append(
                spring(
                    f"s{i}_{j}",
                    prev,
                    name,
                    float(10 ** rng.uniform(4, 6)),
                    at=at,
                    direction=tuple(float(v) for v in d),
                    loss=float(rng.uniform(0.01, 0.1)),
                    c=float(rng.uniform(0.0, 30.0)) if j == 0 else None,
                )
            )
        prev = name
    return "".join(parts)

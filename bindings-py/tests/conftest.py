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


def rayleigh_speed(nu, vs):
    """Rayleigh-wave speed: the root of (2 − ξ²)² = 4√(1 − κ²ξ²)√(1 − ξ²) (Rayleigh 1885), by scipy."""
    from scipy.optimize import brentq

    k2 = (1 - 2 * nu) / (2 * (1 - nu))

    def g(x):
        return (2 - x * x) ** 2 - 4 * np.sqrt(1 - k2 * x * x) * np.sqrt(1 - x * x)

    return vs * brentq(g, 0.5, 1 - 1e-12, xtol=1e-15)


def lawn_rotation_psds(f, s_x, s_y, s_z):
    """Ground tilt and twist PSDs (rx, ry, rz) under the lawn preset (G 20 MPa, ρ 1600 kg/m³, ν 0.33),
    from the plane-wave relations of docs/references.md#s20: tilt ω u_z / c split over two axes,
    twist ω u_T / (2c) with S_T = (S_x + S_y)/2, c the Rayleigh speed found with scipy."""
    k2 = (2 * np.pi * np.asarray(f) / rayleigh_speed(0.33, np.sqrt(20e6 / 1600))) ** 2
    return 0.5 * k2 * s_z, 0.5 * k2 * s_z, 0.125 * k2 * (s_x + s_y)

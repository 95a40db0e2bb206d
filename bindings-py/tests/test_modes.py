"""Model.modes against scipy.linalg.eigh of the same matrices."""

import numpy as np
import pytest
import scipy.linalg

import stillsky
from conftest import random_chain_toml, sdof_toml, two_dof_toml


@pytest.mark.parametrize(
    "text",
    [sdof_toml(loss=0.02), two_dof_toml(loss=0.03, c1=10.0), random_chain_toml(11), random_chain_toml(12, 6)],
    ids=["sdof", "2dof", "chain-11", "chain-12"],
)
def test_modes_equal_scipy_eigh(text):
    # Independent reference: scipy.linalg.eigh(K', M) (LAPACK generalized symmetric solver);
    # springs here are frequency independent, so K' is Re K*(0).
    m = stillsky.Model.from_toml_str(text)
    mats = m.matrices(0.0)
    lam, vec = scipy.linalg.eigh(mats["stiffness"].real, mats["mass"])
    modes = m.modes()
    np.testing.assert_allclose(modes.frequency_hz, np.sqrt(lam) / (2 * np.pi), rtol=1e-9)
    n = m.dof_count
    assert modes.shapes.shape == (n, n) and len(modes) == n
    assert modes.participation.shape == (n, 3) and modes.effective_mass_kg.shape == (n, 3)
    # Mass-normalised shapes: Φᵀ M Φ = I (numpy matrix product).
    phi = modes.shapes
    np.testing.assert_allclose(phi.T @ mats["mass"] @ phi, np.eye(n), atol=1e-9)
    # Shapes agree with scipy's up to sign.
    for j in range(n):
        s = np.sign(phi[:, j] @ mats["mass"] @ vec[:, j])
        np.testing.assert_allclose(phi[:, j], s * vec[:, j], atol=1e-7 * np.abs(vec[:, j]).max())
    assert np.all(np.diff(modes.frequency_hz) >= 0)
    assert len(modes.dominant_dofs) == n


def test_sdof_viscous_damping_ratio():
    # Textbook SDOF (e.g. Ogata, System Dynamics): ζ = c / (2 √(k m)).
    k, mass, c = 1.0e4, 2.0, 12.0
    md = stillsky.Model.from_toml_str(sdof_toml(m=mass, k=k, c=c)).modes()
    np.testing.assert_allclose(md.damping_ratio, [c / (2 * np.sqrt(k * mass))], rtol=1e-9)
    # Effective mass of the single mode in z is the whole mass (sum rule, e.g. Chopra §13).
    np.testing.assert_allclose(md.effective_mass_kg[0, 2], mass, rtol=1e-9)


def test_effective_mass_sum_rule_chain():
    # Sum of effective modal masses per direction equals the total mass for a structure whose
    # free DOFs are all translations (Chopra, Dynamics of Structures, §13 modal mass sum rule).
    text = random_chain_toml(21, 4)
    m = stillsky.Model.from_toml_str(text)
    total = np.trace(m.matrices(0.0)["mass"]) / 3
    np.testing.assert_allclose(m.modes().effective_mass_kg.sum(axis=0), [total] * 3, rtol=1e-8)


def test_energy_shares_equal_numpy_from_scipy_shapes():
    # Kinetic share per owner m φ_i² over its DOFs and strain share per spring k (bᵀφ)² / λ,
    # with φ and λ from scipy.linalg.eigh(K', M) (point masses: M is diagonal), b = +d on the
    # spring's `to` DOFs and −d on its `from` DOFs (elementary structural mechanics).
    import tomllib

    text = random_chain_toml(11)
    doc = tomllib.loads(text)
    m = stillsky.Model.from_toml_str(text)
    mats = m.matrices(0.0)
    lam, vec = scipy.linalg.eigh(mats["stiffness"].real, mats["mass"])
    labels = m.dof_labels
    index = {lab: i for i, lab in enumerate(labels)}
    modes = m.modes()
    assert len(modes.labels) == len(lam) and all(":" in s for s in modes.labels)
    for j in range(len(lam)):
        phi = vec[:, j]
        e = modes.energy[j]
        bodies = dict(e["bodies"])
        for owner in {lab.split(":")[0] for lab in labels}:
            idx = [index[f"{owner}:{a}"] for a in "xyz"]
            want = sum(mats["mass"][i, i] * phi[i] ** 2 for i in idx)
            assert abs(bodies[owner] - want) < 1e-9, (owner, bodies[owner], want)
        conns = dict(e["connectors"])
        for s in doc["spring"]:
            d = np.array(s["direction"], dtype=float)
            d /= np.linalg.norm(d)
            q = sum(d[k] * phi[index[f"{s['to']}:{a}"]] for k, a in enumerate("xyz"))
            if s["from"] != "ground":
                q -= sum(d[k] * phi[index[f"{s['from']}:{a}"]] for k, a in enumerate("xyz"))
            want = s["stiffness_n_per_m"] * q**2 / lam[j]
            assert abs(conns[s["name"]] - want) < 1e-8, (s["name"], conns[s["name"]], want)
        assert abs(sum(conns.values()) - 1) < 1e-9 and abs(sum(bodies.values()) - 1) < 1e-9

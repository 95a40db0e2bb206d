"""Model.frf against independent numpy / scipy computations on the exposed matrices."""

import warnings

import numpy as np
import pytest
import scipy.linalg
import scipy.signal

import stillsky
from conftest import random_chain_toml, sdof_toml, two_dof_toml

F = np.geomspace(0.5, 200.0, 120)


def dense_frf(model, freq_hz, inp, out):
    """Reference: np.linalg.solve of Z(ω) = K*(ω) + iωC − ω²M against the input vector."""
    r = model.output_vector(out)
    h = []
    for f in freq_hz:
        mats = model.matrices(f)
        w = 2 * np.pi * f
        z = mats["stiffness"] + 1j * w * mats["damping"] - w**2 * mats["mass"]
        h.append(r @ np.linalg.solve(z, model.input_vector(inp, f)))
    return np.array(h)


CASES = [
    ("sdof", sdof_toml(loss=0.05), "ground_z", "mass:z"),
    ("sdof-force", sdof_toml(c=12.0), "force:mass:z", "mass:z"),
    ("2dof", two_dof_toml(loss=0.04, c1=20.0), "ground_z", "n2:z"),
    ("2dof-force", two_dof_toml(loss=0.04), "force:n2:z", "n1:z"),
    ("chain-1", random_chain_toml(1), "ground_x", "p4:y"),
    ("chain-2", random_chain_toml(2, 7), "ground_z", "p6:z"),
    ("chain-3", random_chain_toml(3, 4), "force:p1:x", "p3:x"),
]


@pytest.mark.parametrize("label,text,inp,out", CASES, ids=[c[0] for c in CASES])
def test_frf_equals_dense_numpy_solve(label, text, inp, out):
    # Independent reference: numpy's LAPACK solve (np.linalg.solve) of the same system.
    m = stillsky.Model.from_toml_str(text, label)
    h = m.frf(F, inp, out)
    assert h.dtype == np.complex128 and h.shape == F.shape
    ref = dense_frf(m, F, inp, out)
    np.testing.assert_allclose(h, ref, rtol=1e-9, atol=1e-12 * np.abs(ref).max())


def test_sdof_closed_form_transmissibility():
    # Den Hartog, Mechanical Vibrations: hysteretic SDOF T = (1 + iη)/(1 − r² + iη).
    k, mass, eta = 1.0e4, 2.0, 0.05
    m = stillsky.Model.from_toml_str(sdof_toml(m=mass, k=k, loss=eta))
    r = F / (np.sqrt(k / mass) / (2 * np.pi))
    np.testing.assert_allclose(m.frf(F, "ground_z", "mass:z"), (1 + 1j * eta) / (1 - r**2 + 1j * eta), rtol=1e-9)


def test_lists_give_3d_array_matching_single_calls():
    m = stillsky.Model.from_toml_str(two_dof_toml(loss=0.04))
    ins, outs = ["ground_z", "force:n1:z"], ["n1:z", "n2:z"]
    h = m.frf(F, ins, outs)
    assert h.shape == (F.size, 2, 2)
    for i, a in enumerate(ins):
        for o, b in enumerate(outs):
            np.testing.assert_array_equal(h[:, o, i], m.frf(F, a, b))
    # A single str next to a list counts as a list of one.
    assert m.frf(F, "ground_z", outs).shape == (F.size, 2, 1)


def test_frf_equals_scipy_state_space_viscous_2dof():
    # Independent reference: scipy.signal.freqresp of the first-order form
    # A = [[0, I], [−M⁻¹K, −M⁻¹C]], B = [[0], [M⁻¹ b]], C = [r, 0] (force input, viscous damping).
    m = stillsky.Model.from_toml_str(two_dof_toml(c1=25.0, c2=8.0))
    mats = m.matrices(0.0)
    M, C, K = mats["mass"], mats["damping"], mats["stiffness"].real
    assert np.abs(mats["stiffness"].imag).max() == 0.0 and C[0, 0] > 0
    n = m.dof_count
    b = m.input_vector("force:n2:z").real
    r = m.output_vector("n1:z")
    Minv = np.linalg.inv(M)
    A = np.block([[np.zeros((n, n)), np.eye(n)], [-Minv @ K, -Minv @ C]])
    B = np.concatenate([np.zeros(n), Minv @ b])[:, None]
    Cs = np.concatenate([r, np.zeros(n)])[None, :]
    sys = scipy.signal.StateSpace(A, B, Cs, np.zeros((1, 1)))
    h = m.frf(F, "force:n2:z", "n1:z")
    # The resolvent C (iωI − A)⁻¹ B of the scipy StateSpace system, solved by numpy: 1e-9.
    res = np.array([(sys.C @ np.linalg.solve(1j * w * np.eye(2 * n) - sys.A, sys.B))[0, 0] for w in 2 * np.pi * F])
    np.testing.assert_allclose(h, res, rtol=1e-9)
    # scipy.signal.freqresp itself converts the system to a transfer function (ss2tf), whose
    # polynomial coefficients are badly conditioned in SI units (measured 2e-8). The same
    # system in scaled time t' = ω₀t and scaled velocity v/ω₀, with B and C normalised to unit
    # magnitude, has the identical response H(iω) = g·C'(iω/ω₀ − A')⁻¹B' and O(1) coefficients,
    # so freqresp is checked to 1e-9 there (its numerator warning concerns round-off-sized leading
    # coefficients and is silenced).
    w0 = 2 * np.pi * F.max()
    T = np.diag(np.concatenate([np.ones(n), np.full(n, 1 / w0)]))
    Ti = np.linalg.inv(T)
    As, Bs, Cq = T @ A @ Ti / w0, T @ B / w0, Cs @ Ti
    gb, gc = np.abs(Bs).max(), np.abs(Cq).max()
    scaled = scipy.signal.StateSpace(As, Bs / gb, Cq / gc, np.zeros((1, 1)))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", scipy.signal.BadCoefficients)
        _, ref = scipy.signal.freqresp(scaled, w=2 * np.pi * F / w0)
    np.testing.assert_allclose(h, gb * gc * ref, rtol=1e-9)


def test_matrices_are_symmetric_and_shaped():
    m = stillsky.Model.from_toml_str(random_chain_toml(5))
    d = m.matrices(3.0)
    n = m.dof_count
    assert set(d) == {"mass", "damping", "stiffness"}
    for key, dt in [("mass", np.float64), ("damping", np.float64), ("stiffness", np.complex128)]:
        assert d[key].shape == (n, n) and d[key].dtype == dt
        np.testing.assert_allclose(d[key], d[key].T, rtol=1e-12, atol=0)
    # Eigenvalues of M are positive (scipy.linalg.eigvalsh as independent check).
    assert scipy.linalg.eigvalsh(d["mass"]).min() > 0


def test_inputs_lists_and_strided_input():
    m = stillsky.Model.from_toml_str(sdof_toml(loss=0.05))
    # A non-contiguous view is copied once and gives the same result as the contiguous array.
    f2 = np.geomspace(1, 100, 40)
    strided = np.repeat(f2, 2)[::2]
    assert not strided.flags["C_CONTIGUOUS"] or strided.base is not None
    np.testing.assert_array_equal(m.frf(strided, "ground_z", "mass:z"), m.frf(f2, "ground_z", "mass:z"))
    np.testing.assert_array_equal(m.frf(list(f2), "ground_z", "mass:z"), m.frf(f2, "ground_z", "mass:z"))
    # The result owns no NumPy buffer: it is the Rust allocation handed over (no copy).
    assert not m.frf(f2, "ground_z", "mass:z").flags["OWNDATA"]

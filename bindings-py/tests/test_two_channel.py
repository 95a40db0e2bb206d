"""Two-channel identification and calibration: transfer_estimate (H1, H2, coherence) against
scipy.signal, frf_modes against the poles numpy finds for a known transfer function, and
calibrate recovering a known stiffness of the demo rig."""

import pathlib

import numpy as np
import pytest
import scipy.signal

import stillsky
from conftest import two_dof_toml

EXAMPLE = pathlib.Path(__file__).resolve().parents[2] / "docs" / "examples" / "tripod-lawn.toml"


def test_h1_h2_coherence_match_scipy_ratios():
    # Independent path: H1 = Pxy/Pxx and H2 = Pyy/Pyx from scipy.signal.csd and welch (same
    # Welch conventions: Hann, 50 % overlap, constant detrend, one-sided density).
    rng = np.random.default_rng(3)
    fs, n = 200.0, 1 << 15
    x = rng.normal(size=n)
    b, a = scipy.signal.butter(2, 20.0, fs=fs)
    y = scipy.signal.lfilter(b, a, x) + 0.05 * rng.normal(size=n)
    r = stillsky.transfer_estimate(x, y, fs, nperseg=1024)
    f, pxy = scipy.signal.csd(x, y, fs=fs, nperseg=1024)
    _, pxx = scipy.signal.welch(x, fs=fs, nperseg=1024)
    _, pyy = scipy.signal.welch(y, fs=fs, nperseg=1024)
    _, pyx = scipy.signal.csd(y, x, fs=fs, nperseg=1024)
    _, cxy = scipy.signal.coherence(x, y, fs=fs, nperseg=1024)
    np.testing.assert_allclose(r["freq_hz"], f[1:], rtol=1e-14)
    np.testing.assert_allclose(r["h1"], pxy[1:] / pxx[1:], rtol=1e-9)
    np.testing.assert_allclose(r["h2"], pyy[1:] / pyx[1:], rtol=1e-9)
    np.testing.assert_allclose(r["coherence"], cxy[1:], rtol=1e-9)
    # H1 recovers the filter's response (scipy.signal.freqz) where the coherence is high.
    _, h = scipy.signal.freqz(b, a, worN=f[1:], fs=fs)
    good = (r["coherence"] > 0.95) & (f[1:] < 15.0)
    assert good.sum() > 50
    np.testing.assert_allclose(r["h1"][good], h[good], rtol=0.03)


def test_frf_modes_recover_the_poles_of_a_known_transfer_function():
    # H(s) = B(s)/A(s) with A from two chosen pole pairs (8.0 Hz ζ 0.02, 8.6 Hz ζ 0.01: close
    # modes); scipy.signal.freqs evaluates it and numpy.roots is the independent pole finder.
    poles = []
    for fn, z in [(8.0, 0.02), (8.6, 0.01)]:
        w = 2 * np.pi * fn
        p = -z * w + 1j * w * np.sqrt(1 - z * z)
        poles += [p, np.conj(p)]
    a = np.real(np.poly(poles))
    b = np.array([1.0, 30.0, 4.0e4])
    f = np.linspace(0.5, 30.0, 3000)
    _, h = scipy.signal.freqs(b, a, worN=2 * np.pi * f)
    modes = stillsky.frf_modes(f, h)
    roots = np.roots(a)
    roots = roots[roots.imag > 0]
    expect = sorted((abs(p) / (2 * np.pi), -p.real / abs(p)) for p in roots)
    assert len(modes) == 2, modes
    for m, (fe, ze) in zip(modes, expect):
        assert m["frequency_hz"] == pytest.approx(fe, rel=1e-6)
        assert m["damping_ratio"] == pytest.approx(ze, rel=1e-6)


def test_modes_from_a_simulated_shaker_test_match_model_modes():
    # Random force on the top mass of a 2-DOF chain with dampers c = β k (Rayleigh damping:
    # ζ_j = β ω_j / 2, Chopra, Dynamics of Structures), displacement + 2 % noise; H1 → frf_modes.
    beta = 3e-4
    k1, k2 = 2.0e5, 5.0e4
    model = stillsky.Model.from_toml_str(two_dof_toml(k1=k1, k2=k2, c1=beta * k1, c2=beta * k2))
    rng = np.random.default_rng(17)
    fs, n = 256.0, 1 << 20
    force = rng.normal(size=n)
    y = model.transient("force:n2:z", force, fs, outputs="n2:z").values[0]
    y = y + 0.02 * np.std(y) * rng.normal(size=n)
    r = stillsky.transfer_estimate(force, y, fs, nperseg=4096)
    modes = stillsky.frf_modes(r["freq_hz"], r["h1"], r["coherence"])
    ref = model.modes()
    assert len(modes) == 2, modes
    for j, m in enumerate(modes):
        f_true = ref.frequency_hz[j]
        assert m["frequency_hz"] == pytest.approx(f_true, rel=0.005)
        assert m["damping_ratio"] == pytest.approx(beta * np.pi * f_true, rel=0.10)


def test_calibrate_recovers_the_mount_tilt_stiffness():
    # Data synthesised from the demo rig with the mount's tilt stiffness at 2.6e4 N·m/rad; the
    # calibration starts from the file's 2.0e4 and matches the three lowest frequencies.
    text = EXAMPLE.read_text()
    assert "tilt_stiffness_nm_per_rad = 2.0e4" in text
    truth = stillsky.Model.from_toml_str(text.replace("tilt_stiffness_nm_per_rad = 2.0e4", "tilt_stiffness_nm_per_rad = 2.6e4"))
    targets = list(truth.modes().frequency_hz[:3])
    start = stillsky.Model.from_toml(EXAMPLE)
    assert "mount.tilt_stiffness_nm_per_rad" in stillsky.model_parameters(start)
    c = stillsky.calibrate(start, {"mount.tilt_stiffness_nm_per_rad": (5e3, 1e5)}, targets)
    assert c["values"][0] == pytest.approx(2.6e4, rel=0.01)
    assert c["converged"] and c["cost"] < c["initial_cost"]
    np.testing.assert_allclose(c["model"].modes().frequency_hz[:3], targets, rtol=1e-4)


def test_two_channel_bad_inputs_are_named():
    x = np.ones(512)
    with pytest.raises(stillsky.InvalidInputError, match="x.*no power at"):
        stillsky.transfer_estimate(np.zeros(512), np.arange(512.0), 10.0, nperseg=128)
    with pytest.raises(stillsky.InvalidInputError, match="not finite"):
        stillsky.transfer_estimate(np.where(np.arange(512) == 3, np.nan, 1.0), x, 10.0, nperseg=64)
    f = np.arange(1.0, 100.0)
    with pytest.raises(stillsky.InvalidInputError, match="freq_hz"):
        stillsky.frf_modes(f[::-1], np.ones(99, dtype=complex))
    with pytest.raises(stillsky.InvalidInputError, match="value 7"):
        stillsky.frf_modes(f, np.where(np.arange(99) == 7, np.nan, 1.0))
    model = stillsky.Model.from_toml(EXAMPLE)
    with pytest.raises(stillsky.InvalidInputError, match="tilt_stifness"):
        stillsky.calibrate(model, {"mount.tilt_stifness_nm_per_rad": (1e3, 1e5)}, [10.0])
    with pytest.raises(stillsky.InvalidInputError, match="not a number"):
        stillsky.calibrate(model, {"ground.soil": (1e3, 1e5)}, [10.0])
    with pytest.raises(stillsky.InvalidInputError, match="unknown key"):
        stillsky.calibrate(model, {"mount.tilt_stiffness_nm_per_rad": (1e3, 1e5)}, [{"frequency_hz": 10.0, "zeta": 0.1}])

"""Welch, CSD, coherence and Psd against scipy.signal and numpy."""

import numpy as np
import pytest
import scipy.signal

import stillsky

RNG = np.random.default_rng(20260)
X = RNG.normal(size=5001) + 0.3 * np.sin(2 * np.pi * 7.3 * np.arange(5001) / 100.0)
Y = np.convolve(X, [0.5, 0.3, 0.2], mode="same") + 0.1 * RNG.normal(size=X.size)

WELCH_CASES = [
    dict(nperseg=256),
    dict(nperseg=255, noverlap=100),
    dict(nperseg=128, noverlap=0, window="hamming"),
    dict(nperseg=301, noverlap=150, window="blackman", detrend="linear"),
    dict(nperseg=64, noverlap=63, window="boxcar", detrend=False),
    dict(nperseg=512, window="flattop"),
    dict(nperseg=200, window="blackmanharris", detrend="constant"),
]


@pytest.mark.parametrize("n", [5001, 4096, 777])
@pytest.mark.parametrize("kw", WELCH_CASES, ids=lambda kw: "-".join(f"{k}={v}" for k, v in kw.items()))
def test_welch_equals_scipy(kw, n):
    # Independent reference: scipy.signal.welch with the same arguments (density, one-sided).
    x = X[:n]
    f, p = stillsky.welch(x, 100.0, **kw)
    fr, pr = scipy.signal.welch(x, fs=100.0, **kw)
    np.testing.assert_allclose(f, fr, rtol=1e-12, atol=0)
    np.testing.assert_allclose(p, pr, rtol=1e-10, atol=1e-14 * pr.max())


def test_welch_custom_window_array():
    w = scipy.signal.get_window("hann", 128) ** 2
    f, p = stillsky.welch(X, 50.0, nperseg=128, window=w)
    _, pr = scipy.signal.welch(X, fs=50.0, nperseg=128, window=w)
    np.testing.assert_allclose(p, pr, rtol=1e-10)


@pytest.mark.parametrize("kw", WELCH_CASES[:4], ids=str)
def test_csd_and_coherence_equal_scipy(kw):
    # Independent reference: scipy.signal.csd / scipy.signal.coherence.
    f, pxy = stillsky.csd(X, Y, 100.0, **kw)
    _, ref = scipy.signal.csd(X, Y, fs=100.0, **kw)
    np.testing.assert_allclose(pxy, ref, rtol=1e-10, atol=1e-14 * np.abs(ref).max())
    f, c = stillsky.coherence(X, Y, 100.0, **kw)
    _, cref = scipy.signal.coherence(X, Y, fs=100.0, **kw)
    np.testing.assert_allclose(c, cref, rtol=1e-9, atol=1e-12)


def test_psd_rms_and_conversion():
    f = np.geomspace(1.0, 100.0, 400)
    s = 1e-6 * (f / 10.0) ** -1.5
    p = stillsky.Psd(f, s, "acceleration")
    # Trapezoid rule by numpy as reference (DESIGN: RMS integrals use the trapezoid rule).
    assert p.mean_square() == pytest.approx(np.trapezoid(s, f), rel=1e-12)
    assert p.rms() == pytest.approx(np.sqrt(np.trapezoid(s, f)), rel=1e-12)
    # Acceleration → displacement divides by (2πf)⁴ (harmonic motion, e^{iωt}).
    d = p.to("displacement")
    assert d.quantity == "displacement"
    np.testing.assert_allclose(d.values, s / (2 * np.pi * f) ** 4, rtol=1e-12)
    # Log–log resampling of a power law is exact (power law is a line in log–log).
    g = np.geomspace(2.0, 50.0, 37)
    np.testing.assert_allclose(p.resample(g).values, 1e-6 * (g / 10.0) ** -1.5, rtol=1e-10)
    with pytest.raises(stillsky.InvalidInputError, match="outside"):
        p.resample(np.array([0.5, 2.0]))
    assert p.resample(np.array([0.5, 2.0]), extrapolate="zero").values[0] == 0.0


def test_psd_from_csv_round_trip(tmp_path):
    f = np.geomspace(1.0, 100.0, 20)
    s = 1e-8 * np.ones_like(f)
    path = tmp_path / "ground.csv"
    header = "# stillsky psd, quantity=velocity, unit=(m/s)^2/Hz\nfreq_hz,value\n"
    path.write_text(header + "".join(f"{float(a)!r},{float(b)!r}\n" for a, b in zip(f, s)))
    p = stillsky.Psd.from_csv(path)
    assert p.quantity == "velocity"
    np.testing.assert_allclose(p.freq_hz, f, rtol=1e-15)
    np.testing.assert_allclose(p.values, s, rtol=1e-15)


def test_psd_from_csv_names_file_and_line(tmp_path):
    path = tmp_path / "bad.csv"
    path.write_text("# stillsky psd, quantity=velocity, unit=(m/s)^2/Hz\nfreq_hz,value\n1.0,1e-9\n0.5,1e-9\n")
    with pytest.raises(stillsky.InvalidInputError, match=r"bad\.csv.*line 4"):
        stillsky.Psd.from_csv(path)


def test_reference_ground_nlnm_below_nhnm():
    # Peterson (1993): the low-noise model lies below the high-noise model at every period.
    f = np.geomspace(0.05, 10.0, 100)
    lo, hi = stillsky.reference_ground("nlnm", f), stillsky.reference_ground("nhnm", f)
    assert lo.quantity == "acceleration" and np.all(lo.values < hi.values)
    # Peterson (1993), check values in docs/references.md#s4: NLNM at P = 1 s is −166.40 dB and
    # NHNM −116.85 dB re 1 (m/s²)²/Hz.
    s1 = stillsky.reference_ground("nlnm", np.array([0.9, 1.0, 1.1])).values[1]
    assert 10 * np.log10(s1) == pytest.approx(-166.40, abs=0.01)
    s1 = stillsky.reference_ground("nhnm", np.array([0.9, 1.0, 1.1])).values[1]
    assert 10 * np.log10(s1) == pytest.approx(-116.85, abs=0.01)


def test_criterion_curve_and_check():
    c, lim = stillsky.criterion_curve("vc-a")
    assert c[0] == pytest.approx(1.0, rel=0.03) and c[-1] == pytest.approx(80.0, rel=0.03)
    assert np.all(lim == 50e-6)  # VC-A: 50 µm/s band RMS (docs/references.md#s5, VC table)
    f = np.geomspace(0.5, 120.0, 2000)
    v = stillsky.Psd(f, np.full_like(f, 1e-14), "velocity")
    r = v.check_criterion("vc-a")
    assert r["passes"] and r["worst_ratio"] < 1.0


def test_wind_spectrum_variance():
    # Kaimal (1972) as normalised by the core: ∫ S_u df = σ_u² = (I_u U)² over a wide band.
    f = np.geomspace(1e-5, 1e3, 20000)
    p = stillsky.wind_spectrum("kaimal", f, 5.0, 2.0, turbulence_intensity=0.2)
    assert p.quantity == "velocity"
    assert p.mean_square() == pytest.approx((0.2 * 5.0) ** 2, rel=0.02)
    # IEC 61400-1 Kaimal and von Kármán, U = 5 m/s, σ_u = 1 m/s, z = 2 m (docs/references.md#s6,
    # values computed from the published formulas). The core rescales von Kármán by
    # sqrt(C_exact/70.8) so that it integrates to σ_u² exactly (docs/references.md#s6-3), hence the
    # table's rounded-constant values are met to 2e-4 only.
    f2 = np.array([0.01, 0.1, 1.0])
    iec = stillsky.wind_spectrum("kaimal-iec", f2, 5.0, 2.0, turbulence_intensity=0.2)
    np.testing.assert_allclose(iec.values, [7.334235, 2.167393, 1.039246e-1], rtol=1e-6)
    # von Kármán with its own length scale L = 3.5 Λ, Λ = 0.7 z (IEC 61400-1 ed. 2, annex B; from
    # memory: verify): S = 4 σ² (L/U) / (1 + 70.8 (f L/U)²)^(5/6).
    vk = stillsky.wind_spectrum("von-karman", f2, 5.0, 2.0, turbulence_intensity=0.2)
    t = 3.5 * 0.7 * 2.0 / 5.0
    np.testing.assert_allclose(vk.values, 4.0 * t / (1.0 + 70.8 * (f2 * t) ** 2) ** (5.0 / 6.0), rtol=2e-4)
    # Neither turbulence argument: the command line's default intensity, 0.2.
    np.testing.assert_array_equal(
        stillsky.wind_spectrum("kaimal", f, 5.0, 2.0).values,
        stillsky.wind_spectrum("kaimal", f, 5.0, 2.0, turbulence_intensity=0.2).values,
    )
    np.testing.assert_array_equal(
        stillsky.Wind("kaimal", 5.0, 2.0).spectrum(f).values,
        stillsky.Wind("kaimal", 5.0, 2.0, turbulence_intensity=0.2).spectrum(f).values,
    )
    with pytest.raises(stillsky.InvalidInputError, match="not both"):
        stillsky.wind_spectrum("kaimal", f, 5.0, 2.0, turbulence_intensity=0.2, roughness_length_m=0.05)


def test_identify_ringdown_two_mode_decay():
    # Closed form: x(t) = Σ A e^{−ζωt} cos(ω√(1−ζ²) t) (free decay of viscous modes, e.g. Ogata,
    # System Dynamics); the identified f and ζ must return the generating values.
    fs, t = 1000.0, np.arange(0, 4.0, 1e-3)
    modes = [(11.0, 0.02, 1.0), (37.0, 0.015, 0.4)]
    x = sum(a * np.exp(-z * 2 * np.pi * f * t) * np.cos(2 * np.pi * f * np.sqrt(1 - z * z) * t) for f, z, a in modes)
    r = stillsky.identify_ringdown(x, fs)
    assert isinstance(r.frequency_hz, np.ndarray)
    for f, z, _ in modes:
        k = int(np.argmin(np.abs(r.frequency_hz - f)))
        assert r.frequency_hz[k] == pytest.approx(f, rel=1e-3)
        assert r.damping_ratio[k] == pytest.approx(z, rel=0.03)
    assert not r.clipped
    assert r.summary()["clipped"] is False
    with pytest.raises(stillsky.InvalidInputError, match="fs"):
        stillsky.identify_ringdown(x, 0.0)

"""Sensor response (poles and zeros) against scipy.signal and ObsPy; removal within the valid
band; bundled noise curves and the noise-floor check."""

import numpy as np
import pytest
import scipy.signal

import stillsky


def geophone_paz(f0=4.5, zeta=0.7, g=28.8):
    # H(s) = G s² / (s² + 2ζω₀ s + ω₀²): two zeros at 0, poles −ζω₀ ± iω₀√(1 − ζ²).
    w0 = 2 * np.pi * f0
    wd = w0 * np.sqrt(1 - zeta**2)
    return np.zeros(2, complex), np.array([-zeta * w0 + 1j * wd, -zeta * w0 - 1j * wd]), g


def test_geophone_poles_zeros_and_response_match_scipy_freqs_zpk():
    s = stillsky.SensorResponse.geophone(4.5, 0.7, 28.8)
    z, p, k = geophone_paz()
    assert np.allclose(np.sort_complex(s.poles), np.sort_complex(p), rtol=1e-14, atol=0)
    assert np.all(s.zeros == 0) and s.gain == 28.8 and s.input == "velocity"
    f = np.geomspace(0.05, 500, 400)
    # scipy.signal.freqs_zpk evaluates k Π(s − z)/Π(s − p) at s = iω.
    _, h_ref = scipy.signal.freqs_zpk(z, p, k, worN=2 * np.pi * f)
    h = s.response(f)
    assert np.max(np.abs(h - h_ref) / np.abs(h_ref)) < 1e-9


def test_response_matches_obspy_paz_response():
    obspy_invsim = pytest.importorskip("obspy.signal.invsim")
    z, p, k = geophone_paz(10.0, 0.3, 80.0)
    s = stillsky.SensorResponse(z, p, k, "velocity", (1.0, 400.0))
    nfft, dt = 1024, 0.002
    # ObsPy's paz_to_freq_resp on the FFT grid 0..Nyquist (ObsPy 1.5.1 measured here: it
    # returns k Π(iω − z)/Π(iω − p) itself, agreeing to ~4e-16).
    h_obspy, freqs = obspy_invsim.paz_to_freq_resp(p, z, k, dt, nfft, freq=True)
    h = s.response(freqs[1:])
    ref = h_obspy[1:]
    assert np.max(np.abs(h - ref) / np.abs(ref)) < 1e-9


def test_removal_matches_a_numpy_deconvolution_and_recovers_a_synthetic_record():
    s = stillsky.SensorResponse.geophone(4.5, 0.7, 28.8)
    z, p, k = geophone_paz()
    fs, n = 200.0, 6000
    rng = np.random.default_rng(7)
    out = rng.normal(size=n) * 1e-4  # any record of the sensor's output (V)
    band = (2.0, 80.0)
    got = s.remove(out, fs, band)
    # The same removal by numpy and scipy: X/H on the rfft bins inside the band, zero outside.
    f = np.fft.rfftfreq(n, 1 / fs)
    X = np.fft.rfft(out)
    inside = (f >= band[0]) & (f <= band[1])
    _, h = scipy.signal.freqs_zpk(z, p, k, worN=2 * np.pi * f[inside])
    Y = np.zeros_like(X)
    Y[inside] = X[inside] / h
    ref = np.fft.irfft(Y, n)
    assert np.max(np.abs(got - ref)) < 1e-9 * np.max(np.abs(ref))
    # Synthetic: a ground velocity of bin-centred lines inside the band, through H (scipy's
    # response, per bin), and back.
    t = np.arange(n) / fs
    v = 1e-6 * np.cos(2 * np.pi * 3.0 * t + 0.2) + 2e-6 * np.sin(2 * np.pi * 12.5 * t) + 4e-7 * np.cos(2 * np.pi * 41.0 * t)
    V = np.fft.rfft(v)
    _, hf = scipy.signal.freqs_zpk(z, p, k, worN=2 * np.pi * f)
    volts = np.fft.irfft(V * hf, n)
    back = s.remove(volts, fs, band)
    assert np.max(np.abs(back - v)) < 1e-9 * np.max(np.abs(v))


def test_removal_refuses_a_band_outside_the_valid_band():
    s = stillsky.SensorResponse.geophone(4.5, 0.7, 28.8)
    lo, hi = s.valid_band_hz
    assert 1.0 < lo < 2.0 and hi == np.inf
    # |H|/G = 0.1 at the lower limit (the rule of the valid band).
    assert abs(abs(s.response([lo])[0]) / 28.8 - 0.1) < 1e-9
    with pytest.raises(stillsky.InvalidInputError, match="band"):
        s.remove(np.ones(256), 200.0, (0.5, 50.0))
    with pytest.raises(stillsky.InvalidInputError, match="Nyquist"):
        s.remove(np.ones(256), 200.0, (2.0, 150.0))
    with pytest.raises(stillsky.InvalidInputError, match="poles"):
        stillsky.SensorResponse([], [1.0 + 0j], 1.0, "velocity", (0.0, 10.0))


def test_flat_mems_and_noise_curves():
    m = stillsky.SensorResponse.flat_accelerometer(1.0, 50.0)
    assert m.input == "acceleration" and m.valid_band_hz == (0.0, 50.0)
    x = np.sin(np.arange(512) * 2 * np.pi * 8 / 512)
    assert np.allclose(m.remove(x, 100.0, (0.0, 50.0)), x, atol=1e-12)
    for name in ("phone-mems", "low-noise-mems", "geophone-4.5hz"):
        c = stillsky.noise_curve(name)
        assert c["quantity"] == "acceleration" and len(c["freq_hz"]) == len(c["psd"])
        assert "verify" in c["source"]
    phone = stillsky.noise_curve("phone-mems")
    # 150 µg/√Hz flat: the PSD is (150e-6 × 9.80665)² (m/s²)²/Hz.
    assert phone["psd"][0] == pytest.approx((150e-6 * 9.80665) ** 2, rel=1e-12)
    # A quiet site (Peterson's low-noise model, §4) recorded by a phone is all phone noise.
    f = np.geomspace(0.1, 50, 100)
    quiet = np.full(f.size, (20e-6 * 9.80665) ** 2)
    chk = stillsky.noise_floor_check(f, quiet, "acceleration", "phone-mems")
    assert chk["fraction_at_floor"] == 1.0 and "phone-mems" in chk["warning"]
    loud = np.full(f.size, (2000e-6 * 9.80665) ** 2)
    assert stillsky.noise_floor_check(f, loud, "acceleration", "phone-mems")["warning"] is None
    with pytest.raises(stillsky.InvalidInputError, match="noise curve"):
        stillsky.noise_curve("no-such-sensor")


def test_psd_removal_matches_scipy_freqs_zpk_inside_the_band_only():
    s = stillsky.SensorResponse.geophone(4.5, 0.7, 28.8)
    z, p, k = geophone_paz()
    f = np.geomspace(0.1, 200, 300)
    # A ground velocity PSD (invented) through |H|² from scipy.signal.freqs_zpk, and back.
    ground = 1e-14 * (1 + f / 10)
    _, h = scipy.signal.freqs_zpk(z, p, k, worN=2 * np.pi * f)
    volts2 = ground * np.abs(h) ** 2
    band = (2.0, 80.0)
    got = s.remove_psd(f, volts2, band)
    inside = (f >= band[0]) & (f <= band[1])
    assert np.max(np.abs(got[inside] - ground[inside]) / ground[inside]) < 1e-9
    assert np.all(got[~inside] == 0.0)
    # Default band: the valid band (no Nyquist for a PSD), open at the top.
    lo = s.valid_band_hz[0]
    assert np.array_equal(s.remove_psd(f, volts2) == 0.0, f < lo)
    with pytest.raises(stillsky.InvalidInputError, match="band low end"):
        s.remove_psd(f, volts2, (0.5, 80.0))
    with pytest.raises(stillsky.InvalidInputError, match="freq_hz"):
        s.remove_psd(f[::-1], volts2)

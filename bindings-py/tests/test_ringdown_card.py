"""The ring-down card: the damped-sine fit and its covariance against scipy.optimize.curve_fit,
the uncertainty against simulated taps, px/arcsec, before/after."""

import numpy as np
import pytest
import scipy.optimize

import stillsky


def tap(f, zeta, fs=200.0, n=4096, noise=0.02, seed=0, pre=0.3):
    # Free decay A e^{−ζω t} sin(ω_d t) after a short pre-trigger, white noise throughout.
    rng = np.random.default_rng(seed)
    t = np.arange(n) / fs
    w = 2 * np.pi * f
    wd = w * np.sqrt(1 - zeta**2)
    tt = np.clip(t - pre, 0, None)
    x = np.where(t >= pre, np.exp(-zeta * w * tt) * np.sin(wd * tt), 0.0)
    return x + rng.normal(scale=noise, size=n)


def test_fit_and_covariance_match_scipy_curve_fit():
    fs = 200.0
    x = tap(9.0, 0.03, fs=fs, seed=11)
    c = stillsky.ringdown_card(x, fs)
    fit = c["fit"]
    i0 = int(round(fit["t0_s"] * fs))
    y = x[i0 : i0 + fit["samples"]]
    t = np.arange(y.size) / fs

    def model(t, a, b, off, sigma, omega):
        return np.exp(-sigma * t) * (a * np.cos(omega * t) + b * np.sin(omega * t)) + off

    p0 = [fit["a"], fit["b"], fit["offset"], fit["sigma_per_s"], fit["omega_d_rad_s"]]
    p, cov = scipy.optimize.curve_fit(model, t, y, p0=p0)
    assert fit["sigma_per_s"] == pytest.approx(p[3], rel=1e-6)
    assert fit["omega_d_rad_s"] == pytest.approx(p[4], rel=1e-9)
    # ζ = σ/√(σ² + ω²) with first-order propagation of curve_fit's covariance.
    wn = np.hypot(p[3], p[4])
    g = np.array([p[4] ** 2 / wn**3, -p[3] * p[4] / wn**3])
    z_std = np.sqrt(g @ cov[3:, 3:] @ g)
    assert c["damping_ratio"]["value"] == pytest.approx(p[3] / wn, rel=1e-6)
    assert c["damping_ratio"]["fit_std"] == pytest.approx(z_std, rel=1e-3)


def test_uncertainty_covers_the_truth_in_most_simulated_taps():
    rng = np.random.default_rng(5)
    hits_f = hits_z = 0
    trials = 40
    for s in range(trials):
        f, z = rng.uniform(3, 25), rng.uniform(0.01, 0.08)
        c = stillsky.ringdown_card(tap(f, z, seed=100 + s, noise=rng.uniform(0.01, 0.03)), 200.0)
        hits_f += abs(c["frequency_hz"]["value"] - f) <= c["frequency_hz"]["uncertainty"]
        hits_z += abs(c["damping_ratio"]["value"] - z) <= c["damping_ratio"]["uncertainty"]
    assert hits_f >= 0.9 * trials and hits_z >= 0.9 * trials, (hits_f, hits_z)


def test_image_track_in_px_and_before_after():
    fs = 100.0
    plate = 0.6  # arcsec per px
    x = 3.0 * tap(5.0, 0.02, fs=fs, noise=0.01, seed=2)  # arcsec
    c = stillsky.ringdown_card(x, fs, plate_scale_arcsec_per_px=plate)
    assert c["first_excursion_px"] == pytest.approx(c["first_excursion"] / plate)
    assert c["threshold"] == pytest.approx(0.5 * plate) and c["threshold_px"] == pytest.approx(0.5)
    # Envelope A e^{−σt} falls to the threshold after ln(A/thr)/σ.
    a = np.hypot(c["fit"]["a"], c["fit"]["b"])
    assert c["settle_time_fit_s"] == pytest.approx(np.log(a / c["threshold"]) / c["fit"]["sigma_per_s"])
    after = 3.0 * tap(5.0, 0.08, fs=fs, noise=0.01, seed=3)
    r = stillsky.compare_ringdown_cards(x, after, fs, plate_scale_arcsec_per_px=plate)
    assert r["comparison"]["damping_change_resolved"]
    assert r["comparison"]["settle_time_fit_ratio"] < 0.5
    with pytest.raises(stillsky.InvalidInputError, match="plate_scale_arcsec_per_px"):
        stillsky.ringdown_card(x, fs, plate_scale_arcsec_per_px=-1.0)


def test_read_series_converts_px_with_the_plate_scale(tmp_path):
    p = tmp_path / "track.csv"
    p.write_text("# fs_hz=30\nx_px\n2\n-1\n")
    s = stillsky.read_series(p, plate_scale_arcsec_per_px=0.5)
    assert s.unit == "arcsec" and list(s.samples[:, 0]) == [1.0, -0.5]
    with pytest.raises(stillsky.InvalidInputError, match="plate_scale"):
        stillsky.read_series(p)

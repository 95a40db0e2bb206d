"""A person on the deck, from Python: the footfall force's Fourier lines against the published
load factors (numpy FFT), the standing tilt against the hand calculation for a rigid deck on
springs, and the walking pass against the steady footfall lines.

Load factors α = 0.5, 0.2, 0.1, 0.05 for harmonics 1-4 of the pace: Murray, Allen & Ungar
1997 (AISC Design Guide 11, sec. 2.2; from memory: verify). Deck statics: a rigid body on
vertical springs k at (±1, ±1) m rocks with k_rock = Σ k x² = 4k, so θ = W d / k_rock.
"""

import numpy as np
import pytest

import stillsky

ARCSEC = 180.0 / np.pi * 3600.0
G = 9.80665


def deck_model(k=1.0e6):
    text = """
[[body]]
name = "deck"
mass_kg = 200
cg_m = [0, 0, 0.1]
inertia_kgm2 = [60, 60, 120]
dofs = ["z", "rx", "ry"]
[[body]]
name = "scope"
mass_kg = 20
cg_m = [0, 0, 1.0]
inertia_kgm2 = [2, 2, 1]
dofs = ["x", "y", "z", "rx", "ry", "rz"]
[optics]
body = "scope"
focal_length_mm = 1000
pixel_um = 3.76
altitude_deg = 90
azimuth_deg = 0
"""
    for i, (x, y) in enumerate([(1, 1), (1, -1), (-1, 1), (-1, -1)]):
        text += (
            f'[[spring]]\nname = "post{i}"\nfrom = "ground"\nto = "deck"\nat_m = [{x}, {y}, 0.1]\n'
            f"direction = [0, 0, 1]\nstiffness_n_per_m = {k}\ndamping_ns_per_m = 2000\n"
        )
    for n, d in [("sx", "1, 0, 0"), ("sy", "0, 1, 0"), ("sz", "0, 0, 1")]:
        text += (
            f'[[spring]]\nname = "{n}"\nfrom = "deck"\nto = "scope"\nat_m = [0, 0, 0.5]\n'
            f"direction = [{d}]\nstiffness_n_per_m = 1e7\ndamping_ns_per_m = 2000\n"
            f'[[torsion_spring]]\nname = "t{n}"\nfrom = "deck"\nto = "scope"\naxis = [{d}]\n'
            f"stiffness_nm_per_rad = 2e6\ndamping_nms_per_rad = 200\n"
        )
    return stillsky.Model.from_toml_str(text)


def test_footfall_lines_recover_the_load_factors_by_numpy_fft():
    fs, n, pace = 200.0, 2000, 2.0
    skip = int(fs / pace)  # the one-step fade-in
    f = stillsky.footfall_force(fs, n + skip, mass_kg=70.0, pace_hz=pace)[skip:]
    spec = np.fft.rfft(f)
    w = 70.0 * G
    assert spec[0].real / n == pytest.approx(w, rel=1e-12)
    for h, a in enumerate([0.5, 0.2, 0.1, 0.05], start=1):
        amp = 2 * abs(spec[int(round(h * pace * n / fs))]) / n
        assert amp == pytest.approx(a * w, rel=1e-9)
    with pytest.raises(stillsky.StillskyError):
        stillsky.footfall_force(fs, 10, pace_hz=5.0)


def test_standing_tilt_is_weight_times_distance_over_rocking_stiffness():
    k = 1.0e6
    m = deck_model(k)
    d = np.array([0.0, 0.5, 1.0, 2.0])
    t = stillsky.standing_tilt(m, d, "deck", mass_kg=75.0)
    hand = 75.0 * G * d / (4 * k) * ARCSEC
    np.testing.assert_allclose(t["image_arcsec"], hand, rtol=1e-6, atol=1e-9)
    np.testing.assert_allclose(t["deck_tilt_arcsec"], hand, rtol=1e-6, atol=1e-9)
    scale = 206.264806 * 3.76 / 1000
    assert t["under_within_m"] == pytest.approx(0.5 * scale / ARCSEC * 4 * k / (75.0 * G), rel=1e-6)


def test_walking_pass_rms_matches_the_steady_lines():
    m = deck_model()
    p = stillsky.walking_pass(m, "deck", (1.5, 0.0), fs_hz=1000.0)
    s = stillsky.footfall_steady(m, "deck", (1.5, 0.0))
    assert p["rms_arcsec"] == pytest.approx(s["rms_arcsec"], rel=0.02)
    np.testing.assert_allclose(s["frequency_hz"], [2.0, 4.0, 6.0, 8.0])
    assert p["force_n"].shape == p["time_s"].shape

"""Machines near the rig, from Python: a tonal line on a single-DOF rig against the closed-form
transmissibility (numpy), and the ground distance ratio against the Bornitz relation.

SDOF transmissibility with rate-independent damping: T = sqrt(1 + eta²) / sqrt((1 - r²)² + eta²)
(Chopra, Dynamics of Structures, ch. 3; from memory: verify). Bornitz (1931):
A2/A1 = (r1/r2)^n exp(-pi f eta (r2 - r1) / c).
"""

import numpy as np
import pytest

import stillsky

ARCSEC = 180.0 / np.pi * 3600.0


def sdof(kt=1.0e5, eta=0.08, inertia=2.5):
    """One rotation rx on a torsion spring kt (1 + i eta) to the ground: theta / ground_rx = T(r)
    with omega_n² = kt / inertia."""
    return stillsky.Model.from_toml_str(f"""
[[body]]
name = "arm"
mass_kg = 10
cg_m = [0, 0, 0]
inertia_kgm2 = [{inertia}, {inertia}, {inertia}]
dofs = ["rx"]
[[torsion_spring]]
name = "t"
from = "ground"
to = "arm"
axis = [1, 0, 0]
stiffness_nm_per_rad = {kt}
loss_factor = {eta}
[optics]
body = "arm"
focal_length_mm = 1000
pixel_um = 4
altitude_deg = 90
azimuth_deg = 0
""")


def test_tone_image_matches_the_sdof_transmissibility():
    kt, eta, inertia = 1.0e5, 0.08, 2.5
    fn = np.sqrt(kt / inertia) / (2 * np.pi)
    f0 = np.array([0.5 * fn, fn, 2.5 * fn])
    a = 2e-7  # rad RMS
    r = stillsky.tone_image(sdof(kt, eta, inertia), [f"{f}:ground_rx:{a}:rad" for f in f0])
    ratio = f0 / fn
    t = np.sqrt(1 + eta**2) / np.sqrt((1 - ratio**2) ** 2 + eta**2)
    want_arcsec = t * a * ARCSEC
    np.testing.assert_allclose(r["line_rms_arcsec"], want_arcsec, rtol=1e-9)
    np.testing.assert_allclose(r["rms_arcsec"], np.sqrt(np.sum(want_arcsec**2)), rtol=1e-9)
    np.testing.assert_allclose(r["share"], want_arcsec**2 / np.sum(want_arcsec**2), rtol=1e-9)
    np.testing.assert_allclose(r["line_rms_um"], want_arcsec / ARCSEC * 1e6, rtol=1e-9)
    # The line at resonance carries nearly all of it.
    assert np.argmax(r["share"]) == 1


def test_tone_image_bad_lines_raise():
    m = sdof()
    with pytest.raises(stillsky.InvalidInputError, match="tone"):
        stillsky.tone_image(m, ["24:ground_rx:1e-6"])
    with pytest.raises(stillsky.InvalidInputError, match="does not fit"):
        stillsky.tone_image(m, ["24:ground_rx:1e-6:N"])
    with pytest.raises(stillsky.InvalidInputError):
        stillsky.tone_image(m, [])


def test_ground_distance_ratio_is_the_bornitz_relation():
    f = np.array([1.0, 10.0, 50.0])
    got = stillsky.ground_distance_ratio(f, 5.0, 20.0, wave="surface", loss_factor=0.1, wave_speed_m_s=200.0)
    want = (5.0 / 20.0) ** 0.5 * np.exp(-np.pi * f * 0.1 / 200.0 * 15.0)
    np.testing.assert_allclose(got, want, rtol=1e-13)
    body = stillsky.ground_distance_ratio(f, 2.0, 8.0, wave="body-at-surface", loss_factor=0.0)
    np.testing.assert_allclose(body, 1.0 / 16.0, rtol=1e-13)
    with pytest.raises(stillsky.InvalidInputError, match="wave kind"):
        stillsky.ground_distance_ratio(f, 5.0, 20.0, wave="love")
    with pytest.raises(stillsky.InvalidInputError):
        stillsky.ground_distance_ratio(f, 0.0, 20.0)

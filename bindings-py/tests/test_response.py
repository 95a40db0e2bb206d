"""Model.response: response PSD of an output under uncorrelated ground and load spectra."""

import pathlib

import numpy as np
import pytest

import stillsky
from conftest import lawn_rotation_psds, sdof_toml, two_dof_toml

EXAMPLE = pathlib.Path(__file__).resolve().parents[2] / "docs" / "examples" / "tripod-lawn.toml"


def test_response_equals_numpy_sum_of_h2_s():
    # Independent reference: for uncorrelated inputs S_y(f) = Σ_i |H_yi(f)|² S_i(f)
    # (random-vibration input–output relation, e.g. Bendat & Piersol, Random Data), with H from
    # Model.frf and the ground acceleration PSD turned into displacement by S_d = S_a/(2πf)⁴.
    m = stillsky.Model.from_toml_str(two_dof_toml(loss=0.04, c1=30.0))
    f = np.geomspace(0.5, 200.0, 400)
    s_a = 1e-10 * (1.0 + (f / 20.0) ** 2)  # invented ground acceleration PSD, (m/s²)²/Hz
    s_f = 0.01 / (1.0 + (f / 50.0) ** 2)  # invented force PSD, N²/Hz
    g = stillsky.Psd(f, s_a, "acceleration")
    load = stillsky.Psd(f, s_f, "force")
    r = m.response(f, ground={"z": g}, loads={"force:n1:z": load}, output="n2:z")
    assert isinstance(r, stillsky.Psd) and r.quantity == "displacement"
    h_g = m.frf(f, "ground_z", "n2:z")
    h_f = m.frf(f, "force:n1:z", "n2:z")
    expect = np.abs(h_g) ** 2 * s_a / (2 * np.pi * f) ** 4 + np.abs(h_f) ** 2 * s_f
    np.testing.assert_allclose(r.freq_hz, f, rtol=0, atol=0)
    np.testing.assert_allclose(r.values, expect, rtol=1e-9)


def test_response_several_outputs_and_angles():
    m = stillsky.Model.from_toml(EXAMPLE)
    f = np.geomspace(0.5, 10.0, 200)
    g = stillsky.reference_ground("nhnm", f)
    r = m.response(f, ground={"x": g, "y": g, "z": g}, output=["payload:rx", "image_x"])
    assert set(r) == {"payload:rx", "image_x"}
    assert r["image_x"].quantity == "angle" and r["payload:rx"].quantity == "angle"
    # Σ over the uncorrelated ground inputs of |H|² S, from frf (same relation as above); the lawn's
    # ground also tilts and twists (conftest.lawn_rotation_psds).
    s_d = g.to("displacement").values
    inputs = ["ground_x", "ground_y", "ground_z", "ground_rx", "ground_ry", "ground_rz"]
    h = m.frf(f, inputs, ["image_x"])[:, 0, :]
    s_in = np.stack([s_d, s_d, s_d, *lawn_rotation_psds(f, s_d, s_d, s_d)], axis=1)
    np.testing.assert_allclose(r["image_x"].values, (np.abs(h) ** 2 * s_in).sum(axis=1), rtol=1e-9)


def test_response_wind_matches_image_motion_path():
    m = stillsky.Model.from_toml(EXAMPLE)
    f = np.geomspace(1.0, 100.0, 150)
    w = stillsky.Wind("kaimal", 6.0, 1.5, turbulence_intensity=0.2)
    r = m.response(f, wind=w, output="image_x")
    im = m.image_motion(f, wind=w, mode_shares=False)
    # The same disturbance through the image-motion path (in arcsec²/Hz): 206264.806² rad² per arcsec².
    np.testing.assert_allclose(r.values * 206264.80624709636**2, im.psd[0], rtol=1e-9)


def test_miles_equation_white_force_on_sdof():
    # Miles (1954), force-input form (docs/references.md#s3): an SDOF under white one-sided force PSD
    # S0 has displacement mean square σ² = (π/2) f_n Q S0 / k², Q = 1/(2ζ) (= S0/(4kc)).
    mass, k, zeta = 2.0, 1.0e4, 0.02
    c = float(2 * zeta * np.sqrt(k * mass))
    m = stillsky.Model.from_toml_str(sdof_toml(m=mass, k=k, c=c))
    fn = np.sqrt(k / mass) / (2 * np.pi)
    f = np.geomspace(1e-4 * fn, 1e3 * fn, 40000)
    s0 = 0.5
    r = m.response(f, loads={"force:mass:z": stillsky.Psd(f, np.full_like(f, s0), "force")}, output="mass:z")
    miles = np.pi / 2 * fn * (1 / (2 * zeta)) * s0 / k**2
    # 1e-4: trapezoid with ~100 points per half-power band, plus the band below 1e-4 f_n (~3e-6);
    # measured −2.5e-6.
    assert r.mean_square() == pytest.approx(miles, rel=1e-4)


def test_response_bad_inputs():
    m = stillsky.Model.from_toml_str(sdof_toml())
    f = np.geomspace(1.0, 10.0, 5)
    p = stillsky.Psd(f, np.ones(5), "force")
    with pytest.raises(stillsky.InvalidInputError, match="nowhere"):
        m.response(f, loads={"force:mass:z": p}, output="nowhere")
    with pytest.raises(stillsky.InvalidInputError, match="ground axis"):
        m.response(f, ground={"w": p}, output="mass:z")
    with pytest.raises(stillsky.InvalidInputError, match="freq_hz"):
        m.response([3.0, 1.0], loads={"force:mass:z": p}, output="mass:z")
    with pytest.raises(TypeError):
        m.response(f, loads={"force:mass:z": p})  # output is required

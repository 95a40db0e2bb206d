"""Model.image_motion against an independent numpy evaluation from Model.frf."""

import pathlib

import numpy as np
import pytest

import stillsky
from conftest import lawn_rotation_psds

ARCSEC_PER_RAD = 648000.0 / np.pi
EXAMPLE = pathlib.Path(__file__).resolve().parents[2] / "docs" / "examples" / "tripod-lawn.toml"


@pytest.fixture(scope="module")
def model():
    return stillsky.Model.from_toml(EXAMPLE)


def test_image_rms_equals_numpy_from_frf(model):
    # Independent path: uncorrelated ground inputs, S_img = Σ_d |H_img,d|² S_ground,d, RMS by
    # numpy's trapezoid rule (DESIGN: RMS by the trapezoid rule), rad → arcsec × 648000/π
    # (definition of the arcsecond; DESIGN's rounded 206264.806 differs by 1.2e-9).
    f = np.geomspace(0.5, 100.0, 600)
    s_disp = 1e-16 * (f / 5.0) ** -4  # invented ground displacement PSD, m²/Hz
    ground = stillsky.Psd(f, s_disp, "displacement")
    r = model.image_motion(freq_hz=f, ground={"x": ground, "y": ground, "z": ground}, mode_shares=False)
    inputs = ["ground_x", "ground_y", "ground_z", "ground_rx", "ground_ry", "ground_rz"]
    h = model.frf(f, inputs, ["image_x", "image_y"])
    # The lawn's ground also tilts and twists (conftest.lawn_rotation_psds).
    s_in = np.stack([s_disp, s_disp, s_disp, *lawn_rotation_psds(f, s_disp, s_disp, s_disp)], axis=1)
    s_img = (np.abs(h) ** 2 * s_in[:, None, :]).sum(axis=2) * ARCSEC_PER_RAD**2
    per_axis = np.sqrt(np.trapezoid(s_img, f, axis=0))
    np.testing.assert_allclose(r.per_axis_arcsec, per_axis, rtol=1e-12)
    assert r.rms_arcsec == pytest.approx(np.hypot(*per_axis), rel=1e-12)
    np.testing.assert_allclose(r.psd, s_img.T, rtol=1e-12)
    assert r.psd.shape == (2, f.size) and r.cumulative_rms_arcsec.shape == (2, f.size)
    # Plate scale ″/px = (648000/π)·1e-3 × pixel_um / f_mm (DESIGN conventions): 3.76 µm at 2800 mm.
    assert r.plate_scale_arcsec_per_px == pytest.approx(ARCSEC_PER_RAD * 1e-3 * 3.76 / 2800, rel=1e-12)
    assert r.rms_px == pytest.approx(r.rms_arcsec / r.plate_scale_arcsec_per_px, rel=1e-9)


def test_one_psd_means_all_three_axes_and_summary(model):
    f = np.geomspace(0.5, 100.0, 200)
    g = stillsky.Psd(f, 1e-16 * (f / 5.0) ** -4, "displacement")
    a = model.image_motion(f, ground=g)
    b = model.image_motion(f, ground={"x": g, "y": g, "z": g})
    np.testing.assert_array_equal(a.psd, b.psd)
    s = a.summary()
    assert s["rms_arcsec"] == a.rms_arcsec and "psd_arcsec2" not in s
    assert sum(m["share"] for m in a.mode_share) == pytest.approx(1.0, abs=1e-9)
    assert sum(a.input_share.values()) == pytest.approx(1.0, abs=1e-9)
    assert a.p_outside() == s["p_outside"]
    # Rayleigh tail for an isotropic Gaussian is the upper bound check only when σx ≠ σy; here
    # check monotonicity and the limits (a probability), computed by the core per radius.
    p = [a.p_outside(r) for r in (0.0, 0.25, 0.5, 1.0, 4.0)]
    assert p[0] == pytest.approx(1.0) and all(x >= y for x, y in zip(p, p[1:])) and p[-1] < p[0]


def test_wind_equals_numpy_linearised_drag(model):
    # Quasi-steady linearised drag (docs/references.md#s6-6; e.g. Simiu & Scanlan, Wind Effects on
    # Structures): S_F = (ρ Σ C_d A U)² S_u, with ρ = 1.225 kg/m³ and the parts the rig derives
    # (tripod-lawn.toml), the speed carried to their C_d A-weighted height by the log profile of
    # EN 1991-1-4 (z0 = 0.05 m, held below z_min = 2 m) with σ_u kept, S_u of that height;
    # S_img = |H_wind→image|² S_F. With the admittance (the default) S_F is multiplied by
    # Vickery's |χ|² = 1/[1 + (2f√A/U)^{4/3}]² with A = Σ A (docs/references.md#s6-7).
    f = np.geomspace(0.2, 100.0, 400)
    wind = stillsky.Wind("kaimal", 4.0, 2.0, turbulence_intensity=0.2, admittance=False)
    r = model.image_motion(f, wind=wind, mode_shares=False)
    np.testing.assert_array_equal(
        wind.spectrum(f).values, stillsky.wind_spectrum("kaimal", f, 4.0, 2.0, turbulence_intensity=0.2).values
    )
    parts = model.wind_parts()
    cda = sum(p["drag_coefficient"] * p["area_m2"] for p in parts)
    area = sum(p["area_m2"] for p in parts)
    z = sum(p["drag_coefficient"] * p["area_m2"] * p["centre_of_pressure_m"][2] for p in parts) / cda
    u = 4.0 * np.log(max(z, 2.0) / 0.05) / np.log(2.0 / 0.05)
    su = stillsky.wind_spectrum("kaimal", f, u, z, turbulence_intensity=0.2 * 4.0 / u).values
    s_force = (1.225 * cda * u) ** 2 * su
    h = model.frf(f, "wind", ["image_x", "image_y"])[:, :, 0]
    s_img = (np.abs(h) ** 2 * s_force[:, None]).T * ARCSEC_PER_RAD**2
    np.testing.assert_allclose(r.psd, s_img, rtol=1e-10)
    assert r.input_share == {"wind": pytest.approx(1.0)}
    default = stillsky.Wind("kaimal", 4.0, 2.0, turbulence_intensity=0.2)
    assert default.admittance and not wind.admittance
    chi2 = 1.0 / (1.0 + (2.0 * f * np.sqrt(area) / u) ** (4.0 / 3.0)) ** 2
    r2 = model.image_motion(f, wind=default, mode_shares=False)
    np.testing.assert_allclose(r2.psd, s_img * chi2, rtol=1e-10)
    # A forecast's 10 m wind is carried down to the parts: 4 m/s at 10 m is ln(2/0.05)/ln(10/0.05)
    # of it at the parts (below z_min = 2 m), with the same σ_u.
    w10 = stillsky.Wind("kaimal", 4.0, 10.0, turbulence_intensity=0.2, admittance=False)
    u10 = 4.0 * np.log(2.0 / 0.05) / np.log(10.0 / 0.05)
    su10 = stillsky.wind_spectrum("kaimal", f, u10, z, turbulence_intensity=0.8 / u10).values
    r10 = model.image_motion(f, wind=w10, mode_shares=False)
    np.testing.assert_allclose(r10.psd, (np.abs(h) ** 2 * ((1.225 * cda * u10) ** 2 * su10)[:, None]).T * ARCSEC_PER_RAD**2, rtol=1e-10)


def test_loads_mapping_and_pairs_agree(model):
    f = np.geomspace(0.5, 100.0, 300)
    force = stillsky.Psd(f, np.full(f.size, 1e-4), "force")
    a = model.image_motion(f, loads={"force:payload:x": force})
    b = model.image_motion(f, loads=[("force:payload:x", force)])
    np.testing.assert_array_equal(a.psd, b.psd)
    h = model.frf(f, "force:payload:x", ["image_x", "image_y"])[:, :, 0]
    np.testing.assert_allclose(a.psd, (np.abs(h) ** 2 * 1e-4).T * ARCSEC_PER_RAD**2, rtol=1e-10)


def test_image_motion_needs_valid_ground(model):
    f = np.geomspace(1.0, 50.0, 50)
    with pytest.raises(stillsky.InvalidInputError, match="3"):
        model.image_motion(f, ground=[None, None])
    with pytest.raises(stillsky.InvalidInputError):
        model.image_motion(np.array([2.0, 1.0]))
    with pytest.raises(stillsky.InvalidInputError, match="ground axis"):
        model.image_motion(f, ground={"w": stillsky.Psd(f, np.ones(f.size), "displacement")})
    with pytest.raises(stillsky.InvalidInputError, match="radius_px"):
        model.image_motion(f, ground=stillsky.Psd(f, np.ones(f.size), "displacement")).p_outside(-1.0)
    with pytest.raises(stillsky.InvalidInputError, match="not both"):
        stillsky.Wind("kaimal", 4.0, 2.0, turbulence_intensity=0.2, roughness_length_m=0.05)

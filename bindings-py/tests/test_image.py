"""Model.image_motion against an independent numpy evaluation from Model.frf."""

import pathlib

import numpy as np
import pytest

import stillsky

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
    r = model.image_motion(f, ground=ground, mode_shares=False)
    h = model.frf(f, ["ground_x", "ground_y", "ground_z"], ["image_x", "image_y"])
    s_img = (np.abs(h) ** 2 * s_disp[:, None, None]).sum(axis=2) * ARCSEC_PER_RAD**2
    per_axis = np.sqrt(np.trapezoid(s_img, f, axis=0))
    np.testing.assert_allclose(r["per_axis_arcsec"], per_axis, rtol=1e-12)
    assert r["rms_arcsec"] == pytest.approx(np.hypot(*per_axis), rel=1e-12)
    np.testing.assert_allclose(r["psd_arcsec2"], s_img.T, rtol=1e-12)
    assert r["psd_arcsec2"].shape == (2, f.size) and r["cumulative_rms_arcsec"].shape == (2, f.size)
    # Plate scale ″/px = (648000/π)·1e-3 × pixel_um / f_mm (DESIGN conventions): 3.76 µm at 2800 mm.
    assert r["plate_scale_arcsec_per_px"] == pytest.approx(ARCSEC_PER_RAD * 1e-3 * 3.76 / 2800, rel=1e-12)
    assert r["rms_px"] == pytest.approx(r["rms_arcsec"] / r["plate_scale_arcsec_per_px"], rel=1e-9)


def test_image_motion_needs_valid_ground(model):
    f = np.geomspace(1.0, 50.0, 50)
    with pytest.raises(stillsky.InvalidInputError, match="3"):
        model.image_motion(f, ground=[None, None])
    with pytest.raises(stillsky.InvalidInputError):
        model.image_motion(np.array([2.0, 1.0]))

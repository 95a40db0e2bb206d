"""A pointing given in Python poses the payload exactly as editing the model file does."""

import pathlib
import pickle

import numpy as np
import pytest

import stillsky

EXAMPLE = pathlib.Path(__file__).resolve().parents[2] / "docs" / "examples" / "tripod-paver.toml"


def summary(m):
    f = np.geomspace(0.2, 100.0, 300)
    wind = stillsky.Wind("kaimal", 4.0, 2.0, turbulence_intensity=0.2)
    modes = m.modes()
    r = m.image_motion(freq_hz=f, wind=wind, mode_shares=False)
    return modes.frequency_hz, modes.damping_ratio, r.rms_arcsec


def test_pointing_keywords_equal_an_edited_file():
    text = EXAMPLE.read_text()
    edited = text.replace("altitude_deg = 45", "altitude_deg = 80").replace("azimuth_deg = 135", "azimuth_deg = 250")
    a = stillsky.Model.from_toml(EXAMPLE, altitude_deg=80.0, azimuth_deg=250.0)
    b = stillsky.Model.from_toml_str(edited, "edited")
    c = stillsky.Model.from_toml_str(text, "own", altitude_deg=80.0, azimuth_deg=250.0)
    fa, za, ra = summary(a)
    for other in (b, c, pickle.loads(pickle.dumps(a))):
        fb, zb, rb = summary(other)
        np.testing.assert_allclose(fa, fb, rtol=1e-12)
        np.testing.assert_allclose(za, zb, rtol=1e-12)
        assert ra == pytest.approx(rb, rel=1e-12)
    # The file's own 45° is another pose: other modes.
    f45, _, _ = summary(stillsky.Model.from_toml(EXAMPLE))
    assert np.max(np.abs(f45 - fa) / fa) > 1e-3


def test_pointing_out_of_range_is_a_named_error():
    with pytest.raises(stillsky.InvalidInputError, match="optics.altitude_deg"):
        stillsky.Model.from_toml(EXAMPLE, altitude_deg=95.0)


EQUATORIAL = EXAMPLE.parent / "equatorial-pier.toml"


def test_equatorial_pointing_keywords_equal_an_edited_file():
    text = EQUATORIAL.read_text()
    edited = (
        text.replace("hour_angle_deg = 22.5", "hour_angle_deg = -40")
        .replace("declination_deg = 35", "declination_deg = 60")
        .replace('pier_side = "east"', 'pier_side = "west"')
    )
    a = stillsky.Model.from_toml(EQUATORIAL, hour_angle_deg=-40.0, declination_deg=60.0, pier_side="west")
    b = stillsky.Model.from_toml_str(edited, "edited")
    fa, za, ra = summary(a)
    fb, zb, rb = summary(b)
    np.testing.assert_allclose(fa, fb, rtol=1e-12)
    np.testing.assert_allclose(za, zb, rtol=1e-12)
    assert ra == pytest.approx(rb, rel=1e-12)
    assert {"image_ra", "image_dec"} <= set(a.output_names)
    with pytest.raises(stillsky.InvalidInputError, match="pier_side"):
        stillsky.Model.from_toml(EQUATORIAL, pier_side="north")
    with pytest.raises(stillsky.InvalidInputError, match="hour angle"):
        stillsky.Model.from_toml(EQUATORIAL, altitude_deg=30.0)

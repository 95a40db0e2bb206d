"""Model.sky_map: each cell is the model pointed there on its own; the cells below 20° altitude
are exactly those numpy's altitude formula puts there, and they are never named best or worst."""

import pathlib

import numpy as np
import pytest

import stillsky

EXAMPLES = pathlib.Path(__file__).resolve().parents[2] / "docs" / "examples"
EQUATORIAL = EXAMPLES / "equatorial-pier.toml"
TRIPOD = EXAMPLES / "tripod-paver.toml"
FREQ = np.geomspace(0.2, 100.0, 200)
WIND = stillsky.Wind("kaimal", 4.0, 2.0, turbulence_intensity=0.2)
HA = np.array([-75.0, -15.0, 30.0, 90.0])
DEC = np.array([-35.0, 0.0, 45.0, 85.0])


def altitude_deg(lat, ha, dec):
    """Meeus, Astronomical Algorithms (2nd ed.), ch. 13: sin h = sin φ sin δ + cos φ cos δ cos H."""
    p, h, d = np.radians(lat), np.radians(ha), np.radians(dec)
    return np.degrees(np.arcsin(np.sin(p) * np.sin(d) + np.cos(p) * np.cos(d) * np.cos(h)))


@pytest.fixture(scope="module")
def eq_map():
    m = stillsky.Model.from_toml(EQUATORIAL)
    return m.sky_map(FREQ, wind=WIND, hour_angles_deg=HA, declinations_deg=DEC)


def test_cells_equal_single_pointings(eq_map):
    assert eq_map["frame"] == "equatorial"
    assert eq_map["axes"] == ("hour_angle_deg", "declination_deg")
    np.testing.assert_array_equal(eq_map["hour_angle_deg"], HA)
    np.testing.assert_array_equal(eq_map["declination_deg"], DEC)
    rms, px = eq_map["rms_arcsec"], eq_map["rms_px"]
    assert rms.shape == px.shape == (HA.size, DEC.size) and rms.dtype == np.float64
    checked = 0
    for i, h in enumerate(HA):
        for j, d in enumerate(DEC):
            if np.isnan(rms[i, j]):
                continue
            side = "east" if h >= 0 else "west"  # the usual side: counterweights low
            one = stillsky.Model.from_toml(EQUATORIAL, hour_angle_deg=h, declination_deg=d, pier_side=side)
            im = one.image_motion(FREQ, wind=WIND, mode_shares=False)
            assert rms[i, j] == pytest.approx(im.rms_arcsec, rel=1e-9)
            assert px[i, j] == pytest.approx(im.rms_px, rel=1e-9)
            checked += 1
    assert checked >= 8
    # Alt-azimuth: one cell of the tripod against the tripod pointed there.
    t = stillsky.Model.from_toml(TRIPOD).sky_map(FREQ, wind=WIND, altitudes_deg=[35.0, 75.0], azimuths_deg=[200.0])
    assert t["frame"] == "alt_az" and t["rms_arcsec"].shape == (2, 1)
    # The sides used above are the ones the map says it uses; an alt-az map has no pier side.
    assert "west of it for hour angles below 0, east from the meridian on" in eq_map["pier_side"]
    assert t["pier_side"] is None
    one = stillsky.Model.from_toml(TRIPOD, altitude_deg=75.0, azimuth_deg=200.0)
    assert t["rms_arcsec"][1, 0] == pytest.approx(one.image_motion(FREQ, wind=WIND).rms_arcsec, rel=1e-9)


def test_low_cells_skipped_by_the_altitude_formula(eq_map):
    lat = eq_map["latitude_deg"]
    assert lat == 48.0
    alt = altitude_deg(lat, HA[:, None], DEC[None, :])
    np.testing.assert_allclose(eq_map["cell_altitude_deg"], alt, atol=1e-9)
    low = alt < 20.0
    assert low.any() and (~low).any()
    np.testing.assert_array_equal(np.isnan(eq_map["rms_arcsec"]), low)
    np.testing.assert_array_equal(np.isnan(eq_map["rms_px"]), low)
    best, worst = eq_map["best"], eq_map["worst"]
    assert best["rms_arcsec"] == np.nanmin(eq_map["rms_arcsec"])
    assert worst["rms_arcsec"] == np.nanmax(eq_map["rms_arcsec"])
    for c in (best, worst):
        assert altitude_deg(lat, c["row_deg"], c["col_deg"]) >= 20.0
        assert c["altitude_deg"] == pytest.approx(altitude_deg(lat, c["row_deg"], c["col_deg"]), abs=1e-9)
        assert HA[c["row"]] == c["row_deg"] and DEC[c["col"]] == c["col_deg"]
        assert c["place"].startswith("hour angle ")
    assert eq_map["summary"].startswith("best: hour angle ")
    # The CSV holds the same numbers, one row per cell.
    rows = np.genfromtxt(eq_map["csv"].splitlines(), delimiter=",", names=True)
    assert rows.dtype.names == ("hour_angle_deg", "declination_deg", "rms_arcsec", "rms_px")
    np.testing.assert_array_equal(rows["rms_arcsec"], eq_map["rms_arcsec"].ravel())


def test_bad_grids_are_named_errors():
    eq = stillsky.Model.from_toml(EQUATORIAL)
    with pytest.raises(stillsky.InvalidInputError, match="sky grid"):
        eq.sky_map(FREQ, wind=WIND, altitudes_deg=[30.0])
    with pytest.raises(stillsky.InvalidInputError, match="sky grid declination_deg"):
        eq.sky_map(FREQ, wind=WIND, declinations_deg=[100.0])
    with pytest.raises(stillsky.InvalidInputError, match="sky grid hour_angle_deg"):
        eq.sky_map(FREQ, wind=WIND, hour_angles_deg=[])
    with pytest.raises(stillsky.InvalidInputError, match="from_azimuth_deg"):
        eq.sky_map(FREQ, wind=WIND, wind_from_deg=float("nan"))

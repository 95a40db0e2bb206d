"""Design studies from Python: stillsky.study gives the command line's rows (its CSV byte for
byte) and stillsky.distributed.study on a LocalCluster gives the same rows bit for bit."""

import math
import os
import struct
import subprocess
from pathlib import Path

import pytest

import stillsky

EX = Path(__file__).resolve().parents[2] / "docs" / "examples"


def bits(row):
    """A row with every float as its IEEE-754 bytes, so NaN == NaN and -0.0 != 0.0."""
    return {k: struct.pack("<d", v) if isinstance(v, float) else v for k, v in row.items()}


def small_study(tmp_path):
    """A crossed study of the demo rig: a path, the heavier tripod, a bad value, calm and 4 m/s."""
    text = f"""
model = "{EX / 'tripod-paver.toml'}"
[[vary]]
path = "tripod.leg_length_m"
values = [1.1, -1.0]
[[vary]]
rigs = [{{ label = "heavier", file = "{EX / 'tripod-paver-heavy.toml'}" }}]
[disturbances]
grounds = ["nhnm"]
winds = ["calm", "4"]
[settings]
f_min_hz = 0.5
f_max_hz = 60
n_freq = 120
"""
    p = tmp_path / "small-study.toml"
    p.write_text(text, encoding="utf-8")
    return p


def test_study_rows_and_their_csv(tmp_path):
    p = small_study(tmp_path)
    t = stillsky.study(p)
    assert t.columns[:4] == ("key", "variant", "tripod.leg_length_m", "rig")
    # base first (1.25 is not among the values), then 2 × 2 variants; two winds each.
    assert len(t) == 5 * 2
    assert t[0]["variant"] == "base" and t[0]["vs_base"] == "base"
    bad = [r for r in t if r["variant"].startswith("tripod.leg_length_m=-1")]
    assert bad and all(r["status"] == "error" and "leg_length" in r["error"] for r in bad)
    assert len(t.errors()) == len(bad)
    good = [r for r in t if r["status"] == "ok"]
    assert all(r["rms_px"] > 0 for r in good)
    # Windy rows carry a gust peak, calm rows none (NaN).
    assert all(math.isnan(r["gust_peak_px"]) == (r["wind"] == "calm") for r in good)
    # The ratio is the RMS over the base's under the same wind (to rounding of one division).
    for r in good:
        b = next(x for x in t if x["variant"] == "base" and x["wind"] == r["wind"])
        assert r["ratio_to_base"] == pytest.approx(r["rms_arcsec"] / b["rms_arcsec"], rel=1e-15)
    exe = os.environ.get("STILLSKY_BIN")
    if not exe:
        pytest.skip("STILLSKY_BIN is not set: run the tests through scripts/test-all.sh")
    out = tmp_path / "cli.csv"
    r = subprocess.run([exe, "study", str(p), "--out", str(out)], capture_output=True, text=True)
    assert r.returncode == 1, r.stderr  # rows failed (the bad value), the rest were written
    assert t.to_csv() == out.read_text(encoding="utf-8")


def test_distributed_study_gives_the_same_rows_bit_for_bit(tmp_path):
    distributed = pytest.importorskip("distributed")
    sd = pytest.importorskip("stillsky.distributed")
    p = small_study(tmp_path)
    local = stillsky.study(p)
    cluster = distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None)
    try:
        with distributed.Client(cluster) as c:
            remote = sd.study(c, p, variants_per_task=2)
    finally:
        cluster.close()
    assert [bits(r) for r in remote] == [bits(r) for r in local]
    assert remote.to_csv() == local.to_csv()


def test_study_standing_tilt_and_ground_distance_match_the_module_functions(tmp_path):
    """The study's standing-tilt outcome is stillsky.standing_tilt on the same model; its ground
    distance variable scales the image RMS by stillsky.ground_distance_ratio (with no soil loss
    the Bornitz ratio (r1/r2)^0.5 is the same at every frequency, so a linear rig's image RMS
    scales by exactly it)."""
    text = f"""
model = "{EX / 'tripod-deck.toml'}"
[[vary]]
setting = "person_distance_m"
values = [0.5, 2.0]
[[vary]]
setting = "ground_distance_m"
values = [5, 20]
[disturbances]
grounds = ["nhnm"]
[settings]
f_min_hz = 0.5
f_max_hz = 60
n_freq = 120
person_kg = 80
ground_measured_at_m = 5
soil_loss_factor = 0
"""
    p = tmp_path / "people-road.toml"
    p.write_text(text, encoding="utf-8")
    t = stillsky.study(p)
    assert "standing_tilt_arcsec" in t.columns and "standing_tilt_px" in t.columns
    rows = {(r["person_distance_m"], r["ground_distance_m"]): r for r in t if r["status"] == "ok"}
    m = stillsky.Model.from_toml(EX / "tripod-deck.toml")
    ref = stillsky.standing_tilt(m, [0.5, 2.0], "floor", mass_kg=80.0)
    for d, want in zip(["0.5", "2"], ref["image_arcsec"]):
        assert rows[(d, "5")]["standing_tilt_arcsec"] == pytest.approx(want, rel=1e-12)
    # A rigid deck on springs tilts by W d / k_rock: farther from the stand, more tilt.
    assert rows[("2", "5")]["standing_tilt_arcsec"] > rows[("0.5", "5")]["standing_tilt_arcsec"]
    ratio = stillsky.ground_distance_ratio([1.0, 30.0], 5.0, 20.0, loss_factor=0.0)
    assert ratio[0] == pytest.approx(0.5, rel=1e-15) and ratio[1] == pytest.approx(0.5, rel=1e-15)
    for d in ["0.5", "2"]:
        got = rows[(d, "20")]["rms_arcsec"] / rows[(d, "5")]["rms_arcsec"]
        assert got == pytest.approx(ratio[0], rel=1e-12)

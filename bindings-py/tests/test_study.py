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

"""stillsky.sweep: the command-line sweep's rows from Python."""

import math
import os
import subprocess
from pathlib import Path

import pytest

import stillsky
from sweep_inputs import pad_specs, write_corrupt, write_recordings

ROOT = Path(__file__).resolve().parents[2]
EX = ROOT / "docs" / "examples"
DEMO_GROUNDS = [str(EX / "recordings" / n) for n in ("quiet-night.csv", "road-nearby.csv", "footsteps.csv")]
SMALL = dict(f_min_hz=1.0, f_max_hz=40.0, n_freq=40)


def test_demo_rows_are_the_command_line_csv(tmp_path):
    """The demo sweep (three recordings × calm and 4 m/s) from Python writes the same file,
    byte for byte, as `stillsky sweep` on the same inputs (the command-line binary is built once
    by the test script and named by STILLSKY_BIN)."""
    exe = os.environ.get("STILLSKY_BIN")
    if not exe:
        pytest.skip("STILLSKY_BIN is not set: run the tests through scripts/test-all.sh")
    out = tmp_path / "cli.csv"
    cmd = [exe, "sweep",
           "--model", str(EX / "tripod-paver.toml"), "--catalogue", str(EX / "isolators.toml"),
           "--ground", *DEMO_GROUNDS, "--wind", "calm", "4", "--out", str(out)]
    r = subprocess.run(cmd, cwd=ROOT, capture_output=True, text=True, timeout=600)
    assert r.returncode == 0, r.stderr
    table = stillsky.sweep(EX / "tripod-paver.toml", EX / "isolators.toml", DEMO_GROUNDS, ["calm", "4"])
    assert len(table) == 3 * 2 * 5
    assert table.to_csv() == out.read_text()
    # Gust columns are filled for the windy case only.
    assert all(math.isnan(r["gust_peak_px"]) == (r["wind"] == "calm") for r in table)


def test_specs_as_path_text_and_dicts_give_the_same_rows(tmp_path):
    rec = write_recordings(tmp_path, 2)
    specs = pad_specs(6)
    by_dicts = stillsky.sweep(EX / "tripod-paver.toml", specs, rec, **SMALL)
    text = stillsky._native.catalogue_toml(__import__("json").dumps(specs), "x")
    (tmp_path / "cat.toml").write_text(text)
    by_path = stillsky.sweep(str(EX / "tripod-paver.toml"), tmp_path / "cat.toml", rec, **SMALL)
    by_text = stillsky.sweep((EX / "tripod-paver.toml").read_text(), text, rec, **SMALL, threads=1)
    by_model = stillsky.sweep(stillsky.Model.from_toml(EX / "tripod-paver.toml"), specs, rec, **SMALL)
    assert by_dicts.to_csv() == by_path.to_csv() == by_text.to_csv() == by_model.to_csv()
    assert [r["key"] for r in by_dicts] == [
        f"{s}|site{g:02d}|calm" for g in range(2) for s in ["none"] + [d["name"] for d in specs]
    ]
    # Full precision, identical to the last bit whatever the thread count.
    for a, b in zip(by_dicts, by_text):
        assert repr(a) == repr(b)
    frame = by_dicts.to_pandas()
    assert list(frame.columns) == list(stillsky.SweepTable.columns)
    assert len(frame) == 14 and frame["ratio_to_none"].iloc[0] == 1.0


def test_a_corrupt_recording_gives_one_error_row_per_spec(tmp_path):
    rec = write_recordings(tmp_path, 2)
    bad = write_corrupt(tmp_path)
    specs = pad_specs(4)
    t = stillsky.sweep(EX / "tripod-paver.toml", specs, [rec[0], bad, rec[1]], **SMALL)
    assert len(t) == 3 * 5
    errs = t.errors()
    assert [r["spec"] for r in errs] == ["none"] + [s["name"] for s in specs]
    for r in errs:
        assert r["spectrum"] == "corrupt" and "corrupt.csv" in r["error"] and "line 6" in r["error"]
        assert math.isnan(r["rms_px"]) and r["worse_than_none"] is None
    assert all(r["status"] == "ok" and r["rms_px"] > 0 for r in t if r["spectrum"] != "corrupt")


def test_bad_inputs_raise_named_errors(tmp_path):
    rec = write_recordings(tmp_path, 1)
    model = EX / "tripod-paver.toml"
    with pytest.raises(stillsky.InvalidInputError, match="line"):
        stillsky.sweep("[[node]]\nname = 3\n", pad_specs(1), rec)
    with pytest.raises(stillsky.InvalidInputError, match="loss_factor"):
        stillsky.sweep(model, [{"name": "a", "model": "hysteretic", "compression_n_per_m": 1e5,
                                "shear_n_per_m": 1e4}], rec)
    with pytest.raises(stillsky.InvalidInputError, match="listed twice"):
        stillsky.sweep(model, pad_specs(1) * 2, rec)
    with pytest.raises(stillsky.InvalidInputError, match="at least one ground"):
        stillsky.sweep(model, pad_specs(1), [])
    with pytest.raises(stillsky.InvalidInputError, match="given twice"):
        stillsky.sweep(model, pad_specs(1), rec * 2)  # one file twice
    with pytest.raises(stillsky.InvalidInputError, match="wind case"):
        stillsky.sweep(model, pad_specs(1), rec, wind="breezy")
    with pytest.raises(stillsky.InvalidInputError, match="threads"):
        stillsky.sweep(model, pad_specs(1), rec, threads=0)
    with pytest.raises(stillsky.InvalidInputError, match="sweep row 0"):
        stillsky._native.sweep_csv([{"key": "a"}])
    with pytest.raises(TypeError):
        stillsky.sweep(model, [1, 2], rec)
    assert not os.path.exists(tmp_path / "nothing-written.csv")

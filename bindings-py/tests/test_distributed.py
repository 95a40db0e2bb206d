"""stillsky.distributed on a LocalCluster: the same rows as stillsky.sweep, bit for bit."""

import struct

import pytest

import stillsky
from sweep_inputs import pad_specs, write_corrupt, write_recordings

distributed = pytest.importorskip("distributed")
sd = pytest.importorskip("stillsky.distributed")

from test_sweep import EX, SMALL  # noqa: E402


def bits(row):
    """A row with every float as its IEEE-754 bytes, so NaN == NaN and -0.0 != 0.0."""
    return {k: struct.pack("<d", v) if isinstance(v, float) else v for k, v in row.items()}


@pytest.fixture(scope="module")
def client():
    cluster = distributed.LocalCluster(
        n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None
    )
    try:
        with distributed.Client(cluster) as c:
            yield c
    finally:
        cluster.close()


def test_cluster_rows_equal_one_machine_and_a_corrupt_file_is_error_rows(tmp_path, client):
    rec = write_recordings(tmp_path, 20)
    bad = write_corrupt(tmp_path)
    spectra = rec[:7] + [bad] + rec[7:]  # 21 spectra, the corrupt one inside a task
    specs = pad_specs(200)
    model = EX / "tripod-paver.toml"
    one = stillsky.sweep(model, specs, spectra, **SMALL)
    many = sd.sweep(model, specs, spectra, client=client, specs_per_task=64, spectra_per_task=3,
                    progress=False, **SMALL)
    assert len(one) == len(many) == 21 * 201
    assert [r["key"] for r in many] == [r["key"] for r in one]
    assert [bits(r) for r in many] == [bits(r) for r in one]
    errs = many.errors()
    assert len(errs) == 201 and {r["spectrum"] for r in errs} == {"corrupt"}
    assert [r["spec"] for r in errs] == ["none"] + [s["name"] for s in specs]
    assert all("corrupt.csv" in r["error"] and "line 6" in r["error"] for r in errs)
    assert sum(r["status"] == "ok" for r in many) == 20 * 201


def test_unreachable_files_and_urls_become_error_rows(tmp_path, client):
    rec = write_recordings(tmp_path, 2)
    missing = str(tmp_path / "gone.csv")
    t = sd.sweep(EX / "tripod-paver.toml", pad_specs(3), [rec[0], missing, rec[1]], client=client,
                 specs_per_task=2, spectra_per_task=1, progress=False, **SMALL)
    assert len(t) == 3 * 4
    errs = t.errors()
    assert len(errs) == 4 and all(r["spectrum"] == "gone" and "gone.csv" in r["error"] for r in errs)
    # A URL no worker can fetch: error rows naming it, the rest intact.
    url = "http://127.0.0.1:9/none/quiet.csv"
    t = sd.sweep(EX / "tripod-paver.toml", pad_specs(2), [rec[0], url], client=client,
                 progress=False, **SMALL)
    assert len(t) == 2 * 3
    assert [r["status"] for r in t] == ["ok"] * 3 + ["error"] * 3
    assert all(url in r["error"] for r in t.errors())
    # Bad inputs fail on the client, before any task, as on one machine.
    with pytest.raises(stillsky.InvalidInputError, match="wind case"):
        sd.sweep(EX / "tripod-paver.toml", pad_specs(2), rec, wind="breezy", client=client)
    with pytest.raises(ValueError, match="at least 1"):
        sd.sweep(EX / "tripod-paver.toml", pad_specs(2), rec, specs_per_task=0, client=client)

"""Measure stillsky.distributed on a LocalCluster with 1 and 2 worker processes (one thread
each, one core thread per task) against stillsky.sweep on one process.

Workload (invented): the demo rig (docs/examples/tripod-paver.toml), 200 hysteretic pads,
20 synthetic 60 s recordings at 200 Hz, calm and 4 m/s wind, the default grid (300 points).
Run: python bindings-py/bench/scale_out.py   (prints seconds; not a test)
"""

import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent / "tests"))

import distributed  # noqa: E402

import stillsky  # noqa: E402
import stillsky.distributed as sd  # noqa: E402
from sweep_inputs import pad_specs, write_recordings  # noqa: E402

MODEL = HERE.parents[1] / "docs" / "examples" / "tripod-paver.toml"


def main():
    with tempfile.TemporaryDirectory() as d:
        rec = write_recordings(Path(d), 20, fs_hz=200.0, seconds=60.0)
        specs = pad_specs(200)
        wind = ["calm", "4"]
        t = time.perf_counter()
        ref = stillsky.sweep(MODEL, specs, rec, wind, threads=1)
        t1 = time.perf_counter() - t
        print(f"stillsky.sweep, 1 thread: {len(ref)} rows in {t1:.1f} s")
        t = time.perf_counter()
        stillsky.sweep(MODEL, specs, rec, wind)
        print(f"stillsky.sweep, all cores: {time.perf_counter() - t:.1f} s")
        for n in (1, 2):
            with distributed.LocalCluster(n_workers=n, threads_per_worker=1, processes=True,
                                          dashboard_address=None) as cl, distributed.Client(cl) as c:
                sd.sweep(MODEL, specs[:2], rec[:1], client=c, progress=False)  # warm the workers
                t = time.perf_counter()
                rows = sd.sweep(MODEL, specs, rec, wind, client=c, progress=False)
                dt = time.perf_counter() - t
                ntask = sd.plan_tasks(len(specs), len(rec), 25, len(rec))
                same = rows.to_csv() == ref.to_csv()
                print(f"{n} worker(s): {ntask} tasks in {dt:.1f} s ({dt / ntask * n:.2f} s per task), "
                      f"same rows: {same}")


if __name__ == "__main__":
    main()

"""Measure what releasing the GIL buys: N calls of Model.frf / welch, serial vs 4 threads.

Not a test (no timing assertions). Usage: python bindings-py/bench/threads.py
"""

import os
import sys
import time
from concurrent.futures import ThreadPoolExecutor

import numpy as np

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "tests"))
import stillsky  # noqa: E402
from conftest import random_chain_toml  # noqa: E402


def best(fn, repeat=5):
    t = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        t.append(time.perf_counter() - t0)
    return min(t)


def compare(label, call, args):
    serial = best(lambda: [call(a) for a in args])
    with ThreadPoolExecutor(max_workers=4) as ex:
        threaded = best(lambda: list(ex.map(call, args)))
    print(f"{label}: serial {serial * 1e3:.1f} ms, 4 threads {threaded * 1e3:.1f} ms, speed-up {serial / threaded:.2f}x")


if __name__ == "__main__":
    print(f"cpus: {os.cpu_count()}")
    # 12 free DOFs × 800 frequencies per call: below the core's own parallel threshold, so each
    # call runs on one thread and any speed-up comes from the released GIL.
    m = stillsky.Model.from_toml_str(random_chain_toml(7, 4))
    grids = [np.geomspace(0.5, 300.0, 800) for _ in range(16)]
    compare(f"frf n={m.dof_count} F=800 x16", lambda g: m.frf(g, "ground_z", "p3:z"), grids)
    tri = stillsky.Model.from_toml(os.path.join(os.path.dirname(__file__), "..", "..", "docs", "examples", "tripod-lawn.toml"))
    f = np.geomspace(0.5, 100.0, 400)
    psds = [stillsky.Psd(f, 1e-16 * (1 + k) * (f / 5.0) ** -4, "displacement") for k in range(16)]
    compare(f"image_motion n={tri.dof_count} F=400 x16", lambda p: tri.image_motion(f, ground=p), psds)
    rng = np.random.default_rng(1)
    xs = [rng.normal(size=200_000) for _ in range(16)]
    compare("welch 200k samples nperseg=1024 x16", lambda x: stillsky.welch(x, 200.0, nperseg=1024), xs)

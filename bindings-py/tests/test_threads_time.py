"""Threads calling the time-domain and response functions at once get the serial results (the
GIL is released inside; the speed-up is reported in the notes, never asserted)."""

import pathlib
import time
from concurrent.futures import ThreadPoolExecutor

import numpy as np

import stillsky

EXAMPLE = pathlib.Path(__file__).resolve().parents[2] / "docs" / "examples" / "tripod-lawn.toml"


def test_threads_transient_and_response_match_serial():
    m = stillsky.Model.from_toml(EXAMPLE)
    fs = 1000.0
    gusts = [stillsky.Gust.one_minus_cosine(1.0 + i, duration_s=0.4) for i in range(4)]
    f = np.geomspace(0.5, 150.0, 3000)
    w = stillsky.Wind("kaimal", 6.0, 1.5, turbulence_intensity=0.2)

    def work(i):
        g = m.gust_response(gusts[i], mean_speed_m_s=6.0, fs=fs, duration_s=8.0)
        r = m.response(f, wind=w, output="image_x")
        return g.image_x_arcsec, r.values

    t0 = time.perf_counter()
    serial = [work(i) for i in range(4)]
    t1 = time.perf_counter()
    with ThreadPoolExecutor(4) as ex:
        par = list(ex.map(work, range(4)))
    t2 = time.perf_counter()
    for (a, b), (c, d) in zip(serial, par):
        np.testing.assert_array_equal(a, c)
        np.testing.assert_array_equal(b, d)
    print(f"serial {t1 - t0:.3f} s, 4 threads {t2 - t1:.3f} s")

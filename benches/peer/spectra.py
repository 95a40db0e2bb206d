"""Side-by-side speed of the spectral estimators: stillsky against scipy and ObsPy in one process.

1. Welch in memory: 8.64 M samples (a day at 100 Hz), nperseg 4096, Hann, 50 % overlap,
   stillsky.welch against scipy.signal.welch (results compared to 1e-9 relative).
2. Probabilistic PSD of a day of 100 Hz three-axis data: one miniSEED file written once (random
   noise, int32 counts, an invented recording), read once by ObsPy; ObsPy's PPSD (one per
   channel, default settings, flat PAZ) against stillsky.probabilistic_psd on the same three
   arrays (the axes in parallel). Reading the file is outside both timings. The histograms must
   be equal.

Prints median times over --repeat alternating runs and the ratios. Threads: rayon's default
(all cores) unless RAYON_NUM_THREADS is set. Usage: python benches/peer/spectra.py [--repeat 3]
"""

import argparse
import os
import statistics
import tempfile
import time

import numpy as np
import scipy.signal

import stillsky


def timed_pair(ours, peer, repeat):
    """Median times of `ours` and `peer`, run alternately (load on a shared machine hits both)."""
    t_o, t_p, out_o, out_p = [], [], None, None
    for _ in range(repeat):
        t = time.perf_counter()
        out_o = ours()
        t_o.append(time.perf_counter() - t)
        t = time.perf_counter()
        out_p = peer()
        t_p.append(time.perf_counter() - t)
    return statistics.median(t_o), out_o, statistics.median(t_p), out_p


def bench_welch(repeat):
    x = np.random.default_rng(1).normal(size=8_640_000)
    t_ours, (f, p), t_peer, (fr, pr) = timed_pair(
        lambda: stillsky.welch(x, 100.0, nperseg=4096), lambda: scipy.signal.welch(x, fs=100.0, nperseg=4096), repeat
    )
    err = float(np.max(np.abs(p - pr) / np.abs(pr)))
    assert err < 1e-9, err
    print(f"welch 8.64M nperseg=4096: stillsky {t_ours:.4f} s, scipy {t_peer:.4f} s, "
          f"ratio {t_peer / t_ours:.1f}x, max rel diff {err:.1e}")


def bench_ppsd(repeat):
    from obspy import Stream, Trace, UTCDateTime, read
    from obspy.signal import PPSD

    rng = np.random.default_rng(2)
    n = 8_640_000
    start = UTCDateTime(2026, 1, 1)
    path = os.path.join(tempfile.mkdtemp(), "day.mseed")
    Stream([Trace(np.cumsum(rng.normal(size=n)).astype(np.int32) // 8 + rng.integers(-500, 500, n).astype(np.int32),
                  {"network": "XX", "station": "DEMO", "channel": f"HH{c}", "sampling_rate": 100.0,
                   "starttime": start}) for c in "ENZ"]).write(path, format="MSEED", encoding="STEIM2")
    st = read(path)
    sens = 1e9
    paz = {"poles": [], "zeros": [], "gain": 1.0, "sensitivity": sens}

    def peer():
        out = []
        for tr in st:
            pp = PPSD(tr.stats, metadata=paz)
            pp.add(tr.copy())
            out.append(pp.current_histogram)
        return out

    axes = [tr.data.astype(np.float64) for tr in st]
    t_ours, ours, t_peer, hist = timed_pair(
        lambda: stillsky.probabilistic_psd(axes, 100.0, scale=1.0 / sens), peer, repeat
    )
    for r, h in zip(ours, hist):
        assert np.array_equal(r["histogram"], h)
    print(f"probabilistic PSD, a day at 100 Hz, 3 axes ({ours[0]['n_blocks']} blocks each): "
          f"stillsky {t_ours:.3f} s, ObsPy PPSD {t_peer:.3f} s, ratio {t_peer / t_ours:.1f}x, histograms equal")


if __name__ == "__main__":
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=5)
    ap.add_argument("--skip-ppsd", action="store_true")
    a = ap.parse_args()
    print(f"threads: RAYON_NUM_THREADS={os.environ.get('RAYON_NUM_THREADS', 'default')}, cpus={os.cpu_count()}")
    bench_welch(a.repeat)
    if not a.skip_ppsd:
        bench_ppsd(a.repeat)

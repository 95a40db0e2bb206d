"""Soak run of the streaming monitor from Python (a script, not a test).

The same scenario as bindings-c/tests/c/soak.c: N samples (default 1e8) of one ground-x
accelerometer channel at 200 Hz through `stillsky.Monitor` (the core's monitor), pushed in blocks
with a tick after each block: broadband noise well below the threshold (its windowed RMS set to
0.15 x threshold on a scratch monitor), plus a 3 s burst of a 20 Hz sine (windowed RMS twice the
threshold, from the FRF at 20 Hz) at a seeded time in every 1000 s of data, with an exposure
opened 10 s before each burst. Checks: every burst flagged (ABOVE between its start and its end
plus latency, window and hold-off), no ABOVE elsewhere, no UNSAFE after the warm-up, each
burst's exposure reports it. Prints VmRSS (/proc/self/status) after the warm-up and at the end,
the peak RSS (resource.getrusage) and samples/s of the push/tick loop. Noise blocks are views of
one noise buffer (read in place, no copy); burst blocks are one new array each.

Usage: python benches/peer/monitor_soak.py [--samples N] [--block 200]
"""

import argparse
import math
import pathlib
import resource
import sys
import time

import numpy as np

import stillsky

RIG = (pathlib.Path(__file__).resolve().parents[2] / "tests" / "data" / "monitor-rig.toml").read_text()

FS = 200.0
CYCLE = 200_000  # samples per burst cycle (1000 s)
BURST = 600  # 3 s
THRESHOLD, WINDOW, HOLD_OFF = 0.5, 1.0, 1.0
ARCSEC_PER_RAD = 180.0 * 3600.0 / math.pi


def rss_kb():
    with open("/proc/self/status") as f:
        for line in f:
            if line.startswith("VmRSS:"):
                return int(line.split()[1])
    return -1


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--samples", type=float, default=1e8)
    ap.add_argument("--block", type=int, default=200)
    args = ap.parse_args()
    n_total, block = int(args.samples), args.block
    assert CYCLE % block == 0 and 2000 % block == 0
    model = stillsky.Model.from_toml_str(RIG, "soak rig")
    kw = dict(
        sample_rate_hz=FS, window_s=WINDOW, threshold_arcsec=THRESHOLD, hysteresis=0.2,
        hold_off_s=HOLD_OFF, max_age_s=0.5, highpass_hz=4.0, fir_taps=256,
    )
    m = stillsky.Monitor.from_model(model, "x", **kw)
    # Burst amplitude for a windowed RMS of twice the threshold (RMS of a sine = amplitude/√2).
    h = model.frf(np.array([20.0]), ["ground_x"], ["image_x", "image_y"])[0, :, 0]
    g2 = float(np.sum(np.abs(h) ** 2)) / (2 * math.pi * 20.0) ** 4
    amp = 2.0 * THRESHOLD / (math.sqrt(g2 / 2.0) * ARCSEC_PER_RAD)
    rng = np.random.default_rng(2026)
    noise = rng.normal(size=65_600)
    m.push(0.0, noise[:20_000])
    noise *= 0.15 * THRESHOLD / m.tick(19_999 / FS).rms_arcsec
    m.reset()
    n_noise_blocks = noise.size // block
    burst_t = np.arange(BURST) / FS
    burst = amp * np.sin(2 * math.pi * 20.0 * burst_t)
    tail = math.ceil((m.latency_s + WINDOW + HOLD_OFF) * FS) + block
    warm = m.warmup_samples
    print(
        f"soak: {n_total} samples at {FS:.0f} Hz ({n_total / FS / 86400:.1f} days of data), "
        f"{m.fir_taps} taps, window {WINDOW} s, threshold {THRESHOLD} arcsec, blocks of {block}"
    )
    n_bursts = detected = false_above = unsafe_after = exposure_ok = 0
    burst_on = burst_next = -1
    cycle = -1
    seen = False
    rss_start = -1
    loop_s = 0.0
    push, tick = m.push, m.tick
    for i0 in range(0, n_total, block):
        c = i0 // CYCLE
        if c != cycle:
            cycle = c
            burst_next = c * CYCLE + 20_000 + int(rng.uniform() * 140_000) // block * block
        if i0 == burst_next - 2000:
            m.exposure_begin(i0 / FS)
        if i0 == burst_next:
            burst_on, burst_next, seen = burst_next, -1, False
            n_bursts += 1
        nb = min(block, n_total - i0)
        k = (i0 // block) % n_noise_blocks * block
        x = noise[k : k + nb]
        if burst_on >= 0 and i0 < burst_on + BURST:
            x = x.copy()
            j = i0 - burst_on
            x[: min(nb, BURST - j)] += burst[j : j + nb]
        t0 = time.perf_counter()
        push(i0 / FS, x)
        r = tick((i0 + nb - 1) / FS)
        loop_s += time.perf_counter() - t0
        done = i0 + nb
        if done >= warm and rss_start < 0:
            rss_start = rss_kb()
        state = r.state
        if state == "unsafe":
            unsafe_after += done >= warm
        elif burst_on >= 0 and done <= burst_on + BURST + tail:
            seen = seen or state == "above"
        elif state == "above":
            false_above += 1
        if burst_on >= 0 and done > burst_on + BURST + tail:
            detected += seen
            if not seen:
                print(f"missed burst at {burst_on / FS:.1f} s")
            q = m.exposure_end((burst_on + BURST + tail) / FS - m.latency_s)
            exposure_ok += q.above_fraction > 0.0 and q.coverage > 0.99
            burst_on = -1
        if n_total >= 10 and done % (n_total // 10) < block:
            print(f"  {100 * done / n_total:3.0f} %: {n_bursts} bursts, {detected} flagged, RSS {rss_kb()} kB", flush=True)
    if burst_on >= 0:
        n_bursts -= 1
    rss_end = rss_kb()
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    print(
        f"bursts {n_bursts}, flagged {detected}, exposures reporting the burst {exposure_ok}, "
        f"false ABOVE ticks {false_above}, UNSAFE ticks after warm-up {unsafe_after}"
    )
    print(f"RSS after warm-up {rss_start} kB, at the end {rss_end} kB, peak {peak} kB")
    print(f"push+tick: {loop_s:.3f} s for {n_total} samples = {n_total / loop_s:.3g} samples/s")
    ok = (
        n_bursts > 0 and detected == n_bursts and exposure_ok == n_bursts and false_above == 0
        and unsafe_after == 0 and rss_end - rss_start <= 256
    )
    print("ok" if ok else "FAILED")
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())

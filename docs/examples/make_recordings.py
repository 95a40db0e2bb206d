#!/usr/bin/env python3
"""Generate the three invented ground recordings of the demo (numpy only).

Each file: 5 minutes at 200 Hz, three axes x (east), y (north), z (up) in m/s^2, with a
'# fs_hz=200' header line. The noise is shaped to be plausible, not measured:

- quiet-night: a site near the middle (in dB) of Peterson's NLNM and NHNM below 10 Hz, flat
  in acceleration above (cultural noise floor). Seed 1001.
- road-nearby: the quiet floor plus traffic: a steady hum and passing vehicles (Poisson
  arrivals, about one every 15 s, each a few seconds long) with energy between 5 and 30 Hz.
  Seed 2002.
- footsteps: the quiet floor plus a person walking near the tripod in bouts: steps at a 1-3 Hz
  pace, each a short transient (a 0.1 s half-sine push and a ringing of the ground near 18 Hz)
  whose size varies with the walker's distance. Seed 3003.

Run from this folder: python3 make_recordings.py  (writes recordings/*.csv)
"""
import os
import numpy as np

FS = 200.0
DURATION_S = 300.0
N = int(FS * DURATION_S)
HERE = os.path.dirname(os.path.abspath(__file__))

# Target vertical acceleration PSD of the quiet floor, dB re 1 (m/s^2)^2/Hz (invented,
# between NLNM and NHNM below 10 Hz).
FLOOR_DB = [(0.05, -140.0), (0.5, -138.0), (1.0, -145.0), (3.0, -140.0), (10.0, -128.0),
            (30.0, -124.0), (100.0, -124.0)]


def shaped_noise(rng, psd_of_f, n=N, fs=FS):
    """Gaussian noise whose one-sided PSD is psd_of_f(f) ((m/s^2)^2/Hz)."""
    white = rng.standard_normal(n)  # unit variance: one-sided PSD 2/fs
    spec = np.fft.rfft(white)
    f = np.fft.rfftfreq(n, 1.0 / fs)
    gain = np.sqrt(np.maximum(psd_of_f(f), 0.0) * fs / 2.0)
    gain[0] = 0.0
    return np.fft.irfft(spec * gain, n)


def floor_psd(f):
    lf = np.log10([p[0] for p in FLOOR_DB])
    db = np.array([p[1] for p in FLOOR_DB])
    x = np.log10(np.clip(f, FLOOR_DB[0][0], FLOOR_DB[-1][0]))
    return 10.0 ** (np.interp(x, lf, db) / 10.0)


def band_psd(lo, hi, level, peak=None):
    """A band of level (m/s^2)^2/Hz between lo and hi with soft (4th-order) edges."""
    def psd(f):
        f = np.maximum(f, 1e-6)
        s = level / ((1 + (lo / f) ** 8) * (1 + (f / hi) ** 8))
        if peak is not None:
            s = s * (1 + 3.0 * np.exp(-0.5 * ((f - peak) / (0.15 * peak)) ** 2))
        return s
    return psd


def quiet(rng):
    z = shaped_noise(rng, floor_psd)
    # Horizontal components a little higher at low frequency (tilt noise), invented factor.
    h = lambda f: floor_psd(f) * (1.0 + 3.0 / (1.0 + (f / 0.5) ** 2))
    return np.stack([shaped_noise(rng, h), shaped_noise(rng, h), z])


def road(rng):
    rec = quiet(rng)
    t = np.arange(N) / FS
    hum = band_psd(5.0, 30.0, 4e-11, peak=12.0)
    for k, s in enumerate([0.5, 0.5, 1.0]):
        rec[k] += s * shaped_noise(rng, hum)
    # Passing vehicles: Gaussian envelopes of 2-5 s, Poisson arrivals, random sizes.
    arrivals = np.cumsum(rng.exponential(15.0, size=40))
    arrivals = arrivals[arrivals < DURATION_S]
    burst = band_psd(5.0, 30.0, 2e-8, peak=12.0)
    for t0 in arrivals:
        width = rng.uniform(2.0, 5.0)
        env = np.exp(-0.5 * ((t - t0) / (width / 2.0)) ** 2) * rng.lognormal(0.0, 0.5)
        for k, s in enumerate([0.6, 0.6, 1.0]):
            rec[k] += s * env * shaped_noise(rng, burst)
    return rec


def footsteps(rng):
    rec = quiet(rng)
    t = np.arange(N) / FS
    # Step transient: a 0.1 s half-sine push plus ground ringing near 18 Hz (decay 0.06 s).
    ts = np.arange(int(0.6 * FS)) / FS
    push = np.where(ts < 0.1, np.sin(np.pi * ts / 0.1), 0.0)
    ring = np.sin(2 * np.pi * 18.0 * ts) * np.exp(-ts / 0.06)
    t_bout = 5.0
    while t_bout < DURATION_S - 20.0:
        pace_hz = rng.uniform(1.0, 3.0)  # steps per second
        bout_s = rng.uniform(10.0, 30.0)
        closest = rng.uniform(0.3, 0.7)  # fraction of the bout when the walker is nearest
        for ti in np.arange(t_bout, min(t_bout + bout_s, DURATION_S - 1.0), 1.0 / pace_hz):
            ti += rng.normal(0.0, 0.02)
            near = np.exp(-0.5 * (((ti - t_bout) / bout_s - closest) / 0.2) ** 2)
            a = 4e-3 * near * rng.lognormal(0.0, 0.3)  # peak m/s^2 of the vertical ringing
            i0 = int(ti * FS)
            seg = slice(i0, min(i0 + len(ts), N))
            m = seg.stop - seg.start
            shape_z = a * (0.3 * push[:m] + ring[:m])
            rec[2, seg] += shape_z
            az = rng.uniform(0, 2 * np.pi)  # direction to the walker
            rec[0, seg] += 0.4 * np.cos(az) * shape_z
            rec[1, seg] += 0.4 * np.sin(az) * shape_z
        t_bout += bout_s + rng.uniform(10.0, 40.0)
    return rec


def write(name, rec, seed):
    path = os.path.join(HERE, "recordings", name)
    os.makedirs(os.path.dirname(path), exist_ok=True)
    with open(path, "w") as f:
        f.write(f"# fs_hz={FS:g}\n")
        f.write(f"# invented demo recording, make_recordings.py seed {seed}\n")
        f.write("x_m_s2,y_m_s2,z_m_s2\n")
        np.savetxt(f, rec.T, fmt="%.3e", delimiter=",")
    print(path, os.path.getsize(path), "bytes")


if __name__ == "__main__":
    for name, make, seed in [("quiet-night.csv", quiet, 1001), ("road-nearby.csv", road, 2002),
                             ("footsteps.csv", footsteps, 3003)]:
        write(name, make(np.random.default_rng(seed)), seed)

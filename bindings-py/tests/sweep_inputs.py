"""Synthetic inputs for the sweep tests (all numbers invented for testing)."""

import numpy as np


def write_recordings(folder, n, seed0=7000, fs_hz=100.0, seconds=20.0):
    """n three-axis acceleration recordings in the demo format (docs/examples/recordings):
    a `# fs_hz=` line, a comment, a header `x_m_s2,y_m_s2,z_m_s2`, one row per sample.
    Recording i is white noise of 1e-5 m/s^2 RMS per axis with seed seed0 + i."""
    paths = []
    for i in range(n):
        rng = np.random.default_rng(seed0 + i)
        x = rng.standard_normal((int(fs_hz * seconds), 3)) * 1e-5 * (1.0 + 0.1 * i)
        p = folder / f"site{i:02d}.csv"
        with open(p, "w") as f:
            f.write(f"# fs_hz={fs_hz:g}\n# synthetic test recording, seed {seed0 + i}\n")
            f.write("x_m_s2,y_m_s2,z_m_s2\n")
            np.savetxt(f, x, delimiter=",", fmt="%.6e")
        paths.append(str(p))
    return paths


def write_corrupt(folder, name="corrupt.csv"):
    """A recording with a non-number on line 6."""
    p = folder / name
    p.write_text("# fs_hz=100\nx_m_s2,y_m_s2,z_m_s2\n0,0,0\n1e-6,0,0\n0,1e-6,0\nabc,0,0\n")
    return str(p)


def pad_specs(n, seed=42):
    """n hysteretic pads with stiffness 1e5..3e7 N/m (log-uniform), seeded."""
    rng = np.random.default_rng(seed)
    out = []
    for i in range(n):
        k = float(10 ** rng.uniform(5.0, 7.5))
        out.append(
            {
                "name": f"pad{i:03d}",
                "model": "hysteretic",
                "compression_n_per_m": k,
                "shear_n_per_m": k * float(rng.uniform(0.1, 0.4)),
                "loss_factor": float(rng.uniform(0.02, 0.5)),
                "rated_load_n": float(rng.uniform(100.0, 800.0)),
            }
        )
    return out

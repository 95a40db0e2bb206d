"""Peer comparison: the same systems solved by numpy/scipy and by stillsky, timed alternately.

Both sides solve the identical system: the numpy side builds Z(ω) = K*(ω) + iωC − ω²M from
Model.matrices(f), the load from Model.input_vector and the output row from Model.output_vector.
Prints per case the median times (s) over `--repeat` alternating runs, the ratio peer/ours and the
largest relative difference (must be < 1e-9). Run with RAYON_NUM_THREADS=1 for single-thread
figures. Usage: python benches/peer/compare.py [--repeat 5] [--welch-big]
"""

import argparse
import statistics
import time

import numpy as np
import scipy.linalg
import scipy.signal

import stillsky


def chain_toml(n):
    """Same text as benches/src/lib.rs chain_toml(n)."""
    s = []
    for i in range(n):
        s.append(
            f'[[body]]\nname = "m{i}"\nmass_kg = {2.0 + (i % 5)!r}\ncg_m = [0, 0, {i * 0.1!r}]\n'
            'inertia_kgm2 = [1, 1, 1]\ndofs = ["z"]\n\n'
        )
    for i in range(n):
        frm = "ground" if i == 0 else f"m{i - 1}"
        k = 1.0e6 * (1.0 + 0.3 * ((i * 7) % 11))
        if i == 0:
            stiff = "zener = { k0 = 4e5, k_inf = 1.2e6, tau_s = 0.002 }"
        elif i % 3 == 0:
            stiff = f"stiffness_n_per_m = {k!r}\ndamping_ns_per_m = 40.0"
        else:
            stiff = f"stiffness_n_per_m = {k!r}\nloss_factor = 0.02"
        s.append(
            f'[[spring]]\nname = "s{i}"\nfrom = "{frm}"\nto = "m{i}"\nat_m = [0, 0, {i * 0.1!r}]\n'
            f"direction = [0, 0, 1]\n{stiff}\n\n"
        )
    return "".join(s)


def timed(fn, repeat):
    ts, out = [], None
    for _ in range(repeat):
        t = time.perf_counter()
        out = fn()
        ts.append(time.perf_counter() - t)
    return statistics.median(ts), out


def rel(a, b):
    return float(np.max(np.abs(a - b)) / np.max(np.abs(b)))


def frf_case(n, nf, repeat, banded):
    m = stillsky.Model.from_toml_str(chain_toml(n), "chain")
    f = np.geomspace(0.5, 500.0, nf)
    w = 2 * np.pi * f
    out = f"m{n - 1}:z"
    mats = [m.matrices(fh) for fh in f]
    M = mats[0]["mass"]
    C = mats[0]["damping"]
    K = np.stack([d["stiffness"] for d in mats])
    b = np.stack([m.input_vector("ground_z", fh) for fh in f])
    row = m.output_vector(out)

    def numpy_dense():
        Z = K + (1j * w)[:, None, None] * C - (w * w)[:, None, None] * M
        x = np.linalg.solve(Z, b[:, :, None])[:, :, 0]
        return x @ row

    def scipy_banded():
        Z = K + (1j * w)[:, None, None] * C - (w * w)[:, None, None] * M
        ab = np.zeros((nf, 3, n), complex)
        ab[:, 0, 1:] = np.diagonal(Z, 1, axis1=1, axis2=2)
        ab[:, 1, :] = np.diagonal(Z, 0, axis1=1, axis2=2)
        ab[:, 2, :-1] = np.diagonal(Z, -1, axis1=1, axis2=2)
        h = np.empty(nf, complex)
        for k in range(nf):
            h[k] = scipy.linalg.solve_banded((1, 1), ab[k], b[k], check_finite=False) @ row
        return h

    def ours():
        return m.frf(f, "ground_z", out)

    res = {"numpy": [], "banded": [], "ours": []}
    h = {}
    for _ in range(repeat):
        for name, fn in (("numpy", numpy_dense), ("ours", ours)) + ((("banded", scipy_banded),) if banded else ()):
            t, h[name] = timed(fn, 1)
            res[name].append(t)
    med = {k: statistics.median(v) for k, v in res.items() if v}
    errs = {k: rel(np.asarray(h["ours"]).ravel(), np.asarray(v).ravel()) for k, v in h.items() if k != "ours"}
    return med, errs


def welch_case(nsamp, repeat):
    rng = np.random.default_rng(7)
    x = rng.standard_normal(nsamp)
    res = {"scipy": [], "ours": []}
    out = {}
    for _ in range(repeat):
        t, out["scipy"] = timed(lambda: scipy.signal.welch(x, fs=200.0, nperseg=4096), 1)
        res["scipy"].append(t)
        t, out["ours"] = timed(lambda: stillsky.welch(x, 200.0, nperseg=4096), 1)
        res["ours"].append(t)
    return {k: statistics.median(v) for k, v in res.items()}, rel(out["ours"][1], out["scipy"][1])


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=5)
    ap.add_argument("--welch-big", action="store_true", help="also 86.4 M samples in memory")
    a = ap.parse_args()
    print("| case | numpy dense (s) | scipy solve_banded (s) | ours via Python (s) | numpy/ours | banded/ours | max rel diff |")
    print("|---|---|---|---|---|---|---|")
    for n, nf in ((6, 4096), (12, 1024), (12, 4096), (48, 4096), (200, 1024)):
        med, err = frf_case(n, nf, a.repeat, banded=True)
        print(
            f"| FRF chain n={n} F={nf} | {med['numpy']:.4g} | {med['banded']:.4g} | {med['ours']:.4g} | "
            f"{med['numpy'] / med['ours']:.1f} | {med['banded'] / med['ours']:.1f} | {max(err.values()):.1e} |"
        )
        assert max(err.values()) < 1e-9, err
    sizes = [720_000] + ([86_400_000] if a.welch_big else [])
    for ns in sizes:
        med, err = welch_case(ns, a.repeat if ns < 10_000_000 else 1)
        print(f"| Welch {ns} samples | scipy {med['scipy']:.4g} | | {med['ours']:.4g} | {med['scipy'] / med['ours']:.1f} | | {err:.1e} |")
        assert err < 1e-9, err


if __name__ == "__main__":
    main()

"""Peer comparison: the same systems solved by numpy/scipy and by stillsky, timed alternately.

Both sides solve the identical system: the numpy side builds Z(ω) = K*(ω) + iωC − ω²M from
Model.matrices(f), the load from Model.input_vector and the output row from Model.output_vector.
Prints per case the median times (s) over `--repeat` alternating runs, the ratio peer/ours and the
largest relative difference (must be < 1e-9). Run with RAYON_NUM_THREADS=1 for single-thread
figures (the script sets RAYON_NUM_THREADS and the BLAS thread variables to 1 unless they are
already set). Usage: python benches/peer/compare.py [--repeat 5] [--welch-size N] [--skip-full]
"""

import os

for _v in ("RAYON_NUM_THREADS", "OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_v, "1")

import argparse  # noqa: E402
import itertools  # noqa: E402
import json  # noqa: E402
import statistics  # noqa: E402
import time  # noqa: E402

import numpy as np  # noqa: E402
import scipy.linalg  # noqa: E402
import scipy.signal  # noqa: E402

import stillsky  # noqa: E402


def chain_toml(n, uniform=False):
    """Same text as benches/src/lib.rs chain_toml(n), or chain_uniform_loss_toml(n) when uniform."""
    s = []
    for i in range(n):
        s.append(
            f'[[body]]\nname = "m{i}"\nmass_kg = {2.0 + (i % 5)!r}\ncg_m = [0, 0, {i * 0.1!r}]\n'
            'inertia_kgm2 = [1, 1, 1]\ndofs = ["z"]\n\n'
        )
    for i in range(n):
        frm = "ground" if i == 0 else f"m{i - 1}"
        k = 1.0e6 * (1.0 + 0.3 * ((i * 7) % 11))
        if uniform:
            stiff = f"stiffness_n_per_m = {k!r}\nloss_factor = 0.02"
        elif i == 0:
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


def modal_case(n, nf, repeat):
    """Proportionally damped chain (one loss factor): numpy's modal superposition (scipy eigh of
    (K', M), then the sum over modes on the grid) against ours (FrfPlan's modal path), each
    including its eigen-solution."""
    m = stillsky.Model.from_toml_str(chain_toml(n, uniform=True), "chain")
    f = np.geomspace(0.5, 500.0, nf)
    w = 2 * np.pi * f
    out = f"m{n - 1}:z"
    d = m.matrices(1.0)
    M, K = d["mass"], d["stiffness"]
    eta = float(np.sum(K.imag * K.real) / np.sum(K.real * K.real))
    b = np.stack([m.input_vector("ground_z", fh) for fh in f])
    row = m.output_vector(out)

    def numpy_modal():
        lam, phi = scipy.linalg.eigh(K.real, M)
        q = b @ phi
        den = lam[None, :] * (1 + 1j * eta) - (w * w)[:, None]
        return (q / den) @ (row @ phi)

    def ours():
        return m.frf(f, "ground_z", out)

    res = {"numpy": [], "ours": []}
    h = {}
    for _ in range(repeat):
        for name, fn in (("numpy", numpy_modal), ("ours", ours)):
            t, h[name] = timed(fn, 1)
            res[name].append(t)
    med = {k: statistics.median(v) for k, v in res.items()}
    return med, rel(np.asarray(h["ours"]).ravel(), np.asarray(h["numpy"]).ravel())


def pad_specs(count):
    """Same as benches/src/lib.rs pad_specs: (Zener, hysteretic, Kelvin-Voigt) per spec (invented)."""
    out = []
    for v in range(count):
        t = v / max(count, 1)
        k = 2e5 + 1.8e6 * t
        out.append(
            [
                {"zener": {"k0": k, "k_inf": 3.0 * k, "tau_s": 0.0005 + 0.004 * t}},
                {"hysteretic": {"k": 1.5 * k, "loss_factor": 0.05 + 0.2 * t}},
                {"kelvin_voigt": {"k": 0.8 * k, "c": 20.0 + 200.0 * t}},
            ]
        )
    return out


def spec_arrays(specs):
    """Per spec parameter arrays (for evaluating all specs at once in numpy)."""
    z = np.array([[s[0]["zener"][q] for q in ("k0", "k_inf", "tau_s")] for s in specs])
    hy = np.array([[s[1]["hysteretic"][q] for q in ("k", "loss_factor")] for s in specs])
    kv = np.array([[s[2]["kelvin_voigt"][q] for q in ("k", "c")] for s in specs])
    return z, hy, kv


def spec_stiffness(z, hy, kv, w):
    """k*(f) of the three springs, shape (n_spec, n_freq, 3); docs/conventions.md conventions (e^{+iwt})."""
    ix = 1j * w[None, :] * z[:, 2:3]
    kz = (z[:, 0:1] + z[:, 1:2] * ix) / (1 + ix)
    kh = np.broadcast_to((hy[:, 0] * (1 + 1j * hy[:, 1]))[:, None], kz.shape)
    kk = kv[:, 0:1] + 1j * w[None, :] * kv[:, 1:2]
    return np.stack([kz, kh, kk], axis=-1)


def variants_case(nspec, nf, repeat, full):
    """1000 pad specs replacing s0, s1, s2 of the n = 12 chain; FRF m11:z / ground_z and the RMS
    response to a flat ground-displacement PSD of 1e-12 m^2/Hz (invented) per spec."""
    n = 12
    m = stillsky.Model.from_toml_str(chain_toml(n), "chain")
    f = np.linspace(0.5, 500.0, nf)
    w = 2 * np.pi * f
    psd = np.full(nf, 1e-12)
    mats = [m.matrices(fh) for fh in f]
    M, C = mats[0]["mass"], mats[0]["damping"]
    K = np.stack([d["stiffness"] for d in mats])
    Z = K + (1j * w)[:, None, None] * C - (w * w)[:, None, None] * M
    b = np.stack([m.input_vector("ground_z", fh) for fh in f])
    row = m.output_vector("m11:z")
    lab = m.dof_labels
    i0, i1, i2 = (lab.index(f"m{i}:z") for i in range(3))
    # Rank-one vectors of s0 (ground-m0), s1 (m0-m1), s2 (m1-m2); g = -b_g along z.
    U = np.zeros((n, 3))
    U[i0, 0] = 1.0
    U[i1, 1], U[i0, 1] = 1.0, -1.0
    U[i2, 2], U[i1, 2] = 1.0, -1.0
    g = np.array([1.0, 0.0, 0.0])
    # Old stiffness of s0..s2 (chain_toml): Zener pad, then hysteretic k·(1 + 0.02i).
    ixo = 1j * w * 0.002
    k_old = np.stack(
        [(4e5 + 1.2e6 * ixo) / (1 + ixo)]
        + [np.full(nf, 1e6 * (1 + 0.3 * ((i * 7) % 11)) * (1 + 0.02j)) for i in (1, 2)],
        axis=-1,
    )
    specs = pad_specs(nspec)
    za, ha, ka = spec_arrays(specs)
    text = json.dumps(specs)

    def rms_of(h):
        return np.sqrt(np.trapezoid(np.abs(h) ** 2 * psd, f, axis=-1))

    def numpy_full():
        hs = np.empty((nspec, nf), complex)
        for v in range(nspec):
            d = spec_stiffness(za[v : v + 1], ha[v : v + 1], ka[v : v + 1], w)[0] - k_old  # (nf, 3)
            Zv = Z + np.einsum("is,fs,js->fij", U, d, U)
            bv = b + (d * g) @ U.T
            hs[v] = np.linalg.solve(Zv, bv[:, :, None])[:, :, 0] @ row
        return hs, rms_of(hs)

    # Woodbury pieces, once per frequency (shared by the two Woodbury versions, timed in each).
    def base():
        X = np.linalg.solve(Z, np.concatenate([b[:, :, None], np.broadcast_to(U, (nf, n, 3))], axis=2))
        x0, Y = X[:, :, 0], X[:, :, 1:]
        return x0 @ row, np.einsum("fis,i->fs", Y, row), np.einsum("is,fit->fst", U, Y), x0 @ U

    def numpy_woodbury_loop():
        cx0, cy, G, h0 = base()
        hs = np.empty((nspec, nf), complex)
        eye = np.eye(3)
        for v in range(nspec):
            d = spec_stiffness(za[v : v + 1], ha[v : v + 1], ka[v : v + 1], w)[0] - k_old
            A = eye + d[:, :, None] * G
            wv = np.linalg.solve(A, (d * (g - h0))[:, :, None])[:, :, 0]
            hs[v] = cx0 + np.sum(cy * wv, axis=1)
        return hs, rms_of(hs)

    def numpy_woodbury_vectorised():
        # All specs at once, 3 x 3 capacitance systems by Cramer's rule (closed form, no loop).
        cx0, cy, G, h0 = base()
        hs = np.empty((nspec, nf), complex)
        for a in range(0, nspec, 100):
            sl = slice(a, min(a + 100, nspec))
            d = spec_stiffness(za[sl], ha[sl], ka[sl], w) - k_old[None]  # (s, nf, 3)
            A = np.eye(3) + d[..., :, None] * G[None]
            r = d * (g - h0)[None]
            c0 = np.cross(A[..., :, 1], A[..., :, 2])
            c1 = np.cross(A[..., :, 2], A[..., :, 0])
            c2 = np.cross(A[..., :, 0], A[..., :, 1])
            det = np.sum(A[..., :, 0] * c0, axis=-1)
            wv = np.stack([np.sum(c0 * r, -1), np.sum(c1 * r, -1), np.sum(c2 * r, -1)], -1) / det[..., None]
            hs[sl] = cx0[None] + np.sum(cy[None] * wv, axis=-1)
        return hs, rms_of(hs)

    def numpy_rational(keep_frf=True):
        # Closed rational form in the stiffness changes (the pole-residue idea for several springs):
        # det(I + D G) and y det(I + D G) are multilinear in d_1..d_3 (Cramer's rule), so per
        # frequency their 8 coefficients each are found once from the 8 corners d_i in {0, s_i}
        # (s_i = |k_old,i|, which keeps the coefficients O(1)); per spec only two 8-term
        # polynomials and one division remain, vectorised over all specs and frequencies.
        cx0, cy, G, h0 = base()
        r = g - h0
        sc = np.abs(k_old)  # (nf, 3)
        subsets = [tuple(b) for b in itertools.product((0, 1), repeat=3)]
        den_v, num_v = {}, {}
        for c in subsets:
            d = sc * np.array(c, float)[None, :]
            A = np.eye(3) + d[:, :, None] * G
            det = np.linalg.det(A)
            wv = np.linalg.solve(A, (d * r)[:, :, None])[:, :, 0]
            den_v[c], num_v[c] = det, (cx0 + np.sum(cy * wv, axis=1)) * det
        def moebius(v):
            out = {}
            for S in subsets:
                acc = 0
                for T in subsets:
                    if all(t <= s_ for t, s_ in zip(T, S)):
                        acc = acc + (-1) ** (sum(S) - sum(T)) * v[T]
                out[S] = acc
            return out
        cd, cn = moebius(den_v), moebius(num_v)
        hs = np.empty((nspec, nf), complex) if keep_frf else None
        rms = np.empty(nspec)
        for a in range(0, nspec, 100):
            sl = slice(a, min(a + 100, nspec))
            x = (spec_stiffness(za[sl], ha[sl], ka[sl], w) - k_old[None]) / sc[None]  # (s, nf, 3)
            x0, x1, x2 = x[..., 0], x[..., 1], x[..., 2]
            mono = {(0, 0, 0): 1.0, (1, 0, 0): x0, (0, 1, 0): x1, (0, 0, 1): x2}
            mono[(1, 1, 0)] = x0 * x1
            mono[(1, 0, 1)] = x0 * x2
            mono[(0, 1, 1)] = x1 * x2
            mono[(1, 1, 1)] = mono[(1, 1, 0)] * x2
            den = sum(cd[S][None] * mono[S] for S in subsets)
            num = sum(cn[S][None] * mono[S] for S in subsets)
            h = num / den
            rms[sl] = rms_of(h)
            if keep_frf:
                hs[sl] = h
        return hs, rms

    def numpy_rational_rms():
        # The same, keeping only the RMS of each chunk (what ranking needs).
        return numpy_rational(keep_frf=False)

    def ours():
        h, r = stillsky.spring_variants(m, ["s0", "s1", "s2"], text, f, "ground_z", "m11:z", input_psd=psd)
        return h[:, :, 0, 0], r[:, 0, 0]

    def ours_rms():
        _, r = stillsky.spring_variants(m, ["s0", "s1", "s2"], text, f, "ground_z", "m11:z", input_psd=psd, frf=False)
        return None, r[:, 0, 0]

    cases = [
        ("woodbury_loop", numpy_woodbury_loop),
        ("vectorised", numpy_woodbury_vectorised),
        ("rational", numpy_rational),
        ("ours", ours),
        ("rational_rms_only", numpy_rational_rms),
        ("ours_rms_only", ours_rms),
    ]
    if full:
        cases.insert(0, ("full", numpy_full))
    res = {k: [] for k, _ in cases}
    out = {}
    for r in range(repeat):
        for name, fn in cases:
            if name == "full" and r > 0:
                continue  # about 5 s a run; one run is enough for the ratio's order
            t, out[name] = timed(fn, 1)
            res[name].append(t)
    med = {k: statistics.median(v) for k, v in res.items()}
    errs = {}
    for k, (h, r) in out.items():
        if k != "ours":
            errs[k] = rel(out["ours"][1], r) if h is None else max(rel(out["ours"][0], h), rel(out["ours"][1], r))
    return med, errs


def welch_case(nsamp, repeat):
    rng = np.random.default_rng(7)
    x = rng.standard_normal(nsamp)
    res = {"scipy": [], "ours": []}
    out = {}
    for _ in range(repeat):
        t, out["scipy"] = timed(lambda: scipy.signal.welch(x, fs=1000.0, nperseg=4096), 1)
        res["scipy"].append(t)
        t, out["ours"] = timed(lambda: stillsky.welch(x, 1000.0, nperseg=4096), 1)
        res["ours"].append(t)
    return {k: statistics.median(v) for k, v in res.items()}, rel(out["ours"][1], out["scipy"][1])


def overhead_case(calls):
    """Median of `calls` binding calls Model.frf (n = 12 chain, 4096 log frequencies, one input,
    one output); compare with criterion's frf_chain/convenience/n12_f4096 (the same call in Rust)."""
    m = stillsky.Model.from_toml_str(chain_toml(12), "chain")
    f = np.geomspace(0.5, 500.0, 4096)
    m.frf(f, "ground_z", "m11:z")
    med, _ = timed(lambda: m.frf(f, "ground_z", "m11:z"), calls)
    return med


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=5)
    ap.add_argument("--welch-size", type=int, action="append", default=None,
                    help="in-memory Welch sizes (default 720000; 86400000 is the 24 h case)")
    ap.add_argument("--skip-full", action="store_true", help="skip the full-solve variants case (about 5 s)")
    ap.add_argument("--only", choices=("frf", "modal", "variants", "welch", "overhead"), action="append", default=None)
    a = ap.parse_args()
    only = set(a.only or ("frf", "modal", "variants", "welch", "overhead"))
    print(f"threads: RAYON={os.environ['RAYON_NUM_THREADS']} OMP={os.environ['OMP_NUM_THREADS']}; "
          f"numpy {np.__version__}, scipy {scipy.__version__}, repeat {a.repeat}")
    if "frf" in only:
        print("| case | numpy dense (s) | scipy solve_banded (s) | ours via Python (s) | numpy/ours | banded/ours | max rel diff |")
        print("|---|---|---|---|---|---|---|")
        for n, nf in ((6, 1024), (6, 4096), (12, 1024), (12, 4096), (48, 1024), (48, 4096), (200, 1024)):
            med, err = frf_case(n, nf, a.repeat, banded=True)
            print(
                f"| FRF chain n={n} F={nf} | {med['numpy']:.4g} | {med['banded']:.4g} | {med['ours']:.4g} | "
                f"{med['numpy'] / med['ours']:.1f} | {med['banded'] / med['ours']:.1f} | {max(err.values()):.1e} |",
                flush=True,
            )
            assert max(err.values()) < 1e-9, err
    if "modal" in only:
        print("\n| modal superposition, uniform loss | numpy eigh + sum (s) | ours (s) | numpy/ours | max rel diff |")
        print("|---|---|---|---|---|")
        for n, nf in ((12, 4096), (48, 4096)):
            med, err = modal_case(n, nf, a.repeat)
            print(f"| n={n} F={nf} | {med['numpy']:.4g} | {med['ours']:.4g} | {med['numpy'] / med['ours']:.1f} | {err:.1e} |",
                  flush=True)
            assert err < 1e-9, err
    if "variants" in only:
        med, err = variants_case(1000, 2048, max(1, min(a.repeat, 3)), full=not a.skip_full)
        print("\n| spring variants 1000 specs x 2048 freq, n = 12, 3 springs | time (s) | ratio to ours (RMS-only rows: to ours_rms_only) | max rel diff |")
        print("|---|---|---|---|")
        for k in ("full", "woodbury_loop", "vectorised", "rational", "ours", "rational_rms_only", "ours_rms_only"):
            if k in med:
                e = f"{err[k]:.1e}" if k in err else ""
                ref = med["ours_rms_only" if k.endswith("rms_only") else "ours"]
                print(f"| {k} | {med[k]:.4g} | {med[k] / ref:.1f} | {e} |", flush=True)
        assert max(err.values()) < 1e-9, err
    if "welch" in only:
        print("\n| Welch (nperseg 4096, Hann, 50 %) | scipy (s) | ours via Python (s) | scipy/ours | max rel diff |")
        print("|---|---|---|---|---|")
        for ns in a.welch_size or [720_000]:
            med, err = welch_case(ns, a.repeat if ns < 10_000_000 else 1)
            print(f"| {ns} samples | {med['scipy']:.4g} | {med['ours']:.4g} | {med['scipy'] / med['ours']:.1f} | {err:.1e} |",
                  flush=True)
            assert err < 1e-9, err
    if "overhead" in only:
        med = overhead_case(60)
        print(f"\nModel.frf via the binding, n = 12, F = 4096, median of 60 calls: {med * 1e3:.3f} ms "
              "(compare: cargo bench --bench frf -- frf_chain/convenience/n12_f4096)")


if __name__ == "__main__":
    main()

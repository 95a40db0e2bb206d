//! Eliminations for [`LANES`] independent complex systems at once, one per SIMD lane.
//!
//! An FRF grid or a set of spring variants solves the same sparsity pattern at thousands of
//! frequencies. Solving one frequency at a time leaves the CPU waiting on each pivot division;
//! solving eight frequencies in lockstep turns every scalar operation into one vector operation
//! over eight independent chains.
//! The values of the eight systems are stored split into real and imaginary lanes ([`CLane`]).
//!
//! The lane kernels take no row exchanges (a row exchange differs per lane). Instead each lane's
//! answer is checked after the fact: its pivots must pass the singularity test of the scalar
//! kernels, and its normwise backward error η = ‖b − Ax‖∞ / (‖A‖∞‖x‖∞ + ‖b‖∞) (Rigal & Gaches
//! 1967; Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., 2002, Thm 7.1) must be
//! at most [`BACKWARD_ERROR_MAX`], with |re| + |im| as the modulus. A lane that fails is flagged
//! in the returned mask and must be solved again by the pivoted scalar kernel, so every answer is
//! the exact solution of a system within that relative distance of the given one, as with a
//! backward-stable solver. Call the kernels inside [`with_best_simd`] so they are compiled for
//! the instruction set the CPU has.

use super::SINGULAR_PIVOT_RATIO;
use num_complex::Complex64;

/// Systems solved in lockstep (one AVX-512 register of `f64`, two AVX2 registers).
pub const LANES: usize = 8;

/// One `f64` per lane.
pub type Lane = [f64; LANES];

/// Bit mask over the lanes (bit l set: lane l needs the scalar kernel).
pub type LaneMask = u32;

/// Up to [`LANES`] frequencies as one lane block; missing lanes repeat the last frequency, so a
/// short final block solves valid systems whose answers are simply not used.
#[inline(always)]
pub fn pad_block(f: &[f64]) -> Lane {
    let mut l: Lane = [f.last().copied().unwrap_or(0.0); LANES];
    let k = f.len().min(LANES);
    l[..k].copy_from_slice(&f[..k]);
    l
}

/// A complex number per lane, split into real and imaginary parts.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct CLane {
    pub re: Lane,
    pub im: Lane,
}

impl CLane {
    pub const ZERO: CLane = CLane { re: [0.0; LANES], im: [0.0; LANES] };

    /// The same value in every lane.
    #[inline(always)]
    pub fn splat(z: Complex64) -> CLane {
        CLane { re: [z.re; LANES], im: [z.im; LANES] }
    }

    /// Lane `l` as a complex number.
    #[inline(always)]
    pub fn get(&self, l: usize) -> Complex64 {
        Complex64::new(self.re[l], self.im[l])
    }

    /// Set lane `l`.
    #[inline(always)]
    pub fn set(&mut self, l: usize, z: Complex64) {
        self.re[l] = z.re;
        self.im[l] = z.im;
    }

    /// Times a real number.
    #[inline(always)]
    pub fn scale(self, s: f64) -> CLane {
        let mut r = self;
        for l in 0..LANES {
            r.re[l] *= s;
            r.im[l] *= s;
        }
        r
    }

    /// `self − a·b`.
    #[inline(always)]
    pub fn sub_mul(self, a: CLane, b: CLane) -> CLane {
        let mut r = CLane::ZERO;
        for l in 0..LANES {
            r.re[l] = self.re[l] - (a.re[l] * b.re[l] - a.im[l] * b.im[l]);
            r.im[l] = self.im[l] - (a.re[l] * b.im[l] + a.im[l] * b.re[l]);
        }
        r
    }

    /// `self + a·b`.
    #[inline(always)]
    pub fn add_mul(self, a: CLane, b: CLane) -> CLane {
        let mut r = CLane::ZERO;
        for l in 0..LANES {
            r.re[l] = self.re[l] + (a.re[l] * b.re[l] - a.im[l] * b.im[l]);
            r.im[l] = self.im[l] + (a.re[l] * b.im[l] + a.im[l] * b.re[l]);
        }
        r
    }

    /// 1/z = z̄/|z|² per lane (a zero lane gives non-finite values; the callers check pivots).
    #[inline(always)]
    pub fn inv(self) -> CLane {
        let mut r = CLane::ZERO;
        for l in 0..LANES {
            let d = 1.0 / (self.re[l] * self.re[l] + self.im[l] * self.im[l]);
            r.re[l] = self.re[l] * d;
            r.im[l] = -self.im[l] * d;
        }
        r
    }

    /// |re| + |im| per lane (LAPACK's `cabs1`, the pivot measure of [`super::BandLu`]).
    #[inline(always)]
    pub fn cabs1(&self) -> Lane {
        let mut r = [0.0; LANES];
        for l in 0..LANES {
            r[l] = self.re[l].abs() + self.im[l].abs();
        }
        r
    }

    /// |z|² per lane.
    #[inline(always)]
    pub fn norm_sqr(&self) -> Lane {
        let mut r = [0.0; LANES];
        for l in 0..LANES {
            r[l] = self.re[l] * self.re[l] + self.im[l] * self.im[l];
        }
        r
    }
}

impl std::ops::Add for CLane {
    type Output = CLane;
    #[inline(always)]
    fn add(self, o: CLane) -> CLane {
        let mut r = CLane::ZERO;
        for l in 0..LANES {
            r.re[l] = self.re[l] + o.re[l];
            r.im[l] = self.im[l] + o.im[l];
        }
        r
    }
}

impl std::ops::Mul for CLane {
    type Output = CLane;
    #[inline(always)]
    fn mul(self, o: CLane) -> CLane {
        let mut r = CLane::ZERO;
        for l in 0..LANES {
            r.re[l] = self.re[l] * o.re[l] - self.im[l] * o.im[l];
            r.im[l] = self.re[l] * o.im[l] + self.im[l] * o.re[l];
        }
        r
    }
}

/// Largest normwise backward error a lane may have (about 45 ulps; partial-pivot LU of these
/// systems measures 1e-17 to 1e-16).
pub const BACKWARD_ERROR_MAX: f64 = 1e-14;

/// Banded LU without row exchanges for [`LANES`] systems of size n with `kl` sub- and `ku`
/// super-diagonals (a dense k × k system is the case kl = ku = k − 1).
///
/// Storage is column-major band storage without LAPACK's fill-in rows (none arise without row
/// exchanges), leading dimension kl + ku + 1: A(i, j) lives at `ku + i − j + j·ld` for
/// max(0, j − ku) ≤ i ≤ min(n − 1, j + kl). Cost O(n·kl·ku) per lane.
#[derive(Debug, Clone)]
pub struct BandLanes {
    n: usize,
    kl: usize,
    ku: usize,
    inv_diag: Vec<CLane>,
    /// Row sums and residuals for [`BandLanes::backward_error_mask`].
    rows: Vec<Lane>,
    resid: Vec<CLane>,
}

impl BandLanes {
    pub fn new(n: usize, kl: usize, ku: usize) -> Self {
        BandLanes {
            n,
            kl,
            ku,
            inv_diag: vec![CLane::ZERO; n],
            rows: vec![[0.0; LANES]; n],
            resid: vec![CLane::ZERO; n],
        }
    }

    /// Leading dimension kl + ku + 1.
    #[inline(always)]
    pub fn ld(&self) -> usize {
        self.kl + self.ku + 1
    }

    /// Storage length n · ld.
    pub fn storage_len(&self) -> usize {
        self.n * self.ld()
    }

    /// Position of A(i, j) (caller keeps (i, j) inside the band).
    #[inline(always)]
    pub fn index(&self, i: usize, j: usize) -> usize {
        self.ku + i - j + j * self.ld()
    }

    /// Factor `ab` in place. Returns the lanes whose pivots fail [`SINGULAR_PIVOT_RATIO`] (their
    /// values in `ab` are then unspecified); check the others' solutions with
    /// [`BandLanes::backward_error_mask`].
    #[inline(always)]
    pub fn factor_in_place(&mut self, ab: &mut [CLane]) -> LaneMask {
        let (n, kl, ku, ld) = (self.n, self.kl, self.ku, self.ld());
        debug_assert_eq!(ab.len(), n * ld);
        let mut bad: LaneMask = 0;
        let mut lo = [f64::INFINITY; LANES];
        let mut hi = [0.0f64; LANES];
        for j in 0..n {
            let km = kl.min(n - 1 - j);
            let col = j * ld + ku;
            let d = ab[col];
            let dn = d.norm_sqr();
            for l in 0..LANES {
                lo[l] = lo[l].min(dn[l]);
                hi[l] = hi[l].max(dn[l]);
            }
            let inv = d.inv();
            self.inv_diag[j] = inv;
            for p in 1..=km {
                ab[col + p] = ab[col + p] * inv;
            }
            for c in j + 1..=(j + ku).min(n - 1) {
                // A(j, c) and the column below it.
                let base = c * ld + ku + j - c;
                let a = ab[base];
                for p in 1..=km {
                    ab[base + p] = ab[base + p].sub_mul(ab[col + p], a);
                }
            }
        }
        for l in 0..LANES {
            // sqrt(lo/hi) > ratio without a division or root per lane.
            let ok = hi[l] > 0.0
                && lo[l].is_finite()
                && lo[l] > SINGULAR_PIVOT_RATIO * SINGULAR_PIVOT_RATIO * hi[l];
            bad |= (!ok as LaneMask) << l;
        }
        bad
    }

    /// Lanes whose solution `x` of A x = b has a normwise backward error above
    /// [`BACKWARD_ERROR_MAX`] (or is not finite). `a` and `b` are the unfactored system.
    #[inline(always)]
    pub fn backward_error_mask(&mut self, a: &[CLane], b: &[CLane], x: &[CLane], nrhs: usize) -> LaneMask {
        let (n, kl, ku, ld) = (self.n, self.kl, self.ku, self.ld());
        // ‖A‖∞ per lane: largest row sum of |re| + |im|.
        let rows = &mut self.rows;
        rows.iter_mut().for_each(|r| *r = [0.0; LANES]);
        for j in 0..n {
            for i in j.saturating_sub(ku)..(j + kl + 1).min(n) {
                let c = a[ku + i - j + j * ld].cabs1();
                for l in 0..LANES {
                    rows[i][l] += c[l];
                }
            }
        }
        let mut anorm = [0.0f64; LANES];
        for r in rows.iter() {
            for l in 0..LANES {
                anorm[l] = anorm[l].max(r[l]);
            }
        }
        let mut bad: LaneMask = 0;
        let r = &mut self.resid;
        for c in 0..nrhs {
            let (bc, xc) = (&b[c * n..(c + 1) * n], &x[c * n..(c + 1) * n]);
            r.copy_from_slice(bc);
            for j in 0..n {
                for i in j.saturating_sub(ku)..(j + kl + 1).min(n) {
                    r[i] = r[i].sub_mul(a[ku + i - j + j * ld], xc[j]);
                }
            }
            let (mut rn, mut xn, mut bn) = ([0.0f64; LANES], [0.0f64; LANES], [0.0f64; LANES]);
            for i in 0..n {
                let (ri, xi, bi) = (r[i].cabs1(), xc[i].cabs1(), bc[i].cabs1());
                for l in 0..LANES {
                    rn[l] = rn[l].max(ri[l]);
                    xn[l] = xn[l].max(xi[l]);
                    bn[l] = bn[l].max(bi[l]);
                }
            }
            for l in 0..LANES {
                let ok = rn[l] <= BACKWARD_ERROR_MAX * (anorm[l] * xn[l] + bn[l]);
                bad |= (!ok as LaneMask) << l;
            }
        }
        bad
    }

    /// Overwrite `b` (n × nrhs, column-major, one [`CLane`] per entry) with A⁻¹b, using the
    /// factors from [`BandLanes::factor_in_place`].
    #[inline(always)]
    pub fn solve_in_place(&self, ab: &[CLane], b: &mut [CLane], nrhs: usize) {
        let (n, kl, ku, ld) = (self.n, self.kl, self.ku, self.ld());
        debug_assert_eq!(b.len(), n * nrhs);
        for r in 0..nrhs {
            let x = &mut b[r * n..(r + 1) * n];
            if kl > 0 {
                for j in 0..n - 1 {
                    let km = kl.min(n - 1 - j);
                    let col = j * ld + ku;
                    let xj = x[j];
                    for p in 1..=km {
                        x[j + p] = x[j + p].sub_mul(ab[col + p], xj);
                    }
                }
            }
            for j in (0..n).rev() {
                let xj = x[j] * self.inv_diag[j];
                x[j] = xj;
                let base = j * ld + ku - j;
                for i in j.saturating_sub(ku)..j {
                    x[i] = x[i].sub_mul(ab[base + i], xj);
                }
            }
        }
    }
}

/// Dense K × K systems without row exchanges, unrolled at compile time (the capacitance systems
/// of the variants engine). `a[p][q]` = A(p, q) is overwritten by L below the diagonal and the
/// inverse pivots on it. Returns the lanes whose pivots fail [`SINGULAR_PIVOT_RATIO`].
#[inline(always)]
pub fn dense_factor<const K: usize>(a: &mut [[CLane; K]; K]) -> LaneMask {
    let mut lo = [f64::INFINITY; LANES];
    let mut hi = [0.0f64; LANES];
    for j in 0..K {
        let d = a[j][j];
        let dn = d.norm_sqr();
        for l in 0..LANES {
            lo[l] = lo[l].min(dn[l]);
            hi[l] = hi[l].max(dn[l]);
        }
        let inv = d.inv();
        a[j][j] = inv;
        for i in j + 1..K {
            a[i][j] = a[i][j] * inv;
        }
        for i in j + 1..K {
            for c in j + 1..K {
                a[i][c] = a[i][c].sub_mul(a[i][j], a[j][c]);
            }
        }
    }
    let mut bad: LaneMask = 0;
    for l in 0..LANES {
        // sqrt(lo/hi) > ratio without a division or root per lane.
        let ok =
            hi[l] > 0.0 && lo[l].is_finite() && lo[l] > SINGULAR_PIVOT_RATIO * SINGULAR_PIVOT_RATIO * hi[l];
        bad |= (!ok as LaneMask) << l;
    }
    bad
}

/// Overwrite `x` with A⁻¹x using the factors of [`dense_factor`].
#[inline(always)]
pub fn dense_solve<const K: usize>(lu: &[[CLane; K]; K], x: &mut [CLane; K]) {
    for j in 0..K {
        for i in j + 1..K {
            x[i] = x[i].sub_mul(lu[i][j], x[j]);
        }
    }
    for j in (0..K).rev() {
        x[j] = x[j] * lu[j][j];
        for i in 0..j {
            x[i] = x[i].sub_mul(lu[i][j], x[j]);
        }
    }
}

/// [`BandLanes::backward_error_mask`] for one dense K × K system and one right-hand side.
#[inline(always)]
pub fn dense_backward_error_mask<const K: usize>(
    a: &[[CLane; K]; K],
    b: &[CLane; K],
    x: &[CLane; K],
) -> LaneMask {
    let (mut an, mut rn, mut xn, mut bn) =
        ([0.0f64; LANES], [0.0f64; LANES], [0.0f64; LANES], [0.0f64; LANES]);
    for i in 0..K {
        let mut r = b[i];
        let mut row = [0.0f64; LANES];
        for j in 0..K {
            r = r.sub_mul(a[i][j], x[j]);
            let c = a[i][j].cabs1();
            for l in 0..LANES {
                row[l] += c[l];
            }
        }
        let (rc, xc, bc) = (r.cabs1(), x[i].cabs1(), b[i].cabs1());
        for l in 0..LANES {
            an[l] = an[l].max(row[l]);
            rn[l] = rn[l].max(rc[l]);
            xn[l] = xn[l].max(xc[l]);
            bn[l] = bn[l].max(bc[l]);
        }
    }
    let mut bad: LaneMask = 0;
    for l in 0..LANES {
        let ok = rn[l] <= BACKWARD_ERROR_MAX * (an[l] * xn[l] + bn[l]);
        bad |= (!ok as LaneMask) << l;
    }
    bad
}

/// Every principal minor det(M[T, T]) of an n × n matrix (column-major, n ≤ 8), indexed by the
/// subset mask T (bit i: row and column i; the empty minor is 1), each with the permanent of
/// |M[T, T]|: the sum of the moduli of its Laplace terms, which bounds its rounding error
/// (Higham 2002, §14.6, for the error of a sum of products). Laplace expansion along the first
/// row; for the small matrices of the variants engine's rational form (n ≤ 5, 31 minors).
pub fn principal_minors(m: &[CLane], n: usize) -> (Vec<CLane>, Vec<Lane>) {
    fn expand(m: &[CLane], abs: &[Lane], n: usize, rows: u32, cols: u32) -> (CLane, Lane) {
        if rows == 0 {
            return (CLane::splat(Complex64::new(1.0, 0.0)), [1.0; LANES]);
        }
        let r = rows.trailing_zeros() as usize;
        let (mut det, mut per, mut sign) = (CLane::ZERO, [0.0; LANES], 1.0);
        let mut left = cols;
        while left != 0 {
            let c = left.trailing_zeros() as usize;
            left &= left - 1;
            let (d, p) = expand(m, abs, n, rows & (rows - 1), cols & !(1 << c));
            det = det.add_mul(m[r + c * n].scale(sign), d);
            let a = &abs[r + c * n];
            for l in 0..LANES {
                per[l] += a[l] * p[l];
            }
            sign = -sign;
        }
        (det, per)
    }
    assert!(n <= 8 && m.len() == n * n, "principal_minors: n × n input with n ≤ 8");
    let abs: Vec<Lane> = m.iter().map(|a| a.norm_sqr().map(f64::sqrt)).collect();
    (0..1u32 << n).map(|t| expand(m, &abs, n, t, t)).unzip()
}

/// Run `f` in a function compiled for the best instruction set this CPU offers (AVX-512 or
/// AVX2 + FMA on x86-64, chosen at run time; the baseline elsewhere). Mark the closure
/// `#[inline(always)]`: it and the `#[inline(always)]` kernels it calls are then compiled for that
/// set; anything not inlined runs on the baseline.
#[inline(always)]
pub fn with_best_simd<R, F: FnOnce() -> R>(f: F) -> R {
    struct Op<F>(F);
    impl<R, F: FnOnce() -> R> pulp::WithSimd for Op<F> {
        type Output = R;
        #[inline(always)]
        fn with_simd<S: pulp::Simd>(self, _: S) -> R {
            (self.0)()
        }
    }
    pulp::Arch::new().dispatch(Op(f))
}

/// A complex buffer seen as its interleaved real and imaginary parts (re₀, im₀, re₁, …), to
/// fill the input of a real FFT taken through a half-length complex one.
pub fn complex_as_reals(v: &mut [Complex64]) -> &mut [f64] {
    pulp::bytemuck::cast_slice_mut(v)
}

/// (Σ xᵢ, Σ (i − mid)·xᵢ) with xᵢ = scale·v[i] (the second sum only when `moment`), for the
/// trend of a Welch segment. Element i goes to partial sum i mod [`LANES`] (the partial sums
/// stay apart, so the adds do not wait on each other and the rounding error grows with
/// n/LANES); the partials are then added pairwise and the tail (the last n mod LANES elements,
/// in order) last. The partials are the same whatever instruction set runs them, so the result
/// does not depend on the CPU. `i − mid` is exact for n < 2⁵² and `mid` an integer or half.
pub fn lane_moments(v: &[f64], scale: f64, mid: f64, moment: bool) -> (f64, f64) {
    struct Op<'a> {
        v: &'a [f64],
        scale: f64,
        mid: f64,
        moment: bool,
    }
    impl pulp::WithSimd for Op<'_> {
        type Output = (f64, f64);
        #[inline(always)]
        fn with_simd<S: pulp::Simd>(self, simd: S) -> (f64, f64) {
            let Op { v, scale, mid, moment } = self;
            // Registers per group of LANES elements (1 for AVX-512, 2 for AVX2, 8 scalar).
            let k = LANES / S::F64_LANES;
            let zero = simd.splat_f64s(0.0);
            let (mut s0, mut s1, mut t) = ([zero; LANES], [zero; LANES], [zero; LANES]);
            let t0: Lane = std::array::from_fn(|j| j as f64 - mid);
            t[..k].copy_from_slice(&S::as_simd_f64s(&t0).0[..k]);
            let (sc, step) = (simd.splat_f64s(scale), simd.splat_f64s(LANES as f64));
            let (regs, _) = S::as_simd_f64s(v);
            let groups = regs.chunks_exact(k);
            let done = (regs.len() - groups.remainder().len()) * S::F64_LANES;
            for g in groups {
                for q in 0..k {
                    let x = simd.mul_f64s(g[q], sc);
                    s0[q] = simd.add_f64s(s0[q], x);
                    if moment {
                        s1[q] = simd.add_f64s(s1[q], simd.mul_f64s(t[q], x));
                        t[q] = simd.add_f64s(t[q], step);
                    }
                }
            }
            let (mut r0, mut r1) = (0.0, 0.0);
            for (i, e) in v.iter().enumerate().skip(done) {
                let x = e * scale;
                r0 += x;
                r1 += (i as f64 - mid) * x;
            }
            let fold = |s: &[S::f64s; LANES], tail: f64| {
                let mut l: Lane = [0.0; LANES];
                S::as_mut_simd_f64s(&mut l).0.copy_from_slice(&s[..k]);
                (((l[0] + l[1]) + (l[2] + l[3])) + ((l[4] + l[5]) + (l[6] + l[7]))) + tail
            };
            (fold(&s0, r0), if moment { fold(&s1, r1) } else { 0.0 })
        }
    }
    pulp::Arch::new().dispatch(Op { v, scale, mid, moment })
}

#[cfg(test)]
mod tests {
    use super::super::BandLu;
    use super::*;

    #[test]
    fn lane_moments_are_the_stated_partial_sums() {
        // The same eight partial sums written out plainly (element i into partial i mod 8,
        // pairwise fold, tail last): equal bit for bit, whatever SIMD set the CPU picked; and
        // within rounding of the sums taken in one running total.
        for n in [0usize, 5, 8, 1000, 4099] {
            let v: Vec<f64> = (0..n).map(|i| ((i * 7919) % 1013) as f64 * 0.37 - 150.0).collect();
            let (scale, mid) = (1e-3, (n as f64 - 1.0) / 2.0);
            let mut p0 = [0.0f64; LANES];
            let mut p1 = [0.0f64; LANES];
            let body = n - n % LANES;
            for i in 0..body {
                let x = v[i] * scale;
                p0[i % LANES] += x;
                p1[i % LANES] += (i as f64 - mid) * x;
            }
            let (mut r0, mut r1) = (0.0, 0.0);
            for i in body..n {
                let x = v[i] * scale;
                r0 += x;
                r1 += (i as f64 - mid) * x;
            }
            let fold =
                |p: &Lane, r: f64| (((p[0] + p[1]) + (p[2] + p[3])) + ((p[4] + p[5]) + (p[6] + p[7]))) + r;
            let (s0, s1) = lane_moments(&v, scale, mid, true);
            assert_eq!(
                (s0.to_bits(), s1.to_bits()),
                (fold(&p0, r0).to_bits(), fold(&p1, r1).to_bits()),
                "n = {n}"
            );
            assert_eq!(lane_moments(&v, scale, mid, false).0.to_bits(), s0.to_bits());
            let direct: f64 = v.iter().map(|x| x * scale).sum();
            assert!((s0 - direct).abs() <= 1e-12 * (1.0 + direct.abs()), "{s0} vs {direct}");
        }
    }

    fn rand_band(n: usize, kl: usize, ku: usize, seed: u64, diag_boost: f64) -> Vec<Vec<Complex64>> {
        // One dense column-major matrix per lane, band pattern, LCG values (deterministic).
        let mut s = seed;
        let mut next = || {
            s = s.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
            ((s >> 11) as f64 / (1u64 << 53) as f64) - 0.5
        };
        (0..LANES)
            .map(|_| {
                let mut a = vec![Complex64::default(); n * n];
                for j in 0..n {
                    for i in j.saturating_sub(ku)..(j + kl + 1).min(n) {
                        a[i + j * n] = Complex64::new(next(), next());
                    }
                    a[j + j * n] += diag_boost;
                }
                a
            })
            .collect()
    }

    #[test]
    fn principal_minors_match_faer_determinants() {
        // Oracle: faer's LU determinant of every principal submatrix, lane by lane; the
        // permanent bound is at least the modulus of the minor (triangle inequality).
        let n = 5;
        let mats = rand_band(n, n - 1, n - 1, 11, 0.3);
        let mut m = vec![CLane::ZERO; n * n];
        for (l, a) in mats.iter().enumerate() {
            for (x, v) in m.iter_mut().zip(a) {
                x.set(l, *v);
            }
        }
        let (det, per) = principal_minors(&m, n);
        assert_eq!(det.len(), 32);
        for t in 0..32u32 {
            let idx: Vec<usize> = (0..n).filter(|i| t & (1 << i) != 0).collect();
            for (l, a) in mats.iter().enumerate() {
                let want = if idx.is_empty() {
                    Complex64::new(1.0, 0.0)
                } else {
                    let sub = faer::Mat::<faer::c64>::from_fn(idx.len(), idx.len(), |i, j| {
                        let z = a[idx[i] + idx[j] * n];
                        faer::c64::new(z.re, z.im)
                    });
                    let d = sub.determinant();
                    Complex64::new(d.re, d.im)
                };
                let got = det[t as usize].get(l);
                assert!((got - want).norm() <= 1e-13 * per[t as usize][l], "T = {t:b}, lane {l}");
                assert!(per[t as usize][l] >= want.norm() * (1.0 - 1e-12));
            }
        }
    }

    fn solve_lanes(
        mats: &[Vec<Complex64>],
        n: usize,
        kl: usize,
        ku: usize,
    ) -> (Vec<Vec<Complex64>>, LaneMask) {
        let mut lu = BandLanes::new(n, kl, ku);
        let mut ab = vec![CLane::ZERO; lu.storage_len()];
        let mut b = vec![CLane::ZERO; n];
        for (l, a) in mats.iter().enumerate() {
            for j in 0..n {
                for i in j.saturating_sub(ku)..(j + kl + 1).min(n) {
                    ab[lu.index(i, j)].set(l, a[i + j * n]);
                }
                b[j].set(l, Complex64::new(1.0 + j as f64, -0.5 * j as f64));
            }
        }
        let bad = with_best_simd(
            #[inline(always)]
            || {
                let bad = lu.factor_in_place(&mut ab);
                lu.solve_in_place(&ab, &mut b, 1);
                bad
            },
        );
        ((0..LANES).map(|l| (0..n).map(|i| b[i].get(l)).collect()).collect(), bad)
    }

    fn solve_pivoted(a: &[Complex64], n: usize, kl: usize, ku: usize) -> Vec<Complex64> {
        let mut lu = BandLu::new(n, kl, ku);
        let mut ab = vec![Complex64::default(); lu.storage_len()];
        for j in 0..n {
            for i in j.saturating_sub(ku)..(j + kl + 1).min(n) {
                ab[lu.index(i, j)] = a[i + j * n];
            }
        }
        lu.factor_in_place(&mut ab).unwrap();
        let mut b: Vec<Complex64> = (0..n).map(|j| Complex64::new(1.0 + j as f64, -0.5 * j as f64)).collect();
        lu.solve_in_place(&ab, &mut b, 1);
        b
    }

    #[test]
    fn lanes_match_pivoted_band_lu_where_no_exchange_is_needed() {
        // Oracle: the pivoted scalar BandLu (itself checked against faer's dense LU). Diagonally
        // dominant matrices need no exchange, so every lane must pass and agree.
        for &(n, kl, ku) in &[(1, 0, 0), (12, 1, 1), (30, 3, 2), (9, 8, 8), (40, 0, 4)] {
            let mats = rand_band(n, kl, ku, 11 + n as u64, 2.0 * (kl + ku + 1) as f64);
            let (x, bad) = solve_lanes(&mats, n, kl, ku);
            assert_eq!(bad, 0, "n = {n}");
            for (l, a) in mats.iter().enumerate() {
                let r = solve_pivoted(a, n, kl, ku);
                let e = x[l].iter().zip(&r).map(|(p, q)| (p - q).norm()).fold(0.0, f64::max);
                let s = r.iter().map(|q| q.norm()).fold(0.0, f64::max);
                assert!(e <= 1e-12 * s, "n = {n}, lane {l}: {e}");
            }
        }
    }

    #[test]
    fn lanes_flag_unstable_eliminations() {
        // Weak diagonals: elimination without exchanges is unstable in some lanes (tiny pivots,
        // large multipliers). Every lane the kernel keeps must still agree with the pivoted LU;
        // the flagged ones are left to it.
        let (n, kl, ku) = (10, 2, 2);
        let mut mats = rand_band(n, kl, ku, 5, 0.0);
        // Lane 2: a tiny first pivot with large entries below it.
        mats[2][0] = Complex64::new(1e-13, 0.0);
        let (x, bad) = solve_lanes(&mats, n, kl, ku);
        assert_ne!(bad & (1 << 2), 0, "a 1e-13 pivot must be flagged: {bad:b}");
        for (l, a) in mats.iter().enumerate() {
            if bad & (1 << l) == 0 {
                let r = solve_pivoted(a, n, kl, ku);
                let e = x[l].iter().zip(&r).map(|(p, q)| (p - q).norm()).fold(0.0, f64::max);
                let s = r.iter().map(|q| q.norm()).fold(0.0, f64::max);
                assert!(e <= 1e-12 * s, "lane {l}: {e}");
            }
        }
    }

    #[test]
    fn dense_lanes_match_pivoted_solver() {
        // Oracle: solve_small_in_place (partial pivoting, itself checked against faer).
        let mats = rand_band(3, 2, 2, 21, 0.3);
        let mut a = [[CLane::ZERO; 3]; 3];
        let mut x = [CLane::ZERO; 3];
        for (l, m) in mats.iter().enumerate() {
            for p in 0..3 {
                for q in 0..3 {
                    a[p][q].set(l, m[p + 3 * q]);
                }
                x[p].set(l, Complex64::new(1.0, p as f64));
            }
        }
        let (a0, x0) = (a, x);
        let bad = with_best_simd(
            #[inline(always)]
            || {
                let bad = dense_factor(&mut a);
                dense_solve(&a, &mut x);
                bad | dense_backward_error_mask(&a0, &x0, &x)
            },
        );
        for (l, m) in mats.iter().enumerate() {
            let mut mm = m.clone();
            let mut b: Vec<Complex64> = (0..3).map(|p| Complex64::new(1.0, p as f64)).collect();
            super::super::solve_small_in_place(&mut mm, 3, &mut b, 1).unwrap();
            if bad & (1 << l) == 0 {
                for p in 0..3 {
                    assert!((x[p].get(l) - b[p]).norm() <= 1e-12 * b[p].norm().max(1.0), "lane {l}");
                }
            }
        }
    }

    #[test]
    fn lanes_flag_singular_systems() {
        let (n, kl, ku) = (4, 1, 1);
        let mut mats = rand_band(n, kl, ku, 3, 10.0);
        // Lane 3: a zero column makes the matrix singular.
        for i in 0..n {
            mats[3][i + 2 * n] = Complex64::default();
        }
        let (_, bad) = solve_lanes(&mats, n, kl, ku);
        assert_eq!(bad & (1 << 3), 1 << 3);
        assert_eq!(bad & !(1 << 3), 0);
    }
}

//! The only module that touches `faer`. Everything else passes plain column-major slices.
//!
//! - [`ComplexLu`]: a reusable partial-pivot LU workspace for Z(ω) x = b (allocates once).
//! - [`RealLu`]: a real LU factored once and solved many times (implicit time stepping).
//! - [`BandLu`]: our own banded partial-pivot LU (LAPACK `gbtf2`/`gbtrs` algorithm) for Z(ω)
//!   of chain- and beam-like models. faer 0.24 has no banded solver and its sparse LU carries a
//!   per-call cost far above a tridiagonal elimination, so this is the one hand-written
//!   factorisation in the crate; it is tested against faer's dense LU (tests below).
//! - [`sym_generalized_eigen`]: K φ = λ M φ for symmetric K and positive-definite M.
//! - [`lanes`]: banded and small dense eliminations of eight systems at once (one per SIMD
//!   lane), for FRF grids and spring variants.
//! - [`rational`]: multilinear (rational-form) sums over SIMD lanes for the variants engine.
//!
//! Explicit SIMD (`pulp`) lives only in this module.

pub mod lanes;
pub mod rational;

use crate::error::{Error, Result};
use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::lu::partial_pivoting::{factor, solve};
use faer::reborrow::{Reborrow, ReborrowMut};
use faer::{Mat, MatMut, MatRef, Par, Side};
use num_complex::Complex64;

/// Relative pivot size below which Z(ω) is treated as singular. faer's partial-pivot LU does not
/// report singularity, so the diagonal of U is checked here.
pub const SINGULAR_PIVOT_RATIO: f64 = 1e-13;

/// A reusable LU workspace for n × n complex systems with `nrhs` right-hand sides.
pub struct ComplexLu {
    n: usize,
    nrhs: usize,
    perm: Vec<usize>,
    perm_inv: Vec<usize>,
    mem: MemBuffer,
}

impl ComplexLu {
    /// Allocate scratch for an n × n system with `nrhs` right-hand sides.
    pub fn new(n: usize, nrhs: usize) -> Self {
        let req = factor::lu_in_place_scratch::<usize, Complex64>(n, n, Par::Seq, Default::default())
            .or(solve::solve_in_place_scratch::<usize, Complex64>(n, nrhs.max(1), Par::Seq));
        ComplexLu { n, nrhs, perm: vec![0; n], perm_inv: vec![0; n], mem: MemBuffer::new(req) }
    }

    /// Solve A X = B in place: `a` (column-major n × n) is overwritten by its factors, `b`
    /// (column-major n × nrhs) by the solution. Returns `Err(ratio)` with the smallest relative
    /// pivot when A is numerically singular (b is then left unspecified).
    pub fn solve_in_place(
        &mut self,
        a: &mut [Complex64],
        b: &mut [Complex64],
    ) -> std::result::Result<(), f64> {
        let (n, nrhs) = (self.n, self.nrhs);
        debug_assert_eq!(a.len(), n * n);
        debug_assert_eq!(b.len(), n * nrhs);
        if n == 0 {
            return Ok(());
        }
        let mut am = MatMut::from_column_major_slice_mut(a, n, n);
        let stack = MemStack::new(&mut self.mem);
        let (_, perm) = factor::lu_in_place(
            am.rb_mut(),
            &mut self.perm,
            &mut self.perm_inv,
            Par::Seq,
            stack,
            Default::default(),
        );
        // Squared moduli: no hypot per pivot.
        let (mut lo, mut hi) = (f64::INFINITY, 0.0f64);
        for i in 0..n {
            let d = am[(i, i)].norm_sqr();
            lo = lo.min(d);
            hi = hi.max(d);
        }
        pivot_ratio_check(lo, hi)?;
        let ar = am.rb();
        let bm = MatMut::from_column_major_slice_mut(b, n, nrhs);
        let stack = MemStack::new(&mut self.mem);
        solve::solve_in_place(ar, ar, perm, bm, Par::Seq, stack);
        Ok(())
    }
}

/// `Ok` when sqrt(lo/hi) of squared pivot moduli exceeds [`SINGULAR_PIVOT_RATIO`], else
/// `Err(ratio)`.
fn pivot_ratio_check(lo_sq: f64, hi_sq: f64) -> std::result::Result<(), f64> {
    let ratio = if hi_sq > 0.0 { (lo_sq / hi_sq).sqrt() } else { 0.0 };
    if hi_sq > 0.0 && lo_sq.is_finite() && ratio > SINGULAR_PIVOT_RATIO { Ok(()) } else { Err(ratio) }
}

/// Solve a small dense k × k complex system A X = B in place by Gaussian elimination with
/// partial pivoting (|re| + |im| pivot choice, as LAPACK's `izamax`): `a` column-major k × k is
/// overwritten, `b` column-major k × nrhs receives X. For the handful-sized capacitance systems
/// of [`crate::frf::variants`], where a general LU's set-up costs more than the arithmetic.
/// Returns `Err(ratio)` like [`ComplexLu::solve_in_place`] when A is numerically singular.
pub fn solve_small_in_place(
    a: &mut [Complex64],
    k: usize,
    b: &mut [Complex64],
    nrhs: usize,
) -> std::result::Result<(), f64> {
    if a.len() != k * k || b.len() != k * nrhs {
        return Err(0.0);
    }
    let cabs1 = |z: Complex64| z.re.abs() + z.im.abs();
    let (mut lo, mut hi) = (f64::INFINITY, 0.0f64);
    for j in 0..k {
        let mut p = j;
        for i in j + 1..k {
            if cabs1(a[i + j * k]) > cabs1(a[p + j * k]) {
                p = i;
            }
        }
        if p != j {
            for c in j..k {
                a.swap(j + c * k, p + c * k);
            }
            for c in 0..nrhs {
                b.swap(j + c * k, p + c * k);
            }
        }
        let d = a[j + j * k];
        let dn = d.norm_sqr();
        lo = lo.min(dn);
        hi = hi.max(dn);
        if dn == 0.0 {
            return Err(0.0);
        }
        let inv = d.inv();
        for i in j + 1..k {
            let l = a[i + j * k] * inv;
            if l == Complex64::default() {
                continue;
            }
            for c in j + 1..k {
                let u = a[j + c * k];
                a[i + c * k] -= l * u;
            }
            for c in 0..nrhs {
                let u = b[j + c * k];
                b[i + c * k] -= l * u;
            }
        }
    }
    pivot_ratio_check(lo, hi)?;
    for c in 0..nrhs {
        for j in (0..k).rev() {
            let mut x = b[j + c * k];
            for q in j + 1..k {
                x -= a[j + q * k] * b[q + c * k];
            }
            b[j + c * k] = x / a[j + j * k];
        }
    }
    Ok(())
}

/// A banded partial-pivot LU for n × n complex systems with `kl` sub- and `ku` super-diagonals.
///
/// Storage is LAPACK's band layout, column-major with leading dimension
/// [`BandLu::ldab`] = 2·kl + ku + 1: A(i, j) lives at `ab[kl + ku + i − j + j·ldab]` for
/// max(0, j − ku) ≤ i ≤ min(n − 1, j + kl); the top `kl` rows hold the fill-in that row
/// interchanges create. The algorithm is the unblocked `gbtf2` factorisation and `gbtrs` solve
/// (Anderson et al., LAPACK Users' Guide, 3rd ed., SIAM 1999, §5.3.2); cost O(n·kl·(kl + ku)).
/// With kl = ku = n − 1 it is an ordinary dense partial-pivot LU, which [`crate::frf::variants`]
/// uses for its k × k capacitance systems (k = number of replaced springs, a handful).
#[derive(Debug, Clone)]
pub struct BandLu {
    n: usize,
    kl: usize,
    ku: usize,
    ipiv: Vec<usize>,
    inv_diag: Vec<Complex64>,
}

impl BandLu {
    /// Workspace for an n × n system with `kl` sub- and `ku` super-diagonals.
    pub fn new(n: usize, kl: usize, ku: usize) -> Self {
        BandLu { n, kl, ku, ipiv: vec![0; n], inv_diag: vec![Complex64::default(); n] }
    }

    /// Leading dimension of the band storage, 2·kl + ku + 1.
    pub fn ldab(&self) -> usize {
        2 * self.kl + self.ku + 1
    }

    /// Length of the band storage, ldab · n.
    pub fn storage_len(&self) -> usize {
        self.ldab() * self.n
    }

    /// Position of A(i, j) in the band storage (caller keeps (i, j) inside the band).
    #[inline]
    pub fn index(&self, i: usize, j: usize) -> usize {
        self.kl + self.ku + i - j + j * self.ldab()
    }

    /// Factor `ab` in place (band storage, see the type docs; the fill-in rows are cleared
    /// here). Returns `Err(ratio)` with the smallest relative pivot when A is numerically
    /// singular (see [`SINGULAR_PIVOT_RATIO`]).
    pub fn factor_in_place(&mut self, ab: &mut [Complex64]) -> std::result::Result<(), f64> {
        let (n, kl, ku) = (self.n, self.kl, self.ku);
        let ld = self.ldab();
        if ab.len() != ld * n {
            return Err(0.0);
        }
        if n == 0 {
            return Ok(());
        }
        let kv = kl + ku;
        for j in 0..n {
            ab[j * ld..j * ld + kl].iter_mut().for_each(|x| *x = Complex64::default());
        }
        let cabs1 = |z: Complex64| z.re.abs() + z.im.abs();
        let (mut lo, mut hi) = (f64::INFINITY, 0.0f64);
        let mut ju = 0usize;
        for j in 0..n {
            let km = kl.min(n - 1 - j);
            let col = j * ld + kv;
            let mut jp = 0;
            let mut best = cabs1(ab[col]);
            for p in 1..=km {
                let v = cabs1(ab[col + p]);
                if v > best {
                    best = v;
                    jp = p;
                }
            }
            self.ipiv[j] = j + jp;
            let pivot = ab[col + jp];
            let d = pivot.norm_sqr();
            lo = lo.min(d);
            hi = hi.max(d);
            if d == 0.0 {
                // Exactly singular; reported below (the remaining columns are left as they are).
                return Err(0.0);
            }
            ju = ju.max((j + ku + jp).min(n - 1));
            if jp != 0 {
                for c in j..=ju {
                    let base = c * ld + kv - c;
                    ab.swap(base + j, base + j + jp);
                }
            }
            let inv = 1.0 / pivot;
            self.inv_diag[j] = inv;
            if km > 0 {
                for p in 1..=km {
                    ab[col + p] *= inv;
                }
                for c in j + 1..=ju {
                    let base = c * ld + kv - c;
                    let a = ab[base + j];
                    if a != Complex64::default() {
                        for p in 1..=km {
                            let l = ab[col + p];
                            ab[base + j + p] -= l * a;
                        }
                    }
                }
            }
        }
        pivot_ratio_check(lo, hi)
    }

    /// Overwrite `b` (column-major n × nrhs) with A⁻¹ b, using factors from
    /// [`BandLu::factor_in_place`] in `ab`.
    pub fn solve_in_place(&self, ab: &[Complex64], b: &mut [Complex64], nrhs: usize) {
        let (n, kl) = (self.n, self.kl);
        let ld = self.ldab();
        let kv = self.kl + self.ku;
        debug_assert_eq!(b.len(), n * nrhs);
        for r in 0..nrhs {
            let x = &mut b[r * n..(r + 1) * n];
            if kl > 0 {
                for j in 0..n.saturating_sub(1) {
                    let lm = kl.min(n - 1 - j);
                    let l = self.ipiv[j];
                    if l != j {
                        x.swap(l, j);
                    }
                    let xj = x[j];
                    let col = j * ld + kv;
                    for p in 1..=lm {
                        x[j + p] -= ab[col + p] * xj;
                    }
                }
            }
            for j in (0..n).rev() {
                let xj = x[j] * self.inv_diag[j];
                x[j] = xj;
                let i0 = j.saturating_sub(kv);
                let base = j * ld + kv - j;
                for i in i0..j {
                    x[i] -= ab[base + i] * xj;
                }
            }
        }
    }
}

/// A real partial-pivot LU factorisation kept for repeated solves with the same matrix (time
/// stepping: the effective stiffness of an implicit integrator is factored once).
pub struct RealLu {
    n: usize,
    lu: Vec<f64>,
    perm: Vec<usize>,
    perm_inv: Vec<usize>,
    mem: MemBuffer,
}

impl RealLu {
    /// Factor the column-major n × n matrix `a`. Returns `Err(ratio)` with the smallest relative
    /// pivot when `a` is numerically singular (see [`SINGULAR_PIVOT_RATIO`]).
    pub fn factor(a: &[f64], n: usize) -> std::result::Result<Self, f64> {
        if a.len() != n * n {
            return Err(0.0);
        }
        let req = factor::lu_in_place_scratch::<usize, f64>(n, n, Par::Seq, Default::default())
            .or(solve::solve_in_place_scratch::<usize, f64>(n, 1, Par::Seq));
        let mut s =
            RealLu { n, lu: a.to_vec(), perm: vec![0; n], perm_inv: vec![0; n], mem: MemBuffer::new(req) };
        if n == 0 {
            return Ok(s);
        }
        let mut am = MatMut::from_column_major_slice_mut(&mut s.lu, n, n);
        let stack = MemStack::new(&mut s.mem);
        factor::lu_in_place(am.rb_mut(), &mut s.perm, &mut s.perm_inv, Par::Seq, stack, Default::default());
        let (mut lo, mut hi) = (f64::INFINITY, 0.0f64);
        for i in 0..n {
            let d = am[(i, i)].abs();
            lo = lo.min(d);
            hi = hi.max(d);
        }
        if hi > 0.0 && lo.is_finite() && lo / hi > SINGULAR_PIVOT_RATIO {
            Ok(s)
        } else {
            Err(if hi > 0.0 { lo / hi } else { 0.0 })
        }
    }

    /// Overwrite `b` (length n) with the solution of A x = b.
    pub fn solve_in_place(&mut self, b: &mut [f64]) -> Result<()> {
        let n = self.n;
        if b.len() != n {
            return Err(Error::shape("right-hand side of a real LU solve", n, b.len()));
        }
        if n == 0 {
            return Ok(());
        }
        let lu = MatRef::from_column_major_slice(&self.lu, n, n);
        let perm = faer::perm::PermRef::new_checked(&self.perm, &self.perm_inv, n);
        let bm = MatMut::from_column_major_slice_mut(b, n, 1);
        let stack = MemStack::new(&mut self.mem);
        solve::solve_in_place(lu, lu, perm, bm, Par::Seq, stack);
        Ok(())
    }
}

/// Eigenpairs of K φ = λ M φ, λ ascending, φ mass-normalised (Φᵀ M Φ = I).
///
/// `k` and `m` are column-major n × n and symmetric. M is factored by Cholesky (M = L Lᵀ) and
/// the standard symmetric problem L⁻¹ K L⁻ᵀ y = λ y is solved; φ = L⁻ᵀ y.
/// Returns (eigenvalues, column-major eigenvectors).
pub fn sym_generalized_eigen(k: &[f64], m: &[f64], n: usize) -> Result<(Vec<f64>, Vec<f64>)> {
    let km = MatRef::from_column_major_slice(k, n, n);
    let mm = MatRef::from_column_major_slice(m, n, n);
    let llt = mm.llt(Side::Lower).map_err(|e| Error::NotPositiveDefinite {
        matrix: "mass".into(),
        reason: format!("Cholesky factorisation failed ({e:?}): a free DOF without mass or inertia?"),
    })?;
    let l = llt.L();
    // X = L⁻¹ K, then A = L⁻¹ Xᵀ = L⁻¹ K L⁻ᵀ.
    let mut x: Mat<f64> = km.to_owned();
    l.solve_lower_triangular_in_place(x.as_mut());
    let mut a: Mat<f64> = x.transpose().to_owned();
    l.solve_lower_triangular_in_place(a.as_mut());
    // Symmetrise against round-off.
    let a = Mat::<f64>::from_fn(n, n, |i, j| 0.5 * (a[(i, j)] + a[(j, i)]));
    let evd = a.self_adjoint_eigen(Side::Lower).map_err(|e| Error::NoConvergence {
        what: "symmetric eigen solver".into(),
        reason: format!("{e:?}"),
    })?;
    let s = evd.S().column_vector();
    let vals: Vec<f64> = (0..n).map(|i| s[i]).collect();
    let mut phi: Mat<f64> = evd.U().to_owned();
    l.transpose().solve_upper_triangular_in_place(phi.as_mut());
    let mut vecs = vec![0.0; n * n];
    for j in 0..n {
        for i in 0..n {
            vecs[i + j * n] = phi[(i, j)];
        }
    }
    Ok((vals, vecs))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lu_solves_and_flags_singular() {
        // [[2, 1], [1, 3]] x = [3, 4] → x = [1, 1]
        let mut a: Vec<Complex64> = [2.0, 1.0, 1.0, 3.0].iter().map(|&v| Complex64::new(v, 0.0)).collect();
        let mut b = vec![Complex64::new(3.0, 0.0), Complex64::new(4.0, 0.0)];
        let mut lu = ComplexLu::new(2, 1);
        lu.solve_in_place(&mut a, &mut b).unwrap();
        assert!((b[0] - 1.0).norm() < 1e-14 && (b[1] - 1.0).norm() < 1e-14);
        let mut a: Vec<Complex64> = [1.0, 2.0, 2.0, 4.0].iter().map(|&v| Complex64::new(v, 0.0)).collect();
        assert!(lu.solve_in_place(&mut a, &mut b).is_err());
    }

    /// Dense column-major A, filled inside a (kl, ku) band with a seeded pseudo-random pattern.
    fn banded_case(n: usize, kl: usize, ku: usize, seed: u64) -> Vec<Complex64> {
        let mut s = seed;
        let mut next = || {
            s = s.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
            ((s >> 11) as f64 / (1u64 << 53) as f64) - 0.5
        };
        let mut a = vec![Complex64::default(); n * n];
        for j in 0..n {
            for i in j.saturating_sub(ku)..(j + kl + 1).min(n) {
                // Weak diagonal so that partial pivoting actually swaps rows.
                let scale = if i == j { 0.05 } else { 1.0 };
                a[i + j * n] = Complex64::new(next(), next()) * scale;
            }
        }
        a
    }

    #[test]
    fn band_lu_matches_faer_dense_lu() {
        // Oracle: faer's dense partial-pivot LU on the same matrix.
        for &(n, kl, ku) in
            &[(1, 0, 0), (5, 1, 1), (12, 1, 1), (30, 2, 3), (40, 11, 11), (7, 6, 6), (9, 0, 2)]
        {
            let a = banded_case(n, kl, ku, 7 + n as u64);
            let nrhs = 3;
            let b0: Vec<Complex64> =
                (0..n * nrhs).map(|k| Complex64::new((k as f64).sin(), (k as f64 * 0.3).cos())).collect();
            let mut ad = a.clone();
            let mut xd = b0.clone();
            ComplexLu::new(n, nrhs).solve_in_place(&mut ad, &mut xd).unwrap();
            let mut lu = BandLu::new(n, kl, ku);
            let mut ab = vec![Complex64::new(f64::NAN, 0.0); lu.storage_len()];
            for j in 0..n {
                for i in j.saturating_sub(ku)..(j + kl + 1).min(n) {
                    ab[lu.index(i, j)] = a[i + j * n];
                }
            }
            // Entries outside the band but inside the storage must not matter: zero them as a
            // caller does (the fill-in rows are cleared by the factorisation itself).
            for j in 0..n {
                for r in kl..lu.ldab() {
                    let i = (r + j) as isize - (kl + ku) as isize;
                    if i < 0 || i as usize >= n {
                        ab[r + j * lu.ldab()] = Complex64::default();
                    }
                }
            }
            lu.factor_in_place(&mut ab).unwrap();
            let mut xb = b0.clone();
            lu.solve_in_place(&ab, &mut xb, nrhs);
            let scale = xd.iter().map(|x| x.norm()).fold(0.0, f64::max);
            for (p, q) in xb.iter().zip(&xd) {
                assert!((p - q).norm() <= 1e-12 * scale, "n={n} kl={kl} ku={ku}: {p} vs {q}");
            }
        }
    }

    #[test]
    fn small_solve_matches_faer_dense_lu() {
        // Oracle: faer's dense partial-pivot LU on the same matrix (weak diagonal forces swaps).
        for &k in &[1usize, 2, 3, 5, 8] {
            let a = banded_case(k, k.saturating_sub(1), k.saturating_sub(1), 3 + k as u64);
            let nrhs = 2;
            let b0: Vec<Complex64> =
                (0..k * nrhs).map(|q| Complex64::new((q as f64).cos(), (q as f64 * 0.7).sin())).collect();
            let (mut ad, mut xd) = (a.clone(), b0.clone());
            ComplexLu::new(k, nrhs).solve_in_place(&mut ad, &mut xd).unwrap();
            let (mut asm, mut xs) = (a.clone(), b0.clone());
            solve_small_in_place(&mut asm, k, &mut xs, nrhs).unwrap();
            let scale = xd.iter().map(|x| x.norm()).fold(0.0, f64::max);
            for (p, q) in xs.iter().zip(&xd) {
                assert!((p - q).norm() <= 1e-12 * scale, "k={k}: {p} vs {q}");
            }
        }
        let mut sing: Vec<Complex64> = [1.0, 2.0, 2.0, 4.0].iter().map(|&v| Complex64::new(v, 0.0)).collect();
        let mut b = vec![Complex64::new(1.0, 0.0); 2];
        assert!(solve_small_in_place(&mut sing, 2, &mut b, 1).is_err());
        assert!(solve_small_in_place(&mut sing, 3, &mut b, 1).is_err());
    }

    #[test]
    fn band_lu_flags_singular() {
        // Tridiagonal with a zero row: exactly singular.
        let mut lu = BandLu::new(3, 1, 1);
        let mut ab = vec![Complex64::default(); lu.storage_len()];
        ab[lu.index(0, 0)] = Complex64::new(1.0, 0.0);
        ab[lu.index(0, 1)] = Complex64::new(2.0, 0.0);
        ab[lu.index(2, 2)] = Complex64::new(1.0, 0.0);
        assert!(lu.factor_in_place(&mut ab).is_err());
    }

    #[test]
    fn real_lu_solves_and_flags_singular() {
        // [[4, 1], [2, 3]] x = [6, 8] → x = [1, 2] (column-major storage).
        let mut lu = RealLu::factor(&[4.0, 2.0, 1.0, 3.0], 2).unwrap();
        let mut b = vec![6.0, 8.0];
        lu.solve_in_place(&mut b).unwrap();
        assert!((b[0] - 1.0).abs() < 1e-14 && (b[1] - 2.0).abs() < 1e-14);
        // reusable: a second right-hand side with the same factors
        let mut b = vec![5.0, 5.0];
        lu.solve_in_place(&mut b).unwrap();
        assert!((b[0] - 1.0).abs() < 1e-14 && (b[1] - 1.0).abs() < 1e-14);
        assert!(lu.solve_in_place(&mut [1.0]).is_err());
        assert!(RealLu::factor(&[1.0, 2.0, 2.0, 4.0], 2).is_err());
    }

    #[test]
    fn generalized_eigen_two_dof() {
        // K = [[2k, -k], [-k, k]], M = I·m: λ = (k/m)(3 ∓ √5)/2 (two-mass chain, textbook).
        let (kk, mm) = (100.0, 2.0);
        let k = vec![2.0 * kk, -kk, -kk, kk];
        let m = vec![mm, 0.0, 0.0, mm];
        let (l, v) = sym_generalized_eigen(&k, &m, 2).unwrap();
        let s5 = 5f64.sqrt();
        assert!((l[0] - kk / mm * (3.0 - s5) / 2.0).abs() < 1e-10);
        assert!((l[1] - kk / mm * (3.0 + s5) / 2.0).abs() < 1e-10);
        // mass-normalised
        let n0 = mm * (v[0] * v[0] + v[1] * v[1]);
        assert!((n0 - 1.0).abs() < 1e-12);
        assert!(sym_generalized_eigen(&k, &[1.0, 0.0, 0.0, 0.0], 2).is_err());
    }
}

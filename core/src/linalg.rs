//! The only module that touches `faer`. Everything else passes plain column-major slices.
//!
//! - [`ComplexLu`]: a reusable partial-pivot LU workspace for Z(ω) x = b (allocates once).
//! - [`RealLu`]: a real LU factored once and solved many times (implicit time stepping).
//! - [`sym_generalized_eigen`]: K φ = λ M φ for symmetric K and positive-definite M.

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
        let (mut lo, mut hi) = (f64::INFINITY, 0.0f64);
        for i in 0..n {
            let d = am[(i, i)].norm();
            lo = lo.min(d);
            hi = hi.max(d);
        }
        let ok = hi > 0.0 && lo.is_finite() && lo / hi > SINGULAR_PIVOT_RATIO;
        if !ok {
            return Err(if hi > 0.0 { lo / hi } else { 0.0 });
        }
        let ar = am.rb();
        let bm = MatMut::from_column_major_slice_mut(b, n, nrhs);
        let stack = MemStack::new(&mut self.mem);
        solve::solve_in_place(ar, ar, perm, bm, Par::Seq, stack);
        Ok(())
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

//! Matrix pencil estimation of a sum of complex exponentials y[m] = Σ R_i z_i^m.
//!
//! Y. Hua and T. K. Sarkar, "Matrix pencil method for estimating parameters of exponentially
//! damped/undamped sinusoids in noise", IEEE Trans. ASSP 38(5), 814–824, 1990 (from memory:
//! verify). Steps: Hankel matrix Y[(m, l)] = y[m + l] of size (N − L) × (L + 1) with pencil
//! parameter L = N/3 (inside the N/3..N/2 range recommended for noise); thin SVD Y = U S Vᴴ;
//! keep the M dominant left singular vectors U′ (signal subspace); the shift invariance
//! U′₂ = U′₁ Φ gives the poles z_i as the eigenvalues of Φ = U′₁⁺ U′₂ (least squares by QR);
//! residues R_i by least squares on the Vandermonde system.
//!
//! Model order rule (ours): among the singular values above 1e-8 s₁, the largest M ≤
//! `max_order` with s_M / s_{M+1} ≥ `gap`; if there is none the fit fails (no clear signal
//! subspace: too short or too noisy a window). Noise
//! singular values fall off slowly (consecutive ratios near 1), so a gap marks the end of the
//! signal subspace. M is at most (L + 1)/4.

use crate::Complex64;
use crate::error::{Error, Result};
use faer::Mat;
use faer::prelude::SolveLstsq;

/// Result of a matrix pencil fit.
pub(crate) struct PencilFit {
    /// Poles z_i (per decimated sample) and residues R_i at m = 0.
    pub poles: Vec<(Complex64, Complex64)>,
    /// Singular values of the Hankel matrix, descending.
    pub singular_values: Vec<f64>,
}

pub(crate) fn matrix_pencil(y: &[Complex64], max_order: usize, gap: f64) -> Result<PencilFit> {
    let n = y.len();
    if n < 12 {
        return Err(Error::invalid("matrix pencil", format!("{n} samples in the fit window, need >= 12")));
    }
    let l = n / 3;
    let rows = n - l;
    let cols = l + 1;
    let h = Mat::<Complex64>::from_fn(rows, cols, |i, j| y[i + j]);
    let svd = h
        .thin_svd()
        .map_err(|e| Error::NoConvergence { what: "matrix pencil SVD".into(), reason: format!("{e:?}") })?;
    let s: Vec<f64> = (0..cols.min(rows)).map(|i| svd.S()[i].re).collect();
    let s0 = s.first().copied().unwrap_or(0.0);
    if s0 <= 0.0 || !s0.is_finite() {
        return Err(Error::invalid("matrix pencil", "signal is zero in the fit window"));
    }
    // At most a quarter of the columns: a model order near L fits noise.
    let k_max = max_order.max(1).min((cols / 4).max(1));
    let mut m_gap = None;
    for m in 1..=k_max {
        if s[m - 1] < 1e-8 * s0 {
            break;
        }
        let ratio = if s[m] > 0.0 { s[m - 1] / s[m] } else { f64::INFINITY };
        if ratio >= gap {
            m_gap = Some(m);
        }
    }
    let Some(m_order) = m_gap else {
        return Err(Error::invalid(
            "matrix pencil",
            format!("no gap of {gap} in the first {} singular values: no clear signal subspace", k_max + 1),
        ));
    };
    let u = svd.U();
    let u1 = Mat::<Complex64>::from_fn(rows - 1, m_order, |i, j| u[(i, j)]);
    let u2 = Mat::<Complex64>::from_fn(rows - 1, m_order, |i, j| u[(i + 1, j)]);
    let phi = u1.qr().solve_lstsq(&u2);
    let z = phi.eigenvalues().map_err(|e| Error::NoConvergence {
        what: "matrix pencil eigenvalues".into(),
        reason: format!("{e:?}"),
    })?;
    // Residues: least squares on V[m, i] = z_i^m.
    let v = Mat::<Complex64>::from_fn(n, m_order, |m, i| z[i].powu(m as u32));
    let rhs = Mat::<Complex64>::from_fn(n, 1, |m, _| y[m]);
    let r = v.qr().solve_lstsq(&rhs);
    let poles = (0..m_order).map(|i| (z[i], r[(i, 0)])).collect();
    Ok(PencilFit { poles, singular_values: s })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn recovers_two_exponentials_exactly() {
        // Noise-free sum of two damped complex exponentials: poles and residues back to ~1e-9.
        let z1 = Complex64::from_polar(0.99, 0.3);
        let z2 = Complex64::from_polar(0.97, -0.5);
        let r1 = Complex64::new(1.0, 0.5);
        let r2 = Complex64::new(-0.3, 0.2);
        let y: Vec<Complex64> = (0..90).map(|m| r1 * z1.powu(m) + r2 * z2.powu(m)).collect();
        let fit = matrix_pencil(&y, 10, 4.0).unwrap();
        assert_eq!(fit.poles.len(), 2);
        for (z, r) in [(z1, r1), (z2, r2)] {
            let best = fit.poles.iter().min_by(|a, b| (a.0 - z).norm().total_cmp(&(b.0 - z).norm())).unwrap();
            assert!((best.0 - z).norm() < 1e-9 && (best.1 - r).norm() < 1e-8);
        }
    }
}

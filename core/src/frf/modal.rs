//! The modal-superposition path of an [`FrfPlan`](crate::frf::FrfPlan), taken for small
//! proportionally damped models instead of a solve per frequency. (Mode shapes and natural
//! frequencies as results are [`crate::modes`].)

use crate::error::{Error, Result};
use crate::linalg::lanes::{CLane, LANES, Lane, LaneMask, pad_block, with_best_simd};
use crate::model::{Input, Model};
use num_complex::Complex64;
use std::f64::consts::PI;

/// Modal superposition for proportionally damped models: K* = K′(1 + iη) with one loss factor
/// η, C = αM + βK′, and no frequency-dependent terms. With K′φ = λMφ, φᵀMφ = I, every FRF is
/// Σ_r (c·φ_r)(φ_rᵀb(ω)) / (λ_r(1 + iη) + iω(α + βλ_r) − ω²), exact with all n modes
/// (Clough & Penzien, Dynamics of Structures, 2nd ed., 1993, §12-3 and §13-2).
#[derive(Debug, Clone)]
pub(super) struct ModalLayout {
    eta: f64,
    alpha: f64,
    beta: f64,
    lambda: Vec<f64>,
    /// Output rows times mode shapes: `rows[o][r]`.
    rows: Vec<Vec<f64>>,
    /// Per input and mode: φᵀb(ω) = q0 + iω·q1 − ω²·q2 (loads: q0 only).
    inputs: Vec<Vec<(Complex64, f64, f64)>>,
}

/// Largest model the modal path takes: its eigen-solution (≈ 10n³ flops, once per plan) must
/// not outweigh the direct path's per-frequency savings on a typical grid.
const MODAL_DOFS_MAX: usize = 64;

impl ModalLayout {
    /// The modal path, when `model` is proportionally damped to round-off (relative 1e-12 in the
    /// Frobenius norm) and small enough.
    pub(super) fn try_new(model: &Model, inputs: &[Input], rows: &[f64]) -> Option<ModalLayout> {
        let n = model.dof_count();
        if n == 0 || n > MODAL_DOFS_MAX || !model.terms.is_empty() {
            return None;
        }
        let dot = |a: &[f64], b: &[f64]| a.iter().zip(b).map(|(x, y)| x * y).sum::<f64>();
        let kr: Vec<f64> = model.k_ff.iter().map(|z| z.re).collect();
        let ki: Vec<f64> = model.k_ff.iter().map(|z| z.im).collect();
        let kk = dot(&kr, &kr);
        if kk == 0.0 {
            return None;
        }
        let eta = dot(&ki, &kr) / kk;
        let tol = 1e-12;
        let resid = |a: &[f64], f: &dyn Fn(usize) -> f64| {
            a.iter().enumerate().map(|(i, x)| (x - f(i)).powi(2)).sum::<f64>()
        };
        if resid(&ki, &|i| eta * kr[i]) > tol * tol * kk {
            return None;
        }
        // C ≈ αM + βK′ by least squares on the Frobenius inner product.
        let (m, c) = (&model.m_ff, &model.c_ff);
        let (mm, mk, cm, ck) = (dot(m, m), dot(m, &kr), dot(c, m), dot(c, &kr));
        let det = mm * kk - mk * mk;
        let (alpha, beta) = if det.abs() > 1e-12 * mm * kk {
            ((cm * kk - ck * mk) / det, (ck * mm - cm * mk) / det)
        } else {
            // M ∥ K′: all of C on M.
            (cm / mm, 0.0)
        };
        let cc = dot(c, c);
        if resid(c, &|i| alpha * m[i] + beta * kr[i]) > tol * tol * cc.max(f64::MIN_POSITIVE) && cc > 0.0 {
            return None;
        }
        let (lambda, phi) = crate::linalg::sym_generalized_eigen(&kr, m, n).ok()?;
        let mode = |r: usize| &phi[r * n..(r + 1) * n];
        let rows = rows.chunks_exact(n).map(|row| (0..n).map(|r| dot(row, mode(r))).collect()).collect();
        let inputs = inputs
            .iter()
            .map(|inp| match inp {
                Input::Load(v) => (0..n).map(|r| (Complex64::new(dot(v, mode(r)), 0.0), 0.0, 0.0)).collect(),
                Input::Ground(d) => {
                    // b = −(K*_fg + iωC_fg − ω²M_fg) e_d, its columns taken once per input.
                    let cols = d * n..(d + 1) * n;
                    let kre: Vec<f64> = model.k_fg[cols.clone()].iter().map(|z| z.re).collect();
                    let kim: Vec<f64> = model.k_fg[cols.clone()].iter().map(|z| z.im).collect();
                    let (c, m) = (&model.c_fg[cols.clone()], &model.m_fg[cols]);
                    (0..n)
                        .map(|r| {
                            (
                                -Complex64::new(dot(&kre, mode(r)), dot(&kim, mode(r))),
                                -dot(c, mode(r)),
                                -dot(m, mode(r)),
                            )
                        })
                        .collect()
                }
            })
            .collect();
        Some(ModalLayout { eta, alpha, beta, lambda, rows, inputs })
    }

    /// FRFs at up to [`LANES`] frequencies `f_hz` into `out` (per frequency n_out × n_in);
    /// call inside [`with_best_simd`]. Returns the lanes where a modal denominator is below
    /// [`crate::linalg::SINGULAR_PIVOT_RATIO`] of λ_r + ω² (Z numerically singular there, as the
    /// direct path's pivot test would report).
    #[inline(always)]
    fn evaluate_lanes(&self, f_hz: &[f64], acc: &mut [CLane], out: &mut [Complex64]) -> LaneMask {
        let mut w = pad_block(f_hz);
        let mut w2: Lane = [0.0; LANES];
        for l in 0..LANES {
            w[l] *= 2.0 * PI;
            w2[l] = w[l] * w[l];
        }
        let ni = self.inputs.len();
        let mut bad: LaneMask = 0;
        acc.iter_mut().for_each(|x| *x = CLane::ZERO);
        for (r, &lam) in self.lambda.iter().enumerate() {
            let mut den = CLane::ZERO;
            for l in 0..LANES {
                den.re[l] = lam - w2[l];
                den.im[l] = lam * self.eta + w[l] * (self.alpha + self.beta * lam);
            }
            let dn = den.norm_sqr();
            for l in 0..LANES {
                let scale = crate::linalg::SINGULAR_PIVOT_RATIO * (lam.abs() + w2[l]);
                // NaN compares false: a NaN denominator is flagged too.
                let ok = dn[l] > scale * scale;
                bad |= (!ok as LaneMask) << l;
            }
            let inv = den.inv();
            for (j, q) in self.inputs.iter().enumerate() {
                let (q0, q1, q2) = q[r];
                let mut qr = CLane::ZERO;
                for l in 0..LANES {
                    qr.re[l] = q0.re - w2[l] * q2;
                    qr.im[l] = q0.im + w[l] * q1;
                }
                let qr = qr * inv;
                for (o, row) in self.rows.iter().enumerate() {
                    acc[o * ni + j] = acc[o * ni + j] + qr.scale(row[r]);
                }
            }
        }
        let per = acc.len();
        for (l, o) in out.chunks_exact_mut(per).take(f_hz.len()).enumerate() {
            for (x, a) in o.iter_mut().zip(acc.iter()) {
                *x = a.get(l);
            }
        }
        bad
    }

    /// FRFs on `freq_hz` into `out` (n_freq × `per`, per frequency n_out × n_in row-major).
    /// Errors with [`Error::Singular`] at the first frequency where Z is numerically singular.
    pub(super) fn evaluate_into(&self, freq_hz: &[f64], per: usize, out: &mut [Complex64]) -> Result<()> {
        let mut acc = vec![CLane::ZERO; per];
        with_best_simd(
            #[inline(always)]
            || {
                for (o, f) in out.chunks_mut(LANES * per).zip(freq_hz.chunks(LANES)) {
                    let bad = self.evaluate_lanes(f, &mut acc, o);
                    if let Some(&fh) =
                        f.iter().enumerate().find(|(l, _)| bad & (1 << l) != 0).map(|(_, fh)| fh)
                    {
                        return Err(Error::Singular { freq_hz: fh });
                    }
                }
                Ok(())
            },
        )
    }
}

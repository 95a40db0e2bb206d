//! Modal parameters from a measured FRF (two-channel tap or shaker test, H1 or H2).
//!
//! Each band around one or a few peaks of |H| is fitted with a rational function of s = iω,
//! H(s) ≈ B(s)/A(s), A monic of degree 2m (m modes in the band), B of degree 2m (so modes
//! outside the band show as a smooth residual). The fit is linear least squares on
//! B(s) − H·A(s) = 0 (Levy 1959, "Complex-curve fitting", IRE Trans. Automatic Control), with the
//! Sanathanan–Koerner iteration (1963, IEEE Trans. Automatic Control) that reweights each bin by
//! 1/|A_prev(s)| so the minimised error tends to the true |B/A − H| (both from memory: verify).
//! s is scaled by the band's centre and H by its largest magnitude, so the columns are O(1).
//! Poles are the roots of A (companion-matrix eigenvalues); each pole p = −ζω_n + iω_n√(1−ζ²)
//! gives f_n = |p|/2π and ζ = −Re p/|p|; the residue r = B(p)/A′(p) (units of H times rad/s).
//!
//! [`frf_modes`] finds the peaks (local maxima of |H| over a ±3 % neighbourhood with at least
//! `min_peak_fraction` of the largest, among bins whose coherence is at least `min_coherence`),
//! puts a band of relative half-width `band_half_width` around each, merges overlapping bands
//! and fits each merged band with one mode per peak in it. Close modes therefore share a band
//! and are separated by the fit, as long as each shows as its own peak.

use crate::Complex64;
use crate::error::{Error, Result};
use faer::Mat;
use faer::prelude::SolveLstsq;
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// Options of [`frf_modes`].
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[non_exhaustive]
pub struct FrfModeOptions {
    /// Bins with a lower coherence are left out of peak search and fit (default 0.9).
    pub min_coherence: f64,
    /// A peak must reach this fraction of the largest |H| (default 0.01).
    pub min_peak_fraction: f64,
    /// Band around each peak: [f/(1 + b), f(1 + b)] (default 0.5). Wider bands merge
    /// neighbouring modes into one fit, which then models them exactly instead of as residuals.
    pub band_half_width: f64,
    /// A peak must stand this many times above the higher of the lowest |H| on its left and
    /// on its right within its band (default 1.5), so a flat, noisy stretch is not a mode.
    pub min_prominence: f64,
    /// Most modes fitted in one band (default 4).
    pub max_modes_per_band: usize,
    /// Sanathanan–Koerner reweighting steps (default 8).
    pub iterations: usize,
}

impl Default for FrfModeOptions {
    fn default() -> Self {
        Self {
            min_coherence: 0.9,
            min_peak_fraction: 0.01,
            band_half_width: 0.5,
            min_prominence: 1.5,
            max_modes_per_band: 4,
            iterations: 8,
        }
    }
}

/// One mode fitted from an FRF.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct FrfMode {
    /// Undamped natural frequency (Hz).
    pub frequency_hz: f64,
    /// Damping ratio ζ.
    pub damping_ratio: f64,
    /// Residue of H at the pole (units of H × rad/s).
    pub residue: Complex64,
    /// Band the mode was fitted in (Hz).
    pub band_hz: (f64, f64),
    /// RMS of (fit − H) over the band's bins divided by the band's largest |H|.
    pub fit_error: f64,
}

fn check_frf(freq_hz: &[f64], h: &[Complex64]) -> Result<()> {
    if freq_hz.len() != h.len() {
        return Err(Error::shape("FRF values vs frequencies", freq_hz.len(), h.len()));
    }
    if freq_hz.len() < 8 {
        return Err(Error::invalid("freq_hz", format!("{} points, need at least 8", freq_hz.len())));
    }
    for (i, w) in freq_hz.windows(2).enumerate() {
        if !(w[0] > 0.0 && w[1] > w[0] && w[1].is_finite()) {
            return Err(Error::InvalidGrid {
                name: "freq_hz".into(),
                reason: format!(
                    "must be positive, finite and strictly increasing (at index {i}: {} then {})",
                    w[0], w[1]
                ),
            });
        }
    }
    if let Some(i) = h.iter().position(|v| !(v.re.is_finite() && v.im.is_finite())) {
        return Err(Error::invalid("frf", format!("value {i} is {} (not finite)", h[i])));
    }
    Ok(())
}

/// Fit `n_modes` modes to the FRF bins inside `band_hz` (weights ≥ 0 per bin, e.g. 1 where the
/// coherence is good and 0 elsewhere; `None` = all 1). Poles outside the band or unstable are
/// dropped, so fewer than `n_modes` may come back.
pub fn fit_frf_band(
    freq_hz: &[f64],
    h: &[Complex64],
    weights: Option<&[f64]>,
    band_hz: (f64, f64),
    n_modes: usize,
    iterations: usize,
) -> Result<Vec<FrfMode>> {
    check_frf(freq_hz, h)?;
    if let Some(w) = weights {
        if w.len() != h.len() {
            return Err(Error::shape("weights vs frequencies", h.len(), w.len()));
        }
        if let Some(i) = w.iter().position(|v| !(v.is_finite() && *v >= 0.0)) {
            return Err(Error::invalid("weights", format!("weight {i} is {} (need finite, >= 0)", w[i])));
        }
    }
    let (lo, hi) = band_hz;
    if !(lo > 0.0 && hi > lo && hi.is_finite()) {
        return Err(Error::invalid("band_hz", format!("need 0 < low < high, got ({lo}, {hi})")));
    }
    if n_modes == 0 || n_modes > 8 {
        return Err(Error::invalid("n_modes", format!("must be 1..=8, got {n_modes}")));
    }
    let idx: Vec<usize> = (0..freq_hz.len())
        .filter(|&k| freq_hz[k] >= lo && freq_hz[k] <= hi && weights.is_none_or(|w| w[k] > 0.0))
        .collect();
    let na = 2 * n_modes; // a_0 … a_{2m−1}
    let nb = 2 * n_modes + 1; // b_0 … b_{2m}
    let n_unknown = na + nb;
    if idx.len() * 2 < 2 * n_unknown {
        return Err(Error::invalid(
            "band_hz",
            format!(
                "{} usable bins in {lo:.4}–{hi:.4} Hz; {n_modes} mode(s) need at least {n_unknown}",
                idx.len()
            ),
        ));
    }
    let w_c = 2.0 * PI * (lo * hi).sqrt();
    let h_scale = idx.iter().map(|&k| h[k].norm()).fold(0.0, f64::max);
    if h_scale <= 0.0 {
        return Err(Error::invalid("frf", format!("is zero in the band {lo:.4}–{hi:.4} Hz")));
    }
    let s: Vec<Complex64> = idx.iter().map(|&k| Complex64::new(0.0, 2.0 * PI * freq_hz[k] / w_c)).collect();
    let hn: Vec<Complex64> = idx.iter().map(|&k| h[k] / h_scale).collect();
    let wt: Vec<f64> = idx.iter().map(|&k| weights.map_or(1.0, |w| w[k]).sqrt()).collect();
    let mut sk = vec![1.0; idx.len()];
    let mut coef = vec![0.0; n_unknown];
    for _ in 0..=iterations.max(1) {
        let rows = 2 * idx.len();
        let mut m = Mat::<f64>::zeros(rows, n_unknown);
        let mut rhs = Mat::<f64>::zeros(rows, 1);
        for (r, (&sr, &hr)) in s.iter().zip(&hn).enumerate() {
            let g = wt[r] * sk[r];
            let mut p = Complex64::new(1.0, 0.0);
            for j in 0..=na {
                if j < nb {
                    m[(2 * r, j)] = g * p.re;
                    m[(2 * r + 1, j)] = g * p.im;
                }
                if j < na {
                    let v = -hr * p;
                    m[(2 * r, nb + j)] = g * v.re;
                    m[(2 * r + 1, nb + j)] = g * v.im;
                } else {
                    let v = hr * p; // H s^{2m} moves to the right-hand side
                    rhs[(2 * r, 0)] = g * v.re;
                    rhs[(2 * r + 1, 0)] = g * v.im;
                }
                p *= sr;
            }
        }
        let x = m.qr().solve_lstsq(&rhs);
        for (j, c) in coef.iter_mut().enumerate() {
            *c = x[(j, 0)];
        }
        if coef.iter().any(|c| !c.is_finite()) {
            return Err(Error::NoConvergence {
                what: "FRF rational fit".into(),
                reason: "least squares gave a non-finite coefficient".into(),
            });
        }
        for (r, &sr) in s.iter().enumerate() {
            let a = eval_monic(&coef[nb..], sr).norm();
            sk[r] = if a > 0.0 { 1.0 / a } else { 1.0 };
        }
    }
    let (b, a) = coef.split_at(nb);
    // Roots of the monic A: eigenvalues of its companion matrix.
    let comp = Mat::<Complex64>::from_fn(na, na, |i, j| {
        if i == 0 {
            Complex64::new(-a[na - 1 - j], 0.0)
        } else if i == j + 1 {
            Complex64::new(1.0, 0.0)
        } else {
            Complex64::new(0.0, 0.0)
        }
    });
    let roots = comp
        .eigenvalues()
        .map_err(|e| Error::NoConvergence { what: "FRF fit poles".into(), reason: format!("{e:?}") })?;
    // Fit error over the band.
    let mut err2 = 0.0;
    for (&sr, &hr) in s.iter().zip(&hn) {
        err2 += (eval_poly(b, sr) / eval_monic(a, sr) - hr).norm_sqr();
    }
    let fit_error = (err2 / s.len() as f64).sqrt();
    let mut modes: Vec<FrfMode> = roots
        .iter()
        .filter(|p| p.im > 0.0 && p.re < 0.0)
        .filter_map(|&pn| {
            let p = pn * w_c;
            let f = p.norm() / (2.0 * PI);
            if !(f >= lo && f <= hi) {
                return None;
            }
            let da = eval_monic_derivative(a, pn);
            let residue = eval_poly(b, pn) / da * h_scale * w_c;
            Some(FrfMode { frequency_hz: f, damping_ratio: -p.re / p.norm(), residue, band_hz, fit_error })
        })
        .collect();
    modes.sort_by(|x, y| x.frequency_hz.total_cmp(&y.frequency_hz));
    Ok(modes)
}

/// Σ c_j s^j.
fn eval_poly(c: &[f64], s: Complex64) -> Complex64 {
    c.iter().rev().fold(Complex64::new(0.0, 0.0), |acc, &v| acc * s + v)
}

/// s^n + Σ_{j<n} a_j s^j.
fn eval_monic(a: &[f64], s: Complex64) -> Complex64 {
    a.iter().rev().fold(Complex64::new(1.0, 0.0), |acc, &v| acc * s + v)
}

/// d/ds of [`eval_monic`].
fn eval_monic_derivative(a: &[f64], s: Complex64) -> Complex64 {
    let n = a.len();
    let mut d = Complex64::new(n as f64, 0.0);
    for j in (1..n).rev() {
        d = d * s + a[j] * j as f64;
    }
    d
}

/// Modes of a measured FRF: peak search, bands, and one rational fit per band (module docs).
/// `coherence` (same length, in [0, 1]) leaves out bins below `min_coherence`.
pub fn frf_modes(
    freq_hz: &[f64],
    h: &[Complex64],
    coherence: Option<&[f64]>,
    opts: &FrfModeOptions,
) -> Result<Vec<FrfMode>> {
    check_frf(freq_hz, h)?;
    if !(opts.min_coherence >= 0.0 && opts.min_coherence < 1.0) {
        return Err(Error::invalid(
            "min_coherence",
            format!("must be in [0, 1), got {}", opts.min_coherence),
        ));
    }
    if !(opts.min_peak_fraction > 0.0 && opts.min_peak_fraction < 1.0) {
        return Err(Error::invalid(
            "min_peak_fraction",
            format!("must be in (0, 1), got {}", opts.min_peak_fraction),
        ));
    }
    if !(opts.band_half_width > 0.0 && opts.band_half_width <= 2.0) {
        return Err(Error::invalid(
            "band_half_width",
            format!("must be in (0, 2], got {}", opts.band_half_width),
        ));
    }
    if !(opts.min_prominence >= 1.0 && opts.min_prominence.is_finite()) {
        return Err(Error::invalid("min_prominence", format!("must be >= 1, got {}", opts.min_prominence)));
    }
    if opts.max_modes_per_band == 0 || opts.max_modes_per_band > 8 {
        return Err(Error::invalid(
            "max_modes_per_band",
            format!("must be 1..=8, got {}", opts.max_modes_per_band),
        ));
    }
    let weights: Option<Vec<f64>> = match coherence {
        Some(c) => {
            if c.len() != h.len() {
                return Err(Error::shape("coherence vs frequencies", h.len(), c.len()));
            }
            if let Some(i) = c.iter().position(|v| !(v.is_finite() && (0.0..=1.0 + 1e-12).contains(v))) {
                return Err(Error::invalid("coherence", format!("value {i} is {} (need 0..=1)", c[i])));
            }
            Some(c.iter().map(|&v| if v >= opts.min_coherence { 1.0 } else { 0.0 }).collect())
        }
        None => None,
    };
    let usable = |k: usize| weights.as_ref().is_none_or(|w| w[k] > 0.0);
    let mag: Vec<f64> = h.iter().map(|v| v.norm()).collect();
    let top = (0..h.len()).filter(|&k| usable(k)).map(|k| mag[k]).fold(0.0, f64::max);
    if top <= 0.0 {
        return Err(Error::invalid(
            "frf",
            format!("no bin with coherence >= {} and a non-zero value", opts.min_coherence),
        ));
    }
    // Peaks: the largest usable |H| within ±3 % (at least ±2 bins), standing out of its band.
    let b = opts.band_half_width;
    let mut peaks = Vec::new();
    for k in 1..h.len().saturating_sub(1) {
        if !usable(k) || mag[k] < opts.min_peak_fraction * top {
            continue;
        }
        let (f_lo, f_hi) = (freq_hz[k] / 1.03, freq_hz[k] * 1.03);
        let near =
            |j: usize| j != k && (j + 2 >= k && j <= k + 2 || freq_hz[j] >= f_lo && freq_hz[j] <= f_hi);
        let is_max = (0..h.len())
            .filter(|&j| near(j) && usable(j))
            .all(|j| mag[j] < mag[k] || (mag[j] == mag[k] && j > k));
        if !is_max {
            continue;
        }
        let (b_lo, b_hi) = (freq_hz[k] / (1.0 + b), freq_hz[k] * (1.0 + b));
        let low = |range: &mut dyn Iterator<Item = usize>| {
            range
                .filter(|&j| usable(j) && freq_hz[j] >= b_lo && freq_hz[j] <= b_hi)
                .map(|j| mag[j])
                .reduce(f64::min)
        };
        let (Some(left), Some(right)) = (low(&mut (0..k)), low(&mut (k + 1..h.len()))) else { continue };
        if mag[k] >= opts.min_prominence * left.max(right) {
            peaks.push(freq_hz[k]);
        }
    }
    if peaks.is_empty() {
        return Err(Error::invalid("frf", "no resonance peak found among the usable bins"));
    }
    // Bands, merged where they overlap.
    let mut bands: Vec<((f64, f64), usize)> = Vec::new();
    for &f in &peaks {
        let (lo, hi) = (f / (1.0 + b), f * (1.0 + b));
        match bands.last_mut() {
            Some((band, n)) if lo <= band.1 && *n < opts.max_modes_per_band => {
                band.1 = hi;
                *n += 1;
            }
            _ => bands.push(((lo, hi), 1)),
        }
    }
    let mut out = Vec::new();
    for ((lo, hi), n) in bands {
        let band = (lo.max(freq_hz[0]), hi.min(freq_hz[freq_hz.len() - 1]));
        out.extend(fit_frf_band(freq_hz, h, weights.as_deref(), band, n, opts.iterations)?);
    }
    out.sort_by(|x, y| x.frequency_hz.total_cmp(&y.frequency_hz));
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Receptance of a sum of modes with residues: Σ r/(s − p) + conj(r)/(s − conj p).
    fn modal_frf(f: &[f64], modes: &[(f64, f64, Complex64)]) -> Vec<Complex64> {
        f.iter()
            .map(|&fk| {
                let s = Complex64::new(0.0, 2.0 * PI * fk);
                modes
                    .iter()
                    .map(|&(fn_, z, r)| {
                        let w = 2.0 * PI * fn_;
                        let p = Complex64::new(-z * w, w * (1.0 - z * z).sqrt());
                        r / (s - p) + r.conj() / (s - p.conj())
                    })
                    .sum()
            })
            .collect()
    }

    #[test]
    fn exact_two_close_modes_and_residues_come_back() {
        // Noise-free partial-fraction FRF (the modal form of any viscously damped structure):
        // two modes 5 % apart are separated, poles and residues to 1e-6.
        let f: Vec<f64> = (1..4000).map(|k| k as f64 * 0.01).collect();
        let truth = [(10.0, 0.01, Complex64::new(0.0, -2e-4)), (10.5, 0.02, Complex64::new(1e-5, -1e-4))];
        let h = modal_frf(&f, &truth);
        let modes = frf_modes(&f, &h, None, &FrfModeOptions::default()).unwrap();
        assert_eq!(modes.len(), 2, "{modes:?}");
        for (m, t) in modes.iter().zip(&truth) {
            assert!((m.frequency_hz / t.0 - 1.0).abs() < 1e-6, "{m:?}");
            assert!((m.damping_ratio / t.1 - 1.0).abs() < 1e-6, "{m:?}");
            assert!((m.residue - t.2).norm() < 1e-6 * t.2.norm(), "{m:?}");
            assert!(m.fit_error < 1e-6);
        }
    }

    #[test]
    fn bad_inputs_are_named() {
        let f: Vec<f64> = (1..100).map(f64::from).collect();
        let h = vec![Complex64::new(1.0, 0.0); 99];
        assert!(matches!(
            frf_modes(&f, &h[..50], None, &FrfModeOptions::default()),
            Err(Error::ShapeMismatch { .. })
        ));
        let mut g = f.clone();
        g.swap(3, 4);
        assert!(matches!(
            frf_modes(&g, &h, None, &FrfModeOptions::default()),
            Err(Error::InvalidGrid { .. })
        ));
        let mut hn = h.clone();
        hn[7] = Complex64::new(f64::NAN, 0.0);
        let e = frf_modes(&f, &hn, None, &FrfModeOptions::default()).unwrap_err();
        assert!(e.to_string().contains("value 7"), "{e}");
        let e = fit_frf_band(&f, &h, None, (10.0, 11.0), 2, 4).unwrap_err();
        assert!(e.to_string().contains("usable bins"), "{e}");
    }
}

//! The expected largest excursion of stationary Gaussian random motion over a duration.
//!
//! Davenport's peak factor: over a duration T the expected largest value of a zero-mean
//! stationary Gaussian process with standard deviation σ is g·σ with
//!
//!   g = √(2 ln νT) + γ / √(2 ln νT),   γ = 0.5772… (Euler's constant),
//!
//! ν the mean rate of up-crossings of the mean level, from the spectral moments
//! ν = √(m₂/m₀), m_k = ∫ f^k G(f) df (one-sided PSD G, f in Hz). Sources: A. G. Davenport,
//! "Note on the distribution of the largest value of a random function with application to gust
//! loading", Proc. Inst. Civ. Eng. 28 (1964) 187–196 (page numbers from memory); the crossing
//! rate is Rice's, S. O. Rice, "Mathematical analysis of random noise", Bell Syst. Tech. J. 23–24
//! (1944–45). The formula assumes crossings of high levels arrive as a Poisson stream, so it
//! suits many crossings (νT ≳ 10); it is not defined for νT ≤ 1. For narrow-band motion (a
//! lightly damped mode) crossings come in clumps and the formula is conservative: simulations of
//! the demo tripod's wind response gave 8–12 % less.
//!
//! For the largest |x| of either sign (an image excursion) the up-crossings of +a and the
//! down-crossings of −a both count, so νT is doubled (common practice, no source; a simulation in
//! the tests finds the result about 3 % high for broad-band motion).

use serde::Serialize;

/// Euler's constant γ.
pub const EULER_GAMMA: f64 = 0.577_215_664_901_532_9;

/// Davenport's peak factor for `crossings` = νT expected up-crossings of the mean; `None` when
/// νT ≤ 1 (the formula needs ln νT > 0) or not finite.
pub fn davenport_peak_factor(crossings: f64) -> Option<f64> {
    if !crossings.is_finite() || crossings <= 1.0 {
        return None;
    }
    let r = (2.0 * crossings.ln()).sqrt();
    Some(r + EULER_GAMMA / r)
}

/// The mean up-crossing rate √(m₂/m₀) (Hz) of a process with one-sided PSD `psd` on `freq_hz`
/// (trapezoid rule); 0 when the PSD is zero.
pub fn mean_crossing_rate_hz(freq_hz: &[f64], psd: &[f64]) -> f64 {
    let m0 = crate::grid::trapezoid(freq_hz, psd);
    let f2: Vec<f64> = freq_hz.iter().zip(psd).map(|(f, s)| f * f * s).collect();
    let m2 = crate::grid::trapezoid(freq_hz, &f2);
    if m0 > 0.0 { (m2 / m0).sqrt() } else { 0.0 }
}

/// The expected largest image excursion |x| per axis during an exposure.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct PeakExcursion {
    /// The duration T (the exposure), s.
    pub duration_s: f64,
    /// Mean up-crossing rate ν = √(m₂/m₀) per axis (Hz).
    pub crossing_rate_hz: [f64; 2],
    /// Peak factor g(2νT) per axis (largest |x| in units of σ); NaN where 2νT ≤ 1.
    pub peak_factor: [f64; 2],
    /// Expected largest |x| per axis (arcsec); NaN where undefined.
    pub peak_arcsec: [f64; 2],
    /// The same in pixels.
    pub peak_px: [f64; 2],
}

impl PeakExcursion {
    /// From per-axis PSDs (arcsec²/Hz) on `freq_hz`, the per-axis RMS (arcsec), a duration and
    /// the plate scale.
    pub fn from_psd(
        freq_hz: &[f64],
        psd_arcsec2: [&[f64]; 2],
        rms_arcsec: [f64; 2],
        duration_s: f64,
        plate_scale_arcsec_per_px: f64,
    ) -> PeakExcursion {
        let nu = psd_arcsec2.map(|p| mean_crossing_rate_hz(freq_hz, p));
        let g = nu.map(|n| davenport_peak_factor(2.0 * n * duration_s).unwrap_or(f64::NAN));
        let peak = [g[0] * rms_arcsec[0], g[1] * rms_arcsec[1]];
        PeakExcursion {
            duration_s,
            crossing_rate_hz: nu,
            peak_factor: g,
            peak_arcsec: peak,
            peak_px: peak.map(|p| p / plate_scale_arcsec_per_px),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::test_signals::synthesise;
    use approx::assert_relative_eq;

    #[test]
    fn formula_values() {
        // Davenport (1964), computed from the formula: νT = 1000 → √(2 ln 1000) = 3.71692,
        // + 0.57722/3.71692 = 3.87222; νT = 100 → 3.03485 + 0.19020 = 3.22505.
        assert_relative_eq!(davenport_peak_factor(1000.0).unwrap(), 3.872_22, max_relative = 1e-5);
        assert_relative_eq!(davenport_peak_factor(100.0).unwrap(), 3.225_05, max_relative = 1e-5);
        assert!(davenport_peak_factor(1.0).is_none() && davenport_peak_factor(f64::NAN).is_none());
        // Rice's rate of a band-limited white PSD on [a, b]: √((b³ − a³)/(3(b − a))).
        let f: Vec<f64> = (0..=20_000).map(|k| 1.0 + k as f64 * 1e-4).collect();
        let ones = vec![1.0; f.len()];
        assert_relative_eq!(mean_crossing_rate_hz(&f, &ones), (26.0f64 / 6.0).sqrt(), max_relative = 1e-7);
    }

    #[test]
    fn peak_factor_matches_simulation() {
        // Gaussian motion with a flat PSD on 1–3 Hz (ν = √(26/6) = 2.08 Hz), windows of 20 s
        // (2νT = 83): the mean of max|x| over the windows against σ·g(2νT), and the mean of
        // max x against σ·g(νT). Seeded run: max x 1.5 % and max|x| 3.2 % below the formula (it is
        // asymptotic and slightly conservative here; for |x| the + and − crossings are not
        // independent), so the bounds are 3 % and 5 %.
        let dt = 1.0 / 128.0;
        let n = 1 << 22;
        let psd = |f: f64| if (1.0..=3.0).contains(&f) { 1.0 } else { 0.0 };
        let x = synthesise(n, dt, psd, 5);
        let sigma = (x.iter().map(|v| v * v).sum::<f64>() / n as f64).sqrt();
        assert_relative_eq!(sigma, 2f64.sqrt(), max_relative = 1e-3);
        let w = (20.0 / dt) as usize;
        let (mut abs_sum, mut pos_sum, mut count) = (0.0, 0.0, 0.0);
        for chunk in x.chunks_exact(w) {
            abs_sum += chunk.iter().fold(0.0f64, |m, v| m.max(v.abs()));
            pos_sum += chunk.iter().fold(f64::MIN, |m, v| m.max(*v));
            count += 1.0;
        }
        let nu = (26.0f64 / 6.0).sqrt();
        let g_abs = davenport_peak_factor(2.0 * nu * 20.0).unwrap();
        let g_pos = davenport_peak_factor(nu * 20.0).unwrap();
        let (sim_abs, sim_pos) = (abs_sum / count / sigma, pos_sum / count / sigma);
        assert!((sim_abs / g_abs - 1.0).abs() < 0.05, "max|x|: simulated {sim_abs:.4}, formula {g_abs:.4}");
        assert!((sim_pos / g_pos - 1.0).abs() < 0.03, "max x: simulated {sim_pos:.4}, formula {g_pos:.4}");
    }
}

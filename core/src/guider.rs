//! A sampled-data guider: the residual image motion left by a guide camera and mount correction
//! loop, as the exact time-averaged spectrum of the hybrid (continuous–discrete) loop.
//!
//! The loop, per image axis (both axes run the same loop):
//! 1. continuous image motion x(t); the correction c(t) is subtracted: residual e = x − c;
//! 2. the guide camera averages e over its exposure T_e, ending at the sample instants kT
//!    (cadence T, T_e ≤ T): y_k = (1/T_e) ∫_{kT−T_e}^{kT} e dt;
//! 3. a discrete controller, integral gain g and optional proportional gain k_p:
//!    u_k = u_{k−1} + (k_p + g) y_k − k_p y_{k−1}, i.e. C(z) = k_p + g/(1 − z⁻¹);
//! 4. after a latency τ the command is held (zero-order hold): c(t) = u_k on [kT + τ, (k+1)T + τ).
//!
//! At the samples the loop is discrete: y = x̄ − Q(z)u with the pulse transfer
//! Q(z) = Σₙ qₙ z⁻ⁿ, qₙ = |[nT − T_e, nT] ∩ [τ, T + τ]| / T_e (how much of frame n the command
//! held since sample 0 covers), so u = K(z) x̄ with K = C/(1 + CQ). The characteristic
//! polynomial (1 − z⁻¹) + ((k_p + g) − k_p z⁻¹) Q(z) must have all roots inside the unit circle;
//! this is tested by the Schur–Cohn step-down recursion (see [`GuideLoop::is_stable`]).
//!
//! With H_e(f) = sinc(πfT_e) e^{−iπfT_e} (exposure average), the hold's sinc(πfT) e^{−iπfT} and
//! the latency e^{−i2πfτ}, the correction follows the motion at frequency f with
//!
//!   L(f) = sinc(πfT) e^{−iπfT} e^{−i2πfτ} K(e^{i2πfT}) H_e(f),
//!
//! and the sampler folds motion at every f − m/T (m ≠ 0) onto f. The time-averaged residual PSD
//! (one-sided) is
//!
//!   G_e(f) = |1 − L(f)|² G(f) + sinc²(πfT) |K(e^{i2πfT})|² Σ_{m≠0} |H_e(f − m/T)|² G(|f − m/T|),
//!
//! the second term being the aliased part. Consequences: G_e → G well above 1/T (both L and the
//! aliased term fall as sinc²); at f = k/T (k ≥ 1) the hold's sinc vanishes, so G_e = G exactly:
//! the guider neither cancels nor amplifies motion there. With T_e = T and τ = 0 the loop at the
//! samples is the classic integrator with one frame of delay, E(z) = (1 − z⁻¹)/(1 − (1 − g)z⁻¹).
//!
//! Sources: sampling as a sum of shifted spectra and the zero-order hold (1 − e^{−sT})/s,
//! G. F. Franklin, J. D. Powell, M. L. Workman, *Digital Control of Dynamic Systems*, 3rd ed.,
//! 1998 (sampled-data chapters; from memory: chapter numbers unverified); the exposure-average ×
//! integrator × hold structure of tip-tilt loops, P.-Y. Madec, "Control techniques", in F. Roddier
//! (ed.), *Adaptive Optics in Astronomy*, CUP 1999 (from memory: verify). The aliasing sum and
//! the time average are derived here for a stationary input with a random phase against the
//! guide clock, and checked against a time-domain simulation of the same loop (tests).
//!
//! Assumptions: the guide star moves with the science image (guide optics on the same payload);
//! no centroid noise, no mount backlash; motion outside the analysis grid is taken as zero, also
//! where it would fold into the grid.

use crate::error::{Error, Result, require_finite, require_non_negative, require_positive};
use num_complex::Complex64;
use serde::Serialize;
use std::f64::consts::PI;

/// Refuse more than this many folded terms (grid points × alias orders) per evaluation.
const MAX_FOLD_TERMS: usize = 200_000_000;

/// Settings of a guide loop (times in s; gains per frame, dimensionless).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct GuideLoop {
    /// Cadence T: one guide frame every `cadence_s`.
    pub cadence_s: f64,
    /// Guide exposure T_e in (0, T]; the frame ends at the sample instant.
    pub exposure_s: f64,
    /// Time from the end of a guide exposure to the correction taking effect (readout,
    /// centroiding, mount move), ≥ 0.
    pub latency_s: f64,
    /// Integral gain g (> 0): the fraction of the measured error added to the correction.
    pub gain: f64,
    /// Proportional gain k_p (default 0: a pure integrator).
    pub proportional_gain: f64,
}

impl GuideLoop {
    /// A pure integrator with gain `gain` at cadence `cadence_s`; the guide exposure fills the
    /// cadence and the latency is 0 (then the loop at the samples is the classic integrator with
    /// one frame of delay: the frame's own exposure is that delay).
    pub fn new(cadence_s: f64, gain: f64) -> Self {
        GuideLoop { cadence_s, exposure_s: cadence_s, latency_s: 0.0, gain, proportional_gain: 0.0 }
    }

    /// Set the guide exposure (s).
    pub fn with_exposure(mut self, exposure_s: f64) -> Self {
        self.exposure_s = exposure_s;
        self
    }

    /// Set the latency (s).
    pub fn with_latency(mut self, latency_s: f64) -> Self {
        self.latency_s = latency_s;
        self
    }

    /// Set the proportional gain.
    pub fn with_proportional_gain(mut self, proportional_gain: f64) -> Self {
        self.proportional_gain = proportional_gain;
        self
    }

    /// The guide Nyquist frequency 1/(2T) (Hz).
    pub fn nyquist_hz(&self) -> f64 {
        0.5 / self.cadence_s
    }

    /// Check the ranges and the closed loop's stability. Unstable settings are refused with
    /// [`Error::InvalidArgument`] named `guide.gain`, giving the largest stable integral gain
    /// for this exposure, latency and proportional gain.
    pub fn validate(&self) -> Result<()> {
        require_positive("guide.cadence_s", self.cadence_s)?;
        require_positive("guide.exposure_s", self.exposure_s)?;
        if self.exposure_s > self.cadence_s * (1.0 + 1e-12) {
            return Err(Error::invalid(
                "guide.exposure_s",
                format!(
                    "must not exceed the cadence {} s (one frame per cadence), got {}",
                    self.cadence_s, self.exposure_s
                ),
            ));
        }
        require_non_negative("guide.latency_s", self.latency_s)?;
        if self.latency_s > 1000.0 * self.cadence_s {
            return Err(Error::invalid(
                "guide.latency_s",
                format!("{} s is more than 1000 frames; no such loop can be stable", self.latency_s),
            ));
        }
        require_positive("guide.gain", self.gain)?;
        require_finite("guide.proportional_gain", self.proportional_gain)?;
        if !self.is_stable() {
            let limit = self.stable_gain_limit();
            return Err(Error::invalid(
                "guide.gain",
                format!(
                    "the guide loop is unstable (Schur–Cohn test of its characteristic polynomial): \
                     with cadence {} s, exposure {} s, latency {} s and proportional gain {} the \
                     integral gain must stay below about {limit:.4}, got {}",
                    self.cadence_s, self.exposure_s, self.latency_s, self.proportional_gain, self.gain
                ),
            ));
        }
        Ok(())
    }

    /// qₙ of the pulse transfer Q(z) = Σ qₙ z⁻ⁿ from the command to the measured average
    /// (index 0 first; q₀ = 0, so the loop has no algebraic loop). Σ qₙ = 1.
    pub fn pulse_transfer(&self) -> Vec<f64> {
        let (t, te, tau) = (self.cadence_s, self.exposure_s, self.latency_s);
        let n_max = ((tau + t) / t).ceil() as usize + 1;
        (0..=n_max)
            .map(|n| {
                let (a, b) = (n as f64 * t - te, n as f64 * t);
                ((b.min(t + tau) - a.max(tau)).max(0.0)) / te
            })
            .collect()
    }

    /// Coefficients a₀…a_N of the characteristic polynomial a₀z^N + … + a_N of the closed loop
    /// (a₀ = 1): the powers of z⁻¹ in (1 − z⁻¹) + ((k_p + g) − k_p z⁻¹) Q(z).
    pub fn characteristic_polynomial(&self) -> Vec<f64> {
        let q = self.pulse_transfer();
        let (c0, c1) = (self.proportional_gain + self.gain, -self.proportional_gain);
        let mut a = vec![0.0; q.len() + 1];
        a[0] += 1.0;
        a[1] -= 1.0;
        for (n, qn) in q.iter().enumerate() {
            a[n] += c0 * qn;
            a[n + 1] += c1 * qn;
        }
        while a.len() > 1 && a[a.len() - 1] == 0.0 {
            a.pop();
        }
        a
    }

    /// Whether every closed-loop pole lies strictly inside the unit circle.
    pub fn is_stable(&self) -> bool {
        schur_cohn_stable(&self.characteristic_polynomial())
    }

    /// The largest integral gain with a stable loop for these other settings (bisection on
    /// [`GuideLoop::is_stable`]; assumes the stable gains form an interval from 0).
    pub fn stable_gain_limit(&self) -> f64 {
        let with = |g: f64| GuideLoop { gain: g, ..*self }.is_stable();
        let (mut lo, mut hi) = (0.0, 4.0);
        while with(hi) && hi < 1e6 {
            hi *= 2.0;
        }
        for _ in 0..60 {
            let mid = 0.5 * (lo + hi);
            if with(mid) { lo = mid } else { hi = mid }
        }
        lo
    }

    /// C(z) numerator and Q(z) at z⁻¹ = w, and K = C/(1 + CQ) written without the integrator's
    /// pole: K = Cₙ(w) / ((1 − w) + Cₙ(w) Q(w)), Cₙ = (k_p + g) − k_p w.
    fn discrete_k(&self, q: &[f64], f_hz: f64) -> Complex64 {
        let w = Complex64::from_polar(1.0, -2.0 * PI * f_hz * self.cadence_s);
        let cn = Complex64::new(self.proportional_gain + self.gain, 0.0) - w * self.proportional_gain;
        let mut qw = Complex64::new(0.0, 0.0);
        let mut wn = Complex64::new(1.0, 0.0);
        for qn in q {
            qw += wn * *qn;
            wn *= w;
        }
        cn / ((Complex64::new(1.0, 0.0) - w) + cn * qw)
    }

    /// The error rejection at the guide samples, E(z) = 1/(1 + C(z)Q(z)), z = e^{i2πfT}: what the
    /// loop does to the frame averages (not to the continuous motion; see [`GuideLoop::residual`]).
    pub fn sample_rejection(&self, f_hz: f64) -> Complex64 {
        let q = self.pulse_transfer();
        let k = self.discrete_k(&q, f_hz);
        let w = Complex64::from_polar(1.0, -2.0 * PI * f_hz * self.cadence_s);
        // E = 1 − K Q.
        let mut qw = Complex64::new(0.0, 0.0);
        let mut wn = Complex64::new(1.0, 0.0);
        for qn in &q {
            qw += wn * *qn;
            wn *= w;
        }
        Complex64::new(1.0, 0.0) - k * qw
    }

    /// L(f): the part of the correction that follows the motion at f (module docs).
    pub fn following(&self, f_hz: f64) -> Complex64 {
        self.following_with(&self.pulse_transfer(), f_hz)
    }

    fn following_with(&self, q: &[f64], f_hz: f64) -> Complex64 {
        let (t, te, tau) = (self.cadence_s, self.exposure_s, self.latency_s);
        let hold = Complex64::from_polar(sinc(PI * f_hz * t), -PI * f_hz * t);
        let delay = Complex64::from_polar(1.0, -2.0 * PI * f_hz * tau);
        let he = Complex64::from_polar(sinc(PI * f_hz * te), -PI * f_hz * te);
        hold * delay * self.discrete_k(q, f_hz) * he
    }

    /// Residual PSDs of several spectra on one grid (each one-sided, same unit): for each input
    /// the total residual and its aliased part. Validates the loop first.
    ///
    /// The folded spectrum G(|f − m/T|) is interpolated linearly between grid points and taken as
    /// zero outside the grid. Where a grid cell spans more than 1/8 of the period 1/T over which
    /// the result oscillates, the value is the cell's average (sub-sampled), so band integrals
    /// of the result are right on a coarse grid. Errors: an invalid or unstable loop, a bad grid, a length mismatch,
    /// or more than 2·10⁸ folded terms ([`Error::TooLarge`]; a long cadence on a wide grid).
    pub fn residual(&self, freq_hz: &[f64], psds: &[&[f64]]) -> Result<Vec<GuidedPsd>> {
        self.validate()?;
        crate::grid::validate_freqs("guide residual grid", freq_hz)?;
        for p in psds {
            if p.len() != freq_hz.len() {
                return Err(Error::shape("PSD for the guide residual", freq_hz.len(), p.len()));
            }
        }
        let nf = freq_hz.len();
        let (f_lo, f_hi) = (freq_hz[0], freq_hz[nf - 1]);
        let t = self.cadence_s;
        let folds = (2.0 * f_hi * t).ceil() + 2.0;
        let q = self.pulse_transfer();
        // The guided spectrum oscillates in f with period 1/T (hold, loop and the comb of folds).
        // A grid value is the average over its cell (half-way to each neighbour), taken at
        // `subs` points (32 per period) where the cell spans more than 1/32 of a period, so that band integrals
        // stay right on a coarse grid; on a fine grid it is the value at the point.
        let cell = |i: usize| -> (f64, f64) {
            let lo = if i > 0 { 0.5 * (freq_hz[i - 1] + freq_hz[i]) } else { freq_hz[i] };
            let hi = if i + 1 < nf { 0.5 * (freq_hz[i] + freq_hz[i + 1]) } else { freq_hz[i] };
            (lo, hi)
        };
        let subs = |i: usize| -> usize {
            let (lo, hi) = cell(i);
            (((hi - lo) * t * 32.0).ceil() as usize).clamp(1, 1024)
        };
        let n_sub: f64 = (0..nf).map(|i| subs(i) as f64).sum();
        if folds * n_sub > MAX_FOLD_TERMS as f64 {
            return Err(Error::TooLarge {
                what: "guide aliasing terms (grid points × alias orders)".into(),
                value: (folds * n_sub).min(usize::MAX as f64) as usize,
                limit: MAX_FOLD_TERMS,
            });
        }
        // Linear interpolation of the input spectra (zero outside the grid).
        let at = |p: &[f64], a: f64| -> f64 {
            if a < f_lo || a > f_hi {
                return 0.0;
            }
            let j = freq_hz.partition_point(|&x| x <= a).clamp(1, nf - 1);
            let w = (a - freq_hz[j - 1]) / (freq_hz[j] - freq_hz[j - 1]);
            (1.0 - w) * p[j - 1] + w * p[j]
        };
        let mut out: Vec<GuidedPsd> =
            psds.iter().map(|_| GuidedPsd { total: vec![0.0; nf], aliased: vec![0.0; nf] }).collect();
        let mut acc = vec![0.0; psds.len()];
        for i in 0..nf {
            let ns = subs(i);
            let (lo, hi) = cell(i);
            for s in 0..ns {
                let f = if ns == 1 { freq_hz[i] } else { lo + (s as f64 + 0.5) * (hi - lo) / ns as f64 };
                let l = self.following_with(&q, f);
                let direct = (Complex64::new(1.0, 0.0) - l).norm_sqr();
                let fold_w = sinc(PI * f * t).powi(2) * self.discrete_k(&q, f).norm_sqr();
                acc.iter_mut().for_each(|a| *a = 0.0);
                if fold_w > 0.0 {
                    let m_lo = ((f - f_hi) * t).ceil() as i64;
                    let m_hi = ((f + f_hi) * t).floor() as i64;
                    for m in m_lo..=m_hi {
                        if m == 0 {
                            continue;
                        }
                        let nu = f - m as f64 / t;
                        let a = nu.abs();
                        if a < f_lo || a > f_hi {
                            continue;
                        }
                        let he2 = sinc(PI * nu * self.exposure_s).powi(2);
                        for (k, p) in psds.iter().enumerate() {
                            acc[k] += he2 * at(p, a);
                        }
                    }
                }
                for (k, p) in psds.iter().enumerate() {
                    // The rejection is averaged over the cell and applied to the grid value, so
                    // far above the guider's reach the guided PSD is the open one point by point.
                    let al = fold_w * acc[k] / ns as f64;
                    out[k].aliased[i] += al;
                    out[k].total[i] += direct * p[i] / ns as f64 + al;
                }
            }
        }
        Ok(out)
    }
}

/// A residual PSD after guiding and its aliased part (same unit and grid as the input).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GuidedPsd {
    pub total: Vec<f64>,
    /// The part folded onto each frequency by the sampler.
    pub aliased: Vec<f64>,
}

/// sin(u)/u.
fn sinc(u: f64) -> f64 {
    if u.abs() < 1e-8 { 1.0 - u * u / 6.0 } else { u.sin() / u }
}

/// Whether all roots of a₀z^N + a₁z^{N−1} + … + a_N lie strictly inside the unit circle
/// (Schur–Cohn step-down: with kₙ = a_N/a₀, the next polynomial has coefficients
/// (aᵢ − kₙ a_{N−i})/(1 − kₙ²); stable iff every |kₙ| < 1). The same recursion as the
/// Levinson step-down of a prediction filter; Jury's table is an equivalent arrangement.
pub fn schur_cohn_stable(a: &[f64]) -> bool {
    if a.is_empty() || a[0] == 0.0 || a.iter().any(|x| !x.is_finite()) {
        return false;
    }
    let mut p: Vec<f64> = a.iter().map(|x| x / a[0]).collect();
    while p.len() > 1 {
        let n = p.len() - 1;
        let k = p[n];
        if k.abs() >= 1.0 {
            return false;
        }
        let d = 1.0 - k * k;
        p = (0..n).map(|i| (p[i] - k * p[n - i]) / d).collect();
    }
    true
}

/// |E|² at the guide samples of a discrete integrator with gain g at cadence T_g and one frame
/// of delay, E(z) = (1 − z⁻¹)/(1 − (1 − g)z⁻¹), z = e^{i2πfT_g} (Franklin, Powell & Workman,
/// *Digital Control of Dynamic Systems*; docs/references.md#s11). This is what the loop does to the frame
/// averages; it repeats every 1/T_g and is not the rejection of continuous motion, which is
/// [`GuideLoop::residual`].
pub fn guide_rejection_sq(f_hz: f64, cadence_s: f64, gain: f64) -> f64 {
    let w = 2.0 * PI * f_hz * cadence_s;
    let num = 2.0 - 2.0 * w.cos(); // |1 − z⁻¹|²
    let a = 1.0 - gain;
    let den = 1.0 + a * a - 2.0 * a * w.cos(); // |1 − a z⁻¹|²
    num / den
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::spectrum::welch::{WelchConfig, welch};
    use crate::test_signals::synthesise;
    use approx::assert_relative_eq;

    #[test]
    fn schur_cohn_against_known_roots() {
        // Roots 0.5 and −0.9: stable; roots 0.5 and 1.1: not (polynomials built from their roots).
        assert!(schur_cohn_stable(&[1.0, 0.4, -0.45]));
        assert!(!schur_cohn_stable(&[1.0, -1.6, 0.55]));
        // Complex pair at radius 0.99 and 1.01: z² − 2r cos(1) z + r².
        let pair = |r: f64| [1.0, -2.0 * r * 1f64.cos(), r * r];
        assert!(schur_cohn_stable(&pair(0.99)));
        assert!(!schur_cohn_stable(&pair(1.01)));
    }

    #[test]
    fn integrator_stability_limits() {
        // Exposure = cadence, no latency: z − (1 − g) = 0, stable for 0 < g < 2 (Franklin, Powell
        // & Workman; REFERENCES §11 "stable for 0 < g < 2").
        let base = GuideLoop::new(1.0, 0.5);
        assert_eq!(base.characteristic_polynomial(), vec![1.0, -0.5]);
        assert!(GuideLoop::new(1.0, 1.99).is_stable());
        assert!(!GuideLoop::new(1.0, 2.01).is_stable());
        assert_relative_eq!(base.stable_gain_limit(), 2.0, max_relative = 1e-9);
        // One more frame of latency: z² − z + g = 0; Jury's conditions for a quadratic
        // (|a₂| < 1, 1 + a₁ + a₂ > 0, 1 − a₁ + a₂ > 0) give 0 < g < 1 (computed by hand).
        let late = GuideLoop::new(2.0, 0.99).with_latency(2.0);
        assert!(late.is_stable());
        assert!(!GuideLoop { gain: 1.01, ..late }.is_stable());
        assert_relative_eq!(late.stable_gain_limit(), 1.0, max_relative = 1e-9);
        // The error names the parameter and the limit.
        let e = GuideLoop { gain: 1.5, ..late }.validate().unwrap_err();
        assert!(matches!(&e, Error::InvalidArgument { name, .. } if name == "guide.gain"), "{e}");
        assert!(e.to_string().contains("unstable") && e.to_string().contains("1.0000"), "{e}");
    }

    #[test]
    fn bad_settings_are_named() {
        let g = GuideLoop::new(1.0, 0.5);
        for (bad, name) in [
            (GuideLoop { cadence_s: 0.0, ..g }, "guide.cadence_s"),
            (g.with_exposure(1.5), "guide.exposure_s"),
            (g.with_exposure(f64::NAN), "guide.exposure_s"),
            (g.with_latency(-0.1), "guide.latency_s"),
            (GuideLoop { gain: 0.0, ..g }, "guide.gain"),
            (g.with_proportional_gain(f64::INFINITY), "guide.proportional_gain"),
        ] {
            let e = bad.validate().unwrap_err();
            assert!(matches!(&e, Error::InvalidArgument { name: n, .. } if n == name), "{e}");
        }
    }

    #[test]
    fn pulse_transfer_sums_to_one() {
        for (te, tau) in [(1.0, 0.0), (0.5, 0.0), (0.5, 0.25), (0.3, 1.7), (1.0, 2.0)] {
            let q = GuideLoop::new(1.0, 0.3).with_exposure(te).with_latency(tau).pulse_transfer();
            assert_eq!(q[0], 0.0);
            assert_relative_eq!(q.iter().sum::<f64>(), 1.0, max_relative = 1e-12);
        }
    }

    #[test]
    fn samples_reproduce_the_discrete_integrator() {
        // Exposure = cadence, no latency: at the samples E(z) = (1 − z⁻¹)/(1 − (1 − g)z⁻¹)
        // (docs/references.md#s11 check values, through the older guide_rejection_sq).
        for (g, f) in [(0.5, 0.1), (0.3, 0.05), (0.5, 0.5), (0.3, 0.01)] {
            let e = GuideLoop::new(1.0, g).sample_rejection(f).norm_sqr();
            assert_relative_eq!(e, guide_rejection_sq(f, 1.0, g), max_relative = 1e-9);
        }
        assert_relative_eq!(
            GuideLoop::new(1.0, 0.5).sample_rejection(0.1).norm(),
            0.930682,
            max_relative = 1e-6
        );
    }

    #[test]
    fn residual_limits() {
        let g = GuideLoop::new(0.5, 0.4).with_exposure(0.4).with_latency(0.1).with_proportional_gain(0.1);
        let f: Vec<f64> = (1..=40_000).map(|k| k as f64 * 0.001).collect();
        let flat = vec![1.0; f.len()];
        let red: Vec<f64> = f.iter().map(|x| 1.0 / (1.0 + (x / 0.2).powi(2))).collect();
        let r = g.residual(&f, &[&flat, &red]).unwrap();
        let idx = |hz: f64| (hz / 0.001).round() as usize - 1;
        let ratio = |k: usize, hz: f64| r[k].total[idx(hz)] / [&flat, &red][k][idx(hz)];
        // f = k/T: exactly the open-loop PSD (the hold's sinc vanishes there).
        for k in 1..=10 {
            assert_relative_eq!(ratio(0, k as f64 * 2.0), 1.0, max_relative = 1e-9);
            assert_relative_eq!(ratio(1, k as f64 * 2.0), 1.0, max_relative = 1e-9);
        }
        // Far above the guider's reach the residual tends to the open-loop PSD.
        assert!((ratio(0, 35.3) - 1.0).abs() < 0.01, "{}", ratio(0, 35.3));
        // Deep inside its reach slow motion is removed (|1 − L|² → (2πfT/g)² as f → 0).
        assert!(ratio(1, 0.005) < 0.01, "{}", ratio(1, 0.005));
        // The aliased part is never negative.
        assert!(r.iter().all(|p| p.aliased.iter().all(|v| *v >= 0.0)));
    }

    /// Band-limited test spectrum: slow drift plus a resonance above the guide Nyquist frequency.
    fn test_psd(f: f64) -> f64 {
        if f > 6.0 {
            return 0.0;
        }
        let drift = 1.0 / (1.0 + (f / 0.05).powi(2));
        let (fnat, z) = (2.6f64, 0.05f64);
        let r = f / fnat;
        let res = 0.02 / ((1.0 - r * r).powi(2) + (2.0 * z * r).powi(2));
        drift + res
    }

    /// The loop in the time domain at step dt: frame averages of the residual by sample means,
    /// the PI controller, latency and hold on the sample grid.
    fn simulate(g: &GuideLoop, x: &[f64], dt: f64) -> Vec<f64> {
        let m = (g.cadence_s / dt).round() as usize;
        let me = (g.exposure_s / dt).round() as usize;
        let lat = (g.latency_s / dt).round() as usize;
        let mut c = vec![0.0; x.len()];
        let (mut u, mut y_prev) = (0.0, 0.0);
        let mut k = 1;
        while k * m <= x.len() {
            let frame = k * m - me..k * m;
            let y = frame.clone().map(|j| x[j] - c[j]).sum::<f64>() / me as f64;
            u += (g.proportional_gain + g.gain) * y - g.proportional_gain * y_prev;
            y_prev = y;
            for cj in c.iter_mut().take(((k + 1) * m + lat).min(x.len())).skip(k * m + lat) {
                *cj = u;
            }
            k += 1;
        }
        x.iter().zip(&c).map(|(a, b)| a - b).collect()
    }

    /// ∫ y df over [lo, hi], trapezoid with linear interpolation at the band edges.
    fn band(f: &[f64], y: &[f64], lo: f64, hi: f64) -> f64 {
        let mut s = 0.0;
        for k in 1..f.len() {
            let (a, b) = (f[k - 1].max(lo), f[k].min(hi));
            if b > a {
                let lerp = |x: f64| y[k - 1] + (y[k] - y[k - 1]) * (x - f[k - 1]) / (f[k] - f[k - 1]);
                s += 0.5 * (b - a) * (lerp(a) + lerp(b));
            }
        }
        s
    }

    #[test]
    fn residual_matches_time_domain_simulation() {
        // Random image motion with a known PSD through the discrete loop (exposure averaging,
        // PI controller, latency, hold), residual PSD by Welch: within 5 % of the sampled-data
        // formula in each band, aliasing included; and f = k/T is not cancelled.
        let dt = 1.0 / 128.0;
        let n = 1 << 21;
        let x = synthesise(n, dt, test_psd, 11);
        let grid: Vec<f64> = (1..=60_000).map(|k| k as f64 * 1e-4).collect();
        let open: Vec<f64> = grid.iter().map(|&f| test_psd(f)).collect();
        let mut aliased_share: f64 = 0.0;
        let bands = [(0.02, 0.1), (0.1, 0.3), (0.3, 0.5), (0.5, 0.9), (0.95, 1.05), (1.1, 2.0), (2.0, 3.5)];
        for g in [
            GuideLoop::new(1.0, 0.5),
            GuideLoop::new(1.0, 0.3).with_exposure(0.5).with_latency(0.25).with_proportional_gain(0.2),
        ] {
            let theory = g.residual(&grid, &[&open]).unwrap().remove(0);
            let e = simulate(&g, &x, dt);
            let skip = (300.0 / dt) as usize; // start-up transient of the loop
            let w = welch(&e[skip..], 1.0 / dt, &WelchConfig::new(1 << 15)).unwrap();
            aliased_share = aliased_share
                .max(band(&grid, &theory.aliased, 0.3, 0.5) / band(&grid, &theory.total, 0.3, 0.5));
            for (lo, hi) in bands {
                let (sim, th) = (band(&w.freq_hz, &w.values, lo, hi), band(&grid, &theory.total, lo, hi));
                let rel = sim / th - 1.0;
                assert!(rel.abs() < 0.05, "{g:?} band {lo}–{hi} Hz: simulated {sim:.5e}, formula {th:.5e}");
            }
            // Around f = 1/T the simulated residual keeps the open-loop level (not cancelled).
            let (sim, open_b) = (band(&w.freq_hz, &w.values, 0.99, 1.01), band(&grid, &open, 0.99, 1.01));
            assert!(sim / open_b > 0.8, "{sim} vs {open_b}");
        }
        // Without the aliased part the formula would miss by more than the tolerance.
        assert!(aliased_share > 0.15, "the test should exercise aliasing: {aliased_share}");
    }

    #[test]
    fn guider_rejection_check_values() {
        // docs/references.md#s11 table, one-frame delay: g = 0.5 at f/fs = 0.1 → 0.930682;
        // g = 0.3 at 0.05 → 0.785813.
        assert_relative_eq!(guide_rejection_sq(0.1, 1.0, 0.5).sqrt(), 0.930682, max_relative = 1e-6);
        assert_relative_eq!(guide_rejection_sq(0.05, 1.0, 0.3).sqrt(), 0.785813, max_relative = 1e-6);
        assert_relative_eq!(guide_rejection_sq(0.5, 1.0, 0.5).sqrt(), 4.0 / 3.0, max_relative = 1e-12);
    }
}

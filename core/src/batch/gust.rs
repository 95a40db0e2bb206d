//! The gust family of a wind case: the worst peak image excursion and the ring-down after the
//! gust has passed, used by the sweep's gust columns and the report's gust table and plot.
//!
//! One design gust of fixed length tells little about a structure: a gust much longer than the
//! first period only leans the rig (quasi-static), while one of about half a period kicks it and
//! leaves it ringing. So a family of "1-cosine" gusts is run, with durations spaced
//! geometrically from half the first period ([`GUST_FAMILY_SIZE`] of them, up to
//! [`GUST_LONGEST_S`]), and the worst case of each outcome is reported: a search over a family
//! of equally likely gust shapes for the worst response, as in the statistical discrete gust
//! method (Jones 1980, docs/references.md#s19).
//!
//! **Amplitude.** A gust of duration T rises over T/2. Its amplitude is the peak factor
//! [`GUST_PEAK_FACTOR`] times √(σ_u² − R(T/2)), where R is the autocorrelation of the wind
//! case's velocity spectrum (R(τ) = ∫ S_u(f) cos 2πfτ df): half the mean-square velocity change
//! over the rise time, so long gusts reach 3 σ_u (the earlier single design gust) and short ones
//! shrink as the turbulence's velocity increments do (∝ T^(1/3) in the inertial subrange,
//! Kolmogorov's scaling, which the statistical discrete gust method uses). The peak factor 3 is
//! common practice, no source.
//!
//! **Drag.** The gust's drag is quasi-steady (the full drag law on the model's `[wind]` area, no
//! aerodynamic admittance, which the spectral path applies): a short gust is loaded in full,
//! which errs on the safe side for the peak.
//!
//! **Ring-down.** From the end of the gust until the image stays within ½ px to the end of the
//! record. The record runs on after the longest gust for the time the slowest mode's envelope
//! takes to fall to 1e-3 (4–30 s), so `None` (never settles) means a peak of more than about
//! 1000 × ½ px or a ring-down longer than 30 s.

use crate::error::{Error, Result};
use crate::grid::FreqGrid;
use crate::model::Model;
use crate::transient::{Gust, GustWind, ImageTransient, TransientOptions};
use crate::wind::WindSpec;
use serde::Serialize;

/// Time of the gust's start in each record (s).
pub const GUST_START_S: f64 = 0.5;
/// Peak factor on the velocity change (common practice, no source).
pub const GUST_PEAK_FACTOR: f64 = 3.0;
/// The longest gust of a family (s).
pub const GUST_LONGEST_S: f64 = 4.0;
/// Number of gust durations in a family.
pub const GUST_FAMILY_SIZE: usize = 9;
/// Image radius for the ring-down (px).
pub const RINGDOWN_RADIUS_PX: f64 = 0.5;

/// One gust of a family and what it does to the image.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GustCase {
    pub duration_s: f64,
    pub amplitude_m_s: f64,
    /// Largest radial image excursion over the record (px).
    pub peak_px: f64,
    /// Time of the peak after the gust's start (s).
    pub peak_after_start_s: f64,
    /// From the end of the gust until the image stays within ½ px (s); `None` if it does not
    /// settle within the record.
    pub ringdown_s: Option<f64>,
}

/// The gust family of one model and wind case.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GustFamily {
    pub cases: Vec<GustCase>,
    /// Index of the case with the largest peak.
    pub worst_peak: usize,
    /// Index of the case with the longest ring-down (one that never settles counts as longest).
    pub worst_ringdown: usize,
    /// Sample rate (Hz) and record length (s) of the simulations.
    pub fs_hz: f64,
    pub record_s: f64,
}

impl GustFamily {
    /// The largest peak over the family (px).
    pub fn worst_peak_px(&self) -> f64 {
        self.cases[self.worst_peak].peak_px
    }
    /// The longest ring-down over the family (s); infinite if some gust never settles.
    pub fn worst_ringdown_s(&self) -> f64 {
        self.cases[self.worst_ringdown].ringdown_s.unwrap_or(f64::INFINITY)
    }
}

/// Durations (s) of a family for a model whose first mode is at `first_mode_hz`: from half its
/// period to [`GUST_LONGEST_S`], geometrically spaced; one gust if half the period is longer.
pub fn gust_durations(first_mode_hz: f64) -> Result<Vec<f64>> {
    if !(first_mode_hz.is_finite() && first_mode_hz > 0.0) {
        return Err(Error::invalid("first mode frequency", format!("must be > 0, got {first_mode_hz}")));
    }
    let shortest = 0.5 / first_mode_hz;
    if shortest >= GUST_LONGEST_S {
        return Ok(vec![shortest]);
    }
    let r = (GUST_LONGEST_S / shortest).ln() / (GUST_FAMILY_SIZE - 1) as f64;
    Ok((0..GUST_FAMILY_SIZE).map(|k| shortest * (r * k as f64).exp()).collect())
}

/// √(σ² − R(τ)) (m/s) of a one-sided velocity PSD (trapezoid rule on its own grid): half the
/// mean-square change of the velocity over a time lag τ, under the square root.
pub fn half_structure_rms(freq_hz: &[f64], psd: &[f64], lag_s: f64) -> Result<f64> {
    if freq_hz.len() != psd.len() {
        return Err(Error::shape("psd", freq_hz.len(), psd.len()));
    }
    if freq_hz.len() < 2 {
        return Err(Error::invalid("psd", "needs at least two frequencies"));
    }
    crate::error::require_non_negative("lag_s", lag_s)?;
    let g: Vec<f64> = freq_hz
        .iter()
        .zip(psd)
        .map(|(f, s)| s * (1.0 - (2.0 * std::f64::consts::PI * f * lag_s).cos()))
        .collect();
    Ok(crate::grid::trapezoid(freq_hz, &g).max(0.0).sqrt())
}

/// Amplitude (m/s) of the family's gust of `duration_s` for a wind case (module docs).
pub fn gust_amplitude_m_s(wind: &WindSpec, duration_s: f64) -> Result<f64> {
    Ok(gust_amplitudes_m_s(wind, &[duration_s])?[0])
}

/// [`gust_amplitude_m_s`] for several durations, the velocity PSD computed once.
fn gust_amplitudes_m_s(wind: &WindSpec, durations_s: &[f64]) -> Result<Vec<f64>> {
    for d in durations_s {
        crate::error::require_positive("gust duration_s", *d)?;
    }
    let grid = FreqGrid::log(1e-5, 1e5, 20_000)?;
    let psd = wind.velocity_psd(&grid)?;
    durations_s
        .iter()
        .map(|d| Ok(GUST_PEAK_FACTOR * half_structure_rms(grid.hz(), psd.values(), 0.5 * d)?))
        .collect()
}

/// Durations, sample rate and record length of a model's gust family.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GustPlan {
    pub durations_s: Vec<f64>,
    pub fs_hz: f64,
    pub record_s: f64,
}

impl GustPlan {
    /// The plan for `model`: durations from half its first period ([`gust_durations`]), 20
    /// samples per first period (200–2000 Hz), and a record that runs on after the longest gust
    /// for the time the slowest mode takes to decay to 1e-3 (4–30 s).
    pub fn for_model(model: &Model) -> Result<GustPlan> {
        let modes = model.modes()?;
        let first = modes
            .frequency_hz
            .iter()
            .copied()
            .find(|f| *f > 0.0)
            .ok_or_else(|| Error::invalid("gust family", "the model has no mode above 0 Hz"))?;
        let durations_s = gust_durations(first)?;
        let tail = model.decay_time_s(1e-3)?.clamp(4.0, 30.0);
        let longest = durations_s.iter().copied().fold(0.0, f64::max);
        Ok(GustPlan {
            durations_s,
            fs_hz: (20.0 * first).clamp(200.0, 2000.0),
            record_s: GUST_START_S + longest + tail,
        })
    }
}

/// The gust responses of `model` to the gusts of `plan` (one per duration) and their summary.
pub fn gust_family_with(
    model: &Model,
    wind: &WindSpec,
    plan: &GustPlan,
) -> Result<(GustFamily, Vec<ImageTransient>)> {
    if plan.durations_s.is_empty() {
        return Err(Error::invalid("gust durations", "is empty"));
    }
    let wind = &model.wind_at_load(wind)?;
    let u = wind.effective_speed_m_s()?;
    let amplitudes = gust_amplitudes_m_s(wind, &plan.durations_s)?;
    let gusts: Vec<Gust> = plan
        .durations_s
        .iter()
        .zip(&amplitudes)
        .map(|(t, a)| Gust::one_minus_cosine_duration(*a, *t).starting_at(GUST_START_S))
        .collect();
    let gw = GustWind::new(u).with_air_density(wind.air_density_kg_m3);
    let opts = TransientOptions::default().with_decay_tolerance(1e-4).with_radius_px(RINGDOWN_RADIUS_PX);
    let traces = model.gust_responses(&gusts, &gw, plan.fs_hz, plan.record_s, &opts)?;
    let cases: Vec<GustCase> = plan
        .durations_s
        .iter()
        .zip(&amplitudes)
        .zip(&traces)
        .map(|((t, a), r)| GustCase {
            duration_s: *t,
            amplitude_m_s: *a,
            peak_px: r.metrics.peak_px,
            peak_after_start_s: r.metrics.peak_time_s - GUST_START_S,
            ringdown_s: r.metrics.settle_time_s.map(|s| (s - GUST_START_S - t).max(0.0)),
        })
        .collect();
    let worst_peak =
        (0..cases.len()).max_by(|&a, &b| cases[a].peak_px.total_cmp(&cases[b].peak_px)).unwrap_or(0);
    let ring = |c: &GustCase| c.ringdown_s.unwrap_or(f64::INFINITY);
    let worst_ringdown =
        (0..cases.len()).max_by(|&a, &b| ring(&cases[a]).total_cmp(&ring(&cases[b]))).unwrap_or(0);
    Ok((GustFamily { cases, worst_peak, worst_ringdown, fs_hz: plan.fs_hz, record_s: plan.record_s }, traces))
}

/// The family's gust responses (one per duration, [`GustPlan::for_model`]) and its summary.
pub fn gust_family_responses(model: &Model, wind: &WindSpec) -> Result<(GustFamily, Vec<ImageTransient>)> {
    gust_family_with(model, wind, &GustPlan::for_model(model)?)
}

/// The family summary alone (see [`gust_family_responses`]).
pub fn gust_family(model: &Model, wind: &WindSpec) -> Result<GustFamily> {
    Ok(gust_family_responses(model, wind)?.0)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::wind::{Turbulence, WindSpectrum};

    /// A first-order (exponentially correlated) process: S(f) = 4σ²T/(1 + (2πfT)²) one-sided has
    /// R(τ) = σ² e^(−|τ|/T) (Bendat & Piersol, Random Data, 4th ed., 2010, the low-pass white
    /// noise example), so √(σ² − R(τ)) = σ √(1 − e^(−τ/T)).
    #[test]
    fn half_structure_matches_an_exponential_autocorrelation() {
        let (sigma, t) = (0.8_f64, 1.5_f64);
        let grid = FreqGrid::log(1e-6, 1e5, 40_000).unwrap();
        let s: Vec<f64> = grid
            .hz()
            .iter()
            .map(|f| 4.0 * sigma * sigma * t / (1.0 + (2.0 * std::f64::consts::PI * f * t).powi(2)))
            .collect();
        for lag in [0.05, 0.3, 1.0, 4.0, 20.0] {
            let got = half_structure_rms(grid.hz(), &s, lag).unwrap();
            let want = sigma * (1.0 - (-lag / t).exp()).sqrt();
            assert!((got / want - 1.0).abs() < 2e-3, "lag {lag}: {got} vs {want}");
        }
    }

    #[test]
    fn amplitudes_reach_three_sigma_and_scale_as_the_cube_root_when_short() {
        let w = WindSpec::new(WindSpectrum::VonKarman, 4.0, 2.0, Turbulence::Intensity(0.2));
        let sigma = w.sigma_u_m_s().unwrap();
        // Long gusts: 3 σ_u within 2 % (the spectrum's integral on the grid).
        let long = gust_amplitude_m_s(&w, 2000.0).unwrap();
        assert!((long / (3.0 * sigma) - 1.0).abs() < 0.02, "{long} vs {}", 3.0 * sigma);
        // Short gusts (T/2 ≪ L/U = 2.8 s): the inertial subrange's D(τ) ∝ τ^(2/3), so the
        // amplitude goes as T^(1/3) (Kolmogorov 1941).
        let (a1, a2) = (gust_amplitude_m_s(&w, 0.01).unwrap(), gust_amplitude_m_s(&w, 0.08).unwrap());
        let slope = (a2 / a1).ln() / 8f64.ln();
        assert!((slope - 1.0 / 3.0).abs() < 0.02, "slope {slope}");
        // Monotone in duration.
        let d = gust_durations(8.0).unwrap();
        let a: Vec<f64> = d.iter().map(|t| gust_amplitude_m_s(&w, *t).unwrap()).collect();
        assert!(a.windows(2).all(|p| p[1] > p[0]), "{a:?}");
    }

    #[test]
    fn durations_span_half_the_first_period_to_the_longest() {
        let d = gust_durations(10.0).unwrap();
        assert_eq!(d.len(), GUST_FAMILY_SIZE);
        assert!((d[0] - 0.05).abs() < 1e-12 && (d[GUST_FAMILY_SIZE - 1] - GUST_LONGEST_S).abs() < 1e-9);
        assert_eq!(gust_durations(0.1).unwrap(), vec![5.0]);
        assert!(gust_durations(0.0).is_err());
    }
}

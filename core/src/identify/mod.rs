//! Identification of natural frequency and damping from a recorded tap test or ring-down.
//!
//! One channel, samples `x` at `fs_hz`. [`identify_ringdown`] does, in order:
//!
//! 1. Checks: at least [`MIN_SAMPLES`] samples, all finite (the first bad index is named),
//!    clipping (runs of ≥ `clip_min_run` equal samples at the record's maximum or minimum:
//!    flagged, and an error above `max_clipped_fraction`).
//! 2. Removes the offset (the record mean).
//! 3. Finds the dominant peak of |X(f)|², X the real FFT of the record zero-padded to a power
//!    of two ≥ `zero_pad_factor` × n (no window: a ring-down is its own window), within
//!    [`min_frequency_hz`, `max_frequency_hz`]; its frequency by Jacobsen's three-bin
//!    interpolation on bins 1/T apart. Errors: peak-to-median power ratio below
//!    `min_peak_to_median` ("no dominant peak"), fewer than [`MIN_CYCLES`] cycles of the found
//!    frequency in the record, or the peak at the lowest searched frequency ("too short, or a
//!    drift").
//! 4. Damping of the dominant mode by three methods (docs/references.md#s13):
//!    - half-power bandwidth on |X|² (crossings linearly interpolated between bins):
//!      ζ = (f₂ − f₁)/(2 f_peak);
//!    - logarithmic decrement on the band-passed signal: positive peaks (parabolic refinement)
//!      from one guard interval after the envelope maximum, one cycle apart, until they fall
//!      below max(5 %, 5 × noise); δ per cycle is the least-squares slope of ln(peak) against
//!      the cycle number (weights peak²), the least-squares form of δ = ln(x₀/x_N)/N;
//!      ζ = δ/√(4π² + δ²);
//!    - a least-squares line fit to ln of the Hilbert envelope of the band-passed signal
//!      (analytic signal by FFT), weighted by envelope², from one guard interval after the
//!      envelope maximum until the envelope falls below max(2 %, 5 × noise): e^{−σt},
//!      ζ = σ/√(ω_d² + σ²), with ω_d from the slope of the unwrapped phase over the same window.
//!
//!    The band-pass is zero-phase: a real Gaussian mask exp(−(f − f_peak)²/2e²) applied to the
//!    FFT, e = f_peak · max(b/2, 5 ζ_hp) (b = `band_half_width`), at most 0.3 f_peak. Its kernel
//!    is Gaussian in time, so its start transient is gone after the guard interval 0.5/e and
//!    a decaying exponential then passes with its decay rate unchanged. The noise level is the
//!    RMS of the last 10 % of the band-passed record, so the record should run into the noise.
//!
//!    The best single-mode ζ is the **median** of the available estimates; `spread` is
//!    (max − min)/median. The best natural frequency is the median of f_n from the spectral
//!    peak, from the phase slope and from the pencil's matching mode, where available.
//! 5. Several modes: the matrix pencil (Hua & Sarkar 1990, see `pencil.rs`) on the band-limited
//!    analytic signal, shifted to baseband and decimated (exact FFT-domain decimation), over a
//!    band that covers every significant spectral peak (local maxima with ≥ 1 % of the dominant
//!    power), or `pencil_band_hz`. Model order from the singular values: the largest M with a
//!    gap s_M/s_{M+1} ≥ `pencil_gap`. Modes outside the band, with ζ ∉ (0, 1) or with an
//!    amplitude below `min_relative_amplitude` of the largest are dropped.
//!
//! The result's arrays hold one entry per mode, sorted by increasing natural frequency. For the
//! dominant mode (index `dominant`) they hold the single-mode best estimate, unless another
//! pencil mode lies within ±2e of the peak (`close_modes`): then the single-mode methods see
//! a beat and the pencil's values are used instead. If the pencil fails (e.g. too few samples
//! above the noise for a heavily damped mode) the arrays hold the dominant mode only and a
//! warning says why.
//!
//! Frequencies reported in the arrays are undamped natural frequencies f_n: from the pencil
//! f_n = |s|/2π; from the spectral peak f_n = f_peak/√(1 − 2ζ²) (the peak of the displacement
//! receptance, which |X|² of a free decay follows; from memory: verify).

mod calibrate;
mod card;
mod compare;
mod dsp;
mod frf_fit;
mod pencil;

pub use calibrate::{
    Calibration, CalibrationOptions, CalibrationParameter, DEFAULT_DAMPING_WEIGHT, ModalTarget,
    TargetResidual, calibrate, get_parameter, numeric_paths, set_parameter,
};
pub use card::{
    CardComparison, CardOptions, DEFAULT_THRESHOLD_PX, DampedSineFit, Estimate, RingdownCard, TrackUnit,
    compare_cards, image_track_card, ringdown_card,
};
pub use compare::{CompareOptions, RingdownComparison, RingdownMetrics, SettleThreshold, compare_ringdowns};
pub use frf_fit::{FrfMode, FrfModeOptions, fit_frf_band, frf_modes};

use crate::Complex64;
use crate::error::{Error, Result, require_positive};
use dsp::{BandMask, band_analytic, jacobsen_offset, median, padded_spectrum, parabolic_peak};
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// Fewest samples accepted by [`identify_ringdown`].
pub const MIN_SAMPLES: usize = 64;
/// Fewest cycles of the dominant frequency the record must span.
pub const MIN_CYCLES: f64 = 3.0;
/// Most samples accepted (the zero-padded FFT grows to 4× this).
pub const MAX_SAMPLES: usize = 1 << 24;

/// Options of [`identify_ringdown`].
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[non_exhaustive]
pub struct RingdownOptions {
    /// Lowest frequency searched for the dominant peak (Hz); default 1 / duration (a peak
    /// below `MIN_CYCLES` / duration is then an error).
    pub min_frequency_hz: Option<f64>,
    /// Highest frequency searched (Hz); default 0.9 × Nyquist.
    pub max_frequency_hz: Option<f64>,
    /// Zero padding: the FFT length is the next power of two ≥ this × n (default 4, min 2).
    pub zero_pad_factor: usize,
    /// Relative half-width b of the band-pass around the peak, f_peak(1 ± b) (default 0.2).
    pub band_half_width: f64,
    /// "No dominant peak" below this ratio of peak power to median power in the searched
    /// range (default 30, i.e. 14.8 dB; white Gaussian noise, whose periodogram ordinates are
    /// exponentially distributed, exceeds it with probability ≈ 2^−30 per bin).
    pub min_peak_to_median: f64,
    /// A clipped run is at least this many equal consecutive samples at the max or min (default 3).
    pub clip_min_run: usize,
    /// Error when more than this fraction of samples is clipped (default 0.05).
    pub max_clipped_fraction: f64,
    /// Band for the matrix pencil (Hz); default: around all significant spectral peaks.
    pub pencil_band_hz: Option<(f64, f64)>,
    /// Most modes the matrix pencil may return (default 8).
    pub max_modes: usize,
    /// Pencil modes with an amplitude below this fraction of the largest are dropped (default 0.02).
    pub min_relative_amplitude: f64,
    /// Model order rule: the largest M ≤ `max_modes` with s_M / s_{M+1} ≥ this gap among the
    /// singular values above 1e-8 s₁ (default 4); with no such gap the pencil is skipped (a
    /// warning says so).
    pub pencil_gap: f64,
}

impl Default for RingdownOptions {
    fn default() -> Self {
        RingdownOptions {
            min_frequency_hz: None,
            max_frequency_hz: None,
            zero_pad_factor: 4,
            band_half_width: 0.2,
            min_peak_to_median: 30.0,
            clip_min_run: 3,
            max_clipped_fraction: 0.05,
            pencil_band_hz: None,
            max_modes: 8,
            min_relative_amplitude: 0.02,
            pencil_gap: 4.0,
        }
    }
}

impl RingdownOptions {
    fn validate(&self) -> Result<()> {
        if let Some(f) = self.min_frequency_hz {
            require_positive("min_frequency_hz", f)?;
        }
        if let Some(f) = self.max_frequency_hz {
            require_positive("max_frequency_hz", f)?;
        }
        if !(2..=64).contains(&self.zero_pad_factor) {
            return Err(Error::invalid(
                "zero_pad_factor",
                format!("must be 2..=64, got {}", self.zero_pad_factor),
            ));
        }
        let b = require_positive("band_half_width", self.band_half_width)?;
        if b >= 0.6 {
            return Err(Error::invalid("band_half_width", format!("must be < 0.6, got {b}")));
        }
        require_positive("min_peak_to_median", self.min_peak_to_median)?;
        if self.clip_min_run < 2 {
            return Err(Error::invalid("clip_min_run", format!("must be >= 2, got {}", self.clip_min_run)));
        }
        let c = require_positive("max_clipped_fraction", self.max_clipped_fraction)?;
        if c > 1.0 {
            return Err(Error::invalid("max_clipped_fraction", format!("must be <= 1, got {c}")));
        }
        if let Some((lo, hi)) = self.pencil_band_hz {
            require_positive("pencil_band_hz.0", lo)?;
            require_positive("pencil_band_hz.1", hi)?;
            if hi <= lo {
                return Err(Error::invalid("pencil_band_hz", format!("({lo}, {hi}) must be increasing")));
            }
        }
        if self.max_modes == 0 {
            return Err(Error::invalid("max_modes", "must be >= 1"));
        }
        let a = require_positive("min_relative_amplitude", self.min_relative_amplitude)?;
        if a >= 1.0 {
            return Err(Error::invalid("min_relative_amplitude", format!("must be < 1, got {a}")));
        }
        if !(self.pencil_gap.is_finite() && self.pencil_gap > 1.0) {
            return Err(Error::invalid("pencil_gap", format!("must be > 1, got {}", self.pencil_gap)));
        }
        Ok(())
    }
}

/// Clipping found in a record.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Clipping {
    /// True when at least one clipped run was found.
    pub clipped: bool,
    /// Number of samples in clipped runs.
    pub samples: usize,
    /// Number of clipped runs.
    pub runs: usize,
    /// samples / record length.
    pub fraction: f64,
    /// Index of the last clipped sample (the time-domain fits start after it).
    pub last_index: Option<usize>,
}

/// The single-mode estimates for the dominant spectral peak.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct MethodEstimates {
    /// Interpolated frequency of the dominant peak of |X|² (Hz).
    pub dominant_frequency_hz: f64,
    /// ζ from the logarithmic decrement of the band-passed signal.
    pub log_decrement: Option<f64>,
    /// Number of cycles N the decrement was taken over.
    pub log_decrement_cycles: usize,
    /// ζ from the exponential fit to the Hilbert envelope.
    pub envelope_fit: Option<f64>,
    /// ζ from the half-power bandwidth.
    pub half_power: Option<f64>,
    /// Half-power frequencies (f₁, f₂) (Hz).
    pub half_power_band_hz: Option<(f64, f64)>,
    /// Median of the available estimates (the single-mode best estimate).
    pub median: Option<f64>,
    /// f_n from the spectral peak, f_peak/√(1 − 2ζ²) with the median ζ (Hz).
    pub spectral_frequency_hz: Option<f64>,
    /// f_n from the phase slope of the band-passed signal, f_d/√(1 − ζ²) (Hz).
    pub phase_frequency_hz: Option<f64>,
    /// (max − min)/median over the available estimates; 0 with fewer than two.
    pub spread: f64,
}

/// Where the dominant mode's best estimate comes from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub enum EstimateSource {
    /// Median of the single-mode methods.
    SingleMode,
    /// The matrix pencil (close modes, or no single-mode estimate).
    MatrixPencil,
}

/// One mode of the matrix pencil fit: x(t) ≈ Σ A e^{−ζω_n t} cos(ω_d t + φ).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PencilMode {
    /// Undamped natural frequency f_n = |s|/2π (Hz).
    pub frequency_hz: f64,
    /// Damped frequency f_d (Hz).
    pub damped_frequency_hz: f64,
    /// Damping ratio ζ = σ/ω_n.
    pub damping_ratio: f64,
    /// Amplitude A at the first sample (t = 0), units of x.
    pub amplitude: f64,
    /// Phase φ at t = 0 (rad).
    pub phase_rad: f64,
}

/// Result of [`identify_ringdown`].
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RingdownId {
    /// Natural frequency of each mode (Hz), increasing.
    pub frequency_hz: Vec<f64>,
    /// Damping ratio ζ of each mode.
    pub damping_ratio: Vec<f64>,
    /// Amplitude of each mode at t = 0 (units of x).
    pub amplitude: Vec<f64>,
    /// Index of the dominant mode (the one at the spectral peak) in the arrays.
    pub dominant: usize,
    /// Where the dominant mode's values come from.
    pub dominant_source: EstimateSource,
    /// The three single-mode estimates for the dominant peak.
    pub methods: MethodEstimates,
    /// Raw matrix pencil modes, increasing frequency (empty if the pencil failed: see warnings).
    pub pencil: Vec<PencilMode>,
    /// Band the pencil was fitted over (Hz).
    pub pencil_band_hz: (f64, f64),
    /// Model order chosen from the singular values (before dropping spurious modes).
    pub model_order: usize,
    /// Singular values of the pencil's Hankel matrix divided by the largest (descending).
    pub pencil_singular_values: Vec<f64>,
    /// Another pencil mode lies inside the band-pass band of the dominant one.
    pub close_modes: bool,
    /// True when clipped samples were found (details in `clipping`).
    pub clipped: bool,
    /// Clipping details.
    pub clipping: Clipping,
    /// Offset removed (record mean), units of x.
    pub offset: f64,
    /// Peak-to-median power ratio of the dominant peak.
    pub peak_to_median: f64,
    /// RMS noise of the band-passed record (last 10 %), units of x.
    pub noise_rms: f64,
    /// Things the user should know (clipping, close modes, record not decayed, ...).
    pub warnings: Vec<String>,
}

/// Check length and finiteness of a record; the error names `name` and the first bad index.
pub(crate) fn check_record(name: &str, x: &[f64]) -> Result<()> {
    if x.len() < MIN_SAMPLES {
        return Err(Error::invalid(
            name,
            format!("recording too short: {} samples, need at least {MIN_SAMPLES}", x.len()),
        ));
    }
    if x.len() > MAX_SAMPLES {
        return Err(Error::TooLarge { what: format!("{name} length"), value: x.len(), limit: MAX_SAMPLES });
    }
    if let Some(i) = x.iter().position(|v| !v.is_finite()) {
        return Err(Error::invalid(name, format!("sample {i} is {} (not finite)", x[i])));
    }
    Ok(())
}

/// Runs of at least `min_run` equal consecutive samples at the record's maximum or minimum.
pub fn detect_clipping(x: &[f64], min_run: usize) -> Clipping {
    let mut out = Clipping { clipped: false, samples: 0, runs: 0, fraction: 0.0, last_index: None };
    if x.is_empty() {
        return out;
    }
    let hi = x.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let lo = x.iter().copied().fold(f64::INFINITY, f64::min);
    if hi == lo {
        return out; // a constant record is not "clipped"; it fails the peak test instead
    }
    let mut i = 0;
    while i < x.len() {
        if x[i] == hi || x[i] == lo {
            let v = x[i];
            let mut j = i;
            while j < x.len() && x[j] == v {
                j += 1;
            }
            if j - i >= min_run.max(2) {
                out.samples += j - i;
                out.runs += 1;
                out.last_index = Some(j - 1);
            }
            i = j;
        } else {
            i += 1;
        }
    }
    out.clipped = out.runs > 0;
    out.fraction = out.samples as f64 / x.len() as f64;
    out
}

fn rms(v: &[f64]) -> f64 {
    if v.is_empty() {
        return 0.0;
    }
    (v.iter().map(|a| a * a).sum::<f64>() / v.len() as f64).sqrt()
}

/// Logarithmic decrement on the band-passed signal `xb`: positive peaks from `guard_s` after the
/// maximum of the envelope `env`; returns (ζ, cycles).
fn log_decrement(
    xb: &[f64],
    env: &[f64],
    start: usize,
    noise: f64,
    fs: f64,
    f0: f64,
    guard_s: f64,
) -> Option<(f64, usize)> {
    let n = xb.len();
    let i_pk = start + env[start..].iter().enumerate().max_by(|a, b| a.1.total_cmp(b.1))?.0;
    let i_max = (i_pk + (guard_s * fs).ceil() as usize).min(n - 1);
    let period = fs / f0;
    let mut peaks: Vec<(f64, f64)> = Vec::new(); // (time in samples, amplitude)
    for i in i_max.max(1)..n - 1 {
        if xb[i] > 0.0 && xb[i] >= xb[i - 1] && xb[i] > xb[i + 1] {
            let (p, a) = parabolic_peak(xb[i - 1], xb[i], xb[i + 1]);
            if let Some(&(t_prev, _)) = peaks.last() {
                let gap = i as f64 + p - t_prev;
                if (gap - period).abs() > 0.3 * period {
                    break; // not one cycle apart: noise or a beat
                }
            }
            peaks.push((i as f64 + p, a));
        }
    }
    let a0 = peaks.first()?.1;
    let thr = (0.05 * a0).max(5.0 * noise);
    let used = peaks.iter().take_while(|p| p.1 >= thr).count();
    if used < 3 {
        return None;
    }
    // δ per cycle as the slope of ln(peak) against the cycle number (weights: peak²), i.e. the
    // least-squares form of δ = ln(x₀/x_N)/N over the N = used − 1 cycles.
    let (mut sw, mut sk, mut su, mut skk, mut sku) = (0.0, 0.0, 0.0, 0.0, 0.0);
    for (k, &(_, a)) in peaks.iter().take(used).enumerate() {
        let (w, kf, u) = (a * a, k as f64, a.ln());
        sw += w;
        sk += w * kf;
        su += w * u;
        skk += w * kf * kf;
        sku += w * kf * u;
    }
    let den = sw * skk - sk * sk;
    let delta = -(sw * sku - sk * su) / den;
    (delta > 0.0 && delta.is_finite()).then(|| (delta / (4.0 * PI * PI + delta * delta).sqrt(), used - 1))
}

#[derive(Debug, Clone, Copy)]
struct EnvelopeFit {
    /// Decay rate σ (1/s).
    sigma: f64,
    /// The envelope extrapolated to t = 0. Taken as e^a here, on the fit's success path only:
    /// with `ln_amplitude.exp()` at the caller (`map_or` on the Option) the optimiser evaluated
    /// exp on the payload of a `None` and discarded the result, which valgrind reports as a
    /// branch on uninitialised memory inside exp (seen in bindings-c's C tests).
    amplitude: f64,
    /// Damped angular frequency from the phase slope (rad/s).
    omega_d: f64,
}

/// Weighted least-squares line fits to ln|z| = a − σ t and to the unwrapped phase arg z = φ + ω_d t
/// of the band-passed analytic signal z, weights |z|², from `guard_s` after the envelope maximum
/// until the envelope falls below max(2 %, 10 × noise) (and two periods before the end).
fn envelope_fit(
    z: &[Complex64],
    start: usize,
    noise: f64,
    fs: f64,
    f0: f64,
    guard_s: f64,
) -> Option<EnvelopeFit> {
    let n = z.len();
    let env: Vec<f64> = z.iter().map(|c| c.norm()).collect();
    let i_pk = start + env[start..].iter().enumerate().max_by(|a, b| a.1.total_cmp(b.1))?.0;
    let period = (fs / f0).ceil() as usize;
    let i0 = i_pk + (guard_s * fs).ceil() as usize;
    let thr = (0.02 * env[i_pk]).max(5.0 * noise);
    let i_end_max = n.saturating_sub(2 * period);
    if i0 + 2 * period >= i_end_max {
        return None;
    }
    let i1 = (i0..i_end_max).find(|&i| env[i] < thr).unwrap_or(i_end_max);
    if i1 < i0 + 2 * period {
        return None;
    }
    let (mut sw, mut st, mut su, mut stt, mut stu, mut sp, mut stp) = (0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0);
    let mut phase = z[i0].arg();
    for i in i0..i1 {
        if i > i0 {
            phase += (z[i] * z[i - 1].conj()).arg();
        }
        let e = env[i];
        let w = e * e;
        let t = i as f64 / fs;
        let u = e.ln();
        sw += w;
        st += w * t;
        su += w * u;
        stt += w * t * t;
        stu += w * t * u;
        sp += w * phase;
        stp += w * t * phase;
    }
    let den = sw * stt - st * st;
    if den <= 0.0 {
        return None;
    }
    let slope = (sw * stu - st * su) / den;
    let a = (su - slope * st) / sw;
    let omega_d = (sw * stp - st * sp) / den;
    (slope < 0.0 && slope.is_finite() && omega_d > 0.0).then_some(EnvelopeFit {
        sigma: -slope,
        amplitude: a.exp(),
        omega_d,
    })
}

/// Half-power crossings around bin `k` of the power spectrum `p` within [k_lo, k_hi].
fn half_power(p: &[f64], k: usize, k_lo: usize, k_hi: usize, df: f64) -> Option<(f64, f64)> {
    if k <= k_lo || k >= k_hi {
        return None;
    }
    let (off, peak) = parabolic_peak(p[k - 1], p[k], p[k + 1]);
    let _ = off;
    let half = 0.5 * peak;
    let mut j = k;
    while j > k_lo && p[j] > half {
        j -= 1;
    }
    if p[j] > half {
        return None;
    }
    let f1 = (j as f64 + (half - p[j]) / (p[j + 1] - p[j])) * df;
    let mut j = k;
    while j < k_hi && p[j] > half {
        j += 1;
    }
    if p[j] > half {
        return None;
    }
    let f2 = (j as f64 - (half - p[j]) / (p[j - 1] - p[j])) * df;
    Some((f1, f2))
}

struct PencilOut {
    modes: Vec<PencilMode>,
    order: usize,
    singular_values: Vec<f64>,
}

#[allow(clippy::too_many_arguments)]
fn run_pencil(
    bins: &[Complex64],
    nfft: usize,
    df: f64,
    fs: f64,
    n: usize,
    band: (f64, f64),
    start: usize,
    min_edge_hz: f64,
    opts: &RingdownOptions,
) -> Result<PencilOut> {
    let (lo, hi) = band;
    let edge = (0.15 * (hi - lo)).max(min_edge_hz).max(2.0 * df);
    let mask = BandMask { lo_hz: lo, hi_hz: hi, edge_hz: edge };
    let (s_lo, s_hi) = mask.support();
    let fc = 0.5 * (s_lo + s_hi);
    let kc = (fc / df).round() as usize;
    let need = ((s_hi - s_lo) / df).ceil() as usize + 8;
    let n_block = need.next_power_of_two().min(nfft);
    let y = band_analytic(bins, nfft, df, kc, n_block, &mask)?;
    let dec = nfft / n_block;
    let dt = dec as f64 / fs;
    let n_rec = n.div_ceil(dec).min(y.len());
    let yv = &y[..n_rec];
    let m_first = start.div_ceil(dec).min(n_rec.saturating_sub(1));
    let env: Vec<f64> = yv.iter().map(|v| v.norm()).collect();
    let i_pk =
        m_first + env[m_first..].iter().enumerate().max_by(|a, b| a.1.total_cmp(b.1)).map_or(0, |p| p.0);
    let m0 = i_pk + (mask.settle_s() / dt).ceil() as usize;
    let tail = &env[n_rec - (n_rec / 10).max(4).min(n_rec)..];
    let noise = rms(tail);
    let last_above = (m0..n_rec).rev().find(|&m| env[m] >= 1.5 * noise).unwrap_or(n_rec.saturating_sub(1));
    let m1 = (last_above + 1).min(m0 + 600).min(n_rec);
    if m1 < m0 + 24 {
        return Err(Error::invalid("x", "too little ringing after the peak for the matrix pencil"));
    }
    let fit = pencil::matrix_pencil(&yv[m0..m1], opts.max_modes, opts.pencil_gap)?;
    let order = fit.poles.len();
    let s0 = fit.singular_values.first().copied().unwrap_or(1.0);
    let singular_values = fit.singular_values.iter().map(|v| v / s0).collect();
    let ts = m0 as f64 * dt;
    let fcb = kc as f64 * df;
    let mut cand: Vec<(PencilMode, f64)> = Vec::new();
    for (z, r) in fit.poles {
        if z.norm() <= 0.0 || !z.is_finite() {
            continue;
        }
        let s = Complex64::new(z.norm().ln(), z.arg()) / dt;
        let sigma = -s.re;
        let wd = s.im + 2.0 * PI * fcb;
        let fd = wd / (2.0 * PI);
        let wn = wd.hypot(sigma);
        let zeta = sigma / wn;
        if !(fd >= lo && fd <= hi && zeta > 0.0 && zeta < 1.0) {
            continue;
        }
        let r0 = r * (-s * ts).exp();
        cand.push((
            PencilMode {
                frequency_hz: wn / (2.0 * PI),
                damped_frequency_hz: fd,
                damping_ratio: zeta,
                amplitude: r0.norm(),
                phase_rad: r0.arg(),
            },
            r.norm(),
        ));
    }
    let amax = cand.iter().map(|c| c.1).fold(0.0, f64::max);
    let mut modes: Vec<PencilMode> =
        cand.into_iter().filter(|c| c.1 >= opts.min_relative_amplitude * amax).map(|c| c.0).collect();
    modes.sort_by(|a, b| a.frequency_hz.total_cmp(&b.frequency_hz));
    Ok(PencilOut { modes, order, singular_values })
}

/// Identify natural frequencies and damping ratios from a free decay `x` sampled at `fs_hz`.
///
/// See the module docs for the methods and rules. Errors ([`Error::InvalidArgument`] naming
/// `x` unless said): fewer than [`MIN_SAMPLES`] samples or fewer than [`MIN_CYCLES`] cycles
/// ("too short"), a non-finite sample (its index), clipped fraction above
/// `max_clipped_fraction`, no dominant peak, more than [`MAX_SAMPLES`] samples
/// ([`Error::TooLarge`]), invalid options (the option named).
pub fn identify_ringdown(x: &[f64], fs_hz: f64, opts: &RingdownOptions) -> Result<RingdownId> {
    let fs = require_positive("fs_hz", fs_hz)?;
    opts.validate()?;
    check_record("x", x)?;
    let mut warnings = Vec::new();
    let clipping = detect_clipping(x, opts.clip_min_run);
    if clipping.fraction > opts.max_clipped_fraction {
        return Err(Error::invalid(
            "x",
            format!(
                "clipped: {} samples ({:.1} %) in {} runs at the record's max/min value, more than {:.1} %",
                clipping.samples,
                100.0 * clipping.fraction,
                clipping.runs,
                100.0 * opts.max_clipped_fraction
            ),
        ));
    }
    if clipping.clipped {
        warnings.push(format!(
            "clipped: {} samples in {} runs at the max/min value; time-domain fits start after sample {}",
            clipping.samples,
            clipping.runs,
            clipping.last_index.unwrap_or(0)
        ));
    }
    let n = x.len();
    let duration = n as f64 / fs;
    let offset = x.iter().sum::<f64>() / n as f64;
    let y: Vec<f64> = x.iter().map(|v| v - offset).collect();
    let nfft = (opts.zero_pad_factor * n).next_power_of_two();
    let bins = padded_spectrum(&y, nfft)?;
    let df = fs / nfft as f64;
    let p: Vec<f64> = bins.iter().map(|c| c.norm_sqr()).collect();

    let f_lo = opts.min_frequency_hz.unwrap_or(1.0 / duration).max(df);
    let f_hi = opts.max_frequency_hz.unwrap_or(0.45 * fs).min(0.5 * fs - 2.0 * df);
    let k_lo = (f_lo / df).ceil() as usize;
    let k_hi = ((f_hi / df).floor() as usize).min(p.len() - 2);
    if k_hi < k_lo + 8 {
        return Err(Error::invalid(
            "min_frequency_hz",
            format!("search range {f_lo:.4}..{f_hi:.4} Hz is empty or narrower than the resolution"),
        ));
    }
    let range = &p[k_lo..=k_hi];
    let k_pk = k_lo + range.iter().enumerate().max_by(|a, b| a.1.total_cmp(b.1)).map_or(0, |v| v.0);
    let med = median(range);
    if p[k_pk] <= 0.0 {
        return Err(Error::invalid("x", "record is constant after offset removal: no dominant peak"));
    }
    let peak_to_median = if med > 0.0 { p[k_pk] / med } else { f64::INFINITY };
    if peak_to_median < opts.min_peak_to_median {
        return Err(Error::invalid(
            "x",
            format!(
                "no dominant spectral peak: peak-to-median power ratio {peak_to_median:.1} < {} in {f_lo:.3}..{f_hi:.3} Hz",
                opts.min_peak_to_median
            ),
        ));
    }
    if k_pk == k_lo && opts.min_frequency_hz.is_none() {
        return Err(Error::invalid(
            "x",
            format!(
                "recording too short, or a drift: the largest spectral content is at or below the lowest \
                 searched frequency {f_lo:.4} Hz (set min_frequency_hz to skip a drift)"
            ),
        ));
    }
    if k_pk == k_lo || k_pk == k_hi {
        warnings.push("dominant peak at the edge of the searched range".into());
    }
    let f_peak = (k_pk as f64 + jacobsen_offset(&bins, k_pk, (nfft as f64 / n as f64).round() as usize)) * df;
    if f_peak * duration < MIN_CYCLES {
        return Err(Error::invalid(
            "x",
            format!(
                "recording too short: {:.2} cycles of the {f_peak:.3} Hz peak, need at least {MIN_CYCLES}",
                f_peak * duration
            ),
        ));
    }

    // (3) half-power bandwidth.
    let hp_band = half_power(&p, k_pk, k_lo, k_hi, df);
    let zeta_hp = hp_band.map(|(f1, f2)| (f2 - f1) / (2.0 * f_peak)).filter(|z| *z > 0.0 && *z < 1.0);

    // Band-pass (zero phase) and analytic signal.
    let edge =
        (f_peak * (0.5 * opts.band_half_width).max(5.0 * zeta_hp.unwrap_or(0.0)).min(0.3)).max(2.0 * df);
    let half_w = 2.0 * edge;
    let mask = BandMask { lo_hz: f_peak, hi_hz: f_peak, edge_hz: edge };
    let z = band_analytic(&bins, nfft, df, 0, nfft, &mask)?;
    let xb: Vec<f64> = z[..n].iter().map(|c| c.re).collect();
    let env: Vec<f64> = z[..n].iter().map(|c| c.norm()).collect();
    let noise_rms = rms(&xb[n - (n / 10).max(8)..]);
    let start = clipping.last_index.map_or(0, |i| (i + 1).min(n - 1));
    let guard_s = mask.settle_s();
    let env_max = env[start..].iter().copied().fold(0.0, f64::max);
    let env_end = rms(&env[n - (n / 10).max(8)..]);
    if env_end > 0.1 * env_max {
        warnings.push(format!(
            "record ends before the ring-down decays (envelope at the end {:.0} % of its maximum): \
             estimates are biased, half-power most",
            100.0 * env_end / env_max
        ));
    }

    // (1) logarithmic decrement, (2) envelope fit.
    let env_fit = envelope_fit(&z[..n], start, noise_rms, fs, f_peak, guard_s);
    let ld = log_decrement(&xb, &env, start, noise_rms, fs, f_peak, guard_s);
    let zeta_env = env_fit.map(|e| e.sigma / e.omega_d.hypot(e.sigma));
    let mut avail: Vec<f64> = [ld.map(|v| v.0), zeta_env, zeta_hp].into_iter().flatten().collect();
    avail.sort_by(|a, b| a.total_cmp(b));
    let single = if avail.is_empty() { None } else { Some(median(&avail)) };
    let spread = match (single, avail.len()) {
        (Some(m), k) if k >= 2 && m > 0.0 => (avail[k - 1] - avail[0]) / m,
        _ => 0.0,
    };
    let methods = MethodEstimates {
        dominant_frequency_hz: f_peak,
        log_decrement: ld.map(|v| v.0),
        log_decrement_cycles: ld.map_or(0, |v| v.1),
        envelope_fit: zeta_env,
        half_power: zeta_hp,
        half_power_band_hz: hp_band,
        median: single,
        spectral_frequency_hz: None,
        phase_frequency_hz: None,
        spread,
    };

    // (5) matrix pencil over the band of all significant peaks.
    let band = match opts.pencil_band_hz {
        Some(bnd) => bnd,
        None => {
            // Significant peaks: ≥ 1 % of the dominant power and ≥ the peak-to-median threshold,
            // local maxima over ± two unpadded bins, away from the search edges.
            let thr = (1e-2 * p[k_pk]).max(opts.min_peak_to_median * med);
            let w = 2 * opts.zero_pad_factor;
            let mut fmin = f_peak;
            let mut fmax = f_peak;
            for k in k_lo + w..k_hi.saturating_sub(w) {
                if p[k] >= thr && (k - w..=k + w).all(|j| p[j] <= p[k]) {
                    let f = k as f64 * df;
                    fmin = fmin.min(f);
                    fmax = fmax.max(f);
                }
            }
            let r = opts.band_half_width.max(10.0 * zeta_hp.unwrap_or(0.0)).min(0.6);
            (
                (fmin * (1.0 - r)).max(0.5 * f_lo),
                (fmax * (1.0 + r)).min(0.9 * f_hi.max(f_lo)).max(f_peak * 1.01),
            )
        }
    };
    let (pencil_modes, model_order, pencil_singular_values) =
        match run_pencil(&bins, nfft, df, fs, n, band, start, edge, opts) {
            Ok(po) => (po.modes, po.order, po.singular_values),
            Err(e) => {
                warnings.push(format!("matrix pencil failed: {e}"));
                (Vec::new(), 0, Vec::new())
            }
        };

    // Dominant pencil mode: nearest the spectral peak, within the band-pass flat band.
    let dom_pencil = pencil_modes
        .iter()
        .enumerate()
        .filter(|(_, m)| (m.damped_frequency_hz - f_peak).abs() <= half_w)
        .min_by(|a, b| {
            (a.1.damped_frequency_hz - f_peak).abs().total_cmp(&(b.1.damped_frequency_hz - f_peak).abs())
        })
        .map(|(i, _)| i);
    let close_modes = dom_pencil.is_some_and(|d| {
        let ad = pencil_modes[d].amplitude;
        pencil_modes.iter().enumerate().any(|(i, m)| {
            i != d && m.amplitude >= 0.1 * ad && (m.damped_frequency_hz - f_peak).abs() < half_w
        })
    });
    if close_modes {
        warnings.push(
            "another mode lies inside the band-pass band: single-mode estimates see a beat; \
             the matrix pencil values are used for the dominant mode"
                .into(),
        );
    }
    let mut frequency_hz: Vec<f64> = pencil_modes.iter().map(|m| m.frequency_hz).collect();
    let mut damping_ratio: Vec<f64> = pencil_modes.iter().map(|m| m.damping_ratio).collect();
    let mut amplitude: Vec<f64> = pencil_modes.iter().map(|m| m.amplitude).collect();
    // Best natural frequency of the dominant mode: the median of f_n from the spectral peak
    // (receptance peak at f_n √(1 − 2ζ²)), from the phase slope (f_n = f_d/√(1 − ζ²)) and from
    // the pencil, where available.
    let mut methods = methods;
    let single_mode = single.map(|zeta| {
        let f_spec = if 2.0 * zeta * zeta < 1.0 { f_peak / (1.0 - 2.0 * zeta * zeta).sqrt() } else { f_peak };
        let f_phase = env_fit.map(|e| e.omega_d / (2.0 * PI) / (1.0 - zeta * zeta).sqrt());
        methods.spectral_frequency_hz = Some(f_spec);
        methods.phase_frequency_hz = f_phase;
        let mut cands: Vec<f64> = [Some(f_spec), f_phase].into_iter().flatten().collect();
        if let Some(d) = dom_pencil {
            cands.push(pencil_modes[d].frequency_hz);
        }
        (median(&cands), zeta, env_fit.map_or(env_max, |e| e.amplitude))
    });
    let (dominant, dominant_source) = match (dom_pencil, single_mode, close_modes) {
        (Some(d), _, true) | (Some(d), None, _) => (d, EstimateSource::MatrixPencil),
        (Some(d), Some((f, zeta, a)), false) => {
            frequency_hz[d] = f;
            damping_ratio[d] = zeta;
            amplitude[d] = a;
            (d, EstimateSource::SingleMode)
        }
        (None, Some((f, zeta, a)), _) => {
            let d = frequency_hz.iter().take_while(|&&v| v < f).count();
            frequency_hz.insert(d, f);
            damping_ratio.insert(d, zeta);
            amplitude.insert(d, a);
            (d, EstimateSource::SingleMode)
        }
        (None, None, _) => {
            return Err(Error::NoConvergence {
                what: "ring-down damping".into(),
                reason: format!("no method gave an estimate at {f_peak:.3} Hz ({})", warnings.join("; ")),
            });
        }
    };

    Ok(RingdownId {
        frequency_hz,
        damping_ratio,
        amplitude,
        dominant,
        dominant_source,
        methods,
        pencil: pencil_modes,
        pencil_band_hz: band,
        model_order,
        pencil_singular_values,
        close_modes,
        clipped: clipping.clipped,
        clipping,
        offset,
        peak_to_median,
        noise_rms,
        warnings,
    })
}

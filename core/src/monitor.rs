//! Image motion from ground acceleration: an offline PSD estimate and a streaming monitor.
//!
//! # Offline estimate
//! [`image_motion_from_ground_acceleration`] is a summary of [`Model::image_motion`]: per image axis,
//! σ² = ∫ Σ_axes |H_image,axis(f)|² · S_acc,axis(f) / (2πf)⁴ df with the trapezoid rule on the
//! caller's grid, where H is the model's image FRF for unit ground *displacement* (rad/m) and
//! S_acc the one-sided ground-acceleration PSD ((m/s²)²/Hz). Ground axes are taken as
//! uncorrelated (no cross-spectra). The probability of being outside a radius R uses the
//! isotropic Rayleigh law P = exp(−R²/2σ²) with σ² = the mean of the two axis variances; for
//! unequal axes this is an approximation (the exact law needs a numerical integral).
//!
//! # Streaming monitor
//! [`Monitor`] turns 1–3 accelerometer channels (m/s², ground x/y/z or whatever axes a
//! measured calibration used) into sensor-plane image motion and reports; it never commands
//! anything.
//! - **Filters.** At creation one FIR filter per accelerometer axis × image axis is designed by
//!   frequency sampling the accelerometer-to-image FRF G(f) (rad per m/s²) on the bins
//!   k·fs/L, k = 0..L/2 of an L-tap real FFT (`fir_taps` = L). From a model, G = H/(−ω²) with H
//!   the image FRF for ground displacement. The sampled response is multiplied by a causal
//!   4th-order Butterworth high-pass at `highpass_hz` (accelerometers cannot give displacement
//!   near DC; the DC bin is zero) and by a delay of L/8 samples, inverse-transformed, and
//!   windowed: a half-Hann rise over the first L/8 taps (the non-causal wrap-around), flat, and a
//!   half-Hann fall over the last L/4 taps. The output therefore lags the motion by
//!   `latency_s` = (L/8)/fs. The Nyquist bin is set to zero. A measured calibration is
//!   interpolated linearly (real and imaginary parts) between its grid points; bins outside its
//!   grid get a zero response (the monitor is blind there: the policy is explicit, not an
//!   extrapolation).
//! - **Push** runs the FIRs from double-length ring buffers (O(L) per sample and axis pair, no
//!   allocation, no locks) and keeps a ring of per-sample squared image motion over the last
//!   `window_s` with compensated running sums (O(1) per sample).
//! - **Flag.** ABOVE turns on when the radial RMS over the window exceeds `threshold_arcsec`
//!   and off when it drops below `threshold_arcsec × (1 − hysteresis)`, but not before it has
//!   been on for `hold_off_s`.
//! - **UNSAFE** (never quiet by default): until L + W samples have arrived since creation,
//!   reset, a gap or a bad sample (the filters and the window must fill); when the newest
//!   sample is older than `max_age_s` at the last [`Monitor::tick`]; after a non-finite sample
//!   (the block is refused and the filters restart).
//! - **Exposures.** [`Monitor::exposure_begin`] / [`Monitor::exposure_end`] give the radial RMS
//!   of the image motion over the exposure span (samples attributed to t − `latency_s`), its
//!   coverage and the fraction of time above threshold.

use crate::error::{Error, Result, require_finite, require_non_negative, require_positive};
use crate::image::{ImageOptions, p_outside_isotropic};
use crate::model::{GROUND_INPUTS, Model};
use crate::response::Disturbances;
use crate::spectrum::{Psd, Quantity};
use crate::units::ARCSEC_PER_RAD;
use num_complex::Complex64;
use std::f64::consts::PI;

/// Largest FIR length accepted.
pub const MAX_FIR_TAPS: usize = 1 << 16;
/// Longest RMS window accepted (samples).
pub const MAX_WINDOW_SAMPLES: usize = 1 << 22;

/// Image-motion estimate from ground-acceleration PSDs (the monitor's quick summary; the full
/// result with spectra and shares is [`crate::image::ImageMotion`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GroundImageEstimate {
    pub rms_x_arcsec: f64,
    pub rms_y_arcsec: f64,
    /// sqrt(σx² + σy²).
    pub rms_radial_arcsec: f64,
    pub rms_x_um: f64,
    pub rms_y_um: f64,
    pub rms_radial_um: f64,
    pub rms_x_px: f64,
    pub rms_y_px: f64,
    pub rms_radial_px: f64,
    /// Isotropic σ (per axis) used for `p_outside`: sqrt((σx² + σy²)/2), in px.
    pub sigma_iso_px: f64,
    /// The radius the probability refers to (px).
    pub radius_px: f64,
    /// exp(−R²/2σ_iso²): probability that the star is farther than `radius_px` from its mean.
    pub p_outside: f64,
}

/// Image motion of `model` for ground-acceleration PSDs ((m/s²)²/Hz, one-sided) on `freq_hz`
/// for ground x, y, z (`None` for an axis without excitation), and the probability of being
/// outside `radius_px`. See the module docs for the formula.
pub fn image_motion_from_ground_acceleration(
    model: &Model,
    freq_hz: &[f64],
    acc_psd: [Option<&[f64]>; 3],
    radius_px: f64,
) -> Result<GroundImageEstimate> {
    let grid = crate::grid::FreqGrid::new(freq_hz.to_vec())?;
    if grid.len() < 2 {
        return Err(Error::InvalidGrid {
            name: "freq_hz".into(),
            reason: "the trapezoid rule needs at least 2 points".into(),
        });
    }
    require_non_negative("radius_px", radius_px)?;
    let optics = model
        .optics()
        .ok_or_else(|| Error::invalid("model", "has no [optics] section: image motion is undefined"))?
        .clone();
    let mut d = Disturbances::default();
    for (a, p) in acc_psd.iter().enumerate() {
        if let Some(p) = p {
            let name = format!("acc_psd_{}", ["x", "y", "z"][a]);
            if p.len() != freq_hz.len() {
                return Err(Error::shape(name, freq_hz.len(), p.len()));
            }
            let psd = Psd::new(freq_hz.to_vec(), p.to_vec(), Quantity::Acceleration)
                .map_err(|e| Error::invalid(name, e.to_string()))?;
            d.ground[a] = Some(psd);
        }
    }
    if d.ground.iter().all(|g| g.is_none()) {
        return Err(Error::invalid("acc_psd", "at least one ground axis needs a PSD"));
    }
    // The one image-motion computation of the library (image.rs), without per-mode shares.
    let opts = ImageOptions { skip_mode_shares: true, ..Default::default() };
    let im = model.image_motion(&grid, &d, &opts)?;
    let [sx, sy] = im.per_axis_arcsec.map(|a| a / ARCSEC_PER_RAD);
    let sr = (sx * sx + sy * sy).sqrt();
    let um_per_rad = optics.focal_length_mm * 1000.0;
    let px_per_rad = um_per_rad / optics.pixel_um;
    let sigma_iso_px = sr / 2f64.sqrt() * px_per_rad;
    let p_outside = if sigma_iso_px > 0.0 {
        p_outside_isotropic(radius_px, sigma_iso_px)
    } else if radius_px > 0.0 {
        0.0
    } else {
        1.0
    };
    Ok(GroundImageEstimate {
        rms_x_arcsec: sx * ARCSEC_PER_RAD,
        rms_y_arcsec: sy * ARCSEC_PER_RAD,
        rms_radial_arcsec: sr * ARCSEC_PER_RAD,
        rms_x_um: sx * um_per_rad,
        rms_y_um: sy * um_per_rad,
        rms_radial_um: sr * um_per_rad,
        rms_x_px: sx * px_per_rad,
        rms_y_px: sy * px_per_rad,
        rms_radial_px: sr * px_per_rad,
        sigma_iso_px,
        radius_px,
        p_outside,
    })
}

/// Settings of a [`Monitor`]. The defaults are typical starting values (common practice, no
/// source), not recommendations for a given rig.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub struct MonitorConfig {
    /// Accelerometer sample rate (Hz).
    pub sample_rate_hz: f64,
    /// Length of the running RMS window (s); rounded to whole samples.
    pub window_s: f64,
    /// Radial RMS (arcsec) above which the flag turns on.
    pub threshold_arcsec: f64,
    /// The flag turns off below threshold × (1 − hysteresis); 0 ≤ hysteresis < 1.
    pub hysteresis: f64,
    /// Minimum time the flag stays on (s).
    pub hold_off_s: f64,
    /// Data older than this at a `tick` reads as UNSAFE (s).
    pub max_age_s: f64,
    /// Corner of the 4th-order Butterworth high-pass (Hz); at least 4·fs/L, below fs/2.
    pub highpass_hz: f64,
    /// FIR length L (even, 32 ..= 65536).
    pub fir_taps: usize,
}

impl Default for MonitorConfig {
    fn default() -> Self {
        MonitorConfig {
            sample_rate_hz: 200.0,
            window_s: 10.0,
            threshold_arcsec: 1.0,
            hysteresis: 0.2,
            hold_off_s: 2.0,
            max_age_s: 0.5,
            highpass_hz: 1.0,
            fir_taps: 1024,
        }
    }
}

impl MonitorConfig {
    fn validate(&self) -> Result<()> {
        let fs = require_positive("sample_rate_hz", self.sample_rate_hz)?;
        require_positive("window_s", self.window_s)?;
        require_positive("threshold_arcsec", self.threshold_arcsec)?;
        require_finite("hysteresis", self.hysteresis)?;
        if !(0.0..1.0).contains(&self.hysteresis) {
            return Err(Error::OutOfRange {
                what: "hysteresis".into(),
                value: self.hysteresis,
                min: 0.0,
                max: 1.0,
            });
        }
        require_non_negative("hold_off_s", self.hold_off_s)?;
        require_positive("max_age_s", self.max_age_s)?;
        let l = self.fir_taps;
        if l > MAX_FIR_TAPS {
            return Err(Error::TooLarge { what: "fir_taps".into(), value: l, limit: MAX_FIR_TAPS });
        }
        if l < 32 || !l.is_multiple_of(2) {
            return Err(Error::invalid("fir_taps", format!("must be even and >= 32, got {l}")));
        }
        let w = (self.window_s * fs).round();
        if w > MAX_WINDOW_SAMPLES as f64 {
            return Err(Error::TooLarge {
                what: "window_s × sample_rate_hz (samples)".into(),
                value: w.min(usize::MAX as f64) as usize,
                limit: MAX_WINDOW_SAMPLES,
            });
        }
        if w < 1.0 {
            return Err(Error::invalid("window_s", format!("is shorter than one sample at {fs} Hz")));
        }
        let hp = require_positive("highpass_hz", self.highpass_hz)?;
        let (lo, hi) = (4.0 * fs / l as f64, fs / 2.0);
        if !(lo..hi).contains(&hp) {
            return Err(Error::OutOfRange { what: "highpass_hz".into(), value: hp, min: lo, max: hi });
        }
        Ok(())
    }
}

/// What the monitor reports.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MonitorState {
    /// Valid, fresh data and the flag is off.
    Quiet,
    /// Valid, fresh data and the flag is on.
    Above,
    /// No trustworthy reading (see [`UnsafeReason`]).
    Unsafe,
}

/// Why the monitor reads UNSAFE.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum UnsafeReason {
    /// Not unsafe.
    None,
    /// Filling the filters and the window after creation or reset.
    WarmingUp,
    /// Refilling after a non-finite sample.
    BadSample,
    /// Refilling after a gap in the sample timestamps.
    Gap,
    /// The newest sample is older than `max_age_s` at the last tick (or no sample yet).
    Stale,
}

/// The monitor's current reading.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Reading {
    pub state: MonitorState,
    pub reason: UnsafeReason,
    /// Radial RMS over the window (arcsec); NaN until the window is valid.
    pub rms_arcsec: f64,
    pub rms_x_arcsec: f64,
    pub rms_y_arcsec: f64,
    /// Radial RMS in pixels (needs the plate scale).
    pub rms_px: f64,
    /// Timestamp of the newest sample (s, caller's clock); NaN before the first.
    pub last_sample_time_s: f64,
    /// `now` of the last tick minus `last_sample_time_s`; NaN before both exist.
    pub age_s: f64,
}

/// One-number quality of an exposure.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ExposureQuality {
    pub duration_s: f64,
    /// Radial RMS of the image motion over the valid samples of the span (arcsec); NaN if none.
    pub rms_arcsec: f64,
    pub rms_px: f64,
    /// Largest windowed RMS seen during the span (arcsec); NaN if none.
    pub max_window_rms_arcsec: f64,
    /// Valid samples counted / samples expected from the duration, at most 1.
    pub coverage: f64,
    /// Fraction of the counted samples during which the flag was on.
    pub above_fraction: f64,
}

/// Neumaier-compensated running sum (adds and removes without drift).
#[derive(Debug, Clone, Copy, Default)]
struct Sum {
    s: f64,
    c: f64,
}

impl Sum {
    fn add(&mut self, x: f64) {
        let t = self.s + x;
        if self.s.abs() >= x.abs() {
            self.c += (self.s - t) + x;
        } else {
            self.c += (x - t) + self.s;
        }
        self.s = t;
    }
    fn value(&self) -> f64 {
        (self.s + self.c).max(0.0)
    }
}

#[derive(Debug, Clone, Copy)]
struct Exposure {
    t_begin: f64,
    sum: f64,
    n: u64,
    n_above: u64,
    max_rms: f64,
}

/// A streaming image-motion monitor; single producer (`&mut self` for every update).
#[derive(Debug, Clone)]
pub struct Monitor {
    cfg: MonitorConfig,
    n_axes: usize,
    taps: usize,
    plate_scale_arcsec_per_px: f64,
    /// FIR coefficients (arcsec per m/s² per tap), index [(o * n_axes + a) * L + n].
    h: Vec<f64>,
    /// Per-axis double-length history, index [a * 2L + i].
    hist: Vec<f64>,
    pos: usize,
    /// Ring of per-sample (x², y²) in arcsec².
    ring: Vec<[f64; 2]>,
    ring_pos: usize,
    sums: [Sum; 2],
    /// Samples since the filters last restarted (saturating).
    since_restart: u64,
    restart_reason: UnsafeReason,
    flag: bool,
    flag_on_for: u64,
    hold_samples: u64,
    last_t: Option<f64>,
    now: Option<f64>,
    exposure: Option<Exposure>,
}

impl Monitor {
    /// A monitor for `model`'s image motion (needs `[optics]`) from accelerometers along the
    /// ground axes in `axes` (letters from "xyz", in the order the samples are interleaved).
    pub fn from_model(model: &Model, axes: &str, cfg: &MonitorConfig) -> Result<Monitor> {
        cfg.validate()?;
        let optics = model
            .optics()
            .ok_or_else(|| Error::invalid("model", "has no [optics] section: image motion is undefined"))?;
        let idx = parse_axes(axes)?;
        let inputs: Vec<&str> = idx.iter().map(|&a| GROUND_INPUTS[a]).collect();
        let l = cfg.fir_taps;
        let fs = cfg.sample_rate_hz;
        let bins: Vec<f64> = (1..=l / 2).map(|k| k as f64 * fs / l as f64).collect();
        let frf = model.frf(&bins, &inputs, &["image_x", "image_y"])?;
        let na = idx.len();
        let mut g = vec![Complex64::default(); (l / 2 + 1) * 2 * na];
        for (k, &f) in bins.iter().enumerate() {
            let w2 = (2.0 * PI * f).powi(2);
            for o in 0..2 {
                for a in 0..na {
                    g[((k + 1) * 2 + o) * na + a] = -frf.data[[k, o, a]] / w2;
                }
            }
        }
        Monitor::design(cfg, na, optics.plate_scale_arcsec_per_px(), &g)
    }

    /// A monitor from a measured accelerometer-to-image FRF (rad per m/s²) on `freq_hz`,
    /// laid out (n_freq, 2 image axes, n_axes) row-major, for `n_axes` = 1..=3 channels.
    pub fn from_calibration(
        freq_hz: &[f64],
        n_axes: usize,
        frf: &[Complex64],
        plate_scale_arcsec_per_px: f64,
        cfg: &MonitorConfig,
    ) -> Result<Monitor> {
        cfg.validate()?;
        crate::grid::validate_freqs("calibration freq_hz", freq_hz)?;
        require_positive("plate_scale_arcsec_per_px", plate_scale_arcsec_per_px)?;
        if !(1..=3).contains(&n_axes) {
            return Err(Error::invalid("n_axes", format!("must be 1, 2 or 3, got {n_axes}")));
        }
        let per = 2 * n_axes;
        if frf.len() != freq_hz.len() * per {
            return Err(Error::shape(
                "calibration FRF (n_freq × 2 × n_axes)",
                freq_hz.len() * per,
                frf.len(),
            ));
        }
        if let Some(i) = frf.iter().position(|c| !(c.re.is_finite() && c.im.is_finite())) {
            return Err(Error::invalid(
                "calibration FRF",
                format!("value {} at index {i} is not finite", frf[i]),
            ));
        }
        let l = cfg.fir_taps;
        let fs = cfg.sample_rate_hz;
        let mut g = vec![Complex64::default(); (l / 2 + 1) * per];
        let (f0, f1) = (freq_hz[0], freq_hz[freq_hz.len() - 1]);
        let mut j = 0;
        for k in 1..=l / 2 {
            let f = k as f64 * fs / l as f64;
            if f < f0 || f > f1 {
                continue;
            }
            while j + 1 < freq_hz.len() && freq_hz[j + 1] < f {
                j += 1;
            }
            let (lo, hi) = if j + 1 < freq_hz.len() { (j, j + 1) } else { (j, j) };
            let t = if hi > lo { (f - freq_hz[lo]) / (freq_hz[hi] - freq_hz[lo]) } else { 0.0 };
            for c in 0..per {
                g[k * per + c] = frf[lo * per + c] * (1.0 - t) + frf[hi * per + c] * t;
            }
        }
        Monitor::design(cfg, n_axes, plate_scale_arcsec_per_px, &g)
    }

    /// Design the FIRs from G on the bins (L/2 + 1, 2, n_axes), rad per m/s².
    fn design(cfg: &MonitorConfig, n_axes: usize, plate_scale: f64, g: &[Complex64]) -> Result<Monitor> {
        let l = cfg.fir_taps;
        let fs = cfg.sample_rate_hz;
        let pre = l / 8;
        let fall = l / 4;
        let mut planner = realfft::RealFftPlanner::<f64>::new();
        let c2r = planner.plan_fft_inverse(l);
        let mut spec = c2r.make_input_vec();
        let mut out = c2r.make_output_vec();
        let mut h = vec![0.0; 2 * n_axes * l];
        let wc = 2.0 * PI * cfg.highpass_hz;
        // Butterworth 4th-order denominators: s² + 2 sin(π/8) s ωc + ωc², s² + 2 sin(3π/8) s ωc + ωc².
        let (d1, d2) = (2.0 * (PI / 8.0).sin(), 2.0 * (3.0 * PI / 8.0).sin());
        for o in 0..2 {
            for a in 0..n_axes {
                for (k, sk) in spec.iter_mut().enumerate() {
                    *sk = Complex64::default();
                    if k == 0 || k == l / 2 {
                        continue;
                    }
                    let w = 2.0 * PI * k as f64 * fs / l as f64;
                    let s = Complex64::new(0.0, w);
                    let hp =
                        s.powi(4) / ((s * s + s * (d1 * wc) + wc * wc) * (s * s + s * (d2 * wc) + wc * wc));
                    let delay = Complex64::from_polar(1.0, -w * pre as f64 / fs);
                    *sk = g[(k * 2 + o) * n_axes + a] * hp * delay * ARCSEC_PER_RAD;
                }
                c2r.process(&mut spec, &mut out)
                    .map_err(|e| Error::invalid("fir design", format!("inverse FFT failed: {e}")))?;
                let taps = &mut h[(o * n_axes + a) * l..(o * n_axes + a + 1) * l];
                for (n, (t, v)) in taps.iter_mut().zip(&out).enumerate() {
                    let win = if n < pre {
                        0.5 * (1.0 - (PI * n as f64 / pre as f64).cos())
                    } else if n >= l - fall {
                        0.5 * (1.0 + (PI * (n - (l - fall)) as f64 / fall as f64).cos())
                    } else {
                        1.0
                    };
                    *t = v / l as f64 * win;
                }
            }
        }
        let w = (cfg.window_s * fs).round() as usize;
        Ok(Monitor {
            cfg: cfg.clone(),
            n_axes,
            taps: l,
            plate_scale_arcsec_per_px: plate_scale,
            h,
            hist: vec![0.0; n_axes * 2 * l],
            pos: 0,
            ring: vec![[0.0; 2]; w],
            ring_pos: 0,
            sums: [Sum::default(); 2],
            since_restart: 0,
            restart_reason: UnsafeReason::WarmingUp,
            flag: false,
            flag_on_for: 0,
            hold_samples: (cfg.hold_off_s * fs).ceil() as u64,
            last_t: None,
            now: None,
            exposure: None,
        })
    }

    /// Number of accelerometer channels per sample.
    pub fn n_axes(&self) -> usize {
        self.n_axes
    }
    /// FIR length L.
    pub fn fir_taps(&self) -> usize {
        self.taps
    }
    /// Delay of the image-motion estimate behind the accelerometer data (s) = (L/8)/fs.
    pub fn latency_s(&self) -> f64 {
        (self.taps / 8) as f64 / self.cfg.sample_rate_hz
    }
    /// RMS window in samples.
    pub fn window_samples(&self) -> usize {
        self.ring.len()
    }
    /// Samples needed after a restart before the reading is valid: L + window.
    pub fn warmup_samples(&self) -> usize {
        self.taps + self.ring.len()
    }
    /// The settings.
    pub fn config(&self) -> &MonitorConfig {
        &self.cfg
    }
    /// Plate scale used for pixels (arcsec/px).
    pub fn plate_scale_arcsec_per_px(&self) -> f64 {
        self.plate_scale_arcsec_per_px
    }
    /// FIR coefficients for image axis `o` (0 = x, 1 = y) and channel `a`, arcsec per (m/s²).
    pub fn fir(&self, o: usize, a: usize) -> Option<&[f64]> {
        if o < 2 && a < self.n_axes {
            let l = self.taps;
            Some(&self.h[(o * self.n_axes + a) * l..(o * self.n_axes + a + 1) * l])
        } else {
            None
        }
    }

    /// Clear filters, window, flag, clock and any open exposure; the monitor reads UNSAFE
    /// (warming up) until it has refilled.
    pub fn reset(&mut self) {
        self.restart(UnsafeReason::WarmingUp);
        self.last_t = None;
        self.now = None;
        self.exposure = None;
    }

    fn restart(&mut self, why: UnsafeReason) {
        self.hist.fill(0.0);
        self.ring.fill([0.0; 2]);
        self.sums = [Sum::default(); 2];
        self.since_restart = 0;
        self.restart_reason = why;
        self.flag = false;
        self.flag_on_for = 0;
    }

    fn valid(&self) -> bool {
        self.since_restart >= self.warmup_samples() as u64
    }

    /// Feed a block of `samples` (m/s²), interleaved by channel (n_samples × n_axes), whose
    /// first sample was taken at `t0_s` (s, the caller's clock; later samples at t0 + i/fs).
    /// A jump of more than half a sample from the expected time is a gap: the filters restart.
    /// A non-finite sample refuses the whole block, restarts the filters and returns an error.
    /// Allocates nothing.
    pub fn push(&mut self, t0_s: f64, samples: &[f64], n_axes: usize) -> Result<()> {
        if n_axes != self.n_axes {
            return Err(Error::shape("samples per time step (n_axes)", self.n_axes, n_axes));
        }
        if samples.is_empty() {
            return Err(Error::invalid("samples", "the block is empty"));
        }
        if !samples.len().is_multiple_of(n_axes) {
            return Err(Error::invalid(
                "samples",
                format!("length {} is not a multiple of n_axes = {n_axes}", samples.len()),
            ));
        }
        require_finite("t0_s", t0_s)?;
        let fs = self.cfg.sample_rate_hz;
        let n = samples.len() / n_axes;
        if let Some(last) = self.last_t {
            let expected = last + 1.0 / fs;
            if t0_s < expected - 0.5 / fs {
                return Err(Error::invalid(
                    "t0_s",
                    format!("{t0_s} s goes back before the next expected sample time {expected} s"),
                ));
            }
            if t0_s > expected + 0.5 / fs {
                self.restart(UnsafeReason::Gap);
            }
        }
        if let Some(i) = samples.iter().position(|v| !v.is_finite()) {
            self.restart(UnsafeReason::BadSample);
            self.last_t = Some(t0_s + (n - 1) as f64 / fs);
            return Err(Error::invalid(
                "samples",
                format!(
                    "sample {} of channel {} is {}; the monitor restarts (UNSAFE)",
                    i / n_axes,
                    i % n_axes,
                    samples[i]
                ),
            ));
        }
        let l = self.taps;
        let latency = self.latency_s();
        for s in 0..n {
            self.pos = if self.pos == 0 { l - 1 } else { self.pos - 1 };
            for a in 0..n_axes {
                let x = samples[s * n_axes + a];
                self.hist[a * 2 * l + self.pos] = x;
                self.hist[a * 2 * l + self.pos + l] = x;
            }
            let mut y = [0.0; 2];
            for (o, yo) in y.iter_mut().enumerate() {
                for a in 0..n_axes {
                    let h = &self.h[(o * n_axes + a) * l..(o * n_axes + a + 1) * l];
                    let x = &self.hist[a * 2 * l + self.pos..a * 2 * l + self.pos + l];
                    *yo += h.iter().zip(x).map(|(h, x)| h * x).sum::<f64>();
                }
            }
            let sq = [y[0] * y[0], y[1] * y[1]];
            let old = self.ring[self.ring_pos];
            self.ring[self.ring_pos] = sq;
            self.ring_pos = (self.ring_pos + 1) % self.ring.len();
            for k in 0..2 {
                self.sums[k].add(sq[k]);
                self.sums[k].add(-old[k]);
            }
            self.since_restart = self.since_restart.saturating_add(1);
            if self.valid() {
                let rms = self.window_rms()[2];
                let thr = self.cfg.threshold_arcsec;
                if self.flag {
                    self.flag_on_for = self.flag_on_for.saturating_add(1);
                    if rms < thr * (1.0 - self.cfg.hysteresis) && self.flag_on_for >= self.hold_samples {
                        self.flag = false;
                    }
                } else if rms > thr {
                    self.flag = true;
                    self.flag_on_for = 0;
                }
                let t = t0_s + s as f64 / fs - latency;
                if let Some(e) = self.exposure.as_mut().filter(|e| t >= e.t_begin) {
                    e.sum += sq[0] + sq[1];
                    e.n += 1;
                    e.n_above += u64::from(self.flag);
                    e.max_rms = e.max_rms.max(rms);
                }
            }
        }
        self.last_t = Some(t0_s + (n - 1) as f64 / fs);
        Ok(())
    }

    /// [x, y, radial] RMS over the window (arcsec).
    fn window_rms(&self) -> [f64; 3] {
        let w = self.ring.len() as f64;
        let (x, y) = (self.sums[0].value() / w, self.sums[1].value() / w);
        [x.sqrt(), y.sqrt(), (x + y).sqrt()]
    }

    /// Set the caller's clock to `now_s` and return the reading (staleness is judged here).
    pub fn tick(&mut self, now_s: f64) -> Result<Reading> {
        require_finite("now_s", now_s)?;
        self.now = Some(now_s);
        Ok(self.reading())
    }

    /// The reading as of the last tick (no clock update).
    pub fn reading(&self) -> Reading {
        let valid = self.valid();
        let [rx, ry, rr] = if valid { self.window_rms() } else { [f64::NAN; 3] };
        let last = self.last_t.unwrap_or(f64::NAN);
        let age = self.now.map_or(f64::NAN, |n| n - last);
        let (state, reason) = if !valid {
            (MonitorState::Unsafe, self.restart_reason)
        } else if age.is_nan() || age > self.cfg.max_age_s {
            (MonitorState::Unsafe, UnsafeReason::Stale)
        } else if self.flag {
            (MonitorState::Above, UnsafeReason::None)
        } else {
            (MonitorState::Quiet, UnsafeReason::None)
        };
        Reading {
            state,
            reason,
            rms_arcsec: rr,
            rms_x_arcsec: rx,
            rms_y_arcsec: ry,
            rms_px: rr / self.plate_scale_arcsec_per_px,
            last_sample_time_s: last,
            age_s: age,
        }
    }

    /// Start an exposure at `t_s`: samples whose motion time (sample time − latency) is at or
    /// after `t_s` count towards it.
    pub fn exposure_begin(&mut self, t_s: f64) -> Result<()> {
        require_finite("t_s", t_s)?;
        if self.exposure.is_some() {
            return Err(Error::invalid("exposure_begin", "an exposure is already open"));
        }
        self.exposure = Some(Exposure { t_begin: t_s, sum: 0.0, n: 0, n_above: 0, max_rms: f64::NAN });
        Ok(())
    }

    /// End the open exposure at `t_s` and return its quality. Push the data up to
    /// `t_s + latency_s` first for full coverage.
    pub fn exposure_end(&mut self, t_s: f64) -> Result<ExposureQuality> {
        require_finite("t_s", t_s)?;
        let e = self.exposure.ok_or_else(|| Error::invalid("exposure_end", "no exposure is open"))?;
        if t_s < e.t_begin {
            return Err(Error::invalid(
                "t_s",
                format!("{t_s} s is before the exposure began at {} s", e.t_begin),
            ));
        }
        self.exposure = None;
        let duration = t_s - e.t_begin;
        let expected = duration * self.cfg.sample_rate_hz;
        let rms = if e.n > 0 { (e.sum / e.n as f64).sqrt() } else { f64::NAN };
        Ok(ExposureQuality {
            duration_s: duration,
            rms_arcsec: rms,
            rms_px: rms / self.plate_scale_arcsec_per_px,
            max_window_rms_arcsec: e.max_rms,
            coverage: if expected > 0.0 { (e.n as f64 / expected).min(1.0) } else { 0.0 },
            above_fraction: if e.n > 0 { e.n_above as f64 / e.n as f64 } else { 0.0 },
        })
    }
}

/// Parse "x", "xz", "xyz", ... into ground-axis indices (no repeats).
fn parse_axes(axes: &str) -> Result<Vec<usize>> {
    let mut v = Vec::new();
    for c in axes.chars() {
        let i = match c {
            'x' => 0,
            'y' => 1,
            'z' => 2,
            _ => {
                return Err(Error::invalid("axes", format!("'{axes}': use letters x, y, z (e.g. \"xyz\")")));
            }
        };
        if v.contains(&i) {
            return Err(Error::invalid("axes", format!("'{axes}' repeats '{c}'")));
        }
        v.push(i);
    }
    if v.is_empty() {
        return Err(Error::invalid("axes", "needs 1 to 3 of x, y, z"));
    }
    Ok(v)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn cfg(fs: f64, window_s: f64, taps: usize) -> MonitorConfig {
        MonitorConfig {
            sample_rate_hz: fs,
            window_s,
            fir_taps: taps,
            highpass_hz: 2.0,
            ..MonitorConfig::default()
        }
    }

    fn flat_monitor(c: f64, cfg: &MonitorConfig) -> Monitor {
        // A flat calibration of c rad per m/s² over the whole band.
        let f = [0.01, cfg.sample_rate_hz];
        let frf = [Complex64::new(c, 0.0), Complex64::new(0.0, 0.0)].repeat(2);
        Monitor::from_calibration(&f, 1, &frf, 1.5, cfg).unwrap()
    }

    #[test]
    fn sine_through_flat_calibration_gives_a_over_sqrt2() {
        // RMS of a sinusoid of amplitude A is A/√2 (elementary); with a flat calibration c
        // (rad per m/s²) far above the high-pass, image_x RMS = c·A/√2·206264.8 arcsec, and
        // image_y is zero. The window is 50 whole periods of the 25 Hz sine.
        let c = 2e-7;
        let cf = cfg(200.0, 2.0, 512);
        let mut m = flat_monitor(c, &cf);
        let a = 0.3;
        let n = m.warmup_samples() + 400;
        let x: Vec<f64> = (0..n).map(|i| a * (2.0 * PI * 25.0 * i as f64 / 200.0).sin()).collect();
        m.push(0.0, &x, 1).unwrap();
        let r = m.tick((n - 1) as f64 / 200.0).unwrap();
        assert_eq!(r.state, MonitorState::Quiet);
        assert_relative_eq!(r.rms_x_arcsec, c * a / 2f64.sqrt() * ARCSEC_PER_RAD, max_relative = 1e-3);
        assert!(r.rms_y_arcsec < 1e-9 * r.rms_x_arcsec);
        assert_relative_eq!(r.rms_px, r.rms_arcsec / 1.5, max_relative = 1e-12);
        assert_relative_eq!(m.latency_s(), 64.0 / 200.0);
    }

    #[test]
    fn flag_hysteresis_hold_off_and_unsafe_states() {
        let c = 1e-6;
        let mut cf = cfg(100.0, 1.0, 128);
        cf.highpass_hz = 4.0;
        cf.threshold_arcsec = 0.1;
        cf.hysteresis = 0.5;
        cf.hold_off_s = 3.0;
        let mut m = flat_monitor(c, &cf);
        assert_eq!(m.tick(0.0).unwrap().state, MonitorState::Unsafe);
        let fs = 100.0;
        let amp = |on: bool| if on { 1.0 } else { 0.0 };
        let mut t = 0.0;
        let mut states = Vec::new();
        // 3 s quiet, 1 s loud, 6 s quiet, in 0.1 s blocks.
        for b in 0..100 {
            let loud = (30..40).contains(&b);
            let x: Vec<f64> =
                (0..10).map(|i| amp(loud) * (2.0 * PI * 20.0 * (t + i as f64 / fs)).sin()).collect();
            m.push(t, &x, 1).unwrap();
            t += 0.1;
            states.push(m.tick(t).unwrap().state);
        }
        // Warm-up is L + W = 228 samples: unsafe for the first 2.2 s.
        assert_eq!(states[21], MonitorState::Unsafe);
        assert_eq!(states[25], MonitorState::Quiet);
        let first_above = states.iter().position(|s| *s == MonitorState::Above).unwrap();
        let last_above = states.iter().rposition(|s| *s == MonitorState::Above).unwrap();
        // Loud RMS is 1e-6·206265/√2 = 0.146″ > 0.1″: on within ~0.7 s of the onset plus the
        // 0.16 s latency; off only after the 3 s hold-off (the RMS has decayed by then).
        assert!((30..=38).contains(&first_above), "{first_above}");
        assert!(
            last_above >= first_above + 29 && last_above <= first_above + 31,
            "{first_above} {last_above}"
        );
        // A NaN refuses the block and restarts.
        assert!(m.push(t, &[f64::NAN; 10], 1).is_err());
        let r = m.tick(t + 0.1).unwrap();
        assert_eq!((r.state, r.reason), (MonitorState::Unsafe, UnsafeReason::BadSample));
        // Fresh, contiguous data refills; then silence on the wire goes stale.
        t += 0.1;
        m.push(t, &vec![0.0; 300], 1).unwrap();
        t += 3.0;
        assert_eq!(m.tick(t).unwrap().state, MonitorState::Quiet);
        let r = m.tick(t + 0.6).unwrap();
        assert_eq!((r.state, r.reason), (MonitorState::Unsafe, UnsafeReason::Stale));
        // A gap restarts the filters.
        m.push(t + 1.0, &[0.0; 10], 1).unwrap();
        assert_eq!(m.tick(t + 1.1).unwrap().reason, UnsafeReason::Gap);
        // Going back in time is refused.
        assert!(m.push(t, &[0.0; 10], 1).is_err());
    }

    #[test]
    fn bad_configs_are_named() {
        let f = [1.0, 2.0];
        let frf = vec![Complex64::new(1.0, 0.0); 4];
        let c = MonitorConfig { hysteresis: 1.0, ..MonitorConfig::default() };
        let e = Monitor::from_calibration(&f, 1, &frf, 1.0, &c).unwrap_err();
        assert!(matches!(e, Error::OutOfRange { .. }) && e.to_string().contains("hysteresis"), "{e}");
        let c = MonitorConfig { fir_taps: 1 << 20, ..MonitorConfig::default() };
        assert!(matches!(Monitor::from_calibration(&f, 1, &frf, 1.0, &c), Err(Error::TooLarge { .. })));
        let c = MonitorConfig::default();
        assert!(matches!(Monitor::from_calibration(&f, 2, &frf, 1.0, &c), Err(Error::ShapeMismatch { .. })));
        assert!(matches!(
            Monitor::from_calibration(&[2.0, 1.0], 1, &frf, 1.0, &c),
            Err(Error::InvalidGrid { .. })
        ));
        assert!(parse_axes("xx").is_err() && parse_axes("w").is_err() && parse_axes("").is_err());
        assert_eq!(parse_axes("zx").unwrap(), vec![2, 0]);
    }
}

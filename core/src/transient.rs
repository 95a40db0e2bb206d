//! Time histories: transient response by frequency-domain convolution, gust and random input
//! histories, image-motion metrics, and an independent Newmark time-stepping check.
//!
//! ## Transient response by FFT convolution ([`Model::transient`])
//! An input history x\[k\] sampled at `fs_hz` (k = 0 … N−1, t = k/fs, the system at rest
//! before t = 0) is zero-padded to a length L, transformed with a real FFT, multiplied bin by
//! bin with the model's FRF H(f_j), f_j = j·fs/L, and transformed back; the first N samples are
//! returned. The history is a force (N), a moment (N·m) or a ground displacement (m); a ground
//! acceleration (m/s²) is accepted with [`GroundQuantity::Acceleration`] and first integrated
//! twice in time by the trapezoid rule from rest (u̇ and u start at 0). That rule is the one the
//! average-acceleration Newmark method applies to a free mass, so both paths see the same
//! ground displacement.
//!
//! **Padding and wrap-around.** The DFT makes the convolution circular. The padding P is the
//! time for the slowest mode's envelope to fall by the factor `decay_tolerance` (default 1e-6):
//! T = ln(1/tol)/σ_min, with σ = ζω for ζ ≤ 1 and σ = ω(ζ − √(ζ² − 1)) for an overdamped mode,
//! ζ and ω from [`Model::modes`]. L is the smallest 2^a·3^b·5^c ≥ N + ⌈T·fs⌉. Response that
//! wraps from the end of the padded block into the first N samples is then below about `tol`
//! times the largest response, for exponentially decaying (viscous, Kelvin–Voigt, Zener)
//! structures. ζ is the modal strain-energy estimate, accurate for light damping. Lengths above
//! `max_fft_len` are refused with [`Error::TooLarge`]; a mode without damping is refused with
//! [`Error::UnsupportedModel`] (it never decays).
//!
//! **Bins.** The DC bin uses an exact f = 0 solve, Z(0) = K*(0), keeping only its real part:
//! for a constant hysteretic loss factor k(1 + iη sgn ω) the imaginary part is the jump between
//! ω → 0⁺ and ω → 0⁻, whose average is real; for causal models H(0) is real already. For a
//! ground input H(0) is the static transmissibility (1 for translation). When L is even the
//! Nyquist bin keeps Re(H)·X (a real signal has a real Nyquist bin); sample fast enough that
//! the structure responds little there.
//!
//! **Sampling convention.** Samples are treated as a band-limited signal. A step sampled exactly
//! at its jump should take the mid value there (the Fourier-series value at a discontinuity):
//! [`step_history`] does, so its band-limited version jumps at t = 0 and not half a sample early.
//! The same holds for jumps in a ground-acceleration record before it is integrated.
//! The FRF is band-limited to fs/2, so the discrete impulse response is not exactly causal:
//! samples within a few Δt of a jump, including the end of the history (where the padding
//! drops the input to zero), see it early, at a level bounded by about |H(fs/2)/H(0)|
//! (≈ (f_n/(fs/2))² for a structure that is mass-like at high frequency). For a step on an
//! SDOF with f_n = 10 Hz at 1 kHz we measured 3.6e-5 of F/k on the last sample and 5e-7 ten
//! samples earlier. Sample well above the modes and let the history run past the times of
//! interest.
//!
//! **Causality.** Constant hysteretic damping (a loss factor η independent of frequency) is not
//! causal: its time response starts before the input. The sign jump of Im k* at f = 0 adds a
//! Hilbert-transform (log-divergent) tail, so the precursor is not small for sharp inputs and
//! grows with the record: for an SDOF (10 kg, 4e4 N/m, η = 0.1) at 2 kHz we measured −12 % (2 s record) to
//! −16 % (8 s) of the static deflection 10 ms before a force step, and −3 % of the peak 10 ms
//! before a 0.3 s 1-cosine pulse. Fractional-derivative models and tabulated data have slowly
//! (algebraically) decaying memory, for which the padding rule above is an estimate. For time
//! histories prefer the causal models: Kelvin–Voigt, Zener, or fractional Zener with padding
//! to spare.
//!
//! ## Gusts ([`Gust`], [`Model::gust_response`])
//! A gust gives a wind-speed fluctuation u′(t) (m/s) that drives the model's `wind` input (its
//! `[wind]` section gives area and drag coefficient) through the drag law of [`GustWind`].
//! The mean drag's static deflection is not part of the result: the star is assumed re-centred
//! on the mean pointing, so only the fluctuation moves the image.
//!
//! ## Newmark check ([`Model::newmark`])
//! Average-acceleration Newmark-β (γ = ½, β = ¼; Newmark 1959) on M ü + C u̇ + K u = p(t), in
//! absolute coordinates, from rest. It needs a viscously damped, frequency-independent model and
//! refuses others with [`Error::UnsupportedModel`] naming the connector. It is an independent
//! check of the FFT path; its error is O(Δt²) (period elongation ≈ (ωΔt)²/12).

use crate::assembly::OpticsSpec;
use crate::error::{
    Error, Result, require_all_finite, require_finite, require_non_negative, require_positive,
};
use crate::frf::{FrfPlan, build_dynamic_stiffness};
use crate::grid::FreqGrid;
use crate::linalg::{ComplexLu, RealLu};
use crate::model::{Input, Model};
use crate::units::ARCSEC_PER_RAD;
use num_complex::Complex64;
use rand::{Rng, SeedableRng, rngs::StdRng};
use realfft::RealFftPlanner;
use std::f64::consts::PI;

/// Longest FFT accepted: the FRF is evaluated on L/2 bins, at most [`crate::grid::MAX_GRID_LEN`].
pub const MAX_FFT_LEN: usize = 2 * crate::grid::MAX_GRID_LEN;

/// What a history for a ground input (`ground_x|y|z`) holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum GroundQuantity {
    /// Ground displacement (m).
    #[default]
    Displacement,
    /// Ground acceleration (m/s²), integrated twice from rest by the trapezoid rule.
    Acceleration,
}

/// Options of [`Model::transient`] and the image helpers.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub struct TransientOptions {
    /// Factor by which the slowest mode's envelope must decay within the padding (default 1e-6).
    pub decay_tolerance: f64,
    /// Largest padded FFT length accepted (default and maximum [`MAX_FFT_LEN`]).
    pub max_fft_len: usize,
    /// Meaning of a ground-input history (default displacement).
    pub ground: GroundQuantity,
    /// Radius (pixels) for the settle time and the fraction outside (default 0.5 px).
    pub radius_px: f64,
}

impl Default for TransientOptions {
    fn default() -> Self {
        TransientOptions {
            decay_tolerance: 1e-6,
            max_fft_len: MAX_FFT_LEN,
            ground: GroundQuantity::Displacement,
            radius_px: 0.5,
        }
    }
}

impl TransientOptions {
    /// Set the decay tolerance of the padding.
    pub fn with_decay_tolerance(mut self, tol: f64) -> Self {
        self.decay_tolerance = tol;
        self
    }
    /// Set the largest FFT length accepted.
    pub fn with_max_fft_len(mut self, len: usize) -> Self {
        self.max_fft_len = len;
        self
    }
    /// Set the meaning of a ground-input history.
    pub fn with_ground(mut self, g: GroundQuantity) -> Self {
        self.ground = g;
        self
    }
    /// Set the image radius (pixels) for settle time and fraction outside.
    pub fn with_radius_px(mut self, r: f64) -> Self {
        self.radius_px = r;
        self
    }

    fn validate(&self) -> Result<()> {
        let t = self.decay_tolerance;
        if !(t.is_finite() && t > 0.0 && t < 1.0) {
            return Err(Error::invalid("decay_tolerance", format!("must lie in (0, 1), got {t}")));
        }
        if self.max_fft_len < 2 {
            return Err(Error::invalid("max_fft_len", format!("must be >= 2, got {}", self.max_fft_len)));
        }
        require_positive("radius_px", self.radius_px)?;
        Ok(())
    }
}

/// Output time histories: `values[o][k]` is output `outputs[o]` at `time_s[k]` (SI: m or rad).
#[derive(Debug, Clone, PartialEq)]
pub struct TransientResult {
    pub time_s: Vec<f64>,
    pub outputs: Vec<String>,
    /// Shape (n_out, n_time).
    pub values: Vec<Vec<f64>>,
    /// Padded FFT length used (0 for a time-stepping result).
    pub fft_len: usize,
}

impl TransientResult {
    /// The history of one output.
    pub fn series(&self, name: &str) -> Result<&[f64]> {
        let o = self.outputs.iter().position(|x| x == name).ok_or_else(|| Error::UnknownName {
            kind: "output of this transient result".into(),
            name: name.into(),
            known: self.outputs.join(", "),
        })?;
        Ok(&self.values[o])
    }

    /// An angle output (`image_x`, `image_y`, `BODY:rx|ry|rz`) in arcseconds.
    pub fn arcsec(&self, name: &str) -> Result<Vec<f64>> {
        if Model::output_quantity(name) != crate::spectrum::Quantity::Angle {
            return Err(Error::invalid(
                format!("output '{name}'"),
                "is a displacement (m), not an angle; only image_x, image_y and BODY:rx|ry|rz convert to arcsec",
            ));
        }
        Ok(self.series(name)?.iter().map(|v| v * ARCSEC_PER_RAD).collect())
    }

    /// An angle output in pixels of `optics` (arcsec / plate scale).
    pub fn pixels(&self, name: &str, optics: &OpticsSpec) -> Result<Vec<f64>> {
        let s = optics.plate_scale_arcsec_per_px();
        Ok(self.arcsec(name)?.into_iter().map(|a| a / s).collect())
    }

    /// Image metrics from the `image_x` and `image_y` outputs (both must be present).
    pub fn image_metrics(&self, optics: &OpticsSpec, radius_px: f64) -> Result<ImageMetrics> {
        let x = self.arcsec("image_x")?;
        let y = self.arcsec("image_y")?;
        image_metrics(&self.time_s, &x, &y, optics.plate_scale_arcsec_per_px(), radius_px)
    }
}

/// Derived numbers of a sensor-plane history (radial, from both image axes together).
#[derive(Debug, Clone, PartialEq)]
pub struct ImageMetrics {
    /// Largest radial excursion √(x² + y²) (arcsec) and when it happens (s).
    pub peak_arcsec: f64,
    pub peak_px: f64,
    pub peak_time_s: f64,
    /// The radius used (px).
    pub radius_px: f64,
    /// Time of the first sample from which every later sample lies within the radius (to within
    /// one sample); the first time stamp if the image never leaves it; `None` if the record
    /// ends outside. It is a statement about this record only.
    pub settle_time_s: Option<f64>,
    /// Fraction of the samples with radius > `radius_px`.
    pub fraction_outside: f64,
}

/// Metrics of an image history given in arcsec on both axes.
///
/// `time_s`, `x_arcsec`, `y_arcsec` have one length; the plate scale is arcsec per pixel.
///
/// ```
/// use stillsky::transient::image_metrics;
/// // 1″/px; outside 0.5 px on the first two of four samples.
/// let m = image_metrics(&[0.0, 0.1, 0.2, 0.3], &[0.9, 0.6, 0.3, 0.0], &[0.0; 4], 1.0, 0.5)?;
/// assert_eq!((m.peak_px, m.settle_time_s, m.fraction_outside), (0.9, Some(0.2), 0.5));
/// # Ok::<(), stillsky::Error>(())
/// ```
pub fn image_metrics(
    time_s: &[f64],
    x_arcsec: &[f64],
    y_arcsec: &[f64],
    plate_scale_arcsec_per_px: f64,
    radius_px: f64,
) -> Result<ImageMetrics> {
    if time_s.is_empty() {
        return Err(Error::invalid("time_s", "is empty"));
    }
    if x_arcsec.len() != time_s.len() {
        return Err(Error::shape("x_arcsec", time_s.len(), x_arcsec.len()));
    }
    if y_arcsec.len() != time_s.len() {
        return Err(Error::shape("y_arcsec", time_s.len(), y_arcsec.len()));
    }
    require_all_finite("time_s", time_s)?;
    require_all_finite("x_arcsec", x_arcsec)?;
    require_all_finite("y_arcsec", y_arcsec)?;
    let scale = require_positive("plate_scale_arcsec_per_px", plate_scale_arcsec_per_px)?;
    let r_lim = require_positive("radius_px", radius_px)? * scale;
    let (mut peak, mut i_peak, mut outside, mut last_out) = (0.0f64, 0usize, 0usize, None);
    for (i, (x, y)) in x_arcsec.iter().zip(y_arcsec).enumerate() {
        let r = x.hypot(*y);
        if r > peak {
            peak = r;
            i_peak = i;
        }
        if r > r_lim {
            outside += 1;
            last_out = Some(i);
        }
    }
    let n = time_s.len();
    let settle_time_s = match last_out {
        None => Some(time_s[0]),
        Some(i) if i + 1 < n => Some(time_s[i + 1]),
        Some(_) => None,
    };
    Ok(ImageMetrics {
        peak_arcsec: peak,
        peak_px: peak / scale,
        peak_time_s: time_s[i_peak],
        radius_px,
        settle_time_s,
        fraction_outside: outside as f64 / n as f64,
    })
}

/// A sensor-plane response: both image axes in arcsec, the input history, and the metrics.
#[derive(Debug, Clone, PartialEq)]
pub struct ImageTransient {
    pub time_s: Vec<f64>,
    pub image_x_arcsec: Vec<f64>,
    pub image_y_arcsec: Vec<f64>,
    /// The history that drove the model (for a gust: the drag fluctuation, N).
    pub input_history: Vec<f64>,
    pub plate_scale_arcsec_per_px: f64,
    pub metrics: ImageMetrics,
}

// ---------------------------------------------------------------------------------------------
// Histories

fn check_fs_n(fs_hz: f64, n: usize) -> Result<()> {
    require_positive("fs_hz", fs_hz)?;
    if n == 0 {
        return Err(Error::invalid("n_samples", "must be >= 1"));
    }
    Ok(())
}

/// A step of `amplitude` at `start_s` sampled at `fs_hz` (n samples from t = 0): 0 before, the
/// mid value amplitude/2 on a sample that falls on the jump (within 1e-9 of a sample), then
/// `amplitude`.
pub fn step_history(fs_hz: f64, n: usize, start_s: f64, amplitude: f64) -> Result<Vec<f64>> {
    check_fs_n(fs_hz, n)?;
    require_non_negative("start_s", start_s)?;
    require_finite("amplitude", amplitude)?;
    let k0 = start_s * fs_hz;
    Ok((0..n)
        .map(|k| {
            let d = k as f64 - k0;
            if d.abs() <= 1e-9 {
                0.5 * amplitude
            } else if d > 0.0 {
                amplitude
            } else {
                0.0
            }
        })
        .collect())
}

/// The "1-cosine" pulse (A/2)(1 − cos(2π(t − t₀)/T)) for t₀ ≤ t ≤ t₀ + T, zero elsewhere
/// (14 CFR 25.341 shape in its time form, T = 2H/U; docs/references.md#s7), n samples at `fs_hz`.
pub fn one_minus_cosine_history(
    fs_hz: f64,
    n: usize,
    start_s: f64,
    duration_s: f64,
    amplitude: f64,
) -> Result<Vec<f64>> {
    check_fs_n(fs_hz, n)?;
    require_non_negative("start_s", start_s)?;
    require_positive("duration_s", duration_s)?;
    require_finite("amplitude", amplitude)?;
    Ok((0..n)
        .map(|k| {
            let s = k as f64 / fs_hz - start_s;
            if (0.0..=duration_s).contains(&s) {
                0.5 * amplitude * (1.0 - (2.0 * PI * s / duration_s).cos())
            } else {
                0.0
            }
        })
        .collect())
}

/// A random realisation of a one-sided PSD (unit²/Hz), n samples at `fs_hz`, zero mean.
///
/// Spectral representation: x(t) = Σ_j A_j cos(2π f_j t + φ_j) over the FFT bins
/// f_j = j·fs/n (0 < j < n/2), with A_j = √(2 S(f_j) Δf), Δf = fs/n, and phases φ_j uniform
/// on [0, 2π) drawn from `StdRng::seed_from_u64(seed)` in bin order. The variance is exactly
/// Σ S(f_j) Δf, the Riemann sum of ∫ S df; the record is periodic with period n/fs.
/// S is interpolated log–log between the given points (linearly where a neighbour is zero)
/// and taken as zero outside [freq_hz₀, freq_hz_last] (no extrapolation); DC and Nyquist are 0.
///
/// ```
/// use stillsky::transient::random_realisation;
/// // White 0.01 (m/s)²/Hz over 1–10 Hz: variance ∫ S df = 0.09.
/// let x = random_realisation(&[1.0, 10.0], &[0.01, 0.01], 50.0, 1 << 14, 1)?;
/// let var = x.iter().map(|v| v * v).sum::<f64>() / x.len() as f64;
/// assert!((var / 0.09 - 1.0).abs() < 0.01);
/// # Ok::<(), stillsky::Error>(())
/// ```
pub fn random_realisation(freq_hz: &[f64], psd: &[f64], fs_hz: f64, n: usize, seed: u64) -> Result<Vec<f64>> {
    crate::grid::validate_freqs("freq_hz", freq_hz)?;
    if freq_hz.len() < 2 {
        return Err(Error::invalid("freq_hz", "a PSD needs at least two points"));
    }
    if psd.len() != freq_hz.len() {
        return Err(Error::shape("psd", freq_hz.len(), psd.len()));
    }
    for (i, v) in psd.iter().enumerate() {
        require_non_negative(|| format!("psd[{i}]"), *v)?;
    }
    check_fs_n(fs_hz, n)?;
    if n > MAX_FFT_LEN {
        return Err(Error::TooLarge { what: "realisation length".into(), value: n, limit: MAX_FFT_LEN });
    }
    let df = fs_hz / n as f64;
    let mut rng = StdRng::seed_from_u64(seed);
    let mut spec = vec![Complex64::default(); n / 2 + 1];
    for (j, s) in spec.iter_mut().enumerate().skip(1) {
        let phase = 2.0 * PI * rng.random::<f64>();
        if 2 * j == n {
            break;
        }
        let a = (2.0 * interp_psd(freq_hz, psd, j as f64 * df) * df).sqrt();
        // The inverse real FFT sums X_j e^{iθ} + conj, so X_j = (A/2) e^{iφ} gives A cos(θ + φ).
        *s = Complex64::from_polar(0.5 * a, phase);
    }
    let mut out = vec![0.0; n];
    let c2r = RealFftPlanner::<f64>::new().plan_fft_inverse(n);
    c2r.process(&mut spec, &mut out).map_err(|e| Error::invalid("realisation FFT", e.to_string()))?;
    Ok(out)
}

/// PSD value at f: log–log between points (linear when a neighbour is 0), 0 outside the band.
fn interp_psd(f: &[f64], s: &[f64], x: f64) -> f64 {
    let n = f.len();
    if x < f[0] || x > f[n - 1] {
        return 0.0;
    }
    let j = f.partition_point(|&v| v <= x).clamp(1, n - 1);
    let (f0, f1, s0, s1) = (f[j - 1], f[j], s[j - 1], s[j]);
    if s0 > 0.0 && s1 > 0.0 {
        let t = (x.ln() - f0.ln()) / (f1.ln() - f0.ln());
        (s0.ln() + t * (s1.ln() - s0.ln())).exp()
    } else {
        let t = (x - f0) / (f1 - f0);
        s0 + t * (s1 - s0)
    }
}

/// Length of a "1-cosine" gust: the gust gradient distance H (peak at s = H, lasting 2H) or the
/// duration T = 2H/U directly.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum GustLength {
    GradientDistanceM(f64),
    DurationS(f64),
}

/// A wind-speed fluctuation history u′(t) (m/s) about the mean speed.
#[derive(Debug, Clone, PartialEq)]
pub enum Gust {
    /// u′ = amplitude from `start_s` on (mid value at the jump, see [`step_history`]).
    Step { amplitude_m_s: f64, start_s: f64 },
    /// u′ = (U_ds/2)(1 − cos(π s/H)) for 0 ≤ s ≤ 2H, s = U (t − t₀) (docs/references.md#s7).
    OneMinusCosine { amplitude_m_s: f64, length: GustLength, start_s: f64 },
    /// A measured total wind speed (m/s) sampled at `fs_hz` from t = 0; u′ = speed − mean speed
    /// of [`GustWind`]. Resampled linearly; the record must cover the requested duration.
    Measured { speed_m_s: Vec<f64>, fs_hz: f64 },
    /// A random realisation of a one-sided velocity PSD ((m/s)²/Hz), see [`random_realisation`].
    Random { freq_hz: Vec<f64>, psd: Vec<f64>, seed: u64 },
}

impl Gust {
    /// A step gust at t = 0.
    pub fn step(amplitude_m_s: f64) -> Self {
        Gust::Step { amplitude_m_s, start_s: 0.0 }
    }
    /// A "1-cosine" gust of gradient distance `h_m` starting at t = 0.
    pub fn one_minus_cosine(amplitude_m_s: f64, h_m: f64) -> Self {
        Gust::OneMinusCosine { amplitude_m_s, length: GustLength::GradientDistanceM(h_m), start_s: 0.0 }
    }
    /// A "1-cosine" gust lasting `duration_s` starting at t = 0.
    pub fn one_minus_cosine_duration(amplitude_m_s: f64, duration_s: f64) -> Self {
        Gust::OneMinusCosine { amplitude_m_s, length: GustLength::DurationS(duration_s), start_s: 0.0 }
    }
    /// Start a step or 1-cosine gust at `start_s` instead (other kinds are unchanged).
    pub fn starting_at(mut self, t_s: f64) -> Self {
        match &mut self {
            Gust::Step { start_s, .. } | Gust::OneMinusCosine { start_s, .. } => *start_s = t_s,
            _ => {}
        }
        self
    }

    /// u′(t) (m/s) at n samples of `fs_hz` from t = 0, for mean speed `mean_speed_m_s`.
    pub fn velocity_history(&self, mean_speed_m_s: f64, fs_hz: f64, n: usize) -> Result<Vec<f64>> {
        check_fs_n(fs_hz, n)?;
        match self {
            Gust::Step { amplitude_m_s, start_s } => step_history(fs_hz, n, *start_s, *amplitude_m_s),
            Gust::OneMinusCosine { amplitude_m_s, length, start_s } => {
                let t = match *length {
                    GustLength::DurationS(t) => require_positive("gust duration_s", t)?,
                    GustLength::GradientDistanceM(h) => {
                        let h = require_positive("gust gradient distance (m)", h)?;
                        2.0 * h / require_positive("mean_speed_m_s", mean_speed_m_s)?
                    }
                };
                one_minus_cosine_history(fs_hz, n, *start_s, t, *amplitude_m_s)
            }
            Gust::Measured { speed_m_s, fs_hz: fs_rec } => {
                if speed_m_s.is_empty() {
                    return Err(Error::invalid("measured wind speed", "is empty"));
                }
                require_all_finite("measured wind speed", speed_m_s)?;
                let fs_rec = require_positive("measured wind fs_hz", *fs_rec)?;
                let u = require_finite("mean_speed_m_s", mean_speed_m_s)?;
                let end = (speed_m_s.len() - 1) as f64 / fs_rec;
                let t_last = (n - 1) as f64 / fs_hz;
                if t_last > end * (1.0 + 1e-12) {
                    return Err(Error::OutOfRange {
                        what: "requested time in the measured wind record (s)".into(),
                        value: t_last,
                        min: 0.0,
                        max: end,
                    });
                }
                Ok((0..n)
                    .map(|k| {
                        let p = (k as f64 / fs_hz * fs_rec).min((speed_m_s.len() - 1) as f64);
                        let i = (p.floor() as usize).min(speed_m_s.len() - 1);
                        let v = if i + 1 < speed_m_s.len() {
                            speed_m_s[i] + (p - i as f64) * (speed_m_s[i + 1] - speed_m_s[i])
                        } else {
                            speed_m_s[i]
                        };
                        v - u
                    })
                    .collect())
            }
            Gust::Random { freq_hz, psd, seed } => random_realisation(freq_hz, psd, fs_hz, n, *seed),
        }
    }
}

/// How a wind-speed fluctuation becomes a drag-force fluctuation.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum DragLaw {
    /// F′ = ½ρC_dA[(U + u′)|U + u′| − U²]: the full drag law minus the mean (exact for large
    /// gusts; the sign follows the relative wind). The default for time histories.
    #[default]
    Quadratic,
    /// F′ = ρC_dA U u′ (quasi-steady linearisation, u′ ≪ U; docs/references.md#s6-6), the same
    /// law the spectral (PSD) path uses.
    Linearised,
}

/// The mean wind and air for a gust response.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub struct GustWind {
    pub mean_speed_m_s: f64,
    /// Air density (default 1.225 kg/m³, ISA sea level; docs/references.md#s6-6).
    pub air_density_kg_m3: f64,
    pub drag_law: DragLaw,
}

impl GustWind {
    /// Mean speed U with sea-level air and the quadratic drag law.
    pub fn new(mean_speed_m_s: f64) -> Self {
        GustWind { mean_speed_m_s, air_density_kg_m3: 1.225, drag_law: DragLaw::Quadratic }
    }
    /// Set the air density (kg/m³).
    pub fn with_air_density(mut self, rho: f64) -> Self {
        self.air_density_kg_m3 = rho;
        self
    }
    /// Set the drag law.
    pub fn with_drag_law(mut self, law: DragLaw) -> Self {
        self.drag_law = law;
        self
    }

    /// Drag-force fluctuation (N) for a speed fluctuation u′ (m/s) on area × drag coefficient.
    pub fn drag_fluctuation(
        &self,
        u_prime_m_s: &[f64],
        area_m2: f64,
        drag_coefficient: f64,
    ) -> Result<Vec<f64>> {
        let u = require_non_negative("mean_speed_m_s", self.mean_speed_m_s)?;
        let rho = require_positive("air_density_kg_m3", self.air_density_kg_m3)?;
        let a = require_positive("area_m2", area_m2)?;
        let cd = require_positive("drag_coefficient", drag_coefficient)?;
        require_all_finite("wind speed fluctuation", u_prime_m_s)?;
        let q = 0.5 * rho * cd * a;
        Ok(match self.drag_law {
            DragLaw::Linearised => u_prime_m_s.iter().map(|v| 2.0 * q * u * v).collect(),
            DragLaw::Quadratic => u_prime_m_s
                .iter()
                .map(|v| {
                    let w = u + v;
                    q * (w * w.abs() - u * u)
                })
                .collect(),
        })
    }
}

// ---------------------------------------------------------------------------------------------
// FFT convolution

/// Smallest 2^a·3^b·5^c ≥ n (fast FFT sizes).
fn next_fast_len(n: usize) -> usize {
    let mut m = n.max(1);
    loop {
        let mut r = m;
        for p in [2, 3, 5] {
            while r.is_multiple_of(p) {
                r /= p;
            }
        }
        if r == 1 {
            return m;
        }
        m += 1;
    }
}

/// Validate a history and resolve ground acceleration to displacement.
fn prepare_history(
    inp: &Input,
    input: &str,
    history: &[f64],
    fs_hz: f64,
    g: GroundQuantity,
) -> Result<Vec<f64>> {
    require_positive("fs_hz", fs_hz)?;
    if history.is_empty() {
        return Err(Error::invalid("history", "is empty"));
    }
    require_all_finite("history", history)?;
    match (inp, g) {
        (Input::Ground(_), GroundQuantity::Acceleration) => {
            let (u, _) = integrate_from_rest(history, 1.0 / fs_hz);
            Ok(u)
        }
        (Input::Load(_), GroundQuantity::Acceleration) => Err(Error::invalid(
            "ground",
            format!("GroundQuantity::Acceleration applies to ground inputs only, not to '{input}'"),
        )),
        _ => Ok(history.to_vec()),
    }
}

/// Trapezoid-rule displacement and velocity of an acceleration history, from rest.
fn integrate_from_rest(a: &[f64], dt: f64) -> (Vec<f64>, Vec<f64>) {
    let (mut u, mut v) = (vec![0.0; a.len()], vec![0.0; a.len()]);
    for k in 1..a.len() {
        v[k] = v[k - 1] + 0.5 * dt * (a[k - 1] + a[k]);
        u[k] = u[k - 1] + 0.5 * dt * (v[k - 1] + v[k]);
    }
    (u, v)
}

impl Model {
    /// Time the slowest mode's envelope takes to fall by `tol` (s): ln(1/tol)/σ_min (see the
    /// module docs). Errors if a mode has no damping.
    pub fn decay_time_s(&self, tol: f64) -> Result<f64> {
        if !(tol.is_finite() && tol > 0.0 && tol < 1.0) {
            return Err(Error::invalid("decay_tolerance", format!("must lie in (0, 1), got {tol}")));
        }
        let modes = self.modes()?;
        let mut t_max = 0.0f64;
        for (j, (f, z)) in modes.frequency_hz.iter().zip(&modes.damping_ratio).enumerate() {
            let w = 2.0 * PI * f;
            let sigma = if *z > 1.0 { w * (z - (z * z - 1.0).sqrt()) } else { z * w };
            if !(sigma.is_finite() && sigma > 0.0) {
                return Err(Error::unsupported(format!(
                    "mode {} at {f:.4} Hz has damping ratio {z:.3e}: it does not decay, so a transient by FFT convolution has no finite padding; add damping",
                    j + 1
                )));
            }
            t_max = t_max.max((1.0 / tol).ln() / sigma);
        }
        Ok(t_max)
    }

    /// Response of `outputs` to a history of `input` sampled at `fs_hz` (from rest at t = 0), by
    /// frequency-domain convolution (see the module docs for padding, DC and causality).
    ///
    /// `history` is in N, N·m or m (ground displacement; m/s² with
    /// [`GroundQuantity::Acceleration`]). Outputs are in m or rad.
    ///
    /// ```
    /// use stillsky::model::Model;
    /// use stillsky::transient::{TransientOptions, step_history};
    /// let text = r#"
    /// [[body]]
    /// name = "mass"
    /// mass_kg = 10
    /// cg_m = [0, 0, 1]
    /// inertia_kgm2 = [1, 1, 1]
    /// dofs = ["z"]
    /// [[spring]]
    /// name = "support"
    /// from = "ground"
    /// to = "mass"
    /// at_m = [0, 0, 0.5]
    /// direction = [0, 0, 1]
    /// stiffness_n_per_m = 4e4
    /// damping_ns_per_m = 200
    /// "#;
    /// let model = Model::from_toml_str(text, "sdof")?;
    /// let force = step_history(1000.0, 2000, 0.0, 40.0)?; // 40 N from t = 0, 2 s at 1 kHz
    /// let r = model.transient("force:mass:z", &force, 1000.0, &["mass:z"], &TransientOptions::default())?;
    /// let z = r.series("mass:z")?;
    /// assert!((z[1800] - 40.0 / 4e4).abs() < 1e-6 * 40.0 / 4e4); // settled at F/k
    /// # Ok::<(), stillsky::Error>(())
    /// ```
    pub fn transient(
        &self,
        input: &str,
        history: &[f64],
        fs_hz: f64,
        outputs: &[&str],
        opts: &TransientOptions,
    ) -> Result<TransientResult> {
        let mut r = self.transient_many(input, &[history], fs_hz, outputs, opts)?;
        r.pop().ok_or_else(|| Error::invalid("history", "is empty"))
    }

    /// [`Model::transient`] for several histories of one length on the same input: the FRF on
    /// the FFT bins is evaluated once and shared (one result per history, in order).
    pub fn transient_many(
        &self,
        input: &str,
        histories: &[&[f64]],
        fs_hz: f64,
        outputs: &[&str],
        opts: &TransientOptions,
    ) -> Result<Vec<TransientResult>> {
        opts.validate()?;
        let inp = self.input(input)?;
        let n = match histories.first() {
            Some(h) => h.len(),
            None => return Err(Error::invalid("histories", "is empty")),
        };
        if let Some(h) = histories.iter().find(|h| h.len() != n) {
            return Err(Error::shape("history (all histories share one length)", n, h.len()));
        }
        let xs_time = histories
            .iter()
            .map(|h| prepare_history(&inp, input, h, fs_hz, opts.ground))
            .collect::<Result<Vec<_>>>()?;
        let plan = FrfPlan::new(self, &[input], outputs)?;
        let limit = opts.max_fft_len.min(MAX_FFT_LEN);
        let pad = (self.decay_time_s(opts.decay_tolerance)? * fs_hz).ceil();
        let too_large = |value: usize| Error::TooLarge {
            what: format!(
                "FFT length for {n} history samples + {pad:.0} decay-padding samples (decay tolerance {:e})",
                opts.decay_tolerance
            ),
            value,
            limit,
        };
        if pad + n as f64 > limit as f64 {
            return Err(too_large(if (pad + n as f64) < usize::MAX as f64 {
                (pad + n as f64) as usize
            } else {
                usize::MAX
            }));
        }
        let l = next_fast_len(n + pad as usize).max(2);
        if l > limit {
            return Err(too_large(l));
        }
        let nb = l / 2 + 1;
        let no = outputs.len();
        // FRF on the bins: exact f = 0 solve for the DC bin, the plan for the rest.
        let mut h = vec![Complex64::default(); nb * no];
        let freqs = FreqGrid::new((1..nb).map(|j| j as f64 * fs_hz / l as f64).collect())?;
        plan.evaluate_into(&freqs, Some(&mut h[no..]), None)?;
        let h0 = self.static_response(&inp, outputs)?;
        h[..no].copy_from_slice(&h0);

        let mut planner = RealFftPlanner::<f64>::new();
        let r2c = planner.plan_fft_forward(l);
        let c2r = planner.plan_fft_inverse(l);
        let fft_err = |e: realfft::FftError| Error::invalid("transient FFT", e.to_string());
        let mut buf = vec![0.0; l];
        let mut xs = vec![Complex64::default(); nb];
        let mut ys = vec![Complex64::default(); nb];
        let mut results = Vec::with_capacity(xs_time.len());
        for x in &xs_time {
            buf.fill(0.0);
            buf[..n].copy_from_slice(x);
            r2c.process(&mut buf, &mut xs).map_err(fft_err)?;
            let mut values = Vec::with_capacity(no);
            for o in 0..no {
                for j in 0..nb {
                    ys[j] = h[j * no + o] * xs[j];
                }
                ys[0].im = 0.0;
                if l.is_multiple_of(2) {
                    ys[nb - 1].im = 0.0;
                }
                c2r.process(&mut ys, &mut buf).map_err(fft_err)?;
                let scale = 1.0 / l as f64;
                values.push(buf[..n].iter().map(|v| v * scale).collect());
            }
            results.push(TransientResult {
                time_s: (0..n).map(|k| k as f64 / fs_hz).collect(),
                outputs: outputs.iter().map(|s| s.to_string()).collect(),
                values,
                fft_len: l,
            });
        }
        Ok(results)
    }

    /// Re H(0) of one input to each output, by an exact f = 0 solve.
    fn static_response(&self, inp: &Input, outputs: &[&str]) -> Result<Vec<Complex64>> {
        let n = self.dof_count();
        let mut z = vec![Complex64::default(); n * n];
        build_dynamic_stiffness(self, 0.0, &mut z);
        let mut b = vec![Complex64::default(); n];
        self.fill_input(inp, 0.0, &mut b);
        ComplexLu::new(n, 1).solve_in_place(&mut z, &mut b).map_err(|_| Error::Singular { freq_hz: 0.0 })?;
        outputs
            .iter()
            .map(|o| {
                let row = self.output(o)?;
                let v: f64 = row.iter().zip(&b).map(|(r, x)| r * x.re).sum();
                Ok(Complex64::new(v, 0.0))
            })
            .collect()
    }

    /// Sensor-plane response to a history of `input`: both image axes in arcsec and the metrics
    /// (radius `opts.radius_px`). The model needs an `[optics]` section.
    pub fn image_response(
        &self,
        input: &str,
        history: &[f64],
        fs_hz: f64,
        opts: &TransientOptions,
    ) -> Result<ImageTransient> {
        let mut r = self.image_responses(input, &[history], fs_hz, opts)?;
        r.pop().ok_or_else(|| Error::invalid("history", "is empty"))
    }

    /// [`Model::image_response`] for several histories of one length (one FRF evaluation).
    pub fn image_responses(
        &self,
        input: &str,
        histories: &[&[f64]],
        fs_hz: f64,
        opts: &TransientOptions,
    ) -> Result<Vec<ImageTransient>> {
        let optics = self
            .optics()
            .ok_or_else(|| Error::invalid("image response", "the model has no [optics] section"))?;
        let rs = self.transient_many(input, histories, fs_hz, &["image_x", "image_y"], opts)?;
        rs.into_iter()
            .zip(histories)
            .map(|(r, history)| {
                let metrics = r.image_metrics(optics, opts.radius_px)?;
                Ok(ImageTransient {
                    image_x_arcsec: r.arcsec("image_x")?,
                    image_y_arcsec: r.arcsec("image_y")?,
                    time_s: r.time_s,
                    input_history: history.to_vec(),
                    plate_scale_arcsec_per_px: optics.plate_scale_arcsec_per_px(),
                    metrics,
                })
            })
            .collect()
    }

    /// Image response to a gust on the model's `wind` input over `duration_s` at `fs_hz`
    /// (n = round(duration·fs) samples). Area and drag coefficient come from the `[wind]`
    /// section; the drag law and air from `wind`.
    pub fn gust_response(
        &self,
        gust: &Gust,
        wind: &GustWind,
        fs_hz: f64,
        duration_s: f64,
        opts: &TransientOptions,
    ) -> Result<ImageTransient> {
        let mut r = self.gust_responses(std::slice::from_ref(gust), wind, fs_hz, duration_s, opts)?;
        r.pop().ok_or_else(|| Error::invalid("gusts", "is empty"))
    }

    /// [`Model::gust_response`] for several gusts over one record (one FRF evaluation).
    pub fn gust_responses(
        &self,
        gusts: &[Gust],
        wind: &GustWind,
        fs_hz: f64,
        duration_s: f64,
        opts: &TransientOptions,
    ) -> Result<Vec<ImageTransient>> {
        let w =
            self.wind().ok_or_else(|| Error::invalid("gust response", "the model has no [wind] section"))?;
        let drag_area = w.drag_area_m2()?;
        require_positive("fs_hz", fs_hz)?;
        require_positive("duration_s", duration_s)?;
        let n_f = (duration_s * fs_hz).round();
        if !(n_f >= 1.0 && n_f <= MAX_FFT_LEN as f64) {
            return Err(Error::TooLarge {
                what: "gust history samples (duration_s × fs_hz)".into(),
                value: if n_f < usize::MAX as f64 { n_f as usize } else { usize::MAX },
                limit: MAX_FFT_LEN,
            });
        }
        let forces = gusts
            .iter()
            .map(|g| {
                let u = g.velocity_history(wind.mean_speed_m_s, fs_hz, n_f as usize)?;
                wind.drag_fluctuation(&u, drag_area, 1.0)
            })
            .collect::<Result<Vec<_>>>()?;
        let refs: Vec<&[f64]> = forces.iter().map(|f| f.as_slice()).collect();
        self.image_responses("wind", &refs, fs_hz, opts)
    }

    // -----------------------------------------------------------------------------------------
    // Newmark

    /// Refuse a model that is not viscously damped and frequency independent, naming the cause.
    fn require_viscous(&self) -> Result<()> {
        if let Some(t) = self.terms.iter().find(|t| !elastic_is_real_constant(&t.model)) {
            return Err(Error::unsupported(format!(
                "Newmark time stepping needs frequency-independent stiffness with viscous damping only; connector '{}' has a frequency-dependent or hysteretic (loss factor) stiffness {:?}; use the FFT transient",
                t.name, t.model
            )));
        }
        let n = self.dof_count();
        let labels = self.dof_labels();
        if let Some(k) = self.k_ff.iter().position(|c| c.im != 0.0) {
            return Err(Error::unsupported(format!(
                "Newmark time stepping needs viscous damping only; a hysteretic loss factor (imaginary stiffness) couples DOFs {} and {}; use damping_ns_per_m, or the FFT transient",
                labels[k % n],
                labels[k / n]
            )));
        }
        if let Some(k) = self.k_fg.iter().position(|c| c.im != 0.0) {
            return Err(Error::unsupported(format!(
                "Newmark time stepping needs viscous damping only; a hysteretic loss factor couples DOF {} to the ground",
                labels[k % n]
            )));
        }
        Ok(())
    }

    /// Average-acceleration Newmark integration (γ = ½, β = ¼) of a history of `input` at
    /// time step 1/`fs_hz`, from rest, for viscously damped frequency-independent models.
    ///
    /// Force inputs load p = b·x(t). Ground inputs load p = −K_fg u_g − C_fg u̇_g − M_fg ü_g:
    /// from a displacement history u̇_g and ü_g are second-order finite differences (at least 4
    /// samples); from an acceleration history u_g and u̇_g are trapezoid integrals from rest.
    /// The load is linear between samples, so a step should start at full value on its sample.
    pub fn newmark(
        &self,
        input: &str,
        history: &[f64],
        fs_hz: f64,
        outputs: &[&str],
        ground: GroundQuantity,
    ) -> Result<TransientResult> {
        self.require_viscous()?;
        let inp = self.input(input)?;
        require_positive("fs_hz", fs_hz)?;
        if history.is_empty() {
            return Err(Error::invalid("history", "is empty"));
        }
        require_all_finite("history", history)?;
        if outputs.is_empty() {
            return Err(Error::invalid("outputs", "at least one output is needed"));
        }
        let rows = outputs.iter().map(|o| self.output(o)).collect::<Result<Vec<_>>>()?;
        let n = self.dof_count();
        let nt = history.len();
        let dt = 1.0 / fs_hz;
        let m = &self.m_ff;
        let c = &self.c_ff;
        // Real, constant K (checked above), so its value at f = 0 holds at every frequency.
        let k = self.real_stiffness_at(0.0);

        // The load p(t_i) = Σ_j vector_j · series_j[i].
        let parts: Vec<(Vec<f64>, Vec<f64>)> = match &inp {
            Input::Load(b) => vec![(b.clone(), history.to_vec())],
            Input::Ground(d) => {
                let (u, v, a) = match ground {
                    GroundQuantity::Acceleration => {
                        let (u, v) = integrate_from_rest(history, dt);
                        (u, v, history.to_vec())
                    }
                    GroundQuantity::Displacement => {
                        if nt < 4 {
                            return Err(Error::invalid(
                                "history",
                                format!(
                                    "a ground displacement history for Newmark needs >= 4 samples, got {nt}"
                                ),
                            ));
                        }
                        let (v, a) = differentiate(history, dt);
                        (history.to_vec(), v, a)
                    }
                };
                let neg_col = |x: &[f64]| -> Vec<f64> { x[d * n..(d + 1) * n].iter().map(|v| -v).collect() };
                // −K_fg e_d is the ground load vector at f = 0 (mass and damping terms vanish).
                let mut b0 = vec![Complex64::default(); n];
                self.fill_input(&inp, 0.0, &mut b0);
                let kg: Vec<f64> = b0.iter().map(|z| z.re).collect();
                vec![(kg, u), (neg_col(&self.c_fg), v), (neg_col(&self.m_fg), a)]
            }
        };
        let load = |i: usize, p: &mut [f64]| {
            p.fill(0.0);
            for (vec, series) in &parts {
                let x = series[i];
                if x != 0.0 {
                    for (pv, bv) in p.iter_mut().zip(vec) {
                        *pv += bv * x;
                    }
                }
            }
        };

        let (gamma, beta) = (0.5, 0.25);
        let a1: Vec<f64> = (0..n * n).map(|q| m[q] / (beta * dt * dt) + gamma * c[q] / (beta * dt)).collect();
        let a2: Vec<f64> = (0..n * n).map(|q| m[q] / (beta * dt) + (gamma / beta - 1.0) * c[q]).collect();
        let a3: Vec<f64> =
            (0..n * n).map(|q| (0.5 / beta - 1.0) * m[q] + dt * (0.5 * gamma / beta - 1.0) * c[q]).collect();
        let k_hat: Vec<f64> = (0..n * n).map(|q| k[q] + a1[q]).collect();
        let mut lu_k = RealLu::factor(&k_hat, n).map_err(|r| {
            Error::unsupported(format!(
                "Newmark effective stiffness K + 4M/dt² + 2C/dt is singular (pivot ratio {r:.1e})"
            ))
        })?;
        let mut lu_m = RealLu::factor(m, n).map_err(|r| Error::NotPositiveDefinite {
            matrix: "mass".into(),
            reason: format!("singular for the initial acceleration (pivot ratio {r:.1e})"),
        })?;

        let mut u = vec![0.0; n];
        let mut v = vec![0.0; n];
        let mut a = vec![0.0; n];
        let mut p = vec![0.0; n];
        load(0, &mut p);
        a.copy_from_slice(&p); // a0 = M⁻¹(p0 − C v0 − K u0) with u0 = v0 = 0
        lu_m.solve_in_place(&mut a)?;
        let mut values = vec![vec![0.0; nt]; rows.len()];
        let mut rhs = vec![0.0; n];
        let mv = |mat: &[f64], x: &[f64], out: &mut [f64]| {
            for (i, o) in out.iter_mut().enumerate() {
                *o += (0..n).map(|j| mat[i + j * n] * x[j]).sum::<f64>();
            }
        };
        for i in 1..nt {
            load(i, &mut p);
            rhs.copy_from_slice(&p);
            mv(&a1, &u, &mut rhs);
            mv(&a2, &v, &mut rhs);
            mv(&a3, &a, &mut rhs);
            lu_k.solve_in_place(&mut rhs)?;
            for q in 0..n {
                let du = rhs[q] - u[q];
                let v_new = gamma / (beta * dt) * du
                    + (1.0 - gamma / beta) * v[q]
                    + dt * (1.0 - 0.5 * gamma / beta) * a[q];
                let a_new = du / (beta * dt * dt) - v[q] / (beta * dt) - (0.5 / beta - 1.0) * a[q];
                u[q] = rhs[q];
                v[q] = v_new;
                a[q] = a_new;
            }
            for (o, row) in rows.iter().enumerate() {
                values[o][i] = row.iter().zip(&u).map(|(r, x)| r * x).sum();
            }
        }
        Ok(TransientResult {
            time_s: (0..nt).map(|i| i as f64 * dt).collect(),
            outputs: outputs.iter().map(|s| s.to_string()).collect(),
            values,
            fft_len: 0,
        })
    }
}

/// True when a connector's stiffness without its parallel dashpot is real and frequency
/// independent: plain springs and dashpots in parallel, and plain springs in series.
fn elastic_is_real_constant(m: &crate::stiffness::StiffnessModel) -> bool {
    use crate::stiffness::StiffnessModel as S;
    match m {
        S::Hysteretic { loss_factor, .. } => *loss_factor == 0.0,
        S::KelvinVoigt { .. } => true,
        S::Parallel(p) => p.iter().all(elastic_is_real_constant),
        S::Series(p) => p.iter().all(|q| match q {
            S::Hysteretic { loss_factor, .. } => *loss_factor == 0.0,
            S::KelvinVoigt { c, .. } => *c == 0.0,
            S::Series(_) | S::Parallel(_) => q.viscous_part() == 0.0 && elastic_is_real_constant(q),
            _ => false,
        }),
        _ => false,
    }
}

/// Second-order finite-difference velocity and acceleration of a sampled displacement (n ≥ 4).
fn differentiate(u: &[f64], dt: f64) -> (Vec<f64>, Vec<f64>) {
    let n = u.len();
    let mut v = vec![0.0; n];
    let mut a = vec![0.0; n];
    for i in 1..n - 1 {
        v[i] = (u[i + 1] - u[i - 1]) / (2.0 * dt);
        a[i] = (u[i + 1] - 2.0 * u[i] + u[i - 1]) / (dt * dt);
    }
    v[0] = (-3.0 * u[0] + 4.0 * u[1] - u[2]) / (2.0 * dt);
    v[n - 1] = (3.0 * u[n - 1] - 4.0 * u[n - 2] + u[n - 3]) / (2.0 * dt);
    a[0] = (2.0 * u[0] - 5.0 * u[1] + 4.0 * u[2] - u[3]) / (dt * dt);
    a[n - 1] = (2.0 * u[n - 1] - 5.0 * u[n - 2] + 4.0 * u[n - 3] - u[n - 4]) / (dt * dt);
    (v, a)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fast_lengths_are_5_smooth() {
        assert_eq!(next_fast_len(1), 1);
        assert_eq!(next_fast_len(7), 8);
        assert_eq!(next_fast_len(11), 12);
        assert_eq!(next_fast_len(1001), 1024);
        assert_eq!(next_fast_len(1025), 1080);
    }

    #[test]
    fn trapezoid_integration_of_constant_acceleration() {
        // u = a t²/2 exactly for constant a (the trapezoid rule is exact for linear v).
        let (u, v) = integrate_from_rest(&[2.0; 11], 0.1);
        assert!((v[10] - 2.0).abs() < 1e-12);
        assert!((u[10] - 1.0).abs() < 1e-12);
    }

    #[test]
    fn differences_are_exact_for_quadratics() {
        let dt = 0.01;
        let u: Vec<f64> = (0..20).map(|i| 3.0 * (i as f64 * dt).powi(2) + 1.0).collect();
        let (v, a) = differentiate(&u, dt);
        for i in 0..20 {
            assert!((v[i] - 6.0 * i as f64 * dt).abs() < 1e-9, "{i}");
            assert!((a[i] - 6.0).abs() < 1e-6, "{i}");
        }
    }
}

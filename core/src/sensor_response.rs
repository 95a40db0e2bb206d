//! Sensor response and self-noise: what a recording's numbers mean as ground motion.
//!
//! A sensor is a linear system from a ground quantity (velocity for a geophone, acceleration
//! for a MEMS accelerometer) to its output (V, counts, or m/s² already scaled), given by poles
//! and zeros in rad/s and a gain k:
//!
//! H(s) = k Π(s − z_i) / Π(s − p_j),  s = 2πi f,
//!
//! the form of scipy.signal.freqs_zpk and of SEED's poles-and-zeros response (Laplace, rad/s;
//! docs/references.md#sensor-response). Builders:
//! - [`SensorResponse::geophone`]: a moving-coil geophone of natural frequency f₀, damping ζ
//!   and generator constant G (V per m/s), velocity in: H(s) = G s² / (s² + 2ζω₀s + ω₀²),
//!   zeros (0, 0), poles −ζω₀ ± iω₀√(1 − ζ²).
//! - [`SensorResponse::flat_accelerometer`]: a MEMS accelerometer flat to its bandwidth,
//!   H = sensitivity, acceleration in.
//!
//! Each sensor carries the band where removing its response is valid. A geophone's output falls
//! as (f/f₀)² below f₀; dividing by it there amplifies the sensor's own noise, so the valid band
//! starts where |H| has fallen to [`MIN_RELATIVE_GAIN`] of its passband gain (a rule of ours:
//! common practice, no source). [`SensorResponse::remove`] (a record) and
//! [`SensorResponse::remove_psd`] (a PSD) refuse a band outside it ([`Error::OutOfRange`]
//! naming `band`'s end, with the limits) and leave nothing outside the band.
//!
//! Self-noise: [`NoiseCurve`] presets for a phone-class MEMS accelerometer, a low-noise MEMS
//! accelerometer and a 4.5 Hz geophone, and [`noise_floor_check`], which says how much of a
//! recorded ground PSD lies within a factor of the sensor's noise floor: that part is the
//! sensor, not the ground.

use crate::Complex64;
use crate::error::{Error, Result, require_positive};
use crate::spectrum::{Psd, Quantity};
use realfft::RealFftPlanner;
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// Fraction of the passband gain where a response stops being worth removing (0.1, −20 dB;
/// common practice, no source).
pub const MIN_RELATIVE_GAIN: f64 = 0.1;

/// Default factor on the noise floor's PSD below which a spectrum counts as sensor noise
/// (4 in power, 2 in amplitude; common practice, no source).
pub const DEFAULT_NOISE_FACTOR: f64 = 4.0;

/// Boltzmann's constant (J/K), exact since the 2019 SI.
pub const BOLTZMANN_J_PER_K: f64 = 1.380_649e-23;

/// A sensor's response in poles and zeros, with the band where it may be removed.
#[derive(Debug, Clone, PartialEq)]
pub struct SensorResponse {
    /// Zeros (rad/s).
    pub zeros: Vec<Complex64>,
    /// Poles (rad/s).
    pub poles: Vec<Complex64>,
    /// Gain k: output units per input unit times the product form's normalisation.
    pub gain: f64,
    /// The ground quantity the sensor takes in (velocity or acceleration).
    pub input: Quantity,
    /// Band where removal is valid (Hz); the upper end may be infinite (up to Nyquist).
    pub valid_band_hz: (f64, f64),
}

fn check_roots(name: &str, v: &[Complex64]) -> Result<()> {
    if let Some(i) = v.iter().position(|z| !(z.re.is_finite() && z.im.is_finite())) {
        return Err(Error::invalid(format!("{name}[{i}]"), "must be finite"));
    }
    Ok(())
}

impl SensorResponse {
    /// A response from poles and zeros (rad/s), gain k, the input quantity and the valid band.
    /// Poles must lie in the open left half-plane (a stable sensor).
    pub fn from_poles_zeros(
        zeros: Vec<Complex64>,
        poles: Vec<Complex64>,
        gain: f64,
        input: Quantity,
        valid_band_hz: (f64, f64),
    ) -> Result<SensorResponse> {
        check_roots("zeros", &zeros)?;
        check_roots("poles", &poles)?;
        if let Some(i) = poles.iter().position(|p| p.re >= 0.0) {
            return Err(Error::invalid(
                format!("poles[{i}]"),
                format!("{} has a real part >= 0: the response would be unstable", poles[i]),
            ));
        }
        if !(gain.is_finite() && gain != 0.0) {
            return Err(Error::invalid("gain", format!("must be finite and non-zero, got {gain}")));
        }
        if !matches!(input, Quantity::Velocity | Quantity::Acceleration | Quantity::Displacement) {
            return Err(Error::invalid("input", format!("{} is not a ground motion", input.name())));
        }
        let (lo, hi) = valid_band_hz;
        if !(lo.is_finite() && lo >= 0.0 && hi > lo) {
            return Err(Error::invalid("valid_band_hz", format!("({lo}, {hi}) must be 0 <= low < high")));
        }
        Ok(SensorResponse { zeros, poles, gain, input, valid_band_hz })
    }

    /// A moving-coil geophone: natural frequency f₀ (Hz), damping ratio ζ (0 < ζ < 1, with the
    /// shunt), generator constant G (output V per m/s of velocity). Valid from where
    /// |H| = [`MIN_RELATIVE_GAIN`] · G upward.
    pub fn geophone(natural_hz: f64, damping: f64, generator_v_per_m_s: f64) -> Result<SensorResponse> {
        let f0 = require_positive("natural_hz", natural_hz)?;
        let z = require_positive("damping", damping)?;
        if z >= 1.0 {
            return Err(Error::invalid("damping", format!("must be < 1 (an underdamped coil), got {z}")));
        }
        let g = require_positive("generator_v_per_m_s", generator_v_per_m_s)?;
        let w0 = 2.0 * PI * f0;
        let wd = w0 * (1.0 - z * z).sqrt();
        let poles = vec![Complex64::new(-z * w0, wd), Complex64::new(-z * w0, -wd)];
        let zeros = vec![Complex64::new(0.0, 0.0); 2];
        // |H|/G = r² / √((1 − r²)² + (2ζr)²), increasing in r for ζ ≥ 1/√2 and in any case
        // below r = 1 for the 0.1 level; bisection on r in (0, 1].
        let rel = |r: f64| r * r / ((1.0 - r * r).powi(2) + (2.0 * z * r).powi(2)).sqrt();
        let (mut a, mut b) = (1e-6, 1.0);
        for _ in 0..200 {
            let m = 0.5 * (a + b);
            if rel(m) < MIN_RELATIVE_GAIN {
                a = m;
            } else {
                b = m;
            }
        }
        SensorResponse::from_poles_zeros(zeros, poles, g, Quantity::Velocity, (b * f0, f64::INFINITY))
    }

    /// A MEMS accelerometer flat to `bandwidth_hz`: output = `sensitivity` × acceleration (e.g.
    /// V per m/s², or 1 when the logged numbers are already m/s²). Valid from 0 to the bandwidth.
    pub fn flat_accelerometer(sensitivity: f64, bandwidth_hz: f64) -> Result<SensorResponse> {
        let s = require_positive("sensitivity", sensitivity)?;
        let bw = require_positive("bandwidth_hz", bandwidth_hz)?;
        SensorResponse::from_poles_zeros(Vec::new(), Vec::new(), s, Quantity::Acceleration, (0.0, bw))
    }

    /// The complex response at `f_hz`: k Π(s − z)/Π(s − p), s = 2πi f.
    pub fn response(&self, f_hz: f64) -> Complex64 {
        let s = Complex64::new(0.0, 2.0 * PI * f_hz);
        let num = self.zeros.iter().fold(Complex64::new(self.gain, 0.0), |acc, z| acc * (s - z));
        let den = self.poles.iter().fold(Complex64::new(1.0, 0.0), |acc, p| acc * (s - p));
        num / den
    }

    /// The band to remove the response in: `band` (default the valid band, capped at
    /// `nyquist_hz` when given) checked against the valid band.
    fn removal_band(&self, band: Option<(f64, f64)>, nyquist_hz: Option<f64>) -> Result<(f64, f64)> {
        let (vlo, vhi) =
            (self.valid_band_hz.0, nyquist_hz.map_or(self.valid_band_hz.1, |n| self.valid_band_hz.1.min(n)));
        let (lo, hi) = band.unwrap_or((vlo, vhi));
        // The high end may be +∞ (all of the valid band above `lo`), never NaN.
        if !(lo.is_finite() && lo >= 0.0 && hi > lo) {
            return Err(Error::invalid("band", format!("({lo}, {hi}) Hz must be 0 <= low < high")));
        }
        let limits = if nyquist_hz.is_some() {
            "the sensor's valid band up to Nyquist"
        } else {
            "the sensor's valid band"
        };
        let out = |end: &str, value: f64| Error::OutOfRange {
            what: format!("band {end} end (Hz) for removing the response ({limits})"),
            value,
            min: vlo,
            max: vhi,
        };
        if lo < vlo {
            return Err(out("low", lo));
        }
        if hi > vhi {
            return Err(out("high", hi));
        }
        Ok((lo, hi))
    }

    /// Remove the response from a PSD of the sensor's output (e.g. V²/Hz) at `freq_hz`
    /// (strictly increasing, > 0): S(f)/|H(f)|² on the frequencies inside `band` (Hz; default
    /// the valid band), written to `out` ((m/s)²/Hz for a geophone: the input quantity's PSD);
    /// 0 outside the band, as [`SensorResponse::remove`] leaves nothing outside it.
    ///
    /// Errors: a band reaching outside the valid band ([`Error::OutOfRange`] naming `band`'s
    /// end and the limits), a malformed band, an invalid grid ([`Error::InvalidGrid`]), a
    /// negative or non-finite PSD value, `psd` or `out` not as long as `freq_hz`
    /// ([`Error::ShapeMismatch`]).
    pub fn remove_psd_into(
        &self,
        freq_hz: &[f64],
        psd: &[f64],
        band: Option<(f64, f64)>,
        out: &mut [f64],
    ) -> Result<()> {
        crate::grid::validate_freqs("freq_hz", freq_hz)?;
        if psd.len() != freq_hz.len() {
            return Err(Error::shape("psd vs freq_hz", freq_hz.len(), psd.len()));
        }
        if out.len() != freq_hz.len() {
            return Err(Error::shape("out vs freq_hz", freq_hz.len(), out.len()));
        }
        if let Some(i) = psd.iter().position(|v| !(v.is_finite() && *v >= 0.0)) {
            return Err(Error::invalid(
                "psd",
                format!("value {} at index {i} must be finite and >= 0", psd[i]),
            ));
        }
        let (lo, hi) = self.removal_band(band, None)?;
        for ((o, &f), &p) in out.iter_mut().zip(freq_hz).zip(psd) {
            let h2 = self.response(f).norm_sqr();
            *o = if f >= lo && f <= hi && h2 > 0.0 { p / h2 } else { 0.0 };
        }
        Ok(())
    }

    /// [`SensorResponse::remove_psd_into`] into a new vector.
    pub fn remove_psd(&self, freq_hz: &[f64], psd: &[f64], band: Option<(f64, f64)>) -> Result<Vec<f64>> {
        let mut out = vec![0.0; freq_hz.len()];
        self.remove_psd_into(freq_hz, psd, band, &mut out)?;
        Ok(out)
    }

    /// Remove the response from a record `x` of the sensor's output sampled at `fs_hz`, within
    /// `band` (Hz; default the valid band up to Nyquist): X(f)/H(f) on the FFT bins inside the
    /// band, zero outside, back to time. The result is the input quantity (m/s or m/s²).
    /// The FFT treats the record as periodic: taper or detrend it first if its ends differ.
    ///
    /// Errors: a band reaching outside the valid band or above Nyquist ([`Error::OutOfRange`]
    /// naming `band`'s end and the limits), a malformed band ([`Error::InvalidArgument`]),
    /// fewer than 8 samples, a non-finite sample (its index).
    pub fn remove(&self, x: &[f64], fs_hz: f64, band: Option<(f64, f64)>) -> Result<Vec<f64>> {
        let fs = require_positive("fs_hz", fs_hz)?;
        let n = x.len();
        if n < 8 {
            return Err(Error::invalid("x", format!("{n} samples, need at least 8")));
        }
        if let Some(i) = x.iter().position(|v| !v.is_finite()) {
            return Err(Error::invalid("x", format!("sample {i} is {} (not finite)", x[i])));
        }
        let (lo, hi) = self.removal_band(band, Some(0.5 * fs))?;
        let mut planner = RealFftPlanner::<f64>::new();
        let fwd = planner.plan_fft_forward(n);
        let inv = planner.plan_fft_inverse(n);
        let mut buf = x.to_vec();
        let mut spec = fwd.make_output_vec();
        fwd.process(&mut buf, &mut spec).map_err(|e| Error::invalid("fft", e.to_string()))?;
        let df = fs / n as f64;
        for (k, c) in spec.iter_mut().enumerate() {
            let f = k as f64 * df;
            let h = self.response(f);
            *c = if f >= lo && f <= hi && h.norm() > 0.0 { *c / h } else { Complex64::new(0.0, 0.0) };
        }
        // The inverse real FFT needs real DC and Nyquist bins.
        spec[0].im = 0.0;
        if n.is_multiple_of(2) {
            spec[n / 2].im = 0.0;
        }
        let mut out = inv.make_output_vec();
        inv.process(&mut spec, &mut out).map_err(|e| Error::invalid("fft", e.to_string()))?;
        for v in &mut out {
            *v /= n as f64;
        }
        Ok(out)
    }
}

/// A sensor's self-noise as an amplitude spectral density of its input quantity.
#[derive(Debug, Clone, PartialEq)]
pub struct NoiseCurve {
    /// Short name (`phone-mems`, `low-noise-mems`, `geophone-4.5hz`).
    pub name: String,
    /// Where the numbers come from.
    pub source: String,
    /// Frequencies (Hz), increasing.
    pub freq_hz: Vec<f64>,
    /// Noise PSD at each frequency, in the unit of `quantity` (acceleration: (m/s²)²/Hz).
    pub psd: Vec<f64>,
    /// The quantity of `psd`.
    pub quantity: Quantity,
}

/// Names of the bundled noise curves.
pub const NOISE_CURVES: [&str; 3] = ["phone-mems", "low-noise-mems", "geophone-4.5hz"];

const MICRO_G: f64 = 9.80665e-6;

fn log_grid(f0: f64, f1: f64, n: usize) -> Vec<f64> {
    (0..n).map(|i| f0 * (f1 / f0).powf(i as f64 / (n - 1) as f64)).collect()
}

impl NoiseCurve {
    /// A bundled curve by name (see [`NOISE_CURVES`]); all in acceleration PSD, 0.01–200 Hz.
    ///
    /// - `phone-mems`: flat 150 µg/√Hz, the order of a phone-class MEMS accelerometer's data
    ///   sheet noise density (from memory, verify against your part's data sheet).
    /// - `low-noise-mems`: flat 25 µg/√Hz, a low-noise MEMS accelerometer (from memory, verify).
    /// - `geophone-4.5hz`: computed, not measured: the suspension's Brownian noise
    ///   8 k_B T ζ₀ ω₀ / m (acceleration PSD) plus the Johnson noise of the coil 4 k_B T R and a
    ///   preamplifier's 10 nV/√Hz, both divided by |H(f)|² of the geophone (Rodgers 1994, see
    ///   docs/references.md#sensor-response), with f₀ = 4.5 Hz, m = 11 g, open-circuit ζ₀ = 0.3,
    ///   R = 375 Ω, G = 28.8 V/(m/s), ζ = 0.7 shunted, T = 293 K (from memory, verify).
    pub fn preset(name: &str) -> Result<NoiseCurve> {
        let freq_hz = log_grid(0.01, 200.0, 121);
        let flat = |ug: f64| vec![(ug * MICRO_G).powi(2); freq_hz.len()];
        let (psd, source) = match name {
            "phone-mems" => (
                flat(150.0),
                "flat 150 ug/sqrt(Hz), order of a phone-class MEMS data sheet (from memory, verify)",
            ),
            "low-noise-mems" => {
                (flat(25.0), "flat 25 ug/sqrt(Hz), a low-noise MEMS data sheet (from memory, verify)")
            }
            "geophone-4.5hz" => {
                let g = SensorResponse::geophone(4.5, 0.7, 28.8)?;
                let (t, m, z0, r, en) = (293.0, 0.011, 0.3, 375.0, 10e-9);
                let w0 = 2.0 * PI * 4.5;
                let brownian = 8.0 * BOLTZMANN_J_PER_K * t * z0 * w0 / m;
                let psd = freq_hz
                    .iter()
                    .map(|&f| {
                        let w = 2.0 * PI * f;
                        let h2 = g.response(f).norm_sqr(); // V² per (m/s)²
                        let v_noise = (4.0 * BOLTZMANN_J_PER_K * t * r + en * en) / h2; // (m/s)²/Hz
                        brownian + v_noise * w * w
                    })
                    .collect();
                (
                    psd,
                    "computed: suspension Brownian noise plus coil Johnson and preamplifier noise \
                     through the response (Rodgers 1994; parameters from memory, verify)",
                )
            }
            other => {
                return Err(Error::UnknownName {
                    kind: "noise curve".into(),
                    name: other.into(),
                    known: NOISE_CURVES.join(", "),
                });
            }
        };
        Ok(NoiseCurve {
            name: name.to_string(),
            source: source.to_string(),
            freq_hz,
            psd,
            quantity: Quantity::Acceleration,
        })
    }

    /// The curve as a [`Psd`].
    pub fn to_psd(&self) -> Result<Psd> {
        Psd::new(self.freq_hz.clone(), self.psd.clone(), self.quantity)
    }
}

/// How much of a recorded PSD sits at a sensor's noise floor.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct NoiseFloorCheck {
    /// The noise curve's name.
    pub sensor: String,
    /// The factor used (on PSD).
    pub factor: f64,
    /// Bins of the recording inside the curve's frequency span.
    pub bins_checked: usize,
    /// Fraction of those bins with PSD < factor × noise floor.
    pub fraction_at_floor: f64,
    /// Lowest and highest frequency of a bin at the floor (Hz), when there is one.
    pub span_at_floor_hz: Option<(f64, f64)>,
    /// The warning to show, when any bin is at the floor.
    pub warning: Option<String>,
}

/// Compare a recorded ground PSD with a sensor's noise floor: the bins with PSD below
/// `factor` × floor (default [`DEFAULT_NOISE_FACTOR`]) measure the sensor, not the ground.
/// The PSD is converted to the curve's quantity first (ω² per order).
pub fn noise_floor_check(psd: &Psd, curve: &NoiseCurve, factor: Option<f64>) -> Result<NoiseFloorCheck> {
    let factor = require_positive("factor", factor.unwrap_or(DEFAULT_NOISE_FACTOR))?;
    let p = psd.to(curve.quantity)?;
    let floor = curve.to_psd()?;
    let (c0, c1) = floor.span_hz();
    let (mut checked, mut low) = (0usize, 0usize);
    let mut span: Option<(f64, f64)> = None;
    for (&f, &v) in p.freq_hz().iter().zip(p.values()) {
        if f < c0 || f > c1 {
            continue;
        }
        checked += 1;
        let nf = floor.value_at(f, crate::spectrum::Extrapolate::Error)?;
        if v < factor * nf {
            low += 1;
            span = Some(span.map_or((f, f), |(a, _)| (a, f)));
        }
    }
    let fraction = if checked > 0 { low as f64 / checked as f64 } else { 0.0 };
    let warning = span.map(|(a, b)| {
        format!(
            "{:.0} % of the spectrum ({a:.3}..{b:.3} Hz) is within a factor {factor} (PSD) of the \
             {} noise floor: there it shows the sensor's noise, not ground motion",
            100.0 * fraction,
            curve.name
        )
    });
    Ok(NoiseFloorCheck {
        sensor: curve.name.clone(),
        factor,
        bins_checked: checked,
        fraction_at_floor: fraction,
        span_at_floor_hz: span,
        warning,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn geophone_response_has_the_textbook_shape() {
        // H(s) = G s²/(s² + 2ζω₀s + ω₀²): at f₀ it is G/(2ζ) · i... |H| = G/(2ζ) and the
        // phase +90°; far above f₀, → G (e.g. a standard second-order high-pass, any
        // instrument text; docs/references.md#sensor-response).
        let g = SensorResponse::geophone(4.5, 0.7, 28.8).unwrap();
        let h0 = g.response(4.5);
        assert!((h0.norm() - 28.8 / 1.4).abs() < 1e-9 * 28.8, "{h0}");
        assert!((h0.arg() - PI / 2.0).abs() < 1e-12);
        assert!((g.response(4500.0).norm() / 28.8 - 1.0).abs() < 1e-5);
        // The valid band starts where |H|/G = 0.1.
        let lo = g.valid_band_hz.0;
        assert!((g.response(lo).norm() / 28.8 - MIN_RELATIVE_GAIN).abs() < 1e-9);
        assert!(lo > 1.0 && lo < 2.0, "{lo}");
    }

    #[test]
    fn removal_recovers_an_in_band_velocity_and_refuses_outside() {
        let g = SensorResponse::geophone(4.5, 0.7, 28.8).unwrap();
        let (fs, n) = (200.0, 4000);
        let df = fs / n as f64;
        // Velocity: bin-centred sines at 3, 10 and 40 Hz, passed through H exactly per bin.
        let lines = [(3.0, 1e-6, 0.3), (10.0, 2e-6, 1.0), (40.0, 5e-7, -0.7)];
        let v: Vec<f64> = (0..n)
            .map(|i| {
                let t = i as f64 / fs;
                lines.iter().map(|&(f, a, p)| a * (2.0 * PI * f * t + p).cos()).sum()
            })
            .collect();
        let out: Vec<f64> = (0..n)
            .map(|i| {
                let t = i as f64 / fs;
                lines
                    .iter()
                    .map(|&(f, a, p)| {
                        let h = g.response(f);
                        a * h.norm() * (2.0 * PI * f * t + p + h.arg()).cos()
                    })
                    .sum()
            })
            .collect();
        assert!(((3.0 / df) - 60.0).abs() < 1e-9);
        let back = g.remove(&out, fs, Some((2.0, 90.0))).unwrap();
        let err = v.iter().zip(&back).map(|(a, b)| (a - b).abs()).fold(0.0, f64::max);
        assert!(err < 1e-9 * 2e-6, "{err}");
        let e = g.remove(&out, fs, Some((0.5, 90.0))).unwrap_err();
        assert!(matches!(e, Error::OutOfRange { value: 0.5, .. }), "{e:?}");
        assert!(e.to_string().contains("band low end") && e.to_string().contains("valid band"), "{e}");
        let e = g.remove(&out, fs, Some((2.0, 150.0))).unwrap_err();
        assert!(matches!(e, Error::OutOfRange { value: 150.0, max: 100.0, .. }), "{e:?}");
        assert!(e.to_string().contains("Nyquist"), "{e}");
        let e = g.remove(&out, fs, Some((5.0, 2.0))).unwrap_err();
        assert!(matches!(e, Error::InvalidArgument { .. }), "{e:?}");
    }

    #[test]
    fn psd_removal_divides_by_the_closed_form_response_inside_the_band_only() {
        // |H|² of a moving-coil geophone, G² ω⁴ / ((ω₀² − ω²)² + (2ζω₀ω)²) (the standard
        // second-order electrodynamic sensor, docs/references.md#sensor-response).
        let (f0, z, gc) = (4.5, 0.7, 28.8);
        let g = SensorResponse::geophone(f0, z, gc).unwrap();
        let f: Vec<f64> = (1..=400).map(|k| 0.25 * k as f64).collect();
        let v2: Vec<f64> = f.iter().map(|&fk| 1e-12 * (1.0 + fk)).collect();
        let band = (3.0, 60.0);
        let out = g.remove_psd(&f, &v2, Some(band)).unwrap();
        let w0 = 2.0 * PI * f0;
        for ((&fk, &p), &o) in f.iter().zip(&v2).zip(&out) {
            let w = 2.0 * PI * fk;
            let h2 = gc * gc * w.powi(4) / ((w0 * w0 - w * w).powi(2) + (2.0 * z * w0 * w).powi(2));
            if (band.0..=band.1).contains(&fk) {
                assert!((o - p / h2).abs() <= 1e-12 * (p / h2), "{fk}: {o} vs {}", p / h2);
            } else {
                assert_eq!(o, 0.0, "{fk}");
            }
        }
        // Default band: the valid band (no Nyquist for a PSD); below it, nothing.
        let all = g.remove_psd(&f, &v2, None).unwrap();
        let lo = g.valid_band_hz.0;
        assert!(f.iter().zip(&all).all(|(&fk, &o)| (fk < lo) == (o == 0.0)));
        let e = g.remove_psd(&f, &v2, Some((0.5, 60.0))).unwrap_err();
        assert!(matches!(e, Error::OutOfRange { value: 0.5, .. }), "{e:?}");
        assert!(e.to_string().contains("band low end"), "{e}");
        let e = g.remove_psd(&f, &v2[..3], None).unwrap_err();
        assert!(matches!(e, Error::ShapeMismatch { expected: 400, got: 3, .. }), "{e:?}");
        let mut bad = v2.clone();
        bad[7] = -1.0;
        assert!(g.remove_psd(&f, &bad, None).unwrap_err().to_string().contains("index 7"));
    }

    #[test]
    fn noise_floor_check_flags_a_phone_recording_of_quiet_ground() {
        let phone = NoiseCurve::preset("phone-mems").unwrap();
        let f = log_grid(0.1, 100.0, 50);
        // Ground at 100 µg/√Hz: below the 150 µg/√Hz phone floor everywhere.
        let quiet = Psd::new(f.clone(), vec![(100.0 * MICRO_G).powi(2); 50], Quantity::Acceleration).unwrap();
        let c = noise_floor_check(&quiet, &phone, None).unwrap();
        assert_eq!((c.bins_checked, c.fraction_at_floor), (50, 1.0));
        assert!(c.warning.unwrap().contains("phone-mems"));
        // 10× the floor in amplitude: no warning.
        let loud = Psd::new(f, vec![(1500.0 * MICRO_G).powi(2); 50], Quantity::Acceleration).unwrap();
        let c = noise_floor_check(&loud, &phone, None).unwrap();
        assert!(c.warning.is_none() && c.fraction_at_floor == 0.0);
        assert!(NoiseCurve::preset("tin-can").is_err());
    }

    #[test]
    fn geophone_noise_is_lowest_near_its_band_and_below_the_phone() {
        // Sanity, a practitioner's reading: a geophone with a preamp is far quieter than a phone
        // above ~1 Hz, and its velocity-coil noise rises toward low frequency.
        let geo = NoiseCurve::preset("geophone-4.5hz").unwrap();
        let phone = NoiseCurve::preset("phone-mems").unwrap();
        let at = |c: &NoiseCurve, f: f64| {
            c.to_psd().unwrap().value_at(f, crate::spectrum::Extrapolate::Error).unwrap()
        };
        for f in [2.0, 10.0, 50.0] {
            assert!(at(&geo, f) < 1e-3 * at(&phone, f), "{f}");
        }
        assert!(at(&geo, 0.05) > 100.0 * at(&geo, 5.0));
    }
}

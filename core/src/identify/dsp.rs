//! FFT helpers for ring-down identification: zero-padded spectrum, peak interpolation, and
//! zero-phase band-limited analytic signals (optionally shifted to baseband and decimated).

use crate::Complex64;
use crate::error::{Error, Result};
use realfft::RealFftPlanner;
use rustfft::FftPlanner;

/// One-sided spectrum of `y` zero-padded to `nfft` (a power of two ≥ `y.len()`): `nfft/2 + 1`
/// bins X[k] = Σ y[n] e^{−2πikn/nfft}, no window, no scaling.
pub(crate) fn padded_spectrum(y: &[f64], nfft: usize) -> Result<Vec<Complex64>> {
    if nfft < y.len() || nfft < 2 || !nfft.is_power_of_two() {
        return Err(Error::invalid("nfft", format!("{nfft} must be a power of two >= {}", y.len())));
    }
    let mut planner = RealFftPlanner::<f64>::new();
    let r2c = planner.plan_fft_forward(nfft);
    let mut input = r2c.make_input_vec();
    input[..y.len()].copy_from_slice(y);
    let mut out = r2c.make_output_vec();
    r2c.process(&mut input, &mut out).map_err(|e| Error::invalid("fft", e.to_string()))?;
    Ok(out)
}

/// Jacobsen's three-bin estimator of a spectral peak's offset from bin `k`, in padded bins:
/// δ = s · Re[(X[k−s] − X[k+s]) / (2X[k] − X[k−s] − X[k+s])], clamped to [−s, s], with the
/// step s = the zero-padding factor so that the three bins are 1/T apart, as the estimator
/// assumes (on adjacent bins of zero-padded data it is strongly biased).
/// E. Jacobsen and P. Kootsookos, "Fast, accurate frequency estimators", IEEE Signal Processing
/// Magazine 24(3), 123–125, 2007 (from memory: verify).
pub(crate) fn jacobsen_offset(bins: &[Complex64], k: usize, step: usize) -> f64 {
    let s = step.max(1);
    if k < s || k + s >= bins.len() {
        return 0.0;
    }
    let (a, b, c) = (bins[k - s], bins[k], bins[k + s]);
    let den = 2.0 * b - a - c;
    if den.norm() == 0.0 {
        return 0.0;
    }
    let d = ((a - c) / den).re * s as f64;
    if d.is_finite() { d.clamp(-(s as f64), s as f64) } else { 0.0 }
}

/// Vertex of the parabola through (−1, a), (0, b), (1, c): (offset, value).
pub(crate) fn parabolic_peak(a: f64, b: f64, c: f64) -> (f64, f64) {
    let den = a - 2.0 * b + c;
    if den >= 0.0 || !den.is_finite() {
        return (0.0, b);
    }
    let p = (0.5 * (a - c) / den).clamp(-0.5, 0.5);
    (p, b - 0.25 * (a - c) * p)
}

/// A zero-phase band mask: 1 on [lo, hi], Gaussian edges exp(−d²/2e²) at distance d outside,
/// cut to 0 beyond 6e (gain 1.5e-8) and at f ≤ 0. With lo = hi it is a pure Gaussian, whose
/// kernel is Gaussian in time, e√(2π) e^{−2π²e²t²}: the part of the filter's response to a
/// switched-on decay that is still missing at time t is about erfc(π√2 e t)/2, below 0.1 %
/// after 0.5/e seconds; then a decaying exponential passes with its rate unchanged.
#[derive(Debug, Clone, Copy)]
pub(crate) struct BandMask {
    pub lo_hz: f64,
    pub hi_hz: f64,
    pub edge_hz: f64,
}

impl BandMask {
    pub(crate) fn gain(&self, f: f64) -> f64 {
        if f <= 0.0 {
            return 0.0;
        }
        let d = if f < self.lo_hz {
            self.lo_hz - f
        } else if f > self.hi_hz {
            f - self.hi_hz
        } else {
            return 1.0;
        };
        if d >= 6.0 * self.edge_hz { 0.0 } else { (-0.5 * (d / self.edge_hz).powi(2)).exp() }
    }
    /// Support [lo − 6e, hi + 6e] (Hz), clamped at 0.
    pub(crate) fn support(&self) -> (f64, f64) {
        ((self.lo_hz - 6.0 * self.edge_hz).max(0.0), self.hi_hz + 6.0 * self.edge_hz)
    }
    /// Time after which the kernel's transient has died (s): 0.5 / e.
    pub(crate) fn settle_s(&self) -> f64 {
        0.5 / self.edge_hz
    }
}

/// Band-limited analytic signal from a one-sided padded spectrum, shifted down by the bin
/// `kc` (f_c = kc·df) and decimated by D = nfft / n_block:
/// y[m] = x_a(m D / fs) · e^{−2πi f_c m D / fs}, m = 0..n_block, with
/// x_a = 2 × mask × X on positive frequencies (zero-phase: the mask is real).
/// Exact when the mask support lies within `kc ± n_block/2` bins. `kc = 0, n_block = nfft`
/// gives the full-rate analytic signal.
pub(crate) fn band_analytic(
    bins: &[Complex64],
    nfft: usize,
    df_hz: f64,
    kc: usize,
    n_block: usize,
    mask: &BandMask,
) -> Result<Vec<Complex64>> {
    if n_block == 0 || !n_block.is_power_of_two() || n_block > nfft || bins.len() != nfft / 2 + 1 {
        return Err(Error::invalid("n_block", format!("{n_block} must be a power of two <= {nfft}")));
    }
    let half = n_block as i64 / 2;
    let mut block = vec![Complex64::new(0.0, 0.0); n_block];
    for (j, slot) in block.iter_mut().enumerate() {
        let o = if (j as i64) < half { j as i64 } else { j as i64 - n_block as i64 };
        let k = kc as i64 + o;
        if k <= 0 || k as usize >= bins.len() {
            continue;
        }
        let g = mask.gain(k as f64 * df_hz);
        if g > 0.0 {
            *slot = bins[k as usize] * (2.0 * g);
        }
    }
    let mut planner = FftPlanner::<f64>::new();
    let inv = planner.plan_fft_inverse(n_block);
    inv.process(&mut block); // length checked above: n_block is the plan length
    let scale = 1.0 / nfft as f64;
    for v in &mut block {
        *v *= scale;
    }
    Ok(block)
}

/// Median of a slice (NaN-free input), average of the middle two for even length.
pub(crate) fn median(v: &[f64]) -> f64 {
    if v.is_empty() {
        return f64::NAN;
    }
    let mut s = v.to_vec();
    s.sort_by(|a, b| a.total_cmp(b));
    let n = s.len();
    if n % 2 == 1 { s[n / 2] } else { 0.5 * (s[n / 2 - 1] + s[n / 2]) }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::f64::consts::PI;

    #[test]
    fn analytic_signal_of_a_sine_is_its_complex_exponential() {
        // Analytic signal (Hilbert transform by FFT): sin(ωt) → −i e^{iωt}, envelope 1.
        let fs = 100.0;
        let n = 1000;
        let f0 = 7.0;
        let x: Vec<f64> = (0..n).map(|i| (2.0 * PI * f0 * i as f64 / fs).sin()).collect();
        let nfft = 4096;
        let bins = padded_spectrum(&x, nfft).unwrap();
        let mask = BandMask { lo_hz: 5.0, hi_hz: 9.0, edge_hz: 0.4 };
        let z = band_analytic(&bins, nfft, fs / nfft as f64, 0, nfft, &mask).unwrap();
        for i in 200..800 {
            assert!((z[i].re - x[i]).abs() < 2e-3, "{i} {} {}", z[i].re, x[i]);
            assert!((z[i].norm() - 1.0).abs() < 2e-3);
        }
        // Baseband + decimation by 8 (512 bins = 12.5 Hz ⊃ mask support 2.6..11.4 Hz) reproduces
        // the full-rate analytic signal times e^{−iω_c t}.
        let kc = (f0 / (fs / nfft as f64)).round() as usize;
        let y = band_analytic(&bins, nfft, fs / nfft as f64, kc, nfft / 8, &mask).unwrap();
        let fc = kc as f64 * fs / nfft as f64;
        for (m, ym) in y.iter().enumerate().take(100).skip(20) {
            let i = m * 8;
            let t = i as f64 / fs;
            let back = ym * Complex64::from_polar(1.0, 2.0 * PI * fc * t);
            assert!((back - z[i]).norm() < 1e-9, "{m}");
        }
    }

    #[test]
    fn jacobsen_locates_an_off_bin_sine() {
        let fs = 64.0;
        let n = 256;
        let f0 = 10.37;
        let x: Vec<f64> = (0..n).map(|i| (2.0 * PI * f0 * i as f64 / fs).cos()).collect();
        let nfft = 1024;
        let b = padded_spectrum(&x, nfft).unwrap();
        let k = (1..b.len() - 1).max_by(|&i, &j| b[i].norm().total_cmp(&b[j].norm())).unwrap();
        let df = fs / nfft as f64;
        let f = (k as f64 + jacobsen_offset(&b, k, 4)) * df;
        eprintln!("nearest bin {} interpolated {f}", k as f64 * df);
        assert!((f - f0).abs() < 0.02 * df, "{f}");
        assert!((k as f64 * df - f0).abs() > 5.0 * (f - f0).abs());
    }
}

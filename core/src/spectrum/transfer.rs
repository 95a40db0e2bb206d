//! Two-channel transfer-function estimates from Welch spectra (tap and shaker tests).
//!
//! With the Welch auto and cross spectra of an input x and an output y (scipy.signal conventions:
//! Pxy = conj(X)·Y averaged over segments),
//! H1 = Pxy / Pxx (unbiased by noise on y) and H2 = Pyy / Pyx = Pyy / conj(Pxy) (unbiased by
//! noise on x); H1 ≤ H ≤ H2 in magnitude for uncorrelated noise, and |H1/H2| = γ², the
//! coherence (Bendat & Piersol, *Random Data*, ch. on single-input/single-output relations;
//! from memory: verify).

use super::welch::{WelchConfig, csd, welch};
use crate::error::{Error, Result};
use num_complex::Complex64;

/// H1, H2 and coherence on the Welch bins above 0 Hz.
#[derive(Debug, Clone, PartialEq)]
pub struct TransferEstimate {
    /// Bin frequencies k·fs/nperseg (Hz), k = 1..=nperseg/2 (the DC bin is left out).
    pub freq_hz: Vec<f64>,
    /// Pxy / Pxx (unit of y per unit of x).
    pub h1: Vec<Complex64>,
    /// Pyy / conj(Pxy) (unit of y per unit of x).
    pub h2: Vec<Complex64>,
    /// |Pxy|² / (Pxx Pyy) in [0, 1].
    pub coherence: Vec<f64>,
    /// Number of averaged segments.
    pub n_segments: usize,
}

/// Transfer estimates from input `x` to output `y` (same length, sampled at `fs`).
///
/// Errors if x (for H1) or the cross spectrum (for H2) has no power in a bin above 0 Hz; the
/// message names the frequency.
///
/// ```
/// use stillsky::spectrum::{WelchConfig, transfer_estimate};
/// // y = 3 x: H1 = H2 = 3 and coherence 1 in every bin.
/// let x: Vec<f64> = (0..4096).map(|k| ((k * 7919) % 1000) as f64 / 1000.0 - 0.5).collect();
/// let y: Vec<f64> = x.iter().map(|v| 3.0 * v).collect();
/// let t = transfer_estimate(&x, &y, 100.0, &WelchConfig::new(256))?;
/// assert!(t.h1.iter().chain(&t.h2).all(|h| (h.re - 3.0).abs() < 1e-9 && h.im.abs() < 1e-9));
/// # Ok::<(), stillsky::Error>(())
/// ```
pub fn transfer_estimate(x: &[f64], y: &[f64], fs: f64, cfg: &WelchConfig) -> Result<TransferEstimate> {
    let pxy = csd(x, y, fs, cfg)?;
    let pxx = welch(x, fs, cfg)?;
    let pyy = welch(y, fs, cfg)?;
    let nb = pxy.values.len();
    let (mut h1, mut h2, mut coh) = (Vec::with_capacity(nb), Vec::with_capacity(nb), Vec::with_capacity(nb));
    for k in 1..nb {
        let (sxy, sxx, syy) = (pxy.values[k], pxx.values[k], pyy.values[k]);
        let f = pxy.freq_hz[k];
        if sxx <= 0.0 {
            return Err(Error::invalid(
                "x",
                format!("has no power at {f} Hz: H1 = Pxy/Pxx is undefined there"),
            ));
        }
        if sxy.norm_sqr() <= 0.0 {
            return Err(Error::invalid(
                "y",
                format!("has no cross power with x at {f} Hz: H2 = Pyy/Pyx is undefined there"),
            ));
        }
        h1.push(sxy / sxx);
        h2.push(Complex64::new(syy, 0.0) / sxy.conj());
        coh.push((sxy.norm_sqr() / (sxx * syy)).min(1.0));
    }
    Ok(TransferEstimate {
        freq_hz: pxy.freq_hz[1..].to_vec(),
        h1,
        h2,
        coherence: coh,
        n_segments: pxy.n_segments,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn h1_over_h2_is_the_coherence_and_zero_input_is_refused() {
        // |H1 / H2| = |Pxy|² / (Pxx Pyy) = γ² exactly (from the definitions).
        let x: Vec<f64> = (0..2048).map(|k| ((k * 7919 + 13) % 1009) as f64 / 1009.0 - 0.5).collect();
        let y: Vec<f64> = (0..2048)
            .map(|k| 2.0 * x[k] + if k > 0 { x[k - 1] } else { 0.0 } + 0.3 * x[(k * 31) % 2048])
            .collect();
        let t = transfer_estimate(&x, &y, 50.0, &WelchConfig::new(128)).unwrap();
        assert_eq!(t.freq_hz.len(), 64);
        for k in 0..t.h1.len() {
            assert!(((t.h1[k] / t.h2[k]).norm() - t.coherence[k]).abs() < 1e-9, "bin {k}");
        }
        let e = transfer_estimate(&vec![0.0; 512], &x[..512], 50.0, &WelchConfig::new(128)).unwrap_err();
        assert!(matches!(e, Error::InvalidArgument { ref name, .. } if name == "x"), "{e}");
    }
}

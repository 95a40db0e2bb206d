//! Data windows for Welch estimation, periodic (DFT-even) as scipy.signal.get_window's default
//! (`fftbins=True`, i.e. `sym=False`).

use std::f64::consts::PI;

use crate::error::{Error, Result};

/// A data window. Named windows are generated periodic (length N taken from a symmetric window
/// of length N + 1), exactly as `scipy.signal.get_window(name, N)`.
#[derive(Debug, Clone, PartialEq, Default)]
pub enum Window {
    /// Hann, 0.5 − 0.5 cos(2πn/N) (scipy "hann").
    #[default]
    Hann,
    /// Hamming, 0.54 − 0.46 cos(2πn/N) (scipy "hamming").
    Hamming,
    /// Blackman, coefficients 0.42, 0.50, 0.08 (scipy "blackman").
    Blackman,
    /// 4-term Blackman–Harris, 0.35875, 0.48829, 0.14128, 0.01168 (scipy "blackmanharris").
    BlackmanHarris,
    /// 5-term flat-top as in scipy "flattop" (amplitude-accurate for sines).
    FlatTop,
    /// Rectangular (scipy "boxcar").
    Rectangular,
    /// User-supplied weights; their length must equal `nperseg`.
    Custom(Vec<f64>),
}

const NAMES: [(&str, Window); 6] = [
    ("hann", Window::Hann),
    ("hamming", Window::Hamming),
    ("blackman", Window::Blackman),
    ("blackmanharris", Window::BlackmanHarris),
    ("flattop", Window::FlatTop),
    ("boxcar", Window::Rectangular),
];

impl Window {
    /// Parse a scipy window name: "hann", "hamming", "blackman", "blackmanharris", "flattop",
    /// "boxcar" (case-insensitive; "rectangular" is accepted for boxcar).
    pub fn from_name(name: &str) -> Result<Window> {
        let lower = name.trim().to_ascii_lowercase();
        if lower == "rectangular" {
            return Ok(Window::Rectangular);
        }
        NAMES.iter().find(|(n, _)| *n == lower).map(|(_, w)| w.clone()).ok_or_else(|| Error::UnknownName {
            kind: "window".into(),
            name: name.to_string(),
            known: NAMES.iter().map(|(n, _)| *n).collect::<Vec<_>>().join(", "),
        })
    }

    /// The scipy name of a named window ("custom" for [`Window::Custom`]).
    pub fn name(&self) -> &'static str {
        match self {
            Window::Custom(_) => "custom",
            w => NAMES.iter().find(|(_, x)| x == w).map(|(n, _)| *n).unwrap_or("custom"),
        }
    }

    fn cosine_coefficients(&self) -> Option<&'static [f64]> {
        match self {
            Window::Hann => Some(&[0.5, 0.5]),
            Window::Hamming => Some(&[0.54, 0.46]),
            Window::Blackman => Some(&[0.42, 0.50, 0.08]),
            Window::BlackmanHarris => Some(&[0.35875, 0.48829, 0.14128, 0.01168]),
            Window::FlatTop => Some(&[0.21557895, 0.41663158, 0.277263158, 0.083578947, 0.006947368]),
            Window::Rectangular | Window::Custom(_) => None,
        }
    }

    /// The `n` window weights. Errors for n = 0, and for a custom window of another length or
    /// with non-finite weights, or all-zero weights.
    pub fn weights(&self, n: usize) -> Result<Vec<f64>> {
        if n == 0 {
            return Err(Error::invalid("nperseg", "must be >= 1, got 0"));
        }
        let w = match self {
            Window::Custom(w) => {
                if w.len() != n {
                    return Err(Error::shape("custom window length vs nperseg", n, w.len()));
                }
                crate::error::require_all_finite("custom window", w)?;
                w.clone()
            }
            Window::Rectangular => vec![1.0; n],
            _ => {
                let a = self.cosine_coefficients().unwrap_or(&[1.0]);
                if n == 1 {
                    // scipy returns [1.0] for a window of length 1.
                    return Ok(vec![1.0]);
                }
                // scipy general_cosine over linspace(-π, π, n + 1), last point dropped:
                // w[i] = Σ a_k cos(k(−π + 2πi/n)).
                (0..n)
                    .map(|i| {
                        let fac = -PI + 2.0 * PI * i as f64 / n as f64;
                        a.iter().enumerate().map(|(k, ak)| ak * (k as f64 * fac).cos()).sum()
                    })
                    .collect()
            }
        };
        if w.iter().all(|&x| x == 0.0) {
            return Err(Error::invalid("window", "all weights are zero"));
        }
        Ok(w)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn hann_sums_match_closed_form() {
        // Periodic Hann: Σw = N/2, Σw² = 3N/8, ENBW = 1.5 bins (docs/references.md#s12).
        let n = 256;
        let w = Window::Hann.weights(n).unwrap();
        let s1: f64 = w.iter().sum();
        let s2: f64 = w.iter().map(|x| x * x).sum();
        assert_relative_eq!(s1, n as f64 / 2.0, max_relative = 1e-13);
        assert_relative_eq!(s2, 3.0 * n as f64 / 8.0, max_relative = 1e-13);
        assert_relative_eq!(n as f64 * s2 / (s1 * s1), 1.5, max_relative = 1e-13);
        assert!(w[0].abs() < 1e-16);
        assert_relative_eq!(w[n / 2], 1.0, max_relative = 1e-15);
    }

    #[test]
    fn names_parse_and_unknown_lists_known() {
        for (n, w) in NAMES.iter() {
            assert_eq!(&Window::from_name(n).unwrap(), w);
            assert_eq!(w.name(), *n);
        }
        let e = Window::from_name("kaiser").unwrap_err();
        assert!(e.to_string().contains("kaiser") && e.to_string().contains("blackmanharris"), "{e}");
        assert!(matches!(Window::Custom(vec![1.0; 3]).weights(4), Err(Error::ShapeMismatch { .. })));
    }
}

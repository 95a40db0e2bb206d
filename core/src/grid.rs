//! Frequency grids: validated, strictly increasing, finite and positive (Hz).

use crate::error::{Error, Result};

/// Longest frequency grid accepted anywhere (refused up front, not by running out of memory).
pub const MAX_GRID_LEN: usize = 1 << 22;

/// Validate a frequency array: non-empty, finite, > 0, strictly increasing, not too long.
pub fn validate_freqs(name: &str, hz: &[f64]) -> Result<()> {
    let bad = |reason: String| Err(Error::InvalidGrid { name: name.to_string(), reason });
    if hz.is_empty() {
        return bad("is empty".into());
    }
    if hz.len() > MAX_GRID_LEN {
        return Err(Error::TooLarge {
            what: format!("length of {name}"),
            value: hz.len(),
            limit: MAX_GRID_LEN,
        });
    }
    for (i, &f) in hz.iter().enumerate() {
        if !f.is_finite() {
            return bad(format!("value {f} at index {i} is not finite"));
        }
        if f <= 0.0 {
            return bad(format!("value {f} at index {i} is not > 0"));
        }
        if i > 0 && f <= hz[i - 1] {
            return bad(format!(
                "not strictly increasing: {} at index {} then {f} at index {i}",
                hz[i - 1],
                i - 1
            ));
        }
    }
    Ok(())
}

/// A validated frequency grid in Hz.
#[derive(Debug, Clone, PartialEq)]
pub struct FreqGrid {
    hz: Vec<f64>,
}

impl FreqGrid {
    /// Wrap and validate an array of frequencies (Hz).
    pub fn new(hz: Vec<f64>) -> Result<Self> {
        validate_freqs("freq_hz", &hz)?;
        Ok(Self { hz })
    }

    /// `n` points spaced evenly in log frequency from `f_min_hz` to `f_max_hz` inclusive.
    pub fn log(f_min_hz: f64, f_max_hz: f64, n: usize) -> Result<Self> {
        Self::check_span(f_min_hz, f_max_hz, n)?;
        let (a, b) = (f_min_hz.ln(), f_max_hz.ln());
        let mut hz: Vec<f64> = (0..n).map(|i| (a + (b - a) * i as f64 / (n - 1) as f64).exp()).collect();
        // Pin the ends exactly (exp(ln x) is not always x).
        hz[0] = f_min_hz;
        hz[n - 1] = f_max_hz;
        Self::new(hz)
    }

    /// `n` points spaced evenly from `f_min_hz` to `f_max_hz` inclusive.
    pub fn linear(f_min_hz: f64, f_max_hz: f64, n: usize) -> Result<Self> {
        Self::check_span(f_min_hz, f_max_hz, n)?;
        let hz = (0..n).map(|i| f_min_hz + (f_max_hz - f_min_hz) * i as f64 / (n - 1) as f64).collect();
        Self::new(hz)
    }

    fn check_span(f_min_hz: f64, f_max_hz: f64, n: usize) -> Result<()> {
        crate::error::require_positive("f_min_hz", f_min_hz)?;
        crate::error::require_positive("f_max_hz", f_max_hz)?;
        if f_max_hz <= f_min_hz {
            return Err(Error::invalid(
                "f_max_hz",
                format!("must exceed f_min_hz = {f_min_hz}, got {f_max_hz}"),
            ));
        }
        if n < 2 {
            return Err(Error::invalid("n", format!("a grid needs at least 2 points, got {n}")));
        }
        if n > MAX_GRID_LEN {
            return Err(Error::TooLarge { what: "grid length".into(), value: n, limit: MAX_GRID_LEN });
        }
        Ok(())
    }

    /// The frequencies in Hz.
    pub fn hz(&self) -> &[f64] {
        &self.hz
    }

    /// Number of points.
    pub fn len(&self) -> usize {
        self.hz.len()
    }

    /// Always false: a valid grid has at least one point.
    pub fn is_empty(&self) -> bool {
        self.hz.is_empty()
    }

    /// Consume into the underlying vector.
    pub fn into_vec(self) -> Vec<f64> {
        self.hz
    }

    /// ∫ y df over the grid by the trapezoid rule (`y` has one value per frequency).
    pub fn integrate(&self, y: &[f64]) -> f64 {
        trapezoid(&self.hz, y)
    }

    /// Running trapezoid integral from the lowest frequency: element i is ∫_{f_0}^{f_i} y df.
    pub fn cumulative_integral(&self, y: &[f64]) -> Vec<f64> {
        cumulative_from_low(&self.hz, y)
    }

    /// Weights w with Σ w_i y_i equal to the trapezoid integral of y (see [`add_trapezoid_weights`]).
    pub fn trapezoid_weights(&self) -> Vec<f64> {
        let mut w = vec![0.0; self.hz.len()];
        add_trapezoid_weights(&self.hz, None, &mut w);
        w
    }
}

// The trapezoid rule, written once. These take raw slices because spectra and responses carry
// their frequencies as plain vectors; [`FreqGrid`] exposes the same rule as methods. Each interval
// contributes ½·(f_k − f_{k−1})·(y_{k−1} + y_k), summed from the lowest frequency up.

/// ∫ y df by the trapezoid rule on `f` (slices of equal length; 0 for fewer than 2 points).
pub fn trapezoid(f: &[f64], y: &[f64]) -> f64 {
    f.windows(2).zip(y.windows(2)).map(|(fw, yw)| 0.5 * (fw[1] - fw[0]) * (yw[0] + yw[1])).sum()
}

/// Running trapezoid integral from the lowest frequency: element i is ∫_{f_0}^{f_i} y df.
pub fn cumulative_from_low(f: &[f64], y: &[f64]) -> Vec<f64> {
    let mut acc = 0.0;
    let mut out = vec![0.0; f.len()];
    for k in 1..f.len() {
        acc += 0.5 * (f[k] - f[k - 1]) * (y[k] + y[k - 1]);
        out[k] = acc;
    }
    out
}

/// Running trapezoid integral from the highest frequency: element i is ∫_{f_i}^{f_max} y df.
pub fn cumulative_from_high(f: &[f64], y: &[f64]) -> Vec<f64> {
    let n = f.len();
    let mut out = vec![0.0; n];
    let mut acc = 0.0;
    for i in (0..n.saturating_sub(1)).rev() {
        acc += 0.5 * (f[i + 1] - f[i]) * (y[i] + y[i + 1]);
        out[i] = acc;
    }
    out
}

/// Add the trapezoid weights of `f`, each multiplied by `scale[i]` when given, into `w`, so that
/// Σ w_i y_i = ∫ scale·y df. `w` (and `scale`) have one entry per frequency.
pub fn add_trapezoid_weights(f: &[f64], scale: Option<&[f64]>, w: &mut [f64]) {
    for i in 1..f.len() {
        let h = 0.5 * (f[i] - f[i - 1]);
        let (a, b) = scale.map_or((1.0, 1.0), |s| (s[i - 1], s[i]));
        w[i - 1] += h * a;
        w[i] += h * b;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rejects_bad_grids_naming_the_problem() {
        for (hz, needle) in [
            (vec![], "empty"),
            (vec![1.0, f64::NAN], "not finite"),
            (vec![0.0, 1.0], "not > 0"),
            (vec![-1.0, 1.0], "not > 0"),
            (vec![1.0, 1.0], "strictly increasing"),
            (vec![2.0, 1.0], "strictly increasing"),
        ] {
            let e = FreqGrid::new(hz).unwrap_err();
            assert!(matches!(e, Error::InvalidGrid { .. }));
            assert!(e.to_string().contains(needle), "{e}");
        }
    }

    #[test]
    fn log_grid_hits_ends() {
        let g = FreqGrid::log(0.1, 100.0, 31).unwrap();
        assert!((g.hz()[0] - 0.1).abs() < 1e-15);
        assert!((g.hz()[30] - 100.0).abs() < 1e-12);
        assert!(FreqGrid::log(1.0, 1.0, 10).is_err());
    }
    #[test]
    fn trapezoid_forms_agree_and_integrate_exactly_linear_functions() {
        // The trapezoid rule is exact for a linear integrand: ∫_1^3 (2f + 1) df = 10.
        let g = FreqGrid::new(vec![1.0, 1.5, 2.25, 3.0]).unwrap();
        let y: Vec<f64> = g.hz().iter().map(|f| 2.0 * f + 1.0).collect();
        assert!((g.integrate(&y) - 10.0).abs() < 1e-12);
        let c = g.cumulative_integral(&y);
        assert_eq!(c[0], 0.0);
        assert!((c[3] - 10.0).abs() < 1e-12);
        let hi = cumulative_from_high(g.hz(), &y);
        assert!((hi[0] - 10.0).abs() < 1e-12 && hi[3] == 0.0);
        let w = g.trapezoid_weights();
        let by_w: f64 = w.iter().zip(&y).map(|(a, b)| a * b).sum();
        assert!((by_w - 10.0).abs() < 1e-12);
    }
}

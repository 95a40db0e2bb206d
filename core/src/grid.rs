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
}

//! One-sided power spectral densities per Hz, with their physical quantity.

use std::f64::consts::PI;
use std::sync::Arc;

use crate::error::{Error, Result};
use crate::grid::{FreqGrid, validate_freqs};

/// The physical quantity a [`Psd`] describes. Its PSD unit is `unit()²/Hz`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Quantity {
    /// Displacement, m²/Hz.
    Displacement,
    /// Velocity, (m/s)²/Hz.
    Velocity,
    /// Acceleration, (m/s²)²/Hz.
    Acceleration,
    /// Force, N²/Hz.
    Force,
    /// Moment, (N·m)²/Hz.
    Moment,
    /// Angle (small rotation), rad²/Hz.
    Angle,
}

/// Serialized by its lower-case [`Quantity::name`] (a JSON report's field).
impl serde::Serialize for Quantity {
    fn serialize<S: serde::Serializer>(&self, s: S) -> std::result::Result<S::Ok, S::Error> {
        s.serialize_str(self.name())
    }
}

impl Quantity {
    /// All quantities, in declaration order.
    pub const ALL: [Quantity; 6] = [
        Quantity::Displacement,
        Quantity::Velocity,
        Quantity::Acceleration,
        Quantity::Force,
        Quantity::Moment,
        Quantity::Angle,
    ];

    /// Lower-case name: "displacement", "velocity", "acceleration", "force", "moment", "angle".
    pub fn name(self) -> &'static str {
        match self {
            Quantity::Displacement => "displacement",
            Quantity::Velocity => "velocity",
            Quantity::Acceleration => "acceleration",
            Quantity::Force => "force",
            Quantity::Moment => "moment",
            Quantity::Angle => "angle",
        }
    }

    /// Parse a name as given by [`Quantity::name`] (case-insensitive).
    pub fn from_name(name: &str) -> Result<Self> {
        let lower = name.trim().to_ascii_lowercase();
        Self::ALL.into_iter().find(|q| q.name() == lower).ok_or_else(|| Error::UnknownName {
            kind: "quantity".into(),
            name: name.to_string(),
            known: Self::ALL.map(Quantity::name).join(", "),
        })
    }

    /// SI unit of the PSD, e.g. "(m/s²)²/Hz".
    pub fn unit(self) -> &'static str {
        match self {
            Quantity::Displacement => "m²/Hz",
            Quantity::Velocity => "(m/s)²/Hz",
            Quantity::Acceleration => "(m/s²)²/Hz",
            Quantity::Force => "N²/Hz",
            Quantity::Moment => "(N·m)²/Hz",
            Quantity::Angle => "rad²/Hz",
        }
    }

    /// ASCII spelling of [`Quantity::unit`], used in files, e.g. "(m/s^2)^2/Hz".
    pub fn unit_ascii(self) -> &'static str {
        match self {
            Quantity::Displacement => "m^2/Hz",
            Quantity::Velocity => "(m/s)^2/Hz",
            Quantity::Acceleration => "(m/s^2)^2/Hz",
            Quantity::Force => "N^2/Hz",
            Quantity::Moment => "(N*m)^2/Hz",
            Quantity::Angle => "rad^2/Hz",
        }
    }

    /// Order of time derivative for motion quantities (displacement 0, velocity 1,
    /// acceleration 2); `None` for force, moment and angle.
    pub fn motion_order(self) -> Option<i32> {
        match self {
            Quantity::Displacement => Some(0),
            Quantity::Velocity => Some(1),
            Quantity::Acceleration => Some(2),
            _ => None,
        }
    }
}

impl std::fmt::Display for Quantity {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}

/// Relative tolerance within which a frequency counts as a grid end (absorbs the rounding of
/// computed log grids, e.g. 199.99999999999991 for 200).
pub const END_SNAP_REL: f64 = 1e-12;

/// `f` snapped to `lo` or `hi` when within [`END_SNAP_REL`] of it.
pub(crate) fn snap_to_span(f: f64, lo: f64, hi: f64) -> f64 {
    if (f - lo).abs() <= END_SNAP_REL * lo {
        lo
    } else if (f - hi).abs() <= END_SNAP_REL * hi {
        hi
    } else {
        f
    }
}

/// What to do when a requested frequency lies outside a spectrum's grid.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Extrapolate {
    /// Return [`Error::OutOfRange`] naming the frequency (default).
    #[default]
    Error,
    /// Treat the spectrum as zero outside its grid.
    Zero,
}

/// Proportional band width for [`Psd::octave_band_rms`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BandWidth {
    /// Octave bands: f_m = 1000·10^(3k/10) Hz, edges f_m·10^(±3/20).
    Octave,
    /// One-third-octave bands: f_m = 1000·10^(k/10) Hz, edges f_m·10^(±1/20).
    ThirdOctave,
}

impl BandWidth {
    /// Exponent step in tenths of a decade: 3 for octaves, 1 for third octaves.
    fn step(self) -> i32 {
        match self {
            BandWidth::Octave => 3,
            BandWidth::ThirdOctave => 1,
        }
    }

    /// Exact base-10 mid-band frequency (Hz) of band index `k` (IEC 61260-1 / ANSI S1.11);
    /// k = 0 is 1000 Hz.
    pub fn centre_hz(self, k: i32) -> f64 {
        1000.0 * 10f64.powf(f64::from(self.step() * k) / 10.0)
    }

    /// Lower and upper edges (Hz) of band index `k`.
    pub fn edges_hz(self, k: i32) -> (f64, f64) {
        let c = self.centre_hz(k);
        let h = 10f64.powf(f64::from(self.step()) / 20.0);
        (c / h, c * h)
    }

    /// Index of the band whose centre is nearest (in log frequency) to `f_hz`.
    pub fn nearest_index(self, f_hz: f64) -> i32 {
        (10.0 * (f_hz / 1000.0).log10() / f64::from(self.step())).round() as i32
    }
}

/// RMS per proportional band (see [`Psd::octave_band_rms`]).
#[derive(Debug, Clone, PartialEq)]
pub struct BandLevels {
    /// Exact band centres f_m (Hz).
    pub centre_hz: Vec<f64>,
    /// Lower band edges (Hz).
    pub lower_hz: Vec<f64>,
    /// Upper band edges (Hz).
    pub upper_hz: Vec<f64>,
    /// RMS over the part of each band covered by the grid (unit of the quantity).
    pub rms: Vec<f64>,
    /// True when the whole band lies inside the grid; false for a partly covered edge band.
    pub fully_covered: Vec<bool>,
}

/// A one-sided PSD per Hz: mean square = ∫ S(f) df over the grid.
///
/// Invariants (checked on construction): `freq_hz` non-empty, finite, > 0, strictly increasing;
/// `values` the same length, finite and >= 0.
#[derive(Debug, Clone, PartialEq)]
pub struct Psd {
    /// Shared by the PSDs derived from this one (same grid, new values).
    freq_hz: Arc<[f64]>,
    values: Vec<f64>,
    quantity: Quantity,
}

impl Psd {
    /// Build a PSD from frequencies (Hz) and values (unit of `quantity`, see [`Quantity::unit`]).
    pub fn new(freq_hz: Vec<f64>, values: Vec<f64>, quantity: Quantity) -> Result<Self> {
        validate_freqs("freq_hz", &freq_hz)?;
        Self::on_checked_freqs(freq_hz.into(), values, quantity)
    }

    /// A PSD on frequencies that already passed `validate_freqs` (another PSD's, or a grid
    /// built once for many spectra): only the values are checked, and the frequencies are
    /// shared, not copied.
    pub(crate) fn on_checked_freqs(
        freq_hz: Arc<[f64]>,
        values: Vec<f64>,
        quantity: Quantity,
    ) -> Result<Self> {
        if values.len() != freq_hz.len() {
            return Err(Error::shape("PSD values vs freq_hz", freq_hz.len(), values.len()));
        }
        // A branch-free pass first (vectorized); the first bad value only when there is one.
        if !values.chunks(4096).all(|c| c.iter().fold(true, |ok, v| ok & v.is_finite() & (*v >= 0.0))) {
            for (i, &v) in values.iter().enumerate() {
                if !v.is_finite() {
                    return Err(Error::invalid(
                        "PSD values",
                        format!("value {v} at index {i} is not finite"),
                    ));
                }
                if v < 0.0 {
                    return Err(Error::invalid(
                        "PSD values",
                        format!("value {v} at index {i} (f = {} Hz) is negative", freq_hz[i]),
                    ));
                }
            }
        }
        Ok(Self { freq_hz, values, quantity })
    }

    /// Build a PSD on a validated grid.
    pub fn on_grid(grid: &FreqGrid, values: Vec<f64>, quantity: Quantity) -> Result<Self> {
        Self::on_checked_freqs(grid.hz().into(), values, quantity)
    }

    /// Frequencies (Hz).
    pub fn freq_hz(&self) -> &[f64] {
        &self.freq_hz
    }

    /// PSD values (unit: [`Quantity::unit`] of [`Psd::quantity`]).
    pub fn values(&self) -> &[f64] {
        &self.values
    }

    /// The physical quantity.
    pub fn quantity(&self) -> Quantity {
        self.quantity
    }

    /// Number of grid points.
    pub fn len(&self) -> usize {
        self.freq_hz.len()
    }

    /// Always false: a valid PSD has at least one point.
    pub fn is_empty(&self) -> bool {
        self.freq_hz.is_empty()
    }

    /// Lowest and highest grid frequency (Hz).
    pub fn span_hz(&self) -> (f64, f64) {
        (self.freq_hz[0], self.freq_hz[self.freq_hz.len() - 1])
    }

    /// Convert between motion quantities: S_to = S_from · (2πf)^(2(n_to − n_from)), with n the
    /// derivative order (displacement 0, velocity 1, acceleration 2). Converting a quantity to
    /// itself returns a copy; any other conversion (force, moment, angle) is an error.
    pub fn to(&self, quantity: Quantity) -> Result<Psd> {
        if quantity == self.quantity {
            return Ok(self.clone());
        }
        let (Some(from), Some(to)) = (self.quantity.motion_order(), quantity.motion_order()) else {
            return Err(Error::invalid(
                "quantity",
                format!(
                    "cannot convert a {} PSD to {}: only displacement, velocity and acceleration \
                     convert into each other",
                    self.quantity, quantity
                ),
            ));
        };
        let n = to - from;
        let values = self
            .freq_hz
            .iter()
            .zip(&self.values)
            .map(|(&f, &s)| {
                let w2 = (2.0 * PI * f).powi(2);
                s * w2.powi(n)
            })
            .collect();
        Psd::on_checked_freqs(Arc::clone(&self.freq_hz), values, quantity)
    }

    /// Value at `f_hz` by log–log linear interpolation between grid points (linear in f when
    /// either neighbour is zero). Outside the grid (beyond [`END_SNAP_REL`]): see [`Extrapolate`].
    pub fn value_at(&self, f_hz: f64, policy: Extrapolate) -> Result<f64> {
        let (lo, hi) = self.span_hz();
        let f_hz = snap_to_span(f_hz, lo, hi);
        if !f_hz.is_finite() || f_hz < lo || f_hz > hi {
            return match policy {
                Extrapolate::Zero if f_hz.is_finite() => Ok(0.0),
                _ => Err(Error::OutOfRange { what: "frequency (Hz)".into(), value: f_hz, min: lo, max: hi }),
            };
        }
        let f = &self.freq_hz;
        // Index of the first grid point >= f_hz.
        let j = f.partition_point(|&x| x < f_hz);
        if f[j] == f_hz {
            return Ok(self.values[j]);
        }
        // 0 < j < len here, because lo < f_hz < hi.
        let (f0, f1, s0, s1) = (f[j - 1], f[j], self.values[j - 1], self.values[j]);
        if s0 > 0.0 && s1 > 0.0 {
            let t = (f_hz / f0).ln() / (f1 / f0).ln();
            Ok((s0.ln() + t * (s1 / s0).ln()).exp())
        } else {
            Ok(s0 + (s1 - s0) * (f_hz - f0) / (f1 - f0))
        }
    }

    /// Interpolate onto `grid` (log–log linear, see [`Psd::value_at`]); the quantity is kept.
    pub fn resample(&self, grid: &FreqGrid, policy: Extrapolate) -> Result<Psd> {
        let values = grid.hz().iter().map(|&f| self.value_at(f, policy)).collect::<Result<Vec<_>>>()?;
        Psd::new(grid.hz().to_vec(), values, self.quantity)
    }

    /// Mean square ∫ S df over the grid (trapezoid rule); unit: quantity unit².
    pub fn mean_square(&self) -> f64 {
        crate::grid::trapezoid(&self.freq_hz, &self.values)
    }

    /// RMS = √(mean square) over the grid.
    pub fn rms(&self) -> f64 {
        self.mean_square().sqrt()
    }

    /// Mean square over [f_lo, f_hi] clipped to the grid; trapezoid rule with the integrand
    /// interpolated *linearly* at the band edges, so band integrals add up exactly to the
    /// whole-grid trapezoid. Returns 0 for a band that does not overlap the grid.
    pub(crate) fn band_mean_square_clipped(&self, f_lo: f64, f_hi: f64) -> f64 {
        let (lo, hi) = self.span_hz();
        let a = f_lo.max(lo);
        let b = f_hi.min(hi);
        if b <= a {
            return 0.0;
        }
        let f = &self.freq_hz;
        let s = &self.values;
        let lin = |x: f64| -> f64 {
            let j = f.partition_point(|&v| v < x);
            if f[j] == x {
                return s[j];
            }
            let (f0, f1, s0, s1) = (f[j - 1], f[j], s[j - 1], s[j]);
            s0 + (s1 - s0) * (x - f0) / (f1 - f0)
        };
        // Points strictly inside (a, b).
        let i0 = f.partition_point(|&v| v <= a);
        let i1 = f.partition_point(|&v| v < b);
        let mut total = 0.0;
        let mut px = a;
        let mut ps = lin(a);
        for i in i0..i1 {
            total += 0.5 * (ps + s[i]) * (f[i] - px);
            px = f[i];
            ps = s[i];
        }
        total += 0.5 * (ps + lin(b)) * (b - px);
        total
    }

    /// RMS over the band [f_lo_hz, f_hi_hz], which must lie inside the grid (else
    /// [`Error::OutOfRange`]). Trapezoid rule on the grid; the integrand is interpolated
    /// linearly at the band edges (consistent with the trapezoid rule, so adjacent bands add).
    pub fn band_rms(&self, f_lo_hz: f64, f_hi_hz: f64) -> Result<f64> {
        crate::error::require_positive("f_lo_hz", f_lo_hz)?;
        crate::error::require_positive("f_hi_hz", f_hi_hz)?;
        if f_hi_hz <= f_lo_hz {
            return Err(Error::invalid("f_hi_hz", format!("must exceed f_lo_hz = {f_lo_hz}, got {f_hi_hz}")));
        }
        let (lo, hi) = self.span_hz();
        let (f_lo_hz, f_hi_hz) = (snap_to_span(f_lo_hz, lo, hi), snap_to_span(f_hi_hz, lo, hi));
        for (name, v) in [("band edge f_lo_hz", f_lo_hz), ("band edge f_hi_hz", f_hi_hz)] {
            if v < lo || v > hi {
                return Err(Error::OutOfRange { what: name.into(), value: v, min: lo, max: hi });
            }
        }
        Ok(self.band_mean_square_clipped(f_lo_hz, f_hi_hz).sqrt())
    }

    /// Running RMS from the lowest frequency: element i is √∫_{f_0}^{f_i} S df (so the first
    /// element is 0 and the last equals [`Psd::rms`]).
    pub fn cumulative_rms_from_low(&self) -> Vec<f64> {
        crate::grid::cumulative_from_low(&self.freq_hz, &self.values).into_iter().map(f64::sqrt).collect()
    }

    /// Running RMS from the highest frequency: element i is √∫_{f_i}^{f_max} S df (so the last
    /// element is 0 and the first equals [`Psd::rms`] up to rounding).
    pub fn cumulative_rms_from_high(&self) -> Vec<f64> {
        crate::grid::cumulative_from_high(&self.freq_hz, &self.values).into_iter().map(f64::sqrt).collect()
    }

    /// Multiply every value by `alpha` (finite, >= 0). For an amplitude gain g use alpha = g².
    pub fn scale(&self, alpha: f64) -> Result<Psd> {
        crate::error::require_non_negative("alpha", alpha)?;
        Psd::on_checked_freqs(
            Arc::clone(&self.freq_hz),
            self.values.iter().map(|v| v * alpha).collect(),
            self.quantity,
        )
    }

    /// Sum of two PSDs of the same quantity on the identical grid (uncorrelated sources add).
    pub fn add(&self, other: &Psd) -> Result<Psd> {
        if other.quantity != self.quantity {
            return Err(Error::invalid(
                "other",
                format!("quantity {} does not match {}", other.quantity, self.quantity),
            ));
        }
        if other.len() != self.len() {
            return Err(Error::shape("grid of the PSD to add", self.len(), other.len()));
        }
        if let Some(i) = (0..self.len()).find(|&i| self.freq_hz[i] != other.freq_hz[i]) {
            return Err(Error::invalid(
                "other",
                format!(
                    "grids differ at index {i}: {} Hz vs {} Hz (resample first)",
                    self.freq_hz[i], other.freq_hz[i]
                ),
            ));
        }
        let values = self.values.iter().zip(&other.values).map(|(a, b)| a + b).collect();
        Psd::on_checked_freqs(Arc::clone(&self.freq_hz), values, self.quantity)
    }

    /// RMS in base-10 octave or one-third-octave bands (IEC 61260-1 / ANSI S1.11 mid-band
    /// frequencies; exact, not the rounded nominal labels).
    ///
    /// Rule: every band that overlaps the grid span [f_min, f_max] with non-zero width is
    /// returned, in increasing frequency. A band only partly inside the grid reports the RMS of
    /// its covered part and `fully_covered = false`. The integrals follow
    /// [`Psd::band_rms`], so the band mean squares sum to [`Psd::mean_square`] exactly (up to
    /// rounding). A one-point grid has no bands.
    pub fn octave_band_rms(&self, width: BandWidth) -> BandLevels {
        let (lo, hi) = self.span_hz();
        let mut out = BandLevels {
            centre_hz: vec![],
            lower_hz: vec![],
            upper_hz: vec![],
            rms: vec![],
            fully_covered: vec![],
        };
        if hi <= lo {
            return out;
        }
        let k_min = width.nearest_index(lo) - 1;
        let k_max = width.nearest_index(hi) + 1;
        for k in k_min..=k_max {
            let (a, b) = width.edges_hz(k);
            if b <= lo || a >= hi {
                continue;
            }
            out.centre_hz.push(width.centre_hz(k));
            out.lower_hz.push(a);
            out.upper_hz.push(b);
            out.rms.push(self.band_mean_square_clipped(a, b).sqrt());
            out.fully_covered.push(a >= lo && b <= hi);
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn flat(grid: &FreqGrid, v: f64, q: Quantity) -> Psd {
        Psd::on_grid(grid, vec![v; grid.len()], q).unwrap()
    }

    #[test]
    fn acceleration_to_displacement_is_omega_to_minus_four() {
        // Definition of the one-sided PSD of a derivative: S_a = ω⁴ S_x (docs/conventions.md conventions).
        let g = FreqGrid::log(0.1, 100.0, 50).unwrap();
        let vals: Vec<f64> = g.hz().iter().map(|f| 1e-9 * (1.0 + f)).collect();
        let a = Psd::on_grid(&g, vals.clone(), Quantity::Acceleration).unwrap();
        let d = a.to(Quantity::Displacement).unwrap();
        assert_eq!(d.quantity(), Quantity::Displacement);
        for ((f, s), x) in g.hz().iter().zip(&vals).zip(d.values()) {
            let w = 2.0 * PI * f;
            assert_relative_eq!(*x, s / w.powi(4), max_relative = 1e-14);
        }
        let v = a.to(Quantity::Velocity).unwrap();
        for ((f, s), x) in g.hz().iter().zip(&vals).zip(v.values()) {
            assert_relative_eq!(*x, s / (2.0 * PI * f).powi(2), max_relative = 1e-14);
        }
        // Round trip.
        let back = d.to(Quantity::Acceleration).unwrap();
        for (x, y) in back.values().iter().zip(&vals) {
            assert_relative_eq!(*x, *y, max_relative = 1e-14);
        }
    }

    #[test]
    fn non_motion_conversion_is_an_error() {
        let g = FreqGrid::log(1.0, 10.0, 3).unwrap();
        let f = flat(&g, 1.0, Quantity::Force);
        let e = f.to(Quantity::Displacement).unwrap_err();
        assert!(matches!(e, Error::InvalidArgument { .. }));
        assert!(e.to_string().contains("force") && e.to_string().contains("displacement"), "{e}");
        assert!(flat(&g, 1.0, Quantity::Velocity).to(Quantity::Angle).is_err());
    }

    #[test]
    fn bad_values_are_named() {
        let e = Psd::new(vec![1.0, 2.0], vec![1.0, f64::NAN], Quantity::Velocity).unwrap_err();
        assert!(matches!(e, Error::InvalidArgument { .. }) && e.to_string().contains("NaN"), "{e}");
        let e = Psd::new(vec![1.0, 2.0], vec![1.0, -0.5], Quantity::Velocity).unwrap_err();
        assert!(e.to_string().contains("-0.5") && e.to_string().contains("negative"), "{e}");
        let e = Psd::new(vec![1.0, 2.0], vec![1.0], Quantity::Velocity).unwrap_err();
        assert!(matches!(e, Error::ShapeMismatch { expected: 2, got: 1, .. }), "{e}");
        for (f, needle) in [
            (vec![2.0, 1.0], "strictly increasing"),
            (vec![1.0, 1.0], "strictly increasing"),
            (vec![0.0, 1.0], "value 0 at index 0"),
            (vec![-3.0, 1.0], "-3"),
        ] {
            let e = Psd::new(f, vec![1.0, 1.0], Quantity::Velocity).unwrap_err();
            assert!(matches!(e, Error::InvalidGrid { .. }) && e.to_string().contains(needle), "{e}");
        }
    }

    #[test]
    fn resample_log_log_exact_for_power_laws_and_strict_outside() {
        // A power law S = c f^-2 is a straight line in log-log: interpolation is exact.
        let g = FreqGrid::log(1.0, 100.0, 5).unwrap();
        let p = Psd::on_grid(&g, g.hz().iter().map(|f| 3.0 / (f * f)).collect(), Quantity::Velocity).unwrap();
        let fine = FreqGrid::log(1.0, 100.0, 37).unwrap();
        let r = p.resample(&fine, Extrapolate::Error).unwrap();
        for (f, v) in fine.hz().iter().zip(r.values()) {
            assert_relative_eq!(*v, 3.0 / (f * f), max_relative = 1e-12);
        }
        let out = FreqGrid::new(vec![0.5, 2.0]).unwrap();
        let e = p.resample(&out, Extrapolate::Error).unwrap_err();
        assert!(matches!(e, Error::OutOfRange { value, .. } if value == 0.5), "{e}");
        assert!(e.to_string().contains("0.5"));
        let out = FreqGrid::new(vec![2.0, 150.0]).unwrap();
        assert!(p.resample(&out, Extrapolate::Error).unwrap_err().to_string().contains("150"));
        let z = p.resample(&FreqGrid::new(vec![0.5, 2.0, 150.0]).unwrap(), Extrapolate::Zero).unwrap();
        assert_eq!(z.values()[0], 0.0);
        assert_eq!(z.values()[2], 0.0);
        assert_relative_eq!(z.values()[1], 0.75, max_relative = 1e-12);
    }

    #[test]
    fn resample_falls_back_to_linear_next_to_zeros() {
        let p = Psd::new(vec![1.0, 2.0, 3.0], vec![0.0, 4.0, 0.0], Quantity::Velocity).unwrap();
        assert_relative_eq!(p.value_at(1.5, Extrapolate::Error).unwrap(), 2.0, max_relative = 1e-15);
        assert_relative_eq!(p.value_at(2.75, Extrapolate::Error).unwrap(), 1.0, max_relative = 1e-15);
        assert!(p.value_at(1.5, Extrapolate::Error).unwrap().is_finite());
    }

    #[test]
    fn band_and_cumulative_rms_are_consistent() {
        let g = FreqGrid::log(0.5, 200.0, 300).unwrap();
        let p =
            Psd::on_grid(&g, g.hz().iter().map(|f| 1e-6 / (1.0 + f)).collect(), Quantity::Velocity).unwrap();
        let lo = p.cumulative_rms_from_low();
        let hi = p.cumulative_rms_from_high();
        assert_eq!(lo.len(), p.len());
        assert_eq!(hi.len(), p.len());
        assert_eq!(lo[0], 0.0);
        assert_eq!(hi[p.len() - 1], 0.0);
        assert_relative_eq!(lo[p.len() - 1], p.rms(), max_relative = 1e-15);
        assert_relative_eq!(hi[0], p.rms(), max_relative = 1e-12);
        // Low part + high part = total, at any split point.
        for i in [1, 50, 150, 298] {
            assert_relative_eq!(lo[i].powi(2) + hi[i].powi(2), p.mean_square(), max_relative = 1e-12);
            let b = p.band_rms(g.hz()[0], g.hz()[i]).unwrap();
            assert_relative_eq!(b, lo[i], max_relative = 1e-12);
        }
        // Split at non-grid points: bands add up.
        let a = p.band_rms(0.5, 3.3).unwrap().powi(2);
        let b = p.band_rms(3.3, 77.7).unwrap().powi(2);
        let c = p.band_rms(77.7, 200.0).unwrap().powi(2);
        assert_relative_eq!(a + b + c, p.mean_square(), max_relative = 1e-12);
        // Analytic check of a flat PSD: S0 (f_hi - f_lo).
        let fl = flat(&g, 2.0, Quantity::Velocity);
        assert_relative_eq!(
            fl.band_rms(1.234, 5.678).unwrap().powi(2),
            2.0 * (5.678 - 1.234),
            max_relative = 1e-12
        );
        // Band outside the grid.
        let e = p.band_rms(0.1, 1.0).unwrap_err();
        assert!(matches!(e, Error::OutOfRange { .. }) && e.to_string().contains("0.1"), "{e}");
        assert!(p.band_rms(5.0, 2.0).unwrap_err().to_string().contains("must exceed"));
    }

    #[test]
    fn third_octave_bands_sum_to_total() {
        let g = FreqGrid::log(0.7, 123.0, 400).unwrap();
        let p = Psd::on_grid(&g, g.hz().iter().map(|f| 1e-8 * f.powf(-1.3)).collect(), Quantity::Velocity)
            .unwrap();
        for width in [BandWidth::ThirdOctave, BandWidth::Octave] {
            let b = p.octave_band_rms(width);
            let sum: f64 = b.rms.iter().map(|r| r * r).sum();
            assert_relative_eq!(sum, p.mean_square(), max_relative = 1e-12);
            // Contiguous bands, first and last partly covered.
            assert!(!b.fully_covered[0] && !b.fully_covered[b.rms.len() - 1]);
            for i in 1..b.rms.len() {
                assert_relative_eq!(b.lower_hz[i], b.upper_hz[i - 1], max_relative = 1e-12);
            }
        }
        // Base-10 third octave centres: 1000·10^(k/10) (IEC 61260-1); 10 Hz is k = -20.
        assert_relative_eq!(BandWidth::ThirdOctave.centre_hz(-20), 10.0, max_relative = 1e-14);
        let (a, b) = BandWidth::ThirdOctave.edges_hz(-20);
        // Bandwidth of a base-10 third octave = 0.230768 fc (docs/references.md#s5 conversions).
        assert_relative_eq!(b - a, 2.30768, max_relative = 1e-5);
        assert_relative_eq!(BandWidth::Octave.centre_hz(-1), 501.18723362727224, max_relative = 1e-14);
    }

    #[test]
    fn scale_and_add() {
        let g = FreqGrid::log(1.0, 10.0, 4).unwrap();
        let p = flat(&g, 2.0, Quantity::Force);
        assert_eq!(p.scale(3.0).unwrap().values(), &[6.0; 4]);
        assert!(p.scale(-1.0).unwrap_err().to_string().contains("-1"));
        assert_eq!(p.add(&p).unwrap().values(), &[4.0; 4]);
        let q = flat(&g, 2.0, Quantity::Moment);
        assert!(p.add(&q).unwrap_err().to_string().contains("moment"));
        let g2 = FreqGrid::log(1.0, 11.0, 4).unwrap();
        assert!(p.add(&flat(&g2, 1.0, Quantity::Force)).unwrap_err().to_string().contains("index 1"));
        let g3 = FreqGrid::log(1.0, 10.0, 5).unwrap();
        assert!(matches!(p.add(&flat(&g3, 1.0, Quantity::Force)), Err(Error::ShapeMismatch { .. })));
    }

    #[test]
    fn quantity_names_round_trip() {
        for q in Quantity::ALL {
            assert_eq!(Quantity::from_name(q.name()).unwrap(), q);
        }
        let e = Quantity::from_name("jerk").unwrap_err();
        assert!(e.to_string().contains("jerk") && e.to_string().contains("velocity"), "{e}");
    }
}

//! Ground vibration carried from one distance from its source to another: a rough estimate.
//!
//! The Bornitz relation (Bornitz 1931) scales an amplitude measured at r1 from a source to r2:
//!
//! A2 = A1 (r1 / r2)^n exp(−α (r2 − r1)),
//!
//! geometric spreading with exponent n (0.5 for surface (Rayleigh) waves, 1 for body waves,
//! 2 for body waves travelling along the surface; from memory: verify) times material damping
//! with the attenuation coefficient α = π f η / c (1/m) of a soil with loss factor η and wave
//! speed c (η = 2ζ for a damping ratio ζ; from memory: verify). α grows with frequency, so the
//! ratio is taken frequency by frequency; a PSD scales with the ratio squared. Layered ground,
//! a source that is not a point and wave conversion are all outside it: an estimate to an order
//! of magnitude, not a prediction.

use crate::error::{Error, Result, require_non_negative, require_positive};
use crate::spectrum::Psd;
use serde::Serialize;
use std::f64::consts::PI;

/// Spreading exponent of surface (Rayleigh) waves (from memory: verify).
pub const SURFACE_WAVE_SPREADING: f64 = 0.5;
/// Spreading exponent of body waves (from memory: verify).
pub const BODY_WAVE_SPREADING: f64 = 1.0;
/// Spreading exponent of body waves along the surface (from memory: verify).
pub const BODY_WAVE_AT_SURFACE_SPREADING: f64 = 2.0;
/// Default soil loss factor: a damping ratio of 5 % (common practice, no source).
pub const DEFAULT_SOIL_LOSS_FACTOR: f64 = 0.1;
/// Default wave speed (m/s): a Rayleigh-wave speed of a medium-stiff soil (from memory: verify).
pub const DEFAULT_SOIL_WAVE_SPEED_M_S: f64 = 200.0;

/// A path through the ground from distance `from_m` to `to_m` from the source.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct GroundPath {
    pub from_m: f64,
    pub to_m: f64,
    /// Geometric spreading exponent n.
    pub spreading: f64,
    /// Soil loss factor η.
    pub loss_factor: f64,
    /// Wave speed c (m/s).
    pub wave_speed_m_s: f64,
    /// Where c came from.
    pub wave_speed_from: WaveSpeedFrom,
}

/// Where a ground path's wave speed came from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum WaveSpeedFrom {
    /// Given by the user.
    Given,
    /// The site's phase velocity from the model (`[ground] phase_velocity_m_s`, or on soil the
    /// half-space's Rayleigh-wave speed).
    Site,
    /// [`DEFAULT_SOIL_WAVE_SPEED_M_S`]: neither given nor known from the model.
    Default,
}

/// A ground path as asked for, its wave speed optional: [`GroundPathSpec::resolve`] takes the
/// site's phase velocity when none is given, and [`DEFAULT_SOIL_WAVE_SPEED_M_S`] when the model
/// knows none either.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GroundPathSpec {
    pub from_m: f64,
    pub to_m: f64,
    pub spreading: f64,
    pub loss_factor: f64,
    pub wave_speed_m_s: Option<f64>,
}

impl GroundPathSpec {
    /// The checked path for a site whose phase velocity is `site_m_s` (None: unknown).
    pub fn resolve(&self, site_m_s: Option<f64>) -> Result<GroundPath> {
        let (c, from) = match (self.wave_speed_m_s, site_m_s) {
            (Some(c), _) => (c, WaveSpeedFrom::Given),
            (None, Some(c)) => (c, WaveSpeedFrom::Site),
            (None, None) => (DEFAULT_SOIL_WAVE_SPEED_M_S, WaveSpeedFrom::Default),
        };
        let p = GroundPath::with_soil(self.from_m, self.to_m, self.spreading, self.loss_factor, c)?;
        Ok(GroundPath { wave_speed_from: from, ..p })
    }
}

impl GroundPath {
    /// Surface waves (n = 0.5) through the default soil.
    pub fn new(from_m: f64, to_m: f64) -> Result<GroundPath> {
        let p = GroundPath::with_soil(
            from_m,
            to_m,
            SURFACE_WAVE_SPREADING,
            DEFAULT_SOIL_LOSS_FACTOR,
            DEFAULT_SOIL_WAVE_SPEED_M_S,
        )?;
        Ok(GroundPath { wave_speed_from: WaveSpeedFrom::Default, ..p })
    }

    /// A checked path: distances > 0, n ≥ 0, η ≥ 0, c > 0.
    pub fn with_soil(
        from_m: f64,
        to_m: f64,
        spreading: f64,
        loss_factor: f64,
        wave_speed_m_s: f64,
    ) -> Result<GroundPath> {
        require_positive("ground distance from_m", from_m)?;
        require_positive("ground distance to_m", to_m)?;
        require_non_negative("spreading exponent", spreading)?;
        require_non_negative("soil loss factor", loss_factor)?;
        require_positive("soil wave speed (m/s)", wave_speed_m_s)?;
        Ok(GroundPath {
            from_m,
            to_m,
            spreading,
            loss_factor,
            wave_speed_m_s,
            wave_speed_from: WaveSpeedFrom::Given,
        })
    }

    /// Read `FROM:TO` (m).
    pub fn parse_distances(text: &str) -> Result<(f64, f64)> {
        let bad = || Error::Parse {
            file: "ground distance".into(),
            location: format!("'{text}'"),
            reason: "expected FROM_M:TO_M, e.g. 5:20".into(),
        };
        let (a, b) = text.split_once(':').ok_or_else(bad)?;
        Ok((a.trim().parse().map_err(|_| bad())?, b.trim().parse().map_err(|_| bad())?))
    }

    /// The spreading exponent by name: `surface` 0.5, `body` 1, `body-at-surface` 2.
    pub fn spreading_of(name: &str) -> Result<f64> {
        match name {
            "surface" => Ok(SURFACE_WAVE_SPREADING),
            "body" => Ok(BODY_WAVE_SPREADING),
            "body-at-surface" => Ok(BODY_WAVE_AT_SURFACE_SPREADING),
            other => Err(Error::UnknownName {
                kind: "wave kind".into(),
                name: other.into(),
                known: "surface, body, body-at-surface".into(),
            }),
        }
    }

    /// Material attenuation coefficient α = π f η / c (1/m).
    pub fn attenuation_per_m(&self, f_hz: f64) -> f64 {
        PI * f_hz * self.loss_factor / self.wave_speed_m_s
    }

    /// Amplitude at `to_m` over amplitude at `from_m` at `f_hz`.
    pub fn amplitude_ratio(&self, f_hz: f64) -> f64 {
        (self.from_m / self.to_m).powf(self.spreading)
            * (-self.attenuation_per_m(f_hz) * (self.to_m - self.from_m)).exp()
    }

    /// A PSD at `to_m` from one at `from_m`: each value times the amplitude ratio squared.
    pub fn apply_psd(&self, p: &Psd) -> Result<Psd> {
        let v =
            p.freq_hz().iter().zip(p.values()).map(|(f, v)| v * self.amplitude_ratio(*f).powi(2)).collect();
        Psd::new(p.freq_hz().to_vec(), v, p.quantity())
    }

    /// One line of text for a report's notes.
    pub fn note(&self) -> String {
        format!(
            "ground carried from {} m to {} m from its source (Bornitz: spreading (r1/r2)^{} times exp(-pi f eta (r2-r1) / c), eta {}, c {:.0} m/s, {}): a rough estimate, amplitude ratio {:.3} at 1 Hz, {:.3} at 10 Hz, {:.3} at 50 Hz",
            self.from_m,
            self.to_m,
            self.spreading,
            self.loss_factor,
            self.wave_speed_m_s,
            match self.wave_speed_from {
                WaveSpeedFrom::Given => "as given",
                WaveSpeedFrom::Site => "the site's phase velocity from the model",
                WaveSpeedFrom::Default =>
                    "a default for medium-stiff soil; the model gives no phase velocity",
            },
            self.amplitude_ratio(1.0),
            self.amplitude_ratio(10.0),
            self.amplitude_ratio(50.0)
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::grid::FreqGrid;
    use crate::spectrum::Quantity;

    #[test]
    fn ratio_follows_the_bornitz_relation_at_stated_values() {
        // Bornitz (1931): A2/A1 = (r1/r2)^n exp(−α (r2 − r1)), α = π f η / c.
        // r1 = 5 m, r2 = 20 m, n = 0.5, η = 0.1, c = 200 m/s, f = 10 Hz:
        // α = π·10·0.1/200 = 0.015 708 /m; (1/4)^0.5 = 0.5; exp(−0.015708·15) = 0.790 1 → 0.395 05.
        let p = GroundPath::with_soil(5.0, 20.0, 0.5, 0.1, 200.0).unwrap();
        assert!((p.attenuation_per_m(10.0) - 0.015_707_963).abs() < 1e-9);
        let want = 0.5 * (-PI * 10.0 * 0.1 / 200.0 * 15.0).exp();
        assert!((p.amplitude_ratio(10.0) - want).abs() < 1e-15);
        assert!((p.amplitude_ratio(10.0) - 0.395_05).abs() < 1e-5);
        // Without damping only spreading remains; body waves at the surface fall as 1/r².
        let q = GroundPath::with_soil(2.0, 8.0, BODY_WAVE_AT_SURFACE_SPREADING, 0.0, 200.0).unwrap();
        assert!((q.amplitude_ratio(40.0) - 1.0 / 16.0).abs() < 1e-15);
        // Nearer the source the motion grows (r2 < r1) by the inverse of the outward ratio.
        let back = GroundPath::with_soil(20.0, 5.0, 0.5, 0.1, 200.0).unwrap();
        assert!((back.amplitude_ratio(10.0) * p.amplitude_ratio(10.0) - 1.0).abs() < 1e-12);
    }

    #[test]
    fn psd_scales_with_the_ratio_squared_at_each_frequency() {
        let g = FreqGrid::log(1.0, 50.0, 30).unwrap();
        let psd = Psd::on_grid(&g, vec![2e-12; g.len()], Quantity::Velocity).unwrap();
        let p = GroundPath::new(5.0, 30.0).unwrap();
        let out = p.apply_psd(&psd).unwrap();
        assert_eq!(out.quantity(), Quantity::Velocity);
        for (f, v) in out.freq_hz().iter().zip(out.values()) {
            let r = p.amplitude_ratio(*f);
            assert!((v - 2e-12 * r * r).abs() < 1e-24);
        }
        // Higher frequencies fall faster (α ∝ f).
        assert!(out.values()[29] < out.values()[0]);
    }

    #[test]
    fn bad_paths_are_named_errors() {
        assert!(matches!(GroundPath::new(0.0, 5.0), Err(Error::InvalidArgument { .. })));
        assert!(matches!(
            GroundPath::with_soil(1.0, 5.0, 0.5, -0.1, 200.0),
            Err(Error::InvalidArgument { .. })
        ));
        assert!(matches!(GroundPath::with_soil(1.0, 5.0, 0.5, 0.1, 0.0), Err(Error::InvalidArgument { .. })));
        assert!(matches!(GroundPath::parse_distances("5-20"), Err(Error::Parse { .. })));
        assert!(matches!(GroundPath::parse_distances("5:x"), Err(Error::Parse { .. })));
        assert_eq!(GroundPath::parse_distances("5:20").unwrap(), (5.0, 20.0));
        assert!(matches!(GroundPath::spreading_of("love"), Err(Error::UnknownName { .. })));
    }

    #[test]
    fn the_wave_speed_comes_from_the_user_then_the_site_then_the_default() {
        let spec = GroundPathSpec {
            from_m: 5.0,
            to_m: 25.0,
            spreading: 0.5,
            loss_factor: 0.1,
            wave_speed_m_s: None,
        };
        let site = spec.resolve(Some(104.0)).unwrap();
        assert_eq!((site.wave_speed_m_s, site.wave_speed_from), (104.0, WaveSpeedFrom::Site));
        let none = spec.resolve(None).unwrap();
        assert_eq!(
            (none.wave_speed_m_s, none.wave_speed_from),
            (DEFAULT_SOIL_WAVE_SPEED_M_S, WaveSpeedFrom::Default)
        );
        let given = GroundPathSpec { wave_speed_m_s: Some(300.0), ..spec }.resolve(Some(104.0)).unwrap();
        assert_eq!((given.wave_speed_m_s, given.wave_speed_from), (300.0, WaveSpeedFrom::Given));
        // Slower soil damps more over the same path: α = π f η / c (Bornitz).
        assert!(site.amplitude_ratio(20.0) < none.amplitude_ratio(20.0));
        assert!(site.note().contains("the site's phase velocity"));
        assert!(matches!(
            GroundPathSpec { wave_speed_m_s: Some(-1.0), ..spec }.resolve(None),
            Err(Error::InvalidArgument { .. })
        ));
    }
}

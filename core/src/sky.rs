//! Directions on the sky at a site: hour angle and declination to altitude and azimuth, the
//! celestial pole, and the unit vectors along increasing right ascension and declination.
//!
//! Site axes x east, y north, z up (docs/conventions.md); azimuth from north through east. At
//! latitude φ the north celestial pole is p = (0, cos φ, sin φ), the equator's meridian point
//! (hour angle 0) q₀ = (0, −sin φ, cos φ) and its west point w = (−1, 0, 0). A star at hour
//! angle H (positive west) and declination δ lies along
//! s = sin δ p + cos δ (cos H q₀ + sin H w), which gives sin h = sin φ sin δ + cos φ cos δ cos H,
//! the altitude formula of spherical astronomy (docs/references.md#s18).

use crate::error::{Error, Result, require_finite};
use serde::{Deserialize, Serialize};

type V3 = [f64; 3];

/// The side of the pier (or tripod head) the optical tube is on, for a German equatorial mount.
/// The counterweights are on the other side.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum PierSide {
    /// Tube east of the mount: the usual side for the western sky (hour angle ≥ 0).
    East,
    /// Tube west of the mount: the usual side for the eastern sky (hour angle < 0).
    West,
}

impl PierSide {
    /// The side that keeps the counterweights below the Dec axis: east for H ≥ 0, else west.
    pub fn usual(hour_angle_deg: f64) -> PierSide {
        if wrap180(hour_angle_deg) >= 0.0 { PierSide::East } else { PierSide::West }
    }
}

/// An equatorial pointing at a site.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Equatorial {
    pub latitude_deg: f64,
    pub hour_angle_deg: f64,
    pub declination_deg: f64,
}

/// Hour angle wrapped to (−180, 180].
fn wrap180(h: f64) -> f64 {
    let r = h.rem_euclid(360.0);
    if r > 180.0 { r - 360.0 } else { r }
}

impl Equatorial {
    /// Validated: latitude and declination in [−90, 90], all finite.
    pub fn new(latitude_deg: f64, hour_angle_deg: f64, declination_deg: f64) -> Result<Equatorial> {
        for (n, v) in [("latitude_deg", latitude_deg), ("declination_deg", declination_deg)] {
            require_finite(n, v)?;
            if !(-90.0..=90.0).contains(&v) {
                return Err(Error::invalid(n, format!("must lie in [-90, 90], got {v}")));
            }
        }
        require_finite("hour_angle_deg", hour_angle_deg)?;
        Ok(Equatorial { latitude_deg, hour_angle_deg, declination_deg })
    }

    /// The north celestial pole p (the polar axis of a mount aligned to the site).
    pub fn pole(&self) -> V3 {
        let f = self.latitude_deg.to_radians();
        [0.0, f.cos(), f.sin()]
    }

    /// The point of the celestial equator at this hour angle, e(H) = cos H q₀ + sin H w, and the
    /// tangent t(H) = de/dH = −sin H q₀ + cos H w (⟂ p and ⟂ e).
    fn equator(&self) -> (V3, V3) {
        let f = self.latitude_deg.to_radians();
        let (sh, ch) = self.hour_angle_deg.to_radians().sin_cos();
        let q0 = [0.0, -f.sin(), f.cos()];
        let w = [-1.0, 0.0, 0.0];
        let e = std::array::from_fn(|i| ch * q0[i] + sh * w[i]);
        let t = std::array::from_fn(|i| -sh * q0[i] + ch * w[i]);
        (e, t)
    }

    /// The line of sight s (unit vector in site axes).
    pub fn line_of_sight(&self) -> V3 {
        let p = self.pole();
        let (e, _) = self.equator();
        let (sd, cd) = self.declination_deg.to_radians().sin_cos();
        std::array::from_fn(|i| sd * p[i] + cd * e[i])
    }

    /// Altitude and azimuth (deg; azimuth from north through east in [0, 360)). At the zenith
    /// the azimuth is taken as 0.
    pub fn alt_az(&self) -> (f64, f64) {
        let s = self.line_of_sight();
        let h = s[2].clamp(-1.0, 1.0).asin().to_degrees();
        let horizontal = s[0].hypot(s[1]);
        let a = if horizontal < 1e-12 { 0.0 } else { s[0].atan2(s[1]).to_degrees().rem_euclid(360.0) };
        (h, a)
    }

    /// Unit vectors on the sky along increasing right ascension (east on the sky, = −t(H)) and
    /// increasing declination (∂s/∂δ = cos δ p − sin δ e(H)); both ⟂ the line of sight.
    pub fn ra_dec_axes(&self) -> (V3, V3) {
        let p = self.pole();
        let (e, t) = self.equator();
        let (sd, cd) = self.declination_deg.to_radians().sin_cos();
        (t.map(|x| -x), std::array::from_fn(|i| cd * p[i] - sd * e[i]))
    }

    /// The declination axis of a German equatorial mount, as the unit vector from the polar axis
    /// towards the tube: −t(H) with the tube east of the pier, +t(H) with it west. It is ⟂ the
    /// pole and ⟂ the line of sight at every pointing, the pole included.
    pub fn dec_axis(&self, side: PierSide) -> V3 {
        let (_, t) = self.equator();
        match side {
            PierSide::East => t.map(|x| -x),
            PierSide::West => t,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn dot(a: V3, b: V3) -> f64 {
        a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
    }

    #[test]
    fn altitude_and_azimuth_match_the_spherical_astronomy_formulas() {
        // Meeus, Astronomical Algorithms (2nd ed. 1998), ch. 13, eqs. (13.5) and (13.6), with
        // the azimuth A_S measured from the south westward: tan A_S = sin H / (cos H sin φ −
        // tan δ cos φ), sin h = sin φ sin δ + cos φ cos δ cos H. Ours is from the north through
        // east: A_N = A_S + 180°. The same formulas are in Smart, Textbook on Spherical
        // Astronomy, ch. II (the astronomical triangle).
        for &(lat, ha, dec) in &[
            (38.9, 64.35, -6.72),
            (-33.9, -40.0, -60.0),
            (51.5, 170.0, 80.0),
            (0.0, 10.0, 20.0),
            (70.0, -120.0, 35.0),
        ] {
            let q = Equatorial::new(lat, ha, dec).unwrap();
            let (h, a) = q.alt_az();
            let (f, hh, d) = (f64::to_radians(lat), f64::to_radians(ha), f64::to_radians(dec));
            let sin_h = f.sin() * d.sin() + f.cos() * d.cos() * hh.cos();
            let a_s = hh.sin().atan2(hh.cos() * f.sin() - d.tan() * f.cos());
            assert_relative_eq!(h.to_radians().sin(), sin_h, epsilon = 1e-12);
            let want = (a_s.to_degrees() + 180.0).rem_euclid(360.0);
            let diff = (a - want + 540.0).rem_euclid(360.0) - 180.0;
            assert!(diff.abs() < 1e-9, "lat {lat} ha {ha} dec {dec}: {a} vs {want}");
        }
        // Meeus' example 13.b (Venus from Washington: H = 64.352133°, δ = −6.719892°,
        // φ = 38.921389°) gives h = 15.1249°, A_S = 68.0337° (example values from memory).
        let q = Equatorial::new(38.921_389, 64.352_133, -6.719_892).unwrap();
        let (h, a) = q.alt_az();
        assert!((h - 15.1249).abs() < 1e-4, "{h}");
        assert!((a - (68.0337 + 180.0)).abs() < 1e-4, "{a}");
    }

    #[test]
    fn the_sky_axes_are_orthonormal_and_the_dec_axis_is_perpendicular() {
        for &(lat, ha, dec) in &[(45.0, 30.0, 20.0), (-20.0, -150.0, -89.0), (60.0, 0.0, 90.0)] {
            let q = Equatorial::new(lat, ha, dec).unwrap();
            let s = q.line_of_sight();
            let (ra, de) = q.ra_dec_axes();
            for (a, b) in [(s, ra), (s, de), (ra, de)] {
                assert!(dot(a, b).abs() < 1e-12);
            }
            for v in [s, ra, de] {
                assert_relative_eq!(dot(v, v), 1.0, epsilon = 1e-12);
            }
            for side in [PierSide::East, PierSide::West] {
                let d = q.dec_axis(side);
                assert!(dot(d, q.pole()).abs() < 1e-12 && dot(d, s).abs() < 1e-12);
            }
            // A small step in declination moves the line of sight along the Dec axis vector,
            // and a step in right ascension (−H) along the RA vector by cos δ (finite
            // differences of the line of sight).
            let step = 1e-6;
            let up = Equatorial::new(lat, ha, (dec + step).min(90.0)).unwrap().line_of_sight();
            let dn = Equatorial::new(lat, ha, (dec - step).max(-90.0)).unwrap().line_of_sight();
            let h = (dec + step).min(90.0) - (dec - step).max(-90.0);
            let ds: V3 = std::array::from_fn(|i| (up[i] - dn[i]) / h.to_radians());
            assert!(ds.iter().zip(de).all(|(a, b)| (a - b).abs() < 1e-6), "{ds:?} vs {de:?}");
            let east = Equatorial::new(lat, ha - step, dec).unwrap().line_of_sight();
            let west = Equatorial::new(lat, ha + step, dec).unwrap().line_of_sight();
            let cd = dec.to_radians().cos();
            for i in 0..3 {
                let d = (east[i] - west[i]) / (2.0 * step).to_radians();
                assert!((d - cd * ra[i]).abs() < 1e-6, "{i}: {d} vs {}", cd * ra[i]);
            }
        }
    }

    #[test]
    fn the_usual_pier_side_keeps_the_counterweights_low() {
        // Counterweights point along −(dec axis); on the usual side they do not rise above the
        // pivot (common practice for German equatorial mounts, no source).
        for ha in [-170.0, -90.0, -10.0, 0.0, 10.0, 90.0, 170.0] {
            let q = Equatorial::new(40.0, ha, 10.0).unwrap();
            let cw = q.dec_axis(PierSide::usual(ha)).map(|x| -x);
            assert!(cw[2] <= 1e-12, "ha {ha}: counterweight direction {cw:?}");
        }
        let e = Equatorial::new(95.0, 0.0, 0.0).unwrap_err();
        assert!(e.to_string().contains("latitude_deg"), "{e}");
    }
}

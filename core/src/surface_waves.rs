//! What travelling surface waves do to the ground under a rig besides moving it: they tilt it,
//! twist it, and move its points differently.
//!
//! **Rotations.** A plane wave u = U e^{i(ωt − k·x)} with horizontal wavenumber |k| = ω/c tilts
//! the surface by ∂u_z/∂x, so |θ| = ω|u_z|/c (the plane-wave tilt of a Rayleigh wave, as used for
//! the tilt sensitivity of horizontal seismometers: Rodgers 1968, BSSA 58(5), 1385–1406; from
//! memory: verify). With waves from every azimuth alike (azimuth α uniform), the tilt about x
//! is ∝ sin α and about y ∝ cos α: its power splits equally between the axes, and it is
//! uncorrelated with u_z and with the other axis (the azimuth averages of sin α, cos α and
//! sin α cos α vanish): S_rx = S_ry = ½ (ω/c)² S_z.
//! A horizontally polarised shear (Love) wave turns the surface about the vertical by half its
//! shear, θ_z = ½ ∂u_T/∂n, so |θ_z| = ω|u_T|/(2c) (the rotation of a plane shear wave, e.g.
//! Trifunac 1982, BSSA 72(5); from memory: verify). Taking the transverse part as half of the
//! horizontal power: S_rz = ¼ (ω/c)² (S_x + S_y)/2.
//!
//! **Differential motion.** Between two points a distance d apart, the loss of coherence of
//! Luco & Wong (1986, Earthquake Eng. Struct. Dyn. 14, 891–908):
//! |γ(d, ω)| = exp(−(α ω d / V_s)²), α ≈ 2–3 × 10⁻⁴ s/m × V_s for typical sites (from memory:
//! verify; here α is dimensionless and given). Wave passage (the phase e^{−iωd/c}) is, to first
//! order in ωd/c, the rigid tilt and twist above.
//!
//! **Phase velocity.** Given, or the Rayleigh-wave speed of the homogeneous half-space under the
//! rig: the root of Rayleigh's equation (Rayleigh 1885; e.g. Graff, *Wave Motion in Elastic
//! Solids*, 1975, §6.1): (2 − ξ²)² = 4 √(1 − κ²ξ²) √(1 − ξ²), ξ = c_R/V_s, κ = V_s/V_p. Real
//! near-surface ground is layered and its waves dispersive: this is a rough estimate.

use crate::error::{Error, Result, require_non_negative, require_positive};
use crate::grid::FreqGrid;
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// `[ground_waves]`: how ground motion travels under the rig.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct GroundWaves {
    /// Phase velocity of the surface waves that carry the ground motion (m/s).
    pub phase_velocity_m_s: f64,
    /// Luco–Wong incoherence α (dimensionless); 0 or absent: the feet move coherently apart
    /// from wave passage.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub incoherence: Option<f64>,
    /// Shear-wave speed V_s of the ground (m/s) for the incoherence; default the phase velocity.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub shear_wave_speed_m_s: Option<f64>,
}

impl GroundWaves {
    /// Validate; errors name the field under `name`.
    pub fn validate(&self, name: &str) -> Result<()> {
        require_positive(|| format!("{name}.phase_velocity_m_s"), self.phase_velocity_m_s)?;
        if let Some(a) = self.incoherence {
            require_non_negative(|| format!("{name}.incoherence"), a)?;
        }
        if let Some(v) = self.shear_wave_speed_m_s {
            require_positive(|| format!("{name}.shear_wave_speed_m_s"), v)?;
        }
        Ok(())
    }

    /// The ground-rotation PSDs (rad²/Hz) on `grid` from the displacement PSDs (m²/Hz) of the
    /// translations: `[rx, ry, rz]`, each None where its source axis is absent.
    pub fn rotation_psds(
        &self,
        grid: &FreqGrid,
        disp: &[Option<Vec<f64>>; 3],
    ) -> Result<[Option<Vec<f64>>; 3]> {
        self.validate("ground_waves")?;
        let c = self.phase_velocity_m_s;
        let k2: Vec<f64> = grid.hz().iter().map(|f| (2.0 * PI * f / c).powi(2)).collect();
        let tilt = disp[2].as_ref().map(|z| z.iter().zip(&k2).map(|(s, k)| 0.5 * k * s).collect());
        let horizontal: Option<Vec<f64>> = match (&disp[0], &disp[1]) {
            (None, None) => None,
            (a, b) => Some(
                (0..grid.len())
                    .map(|i| a.as_ref().map_or(0.0, |v| v[i]) + b.as_ref().map_or(0.0, |v| v[i]))
                    .collect(),
            ),
        };
        let twist = horizontal.map(|h| h.iter().zip(&k2).map(|(s, k)| 0.25 * k * 0.5 * s).collect());
        Ok([tilt.clone(), tilt, twist])
    }

    /// Luco–Wong coherency |γ| between two points `distance_m` apart at `f_hz` (1 without an
    /// incoherence).
    pub fn coherency(&self, distance_m: f64, f_hz: f64) -> f64 {
        let a = self.incoherence.unwrap_or(0.0);
        let vs = self.shear_wave_speed_m_s.unwrap_or(self.phase_velocity_m_s);
        (-(a * 2.0 * PI * f_hz * distance_m / vs).powi(2)).exp()
    }

    /// The mean of the coherency over every pair of `stations` (horizontal positions, m) at each
    /// frequency of `grid`; 1 with fewer than two stations. For stations all equally far apart
    /// (a tripod's three feet) a common motion of power γ̄ S plus an own motion of power
    /// (1 − γ̄) S at each station reproduces the coherency exactly; otherwise it is the average.
    pub fn mean_coherency(&self, stations: &[[f64; 2]], grid: &FreqGrid) -> Vec<f64> {
        let mut pairs = Vec::new();
        for (i, a) in stations.iter().enumerate() {
            for b in &stations[i + 1..] {
                pairs.push((a[0] - b[0]).hypot(a[1] - b[1]));
            }
        }
        grid.hz()
            .iter()
            .map(|&f| {
                if pairs.is_empty() {
                    1.0
                } else {
                    pairs.iter().map(|&d| self.coherency(d, f)).sum::<f64>() / pairs.len() as f64
                }
            })
            .collect()
    }
}

/// Rayleigh-wave speed over shear-wave speed, ξ = c_R/V_s, for Poisson ratio `nu` in [0, 0.5]:
/// the root in (0, 1) of Rayleigh's equation, by bisection.
pub fn rayleigh_speed_ratio(nu: f64) -> Result<f64> {
    if !(nu.is_finite() && (0.0..=0.5).contains(&nu)) {
        return Err(Error::invalid("poisson_ratio", format!("must lie in [0, 0.5], got {nu}")));
    }
    // κ² = V_s²/V_p² = (1 − 2ν) / (2(1 − ν)).
    let kappa2 = (1.0 - 2.0 * nu) / (2.0 * (1.0 - nu));
    let g = |xi: f64| {
        let x2 = xi * xi;
        (2.0 - x2).powi(2) - 4.0 * (1.0 - kappa2 * x2).sqrt() * (1.0 - x2).sqrt()
    };
    // g > 0 just below ξ = 1 and g < 0 near 0 (where g ≈ −2(1 − κ²)ξ²)... bracket the root.
    let (mut lo, mut hi) = (0.5, 1.0 - 1e-12);
    if g(lo) * g(hi) > 0.0 {
        return Err(Error::invalid("poisson_ratio", "no Rayleigh root bracketed"));
    }
    for _ in 0..100 {
        let mid = 0.5 * (lo + hi);
        if g(lo) * g(mid) <= 0.0 {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    Ok(0.5 * (lo + hi))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rayleigh_speed_matches_the_classic_values() {
        // ν = 0.25 (a Poisson solid): c_R = 0.9194 V_s (Rayleigh 1885; Graff 1975 §6.1).
        assert!((rayleigh_speed_ratio(0.25).unwrap() - 0.9194).abs() < 1e-4);
        // ν = 0.5: c_R = 0.9553 V_s (Graff 1975 §6.1; from memory: verify).
        assert!((rayleigh_speed_ratio(0.5).unwrap() - 0.9553).abs() < 1e-4);
        // Viktorov's fit (0.87 + 1.12ν)/(1 + ν) lies within 0.5 % over the range (Viktorov 1967).
        for k in 0..=10 {
            let nu = 0.05 * k as f64;
            let fit = (0.87 + 1.12 * nu) / (1.0 + nu);
            let exact = rayleigh_speed_ratio(nu).unwrap();
            assert!((exact / fit - 1.0).abs() < 5e-3, "ν {nu}: {exact} vs {fit}");
        }
        assert!(rayleigh_speed_ratio(0.6).is_err());
    }

    #[test]
    fn rotation_psds_follow_the_plane_wave_relations() {
        let grid = FreqGrid::new(vec![1.0, 10.0]).unwrap();
        let w = GroundWaves { phase_velocity_m_s: 200.0, incoherence: None, shear_wave_speed_m_s: None };
        let sz = vec![1e-16, 4e-18];
        let sx = vec![2e-16, 1e-18];
        let r = w.rotation_psds(&grid, &[Some(sx.clone()), None, Some(sz.clone())]).unwrap();
        for i in 0..2 {
            let k = 2.0 * PI * grid.hz()[i] / 200.0;
            // |θ| = k |u_z|, split over two axes.
            assert!((r[0].as_ref().unwrap()[i] / (0.5 * k * k * sz[i]) - 1.0).abs() < 1e-12);
            assert_eq!(r[0], r[1]);
            // |θ_z| = k |u_T| / 2 with S_T = (S_x + S_y)/2.
            assert!((r[2].as_ref().unwrap()[i] / (0.25 * k * k * 0.5 * sx[i]) - 1.0).abs() < 1e-12);
        }
        let none = w.rotation_psds(&grid, &[None, None, None]).unwrap();
        assert!(none.iter().all(Option::is_none));
    }

    #[test]
    fn coherency_is_luco_wong() {
        let w = GroundWaves {
            phase_velocity_m_s: 150.0,
            incoherence: Some(0.5),
            shear_wave_speed_m_s: Some(160.0),
        };
        // exp(−(α ω d / V_s)²) at d = 1 m, f = 20 Hz.
        let expect = (-(0.5 * 2.0 * PI * 20.0 * 1.0 / 160.0f64).powi(2)).exp();
        assert!((w.coherency(1.0, 20.0) - expect).abs() < 1e-15);
        assert_eq!(w.coherency(0.0, 20.0), 1.0);
        let coherent = GroundWaves { incoherence: None, ..w };
        assert_eq!(coherent.coherency(3.0, 50.0), 1.0);
    }
}

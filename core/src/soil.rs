//! Impedance of a rigid circular contact (foot, footing) on an elastic half-space.
//!
//! Static stiffnesses of a surface footing of radius R on soil with shear modulus G and Poisson
//! ratio ν (Arya, O'Neill & Pincus 1979, ch. 4; Richart, Hall & Woods 1970):
//! vertical 4GR/(1−ν); horizontal 32(1−ν)GR/(7−8ν); rocking 8GR³/(3(1−ν)); torsion 16GR³/3.
//! Optional radiation damping as frequency-independent dashpots: vertical Lysmer's analog
//! c_z = 3.4R²√(ρG)/(1−ν); horizontal c_x = 18.4(1−ν)R²√(ρG)/(7−8ν) (Hall 1967, via Richart,
//! Hall & Woods; from memory: verify); rocking and torsion use the high-frequency limits
//! ρ·V_La·I_b and ρ·V_s·J_b with I_b = πR⁴/4, J_b = πR⁴/2 (Gazetas 1991; from memory: verify).
//! Light footings get very large radiation damping from these formulas (mass ratio B_z < 1,
//! outside the analog's calibration): treat it as an upper bound.

use crate::error::{Error, Result, require_non_negative, require_positive};
use crate::stiffness::StiffnessModel;
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// Elastic half-space soil properties.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Soil {
    /// Shear modulus at working strain G (Pa).
    pub shear_modulus_pa: f64,
    /// Poisson ratio ν in [0, 0.5].
    pub poisson_ratio: f64,
    /// Mass density ρ (kg/m³).
    pub density_kg_m3: f64,
    /// Material (hysteretic) loss factor of the soil, added to every stiffness.
    #[serde(default)]
    pub loss_factor: f64,
}

/// Names accepted by [`Soil::preset`].
pub const SOIL_PRESETS: &[&str] = &["soft-clay", "lawn", "dense-sand", "gravel"];

/// Static stiffnesses of a rigid circular contact.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ContactStiffness {
    /// Vertical (N/m).
    pub vertical: f64,
    /// Horizontal, each direction (N/m).
    pub horizontal: f64,
    /// Rocking about a horizontal axis (N·m/rad).
    pub rocking: f64,
    /// Torsion about the vertical axis (N·m/rad).
    pub torsion: f64,
}

impl Soil {
    /// Preset soils: the worked-example rows of docs/references.md#s8-3, whose G, ν, ρ sit
    /// inside the typical ranges of docs/references.md#s8-4 (from memory: verify; measure your site
    /// if you can):
    /// `soft-clay` G 5 MPa, ν 0.45, ρ 1700; `lawn` (topsoil) G 20 MPa, ν 0.33, ρ 1600;
    /// `dense-sand` G 100 MPa, ν 0.30, ρ 1950; `gravel` G 200 MPa, ν 0.30, ρ 2100.
    /// Soil loss factor 0.05 for all (material damping of soils at small strain is a few
    /// percent; common practice, no source).
    pub fn preset(name: &str) -> Result<Self> {
        let s = |g: f64, nu: f64, rho: f64| Soil {
            shear_modulus_pa: g,
            poisson_ratio: nu,
            density_kg_m3: rho,
            loss_factor: 0.05,
        };
        Ok(match name.to_ascii_lowercase().as_str() {
            "soft-clay" => s(5e6, 0.45, 1700.0),
            "lawn" => s(20e6, 0.33, 1600.0),
            "dense-sand" => s(100e6, 0.30, 1950.0),
            "gravel" => s(200e6, 0.30, 2100.0),
            _ => {
                return Err(Error::UnknownName {
                    kind: "soil".into(),
                    name: name.into(),
                    known: SOIL_PRESETS.join(", "),
                });
            }
        })
    }

    /// Validate; errors name the field under `name`.
    pub fn validate(&self, name: &str) -> Result<()> {
        require_positive(|| format!("{name}.shear_modulus_pa"), self.shear_modulus_pa)?;
        require_positive(|| format!("{name}.density_kg_m3"), self.density_kg_m3)?;
        require_non_negative(|| format!("{name}.loss_factor"), self.loss_factor)?;
        let nu = self.poisson_ratio;
        if !(nu.is_finite() && (0.0..=0.5).contains(&nu)) {
            return Err(Error::invalid(
                format!("{name}.poisson_ratio"),
                format!("must lie in [0, 0.5], got {nu}"),
            ));
        }
        Ok(())
    }

    /// Shear-wave speed V_s = √(G/ρ) (m/s).
    pub fn shear_wave_speed_m_s(&self) -> f64 {
        (self.shear_modulus_pa / self.density_kg_m3).sqrt()
    }

    /// Static stiffness of a rigid circular surface contact of radius `radius_m`.
    pub fn contact_stiffness(&self, radius_m: f64) -> ContactStiffness {
        let (g, nu, r) = (self.shear_modulus_pa, self.poisson_ratio, radius_m);
        ContactStiffness {
            vertical: 4.0 * g * r / (1.0 - nu),
            horizontal: 32.0 * (1.0 - nu) * g * r / (7.0 - 8.0 * nu),
            rocking: 8.0 * g * r.powi(3) / (3.0 * (1.0 - nu)),
            torsion: 16.0 * g * r.powi(3) / 3.0,
        }
    }

    /// Radiation dashpots (vertical, horizontal N·s/m; rocking, torsion N·m·s/rad).
    pub fn radiation_dashpots(&self, radius_m: f64) -> ContactStiffness {
        let (g, nu, rho, r) = (self.shear_modulus_pa, self.poisson_ratio, self.density_kg_m3, radius_m);
        let z = (rho * g).sqrt();
        let vs = self.shear_wave_speed_m_s();
        let v_la = 3.4 * vs / (PI * (1.0 - nu));
        ContactStiffness {
            vertical: 3.4 * r * r * z / (1.0 - nu),
            horizontal: 18.4 * (1.0 - nu) * r * r * z / (7.0 - 8.0 * nu),
            rocking: rho * v_la * PI * r.powi(4) / 4.0,
            torsion: rho * vs * PI * r.powi(4) / 2.0,
        }
    }

    /// Stiffness models (vertical, horizontal, rocking, torsion) for a contact of radius
    /// `radius_m`: hysteretic with the soil's loss factor, plus radiation dashpots in parallel
    /// when `radiation` is true.
    pub fn contact_models(&self, radius_m: f64, radiation: bool) -> Result<[StiffnessModel; 4]> {
        self.validate("soil")?;
        require_positive("contact radius_m", radius_m)?;
        let k = self.contact_stiffness(radius_m);
        let c = self.radiation_dashpots(radius_m);
        let one = |k: f64, c: f64| {
            let h = StiffnessModel::hysteretic(k, self.loss_factor);
            if radiation {
                StiffnessModel::Parallel(vec![h, StiffnessModel::KelvinVoigt { k: 0.0, c }])
            } else {
                h
            }
        };
        Ok([
            one(k.vertical, c.vertical),
            one(k.horizontal, c.horizontal),
            one(k.rocking, c.rocking),
            one(k.torsion, c.torsion),
        ])
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn half_space_static_stiffness() {
        // Arya, O'Neill & Pincus (1979) ch. 4 / docs/references.md#s8-1, worked lawn row of
        // docs/references.md#s8-3:
        // R = 0.15 m, G = 20 MPa, ν = 0.33.
        let s = Soil::preset("lawn").unwrap();
        let k = s.contact_stiffness(0.15);
        let (g, nu, r) = (20e6, 0.33, 0.15_f64);
        assert_relative_eq!(k.vertical, 4.0 * g * r / (1.0 - nu), max_relative = 1e-12);
        assert_relative_eq!(k.vertical, 1.7910e7, max_relative = 1e-4);
        assert_relative_eq!(k.rocking, 2.6866e5, max_relative = 1e-4);
        assert_relative_eq!(k.torsion, 3.6000e5, max_relative = 1e-12);
        assert_relative_eq!(k.horizontal, 32.0 * (1.0 - nu) * g * r / (7.0 - 8.0 * nu), max_relative = 1e-12);
        // Lysmer's analog vertical dashpot, docs/references.md#s8-3 lawn row: c_z = 20 425 N·s/m.
        assert_relative_eq!(s.radiation_dashpots(0.15).vertical, 20425.0, max_relative = 1e-3);
    }

    #[test]
    fn lysmer_damping_ratio_consistency() {
        // docs/references.md#s8-3: ζ_z = c_z / (2 sqrt(K_z m)) = 0.425 / sqrt(B_z),
        // B_z = (1−ν) m / (4 ρ R³).
        let s = Soil::preset("dense-sand").unwrap();
        let (r, m) = (0.15, 30.0);
        let k = s.contact_stiffness(r).vertical;
        let c = s.radiation_dashpots(r).vertical;
        let b = (1.0 - s.poisson_ratio) * m / (4.0 * s.density_kg_m3 * r.powi(3));
        assert_relative_eq!(c / (2.0 * (k * m).sqrt()), 0.425 / b.sqrt(), max_relative = 1e-12);
    }

    #[test]
    fn bad_soil_named() {
        let mut s = Soil::preset("gravel").unwrap();
        s.poisson_ratio = 0.6;
        assert!(s.validate("ground.soil").unwrap_err().to_string().contains("ground.soil.poisson_ratio"));
        assert!(Soil::preset("moon-dust").unwrap_err().to_string().contains("lawn"));
    }
}

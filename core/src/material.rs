//! Named structural materials with their sources.
//!
//! Values are room-temperature, along the grain for wood. Each preset names its source as given
//! in docs/references.md#s9; where that page says "from memory" or "common practice, no source"
//! the doc of the preset says so. Use the supplier's data where you
//! have it: build a [`Material`] by hand.

use crate::error::{Result, require_non_negative, require_positive};
use serde::{Deserialize, Serialize};

/// An isotropic linear-elastic material with a structural loss factor.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Material {
    /// Young's modulus E (Pa).
    pub youngs_modulus_pa: f64,
    /// Poisson's ratio ν (shear modulus G = E / (2(1+ν))).
    pub poisson_ratio: f64,
    /// Density ρ (kg/m³).
    pub density_kg_m3: f64,
    /// Yield strength (Pa); for wood the crushing strength parallel to the grain; for fibre
    /// composites the compressive strength (they do not yield).
    pub yield_strength_pa: f64,
    /// Structural loss factor η (dimensionless).
    #[serde(default)]
    pub loss_factor: f64,
}

/// Names accepted by [`Material::preset`].
pub const MATERIAL_PRESETS: &[&str] =
    &["stainless-304", "aluminium-6061-t6", "carbon-fibre-tube", "white-ash", "steel-s235", "concrete-c30"];

impl Material {
    /// Shear modulus G = E / (2(1 + ν)) (Pa).
    pub fn shear_modulus_pa(&self) -> f64 {
        self.youngs_modulus_pa / (2.0 * (1.0 + self.poisson_ratio))
    }

    /// Check every field; the error names the field.
    pub fn validate(&self, name: &str) -> Result<()> {
        require_positive(|| format!("{name}.youngs_modulus_pa"), self.youngs_modulus_pa)?;
        require_positive(|| format!("{name}.density_kg_m3"), self.density_kg_m3)?;
        require_positive(|| format!("{name}.yield_strength_pa"), self.yield_strength_pa)?;
        require_non_negative(|| format!("{name}.loss_factor"), self.loss_factor)?;
        let nu = self.poisson_ratio;
        if !nu.is_finite() || !(-1.0..0.5).contains(&nu) {
            return Err(crate::Error::invalid(
                format!("{name}.poisson_ratio"),
                format!("must lie in [-1, 0.5), got {nu}"),
            ));
        }
        Ok(())
    }

    /// A named preset (see [`MATERIAL_PRESETS`]).
    ///
    /// - `stainless-304`: annealed 304, E 193 GPa, yield 207 MPa, ρ 7900, ν 0.27 (a mechanics
    ///   textbook's material appendix, as quoted in docs/references.md#s9); η 0.002 (steel,
    ///   typical range 0.001–0.005, from memory: verify).
    /// - `aluminium-6061-t6`: E 68.9 GPa, yield 276 MPa typical, ρ 2700, ν 0.33 (engineering
    ///   textbook appendix, docs/references.md#s9); η 0.002 (from memory: verify).
    /// - `carbon-fibre-tube`: roll-wrapped standard modulus, E 110 GPa axial, compressive
    ///   strength 500 MPa, ρ 1550, ν 0.3, η 0.01 (from memory: verify; use the supplier's data).
    /// - `white-ash`: along the grain at 12 % moisture, E 12.0 GPa, crushing strength 51.1 MPa
    ///   (Wood Handbook), ρ 670; ν 0.37 and η 0.015 (from memory: verify).
    /// - `steel-s235`: structural steel, E 210 GPa, yield 235 MPa, ρ 7850, ν 0.3, η 0.002
    ///   (EN 1993-1-1 nominal values, from memory: verify).
    /// - `concrete-c30`: E 30 GPa, ρ 2400, ν 0.2 (docs/references.md#s8-4 range 25–35 GPa); "yield"
    ///   is the compressive characteristic strength 30 MPa; η 0.02 (common practice, no source).
    pub fn preset(name: &str) -> Result<Self> {
        let m = |e: f64, nu: f64, rho: f64, fy: f64, eta: f64| Material {
            youngs_modulus_pa: e,
            poisson_ratio: nu,
            density_kg_m3: rho,
            yield_strength_pa: fy,
            loss_factor: eta,
        };
        Ok(match name.to_ascii_lowercase().as_str() {
            "stainless-304" => m(193e9, 0.27, 7900.0, 207e6, 0.002),
            "aluminium-6061-t6" | "aluminum-6061-t6" => m(68.9e9, 0.33, 2700.0, 276e6, 0.002),
            "carbon-fibre-tube" | "carbon-fiber-tube" => m(110e9, 0.3, 1550.0, 500e6, 0.01),
            "white-ash" => m(12.0e9, 0.37, 670.0, 51.1e6, 0.015),
            "steel-s235" => m(210e9, 0.3, 7850.0, 235e6, 0.002),
            "concrete-c30" => m(30e9, 0.2, 2400.0, 30e6, 0.02),
            _ => {
                return Err(crate::Error::UnknownName {
                    kind: "material".into(),
                    name: name.into(),
                    known: MATERIAL_PRESETS.join(", "),
                });
            }
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn presets_are_valid_and_unknown_is_named() {
        for n in MATERIAL_PRESETS {
            Material::preset(n).unwrap().validate(n).unwrap();
        }
        let e = Material::preset("unobtainium").unwrap_err();
        assert!(e.to_string().contains("unobtainium") && e.to_string().contains("stainless-304"));
    }

    #[test]
    fn bad_fields_are_named() {
        let mut m = Material::preset("stainless-304").unwrap();
        m.youngs_modulus_pa = -1.0;
        assert!(m.validate("leg").unwrap_err().to_string().contains("leg.youngs_modulus_pa"));
        let mut m = Material::preset("stainless-304").unwrap();
        m.poisson_ratio = 0.7;
        assert!(m.validate("leg").unwrap_err().to_string().contains("poisson_ratio"));
    }
}

//! Cross-sections of legs, columns and rods: area, second moment, torsion constant.

use crate::error::{Error, Result, require_positive};
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// A doubly symmetric cross-section (same bending stiffness about both principal axes, or a
/// rectangle with its two moments).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "shape", rename_all = "snake_case", deny_unknown_fields)]
pub enum Section {
    /// Circular tube: outer diameter and wall thickness (m).
    Tube { outer_diameter_m: f64, wall_m: f64 },
    /// Solid round rod (m).
    Rod { diameter_m: f64 },
    /// Solid rectangle, width along the section's local y and depth along local z (m).
    Rectangle { width_m: f64, depth_m: f64 },
}

impl Section {
    /// Validate dimensions; the error names the field.
    pub fn validate(&self, name: &str) -> Result<()> {
        match *self {
            Section::Tube { outer_diameter_m, wall_m } => {
                require_positive(|| format!("{name}.outer_diameter_m"), outer_diameter_m)?;
                require_positive(|| format!("{name}.wall_m"), wall_m)?;
                if 2.0 * wall_m > outer_diameter_m {
                    return Err(Error::invalid(
                        format!("{name}.wall_m"),
                        format!("wall {wall_m} m is more than half the outer diameter {outer_diameter_m} m"),
                    ));
                }
            }
            Section::Rod { diameter_m } => {
                require_positive(|| format!("{name}.diameter_m"), diameter_m)?;
            }
            Section::Rectangle { width_m, depth_m } => {
                require_positive(|| format!("{name}.width_m"), width_m)?;
                require_positive(|| format!("{name}.depth_m"), depth_m)?;
            }
        }
        Ok(())
    }

    /// Area A (m²). Tube: (π/4)(D_o² − D_i²).
    pub fn area_m2(&self) -> f64 {
        match *self {
            Section::Tube { outer_diameter_m: d, wall_m: t } => {
                let di = d - 2.0 * t;
                PI / 4.0 * (d * d - di * di)
            }
            Section::Rod { diameter_m: d } => PI / 4.0 * d * d,
            Section::Rectangle { width_m: b, depth_m: h } => b * h,
        }
    }

    /// Second moments (I_y, I_z) about the local y and z axes (m⁴). Tube: (π/64)(D_o⁴ − D_i⁴).
    pub fn second_moments_m4(&self) -> (f64, f64) {
        match *self {
            Section::Tube { outer_diameter_m: d, wall_m: t } => {
                let di = d - 2.0 * t;
                let i = PI / 64.0 * (d.powi(4) - di.powi(4));
                (i, i)
            }
            Section::Rod { diameter_m: d } => {
                let i = PI / 64.0 * d.powi(4);
                (i, i)
            }
            // I_y bends about local y: depth h along z.
            Section::Rectangle { width_m: b, depth_m: h } => (b * h.powi(3) / 12.0, h * b.powi(3) / 12.0),
        }
    }

    /// The smaller second moment (m⁴): governs buckling.
    pub fn min_second_moment_m4(&self) -> f64 {
        let (a, b) = self.second_moments_m4();
        a.min(b)
    }

    /// Torsion constant J (m⁴): exact polar moment for round sections; for a rectangle
    /// β·a·b³ with β = 1/3 − 0.21 (b/a)(1 − (b/a)⁴/12) (Roark's approximation, from memory: verify).
    pub fn torsion_constant_m4(&self) -> f64 {
        match *self {
            Section::Tube { .. } | Section::Rod { .. } => {
                let (i, _) = self.second_moments_m4();
                2.0 * i
            }
            Section::Rectangle { width_m, depth_m } => {
                let (a, b) = if width_m >= depth_m { (width_m, depth_m) } else { (depth_m, width_m) };
                let r = b / a;
                (1.0 / 3.0 - 0.21 * r * (1.0 - r.powi(4) / 12.0)) * a * b.powi(3)
            }
        }
    }

    /// Radius of gyration for buckling, sqrt(I_min / A) (m).
    pub fn radius_of_gyration_m(&self) -> f64 {
        (self.min_second_moment_m4() / self.area_m2()).sqrt()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn tube_matches_reference_example() {
        // docs/references.md#s9 (computed from the published formula): 2.0 in OD × 0.049 in wall.
        let inch = 0.0254;
        let s = Section::Tube { outer_diameter_m: 2.0 * inch, wall_m: 0.049 * inch };
        assert_relative_eq!(s.area_m2() / inch.powi(2), 0.300333, max_relative = 2e-6);
        assert_relative_eq!(s.second_moments_m4().0 / inch.powi(4), 0.142989, max_relative = 5e-6);
        assert_relative_eq!(s.radius_of_gyration_m() / inch, 0.6900, max_relative = 1e-4);
        // SI example: 25 mm OD, 2 mm wall: A = 1.445133e-4 m², I = 9.628196e-9 m⁴.
        let s = Section::Tube { outer_diameter_m: 0.025, wall_m: 0.002 };
        assert_relative_eq!(s.area_m2(), 1.445133e-4, max_relative = 1e-6);
        assert_relative_eq!(s.second_moments_m4().0, 9.628196e-9, max_relative = 1e-6);
    }

    #[test]
    fn rejects_impossible_wall() {
        let s = Section::Tube { outer_diameter_m: 0.02, wall_m: 0.011 };
        assert!(s.validate("leg").unwrap_err().to_string().contains("leg.wall_m"));
    }
}

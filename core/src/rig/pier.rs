//! The pier: a beam (section, material, added fill mass and loss) from a rigid footing block on
//! the half-space springs of [`crate::soil`] (all four: vertical, horizontal, rocking,
//! torsion), or clamped to rigid ground or to the floor.

use super::RigSpec;
use super::elements::{EX, EY, EZ, axial, torsion};
use super::fields::{material_of, nonneg_or, pos, pos_or};
use super::ground::Support;
use super::wind::{End, WindParts, section_drag};
use crate::assembly::{BeamSpec, BodySpec, Dof, GROUND, ModelSpec};
use crate::error::{Error, Result, require_non_negative, require_positive};
use crate::material::Material;
use crate::section::Section;
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// Default footing density (kg/m³): plain concrete, inside the 2300–2400 range of the reference
/// docs/references.md#s8-4.
pub const DEFAULT_FOOTING_DENSITY_KG_M3: f64 = 2400.0;

/// `[pier.footing]`: a rigid block under the pier, on the soil.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FootingSpec {
    /// Diameter of a round footing (m) ...
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub diameter_m: Option<f64>,
    /// ... or side of a square one (m).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub side_m: Option<f64>,
    /// Depth (thickness) of the block (m).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub depth_m: Option<f64>,
    /// Density (kg/m³, default [`DEFAULT_FOOTING_DENSITY_KG_M3`]).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub density_kg_m3: Option<f64>,
    /// How deep the block sits in the soil with its sides in contact (m, default 0 = on the
    /// surface, at most `depth_m`): scales the soil springs by [`crate::soil::embedment_factors`].
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub embedment_m: Option<f64>,
}

/// `[pier]`: a column from a footing (or the ground, or the floor) up to the mount.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PierSpec {
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub section: Option<Section>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub material: Option<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub material_properties: Option<Material>,
    /// Column height from its base to the mount's base (m).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub height_m: Option<f64>,
    /// Beam elements (default 4).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub elements: Option<usize>,
    /// Density of a fill inside a tube section (kg/m³): added mass ρ_fill·(π/4)·D_i² per metre.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub fill_density_kg_m3: Option<f64>,
    /// Further non-structural mass per length (kg/m, default 0).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub added_mass_kg_per_m: Option<f64>,
    /// Loss factor added to the material's, e.g. from a fill (default 0).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub added_loss_factor: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub footing: Option<FootingSpec>,
    /// What the pier stands on (default ground).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub on: Option<Support>,
    /// Anchor bolts of the base plate, equally spaced on a circle (static check only) ...
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub anchor_count: Option<usize>,
    /// ... the bolt circle's diameter (m) ...
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub anchor_circle_diameter_m: Option<f64>,
    /// ... and the rated tension of one anchor (bolt and embedment, N; optional).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub anchor_tension_capacity_n: Option<f64>,
}

/// Where a stand (tripod or pier) starts: carrier name and height of its base.
pub(super) struct Base {
    pub(super) carrier: String,
    pub(super) z: f64,
}

impl PierSpec {
    /// Footing body and its soil springs (pier on soil), or the support itself.
    pub(super) fn base(
        &self,
        rig: &RigSpec,
        support: &str,
        support_z: f64,
        out: &mut ModelSpec,
    ) -> Result<Base> {
        let soil = if support == GROUND { rig.soil()? } else { None };
        let Some((soil, radiation)) = soil else {
            // Rigid ground or floor: the column is clamped to it; a footing there would not move.
            return Ok(Base { carrier: support.to_string(), z: support_z });
        };
        let f = self.footing.as_ref().ok_or_else(|| Error::invalid("pier.footing", "is required on soil"))?;
        let d = pos("pier.footing.depth_m", f.depth_m)?;
        let rho = pos_or("pier.footing.density_kg_m3", f.density_kg_m3, DEFAULT_FOOTING_DENSITY_KG_M3)?;
        let emb = nonneg_or("pier.footing.embedment_m", f.embedment_m, 0.0)?;
        if emb > d {
            return Err(Error::invalid(
                "pier.footing.embedment_m",
                format!("must not exceed the block's depth_m = {d}, got {emb}"),
            ));
        }
        // Mass and inertia of a solid cylinder / square block; contact radii.
        let (m, ixx, izz, r_trans, r_rot) = match (f.diameter_m, f.side_m) {
            (Some(dia), None) => {
                let r = require_positive("pier.footing.diameter_m", dia)? / 2.0;
                let m = rho * PI * r * r * d;
                (m, m * (3.0 * r * r + d * d) / 12.0, m * r * r / 2.0, r, r)
            }
            (None, Some(s)) => {
                let s = require_positive("pier.footing.side_m", s)?;
                let m = rho * s * s * d;
                // Equivalent circles: equal area for translation, equal second moment of area
                // for rocking and torsion (Richart, Hall & Woods 1970; from memory: verify).
                (
                    m,
                    m * (s * s + d * d) / 12.0,
                    m * s * s / 6.0,
                    s / PI.sqrt(),
                    (s.powi(4) / (3.0 * PI)).powf(0.25),
                )
            }
            _ => {
                return Err(Error::invalid(
                    "pier.footing.diameter_m",
                    "give exactly one of diameter_m (round) or side_m (square)",
                ));
            }
        };
        out.bodies.push(BodySpec {
            name: "footing".into(),
            mass_kg: m,
            cg_m: [0.0, 0.0, support_z + d / 2.0],
            inertia_kgm2: [ixx, ixx, izz],
            products_kgm2: [0.0; 3],
            dofs: Dof::ALL.to_vec(),
        });
        let [kv, kh, _, _] = soil.contact_models(r_trans, radiation, emb)?;
        let [_, _, kr, kt] = soil.contact_models(r_rot, radiation, emb)?;
        let at = [0.0, 0.0, support_z];
        out.springs.push(axial("footing_x", GROUND, "footing", at, EX, &kh));
        out.springs.push(axial("footing_y", GROUND, "footing", at, EY, &kh));
        out.springs.push(axial("footing_z", GROUND, "footing", at, EZ, &kv));
        out.torsion_springs.push(torsion("footing_rx", GROUND, "footing", at, EX, &kr));
        out.torsion_springs.push(torsion("footing_ry", GROUND, "footing", at, EY, &kr));
        out.torsion_springs.push(torsion("footing_rz", GROUND, "footing", at, EZ, &kt));
        Ok(Base { carrier: "footing".into(), z: support_z + d })
    }

    /// The column from its base up to the mount's base at `top_z`.
    /// The column's wind parts: half at each end, L/6 in from it (the consistent end moments of
    /// a uniformly loaded beam).
    pub(super) fn wind(&self, base: &Base, mount: &str, top_z: f64, w: &mut WindParts) -> Result<()> {
        let section = self.section.clone().ok_or_else(|| Error::invalid("pier.section", "is required"))?;
        let (d, cd) = section_drag(&section);
        w.member(
            "pier column",
            End { carrier: mount, at: [0.0, 0.0, top_z] },
            End { carrier: &base.carrier, at: [0.0, 0.0, base.z] },
            d,
            cd,
            1.0 / 6.0,
        );
        Ok(())
    }

    pub(super) fn column(&self, base: &Base, mount: &str, top_z: f64) -> Result<BeamSpec> {
        let section = self.section.clone().ok_or_else(|| Error::invalid("pier.section", "is required"))?;
        section.validate("pier.section")?;
        let mat = material_of("pier.material", &self.material, &self.material_properties)?;
        let elements = self.elements.unwrap_or(4);
        if !(1..=200).contains(&elements) {
            return Err(Error::invalid("pier.elements", format!("must lie in 1..=200, got {elements}")));
        }
        let mut added = nonneg_or("pier.added_mass_kg_per_m", self.added_mass_kg_per_m, 0.0)?;
        if let Some(rho) = self.fill_density_kg_m3 {
            require_non_negative("pier.fill_density_kg_m3", rho)?;
            let Section::Tube { outer_diameter_m, wall_m } = section else {
                return Err(Error::invalid("pier.fill_density_kg_m3", "a fill needs a tube section"));
            };
            let di = outer_diameter_m - 2.0 * wall_m;
            added += rho * PI / 4.0 * di * di;
        }
        Ok(BeamSpec {
            name: "pier".into(),
            from: base.carrier.clone(),
            to: mount.into(),
            from_at_m: [0.0, 0.0, base.z],
            to_at_m: [0.0, 0.0, top_z],
            section,
            material: None,
            material_properties: Some(mat),
            elements,
            added_mass_kg_per_m: added,
            added_loss_factor: nonneg_or("pier.added_loss_factor", self.added_loss_factor, 0.0)?,
            orientation: None,
        })
    }
}

//! The floor: a rigid deck body `floor` on springs to the ground, that the tripod or pier may
//! stand on (`on = "floor"`), or that is merely nearby (a pier through a hole in the deck),
//! optionally bridged to the pier footing by the stiffness of a gap filler.

use super::elements::{EX, EY, EZ, axial, torsion};
use super::fields::{body_name, nonneg_or, pos, pos3, req};
use super::mass::V3;
use super::pier::Base;
use crate::assembly::{BodySpec, Dof, GROUND, ModelSpec, SpringSpec};
use crate::error::{Error, Result, require_finite, require_non_negative, require_positive};
use crate::stiffness::StiffnessModel;
use serde::{Deserialize, Serialize};

/// `[floor]`: a deck or slab body on springs to the ground.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FloorSpec {
    /// Body name (default `floor`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub name: Option<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub mass_kg: Option<f64>,
    /// About its CG along x, y, z (kg·m²).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub inertia_kgm2: Option<[f64; 3]>,
    /// Height of the walking surface above the ground (m); the rig's z = 0 moves up to it when
    /// the tripod or pier stands on the floor.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub height_m: Option<f64>,
    /// CG of the deck (m, default [0, 0, height_m]); also where its supports act.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub cg_m: Option<V3>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub vertical_stiffness_n_per_m: Option<f64>,
    /// About both horizontal axes (N·m/rad).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub rocking_stiffness_nm_per_rad: Option<f64>,
    /// Each horizontal direction (N/m). Without it the deck's x and y are held and follow the
    /// ground (ground_x / ground_y), and rz without torsion is held fixed.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub horizontal_stiffness_n_per_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub torsion_stiffness_nm_per_rad: Option<f64>,
    /// Loss factor of the supports (default 0).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub loss_factor: Option<f64>,
    /// Stiffness bridging the isolation gap between the deck and the pier footing (N/m in
    /// x, y, z; default none = perfectly isolated).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub gap_stiffness_n_per_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub gap_loss_factor: Option<f64>,
}

impl FloorSpec {
    /// The deck body's name.
    pub fn body(&self) -> &str {
        self.name.as_deref().unwrap_or("floor")
    }

    /// The deck body and its supports; returns (name, walking-surface height).
    pub(super) fn build(&self, out: &mut ModelSpec) -> Result<(String, f64)> {
        let name = body_name("floor.name", &self.name, "floor")?;
        let m = pos("floor.mass_kg", self.mass_kg)?;
        let i = pos3("floor.inertia_kgm2", self.inertia_kgm2)?;
        let h = require_non_negative("floor.height_m", req("floor.height_m", self.height_m)?)?;
        let cg = match self.cg_m {
            Some(c) => {
                for x in c {
                    require_finite("floor.cg_m", x)?;
                }
                c
            }
            None => [0.0, 0.0, h],
        };
        let eta = nonneg_or("floor.loss_factor", self.loss_factor, 0.0)?;
        let kv = pos("floor.vertical_stiffness_n_per_m", self.vertical_stiffness_n_per_m)?;
        let kr = pos("floor.rocking_stiffness_nm_per_rad", self.rocking_stiffness_nm_per_rad)?;
        let kh = self
            .horizontal_stiffness_n_per_m
            .map(|k| require_positive("floor.horizontal_stiffness_n_per_m", k))
            .transpose()?;
        let kt = self
            .torsion_stiffness_nm_per_rad
            .map(|k| require_positive("floor.torsion_stiffness_nm_per_rad", k))
            .transpose()?;
        let hm = |k: f64| StiffnessModel::hysteretic(k, eta);
        let mut dofs = vec![Dof::Z, Dof::Rx, Dof::Ry];
        out.springs.push(axial(&format!("{name}_z"), GROUND, &name, cg, EZ, &hm(kv)));
        out.torsion_springs.push(torsion(&format!("{name}_rx"), GROUND, &name, cg, EX, &hm(kr)));
        out.torsion_springs.push(torsion(&format!("{name}_ry"), GROUND, &name, cg, EY, &hm(kr)));
        if let Some(k) = kh {
            dofs.extend([Dof::X, Dof::Y]);
            out.springs.push(axial(&format!("{name}_x"), GROUND, &name, cg, EX, &hm(k)));
            out.springs.push(axial(&format!("{name}_y"), GROUND, &name, cg, EY, &hm(k)));
        }
        if let Some(k) = kt {
            dofs.push(Dof::Rz);
            out.torsion_springs.push(torsion(&format!("{name}_rz"), GROUND, &name, cg, EZ, &hm(k)));
        }
        dofs.sort();
        out.bodies.push(BodySpec {
            name: name.clone(),
            mass_kg: m,
            cg_m: cg,
            inertia_kgm2: i,
            products_kgm2: [0.0; 3],
            dofs,
        });
        Ok((name, h))
    }

    /// Gap springs from the deck to the pier's base body (when it is a footing).
    pub(super) fn gap(&self, out: &ModelSpec, base: &Base) -> Result<Vec<SpringSpec>> {
        let Some(k) = self.gap_stiffness_n_per_m else {
            return Ok(Vec::new());
        };
        let k = require_positive("floor.gap_stiffness_n_per_m", k)?;
        let eta = nonneg_or("floor.gap_loss_factor", self.gap_loss_factor, 0.0)?;
        let name = body_name("floor.name", &self.name, "floor")?;
        if base.carrier == GROUND
            || base.carrier == name
            || !out.bodies.iter().any(|b| b.name == base.carrier)
        {
            return Err(Error::invalid(
                "floor.gap_stiffness_n_per_m",
                "bridges the deck to a pier footing; the pier has no footing body",
            ));
        }
        let at = [0.0, 0.0, base.z];
        let m = StiffnessModel::hysteretic(k, eta);
        Ok([("gap_x", EX), ("gap_y", EY), ("gap_z", EZ)]
            .into_iter()
            .map(|(n, d)| axial(n, &name, &base.carrier, at, d, &m))
            .collect())
    }
}

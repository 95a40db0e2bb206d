//! The mount head: a rigid body named `mount` (with the tripod's head plate and the upper half
//! of the leg masses lumped in) whose base sits on the tripod head or pier top. The payload
//! joins it at the pivot (`pivot_height_m` above the base) through three stiff translational
//! springs and three torsion springs: about the altitude axis e_s, the horizontal axis ⟂ e_s
//! (tilt) and the vertical (yaw). The geometry is that of an alt-azimuth mount; an equatorial
//! mount is described by its stiffnesses about these same axes.

use super::elements::{EX, EY, EZ, axial, torsion};
use super::fields::{nonneg_or, pos, pos_or, pos3};
use super::mass::{Mass, V3};
use super::payload::payload_frame;
use crate::assembly::ModelSpec;
use crate::error::Result;
use crate::stiffness::StiffnessModel;
use serde::{Deserialize, Serialize};

/// Default stiffness of the translational springs at the pivot (N/m): a quasi-rigid joint that
/// keeps translation modes of the payload far above the tilt modes (a numerical choice, common
/// practice, no source).
pub const DEFAULT_PIVOT_TRANSLATIONAL_STIFFNESS_N_PER_M: f64 = 1.0e8;

/// `[mount]`: the mount head.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MountSpec {
    /// Body name (default `mount`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub name: Option<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub mass_kg: Option<f64>,
    /// Moments of inertia about the mount's own CG along x, y, z (kg·m²).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub inertia_kgm2: Option<[f64; 3]>,
    /// Height of the pivot (intersection of the axes) above the mount's base (m).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub pivot_height_m: Option<f64>,
    /// Height of the mount's CG above its base (m, default half the pivot height).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub cg_height_m: Option<f64>,
    /// Rotational stiffness about both horizontal axes at the pivot (N·m/rad).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub tilt_stiffness_nm_per_rad: Option<f64>,
    /// Overrides the tilt stiffness about the altitude axis (N·m/rad).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub altitude_stiffness_nm_per_rad: Option<f64>,
    /// Rotational stiffness about the vertical (N·m/rad).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub yaw_stiffness_nm_per_rad: Option<f64>,
    /// Loss factor of the pivot springs (default 0).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub loss_factor: Option<f64>,
    /// Stiffness of the three translational pivot springs (N/m, default
    /// [`DEFAULT_PIVOT_TRANSLATIONAL_STIFFNESS_N_PER_M`]).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub translational_stiffness_n_per_m: Option<f64>,
}

impl MountSpec {
    /// The mount's own mass (CG `cg_height_m` above its base at `base_z`) and the pivot height
    /// above the base.
    pub(super) fn own_mass(&self, base_z: f64) -> Result<(Mass, f64)> {
        let mm = pos("mount.mass_kg", self.mass_kg)?;
        let mi = pos3("mount.inertia_kgm2", self.inertia_kgm2)?;
        let ph = pos("mount.pivot_height_m", self.pivot_height_m)?;
        let ch = nonneg_or("mount.cg_height_m", self.cg_height_m, ph / 2.0)?;
        let own = Mass {
            m: mm,
            c: [0.0, 0.0, base_z + ch],
            j: [[mi[0], 0.0, 0.0], [0.0, mi[1], 0.0], [0.0, 0.0, mi[2]]],
        };
        Ok((own, ph))
    }

    /// Pivot springs from the mount to the payload.
    pub(super) fn joint(
        &self,
        mount: &str,
        payload: &str,
        pivot: V3,
        alt: f64,
        az: f64,
        out: &mut ModelSpec,
    ) -> Result<()> {
        let eta = nonneg_or("mount.loss_factor", self.loss_factor, 0.0)?;
        let kt = pos("mount.tilt_stiffness_nm_per_rad", self.tilt_stiffness_nm_per_rad)?;
        let ka = pos_or("mount.altitude_stiffness_nm_per_rad", self.altitude_stiffness_nm_per_rad, kt)?;
        let ky = pos("mount.yaw_stiffness_nm_per_rad", self.yaw_stiffness_nm_per_rad)?;
        let kx = pos_or(
            "mount.translational_stiffness_n_per_m",
            self.translational_stiffness_n_per_m,
            DEFAULT_PIVOT_TRANSLATIONAL_STIFFNESS_N_PER_M,
        )?;
        let [_, shaft, _] = payload_frame(alt, az);
        let a = az.to_radians();
        let tilt_axis = [a.sin(), a.cos(), 0.0]; // horizontal, ⟂ the shaft
        let h = |k: f64| StiffnessModel::hysteretic(k, eta);
        for (nm, d) in [("pivot_x", EX), ("pivot_y", EY), ("pivot_z", EZ)] {
            out.springs.push(axial(nm, mount, payload, pivot, d, &h(kx)));
        }
        out.torsion_springs.push(torsion("pivot_altitude", mount, payload, pivot, shaft, &h(ka)));
        out.torsion_springs.push(torsion("pivot_tilt", mount, payload, pivot, tilt_axis, &h(kt)));
        out.torsion_springs.push(torsion("pivot_yaw", mount, payload, pivot, EZ, &h(ky)));
        Ok(())
    }
}

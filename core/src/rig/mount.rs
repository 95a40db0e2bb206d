//! The mount head: a rigid body named `mount` (with the tripod's head plate and the upper half
//! of the leg masses lumped in) whose base sits on the tripod head or pier top. The payload
//! joins it at the pivot (`pivot_height_m` above the base) through three stiff translational
//! springs and three torsion springs.
//!
//! - Alt-azimuth (`kind = "altazimuth"`, the default): about the altitude axis e_s, the
//!   horizontal axis ⟂ e_s (tilt) and the vertical (yaw).
//! - German equatorial (`kind = "equatorial"`): the polar (RA) axis p points at the celestial
//!   pole of the site's latitude, the declination axis d is ⟂ p and ⟂ the line of sight (see
//!   [`crate::sky`]); the pivot is where they cross. Each axis is a bearing with a torsional
//!   stiffness (its drive) and a housing that resists tilt about the two axes ⟂ it. The Dec
//!   housing between the two bearings is taken as massless (its mass belongs in `mass_kg` or
//!   in a payload part), so the two bearings act in series in the frame (p, d, n = p × d):
//!   about p the RA torsion with the Dec housing's tilt, about d the Dec torsion with the RA
//!   housing's tilt, about n both housings' tilt.

use super::elements::{EX, EY, EZ, axial, torsion};
use super::fields::{nonneg_or, pos, pos_or, pos3, req};
use super::mass::{Mass, V3};
use super::payload::payload_frame;
use crate::assembly::ModelSpec;
use crate::error::{Error, Result};
use crate::stiffness::StiffnessModel;
use serde::{Deserialize, Serialize};

/// Default stiffness of the translational springs at the pivot (N/m): a quasi-rigid joint that
/// keeps translation modes of the payload far above the tilt modes (a numerical choice, common
/// practice, no source).
pub const DEFAULT_PIVOT_TRANSLATIONAL_STIFFNESS_N_PER_M: f64 = 1.0e8;

/// The kind of mount head.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum MountKind {
    /// Altitude over azimuth.
    #[default]
    Altazimuth,
    /// German equatorial: polar axis tilted to the latitude, declination axis across it, tube
    /// on one side and counterweights on the other.
    Equatorial,
}

/// `[mount]`: the mount head.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MountSpec {
    /// Body name (default `mount`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub name: Option<String>,
    /// Alt-azimuth (default) or German equatorial.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub kind: Option<MountKind>,
    /// Site latitude (deg; equatorial): the polar axis is tilted to it.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub latitude_deg: Option<f64>,
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
    /// Alt-azimuth: rotational stiffness about both horizontal axes at the pivot. Equatorial:
    /// tilt stiffness of each axis housing about the axes ⟂ its own (N·m/rad).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub tilt_stiffness_nm_per_rad: Option<f64>,
    /// Overrides the tilt stiffness about the altitude axis (N·m/rad).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub altitude_stiffness_nm_per_rad: Option<f64>,
    /// Rotational stiffness about the vertical (N·m/rad).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub yaw_stiffness_nm_per_rad: Option<f64>,
    /// Equatorial: torsional stiffness of the RA bearing and drive about the polar axis (N·m/rad).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub ra_stiffness_nm_per_rad: Option<f64>,
    /// Equatorial: torsional stiffness of the Dec bearing and drive (N·m/rad).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub dec_stiffness_nm_per_rad: Option<f64>,
    /// Equatorial: overrides the tilt stiffness of the Dec housing (N·m/rad).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub dec_tilt_stiffness_nm_per_rad: Option<f64>,
    /// Equatorial: loss factors of the RA and Dec torsions (default `loss_factor`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub ra_loss_factor: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub dec_loss_factor: Option<f64>,
    /// Loss factor of the pivot springs (default 0).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub loss_factor: Option<f64>,
    /// Stiffness of the three translational pivot springs (N/m, default
    /// [`DEFAULT_PIVOT_TRANSLATIONAL_STIFFNESS_N_PER_M`]).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub translational_stiffness_n_per_m: Option<f64>,
    /// Projected area of the head in the wind (m², default the square of the pivot height).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub wind_area_m2: Option<f64>,
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

    /// The mount kind, with the keys of the other kind refused by name.
    pub(super) fn kind(&self) -> Result<MountKind> {
        let kind = self.kind.unwrap_or_default();
        let (wrong, why): (&[(&str, bool)], &str) = match kind {
            MountKind::Altazimuth => (
                &[
                    ("mount.latitude_deg", self.latitude_deg.is_some()),
                    ("mount.ra_stiffness_nm_per_rad", self.ra_stiffness_nm_per_rad.is_some()),
                    ("mount.dec_stiffness_nm_per_rad", self.dec_stiffness_nm_per_rad.is_some()),
                    ("mount.dec_tilt_stiffness_nm_per_rad", self.dec_tilt_stiffness_nm_per_rad.is_some()),
                    ("mount.ra_loss_factor", self.ra_loss_factor.is_some()),
                    ("mount.dec_loss_factor", self.dec_loss_factor.is_some()),
                ],
                "is for kind = \"equatorial\"",
            ),
            MountKind::Equatorial => (
                &[
                    ("mount.altitude_stiffness_nm_per_rad", self.altitude_stiffness_nm_per_rad.is_some()),
                    ("mount.yaw_stiffness_nm_per_rad", self.yaw_stiffness_nm_per_rad.is_some()),
                ],
                "is for an alt-azimuth mount; an equatorial one has ra_/dec_stiffness_nm_per_rad",
            ),
        };
        if let Some((k, _)) = wrong.iter().find(|(_, given)| *given) {
            return Err(Error::invalid(*k, why));
        }
        Ok(kind)
    }

    /// The site latitude of an equatorial mount.
    pub(super) fn latitude(&self) -> Result<f64> {
        let f = req("mount.latitude_deg", self.latitude_deg)?;
        if !(-90.0..=90.0).contains(&f) {
            return Err(Error::invalid("mount.latitude_deg", format!("must lie in [-90, 90], got {f}")));
        }
        Ok(f)
    }

    fn translational(
        &self,
        mount: &str,
        payload: &str,
        pivot: V3,
        eta: f64,
        out: &mut ModelSpec,
    ) -> Result<()> {
        let kx = pos_or(
            "mount.translational_stiffness_n_per_m",
            self.translational_stiffness_n_per_m,
            DEFAULT_PIVOT_TRANSLATIONAL_STIFFNESS_N_PER_M,
        )?;
        for (nm, d) in [("pivot_x", EX), ("pivot_y", EY), ("pivot_z", EZ)] {
            out.springs.push(axial(nm, mount, payload, pivot, d, &StiffnessModel::hysteretic(kx, eta)));
        }
        Ok(())
    }

    /// Pivot springs of an equatorial head with polar axis `pole` and declination axis `dec`.
    pub(super) fn joint_equatorial(
        &self,
        mount: &str,
        payload: &str,
        pivot: V3,
        pole: V3,
        dec: V3,
        out: &mut ModelSpec,
    ) -> Result<()> {
        let eta = nonneg_or("mount.loss_factor", self.loss_factor, 0.0)?;
        let eta_ra = nonneg_or("mount.ra_loss_factor", self.ra_loss_factor, eta)?;
        let eta_dec = nonneg_or("mount.dec_loss_factor", self.dec_loss_factor, eta)?;
        let k_ra = pos("mount.ra_stiffness_nm_per_rad", self.ra_stiffness_nm_per_rad)?;
        let k_dec = pos("mount.dec_stiffness_nm_per_rad", self.dec_stiffness_nm_per_rad)?;
        let t_ra = pos("mount.tilt_stiffness_nm_per_rad", self.tilt_stiffness_nm_per_rad)?;
        let t_dec = pos_or("mount.dec_tilt_stiffness_nm_per_rad", self.dec_tilt_stiffness_nm_per_rad, t_ra)?;
        let h = |k: f64, e: f64| StiffnessModel::hysteretic(k, e);
        let series = |a: StiffnessModel, b: StiffnessModel| StiffnessModel::Series(vec![a, b]);
        self.translational(mount, payload, pivot, eta, out)?;
        let n = [
            pole[1] * dec[2] - pole[2] * dec[1],
            pole[2] * dec[0] - pole[0] * dec[2],
            pole[0] * dec[1] - pole[1] * dec[0],
        ];
        let about_pole = series(h(k_ra, eta_ra), h(t_dec, eta));
        let about_dec = series(h(k_dec, eta_dec), h(t_ra, eta));
        let about_n = series(h(t_ra, eta), h(t_dec, eta));
        out.torsion_springs.push(torsion("pivot_ra", mount, payload, pivot, pole, &about_pole));
        out.torsion_springs.push(torsion("pivot_dec", mount, payload, pivot, dec, &about_dec));
        out.torsion_springs.push(torsion("pivot_housing_tilt", mount, payload, pivot, n, &about_n));
        Ok(())
    }

    /// Pivot springs from the mount to the payload (alt-azimuth head).
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

//! The payload: optical tube, camera and counterweights as one rigid body named `payload`,
//! posed for the pointing of `[optics]` (altitude h, azimuth A; zenith when there are no
//! optics). On an equatorial mount the shaft is the declination axis (from the pivot towards
//! the tube) and e_u = e_s × â.
//!
//! Payload frame: â = (sin A cos h, cos A cos h, sin h) along the line of sight, the shaft
//! (altitude axis) e_s = (cos A, −sin A, 0), and e_u = (−sin A sin h, −cos A sin h, cos h). Parts
//! sit at `position_m` along â and `shaft_m` along e_s from the pivot; their inertia tensors are
//! combined by the parallel-axis theorem and rotated, J = R J_p Rᵀ with R = [â e_s e_u], so the
//! body carries the full tensor.

use super::fields::{fin_or, pos, pos_or, pos3};
use super::mass::{Mass, V3, add, combine, positive_definite, scale};
use super::wind::{CYLINDER_DRAG_COEFFICIENT, DISC_DRAG_COEFFICIENT, WindParts};
use crate::error::{Error, Result, require_non_negative};
use serde::{Deserialize, Serialize};

/// Kind of a payload part.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum PartKind {
    /// Hollow cylinder (optical tube): `length_m`, `diameter_m`, optional `inner_diameter_m`
    /// (default: thin-walled, inner = outer).
    #[default]
    Tube,
    /// Solid cylinder (camera body, counterweight): `length_m`, `diameter_m`.
    Cylinder,
    /// Point mass.
    Point,
}

/// The axis of a cylindrical part.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum PartAxis {
    /// Along the line of sight (tubes, cameras).
    #[default]
    LineOfSight,
    /// Along the altitude / declination shaft (counterweights).
    Shaft,
}

/// One part of a payload.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PartSpec {
    /// Free label (used in error messages).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub name: Option<String>,
    #[serde(default)]
    pub kind: PartKind,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub mass_kg: Option<f64>,
    /// Centre of the part along the line of sight from the pivot (m, + towards the sky).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub position_m: Option<f64>,
    /// Centre of the part along the shaft from the pivot (m).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub shaft_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub length_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub diameter_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub inner_diameter_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub axis: Option<PartAxis>,
    /// Drag coefficient of the side and the end disc (default 1.2 and 1.17; see `rig::wind`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub drag_coefficient: Option<f64>,
}

/// `[payload]`: optical tube, camera and counterweights as one rigid body.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PayloadSpec {
    /// Body name (default `payload`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub name: Option<String>,
    /// Direct form: total mass (kg) ...
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub mass_kg: Option<f64>,
    /// ... CG along the line of sight from the pivot (m, default 0) ...
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub cg_position_m: Option<f64>,
    /// ... CG along the shaft from the pivot (m, default 0) ...
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub cg_shaft_m: Option<f64>,
    /// ... and principal moments about the CG [about the line of sight, about the shaft,
    /// about the third axis e_u] (kg·m²).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub inertia_kgm2: Option<[f64; 3]>,
    /// Parts form (instead of the direct form).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub parts: Option<Vec<PartSpec>>,
}

/// Payload frame for a pointing: (line of sight â, shaft e_s, third axis e_u) in model axes.
pub fn payload_frame(altitude_deg: f64, azimuth_deg: f64) -> [V3; 3] {
    let (a, h) = (azimuth_deg.to_radians(), altitude_deg.to_radians());
    [
        [a.sin() * h.cos(), a.cos() * h.cos(), h.sin()],
        [a.cos(), -a.sin(), 0.0],
        [-a.sin() * h.sin(), -a.cos() * h.sin(), h.cos()],
    ]
}

impl PayloadSpec {
    /// Mass, CG (payload frame, from the pivot) and tensor about the CG (payload frame).
    fn local_mass(&self) -> Result<Mass> {
        let direct = self.mass_kg.is_some()
            || self.inertia_kgm2.is_some()
            || self.cg_position_m.is_some()
            || self.cg_shaft_m.is_some();
        match (&self.parts, direct) {
            (Some(_), true) => Err(Error::invalid(
                "payload",
                "give either mass_kg/cg_position_m/cg_shaft_m/inertia_kgm2 or parts, not both",
            )),
            (None, false) => Err(Error::invalid("payload.mass_kg", "is required (or give payload.parts)")),
            (None, true) => {
                let m = pos("payload.mass_kg", self.mass_kg)?;
                let c = [
                    fin_or("payload.cg_position_m", self.cg_position_m, 0.0)?,
                    fin_or("payload.cg_shaft_m", self.cg_shaft_m, 0.0)?,
                    0.0,
                ];
                let i = pos3("payload.inertia_kgm2", self.inertia_kgm2)?;
                Ok(Mass { m, c, j: [[i[0], 0.0, 0.0], [0.0, i[1], 0.0], [0.0, 0.0, i[2]]] })
            }
            (Some(parts), false) => {
                if parts.is_empty() {
                    return Err(Error::invalid("payload.parts", "is empty"));
                }
                let masses = parts
                    .iter()
                    .enumerate()
                    .map(|(k, p)| p.mass(&format!("payload.parts[{k}]")))
                    .collect::<Result<Vec<_>>>()?;
                Ok(combine(&masses))
            }
        }
    }

    /// The payload posed in a frame [â, e_s, e_u] (see [`payload_frame`]; for an equatorial
    /// mount e_s is the declination axis towards the tube), with its CG placed relative to the
    /// `pivot`.
    pub(super) fn posed(&self, pivot: V3, r: [V3; 3]) -> Result<Mass> {
        let local = self.local_mass()?;
        if !positive_definite(&local.j) {
            return Err(Error::invalid(
                "payload",
                "the inertia tensor is singular (e.g. only point masses on one line): add a part with extent",
            ));
        }
        // r[k] = k-th frame axis
        let c = add(pivot, (0..3).fold([0.0; 3], |acc, k| add(acc, scale(r[k], local.c[k]))));
        // J = R J_p Rᵀ with R's columns the frame axes: J_ab = Σ_kl r[k][a] Jp_kl r[l][b].
        let mut j = [[0.0; 3]; 3];
        for a in 0..3 {
            for b in 0..3 {
                for k in 0..3 {
                    for l in 0..3 {
                        j[a][b] += r[k][a] * local.j[k][l] * r[l][b];
                    }
                }
            }
        }
        Ok(Mass { m: local.m, c, j })
    }
}

impl PayloadSpec {
    /// The wind parts of the payload's cylinders (point parts take none) posed in the frame `r`
    /// about `pivot` on body `body`.
    pub(super) fn wind(&self, body: &str, pivot: V3, r: [V3; 3], w: &mut WindParts) -> Result<()> {
        let Some(parts) = &self.parts else {
            return Ok(());
        };
        for (k, p) in parts.iter().enumerate() {
            if p.kind == PartKind::Point {
                continue;
            }
            let field = format!("payload.parts[{k}].drag_coefficient");
            let c = add(
                pivot,
                add(scale(r[0], p.position_m.unwrap_or(0.0)), scale(r[1], p.shaft_m.unwrap_or(0.0))),
            );
            let axis = match p.axis.unwrap_or_default() {
                PartAxis::LineOfSight => r[0],
                PartAxis::Shaft => r[1],
            };
            let name = p.name.clone().unwrap_or_else(|| format!("payload part {k}"));
            let (d, l) = (p.diameter_m.unwrap_or(0.0), p.length_m.unwrap_or(0.0));
            let side = pos_or(&field, p.drag_coefficient, CYLINDER_DRAG_COEFFICIENT)?;
            let end = pos_or(&field, p.drag_coefficient, DISC_DRAG_COEFFICIENT)?;
            w.cylinder(&name, body, c, axis, d, l, side, Some(end));
        }
        Ok(())
    }
}

impl PartSpec {
    fn mass(&self, p: &str) -> Result<Mass> {
        let p = match &self.name {
            Some(n) => format!("{p} ('{n}')"),
            None => p.to_string(),
        };
        let m = pos(&format!("{p}.mass_kg"), self.mass_kg)?;
        let c = [
            fin_or(&format!("{p}.position_m"), self.position_m, 0.0)?,
            fin_or(&format!("{p}.shaft_m"), self.shaft_m, 0.0)?,
            0.0,
        ];
        if self.kind == PartKind::Point {
            for (k, v) in [
                ("length_m", self.length_m),
                ("diameter_m", self.diameter_m),
                ("inner_diameter_m", self.inner_diameter_m),
                ("drag_coefficient", self.drag_coefficient),
            ] {
                if v.is_some() {
                    return Err(Error::invalid(format!("{p}.{k}"), "a point mass has no size"));
                }
            }
            return Ok(Mass::point(m, c));
        }
        let l = pos(&format!("{p}.length_m"), self.length_m)?;
        let ro = pos(&format!("{p}.diameter_m"), self.diameter_m)? / 2.0;
        let ri = match (self.kind, self.inner_diameter_m) {
            (PartKind::Cylinder, Some(_)) => {
                return Err(Error::invalid(
                    format!("{p}.inner_diameter_m"),
                    "a solid cylinder has none (use kind = \"tube\")",
                ));
            }
            (PartKind::Cylinder, None) => 0.0,
            (_, None) => ro,
            (_, Some(d)) => {
                let ri = require_non_negative(|| format!("{p}.inner_diameter_m"), d)? / 2.0;
                if ri > ro {
                    return Err(Error::invalid(
                        format!("{p}.inner_diameter_m"),
                        format!("{d} m exceeds the diameter {} m", 2.0 * ro),
                    ));
                }
                ri
            }
        };
        // Hollow cylinder about its CG: axial m(R² + r²)/2, transverse m(3(R² + r²) + L²)/12
        // (standard rigid-body tables, e.g. Meriam & Kraige, Dynamics, appendix B).
        let s = ro * ro + ri * ri;
        let (ia, it) = (m * s / 2.0, m * (3.0 * s + l * l) / 12.0);
        let j = match self.axis.unwrap_or_default() {
            PartAxis::LineOfSight => [[ia, 0.0, 0.0], [0.0, it, 0.0], [0.0, 0.0, it]],
            PartAxis::Shaft => [[it, 0.0, 0.0], [0.0, ia, 0.0], [0.0, 0.0, it]],
        };
        Ok(Mass { m, c, j })
    }
}

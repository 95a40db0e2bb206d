//! Wind loads from the rig's parts: for the wind blowing from an azimuth, each payload part,
//! the mount head, the tripod legs and the pier column get a drag area, a drag coefficient, a
//! centre of pressure and a force direction (the generic layer's `[[wind.part]]` list).
//!
//! - A cylinder (tube, camera, counterweight, leg, column) at angle θ to the flow follows the
//!   cross-flow principle: only the velocity component across the axis loads it, so its side
//!   takes ½ ρ U² C_d D L sin²θ along that component (Hoerner, Fluid-Dynamic Drag, 1965, ch. 3;
//!   also DNV-RP-C205, 2010, §6.2). Payload cylinders also carry an end disc: ½ ρ U² C_d (π D²/4)
//!   cos²θ along the axis, at the upwind end.
//! - The mount head is a bluff box of `mount.wind_area_m2` (default: the square of the pivot
//!   height) along the wind.
//! - Members loaded along their length put half their force at each end: a leg (pinned at head
//!   and foot) at its end points; the pier column (clamped at both ends in the model) at L/6 in
//!   from each end, which adds the beam's consistent end moments ∓ w L²/12. Ends on the fixed
//!   ground carry nothing into the model.
//!
//! Drag coefficients (all from memory of Hoerner 1965: verify): circular cylinder across the
//! flow at subcritical Reynolds number 1.2 (a 0.3 m tube in 4 m/s has Re ≈ 8·10⁴), flat disc
//! face-on 1.17, cube face-on 1.05, square bar face-on 2.0. A part's `drag_coefficient`
//! overrides its side and end values.

use super::mass::{V3, add, scale};
use crate::assembly::{GROUND, WindLoadSpec, WindPartSpec};
use crate::error::{Result, require_finite};
use crate::section::Section;
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// Circular cylinder across the flow, subcritical (Hoerner 1965, from memory).
pub const CYLINDER_DRAG_COEFFICIENT: f64 = 1.2;
/// Flat disc face-on (Hoerner 1965, from memory).
pub const DISC_DRAG_COEFFICIENT: f64 = 1.17;
/// Cube face-on (Hoerner 1965, from memory).
pub const BOX_DRAG_COEFFICIENT: f64 = 1.05;
/// Square or rectangular bar face-on (Hoerner 1965, from memory).
pub const BAR_DRAG_COEFFICIENT: f64 = 2.0;
/// Default wind: from the west (the prevailing direction at mid-latitudes; a placeholder, set
/// yours).
pub const DEFAULT_WIND_FROM_AZIMUTH_DEG: f64 = 270.0;

/// `[wind_load]`: how the rig layer derives the wind load from its parts.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct WindLoadRigSpec {
    /// The azimuth the wind blows from (deg from north through east, as forecasts give it;
    /// default [`DEFAULT_WIND_FROM_AZIMUTH_DEG`]).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub from_azimuth_deg: Option<f64>,
    /// Derive the wind load from the parts (default true); false leaves the model without wind.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub derive: Option<bool>,
}

impl WindLoadRigSpec {
    /// The azimuth the wind blows from, validated.
    pub fn from_azimuth(&self) -> Result<f64> {
        let a = self.from_azimuth_deg.unwrap_or(DEFAULT_WIND_FROM_AZIMUTH_DEG);
        require_finite("wind_load.from_azimuth_deg", a)
    }
}

/// Unit vector the wind blows towards, for a wind from `from_azimuth_deg` (x east, y north).
pub fn wind_toward(from_azimuth_deg: f64) -> V3 {
    let a = from_azimuth_deg.to_radians();
    [-a.sin(), -a.cos(), 0.0]
}

/// Breadth across the flow and drag coefficient of a member's section.
pub(super) fn section_drag(s: &Section) -> (f64, f64) {
    match s {
        Section::Tube { outer_diameter_m, .. } => (*outer_diameter_m, CYLINDER_DRAG_COEFFICIENT),
        Section::Rod { diameter_m } => (*diameter_m, CYLINDER_DRAG_COEFFICIENT),
        Section::Rectangle { width_m, depth_m } => (width_m.max(*depth_m), BAR_DRAG_COEFFICIENT),
    }
}

fn dot(a: V3, b: V3) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}

/// The parts being collected for one wind direction.
pub(super) struct WindParts {
    toward: V3,
    from_azimuth_deg: f64,
    parts: Vec<WindPartSpec>,
}

/// One end of a member loaded along its length: the carrier and the end point.
pub(super) struct End<'a> {
    pub(super) carrier: &'a str,
    pub(super) at: V3,
}

impl WindParts {
    pub(super) fn new(spec: Option<&WindLoadRigSpec>) -> Result<Option<WindParts>> {
        let spec = spec.cloned().unwrap_or_default();
        if spec.derive == Some(false) {
            return Ok(None);
        }
        let az = spec.from_azimuth()?;
        Ok(Some(WindParts { toward: wind_toward(az), from_azimuth_deg: az, parts: Vec::new() }))
    }

    fn push(&mut self, name: String, body: &str, at: V3, direction: V3, area_m2: f64, cd: f64) {
        if body != GROUND && area_m2 > 1e-12 * (1.0 + area_m2) {
            self.parts.push(WindPartSpec {
                name,
                body: body.into(),
                centre_of_pressure_m: at,
                direction,
                area_m2,
                drag_coefficient: cd,
            });
        }
    }

    /// The wind against a unit `axis`: cos θ = û·â, and the flow's component across the axis as
    /// a unit vector with its length sin θ (None when the wind runs along the axis).
    fn cross_flow(&self, axis: V3) -> (f64, Option<(V3, f64)>) {
        let cos = dot(self.toward, axis);
        let across = add(self.toward, scale(axis, -cos));
        let sin = dot(across, across).sqrt();
        (cos, (sin > 1e-9).then(|| (scale(across, 1.0 / sin), sin)))
    }

    /// A cylinder of diameter `d` and length `l` centred at `c` with unit `axis`: its side by
    /// the cross-flow principle, and (with `end_cd`) an end disc at the upwind end.
    #[allow(clippy::too_many_arguments)]
    pub(super) fn cylinder(
        &mut self,
        name: &str,
        body: &str,
        c: V3,
        axis: V3,
        d: f64,
        l: f64,
        side_cd: f64,
        end_cd: Option<f64>,
    ) {
        let u = self.toward;
        let cos = dot(u, axis);
        let across = add(u, scale(axis, -cos));
        let sin = dot(across, across).sqrt();
        if sin > 1e-9 {
            self.push(
                format!("{name} (side)"),
                body,
                c,
                scale(across, 1.0 / sin),
                d * l * sin * sin,
                side_cd,
            );
        }
        if let Some(cd) = end_cd
            && cos.abs() > 1e-9
        {
            let s = cos.signum();
            let upwind = add(c, scale(axis, -s * l / 2.0));
            self.push(
                format!("{name} (end)"),
                body,
                upwind,
                scale(axis, s),
                PI / 4.0 * d * d * cos * cos,
                cd,
            );
        }
    }

    /// A bluff body of projected area `area` at `c`, pushed along the wind.
    pub(super) fn bluff(&mut self, name: &str, body: &str, c: V3, area: f64, cd: f64) {
        let u = self.toward;
        self.push(name.to_string(), body, c, u, area, cd);
    }

    /// A member of breadth `d` from `a` to `b`, loaded along its length by the cross-flow
    /// principle; half the force goes to each end, at `inset` × length in from the end (0 for a
    /// pinned member, 1/6 for one clamped at both ends: the consistent end moments).
    pub(super) fn member(&mut self, name: &str, a: End, b: End, d: f64, cd: f64, inset: f64) {
        let span = add(b.at, scale(a.at, -1.0));
        let l = dot(span, span).sqrt();
        if l <= 0.0 {
            return;
        }
        let Some((dir, sin)) = self.cross_flow(scale(span, 1.0 / l)).1 else {
            return;
        };
        let half = d * l * sin * sin / 2.0;
        let pa = add(a.at, scale(span, inset));
        let pb = add(b.at, scale(span, -inset));
        self.push(format!("{name} (upper end)"), a.carrier, pa, dir, half, cd);
        self.push(format!("{name} (lower end)"), b.carrier, pb, dir, half, cd);
    }

    /// The generic-layer wind load, or None when no part takes wind.
    pub(super) fn finish(self) -> Option<WindLoadSpec> {
        (!self.parts.is_empty()).then(|| WindLoadSpec {
            from_azimuth_deg: Some(self.from_azimuth_deg),
            parts: self.parts,
            ..Default::default()
        })
    }
}

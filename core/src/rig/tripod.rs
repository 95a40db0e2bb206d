//! The tripod and the pads under its feet.
//!
//! Legs run from the mount body's head ring to foot nodes `foot1..footN` (3 DOF, lower half of
//! the leg mass) as axial springs EA/L (optionally in series with a joint spring), or as
//! Euler–Bernoulli beams clamped to the mount and to small foot bodies (pinned feet).
//!
//! Under each foot a vertical and two horizontal springs go to the ground (or the floor): pad
//! alone, soil alone, or pad and soil in series through the `series` combinator (the pad's mass
//! is neglected, so no extra node is needed). A point foot carries no moment, so rocking and
//! torsion of the contact do not apply to feet. Rigid ground without pads fixes the feet (the
//! legs end on the ground).

use super::RigSpec;
use super::elements::{EX, EY, EZ, axial};
use super::fields::{fin_or, material_of, nonneg_or, pos, pos_or};
use super::ground::Support;
use super::mass::{Mass, V3, add, scale};
use super::wind::{End, WindParts, section_drag};
use crate::assembly::{BeamSpec, BodySpec, Dof, GROUND, ModelSpec, NodeSpec, SpringSpec, StiffnessSpec};
use crate::error::{Error, Result, require_finite, require_positive};
use crate::material::Material;
use crate::section::Section;
use crate::stiffness::StiffnessModel;
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// `[tripod]`: legs from the mount's head ring to the feet.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct TripodSpec {
    /// Number of legs (default 3).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub legs: Option<usize>,
    /// Radius of the circle of leg hinges at the head (m).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub head_radius_m: Option<f64>,
    /// Give exactly two of leg_length_m, height_m (head hinges above the support), splay_deg
    /// (angle of a leg from the vertical) and foot_radius_m (circle of the feet).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub leg_length_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub height_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub splay_deg: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub foot_radius_m: Option<f64>,
    /// Azimuth of leg 1 (deg from north through east, default 0).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub first_leg_azimuth_deg: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub leg_section: Option<Section>,
    /// Material preset name ...
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub leg_material: Option<String>,
    /// ... or explicit properties.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub leg_material_properties: Option<Material>,
    /// Mass of one leg incl. fittings (kg, default ρ·A·L).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub leg_mass_kg: Option<f64>,
    /// Loss factor added to the material's (clamps, friction; default 0).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub leg_added_loss_factor: Option<f64>,
    /// Axial stiffness of a leg's hinge and clamps, in series with EA/L (N/m; default none).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub joint_stiffness_n_per_m: Option<f64>,
    /// Tangential stiffness of one leg at its foot (N/m; default 3EI/L³: a leg clamped in its
    /// hinge against sideways bending and pinned at the foot). Axial-spring legs only.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub leg_lateral_stiffness_n_per_m: Option<f64>,
    /// Loss factor of that joint spring (default 0).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub joint_loss_factor: Option<f64>,
    /// Head plate mass lumped into the mount body at the head centre (kg, default 0).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub head_mass_kg: Option<f64>,
    /// Extra mass at each foot (spike, shoe; kg, default 0).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub foot_mass_kg: Option<f64>,
    /// Legs as Euler–Bernoulli beams instead of axial springs (default false).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub legs_as_beams: Option<bool>,
    /// Elements per beam leg (default 4).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub beam_elements: Option<usize>,
    /// Axial stiffness of a spreader tie between neighbouring feet (N/m; default none).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub spreader_stiffness_n_per_m: Option<f64>,
    /// What the tripod stands on (default ground).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub on: Option<Support>,
    /// Foot and surface for the sliding check, a name from
    /// [`crate::statics::FOOT_FRICTION_PRESETS`] (default [`crate::statics::DEFAULT_FOOT_SURFACE`]).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub foot_surface: Option<String>,
}

/// `[pads]`: an isolation pad under each tripod foot.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PadSpec {
    /// Vertical stiffness of one pad (any stiffness form, N/m).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub compression: Option<StiffnessSpec>,
    /// Horizontal stiffness of one pad, each direction (N/m).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub shear: Option<StiffnessSpec>,
}

// ---------------------------------------------------------------------------------------------
// Geometry

/// Resolved tripod geometry.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TripodGeometry {
    pub leg_length_m: f64,
    pub height_m: f64,
    pub splay_rad: f64,
    pub head_radius_m: f64,
    pub foot_radius_m: f64,
}

impl TripodSpec {
    /// Leg length, height and splay from exactly two of the four geometry keys.
    pub fn geometry(&self) -> Result<TripodGeometry> {
        let rh = pos("tripod.head_radius_m", self.head_radius_m)?;
        let given = [self.leg_length_m, self.height_m, self.splay_deg, self.foot_radius_m];
        let count = given.iter().filter(|v| v.is_some()).count();
        if count != 2 {
            return Err(Error::invalid(
                "tripod.leg_length_m",
                format!(
                    "give exactly two of leg_length_m, height_m, splay_deg, foot_radius_m; found {count}"
                ),
            ));
        }
        let l = self.leg_length_m.map(|v| require_positive("tripod.leg_length_m", v)).transpose()?;
        let h = self.height_m.map(|v| require_positive("tripod.height_m", v)).transpose()?;
        let th = match self.splay_deg {
            Some(d) => {
                require_finite("tripod.splay_deg", d)?;
                if !(0.0..80.0).contains(&d) {
                    return Err(Error::invalid("tripod.splay_deg", format!("must lie in [0, 80), got {d}")));
                }
                Some(d.to_radians())
            }
            None => None,
        };
        let dr = match self.foot_radius_m {
            Some(rf) => {
                require_positive("tripod.foot_radius_m", rf)?;
                if rf < rh {
                    return Err(Error::invalid(
                        "tripod.foot_radius_m",
                        format!("{rf} m is smaller than head_radius_m = {rh} m"),
                    ));
                }
                Some(rf - rh)
            }
            None => None,
        };
        let (l, h, th) = match (l, h, th, dr) {
            (Some(l), Some(h), None, None) => {
                if h > l {
                    return Err(Error::invalid(
                        "tripod.height_m",
                        format!("{h} m exceeds leg_length_m = {l} m"),
                    ));
                }
                (l, h, (h / l).acos())
            }
            (Some(l), None, Some(th), None) => (l, l * th.cos(), th),
            (Some(l), None, None, Some(dr)) => {
                if dr >= l {
                    return Err(Error::invalid(
                        "tripod.foot_radius_m",
                        format!(
                            "foot_radius_m − head_radius_m = {dr} m is not less than leg_length_m = {l} m"
                        ),
                    ));
                }
                (l, (l * l - dr * dr).sqrt(), (dr / l).asin())
            }
            (None, Some(h), Some(th), None) => (h / th.cos(), h, th),
            (None, Some(h), None, Some(dr)) => ((h * h + dr * dr).sqrt(), h, dr.atan2(h)),
            (None, None, Some(th), Some(dr)) => {
                if th <= 0.0 {
                    return Err(Error::invalid(
                        "tripod.splay_deg",
                        "must be > 0 when given with foot_radius_m",
                    ));
                }
                (dr / th.sin(), dr / th.tan(), th)
            }
            _ => return Err(Error::invalid("tripod", "inconsistent geometry keys")),
        };
        Ok(TripodGeometry {
            leg_length_m: l,
            height_m: h,
            splay_rad: th,
            head_radius_m: rh,
            foot_radius_m: rh + l * th.sin(),
        })
    }
}

// ---------------------------------------------------------------------------------------------
// Foot contacts

/// Contacts under the feet, resolved from `[pads]` and `[ground]` for one support.
pub(super) enum FootContact {
    /// The legs end on the support carrier itself (rigid, no pads).
    Fixed,
    /// Vertical and horizontal springs from each foot to the support carrier.
    Springs { vertical: StiffnessModel, horizontal: StiffnessModel },
}

/// The contacts under the feet on `support`: pads, soil, both in series, or none.
pub(super) fn foot_contact(rig: &RigSpec, support: &str) -> Result<FootContact> {
    let pads = match &rig.pads {
        Some(p) => {
            let c =
                p.compression.as_ref().ok_or_else(|| Error::invalid("pads.compression", "is required"))?;
            let s = p.shear.as_ref().ok_or_else(|| Error::invalid("pads.shear", "is required"))?;
            Some((c.to_model("pads.compression", false)?, s.to_model("pads.shear", false)?))
        }
        None => None,
    };
    let soil = if support == GROUND {
        match rig.soil()? {
            Some((s, rad)) => {
                let r = pos("ground.contact_radius_m", rig.ground()?.contact_radius_m)?;
                let [v, h, _, _] = s.contact_models(r, rad, 0.0)?;
                Some((v, h))
            }
            None => None,
        }
    } else {
        None
    };
    Ok(match (pads, soil) {
        (None, None) => FootContact::Fixed,
        (Some((v, h)), None) | (None, Some((v, h))) => FootContact::Springs { vertical: v, horizontal: h },
        (Some((pv, ph)), Some((sv, sh))) => FootContact::Springs {
            vertical: StiffnessModel::Series(vec![pv, sv]),
            horizontal: StiffnessModel::Series(vec![ph, sh]),
        },
    })
}

// ---------------------------------------------------------------------------------------------
// Legs, feet and spreaders

/// A validated tripod ready to be written out.
pub(super) struct TripodPlan {
    n: usize,
    heads: Vec<V3>,
    feet: Vec<V3>,
    leg_mass: f64,
    head_mass: f64,
    foot_mass: f64,
    top_z: f64,
    material: Material,
    section: Section,
    added_loss: f64,
    joint: Option<(f64, f64)>,
    lateral: f64,
    tangents: Vec<V3>,
    beams: Option<usize>,
    spreader: Option<f64>,
    leg_len: f64,
}

impl TripodPlan {
    pub(super) fn new(t: &TripodSpec, g: TripodGeometry, support_z: f64, top_z: f64) -> Result<TripodPlan> {
        let n = t.legs.unwrap_or(3);
        if !(3..=12).contains(&n) {
            return Err(Error::invalid("tripod.legs", format!("must lie in 3..=12, got {n}")));
        }
        let section =
            t.leg_section.clone().ok_or_else(|| Error::invalid("tripod.leg_section", "is required"))?;
        section.validate("tripod.leg_section")?;
        let material = material_of("tripod.leg_material", &t.leg_material, &t.leg_material_properties)?;
        let phi0 = fin_or("tripod.first_leg_azimuth_deg", t.first_leg_azimuth_deg, 0.0)?;
        let (mut heads, mut feet, mut tangents) = (Vec::new(), Vec::new(), Vec::new());
        for i in 0..n {
            let phi = (phi0 + 360.0 * i as f64 / n as f64).to_radians();
            let d = [phi.sin(), phi.cos(), 0.0];
            tangents.push([phi.cos(), -phi.sin(), 0.0]);
            heads.push(add(scale(d, g.head_radius_m), [0.0, 0.0, top_z]));
            feet.push(add(scale(d, g.foot_radius_m), [0.0, 0.0, support_z]));
        }
        let leg_mass = pos_or(
            "tripod.leg_mass_kg",
            t.leg_mass_kg,
            material.density_kg_m3 * section.area_m2() * g.leg_length_m,
        )?;
        let beams = match (t.legs_as_beams.unwrap_or(false), t.beam_elements) {
            (true, e) => {
                let e = e.unwrap_or(4);
                if !(1..=50).contains(&e) {
                    return Err(Error::invalid(
                        "tripod.beam_elements",
                        format!("must lie in 1..=50, got {e}"),
                    ));
                }
                if t.joint_stiffness_n_per_m.is_some() {
                    return Err(Error::invalid(
                        "tripod.joint_stiffness_n_per_m",
                        "applies to axial-spring legs, not legs_as_beams",
                    ));
                }
                if t.leg_lateral_stiffness_n_per_m.is_some() {
                    return Err(Error::invalid(
                        "tripod.leg_lateral_stiffness_n_per_m",
                        "applies to axial-spring legs; beam legs bend by themselves",
                    ));
                }
                if t.leg_mass_kg.is_some() {
                    return Err(Error::invalid(
                        "tripod.leg_mass_kg",
                        "beam legs take their mass from section and material (use leg_material_properties)",
                    ));
                }
                Some(e)
            }
            (false, Some(_)) => {
                return Err(Error::invalid("tripod.beam_elements", "needs legs_as_beams = true"));
            }
            (false, None) => None,
        };
        let joint = match t.joint_stiffness_n_per_m {
            Some(k) => Some((
                require_positive("tripod.joint_stiffness_n_per_m", k)?,
                nonneg_or("tripod.joint_loss_factor", t.joint_loss_factor, 0.0)?,
            )),
            None => {
                if t.joint_loss_factor.is_some() {
                    return Err(Error::invalid("tripod.joint_loss_factor", "needs joint_stiffness_n_per_m"));
                }
                None
            }
        };
        // Cantilever tip stiffness 3EI/L³ (Roark's Formulas for Stress and Strain, cantilever
        // with an end load).
        let lateral = pos_or(
            "tripod.leg_lateral_stiffness_n_per_m",
            t.leg_lateral_stiffness_n_per_m,
            3.0 * material.youngs_modulus_pa * section.min_second_moment_m4() / g.leg_length_m.powi(3),
        )?;
        Ok(TripodPlan {
            n,
            lateral,
            tangents,
            heads,
            feet,
            leg_mass,
            head_mass: nonneg_or("tripod.head_mass_kg", t.head_mass_kg, 0.0)?,
            foot_mass: nonneg_or("tripod.foot_mass_kg", t.foot_mass_kg, 0.0)?,
            top_z,
            material,
            section,
            added_loss: nonneg_or("tripod.leg_added_loss_factor", t.leg_added_loss_factor, 0.0)?,
            joint,
            beams,
            spreader: t
                .spreader_stiffness_n_per_m
                .map(|k| require_positive("tripod.spreader_stiffness_n_per_m", k))
                .transpose()?,
            leg_len: g.leg_length_m,
        })
    }

    /// Masses lumped into the mount body: head plate, and the upper half of each spring leg.
    pub(super) fn head_masses(&self) -> Vec<Mass> {
        let mut v = Vec::new();
        if self.head_mass > 0.0 {
            v.push(Mass::point(self.head_mass, [0.0, 0.0, self.top_z]));
        }
        if self.beams.is_none() {
            v.extend(self.heads.iter().map(|h| Mass::point(self.leg_mass / 2.0, *h)));
        }
        v
    }

    /// The axial model of one leg: EA/L with the material's loss (plus added), in series with
    /// the joint spring when given.
    fn leg_model(&self) -> StiffnessModel {
        let k = self.material.youngs_modulus_pa * self.section.area_m2() / self.leg_len;
        let leg = StiffnessModel::hysteretic(k, self.material.loss_factor + self.added_loss);
        match self.joint {
            Some((kj, eta)) => StiffnessModel::Series(vec![leg, StiffnessModel::hysteretic(kj, eta)]),
            None => leg,
        }
    }

    /// The legs' wind parts: each leg pinned at the head (on `mount`) and the foot.
    pub(super) fn wind(&self, mount: &str, support: &str, contact: &FootContact, w: &mut WindParts) {
        let fixed = matches!(contact, FootContact::Fixed);
        let (d, cd) = section_drag(&self.section);
        for i in 0..self.n {
            let foot = if fixed { support.to_string() } else { format!("foot{}", i + 1) };
            w.member(
                &format!("leg {}", i + 1),
                End { carrier: mount, at: self.heads[i] },
                End { carrier: &foot, at: self.feet[i] },
                d,
                cd,
                0.0,
            );
        }
    }

    pub(super) fn build(
        self,
        mount: &str,
        support: &str,
        contact: FootContact,
        out: &mut ModelSpec,
    ) -> Result<()> {
        let fixed = matches!(contact, FootContact::Fixed);
        // Foot carriers.
        let foot_names: Vec<String> = (1..=self.n).map(|i| format!("foot{i}")).collect();
        for (name, f) in foot_names.iter().zip(&self.feet) {
            if fixed {
                continue;
            }
            match self.beams {
                None => out.nodes.push(NodeSpec {
                    name: name.clone(),
                    mass_kg: self.leg_mass / 2.0 + self.foot_mass,
                    at_m: *f,
                    dofs: vec![Dof::X, Dof::Y, Dof::Z],
                }),
                Some(_) => {
                    // A small body so the beam leg is clamped to something that can turn: a
                    // pinned foot. Its own mass is the foot mass plus 0.1 % of the leg (the beam's
                    // consistent mass carries the leg), its inertia that of a sphere of the leg's
                    // radius (numerical choices; negligible against the leg).
                    let m = self.foot_mass + 1e-3 * self.leg_mass;
                    let r2 = self.section.area_m2() / PI;
                    let j = 0.4 * m * r2;
                    out.bodies.push(BodySpec {
                        name: name.clone(),
                        mass_kg: m,
                        cg_m: *f,
                        inertia_kgm2: [j, j, j],
                        products_kgm2: [0.0; 3],
                        dofs: Dof::ALL.to_vec(),
                    });
                }
            }
        }
        // Legs.
        let leg = self.leg_model();
        for i in 0..self.n {
            let to = if fixed { support.to_string() } else { foot_names[i].clone() };
            let name = format!("leg{}", i + 1);
            match self.beams {
                None => out.springs.push(
                    SpringSpec {
                        name,
                        from: mount.into(),
                        to,
                        from_at_m: Some(self.heads[i]),
                        to_at_m: Some(self.feet[i]),
                        ..Default::default()
                    }
                    .with_model(&leg, false),
                ),
                Some(e) => out.beams.push(BeamSpec {
                    name,
                    from: mount.into(),
                    to,
                    from_at_m: self.heads[i],
                    to_at_m: self.feet[i],
                    section: self.section.clone(),
                    material: None,
                    material_properties: Some(self.material.clone()),
                    elements: e,
                    added_mass_kg_per_m: 0.0,
                    added_loss_factor: self.added_loss,
                    orientation: None,
                }),
            }
        }
        // Sideways bending of hinged spring legs: the foot against the point of the head body
        // at the foot's place (the leg turning with the head), along the leg's tangent.
        if self.beams.is_none() {
            let m = StiffnessModel::hysteretic(self.lateral, self.material.loss_factor + self.added_loss);
            for i in 0..self.n {
                let to = if fixed { support.to_string() } else { foot_names[i].clone() };
                out.springs.push(axial(
                    &format!("leg{}_lateral", i + 1),
                    mount,
                    &to,
                    self.feet[i],
                    self.tangents[i],
                    &m,
                ));
            }
        }
        // Foot contacts.
        if let FootContact::Springs { vertical, horizontal } = &contact {
            for (name, f) in foot_names.iter().zip(&self.feet) {
                out.springs.push(axial(&format!("{name}_x"), support, name, *f, EX, horizontal));
                out.springs.push(axial(&format!("{name}_y"), support, name, *f, EY, horizontal));
                out.springs.push(axial(&format!("{name}_z"), support, name, *f, EZ, vertical));
            }
        }
        // Spreader ties between neighbouring feet.
        if let Some(k) = self.spreader {
            if fixed {
                return Err(Error::invalid(
                    "tripod.spreader_stiffness_n_per_m",
                    "the feet are fixed (rigid support, no pads): a spreader has no effect",
                ));
            }
            let m = StiffnessModel::hysteretic(k, self.material.loss_factor);
            for i in 0..self.n {
                let j = (i + 1) % self.n;
                out.springs.push(
                    SpringSpec {
                        name: format!("spreader{}", i + 1),
                        from: foot_names[i].clone(),
                        to: foot_names[j].clone(),
                        from_at_m: Some(self.feet[i]),
                        to_at_m: Some(self.feet[j]),
                        ..Default::default()
                    }
                    .with_model(&m, false),
                );
            }
        }
        Ok(())
    }
}

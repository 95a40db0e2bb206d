//! Rig builders: payload, mount head, tripod, pads, ground, pier, floor → generic model.
//!
//! A rig file names hardware (`[payload]`, `[mount]`, `[tripod]`, `[pads]`, `[ground]`,
//! `[pier]`, `[floor]`); [`RigSpec::expand`] turns it into the generic layer
//! ([`ModelSpec`]: bodies, nodes, springs, beams) that [`crate::model::Model::from_spec`]
//! assembles. `stillsky::io::spec_to_toml(&spec)` prints the expansion, so every number the
//! builders choose can be read and edited. Keys, units and defaults: docs/model-file.md.
//!
//! Geometry (x east, y north, z up, m). z = 0 is the surface the rig stands on: the soil or
//! paver surface, or the base of a pier footing. The rig's vertical axis is the z axis.
//!
//! - Payload: one rigid body named `payload`, posed for the pointing of `[optics]` (altitude h,
//!   azimuth A; zenith when there are no optics). Payload frame: â = (sin A cos h, cos A cos h,
//!   sin h) along the line of sight, the shaft (altitude axis) e_s = (cos A, −sin A, 0), and
//!   e_u = (−sin A sin h, −cos A sin h, cos h). Parts sit at `position_m` along â and `shaft_m`
//!   along e_s from the pivot; their inertia tensors are combined by the parallel-axis theorem
//!   and rotated, J = R J_p Rᵀ with R = [â e_s e_u], so the body carries the full tensor.
//! - Mount: a rigid body named `mount` (with the tripod's head plate and the upper half of the
//!   leg masses lumped in) whose base sits on the tripod head or pier top; the payload joins it
//!   at the pivot (`pivot_height_m` above the base) through three stiff translational springs
//!   and three torsion springs: about the altitude axis e_s, the horizontal axis ⟂ e_s (tilt)
//!   and the vertical (yaw). The geometry is that of an alt-azimuth mount; an equatorial mount
//!   is described by its stiffnesses about these same axes.
//! - Tripod: legs from the mount body's head ring to foot nodes `foot1..footN` (3 DOF, lower
//!   half of the leg mass) as axial springs EA/L (optionally in series with a joint spring), or
//!   as Euler–Bernoulli beams clamped to the mount and to small foot bodies (pinned feet).
//! - Pads and ground: under each foot a vertical and two horizontal springs to the ground (or
//!   the floor): pad alone, soil alone, or pad and soil in series through the `series`
//!   combinator (the pad's mass is neglected, so no extra node is needed). A point foot carries
//!   no moment, so rocking and torsion of the contact do not apply to feet. Rigid ground
//!   without pads fixes the feet (the legs end on the ground).
//! - Pier: a beam (section, material, added fill mass and loss) from a rigid footing block on
//!   the half-space springs of [`crate::soil`] (all four: vertical, horizontal, rocking,
//!   torsion), or clamped to rigid ground or to the floor.
//! - Floor: a rigid deck body `floor` on springs to the ground, that the tripod or pier may
//!   stand on (`on = "floor"`), or that is merely nearby (a pier through a hole in the deck),
//!   optionally bridged to the pier footing by the stiffness of a gap filler.

use crate::assembly::{
    BeamSpec, BodySpec, Dof, GROUND, ModelSpec, NodeSpec, OpticsSpec, SpringSpec, StiffnessSpec,
};
use crate::error::{Error, Result, require_finite, require_non_negative, require_positive};
use crate::material::Material;
use crate::section::Section;
use crate::soil::Soil;
use crate::stiffness::StiffnessModel;
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

type V3 = [f64; 3];
type M3 = [[f64; 3]; 3];

/// Default stiffness of the translational springs at the pivot (N/m): a quasi-rigid joint that
/// keeps translation modes of the payload far above the tilt modes (a numerical choice, common
/// practice, no source).
pub const DEFAULT_PIVOT_TRANSLATIONAL_STIFFNESS_N_PER_M: f64 = 1.0e8;

/// Default footing density (kg/m³): plain concrete, inside the 2300–2400 range of the reference
/// docs/references.md#s8-4.
pub const DEFAULT_FOOTING_DENSITY_KG_M3: f64 = 2400.0;

// ---------------------------------------------------------------------------------------------
// Section types

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

/// What a tripod or pier stands on.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Support {
    /// The `[ground]` (soil or rigid).
    #[default]
    Ground,
    /// The `[floor]` deck body.
    Floor,
}

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

/// Ground model.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum GroundKind {
    /// Elastic half-space under each contact.
    #[default]
    Soil,
    /// Rigid (paver, slab): contacts move with the ground motion.
    Rigid,
}

/// `[ground]`: what is under the feet or footing.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct GroundSpec {
    /// `soil` (default) or `rigid`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub kind: Option<GroundKind>,
    /// Soil preset name (see [`crate::soil::SOIL_PRESETS`]) ...
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub soil: Option<String>,
    /// ... or explicit half-space properties.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub soil_properties: Option<Soil>,
    /// Contact radius of each tripod foot on the soil (m).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub contact_radius_m: Option<f64>,
    /// Radiation dashpots (default false: they are large for light contacts, an upper bound).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub radiation_damping: Option<bool>,
}

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
}

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
    /// Each horizontal direction (N/m). Without it the deck's x, y (and rz without torsion)
    /// are held fixed in space: they then do not follow ground_x / ground_y.
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

/// The rig layer of a model file.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RigSpec {
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub payload: Option<PayloadSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub mount: Option<MountSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub tripod: Option<TripodSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub pads: Option<PadSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub ground: Option<GroundSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub pier: Option<PierSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub floor: Option<FloorSpec>,
}

// ---------------------------------------------------------------------------------------------
// Small helpers

fn req(name: &str, v: Option<f64>) -> Result<f64> {
    let v = v.ok_or_else(|| Error::invalid(name, "is required"))?;
    require_finite(name, v)
}
fn pos(name: &str, v: Option<f64>) -> Result<f64> {
    require_positive(name, req(name, v)?)
}
fn pos_or(name: &str, v: Option<f64>, default: f64) -> Result<f64> {
    v.map_or(Ok(default), |x| require_positive(name, x))
}
fn nonneg_or(name: &str, v: Option<f64>, default: f64) -> Result<f64> {
    v.map_or(Ok(default), |x| require_non_negative(name, x))
}
fn fin_or(name: &str, v: Option<f64>, default: f64) -> Result<f64> {
    v.map_or(Ok(default), |x| require_finite(name, x))
}
fn pos3(name: &str, v: Option<[f64; 3]>) -> Result<[f64; 3]> {
    let v = v.ok_or_else(|| Error::invalid(name, "is required"))?;
    for (i, x) in v.iter().enumerate() {
        require_positive(|| format!("{name}[{i}]"), *x)?;
    }
    Ok(v)
}
fn body_name(field: &str, v: &Option<String>, default: &str) -> Result<String> {
    match v {
        None => Ok(default.to_string()),
        Some(n) if n.is_empty() || n == GROUND || n.contains(':') || n.contains('#') => Err(Error::invalid(
            field,
            format!("'{n}' is not allowed (empty, 'ground', or containing ':' or '#')"),
        )),
        Some(n) => Ok(n.clone()),
    }
}

fn add(a: V3, b: V3) -> V3 {
    [a[0] + b[0], a[1] + b[1], a[2] + b[2]]
}
fn scale(a: V3, s: f64) -> V3 {
    [a[0] * s, a[1] * s, a[2] * s]
}

/// A mass with its CG and inertia tensor about that CG.
#[derive(Debug, Clone, Copy)]
struct Mass {
    m: f64,
    c: V3,
    j: M3,
}

impl Mass {
    fn point(m: f64, c: V3) -> Mass {
        Mass { m, c, j: [[0.0; 3]; 3] }
    }
}

/// Total mass, CG and inertia tensor about the common CG (parallel-axis theorem:
/// J = Σ [J_i + m_i (|d_i|² 1 − d_i d_iᵀ)], d_i = c_i − c).
fn combine(parts: &[Mass]) -> Mass {
    let m: f64 = parts.iter().map(|p| p.m).sum();
    let c = scale(parts.iter().fold([0.0; 3], |acc, p| add(acc, scale(p.c, p.m))), 1.0 / m);
    let mut j = [[0.0; 3]; 3];
    for p in parts {
        let d = [p.c[0] - c[0], p.c[1] - c[1], p.c[2] - c[2]];
        let d2 = d[0] * d[0] + d[1] * d[1] + d[2] * d[2];
        for a in 0..3 {
            for b in 0..3 {
                let delta = if a == b { 1.0 } else { 0.0 };
                j[a][b] += p.j[a][b] + p.m * (d2 * delta - d[a] * d[b]);
            }
        }
    }
    Mass { m, c, j }
}

/// Positive definite by Sylvester's criterion (leading minors > 0).
fn positive_definite(j: &M3) -> bool {
    let m1 = j[0][0];
    let m2 = j[0][0] * j[1][1] - j[0][1] * j[1][0];
    let m3 = j[0][0] * (j[1][1] * j[2][2] - j[1][2] * j[2][1])
        - j[0][1] * (j[1][0] * j[2][2] - j[1][2] * j[2][0])
        + j[0][2] * (j[1][0] * j[2][1] - j[1][1] * j[2][0]);
    let s = m1.abs().max(1e-300);
    m1 > 0.0 && m2 > 1e-12 * s * s && m3 > 1e-12 * s * s * s
}

fn to_body(name: &str, mass: &Mass) -> BodySpec {
    let j = mass.j;
    BodySpec {
        name: name.to_string(),
        mass_kg: mass.m,
        cg_m: mass.c,
        inertia_kgm2: [j[0][0], j[1][1], j[2][2]],
        products_kgm2: [j[0][1], j[0][2], j[1][2]],
        dofs: Dof::ALL.to_vec(),
    }
}

fn axial(name: &str, from: &str, to: &str, at: V3, dir: V3, model: &StiffnessModel) -> SpringSpec {
    SpringSpec {
        name: name.into(),
        from: from.into(),
        to: to.into(),
        at_m: Some(at),
        direction: Some(dir),
        ..Default::default()
    }
    .with_model(model, false)
}

fn torsion(name: &str, from: &str, to: &str, at: V3, axis: V3, model: &StiffnessModel) -> SpringSpec {
    SpringSpec {
        name: name.into(),
        from: from.into(),
        to: to.into(),
        at_m: Some(at),
        axis: Some(axis),
        ..Default::default()
    }
    .with_model(model, true)
}

const EX: V3 = [1.0, 0.0, 0.0];
const EY: V3 = [0.0, 1.0, 0.0];
const EZ: V3 = [0.0, 0.0, 1.0];

fn material_of(field: &str, preset: &Option<String>, props: &Option<Material>) -> Result<Material> {
    let m = match (preset, props) {
        (Some(n), None) => Material::preset(n)?,
        (None, Some(m)) => m.clone(),
        (None, None) => {
            return Err(Error::invalid(field, "is required (a preset name, or ..._properties)"));
        }
        (Some(_), Some(_)) => {
            return Err(Error::invalid(field, "give a preset name or explicit properties, not both"));
        }
    };
    m.validate(field)?;
    Ok(m)
}

// ---------------------------------------------------------------------------------------------
// Payload

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

    /// The payload posed for a pointing, with its CG placed relative to the `pivot`.
    fn posed(&self, pivot: V3, altitude_deg: f64, azimuth_deg: f64) -> Result<Mass> {
        let local = self.local_mass()?;
        if !positive_definite(&local.j) {
            return Err(Error::invalid(
                "payload",
                "the inertia tensor is singular (e.g. only point masses on one line): add a part with extent",
            ));
        }
        let r = payload_frame(altitude_deg, azimuth_deg); // r[k] = k-th frame axis
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

// ---------------------------------------------------------------------------------------------
// Tripod geometry

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
// Expansion

/// Where a stand (tripod or pier) starts: carrier name and height of its base.
struct Base {
    carrier: String,
    z: f64,
}

/// Contacts under the feet, resolved from `[pads]` and `[ground]` for one support.
enum FootContact {
    /// The legs end on the support carrier itself (rigid, no pads).
    Fixed,
    /// Vertical and horizontal springs from each foot to the support carrier.
    Springs { vertical: StiffnessModel, horizontal: StiffnessModel },
}

impl RigSpec {
    /// True when no rig section is present.
    pub fn is_empty(&self) -> bool {
        self == &RigSpec::default()
    }

    /// Expand into generic-layer bodies, nodes, springs and beams, posed for the optics'
    /// pointing (zenith when `optics` is `None`). The result carries `optics` unchanged.
    pub fn expand(&self, optics: Option<&OpticsSpec>) -> Result<ModelSpec> {
        let mut out = ModelSpec { optics: optics.cloned(), ..Default::default() };
        if self.is_empty() {
            return Ok(out);
        }
        let (alt, az) = match optics {
            Some(o) => {
                o.validate()?;
                (o.altitude_deg, o.azimuth_deg)
            }
            None => (90.0, 0.0),
        };
        if self.tripod.is_some() && self.pier.is_some() {
            return Err(Error::invalid("pier", "a rig has either [tripod] or [pier], not both"));
        }
        if self.pads.is_some() && self.tripod.is_none() {
            return Err(Error::invalid("pads", "pads go under tripod feet; there is no [tripod]"));
        }
        if self.payload.is_some() && self.mount.is_none() {
            return Err(Error::invalid(
                "mount",
                "is required to carry the payload (the pivot is on the mount)",
            ));
        }
        if self.mount.is_some() && self.tripod.is_none() && self.pier.is_none() {
            return Err(Error::invalid("tripod", "the mount needs a [tripod] or a [pier] to stand on"));
        }
        let stand_on = self
            .tripod
            .as_ref()
            .map(|t| (t.on.unwrap_or_default(), "tripod.on"))
            .or_else(|| self.pier.as_ref().map(|p| (p.on.unwrap_or_default(), "pier.on")));
        if self.ground.is_some() && !matches!(stand_on, Some((Support::Ground, _))) {
            return Err(Error::invalid(
                "ground",
                "nothing stands on the ground (no tripod or pier with on = \"ground\")",
            ));
        }

        if self.pier.is_some() && self.ground.as_ref().is_some_and(|g| g.contact_radius_m.is_some()) {
            return Err(Error::invalid(
                "ground.contact_radius_m",
                "is for tripod feet; a pier footing's size sets its contact",
            ));
        }
        // Floor.
        let floor = match &self.floor {
            Some(f) => Some(f.build(&mut out)?),
            None => None,
        };
        // The stand's support surface.
        let (support, support_z) = match stand_on {
            None => (GROUND.to_string(), 0.0),
            Some((Support::Ground, _)) => (GROUND.to_string(), 0.0),
            Some((Support::Floor, field)) => match &floor {
                Some((name, z)) => (name.clone(), *z),
                None => return Err(Error::invalid(field, "is \"floor\" but there is no [floor]")),
            },
        };
        let Some(mount) = &self.mount else {
            return Ok(out);
        };
        let mount_name = body_name("mount.name", &mount.name, "mount")?;
        let payload_name = match &self.payload {
            Some(p) => Some(body_name("payload.name", &p.name, "payload")?),
            None => None,
        };
        if payload_name.as_deref() == Some(mount_name.as_str()) {
            return Err(Error::invalid("payload.name", "must differ from mount.name"));
        }

        // Stand geometry and extra masses on the mount body.
        let mut extras: Vec<Mass> = Vec::new();
        let top_z;
        let mut tripod_plan = None;
        let mut pier_base = None;
        if let Some(t) = &self.tripod {
            let g = t.geometry()?;
            top_z = support_z + g.height_m;
            let plan = TripodPlan::new(t, g, support_z, top_z)?;
            extras.extend(plan.head_masses());
            tripod_plan = Some(plan);
        } else if let Some(p) = &self.pier {
            let h = pos("pier.height_m", p.height_m)?;
            let base = self.pier_base(p, &support, support_z, &mut out)?;
            top_z = base.z + h;
            pier_base = Some(base);
        } else {
            return Ok(out);
        }

        // Mount body.
        let mm = pos("mount.mass_kg", mount.mass_kg)?;
        let mi = pos3("mount.inertia_kgm2", mount.inertia_kgm2)?;
        let ph = pos("mount.pivot_height_m", mount.pivot_height_m)?;
        let ch = nonneg_or("mount.cg_height_m", mount.cg_height_m, ph / 2.0)?;
        let mut parts = vec![Mass {
            m: mm,
            c: [0.0, 0.0, top_z + ch],
            j: [[mi[0], 0.0, 0.0], [0.0, mi[1], 0.0], [0.0, 0.0, mi[2]]],
        }];
        parts.extend(extras);
        out.bodies.push(to_body(&mount_name, &combine(&parts)));
        let pivot = [0.0, 0.0, top_z + ph];

        // Payload and the pivot joint.
        if let (Some(p), Some(pname)) = (&self.payload, &payload_name) {
            let posed = p.posed(pivot, alt, az)?;
            out.bodies.push(to_body(pname, &posed));
            mount.joint(&mount_name, pname, pivot, alt, az, &mut out)?;
        }

        // Stand elements.
        if let Some(plan) = tripod_plan {
            let contact = self.foot_contact(&support)?;
            plan.build(&mount_name, &support, contact, &mut out)?;
        }
        if let (Some(p), Some(base)) = (&self.pier, pier_base) {
            let section = p.section.clone().ok_or_else(|| Error::invalid("pier.section", "is required"))?;
            section.validate("pier.section")?;
            let mat = material_of("pier.material", &p.material, &p.material_properties)?;
            let elements = p.elements.unwrap_or(4);
            if !(1..=200).contains(&elements) {
                return Err(Error::invalid("pier.elements", format!("must lie in 1..=200, got {elements}")));
            }
            let mut added = nonneg_or("pier.added_mass_kg_per_m", p.added_mass_kg_per_m, 0.0)?;
            if let Some(rho) = p.fill_density_kg_m3 {
                require_non_negative("pier.fill_density_kg_m3", rho)?;
                let Section::Tube { outer_diameter_m, wall_m } = section else {
                    return Err(Error::invalid("pier.fill_density_kg_m3", "a fill needs a tube section"));
                };
                let di = outer_diameter_m - 2.0 * wall_m;
                added += rho * PI / 4.0 * di * di;
            }
            out.beams.push(BeamSpec {
                name: "pier".into(),
                from: base.carrier.clone(),
                to: mount_name.clone(),
                from_at_m: [0.0, 0.0, base.z],
                to_at_m: [0.0, 0.0, top_z],
                section,
                material: None,
                material_properties: Some(mat),
                elements,
                added_mass_kg_per_m: added,
                added_loss_factor: nonneg_or("pier.added_loss_factor", p.added_loss_factor, 0.0)?,
                orientation: None,
            });
            if let Some(f) = &self.floor {
                f.gap(&out, &base)?.into_iter().for_each(|s| out.springs.push(s));
            }
        } else if self.floor.as_ref().is_some_and(|f| f.gap_stiffness_n_per_m.is_some()) {
            return Err(Error::invalid(
                "floor.gap_stiffness_n_per_m",
                "bridges the deck to a pier footing; there is no pier on a footing",
            ));
        }
        Ok(out)
    }

    fn ground(&self) -> Result<&GroundSpec> {
        self.ground.as_ref().ok_or_else(|| Error::invalid("ground", "is required (soil or kind = \"rigid\")"))
    }

    /// The soil of `[ground]`, or None for rigid ground.
    fn soil(&self) -> Result<Option<(Soil, bool)>> {
        let g = self.ground()?;
        match g.kind.unwrap_or_default() {
            GroundKind::Rigid => {
                if g.soil.is_some() || g.soil_properties.is_some() {
                    return Err(Error::invalid("ground.soil", "not used with kind = \"rigid\""));
                }
                Ok(None)
            }
            GroundKind::Soil => {
                let s = match (&g.soil, &g.soil_properties) {
                    (Some(n), None) => Soil::preset(n)?,
                    (None, Some(s)) => s.clone(),
                    (None, None) => {
                        return Err(Error::invalid(
                            "ground.soil",
                            "is required (a preset name, soil_properties, or kind = \"rigid\")",
                        ));
                    }
                    (Some(_), Some(_)) => {
                        return Err(Error::invalid("ground.soil", "give soil or soil_properties, not both"));
                    }
                };
                s.validate("ground.soil_properties")?;
                Ok(Some((s, g.radiation_damping.unwrap_or(false))))
            }
        }
    }

    fn foot_contact(&self, support: &str) -> Result<FootContact> {
        let pads = match &self.pads {
            Some(p) => {
                let c = p
                    .compression
                    .as_ref()
                    .ok_or_else(|| Error::invalid("pads.compression", "is required"))?;
                let s = p.shear.as_ref().ok_or_else(|| Error::invalid("pads.shear", "is required"))?;
                Some((c.to_model("pads.compression", false)?, s.to_model("pads.shear", false)?))
            }
            None => None,
        };
        let soil = if support == GROUND {
            match self.soil()? {
                Some((s, rad)) => {
                    let r = pos("ground.contact_radius_m", self.ground()?.contact_radius_m)?;
                    let [v, h, _, _] = s.contact_models(r, rad)?;
                    Some((v, h))
                }
                None => None,
            }
        } else {
            None
        };
        Ok(match (pads, soil) {
            (None, None) => FootContact::Fixed,
            (Some((v, h)), None) | (None, Some((v, h))) => {
                FootContact::Springs { vertical: v, horizontal: h }
            }
            (Some((pv, ph)), Some((sv, sh))) => FootContact::Springs {
                vertical: StiffnessModel::Series(vec![pv, sv]),
                horizontal: StiffnessModel::Series(vec![ph, sh]),
            },
        })
    }

    /// Footing body and its soil springs (pier on soil), or the support itself.
    fn pier_base(&self, p: &PierSpec, support: &str, support_z: f64, out: &mut ModelSpec) -> Result<Base> {
        let soil = if support == GROUND { self.soil()? } else { None };
        let Some((soil, radiation)) = soil else {
            // Rigid ground or floor: the column is clamped to it; a footing there would not move.
            return Ok(Base { carrier: support.to_string(), z: support_z });
        };
        let f = p.footing.as_ref().ok_or_else(|| Error::invalid("pier.footing", "is required on soil"))?;
        let d = pos("pier.footing.depth_m", f.depth_m)?;
        let rho = pos_or("pier.footing.density_kg_m3", f.density_kg_m3, DEFAULT_FOOTING_DENSITY_KG_M3)?;
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
        let [kv, kh, _, _] = soil.contact_models(r_trans, radiation)?;
        let [_, _, kr, kt] = soil.contact_models(r_rot, radiation)?;
        let at = [0.0, 0.0, support_z];
        out.springs.push(axial("footing_x", GROUND, "footing", at, EX, &kh));
        out.springs.push(axial("footing_y", GROUND, "footing", at, EY, &kh));
        out.springs.push(axial("footing_z", GROUND, "footing", at, EZ, &kv));
        out.torsion_springs.push(torsion("footing_rx", GROUND, "footing", at, EX, &kr));
        out.torsion_springs.push(torsion("footing_ry", GROUND, "footing", at, EY, &kr));
        out.torsion_springs.push(torsion("footing_rz", GROUND, "footing", at, EZ, &kt));
        Ok(Base { carrier: "footing".into(), z: support_z + d })
    }
}

impl MountSpec {
    /// Pivot springs from the mount to the payload.
    fn joint(
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

impl FloorSpec {
    /// The deck body and its supports; returns (name, walking-surface height).
    fn build(&self, out: &mut ModelSpec) -> Result<(String, f64)> {
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
    fn gap(&self, out: &ModelSpec, base: &Base) -> Result<Vec<SpringSpec>> {
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

/// A validated tripod ready to be written out.
struct TripodPlan {
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
    fn new(t: &TripodSpec, g: TripodGeometry, support_z: f64, top_z: f64) -> Result<TripodPlan> {
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
    fn head_masses(&self) -> Vec<Mass> {
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

    fn build(self, mount: &str, support: &str, contact: FootContact, out: &mut ModelSpec) -> Result<()> {
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

//! The generic structural layer: bodies, nodes, connectors and beams, and their assembly into
//! mass, damping and (complex) stiffness matrices.
//!
//! Every connector end is a *point on a carrier* (a rigid body, a node, an internal beam node or
//! the ground). The point's six motion components (three translations, three small rotations)
//! are a linear map of the global DOFs: for a body with centre of gravity c and a point p,
//! r = p − c, u_p = u + θ × r and θ_p = θ. Each element contributes Tᵀ k T with T its map.
//! Held DOFs of a body or node are fixed (zero absolute motion) and carry no global index.
//!
//! Global DOF order: the free DOFs of bodies (in file order, each in x, y, z, rx, ry, rz order),
//! then nodes, then internal beam nodes. Three ground translations follow the free DOFs in the
//! "full" system; base excitation moves them.

use crate::error::{Error, Result, require_finite, require_non_negative, require_positive};
use crate::material::Material;
use crate::section::Section;
use crate::stiffness::StiffnessModel;
use num_complex::Complex64;
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

/// Largest number of free DOFs accepted (dense matrices; refused up front).
pub const MAX_DOFS: usize = 2000;

/// The reserved carrier name for the ground.
pub const GROUND: &str = "ground";

/// One of the six motion components of a point or body.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Dof {
    X,
    Y,
    Z,
    Rx,
    Ry,
    Rz,
}

impl Dof {
    /// All six, in canonical order.
    pub const ALL: [Dof; 6] = [Dof::X, Dof::Y, Dof::Z, Dof::Rx, Dof::Ry, Dof::Rz];

    /// Index 0..6 (x, y, z, rx, ry, rz).
    pub fn index(self) -> usize {
        self as usize
    }

    /// The name used in files and output names.
    pub fn name(self) -> &'static str {
        ["x", "y", "z", "rx", "ry", "rz"][self as usize]
    }

    /// Parse "x", "y", "z", "rx", "ry", "rz".
    pub fn parse(s: &str) -> Result<Dof> {
        Dof::ALL.into_iter().find(|d| d.name() == s).ok_or_else(|| Error::UnknownName {
            kind: "DOF".into(),
            name: s.into(),
            known: "x, y, z, rx, ry, rz".into(),
        })
    }
}

fn all_dofs() -> Vec<Dof> {
    Dof::ALL.to_vec()
}
fn translations() -> Vec<Dof> {
    vec![Dof::X, Dof::Y, Dof::Z]
}

/// A rigid body with 6 DOF at its centre of gravity.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct BodySpec {
    pub name: String,
    pub mass_kg: f64,
    /// Position of the centre of gravity (m).
    pub cg_m: [f64; 3],
    /// Moments of inertia about the CG along the model axes (kg·m²).
    pub inertia_kgm2: [f64; 3],
    /// Off-diagonal entries of the inertia tensor [J_xy, J_xz, J_yz] (tensor components, i.e.
    /// −∫xy dm), kg·m².
    #[serde(default, skip_serializing_if = "is_zero3")]
    pub products_kgm2: [f64; 3],
    /// Free DOFs (default all six); the rest are held fixed.
    #[serde(default = "all_dofs")]
    pub dofs: Vec<Dof>,
}

fn is_zero3(v: &[f64; 3]) -> bool {
    v.iter().all(|x| *x == 0.0)
}

/// A point mass with translational DOFs.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct NodeSpec {
    pub name: String,
    pub mass_kg: f64,
    pub at_m: [f64; 3],
    /// Free translations (default x, y, z).
    #[serde(default = "translations")]
    pub dofs: Vec<Dof>,
}

/// `{ k0, k_inf, tau_s }` of a standard linear solid.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ZenerSpec {
    pub k0: f64,
    pub k_inf: f64,
    pub tau_s: f64,
    /// Fractional order (omit or 1 for the standard linear solid).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub alpha: Option<f64>,
}

/// Tabulated stiffness against frequency.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct TableSpec {
    pub freq_hz: Vec<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub stiffness_n_per_m: Option<Vec<f64>>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub stiffness_nm_per_rad: Option<Vec<f64>>,
    pub loss_factor: Vec<f64>,
}

/// A stiffness as written in a model file: exactly one of a plain spring (with loss factor
/// and/or dashpot), `zener`, `table`, `series` or `parallel`. Translational springs use the
/// `_n_per_m` / `_ns_per_m` names, rotational ones `_nm_per_rad` / `_nms_per_rad`.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct StiffnessSpec {
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub stiffness_n_per_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub stiffness_nm_per_rad: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub loss_factor: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub damping_ns_per_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub damping_nms_per_rad: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub zener: Option<ZenerSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub table: Option<TableSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub series: Option<Vec<StiffnessSpec>>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub parallel: Option<Vec<StiffnessSpec>>,
}

impl StiffnessSpec {
    /// Convert to a [`StiffnessModel`]; `angular` selects the rotational unit names.
    pub fn to_model(&self, name: &str, angular: bool) -> Result<StiffnessModel> {
        let (k_name, c_name) = if angular {
            ("stiffness_nm_per_rad", "damping_nms_per_rad")
        } else {
            ("stiffness_n_per_m", "damping_ns_per_m")
        };
        let (k, c, wrong_k, wrong_c) = if angular {
            (
                self.stiffness_nm_per_rad,
                self.damping_nms_per_rad,
                self.stiffness_n_per_m,
                self.damping_ns_per_m,
            )
        } else {
            (
                self.stiffness_n_per_m,
                self.damping_ns_per_m,
                self.stiffness_nm_per_rad,
                self.damping_nms_per_rad,
            )
        };
        if wrong_k.is_some() || wrong_c.is_some() {
            return Err(Error::invalid(
                name.to_string(),
                format!(
                    "use {k_name} / {c_name} here (the other unit family belongs to the other kind of spring)"
                ),
            ));
        }
        let forms = [
            k.is_some() || c.is_some(),
            self.zener.is_some(),
            self.table.is_some(),
            self.series.is_some(),
            self.parallel.is_some(),
        ];
        let count = forms.iter().filter(|b| **b).count();
        if count != 1 {
            return Err(Error::invalid(
                name.to_string(),
                format!(
                    "give exactly one stiffness: {k_name} (with loss_factor and/or {c_name}), zener, table, series or parallel; found {count}"
                ),
            ));
        }
        let m = if let Some(z) = &self.zener {
            if self.loss_factor.is_some() {
                return Err(Error::invalid(
                    format!("{name}.loss_factor"),
                    "not used with zener (its loss follows from k0, k_inf, tau_s)",
                ));
            }
            match z.alpha {
                None => StiffnessModel::Zener { k0: z.k0, k_inf: z.k_inf, tau_s: z.tau_s },
                Some(alpha) => {
                    StiffnessModel::FractionalZener { k0: z.k0, k_inf: z.k_inf, tau_s: z.tau_s, alpha }
                }
            }
        } else if let Some(t) = &self.table {
            let ks = if angular { &t.stiffness_nm_per_rad } else { &t.stiffness_n_per_m };
            let ks = ks
                .clone()
                .ok_or_else(|| Error::invalid(format!("{name}.table"), format!("needs {k_name}")))?;
            StiffnessModel::Table { freq_hz: t.freq_hz.clone(), k: ks, loss_factor: t.loss_factor.clone() }
        } else if let Some(parts) = self.series.as_ref().or(self.parallel.as_ref()) {
            let kind = if self.series.is_some() { "series" } else { "parallel" };
            let ms = parts
                .iter()
                .enumerate()
                .map(|(i, p)| p.to_model(&format!("{name}.{kind}[{i}]"), angular))
                .collect::<Result<Vec<_>>>()?;
            if self.series.is_some() { StiffnessModel::Series(ms) } else { StiffnessModel::Parallel(ms) }
        } else {
            let eta = self.loss_factor.unwrap_or(0.0);
            match (k, c) {
                (Some(k), None) => StiffnessModel::Hysteretic { k, loss_factor: eta },
                (Some(k), Some(c)) if eta == 0.0 => StiffnessModel::KelvinVoigt { k, c },
                (Some(k), Some(c)) => StiffnessModel::Parallel(vec![
                    StiffnessModel::Hysteretic { k, loss_factor: eta },
                    StiffnessModel::KelvinVoigt { k: 0.0, c },
                ]),
                _ => return Err(Error::invalid(format!("{name}.{k_name}"), "is required")),
            }
        };
        m.validate(name)?;
        Ok(m)
    }

    /// The spec of a model (inverse of [`to_model`](Self::to_model) for display).
    pub fn from_model(m: &StiffnessModel, angular: bool) -> StiffnessSpec {
        let mut s = StiffnessSpec::default();
        let set_k = |s: &mut StiffnessSpec, k: f64| {
            if angular { s.stiffness_nm_per_rad = Some(k) } else { s.stiffness_n_per_m = Some(k) }
        };
        match m {
            StiffnessModel::Hysteretic { k, loss_factor } => {
                set_k(&mut s, *k);
                if *loss_factor != 0.0 {
                    s.loss_factor = Some(*loss_factor);
                }
            }
            StiffnessModel::KelvinVoigt { k, c } => {
                set_k(&mut s, *k);
                if angular { s.damping_nms_per_rad = Some(*c) } else { s.damping_ns_per_m = Some(*c) }
            }
            StiffnessModel::Zener { k0, k_inf, tau_s } => {
                s.zener = Some(ZenerSpec { k0: *k0, k_inf: *k_inf, tau_s: *tau_s, alpha: None })
            }
            StiffnessModel::FractionalZener { k0, k_inf, tau_s, alpha } => {
                s.zener = Some(ZenerSpec { k0: *k0, k_inf: *k_inf, tau_s: *tau_s, alpha: Some(*alpha) })
            }
            StiffnessModel::Table { freq_hz, k, loss_factor } => {
                s.table = Some(TableSpec {
                    freq_hz: freq_hz.clone(),
                    stiffness_n_per_m: (!angular).then(|| k.clone()),
                    stiffness_nm_per_rad: angular.then(|| k.clone()),
                    loss_factor: loss_factor.clone(),
                })
            }
            StiffnessModel::Series(p) => {
                s.series = Some(p.iter().map(|m| Self::from_model(m, angular)).collect())
            }
            StiffnessModel::Parallel(p) => {
                s.parallel = Some(p.iter().map(|m| Self::from_model(m, angular)).collect())
            }
        }
        s
    }
}

/// An axial spring (along `direction`) or, in `[[torsion_spring]]`, a rotational spring about
/// `axis`, between two carriers.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SpringSpec {
    pub name: String,
    pub from: String,
    pub to: String,
    /// The point where a zero-length spring acts (model coordinates, m).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub at_m: Option<[f64; 3]>,
    /// End points of a spring of finite length; their line is the default direction.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub from_at_m: Option<[f64; 3]>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub to_at_m: Option<[f64; 3]>,
    /// Unit vector of the spring's line of action (axial springs).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub direction: Option<[f64; 3]>,
    /// Unit vector of the rotation axis (torsion springs).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub axis: Option<[f64; 3]>,
    // The stiffness, as in [`StiffnessSpec`] (fields inline so unknown keys are caught).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub stiffness_n_per_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub stiffness_nm_per_rad: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub loss_factor: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub damping_ns_per_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub damping_nms_per_rad: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub zener: Option<ZenerSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub table: Option<TableSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub series: Option<Vec<StiffnessSpec>>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub parallel: Option<Vec<StiffnessSpec>>,
}

impl SpringSpec {
    /// The stiffness fields as a [`StiffnessSpec`].
    pub fn stiffness(&self) -> StiffnessSpec {
        StiffnessSpec {
            stiffness_n_per_m: self.stiffness_n_per_m,
            stiffness_nm_per_rad: self.stiffness_nm_per_rad,
            loss_factor: self.loss_factor,
            damping_ns_per_m: self.damping_ns_per_m,
            damping_nms_per_rad: self.damping_nms_per_rad,
            zener: self.zener.clone(),
            table: self.table.clone(),
            series: self.series.clone(),
            parallel: self.parallel.clone(),
        }
    }

    /// Set the stiffness fields from a model (translational or `angular`).
    pub fn with_model(mut self, m: &StiffnessModel, angular: bool) -> Self {
        let s = StiffnessSpec::from_model(m, angular);
        self.stiffness_n_per_m = s.stiffness_n_per_m;
        self.stiffness_nm_per_rad = s.stiffness_nm_per_rad;
        self.loss_factor = s.loss_factor;
        self.damping_ns_per_m = s.damping_ns_per_m;
        self.damping_nms_per_rad = s.damping_nms_per_rad;
        self.zener = s.zener;
        self.table = s.table;
        self.series = s.series;
        self.parallel = s.parallel;
        self
    }
}

/// A general 6 × 6 spring between two carriers at one point: relative motion d (3 translations,
/// 3 rotations of `to` minus `from` at `at_m`) stores energy ½ dᵀ K d, K = `matrix`(1 + iη).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct GeneralSpringSpec {
    pub name: String,
    pub from: String,
    pub to: String,
    pub at_m: [f64; 3],
    /// Symmetric 6 × 6 stiffness, rows in x, y, z, rx, ry, rz order (N/m, N, N·m/rad).
    pub matrix: [[f64; 6]; 6],
    #[serde(default)]
    pub loss_factor: f64,
}

/// A 3-D Euler–Bernoulli beam (column, leg, pier) between two carriers, split into elements with
/// consistent mass. Ends are clamped to bodies or the ground (a point node has no rotations, so
/// a beam cannot end on one; use a small body for a pinned end).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct BeamSpec {
    pub name: String,
    pub from: String,
    pub to: String,
    pub from_at_m: [f64; 3],
    pub to_at_m: [f64; 3],
    pub section: Section,
    /// A preset name (see [`crate::material::MATERIAL_PRESETS`]) ...
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub material: Option<String>,
    /// ... or explicit properties.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub material_properties: Option<Material>,
    #[serde(default = "default_elements")]
    pub elements: usize,
    /// Non-structural mass per length, e.g. sand or concrete fill (kg/m).
    #[serde(default)]
    pub added_mass_kg_per_m: f64,
    /// Extra loss factor added to the material's (e.g. from a damping fill).
    #[serde(default)]
    pub added_loss_factor: f64,
    /// A vector in the plane of the section's local y axis (default: global z, or global x for
    /// a vertical beam).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub orientation: Option<[f64; 3]>,
}

fn default_elements() -> usize {
    4
}

impl BeamSpec {
    /// The beam's material (preset or explicit).
    pub fn material(&self) -> Result<Material> {
        let m = match (&self.material, &self.material_properties) {
            (Some(n), None) => Material::preset(n)?,
            (None, Some(m)) => m.clone(),
            _ => {
                return Err(Error::invalid(
                    format!("beam '{}'", self.name),
                    "give exactly one of material (a preset name) or material_properties",
                ));
            }
        };
        m.validate(&format!("beam '{}'.material", self.name))?;
        Ok(m)
    }
}

/// Optics carried by a body, and its pointing.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct OpticsSpec {
    /// The rigid body carrying the optics (default `payload`, the rig layer's payload body).
    #[serde(default = "default_optics_body")]
    pub body: String,
    pub focal_length_mm: f64,
    pub pixel_um: f64,
    pub altitude_deg: f64,
    pub azimuth_deg: f64,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub seeing_fwhm_arcsec: Option<f64>,
    /// Rotation of the camera's axes about the line of sight from (azimuth, altitude) (deg).
    #[serde(default)]
    pub camera_rotation_deg: f64,
    /// Clear aperture (mm), for the diffraction line of the star budget.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub aperture_mm: Option<f64>,
    /// Wavelength for diffraction (nm); default 550.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub wavelength_nm: Option<f64>,
}

fn default_optics_body() -> String {
    "payload".into()
}

impl OpticsSpec {
    /// Plate scale (arcsec per pixel) = 206.264806 × pixel_um / focal_length_mm.
    pub fn plate_scale_arcsec_per_px(&self) -> f64 {
        206.264_806_247_096_36 * self.pixel_um / self.focal_length_mm
    }

    /// Line of sight â and the sensor axes (e_az, e_alt) for the pointing, rotated by the
    /// camera rotation angle.
    pub fn axes(&self) -> ([f64; 3], [f64; 3], [f64; 3]) {
        let (a, h) = (self.azimuth_deg.to_radians(), self.altitude_deg.to_radians());
        let los = [a.sin() * h.cos(), a.cos() * h.cos(), h.sin()];
        let e_az = [a.cos(), -a.sin(), 0.0];
        let e_alt = [-a.sin() * h.sin(), -a.cos() * h.sin(), h.cos()];
        let (c, s) =
            (self.camera_rotation_deg.to_radians().cos(), self.camera_rotation_deg.to_radians().sin());
        let ex = std::array::from_fn(|i| c * e_az[i] + s * e_alt[i]);
        let ey = std::array::from_fn(|i| -s * e_az[i] + c * e_alt[i]);
        (los, ex, ey)
    }

    pub(crate) fn validate(&self) -> Result<()> {
        require_positive("optics.focal_length_mm", self.focal_length_mm)?;
        require_positive("optics.pixel_um", self.pixel_um)?;
        require_finite("optics.azimuth_deg", self.azimuth_deg)?;
        require_finite("optics.camera_rotation_deg", self.camera_rotation_deg)?;
        let h = require_finite("optics.altitude_deg", self.altitude_deg)?;
        if !(-90.0..=90.0).contains(&h) {
            return Err(Error::invalid("optics.altitude_deg", format!("must lie in [-90, 90], got {h}")));
        }
        if let Some(s) = self.seeing_fwhm_arcsec {
            require_non_negative("optics.seeing_fwhm_arcsec", s)?;
        }
        if let Some(d) = self.aperture_mm {
            require_positive("optics.aperture_mm", d)?;
        }
        if let Some(w) = self.wavelength_nm {
            require_positive("optics.wavelength_nm", w)?;
        }
        Ok(())
    }
}

/// Where and how wind loads a body.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct WindLoadSpec {
    pub body: String,
    pub centre_of_pressure_m: [f64; 3],
    /// Unit horizontal vector the wind blows towards.
    pub direction: [f64; 3],
    pub area_m2: f64,
    pub drag_coefficient: f64,
}

/// The whole generic model, as in a model file's generic layer.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ModelSpec {
    #[serde(default, rename = "body", skip_serializing_if = "Vec::is_empty")]
    pub bodies: Vec<BodySpec>,
    #[serde(default, rename = "node", skip_serializing_if = "Vec::is_empty")]
    pub nodes: Vec<NodeSpec>,
    #[serde(default, rename = "spring", skip_serializing_if = "Vec::is_empty")]
    pub springs: Vec<SpringSpec>,
    #[serde(default, rename = "torsion_spring", skip_serializing_if = "Vec::is_empty")]
    pub torsion_springs: Vec<SpringSpec>,
    #[serde(default, rename = "general_spring", skip_serializing_if = "Vec::is_empty")]
    pub general_springs: Vec<GeneralSpringSpec>,
    #[serde(default, rename = "beam", skip_serializing_if = "Vec::is_empty")]
    pub beams: Vec<BeamSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub optics: Option<OpticsSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub wind: Option<WindLoadSpec>,
}

// ---------------------------------------------------------------------------------------------
// Assembly

/// What a global DOF belongs to.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct DofLabel {
    /// Body, node or `beam#k` name.
    pub owner: String,
    pub dof: Dof,
}

impl std::fmt::Display for DofLabel {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}:{}", self.owner, self.dof.name())
    }
}

/// A carrier of points: its reference position and the global index of each of its 6 DOFs.
#[derive(Debug, Clone)]
pub(crate) struct Carrier {
    pub(crate) origin: [f64; 3],
    /// Global index of x, y, z, rx, ry, rz (None = held or absent).
    pub(crate) index: [Option<usize>; 6],
    /// Whether the carrier has rotational DOFs at all (bodies, beam nodes) or not (nodes).
    pub(crate) rotates: bool,
}

/// A rank-one stiffness term k*(ω) b bᵀ with b sparse over the full DOFs.
#[derive(Debug, Clone)]
pub(crate) struct RankOneTerm {
    pub(crate) name: String,
    pub(crate) model: StiffnessModel,
    pub(crate) b: Vec<(usize, f64)>,
}

/// Assembled matrices over the full system (free DOFs followed by 3 ground translations).
#[derive(Debug, Clone)]
pub(crate) struct Assembled {
    pub(crate) n: usize,
    pub(crate) labels: Vec<DofLabel>,
    /// Column-major (n+3)².
    pub(crate) mass: Vec<f64>,
    pub(crate) damping: Vec<f64>,
    /// Frequency-independent complex stiffness (hysteretic springs, beams, general springs).
    pub(crate) k_const: Vec<Complex64>,
    /// Frequency-dependent springs.
    pub(crate) terms: Vec<RankOneTerm>,
    /// Every rank-one spring (also those folded into `k_const` and `damping`), by name, so that
    /// sweeps can replace them.
    pub(crate) springs: Vec<RankOneTerm>,
    pub(crate) carriers: BTreeMap<String, Carrier>,
}

fn sub(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
}
fn norm(a: [f64; 3]) -> f64 {
    (a[0] * a[0] + a[1] * a[1] + a[2] * a[2]).sqrt()
}
fn cross(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]]
}
fn unit(name: &str, v: [f64; 3]) -> Result<[f64; 3]> {
    for x in v {
        require_finite(name, x)?;
    }
    let l = norm(v);
    if l < 1e-12 {
        return Err(Error::invalid(name, "must be a non-zero vector"));
    }
    Ok([v[0] / l, v[1] / l, v[2] / l])
}
fn finite3(name: &str, v: [f64; 3]) -> Result<()> {
    for x in v {
        require_finite(name, x)?;
    }
    Ok(())
}

impl Carrier {
    /// The 6 × N map (dense rows) of the motion of point `p` on this carrier.
    pub(crate) fn point_map(&self, p: [f64; 3], nfull: usize) -> [Vec<f64>; 6] {
        let mut rows: [Vec<f64>; 6] = std::array::from_fn(|_| vec![0.0; nfull]);
        let r = sub(p, self.origin);
        for i in 0..3 {
            if let Some(g) = self.index[i] {
                rows[i][g] += 1.0;
            }
            if let Some(g) = self.index[3 + i] {
                rows[3 + i][g] += 1.0;
            }
        }
        // u_p = u + θ × r: (θ × r)_x = θy rz − θz ry, etc.
        let th = |k: usize| self.index[3 + k];
        let add = |rows: &mut [Vec<f64>; 6], row: usize, dof: Option<usize>, c: f64| {
            if let Some(g) = dof {
                rows[row][g] += c;
            }
        };
        add(&mut rows, 0, th(1), r[2]);
        add(&mut rows, 0, th(2), -r[1]);
        add(&mut rows, 1, th(2), r[0]);
        add(&mut rows, 1, th(0), -r[2]);
        add(&mut rows, 2, th(0), r[1]);
        add(&mut rows, 2, th(1), -r[0]);
        rows
    }
}

struct Builder {
    nfull: usize,
    mass: Vec<f64>,
    damping: Vec<f64>,
    k_const: Vec<Complex64>,
    terms: Vec<RankOneTerm>,
    springs: Vec<RankOneTerm>,
}

impl Builder {
    fn add_mass(&mut self, t: &[Vec<f64>], m: &[f64], dim: usize) {
        add_tkt(&mut self.mass, self.nfull, t, dim, |i, j| m[i * dim + j]);
    }
}

/// Add Tᵀ k T into a column-major nfull² matrix; T has `dim` dense rows.
fn add_tkt<T: Copy + std::ops::Mul<f64, Output = T> + std::ops::AddAssign + Default>(
    target: &mut [T],
    nfull: usize,
    t: &[Vec<f64>],
    dim: usize,
    k: impl Fn(usize, usize) -> T,
) {
    // kt = k T (dim × nfull), then target += Tᵀ kt, over non-zero columns only.
    let nz: Vec<usize> = (0..nfull).filter(|&g| t.iter().any(|row| row[g] != 0.0)).collect();
    let mut kt = vec![T::default(); dim * nz.len()];
    for i in 0..dim {
        for (c, &g) in nz.iter().enumerate() {
            let mut s = T::default();
            for (j, row) in t.iter().enumerate().take(dim) {
                if row[g] != 0.0 {
                    s += k(i, j) * row[g];
                }
            }
            kt[i * nz.len() + c] = s;
        }
    }
    for (c2, &g2) in nz.iter().enumerate() {
        for &g1 in &nz {
            let mut s = T::default();
            for (i, row) in t.iter().enumerate().take(dim) {
                if row[g1] != 0.0 {
                    s += kt[i * nz.len() + c2] * row[g1];
                }
            }
            target[g1 + g2 * nfull] += s;
        }
    }
}

/// Assemble a validated spec into matrices.
pub(crate) fn assemble(spec: &ModelSpec) -> Result<Assembled> {
    // Carriers and DOF numbering.
    let mut names: BTreeMap<String, &'static str> = BTreeMap::new();
    let mut claim = |name: &str, kind: &'static str| -> Result<()> {
        if name.is_empty() {
            return Err(Error::invalid(format!("{kind} name"), "must not be empty"));
        }
        if name == GROUND || name.contains(':') || name.contains('#') {
            return Err(Error::invalid(
                format!("{kind} name '{name}'"),
                "'ground' is reserved and names may not contain ':' or '#'",
            ));
        }
        if let Some(k) = names.insert(name.to_string(), kind) {
            return Err(Error::invalid(format!("{kind} name '{name}'"), format!("already used by a {k}")));
        }
        Ok(())
    };
    let mut labels = Vec::new();
    let mut carriers: BTreeMap<String, Carrier> = BTreeMap::new();
    let free = |labels: &mut Vec<DofLabel>,
                owner: &str,
                dofs: &[Dof],
                allowed: &[Dof]|
     -> Result<[Option<usize>; 6]> {
        let mut idx = [None; 6];
        for d in dofs {
            if !allowed.contains(d) {
                return Err(Error::invalid(
                    format!("'{owner}'.dofs"),
                    format!("'{}' is not allowed here", d.name()),
                ));
            }
            if idx[d.index()].is_some() {
                return Err(Error::invalid(
                    format!("'{owner}'.dofs"),
                    format!("'{}' listed twice", d.name()),
                ));
            }
            idx[d.index()] = Some(usize::MAX);
        }
        for d in Dof::ALL {
            if idx[d.index()].is_some() {
                idx[d.index()] = Some(labels.len());
                labels.push(DofLabel { owner: owner.to_string(), dof: d });
            }
        }
        Ok(idx)
    };
    for b in &spec.bodies {
        claim(&b.name, "body")?;
        let p = format!("body '{}'", b.name);
        require_positive(|| format!("{p}.mass_kg"), b.mass_kg)?;
        finite3(&format!("{p}.cg_m"), b.cg_m)?;
        for (i, v) in b.inertia_kgm2.iter().enumerate() {
            let rot = [Dof::Rx, Dof::Ry, Dof::Rz][i];
            if b.dofs.contains(&rot) {
                require_positive(|| format!("{p}.inertia_kgm2[{i}]"), *v)?;
            } else {
                require_non_negative(|| format!("{p}.inertia_kgm2[{i}]"), *v)?;
            }
        }
        finite3(&format!("{p}.products_kgm2"), b.products_kgm2)?;
        let index = free(&mut labels, &b.name, &b.dofs, &Dof::ALL)?;
        carriers.insert(b.name.clone(), Carrier { origin: b.cg_m, index, rotates: true });
    }
    for nd in &spec.nodes {
        claim(&nd.name, "node")?;
        let p = format!("node '{}'", nd.name);
        require_positive(|| format!("{p}.mass_kg"), nd.mass_kg)?;
        finite3(&format!("{p}.at_m"), nd.at_m)?;
        let index = free(&mut labels, &nd.name, &nd.dofs, &[Dof::X, Dof::Y, Dof::Z])?;
        carriers.insert(nd.name.clone(), Carrier { origin: nd.at_m, index, rotates: false });
    }
    for s in spec.springs.iter().chain(&spec.torsion_springs) {
        claim(&s.name, "spring")?;
    }
    for s in &spec.general_springs {
        claim(&s.name, "general_spring")?;
    }
    // Beams: internal nodes, and own rotations at pinned ends.
    struct BeamNodes {
        nodes: Vec<Carrier>,
    }
    let mut beam_nodes = Vec::new();
    for bm in &spec.beams {
        claim(&bm.name, "beam")?;
        let p = format!("beam '{}'", bm.name);
        finite3(&format!("{p}.from_at_m"), bm.from_at_m)?;
        finite3(&format!("{p}.to_at_m"), bm.to_at_m)?;
        bm.section.validate(&format!("{p}.section"))?;
        bm.material()?;
        require_non_negative(|| format!("{p}.added_mass_kg_per_m"), bm.added_mass_kg_per_m)?;
        require_non_negative(|| format!("{p}.added_loss_factor"), bm.added_loss_factor)?;
        if bm.elements == 0 || bm.elements > 200 {
            return Err(Error::invalid(
                format!("{p}.elements"),
                format!("must lie in 1..=200, got {}", bm.elements),
            ));
        }
        if norm(sub(bm.to_at_m, bm.from_at_m)) < 1e-9 {
            return Err(Error::invalid(format!("{p}.to_at_m"), "the beam has zero length"));
        }
        let mut nodes = Vec::new();
        for k in 0..=bm.elements {
            let t = k as f64 / bm.elements as f64;
            let pos = std::array::from_fn(|i| bm.from_at_m[i] + t * (bm.to_at_m[i] - bm.from_at_m[i]));
            let end = if k == 0 {
                Some(&bm.from)
            } else if k == bm.elements {
                Some(&bm.to)
            } else {
                None
            };
            let owner = format!("{}#{k}", bm.name);
            // End carriers are filled in once every carrier (and the ground) exists.
            let c = match end {
                None => Carrier {
                    origin: pos,
                    index: free(&mut labels, &owner, &Dof::ALL, &Dof::ALL)?,
                    rotates: true,
                },
                Some(_) => Carrier { origin: pos, index: [None; 6], rotates: true },
            };
            nodes.push(c);
        }
        beam_nodes.push(BeamNodes { nodes });
    }
    let n = labels.len();
    if n == 0 {
        return Err(Error::unsupported("the model has no free DOFs (no bodies or nodes)"));
    }
    if n > MAX_DOFS {
        return Err(Error::TooLarge { what: "free DOFs".into(), value: n, limit: MAX_DOFS });
    }
    let nfull = n + 3;
    carriers.insert(
        GROUND.into(),
        Carrier {
            origin: [0.0; 3],
            index: [Some(n), Some(n + 1), Some(n + 2), None, None, None],
            rotates: false,
        },
    );
    let carrier = |carriers: &BTreeMap<String, Carrier>, who: &str, field: &str| -> Result<Carrier> {
        carriers.get(field).cloned().ok_or_else(|| Error::UnknownName {
            kind: format!("carrier in {who}"),
            name: field.into(),
            known: carriers.keys().cloned().collect::<Vec<_>>().join(", "),
        })
    };
    let mut b = Builder {
        nfull,
        mass: vec![0.0; nfull * nfull],
        damping: vec![0.0; nfull * nfull],
        k_const: vec![Complex64::default(); nfull * nfull],
        terms: Vec::new(),
        springs: Vec::new(),
    };
    // Body and node mass.
    for body in &spec.bodies {
        let c = &carriers[&body.name];
        let [ixx, iyy, izz] = body.inertia_kgm2;
        let [ixy, ixz, iyz] = body.products_kgm2;
        let j = [[ixx, ixy, ixz], [ixy, iyy, iyz], [ixz, iyz, izz]];
        for a in 0..6 {
            for bb in 0..6 {
                let v = if a < 3 && bb < 3 {
                    if a == bb { body.mass_kg } else { 0.0 }
                } else if a >= 3 && bb >= 3 {
                    j[a - 3][bb - 3]
                } else {
                    0.0
                };
                if let (Some(ga), Some(gb)) = (c.index[a], c.index[bb]) {
                    b.mass[ga + gb * nfull] += v;
                }
            }
        }
    }
    for nd in &spec.nodes {
        for g in carriers[&nd.name].index.iter().flatten() {
            b.mass[g + g * nfull] += nd.mass_kg;
        }
    }
    let connect = |s_from: &str, s_to: &str, who: &str| -> Result<()> {
        if s_from == s_to {
            return Err(Error::invalid(format!("{who}.to"), format!("connects '{s_from}' to itself")));
        }
        Ok(())
    };
    // Axial springs.
    for s in &spec.springs {
        let who = format!("spring '{}'", s.name);
        connect(&s.from, &s.to, &who)?;
        if s.axis.is_some() {
            return Err(Error::invalid(format!("{who}.axis"), "axial springs take direction, not axis"));
        }
        let (pa, pb) = match (s.at_m, s.from_at_m, s.to_at_m) {
            (Some(p), None, None) => (p, p),
            (None, Some(a), Some(bp)) => (a, bp),
            _ => {
                return Err(Error::invalid(who.clone(), "give either at_m, or both from_at_m and to_at_m"));
            }
        };
        finite3(&format!("{who}.at_m"), pa)?;
        finite3(&format!("{who}.at_m"), pb)?;
        let dir = match s.direction {
            Some(d) => unit(&format!("{who}.direction"), d)?,
            None if norm(sub(pb, pa)) > 1e-9 => unit(&format!("{who}.direction"), sub(pb, pa))?,
            None => {
                return Err(Error::invalid(
                    format!("{who}.direction"),
                    "is required for a zero-length spring",
                ));
            }
        };
        let model = s.stiffness().to_model(&who, false)?;
        let ta = carrier(&carriers, &who, &s.from)?.point_map(pa, nfull);
        let tb = carrier(&carriers, &who, &s.to)?.point_map(pb, nfull);
        let bvec: Vec<f64> =
            (0..nfull).map(|g| (0..3).map(|i| dir[i] * (tb[i][g] - ta[i][g])).sum()).collect();
        add_rank_one(&mut b, &s.name, model, &bvec);
    }
    // Torsion springs.
    for s in &spec.torsion_springs {
        let who = format!("torsion_spring '{}'", s.name);
        connect(&s.from, &s.to, &who)?;
        if s.direction.is_some() || s.from_at_m.is_some() || s.to_at_m.is_some() {
            return Err(Error::invalid(who.clone(), "torsion springs take axis (and optionally at_m) only"));
        }
        let axis = unit(
            &format!("{who}.axis"),
            s.axis.ok_or_else(|| Error::invalid(format!("{who}.axis"), "is required"))?,
        )?;
        let model = s.stiffness().to_model(&who, true)?;
        let p = s.at_m.unwrap_or([0.0; 3]);
        let (ca, cb) = (carrier(&carriers, &who, &s.from)?, carrier(&carriers, &who, &s.to)?);
        for (c, nm) in [(&ca, &s.from), (&cb, &s.to)] {
            if !c.rotates && nm != GROUND {
                return Err(Error::unsupported(format!(
                    "{who} ends on node '{nm}', which has no rotational DOFs"
                )));
            }
        }
        let (ta, tb) = (ca.point_map(p, nfull), cb.point_map(p, nfull));
        let bvec: Vec<f64> =
            (0..nfull).map(|g| (0..3).map(|i| axis[i] * (tb[3 + i][g] - ta[3 + i][g])).sum()).collect();
        add_rank_one(&mut b, &s.name, model, &bvec);
    }
    // General springs.
    for s in &spec.general_springs {
        let who = format!("general_spring '{}'", s.name);
        connect(&s.from, &s.to, &who)?;
        finite3(&format!("{who}.at_m"), s.at_m)?;
        require_non_negative(|| format!("{who}.loss_factor"), s.loss_factor)?;
        for i in 0..6 {
            for j in 0..6 {
                require_finite(|| format!("{who}.matrix[{i}][{j}]"), s.matrix[i][j])?;
                if (s.matrix[i][j] - s.matrix[j][i]).abs()
                    > 1e-9 * (s.matrix[i][j].abs() + s.matrix[j][i].abs())
                {
                    return Err(Error::invalid(
                        format!("{who}.matrix"),
                        format!("is not symmetric at [{i}][{j}]"),
                    ));
                }
            }
            if s.matrix[i][i] < 0.0 {
                return Err(Error::invalid(
                    format!("{who}.matrix[{i}][{i}]"),
                    "diagonal stiffness must be >= 0",
                ));
            }
        }
        let ta = carrier(&carriers, &who, &s.from)?.point_map(s.at_m, nfull);
        let tb = carrier(&carriers, &who, &s.to)?.point_map(s.at_m, nfull);
        let d: Vec<Vec<f64>> = (0..6).map(|i| (0..nfull).map(|g| tb[i][g] - ta[i][g]).collect()).collect();
        let f = Complex64::new(1.0, s.loss_factor);
        add_tkt(&mut b.k_const, nfull, &d, 6, |i, j| f * s.matrix[i][j]);
    }
    // Beams.
    for (bm, bn) in spec.beams.iter().zip(beam_nodes.iter_mut()) {
        let who = format!("beam '{}'", bm.name);
        connect(&bm.from, &bm.to, &who)?;
        let mat = bm.material()?;
        let ne = bm.elements;
        for (k, end) in [(0usize, &bm.from), (ne, &bm.to)] {
            let c = carrier(&carriers, &who, end)?;
            bn.nodes[k] = c;
        }
        let axis = sub(bm.to_at_m, bm.from_at_m);
        let len = norm(axis) / ne as f64;
        let ex = unit(&who, axis)?;
        let hint = match bm.orientation {
            Some(o) => unit(&format!("{who}.orientation"), o)?,
            None if ex[2].abs() > 0.99 => [1.0, 0.0, 0.0],
            None => [0.0, 0.0, 1.0],
        };
        let ez0 = cross(ex, hint);
        if norm(ez0) < 1e-6 {
            return Err(Error::invalid(format!("{who}.orientation"), "must not be parallel to the beam"));
        }
        let ez = unit(&who, ez0)?;
        let ey = cross(ez, ex);
        let lam = [ex, ey, ez];
        let (ke, me) = beam_element(&mat, &bm.section, len, bm.added_mass_kg_per_m);
        let eta = mat.loss_factor + bm.added_loss_factor;
        for e in 0..ne {
            let pa = std::array::from_fn(|i| bm.from_at_m[i] + axis[i] * e as f64 / ne as f64);
            let pb = std::array::from_fn(|i| bm.from_at_m[i] + axis[i] * (e + 1) as f64 / ne as f64);
            let mut ends = Vec::new();
            for (k, p) in [(e, pa), (e + 1, pb)] {
                let c = &bn.nodes[k];
                if !c.rotates && (k == 0 || k == ne) && c.index[0] != Some(n) {
                    return Err(Error::unsupported(format!(
                        "{who}: beam ends must be on a body or the ground; '{}' is a point node without rotations",
                        if k == 0 { &bm.from } else { &bm.to }
                    )));
                }
                ends.push(c.point_map(p, nfull));
            }
            // local 12 rows: [u_a, θ_a, u_b, θ_b] in local axes = λ · global
            let mut t: Vec<Vec<f64>> = Vec::with_capacity(12);
            for map in &ends {
                for blk in 0..2 {
                    for r in 0..3 {
                        let row: Vec<f64> = (0..nfull)
                            .map(|g| (0..3).map(|c| lam[r][c] * map[3 * blk + c][g]).sum())
                            .collect();
                        t.push(row);
                    }
                }
            }
            let f = Complex64::new(1.0, eta);
            add_tkt(&mut b.k_const, nfull, &t, 12, |i, j| f * ke[i][j]);
            let mflat: Vec<f64> = me.iter().flatten().copied().collect();
            b.add_mass(&t, &mflat, 12);
        }
    }
    // Bodies/nodes that nothing connects to are caught by the rigid-body check in the model.
    Ok(Assembled {
        n,
        labels,
        mass: b.mass,
        damping: b.damping,
        k_const: b.k_const,
        terms: b.terms,
        springs: b.springs,
        carriers,
    })
}

fn add_rank_one(b: &mut Builder, name: &str, model: StiffnessModel, bvec: &[f64]) {
    let nfull = b.nfull;
    let sparse: Vec<(usize, f64)> =
        bvec.iter().enumerate().filter(|(_, v)| **v != 0.0).map(|(i, v)| (i, *v)).collect();
    b.springs.push(RankOneTerm { name: name.to_string(), model: model.clone(), b: sparse.clone() });
    let c = model.viscous_part();
    if c != 0.0 {
        for (i, &bi) in bvec.iter().enumerate() {
            for (j, &bj) in bvec.iter().enumerate() {
                b.damping[i + j * nfull] += c * bi * bj;
            }
        }
    }
    if model.elastic_is_constant() {
        let k = model.elastic_at(0.0);
        for (i, &bi) in bvec.iter().enumerate() {
            for (j, &bj) in bvec.iter().enumerate() {
                if bi != 0.0 && bj != 0.0 {
                    b.k_const[i + j * nfull] += k * bi * bj;
                }
            }
        }
    } else {
        b.terms.push(RankOneTerm { name: name.to_string(), model, b: sparse });
    }
}

/// 12 × 12 local stiffness and consistent mass of a 3-D Euler–Bernoulli element of length `l`,
/// DOF order [u, v, w, θx, θy, θz] at each end, local x along the beam (Przemieniecki 1968;
/// standard in finite-element texts).
fn beam_element(
    m: &Material,
    s: &Section,
    l: f64,
    added_kg_per_m: f64,
) -> ([[f64; 12]; 12], [[f64; 12]; 12]) {
    let e = m.youngs_modulus_pa;
    let g = m.shear_modulus_pa();
    let a = s.area_m2();
    let (iy, iz) = s.second_moments_m4();
    let j = s.torsion_constant_m4();
    let mut k = [[0.0; 12]; 12];
    let mut set = |i: usize, jj: usize, v: f64| {
        k[i][jj] += v;
        if i != jj {
            k[jj][i] += v;
        }
    };
    let ea = e * a / l;
    set(0, 0, ea);
    set(6, 6, ea);
    set(0, 6, -ea);
    let gj = g * j / l;
    set(3, 3, gj);
    set(9, 9, gj);
    set(3, 9, -gj);
    // bending in x–y plane (v, θz) with I_z
    let (a1, a2, a3, a4) =
        (12.0 * e * iz / l.powi(3), 6.0 * e * iz / l.powi(2), 4.0 * e * iz / l, 2.0 * e * iz / l);
    set(1, 1, a1);
    set(7, 7, a1);
    set(1, 7, -a1);
    set(1, 5, a2);
    set(1, 11, a2);
    set(5, 7, -a2);
    set(7, 11, -a2);
    set(5, 5, a3);
    set(11, 11, a3);
    set(5, 11, a4);
    // bending in x–z plane (w, θy) with I_y; signs flip on the coupling terms
    let (b1, b2, b3, b4) =
        (12.0 * e * iy / l.powi(3), 6.0 * e * iy / l.powi(2), 4.0 * e * iy / l, 2.0 * e * iy / l);
    set(2, 2, b1);
    set(8, 8, b1);
    set(2, 8, -b1);
    set(2, 4, -b2);
    set(2, 10, -b2);
    set(4, 8, b2);
    set(8, 10, b2);
    set(4, 4, b3);
    set(10, 10, b3);
    set(4, 10, b4);
    // consistent mass
    let mu = m.density_kg_m3 * a + added_kg_per_m;
    let mut mm = [[0.0; 12]; 12];
    let mut setm = |i: usize, jj: usize, v: f64| {
        mm[i][jj] += v;
        if i != jj {
            mm[jj][i] += v;
        }
    };
    let c = mu * l / 420.0;
    setm(0, 0, mu * l / 3.0);
    setm(6, 6, mu * l / 3.0);
    setm(0, 6, mu * l / 6.0);
    let rj = m.density_kg_m3 * (iy + iz) * l; // polar mass moment per element (structural part)
    setm(3, 3, rj / 3.0);
    setm(9, 9, rj / 3.0);
    setm(3, 9, rj / 6.0);
    for (v, th, sg) in [(1usize, 5usize, 1.0), (2, 4, -1.0)] {
        let (v2, th2) = (v + 6, th + 6);
        setm(v, v, 156.0 * c);
        setm(v2, v2, 156.0 * c);
        setm(v, v2, 54.0 * c);
        setm(v, th, sg * 22.0 * l * c);
        setm(v2, th2, -sg * 22.0 * l * c);
        setm(v, th2, -sg * 13.0 * l * c);
        setm(v2, th, sg * 13.0 * l * c);
        setm(th, th, 4.0 * l * l * c);
        setm(th2, th2, 4.0 * l * l * c);
        setm(th, th2, -3.0 * l * l * c);
    }
    (k, mm)
}

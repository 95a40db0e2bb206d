//! The generic layer as written in a model file: bodies, nodes, springs, general springs,
//! beams, optics and the wind load, and the whole [`ModelSpec`].

use super::stiffness_spec::{StiffnessSpec, TableSpec, ZenerSpec};
use crate::error::{Error, Result, require_finite, require_non_negative, require_positive};
use crate::footing_impedance::FootingImpedance;
use crate::material::Material;
use crate::section::Section;
use crate::sky::{Equatorial, PierSide};
use crate::stiffness::StiffnessModel;
use serde::{Deserialize, Serialize};

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
    pub half_space: Option<FootingImpedance>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub series: Option<Vec<StiffnessSpec>>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub parallel: Option<Vec<StiffnessSpec>>,
}

impl SpringSpec {
    /// The spring without its stiffness: name, ends, points, direction and axis kept, every
    /// stiffness field at its default.
    pub fn geometry(&self) -> SpringSpec {
        SpringSpec {
            name: self.name.clone(),
            from: self.from.clone(),
            to: self.to.clone(),
            at_m: self.at_m,
            from_at_m: self.from_at_m,
            to_at_m: self.to_at_m,
            direction: self.direction,
            axis: self.axis,
            ..SpringSpec::default()
        }
    }

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
            half_space: self.half_space.clone(),
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
        self.half_space = s.half_space;
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
    /// Pointing by altitude and azimuth (deg). Required unless the pointing is equatorial
    /// (`hour_angle_deg`, `declination_deg`); then left out, or its derived values.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub altitude_deg: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub azimuth_deg: Option<f64>,
    /// Equatorial pointing: hour angle (deg, positive west) ...
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub hour_angle_deg: Option<f64>,
    /// ... and declination (deg).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub declination_deg: Option<f64>,
    /// Site latitude (deg) of an equatorial pointing (a rig gives it in `[mount]`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub latitude_deg: Option<f64>,
    /// Side of the pier the tube is on (German equatorial rigs; default by the hour angle).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub pier_side: Option<PierSide>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub seeing_fwhm_arcsec: Option<f64>,
    /// Rotation of the camera's axes about the line of sight from (azimuth, altitude), or from
    /// (right ascension, declination) for an equatorial pointing (deg).
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

    /// The equatorial pointing, when the optics are pointed by hour angle and declination.
    pub fn equatorial(&self) -> Result<Option<Equatorial>> {
        match (self.hour_angle_deg, self.declination_deg) {
            (None, None) => Ok(None),
            (Some(h), Some(d)) => {
                let lat = self.latitude_deg.ok_or_else(|| {
                    Error::invalid(
                        "optics.latitude_deg",
                        "is required with hour_angle_deg and declination_deg",
                    )
                })?;
                Equatorial::new(lat, h, d).map(Some).map_err(|e| match e {
                    Error::InvalidArgument { name, reason } => {
                        Error::InvalidArgument { name: format!("optics.{name}"), reason }
                    }
                    other => other,
                })
            }
            (Some(_), None) => {
                Err(Error::invalid("optics.declination_deg", "is required with hour_angle_deg"))
            }
            (None, Some(_)) => {
                Err(Error::invalid("optics.hour_angle_deg", "is required with declination_deg"))
            }
        }
    }

    /// Line of sight â and the sensor axes (image_x, image_y): the reference pair (e_az, e_alt),
    /// or (e_RA, e_Dec) for an equatorial pointing, rotated by the camera rotation angle. Call
    /// on validated optics.
    pub fn axes(&self) -> ([f64; 3], [f64; 3], [f64; 3]) {
        let (los, e1, e2) = self.reference_axes();
        let (c, s) =
            (self.camera_rotation_deg.to_radians().cos(), self.camera_rotation_deg.to_radians().sin());
        let ex = std::array::from_fn(|i| c * e1[i] + s * e2[i]);
        let ey = std::array::from_fn(|i| -s * e1[i] + c * e2[i]);
        (los, ex, ey)
    }

    /// Line of sight and the unrotated reference axes: (e_az, e_alt), or (e_RA, e_Dec) for an
    /// equatorial pointing.
    pub fn reference_axes(&self) -> ([f64; 3], [f64; 3], [f64; 3]) {
        if let Ok(Some(q)) = self.equatorial() {
            let (ra, dec) = q.ra_dec_axes();
            return (q.line_of_sight(), ra, dec);
        }
        let (a, h) =
            (self.azimuth_deg.unwrap_or(0.0).to_radians(), self.altitude_deg.unwrap_or(90.0).to_radians());
        let los = [a.sin() * h.cos(), a.cos() * h.cos(), h.sin()];
        let e_az = [a.cos(), -a.sin(), 0.0];
        let e_alt = [-a.sin() * h.sin(), -a.cos() * h.sin(), h.cos()];
        (los, e_az, e_alt)
    }

    pub(crate) fn validate(&self) -> Result<()> {
        require_positive("optics.focal_length_mm", self.focal_length_mm)?;
        require_positive("optics.pixel_um", self.pixel_um)?;
        require_finite("optics.camera_rotation_deg", self.camera_rotation_deg)?;
        let eq = self.equatorial()?;
        if eq.is_none() {
            for (n, v, other) in [
                ("optics.altitude_deg", self.altitude_deg, "azimuth_deg"),
                ("optics.azimuth_deg", self.azimuth_deg, "altitude_deg"),
            ] {
                if v.is_none() {
                    return Err(Error::invalid(
                        n,
                        format!("is required (with {other}; or point by hour_angle_deg and declination_deg)"),
                    ));
                }
            }
            if self.latitude_deg.is_some() {
                return Err(Error::invalid(
                    "optics.latitude_deg",
                    "goes with hour_angle_deg and declination_deg",
                ));
            }
            if self.pier_side.is_some() {
                return Err(Error::invalid(
                    "optics.pier_side",
                    "goes with hour_angle_deg and declination_deg",
                ));
            }
        }
        if let Some(a) = self.azimuth_deg {
            require_finite("optics.azimuth_deg", a)?;
        }
        if let Some(h) = self.altitude_deg {
            require_finite("optics.altitude_deg", h)?;
            if !(-90.0..=90.0).contains(&h) {
                return Err(Error::invalid("optics.altitude_deg", format!("must lie in [-90, 90], got {h}")));
            }
        }
        if let Some(q) = eq {
            // Altitude and azimuth next to an equatorial pointing are its derived values (as the
            // rig layer writes them); they must agree with it.
            let (qh, qa) = q.alt_az();
            let bad_h = self.altitude_deg.is_some_and(|h| (h - qh).abs() > 1e-6);
            let bad_a = self.azimuth_deg.is_some_and(|a| {
                qh.abs() < 90.0 - 1e-6 && ((a - qa + 540.0).rem_euclid(360.0) - 180.0).abs() > 1e-6
            });
            if bad_h || bad_a {
                return Err(Error::invalid(
                    "optics.altitude_deg",
                    format!(
                        "altitude/azimuth ({:?}, {:?}) disagree with the hour angle and declination (altitude {qh:.6}, azimuth {qa:.6}); give one pointing",
                        self.altitude_deg, self.azimuth_deg
                    ),
                ));
            }
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

/// Where and how wind loads the model: one or more parts, each a projected area with a drag
/// coefficient at a centre of pressure on a body, pushed along its own force direction. A gust u
/// on the mean speed Ū adds ρ Ū u C_d A along `direction` to each part (linearised drag), all
/// parts in phase. Written by hand as one part (`body`, `centre_of_pressure_m`, `direction`,
/// `area_m2`, `drag_coefficient`) or as a list (`[[wind.part]]`); a rig file derives the list
/// from its parts (see `crate::rig`).
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct WindLoadSpec {
    /// One-part form: the loaded body ...
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub body: Option<String>,
    /// ... the centre of pressure (m) ...
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub centre_of_pressure_m: Option<[f64; 3]>,
    /// ... the direction the wind blows towards (any length; normalised) ...
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub direction: Option<[f64; 3]>,
    /// ... the projected area (m²) ...
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub area_m2: Option<f64>,
    /// ... and its drag coefficient.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub drag_coefficient: Option<f64>,
    /// The azimuth the wind blows from (deg from north through east), as forecasts give it;
    /// written by the rig layer for reference (each part carries its own force direction).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub from_azimuth_deg: Option<f64>,
    /// List form.
    #[serde(default, rename = "part", skip_serializing_if = "Vec::is_empty")]
    pub parts: Vec<WindPartSpec>,
}

/// One loaded part: the fluctuating force ρ Ū u C_d A acts along `direction` at
/// `centre_of_pressure_m` on `body`.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct WindPartSpec {
    /// Free label.
    pub name: String,
    pub body: String,
    pub centre_of_pressure_m: [f64; 3],
    /// Direction of the part's drag force (any length; normalised). For a cylinder at an angle
    /// to the flow it is the flow's component across the axis, not the wind direction.
    pub direction: [f64; 3],
    /// Area (m²) such that the force is ½ ρ U² C_d A: a cylinder's side D L sin²θ (cross-flow
    /// principle), an end disc (π D²/4) cos²θ.
    pub area_m2: f64,
    pub drag_coefficient: f64,
}

impl WindLoadSpec {
    /// The parts, from either form, validated (finite, non-negative areas, positive drag
    /// coefficients, non-zero directions normalised); errors name the field.
    pub fn parts(&self) -> Result<Vec<WindPartSpec>> {
        let single = self.body.is_some()
            || self.centre_of_pressure_m.is_some()
            || self.direction.is_some()
            || self.area_m2.is_some()
            || self.drag_coefficient.is_some();
        let parts = match (single, self.parts.is_empty()) {
            (true, false) => {
                return Err(Error::invalid(
                    "wind",
                    "give either body/centre_of_pressure_m/direction/area_m2/drag_coefficient or [[wind.part]] entries, not both",
                ));
            }
            (false, true) => {
                return Err(Error::invalid(
                    "wind",
                    "has no parts (give body, area_m2, ... or [[wind.part]])",
                ));
            }
            (true, true) => {
                let need = |k: &str| Error::invalid(format!("wind.{k}"), "is required");
                vec![WindPartSpec {
                    name: "wind".into(),
                    body: self.body.clone().ok_or_else(|| need("body"))?,
                    centre_of_pressure_m: self
                        .centre_of_pressure_m
                        .ok_or_else(|| need("centre_of_pressure_m"))?,
                    direction: self.direction.ok_or_else(|| need("direction"))?,
                    area_m2: self.area_m2.ok_or_else(|| need("area_m2"))?,
                    drag_coefficient: self.drag_coefficient.ok_or_else(|| need("drag_coefficient"))?,
                }]
            }
            (false, false) => self.parts.clone(),
        };
        let mut out = Vec::with_capacity(parts.len());
        for (k, mut p) in parts.into_iter().enumerate() {
            let f = if self.parts.is_empty() { "wind".to_string() } else { format!("wind.part[{k}]") };
            require_non_negative(|| format!("{f}.area_m2"), p.area_m2)?;
            require_positive(|| format!("{f}.drag_coefficient"), p.drag_coefficient)?;
            for x in p.centre_of_pressure_m {
                require_finite(|| format!("{f}.centre_of_pressure_m"), x)?;
            }
            let l = p.direction.iter().map(|x| x * x).sum::<f64>().sqrt();
            if !(l.is_finite() && l > 1e-12) {
                return Err(Error::invalid(format!("{f}.direction"), "must be a non-zero vector"));
            }
            p.direction = p.direction.map(|x| x / l);
            out.push(p);
        }
        if out.iter().all(|p| p.area_m2 * p.drag_coefficient <= 0.0) {
            return Err(Error::invalid("wind", "every part has zero area"));
        }
        Ok(out)
    }

    /// Σ C_d A over the parts (m²): the scale of the reference drag force ρ Ū u Σ C_d A.
    pub fn drag_area_m2(&self) -> Result<f64> {
        Ok(self.parts()?.iter().map(|p| p.drag_coefficient * p.area_m2).sum())
    }

    /// The C_d A-weighted height of the parts' centres of pressure (m above the model's z = 0,
    /// the surface the rig stands on): where the wind's speed is taken.
    pub fn load_height_m(&self) -> Result<f64> {
        let parts = self.parts()?;
        let cda: f64 = parts.iter().map(|p| p.drag_coefficient * p.area_m2).sum();
        Ok(parts.iter().map(|p| p.drag_coefficient * p.area_m2 * p.centre_of_pressure_m[2]).sum::<f64>()
            / cda)
    }

    /// Σ A over the parts (m²), the size that sets the aerodynamic admittance.
    pub fn total_area_m2(&self) -> Result<f64> {
        Ok(self.parts()?.iter().map(|p| p.area_m2).sum())
    }

    /// Mean-wind force (N) and moment about `about_m` (N·m) at speed `speed_m_s` and air
    /// density `rho`: Σ ½ ρ U² C_d A ê and Σ (r − about) × ½ ρ U² C_d A ê.
    pub fn resultant(&self, rho: f64, speed_m_s: f64, about_m: [f64; 3]) -> Result<([f64; 3], [f64; 3])> {
        require_positive("air_density_kg_m3", rho)?;
        require_non_negative("speed_m_s", speed_m_s)?;
        let q = 0.5 * rho * speed_m_s * speed_m_s;
        let (mut f, mut m) = ([0.0; 3], [0.0; 3]);
        for p in self.parts()? {
            let fi = p.direction.map(|d| q * p.drag_coefficient * p.area_m2 * d);
            let r: [f64; 3] = std::array::from_fn(|i| p.centre_of_pressure_m[i] - about_m[i]);
            let mi = [r[1] * fi[2] - r[2] * fi[1], r[2] * fi[0] - r[0] * fi[2], r[0] * fi[1] - r[1] * fi[0]];
            for i in 0..3 {
                f[i] += fi[i];
                m[i] += mi[i];
            }
        }
        Ok((f, m))
    }
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
    /// How ground motion travels under the rig: with it, ground PSDs also tilt and twist the
    /// ground ([`crate::surface_waves`]).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub ground_waves: Option<crate::surface_waves::GroundWaves>,
}

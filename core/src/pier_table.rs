//! Pier sizing table: tilt at the top under a horizontal load, top deflection, and the first
//! bending and torsion frequencies of a round tube column over outer diameter × wall × height ×
//! material, each from closed-form cantilever formulas and from the project's own beam model.
//!
//! Formulas (column clamped to a footing that rocks on a rotational spring k_r, load F at the
//! top, height L, bending stiffness EI, torsion stiffness GJ):
//! - tilt θ = F L²/(2EI) + F L/k_r; deflection δ = F L³/(3EI) + F L²/k_r (cantilever tip load,
//!   Roark's Formulas for Stress and Strain, table of beam deflections, from memory: verify;
//!   plus the rigid rotation of the base).
//! - bending f_b = (1/2π)√(k/(M + m_eff)) with k = F/δ and m_eff from Rayleigh's method on the
//!   static deflection shape: for the bending shape alone m_eff = (33/140)·m_col (the classic
//!   cantilever-with-tip-mass result, Blevins, Formulas for Natural Frequency and Mode Shape,
//!   table 8-1, from memory: verify); with rocking the shape adds the rigid rotation x/L and
//!   m_eff = m_col (33/140 δ_b² + 11/20 δ_b δ_r + 1/3 δ_r²)/(δ_b + δ_r)².
//! - torsion f_t = (1/2π)√((GJ/L)/(J_top + I_col/3)), Rayleigh's method on a linear twist, with
//!   I_col = ρ J L the column's own polar mass moment. The fill adds mass in bending only (as the
//!   beam model treats added mass); the footing is rigid in torsion.
//!
//! The model rows come from a generic [`ModelSpec`]: the top mass as a body, the column as a
//! 16-element Euler–Bernoulli beam, the footing as a body held in translation and twist on two
//! rocking springs. Loss factors are set to zero there (the table is about stiffness and
//! frequency); the static tilt is the FRF of a unit top force at 1e-4 of the first bending
//! frequency (inertia changes it by about 1e-8), the frequencies come from [`Model::modes`].

use crate::assembly::{BeamSpec, BodySpec, Dof, GROUND, ModelSpec, SpringSpec};
use crate::error::{Error, Result, require_non_negative, require_positive};
use crate::material::Material;
use crate::model::Model;
use crate::section::Section;
use crate::soil::Soil;
use std::f64::consts::PI;

/// Horizontal load at the pier top (N) used by a pier-design practice to compare piers
/// (common practice, no source).
pub const DEFAULT_LOAD_N: f64 = 22.0;
/// Default top mass, mount plus payload (kg): a placeholder of ours for a mid-size rig; give
/// your own.
pub const DEFAULT_TOP_MASS_KG: f64 = 40.0;
/// Default moment of inertia of the top mass about the vertical axis (kg·m²): a placeholder of
/// ours (40 kg at 0.16 m radius of gyration); give your own.
pub const DEFAULT_TOP_INERTIA_KGM2: f64 = 1.0;
/// Beam elements of the model column.
pub const MODEL_ELEMENTS: usize = 16;
/// Largest number of rows (combinations) accepted.
pub const MAX_ROWS: usize = 2000;
const ARCSEC_PER_RAD: f64 = 206_264.806_247_096_36;

/// What the column stands on.
#[derive(Debug, Clone, PartialEq)]
pub enum PierFooting {
    /// Clamped to rigid ground (no rocking).
    Rigid,
    /// A footing rocking on a rotational spring (N·m/rad, each horizontal axis).
    Rocking { stiffness_nm_per_rad: f64 },
    /// A round surface footing of `diameter_m` on a half-space soil: rocking stiffness
    /// 8GR³/(3(1−ν)) (see [`crate::soil`]).
    Soil { soil: Soil, diameter_m: f64 },
}

impl PierFooting {
    /// The rocking stiffness (N·m/rad), `None` for a rigid base.
    pub fn rocking_nm_per_rad(&self) -> Result<Option<f64>> {
        match self {
            PierFooting::Rigid => Ok(None),
            PierFooting::Rocking { stiffness_nm_per_rad } => {
                Ok(Some(require_positive("rocking_nm_per_rad", *stiffness_nm_per_rad)?))
            }
            PierFooting::Soil { soil, diameter_m } => {
                soil.validate("soil")?;
                let d = require_positive("footing_diameter_m", *diameter_m)?;
                Ok(Some(soil.contact_stiffness(d / 2.0).rocking))
            }
        }
    }
}

/// The table's inputs: every combination of the four lists makes one row.
#[derive(Debug, Clone, PartialEq)]
pub struct PierTableSpec {
    pub outer_diameters_m: Vec<f64>,
    pub walls_m: Vec<f64>,
    pub heights_m: Vec<f64>,
    /// Material preset names (see [`crate::material::MATERIAL_PRESETS`]).
    pub materials: Vec<String>,
    /// Density of a fill inside the tube (kg/m³), or none.
    pub fill_density_kg_m3: Option<f64>,
    /// Horizontal load at the top (N), default [`DEFAULT_LOAD_N`].
    pub load_n: f64,
    pub top_mass_kg: f64,
    /// Moment of inertia of the top mass about the vertical axis (kg·m²).
    pub top_inertia_kgm2: f64,
    pub footing: PierFooting,
}

impl PierTableSpec {
    /// A spec with the defaults for load, top mass and inertia, no fill, rigid base.
    pub fn new(
        outer_diameters_m: Vec<f64>,
        walls_m: Vec<f64>,
        heights_m: Vec<f64>,
        materials: Vec<String>,
    ) -> Self {
        PierTableSpec {
            outer_diameters_m,
            walls_m,
            heights_m,
            materials,
            fill_density_kg_m3: None,
            load_n: DEFAULT_LOAD_N,
            top_mass_kg: DEFAULT_TOP_MASS_KG,
            top_inertia_kgm2: DEFAULT_TOP_INERTIA_KGM2,
            footing: PierFooting::Rigid,
        }
    }
}

/// One column of the table (one combination), formula and model side by side.
#[derive(Debug, Clone, PartialEq)]
pub struct PierRow {
    pub outer_diameter_m: f64,
    pub wall_m: f64,
    pub height_m: f64,
    pub material: String,
    /// Fill density (kg/m³, 0 without fill).
    pub fill_density_kg_m3: f64,
    /// EI (N·m²).
    pub bending_stiffness_nm2: f64,
    /// GJ (N·m²).
    pub torsion_stiffness_nm2: f64,
    /// Column mass with its fill (kg).
    pub column_mass_kg: f64,
    /// Rocking stiffness of the footing (N·m/rad; infinite for a rigid base).
    pub rocking_nm_per_rad: f64,
    /// Tilt at the top from the column's bending, F L²/(2EI) (arcsec).
    pub tilt_column_arcsec: f64,
    /// Tilt at the top from the footing's rocking, F L/k_r (arcsec).
    pub tilt_rocking_arcsec: f64,
    /// Total tilt (arcsec), formula.
    pub tilt_arcsec: f64,
    /// Top deflection (m), formula.
    pub deflection_m: f64,
    /// First bending frequency (Hz), Rayleigh formula.
    pub bending_hz: f64,
    /// First torsion frequency (Hz), Rayleigh formula.
    pub torsion_hz: f64,
    /// Tilt (arcsec) from the beam model's static response.
    pub model_tilt_arcsec: f64,
    /// Top deflection (m) from the beam model.
    pub model_deflection_m: f64,
    /// First bending frequency (Hz) from the beam model's modes.
    pub model_bending_hz: f64,
    /// First torsion frequency (Hz) from the beam model's modes.
    pub model_torsion_hz: f64,
}

/// One combination, validated.
struct Case<'a> {
    od: f64,
    wall: f64,
    height: f64,
    material_name: &'a str,
    material: Material,
    fill: f64,
}

impl Case<'_> {
    fn section(&self) -> Section {
        Section::Tube { outer_diameter_m: self.od, wall_m: self.wall }
    }
    /// Fill mass per length (kg/m): ρ_fill (π/4) D_i².
    fn fill_kg_per_m(&self) -> f64 {
        let di = self.od - 2.0 * self.wall;
        self.fill * PI / 4.0 * di * di
    }
}

/// Build the table: one row per (outer diameter, wall, height, material), in that nesting order
/// (outer diameter slowest).
pub fn pier_table(spec: &PierTableSpec) -> Result<Vec<PierRow>> {
    let lists = [
        ("outer_diameters_m", &spec.outer_diameters_m),
        ("walls_m", &spec.walls_m),
        ("heights_m", &spec.heights_m),
    ];
    for (name, v) in lists {
        if v.is_empty() {
            return Err(Error::invalid(name, "is empty"));
        }
        for (i, x) in v.iter().enumerate() {
            require_positive(|| format!("{name}[{i}]"), *x)?;
        }
    }
    if spec.materials.is_empty() {
        return Err(Error::invalid("materials", "is empty"));
    }
    let rows =
        spec.outer_diameters_m.len() * spec.walls_m.len() * spec.heights_m.len() * spec.materials.len();
    if rows > MAX_ROWS {
        return Err(Error::TooLarge { what: "pier table rows".into(), value: rows, limit: MAX_ROWS });
    }
    let fill = match spec.fill_density_kg_m3 {
        Some(r) => require_non_negative("fill_density_kg_m3", r)?,
        None => 0.0,
    };
    require_positive("load_n", spec.load_n)?;
    require_positive("top_mass_kg", spec.top_mass_kg)?;
    require_positive("top_inertia_kgm2", spec.top_inertia_kgm2)?;
    let k_rock = spec.footing.rocking_nm_per_rad()?;
    let materials: Vec<Material> =
        spec.materials.iter().map(|n| Material::preset(n)).collect::<Result<_>>()?;
    let mut out = Vec::with_capacity(rows);
    for &od in &spec.outer_diameters_m {
        for &wall in &spec.walls_m {
            if 2.0 * wall > od {
                return Err(Error::invalid(
                    "walls_m",
                    format!("wall {wall} m is more than half the outer diameter {od} m"),
                ));
            }
            for &height in &spec.heights_m {
                for (name, mat) in spec.materials.iter().zip(&materials) {
                    let case = Case { od, wall, height, material_name: name, material: mat.clone(), fill };
                    out.push(row(&case, spec, k_rock)?);
                }
            }
        }
    }
    Ok(out)
}

fn row(c: &Case, spec: &PierTableSpec, k_rock: Option<f64>) -> Result<PierRow> {
    let s = c.section();
    let (l, f) = (c.height, spec.load_n);
    let ei = c.material.youngs_modulus_pa * s.second_moments_m4().0;
    let gj = c.material.shear_modulus_pa() * s.torsion_constant_m4();
    let m_col = (c.material.density_kg_m3 * s.area_m2() + c.fill_kg_per_m()) * l;
    let theta_b = f * l * l / (2.0 * ei);
    let theta_r = k_rock.map_or(0.0, |k| f * l / k);
    let d_b = f * l.powi(3) / (3.0 * ei);
    let d_r = theta_r * l;
    let delta = d_b + d_r;
    let m_eff =
        m_col * (33.0 / 140.0 * d_b * d_b + 11.0 / 20.0 * d_b * d_r + d_r * d_r / 3.0) / (delta * delta);
    let bending_hz = (f / delta / (spec.top_mass_kg + m_eff)).sqrt() / (2.0 * PI);
    let i_col = c.material.density_kg_m3 * s.torsion_constant_m4() * l;
    let torsion_hz = (gj / l / (spec.top_inertia_kgm2 + i_col / 3.0)).sqrt() / (2.0 * PI);
    let (model_tilt, model_defl, model_b, model_t) = model_values(c, spec, k_rock, bending_hz)?;
    Ok(PierRow {
        outer_diameter_m: c.od,
        wall_m: c.wall,
        height_m: l,
        material: c.material_name.to_string(),
        fill_density_kg_m3: c.fill,
        bending_stiffness_nm2: ei,
        torsion_stiffness_nm2: gj,
        column_mass_kg: m_col,
        rocking_nm_per_rad: k_rock.unwrap_or(f64::INFINITY),
        tilt_column_arcsec: theta_b * ARCSEC_PER_RAD,
        tilt_rocking_arcsec: theta_r * ARCSEC_PER_RAD,
        tilt_arcsec: (theta_b + theta_r) * ARCSEC_PER_RAD,
        deflection_m: delta,
        bending_hz,
        torsion_hz,
        model_tilt_arcsec: model_tilt * ARCSEC_PER_RAD,
        model_deflection_m: model_defl,
        model_bending_hz: model_b,
        model_torsion_hz: model_t,
    })
}

/// Column names of [`csv_text`], in order.
pub const CSV_COLUMNS: [&str; 19] = [
    "outer_diameter_m",
    "wall_m",
    "height_m",
    "material",
    "fill_density_kg_m3",
    "bending_stiffness_nm2",
    "torsion_stiffness_nm2",
    "column_mass_kg",
    "rocking_nm_per_rad",
    "tilt_column_arcsec",
    "tilt_rocking_arcsec",
    "tilt_arcsec",
    "deflection_m",
    "bending_hz",
    "torsion_hz",
    "model_tilt_arcsec",
    "model_deflection_m",
    "model_bending_hz",
    "model_torsion_hz",
];

/// The rows as CSV, one header line then one line per row (full precision; a rigid base's
/// rocking stiffness is written `inf`).
pub fn csv_text(rows: &[PierRow]) -> String {
    let mut s = CSV_COLUMNS.join(",");
    s.push('\n');
    for r in rows {
        let v = [
            r.bending_stiffness_nm2,
            r.torsion_stiffness_nm2,
            r.column_mass_kg,
            r.rocking_nm_per_rad,
            r.tilt_column_arcsec,
            r.tilt_rocking_arcsec,
            r.tilt_arcsec,
            r.deflection_m,
            r.bending_hz,
            r.torsion_hz,
            r.model_tilt_arcsec,
            r.model_deflection_m,
            r.model_bending_hz,
            r.model_torsion_hz,
        ];
        s.push_str(&format!(
            "{},{},{},{},{}",
            r.outer_diameter_m, r.wall_m, r.height_m, r.material, r.fill_density_kg_m3
        ));
        for x in v {
            s.push_str(&format!(",{x}"));
        }
        s.push('\n');
    }
    s
}

/// The generic model of one combination (loss factors zero).
pub fn pier_model(
    spec: &PierTableSpec,
    outer_diameter_m: f64,
    wall_m: f64,
    height_m: f64,
    material: &str,
) -> Result<Model> {
    let k_rock = spec.footing.rocking_nm_per_rad()?;
    let case = Case {
        od: outer_diameter_m,
        wall: wall_m,
        height: height_m,
        material_name: material,
        material: Material::preset(material)?,
        fill: spec.fill_density_kg_m3.unwrap_or(0.0),
    };
    build_model(&case, spec, k_rock)
}

fn build_model(c: &Case, spec: &PierTableSpec, k_rock: Option<f64>) -> Result<Model> {
    let l = c.height;
    // A free rotation needs an inertia: a negligible one stands for the point mass of the formulas.
    let tiny = 1e-9 * spec.top_mass_kg * l * l;
    let mut m = ModelSpec::default();
    m.bodies.push(BodySpec {
        name: "top".into(),
        mass_kg: spec.top_mass_kg,
        cg_m: [0.0, 0.0, l],
        inertia_kgm2: [tiny, tiny, spec.top_inertia_kgm2],
        products_kgm2: [0.0; 3],
        dofs: Dof::ALL.to_vec(),
    });
    let base = match k_rock {
        None => GROUND.to_string(),
        Some(k) => {
            // Held in translation, so its mass does not enter; its inertia is negligible.
            m.bodies.push(BodySpec {
                name: "footing".into(),
                mass_kg: spec.top_mass_kg,
                cg_m: [0.0; 3],
                inertia_kgm2: [tiny, tiny, 0.0],
                products_kgm2: [0.0; 3],
                dofs: vec![Dof::Rx, Dof::Ry],
            });
            for (name, axis) in [("rocking_x", [1.0, 0.0, 0.0]), ("rocking_y", [0.0, 1.0, 0.0])] {
                m.torsion_springs.push(SpringSpec {
                    name: name.into(),
                    from: GROUND.into(),
                    to: "footing".into(),
                    at_m: Some([0.0; 3]),
                    axis: Some(axis),
                    stiffness_nm_per_rad: Some(k),
                    ..SpringSpec::default()
                });
            }
            "footing".to_string()
        }
    };
    let mut mat = c.material.clone();
    mat.loss_factor = 0.0;
    m.beams.push(BeamSpec {
        name: "column".into(),
        from: base,
        to: "top".into(),
        from_at_m: [0.0; 3],
        to_at_m: [0.0, 0.0, l],
        section: c.section(),
        material: None,
        material_properties: Some(mat),
        elements: MODEL_ELEMENTS,
        added_mass_kg_per_m: c.fill_kg_per_m(),
        added_loss_factor: 0.0,
        orientation: None,
    });
    Model::from_spec(&m)
}

/// (tilt rad, deflection m, first bending Hz, first torsion Hz) from the model.
fn model_values(
    c: &Case,
    spec: &PierTableSpec,
    k_rock: Option<f64>,
    bending_hz: f64,
) -> Result<(f64, f64, f64, f64)> {
    let model = build_model(c, spec, k_rock)?;
    let frf = model.frf(&[1e-4 * bending_hz], &["force:top:x"], &["top:ry", "top:x"])?;
    let tilt = frf.data[[0, 0, 0]].re * spec.load_n;
    let defl = frf.data[[0, 1, 0]].re * spec.load_n;
    let modes = model.modes()?;
    let mass = model.mass_matrix();
    let labels = model.dof_labels();
    let (mut bend, mut twist) = (None, None);
    for (j, &fj) in modes.frequency_hz.iter().enumerate() {
        let (mut total, mut b, mut t) = (0.0, 0.0, 0.0);
        for (i, lab) in labels.iter().enumerate() {
            let e = modes.shapes[[i, j]].powi(2) * mass[[i, i]];
            total += e;
            match lab.dof {
                Dof::X | Dof::Y | Dof::Rx | Dof::Ry => b += e,
                Dof::Rz => t += e,
                Dof::Z => {}
            }
        }
        if bend.is_none() && b > 0.5 * total {
            bend = Some(fj);
        }
        if twist.is_none() && t > 0.5 * total {
            twist = Some(fj);
        }
    }
    let missing = |what: &str| Error::unsupported(format!("the pier model has no {what} mode"));
    Ok((tilt, defl, bend.ok_or_else(|| missing("bending"))?, twist.ok_or_else(|| missing("torsion"))?))
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn spec() -> PierTableSpec {
        PierTableSpec::new(
            vec![0.1143, 0.1683, 0.2191],
            vec![0.006],
            vec![1.0, 1.3],
            vec!["steel-s235".into(), "aluminium-6061-t6".into()],
        )
    }

    /// Independent closed forms: cantilever tip load, θ = F L²/(2EI) + F L/k_r.
    fn tilt_formula(od: f64, t: f64, l: f64, e: f64, f: f64, k_r: Option<f64>) -> (f64, f64) {
        let di = od - 2.0 * t;
        let i = PI * (od.powi(4) - di.powi(4)) / 64.0;
        let rock = k_r.map_or(0.0, |k| f * l / k);
        let theta = f * l * l / (2.0 * e * i) + rock;
        let delta = f * l.powi(3) / (3.0 * e * i) + rock * l;
        (theta * 206_264.806_247_096_36, delta)
    }

    #[test]
    fn tilt_matches_cantilever_formula_and_model() {
        for footing in [PierFooting::Rigid, PierFooting::Rocking { stiffness_nm_per_rad: 2.0e6 }] {
            let mut s = spec();
            s.footing = footing.clone();
            s.fill_density_kg_m3 = Some(1600.0);
            let rows = pier_table(&s).unwrap();
            assert_eq!(rows.len(), 12);
            let k_r = match footing {
                PierFooting::Rocking { stiffness_nm_per_rad } => Some(stiffness_nm_per_rad),
                _ => None,
            };
            for r in &rows {
                let e = if r.material == "steel-s235" { 210e9 } else { 68.9e9 };
                let (theta, delta) = tilt_formula(r.outer_diameter_m, r.wall_m, r.height_m, e, 22.0, k_r);
                assert_relative_eq!(r.tilt_arcsec, theta, max_relative = 1e-6);
                assert_relative_eq!(r.deflection_m, delta, max_relative = 1e-6);
                // The beam model's own static solution (cubic elements are exact for a tip load).
                assert_relative_eq!(r.model_tilt_arcsec, theta, max_relative = 1e-6);
                assert_relative_eq!(r.model_deflection_m, delta, max_relative = 1e-6);
            }
        }
    }

    #[test]
    fn soil_footing_uses_half_space_rocking() {
        let mut s = spec();
        let soil = Soil::preset("lawn").unwrap();
        s.footing = PierFooting::Soil { soil: soil.clone(), diameter_m: 0.8 };
        let rows = pier_table(&s).unwrap();
        // 8 G R³ / (3(1 − ν)), Arya, O'Neill & Pincus 1979 (see crate::soil).
        let k = 8.0 * 20e6 * 0.4_f64.powi(3) / (3.0 * (1.0 - 0.33));
        let r = &rows[0];
        assert_relative_eq!(r.rocking_nm_per_rad, k, max_relative = 1e-12);
        assert_relative_eq!(
            r.tilt_rocking_arcsec,
            22.0 * r.height_m / k * 206_264.806_247_096_36,
            max_relative = 1e-9
        );
        assert_relative_eq!(r.model_tilt_arcsec, r.tilt_arcsec, max_relative = 1e-6);
    }

    #[test]
    fn frequencies_near_the_model() {
        // Rayleigh's estimates lie above the exact values by well under 1 % for these shapes; the
        // 16-element model converges from above too (consistent mass).
        let mut s = spec();
        s.footing = PierFooting::Rocking { stiffness_nm_per_rad: 5.0e5 };
        for r in pier_table(&s).unwrap() {
            assert_relative_eq!(r.model_bending_hz, r.bending_hz, max_relative = 5e-3);
            assert_relative_eq!(r.model_torsion_hz, r.torsion_hz, max_relative = 5e-3);
        }
    }

    #[test]
    fn csv_has_one_line_per_row_and_every_column() {
        let rows = pier_table(&spec()).unwrap();
        let text = csv_text(&rows);
        let lines: Vec<&str> = text.lines().collect();
        assert_eq!(lines.len(), rows.len() + 1);
        assert_eq!(lines[0].split(',').count(), CSV_COLUMNS.len());
        for (l, r) in lines[1..].iter().zip(&rows) {
            let v: Vec<&str> = l.split(',').collect();
            assert_eq!(v.len(), CSV_COLUMNS.len());
            assert_eq!(v[3], r.material);
            assert_eq!(v[8], "inf");
            assert_eq!(v[11].parse::<f64>().unwrap(), r.tilt_arcsec);
        }
    }

    #[test]
    fn bad_inputs_are_named() {
        let mut s = spec();
        s.walls_m = vec![0.07];
        assert!(pier_table(&s).unwrap_err().to_string().contains("walls_m"));
        let mut s = spec();
        s.heights_m = vec![1.0, -1.0];
        assert!(pier_table(&s).unwrap_err().to_string().contains("heights_m[1]"));
        let mut s = spec();
        s.materials = vec!["cheese".into()];
        assert!(pier_table(&s).unwrap_err().to_string().contains("cheese"));
        let mut s = spec();
        s.outer_diameters_m.clear();
        assert!(pier_table(&s).unwrap_err().to_string().contains("outer_diameters_m"));
        let mut s = spec();
        s.load_n = 0.0;
        assert!(pier_table(&s).unwrap_err().to_string().contains("load_n"));
        let mut s = spec();
        s.footing = PierFooting::Rocking { stiffness_nm_per_rad: f64::NAN };
        assert!(pier_table(&s).unwrap_err().to_string().contains("rocking_nm_per_rad"));
        let mut s = spec();
        s.fill_density_kg_m3 = Some(-5.0);
        assert!(pier_table(&s).unwrap_err().to_string().contains("fill_density_kg_m3"));
    }
}

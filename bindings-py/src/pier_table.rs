//! `pier_table`: the core's pier sizing table as a dict of columns (numpy arrays, and a list of
//! material names).

use crate::errors::{IntoPyResult, to_pyerr};
use numpy::IntoPyArray;
use pyo3::prelude::*;
use pyo3::types::PyDict;
use stillsky::Error;
use stillsky::pier_table::{
    DEFAULT_LOAD_N, DEFAULT_TOP_INERTIA_KGM2, DEFAULT_TOP_MASS_KG, PierFooting, PierRow, PierTableSpec,
};
use stillsky::soil::Soil;

/// A named numeric column of the table.
type Column = fn(&PierRow) -> f64;

#[pyfunction]
#[pyo3(signature = (
    outer_diameter_m,
    wall_m,
    height_m,
    material = vec!["steel-s235".to_string()],
    *,
    fill_density_kg_m3 = None,
    load_n = DEFAULT_LOAD_N,
    top_mass_kg = DEFAULT_TOP_MASS_KG,
    top_inertia_kgm2 = DEFAULT_TOP_INERTIA_KGM2,
    rocking_nm_per_rad = None,
    soil = None,
    footing_diameter_m = None,
))]
#[allow(clippy::too_many_arguments)]
pub fn pier_table<'py>(
    py: Python<'py>,
    outer_diameter_m: Vec<f64>,
    wall_m: Vec<f64>,
    height_m: Vec<f64>,
    material: Vec<String>,
    fill_density_kg_m3: Option<f64>,
    load_n: f64,
    top_mass_kg: f64,
    top_inertia_kgm2: f64,
    rocking_nm_per_rad: Option<f64>,
    soil: Option<String>,
    footing_diameter_m: Option<f64>,
) -> PyResult<Bound<'py, PyDict>> {
    let footing = match (rocking_nm_per_rad, soil, footing_diameter_m) {
        (None, None, None) => PierFooting::Rigid,
        (Some(k), None, None) => PierFooting::Rocking { stiffness_nm_per_rad: k },
        (None, Some(s), Some(d)) => PierFooting::Soil { soil: Soil::preset(&s).py_err()?, diameter_m: d },
        (Some(_), _, _) => {
            return Err(to_pyerr(Error::invalid(
                "rocking_nm_per_rad",
                "give either rocking_nm_per_rad or soil with footing_diameter_m, not both",
            )));
        }
        (None, Some(_), None) => {
            return Err(to_pyerr(Error::invalid("footing_diameter_m", "is required with soil")));
        }
        (None, None, Some(_)) => {
            return Err(to_pyerr(Error::invalid("soil", "is required with footing_diameter_m")));
        }
    };
    let mut spec = PierTableSpec::new(outer_diameter_m, wall_m, height_m, material);
    spec.fill_density_kg_m3 = fill_density_kg_m3;
    spec.load_n = load_n;
    spec.top_mass_kg = top_mass_kg;
    spec.top_inertia_kgm2 = top_inertia_kgm2;
    spec.footing = footing;
    let rows = py.detach(|| stillsky::pier_table::pier_table(&spec)).py_err()?;
    let d = PyDict::new(py);
    let col = |f: fn(&PierRow) -> f64| rows.iter().map(f).collect::<Vec<f64>>();
    let columns: [(&str, Column); 18] = [
        ("outer_diameter_m", |r| r.outer_diameter_m),
        ("wall_m", |r| r.wall_m),
        ("height_m", |r| r.height_m),
        ("fill_density_kg_m3", |r| r.fill_density_kg_m3),
        ("bending_stiffness_nm2", |r| r.bending_stiffness_nm2),
        ("torsion_stiffness_nm2", |r| r.torsion_stiffness_nm2),
        ("column_mass_kg", |r| r.column_mass_kg),
        ("rocking_nm_per_rad", |r| r.rocking_nm_per_rad),
        ("tilt_column_arcsec", |r| r.tilt_column_arcsec),
        ("tilt_rocking_arcsec", |r| r.tilt_rocking_arcsec),
        ("tilt_arcsec", |r| r.tilt_arcsec),
        ("deflection_m", |r| r.deflection_m),
        ("bending_hz", |r| r.bending_hz),
        ("torsion_hz", |r| r.torsion_hz),
        ("model_tilt_arcsec", |r| r.model_tilt_arcsec),
        ("model_deflection_m", |r| r.model_deflection_m),
        ("model_bending_hz", |r| r.model_bending_hz),
        ("model_torsion_hz", |r| r.model_torsion_hz),
    ];
    for (name, f) in columns {
        d.set_item(name, col(f).into_pyarray(py))?;
    }
    d.set_item("material", rows.iter().map(|r| r.material.clone()).collect::<Vec<_>>())?;
    d.set_item("load_n", spec.load_n)?;
    d.set_item("top_mass_kg", spec.top_mass_kg)?;
    d.set_item("top_inertia_kgm2", spec.top_inertia_kgm2)?;
    Ok(d)
}

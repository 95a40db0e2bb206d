//! `static_checks`: the core's rig static checks (leg stress and buckling, tipping, sliding,
//! pier and anchors) as a
//! sequence of check dicts with the cautions that go with them.

use crate::errors::{IntoPyResult, to_pyerr};
use crate::model::PyModel;
use pyo3::prelude::*;
use pyo3::types::{PyDict, PyList};
use std::path::PathBuf;
use stillsky::Error;
use stillsky::checks::{self, CheckReport, StaticOptions, StaticWind, Verdict};
use stillsky::schema::ModelFile;

fn verdict_name(v: Verdict) -> &'static str {
    match v {
        Verdict::Pass => "pass",
        Verdict::Marginal => "marginal",
        Verdict::Fail => "fail",
    }
}

/// The checks of a rig, in the order they were made; each item a dict.
#[pyclass(name = "StaticChecks", module = "stillsky._native", frozen)]
pub struct PyStaticChecks {
    report: CheckReport,
    wind: StaticWind,
    options: StaticOptions,
}

impl PyStaticChecks {
    fn item<'py>(&self, py: Python<'py>, i: usize) -> PyResult<Bound<'py, PyDict>> {
        let c = &self.report.checks[i];
        let d = PyDict::new(py);
        d.set_item("name", &c.name)?;
        d.set_item("value", c.value)?;
        d.set_item("limit", c.limit)?;
        d.set_item("unit", &c.unit)?;
        d.set_item("factor_of_safety", c.margin)?;
        d.set_item("verdict", verdict_name(c.verdict))?;
        Ok(d)
    }
}

#[pymethods]
impl PyStaticChecks {
    fn __len__(&self) -> usize {
        self.report.checks.len()
    }
    fn __getitem__<'py>(&self, py: Python<'py>, i: isize) -> PyResult<Bound<'py, PyDict>> {
        let n = self.report.checks.len() as isize;
        let j = if i < 0 { i + n } else { i };
        if !(0..n).contains(&j) {
            return Err(pyo3::exceptions::PyIndexError::new_err(format!(
                "check index {i} out of range for {n} checks"
            )));
        }
        self.item(py, j as usize)
    }
    /// All checks as a list of dicts.
    #[getter]
    fn checks<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyList>> {
        let items = (0..self.report.checks.len()).map(|i| self.item(py, i)).collect::<PyResult<Vec<_>>>()?;
        PyList::new(py, items)
    }
    /// The worst verdict: "pass", "marginal" or "fail".
    #[getter]
    fn verdict(&self) -> &'static str {
        verdict_name(self.report.verdict())
    }
    #[getter]
    fn min_factor_of_safety(&self) -> f64 {
        self.report.min_margin()
    }
    /// Figures without a capacity (foot reactions, centre of gravity, anchor tension) and
    /// checks skipped for want of input.
    #[getter]
    fn notes(&self) -> Vec<String> {
        self.report.notes.clone()
    }
    /// The cautions that go with every report, one per line.
    #[getter]
    fn cautions(&self) -> String {
        self.report.cautions().join("\n")
    }
    fn summary<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyDict>> {
        let d = PyDict::new(py);
        d.set_item("checks", self.checks(py)?)?;
        d.set_item("verdict", self.verdict())?;
        d.set_item("min_factor_of_safety", self.min_factor_of_safety())?;
        d.set_item("design_wind_m_s", self.wind.speed_m_s)?;
        d.set_item("gust_factor", self.wind.gust_factor)?;
        d.set_item("air_density_kg_m3", self.wind.air_density_kg_m3)?;
        d.set_item("top_load_n", self.options.top_load_n)?;
        d.set_item("foot_surface", &self.options.foot_surface)?;
        d.set_item("notes", self.notes())?;
        d.set_item("cautions", self.report.cautions().to_vec())?;
        Ok(d)
    }
    fn __repr__(&self) -> String {
        format!("StaticChecks({} checks, verdict={})", self.report.checks.len(), self.verdict())
    }
}

/// Static checks of a rig file (a path) or of a `Model` built from rig-file text.
#[pyfunction]
#[pyo3(signature = (model_or_path, *, design_wind_m_s = 10.0, gust_factor = 2.0, air_density_kg_m3 = 1.225, top_load_n = stillsky::pier_table::DEFAULT_LOAD_N, foot_surface = None))]
pub fn static_checks(
    py: Python<'_>,
    model_or_path: &Bound<'_, PyAny>,
    design_wind_m_s: f64,
    gust_factor: f64,
    air_density_kg_m3: f64,
    top_load_n: f64,
    foot_surface: Option<String>,
) -> PyResult<PyStaticChecks> {
    let wind = StaticWind { speed_m_s: design_wind_m_s, gust_factor, air_density_kg_m3 };
    let options = StaticOptions { top_load_n, foot_surface };
    let report = if let Ok(m) = model_or_path.cast::<PyModel>() {
        let src = m.get().source.clone().ok_or_else(|| {
            to_pyerr(Error::invalid(
                "model_or_path",
                "this Model has no model-file text; build it with Model.from_toml or Model.from_toml_str, or pass the file's path",
            ))
        })?;
        py.detach(|| {
            ModelFile::parse(&src.text, &src.label).and_then(|f| checks::rig_checks(&f, &wind, &options))
        })
        .py_err()?
    } else {
        let path: PathBuf = model_or_path.extract().map_err(|_| {
            pyo3::exceptions::PyTypeError::new_err(
                "model_or_path: expected a stillsky.Model or a path (str or os.PathLike)",
            )
        })?;
        py.detach(|| ModelFile::read(&path).and_then(|f| checks::rig_checks(&f, &wind, &options))).py_err()?
    };
    Ok(PyStaticChecks { report, wind, options })
}

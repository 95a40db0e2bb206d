//! Design studies: a loaded study (`StudyPlan`, the study file and every file it names read
//! once), its rows in memory (interpreter released) and their CSV text. `stillsky.study` and
//! `stillsky.distributed.study` (pure Python) use these.
//!
//! Rows are dicts with the keys of the study's columns, in order: strings for key, variant, the
//! variables' values, ground, wind, status, vs_base; floats (NaN where the CSV is empty) for the
//! outcomes; error is None on a good row.

use crate::errors::{IntoPyResult, to_pyerr};
use pyo3::prelude::*;
use pyo3::types::{PyDict, PyList};
use stillsky::Error;
use stillsky::batch::{Study, StudyRow, study_columns, study_csv_text, study_rows_of, variants};

/// A loaded study (see the module docs).
#[pyclass(name = "StudyPlan", module = "stillsky._native", frozen)]
pub struct PyStudyPlan {
    inner: Study,
}

fn row_dict<'py>(py: Python<'py>, cols: &[String], r: &StudyRow) -> PyResult<Bound<'py, PyDict>> {
    let d = PyDict::new(py);
    let f = r.fields();
    for (i, c) in cols.iter().enumerate() {
        match c.as_str() {
            "rms_arcsec" => d.set_item(c, r.rms_arcsec)?,
            "rms_px" => d.set_item(c, r.rms_px)?,
            "p_outside_half_px" => d.set_item(c, r.p_outside_half_px)?,
            "ratio_to_base" => d.set_item(c, r.ratio_to_base)?,
            "first_mode_hz" => d.set_item(c, r.first_mode_hz)?,
            "first_mode_zeta" => d.set_item(c, r.first_mode_zeta)?,
            "gust_peak_px" => d.set_item(c, r.gust_peak_px)?,
            "gust_ringdown_s" => d.set_item(c, r.gust_ringdown_s)?,
            "min_static_fos" => d.set_item(c, r.min_static_fos)?,
            "standing_tilt_arcsec" => d.set_item(c, r.standing_tilt_arcsec)?,
            "standing_tilt_px" => d.set_item(c, r.standing_tilt_px)?,
            "error" if i == cols.len() - 1 => d.set_item(c, r.error.clone())?,
            _ => d.set_item(c, &f[i])?,
        }
    }
    Ok(d)
}

fn dict_row(d: &Bound<'_, PyAny>, cols: &[String], n_vars: usize, i: usize) -> PyResult<StudyRow> {
    let bad = |reason: String| to_pyerr(Error::invalid(format!("study row {i}"), reason));
    let get = |name: &str| d.get_item(name).map_err(|_| bad(format!("has no field '{name}'")));
    let text = |name: &str| -> PyResult<String> { get(name)?.extract() };
    let num = |name: &str| -> PyResult<f64> { get(name)?.extract() };
    let values = cols[2..2 + n_vars].iter().map(|c| text(c)).collect::<PyResult<Vec<_>>>()?;
    let error: Option<String> = get("error")?.extract()?;
    match (text("status")?.as_str(), &error) {
        ("ok", None) | ("error", Some(_)) => {}
        (s, _) => return Err(bad(format!("status '{s}' and error disagree"))),
    }
    Ok(StudyRow {
        key: text("key")?,
        variant: text("variant")?,
        values,
        ground: text("ground")?,
        wind: text("wind")?,
        error,
        rms_arcsec: num("rms_arcsec")?,
        rms_px: num("rms_px")?,
        p_outside_half_px: num("p_outside_half_px")?,
        ratio_to_base: num("ratio_to_base")?,
        vs_base: text("vs_base")?,
        first_mode_hz: num("first_mode_hz")?,
        first_mode_zeta: num("first_mode_zeta")?,
        gust_peak_px: num("gust_peak_px")?,
        gust_ringdown_s: num("gust_ringdown_s")?,
        min_static_fos: num("min_static_fos")?,
        standing_tilt_arcsec: num("standing_tilt_arcsec")?,
        standing_tilt_px: num("standing_tilt_px")?,
    })
}

#[pymethods]
impl PyStudyPlan {
    /// Load study text (`name` for messages); the files it names are read relative to `folder`.
    #[new]
    fn new(py: Python<'_>, text: &str, name: &str, folder: std::path::PathBuf) -> PyResult<Self> {
        let inner = py.detach(|| Study::load(text, name, &folder)).py_err()?;
        Ok(PyStudyPlan { inner })
    }

    /// The CSV columns, in order.
    fn columns(&self) -> Vec<String> {
        study_columns(&self.inner)
    }

    /// The variants' labels, in row order.
    fn variants(&self) -> Vec<String> {
        variants(&self.inner).into_iter().map(|v| v.label).collect()
    }

    /// The ground labels and wind labels, in row order.
    fn disturbances(&self) -> PyResult<(Vec<String>, Vec<String>)> {
        let g = stillsky::batch::ground_labels(&self.inner.grounds).py_err()?;
        Ok((g, self.inner.wind_cases().into_iter().map(|w| w.label).collect()))
    }

    /// Rows of the variants `which` (indices into `variants()`; None: all), in row order.
    #[pyo3(signature = (which = None, threads = None))]
    fn rows<'py>(
        &self,
        py: Python<'py>,
        which: Option<Vec<usize>>,
        threads: Option<usize>,
    ) -> PyResult<Bound<'py, PyList>> {
        let rows = py.detach(|| study_rows_of(&self.inner, which.as_deref(), threads)).py_err()?;
        let cols = study_columns(&self.inner);
        PyList::new(py, rows.iter().map(|r| row_dict(py, &cols, r)).collect::<PyResult<Vec<_>>>()?)
    }

    /// The command line's CSV text of these rows (six significant digits).
    fn csv(&self, rows: &Bound<'_, PyAny>) -> PyResult<String> {
        let cols = study_columns(&self.inner);
        let n = self.inner.variables.len();
        let rows: Vec<StudyRow> =
            rows.try_iter()?.enumerate().map(|(i, r)| dict_row(&r?, &cols, n, i)).collect::<PyResult<_>>()?;
        study_csv_text(&self.inner, &rows).py_err()
    }
}

pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyStudyPlan>()?;
    Ok(())
}

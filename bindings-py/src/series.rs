//! `read_series`: recordings (CSV/text, WAV, miniSEED) through the core's one reader.

use crate::errors::IntoPyResult;
use numpy::IntoPyArray;
use pyo3::prelude::*;
use pyo3::types::PyDict;
use std::path::PathBuf;
use stillsky::io::series::{SeriesOptions, read_series as core_read};

/// Read a recording; samples come back as one (n_axes, n_frames) float64 array (no copy).
#[pyfunction]
#[pyo3(signature = (path, *, fs_hz = None))]
pub fn read_series<'py>(py: Python<'py>, path: PathBuf, fs_hz: Option<f64>) -> PyResult<Bound<'py, PyDict>> {
    let mut opts = SeriesOptions::default();
    opts.fs_hz = fs_hz;
    let s = py.detach(|| core_read(&path, &opts)).py_err()?;
    let (axes, frames) = (s.n_axes, s.n_frames());
    let samples = ndarray::Array2::from_shape_vec((axes, frames), s.samples)
        .map_err(|e| pyo3::exceptions::PyRuntimeError::new_err(format!("internal: series layout: {e}")))?;
    let d = PyDict::new(py);
    d.set_item("samples", samples.into_pyarray(py))?;
    d.set_item("axis_names", s.axis_names)?;
    d.set_item("fs_hz", s.fs_hz)?;
    d.set_item("unit", s.quantity.si_unit())?;
    d.set_item("start_time", s.start_time)?;
    Ok(d)
}

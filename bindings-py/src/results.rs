//! Ring-down identification: the result struct becomes a dict (through its serde form).

use crate::convert::{f64_1d, slice_or_copy};
use crate::errors::IntoPyResult;
use crate::image::to_dict;
use numpy::IntoPyArray;
use pyo3::prelude::*;
use pyo3::types::PyDict;
use stillsky::identify::{RingdownOptions, identify_ringdown as core_identify};

/// Modal frequencies and damping from a free-decay (ring-down) record.
#[pyfunction]
#[pyo3(signature = (x, fs, *, min_frequency_hz = None, max_frequency_hz = None, max_modes = 8))]
pub fn identify_ringdown<'py>(
    py: Python<'py>,
    x: &Bound<'py, PyAny>,
    fs: f64,
    min_frequency_hz: Option<f64>,
    max_frequency_hz: Option<f64>,
    max_modes: usize,
) -> PyResult<Bound<'py, PyDict>> {
    let x = f64_1d(x, "x")?;
    let x = slice_or_copy(&x);
    let mut opts = RingdownOptions::default();
    opts.min_frequency_hz = min_frequency_hz;
    opts.max_frequency_hz = max_frequency_hz;
    opts.max_modes = max_modes;
    let r = py.detach(|| core_identify(&x, fs, &opts)).py_err()?;
    let d = to_dict(py, &r)?;
    d.set_item("frequency_hz", r.frequency_hz.into_pyarray(py))?;
    d.set_item("damping_ratio", r.damping_ratio.into_pyarray(py))?;
    d.set_item("amplitude", r.amplitude.into_pyarray(py))?;
    Ok(d)
}

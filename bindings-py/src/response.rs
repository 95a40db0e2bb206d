//! `Model.response`: the response PSD of one output (or several) under uncorrelated
//! disturbances, over `stillsky::response::response_psd`.

use crate::convert::{f64_1d, names, slice_or_copy};
use crate::errors::IntoPyResult;
use crate::image::disturbances;
use crate::spectrum::PyPsd;
use crate::wind::PyWind;
use pyo3::prelude::*;
use pyo3::types::PyDict;
use stillsky::FreqGrid;
use stillsky::model::Model;
use stillsky::response::response_psd;

/// `Model.response`: a `Psd` for one output name, a dict {name: Psd} for a sequence of names.
pub fn response<'py>(
    m: &Model,
    py: Python<'py>,
    freq_hz: &Bound<'py, PyAny>,
    ground: Option<&Bound<'py, PyAny>>,
    wind: Option<PyRef<'py, PyWind>>,
    loads: Option<&Bound<'py, PyAny>>,
    output: &Bound<'py, PyAny>,
) -> PyResult<Bound<'py, PyAny>> {
    let f = f64_1d(freq_hz, "freq_hz")?;
    let grid = FreqGrid::new(slice_or_copy(&f).into_owned()).py_err()?;
    let dist = disturbances(ground, wind, loads)?;
    let (outs, one) = names(output, "output")?;
    let psds = py
        .detach(|| {
            let o: Vec<&str> = outs.iter().map(String::as_str).collect();
            let r = response_psd(m, &grid, &dist, &o, false)?;
            o.iter()
                .map(|name| r.output_psd(name, Model::output_quantity(name)))
                .collect::<stillsky::Result<Vec<_>>>()
        })
        .py_err()?;
    if one {
        let p = psds.into_iter().next().map(|inner| PyPsd { inner });
        return Ok(Bound::new(
            py,
            p.ok_or_else(|| pyo3::exceptions::PyRuntimeError::new_err("internal: no PSD"))?,
        )?
        .into_any());
    }
    let d = PyDict::new(py);
    for (name, inner) in outs.iter().zip(psds) {
        d.set_item(name, PyPsd { inner })?;
    }
    Ok(d.into_any())
}

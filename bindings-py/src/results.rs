//! Image motion and ring-down identification: result structs become dicts (through their
//! serde form), with the per-frequency series as NumPy arrays.

use crate::convert::{f64_1d, slice_or_copy};
use crate::errors::{IntoPyResult, to_pyerr};
use crate::spectrum::PyPsd;
use numpy::IntoPyArray;
use pyo3::prelude::*;
use pyo3::types::PyDict;
use stillsky::identify::{RingdownOptions, identify_ringdown as core_identify};
use stillsky::image::{Guiding, ImageOptions};
use stillsky::response::Disturbances;
use stillsky::{Error, FreqGrid};

/// A serialisable core result as a Python dict (via JSON; NaN and ±inf arrive as None).
fn to_dict<'py, T: serde::Serialize>(py: Python<'py>, v: &T) -> PyResult<Bound<'py, PyDict>> {
    let text = serde_json::to_string(v)
        .map_err(|e| pyo3::exceptions::PyRuntimeError::new_err(format!("internal: result to dict: {e}")))?;
    Ok(py.import("json")?.call_method1("loads", (text,))?.cast_into::<PyDict>()?)
}

/// Two equal-length series as a (2, n) array.
fn rows2(a: Vec<f64>, mut b: Vec<f64>) -> PyResult<ndarray::Array2<f64>> {
    let n = a.len();
    let mut v = a;
    v.append(&mut b);
    ndarray::Array2::from_shape_vec((2, n), v)
        .map_err(|e| pyo3::exceptions::PyRuntimeError::new_err(format!("internal: (2, n) layout: {e}")))
}

/// Ground PSD per axis: one `Psd` for all three axes, or a sequence of three `Psd | None`.
fn ground(obj: Option<&Bound<'_, PyAny>>) -> PyResult<[Option<stillsky::spectrum::Psd>; 3]> {
    let Some(obj) = obj else { return Ok([None, None, None]) };
    if let Ok(p) = obj.cast::<PyPsd>() {
        let p = p.get().inner.clone();
        return Ok([Some(p.clone()), Some(p.clone()), Some(p)]);
    }
    let v: Vec<Option<Bound<'_, PyPsd>>> = obj.extract()?;
    let v: [Option<Bound<'_, PyPsd>>; 3] = v
        .try_into()
        .map_err(|v: Vec<_>| to_pyerr(Error::shape("ground (one Psd per axis x, y, z)", 3, v.len())))?;
    Ok(v.map(|p| p.map(|p| p.get().inner.clone())))
}

/// `Model.image_motion`: disturbances and options from keywords, result as a dict.
#[allow(clippy::too_many_arguments)]
pub fn image_motion<'py>(
    m: &stillsky::model::Model,
    py: Python<'py>,
    freq_hz: &Bound<'py, PyAny>,
    ground: Option<&Bound<'py, PyAny>>,
    loads: Option<Vec<(String, PyRef<'py, PyPsd>)>>,
    exposure_s: Option<f64>,
    guide_cadence_s: Option<f64>,
    guide_gain: f64,
    radius_px: Option<f64>,
    seeing_fwhm_arcsec: Option<f64>,
    mode_shares: bool,
) -> PyResult<Bound<'py, PyDict>> {
    let f = f64_1d(freq_hz, "freq_hz")?;
    let grid = FreqGrid::new(slice_or_copy(&f).into_owned()).py_err()?;
    let dist = Disturbances {
        ground: self::ground(ground)?,
        loads: loads.unwrap_or_default().into_iter().map(|(n, p)| (n, p.inner.clone())).collect(),
        ..Default::default()
    };
    let mut opts = ImageOptions::default();
    opts.exposure_s = exposure_s;
    opts.guide = guide_cadence_s.map(|cadence_s| Guiding { cadence_s, gain: guide_gain });
    opts.radius_px = radius_px;
    opts.seeing_fwhm_arcsec = seeing_fwhm_arcsec;
    opts.skip_mode_shares = !mode_shares;
    let im = py.detach(|| m.image_motion(&grid, &dist, &opts)).py_err()?;
    let d = to_dict(py, &im)?;
    let [px, py_] = im.psd_arcsec2;
    let [cx, cy] = im.cumulative_rms_arcsec;
    d.set_item("freq_hz", im.freq_hz.into_pyarray(py))?;
    d.set_item("psd_arcsec2", rows2(px, py_)?.into_pyarray(py))?;
    d.set_item("co_psd_arcsec2", im.co_psd_arcsec2.into_pyarray(py))?;
    d.set_item("cumulative_rms_arcsec", rows2(cx, cy)?.into_pyarray(py))?;
    Ok(d)
}

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

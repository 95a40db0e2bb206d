//! `Model.sky_map`: image RMS over the sky (the core's `skymap::sky_map`) as numpy arrays.

use crate::convert::{f64_1d, slice_or_copy, to_dict};
use crate::errors::IntoPyResult;
use crate::model::PyModel;
use crate::wind::PyWind;
use numpy::{IntoPyArray, PyArray2, PyArrayMethods};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use stillsky::image::ImageOptions;
use stillsky::schema::ModelFile;
use stillsky::skymap::{SkyAxes, SkyCell, SkyGrid, SkyMap, sky_map};
use stillsky::{Error, FreqGrid};

fn grid2<'py>(py: Python<'py>, v: &[Vec<f64>]) -> PyResult<Bound<'py, PyArray2<f64>>> {
    let (nr, nc) = (v.len(), v.first().map_or(0, Vec::len));
    let flat: Vec<f64> = v.iter().flatten().copied().collect();
    flat.into_pyarray(py).reshape([nr, nc])
}

fn cell<'py>(py: Python<'py>, m: &SkyMap, c: Option<SkyCell>) -> PyResult<Option<Bound<'py, PyDict>>> {
    let Some(c) = c else { return Ok(None) };
    let d = to_dict(py, &c)?;
    d.set_item("place", c.place(m.frame))?;
    Ok(Some(d))
}

/// The map as a dict of numpy arrays and the best/worst cells.
fn to_py<'py>(py: Python<'py>, m: &SkyMap) -> PyResult<Bound<'py, PyDict>> {
    let d = PyDict::new(py);
    let [rn, cn] = m.frame.axis_names();
    d.set_item("frame", if rn == "altitude_deg" { "alt_az" } else { "equatorial" })?;
    d.set_item("axes", (rn, cn))?;
    d.set_item(rn, m.rows_deg.clone().into_pyarray(py))?;
    d.set_item(cn, m.cols_deg.clone().into_pyarray(py))?;
    d.set_item("rms_arcsec", grid2(py, &m.rms_arcsec)?)?;
    d.set_item("rms_px", grid2(py, &m.rms_px)?)?;
    d.set_item("cell_altitude_deg", grid2(py, &m.altitude_deg)?)?;
    d.set_item("latitude_deg", m.latitude_deg)?;
    d.set_item("min_altitude_deg", m.min_altitude_deg)?;
    d.set_item("best", cell(py, m, m.best)?)?;
    d.set_item("worst", cell(py, m, m.worst)?)?;
    d.set_item("summary", m.summary_text())?;
    d.set_item("pier_side", m.pier_side_text())?;
    d.set_item("csv", m.csv_text())?;
    Ok(d)
}

/// `Model.sky_map`.
#[allow(clippy::too_many_arguments)]
pub fn model_sky_map<'py>(
    m: &PyModel,
    py: Python<'py>,
    freq_hz: &Bound<'py, PyAny>,
    ground: Option<&Bound<'py, PyAny>>,
    wind: Option<PyRef<'py, PyWind>>,
    loads: Option<&Bound<'py, PyAny>>,
    wind_from_deg: Option<f64>,
    axes: SkyAxes,
    exposure_s: Option<f64>,
    seeing_fwhm_arcsec: Option<f64>,
) -> PyResult<Bound<'py, PyDict>> {
    let src = m
        .source
        .clone()
        .ok_or_else(|| {
            Error::invalid("sky_map", "needs a Model built from model-file text (from_toml or from_toml_str)")
        })
        .py_err()?;
    let f = f64_1d(freq_hz, "freq_hz")?;
    let grid = FreqGrid::new(slice_or_copy(&f).into_owned()).py_err()?;
    let dist = crate::image::disturbances(ground, wind, loads)?;
    let mut opts = ImageOptions::default();
    opts.exposure_s = exposure_s;
    opts.seeing_fwhm_arcsec = seeing_fwhm_arcsec;
    let map = py
        .detach(|| -> stillsky::Result<SkyMap> {
            let mut file = ModelFile::parse(&src.text, &src.label)?;
            if let Some(a) = wind_from_deg {
                file.set_wind_from(a)?;
            }
            let sky = SkyGrid::for_file(&file, &axes)?;
            sky_map(&file, &sky, &grid, &dist, &opts)
        })
        .py_err()?;
    to_py(py, &map)
}

//! The probabilistic PSD (`stillsky.probabilistic_psd`): converts arguments, runs the core over
//! the axes in parallel with the interpreter released, and returns plain arrays in a dict.

use crate::convert::{f64_1d, slice_or_copy};
use crate::errors::IntoPyResult;
use numpy::{IntoPyArray, PyArray2};
use pyo3::prelude::*;
use pyo3::types::{PyDict, PyList};
use stillsky::spectrum::{CriterionCurve, PpsdConfig, Quantity, probabilistic_psd_axes};

fn rows<'py, T: numpy::Element + Copy>(
    py: Python<'py>,
    v: Vec<T>,
    n_cols: usize,
) -> PyResult<Bound<'py, PyArray2<T>>> {
    let n_rows = v.len().checked_div(n_cols).unwrap_or(0);
    let a = ndarray::Array2::from_shape_vec((n_rows, n_cols), v)
        .map_err(|e| pyo3::exceptions::PyValueError::new_err(e.to_string()))?;
    Ok(a.into_pyarray(py))
}

#[pyfunction]
#[pyo3(signature = (x, fs, *, block_s = 3600.0, overlap = 0.5, input = "velocity", scale = 1.0,
    db_bins = (-200.0, -50.0, 1.0), smoothing_octaves = 1.0, step_octaves = 0.125,
    percentiles = vec![10.0, 50.0, 90.0], criterion = None, start_of_day_s = None,
    bands_hz = vec![], band_quantity = "velocity"))]
#[allow(clippy::too_many_arguments)]
pub fn probabilistic_psd<'py>(
    py: Python<'py>,
    x: &Bound<'py, PyAny>,
    fs: f64,
    block_s: f64,
    overlap: f64,
    input: &str,
    scale: f64,
    db_bins: (f64, f64, f64),
    smoothing_octaves: f64,
    step_octaves: f64,
    percentiles: Vec<f64>,
    criterion: Option<&str>,
    start_of_day_s: Option<f64>,
    bands_hz: Vec<(f64, f64)>,
    band_quantity: &str,
) -> PyResult<Bound<'py, PyAny>> {
    let single = x.cast::<PyList>().is_err() && x.cast::<pyo3::types::PyTuple>().is_err();
    let arrays = if single {
        vec![f64_1d(x, "x")?]
    } else {
        x.try_iter()?.map(|a| f64_1d(&a?, "x")).collect::<PyResult<Vec<_>>>()?
    };
    let mut cfg =
        PpsdConfig::default().with_block_s(block_s).with_input(Quantity::from_name(input).py_err()?, scale);
    (cfg.overlap, cfg.smoothing_octaves, cfg.step_octaves) = (overlap, smoothing_octaves, step_octaves);
    (cfg.db_min, cfg.db_max, cfg.db_step) = db_bins;
    cfg.criterion = criterion.map(CriterionCurve::from_name).transpose().py_err()?;
    (cfg.start_of_day_s, cfg.bands_hz) = (start_of_day_s, bands_hz);
    cfg.band_quantity = Quantity::from_name(band_quantity).py_err()?;
    let slices: Vec<_> = arrays.iter().map(slice_or_copy).collect();
    let refs: Vec<&[f64]> = slices.iter().map(|s| s.as_ref()).collect();
    let res = py.detach(|| probabilistic_psd_axes(&refs, fs, &cfg)).py_err()?;
    let out = PyList::empty(py);
    for (p, blocks) in res {
        let d = PyDict::new(py);
        let n_per = p.period_centres_s().len();
        d.set_item("period_s", p.period_centres_s().to_vec().into_pyarray(py))?;
        d.set_item("db_edges", p.db_edges().to_vec().into_pyarray(py))?;
        d.set_item("histogram", rows(py, p.histogram().to_vec(), p.db_edges().len() - 1)?)?;
        let pc = PyDict::new(py);
        for q in &percentiles {
            pc.set_item(*q, p.percentile_db(*q).py_err()?.into_pyarray(py))?;
        }
        d.set_item("percentiles", pc)?;
        d.set_item("mean_db", p.mean_db().into_pyarray(py))?;
        d.set_item("n_blocks", p.n_blocks())?;
        d.set_item("nfft", p.nfft())?;
        d.set_item("share_below_nlnm", p.share_below_nlnm().into_pyarray(py))?;
        d.set_item("share_above_nhnm", p.share_above_nhnm().into_pyarray(py))?;
        d.set_item("blocks_above_criterion", p.blocks_above_criterion())?;
        d.set_item("block_start_s", blocks.iter().map(|b| b.start_s).collect::<Vec<_>>().into_pyarray(py))?;
        d.set_item("block_db", rows(py, blocks.iter().flat_map(|b| b.binned_db.clone()).collect(), n_per)?)?;
        let h = p.hours();
        d.set_item("hour_blocks", h.blocks.clone().into_pyarray(py))?;
        d.set_item("hour_band_rms", rows(py, h.rms(), h.n_bands())?)?;
        out.append(d)?;
    }
    if single { Ok(out.get_item(0)?) } else { Ok(out.into_any()) }
}

/// A quiet-hours survey of one recording file (`stillsky.quiet_hours`): the core's
/// `batch::survey_recording`, read in chunks with the interpreter released.
#[pyfunction]
#[pyo3(signature = (path, model = None, *, block_s = 3600.0, overlap = 0.5, bands_hz = vec![(1.0, 10.0)],
    fs_hz = None, sensitivity = None, channel = None))]
#[allow(clippy::too_many_arguments)]
pub fn quiet_hours<'py>(
    py: Python<'py>,
    path: std::path::PathBuf,
    model: Option<PyRef<'py, crate::model::PyModel>>,
    block_s: f64,
    overlap: f64,
    bands_hz: Vec<(f64, f64)>,
    fs_hz: Option<f64>,
    sensitivity: Option<(f64, String)>,
    channel: Option<String>,
) -> PyResult<Bound<'py, PyDict>> {
    use stillsky::batch::{ReportOptions, SurveyOptions, survey_recording};
    use stillsky::io::series::{Sensitivity, SeriesOptions, Unit};
    let mut ppsd = PpsdConfig::default().with_block_s(block_s);
    (ppsd.overlap, ppsd.bands_hz) = (overlap, bands_hz);
    let mut series = SeriesOptions::default();
    if let Some(f) = fs_hz {
        series = series.with_fs_hz(f);
    }
    if let Some((c, u)) = sensitivity {
        series = series.with_sensitivity(Sensitivity::new(c, Unit::parse(&u).py_err()?));
    }
    series.channel = channel;
    let o = SurveyOptions { ppsd, series, grid: ReportOptions::new().py_err()?.grid };
    let m = model.as_ref().map(|m| &m.inner);
    let s = py.detach(|| survey_recording(&path, m, &o)).py_err()?;
    let d = crate::convert::to_dict(py, &s)?;
    d.set_item("quiet_hours", s.quiet_hours())?;
    Ok(d)
}

pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(probabilistic_psd, m)?)?;
    m.add_function(wrap_pyfunction!(quiet_hours, m)?)?;
    Ok(())
}

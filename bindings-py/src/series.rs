//! `read_series`: recordings (CSV/text, WAV, miniSEED) through the core's one reader.

use crate::errors::IntoPyResult;
use numpy::{IntoPyArray, PyArray2, PyArrayMethods, PyUntypedArrayMethods};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use std::path::PathBuf;
use stillsky::io::series::{
    PhysicalValue, Sensitivity, SeriesOptions, TimingSource, Unit, read_series as core_read,
};

/// A recording in SI units (or counts), with the timing of the input.
#[pyclass(name = "Series", module = "stillsky._native", frozen)]
pub struct PySeries {
    /// Planar (n_axes, n_frames) array; `samples` is its transposed view.
    planar: Py<PyArray2<f64>>,
    axes: Vec<String>,
    fs: f64,
    unit: &'static str,
    start_time: Option<String>,
    timing: stillsky::io::series::TimingReport,
}

#[pymethods]
impl PySeries {
    /// Samples, shape (n_frames, n_axes), float64 (a transposed view, no copy).
    #[getter]
    fn samples<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray2<f64>> {
        self.planar.bind(py).transpose().unwrap_or_else(|_| self.planar.bind(py).clone())
    }
    /// Axis (channel) names.
    #[getter]
    fn axes(&self) -> Vec<String> {
        self.axes.clone()
    }
    /// Sample rate (Hz): nominal, or the real mean rate when resampled from timestamps.
    #[getter]
    fn fs(&self) -> f64 {
        self.fs
    }
    /// SI unit of the samples ("m/s^2", "m/s", "m", "counts", or "arcsec" for an image track).
    #[getter]
    fn unit(&self) -> &'static str {
        self.unit
    }
    /// Start time as given by the file, or None.
    #[getter]
    fn start_time(&self) -> Option<String> {
        self.start_time.clone()
    }
    /// Timing report: source, mean rate, jitter, gaps, resampling.
    #[getter]
    fn timing<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyDict>> {
        let t = &self.timing;
        let d = PyDict::new(py);
        let source = match t.source {
            TimingSource::Nominal => "nominal",
            TimingSource::TimeColumn => "time column",
            TimingSource::Records => "records",
        };
        d.set_item("source", source)?;
        d.set_item("n_input_frames", t.n_input_frames)?;
        d.set_item("first_time_s", t.first_time_s)?;
        d.set_item("last_time_s", t.last_time_s)?;
        d.set_item("mean_interval_s", t.mean_interval_s)?;
        d.set_item("median_interval_s", t.median_interval_s)?;
        d.set_item("fs_hz_mean", t.fs_hz_mean)?;
        d.set_item("jitter_std_s", t.jitter_std_s)?;
        d.set_item("jitter_max_s", t.jitter_max_s)?;
        d.set_item("jitter_std_fraction", t.jitter_std_fraction)?;
        d.set_item("jitter_max_fraction", t.jitter_max_fraction)?;
        d.set_item("n_gaps", t.n_gaps)?;
        let gaps: Vec<(f64, f64)> = t.gaps.iter().map(|g| (g.time_s, g.length_s)).collect();
        d.set_item("gaps", gaps)?;
        d.set_item("resampled", t.resampled)?;
        Ok(d)
    }
    fn __len__(&self) -> usize {
        self.timing.n_input_frames
    }
    fn __repr__(&self, py: Python<'_>) -> String {
        let n = self.planar.bind(py).shape()[1];
        format!("Series(axes={:?}, frames={n}, fs={} Hz, unit={:?})", self.axes, self.fs, self.unit)
    }
}

/// Read a recording (CSV/whitespace text, WAV or miniSEED).
#[pyfunction]
#[pyo3(signature = (path, *, fs_hz = None, unit = None, wav_full_scale = None, sensitivity = None,
                    channel = None, max_jitter_fraction = None, plate_scale_arcsec_per_px = None))]
#[allow(clippy::too_many_arguments)]
pub fn read_series(
    py: Python<'_>,
    path: PathBuf,
    fs_hz: Option<f64>,
    unit: Option<&str>,
    wav_full_scale: Option<(f64, String)>,
    sensitivity: Option<(f64, String)>,
    channel: Option<String>,
    max_jitter_fraction: Option<f64>,
    plate_scale_arcsec_per_px: Option<f64>,
) -> PyResult<PySeries> {
    let mut opts = SeriesOptions::default();
    opts.plate_scale_arcsec_per_px = plate_scale_arcsec_per_px;
    opts.fs_hz = fs_hz;
    opts.unit = unit.map(Unit::parse).transpose().py_err()?;
    if let Some((v, u)) = wav_full_scale {
        opts.wav_full_scale = Some(PhysicalValue::new(v, Unit::parse(&u).py_err()?));
    }
    if let Some((c, u)) = sensitivity {
        opts.sensitivity = Some(Sensitivity::new(c, Unit::parse(&u).py_err()?));
    }
    opts.channel = channel;
    if let Some(j) = max_jitter_fraction {
        opts.max_jitter_fraction = j;
    }
    let s = py.detach(|| core_read(&path, &opts)).py_err()?;
    let (axes, frames) = (s.n_axes, s.n_frames());
    let planar = ndarray::Array2::from_shape_vec((axes, frames), s.samples)
        .map_err(|e| pyo3::exceptions::PyRuntimeError::new_err(format!("internal: series layout: {e}")))?;
    Ok(PySeries {
        planar: planar.into_pyarray(py).unbind(),
        axes: s.axis_names,
        fs: s.fs_hz,
        unit: s.quantity.si_unit(),
        start_time: s.start_time,
        timing: s.report,
    })
}

//! Ring-down identification (`identify_ringdown`) and the before/after comparison
//! (`compare_ringdowns`) as result objects. Physics in `stillsky::identify`.

use crate::convert::{f64_1d, slice_or_copy};
use crate::errors::{IntoPyResult, to_pyerr};
use crate::image::to_dict;
use numpy::{IntoPyArray, PyArray1};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use stillsky::Error;
use stillsky::identify::{
    self as core_id, CompareOptions, EstimateSource, RingdownComparison, RingdownId, RingdownMetrics,
    RingdownOptions, SettleThreshold,
};

fn ringdown_options(
    min_frequency_hz: Option<f64>,
    max_frequency_hz: Option<f64>,
    max_modes: usize,
) -> RingdownOptions {
    let mut opts = RingdownOptions::default();
    opts.min_frequency_hz = min_frequency_hz;
    opts.max_frequency_hz = max_frequency_hz;
    opts.max_modes = max_modes;
    opts
}

/// Modal frequencies and damping identified from one ring-down record.
#[pyclass(name = "RingdownId", module = "stillsky._native", frozen)]
pub struct PyRingdownId {
    inner: RingdownId,
}

#[pymethods]
impl PyRingdownId {
    /// Best natural frequency per mode found (Hz).
    #[getter]
    fn frequency_hz<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        self.inner.frequency_hz.clone().into_pyarray(py)
    }
    /// Best damping ratio per mode found.
    #[getter]
    fn damping_ratio<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        self.inner.damping_ratio.clone().into_pyarray(py)
    }
    /// Amplitude per mode (units of x).
    #[getter]
    fn amplitude<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        self.inner.amplitude.clone().into_pyarray(py)
    }
    /// Index of the dominant mode in the arrays above.
    #[getter]
    fn dominant(&self) -> usize {
        self.inner.dominant
    }
    /// "single_mode" (median of the single-mode methods) or "matrix_pencil".
    #[getter]
    fn dominant_source(&self) -> &'static str {
        match self.inner.dominant_source {
            EstimateSource::SingleMode => "single_mode",
            EstimateSource::MatrixPencil => "matrix_pencil",
        }
    }
    /// Dominant-mode damping ratio by logarithmic decrement (None if it failed).
    #[getter]
    fn log_decrement(&self) -> Option<f64> {
        self.inner.methods.log_decrement
    }
    #[getter]
    fn log_decrement_cycles(&self) -> usize {
        self.inner.methods.log_decrement_cycles
    }
    /// Dominant-mode damping ratio by an exponential fit to the Hilbert envelope.
    #[getter]
    fn envelope_fit(&self) -> Option<f64> {
        self.inner.methods.envelope_fit
    }
    /// Dominant-mode damping ratio by half-power bandwidth.
    #[getter]
    fn half_power(&self) -> Option<f64> {
        self.inner.methods.half_power
    }
    /// Spread of the single-mode damping estimates (as the core defines it).
    #[getter]
    fn spread(&self) -> f64 {
        self.inner.methods.spread
    }
    /// Dominant peak frequency from the interpolated spectrum (Hz).
    #[getter]
    fn dominant_frequency_hz(&self) -> f64 {
        self.inner.methods.dominant_frequency_hz
    }
    /// All per-method values of the dominant mode as a dict.
    #[getter]
    fn methods<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyDict>> {
        to_dict(py, &self.inner.methods)
    }
    /// The matrix-pencil modes as a list of dicts.
    #[getter]
    fn pencil<'py>(&self, py: Python<'py>) -> PyResult<Vec<Bound<'py, PyDict>>> {
        self.inner.pencil.iter().map(|m| to_dict(py, m)).collect()
    }
    #[getter]
    fn close_modes(&self) -> bool {
        self.inner.close_modes
    }
    #[getter]
    fn clipped(&self) -> bool {
        self.inner.clipped
    }
    #[getter]
    fn warnings(&self) -> Vec<String> {
        self.inner.warnings.clone()
    }
    /// Every field as a dict (NaN and ±inf as None).
    fn summary<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyDict>> {
        to_dict(py, &self.inner)
    }
    fn __repr__(&self) -> String {
        format!(
            "RingdownId(frequency_hz={:?}, damping_ratio={:?})",
            self.inner.frequency_hz, self.inner.damping_ratio
        )
    }
}

/// Modal frequencies and damping from a free-decay (ring-down) record.
#[pyfunction]
#[pyo3(signature = (x, fs, *, min_frequency_hz = None, max_frequency_hz = None, max_modes = 8))]
pub fn identify_ringdown(
    py: Python<'_>,
    x: &Bound<'_, PyAny>,
    fs: f64,
    min_frequency_hz: Option<f64>,
    max_frequency_hz: Option<f64>,
    max_modes: usize,
) -> PyResult<PyRingdownId> {
    let x = f64_1d(x, "x")?;
    let x = slice_or_copy(&x);
    let opts = ringdown_options(min_frequency_hz, max_frequency_hz, max_modes);
    let inner = py.detach(|| core_id::identify_ringdown(&x, fs, &opts)).py_err()?;
    Ok(PyRingdownId { inner })
}

fn metrics_dict<'py>(py: Python<'py>, m: &RingdownMetrics) -> PyResult<Bound<'py, PyDict>> {
    to_dict(py, m)
}

/// Two ring-downs side by side (ratios after / before).
#[pyclass(name = "RingdownComparison", module = "stillsky._native", frozen)]
pub struct PyRingdownComparison {
    inner: RingdownComparison,
}

#[pymethods]
impl PyRingdownComparison {
    #[getter]
    fn before<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyDict>> {
        metrics_dict(py, &self.inner.before)
    }
    #[getter]
    fn after<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyDict>> {
        metrics_dict(py, &self.inner.after)
    }
    #[getter]
    fn excursion_ratio(&self) -> f64 {
        self.inner.excursion_ratio
    }
    #[getter]
    fn decay_time_ratio(&self) -> Option<f64> {
        self.inner.decay_time_ratio
    }
    #[getter]
    fn settle_time_ratio(&self) -> Option<f64> {
        self.inner.settle_time_ratio
    }
    fn summary<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyDict>> {
        to_dict(py, &self.inner)
    }
    fn __repr__(&self) -> String {
        format!(
            "RingdownComparison(excursion_ratio={:.4}, decay_time_ratio={:?}, settle_time_ratio={:?})",
            self.inner.excursion_ratio, self.inner.decay_time_ratio, self.inner.settle_time_ratio
        )
    }
}

/// Compare two ring-downs recorded at the same `fs` (Hz): first excursion, decay time and
/// settle time side by side. Give at most one of `settle_fraction` (of the first excursion,
/// default 0.1) and `settle_level` (units of x).
#[pyfunction]
#[pyo3(signature = (before, after, fs, *, settle_fraction = None, settle_level = None,
                    min_frequency_hz = None, max_frequency_hz = None, max_modes = 8))]
#[allow(clippy::too_many_arguments)]
pub fn compare_ringdowns(
    py: Python<'_>,
    before: &Bound<'_, PyAny>,
    after: &Bound<'_, PyAny>,
    fs: f64,
    settle_fraction: Option<f64>,
    settle_level: Option<f64>,
    min_frequency_hz: Option<f64>,
    max_frequency_hz: Option<f64>,
    max_modes: usize,
) -> PyResult<PyRingdownComparison> {
    let mut opts = CompareOptions::default();
    opts.settle = match (settle_fraction, settle_level) {
        (None, None) => opts.settle,
        (Some(f), None) => SettleThreshold::FractionOfFirstPeak(f),
        (None, Some(a)) => SettleThreshold::Absolute(a),
        (Some(_), Some(_)) => {
            return Err(to_pyerr(Error::invalid(
                "settle threshold",
                "give at most one of settle_fraction or settle_level",
            )));
        }
    };
    opts.ringdown = ringdown_options(min_frequency_hz, max_frequency_hz, max_modes);
    let (b, a) = (f64_1d(before, "before")?, f64_1d(after, "after")?);
    let (b, a) = (slice_or_copy(&b), slice_or_copy(&a));
    let inner = py.detach(|| core_id::compare_ringdowns(&b, &a, fs, &opts)).py_err()?;
    Ok(PyRingdownComparison { inner })
}

pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyRingdownId>()?;
    m.add_class::<PyRingdownComparison>()?;
    m.add_function(wrap_pyfunction!(identify_ringdown, m)?)?;
    m.add_function(wrap_pyfunction!(compare_ringdowns, m)?)?;
    Ok(())
}

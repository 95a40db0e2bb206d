//! Ring-down identification (`identify_ringdown`) and the before/after comparison
//! (`compare_ringdowns`) as result objects. Physics in `stillsky::identify`.

use crate::convert::to_dict;
use crate::convert::{c128_1d, f64_1d, slice_or_copy};
use crate::errors::{IntoPyResult, to_pyerr};
use numpy::{IntoPyArray, PyArray1};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use stillsky::Error;
use stillsky::identify::{
    self as core_id, CalibrationOptions, CalibrationParameter, CompareOptions, EstimateSource,
    FrfModeOptions, ModalTarget, RingdownComparison, RingdownId, RingdownMetrics, RingdownOptions,
    SettleThreshold,
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

/// Modes of a measured FRF (e.g. `transfer_estimate(...)["h1"]`): list of dicts with
/// `frequency_hz`, `damping_ratio`, `residue` (complex, units of H × rad/s), `band_hz` and
/// `fit_error`. Bins whose `coherence` is below `min_coherence` are left out.
#[pyfunction]
#[pyo3(signature = (freq_hz, h, coherence = None, *, min_coherence = 0.9, min_peak_fraction = 0.01,
                    band_half_width = 0.5, min_prominence = 1.5, max_modes_per_band = 4))]
#[allow(clippy::too_many_arguments)]
pub fn frf_modes<'py>(
    py: Python<'py>,
    freq_hz: &Bound<'py, PyAny>,
    h: &Bound<'py, PyAny>,
    coherence: Option<&Bound<'py, PyAny>>,
    min_coherence: f64,
    min_peak_fraction: f64,
    band_half_width: f64,
    min_prominence: f64,
    max_modes_per_band: usize,
) -> PyResult<Vec<Bound<'py, PyDict>>> {
    let f = f64_1d(freq_hz, "freq_hz")?;
    let h = c128_1d(h, "h")?;
    let c = coherence.map(|c| f64_1d(c, "coherence")).transpose()?;
    let (f, c) = (slice_or_copy(&f), c.as_ref().map(slice_or_copy));
    let h = h.as_slice().map(|s| s.to_vec()).unwrap_or_else(|_| h.as_array().to_vec());
    let mut opts = FrfModeOptions::default();
    opts.min_coherence = min_coherence;
    opts.min_peak_fraction = min_peak_fraction;
    opts.band_half_width = band_half_width;
    opts.min_prominence = min_prominence;
    opts.max_modes_per_band = max_modes_per_band;
    let modes = py.detach(|| core_id::frf_modes(&f, &h, c.as_deref(), &opts)).py_err()?;
    modes
        .iter()
        .map(|m| {
            let d = PyDict::new(py);
            d.set_item("frequency_hz", m.frequency_hz)?;
            d.set_item("damping_ratio", m.damping_ratio)?;
            d.set_item("residue", pyo3::types::PyComplex::from_doubles(py, m.residue.re, m.residue.im))?;
            d.set_item("band_hz", m.band_hz)?;
            d.set_item("fit_error", m.fit_error)?;
            Ok(d)
        })
        .collect()
}

// The signature's literal default is the core's (a literal keeps it visible to Python).
const _: () = assert!(stillsky::identify::DEFAULT_DAMPING_WEIGHT == 0.1);

/// Adjust model-file numbers (dotted paths) so the model's modes match measured ones.
/// `parameters`: mapping path → (lower, upper); `targets`: frequencies (Hz) or dicts with
/// `frequency_hz` and optional `damping_ratio`, `mode`, `weight`. Returns a dict (values,
/// residuals, costs, convergence) with the fitted `model`.
#[pyfunction]
#[pyo3(signature = (model, parameters, targets, *, max_iterations = 60, damping_weight = 0.1))]
pub fn calibrate<'py>(
    py: Python<'py>,
    model: PyRef<'py, crate::model::PyModel>,
    parameters: &Bound<'py, PyDict>,
    targets: &Bound<'py, PyAny>,
    max_iterations: usize,
    damping_weight: f64,
) -> PyResult<Bound<'py, PyDict>> {
    let Some(src) = model.source.clone() else {
        return Err(to_pyerr(Error::unsupported(
            "calibrate needs a Model built from a model file (Model.from_toml or from_toml_str)",
        )));
    };
    let mut params = Vec::new();
    for (k, v) in parameters.iter() {
        let path: String = k.extract()?;
        let (lower, upper): (f64, f64) = v.extract().map_err(|_| {
            to_pyerr(Error::invalid(&path, "bounds must be a (lower, upper) pair of numbers"))
        })?;
        params.push(CalibrationParameter { path, lower, upper });
    }
    let mut tgts = Vec::new();
    for (i, t) in targets.try_iter()?.enumerate() {
        let t = t?;
        if let Ok(f) = t.extract::<f64>() {
            tgts.push(ModalTarget::frequency(f));
            continue;
        }
        let d = t.cast::<PyDict>().map_err(|_| {
            to_pyerr(Error::invalid(format!("targets[{i}]"), "must be a frequency (Hz) or a dict"))
        })?;
        let get = |key: &str| d.get_item(key);
        let f: f64 = match get("frequency_hz")? {
            Some(v) => v.extract()?,
            None => return Err(to_pyerr(Error::invalid(format!("targets[{i}]"), "has no frequency_hz"))),
        };
        let mut mt = ModalTarget::frequency(f);
        if let Some(v) = get("damping_ratio")? {
            mt.damping_ratio = v.extract()?;
        }
        if let Some(v) = get("mode")? {
            mt.mode = v.extract()?;
        }
        if let Some(v) = get("weight")? {
            mt.weight = v.extract()?;
        }
        for (key, _) in d.iter() {
            let key: String = key.extract()?;
            if !["frequency_hz", "damping_ratio", "mode", "weight"].contains(&key.as_str()) {
                return Err(to_pyerr(Error::invalid(
                    format!("targets[{i}]"),
                    format!("unknown key `{key}`"),
                )));
            }
        }
        tgts.push(mt);
    }
    let mut opts = CalibrationOptions::default();
    opts.max_iterations = max_iterations;
    opts.damping_weight = damping_weight;
    let c = py.detach(|| core_id::calibrate(&src.text, &src.label, &params, &tgts, &opts)).py_err()?;
    let fitted =
        crate::model::model_from_text(py, c.model_toml.clone(), format!("{} (calibrated)", src.label))?;
    let d = to_dict(py, &c)?;
    d.set_item("model", Py::new(py, fitted)?)?;
    Ok(d)
}

/// Every numeric path of a model's file that `calibrate` can adjust.
#[pyfunction]
pub fn model_parameters(model: PyRef<'_, crate::model::PyModel>) -> PyResult<Vec<String>> {
    let Some(src) = model.source.clone() else {
        return Err(to_pyerr(Error::unsupported("this Model was not built from a model file")));
    };
    core_id::numeric_paths(&src.text).py_err()
}

fn card_options(
    plate_scale_arcsec_per_px: Option<f64>,
    threshold: Option<f64>,
    coverage_factor: f64,
    min_frequency_hz: Option<f64>,
    max_frequency_hz: Option<f64>,
) -> core_id::CardOptions {
    let mut o = core_id::CardOptions::default();
    o.ringdown = ringdown_options(min_frequency_hz, max_frequency_hz, 8);
    o.plate_scale_arcsec_per_px = plate_scale_arcsec_per_px;
    o.threshold = threshold;
    o.coverage_factor = coverage_factor;
    o
}

/// The ring-down card of `x` (an image track in arcsec when a plate scale is given): f and ζ
/// with their uncertainty, the fit, first excursion and settle time, as a dict.
#[pyfunction]
#[pyo3(signature = (x, fs, *, plate_scale_arcsec_per_px = None, threshold = None, coverage_factor = 2.0,
                    min_frequency_hz = None, max_frequency_hz = None))]
#[allow(clippy::too_many_arguments)]
pub fn ringdown_card<'py>(
    py: Python<'py>,
    x: &Bound<'py, PyAny>,
    fs: f64,
    plate_scale_arcsec_per_px: Option<f64>,
    threshold: Option<f64>,
    coverage_factor: f64,
    min_frequency_hz: Option<f64>,
    max_frequency_hz: Option<f64>,
) -> PyResult<Bound<'py, PyDict>> {
    let x = f64_1d(x, "x")?;
    let x = slice_or_copy(&x);
    let o = card_options(
        plate_scale_arcsec_per_px,
        threshold,
        coverage_factor,
        min_frequency_hz,
        max_frequency_hz,
    );
    let c = py.detach(|| core_id::ringdown_card(&x, fs, &o)).py_err()?;
    to_dict(py, &c)
}

/// Cards of two recordings (same options) and their comparison: dict with `before`, `after`
/// and `comparison` (ratios after / before).
#[pyfunction]
#[pyo3(signature = (before, after, fs, *, plate_scale_arcsec_per_px = None, threshold = None,
                    coverage_factor = 2.0))]
pub fn compare_ringdown_cards<'py>(
    py: Python<'py>,
    before: &Bound<'py, PyAny>,
    after: &Bound<'py, PyAny>,
    fs: f64,
    plate_scale_arcsec_per_px: Option<f64>,
    threshold: Option<f64>,
    coverage_factor: f64,
) -> PyResult<Bound<'py, PyDict>> {
    let (b, a) = (f64_1d(before, "before")?, f64_1d(after, "after")?);
    let (b, a) = (slice_or_copy(&b), slice_or_copy(&a));
    let o = card_options(plate_scale_arcsec_per_px, threshold, coverage_factor, None, None);
    let (cb, ca) = py
        .detach(|| Ok::<_, Error>((core_id::ringdown_card(&b, fs, &o)?, core_id::ringdown_card(&a, fs, &o)?)))
        .py_err()?;
    let d = PyDict::new(py);
    d.set_item("comparison", to_dict(py, &core_id::compare_cards(&cb, &ca))?)?;
    d.set_item("before", to_dict(py, &cb)?)?;
    d.set_item("after", to_dict(py, &ca)?)?;
    Ok(d)
}

pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(ringdown_card, m)?)?;
    m.add_function(wrap_pyfunction!(compare_ringdown_cards, m)?)?;
    m.add_class::<PyRingdownId>()?;
    m.add_class::<PyRingdownComparison>()?;
    m.add_function(wrap_pyfunction!(identify_ringdown, m)?)?;
    m.add_function(wrap_pyfunction!(compare_ringdowns, m)?)?;
    m.add_function(wrap_pyfunction!(frf_modes, m)?)?;
    m.add_function(wrap_pyfunction!(calibrate, m)?)?;
    m.add_function(wrap_pyfunction!(model_parameters, m)?)?;
    Ok(())
}

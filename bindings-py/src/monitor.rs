//! `Monitor`: the core's streaming image-motion monitor (core `monitor`), with its readings and
//! exposure quality as small frozen classes. Samples are read in place from float64 arrays.

use crate::errors::{IntoPyResult, to_pyerr};
use crate::model::PyModel;
use numpy::{
    IntoPyArray, PyArray1, PyArrayDescrMethods, PyArrayDyn, PyArrayMethods, PyUntypedArray,
    PyUntypedArrayMethods,
};
use pyo3::exceptions::PyTypeError;
use pyo3::prelude::*;
use std::borrow::Cow;
use stillsky::monitor::{ExposureQuality, Monitor, MonitorConfig, MonitorState, Reading, UnsafeReason};
use stillsky::{Complex64, Error};

/// The settings: each `None` keeps the core's default (`MonitorConfig::default`).
#[allow(clippy::too_many_arguments)]
fn config(
    sample_rate_hz: Option<f64>,
    window_s: Option<f64>,
    threshold_arcsec: Option<f64>,
    hysteresis: Option<f64>,
    hold_off_s: Option<f64>,
    max_age_s: Option<f64>,
    highpass_hz: Option<f64>,
    fir_taps: Option<usize>,
) -> MonitorConfig {
    let mut c = MonitorConfig::default();
    c.sample_rate_hz = sample_rate_hz.unwrap_or(c.sample_rate_hz);
    c.window_s = window_s.unwrap_or(c.window_s);
    c.threshold_arcsec = threshold_arcsec.unwrap_or(c.threshold_arcsec);
    c.hysteresis = hysteresis.unwrap_or(c.hysteresis);
    c.hold_off_s = hold_off_s.unwrap_or(c.hold_off_s);
    c.max_age_s = max_age_s.unwrap_or(c.max_age_s);
    c.highpass_hz = highpass_hz.unwrap_or(c.highpass_hz);
    c.fir_taps = fir_taps.unwrap_or(c.fir_taps);
    c
}

/// An array argument of `dtype` (converted with `numpy.asarray` when it is not a NumPy array;
/// a NumPy array of another dtype raises `TypeError`), with its shape.
fn array<'py, T: numpy::Element>(
    obj: &Bound<'py, PyAny>,
    name: &str,
    dtype: &str,
) -> PyResult<(Bound<'py, PyArrayDyn<T>>, Vec<usize>)> {
    let py = obj.py();
    let arr: Bound<'py, PyUntypedArray> = match obj.cast::<PyUntypedArray>() {
        Ok(a) => a.clone(),
        Err(_) => py.import("numpy")?.call_method1("asarray", (obj, dtype))?.cast_into::<PyUntypedArray>()?,
    };
    let dt = arr.dtype();
    if !dt.is_equiv_to(&numpy::dtype::<T>(py)) {
        return Err(PyTypeError::new_err(format!(
            "{name}: expected {dtype} values, got a NumPy array of dtype {dt}; convert with numpy.asarray({name}, dtype=\"{dtype}\")"
        )));
    }
    let shape = arr.shape().to_vec();
    Ok((arr.cast_into::<PyArrayDyn<T>>()?, shape))
}

/// The elements in C (row-major) order: borrowed when C-contiguous, else one copy.
fn c_order<'a, T: numpy::Element + Copy>(a: &'a numpy::PyReadonlyArrayDyn<'_, T>) -> Cow<'a, [T]> {
    match a.as_slice() {
        Ok(s) if a.is_c_contiguous() => Cow::Borrowed(s),
        _ => Cow::Owned(a.as_array().iter().copied().collect()),
    }
}

/// A streaming image-motion monitor (single producer: calls on one monitor are serialised by
/// Python's borrow check).
#[pyclass(name = "Monitor", module = "stillsky._native")]
pub struct PyMonitor {
    inner: Monitor,
}

/// What `Monitor.tick` and `Monitor.reading` report.
#[pyclass(name = "MonitorReading", module = "stillsky._native", frozen, get_all)]
pub struct PyMonitorReading {
    state: &'static str,
    reason: &'static str,
    rms_arcsec: f64,
    rms_x_arcsec: f64,
    rms_y_arcsec: f64,
    rms_px: f64,
    last_sample_time_s: f64,
    age_s: f64,
}

impl From<Reading> for PyMonitorReading {
    fn from(r: Reading) -> Self {
        PyMonitorReading {
            state: match r.state {
                MonitorState::Quiet => "quiet",
                MonitorState::Above => "above",
                MonitorState::Unsafe => "unsafe",
            },
            reason: match r.reason {
                UnsafeReason::None => "none",
                UnsafeReason::WarmingUp => "warming_up",
                UnsafeReason::BadSample => "bad_sample",
                UnsafeReason::Gap => "gap",
                UnsafeReason::Stale => "stale",
            },
            rms_arcsec: r.rms_arcsec,
            rms_x_arcsec: r.rms_x_arcsec,
            rms_y_arcsec: r.rms_y_arcsec,
            rms_px: r.rms_px,
            last_sample_time_s: r.last_sample_time_s,
            age_s: r.age_s,
        }
    }
}

#[pymethods]
impl PyMonitorReading {
    fn __repr__(&self) -> String {
        format!(
            "MonitorReading(state={:?}, reason={:?}, rms_arcsec={:.4}, age_s={:.3})",
            self.state, self.reason, self.rms_arcsec, self.age_s
        )
    }
}

/// What `Monitor.exposure_end` reports.
#[pyclass(name = "ExposureQuality", module = "stillsky._native", frozen, get_all)]
pub struct PyExposureQuality {
    duration_s: f64,
    rms_arcsec: f64,
    rms_px: f64,
    max_window_rms_arcsec: f64,
    coverage: f64,
    above_fraction: f64,
}

impl From<ExposureQuality> for PyExposureQuality {
    fn from(q: ExposureQuality) -> Self {
        PyExposureQuality {
            duration_s: q.duration_s,
            rms_arcsec: q.rms_arcsec,
            rms_px: q.rms_px,
            max_window_rms_arcsec: q.max_window_rms_arcsec,
            coverage: q.coverage,
            above_fraction: q.above_fraction,
        }
    }
}

#[pymethods]
impl PyExposureQuality {
    fn __repr__(&self) -> String {
        format!(
            "ExposureQuality(duration_s={:.3}, rms_arcsec={:.4}, coverage={:.3}, above_fraction={:.3})",
            self.duration_s, self.rms_arcsec, self.coverage, self.above_fraction
        )
    }
}

#[pymethods]
impl PyMonitor {
    #[staticmethod]
    #[pyo3(signature = (model, axes, *, sample_rate_hz = None, window_s = None, threshold_arcsec = None,
                        hysteresis = None, hold_off_s = None, max_age_s = None, highpass_hz = None,
                        fir_taps = None))]
    #[allow(clippy::too_many_arguments)]
    fn from_model(
        py: Python<'_>,
        model: PyRef<'_, PyModel>,
        axes: &str,
        sample_rate_hz: Option<f64>,
        window_s: Option<f64>,
        threshold_arcsec: Option<f64>,
        hysteresis: Option<f64>,
        hold_off_s: Option<f64>,
        max_age_s: Option<f64>,
        highpass_hz: Option<f64>,
        fir_taps: Option<usize>,
    ) -> PyResult<Self> {
        let c = config(
            sample_rate_hz,
            window_s,
            threshold_arcsec,
            hysteresis,
            hold_off_s,
            max_age_s,
            highpass_hz,
            fir_taps,
        );
        let m = &model.inner;
        let inner = py.detach(|| Monitor::from_model(m, axes, &c)).py_err()?;
        Ok(PyMonitor { inner })
    }

    #[staticmethod]
    #[pyo3(signature = (freq_hz, frf, plate_scale_arcsec_per_px, *, sample_rate_hz = None, window_s = None,
                        threshold_arcsec = None, hysteresis = None, hold_off_s = None, max_age_s = None,
                        highpass_hz = None, fir_taps = None))]
    #[allow(clippy::too_many_arguments)]
    fn from_calibration(
        freq_hz: &Bound<'_, PyAny>,
        frf: &Bound<'_, PyAny>,
        plate_scale_arcsec_per_px: f64,
        sample_rate_hz: Option<f64>,
        window_s: Option<f64>,
        threshold_arcsec: Option<f64>,
        hysteresis: Option<f64>,
        hold_off_s: Option<f64>,
        max_age_s: Option<f64>,
        highpass_hz: Option<f64>,
        fir_taps: Option<usize>,
    ) -> PyResult<Self> {
        let c = config(
            sample_rate_hz,
            window_s,
            threshold_arcsec,
            hysteresis,
            hold_off_s,
            max_age_s,
            highpass_hz,
            fir_taps,
        );
        let f = crate::convert::f64_1d(freq_hz, "freq_hz")?;
        // Real or complex input, widened to complex128 (no copy when it already is).
        let frf = frf.py().import("numpy")?.call_method1("asarray", (frf, "complex128"))?;
        let (g, shape) = array::<Complex64>(&frf, "frf", "complex128")?;
        let [n_f, 2, n_axes] = shape[..] else {
            return Err(to_pyerr(Error::invalid(
                "frf",
                format!("must have shape (n_freq, 2, n_axes), got {shape:?}"),
            )));
        };
        if n_f != f.len() {
            return Err(to_pyerr(Error::shape("frf rows (one per frequency)", f.len(), n_f)));
        }
        let g = g.try_readonly()?;
        let inner = Monitor::from_calibration(
            &crate::convert::slice_or_copy(&f),
            n_axes,
            &c_order(&g),
            plate_scale_arcsec_per_px,
            &c,
        )
        .py_err()?;
        Ok(PyMonitor { inner })
    }

    /// Feed samples (m/s²): shape (n,) for one channel or (n, n_axes), the first taken at `t0_s`.
    fn push(&mut self, py: Python<'_>, t0_s: f64, samples: &Bound<'_, PyAny>) -> PyResult<()> {
        let (a, shape) = array::<f64>(samples, "samples", "float64")?;
        let n_axes = self.inner.n_axes();
        let cols = match shape[..] {
            [_] if n_axes == 1 => 1,
            [_, c] => c,
            _ => {
                return Err(to_pyerr(Error::invalid(
                    "samples",
                    format!("must have shape (n, {n_axes}) (or (n,) for one channel), got {shape:?}"),
                )));
            }
        };
        let a = a.try_readonly()?;
        let x = c_order(&a);
        let m = &mut self.inner;
        py.detach(|| m.push(t0_s, &x, cols)).py_err()
    }

    /// Set the clock to `now_s` and return the reading.
    fn tick(&mut self, now_s: f64) -> PyResult<PyMonitorReading> {
        Ok(self.inner.tick(now_s).py_err()?.into())
    }

    /// The reading as of the last tick.
    fn reading(&self) -> PyMonitorReading {
        self.inner.reading().into()
    }

    fn exposure_begin(&mut self, t_s: f64) -> PyResult<()> {
        self.inner.exposure_begin(t_s).py_err()
    }

    fn exposure_end(&mut self, t_s: f64) -> PyResult<PyExposureQuality> {
        Ok(self.inner.exposure_end(t_s).py_err()?.into())
    }

    fn reset(&mut self) {
        self.inner.reset();
    }

    /// The FIR taps (arcsec per m/s²) from channel `channel` to image axis `image_axis` (0 = x, 1 = y).
    fn fir<'py>(
        &self,
        py: Python<'py>,
        image_axis: usize,
        channel: usize,
    ) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let h = self.inner.fir(image_axis, channel).ok_or_else(|| {
            to_pyerr(Error::invalid(
                "fir",
                format!(
                    "image_axis must be 0 or 1 and channel below {}, got ({image_axis}, {channel})",
                    self.inner.n_axes()
                ),
            ))
        })?;
        Ok(h.to_vec().into_pyarray(py))
    }

    #[getter]
    fn n_axes(&self) -> usize {
        self.inner.n_axes()
    }
    #[getter]
    fn fir_taps(&self) -> usize {
        self.inner.fir_taps()
    }
    #[getter]
    fn window_samples(&self) -> usize {
        self.inner.window_samples()
    }
    #[getter]
    fn warmup_samples(&self) -> usize {
        self.inner.warmup_samples()
    }
    #[getter]
    fn latency_s(&self) -> f64 {
        self.inner.latency_s()
    }
    #[getter]
    fn plate_scale_arcsec_per_px(&self) -> f64 {
        self.inner.plate_scale_arcsec_per_px()
    }
    #[getter]
    fn sample_rate_hz(&self) -> f64 {
        self.inner.config().sample_rate_hz
    }
    #[getter]
    fn threshold_arcsec(&self) -> f64 {
        self.inner.config().threshold_arcsec
    }

    fn __repr__(&self) -> String {
        let c = self.inner.config();
        format!(
            "Monitor(n_axes={}, sample_rate_hz={}, fir_taps={}, window_samples={}, threshold_arcsec={})",
            self.inner.n_axes(),
            c.sample_rate_hz,
            c.fir_taps,
            self.inner.window_samples(),
            c.threshold_arcsec
        )
    }
}

pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyMonitor>()?;
    m.add_class::<PyMonitorReading>()?;
    m.add_class::<PyExposureQuality>()?;
    Ok(())
}

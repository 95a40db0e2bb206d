//! Sensor response (poles and zeros, removal within the valid band) and self-noise curves.
//! Physics in `stillsky::sensor_response`.

use crate::convert::{c128_1d, f64_1d, slice_or_copy, to_dict};
use crate::errors::IntoPyResult;
use num_complex::Complex64;
use numpy::{IntoPyArray, PyArray1};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use stillsky::sensor_response::{NoiseCurve, SensorResponse, noise_floor_check as core_check};
use stillsky::spectrum::{Psd, Quantity};

/// A sensor's response H(s) = k Π(s − z)/Π(s − p) (rad/s) with its valid band.
#[pyclass(name = "SensorResponse", module = "stillsky._native", frozen)]
pub struct PySensorResponse {
    inner: SensorResponse,
}

fn c_vec(obj: &Bound<'_, PyAny>, name: &str) -> PyResult<Vec<Complex64>> {
    let a = c128_1d(obj, name)?;
    Ok(a.as_slice().map(|s| s.to_vec()).unwrap_or_else(|_| a.as_array().to_vec()))
}

#[pymethods]
impl PySensorResponse {
    #[new]
    #[pyo3(signature = (zeros, poles, gain, input, valid_band_hz))]
    fn new(
        zeros: &Bound<'_, PyAny>,
        poles: &Bound<'_, PyAny>,
        gain: f64,
        input: &str,
        valid_band_hz: (f64, f64),
    ) -> PyResult<Self> {
        let q = Quantity::from_name(input).py_err()?;
        let inner = SensorResponse::from_poles_zeros(
            c_vec(zeros, "zeros")?,
            c_vec(poles, "poles")?,
            gain,
            q,
            valid_band_hz,
        )
        .py_err()?;
        Ok(PySensorResponse { inner })
    }
    /// A moving-coil geophone (velocity in, V out).
    #[staticmethod]
    fn geophone(natural_hz: f64, damping: f64, generator_v_per_m_s: f64) -> PyResult<Self> {
        Ok(PySensorResponse {
            inner: SensorResponse::geophone(natural_hz, damping, generator_v_per_m_s).py_err()?,
        })
    }
    /// A MEMS accelerometer flat to its bandwidth (acceleration in).
    #[staticmethod]
    fn flat_accelerometer(sensitivity: f64, bandwidth_hz: f64) -> PyResult<Self> {
        Ok(PySensorResponse {
            inner: SensorResponse::flat_accelerometer(sensitivity, bandwidth_hz).py_err()?,
        })
    }
    #[getter]
    fn zeros<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<Complex64>> {
        self.inner.zeros.clone().into_pyarray(py)
    }
    #[getter]
    fn poles<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<Complex64>> {
        self.inner.poles.clone().into_pyarray(py)
    }
    #[getter]
    fn gain(&self) -> f64 {
        self.inner.gain
    }
    #[getter]
    fn input(&self) -> &'static str {
        self.inner.input.name()
    }
    #[getter]
    fn valid_band_hz(&self) -> (f64, f64) {
        self.inner.valid_band_hz
    }
    /// Complex response at each frequency (Hz).
    fn response<'py>(
        &self,
        py: Python<'py>,
        freq_hz: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyArray1<Complex64>>> {
        let f = f64_1d(freq_hz, "freq_hz")?;
        Ok(slice_or_copy(&f).iter().map(|&v| self.inner.response(v)).collect::<Vec<_>>().into_pyarray(py))
    }
    /// Remove the response from `x` sampled at `fs` within `band` (Hz; default the valid band).
    #[pyo3(signature = (x, fs, band = None))]
    fn remove<'py>(
        &self,
        py: Python<'py>,
        x: &Bound<'py, PyAny>,
        fs: f64,
        band: Option<(f64, f64)>,
    ) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let x = f64_1d(x, "x")?;
        let x = slice_or_copy(&x);
        let out = py.detach(|| self.inner.remove(&x, fs, band)).py_err()?;
        Ok(out.into_pyarray(py))
    }
    /// Remove the response from a PSD of the sensor's output at `freq_hz` within `band` (Hz;
    /// default the valid band): S/|H|² inside, zero outside.
    #[pyo3(signature = (freq_hz, psd, band = None))]
    fn remove_psd<'py>(
        &self,
        py: Python<'py>,
        freq_hz: &Bound<'py, PyAny>,
        psd: &Bound<'py, PyAny>,
        band: Option<(f64, f64)>,
    ) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let (f, p) = (f64_1d(freq_hz, "freq_hz")?, f64_1d(psd, "psd")?);
        let (f, p) = (slice_or_copy(&f), slice_or_copy(&p));
        let out = py.detach(|| self.inner.remove_psd(&f, &p, band)).py_err()?;
        Ok(out.into_pyarray(py))
    }
    fn __repr__(&self) -> String {
        format!(
            "SensorResponse(poles={}, zeros={}, gain={}, input={:?}, valid_band_hz={:?})",
            self.inner.poles.len(),
            self.inner.zeros.len(),
            self.inner.gain,
            self.inner.input.name(),
            self.inner.valid_band_hz
        )
    }
}

/// A bundled self-noise curve: dict with name, source, freq_hz, psd ((m/s²)²/Hz), quantity.
#[pyfunction]
pub fn noise_curve<'py>(py: Python<'py>, name: &str) -> PyResult<Bound<'py, PyDict>> {
    let c = NoiseCurve::preset(name).py_err()?;
    let d = PyDict::new(py);
    d.set_item("name", &c.name)?;
    d.set_item("source", &c.source)?;
    d.set_item("freq_hz", c.freq_hz.clone().into_pyarray(py))?;
    d.set_item("psd", c.psd.clone().into_pyarray(py))?;
    d.set_item("quantity", c.quantity.name())?;
    Ok(d)
}

/// How much of a recorded PSD lies within `factor` (PSD) of a bundled sensor's noise floor.
#[pyfunction]
#[pyo3(signature = (freq_hz, psd, quantity, sensor, *, factor = None))]
pub fn noise_floor_check<'py>(
    py: Python<'py>,
    freq_hz: &Bound<'py, PyAny>,
    psd: &Bound<'py, PyAny>,
    quantity: &str,
    sensor: &str,
    factor: Option<f64>,
) -> PyResult<Bound<'py, PyDict>> {
    let (f, p) = (f64_1d(freq_hz, "freq_hz")?, f64_1d(psd, "psd")?);
    let psd = Psd::new(
        slice_or_copy(&f).to_vec(),
        slice_or_copy(&p).to_vec(),
        Quantity::from_name(quantity).py_err()?,
    )
    .py_err()?;
    let c = core_check(&psd, &NoiseCurve::preset(sensor).py_err()?, factor).py_err()?;
    to_dict(py, &c)
}

pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PySensorResponse>()?;
    m.add_function(wrap_pyfunction!(noise_curve, m)?)?;
    m.add_function(wrap_pyfunction!(noise_floor_check, m)?)?;
    Ok(())
}

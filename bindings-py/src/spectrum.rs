//! `Psd`, Welch estimation, reference ground spectra, criterion curves and wind spectra.

use crate::convert::{f64_1d, slice_or_copy};
use crate::errors::{IntoPyResult, to_pyerr};
use numpy::{IntoPyArray, PyArray1};
use pyo3::prelude::*;
use pyo3::types::{PyBool, PyDict, PyString};
use std::path::PathBuf;
use stillsky::spectrum::{
    self, CriterionCurve, Detrend, Extrapolate, Psd, Quantity, ReferenceGround, WelchConfig, Window,
};
use stillsky::{Error, FreqGrid};

type F64Array<'py> = Bound<'py, PyArray1<f64>>;

/// A one-sided PSD (unit²/Hz) on a strictly increasing grid, with its physical quantity.
#[pyclass(name = "Psd", module = "stillsky._native", frozen)]
pub struct PyPsd {
    pub inner: Psd,
}

fn grid(obj: &Bound<'_, PyAny>, name: &str) -> PyResult<FreqGrid> {
    let a = f64_1d(obj, name)?;
    FreqGrid::new(slice_or_copy(&a).into_owned()).py_err()
}

fn extrapolate(name: &str) -> PyResult<Extrapolate> {
    match name {
        "error" => Ok(Extrapolate::Error),
        "zero" => Ok(Extrapolate::Zero),
        other => Err(to_pyerr(Error::UnknownName {
            kind: "extrapolate policy".into(),
            name: other.into(),
            known: "error, zero".into(),
        })),
    }
}

#[pymethods]
impl PyPsd {
    #[new]
    #[pyo3(signature = (freq_hz, values, quantity = "acceleration"))]
    fn new(freq_hz: &Bound<'_, PyAny>, values: &Bound<'_, PyAny>, quantity: &str) -> PyResult<Self> {
        let f = f64_1d(freq_hz, "freq_hz")?;
        let v = f64_1d(values, "values")?;
        let q = Quantity::from_name(quantity).py_err()?;
        let inner = Psd::new(slice_or_copy(&f).into_owned(), slice_or_copy(&v).into_owned(), q).py_err()?;
        Ok(PyPsd { inner })
    }

    #[staticmethod]
    fn from_csv(path: PathBuf) -> PyResult<Self> {
        Ok(PyPsd { inner: Psd::read_csv(&path).py_err()? })
    }

    #[getter]
    fn freq_hz<'py>(&self, py: Python<'py>) -> F64Array<'py> {
        self.inner.freq_hz().to_vec().into_pyarray(py)
    }

    #[getter]
    fn values<'py>(&self, py: Python<'py>) -> F64Array<'py> {
        self.inner.values().to_vec().into_pyarray(py)
    }

    #[getter]
    fn quantity(&self) -> &'static str {
        self.inner.quantity().name()
    }

    #[getter]
    fn unit(&self) -> &'static str {
        self.inner.quantity().unit()
    }

    fn mean_square(&self) -> f64 {
        self.inner.mean_square()
    }

    fn rms(&self) -> f64 {
        self.inner.rms()
    }

    fn band_rms(&self, f_lo_hz: f64, f_hi_hz: f64) -> PyResult<f64> {
        self.inner.band_rms(f_lo_hz, f_hi_hz).py_err()
    }

    fn to(&self, quantity: &str) -> PyResult<Self> {
        let q = Quantity::from_name(quantity).py_err()?;
        Ok(PyPsd { inner: self.inner.to(q).py_err()? })
    }

    #[pyo3(signature = (freq_hz, *, extrapolate = "error"))]
    fn resample(&self, freq_hz: &Bound<'_, PyAny>, extrapolate: &str) -> PyResult<Self> {
        let g = grid(freq_hz, "freq_hz")?;
        let p = self::extrapolate(extrapolate)?;
        Ok(PyPsd { inner: self.inner.resample(&g, p).py_err()? })
    }

    /// Band RMS velocity against a vibration criterion curve.
    fn check_criterion<'py>(&self, py: Python<'py>, name: &str) -> PyResult<Bound<'py, PyDict>> {
        let r = CriterionCurve::from_name(name).py_err()?.evaluate(&self.inner).py_err()?;
        let d = PyDict::new(py);
        d.set_item("band_centre_hz", r.band_centre_hz.into_pyarray(py))?;
        d.set_item("band_rms_m_s", r.band_rms_m_s.into_pyarray(py))?;
        d.set_item("limit_m_s", r.limit_m_s.into_pyarray(py))?;
        d.set_item("worst_ratio", r.worst_ratio)?;
        d.set_item("worst_band_hz", r.worst_band_hz)?;
        d.set_item("passes", r.worst_ratio <= 1.0)?;
        d.set_item("bands_not_covered_hz", r.bands_not_covered_hz.into_pyarray(py))?;
        Ok(d)
    }

    fn __len__(&self) -> usize {
        self.inner.len()
    }

    /// Pickle as (Psd, (freq_hz, values, quantity)): the arrays round-trip bit for bit.
    fn __reduce__<'py>(slf: &Bound<'py, Self>) -> PyResult<Bound<'py, pyo3::types::PyTuple>> {
        let py = slf.py();
        let p = &slf.get().inner;
        let args = (
            p.freq_hz().to_vec().into_pyarray(py),
            p.values().to_vec().into_pyarray(py),
            p.quantity().name(),
        );
        pyo3::types::PyTuple::new(py, [slf.get_type().into_any(), args.into_pyobject(py)?.into_any()])
    }

    fn __repr__(&self) -> String {
        let (lo, hi) = self.inner.span_hz();
        format!(
            "Psd({}, {} points, {lo:.4e}–{hi:.4e} Hz, rms={:.4e})",
            self.inner.quantity().name(),
            self.inner.len(),
            self.inner.rms()
        )
    }
}

/// Welch options from scipy-style arguments.
fn welch_config(
    nperseg: usize,
    noverlap: Option<usize>,
    window: &Bound<'_, PyAny>,
    detrend: &Bound<'_, PyAny>,
) -> PyResult<WelchConfig> {
    let w = if let Ok(s) = window.cast::<PyString>() {
        Window::from_name(s.to_str()?).py_err()?
    } else {
        let a = f64_1d(window, "window")?;
        Window::Custom(slice_or_copy(&a).into_owned())
    };
    let d = if let Ok(b) = detrend.cast::<PyBool>() {
        if b.is_true() {
            return Err(to_pyerr(Error::invalid(
                "detrend",
                "True is not a detrend; use 'constant', 'linear' or False",
            )));
        }
        Detrend::None
    } else {
        Detrend::from_name(detrend.extract::<&str>()?).py_err()?
    };
    let mut cfg = WelchConfig::new(nperseg).with_window(w).with_detrend(d);
    if let Some(n) = noverlap {
        cfg = cfg.with_noverlap(n);
    }
    Ok(cfg)
}

#[pyfunction]
#[pyo3(signature = (x, fs, *, nperseg = 256, noverlap = None, window = None, detrend = None))]
pub fn welch<'py>(
    py: Python<'py>,
    x: &Bound<'py, PyAny>,
    fs: f64,
    nperseg: usize,
    noverlap: Option<usize>,
    window: Option<&Bound<'py, PyAny>>,
    detrend: Option<&Bound<'py, PyAny>>,
) -> PyResult<(F64Array<'py>, F64Array<'py>)> {
    let cfg =
        welch_config(nperseg, noverlap, &defaults(py, window, "hann"), &defaults(py, detrend, "constant"))?;
    let x = f64_1d(x, "x")?;
    let x = slice_or_copy(&x);
    let r = py.detach(|| spectrum::welch(&x, fs, &cfg)).py_err()?;
    Ok((r.freq_hz.into_pyarray(py), r.values.into_pyarray(py)))
}

#[pyfunction]
#[pyo3(signature = (x, y, fs, *, nperseg = 256, noverlap = None, window = None, detrend = None))]
#[allow(clippy::too_many_arguments)]
pub fn csd<'py>(
    py: Python<'py>,
    x: &Bound<'py, PyAny>,
    y: &Bound<'py, PyAny>,
    fs: f64,
    nperseg: usize,
    noverlap: Option<usize>,
    window: Option<&Bound<'py, PyAny>>,
    detrend: Option<&Bound<'py, PyAny>>,
) -> PyResult<(F64Array<'py>, Bound<'py, PyArray1<num_complex::Complex64>>)> {
    let cfg =
        welch_config(nperseg, noverlap, &defaults(py, window, "hann"), &defaults(py, detrend, "constant"))?;
    let (x, y) = (f64_1d(x, "x")?, f64_1d(y, "y")?);
    let (x, y) = (slice_or_copy(&x), slice_or_copy(&y));
    let r = py.detach(|| spectrum::csd(&x, &y, fs, &cfg)).py_err()?;
    Ok((r.freq_hz.into_pyarray(py), r.values.into_pyarray(py)))
}

/// Two-channel transfer estimates from input `x` to output `y`: dict with `freq_hz` (Welch
/// bins above 0 Hz), `h1` = Pxy/Pxx, `h2` = Pyy/Pyx (complex), `coherence` and `n_segments`.
#[pyfunction]
#[pyo3(signature = (x, y, fs, *, nperseg = 256, noverlap = None, window = None, detrend = None))]
#[allow(clippy::too_many_arguments)]
pub fn transfer_estimate<'py>(
    py: Python<'py>,
    x: &Bound<'py, PyAny>,
    y: &Bound<'py, PyAny>,
    fs: f64,
    nperseg: usize,
    noverlap: Option<usize>,
    window: Option<&Bound<'py, PyAny>>,
    detrend: Option<&Bound<'py, PyAny>>,
) -> PyResult<Bound<'py, pyo3::types::PyDict>> {
    let cfg =
        welch_config(nperseg, noverlap, &defaults(py, window, "hann"), &defaults(py, detrend, "constant"))?;
    let (x, y) = (f64_1d(x, "x")?, f64_1d(y, "y")?);
    let (x, y) = (slice_or_copy(&x), slice_or_copy(&y));
    let r = py.detach(|| spectrum::transfer_estimate(&x, &y, fs, &cfg)).py_err()?;
    let d = pyo3::types::PyDict::new(py);
    d.set_item("freq_hz", r.freq_hz.into_pyarray(py))?;
    d.set_item("h1", r.h1.into_pyarray(py))?;
    d.set_item("h2", r.h2.into_pyarray(py))?;
    d.set_item("coherence", r.coherence.into_pyarray(py))?;
    d.set_item("n_segments", r.n_segments)?;
    Ok(d)
}

#[pyfunction]
#[pyo3(signature = (x, y, fs, *, nperseg = 256, noverlap = None, window = None, detrend = None))]
#[allow(clippy::too_many_arguments)]
pub fn coherence<'py>(
    py: Python<'py>,
    x: &Bound<'py, PyAny>,
    y: &Bound<'py, PyAny>,
    fs: f64,
    nperseg: usize,
    noverlap: Option<usize>,
    window: Option<&Bound<'py, PyAny>>,
    detrend: Option<&Bound<'py, PyAny>>,
) -> PyResult<(F64Array<'py>, F64Array<'py>)> {
    let cfg =
        welch_config(nperseg, noverlap, &defaults(py, window, "hann"), &defaults(py, detrend, "constant"))?;
    let (x, y) = (f64_1d(x, "x")?, f64_1d(y, "y")?);
    let (x, y) = (slice_or_copy(&x), slice_or_copy(&y));
    let r = py.detach(|| spectrum::coherence(&x, &y, fs, &cfg)).py_err()?;
    Ok((r.freq_hz.into_pyarray(py), r.values.into_pyarray(py)))
}

fn defaults<'py>(py: Python<'py>, v: Option<&Bound<'py, PyAny>>, name: &str) -> Bound<'py, PyAny> {
    v.cloned().unwrap_or_else(|| PyString::new(py, name).into_any())
}

/// Reference ground acceleration PSD ("nlnm" or "nhnm").
#[pyfunction]
pub fn reference_ground(name: &str, freq_hz: &Bound<'_, PyAny>) -> PyResult<PyPsd> {
    let g = grid(freq_hz, "freq_hz")?;
    Ok(PyPsd { inner: ReferenceGround::from_name(name).py_err()?.psd(&g).py_err()? })
}

/// Third-octave band centres (Hz) and band RMS velocity limits (m/s) of a criterion curve.
#[pyfunction]
pub fn criterion_curve<'py>(py: Python<'py>, name: &str) -> PyResult<(F64Array<'py>, F64Array<'py>)> {
    let c = CriterionCurve::from_name(name).py_err()?;
    let centres = CriterionCurve::band_centres_hz();
    let limits = vec![c.level_m_s(); centres.len()];
    Ok((centres.into_pyarray(py), limits.into_pyarray(py)))
}

pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyPsd>()?;
    m.add_function(wrap_pyfunction!(welch, m)?)?;
    m.add_function(wrap_pyfunction!(csd, m)?)?;
    m.add_function(wrap_pyfunction!(coherence, m)?)?;
    m.add_function(wrap_pyfunction!(transfer_estimate, m)?)?;
    m.add_function(wrap_pyfunction!(reference_ground, m)?)?;
    m.add_function(wrap_pyfunction!(criterion_curve, m)?)?;
    Ok(())
}

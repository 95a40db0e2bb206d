//! Time histories: `Model.transient`, `Model.image_response`, `Model.gust_response`, the
//! `Gust` description and `random_realisation`. Physics in `stillsky::transient`.

use crate::convert::{f64_1d, names, slice_or_copy};
use crate::errors::{IntoPyResult, to_pyerr};
use crate::spectrum::PyPsd;
use numpy::{IntoPyArray, PyArray1, PyArray2};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use stillsky::Error;
use stillsky::model::Model;
use stillsky::spectrum::Quantity;
use stillsky::transient::{
    self as core_t, DragLaw, Gust, GustLength, GustWind, ImageMetrics, ImageTransient, TransientOptions,
};

type F64Array = Py<PyArray1<f64>>;

fn options(ground: &str, decay_tolerance: f64, radius_px: f64) -> PyResult<TransientOptions> {
    let g = match ground {
        "displacement" => core_t::GroundQuantity::Displacement,
        "acceleration" => core_t::GroundQuantity::Acceleration,
        other => {
            return Err(to_pyerr(Error::UnknownName {
                kind: "ground history quantity".into(),
                name: other.into(),
                known: "displacement, acceleration".into(),
            }));
        }
    };
    Ok(TransientOptions::default()
        .with_ground(g)
        .with_decay_tolerance(decay_tolerance)
        .with_radius_px(radius_px))
}

/// Image metrics as plain fields (shared by both result classes).
#[derive(Clone, Copy)]
struct Metrics {
    peak_arcsec: f64,
    peak_px: f64,
    peak_time_s: f64,
    radius_px: f64,
    settle_time_s: Option<f64>,
    fraction_outside: f64,
}

impl From<&ImageMetrics> for Metrics {
    fn from(m: &ImageMetrics) -> Self {
        Metrics {
            peak_arcsec: m.peak_arcsec,
            peak_px: m.peak_px,
            peak_time_s: m.peak_time_s,
            radius_px: m.radius_px,
            settle_time_s: m.settle_time_s,
            fraction_outside: m.fraction_outside,
        }
    }
}

impl Metrics {
    fn fill(&self, d: &Bound<'_, PyDict>) -> PyResult<()> {
        d.set_item("peak_arcsec", self.peak_arcsec)?;
        d.set_item("peak_px", self.peak_px)?;
        d.set_item("peak_time_s", self.peak_time_s)?;
        d.set_item("radius_px", self.radius_px)?;
        d.set_item("settle_time_s", self.settle_time_s)?;
        d.set_item("fraction_outside", self.fraction_outside)?;
        Ok(())
    }
}

/// Output histories of `Model.transient` (SI: m or rad), with image metrics when both image
/// axes were asked for and the model has optics.
#[pyclass(name = "Transient", module = "stillsky._native", frozen)]
pub struct PyTransient {
    time_s: F64Array,
    outputs: Vec<String>,
    values: Py<PyArray2<f64>>,
    fft_len: usize,
    metrics: Option<Metrics>,
}

#[pymethods]
impl PyTransient {
    #[getter]
    fn time_s(&self, py: Python<'_>) -> F64Array {
        self.time_s.clone_ref(py)
    }
    #[getter]
    fn outputs(&self) -> Vec<String> {
        self.outputs.clone()
    }
    #[getter]
    fn values(&self, py: Python<'_>) -> Py<PyArray2<f64>> {
        self.values.clone_ref(py)
    }
    #[getter]
    fn fft_len(&self) -> usize {
        self.fft_len
    }
    #[getter]
    fn peak_arcsec(&self) -> Option<f64> {
        self.metrics.map(|m| m.peak_arcsec)
    }
    #[getter]
    fn peak_px(&self) -> Option<f64> {
        self.metrics.map(|m| m.peak_px)
    }
    #[getter]
    fn peak_time_s(&self) -> Option<f64> {
        self.metrics.map(|m| m.peak_time_s)
    }
    #[getter]
    fn radius_px(&self) -> Option<f64> {
        self.metrics.map(|m| m.radius_px)
    }
    #[getter]
    fn settle_time_s(&self) -> Option<f64> {
        self.metrics.and_then(|m| m.settle_time_s)
    }
    #[getter]
    fn fraction_outside(&self) -> Option<f64> {
        self.metrics.map(|m| m.fraction_outside)
    }
    /// One output's history (a row view of `values`).
    fn __getitem__<'py>(&self, py: Python<'py>, name: &str) -> PyResult<Bound<'py, PyAny>> {
        let o = self.outputs.iter().position(|x| x == name).ok_or_else(|| {
            to_pyerr(Error::UnknownName {
                kind: "output of this transient result".into(),
                name: name.into(),
                known: self.outputs.join(", "),
            })
        })?;
        self.values.bind(py).get_item(o)
    }
    fn summary<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyDict>> {
        let d = PyDict::new(py);
        d.set_item("outputs", self.outputs.clone())?;
        d.set_item("samples", self.time_s.bind(py).len()?)?;
        d.set_item("fft_len", self.fft_len)?;
        if let Some(m) = &self.metrics {
            m.fill(&d)?;
        }
        Ok(d)
    }
    fn __repr__(&self, py: Python<'_>) -> PyResult<String> {
        Ok(format!(
            "Transient(outputs={:?}, samples={}, fft_len={})",
            self.outputs,
            self.time_s.bind(py).len()?,
            self.fft_len
        ))
    }
}

/// Sensor-plane history (arcsec on both image axes) with its metrics.
#[pyclass(name = "ImageTransient", module = "stillsky._native", frozen)]
pub struct PyImageTransient {
    time_s: F64Array,
    image_x_arcsec: F64Array,
    image_y_arcsec: F64Array,
    input_history: F64Array,
    plate_scale_arcsec_per_px: f64,
    metrics: Metrics,
}

impl PyImageTransient {
    fn new(py: Python<'_>, r: ImageTransient) -> Self {
        let metrics = Metrics::from(&r.metrics);
        PyImageTransient {
            time_s: r.time_s.into_pyarray(py).unbind(),
            image_x_arcsec: r.image_x_arcsec.into_pyarray(py).unbind(),
            image_y_arcsec: r.image_y_arcsec.into_pyarray(py).unbind(),
            input_history: r.input_history.into_pyarray(py).unbind(),
            plate_scale_arcsec_per_px: r.plate_scale_arcsec_per_px,
            metrics,
        }
    }
}

#[pymethods]
impl PyImageTransient {
    #[getter]
    fn time_s(&self, py: Python<'_>) -> F64Array {
        self.time_s.clone_ref(py)
    }
    #[getter]
    fn image_x_arcsec(&self, py: Python<'_>) -> F64Array {
        self.image_x_arcsec.clone_ref(py)
    }
    #[getter]
    fn image_y_arcsec(&self, py: Python<'_>) -> F64Array {
        self.image_y_arcsec.clone_ref(py)
    }
    #[getter]
    fn input_history(&self, py: Python<'_>) -> F64Array {
        self.input_history.clone_ref(py)
    }
    #[getter]
    fn plate_scale_arcsec_per_px(&self) -> f64 {
        self.plate_scale_arcsec_per_px
    }
    #[getter]
    fn peak_arcsec(&self) -> f64 {
        self.metrics.peak_arcsec
    }
    #[getter]
    fn peak_px(&self) -> f64 {
        self.metrics.peak_px
    }
    #[getter]
    fn peak_time_s(&self) -> f64 {
        self.metrics.peak_time_s
    }
    #[getter]
    fn radius_px(&self) -> f64 {
        self.metrics.radius_px
    }
    #[getter]
    fn settle_time_s(&self) -> Option<f64> {
        self.metrics.settle_time_s
    }
    #[getter]
    fn fraction_outside(&self) -> f64 {
        self.metrics.fraction_outside
    }
    fn summary<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyDict>> {
        let d = PyDict::new(py);
        d.set_item("samples", self.time_s.bind(py).len()?)?;
        d.set_item("plate_scale_arcsec_per_px", self.plate_scale_arcsec_per_px)?;
        self.metrics.fill(&d)?;
        Ok(d)
    }
    fn __repr__(&self) -> String {
        format!(
            "ImageTransient(peak_px={:.4}, settle_time_s={:?}, fraction_outside={:.4})",
            self.metrics.peak_px, self.metrics.settle_time_s, self.metrics.fraction_outside
        )
    }
}

/// A wind-speed fluctuation history u′(t) (m/s); build with the static methods.
#[pyclass(name = "Gust", module = "stillsky._native", frozen)]
pub struct PyGust {
    inner: Gust,
}

#[pymethods]
impl PyGust {
    #[staticmethod]
    #[pyo3(signature = (amplitude_m_s, *, start_s = 0.0))]
    fn step(amplitude_m_s: f64, start_s: f64) -> Self {
        PyGust { inner: Gust::step(amplitude_m_s).starting_at(start_s) }
    }

    #[staticmethod]
    #[pyo3(signature = (amplitude_m_s, *, gradient_distance_m = None, duration_s = None, start_s = 0.0))]
    fn one_minus_cosine(
        amplitude_m_s: f64,
        gradient_distance_m: Option<f64>,
        duration_s: Option<f64>,
        start_s: f64,
    ) -> PyResult<Self> {
        let length = match (gradient_distance_m, duration_s) {
            (Some(h), None) => GustLength::GradientDistanceM(h),
            (None, Some(t)) => GustLength::DurationS(t),
            _ => {
                return Err(to_pyerr(Error::invalid(
                    "gust length",
                    "give exactly one of gradient_distance_m or duration_s",
                )));
            }
        };
        Ok(PyGust { inner: Gust::OneMinusCosine { amplitude_m_s, length, start_s } })
    }

    /// A measured total wind speed (m/s) sampled at `fs` (Hz) from t = 0. One copy is kept.
    #[staticmethod]
    fn measured(speed_m_s: &Bound<'_, PyAny>, fs: f64) -> PyResult<Self> {
        let v = f64_1d(speed_m_s, "speed_m_s")?;
        Ok(PyGust { inner: Gust::Measured { speed_m_s: slice_or_copy(&v).into_owned(), fs_hz: fs } })
    }

    /// A random realisation of a velocity `Psd` ((m/s)²/Hz) with a stated seed.
    #[staticmethod]
    #[pyo3(signature = (psd, *, seed))]
    fn random(psd: PyRef<'_, PyPsd>, seed: u64) -> PyResult<Self> {
        let p = &psd.inner;
        if p.quantity() != Quantity::Velocity {
            return Err(to_pyerr(Error::invalid(
                "psd",
                format!("a gust needs a velocity PSD ((m/s)^2/Hz), got a {} PSD", p.quantity().name()),
            )));
        }
        Ok(PyGust { inner: Gust::Random { freq_hz: p.freq_hz().to_vec(), psd: p.values().to_vec(), seed } })
    }

    /// u′(t) (m/s) at n samples of `fs` (Hz) from t = 0 for mean speed `mean_speed_m_s`.
    fn velocity_history<'py>(
        &self,
        py: Python<'py>,
        mean_speed_m_s: f64,
        fs: f64,
        n: usize,
    ) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let g = &self.inner;
        let u = py.detach(|| g.velocity_history(mean_speed_m_s, fs, n)).py_err()?;
        Ok(u.into_pyarray(py))
    }

    fn __repr__(&self) -> String {
        match &self.inner {
            Gust::Step { amplitude_m_s, start_s } => format!("Gust.step({amplitude_m_s}, start_s={start_s})"),
            Gust::OneMinusCosine { amplitude_m_s, length, start_s } => {
                format!("Gust.one_minus_cosine({amplitude_m_s}, {length:?}, start_s={start_s})")
            }
            Gust::Measured { speed_m_s, fs_hz } => {
                format!("Gust.measured({} samples, fs={fs_hz})", speed_m_s.len())
            }
            Gust::Random { freq_hz, seed, .. } => {
                format!("Gust.random({} PSD points, seed={seed})", freq_hz.len())
            }
        }
    }
}

/// `Model.transient`.
#[allow(clippy::too_many_arguments)]
pub fn transient(
    m: &Model,
    py: Python<'_>,
    input: &str,
    history: &Bound<'_, PyAny>,
    fs: f64,
    outputs: &Bound<'_, PyAny>,
    ground: &str,
    decay_tolerance: f64,
    radius_px: f64,
) -> PyResult<PyTransient> {
    let opts = options(ground, decay_tolerance, radius_px)?;
    let (outs, _) = names(outputs, "outputs")?;
    let h = f64_1d(history, "history")?;
    let h = slice_or_copy(&h);
    let (r, metrics) = py
        .detach(|| {
            let o: Vec<&str> = outs.iter().map(String::as_str).collect();
            let r = m.transient(input, &h, fs, &o, &opts)?;
            let has_image = outs.iter().any(|x| x == "image_x") && outs.iter().any(|x| x == "image_y");
            let metrics = match (has_image, m.optics()) {
                (true, Some(optics)) => Some(r.image_metrics(optics, opts.radius_px)?),
                _ => None,
            };
            Ok::<_, Error>((r, metrics))
        })
        .py_err()?;
    PyTransient::new(py, r, metrics.as_ref())
}

impl PyTransient {
    fn new(py: Python<'_>, r: core_t::TransientResult, metrics: Option<&ImageMetrics>) -> PyResult<Self> {
        let (no, nt) = (r.values.len(), r.time_s.len());
        let values = ndarray::Array2::from_shape_vec((no, nt), r.values.into_iter().flatten().collect())
            .map_err(|e| {
                pyo3::exceptions::PyRuntimeError::new_err(format!("internal: transient layout: {e}"))
            })?;
        Ok(PyTransient {
            time_s: r.time_s.into_pyarray(py).unbind(),
            outputs: r.outputs,
            values: values.into_pyarray(py).unbind(),
            fft_len: r.fft_len,
            metrics: metrics.map(Metrics::from),
        })
    }
}

/// `Model.newmark`: the independent time-stepping check (viscously damped models only).
pub fn newmark(
    m: &Model,
    py: Python<'_>,
    input: &str,
    history: &Bound<'_, PyAny>,
    fs: f64,
    outputs: &Bound<'_, PyAny>,
    ground: &str,
) -> PyResult<PyTransient> {
    let g = options(ground, 1e-6, 0.5)?.ground;
    let (outs, _) = names(outputs, "outputs")?;
    let h = f64_1d(history, "history")?;
    let h = slice_or_copy(&h);
    let r = py
        .detach(|| {
            let o: Vec<&str> = outs.iter().map(String::as_str).collect();
            m.newmark(input, &h, fs, &o, g)
        })
        .py_err()?;
    PyTransient::new(py, r, None)
}

/// `Model.image_response`.
#[allow(clippy::too_many_arguments)]
pub fn image_response(
    m: &Model,
    py: Python<'_>,
    input: &str,
    history: &Bound<'_, PyAny>,
    fs: f64,
    ground: &str,
    decay_tolerance: f64,
    radius_px: f64,
) -> PyResult<PyImageTransient> {
    let opts = options(ground, decay_tolerance, radius_px)?;
    let h = f64_1d(history, "history")?;
    let h = slice_or_copy(&h);
    let r = py.detach(|| m.image_response(input, &h, fs, &opts)).py_err()?;
    Ok(PyImageTransient::new(py, r))
}

/// `Model.gust_response`.
#[allow(clippy::too_many_arguments)]
pub fn gust_response(
    m: &Model,
    py: Python<'_>,
    gust: &PyGust,
    mean_speed_m_s: f64,
    fs: f64,
    duration_s: f64,
    air_density_kg_m3: f64,
    drag_law: &str,
    decay_tolerance: f64,
    radius_px: f64,
) -> PyResult<PyImageTransient> {
    let law = match drag_law {
        "quadratic" => DragLaw::Quadratic,
        "linearised" => DragLaw::Linearised,
        other => {
            return Err(to_pyerr(Error::UnknownName {
                kind: "drag law".into(),
                name: other.into(),
                known: "quadratic, linearised".into(),
            }));
        }
    };
    let wind = GustWind::new(mean_speed_m_s).with_air_density(air_density_kg_m3).with_drag_law(law);
    let opts = options("displacement", decay_tolerance, radius_px)?;
    let g = &gust.inner;
    let r = py.detach(|| m.gust_response(g, &wind, fs, duration_s, &opts)).py_err()?;
    Ok(PyImageTransient::new(py, r))
}

/// A random realisation of a one-sided PSD: n samples at `fs` (Hz), stated seed.
#[pyfunction]
#[pyo3(signature = (psd, fs, n, *, seed))]
pub fn random_realisation<'py>(
    py: Python<'py>,
    psd: PyRef<'py, PyPsd>,
    fs: f64,
    n: usize,
    seed: u64,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let p = psd.inner.clone();
    let x = py.detach(|| core_t::random_realisation(p.freq_hz(), p.values(), fs, n, seed)).py_err()?;
    Ok(x.into_pyarray(py))
}

pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyTransient>()?;
    m.add_class::<PyImageTransient>()?;
    m.add_class::<PyGust>()?;
    m.add_function(wrap_pyfunction!(random_realisation, m)?)?;
    Ok(())
}

//! `Model` and `Modes`, and pickling: a `Model` travels as its model-file TOML text (the text it
//! was built from, else the generic-layer TOML of its spec).

use crate::convert::{f64_1d, names, slice_or_copy};
use crate::errors::IntoPyResult;
use numpy::{IntoPyArray, PyArray1, PyArray2};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use pyo3::types::PyTuple;
use std::path::PathBuf;
use std::sync::Arc;
use stillsky::io::read_text_capped;
use stillsky::model::Model;
use stillsky::schema::{MAX_MODEL_FILE_BYTES, ModelFile, Pointing, spec_to_toml};
use stillsky::sky::PierSide;

/// An assembled linear structure (immutable; safe to share between threads).
#[pyclass(name = "Model", module = "stillsky._native", frozen)]
pub struct PyModel {
    pub inner: Model,
    /// The model-file text it was built from (for pickling and `static_checks`), if any.
    pub source: Option<Arc<ModelSource>>,
}

#[pymethods]
impl PyModel {
    #[staticmethod]
    #[pyo3(signature = (path, *, altitude_deg = None, azimuth_deg = None, hour_angle_deg = None,
                        declination_deg = None, pier_side = None, wind_from_deg = None))]
    #[allow(clippy::too_many_arguments)]
    fn from_toml(
        py: Python<'_>,
        path: PathBuf,
        altitude_deg: Option<f64>,
        azimuth_deg: Option<f64>,
        hour_angle_deg: Option<f64>,
        declination_deg: Option<f64>,
        pier_side: Option<&str>,
        wind_from_deg: Option<f64>,
    ) -> PyResult<Self> {
        let p =
            pointing(altitude_deg, azimuth_deg, hour_angle_deg, declination_deg, pier_side, wind_from_deg)?;
        let label = path.display().to_string();
        let text = py.detach(|| read_text_capped(&path, MAX_MODEL_FILE_BYTES)).py_err()?;
        model_pointed(py, text, label, &p)
    }

    #[staticmethod]
    #[pyo3(signature = (text, label = String::from("<string>"), *, altitude_deg = None, azimuth_deg = None,
                        hour_angle_deg = None, declination_deg = None, pier_side = None, wind_from_deg = None))]
    #[allow(clippy::too_many_arguments)]
    fn from_toml_str(
        py: Python<'_>,
        text: String,
        label: String,
        altitude_deg: Option<f64>,
        azimuth_deg: Option<f64>,
        hour_angle_deg: Option<f64>,
        declination_deg: Option<f64>,
        pier_side: Option<&str>,
        wind_from_deg: Option<f64>,
    ) -> PyResult<Self> {
        let p =
            pointing(altitude_deg, azimuth_deg, hour_angle_deg, declination_deg, pier_side, wind_from_deg)?;
        model_pointed(py, text, label, &p)
    }

    /// The wind's parts (derived from the rig's parts, or the model's ``[wind]``): a list of
    /// dicts with ``name``, ``body``, ``centre_of_pressure_m``, ``direction`` (unit),
    /// ``area_m2`` and ``drag_coefficient``; empty when the model takes no wind.
    fn wind_parts<'py>(&self, py: Python<'py>) -> PyResult<Vec<Bound<'py, PyDict>>> {
        let Some(w) = self.inner.wind() else { return Ok(Vec::new()) };
        w.parts()
            .py_err()?
            .into_iter()
            .map(|p| {
                let d = PyDict::new(py);
                d.set_item("name", p.name)?;
                d.set_item("body", p.body)?;
                d.set_item("centre_of_pressure_m", p.centre_of_pressure_m.to_vec())?;
                d.set_item("direction", p.direction.to_vec())?;
                d.set_item("area_m2", p.area_m2)?;
                d.set_item("drag_coefficient", p.drag_coefficient)?;
                Ok(d)
            })
            .collect()
    }

    /// Mean-wind force (N) and moment about ``about_m`` (N·m) summed over the wind's parts at
    /// ``speed_m_s``: Σ ½ ρ U² C_d A ê and Σ (r − about) × ½ ρ U² C_d A ê.
    #[pyo3(signature = (speed_m_s, *, air_density_kg_m3 = 1.225, about_m = [0.0, 0.0, 0.0]))]
    fn wind_resultant(
        &self,
        speed_m_s: f64,
        air_density_kg_m3: f64,
        about_m: [f64; 3],
    ) -> PyResult<([f64; 3], [f64; 3])> {
        let w = self
            .inner
            .wind()
            .ok_or_else(|| stillsky::Error::invalid("wind", "the model takes no wind"))
            .py_err()?;
        w.resultant(air_density_kg_m3, speed_m_s, about_m).py_err()
    }

    fn __reduce__<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, pyo3::types::PyTuple>> {
        reduce_model(self, py)
    }

    #[pyo3(signature = (freq_hz, *, ground = None, wind = None, loads = None, output))]
    fn response<'py>(
        &self,
        py: Python<'py>,
        freq_hz: &Bound<'py, PyAny>,
        ground: Option<&Bound<'py, PyAny>>,
        wind: Option<PyRef<'py, crate::wind::PyWind>>,
        loads: Option<&Bound<'py, PyAny>>,
        output: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyAny>> {
        crate::response::response(&self.inner, py, freq_hz, ground, wind, loads, output)
    }

    #[pyo3(signature = (input, history, fs, *, outputs = None, ground = "displacement",
                        decay_tolerance = 1e-6, radius_px = 0.5))]
    #[allow(clippy::too_many_arguments)]
    fn transient<'py>(
        &self,
        py: Python<'py>,
        input: &str,
        history: &Bound<'py, PyAny>,
        fs: f64,
        outputs: Option<&Bound<'py, PyAny>>,
        ground: &str,
        decay_tolerance: f64,
        radius_px: f64,
    ) -> PyResult<crate::transient::PyTransient> {
        let default = pyo3::types::PyTuple::new(py, ["image_x", "image_y"])?.into_any();
        let outputs = outputs.unwrap_or(&default);
        crate::transient::transient(
            &self.inner,
            py,
            input,
            history,
            fs,
            outputs,
            ground,
            decay_tolerance,
            radius_px,
        )
    }

    #[pyo3(signature = (input, history, fs, *, outputs, ground = "displacement"))]
    fn newmark<'py>(
        &self,
        py: Python<'py>,
        input: &str,
        history: &Bound<'py, PyAny>,
        fs: f64,
        outputs: &Bound<'py, PyAny>,
        ground: &str,
    ) -> PyResult<crate::transient::PyTransient> {
        crate::transient::newmark(&self.inner, py, input, history, fs, outputs, ground)
    }

    #[pyo3(signature = (input, history, fs, *, ground = "displacement", decay_tolerance = 1e-6,
                        radius_px = 0.5))]
    #[allow(clippy::too_many_arguments)]
    fn image_response(
        &self,
        py: Python<'_>,
        input: &str,
        history: &Bound<'_, PyAny>,
        fs: f64,
        ground: &str,
        decay_tolerance: f64,
        radius_px: f64,
    ) -> PyResult<crate::transient::PyImageTransient> {
        crate::transient::image_response(
            &self.inner,
            py,
            input,
            history,
            fs,
            ground,
            decay_tolerance,
            radius_px,
        )
    }

    /// The wind case's gust family: a dict with ``cases`` (duration_s, amplitude_m_s, peak_px,
    /// peak_after_start_s, ringdown_s or None), ``worst_peak``, ``worst_ringdown`` (indices),
    /// ``fs_hz`` and ``record_s``. GIL released.
    fn gust_family<'py>(
        &self,
        py: Python<'py>,
        wind: PyRef<'_, crate::wind::PyWind>,
    ) -> PyResult<Bound<'py, pyo3::types::PyDict>> {
        let w = wind.inner.clone();
        let f = py.detach(|| stillsky::batch::gust_family(&self.inner, &w)).py_err()?;
        crate::convert::to_dict(py, &f)
    }

    #[pyo3(signature = (gust, *, mean_speed_m_s, fs, duration_s, air_density_kg_m3 = 1.225,
                        drag_law = "quadratic", decay_tolerance = 1e-6, radius_px = 0.5))]
    #[allow(clippy::too_many_arguments)]
    fn gust_response(
        &self,
        py: Python<'_>,
        gust: PyRef<'_, crate::transient::PyGust>,
        mean_speed_m_s: f64,
        fs: f64,
        duration_s: f64,
        air_density_kg_m3: f64,
        drag_law: &str,
        decay_tolerance: f64,
        radius_px: f64,
    ) -> PyResult<crate::transient::PyImageTransient> {
        crate::transient::gust_response(
            &self.inner,
            py,
            &gust,
            mean_speed_m_s,
            fs,
            duration_s,
            air_density_kg_m3,
            drag_law,
            decay_tolerance,
            radius_px,
        )
    }

    #[getter]
    fn dof_count(&self) -> usize {
        self.inner.dof_count()
    }

    #[getter]
    fn dof_labels(&self) -> Vec<String> {
        self.inner.dof_labels().iter().map(|l| l.to_string()).collect()
    }

    #[getter]
    fn input_names(&self) -> Vec<String> {
        self.inner.input_names()
    }

    #[getter]
    fn output_names(&self) -> Vec<String> {
        self.inner.output_names()
    }

    fn modes(&self, py: Python<'_>) -> PyResult<PyModes> {
        let m = &self.inner;
        let (modes, dominant, labels, energy) = py
            .detach(|| {
                let x = m.modes()?;
                let d = x.dominant_dofs(m);
                let n = x.frequency_hz.len();
                let labels = (0..n).map(|j| x.label(m, j)).collect::<stillsky::Result<Vec<_>>>()?;
                let energy = (0..n).map(|j| x.energy(m, j)).collect::<stillsky::Result<Vec<_>>>()?;
                Ok::<_, stillsky::Error>((x, d, labels, energy))
            })
            .py_err()?;
        Ok(PyModes {
            frequency_hz: modes.frequency_hz.into_pyarray(py).unbind(),
            damping_ratio: modes.damping_ratio.into_pyarray(py).unbind(),
            shapes: modes.shapes.into_pyarray(py).unbind(),
            participation: modes.participation.into_pyarray(py).unbind(),
            effective_mass_kg: modes.effective_mass_kg.into_pyarray(py).unbind(),
            dominant_dofs: dominant,
            labels,
            energy,
        })
    }

    fn frf<'py>(
        &self,
        py: Python<'py>,
        freq_hz: &Bound<'py, PyAny>,
        input: &Bound<'py, PyAny>,
        output: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyAny>> {
        let f = f64_1d(freq_hz, "freq_hz")?;
        let f = slice_or_copy(&f);
        let (ins, one_in) = names(input, "input")?;
        let (outs, one_out) = names(output, "output")?;
        let m = &self.inner;
        let frf = py
            .detach(|| {
                let i: Vec<&str> = ins.iter().map(String::as_str).collect();
                let o: Vec<&str> = outs.iter().map(String::as_str).collect();
                m.frf(&f, &i, &o)
            })
            .py_err()?;
        if one_in && one_out {
            // (F, 1, 1) → (F,): a standard-layout reshape, no copy.
            let n = frf.data.len();
            let flat = frf.data.into_shape_with_order(n).map_err(|e| {
                pyo3::exceptions::PyRuntimeError::new_err(format!("internal reshape failed: {e}"))
            })?;
            Ok(flat.into_pyarray(py).into_any())
        } else {
            Ok(frf.data.into_pyarray(py).into_any())
        }
    }

    fn matrices<'py>(&self, py: Python<'py>, freq_hz: f64) -> PyResult<Bound<'py, PyDict>> {
        stillsky::error::require_non_negative("freq_hz", freq_hz).py_err()?;
        let d = PyDict::new(py);
        d.set_item("mass", self.inner.mass_matrix().into_pyarray(py))?;
        d.set_item("damping", self.inner.damping_matrix().into_pyarray(py))?;
        d.set_item("stiffness", self.inner.stiffness_matrix(freq_hz).into_pyarray(py))?;
        Ok(d)
    }

    #[pyo3(signature = (name, freq_hz = 0.0))]
    fn input_vector<'py>(
        &self,
        py: Python<'py>,
        name: &str,
        freq_hz: f64,
    ) -> PyResult<Bound<'py, PyArray1<num_complex::Complex64>>> {
        Ok(self.inner.input_vector(name, freq_hz).py_err()?.into_pyarray(py))
    }

    fn output_vector<'py>(&self, py: Python<'py>, name: &str) -> PyResult<Bound<'py, PyArray1<f64>>> {
        Ok(self.inner.output_vector(name).py_err()?.into_pyarray(py))
    }

    #[pyo3(signature = (freq_hz, *, ground = None, wind = None, loads = None, exposure_s = None,
                        guide = None, radius_px = None, seeing_fwhm_arcsec = None, mode_shares = true))]
    #[allow(clippy::too_many_arguments)]
    fn image_motion<'py>(
        &self,
        py: Python<'py>,
        freq_hz: &Bound<'py, PyAny>,
        ground: Option<&Bound<'py, PyAny>>,
        wind: Option<PyRef<'py, crate::wind::PyWind>>,
        loads: Option<&Bound<'py, PyAny>>,
        exposure_s: Option<f64>,
        guide: Option<&Bound<'py, PyAny>>,
        radius_px: Option<f64>,
        seeing_fwhm_arcsec: Option<f64>,
        mode_shares: bool,
    ) -> PyResult<crate::image::PyImageMotion> {
        crate::image::image_motion(
            &self.inner,
            py,
            freq_hz,
            ground,
            wind,
            loads,
            exposure_s,
            guide,
            radius_px,
            seeing_fwhm_arcsec,
            mode_shares,
        )
    }

    #[pyo3(signature = (freq_hz, *, ground = None, wind = None, loads = None, wind_from_deg = None,
                        altitudes_deg = None, azimuths_deg = None, hour_angles_deg = None,
                        declinations_deg = None, min_altitude_deg = None, exposure_s = None,
                        seeing_fwhm_arcsec = None))]
    #[allow(clippy::too_many_arguments)]
    fn sky_map<'py>(
        &self,
        py: Python<'py>,
        freq_hz: &Bound<'py, PyAny>,
        ground: Option<&Bound<'py, PyAny>>,
        wind: Option<PyRef<'py, crate::wind::PyWind>>,
        loads: Option<&Bound<'py, PyAny>>,
        wind_from_deg: Option<f64>,
        altitudes_deg: Option<&Bound<'py, PyAny>>,
        azimuths_deg: Option<&Bound<'py, PyAny>>,
        hour_angles_deg: Option<&Bound<'py, PyAny>>,
        declinations_deg: Option<&Bound<'py, PyAny>>,
        min_altitude_deg: Option<f64>,
        exposure_s: Option<f64>,
        seeing_fwhm_arcsec: Option<f64>,
    ) -> PyResult<Bound<'py, PyDict>> {
        let axis = |o: Option<&Bound<'py, PyAny>>, name: &str| -> PyResult<Option<Vec<f64>>> {
            o.map(|a| f64_1d(a, name).map(|v| slice_or_copy(&v).into_owned())).transpose()
        };
        let axes = stillsky::skymap::SkyAxes {
            altitude_deg: axis(altitudes_deg, "altitudes_deg")?,
            azimuth_deg: axis(azimuths_deg, "azimuths_deg")?,
            hour_angle_deg: axis(hour_angles_deg, "hour_angles_deg")?,
            declination_deg: axis(declinations_deg, "declinations_deg")?,
            min_altitude_deg,
        };
        crate::skymap::model_sky_map(
            self,
            py,
            freq_hz,
            ground,
            wind,
            loads,
            wind_from_deg,
            axes,
            exposure_s,
            seeing_fwhm_arcsec,
        )
    }

    fn __repr__(&self) -> String {
        format!(
            "Model(dof_count={}, inputs={}, outputs={})",
            self.inner.dof_count(),
            self.inner.input_names().len(),
            self.inner.output_names().len()
        )
    }
}

/// Modes of a model, ascending in frequency.
#[pyclass(name = "Modes", module = "stillsky._native", frozen)]
pub struct PyModes {
    frequency_hz: Py<PyArray1<f64>>,
    damping_ratio: Py<PyArray1<f64>>,
    shapes: Py<PyArray2<f64>>,
    participation: Py<PyArray2<f64>>,
    effective_mass_kg: Py<PyArray2<f64>>,
    dominant_dofs: Vec<String>,
    labels: Vec<String>,
    energy: Vec<stillsky::modes::ModeEnergy>,
}

#[pymethods]
impl PyModes {
    #[getter]
    fn frequency_hz(&self, py: Python<'_>) -> Py<PyArray1<f64>> {
        self.frequency_hz.clone_ref(py)
    }
    #[getter]
    fn damping_ratio(&self, py: Python<'_>) -> Py<PyArray1<f64>> {
        self.damping_ratio.clone_ref(py)
    }
    #[getter]
    fn shapes(&self, py: Python<'_>) -> Py<PyArray2<f64>> {
        self.shapes.clone_ref(py)
    }
    #[getter]
    fn participation(&self, py: Python<'_>) -> Py<PyArray2<f64>> {
        self.participation.clone_ref(py)
    }
    #[getter]
    fn effective_mass_kg(&self, py: Python<'_>) -> Py<PyArray2<f64>> {
        self.effective_mass_kg.clone_ref(py)
    }
    #[getter]
    fn dominant_dofs(&self) -> Vec<String> {
        self.dominant_dofs.clone()
    }
    /// Each mode named in the mount's axes, e.g. "payload: altitude nod".
    #[getter]
    fn labels(&self) -> Vec<String> {
        self.labels.clone()
    }
    /// Per mode: {"bodies": [(owner, kinetic share)], "connectors": [(name, strain share)]},
    /// largest first; each list sums to 1.
    #[getter]
    fn energy<'py>(&self, py: Python<'py>) -> PyResult<Vec<Bound<'py, pyo3::types::PyDict>>> {
        self.energy.iter().map(|e| crate::convert::to_dict(py, e)).collect()
    }
    fn __len__(&self) -> usize {
        self.dominant_dofs.len()
    }
    fn __repr__(&self, py: Python<'_>) -> String {
        let f = self.frequency_hz.bind(py).to_string();
        format!("Modes(n={}, frequency_hz={f})", self.dominant_dofs.len())
    }
}

/// The model-file text a `Model` was built from and the label its errors name.
#[derive(Debug)]
pub struct ModelSource {
    pub text: String,
    pub label: String,
}

/// Build a model from text and keep the text.
pub fn model_from_text(py: Python<'_>, text: String, label: String) -> PyResult<PyModel> {
    let inner = py.detach(|| Model::from_toml_str(&text, &label)).py_err()?;
    Ok(PyModel { inner, source: Some(Arc::new(ModelSource { text, label })) })
}

/// The pointing override of the keyword arguments.
fn pointing(
    altitude_deg: Option<f64>,
    azimuth_deg: Option<f64>,
    hour_angle_deg: Option<f64>,
    declination_deg: Option<f64>,
    pier_side: Option<&str>,
    wind_from_deg: Option<f64>,
) -> PyResult<Pointing> {
    let pier_side = match pier_side {
        None => None,
        Some("east") => Some(PierSide::East),
        Some("west") => Some(PierSide::West),
        Some(other) => {
            return Err(stillsky::Error::invalid(
                "pier_side",
                format!("expected 'east' or 'west', got '{other}'"),
            ))
            .py_err();
        }
    };
    Ok(Pointing { altitude_deg, azimuth_deg, hour_angle_deg, declination_deg, pier_side, wind_from_deg })
}

/// Build a model from text with a pointing override (the core's `ModelFile::repoint`); the kept
/// text is the re-pointed file, so a pickled copy has the same pose.
fn model_pointed(py: Python<'_>, text: String, label: String, p: &Pointing) -> PyResult<PyModel> {
    if p.is_empty() {
        return model_from_text(py, text, label);
    }
    let (inner, text) = py
        .detach(|| -> stillsky::Result<(Model, String)> {
            let mut f = ModelFile::parse(&text, &label)?;
            f.repoint(p)?;
            Ok((f.to_model()?, f.to_toml()?))
        })
        .py_err()?;
    Ok(PyModel { inner, source: Some(Arc::new(ModelSource { text, label })) })
}

/// Restore a pickled `Model` (the callable `Model.__reduce__` names).
#[pyfunction]
pub fn _model_from_toml(py: Python<'_>, text: String, label: String) -> PyResult<PyModel> {
    model_from_text(py, text, label)
}

/// `Model.__reduce__`: (restore function, (text, label)).
pub fn reduce_model<'py>(m: &PyModel, py: Python<'py>) -> PyResult<Bound<'py, PyTuple>> {
    let (text, label) = match &m.source {
        Some(s) => (s.text.clone(), s.label.clone()),
        None => (spec_to_toml(m.inner.spec()).py_err()?, "<pickled model>".to_string()),
    };
    let f = py.import("stillsky._native")?.getattr("_model_from_toml")?;
    PyTuple::new(py, [f, PyTuple::new(py, [text, label])?.into_any()])
}

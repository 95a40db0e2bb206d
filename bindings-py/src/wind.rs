//! `Wind` (mean wind and turbulence at a height) and `wind_spectrum`, over `stillsky::wind`.

use crate::convert::{f64_1d, slice_or_copy};
use crate::errors::{IntoPyResult, to_pyerr};
use crate::spectrum::PyPsd;
use pyo3::prelude::*;
use stillsky::wind::{Turbulence, WindSpec, WindSpectrum};
use stillsky::{Error, FreqGrid};

/// Mean wind and its turbulence at a height: the `wind=` disturbance of `Model.image_motion`.
#[pyclass(name = "Wind", module = "stillsky._native", frozen)]
#[derive(Clone)]
pub struct PyWind {
    pub inner: WindSpec,
}

#[pymethods]
impl PyWind {
    #[new]
    #[pyo3(signature = (kind, mean_speed_m_s, height_m, *, turbulence_intensity = None,
                        roughness_length_m = None, shelter_factor = 1.0, air_density_kg_m3 = None,
                        admittance = true))]
    #[allow(clippy::too_many_arguments)]
    fn new(
        kind: &str,
        mean_speed_m_s: f64,
        height_m: f64,
        turbulence_intensity: Option<f64>,
        roughness_length_m: Option<f64>,
        shelter_factor: f64,
        air_density_kg_m3: Option<f64>,
        admittance: bool,
    ) -> PyResult<Self> {
        let inner = wind_spec(
            kind,
            mean_speed_m_s,
            height_m,
            turbulence_intensity,
            roughness_length_m,
            shelter_factor,
            air_density_kg_m3,
        )?
        .with_admittance(admittance);
        Ok(Self { inner })
    }

    #[getter]
    fn admittance(&self) -> bool {
        self.inner.admittance
    }

    /// Along-wind velocity PSD ((m/s)²/Hz) on `freq_hz`.
    fn spectrum(&self, freq_hz: &Bound<'_, PyAny>) -> PyResult<PyPsd> {
        let a = f64_1d(freq_hz, "freq_hz")?;
        let g = FreqGrid::new(slice_or_copy(&a).into_owned()).py_err()?;
        Ok(PyPsd { inner: self.inner.velocity_psd(&g).py_err()? })
    }

    #[getter]
    fn mean_speed_m_s(&self) -> f64 {
        self.inner.mean_speed_m_s
    }

    #[getter]
    fn height_m(&self) -> f64 {
        self.inner.height_m
    }

    fn __repr__(&self) -> String {
        format!(
            "Wind({:?}, mean_speed_m_s={}, height_m={}, turbulence={:?}, shelter_factor={})",
            self.inner.kind,
            self.inner.mean_speed_m_s,
            self.inner.height_m,
            self.inner.turbulence,
            self.inner.shelter_factor
        )
    }
}

/// A validated wind spec from the Python arguments (shared by `Wind` and `wind_spectrum`).
pub fn wind_spec(
    kind: &str,
    mean_speed_m_s: f64,
    height_m: f64,
    turbulence_intensity: Option<f64>,
    roughness_length_m: Option<f64>,
    shelter_factor: f64,
    air_density_kg_m3: Option<f64>,
) -> PyResult<WindSpec> {
    let turbulence = match (turbulence_intensity, roughness_length_m) {
        (Some(i), None) => Turbulence::Intensity(i),
        (None, Some(z0_m)) => Turbulence::RoughnessLength { z0_m },
        (None, None) => Turbulence::Intensity(stillsky::wind::DEFAULT_TURBULENCE_INTENSITY),
        (Some(_), Some(_)) => {
            return Err(to_pyerr(Error::invalid(
                "turbulence",
                "give turbulence_intensity or roughness_length_m, not both",
            )));
        }
    };
    let mut spec =
        WindSpec::new(WindSpectrum::from_name(kind).py_err()?, mean_speed_m_s, height_m, turbulence)
            .with_shelter_factor(shelter_factor);
    if let Some(rho) = air_density_kg_m3 {
        spec = spec.with_air_density(rho);
    }
    spec.validate().py_err()?;
    Ok(spec)
}

/// Along-wind velocity PSD.
#[pyfunction]
#[pyo3(signature = (kind, freq_hz, mean_speed_m_s, height_m, *, turbulence_intensity = None,
                    roughness_length_m = None, shelter_factor = 1.0))]
pub fn wind_spectrum(
    kind: &str,
    freq_hz: &Bound<'_, PyAny>,
    mean_speed_m_s: f64,
    height_m: f64,
    turbulence_intensity: Option<f64>,
    roughness_length_m: Option<f64>,
    shelter_factor: f64,
) -> PyResult<PyPsd> {
    let spec = wind_spec(
        kind,
        mean_speed_m_s,
        height_m,
        turbulence_intensity,
        roughness_length_m,
        shelter_factor,
        None,
    )?;
    let f = f64_1d(freq_hz, "freq_hz")?;
    let g = FreqGrid::new(slice_or_copy(&f).into_owned()).py_err()?;
    Ok(PyPsd { inner: spec.velocity_psd(&g).py_err()? })
}

pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyWind>()?;
    m.add_function(wrap_pyfunction!(wind_spectrum, m)?)?;
    Ok(())
}

//! `tone_image`: tonal disturbance lines through the FRF (core `tonal`), as a dict;
//! `ground_distance_ratio`: ground vibration carried between distances (core
//! `distance_attenuation`).

use crate::errors::IntoPyResult;
use crate::model::PyModel;
use numpy::{IntoPyArray, PyArray1};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use stillsky::distance_attenuation::{DEFAULT_SOIL_LOSS_FACTOR, DEFAULT_SOIL_WAVE_SPEED_M_S, GroundPath};
use stillsky::tonal::{self, ToneLine};

/// Image motion of tonal lines, each given as `FREQ_HZ:INPUT:RMS_AMPLITUDE:UNIT`.
#[pyfunction]
#[pyo3(signature = (model, lines))]
pub fn tone_image<'py>(
    py: Python<'py>,
    model: PyRef<'py, PyModel>,
    lines: Vec<String>,
) -> PyResult<Bound<'py, PyDict>> {
    let lines = lines.iter().map(|t| ToneLine::parse(t)).collect::<Result<Vec<_>, _>>().py_err()?;
    let r = tonal::tone_image(&model.inner, &lines).py_err()?;
    let col = |f: fn(&tonal::ToneLineImage) -> f64| r.lines.iter().map(f).collect::<Vec<_>>();
    let d = PyDict::new(py);
    d.set_item("frequency_hz", col(|l| l.line.frequency_hz).into_pyarray(py))?;
    d.set_item("input", r.lines.iter().map(|l| l.line.input.clone()).collect::<Vec<_>>())?;
    d.set_item("amplitude_rms", col(|l| l.line.amplitude_rms).into_pyarray(py))?;
    d.set_item("unit", r.lines.iter().map(|l| l.line.unit.name()).collect::<Vec<_>>())?;
    d.set_item("input_amplitude_rms", col(|l| l.input_amplitude_rms).into_pyarray(py))?;
    d.set_item("image_x_rms_arcsec", col(|l| l.image_rms_arcsec[0]).into_pyarray(py))?;
    d.set_item("image_y_rms_arcsec", col(|l| l.image_rms_arcsec[1]).into_pyarray(py))?;
    d.set_item("line_rms_arcsec", col(|l| l.rms_arcsec).into_pyarray(py))?;
    d.set_item("line_rms_um", col(|l| l.rms_um).into_pyarray(py))?;
    d.set_item("line_rms_px", col(|l| l.rms_px).into_pyarray(py))?;
    d.set_item("share", col(|l| l.share).into_pyarray(py))?;
    d.set_item("rms_arcsec", r.rms_arcsec)?;
    d.set_item("rms_um", r.rms_um)?;
    d.set_item("rms_px", r.rms_px)?;
    Ok(d)
}

/// Amplitude ratio of ground vibration carried from `from_m` to `to_m` from its source, at each
/// frequency (Bornitz spreading and soil damping).
#[pyfunction]
#[pyo3(signature = (freq_hz, from_m, to_m, *, wave = "surface", loss_factor = DEFAULT_SOIL_LOSS_FACTOR, wave_speed_m_s = DEFAULT_SOIL_WAVE_SPEED_M_S))]
pub fn ground_distance_ratio<'py>(
    py: Python<'py>,
    freq_hz: Vec<f64>,
    from_m: f64,
    to_m: f64,
    wave: &str,
    loss_factor: f64,
    wave_speed_m_s: f64,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let n = GroundPath::spreading_of(wave).py_err()?;
    let p = GroundPath::with_soil(from_m, to_m, n, loss_factor, wave_speed_m_s).py_err()?;
    stillsky::error::require_all_finite("freq_hz", &freq_hz).py_err()?;
    for f in &freq_hz {
        stillsky::error::require_non_negative("freq_hz", *f).py_err()?;
    }
    Ok(freq_hz.iter().map(|f| p.amplitude_ratio(*f)).collect::<Vec<_>>().into_pyarray(py))
}

pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(tone_image, m)?)?;
    m.add_function(wrap_pyfunction!(ground_distance_ratio, m)?)?;
    Ok(())
}

//! `footfall_force`, `walking_pass`, `footfall_steady`, `standing_tilt`: a person on the deck
//! (core `people`), as numpy arrays and dicts.

use crate::errors::IntoPyResult;
use crate::model::PyModel;
use numpy::{IntoPyArray, PyArray1};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use stillsky::people::{
    self as core_p, DEFAULT_BODY_MASS_KG, DEFAULT_LIMIT_PX, DEFAULT_PACE_HZ, DEFAULT_PASS_FS_HZ,
    DEFAULT_PASS_S, FootfallModel, PassOptions, Walker,
};

fn walker(mass_kg: f64, pace_hz: f64, footfall: &str) -> PyResult<Walker> {
    let w = Walker::of_mass(mass_kg).py_err()?;
    Ok(Walker { pace_hz, model: FootfallModel::parse(footfall).py_err()?, ..w })
}

/// The downward walking force (N) of a person, `n` samples at `fs_hz`.
#[pyfunction]
#[pyo3(signature = (fs_hz, n, *, mass_kg = DEFAULT_BODY_MASS_KG, pace_hz = DEFAULT_PACE_HZ, footfall = "fixed", start_s = 0.0, duration_s = None))]
#[allow(clippy::too_many_arguments)]
pub fn footfall_force<'py>(
    py: Python<'py>,
    fs_hz: f64,
    n: usize,
    mass_kg: f64,
    pace_hz: f64,
    footfall: &str,
    start_s: f64,
    duration_s: Option<f64>,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let w = walker(mass_kg, pace_hz, footfall)?;
    let dur = duration_s.unwrap_or(n as f64 / fs_hz.abs().max(f64::MIN_POSITIVE) + 1.0);
    Ok(w.force_history(fs_hz, n, start_s, dur).py_err()?.into_pyarray(py))
}

/// Image motion of a walking pass on the deck.
#[pyfunction]
#[pyo3(signature = (model, deck = "floor", at_m = (1.0, 0.0), *, mass_kg = DEFAULT_BODY_MASS_KG, pace_hz = DEFAULT_PACE_HZ, footfall = "fixed", duration_s = DEFAULT_PASS_S, fs_hz = DEFAULT_PASS_FS_HZ))]
#[allow(clippy::too_many_arguments)]
pub fn walking_pass<'py>(
    py: Python<'py>,
    model: PyRef<'py, PyModel>,
    deck: &str,
    at_m: (f64, f64),
    mass_kg: f64,
    pace_hz: f64,
    footfall: &str,
    duration_s: f64,
    fs_hz: f64,
) -> PyResult<Bound<'py, PyDict>> {
    let w = walker(mass_kg, pace_hz, footfall)?;
    let m = &model.inner;
    let p = py
        .detach(|| core_p::walking_pass(m, deck, &w, [at_m.0, at_m.1], &PassOptions { duration_s, fs_hz }))
        .py_err()?;
    let d = PyDict::new(py);
    d.set_item("time_s", p.time_s.into_pyarray(py))?;
    d.set_item("force_n", p.force_n.into_pyarray(py))?;
    d.set_item("image_x_arcsec", p.image_x_arcsec.into_pyarray(py))?;
    d.set_item("image_y_arcsec", p.image_y_arcsec.into_pyarray(py))?;
    let s = p.summary;
    d.set_item("point_m", s.point_m.to_vec())?;
    d.set_item("peak_arcsec", s.peak_arcsec)?;
    d.set_item("peak_px", s.peak_px)?;
    d.set_item("peak_time_s", s.peak_time_s)?;
    d.set_item("rms_arcsec", s.rms_arcsec)?;
    d.set_item("rms_px", s.rms_px)?;
    Ok(d)
}

/// Steady footfall lines through the FRF.
#[pyfunction]
#[pyo3(signature = (model, deck = "floor", at_m = (1.0, 0.0), *, mass_kg = DEFAULT_BODY_MASS_KG, pace_hz = DEFAULT_PACE_HZ, footfall = "fixed"))]
pub fn footfall_steady<'py>(
    py: Python<'py>,
    model: PyRef<'py, PyModel>,
    deck: &str,
    at_m: (f64, f64),
    mass_kg: f64,
    pace_hz: f64,
    footfall: &str,
) -> PyResult<Bound<'py, PyDict>> {
    let w = walker(mass_kg, pace_hz, footfall)?;
    let r = core_p::footfall_steady(&model.inner, deck, &w, [at_m.0, at_m.1]).py_err()?;
    let d = PyDict::new(py);
    d.set_item("frequency_hz", r.lines.iter().map(|l| l.frequency_hz).collect::<Vec<_>>().into_pyarray(py))?;
    d.set_item("force_n", r.lines.iter().map(|l| l.force_n).collect::<Vec<_>>().into_pyarray(py))?;
    d.set_item(
        "image_rms_arcsec",
        r.lines.iter().map(|l| l.image_rms_arcsec).collect::<Vec<_>>().into_pyarray(py),
    )?;
    d.set_item("rms_arcsec", r.rms_arcsec)?;
    d.set_item("rms_px", r.rms_px)?;
    Ok(d)
}

/// Static tilt of a person standing on the deck at each distance from the stand.
#[pyfunction]
#[pyo3(signature = (model, distances_m, deck = "floor", *, mass_kg = DEFAULT_BODY_MASS_KG, azimuth_deg = None, limit_px = DEFAULT_LIMIT_PX))]
pub fn standing_tilt<'py>(
    py: Python<'py>,
    model: PyRef<'py, PyModel>,
    distances_m: Vec<f64>,
    deck: &str,
    mass_kg: f64,
    azimuth_deg: Option<f64>,
    limit_px: f64,
) -> PyResult<Bound<'py, PyDict>> {
    let w = Walker::of_mass(mass_kg).py_err()?.weight_n;
    let t = core_p::standing_tilt(&model.inner, deck, w, &distances_m, azimuth_deg, limit_px).py_err()?;
    let col = |f: fn(&core_p::StandingRow) -> f64| t.rows.iter().map(f).collect::<Vec<_>>();
    let d = PyDict::new(py);
    d.set_item("distance_m", col(|r| r.distance_m).into_pyarray(py))?;
    d.set_item("azimuth_deg", col(|r| r.azimuth_deg).into_pyarray(py))?;
    d.set_item("image_arcsec", col(|r| r.image_arcsec).into_pyarray(py))?;
    d.set_item("image_px", col(|r| r.image_px).into_pyarray(py))?;
    d.set_item("deck_tilt_arcsec", col(|r| r.deck_tilt_arcsec).into_pyarray(py))?;
    d.set_item("weight_n", t.weight_n)?;
    d.set_item("crossings_m", t.crossings_m.clone())?;
    d.set_item("under_within_m", t.under_within_m())?;
    d.set_item("under_beyond_m", t.under_beyond_m())?;
    Ok(d)
}

pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(footfall_force, m)?)?;
    m.add_function(wrap_pyfunction!(walking_pass, m)?)?;
    m.add_function(wrap_pyfunction!(footfall_steady, m)?)?;
    m.add_function(wrap_pyfunction!(standing_tilt, m)?)?;
    Ok(())
}

//! The disturbance arguments of `Model.image_motion` / `Model.response` and `ImageMotion` (the
//! result of `Model.image_motion`).

use crate::convert::{f64_1d, slice_or_copy, to_dict, to_json};
use crate::errors::{IntoPyResult, to_pyerr};
use crate::spectrum::PyPsd;
use crate::wind::PyWind;
use numpy::{IntoPyArray, PyArray1, PyArray2};
use pyo3::prelude::*;
use pyo3::types::{PyDict, PyMapping};
use stillsky::guider::GuideLoop;
use stillsky::image::{ImageMotion, ImageOptions};
use stillsky::response::Disturbances;
use stillsky::spectrum::Psd;
use stillsky::{Error, FreqGrid};

/// Ground PSD per axis: a mapping {"x"|"y"|"z": Psd}, one `Psd` for all three axes, or a
/// sequence of three `Psd | None`.
fn ground(obj: Option<&Bound<'_, PyAny>>) -> PyResult<[Option<Psd>; 3]> {
    let Some(obj) = obj else { return Ok([None, None, None]) };
    if obj.is_none() {
        return Ok([None, None, None]);
    }
    if let Ok(p) = obj.cast::<PyPsd>() {
        let p = p.get().inner.clone();
        return Ok([Some(p.clone()), Some(p.clone()), Some(p)]);
    }
    if let Ok(map) = obj.cast::<PyMapping>() {
        let mut out = [None, None, None];
        for item in map.items()?.iter() {
            let (key, psd): (String, Option<Bound<'_, PyPsd>>) = item.extract()?;
            let k = match key.as_str() {
                "x" => 0,
                "y" => 1,
                "z" => 2,
                _ => {
                    return Err(to_pyerr(Error::UnknownName {
                        kind: "ground axis".into(),
                        name: key,
                        known: "x, y, z".into(),
                    }));
                }
            };
            out[k] = psd.map(|p| p.get().inner.clone());
        }
        return Ok(out);
    }
    let v: Vec<Option<Bound<'_, PyPsd>>> = obj.extract()?;
    let v: [Option<Bound<'_, PyPsd>>; 3] = v
        .try_into()
        .map_err(|v: Vec<_>| to_pyerr(Error::shape("ground (one Psd per axis x, y, z)", 3, v.len())))?;
    Ok(v.map(|p| p.map(|p| p.get().inner.clone())))
}

/// Further loads: a mapping {input name: Psd} or a sequence of (name, Psd) pairs.
fn loads(obj: Option<&Bound<'_, PyAny>>) -> PyResult<Vec<(String, Psd)>> {
    let Some(obj) = obj else { return Ok(Vec::new()) };
    if obj.is_none() {
        return Ok(Vec::new());
    }
    let pairs: Vec<(String, Bound<'_, PyPsd>)> = match obj.cast::<PyMapping>() {
        Ok(map) => map.items()?.extract()?,
        Err(_) => obj.extract()?,
    };
    Ok(pairs.into_iter().map(|(n, p)| (n, p.get().inner.clone())).collect())
}

/// Guiding: a cadence in seconds (integral gain 0.5), a (cadence_s, gain) pair, or a mapping
/// with `cadence_s`, `gain` and optionally `exposure_s`, `latency_s`, `proportional_gain`.
fn guide(obj: Option<&Bound<'_, PyAny>>) -> PyResult<Option<GuideLoop>> {
    let Some(obj) = obj else { return Ok(None) };
    if obj.is_none() {
        return Ok(None);
    }
    if let Ok(cadence_s) = obj.extract::<f64>() {
        return Ok(Some(GuideLoop::new(cadence_s, 0.5)));
    }
    if let Ok(map) = obj.cast::<PyMapping>() {
        let get = |k: &str| -> PyResult<Option<f64>> {
            match map.get_item(k) {
                Ok(v) if !v.is_none() => Ok(Some(v.extract()?)),
                _ => Ok(None),
            }
        };
        for item in map.keys()?.iter() {
            let k: String = item.extract()?;
            if !["cadence_s", "gain", "exposure_s", "latency_s", "proportional_gain"].contains(&k.as_str()) {
                return Err(to_pyerr(Error::UnknownName {
                    kind: "guide setting".into(),
                    name: k,
                    known: "cadence_s, gain, exposure_s, latency_s, proportional_gain".into(),
                }));
            }
        }
        let need = |k: &str| -> PyResult<f64> {
            get(k)?.ok_or_else(|| to_pyerr(Error::invalid("guide", format!("the mapping needs '{k}'"))))
        };
        let mut g = GuideLoop::new(need("cadence_s")?, need("gain")?);
        if let Some(t) = get("exposure_s")? {
            g = g.with_exposure(t);
        }
        if let Some(t) = get("latency_s")? {
            g = g.with_latency(t);
        }
        if let Some(k) = get("proportional_gain")? {
            g = g.with_proportional_gain(k);
        }
        return Ok(Some(g));
    }
    let (cadence_s, gain): (f64, f64) = obj.extract().map_err(|_| {
        to_pyerr(Error::invalid("guide", "give a cadence in seconds, a (cadence_s, gain) pair or a mapping"))
    })?;
    Ok(Some(GuideLoop::new(cadence_s, gain)))
}

/// The disturbances of `Model.image_motion` / `Model.response` from their keyword arguments.
pub fn disturbances(
    ground_obj: Option<&Bound<'_, PyAny>>,
    wind: Option<PyRef<'_, PyWind>>,
    loads_obj: Option<&Bound<'_, PyAny>>,
) -> PyResult<Disturbances> {
    Ok(Disturbances {
        ground: ground(ground_obj)?,
        wind: wind.map(|w| w.inner.clone()),
        loads: loads(loads_obj)?,
        ground_waves: None,
    })
}

/// `Model.image_motion`.
#[allow(clippy::too_many_arguments)]
pub fn image_motion(
    m: &stillsky::model::Model,
    py: Python<'_>,
    freq_hz: &Bound<'_, PyAny>,
    ground_obj: Option<&Bound<'_, PyAny>>,
    wind: Option<PyRef<'_, PyWind>>,
    loads_obj: Option<&Bound<'_, PyAny>>,
    exposure_s: Option<f64>,
    guide_obj: Option<&Bound<'_, PyAny>>,
    radius_px: Option<f64>,
    seeing_fwhm_arcsec: Option<f64>,
    mode_shares: bool,
) -> PyResult<PyImageMotion> {
    let f = f64_1d(freq_hz, "freq_hz")?;
    let grid = FreqGrid::new(slice_or_copy(&f).into_owned()).py_err()?;
    let dist = disturbances(ground_obj, wind, loads_obj)?;
    let mut opts = ImageOptions::default();
    opts.exposure_s = exposure_s;
    opts.guide_loop = guide(guide_obj)?;
    opts.radius_px = radius_px;
    opts.seeing_fwhm_arcsec = seeing_fwhm_arcsec;
    opts.skip_mode_shares = !mode_shares;
    let inner = py.detach(|| m.image_motion(&grid, &dist, &opts)).py_err()?;
    Ok(PyImageMotion { inner })
}

/// Image motion on the sky and on the sensor (the result of `Model.image_motion`).
#[pyclass(name = "ImageMotion", module = "stillsky._native", frozen)]
pub struct PyImageMotion {
    pub inner: ImageMotion,
}

fn rows2<'py>(py: Python<'py>, a: &[f64], b: &[f64]) -> PyResult<Bound<'py, PyArray2<f64>>> {
    let n = a.len();
    let v: Vec<f64> = a.iter().chain(b).copied().collect();
    let arr = ndarray::Array2::from_shape_vec((2, n), v)
        .map_err(|e| pyo3::exceptions::PyRuntimeError::new_err(format!("internal: (2, n) layout: {e}")))?;
    Ok(arr.into_pyarray(py))
}

#[pymethods]
impl PyImageMotion {
    /// Radial RMS on the sky √(σx² + σy²) (arcsec).
    #[getter]
    fn rms_arcsec(&self) -> f64 {
        self.inner.rms_arcsec
    }
    /// Radial RMS in the sensor plane (µm).
    #[getter]
    fn rms_um(&self) -> f64 {
        self.inner.rms_um
    }
    /// Radial RMS in pixels.
    #[getter]
    fn rms_px(&self) -> f64 {
        self.inner.rms_px
    }
    #[getter]
    fn plate_scale_arcsec_per_px(&self) -> f64 {
        self.inner.plate_scale_arcsec_per_px
    }
    /// RMS of image_x and image_y (arcsec), shape (2,).
    #[getter]
    fn per_axis_arcsec<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        self.inner.per_axis_arcsec.to_vec().into_pyarray(py)
    }
    #[getter]
    fn freq_hz<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        self.inner.freq_hz.clone().into_pyarray(py)
    }
    /// PSD of image_x and image_y (arcsec²/Hz), shape (2, F).
    #[getter]
    fn psd<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let [x, y] = &self.inner.psd_arcsec2;
        rows2(py, x, y)
    }
    /// Co-spectrum of image_x with image_y (arcsec²/Hz), shape (F,).
    #[getter]
    fn co_psd<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        self.inner.co_psd_arcsec2.clone().into_pyarray(py)
    }
    /// Cumulative RMS from the lowest frequency, per axis (arcsec), shape (2, F).
    #[getter]
    fn cumulative_rms_arcsec<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let [x, y] = &self.inner.cumulative_rms_arcsec;
        rows2(py, x, y)
    }
    /// Share of the radial mean square per mode: list of {label, frequency_hz, share}.
    #[getter]
    fn mode_share<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        py.import("json")?.call_method1("loads", (to_json(&self.inner.mode_share)?,))
    }
    /// Share of the mean square per disturbance input: {input name: share}.
    #[getter]
    fn input_share<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyDict>> {
        let d = PyDict::new(py);
        for (name, share) in &self.inner.input_share {
            d.set_item(name, share)?;
        }
        Ok(d)
    }
    /// Probability that the image is outside `radius_px` at a random instant (default: the
    /// radius the result was computed for, ½ px unless given).
    #[pyo3(signature = (radius_px = None))]
    fn p_outside(&self, radius_px: Option<f64>) -> PyResult<f64> {
        match radius_px {
            None => Ok(self.inner.p_outside),
            Some(r) if r.is_finite() && r >= 0.0 => Ok(self.inner.p_outside_px(r)),
            Some(r) => Err(to_pyerr(Error::invalid("radius_px", format!("must be finite and ≥ 0, got {r}")))),
        }
    }
    /// The star image budget as a dict: `lines` (term, label, covariance_arcsec2, fwhm_arcsec,
    /// in_exposure), `exposure` and `unregistered_stack` (fwhm_arcsec, fwhm_px, major/minor FWHM,
    /// elongation, major_axis_deg), `exposure_s`, `wavelength_nm`, `notes`.
    #[getter]
    fn budget<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        py.import("json")?.call_method1("loads", (to_json(&self.inner.budget)?,))
    }
    /// Expected largest |excursion| per axis in one exposure (Davenport's peak factor) as a dict,
    /// or None without an exposure length.
    #[getter]
    fn peak<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        py.import("json")?.call_method1("loads", (to_json(&self.inner.peak)?,))
    }
    /// PSD of image_x and image_y without the guider (arcsec²/Hz), shape (2, F); None unguided.
    #[getter]
    fn unguided_psd<'py>(&self, py: Python<'py>) -> PyResult<Option<Bound<'py, PyArray2<f64>>>> {
        match &self.inner.guiding {
            Some(g) => Ok(Some(rows2(py, &g.unguided_psd_arcsec2[0], &g.unguided_psd_arcsec2[1])?)),
            None => Ok(None),
        }
    }
    /// The aliased part of the guided PSD (arcsec²/Hz), shape (2, F); None unguided.
    #[getter]
    fn aliased_psd<'py>(&self, py: Python<'py>) -> PyResult<Option<Bound<'py, PyArray2<f64>>>> {
        match &self.inner.guiding {
            Some(g) => Ok(Some(rows2(py, &g.aliased_psd_arcsec2[0], &g.aliased_psd_arcsec2[1])?)),
            None => Ok(None),
        }
    }
    /// Every scalar and small result as a dict (no per-frequency arrays).
    fn summary<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyDict>> {
        let d = to_dict(py, &self.inner)?;
        for key in ["freq_hz", "psd_arcsec2", "co_psd_arcsec2", "cumulative_rms_arcsec"] {
            d.del_item(key)?;
        }
        if let Some(g) = d.get_item("guiding")?
            && let Ok(g) = g.cast::<PyDict>()
        {
            for key in ["unguided_psd_arcsec2", "unguided_co_psd_arcsec2", "aliased_psd_arcsec2"] {
                g.del_item(key)?;
            }
        }
        Ok(d)
    }
    fn __repr__(&self) -> String {
        format!(
            "ImageMotion(rms_arcsec={:.4}, rms_px={:.4}, p_outside({} px)={:.3e})",
            self.inner.rms_arcsec, self.inner.rms_px, self.inner.radius_px, self.inner.p_outside
        )
    }
}

//! The isolator sweep: rows in memory (interpreter released), their CSV text, and the helpers
//! `stillsky.distributed` uses to split a sweep into tasks that exchange only text.
//!
//! Rows are dicts with the keys of `SWEEP_COLUMNS`, in that order: strings for key, spec,
//! spectrum, wind, status (`ok`/`error`) and error (None on a good row), floats (NaN where the
//! CSV is empty), and `worse_than_none`/`overloaded` as bool or None.

use crate::errors::{IntoPyResult, to_pyerr};
use pyo3::prelude::*;
use pyo3::types::{PyDict, PyList};
use stillsky::Error;
use stillsky::batch::{
    self, Catalogue, ColumnKind, GroundSource, Isolator, SWEEP_COLUMNS, SWEEP_ROW, SweepConfig, SweepInputs,
    SweepRow, SweepValue, WindCase,
};
use stillsky::grid::FreqGrid;
use stillsky::schema::ModelFile;

/// The parsed, text-only inputs of a sweep.
struct Parsed {
    model: ModelFile,
    catalogue: Catalogue,
    grounds: Vec<GroundSource>,
    winds: Vec<WindCase>,
    cfg: SweepConfig,
}

impl Parsed {
    fn inputs(&self) -> SweepInputs<'_> {
        SweepInputs {
            model: &self.model,
            catalogue: &self.catalogue,
            grounds: &self.grounds,
            winds: &self.winds,
        }
    }
}

#[allow(clippy::too_many_arguments)]
fn parse(
    model: (&str, &str),
    catalogue: (&str, &str),
    spectra: &[String],
    wind: &[String],
    grid: (Option<f64>, Option<f64>, Option<usize>),
    pad_prefix: Option<String>,
    ground_scale: Option<[f64; 3]>,
    fs_hz: Option<f64>,
    threads: Option<usize>,
    temperature_c: Option<f64>,
) -> stillsky::Result<Parsed> {
    let mut cfg = SweepConfig::new()?;
    if grid.0.is_some() || grid.1.is_some() || grid.2.is_some() {
        let hz = cfg.grid.hz();
        let (lo, hi, n) = (hz[0], hz[hz.len() - 1], hz.len());
        cfg = cfg.with_grid(FreqGrid::log(grid.0.unwrap_or(lo), grid.1.unwrap_or(hi), grid.2.unwrap_or(n))?);
    }
    if let Some(p) = pad_prefix {
        cfg = cfg.with_pad_prefix(p);
    }
    if let Some(s) = ground_scale {
        cfg = cfg.with_ground_scale(s);
    }
    if let Some(f) = fs_hz {
        cfg.series = cfg.series.with_fs_hz(f);
    }
    if let Some(n) = threads {
        cfg = cfg.with_threads(n);
    }
    if let Some(t) = temperature_c {
        cfg = cfg.with_temperature_c(t);
    }
    Ok(Parsed {
        model: ModelFile::parse(model.0, model.1)?,
        catalogue: Catalogue::parse(catalogue.0, catalogue.1)?,
        grounds: spectra.iter().map(|s| GroundSource::parse(s)).collect(),
        winds: wind.iter().map(|w| WindCase::parse(w)).collect::<stillsky::Result<_>>()?,
        cfg,
    })
}

/// A row as a dict, converted column by column from the core's row table.
fn row_dict<'py>(py: Python<'py>, r: &SweepRow) -> PyResult<Bound<'py, PyDict>> {
    let d = PyDict::new(py);
    for ((name, _), v) in SWEEP_ROW.iter().zip(r.values()) {
        match v {
            SweepValue::Text(s) => d.set_item(name, s)?,
            SweepValue::Number(x) => d.set_item(name, x)?,
            SweepValue::Flag(b) => d.set_item(name, b)?,
            SweepValue::Message(m) => d.set_item(name, m)?,
        }
    }
    Ok(d)
}

/// A row from a dict with the keys of `SWEEP_COLUMNS` (row `i` in errors).
fn dict_row(d: &Bound<'_, PyAny>, i: usize) -> PyResult<SweepRow> {
    let bad = |reason: String| to_pyerr(Error::invalid(format!("sweep row {i}"), reason));
    let values = SWEEP_ROW
        .iter()
        .map(|&(name, kind)| {
            let v = d.get_item(name).map_err(|_| bad(format!("has no field '{name}'")))?;
            Ok(match kind {
                ColumnKind::Text => SweepValue::Text(v.extract()?),
                ColumnKind::Number => SweepValue::Number(v.extract()?),
                ColumnKind::Flag => SweepValue::Flag(v.extract()?),
                ColumnKind::Message => SweepValue::Message(v.extract()?),
            })
        })
        .collect::<PyResult<Vec<_>>>()?;
    SweepRow::from_values(values).map_err(bad)
}

/// Rows of a sweep (see the module docs); `labels` override the ground labels (one each).
#[pyfunction]
#[pyo3(signature = (model_text, model_name, catalogue_text, catalogue_name, spectra, wind, *,
    labels = None, f_min_hz = None, f_max_hz = None, n_freq = None, pad_prefix = None,
    ground_scale = None, fs_hz = None, threads = None, temperature_c = None))]
#[allow(clippy::too_many_arguments)]
pub fn sweep_rows<'py>(
    py: Python<'py>,
    model_text: &str,
    model_name: &str,
    catalogue_text: &str,
    catalogue_name: &str,
    spectra: Vec<String>,
    wind: Vec<String>,
    labels: Option<Vec<String>>,
    f_min_hz: Option<f64>,
    f_max_hz: Option<f64>,
    n_freq: Option<usize>,
    pad_prefix: Option<String>,
    ground_scale: Option<[f64; 3]>,
    fs_hz: Option<f64>,
    threads: Option<usize>,
    temperature_c: Option<f64>,
) -> PyResult<Bound<'py, PyList>> {
    let rows = py
        .detach(|| {
            let p = parse(
                (model_text, model_name),
                (catalogue_text, catalogue_name),
                &spectra,
                &wind,
                (f_min_hz, f_max_hz, n_freq),
                pad_prefix,
                ground_scale,
                fs_hz,
                threads,
                temperature_c,
            )?;
            match &labels {
                Some(l) => batch::sweep_rows_labelled(&p.inputs(), l, &p.cfg),
                None => batch::sweep_rows(&p.inputs(), &p.cfg),
            }
        })
        .py_err()?;
    PyList::new(py, rows.iter().map(|r| row_dict(py, r)).collect::<PyResult<Vec<_>>>()?)
}

/// Check a sweep without reading grounds; returns `{"labels", "winds", "specs"}` (ground
/// labels, wind labels, isolator names with the baseline first).
#[pyfunction]
#[pyo3(signature = (model_text, model_name, catalogue_text, catalogue_name, spectra, wind, *,
    f_min_hz = None, f_max_hz = None, n_freq = None, pad_prefix = None,
    ground_scale = None, fs_hz = None, threads = None, temperature_c = None))]
#[allow(clippy::too_many_arguments)]
pub fn sweep_plan<'py>(
    py: Python<'py>,
    model_text: &str,
    model_name: &str,
    catalogue_text: &str,
    catalogue_name: &str,
    spectra: Vec<String>,
    wind: Vec<String>,
    f_min_hz: Option<f64>,
    f_max_hz: Option<f64>,
    n_freq: Option<usize>,
    pad_prefix: Option<String>,
    ground_scale: Option<[f64; 3]>,
    fs_hz: Option<f64>,
    threads: Option<usize>,
    temperature_c: Option<f64>,
) -> PyResult<Bound<'py, PyDict>> {
    let p = parse(
        (model_text, model_name),
        (catalogue_text, catalogue_name),
        &spectra,
        &wind,
        (f_min_hz, f_max_hz, n_freq),
        pad_prefix,
        ground_scale,
        fs_hz,
        threads,
        temperature_c,
    )
    .py_err()?;
    batch::check_sweep(&p.inputs(), &p.cfg).py_err()?;
    let d = PyDict::new(py);
    d.set_item("labels", batch::ground_labels(&p.grounds).py_err()?)?;
    let winds: Vec<String> = if p.winds.is_empty() {
        vec![WindCase::calm().label]
    } else {
        p.winds.iter().map(|w| w.label.clone()).collect()
    };
    d.set_item("winds", winds)?;
    d.set_item("specs", p.catalogue.isolators.iter().map(|i| i.name.clone()).collect::<Vec<_>>())?;
    Ok(d)
}

/// Catalogue text from a JSON list of isolator entries (the catalogue file's fields).
#[pyfunction]
pub fn catalogue_toml(entries_json: &str, source: &str) -> PyResult<String> {
    let entries: Vec<Isolator> = serde_json::from_str(entries_json).map_err(|e| {
        to_pyerr(Error::Parse {
            file: source.into(),
            location: format!("entry list, column {}", e.column()),
            reason: e.to_string(),
        })
    })?;
    Catalogue::from_isolators(entries, source).and_then(|c| c.to_toml()).py_err()
}

/// A catalogue's entries in parts of at most `per_part`, each as catalogue text.
#[pyfunction]
pub fn catalogue_parts(text: &str, name: &str, per_part: usize) -> PyResult<Vec<String>> {
    let c = Catalogue::parse(text, name).py_err()?;
    c.split(per_part).py_err()?.iter().map(|p| p.to_toml().py_err()).collect()
}

/// The CSV text the command-line sweep writes for these rows.
#[pyfunction]
pub fn sweep_csv(rows: &Bound<'_, PyAny>) -> PyResult<String> {
    let rows: Vec<SweepRow> =
        rows.try_iter()?.enumerate().map(|(i, r)| dict_row(&r?, i)).collect::<PyResult<_>>()?;
    batch::sweep_csv_text(&rows).py_err()
}

/// An error row for one combination.
#[pyfunction]
pub fn sweep_error_row<'py>(
    py: Python<'py>,
    spec: &str,
    spectrum: &str,
    wind: &str,
    reason: &str,
) -> PyResult<Bound<'py, PyDict>> {
    row_dict(py, &SweepRow::failed(spec, spectrum, wind, reason.to_string()))
}

/// The column names, in order.
#[pyfunction]
pub fn sweep_columns() -> Vec<&'static str> {
    SWEEP_COLUMNS.to_vec()
}

/// The key of a combination (`spec|spectrum|wind`), as the core writes it.
#[pyfunction]
pub fn sweep_key(spec: &str, spectrum: &str, wind: &str) -> String {
    SweepRow::key_of(spec, spectrum, wind)
}

/// Replace named rank-one springs of `model` by each variant's stiffness models (JSON: a list of
/// variants, each a list of stiffness tables in the model file's form) and return the FRFs
/// (n_variant, n_freq, n_out, n_in), or None when `frf` is false, and the RMS responses
/// (n_variant, n_out, n_in) to `input_psd`.
#[pyfunction]
#[pyo3(signature = (model, springs, replacements_json, freq_hz, input, output, *, input_psd, frf = true))]
#[allow(clippy::too_many_arguments, clippy::type_complexity)]
pub fn spring_variants<'py>(
    py: Python<'py>,
    model: &crate::model::PyModel,
    springs: Vec<String>,
    replacements_json: &str,
    freq_hz: &Bound<'py, PyAny>,
    input: &Bound<'py, PyAny>,
    output: &Bound<'py, PyAny>,
    input_psd: &Bound<'py, PyAny>,
    frf: bool,
) -> PyResult<(Option<Bound<'py, numpy::PyArray4<num_complex::Complex64>>>, Bound<'py, numpy::PyArray3<f64>>)>
{
    use crate::convert::{f64_1d, names, slice_or_copy};
    use numpy::PyArrayMethods;
    use stillsky::frf::RmsOut;
    let reps: Vec<Vec<stillsky::stiffness::StiffnessModel>> = serde_json::from_str(replacements_json)
        .map_err(|e| to_pyerr(Error::invalid("replacements_json", e.to_string())))?;
    let (f, s) = (f64_1d(freq_hz, "freq_hz")?, f64_1d(input_psd, "input_psd")?);
    let (f, s) = (slice_or_copy(&f), slice_or_copy(&s));
    let (ins, _) = names(input, "input")?;
    let (outs, _) = names(output, "output")?;
    let m = &model.inner;
    let sp: Vec<&str> = springs.iter().map(String::as_str).collect();
    let i: Vec<&str> = ins.iter().map(String::as_str).collect();
    let o: Vec<&str> = outs.iter().map(String::as_str).collect();
    let plan = stillsky::frf::variants::VariantPlan::new(m, &sp, &i, &o).py_err()?;
    let grid = stillsky::FreqGrid::new(f.into_owned()).py_err()?;
    let (no, ni) = plan.shape();
    let rms = numpy::PyArray3::<f64>::zeros(py, [reps.len(), no, ni], false);
    // numpy allocates the FRF array (zeroed pages, and huge pages where numpy enables them for
    // large arrays), so the variants are written into it directly.
    let h = frf.then(|| {
        numpy::PyArray4::<num_complex::Complex64>::zeros(py, [reps.len(), grid.len(), no, ni], false)
    });
    {
        let borrow = |e: numpy::BorrowError| pyo3::exceptions::PyRuntimeError::new_err(e.to_string());
        let slice = |e: numpy::AsSliceError| pyo3::exceptions::PyRuntimeError::new_err(e.to_string());
        let mut rw = rms.try_readwrite().map_err(borrow)?;
        let rs = rw.as_slice_mut().map_err(slice)?;
        let mut hw = h.as_ref().map(|h| h.try_readwrite()).transpose().map_err(borrow)?;
        let hs = hw.as_mut().map(|w| w.as_slice_mut()).transpose().map_err(slice)?;
        let rms_out = RmsOut { input_psd: &s, rms: rs };
        py.detach(|| plan.evaluate_into(&grid, &reps, hs, Some(rms_out))).py_err()?;
    }
    Ok((h, rms))
}

pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(spring_variants, m)?)?;
    m.add_function(wrap_pyfunction!(sweep_rows, m)?)?;
    m.add_function(wrap_pyfunction!(sweep_plan, m)?)?;
    m.add_function(wrap_pyfunction!(catalogue_toml, m)?)?;
    m.add_function(wrap_pyfunction!(catalogue_parts, m)?)?;
    m.add_function(wrap_pyfunction!(sweep_csv, m)?)?;
    m.add_function(wrap_pyfunction!(sweep_error_row, m)?)?;
    m.add_function(wrap_pyfunction!(sweep_columns, m)?)?;
    m.add_function(wrap_pyfunction!(sweep_key, m)?)?;
    Ok(())
}

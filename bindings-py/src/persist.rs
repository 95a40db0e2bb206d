//! Pickling: a `Model` travels as its model-file TOML text (the text it was built from, else
//! the generic-layer TOML of its spec), a `Psd` as its arrays and quantity.

use crate::errors::IntoPyResult;
use crate::model::PyModel;
use pyo3::prelude::*;
use pyo3::types::PyTuple;
use std::path::Path;
use std::sync::Arc;
use stillsky::Error;
use stillsky::io::model_file::MAX_MODEL_FILE_BYTES;
use stillsky::io::spec_to_toml;
use stillsky::model::Model;

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

/// Read a model file's text (I/O errors name the path) and build the model from it.
pub fn model_from_path(py: Python<'_>, path: &Path) -> PyResult<PyModel> {
    let label = path.display().to_string();
    let io = |e: std::io::Error| Error::Io { path: label.clone(), reason: e.to_string() };
    let text = py
        .detach(|| {
            // The same size limit as the core's reader, checked before reading.
            let len = std::fs::metadata(path).map_err(io)?.len();
            if len > MAX_MODEL_FILE_BYTES as u64 {
                return Err(Error::TooLarge {
                    what: format!("size of {label} (bytes)"),
                    value: usize::try_from(len).unwrap_or(usize::MAX),
                    limit: MAX_MODEL_FILE_BYTES,
                });
            }
            std::fs::read_to_string(path).map_err(io)
        })
        .py_err()?;
    model_from_text(py, text, label)
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

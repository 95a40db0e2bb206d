//! The Python exception hierarchy and the exhaustive mapping of [`stillsky::Error`] onto it.
//!
//! ```text
//! StillskyError(Exception)
//! ├── InvalidInputError(StillskyError, ValueError)      bad value, grid, shape, name, file text
//! │   ├── UnsupportedModelError                          structure cannot be analysed
//! │   ├── SingularSystemError                            Z(ω) singular at a frequency
//! │   └── NotPositiveDefiniteError                       a matrix that must be SPD is not
//! ├── ConvergenceError(StillskyError, RuntimeError)     an iteration did not converge
//! └── StillskyIOError(StillskyError, OSError)           reading or writing a file failed
//! ```
//!
//! `create_exception!` takes a single base, so it makes the root; the classes with two bases
//! are made by calling `type(name, bases, namespace)`, once per interpreter.

use pyo3::exceptions::{PyException, PyOSError, PyRuntimeError, PyValueError};
use pyo3::prelude::*;
use pyo3::sync::PyOnceLock;
use pyo3::types::{PyDict, PyTuple, PyType};
use stillsky::Error;

pyo3::create_exception!(
    stillsky._native,
    StillskyError,
    PyException,
    "Base class of every error raised by stillsky."
);

/// The derived classes, created on first use.
pub struct Classes {
    pub invalid_input: Py<PyType>,
    pub unsupported_model: Py<PyType>,
    pub singular_system: Py<PyType>,
    pub not_positive_definite: Py<PyType>,
    pub convergence: Py<PyType>,
    pub io: Py<PyType>,
}

static CLASSES: PyOnceLock<Classes> = PyOnceLock::new();

fn make(py: Python<'_>, name: &str, doc: &str, bases: &[Bound<'_, PyType>]) -> PyResult<Py<PyType>> {
    let ns = PyDict::new(py);
    ns.set_item("__module__", "stillsky._native")?;
    ns.set_item("__qualname__", name)?;
    ns.set_item("__doc__", doc)?;
    let t = py.get_type::<PyType>().call1((name, PyTuple::new(py, bases)?, ns))?;
    Ok(t.cast_into::<PyType>()?.unbind())
}

/// The derived exception classes of this interpreter.
pub fn classes(py: Python<'_>) -> PyResult<&'static Classes> {
    CLASSES.get_or_try_init(py, || {
        let root = py.get_type::<StillskyError>();
        let invalid = make(
            py,
            "InvalidInputError",
            "An input value, grid, shape, name or file text is wrong; the message names it.",
            &[root.clone(), py.get_type::<PyValueError>()],
        )?;
        let inv = invalid.bind(py).clone();
        Ok::<_, PyErr>(Classes {
            unsupported_model: make(
                py,
                "UnsupportedModelError",
                "The structure cannot be analysed (e.g. a free rigid-body mode); the message names the body.",
                std::slice::from_ref(&inv),
            )?,
            singular_system: make(
                py,
                "SingularSystemError",
                "The dynamic stiffness matrix is singular at a frequency named in the message.",
                std::slice::from_ref(&inv),
            )?,
            not_positive_definite: make(
                py,
                "NotPositiveDefiniteError",
                "A matrix that must be symmetric positive definite is not.",
                std::slice::from_ref(&inv),
            )?,
            convergence: make(
                py,
                "ConvergenceError",
                "An iterative method did not converge.",
                &[root.clone(), py.get_type::<PyRuntimeError>()],
            )?,
            io: make(
                py,
                "StillskyIOError",
                "Reading or writing a file failed; the message names the path.",
                &[root, py.get_type::<PyOSError>()],
            )?,
            invalid_input: invalid,
        })
    })
}

/// Convert a core error to the Python exception of its class, keeping the core's message.
pub fn to_pyerr(e: Error) -> PyErr {
    Python::attach(|py| {
        let c = match classes(py) {
            Ok(c) => c,
            Err(err) => return err,
        };
        // Exhaustive on purpose: a new core variant must be mapped here before this builds.
        let class = match &e {
            Error::InvalidArgument { .. }
            | Error::ShapeMismatch { .. }
            | Error::InvalidGrid { .. }
            | Error::OutOfRange { .. }
            | Error::UnknownName { .. }
            | Error::Parse { .. }
            | Error::TooLarge { .. } => &c.invalid_input,
            Error::UnsupportedModel { .. } => &c.unsupported_model,
            Error::Singular { .. } => &c.singular_system,
            Error::NotPositiveDefinite { .. } => &c.not_positive_definite,
            Error::NoConvergence { .. } => &c.convergence,
            Error::Io { .. } => &c.io,
        };
        PyErr::from_type(class.bind(py).clone(), e.to_string())
    })
}

/// `map_err` helper.
pub trait IntoPyResult<T> {
    fn py_err(self) -> PyResult<T>;
}

impl<T> IntoPyResult<T> for stillsky::Result<T> {
    fn py_err(self) -> PyResult<T> {
        self.map_err(to_pyerr)
    }
}

/// Add the hierarchy to the module.
pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    let py = m.py();
    m.add("StillskyError", py.get_type::<StillskyError>())?;
    let c = classes(py)?;
    for (name, t) in [
        ("InvalidInputError", &c.invalid_input),
        ("UnsupportedModelError", &c.unsupported_model),
        ("SingularSystemError", &c.singular_system),
        ("NotPositiveDefiniteError", &c.not_positive_definite),
        ("ConvergenceError", &c.convergence),
        ("StillskyIOError", &c.io),
    ] {
        m.add(name, t.clone_ref(py))?;
    }
    Ok(())
}

//! Python binding of the `stillsky` core: the extension module `stillsky._native`.
//!
//! Thin by design: each function borrows or validates its arguments, calls one core function
//! (with the interpreter released for anything heavier than O(n)), maps the error and converts
//! the result. Docstrings for Python users live in `python/stillsky/_native.pyi`.

mod convert;
mod errors;
mod model;
mod results;
mod series;
mod spectrum;
mod sweep;

use pyo3::prelude::*;

#[pymodule]
fn _native(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add("__version__", env!("CARGO_PKG_VERSION"))?;
    errors::register(m)?;
    m.add_class::<model::PyModel>()?;
    m.add_class::<model::PyModes>()?;
    spectrum::register(m)?;
    m.add_function(wrap_pyfunction!(series::read_series, m)?)?;
    m.add_function(wrap_pyfunction!(results::identify_ringdown, m)?)?;
    sweep::register(m)?;
    Ok(())
}

//! Python binding of the `stillsky` core: the extension module `stillsky._native`.
//!
//! Thin by design: each function borrows or validates its arguments, calls one core function
//! (with the interpreter released for anything heavier than O(n)), maps the error and converts
//! the result. Docstrings for Python users live in `python/stillsky/_native.pyi`.

mod checks;
mod convert;
mod errors;
mod identify;
mod image;
mod model;
mod monitor;
mod people;
mod pier_table;
mod probabilistic;
mod response;
mod sensor;
mod series;
mod skymap;
mod sources;
mod spectrum;
mod study;
mod sweep;
mod transient;
mod wind;

use pyo3::prelude::*;

#[pymodule]
fn _native(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add("__version__", env!("CARGO_PKG_VERSION"))?;
    errors::register(m)?;
    m.add_class::<model::PyModel>()?;
    m.add_class::<model::PyModes>()?;
    m.add_class::<image::PyImageMotion>()?;
    m.add_class::<series::PySeries>()?;
    spectrum::register(m)?;
    wind::register(m)?;
    m.add_function(wrap_pyfunction!(series::read_series, m)?)?;
    identify::register(m)?;
    transient::register(m)?;
    m.add_class::<checks::PyStaticChecks>()?;
    m.add_function(wrap_pyfunction!(checks::static_checks, m)?)?;
    m.add_function(wrap_pyfunction!(model::_model_from_toml, m)?)?;
    m.add_function(wrap_pyfunction!(pier_table::pier_table, m)?)?;
    people::register(m)?;
    monitor::register(m)?;
    sources::register(m)?;
    sweep::register(m)?;
    sensor::register(m)?;
    probabilistic::register(m)?;
    study::register(m)?;
    Ok(())
}

//! Argument conversion: float64 arrays in (read-only views), names, and error wording.

use crate::errors::to_pyerr;
use numpy::{
    PyArray1, PyArrayDescrMethods, PyArrayMethods, PyReadonlyArray1, PyUntypedArray, PyUntypedArrayMethods,
};
use pyo3::exceptions::PyTypeError;
use pyo3::prelude::*;
use pyo3::types::{PyDict, PyString};
use std::borrow::Cow;
use stillsky::Error;

/// A 1-D float64 argument as a read-only view of the caller's array. A NumPy array must already
/// be float64 (other dtypes raise `TypeError`); lists, tuples and other sequences are converted
/// by `numpy.asarray(x, dtype=float64)` (one copy). Any other number of dimensions raises
/// `InvalidInputError` naming the argument and the shape.
pub fn f64_1d<'py>(obj: &Bound<'py, PyAny>, name: &str) -> PyResult<PyReadonlyArray1<'py, f64>> {
    let py = obj.py();
    let arr: Bound<'py, PyUntypedArray> = match obj.cast::<PyUntypedArray>() {
        Ok(a) => a.clone(),
        Err(_) => {
            py.import("numpy")?.call_method1("asarray", (obj, "float64"))?.cast_into::<PyUntypedArray>()?
        }
    };
    let dt = arr.dtype();
    if !dt.is_equiv_to(&numpy::dtype::<f64>(py)) {
        return Err(PyTypeError::new_err(format!(
            "{name}: expected float64 values, got a NumPy array of dtype {dt}; convert with numpy.asarray({name}, dtype=float)"
        )));
    }
    if arr.ndim() != 1 {
        return Err(to_pyerr(Error::invalid(
            name,
            format!("must be a 1-D array, got {}-D with shape {}", arr.ndim(), shape_str(arr.shape())),
        )));
    }
    let typed = arr.cast_into::<PyArray1<f64>>()?;
    typed.try_readonly().map_err(|e| to_pyerr(Error::invalid(name, format!("cannot borrow the array: {e}"))))
}

/// The contiguous data of a view: borrowed when C-contiguous, else one copy.
pub fn slice_or_copy<'a>(a: &'a PyReadonlyArray1<'_, f64>) -> Cow<'a, [f64]> {
    match a.as_slice() {
        Ok(s) => Cow::Borrowed(s),
        Err(_) => Cow::Owned(a.as_array().to_vec()),
    }
}

/// A name or a sequence of names; `true` when a single `str` was given.
pub fn names(obj: &Bound<'_, PyAny>, what: &str) -> PyResult<(Vec<String>, bool)> {
    if let Ok(s) = obj.cast::<PyString>() {
        return Ok((vec![s.to_str()?.to_owned()], true));
    }
    obj.extract::<Vec<String>>()
        .map(|v| (v, false))
        .map_err(|_| PyTypeError::new_err(format!("{what}: expected a str or a sequence of str")))
}

/// A shape as Python prints it: `(2, 3)`, `(4,)`, `()`.
fn shape_str(s: &[usize]) -> String {
    match s {
        [a] => format!("({a},)"),
        _ => format!("({})", s.iter().map(|x| x.to_string()).collect::<Vec<_>>().join(", ")),
    }
}

/// A 1-D complex argument as complex128, via `numpy.asarray(x, dtype=complex128)` (no copy when
/// it already is complex128; real arrays are widened, one copy).
pub fn c128_1d<'py>(
    obj: &Bound<'py, PyAny>,
    name: &str,
) -> PyResult<PyReadonlyArray1<'py, num_complex::Complex64>> {
    let py = obj.py();
    let arr =
        py.import("numpy")?.call_method1("asarray", (obj, "complex128"))?.cast_into::<PyUntypedArray>()?;
    if arr.ndim() != 1 {
        return Err(to_pyerr(Error::invalid(
            name,
            format!("must be a 1-D array, got {}-D with shape {}", arr.ndim(), shape_str(arr.shape())),
        )));
    }
    let typed = arr.cast_into::<PyArray1<num_complex::Complex64>>()?;
    typed.try_readonly().map_err(|e| to_pyerr(Error::invalid(name, format!("cannot borrow the array: {e}"))))
}

/// A serialisable core result as a Python dict (via JSON; NaN and ±inf arrive as None).
pub fn to_dict<'py, T: serde::Serialize>(py: Python<'py>, v: &T) -> PyResult<Bound<'py, PyDict>> {
    let text = serde_json::to_string(v)
        .map_err(|e| pyo3::exceptions::PyRuntimeError::new_err(format!("internal: result to dict: {e}")))?;
    Ok(py.import("json")?.call_method1("loads", (text,))?.cast_into::<PyDict>()?)
}

/// A serialisable core result as JSON text.
pub fn to_json<T: serde::Serialize>(v: &T) -> PyResult<String> {
    serde_json::to_string(v)
        .map_err(|e| pyo3::exceptions::PyRuntimeError::new_err(format!("internal: result to JSON: {e}")))
}

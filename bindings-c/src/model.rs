//! Model handles, FRF evaluation and modes.

use crate::error::{Failure, Res, cstr, deref, deref_mut, guard, slice, slice_mut};
use crate::status::stillsky_status;
use std::ffi::c_char;
use stillsky_core::Complex64;
use stillsky_core::frf::FrfPlan;
use stillsky_core::grid::FreqGrid;
use stillsky_core::model::Model;

/// An assembled structural model (opaque). Created by `stillsky_model_from_toml` or
/// `stillsky_model_from_file`, released by `stillsky_model_free`. Immutable once created: one
/// handle may be used from several threads at once.
#[allow(non_camel_case_types)]
pub struct stillsky_model {
    pub(crate) model: Model,
}

/// A complex number, laid out like C99 `double _Complex` and Rust's `Complex64`.
#[allow(non_camel_case_types)]
#[repr(C)]
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct stillsky_complex {
    pub re: f64,
    pub im: f64,
}

fn put_model(out: &mut *mut stillsky_model, model: Model) {
    *out = Box::into_raw(Box::new(stillsky_model { model }));
}

/// Build a model from TOML model-file text (see docs/model-file.md).
///
/// On success `*out` receives a new handle that the caller owns and releases with
/// `stillsky_model_free`; on failure `*out` is set to NULL. Errors name the line and column
/// (`STILLSKY_STATUS_PARSE`), the field, or the unrestrained body (`..._UNSUPPORTED_MODEL`).
///
/// # Safety
/// `text` is NULL or a NUL-terminated string; `out` is NULL or points to writable storage for
/// one pointer.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_model_from_toml(text: *const c_char, out: *mut *mut stillsky_model) -> i32 {
    guard("stillsky_model_from_toml", || {
        // SAFETY: caller contract.
        let out = unsafe { deref_mut(out, "out") }?;
        *out = std::ptr::null_mut();
        // SAFETY: caller contract.
        let text = unsafe { cstr(text, "text") }?;
        put_model(out, Model::from_toml_str(text, "model text")?);
        Ok(())
    })
}

/// Build a model from a TOML model file at `path` (UTF-8). As `stillsky_model_from_toml`,
/// plus `STILLSKY_STATUS_IO` when the file cannot be read.
///
/// # Safety
/// As `stillsky_model_from_toml`, with `path` in place of `text`.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_model_from_file(path: *const c_char, out: *mut *mut stillsky_model) -> i32 {
    guard("stillsky_model_from_file", || {
        // SAFETY: caller contract.
        let out = unsafe { deref_mut(out, "out") }?;
        *out = std::ptr::null_mut();
        // SAFETY: caller contract.
        let path = unsafe { cstr(path, "path") }?;
        put_model(out, Model::from_toml_path(std::path::Path::new(path))?);
        Ok(())
    })
}

/// Release a model. NULL does nothing. The handle must not be in use by another thread and
/// must not be used afterwards; monitors created from it do not need it (they copy what they use).
///
/// # Safety
/// `model` is NULL or a handle from this library that has not been freed.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_model_free(model: *mut stillsky_model) {
    crate::error::guard_value("stillsky_model_free", (), || {
        if !model.is_null() {
            // SAFETY: created by Box::into_raw in this library and not freed (caller contract).
            drop(unsafe { Box::from_raw(model) });
        }
    })
}

/// Write the number of free degrees of freedom (= the number of modes) to `*out`.
///
/// # Safety
/// `model` is NULL or a live handle; `out` is NULL or writable.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_model_dof_count(model: *const stillsky_model, out: *mut usize) -> i32 {
    guard("stillsky_model_dof_count", || {
        // SAFETY: caller contract.
        let (m, out) = unsafe { (deref(model, "model")?, deref_mut(out, "out")?) };
        *out = m.model.dof_count();
        Ok(())
    })
}

/// One FRF series for the checks shared by both FRF exports.
///
/// # Safety
/// Pointer contracts of `stillsky_frf_evaluate`.
unsafe fn frf_series(
    model: *const stillsky_model,
    freq_hz: *const f64,
    n_freq: usize,
    input: *const c_char,
    output: *const c_char,
    out_len: usize,
) -> Res<Vec<Complex64>> {
    // SAFETY: caller contract.
    let (m, f, input, output) = unsafe {
        (
            deref(model, "model")?,
            slice(freq_hz, n_freq, "freq_hz")?,
            cstr(input, "input")?,
            cstr(output, "output")?,
        )
    };
    if out_len < n_freq {
        return Err(Failure::new(
            stillsky_status::BufferTooSmall,
            format!("output buffers hold {out_len} values, {n_freq} needed (one per frequency)"),
        ));
    }
    let plan = FrfPlan::new(&m.model, &[input], &[output])?;
    let mut h = vec![Complex64::default(); n_freq];
    plan.evaluate_into(&FreqGrid::new(f.to_vec())?, Some(&mut h), None)?;
    Ok(h)
}

/// Evaluate the FRF output/input (see the model docs for names: inputs `ground_x|y|z`, `wind`,
/// `force:BODY:x|y|z`, `moment:BODY:x|y|z`; outputs `BODY:x|y|z|rx|ry|rz`, `image_x`, `image_y`)
/// on `freq_hz[0..n_freq]` (Hz, strictly increasing, finite, > 0), writing real parts to
/// `out_re` and imaginary parts to `out_im` (each `out_len` ≥ `n_freq` doubles). Units: output
/// unit per input unit (m/m for ground transmissibility, rad/m for image per ground motion,
/// m/N for a force). Convention e^{+iωt}.
///
/// Errors: `..._INVALID_GRID` (empty/unsorted/non-positive grid), `..._UNKNOWN_NAME`,
/// `..._BUFFER_TOO_SMALL` (`out_len` < `n_freq`), `..._SINGULAR`, `..._NULL_POINTER`.
///
/// # Safety
/// `model` is NULL or a live handle; `freq_hz` points to `n_freq` doubles (may be NULL when
/// `n_freq` is 0); `input`, `output` are NUL-terminated; `out_re`, `out_im` point to `out_len`
/// writable doubles each and do not overlap the inputs.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_frf_evaluate(
    model: *const stillsky_model,
    freq_hz: *const f64,
    n_freq: usize,
    input: *const c_char,
    output: *const c_char,
    out_re: *mut f64,
    out_im: *mut f64,
    out_len: usize,
) -> i32 {
    guard("stillsky_frf_evaluate", || {
        if out_re.is_null() {
            return Err(Failure::null("out_re"));
        }
        if out_im.is_null() {
            return Err(Failure::null("out_im"));
        }
        // SAFETY: caller contract.
        let h = unsafe { frf_series(model, freq_hz, n_freq, input, output, out_len) }?;
        // SAFETY: caller contract; out_len >= n_freq was checked.
        let (re, im) =
            unsafe { (slice_mut(out_re, n_freq, "out_re")?, slice_mut(out_im, n_freq, "out_im")?) };
        for ((r, i), v) in re.iter_mut().zip(im.iter_mut()).zip(&h) {
            *r = v.re;
            *i = v.im;
        }
        Ok(())
    })
}

/// As `stillsky_frf_evaluate`, writing interleaved complex values to `out` (`out_len` ≥ `n_freq`).
///
/// # Safety
/// As `stillsky_frf_evaluate`, with `out` pointing to `out_len` writable `stillsky_complex`.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_frf_evaluate_interleaved(
    model: *const stillsky_model,
    freq_hz: *const f64,
    n_freq: usize,
    input: *const c_char,
    output: *const c_char,
    out: *mut stillsky_complex,
    out_len: usize,
) -> i32 {
    guard("stillsky_frf_evaluate_interleaved", || {
        if out.is_null() {
            return Err(Failure::null("out"));
        }
        // SAFETY: caller contract.
        let h = unsafe { frf_series(model, freq_hz, n_freq, input, output, out_len) }?;
        // SAFETY: caller contract; out_len >= n_freq was checked.
        let o = unsafe { slice_mut(out, n_freq, "out") }?;
        for (o, v) in o.iter_mut().zip(&h) {
            *o = stillsky_complex { re: v.re, im: v.im };
        }
        Ok(())
    })
}

/// Natural frequencies (Hz, ascending) and modal damping ratios of the model.
///
/// `*n_modes` always receives the number of modes (= the DOF count). If `capacity` is smaller,
/// nothing else is written and the call returns `STILLSKY_STATUS_BUFFER_TOO_SMALL`; call with
/// `capacity = 0` (and NULL arrays) to ask. Otherwise `frequency_hz` and `damping_ratio` (each
/// `capacity` doubles) receive the first `*n_modes` values.
///
/// # Safety
/// `model` is NULL or a live handle; `n_modes` is NULL or writable; when `capacity > 0`,
/// `frequency_hz` and `damping_ratio` point to `capacity` writable doubles each.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_modes_compute(
    model: *const stillsky_model,
    frequency_hz: *mut f64,
    damping_ratio: *mut f64,
    capacity: usize,
    n_modes: *mut usize,
) -> i32 {
    guard("stillsky_modes_compute", || {
        // SAFETY: caller contract.
        let (m, n_out) = unsafe { (deref(model, "model")?, deref_mut(n_modes, "n_modes")?) };
        let n = m.model.dof_count();
        *n_out = n;
        if capacity < n {
            return Err(Failure::new(
                stillsky_status::BufferTooSmall,
                format!("capacity {capacity} is smaller than the {n} modes (written to *n_modes)"),
            ));
        }
        // SAFETY: caller contract.
        let (f, z) = unsafe {
            (slice_mut(frequency_hz, n, "frequency_hz")?, slice_mut(damping_ratio, n, "damping_ratio")?)
        };
        let modes = m.model.modes()?;
        f.copy_from_slice(&modes.frequency_hz);
        z.copy_from_slice(&modes.damping_ratio);
        Ok(())
    })
}

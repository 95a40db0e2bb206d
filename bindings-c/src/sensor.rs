//! Sensor response of a moving-coil geophone (core `sensor_response`).

use crate::error::{deref_mut, guard, slice, slice_mut};
use crate::model::stillsky_complex;
use stillsky_core::sensor_response::SensorResponse;

/// The response H(f) = G s²/(s² + 2ζω₀s + ω₀²), s = 2πi f (V per m/s of ground velocity), of a
/// geophone of natural frequency `natural_hz`, damping ratio `damping` (0 < ζ < 1) and
/// generator constant `generator_v_per_m_s`, at each of `freq_hz[0..n]` (finite) into
/// `out[0..n]`. `valid_low_hz` (NULL to skip) receives where the valid band starts: |H| = 0.1 G.
///
/// # Safety
/// `freq_hz` points to `n` doubles; `out` to `n` writable `stillsky_complex`; `valid_low_hz`
/// NULL or writable.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_geophone_response(
    natural_hz: f64,
    damping: f64,
    generator_v_per_m_s: f64,
    freq_hz: *const f64,
    n: usize,
    out: *mut stillsky_complex,
    valid_low_hz: *mut f64,
) -> i32 {
    guard("stillsky_geophone_response", || {
        let g = SensorResponse::geophone(natural_hz, damping, generator_v_per_m_s)?;
        // SAFETY: caller contract.
        let (f, o) = unsafe { (slice(freq_hz, n, "freq_hz")?, slice_mut(out, n, "out")?) };
        stillsky_core::error::require_all_finite("freq_hz", f)?;
        for (o, fk) in o.iter_mut().zip(f) {
            let h = g.response(*fk);
            *o = stillsky_complex { re: h.re, im: h.im };
        }
        if !valid_low_hz.is_null() {
            // SAFETY: caller contract.
            *unsafe { deref_mut(valid_low_hz, "valid_low_hz") }? = g.valid_band_hz.0;
        }
        Ok(())
    })
}

/// Remove a geophone's response (as in `stillsky_geophone_response`) from a PSD of its output
/// `psd[0..n]` (V²/Hz) at `freq_hz[0..n]` (Hz, strictly increasing, > 0): `out[k]` =
/// psd[k]/|H(f_k)|², the ground velocity PSD ((m/s)²/Hz), inside the band `band_low_hz` ..
/// `band_high_hz` (Hz; the high end may be INFINITY; both NaN for the whole valid band) and 0
/// outside it. A band reaching below where the response is valid gives
/// `STILLSKY_STATUS_OUT_OF_RANGE` with the limits.
///
/// # Safety
/// `freq_hz` and `psd` point to `n` doubles; `out` to `n` writable doubles.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_geophone_remove_psd(
    natural_hz: f64,
    damping: f64,
    generator_v_per_m_s: f64,
    freq_hz: *const f64,
    psd: *const f64,
    n: usize,
    band_low_hz: f64,
    band_high_hz: f64,
    out: *mut f64,
) -> i32 {
    guard("stillsky_geophone_remove_psd", || {
        let g = SensorResponse::geophone(natural_hz, damping, generator_v_per_m_s)?;
        // SAFETY: caller contract.
        let (f, p, o) =
            unsafe { (slice(freq_hz, n, "freq_hz")?, slice(psd, n, "psd")?, slice_mut(out, n, "out")?) };
        let band = (!(band_low_hz.is_nan() && band_high_hz.is_nan())).then_some((band_low_hz, band_high_hz));
        Ok(g.remove_psd_into(f, p, band, o)?)
    })
}

//! The ring-down card of an image track (core `identify::image_track_card`).

use crate::error::{copy_text, cstr, deref_mut, guard, slice};
use std::ffi::c_char;
use stillsky_core::identify::{CardOptions, TrackUnit, image_track_card};

/// The ring-down card (`stillsky_ringdown_card`). Values in arcsec whatever the track's unit;
/// px values are NaN when no plate scale was given.
#[allow(non_camel_case_types)]
#[repr(C)]
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct stillsky_ringdown_card_summary {
    /// Natural frequency f_n (Hz) of the damped-sine fit, and its uncertainty u (f ± u, Hz):
    /// u = √((k σ_fit)² + r²), σ_fit the fit's standard error, k the coverage factor (2), r the
    /// largest distance to another method's estimate.
    pub frequency_hz: f64,
    pub frequency_uncertainty_hz: f64,
    /// Damping ratio ζ and its uncertainty (same rule).
    pub damping_ratio: f64,
    pub damping_uncertainty: f64,
    /// First excursion: the largest |x − rest level| (arcsec, px) and when (s from the first
    /// sample).
    pub first_excursion_arcsec: f64,
    pub first_excursion_px: f64,
    pub first_excursion_time_s: f64,
    /// Rest level: mean of the last 10 % of the track (arcsec).
    pub rest_level_arcsec: f64,
    /// Settle threshold used (arcsec, px).
    pub threshold_arcsec: f64,
    pub threshold_px: f64,
    /// True when the track falls inside the threshold before its last 10 %; then
    /// `settle_time_s` is the time from the first excursion to the last sample outside it (s),
    /// else NaN.
    pub settled: bool,
    pub settle_time_s: f64,
    /// From the first excursion until the fitted envelope falls below the threshold (s).
    pub settle_time_fit_s: f64,
    /// RMS of the fit's residual (arcsec).
    pub residual_rms_arcsec: f64,
    /// Number of warnings, and the bytes their text needs (lines joined by '\n', with the NUL).
    pub n_warnings: usize,
    pub warnings_len: usize,
}

/// The ring-down card of a tap recorded as an image track: `x[0..n]` sampled at `fs_hz`, in
/// `unit` `"arcsec"` or `"px"`. A track in px needs `plate_scale_arcsec_per_px` (arcsec per px;
/// NaN for none, then only an arcsec track is accepted). `threshold` is in the track's unit;
/// NaN gives the default (½ px with a plate scale, else 10 % of the first excursion). The
/// warnings' text goes to `warnings` (capacity `warnings_cap` bytes, NUL-terminated,
/// truncated; NULL to skip). The physics is the core's `ringdown_card`.
///
/// # Safety
/// `x` points to `n` doubles; `unit` NUL-terminated; `out` NULL or writable; `warnings` NULL or
/// `warnings_cap` writable bytes.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_ringdown_card(
    x: *const f64,
    n: usize,
    unit: *const c_char,
    fs_hz: f64,
    plate_scale_arcsec_per_px: f64,
    threshold: f64,
    out: *mut stillsky_ringdown_card_summary,
    warnings: *mut c_char,
    warnings_cap: usize,
) -> i32 {
    guard("stillsky_ringdown_card", || {
        // SAFETY: caller contract.
        let (x, unit, out) = unsafe { (slice(x, n, "x")?, cstr(unit, "unit")?, deref_mut(out, "out")?) };
        let unit = TrackUnit::parse(unit)?;
        let given = |v: f64| (!v.is_nan()).then_some(v);
        let mut o = CardOptions::default();
        o.plate_scale_arcsec_per_px = given(plate_scale_arcsec_per_px);
        o.threshold = given(threshold);
        let c = image_track_card(x, unit, fs_hz, &o)?;
        let px = |v: Option<f64>| v.unwrap_or(f64::NAN);
        let text = c.warnings.join("\n");
        *out = stillsky_ringdown_card_summary {
            frequency_hz: c.frequency_hz.value,
            frequency_uncertainty_hz: c.frequency_hz.uncertainty,
            damping_ratio: c.damping_ratio.value,
            damping_uncertainty: c.damping_ratio.uncertainty,
            first_excursion_arcsec: c.first_excursion,
            first_excursion_px: px(c.first_excursion_px),
            first_excursion_time_s: c.first_excursion_time_s,
            rest_level_arcsec: c.rest_level,
            threshold_arcsec: c.threshold,
            threshold_px: px(c.threshold_px),
            settled: c.settle_time_s.is_some(),
            settle_time_s: px(c.settle_time_s),
            settle_time_fit_s: c.settle_time_fit_s,
            residual_rms_arcsec: c.fit.residual_rms,
            n_warnings: c.warnings.len(),
            // SAFETY: caller contract.
            warnings_len: unsafe { copy_text(&text, warnings, warnings_cap) },
        };
        Ok(())
    })
}

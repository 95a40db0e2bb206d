//! People and machines near the rig: the walking force, a walking pass, steady footfall lines,
//! the standing tilt (core `people`), tonal lines (core `tonal`) and the distance ratio of
//! ground vibration (core `distance_attenuation`).

use crate::error::{Failure, cstr, deref, deref_mut, guard, slice, slice_mut};
use crate::model::stillsky_model;
use crate::status::stillsky_status;
use std::ffi::c_char;
use stillsky_core::distance_attenuation::GroundPath;
use stillsky_core::people::{self, FootfallModel, PassOptions, Walker};
use stillsky_core::tonal::{self, ToneLine};

/// A walking person: body mass (kg), pace (Hz, 1–2.8) and the load factors by name
/// (`"fixed"`: 0.5, 0.2, 0.1, 0.05; `"pace"`: growing with the pace).
fn walker(mass_kg: f64, pace_hz: f64, footfall: *const c_char) -> Result<Walker, Failure> {
    // SAFETY: caller contract of every export that takes `footfall`.
    let name = unsafe { cstr(footfall, "footfall") }?;
    let w = Walker::of_mass(mass_kg)?;
    Ok(Walker { pace_hz, model: FootfallModel::parse(name)?, ..w })
}

/// The four force lines of a walking person: `freq_hz[h]` = (h + 1) × pace and `force_n[h]` =
/// α_h × weight (N, amplitude) for h = 0..3, weight = mass × 9.80665 m/s².
///
/// # Safety
/// `footfall` NUL-terminated; `freq_hz` and `force_n` NULL or 4 writable doubles each.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_footfall_harmonics(
    mass_kg: f64,
    pace_hz: f64,
    footfall: *const c_char,
    freq_hz: *mut f64,
    force_n: *mut f64,
) -> i32 {
    guard("stillsky_footfall_harmonics", || {
        let h = walker(mass_kg, pace_hz, footfall)?.harmonics()?;
        // SAFETY: caller contract.
        let (f, a) = unsafe { (slice_mut(freq_hz, 4, "freq_hz")?, slice_mut(force_n, 4, "force_n")?) };
        for (k, (fk, ak)) in h.iter().enumerate() {
            f[k] = *fk;
            a[k] = *ak;
        }
        Ok(())
    })
}

/// The downward walking force (N), `n` samples at `fs_hz` from t = 0: zero before `start_s`
/// and after `start_s + duration_s`, W[1 + Σ α_h cos(2π h f_p (t − start))] between, faded in
/// and out over one step.
///
/// # Safety
/// `footfall` NUL-terminated; `out` points to `n` writable doubles.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_footfall_force(
    mass_kg: f64,
    pace_hz: f64,
    footfall: *const c_char,
    fs_hz: f64,
    start_s: f64,
    duration_s: f64,
    out: *mut f64,
    n: usize,
) -> i32 {
    guard("stillsky_footfall_force", || {
        let f = walker(mass_kg, pace_hz, footfall)?.force_history(fs_hz, n, start_s, duration_s)?;
        // SAFETY: caller contract.
        unsafe { slice_mut(out, n, "out") }?.copy_from_slice(&f);
        Ok(())
    })
}

/// The numbers of a walking pass (`stillsky_walking_pass`).
#[allow(non_camel_case_types)]
#[repr(C)]
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct stillsky_walking_pass_summary {
    /// Where the walker treads (m, model frame; z is the deck's centre of gravity height).
    pub point_m: [f64; 3],
    /// Largest radial image excursion (the weight's tilt included): arcsec, px, and when (s).
    pub peak_arcsec: f64,
    pub peak_px: f64,
    pub peak_time_s: f64,
    /// Radial RMS about the mean over the pass, first and last step left out (arcsec, px).
    pub rms_arcsec: f64,
    pub rms_px: f64,
}

/// Image motion while a person treads at (`at_x_m`, `at_y_m`) on body `deck` for `duration_s`
/// (sampled at `fs_hz`; 0.5 s of rest before, 2 s after). The model needs `[optics]`.
///
/// # Safety
/// `model` NULL or a live handle; `deck`, `footfall` NUL-terminated; `out` NULL or writable.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_walking_pass(
    model: *const stillsky_model,
    deck: *const c_char,
    at_x_m: f64,
    at_y_m: f64,
    mass_kg: f64,
    pace_hz: f64,
    footfall: *const c_char,
    duration_s: f64,
    fs_hz: f64,
    out: *mut stillsky_walking_pass_summary,
) -> i32 {
    guard("stillsky_walking_pass", || {
        // SAFETY: caller contract.
        let (m, deck, out) = unsafe { (deref(model, "model")?, cstr(deck, "deck")?, deref_mut(out, "out")?) };
        let w = walker(mass_kg, pace_hz, footfall)?;
        let p =
            people::walking_pass(&m.model, deck, &w, [at_x_m, at_y_m], &PassOptions { duration_s, fs_hz })?;
        let s = p.summary;
        *out = stillsky_walking_pass_summary {
            point_m: s.point_m,
            peak_arcsec: s.peak_arcsec,
            peak_px: s.peak_px,
            peak_time_s: s.peak_time_s,
            rms_arcsec: s.rms_arcsec,
            rms_px: s.rms_px,
        };
        Ok(())
    })
}

/// Steady walking in place at (`at_x_m`, `at_y_m`) on `deck`: each of the four force lines
/// through the FRF. Writes each line's radial image RMS (arcsec) to `line_rms_arcsec[0..4]`
/// (NULL to skip) and the total (√Σ of the lines' mean squares) to `*rms_arcsec`.
///
/// # Safety
/// `model` NULL or live; strings NUL-terminated; `line_rms_arcsec` NULL or 4 writable doubles;
/// `rms_arcsec` NULL or writable.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_footfall_steady(
    model: *const stillsky_model,
    deck: *const c_char,
    at_x_m: f64,
    at_y_m: f64,
    mass_kg: f64,
    pace_hz: f64,
    footfall: *const c_char,
    line_rms_arcsec: *mut f64,
    rms_arcsec: *mut f64,
) -> i32 {
    guard("stillsky_footfall_steady", || {
        // SAFETY: caller contract.
        let (m, deck, total) =
            unsafe { (deref(model, "model")?, cstr(deck, "deck")?, deref_mut(rms_arcsec, "rms_arcsec")?) };
        let w = walker(mass_kg, pace_hz, footfall)?;
        let r = people::footfall_steady(&m.model, deck, &w, [at_x_m, at_y_m])?;
        if !line_rms_arcsec.is_null() {
            // SAFETY: caller contract.
            let l = unsafe { slice_mut(line_rms_arcsec, 4, "line_rms_arcsec") }?;
            for (o, line) in l.iter_mut().zip(&r.lines) {
                *o = line.image_rms_arcsec;
            }
        }
        *total = r.rms_arcsec;
        Ok(())
    })
}

/// One distance of the standing table (`stillsky_standing_tilt`).
#[allow(non_camel_case_types)]
#[repr(C)]
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct stillsky_standing_row {
    pub distance_m: f64,
    /// Azimuth of the person seen from the stand (deg from north through east): the one asked
    /// for, or the worst.
    pub azimuth_deg: f64,
    /// Static image angle (radial): arcsec and px.
    pub image_arcsec: f64,
    pub image_px: f64,
    /// Static tilt of the deck itself (arcsec).
    pub deck_tilt_arcsec: f64,
}

/// Static image angle when a person of `mass_kg` stands on `deck` at each of
/// `distances_m[0..n]` (m, strictly increasing) from the stand's axis, along `azimuth_deg`
/// (deg from north through east) or, when `azimuth_deg` is NaN, the worst azimuth. One row per
/// distance into `rows` (capacity `capacity` ≥ `n`, else `..._BUFFER_TOO_SMALL`).
///
/// # Safety
/// `model` NULL or live; `deck` NUL-terminated; `distances_m` points to `n` doubles; `rows` to
/// `capacity` writable rows.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_standing_tilt(
    model: *const stillsky_model,
    deck: *const c_char,
    mass_kg: f64,
    distances_m: *const f64,
    n: usize,
    azimuth_deg: f64,
    rows: *mut stillsky_standing_row,
    capacity: usize,
) -> i32 {
    guard("stillsky_standing_tilt", || {
        // SAFETY: caller contract.
        let (m, deck, d) =
            unsafe { (deref(model, "model")?, cstr(deck, "deck")?, slice(distances_m, n, "distances_m")?) };
        if capacity < n {
            return Err(Failure::new(
                stillsky_status::BufferTooSmall,
                format!("rows hold {capacity}, {n} needed (one per distance)"),
            ));
        }
        let w = Walker::of_mass(mass_kg)?.weight_n;
        let az = if azimuth_deg.is_nan() { None } else { Some(azimuth_deg) };
        let t = people::standing_tilt(&m.model, deck, w, d, az, people::DEFAULT_LIMIT_PX)?;
        // SAFETY: caller contract; capacity >= n was checked.
        let out = unsafe { slice_mut(rows, n, "rows") }?;
        for (o, r) in out.iter_mut().zip(&t.rows) {
            *o = stillsky_standing_row {
                distance_m: r.distance_m,
                azimuth_deg: r.azimuth_deg,
                image_arcsec: r.image_arcsec,
                image_px: r.image_px,
                deck_tilt_arcsec: r.deck_tilt_arcsec,
            };
        }
        Ok(())
    })
}

/// The image motion of one tonal line (`stillsky_tone_image`).
#[allow(non_camel_case_types)]
#[repr(C)]
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct stillsky_tone_line_image {
    pub frequency_hz: f64,
    /// RMS amplitude in the input's own unit (m, rad, N or N·m).
    pub input_amplitude_rms: f64,
    /// RMS along image_x and image_y (arcsec).
    pub image_x_rms_arcsec: f64,
    pub image_y_rms_arcsec: f64,
    /// Radial RMS: arcsec, µm at the focal plane, px.
    pub rms_arcsec: f64,
    pub rms_um: f64,
    pub rms_px: f64,
    /// This line's share of the lines' total mean square.
    pub share: f64,
}

/// Tonal lines carried to the image through the FRF at each line's own frequency. Each of
/// `lines[0..n_lines]` is `"FREQ_HZ:INPUT:RMS_AMPLITUDE:UNIT"` (units `m`, `m_s`, `m_s2` for a
/// ground translation, `rad`, `N`, `N_m`), e.g. `"24:ground_z:1e-6:m_s"`. Writes one row per
/// line to `out` (capacity ≥ `n_lines`) and the radial RMS of all lines to `*rms_arcsec`.
///
/// # Safety
/// `model` NULL or live; `lines` points to `n_lines` NUL-terminated strings; `out` to
/// `capacity` writable rows; `rms_arcsec` NULL or writable.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_tone_image(
    model: *const stillsky_model,
    lines: *const *const c_char,
    n_lines: usize,
    out: *mut stillsky_tone_line_image,
    capacity: usize,
    rms_arcsec: *mut f64,
) -> i32 {
    guard("stillsky_tone_image", || {
        // SAFETY: caller contract.
        let (m, ptrs, total) = unsafe {
            (deref(model, "model")?, slice(lines, n_lines, "lines")?, deref_mut(rms_arcsec, "rms_arcsec")?)
        };
        if capacity < n_lines {
            return Err(Failure::new(
                stillsky_status::BufferTooSmall,
                format!("out holds {capacity} rows, {n_lines} needed (one per line)"),
            ));
        }
        let parsed = ptrs
            .iter()
            // SAFETY: caller contract.
            .map(|p| ToneLine::parse(unsafe { cstr(*p, "lines[i]") }?).map_err(Failure::from))
            .collect::<Result<Vec<_>, Failure>>()?;
        let r = tonal::tone_image(&m.model, &parsed)?;
        // SAFETY: caller contract; capacity >= n_lines was checked.
        let o = unsafe { slice_mut(out, n_lines, "out") }?;
        for (o, l) in o.iter_mut().zip(&r.lines) {
            *o = stillsky_tone_line_image {
                frequency_hz: l.line.frequency_hz,
                input_amplitude_rms: l.input_amplitude_rms,
                image_x_rms_arcsec: l.image_rms_arcsec[0],
                image_y_rms_arcsec: l.image_rms_arcsec[1],
                rms_arcsec: l.rms_arcsec,
                rms_um: l.rms_um,
                rms_px: l.rms_px,
                share: l.share,
            };
        }
        *total = r.rms_arcsec;
        Ok(())
    })
}

/// Amplitude ratio of ground vibration carried from `from_m` to `to_m` from its source, at each
/// of `freq_hz[0..n]` (Hz, ≥ 0): Bornitz, (r1/r2)^n · exp(−π f η (r2 − r1)/c), with `wave`
/// `"surface"` (n = 0.5), `"body"` (1) or `"body-at-surface"` (2), soil loss factor η =
/// `loss_factor` and wave speed c = `wave_speed_m_s`. A rough estimate; square it for a PSD.
///
/// # Safety
/// `freq_hz` points to `n` doubles; `wave` NUL-terminated; `out` to `n` writable doubles.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_ground_distance_ratio(
    freq_hz: *const f64,
    n: usize,
    from_m: f64,
    to_m: f64,
    wave: *const c_char,
    loss_factor: f64,
    wave_speed_m_s: f64,
    out: *mut f64,
) -> i32 {
    guard("stillsky_ground_distance_ratio", || {
        // SAFETY: caller contract.
        let (f, wave) = unsafe { (slice(freq_hz, n, "freq_hz")?, cstr(wave, "wave")?) };
        let p = GroundPath::with_soil(
            from_m,
            to_m,
            GroundPath::spreading_of(wave)?,
            loss_factor,
            wave_speed_m_s,
        )?;
        for fk in f {
            stillsky_core::error::require_non_negative("freq_hz", *fk)?;
        }
        // SAFETY: caller contract.
        let o = unsafe { slice_mut(out, n, "out") }?;
        for (o, fk) in o.iter_mut().zip(f) {
            *o = p.amplitude_ratio(*fk);
        }
        Ok(())
    })
}

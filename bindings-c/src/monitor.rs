//! The streaming image-motion monitor.

use crate::error::{Failure, cstr, deref, deref_mut, guard, slice};
use crate::model::{stillsky_complex, stillsky_model};
use crate::status::stillsky_status;
use std::ffi::c_char;
use stillsky_core::Complex64;
use stillsky_core::monitor::{Monitor, MonitorConfig, MonitorState, Reading, UnsafeReason};

/// A streaming image-motion monitor (opaque). **Single producer:** `push`, `tick`,
/// `exposure_*` and `reset` on one handle must not run concurrently (no locks are taken); the
/// handle may be moved between threads. It only reports image motion: it never commands motion
/// or any other action. Released by `stillsky_monitor_free`.
#[allow(non_camel_case_types)]
pub struct stillsky_monitor {
    inner: Monitor,
}

/// Monitor settings. Fill with `stillsky_monitor_config_default`, then set what you need.
#[allow(non_camel_case_types)]
#[repr(C)]
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct stillsky_monitor_config {
    /// Accelerometer sample rate (Hz).
    pub sample_rate_hz: f64,
    /// Running RMS window (s), rounded to whole samples.
    pub window_s: f64,
    /// The flag turns on when the windowed radial RMS exceeds this (arcsec).
    pub threshold_arcsec: f64,
    /// The flag turns off below threshold × (1 − hysteresis); 0 ≤ hysteresis < 1.
    pub hysteresis: f64,
    /// The flag stays on at least this long (s).
    pub hold_off_s: f64,
    /// At a tick, data older than this reads as UNSAFE (s).
    pub max_age_s: f64,
    /// Corner of the 4th-order Butterworth high-pass (Hz); 4·fs/fir_taps ≤ corner < fs/2.
    pub highpass_hz: f64,
    /// FIR length L: even, 32..=65536. Latency = (L/8)/fs; warm-up = L + window samples.
    pub fir_taps: usize,
}

/// Monitor state.
#[allow(non_camel_case_types)]
#[repr(i32)]
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum stillsky_monitor_state {
    /// Fresh, valid data; image motion below threshold (or in the hysteresis band after ABOVE).
    Quiet = 0,
    /// Fresh, valid data; the flag is on.
    Above = 1,
    /// No trustworthy reading: warming up, bad sample, gap, or stale data. Treat as not quiet.
    Unsafe = 2,
}

/// Why the monitor reads UNSAFE.
#[allow(non_camel_case_types)]
#[repr(i32)]
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum stillsky_unsafe_reason {
    /// Not unsafe.
    None = 0,
    /// Filling filters and window after creation or reset.
    WarmingUp = 1,
    /// Refilling after a non-finite sample.
    BadSample = 2,
    /// Refilling after a gap in the timestamps.
    Gap = 3,
    /// Newest sample older than `max_age_s` at the last tick (or no tick/sample yet).
    Stale = 4,
}

/// What `stillsky_monitor_tick` reports.
#[allow(non_camel_case_types)]
#[repr(C)]
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct stillsky_monitor_reading {
    pub state: stillsky_monitor_state,
    pub reason: stillsky_unsafe_reason,
    /// Radial RMS image motion over the window (arcsec); NaN while warming up.
    pub rms_arcsec: f64,
    pub rms_x_arcsec: f64,
    pub rms_y_arcsec: f64,
    /// Radial RMS in pixels.
    pub rms_px: f64,
    /// Timestamp of the newest sample (s); NaN before the first.
    pub last_sample_time_s: f64,
    /// now − last_sample_time_s at this tick (s).
    pub age_s: f64,
}

/// One-number quality of an exposure, for the image header.
#[allow(non_camel_case_types)]
#[repr(C)]
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct stillsky_exposure_quality {
    pub duration_s: f64,
    /// Radial RMS image motion over the exposure (arcsec); NaN if no valid sample fell in it.
    pub rms_arcsec: f64,
    pub rms_px: f64,
    /// Largest windowed RMS during the exposure (arcsec).
    pub max_window_rms_arcsec: f64,
    /// Valid samples counted / samples the duration implies (≤ 1).
    pub coverage: f64,
    /// Fraction of counted samples with the flag on.
    pub above_fraction: f64,
}

/// Fixed properties of a monitor.
#[allow(non_camel_case_types)]
#[repr(C)]
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct stillsky_monitor_info {
    pub n_axes: usize,
    pub fir_taps: usize,
    pub window_samples: usize,
    pub warmup_samples: usize,
    /// Delay of the estimate behind the data (s).
    pub latency_s: f64,
    pub plate_scale_arcsec_per_px: f64,
}

fn to_core(c: &stillsky_monitor_config) -> MonitorConfig {
    let mut m = MonitorConfig::default();
    m.sample_rate_hz = c.sample_rate_hz;
    m.window_s = c.window_s;
    m.threshold_arcsec = c.threshold_arcsec;
    m.hysteresis = c.hysteresis;
    m.hold_off_s = c.hold_off_s;
    m.max_age_s = c.max_age_s;
    m.highpass_hz = c.highpass_hz;
    m.fir_taps = c.fir_taps;
    m
}

fn reading(r: &Reading) -> stillsky_monitor_reading {
    stillsky_monitor_reading {
        state: match r.state {
            MonitorState::Quiet => stillsky_monitor_state::Quiet,
            MonitorState::Above => stillsky_monitor_state::Above,
            MonitorState::Unsafe => stillsky_monitor_state::Unsafe,
        },
        reason: match r.reason {
            UnsafeReason::None => stillsky_unsafe_reason::None,
            UnsafeReason::WarmingUp => stillsky_unsafe_reason::WarmingUp,
            UnsafeReason::BadSample => stillsky_unsafe_reason::BadSample,
            UnsafeReason::Gap => stillsky_unsafe_reason::Gap,
            UnsafeReason::Stale => stillsky_unsafe_reason::Stale,
        },
        rms_arcsec: r.rms_arcsec,
        rms_x_arcsec: r.rms_x_arcsec,
        rms_y_arcsec: r.rms_y_arcsec,
        rms_px: r.rms_px,
        last_sample_time_s: r.last_sample_time_s,
        age_s: r.age_s,
    }
}

/// Fill `*out` with the default settings (typical starting values, not advice for a rig):
/// 200 Hz, 10 s window, 1 arcsec threshold, hysteresis 0.2, hold-off 2 s, max age 0.5 s,
/// high-pass 1 Hz, 1024 taps.
///
/// # Safety
/// `out` is NULL or writable.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_monitor_config_default(out: *mut stillsky_monitor_config) -> i32 {
    guard("stillsky_monitor_config_default", || {
        // SAFETY: caller contract.
        let out = unsafe { deref_mut(out, "out") }?;
        let d = MonitorConfig::default();
        *out = stillsky_monitor_config {
            sample_rate_hz: d.sample_rate_hz,
            window_s: d.window_s,
            threshold_arcsec: d.threshold_arcsec,
            hysteresis: d.hysteresis,
            hold_off_s: d.hold_off_s,
            max_age_s: d.max_age_s,
            highpass_hz: d.highpass_hz,
            fir_taps: d.fir_taps,
        };
        Ok(())
    })
}

/// Create a monitor for `model`'s image motion (the model needs `[optics]`), fed by
/// accelerometers along the ground axes named in `axes` ("z", "xy", "xyz", ..., in the order
/// the channels are interleaved in `push`). The filters are designed now from
/// H_image(f)/(−ω²) of the model; the model handle is not needed afterwards.
///
/// On success `*out` owns a new handle (free with `stillsky_monitor_free`); on failure NULL.
///
/// # Safety
/// `model` is NULL or a live handle; `axes` NUL-terminated; `config` NULL or valid; `out`
/// NULL or writable.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_monitor_from_model(
    model: *const stillsky_model,
    axes: *const c_char,
    config: *const stillsky_monitor_config,
    out: *mut *mut stillsky_monitor,
) -> i32 {
    guard("stillsky_monitor_from_model", || {
        // SAFETY: caller contract.
        let out = unsafe { deref_mut(out, "out") }?;
        *out = std::ptr::null_mut();
        // SAFETY: caller contract.
        let (m, axes, cfg) =
            unsafe { (deref(model, "model")?, cstr(axes, "axes")?, deref(config, "config")?) };
        let inner = Monitor::from_model(&m.model, axes, &to_core(cfg))?;
        *out = Box::into_raw(Box::new(stillsky_monitor { inner }));
        Ok(())
    })
}

/// Create a monitor from a measured accelerometer-to-image FRF: `frf` holds
/// `n_freq × 2 × n_axes` values (row-major: frequency, image axis x/y, channel) in rad of
/// line of sight per m/s², on `freq_hz[0..n_freq]` (strictly increasing, > 0). It is
/// interpolated linearly onto the filter bins; bins outside the grid get zero response.
/// `plate_scale_arcsec_per_px` converts to pixels.
///
/// # Safety
/// Array pointers point to the stated counts; `config` NULL or valid; `out` NULL or writable.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_monitor_from_calibration(
    freq_hz: *const f64,
    n_freq: usize,
    n_axes: usize,
    frf: *const stillsky_complex,
    plate_scale_arcsec_per_px: f64,
    config: *const stillsky_monitor_config,
    out: *mut *mut stillsky_monitor,
) -> i32 {
    guard("stillsky_monitor_from_calibration", || {
        // SAFETY: caller contract.
        let out = unsafe { deref_mut(out, "out") }?;
        *out = std::ptr::null_mut();
        let n = n_freq.checked_mul(2).and_then(|v| v.checked_mul(n_axes)).ok_or_else(|| {
            Failure::new(
                stillsky_status::TooLarge,
                format!("n_freq {n_freq} × 2 × n_axes {n_axes} overflows"),
            )
        })?;
        // SAFETY: caller contract.
        let (f, g, cfg) =
            unsafe { (slice(freq_hz, n_freq, "freq_hz")?, slice(frf, n, "frf")?, deref(config, "config")?) };
        let g: Vec<Complex64> = g.iter().map(|c| Complex64::new(c.re, c.im)).collect();
        let inner = Monitor::from_calibration(f, n_axes, &g, plate_scale_arcsec_per_px, &to_core(cfg))?;
        *out = Box::into_raw(Box::new(stillsky_monitor { inner }));
        Ok(())
    })
}

/// Feed `n_samples` time steps of accelerometer data (m/s²), interleaved by channel
/// (`samples` holds `n_samples × n_axes` doubles), the first taken at `t0_s` (s, on the
/// caller's clock; the rest follow at 1/fs). Runs in O(n_samples × taps), allocates nothing,
/// takes no lock.
///
/// Errors: `..._SHAPE_MISMATCH` (wrong `n_axes`), `..._INVALID_ARGUMENT` for an empty block,
/// a timestamp going backwards, or a non-finite sample. A non-finite sample also makes the
/// monitor UNSAFE (reason BAD_SAMPLE) until it has refilled; a jump of more than half a sample
/// in `t0_s` is a gap (UNSAFE, reason GAP, until refilled).
///
/// # Safety
/// `monitor` is NULL or a live handle used by no other thread now; `samples` points to
/// `n_samples × n_axes` doubles.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_monitor_push(
    monitor: *mut stillsky_monitor,
    t0_s: f64,
    samples: *const f64,
    n_samples: usize,
    n_axes: usize,
) -> i32 {
    guard("stillsky_monitor_push", || {
        // SAFETY: caller contract.
        let m = unsafe { deref_mut(monitor, "monitor") }?;
        let total = n_samples
            .checked_mul(n_axes)
            .ok_or_else(|| Failure::new(stillsky_status::TooLarge, "n_samples × n_axes overflows"))?;
        // SAFETY: caller contract.
        let x = unsafe { slice(samples, total, "samples") }?;
        m.inner.push(t0_s, x, n_axes)?;
        Ok(())
    })
}

/// Tell the monitor the time `now_s` (caller's clock, same as the sample timestamps) and get
/// its reading: UNSAFE if warming up, after a bad sample or gap, or if the newest sample is
/// older than `max_age_s`; otherwise ABOVE or QUIET. Call it regularly even when no data
/// arrives: that is how a stopped sensor becomes UNSAFE.
///
/// # Safety
/// `monitor` NULL or a live handle used by no other thread now; `out` NULL or writable.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_monitor_tick(
    monitor: *mut stillsky_monitor,
    now_s: f64,
    out: *mut stillsky_monitor_reading,
) -> i32 {
    guard("stillsky_monitor_tick", || {
        // SAFETY: caller contract.
        let (m, out) = unsafe { (deref_mut(monitor, "monitor")?, deref_mut(out, "out")?) };
        *out = reading(&m.inner.tick(now_s)?);
        Ok(())
    })
}

/// Open an exposure at `t_s`; samples whose motion time (sample time − latency) is at or after
/// `t_s` count towards it. `..._INVALID_ARGUMENT` if one is already open.
///
/// # Safety
/// `monitor` NULL or a live handle used by no other thread now.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_monitor_exposure_begin(monitor: *mut stillsky_monitor, t_s: f64) -> i32 {
    guard("stillsky_monitor_exposure_begin", || {
        // SAFETY: caller contract.
        unsafe { deref_mut(monitor, "monitor") }?.inner.exposure_begin(t_s)?;
        Ok(())
    })
}

/// Close the open exposure at `t_s` and write its quality. Push data up to `t_s + latency_s`
/// first for full coverage. `..._INVALID_ARGUMENT` if none is open or `t_s` is before its start.
///
/// # Safety
/// `monitor` NULL or a live handle used by no other thread now; `out` NULL or writable.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_monitor_exposure_end(
    monitor: *mut stillsky_monitor,
    t_s: f64,
    out: *mut stillsky_exposure_quality,
) -> i32 {
    guard("stillsky_monitor_exposure_end", || {
        // SAFETY: caller contract.
        let (m, out) = unsafe { (deref_mut(monitor, "monitor")?, deref_mut(out, "out")?) };
        let q = m.inner.exposure_end(t_s)?;
        *out = stillsky_exposure_quality {
            duration_s: q.duration_s,
            rms_arcsec: q.rms_arcsec,
            rms_px: q.rms_px,
            max_window_rms_arcsec: q.max_window_rms_arcsec,
            coverage: q.coverage,
            above_fraction: q.above_fraction,
        };
        Ok(())
    })
}

/// Clear filters, window, flag, clock and any open exposure (UNSAFE, warming up, afterwards).
///
/// # Safety
/// `monitor` NULL or a live handle used by no other thread now.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_monitor_reset(monitor: *mut stillsky_monitor) -> i32 {
    guard("stillsky_monitor_reset", || {
        // SAFETY: caller contract.
        unsafe { deref_mut(monitor, "monitor") }?.inner.reset();
        Ok(())
    })
}

/// Write the monitor's fixed properties (taps, window, warm-up, latency, plate scale).
///
/// # Safety
/// `monitor` NULL or a live handle; `out` NULL or writable.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_monitor_info_get(
    monitor: *const stillsky_monitor,
    out: *mut stillsky_monitor_info,
) -> i32 {
    guard("stillsky_monitor_info_get", || {
        // SAFETY: caller contract.
        let (m, out) = unsafe { (deref(monitor, "monitor")?, deref_mut(out, "out")?) };
        let m = &m.inner;
        *out = stillsky_monitor_info {
            n_axes: m.n_axes(),
            fir_taps: m.fir_taps(),
            window_samples: m.window_samples(),
            warmup_samples: m.warmup_samples(),
            latency_s: m.latency_s(),
            plate_scale_arcsec_per_px: m.plate_scale_arcsec_per_px(),
        };
        Ok(())
    })
}

/// Release a monitor. NULL does nothing.
///
/// # Safety
/// `monitor` is NULL or a handle from this library, not freed and not in use.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_monitor_free(monitor: *mut stillsky_monitor) {
    crate::error::guard_value("stillsky_monitor_free", (), || {
        if !monitor.is_null() {
            // SAFETY: created by Box::into_raw here and not freed (caller contract).
            drop(unsafe { Box::from_raw(monitor) });
        }
    })
}

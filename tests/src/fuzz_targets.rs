//! The bodies of the fuzz targets (fuzz/fuzz_targets/*.rs call these), shared with
//! `tests/fuzz_regressions.rs`, which replays every saved input through the same functions.
//!
//! Each function takes arbitrary bytes and must return normally: a bad input has to come back
//! as an error. Besides "no panic", each checks what a successful parse promises (finite
//! values, sorted grids, exact round trips, streaming = one-shot read), and the C target
//! treats a caught panic (`STILLSKY_STATUS_INTERNAL`) as a failure. Failures panic, which
//! libFuzzer records as a crash and `cargo test` as a failed test.

use std::ffi::{CString, c_char};
use stillsky::io::series::{SeriesChunk, SeriesOptions, SeriesReader, read_series_text};
use stillsky::schema::ModelFile;
use stillsky::spectrum::Psd;
use stillsky_c as capi;
use stillsky_c::stillsky_status;

/// Largest model the targets evaluate further (FRF, modes) after a successful build; larger
/// ones are only assembled, so one input stays fast.
pub const EVAL_MAX_DOFS: usize = 36;

/// A fuzz target body.
pub type Target = fn(&[u8]);

/// The targets by name (the fuzz/ target names and the corpus folder names).
pub const TARGETS: [(&str, Target); 4] =
    [("model_toml", model_toml), ("series_text", series_text), ("psd_csv", psd_csv), ("c_api", c_api)];

/// TOML model reader: `ModelFile::parse` then `to_model`; a model that builds answers an FRF
/// and its modes without panicking and with finite natural frequencies.
pub fn model_toml(data: &[u8]) {
    let text = String::from_utf8_lossy(data);
    let Ok(file) = ModelFile::parse(&text, "fuzz.toml") else { return };
    let Ok(model) = file.to_model() else { return };
    let n = model.dof_count();
    assert!(n > 0 && n <= stillsky::assembly::MAX_DOFS, "{n} DOFs");
    if n > EVAL_MAX_DOFS {
        return;
    }
    let (inputs, outputs) = (model.input_names(), model.output_names());
    if let (Some(i), Some(o)) = (inputs.first(), outputs.first()) {
        // Ok or a named error (e.g. singular at a frequency); values finite when Ok.
        if let Ok(h) = model.frf(&[0.3, 7.0, 55.0], &[i], &[o]) {
            let s = h.series(o, i).unwrap_or_default();
            assert!(s.iter().all(|c| c.re.is_finite() && c.im.is_finite()), "{s:?}");
        }
    }
    if let Ok(m) = model.modes() {
        assert!(m.frequency_hz.iter().all(|f| f.is_finite() && *f >= 0.0), "{:?}", m.frequency_hz);
    }
}

/// CSV / whitespace recording reader from memory: a successful read has 1..=3 axes of finite
/// samples at a finite positive rate, and streaming it in chunks (size from the first byte)
/// gives exactly the one-shot result.
pub fn series_text(data: &[u8]) {
    let (chunk, rest) = data.split_first().map_or((1, data), |(c, r)| (usize::from(*c % 17) + 1, r));
    let text = String::from_utf8_lossy(rest);
    for opts in [SeriesOptions::default(), SeriesOptions::default().with_fs_hz(100.0)] {
        let Ok(s) = read_series_text(&text, "fuzz.csv", &opts) else { continue };
        assert!((1..=3).contains(&s.n_axes), "{} axes", s.n_axes);
        assert!(s.fs_hz.is_finite() && s.fs_hz > 0.0, "fs {}", s.fs_hz);
        assert_eq!(s.samples.len(), s.n_axes * s.n_frames());
        assert!(s.samples.iter().all(|v| v.is_finite()));
        let Ok(mut rdr) = SeriesReader::from_text(&text, "fuzz.csv", &opts) else {
            panic!("read_series_text succeeded but SeriesReader::from_text failed");
        };
        let mut c = SeriesChunk::new();
        let mut axes = vec![Vec::new(); s.n_axes];
        loop {
            let got = match rdr.next_chunk(chunk, &mut c) {
                Ok(g) => g,
                Err(e) => panic!("streaming failed where the one-shot read did not: {e}"),
            };
            if got == 0 {
                break;
            }
            assert!(got <= chunk);
            for (a, dst) in axes.iter_mut().enumerate() {
                dst.extend_from_slice(c.axis(a).unwrap_or_default());
            }
        }
        assert_eq!(axes.concat(), s.samples, "streamed samples differ from the one-shot read");
    }
}

/// PSD CSV reader: a successful parse has a strictly increasing positive grid and finite
/// non-negative values, and writing it back reads back to the identical PSD.
pub fn psd_csv(data: &[u8]) {
    let text = String::from_utf8_lossy(data);
    let Ok(p) = Psd::from_csv_str(&text, "fuzz.csv") else { return };
    let f = p.freq_hz();
    assert!(!f.is_empty() && f[0] > 0.0 && f.windows(2).all(|w| w[1] > w[0]), "{f:?}");
    assert!(p.values().iter().all(|v| v.is_finite() && *v >= 0.0));
    let again = Psd::from_csv_str(&p.to_csv_string(), "round trip");
    assert_eq!(again.as_ref(), Ok(&p), "round trip differs");
}

/// A tiny reader over the fuzz bytes.
struct Bytes<'a>(&'a [u8]);

impl Bytes<'_> {
    fn byte(&mut self) -> u8 {
        let (b, r) = self.0.split_first().map_or((0, self.0), |(b, r)| (*b, r));
        self.0 = r;
        b
    }
    /// Text up to the next NUL (not included), as a C string.
    fn cstring(&mut self) -> CString {
        let end = self.0.iter().position(|b| *b == 0).unwrap_or(self.0.len());
        let (s, r) = self.0.split_at(end);
        self.0 = r.get(1..).unwrap_or_default();
        CString::new(s).unwrap_or_default()
    }
    /// Up to `max` doubles from the next 8-byte groups.
    fn doubles(&mut self, max: usize) -> Vec<f64> {
        let n = (self.0.len() / 8).min(max);
        let (d, r) = self.0.split_at(n * 8);
        self.0 = r;
        d.chunks_exact(8).map(|c| f64::from_le_bytes(c.try_into().unwrap_or_default())).collect()
    }
}

/// A valid model with optics, so that the array entry points are exercised even when the
/// fuzzed model text does not build.
const BASE_MODEL: &str = r#"
[optics]
focal_length_mm = 1000
pixel_um = 4
altitude_deg = 40
azimuth_deg = 20
body = "tube"
[[body]]
name = "tube"
mass_kg = 10
cg_m = [0, 0, 1]
inertia_kgm2 = [0.5, 0.5, 0.2]
[[spring]]
name = "a"
from = "ground"
to = "tube"
at_m = [0.3, 0, 0.8]
direction = [0, 0, 1]
stiffness_n_per_m = 2e5
loss_factor = 0.05
[[spring]]
name = "b"
from = "ground"
to = "tube"
at_m = [-0.15, 0.26, 0.8]
direction = [0, 0, 1]
stiffness_n_per_m = 2e5
loss_factor = 0.05
[[spring]]
name = "c"
from = "ground"
to = "tube"
at_m = [-0.15, -0.26, 0.8]
direction = [0, 0, 1]
stiffness_n_per_m = 2e5
loss_factor = 0.05
[[spring]]
name = "h1"
from = "ground"
to = "tube"
at_m = [0, 0, 0.8]
direction = [1, 0, 0]
stiffness_n_per_m = 1e5
[[spring]]
name = "h2"
from = "ground"
to = "tube"
at_m = [0, 0, 0.8]
direction = [0, 1, 0]
stiffness_n_per_m = 1e5
[[spring]]
name = "h3"
from = "ground"
to = "tube"
at_m = [0.3, 0, 0.8]
direction = [0, 1, 0]
stiffness_n_per_m = 1e5
"#;

fn check(status: i32, what: &str) -> i32 {
    assert!(stillsky_status::from_i32(status).is_some(), "{what}: status {status} is not a status code");
    if status == stillsky_status::Internal as i32 {
        let mut buf = vec![0 as c_char; 1024];
        // SAFETY: buf holds 1024 bytes.
        unsafe { capi::stillsky_last_error_message(buf.as_mut_ptr(), buf.len()) };
        // SAFETY: NUL-terminated by the call above.
        let msg = unsafe { std::ffi::CStr::from_ptr(buf.as_ptr()) }.to_string_lossy().into_owned();
        panic!("{what}: caught panic at the C boundary: {msg}");
    }
    if status != 0 {
        // Every failure leaves a non-empty message, and its length query agrees with a read.
        // SAFETY: NULL, 0 asks for the length.
        let n = unsafe { capi::stillsky_last_error_message(std::ptr::null_mut(), 0) };
        assert!(n > 1, "{what}: empty last error");
        let mut small = [1 as c_char; 5];
        // SAFETY: 5 writable bytes.
        let m = unsafe { capi::stillsky_last_error_message(small.as_mut_ptr(), small.len()) };
        assert_eq!(m, n);
        assert!(small.contains(&0), "{what}: truncated message not NUL-terminated");
    }
    status
}

/// The C API entry points that take strings and arrays, called as a C program would (through
/// the `extern "C"` functions of the stillsky-c rlib). Layout of the bytes: model text up to
/// a NUL; a flags byte; input name, output name and monitor axes up to NULs; a length byte;
/// then doubles (frequencies, then PSD values / samples). Flags choose NULL pointers and short
/// buffers. No call may return an unknown code or INTERNAL (a caught panic).
pub fn c_api(data: &[u8]) {
    let mut b = Bytes(data);
    let text = b.cstring();
    let flags = b.byte();
    let (input, output, axes) = (b.cstring(), b.cstring(), b.cstring());
    let len_byte = usize::from(b.byte());
    let freqs = b.doubles(64);
    let vals = b.doubles(64);
    let null_if = |bit: u8, p: *const f64| if flags & bit != 0 { std::ptr::null() } else { p };

    let mut fuzzed: *mut capi::stillsky_model = std::ptr::null_mut();
    // SAFETY: valid C string and out-pointer.
    let s = check(unsafe { capi::stillsky_model_from_toml(text.as_ptr(), &mut fuzzed) }, "model_from_toml");
    assert_eq!(s == 0, !fuzzed.is_null(), "handle and status disagree");
    let mut base: *mut capi::stillsky_model = std::ptr::null_mut();
    let base_text = CString::new(BASE_MODEL).unwrap_or_default();
    // SAFETY: as above.
    let s = unsafe { capi::stillsky_model_from_toml(base_text.as_ptr(), &mut base) };
    assert_eq!(s, 0, "the base model must build");
    let mut n_dof = 0usize;
    if !fuzzed.is_null() {
        // SAFETY: live handle, writable out.
        check(unsafe { capi::stillsky_model_dof_count(fuzzed, &mut n_dof) }, "dof_count");
    }
    let model = if !fuzzed.is_null() && n_dof <= EVAL_MAX_DOFS && flags & 0x80 != 0 { fuzzed } else { base };

    let n = freqs.len();
    let out_len = if flags & 0x08 != 0 { len_byte.min(n) } else { n };
    let (mut re, mut im) = (vec![0.0; n.max(1)], vec![0.0; n.max(1)]);
    let mut cx = vec![capi::stillsky_complex::default(); n.max(1)];
    let fp = null_if(0x01, freqs.as_ptr());
    let (ip, op) = if flags & 0x02 != 0 {
        (std::ptr::null(), output.as_ptr())
    } else {
        (input.as_ptr(), output.as_ptr())
    };
    // SAFETY: every non-NULL pointer covers the counts passed (out_len <= n <= buffer length).
    unsafe {
        check(
            capi::stillsky_frf_evaluate(model, fp, n, ip, op, re.as_mut_ptr(), im.as_mut_ptr(), out_len),
            "frf_evaluate",
        );
        check(
            capi::stillsky_frf_evaluate_interleaved(model, fp, n, ip, op, cx.as_mut_ptr(), out_len),
            "frf_evaluate_interleaved",
        );
        // Known names on the fuzzed grid, so the grid and solver paths are reached too.
        let (g, z) = (c"ground_z", c"image_y");
        check(
            capi::stillsky_frf_evaluate(
                model,
                fp,
                n,
                g.as_ptr(),
                z.as_ptr(),
                re.as_mut_ptr(),
                im.as_mut_ptr(),
                out_len,
            ),
            "frf_evaluate (known names)",
        );
    }
    // Image motion: PSD arrays of the grid's length, from the value doubles (absent axes NULL).
    let mut psd = vals.clone();
    psd.resize(n, 1e-6);
    let radius = vals.first().copied().unwrap_or(1.0);
    let mut im_out = capi::stillsky_image_motion::default();
    // SAFETY: each non-NULL PSD pointer covers n doubles.
    unsafe {
        check(
            capi::stillsky_image_motion_compute(
                model,
                fp,
                n,
                null_if(0x10, psd.as_ptr()),
                null_if(0x20, psd.as_ptr()),
                null_if(0x40, psd.as_ptr()),
                radius,
                &mut im_out,
            ),
            "image_motion_compute",
        );
    }
    // Modes with a capacity from the length byte.
    let cap = len_byte % 40;
    let (mut fm, mut zm) = (vec![0.0; cap.max(1)], vec![0.0; cap.max(1)]);
    let mut n_modes = 0usize;
    // SAFETY: buffers hold cap (>= 1) doubles.
    unsafe {
        check(
            capi::stillsky_modes_compute(model, fm.as_mut_ptr(), zm.as_mut_ptr(), cap, &mut n_modes),
            "modes_compute",
        );
    }
    // Monitor: fuzzed axes string; then push fuzzed samples with a fuzzed channel count.
    let mut cfg = capi::stillsky_monitor_config {
        sample_rate_hz: 200.0,
        window_s: 10.0,
        threshold_arcsec: 1.0,
        hysteresis: 0.2,
        hold_off_s: 2.0,
        max_age_s: 0.5,
        highpass_hz: 1.0,
        fir_taps: 64,
    };
    if flags & 0x04 != 0 {
        cfg.sample_rate_hz = vals.get(1).copied().unwrap_or(f64::NAN);
        cfg.fir_taps = len_byte * 2;
    }
    let mut mon: *mut capi::stillsky_monitor = std::ptr::null_mut();
    // SAFETY: valid pointers.
    let s = check(
        unsafe { capi::stillsky_monitor_from_model(model, axes.as_ptr(), &cfg, &mut mon) },
        "monitor_from_model",
    );
    if s == 0 && !mon.is_null() {
        let ch = (len_byte % 4).max(1);
        let frames = vals.len() / ch;
        let t0 = freqs.first().copied().unwrap_or(0.0);
        let mut reading = std::mem::MaybeUninit::<capi::stillsky_monitor_reading>::uninit();
        // SAFETY: vals holds frames × ch doubles; live monitor; `reading` is writable.
        unsafe {
            check(capi::stillsky_monitor_push(mon, t0, vals.as_ptr(), frames, ch), "monitor_push");
            check(capi::stillsky_monitor_tick(mon, t0 + 1.0, reading.as_mut_ptr()), "monitor_tick");
            capi::stillsky_monitor_free(mon);
        }
    }
    // Status names for arbitrary numbers are never NULL.
    let code = i32::from_le_bytes([flags, len_byte as u8, 0, 0]) - 128;
    assert!(!capi::stillsky_status_str(code).is_null());
    // SAFETY: handles from this library, freed once.
    unsafe {
        capi::stillsky_model_free(fuzzed);
        capi::stillsky_model_free(base);
    }
}

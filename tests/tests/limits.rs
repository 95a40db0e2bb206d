//! Long recordings stream with bounded memory: a generated recording longer than the in-memory
//! limit is refused by `read_series` (TooLarge, naming the streaming reader) and read through
//! `SeriesReader` chunks into `WelchStream`, whose peak memory does not grow with the file.
//! (Model and grid limits: tests/tests/bad_input_matrix.rs, `model_too_large`, `grid_too_long`.)

use std::io::Write;
use stillsky::Error;
use stillsky::io::series::{SeriesChunk, SeriesOptions, SeriesReader, read_series};
use stillsky::spectrum::welch::{WelchConfig, WelchStream};

/// Peak resident memory of this process so far (kB), from /proc (Linux).
fn peak_rss_kb() -> Option<u64> {
    let s = std::fs::read_to_string("/proc/self/status").ok()?;
    let l = s.lines().find(|l| l.starts_with("VmHWM:"))?;
    l.split_whitespace().nth(1)?.parse().ok()
}

#[test]
fn long_recording_streams_through_welch_with_bounded_buffers() {
    let (fs, n) = (1000.0, 1_500_000usize); // 25 min at 1 kHz, 3 axes = 4.5 M samples (36 MB as f64)
    let (f0, amp) = (12.5, [2.0, 1.0, 0.5]); // sines in mm/s per axis
    let dir = std::path::PathBuf::from(env!("CARGO_TARGET_TMPDIR")).join("limits");
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("long.csv");
    {
        let mut w = std::io::BufWriter::new(std::fs::File::create(&path).unwrap());
        writeln!(w, "# fs_hz={fs}\nx_mm_s,y_mm_s,z_mm_s").unwrap();
        for k in 0..n {
            let s = (2.0 * std::f64::consts::PI * f0 * k as f64 / fs).sin();
            writeln!(w, "{:.6},{:.6},{:.6}", amp[0] * s, amp[1] * s, amp[2] * s).unwrap();
        }
    }
    let opts = SeriesOptions::default().with_max_samples(1_000_000);
    match read_series(&path, &opts) {
        Err(Error::TooLarge { what, limit, .. }) => {
            assert_eq!(limit, 1_000_000);
            assert!(what.contains("SeriesReader"), "{what}");
        }
        other => panic!("expected TooLarge, got {other:?}"),
    }

    let before = peak_rss_kb();
    let mut rdr = SeriesReader::open(&path, &opts).unwrap();
    let cfg = WelchConfig::new(4000); // 0.25 Hz bins; 12.5 Hz is bin 50 exactly
    let mut ws = WelchStream::new(rdr.header().fs_hz, &cfg, 3).unwrap();
    let mut chunk = SeriesChunk::new();
    let max_frames = 8192;
    loop {
        let got = rdr.next_chunk(max_frames, &mut chunk).unwrap();
        if got == 0 {
            break;
        }
        assert!(got <= max_frames && chunk.n_frames() == got);
        let axes: Vec<&[f64]> = (0..3).map(|a| chunk.axis(a).unwrap()).collect();
        ws.push_axes(&axes).unwrap();
    }
    assert_eq!(rdr.frames_read(), n);
    let est = ws.finish().unwrap();
    let after = peak_rss_kb();

    // Parseval for a Welch density (one-sided, per Hz): Σ S Δf = mean square = A²/2 of the sine
    // (Welch 1967; Hann window ENBW corrected by the density scaling). Δf = fs / nperseg.
    let df = fs / 4000.0;
    for (a, e) in est.iter().enumerate() {
        let ms: f64 = e.values.iter().sum::<f64>() * df;
        let want = (amp[a] * 1e-3).powi(2) / 2.0;
        assert!((ms / want - 1.0).abs() < 0.01, "axis {a}: mean square {ms:e} vs {want:e}");
        let peak = e.values.iter().enumerate().max_by(|x, y| x.1.total_cmp(y.1)).unwrap().0;
        assert_eq!(e.freq_hz[peak], f0);
    }
    // Memory: loading the samples would take ≥ 36 MB; streaming holds one chunk (8192 × 3
    // doubles) and one segment per axis. Peak RSS may grow by a few MB for the reader's buffers
    // and allocator slack, not by the recording.
    if let (Some(b), Some(a)) = (before, after) {
        let grown_mb = (a.saturating_sub(b)) as f64 / 1024.0;
        println!("peak RSS {b} kB -> {a} kB (+{grown_mb:.1} MB) for a 36 MB recording");
        assert!(grown_mb < 12.0, "peak memory grew by {grown_mb:.1} MB while streaming");
    }
    let _ = std::fs::remove_file(&path);
}

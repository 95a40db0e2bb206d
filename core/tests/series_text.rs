//! CSV / whitespace recordings: units, errors with file and line, streaming, timestamp timing.

use std::path::PathBuf;

use stillsky::Error;
use stillsky::io::series::*;

fn dir(name: &str) -> PathBuf {
    let d = PathBuf::from(env!("CARGO_TARGET_TMPDIR")).join("series_text").join(name);
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn write(name: &str, file: &str, text: &str) -> PathBuf {
    let p = dir(name).join(file);
    std::fs::write(&p, text).unwrap();
    p
}

fn parse_err(r: Result<impl std::fmt::Debug, Error>) -> (String, String, String) {
    match r {
        Err(Error::Parse { file, location, reason }) => (file, location, reason),
        other => panic!("expected Error::Parse, got {other:?}"),
    }
}

fn opts() -> SeriesOptions {
    SeriesOptions::default()
}

#[test]
fn unit_conversions_are_exact() {
    // g = 9.80665 m/s² exactly (3rd CGPM 1901, ISO 80000-3); mm, µm are decimal prefixes.
    // Division by 10^3 / 10^6 is correctly rounded, so results equal the decimal literal.
    assert_eq!(Unit::StandardGravity.to_si(1.0), 9.80665);
    assert_eq!(Unit::StandardGravity.to_si(0.5), 4.903325);
    assert_eq!(Unit::MillimetrePerSecond.to_si(1234.0), 1.234);
    assert_eq!(Unit::MicrometrePerSecond.to_si(5.0), 5e-6);
    assert_eq!(Unit::Micrometre.to_si(250.0), 0.00025);
    assert_eq!(Unit::Millimetre.to_si(3.0), 0.003);
    assert_eq!(Unit::MetrePerSecond.to_si(0.7), 0.7);
    assert_eq!(Unit::Metre.to_si(-2.5), -2.5);
    assert_eq!(Unit::MetrePerSecondSquared.to_si(1e-3), 1e-3);
    assert_eq!(Unit::parse("µm_s").unwrap(), Unit::MicrometrePerSecond);
    assert_eq!(Unit::MillimetrePerSecond.quantity(), SeriesQuantity::Velocity);
    assert_eq!(Unit::StandardGravity.quantity(), SeriesQuantity::Acceleration);
    assert_eq!(Unit::Micrometre.quantity(), SeriesQuantity::Displacement);
    match Unit::parse("furlong") {
        Err(Error::UnknownName { name, known, .. }) => {
            assert_eq!(name, "furlong");
            assert!(known.contains("mm_s") && known.contains("g (g)"), "{known}");
        }
        other => panic!("{other:?}"),
    }
}

#[test]
fn csv_columns_in_file_units_arrive_in_si() {
    let p = write(
        "si",
        "rec.csv",
        "# a recording\n# fs_hz = 200\n# start_time=2024-05-01T21:00:00Z\nz_g,x_g,y_g\n1,0.5,-2\n0.25,0,1\n",
    );
    let s = read_series(&p, &opts()).unwrap();
    assert_eq!(s.n_axes, 3);
    assert_eq!(s.axis_names, ["z", "x", "y"]);
    assert_eq!(s.fs_hz, 200.0);
    assert_eq!(s.quantity, SeriesQuantity::Acceleration);
    assert_eq!(s.start_time.as_deref(), Some("2024-05-01T21:00:00Z"));
    assert_eq!(s.axis(0).unwrap(), [9.80665, 0.25 * 9.80665]);
    assert_eq!(s.axis(1).unwrap(), [4.903325, 0.0]);
    assert_eq!(s.axis_by_name("y").unwrap(), [-2.0 * 9.80665, 9.80665]);
    assert!(s.axis(3).is_none());
    assert_eq!(s.n_frames(), 2);
    assert_eq!(s.report.source, TimingSource::Nominal);
    assert_eq!(s.report.n_input_frames, 2);

    let p = write("si2", "vel.csv", "z_mm_s,n_um_s\n1234,5\n-1,250\n");
    let s = read_series(&p, &opts().with_fs_hz(50.0)).unwrap();
    assert_eq!(s.quantity, SeriesQuantity::Velocity);
    assert_eq!(s.axis(0).unwrap(), [1.234, -0.001]);
    assert_eq!(s.axis(1).unwrap(), [5e-6, 0.00025]);

    // Bare column names take the unit option; a suffix that disagrees with it is an error.
    let p = write("si3", "bare.txt", "# fs_hz=10\nz\n3\n");
    let s = read_series(&p, &opts().with_unit(Unit::Millimetre)).unwrap();
    assert_eq!((s.quantity, s.axis(0).unwrap()), (SeriesQuantity::Displacement, &[0.003][..]));
    let (_, loc, reason) = parse_err(read_series(&p, &opts()));
    assert_eq!(loc, "line 2, column 1 (header)");
    assert!(reason.contains("no unit"), "{reason}");
    let p = write("si4", "clash.csv", "# fs_hz=10\nz_g\n3\n");
    let (_, _, reason) = parse_err(read_series(&p, &opts().with_unit(Unit::Metre)));
    assert!(reason.contains("unit option"), "{reason}");
}

#[test]
fn whitespace_file_equals_csv_file() {
    let csv = write("ws1", "a.csv", "# fs_hz=100\nx_m_s2, z_m_s2\n0.1, 0.2\n\n# mid comment\n0.3,0.4\n");
    let ws = write("ws2", "a.txt", "# fs_hz=100\nx_m_s2\tz_m_s2\n  0.1   0.2\n\n# mid comment\n0.3 0.4\n");
    let a = read_series(&csv, &opts()).unwrap();
    let b = read_series(&ws, &opts()).unwrap();
    assert_eq!(a.samples, [0.1, 0.3, 0.2, 0.4]);
    assert_eq!(a.samples, b.samples);
    assert_eq!(a.axis_names, b.axis_names);
}

#[test]
fn bad_inputs_name_file_line_and_column() {
    // Missing file.
    let missing = dir("missing").join("nope.csv");
    match read_series(&missing, &opts()) {
        Err(Error::Io { path, .. }) => assert!(path.ends_with("nope.csv")),
        other => panic!("{other:?}"),
    }
    // Empty file, and a file with only comments.
    let p = write("empty", "e.csv", "");
    let (file, loc, reason) = parse_err(read_series(&p, &opts()));
    assert!(file.ends_with("e.csv") && loc == "line 1" && reason.contains("empty"), "{file} {loc} {reason}");
    let p = write("comments", "c.csv", "# fs_hz=10\n\n# nothing else\n");
    let (_, loc, reason) = parse_err(read_series(&p, &opts()));
    assert_eq!(loc, "line 3");
    assert!(reason.contains("no header"), "{reason}");
    // Header missing (first line is numbers).
    let p = write("nohdr", "n.csv", "# fs_hz=10\n0.1,0.2\n");
    let (_, loc, reason) = parse_err(read_series(&p, &opts()));
    assert_eq!(loc, "line 2, column 1 (header)");
    assert!(reason.contains("header"), "{reason}");
    // Unknown unit lists the known ones.
    let p = write("unit", "u.csv", "# fs_hz=10\nz_m_s2,x_furlong\n1,2\n");
    let (_, loc, reason) = parse_err(read_series(&p, &opts()));
    assert_eq!(loc, "line 2, column 2 (header)");
    assert!(
        reason.contains("furlong") && reason.contains("m_s2 (m/s^2)") && reason.contains("um (um)"),
        "{reason}"
    );
    // Non-numeric and NaN cells.
    let p = write("nonnum", "x.csv", "# fs_hz=10\nz_m_s2,x_m_s2\n1,2\n3,abc\n");
    let (_, loc, reason) = parse_err(read_series(&p, &opts()));
    assert_eq!(loc, "line 4, column 2");
    assert!(reason.contains("'abc' is not a number"), "{reason}");
    let p = write("nan", "x.txt", "# fs_hz=10\nz_m_s2 x_m_s2\n1 2\n\n NaN 3\n");
    let (_, loc, reason) = parse_err(read_series(&p, &opts()));
    assert_eq!(loc, "line 5, column 1");
    assert!(reason.contains("not a finite number"), "{reason}");
    let p = write("empty_cell", "x.csv", "# fs_hz=10\nz_m_s2,x_m_s2\n1,\n");
    let (_, loc, reason) = parse_err(read_series(&p, &opts()));
    assert_eq!((loc.as_str(), reason.as_str()), ("line 3, column 2", "empty cell"));
    // Wrong column count.
    let p = write("cols", "x.csv", "# fs_hz=10\nz_m_s2,x_m_s2\n1,2\n1,2,3\n");
    let (_, loc, reason) = parse_err(read_series(&p, &opts()));
    assert_eq!(loc, "line 4");
    assert!(reason.contains("expected 2 columns") && reason.contains("found 3"), "{reason}");
    // Non-monotonic time names both lines.
    let p = write("mono", "x.csv", "time_s,z_m_s2\n0.0,1\n0.1,1\n# c\n0.05,1\n");
    let (_, loc, reason) = parse_err(read_series(&p, &opts()));
    assert_eq!(loc, "line 5");
    assert!(reason.contains("not after") && reason.contains("(line 3)"), "{reason}");
    // No sample rate and no time column.
    let p = write("nofs", "x.csv", "z_m_s2\n1\n");
    let (_, loc, reason) = parse_err(read_series(&p, &opts()));
    assert_eq!(loc, "line 1 (header)");
    assert!(reason.contains("fs_hz"), "{reason}");
    // Bad fs_hz comment.
    let p = write("badfs", "x.csv", "# fs_hz=fast\nz_m_s2\n1\n");
    let (_, loc, _) = parse_err(read_series(&p, &opts()));
    assert_eq!(loc, "line 1");
    // Mixed quantities, too many axes, duplicate names.
    for (name, text, needle) in [
        ("mixed", "# fs_hz=1\nz_m_s2,x_mm_s\n1,2\n", "one quantity"),
        ("many", "# fs_hz=1\na_m,b_m,c_m,d_m\n1,2,3,4\n", "at most 3"),
        ("dup", "# fs_hz=1\nz_m,Z_m\n1,2\n", "duplicate"),
        ("noaxis", "t\n1\n", "no axis column"),
    ] {
        let p = write(name, "x.csv", text);
        let (_, _, reason) = parse_err(read_series(&p, &opts()));
        assert!(reason.contains(needle), "{name}: {reason}");
    }
}

/// Read a file in chunks of `n` frames and concatenate per axis.
fn read_chunked(p: &std::path::Path, o: &SeriesOptions, n: usize) -> Vec<Vec<f64>> {
    let mut r = SeriesReader::open(p, o).unwrap();
    let mut axes = vec![Vec::new(); r.header().n_axes];
    let mut c = SeriesChunk::new();
    loop {
        let k = r.next_chunk(n, &mut c).unwrap();
        if k == 0 {
            break;
        }
        assert!(k <= n);
        assert_eq!(c.n_frames(), k);
        for (a, dst) in axes.iter_mut().enumerate() {
            dst.extend_from_slice(c.axis(a).unwrap());
        }
    }
    axes
}

#[test]
fn streamed_chunks_concatenate_to_the_one_shot_read() {
    let mut text = String::from("# fs_hz=250\nz_mm_s,e_mm_s\n");
    for i in 0..1000 {
        text.push_str(&format!("{},{}\n", (i as f64 * 0.37).sin(), i % 17));
    }
    let p = write("stream", "s.csv", &text);
    let whole = read_series(&p, &opts()).unwrap();
    assert_eq!(whole.n_frames(), 1000);
    for n in [1, 7, 999, 1000, 5000] {
        let axes = read_chunked(&p, &opts(), n);
        assert_eq!(axes[0], whole.axis(0).unwrap(), "chunk {n}");
        assert_eq!(axes[1], whole.axis(1).unwrap(), "chunk {n}");
    }
    // Timestamped (resampled) files stream identically too.
    let mut text = String::from("time_s,z_m_s2\n");
    for i in 0..500 {
        let t = i as f64 * 0.01 + if i % 3 == 0 { 0.0004 } else { 0.0 };
        text.push_str(&format!("{t},{}\n", (t * 7.0).cos()));
    }
    let p = write("stream_t", "s.csv", &text);
    let whole = read_series(&p, &opts()).unwrap();
    assert!(whole.report.resampled);
    for n in [1, 3, 64, 500] {
        assert_eq!(read_chunked(&p, &opts(), n)[0], whole.axis(0).unwrap(), "chunk {n}");
    }
}

/// Times with a deterministic jitter pattern: t_i = i·dt + dt·j(i).
fn jittered_times(n: usize, dt: f64, amp: f64) -> Vec<f64> {
    (0..n).map(|i| i as f64 * dt + dt * amp * [0.0, 0.6, -0.3, 0.9, -1.0, 0.2][i % 6]).collect()
}

#[test]
fn timestamp_jitter_is_measured_and_small_jitter_is_resampled() {
    let (n, dt) = (600, 0.005);
    let t = jittered_times(n, dt, 0.04); // up to ±4 % of dt offsets → intervals deviate up to ~7.6 %
    // A signal linear in time: linear interpolation must reproduce it exactly (to rounding).
    let f = |t: f64| 0.02 + 0.5 * t;
    let mut text = String::from("# from a phone log\nt,z_m_s2\n");
    for &ti in &t {
        text.push_str(&format!("{ti:.9},{:.12}\n", f(ti)));
    }
    let p = write("jitter", "phone.csv", &text);
    let s = read_series(&p, &opts()).unwrap();
    // Independent recomputation of the statistics from the same printed times.
    let tp: Vec<f64> = t.iter().map(|x| format!("{x:.9}").parse().unwrap()).collect();
    let d: Vec<f64> = tp.windows(2).map(|w| w[1] - w[0]).collect();
    let mean = (tp[n - 1] - tp[0]) / (n - 1) as f64;
    let mut sorted = d.clone();
    sorted.sort_by(f64::total_cmp);
    let median = 0.5 * (sorted[(d.len() - 1) / 2] + sorted[d.len() / 2]);
    let dm = d.iter().sum::<f64>() / d.len() as f64;
    let std = (d.iter().map(|x| (x - dm).powi(2)).sum::<f64>() / d.len() as f64).sqrt();
    let jmax = d.iter().map(|x| (x - median).abs()).fold(0.0, f64::max);
    let r = &s.report;
    assert_eq!(r.source, TimingSource::TimeColumn);
    assert_eq!(r.n_input_frames, n);
    assert!((r.fs_hz_mean - 1.0 / mean).abs() < 1e-9 * r.fs_hz_mean);
    assert!((r.median_interval_s - median).abs() < 1e-9, "{} vs {median}", r.median_interval_s);
    assert!((r.jitter_std_s - std).abs() < 1e-9, "{} vs {std}", r.jitter_std_s);
    assert!((r.jitter_max_s - jmax).abs() < 2e-9, "{} vs {jmax}", r.jitter_max_s);
    assert!((r.jitter_max_fraction - jmax / median).abs() < 1e-6);
    assert!(r.jitter_max_fraction > 0.05 && r.jitter_max_fraction < 0.10, "{}", r.jitter_max_fraction);
    assert_eq!(r.n_gaps, 0);
    assert!(r.resampled);
    assert_eq!(s.fs_hz, r.fs_hz_mean);
    assert_eq!(s.n_frames(), n);
    for (k, v) in s.axis(0).unwrap().iter().enumerate() {
        let tk = tp[0] + k as f64 * mean;
        assert!((v - f(tk)).abs() < 1e-10, "frame {k}: {v} vs {}", f(tk));
    }
    // A stated rate that disagrees with the time column by > 1 % is refused.
    assert!(matches!(read_series(&p, &opts().with_fs_hz(150.0)), Err(Error::InvalidArgument { .. })));
    assert!(read_series(&p, &opts().with_fs_hz(200.5)).is_ok());
}

#[test]
fn large_jitter_and_gaps_are_refused_with_the_numbers() {
    let t = jittered_times(300, 0.01, 0.15); // intervals deviate up to ~28 % of the median
    let mut text = String::from("time_s,z_um\n");
    for &ti in &t {
        text.push_str(&format!("{ti:.6},1\n"));
    }
    let p = write("jit_big", "j.csv", &text);
    match read_series(&p, &opts()) {
        Err(Error::InvalidArgument { name, reason }) => {
            assert!(name.contains("j.csv"), "{name}");
            assert!(reason.contains("max deviation") && reason.contains("limit 10.00 %"), "{reason}");
        }
        other => panic!("{other:?}"),
    }
    // The threshold is an option.
    assert!(read_series(&p, &opts().with_max_jitter_fraction(0.5)).is_ok());

    // Regular 100 Hz with two dropouts: 0.05 s after t = 1.00 s and 0.1 s after t = 2.00 s.
    let mut times: Vec<f64> = (0..=100).map(|i| i as f64 * 0.01).collect();
    times.extend((0..=95).map(|i| 1.05 + i as f64 * 0.01));
    times.extend((0..=50).map(|i| 2.1 + i as f64 * 0.01));
    let mut text = String::from("t z_mm\n");
    for ti in &times {
        text.push_str(&format!("{ti:.4} 0\n"));
    }
    let p = write("gaps", "g.txt", &text);
    let r = inspect_timing(&p, &opts()).unwrap();
    assert_eq!(r.n_gaps, 2);
    assert!((r.median_interval_s - 0.01).abs() < 1e-9);
    assert!(
        (r.gaps[0].time_s - 1.0).abs() < 1e-9 && (r.gaps[0].length_s - 0.05).abs() < 1e-9,
        "{:?}",
        r.gaps
    );
    assert!((r.gaps[1].time_s - 2.0).abs() < 1e-9 && (r.gaps[1].length_s - 0.1).abs() < 1e-9, "{:?}", r.gaps);
    assert!(!r.is_acceptable());
    match read_series(&p, &opts().with_max_jitter_fraction(0.99)) {
        Err(Error::InvalidArgument { reason, .. }) => {
            assert!(reason.contains("2 gap(s)") && reason.contains("gap at t = 1 s"), "{reason}");
        }
        other => panic!("{other:?}"),
    }
}

#[test]
fn read_series_limit_points_to_the_streaming_reader() {
    let mut text = String::from("# fs_hz=10\nz_m,x_m\n");
    for i in 0..100 {
        text.push_str(&format!("{i},{i}\n"));
    }
    let p = write("limit", "l.csv", &text);
    match read_series(&p, &opts().with_max_samples(150)) {
        Err(Error::TooLarge { what, value, limit }) => {
            assert!(what.contains("SeriesReader"), "{what}");
            assert_eq!(limit, 150);
            assert!(value > 150);
        }
        other => panic!("{other:?}"),
    }
    assert_eq!(read_series(&p, &opts().with_max_samples(200)).unwrap().n_frames(), 100);
}

#[test]
fn options_are_validated() {
    let p = write("optv", "o.csv", "z_m\n1\n");
    assert!(matches!(read_series(&p, &opts().with_fs_hz(-1.0)), Err(Error::InvalidArgument { .. })));
    assert!(matches!(read_series(&p, &opts().with_fs_hz(f64::NAN)), Err(Error::InvalidArgument { .. })));
    assert!(matches!(
        read_series(&p, &opts().with_max_jitter_fraction(0.0)),
        Err(Error::InvalidArgument { .. })
    ));
    let mut r = SeriesReader::open(&p, &opts().with_fs_hz(1.0)).unwrap();
    assert!(matches!(r.next_chunk(0, &mut SeriesChunk::new()), Err(Error::InvalidArgument { .. })));
}

#[test]
fn in_memory_text_reads_like_the_same_file() {
    // Regular and timestamped (resampled) recordings, CSV and whitespace: same samples, header
    // and timing as the file reader; errors name the label and line.
    let cases = [
        ("a.csv", "# fs_hz=50\nz_mm_s,x_um_s\n1,2\n3,4\n5,6\n"),
        ("b.txt", "# start_time=2024-05-01T21:00:00Z\ntime_s z_m_s2\n0.0 1\n0.1 2\n0.2 3\n0.31 4\n0.4 5\n"),
    ];
    for (file, text) in cases {
        let p = write("in_memory", file, text);
        let from_file = read_series(&p, &opts()).unwrap();
        let from_text = read_series_text(text, &p.display().to_string(), &opts()).unwrap();
        assert_eq!(from_file, from_text, "{file}");
    }
    let (file, location, reason) = parse_err(read_series_text("# fs_hz=10\nz_g\n1\nx\n", "mem.csv", &opts()));
    assert_eq!((file.as_str(), location.as_str()), ("mem.csv", "line 4, column 1"), "{reason}");
    let e = SeriesReader::from_text("z_g\n1\n", "m", &opts().with_format(SeriesFormat::Wav)).err().unwrap();
    assert!(matches!(e, Error::InvalidArgument { .. }), "{e}");
}

#[test]
fn image_tracks_in_px_and_arcsec_share_arcsec() {
    // A centroid track: px columns become arcsec with the plate scale (exact here: 0.5 is a
    // power of two), arcsec columns stay; without a plate scale a px column is refused by name.
    let p = write("track", "track.csv", "# fs_hz=30\nx_px,y_arcsec\n2,1.5\n-1,0.25\n");
    let s = read_series(&p, &opts().with_plate_scale(0.5)).unwrap();
    assert_eq!(s.quantity, SeriesQuantity::ImageAngle);
    assert_eq!(s.quantity.si_unit(), "arcsec");
    assert_eq!(s.axis(0).unwrap(), [1.0, -0.5]);
    assert_eq!(s.axis(1).unwrap(), [1.5, 0.25]);
    let e = read_series(&p, &opts()).unwrap_err();
    assert!(
        matches!(&e, Error::InvalidArgument { name, reason }
        if name == "plate_scale_arcsec_per_px" && reason.contains("track.csv")),
        "{e}"
    );
    // Mixing an image column with ground motion is one file, two quantities: refused.
    let p = write("mixed", "m.csv", "# fs_hz=30\nx_px,z_m_s2\n1,2\n");
    let (_, loc, reason) = parse_err(read_series(&p, &opts().with_plate_scale(0.5)));
    assert!(loc.contains("column 2") && reason.contains("one quantity"), "{loc} {reason}");
}

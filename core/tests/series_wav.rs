//! WAV recordings: written with hound here (and once by Python's standard `wave` module, see
//! tests/data/make_wav_reference.py), read back scaled by the full-scale value.

use std::path::{Path, PathBuf};

use stillsky::Error;
use stillsky::io::series::*;

fn dir(name: &str) -> PathBuf {
    let d = PathBuf::from(env!("CARGO_TARGET_TMPDIR")).join("series_wav").join(name);
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn write_int(p: &Path, channels: u16, bits: u16, fs: u32, frames: &[Vec<i32>]) {
    let spec = hound::WavSpec {
        channels,
        sample_rate: fs,
        bits_per_sample: bits,
        sample_format: hound::SampleFormat::Int,
    };
    let mut w = hound::WavWriter::create(p, spec).unwrap();
    for f in frames {
        for &s in f {
            w.write_sample(s).unwrap();
        }
    }
    w.finalize().unwrap();
}

fn full_scale(v: f64, u: Unit) -> SeriesOptions {
    SeriesOptions::default().with_wav_full_scale(PhysicalValue::new(v, u))
}

#[test]
fn int16_stereo_scales_to_full_scale_in_si() {
    let p = dir("i16").join("rec.wav");
    let frames: Vec<Vec<i32>> = vec![vec![16384, -32768], vec![0, 8192], vec![-16384, 32767]];
    write_int(&p, 2, 16, 400, &frames);
    // Full scale 2 g: 16384 / 32768 = 0.5 → 1 g = 9.80665 m/s² exactly (powers of two scale exactly).
    let s = read_series(&p, &full_scale(2.0, Unit::StandardGravity)).unwrap();
    assert_eq!((s.n_axes, s.fs_hz, s.quantity), (2, 400.0, SeriesQuantity::Acceleration));
    assert_eq!(s.axis_names, ["ch1", "ch2"]);
    assert_eq!(s.axis(0).unwrap(), [9.80665, 0.0, -9.80665]);
    assert_eq!(s.axis(1).unwrap(), [-2.0 * 9.80665, 0.25 * 2.0 * 9.80665, 32767.0 / 32768.0 * 2.0 * 9.80665]);
    // Velocity full scale in mm/s.
    let s = read_series(&p, &full_scale(10.0, Unit::MillimetrePerSecond)).unwrap();
    assert_eq!(s.quantity, SeriesQuantity::Velocity);
    assert_eq!(s.axis(0).unwrap()[0], 0.005);
}

#[test]
fn int24_and_float32_and_streaming() {
    let d = dir("i24");
    let p = d.join("r24.wav");
    let frames: Vec<Vec<i32>> = (0..1001).map(|i| vec![(i * 8191) % 8_388_607 - 4_000_000]).collect();
    write_int(&p, 1, 24, 1000, &frames);
    let s = read_series(&p, &full_scale(1.0, Unit::MetrePerSecondSquared)).unwrap();
    for (v, f) in s.axis(0).unwrap().iter().zip(&frames) {
        assert_eq!(*v, f64::from(f[0]) / 8_388_608.0);
    }
    // Chunks concatenate to the one-shot read.
    let mut r = SeriesReader::open(&p, &full_scale(1.0, Unit::MetrePerSecondSquared)).unwrap();
    assert_eq!(r.header().n_frames, Some(1001));
    let (mut all, mut c) = (Vec::new(), SeriesChunk::new());
    while r.next_chunk(64, &mut c).unwrap() > 0 {
        all.extend_from_slice(c.axis(0).unwrap());
    }
    assert_eq!(all, s.axis(0).unwrap());

    let pf = d.join("f32.wav");
    let spec = hound::WavSpec {
        channels: 3,
        sample_rate: 200,
        bits_per_sample: 32,
        sample_format: hound::SampleFormat::Float,
    };
    let mut w = hound::WavWriter::create(&pf, spec).unwrap();
    for v in [0.5f32, -0.25, 1.0, 0.125, 0.0, -1.0] {
        w.write_sample(v).unwrap();
    }
    w.finalize().unwrap();
    let s = read_series(&pf, &full_scale(3.0, Unit::Micrometre)).unwrap();
    assert_eq!(s.quantity, SeriesQuantity::Displacement);
    assert_eq!(s.axis(0).unwrap(), [1.5e-6, 0.375e-6]);
    assert_eq!(s.axis(2).unwrap(), [3e-6, -3e-6]);
}

#[test]
fn wav_errors_are_named() {
    let d = dir("err");
    let p = d.join("a.wav");
    write_int(&p, 1, 16, 100, &[vec![1]]);
    match read_series(&p, &SeriesOptions::default()) {
        Err(Error::InvalidArgument { name, reason }) => {
            assert_eq!(name, "wav_full_scale");
            assert!(reason.contains("a.wav") && reason.contains("no physical unit"), "{reason}");
        }
        other => panic!("{other:?}"),
    }
    let p4 = d.join("four.wav");
    write_int(&p4, 4, 16, 100, &[vec![1, 2, 3, 4]]);
    match read_series(&p4, &full_scale(1.0, Unit::StandardGravity)) {
        Err(Error::Parse { file, reason, .. }) => {
            assert!(file.ends_with("four.wav") && reason.contains("4 channels"))
        }
        other => panic!("{other:?}"),
    }
    let pn = d.join("nan.wav");
    let spec = hound::WavSpec {
        channels: 1,
        sample_rate: 100,
        bits_per_sample: 32,
        sample_format: hound::SampleFormat::Float,
    };
    let mut w = hound::WavWriter::create(&pn, spec).unwrap();
    for v in [0.0f32, 0.1, f32::NAN] {
        w.write_sample(v).unwrap();
    }
    w.finalize().unwrap();
    match read_series(&pn, &full_scale(1.0, Unit::StandardGravity)) {
        Err(Error::Parse { location, .. }) => assert_eq!(location, "frame 2, channel 1"),
        other => panic!("{other:?}"),
    }
    let bad = d.join("junk.wav");
    std::fs::write(&bad, b"RIFF not really a wav").unwrap();
    assert!(matches!(read_series(&bad, &full_scale(1.0, Unit::StandardGravity)), Err(Error::Parse { .. })));
    assert!(matches!(
        read_series(d.join("none.wav"), &full_scale(1.0, Unit::StandardGravity)),
        Err(Error::Io { .. })
    ));
}

#[test]
fn wav_written_by_python_wave_module_matches_its_reference() {
    // Independent writer: Python's standard-library `wave` (tests/data/make_wav_reference.py).
    let data = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/data");
    let s = read_series(data.join("wav_stdlib_16bit_3ch.wav"), &full_scale(1.0, Unit::MetrePerSecondSquared))
        .unwrap();
    let reference = std::fs::read_to_string(data.join("wav_stdlib_16bit_3ch.csv")).unwrap();
    let rows: Vec<Vec<f64>> =
        reference.lines().skip(1).map(|l| l.split(',').map(|v| v.parse().unwrap()).collect()).collect();
    assert_eq!((s.n_frames(), s.n_axes, s.fs_hz), (rows.len(), 3, 500.0));
    for a in 0..3 {
        let got = s.axis(a).unwrap();
        for (k, row) in rows.iter().enumerate() {
            // counts / 32768 is exact in binary floating point on both sides.
            assert_eq!(got[k], row[3 + a], "axis {a}, frame {k}");
        }
    }
}

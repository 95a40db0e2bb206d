//! miniSEED decoding checked against ObsPy 1.5.1 (libmseed) on ObsPy's own example recordings
//! (tests/data/mseed, see the README there; references made by make_mseed_reference.py).

use std::path::{Path, PathBuf};

use stillsky::Error;
use stillsky::io::series::*;

fn data(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/data/mseed").join(name)
}

fn tmp(name: &str) -> PathBuf {
    let d = PathBuf::from(env!("CARGO_TARGET_TMPDIR")).join("series_mseed");
    std::fs::create_dir_all(&d).unwrap();
    d.join(name)
}

struct Reference {
    id: String,
    starttime: String,
    fs: f64,
    values: Vec<f64>,
}

fn reference(file: &str) -> Reference {
    let text = std::fs::read_to_string(data(&format!("{file}.obspy.csv"))).unwrap();
    let meta = |k: &str| {
        text.lines()
            .find_map(|l| l.strip_prefix(&format!("# {k}=")))
            .unwrap_or_else(|| panic!("{k}"))
            .to_string()
    };
    let values = text.lines().filter(|l| !l.starts_with('#')).skip(1).map(|l| l.parse().unwrap()).collect();
    Reference {
        id: meta("id"),
        starttime: meta("starttime"),
        fs: meta("sampling_rate").parse().unwrap(),
        values,
    }
}

fn check_against_obspy(file: &str) -> Series {
    let r = reference(file);
    let s = read_series(data(file), &SeriesOptions::default()).unwrap();
    assert_eq!(s.n_axes, 1);
    assert_eq!(s.axis_names.as_slice(), std::slice::from_ref(&r.id), "{file}");
    assert_eq!(s.fs_hz, r.fs, "{file}");
    assert_eq!(s.start_time.as_deref(), Some(r.starttime.as_str()), "{file}");
    assert_eq!(s.quantity, SeriesQuantity::Counts);
    assert_eq!(s.n_frames(), r.values.len(), "{file}");
    // Integers and floats (float32 widened to f64) are decoded exactly: compare bit for bit.
    for (k, (a, b)) in s.axis(0).unwrap().iter().zip(&r.values).enumerate() {
        assert_eq!(a, b, "{file}: sample {k}");
    }
    s
}

#[test]
fn steim1_multi_record_recording_matches_obspy() {
    // 10 records of 512 bytes, Steim-1, big-endian; 4120 samples at 200 Hz.
    let s = check_against_obspy("BW.BGLD..EHE.steim1.10rec.mseed");
    assert_eq!(s.n_frames(), 4120);
    assert_eq!(s.report.source, TimingSource::Records);
    assert_eq!(s.report.n_gaps, 0);
}

#[test]
fn steim2_recording_matches_obspy() {
    check_against_obspy("NL.HGN.00.BHZ.steim2.mseed");
}

#[test]
fn every_supported_encoding_in_both_byte_orders_matches_obspy() {
    for enc in
        ["int16_INT16", "int32_INT32", "float32_Float32", "float64_Float64", "int32_Steim1", "int32_Steim2"]
    {
        for order in ["big", "little"] {
            check_against_obspy(&format!("enc_{enc}_{order}.mseed"));
        }
    }
}

#[test]
fn streaming_across_record_boundaries_equals_one_shot() {
    let p = data("BW.BGLD..EHE.steim1.10rec.mseed");
    let whole = read_series(&p, &SeriesOptions::default()).unwrap();
    for n in [1, 100, 411, 412, 5000] {
        let mut r = SeriesReader::open(&p, &SeriesOptions::default()).unwrap();
        assert_eq!(r.header().n_frames, Some(4120));
        let (mut all, mut c) = (Vec::new(), SeriesChunk::new());
        while r.next_chunk(n, &mut c).unwrap() > 0 {
            all.extend_from_slice(c.axis(0).unwrap());
        }
        assert_eq!(all, whole.axis(0).unwrap(), "chunk {n}");
    }
}

#[test]
fn sensitivity_converts_counts_to_si() {
    let p = data("BW.BGLD..EHE.steim1.10rec.mseed");
    let counts = read_series(&p, &SeriesOptions::default()).unwrap();
    // 500 counts per µm/s (an invented sensitivity): v = counts / 500 µm/s = counts / 500 / 1e6 m/s.
    let o = SeriesOptions::default().with_sensitivity(Sensitivity::new(500.0, Unit::MicrometrePerSecond));
    let s = read_series(&p, &o).unwrap();
    assert_eq!(s.quantity, SeriesQuantity::Velocity);
    for (v, c) in s.axis(0).unwrap().iter().zip(counts.axis(0).unwrap()) {
        assert_eq!(*v, c / 500.0 / 1e6);
    }
}

#[test]
fn gap_between_records_is_reported_like_obspy_and_refused() {
    // Records 1, 2 and 4 (512 bytes each): the third record is missing.
    let raw = std::fs::read(data("BW.BGLD..EHE.steim1.10rec.mseed")).unwrap();
    let p = tmp("spliced.mseed");
    std::fs::write(&p, [&raw[0..1024], &raw[1536..2048]].concat()).unwrap();
    let gap_ref = std::fs::read_to_string(data("gap_reference.csv")).unwrap();
    let row: Vec<f64> = gap_ref.lines().nth(2).unwrap().split(',').map(|v| v.parse().unwrap()).collect();
    let r = inspect_timing(&p, &SeriesOptions::default()).unwrap();
    assert_eq!(r.n_gaps, 1);
    assert_eq!(r.n_input_frames as f64, row[3]);
    // ObsPy keeps times as integer ns, we as integer µs; compare to 1 µs.
    assert!((r.gaps[0].time_s - row[0]).abs() < 1e-6, "{} vs {}", r.gaps[0].time_s, row[0]);
    assert!((r.gaps[0].length_s - (row[1] - row[0])).abs() < 1e-6, "{} vs {:?}", r.gaps[0].length_s, row);
    // ObsPy's delta is the span without data: the interval less one sample period (1/200 s).
    assert!((r.gaps[0].length_s - 1.0 / 200.0 - row[2]).abs() < 1e-6, "{} vs {}", r.gaps[0].length_s, row[2]);
    match read_series(&p, &SeriesOptions::default()) {
        Err(Error::InvalidArgument { name, reason }) => {
            assert!(name.contains("spliced.mseed") && reason.contains("1 gap(s)"), "{name}: {reason}");
        }
        other => panic!("{other:?}"),
    }
}

#[test]
fn channels_on_one_clock_are_read_side_by_side_or_chosen_by_name() {
    let p = data("two_channels.mseed");
    let z = read_series(&p, &SeriesOptions::default().with_channel("EHZ")).unwrap();
    let e = read_series(&p, &SeriesOptions::default().with_channel("BW.UH3..EHE")).unwrap();
    assert_eq!((z.axis_names[0].as_str(), e.axis_names[0].as_str()), ("BW.UH3..EHZ", "BW.UH3..EHE"));
    assert_eq!((z.n_frames(), e.n_frames()), (386, 386)); // ObsPy: 386 samples each
    // ObsPy decodes the same samples for both channels of this file; so do we.
    assert_eq!(z.samples, e.samples);
    assert_eq!(z.start_time.as_deref(), Some("2010-06-20T00:00:00.279999Z")); // ObsPy's starttime
    assert!(matches!(
        read_series(&p, &SeriesOptions::default().with_channel("HHN")),
        Err(Error::UnknownName { .. })
    ));
    // Without a choice both channels (same rate, same start) are read, one axis each, in the
    // file's order, each equal to the channel read alone; streamed in odd chunks the same.
    let both = read_series(&p, &SeriesOptions::default()).unwrap();
    assert_eq!(both.axis_names, ["BW.UH3..EHE", "BW.UH3..EHZ"]);
    assert_eq!((both.n_axes, both.n_frames()), (2, 386));
    assert_eq!(both.axis(0).unwrap(), e.axis(0).unwrap());
    assert_eq!(both.axis(1).unwrap(), z.axis(0).unwrap());
    assert_eq!(both.axis_by_name("ehz"), both.axis_by_name("BW.UH3..EHZ"));
    assert_eq!(both.axis_by_name("EHE"), e.axis(0));
    assert_eq!(both.axis_by_name("EHN"), None);
    let mut r = SeriesReader::open(&p, &SeriesOptions::default()).unwrap();
    let (mut chunk, mut got) = (SeriesChunk::new(), [Vec::new(), Vec::new()]);
    while r.next_chunk(37, &mut chunk).unwrap() > 0 {
        (0..2).for_each(|k| got[k].extend_from_slice(chunk.axis(k).unwrap()));
    }
    assert_eq!((got[0].as_slice(), got[1].as_slice()), (e.axis(0).unwrap(), z.axis(0).unwrap()));
    // The second channel's record one second later: not on one clock, so a choice is asked for.
    let mut raw = std::fs::read(&p).unwrap();
    raw[512 + 26] = 1; // BTIME seconds of the EHZ record (SEED 2.4, fixed header field 8)
    let shifted = tmp("two_channels_shifted.mseed");
    std::fs::write(&shifted, &raw).unwrap();
    match read_series(&shifted, &SeriesOptions::default()) {
        Err(Error::InvalidArgument { reason, .. }) => {
            assert!(reason.contains("start 1 s apart") && reason.contains("choose one"), "{reason}")
        }
        other => panic!("{other:?}"),
    }
    assert_eq!(
        read_series(&shifted, &SeriesOptions::default().with_channel("EHZ")).unwrap().samples,
        z.samples
    );
}

#[test]
fn malformed_files_are_named_errors() {
    let raw = std::fs::read(data("BW.BGLD..EHE.steim1.10rec.mseed")).unwrap();
    let p = tmp("truncated.mseed");
    std::fs::write(&p, &raw[..1300]).unwrap();
    match read_series(&p, &SeriesOptions::default()) {
        Err(Error::Parse { location, reason, .. }) => {
            assert_eq!(location, "record at byte 1024");
            assert!(reason.contains("truncated"), "{reason}");
        }
        other => panic!("{other:?}"),
    }
    let p = tmp("text.mseed");
    std::fs::write(&p, "z_m_s2\n1\n".repeat(20)).unwrap();
    assert!(matches!(read_series(&p, &SeriesOptions::default()), Err(Error::Parse { .. })));
    // A corrupted Steim frame fails the integrity check instead of returning wrong samples.
    let mut bad = raw[..512].to_vec();
    bad[64 + 8] ^= 0x55; // reverse integration constant of frame 0
    let p = tmp("corrupt.mseed");
    std::fs::write(&p, &bad).unwrap();
    match read_series(&p, &SeriesOptions::default()) {
        Err(Error::Parse { reason, .. }) => assert!(reason.contains("integrity"), "{reason}"),
        other => panic!("{other:?}"),
    }
    let p = tmp("empty.mseed");
    std::fs::write(&p, b"").unwrap();
    assert!(matches!(read_series(&p, &SeriesOptions::default()), Err(Error::Parse { .. })));
    // Detection by content when the extension says nothing.
    let p = tmp("noext_record");
    std::fs::write(&p, &raw).unwrap();
    assert_eq!(SeriesFormat::detect(&p).unwrap(), SeriesFormat::MiniSeed);
}

#[test]
fn a_single_channel_drives_the_axis_of_its_orientation_code() {
    use stillsky::FreqGrid;
    use stillsky::batch::GroundSource;
    // SEED channel codes end in their orientation (SEED Reference Manual v2.4, appendix A):
    // ...EHE is east (model x), ...BHZ vertical (z).
    let grid = FreqGrid::log(0.5, 40.0, 50).unwrap();
    let o = SeriesOptions::default().with_sensitivity(Sensitivity::new(500.0, Unit::MicrometrePerSecond));
    let axes = |name: &str| {
        let g = GroundSource::Recording(data(name)).load(&grid, [1.0; 3], &o).unwrap();
        g.axes.iter().map(Option::is_some).collect::<Vec<_>>()
    };
    assert_eq!(axes("BW.BGLD..EHE.steim1.10rec.mseed"), [true, false, false]);
    assert_eq!(axes("NL.HGN.00.BHZ.steim2.mseed"), [false, false, true]);
    // Both channels of a file read side by side, each to its own axis.
    assert_eq!(axes("two_channels.mseed"), [true, false, true]);
    // An orientation off the site's axes (here "1") is refused by name, not taken as vertical.
    let raw = std::fs::read(data("BW.BGLD..EHE.steim1.10rec.mseed")).unwrap();
    let mut renamed = Vec::with_capacity(raw.len());
    let mut i = 0;
    while i < raw.len() {
        if raw[i..].starts_with(b"BGLD   EHE") {
            renamed.extend_from_slice(b"BGLD   EH1");
            i += 10;
        } else {
            renamed.push(raw[i]);
            i += 1;
        }
    }
    let p = tmp("BW.BGLD..EH1.mseed");
    std::fs::write(&p, renamed).unwrap();
    let e = GroundSource::Recording(p).load(&grid, [1.0; 3], &o).unwrap_err();
    assert!(e.to_string().contains("orientation code '1'"), "{e}");
}

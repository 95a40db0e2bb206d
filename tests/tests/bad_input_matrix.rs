//! The Rust column of docs/errors.md: one test per row (the test name is the row id), each
//! asserting the `stillsky::Error` variant and that the message names the culprit. The same
//! ids name the Python tests (bindings-py/tests/test_bad_input_matrix.py) and the C cases
//! (bindings-c/tests/c/errors_matrix.c); `every_row_is_linked_in_all_three_surfaces` below
//! keeps the document and the three files in step.

use std::path::{Path, PathBuf};
use stillsky::assembly::MAX_DOFS;
use stillsky::grid::MAX_GRID_LEN;
use stillsky::identify::{CardOptions, TrackUnit, image_track_card};
use stillsky::io::series::{SeriesOptions, read_series, read_series_text};
use stillsky::model::Model;
use stillsky::monitor::image_motion_from_ground_acceleration;
use stillsky::sensor_response::SensorResponse;
use stillsky::spectrum::welch::{WelchConfig, WelchStream};
use stillsky::spectrum::{Extrapolate, Psd, Quantity};
use stillsky::{Complex64, Error, FreqGrid};

fn sdof(extra: &str, k: &str) -> String {
    format!("{extra}\n{}", stillsky_tests::fixtures::sdof_toml(1.0, k))
}

const K: &str = "stiffness_n_per_m = 4e5\nloss_factor = 0.05";
const OPTICS: &str =
    "[optics]\nbody = \"mass\"\nfocal_length_mm = 1000\npixel_um = 4\naltitude_deg = 45\nazimuth_deg = 0";

fn model() -> Model {
    Model::from_toml_str(&sdof("", K), "good.toml").unwrap()
}

fn tmp(name: &str, bytes: &[u8]) -> PathBuf {
    let d = PathBuf::from(env!("CARGO_TARGET_TMPDIR")).join("bad_input_matrix");
    std::fs::create_dir_all(&d).unwrap();
    let p = d.join(name);
    std::fs::write(&p, bytes).unwrap();
    p
}

fn msg_has(e: &Error, needles: &[&str]) {
    let m = e.to_string();
    for n in needles {
        assert!(m.contains(n), "message '{m}' does not name '{n}'");
    }
}

#[test]
fn file_missing() {
    let e = Model::from_toml_path(Path::new("/nonexistent/rig.toml")).unwrap_err();
    assert!(matches!(e, Error::Io { .. }), "{e:?}");
    msg_has(&e, &["/nonexistent/rig.toml"]);
}

#[test]
fn file_not_utf8() {
    let p = tmp("latin1.toml", b"title = \"caf\xe9\"\n");
    let e = Model::from_toml_path(&p).unwrap_err();
    assert!(matches!(e, Error::Io { .. }), "{e:?}");
    msg_has(&e, &["latin1.toml", "UTF-8"]);
}

#[test]
fn model_syntax() {
    let e = Model::from_toml_str("[[body]\nname = 1\n", "rig.toml").unwrap_err();
    assert!(matches!(&e, Error::Parse { location, .. } if location.starts_with("line 1")), "{e:?}");
    msg_has(&e, &["rig.toml"]);
}

#[test]
fn model_unknown_key() {
    let text = sdof("", K) + "stifness = 3\n";
    let e = Model::from_toml_str(&text, "typo.toml").unwrap_err();
    let line = text.lines().count();
    assert!(
        matches!(&e, Error::Parse { location, .. } if location.starts_with(&format!("line {line}"))),
        "{e:?}"
    );
    msg_has(&e, &["stifness", "typo.toml"]);
}

#[test]
fn model_bad_value() {
    let e = Model::from_toml_str(&sdof("", "stiffness_n_per_m = -5"), "m").unwrap_err();
    assert!(matches!(e, Error::InvalidArgument { .. }), "{e:?}");
    msg_has(&e, &["support", "-5"]);
}

#[test]
fn model_unknown_carrier() {
    let e = Model::from_toml_str(&sdof("", K).replace("to = \"mass\"", "to = \"mas\""), "m").unwrap_err();
    assert!(matches!(e, Error::UnknownName { .. }), "{e:?}");
    msg_has(&e, &["mas", "mass"]);
}

#[test]
fn model_free_body() {
    let text = "[[node]]\nname = \"floating\"\nmass_kg = 1\nat_m = [0, 0, 0]\ndofs = [\"z\"]\n";
    let e = Model::from_toml_str(text, "m").unwrap_err();
    assert!(matches!(e, Error::UnsupportedModel { .. }), "{e:?}");
    msg_has(&e, &["floating"]);
}

/// A model file with `n` free 6-DOF bodies (each on one spring; assembly refuses before that).
pub fn many_bodies(n: usize) -> String {
    (0..n)
        .map(|i| {
            format!("[[body]]\nname = \"b{i}\"\nmass_kg = 1\ncg_m = [0, 0, {i}]\ninertia_kgm2 = [1, 1, 1]\n")
        })
        .collect()
}

#[test]
fn model_too_large() {
    // 334 bodies × 6 DOF = 2004 > MAX_DOFS = 2000: refused with both numbers, before any matrix.
    assert_eq!(MAX_DOFS, 2000);
    let e = Model::from_toml_str(&many_bodies(334), "big.toml").unwrap_err();
    assert_eq!(e, Error::TooLarge { what: "free DOFs".into(), value: 2004, limit: 2000 });
    // 333 bodies (1998 DOFs) pass the limit and fail later for the real reason (no support).
    let e = Model::from_toml_str(&many_bodies(333), "big.toml").unwrap_err();
    assert!(matches!(e, Error::UnsupportedModel { .. }), "{e:?}");
}

#[test]
fn grid_unsorted() {
    let e = model().frf(&[2.0, 1.0], &["ground_z"], &["mass:z"]).unwrap_err();
    assert!(matches!(e, Error::InvalidGrid { .. }), "{e:?}");
    msg_has(&e, &["strictly increasing", "index 1"]);
}

#[test]
fn grid_not_finite() {
    let e = model().frf(&[1.0, f64::NAN], &["ground_z"], &["mass:z"]).unwrap_err();
    assert!(matches!(e, Error::InvalidGrid { .. }), "{e:?}");
    msg_has(&e, &["NaN", "index 1"]);
    let e = FreqGrid::new(vec![0.0, 1.0]).unwrap_err();
    assert!(matches!(e, Error::InvalidGrid { .. }), "{e:?}");
}

#[test]
fn grid_empty() {
    let e = model().frf(&[], &["ground_z"], &["mass:z"]).unwrap_err();
    assert!(matches!(e, Error::InvalidGrid { .. }), "{e:?}");
    msg_has(&e, &["empty"]);
}

#[test]
fn grid_too_long() {
    assert_eq!(MAX_GRID_LEN, 1 << 22);
    let n = MAX_GRID_LEN + 1;
    let f: Vec<f64> = (1..=n).map(|i| i as f64).collect();
    let e = model().frf(&f, &["ground_z"], &["mass:z"]).unwrap_err();
    assert_eq!(e, Error::TooLarge { what: "length of freq_hz".into(), value: n, limit: MAX_GRID_LEN });
    let e = FreqGrid::log(1.0, 10.0, n).unwrap_err();
    assert!(matches!(e, Error::TooLarge { value, .. } if value == n), "{e:?}");
}

#[test]
fn name_unknown() {
    let e = model().frf(&[1.0], &["ground_w"], &["mass:z"]).unwrap_err();
    assert!(matches!(e, Error::UnknownName { .. }), "{e:?}");
    msg_has(&e, &["ground_w", "ground_z"]);
}

#[test]
fn singular() {
    // k = (2π)² N/m on 1 kg, undamped: Z(2π·1 Hz) = k − ω²m = 0 exactly at 1 Hz.
    let k = format!("stiffness_n_per_m = {:.17e}", (2.0 * std::f64::consts::PI).powi(2));
    let m = Model::from_toml_str(&sdof("", &k), "m").unwrap();
    let e = m.frf(&[1.0], &["ground_z"], &["mass:z"]).unwrap_err();
    assert!(matches!(e, Error::Singular { freq_hz } if freq_hz == 1.0), "{e:?}");
}

#[test]
fn psd_negative() {
    let e = Psd::new(vec![1.0, 2.0], vec![1.0, -1.0], Quantity::Acceleration).unwrap_err();
    assert!(matches!(e, Error::InvalidArgument { .. }), "{e:?}");
    msg_has(&e, &["-1"]);
    let m = Model::from_toml_str(&sdof(OPTICS, K), "m").unwrap();
    let e = image_motion_from_ground_acceleration(&m, &[1.0, 2.0], [None, None, Some(&[1e-6, -1e-6])], 1.0)
        .unwrap_err();
    assert!(matches!(e, Error::InvalidArgument { .. }), "{e:?}");
    msg_has(&e, &["acc_psd_z"]);
}

#[test]
fn psd_file() {
    let text = "# stillsky psd, quantity=velocity, unit=(m/s)^2/Hz\nfreq_hz,value\n1,2\n2,abc\n";
    let e = Psd::from_csv_str(text, "ground.csv").unwrap_err();
    assert!(matches!(&e, Error::Parse { location, .. } if location == "line 4"), "{e:?}");
    msg_has(&e, &["ground.csv", "abc"]);
}

#[test]
fn psd_extrapolate() {
    let p = Psd::new(vec![1.0, 10.0], vec![1.0, 1.0], Quantity::Acceleration).unwrap();
    let e = p.resample(&FreqGrid::new(vec![0.5, 5.0]).unwrap(), Extrapolate::Error).unwrap_err();
    assert!(matches!(e, Error::OutOfRange { value, .. } if value == 0.5), "{e:?}");
}

#[test]
fn series_bad_cell() {
    let e = read_series_text("# fs_hz=10\nz_g\n1\nx\n", "rec.csv", &SeriesOptions::default()).unwrap_err();
    assert!(matches!(&e, Error::Parse { location, .. } if location == "line 4, column 1"), "{e:?}");
    let p = tmp("rec.csv", b"# fs_hz=10\nz_g\n1\nx\n");
    let e = read_series(&p, &SeriesOptions::default()).unwrap_err();
    msg_has(&e, &["rec.csv", "line 4"]);
}

#[test]
fn series_irregular() {
    let text = "time_s,z_g\n0,1\n0.1,2\n0.5,3\n0.6,4\n0.7,5\n";
    let e = read_series_text(text, "log.csv", &SeriesOptions::default()).unwrap_err();
    assert!(matches!(e, Error::InvalidArgument { .. }), "{e:?}");
    msg_has(&e, &["log.csv", "irregular"]);
}

#[test]
fn series_nan_sample() {
    let mut s = WelchStream::new(100.0, &WelchConfig::new(64), 1).unwrap();
    let e = s.push_axis(0, &[0.0, 1.0, f64::NAN]).unwrap_err();
    assert!(matches!(e, Error::InvalidArgument { .. }), "{e:?}");
    msg_has(&e, &["index 2"]);
    let e = read_series_text("# fs_hz=10\nz_g\n1\nnan\n", "r.csv", &SeriesOptions::default()).unwrap_err();
    assert!(matches!(e, Error::Parse { .. }), "{e:?}");
}

#[test]
fn optics_missing() {
    let e = model().frf(&[1.0], &["ground_z"], &["image_x"]).unwrap_err();
    assert!(matches!(e, Error::InvalidArgument { .. }), "{e:?}");
    msg_has(&e, &["optics"]);
}

#[test]
fn optics_bad_value() {
    let e = Model::from_toml_str(&sdof(&OPTICS.replace("pixel_um = 4", "pixel_um = 0"), K), "m").unwrap_err();
    assert!(matches!(e, Error::InvalidArgument { .. }), "{e:?}");
    msg_has(&e, &["optics.pixel_um", "0"]);
}

#[test]
fn length_mismatch() {
    let e = Psd::new(vec![1.0, 2.0, 3.0], vec![1.0, 1.0], Quantity::Acceleration).unwrap_err();
    assert!(matches!(e, Error::ShapeMismatch { expected: 3, got: 2, .. }), "{e:?}");
}

#[test]
fn buffer_too_small() {
    // The Rust analogue of a short C buffer: an output slice of the wrong length.
    let m = model();
    let plan = stillsky::frf::FrfPlan::new(&m, &["ground_z"], &["mass:z"]).unwrap();
    let mut out = vec![Complex64::default(); 2];
    let grid = stillsky::FreqGrid::new(vec![1.0, 2.0, 3.0]).unwrap();
    let e = plan.evaluate_into(&grid, Some(&mut out), None).unwrap_err();
    assert!(matches!(e, Error::ShapeMismatch { expected: 3, got: 2, .. }), "{e:?}");
}

#[test]
fn track_px_no_plate_scale() {
    // A centroid track in px read without a plate scale (what `tap` refuses) ...
    let text = "# fs_hz=100\ncentroid_px\n0.5\n-0.25\n0.125\n";
    let e = read_series_text(text, "track.csv", &SeriesOptions::default()).unwrap_err();
    assert!(
        matches!(&e, Error::InvalidArgument { name, .. } if name == "plate_scale_arcsec_per_px"),
        "{e:?}"
    );
    msg_has(&e, &["track.csv", "px", "plate scale"]);
    // ... and samples in px handed to the card without one.
    let x: Vec<f64> = (0..512).map(|i| (-(i as f64) / 100.0).exp() * (0.3 * i as f64).sin()).collect();
    let e = image_track_card(&x, TrackUnit::Px, 100.0, &CardOptions::default()).unwrap_err();
    assert!(
        matches!(&e, Error::InvalidArgument { name, .. } if name == "plate_scale_arcsec_per_px"),
        "{e:?}"
    );
    msg_has(&e, &["px", "plate scale"]);
}

#[test]
fn removal_band_outside() {
    // A 4.5 Hz geophone (ζ 0.7, 28.8 V/(m/s)) is valid from about 1.2 Hz up.
    let g = SensorResponse::geophone(4.5, 0.7, 28.8).unwrap();
    let lo = g.valid_band_hz.0;
    let e = g.remove(&[0.0; 256], 200.0, Some((0.5, 50.0))).unwrap_err();
    assert!(matches!(e, Error::OutOfRange { value: 0.5, min, .. } if min == lo), "{e:?}");
    msg_has(&e, &["band low end", "valid band"]);
    let e = g.remove(&[0.0; 256], 200.0, Some((2.0, 150.0))).unwrap_err();
    assert!(matches!(e, Error::OutOfRange { value: 150.0, max: 100.0, .. }), "{e:?}");
    msg_has(&e, &["band high end", "Nyquist"]);
    let e = g.remove_psd(&[0.5, 1.0, 2.0], &[1.0; 3], Some((0.5, 2.0))).unwrap_err();
    assert!(matches!(e, Error::OutOfRange { value: 0.5, .. }), "{e:?}");
}

/// Row ids of docs/errors.md (the first column of the matrix table).
fn doc_rows() -> Vec<String> {
    let doc =
        std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("../docs/errors.md")).unwrap();
    let table = doc.split("<!-- matrix -->").nth(1).expect("docs/errors.md has a <!-- matrix --> table");
    let table = table.split("\n## ").next().unwrap_or(table);
    table
        .lines()
        .filter_map(|l| l.strip_prefix("| `"))
        .filter_map(|l| l.split('`').next())
        .map(String::from)
        .collect()
}

#[test]
fn every_row_is_linked_in_all_three_surfaces() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("..");
    let read = |p: &str| std::fs::read_to_string(root.join(p)).unwrap();
    let (rs, py, c) = (
        read("tests/tests/bad_input_matrix.rs"),
        read("bindings-py/tests/test_bad_input_matrix.py"),
        read("bindings-c/tests/c/errors_matrix.c"),
    );
    let doc = read("docs/errors.md");
    let rows = doc_rows();
    assert!(rows.len() >= 20, "{rows:?}");
    for id in &rows {
        // Each surface has the row's test, or the document says why the surface has none.
        let line = doc.lines().find(|l| l.starts_with(&format!("| `{id}`"))).unwrap();
        let cells: Vec<&str> = line.split('|').map(str::trim).collect();
        let (rust_cell, py_cell, c_cell) = (cells[4], cells[5], cells[6]);
        let has = |cell: &str, text: &str, needle: &str| cell.starts_with("n/a") || text.contains(needle);
        assert!(has(rust_cell, &rs, &format!("fn {id}()")), "row {id}: no Rust test fn {id}");
        assert!(has(py_cell, &py, &format!("def test_{id}(")), "row {id}: no Python test_{id}");
        assert!(has(c_cell, &c, &format!("ROW(\"{id}\"")), "row {id}: no C case ROW(\"{id}\")");
        for cell in [rust_cell, py_cell, c_cell] {
            assert!(
                cell.contains("](") || cell.starts_with("n/a"),
                "row {id}: cell '{cell}' has no test link"
            );
        }
    }
}

//! The built `stillsky` binary on good and bad inputs.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

const BIN: &str = env!("CARGO_BIN_EXE_stillsky");

fn examples() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("..").join("docs").join("examples")
}

fn tmp(tag: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("stillsky-cli-{tag}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn run(args: &[&str]) -> Output {
    Command::new(BIN).args(args).output().unwrap()
}

fn text(o: &Output) -> (String, String) {
    (String::from_utf8_lossy(&o.stdout).into_owned(), String::from_utf8_lossy(&o.stderr).into_owned())
}

fn s(p: &Path) -> &str {
    p.to_str().unwrap()
}

/// A flat acceleration PSD file, 0.2–100 Hz.
fn flat_psd(dir: &Path, level: f64) -> PathBuf {
    let mut t = String::from("# stillsky psd, quantity=acceleration, unit=(m/s^2)^2/Hz\nfreq_hz,value\n");
    for k in 0..=60 {
        let f = 0.2 * (500f64).powf(k as f64 / 60.0);
        t.push_str(&format!("{f:e},{level:e}\n"));
    }
    let p = dir.join("flat.csv");
    std::fs::write(&p, t).unwrap();
    p
}

fn assert_no_escapes(s: &str) {
    assert!(!s.contains('\u{1b}'), "escape code in output: {s:?}");
    assert!(!s.contains('\r'), "carriage return in output: {s:?}");
}

#[test]
fn report_prints_summary_plots_and_json() {
    let d = tmp("report");
    let model = examples().join("tripod-paver.toml");
    let rec = examples().join("recordings").join("quiet-night.csv");
    let o = run(&[
        "report",
        s(&model),
        "--ground",
        s(&rec),
        "--wind-speed",
        "3",
        "--exposure-s",
        "2",
        "--plots",
        s(&d.join("plots")),
        "--json",
        s(&d.join("r.json")),
    ]);
    let (out, err) = text(&o);
    assert!(o.status.success(), "{err}");
    for want in [
        "modes",
        "radial",
        "plate scale 0.2770",
        "probability outside",
        "seeing",
        "dominant mode",
        "gust family",
        "verdict",
    ] {
        assert!(out.contains(want), "missing '{want}' in\n{out}");
    }
    assert_no_escapes(&out);
    assert_no_escapes(&err);
    for f in ["transmissibility", "image-per-ground", "image-psd", "cumulative-rms", "ground-psd", "gust"] {
        let svg = std::fs::read_to_string(d.join("plots").join(format!("{f}.svg"))).unwrap();
        assert!(svg.starts_with("<svg") && svg.contains("<polyline"), "{f}.svg");
    }
    let json = std::fs::read_to_string(d.join("r.json")).unwrap();
    let v: serde_json::Value = serde_json::from_str(&json).unwrap();
    // Plate scale 206.264806 × 3.76 / 2800 (docs/references.md#s11).
    let plate = v["image"]["plate_scale_arcsec_per_px"].as_f64().unwrap();
    assert!((plate - 206.264806 * 3.76 / 2800.0).abs() < 1e-9);
    let rms_px = v["image"]["rms_px"].as_f64().unwrap();
    let rms_arcsec = v["image"]["rms_arcsec"].as_f64().unwrap();
    assert!((rms_px * plate - rms_arcsec).abs() <= 1e-9 * rms_arcsec);
    assert!(v["modes"].as_array().unwrap().len() > 3);
    // The star budget: a bar plot and the FWHM in the JSON, equal to the lines in quadrature.
    let svg = std::fs::read_to_string(d.join("plots").join("budget.svg")).unwrap();
    assert!(svg.starts_with("<svg") && svg.contains("<rect") && svg.contains("star FWHM"), "budget.svg");
    let b = &v["image"]["budget"];
    let fx = b["exposure"]["fwhm_arcsec"][0].as_f64().unwrap();
    let sum: f64 = b["lines"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|l| l["in_exposure"].as_bool().unwrap())
        .map(|l| l["fwhm_arcsec"][0].as_f64().unwrap().powi(2))
        .sum();
    assert!((fx - sum.sqrt()).abs() < 1e-9 * fx, "{fx} vs {}", sum.sqrt());
    assert!(out.contains("star image budget") && out.contains("Davenport"), "{out}");
}

#[test]
fn report_with_a_guide_loop_and_an_unstable_one() {
    let model = examples().join("tripod-paver.toml");
    let rec = examples().join("recordings").join("quiet-night.csv");
    let base = ["report", s(&model), "--ground", s(&rec), "--wind-speed", "4", "--guide-cadence-s", "2"];
    let o =
        run(&[&base[..], &["--guide-gain", "0.5", "--guide-exposure-s", "1.5", "--guide-latency-s", "0.5"]]
            .concat());
    let (out, err) = text(&o);
    assert!(o.status.success(), "{err}");
    assert!(
        out.contains("guiding (applied)") && out.contains("unguided") && out.contains("guiding residual"),
        "{out}"
    );
    // A latency of one whole frame: the loop at the samples is z² − z + g = 0, stable only for
    // g < 1 (Jury's conditions for a quadratic), so gain 1.5 is refused.
    let o =
        run(&[&base[..], &["--guide-gain", "1.5", "--guide-exposure-s", "1.5", "--guide-latency-s", "2"]]
            .concat());
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(2), "{err}");
    assert!(err.contains("guide.gain") && err.contains("unstable"), "{err}");
}

#[test]
fn expand_prints_generic_toml() {
    let o = run(&["expand", s(&examples().join("tripod-lawn.toml"))]);
    let (out, err) = text(&o);
    assert!(o.status.success(), "{err}");
    assert!(out.contains("[[body]]") && out.contains("name = \"payload\""), "{out}");
}

fn bad_report(dir: &Path, name: &str, content: &str) -> (i32, String) {
    let p = dir.join(name);
    std::fs::write(&p, content).unwrap();
    let o = run(&["report", s(&examples().join("tripod-paver.toml")), "--ground", s(&p)]);
    let (_, err) = text(&o);
    (o.status.code().unwrap_or(-1), err)
}

#[test]
fn bad_recordings_name_file_and_line_and_fail() {
    let d = tmp("bad");
    let cases: [(&str, &str, &[&str]); 6] = [
        ("header.csv", "# fs_hz=100\nz_m_s2,,\n0.1,0.2,0.3\n", &["header.csv", "line 2"]),
        ("nan.csv", "# fs_hz=100\nz_m_s2\n0.1\n0.2\nNaN\n", &["nan.csv", "line 5"]),
        ("time.csv", "time_s,z_m_s2\n0.00,0.1\n0.01,0.2\n0.01,0.3\n0.03,0.1\n", &["time.csv", "line 4"]),
        ("unit.csv", "# fs_hz=100\nz_furlong\n0.1\n", &["unit.csv", "furlong"]),
        ("empty.csv", "", &["empty.csv"]),
        ("short.csv", "# fs_hz=100\nz_m_s2\n0.1\n0.2\n", &["short.csv"]),
    ];
    for (name, content, wants) in cases {
        let (code, err) = bad_report(&d, name, content);
        assert_ne!(code, 0, "{name}: {err}");
        assert!(err.starts_with("error: "), "{name}: {err}");
        for w in wants {
            assert!(err.contains(w), "{name}: missing '{w}' in {err}");
        }
        assert_no_escapes(&err);
    }
    let o = run(&["report", s(&d.join("missing.toml"))]);
    let (_, err) = text(&o);
    assert_ne!(o.status.code(), Some(0));
    assert!(err.contains("missing.toml") && err.contains("I/O error"), "{err}");
    let o = run(&["report", s(&examples().join("tripod-paver.toml")), "--ground", s(&d.join("gone.csv"))]);
    let (_, err) = text(&o);
    assert_ne!(o.status.code(), Some(0));
    assert!(err.contains("gone.csv"), "{err}");
}

#[test]
fn bad_model_file_names_line() {
    let d = tmp("badmodel");
    let p = d.join("m.toml");
    std::fs::write(
        &p,
        "[[body]]\nname = \"a\"\nmass_kg = 1\ncg_m = [0, 0, 0]\ninertia_kgm2 = [1, 1, 1]\nwobble = 3\n",
    )
    .unwrap();
    let o = run(&["report", s(&p)]);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(2));
    assert!(err.contains("m.toml") && err.contains("line 6") && err.contains("wobble"), "{err}");
}

fn sweep_args<'a>(
    model: &'a str,
    cat: &'a str,
    grounds: &[&'a str],
    winds: &[&'a str],
    out: &'a str,
) -> Vec<&'a str> {
    let mut a = vec!["sweep", "--model", model, "--catalogue", cat, "--ground"];
    a.extend_from_slice(grounds);
    if !winds.is_empty() {
        a.push("--wind");
        a.extend_from_slice(winds);
    }
    a.extend_from_slice(&["--out", out]);
    a
}

#[test]
fn soft_pad_raises_image_motion_of_a_stiff_tripod_on_a_paver() {
    // Common practice, no source: a soft spring in series with a stiff support dominates the
    // stiffness, so a soft pad under a tripod on a hard paver raises the image motion.
    // A flat PSD loud enough (1e-7 (m/s²)²/Hz) that the difference is visible (> 0.1 px).
    let d = tmp("series");
    let g = flat_psd(&d, 1e-7);
    let model = examples().join("tripod-paver.toml");
    let cat = examples().join("isolators.toml");
    let out = d.join("rows.csv");
    let o = run(&sweep_args(s(&model), s(&cat), &[s(&g)], &[], s(&out)));
    let (stdout, err) = text(&o);
    assert!(o.status.success(), "{err}");
    assert!(stdout.contains("WORSE than no pad"), "{stdout}");
    let rows = stillsky::batch::read_sweep_csv(&out).unwrap();
    let get = |n: &str| rows.iter().find(|r| r.spec == n).unwrap();
    assert!(get("soft-elastomer").rms_arcsec > get("none").rms_arcsec);
    assert!(get("soft-elastomer").ratio_to_none > 1.0 && get("soft-elastomer").worse_than_none);
    assert!(get("soft-elastomer").first_mode_hz < get("none").first_mode_hz);
}

#[test]
fn resumed_sweep_equals_uninterrupted_run_and_output_is_plain() {
    let d = tmp("resume");
    let g = flat_psd(&d, 1e-9);
    let model = examples().join("tripod-paver.toml");
    let cat = examples().join("isolators.toml");
    let full = d.join("full.csv");
    let o = run(&sweep_args(s(&model), s(&cat), &[s(&g), "nhnm"], &["calm", "3"], s(&full)));
    let (out, err) = text(&o);
    assert!(o.status.success(), "{err}");
    // Not a TTY here: no progress bar, no escape codes.
    assert_no_escapes(&out);
    assert_no_escapes(&err);
    let want = std::fs::read_to_string(&full).unwrap();
    let lines: Vec<&str> = want.lines().collect();
    assert_eq!(lines.len(), 1 + 2 * 2 * 5);
    // Interrupted after 6 complete rows, with a torn seventh.
    let part = d.join("part.csv");
    let torn = format!("{}\n{}", lines[..7].join("\n"), &lines[7][..lines[7].len() / 3]);
    std::fs::write(stillsky::io::atomic::partial_path(&part), torn).unwrap();
    let mut args = sweep_args(s(&model), s(&cat), &[s(&g), "nhnm"], &["calm", "3"], s(&part));
    args.push("--resume");
    let o = run(&args);
    let (out, err) = text(&o);
    assert!(o.status.success(), "{err}");
    assert!(out.contains("14 computed, 6 kept"), "{out}");
    assert_eq!(std::fs::read_to_string(&part).unwrap(), want);
    assert!(!stillsky::io::atomic::partial_path(&part).exists());
}

#[test]
fn a_bad_recording_is_an_error_row_and_the_exit_code_says_so() {
    let d = tmp("sweepbad");
    let g = flat_psd(&d, 1e-9);
    let bad = d.join("bad.csv");
    std::fs::write(&bad, "# fs_hz=100\nz_m_s2\n0.1\n0.2\nx\n").unwrap();
    let out = d.join("rows.csv");
    let o = run(&sweep_args(
        s(&examples().join("tripod-paver.toml")),
        s(&examples().join("isolators.toml")),
        &[s(&bad), s(&g)],
        &[],
        s(&out),
    ));
    let (stdout, err) = text(&o);
    assert_eq!(o.status.code(), Some(1), "{err}");
    // One error row per spec of the bad recording (the baseline and four isolators).
    assert!(err.contains("5 row(s) failed"), "{err}");
    assert!(stdout.contains("bad.csv") && stdout.contains("line 5"), "{stdout}");
    let rows = stillsky::batch::read_sweep_csv(&out).unwrap();
    assert_eq!(rows.len(), 10);
    assert!(rows[..5].iter().all(|r| r.is_error()) && rows[5..].iter().all(|r| !r.is_error()));
}

#[test]
fn demo_finishes() {
    let d = tmp("demo");
    let o = run(&["demo", "--out", s(&d)]);
    let (out, err) = text(&o);
    assert!(o.status.success(), "{err}\n{out}");
    assert!(d.join("sweep.csv").exists() && d.join("report.json").exists());
    assert!(d.join("plots").join("gust.svg").exists());
    assert!(out.contains("ranking, wind calm, all spectra"), "{out}");
    assert!(out.contains("ranking, wind 4m/s"), "{out}");
    assert!(out.contains("no visible difference"), "{out}");
    assert!(d.join("plots").join("sky-map.svg").exists(), "the report's sky map");
    assert!(d.join("sky-map-equatorial.csv").exists() && d.join("sky-map-equatorial.svg").exists());
    assert!(out.contains("best: hour angle ") && out.contains("best: altitude "), "{out}");
}

#[test]
fn sky_map_writes_csv_and_svg_and_names_best_and_worst() {
    let d = tmp("skymap");
    let model = examples().join("equatorial-pier.toml");
    let (csv, svg) = (d.join("map.csv"), d.join("map.svg"));
    let o = run(&[
        "sky-map",
        s(&model),
        "--ground",
        "none",
        "--wind-speed",
        "4",
        "--wind-from-deg",
        "270",
        "--hour-angles-h",
        "-3:3:1.5",
        "--declinations",
        "-30:80:20",
        "--csv",
        s(&csv),
        "--svg",
        s(&svg),
    ]);
    let (out, err) = text(&o);
    assert!(o.status.success(), "{err}\n{out}");
    assert!(out.contains("best: hour angle ") && out.contains("; worst: hour angle "), "{out}");
    let csv_text = std::fs::read_to_string(&csv).unwrap();
    let mut lines = csv_text.lines();
    assert_eq!(lines.next(), Some("hour_angle_deg,declination_deg,rms_arcsec,rms_px"));
    let rows: Vec<Vec<f64>> = lines.map(|l| l.split(',').map(|x| x.parse().unwrap()).collect()).collect();
    assert_eq!(rows.len(), 5 * 6);
    assert_eq!((rows[0][0], rows[0][1], rows[29][0], rows[29][1]), (-45.0, -30.0, 45.0, 70.0));
    // Declination −30° at latitude 48° never rises 20° above the horizon: skipped.
    assert!(rows.iter().filter(|r| r[1] == -30.0).all(|r| r[2].is_nan() && r[3].is_nan()));
    assert!(rows.iter().filter(|r| r[1] >= 10.0).all(|r| r[2] > 0.0 && r[3] > 0.0));
    let svg = std::fs::read_to_string(&svg).unwrap();
    assert!(svg.contains("best") && svg.contains("worst") && svg.contains("hour angle"), "svg text");

    // Axes of the other kind of rig, and bad ranges, are refused by name.
    let o = run(&["sky-map", s(&model), "--altitudes", "20:90:10"]);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(2), "{err}");
    assert!(err.contains("sky grid") && err.contains("equatorial"), "{err}");
    let o = run(&["sky-map", s(&model), "--declinations", "80:10:10"]);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(2), "{err}");
    assert!(err.contains("declinations"), "{err}");
}

#[test]
fn report_with_sky_map_names_the_best_and_worst_pointings() {
    let d = tmp("report-skymap");
    let model = examples().join("tripod-paver.toml");
    let json = d.join("r.json");
    let o = run(&[
        "report",
        s(&model),
        "--ground",
        "nlnm",
        "--wind-speed",
        "3",
        "--altitudes",
        "30:90:30",
        "--azimuths",
        "0:270:90",
        "--json",
        s(&json),
    ]);
    let (out, err) = text(&o);
    assert!(o.status.success(), "{err}\n{out}");
    assert!(out.contains("sky map (12 cells") && out.contains("best: altitude "), "{out}");
    let v: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    assert_eq!(v["sky_map"]["frame"], "alt_az");
    assert_eq!(v["sky_map"]["rms_px"].as_array().unwrap().len(), 3);
}

/// The report on a real seismometer recording: ObsPy's bundled example BW.BGLD..EHE (Steim-1
/// miniSEED, copied to core/tests/data/mseed). The file holds counts; the sensitivity given
/// here (6.0e8 counts per m/s) is a placeholder, not that station's response.
#[test]
fn report_on_a_real_miniseed_recording_needs_and_uses_the_sensitivity() {
    let d = tmp("mseed");
    let rec = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../core/tests/data/mseed/BW.BGLD..EHE.steim1.10rec.mseed");
    let model = examples().join("tripod-paver.toml");
    let o = run(&["report", s(&model), "--ground", s(&rec)]);
    let (_, err) = text(&o);
    assert_ne!(o.status.code(), Some(0));
    assert!(err.contains("BW.BGLD..EHE.steim1.10rec.mseed") && err.contains("counts"), "{err}");
    let rms = |sens: &str, tag: &str| {
        let json = d.join(format!("{tag}.json"));
        let o = run(&["report", s(&model), "--ground", s(&rec), "--sensitivity", sens, "--json", s(&json)]);
        assert_eq!(o.status.code(), Some(0), "{}", text(&o).1);
        let v: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
        v["image"]["rms_arcsec"].as_f64().unwrap()
    };
    let a = rms("6.0e8:m_s", "a");
    let b = rms("3.0e8:m_s", "b");
    assert!(a.is_finite() && a > 0.0);
    // Linearity: half the counts per unit is twice the ground motion and twice the image RMS.
    assert!((b / a - 2.0).abs() < 1e-9, "{a} {b}");
    let o = run(&["report", s(&model), "--ground", s(&rec), "--sensitivity", "6e8:furlongs"]);
    assert!(text(&o).1.contains("furlongs"), "{}", text(&o).1);
}

#[test]
fn calibrate_fits_the_tilt_stiffness_and_writes_the_model() {
    // Targets synthesised from the demo rig with the mount's tilt stiffness at 2.6e4 N·m/rad
    // (the file says 2.0e4): the fitted file must carry 2.6e4 within 1 %.
    let d = tmp("calibrate");
    let model = examples().join("tripod-lawn.toml");
    let source = std::fs::read_to_string(&model).unwrap();
    let truth = stillsky::identify::set_parameter(&source, "mount.tilt_stiffness_nm_per_rad", 2.6e4).unwrap();
    let modes = stillsky::model::Model::from_toml_str(&truth, "truth").unwrap().modes().unwrap();
    let out = d.join("fitted.toml");
    let mut args = vec![
        "calibrate".to_string(),
        s(&model).to_string(),
        "--param".into(),
        "mount.tilt_stiffness_nm_per_rad=5e3:1e5".into(),
        "--out".into(),
        s(&out).to_string(),
    ];
    for f in &modes.frequency_hz[..3] {
        args.push("--target".into());
        args.push(format!("{f}"));
    }
    let argv: Vec<&str> = args.iter().map(String::as_str).collect();
    let o = run(&argv);
    let (stdout, stderr) = text(&o);
    assert!(o.status.success(), "{stdout}\n{stderr}");
    assert!(stdout.contains("mount.tilt_stiffness_nm_per_rad") && stdout.contains("converged"), "{stdout}");
    let fitted = std::fs::read_to_string(&out).unwrap();
    let k = stillsky::identify::get_parameter(&fitted, "mount.tilt_stiffness_nm_per_rad").unwrap();
    assert!((k / 2.6e4 - 1.0).abs() < 0.01, "fitted {k}");
    stillsky::model::Model::from_toml_str(&fitted, "fitted").unwrap();

    // A path the file does not have: exit 2, the path named, nothing written.
    let out2 = d.join("never.toml");
    let o = run(&[
        "calibrate",
        s(&model),
        "--param",
        "mount.tilt_stifness=1:2",
        "--target",
        "10",
        "--out",
        s(&out2),
    ]);
    let (_, stderr) = text(&o);
    assert_eq!(o.status.code(), Some(2), "{stderr}");
    assert!(stderr.contains("mount.tilt_stifness"), "{stderr}");
    assert!(!out2.exists());
    let o =
        run(&["calibrate", s(&model), "--param", "mount.tilt_stiffness_nm_per_rad=oops", "--target", "10"]);
    assert_eq!(o.status.code(), Some(2));
}

#[test]
fn pointing_on_the_command_line_equals_editing_the_file() {
    // --altitude-deg / --azimuth-deg pose the payload as the file's [optics] would: the modes
    // and the image RMS of both runs agree to 1e-12.
    let d = tmp("pointing");
    let model = examples().join("tripod-paver.toml");
    let edited = d.join("edited.toml");
    let body = std::fs::read_to_string(&model)
        .unwrap()
        .replace("altitude_deg = 45", "altitude_deg = 80")
        .replace("azimuth_deg = 135", "azimuth_deg = 250");
    std::fs::write(&edited, body).unwrap();
    let rms = |v: &serde_json::Value| v["image"]["rms_arcsec"].as_f64().unwrap();
    let json = |m: &Path, extra: &[&str], tag: &str| -> serde_json::Value {
        let j = d.join(format!("{tag}.json"));
        let mut args = vec!["report", s(m), "--ground", "none", "--wind-speed", "4", "--json", s(&j)];
        args.extend_from_slice(extra);
        let o = run(&args);
        assert!(o.status.success(), "{}", text(&o).1);
        serde_json::from_str(&std::fs::read_to_string(&j).unwrap()).unwrap()
    };
    let a = json(&model, &["--altitude-deg", "80", "--azimuth-deg", "250"], "flags");
    // Negative angles are values, not options.
    let eq = examples().join("equatorial-pier.toml");
    let e = json(&eq, &["--hour-angle-deg", "-30", "--declination-deg", "-5", "--pier-side", "west"], "eq");
    assert!(rms(&e) > 0.0);
    let b = json(&edited, &[], "file");
    let c = json(&model, &[], "own");
    let close = |x: f64, y: f64| (x - y).abs() <= 1e-12 * x.abs().max(y.abs());
    let modes = |v: &serde_json::Value, k: &str| -> Vec<f64> {
        v["modes"].as_array().unwrap().iter().map(|m| m[k].as_f64().unwrap()).collect()
    };
    for k in ["frequency_hz", "damping_ratio"] {
        let (ma, mb) = (modes(&a, k), modes(&b, k));
        assert_eq!(ma.len(), mb.len());
        assert!(ma.iter().zip(&mb).all(|(x, y)| close(*x, *y)), "{k}: {ma:?} vs {mb:?}");
    }
    assert!(close(rms(&a), rms(&b)), "{} vs {}", rms(&a), rms(&b));
    // And it is a different pose from the file's own 45°.
    let (fa, fc) = (modes(&a, "frequency_hz"), modes(&c, "frequency_hz"));
    assert!(fa.iter().zip(&fc).any(|(x, y)| (x - y).abs() > 1e-3 * x), "{fa:?} vs {fc:?}");
}

#[test]
fn transfer_estimates_a_known_filter_between_two_channels() {
    // y[n] = (x[n] + x[n-1]) / 2 has H(f) = cos(π f / fs) e^{-iπ f/fs} (a two-tap average; any
    // DSP text, e.g. Oppenheim & Schafer, Discrete-Time Signal Processing, ch. 5).
    let dir = tmp("transfer");
    let fs = 100.0;
    let mut state: u64 = 12345;
    let x: Vec<f64> = (0..20_000)
        .map(|_| {
            state = state.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
            (state >> 11) as f64 / (1u64 << 53) as f64 - 0.5
        })
        .collect();
    let mut csv = String::from("time_s,ground_m_s2,top_m_s2\n");
    for k in 0..x.len() {
        let y = 0.5 * (x[k] + if k > 0 { x[k - 1] } else { 0.0 });
        csv.push_str(&format!("{},{},{}\n", k as f64 / fs, x[k], y));
    }
    let rec = dir.join("pair.csv");
    std::fs::write(&rec, csv).unwrap();
    let out = dir.join("h.csv");
    let o = run(&[
        "transfer",
        s(&rec),
        s(&rec),
        "--input-axis",
        "ground",
        "--output-axis",
        "top",
        "--nperseg",
        "512",
        "--csv",
        s(&out),
    ]);
    let (so, se) = text(&o);
    assert!(o.status.success(), "{so}{se}");
    assert!(so.contains("coherence >= 0.9 in"), "{so}");
    let body = std::fs::read_to_string(&out).unwrap();
    let mut rows = 0;
    for line in body.lines().skip(1) {
        let v: Vec<f64> = line.split(',').map(|c| c.parse().unwrap()).collect();
        let (f, h1, ph, h2, coh) = (v[0], v[1], v[2], v[3], v[5]);
        if f > 0.45 * fs {
            continue; // |H| → 0 near Nyquist: the ratio of tiny powers
        }
        let want = (std::f64::consts::PI * f / fs).cos();
        assert!(
            (h1 / want - 1.0).abs() < 5e-3 && (h2 / want - 1.0).abs() < 5e-3,
            "{f} Hz: {h1} {h2} vs {want}"
        );
        assert!((ph + 180.0 * f / fs).abs() < 0.5, "{f} Hz: phase {ph}");
        assert!(coh > 0.99, "{f} Hz: coherence {coh}");
        rows += 1;
    }
    assert!(rows > 200);
    // Named errors: an unknown axis.
    let o = run(&["transfer", s(&rec), s(&rec), "--input-axis", "nope"]);
    assert!(!o.status.success() && text(&o).1.contains("no axis 'nope'"));
}

#[test]
fn pier_table_prints_rows_and_writes_csv_matching_the_formula() {
    let d = tmp("pier");
    let csv = d.join("piers.csv");
    let o = run(&[
        "pier-table",
        "--od",
        "0.1143,0.1683",
        "--wall",
        "0.006",
        "--height",
        "1.0,1.3",
        "--material",
        "steel-s235,aluminium-6061-t6",
        "--rocking-nm-per-rad",
        "4e5",
        "--csv",
        s(&csv),
    ]);
    let (out, err) = text(&o);
    assert!(o.status.success(), "{out}\n{err}");
    assert_no_escapes(&out);
    assert!(out.contains("22 N at the top") && out.contains("aluminium-6061-t6"), "{out}");
    let body = std::fs::read_to_string(&csv).unwrap();
    let lines: Vec<&str> = body.lines().collect();
    assert_eq!(lines.len(), 1 + 8);
    let head: Vec<&str> = lines[0].split(',').collect();
    let col = |name: &str| head.iter().position(|h| *h == name).unwrap();
    for line in &lines[1..] {
        let v: Vec<&str> = line.split(',').collect();
        assert_eq!(v.len(), head.len());
        let num = |name: &str| v[col(name)].parse::<f64>().unwrap();
        // Cantilever tip load plus rigid base rotation: θ = F L²/(2EI) + F L/k (independent here).
        let e = if v[col("material")] == "steel-s235" { 210e9 } else { 68.9e9 };
        let (od, t, l) = (num("outer_diameter_m"), num("wall_m"), num("height_m"));
        let i = std::f64::consts::PI / 64.0 * (od.powi(4) - (od - 2.0 * t).powi(4));
        let theta = (22.0 * l * l / (2.0 * e * i) + 22.0 * l / 4e5) * 206_264.806_247_096_36;
        assert!((num("tilt_arcsec") / theta - 1.0).abs() < 1e-9, "{line}");
        assert!((num("model_tilt_arcsec") / theta - 1.0).abs() < 1e-6, "{line}");
    }
    let _ = std::fs::remove_dir_all(&d);
}

#[test]
fn pier_table_bad_input_names_the_field() {
    let o = run(&["pier-table", "--od", "0.1", "--wall", "0.06", "--height", "1.0"]);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(2), "{err}");
    assert!(err.contains("walls_m"), "{err}");
    let o = run(&[
        "pier-table",
        "--od",
        "0.1",
        "--wall",
        "0.006",
        "--height",
        "1.0",
        "--soil",
        "moon",
        "--footing-diameter",
        "1",
    ]);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(2), "{err}");
    assert!(err.contains("moon") && err.contains("lawn"), "{err}");
}

#[test]
fn deck_load_prints_the_walking_pass_and_the_standing_table_with_its_csv() {
    // The demo deck rocks at 5e6 N·m/rad with the stand on its CG: a 735.5 N person 1 m away
    // tilts it by W d / k_rock = 1.471e-4 rad = 30.34 arcsec (statics of a rigid body) and the
    // image, at the worst azimuth, by the same.
    let d = tmp("deck");
    let csv = d.join("standing.csv");
    let model = examples().join("tripod-deck.toml");
    let o = run(&["deck-load", s(&model), "--distances-m", "0.5,1,2", "--csv", s(&csv)]);
    let (out, err) = text(&o);
    assert!(o.status.success(), "{out}\n{err}");
    assert_no_escapes(&out);
    assert!(out.contains("walking pass: peak") && out.contains("steady footfall lines"), "{out}");
    assert!(out.contains("over 0.5 px at every distance from 0.5 to 2 m"), "{out}");
    let body = std::fs::read_to_string(&csv).unwrap();
    let rows: Vec<Vec<f64>> =
        body.lines().skip(1).map(|l| l.split(',').map(|v| v.parse().unwrap()).collect()).collect();
    assert_eq!(rows.len(), 3);
    let hand = 75.0 * 9.80665 * 1.0 / 5.0e6 * 206_264.806;
    assert!((rows[1][4] / hand - 1.0).abs() < 1e-3, "deck tilt {} vs {hand}", rows[1][4]);
    assert!(rows[1][2] >= 0.999 * rows[1][4], "image at the worst azimuth follows the deck");
    let o = run(&["deck-load", s(&examples().join("pier.toml"))]);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(2), "{err}");
    assert!(err.contains("floor"), "{err}");
    // The report's page carries the same section, its standing table one row per distance.
    let page = d.join("deck.html");
    let o = run(&["report", s(&model), "--html", s(&page)]);
    assert!(o.status.success(), "{}", text(&o).1);
    let html = std::fs::read_to_string(&page).unwrap();
    assert!(html.contains("People on the deck") && html.contains("id=\"standing\""), "people section");
    assert!(html.contains("Standing still (735 N): over 0.5 px"), "standing verdict");
}

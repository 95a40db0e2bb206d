//! Two-channel identification (H1/H2 with coherence, modes from the FRF) and calibration of a
//! model to identified modes, on data synthesised from known models with stated seeds.

use rand::{SeedableRng, rngs::StdRng};
use rand_distr::{Distribution, Normal};
use std::f64::consts::PI;
use stillsky::Error;
use stillsky::identify::{
    CalibrationOptions, CalibrationParameter, FrfModeOptions, ModalTarget, RingdownOptions, calibrate,
    frf_modes, get_parameter, identify_ringdown, set_parameter,
};
use stillsky::model::Model;
use stillsky::spectrum::{WelchConfig, transfer_estimate};
use stillsky::transient::TransientOptions;

/// Two masses in x: ground–pad–a–column–b, dampers c = β k on each spring (stiffness-
/// proportional Rayleigh damping, C = βK).
fn chain2(k_pad: f64, k_col: f64, beta: f64) -> String {
    format!(
        r#"
[[body]]
name = "a"
mass_kg = 2.0
cg_m = [1, 0, 1]
inertia_kgm2 = [1, 1, 1]
dofs = ["x"]

[[body]]
name = "b"
mass_kg = 1.0
cg_m = [2, 0, 1]
inertia_kgm2 = [1, 1, 1]
dofs = ["x"]

[[spring]]
name = "pad"
from = "ground"
to = "a"
at_m = [0.5, 0, 1]
direction = [1, 0, 0]
stiffness_n_per_m = {k_pad}
damping_ns_per_m = {c_pad}

[[spring]]
name = "column"
from = "a"
to = "b"
at_m = [1.5, 0, 1]
direction = [1, 0, 0]
stiffness_n_per_m = {k_col}
damping_ns_per_m = {c_col}
"#,
        c_pad = beta * k_pad,
        c_col = beta * k_col
    )
}

fn gaussian(n: usize, sd: f64, seed: u64) -> Vec<f64> {
    let mut rng = StdRng::seed_from_u64(seed);
    let d = Normal::new(0.0, sd).unwrap();
    (0..n).map(|_| d.sample(&mut rng)).collect()
}

fn rms(x: &[f64]) -> f64 {
    (x.iter().map(|v| v * v).sum::<f64>() / x.len() as f64).sqrt()
}

#[test]
fn h1_of_a_noisy_shaker_test_equals_the_true_frf_and_gives_its_modes() {
    // Known linear system: chain2, random force on b (seed 11), displacement of b plus 3 %
    // white measurement noise (seed 12). H1 = Pxy/Pxx is unbiased by output noise
    // (Bendat & Piersol, Random Data, single-input/single-output relations; from memory).
    // Rayleigh damping ζ_j = β ω_j / 2 (Chopra, Dynamics of Structures, classical damping).
    // 2^21 samples and 2048-sample segments: ~2000 averages, so the random error of H1 at
    // coherence 0.95 is about √((1 − γ²)/(γ² n_d)) ≈ 0.5 %, and Hann leakage at the first
    // peak is about (1/(3T²))/δ² ≈ 0.6 % (δ = ζ f_n the half-power half-width, T = 16 s).
    let beta = 6e-4;
    let model = Model::from_toml_str(&chain2(4.0e4, 2.0e4, beta), "chain2").unwrap();
    let fs = 128.0;
    let n = 1 << 21;
    let force = gaussian(n, 1.0, 11);
    let resp = model.transient("force:b:x", &force, fs, &["b:x"], &TransientOptions::default()).unwrap();
    let y0 = resp.series("b:x").unwrap();
    let noise = gaussian(n, 0.03 * rms(y0), 12);
    let y: Vec<f64> = y0.iter().zip(&noise).map(|(a, b)| a + b).collect();
    let est = transfer_estimate(&force, &y, fs, &WelchConfig::new(2048)).unwrap();
    let truth = model.frf(&est.freq_hz, &["force:b:x"], &["b:x"]).unwrap();
    let mut checked = 0;
    let mut worst = 0.0f64;
    for k in 0..est.freq_hz.len() {
        if est.coherence[k] > 0.95 && est.freq_hz[k] < 0.8 * fs / 2.0 {
            let t = truth.data[[k, 0, 0]];
            let rel = (est.h1[k] - t).norm() / t.norm();
            assert!(
                rel < 0.02,
                "H1 off by {rel:.4} at {} Hz (coherence {})",
                est.freq_hz[k],
                est.coherence[k]
            );
            checked += 1;
            worst = worst.max(rel);
        }
    }
    eprintln!("H1 vs true FRF: worst {worst:.4} over {checked} bins with coherence > 0.95");
    assert!(checked > 300, "only {checked} bins with coherence > 0.95");

    let modes = model.modes().unwrap();
    let fitted = frf_modes(&est.freq_hz, &est.h1, Some(&est.coherence), &FrfModeOptions::default()).unwrap();
    assert_eq!(fitted.len(), 2, "{fitted:?}");
    for (j, m) in fitted.iter().enumerate() {
        let f_true = modes.frequency_hz[j];
        let z_true = beta * 2.0 * PI * f_true / 2.0;
        eprintln!(
            "mode {j}: f {:.5} vs {f_true:.5}, ζ {:.5} vs {z_true:.5}",
            m.frequency_hz, m.damping_ratio
        );
        assert!((m.frequency_hz / f_true - 1.0).abs() < 0.005, "mode {j}: {m:?} vs {f_true}");
        assert!((m.damping_ratio / z_true - 1.0).abs() < 0.10, "mode {j}: ζ {} vs {z_true}", m.damping_ratio);
    }
}

#[test]
fn calibration_recovers_the_pad_stiffness_from_a_simulated_tap() {
    // Data: a tap (a 2 ms half-sine force on b) on chain2 with the pad at 61 000 N/m, the
    // displacement of b recorded at 1 kHz for 20 s with noise at 40 dB SNR (seed 21). The
    // identified natural frequencies (here the dominant mode; the second decays below the
    // pencil's amplitude floor) are the targets; the calibration starts from a
    // model with the pad at 30 000 N/m and must land within 1 % of 61 000.
    let k_true = 61_000.0;
    let start = chain2(3.0e4, 2.0e4, 2e-4);
    let truth = set_parameter(&start, "spring[pad].stiffness_n_per_m", k_true).unwrap();
    let truth = set_parameter(&truth, "spring[pad].damping_ns_per_m", 2e-4 * k_true).unwrap();
    let model = Model::from_toml_str(&truth, "truth").unwrap();
    let fs = 1000.0;
    let n = 20_000;
    let tap: Vec<f64> =
        (0..n).map(|k| if k < 2 { 50.0 * (PI * (k as f64 + 0.5) / 2.0).sin() } else { 0.0 }).collect();
    let r = model.transient("force:b:x", &tap, fs, &["b:x"], &TransientOptions::default()).unwrap();
    let x0 = r.series("b:x").unwrap();
    let peak = x0.iter().fold(0.0f64, |a, v| a.max(v.abs()));
    let noise = gaussian(n, peak * 1e-2, 21);
    let x: Vec<f64> = x0.iter().zip(&noise).map(|(a, b)| a + b).collect();
    let id = identify_ringdown(&x, fs, &RingdownOptions::default()).unwrap();
    assert!(!id.frequency_hz.is_empty(), "{id:?}");
    let targets: Vec<ModalTarget> = id.frequency_hz.iter().map(|&f| ModalTarget::frequency(f)).collect();
    let p = [CalibrationParameter { path: "spring[pad].stiffness_n_per_m".into(), lower: 5e3, upper: 5e5 }];
    let c = calibrate(&start, "start", &p, &targets, &CalibrationOptions::default()).unwrap();
    eprintln!("tap: identified {:?} Hz; fitted pad {:.1} N/m vs {k_true}", id.frequency_hz, c.values[0]);
    assert!((c.values[0] / k_true - 1.0).abs() < 0.01, "fitted {} vs {k_true}: {c:?}", c.values[0]);
    assert!(c.converged && c.cost < c.initial_cost);
    for t in &c.residuals {
        assert!(t.frequency_error.abs() < 0.005, "{t:?}");
    }
    assert_eq!(get_parameter(&c.model_toml, "spring[pad].stiffness_n_per_m").unwrap(), c.values[0]);
}

#[test]
fn calibration_fits_stiffness_and_damping_together() {
    // Two parameters (column stiffness and the pad's damper) against two exact frequencies and
    // one damping ratio from the true model's modes: both recovered within 1 %.
    let start = chain2(4.0e4, 2.0e4, 4e-4);
    let truth = set_parameter(&start, "spring[column].stiffness_n_per_m", 2.6e4).unwrap();
    let truth = set_parameter(&truth, "spring[pad].damping_ns_per_m", 30.0).unwrap();
    let m = Model::from_toml_str(&truth, "truth").unwrap().modes().unwrap();
    let targets = [
        ModalTarget::frequency(m.frequency_hz[0]).with_damping(m.damping_ratio[0]),
        ModalTarget::frequency(m.frequency_hz[1]),
    ];
    let p = [
        CalibrationParameter { path: "spring[column].stiffness_n_per_m".into(), lower: 1e3, upper: 1e6 },
        CalibrationParameter { path: "spring[pad].damping_ns_per_m".into(), lower: 0.1, upper: 1e3 },
    ];
    let c = calibrate(&start, "start", &p, &targets, &CalibrationOptions::default()).unwrap();
    assert!((c.values[0] / 2.6e4 - 1.0).abs() < 0.01, "{c:?}");
    assert!((c.values[1] / 30.0 - 1.0).abs() < 0.01, "{c:?}");
}

#[test]
fn a_damping_target_the_parameter_cannot_meet_does_not_pull_the_frequency_off() {
    // One parameter (the pad's stiffness) against a frequency and a damping ratio that no pad
    // stiffness gives together: the truth's first mode with half its damping ratio. By default
    // (damping weight 0.1) the frequency is met within 0.5 %; with equal weights the fit gives
    // more of the frequency away to approach the damping ratio.
    let start = chain2(4.0e4, 2.0e4, 2e-4);
    let truth = set_parameter(&start, "spring[pad].stiffness_n_per_m", 55_000.0).unwrap();
    let m = Model::from_toml_str(&truth, "truth").unwrap().modes().unwrap();
    let targets = [ModalTarget::frequency(m.frequency_hz[0]).with_damping(0.5 * m.damping_ratio[0])];
    let p = [CalibrationParameter { path: "spring[pad].stiffness_n_per_m".into(), lower: 1e3, upper: 1e6 }];
    let by_default = calibrate(&start, "start", &p, &targets, &CalibrationOptions::default()).unwrap();
    let mut equal = CalibrationOptions::default();
    equal.damping_weight = 1.0;
    let equal = calibrate(&start, "start", &p, &targets, &equal).unwrap();
    let (fd, fe) = (by_default.residuals[0].frequency_error, equal.residuals[0].frequency_error);
    eprintln!("frequency error: default weight {fd:.4}, equal weights {fe:.4}");
    assert!(fd.abs() < 0.005, "{by_default:?}");
    assert!(fe.abs() > 2.0 * fd.abs(), "{fe} vs {fd}");
}

#[test]
fn calibration_paths_read_and_write_numbers() {
    let two = chain2(4.0e4, 2.0e4, 2e-4);
    let two = two.as_str();
    assert_eq!(get_parameter(two, "spring[pad].stiffness_n_per_m").unwrap(), 40000.0);
    assert_eq!(get_parameter(two, "spring[1].stiffness_n_per_m").unwrap(), 20000.0);
    assert_eq!(get_parameter(two, "body[b].mass_kg").unwrap(), 1.0);
    assert_eq!(get_parameter(two, "body[0].cg_m[0]").unwrap(), 1.0);
    let t = set_parameter(two, "spring[column].stiffness_n_per_m", 1.5e4).unwrap();
    assert_eq!(get_parameter(&t, "spring[1].stiffness_n_per_m").unwrap(), 1.5e4);
    let e = get_parameter(two, "spring[pad].stifness_n_per_m").unwrap_err();
    assert!(
        matches!(e, Error::UnknownName { ref name, ref known, .. }
        if name == "spring[pad].stifness_n_per_m" && known.contains("spring[pad].stiffness_n_per_m")),
        "{e}"
    );
    let e = get_parameter(two, "spring[pad].name").unwrap_err();
    assert!(e.to_string().contains("not a number"), "{e}");
    assert!(get_parameter(two, "spring[pad").is_err());
    assert!(get_parameter(two, "").is_err());
}

#[test]
fn calibration_recovers_a_stiffness_from_exact_frequencies() {
    let two = chain2(4.0e4, 2.0e4, 2e-4);
    let two = two.as_str();
    // Synthesise: the same model with the pad at 55 000 N/m; its two modes are the data.
    let truth = set_parameter(two, "spring[pad].stiffness_n_per_m", 55_000.0).unwrap();
    let m = Model::from_toml_str(&truth, "truth").unwrap().modes().unwrap();
    let targets: Vec<ModalTarget> = m.frequency_hz.iter().map(|&f| ModalTarget::frequency(f)).collect();
    let p = [CalibrationParameter { path: "spring[pad].stiffness_n_per_m".into(), lower: 1e3, upper: 1e6 }];
    let c = calibrate(two, "two", &p, &targets, &CalibrationOptions::default()).unwrap();
    assert!((c.values[0] / 55_000.0 - 1.0).abs() < 1e-6, "{c:?}");
    assert!(c.converged && c.cost < 1e-14 && !c.at_bound[0]);
    assert_eq!(get_parameter(&c.model_toml, "spring[pad].stiffness_n_per_m").unwrap(), c.values[0]);
}

#[test]
fn bad_calibration_inputs_are_named() {
    let two = chain2(4.0e4, 2.0e4, 2e-4);
    let two = two.as_str();
    let t = [ModalTarget::frequency(10.0)];
    let p =
        |path: &str, lo: f64, hi: f64| vec![CalibrationParameter { path: path.into(), lower: lo, upper: hi }];
    let o = CalibrationOptions::default();
    assert!(matches!(
        calibrate(two, "two", &p("spring[x].stiffness_n_per_m", 1.0, 1e6), &t, &o),
        Err(Error::UnknownName { .. })
    ));
    assert!(matches!(
        calibrate(two, "two", &p("spring[pad].stiffness_n_per_m", 1e5, 1e6), &t, &o),
        Err(Error::OutOfRange { .. })
    ));
    assert!(calibrate(two, "two", &p("spring[pad].stiffness_n_per_m", 1e6, 1e3), &t, &o).is_err());
    let two_p =
        [p("spring[pad].stiffness_n_per_m", 1e3, 1e6), p("spring[column].stiffness_n_per_m", 1e3, 1e6)]
            .concat();
    let e = calibrate(two, "two", &two_p, &t, &o).unwrap_err();
    assert!(e.to_string().contains("underdetermined"), "{e}");
    let three = [ModalTarget::frequency(5.0), ModalTarget::frequency(10.0), ModalTarget::frequency(20.0)];
    assert!(calibrate(two, "two", &p("spring[pad].stiffness_n_per_m", 1e3, 1e6), &three, &o).is_err());
}

//! Response PSDs and image metrics against closed forms from published sources.

use approx::assert_relative_eq;
use num_complex::Complex64;
use std::f64::consts::PI;
use stillsky::FreqGrid;
use stillsky::image::{ImageOptions, p_outside_isotropic};
use stillsky::model::Model;
use stillsky::response::{Disturbances, response_psd, response_psd_cross};
use stillsky::spectrum::{Psd, Quantity};

fn sdof_viscous(k: f64, m: f64, c: f64) -> Model {
    let k_lines = format!("stiffness_n_per_m = {k}\ndamping_ns_per_m = {c}");
    Model::from_toml_str(&stillsky_tests::fixtures::sdof_toml(m, &k_lines), "sdof").unwrap()
}

#[test]
fn miles_equation_absolute_acceleration() {
    // Miles (1954), docs/references.md#s2: Grms = sqrt(π/2 · fn · Q · S) for white base
    // acceleration S; the exact value is larger by sqrt(1 + 1/Q²), well inside 2 %.
    for q in [25.0, 50.0] {
        let (k, m) = (4.0e5f64, 20.0f64);
        let zeta = 0.5 / q;
        let c = 2.0 * zeta * (k * m).sqrt();
        let model = sdof_viscous(k, m, c);
        let fn_hz = (k / m).sqrt() / (2.0 * PI);
        let grid = FreqGrid::log(fn_hz / 100.0, fn_hz * 100.0, 20001).unwrap();
        let s = 1.0e-4; // (m/s²)²/Hz
        let ground = Psd::on_grid(&grid, vec![s; grid.len()], Quantity::Acceleration).unwrap();
        let d = Disturbances { ground: [None, None, Some(ground)], ..Default::default() };
        let r = response_psd(&model, &grid, &d, &["mass:z"], false).unwrap();
        let acc = r.output_psd("mass:z", Quantity::Displacement).unwrap().to(Quantity::Acceleration).unwrap();
        let miles = (PI / 2.0 * fn_hz * q * s).sqrt();
        assert_relative_eq!(acc.rms(), miles, max_relative = 0.02);
        assert_relative_eq!(acc.rms(), miles * (1.0 + 1.0 / (q * q)).sqrt(), max_relative = 2e-3);
    }
}

#[test]
fn sdof_white_force_displacement_rms_exact() {
    // Crandall & Mark / Newland, docs/references.md#s3: σ_x² = G0/(4kc) for a one-sided per-Hz
    // white force level G0. m = 10 kg, k = 1e5 N/m, ζ = 0.02, G0 = 1 N²/Hz → σ_x = 2.5e-4 m.
    let (k, m, zeta) = (1e5f64, 10.0f64, 0.02f64);
    let c = 2.0 * zeta * (k * m).sqrt();
    let model = sdof_viscous(k, m, c);
    let grid = FreqGrid::log(0.01, 2000.0, 40001).unwrap();
    let f = Psd::on_grid(&grid, vec![1.0; grid.len()], Quantity::Force).unwrap();
    let d = Disturbances { loads: vec![("force:mass:z".into(), f)], ..Default::default() };
    let r = response_psd(&model, &grid, &d, &["mass:z"], true).unwrap();
    let x = r.output_psd("mass:z", Quantity::Displacement).unwrap();
    assert_relative_eq!(x.rms(), (1.0 / (4.0 * k * c)).sqrt(), max_relative = 0.005);
    // One mode carries everything for a single DOF under a force (no quasi-static ground part).
    let bm = r.by_mode.as_ref().unwrap();
    let share: f64 = trapz(&r.freq_hz, &bm[0][0]) / trapz(&r.freq_hz, &r.psd[0]);
    assert_relative_eq!(share, 1.0, max_relative = 1e-9);
}

fn trapz(f: &[f64], y: &[f64]) -> f64 {
    f.windows(2).zip(y.windows(2)).map(|(a, b)| 0.5 * (a[1] - a[0]) * (b[0] + b[1])).sum()
}

/// A tube on a two-axis mount on springs to ground, with optics (invented test rig).
fn rig(alt: f64, az: f64) -> Model {
    let text = format!(
        r#"
[[body]]
name = "head"
mass_kg = 8
cg_m = [0, 0, 1.2]
inertia_kgm2 = [0.2, 0.2, 0.3]
[[body]]
name = "payload"
mass_kg = 14
cg_m = [0, 0.05, 1.45]
inertia_kgm2 = [0.9, 0.8, 0.3]
[[spring]]
name = "leg1"
from = "ground"
to = "head"
from_at_m = [0.6, 0, 0]
to_at_m = [0.12, 0, 1.2]
stiffness_n_per_m = 4e6
loss_factor = 0.02
[[spring]]
name = "leg2"
from = "ground"
to = "head"
from_at_m = [-0.3, 0.52, 0]
to_at_m = [-0.06, 0.104, 1.2]
stiffness_n_per_m = 4e6
loss_factor = 0.02
[[spring]]
name = "leg3"
from = "ground"
to = "head"
from_at_m = [-0.3, -0.52, 0]
to_at_m = [-0.06, -0.104, 1.2]
stiffness_n_per_m = 4e6
loss_factor = 0.02
# Leg lines of a symmetric tripod meet at one point on its axis, so pinned legs leave the head
# free to rock about that point; leg bending supplies the rocking and yaw stiffness.
[[torsion_spring]]
name = "leg_bending_rx"
from = "ground"
to = "head"
axis = [1, 0, 0]
stiffness_nm_per_rad = 6e4
loss_factor = 0.02
[[torsion_spring]]
name = "leg_bending_ry"
from = "ground"
to = "head"
axis = [0, 1, 0]
stiffness_nm_per_rad = 6e4
loss_factor = 0.02
[[torsion_spring]]
name = "leg_bending_yaw"
from = "ground"
to = "head"
axis = [0, 0, 1]
stiffness_nm_per_rad = 2e4
loss_factor = 0.02
[[general_spring]]
name = "mount"
from = "head"
to = "payload"
at_m = [0, 0, 1.3]
matrix = [[2e7,0,0,0,0,0],[0,2e7,0,0,0,0],[0,0,2e7,0,0,0],[0,0,0,3e4,0,0],[0,0,0,0,2.5e4,0],[0,0,0,0,0,4e4]]
loss_factor = 0.03
[optics]
body = "payload"
focal_length_mm = 2800
pixel_um = 3.76
altitude_deg = {alt}
azimuth_deg = {az}
seeing_fwhm_arcsec = 2.0
[wind]
body = "payload"
centre_of_pressure_m = [0, 0.1, 1.5]
direction = [1, 0, 0]
area_m2 = 0.15
drag_coefficient = 1.2
"#
    );
    Model::from_toml_str(&text, "rig").unwrap()
}

#[test]
fn mode_shares_sum_to_one_and_cross_matrix_agrees() {
    let model = rig(45.0, 30.0);
    let grid = FreqGrid::log(0.5, 300.0, 1500).unwrap();
    let g = Psd::on_grid(&grid, grid.hz().iter().map(|f| 1e-9 / (1.0 + f)).collect(), Quantity::Acceleration)
        .unwrap();
    let d = Disturbances::default().with_ground_all(&g, [1.0, 1.0, 1.0]).unwrap();
    let im = model.image_motion(&grid, &d, &ImageOptions::default()).unwrap();
    let total: f64 = im.mode_share.iter().map(|m| m.share).sum();
    // Exact modal decomposition with cross terms: shares sum to 1 (to round-off).
    assert_relative_eq!(total, 1.0, max_relative = 1e-8);
    let inputs: f64 = im.input_share.iter().map(|(_, s)| s).sum();
    assert_relative_eq!(inputs, 1.0, max_relative = 1e-12);
    // A diagonal cross-spectral matrix reproduces the uncorrelated sum.
    let disp = g.to(Quantity::Displacement).unwrap();
    let s_in: Vec<Vec<Vec<Complex64>>> = disp
        .values()
        .iter()
        .map(|&v| {
            (0..3)
                .map(|i| (0..3).map(|j| Complex64::new(if i == j { v } else { 0.0 }, 0.0)).collect())
                .collect()
        })
        .collect();
    let sy = response_psd_cross(&model, &grid, &["ground_x", "ground_y", "ground_z"], &s_in, &["image_x"])
        .unwrap();
    let r = response_psd(&model, &grid, &d, &["image_x"], false).unwrap();
    for (a, b) in sy[0].iter().zip(&r.psd[0]) {
        assert_relative_eq!(*a, *b, max_relative = 1e-10, epsilon = 1e-300);
    }
}

#[test]
fn exposure_split_and_probabilities() {
    let model = rig(60.0, 0.0);
    let grid = FreqGrid::log(0.2, 200.0, 1200).unwrap();
    let wind = stillsky::wind::WindSpec::new(
        stillsky::wind::WindSpectrum::Kaimal,
        4.0,
        2.0,
        stillsky::wind::Turbulence::Intensity(0.2),
    );
    let d = Disturbances { wind: Some(wind), ..Default::default() };
    let base = model.image_motion(&grid, &d, &ImageOptions::default()).unwrap();
    assert!(base.rms_arcsec > 0.0);
    for t in [0.01, 0.5, 3.0] {
        let im = model.image_motion(&grid, &d, &ImageOptions::default().exposure(t)).unwrap();
        let e = im.exposure.unwrap();
        // Wander + smear = total mean square (docs/references.md#s11, boxcar average).
        assert_relative_eq!(
            e.wander_rms_arcsec.powi(2) + e.smear_rms_arcsec.powi(2),
            im.rms_arcsec.powi(2),
            max_relative = 1e-9
        );
    }
    let tiny =
        model.image_motion(&grid, &d, &ImageOptions::default().exposure(1e-9)).unwrap().exposure.unwrap();
    assert_relative_eq!(tiny.wander_rms_arcsec, base.rms_arcsec, max_relative = 1e-9);
    // Units: µm = f_mm·1000·rad and px = µm / pixel (docs/references.md#s11).
    assert_relative_eq!(base.rms_um, base.rms_arcsec / 206264.806 * 2800.0 * 1000.0, max_relative = 1e-8);
    assert_relative_eq!(base.rms_px, base.rms_um / 3.76, max_relative = 1e-9);
    // Isotropic check of the probability helper against the per-axis σ when both axes agree.
    let sigma = base.rms_arcsec / 2f64.sqrt();
    assert!(p_outside_isotropic(0.5 * base.plate_scale_arcsec_per_px, sigma) > 0.0);
    // Blur added in quadrature with seeing (common practice): total ≥ seeing.
    let tot = base.total_fwhm_arcsec.unwrap();
    assert!(tot[0] >= 2.0 && tot[1] >= 2.0);
}

#[test]
fn bad_disturbances_are_named() {
    let model = rig(45.0, 0.0);
    let grid = FreqGrid::log(1.0, 100.0, 50).unwrap();
    let e = model.image_motion(&grid, &Disturbances::default(), &ImageOptions::default()).unwrap_err();
    assert!(e.to_string().contains("disturbances"), "{e}");
    let f = Psd::on_grid(&grid, vec![1.0; 50], Quantity::Force).unwrap();
    let d = Disturbances { ground: [Some(f), None, None], ..Default::default() };
    let e = model.image_motion(&grid, &d, &ImageOptions::default()).unwrap_err();
    assert!(e.to_string().contains("ground PSD"), "{e}");
}

//! Reference checks of the structural engine against closed forms from published sources.

use approx::assert_relative_eq;
use num_complex::Complex64;
use std::f64::consts::PI;
use stillsky::{Error, model::Model};

fn sdof(k: &str, m: f64) -> String {
    stillsky_tests::fixtures::sdof_toml(m, k)
}

#[test]
fn sdof_hysteretic_matches_den_hartog_transmissibility() {
    // Den Hartog, Mechanical Vibrations (docs/references.md#s1): with a complex spring k(1+iη),
    // T = (1 + iη) / (1 − r² + iη).
    let (k, m, eta) = (4.0e5_f64, 25.0_f64, 0.08_f64);
    let model =
        Model::from_toml_str(&sdof(&format!("stiffness_n_per_m = {k}\nloss_factor = {eta}"), m), "sdof")
            .unwrap();
    let fn_hz = (k / m).sqrt() / (2.0 * PI);
    let r: Vec<f64> = (0..200).map(|i| 0.1 * 100f64.powf(i as f64 / 199.0)).collect();
    let f: Vec<f64> = r.iter().map(|r| r * fn_hz).collect();
    let h = model.frf(&f, &["ground_z"], &["mass:z"]).unwrap().series("mass:z", "ground_z").unwrap();
    for (ri, hi) in r.iter().zip(&h) {
        let t = Complex64::new(1.0, eta) / Complex64::new(1.0 - ri * ri, eta);
        assert_relative_eq!(hi.re, t.re, max_relative = 1e-9, epsilon = 1e-12);
        assert_relative_eq!(hi.im, t.im, max_relative = 1e-9, epsilon = 1e-12);
    }
    // Peak at r = 1 equals sqrt(1 + η²)/η (docs/references.md#s1).
    let t1 = model.frf(&[fn_hz], &["ground_z"], &["mass:z"]).unwrap().data[[0, 0, 0]].norm();
    assert_relative_eq!(t1, (1.0 + eta * eta).sqrt() / eta, max_relative = 1e-9);
}

#[test]
fn sdof_viscous_matches_den_hartog_transmissibility() {
    // Den Hartog / Ogata (docs/references.md#s1): T = (1 + i2ζr)/(1 − r² + i2ζr).
    let (k, m, zeta) = (2.0e5_f64, 10.0_f64, 0.03_f64);
    let c = 2.0 * zeta * (k * m).sqrt();
    let model =
        Model::from_toml_str(&sdof(&format!("stiffness_n_per_m = {k}\ndamping_ns_per_m = {c}"), m), "sdof")
            .unwrap();
    let fn_hz = (k / m).sqrt() / (2.0 * PI);
    for r in [0.1, 0.5, 0.9, 1.0, 1.2, std::f64::consts::SQRT_2, 3.0, 10.0] {
        let h = model.frf(&[r * fn_hz], &["ground_z"], &["mass:z"]).unwrap().data[[0, 0, 0]];
        let t = Complex64::new(1.0, 2.0 * zeta * r) / Complex64::new(1.0 - r * r, 2.0 * zeta * r);
        assert_relative_eq!((h - t).norm() / t.norm(), 0.0, epsilon = 1e-9);
    }
    // |T| = 1 at r = √2 for any damping (docs/references.md#s1).
    let h = model.frf(&[2f64.sqrt() * fn_hz], &["ground_z"], &["mass:z"]).unwrap().data[[0, 0, 0]];
    assert_relative_eq!(h.norm(), 1.0, max_relative = 1e-9);
    // Modal damping estimate equals ζ for a single viscous DOF.
    let modes = model.modes().unwrap();
    assert_relative_eq!(modes.frequency_hz[0], fn_hz, max_relative = 1e-12);
    assert_relative_eq!(modes.damping_ratio[0], zeta, max_relative = 1e-9);
}

#[test]
fn soft_pad_in_series_with_stiff_leg() {
    // Springs in series: k_eff = k_pad / (1 + k_pad/k_leg) (elementary mechanics); the mass on
    // that chain has f_n = sqrt(k_eff/m)/2π.
    let (kl, kp, m) = (5.0e7_f64, 3.0e5_f64, 12.0_f64);
    let text =
        sdof(&format!("series = [ {{ stiffness_n_per_m = {kl} }}, {{ stiffness_n_per_m = {kp} }} ]"), m);
    let model = Model::from_toml_str(&text, "chain").unwrap();
    let keff = kp / (1.0 + kp / kl);
    let f = model.modes().unwrap().frequency_hz[0];
    assert_relative_eq!(f, (keff / m).sqrt() / (2.0 * PI), max_relative = 1e-9);
    // Explicit intermediate node gives the same mode: the series combinator is the same physics.
    let text2 = format!(
        r#"
[[body]]
name = "mass"
mass_kg = {m}
cg_m = [0, 0, 1]
inertia_kgm2 = [1, 1, 1]
dofs = ["z"]
[[node]]
name = "foot"
mass_kg = 1e-6
at_m = [0, 0, 0.5]
dofs = ["z"]
[[spring]]
name = "pad"
from = "ground"
to = "foot"
at_m = [0, 0, 0.5]
direction = [0, 0, 1]
stiffness_n_per_m = {kp}
[[spring]]
name = "leg"
from = "foot"
to = "mass"
at_m = [0, 0, 0.5]
direction = [0, 0, 1]
stiffness_n_per_m = {kl}
"#
    );
    let f2 = Model::from_toml_str(&text2, "chain2").unwrap().modes().unwrap().frequency_hz[0];
    assert_relative_eq!(f2, f, max_relative = 1e-6);
}

fn cantilever(elements: usize, tip_mass: Option<f64>) -> String {
    let mut s = String::new();
    // A vertical steel rod clamped to the ground at z = 0, free at z = 1 m. The top is a body
    // (tiny unless a tip mass is given) that the beam clamps to.
    let m = tip_mass.unwrap_or(1e-6);
    let j = tip_mass.map_or(1e-9, |_| 1e-9);
    s.push_str(&format!(
        r#"
[[body]]
name = "tip"
mass_kg = {m}
cg_m = [0, 0, 1]
inertia_kgm2 = [{j}, {j}, {j}]

[[beam]]
name = "column"
from = "ground"
to = "tip"
from_at_m = [0, 0, 0]
to_at_m = [0, 0, 1]
section = {{ shape = "rod", diameter_m = 0.02 }}
material_properties = {{ youngs_modulus_pa = 2.0e11, poisson_ratio = 0.3, density_kg_m3 = 7850, yield_strength_pa = 2.5e8 }}
elements = {elements}
"#
    ));
    s
}

#[test]
fn cantilever_frequencies_match_euler_bernoulli() {
    // Blevins, Formulas for Natural Frequency and Mode Shape (1979), cantilever:
    // f_i = λ_i²/(2π L²) sqrt(EI/μ), λ₁ = 1.8751, λ₂ = 4.6941.
    let (e, d, rho, l) = (2.0e11_f64, 0.02f64, 7850.0_f64, 1.0_f64);
    let i = PI * d.powi(4) / 64.0;
    let mu = rho * PI * d * d / 4.0;
    let f = |lam: f64| lam * lam / (2.0 * PI * l * l) * (e * i / mu).sqrt();
    let model = Model::from_toml_str(&cantilever(8, None), "cantilever").unwrap();
    let modes = model.modes().unwrap();
    // Bending modes come in pairs (x and y); the first two pairs are the lowest four modes.
    let fr = &modes.frequency_hz;
    assert_relative_eq!(fr[0], f(1.8751), max_relative = 0.005);
    assert_relative_eq!(fr[1], f(1.8751), max_relative = 0.005);
    assert_relative_eq!(fr[2], f(4.6941), max_relative = 0.005);
    assert_relative_eq!(fr[3], f(4.6941), max_relative = 0.005);
}

#[test]
fn cantilever_with_tip_mass_matches_rayleigh() {
    // Rayleigh estimate (Blevins; Thomson, Theory of Vibration): k = 3EI/L³ with the tip mass
    // plus 33/140 of the beam mass: f = sqrt(k/(M + 0.2357 m_b))/2π.
    let (e, d, rho, l, tip) = (2.0e11_f64, 0.02f64, 7850.0_f64, 1.0_f64, 5.0_f64);
    let i = PI * d.powi(4) / 64.0;
    let mb = rho * PI * d * d / 4.0 * l;
    let k = 3.0 * e * i / l.powi(3);
    let f_r = (k / (tip + 33.0 / 140.0 * mb)).sqrt() / (2.0 * PI);
    let model = Model::from_toml_str(&cantilever(8, Some(tip)), "tipmass").unwrap();
    let f0 = model.modes().unwrap().frequency_hz[0];
    assert_relative_eq!(f0, f_r, max_relative = 0.02);
}

#[test]
fn offset_attachment_couples_translation_and_rotation() {
    // A planar body (x, ry free) held by one horizontal spring k acting at height h above its CG.
    // The spring stretches by u_x + θ_y·h (u_p = u + θ × r with r = (0, 0, h)), so by hand
    // K = k [[1, h], [h, h²]] over (x, ry).
    let (k, h) = (1000.0, 0.3);
    let text = format!(
        r#"
[[body]]
name = "b"
mass_kg = 2
cg_m = [0, 0, 1]
inertia_kgm2 = [0.1, 0.1, 0.1]
dofs = ["x", "ry"]
[[spring]]
name = "s"
from = "ground"
to = "b"
at_m = [0, 0, {z}]
direction = [1, 0, 0]
stiffness_n_per_m = {k}
[[spring]]
name = "s2"
from = "ground"
to = "b"
at_m = [0, 0, 1]
direction = [1, 0, 0]
stiffness_n_per_m = 1.0
"#,
        z = 1.0 + h
    );
    let model = Model::from_toml_str(&text, "offset").unwrap();
    let kk = model.stiffness_matrix(1.0);
    assert_relative_eq!(kk[[0, 0]].re, k + 1.0, max_relative = 1e-12);
    assert_relative_eq!(kk[[0, 1]].re, k * h, max_relative = 1e-12);
    assert_relative_eq!(kk[[1, 0]].re, k * h, max_relative = 1e-12);
    assert_relative_eq!(kk[[1, 1]].re, k * h * h, max_relative = 1e-12);
}

#[test]
fn wind_above_pivot_turns_body_downwind() {
    // A body on a torsion spring about y at its CG; a +x force at height h above the CG gives a
    // moment r × F = (0,0,h) × (F,0,0) = (0, hF, 0): positive rotation about y, θ = hF/k_t.
    let (kt, h) = (500.0, 0.4);
    let text = format!(
        r#"
[[body]]
name = "tube"
mass_kg = 5
cg_m = [0, 0, 1]
inertia_kgm2 = [0.2, 0.2, 0.2]
dofs = ["ry"]
[[torsion_spring]]
name = "axis"
from = "ground"
to = "tube"
axis = [0, 1, 0]
stiffness_nm_per_rad = {kt}
[wind]
body = "tube"
centre_of_pressure_m = [0, 0, {z}]
direction = [1, 0, 0]
area_m2 = 0.1
drag_coefficient = 1.0
"#,
        z = 1.0 + h
    );
    let model = Model::from_toml_str(&text, "wind").unwrap();
    let th = model.frf(&[1e-3], &["wind"], &["tube:ry"]).unwrap().data[[0, 0, 0]];
    assert_relative_eq!(th.re, h / kt, max_relative = 1e-6);
}

#[test]
fn unsupported_and_bad_models_are_named() {
    // A body with no connection to the ground is refused, naming the body and DOF.
    let text = r#"
[[body]]
name = "floating"
mass_kg = 1
cg_m = [0, 0, 0]
inertia_kgm2 = [1, 1, 1]
dofs = ["z"]
"#;
    let e = Model::from_toml_str(text, "free").unwrap_err();
    assert!(matches!(e, Error::UnsupportedModel { .. }), "{e}");
    assert!(e.to_string().contains("'floating'") && e.to_string().contains(" z "), "{e}");
    // Unknown key: named with its line.
    let e =
        Model::from_toml_str(&sdof("stiffness_n_per_m = 1e5\nstifness = 3", 1.0), "typo.toml").unwrap_err();
    assert!(matches!(e, Error::Parse { .. }), "{e}");
    let s = e.to_string();
    assert!(s.contains("stifness") && s.contains("typo.toml") && s.contains("line 17"), "{s}");
    // Negative stiffness, NaN mass, zero direction: each names its field.
    let e = Model::from_toml_str(&sdof("stiffness_n_per_m = -5", 1.0), "neg").unwrap_err();
    assert!(e.to_string().contains("spring 'support'.stiffness"), "{e}");
    let e = Model::from_toml_str(&sdof("stiffness_n_per_m = 5", -1.0), "negm").unwrap_err();
    assert!(e.to_string().contains("mass_kg"), "{e}");
    let e = Model::from_toml_str(
        &sdof("stiffness_n_per_m = 5", 1.0).replace("direction = [0, 0, 1]", "direction = [0, 0, 0]"),
        "d",
    )
    .unwrap_err();
    assert!(e.to_string().contains("direction"), "{e}");
    let e = Model::from_toml_str(
        &sdof("stiffness_n_per_m = 5", 1.0).replace("from = \"ground\"", "from = \"grund\""),
        "d",
    )
    .unwrap_err();
    assert!(matches!(e, Error::UnknownName { .. }) && e.to_string().contains("grund"), "{e}");
    // Bad grids for the FRF.
    let model = Model::from_toml_str(&sdof("stiffness_n_per_m = 5", 1.0), "ok").unwrap();
    assert!(matches!(model.frf(&[2.0, 1.0], &["ground_z"], &["mass:z"]), Err(Error::InvalidGrid { .. })));
    assert!(matches!(model.frf(&[1.0], &["ground_w"], &["mass:z"]), Err(Error::UnknownName { .. })));
    assert!(matches!(model.frf(&[1.0], &["ground_z"], &["mass:x"]), Err(Error::InvalidArgument { .. })));
}

#[test]
fn frf_equals_independent_dense_solve() {
    // Z(ω) x = b rebuilt from the exposed matrices and vectors, solved by plain Gaussian
    // elimination here (an independent path), agrees with the model's FRF.
    let model = Model::from_toml_str(&cantilever(3, Some(2.0)), "c").unwrap();
    let n = model.dof_count();
    for f in [0.7, 13.0, 95.0] {
        let w = 2.0 * PI * f;
        let (m, c, k) = (model.mass_matrix(), model.damping_matrix(), model.stiffness_matrix(f));
        let mut a = vec![vec![Complex64::default(); n + 1]; n];
        let b = model.input_vector("ground_x", f).unwrap();
        for i in 0..n {
            for j in 0..n {
                a[i][j] = k[[i, j]] + Complex64::new(-w * w * m[[i, j]], w * c[[i, j]]);
            }
            a[i][n] = b[i];
        }
        for col in 0..n {
            let p = (col..n).max_by(|&x, &y| a[x][col].norm().total_cmp(&a[y][col].norm())).unwrap();
            a.swap(col, p);
            for r in 0..n {
                if r != col {
                    let fac = a[r][col] / a[col][col];
                    for cc in col..=n {
                        let v = a[col][cc];
                        a[r][cc] -= fac * v;
                    }
                }
            }
        }
        let x: Vec<Complex64> = (0..n).map(|i| a[i][n] / a[i][i]).collect();
        let row = model.output_vector("tip:x").unwrap();
        let expect: Complex64 = row.iter().zip(&x).map(|(r, xv)| xv * *r).sum();
        let got = model.frf(&[f], &["ground_x"], &["tip:x"]).unwrap().data[[0, 0, 0]];
        assert_relative_eq!((got - expect).norm() / expect.norm(), 0.0, epsilon = 1e-9);
    }
    // Ground transmissibility → 1 as f → 0 (rigid-body motion with the ground).
    let t = model.frf(&[1e-4], &["ground_x"], &["tip:x"]).unwrap().data[[0, 0, 0]];
    assert_relative_eq!(t.re, 1.0, max_relative = 1e-6);
}

#[test]
fn demo_rigs_pass_static_checks_and_tip_only_in_strong_wind() {
    // Static checks of the invented demo rigs: leg stress far below yield (a ~20 kg payload on
    // steel legs), and the tripod tips only in a wind far above the default 10 m/s.
    use stillsky::checks::{StaticWind, Verdict, rig_checks};
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../docs/examples");
    for name in ["tripod-lawn.toml", "pier.toml"] {
        let f = stillsky::schema::ModelFile::read(&dir.join(name)).unwrap();
        let r = rig_checks(&f, &StaticWind::default(), &Default::default()).unwrap();
        assert!(!r.checks.is_empty());
        assert!(r.checks[0].margin > 5.0, "{name}: {:?}", r.checks[0]);
        assert!(r.verdict() != Verdict::Fail, "{name}: {r:?}");
    }
    // Hurricane wind tips the tripod (a check that can fail).
    let f = stillsky::schema::ModelFile::read(&dir.join("tripod-lawn.toml")).unwrap();
    let storm = StaticWind { speed_m_s: 80.0, gust_factor: 2.0, air_density_kg_m3: 1.225 };
    let r = rig_checks(&f, &storm, &Default::default()).unwrap();
    assert_eq!(r.verdict(), Verdict::Fail, "{r:?}");
}

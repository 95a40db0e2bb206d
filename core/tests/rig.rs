//! Checks of the rig builders against hand calculations and the half-space formulas.

use approx::assert_relative_eq;
use std::f64::consts::PI;
use stillsky::Error;
use stillsky::assembly::ModelSpec;
use stillsky::model::Model;
use stillsky::schema::{ModelFile, spec_to_toml};

fn example(name: &str) -> std::path::PathBuf {
    std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../docs/examples").join(name)
}

fn spec(text: &str) -> ModelSpec {
    ModelFile::parse(text, "test").unwrap().expanded().unwrap()
}

fn spring_k(spec: &ModelSpec, name: &str) -> f64 {
    let s = spec.springs.iter().chain(&spec.torsion_springs).find(|s| s.name == name).unwrap();
    s.stiffness_n_per_m.or(s.stiffness_nm_per_rad).unwrap()
}

/// Index of the mode with the largest effective mass for ground input `d` (0 x, 1 y, 2 z).
fn mode_along(modes: &stillsky::modes::Modes, d: usize) -> usize {
    (0..modes.frequency_hz.len())
        .max_by(|&a, &b| modes.effective_mass_kg[[a, d]].total_cmp(&modes.effective_mass_kg[[b, d]]))
        .unwrap()
}

#[test]
fn demo_files_load_with_modes_in_plausible_ranges() {
    // Ranges: tripods 5–20 Hz, piers 10–40 Hz for the first mode (common practice, no source).
    for (file, lo, hi) in [
        ("tripod-lawn.toml", 5.0, 20.0),
        ("tripod-paver.toml", 5.0, 20.0),
        ("pier.toml", 10.0, 40.0),
        ("equatorial-pier.toml", 10.0, 40.0),
    ] {
        let mf = ModelFile::read(&example(file)).unwrap();
        let model = mf.to_model().unwrap();
        let f0 = model.modes().unwrap().frequency_hz[0];
        assert!((lo..=hi).contains(&f0), "{file}: first mode {f0} Hz outside [{lo}, {hi}]");
        // The printed generic layer is a model file of its own and builds the same structure.
        let text = spec_to_toml(&mf.expanded().unwrap()).unwrap();
        let again = Model::from_toml_str(&text, file).unwrap();
        assert_relative_eq!(again.modes().unwrap().frequency_hz[0], f0, max_relative = 1e-9);
        assert!(model.output_names().iter().any(|o| o == "image_x"));
    }
}

const TRIPOD: &str = r#"
[payload]
mass_kg = 20.0
inertia_kgm2 = [0.4, 1.0, 1.0]

[mount]
mass_kg = 5.0
inertia_kgm2 = [0.1, 0.1, 0.1]
pivot_height_m = 0.2
tilt_stiffness_nm_per_rad = 1e5
yaw_stiffness_nm_per_rad = 1e5
translational_stiffness_n_per_m = 1e12

[tripod]
head_radius_m = 0.1
leg_length_m = 1.2
splay_deg = 25
leg_section = { shape = "tube", outer_diameter_m = 0.03, wall_m = 0.002 }
leg_material = "stainless-304"
leg_mass_kg = 0.5

[ground]
kind = "rigid"
"#;

#[test]
fn tripod_leg_spring_and_vertical_mode_match_statics() {
    // Leg EA/L with the tube area (π/4)(D_o² − D_i²) (docs/references.md#s9) and E = 193 GPa
    // (stainless-304 preset, docs/references.md#s9).
    let s = spec(TRIPOD);
    let (e, d, t, l) = (193e9, 0.03_f64, 0.002, 1.2);
    let a = PI / 4.0 * (d * d - (d - 2.0 * t).powi(2));
    assert_relative_eq!(spring_k(&s, "leg1"), e * a / l, max_relative = 1e-12);
    // Vertical mode of a symmetric tripod on rigid ground: k_v = N (EA/L) cos²θ (elementary
    // statics of inclined two-force members); the mass on the legs is the payload, the mount and
    // the upper half of each leg. The 1e12 N/m pivot adds ~1e-4 relative compliance.
    let th = 25f64.to_radians();
    let kv = 3.0 * e * a / l * th.cos().powi(2);
    let m = 20.0 + 5.0 + 3.0 * 0.25;
    let model = Model::from_spec(&s).unwrap();
    let modes = model.modes().unwrap();
    let j = mode_along(&modes, 2);
    assert_relative_eq!(modes.frequency_hz[j], (kv / m).sqrt() / (2.0 * PI), max_relative = 1e-3);
    // Its effective mass is the whole mass on the legs.
    assert_relative_eq!(modes.effective_mass_kg[[j, 2]], m, max_relative = 1e-3);
}

#[test]
fn pad_in_series_lowers_vertical_mode_by_series_rule() {
    // Pads in series under each foot: per leg k = k_pad / (1 + k_pad / (k_leg cos²θ)) (series
    // springs, elementary mechanics); f = sqrt(N k / m) / 2π. The pads are stiff in shear so
    // the feet move only vertically; the feet carry 0.01 kg each (negligible).
    let k_pad = 2.0e5;
    let text = TRIPOD.replace("leg_mass_kg = 0.5", "leg_mass_kg = 0.02").replace(
        "[ground]",
        &format!(
            "[pads]\ncompression = {{ stiffness_n_per_m = {k_pad} }}\nshear = {{ stiffness_n_per_m = 1e10 }}\n\n[ground]"
        ),
    );
    let s = spec(&text);
    let (e, d, t, l) = (193e9, 0.03_f64, 0.002, 1.2);
    let a = PI / 4.0 * (d * d - (d - 2.0 * t).powi(2));
    let k_leg_v = e * a / l * 25f64.to_radians().cos().powi(2);
    let k = k_pad / (1.0 + k_pad / k_leg_v);
    let m = 20.0 + 5.0 + 3.0 * 0.01;
    let modes = Model::from_spec(&s).unwrap().modes().unwrap();
    let j = mode_along(&modes, 2);
    assert_relative_eq!(modes.frequency_hz[j], (3.0 * k / m).sqrt() / (2.0 * PI), max_relative = 2e-3);
    // ... far below the bare tripod's vertical mode.
    let bare = Model::from_spec(&spec(TRIPOD)).unwrap().modes().unwrap();
    assert!(modes.frequency_hz[j] < 0.2 * bare.frequency_hz[mode_along(&bare, 2)]);
}

fn posed_text(alt: f64, az: f64) -> String {
    std::fs::read_to_string(example("tripod-paver.toml"))
        .unwrap()
        .replace("altitude_deg = 45", &format!("altitude_deg = {alt}"))
        .replace("azimuth_deg = 135", &format!("azimuth_deg = {az}"))
}

fn posed(alt: f64, az: f64) -> ModelSpec {
    spec(&posed_text(alt, az))
}

/// Invariants of a symmetric 3 × 3 tensor: trace, sum of principal 2 × 2 minors, determinant.
/// Equal invariants ⇔ equal eigenvalues (principal moments).
fn invariants(b: &stillsky::assembly::BodySpec) -> [f64; 3] {
    let [xx, yy, zz] = b.inertia_kgm2;
    let [xy, xz, yz] = b.products_kgm2;
    [
        xx + yy + zz,
        xx * yy + yy * zz + zz * xx - xy * xy - xz * xz - yz * yz,
        xx * (yy * zz - yz * yz) - xy * (xy * zz - yz * xz) + xz * (xy * yz - yy * xz),
    ]
}

#[test]
fn payload_pose_rotates_the_inertia_tensor() {
    // A rotation J' = R J Rᵀ keeps mass, trace and principal moments (tensor invariants; any
    // rigid-body dynamics text) and the CG's distance from the pivot.
    let (a, b) = (posed(90.0, 0.0), posed(30.0, 200.0));
    let pa = a.bodies.iter().find(|b| b.name == "payload").unwrap();
    let pb = b.bodies.iter().find(|b| b.name == "payload").unwrap();
    assert_relative_eq!(pa.mass_kg, 24.7, max_relative = 1e-12);
    assert_relative_eq!(pa.mass_kg, pb.mass_kg, max_relative = 1e-12);
    for (x, y) in invariants(pa).iter().zip(invariants(pb)) {
        assert_relative_eq!(*x, y, max_relative = 1e-10);
    }
    assert!(pb.products_kgm2.iter().any(|p| p.abs() > 1e-3), "a tilted pose has products of inertia");
    let pivot = a.springs.iter().find(|s| s.name == "pivot_x").unwrap().at_m.unwrap();
    let dist = |c: [f64; 3]| {
        ((c[0] - pivot[0]).powi(2) + (c[1] - pivot[1]).powi(2) + (c[2] - pivot[2]).powi(2)).sqrt()
    };
    assert_relative_eq!(dist(pa.cg_m), dist(pb.cg_m), max_relative = 1e-10);
    // Image motion is defined (finite, non-zero) at both pointings.
    for s in [a, b] {
        let m = Model::from_spec(&s).unwrap();
        let h = m.frf(&[5.0, 12.0, 30.0], &["ground_x", "ground_y"], &["image_x", "image_y"]).unwrap();
        assert!(h.data.iter().all(|c| c.re.is_finite() && c.im.is_finite()));
        assert!(h.data.iter().map(|c| c.norm()).fold(0.0, f64::max) > 1e-6);
    }
}

#[test]
fn payload_parts_match_cylinder_formulas() {
    // A thin-walled tube (R = r) centred on the pivot at the zenith: axial J = m R², transverse
    // m (6R² + L²)/12; a point counterweight at s on the shaft (x axis at azimuth 0) adds m s²
    // about y and z, shifted to the common CG (standard rigid-body tables, Meriam & Kraige).
    let text = TRIPOD.replace(
        "mass_kg = 20.0\ninertia_kgm2 = [0.4, 1.0, 1.0]",
        "parts = [ { kind = \"tube\", mass_kg = 10, length_m = 0.6, diameter_m = 0.3 }, { kind = \"point\", mass_kg = 5, shaft_m = -0.3 } ]",
    );
    let s = spec(&text);
    let p = s.bodies.iter().find(|b| b.name == "payload").unwrap();
    let (mt, r, l, mc, sc) = (10.0, 0.15_f64, 0.6_f64, 5.0, -0.3_f64);
    let xc = mc * sc / (mt + mc);
    assert_relative_eq!(p.cg_m[0], xc, max_relative = 1e-12);
    let shift = mt * xc * xc + mc * (sc - xc).powi(2);
    let jt = mt * (6.0 * r * r + l * l) / 12.0;
    assert_relative_eq!(p.inertia_kgm2[0], jt, max_relative = 1e-12); // about the shaft
    assert_relative_eq!(p.inertia_kgm2[1], jt + shift, max_relative = 1e-12);
    assert_relative_eq!(p.inertia_kgm2[2], mt * r * r + shift, max_relative = 1e-12); // line of sight
}

const PIER: &str = r#"
[payload]
mass_kg = 20.0
inertia_kgm2 = [0.4, 1.0, 1.0]

[mount]
mass_kg = 15.0
inertia_kgm2 = [0.3, 0.3, 0.3]
pivot_height_m = 0.3
tilt_stiffness_nm_per_rad = 3e4
yaw_stiffness_nm_per_rad = 2e4

[pier]
section = { shape = "tube", outer_diameter_m = 0.1683, wall_m = 0.0045 }
material = "steel-s235"
height_m = 1.2
fill_density_kg_m3 = 2400
added_loss_factor = 0.02
footing = { diameter_m = 1.0, depth_m = 0.7 }

[ground]
soil = "lawn"
"#;

#[test]
fn pier_footing_springs_are_the_half_space_formulas() {
    // Arya, O'Neill & Pincus (1979) ch. 4 via docs/references.md#s8-1, rigid circular footing:
    // K_z = 4GR/(1−ν), K_x = 32(1−ν)GR/(7−8ν), K_ψ = 8GR³/(3(1−ν)), K_t = 16GR³/3; lawn preset
    // G = 20 MPa, ν = 0.33 (docs/references.md#s8-3 worked row).
    let s = spec(PIER);
    let (g, nu, r) = (20e6, 0.33, 0.5_f64);
    assert_relative_eq!(spring_k(&s, "footing_z"), 4.0 * g * r / (1.0 - nu), max_relative = 1e-12);
    for n in ["footing_x", "footing_y"] {
        assert_relative_eq!(
            spring_k(&s, n),
            32.0 * (1.0 - nu) * g * r / (7.0 - 8.0 * nu),
            max_relative = 1e-12
        );
    }
    for n in ["footing_rx", "footing_ry"] {
        assert_relative_eq!(spring_k(&s, n), 8.0 * g * r.powi(3) / (3.0 * (1.0 - nu)), max_relative = 1e-12);
    }
    assert_relative_eq!(spring_k(&s, "footing_rz"), 16.0 * g * r.powi(3) / 3.0, max_relative = 1e-12);
    // Footing block: ρ π R² d with ρ = 2400 (docs/references.md#s8-4), and the fill as added mass
    // per length ρ_fill (π/4) D_i².
    let f = s.bodies.iter().find(|b| b.name == "footing").unwrap();
    assert_relative_eq!(f.mass_kg, 2400.0 * PI * r * r * 0.7, max_relative = 1e-12);
    let beam = s.beams.iter().find(|b| b.name == "pier").unwrap();
    assert_relative_eq!(beam.added_mass_kg_per_m, 2400.0 * PI / 4.0 * 0.1593f64.powi(2), max_relative = 1e-9);
    Model::from_spec(&s).unwrap().modes().unwrap();
}

#[test]
fn embedded_pier_footing_on_the_frequency_impedance() {
    // Embedment factors of docs/references.md#s8-5 at D/R = 0.35/0.5 = 0.7 on the springs of
    // docs/references.md#s8-1 (lawn: G = 20 MPa, ν = 0.33, ρ = 1600, R = 0.5 m).
    let text = PIER
        .replace("depth_m = 0.7 }", "depth_m = 0.7, embedment_m = 0.35 }")
        .replace("soil = \"lawn\"", "soil = \"lawn\"\nradiation_damping = \"frequency\"");
    let s = spec(&text);
    let (g, nu, r, e) = (20e6, 0.33, 0.5_f64, 0.7);
    let half_space = |name: &str| {
        let sp = s.springs.iter().chain(&s.torsion_springs).find(|x| x.name == name).unwrap();
        sp.half_space.clone().unwrap()
    };
    let kr = half_space("footing_rx");
    assert_eq!(kr.mode, stillsky::soil::FootingMode::Rocking);
    assert_relative_eq!(
        kr.static_stiffness,
        8.0 * g * r.powi(3) / (3.0 * (1.0 - nu)) * (1.0 + 2.0 * e),
        max_relative = 1e-12
    );
    assert_relative_eq!(
        half_space("footing_z").static_stiffness,
        4.0 * g * r / (1.0 - nu) * (1.0 + 0.54 * e),
        max_relative = 1e-12
    );
    assert_relative_eq!(
        half_space("footing_x").static_stiffness,
        32.0 * (1.0 - nu) * g * r / (7.0 - 8.0 * nu) * (1.0 + 2.0 * e / 3.0),
        max_relative = 1e-12
    );
    assert_relative_eq!(
        half_space("footing_rz").static_stiffness,
        16.0 * g * r.powi(3) / 3.0 * (1.0 + 2.67 * e),
        max_relative = 1e-12
    );
    assert_relative_eq!(kr.shear_wave_speed_m_s, (20e6_f64 / 1600.0).sqrt(), max_relative = 1e-12);
    // The impedance model is evaluated per frequency: FRF (direct path) and modes both run, and
    // the model file round-trips through its expanded spec.
    let model = Model::from_spec(&s).unwrap();
    let modes = model.modes().unwrap();
    assert!(modes.frequency_hz[0] > 1.0);
    model.frf(&[5.0, 14.0, 40.0], &["ground_x"], &["mount:x"]).unwrap();
    // Embedment deeper than the block, and an unknown radiation choice, are named.
    let e = ModelFile::parse(&PIER.replace("depth_m = 0.7 }", "depth_m = 0.7, embedment_m = 0.9 }"), "t")
        .unwrap()
        .expanded()
        .unwrap_err();
    assert!(e.to_string().contains("pier.footing.embedment_m"), "{e}");
    let e = ModelFile::parse(
        &PIER.replace("soil = \"lawn\"", "soil = \"lawn\"\nradiation_damping = \"waves\""),
        "t",
    )
    .and_then(|f| f.expanded())
    .unwrap_err();
    assert!(e.to_string().contains("ground.radiation_damping"), "{e}");
}

const FLOOR: &str = r#"
[floor]
mass_kg = 400
inertia_kgm2 = [200, 300, 450]
height_m = 0.5
cg_m = [1.2, 0.6, 0.45]
vertical_stiffness_n_per_m = 4e6
rocking_stiffness_nm_per_rad = 2e6
horizontal_stiffness_n_per_m = 5e6
torsion_stiffness_nm_per_rad = 2e6
loss_factor = 0.05
"#;

const OPTICS: &str = r#"
[optics]
focal_length_mm = 2800
pixel_um = 3.76
altitude_deg = 40
azimuth_deg = 60
"#;

fn walking_peak(text: &str) -> f64 {
    let model = Model::from_toml_str(text, "floor").unwrap();
    let f: Vec<f64> = (0..300).map(|i| 1.0 * 100f64.powf(i as f64 / 299.0)).collect();
    let h = model.frf(&f, &["force:floor:z"], &["image_x", "image_y"]).unwrap();
    h.data.iter().map(|c| c.norm()).fold(0.0, f64::max)
}

#[test]
fn walking_on_the_floor_reaches_the_image_unless_the_pier_is_isolated() {
    // Load path (statics): a tripod on the deck is driven by the deck's motion; a pier on its
    // own footing is reached only through the gap filler (1e3 N/m against ~1e6–1e7 N/m paths).
    let tripod_on_floor = format!(
        "{OPTICS}{FLOOR}{}",
        TRIPOD.replace("[ground]\nkind = \"rigid\"\n", "").replace("[tripod]", "[tripod]\non = \"floor\"")
    );
    let pier_on_floor = format!(
        "{OPTICS}{FLOOR}{}",
        PIER.replace("[ground]\nsoil = \"lawn\"\n", "")
            .replace("footing = { diameter_m = 1.0, depth_m = 0.7 }", "on = \"floor\"")
    );
    let pier_isolated = format!("{OPTICS}{FLOOR}gap_stiffness_n_per_m = 1e3\n{PIER}");
    let (a, b, c) =
        (walking_peak(&tripod_on_floor), walking_peak(&pier_on_floor), walking_peak(&pier_isolated));
    assert!(a > 1e-9 && b > 1e-9, "walking must reach the image: {a} {b} rad/N");
    assert!(c < 1e-2 * a && c < 1e-2 * b, "isolated pier {c} vs tripod {a}, pier on deck {b}");
    assert!(c > 0.0, "the gap filler still couples a little");
}

#[test]
fn bad_rig_inputs_name_the_field() {
    let cases: &[(&str, &str, &str)] = &[
        (TRIPOD, "splay_deg = 25", "splay_deg = 25\nheight_m = 1.0"),
        (TRIPOD, "leg_length_m = 1.2", "leg_length_m = -1.2"),
        (TRIPOD, "head_radius_m = 0.1\n", ""),
        (TRIPOD, "mass_kg = 20.0", "mass_kg = nan"),
        (TRIPOD, "tilt_stiffness_nm_per_rad = 1e5\n", ""),
        (TRIPOD, "inertia_kgm2 = [0.1, 0.1, 0.1]", "inertia_kgm2 = [0.1, -0.1, 0.1]"),
        (TRIPOD, "leg_material = \"stainless-304\"\n", ""),
        (TRIPOD, "[ground]", "[pads]\nshear = { stiffness_n_per_m = 1e5 }\n[ground]"),
        (TRIPOD, "kind = \"rigid\"", "contact_radius_m = 0.02"),
        (TRIPOD, "[tripod]", "[tripod]\nlegs = 2"),
        (PIER, "height_m = 1.2\n", ""),
        (PIER, "diameter_m = 1.0,", "diameter_m = 1.0, side_m = 1.0,"),
        (PIER, "soil = \"lawn\"", "soil = \"lawn\"\ncontact_radius_m = -1"),
        (PIER, "fill_density_kg_m3 = 2400", "fill_density_kg_m3 = -5"),
    ];
    let expected = [
        "tripod.leg_length_m",
        "tripod.leg_length_m",
        "tripod.head_radius_m",
        "payload.mass_kg",
        "mount.tilt_stiffness_nm_per_rad",
        "mount.inertia_kgm2[1]",
        "tripod.leg_material",
        "pads.compression",
        "ground.soil",
        "tripod.legs",
        "pier.height_m",
        "pier.footing.diameter_m",
        "ground.contact_radius_m",
        "pier.fill_density_kg_m3",
    ];
    for ((base, from, to), want) in cases.iter().zip(expected) {
        assert!(base.contains(from), "bad test case: {from}");
        let text = base.replacen(from, to, 1);
        match ModelFile::parse(&text, "bad").and_then(|f| f.expanded()) {
            Err(Error::InvalidArgument { name, .. }) => assert_eq!(name, want, "{to}"),
            other => panic!("{to}: expected an error naming {want}, got {other:?}"),
        }
    }
    // A floor on soil needs its stiffness; an unknown key is a parse error with its line.
    let e =
        ModelFile::parse(&format!("{}{}", FLOOR.replace("vertical_stiffness_n_per_m = 4e6\n", ""), ""), "f")
            .unwrap()
            .expanded()
            .unwrap_err();
    assert!(
        matches!(e, Error::InvalidArgument { ref name, .. } if name == "floor.vertical_stiffness_n_per_m"),
        "{e}"
    );
    let e =
        ModelFile::parse(&TRIPOD.replace("[tripod]", "[tripod]\nleg_lenght_m = 1"), "t.toml").unwrap_err();
    assert!(matches!(e, Error::Parse { ref location, .. } if location.starts_with("line ")), "{e}");
    // An unknown soil preset lists the known ones.
    let e =
        ModelFile::parse(&PIER.replace("\"lawn\"", "\"moon-dust\""), "p").unwrap().expanded().unwrap_err();
    assert!(matches!(e, Error::UnknownName { .. }) && e.to_string().contains("lawn"), "{e}");
}

#[test]
fn model_file_doc_examples_build() {
    // Every ```toml block of docs/model-file.md marked "full example" is a working model file.
    let doc = std::fs::read_to_string(example("../model-file.md")).unwrap();
    let blocks: Vec<&str> = doc
        .split("```toml")
        .skip(1)
        .filter_map(|b| b.split("```").next())
        .filter(|b| b.contains("# full example"))
        .collect();
    assert_eq!(blocks.len(), 2);
    for b in blocks {
        let model = Model::from_toml_str(b, "docs/model-file.md").unwrap();
        assert!(model.modes().unwrap().frequency_hz[0] > 0.0);
        model.frf(&[10.0], &["ground_x"], &["image_x", "image_y"]).unwrap();
    }
}

#[test]
fn beam_legs_vertical_mode_matches_rayleigh() {
    // Beam legs clamped to the head and to rigid ground: vertical k = N[(EA/L)cos²θ +
    // (12EI/L³)sin²θ] (axial and fixed–fixed transverse stiffness, elementary statics) and a third
    // of each leg's mass moving with the head (Rayleigh's estimate for a rod with an end mass,
    // Thomson, Theory of Vibration). Leg mass ρAL is 20 % of the head mass: expect ~1 %.
    let text = TRIPOD.replace("leg_mass_kg = 0.5", "legs_as_beams = true\nbeam_elements = 4");
    let s = spec(&text);
    assert_eq!(s.beams.len(), 3);
    let (e, rho, d, t, l) = (193e9, 7900.0, 0.03_f64, 0.002, 1.2_f64);
    let di = d - 2.0 * t;
    let a = PI / 4.0 * (d * d - di * di);
    let i = PI / 64.0 * (d.powi(4) - di.powi(4));
    let th = 25f64.to_radians();
    let kv = 3.0 * (e * a / l * th.cos().powi(2) + 12.0 * e * i / l.powi(3) * th.sin().powi(2));
    let m = 25.0 + 3.0 * rho * a * l / 3.0;
    let modes = Model::from_spec(&s).unwrap().modes().unwrap();
    let j = mode_along(&modes, 2);
    assert_relative_eq!(modes.frequency_hz[j], (kv / m).sqrt() / (2.0 * PI), max_relative = 1e-2);
}

/// Modes (frequency, damping) and wind image RMS of a model file.
fn modes_and_wind_rms(f: &ModelFile) -> (Vec<f64>, Vec<f64>, f64) {
    use stillsky::response::Disturbances;
    use stillsky::wind::{Turbulence, WindSpec, WindSpectrum};
    let m = f.to_model().unwrap();
    let modes = m.modes().unwrap();
    let grid = stillsky::FreqGrid::log(0.2, 100.0, 300).unwrap();
    let w = WindSpec::new(WindSpectrum::Kaimal, 4.0, 2.0, Turbulence::Intensity(0.2));
    let d = Disturbances { wind: Some(w), ..Default::default() };
    let im = m.image_motion(&grid, &d, &stillsky::image::ImageOptions::default()).unwrap();
    (modes.frequency_hz.to_vec(), modes.damping_ratio.to_vec(), im.rms_arcsec)
}

#[test]
fn a_pointing_override_poses_the_payload_as_editing_the_file_does() {
    use stillsky::schema::Pointing;
    let mut given = ModelFile::read(&example("tripod-paver.toml")).unwrap();
    given
        .repoint(&Pointing { altitude_deg: Some(80.0), azimuth_deg: Some(250.0), ..Default::default() })
        .unwrap();
    let edited = ModelFile::parse(&posed_text(80.0, 250.0), "edited").unwrap();
    assert_eq!(given.expanded().unwrap(), edited.expanded().unwrap());
    let (fa, za, ra) = modes_and_wind_rms(&given);
    let (fb, zb, rb) = modes_and_wind_rms(&edited);
    for (a, b) in fa.iter().zip(&fb).chain(za.iter().zip(&zb)) {
        assert_relative_eq!(*a, *b, max_relative = 1e-12);
    }
    assert_relative_eq!(ra, rb, max_relative = 1e-12);
    // The pose matters: at 45° (the file's own pointing) the modes differ.
    let (f45, _, _) = modes_and_wind_rms(&ModelFile::read(&example("tripod-paver.toml")).unwrap());
    assert!(f45.iter().zip(&fa).any(|(a, b)| (a - b).abs() > 1e-3 * a), "{f45:?} vs {fa:?}");
    // Without optics there is nothing to point.
    let mut bare = ModelFile::parse(
        "[[body]]\nname = \"a\"\nmass_kg = 1\ncg_m = [0, 0, 0]\ninertia_kgm2 = [1, 1, 1]\n",
        "t",
    )
    .unwrap();
    let e = bare.repoint(&Pointing { altitude_deg: Some(30.0), ..Default::default() }).unwrap_err();
    assert!(matches!(e, Error::InvalidArgument { ref name, .. } if name == "optics"), "{e:?}");
    let e = given.repoint(&Pointing { altitude_deg: Some(95.0), ..Default::default() }).unwrap_err();
    assert!(e.to_string().contains("optics.altitude_deg"), "{e}");
}

fn equatorial_text(ha: f64, dec: f64, side: &str) -> String {
    std::fs::read_to_string(example("equatorial-pier.toml"))
        .unwrap()
        .replace("hour_angle_deg = 22.5", &format!("hour_angle_deg = {ha}"))
        .replace("declination_deg = 35", &format!("declination_deg = {dec}"))
        .replace("pier_side = \"east\"", &format!("pier_side = \"{side}\""))
}

fn cross(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]]
}

#[test]
fn equatorial_payload_is_posed_for_hour_angle_declination_and_pier_side() {
    // The line of sight from altitude h and azimuth A of Meeus, Astronomical Algorithms (2nd ed.
    // 1998), ch. 13, eqs. (13.5)–(13.6) (A_S from the south westward, ours A_N = A_S + 180°):
    // s = (sin A_N cos h, cos A_N cos h, sin h). The declination axis is ⟂ the pole p and s, so
    // along p × s; the tube sits on its east (+) or west (−) end. A payload given by its CG
    // (0.3 m along the line of sight, 0.2 m along the shaft) must have its CG at
    // pivot + 0.3 s + 0.2 d.
    let lat: f64 = 48.0;
    for (ha, dec, side, sign) in
        [(22.5, 35.0, "east", 1.0), (-60.0, 10.0, "west", -1.0), (100.0, -20.0, "east", 1.0)]
    {
        let text = equatorial_text(ha, dec, side);
        let i = text.find("[payload]").unwrap();
        let j = text.find("[mount]").unwrap();
        let text = format!(
            "{}[payload]\nmass_kg = 20\ncg_position_m = 0.3\ncg_shaft_m = 0.2\ninertia_kgm2 = [0.5, 2.0, 2.0]\n\n{}",
            &text[..i],
            &text[j..]
        );
        let s = spec(&text);
        let (f, hh, d) = (lat.to_radians(), f64::to_radians(ha), f64::to_radians(dec));
        let h = (f.sin() * d.sin() + f.cos() * d.cos() * hh.cos()).asin();
        let a_n = hh.sin().atan2(hh.cos() * f.sin() - d.tan() * f.cos()) + PI;
        let o = s.optics.as_ref().unwrap();
        assert_relative_eq!(o.altitude_deg.unwrap(), h.to_degrees(), epsilon = 1e-9);
        let da = (o.azimuth_deg.unwrap() - a_n.to_degrees() + 540.0).rem_euclid(360.0) - 180.0;
        assert!(da.abs() < 1e-9, "{da}");
        let los = [a_n.sin() * h.cos(), a_n.cos() * h.cos(), h.sin()];
        let p = [0.0, f.cos(), f.sin()];
        let c = cross(p, los);
        let n = (c[0] * c[0] + c[1] * c[1] + c[2] * c[2]).sqrt();
        let dax = c.map(|x| sign * x / n);
        let body = s.bodies.iter().find(|b| b.name == "payload").unwrap();
        let pivot = 1.2 + 0.35;
        for k in 0..3 {
            let want = [0.0, 0.0, pivot][k] + 0.3 * los[k] + 0.2 * dax[k];
            assert!(
                (body.cg_m[k] - want).abs() < 1e-12,
                "{ha} {dec} {side}: cg[{k}] {} vs {want}",
                body.cg_m[k]
            );
        }
        // The RA torsion spring lies along the pole, the Dec one along the Dec axis.
        let axis = |name: &str| s.torsion_springs.iter().find(|t| t.name == name).unwrap().axis.unwrap();
        for (x, y) in axis("pivot_ra").iter().zip(p).chain(axis("pivot_dec").iter().zip(dax)) {
            assert!((x - y).abs() < 1e-12);
        }
    }
}

#[test]
fn a_moment_about_the_polar_axis_moves_the_image_along_ra_by_cos_dec() {
    // A rotation θ about the pole p turns the line of sight s = sin δ p + cos δ e by
    // θ p × s = θ cos δ (p × e), which is θ cos δ along increasing right ascension and has no
    // component along declination (spherical astronomy: a turn of the polar axis changes the
    // hour angle only). With a stand far stiffer than the RA axis a pure moment about p turns
    // the payload about p alone (the pivot springs are diagonal in (p, d, p × d)), so
    // image_ra = cos δ θ_p and image_dec ≈ 0.
    for (dec, side) in [(35.0, "east"), (-50.0, "west"), (70.0, "east")] {
        let text = equatorial_text(22.5, dec, side)
            .replace("material = \"steel-s235\"", "material_properties = { youngs_modulus_pa = 2e16, poisson_ratio = 0.3, density_kg_m3 = 7850, yield_strength_pa = 2.35e8, loss_factor = 0.001 }");
        let m = ModelFile::parse(&text, "t").unwrap().to_model().unwrap();
        let lat = 48f64.to_radians();
        let p = [0.0, lat.cos(), lat.sin()];
        let outs = ["image_ra", "image_dec", "payload:rx", "payload:ry", "payload:rz"];
        let ins = ["moment:payload:x", "moment:payload:y", "moment:payload:z"];
        let frf = m.frf(&[0.01], &ins, &outs).unwrap();
        let r: Vec<f64> =
            (0..outs.len()).map(|o| (0..3).map(|i| frf.data[[0, o, i]].re * p[i]).sum()).collect();
        let theta_p = r[2] * p[0] + r[3] * p[1] + r[4] * p[2];
        let cd = f64::to_radians(dec).cos();
        assert_relative_eq!(r[0], cd * theta_p, max_relative = 1e-6);
        assert!(r[1].abs() < 1e-6 * r[0].abs(), "dec {dec}: image_dec {} vs image_ra {}", r[1], r[0]);
        // Kinematics alone: the output rows of a unit rotation about p, for any stand.
        let row = |n: &str| m.output_vector(n).unwrap();
        let labels = m.dof_labels();
        let mut rot = vec![0.0; m.dof_count()];
        for (g, l) in labels.iter().enumerate() {
            if l.owner == "payload" {
                let k = ["rx", "ry", "rz"].iter().position(|d| *d == l.dof.name());
                if let Some(k) = k {
                    rot[g] = p[k];
                }
            }
        }
        let dot = |a: &ndarray::Array1<f64>| a.iter().zip(&rot).map(|(x, y)| x * y).sum::<f64>();
        assert_relative_eq!(dot(&row("image_ra")), cd, epsilon = 1e-12);
        assert!(dot(&row("image_dec")).abs() < 1e-12);
    }
}

#[test]
fn equatorial_pointing_override_equals_the_edited_file_and_bad_keys_are_named() {
    use stillsky::schema::Pointing;
    use stillsky::sky::PierSide;
    let mut given = ModelFile::read(&example("equatorial-pier.toml")).unwrap();
    let p = Pointing {
        hour_angle_deg: Some(-40.0),
        declination_deg: Some(60.0),
        pier_side: Some(PierSide::West),
        ..Default::default()
    };
    given.repoint(&p).unwrap();
    let edited = ModelFile::parse(&equatorial_text(-40.0, 60.0, "west"), "edited").unwrap();
    assert_eq!(given.expanded().unwrap(), edited.expanded().unwrap());
    let (fa, za, ra) = modes_and_wind_rms(&given);
    let (fb, zb, rb) = modes_and_wind_rms(&edited);
    for (a, b) in fa.iter().zip(&fb).chain(za.iter().zip(&zb)) {
        assert_relative_eq!(*a, *b, max_relative = 1e-12);
    }
    assert_relative_eq!(ra, rb, max_relative = 1e-12);
    // Altitude and azimuth do not point an equatorial rig; hour angle does not point an
    // alt-azimuth one.
    let mut eq = ModelFile::read(&example("equatorial-pier.toml")).unwrap();
    let e = eq.repoint(&Pointing { altitude_deg: Some(30.0), ..Default::default() }).unwrap_err();
    assert!(e.to_string().contains("hour angle"), "{e}");
    let mut az = ModelFile::read(&example("tripod-paver.toml")).unwrap();
    let e = az.repoint(&Pointing { hour_angle_deg: Some(30.0), ..Default::default() }).unwrap_err();
    assert!(e.to_string().contains("altitude and azimuth"), "{e}");
    let base = std::fs::read_to_string(example("equatorial-pier.toml")).unwrap();
    for (edit, field) in [
        (("latitude_deg = 48.0", "latitude_deg = 95"), "mount.latitude_deg"),
        (("latitude_deg = 48.0\n", ""), "mount.latitude_deg"),
        (
            ("ra_stiffness_nm_per_rad = 3.0e4", "yaw_stiffness_nm_per_rad = 3.0e4"),
            "mount.yaw_stiffness_nm_per_rad",
        ),
        (("dec_stiffness_nm_per_rad = 2.5e4\n", ""), "mount.dec_stiffness_nm_per_rad"),
        (("declination_deg = 35\n", ""), "optics.declination_deg"),
        (
            ("hour_angle_deg = 22.5", "altitude_deg = 40\nazimuth_deg = 100\nhour_angle_deg = 22.5"),
            "optics.altitude_deg",
        ),
        (("kind = \"equatorial\"\n", ""), "mount.latitude_deg"),
    ] {
        let text = base.replace(edit.0, edit.1);
        assert_ne!(text, base, "{edit:?}");
        let e = ModelFile::parse(&text, "t").and_then(|f| f.expanded()).unwrap_err();
        assert!(e.to_string().contains(field), "{edit:?}: {e}");
    }
}

#[test]
fn alt_azimuth_files_expand_as_before_the_mount_kinds() {
    // The alt-azimuth head is today's: `kind = "altazimuth"` written out changes nothing.
    let text = std::fs::read_to_string(example("tripod-paver.toml")).unwrap();
    let kind = text.replace("[mount]\n", "[mount]\nkind = \"altazimuth\"\n");
    assert_ne!(kind, text);
    assert_eq!(spec(&text), spec(&kind));
    let out = spec_to_toml(&spec(&text)).unwrap();
    assert!(!out.contains("hour_angle") && !out.contains("latitude") && out.contains("altitude_deg = 45"));
}

#[test]
fn equatorial_sky_map_cells_equal_single_runs() {
    // Each cell of the hour angle × declination map is the model re-pointed there (usual pier
    // side) and evaluated on its own.
    use stillsky::response::Disturbances;
    use stillsky::schema::Pointing;
    use stillsky::sky::PierSide;
    use stillsky::wind::{Turbulence, WindSpec, WindSpectrum};
    let f = ModelFile::read(&example("equatorial-pier.toml")).unwrap();
    let grid = stillsky::FreqGrid::log(0.2, 100.0, 200).unwrap();
    let w = WindSpec::new(WindSpectrum::Kaimal, 4.0, 2.0, Turbulence::Intensity(0.2));
    let d = Disturbances { wind: Some(w), ..Default::default() };
    let o = stillsky::image::ImageOptions::default();
    let (ha, dec) = ([-60.0, 0.0, 45.0], [-10.0, 30.0, 80.0]);
    // Every cell computed (no altitude cut-off), as the single runs are.
    let sky = stillsky::skymap::SkyGrid {
        frame: stillsky::skymap::SkyFrame::Equatorial,
        rows_deg: ha.to_vec(),
        cols_deg: dec.to_vec(),
        min_altitude_deg: -90.0,
    };
    let map = stillsky::skymap::sky_map(&f, &sky, &grid, &d, &o).unwrap();
    for (i, h) in ha.iter().enumerate() {
        for (j, de) in dec.iter().enumerate() {
            let mut g = f.clone();
            let p = Pointing {
                hour_angle_deg: Some(*h),
                declination_deg: Some(*de),
                pier_side: Some(PierSide::usual(*h)),
                ..Default::default()
            };
            g.repoint(&p).unwrap();
            let im = g.to_model().unwrap().image_motion(&grid, &d, &o).unwrap();
            assert_relative_eq!(map.rms_arcsec[i][j], im.rms_arcsec, max_relative = 1e-12);
            assert_relative_eq!(map.rms_px[i][j], im.rms_px, max_relative = 1e-12);
        }
    }
    // The pointing moves the image: the map is not flat.
    let all: Vec<f64> = map.rms_arcsec.iter().flatten().copied().collect();
    let (lo, hi) = all.iter().fold((f64::MAX, 0.0f64), |(a, b), x| (a.min(*x), b.max(*x)));
    assert!(hi > 1.05 * lo, "{all:?}");
}

#[test]
fn a_deck_without_horizontal_springs_carries_the_stand_with_the_ground() {
    // The deck's held x, y and rz follow the ground (a kinematic tie): a tripod standing on it
    // moves with ground_x and ground_y at low frequency, |T| → 1, like one on the ground itself.
    let floor = FLOOR
        .replace("horizontal_stiffness_n_per_m = 5e6\n", "")
        .replace("torsion_stiffness_nm_per_rad = 2e6\n", "");
    let text = format!(
        "{OPTICS}{floor}{}",
        TRIPOD.replace("[ground]\nkind = \"rigid\"\n", "").replace("[tripod]", "[tripod]\non = \"floor\"")
    );
    let spec = spec(&text);
    let deck = spec.bodies.iter().find(|b| b.name == "floor").unwrap();
    assert!(!deck.dofs.contains(&stillsky::assembly::Dof::X), "the deck's x is held");
    let m = Model::from_spec(&spec).unwrap();
    let f = [0.01, 0.05];
    let h = m.frf(&f, &["ground_x", "ground_y"], &["mount:x", "mount:y"]).unwrap();
    for (o, i) in [("mount:x", "ground_x"), ("mount:y", "ground_y")] {
        for t in h.series(o, i).unwrap() {
            assert!((t.norm() - 1.0).abs() < 1e-3, "{o}/{i}: |T| = {}", t.norm());
        }
    }
    // Cross terms stay small: x does not drive y.
    assert!(h.series("mount:y", "ground_x").unwrap()[0].norm() < 1e-3);
}

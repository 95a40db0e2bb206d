//! Ground rotations and differential motion between stations, checked against rigid-body
//! kinematics and the plane-wave relations of `stillsky::surface_waves` (sources named there).

use stillsky::grid::FreqGrid;
use stillsky::model::Model;
use stillsky::response::{Disturbances, response_psd};
use stillsky::spectrum::{Psd, Quantity};
use stillsky::surface_waves::GroundWaves;

/// A rigid plate (its CG 0.5 m up) on three feet at radius 0.4 m, each a stiff vertical spring
/// and two horizontal ones to the ground; optics on the plate looking at the zenith.
fn three_feet(extra: &str) -> Model {
    let mut t = String::from(
        "[optics]\nbody = \"plate\"\nfocal_length_mm = 2000\npixel_um = 4\naltitude_deg = 90\nazimuth_deg = 0\n\
         [[body]]\nname = \"plate\"\nmass_kg = 20\ncg_m = [0, 0, 0.5]\ninertia_kgm2 = [1, 1, 1.5]\n",
    );
    for k in 0..3 {
        let a = (90.0 + 120.0 * k as f64).to_radians();
        let (x, y) = (0.4 * a.cos(), 0.4 * a.sin());
        for (d, dir) in [("z", "[0, 0, 1]"), ("x", "[1, 0, 0]"), ("y", "[0, 1, 0]")] {
            t.push_str(&format!(
                "[[spring]]\nname = \"foot{k}_{d}\"\nfrom = \"ground\"\nto = \"plate\"\n\
                 at_m = [{x}, {y}, 0]\ndirection = {dir}\nstiffness_n_per_m = 1e8\nloss_factor = 0.02\n"
            ));
        }
    }
    t.push_str(extra);
    Model::from_toml_str(&t, "three-feet").unwrap()
}

const LOW: [f64; 2] = [0.01, 0.05];

#[test]
fn a_tilting_ground_tilts_a_stiff_rig_rigidly() {
    // Rigid-body kinematics: under a ground rotation θ about the origin the plate turns by θ and
    // its CG at (0, 0, h) moves by θ × (0, 0, h), so u_y = −h θ_x and u_x = h θ_y.
    let m = three_feet("");
    let h = m
        .frf(
            &LOW,
            &["ground_rx", "ground_ry", "ground_rz"],
            &["plate:rx", "plate:ry", "plate:rz", "plate:x", "plate:y"],
        )
        .unwrap();
    for f in 0..LOW.len() {
        let at = |o: &str, i: &str| h.series(o, i).unwrap()[f];
        assert!((at("plate:rx", "ground_rx").re - 1.0).abs() < 1e-6);
        assert!((at("plate:ry", "ground_ry").re - 1.0).abs() < 1e-6);
        assert!((at("plate:rz", "ground_rz").re - 1.0).abs() < 1e-6);
        assert!((at("plate:y", "ground_rx").re + 0.5).abs() < 1e-6);
        assert!((at("plate:x", "ground_ry").re - 0.5).abs() < 1e-6);
        assert!(at("plate:rx", "ground_ry").norm() < 1e-6);
    }
}

#[test]
fn held_dofs_follow_the_ground_rotation_at_their_own_place() {
    // A body with its translations held is tied to the ground: at (1, 2, 3) its centre moves as
    // θ_g × (1, 2, 3). A free body joined to it by stiff springs follows it.
    let m = Model::from_toml_str(
        "[[body]]\nname = \"block\"\nmass_kg = 5\ncg_m = [1, 2, 3]\ninertia_kgm2 = [1, 1, 1]\n\
         dofs = [\"rx\", \"ry\", \"rz\"]\n\
         [[torsion_spring]]\nname = \"tx\"\nfrom = \"ground\"\nto = \"block\"\naxis = [1, 0, 0]\nstiffness_nm_per_rad = 1e6\n\
         [[torsion_spring]]\nname = \"ty\"\nfrom = \"ground\"\nto = \"block\"\naxis = [0, 1, 0]\nstiffness_nm_per_rad = 1e6\n\
         [[torsion_spring]]\nname = \"tz\"\nfrom = \"ground\"\nto = \"block\"\naxis = [0, 0, 1]\nstiffness_nm_per_rad = 1e6\n\
         [[node]]\nname = \"bob\"\nmass_kg = 0.1\nat_m = [1, 2, 3]\n\
         [[spring]]\nname = \"sx\"\nfrom = \"block\"\nto = \"bob\"\nat_m = [1, 2, 3]\ndirection = [1, 0, 0]\nstiffness_n_per_m = 1e7\n\
         [[spring]]\nname = \"sy\"\nfrom = \"block\"\nto = \"bob\"\nat_m = [1, 2, 3]\ndirection = [0, 1, 0]\nstiffness_n_per_m = 1e7\n\
         [[spring]]\nname = \"sz\"\nfrom = \"block\"\nto = \"bob\"\nat_m = [1, 2, 3]\ndirection = [0, 0, 1]\nstiffness_n_per_m = 1e7\n",
        "tied",
    )
    .unwrap();
    let h = m
        .frf(&LOW, &["ground_rx", "ground_ry", "ground_rz"], &["block:rx", "bob:x", "bob:y", "bob:z"])
        .unwrap();
    let at = |o: &str, i: &str| h.series(o, i).unwrap()[0].re;
    assert!((at("block:rx", "ground_rx") - 1.0).abs() < 1e-6);
    // θ × o with o = (1, 2, 3): θ_x → (0, −3, 2); θ_y → (3, 0, −1); θ_z → (−2, 1, 0).
    for (o, i, v) in [
        ("bob:y", "ground_rx", -3.0),
        ("bob:z", "ground_rx", 2.0),
        ("bob:x", "ground_ry", 3.0),
        ("bob:z", "ground_ry", -1.0),
        ("bob:x", "ground_rz", -2.0),
        ("bob:y", "ground_rz", 1.0),
    ] {
        assert!((at(o, i) - v).abs() < 1e-6, "{o}/{i}: {} vs {v}", at(o, i));
    }
}

#[test]
fn one_station_moving_alone_lifts_the_plate_by_a_third_and_tilts_it() {
    // Hand calculation: a rigid plate on three equal vertical springs; lift one support by 1
    // (static, stiff springs): the plate takes the plane through (p0, 1), (p1, 0), (p2, 0), so its
    // centre (the centroid of the feet) rises by 1/3 and it tilts by 1/(1.5 R) toward foot 0.
    let m = three_feet("");
    assert_eq!(m.ground_stations().len(), 3);
    let s0 = m.ground_stations()[0];
    assert!((s0[0]).abs() < 1e-12 && (s0[1] - 0.4).abs() < 1e-12, "{s0:?}");
    let h = m.frf(&LOW, &["ground_z@1", "ground_z"], &["plate:z", "plate:rx", "plate:ry"]).unwrap();
    let at = |o: &str, i: &str| h.series(o, i).unwrap()[0].re;
    assert!((at("plate:z", "ground_z@1") - 1.0 / 3.0).abs() < 1e-6);
    // Foot 0 sits on +y: the slope dz/dy = 1/(1.5·0.4), and θ_x = dz/dy.
    assert!((at("plate:rx", "ground_z@1") - 1.0 / 0.6).abs() < 1e-5, "{}", at("plate:rx", "ground_z@1"));
    assert!(at("plate:ry", "ground_z@1").abs() < 1e-6);
    // The three stations together are the rigid ground's own translation.
    let all: f64 = (1..=3)
        .map(|k| {
            let name = format!("ground_z@{k}");
            m.frf(&LOW, &[name.as_str()], &["plate:z"]).unwrap().series("plate:z", &name).unwrap()[0].re
        })
        .sum();
    assert!((all - at("plate:z", "ground_z")).abs() < 1e-9);
    assert!(m.frf(&LOW, &["ground_z@4"], &["plate:z"]).is_err());
}

#[test]
fn ground_waves_add_the_plane_wave_tilt_to_the_image() {
    // At low frequency the stiff rig turns with the ground, so the image's mean square per Hz is
    // the ground's: S_rx + S_ry = (ω/c)² S_z (plane-wave tilt, Rodgers 1968).
    let m = three_feet("[ground_waves]\nphase_velocity_m_s = 150\n");
    let grid = FreqGrid::new(vec![0.02, 0.05, 0.1]).unwrap();
    let sz = Psd::new(vec![0.01, 1.0], vec![1e-12, 1e-12], Quantity::Displacement).unwrap();
    let d = Disturbances { ground: [None, None, Some(sz)], ..Default::default() };
    let r = response_psd(&m, &grid, &d, &["image_x", "image_y"], true).unwrap();
    for (i, f) in grid.hz().iter().enumerate() {
        let k = 2.0 * std::f64::consts::PI * f / 150.0;
        let total = r.psd[0][i] + r.psd[1][i];
        assert!((total / (k * k * 1e-12) - 1.0).abs() < 1e-4, "f {f}: {total}");
    }
    assert!(r.inputs.iter().any(|n| n == "ground_rx"));
    // Without a phase velocity the ground does not rotate and a rigid rig's image stays still.
    let plain = three_feet("");
    let r0 = response_psd(&plain, &grid, &d, &["image_x"], false).unwrap();
    assert!(r0.psd[0][0] < 1e-6 * r.psd[0][0]);
}

#[test]
fn incoherence_splits_each_axis_into_common_and_own_parts() {
    // Luco & Wong (1986): |γ| = exp(−(α ω d / V_s)²); the three feet are d = 0.4·√3 apart.
    let m = three_feet(
        "[ground_waves]\nphase_velocity_m_s = 150\nincoherence = 0.5\nshear_wave_speed_m_s = 160\n",
    );
    let grid = FreqGrid::new(vec![5.0, 20.0, 80.0]).unwrap();
    let sx = Psd::new(vec![1.0, 100.0], vec![2e-14, 2e-14], Quantity::Displacement).unwrap();
    let d = Disturbances { ground: [Some(sx), None, None], ..Default::default() };
    let parts = d.on_grid(&m, &grid).unwrap();
    let get = |n: &str| parts.iter().find(|(k, _)| k == n).map(|(_, v)| v.clone()).unwrap();
    let common = get("ground_x");
    let dist = 0.4 * 3f64.sqrt();
    for (i, f) in grid.hz().iter().enumerate() {
        let g = (-(0.5 * 2.0 * std::f64::consts::PI * f * dist / 160.0f64).powi(2)).exp();
        assert!((common[i] / (g * 2e-14) - 1.0).abs() < 1e-9);
        for k in 1..=3 {
            let own = get(&format!("ground_x@{k}"));
            assert!((own[i] + common[i] - 2e-14).abs() < 1e-24);
        }
    }
    // Twist from the horizontal axis, no tilt without a vertical spectrum.
    assert!(parts.iter().any(|(n, _)| n == "ground_rz"));
    assert!(!parts.iter().any(|(n, _)| n == "ground_rx"));
    // An override in the disturbances replaces the model's own.
    let w = GroundWaves { phase_velocity_m_s: 300.0, incoherence: None, shear_wave_speed_m_s: None };
    let d2 = Disturbances { ground_waves: Some(w), ..d };
    assert!(!d2.on_grid(&m, &grid).unwrap().iter().any(|(n, _)| n.contains('@')));
}

#[test]
fn a_soil_ground_gets_the_rayleigh_speed_and_a_rigid_one_none() {
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../docs/examples");
    let lawn = stillsky::schema::ModelFile::read(&root.join("tripod-lawn.toml")).unwrap().expanded().unwrap();
    let w = lawn.ground_waves.expect("a soil ground has surface waves");
    // The lawn preset: G 20 MPa, ρ 1600 kg/m³, ν 0.33; c_R = ξ(ν)·√(G/ρ), ξ within 0.5 % of
    // Viktorov's (0.87 + 1.12ν)/(1 + ν).
    let vs = (20e6f64 / 1600.0).sqrt();
    let fit = (0.87 + 1.12 * 0.33) / 1.33;
    assert!((w.phase_velocity_m_s / (fit * vs) - 1.0).abs() < 5e-3, "{}", w.phase_velocity_m_s);
    let rigid =
        stillsky::schema::ModelFile::read(&root.join("equatorial-pier.toml")).unwrap().expanded().unwrap();
    assert!(rigid.ground_waves.is_none(), "rigid ground without a phase velocity");
    let paver =
        stillsky::schema::ModelFile::read(&root.join("tripod-paver.toml")).unwrap().expanded().unwrap();
    assert_eq!(paver.ground_waves.map(|w| w.phase_velocity_m_s), Some(150.0), "rigid ground with one");
    let bad = "[[body]]\nname = \"b\"\nmass_kg = 1\ncg_m = [0, 0, 0]\ninertia_kgm2 = [1, 1, 1]\n\
        [[general_spring]]\nname = \"g\"\nfrom = \"ground\"\nto = \"b\"\nat_m = [0, 0, 0]\n\
        matrix = [[1e6,0,0,0,0,0],[0,1e6,0,0,0,0],[0,0,1e6,0,0,0],[0,0,0,1e4,0,0],[0,0,0,0,1e4,0],[0,0,0,0,0,1e4]]\n\
        [ground_waves]\nphase_velocity_m_s = -3\n";
    let e = Model::from_toml_str(bad, "bad").unwrap_err().to_string();
    assert!(e.contains("ground_waves.phase_velocity_m_s"), "{e}");
}

//! Property tests on random valid models: random chains of rigid bodies and random tripods
//! (head body on splayed legs, foot nodes on soil springs), built as model-file TOML text with
//! parameters in physical ranges. Case counts are bounded (`CASES`) so `cargo test` stays quick.
//!
//! Conventions (docs/conventions.md): e^{+iωt}, Z(ω) = K*(ω) + iωC − ω²M, K* = K′(1 + iη).

use std::f64::consts::PI;

use num_complex::Complex64;
use proptest::prelude::*;
use rand::rngs::StdRng;
use rand::seq::SliceRandom;
use rand::{Rng, SeedableRng};
use rand_distr::{Distribution, StandardNormal};
use stillsky::FreqGrid;
use stillsky::model::Model;
use stillsky::response::{Disturbances, response_psd};
use stillsky::spectrum::welch::{WelchConfig, welch};
use stillsky::spectrum::{Psd, Quantity};

const CASES: u32 = 40;

/// One spring's parameters: stiffness (N/m), loss factor, dashpot (N·s/m).
#[derive(Debug, Clone)]
struct Spring {
    k: f64,
    eta: f64,
    c: f64,
}

fn spring() -> impl Strategy<Value = Spring> {
    // Stiffness log-uniform 1e4..1e7 N/m (pads to steel joints); η 0.002..0.15 (no undamped mode at an exact resonance); c 0..300 N·s/m.
    (4.0f64..7.0, 0.002f64..0.15, 0.0f64..300.0).prop_map(|(lk, eta, c)| Spring { k: 10f64.powf(lk), eta, c })
}

/// A model file as a list of TOML blocks (so tests can reorder them).
#[derive(Debug, Clone)]
struct Rig {
    bodies: Vec<String>,
    springs: Vec<String>,
}

impl Rig {
    fn toml(&self) -> String {
        format!("{}\n{}", self.bodies.join("\n"), self.springs.join("\n"))
    }
    fn model(&self) -> Model {
        Model::from_toml_str(&self.toml(), "random rig").unwrap_or_else(|e| panic!("{e}\n{}", self.toml()))
    }
}

fn spring_block(name: &str, from: &str, to: &str, geom: &str, s: &Spring) -> String {
    let mut t = format!(
        "[[spring]]\nname = \"{name}\"\nfrom = \"{from}\"\nto = \"{to}\"\n{geom}\nstiffness_n_per_m = {:e}\n",
        s.k
    );
    if s.eta > 0.0 {
        t += &format!("loss_factor = {}\n", s.eta);
    }
    if s.c > 0.0 {
        t += &format!("damping_ns_per_m = {}\n", s.c);
    }
    t
}

fn v3(v: [f64; 3]) -> String {
    format!("[{}, {}, {}]", v[0], v[1], v[2])
}

/// 1 to 3 rigid 6-DOF bodies stacked 1 m apart, each held to the one below (the first to the
/// ground) by 3 vertical springs on a triangle and 3 horizontal ones, which restrain all six
/// DOFs.
fn chain() -> impl Strategy<Value = Rig> {
    let level = (1.0f64..50.0, 0.1f64..2.0, 0.15f64..0.5, proptest::collection::vec(spring(), 6));
    proptest::collection::vec(level, 1..=3).prop_map(|levels| {
        let (mut bodies, mut springs) = (Vec::new(), Vec::new());
        for (i, (m, j, r, ks)) in levels.iter().enumerate() {
            let z = i as f64 + 1.0;
            let name = format!("b{i}");
            bodies.push(format!(
                "[[body]]\nname = \"{name}\"\nmass_kg = {m}\ncg_m = [0, 0, {z}]\ninertia_kgm2 = [{j}, {}, {}]\n",
                j * 1.3,
                j * 0.7
            ));
            let below = if i == 0 { "ground".to_string() } else { format!("b{}", i - 1) };
            let zs = z - 0.5;
            for k in 0..3 {
                let a = 2.0 * PI * k as f64 / 3.0;
                let at = v3([r * a.cos(), r * a.sin(), zs]);
                springs.push(spring_block(
                    &format!("{name}v{k}"),
                    &below,
                    &name,
                    &format!("at_m = {at}\ndirection = [0, 0, 1]"),
                    &ks[k],
                ));
            }
            for (k, (at, d)) in [([0.0, 0.0, zs], "[1, 0, 0]"), ([0.0, 0.0, zs], "[0, 1, 0]"), ([*r, 0.0, zs], "[0, 1, 0]")]
                .iter()
                .enumerate()
            {
                springs.push(spring_block(
                    &format!("{name}h{k}"),
                    &below,
                    &name,
                    &format!("at_m = {}\ndirection = {d}", v3(*at)),
                    &ks[3 + k],
                ));
            }
        }
        Rig { bodies, springs }
    })
}

/// A head body on 3 to 5 splayed legs: each leg an axial spring plus two lateral springs across
/// it (leg bending) from the head ring to a 3-DOF foot node; each foot on three soil springs.
fn tripod() -> impl Strategy<Value = Rig> {
    (
        3usize..=5,
        5.0f64..40.0,
        0.8f64..1.5,
        0.4f64..0.8,
        0.2f64..1.0,
        proptest::collection::vec((6.0f64..8.0, 3.0f64..5.0, spring(), spring(), spring()), 5),
    )
        .prop_map(|(n, m, h, spread, foot_m, legs)| {
            let mut bodies = vec![format!(
                "[[body]]\nname = \"head\"\nmass_kg = {m}\ncg_m = [0, 0, {h}]\ninertia_kgm2 = [{}, {}, {}]\n",
                0.05 * m,
                0.06 * m,
                0.04 * m
            )];
            let mut springs = Vec::new();
            for (i, (lka, lkl, soil_v, soil_h, joint)) in legs.iter().take(n).enumerate() {
                let a = 2.0 * PI * i as f64 / n as f64 + 0.1;
                let (c, s) = (a.cos(), a.sin());
                let top = [0.1 * c, 0.1 * s, h];
                let foot = [spread * c, spread * s, 0.0];
                let name = format!("foot{i}");
                bodies
                    .push(format!("[[node]]\nname = \"{name}\"\nmass_kg = {foot_m}\nat_m = {}\n", v3(foot)));
                let axial = Spring { k: 10f64.powf(*lka), ..joint.clone() };
                let lateral = Spring { k: 10f64.powf(*lkl), ..joint.clone() };
                let ends = format!("from_at_m = {}\nto_at_m = {}", v3(top), v3(foot));
                springs.push(spring_block(&format!("leg{i}"), "head", &name, &ends, &axial));
                // Two directions across the leg: horizontal tangent, and tangent × leg axis.
                let axis = {
                    let d = [foot[0] - top[0], foot[1] - top[1], foot[2] - top[2]];
                    let l = (d[0] * d[0] + d[1] * d[1] + d[2] * d[2]).sqrt();
                    [d[0] / l, d[1] / l, d[2] / l]
                };
                let t1 = [-s, c, 0.0];
                let t2 = [
                    t1[1] * axis[2] - t1[2] * axis[1],
                    t1[2] * axis[0] - t1[0] * axis[2],
                    t1[0] * axis[1] - t1[1] * axis[0],
                ];
                for (k, d) in [t1, t2].iter().enumerate() {
                    springs.push(spring_block(
                        &format!("leg{i}bend{k}"),
                        "head",
                        &name,
                        &format!("{ends}\ndirection = {}", v3(*d)),
                        &lateral,
                    ));
                }
                for (k, (d, sp)) in
                    [("[1, 0, 0]", soil_h), ("[0, 1, 0]", soil_h), ("[0, 0, 1]", soil_v)].iter().enumerate()
                {
                    springs.push(spring_block(
                        &format!("soil{i}{k}"),
                        "ground",
                        &name,
                        &format!("at_m = {}\ndirection = {d}", v3(foot)),
                        sp,
                    ));
                }
            }
            Rig { bodies, springs }
        })
}

fn rig() -> impl Strategy<Value = Rig> {
    prop_oneof![chain(), tripod()]
}

/// The force/moment input that drives DOF label `owner:dof` (x, y, z → force; r* → moment).
fn driving_input(label: &str) -> String {
    let (owner, dof) = label.rsplit_once(':').unwrap();
    match dof.strip_prefix('r') {
        Some(axis) => format!("moment:{owner}:{axis}"),
        None => format!("force:{owner}:{dof}"),
    }
}

/// Frequencies spanning the model's modes: a decade below the first to twice the last.
fn span(model: &Model) -> Vec<f64> {
    let f = model.modes().unwrap().frequency_hz;
    let (lo, hi) = (f[0] / 10.0, f[f.len() - 1] * 2.0);
    let mut v: Vec<f64> = (0..24).map(|i| lo * (hi / lo).powf(i as f64 / 23.0)).collect();
    v.extend(f.iter().copied()); // exactly at the undamped resonances too
    v.sort_by(f64::total_cmp);
    v.dedup_by(|a, b| (*a - *b).abs() <= 1e-9 * *b);
    v
}

proptest! {
    #![proptest_config(ProptestConfig { cases: CASES, ..ProptestConfig::default() })]

    /// Maxwell–Betti reciprocity (e.g. Ewins, Modal Testing, 2000, §2.2: a symmetric Z gives a
    /// symmetric receptance matrix): H(out i, force j) = H(out j, force i) for force/moment
    /// inputs and the matching displacement/rotation outputs.
    #[test]
    fn receptance_is_reciprocal(rig in rig(), pick in any::<u64>()) {
        let model = rig.model();
        let labels: Vec<String> = model.dof_labels().iter().map(|l| l.to_string()).collect();
        let n = labels.len();
        let (i, j) = ((pick % n as u64) as usize, ((pick >> 32) % n as u64) as usize);
        let f = span(&model);
        let (ii, ij) = (driving_input(&labels[i]), driving_input(&labels[j]));
        let h = model.frf(&f, &[&ii, &ij], &[&labels[i], &labels[j]]).unwrap();
        let a = h.series(&labels[i], &ij).unwrap();
        let b = h.series(&labels[j], &ii).unwrap();
        for (k, (x, y)) in a.iter().zip(&b).enumerate() {
            // LU round-off only: relative 1e-8 of the larger entry of the 2 × 2 block.
            let scale = [x.norm(), y.norm(), h.series(&labels[i], &ii).unwrap()[k].norm()]
                .into_iter().fold(0.0, f64::max);
            prop_assert!((x - y).norm() <= 1e-8 * scale, "f = {} Hz: {x} vs {y}", f[k]);
        }
    }

    /// Quasi-static limit: as f → 0 every point follows the ground (a rigid translation is in
    /// the null space of K for springs between carriers; e.g. Rao, Mechanical Vibrations,
    /// base excitation, T → 1 for r → 0). At f = f₁/1000 the error is O((f/f₁)²) ≈ 1e-6.
    #[test]
    fn ground_transmissibility_tends_to_one(rig in rig()) {
        let model = rig.model();
        let f1 = model.modes().unwrap().frequency_hz[0];
        let f = [f1 * 1e-3];
        for (axis, d) in ["ground_x", "ground_y", "ground_z"].iter().zip(["x", "y", "z"]) {
            let outs: Vec<String> = model.dof_labels().iter()
                .filter(|l| l.dof.name() == d).map(|l| l.to_string()).collect();
            let refs: Vec<&str> = outs.iter().map(String::as_str).collect();
            let h = model.frf(&f, &[axis], &refs).unwrap();
            for o in &outs {
                let t = h.series(o, axis).unwrap()[0];
                prop_assert!((t - 1.0).norm() < 1e-4, "{o}/{axis} at {} Hz: {t}", f[0]);
            }
            // Rotations do not follow a translation of the ground.
            let rots: Vec<String> = model.dof_labels().iter()
                .filter(|l| l.dof.name().starts_with('r')).map(|l| l.to_string()).collect();
            let refs: Vec<&str> = rots.iter().map(String::as_str).collect();
            if !refs.is_empty() {
                let h = model.frf(&f, &[axis], &refs).unwrap();
                for o in &rots {
                    let t = h.series(o, axis).unwrap()[0];
                    prop_assert!(t.norm() < 1e-4, "{o}/{axis}: {t} rad/m");
                }
            }
        }
    }

    /// Passivity. For a harmonic force vector F (complex amplitudes over all DOFs, e^{iωt}) the
    /// response is x = H F and the time-averaged power the forces put in is
    /// P = ½ Re(Fᴴ · iωx) = ½ ω Im(xᴴ Z x) = ½ ω (η xᴴK′x + ω xᴴCx) ≥ 0 for η, c ≥ 0
    /// (e.g. Nashif, Jones & Henderson, Vibration Damping, 1985, ch. 2: energy dissipated by a
    /// complex stiffness). Checked at every frequency with Z from the model's matrices, together
    /// with the power balance Zx = F.
    #[test]
    fn dissipated_power_is_non_negative(rig in rig(), seed in any::<u64>()) {
        let model = rig.model();
        let labels: Vec<String> = model.dof_labels().iter().map(|l| l.to_string()).collect();
        let n = labels.len();
        let inputs: Vec<String> = labels.iter().map(|l| driving_input(l)).collect();
        let (ri, ro): (Vec<&str>, Vec<&str>) =
            (inputs.iter().map(String::as_str).collect(), labels.iter().map(String::as_str).collect());
        let mut rng = StdRng::seed_from_u64(seed);
        let force: Vec<Complex64> =
            (0..n).map(|_| Complex64::new(rng.random_range(-1.0..1.0), rng.random_range(-1.0..1.0))).collect();
        let f = span(&model);
        let h = model.frf(&f, &ri, &ro).unwrap();
        let cols: Vec<Vec<Vec<Complex64>>> = (0..n)
            .map(|o| (0..n).map(|i| h.series(ro[o], ri[i]).unwrap()).collect())
            .collect();
        let (m, c) = (model.mass_matrix(), model.damping_matrix());
        for (k, &fk) in f.iter().enumerate() {
            let w = 2.0 * PI * fk;
            let x: Vec<Complex64> = (0..n).map(|o| (0..n).map(|i| cols[o][i][k] * force[i]).sum()).collect();
            let kk = model.stiffness_matrix(fk);
            let zx: Vec<Complex64> = (0..n)
                .map(|r| (0..n).map(|s| (kk[[r, s]] + Complex64::new(-w * w * m[[r, s]], w * c[[r, s]])) * x[s]).sum())
                .collect();
            let fnorm = force.iter().map(|v| v.norm_sqr()).sum::<f64>().sqrt();
            let resid = zx.iter().zip(&force).map(|(a, b)| (a - b).norm_sqr()).sum::<f64>().sqrt();
            prop_assert!(resid <= 1e-7 * fnorm, "Zx ≠ F at {fk} Hz: residual {resid:e}");
            let xzx: Complex64 = x.iter().zip(&zx).map(|(a, b)| a.conj() * b).sum();
            let p = 0.5 * w * xzx.im;
            // Round-off bound: the reactive part |Re xᴴZx| sets the scale of cancellation.
            prop_assert!(p >= -1e-9 * w * xzx.norm(), "P = {p:e} W at {fk} Hz");
        }
    }

    /// Natural frequencies do not depend on the order of bodies, nodes and springs in the file
    /// (assembly sums element matrices; the order only permutes DOFs).
    #[test]
    fn modal_frequencies_invariant_under_reordering(rig in rig(), seed in any::<u64>()) {
        let a = rig.model().modes().unwrap().frequency_hz;
        let mut shuffled = rig.clone();
        let mut rng = StdRng::seed_from_u64(seed);
        shuffled.bodies.shuffle(&mut rng);
        shuffled.springs.shuffle(&mut rng);
        let b = shuffled.model().modes().unwrap().frequency_hz;
        prop_assert_eq!(a.len(), b.len());
        for (x, y) in a.iter().zip(&b) {
            // Eigen solver round-off on well-separated scales: relative 1e-8.
            prop_assert!((x - y).abs() <= 1e-8 * x.max(1e-3), "{x} vs {y} Hz");
        }
    }

    /// Linearity of the response PSD: S_y = Σ|H|² S_in, so scaling the input PSD by α scales
    /// every output PSD by α and its RMS by √α (exactly, up to rounding).
    #[test]
    fn rms_scales_with_sqrt_of_input_psd_scale(rig in rig(), la in -6.0f64..6.0, level in -16.0f64..-10.0) {
        let model = rig.model();
        let alpha = 10f64.powf(la);
        let grid = FreqGrid::log(0.5, 200.0, 120).unwrap();
        let psd = Psd::on_grid(&grid, vec![10f64.powf(level); grid.len()], Quantity::Acceleration).unwrap();
        let outs: Vec<String> = model.dof_labels().iter().map(|l| l.to_string()).collect();
        let refs: Vec<&str> = outs.iter().map(String::as_str).collect();
        let d1 = Disturbances::default().with_ground_all(&psd, [1.0, 0.7, 0.4]).unwrap();
        let d2 = Disturbances::default().with_ground_all(&psd.scale(alpha).unwrap(), [1.0, 0.7, 0.4]).unwrap();
        let r1 = response_psd(&model, &grid, &d1, &refs, false).unwrap();
        let r2 = response_psd(&model, &grid, &d2, &refs, false).unwrap();
        for o in &refs {
            let a = r1.output_psd(o, Quantity::Displacement).unwrap().rms();
            let b = r2.output_psd(o, Quantity::Displacement).unwrap().rms();
            prop_assert!(a > 0.0);
            prop_assert!((b / a - alpha.sqrt()).abs() <= 1e-12 * alpha.sqrt(), "{o}: {b} / {a} vs √{alpha}");
        }
    }
}

/// Welch is quadratic in the data, W(x + y) = W(x) + W(y) + 2·(mean over segments of the
/// scaled Re XY*); for independent zero-mean x and y the cross term has mean 0, so
/// E[W(x + y)] = E[W(x)] + E[W(y)] (Bendat & Piersol, Random Data, 4th ed., 2010, §5.2: the
/// cross-spectrum of independent processes is zero). Over S = 64 seeds, per bin,
/// d = W(x + y) − W(x) − W(y) gives z = mean(d) / (std(d)/√S), about N(0, 1). Asserted:
/// at most 3 % of bins have |z| > 3 (0.27 % expected), the mean z is within 4/√bins of 0, and
/// the mean |mean(d)| is below 5 % of the mean of W(x) + W(y).
#[test]
fn welch_of_independent_sum_is_sum_of_welch_in_expectation() {
    let (fs, n, nperseg, seeds) = (200.0, 8192, 256, 64);
    let cfg = WelchConfig::new(nperseg);
    let nb = nperseg / 2 + 1;
    let (mut d_all, mut sum_all) = (vec![Vec::new(); nb], vec![0.0; nb]);
    for s in 0..seeds {
        let mut rng = StdRng::seed_from_u64(1000 + s);
        let white: Vec<f64> = (0..n).map(|_| StandardNormal.sample(&mut rng)).collect();
        // y: AR(1) coloured noise, independent of x.
        let mut y = vec![0.0; n];
        let mut prev = 0.0;
        for v in y.iter_mut() {
            let e: f64 = StandardNormal.sample(&mut rng);
            prev = 0.9 * prev + 0.5 * e;
            *v = prev;
        }
        let sum: Vec<f64> = white.iter().zip(&y).map(|(a, b)| a + b).collect();
        let (wx, wy, ws) =
            (welch(&white, fs, &cfg).unwrap(), welch(&y, fs, &cfg).unwrap(), welch(&sum, fs, &cfg).unwrap());
        for k in 0..nb {
            d_all[k].push(ws.values[k] - wx.values[k] - wy.values[k]);
            sum_all[k] += (wx.values[k] + wy.values[k]) / seeds as f64;
        }
    }
    // Bins 1..nb-1 (DC and Nyquist have detrending / one-sided special cases).
    let (mut zs, mut rel) = (Vec::new(), Vec::new());
    for k in 1..nb - 1 {
        let d = &d_all[k];
        let mean = d.iter().sum::<f64>() / d.len() as f64;
        let var = d.iter().map(|v| (v - mean).powi(2)).sum::<f64>() / (d.len() - 1) as f64;
        zs.push(mean / (var.sqrt() / (d.len() as f64).sqrt()));
        rel.push(mean.abs() / sum_all[k]);
    }
    let big = zs.iter().filter(|z| z.abs() > 3.0).count() as f64 / zs.len() as f64;
    let mean_z = zs.iter().sum::<f64>() / zs.len() as f64;
    let mean_rel = rel.iter().sum::<f64>() / rel.len() as f64;
    println!("bins with |z| > 3: {:.2} %, mean z {mean_z:.3}, mean |d|/S {mean_rel:.4}", 100.0 * big);
    assert!(big <= 0.03, "{:.1} % of bins with |z| > 3", 100.0 * big);
    assert!(mean_z.abs() <= 4.0 / (zs.len() as f64).sqrt(), "mean z = {mean_z}");
    assert!(mean_rel < 0.05, "mean relative cross term {mean_rel}");
}

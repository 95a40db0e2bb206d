//! FRF benches: chains (n = 6, 12, 48, 200; F = 1024, 4096) on the automatic solver and on the
//! dense reference path, piers, modes, and spring variants (Woodbury identity, rational form).
use criterion::{BenchmarkId, Criterion, Throughput, criterion_group, criterion_main};
use num_complex::Complex64;
use std::time::Duration;
use stillsky::frf::variants::VariantPlan;
use stillsky::frf::{FrfPlan, RmsOut, SolverChoice};
use stillsky::grid::FreqGrid;
use stillsky::model::Model;
use stillsky::stiffness::StiffnessModel;
use stillsky_benches::{chain_toml, chain_uniform_loss_toml, pad_specs, pier_toml};

fn frf(c: &mut Criterion) {
    let mut g = c.benchmark_group("frf_chain");
    g.sample_size(20).measurement_time(Duration::from_secs(2)).warm_up_time(Duration::from_millis(500));
    for &n in &[6usize, 12, 48, 200] {
        for &nf in &[1024usize, 4096] {
            let m = Model::from_toml_str(&chain_toml(n), "chain").unwrap();
            let grid = FreqGrid::log(0.5, 500.0, nf).unwrap();
            let out = format!("m{}:z", n - 1);
            let plan = FrfPlan::new(&m, &["ground_z"], &[out.as_str()]).unwrap();
            let mut buf = vec![Complex64::default(); nf];
            g.throughput(Throughput::Elements(nf as u64));
            let id = format!("n{n}_f{nf}");
            g.bench_with_input(BenchmarkId::new("plan", &id), &nf, |b, _| {
                b.iter(|| plan.evaluate_into(&grid, Some(&mut buf), None).unwrap())
            });
            g.bench_with_input(BenchmarkId::new("convenience", &id), &nf, |b, _| {
                b.iter(|| m.frf(grid.hz(), &["ground_z"], &[out.as_str()]).unwrap())
            });
            if n <= 48 || nf == 1024 {
                let dense = plan.clone().with_solver(SolverChoice::Dense);
                g.bench_with_input(BenchmarkId::new("dense", &id), &nf, |b, _| {
                    b.iter(|| dense.evaluate_into(&grid, Some(&mut buf), None).unwrap())
                });
            }
        }
    }
    g.finish();
    let mut g = c.benchmark_group("frf_pier");
    g.sample_size(10).measurement_time(Duration::from_secs(2));
    for &el in &[8usize, 33] {
        let m = Model::from_toml_str(&pier_toml(el), "pier").unwrap();
        let grid = FreqGrid::log(0.5, 500.0, 1024).unwrap();
        let plan = FrfPlan::new(&m, &["ground_x"], &["head:rx"]).unwrap();
        let mut buf = vec![Complex64::default(); 1024];
        g.throughput(Throughput::Elements(1024));
        g.bench_with_input(BenchmarkId::new("plan", format!("n{}", m.dof_count())), &el, |b, _| {
            b.iter(|| plan.evaluate_into(&grid, Some(&mut buf), None).unwrap())
        });
    }
    g.finish();
}

fn modes(c: &mut Criterion) {
    // Modal superposition path (uniform loss factor): plan (eigen-solution) + 4096 frequencies.
    let mut g = c.benchmark_group("frf_modal");
    g.sample_size(20).measurement_time(Duration::from_secs(2));
    for &n in &[12usize, 48] {
        let m = Model::from_toml_str(&chain_uniform_loss_toml(n), "chain").unwrap();
        let grid = FreqGrid::log(0.5, 500.0, 4096).unwrap();
        let out = format!("m{}:z", n - 1);
        assert!(FrfPlan::new(&m, &["ground_z"], &[out.as_str()]).unwrap().is_modal());
        g.bench_with_input(BenchmarkId::new("plan_and_eval", format!("n{n}_f4096")), &n, |b, _| {
            b.iter(|| m.frf(grid.hz(), &["ground_z"], &[out.as_str()]).unwrap())
        });
    }
    g.finish();
    let mut g = c.benchmark_group("modes");
    g.sample_size(20).measurement_time(Duration::from_secs(2));
    for &n in &[12usize, 48] {
        let m = Model::from_toml_str(&chain_toml(n), "chain").unwrap();
        g.bench_with_input(BenchmarkId::from_parameter(n), &n, |b, _| b.iter(|| m.modes().unwrap()));
    }
    g.finish();
}

/// 1000 pad specs replacing s0, s1, s2 of the n = 12 chain; 2048 frequencies; FRF and the RMS
/// response to a flat ground-displacement PSD (1e-12 m²/Hz, invented) per spec.
fn variants(c: &mut Criterion) {
    let mut g = c.benchmark_group("variants");
    g.sample_size(10).measurement_time(Duration::from_secs(5));
    let m = Model::from_toml_str(&chain_toml(12), "chain").unwrap();
    let grid = FreqGrid::linear(0.5, 500.0, 2048).unwrap();
    let specs: Vec<Vec<StiffnessModel>> = pad_specs(1000);
    let plan = VariantPlan::new(&m, &["s0", "s1", "s2"], &["ground_z"], &["m11:z"]).unwrap();
    let psd = vec![1e-12; grid.len()];
    g.throughput(Throughput::Elements(specs.len() as u64));
    // Output arrays allocated per iteration, as a caller wanting owned results would.
    g.bench_function("woodbury_1000x2048", |b| {
        b.iter(|| {
            let mut h = vec![Complex64::default(); specs.len() * grid.len()];
            let mut rms = vec![0.0; specs.len()];
            let r = RmsOut { input_psd: &psd, rms: &mut rms };
            plan.evaluate_into(&grid, &specs, Some(&mut h), Some(r)).unwrap();
            std::hint::black_box((h, rms))
        })
    });
    // The same variants keeping only the RMS (no FRF array).
    g.bench_function("rms_only_1000x2048", |b| {
        b.iter(|| std::hint::black_box(plan.evaluate_rms(&grid, &specs, &psd).unwrap()))
    });
    g.finish();
}

criterion_group!(benches, frf, modes, variants);
criterion_main!(benches);

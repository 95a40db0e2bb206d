//! FRF benches: direct solve per frequency on chains (n = 6, 12, 48, 200) and piers.
use criterion::{BenchmarkId, Criterion, Throughput, criterion_group, criterion_main};
use stillsky::frf::FrfPlan;
use stillsky::grid::FreqGrid;
use stillsky::model::Model;
use stillsky_benches::{chain_toml, pier_toml};

fn frf(c: &mut Criterion) {
    let mut g = c.benchmark_group("frf_chain");
    g.sample_size(20).measurement_time(std::time::Duration::from_secs(3));
    for &(n, nf) in &[(6usize, 4096usize), (12, 1024), (12, 4096), (48, 4096), (200, 1024)] {
        let m = Model::from_toml_str(&chain_toml(n), "chain").unwrap();
        let grid = FreqGrid::log(0.5, 500.0, nf).unwrap();
        let out = format!("m{}:z", n - 1);
        let plan = FrfPlan::new(&m, &["ground_z"], &[out.as_str()]).unwrap();
        let mut buf = vec![num_complex::Complex64::default(); nf];
        g.throughput(Throughput::Elements(nf as u64));
        g.bench_with_input(BenchmarkId::new("plan", format!("n{n}_f{nf}")), &nf, |b, _| {
            b.iter(|| plan.evaluate_into(grid.hz(), &mut buf).unwrap())
        });
        g.bench_with_input(BenchmarkId::new("convenience", format!("n{n}_f{nf}")), &nf, |b, _| {
            b.iter(|| m.frf(grid.hz(), &["ground_z"], &[out.as_str()]).unwrap())
        });
    }
    g.finish();
    let mut g = c.benchmark_group("frf_pier");
    g.sample_size(10).measurement_time(std::time::Duration::from_secs(3));
    for &el in &[8usize, 33] {
        let m = Model::from_toml_str(&pier_toml(el), "pier").unwrap();
        let grid = FreqGrid::log(0.5, 500.0, 1024).unwrap();
        let plan = FrfPlan::new(&m, &["ground_x"], &["head:rx"]).unwrap();
        let mut buf = vec![num_complex::Complex64::default(); 1024];
        g.throughput(Throughput::Elements(1024));
        g.bench_with_input(BenchmarkId::new("plan", format!("n{}", m.dof_count())), &el, |b, _| {
            b.iter(|| plan.evaluate_into(grid.hz(), &mut buf).unwrap())
        });
    }
    g.finish();
}

fn modes(c: &mut Criterion) {
    let mut g = c.benchmark_group("modes");
    g.sample_size(20);
    for &n in &[12usize, 48] {
        let m = Model::from_toml_str(&chain_toml(n), "chain").unwrap();
        g.bench_with_input(BenchmarkId::from_parameter(n), &n, |b, _| b.iter(|| m.modes().unwrap()));
    }
    g.finish();
}

criterion_group!(benches, frf, modes);
criterion_main!(benches);

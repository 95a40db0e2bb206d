//! Per-sample cost of the image-motion monitor (`Monitor::push`), 2 axes, blocks of 1 and 200.
use criterion::{BenchmarkId, Criterion, Throughput, criterion_group, criterion_main};
use std::time::Duration;
use stillsky::model::Model;
use stillsky::monitor::{Monitor, MonitorConfig};
use stillsky_benches::{MONITOR_RIG_TOML, noise};

fn bench(c: &mut Criterion) {
    let mut g = c.benchmark_group("monitor_push");
    g.sample_size(20).measurement_time(Duration::from_secs(2));
    let m = Model::from_toml_str(MONITOR_RIG_TOML, "rig").unwrap();
    let cfg = MonitorConfig::default();
    let fs = cfg.sample_rate_hz;
    let x = noise(2 * 200_000, 3).into_iter().map(|v| 1e-3 * v).collect::<Vec<_>>();
    for &block in &[1usize, 200] {
        let mut mon = Monitor::from_model(&m, "xy", &cfg).unwrap();
        let mut i = 0usize;
        let mut t = 0.0;
        g.throughput(Throughput::Elements(block as u64));
        g.bench_with_input(BenchmarkId::new("block", block), &block, |b, _| {
            b.iter(|| {
                if i + 2 * block > x.len() {
                    i = 0;
                }
                mon.push(t, &x[i..i + 2 * block], 2).unwrap();
                i += 2 * block;
                t += block as f64 / fs;
            })
        });
    }
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);

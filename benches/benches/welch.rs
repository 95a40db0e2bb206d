//! Welch benches: 720 000 samples in memory (nperseg 4096, Hann, 50 %), streaming from a file.
use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use std::time::Duration;
use stillsky::io::series::{SeriesChunk, SeriesOptions, SeriesReader};
use stillsky::spectrum::welch::{WelchConfig, WelchStream, welch};
use stillsky_benches::{noise, write_text_series};

fn bench(c: &mut Criterion) {
    let mut g = c.benchmark_group("welch");
    g.sample_size(20).measurement_time(Duration::from_secs(3));
    let x = noise(720_000, 7);
    let cfg = WelchConfig::new(4096);
    g.throughput(Throughput::Elements(x.len() as u64));
    g.bench_function("memory_720k", |b| b.iter(|| welch(&x, 200.0, &cfg).unwrap()));
    let path = std::env::temp_dir().join(format!("stillsky-bench-{}.txt", std::process::id()));
    write_text_series(&path, &x, 200.0).unwrap();
    let opts = SeriesOptions::default();
    g.bench_function("stream_file_720k", |b| {
        b.iter(|| {
            let mut r = SeriesReader::open(&path, &opts).unwrap();
            let mut ws = WelchStream::new(200.0, &cfg, 1).unwrap();
            let mut ch = SeriesChunk::new();
            while r.next_chunk(65_536, &mut ch).unwrap() > 0 {
                ws.push_axis(0, ch.axis(0).unwrap()).unwrap();
            }
            ws.finish().unwrap()
        })
    });
    g.finish();
    let _ = std::fs::remove_file(&path);
}

criterion_group!(benches, bench);
criterion_main!(benches);

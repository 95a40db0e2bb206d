//! Streaming Welch over a text recording (for a peak-memory check with `/usr/bin/time -v`).
//! Usage: `stream_welch write PATH N` writes N seeded samples at 200 Hz;
//!        `stream_welch run PATH` streams it through `WelchStream` (nperseg 4096, Hann, 50 %).
use stillsky::io::series::{SeriesChunk, SeriesOptions, SeriesReader};
use stillsky::spectrum::welch::{WelchConfig, WelchStream};

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let a: Vec<String> = std::env::args().collect();
    match a.get(1).map(|s| s.as_str()) {
        Some("write") if a.len() == 4 => {
            let n: usize = a[3].parse()?;
            let x = stillsky_benches::noise(n, 11);
            stillsky_benches::write_text_series(std::path::Path::new(&a[2]), &x, 200.0)?;
        }
        Some("run") if a.len() == 3 => {
            let t = std::time::Instant::now();
            let mut r = SeriesReader::open(&a[2], &SeriesOptions::default())?;
            let mut ws = WelchStream::new(200.0, &WelchConfig::new(4096), 1)?;
            let mut ch = SeriesChunk::new();
            while r.next_chunk(65_536, &mut ch)? > 0 {
                ws.push_axis(0, ch.axis(0).unwrap_or_default())?;
            }
            let p = ws.finish()?;
            println!(
                "samples {} segments {} psd[10] {:.6e} elapsed {:.2} s",
                ws.n_samples(0),
                p[0].n_segments,
                p[0].values[10],
                t.elapsed().as_secs_f64()
            );
        }
        _ => return Err("usage: stream_welch write PATH N | run PATH".into()),
    }
    Ok(())
}

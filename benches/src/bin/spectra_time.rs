//! Timing and fingerprint of the in-memory spectral estimators, for profiling with `perf`.
//! Usage: `spectra_time [welch|ppsd|fft|all] [REPEAT] [DUMP]`:
//! - `welch`: 8.64 M samples, nperseg 4096, Hann, 50 % (the issue-23 case);
//! - `ppsd`: the probabilistic PSD of three axes of a day at 100 Hz (default settings);
//! - `fft`: single-thread real FFTs of 65 536 points alone (the floor of the PPSD's work).
//!
//! With DUMP (a path) the results are written bit for bit (hex of each f64, each count), so two
//! builds can be compared for identical output with `cmp`.
use std::io::Write;
use std::time::Instant;

use stillsky::spectrum::{PpsdConfig, WelchConfig, probabilistic_psd_axes, welch};

/// The median wall time of `repeat` runs of `f` and the last run's result.
fn timed<T>(
    repeat: usize,
    mut f: impl FnMut() -> stillsky::Result<T>,
) -> Result<(f64, T), Box<dyn std::error::Error>> {
    let (mut t, mut r) = (Vec::new(), None);
    for _ in 0..repeat {
        let s = Instant::now();
        r = Some(f()?);
        t.push(s.elapsed().as_secs_f64());
    }
    t.sort_by(f64::total_cmp);
    Ok((t[t.len() / 2], r.ok_or("repeat 0")?))
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let a: Vec<String> = std::env::args().collect();
    let what = a.get(1).map(String::as_str).unwrap_or("all");
    let repeat: usize = a.get(2).map(|s| s.parse()).transpose()?.unwrap_or(3);
    let mut dump = a.get(3).map(std::fs::File::create).transpose()?.map(std::io::BufWriter::new);
    let n = 8_640_000;
    if what == "welch" || what == "all" {
        let x = stillsky_benches::noise(n, 1);
        let cfg = WelchConfig::new(4096);
        let (t, r) = timed(repeat, || welch(&x, 100.0, &cfg))?;
        println!("welch 8.64M nperseg 4096: median {t:.4} s over {repeat}");
        if let Some(d) = dump.as_mut() {
            for v in &r.values {
                writeln!(d, "welch {:016x}", v.to_bits())?;
            }
        }
    }
    if what == "ppsd" || what == "all" {
        // Integer-valued counts like a digitiser's (a random walk plus uniform noise), scaled
        // by 1/1e9 to m/s as the peer script does.
        let axes: Vec<Vec<f64>> = (0..3)
            .map(|k| {
                let w = stillsky_benches::noise(n, 10 + k);
                let u = stillsky_benches::noise(n, 20 + k);
                let mut acc = 0.0;
                w.iter()
                    .zip(&u)
                    .map(|(a, b)| {
                        acc += a;
                        ((acc / 8.0).floor() + (b * 300.0).round()).clamp(-2e9, 2e9)
                    })
                    .collect()
            })
            .collect();
        let refs: Vec<&[f64]> = axes.iter().map(|v| v.as_slice()).collect();
        let cfg = PpsdConfig::default().with_input(stillsky::spectrum::Quantity::Velocity, 1e-9);
        let (t, r) = timed(repeat, || probabilistic_psd_axes(&refs, 100.0, &cfg))?;
        println!("ppsd 3 x 8.64M ({} blocks each): median {t:.4} s over {repeat}", r[0].1.len());
        if let Some(d) = dump.as_mut() {
            for (p, blocks) in &r {
                for c in p.histogram() {
                    writeln!(d, "hist {c}")?;
                }
                for v in p.mean_db() {
                    writeln!(d, "mean {:016x}", v.to_bits())?;
                }
                for b in blocks {
                    for v in &b.binned_db {
                        writeln!(d, "binned {:016x}", v.to_bits())?;
                    }
                    for v in b.psd.values() {
                        writeln!(d, "psd {:016x}", v.to_bits())?;
                    }
                }
            }
        }
    }
    if what == "fft" || what == "all" {
        use realfft::RealFftPlanner;
        let m = 65_536;
        let fft = RealFftPlanner::<f64>::new().plan_fft_forward(m);
        let mut input = stillsky_benches::noise(m, 3);
        let mut out = fft.make_output_vec();
        let mut scratch = fft.make_scratch_vec();
        let k = 400;
        let s = Instant::now();
        for _ in 0..k {
            fft.process_with_scratch(&mut input, &mut out, &mut scratch)?;
        }
        let per = s.elapsed().as_secs_f64() / k as f64;
        println!(
            "real FFT of {m}: {:.1} us each, one thread (2538 of them: {:.3} s)",
            per * 1e6,
            per * 2538.0
        );
        for len in [m / 2, m] {
            let fft = rustfft::FftPlanner::<f64>::new().plan_fft_forward(len);
            let mut buf: Vec<num_complex::Complex64> = input[..len / 2]
                .iter()
                .zip(&input[len / 2..])
                .map(|(&a, &b)| num_complex::Complex64::new(a, b))
                .collect();
            buf.resize(len, num_complex::Complex64::new(0.5, 0.25));
            let mut scratch = vec![num_complex::Complex64::new(0.0, 0.0); fft.get_inplace_scratch_len()];
            let s = Instant::now();
            for _ in 0..k {
                fft.process_with_scratch(&mut buf, &mut scratch);
            }
            println!(
                "complex FFT of {len}, in place: {:.1} us each (scratch {} in place, {} out of place)",
                s.elapsed().as_secs_f64() / k as f64 * 1e6,
                fft.get_inplace_scratch_len(),
                fft.get_outofplace_scratch_len()
            );
            let mut out = buf.clone();
            let mut scratch = vec![num_complex::Complex64::new(0.0, 0.0); fft.get_outofplace_scratch_len()];
            let s = Instant::now();
            for _ in 0..k {
                fft.process_outofplace_with_scratch(&mut buf, &mut out, &mut scratch);
            }
            println!(
                "complex FFT of {len}, out of place: {:.1} us each",
                s.elapsed().as_secs_f64() / k as f64 * 1e6
            );
        }
    }
    Ok(())
}

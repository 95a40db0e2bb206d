//! Repeat the spring-variants bench (1000 pad specs × 2048 frequencies, k = 3, the n = 12 chain)
//! and print the minimum time, for comparing two builds run in turn.
//! Usage: `variants_repeat [N] [frf|rms|into]`: FRF + RMS (default), RMS only, or FRFs only into
//! a reused buffer.
use num_complex::Complex64;
use stillsky::frf::RmsOut;
use stillsky::frf::variants::VariantPlan;
use stillsky::grid::FreqGrid;
use stillsky::model::Model;
use stillsky_benches::{chain_toml, pad_specs};

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let a: Vec<String> = std::env::args().collect();
    let reps: usize = a.get(1).map(|s| s.parse()).transpose()?.unwrap_or(10);
    let mode = a.get(2).map(String::as_str).unwrap_or("frf");
    let m = Model::from_toml_str(&chain_toml(12), "chain")?;
    let grid = FreqGrid::linear(0.5, 500.0, 2048)?;
    let specs = pad_specs(1000);
    let plan = VariantPlan::new(&m, &["s0", "s1", "s2"], &["ground_z"], &["m11:z"])?;
    let psd = vec![1e-12; grid.len()];
    let mut buf = vec![Complex64::new(0.0, 0.0); specs.len() * grid.len()];
    let (mut best, mut check) = (f64::MAX, 0.0);
    for _ in 0..reps {
        let t = std::time::Instant::now();
        match mode {
            "frf" => {
                // Owned outputs allocated per run, as before the buffers were caller-owned.
                let mut h = vec![Complex64::new(0.0, 0.0); specs.len() * grid.len()];
                let mut r = vec![0.0; specs.len()];
                plan.evaluate_into(
                    &grid,
                    &specs,
                    Some(&mut h),
                    Some(RmsOut { input_psd: &psd, rms: &mut r }),
                )?;
                check += r[7] + h[3 * grid.len() + 100].re;
            }
            "rms" => check += plan.evaluate_rms(&grid, &specs, &psd)?[[7, 0, 0]],
            "into" => {
                plan.evaluate_into(&grid, &specs, Some(&mut buf), None)?;
                check += buf[7].re;
            }
            _ => return Err(format!("unknown mode '{mode}' (frf, rms or into)").into()),
        }
        best = best.min(t.elapsed().as_secs_f64());
    }
    println!("{mode}: minimum {:.2} ms over {reps} runs (check {check:e})", best * 1e3);
    Ok(())
}

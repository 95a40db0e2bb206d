//! The isolator sweep on both engines, side by side in one run: the demo rig on a paver
//! (docs/examples/tripod-paver.toml) with an invented catalogue of N pads (default 1000; a spread
//! of stiffness, loss factor and model kind, generated here), the three demo recordings, calm
//! and 4 m/s. Prints each engine's wall time, the speed-up, and the largest relative difference
//! over every numeric column of the rows.
//! Usage: `sweep_engines [N] [auto-repeats]` (run from the workspace root). `SWEEP_ENGINES_WINDS`
//! replaces the wind cases (comma-separated, as the `sweep` command takes them, e.g. `calm`).
use std::path::Path;
use std::time::Instant;
use stillsky::batch::{
    Catalogue, GroundSource, PadMechanism, SWEEP_ROW, SweepConfig, SweepEngine, SweepInputs, SweepValue,
    WindCase, spring_changes, sweep_rows,
};
use stillsky::schema::ModelFile;

/// An invented catalogue of `n` pads (deterministic): compression stiffness log-spread over
/// 5e4–2e7 N/m, shear a quarter to a half of it, loss factors 0.02–0.6, every third a Zener
/// pad and every fifth a spring-and-dashpot pad.
fn catalogue_toml(n: usize) -> String {
    let mut s = String::new();
    // Seed 1 starts the generator at 0x9e37_79b9_7f4a_7c15: the catalogue as before.
    let mut u = stillsky_benches::uniform(1);
    for i in 0..n {
        let kc = 5e4 * (400f64).powf(u());
        let ks = kc * (0.25 + 0.25 * u());
        let eta = 0.02 + 0.58 * u();
        let body = if i % 3 == 0 {
            format!("model = \"zener\"\ndynamic_ratio = {}\ntau_s = {}", 1.2 + u(), 0.002 + 0.02 * u())
        } else if i % 5 == 0 {
            let c = eta * kc / (2.0 * std::f64::consts::PI * 10.0);
            format!(
                "model = \"kelvin-voigt\"\ncompression_damping_ns_per_m = {c}\nshear_damping_ns_per_m = {}",
                c * ks / kc
            )
        } else {
            format!("model = \"hysteretic\"\nloss_factor = {eta}")
        };
        s.push_str(&format!(
            "[[isolator]]\nname = \"pad-{i:04}\"\ncompression_n_per_m = {kc}\nshear_n_per_m = {ks}\n{body}\nrated_load_n = {}\n\n",
            50.0 + 1000.0 * u()
        ));
    }
    s
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let a: Vec<String> = std::env::args().collect();
    let n: usize = a.get(1).map(|s| s.parse()).transpose()?.unwrap_or(1000);
    let repeats: usize = a.get(2).map(|s| s.parse()).transpose()?.unwrap_or(3);
    let ex = Path::new("docs/examples");
    let model =
        ModelFile::parse(&std::fs::read_to_string(ex.join("tripod-paver.toml"))?, "tripod-paver.toml")?;
    let cat = Catalogue::parse(&catalogue_toml(n), "invented")?;
    let grounds: Vec<GroundSource> = ["quiet-night", "road-nearby", "footsteps"]
        .iter()
        .map(|g| GroundSource::Recording(ex.join("recordings").join(format!("{g}.csv"))))
        .collect();
    let winds: Vec<WindCase> = std::env::var("SWEEP_ENGINES_WINDS")
        .unwrap_or_else(|_| "calm,4".into())
        .split(',')
        .map(WindCase::parse)
        .collect::<Result<_, _>>()?;
    let inputs = SweepInputs { model: &model, catalogue: &cat, grounds: &grounds, winds: &winds };
    let cfg = SweepConfig::new()?;
    // Which isolators the engine can take: those whose model differs from the first pad's only
    // in spring stiffness.
    let mech = PadMechanism::for_file(&model, &cfg.pad_prefix)?;
    let base = mech.spec_with(&cat.isolators[1])?;
    let mut taken = 0;
    for iso in &cat.isolators {
        let s = mech.spec_with(iso)?;
        if spring_changes(&base, &s).is_some() {
            taken += 1;
        } else if std::env::var("SWEEP_ENGINES_DIFF").is_ok() {
            let (x, y) = (format!("{base:?}"), format!("{s:?}"));
            let k = x.chars().zip(y.chars()).take_while(|(a, b)| a == b).count();
            let ctx = |t: &str| t.chars().skip(k.saturating_sub(200)).take(400).collect::<String>();
            println!("{}: differs at {k}:\n{}\n---\n{}", iso.name, ctx(&x), ctx(&y));
        }
    }
    println!("isolators the spring-variant engine takes: {taken} of {}", cat.isolators.len());
    let mut best = f64::MAX;
    let mut fast = Vec::new();
    for _ in 0..repeats.max(1) {
        let t = Instant::now();
        fast = sweep_rows(&inputs, &cfg)?;
        best = best.min(t.elapsed().as_secs_f64());
    }
    if std::env::var("SWEEP_ENGINES_FAST_ONLY").is_ok() {
        println!("spring-variant engine {best:.3} s ({} rows; per-row path skipped)", fast.len());
        return Ok(());
    }
    let t = Instant::now();
    let slow = sweep_rows(&inputs, &cfg.clone().with_engine(SweepEngine::Rebuild))?;
    let t_slow = t.elapsed().as_secs_f64();
    let mut worst = (0.0f64, String::new());
    for (x, y) in fast.iter().zip(&slow) {
        for (k, (p, q)) in x.values().into_iter().zip(y.values()).enumerate() {
            // P(outside ½ px) is 1 − P(inside), about 1e-16 absolute rounding on either path.
            if let (SweepValue::Number(p), SweepValue::Number(q)) = (p, q)
                && p != q
                && !(p.is_nan() && q.is_nan())
                && !(SWEEP_ROW[k].0 == "p_outside_half_px" && (p - q).abs() <= 1e-15)
            {
                let r = (p - q).abs() / q.abs().max(1e-300);
                if std::env::var("SWEEP_ENGINES_DIFF").is_ok() && r > 1e-9 {
                    println!("{} {}: {p:e} vs {q:e}", x.key, SWEEP_ROW[k].0);
                }
                if r > worst.0 {
                    worst = (r, format!("{} {}", x.key, SWEEP_ROW[k].0));
                }
            }
        }
    }
    let errors = fast.iter().filter(|r| r.is_error()).count();
    println!(
        "rows {} (errors {errors}); threads {}\nper-row engine {t_slow:.3} s ({:.3} ms/row)\nspring-variant engine {best:.3} s (minimum of {repeats}; {:.4} ms/row)\nspeed-up {:.1}x\nlargest relative difference {:.2e} ({})",
        fast.len(),
        rayon_threads(),
        1e3 * t_slow / slow.len() as f64,
        1e3 * best / fast.len() as f64,
        t_slow / best,
        worst.0,
        worst.1
    );
    Ok(())
}

fn rayon_threads() -> String {
    std::env::var("RAYON_NUM_THREADS").unwrap_or_else(|_| "all cores".into())
}

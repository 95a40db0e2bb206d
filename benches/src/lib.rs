//! Model generators shared by the benches and the peer comparison scripts.

/// A chain ground–k–m1–k–m2–…–mn of single-DOF (vertical) masses with hysteretic springs, a
/// dashpot on every third spring, and a Zener pad on the first: n DOFs, banded (tridiagonal).
pub fn chain_toml(n: usize) -> String {
    chain_with(n, false)
}

/// The same chain with one loss factor (0.02) on every spring and no dashpots or pads: a
/// proportionally damped model, which takes the modal path.
pub fn chain_uniform_loss_toml(n: usize) -> String {
    chain_with(n, true)
}

fn chain_with(n: usize, uniform: bool) -> String {
    let mut s = String::new();
    for i in 0..n {
        s.push_str(&format!(
            "[[body]]\nname = \"m{i}\"\nmass_kg = {}\ncg_m = [0, 0, {}]\ninertia_kgm2 = [1, 1, 1]\ndofs = [\"z\"]\n\n",
            2.0 + (i % 5) as f64,
            i as f64 * 0.1
        ));
    }
    for i in 0..n {
        let from = if i == 0 { "ground".to_string() } else { format!("m{}", i - 1) };
        let k = 1.0e6 * (1.0 + 0.3 * ((i * 7) % 11) as f64);
        let stiff = if uniform {
            format!("stiffness_n_per_m = {k}\nloss_factor = 0.02")
        } else if i == 0 {
            "zener = { k0 = 4e5, k_inf = 1.2e6, tau_s = 0.002 }".to_string()
        } else if i % 3 == 0 {
            format!("stiffness_n_per_m = {k}\ndamping_ns_per_m = 40.0")
        } else {
            format!("stiffness_n_per_m = {k}\nloss_factor = 0.02")
        };
        s.push_str(&format!(
            "[[spring]]\nname = \"s{i}\"\nfrom = \"{from}\"\nto = \"m{i}\"\nat_m = [0, 0, {}]\ndirection = [0, 0, 1]\n{stiff}\n\n",
            i as f64 * 0.1
        ));
    }
    s
}

/// A vertical steel pier (3-D beam elements, 6 DOF per node) clamped to the ground with a head
/// body on top: 6·elements DOFs, banded.
pub fn pier_toml(elements: usize) -> String {
    format!(
        r#"
[[body]]
name = "head"
mass_kg = 30
cg_m = [0, 0, 1.5]
inertia_kgm2 = [0.6, 0.6, 0.4]

[[beam]]
name = "pier"
from = "ground"
to = "head"
from_at_m = [0, 0, 0]
to_at_m = [0, 0, 1.5]
section = {{ shape = "tube", outer_diameter_m = 0.2, wall_m = 0.006 }}
material = "steel-s235"
elements = {elements}
added_mass_kg_per_m = 40
added_loss_factor = 0.02
"#
    )
}

/// `count` pad specs for the sweep bench: three replacement springs each (a Zener pad, a
/// hysteretic spring, a Kelvin–Voigt spring), parameters spread deterministically (invented).
pub fn pad_specs(count: usize) -> Vec<Vec<stillsky::stiffness::StiffnessModel>> {
    use stillsky::stiffness::StiffnessModel as S;
    (0..count)
        .map(|v| {
            let t = v as f64 / count.max(1) as f64;
            let k = 2e5 + 1.8e6 * t;
            vec![
                S::Zener { k0: k, k_inf: 3.0 * k, tau_s: 0.0005 + 0.004 * t },
                S::Hysteretic { k: 1.5 * k, loss_factor: 0.05 + 0.2 * t },
                S::KelvinVoigt { k: 0.8 * k, c: 20.0 + 200.0 * t },
            ]
        })
        .collect()
}

/// A seeded uniform generator on [0, 1) (xorshift64; for invented bench inputs).
pub fn uniform(seed: u64) -> impl FnMut() -> f64 {
    let mut s = seed.wrapping_mul(0x9E37_79B9_7F4A_7C15) | 1;
    move || {
        s ^= s << 13;
        s ^= s >> 7;
        s ^= s << 17;
        (s >> 11) as f64 / (1u64 << 53) as f64
    }
}

/// Seeded Gaussian-like noise (sum of 4 uniforms, [`uniform`]; unit-free).
pub fn noise(n: usize, seed: u64) -> Vec<f64> {
    let mut u = uniform(seed);
    (0..n).map(|_| (u() + u() + u() + u() - 2.0) * 1.732).collect()
}

/// Write a one-axis text recording (`# fs_hz=…`, header `z_m_s2`) for the streaming benches.
pub fn write_text_series(path: &std::path::Path, x: &[f64], fs_hz: f64) -> std::io::Result<()> {
    use std::io::Write;
    let mut w = std::io::BufWriter::new(std::fs::File::create(path)?);
    writeln!(w, "# fs_hz={fs_hz}\nz_m_s2")?;
    for v in x {
        writeln!(w, "{v:.9e}")?;
    }
    w.flush()
}

/// The monitor bench rig: a 20 kg tube on four horizontal springs with optics (invented).
pub const MONITOR_RIG_TOML: &str = include_str!("../../tests/data/monitor-rig.toml");

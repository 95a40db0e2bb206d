//! Model generators shared by the benches and the peer comparison scripts.

/// A chain ground–k–m1–k–m2–…–mn of single-DOF (vertical) masses with hysteretic springs, a
/// dashpot on every third spring, and a Zener pad on the first: n DOFs, banded (tridiagonal).
pub fn chain_toml(n: usize) -> String {
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
        let stiff = if i == 0 {
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

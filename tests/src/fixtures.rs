//! Shared test fixtures. Included by path (`#[path]`) from test files of other crates, so it
//! uses nothing but std.

/// The single-degree-of-freedom model file (tests/data/sdof.toml) with its placeholders.
pub const SDOF_TEMPLATE: &str = include_str!("../data/sdof.toml");

/// One mass of `mass_kg` (z only) on a vertical spring to the ground whose stiffness and damping
/// are the TOML lines `stiffness` (e.g. `"stiffness_n_per_m = 4e5\nloss_factor = 0.05"`).
pub fn sdof_toml(mass_kg: f64, stiffness: &str) -> String {
    SDOF_TEMPLATE.replace("{mass_kg}", &mass_kg.to_string()).replace("{stiffness}", stiffness)
}

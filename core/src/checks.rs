//! Static design checks with margins: leg stress, column buckling, tipping in wind, piers.
//!
//! Plain functions on explicit parameters (SI units). Each check returns a result struct with
//! the numbers behind it, and can be turned into a [`Check`] line of a [`CheckReport`].
//!
//! Formulas (docs/references.md#s9): leg load N = W/(n cos θ); Euler load P_cr = π²EI/(KL)²;
//! transition slenderness C_c = √(2π²E/σ_y) with the Johnson parabola
//! σ_cr = σ_y [1 − (KL/r)²/(2C_c²)] below it; a rig on feet spread on a circle tips about the
//! line through two adjacent feet; cantilever tip deflection F H³/(3EI).
//!
//! Verdicts use a factor of safety (FoS): FoS < [`FAIL_BELOW`] (1) is `Fail`, FoS <
//! [`MARGINAL_BELOW`] (2) is `Marginal`, otherwise `Pass` (common practice, no source).
//! These are estimates only: print [`CAUTIONS`] with every report.

use crate::error::{Error, Result, require_finite, require_non_negative, require_positive};
use crate::material::Material;
use crate::section::Section;
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// Standard gravity g (m/s²), as used to convert masses to weights.
pub const STANDARD_GRAVITY: f64 = 9.80665;

/// A factor of safety below this is a `Fail` (common practice, no source).
pub const FAIL_BELOW: f64 = 1.0;
/// A factor of safety below this (and ≥ [`FAIL_BELOW`]) is `Marginal` (common practice, no source).
pub const MARGINAL_BELOW: f64 = 2.0;

/// Cautions to print with every check report.
pub const CAUTIONS: &[&str] = &[
    "These figures are estimates from simple formulas and idealised parameters, not a design.",
    "A heavy rig, tripod or pier can tip over or collapse and hurt people: keep clear while \
     loading it and in strong wind.",
    "Material strengths vary; joints, welds, knots in wood, corrosion and damage can fail well \
     below the figures used here.",
    "Follow the building codes that apply where you are, and have a licensed engineer design or \
     approve piers, footings and observatory structures.",
];

/// Outcome of one check.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub enum Verdict {
    /// Factor of safety ≥ [`MARGINAL_BELOW`].
    Pass,
    /// [`FAIL_BELOW`] ≤ factor of safety < [`MARGINAL_BELOW`].
    Marginal,
    /// Factor of safety < [`FAIL_BELOW`] (or not a number).
    Fail,
}

impl Verdict {
    /// Verdict for a factor of safety, using [`FAIL_BELOW`] and [`MARGINAL_BELOW`].
    pub fn from_margin(factor_of_safety: f64) -> Self {
        if factor_of_safety.is_nan() || factor_of_safety < FAIL_BELOW {
            Verdict::Fail
        } else if factor_of_safety < MARGINAL_BELOW {
            Verdict::Marginal
        } else {
            Verdict::Pass
        }
    }
}

/// One line of a report: a demand (`value`) against a capacity (`limit`) in the same `unit`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Check {
    /// What is checked, e.g. "leg axial stress".
    pub name: String,
    /// The demand (load, stress, moment, ...) in `unit`.
    pub value: f64,
    /// The capacity it is compared with, in `unit`.
    pub limit: f64,
    /// Unit of `value` and `limit` (SI, e.g. "Pa", "N", "N m").
    pub unit: String,
    /// Factor of safety = limit / value (∞ when the demand is zero).
    pub margin: f64,
    /// Verdict from `margin`.
    pub verdict: Verdict,
}

impl Check {
    /// A check with margin = limit / value and the verdict from it.
    pub fn new(name: impl Into<String>, value: f64, limit: f64, unit: impl Into<String>) -> Self {
        let margin = if value > 0.0 { limit / value } else { f64::INFINITY };
        Check::with_margin(name, value, limit, unit, margin)
    }
    /// A check whose factor of safety is computed by the caller (e.g. where the capacity can be
    /// negative, as a restoring moment of a rig whose CG is outside its feet).
    pub fn with_margin(
        name: impl Into<String>,
        value: f64,
        limit: f64,
        unit: impl Into<String>,
        margin: f64,
    ) -> Self {
        Check {
            name: name.into(),
            value,
            limit,
            unit: unit.into(),
            margin,
            verdict: Verdict::from_margin(margin),
        }
    }
}

/// A list of checks; print [`CAUTIONS`] with it.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
pub struct CheckReport {
    /// The checks, in the order they were made.
    pub checks: Vec<Check>,
}

impl CheckReport {
    /// The worst verdict over all checks (`Pass` for an empty report).
    pub fn verdict(&self) -> Verdict {
        let mut v = Verdict::Pass;
        for c in &self.checks {
            match c.verdict {
                Verdict::Fail => return Verdict::Fail,
                Verdict::Marginal => v = Verdict::Marginal,
                Verdict::Pass => {}
            }
        }
        v
    }
    /// The smallest factor of safety (∞ for an empty report).
    pub fn min_margin(&self) -> f64 {
        self.checks.iter().map(|c| c.margin).fold(f64::INFINITY, f64::min)
    }
    /// The cautions that go with every report.
    pub fn cautions(&self) -> &'static [&'static str] {
        CAUTIONS
    }
}

// ---------------------------------------------------------------------------------------------
// Legs and columns
// ---------------------------------------------------------------------------------------------

/// Axial load per leg (N) of `n_legs` legs sharing a central vertical load `total_weight_n`,
/// each inclined `splay_from_vertical_rad` from vertical: N = W/(n cos θ) (docs/references.md#s9).
pub fn leg_axial_load_n(total_weight_n: f64, n_legs: usize, splay_from_vertical_rad: f64) -> Result<f64> {
    require_non_negative("total_weight_n", total_weight_n)?;
    if n_legs == 0 {
        return Err(Error::invalid("n_legs", "must be at least 1"));
    }
    let theta = require_non_negative("splay_from_vertical_rad", splay_from_vertical_rad)?;
    if theta >= PI / 2.0 {
        return Err(Error::OutOfRange {
            what: "splay_from_vertical_rad".into(),
            value: theta,
            min: 0.0,
            max: PI / 2.0,
        });
    }
    Ok(total_weight_n / (n_legs as f64 * theta.cos()))
}

/// Axial (compressive) stress in a member.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct AxialStress {
    /// Axial load N (N).
    pub load_n: f64,
    /// Stress N/A (Pa).
    pub stress_pa: f64,
    /// Allowed stress (Pa): the material's yield strength (crushing strength for wood).
    pub strength_pa: f64,
    /// strength / stress (∞ for zero load).
    pub factor_of_safety: f64,
}

impl AxialStress {
    /// As a report line named `name`.
    pub fn check(&self, name: &str) -> Check {
        Check::new(name, self.stress_pa, self.strength_pa, "Pa")
    }
}

/// Axial stress N/A of `section` under `load_n` and its factor of safety against the yield (or
/// crushing) strength of `material`.
pub fn axial_stress(load_n: f64, section: &Section, material: &Material) -> Result<AxialStress> {
    require_non_negative("load_n", load_n)?;
    section.validate("section")?;
    material.validate("material")?;
    let stress_pa = load_n / section.area_m2();
    let strength_pa = material.yield_strength_pa;
    let factor_of_safety = if stress_pa > 0.0 { strength_pa / stress_pa } else { f64::INFINITY };
    Ok(AxialStress { load_n, stress_pa, strength_pa, factor_of_safety })
}

/// End conditions of a column, with effective-length factors K (docs/references.md#s9: Timoshenko
/// & Gere (1961) theoretical values; AISC commentary recommended design values, from memory:
/// verify).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub enum EndCondition {
    /// Both ends pinned: K = 1.0 (recommended 1.0).
    PinnedPinned,
    /// One end fixed, the other free (flagpole, pier): K = 2.0 (recommended 2.1).
    FixedFree,
    /// Both ends fixed: K = 0.5 (recommended 0.65).
    FixedFixed,
    /// One end fixed, one pinned: K = 0.699 (recommended 0.80).
    FixedPinned,
}

impl EndCondition {
    /// Theoretical effective-length factor K.
    pub fn k_theoretical(self) -> f64 {
        match self {
            EndCondition::PinnedPinned => 1.0,
            EndCondition::FixedFree => 2.0,
            EndCondition::FixedFixed => 0.5,
            EndCondition::FixedPinned => 0.699,
        }
    }
    /// Recommended design effective-length factor K (allows for imperfect fixity).
    pub fn k_recommended(self) -> f64 {
        match self {
            EndCondition::PinnedPinned => 1.0,
            EndCondition::FixedFree => 2.1,
            EndCondition::FixedFixed => 0.65,
            EndCondition::FixedPinned => 0.80,
        }
    }
}

/// Euler critical load P_cr = π² E I / (K L)² (N) (docs/references.md#s9).
pub fn euler_load_n(
    youngs_modulus_pa: f64,
    second_moment_m4: f64,
    length_m: f64,
    k_factor: f64,
) -> Result<f64> {
    let e = require_positive("youngs_modulus_pa", youngs_modulus_pa)?;
    let i = require_positive("second_moment_m4", second_moment_m4)?;
    let l = require_positive("length_m", length_m)?;
    let k = require_positive("k_factor", k_factor)?;
    Ok(PI * PI * e * i / (k * l).powi(2))
}

/// Transition slenderness C_c = √(2π²E/σ_y) between the Johnson parabola and Euler
/// (docs/references.md#s9).
pub fn transition_slenderness(youngs_modulus_pa: f64, yield_strength_pa: f64) -> Result<f64> {
    let e = require_positive("youngs_modulus_pa", youngs_modulus_pa)?;
    let fy = require_positive("yield_strength_pa", yield_strength_pa)?;
    Ok((2.0 * PI * PI * e / fy).sqrt())
}

/// Which buckling curve governs.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub enum BucklingRegime {
    /// KL/r ≥ C_c: elastic (Euler) buckling.
    Euler,
    /// KL/r < C_c: inelastic buckling, Johnson parabola.
    Johnson,
}

/// Buckling of a straight, centrally loaded column.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Buckling {
    /// Effective-length factor K used.
    pub k_factor: f64,
    /// Slenderness KL/r (r = radius of gyration about the weak axis).
    pub slenderness: f64,
    /// Transition slenderness C_c = √(2π²E/σ_y).
    pub transition_slenderness: f64,
    /// Euler load π²EI/(KL)² (N), whichever regime governs.
    pub euler_load_n: f64,
    /// Johnson load A σ_y [1 − (KL/r)²/(2C_c²)] (N); meaningful when it governs.
    pub johnson_load_n: f64,
    /// The governing critical load (N): Euler if KL/r ≥ C_c, else Johnson.
    pub critical_load_n: f64,
    /// Which curve governs.
    pub regime: BucklingRegime,
    /// Applied axial load (N).
    pub load_n: f64,
    /// critical load / applied load (∞ for zero load).
    pub factor_of_safety: f64,
}

impl Buckling {
    /// As a report line named `name`.
    pub fn check(&self, name: &str) -> Check {
        Check::new(name, self.load_n, self.critical_load_n, "N")
    }
}

/// Buckling check of a column of `section` and `material`, length `length_m`, effective-length
/// factor `k_factor` (e.g. [`EndCondition::k_theoretical`]), under axial load `load_n`.
pub fn buckling(
    section: &Section,
    material: &Material,
    length_m: f64,
    k_factor: f64,
    load_n: f64,
) -> Result<Buckling> {
    section.validate("section")?;
    material.validate("material")?;
    require_non_negative("load_n", load_n)?;
    let e = material.youngs_modulus_pa;
    let fy = material.yield_strength_pa;
    let euler = euler_load_n(e, section.min_second_moment_m4(), length_m, k_factor)?;
    let slenderness = k_factor * length_m / section.radius_of_gyration_m();
    let cc = transition_slenderness(e, fy)?;
    let johnson = section.area_m2() * fy * (1.0 - slenderness * slenderness / (2.0 * cc * cc));
    let (critical, regime) =
        if slenderness >= cc { (euler, BucklingRegime::Euler) } else { (johnson, BucklingRegime::Johnson) };
    let factor_of_safety = if load_n > 0.0 { critical / load_n } else { f64::INFINITY };
    Ok(Buckling {
        k_factor,
        slenderness,
        transition_slenderness: cc,
        euler_load_n: euler,
        johnson_load_n: johnson,
        critical_load_n: critical,
        regime,
        load_n,
        factor_of_safety,
    })
}

// ---------------------------------------------------------------------------------------------
// Tipping in wind
// ---------------------------------------------------------------------------------------------

/// Drag force of steady wind with a gust factor: F = G · ½ ρ C_d A U² (N).
///
/// `gust_factor` G multiplies the mean-wind *force* (a speed gust factor G_u corresponds to
/// G = G_u²). Drag law: docs/references.md#s6-6.
pub fn wind_force_n(
    air_density_kg_m3: f64,
    drag_coefficient: f64,
    area_m2: f64,
    wind_speed_m_s: f64,
    gust_factor: f64,
) -> Result<f64> {
    let rho = require_positive("air_density_kg_m3", air_density_kg_m3)?;
    let cd = require_positive("drag_coefficient", drag_coefficient)?;
    let a = require_positive("area_m2", area_m2)?;
    let u = require_non_negative("wind_speed_m_s", wind_speed_m_s)?;
    let g = require_positive("gust_factor", gust_factor)?;
    Ok(g * 0.5 * rho * cd * a * u * u)
}

/// A rig standing on `n_feet` feet at the corners of a regular polygon, in wind.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[non_exhaustive]
pub struct TippingInput {
    /// Number of feet (≥ 3), equally spaced on a circle.
    pub n_feet: usize,
    /// Radius of the circle through the feet, R_f (m).
    pub foot_radius_m: f64,
    /// Azimuth of the first foot from north through east (degrees).
    pub first_foot_azimuth_deg: f64,
    /// Total weight W of everything standing on the feet (N).
    pub weight_n: f64,
    /// Horizontal offset of the centre of gravity from the centre of the foot circle,
    /// (east, north) (m).
    pub cg_offset_m: [f64; 2],
    /// Height of the centre of pressure of the wind load above the feet, h (m).
    pub pressure_height_m: f64,
    /// Drag coefficient C_d of the exposed rig (with `area_m2`).
    pub drag_coefficient: f64,
    /// Area exposed to the wind, A (m²).
    pub area_m2: f64,
    /// Air density ρ (kg/m³); 1.225 is the ISA sea-level value (docs/references.md#s6).
    pub air_density_kg_m3: f64,
    /// Factor G on the mean-wind force (see [`wind_force_n`]).
    pub gust_factor: f64,
}

impl TippingInput {
    /// A tripod (feet at 0°, 120°, 240°) with its CG over the centre, C_d 1.2, ρ 1.225 kg/m³,
    /// gust factor 1; set the other fields as needed.
    pub fn tripod(foot_radius_m: f64, weight_n: f64, pressure_height_m: f64, area_m2: f64) -> Self {
        TippingInput {
            n_feet: 3,
            foot_radius_m,
            first_foot_azimuth_deg: 0.0,
            weight_n,
            cg_offset_m: [0.0, 0.0],
            pressure_height_m,
            drag_coefficient: 1.2,
            area_m2,
            air_density_kg_m3: 1.225,
            gust_factor: 1.0,
        }
    }

    fn validate(&self) -> Result<()> {
        if self.n_feet < 3 {
            return Err(Error::invalid("n_feet", format!("need at least 3 feet, got {}", self.n_feet)));
        }
        require_positive("foot_radius_m", self.foot_radius_m)?;
        require_finite("first_foot_azimuth_deg", self.first_foot_azimuth_deg)?;
        require_positive("weight_n", self.weight_n)?;
        require_finite("cg_offset_m[0]", self.cg_offset_m[0])?;
        require_finite("cg_offset_m[1]", self.cg_offset_m[1])?;
        require_positive("pressure_height_m", self.pressure_height_m)?;
        require_positive("drag_coefficient", self.drag_coefficient)?;
        require_positive("area_m2", self.area_m2)?;
        require_positive("air_density_kg_m3", self.air_density_kg_m3)?;
        require_positive("gust_factor", self.gust_factor)?;
        Ok(())
    }

    /// Distance from the centre of the foot circle to each tipping line, R_f cos(π/n) (m).
    pub fn edge_distance_m(&self) -> f64 {
        self.foot_radius_m * (PI / self.n_feet as f64).cos()
    }

    /// Outward unit normals (east, north) of the tipping lines (edge k joins feet k and k+1).
    fn edge_normals(&self) -> Vec<[f64; 2]> {
        let n = self.n_feet as f64;
        (0..self.n_feet)
            .map(|k| {
                let az = self.first_foot_azimuth_deg.to_radians() + 2.0 * PI * (k as f64 + 0.5) / n;
                [az.sin(), az.cos()]
            })
            .collect()
    }
}

/// Tipping of a rig on feet in wind from one direction.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Tipping {
    /// Azimuth the wind blows *from* (degrees from north through east).
    pub wind_from_azimuth_deg: f64,
    /// Index k of the critical tipping line (through feet k and k+1).
    pub edge: usize,
    /// Lever arm of the weight about that line, R_f cos(π/n) − c·n̂ (m); ≤ 0 means the rig
    /// tips under its own weight.
    pub lever_arm_m: f64,
    /// Restoring moment W × lever arm (N m).
    pub restoring_moment_n_m: f64,
    /// Horizontal force at the centre of pressure that tips the rig (N).
    pub tipping_force_n: f64,
    /// Mean wind speed at which the rig tips (m/s), with the gust factor applied.
    pub tipping_wind_speed_m_s: f64,
    /// Wind force at the given speed (N).
    pub wind_force_n: f64,
    /// Overturning moment of that force about the critical line (N m).
    pub overturning_moment_n_m: f64,
    /// restoring / overturning moment = tipping force / wind force (∞ in still air).
    pub factor_of_safety: f64,
}

impl Tipping {
    /// As a report line (moments about the critical tipping line).
    pub fn check(&self, name: &str) -> Check {
        Check::with_margin(
            name,
            self.overturning_moment_n_m,
            self.restoring_moment_n_m,
            "N m",
            self.factor_of_safety,
        )
    }
}

/// Tipping of the rig in wind of mean speed `wind_speed_m_s` blowing from
/// `wind_from_azimuth_deg`.
///
/// The resultant of weight and wind force meets the ground at c + (F h / W) ŵ (ŵ the direction
/// the wind blows toward); the rig tips when that point leaves the foot polygon, i.e. about
/// line k when F h (ŵ·n̂_k) > W (d − c·n̂_k), d = R_f cos(π/n) (R_f/2 for a tripod, reference
/// docs/references.md#s9). Sliding, uplift of light feet, ground give and dynamic gust response are ignored.
pub fn tipping(input: &TippingInput, wind_speed_m_s: f64, wind_from_azimuth_deg: f64) -> Result<Tipping> {
    input.validate()?;
    require_non_negative("wind_speed_m_s", wind_speed_m_s)?;
    require_finite("wind_from_azimuth_deg", wind_from_azimuth_deg)?;
    let to = (wind_from_azimuth_deg + 180.0).to_radians();
    let w_hat = [to.sin(), to.cos()];
    let d = input.edge_distance_m();
    let c = input.cg_offset_m;
    let w = input.weight_n;
    let h = input.pressure_height_m;
    // Critical edge: smallest tipping force among edges the wind pushes toward. If the CG is
    // already outside the polygon, the edge it is outside of is critical (force 0).
    let mut best: Option<(usize, f64, f64)> = None; // (edge, lever, tipping force)
    for (k, n) in input.edge_normals().iter().enumerate() {
        let lever = d - (c[0] * n[0] + c[1] * n[1]);
        let proj = w_hat[0] * n[0] + w_hat[1] * n[1];
        let force = if lever <= 0.0 {
            0.0
        } else if proj > 1e-12 {
            w * lever / (h * proj)
        } else {
            f64::INFINITY
        };
        if best.is_none_or(|(_, _, f)| force < f) {
            best = Some((k, lever, force));
        }
    }
    let Some((edge, lever, tipping_force)) = best else {
        return Err(Error::invalid("n_feet", "no tipping line"));
    };
    let n = input.edge_normals()[edge];
    let proj = (w_hat[0] * n[0] + w_hat[1] * n[1]).max(0.0);
    let force = wind_force_n(
        input.air_density_kg_m3,
        input.drag_coefficient,
        input.area_m2,
        wind_speed_m_s,
        input.gust_factor,
    )?;
    let per_speed2 =
        0.5 * input.air_density_kg_m3 * input.drag_coefficient * input.area_m2 * input.gust_factor;
    let overturning = force * h * proj;
    let restoring = w * lever;
    let factor_of_safety = if restoring <= 0.0 {
        0.0
    } else if overturning > 0.0 {
        restoring / overturning
    } else {
        f64::INFINITY
    };
    Ok(Tipping {
        wind_from_azimuth_deg,
        edge,
        lever_arm_m: lever,
        restoring_moment_n_m: restoring,
        tipping_force_n: tipping_force,
        tipping_wind_speed_m_s: (tipping_force / per_speed2).sqrt(),
        wind_force_n: force,
        overturning_moment_n_m: overturning,
        factor_of_safety,
    })
}

/// Tipping for the worst wind direction: the wind blowing along the outward normal of the
/// tipping line nearest the CG (closed form: F_tip = W (d − c·n̂)/h, minimal over all
/// directions since ŵ·n̂ ≤ 1).
pub fn tipping_worst_direction(input: &TippingInput, wind_speed_m_s: f64) -> Result<Tipping> {
    input.validate()?;
    let c = input.cg_offset_m;
    let mut worst = (0usize, f64::INFINITY);
    for (k, n) in input.edge_normals().iter().enumerate() {
        let lever = input.edge_distance_m() - (c[0] * n[0] + c[1] * n[1]);
        if lever < worst.1 {
            worst = (k, lever);
        }
    }
    let n = input.edge_normals()[worst.0];
    // The wind blows toward n̂, i.e. from the opposite azimuth.
    let toward_deg = n[0].atan2(n[1]).to_degrees();
    let from_deg = (toward_deg + 180.0).rem_euclid(360.0);
    tipping(input, wind_speed_m_s, from_deg)
}

// ---------------------------------------------------------------------------------------------
// Pier
// ---------------------------------------------------------------------------------------------

/// Smallest elastic section modulus S = I/c (m³) of a section (c = distance to the extreme
/// fibre).
pub fn section_modulus_min_m3(section: &Section) -> Result<f64> {
    section.validate("section")?;
    Ok(match *section {
        Section::Tube { outer_diameter_m: d, .. } | Section::Rod { diameter_m: d } => {
            section.min_second_moment_m4() / (d / 2.0)
        }
        Section::Rectangle { width_m: b, depth_m: h } => (b * h * h / 6.0).min(h * b * b / 6.0),
    })
}

/// A vertical cantilever pier, fixed at its base, with a mass and a horizontal load at its top.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Pier {
    /// Axial load at the base (N): top weight plus the pier's own weight.
    pub axial_load_n: f64,
    /// Axial stress N/A at the base (Pa).
    pub axial_stress_pa: f64,
    /// Bending moment at the base F H (N m).
    pub base_moment_n_m: f64,
    /// Bending stress at the base M/S (Pa), S the smallest section modulus.
    pub bending_stress_pa: f64,
    /// Axial plus bending stress (Pa), compared with the yield strength.
    pub combined_stress_pa: f64,
    /// yield strength / combined stress.
    pub stress_factor_of_safety: f64,
    /// Static deflection of the top F H³/(3EI) (m), weak axis.
    pub top_deflection_m: f64,
    /// Lateral stiffness at the top 3EI/H³ (N/m).
    pub top_stiffness_n_m: f64,
    /// Buckling as a fixed-free column (K = 2) under the whole axial load at the top.
    pub buckling: Buckling,
}

impl Pier {
    /// Report lines: combined stress at the base and buckling; the deflection when a limit is
    /// given.
    pub fn report(&self, material: &Material, max_top_deflection_m: Option<f64>) -> CheckReport {
        let mut checks = vec![
            Check::new(
                "pier base stress (axial + bending)",
                self.combined_stress_pa,
                material.yield_strength_pa,
                "Pa",
            ),
            self.buckling.check("pier buckling (fixed-free, K = 2)"),
        ];
        if let Some(lim) = max_top_deflection_m {
            checks.push(Check::new("pier top deflection", self.top_deflection_m, lim, "m"));
        }
        CheckReport { checks }
    }
}

/// Static checks of a pier: a vertical cantilever of height `height_m`, `section` and
/// `material`, fixed at the base, with `top_mass_kg` on top and a horizontal `top_load_n` at
/// the top.
///
/// The pier's own weight is added to the axial load and, conservatively, treated as applied at
/// the top for buckling. Bending uses the weak axis.
pub fn pier(
    section: &Section,
    material: &Material,
    height_m: f64,
    top_mass_kg: f64,
    top_load_n: f64,
) -> Result<Pier> {
    section.validate("section")?;
    material.validate("material")?;
    let h = require_positive("height_m", height_m)?;
    let m = require_non_negative("top_mass_kg", top_mass_kg)?;
    let f = require_non_negative("top_load_n", top_load_n)?;
    let a = section.area_m2();
    let i = section.min_second_moment_m4();
    let e = material.youngs_modulus_pa;
    let axial_load_n = (m + material.density_kg_m3 * a * h) * STANDARD_GRAVITY;
    let axial_stress_pa = axial_load_n / a;
    let base_moment_n_m = f * h;
    let bending_stress_pa = base_moment_n_m / section_modulus_min_m3(section)?;
    let combined = axial_stress_pa + bending_stress_pa;
    let top_stiffness_n_m = 3.0 * e * i / h.powi(3);
    let buckling = buckling(section, material, h, EndCondition::FixedFree.k_theoretical(), axial_load_n)?;
    Ok(Pier {
        axial_load_n,
        axial_stress_pa,
        base_moment_n_m,
        bending_stress_pa,
        combined_stress_pa: combined,
        stress_factor_of_safety: if combined > 0.0 {
            material.yield_strength_pa / combined
        } else {
            f64::INFINITY
        },
        top_deflection_m: f / top_stiffness_n_m,
        top_stiffness_n_m,
        buckling,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    const INCH: f64 = 0.0254;
    const PSI: f64 = 6894.757293168361; // Pa per psi (1 lbf/in², lbf = 4.4482216152605 N)
    const LBF: f64 = 4.4482216152605;

    fn steel_tube_2in() -> (Section, Material) {
        let s = Section::Tube { outer_diameter_m: 2.0 * INCH, wall_m: 0.049 * INCH };
        let mut m = Material::preset("stainless-304").unwrap();
        m.youngs_modulus_pa = 28e6 * PSI; // docs/references.md#s9 uses E = 28e6 psi for the leg example
        (s, m)
    }

    #[test]
    fn leg_stress_matches_reference_check() {
        // docs/references.md#s9 required check (computed from the published formula):
        // 2.0 in OD × 0.049 in wall, 40 lbf axial → 133.19 psi.
        let (s, m) = steel_tube_2in();
        // N = W/(3 cos θ) (docs/references.md#s9): 120 lbf on three vertical legs is 40 lbf each.
        let n = leg_axial_load_n(120.0 * LBF, 3, 0.0).unwrap();
        assert_relative_eq!(n / LBF, 40.0, max_relative = 1e-12);
        let a = axial_stress(n, &s, &m).unwrap();
        let psi = a.stress_pa / PSI;
        assert!((130.0..=135.0).contains(&psi), "{psi}");
        assert_relative_eq!(psi, 133.19, max_relative = 5e-5);
        assert_relative_eq!(a.factor_of_safety, m.yield_strength_pa / a.stress_pa, max_relative = 1e-12);
        assert_eq!(a.check("leg").verdict, Verdict::Pass);
        // Splay: θ = 20° from vertical raises the load by 1/cos 20° = 1.064178
        // (docs/references.md#s9 formula).
        let n20 = leg_axial_load_n(120.0 * LBF, 3, 20f64.to_radians()).unwrap();
        assert_relative_eq!(n20 / LBF, 40.0 / 20f64.to_radians().cos(), max_relative = 1e-12);
        assert_relative_eq!(n20 / LBF, 42.567, max_relative = 1e-4);
        assert!(leg_axial_load_n(1.0, 3, 2.0).is_err());
        assert!(leg_axial_load_n(1.0, 0, 0.1).is_err());
        assert!(axial_stress(f64::NAN, &s, &m).is_err());
    }

    #[test]
    fn euler_loads_match_reference() {
        // docs/references.md#s9 (computed from the published formula), E = 28e6 psi.
        let (s, m) = steel_tube_2in();
        let i = s.min_second_moment_m4();
        let p = euler_load_n(m.youngs_modulus_pa, i, 48.0 * INCH, 1.0).unwrap();
        assert_relative_eq!(
            p,
            PI * PI * m.youngs_modulus_pa * i / (48.0 * INCH).powi(2),
            max_relative = 1e-14
        );
        assert_relative_eq!(p / LBF, 17151.0, max_relative = 1e-4);
        let p2 = euler_load_n(m.youngs_modulus_pa, i, 48.0 * INCH, EndCondition::FixedFree.k_theoretical())
            .unwrap();
        assert_relative_eq!(p2 / LBF, 4288.0, max_relative = 2e-4);
        let p3 = euler_load_n(m.youngs_modulus_pa, i, 60.0 * INCH, 2.0).unwrap();
        assert_relative_eq!(p3 / LBF, 2744.0, max_relative = 2e-4);
        // Slenderness values of docs/references.md#s9: 69.6, 139.1, 173.9.
        let b1 = buckling(&s, &m, 48.0 * INCH, 1.0, 40.0 * LBF).unwrap();
        let b2 = buckling(&s, &m, 48.0 * INCH, 2.0, 40.0 * LBF).unwrap();
        let b3 = buckling(&s, &m, 60.0 * INCH, 2.0, 40.0 * LBF).unwrap();
        assert_relative_eq!(b1.slenderness, 69.6, max_relative = 1e-3);
        assert_relative_eq!(b2.slenderness, 139.1, max_relative = 1e-3);
        assert_relative_eq!(b3.slenderness, 173.9, max_relative = 1e-3);
        // docs/references.md#s9: at KL/r 69.6 the column is inelastic, so Euler does not govern
        // (304: C_c > 69.6).
        assert_eq!(b1.regime, BucklingRegime::Johnson);
        assert!(b1.critical_load_n < b1.euler_load_n);
        assert_eq!(b3.regime, BucklingRegime::Euler);
        assert_relative_eq!(b3.factor_of_safety, b3.euler_load_n / (40.0 * LBF), max_relative = 1e-12);

        // SI example of docs/references.md#s9: 6061-T6, 25 mm OD × 2 mm wall, L = 1 m: 6547.3 N (K=1),
        // 1636.8 N (K=2).
        let s = Section::Tube { outer_diameter_m: 0.025, wall_m: 0.002 };
        let al = Material::preset("aluminium-6061-t6").unwrap();
        let p = euler_load_n(al.youngs_modulus_pa, s.min_second_moment_m4(), 1.0, 1.0).unwrap();
        assert_relative_eq!(p, 6547.3, max_relative = 1e-5);
        assert_relative_eq!(p / s.area_m2() / 1e6, 45.3, max_relative = 1e-3);
        let p = euler_load_n(al.youngs_modulus_pa, s.min_second_moment_m4(), 1.0, 2.0).unwrap();
        assert_relative_eq!(p, 1636.8, max_relative = 1e-4);
        // Squash load at 276 MPa: 39 886 N (docs/references.md#s9).
        assert_relative_eq!(s.area_m2() * 276e6, 39886.0, max_relative = 1e-4);
        assert!(euler_load_n(1.0, 1.0, 0.0, 1.0).is_err());
    }

    #[test]
    fn transition_slenderness_matches_reference() {
        // docs/references.md#s9 (computed from the published formula): 304 (193 GPa, 215 MPa) 133.1;
        // 6061-T6 (68.9 GPa, 276 MPa) 70.2.
        assert_relative_eq!(transition_slenderness(193e9, 215e6).unwrap(), 133.1, max_relative = 5e-4);
        assert_relative_eq!(transition_slenderness(68.9e9, 276e6).unwrap(), 70.2, max_relative = 5e-4);
        // Johnson parabola meets Euler at C_c (σ_cr = σ_y/2 there, both curves, docs/references.md#s9).
        let s = Section::Tube { outer_diameter_m: 0.025, wall_m: 0.002 };
        let al = Material::preset("aluminium-6061-t6").unwrap();
        let cc = transition_slenderness(al.youngs_modulus_pa, al.yield_strength_pa).unwrap();
        let l = cc * s.radius_of_gyration_m();
        let b = buckling(&s, &al, l, 1.0, 1000.0).unwrap();
        assert_relative_eq!(b.johnson_load_n, b.euler_load_n, max_relative = 1e-12);
        assert_relative_eq!(b.euler_load_n, 0.5 * al.yield_strength_pa * s.area_m2(), max_relative = 1e-12);
    }

    #[test]
    fn effective_length_factors() {
        // docs/references.md#s9 (Timoshenko & Gere theoretical values).
        assert_eq!(EndCondition::PinnedPinned.k_theoretical(), 1.0);
        assert_eq!(EndCondition::FixedFree.k_theoretical(), 2.0);
        assert_eq!(EndCondition::FixedFixed.k_theoretical(), 0.5);
        assert_eq!(EndCondition::FixedPinned.k_theoretical(), 0.699);
        assert_eq!(EndCondition::FixedFree.k_recommended(), 2.1);
    }

    #[test]
    fn tripod_tipping_matches_reference_example() {
        // docs/references.md#s9 (computed from the published formula): R_f = 0.6 m,
        // W = 30 kg × 9.80665 = 294.2 N, h = 1.5 m → restoring 88.26 N m, tipping force 58.84 N.
        let w = 30.0 * STANDARD_GRAVITY;
        let inp = TippingInput::tripod(0.6, w, 1.5, 0.5);
        assert_relative_eq!(inp.edge_distance_m(), 0.3, max_relative = 1e-12);
        let t = tipping_worst_direction(&inp, 0.0).unwrap();
        assert_relative_eq!(t.restoring_moment_n_m, 88.26, max_relative = 1e-4);
        assert_relative_eq!(t.tipping_force_n, 58.84, max_relative = 1e-4);
        assert_eq!(t.factor_of_safety, f64::INFINITY);

        // Invented rig, hand calculation: the same tripod with C_d = 1.2, A = 0.5 m²,
        // ρ = 1.225 kg/m³, gust factor 1.5 (on force). F_tip = 294.1995 × 0.3 / 1.5 = 58.8399 N;
        // ½ ρ C_d A G = 0.5 × 1.225 × 1.2 × 0.5 × 1.5 = 0.55125 N/(m/s)²;
        // U_tip = √(58.8399 / 0.55125) = √106.739 = 10.3315 m/s.
        let mut inp = inp;
        inp.gust_factor = 1.5;
        let t = tipping_worst_direction(&inp, 5.0).unwrap();
        assert_relative_eq!(t.tipping_wind_speed_m_s, 10.3315, max_relative = 1e-4);
        // At 5 m/s: F = 0.55125 × 25 = 13.781 N; FoS = 58.84/13.781 = 4.2696.
        assert_relative_eq!(t.wind_force_n, 13.78125, max_relative = 1e-9);
        assert_relative_eq!(t.factor_of_safety, 4.2696, max_relative = 1e-4);
        assert_eq!(t.check("tipping").verdict, Verdict::Pass);
        // At the tipping speed the factor of safety is 1.
        let t = tipping_worst_direction(&inp, 10.3315).unwrap();
        assert_relative_eq!(t.factor_of_safety, 1.0, max_relative = 2e-4);
    }

    #[test]
    fn tipping_depends_on_direction_and_cg() {
        // Geometry (docs/references.md#s9): wind toward a foot (not an edge normal) pushes at 60° to
        // both adjacent edge normals of a tripod, so the tipping force doubles: 1/cos 60° = 2.
        let w = 100.0;
        let inp = TippingInput::tripod(0.6, w, 1.0, 0.5);
        // Foot 0 at azimuth 0 (north): wind from the south (180°) blows toward it.
        let t = tipping(&inp, 0.0, 180.0).unwrap();
        assert_relative_eq!(t.tipping_force_n, 2.0 * w * 0.3 / 1.0, max_relative = 1e-12);
        let worst = tipping_worst_direction(&inp, 0.0).unwrap();
        assert_relative_eq!(worst.tipping_force_n, w * 0.3, max_relative = 1e-12);
        // Scan every degree: no direction is worse than the closed-form worst case.
        for a in 0..360 {
            let t = tipping(&inp, 0.0, a as f64).unwrap();
            assert!(t.tipping_force_n >= worst.tipping_force_n * (1.0 - 1e-12));
        }
        // CG offset 0.1 m toward the edge normal at azimuth 60°: lever 0.3 − 0.1 = 0.2 m.
        let mut inp2 = inp.clone();
        let az = 60f64.to_radians();
        inp2.cg_offset_m = [0.1 * az.sin(), 0.1 * az.cos()];
        let t = tipping_worst_direction(&inp2, 0.0).unwrap();
        assert_relative_eq!(t.lever_arm_m, 0.2, max_relative = 1e-12);
        assert_relative_eq!(t.wind_from_azimuth_deg, 240.0, max_relative = 1e-9);
        // Square of feet: edge distance R_f cos(π/4).
        let mut sq = inp.clone();
        sq.n_feet = 4;
        assert_relative_eq!(sq.edge_distance_m(), 0.6 / 2f64.sqrt(), max_relative = 1e-12);
        // CG outside the feet: tips in still air.
        let mut bad = inp.clone();
        bad.cg_offset_m = [0.0, -0.5];
        let t = tipping_worst_direction(&bad, 0.0).unwrap();
        assert_eq!(t.tipping_force_n, 0.0);
        assert_eq!(t.check("tipping").verdict, Verdict::Fail);
        let mut two = inp;
        two.n_feet = 2;
        assert!(tipping(&two, 1.0, 0.0).unwrap_err().to_string().contains("n_feet"));
    }

    #[test]
    fn pier_checks() {
        // Steel tube pier, invented: 168.3 mm OD × 5 mm wall, H = 1.2 m, 40 kg on top, 200 N
        // horizontal at the top. Cantilever formulas: M = F H, σ_b = M c / I, δ = F H³/(3EI);
        // buckling with K = 2 (docs/references.md#s9).
        let s = Section::Tube { outer_diameter_m: 0.1683, wall_m: 0.005 };
        let m = Material::preset("steel-s235").unwrap();
        let p = pier(&s, &m, 1.2, 40.0, 200.0).unwrap();
        let (a, i) = (s.area_m2(), s.min_second_moment_m4());
        let n = (40.0 + 7850.0 * a * 1.2) * STANDARD_GRAVITY;
        assert_relative_eq!(p.axial_load_n, n, max_relative = 1e-12);
        assert_relative_eq!(p.axial_stress_pa, n / a, max_relative = 1e-12);
        assert_relative_eq!(p.base_moment_n_m, 240.0, max_relative = 1e-12);
        assert_relative_eq!(p.bending_stress_pa, 240.0 * 0.08415 / i, max_relative = 1e-12);
        assert_relative_eq!(
            p.top_deflection_m,
            200.0 * 1.2f64.powi(3) / (3.0 * 210e9 * i),
            max_relative = 1e-12
        );
        assert_relative_eq!(
            p.buckling.euler_load_n,
            PI * PI * 210e9 * i / (2.4f64).powi(2),
            max_relative = 1e-12
        );
        assert_eq!(p.buckling.k_factor, 2.0);
        let r = p.report(&m, Some(1e-6));
        assert_eq!(r.checks.len(), 3);
        assert_eq!(r.cautions(), CAUTIONS);
        // Deflection δ is a few µm here (> 1 µm limit) → that line fails; the report is Fail.
        assert!(p.top_deflection_m > 1e-6);
        assert_eq!(r.verdict(), Verdict::Fail);
        assert_eq!(p.report(&m, None).verdict(), Verdict::Pass);
        // Rectangle: smallest section modulus h b²/6 for b < h.
        let rect = Section::Rectangle { width_m: 0.1, depth_m: 0.2 };
        assert_relative_eq!(section_modulus_min_m3(&rect).unwrap(), 0.2 * 0.01 / 6.0, max_relative = 1e-12);
        assert!(pier(&s, &m, -1.0, 1.0, 1.0).unwrap_err().to_string().contains("height_m"));
    }

    #[test]
    fn verdict_thresholds() {
        // Thresholds: common practice, no source.
        assert_eq!(Verdict::from_margin(0.99), Verdict::Fail);
        assert_eq!(Verdict::from_margin(1.0), Verdict::Marginal);
        assert_eq!(Verdict::from_margin(1.99), Verdict::Marginal);
        assert_eq!(Verdict::from_margin(2.0), Verdict::Pass);
        assert_eq!(Verdict::from_margin(f64::NAN), Verdict::Fail);
        let c = Check::new("x", 2.0, 3.0, "N");
        assert_eq!((c.margin, c.verdict), (1.5, Verdict::Marginal));
        assert!(CAUTIONS.iter().any(|s| s.contains("licensed engineer")));
    }
}

// ---------------------------------------------------------------------------------------------
// Checks of a whole rig file
// ---------------------------------------------------------------------------------------------

/// The steady wind for [`rig_checks`].
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct StaticWind {
    /// Mean wind speed (m/s).
    pub speed_m_s: f64,
    /// Factor on the mean drag for gusts (see [`wind_force_n`]).
    pub gust_factor: f64,
    /// Air density (kg/m³).
    pub air_density_kg_m3: f64,
}

impl Default for StaticWind {
    /// 10 m/s with a gust factor of 2 and ISA sea-level air (a stiff breeze with gusts: common
    /// practice, no source; give your site's design wind).
    fn default() -> Self {
        StaticWind { speed_m_s: 10.0, gust_factor: 2.0, air_density_kg_m3: 1.225 }
    }
}

/// Total mass of a generic model (bodies, nodes, beams with added mass) (kg).
pub fn total_mass_kg(spec: &crate::assembly::ModelSpec) -> Result<f64> {
    let mut m: f64 = spec.bodies.iter().map(|b| b.mass_kg).sum::<f64>()
        + spec.nodes.iter().map(|n| n.mass_kg).sum::<f64>();
    for b in &spec.beams {
        let l = (0..3).map(|i| (b.to_at_m[i] - b.from_at_m[i]).powi(2)).sum::<f64>().sqrt();
        m += (b.material()?.density_kg_m3 * b.section.area_m2() + b.added_mass_kg_per_m) * l;
    }
    Ok(m)
}

/// Static checks of a rig-layer model file: tripod legs (axial stress, Euler/Johnson buckling
/// with pinned–pinned K = 1 over the leg length, since legs are hinged at the head and rest on
/// their feet) and tipping in the steady wind about the line through two feet (all wind
/// directions, worst reported), or a pier (base stress, top deflection, fixed-free buckling)
/// under the wind load at its top. The wind's Σ C_d A and its C_d A-weighted height come from
/// the model's wind parts (derived from the rig or given in `[wind]`); without them the wind
/// checks are skipped.
/// Print [`CAUTIONS`] with the result.
pub fn rig_checks(file: &crate::schema::ModelFile, wind: &StaticWind) -> Result<CheckReport> {
    require_non_negative("wind speed_m_s", wind.speed_m_s)?;
    require_positive("wind gust_factor", wind.gust_factor)?;
    require_positive("air_density_kg_m3", wind.air_density_kg_m3)?;
    let spec = file.expanded()?;
    let total = total_mass_kg(&spec)?;
    let weight = total * STANDARD_GRAVITY;
    // The wind's parts summed as Σ C_d A (an upper bound on the resultant's size, for every
    // direction), acting at their C_d A-weighted height.
    let load = match spec.wind.as_ref() {
        Some(w) => Some((w.drag_area_m2()?, w.load_height_m()?)),
        None => None,
    };
    let wind_force = match load {
        Some((cda, _)) => wind_force_n(wind.air_density_kg_m3, 1.0, cda, wind.speed_m_s, wind.gust_factor)?,
        None => 0.0,
    };
    let mut checks = Vec::new();
    if let Some(t) = &file.rig.tripod {
        let g = t.geometry()?;
        let n = t.legs.unwrap_or(3);
        let section = t
            .leg_section
            .clone()
            .ok_or_else(|| Error::invalid("tripod.leg_section", "is required for static checks"))?;
        let material = match (&t.leg_material, &t.leg_material_properties) {
            (Some(name), None) => Material::preset(name)?,
            (None, Some(m)) => m.clone(),
            _ => {
                return Err(Error::invalid(
                    "tripod.leg_material",
                    "give a preset name or leg_material_properties",
                ));
            }
        };
        let leg_n = leg_axial_load_n(weight, n, g.splay_rad)?;
        let st = axial_stress(leg_n, &section, &material)?;
        checks.push(Check::new("leg axial stress", st.stress_pa, material.yield_strength_pa, "Pa"));
        let b =
            buckling(&section, &material, g.leg_length_m, EndCondition::PinnedPinned.k_theoretical(), leg_n)?;
        checks.push(b.check("leg buckling (pinned-pinned, K = 1)"));
        if let Some((cda, z)) = load {
            let input = TippingInput {
                n_feet: n,
                foot_radius_m: g.foot_radius_m,
                first_foot_azimuth_deg: t.first_leg_azimuth_deg.unwrap_or(0.0),
                weight_n: weight,
                cg_offset_m: [0.0, 0.0],
                pressure_height_m: z.max(1e-3),
                drag_coefficient: 1.0,
                area_m2: cda,
                air_density_kg_m3: wind.air_density_kg_m3,
                gust_factor: wind.gust_factor,
            };
            let tip = tipping_worst_direction(&input, wind.speed_m_s)?;
            checks.push(tip.check(&format!(
                "tipping at {:.1} m/s × gust {:.2} (tips at {:.1} m/s mean)",
                wind.speed_m_s, wind.gust_factor, tip.tipping_wind_speed_m_s
            )));
        }
    }
    if let Some(p) = &file.rig.pier {
        let section = p.section.clone().ok_or_else(|| Error::invalid("pier.section", "is required"))?;
        let material = match (&p.material, &p.material_properties) {
            (Some(name), None) => Material::preset(name)?,
            (None, Some(m)) => m.clone(),
            _ => return Err(Error::invalid("pier.material", "give a preset name or material_properties")),
        };
        let h = p.height_m.ok_or_else(|| Error::invalid("pier.height_m", "is required"))?;
        // Everything but the pier column and its footing sits on top.
        let pier_mass =
            (material.density_kg_m3 * section.area_m2() + p.added_mass_kg_per_m.unwrap_or(0.0)) * h;
        let footing_mass: f64 =
            spec.bodies.iter().filter(|b| b.name.contains("footing")).map(|b| b.mass_kg).sum();
        let top = (total - pier_mass - footing_mass).max(0.0);
        let r = pier(&section, &material, h, top, wind_force)?;
        checks.extend(r.report(&material, None).checks);
    }
    if checks.is_empty() {
        return Err(Error::invalid(
            "model",
            "static checks need a [tripod] or [pier] section in the rig layer",
        ));
    }
    Ok(CheckReport { checks })
}

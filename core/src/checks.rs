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
    /// Figures without a capacity to compare with, and checks skipped for want of input.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub notes: Vec<String>,
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
        CheckReport { checks, notes: Vec::new() }
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

/// Further inputs of [`rig_checks`] besides the wind.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct StaticOptions {
    /// Horizontal load at the pier top, acting with the wind (N; default
    /// [`crate::pier_table::DEFAULT_LOAD_N`], common practice, no source).
    pub top_load_n: f64,
    /// Foot surface for the sliding check, overriding the file's `tripod.foot_surface`.
    pub foot_surface: Option<String>,
}

impl Default for StaticOptions {
    fn default() -> Self {
        StaticOptions { top_load_n: crate::pier_table::DEFAULT_LOAD_N, foot_surface: None }
    }
}

/// Wind directions sampled by [`rig_checks`] (every 1°).
pub const WIND_DIRECTIONS: usize = 360;

/// The wind's resultant for one direction per unit ½ρ·G·U² scale (at U = 1 m/s, G = 1), about
/// the origin: force and moment of the loads on the model, and the force that goes straight
/// into the ground (halves of legs ending on it).
struct WindCase {
    from_deg: f64,
    force: [f64; 3],
    moment: [f64; 3],
    ground_force: [f64; 3],
}

fn cross(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]]
}

/// The resultant of a wind load's parts at U = 1 m/s. A pier column's two end parts are
/// replaced by its whole side load at mid-height (`column_mid_z`), so its base moment is exact
/// also where the lower half stands on rigid ground; upper halves of legs whose lower end is
/// on the ground add their twin to `ground_force`.
fn wind_case(
    w: &crate::assembly::WindLoadSpec,
    rho: f64,
    from_deg: f64,
    column_mid_z: Option<f64>,
) -> Result<WindCase> {
    let parts = w.parts()?;
    let q = 0.5 * rho;
    let (mut force, mut moment, mut ground_force) = ([0.0; 3], [0.0; 3], [0.0; 3]);
    let mut add = |at: [f64; 3], f: [f64; 3], ground: bool| {
        let m = cross(at, f);
        for k in 0..3 {
            if ground {
                ground_force[k] += f[k];
            } else {
                force[k] += f[k];
                moment[k] += m[k];
            }
        }
    };
    for p in &parts {
        let f = p.direction.map(|d| q * p.drag_coefficient * p.area_m2 * d);
        if let (Some(z), true) = (column_mid_z, p.name.starts_with("pier column")) {
            if p.name.ends_with("(upper end)") {
                let at = [p.centre_of_pressure_m[0], p.centre_of_pressure_m[1], z];
                add(at, f.map(|v| 2.0 * v), false);
            }
            continue;
        }
        add(p.centre_of_pressure_m, f, false);
        if let Some(stem) = p.name.strip_suffix(" (upper end)")
            && p.name.starts_with("leg ")
            && !parts.iter().any(|o| o.name == format!("{stem} (lower end)"))
        {
            add(p.centre_of_pressure_m, f, true);
        }
    }
    Ok(WindCase { from_deg, force, moment, ground_force })
}

/// The wind resultant for every sampled direction: the rig layer re-derives the parts for each
/// azimuth; a wind given in the generic layer is turned about the vertical axis.
fn wind_cases(
    file: &crate::schema::ModelFile,
    spec: &crate::assembly::ModelSpec,
    rho: f64,
    column_mid_z: Option<f64>,
) -> Result<Vec<WindCase>> {
    let Some(w) = spec.wind.as_ref() else { return Ok(Vec::new()) };
    let step = 360.0 / WIND_DIRECTIONS as f64;
    if file.generic.wind.is_some() {
        let base = wind_case(w, rho, w.from_azimuth_deg.unwrap_or(0.0), column_mid_z)?;
        let rot = |v: [f64; 3], a: f64| {
            let (s, c) = a.sin_cos();
            // Turning the wind's "from" azimuth by +a turns the loads clockwise seen from above.
            [c * v[0] + s * v[1], -s * v[0] + c * v[1], v[2]]
        };
        return Ok((0..WIND_DIRECTIONS)
            .map(|i| {
                let a = (i as f64 * step).to_radians();
                WindCase {
                    from_deg: (base.from_deg + i as f64 * step).rem_euclid(360.0),
                    force: rot(base.force, a),
                    moment: rot(base.moment, a),
                    ground_force: rot(base.ground_force, a),
                }
            })
            .collect());
    }
    let mut f = file.clone();
    let mut out = Vec::with_capacity(WIND_DIRECTIONS);
    for i in 0..WIND_DIRECTIONS {
        let az = i as f64 * step;
        let mut wl = f.rig.wind_load.clone().unwrap_or_default();
        wl.from_azimuth_deg = Some(az);
        f.rig.wind_load = Some(wl);
        let s = f.expanded()?;
        if let Some(w) = s.wind.as_ref() {
            out.push(wind_case(w, rho, az, column_mid_z)?);
        }
    }
    Ok(out)
}

fn material_or(name: &str, preset: &Option<String>, props: &Option<Material>) -> Result<Material> {
    match (preset, props) {
        (Some(n), None) => Material::preset(n),
        (None, Some(m)) => Ok(m.clone()),
        _ => Err(Error::invalid(name, "give a preset name or the explicit properties")),
    }
}

/// Static checks of a rig-layer model file.
///
/// The weight acts at the real centre of gravity of everything above the feet (or the pier
/// base; [`crate::statics::centre_of_gravity`]). The design wind is the resultant of the
/// model's wind parts (force and moment, [`WIND_DIRECTIONS`] directions, each re-derived from
/// the rig; not the Σ C_d A upper bound) times the gust factor.
///
/// Tripod: vertical foot reactions from statics ([`crate::statics::foot_reactions`]); legs
/// hinged at head and foot, so a leg's axial force is its foot's vertical reaction / cos(splay)
/// and the feet carry vertical and friction loads. Leg stress and pinned–pinned buckling
/// (K = 1) use the worst leeward leg. Tipping about the line through two adjacent feet (moments
/// of the wind resultant about that line against the weight's). Sliding: horizontal wind force
/// against μ × Σ vertical reactions (a note when hinged legs without a spreader would need
/// μ ≥ tan splay to stay put).
///
/// Pier: base moment from the wind resultant plus `options.top_load_n` at the top (in the
/// wind's direction); base stress and fixed-free buckling; anchor-bolt tension
/// ([`crate::statics::anchor_bolt_tension_n`]) when the anchors are given; overturning of the
/// footing block about its edge when it stands on soil (passive earth pressure ignored).
///
/// Without wind parts the wind checks are skipped. Print [`CAUTIONS`] with the result.
pub fn rig_checks(
    file: &crate::schema::ModelFile,
    wind: &StaticWind,
    options: &StaticOptions,
) -> Result<CheckReport> {
    use crate::statics::{
        anchor_bolt_tension_n, centre_of_gravity, foot_friction_coefficient, foot_reactions,
    };
    require_non_negative("wind speed_m_s", wind.speed_m_s)?;
    require_positive("wind gust_factor", wind.gust_factor)?;
    require_positive("air_density_kg_m3", wind.air_density_kg_m3)?;
    require_non_negative("top_load_n", options.top_load_n)?;
    let spec = file.expanded()?;
    let floor_name = file.rig.floor.as_ref().and_then(|f| f.name.clone()).unwrap_or_else(|| "floor".into());
    let exclude = ["footing", floor_name.as_str()];
    let (mass, cg) = centre_of_gravity(&spec, &exclude)?;
    let weight = mass * STANDARD_GRAVITY;
    let scale = wind.gust_factor * wind.speed_m_s * wind.speed_m_s;
    let mut checks = Vec::new();
    let mut notes = vec![format!(
        "mass above the feet or pier base {mass:.1} kg, centre of gravity ({:.3}, {:.3}, {:.3}) m (east, north, up)",
        cg[0], cg[1], cg[2]
    )];
    if let Some(t) = &file.rig.tripod {
        let g = t.geometry()?;
        let n = t.legs.unwrap_or(3);
        let section = t
            .leg_section
            .clone()
            .ok_or_else(|| Error::invalid("tripod.leg_section", "is required for static checks"))?;
        let material = material_or("tripod.leg_material", &t.leg_material, &t.leg_material_properties)?;
        let surface = options
            .foot_surface
            .clone()
            .or_else(|| t.foot_surface.clone())
            .unwrap_or_else(|| crate::statics::DEFAULT_FOOT_SURFACE.to_string());
        let mu = foot_friction_coefficient(&surface)?;
        // The support surface: the lower end of leg 1.
        let z0 = spec
            .springs
            .iter()
            .find(|s| s.name == "leg1")
            .and_then(|s| s.to_at_m)
            .or_else(|| spec.beams.iter().find(|b| b.name == "leg1").map(|b| b.to_at_m))
            .map_or(0.0, |p| p[2]);
        let phi0 = t.first_leg_azimuth_deg.unwrap_or(0.0);
        let feet: Vec<[f64; 2]> = (0..n)
            .map(|i| {
                let a = (phi0 + 360.0 * i as f64 / n as f64).to_radians();
                [g.foot_radius_m * a.sin(), g.foot_radius_m * a.cos()]
            })
            .collect();
        let cases = wind_cases(file, &spec, wind.air_density_kg_m3, None)?;
        let weight_moment = [-weight * cg[1], weight * cg[0]];
        // Foot reactions under a load case (force and moment about the origin, already scaled).
        let reactions = |f: [f64; 3], m: [f64; 3]| {
            let mx = m[0] + z0 * f[1] + weight_moment[0];
            let my = m[1] - z0 * f[0] + weight_moment[1];
            foot_reactions(&feet, weight - f[2], [mx, my])
        };
        let still = reactions([0.0; 3], [0.0; 3])?;
        let mut lee = (still.iter().cloned().fold(f64::NEG_INFINITY, f64::max), f64::NAN);
        let mut windward = (still.iter().cloned().fold(f64::INFINITY, f64::min), f64::NAN);
        let d = g.foot_radius_m * (PI / n as f64).cos();
        // Tipping: (factor of safety, tipping speed, direction, overturning, restoring).
        let mut tip = (f64::INFINITY, f64::INFINITY, f64::NAN, 0.0, 0.0);
        // Sliding: (factor of safety, horizontal force, capacity).
        let mut slide = (f64::INFINITY, 0.0, mu * weight);
        for c in &cases {
            let f = c.force.map(|v| v * scale);
            let m = c.moment.map(|v| v * scale);
            let r = reactions(f, m)?;
            let (rmax, rmin) =
                r.iter().fold((f64::NEG_INFINITY, f64::INFINITY), |a, &x| (a.0.max(x), a.1.min(x)));
            if rmax > lee.0 {
                lee = (rmax, c.from_deg);
            }
            if rmin < windward.0 {
                windward = (rmin, c.from_deg);
            }
            for k in 0..n {
                let az = (phi0 + 360.0 * (k as f64 + 0.5) / n as f64).to_radians();
                let nh = [az.sin(), az.cos()];
                let p = [feet[k][0], feet[k][1], z0];
                // Moment per unit scale about foot k, component along ẑ × n̂ (tipping outward
                // over the edge).
                let pf = cross(p, c.force);
                let mp = [c.moment[0] - pf[0], c.moment[1] - pf[1]];
                let ot1 = -nh[1] * mp[0] + nh[0] * mp[1];
                let restoring = weight * (d - (cg[0] * nh[0] + cg[1] * nh[1]));
                let (fos, u_tip) = if restoring <= 0.0 {
                    (0.0, 0.0)
                } else if ot1 > 0.0 {
                    let fos = if scale > 0.0 { restoring / (ot1 * scale) } else { f64::INFINITY };
                    (fos, (restoring / (ot1 * wind.gust_factor)).sqrt())
                } else {
                    (f64::INFINITY, f64::INFINITY)
                };
                if u_tip < tip.1 {
                    tip = (fos, u_tip, c.from_deg, ot1 * scale, restoring);
                }
            }
            let fh = (f[0] + c.ground_force[0] * scale).hypot(f[1] + c.ground_force[1] * scale);
            let cap = mu * (weight - f[2] - c.ground_force[2] * scale).max(0.0);
            let fos = if fh > 0.0 { cap / fh } else { f64::INFINITY };
            if fos < slide.0 {
                slide = (fos, fh, cap);
            }
        }
        let cos = g.splay_rad.cos();
        let leg_n = lee.0.max(0.0) / cos;
        let st = axial_stress(leg_n, &section, &material)?;
        let at = |a: f64| if a.is_nan() { "still air".to_string() } else { format!("wind from {a:.0}°") };
        checks.push(Check::new(
            format!("leeward leg axial stress ({}, {leg_n:.0} N)", at(lee.1)),
            st.stress_pa,
            material.yield_strength_pa,
            "Pa",
        ));
        let b =
            buckling(&section, &material, g.leg_length_m, EndCondition::PinnedPinned.k_theoretical(), leg_n)?;
        checks.push(b.check("leeward leg buckling (pinned-pinned, K = 1)"));
        notes.push(format!(
            "foot reactions: leeward {:.0} N, windward {:.0} N ({}); leg axial force = reaction / cos(splay {:.1}°), legs hinged, feet carry vertical and friction loads",
            lee.0,
            windward.0,
            at(windward.1),
            g.splay_rad.to_degrees()
        ));
        if windward.0 < 0.0 {
            notes.push(if n == 3 {
                format!("uplift: the windward feet leave the ground ({}): the rig tips", at(windward.1))
            } else {
                format!(
                    "uplift: a windward foot leaves the ground ({}); with {n} legs the loads then shift to fewer feet than the linear split assumes",
                    at(windward.1)
                )
            });
        }
        if !cases.is_empty() {
            checks.push(Check::with_margin(
                format!("tipping (worst wind from {:.0}°, tips at {:.1} m/s mean)", tip.2, tip.1),
                tip.3,
                tip.4,
                "N m",
                tip.0,
            ));
            checks.push(Check::with_margin(
                format!("sliding ({surface}, μ {mu:.2} common practice)"),
                slide.1,
                slide.2,
                "N",
                slide.0,
            ));
        } else {
            notes.push("no wind parts: tipping and sliding not checked".into());
        }
        if t.spreader_stiffness_n_per_m.is_none() && g.splay_rad.tan() > mu {
            notes.push(format!(
                "no spreader: legs free to turn in their hinges push each foot outward with tan(splay) × its reaction; that needs μ ≥ {:.2} (here {mu:.2}); leg stops or a spreader take it",
                g.splay_rad.tan()
            ));
        }
    }
    if let Some(p) = &file.rig.pier {
        let section = p.section.clone().ok_or_else(|| Error::invalid("pier.section", "is required"))?;
        let material = material_or("pier.material", &p.material, &p.material_properties)?;
        let h = p.height_m.ok_or_else(|| Error::invalid("pier.height_m", "is required"))?;
        let base_z = spec.beams.iter().find(|b| b.name == "pier").map_or(0.0, |b| b.from_at_m[2]);
        let pier_mass =
            spec.beams.iter().filter(|b| b.name == "pier").map(|b| b.added_mass_kg_per_m * h).sum::<f64>()
                + material.density_kg_m3 * section.area_m2() * h;
        let top = (mass - pier_mass).max(0.0);
        let cases = wind_cases(file, &spec, wind.air_density_kg_m3, Some(base_z + h / 2.0))?;
        let top_load = options.top_load_n;
        let footing = spec.bodies.iter().find(|b| b.name == "footing").map(|b| (b.mass_kg, b.cg_m[2] * 2.0));
        // Base moment (about the pier base) and overturning about the footing's underside, worst
        // direction; the top load acts along the wind's horizontal force.
        let (mut m_base, mut base_dir, mut m_foot) = (top_load * h, f64::NAN, top_load * (base_z + h));
        let moment_with_top = |c: &WindCase, z: f64| {
            let f = c.force.map(|v| v * scale);
            let m = c.moment.map(|v| v * scale);
            let (mx, my) = (m[0] + z * f[1], m[1] - z * f[0]);
            let fh = f[0].hypot(f[1]);
            let u = if fh > 0.0 {
                [f[0] / fh, f[1] / fh]
            } else {
                let a = (c.from_deg + 180.0).to_radians();
                [a.sin(), a.cos()]
            };
            let lever = base_z + h - z;
            (mx - lever * top_load * u[1]).hypot(my + lever * top_load * u[0])
        };
        for c in &cases {
            let mb = moment_with_top(c, base_z);
            if mb > m_base {
                m_base = mb;
                base_dir = c.from_deg;
            }
            if footing.is_some() {
                m_foot = m_foot.max(moment_with_top(c, base_z - footing.map_or(0.0, |f| f.1)));
            }
        }
        // The pier check takes a top force; the one with the same base moment (its top
        // deflection is then an upper bound).
        let r = pier(&section, &material, h, top, m_base / h)?;
        checks.extend(r.report(&material, None).checks);
        notes.push(format!(
            "pier base moment {m_base:.0} N m ({} plus {top_load:.0} N at the top; that load is common practice, no source)",
            if base_dir.is_nan() { "wind".to_string() } else { format!("wind from {base_dir:.0}°, the worst direction,") }
        ));
        match (p.anchor_count, p.anchor_circle_diameter_m) {
            (Some(nb), Some(db)) => {
                let t = anchor_bolt_tension_n(m_base, weight, nb, db)?;
                match p.anchor_tension_capacity_n {
                    Some(cap) => {
                        let cap = require_positive("pier.anchor_tension_capacity_n", cap)?;
                        checks.push(Check::new(
                            format!("anchor bolt tension ({nb} on {:.0} mm circle, bolt group 4M/(nD) − W/n)", db * 1e3),
                            t.max(0.0),
                            cap,
                            "N",
                        ));
                    }
                    None => notes.push(format!(
                        "anchor bolt tension {:.0} N per bolt ({nb} on {:.0} mm circle, 4M/(nD) − W/n); no anchor_tension_capacity_n given: compare with the bolt's and the embedment's rated tension",
                        t.max(0.0),
                        db * 1e3
                    )),
                }
            }
            (None, None) => {
                notes.push("no anchor_count / anchor_circle_diameter_m: anchor tension not checked".into())
            }
            (None, Some(_)) => {
                return Err(Error::invalid("pier.anchor_count", "is required with anchor_circle_diameter_m"));
            }
            (Some(_), None) => {
                return Err(Error::invalid("pier.anchor_circle_diameter_m", "is required with anchor_count"));
            }
        }
        if let (Some((fm, _)), Some(f)) = (footing, p.footing.as_ref()) {
            let edge = f.diameter_m.or(f.side_m).unwrap_or(0.0) / 2.0;
            let stabilising = (weight + fm * STANDARD_GRAVITY) * edge;
            checks.push(Check::new(
                "footing overturning about its edge (no earth pressure)",
                m_foot,
                stabilising,
                "N m",
            ));
        }
    }
    if file.rig.tripod.is_none() && file.rig.pier.is_none() {
        return Err(Error::invalid(
            "model",
            "static checks need a [tripod] or [pier] section in the rig layer",
        ));
    }
    Ok(CheckReport { checks, notes })
}

#[cfg(test)]
mod rig_tests {
    use super::*;
    use crate::schema::ModelFile;
    use approx::assert_relative_eq;

    /// A mount (20 kg, CG 0.1 m above its base) on a stand, with one generic wind part of
    /// C_d A = 1.2 × 0.25 = 0.3 m² at z = 1.5 m (invented).
    fn rig(stand: &str) -> ModelFile {
        let text = format!(
            r#"
[mount]
mass_kg = 20.0
inertia_kgm2 = [0.3, 0.3, 0.2]
pivot_height_m = 0.3
cg_height_m = 0.1
tilt_stiffness_nm_per_rad = 2.0e4
yaw_stiffness_nm_per_rad = 1.0e4
{stand}
[wind]
body = "mount"
centre_of_pressure_m = [0.0, 0.0, 1.5]
direction = [1.0, 0.0, 0.0]
area_m2 = 0.25
drag_coefficient = 1.2
"#
        );
        ModelFile::parse(&text, "test.toml").unwrap()
    }

    const TRIPOD: &str = r#"
[tripod]
head_radius_m = 0.1
foot_radius_m = 0.6
height_m = 1.0
leg_section = { shape = "tube", outer_diameter_m = 0.03, wall_m = 0.002 }
leg_material = "steel-s235"
leg_mass_kg = 1e-9
foot_surface = "rubber-on-paver"
[ground]
kind = "rigid"
"#;

    fn line<'a>(r: &'a CheckReport, start: &str) -> &'a Check {
        r.checks.iter().find(|c| c.name.starts_with(start)).unwrap_or_else(|| panic!("{start}: {r:?}"))
    }

    #[test]
    fn sliding_threshold_and_leeward_leg() {
        let f = rig(TRIPOD);
        let calm = StaticWind { speed_m_s: 0.0, gust_factor: 1.0, air_density_kg_m3: 1.225 };
        let r = rig_checks(&f, &calm, &StaticOptions::default()).unwrap();
        // Still air, CG on the axis (mount only, massless legs): leg force W/(3 cos θ),
        // tan θ = 0.5/1.0 (docs/references.md#s9 leg load).
        let w = 20.0 * STANDARD_GRAVITY;
        let cos = 1.0 / 1.25f64.sqrt();
        let b = line(&r, "leeward leg buckling");
        assert_relative_eq!(b.value, w / (3.0 * cos), max_relative = 1e-6);
        // Sliding on rubber/paver (μ 0.6, common practice): the feet slide when
        // ½ ρ U² G C_d A = μ W → U² = 0.6 × 196.133 / (0.5 × 1.225 × 0.3) = 640.43, U = 25.307 m/s.
        let u_slide = (0.6 * w / (0.5 * 1.225 * 0.3)).sqrt();
        assert_relative_eq!(u_slide, 25.307, max_relative = 1e-4);
        let at = |u: f64| {
            let wind = StaticWind { speed_m_s: u, ..calm };
            rig_checks(&f, &wind, &StaticOptions::default()).unwrap()
        };
        let s = at(u_slide);
        assert_relative_eq!(line(&s, "sliding").margin, 1.0, max_relative = 1e-9);
        assert_eq!(line(&at(0.99 * u_slide), "sliding").verdict, Verdict::Marginal);
        assert_eq!(line(&at(1.01 * u_slide), "sliding").verdict, Verdict::Fail);
        // A named surface override, and an unknown one.
        let opt = StaticOptions { foot_surface: Some("steel-on-concrete".into()), ..Default::default() };
        let s2 = rig_checks(&f, &StaticWind { speed_m_s: u_slide, ..calm }, &opt).unwrap();
        assert_relative_eq!(line(&s2, "sliding").margin, 0.4 / 0.6, max_relative = 1e-9);
        let bad = StaticOptions { foot_surface: Some("ice".into()), ..Default::default() };
        assert!(matches!(rig_checks(&f, &calm, &bad), Err(Error::UnknownName { .. })));
        // At 10 m/s: F = 0.5 × 1.225 × 100 × 0.3 = 18.375 N at 1.5 m, M = 27.5625 N m. Worst
        // leeward foot: wind toward it (R_f = 0.6 m): R = W/3 + M/(1.5 R_f) = 65.378 + 30.625.
        let r10 = at(10.0);
        let r_lee = w / 3.0 + 27.5625 / (1.5 * 0.6);
        assert_relative_eq!(line(&r10, "leeward leg buckling").value, r_lee / cos, max_relative = 1e-9);
        // Tipping about the edge facing the wind: lever R_f/2 = 0.3 m, W × 0.3 = F_tip × 1.5 →
        // U_tip² = 0.2 W / (0.5 × 1.225 × 0.3).
        let u_tip = (0.2 * w / (0.5 * 1.225 * 0.3)).sqrt();
        let tip = line(&r10, "tipping");
        assert_relative_eq!(tip.margin, (u_tip / 10.0).powi(2), max_relative = 1e-9);
        assert!(tip.name.contains(&format!("{u_tip:.1} m/s")), "{}", tip.name);
        assert!(r10.notes.iter().any(|n| n.contains("1.100) m (east, north, up)")), "{:?}", r10.notes);
        // Beyond the tipping speed the windward feet lift: said in the notes.
        let r_storm = at(1.1 * u_tip);
        assert!(r_storm.notes.iter().any(|n| n.contains("uplift")), "{:?}", r_storm.notes);
    }

    #[test]
    fn pier_base_moment_and_anchors() {
        let stand = r#"
[pier]
section = { shape = "tube", outer_diameter_m = 0.1683, wall_m = 0.005 }
material = "steel-s235"
height_m = 1.2
anchor_count = 4
anchor_circle_diameter_m = 0.3
[ground]
kind = "rigid"
"#;
        let f = rig(stand);
        let wind = StaticWind { speed_m_s: 10.0, gust_factor: 2.0, air_density_kg_m3: 1.225 };
        let r = rig_checks(&f, &wind, &StaticOptions::default()).unwrap();
        // Wind part: F = 2 × 0.5 × 1.225 × 100 × 0.3 = 36.75 N at 1.5 m above the base (z = 0);
        // top load 22 N at 1.2 m: M = 55.125 + 26.4 = 81.525 N m. (The given [wind] replaces the
        // derived parts, so the column itself takes no wind here.)
        let m = 36.75 * 1.5 + 22.0 * 1.2;
        assert!(r.notes.iter().any(|n| n.contains(&format!("base moment {m:.0} N m"))), "{:?}", r.notes);
        let s = Section::Tube { outer_diameter_m: 0.1683, wall_m: 0.005 };
        let col = 7850.0 * s.area_m2() * 1.2;
        let stress = line(&r, "pier base stress");
        let w = (20.0 + col) * STANDARD_GRAVITY;
        assert_relative_eq!(
            stress.value,
            w / s.area_m2() + m / section_modulus_min_m3(&s).unwrap(),
            max_relative = 1e-9
        );
        // Anchors: T = 4M/(nD) − W/n (bolt group); no capacity given → a note.
        assert!(
            r.notes
                .iter()
                .any(|n| n.contains("anchor bolt tension") && n.contains("no anchor_tension_capacity_n"))
        );
        // With a capacity it is a check.
        let mut f2 = f.clone();
        if let Some(p) = f2.rig.pier.as_mut() {
            p.anchor_tension_capacity_n = Some(1000.0);
        }
        let r2 = rig_checks(&f2, &wind, &StaticOptions::default()).unwrap();
        let a = line(&r2, "anchor bolt tension");
        assert_relative_eq!(a.value, anchor_tension(m, w), max_relative = 1e-9);
        assert_relative_eq!(a.limit, 1000.0);
        let r2 = rig_checks(&f2, &wind, &StaticOptions { top_load_n: 0.0, ..Default::default() }).unwrap();
        assert_relative_eq!(
            line(&r2, "anchor bolt tension").value,
            anchor_tension(55.125, w),
            max_relative = 1e-9
        );
        // Without anchors: skipped with a note; a half-given anchor is a named error.
        let mut f3 = f.clone();
        if let Some(p) = f3.rig.pier.as_mut() {
            p.anchor_count = None;
            p.anchor_circle_diameter_m = None;
        }
        let r3 = rig_checks(&f3, &wind, &StaticOptions::default()).unwrap();
        assert!(r3.notes.iter().any(|n| n.contains("anchor tension not checked")));
        if let Some(p) = f3.rig.pier.as_mut() {
            p.anchor_count = Some(4);
        }
        let e = rig_checks(&f3, &wind, &StaticOptions::default()).unwrap_err().to_string();
        assert!(e.contains("anchor_circle_diameter_m"), "{e}");
    }

    fn anchor_tension(m: f64, w: f64) -> f64 {
        4.0 * m / (4.0 * 0.3) - w / 4.0
    }

    #[test]
    fn footing_overturning_by_hand() {
        // Pier 1.2 m on a 0.8 m square, 0.5 m deep footing (2400 kg/m³ → 768 kg) on soil, no top
        // load: overturning about the footing's underside (z = 0) = F × 1.5 m against the weight
        // of everything × side/2 (passive earth pressure ignored).
        let stand = r#"
[pier]
section = { shape = "tube", outer_diameter_m = 0.1683, wall_m = 0.005 }
material = "steel-s235"
height_m = 1.2
footing = { side_m = 0.8, depth_m = 0.5 }
[ground]
soil = "lawn"
"#;
        let f = rig(stand);
        let wind = StaticWind { speed_m_s: 10.0, gust_factor: 2.0, air_density_kg_m3: 1.225 };
        let r = rig_checks(&f, &wind, &StaticOptions { top_load_n: 0.0, ..Default::default() }).unwrap();
        let o = line(&r, "footing overturning");
        // The given [wind] part sits at z = 1.5 m in model coordinates (z = 0 the footing base).
        assert_relative_eq!(o.value, 36.75 * 1.5, max_relative = 1e-9);
        let s = Section::Tube { outer_diameter_m: 0.1683, wall_m: 0.005 };
        let total = 20.0 + 7850.0 * s.area_m2() * 1.2 + 2400.0 * 0.8 * 0.8 * 0.5;
        assert_relative_eq!(o.limit, total * STANDARD_GRAVITY * 0.4, max_relative = 1e-9);
    }
}

//! Rigid-body statics of a rig: centre of gravity, vertical foot reactions under weight and a
//! wind resultant, friction of feet on a surface, and the tension in an anchor-bolt group.
//!
//! Plain functions on explicit parameters (SI units, x east, y north, z up). The checks built
//! on them are in [`crate::checks::rig_checks`]; print [`crate::checks::CAUTIONS`] with them.

use crate::assembly::ModelSpec;
use crate::error::{Error, Result, require_non_negative, require_positive};

/// Friction coefficients of a foot on a surface (static, dry; common practice, no source;
/// values from memory: verify for your feet and surface). A spike in lawn is given an
/// equivalent coefficient (its hold is the soil's shear, not friction).
pub const FOOT_FRICTION_PRESETS: &[(&str, f64)] = &[
    ("rubber-on-concrete", 0.6),
    ("rubber-on-paver", 0.6),
    ("rubber-on-wood", 0.5),
    ("steel-on-concrete", 0.4),
    ("steel-spike-in-lawn", 0.5),
    ("wood-on-concrete", 0.5),
    ("plastic-on-concrete", 0.3),
    ("unknown", 0.3),
];

/// The surface assumed when none is given: `unknown`, the lowest coefficient in
/// [`FOOT_FRICTION_PRESETS`] (conservative for sliding).
pub const DEFAULT_FOOT_SURFACE: &str = "unknown";

/// Friction coefficient of a named foot surface from [`FOOT_FRICTION_PRESETS`].
pub fn foot_friction_coefficient(surface: &str) -> Result<f64> {
    FOOT_FRICTION_PRESETS.iter().find(|(n, _)| n.eq_ignore_ascii_case(surface)).map(|(_, mu)| *mu).ok_or_else(
        || Error::UnknownName {
            kind: "foot surface".into(),
            name: surface.into(),
            known: FOOT_FRICTION_PRESETS.iter().map(|(n, _)| *n).collect::<Vec<_>>().join(", "),
        },
    )
}

/// Total mass (kg) and centre of gravity (m) of a generic model's bodies, nodes and beams (beam
/// mass (ρA + added)·L at the beam's midpoint), leaving out the bodies named in `exclude` (a
/// footing or floor deck under the feet).
pub fn centre_of_gravity(spec: &ModelSpec, exclude: &[&str]) -> Result<(f64, [f64; 3])> {
    let mut m = 0.0;
    let mut s = [0.0; 3];
    let mut add = |mi: f64, at: [f64; 3]| {
        m += mi;
        for k in 0..3 {
            s[k] += mi * at[k];
        }
    };
    for b in spec.bodies.iter().filter(|b| !exclude.contains(&b.name.as_str())) {
        add(b.mass_kg, b.cg_m);
    }
    for n in &spec.nodes {
        add(n.mass_kg, n.at_m);
    }
    for b in &spec.beams {
        let l = (0..3).map(|i| (b.to_at_m[i] - b.from_at_m[i]).powi(2)).sum::<f64>().sqrt();
        let mid = std::array::from_fn(|i| 0.5 * (b.to_at_m[i] + b.from_at_m[i]));
        add((b.material()?.density_kg_m3 * b.section.area_m2() + b.added_mass_kg_per_m) * l, mid);
    }
    require_positive("total mass above the feet", m)?;
    Ok((m, s.map(|v| v / m)))
}

/// Vertical reactions (N, up positive) of feet at `feet_xy` (on the plane z = 0) carrying a
/// vertical load `vertical_n` (down) whose moment about the origin is `moment_n_m` (x, y: the
/// moment of all applied loads, weight and wind, about the origin at foot level).
///
/// Equilibrium: Σ R_i = V, Σ R_i y_i = −M_x, Σ R_i x_i = M_y. For three feet not on a line these
/// fix the reactions (statically determinate). For more feet the reactions are taken linear in
/// the foot position, R_i = a + b x_i + c y_i (a rigid head on equally stiff legs, the
/// elastic bolt-group distribution), which satisfies the same three equations.
pub fn foot_reactions(feet_xy: &[[f64; 2]], vertical_n: f64, moment_n_m: [f64; 2]) -> Result<Vec<f64>> {
    if feet_xy.len() < 3 {
        return Err(Error::invalid("feet", format!("need at least 3 feet, got {}", feet_xy.len())));
    }
    let n = feet_xy.len() as f64;
    let (mut sx, mut sy, mut sxx, mut syy, mut sxy) = (0.0, 0.0, 0.0, 0.0, 0.0);
    for p in feet_xy {
        sx += p[0];
        sy += p[1];
        sxx += p[0] * p[0];
        syy += p[1] * p[1];
        sxy += p[0] * p[1];
    }
    // Normal equations [n sx sy; sx sxx sxy; sy sxy syy] [a b c] = [V, M_y, −M_x].
    let a = [[n, sx, sy], [sx, sxx, sxy], [sy, sxy, syy]];
    let rhs = [vertical_n, moment_n_m[1], -moment_n_m[0]];
    let det3 = |m: [[f64; 3]; 3]| {
        m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1]) - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0])
            + m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0])
    };
    let d = det3(a);
    let scale = n * sxx.max(syy).powi(2);
    if d.abs() <= 1e-12 * scale.max(f64::MIN_POSITIVE) {
        return Err(Error::invalid("feet", "the feet lie on a line: no stable support"));
    }
    let coef: [f64; 3] = std::array::from_fn(|j| {
        let mut m = a;
        for (i, row) in m.iter_mut().enumerate() {
            row[j] = rhs[i];
        }
        det3(m) / d
    });
    Ok(feet_xy.iter().map(|p| coef[0] + coef[1] * p[0] + coef[2] * p[1]).collect())
}

/// Largest bolt tension (N; negative: no bolt in tension) of `n_bolts` anchor bolts equally
/// spaced on a circle of diameter `circle_diameter_m` under an overturning moment `moment_n_m`
/// and a vertical dead load `dead_load_n`: T = 4M/(n D_b) − W/n (the elastic bolt-group formula
/// for a bolt circle, a rigid base plate rotating about its centre; common practice in base-plate
/// handbooks, no source named). It ignores prying, plate flexibility and bearing of the plate
/// edge on the grout, which shift the neutral axis and raise the tension.
pub fn anchor_bolt_tension_n(
    moment_n_m: f64,
    dead_load_n: f64,
    n_bolts: usize,
    circle_diameter_m: f64,
) -> Result<f64> {
    require_non_negative("moment_n_m", moment_n_m)?;
    require_non_negative("dead_load_n", dead_load_n)?;
    if n_bolts < 3 {
        return Err(Error::invalid("anchor_count", format!("need at least 3 bolts, got {n_bolts}")));
    }
    let d = require_positive("anchor_circle_diameter_m", circle_diameter_m)?;
    let n = n_bolts as f64;
    Ok(4.0 * moment_n_m / (n * d) - dead_load_n / n)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::assembly::{BodySpec, Dof};
    use approx::assert_relative_eq;

    #[test]
    fn statics_of_a_tripod_by_hand() {
        // Hand calculation, invented tripod: feet on R = 0.6 m at azimuths 0°, 120°, 240°
        // (foot 1 north (0, 0.6), foot 2 (0.5196, −0.3), foot 3 (−0.5196, −0.3)).
        // W = 300 N at the centre, wind 40 N toward north at h = 1.2 m: M_x = −48 N m (r × F =
        // (0,0,1.2) × (0,40,0) = (−48, 0, 0)).
        // Σ R = 300; Σ R y = 48 → 0.6 R1 − 0.3 (R2 + R3) = 48; by symmetry R2 = R3:
        // R1 + 2 R2 = 300, 0.6 R1 − 0.6 R2 = 48 → R1 − R2 = 80 → R2 = 73.33, R1 = 153.33 N.
        let r = 0.6;
        let feet: Vec<[f64; 2]> = (0..3)
            .map(|k| {
                let a = (120.0 * k as f64).to_radians();
                [r * a.sin(), r * a.cos()]
            })
            .collect();
        let rs = foot_reactions(&feet, 300.0, [-48.0, 0.0]).unwrap();
        assert_relative_eq!(rs[0], 153.333_333, max_relative = 1e-6);
        assert_relative_eq!(rs[1], 73.333_333, max_relative = 1e-6);
        assert_relative_eq!(rs[2], 73.333_333, max_relative = 1e-6);
        // CG 0.1 m east, no wind: M_y = W c_x = 30 N m. Σ R x = 30 → 0.5196 (R2 − R3) = 30;
        // Σ R y = 0 → R1 = (R2 + R3)/2; R1 + R2 + R3 = 300 → R1 = 100, R2 − R3 = 57.735.
        let rs = foot_reactions(&feet, 300.0, [0.0, 30.0]).unwrap();
        assert_relative_eq!(rs[0], 100.0, max_relative = 1e-9);
        assert_relative_eq!(rs[1] - rs[2], 57.735_027, max_relative = 1e-6);
        assert_relative_eq!(rs.iter().sum::<f64>(), 300.0, max_relative = 1e-12);
        // Moment 180 N m toward the north foot: R1 − R2 = 300 and R1 + 2 R2 = 300 → R2 = R3 = 0,
        // the two south feet just unload (the rig tips over foot 1: W R = 300 × 0.6 = 180 N m).
        let rs = foot_reactions(&feet, 300.0, [-180.0, 0.0]).unwrap();
        assert_relative_eq!(rs[1], 0.0, epsilon = 1e-9);
        // Feet on a line are refused.
        let line = [[0.0, 0.0], [1.0, 0.0], [2.0, 0.0]];
        assert!(foot_reactions(&line, 1.0, [0.0, 0.0]).unwrap_err().to_string().contains("line"));
    }

    #[test]
    fn bolt_group_formula_by_hand() {
        // T = 4M/(n D) − W/n: M = 1000 N m, 4 bolts on D = 0.3 m, W = 600 N →
        // 4000/1.2 − 150 = 3333.33 − 150 = 3183.33 N.
        assert_relative_eq!(
            anchor_bolt_tension_n(1000.0, 600.0, 4, 0.3).unwrap(),
            3_183.333_333,
            max_relative = 1e-9
        );
        // Equal to the linear foot distribution with the bolts as feet (4 on the circle), bolt on
        // the tension side: −R of the most lifted "foot".
        let feet: Vec<[f64; 2]> = (0..4)
            .map(|k| {
                let a = (90.0 * k as f64).to_radians();
                [0.15 * a.sin(), 0.15 * a.cos()]
            })
            .collect();
        // Moment M about x so the south bolt is pulled: bolt forces are −R.
        let rs = foot_reactions(&feet, 600.0, [1000.0, 0.0]).unwrap();
        let t = -rs.iter().cloned().fold(f64::INFINITY, f64::min);
        // Extreme bolt at r = D/2: M r / Σ r² − W/n = M/(2r) − W/4 = 4M/(4D) − W/4.
        assert_relative_eq!(t, 3_183.333_333, max_relative = 1e-9);
        assert!(anchor_bolt_tension_n(1.0, 1.0, 2, 0.3).unwrap_err().to_string().contains("anchor_count"));
    }

    #[test]
    fn centre_of_gravity_of_two_bodies() {
        // 10 kg at (0, 0, 1) and 30 kg at (0.4, 0, 2): CG = (0.3, 0, 1.75), 40 kg.
        let body = |name: &str, m: f64, at: [f64; 3]| BodySpec {
            name: name.into(),
            mass_kg: m,
            cg_m: at,
            inertia_kgm2: [1.0; 3],
            products_kgm2: [0.0; 3],
            dofs: Dof::ALL.to_vec(),
        };
        let spec = ModelSpec {
            bodies: vec![
                body("a", 10.0, [0.0, 0.0, 1.0]),
                body("b", 30.0, [0.4, 0.0, 2.0]),
                body("footing", 500.0, [0.0; 3]),
            ],
            ..Default::default()
        };
        let (m, c) = centre_of_gravity(&spec, &["footing"]).unwrap();
        assert_relative_eq!(m, 40.0);
        assert_relative_eq!(c[0], 0.3, max_relative = 1e-12);
        assert_relative_eq!(c[2], 1.75, max_relative = 1e-12);
        assert_eq!(c[1], 0.0);
    }

    #[test]
    fn friction_presets() {
        assert_eq!(foot_friction_coefficient("Rubber-on-Paver").unwrap(), 0.6);
        assert_eq!(foot_friction_coefficient(DEFAULT_FOOT_SURFACE).unwrap(), 0.3);
        let e = foot_friction_coefficient("ice").unwrap_err().to_string();
        assert!(e.contains("ice") && e.contains("rubber-on-concrete"), "{e}");
    }
}

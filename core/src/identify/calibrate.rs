//! Calibration: adjust named numbers of a model file so its modes match measured ones.
//!
//! Parameters are addressed by dotted paths into the model file's TOML: `mount.tilt_stiffness_nm_per_rad`,
//! `tripod.joint_stiffness_n_per_m`, `ground.soil_properties.shear_modulus_pa`; an array element
//! by index (`mount.inertia_kgm2[0]`, `spring[1].stiffness_n_per_m`) or, for an array of tables, by
//! its `name` (`spring[pad].stiffness_n_per_m`). The value must already be in the file and be a
//! number, so a typo is an error rather than a new key.
//!
//! Targets are measured natural frequencies and, optionally, damping ratios (e.g. from
//! [`super::identify_ringdown`] or [`super::frf_modes`]). Each target is tied to one model
//! mode (by index in ascending order, or, when not given, the nearest in log-frequency to the
//! target at the starting values, each mode used once); the tie is kept during the search, so
//! targets should be given where the modes do not cross over the bounds.
//! Residuals: w (f_model/f_target − 1) and w·w_ζ (ζ_model/ζ_target − 1).
//!
//! The search is Levenberg–Marquardt (Marquardt 1963, SIAM J. Appl. Math. 11, 431–441; from
//! memory: verify) with a forward-difference Jacobian, in ln θ for parameters whose lower bound
//! is > 0 (stiffnesses span decades) and in θ otherwise; steps are clipped to the bounds
//! (projected). It is a small local search: start from the best values at hand.

use crate::error::{Error, Result};
use crate::linalg::RealLu;
use crate::model::Model;
use serde::{Deserialize, Serialize};

/// A model-file number to adjust, within bounds.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CalibrationParameter {
    /// Dotted path into the model file (module docs).
    pub path: String,
    /// Lower bound (same unit as the file's value).
    pub lower: f64,
    /// Upper bound.
    pub upper: f64,
}

/// A measured mode.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ModalTarget {
    /// Measured natural frequency (Hz).
    pub frequency_hz: f64,
    /// Measured damping ratio, if it is to be matched.
    #[serde(default)]
    pub damping_ratio: Option<f64>,
    /// Index of the model mode (ascending frequency, 0-based); `None` = nearest at the start.
    #[serde(default)]
    pub mode: Option<usize>,
    /// Weight of this target's residuals (default 1).
    #[serde(default = "one")]
    pub weight: f64,
}

fn one() -> f64 {
    1.0
}

impl ModalTarget {
    /// A frequency target with weight 1, matched to the nearest mode.
    pub fn frequency(frequency_hz: f64) -> Self {
        Self { frequency_hz, damping_ratio: None, mode: None, weight: 1.0 }
    }
    /// The same target with a damping ratio to match.
    pub fn with_damping(mut self, zeta: f64) -> Self {
        self.damping_ratio = Some(zeta);
        self
    }
    /// The same target tied to model mode `index`.
    pub fn with_mode(mut self, index: usize) -> Self {
        self.mode = Some(index);
        self
    }
}

/// Options of [`calibrate`].
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[non_exhaustive]
pub struct CalibrationOptions {
    /// Most Levenberg–Marquardt iterations (default 60).
    pub max_iterations: usize,
    /// Stop when the relative cost decrease of an accepted step is below this (default 1e-12).
    pub tolerance: f64,
    /// Extra weight on damping residuals relative to frequency residuals (default
    /// [`DEFAULT_DAMPING_WEIGHT`]).
    pub damping_weight: f64,
}

/// Default weight of a damping residual against a frequency residual of the same relative size.
/// A tap test gives the damping ratio to about 10 % (the ring-down card's median relative
/// uncertainty on simulated taps) and the frequency to about 0.1–1 %, so with equal weights a
/// damping target that the parameters cannot meet would pull the frequencies away from
/// well-measured values; 0.1 counts a 10 % damping error as a 1 % frequency error.
pub const DEFAULT_DAMPING_WEIGHT: f64 = 0.1;

impl Default for CalibrationOptions {
    fn default() -> Self {
        Self { max_iterations: 60, tolerance: 1e-12, damping_weight: DEFAULT_DAMPING_WEIGHT }
    }
}

/// One target after the fit.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct TargetResidual {
    /// Model mode the target is tied to.
    pub mode: usize,
    pub target_frequency_hz: f64,
    pub model_frequency_hz: f64,
    pub target_damping_ratio: Option<f64>,
    pub model_damping_ratio: f64,
    /// f_model/f_target − 1.
    pub frequency_error: f64,
    /// ζ_model/ζ_target − 1, when a damping ratio was given.
    pub damping_error: Option<f64>,
}

/// Result of [`calibrate`].
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Calibration {
    pub paths: Vec<String>,
    /// Values in the file before the fit.
    pub initial: Vec<f64>,
    /// Fitted values.
    pub values: Vec<f64>,
    /// True where a fitted value sits on its bound (the data may want it further).
    pub at_bound: Vec<bool>,
    /// Per target, at the fitted values.
    pub residuals: Vec<TargetResidual>,
    /// ½ Σ r² at the start and at the end.
    pub initial_cost: f64,
    pub cost: f64,
    pub iterations: usize,
    /// The relative cost decrease or the step fell below tolerance (not the iteration limit).
    pub converged: bool,
    /// The model file with the fitted values written in.
    pub model_toml: String,
}

/// One step of a parameter path.
enum Step<'a> {
    Key(&'a str),
    Index(usize),
    Named(&'a str),
}

fn parse_path(path: &str) -> Result<Vec<Step<'_>>> {
    let bad = |why: &str| Error::invalid("parameter path", format!("`{path}`: {why}"));
    if path.trim().is_empty() {
        return Err(bad("is empty"));
    }
    let mut steps = Vec::new();
    for seg in path.split('.') {
        let (key, rest) = match seg.find('[') {
            Some(i) => (&seg[..i], &seg[i..]),
            None => (seg, ""),
        };
        if key.is_empty() {
            return Err(bad("empty key"));
        }
        steps.push(Step::Key(key));
        let mut rest = rest;
        while !rest.is_empty() {
            let close = rest.find(']').ok_or_else(|| bad("unclosed ["))?;
            let inner = &rest[1..close];
            if inner.is_empty() {
                return Err(bad("empty []"));
            }
            steps.push(match inner.parse::<usize>() {
                Ok(i) => Step::Index(i),
                Err(_) => Step::Named(inner),
            });
            rest = &rest[close + 1..];
            if !rest.is_empty() && !rest.starts_with('[') {
                return Err(bad("text after ]"));
            }
        }
    }
    Ok(steps)
}

/// Every numeric leaf of a TOML document as a path (for error messages and discovery).
pub fn numeric_paths(model_toml: &str) -> Result<Vec<String>> {
    let table: toml::Table = parse_table(model_toml, "model")?;
    let mut out = Vec::new();
    fn walk(v: &toml::Value, prefix: &str, out: &mut Vec<String>) {
        match v {
            toml::Value::Integer(_) | toml::Value::Float(_) => out.push(prefix.to_string()),
            toml::Value::Table(t) => {
                for (k, x) in t {
                    let p = if prefix.is_empty() { k.clone() } else { format!("{prefix}.{k}") };
                    walk(x, &p, out);
                }
            }
            toml::Value::Array(a) => {
                for (i, x) in a.iter().enumerate() {
                    let label = match x.get("name").and_then(|n| n.as_str()) {
                        Some(n) => n.to_string(),
                        None => i.to_string(),
                    };
                    walk(x, &format!("{prefix}[{label}]"), out);
                }
            }
            _ => {}
        }
    }
    walk(&toml::Value::Table(table), "", &mut out);
    Ok(out)
}

fn parse_table(text: &str, file: &str) -> Result<toml::Table> {
    text.parse::<toml::Table>().map_err(|e| Error::Parse {
        file: file.into(),
        location: "model file".into(),
        reason: e.message().trim().to_string(),
    })
}

fn lookup<'t>(
    table: &'t mut toml::Table,
    path: &str,
    all: &dyn Fn() -> String,
) -> Result<&'t mut toml::Value> {
    let steps = parse_path(path)?;
    let missing =
        || Error::UnknownName { kind: "model parameter path".into(), name: path.into(), known: all() };
    let mut it = steps.into_iter();
    let Some(Step::Key(first)) = it.next() else { return Err(missing()) };
    let mut cur = table.get_mut(first).ok_or_else(missing)?;
    for step in it {
        cur = match step {
            Step::Key(k) => cur.get_mut(k).ok_or_else(missing)?,
            Step::Index(i) => cur.as_array_mut().and_then(|a| a.get_mut(i)).ok_or_else(missing)?,
            Step::Named(n) => cur
                .as_array_mut()
                .and_then(|a| a.iter_mut().find(|x| x.get("name").and_then(|v| v.as_str()) == Some(n)))
                .ok_or_else(missing)?,
        };
    }
    Ok(cur)
}

/// The number at `path` in a model file (module docs for the syntax).
pub fn get_parameter(model_toml: &str, path: &str) -> Result<f64> {
    let mut t = parse_table(model_toml, "model")?;
    as_number(lookup(&mut t, path, &|| known_paths(model_toml))?, path)
}

/// The value as a number; the error names `path`.
fn as_number(v: &toml::Value, path: &str) -> Result<f64> {
    v.as_float()
        .or_else(|| v.as_integer().map(|i| i as f64))
        .ok_or_else(|| Error::invalid(path, format!("is a {}, not a number", v.type_str())))
}

/// The numeric paths of a model file, for an unknown-path error.
fn known_paths(model_toml: &str) -> String {
    numeric_paths(model_toml).map(|p| p.join(", ")).unwrap_or_default()
}

/// A copy of the model file with the number at `path` replaced by `value`.
pub fn set_parameter(model_toml: &str, path: &str, value: f64) -> Result<String> {
    let mut t = parse_table(model_toml, "model")?;
    set_in(&mut t, path, value, &|| known_paths(model_toml))?;
    toml::to_string(&t).map_err(|e| Error::invalid("model", format!("could not be written back: {e}")))
}

fn set_in(t: &mut toml::Table, path: &str, value: f64, all: &dyn Fn() -> String) -> Result<()> {
    if !value.is_finite() {
        return Err(Error::invalid(path, format!("value must be finite, got {value}")));
    }
    let v = lookup(t, path, all)?;
    as_number(v, path)?;
    *v = toml::Value::Float(value);
    Ok(())
}

/// Fit `params` so the model's modes match `targets` (module docs). `file` names the model in
/// errors.
pub fn calibrate(
    model_toml: &str,
    file: &str,
    params: &[CalibrationParameter],
    targets: &[ModalTarget],
    opts: &CalibrationOptions,
) -> Result<Calibration> {
    if params.is_empty() {
        return Err(Error::invalid("parameters", "none given"));
    }
    if targets.is_empty() {
        return Err(Error::invalid("targets", "none given"));
    }
    if !(opts.tolerance > 0.0 && opts.damping_weight >= 0.0 && opts.damping_weight.is_finite()) {
        return Err(Error::invalid("options", "tolerance must be > 0 and damping_weight finite and >= 0"));
    }
    let n_res: usize = targets.iter().map(|t| 1 + usize::from(t.damping_ratio.is_some())).sum();
    if params.len() > n_res {
        return Err(Error::invalid(
            "parameters",
            format!(
                "{} parameters but only {n_res} measured values: the fit is underdetermined",
                params.len()
            ),
        ));
    }
    for (i, t) in targets.iter().enumerate() {
        if !(t.frequency_hz > 0.0 && t.frequency_hz.is_finite()) {
            return Err(Error::invalid(
                format!("targets[{i}].frequency_hz"),
                format!("must be > 0, got {}", t.frequency_hz),
            ));
        }
        if let Some(z) = t.damping_ratio
            && !(z > 0.0 && z < 1.0)
        {
            return Err(Error::invalid(
                format!("targets[{i}].damping_ratio"),
                format!("must be in (0, 1), got {z}"),
            ));
        }
        if !(t.weight > 0.0 && t.weight.is_finite()) {
            return Err(Error::invalid(
                format!("targets[{i}].weight"),
                format!("must be > 0, got {}", t.weight),
            ));
        }
    }
    let mut table = parse_table(model_toml, file)?;
    let all = || known_paths(model_toml);
    let mut initial = Vec::with_capacity(params.len());
    for p in params {
        if !(p.lower.is_finite() && p.upper.is_finite() && p.lower < p.upper) {
            return Err(Error::invalid(
                &p.path,
                format!("bounds need lower < upper, got [{}, {}]", p.lower, p.upper),
            ));
        }
        let x = as_number(lookup(&mut table, &p.path, &all)?, &p.path)?;
        if x < p.lower || x > p.upper {
            return Err(Error::OutOfRange {
                what: format!("starting value of {}", p.path),
                value: x,
                min: p.lower,
                max: p.upper,
            });
        }
        initial.push(x);
    }
    let log: Vec<bool> = params.iter().map(|p| p.lower > 0.0).collect();
    let to_u = |j: usize, x: f64| if log[j] { x.ln() } else { x };
    let to_x = |j: usize, u: f64| if log[j] { u.exp() } else { u };
    let lo: Vec<f64> = params.iter().enumerate().map(|(j, p)| to_u(j, p.lower)).collect();
    let hi: Vec<f64> = params.iter().enumerate().map(|(j, p)| to_u(j, p.upper)).collect();

    let model_at = |u: &[f64]| -> Result<(String, Model)> {
        let mut t = table.clone();
        for (j, p) in params.iter().enumerate() {
            set_in(&mut t, &p.path, to_x(j, u[j]), &all)?;
        }
        let text = toml::to_string(&t)
            .map_err(|e| Error::invalid("model", format!("could not be written back: {e}")))?;
        let m = Model::from_toml_str(&text, file)?;
        Ok((text, m))
    };
    // Tie targets to modes at the start.
    let mut u: Vec<f64> = initial.iter().enumerate().map(|(j, &x)| to_u(j, x)).collect();
    let modes0 = model_at(&u)?.1.modes()?;
    let nm = modes0.frequency_hz.len();
    let mut tie = vec![usize::MAX; targets.len()];
    let mut used = vec![false; nm];
    for (i, t) in targets.iter().enumerate() {
        if let Some(m) = t.mode {
            if m >= nm {
                return Err(Error::OutOfRange {
                    what: format!("targets[{i}].mode"),
                    value: m as f64,
                    min: 0.0,
                    max: nm as f64 - 1.0,
                });
            }
            if used[m] {
                return Err(Error::invalid(
                    format!("targets[{i}].mode"),
                    format!("mode {m} is already tied to another target"),
                ));
            }
            tie[i] = m;
            used[m] = true;
        }
    }
    let mut order: Vec<usize> = (0..targets.len()).filter(|&i| tie[i] == usize::MAX).collect();
    order.sort_by(|&a, &b| targets[a].frequency_hz.total_cmp(&targets[b].frequency_hz));
    for i in order {
        let ft = targets[i].frequency_hz;
        let best = (0..nm)
            .filter(|&m| !used[m] && modes0.frequency_hz[m] > 0.0)
            .min_by(|&a, &b| {
                (modes0.frequency_hz[a] / ft).ln().abs().total_cmp(&(modes0.frequency_hz[b] / ft).ln().abs())
            })
            .ok_or_else(|| {
                Error::invalid("targets", format!("{} targets but the model has {nm} modes", targets.len()))
            })?;
        tie[i] = best;
        used[best] = true;
    }
    let residuals = |u: &[f64]| -> Result<(Vec<f64>, Vec<TargetResidual>)> {
        let modes = model_at(u)?.1.modes()?;
        let mut r = Vec::with_capacity(n_res);
        let mut per = Vec::with_capacity(targets.len());
        for (i, t) in targets.iter().enumerate() {
            let m = tie[i];
            let (f, z) = match (modes.frequency_hz.get(m), modes.damping_ratio.get(m)) {
                (Some(&f), Some(&z)) => (f, z),
                _ => return Err(Error::unsupported(format!("mode {m} disappeared during calibration"))),
            };
            let fe = f / t.frequency_hz - 1.0;
            r.push(t.weight * fe);
            let ze = t.damping_ratio.map(|zt| z / zt - 1.0);
            if let Some(e) = ze {
                r.push(t.weight * opts.damping_weight * e);
            }
            per.push(TargetResidual {
                mode: m,
                target_frequency_hz: t.frequency_hz,
                model_frequency_hz: f,
                target_damping_ratio: t.damping_ratio,
                model_damping_ratio: z,
                frequency_error: fe,
                damping_error: ze,
            });
        }
        Ok((r, per))
    };
    let cost_of = |r: &[f64]| 0.5 * r.iter().map(|v| v * v).sum::<f64>();

    let np = params.len();
    let (mut r, _) = residuals(&u)?;
    let initial_cost = cost_of(&r);
    let mut cost = initial_cost;
    let mut lambda = 1e-3;
    let mut converged = false;
    let mut iterations = 0;
    while iterations < opts.max_iterations && !converged {
        iterations += 1;
        if cost < 1e-30 {
            converged = true;
            break;
        }
        // Forward-difference Jacobian.
        let mut jac = vec![0.0; r.len() * np]; // column-major
        for j in 0..np {
            let h = 1e-6 * u[j].abs().max(if log[j] { 1.0 } else { (hi[j] - lo[j]).abs() * 1e-3 });
            let mut up = u.clone();
            // Step inwards when at the upper bound.
            up[j] = if u[j] + h <= hi[j] { u[j] + h } else { u[j] - h };
            let dh = up[j] - u[j];
            let (rp, _) = residuals(&up)?;
            for i in 0..r.len() {
                jac[i + j * r.len()] = (rp[i] - r[i]) / dh;
            }
        }
        let jtj = |a: usize, b: usize| {
            (0..r.len()).map(|i| jac[i + a * r.len()] * jac[i + b * r.len()]).sum::<f64>()
        };
        let g: Vec<f64> = (0..np).map(|a| (0..r.len()).map(|i| jac[i + a * r.len()] * r[i]).sum()).collect();
        let a0: Vec<f64> = (0..np * np).map(|k| jtj(k % np, k / np)).collect();
        let mut accepted = false;
        for _ in 0..12 {
            let mut a = a0.clone();
            for d in 0..np {
                a[d + d * np] += lambda * a0[d + d * np].max(1e-12);
            }
            let mut step: Vec<f64> = g.iter().map(|v| -v).collect();
            let solved = RealLu::factor(&a, np).ok().and_then(|mut lu| lu.solve_in_place(&mut step).ok());
            if solved.is_none() {
                lambda *= 10.0;
                continue;
            }
            let trial: Vec<f64> = (0..np).map(|j| (u[j] + step[j]).clamp(lo[j], hi[j])).collect();
            let moved = (0..np).map(|j| (trial[j] - u[j]).abs()).fold(0.0, f64::max);
            if moved < 1e-14 {
                converged = true;
                break;
            }
            let (rt, _) = residuals(&trial)?;
            let ct = cost_of(&rt);
            if ct < cost {
                let decrease = (cost - ct) / cost;
                u = trial;
                r = rt;
                cost = ct;
                lambda = (lambda / 3.0).max(1e-12);
                accepted = true;
                if decrease < opts.tolerance || moved < 1e-12 {
                    converged = true;
                }
                break;
            }
            lambda *= 4.0;
        }
        if !accepted && !converged {
            // No decrease in any damped direction: a (local) minimum within the bounds.
            converged = true;
        }
    }
    let (_, per) = residuals(&u)?;
    let (model_toml, _) = model_at(&u)?;
    let values: Vec<f64> = (0..np).map(|j| to_x(j, u[j])).collect();
    let at_bound = (0..np)
        .map(|j| {
            (u[j] - lo[j]).abs() < 1e-9 * (1.0 + lo[j].abs())
                || (u[j] - hi[j]).abs() < 1e-9 * (1.0 + hi[j].abs())
        })
        .collect();
    Ok(Calibration {
        paths: params.iter().map(|p| p.path.clone()).collect(),
        initial,
        values,
        at_bound,
        residuals: per,
        initial_cost,
        cost,
        iterations,
        converged,
        model_toml,
    })
}

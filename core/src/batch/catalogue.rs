//! Isolator catalogues and how a pad specification enters a model.
//!
//! # Catalogue file (TOML)
//! ```toml
//! [[isolator]]
//! name = "soft-elastomer"
//! model = "hysteretic"          # hysteretic | kelvin-voigt | zener | none
//! compression_n_per_m = 2.0e5   # per pad, along the load (storage stiffness; k0 for zener)
//! shear_n_per_m = 4.0e4         # per pad, across the load
//! loss_factor = 0.15            # hysteretic only
//! rated_load_n = 400            # largest static load per pad
//!
//! [[isolator]]
//! name = "gel"
//! model = "kelvin-voigt"
//! compression_n_per_m = 1.0e5
//! shear_n_per_m = 2.0e4
//! compression_damping_ns_per_m = 300   # kelvin-voigt only
//! shear_damping_ns_per_m = 60
//! rated_load_n = 250
//!
//! [[isolator]]
//! name = "cork"
//! model = "zener"
//! compression_n_per_m = 1.5e6   # relaxed (static) stiffness k0
//! shear_n_per_m = 4.0e5
//! dynamic_ratio = 2.0           # k_inf / k0, the same for compression and shear
//! tau_s = 0.005                 # relaxation time
//! rated_load_n = 800
//! ```
//! Names are unique, non-empty and may not contain `|` (the sweep's key separator). The
//! baseline `none` (no pad) is always part of a sweep; a catalogue may list it as
//! `name = "none"`, `model = "none"` (with no other fields), and no other entry may use that
//! name.
//!
//! # How pads enter a generic-layer model
//! Springs whose name starts with the sweep's pad prefix (default `pad`) are the pad sites.
//! Each must be an axial `[[spring]]` whose stiffness is a `series` chain with the pad as its
//! **first** element and the support it sits on (soil contact, a foot, a leg) after it:
//! ```toml
//! [[spring]]
//! name = "pad_foot1_z"
//! from = "ground"
//! to = "foot1"
//! at_m = [0.6, 0, 0]
//! direction = [0, 0, 1]
//! series = [ { stiffness_n_per_m = 2e5, loss_factor = 0.15 },   # the pad (replaced)
//!            { stiffness_n_per_m = 3e8, loss_factor = 0.05 } ]  # the paver contact (kept)
//! ```
//! A spec replaces the first element; `none` removes it, leaving the support alone. This is
//! what taking a pad away does physically; a "very stiff pad" would not be (it would still be
//! an element of the chain with made-up numbers). A spring whose line of action is within 45°
//! of vertical takes the spec's compression stiffness, otherwise its shear stiffness.

use crate::assembly::{ModelSpec, SpringSpec};
use crate::error::{Error, Result, require_non_negative, require_positive};
use crate::stiffness::StiffnessModel;
use serde::{Deserialize, Serialize};
use std::path::Path;

/// Name of the no-pad baseline.
pub const NO_PAD: &str = "none";

/// Default prefix of pad springs in a generic-layer model.
pub const DEFAULT_PAD_PREFIX: &str = "pad";

/// Largest catalogue file accepted (bytes).
const MAX_CATALOGUE_BYTES: usize = 4 << 20;

/// The stiffness law of an isolator.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum PadModel {
    /// k(1 + iη), constant loss factor.
    Hysteretic,
    /// k + iωc.
    KelvinVoigt,
    /// Standard linear solid (k0, k∞ = dynamic_ratio·k0, τ).
    Zener,
    /// No pad (the baseline).
    None,
}

/// One catalogue entry, as written in the file (see the module docs).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Isolator {
    pub name: String,
    pub model: PadModel,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub compression_n_per_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub shear_n_per_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub loss_factor: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub compression_damping_ns_per_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub shear_damping_ns_per_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub dynamic_ratio: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub tau_s: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub rated_load_n: Option<f64>,
    /// Free text (what the pad is).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub description: Option<String>,
    /// How the pad's stiffness (and loss factor) change with temperature; None: the same at
    /// every temperature.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub temperature: Option<TemperatureTable>,
}

/// The pad's nominal values are at this temperature (°C): a sweep without a temperature uses
/// them as written.
pub const NOMINAL_TEMPERATURE_C: f64 = 20.0;

/// A pad's values against temperature: scale factors on the nominal values at each listed
/// temperature, interpolated linearly in temperature between rows and refused outside the
/// table ([`Error::OutOfRange`]: extrapolating toward a glass transition would be a guess).
/// The table must cover [`NOMINAL_TEMPERATURE_C`] with factors 1 there, so that the nominal
/// values are the 20 °C values.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct TemperatureTable {
    /// Strictly increasing temperatures (°C).
    pub celsius: Vec<f64>,
    /// Factor on every stiffness of the pad (compression and shear; k0 and k∞ of a zener).
    pub stiffness_scale: Vec<f64>,
    /// Factor on the loss factor (hysteretic pads only).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub loss_scale: Option<Vec<f64>>,
}

/// Linear interpolation of `y` over strictly increasing `x` at `t` (None outside).
fn interpolate(x: &[f64], y: &[f64], t: f64) -> Option<f64> {
    if x.len() < 2 || y.len() != x.len() || !(x[0]..=x[x.len() - 1]).contains(&t) {
        return None;
    }
    let j = x.partition_point(|v| *v <= t).clamp(1, x.len() - 1);
    let (x0, x1, y0, y1) = (x[j - 1], x[j], y[j - 1], y[j]);
    Some(y0 + (y1 - y0) * (t - x0) / (x1 - x0))
}

impl TemperatureTable {
    /// Check the table (`who` names the pad).
    pub fn validate(&self, who: &str, hysteretic: bool) -> Result<()> {
        let n = self.celsius.len();
        if n < 2 {
            return Err(Error::invalid(
                format!("{who}.temperature.celsius"),
                "needs at least two temperatures",
            ));
        }
        if self.stiffness_scale.len() != n {
            return Err(Error::shape(
                format!("{who}.temperature.stiffness_scale"),
                n,
                self.stiffness_scale.len(),
            ));
        }
        if self.celsius.iter().any(|t| !t.is_finite()) || self.celsius.windows(2).any(|w| w[1] <= w[0]) {
            return Err(Error::invalid(
                format!("{who}.temperature.celsius"),
                "must be finite and strictly increasing",
            ));
        }
        for v in &self.stiffness_scale {
            require_positive(|| format!("{who}.temperature.stiffness_scale"), *v)?;
        }
        if let Some(l) = &self.loss_scale {
            if !hysteretic {
                return Err(Error::invalid(
                    format!("{who}.temperature.loss_scale"),
                    "is used by hysteretic pads only",
                ));
            }
            if l.len() != n {
                return Err(Error::shape(format!("{who}.temperature.loss_scale"), n, l.len()));
            }
            for v in l {
                require_non_negative(|| format!("{who}.temperature.loss_scale"), *v)?;
            }
        }
        let (k20, l20) = self.scales_at(NOMINAL_TEMPERATURE_C).map_err(|_| {
            Error::invalid(
                format!("{who}.temperature.celsius"),
                format!(
                    "must cover the nominal {NOMINAL_TEMPERATURE_C} °C (where the catalogue values hold)"
                ),
            )
        })?;
        if (k20 - 1.0).abs() > 1e-9 || (l20 - 1.0).abs() > 1e-9 {
            return Err(Error::invalid(
                format!("{who}.temperature"),
                format!(
                    "the factors at {NOMINAL_TEMPERATURE_C} °C must be 1 (the nominal values are the {NOMINAL_TEMPERATURE_C} °C values); got stiffness {k20}, loss {l20}"
                ),
            ));
        }
        Ok(())
    }

    /// The stiffness and loss factors at `t_c` (°C), linear between rows; outside the table an
    /// [`Error::OutOfRange`].
    pub fn scales_at(&self, t_c: f64) -> Result<(f64, f64)> {
        let out = || Error::OutOfRange {
            what: "pad temperature (°C)".into(),
            value: t_c,
            min: self.celsius.first().copied().unwrap_or(f64::NAN),
            max: self.celsius.last().copied().unwrap_or(f64::NAN),
        };
        let k = interpolate(&self.celsius, &self.stiffness_scale, t_c).ok_or_else(out)?;
        let l = match &self.loss_scale {
            Some(l) => interpolate(&self.celsius, l, t_c).ok_or_else(out)?,
            None => 1.0,
        };
        Ok((k, l))
    }
}

/// Which way a pad is loaded.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PadDirection {
    Compression,
    Shear,
}

impl Isolator {
    /// The no-pad baseline.
    pub fn none() -> Isolator {
        Isolator {
            name: NO_PAD.into(),
            model: PadModel::None,
            compression_n_per_m: None,
            shear_n_per_m: None,
            loss_factor: None,
            compression_damping_ns_per_m: None,
            shear_damping_ns_per_m: None,
            dynamic_ratio: None,
            tau_s: None,
            rated_load_n: None,
            description: Some("no pad: the support alone".into()),
            temperature: None,
        }
    }

    /// The pad at `t_c` (°C): its stiffnesses (and loss factor) scaled by its temperature
    /// table, the table dropped. A pad without a table is returned as it is; at
    /// [`NOMINAL_TEMPERATURE_C`] every pad is as written. Outside a pad's table:
    /// [`Error::OutOfRange`] naming the pad.
    pub fn at_temperature(&self, t_c: f64) -> Result<Isolator> {
        crate::error::require_finite("temperature_c", t_c)?;
        let Some(table) = &self.temperature else { return Ok(self.clone()) };
        let (k, l) = table.scales_at(t_c).map_err(|e| match e {
            Error::OutOfRange { value, min, max, .. } => Error::OutOfRange {
                what: format!("temperature (°C) of isolator '{}' (its table)", self.name),
                value,
                min,
                max,
            },
            other => other,
        })?;
        // Away from the nominal temperature the pad is named with it, so that its sweep rows
        // say so and a resumed sweep at another temperature recomputes them.
        let name = if t_c == NOMINAL_TEMPERATURE_C {
            self.name.clone()
        } else {
            format!("{} at {t_c} °C", self.name)
        };
        Ok(Isolator {
            name,
            compression_n_per_m: self.compression_n_per_m.map(|v| v * k),
            shear_n_per_m: self.shear_n_per_m.map(|v| v * k),
            loss_factor: self.loss_factor.map(|v| v * l),
            temperature: None,
            ..self.clone()
        })
    }

    /// True for the no-pad baseline.
    pub fn is_none(&self) -> bool {
        self.model == PadModel::None
    }

    /// Check the fields the model needs and refuse those it does not use.
    pub fn validate(&self, file: &str) -> Result<()> {
        let who = format!("{file}: isolator '{}'", self.name);
        if self.name.trim().is_empty() || self.name.contains('|') || self.name.contains(['\n', '\r']) {
            return Err(Error::invalid(
                format!("{file}: isolator name '{}'", self.name),
                "must be non-empty and contain no '|' or line break",
            ));
        }
        let given = [
            ("compression_n_per_m", self.compression_n_per_m.is_some()),
            ("shear_n_per_m", self.shear_n_per_m.is_some()),
            ("loss_factor", self.loss_factor.is_some()),
            ("compression_damping_ns_per_m", self.compression_damping_ns_per_m.is_some()),
            ("shear_damping_ns_per_m", self.shear_damping_ns_per_m.is_some()),
            ("dynamic_ratio", self.dynamic_ratio.is_some()),
            ("tau_s", self.tau_s.is_some()),
            ("rated_load_n", self.rated_load_n.is_some()),
        ];
        let allowed: &[&str] = match self.model {
            PadModel::None => &[],
            PadModel::Hysteretic => &["compression_n_per_m", "shear_n_per_m", "loss_factor", "rated_load_n"],
            PadModel::KelvinVoigt => &[
                "compression_n_per_m",
                "shear_n_per_m",
                "compression_damping_ns_per_m",
                "shear_damping_ns_per_m",
                "rated_load_n",
            ],
            PadModel::Zener => {
                &["compression_n_per_m", "shear_n_per_m", "dynamic_ratio", "tau_s", "rated_load_n"]
            }
        };
        if self.is_none() != (self.name == NO_PAD) {
            return Err(Error::invalid(
                who,
                format!(
                    "the name '{NO_PAD}' is reserved for model = \"none\" (the no-pad baseline) and vice versa"
                ),
            ));
        }
        for (field, present) in given {
            let required = allowed.contains(&field) && field != "rated_load_n";
            if present && !allowed.contains(&field) {
                return Err(Error::invalid(format!("{who}.{field}"), "is not used by this model"));
            }
            if required && !present {
                return Err(Error::invalid(format!("{who}.{field}"), "is required by this model"));
            }
        }
        let pos =
            |f: &str, v: Option<f64>| v.map_or(Ok(0.0), |v| require_positive(|| format!("{who}.{f}"), v));
        let nonneg =
            |f: &str, v: Option<f64>| v.map_or(Ok(0.0), |v| require_non_negative(|| format!("{who}.{f}"), v));
        pos("compression_n_per_m", self.compression_n_per_m)?;
        pos("shear_n_per_m", self.shear_n_per_m)?;
        nonneg("loss_factor", self.loss_factor)?;
        nonneg("compression_damping_ns_per_m", self.compression_damping_ns_per_m)?;
        nonneg("shear_damping_ns_per_m", self.shear_damping_ns_per_m)?;
        pos("tau_s", self.tau_s)?;
        pos("rated_load_n", self.rated_load_n)?;
        if let Some(t) = &self.temperature {
            if self.is_none() {
                return Err(Error::invalid(format!("{who}.temperature"), "is not used by this model"));
            }
            t.validate(&who, self.model == PadModel::Hysteretic)?;
        }
        if let Some(r) = self.dynamic_ratio
            && !(r.is_finite() && r >= 1.0)
        {
            return Err(Error::invalid(format!("{who}.dynamic_ratio"), format!("must be >= 1, got {r}")));
        }
        Ok(())
    }

    /// The complex stiffness of one pad in a direction (None for the baseline).
    pub fn stiffness(&self, dir: PadDirection) -> Option<StiffnessModel> {
        let (k, c) = match dir {
            PadDirection::Compression => (self.compression_n_per_m?, self.compression_damping_ns_per_m),
            PadDirection::Shear => (self.shear_n_per_m?, self.shear_damping_ns_per_m),
        };
        Some(match self.model {
            PadModel::None => return None,
            PadModel::Hysteretic => {
                StiffnessModel::Hysteretic { k, loss_factor: self.loss_factor.unwrap_or(0.0) }
            }
            PadModel::KelvinVoigt => StiffnessModel::KelvinVoigt { k, c: c.unwrap_or(0.0) },
            PadModel::Zener => StiffnessModel::Zener {
                k0: k,
                k_inf: k * self.dynamic_ratio.unwrap_or(1.0),
                tau_s: self.tau_s.unwrap_or(1.0),
            },
        })
    }
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct CatalogueFile {
    #[serde(default)]
    isolator: Vec<Isolator>,
}

/// A validated catalogue: the baseline first, then the file's entries in file order.
#[derive(Debug, Clone, PartialEq)]
pub struct Catalogue {
    pub isolators: Vec<Isolator>,
    /// Where it came from (for messages).
    pub source: String,
}

impl Catalogue {
    /// Parse catalogue text; `file` names the source in errors (TOML errors carry the line).
    pub fn parse(text: &str, file: &str) -> Result<Catalogue> {
        let parsed: CatalogueFile = toml::from_str(text).map_err(|e| {
            let location = e
                .span()
                .map(|s| {
                    let line = text[..s.start.min(text.len())].matches('\n').count() + 1;
                    format!("line {line}")
                })
                .unwrap_or_else(|| "unknown line".into());
            Error::Parse { file: file.into(), location, reason: e.message().to_string() }
        })?;
        if parsed.isolator.is_empty() {
            return Err(Error::Parse {
                file: file.into(),
                location: "line 1".into(),
                reason: "no [[isolator]] entries".into(),
            });
        }
        Self::from_isolators(parsed.isolator, file)
    }

    /// A catalogue from entries (validated as the file's; `none` entries are dropped, the
    /// baseline goes first); `source` names them in errors.
    pub fn from_isolators(entries: Vec<Isolator>, source: &str) -> Result<Catalogue> {
        let mut isolators = vec![Isolator::none()];
        for iso in entries {
            iso.validate(source)?;
            if iso.is_none() {
                continue; // the baseline is always first
            }
            if isolators.iter().any(|i| i.name == iso.name) {
                return Err(Error::invalid(format!("{source}: isolator '{}'", iso.name), "is listed twice"));
            }
            isolators.push(iso);
        }
        Ok(Catalogue { isolators, source: source.into() })
    }

    /// The catalogue as file text, the baseline included (as `name = "none"`); [`parse`] gives
    /// it back exactly (numbers are written in shortest round-trip form).
    ///
    /// [`parse`]: Catalogue::parse
    pub fn to_toml(&self) -> Result<String> {
        #[derive(Serialize)]
        struct Out<'a> {
            isolator: &'a [Isolator],
        }
        toml::to_string(&Out { isolator: &self.isolators })
            .map_err(|e| Error::invalid(format!("catalogue {}", self.source), e.to_string()))
    }

    /// The entries in consecutive parts of at most `per_part` isolators, each a catalogue of its
    /// own (with the baseline first, as every catalogue); the parts' entries after their
    /// baselines, in order, are this catalogue's. A catalogue of the baseline alone is one part.
    pub fn split(&self, per_part: usize) -> Result<Vec<Catalogue>> {
        if per_part == 0 {
            return Err(Error::invalid("isolators per part", "must be at least 1"));
        }
        let entries: Vec<Isolator> = self.isolators.iter().filter(|i| !i.is_none()).cloned().collect();
        if entries.is_empty() {
            return Ok(vec![self.clone()]);
        }
        Ok(entries
            .chunks(per_part)
            .map(|c| {
                let mut isolators = vec![Isolator::none()];
                isolators.extend(c.iter().cloned());
                Catalogue { isolators, source: self.source.clone() }
            })
            .collect())
    }

    /// Every pad at `t_c` (°C) ([`Isolator::at_temperature`]).
    pub fn at_temperature(&self, t_c: f64) -> Result<Catalogue> {
        Ok(Catalogue {
            isolators: self.isolators.iter().map(|i| i.at_temperature(t_c)).collect::<Result<_>>()?,
            source: self.source.clone(),
        })
    }

    /// Read a catalogue file.
    pub fn read(path: &Path) -> Result<Catalogue> {
        let name = path.display().to_string();
        let text = crate::io::read_text_capped(path, MAX_CATALOGUE_BYTES)?;
        Self::parse(&text, &name)
    }
}

/// A pad site found in a generic-layer model.
#[derive(Debug, Clone, PartialEq)]
pub struct PadSite {
    /// Index into `ModelSpec::springs`.
    pub spring: usize,
    pub name: String,
    pub direction: PadDirection,
}

fn spring_direction(s: &SpringSpec) -> Option<[f64; 3]> {
    let d = match (s.direction, s.from_at_m, s.to_at_m) {
        (Some(d), _, _) => d,
        (None, Some(a), Some(b)) => [b[0] - a[0], b[1] - a[1], b[2] - a[2]],
        _ => return None,
    };
    let l = (d[0] * d[0] + d[1] * d[1] + d[2] * d[2]).sqrt();
    (l.is_finite() && l > 0.0).then(|| [d[0] / l, d[1] / l, d[2] / l])
}

/// Find the pad sites (springs named `prefix*`) and check each is a series chain with the pad
/// first and something after it.
pub fn pad_sites(spec: &ModelSpec, prefix: &str) -> Result<Vec<PadSite>> {
    if prefix.is_empty() {
        return Err(Error::invalid("pad prefix", "must not be empty"));
    }
    let mut sites = Vec::new();
    for (i, s) in spec.springs.iter().enumerate() {
        if !s.name.starts_with(prefix) {
            continue;
        }
        let who = format!("spring '{}'", s.name);
        match &s.series {
            Some(parts) if parts.len() >= 2 => {}
            _ => {
                return Err(Error::invalid(
                    who,
                    "a pad spring needs `series = [pad, support, ...]`: the pad first, then what it sits on \
                     (soil contact, foot, leg), so that the no-pad baseline removes the pad and keeps the support",
                ));
            }
        }
        let d = spring_direction(s).ok_or_else(|| {
            Error::invalid(format!("{who}.direction"), "is needed to tell compression from shear")
        })?;
        let direction = if d[2].abs() >= std::f64::consts::FRAC_1_SQRT_2 {
            PadDirection::Compression
        } else {
            PadDirection::Shear
        };
        sites.push(PadSite { spring: i, name: s.name.clone(), direction });
    }
    if let Some(s) = spec.torsion_springs.iter().find(|s| s.name.starts_with(prefix)) {
        return Err(Error::invalid(
            format!("torsion_spring '{}'", s.name),
            format!("pads are axial springs; rename it so it does not start with '{prefix}'"),
        ));
    }
    if sites.is_empty() {
        return Err(Error::invalid(
            "model",
            format!("has no pad springs (axial springs whose name starts with '{prefix}')"),
        ));
    }
    Ok(sites)
}

/// The model spec with every pad site's first series element replaced by the isolator (or
/// removed for the baseline).
pub fn apply_isolator(spec: &ModelSpec, sites: &[PadSite], iso: &Isolator) -> Result<ModelSpec> {
    let mut out = spec.clone();
    for site in sites {
        let s = &spec.springs[site.spring];
        let who = format!("spring '{}'", s.name);
        let parts = s.series.as_deref().unwrap_or_default();
        let support = parts
            .iter()
            .enumerate()
            .skip(1)
            .map(|(k, p)| p.to_model(&format!("{who}.series[{k}]"), false))
            .collect::<Result<Vec<_>>>()?;
        let mut chain = Vec::with_capacity(support.len() + 1);
        if let Some(pad) = iso.stiffness(site.direction) {
            chain.push(pad);
        }
        chain.extend(support);
        let model = if chain.len() == 1 { chain.remove(0) } else { StiffnessModel::Series(chain) };
        out.springs[site.spring] = s.geometry().with_model(&model, false);
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    const COLD: &str = r#"
[[isolator]]
name = "cold"
model = "hysteretic"
compression_n_per_m = 4e5
shear_n_per_m = 1e5
loss_factor = 0.2
[isolator.temperature]
celsius = [-20, 0, 20, 40]
stiffness_scale = [4.0, 2.0, 1.0, 0.8]
loss_scale = [1.5, 1.2, 1.0, 0.9]
"#;

    #[test]
    fn temperature_table_interpolates_at_and_between_rows() {
        let cat = Catalogue::parse(COLD, "cold.toml").unwrap();
        let pad = &cat.isolators[1];
        // At table rows: the listed factors.
        let at0 = pad.at_temperature(0.0).unwrap();
        assert_eq!(at0.compression_n_per_m, Some(8e5));
        assert_eq!(at0.shear_n_per_m, Some(2e5));
        assert!((at0.loss_factor.unwrap() - 0.24).abs() < 1e-15);
        assert!(at0.temperature.is_none());
        // Between rows, linear: -15 °C is a quarter of the way from -20 to 0 → 4 − 0.25·2 = 3.5.
        let at = pad.at_temperature(-15.0).unwrap();
        assert!((at.compression_n_per_m.unwrap() - 3.5 * 4e5).abs() < 1e-6);
        assert!((at.loss_factor.unwrap() - 0.2 * (1.5 - 0.25 * 0.3)).abs() < 1e-15);
        // 30 °C: halfway between 1.0 and 0.8.
        assert!((pad.at_temperature(30.0).unwrap().shear_n_per_m.unwrap() - 0.9e5).abs() < 1e-6);
        // The nominal temperature gives the values as written; the ends are inside.
        let at20 = pad.at_temperature(NOMINAL_TEMPERATURE_C).unwrap();
        assert_eq!(at20.compression_n_per_m, pad.compression_n_per_m);
        assert_eq!(pad.at_temperature(-20.0).unwrap().compression_n_per_m, Some(16e5));
        assert_eq!(pad.at_temperature(40.0).unwrap().compression_n_per_m, Some(3.2e5));
        // Outside the table: refused, naming the pad.
        match pad.at_temperature(-25.0) {
            Err(Error::OutOfRange { what, min, max, .. }) => {
                assert!(what.contains("'cold'"), "{what}");
                assert_eq!((min, max), (-20.0, 40.0));
            }
            other => panic!("{other:?}"),
        }
        assert!(matches!(pad.at_temperature(f64::NAN), Err(Error::InvalidArgument { .. })));
        // Pads without a table do not change; the whole catalogue round-trips its table.
        assert_eq!(cat.isolators[0].at_temperature(-25.0).unwrap(), cat.isolators[0]);
        assert_eq!(Catalogue::parse(&cat.to_toml().unwrap(), "again").unwrap().isolators, cat.isolators);
    }

    #[test]
    fn bad_temperature_tables_are_refused() {
        let bad = |table: &str| {
            let text = COLD.split("[isolator.temperature]").next().unwrap().to_string()
                + "[isolator.temperature]\n"
                + table;
            Catalogue::parse(&text, "t.toml").unwrap_err()
        };
        // 20 °C not covered, factor at 20 °C not 1, not increasing, lengths differ, zero stiffness.
        assert!(matches!(
            bad("celsius = [-20, 0]\nstiffness_scale = [2, 1]\n"),
            Error::InvalidArgument { .. }
        ));
        assert!(matches!(
            bad("celsius = [0, 20]\nstiffness_scale = [2, 1.1]\n"),
            Error::InvalidArgument { .. }
        ));
        assert!(matches!(
            bad("celsius = [20, 0]\nstiffness_scale = [1, 2]\n"),
            Error::InvalidArgument { .. }
        ));
        assert!(matches!(bad("celsius = [0, 20]\nstiffness_scale = [2]\n"), Error::ShapeMismatch { .. }));
        assert!(matches!(
            bad("celsius = [0, 20]\nstiffness_scale = [0, 1]\n"),
            Error::InvalidArgument { .. }
        ));
        assert!(matches!(bad("celsius = [0, 20]\nfactor = [2, 1]\n"), Error::Parse { .. }));
        // loss_scale on a pad without a loss factor.
        let kv = "[[isolator]]\nname = \"gel\"\nmodel = \"kelvin-voigt\"\ncompression_n_per_m = 1e5\nshear_n_per_m = 2e4\ncompression_damping_ns_per_m = 300\nshear_damping_ns_per_m = 60\n[isolator.temperature]\ncelsius = [0, 20]\nstiffness_scale = [2, 1]\nloss_scale = [2, 1]\n";
        assert!(matches!(Catalogue::parse(kv, "kv.toml"), Err(Error::InvalidArgument { .. })));
    }

    const CAT: &str = r#"
[[isolator]]
name = "soft"
model = "hysteretic"
compression_n_per_m = 2e5
shear_n_per_m = 4e4
loss_factor = 0.15
rated_load_n = 300
[[isolator]]
name = "gel"
model = "kelvin-voigt"
compression_n_per_m = 1e5
shear_n_per_m = 2e4
compression_damping_ns_per_m = 300
shear_damping_ns_per_m = 60
[[isolator]]
name = "cork"
model = "zener"
compression_n_per_m = 1.5e6
shear_n_per_m = 4e5
dynamic_ratio = 2
tau_s = 0.005
"#;

    #[test]
    fn catalogue_parses_with_baseline_first() {
        let c = Catalogue::parse(CAT, "cat.toml").unwrap();
        let names: Vec<_> = c.isolators.iter().map(|i| i.name.as_str()).collect();
        assert_eq!(names, ["none", "soft", "gel", "cork"]);
        let z = c.isolators[3].stiffness(PadDirection::Compression).unwrap();
        // Zener: static stiffness k0, high-frequency limit k_inf (docs/references.md#s10).
        assert!((z.static_stiffness() - 1.5e6).abs() < 1e-6);
        assert!((z.at(1e6).re - 3.0e6).abs() / 3.0e6 < 1e-6);
        assert!(c.isolators[0].stiffness(PadDirection::Shear).is_none());
    }

    #[test]
    fn catalogue_errors_name_file_line_and_field() {
        let e = Catalogue::parse("[[isolator]]\nname = \"a\"\nmodel = \"rubbery\"\n", "c.toml").unwrap_err();
        let s = e.to_string();
        assert!(s.contains("c.toml") && s.contains("line 3"), "{s}");
        let e = Catalogue::parse(
            "[[isolator]]\nname = \"a\"\nmodel = \"hysteretic\"\ncompression_n_per_m = 1e5\nshear_n_per_m = 1e4\n",
            "c.toml",
        )
        .unwrap_err();
        assert!(e.to_string().contains("'a'.loss_factor"), "{e}");
        let e = Catalogue::parse(
            "[[isolator]]\nname = \"a\"\nmodel = \"hysteretic\"\ncompression_n_per_m = -1\nshear_n_per_m = 1e4\nloss_factor = 0.1\n",
            "c.toml",
        )
        .unwrap_err();
        assert!(e.to_string().contains("compression_n_per_m"), "{e}");
        let e = Catalogue::parse("[[isolator]]\nname = \"none\"\nmodel = \"zener\"\n", "c.toml").unwrap_err();
        assert!(e.to_string().contains("reserved"), "{e}");
        let e = Catalogue::parse("", "c.toml").unwrap_err();
        assert!(e.to_string().contains("no [[isolator]]"), "{e}");
    }

    #[test]
    fn catalogue_text_round_trips_and_splits_in_order() {
        let mut c = Catalogue::parse(CAT, "cat.toml").unwrap();
        // A value with no short decimal form must survive the text exactly.
        c.isolators[1].loss_factor = Some(0.1 + 0.2);
        let back = Catalogue::parse(&c.to_toml().unwrap(), "cat.toml").unwrap();
        assert_eq!(back, c);
        let parts = c.split(2).unwrap();
        assert_eq!(parts.len(), 2);
        let names: Vec<Vec<&str>> =
            parts.iter().map(|p| p.isolators.iter().map(|i| i.name.as_str()).collect()).collect();
        assert_eq!(names, [vec!["none", "soft", "gel"], vec!["none", "cork"]]);
        assert!(c.split(0).is_err());
        let alone = Catalogue::from_isolators(Vec::new(), "empty").unwrap();
        let parts = alone.split(5).unwrap();
        assert_eq!(parts.len(), 1);
        assert_eq!(parts[0], alone);
        let e = Catalogue::from_isolators(vec![c.isolators[1].clone(), c.isolators[1].clone()], "list")
            .unwrap_err();
        assert!(e.to_string().contains("listed twice"), "{e}");
    }
}

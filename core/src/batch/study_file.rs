//! The study file: a base model, the variables to change, the disturbances and the settings of a
//! design study ([`super::study`] runs it). Key names and examples: `docs/study-file.md`.
//!
//! ```toml
//! title = "upgrade the tripod, add pads, or both?"
//! model = "tripod-paver.toml"        # relative to the study file
//! combine = "crossed"                # or "paired" (equal lengths)
//!
//! [[vary]]
//! path = "tripod.leg_length_m"       # a dotted number of the model file (as `calibrate` uses)
//! values = [1.0, 1.25]               # or range = { start, stop, count[, spacing = "log"] }
//!                                    # or grid = { start, stop, step }
//! [[vary]]
//! name = "rig"
//! rigs = [{ label = "heavier tripod", file = "tripod-heavy.toml" }]   # the base model is "base"
//!
//! [[vary]]
//! pads = "isolators.toml"            # the catalogue; "none" (no pads) first
//!
//! [disturbances]
//! grounds = ["recordings/quiet-night.csv", "nhnm"]
//! winds = ["calm", "4"]
//! ```
//!
//! Every file a study names is read once, when the study is loaded ([`Study::load`]); the
//! loaded [`Study`] carries model texts, the catalogue and the ground sources (paths made
//! absolute against the study file's folder), so it can be evaluated anywhere that can read the
//! grounds.

use super::catalogue::{Catalogue, DEFAULT_PAD_PREFIX, Isolator, NOMINAL_TEMPERATURE_C};
use super::ground::GroundSource;
use super::ranking::Visibility;
use super::sweep::{SweepEngine, WindCase};
use crate::error::{Error, Result};
use crate::grid::FreqGrid;
use crate::identify::get_parameter;
use crate::schema::ModelFile;
use serde::Deserialize;
use std::path::{Path, PathBuf};

/// Largest study file, model file or catalogue read (bytes).
const MAX_STUDY_BYTES: usize = 4 << 20;
/// Most variants a study may hold (refused up front: each builds and solves a model).
pub const MAX_VARIANTS: usize = 100_000;
/// Most values one variable may take.
pub const MAX_VALUES: usize = 10_000;

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct StudyDoc {
    #[serde(default)]
    title: Option<String>,
    model: String,
    #[serde(default)]
    combine: Option<String>,
    #[serde(default)]
    vary: Vec<VaryDoc>,
    disturbances: DisturbanceDoc,
    #[serde(default)]
    settings: SettingsDoc,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct VaryDoc {
    #[serde(default)]
    name: Option<String>,
    #[serde(default)]
    path: Option<String>,
    #[serde(default)]
    values: Option<Vec<f64>>,
    #[serde(default)]
    range: Option<RangeDoc>,
    #[serde(default)]
    grid: Option<GridDoc>,
    #[serde(default)]
    rigs: Option<Vec<RigDoc>>,
    #[serde(default)]
    pads: Option<String>,
    #[serde(default)]
    setting: Option<String>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RangeDoc {
    start: f64,
    stop: f64,
    count: usize,
    #[serde(default)]
    spacing: Option<String>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct GridDoc {
    start: f64,
    stop: f64,
    step: f64,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RigDoc {
    label: String,
    file: String,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct DisturbanceDoc {
    grounds: Vec<String>,
    #[serde(default)]
    winds: Vec<String>,
}

#[derive(Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
struct SettingsDoc {
    f_min_hz: Option<f64>,
    f_max_hz: Option<f64>,
    n_freq: Option<usize>,
    visibility_px: Option<f64>,
    visibility_p: Option<f64>,
    temperature_c: Option<f64>,
    pad_prefix: Option<String>,
    design_wind_m_s: Option<f64>,
    ground_scale: Option<[f64; 3]>,
    person_kg: Option<f64>,
    person_distance_m: Option<f64>,
    ground_measured_at_m: Option<f64>,
    ground_distance_m: Option<f64>,
    ground_waves: Option<String>,
    soil_loss_factor: Option<f64>,
    soil_wave_speed_m_s: Option<f64>,
    engine: Option<String>,
}

/// How the variables' values are combined into variants.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Combine {
    /// Every combination (the full product).
    Crossed,
    /// The k-th value of every variable together (all variables need as many values).
    Paired,
}

/// A study setting that a variable may take values of (`[[vary]] setting = "NAME"`).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StudySetting {
    /// `person_distance_m`: where the standing person is (m from the stand's axis).
    PersonDistance,
    /// `person_kg`: the standing person's body mass (kg).
    PersonMass,
    /// `ground_distance_m`: the rig's distance from the ground's source (m).
    GroundDistance,
}

impl StudySetting {
    /// The setting by its key name.
    pub fn parse(name: &str) -> Result<StudySetting> {
        match name {
            "person_distance_m" => Ok(StudySetting::PersonDistance),
            "person_kg" => Ok(StudySetting::PersonMass),
            "ground_distance_m" => Ok(StudySetting::GroundDistance),
            other => Err(Error::UnknownName {
                kind: "study setting to vary".into(),
                name: other.into(),
                known: "person_distance_m, person_kg, ground_distance_m".into(),
            }),
        }
    }

    /// The key name.
    pub fn name(&self) -> &'static str {
        match self {
            StudySetting::PersonDistance => "person_distance_m",
            StudySetting::PersonMass => "person_kg",
            StudySetting::GroundDistance => "ground_distance_m",
        }
    }
}

/// What a variable changes.
#[derive(Debug, Clone, PartialEq)]
pub enum VariableKind {
    /// A number of the model file at a dotted path ([`crate::identify::set_parameter`]);
    /// `base` is its value in the base model file.
    Path { path: String, values: Vec<f64>, base: f64 },
    /// Whole model files: the base model (label "base") first, then each alternative (label, file
    /// name, text).
    Rig { rigs: Vec<(String, String, String)> },
    /// The isolator catalogue ("none" first).
    Pads { catalogue: Catalogue },
    /// A study setting (not the model file); `base` is the setting's value in `[settings]`.
    Setting { setting: StudySetting, values: Vec<f64>, base: f64 },
}

/// One variable of a study: its column name and what it changes.
#[derive(Debug, Clone, PartialEq)]
pub struct Variable {
    pub name: String,
    pub kind: VariableKind,
}

impl Variable {
    /// Number of values.
    pub fn len(&self) -> usize {
        match &self.kind {
            VariableKind::Path { values, .. } | VariableKind::Setting { values, .. } => values.len(),
            VariableKind::Rig { rigs } => rigs.len(),
            VariableKind::Pads { catalogue } => catalogue.isolators.len(),
        }
    }

    /// True when the variable has no values (never, once loaded).
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The text of value `i` in rows (numbers in shortest round-trip form).
    pub fn label(&self, i: usize) -> String {
        match &self.kind {
            VariableKind::Path { values, .. } | VariableKind::Setting { values, .. } => {
                values.get(i).map(|v| format!("{v}")).unwrap_or_default()
            }
            VariableKind::Rig { rigs } => rigs.get(i).map(|r| r.0.clone()).unwrap_or_default(),
            VariableKind::Pads { catalogue } => {
                catalogue.isolators.get(i).map(|p| p.name.clone()).unwrap_or_default()
            }
        }
    }

    /// The text of the base model's value.
    pub fn base_label(&self) -> String {
        match &self.kind {
            VariableKind::Path { base, .. } | VariableKind::Setting { base, .. } => format!("{base}"),
            VariableKind::Rig { rigs } => rigs.first().map(|r| r.0.clone()).unwrap_or_default(),
            VariableKind::Pads { .. } => super::NO_PAD.to_string(),
        }
    }

    /// Whether value `i` is the base model's value.
    pub fn is_base(&self, i: usize) -> bool {
        match &self.kind {
            VariableKind::Path { values, base, .. } | VariableKind::Setting { values, base, .. } => {
                values.get(i) == Some(base)
            }
            VariableKind::Rig { .. } => i == 0,
            VariableKind::Pads { catalogue } => catalogue.isolators.get(i).is_some_and(Isolator::is_none),
        }
    }

    /// Numeric values (path variables), for plots against the value.
    pub fn numbers(&self) -> Option<&[f64]> {
        match &self.kind {
            VariableKind::Path { values, .. } | VariableKind::Setting { values, .. } => Some(values),
            _ => None,
        }
    }
}

/// The settings of a study.
#[derive(Debug, Clone, PartialEq)]
pub struct StudySettings {
    pub grid: FreqGrid,
    /// When a change from the base counts as visible (the sweep's levels by default).
    pub visibility: Visibility,
    /// The night's temperature (°C) for pads with a temperature table.
    pub temperature_c: f64,
    /// Prefix of pad springs in a generic-layer model.
    pub pad_prefix: String,
    /// Design wind (m/s) of the static checks (gust factor 2, ISA sea-level air).
    pub design_wind_m_s: f64,
    /// Per-axis factor on PSD files and reference spectra.
    pub ground_scale: [f64; 3],
    /// The standing person's body mass (kg) when the study asks for the standing tilt
    /// (`person_kg`, `person_distance_m` or a variable of either given), else None.
    pub person_kg: Option<f64>,
    /// Where the person stands (m from the stand's axis, the worst azimuth).
    pub person_distance_m: f64,
    /// The distance (m) from their source at which the grounds were measured; None: the grounds
    /// are taken as they are.
    pub ground_measured_at_m: Option<f64>,
    /// The rig's distance (m) from the source (the measured distance when not given).
    pub ground_distance_m: Option<f64>,
    /// Geometric spreading exponent of the ground path (0.5, surface waves, by default).
    pub ground_spreading: f64,
    /// Soil loss factor of the ground path.
    pub soil_loss_factor: f64,
    /// Wave speed (m/s) of the ground path; None: the model's site phase velocity, else the
    /// default soil's.
    pub soil_wave_speed_m_s: Option<f64>,
    /// How the image columns of pad variants are computed (`engine = "auto"` or `"rebuild"`):
    /// the spring-variant engine where it applies, or a model built per row; the rows are the
    /// same either way to rounding.
    pub engine: SweepEngine,
}

impl StudySettings {
    /// The sweep's defaults: 0.2–100 Hz on 600 log-spaced points, 0.1 px and 1 %, 20 °C,
    /// prefix `pad`, design wind 10 m/s, ground scale 1.
    pub fn new() -> Result<StudySettings> {
        Ok(StudySettings {
            grid: FreqGrid::log(0.2, 100.0, 600)?,
            visibility: Visibility::default(),
            temperature_c: NOMINAL_TEMPERATURE_C,
            pad_prefix: DEFAULT_PAD_PREFIX.into(),
            design_wind_m_s: 10.0,
            ground_scale: [1.0; 3],
            person_kg: None,
            person_distance_m: crate::people::DEFAULT_WALK_DISTANCE_M,
            ground_measured_at_m: None,
            ground_distance_m: None,
            ground_spreading: crate::distance_attenuation::SURFACE_WAVE_SPREADING,
            soil_loss_factor: crate::distance_attenuation::DEFAULT_SOIL_LOSS_FACTOR,
            soil_wave_speed_m_s: None,
            engine: SweepEngine::Auto,
        })
    }

    /// The base value of a setting a variable may vary (NaN for the ground distance when the
    /// grounds have no measured distance).
    pub fn base_of(&self, s: StudySetting) -> f64 {
        match s {
            StudySetting::PersonDistance => self.person_distance_m,
            StudySetting::PersonMass => self.person_kg.unwrap_or(crate::people::DEFAULT_BODY_MASS_KG),
            StudySetting::GroundDistance => {
                self.ground_distance_m.or(self.ground_measured_at_m).unwrap_or(f64::NAN)
            }
        }
    }

    /// The ground path from the measured distance to `to_m` (None when the grounds have no
    /// measured distance).
    pub fn ground_path(&self, to_m: f64) -> Option<crate::distance_attenuation::GroundPathSpec> {
        self.ground_measured_at_m.map(|from_m| crate::distance_attenuation::GroundPathSpec {
            from_m,
            to_m,
            spreading: self.ground_spreading,
            loss_factor: self.soil_loss_factor,
            wave_speed_m_s: self.soil_wave_speed_m_s,
        })
    }
}

/// A loaded study: everything it names, read.
#[derive(Debug, Clone, PartialEq)]
pub struct Study {
    pub title: Option<String>,
    /// Where the study came from (for messages).
    pub source: String,
    /// The base model file's name (for messages) and text.
    pub model_name: String,
    pub model_text: String,
    pub combine: Combine,
    pub variables: Vec<Variable>,
    pub grounds: Vec<GroundSource>,
    pub winds: Vec<WindCase>,
    pub settings: StudySettings,
}

fn parse_err(text: &str, file: &str, e: &toml::de::Error) -> Error {
    let location = e
        .span()
        .map(|s| format!("line {}", text[..s.start.min(text.len())].matches('\n').count() + 1))
        .unwrap_or_else(|| "unknown line".into());
    Error::Parse { file: file.into(), location, reason: e.message().trim().to_string() }
}

/// Reads the files a study names; tests and bindings may supply their own.
fn read_file(dir: &Path, name: &str) -> Result<(String, String)> {
    let p = dir.join(name);
    let text = crate::io::read_text_capped(&p, MAX_STUDY_BYTES)?;
    Ok((p.display().to_string(), text))
}

/// A computed value rounded to 12 significant digits, so `1.1 + 0.1` is the 1.2 a user means
/// (and reads in the rows) rather than 1.2000000000000002.
fn tidy(x: f64) -> f64 {
    format!("{x:.11e}").parse().unwrap_or(x)
}

fn path_values(who: &str, v: &VaryDoc) -> Result<Vec<f64>> {
    let given = [v.values.is_some(), v.range.is_some(), v.grid.is_some()].iter().filter(|x| **x).count();
    if given != 1 {
        return Err(Error::invalid(who, "give exactly one of values, range or grid"));
    }
    let out = if let Some(vals) = &v.values {
        vals.clone()
    } else if let Some(r) = &v.range {
        if r.count < 2 {
            return Err(Error::invalid(
                format!("{who}.range.count"),
                format!("must be at least 2, got {}", r.count),
            ));
        }
        if r.count > MAX_VALUES {
            return Err(Error::TooLarge {
                what: format!("{who}.range.count"),
                value: r.count,
                limit: MAX_VALUES,
            });
        }
        crate::error::require_finite(|| format!("{who}.range.start"), r.start)?;
        crate::error::require_finite(|| format!("{who}.range.stop"), r.stop)?;
        let n = r.count - 1;
        match r.spacing.as_deref().unwrap_or("linear") {
            "linear" => (0..=n).map(|k| tidy(r.start + (r.stop - r.start) * k as f64 / n as f64)).collect(),
            "log" => {
                if !(r.start > 0.0 && r.stop > 0.0) {
                    return Err(Error::invalid(
                        format!("{who}.range"),
                        "log spacing needs start and stop > 0",
                    ));
                }
                let (a, b) = (r.start.ln(), r.stop.ln());
                (0..=n).map(|k| tidy((a + (b - a) * k as f64 / n as f64).exp())).collect()
            }
            s => {
                return Err(Error::invalid(
                    format!("{who}.range.spacing"),
                    format!("'{s}' is not linear or log"),
                ));
            }
        }
    } else if let Some(g) = &v.grid {
        crate::error::require_finite(|| format!("{who}.grid.start"), g.start)?;
        crate::error::require_finite(|| format!("{who}.grid.stop"), g.stop)?;
        crate::error::require_positive(|| format!("{who}.grid.step"), g.step)?;
        if g.stop < g.start {
            return Err(Error::invalid(format!("{who}.grid"), "stop must not be below start"));
        }
        let n = ((g.stop - g.start) / g.step + 1e-9).floor();
        if n + 1.0 > MAX_VALUES as f64 {
            return Err(Error::TooLarge {
                what: format!("{who}.grid values"),
                value: usize::MAX,
                limit: MAX_VALUES,
            });
        }
        (0..=n as usize).map(|k| tidy(g.start + g.step * k as f64)).collect()
    } else {
        Vec::new()
    };
    if out.is_empty() {
        return Err(Error::invalid(who, "has no values"));
    }
    if out.len() > MAX_VALUES {
        return Err(Error::TooLarge { what: format!("{who} values"), value: out.len(), limit: MAX_VALUES });
    }
    crate::error::require_all_finite(who, &out)?;
    Ok(out)
}

/// The standing person and the ground path of `[settings]`, and the base values of the
/// variables that vary them.
fn people_and_ground_settings(
    s: &SettingsDoc,
    settings: &mut StudySettings,
    variables: &mut [Variable],
    file: &str,
) -> Result<()> {
    use crate::error::{require_non_negative, require_positive};
    let varies = |which: StudySetting| {
        variables.iter().any(|v| matches!(v.kind, VariableKind::Setting { setting, .. } if setting == which))
    };
    let person = s.person_kg.is_some()
        || s.person_distance_m.is_some()
        || varies(StudySetting::PersonDistance)
        || varies(StudySetting::PersonMass);
    if person {
        let kg = s.person_kg.unwrap_or(crate::people::DEFAULT_BODY_MASS_KG);
        settings.person_kg = Some(require_positive("settings.person_kg", kg)?);
    }
    if let Some(d) = s.person_distance_m {
        settings.person_distance_m = require_non_negative("settings.person_distance_m", d)?;
    }
    if let Some(r) = s.ground_measured_at_m {
        settings.ground_measured_at_m = Some(require_positive("settings.ground_measured_at_m", r)?);
    }
    if let Some(r) = s.ground_distance_m {
        settings.ground_distance_m = Some(require_positive("settings.ground_distance_m", r)?);
    }
    if let Some(w) = &s.ground_waves {
        settings.ground_spreading = crate::distance_attenuation::GroundPath::spreading_of(w)?;
    }
    if let Some(e) = s.soil_loss_factor {
        settings.soil_loss_factor = require_non_negative("settings.soil_loss_factor", e)?;
    }
    if let Some(c) = s.soil_wave_speed_m_s {
        settings.soil_wave_speed_m_s = Some(require_positive("settings.soil_wave_speed_m_s", c)?);
    }
    let ground_keys = s.ground_distance_m.is_some()
        || s.ground_waves.is_some()
        || s.soil_loss_factor.is_some()
        || s.soil_wave_speed_m_s.is_some()
        || varies(StudySetting::GroundDistance);
    if ground_keys && settings.ground_measured_at_m.is_none() {
        return Err(Error::invalid(
            format!("{file}: settings.ground_measured_at_m"),
            "a ground distance or soil needs the distance from the source at which the grounds were measured",
        ));
    }
    let mut seen = Vec::new();
    for v in variables.iter_mut() {
        if let VariableKind::Setting { setting, base, .. } = &mut v.kind {
            if seen.contains(setting) {
                return Err(Error::invalid(
                    format!("{file}: setting '{}'", setting.name()),
                    "is varied twice",
                ));
            }
            seen.push(*setting);
            *base = settings.base_of(*setting);
        }
    }
    Ok(())
}

impl Study {
    /// Read a study file; the files it names are read relative to its folder.
    pub fn read(path: &Path) -> Result<Study> {
        let name = path.display().to_string();
        let text = crate::io::read_text_capped(path, MAX_STUDY_BYTES)?;
        let dir = match path.parent() {
            Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
            _ => PathBuf::from("."),
        };
        Self::load(&text, &name, &dir)
    }

    /// Parse study text (`file` names it in errors) and read what it names relative to `dir`.
    pub fn load(text: &str, file: &str, dir: &Path) -> Result<Study> {
        let doc: StudyDoc = toml::from_str(text).map_err(|e| parse_err(text, file, &e))?;
        let (model_name, model_text) = read_file(dir, &doc.model)?;
        ModelFile::parse(&model_text, &model_name)?;
        let combine = match doc.combine.as_deref().unwrap_or("crossed") {
            "crossed" => Combine::Crossed,
            "paired" => Combine::Paired,
            c => {
                return Err(Error::invalid(
                    format!("{file}: combine"),
                    format!("'{c}' is not crossed or paired"),
                ));
            }
        };
        let mut variables = Vec::new();
        for (i, v) in doc.vary.iter().enumerate() {
            let who = format!("{file}: vary[{i}]");
            let kinds = [v.path.is_some(), v.rigs.is_some(), v.pads.is_some(), v.setting.is_some()]
                .iter()
                .filter(|x| **x)
                .count();
            if kinds != 1 {
                return Err(Error::invalid(who, "give exactly one of path, setting, rigs or pads"));
            }
            let var = if let Some(name) = &v.setting {
                let setting = StudySetting::parse(name)?;
                let values = path_values(&who, v)?;
                for x in &values {
                    match setting {
                        StudySetting::PersonDistance => {
                            crate::error::require_non_negative(|| format!("{who}: {name}"), *x)?;
                        }
                        _ => {
                            crate::error::require_positive(|| format!("{who}: {name}"), *x)?;
                        }
                    }
                }
                Variable {
                    name: v.name.clone().unwrap_or_else(|| name.clone()),
                    kind: VariableKind::Setting { setting, values, base: f64::NAN },
                }
            } else if let Some(path) = &v.path {
                let values = path_values(&who, v)?;
                let base = get_parameter(&model_text, path)?;
                Variable {
                    name: v.name.clone().unwrap_or_else(|| path.clone()),
                    kind: VariableKind::Path { path: path.clone(), values, base },
                }
            } else {
                if v.values.is_some() || v.range.is_some() || v.grid.is_some() {
                    return Err(Error::invalid(who, "values, range and grid go with a path or a setting"));
                }
                if let Some(rigs) = &v.rigs {
                    if rigs.is_empty() {
                        return Err(Error::invalid(format!("{who}.rigs"), "is empty"));
                    }
                    let mut out = vec![("base".to_string(), model_name.clone(), model_text.clone())];
                    for r in rigs {
                        let (n, t) = read_file(dir, &r.file)?;
                        ModelFile::parse(&t, &n)?;
                        out.push((r.label.clone(), n, t));
                    }
                    Variable {
                        name: v.name.clone().unwrap_or_else(|| "rig".into()),
                        kind: VariableKind::Rig { rigs: out },
                    }
                } else {
                    let pads = v.pads.as_deref().unwrap_or_default();
                    let (n, t) = read_file(dir, pads)?;
                    let catalogue = Catalogue::parse(&t, &n)?;
                    Variable {
                        name: v.name.clone().unwrap_or_else(|| "pads".into()),
                        kind: VariableKind::Pads { catalogue },
                    }
                }
            };
            variables.push(var);
        }
        let grounds = doc
            .disturbances
            .grounds
            .iter()
            .map(|g| {
                if crate::spectrum::ReferenceGround::from_name(g).is_ok() && !dir.join(g).exists() {
                    GroundSource::parse(g)
                } else {
                    GroundSource::parse(&dir.join(g).display().to_string())
                }
            })
            .collect();
        let winds = doc.disturbances.winds.iter().map(|w| WindCase::parse(w)).collect::<Result<Vec<_>>>()?;
        let s = &doc.settings;
        let mut settings = StudySettings::new()?;
        if s.f_min_hz.is_some() || s.f_max_hz.is_some() || s.n_freq.is_some() {
            settings.grid = FreqGrid::log(
                s.f_min_hz.unwrap_or(0.2),
                s.f_max_hz.unwrap_or(100.0),
                s.n_freq.unwrap_or(600),
            )?;
        }
        if let Some(v) = s.visibility_px {
            settings.visibility.rms_px = crate::error::require_non_negative("settings.visibility_px", v)?;
        }
        if let Some(v) = s.visibility_p {
            settings.visibility.p_outside = crate::error::require_non_negative("settings.visibility_p", v)?;
        }
        if let Some(t) = s.temperature_c {
            settings.temperature_c = crate::error::require_finite("settings.temperature_c", t)?;
        }
        if let Some(p) = &s.pad_prefix {
            settings.pad_prefix = p.clone();
        }
        if let Some(w) = s.design_wind_m_s {
            settings.design_wind_m_s = crate::error::require_non_negative("settings.design_wind_m_s", w)?;
        }
        if let Some(g) = s.ground_scale {
            settings.ground_scale = g;
        }
        if let Some(e) = &s.engine {
            settings.engine = match e.as_str() {
                "auto" => SweepEngine::Auto,
                "rebuild" => SweepEngine::Rebuild,
                other => {
                    return Err(Error::invalid(
                        "settings.engine",
                        format!("must be \"auto\" or \"rebuild\", got \"{other}\" in {file}"),
                    ));
                }
            };
        }
        people_and_ground_settings(s, &mut settings, &mut variables, file)?;
        let study = Study {
            title: doc.title,
            source: file.to_string(),
            model_name,
            model_text,
            combine,
            variables,
            grounds,
            winds,
            settings,
        };
        study.check()?;
        Ok(study)
    }

    /// The wind cases (one calm case when none is given).
    pub fn wind_cases(&self) -> Vec<WindCase> {
        if self.winds.is_empty() { vec![WindCase::calm()] } else { self.winds.clone() }
    }

    /// Check the study's shape before anything is evaluated: unique variable names that are no
    /// fixed column, no `|` in labels, paired variables of equal length, not too many variants.
    pub fn check(&self) -> Result<()> {
        let mut names = std::collections::HashSet::new();
        for v in &self.variables {
            if v.name.trim().is_empty() || v.name.contains(['|', '\n', '\r']) {
                return Err(Error::invalid(
                    format!("{}: variable name '{}'", self.source, v.name),
                    "must be non-empty, without '|' or line breaks",
                ));
            }
            if super::study::is_fixed_column(&v.name) {
                return Err(Error::invalid(
                    format!("{}: variable name '{}'", self.source, v.name),
                    "is the name of a fixed column; give the variable a name",
                ));
            }
            if !names.insert(v.name.clone()) {
                return Err(Error::invalid(
                    format!("{}: variable '{}'", self.source, v.name),
                    "is given twice; give one of them a name",
                ));
            }
            for i in 0..v.len() {
                let l = v.label(i);
                if l.trim().is_empty() || l.contains(['|', '\n', '\r', ',', '=']) {
                    return Err(Error::invalid(
                        format!("{}: value '{l}' of variable '{}'", self.source, v.name),
                        "labels must be non-empty, without '|', ',', '=' or line breaks",
                    ));
                }
            }
            let labels: std::collections::HashSet<String> = (0..v.len()).map(|i| v.label(i)).collect();
            if labels.len() != v.len() {
                return Err(Error::invalid(
                    format!("{}: variable '{}'", self.source, v.name),
                    "has a value twice",
                ));
            }
        }
        if self.combine == Combine::Paired
            && let Some(first) = self.variables.first()
        {
            for v in &self.variables[1..] {
                if v.len() != first.len() {
                    return Err(Error::shape(
                        format!(
                            "{}: paired variables ('{}' has {} values, '{}' has {})",
                            self.source,
                            first.name,
                            first.len(),
                            v.name,
                            v.len()
                        ),
                        first.len(),
                        v.len(),
                    ));
                }
            }
        }
        let n = match self.combine {
            Combine::Crossed => self.variables.iter().try_fold(1usize, |a, v| a.checked_mul(v.len())),
            Combine::Paired => Some(self.variables.first().map_or(1, Variable::len)),
        };
        match n {
            Some(n) if n <= MAX_VARIANTS => {}
            _ => {
                return Err(Error::TooLarge {
                    what: format!("{}: variants", self.source),
                    value: n.unwrap_or(usize::MAX),
                    limit: MAX_VARIANTS,
                });
            }
        }
        if self.grounds.is_empty() {
            return Err(Error::invalid(
                format!("{}: disturbances.grounds", self.source),
                "give at least one ground (recording, PSD file, nlnm, nhnm)",
            ));
        }
        super::sweep::ground_labels(&self.grounds)?;
        let mut seen = std::collections::HashSet::new();
        for w in self.wind_cases() {
            if !seen.insert(w.label.clone()) {
                return Err(Error::invalid(format!("wind case '{}'", w.label), "is given twice"));
            }
        }
        for v in &self.variables {
            if let VariableKind::Pads { catalogue } = &v.kind {
                catalogue.at_temperature(self.settings.temperature_c)?;
            }
        }
        Ok(())
    }
}

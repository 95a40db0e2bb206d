//! The isolator sweep.
//!
//! A sweep evaluates every isolator of a [`Catalogue`] (plus the no-pad baseline) under every
//! ground spectrum ([`GroundSource`]) and wind case ([`WindCase`]) and writes one CSV row per
//! combination ([`SWEEP_COLUMNS`]):
//! - order: ground spectra in the given order, then wind cases, then isolators in catalogue
//!   order with `none` first; the order does not depend on thread timing;
//! - `key` = `spec|spectrum|wind`, the unit of `--resume`;
//! - `ratio_to_none` = RMS image motion / that of the baseline for the same spectrum and wind;
//!   `worse_than_none` when the ratio exceeds 1;
//! - a recording that cannot be read gives an `error` row for each of its combinations (the
//!   message naming file and line), so the table keeps every key, and the other inputs finish;
//!   a spec whose model cannot be built gives error rows for its combinations;
//! - [`sweep_rows`] returns the rows in memory at full precision; [`sweep_rows_labelled`] lets
//!   a sweep split into parts (specs × grounds) label its grounds as the whole would, so the
//!   parts' rows are the whole's rows;
//! - rows are computed in parallel (rayon) and handed to an [`AtomicCsvWriter`] in order as soon
//!   as the prefix is complete; `resume` keeps the complete rows of an interrupted run and
//!   computes only the missing keys (error rows count as complete: delete the output to retry).
//!   The final file is byte-identical to an uninterrupted run (same inputs).
//!
//! How pads enter the model: see [`catalogue`] (pad springs in series with their support).
//! `pad_load_n` is the total weight carried by the ground translation (g · r_zᵀ M r_z, r_z the
//! static response to a unit vertical ground motion) shared equally by the compression pads
//! — exact for a symmetric rig, an estimate otherwise; `overloaded` compares it with the
//! isolator's `rated_load_n`.

use super::catalogue::{self, Catalogue, DEFAULT_PAD_PREFIX, Isolator, PadDirection, PadModel, PadSite};
use super::ground::{GroundSource, GroundSpectrum};
use super::gust::gust_family;
use super::ranking::{SweepSummary, Visibility, summarize};
use super::spring_sets::{SpringSets, spring_changes};
use super::sweep_row::{SWEEP_COLUMNS, SweepRow, read_sweep_csv};
use crate::assembly::ModelSpec;
use crate::error::{Error, Result};
use crate::grid::FreqGrid;
use crate::image::ImageOptions;
use crate::io::atomic::{AtomicCsvWriter, completed_keys};
use crate::io::series::SeriesOptions;
use crate::model::Model;
use crate::response::Disturbances;
use crate::schema::ModelFile;
use crate::stiffness::StiffnessModel;
use crate::wind::{Turbulence, WindSpec, WindSpectrum};
use rayon::prelude::*;
use std::collections::{BTreeMap, HashMap, HashSet};
use std::path::{Path, PathBuf};

/// Standard gravity (m/s²), for pad loads.
const G_M_S2: f64 = 9.80665;

/// A named wind case of a sweep.
#[derive(Debug, Clone, PartialEq)]
pub struct WindCase {
    /// Label used in rows and keys.
    pub label: String,
    /// None: calm.
    pub wind: Option<WindSpec>,
}

impl WindCase {
    /// No wind.
    pub fn calm() -> WindCase {
        WindCase { label: "calm".into(), wind: None }
    }

    /// Parse `calm`, or `SPEED[:HEIGHT[:SPECTRUM[:INTENSITY]]]` with the speed in m/s, the height
    /// in m (default 2), the spectrum name (default `kaimal`) and the turbulence intensity
    /// (default 0.2), e.g. `5`, `5:2:von-karman:0.25`.
    pub fn parse(text: &str) -> Result<WindCase> {
        let t = text.trim();
        if t.eq_ignore_ascii_case("calm") || t.eq_ignore_ascii_case("none") {
            return Ok(WindCase::calm());
        }
        let parts: Vec<&str> = t.split(':').collect();
        if parts.len() > 4 {
            return Err(Error::invalid(
                format!("wind case '{text}'"),
                "use calm or SPEED[:HEIGHT[:SPECTRUM[:INTENSITY]]]",
            ));
        }
        let num = |s: &str, what: &str| -> Result<f64> {
            s.trim().parse::<f64>().map_err(|_| {
                Error::invalid(format!("wind case '{text}'"), format!("{what} '{s}' is not a number"))
            })
        };
        let u = num(parts[0], "speed (m/s)")?;
        let z = parts.get(1).map(|s| num(s, "height (m)")).transpose()?.unwrap_or(2.0);
        let kind = parts.get(2).map(|s| WindSpectrum::from_name(s)).transpose()?.unwrap_or_default();
        let i = parts
            .get(3)
            .map(|s| num(s, "turbulence intensity"))
            .transpose()?
            .unwrap_or(crate::wind::DEFAULT_TURBULENCE_INTENSITY);
        WindCase::new(kind, u, z, i)
    }

    /// A wind case from its parts (validated), labelled `U m/s @ z m, spectrum, I`.
    pub fn new(kind: WindSpectrum, speed_m_s: f64, height_m: f64, intensity: f64) -> Result<WindCase> {
        let w = WindSpec::new(kind, speed_m_s, height_m, Turbulence::Intensity(intensity));
        w.validate()?;
        let name = match kind {
            WindSpectrum::Kaimal => "kaimal",
            WindSpectrum::KaimalIec => "kaimal-iec",
            WindSpectrum::VonKarman => "von-karman",
            WindSpectrum::Davenport => "davenport",
        };
        Ok(WindCase { label: format!("{speed_m_s}m/s@{height_m}m {name} I={intensity}"), wind: Some(w) })
    }
}

/// Settings of a sweep.
#[derive(Debug, Clone)]
#[non_exhaustive]
pub struct SweepConfig {
    /// Analysis grid.
    pub grid: FreqGrid,
    /// Prefix of the pad springs in the generic model.
    pub pad_prefix: String,
    /// Per-axis factor on PSD files and reference models (recordings use their own axes).
    pub ground_scale: [f64; 3],
    /// Options of the recording readers.
    pub series: SeriesOptions,
    /// Threads of the sweep's own rayon pool; None: the global pool (all cores). The rows do
    /// not depend on it.
    pub threads: Option<usize>,
    /// When a difference from no pad counts as visible (the summary's verdicts only).
    pub visibility: Visibility,
    /// The night's temperature (°C): pads with a temperature table take their values at it
    /// ([`Isolator::at_temperature`]); the default [`catalogue::NOMINAL_TEMPERATURE_C`] is the
    /// catalogue as written.
    pub temperature_c: f64,
    /// How the image columns are computed; the rows are the same either way (to rounding).
    pub engine: SweepEngine,
}

/// How a sweep computes its rows' image columns (RMS, px, P(outside ½ px)).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum SweepEngine {
    /// The spring-variant engine ([`super::spring_sets`]) for every isolator whose model differs
    /// from the others' only in the stiffness of named springs, one FRF per isolator shared by
    /// all grounds and winds; a model built and solved per row for the rest (e.g. the rig
    /// layer's "none", whose feet stand on the ground with no spring).
    #[default]
    Auto,
    /// A model built and solved per row for every isolator (the reference path).
    Rebuild,
}

impl SweepConfig {
    /// 0.2–100 Hz, 600 log-spaced points (the report's grid, so a row and the report of the
    /// same rig agree), prefix `pad`, ground scale [1, 1, 1].
    pub fn new() -> Result<SweepConfig> {
        Ok(SweepConfig {
            grid: FreqGrid::log(0.2, 100.0, 600)?,
            pad_prefix: DEFAULT_PAD_PREFIX.into(),
            ground_scale: [1.0; 3],
            series: SeriesOptions::default(),
            threads: None,
            visibility: Visibility::default(),
            temperature_c: catalogue::NOMINAL_TEMPERATURE_C,
            engine: SweepEngine::Auto,
        })
    }
    /// Replace the engine of the image columns.
    pub fn with_engine(mut self, engine: SweepEngine) -> Self {
        self.engine = engine;
        self
    }
    /// Replace the temperature (°C).
    pub fn with_temperature_c(mut self, t_c: f64) -> Self {
        self.temperature_c = t_c;
        self
    }
    /// Replace the grid.
    pub fn with_grid(mut self, grid: FreqGrid) -> Self {
        self.grid = grid;
        self
    }
    /// Replace the pad prefix.
    pub fn with_pad_prefix(mut self, prefix: impl Into<String>) -> Self {
        self.pad_prefix = prefix.into();
        self
    }
    /// Replace the ground scale.
    pub fn with_ground_scale(mut self, s: [f64; 3]) -> Self {
        self.ground_scale = s;
        self
    }
    /// Run on a pool of `n` threads (at least 1) instead of the global pool.
    pub fn with_threads(mut self, n: usize) -> Self {
        self.threads = Some(n);
        self
    }
}

/// Progress of a running sweep.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct SweepProgress {
    /// Rows finished (written or kept from a previous run).
    pub done: usize,
    pub total: usize,
}

/// What a sweep did.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepOutcome {
    /// The finished CSV.
    pub path: PathBuf,
    /// All rows of the finished file, in order.
    pub rows: Vec<SweepRow>,
    /// Rows computed in this run.
    pub computed: usize,
    /// Rows kept from an interrupted run.
    pub kept: usize,
    /// Ranked summary.
    pub summary: SweepSummary,
}

impl SweepOutcome {
    /// Error rows (failed inputs).
    pub fn failures(&self) -> Vec<&SweepRow> {
        self.rows.iter().filter(|r| r.is_error()).collect()
    }
}

/// How isolators enter the model: the rig layer's `[pads]`, or generic pad springs.
#[derive(Debug, Clone)]
pub enum PadMechanism {
    /// A rig file with a `[tripod]`: each spec sets `[pads]` (compression and shear per pad);
    /// the baseline removes the section (the feet stand on the `[ground]` as given).
    Rig { file: Box<ModelFile>, n_pads: usize },
    /// A generic-layer model with pad springs in series with their support ([`catalogue`]).
    Generic { spec: Box<ModelSpec>, sites: Vec<PadSite> },
}

impl PadMechanism {
    /// Choose the mechanism for a model file: the rig layer when it has a `[tripod]`, else the
    /// generic pad springs named `prefix*`.
    pub fn for_file(file: &ModelFile, prefix: &str) -> Result<PadMechanism> {
        if let Some(t) = &file.rig.tripod {
            let n_pads = t.legs.unwrap_or(3);
            return Ok(PadMechanism::Rig { file: Box::new(file.clone()), n_pads });
        }
        if file.rig.pier.is_some() && file.generic.springs.iter().all(|s| !s.name.starts_with(prefix)) {
            return Err(Error::invalid(
                "model",
                "pads go under tripod feet; this rig has no [tripod] (and no generic pad springs)",
            ));
        }
        let spec = file.expanded()?;
        let sites = catalogue::pad_sites(&spec, prefix)?;
        Ok(PadMechanism::Generic { spec: Box::new(spec), sites })
    }

    /// The generic model with `iso` in place of the pads (or none).
    pub fn spec_with(&self, iso: &Isolator) -> Result<ModelSpec> {
        match self {
            PadMechanism::Generic { spec, sites } => catalogue::apply_isolator(spec, sites, iso),
            PadMechanism::Rig { file, .. } => {
                let mut f = (**file).clone();
                f.rig.pads =
                    match (iso.stiffness(PadDirection::Compression), iso.stiffness(PadDirection::Shear)) {
                        (Some(c), Some(s)) => Some(crate::rig::PadSpec {
                            compression: Some(crate::assembly::StiffnessSpec::from_model(&c, false)),
                            shear: Some(crate::assembly::StiffnessSpec::from_model(&s, false)),
                        }),
                        _ => None,
                    };
                f.expanded()
            }
        }
    }

    /// Number of pads carrying the weight (one per foot).
    pub fn compression_pads(&self) -> usize {
        match self {
            PadMechanism::Rig { n_pads, .. } => *n_pads,
            PadMechanism::Generic { sites, .. } => {
                sites.iter().filter(|s| s.direction == PadDirection::Compression).count()
            }
        }
    }

    /// True when the model takes wind: a `[wind]` section, or wind parts derived by the rig.
    fn has_wind(&self) -> bool {
        match self {
            PadMechanism::Rig { file, .. } => file.expanded().is_ok_and(|s| s.wind.is_some()),
            PadMechanism::Generic { spec, .. } => spec.wind.is_some(),
        }
    }
}

/// Alternative rigs for the report's gust comparison: without pads when the model has them
/// (rig `[pads]`, or generic springs named `prefix*`), and each pad of `catalogue` (its "none"
/// entry only when the model has pads). Labels are the isolator names ("none" reads "without
/// pads").
pub fn pad_alternatives(
    file: &ModelFile,
    catalogue: Option<&Catalogue>,
    prefix: &str,
) -> Result<Vec<(String, ModelSpec)>> {
    let has_pads = match &file.rig.tripod {
        Some(_) => file.rig.pads.is_some(),
        None => file.generic.springs.iter().any(|s| s.name.starts_with(prefix)),
    };
    if !has_pads && catalogue.is_none() {
        return Ok(Vec::new());
    }
    let mech = PadMechanism::for_file(file, prefix)?;
    let mut out = Vec::new();
    if has_pads {
        out.push(("without pads".to_string(), mech.spec_with(&Isolator::none())?));
    }
    for iso in catalogue.map(|c| c.isolators.as_slice()).unwrap_or_default() {
        if !iso.is_none() {
            out.push((iso.name.clone(), mech.spec_with(iso)?));
        }
    }
    Ok(out)
}

/// A built spec: its model (or why it failed), first mode and pad load.
struct BuiltSpec {
    /// The generic spec the model was built from (None when it could not be made).
    spec: Option<ModelSpec>,
    model: std::result::Result<Model, String>,
    first_mode: (f64, f64),
    pad_load_n: f64,
}

fn build_spec(mech: &PadMechanism, iso: &Isolator) -> BuiltSpec {
    let fail = |e: Error| BuiltSpec {
        spec: None,
        model: Err(format!("isolator '{}': {e}", iso.name)),
        first_mode: (f64::NAN, f64::NAN),
        pad_load_n: f64::NAN,
    };
    let spec = match mech.spec_with(iso) {
        Ok(s) => s,
        Err(e) => return fail(e),
    };
    let model = match Model::from_spec(&spec) {
        Ok(m) => m,
        Err(e) => return fail(e),
    };
    let modes = match model.modes() {
        Ok(m) => m,
        Err(e) => return fail(e),
    };
    let first = modes.first();
    let n_comp = mech.compression_pads();
    let load = match model.static_influence() {
        Ok(r) if n_comp > 0 => {
            let n = model.dof_count();
            let rz = &r[2 * n..3 * n];
            let mut mass = 0.0;
            for a in 0..n {
                for b in 0..n {
                    mass += rz[a] * model.m_ff[a + b * n] * rz[b];
                }
            }
            G_M_S2 * mass / n_comp as f64
        }
        _ => f64::NAN,
    };
    BuiltSpec { spec: Some(spec), model: Ok(model), first_mode: first, pad_load_n: load }
}

/// Two reference pads (invented values, not catalogue entries) that fix the engine's base
/// model and its replaced springs: the springs that differ between them are the pad springs.
fn reference_pads() -> [Isolator; 2] {
    let pad = |name: &str, model: PadModel, damping: Option<f64>| Isolator {
        name: name.into(),
        model,
        compression_n_per_m: Some(1.0e6),
        shear_n_per_m: Some(3.0e5),
        loss_factor: Some(0.1),
        compression_damping_ns_per_m: damping,
        shear_damping_ns_per_m: damping,
        dynamic_ratio: None,
        tau_s: None,
        rated_load_n: None,
        description: None,
        temperature: None,
    };
    [pad("reference a", PadModel::Hysteretic, None), pad("reference b", PadModel::KelvinVoigt, Some(500.0))]
}

/// The spring-variant engine's base for a pad mechanism: the model with the first reference pad
/// and the names of the pad springs. It comes from the mechanism alone ([`reference_pads`]),
/// never from a catalogue, so a row does not depend on which other isolators share the run (a
/// sweep or study split into parts gives the whole's rows, bit for bit).
pub(crate) struct PadEngine {
    spec: ModelSpec,
    pub(crate) model: Model,
    pub(crate) names: Vec<String>,
    base_models: Vec<StiffnessModel>,
}

impl PadEngine {
    /// None when the mechanism has no pad springs the engine can replace.
    pub(crate) fn new(mech: &PadMechanism) -> Option<PadEngine> {
        let [ra, rb] = reference_pads();
        let (Ok(spec), Ok(other)) = (mech.spec_with(&ra), mech.spec_with(&rb)) else {
            return None;
        };
        let names: Vec<String> = spring_changes(&spec, &other)?.into_iter().map(|(n, _)| n).collect();
        if names.is_empty() {
            return None;
        }
        let model = Model::from_spec(&spec).ok()?;
        let refs: Vec<&str> = names.iter().map(String::as_str).collect();
        let base_models = SpringSets::new(&model, &refs).ok()?.base_models();
        Some(PadEngine { spec, model, names, base_models })
    }

    /// The replacement set (one stiffness model per pad spring, in `names` order) of a spec
    /// that differs from the base only in pad springs; None when it needs a model of its own.
    pub(crate) fn set_of(&self, spec: &ModelSpec) -> Option<Vec<StiffnessModel>> {
        let changes = spring_changes(&self.spec, spec)?;
        let mut set = self.base_models.clone();
        for (nm, m) in changes {
            set[self.names.iter().position(|x| *x == nm)?] = m;
        }
        Some(set)
    }

    /// The site's phase velocity of the base model's ground waves, if any.
    pub(crate) fn site_phase_velocity(&self) -> Option<f64> {
        self.spec.ground_waves.as_ref().map(|w| w.phase_velocity_m_s)
    }

    /// Image (RMS arcsec, RMS px, P(outside ½ px)) of every set under every disturbance,
    /// indexed `[set][disturbance]`; None when the engine fails as a whole.
    pub(crate) fn images(
        &self,
        grid: &FreqGrid,
        sets: &[Vec<StiffnessModel>],
        dist: &[Disturbances],
    ) -> Option<Vec<Vec<Evaluated>>> {
        let refs: Vec<&str> = self.names.iter().map(String::as_str).collect();
        let plan = SpringSets::new(&self.model, &refs).ok()?;
        let radius_px = ImageOptions::default().radius_px.unwrap_or(0.5);
        let stats = plan.image_stats(grid, sets, dist, radius_px).ok()?;
        Some(
            stats
                .into_iter()
                .map(|per| {
                    per.into_iter()
                        .map(|r| r.map(|s| (s.rms_arcsec, s.rms_px, s.p_outside)).map_err(|e| e.to_string()))
                        .collect()
                })
                .collect(),
        )
    }
}

/// The image columns of every (isolator, ground, wind) whose isolator only replaces the pad
/// springs, by the spring-variant engine ([`PadEngine`]): one FRF per isolator shared by every
/// ground and wind. The isolators left out (a model of their own, as the rig layer's "none"; or
/// none could be built) are evaluated per row; an engine failure as a whole leaves every row to
/// that path.
fn spring_set_rows(
    mech: &PadMechanism,
    catalogue: &Catalogue,
    built: &[BuiltSpec],
    spectra: &[std::result::Result<GroundSpectrum, String>],
    winds: &[WindCase],
    grid: &FreqGrid,
) -> HashMap<(usize, usize, usize), Evaluated> {
    let mut out = HashMap::new();
    let Some(engine) = PadEngine::new(mech) else {
        return out;
    };
    let mut members = Vec::new();
    let mut sets = Vec::new();
    for (si, b) in built.iter().enumerate() {
        if let (Some(spec), Ok(_)) = (&b.spec, &b.model)
            && let Some(set) = engine.set_of(spec)
        {
            members.push(si);
            sets.push(set);
        }
    }
    if members.is_empty() {
        return out;
    }
    let mut cases = Vec::new();
    let mut dist = Vec::new();
    for (gi, s) in spectra.iter().enumerate() {
        let Ok(g) = s else { continue };
        for (wi, w) in winds.iter().enumerate() {
            cases.push((gi, wi));
            dist.push(Disturbances {
                ground: g.axes.clone(),
                wind: w.wind.clone(),
                loads: Vec::new(),
                ground_waves: None,
            });
        }
    }
    let Some(stats) = engine.images(grid, &sets, &dist) else {
        return out;
    };
    for (si, per_case) in members.iter().zip(stats) {
        let name = &catalogue.isolators[*si].name;
        for (&(gi, wi), r) in cases.iter().zip(per_case) {
            out.insert((*si, gi, wi), r.map_err(|e| format!("isolator '{name}': {e}")));
        }
    }
    out
}

/// One (spectrum, wind, isolator) combination.
struct Job {
    ground: usize,
    wind: usize,
    spec: usize,
    key: String,
}

/// RMS arcsec, RMS px and P(outside ½ px) of one combination, or why it failed.
pub(crate) type Evaluated = std::result::Result<(f64, f64, f64), String>;

fn evaluate(
    built: &BuiltSpec,
    iso: &Isolator,
    ground: &GroundSpectrum,
    wind: &WindCase,
    grid: &FreqGrid,
) -> Evaluated {
    let model = built.model.as_ref().map_err(Clone::clone)?;
    let d = Disturbances {
        ground: ground.axes.clone(),
        wind: wind.wind.clone(),
        loads: Vec::new(),
        ground_waves: None,
    };
    let opts = ImageOptions { skip_mode_shares: true, ..ImageOptions::default() };
    let im = model.image_motion(grid, &d, &opts).map_err(|e| format!("isolator '{}': {e}", iso.name))?;
    Ok((im.rms_arcsec, im.rms_px, im.p_outside))
}

/// What a sweep combines.
#[derive(Debug, Clone, Copy)]
pub struct SweepInputs<'a> {
    /// The model file: a rig with a `[tripod]`, or a generic layer with pad springs.
    pub model: &'a ModelFile,
    pub catalogue: &'a Catalogue,
    pub grounds: &'a [GroundSource],
    /// Wind cases; empty means one calm case.
    pub winds: &'a [WindCase],
}

/// The labels of ground sources in rows and keys: the file stem (or the reference model's name),
/// or the whole path where stems collide. Refuses labels with `|` or line breaks and an input
/// given twice.
pub fn ground_labels(grounds: &[GroundSource]) -> Result<Vec<String>> {
    let stems: Vec<String> = grounds.iter().map(GroundSource::label).collect();
    // Collisions are counted on the stems, so one input given twice stays a duplicate.
    let labels: Vec<String> = stems
        .iter()
        .zip(grounds)
        .map(|(s, g)| match g.path() {
            Some(p) if stems.iter().filter(|x| *x == s).count() > 1 => p.display().to_string(),
            _ => s.clone(),
        })
        .collect();
    check_labels(&labels, grounds.len())?;
    Ok(labels)
}

fn check_labels(labels: &[String], n_grounds: usize) -> Result<()> {
    if labels.len() != n_grounds {
        return Err(Error::shape("ground labels", n_grounds, labels.len()));
    }
    if let Some(l) = labels.iter().find(|l| l.contains('|') || l.contains(['\n', '\r'])) {
        return Err(Error::invalid(format!("ground '{l}'"), "names may not contain '|' or line breaks"));
    }
    if labels.iter().collect::<HashSet<_>>().len() != labels.len() {
        return Err(Error::invalid("ground", "the same input is given twice"));
    }
    Ok(())
}

/// Check what a sweep needs before any ground is read: the pad mechanism of the model, a
/// `[wind]` section when a wind case blows, no wind case twice. Returns the mechanism and the
/// wind cases (one calm case when none is given).
fn prepare(inputs: &SweepInputs<'_>, cfg: &SweepConfig) -> Result<(PadMechanism, Vec<WindCase>)> {
    if inputs.grounds.is_empty() {
        return Err(Error::invalid(
            "ground",
            "give at least one ground spectrum (recording, PSD file, nlnm, nhnm)",
        ));
    }
    let winds: Vec<WindCase> =
        if inputs.winds.is_empty() { vec![WindCase::calm()] } else { inputs.winds.to_vec() };
    let mech = PadMechanism::for_file(inputs.model, &cfg.pad_prefix)?;
    if winds.iter().any(|w| w.wind.is_some()) && !mech.has_wind() {
        return Err(Error::invalid(
            "wind",
            "the model has no [wind] section (load point, area, drag coefficient)",
        ));
    }
    let mut seen = HashSet::new();
    for w in &winds {
        if !seen.insert(w.label.clone()) {
            return Err(Error::invalid(format!("wind case '{}'", w.label), "is given twice"));
        }
    }
    if cfg.threads == Some(0) {
        return Err(Error::invalid("threads", "must be at least 1"));
    }
    inputs.catalogue.at_temperature(cfg.temperature_c)?;
    Ok((mech, winds))
}

/// Check a sweep's inputs without reading any ground or building any model: what
/// [`sweep_rows`] refuses before it starts (a recording that cannot be read is an error row,
/// not an error).
pub fn check_sweep(inputs: &SweepInputs<'_>, cfg: &SweepConfig) -> Result<()> {
    prepare(inputs, cfg)?;
    ground_labels(inputs.grounds).map(|_| ())
}

/// Everything the rows of a sweep are made from, computed once; row `i` is then independent.
struct PreparedSweep<'a> {
    /// The catalogue at the sweep's temperature.
    catalogue: Catalogue,
    winds: Vec<WindCase>,
    labels: Vec<String>,
    grid: &'a FreqGrid,
    built: Vec<BuiltSpec>,
    spectra: Vec<std::result::Result<GroundSpectrum, String>>,
    /// Rows in their fixed order: ground, then wind, then isolator.
    jobs: Vec<Job>,
    base_idx: usize,
    baselines: BTreeMap<(usize, usize), Evaluated>,
    gusts: BTreeMap<(usize, usize), (f64, f64)>,
    /// Image columns by the spring-variant engine, per (isolator, ground, wind).
    fast: HashMap<(usize, usize, usize), Evaluated>,
}

impl<'a> PreparedSweep<'a> {
    fn new(inputs: &SweepInputs<'a>, labels: &[String], cfg: &'a SweepConfig) -> Result<PreparedSweep<'a>> {
        let (mech, winds) = prepare(inputs, cfg)?;
        check_labels(labels, inputs.grounds.len())?;
        let catalogue = inputs.catalogue.at_temperature(cfg.temperature_c)?;
        let built: Vec<BuiltSpec> =
            catalogue.isolators.par_iter().map(|iso| build_spec(&mech, iso)).collect();
        let spectra: Vec<std::result::Result<GroundSpectrum, String>> = inputs
            .grounds
            .par_iter()
            .zip(labels.par_iter())
            .map(|(g, l)| {
                g.load(&cfg.grid, cfg.ground_scale, &cfg.series)
                    .map(|mut s| {
                        s.label = l.clone();
                        s
                    })
                    .map_err(|e| e.to_string())
            })
            .collect();
        let fast = match cfg.engine {
            SweepEngine::Auto => spring_set_rows(&mech, &catalogue, &built, &spectra, &winds, &cfg.grid),
            SweepEngine::Rebuild => HashMap::new(),
        };
        let mut jobs = Vec::new();
        for (gi, label) in labels.iter().enumerate() {
            for (wi, w) in winds.iter().enumerate() {
                for (si, iso) in catalogue.isolators.iter().enumerate() {
                    let key = SweepRow::key_of(&iso.name, label, &w.label);
                    jobs.push(Job { ground: gi, wind: wi, spec: si, key });
                }
            }
        }
        // Baselines (always computed: every row needs them for the ratio).
        let base_idx = catalogue.isolators.iter().position(Isolator::is_none).unwrap_or(0);
        let baselines: BTreeMap<(usize, usize), Evaluated> = spectra
            .iter()
            .enumerate()
            .filter_map(|(gi, s)| s.as_ref().ok().map(|s| (gi, s)))
            .flat_map(|(gi, s)| (0..winds.len()).map(move |wi| (gi, wi, s)))
            .collect::<Vec<_>>()
            .into_par_iter()
            .map(|(gi, wi, s)| {
                let iso = &catalogue.isolators[base_idx];
                let r = match fast.get(&(base_idx, gi, wi)) {
                    Some(r) => r.clone(),
                    None => evaluate(&built[base_idx], iso, s, &winds[wi], &cfg.grid),
                };
                ((gi, wi), r)
            })
            .collect();
        // Design gusts per (isolator, wind case): they do not depend on the ground.
        let gust_jobs: Vec<(usize, usize)> = (0..catalogue.isolators.len())
            .flat_map(|si| (0..winds.len()).map(move |wi| (si, wi)))
            .filter(|&(_, wi)| winds[wi].wind.is_some())
            .collect();
        let gusts: BTreeMap<(usize, usize), (f64, f64)> = gust_jobs
            .into_par_iter()
            .filter_map(|(si, wi)| {
                let m = built[si].model.as_ref().ok()?;
                let w = winds[wi].wind.as_ref()?;
                gust_family(m, w).ok().map(|g| ((si, wi), (g.worst_peak_px(), g.worst_ringdown_s())))
            })
            .collect();
        Ok(PreparedSweep {
            catalogue,
            winds,
            labels: labels.to_vec(),
            grid: &cfg.grid,
            built,
            spectra,
            jobs,
            base_idx,
            baselines,
            gusts,
            fast,
        })
    }

    fn len(&self) -> usize {
        self.jobs.len()
    }

    fn row(&self, i: usize) -> SweepRow {
        let Some(j) = self.jobs.get(i) else {
            return SweepRow::failed("*", "*", "*", "internal: missing job".into());
        };
        let iso = &self.catalogue.isolators[j.spec];
        let (spec_l, spec_s, wind_l) = (&iso.name, &self.labels[j.ground], &self.winds[j.wind].label);
        let ground = match &self.spectra[j.ground] {
            Ok(g) => g,
            Err(e) => return SweepRow::failed(spec_l, spec_s, wind_l, e.clone()),
        };
        let b = &self.built[j.spec];
        let key = (j.ground, j.wind);
        let res = if j.spec == self.base_idx {
            self.baselines.get(&key).cloned().unwrap_or_else(|| Err("baseline missing".into()))
        } else if let Some(r) = self.fast.get(&(j.spec, j.ground, j.wind)) {
            r.clone()
        } else {
            evaluate(b, iso, ground, &self.winds[j.wind], self.grid)
        };
        match res {
            Err(e) => SweepRow::failed(spec_l, spec_s, wind_l, e),
            Ok((rms_arcsec, rms_px, p)) => {
                let base = self.baselines.get(&key).and_then(|r| r.as_ref().ok()).map(|r| r.0);
                let ratio = base.map_or(f64::NAN, |b0| if b0 > 0.0 { rms_arcsec / b0 } else { f64::NAN });
                let gust = self.gusts.get(&(j.spec, j.wind));
                SweepRow {
                    key: j.key.clone(),
                    spec: spec_l.clone(),
                    spectrum: spec_s.clone(),
                    wind: wind_l.clone(),
                    error: None,
                    rms_arcsec,
                    rms_px,
                    p_outside_half_px: p,
                    first_mode_hz: b.first_mode.0,
                    first_mode_zeta: b.first_mode.1,
                    ratio_to_none: ratio,
                    worse_than_none: ratio > 1.0,
                    pad_load_n: if iso.is_none() { f64::NAN } else { b.pad_load_n },
                    overloaded: iso
                        .rated_load_n
                        .filter(|_| b.pad_load_n.is_finite())
                        .map(|r| b.pad_load_n > r),
                    gust_peak_px: gust.map_or(f64::NAN, |g| g.0),
                    gust_ringdown_s: gust.map_or(f64::NAN, |g| g.1),
                }
            }
        }
    }
}

/// Run `f` on a rayon pool of `threads` threads, or on the global pool.
pub(crate) fn in_pool<T: Send>(threads: Option<usize>, f: impl FnOnce() -> Result<T> + Send) -> Result<T> {
    match threads {
        None => f(),
        Some(n) => rayon::ThreadPoolBuilder::new()
            .num_threads(n)
            .build()
            .map_err(|e| Error::invalid("threads", format!("cannot start {n} threads: {e}")))?
            .install(f),
    }
}

/// The rows of a sweep of catalogue × grounds × winds, in memory and at full precision, in the
/// order of the module docs; the same rows [`run_sweep`] writes (its file rounds numbers to six
/// significant digits). Labels come from [`ground_labels`].
pub fn sweep_rows(inputs: &SweepInputs<'_>, cfg: &SweepConfig) -> Result<Vec<SweepRow>> {
    let labels = ground_labels(inputs.grounds)?;
    sweep_rows_labelled(inputs, &labels, cfg)
}

/// [`sweep_rows`] with the ground labels given (one per ground, unique): a sweep split into
/// parts (e.g. over machines) labels every part's grounds as the whole sweep would.
pub fn sweep_rows_labelled(
    inputs: &SweepInputs<'_>,
    labels: &[String],
    cfg: &SweepConfig,
) -> Result<Vec<SweepRow>> {
    in_pool(cfg.threads, || {
        let plan = PreparedSweep::new(inputs, labels, cfg)?;
        Ok((0..plan.len()).into_par_iter().map(|i| plan.row(i)).collect())
    })
}

/// A sweep table as the CSV text [`run_sweep`] writes (header and rows, `\n` line ends).
pub fn sweep_csv_text(rows: &[SweepRow]) -> Result<String> {
    let what = Path::new("sweep table");
    let mut out = crate::io::atomic::encode_row(&SWEEP_COLUMNS, what)?;
    for r in rows {
        out.extend(crate::io::atomic::encode_row(&r.fields(), what)?);
    }
    String::from_utf8(out).map_err(|e| Error::invalid("sweep table", e.to_string()))
}

/// Run a sweep of catalogue × grounds × winds, writing `out` (see the module docs); with
/// `resume`, continue an interrupted output. `progress` is called after every finished row.
pub fn run_sweep(
    inputs: &SweepInputs<'_>,
    cfg: &SweepConfig,
    out: &Path,
    resume: bool,
    progress: &(dyn Fn(SweepProgress) + Sync),
) -> Result<SweepOutcome> {
    let labels = ground_labels(inputs.grounds)?;
    prepare(inputs, cfg)?;
    let done_keys = if resume { completed_keys(out, "key")? } else { HashSet::new() };
    in_pool(cfg.threads, || {
        let plan = PreparedSweep::new(inputs, &labels, cfg)?;
        let total = plan.len();
        let header: Vec<&str> = SWEEP_COLUMNS.to_vec();
        let mut writer = if resume {
            AtomicCsvWriter::resume(out, &header)?
        } else {
            AtomicCsvWriter::create(out, &header)?
        };
        let kept = writer.rows();
        let todo: Vec<usize> = (0..total).filter(|&i| !done_keys.contains(&plan.jobs[i].key)).collect();
        let mut done = total - todo.len();
        progress(SweepProgress { done, total });
        writer.write_in_order(&todo, &|i| vec![plan.row(i)], SweepRow::fields, |n| {
            done += n;
            progress(SweepProgress { done, total });
        })?;
        let path = writer.finish()?;
        let rows = read_sweep_csv(&path)?;
        let summary = summarize(&rows, &cfg.visibility);
        Ok(SweepOutcome { path, computed: todo.len(), kept, rows, summary })
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::batch::{SWEEP_ROW, SweepValue};
    use crate::schema::ModelFile;
    use crate::spectrum::{Psd, Quantity};

    const MODEL: &str = include_str!("../../../docs/examples/tripod-paver-generic.toml");
    const CATALOGUE: &str = include_str!("../../../docs/examples/isolators.toml");
    const COLD_CATALOGUE: &str = include_str!("../../../docs/examples/isolators-cold.toml");

    fn tmpdir(tag: &str) -> PathBuf {
        let d = std::env::temp_dir().join(format!("stillsky-batch-{tag}-{}", std::process::id()));
        std::fs::create_dir_all(&d).unwrap();
        d
    }

    fn flat_psd_file(dir: &Path, level: f64) -> PathBuf {
        let grid = FreqGrid::log(0.2, 100.0, 200).unwrap();
        let p = Psd::on_grid(&grid, vec![level; grid.len()], Quantity::Acceleration).unwrap();
        let path = dir.join("flat.csv");
        std::fs::write(&path, p.to_csv_string()).unwrap();
        path
    }

    fn file() -> ModelFile {
        ModelFile::parse(MODEL, "tripod-paver-generic.toml").unwrap()
    }

    fn spec() -> ModelSpec {
        file().expanded().unwrap()
    }

    #[test]
    fn none_removes_the_pad_and_keeps_the_support() {
        let s = spec();
        let sites = catalogue::pad_sites(&s, "pad").unwrap();
        assert_eq!(sites.len(), 9);
        assert_eq!(sites.iter().filter(|x| x.direction == PadDirection::Compression).count(), 3);
        let bare = catalogue::apply_isolator(&s, &sites, &Isolator::none()).unwrap();
        let k = bare.springs[sites[0].spring].stiffness().to_model("k", false).unwrap();
        // Only the paver contact remains: 1e8 N/m with loss 0.05 (the model file).
        assert_eq!(k, crate::stiffness::StiffnessModel::Hysteretic { k: 1.0e8, loss_factor: 0.05 });
        // A pad in series: k = 1/(1/k_pad + 1/k_paver) (elementary mechanics).
        let cat = Catalogue::parse(CATALOGUE, "isolators.toml").unwrap();
        let soft = &cat.isolators[1];
        let padded = catalogue::apply_isolator(&s, &sites, soft).unwrap();
        let k = padded.springs[sites[0].spring].stiffness().to_model("k", false).unwrap();
        let (kp, ks) =
            (crate::Complex64::new(2.0e5, 0.4 * 2.0e5), crate::Complex64::new(1.0e8, 0.05 * 1.0e8));
        let want = 1.0 / (1.0 / kp + 1.0 / ks);
        assert!((k.at(3.0) - want).norm() / want.norm() < 1e-12);
    }

    #[test]
    fn a_cold_sweep_uses_the_interpolated_pad_stiffness() {
        // The demo's cold-elastomer pad at -15 °C: halfway between its -20 and -10 °C rows,
        // stiffness factor (3.5 + 2.2) / 2 = 2.85 and loss factor 0.2 (1.8 + 1.5) / 2 = 0.33.
        let cat = Catalogue::parse(COLD_CATALOGUE, "isolators-cold.toml").unwrap();
        let s = file();
        let grounds = [GroundSource::Reference(crate::spectrum::ReferenceGround::Nhnm)];
        let run = |c: &Catalogue, t: f64| {
            let inputs = SweepInputs { model: &s, catalogue: c, grounds: &grounds, winds: &[] };
            sweep_rows(&inputs, &SweepConfig::new().unwrap().with_temperature_c(t)).unwrap()
        };
        let cold = run(&cat, -15.0);
        let warm = run(&cat, 20.0);
        let mut by_hand = cat.clone();
        let pad = by_hand.isolators.iter_mut().find(|i| i.name == "cold-elastomer").unwrap();
        pad.compression_n_per_m = Some(4.0e5 * 2.85);
        pad.shear_n_per_m = Some(1.0e5 * 2.85);
        pad.loss_factor = Some(0.2 * 1.65);
        pad.temperature = None;
        let hand = run(&by_hand, 20.0);
        let row = |rows: &[SweepRow], n: &str| rows.iter().find(|r| r.spec == n).unwrap().clone();
        // Away from 20 °C the row names the temperature (a resumed sweep at another one recomputes it).
        assert!(!cold.iter().any(|r| r.spec == "cold-elastomer"));
        let (c, h, w) = (
            row(&cold, "cold-elastomer at -15 °C"),
            row(&hand, "cold-elastomer"),
            row(&warm, "cold-elastomer"),
        );
        assert!(c.error.is_none(), "{:?}", c.error);
        assert!((c.first_mode_hz / h.first_mode_hz - 1.0).abs() < 1e-9);
        assert!((c.rms_arcsec / h.rms_arcsec - 1.0).abs() < 1e-9);
        // Stiffer in the cold: the first mode rises (a softer-pad rig's lowest mode is the pad's).
        assert!(c.first_mode_hz > w.first_mode_hz * 1.2, "{} vs {}", c.first_mode_hz, w.first_mode_hz);
        // The baseline (no pad, no table) is the same at any temperature.
        assert_eq!(row(&cold, "none").rms_arcsec, row(&warm, "none").rms_arcsec);
        // Outside the pad's table (-30..40 °C): the sweep is refused before it starts.
        let inputs = SweepInputs { model: &s, catalogue: &cat, grounds: &grounds, winds: &[] };
        let e = check_sweep(&inputs, &SweepConfig::new().unwrap().with_temperature_c(-40.0)).unwrap_err();
        assert!(matches!(e, Error::OutOfRange { .. }), "{e}");
    }

    #[test]
    fn pad_springs_must_be_series_chains() {
        let mut s = spec();
        s.springs[0].series = None;
        s.springs[0].stiffness_n_per_m = Some(1e6);
        let e = catalogue::pad_sites(&s, "pad").unwrap_err().to_string();
        assert!(e.contains("pad_foot1_z") && e.contains("series"), "{e}");
        let e = catalogue::pad_sites(&spec(), "isolator").unwrap_err().to_string();
        assert!(e.contains("no pad springs"), "{e}");
    }

    #[test]
    fn soft_pad_in_series_raises_image_motion_on_a_hard_paver() {
        // Common practice, no source: a soft spring in series with a stiff support dominates
        // the stiffness, lowering the rig's modes into stronger ground motion.
        let dir = tmpdir("series");
        let g = flat_psd_file(&dir, 1e-9);
        let cat = Catalogue::parse(CATALOGUE, "isolators.toml").unwrap();
        let s = file();
        let inputs =
            SweepInputs { model: &s, catalogue: &cat, grounds: &[GroundSource::PsdFile(g)], winds: &[] };
        let out = dir.join("rows.csv");
        let r = run_sweep(&inputs, &SweepConfig::new().unwrap(), &out, false, &|_| {}).unwrap();
        assert_eq!(r.rows.len(), cat.isolators.len());
        let row = |n: &str| r.rows.iter().find(|x| x.spec == n).unwrap();
        assert_eq!(row("none").ratio_to_none, 1.0);
        assert!(row("soft-elastomer").rms_arcsec > row("none").rms_arcsec);
        assert!(row("soft-elastomer").worse_than_none);
        assert!(row("soft-elastomer").first_mode_hz < row("none").first_mode_hz);
        // This flat PSD moves the image by less than 0.1 px with or without the pad: the
        // ranking reads "no visible difference"; with a finer visibility level it reads worse.
        let soft = |s: &SweepSummary| {
            s.per_wind[0].entries.iter().find(|e| e.spec == "soft-elastomer").unwrap().clone()
        };
        let e = soft(&r.summary);
        assert!(e.mean_rms_px < 0.1, "{}", e.mean_rms_px);
        assert_eq!(e.verdict, crate::batch::Verdict::NoVisibleDifference);
        let fine = summarize(&r.rows, &Visibility { rms_px: 0.01, p_outside: 0.01 });
        assert_eq!(soft(&fine).verdict, crate::batch::Verdict::Worse);
    }

    #[test]
    fn resume_after_torn_tail_equals_uninterrupted_run() {
        let dir = tmpdir("resume");
        let g = flat_psd_file(&dir, 1e-9);
        let cat = Catalogue::parse(CATALOGUE, "isolators.toml").unwrap();
        let s = file();
        let winds = [WindCase::calm(), WindCase::parse("4").unwrap()];
        let grounds =
            [GroundSource::PsdFile(g), GroundSource::Reference(crate::spectrum::ReferenceGround::Nlnm)];
        let inputs = SweepInputs { model: &s, catalogue: &cat, grounds: &grounds, winds: &winds };
        let cfg = SweepConfig::new().unwrap();
        let full = dir.join("full.csv");
        run_sweep(&inputs, &cfg, &full, false, &|_| {}).unwrap();
        let text = std::fs::read_to_string(&full).unwrap();
        let lines: Vec<&str> = text.lines().collect();
        assert_eq!(lines.len(), 1 + 2 * 2 * cat.isolators.len());
        // An interrupted run: header + 7 complete rows + half a row.
        let part = dir.join("part.csv");
        let torn = format!("{}\n{}", lines[..8].join("\n"), &lines[8][..lines[8].len() / 2]);
        std::fs::write(crate::io::atomic::partial_path(&part), torn).unwrap();
        let r = run_sweep(&inputs, &cfg, &part, true, &|_| {}).unwrap();
        assert_eq!(r.kept, 7);
        assert_eq!(r.computed, lines.len() - 1 - 7);
        assert_eq!(std::fs::read_to_string(&part).unwrap(), text);
    }

    #[test]
    fn bad_recording_is_an_error_row_and_the_rest_finish() {
        let dir = tmpdir("bad");
        let g = flat_psd_file(&dir, 1e-9);
        let bad = dir.join("broken.csv");
        std::fs::write(&bad, "# fs_hz=100\nz_m_s2\n0.1\n0.2\nabc\n").unwrap();
        let cat = Catalogue::parse(CATALOGUE, "isolators.toml").unwrap();
        let s = file();
        let grounds = [GroundSource::Recording(bad), GroundSource::PsdFile(g)];
        let inputs = SweepInputs { model: &s, catalogue: &cat, grounds: &grounds, winds: &[] };
        let r = run_sweep(&inputs, &SweepConfig::new().unwrap(), &dir.join("o.csv"), false, &|_| {}).unwrap();
        let n = cat.isolators.len();
        assert_eq!(r.rows.len(), 2 * n);
        // One error row per spec of the bad recording, each with its key.
        for (e, iso) in r.rows[..n].iter().zip(&cat.isolators) {
            assert!(e.is_error());
            assert_eq!(e.key, format!("{}|broken|calm", iso.name));
            let msg = e.error.as_ref().unwrap();
            assert!(msg.contains("broken.csv") && msg.contains("line 5"), "{msg}");
        }
        assert_eq!(r.failures().len(), n);
        assert!(r.rows[n..].iter().all(|x| !x.is_error()));
    }

    #[test]
    fn rows_in_memory_and_in_parts_are_the_file_rows() {
        let dir = tmpdir("parts");
        let g = flat_psd_file(&dir, 1e-9);
        let bad = dir.join("broken.csv");
        std::fs::write(&bad, "# fs_hz=100\nz_m_s2\n0.1\nabc\n").unwrap();
        let cat = Catalogue::parse(CATALOGUE, "isolators.toml").unwrap();
        let s = file();
        let winds = [WindCase::calm(), WindCase::parse("4").unwrap()];
        let grounds = [
            GroundSource::PsdFile(g),
            GroundSource::Recording(bad),
            GroundSource::Reference(crate::spectrum::ReferenceGround::Nhnm),
        ];
        let inputs = SweepInputs { model: &s, catalogue: &cat, grounds: &grounds, winds: &winds };
        let cfg = SweepConfig::new().unwrap().with_grid(FreqGrid::log(1.0, 60.0, 60).unwrap());
        let whole = sweep_rows(&inputs, &cfg).unwrap();
        // The file holds the same rows, to six significant digits.
        let out = dir.join("file.csv");
        let r = run_sweep(&inputs, &cfg, &out, false, &|_| {}).unwrap();
        assert_eq!(sweep_csv_text(&whole).unwrap(), std::fs::read_to_string(&out).unwrap());
        assert_eq!(r.rows.len(), whole.len());
        // Parts (specs in twos × one ground each, on one thread) give the whole's rows, bit for
        // bit: every row is computed from its own spec, ground and wind only.
        let labels = ground_labels(&grounds).unwrap();
        let one = cfg.clone().with_threads(1);
        let mut by_key = std::collections::HashMap::new();
        for part in cat.split(2).unwrap() {
            for (gi, gr) in grounds.iter().enumerate() {
                let gs = std::slice::from_ref(gr);
                let inp = SweepInputs { model: &s, catalogue: &part, grounds: gs, winds: &winds };
                for row in sweep_rows_labelled(&inp, &labels[gi..=gi], &one).unwrap() {
                    by_key.insert(row.key.clone(), row);
                }
            }
        }
        assert_eq!(by_key.len(), whole.len());
        for w in &whole {
            let p = &by_key[&w.key];
            assert_eq!(format!("{p:?}"), format!("{w:?}"), "{}", w.key);
            assert_eq!(p.rms_arcsec.to_bits(), w.rms_arcsec.to_bits());
        }
        assert!(whole.iter().filter(|r| r.spectrum == "broken").all(SweepRow::is_error));
        assert!(whole.iter().filter(|r| r.spectrum != "broken").all(|r| !r.is_error()));
        // Inputs refused before anything is read.
        let e = check_sweep(&SweepInputs { grounds: &[], ..inputs }, &cfg).unwrap_err();
        assert!(e.to_string().contains("at least one ground"), "{e}");
        let twice = [grounds[2].clone(), grounds[2].clone()];
        assert!(check_sweep(&SweepInputs { grounds: &twice, ..inputs }, &cfg).is_err());
        let twice = [grounds[1].clone(), grounds[1].clone()];
        let e = check_sweep(&SweepInputs { grounds: &twice, ..inputs }, &cfg).unwrap_err();
        assert!(e.to_string().contains("given twice"), "{e}");
        let same_stem = [grounds[1].clone(), GroundSource::Recording(dir.join("sub").join("broken.csv"))];
        let l = ground_labels(&same_stem).unwrap();
        assert!(l[0].ends_with("broken.csv") && l[1].ends_with("sub/broken.csv"), "{l:?}");
        let e = sweep_rows_labelled(&inputs, &labels[..1], &cfg).unwrap_err();
        assert!(e.to_string().contains("ground labels"), "{e}");
        let mut zero = cfg.clone();
        zero.threads = Some(0);
        assert!(check_sweep(&inputs, &zero).unwrap_err().to_string().contains("threads"));
    }

    /// Every column of two row lists: text, flags and messages equal, numbers equal to 1e-9
    /// relative (NaN and infinities equal).
    fn assert_rows_match(a: &[SweepRow], b: &[SweepRow]) {
        assert_eq!(a.len(), b.len());
        let mut numbers = 0;
        for (x, y) in a.iter().zip(b) {
            for (k, (u, v)) in x.values().into_iter().zip(y.values()).enumerate() {
                match (u, v) {
                    (SweepValue::Number(p), SweepValue::Number(q)) => {
                        numbers += 1;
                        let same = p == q || (p.is_nan() && q.is_nan());
                        let rel = (p - q).abs() / q.abs().max(1e-300);
                        // P(outside ½ px) is 1 − P(inside): its rounding is about 1e-16 absolute
                        // on either path, so below 1e-7 it is compared to 1e-15 absolute.
                        let tiny = SWEEP_ROW[k].0 == "p_outside_half_px" && (p - q).abs() <= 1e-15;
                        assert!(
                            same || rel <= 1e-9 || tiny,
                            "{} column {}: {p} vs {q}",
                            x.key,
                            SWEEP_ROW[k].0
                        );
                    }
                    (u, v) => assert_eq!(u, v, "{} column {}", x.key, SWEEP_ROW[k].0),
                }
            }
        }
        assert!(numbers > 0);
    }

    #[test]
    fn the_spring_variant_engine_gives_the_rebuilt_rows() {
        // The demo: the rig file on a paver, its catalogue and the cold catalogue (at its
        // nominal temperature and at -15 °C), three recordings, calm and 4 m/s. Oracle: the
        // same sweep with a model built and solved per row.
        let rig =
            ModelFile::parse(include_str!("../../../docs/examples/tripod-paver.toml"), "tripod-paver.toml")
                .unwrap();
        let rec = Path::new(env!("CARGO_MANIFEST_DIR")).join("../docs/examples/recordings");
        let grounds: Vec<GroundSource> = ["quiet-night", "road-nearby", "footsteps"]
            .iter()
            .map(|n| GroundSource::Recording(rec.join(format!("{n}.csv"))))
            .collect();
        let winds = [WindCase::calm(), WindCase::parse("4").unwrap()];
        let warm = Catalogue::parse(CATALOGUE, "isolators.toml").unwrap();
        let cold = Catalogue::parse(COLD_CATALOGUE, "isolators-cold.toml").unwrap();
        for (model, cat, t) in
            [(&rig, &warm, 20.0), (&rig, &cold, 20.0), (&rig, &cold, -15.0), (&file(), &warm, 20.0)]
        {
            let inputs = SweepInputs { model, catalogue: cat, grounds: &grounds, winds: &winds };
            let cfg = SweepConfig::new().unwrap().with_temperature_c(t);
            let fast = sweep_rows(&inputs, &cfg).unwrap();
            let slow = sweep_rows(&inputs, &cfg.clone().with_engine(SweepEngine::Rebuild)).unwrap();
            assert!(fast.iter().all(|r| !r.is_error()), "{:?}", fast.iter().find(|r| r.is_error()));
            assert_rows_match(&fast, &slow);
            // The engine did take the pads: every isolator but the rig layer's "none" (feet on
            // rigid ground, no spring) for every ground and wind; all of them for the generic
            // layer, whose "none" keeps the paver contact spring.
            let labels = ground_labels(&grounds).unwrap();
            let plan = PreparedSweep::new(&inputs, &labels, &cfg).unwrap();
            let n = cat.isolators.len();
            let engine_isolators = if model.rig.tripod.is_some() { n - 1 } else { n };
            assert_eq!(plan.fast.len(), engine_isolators * grounds.len() * winds.len());
        }
    }

    #[test]
    fn wind_cases_parse_and_refuse_nonsense() {
        assert_eq!(WindCase::parse("calm").unwrap().wind, None);
        let w = WindCase::parse("5:3:von-karman:0.25").unwrap();
        assert_eq!(w.label, "5m/s@3m von-karman I=0.25");
        assert!(WindCase::parse("fast").unwrap_err().to_string().contains("speed"));
        assert!(WindCase::parse("5:2:breeze").is_err());
        assert!(WindCase::parse("-3").is_err());
    }
}

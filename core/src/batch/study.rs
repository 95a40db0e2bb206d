//! Design studies: which change buys the most? A study ([`Study`], read from a study file,
//! [`super::study_file`]) varies numbers of the model file, whole alternative model files and the
//! isolator catalogue, crossed or paired, and evaluates every variant under every ground and
//! wind case.
//!
//! - **Variants.** Crossed: every combination of the variables' values (the first variable
//!   varies slowest); paired: the k-th value of every variable together. The variant whose
//!   values are all the base model's (path values equal to the file's, rig "base", pads "none")
//!   is labelled `base`; when no variant is, a `base` variant is put first. Other variants are
//!   labelled `name=value, name=value`.
//! - **Rows.** One per variant × ground × wind, in that order ([`study_columns`]): the
//!   variables' values, image RMS (arcsec, px), P(outside ½ px), the ratio of image RMS to the
//!   base for the same disturbance and the verdict against it (`vs_base`: "better", "worse" or
//!   "no visible difference" by the sweep's [`Visibility`] levels, [`Visibility::judge`]), the
//!   first natural frequency and its damping, the worst gust peak and ring-down of the gust
//!   family ([`super::gust`], windy cases only) and the lowest factor of safety of the static
//!   checks ([`crate::checks::rig_checks`], at the study's design wind; NaN where the model has no
//!   rig layer to check). `key` = `variant|ground|wind`, the unit of resume.
//! - **Evaluation.** Each variant's model file is rebuilt from the edited text
//!   ([`evaluate_variant`]): the rig's file, each path set with
//!   [`crate::identify::set_parameter`], pads put in with [`PadMechanism::spec_with`]. A variant
//!   that cannot be built (a value that makes the model invalid, a path missing from an
//!   alternative file) gives error rows naming why, and the rest finish. Catalogue pads that
//!   only change the pad springs take their image columns from the spring-variant engine
//!   ([`PreparedStudy::use_spring_sets`]); `engine = "rebuild"` turns that off.
//! - **Output.** [`run_study`] writes the CSV with an [`AtomicCsvWriter`] in row order as soon
//!   as each variant is done; `resume` keeps the complete rows of an interrupted run (error rows
//!   count as complete). [`study_rows`] returns the same rows in memory at full precision.
//! - **Summary** ([`summarize_study`]): per disturbance the variants ranked by image RMS, with
//!   their verdicts; **sensitivity** ([`sensitivity`]): for each variable and outcome the range of
//!   the outcome's main effect (the mean over the other variables' values, per value of this
//!   one) — how much the variable moves the outcome.

use super::catalogue::Catalogue;
use super::ground::GroundSpectrum;
use super::gust::gust_family;
use super::ranking::{Verdict, Visibility};
use super::study_file::{Combine, Study, StudySetting, VariableKind};
use super::sweep::{
    Evaluated, PadEngine, PadMechanism, SweepEngine, SweepProgress, WindCase, ground_labels, in_pool,
};
use super::sweep_row::sig6;
use crate::error::{Error, Result};
use crate::image::ImageOptions;
use crate::io::atomic::{AtomicCsvWriter, completed_keys, encode_row};
use crate::model::Model;
use crate::response::Disturbances;
use crate::schema::ModelFile;
use rayon::prelude::*;
use serde::Serialize;
use std::collections::{BTreeMap, HashMap, HashSet};
use std::path::{Path, PathBuf};

/// The label of the base variant.
pub const BASE: &str = "base";

/// The columns before the variables' columns.
const LEAD_COLUMNS: [&str; 2] = ["key", "variant"];
/// The columns after the variables' columns.
const TAIL_COLUMNS: [&str; 16] = [
    "ground",
    "wind",
    "status",
    "rms_arcsec",
    "rms_px",
    "p_outside_half_px",
    "ratio_to_base",
    "vs_base",
    "first_mode_hz",
    "first_mode_zeta",
    "gust_peak_px",
    "gust_ringdown_s",
    "min_static_fos",
    "standing_tilt_arcsec",
    "standing_tilt_px",
    "error",
];

/// Whether `name` is one of the fixed columns (a variable may not take one).
pub(crate) fn is_fixed_column(name: &str) -> bool {
    LEAD_COLUMNS.contains(&name) || TAIL_COLUMNS.contains(&name)
}

/// The outcomes of a row that the summary and sensitivity use, with their units.
pub const OUTCOMES: [(&str, &str); 7] = [
    ("rms_px", "px"),
    ("p_outside_half_px", ""),
    ("first_mode_hz", "Hz"),
    ("gust_peak_px", "px"),
    ("gust_ringdown_s", "s"),
    ("min_static_fos", ""),
    ("standing_tilt_px", "px"),
];

/// The columns of a study's CSV: key, variant, one per variable, then the outcomes.
pub fn study_columns(study: &Study) -> Vec<String> {
    LEAD_COLUMNS
        .iter()
        .map(|s| s.to_string())
        .chain(study.variables.iter().map(|v| v.name.clone()))
        .chain(TAIL_COLUMNS.iter().map(|s| s.to_string()))
        .collect()
}

/// One variant: its label and, per variable, the index of its value (None: the base model's).
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Variant {
    pub label: String,
    pub levels: Vec<Option<usize>>,
    /// Part of the crossed or paired set (false for a `base` put first).
    pub in_set: bool,
}

/// The variants of a study in row order (module docs).
pub fn variants(study: &Study) -> Vec<Variant> {
    let vars = &study.variables;
    let mut set: Vec<Vec<usize>> = Vec::new();
    match study.combine {
        Combine::Paired => {
            let n = vars.first().map_or(1, |v| v.len());
            set.extend((0..n).map(|k| vec![k; vars.len()]));
        }
        Combine::Crossed => {
            let total: usize = vars.iter().map(|v| v.len()).product();
            for mut n in 0..total {
                let mut idx = vec![0usize; vars.len()];
                for d in (0..vars.len()).rev() {
                    idx[d] = n % vars[d].len();
                    n /= vars[d].len();
                }
                set.push(idx);
            }
        }
    }
    let is_base = |l: &[usize]| l.iter().enumerate().all(|(i, k)| vars[i].is_base(*k));
    let mut out: Vec<Variant> = set
        .iter()
        .map(|l| Variant {
            label: if is_base(l) {
                BASE.to_string()
            } else {
                l.iter()
                    .enumerate()
                    .map(|(i, k)| format!("{}={}", vars[i].name, vars[i].label(*k)))
                    .collect::<Vec<_>>()
                    .join(", ")
            },
            levels: l.iter().map(|k| Some(*k)).collect(),
            in_set: true,
        })
        .collect();
    if !out.iter().any(|v| v.label == BASE) {
        out.insert(0, Variant { label: BASE.into(), levels: vec![None; vars.len()], in_set: false });
    }
    out
}

/// One row of a study (see [`study_columns`]).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StudyRow {
    pub key: String,
    pub variant: String,
    /// The variables' values, in the study's order.
    pub values: Vec<String>,
    pub ground: String,
    pub wind: String,
    /// None for a good row.
    pub error: Option<String>,
    pub rms_arcsec: f64,
    pub rms_px: f64,
    pub p_outside_half_px: f64,
    pub ratio_to_base: f64,
    /// "base", "better", "worse", "no visible difference", or empty when the base failed.
    pub vs_base: String,
    pub first_mode_hz: f64,
    pub first_mode_zeta: f64,
    pub gust_peak_px: f64,
    pub gust_ringdown_s: f64,
    pub min_static_fos: f64,
    /// Static image angle (arcsec, px) when the study's person stands on the deck at the
    /// variant's distance, the worst azimuth ([`crate::people::standing_tilt`]); NaN when the
    /// study has no person or the rig no `[floor]`.
    pub standing_tilt_arcsec: f64,
    pub standing_tilt_px: f64,
}

impl StudyRow {
    /// The key of a combination: `variant|ground|wind`.
    pub fn key_of(variant: &str, ground: &str, wind: &str) -> String {
        format!("{variant}|{ground}|{wind}")
    }

    fn failed(variant: &Variant, values: Vec<String>, ground: &str, wind: &str, reason: &str) -> StudyRow {
        StudyRow {
            key: Self::key_of(&variant.label, ground, wind),
            variant: variant.label.clone(),
            values,
            ground: ground.into(),
            wind: wind.into(),
            error: Some(reason.replace(['\n', '\r'], " ")),
            rms_arcsec: f64::NAN,
            rms_px: f64::NAN,
            p_outside_half_px: f64::NAN,
            ratio_to_base: f64::NAN,
            vs_base: String::new(),
            first_mode_hz: f64::NAN,
            first_mode_zeta: f64::NAN,
            gust_peak_px: f64::NAN,
            gust_ringdown_s: f64::NAN,
            min_static_fos: f64::NAN,
            standing_tilt_arcsec: f64::NAN,
            standing_tilt_px: f64::NAN,
        }
    }

    /// True for an error row.
    pub fn is_error(&self) -> bool {
        self.error.is_some()
    }

    /// An outcome by its column name ([`OUTCOMES`] and `rms_arcsec`, `ratio_to_base`).
    pub fn outcome(&self, name: &str) -> Option<f64> {
        Some(match name {
            "rms_arcsec" => self.rms_arcsec,
            "rms_px" => self.rms_px,
            "p_outside_half_px" => self.p_outside_half_px,
            "ratio_to_base" => self.ratio_to_base,
            "first_mode_hz" => self.first_mode_hz,
            "first_mode_zeta" => self.first_mode_zeta,
            "gust_peak_px" => self.gust_peak_px,
            "gust_ringdown_s" => self.gust_ringdown_s,
            "min_static_fos" => self.min_static_fos,
            "standing_tilt_arcsec" => self.standing_tilt_arcsec,
            "standing_tilt_px" => self.standing_tilt_px,
            _ => return None,
        })
    }

    /// The CSV fields in [`study_columns`] order (numbers to six significant digits, empty for
    /// NaN and infinity, as the sweep writes them).
    pub fn fields(&self) -> Vec<String> {
        let bad = self.is_error();
        let mut f = vec![self.key.clone(), self.variant.clone()];
        f.extend(self.values.iter().cloned());
        f.extend([self.ground.clone(), self.wind.clone(), if bad { "error" } else { "ok" }.to_string()]);
        f.extend([self.rms_arcsec, self.rms_px, self.p_outside_half_px, self.ratio_to_base].map(sig6));
        f.push(self.vs_base.clone());
        f.extend(
            [
                self.first_mode_hz,
                self.first_mode_zeta,
                self.gust_peak_px,
                self.gust_ringdown_s,
                self.min_static_fos,
                self.standing_tilt_arcsec,
                self.standing_tilt_px,
            ]
            .map(sig6),
        );
        f.push(self.error.clone().unwrap_or_default());
        f
    }

    /// A row from its CSV fields (`n_vars` variable columns; `line` names it in errors).
    pub fn from_fields(f: &[&str], n_vars: usize, file: &str, line: usize) -> Result<StudyRow> {
        let perr =
            |reason: String| Error::Parse { file: file.into(), location: format!("line {line}"), reason };
        if f.len() != LEAD_COLUMNS.len() + n_vars + TAIL_COLUMNS.len() {
            return Err(perr(format!(
                "expected {} fields, got {}",
                LEAD_COLUMNS.len() + n_vars + TAIL_COLUMNS.len(),
                f.len()
            )));
        }
        let t = &f[2 + n_vars..];
        let num = |s: &str, col: &str| -> Result<f64> {
            if s.is_empty() {
                return Ok(f64::NAN);
            }
            s.parse::<f64>().map_err(|_| perr(format!("{col} '{s}' is not a number")))
        };
        let error = match t[2] {
            "ok" => None,
            "error" => Some(t[15].to_string()),
            s => return Err(perr(format!("status '{s}' is not ok/error"))),
        };
        Ok(StudyRow {
            key: f[0].into(),
            variant: f[1].into(),
            values: f[2..2 + n_vars].iter().map(|s| s.to_string()).collect(),
            ground: t[0].into(),
            wind: t[1].into(),
            error,
            rms_arcsec: num(t[3], "rms_arcsec")?,
            rms_px: num(t[4], "rms_px")?,
            p_outside_half_px: num(t[5], "p_outside_half_px")?,
            ratio_to_base: num(t[6], "ratio_to_base")?,
            vs_base: t[7].into(),
            first_mode_hz: num(t[8], "first_mode_hz")?,
            first_mode_zeta: num(t[9], "first_mode_zeta")?,
            gust_peak_px: num(t[10], "gust_peak_px")?,
            gust_ringdown_s: num(t[11], "gust_ringdown_s")?,
            min_static_fos: num(t[12], "min_static_fos")?,
            standing_tilt_arcsec: num(t[13], "standing_tilt_arcsec")?,
            standing_tilt_px: num(t[14], "standing_tilt_px")?,
        })
    }
}

/// A variant's model, built from its edited model file, or why it could not be.
pub struct BuiltVariant {
    pub model: std::result::Result<Model, String>,
    pub first_mode: (f64, f64),
    pub min_static_fos: f64,
    /// Static image angle (arcsec, px) under the study's standing person (NaN: none, or no deck).
    pub standing_tilt: (f64, f64),
    /// The grounds carried from their measured distance to the variant's
    /// ([`crate::distance_attenuation`]; the wave speed the model's site phase velocity when the
    /// study gives none); None when the study gives no measured distance.
    pub ground_path: Option<crate::distance_attenuation::GroundPath>,
}

/// Everything the rows of a study are made from, computed once.
pub struct PreparedStudy<'a> {
    pub study: &'a Study,
    pub variants: Vec<Variant>,
    pub labels: Vec<String>,
    pub winds: Vec<WindCase>,
    spectra: Vec<std::result::Result<GroundSpectrum, String>>,
    /// Per variable, its catalogue at the study's temperature (pads variables only).
    catalogues: Vec<Option<Catalogue>>,
    /// The base variant's (rms_px, p_outside, rms_arcsec) per (ground, wind), when it could be
    /// evaluated.
    base: BTreeMap<(usize, usize), (f64, f64, f64)>,
    /// Image columns by the spring-variant engine, per (variant, ground, wind)
    /// ([`PreparedStudy::use_spring_sets`]).
    fast: HashMap<(usize, usize, usize), Evaluated>,
}

impl<'a> PreparedStudy<'a> {
    /// Check the study, read the grounds and evaluate the base variant.
    pub fn new(study: &'a Study) -> Result<PreparedStudy<'a>> {
        study.check()?;
        let labels = ground_labels(&study.grounds)?;
        let winds = study.wind_cases();
        let catalogues = study
            .variables
            .iter()
            .map(|v| match &v.kind {
                VariableKind::Pads { catalogue } => {
                    catalogue.at_temperature(study.settings.temperature_c).map(Some)
                }
                _ => Ok(None),
            })
            .collect::<Result<Vec<_>>>()?;
        let s = &study.settings;
        let spectra = study
            .grounds
            .par_iter()
            .zip(labels.par_iter())
            .map(|(g, l)| {
                g.load(&s.grid, s.ground_scale, &crate::io::series::SeriesOptions::default())
                    .map(|mut sp| {
                        sp.label = l.clone();
                        sp
                    })
                    .map_err(|e| e.to_string())
            })
            .collect();
        let variants = variants(study);
        let mut p = PreparedStudy {
            study,
            variants,
            labels,
            winds,
            spectra,
            catalogues,
            base: BTreeMap::new(),
            fast: HashMap::new(),
        };
        if p.winds.iter().any(|w| w.wind.is_some()) {
            let file = ModelFile::parse(&study.model_text, &study.model_name)?;
            if file.expanded()?.wind.is_none() {
                return Err(Error::invalid(
                    "wind",
                    format!("the model {} has no [wind] section or derived wind parts", study.model_name),
                ));
            }
        }
        let bi = p.base_index();
        let built = p.build(bi);
        let jobs: Vec<(usize, usize)> =
            (0..p.labels.len()).flat_map(|g| (0..p.winds.len()).map(move |w| (g, w))).collect();
        let base: BTreeMap<(usize, usize), (f64, f64, f64)> = jobs
            .par_iter()
            .filter_map(|&(g, w)| {
                let sp = p.spectra[g].as_ref().ok()?;
                let (a, px, pr) = image_of(&built, sp, &p.winds[w], study).ok()?;
                Some(((g, w), (px, pr, a)))
            })
            .collect();
        p.base = base;
        Ok(p)
    }

    /// Index of the base variant.
    pub fn base_index(&self) -> usize {
        self.variants.iter().position(|v| v.label == BASE).unwrap_or(0)
    }

    /// Number of rows.
    pub fn len(&self) -> usize {
        self.variants.len() * self.labels.len() * self.winds.len()
    }

    /// True when the study has no rows (never: there is always the base and one ground).
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The key of row `i` (variant-major, then ground, then wind).
    pub fn key(&self, i: usize) -> String {
        let (nw, ng) = (self.winds.len(), self.labels.len());
        let (v, g, w) = (i / (nw * ng), (i / nw) % ng, i % nw);
        StudyRow::key_of(&self.variants[v].label, &self.labels[g], &self.winds[w].label)
    }

    /// The values of variant `v` as row text.
    fn values(&self, v: usize) -> Vec<String> {
        let vars = &self.study.variables;
        self.variants[v]
            .levels
            .iter()
            .enumerate()
            .map(|(i, l)| match l {
                Some(k) => vars[i].label(*k),
                None => vars[i].base_label(),
            })
            .collect()
    }

    /// The model file of variant `v` (the rig's file with each path set), and the pad to put in.
    fn variant_file(&self, v: usize) -> Result<(ModelFile, Option<&super::Isolator>)> {
        self.file_of(&self.variants[v].levels)
    }

    /// The model file and pad of the variables' levels `lv` (see [`Self::variant_file`]).
    fn file_of(&self, lv: &[Option<usize>]) -> Result<(ModelFile, Option<&super::Isolator>)> {
        let vars = &self.study.variables;
        let (mut name, mut text) = (self.study.model_name.clone(), self.study.model_text.clone());
        for (i, var) in vars.iter().enumerate() {
            if let (VariableKind::Rig { rigs }, Some(k)) = (&var.kind, lv[i])
                && let Some(r) = rigs.get(k)
            {
                (name, text) = (r.1.clone(), r.2.clone());
            }
        }
        for (i, var) in vars.iter().enumerate() {
            if let (VariableKind::Path { path, values, .. }, Some(k)) = (&var.kind, lv[i]) {
                let x = values.get(k).copied().unwrap_or(f64::NAN);
                text = crate::identify::set_parameter(&text, path, x)
                    .map_err(|e| Error::invalid(format!("{} = {x} in {name}", var.name), e.to_string()))?;
            }
        }
        let file = ModelFile::parse(&text, &name)?;
        Ok((file, self.pad_of(lv)))
    }

    /// The catalogue pad of the levels `lv` (the last pads variable given wins), if any.
    fn pad_of(&self, lv: &[Option<usize>]) -> Option<&super::Isolator> {
        let mut pad = None;
        for (i, c) in self.catalogues.iter().enumerate() {
            if let (Some(c), Some(k)) = (c, lv[i]) {
                pad = c.isolators.get(k);
            }
        }
        pad
    }

    /// Compute the image columns of the variants `vs` by the spring-variant engine where a
    /// variant differs from its group's reference only in the pad springs (the study's
    /// `engine = "auto"`, the default): variants are grouped by their levels of every variable
    /// but the pads; a group's reference is its model with the sweep's first reference pad
    /// ([`PadEngine`], never a catalogue entry, so a row does not depend on which variants are
    /// computed together); each member's FRF is evaluated once and shared by every ground and
    /// wind. The others, and every disturbance the engine cannot take, are rebuilt per row by
    /// [`evaluate_variant`]. The rows are the same either way to rounding (about 1e-12).
    pub fn use_spring_sets(&mut self, vs: &[usize]) {
        if self.study.settings.engine != SweepEngine::Auto {
            return;
        }
        let pads: Vec<usize> = (0..self.catalogues.len()).filter(|&i| self.catalogues[i].is_some()).collect();
        if pads.is_empty() {
            return;
        }
        let mut groups: BTreeMap<Vec<Option<usize>>, Vec<usize>> = BTreeMap::new();
        for &v in vs {
            let Some(var) = self.variants.get(v) else { continue };
            let mut key = var.levels.clone();
            for &i in &pads {
                key[i] = None;
            }
            groups.entry(key).or_default().push(v);
        }
        let this = &*self;
        let found: Vec<HashMap<(usize, usize, usize), Evaluated>> =
            groups.into_par_iter().map(|(key, members)| this.group_images(&key, &members)).collect();
        self.fast = found.into_iter().flatten().collect();
    }

    /// Number of (variant, ground, wind) image columns the engine computed.
    pub fn engine_rows(&self) -> usize {
        self.fast.len()
    }

    /// The engine's image columns of one group (see [`Self::use_spring_sets`]).
    fn group_images(
        &self,
        key: &[Option<usize>],
        members: &[usize],
    ) -> HashMap<(usize, usize, usize), Evaluated> {
        let mut out = HashMap::new();
        let s = &self.study.settings;
        let Ok((file, _)) = self.file_of(key) else { return out };
        let Ok(mech) = PadMechanism::for_file(&file, &s.pad_prefix) else { return out };
        let Some(engine) = PadEngine::new(&mech) else { return out };
        let (mut who, mut sets) = (Vec::new(), Vec::new());
        for &v in members {
            let Some(iso) = self.pad_of(&self.variants[v].levels) else { continue };
            if let Ok(spec) = mech.spec_with(iso)
                && let Some(set) = engine.set_of(&spec)
            {
                who.push(v);
                sets.push(set);
            }
        }
        let Some(&first) = who.first() else { return out };
        // The ground path depends on the distance setting (one of the group's levels) and the
        // site, which pads do not change.
        let to_m = self.setting_value(first, StudySetting::GroundDistance);
        let Ok(path) = s.ground_path(to_m).map(|p| p.resolve(engine.site_phase_velocity())).transpose()
        else {
            return out;
        };
        let (mut cases, mut dist) = (Vec::new(), Vec::new());
        for (g, sp) in self.spectra.iter().enumerate() {
            let Ok(sp) = sp else { continue };
            let mut axes = sp.axes.clone();
            if let Some(p) = &path
                && axes.iter_mut().flatten().try_for_each(|a| p.apply_psd(a).map(|x| *a = x)).is_err()
            {
                continue;
            }
            for (w, wc) in self.winds.iter().enumerate() {
                cases.push((g, w));
                dist.push(Disturbances {
                    ground: axes.clone(),
                    wind: wc.wind.clone(),
                    loads: Vec::new(),
                    ground_waves: None,
                });
            }
        }
        let Some(stats) = engine.images(&s.grid, &sets, &dist) else { return out };
        for (&v, per_case) in who.iter().zip(stats) {
            for (&(g, w), r) in cases.iter().zip(per_case) {
                out.insert((v, g, w), r);
            }
        }
        out
    }

    /// Build variant `v`: its model from the edited model file, first mode and static checks.
    pub fn build(&self, v: usize) -> BuiltVariant {
        let fail = |e: Error| BuiltVariant {
            model: Err(format!("variant '{}': {e}", self.variants[v].label)),
            first_mode: (f64::NAN, f64::NAN),
            min_static_fos: f64::NAN,
            standing_tilt: (f64::NAN, f64::NAN),
            ground_path: None,
        };
        let s = &self.study.settings;
        let (file, pad) = match self.variant_file(v) {
            Ok(x) => x,
            Err(e) => return fail(e),
        };
        let spec = match pad {
            Some(iso) => PadMechanism::for_file(&file, &s.pad_prefix).and_then(|m| m.spec_with(iso)),
            None => file.expanded(),
        };
        let spec = match spec {
            Ok(sp) => sp,
            Err(e) => return fail(e),
        };
        let model = match Model::from_spec(&spec) {
            Ok(m) => m,
            Err(e) => return fail(e),
        };
        let site = spec.ground_waves.as_ref().map(|w| w.phase_velocity_m_s);
        let to_m = self.setting_value(v, StudySetting::GroundDistance);
        let ground_path = match s.ground_path(to_m).map(|p| p.resolve(site)).transpose() {
            Ok(p) => p,
            Err(e) => return fail(e),
        };
        let standing_tilt = match (s.person_kg, file.rig.floor.as_ref()) {
            (Some(_), Some(floor)) => {
                let kg = self.setting_value(v, StudySetting::PersonMass);
                let d = self.setting_value(v, StudySetting::PersonDistance);
                match crate::people::standing_tilt(
                    &model,
                    floor.body(),
                    kg * crate::people::STANDARD_GRAVITY_M_S2,
                    &[d],
                    None,
                    crate::people::DEFAULT_LIMIT_PX,
                ) {
                    Ok(t) => t.rows.first().map_or((f64::NAN, f64::NAN), |r| (r.image_arcsec, r.image_px)),
                    Err(e) => return fail(e),
                }
            }
            _ => (f64::NAN, f64::NAN),
        };
        let modes = match model.modes() {
            Ok(m) => m,
            Err(e) => return fail(e),
        };
        let first = modes.first();
        let wind = crate::checks::StaticWind { speed_m_s: s.design_wind_m_s, ..Default::default() };
        let fos = crate::checks::rig_checks(&file, &wind, &crate::checks::StaticOptions::default())
            .map(|r| r.min_margin())
            .ok()
            .filter(|m| m.is_finite())
            .unwrap_or(f64::NAN);
        BuiltVariant { model: Ok(model), first_mode: first, min_static_fos: fos, standing_tilt, ground_path }
    }

    /// The value of a study setting in variant `v`: the value of the variable that varies it, or
    /// the study's `[settings]` value.
    pub fn setting_value(&self, v: usize, which: StudySetting) -> f64 {
        let lv = &self.variants[v].levels;
        for (i, var) in self.study.variables.iter().enumerate() {
            if let (VariableKind::Setting { setting, values, .. }, Some(k)) = (&var.kind, lv[i])
                && *setting == which
            {
                return values.get(k).copied().unwrap_or(f64::NAN);
            }
        }
        self.study.settings.base_of(which)
    }
}

/// RMS arcsec, RMS px and P(outside ½ px) of a built variant under one disturbance.
fn image_of(
    built: &BuiltVariant,
    ground: &GroundSpectrum,
    wind: &WindCase,
    study: &Study,
) -> std::result::Result<(f64, f64, f64), String> {
    let model = built.model.as_ref().map_err(Clone::clone)?;
    let mut axes = ground.axes.clone();
    if let Some(p) = &built.ground_path {
        for a in axes.iter_mut().flatten() {
            *a = p.apply_psd(a).map_err(|e| e.to_string())?;
        }
    }
    let d = Disturbances { ground: axes, wind: wind.wind.clone(), loads: Vec::new(), ground_waves: None };
    let opts = ImageOptions { skip_mode_shares: true, ..ImageOptions::default() };
    let im = model.image_motion(&study.settings.grid, &d, &opts).map_err(|e| e.to_string())?;
    Ok((im.rms_arcsec, im.rms_px, im.p_outside))
}

/// The words of a verdict against the base.
pub fn verdict_words(v: Verdict) -> &'static str {
    match v {
        Verdict::Better => "better",
        Verdict::NoVisibleDifference => "no visible difference",
        Verdict::Worse => "worse",
        Verdict::Mixed => "mixed",
    }
}

/// The rows of variant `v` for every disturbance whose key `want` accepts, in row order: the
/// variant is built once from its edited model file ([`PreparedStudy::build`]), then evaluated
/// under each ground and wind case; every row of a variant that cannot be built is an error row.
pub fn evaluate_variant(
    p: &PreparedStudy<'_>,
    v: usize,
    want: &(dyn Fn(&str) -> bool + Sync),
) -> Vec<StudyRow> {
    let var = &p.variants[v];
    let jobs: Vec<(usize, usize)> = (0..p.labels.len())
        .flat_map(|g| (0..p.winds.len()).map(move |w| (g, w)))
        .filter(|&(g, w)| want(&StudyRow::key_of(&var.label, &p.labels[g], &p.winds[w].label)))
        .collect();
    if jobs.is_empty() {
        return Vec::new();
    }
    let values = p.values(v);
    let built = p.build(v);
    let gusts: BTreeMap<usize, (f64, f64)> = (0..p.winds.len())
        .filter(|w| jobs.iter().any(|j| j.1 == *w))
        .filter_map(|w| {
            let m = built.model.as_ref().ok()?;
            let wind = p.winds[w].wind.as_ref()?;
            gust_family(m, wind).ok().map(|g| (w, (g.worst_peak_px(), g.worst_ringdown_s())))
        })
        .collect();
    let vis: &Visibility = &p.study.settings.visibility;
    jobs.iter()
        .map(|&(g, w)| {
            let (gl, wl) = (&p.labels[g], &p.winds[w].label);
            let ground = match &p.spectra[g] {
                Ok(s) => s,
                Err(e) => return StudyRow::failed(var, values.clone(), gl, wl, e),
            };
            let image = match (&built.model, p.fast.get(&(v, g, w))) {
                (Ok(_), Some(r)) => r.clone(),
                _ => image_of(&built, ground, &p.winds[w], p.study),
            };
            match image {
                Err(e) => StudyRow::failed(var, values.clone(), gl, wl, &e),
                Ok((rms_arcsec, rms_px, pr)) => {
                    let base = p.base.get(&(g, w));
                    let (ratio, vs) = match base {
                        _ if var.label == BASE => (1.0, BASE.to_string()),
                        Some(&(bpx, bp, ba)) => (
                            if ba > 0.0 { rms_arcsec / ba } else { f64::NAN },
                            verdict_words(vis.judge((rms_px, pr), (bpx, bp))).to_string(),
                        ),
                        None => (f64::NAN, String::new()),
                    };
                    let gust = gusts.get(&w);
                    StudyRow {
                        key: StudyRow::key_of(&var.label, gl, wl),
                        variant: var.label.clone(),
                        values: values.clone(),
                        ground: gl.clone(),
                        wind: wl.clone(),
                        error: None,
                        rms_arcsec,
                        rms_px,
                        p_outside_half_px: pr,
                        ratio_to_base: ratio,
                        vs_base: vs,
                        first_mode_hz: built.first_mode.0,
                        first_mode_zeta: built.first_mode.1,
                        gust_peak_px: gust.map_or(f64::NAN, |x| x.0),
                        gust_ringdown_s: gust.map_or(f64::NAN, |x| x.1),
                        min_static_fos: built.min_static_fos,
                        standing_tilt_arcsec: built.standing_tilt.0,
                        standing_tilt_px: built.standing_tilt.1,
                    }
                }
            }
        })
        .collect()
}

/// The rows of a study in memory at full precision, in row order (the rows [`run_study`]
/// writes, before rounding). `threads`: a pool of that many threads, or the global pool.
pub fn study_rows(study: &Study, threads: Option<usize>) -> Result<Vec<StudyRow>> {
    study_rows_of(study, None, threads)
}

/// [`study_rows`] for some variants only (indices into [`variants`]; None: all), in row order:
/// a study split into parts gives the whole's rows (each row depends on its variant and
/// disturbance and on the base only).
pub fn study_rows_of(
    study: &Study,
    which: Option<&[usize]>,
    threads: Option<usize>,
) -> Result<Vec<StudyRow>> {
    if threads == Some(0) {
        return Err(Error::invalid("threads", "must be at least 1"));
    }
    in_pool(threads, || {
        let mut p = PreparedStudy::new(study)?;
        let all: Vec<usize> = (0..p.variants.len()).collect();
        let which = which.unwrap_or(&all);
        if let Some(bad) = which.iter().find(|&&v| v >= p.variants.len()) {
            return Err(Error::OutOfRange {
                what: "variant index".into(),
                value: *bad as f64,
                min: 0.0,
                max: p.variants.len().saturating_sub(1) as f64,
            });
        }
        p.use_spring_sets(which);
        let p = p;
        let per: Vec<Vec<StudyRow>> = which.par_iter().map(|&v| evaluate_variant(&p, v, &|_| true)).collect();
        Ok(per.into_iter().flatten().collect())
    })
}

/// A study table as the CSV text [`run_study`] writes (header and rows, `\n` line ends).
pub fn study_csv_text(study: &Study, rows: &[StudyRow]) -> Result<String> {
    let what = Path::new("study table");
    let mut out = encode_row(&study_columns(study), what)?;
    for r in rows {
        out.extend(encode_row(&r.fields(), what)?);
    }
    String::from_utf8(out).map_err(|e| Error::invalid("study table", e.to_string()))
}

/// Read the rows of a study CSV written for `study` (header checked).
pub fn read_study_csv(study: &Study, path: &Path) -> Result<Vec<StudyRow>> {
    let file = path.display().to_string();
    let n = study.variables.len();
    crate::io::atomic::read_table(path, &study_columns(study), "not this study's table")?
        .iter()
        .map(|(line, rec)| StudyRow::from_fields(&rec.iter().collect::<Vec<_>>(), n, &file, *line))
        .collect()
}

/// One variant's standing under one disturbance.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StudyRankEntry {
    pub variant: String,
    pub rms_px: f64,
    pub p_outside_half_px: f64,
    pub ratio_to_base: f64,
    pub vs_base: String,
    pub first_mode_hz: f64,
    pub gust_peak_px: f64,
    pub min_static_fos: f64,
    /// Static image angle under the study's standing person (px; NaN without one or a deck).
    pub standing_tilt_px: f64,
}

/// The variants ranked under one disturbance (smallest image RMS first).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StudyRanking {
    pub ground: String,
    pub wind: String,
    pub entries: Vec<StudyRankEntry>,
}

/// The ranked summary of a study.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StudySummary {
    pub visibility: Visibility,
    pub per_disturbance: Vec<StudyRanking>,
    /// Error rows (key and message).
    pub failures: Vec<(String, String)>,
}

fn unique<'r>(it: impl Iterator<Item = &'r String>) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    for s in it {
        if !out.contains(s) {
            out.push(s.clone());
        }
    }
    out
}

/// Rank the variants per disturbance (ground × wind, in row order).
pub fn summarize_study(rows: &[StudyRow], vis: &Visibility) -> StudySummary {
    let good: Vec<&StudyRow> = rows.iter().filter(|r| !r.is_error()).collect();
    let mut per = Vec::new();
    for g in unique(rows.iter().map(|r| &r.ground)) {
        for w in unique(rows.iter().map(|r| &r.wind)) {
            let mut entries: Vec<StudyRankEntry> = good
                .iter()
                .filter(|r| r.ground == g && r.wind == w)
                .map(|r| StudyRankEntry {
                    variant: r.variant.clone(),
                    rms_px: r.rms_px,
                    p_outside_half_px: r.p_outside_half_px,
                    ratio_to_base: r.ratio_to_base,
                    vs_base: r.vs_base.clone(),
                    first_mode_hz: r.first_mode_hz,
                    gust_peak_px: r.gust_peak_px,
                    min_static_fos: r.min_static_fos,
                    standing_tilt_px: r.standing_tilt_px,
                })
                .collect();
            entries.sort_by(|a, b| a.rms_px.total_cmp(&b.rms_px).then_with(|| a.variant.cmp(&b.variant)));
            per.push(StudyRanking { ground: g.clone(), wind: w.clone(), entries });
        }
    }
    StudySummary {
        visibility: *vis,
        per_disturbance: per,
        failures: rows.iter().filter_map(|r| r.error.as_ref().map(|e| (r.key.clone(), e.clone()))).collect(),
    }
}

/// How much one variable moves one outcome under one disturbance.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Sensitivity {
    pub variable: String,
    pub outcome: String,
    pub ground: String,
    pub wind: String,
    /// Per value of the variable (its order): the label and the mean of the outcome over the
    /// study's variants with that value (NaN when none gave a number).
    pub levels: Vec<(String, f64)>,
    /// Largest minus smallest of the finite means (NaN with fewer than two).
    pub range: f64,
}

/// The sensitivity of every outcome of [`OUTCOMES`] to every variable, per disturbance: main
/// effects over the crossed or paired variants (a `base` put first is left out).
pub fn sensitivity(study: &Study, rows: &[StudyRow]) -> Vec<Sensitivity> {
    let in_set: HashSet<String> = variants(study).into_iter().filter(|v| v.in_set).map(|v| v.label).collect();
    let good: Vec<&StudyRow> = rows.iter().filter(|r| !r.is_error() && in_set.contains(&r.variant)).collect();
    let mut out = Vec::new();
    for g in unique(rows.iter().map(|r| &r.ground)) {
        for w in unique(rows.iter().map(|r| &r.wind)) {
            let here: Vec<&&StudyRow> = good.iter().filter(|r| r.ground == g && r.wind == w).collect();
            for (vi, var) in study.variables.iter().enumerate() {
                for (outcome, _) in OUTCOMES {
                    let levels: Vec<(String, f64)> = (0..var.len())
                        .map(|k| {
                            let l = var.label(k);
                            let xs: Vec<f64> = here
                                .iter()
                                .filter(|r| r.values.get(vi) == Some(&l))
                                .filter_map(|r| r.outcome(outcome))
                                .filter(|x| x.is_finite())
                                .collect();
                            let m = if xs.is_empty() {
                                f64::NAN
                            } else {
                                xs.iter().sum::<f64>() / xs.len() as f64
                            };
                            (l, m)
                        })
                        .collect();
                    let fin: Vec<f64> = levels.iter().map(|l| l.1).filter(|x| x.is_finite()).collect();
                    let range = if fin.len() < 2 {
                        f64::NAN
                    } else {
                        fin.iter().copied().fold(f64::NEG_INFINITY, f64::max)
                            - fin.iter().copied().fold(f64::INFINITY, f64::min)
                    };
                    out.push(Sensitivity {
                        variable: var.name.clone(),
                        outcome: outcome.into(),
                        ground: g.clone(),
                        wind: w.clone(),
                        levels,
                        range,
                    });
                }
            }
        }
    }
    out
}

/// What a study run did.
#[derive(Debug, Clone, PartialEq)]
pub struct StudyOutcome {
    pub path: PathBuf,
    /// All rows of the finished file (as written: six significant digits).
    pub rows: Vec<StudyRow>,
    pub computed: usize,
    pub kept: usize,
    pub summary: StudySummary,
    pub sensitivity: Vec<Sensitivity>,
}

impl StudyOutcome {
    /// Error rows.
    pub fn failures(&self) -> Vec<&StudyRow> {
        self.rows.iter().filter(|r| r.is_error()).collect()
    }
}

/// Run a study, writing `out` (module docs); with `resume`, continue an interrupted output.
/// `progress` is called after every finished variant.
pub fn run_study(
    study: &Study,
    out: &Path,
    resume: bool,
    threads: Option<usize>,
    progress: &(dyn Fn(SweepProgress) + Sync),
) -> Result<StudyOutcome> {
    if threads == Some(0) {
        return Err(Error::invalid("threads", "must be at least 1"));
    }
    study.check()?;
    let done_keys = if resume { completed_keys(out, "key")? } else { HashSet::new() };
    in_pool(threads, || {
        let mut p = PreparedStudy::new(study)?;
        let total = p.len();
        let header = study_columns(study);
        let mut writer = if resume {
            AtomicCsvWriter::resume(out, &header)?
        } else {
            AtomicCsvWriter::create(out, &header)?
        };
        let kept = writer.rows();
        let per_variant = p.labels.len() * p.winds.len();
        let todo: Vec<usize> = (0..p.variants.len())
            .filter(|&v| (0..per_variant).any(|j| !done_keys.contains(&p.key(v * per_variant + j))))
            .collect();
        p.use_spring_sets(&todo);
        let p = p;
        let mut done = (0..total).filter(|&i| done_keys.contains(&p.key(i))).count();
        progress(SweepProgress { done, total });
        let mut computed = 0usize;
        let want = |k: &str| !done_keys.contains(k);
        writer.write_in_order(&todo, &|v| evaluate_variant(&p, v, &want), StudyRow::fields, |n| {
            computed += n;
            done += n;
            progress(SweepProgress { done, total });
        })?;
        let path = writer.finish()?;
        let mut rows = read_study_csv(study, &path)?;
        // Resumed files hold the kept rows first: put every row in study order.
        let order: BTreeMap<String, usize> = (0..total).map(|i| (p.key(i), i)).collect();
        rows.sort_by_key(|r| order.get(&r.key).copied().unwrap_or(usize::MAX));
        let summary = summarize_study(&rows, &study.settings.visibility);
        let sens = sensitivity(study, &rows);
        Ok(StudyOutcome { path, rows, computed, kept, summary, sensitivity: sens })
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::batch::{Catalogue, GroundSource, ReportOptions, SweepConfig, SweepInputs, build_file_report};
    use crate::grid::FreqGrid;
    use crate::spectrum::ReferenceGround;

    fn examples() -> PathBuf {
        Path::new(env!("CARGO_MANIFEST_DIR")).join("..").join("docs").join("examples")
    }

    fn tmpdir(tag: &str) -> PathBuf {
        let d = std::env::temp_dir().join(format!("stillsky-study-{tag}-{}", std::process::id()));
        std::fs::create_dir_all(&d).unwrap();
        d
    }

    /// A study of the demo rig on NHNM (calm unless `winds` say otherwise) on a small grid.
    fn study(vary: &str, extra: &str) -> Study {
        let ex = examples();
        let text = format!(
            "model = \"tripod-paver.toml\"\n{extra}\n{vary}\n[disturbances]\ngrounds = [\"nhnm\"]\n\
             [settings]\nf_min_hz = 0.5\nf_max_hz = 60\nn_freq = 160\n"
        );
        Study::load(&text, "test-study.toml", &ex).unwrap()
    }

    fn report_rms(model_text: &str, grid: &FreqGrid) -> (f64, f64) {
        let file = ModelFile::parse(model_text, "hand-edited.toml").unwrap();
        let mut o = ReportOptions::new().unwrap();
        o.grid = grid.clone();
        o.ground = Some(GroundSource::Reference(ReferenceGround::Nhnm));
        let r = build_file_report(&file, &o).unwrap();
        (r.image.rms_arcsec, r.modes[0].frequency_hz)
    }

    fn row<'r>(rows: &'r [StudyRow], variant: &str) -> &'r StudyRow {
        rows.iter().find(|r| r.variant == variant).unwrap_or_else(|| panic!("no row {variant}"))
    }

    fn close(a: f64, b: f64, tol: f64) -> bool {
        (a - b).abs() <= tol * b.abs().max(1e-300)
    }

    #[test]
    fn a_path_list_row_is_the_report_of_the_hand_edited_file() {
        let s = study("[[vary]]\npath = \"tripod.joint_stiffness_n_per_m\"\nvalues = [1.5e7, 3.0e7]\n", "");
        let rows = study_rows(&s, None).unwrap();
        // 1.5e7 is the file's own value: that variant is the base (no extra row).
        assert_eq!(rows.len(), 2);
        assert_eq!(rows[0].variant, BASE);
        assert_eq!(rows[0].values, ["15000000"]);
        let r = row(&rows, "tripod.joint_stiffness_n_per_m=30000000");
        let text = std::fs::read_to_string(examples().join("tripod-paver.toml")).unwrap();
        let edited = text.replace("joint_stiffness_n_per_m = 1.5e7", "joint_stiffness_n_per_m = 3.0e7");
        assert_ne!(edited, text);
        let (rms, f1) = report_rms(&edited, &s.settings.grid);
        assert!(close(r.rms_arcsec, rms, 1e-12), "{} vs {rms}", r.rms_arcsec);
        assert!(close(r.first_mode_hz, f1, 1e-12), "{} vs {f1}", r.first_mode_hz);
        let (rms0, _) = report_rms(&text, &s.settings.grid);
        assert!(close(rows[0].rms_arcsec, rms0, 1e-12));
        assert!(close(r.ratio_to_base, r.rms_arcsec / rows[0].rms_arcsec, 1e-15));
        // Stiffer joints raise the first mode (k up, same mass: f ∝ √k, elementary mechanics).
        assert!(r.first_mode_hz > rows[0].first_mode_hz);
        assert_eq!(rows[0].vs_base, BASE);
        // The static checks ran on the rig layer (a finite factor of safety).
        assert!(rows[0].min_static_fos.is_finite() && rows[0].min_static_fos > 0.0);
    }

    #[test]
    fn a_range_gives_evenly_spaced_values_and_the_same_rows_as_a_list() {
        let s = study(
            "[[vary]]\npath = \"tripod.joint_stiffness_n_per_m\"\nrange = { start = 1.0e7, stop = 3.0e7, count = 3 }\n",
            "",
        );
        let VariableKind::Path { values, base, .. } = &s.variables[0].kind else { panic!() };
        assert_eq!(values, &[1.0e7, 2.0e7, 3.0e7]);
        assert_eq!(*base, 1.5e7);
        let rows = study_rows(&s, None).unwrap();
        // The base (1.5e7) is not among the values: it goes first.
        assert_eq!(rows.iter().map(|r| r.variant.as_str()).collect::<Vec<_>>()[0], BASE);
        assert_eq!(rows.len(), 4);
        let list = study("[[vary]]\npath = \"tripod.joint_stiffness_n_per_m\"\nvalues = [2.0e7]\n", "");
        let l = study_rows(&list, None).unwrap();
        let key = "tripod.joint_stiffness_n_per_m=20000000";
        assert_eq!(row(&rows, key).rms_arcsec.to_bits(), row(&l, key).rms_arcsec.to_bits());
        let log = study(
            "[[vary]]\npath = \"tripod.joint_stiffness_n_per_m\"\nrange = { start = 1.0e6, stop = 1.0e8, count = 3, spacing = \"log\" }\n",
            "",
        );
        let VariableKind::Path { values, .. } = &log.variables[0].kind else { panic!() };
        assert_eq!(values, &[1.0e6, 1.0e7, 1.0e8]);
        // The main effect of the joints on the first mode is the range over the three values.
        let sens = sensitivity(&s, &rows);
        let f = sens.iter().find(|x| x.outcome == "first_mode_hz").unwrap();
        let fs: Vec<f64> = ["10000000", "20000000", "30000000"]
            .iter()
            .map(|v| row(&rows, &format!("tripod.joint_stiffness_n_per_m={v}")).first_mode_hz)
            .collect();
        assert!(fs[0] < fs[1] && fs[1] < fs[2], "{fs:?}");
        assert!(close(f.range, fs[2] - fs[0], 1e-12));
    }

    #[test]
    fn a_grid_steps_from_start_to_stop_and_longer_legs_lower_the_first_mode() {
        let s = study(
            "[[vary]]\npath = \"tripod.leg_length_m\"\ngrid = { start = 1.0, stop = 1.4, step = 0.1 }\n",
            "",
        );
        let VariableKind::Path { values, .. } = &s.variables[0].kind else { panic!() };
        assert_eq!(values, &[1.0, 1.1, 1.2, 1.3, 1.4]);
        let rows = study_rows(&s, None).unwrap();
        assert_eq!(rows.len(), 6);
        assert_eq!(row(&rows, "tripod.leg_length_m=1.3").values, ["1.3"]);
        // Longer legs: softer in bending and axially (k ∝ 1/L, elementary mechanics), so the
        // first mode falls along the grid.
        let f: Vec<f64> =
            values.iter().map(|v| row(&rows, &format!("tripod.leg_length_m={v}")).first_mode_hz).collect();
        assert!(f.windows(2).all(|w| w[1] < w[0]), "{f:?}");
    }

    #[test]
    fn an_alternative_file_row_is_the_report_of_that_file() {
        let s = study(
            "[[vary]]\nrigs = [{ label = \"heavier tripod\", file = \"tripod-paver-heavy.toml\" }]\n",
            "",
        );
        let rows = study_rows(&s, None).unwrap();
        assert_eq!(rows.iter().map(|r| r.variant.as_str()).collect::<Vec<_>>(), [BASE, "rig=heavier tripod"]);
        let heavy = std::fs::read_to_string(examples().join("tripod-paver-heavy.toml")).unwrap();
        let (rms, f1) = report_rms(&heavy, &s.settings.grid);
        let r = &rows[1];
        assert!(close(r.rms_arcsec, rms, 1e-12), "{} vs {rms}", r.rms_arcsec);
        assert!(close(r.first_mode_hz, f1, 1e-12));
        assert_eq!(r.values, ["heavier tripod"]);
    }

    #[test]
    fn the_catalogue_variable_gives_the_sweep_rows() {
        let s = study("[[vary]]\npads = \"isolators.toml\"\n", "");
        let rows = study_rows(&s, None).unwrap();
        let cat = Catalogue::read(&examples().join("isolators.toml")).unwrap();
        assert_eq!(rows.len(), cat.isolators.len());
        assert_eq!(rows[0].variant, BASE);
        assert_eq!(rows[0].values, ["none"]);
        let file = ModelFile::read(&examples().join("tripod-paver.toml")).unwrap();
        let grounds = [GroundSource::Reference(ReferenceGround::Nhnm)];
        let inputs = SweepInputs { model: &file, catalogue: &cat, grounds: &grounds, winds: &[] };
        let sw = crate::batch::sweep_rows(
            &inputs,
            &SweepConfig::new().unwrap().with_grid(s.settings.grid.clone()),
        )
        .unwrap();
        for iso in cat.isolators.iter().filter(|i| !i.is_none()) {
            let a = row(&rows, &format!("pads={}", iso.name));
            let b = sw.iter().find(|r| r.spec == iso.name).unwrap();
            assert!(
                close(a.rms_arcsec, b.rms_arcsec, 1e-12),
                "{}: {} vs {}",
                iso.name,
                a.rms_arcsec,
                b.rms_arcsec
            );
            assert!(close(a.first_mode_hz, b.first_mode_hz, 1e-12));
            assert!(close(a.ratio_to_base, b.ratio_to_none, 1e-12));
        }
    }

    #[test]
    fn the_spring_variant_engine_gives_the_rebuilt_study_rows() {
        // Pads crossed with the leg length (a non-spring change of the tripod is a group of its
        // own) and a distance setting, on two recordings, calm and 4 m/s: every row from the
        // engine equals the row of a model built per variant.
        let text = |engine: &str| {
            format!(
                "model = \"tripod-paver.toml\"\n\
                 [[vary]]\npads = \"isolators.toml\"\n\
                 [[vary]]\npath = \"tripod.leg_length_m\"\nvalues = [1.1, 1.3]\n\
                 [[vary]]\nsetting = \"ground_distance_m\"\nvalues = [10]\n\
                 [disturbances]\ngrounds = [\"recordings/road-nearby.csv\", \"recordings/footsteps.csv\"]\n\
                 winds = [\"calm\", \"4\"]\n\
                 [settings]\nf_min_hz = 0.5\nf_max_hz = 60\nn_freq = 160\nground_measured_at_m = 5\n\
                 engine = \"{engine}\"\n"
            )
        };
        let fast = Study::load(&text("auto"), "s.toml", &examples()).unwrap();
        let slow = Study::load(&text("rebuild"), "s.toml", &examples()).unwrap();
        let mut p = PreparedStudy::new(&fast).unwrap();
        let all: Vec<usize> = (0..p.variants.len()).collect();
        p.use_spring_sets(&all);
        let n_iso = Catalogue::read(&examples().join("isolators.toml")).unwrap().isolators.len();
        // Every pad but "none" (feet on the ground, no spring) goes through the engine, for
        // both leg lengths, both grounds and both winds.
        assert_eq!(p.engine_rows(), (n_iso - 1) * 2 * 2 * 2, "engine rows");
        let (a, b) = (study_rows(&fast, None).unwrap(), study_rows(&slow, None).unwrap());
        assert_eq!(a.len(), b.len());
        let mut compared = 0;
        for (x, y) in a.iter().zip(&b) {
            assert_eq!((&x.key, &x.vs_base, &x.error), (&y.key, &y.vs_base, &y.error));
            for (u, v) in [
                (x.rms_arcsec, y.rms_arcsec),
                (x.rms_px, y.rms_px),
                (x.p_outside_half_px, y.p_outside_half_px),
                (x.ratio_to_base, y.ratio_to_base),
                (x.first_mode_hz, y.first_mode_hz),
                (x.gust_peak_px, y.gust_peak_px),
            ] {
                assert!(u == v || (u.is_nan() && v.is_nan()) || close(u, v, 1e-9), "{}: {u} vs {v}", x.key);
                compared += 1;
            }
        }
        assert!(compared > 100);
        // A part of the study gives the whole's rows, bit for bit.
        let part = study_rows_of(&fast, Some(&[3, 5]), None).unwrap();
        let per = a.len() / p.variants.len();
        for (i, r) in part.iter().enumerate() {
            let whole = &a[[3, 5][i / per] * per + i % per];
            assert_eq!(
                (r.key.as_str(), r.rms_arcsec.to_bits()),
                (whole.key.as_str(), whole.rms_arcsec.to_bits())
            );
        }
        // Unknown engines are refused by name.
        let e = Study::load(&text("fast"), "s.toml", &examples()).unwrap_err().to_string();
        assert!(e.contains("settings.engine"), "{e}");
    }

    #[test]
    fn crossed_is_the_product_paired_the_zip_and_unequal_pairs_are_refused() {
        let vary = "[[vary]]\npath = \"tripod.leg_length_m\"\nvalues = [1.1, 1.4]\n\
                    [[vary]]\npath = \"mount.tilt_stiffness_nm_per_rad\"\nvalues = [1.5e4, 3.0e4]\n";
        let crossed = study(vary, "combine = \"crossed\"");
        let v = variants(&crossed);
        assert_eq!(v.len(), 5); // base first (neither value is the file's) and 2 × 2
        assert_eq!(v[0].label, BASE);
        assert_eq!(v[2].label, "tripod.leg_length_m=1.1, mount.tilt_stiffness_nm_per_rad=30000");
        let paired = study(vary, "combine = \"paired\"");
        let vp = variants(&paired);
        assert_eq!(
            vp.iter().map(|x| x.label.as_str()).collect::<Vec<_>>(),
            [
                BASE,
                "tripod.leg_length_m=1.1, mount.tilt_stiffness_nm_per_rad=15000",
                "tripod.leg_length_m=1.4, mount.tilt_stiffness_nm_per_rad=30000",
            ]
        );
        let rc = study_rows(&crossed, None).unwrap();
        let rp = study_rows(&paired, None).unwrap();
        for r in &rp {
            let c = row(&rc, &r.variant);
            assert_eq!(format!("{c:?}"), format!("{r:?}"));
        }
        // Both variables move the image: the mount's tilt spring and the legs.
        let sens = sensitivity(&crossed, &rc);
        assert!(sens.iter().filter(|x| x.outcome == "rms_px").all(|x| x.range > 0.0));
        let ex = examples();
        let text = "model = \"tripod-paver.toml\"\ncombine = \"paired\"\n[[vary]]\npath = \"tripod.leg_length_m\"\nvalues = [1.1, 1.4]\n\
             [[vary]]\npads = \"isolators.toml\"\n[disturbances]\ngrounds = [\"nhnm\"]\n";
        let e = Study::load(text, "s.toml", &ex).unwrap_err();
        assert!(matches!(e, Error::ShapeMismatch { .. }), "{e}");
        assert!(e.to_string().contains("paired") && e.to_string().contains("pads"), "{e}");
    }

    #[test]
    fn a_bad_variant_is_an_error_row_and_the_rest_finish() {
        let s = study(
            "[[vary]]\npath = \"tripod.leg_length_m\"\nvalues = [1.1, -1.0]\n\
             [[vary]]\nrigs = [{ label = \"generic\", file = \"tripod-paver-generic.toml\" }]\n",
            "",
        );
        let rows = study_rows(&s, None).unwrap();
        assert_eq!(rows.len(), 5);
        let bad = row(&rows, "tripod.leg_length_m=-1, rig=base");
        let msg = bad.error.as_deref().unwrap();
        assert!(msg.contains("leg_length"), "{msg}");
        assert!(bad.rms_arcsec.is_nan() && bad.fields()[4 + 2] == "error");
        // The generic-layer file has no tripod.leg_length_m: its variants fail naming the path.
        let missing = row(&rows, "tripod.leg_length_m=1.1, rig=generic");
        assert!(missing.error.as_deref().unwrap().contains("tripod.leg_length_m"), "{:?}", missing.error);
        let good = row(&rows, "tripod.leg_length_m=1.1, rig=base");
        assert!(good.error.is_none() && good.rms_arcsec > 0.0);
        assert_eq!(rows.iter().filter(|r| r.is_error()).count(), 3);
    }

    #[test]
    fn resume_after_a_torn_tail_equals_the_uninterrupted_file() {
        let dir = tmpdir("resume");
        let ex = examples();
        let text = format!(
            "model = \"{m}\"\n[[vary]]\npath = \"tripod.leg_length_m\"\nvalues = [1.1, 1.4]\n\
             [[vary]]\npads = \"{c}\"\n[disturbances]\ngrounds = [\"nhnm\", \"nlnm\"]\nwinds = [\"calm\", \"4\"]\n\
             [settings]\nf_min_hz = 0.5\nf_max_hz = 60\nn_freq = 120\n",
            m = ex.join("tripod-paver.toml").display(),
            c = ex.join("isolators.toml").display()
        );
        let s = Study::load(&text, "resume.toml", &dir).unwrap();
        let full = dir.join("full.csv");
        let a = run_study(&s, &full, false, None, &|_| {}).unwrap();
        let n_iso = Catalogue::read(&ex.join("isolators.toml")).unwrap().isolators.len();
        assert_eq!(a.rows.len(), (1 + 2 * n_iso) * 4);
        assert_eq!(a.computed, a.rows.len());
        let bytes = std::fs::read_to_string(&full).unwrap();
        // The file is the in-memory rows, rounded.
        assert_eq!(study_csv_text(&s, &study_rows(&s, Some(1)).unwrap()).unwrap(), bytes);
        // Windy rows carry the gust family, calm rows none.
        let windy = a.rows.iter().find(|r| r.wind != "calm" && !r.is_error()).unwrap();
        assert!(windy.gust_peak_px > 0.0);
        assert!(a.rows.iter().filter(|r| r.wind == "calm").all(|r| r.gust_peak_px.is_nan()));
        let lines: Vec<&str> = bytes.lines().collect();
        let part = dir.join("part.csv");
        let torn = format!("{}\n{}", lines[..10].join("\n"), &lines[10][..lines[10].len() / 2]);
        std::fs::write(crate::io::atomic::partial_path(&part), torn).unwrap();
        let b = run_study(&s, &part, true, None, &|_| {}).unwrap();
        assert_eq!(b.kept, 9);
        assert_eq!(b.computed, a.rows.len() - 9);
        assert_eq!(std::fs::read_to_string(&part).unwrap(), bytes);
        // (Debug text: NaN fields compare equal as text.)
        assert_eq!(format!("{:?}", b.rows), format!("{:?}", a.rows));
        // The summary ranks every disturbance; the base reads "base".
        assert_eq!(a.summary.per_disturbance.len(), 4);
        let calm = &a.summary.per_disturbance[0];
        assert!(calm.entries.windows(2).all(|w| w[0].rms_px <= w[1].rms_px));
        assert!(calm.entries.iter().any(|e| e.vs_base == BASE));
    }

    #[test]
    fn study_files_are_checked() {
        let ex = examples();
        let load = |t: &str| Study::load(t, "bad.toml", &ex).unwrap_err();
        let g = "[disturbances]\ngrounds = [\"nhnm\"]\n";
        let e = load(&format!("model = \"tripod-paver.toml\"\nvariable = 3\n{g}"));
        assert!(matches!(e, Error::Parse { .. }) && e.to_string().contains("line 2"), "{e}");
        let e = load(&format!(
            "model = \"tripod-paver.toml\"\n[[vary]]\npath = \"tripod.leg_length_m\"\nvalues = [1.0]\ngrid = {{ start = 1, stop = 2, step = 1 }}\n{g}"
        ));
        assert!(e.to_string().contains("exactly one of values, range or grid"), "{e}");
        let e = load(&format!(
            "model = \"tripod-paver.toml\"\n[[vary]]\npath = \"tripod.no_such\"\nvalues = [1.0]\n{g}"
        ));
        assert!(matches!(e, Error::UnknownName { .. }) && e.to_string().contains("tripod.no_such"), "{e}");
        let e = load(&format!("model = \"missing.toml\"\n{g}"));
        assert!(matches!(e, Error::Io { .. }) && e.to_string().contains("missing.toml"), "{e}");
        let e = load(&format!("model = \"tripod-paver.toml\"\ncombine = \"zipped\"\n{g}"));
        assert!(e.to_string().contains("crossed or paired"), "{e}");
        let e = load("model = \"tripod-paver.toml\"\n[disturbances]\ngrounds = []\n");
        assert!(e.to_string().contains("at least one ground"), "{e}");
    }

    /// A study of an example `model` on NHNM (calm) on the small grid, `settings` added to
    /// `[settings]`.
    fn study_with(model: &str, vary: &str, settings: &str) -> Result<Study> {
        let text = format!(
            "model = \"{model}\"\n{vary}\n[disturbances]\ngrounds = [\"nhnm\"]\n\
             [settings]\nf_min_hz = 0.5\nf_max_hz = 60\nn_freq = 160\n{settings}\n"
        );
        Study::load(&text, "test-study.toml", &examples())
    }

    #[test]
    fn standing_tilt_rows_are_the_people_module_and_grow_with_the_distance() {
        let s = study_with(
            "tripod-deck.toml",
            "[[vary]]\nsetting = \"person_distance_m\"\nvalues = [0.5, 1, 1.5, 2, 3]\n",
            "person_kg = 80",
        )
        .unwrap();
        let rows = study_rows(&s, None).unwrap();
        // 1 m is the default distance: that variant is the base.
        assert_eq!(rows.len(), 5);
        assert_eq!(row(&rows, BASE).values, ["1"]);
        let file = ModelFile::read(&examples().join("tripod-deck.toml")).unwrap();
        let model = Model::from_spec(&file.expanded().unwrap()).unwrap();
        let deck = file.rig.floor.as_ref().unwrap().body().to_string();
        let w = 80.0 * crate::people::STANDARD_GRAVITY_M_S2;
        let ds = [0.5, 1.0, 1.5, 2.0, 3.0];
        let table = crate::people::standing_tilt(&model, &deck, w, &ds, None, 0.5).unwrap();
        for (r, t) in rows.iter().zip(&table.rows) {
            assert_eq!(r.values[0], format!("{}", t.distance_m));
            assert!(
                close(r.standing_tilt_arcsec, t.image_arcsec, 1e-12),
                "{} vs {}",
                r.standing_tilt_arcsec,
                t.image_arcsec
            );
            assert!(close(r.standing_tilt_px, t.image_px, 1e-12));
            // The person does not change the dynamics: the image RMS is the base's.
            assert!(close(r.rms_arcsec, rows[0].rms_arcsec, 1e-15));
        }
        // A rigid deck rocking on springs tilts by W d / k_rock (statics of a rigid body on a
        // rotational spring, e.g. any strength-of-materials text): the tilt grows with the
        // distance from the stand, it does not fall. The demo deck: k_rock = 5e6 N m/rad.
        for p in rows.windows(2) {
            assert!(p[1].standing_tilt_arcsec > p[0].standing_tilt_arcsec);
        }
        for t in &table.rows {
            let hand = w * t.distance_m / 5.0e6 * crate::units::ARCSEC_PER_RAD;
            assert!(close(t.deck_tilt_arcsec, hand, 0.02), "deck {} vs hand {hand}", t.deck_tilt_arcsec);
        }
        // Practitioner's reading: 80 kg 1 m away tilts the deck by some 30 arcsec.
        assert!(row(&rows, BASE).standing_tilt_arcsec > 1.0 && row(&rows, BASE).standing_tilt_arcsec < 300.0);
        // The CSV round trip keeps the columns.
        let text = study_csv_text(&s, &rows).unwrap();
        assert!(text.lines().next().unwrap().contains("standing_tilt_arcsec,standing_tilt_px,error"));
    }

    #[test]
    fn standing_tilt_is_empty_without_a_deck_and_a_person() {
        let s = study_with("tripod-paver.toml", "", "person_kg = 80\nperson_distance_m = 2").unwrap();
        let rows = study_rows(&s, None).unwrap();
        assert!(rows[0].error.is_none());
        assert!(rows[0].standing_tilt_arcsec.is_nan() && rows[0].standing_tilt_px.is_nan());
        let fields = rows[0].fields();
        let cols = study_columns(&s);
        let i = cols.iter().position(|c| c == "standing_tilt_px").unwrap();
        assert_eq!(fields[i], "");
        let s = study_with("tripod-deck.toml", "", "").unwrap();
        assert_eq!(s.settings.person_kg, None);
        assert!(study_rows(&s, None).unwrap()[0].standing_tilt_arcsec.is_nan());
    }

    #[test]
    fn ground_distance_rows_are_the_carried_report_and_fall_with_the_distance() {
        let s = study_with(
            "tripod-paver.toml",
            "[[vary]]\nsetting = \"ground_distance_m\"\nvalues = [5, 10, 20, 40]\n",
            "ground_measured_at_m = 5",
        )
        .unwrap();
        let rows = study_rows(&s, None).unwrap();
        assert_eq!(rows.len(), 4);
        assert_eq!(rows[0].variant, BASE);
        let file = ModelFile::read(&examples().join("tripod-paver.toml")).unwrap();
        for (r, d) in rows.iter().zip([5.0, 10.0, 20.0, 40.0]) {
            let mut o = ReportOptions::new().unwrap();
            o.grid = s.settings.grid.clone();
            o.ground = Some(GroundSource::Reference(ReferenceGround::Nhnm));
            o.ground_path = Some(crate::distance_attenuation::GroundPathSpec {
                from_m: 5.0,
                to_m: d,
                spreading: crate::distance_attenuation::SURFACE_WAVE_SPREADING,
                loss_factor: crate::distance_attenuation::DEFAULT_SOIL_LOSS_FACTOR,
                wave_speed_m_s: None,
            });
            let rep = build_file_report(&file, &o).unwrap();
            assert!(
                close(r.rms_arcsec, rep.image.rms_arcsec, 1e-12),
                "{d} m: {} vs {}",
                r.rms_arcsec,
                rep.image.rms_arcsec
            );
            // The report took the site's phase velocity (150 m/s in the demo file).
            assert!(rep.notes.iter().any(|n| n.contains("c 150 m/s")), "{:?}", rep.notes);
        }
        // Spreading and damping only take away: every farther row is smaller.
        for p in rows.windows(2) {
            assert!(p[1].rms_arcsec < p[0].rms_arcsec, "{} !< {}", p[1].rms_arcsec, p[0].rms_arcsec);
        }
        // At the measured distance nothing is carried: the plain report.
        let mut o = ReportOptions::new().unwrap();
        o.grid = s.settings.grid.clone();
        o.ground = Some(GroundSource::Reference(ReferenceGround::Nhnm));
        assert!(close(rows[0].rms_arcsec, build_file_report(&file, &o).unwrap().image.rms_arcsec, 1e-12));
        // Spreading alone bounds the fall: (5/40)^0.5 = 0.354 in amplitude, damping lowers it more.
        assert!(rows[3].ratio_to_base < (5.0f64 / 40.0).sqrt());
    }

    #[test]
    fn a_fixed_ground_distance_and_given_soil_carry_every_row() {
        let s = study_with(
            "tripod-paver.toml",
            "",
            "ground_measured_at_m = 5\nground_distance_m = 25\nground_waves = \"body\"\nsoil_loss_factor = 0.06\nsoil_wave_speed_m_s = 300",
        )
        .unwrap();
        let rows = study_rows(&s, None).unwrap();
        let file = ModelFile::read(&examples().join("tripod-paver.toml")).unwrap();
        let mut o = ReportOptions::new().unwrap();
        o.grid = s.settings.grid.clone();
        o.ground = Some(GroundSource::Reference(ReferenceGround::Nhnm));
        o.ground_path = Some(crate::distance_attenuation::GroundPathSpec {
            from_m: 5.0,
            to_m: 25.0,
            spreading: crate::distance_attenuation::BODY_WAVE_SPREADING,
            loss_factor: 0.06,
            wave_speed_m_s: Some(300.0),
        });
        let rep = build_file_report(&file, &o).unwrap();
        assert!(close(rows[0].rms_arcsec, rep.image.rms_arcsec, 1e-12));
    }

    #[test]
    fn people_and_ground_settings_are_checked() {
        let err = |vary: &str, set: &str| study_with("tripod-deck.toml", vary, set).unwrap_err().to_string();
        let e = err("[[vary]]\nsetting = \"ground_distance_m\"\nvalues = [5, 10]\n", "");
        assert!(e.contains("ground_measured_at_m"), "{e}");
        let e = err("", "ground_distance_m = 10");
        assert!(e.contains("ground_measured_at_m"), "{e}");
        let e = err("[[vary]]\nsetting = \"wind_speed\"\nvalues = [5, 10]\n", "");
        assert!(e.contains("person_distance_m"), "{e}");
        let e = err(
            "[[vary]]\nsetting = \"person_distance_m\"\nvalues = [1]\n[[vary]]\nsetting = \"person_distance_m\"\nname = \"d2\"\nvalues = [2]\n",
            "",
        );
        assert!(e.contains("varied twice"), "{e}");
        let e = err("[[vary]]\nsetting = \"person_distance_m\"\nvalues = [-1, 1]\n", "");
        assert!(e.contains("person_distance_m"), "{e}");
        let e =
            err("[[vary]]\nsetting = \"ground_distance_m\"\nvalues = [0, 1]\n", "ground_measured_at_m = 5");
        assert!(e.contains("ground_distance_m"), "{e}");
        let e = err("", "person_kg = 0");
        assert!(e.contains("person_kg"), "{e}");
        let e = err("", "ground_measured_at_m = 5\nground_waves = \"sideways\"");
        assert!(e.contains("surface"), "{e}");
        // A person variable alone brings the default 75 kg person.
        let s = study_with(
            "tripod-deck.toml",
            "[[vary]]\nsetting = \"person_distance_m\"\nvalues = [1, 2]\n",
            "",
        )
        .unwrap();
        assert_eq!(s.settings.person_kg, Some(crate::people::DEFAULT_BODY_MASS_KG));
    }

    #[test]
    fn a_cold_night_study_is_the_cold_sweep() {
        let s = study_with(
            "tripod-paver.toml",
            "[[vary]]\npads = \"isolators-cold.toml\"\n",
            "temperature_c = -15",
        )
        .unwrap();
        let rows = study_rows(&s, None).unwrap();
        let cat = Catalogue::read(&examples().join("isolators-cold.toml")).unwrap();
        let file = ModelFile::read(&examples().join("tripod-paver.toml")).unwrap();
        let grounds = [GroundSource::Reference(ReferenceGround::Nhnm)];
        let inputs = SweepInputs { model: &file, catalogue: &cat, grounds: &grounds, winds: &[] };
        let cfg = SweepConfig::new().unwrap().with_grid(s.settings.grid.clone());
        let cold = crate::batch::sweep_rows(&inputs, &cfg.clone().with_temperature_c(-15.0)).unwrap();
        let warm = crate::batch::sweep_rows(&inputs, &cfg).unwrap();
        let mut n = 0;
        for iso in cat.isolators.iter().filter(|i| !i.is_none()) {
            let a = row(&rows, &format!("pads={}", iso.name));
            // Away from 20 °C the sweep's row names the temperature.
            let b = cold.iter().find(|r| r.spec == format!("{} at -15 °C", iso.name)).unwrap();
            let c = warm.iter().find(|r| r.spec == iso.name).unwrap();
            assert!(
                close(a.rms_arcsec, b.rms_arcsec, 1e-12),
                "{}: {} vs {}",
                iso.name,
                a.rms_arcsec,
                b.rms_arcsec
            );
            assert!(close(a.first_mode_hz, b.first_mode_hz, 1e-12));
            // The table's factor 2.85 at -15 °C (between 3.5 at -20 and 2.2 at -10) stiffens the
            // pad: the cold first mode is above the 20 °C one.
            assert!(a.first_mode_hz > c.first_mode_hz, "{} vs {}", a.first_mode_hz, c.first_mode_hz);
            n += 1;
        }
        assert!(n > 0);
    }

    #[test]
    fn the_deck_and_road_example_runs_and_reads_as_a_practitioner_expects() {
        let s = Study::read(&examples().join("study-deck-and-road.toml")).unwrap();
        let rows = study_rows(&s, None).unwrap();
        assert_eq!(rows.len(), 20);
        assert!(rows.iter().all(|r| r.error.is_none()));
        // 80 kg 1 m from the stand on a deck rocking at 5e6 N m/rad: W d / k = 784.5 / 5e6 rad
        // = 32.4 arcsec (the rigid-deck statics above); the stand turns with the deck.
        let b = row(&rows, BASE);
        let hand = 80.0 * crate::people::STANDARD_GRAVITY_M_S2 / 5.0e6 * crate::units::ARCSEC_PER_RAD;
        assert!(close(b.standing_tilt_arcsec, hand, 0.02), "{} vs {hand}", b.standing_tilt_arcsec);
        // Moving away from the road lowers the image RMS at every standing distance.
        for d in ["0.25", "3"] {
            let at: Vec<f64> = ["5", "10", "20", "40"]
                .iter()
                .map(|g| rows.iter().find(|r| r.values == [d, *g]).unwrap().rms_px)
                .collect();
            assert!(at.windows(2).all(|p| p[1] < p[0]), "{d}: {at:?}");
        }
    }
}

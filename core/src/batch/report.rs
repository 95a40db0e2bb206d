//! The one-model report: modes, image motion, transmissibility, ground spectra against the
//! reference models and criterion curves. Everything the command line prints or plots comes
//! from [`build_report`].

use super::ground::{GroundSource, GroundSpectrum};
use super::gust::{GUST_START_S, GustCase, GustFamily, GustPlan, gust_family_responses, gust_family_with};
use crate::assembly::ModelSpec;
use crate::distance_attenuation::{GroundPath, GroundPathSpec};
use crate::error::{Error, Result};
use crate::grid::FreqGrid;
use crate::guider::GuideLoop;
use crate::image::{Guiding, ImageMotion, ImageOptions};
use crate::io::series::SeriesOptions;
use crate::model::{GROUND_INPUTS, Model};
use crate::people::{FootfallSteady, PassOptions, PassSummary, StandingTable, Walker};
use crate::response::Disturbances;
use crate::schema::ModelFile;
use crate::skymap::{SkyGrid, SkyMap, sky_map};
use crate::spectrum::{CriterionCurve, Extrapolate, Quantity, ReferenceGround};
use crate::tonal::{ToneImage, ToneLine, tone_image};
use crate::transient::ImageTransient;
use crate::units::ARCSEC_PER_RAD;
use crate::wind::WindSpec;
use serde::Serialize;

/// Settings of a report. Optics overrides replace the model's `[optics]` values.
#[derive(Debug, Clone)]
#[non_exhaustive]
pub struct ReportOptions {
    pub grid: FreqGrid,
    /// None: Peterson's NHNM (a noisy site) unless wind alone is wanted (`ground_off`).
    pub ground: Option<GroundSource>,
    /// No ground motion at all (wind only).
    pub ground_off: bool,
    pub ground_scale: [f64; 3],
    pub series: SeriesOptions,
    pub wind: Option<WindSpec>,
    pub focal_length_mm: Option<f64>,
    pub pixel_um: Option<f64>,
    pub altitude_deg: Option<f64>,
    pub azimuth_deg: Option<f64>,
    pub seeing_fwhm_arcsec: Option<f64>,
    pub exposure_s: Option<f64>,
    /// Guide with a pure integrator (guide exposure = cadence, latency 0).
    pub guide: Option<Guiding>,
    /// Guide with a full loop (give this or `guide`).
    pub guide_loop: Option<GuideLoop>,
    /// Clear aperture (mm) and wavelength (nm) for the budget's diffraction line.
    pub aperture_mm: Option<f64>,
    pub wavelength_nm: Option<f64>,
    /// Alternative rigs (label, generic-layer spec) whose gust response is shown beside the
    /// rig's: e.g. without pads, or each pad of a catalogue ([`super::pad_alternatives`]).
    pub alternatives: Vec<(String, ModelSpec)>,
    /// Wind from this azimuth (deg from north through east): replaces the direction of the
    /// model's `[wind]` load.
    pub wind_from_deg: Option<f64>,
    /// Add a sky map ([`crate::skymap`]) on this grid, or on the file's default grid when
    /// `Some(None)`; needs the model file ([`build_file_report`]).
    pub sky_map: Option<Option<SkyGrid>>,
    /// The person of the "people on the deck" section (a model file with a `[floor]`).
    pub people: PeopleOptions,
    /// Tonal disturbance lines carried to the image at their own frequencies ([`crate::tonal`]).
    pub tones: Vec<ToneLine>,
    /// Carry the ground spectrum and the ground-translation tonal lines from the distance they
    /// were measured at to the rig's ([`crate::distance_attenuation`]); without a wave speed it
    /// takes the site's phase velocity from the model.
    pub ground_path: Option<GroundPathSpec>,
    /// The sensor that made the ground recording, by noise-curve name
    /// ([`crate::sensor_response::NOISE_CURVES`]): the report notes where the recorded spectrum
    /// sits at its noise floor.
    pub sensor: Option<String>,
}

/// Settings of the report's people section ([`crate::people`]).
#[derive(Debug, Clone, PartialEq)]
pub struct PeopleOptions {
    pub walker: Walker,
    /// Where the walker treads (x, y in m from the stand's axis).
    pub walk_at_m: [f64; 2],
    pub pass: PassOptions,
    /// Distances of the standing table (m) and its image limit (px).
    pub distances_m: Vec<f64>,
    pub limit_px: f64,
}

impl PeopleOptions {
    /// A 75 kg walker at 2 Hz (fixed load factors) one metre east of the stand; the standing
    /// table at [`crate::people::DEFAULT_DISTANCES_M`] against ½ px.
    pub fn new() -> Result<PeopleOptions> {
        Ok(PeopleOptions {
            walker: Walker::of_mass(crate::people::DEFAULT_BODY_MASS_KG)?,
            walk_at_m: [crate::people::DEFAULT_WALK_DISTANCE_M, 0.0],
            pass: PassOptions::default(),
            distances_m: crate::people::DEFAULT_DISTANCES_M.to_vec(),
            limit_px: crate::people::DEFAULT_LIMIT_PX,
        })
    }
}

/// The people section: a walking pass, the steady footfall lines, the standing table.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PeopleReport {
    pub deck: String,
    pub walker: Walker,
    pub walking: PassSummary,
    pub steady: FootfallSteady,
    pub standing: StandingTable,
}

/// The people section of a model file with a `[floor]` (its pointing as written; the optics
/// overrides of `o` applied).
pub fn file_people_report(file: &ModelFile, o: &ReportOptions) -> Result<PeopleReport> {
    let deck = file.rig.floor.as_ref().map(|f| f.body().to_string()).ok_or_else(|| {
        Error::invalid("floor", "the model file has no [floor] (deck) for people to stand on")
    })?;
    let mut spec = file.expanded()?;
    apply_optics_overrides(&mut spec, o)?;
    people_report(&Model::from_spec(&spec)?, &deck, &o.people)
}

/// The people section for `deck` (errors name what could not be run).
fn people_report(model: &Model, deck: &str, o: &PeopleOptions) -> Result<PeopleReport> {
    use crate::people::{footfall_steady, standing_tilt, walking_pass};
    Ok(PeopleReport {
        deck: deck.to_string(),
        walker: o.walker,
        walking: walking_pass(model, deck, &o.walker, o.walk_at_m, &o.pass)?.summary,
        steady: footfall_steady(model, deck, &o.walker, o.walk_at_m)?,
        standing: standing_tilt(model, deck, o.walker.weight_n, &o.distances_m, None, o.limit_px)?,
    })
}

impl ReportOptions {
    /// 0.2–100 Hz, 600 log-spaced points, no overrides.
    pub fn new() -> Result<ReportOptions> {
        Ok(ReportOptions {
            grid: FreqGrid::log(0.2, 100.0, 600)?,
            ground: None,
            ground_off: false,
            ground_scale: [1.0; 3],
            series: SeriesOptions::default(),
            wind: None,
            focal_length_mm: None,
            pixel_um: None,
            altitude_deg: None,
            azimuth_deg: None,
            seeing_fwhm_arcsec: None,
            exposure_s: None,
            guide: None,
            guide_loop: None,
            aperture_mm: None,
            wavelength_nm: None,
            alternatives: Vec::new(),
            wind_from_deg: None,
            sky_map: None,
            people: PeopleOptions::new()?,
            tones: Vec::new(),
            ground_path: None,
            sensor: None,
        })
    }
}

/// One mode of the table.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ModeRow {
    /// 1-based.
    pub index: usize,
    pub frequency_hz: f64,
    pub damping_ratio: f64,
    /// The DOF with the largest kinetic-energy share, e.g. `payload:rx`.
    pub dominant_dof: String,
    /// The mode in the mount's own axes, e.g. `payload: altitude nod` ([`crate::modes::Modes::label`]).
    pub label: String,
    /// Share of the image mean square (radial) carried by this mode; None when the report's
    /// image motion has no per-mode split.
    pub image_share: Option<f64>,
    /// Kinetic-energy shares per body and strain-energy shares per connector (largest first,
    /// the first three each): which part moves and which part flexes.
    pub moving: Vec<(String, f64)>,
    pub flexing: Vec<(String, f64)>,
    /// Effective modal mass for ground x, y, z (kg).
    pub effective_mass_kg: [f64; 3],
}

/// A curve over the report's grid (or its own frequencies).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Curve {
    pub label: String,
    pub freq_hz: Vec<f64>,
    pub values: Vec<f64>,
}

/// A criterion verdict on the ground spectrum (worst axis).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CriterionVerdict {
    pub curve: String,
    pub level_um_s: f64,
    /// Largest band RMS velocity / limit over the axes and bands.
    pub worst_ratio: f64,
    pub worst_band_hz: f64,
    pub worst_axis: String,
    pub passes: bool,
}

/// Everything a report shows.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Report {
    pub dof_count: usize,
    pub optics_body: String,
    /// Names of the two image axes with their sky directions: "image_x (az)", "image_y (alt)"
    /// on an alt-azimuth pointing, "image_x (RA)", "image_y (Dec)" on an equatorial one.
    pub image_axes: [String; 2],
    pub ground_label: Option<String>,
    pub wind: Option<String>,
    pub modes: Vec<ModeRow>,
    pub image: ImageMotion,
    /// |payload translation / ground translation| per ground axis (dimensionless).
    pub transmissibility: Vec<Curve>,
    /// |image motion / ground displacement| per ground axis and image axis (arcsec/µm).
    pub image_per_ground_arcsec_per_um: Vec<Curve>,
    /// Ground acceleration PSD per excited axis ((m/s²)²/Hz), on the analysis grid.
    pub ground_accel_psd: Vec<Curve>,
    /// NLNM and NHNM ((m/s²)²/Hz) on the part of the grid up to 10 Hz.
    pub reference_accel_psd: Vec<Curve>,
    /// Criterion curves VC-A … VC-E as equivalent acceleration PSDs ((m/s²)²/Hz): the band limit
    /// v spread over its third-octave band, (2πf)² v² / (0.2316 f) (band width of a base-10
    /// third octave, 10^(1/20) − 10^(−1/20) = 0.2316 of the centre).
    pub criterion_accel_psd: Vec<Curve>,
    pub criteria: Vec<CriterionVerdict>,
    /// The wind case's gust family: worst peak and ring-down, for the rig and its alternatives.
    pub gust: Option<GustReport>,
    /// Image RMS over the sky, when asked for ([`ReportOptions::sky_map`]).
    pub sky_map: Option<SkyMap>,
    /// A person walking and standing on the deck, when the model file has a `[floor]`.
    pub people: Option<PeopleReport>,
    /// The image motion of the tonal lines, when given ([`ReportOptions::tones`]).
    pub tones: Option<ToneImage>,
    pub notes: Vec<String>,
}

/// The gust family's outcome (see [`super::gust`]) for the rig and its alternatives.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GustReport {
    /// Time of each gust's start in the records (s).
    pub start_s: f64,
    /// The rig as given: every gust of its family.
    pub family: GustFamily,
    /// Worst peak and ring-down of the rig (first) and each alternative, each over its own family.
    pub rigs: Vec<GustOutcome>,
    /// The rig's worst-ring-down gust applied to the rig (first) and each alternative.
    pub traces: Vec<GustTrace>,
}

/// Worst peak and ring-down of one rig over its gust family.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GustOutcome {
    pub label: String,
    pub worst_peak_px: f64,
    pub worst_peak_duration_s: f64,
    /// None: some gust leaves the image outside ½ px past the record.
    pub worst_ringdown_s: Option<f64>,
    pub worst_ringdown_duration_s: f64,
    /// Why the family could not be run for this rig (then the numbers are NaN).
    pub error: Option<String>,
}

/// The image history of one rig under one gust.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GustTrace {
    pub label: String,
    pub duration_s: f64,
    pub amplitude_m_s: f64,
    pub time_s: Vec<f64>,
    pub image_x_px: Vec<f64>,
    pub image_y_px: Vec<f64>,
    pub peak_px: f64,
    /// From the end of the gust until the image stays within ½ px; None if it never does.
    pub ringdown_s: Option<f64>,
}

impl GustOutcome {
    fn of(label: &str, f: &GustFamily) -> GustOutcome {
        let (p, r) = (&f.cases[f.worst_peak], &f.cases[f.worst_ringdown]);
        GustOutcome {
            label: label.into(),
            worst_peak_px: p.peak_px,
            worst_peak_duration_s: p.duration_s,
            worst_ringdown_s: r.ringdown_s,
            worst_ringdown_duration_s: r.duration_s,
            error: None,
        }
    }
    fn failed(label: &str, e: &Error) -> GustOutcome {
        GustOutcome {
            label: label.into(),
            worst_peak_px: f64::NAN,
            worst_peak_duration_s: f64::NAN,
            worst_ringdown_s: None,
            worst_ringdown_duration_s: f64::NAN,
            error: Some(e.to_string()),
        }
    }
}

fn gust_trace(label: &str, case: &GustCase, r: &ImageTransient) -> GustTrace {
    let px = |v: &[f64]| v.iter().map(|a| a / r.plate_scale_arcsec_per_px).collect();
    GustTrace {
        label: label.into(),
        duration_s: case.duration_s,
        amplitude_m_s: case.amplitude_m_s,
        time_s: r.time_s.clone(),
        image_x_px: px(&r.image_x_arcsec),
        image_y_px: px(&r.image_y_arcsec),
        peak_px: case.peak_px,
        ringdown_s: case.ringdown_s,
    }
}

/// The gust family of the rig and of each alternative (built with the report's optics).
fn gust_report(
    model: &Model,
    wind: &WindSpec,
    alternatives: &[(String, ModelSpec)],
    o: &ReportOptions,
) -> Result<GustReport> {
    let (family, traces) = gust_family_responses(model, wind)?;
    let worst = family.worst_ringdown;
    let own = GUST_RIG_LABEL;
    let mut rigs = vec![GustOutcome::of(own, &family)];
    let mut plotted = vec![gust_trace(own, &family.cases[worst], &traces[worst])];
    let plot_plan = GustPlan {
        durations_s: vec![family.cases[worst].duration_s],
        fs_hz: family.fs_hz,
        record_s: family.record_s,
    };
    for (label, spec) in alternatives {
        let run = || -> Result<(GustFamily, GustTrace)> {
            let mut spec = spec.clone();
            apply_optics_overrides(&mut spec, o)?;
            let m = Model::from_spec(&spec)?;
            let (f, _) = gust_family_responses(&m, wind)?;
            let (g, t) = gust_family_with(&m, wind, &plot_plan)?;
            Ok((f, gust_trace(label, &g.cases[0], &t[0])))
        };
        match run() {
            Ok((f, t)) => {
                rigs.push(GustOutcome::of(label, &f));
                plotted.push(t);
            }
            Err(e) => rigs.push(GustOutcome::failed(label, &e)),
        }
    }
    // Keep the part of the records that shows something: to 1 s after the longest ring-down.
    let ring = plotted.iter().filter_map(|t| t.ringdown_s).fold(0.0, f64::max);
    let end = GUST_START_S + plot_plan.durations_s[0] + (ring + 1.0).max(2.0);
    for t in &mut plotted {
        let n = t.time_s.partition_point(|x| *x <= end);
        t.time_s.truncate(n);
        t.image_x_px.truncate(n);
        t.image_y_px.truncate(n);
    }
    Ok(GustReport { start_s: GUST_START_S, family, rigs, traces: plotted })
}

/// Label of the rig as given in the gust table and plot.
pub const GUST_RIG_LABEL: &str = "as given";

impl Report {
    /// The mode with the largest share of the image mean square, with its frequency.
    /// The label names the mode in the mount's axes, e.g. "mode 3 (payload: altitude nod)".
    pub fn dominant_mode(&self) -> Option<(String, f64, f64)> {
        self.image.dominant_mode().map(|m| {
            let named = self
                .modes
                .iter()
                .find(|r| format!("mode {}", r.index) == m.label)
                .map_or(m.label.clone(), |r| format!("{} ({})", m.label, r.label));
            (named, m.frequency_hz, m.share)
        })
    }

    /// Blur FWHM of all the motion along x and y (2.35482 σ of each axis, arcsec) and the
    /// seeing. (Before, this was 2.35482 × the radial RMS: √2 too large for round motion.)
    pub fn blur_vs_seeing(&self) -> ([f64; 2], Option<f64>) {
        (self.image.blur_fwhm_arcsec, self.image.seeing_fwhm_arcsec)
    }
}

/// Apply optics overrides to a spec.
pub fn apply_optics_overrides(spec: &mut ModelSpec, o: &ReportOptions) -> Result<()> {
    let any = o.focal_length_mm.is_some()
        || o.pixel_um.is_some()
        || o.altitude_deg.is_some()
        || o.azimuth_deg.is_some()
        || o.seeing_fwhm_arcsec.is_some()
        || o.aperture_mm.is_some()
        || o.wavelength_nm.is_some();
    let Some(op) = spec.optics.as_mut() else {
        return Err(Error::invalid(
            "optics",
            if any {
                "the model has no [optics] section to override (it needs the body carrying the optics)"
            } else {
                "the model has no [optics] section; image motion needs one"
            },
        ));
    };
    if let Some(v) = o.focal_length_mm {
        op.focal_length_mm = v;
    }
    if let Some(v) = o.pixel_um {
        op.pixel_um = v;
    }
    if let Some(v) = o.altitude_deg {
        op.altitude_deg = Some(v);
    }
    if let Some(v) = o.azimuth_deg {
        op.azimuth_deg = Some(v);
    }
    if let Some(v) = o.seeing_fwhm_arcsec {
        op.seeing_fwhm_arcsec = Some(v);
    }
    if let Some(v) = o.aperture_mm {
        op.aperture_mm = Some(v);
    }
    if let Some(v) = o.wavelength_nm {
        op.wavelength_nm = Some(v);
    }
    Ok(())
}

/// Band width of a base-10 third octave as a fraction of its centre.
const THIRD_OCTAVE_WIDTH: f64 = 0.231_616_2;

/// Build the report of a generic-layer model.
pub fn build_report(spec: &ModelSpec, o: &ReportOptions) -> Result<Report> {
    build_report_with(spec, o, None)
}

/// [`build_report`] with the people section for the deck body `deck`.
fn build_report_with(spec: &ModelSpec, o: &ReportOptions, deck: Option<&str>) -> Result<Report> {
    if o.sky_map.is_some() {
        return Err(Error::invalid(
            "sky_map",
            "a sky map re-poses the rig layer, so it needs the model file: use build_file_report",
        ));
    }
    if o.wind_from_deg.is_some() {
        return Err(Error::invalid(
            "wind_from_deg",
            "the wind's parts are derived from the rig layer for a direction, so it needs the model file: use build_file_report",
        ));
    }
    let mut spec = spec.clone();
    apply_optics_overrides(&mut spec, o)?;
    let model = Model::from_spec(&spec)?;
    let optics_body = spec.optics.as_ref().map(|op| op.body.clone()).unwrap_or_default();
    let grid = &o.grid;
    let path = ground_path(&spec, o)?;
    let mut notes = Vec::new();
    if let (Some(w), Some(load)) = (&o.wind, model.wind()) {
        let c = model.wind_at_load(w)?;
        notes.push(format!(
            "wind {:.2} m/s at {:.1} m taken at the load's height {:.2} m (C_d A-weighted centre of pressure; log profile, EN 1991-1-4): {:.2} m/s, turbulence intensity {:.3}; Σ C_d A {:.3} m²",
            w.mean_speed_m_s,
            w.height_m,
            c.height_m,
            c.mean_speed_m_s,
            c.turbulence_intensity()?,
            load.drag_area_m2()?
        ));
    }
    let ground: Option<GroundSpectrum> = if o.ground_off {
        None
    } else {
        let src = match &o.ground {
            Some(g) => g.clone(),
            None => {
                notes
                    .push("no ground spectrum given: Peterson (1993) NHNM (a noisy site) on all axes".into());
                GroundSource::Reference(ReferenceGround::Nhnm)
            }
        };
        let g = src.load(grid, o.ground_scale, &o.series)?;
        if let Some(name) = &o.sensor {
            notes.extend(g.noise_floor_notes(&crate::sensor_response::NoiseCurve::preset(name)?)?);
        }
        Some(carried(g, path.as_ref())?)
    };
    if let Some(n) = ground.as_ref().and_then(|g| g.note.clone()) {
        notes.push(n);
    }
    if ground.is_some() {
        notes.push(match &spec.ground_waves {
            Some(w) => format!(
                "the ground also tilts and twists as surface waves of phase velocity {:.0} m/s pass (ground_rx, ground_ry, ground_rz){}",
                w.phase_velocity_m_s,
                if w.incoherence.is_some_and(|a| a > 0.0) && model.ground_stations().len() >= 2 {
                    format!("; the {} stations also move partly on their own (Luco–Wong)", model.ground_stations().len())
                } else {
                    String::new()
                }
            ),
            None => "the ground is taken not to tilt (rigid ground without a phase velocity): give [ground] phase_velocity_m_s to include tilt and twist".into(),
        });
    }
    if let Some(p) = &path {
        notes.push(p.note());
    }
    let d = disturbances(ground.as_ref(), o);
    let io = image_options(o);
    let image = model.image_motion(grid, &d, &io)?;
    notes.extend(image.notes.iter().cloned());

    let modes = model.modes()?;
    let dom = modes.dominant_dofs(&model);
    let mode_rows = (0..modes.frequency_hz.len())
        .map(|j| {
            let e = modes.energy(&model, j)?;
            let image_share = image
                .mode_share
                .get(j)
                .filter(|m| (m.frequency_hz - modes.frequency_hz[j]).abs() <= 1e-6 * modes.frequency_hz[j])
                .map(|m| m.share);
            Ok(ModeRow {
                index: j + 1,
                frequency_hz: modes.frequency_hz[j],
                damping_ratio: modes.damping_ratio[j],
                dominant_dof: dom[j].clone(),
                label: modes.label_with(&model, j, &e),
                image_share,
                moving: e.bodies.into_iter().take(3).collect(),
                flexing: e.connectors.into_iter().take(3).collect(),
                effective_mass_kg: std::array::from_fn(|d| modes.effective_mass_kg[[j, d]]),
            })
        })
        .collect::<Result<Vec<_>>>()?;

    // Transmissibility and image per ground motion.
    let axes = ["x", "y", "z"];
    let trans_out: Vec<String> = axes.iter().map(|a| format!("{optics_body}:{a}")).collect();
    let mut outs: Vec<&str> = trans_out.iter().map(String::as_str).collect();
    outs.extend(["image_x", "image_y"]);
    let frf = model.frf(grid.hz(), &GROUND_INPUTS, &outs)?;
    let mut transmissibility = Vec::new();
    let mut image_per_ground = Vec::new();
    for (d, gi) in GROUND_INPUTS.iter().enumerate() {
        let t = frf.series(&trans_out[d], gi)?;
        transmissibility.push(Curve {
            label: format!("{} / {gi}", trans_out[d]),
            freq_hz: grid.hz().to_vec(),
            values: t.iter().map(|c| c.norm()).collect(),
        });
        for im in ["image_x", "image_y"] {
            let h = frf.series(im, gi)?;
            image_per_ground.push(Curve {
                label: format!("{im} / {gi}"),
                freq_hz: grid.hz().to_vec(),
                // rad per m → arcsec per µm
                values: h.iter().map(|c| c.norm() * ARCSEC_PER_RAD * 1e-6).collect(),
            });
        }
    }

    // Ground spectra, references and criteria.
    let mut ground_accel_psd = Vec::new();
    let mut criteria: Vec<CriterionVerdict> = Vec::new();
    if let Some(g) = &ground {
        for (k, p) in g.axes.iter().enumerate() {
            let Some(p) = p else { continue };
            let a = p.to(Quantity::Acceleration)?;
            let on = a.resample(grid, Extrapolate::Zero)?;
            ground_accel_psd.push(Curve {
                label: format!("{} {}", g.label, axes[k]),
                freq_hz: on.freq_hz().to_vec(),
                values: on.values().to_vec(),
            });
            for c in [
                CriterionCurve::VcA,
                CriterionCurve::VcB,
                CriterionCurve::VcC,
                CriterionCurve::VcD,
                CriterionCurve::VcE,
            ] {
                let Ok(r) = c.evaluate(p) else { continue };
                let v = CriterionVerdict {
                    curve: c.name().to_ascii_uppercase(),
                    level_um_s: c.level_m_s() * 1e6,
                    worst_ratio: r.worst_ratio,
                    worst_band_hz: r.worst_band_hz,
                    worst_axis: axes[k].into(),
                    passes: r.passes(),
                };
                match criteria.iter_mut().find(|x| x.curve == v.curve) {
                    Some(x) if x.worst_ratio < v.worst_ratio => *x = v,
                    Some(_) => {}
                    None => criteria.push(v),
                }
            }
        }
    }
    let ref_hz: Vec<f64> = grid.hz().iter().copied().filter(|f| *f <= 10.0).collect();
    let mut reference_accel_psd = Vec::new();
    if ref_hz.len() >= 2 {
        let rg = FreqGrid::new(ref_hz)?;
        for (name, r) in [("NLNM", ReferenceGround::Nlnm), ("NHNM", ReferenceGround::Nhnm)] {
            let p = r.psd(&rg)?;
            reference_accel_psd.push(Curve {
                label: name.into(),
                freq_hz: p.freq_hz().to_vec(),
                values: p.values().to_vec(),
            });
        }
    }
    let centres = CriterionCurve::band_centres_hz();
    let criterion_accel_psd = [CriterionCurve::VcA, CriterionCurve::VcC, CriterionCurve::VcE]
        .iter()
        .map(|c| {
            let v = c.level_m_s();
            Curve {
                label: c.name().to_ascii_uppercase(),
                freq_hz: centres.clone(),
                values: centres
                    .iter()
                    .map(|f| (2.0 * std::f64::consts::PI * f).powi(2) * v * v / (THIRD_OCTAVE_WIDTH * f))
                    .collect(),
            }
        })
        .collect();
    let gust = match &o.wind {
        Some(w) => match gust_report(&model, w, &o.alternatives, o) {
            Ok(g) => Some(g),
            Err(e) => {
                notes.push(format!("gust family not computed: {e}"));
                None
            }
        },
        None => None,
    };
    let people = match deck {
        Some(d) => match people_report(&model, d, &o.people) {
            Ok(p) => Some(p),
            Err(e) => {
                notes.push(format!("people on the deck not computed: {e}"));
                None
            }
        },
        None => None,
    };
    let tones =
        if o.tones.is_empty() { None } else { Some(tone_image(&model, &carried_tones(o, path.as_ref()))?) };
    Ok(Report {
        gust,
        people,
        tones,
        sky_map: None,
        dof_count: model.dof_count(),
        optics_body,
        image_axes: match spec.optics.as_ref().map(|op| op.equatorial()) {
            Some(Ok(Some(_))) => ["image_x (RA)".into(), "image_y (Dec)".into()],
            _ => ["image_x (az)".into(), "image_y (alt)".into()],
        },
        ground_label: ground.as_ref().map(|g| g.label.clone()),
        wind: o.wind.as_ref().map(|w| format!("{:?} {} m/s at {} m", w.kind, w.mean_speed_m_s, w.height_m)),
        modes: mode_rows,
        image,
        transmissibility,
        image_per_ground_arcsec_per_um: image_per_ground,
        ground_accel_psd,
        reference_accel_psd,
        criterion_accel_psd,
        criteria,
        notes,
    })
}

/// The report's ground path for a model, its wave speed the site's when none is given.
fn ground_path(spec: &ModelSpec, o: &ReportOptions) -> Result<Option<GroundPath>> {
    let site = spec.ground_waves.as_ref().map(|w| w.phase_velocity_m_s);
    o.ground_path.as_ref().map(|p| p.resolve(site)).transpose()
}

/// The ground spectrum carried along the report's ground path, if any.
fn carried(mut g: GroundSpectrum, path: Option<&GroundPath>) -> Result<GroundSpectrum> {
    if let Some(p) = path {
        for a in g.axes.iter_mut().flatten() {
            *a = p.apply_psd(a)?;
        }
    }
    Ok(g)
}

/// The tonal lines, ground translations carried along the report's ground path.
fn carried_tones(o: &ReportOptions, path: Option<&GroundPath>) -> Vec<ToneLine> {
    o.tones
        .iter()
        .map(|l| match path {
            Some(p) if l.is_ground_translation() => {
                ToneLine { amplitude_rms: l.amplitude_rms * p.amplitude_ratio(l.frequency_hz), ..l.clone() }
            }
            _ => l.clone(),
        })
        .collect()
}

fn disturbances(ground: Option<&GroundSpectrum>, o: &ReportOptions) -> Disturbances {
    Disturbances {
        ground: ground.map(|g| g.axes.clone()).unwrap_or_default(),
        wind: o.wind.clone(),
        loads: Vec::new(),
        ground_waves: None,
    }
}

fn image_options(o: &ReportOptions) -> ImageOptions {
    ImageOptions {
        exposure_s: o.exposure_s,
        guide: o.guide,
        guide_loop: o.guide_loop,
        seeing_fwhm_arcsec: o.seeing_fwhm_arcsec,
        ..ImageOptions::default()
    }
}

/// The report of a model file (its pointing as written), with the sky map when
/// [`ReportOptions::sky_map`] asks for one.
pub fn build_file_report(file: &ModelFile, o: &ReportOptions) -> Result<Report> {
    let mut file = file.clone();
    if let Some(a) = o.wind_from_deg {
        file.set_wind_from(a)?;
    }
    let plain = ReportOptions { sky_map: None, wind_from_deg: None, ..o.clone() };
    let deck = file.rig.floor.as_ref().map(|f| f.body().to_string());
    let mut r = build_report_with(&file.expanded()?, &plain, deck.as_deref())?;
    if let Some(g) = &o.sky_map {
        r.sky_map = Some(report_sky_map(&file, g.as_ref(), &plain)?);
    }
    Ok(r)
}

/// The sky map of a model file under a report's disturbances, optics overrides and image
/// options (`sky`: None for the file's default grid, [`SkyGrid::default_for`]).
pub fn report_sky_map(file: &ModelFile, sky: Option<&SkyGrid>, o: &ReportOptions) -> Result<SkyMap> {
    let mut file = file.clone();
    if let Some(a) = o.wind_from_deg {
        file.set_wind_from(a)?;
    }
    // The optics overrides except the pointing, which the map sets cell by cell.
    let optics_only = ReportOptions { altitude_deg: None, azimuth_deg: None, ..o.clone() };
    apply_optics_overrides(&mut file.generic, &optics_only)?;
    let path = ground_path(&file.expanded()?, o)?;
    let ground = if o.ground_off {
        None
    } else {
        let src = o.ground.clone().unwrap_or(GroundSource::Reference(ReferenceGround::Nhnm));
        Some(carried(src.load(&o.grid, o.ground_scale, &o.series)?, path.as_ref())?)
    };
    let sky = match sky {
        Some(s) => s.clone(),
        None => SkyGrid::default_for(&file)?,
    };
    sky_map(&file, &sky, &o.grid, &disturbances(ground.as_ref(), o), &image_options(o))
}

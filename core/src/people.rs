//! People on the deck: the footfall force of a person walking on it, carried to image motion as
//! a time history and as a steady line spectrum, and the static tilt of a person standing on it
//! against the distance from the stand.
//!
//! ## Footfall force
//! A person of weight W walking at pace f_p presses on the floor with
//! F(t) = W [1 + Σ_h α_h cos(2π h f_p t)], h = 1 … 4 (a Fourier series of the walking force with
//! dynamic load factors α_h; all harmonics in phase at t = 0, which puts their peaks together).
//! [`FootfallModel::FixedFactors`]: α = 0.5, 0.2, 0.1, 0.05 (Murray, Allen & Ungar 1997, AISC
//! Design Guide 11, sec. 2.2 and table 4.1, from memory: verify). [`FootfallModel::PaceDependent`]:
//! α₁ = min(0.41 (f_p − 0.95), 0.56), α_h = a_h + b_h·h f_p with (a, b) = (0.069, 0.0056),
//! (0.033, 0.0064), (0.013, 0.0065) for h = 2, 3, 4 (Young 2001, as used in Willford & Young
//! 2006, CCIP-016, sec. 4.3, from memory: verify). Both take paces 1–2.8 Hz.
//!
//! The person walks in place at one point of the deck (the worst case of a pass that lingers
//! near the stand); the point force enters the model as `force:DECK:z@X,Y,Z` (the force at the
//! deck's CG plus r × F). [`walking_pass`] runs the force through [`Model::image_response`]
//! (FFT convolution); [`footfall_steady`] carries each harmonic α_h W at h f_p through the FRF to
//! a steady image RMS.
//!
//! ## Standing load
//! [`standing_tilt`] solves the static model (f = 0) for the weight at points at given distances
//! from the stand's axis (x = y = 0) along an azimuth, or over all azimuths (the worst, by 1°
//! steps; the static image is linear in the point). On a rigid deck rocking on springs the tilt
//! grows with the distance from the deck's elastic centre (θ = W d / k_rock): the table then
//! says within what distance the image stays under the limit. A pier through a hole in the deck
//! (no gap stiffness) does not feel the deck at all. The deck is a rigid body: the local dip of
//! boards and joists under a foot is not in the model, so a real timber deck tilts a stand on it
//! more near the foot than this table says.

use crate::assembly::OpticsSpec;
use crate::error::{Error, Result, require_finite, require_non_negative, require_positive};
use crate::linalg::RealLu;
use crate::model::{Input, Model};
use crate::transient::{MAX_FFT_LEN, TransientOptions};
use crate::units::ARCSEC_PER_RAD;
use serde::Serialize;
use std::f64::consts::PI;

/// Standard gravity (m/s²), to turn a body mass into a weight.
pub const STANDARD_GRAVITY_M_S2: f64 = 9.806_65;
/// Default body mass (kg): common practice, no source.
pub const DEFAULT_BODY_MASS_KG: f64 = 75.0;
/// Default walking pace (Hz): common practice, no source (floor guides use 1.6–2.2 Hz).
pub const DEFAULT_PACE_HZ: f64 = 2.0;
/// Default distance of the walker from the stand's axis (m): a placeholder of ours, one step away.
pub const DEFAULT_WALK_DISTANCE_M: f64 = 1.0;
/// Default length of a walking pass (s).
pub const DEFAULT_PASS_S: f64 = 10.0;
/// Default sample rate of a walking pass (Hz): fifty times the fourth harmonic at 2 Hz.
pub const DEFAULT_PASS_FS_HZ: f64 = 400.0;
/// Default image limit for the standing table (px): the project's ½-px verdict.
pub const DEFAULT_LIMIT_PX: f64 = 0.5;
/// Default distances of the standing table (m).
pub const DEFAULT_DISTANCES_M: [f64; 10] = [0.25, 0.5, 0.75, 1.0, 1.25, 1.5, 2.0, 2.5, 3.0, 4.0];
/// Quiet time before the walker steps on and after the pass ends (s).
pub const PASS_LEAD_S: f64 = 0.5;
pub const PASS_TAIL_S: f64 = 2.0;
/// Paces accepted (Hz).
pub const PACE_RANGE_HZ: [f64; 2] = [1.0, 2.8];

/// The dynamic load factors of the walking force.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum FootfallModel {
    /// α = 0.5, 0.2, 0.1, 0.05 for harmonics 1–4 (Murray, Allen & Ungar 1997).
    FixedFactors,
    /// Factors growing with the pace (Young 2001).
    PaceDependent,
}

impl FootfallModel {
    /// `fixed` or `pace`.
    pub fn parse(name: &str) -> Result<FootfallModel> {
        match name {
            "fixed" => Ok(FootfallModel::FixedFactors),
            "pace" => Ok(FootfallModel::PaceDependent),
            other => Err(Error::UnknownName {
                kind: "footfall model".into(),
                name: other.into(),
                known: "fixed, pace".into(),
            }),
        }
    }

    /// The name [`FootfallModel::parse`] takes.
    pub fn name(&self) -> &'static str {
        match self {
            FootfallModel::FixedFactors => "fixed",
            FootfallModel::PaceDependent => "pace",
        }
    }

    /// Dynamic load factors α₁ … α₄ at `pace_hz`.
    pub fn factors(&self, pace_hz: f64) -> Result<[f64; 4]> {
        let f = require_finite("pace_hz", pace_hz)?;
        if !(PACE_RANGE_HZ[0]..=PACE_RANGE_HZ[1]).contains(&f) {
            return Err(Error::invalid(
                "pace_hz",
                format!("must lie in {}–{} Hz (walking), got {f}", PACE_RANGE_HZ[0], PACE_RANGE_HZ[1]),
            ));
        }
        Ok(match self {
            FootfallModel::FixedFactors => [0.5, 0.2, 0.1, 0.05],
            FootfallModel::PaceDependent => [
                (0.41 * (f - 0.95)).min(0.56),
                0.069 + 0.0056 * 2.0 * f,
                0.033 + 0.0064 * 3.0 * f,
                0.013 + 0.0065 * 4.0 * f,
            ],
        })
    }
}

/// A person walking: weight, pace and the load factors.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Walker {
    pub weight_n: f64,
    pub pace_hz: f64,
    pub model: FootfallModel,
}

impl Walker {
    /// A walker of `mass_kg` at the default pace with the fixed factors.
    pub fn of_mass(mass_kg: f64) -> Result<Walker> {
        let m = require_positive("mass_kg", mass_kg)?;
        Ok(Walker {
            weight_n: m * STANDARD_GRAVITY_M_S2,
            pace_hz: DEFAULT_PACE_HZ,
            model: FootfallModel::FixedFactors,
        })
    }

    fn validate(&self) -> Result<[f64; 4]> {
        require_positive("weight_n", self.weight_n)?;
        self.model.factors(self.pace_hz)
    }

    /// The force lines: (h f_p in Hz, α_h W in N) for h = 1 … 4.
    pub fn harmonics(&self) -> Result<Vec<(f64, f64)>> {
        let a = self.validate()?;
        Ok(a.iter().enumerate().map(|(k, a)| ((k + 1) as f64 * self.pace_hz, a * self.weight_n)).collect())
    }

    /// The downward force (N) sampled at `fs_hz`, `n` samples from t = 0: zero before `start_s`
    /// and after `start_s + duration_s`, W[1 + Σ α_h cos(2π h f_p (t − start))] between, faded
    /// in and out over one step (1/f_p) by a raised cosine (our choice: a walker arrives over a
    /// step, not as a jump).
    pub fn force_history(&self, fs_hz: f64, n: usize, start_s: f64, duration_s: f64) -> Result<Vec<f64>> {
        let a = self.validate()?;
        require_positive("fs_hz", fs_hz)?;
        require_non_negative("start_s", start_s)?;
        require_positive("duration_s", duration_s)?;
        if n == 0 || n > MAX_FFT_LEN {
            return Err(Error::invalid("n_samples", format!("must lie in 1–{MAX_FFT_LEN}, got {n}")));
        }
        let end = start_s + duration_s;
        let eps = 1e-9 / fs_hz;
        Ok((0..n)
            .map(|k| {
                let t = k as f64 / fs_hz;
                let s = t - start_s;
                let f = self.weight_n
                    * (1.0
                        + a.iter()
                            .enumerate()
                            .map(|(h, a)| a * (2.0 * PI * (h + 1) as f64 * self.pace_hz * s).cos())
                            .sum::<f64>());
                // Raised-cosine ramps of one step at each end: the walker arrives and leaves
                // over a step, not as a jump.
                let ramp = 1.0 / self.pace_hz;
                let edge = s.min(end - t);
                if edge < -eps {
                    0.0
                } else if edge < ramp.min(duration_s / 2.0) {
                    f * 0.5 * (1.0 - (PI * edge.max(0.0) / ramp).cos())
                } else {
                    f
                }
            })
            .collect())
    }
}

/// The point force input on the deck at horizontal position `at_m` (on the deck's CG height).
fn deck_input(model: &Model, deck: &str, at_m: [f64; 2]) -> Result<String> {
    let body = model.spec().bodies.iter().find(|b| b.name == deck).ok_or_else(|| Error::UnknownName {
        kind: "deck body".into(),
        name: deck.into(),
        known: model.spec().bodies.iter().map(|b| b.name.clone()).collect::<Vec<_>>().join(", "),
    })?;
    for x in at_m {
        require_finite("at_m", x)?;
    }
    Ok(format!("force:{deck}:z@{},{},{}", at_m[0], at_m[1], body.cg_m[2]))
}

fn optics(model: &Model) -> Result<&OpticsSpec> {
    model.optics().ok_or_else(|| Error::invalid("people on the deck", "the model has no [optics] section"))
}

/// Sampling of a walking pass.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PassOptions {
    pub duration_s: f64,
    pub fs_hz: f64,
}

impl Default for PassOptions {
    fn default() -> Self {
        PassOptions { duration_s: DEFAULT_PASS_S, fs_hz: DEFAULT_PASS_FS_HZ }
    }
}

/// The numbers of a walking pass.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PassSummary {
    /// Where the walker treads (m, model frame).
    pub point_m: [f64; 3],
    /// Largest radial image excursion (the weight's tilt included) and when.
    pub peak_arcsec: f64,
    pub peak_px: f64,
    pub peak_time_s: f64,
    /// Radial RMS about the mean over the pass, its first and last step left out (the
    /// footfall's dynamic part).
    pub rms_arcsec: f64,
    pub rms_px: f64,
}

/// A walking pass: the force, the image history, and its summary.
#[derive(Debug, Clone, PartialEq)]
pub struct WalkingPass {
    pub time_s: Vec<f64>,
    /// Downward force on the deck (N).
    pub force_n: Vec<f64>,
    pub image_x_arcsec: Vec<f64>,
    pub image_y_arcsec: Vec<f64>,
    pub summary: PassSummary,
}

/// Image motion while `walker` treads at `at_m` (x, y in m) on body `deck` for
/// `pass.duration_s`, from rest, [`PASS_LEAD_S`] after the record starts and with
/// [`PASS_TAIL_S`] after the pass.
pub fn walking_pass(
    model: &Model,
    deck: &str,
    walker: &Walker,
    at_m: [f64; 2],
    pass: &PassOptions,
) -> Result<WalkingPass> {
    let input = deck_input(model, deck, at_m)?;
    let optics = optics(model)?;
    let fs = require_positive("fs_hz", pass.fs_hz)?;
    let dur = require_positive("duration_s", pass.duration_s)?;
    let n_f = ((PASS_LEAD_S + dur + PASS_TAIL_S) * fs).round();
    if n_f > MAX_FFT_LEN as f64 {
        return Err(Error::TooLarge {
            what: "walking pass samples ((duration_s + 2.5 s) × fs_hz)".into(),
            value: if n_f < usize::MAX as f64 { n_f as usize } else { usize::MAX },
            limit: MAX_FFT_LEN,
        });
    }
    let force = walker.force_history(fs, n_f as usize, PASS_LEAD_S, dur)?;
    let up: Vec<f64> = force.iter().map(|f| -f).collect();
    let r = model.image_response(&input, &up, fs, &TransientOptions::default())?;
    // The RMS leaves out the fade-in and fade-out steps (when the pass is long enough).
    let ramp = if dur > 4.0 / walker.pace_hz { 1.0 / walker.pace_hz } else { 0.0 };
    let inside: Vec<usize> = (0..r.time_s.len())
        .filter(|&k| r.time_s[k] >= PASS_LEAD_S + ramp && r.time_s[k] < PASS_LEAD_S + dur - ramp)
        .collect();
    let m = inside.len().max(1) as f64;
    let mx = inside.iter().map(|&k| r.image_x_arcsec[k]).sum::<f64>() / m;
    let my = inside.iter().map(|&k| r.image_y_arcsec[k]).sum::<f64>() / m;
    let ms = inside
        .iter()
        .map(|&k| (r.image_x_arcsec[k] - mx).powi(2) + (r.image_y_arcsec[k] - my).powi(2))
        .sum::<f64>()
        / m;
    let scale = optics.plate_scale_arcsec_per_px();
    let z = model.spec().bodies.iter().find(|b| b.name == deck).map(|b| b.cg_m[2]).unwrap_or(0.0);
    Ok(WalkingPass {
        summary: PassSummary {
            point_m: [at_m[0], at_m[1], z],
            peak_arcsec: r.metrics.peak_arcsec,
            peak_px: r.metrics.peak_px,
            peak_time_s: r.metrics.peak_time_s,
            rms_arcsec: ms.sqrt(),
            rms_px: ms.sqrt() / scale,
        },
        time_s: r.time_s,
        force_n: force,
        image_x_arcsec: r.image_x_arcsec,
        image_y_arcsec: r.image_y_arcsec,
    })
}

/// One force line and the image motion it drives.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FootfallLine {
    pub harmonic: usize,
    pub frequency_hz: f64,
    /// Amplitude α_h W (N).
    pub force_n: f64,
    /// Radial image RMS of this line alone (arcsec).
    pub image_rms_arcsec: f64,
}

/// Steady walking in place: each force line carried through the FRF.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FootfallSteady {
    pub lines: Vec<FootfallLine>,
    /// √Σ of the lines' mean squares (the lines have distinct frequencies).
    pub rms_arcsec: f64,
    pub rms_px: f64,
}

/// Steady image RMS of `walker` treading at `at_m` on `deck`: a line of amplitude A at f gives
/// image amplitudes H_x A and H_y A, mean square (|H_x|² + |H_y|²) A²/2.
pub fn footfall_steady(model: &Model, deck: &str, walker: &Walker, at_m: [f64; 2]) -> Result<FootfallSteady> {
    let input = deck_input(model, deck, at_m)?;
    let scale = optics(model)?.plate_scale_arcsec_per_px();
    let lines = walker.harmonics()?;
    let freqs: Vec<f64> = lines.iter().map(|l| l.0).collect();
    let frf = model.frf(&freqs, &[input.as_str()], &["image_x", "image_y"])?;
    let hx = frf.series("image_x", &input)?;
    let hy = frf.series("image_y", &input)?;
    let lines: Vec<FootfallLine> = lines
        .iter()
        .enumerate()
        .map(|(k, (f, a))| FootfallLine {
            harmonic: k + 1,
            frequency_hz: *f,
            force_n: *a,
            image_rms_arcsec: ((hx[k].norm_sqr() + hy[k].norm_sqr()) * a * a / 2.0).sqrt() * ARCSEC_PER_RAD,
        })
        .collect();
    let rms = lines.iter().map(|l| l.image_rms_arcsec.powi(2)).sum::<f64>().sqrt();
    Ok(FootfallSteady { lines, rms_arcsec: rms, rms_px: rms / scale })
}

/// One distance of the standing table.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StandingRow {
    pub distance_m: f64,
    /// Azimuth of the person seen from the stand (deg from north, +y, through east, +x): the
    /// one asked for, or the worst.
    pub azimuth_deg: f64,
    /// Static image angle (radial, arcsec and px).
    pub image_arcsec: f64,
    pub image_px: f64,
    /// Static tilt of the deck itself (arcsec).
    pub deck_tilt_arcsec: f64,
}

/// The static tilt of the rig under a standing person, against the distance from the stand.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StandingTable {
    pub weight_n: f64,
    pub limit_px: f64,
    /// True when each row's azimuth is the worst one.
    pub worst_azimuth: bool,
    pub rows: Vec<StandingRow>,
    /// Distances where the image crosses the limit (linear between rows).
    pub crossings_m: Vec<f64>,
    /// Whether the nearest row is under the limit.
    pub under_at_nearest: bool,
}

impl StandingTable {
    /// The distance within which the image stays under the limit, when it does so from the
    /// nearest row until a crossing (a deck rocking about the stand).
    pub fn under_within_m(&self) -> Option<f64> {
        if self.under_at_nearest { self.crossings_m.first().copied() } else { None }
    }

    /// The distance beyond which the image stays under the limit (the last crossing, going under).
    pub fn under_beyond_m(&self) -> Option<f64> {
        let last_under = self.rows.last().is_some_and(|r| r.image_px <= self.limit_px);
        if last_under && !self.crossings_m.is_empty() { self.crossings_m.last().copied() } else { None }
    }
}

impl StandingTable {
    /// CSV: one row per distance.
    pub fn csv_text(&self) -> String {
        let mut s = String::from("distance_m,azimuth_deg,image_arcsec,image_px,deck_tilt_arcsec\n");
        for r in &self.rows {
            s += &format!(
                "{},{},{:.6e},{:.6e},{:.6e}\n",
                r.distance_m, r.azimuth_deg, r.image_arcsec, r.image_px, r.deck_tilt_arcsec
            );
        }
        s
    }
}

/// Static tilt when a person of `weight_n` stands on `deck` at each of `distances_m` from the
/// stand's axis, along `azimuth_deg` or (None) the worst azimuth.
pub fn standing_tilt(
    model: &Model,
    deck: &str,
    weight_n: f64,
    distances_m: &[f64],
    azimuth_deg: Option<f64>,
    limit_px: f64,
) -> Result<StandingTable> {
    let w = require_positive("weight_n", weight_n)?;
    let limit = require_positive("limit_px", limit_px)?;
    if distances_m.is_empty() {
        return Err(Error::invalid("distances_m", "is empty"));
    }
    for (k, d) in distances_m.iter().enumerate() {
        require_non_negative("distances_m", *d)?;
        if k > 0 && *d <= distances_m[k - 1] {
            return Err(Error::invalid("distances_m", "must be strictly increasing"));
        }
    }
    if let Some(a) = azimuth_deg {
        require_finite("azimuth_deg", a)?;
    }
    let scale = optics(model)?.plate_scale_arcsec_per_px();
    let outs = ["image_x".to_string(), "image_y".to_string(), format!("{deck}:rx"), format!("{deck}:ry")];
    let outs: Vec<&str> = outs.iter().map(String::as_str).collect();
    // Static response (rad) to the downward weight at the stand's axis and one metre east and
    // north: K x = b with the real static stiffness (a loss factor does not soften statics).
    let n = model.dof_count();
    let mut lu =
        RealLu::factor(&model.static_stiffness(), n).map_err(|_| Error::Singular { freq_hz: 0.0 })?;
    let rows = outs.iter().map(|o| model.output(o)).collect::<Result<Vec<_>>>()?;
    let mut at = |p: [f64; 2]| -> Result<Vec<f64>> {
        let Input::Load(mut b) = model.input(&deck_input(model, deck, p)?)? else {
            return Err(Error::invalid("deck", "a point force is a load"));
        };
        lu.solve_in_place(&mut b)?;
        Ok(rows.iter().map(|r| -w * r.iter().zip(&b).map(|(a, x)| a * x).sum::<f64>()).collect())
    };
    let a0 = at([0.0, 0.0])?;
    let ax: Vec<f64> = at([1.0, 0.0])?.iter().zip(&a0).map(|(a, b)| a - b).collect();
    let ay: Vec<f64> = at([0.0, 1.0])?.iter().zip(&a0).map(|(a, b)| a - b).collect();
    let eval = |d: f64, az: f64| -> [f64; 2] {
        let (e, nn) = (d * az.to_radians().sin(), d * az.to_radians().cos());
        let v: Vec<f64> = (0..4).map(|i| a0[i] + e * ax[i] + nn * ay[i]).collect();
        [v[0].hypot(v[1]) * ARCSEC_PER_RAD, v[2].hypot(v[3]) * ARCSEC_PER_RAD]
    };
    let rows: Vec<StandingRow> = distances_m
        .iter()
        .map(|&d| {
            let (az, [img, deck_t]) = match azimuth_deg {
                Some(a) => (a, eval(d, a)),
                None => (0..360)
                    .map(|k| (k as f64, eval(d, k as f64)))
                    .fold((0.0, [-1.0, 0.0]), |best, c| if c.1[0] > best.1[0] { c } else { best }),
            };
            StandingRow {
                distance_m: d,
                azimuth_deg: az,
                image_arcsec: img,
                image_px: img / scale,
                deck_tilt_arcsec: deck_t,
            }
        })
        .collect();
    let mut crossings_m = Vec::new();
    for p in rows.windows(2) {
        let (a, b) = (p[0].image_px - limit, p[1].image_px - limit);
        if (a <= 0.0) != (b <= 0.0) {
            crossings_m.push(p[0].distance_m + (p[1].distance_m - p[0].distance_m) * a / (a - b));
        }
    }
    Ok(StandingTable {
        weight_n: w,
        limit_px: limit,
        worst_azimuth: azimuth_deg.is_none(),
        under_at_nearest: rows.first().is_some_and(|r| r.image_px <= limit),
        rows,
        crossings_m,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use realfft::RealFftPlanner;

    /// A rigid deck (200 kg) on four vertical springs k at (±1, ±1) m, so k_rock = Σ k x² = 4k
    /// about both horizontal axes, with a stiff stand carrying the optics (zenith).
    pub(crate) fn deck_on_springs(k: f64) -> Model {
        let mut text = String::from(
            r#"
[[body]]
name = "deck"
mass_kg = 200
cg_m = [0, 0, 0.1]
inertia_kgm2 = [60, 60, 120]
dofs = ["z", "rx", "ry"]
[[body]]
name = "scope"
mass_kg = 20
cg_m = [0, 0, 1.0]
inertia_kgm2 = [2, 2, 1]
dofs = ["x", "y", "z", "rx", "ry", "rz"]
[optics]
body = "scope"
focal_length_mm = 1000
pixel_um = 3.76
altitude_deg = 90
azimuth_deg = 0
"#,
        );
        for (i, (x, y)) in [(1.0, 1.0), (1.0, -1.0), (-1.0, 1.0), (-1.0, -1.0)].iter().enumerate() {
            text += &format!(
                "[[spring]]\nname = \"post{i}\"\nfrom = \"ground\"\nto = \"deck\"\nat_m = [{x}, {y}, 0.1]\ndirection = [0, 0, 1]\nstiffness_n_per_m = {k}\ndamping_ns_per_m = 2000\n"
            );
        }
        for (n, d) in [("sx", "1, 0, 0"), ("sy", "0, 1, 0"), ("sz", "0, 0, 1")] {
            text += &format!(
                "[[spring]]\nname = \"{n}\"\nfrom = \"deck\"\nto = \"scope\"\nat_m = [0, 0, 0.5]\ndirection = [{d}]\nstiffness_n_per_m = 1e7\ndamping_ns_per_m = 2000\n"
            );
            text += &format!(
                "[[torsion_spring]]\nname = \"t{n}\"\nfrom = \"deck\"\nto = \"scope\"\naxis = [{d}]\nstiffness_nm_per_rad = 2e6\ndamping_nms_per_rad = 200\n"
            );
        }
        Model::from_toml_str(&text, "deck").unwrap()
    }

    #[test]
    fn the_force_series_recovers_the_load_factors_at_each_harmonic_of_the_pace() {
        // Murray, Allen & Ungar 1997 (AISC Design Guide 11, sec. 2.2, from memory: verify):
        // α = 0.5, 0.2, 0.1, 0.05; Young 2001 (CCIP-016 sec. 4.3, from memory: verify) at 1.9 Hz.
        for (model, pace, expect) in [
            (FootfallModel::FixedFactors, 2.0, [0.5, 0.2, 0.1, 0.05]),
            (
                FootfallModel::PaceDependent,
                1.9,
                [0.41 * 0.95, 0.069 + 0.0056 * 3.8, 0.033 + 0.0064 * 5.7, 0.013 + 0.0065 * 7.6],
            ),
        ] {
            let w = Walker { weight_n: 700.0, pace_hz: pace, model };
            // 19 whole steps at 1.9 Hz = 10 s, after the one-step fade-in (a shift of whole
            // samples leaves the magnitudes alone).
            let (fs, n) = (190.0, 1900);
            let f = w.force_history(fs, n + 100, 0.0, 100.0).unwrap();
            assert!(f[0] == 0.0 && f[50] < f[100]);
            let mut buf = f[100..].to_vec();
            let mut spec = vec![num_complex::Complex64::default(); n / 2 + 1];
            RealFftPlanner::<f64>::new().plan_fft_forward(n).process(&mut buf, &mut spec).unwrap();
            assert!((spec[0].re / n as f64 - 700.0).abs() < 1e-9);
            for (h, a) in expect.iter().enumerate() {
                let bin = ((h + 1) as f64 * pace * n as f64 / fs).round() as usize;
                let amp = 2.0 * spec[bin].norm() / n as f64;
                assert!((amp - a * 700.0).abs() < 1e-9 * 700.0, "{model:?} h{} {amp}", h + 1);
            }
            let others: f64 = (1..spec.len())
                .filter(|j| !(1..=4).any(|h| *j == (h as f64 * pace * n as f64 / fs).round() as usize))
                .map(|j| spec[j].norm())
                .fold(0.0, f64::max);
            assert!(others < 1e-9 * n as f64, "no other lines: {others}");
        }
        assert!(FootfallModel::FixedFactors.factors(3.5).is_err());
        assert!(FootfallModel::parse("run").is_err());
    }

    #[test]
    fn standing_tilt_of_a_deck_on_springs_is_weight_times_distance_over_rocking_stiffness() {
        // Hand calculation (statics of a rigid body on springs): k_rock = Σ k_i x_i² = 4k,
        // θ = W d / k_rock. The stand carries no load of its own, so statically it turns with the
        // deck exactly, and at zenith both image axes are perpendicular to the line of sight.
        let k = 1.0e6;
        let m = deck_on_springs(k);
        let w = 75.0 * STANDARD_GRAVITY_M_S2;
        let scale = m.optics().unwrap().plate_scale_arcsec_per_px();
        for az in [Some(90.0), Some(30.0), None] {
            let t = standing_tilt(&m, "deck", w, &[0.0, 0.5, 1.0, 2.0], az, 0.5).unwrap();
            for r in &t.rows {
                let hand = w * r.distance_m / (4.0 * k) * ARCSEC_PER_RAD;
                assert!((r.image_arcsec - hand).abs() < 1e-6 * hand.max(1e-3), "{r:?} vs {hand}");
                assert!((r.deck_tilt_arcsec - hand).abs() < 1e-6 * hand.max(1e-3));
                assert!((r.image_px - r.image_arcsec / scale).abs() < 1e-12);
            }
            // The image passes ½ px at d = 0.5 px · scale · 4k / W.
            let d = 0.5 * scale / ARCSEC_PER_RAD * 4.0 * k / w;
            assert!(t.under_at_nearest);
            assert!((t.under_within_m().unwrap() - d).abs() < 1e-6, "{t:?}");
        }
        assert!(standing_tilt(&m, "deck", w, &[1.0, 0.5], None, 0.5).is_err());
        assert!(standing_tilt(&m, "nope", w, &[1.0], None, 0.5).is_err());
    }

    #[test]
    fn a_walking_pass_and_the_steady_lines_agree_and_follow_the_static_tilt_below_resonance() {
        // Two paths (FFT convolution of the force history; the FRF at each force line) give the
        // same dynamic RMS; far below the deck's rocking mode (~40 Hz) both approach the
        // quasi-static value (W d / k_rock) √(Σ α_h²/2) (static solution, as above).
        let k = 1.0e6;
        let m = deck_on_springs(k);
        let w = Walker::of_mass(75.0).unwrap();
        let at = [1.5, 0.0];
        let steady = footfall_steady(&m, "deck", &w, at).unwrap();
        let pass =
            walking_pass(&m, "deck", &w, at, &PassOptions { duration_s: 10.0, fs_hz: 1000.0 }).unwrap();
        let rel = pass.summary.rms_arcsec / steady.rms_arcsec - 1.0;
        assert!(rel.abs() < 0.02, "pass {} vs steady {}", pass.summary.rms_arcsec, steady.rms_arcsec);
        let qs = w.weight_n * 1.5 / (4.0 * k) * ARCSEC_PER_RAD * (0.25f64 + 0.04 + 0.01 + 0.0025).sqrt()
            / 2f64.sqrt();
        assert!(steady.rms_arcsec > qs && steady.rms_arcsec < 1.05 * qs, "{} vs {qs}", steady.rms_arcsec);
        // The peak is at least the weight's tilt with all lines in phase, 1.85 W d / k_rock.
        let peak_qs = 1.85 * w.weight_n * 1.5 / (4.0 * k) * ARCSEC_PER_RAD;
        assert!(pass.summary.peak_arcsec > 0.99 * peak_qs && pass.summary.peak_arcsec < 2.0 * peak_qs);
        assert_eq!(pass.force_n.len(), pass.time_s.len());
        assert!(pass.force_n[0] == 0.0 && *pass.force_n.last().unwrap() == 0.0);
    }

    #[test]
    fn a_point_force_is_the_force_at_the_cg_plus_its_moment() {
        // r × F with r = (1.5, −0.5, 0), F = (0, 0, 1): moment (−0.5, −1.5, 0).
        let m = deck_on_springs(1e6);
        let v = m.input_vector("force:deck:z@1.5,-0.5,0.1", 0.0).unwrap();
        let z = m.input_vector("force:deck:z", 0.0).unwrap();
        let rx = m.input_vector("moment:deck:x", 0.0).unwrap();
        let ry = m.input_vector("moment:deck:y", 0.0).unwrap();
        for i in 0..m.dof_count() {
            let expect = z[i] - 0.5 * rx[i] - 1.5 * ry[i];
            assert!((v[i] - expect).norm() < 1e-12);
        }
        assert!(m.input_vector("moment:deck:x@0,0,0", 0.0).is_err());
        assert!(m.input_vector("force:deck:z@1,2", 0.0).is_err());
    }
}

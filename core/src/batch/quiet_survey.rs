//! A quiet-hours survey of one long recording: a streaming probabilistic PSD per ground axis
//! ([`crate::spectrum::probabilistic`]), the band RMS over the hours of the day, and, with a rig
//! model, the hours when the rig holds ½ px ([`crate::quiet_hours`]). The file is read in
//! chunks, so memory does not grow with the recording's length (one block per axis plus the
//! per-block summaries, a few numbers each).

use std::path::Path;

use serde::Serialize;

use super::ground::{ground_axis_map, ground_quantity};
use crate::error::{Error, Result};
use crate::grid::FreqGrid;
use crate::io::series::{SeriesChunk, SeriesOptions, SeriesReader};
use crate::model::Model;
use crate::quiet_hours::{HOLD_MAX_P_OUTSIDE, HOLD_RADIUS_PX, QuietBlock, QuietHours};
use crate::spectrum::{PpsdBlock, PpsdConfig, ProbabilisticPsd, Quantity};

/// Percentiles reported per axis.
pub const SURVEY_PERCENTILES: [f64; 5] = [5.0, 10.0, 50.0, 90.0, 95.0];
/// Frames read per chunk.
const CHUNK_FRAMES: usize = 1 << 16;

/// One axis of the survey: its probabilistic PSD summarised.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SurveyAxis {
    /// Column name in the file.
    pub name: String,
    /// Model ground axis: `x`, `y` or `z`.
    pub ground_axis: String,
    /// `(percentile, dB re 1 (m/s²)²/Hz per period bin)` for [`SURVEY_PERCENTILES`].
    pub percentiles_db: Vec<(f64, Vec<f64>)>,
    /// Mean of the histogram (dB) per period bin.
    pub mean_db: Vec<f64>,
    /// Share of blocks below Peterson's NLNM per period bin (NaN outside its span).
    pub share_below_nlnm: Vec<f64>,
    /// Share of blocks above Peterson's NHNM per period bin.
    pub share_above_nhnm: Vec<f64>,
    /// Blocks whose velocity exceeds the criterion curve in some band (when one is set).
    pub blocks_above_criterion: u64,
}

/// One block of the survey, judged through the rig when a model was given.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SurveyBlock {
    pub index: usize,
    pub start_s: f64,
    pub hour_of_day: Option<usize>,
    /// Band RMS of the first axis, one per band (in the band quantity's SI unit).
    pub band_rms: Vec<f64>,
    /// Radial RMS image motion (px) and share of time outside ½ px, with a model.
    pub rms_radial_px: Option<f64>,
    pub p_outside: Option<f64>,
    pub holds: Option<bool>,
}

/// What a survey found.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct QuietSurvey {
    pub source: String,
    pub fs_hz: f64,
    pub start_time: Option<String>,
    /// Block length (s) and number of blocks.
    pub block_s: f64,
    pub n_blocks: usize,
    /// Period bin centres (s), increasing; frequencies are their inverses.
    pub period_s: Vec<f64>,
    pub axes: Vec<SurveyAxis>,
    /// Bands (Hz) of the hour map and the quantity of their RMS (SI).
    pub bands_hz: Vec<(f64, f64)>,
    pub band_quantity: Quantity,
    /// Per hour of the day (24): blocks, band RMS `[hour][band]` (NaN without blocks), blocks
    /// judged through the rig and blocks that held ½ px.
    pub hour_blocks: Vec<u64>,
    pub hour_band_rms: Vec<Vec<f64>>,
    pub hour_judged: Vec<u64>,
    pub hour_held: Vec<u64>,
    pub blocks: Vec<SurveyBlock>,
    pub notes: Vec<String>,
}

impl QuietSurvey {
    /// Hours of the day in which every judged block held ½ px (empty without a model).
    pub fn quiet_hours(&self) -> Vec<usize> {
        (0..24).filter(|&h| self.hour_judged[h] > 0 && self.hour_held[h] == self.hour_judged[h]).collect()
    }
}

/// Settings of a survey.
#[derive(Debug, Clone, PartialEq)]
pub struct SurveyOptions {
    /// Probabilistic PSD settings; `input` and `scale` are set from the recording, and the hour
    /// map from its start time.
    pub ppsd: PpsdConfig,
    /// How to read the recording.
    pub series: SeriesOptions,
    /// Frequency grid of the image-motion path (with a model).
    pub grid: FreqGrid,
}

/// Seconds after 00:00 of an ISO 8601 time `YYYY-MM-DDTHH:MM:SS[.f][Z]` (UTC as written).
pub fn seconds_of_day(iso: &str) -> Option<f64> {
    let t = iso.trim().trim_end_matches('Z');
    let (_, clock) = t.split_once('T').or_else(|| t.split_once(' '))?;
    let mut it = clock.splitn(3, ':');
    let h: f64 = it.next()?.parse().ok()?;
    let m: f64 = it.next()?.parse().ok()?;
    let s: f64 = it.next().unwrap_or("0").parse().ok()?;
    ((0.0..24.0).contains(&h) && (0.0..60.0).contains(&m) && (0.0..61.0).contains(&s))
        .then_some(h * 3600.0 + m * 60.0 + s)
}

enum Engine<'m> {
    Rig(QuietHours<'m>),
    Spectra(Vec<ProbabilisticPsd>),
}

/// Survey a recording file (text, WAV or miniSEED, as the ground recordings are read). With a
/// model (needs `[optics]`), every block's ground PSDs go through the rig's image-motion path.
pub fn survey_recording(path: &Path, model: Option<&Model>, o: &SurveyOptions) -> Result<QuietSurvey> {
    let mut reader = SeriesReader::open(path, &o.series)?;
    let h = reader.header().clone();
    let file = path.display().to_string();
    let quantity = ground_quantity(h.quantity, &file)?;
    let map = ground_axis_map(&h.axis_names, &file)?;
    let mut cfg = o.ppsd.clone().with_input(quantity, o.ppsd.scale);
    let mut notes = Vec::new();
    match h.start_time.as_deref().and_then(seconds_of_day) {
        Some(s) => {
            let bands = cfg.bands_hz.clone();
            cfg = cfg.with_hours(s, bands);
        }
        None => notes.push(format!(
            "{file}: no start time of day (miniSEED has one; text takes '# start_time=2024-05-01T21:00:00Z'), so no hour-of-day map"
        )),
    }
    let mut engine = match model {
        Some(m) => Engine::Rig(QuietHours::new(m, o.grid.clone(), h.fs_hz, &cfg, &map)?),
        None => {
            Engine::Spectra(map.iter().map(|_| ProbabilisticPsd::new(h.fs_hz, &cfg)).collect::<Result<_>>()?)
        }
    };
    let mut chunk = SeriesChunk::new();
    let mut blocks = Vec::new();
    while reader.next_chunk(CHUNK_FRAMES, &mut chunk)? > 0 {
        let chans: Vec<&[f64]> = (0..chunk.n_axes()).filter_map(|i| chunk.axis(i)).collect();
        match &mut engine {
            Engine::Rig(q) => {
                blocks.extend(q.push(&chans)?.iter().map(judged_block));
            }
            Engine::Spectra(ps) => {
                let mut first: Vec<PpsdBlock> = Vec::new();
                for (k, (p, c)) in ps.iter_mut().zip(&chans).enumerate() {
                    let done = p.push(c)?;
                    if k == 0 {
                        first = done;
                    }
                }
                blocks.extend(first.iter().map(plain_block));
            }
        }
    }
    let ppsds: &[ProbabilisticPsd] = match &engine {
        Engine::Rig(q) => q.axes(),
        Engine::Spectra(ps) => ps,
    };
    let first = ppsds.first().ok_or_else(|| Error::invalid("recording", "has no axis"))?;
    let n_blocks = first.n_blocks();
    if n_blocks == 0 {
        return Err(Error::invalid(
            format!("recording {file}"),
            format!(
                "{} frames are fewer than one block of {} s ({} frames); give a shorter block",
                reader.frames_read(),
                cfg.block_s,
                first.block_samples()
            ),
        ));
    }
    if let Engine::Rig(_) = &engine {
        notes.push(format!(
            "a block holds when the star's centre is outside {HOLD_RADIUS_PX} px less than {:.0} % of the time (common practice, no source)",
            100.0 * HOLD_MAX_P_OUTSIDE
        ));
    }
    let axes = ppsds
        .iter()
        .zip(&h.axis_names)
        .zip(&map)
        .map(|((p, name), &g)| {
            Ok(SurveyAxis {
                name: name.clone(),
                ground_axis: ["x", "y", "z"][g].to_string(),
                percentiles_db: SURVEY_PERCENTILES
                    .iter()
                    .map(|&q| Ok((q, p.percentile_db(q)?)))
                    .collect::<Result<_>>()?,
                mean_db: p.mean_db(),
                share_below_nlnm: p.share_below_nlnm(),
                share_above_nhnm: p.share_above_nhnm(),
                blocks_above_criterion: p.blocks_above_criterion(),
            })
        })
        .collect::<Result<Vec<_>>>()?;
    let hours = first.hours();
    let nb = hours.n_bands();
    let rms = hours.rms();
    Ok(QuietSurvey {
        source: file,
        fs_hz: h.fs_hz,
        start_time: h.start_time.clone(),
        block_s: cfg.block_s,
        n_blocks,
        period_s: first.period_centres_s().to_vec(),
        axes,
        bands_hz: cfg.bands_hz.clone(),
        band_quantity: cfg.band_quantity,
        hour_blocks: hours.blocks.clone(),
        hour_band_rms: (0..24).map(|hr| rms[hr * nb..(hr + 1) * nb].to_vec()).collect(),
        hour_judged: hours.judged.clone(),
        hour_held: hours.held.clone(),
        blocks,
        notes,
    })
}

fn plain_block(b: &PpsdBlock) -> SurveyBlock {
    SurveyBlock {
        index: b.index,
        start_s: b.start_s,
        hour_of_day: b.hour_of_day,
        band_rms: b.band_rms.clone(),
        rms_radial_px: None,
        p_outside: None,
        holds: None,
    }
}

fn judged_block(b: &QuietBlock) -> SurveyBlock {
    SurveyBlock {
        index: b.index,
        start_s: b.start_s,
        hour_of_day: b.hour_of_day,
        band_rms: b.band_rms.clone(),
        rms_radial_px: Some(b.rms_radial_px),
        p_outside: Some(b.p_outside),
        holds: Some(b.holds),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::schema::ModelFile;
    use rand::{SeedableRng, rngs::StdRng};
    use rand_distr::{Distribution, Normal};
    use std::fmt::Write as _;

    #[test]
    fn start_times_give_seconds_of_day() {
        assert_eq!(seconds_of_day("2024-05-01T21:00:00Z"), Some(75_600.0));
        assert_eq!(seconds_of_day("2011-03-31T00:00:01.500000Z"), Some(1.5));
        assert_eq!(seconds_of_day("2024-05-01"), None);
        assert_eq!(seconds_of_day("2024-05-01T25:00:00Z"), None);
    }

    /// Three hours of vertical ground acceleration from 21:00, loud from 22:00 to 22:55 (white
    /// noise 1e-7 and 1e-2 m/s² RMS, invented levels) through the demo tripod: the hours that
    /// hold are 21 and 23, and the survey from a file equals the engine fed by hand.
    #[test]
    fn a_loud_hour_is_found_and_the_quiet_ones_hold() {
        let root = std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("..");
        let file = ModelFile::read(&root.join("docs/examples/tripod-paver.toml")).unwrap();
        let model = Model::from_spec(&file.expanded().unwrap()).unwrap();
        let fs = 25.0;
        let n = (3.0 * 3600.0 * fs) as usize;
        let (loud0, loud1) = ((3600.0 * fs) as usize, (3300.0 * fs) as usize + (3600.0 * fs) as usize);
        let mut rng = StdRng::seed_from_u64(11);
        let z: Vec<f64> = (0..n)
            .map(|i| {
                let s = if (loud0..loud1).contains(&i) { 1e-2 } else { 1e-7 };
                s * Normal::new(0.0, 1.0).unwrap().sample(&mut rng)
            })
            .collect();
        let mut text = String::from("# fs_hz=25\n# start_time=2024-05-01T21:00:00Z\nz_m_s2\n");
        for v in &z {
            writeln!(text, "{v:e}").unwrap();
        }
        let dir = std::env::temp_dir().join(format!("stillsky-survey-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let path = dir.join("night.csv");
        std::fs::write(&path, &text).unwrap();
        let mut ppsd = PpsdConfig::default().with_block_s(600.0);
        ppsd.bands_hz = vec![(1.0, 10.0)];
        let o = SurveyOptions {
            ppsd,
            series: SeriesOptions::default(),
            grid: FreqGrid::log(0.5, 12.0, 300).unwrap(),
        };
        let s = survey_recording(&path, Some(&model), &o).unwrap();
        // 600 s blocks at 50 % overlap over 3 h: (10800 − 600)/300 + 1 = 35.
        assert_eq!(s.n_blocks, 35);
        assert_eq!(s.blocks.len(), 35);
        assert_eq!(s.quiet_hours(), vec![21, 23]);
        assert_eq!(s.hour_held[22], 0);
        assert!(s.hour_judged[22] > 0);
        // Band RMS in the loud hour is 1e5 × the quiet ones (amplitude ratio; linear path).
        let r = s.hour_band_rms[22][0] / s.hour_band_rms[21][0];
        assert!(r > 3e4 && r < 1e5 * 1.2, "{r}");
        // The same samples pushed by hand give the same blocks.
        let mut cfg = o.ppsd.clone().with_input(Quantity::Acceleration, 1.0);
        cfg = cfg.with_hours(75_600.0, vec![(1.0, 10.0)]);
        let mut q = QuietHours::new(&model, o.grid.clone(), fs, &cfg, &[2]).unwrap();
        let by_hand = q.push(&[&z]).unwrap();
        for (a, b) in s.blocks.iter().zip(&by_hand) {
            let (x, y) = (a.rms_radial_px.unwrap(), b.rms_radial_px);
            assert!((x - y).abs() <= 1e-9 * y.abs().max(1e-30), "{x} {y}");
        }
        // Without a model: spectra and hours only.
        let plain = survey_recording(&path, None, &o).unwrap();
        assert!(plain.blocks.iter().all(|b| b.holds.is_none()));
        assert_eq!(plain.axes[0].percentiles_db, s.axes[0].percentiles_db);
        assert!(plain.quiet_hours().is_empty());
        // Too short for one block: a named error.
        let short = SurveyOptions { ppsd: PpsdConfig::default().with_block_s(20_000.0), ..o };
        let e = survey_recording(&path, None, &short).unwrap_err();
        assert!(e.to_string().contains("fewer than one block"), "{e}");
        std::fs::remove_dir_all(&dir).ok();
    }
}

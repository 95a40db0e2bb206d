//! Ground spectra for reports and sweeps: from recordings (Welch), PSD files or the Peterson
//! reference models.
//!
//! - A recording (CSV/text/WAV/miniSEED, see [`crate::io::series`]) gives one PSD per axis.
//!   Axis names map to model axes: `x`/`e`/`east` → x, `y`/`n`/`north` → y, `z`/`u`/`up`/`v` → z
//!   (case-insensitive). Three unnamed axes are taken in the order x, y, z; a single unnamed
//!   axis is taken as vertical (z). Welch: Hann, 50 % overlap, segments of the power of two
//!   nearest to 10 s (at most the recording length), constant detrend.
//! - A PSD file (`# stillsky psd` header, [`crate::spectrum::psd_file`]) applies to all three
//!   axes, each scaled by `scale`.
//! - `nlnm` / `nhnm`: Peterson (1993) acceleration models on all three axes (scaled), defined
//!   only up to 10 Hz; above that they count as zero (the report's notes say so).

use crate::error::{Error, Result};
use crate::grid::FreqGrid;
use crate::io::series::{SeriesOptions, SeriesQuantity, read_series};
use crate::spectrum::{Psd, Quantity, ReferenceGround, WelchConfig, welch};
use std::path::{Path, PathBuf};

/// Where a ground spectrum comes from.
#[derive(Debug, Clone, PartialEq)]
pub enum GroundSource {
    /// A time-series recording.
    Recording(PathBuf),
    /// A PSD file in the stillsky PSD format.
    PsdFile(PathBuf),
    /// A reference model.
    Reference(ReferenceGround),
}

impl GroundSource {
    /// `nlnm`/`nhnm`, else a path; a file starting with `# stillsky psd` is a PSD file,
    /// anything else a recording.
    pub fn parse(arg: &str) -> GroundSource {
        if let Ok(r) = ReferenceGround::from_name(arg)
            && !Path::new(arg).exists()
        {
            return GroundSource::Reference(r);
        }
        let p = PathBuf::from(arg);
        let is_psd = std::fs::read(&p).map(|b| b.starts_with(b"# stillsky psd")).unwrap_or(false);
        if is_psd { GroundSource::PsdFile(p) } else { GroundSource::Recording(p) }
    }

    /// Short label: the file stem, or the reference model's name.
    pub fn label(&self) -> String {
        match self {
            GroundSource::Recording(p) | GroundSource::PsdFile(p) => p
                .file_stem()
                .map(|s| s.to_string_lossy().into_owned())
                .unwrap_or_else(|| p.display().to_string()),
            GroundSource::Reference(ReferenceGround::Nlnm) => "nlnm".into(),
            GroundSource::Reference(ReferenceGround::Nhnm) => "nhnm".into(),
        }
    }

    /// The file behind the source, if any.
    pub fn path(&self) -> Option<&Path> {
        match self {
            GroundSource::Recording(p) | GroundSource::PsdFile(p) => Some(p),
            GroundSource::Reference(_) => None,
        }
    }

    /// Load the spectrum. `grid` is used for reference models (clipped to their 10 Hz limit).
    pub fn load(&self, grid: &FreqGrid, scale: [f64; 3], opts: &SeriesOptions) -> Result<GroundSpectrum> {
        for (k, s) in scale.iter().enumerate() {
            crate::error::require_non_negative(|| format!("ground scale [{k}]"), *s)?;
        }
        let label = self.label();
        let scaled = |p: &Psd| -> Result<[Option<Psd>; 3]> {
            let mut out: [Option<Psd>; 3] = [None, None, None];
            for k in 0..3 {
                if scale[k] > 0.0 {
                    out[k] = Some(p.scale(scale[k])?);
                }
            }
            Ok(out)
        };
        let (axes, note) = match self {
            GroundSource::Reference(r) => {
                let hz: Vec<f64> = grid.hz().iter().copied().filter(|f| *f <= 10.0).collect();
                if hz.len() < 2 {
                    return Err(Error::invalid(
                        "ground",
                        "the reference models are defined up to 10 Hz; the analysis grid starts above that",
                    ));
                }
                let p = r.psd(&FreqGrid::new(hz)?)?;
                (scaled(&p)?, Some(format!("{label} is defined up to 10 Hz only")))
            }
            GroundSource::PsdFile(p) => {
                let psd = Psd::read_csv(p)?;
                if psd.quantity().motion_order().is_none() {
                    return Err(Error::invalid(
                        format!("ground PSD {}", p.display()),
                        format!("must be a motion PSD, got {}", psd.quantity()),
                    ));
                }
                (scaled(&psd)?, None)
            }
            GroundSource::Recording(p) => (recording_psds(p, scale, opts)?, None),
        };
        if axes.iter().all(Option::is_none) {
            return Err(Error::invalid("ground scale", "all three axes are zero"));
        }
        Ok(GroundSpectrum { label, source: self.clone(), axes, note })
    }
}

/// A ground-motion spectrum per model axis.
#[derive(Debug, Clone, PartialEq)]
pub struct GroundSpectrum {
    pub label: String,
    pub source: GroundSource,
    /// x, y, z (None: that axis is not excited).
    pub axes: [Option<Psd>; 3],
    pub note: Option<String>,
}

fn axis_index(name: &str) -> Option<usize> {
    match name.trim().to_ascii_lowercase().as_str() {
        "x" | "e" | "east" => Some(0),
        "y" | "n" | "north" => Some(1),
        "z" | "u" | "up" | "v" | "vertical" => Some(2),
        _ => match seed_orientation(name)? {
            'E' => Some(0),
            'N' => Some(1),
            'Z' => Some(2),
            _ => None,
        },
    }
}

/// The orientation code of a SEED channel id NET.STA.LOC.CHA: the last letter of the
/// three-letter channel code (SEED Reference Manual v2.4, appendix A: Z vertical, N north,
/// E east; 1, 2, 3, A, B, C, T, R and others are not along the site's axes).
fn seed_orientation(name: &str) -> Option<char> {
    let parts: Vec<&str> = name.trim().split('.').collect();
    let cha = parts.last()?;
    (parts.len() == 4 && cha.len() == 3).then(|| cha.chars().last()).flatten().map(|c| c.to_ascii_uppercase())
}

/// Welch segment: the power of two nearest 10 s of samples, at least 16, at most the length.
pub fn recording_nperseg(fs_hz: f64, n_frames: usize) -> usize {
    let target = (fs_hz * 10.0).max(16.0);
    let p = 2f64.powf(target.log2().round()) as usize;
    let mut n = p.max(16);
    while n > n_frames && n > 16 {
        n /= 2;
    }
    n
}

/// The spectrum quantity of a ground recording; counts and image tracks are refused.
pub(crate) fn ground_quantity(q: SeriesQuantity, file: &str) -> Result<Quantity> {
    match q {
        SeriesQuantity::Acceleration => Ok(Quantity::Acceleration),
        SeriesQuantity::Velocity => Ok(Quantity::Velocity),
        SeriesQuantity::Displacement => Ok(Quantity::Displacement),
        SeriesQuantity::Counts => Err(Error::invalid(
            format!("recording {file}"),
            "is in raw counts; give the sensor's sensitivity to convert to SI",
        )),
        SeriesQuantity::ImageAngle => Err(Error::invalid(
            format!("recording {file}"),
            "is an image track (arcsec or px), not ground motion",
        )),
    }
}

/// The model ground axis (0 = x, 1 = y, 2 = z) of each column of a recording: by name
/// (x/y/z, e/n/u, SEED orientation codes), else x, y, z for three columns and z for one.
pub(crate) fn ground_axis_map(names: &[String], file: &str) -> Result<Vec<usize>> {
    let mapped: Vec<Option<usize>> = names.iter().map(|n| axis_index(n)).collect();
    let map: Vec<usize> = if mapped.iter().all(Option::is_some) {
        mapped.into_iter().flatten().collect()
    } else if names.len() == 3 {
        vec![0, 1, 2]
    } else if names.len() == 1 {
        if let Some(c) = names.first().and_then(|n| seed_orientation(n)) {
            return Err(Error::invalid(
                format!("recording {file}"),
                format!(
                    "channel {} has orientation code '{c}', which is not east (E), north (N) or vertical (Z); rotate it to the site's axes first",
                    names[0]
                ),
            ));
        }
        vec![2]
    } else {
        return Err(Error::invalid(
            format!("recording {file}"),
            format!(
                "cannot tell which model axis each of the columns {names:?} is; name them x/y/z (or e/n/u)"
            ),
        ));
    };
    let mut seen = [false; 3];
    for &k in &map {
        if std::mem::replace(&mut seen[k], true) {
            return Err(Error::invalid(
                format!("recording {file}"),
                format!("two columns map to the same axis ({names:?})"),
            ));
        }
    }
    Ok(map)
}

fn recording_psds(path: &Path, scale: [f64; 3], opts: &SeriesOptions) -> Result<[Option<Psd>; 3]> {
    let s = read_series(path, opts)?;
    let file = path.display().to_string();
    let quantity = ground_quantity(s.quantity, &file)?;
    let map = ground_axis_map(&s.axis_names, &file)?;
    let n = s.n_frames();
    if n < 16 {
        return Err(Error::Parse {
            file,
            location: "data".into(),
            reason: format!("{n} frames are too few for a spectrum (need at least 16)"),
        });
    }
    let cfg = WelchConfig::new(recording_nperseg(s.fs_hz, n));
    let mut out: [Option<Psd>; 3] = [None, None, None];
    for (i, &k) in map.iter().enumerate() {
        if scale[k] <= 0.0 {
            continue;
        }
        let x = s.axis(i).unwrap_or_default();
        let est = welch(x, s.fs_hz, &cfg)?;
        out[k] = Some(est.to_psd(quantity)?.scale(scale[k])?);
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn nperseg_is_power_of_two_near_ten_seconds() {
        assert_eq!(recording_nperseg(200.0, 60_000), 2048);
        assert_eq!(recording_nperseg(100.0, 60_000), 1024);
        assert_eq!(recording_nperseg(200.0, 1000), 512);
    }

    #[test]
    fn recording_white_noise_level_and_axes() {
        // White noise of variance σ² sampled at fs has a one-sided PSD 2σ²/fs (Parseval).
        use rand::{Rng, SeedableRng};
        let dir = std::env::temp_dir().join(format!("stillsky-ground-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let p = dir.join("rec.csv");
        let mut rng = rand::rngs::StdRng::seed_from_u64(3);
        let mut text = String::from("# fs_hz=100\nz_m_s2,e_m_s2\n");
        for _ in 0..20_000 {
            let a: f64 = rng.sample(rand_distr::StandardNormal);
            let b: f64 = rng.sample(rand_distr::StandardNormal);
            text.push_str(&format!("{},{}\n", 1e-3 * a, 2e-3 * b));
        }
        std::fs::write(&p, text).unwrap();
        let g = GroundSource::parse(p.to_str().unwrap());
        assert!(matches!(g, GroundSource::Recording(_)));
        let grid = FreqGrid::log(0.5, 40.0, 50).unwrap();
        let s = g.load(&grid, [1.0, 1.0, 1.0], &SeriesOptions::default()).unwrap();
        assert!(s.axes[1].is_none());
        let z = s.axes[2].as_ref().unwrap();
        let x = s.axes[0].as_ref().unwrap();
        let mean = |p: &Psd| p.values().iter().sum::<f64>() / p.len() as f64;
        assert!((mean(z) / (2.0 * 1e-6 / 100.0) - 1.0).abs() < 0.05, "{}", mean(z));
        assert!((mean(x) / (2.0 * 4e-6 / 100.0) - 1.0).abs() < 0.05, "{}", mean(x));
    }

    #[test]
    fn bad_recording_names_file_and_line() {
        let dir = std::env::temp_dir().join(format!("stillsky-ground-bad-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let p = dir.join("bad.csv");
        std::fs::write(&p, "# fs_hz=100\nz_m_s2\n0.1\nNaN\n").unwrap();
        let grid = FreqGrid::log(0.5, 40.0, 50).unwrap();
        let e = GroundSource::parse(p.to_str().unwrap()).load(&grid, [1.0; 3], &SeriesOptions::default());
        let s = e.unwrap_err().to_string();
        assert!(s.contains("bad.csv") && s.contains("line 4"), "{s}");
    }
}

//! WAV recordings (integer PCM or float) via `hound`; channels become axes.

use std::fs::File;
use std::io::BufReader;
use std::path::Path;

use super::timing::{TimingReport, TimingSource};
use super::{SeriesChunk, SeriesFormat, SeriesHeader, SeriesOptions};
use crate::error::{Error, Result};

pub(crate) struct WavBackend {
    rdr: hound::WavReader<BufReader<File>>,
    n_axes: usize,
    float: bool,
    /// SI units per digital full scale, divided by 2^(bits−1) for integer samples.
    gain: f64,
    file: String,
    frames_done: usize,
}

fn wav_err(file: &str, e: hound::Error) -> Error {
    match e {
        hound::Error::IoError(io) => Error::Io { path: file.to_string(), reason: io.to_string() },
        other => {
            Error::Parse { file: file.to_string(), location: "WAV header".into(), reason: other.to_string() }
        }
    }
}

pub(crate) fn open(path: &Path, opts: &SeriesOptions) -> Result<(SeriesHeader, WavBackend)> {
    let file = path.display().to_string();
    let Some(full_scale) = opts.wav_full_scale else {
        return Err(Error::invalid(
            "wav_full_scale",
            format!(
                "{file}: a WAV file carries no physical unit; give the value of digital full scale \
                 (e.g. 2.0 g or 0.05 m/s)"
            ),
        ));
    };
    let factor = opts.stored_factor(full_scale.unit, &file)?;
    let rdr = hound::WavReader::open(path).map_err(|e| wav_err(&file, e))?;
    let spec = rdr.spec();
    let n_axes = spec.channels as usize;
    if !(1..=3).contains(&n_axes) {
        return Err(Error::Parse {
            file,
            location: "WAV header".into(),
            reason: format!("{n_axes} channels; 1 to 3 (one per axis) are supported"),
        });
    }
    let (float, gain) = match spec.sample_format {
        hound::SampleFormat::Float if spec.bits_per_sample == 32 => (true, full_scale.si() * factor),
        hound::SampleFormat::Int if (8..=32).contains(&spec.bits_per_sample) => {
            (false, full_scale.si() * factor / 2f64.powi(i32::from(spec.bits_per_sample) - 1))
        }
        f => {
            return Err(Error::Parse {
                file,
                location: "WAV header".into(),
                reason: format!("unsupported sample format {f:?} with {} bits", spec.bits_per_sample),
            });
        }
    };
    let fs_hz = f64::from(spec.sample_rate);
    if fs_hz <= 0.0 {
        return Err(Error::Parse { file, location: "WAV header".into(), reason: "sample rate 0".into() });
    }
    let n_frames = rdr.duration() as usize;
    let header = SeriesHeader {
        path: file.clone(),
        format: SeriesFormat::Wav,
        n_axes,
        axis_names: (1..=n_axes).map(|i| format!("ch{i}")).collect(),
        units_in_file: vec![format!("{} {} full scale", full_scale.value, full_scale.unit.symbol()); n_axes],
        fs_hz,
        quantity: full_scale.unit.quantity(),
        start_time: None,
        n_frames: Some(n_frames),
        report: TimingReport::nominal(fs_hz, n_frames, TimingSource::Nominal),
    };
    Ok((header, WavBackend { rdr, n_axes, float, gain, file, frames_done: 0 }))
}

impl WavBackend {
    pub(crate) fn read(&mut self, max_frames: usize, out: &mut SeriesChunk) -> Result<usize> {
        let n = max_frames.saturating_mul(self.n_axes);
        let mut i = 0usize;
        let (gain, n_axes) = (self.gain, self.n_axes);
        let start = self.frames_done;
        let file = &self.file;
        let mut push = |v: f64, i: &mut usize| -> Result<()> {
            if !v.is_finite() {
                return Err(Error::Parse {
                    file: file.clone(),
                    location: format!("frame {}, channel {}", start + *i / n_axes, *i % n_axes + 1),
                    reason: format!("sample {v} is not finite"),
                });
            }
            out.axes[*i % n_axes].push(v * gain);
            *i += 1;
            Ok(())
        };
        if self.float {
            for s in self.rdr.samples::<f32>().take(n) {
                push(f64::from(s.map_err(|e| wav_err(file, e))?), &mut i)?;
            }
        } else {
            for s in self.rdr.samples::<i32>().take(n) {
                push(f64::from(s.map_err(|e| wav_err(file, e))?), &mut i)?;
            }
        }
        if !i.is_multiple_of(n_axes) {
            return Err(Error::Parse {
                file: self.file.clone(),
                location: "end of data".into(),
                reason: "the last frame is incomplete (file truncated?)".into(),
            });
        }
        self.frames_done += i / n_axes;
        Ok(i / n_axes)
    }
}

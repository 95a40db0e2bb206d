//! Ground-vibration recordings (accelerometer or seismometer time series) → [`Series`] in SI.
//!
//! One parsing path: [`SeriesReader`] streams chunks of at most N frames; [`read_series`]
//! collects them (up to [`SeriesOptions::max_samples`]). Text recordings can also come from
//! memory ([`SeriesReader::from_text`], [`read_series_text`]) through the same parser.
//!
//! # Layout of the samples
//! Per axis ("planar"): [`Series::samples`] holds axis 0's frames, then axis 1's, then axis 2's;
//! [`Series::axis`] returns one axis as a slice. Axis order is the column / channel order of the
//! file. Samples are in SI: m/s² (acceleration), m/s (velocity), m (displacement), or raw counts
//! ([`SeriesQuantity::Counts`]) when no sensitivity was given for a miniSEED file.
//!
//! # Text files (CSV, or whitespace-separated)
//! ```text
//! # fs_hz=200                      optional metadata: lines '# key=value' before the header
//! # start_time=2024-05-01T21:00:00Z
//! z_m_s2,x_m_s2,y_m_s2             header: column names, then one row per frame
//! 0.0012,-0.0003,0.0001
//! ```
//! - Comment lines start with `#` (anywhere); blank lines are skipped. Only `fs_hz` and
//!   `start_time` are read from comments before the header; other comments are ignored.
//! - An axis column is named `<axis>_<unit>`: the axis name (no underscore), an underscore, and
//!   a unit token: `m_s2` (m/s²), `g` (9.80665 m/s²), `m_s`, `mm_s`, `um_s` (velocity), `m`,
//!   `mm`, `um` (displacement), `arcsec`, `px` (an image track, a star's centroid: px is
//!   converted to arcsec with [`SeriesOptions::plate_scale_arcsec_per_px`]). Examples: `z_m_s2`, `ax_g`, `n_um_s`, `z_mm`. A bare name (`z`)
//!   takes the unit of [`SeriesOptions::unit`]; an unknown token is an error listing the known
//!   ones. All axis columns must measure one quantity; 1 to 3 axis columns.
//! - Time: a column named `time_s`, `t_s` or `t` (seconds), or else a sample rate from
//!   [`SeriesOptions::fs_hz`] or a `# fs_hz=` line (the option wins).
//! - Timestamped files (irregular logs) are measured first (mean rate, interval std and max
//!   deviation from the median, gaps = intervals > 1.5 × median, see [`TimingReport`]). If the max
//!   deviation is below [`SeriesOptions::max_jitter_fraction`] (default 10 % of the median
//!   interval) and there is no gap, the samples are linearly interpolated onto the uniform grid
//!   t₀ + k/f_mean, k = 0..n−1 (same number of frames); otherwise the reader refuses with the
//!   numbers. Time must strictly increase. If a rate is also given it must agree within 1 %.
//! - One record per line: CSV fields split on `,` (spaces and one pair of surrounding double
//!   quotes trimmed; no quoted commas), whitespace files on runs of spaces or tabs. Reading line
//!   by line keeps the line numbers in errors exact, comments and blank lines included. Format by extension: `.csv` → CSV; `.txt`, `.dat`, `.tsv`, `.asc` → whitespace;
//!   `.wav`; `.mseed`, `.miniseed`, `.ms` → miniSEED; otherwise sniffed from the first bytes.
//!
//! # WAV
//! Integer PCM (8–32 bit) or 32-bit float, channels = axes (1–3, named `ch1`..). Samples are
//! scaled to ±1 at full scale (integer / 2^(bits−1)) and multiplied by
//! [`SeriesOptions::wav_full_scale`], which is required because WAV carries no unit.
//!
//! # miniSEED
//! See [`mseed`]: SEED 2.4 data records with blockette 1000; Steim-1, Steim-2, int16, int32,
//! float32, float64. One to three channels on one clock are read as axes (named by channel id);
//! otherwise choose one with [`SeriesOptions::channel`].
//!
//! # Errors
//! Missing file → [`Error::Io`]; empty file, bad header, non-numeric / NaN cell, wrong column
//! count, non-monotonic time, unknown unit → [`Error::Parse`] with `location` "line N" or
//! "line N, column C"; irregular timing → [`Error::InvalidArgument`] with the numbers; more than
//! `max_samples` in [`read_series`] → [`Error::TooLarge`].

pub mod mseed;
mod text;
mod timing;
mod units;
mod wav;

use std::path::Path;

pub use text::TIME_COLUMN_NAMES;
pub use timing::{DEFAULT_MAX_JITTER_FRACTION, GAP_FACTOR, Gap, MAX_LISTED_GAPS, TimingReport, TimingSource};
pub use units::{PhysicalValue, STANDARD_GRAVITY_M_S2, Sensitivity, SeriesQuantity, Unit};

use crate::error::{Error, Result};

/// Default limit of [`read_series`]: 20 million samples in total (160 MB of f64).
pub const DEFAULT_MAX_SAMPLES: usize = 20_000_000;

pub(crate) fn io_err(path: &str, e: std::io::Error) -> Error {
    Error::Io { path: path.to_string(), reason: e.to_string() }
}

/// File format of a recording.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SeriesFormat {
    /// Comma-separated text with a header line.
    Csv,
    /// Whitespace-separated text with a header line.
    Whitespace,
    /// RIFF WAV (integer PCM or float).
    Wav,
    /// miniSEED (SEED 2.4 data records).
    MiniSeed,
}

impl SeriesFormat {
    /// Format from the file extension, if it is a known one.
    pub fn from_extension(path: &Path) -> Option<SeriesFormat> {
        let ext = path.extension()?.to_str()?.to_ascii_lowercase();
        match ext.as_str() {
            "csv" => Some(SeriesFormat::Csv),
            "txt" | "dat" | "tsv" | "asc" => Some(SeriesFormat::Whitespace),
            "wav" => Some(SeriesFormat::Wav),
            "mseed" | "miniseed" | "ms" => Some(SeriesFormat::MiniSeed),
            _ => None,
        }
    }

    /// Format from the extension, else from the first bytes of the file.
    pub fn detect(path: &Path) -> Result<SeriesFormat> {
        if let Some(f) = Self::from_extension(path) {
            return Ok(f);
        }
        let file = path.display().to_string();
        let mut head = [0u8; 512];
        let n = {
            use std::io::Read;
            let mut f = std::fs::File::open(path).map_err(|e| io_err(&file, e))?;
            let mut n = 0;
            while n < head.len() {
                let k = f.read(&mut head[n..]).map_err(|e| io_err(&file, e))?;
                if k == 0 {
                    break;
                }
                n += k;
            }
            n
        };
        let head = &head[..n];
        if head.starts_with(b"RIFF") {
            return Ok(SeriesFormat::Wav);
        }
        if mseed::looks_like_record(head) {
            return Ok(SeriesFormat::MiniSeed);
        }
        let text = String::from_utf8_lossy(head);
        let first = text.lines().map(str::trim).find(|l| !l.is_empty() && !l.starts_with('#'));
        Ok(if first.is_some_and(|l| l.contains(',')) { SeriesFormat::Csv } else { SeriesFormat::Whitespace })
    }
}

/// Options of the recording readers. Build with `SeriesOptions::default().with_...()`.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub struct SeriesOptions {
    /// Force a format instead of detecting it.
    pub format: Option<SeriesFormat>,
    /// Sample rate (Hz) for text files without a time column; overrides `# fs_hz=`.
    pub fs_hz: Option<f64>,
    /// Unit of text columns whose name has no unit suffix.
    pub unit: Option<Unit>,
    /// WAV: the physical value of digital full scale (±1.0), e.g. 2 g. Required for WAV.
    pub wav_full_scale: Option<PhysicalValue>,
    /// miniSEED: counts per unit; without it samples stay in counts.
    pub sensitivity: Option<Sensitivity>,
    /// Image tracks: arcsec per px, to convert `px` columns (and a WAV full scale in px) to
    /// arcsec. Required when a column is in px.
    pub plate_scale_arcsec_per_px: Option<f64>,
    /// miniSEED: the channel to read, as `NET.STA.LOC.CHA` or just `CHA` (without it, every
    /// channel of a file of one to three on one clock is read, one axis each).
    pub channel: Option<String>,
    /// Timestamped text: largest allowed |interval − median| / median (default 0.10).
    pub max_jitter_fraction: f64,
    /// [`read_series`]: largest number of samples (frames × axes) loaded at once.
    pub max_samples: usize,
}

impl Default for SeriesOptions {
    fn default() -> Self {
        SeriesOptions {
            format: None,
            fs_hz: None,
            unit: None,
            wav_full_scale: None,
            sensitivity: None,
            plate_scale_arcsec_per_px: None,
            channel: None,
            max_jitter_fraction: DEFAULT_MAX_JITTER_FRACTION,
            max_samples: DEFAULT_MAX_SAMPLES,
        }
    }
}

impl SeriesOptions {
    /// Force the format.
    pub fn with_format(mut self, f: SeriesFormat) -> Self {
        self.format = Some(f);
        self
    }
    /// Sample rate for text files without a time column.
    pub fn with_fs_hz(mut self, fs_hz: f64) -> Self {
        self.fs_hz = Some(fs_hz);
        self
    }
    /// Unit of text columns without a unit suffix.
    pub fn with_unit(mut self, unit: Unit) -> Self {
        self.unit = Some(unit);
        self
    }
    /// WAV full scale, e.g. `PhysicalValue::new(2.0, Unit::StandardGravity)`.
    pub fn with_wav_full_scale(mut self, v: PhysicalValue) -> Self {
        self.wav_full_scale = Some(v);
        self
    }
    /// miniSEED sensitivity (counts per unit).
    pub fn with_sensitivity(mut self, s: Sensitivity) -> Self {
        self.sensitivity = Some(s);
        self
    }
    /// Plate scale (arcsec per px) for image tracks in px.
    pub fn with_plate_scale(mut self, arcsec_per_px: f64) -> Self {
        self.plate_scale_arcsec_per_px = Some(arcsec_per_px);
        self
    }
    /// Factor from a value in `unit` after [`Unit::to_si`] to the stored value: the plate
    /// scale for px, else 1. Errors (naming `plate_scale_arcsec_per_px` and `file`) when a px
    /// column has no plate scale.
    pub(crate) fn stored_factor(&self, unit: Unit, file: &str) -> Result<f64> {
        match (unit, self.plate_scale_arcsec_per_px) {
            (Unit::Pixel, Some(p)) => Ok(p),
            (Unit::Pixel, None) => Err(Error::invalid(
                "plate_scale_arcsec_per_px",
                format!(
                    "{file} holds an image track in px: give the plate scale (arcsec per px) to convert it to arcsec"
                ),
            )),
            _ => Ok(1.0),
        }
    }
    /// miniSEED channel to read.
    pub fn with_channel(mut self, c: impl Into<String>) -> Self {
        self.channel = Some(c.into());
        self
    }
    /// Jitter threshold for timestamped text.
    pub fn with_max_jitter_fraction(mut self, f: f64) -> Self {
        self.max_jitter_fraction = f;
        self
    }
    /// Limit of [`read_series`].
    pub fn with_max_samples(mut self, n: usize) -> Self {
        self.max_samples = n;
        self
    }

    fn validate(&self) -> Result<()> {
        if let Some(f) = self.fs_hz {
            crate::error::require_positive("fs_hz", f)?;
        }
        if let Some(v) = self.wav_full_scale {
            crate::error::require_positive("wav_full_scale", v.value)?;
        }
        if let Some(s) = self.sensitivity {
            crate::error::require_positive("sensitivity.counts_per_unit", s.counts_per_unit)?;
        }
        if let Some(p) = self.plate_scale_arcsec_per_px {
            crate::error::require_positive("plate_scale_arcsec_per_px", p)?;
        }
        let j = self.max_jitter_fraction;
        if !(j.is_finite() && j > 0.0 && j < 1.0) {
            return Err(Error::invalid("max_jitter_fraction", format!("must be in (0, 1), got {j}")));
        }
        if self.max_samples == 0 {
            return Err(Error::invalid("max_samples", "must be > 0"));
        }
        Ok(())
    }
}

/// What is known about a recording before its samples are read.
#[derive(Debug, Clone, PartialEq)]
pub struct SeriesHeader {
    /// The file, as given.
    pub path: String,
    /// Its format.
    pub format: SeriesFormat,
    /// Number of axes (1..=3).
    pub n_axes: usize,
    /// Axis names (column names without unit, `ch1`.. for WAV, channel id for miniSEED).
    pub axis_names: Vec<String>,
    /// Unit of each axis as written in the file (before conversion to SI).
    pub units_in_file: Vec<String>,
    /// Sample rate of the delivered samples (Hz).
    pub fs_hz: f64,
    /// What the samples measure; they are delivered in its SI unit.
    pub quantity: SeriesQuantity,
    /// Start time as text (ISO 8601 for miniSEED; as given by `# start_time=` for text).
    pub start_time: Option<String>,
    /// Number of frames that will be delivered, when known up front.
    pub n_frames: Option<usize>,
    /// Timing of the input (for text without a time column and WAV: nominal; for text
    /// without a time column `n_input_frames` is 0 here because the length is not known before
    /// reading; [`read_series`] fills it in).
    pub report: TimingReport,
}

/// A chunk of frames, per axis; reused across [`SeriesReader::next_chunk`] calls.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct SeriesChunk {
    axes: Vec<Vec<f64>>,
}

impl SeriesChunk {
    /// An empty chunk.
    pub fn new() -> Self {
        Self::default()
    }
    /// Frames in the chunk.
    pub fn n_frames(&self) -> usize {
        self.axes.first().map_or(0, Vec::len)
    }
    /// Number of axes.
    pub fn n_axes(&self) -> usize {
        self.axes.len()
    }
    /// Samples of axis `i` (SI), or None if there is no such axis.
    pub fn axis(&self, i: usize) -> Option<&[f64]> {
        self.axes.get(i).map(Vec::as_slice)
    }
    fn reset(&mut self, n_axes: usize) {
        self.axes.resize_with(n_axes, Vec::new);
        for a in &mut self.axes {
            a.clear();
        }
    }
}

enum Backend {
    Text(Box<text::TextBackend>),
    Wav(Box<wav::WavBackend>),
    MiniSeed(Box<mseed::MseedBackend>),
}

/// Streaming reader of a recording: metadata up front, then chunks of at most N frames.
///
/// ```
/// # use stillsky::io::series::*;
/// # let dir = std::env::temp_dir().join(format!("stillsky-doc-{}", std::process::id()));
/// # std::fs::create_dir_all(&dir).unwrap();
/// let path = dir.join("rec.csv");
/// std::fs::write(&path, "# fs_hz=100\nz_mm_s\n1\n2\n3\n").unwrap();
/// let mut rdr = SeriesReader::open(&path, &SeriesOptions::default()).unwrap();
/// assert_eq!(rdr.header().fs_hz, 100.0);
/// let mut chunk = SeriesChunk::new();
/// let mut total = Vec::new();
/// while rdr.next_chunk(2, &mut chunk).unwrap() > 0 {
///     total.extend_from_slice(chunk.axis(0).unwrap());
/// }
/// assert_eq!(total, [0.001, 0.002, 0.003]);
/// ```
pub struct SeriesReader {
    header: SeriesHeader,
    backend: Backend,
    frames_read: usize,
}

impl SeriesReader {
    /// Open a recording and read its metadata (for timestamped text: measure its timing,
    /// which reads the time column once).
    pub fn open(path: impl AsRef<Path>, opts: &SeriesOptions) -> Result<SeriesReader> {
        opts.validate()?;
        let path = path.as_ref();
        let format = match opts.format {
            Some(f) => f,
            None => SeriesFormat::detect(path)?,
        };
        let (header, backend) = match format {
            SeriesFormat::Csv | SeriesFormat::Whitespace => {
                let (h, b) = text::open(&text::TextSource::File(path.to_path_buf()), format, opts)?;
                (h, Backend::Text(Box::new(b)))
            }
            SeriesFormat::Wav => {
                let (h, b) = wav::open(path, opts)?;
                (h, Backend::Wav(Box::new(b)))
            }
            SeriesFormat::MiniSeed => {
                let (h, b) = mseed::open(path, opts)?;
                (h, Backend::MiniSeed(Box::new(b)))
            }
        };
        Ok(SeriesReader { header, backend, frames_read: 0 })
    }

    /// A reader over a text recording held in memory (CSV or whitespace-separated, as in the
    /// module docs); `label` names it in errors. The format is `opts.format` if set to a text
    /// format, else sniffed like a file without extension (a comma in the first non-comment
    /// line means CSV). WAV and miniSEED need a file: forcing them here is an error.
    pub fn from_text(text: &str, label: &str, opts: &SeriesOptions) -> Result<SeriesReader> {
        opts.validate()?;
        let format = match opts.format {
            Some(f @ (SeriesFormat::Csv | SeriesFormat::Whitespace)) => f,
            Some(f) => {
                return Err(Error::invalid("format", format!("{f:?} cannot be read from text; use a file")));
            }
            None => {
                let first = text.lines().map(str::trim).find(|l| !l.is_empty() && !l.starts_with('#'));
                if first.is_some_and(|l| l.contains(',')) {
                    SeriesFormat::Csv
                } else {
                    SeriesFormat::Whitespace
                }
            }
        };
        let src = text::TextSource::Memory { label: label.to_string(), bytes: text.as_bytes().into() };
        let (header, b) = text::open(&src, format, opts)?;
        Ok(SeriesReader { header, backend: Backend::Text(Box::new(b)), frames_read: 0 })
    }

    /// Metadata of the recording.
    pub fn header(&self) -> &SeriesHeader {
        &self.header
    }

    /// Frames delivered so far.
    pub fn frames_read(&self) -> usize {
        self.frames_read
    }

    /// Replace `chunk`'s content with the next at most `max_frames` frames (SI units); returns
    /// the number of frames, 0 at the end of the recording.
    pub fn next_chunk(&mut self, max_frames: usize, chunk: &mut SeriesChunk) -> Result<usize> {
        if max_frames == 0 {
            return Err(Error::invalid("max_frames", "must be > 0"));
        }
        chunk.reset(self.header.n_axes);
        let n = match &mut self.backend {
            Backend::Text(b) => b.read(max_frames, chunk)?,
            Backend::Wav(b) => b.read(max_frames, chunk)?,
            Backend::MiniSeed(b) => b.read(max_frames, chunk)?,
        };
        self.frames_read += n;
        Ok(n)
    }
}

/// A recording loaded in memory, samples in SI, per axis (see the module docs).
#[derive(Debug, Clone, PartialEq)]
pub struct Series {
    /// Planar samples: axis 0's frames, then axis 1's, ...; length `n_axes × n_frames()`.
    pub samples: Vec<f64>,
    /// Number of axes (1..=3).
    pub n_axes: usize,
    /// Axis names.
    pub axis_names: Vec<String>,
    /// Sample rate (Hz).
    pub fs_hz: f64,
    /// What the samples measure (their SI unit: [`SeriesQuantity::si_unit`]).
    pub quantity: SeriesQuantity,
    /// Start time as text, when the file gives one.
    pub start_time: Option<String>,
    /// Timing of the input and what was done about it.
    pub report: TimingReport,
}

impl Series {
    /// Frames (samples per axis).
    pub fn n_frames(&self) -> usize {
        self.samples.len().checked_div(self.n_axes).unwrap_or(0)
    }
    /// Samples of axis `i`, or None if there is no such axis.
    pub fn axis(&self, i: usize) -> Option<&[f64]> {
        let n = self.n_frames();
        (i < self.n_axes).then(|| &self.samples[i * n..(i + 1) * n])
    }
    /// Samples of the axis named `name`; a miniSEED axis also answers to its channel code alone
    /// (`HHZ` for `XX.STA..HHZ`, any case).
    pub fn axis_by_name(&self, name: &str) -> Option<&[f64]> {
        let i = self.axis_names.iter().position(|a| a == name);
        let i = i.or_else(|| self.axis_names.iter().position(|a| a.contains('.') && names_channel(a, name)));
        i.and_then(|i| self.axis(i))
    }
}

/// Whether `name` names the miniSEED channel `id` (`NET.STA.LOC.CHA`): the whole id or its
/// channel code, in any case.
pub(crate) fn names_channel(id: &str, name: &str) -> bool {
    id.eq_ignore_ascii_case(name) || id.rsplit('.').next().is_some_and(|cha| cha.eq_ignore_ascii_case(name))
}

/// Read a whole recording (built on [`SeriesReader`]); refuses more than
/// [`SeriesOptions::max_samples`] samples with [`Error::TooLarge`].
pub fn read_series(path: impl AsRef<Path>, opts: &SeriesOptions) -> Result<Series> {
    collect(SeriesReader::open(path, opts)?, opts)
}

/// Read a whole text recording held in memory ([`SeriesReader::from_text`]); limits and errors
/// as [`read_series`].
pub fn read_series_text(text: &str, label: &str, opts: &SeriesOptions) -> Result<Series> {
    collect(SeriesReader::from_text(text, label, opts)?, opts)
}

fn collect(mut rdr: SeriesReader, opts: &SeriesOptions) -> Result<Series> {
    let h = rdr.header().clone();
    let too_large = |value: usize| Error::TooLarge {
        what: format!("samples in {} (use SeriesReader to stream long recordings)", h.path),
        value,
        limit: opts.max_samples,
    };
    if let Some(n) = h.n_frames
        && n.saturating_mul(h.n_axes) > opts.max_samples
    {
        return Err(too_large(n.saturating_mul(h.n_axes)));
    }
    let mut axes: Vec<Vec<f64>> = vec![Vec::with_capacity(h.n_frames.unwrap_or(0)); h.n_axes];
    let mut chunk = SeriesChunk::new();
    loop {
        let n = rdr.next_chunk(65_536, &mut chunk)?;
        if n == 0 {
            break;
        }
        let total = (axes[0].len() + n).saturating_mul(h.n_axes);
        if total > opts.max_samples {
            return Err(too_large(total));
        }
        for (dst, src) in axes.iter_mut().zip(&chunk.axes) {
            dst.extend_from_slice(src);
        }
    }
    let n_frames = axes[0].len();
    if n_frames == 0 {
        return Err(Error::Parse { file: h.path, location: "data".into(), reason: "no samples".into() });
    }
    let mut report = h.report;
    if report.source == TimingSource::Nominal {
        report = TimingReport {
            max_jitter_fraction: report.max_jitter_fraction,
            ..TimingReport::nominal(h.fs_hz, n_frames, TimingSource::Nominal)
        };
    }
    Ok(Series {
        samples: axes.concat(),
        n_axes: h.n_axes,
        axis_names: h.axis_names,
        fs_hz: h.fs_hz,
        quantity: h.quantity,
        start_time: h.start_time,
        report,
    })
}

/// Measure the timing of a text recording with a time column, without refusing irregular
/// sampling (for a report of jitter and gaps before deciding what to do).
pub fn inspect_timing(path: impl AsRef<Path>, opts: &SeriesOptions) -> Result<TimingReport> {
    opts.validate()?;
    let path = path.as_ref();
    let format = match opts.format {
        Some(f) => f,
        None => SeriesFormat::detect(path)?,
    };
    match format {
        SeriesFormat::Csv | SeriesFormat::Whitespace => text::inspect(path, format, opts),
        SeriesFormat::MiniSeed => mseed::inspect(path, opts),
        SeriesFormat::Wav => {
            let (h, _) = wav::open(path, opts)?;
            Ok(h.report)
        }
    }
}

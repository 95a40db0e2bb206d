//! CSV and whitespace-separated text recordings (format described in [`super`]).

use std::fs::File;
use std::io::{BufRead, BufReader, Cursor};
use std::path::{Path, PathBuf};
use std::sync::Arc;

use super::timing::{GapFinder, TimingAccumulator, TimingReport, TimingSource};
use super::units::{SeriesQuantity, Unit};
use super::{SeriesChunk, SeriesFormat, SeriesHeader, SeriesOptions, io_err};
use crate::error::{Error, Result};

/// Names accepted for the time column (seconds), compared case-insensitively.
pub const TIME_COLUMN_NAMES: [&str; 3] = ["time_s", "t", "t_s"];

fn parse_err(file: &str, location: String, reason: impl Into<String>) -> Error {
    Error::Parse { file: file.to_string(), location, reason: reason.into() }
}

/// What the preamble and header line say.
#[derive(Debug)]
struct Layout {
    header_line: usize,
    n_cols: usize,
    time_col: Option<usize>,
    axis_cols: Vec<usize>,
    axis_names: Vec<String>,
    units: Vec<Unit>,
    fs_hz: Option<f64>,
    start_time: Option<String>,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Delim {
    Comma,
    Whitespace,
}

/// Where text comes from: a file, or bytes in memory (read twice for timestamped files, like
/// a file, so both take one path through the parser).
#[derive(Debug, Clone)]
pub(crate) enum TextSource {
    File(PathBuf),
    Memory { label: String, bytes: Arc<[u8]> },
}

type LineReader = Box<dyn BufRead + Send>;

impl TextSource {
    fn label(&self) -> String {
        match self {
            TextSource::File(p) => p.display().to_string(),
            TextSource::Memory { label, .. } => label.clone(),
        }
    }
    fn open(&self) -> Result<LineReader> {
        Ok(match self {
            TextSource::File(p) => Box::new(BufReader::new(open_file(p)?)),
            TextSource::Memory { bytes, .. } => Box::new(Cursor::new(Arc::clone(bytes))),
        })
    }
}

/// Rows of numbers after the header line, with their line numbers.
struct Rows {
    file: String,
    rdr: LineReader,
    delim: Delim,
    buf: String,
    line: usize,
    n_cols: usize,
    row: Vec<f64>,
}

/// Split a CSV field: trim spaces and one pair of surrounding double quotes.
fn csv_field(s: &str) -> &str {
    let s = s.trim();
    s.strip_prefix('"').and_then(|x| x.strip_suffix('"')).map_or(s, str::trim)
}

/// `read_line` with text errors (invalid UTF-8) reported as a parse error at `line`.
fn read_line(rdr: &mut LineReader, buf: &mut String, file: &str, line: usize) -> Result<usize> {
    rdr.read_line(buf).map_err(|e| match e.kind() {
        std::io::ErrorKind::InvalidData => parse_err(file, format!("line {line}"), "not UTF-8 text"),
        _ => io_err(file, e),
    })
}

fn parse_cell(s: &str, file: &str, line: usize, col: usize) -> Result<f64> {
    let loc = || format!("line {line}, column {col}");
    if s.is_empty() {
        return Err(parse_err(file, loc(), "empty cell"));
    }
    match s.parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(v),
        Ok(_) => {
            Err(parse_err(file, loc(), format!("'{s}' is not a finite number (NaN and inf are not allowed)")))
        }
        Err(_) => Err(parse_err(file, loc(), format!("'{s}' is not a number"))),
    }
}

impl Rows {
    /// Read the next data row into `self.row` (only column `only` if given); returns its
    /// line number, or None at the end of the file.
    fn next(&mut self, only: Option<usize>) -> Result<Option<usize>> {
        let file = self.file.as_str();
        let n_cols = self.n_cols;
        let row = &mut self.row;
        let mut fill = |fields: &mut dyn Iterator<Item = &str>, count: usize, line: usize| -> Result<()> {
            if count != n_cols {
                return Err(parse_err(
                    file,
                    format!("line {line}"),
                    format!("expected {n_cols} columns as in the header, found {count}"),
                ));
            }
            for (c, s) in fields.enumerate() {
                if only.is_none_or(|o| o == c) {
                    row[c] = parse_cell(s, file, line, c + 1)?;
                }
            }
            Ok(())
        };
        loop {
            self.buf.clear();
            let n = read_line(&mut self.rdr, &mut self.buf, file, self.line + 1)?;
            if n == 0 {
                return Ok(None);
            }
            self.line += 1;
            let line = self.line;
            let t = self.buf.trim();
            if t.is_empty() || t.starts_with('#') {
                continue;
            }
            match self.delim {
                Delim::Comma => {
                    let count = t.split(',').count();
                    fill(&mut t.split(',').map(csv_field), count, line)?;
                }
                Delim::Whitespace => {
                    let count = t.split_whitespace().count();
                    fill(&mut t.split_whitespace(), count, line)?;
                }
            }
            return Ok(Some(line));
        }
    }
}

fn open_file(path: &Path) -> Result<File> {
    File::open(path).map_err(|e| io_err(&path.display().to_string(), e))
}

/// Read the preamble and header line, classify the columns, and return the rows after it.
fn open_rows(src: &TextSource, format: SeriesFormat, opts: &SeriesOptions) -> Result<(Layout, Rows)> {
    let file = src.label();
    let mut rdr = src.open()?;
    let mut fs_hz = None;
    let mut start_time = None;
    let mut line_no = 0usize;
    let mut buf = String::new();
    let header = loop {
        buf.clear();
        let n = read_line(&mut rdr, &mut buf, &file, line_no + 1)?;
        if n == 0 {
            let reason = if line_no == 0 {
                "file is empty".to_string()
            } else {
                "no header line (only comments or blank lines)".to_string()
            };
            return Err(parse_err(&file, format!("line {}", line_no.max(1)), reason));
        }
        line_no += 1;
        let t = buf.trim();
        if t.is_empty() {
            continue;
        }
        if let Some(c) = t.strip_prefix('#') {
            if let Some((k, v)) = c.split_once('=') {
                let (k, v) = (k.trim().to_ascii_lowercase(), v.trim());
                match k.as_str() {
                    "fs_hz" => match v.parse::<f64>() {
                        Ok(f) if f.is_finite() && f > 0.0 => fs_hz = Some(f),
                        _ => {
                            return Err(parse_err(
                                &file,
                                format!("line {line_no}"),
                                format!("fs_hz = '{v}' must be a finite number > 0"),
                            ));
                        }
                    },
                    "start_time" => start_time = Some(v.to_string()),
                    _ => {}
                }
            }
            continue;
        }
        break t.to_string();
    };
    let names: Vec<String> = match format {
        SeriesFormat::Csv => header.split(',').map(|s| csv_field(s).to_string()).collect(),
        _ => header.split_whitespace().map(str::to_string).collect(),
    };
    let layout = classify(&file, line_no, &names, fs_hz, start_time, opts)?;
    let delim = if format == SeriesFormat::Csv { Delim::Comma } else { Delim::Whitespace };
    let rows = Rows {
        file,
        rdr,
        delim,
        buf: String::new(),
        line: line_no,
        n_cols: layout.n_cols,
        row: vec![0.0; layout.n_cols],
    };
    Ok((layout, rows))
}

fn classify(
    file: &str,
    line: usize,
    names: &[String],
    fs_hz: Option<f64>,
    start_time: Option<String>,
    opts: &SeriesOptions,
) -> Result<Layout> {
    let err =
        |col: usize, reason: String| parse_err(file, format!("line {line}, column {col} (header)"), reason);
    let mut time_col = None;
    let (mut axis_cols, mut axis_names, mut units) = (Vec::new(), Vec::new(), Vec::new());
    for (i, name) in names.iter().enumerate() {
        let col = i + 1;
        if name.is_empty() {
            return Err(err(col, "empty column name".into()));
        }
        if name.parse::<f64>().is_ok() {
            return Err(err(
                col,
                format!("expected a header line of column names, found the number '{name}'"),
            ));
        }
        if names[..i].iter().any(|n| n.eq_ignore_ascii_case(name)) {
            return Err(err(col, format!("duplicate column name '{name}'")));
        }
        let lower = name.to_ascii_lowercase();
        if TIME_COLUMN_NAMES.contains(&lower.as_str()) {
            if time_col.is_some() {
                return Err(err(col, format!("second time column '{name}'")));
            }
            time_col = Some(i);
            continue;
        }
        let (axis, unit) = match name.split_once('_') {
            Some((a, u)) => {
                let unit = Unit::parse(u).map_err(|_| {
                    err(
                        col,
                        format!(
                            "unknown unit '{u}' in column '{name}'; known units: {}",
                            Unit::known_tokens()
                        ),
                    )
                })?;
                if let Some(o) = opts.unit.filter(|o| *o != unit) {
                    return Err(err(
                        col,
                        format!(
                            "column '{name}' says {} but the unit option says {}",
                            unit.symbol(),
                            o.symbol()
                        ),
                    ));
                }
                (a.to_string(), unit)
            }
            None => match opts.unit {
                Some(u) => (name.clone(), u),
                None => {
                    return Err(err(
                        col,
                        format!(
                            "column '{name}' has no unit: name it like '{name}_m_s2' (known units: {}) \
                             or pass a unit option",
                            Unit::known_tokens()
                        ),
                    ));
                }
            },
        };
        if let Some(u0) = units.first().copied().filter(|u0: &Unit| u0.quantity() != unit.quantity()) {
            return Err(err(
                col,
                format!(
                    "column '{name}' is {:?} but earlier columns are {:?}; one file holds one quantity",
                    unit.quantity(),
                    u0.quantity()
                ),
            ));
        }
        axis_cols.push(i);
        axis_names.push(axis);
        units.push(unit);
    }
    if axis_cols.is_empty() {
        return Err(parse_err(
            file,
            format!("line {line} (header)"),
            "no axis column (need 1 to 3, e.g. z_m_s2)",
        ));
    }
    if axis_cols.len() > 3 {
        return Err(parse_err(
            file,
            format!("line {line} (header)"),
            format!("{} axis columns; at most 3 are allowed", axis_cols.len()),
        ));
    }
    Ok(Layout {
        header_line: line,
        n_cols: names.len(),
        time_col,
        axis_cols,
        axis_names,
        units,
        fs_hz,
        start_time,
    })
}

/// Linear interpolation of timestamped rows onto the uniform grid t0 + k·dt, k < n_out.
struct Resampler {
    t0: f64,
    t_last: f64,
    dt: f64,
    n_out: usize,
    k: usize,
    prev: Option<(f64, Vec<f64>)>,
    cur: Option<(f64, Vec<f64>)>,
}

/// A streaming text backend.
pub(crate) struct TextBackend {
    rows: Rows,
    time_col: Option<usize>,
    axis_cols: Vec<usize>,
    units: Vec<Unit>,
    /// Per axis: factor after `Unit::to_si` (the plate scale for px, else 1).
    factors: Vec<f64>,
    resampler: Option<Resampler>,
}

/// Run the timing pass over the time column (and a second one if there are gaps).
fn timing_pass(src: &TextSource, format: SeriesFormat, opts: &SeriesOptions) -> Result<TimingReport> {
    let (layout, mut rows) = open_rows(src, format, opts)?;
    let Some(tc) = layout.time_col else {
        return Err(Error::invalid("time column", format!("{} has no time column", rows.file)));
    };
    let mut acc = TimingAccumulator::default();
    while let Some(line) = rows.next(Some(tc))? {
        acc.push(rows.row[tc], &rows.file, line)?;
    }
    let mut report = acc.finish(&rows.file, opts.max_jitter_fraction)?;
    if report.n_gaps > 0 {
        let (_, mut rows) = open_rows(src, format, opts)?;
        let mut gf = GapFinder::new(report.median_interval_s);
        while rows.next(Some(tc))?.is_some() {
            gf.push(rows.row[tc]);
        }
        report.gaps = gf.gaps;
    }
    Ok(report)
}

/// Timing report of a text file with a time column, without refusing irregular sampling.
pub(crate) fn inspect(path: &Path, format: SeriesFormat, opts: &SeriesOptions) -> Result<TimingReport> {
    timing_pass(&TextSource::File(path.to_path_buf()), format, opts)
}

pub(crate) fn open(
    src: &TextSource,
    format: SeriesFormat,
    opts: &SeriesOptions,
) -> Result<(SeriesHeader, TextBackend)> {
    let (layout, rows) = open_rows(src, format, opts)?;
    let file = rows.file.clone();
    let given_fs = opts.fs_hz.or(layout.fs_hz);
    let (fs_hz, report, resampler, n_frames) = match layout.time_col {
        Some(_) => {
            let mut report = timing_pass(src, format, opts)?;
            if !report.is_acceptable() {
                return Err(Error::invalid(
                    format!("sample times of {file}"),
                    format!("too irregular to resample onto a uniform grid: {}", report.describe()),
                ));
            }
            if let Some(f) = given_fs
                && ((f - report.fs_hz_mean) / report.fs_hz_mean).abs() > 0.01
            {
                return Err(Error::invalid(
                    "fs_hz",
                    format!(
                        "{f} Hz was given but the time column of {file} gives {} Hz (differ by > 1 %)",
                        report.fs_hz_mean
                    ),
                ));
            }
            report.resampled = true;
            let rs = Resampler {
                t0: report.first_time_s,
                t_last: report.last_time_s,
                dt: report.mean_interval_s,
                n_out: report.n_input_frames,
                k: 0,
                prev: None,
                cur: None,
            };
            (report.fs_hz_mean, report.clone(), Some(rs), Some(report.n_input_frames))
        }
        None => {
            let Some(fs) = given_fs else {
                return Err(parse_err(
                    &file,
                    format!("line {} (header)", layout.header_line),
                    "no time column (time_s or t) and no sample rate: add a '# fs_hz=<rate>' line \
                     before the header or pass fs_hz",
                ));
            };
            let mut r = TimingReport::nominal(fs, 0, TimingSource::Nominal);
            r.max_jitter_fraction = opts.max_jitter_fraction;
            (fs, r, None, None)
        }
    };
    let quantity: SeriesQuantity = layout.units[0].quantity();
    let header = SeriesHeader {
        path: file,
        format,
        n_axes: layout.axis_cols.len(),
        axis_names: layout.axis_names.clone(),
        units_in_file: layout.units.iter().map(|u| u.symbol().to_string()).collect(),
        fs_hz,
        quantity,
        start_time: layout.start_time.clone(),
        n_frames,
        report,
    };
    let factors =
        layout.units.iter().map(|&u| opts.stored_factor(u, &header.path)).collect::<Result<Vec<f64>>>()?;
    let backend = TextBackend {
        rows,
        time_col: layout.time_col,
        axis_cols: layout.axis_cols,
        units: layout.units,
        factors,
        resampler,
    };
    Ok((header, backend))
}

impl TextBackend {
    /// Convert the current row's axis columns to SI into `dst`.
    fn row_si(&self, dst: &mut Vec<f64>) {
        dst.clear();
        dst.extend(
            self.axis_cols
                .iter()
                .zip(&self.units)
                .zip(&self.factors)
                .map(|((&c, u), k)| u.to_si(self.rows.row[c]) * k),
        );
    }

    pub(crate) fn read(&mut self, max_frames: usize, out: &mut SeriesChunk) -> Result<usize> {
        let mut got = 0;
        if self.resampler.is_none() {
            while got < max_frames {
                if self.rows.next(None)?.is_none() {
                    break;
                }
                for (a, ((&c, u), k)) in self.axis_cols.iter().zip(&self.units).zip(&self.factors).enumerate()
                {
                    out.axes[a].push(u.to_si(self.rows.row[c]) * k);
                }
                got += 1;
            }
            return Ok(got);
        }
        let tc = self.time_col.unwrap_or(0);
        while got < max_frames {
            let Some(rs) = self.resampler.as_ref() else { break };
            if rs.k >= rs.n_out {
                break;
            }
            let tk = if rs.k + 1 == rs.n_out { rs.t_last } else { rs.t0 + rs.k as f64 * rs.dt };
            // Advance until the current row is at or after tk.
            while self.resampler.as_ref().is_some_and(|rs| rs.cur.as_ref().is_none_or(|(t, _)| *t < tk)) {
                if self.rows.next(None)?.is_none() {
                    return Err(parse_err(
                        &self.rows.file,
                        "end of file".into(),
                        "file changed while reading (fewer rows than in the timing pass)",
                    ));
                }
                let t = self.rows.row[tc];
                let mut vals = Vec::new();
                if let Some(rs) = self.resampler.as_mut() {
                    if let Some(p) = rs.prev.take() {
                        vals = p.1;
                    }
                    rs.prev = rs.cur.take();
                }
                self.row_si(&mut vals);
                if let Some(rs) = self.resampler.as_mut() {
                    rs.cur = Some((t, vals));
                }
            }
            let Some(rs) = self.resampler.as_mut() else { break };
            let Some((tc1, v1)) = rs.cur.as_ref() else { break };
            match rs.prev.as_ref() {
                Some((tc0, v0)) if tk < *tc1 => {
                    let w = (tk - tc0) / (tc1 - tc0);
                    for (a, (x0, x1)) in v0.iter().zip(v1).enumerate() {
                        out.axes[a].push(x0 + (x1 - x0) * w);
                    }
                }
                _ => {
                    for (a, x1) in v1.iter().enumerate() {
                        out.axes[a].push(*x1);
                    }
                }
            }
            rs.k += 1;
            got += 1;
        }
        Ok(got)
    }
}

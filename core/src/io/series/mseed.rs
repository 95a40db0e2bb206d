//! miniSEED reader: SEED 2.4 fixed-header data records, decoded from the SEED Reference
//! Manual v2.4 (FDSN, 2012), chapter 8 (fixed section of data header, blockettes 100, 1000,
//! 1001) and appendix B (Steim-1 and Steim-2 compression).
//!
//! Supported: records with blockette 1000 (record length 2^7..2^20 bytes, encoding, word
//! order); encodings 1 (int16), 3 (int32), 4 (float32), 5 (float64), 10 (Steim-1), 11
//! (Steim-2), in either byte order (the header's order is detected from its year/day fields, the
//! data's from blockette 1000). Records without samples or with rate 0 (log, timing records) are
//! skipped. Blockette 100 (actual rate) overrides the rate factor/multiplier; blockette 1001
//! adds its microseconds; a time correction not yet applied (activity flag bit 1) is added.
//!
//! A file of one channel gives one axis. A file of two or three channels (e.g. a station's E, N
//! and Z) gives one axis per channel, named by its id, when they share the sample rate and their
//! first samples lie within half a sample period of each other; the series then ends with the
//! shortest channel. Otherwise, or with more channels, choose one with
//! [`SeriesOptions::channel`]. Records are ordered by start time; a gap or overlap between
//! records (more than half a sample period) refuses the file with the list of gaps
//! ([`super::inspect_timing`] reports them without refusing). Samples are counts unless
//! [`SeriesOptions::sensitivity`] is given. Records are decoded one at a time while streaming.
//!
//! Why not a crate: the `mseed` crate (0.7.1, wrapping libmseed) does not build on the project's
//! machines: its build script runs bindgen, which needs libclang, and libclang is not installed
//! (checked 2026-12-02: "Unable to find libclang"). The decoder here is checked sample for sample
//! against ObsPy (libmseed) in `core/tests/series_mseed.rs` and `bindings-py/tests/test_series.py`.

use std::fs::File;
use std::io::{BufReader, Read, Seek, SeekFrom};
use std::path::Path;

use super::timing::{Gap, MAX_LISTED_GAPS, TimingReport, TimingSource};
use super::units::{Sensitivity, SeriesQuantity};
use super::{SeriesChunk, SeriesFormat, SeriesHeader, SeriesOptions, io_err, names_channel};
use crate::error::{Error, Result};

/// Data encodings this reader decodes (SEED 2.4 blockette 1000 codes).
pub const SUPPORTED_ENCODINGS: [(u8, &str); 6] =
    [(1, "int16"), (3, "int32"), (4, "float32"), (5, "float64"), (10, "Steim-1"), (11, "Steim-2")];

/// True if `head` starts like a SEED data record (sequence number, quality code D/R/Q/M).
pub(crate) fn looks_like_record(head: &[u8]) -> bool {
    head.len() >= 48
        && head[..6].iter().all(|b| b.is_ascii_digit() || *b == b' ' || *b == 0)
        && matches!(head[6], b'D' | b'R' | b'Q' | b'M')
        && matches!(head[7], b' ' | 0)
}

/// What the prescan learns about one record.
#[derive(Debug, Clone)]
struct RecordInfo {
    offset: u64,
    len: usize,
    id: String,
    /// Start time, µs since 1970-01-01T00:00:00 UTC.
    start_us: i64,
    n_samples: usize,
    fs_hz: f64,
    encoding: u8,
    data_big_endian: bool,
    data_offset: usize,
}

fn perr(file: &str, location: String, reason: impl Into<String>) -> Error {
    Error::Parse { file: file.to_string(), location, reason: reason.into() }
}

fn u16_at(b: &[u8], i: usize, big: bool) -> u16 {
    let a = [b[i], b[i + 1]];
    if big { u16::from_be_bytes(a) } else { u16::from_le_bytes(a) }
}

fn u32_at(b: &[u8], i: usize, big: bool) -> u32 {
    let a = [b[i], b[i + 1], b[i + 2], b[i + 3]];
    if big { u32::from_be_bytes(a) } else { u32::from_le_bytes(a) }
}

/// Days from 1970-01-01 to year-01-01 (proleptic Gregorian).
fn days_to_year_start(year: i64) -> i64 {
    let y = year - 1;
    365 * (year - 1970) + (y / 4 - y / 100 + y / 400) - (1969 / 4 - 1969 / 100 + 1969 / 400)
}

/// Civil date from days since 1970-01-01 (H. Hinnant's `civil_from_days` algorithm).
fn civil_from_days(z: i64) -> (i64, u32, u32) {
    let z = z + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z.rem_euclid(146_097);
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = (doy - (153 * mp + 2) / 5 + 1) as u32;
    let m = if mp < 10 { mp + 3 } else { mp - 9 } as u32;
    let y = yoe + era * 400 + i64::from(m <= 2);
    (y, m, d)
}

/// ISO 8601 text (µs) of a time in µs since the epoch.
fn iso_time(us: i64) -> String {
    let (days, rem) = (us.div_euclid(86_400_000_000), us.rem_euclid(86_400_000_000));
    let (y, m, d) = civil_from_days(days);
    let s = rem / 1_000_000;
    format!("{y:04}-{m:02}-{d:02}T{:02}:{:02}:{:02}.{:06}Z", s / 3600, (s / 60) % 60, s % 60, rem % 1_000_000)
}

/// Nominal rate from the factor and multiplier (SEED 2.4, fixed header fields 10 and 11).
fn rate_from_factors(f: i16, m: i16) -> f64 {
    let (f, m) = (f64::from(f), f64::from(m));
    match (f > 0.0, m > 0.0) {
        _ if f == 0.0 || m == 0.0 => 0.0,
        (true, true) => f * m,
        (true, false) => -f / m,
        (false, true) => -m / f,
        (false, false) => 1.0 / (f * m),
    }
}

/// Parse a record's fixed header and blockettes; `head` holds the first bytes of the record.
fn parse_record_header(head: &[u8], offset: u64, file: &str) -> Result<RecordInfo> {
    let loc = || format!("record at byte {offset}");
    if !looks_like_record(head) {
        return Err(perr(
            file,
            loc(),
            "not a SEED data record (sequence number and quality code D/R/Q/M expected)",
        ));
    }
    // Header byte order: the one giving a plausible year and day of year.
    let plausible = |big: bool| {
        let (y, d) = (u16_at(head, 20, big), u16_at(head, 22, big));
        (1900..=2100).contains(&y) && (1..=366).contains(&d)
    };
    let big = if plausible(true) {
        true
    } else if plausible(false) {
        false
    } else {
        return Err(perr(file, loc(), "start time has no plausible year/day in either byte order"));
    };
    let txt = |a: usize, b: usize| String::from_utf8_lossy(&head[a..b]).trim().to_string();
    let id = format!("{}.{}.{}.{}", txt(18, 20), txt(8, 13), txt(13, 15), txt(15, 18));
    let (year, doy) = (i64::from(u16_at(head, 20, big)), i64::from(u16_at(head, 22, big)));
    let (hh, mm, ss) = (i64::from(head[24]), i64::from(head[25]), i64::from(head[26]));
    let tenth_ms = i64::from(u16_at(head, 28, big));
    let n_samples = usize::from(u16_at(head, 30, big));
    let mut fs_hz = rate_from_factors(u16_at(head, 32, big) as i16, u16_at(head, 34, big) as i16);
    let activity = head[36];
    let n_blockettes = usize::from(head[39]);
    let time_correction = u32_at(head, 40, big) as i32;
    let data_offset = usize::from(u16_at(head, 44, big));
    let mut boff = usize::from(u16_at(head, 46, big));
    let mut start_us = (days_to_year_start(year) + doy - 1) * 86_400_000_000
        + (hh * 3600 + mm * 60 + ss) * 1_000_000
        + tenth_ms * 100;
    if activity & 0x02 == 0 {
        start_us += i64::from(time_correction) * 100;
    }
    let (mut b1000, mut seen) = (None, 0usize);
    while boff != 0 {
        if boff < 48 || boff + 8 > head.len() || seen > n_blockettes.max(8) {
            return Err(perr(
                file,
                loc(),
                format!("blockette chain points to byte {boff}, outside the header"),
            ));
        }
        let kind = u16_at(head, boff, big);
        let next = usize::from(u16_at(head, boff + 2, big));
        match kind {
            1000 => b1000 = Some((head[boff + 4], head[boff + 5], head[boff + 6])),
            1001 => start_us += i64::from(head[boff + 5] as i8),
            100 if boff + 8 <= head.len() => {
                let r = f32::from_bits(u32_at(head, boff + 4, big));
                if r.is_finite() && r > 0.0 {
                    fs_hz = f64::from(r);
                }
            }
            _ => {}
        }
        if next != 0 && next <= boff {
            return Err(perr(file, loc(), "blockette chain loops back"));
        }
        boff = next;
        seen += 1;
    }
    let Some((encoding, word_order, exp)) = b1000 else {
        return Err(perr(
            file,
            loc(),
            "no blockette 1000 (record length and encoding unknown): not supported",
        ));
    };
    if !(7..=20).contains(&exp) {
        return Err(perr(file, loc(), format!("record length exponent {exp} outside 7..=20")));
    }
    let len = 1usize << exp;
    if n_samples > 0 && (data_offset < 48 || data_offset >= len) {
        return Err(perr(
            file,
            loc(),
            format!("beginning of data {data_offset} outside the record of {len} bytes"),
        ));
    }
    Ok(RecordInfo {
        offset,
        len,
        id,
        start_us,
        n_samples,
        fs_hz,
        encoding,
        data_big_endian: word_order != 0,
        data_offset,
    })
}

/// Sign-extend the low `bits` bits of `v`.
fn sext(v: u32, bits: u32) -> i32 {
    ((v << (32 - bits)) as i32) >> (32 - bits)
}

/// Decode Steim-1 (`v2 = false`) or Steim-2 frames into `n` integer samples.
fn decode_steim(
    data: &[u8],
    n: usize,
    big: bool,
    v2: bool,
    out: &mut Vec<i32>,
) -> std::result::Result<(), String> {
    let n_frames = data.len() / 64;
    if n_frames == 0 {
        return Err("no Steim frame in the record".into());
    }
    let word = |i: usize| u32_at(data, 4 * i, big);
    let (x0, xn) = (word(1) as i32, word(2) as i32);
    let mut diffs: Vec<i32> = Vec::with_capacity(n);
    'frames: for f in 0..n_frames {
        let w0 = word(16 * f);
        for j in 1..16 {
            if diffs.len() >= n {
                break 'frames;
            }
            if f == 0 && j <= 2 {
                continue; // integration constants X0 and Xn
            }
            let c = (w0 >> (30 - 2 * j)) & 3;
            let w = word(16 * f + j);
            let (count, bits): (u32, u32) = match (c, v2, w >> 30) {
                (0, _, _) => continue,
                (1, _, _) => (4, 8),
                (2, false, _) => (2, 16),
                (3, false, _) => (1, 32),
                (2, true, 1) => (1, 30),
                (2, true, 2) => (2, 15),
                (2, true, 3) => (3, 10),
                (3, true, 0) => (5, 6),
                (3, true, 1) => (6, 5),
                (3, true, 2) => (7, 4),
                (c, _, d) => return Err(format!("invalid Steim-2 code {c} with sub-code {d} in frame {f}")),
            };
            let at = 4 * (16 * f + j);
            match bits {
                // Bytes and 16-bit halves are stored in memory order (for a little-endian record
                // each half is little-endian), as libmseed reads them; bit fields use the word.
                8 => diffs.extend(data[at..at + 4].iter().map(|&b| i32::from(b as i8))),
                16 => diffs.extend([0, 2].map(|o| i32::from(u16_at(data, at + o, big) as i16))),
                32 => diffs.push(w as i32),
                _ => diffs.extend((0..count).map(|k| sext(w >> ((count - 1 - k) * bits), bits))),
            }
        }
    }
    if diffs.len() < n {
        return Err(format!("Steim frames hold {} differences, header says {n} samples", diffs.len()));
    }
    out.clear();
    let mut x = x0;
    out.push(x);
    for d in &diffs[1..n] {
        x = x.wrapping_add(*d);
        out.push(x);
    }
    if x != xn {
        return Err(format!(
            "Steim integrity check failed: last sample {x} differs from the reverse constant {xn}"
        ));
    }
    Ok(())
}

/// Decode the samples of one record (bytes `rec`) to f64 counts in `out`.
fn decode_record(
    rec: &[u8],
    r: &RecordInfo,
    ints: &mut Vec<i32>,
    out: &mut Vec<f64>,
) -> std::result::Result<(), String> {
    let data = &rec[r.data_offset.min(rec.len())..];
    let (n, big) = (r.n_samples, r.data_big_endian);
    out.clear();
    let need = |w: usize| {
        if data.len() < n * w {
            Err(format!("{n} samples of {w} bytes do not fit in {} data bytes", data.len()))
        } else {
            Ok(())
        }
    };
    match r.encoding {
        1 => {
            need(2)?;
            out.extend((0..n).map(|i| f64::from(u16_at(data, 2 * i, big) as i16)));
        }
        3 => {
            need(4)?;
            out.extend((0..n).map(|i| f64::from(u32_at(data, 4 * i, big) as i32)));
        }
        4 => {
            need(4)?;
            out.extend((0..n).map(|i| f64::from(f32::from_bits(u32_at(data, 4 * i, big)))));
        }
        5 => {
            need(8)?;
            out.extend((0..n).map(|i| {
                let (a, b) = (u64::from(u32_at(data, 8 * i, big)), u64::from(u32_at(data, 8 * i + 4, big)));
                f64::from_bits(if big { (a << 32) | b } else { (b << 32) | a })
            }));
        }
        10 | 11 => {
            decode_steim(data, n, big, r.encoding == 11, ints)?;
            out.extend(ints.iter().map(|&v| f64::from(v)));
        }
        e => {
            let known: Vec<String> = SUPPORTED_ENCODINGS.iter().map(|(c, s)| format!("{c} ({s})")).collect();
            return Err(format!("unsupported data encoding {e}; supported: {}", known.join(", ")));
        }
    }
    if let Some(i) = out.iter().position(|v| !v.is_finite()) {
        return Err(format!("sample {i} is not finite ({})", out[i]));
    }
    Ok(())
}

/// Index of the records of one channel, in time order, and the timing report.
struct Index {
    records: Vec<RecordInfo>,
    id: String,
    fs_hz: f64,
    report: TimingReport,
}

/// The channels to read (module docs): one, or two or three on one clock.
fn scan(path: &Path, opts: &SeriesOptions) -> Result<Vec<Index>> {
    let file = path.display().to_string();
    let mut f = BufReader::new(File::open(path).map_err(|e| io_err(&file, e))?);
    let size = f.get_ref().metadata().map_err(|e| io_err(&file, e))?.len();
    if size == 0 {
        return Err(perr(&file, "byte 0".into(), "file is empty"));
    }
    let mut all = Vec::new();
    let mut offset = 0u64;
    let mut head = vec![0u8; 512];
    while offset < size {
        let want = (size - offset).min(head.len() as u64) as usize;
        f.seek(SeekFrom::Start(offset)).map_err(|e| io_err(&file, e))?;
        f.read_exact(&mut head[..want]).map_err(|e| io_err(&file, e))?;
        let r = parse_record_header(&head[..want], offset, &file)?;
        if offset + r.len as u64 > size {
            return Err(perr(
                &file,
                format!("record at byte {offset}"),
                format!("truncated: record of {} bytes but only {} bytes left", r.len, size - offset),
            ));
        }
        offset += r.len as u64;
        if r.n_samples > 0 && r.fs_hz > 0.0 {
            all.push(r);
        }
    }
    let mut ids: Vec<String> = Vec::new();
    for r in &all {
        if !ids.contains(&r.id) {
            ids.push(r.id.clone());
        }
    }
    let chosen: Vec<String> = match &opts.channel {
        Some(c) => {
            vec![ids.iter().find(|i| names_channel(i, c)).cloned().ok_or_else(|| Error::UnknownName {
                kind: format!("miniSEED channel in {file}"),
                name: c.clone(),
                known: ids.join(", "),
            })?]
        }
        None if ids.is_empty() => {
            return Err(perr(&file, "whole file".into(), "no data record with samples"));
        }
        None if ids.len() <= 3 => ids.clone(),
        None => {
            return Err(Error::invalid(
                "channel",
                format!("{file} holds {} channels ({}); choose one", ids.len(), ids.join(", ")),
            ));
        }
    };
    let channels = chosen.iter().map(|id| channel_index(&all, id, &file)).collect::<Result<Vec<Index>>>()?;
    // Several channels are read side by side only on one clock: the same rate and first samples
    // within half a sample period.
    let first = &channels[0];
    for c in &channels[1..] {
        let apart_s = (c.records[0].start_us - first.records[0].start_us) as f64 * 1e-6;
        if (c.fs_hz - first.fs_hz).abs() > 1e-9 * first.fs_hz || apart_s.abs() > 0.5 / first.fs_hz {
            return Err(Error::invalid(
                "channel",
                format!(
                    "{file} holds channels {}; {} ({} Hz) and {} ({} Hz) start {apart_s} s apart or differ in rate, so they cannot be read side by side: choose one",
                    ids.join(", "),
                    first.id,
                    first.fs_hz,
                    c.id,
                    c.fs_hz
                ),
            ));
        }
    }
    Ok(channels)
}

/// The records of channel `id`, in time order, and their timing report.
fn channel_index(all: &[RecordInfo], id: &str, file: &str) -> Result<Index> {
    let file = file.to_string();
    let id = id.to_string();
    let mut records: Vec<RecordInfo> = all.iter().filter(|r| r.id == id).cloned().collect();
    records.sort_by_key(|r| r.start_us);
    let fs_hz = records[0].fs_hz;
    if let Some(r) = records.iter().find(|r| (r.fs_hz - fs_hz).abs() > 1e-9 * fs_hz) {
        return Err(perr(
            &file,
            format!("record at byte {}", r.offset),
            format!("sample rate {} Hz differs from the first record's {fs_hz} Hz", r.fs_hz),
        ));
    }
    let period_us = 1e6 / fs_hz;
    let (mut gaps, mut n_gaps) = (Vec::new(), 0usize);
    for w in records.windows(2) {
        let last_sample = w[0].start_us as f64 + (w[0].n_samples as f64 - 1.0) * period_us;
        let step = w[1].start_us as f64 - last_sample; // interval between adjacent samples, µs
        if (step - period_us).abs() > 0.5 * period_us {
            n_gaps += 1;
            if gaps.len() < MAX_LISTED_GAPS {
                gaps.push(Gap { time_s: last_sample * 1e-6, length_s: step * 1e-6 });
            }
        }
    }
    let n: usize = records.iter().map(|r| r.n_samples).sum();
    let mut report = TimingReport::nominal(fs_hz, n, TimingSource::Records);
    report.first_time_s = records[0].start_us as f64 * 1e-6;
    report.last_time_s = report.first_time_s + (n as f64 - 1.0) / fs_hz;
    report.n_gaps = n_gaps;
    report.gaps = gaps;
    Ok(Index { records, id, fs_hz, report })
}

/// Timing report of a miniSEED file (gaps and overlaps between records), without refusing; of
/// several channels, the one with the most gaps.
pub(crate) fn inspect(path: &Path, opts: &SeriesOptions) -> Result<TimingReport> {
    let mut channels = scan(path, opts)?;
    // The first of the channels with the most gaps (scan gives at least one).
    let worst =
        (0..channels.len()).min_by_key(|&i| std::cmp::Reverse(channels[i].report.n_gaps)).unwrap_or(0);
    Ok(channels.swap_remove(worst).report)
}

/// The decoding state of one channel: its records and the samples of the current one.
struct ChannelStream {
    records: Vec<RecordInfo>,
    next_record: usize,
    pending: Vec<f64>,
    pos: usize,
}

/// Streaming decoder over the records of one to three channels, read side by side.
pub(crate) struct MseedBackend {
    file: String,
    rdr: BufReader<File>,
    channels: Vec<ChannelStream>,
    ints: Vec<i32>,
    bytes: Vec<u8>,
    sensitivity: Option<Sensitivity>,
}

pub(crate) fn open(path: &Path, opts: &SeriesOptions) -> Result<(SeriesHeader, MseedBackend)> {
    let channels = scan(path, opts)?;
    let file = path.display().to_string();
    for idx in &channels {
        if idx.report.n_gaps > 0 {
            return Err(Error::invalid(
                format!("record times of {file} ({})", idx.id),
                format!(
                    "records are not contiguous (gaps or overlaps > half a sample): {}",
                    idx.report.describe()
                ),
            ));
        }
    }
    if let Some(s) = opts.sensitivity.filter(|s| s.unit.quantity() == SeriesQuantity::ImageAngle) {
        return Err(Error::invalid(
            "sensitivity",
            format!("{file}: miniSEED holds ground motion; {} is an image unit", s.unit.symbol()),
        ));
    }
    let (quantity, unit_text) = match opts.sensitivity {
        Some(s) => {
            (s.unit.quantity(), format!("counts ({} counts per {})", s.counts_per_unit, s.unit.symbol()))
        }
        None => (SeriesQuantity::Counts, "counts".to_string()),
    };
    // The series ends with the shortest channel.
    let shortest = channels.iter().min_by_key(|c| c.report.n_input_frames).unwrap_or(&channels[0]);
    let first = &channels[0];
    let mut report = shortest.report.clone();
    report.first_time_s = first.report.first_time_s;
    report.last_time_s = first.report.first_time_s + (report.n_input_frames as f64 - 1.0) / first.fs_hz;
    let header = SeriesHeader {
        path: file.clone(),
        format: SeriesFormat::MiniSeed,
        n_axes: channels.len(),
        axis_names: channels.iter().map(|c| c.id.clone()).collect(),
        units_in_file: vec![unit_text; channels.len()],
        fs_hz: first.fs_hz,
        quantity,
        start_time: Some(iso_time(first.records[0].start_us)),
        n_frames: Some(report.n_input_frames),
        report,
    };
    let rdr = BufReader::new(File::open(path).map_err(|e| io_err(&file, e))?);
    let backend = MseedBackend {
        file,
        rdr,
        channels: channels
            .into_iter()
            .map(|c| ChannelStream { records: c.records, next_record: 0, pending: Vec::new(), pos: 0 })
            .collect(),
        ints: Vec::new(),
        bytes: Vec::new(),
        sensitivity: opts.sensitivity,
    };
    Ok((header, backend))
}

impl MseedBackend {
    /// Decode channel `k`'s next record into its pending samples; false at its end.
    fn load_next(&mut self, k: usize) -> Result<bool> {
        let c = &mut self.channels[k];
        let Some(r) = c.records.get(c.next_record) else { return Ok(false) };
        c.next_record += 1;
        self.bytes.resize(r.len, 0);
        self.rdr.seek(SeekFrom::Start(r.offset)).map_err(|e| io_err(&self.file, e))?;
        self.rdr.read_exact(&mut self.bytes).map_err(|e| io_err(&self.file, e))?;
        decode_record(&self.bytes, r, &mut self.ints, &mut c.pending)
            .map_err(|reason| perr(&self.file, format!("record at byte {}", r.offset), reason))?;
        if let Some(s) = self.sensitivity {
            for v in &mut c.pending {
                *v = s.to_si(*v);
            }
        }
        c.pos = 0;
        Ok(true)
    }

    pub(crate) fn read(&mut self, max_frames: usize, out: &mut SeriesChunk) -> Result<usize> {
        let mut got = 0;
        'frames: while got < max_frames {
            for k in 0..self.channels.len() {
                let c = &self.channels[k];
                if c.pos == c.pending.len() && !self.load_next(k)? {
                    break 'frames;
                }
            }
            let avail = self.channels.iter().map(|c| c.pending.len() - c.pos).min().unwrap_or(0);
            let take = (max_frames - got).min(avail);
            for (c, axis) in self.channels.iter_mut().zip(out.axes.iter_mut()) {
                axis.extend_from_slice(&c.pending[c.pos..c.pos + take]);
                c.pos += take;
            }
            got += take;
        }
        Ok(got)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn calendar_round_trip() {
        // 2008-01-01 is day 13879 since the epoch (365 × 38 + 9 leap days).
        assert_eq!(days_to_year_start(2008), 13_879);
        assert_eq!(civil_from_days(13_879), (2008, 1, 1));
        assert_eq!(civil_from_days(days_to_year_start(2000) + 59), (2000, 2, 29));
        assert_eq!(iso_time(-85_000), "1969-12-31T23:59:59.915000Z");
    }

    #[test]
    fn rate_factor_multiplier_rules() {
        // SEED 2.4 manual, fixed header field 10/11 sign rules.
        assert_eq!(rate_from_factors(20, 1), 20.0);
        assert_eq!(rate_from_factors(-10, 1), 0.1);
        assert_eq!(rate_from_factors(1, -10), 0.1);
        assert_eq!(rate_from_factors(-2, -5), 0.1);
    }

    #[test]
    fn steim_sign_extension() {
        assert_eq!(sext(0b1111, 4), -1);
        assert_eq!(sext(0b0111, 4), 7);
        assert_eq!(sext(0x3FFF_FFFF, 30), -1);
    }
}

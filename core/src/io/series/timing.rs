//! Sample-timing analysis of timestamped recordings: mean rate, jitter, gaps.

use std::collections::BTreeMap;

use crate::error::{Error, Result};

/// Intervals longer than this multiple of the median interval are gaps.
pub const GAP_FACTOR: f64 = 1.5;
/// Default refusal threshold: the largest |interval − median| as a fraction of the median
/// (common practice for resampling phone logs, no source; adjustable in the options).
pub const DEFAULT_MAX_JITTER_FRACTION: f64 = 0.10;
/// At most this many gaps are listed in a report (all are counted in `n_gaps`).
pub const MAX_LISTED_GAPS: usize = 100;
/// Limit on distinct intervals (at 1 ns resolution) kept to find the exact median.
const MAX_DISTINCT_INTERVALS: usize = 2_000_000;

/// Where a series' sample times come from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TimingSource {
    /// A sample rate given by argument or header: the samples are taken as uniform.
    Nominal,
    /// A time column: the rate, jitter and gaps were measured from it.
    TimeColumn,
    /// Record start times and rates of a miniSEED file.
    Records,
}

/// An interval longer than [`GAP_FACTOR`] × the median interval.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Gap {
    /// Time (s, as in the file) of the last sample before the gap.
    pub time_s: f64,
    /// Interval between the samples either side of the gap (s). The span without data is
    /// one sample period shorter (what ObsPy's `Stream.get_gaps` calls the gap's delta).
    pub length_s: f64,
}

/// How the samples of a series are spaced in time, and what the reader did about it.
#[derive(Debug, Clone, PartialEq)]
pub struct TimingReport {
    /// Where the timing came from.
    pub source: TimingSource,
    /// Number of frames (rows / samples per axis) in the input.
    pub n_input_frames: usize,
    /// Time of the first and last frame (s, as in the file; 0-based for nominal timing).
    pub first_time_s: f64,
    /// See `first_time_s`.
    pub last_time_s: f64,
    /// Mean interval (last − first) / (n − 1), s.
    pub mean_interval_s: f64,
    /// Median interval, s (1 ns resolution for time columns).
    pub median_interval_s: f64,
    /// Real mean sample rate 1 / `mean_interval_s`, Hz.
    pub fs_hz_mean: f64,
    /// Standard deviation of the interval, s.
    pub jitter_std_s: f64,
    /// Largest |interval − median|, s.
    pub jitter_max_s: f64,
    /// `jitter_std_s` / median interval.
    pub jitter_std_fraction: f64,
    /// `jitter_max_s` / median interval.
    pub jitter_max_fraction: f64,
    /// The threshold on `jitter_max_fraction` the reader applied.
    pub max_jitter_fraction: f64,
    /// Number of gaps (intervals > 1.5 × median).
    pub n_gaps: usize,
    /// The first [`MAX_LISTED_GAPS`] gaps, in time order.
    pub gaps: Vec<Gap>,
    /// True if the samples were linearly interpolated onto a uniform grid at `fs_hz_mean`.
    pub resampled: bool,
}

impl TimingReport {
    /// The report of a uniformly sampled series (nothing measured).
    pub fn nominal(fs_hz: f64, n_frames: usize, source: TimingSource) -> Self {
        let dt = 1.0 / fs_hz;
        TimingReport {
            source,
            n_input_frames: n_frames,
            first_time_s: 0.0,
            last_time_s: dt * n_frames.saturating_sub(1) as f64,
            mean_interval_s: dt,
            median_interval_s: dt,
            fs_hz_mean: fs_hz,
            jitter_std_s: 0.0,
            jitter_max_s: 0.0,
            jitter_std_fraction: 0.0,
            jitter_max_fraction: 0.0,
            max_jitter_fraction: DEFAULT_MAX_JITTER_FRACTION,
            n_gaps: 0,
            gaps: Vec::new(),
            resampled: false,
        }
    }

    /// True if the series may be resampled: no gaps and max deviation below the threshold.
    pub fn is_acceptable(&self) -> bool {
        self.n_gaps == 0 && self.jitter_max_fraction < self.max_jitter_fraction
    }

    /// A one-paragraph description with the numbers (used in refusal errors).
    pub fn describe(&self) -> String {
        let mut s = format!(
            "{} frames, mean rate {:.6} Hz, median interval {:.6e} s, interval std {:.3e} s ({:.2} %), \
             max deviation {:.3e} s ({:.2} % of median; limit {:.2} %), {} gap(s) > {GAP_FACTOR} x median",
            self.n_input_frames,
            self.fs_hz_mean,
            self.median_interval_s,
            self.jitter_std_s,
            100.0 * self.jitter_std_fraction,
            self.jitter_max_s,
            100.0 * self.jitter_max_fraction,
            100.0 * self.max_jitter_fraction,
            self.n_gaps,
        );
        for g in self.gaps.iter().take(5) {
            s.push_str(&format!("; gap at t = {} s lasting {:.6} s", g.time_s, g.length_s));
        }
        if self.n_gaps > 5 {
            s.push_str(&format!("; ... {} more", self.n_gaps - 5));
        }
        s
    }
}

/// Streaming accumulator over the time column: one pass, memory bounded by the number of
/// distinct intervals at 1 ns resolution (few for logged data).
#[derive(Debug, Default)]
pub(crate) struct TimingAccumulator {
    n: usize,
    first: f64,
    prev: f64,
    prev_line: usize,
    mean_dt: f64,
    m2: f64,
    min_dt: f64,
    max_dt: f64,
    hist: BTreeMap<i64, u64>,
}

impl TimingAccumulator {
    /// Add the time of the next frame; `line` is its line in `file`.
    pub(crate) fn push(&mut self, t: f64, file: &str, line: usize) -> Result<()> {
        if self.n == 0 {
            self.first = t;
            self.min_dt = f64::INFINITY;
            self.max_dt = f64::NEG_INFINITY;
        } else {
            let dt = t - self.prev;
            if dt <= 0.0 {
                return Err(Error::Parse {
                    file: file.to_string(),
                    location: format!("line {line}"),
                    reason: format!(
                        "time {t} s is not after the previous time {} s (line {}): time must increase",
                        self.prev, self.prev_line
                    ),
                });
            }
            let k = self.n as f64; // this is interval number n
            let d = dt - self.mean_dt;
            self.mean_dt += d / k;
            self.m2 += d * (dt - self.mean_dt);
            self.min_dt = self.min_dt.min(dt);
            self.max_dt = self.max_dt.max(dt);
            *self.hist.entry((dt * 1e9).round() as i64).or_insert(0) += 1;
            if self.hist.len() > MAX_DISTINCT_INTERVALS {
                return Err(Error::TooLarge {
                    what: format!("distinct sample intervals in {file} (timing analysis)"),
                    value: self.hist.len(),
                    limit: MAX_DISTINCT_INTERVALS,
                });
            }
        }
        self.n += 1;
        self.prev = t;
        self.prev_line = line;
        Ok(())
    }

    fn median_dt(&self) -> f64 {
        let m: u64 = self.hist.values().sum();
        if m == 0 {
            return 0.0;
        }
        let (lo, hi) = ((m - 1) / 2, m / 2);
        let (mut lo_v, mut hi_v, mut seen) = (None, None, 0u64);
        for (&k, &c) in &self.hist {
            let end = seen + c; // indices [seen, end)
            if lo_v.is_none() && lo < end {
                lo_v = Some(k);
            }
            if hi < end {
                hi_v = Some(k);
                break;
            }
            seen = end;
        }
        let (a, b) = (lo_v.unwrap_or(0), hi_v.unwrap_or(0));
        (a as f64 + b as f64) * 0.5e-9
    }

    /// Finish: the report without the gap list (see [`GapFinder`]); needs at least 2 frames.
    pub(crate) fn finish(&self, file: &str, max_jitter_fraction: f64) -> Result<TimingReport> {
        if self.n < 2 {
            return Err(Error::Parse {
                file: file.to_string(),
                location: "time column".into(),
                reason: format!("need at least 2 samples to measure the sample rate, found {}", self.n),
            });
        }
        let intervals = (self.n - 1) as f64;
        let mean = (self.prev - self.first) / intervals;
        let median = self.median_dt();
        let std = if self.n > 2 { (self.m2 / intervals).sqrt() } else { 0.0 };
        let jmax = (self.max_dt - median).max(median - self.min_dt).max(0.0);
        let gap_limit_ns = (GAP_FACTOR * median * 1e9).round() as i64;
        let n_gaps = self.hist.range(gap_limit_ns + 1..).map(|(_, c)| *c as usize).sum();
        Ok(TimingReport {
            source: TimingSource::TimeColumn,
            n_input_frames: self.n,
            first_time_s: self.first,
            last_time_s: self.prev,
            mean_interval_s: mean,
            median_interval_s: median,
            fs_hz_mean: 1.0 / mean,
            jitter_std_s: std,
            jitter_max_s: jmax,
            jitter_std_fraction: std / median,
            jitter_max_fraction: jmax / median,
            max_jitter_fraction,
            n_gaps,
            gaps: Vec::new(),
            resampled: false,
        })
    }
}

/// Second pass over the time column when the histogram shows gaps: lists where they are.
#[derive(Debug)]
pub(crate) struct GapFinder {
    limit_ns: i64,
    prev: Option<f64>,
    pub(crate) gaps: Vec<Gap>,
}

impl GapFinder {
    pub(crate) fn new(median_interval_s: f64) -> Self {
        GapFinder {
            limit_ns: (GAP_FACTOR * median_interval_s * 1e9).round() as i64,
            prev: None,
            gaps: Vec::new(),
        }
    }
    pub(crate) fn push(&mut self, t: f64) {
        if let Some(p) = self.prev {
            let dt = t - p;
            if (dt * 1e9).round() as i64 > self.limit_ns && self.gaps.len() < MAX_LISTED_GAPS {
                self.gaps.push(Gap { time_s: p, length_s: dt });
            }
        }
        self.prev = Some(t);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn median_of_even_and_odd_counts() {
        let mut a = TimingAccumulator::default();
        for (i, t) in [0.0, 1.0, 3.0, 6.0].iter().enumerate() {
            a.push(*t, "f", i + 1).unwrap();
        }
        // intervals 1, 2, 3 → median 2
        assert!((a.median_dt() - 2.0).abs() < 1e-12);
        a.push(10.0, "f", 5).unwrap(); // intervals 1, 2, 3, 4 → median 2.5
        assert!((a.median_dt() - 2.5).abs() < 1e-12);
        let r = a.finish("f", 0.1).unwrap();
        assert!((r.mean_interval_s - 2.5).abs() < 1e-12);
        // population std of 1, 2, 3, 4 = sqrt(1.25)
        assert!((r.jitter_std_s - 1.25f64.sqrt()).abs() < 1e-12);
        assert!((r.jitter_max_s - 1.5).abs() < 1e-12);
        assert_eq!(r.n_gaps, 1); // 4 > 1.5 × 2.5
    }
}

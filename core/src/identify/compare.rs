//! Before/after comparison of two ring-downs (e.g. a rig without and with isolator pads).

use super::dsp::{BandMask, band_analytic, padded_spectrum};
use super::{RingdownOptions, check_record, identify_ringdown};
use crate::error::{Error, Result, require_positive};
use serde::{Deserialize, Serialize};

/// Level below which |x| must stay for the settle time.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub enum SettleThreshold {
    /// A fraction of the first excursion (default 0.1, i.e. 10 %).
    FractionOfFirstPeak(f64),
    /// An absolute level in units of x.
    Absolute(f64),
}

/// Options of [`compare_ringdowns`].
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[non_exhaustive]
pub struct CompareOptions {
    /// Settle threshold (default 10 % of the first excursion).
    pub settle: SettleThreshold,
    /// Options for the frequency/damping identification of each record.
    pub ringdown: RingdownOptions,
}

impl Default for CompareOptions {
    fn default() -> Self {
        CompareOptions {
            settle: SettleThreshold::FractionOfFirstPeak(0.1),
            ringdown: RingdownOptions::default(),
        }
    }
}

/// Time-domain figures of one ring-down. Times in s from the first sample unless stated.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RingdownMetrics {
    /// First excursion: the largest |x − offset| (units of x), offset = mean of the last 10 % of
    /// the record (its rest level).
    pub first_excursion: f64,
    /// Time of the first excursion (s).
    pub first_excursion_time_s: f64,
    /// Decay time (s): from the first excursion to the last time the Hilbert envelope of
    /// x − offset is at or above 1/e of the first excursion; `None` if it is still above at the
    /// end of the record (its last 10 %). For a single decaying mode this is ≈ 1/(ζω_n).
    pub decay_time_s: Option<f64>,
    /// Settle time (s): from the first excursion to the last sample with |x − offset| at or
    /// above the threshold; `None` if it is still above it in the last 10 % of the record. Noise near the
    /// threshold lengthens it: choose a threshold well above the noise.
    pub settle_time_s: Option<f64>,
    /// The settle threshold used (units of x).
    pub settle_threshold: f64,
    /// Dominant natural frequency (Hz) from [`identify_ringdown`], if it succeeded.
    pub frequency_hz: Option<f64>,
    /// Its damping ratio, if identification succeeded.
    pub damping_ratio: Option<f64>,
}

/// Two ring-downs side by side; ratios are after / before.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RingdownComparison {
    /// The first record (e.g. without pads).
    pub before: RingdownMetrics,
    /// The second record (e.g. with pads).
    pub after: RingdownMetrics,
    /// after.first_excursion / before.first_excursion.
    pub excursion_ratio: f64,
    /// Ratio of decay times, when both exist.
    pub decay_time_ratio: Option<f64>,
    /// Ratio of settle times, when both exist and the first is > 0.
    pub settle_time_ratio: Option<f64>,
}

/// Time-domain figures of one ring-down `x` sampled at `fs_hz` (see [`RingdownMetrics`]).
pub fn ringdown_metrics(x: &[f64], fs_hz: f64, opts: &CompareOptions) -> Result<RingdownMetrics> {
    let fs = require_positive("fs_hz", fs_hz)?;
    check_record("x", x)?;
    let n = x.len();
    // Offset: the rest level, the mean of the last 10 % (the whole-record mean carries the
    // ring-down's own mean, ≈ A/(ω_n T) for a decay, which would bias low settle levels).
    let tail = &x[n - (n / 10).max(8)..];
    let offset = tail.iter().sum::<f64>() / tail.len() as f64;
    let y: Vec<f64> = x.iter().map(|v| v - offset).collect();
    let (i_pk, peak) =
        y.iter().enumerate().fold((0, 0.0), |acc, (i, v)| if v.abs() > acc.1 { (i, v.abs()) } else { acc });
    if peak <= 0.0 {
        return Err(Error::invalid("x", "record is constant: no excursion"));
    }
    let thr = match opts.settle {
        SettleThreshold::FractionOfFirstPeak(f) => {
            if !(f > 0.0 && f < 1.0) {
                return Err(Error::invalid("settle", format!("fraction must be in (0, 1), got {f}")));
            }
            f * peak
        }
        SettleThreshold::Absolute(a) => require_positive("settle", a)?,
    };
    let last_above = (0..n).rev().find(|&i| y[i].abs() >= thr);
    let tail_start = n - (n / 10).max(8);
    let settle_time_s = match last_above {
        Some(i) if i >= tail_start => None,
        Some(i) => Some(((i as f64 - i_pk as f64) / fs).max(0.0)),
        None => Some(0.0),
    };
    // Broadband Hilbert envelope (all positive frequencies except DC).
    let nfft = (2 * n).next_power_of_two();
    let bins = padded_spectrum(&y, nfft)?;
    let df = fs / nfft as f64;
    let mask = BandMask { lo_hz: 2.0 * df, hi_hz: 0.5 * fs, edge_hz: df };
    let z = band_analytic(&bins, nfft, df, 0, nfft, &mask)?;
    let env: Vec<f64> = z[..n].iter().map(|c| c.norm()).collect();
    let e_thr = peak / std::f64::consts::E;
    let decay_time_s = match (i_pk..n).rev().find(|&i| env[i] >= e_thr) {
        Some(i) if i >= tail_start => None,
        Some(i) => Some((i - i_pk) as f64 / fs),
        None => Some(0.0),
    };
    let id = identify_ringdown(x, fs, &opts.ringdown).ok();
    Ok(RingdownMetrics {
        first_excursion: peak,
        first_excursion_time_s: i_pk as f64 / fs,
        decay_time_s,
        settle_time_s,
        settle_threshold: thr,
        frequency_hz: id.as_ref().map(|r| r.frequency_hz[r.dominant]),
        damping_ratio: id.as_ref().map(|r| r.damping_ratio[r.dominant]),
    })
}

/// Compare two ring-downs recorded at the same `fs_hz` (they may differ in length).
/// Errors name `before` or `after`.
pub fn compare_ringdowns(
    before: &[f64],
    after: &[f64],
    fs_hz: f64,
    opts: &CompareOptions,
) -> Result<RingdownComparison> {
    let rename = |name: &str, e: Error| match e {
        Error::InvalidArgument { name: n, reason } if n == "x" => Error::invalid(name, reason),
        other => other,
    };
    let b = ringdown_metrics(before, fs_hz, opts).map_err(|e| rename("before", e))?;
    let a = ringdown_metrics(after, fs_hz, opts).map_err(|e| rename("after", e))?;
    let ratio = |x: Option<f64>, y: Option<f64>| match (x, y) {
        (Some(x), Some(y)) if y > 0.0 => Some(x / y),
        _ => None,
    };
    Ok(RingdownComparison {
        excursion_ratio: a.first_excursion / b.first_excursion,
        decay_time_ratio: ratio(a.decay_time_s, b.decay_time_s),
        settle_time_ratio: ratio(a.settle_time_s, b.settle_time_s),
        before: b,
        after: a,
    })
}

//! Time-resolved statistics: one Welch PSD per fixed interval (e.g. every 600 s) and the
//! distribution of a band RMS over the intervals.

use super::psd::Psd;
use super::welch::{WelchConfig, WelchPsd, WelchStream};
use crate::error::{Error, Result, require_positive};

/// One interval's estimate.
#[derive(Debug, Clone, PartialEq)]
pub struct IntervalPsd {
    /// Interval number, from 0.
    pub index: usize,
    /// Start time of the interval from the first sample (s).
    pub start_s: f64,
    /// Welch estimate over the interval's samples only (segments never cross intervals).
    pub psd: WelchPsd,
}

/// Samples per interval: round(interval_s · fs); must be at least `nperseg`.
fn interval_len(fs: f64, interval_s: f64, cfg: &WelchConfig) -> Result<usize> {
    require_positive("fs", fs)?;
    require_positive("interval_s", interval_s)?;
    let n = (interval_s * fs).round();
    if n > u32::MAX as f64 * 1024.0 {
        return Err(Error::invalid("interval_s", format!("{interval_s} s at {fs} Hz is too many samples")));
    }
    let n = n as usize;
    if n < cfg.nperseg {
        return Err(Error::invalid(
            "interval_s",
            format!("{interval_s} s at {fs} Hz is {n} samples, fewer than nperseg = {}", cfg.nperseg),
        ));
    }
    Ok(n)
}

/// A Welch PSD for each complete interval of round(`interval_s`·`fs`) samples of `x`; a
/// trailing partial interval is dropped. Each interval is estimated independently, exactly as
/// [`super::welch::welch`] on its slice.
pub fn interval_psds(x: &[f64], fs: f64, interval_s: f64, cfg: &WelchConfig) -> Result<Vec<IntervalPsd>> {
    let mut s = IntervalStream::new(fs, interval_s, cfg)?;
    s.push(x)
}

/// Streaming form of [`interval_psds`]: push chunks of any size; every interval completed by a
/// push is returned by that push. Memory is bounded by one Welch segment.
#[derive(Debug)]
pub struct IntervalStream {
    stream: WelchStream,
    fs: f64,
    n_int: usize,
    in_current: usize,
    index: usize,
}

impl IntervalStream {
    /// A single-axis interval estimator.
    pub fn new(fs: f64, interval_s: f64, cfg: &WelchConfig) -> Result<Self> {
        let n_int = interval_len(fs, interval_s, cfg)?;
        Ok(Self { stream: WelchStream::new(fs, cfg, 1)?, fs, n_int, in_current: 0, index: 0 })
    }

    /// Samples per interval.
    pub fn interval_samples(&self) -> usize {
        self.n_int
    }

    /// Samples pushed into the current, incomplete interval.
    pub fn pending_samples(&self) -> usize {
        self.in_current
    }

    /// Push samples; returns the PSDs of the intervals this chunk completed (often none).
    /// A chunk with a non-finite sample is rejected whole, naming its index in the chunk.
    pub fn push(&mut self, mut data: &[f64]) -> Result<Vec<IntervalPsd>> {
        crate::error::require_all_finite("samples", data)?;
        let mut out = Vec::new();
        while !data.is_empty() {
            let take = (self.n_int - self.in_current).min(data.len());
            self.stream.push(&data[..take])?;
            self.in_current += take;
            data = &data[take..];
            if self.in_current == self.n_int {
                let psd = self.stream.finish()?.swap_remove(0);
                let start_s = (self.index * self.n_int) as f64 / self.fs;
                out.push(IntervalPsd { index: self.index, start_s, psd });
                self.stream.reset();
                self.in_current = 0;
                self.index += 1;
            }
        }
        Ok(out)
    }
}

/// Percentile of `values` by linear interpolation between order statistics, as numpy's default
/// (`method='linear'`): with the sorted values v and h = (n − 1)·q/100, the result is
/// v[⌊h⌋] + (h − ⌊h⌋)(v[⌊h⌋+1] − v[⌊h⌋]). `q` in [0, 100]; `values` non-empty and finite.
pub fn percentile_linear(values: &[f64], q: f64) -> Result<f64> {
    if values.is_empty() {
        return Err(Error::invalid("values", "is empty"));
    }
    crate::error::require_all_finite("values", values)?;
    if !(0.0..=100.0).contains(&q) {
        return Err(Error::OutOfRange { what: "percentile".into(), value: q, min: 0.0, max: 100.0 });
    }
    let mut v = values.to_vec();
    v.sort_by(f64::total_cmp);
    let h = (v.len() - 1) as f64 * q / 100.0;
    let i = h.floor() as usize;
    if i + 1 >= v.len() {
        return Ok(v[v.len() - 1]);
    }
    Ok(v[i] + (h - i as f64) * (v[i + 1] - v[i]))
}

/// Distribution of a band RMS over many intervals.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BandRmsStats {
    /// Number of intervals.
    pub n: usize,
    /// Median (50th percentile) band RMS.
    pub median: f64,
    /// 90th percentile.
    pub p90: f64,
    /// 99th percentile.
    pub p99: f64,
    /// Largest value.
    pub max: f64,
}

/// Band RMS over [f_lo_hz, f_hi_hz] of each PSD ([`Psd::band_rms`]), summarised by
/// [`percentile_linear`] (numpy's default linear interpolation).
pub fn band_rms_distribution(psds: &[Psd], f_lo_hz: f64, f_hi_hz: f64) -> Result<BandRmsStats> {
    if psds.is_empty() {
        return Err(Error::invalid("psds", "is empty"));
    }
    let r = psds
        .iter()
        .enumerate()
        .map(|(i, p)| {
            p.band_rms(f_lo_hz, f_hi_hz).map_err(|e| Error::invalid(format!("psds[{i}]"), e.to_string()))
        })
        .collect::<Result<Vec<_>>>()?;
    Ok(BandRmsStats {
        n: r.len(),
        median: percentile_linear(&r, 50.0)?,
        p90: percentile_linear(&r, 90.0)?,
        p99: percentile_linear(&r, 99.0)?,
        max: r.iter().copied().fold(f64::NEG_INFINITY, f64::max),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::spectrum::psd::Quantity;
    use crate::spectrum::welch::welch;
    use approx::assert_relative_eq;
    use rand::{SeedableRng, rngs::StdRng};
    use rand_distr::{Distribution, Normal};

    #[test]
    fn percentile_matches_numpy_linear() {
        // numpy.percentile([1, 2, 3, 4], q) with the default method='linear':
        // q=50 -> 2.5, q=90 -> 3.7, q=99 -> 3.97, q=0 -> 1, q=100 -> 4 (numpy docs' definition).
        let v = [4.0, 1.0, 3.0, 2.0];
        for (q, want) in [(50.0, 2.5), (90.0, 3.7), (99.0, 3.97), (0.0, 1.0), (100.0, 4.0)] {
            assert_relative_eq!(percentile_linear(&v, q).unwrap(), want, max_relative = 1e-14);
        }
        assert_eq!(percentile_linear(&[5.0], 99.0).unwrap(), 5.0);
        assert!(percentile_linear(&v, 101.0).unwrap_err().to_string().contains("101"));
        assert!(percentile_linear(&[], 50.0).is_err());
    }

    #[test]
    fn intervals_equal_welch_on_slices_and_stream_in_chunks() {
        let fs = 20.0;
        let mut rng = StdRng::seed_from_u64(4);
        // Amplitude grows with time, so intervals differ.
        let x: Vec<f64> = (0..12_345)
            .map(|i| (1.0 + i as f64 / 4000.0) * Normal::new(0.0, 1.0).unwrap().sample(&mut rng))
            .collect();
        let cfg = WelchConfig::new(128);
        let all = interval_psds(&x, fs, 150.0, &cfg).unwrap();
        assert_eq!(all.len(), 12_345 / 3000);
        for iv in &all {
            let s = iv.index * 3000;
            let direct = welch(&x[s..s + 3000], fs, &cfg).unwrap();
            assert_eq!(iv.psd, direct);
            assert_relative_eq!(iv.start_s, s as f64 / fs);
        }
        let mut st = IntervalStream::new(fs, 150.0, &cfg).unwrap();
        let mut got = Vec::new();
        for c in x.chunks(997) {
            got.extend(st.push(c).unwrap());
        }
        assert_eq!(got, all);
        assert_eq!(st.pending_samples(), 12_345 % 3000);
        let psds: Vec<Psd> = all.iter().map(|i| i.psd.to_psd(Quantity::Velocity).unwrap()).collect();
        let stats = band_rms_distribution(&psds, 1.0, 5.0).unwrap();
        let r: Vec<f64> = psds.iter().map(|p| p.band_rms(1.0, 5.0).unwrap()).collect();
        assert_eq!(stats.n, 4);
        assert!(stats.median < stats.p90 && stats.p90 < stats.p99 && stats.p99 <= stats.max);
        assert_eq!(stats.max, r[3]);
        assert!(band_rms_distribution(&psds, 1.0, 50.0).unwrap_err().to_string().contains("psds[0]"));
    }

    #[test]
    fn short_interval_is_an_error() {
        let e = IntervalStream::new(10.0, 5.0, &WelchConfig::new(256)).unwrap_err();
        assert!(e.to_string().contains("50 samples, fewer than nperseg = 256"), "{e}");
        assert!(
            IntervalStream::new(10.0, -5.0, &WelchConfig::new(8)).unwrap_err().to_string().contains("-5")
        );
    }
}

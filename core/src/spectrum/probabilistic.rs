//! Probabilistic PSD over long recordings, streamed block by block.
//!
//! The method is McNamara & Buland (2004) (`docs/references.md#s4`): the recording is cut into
//! blocks (default 1 h, 50 % overlap); each block's PSD is a Welch average of segments of
//! `nfft` samples, `nfft` the power of two at or below a quarter of the block (so about 13
//! segments at 75 % overlap), each segment linearly detrended and tapered by a cosine taper over
//! 10 % at each end; the density is converted to acceleration and to dB re 1 (m/s²)²/Hz,
//! averaged in dB over one-octave period bins stepped by 1/8 octave, and counted into a
//! histogram of 1 dB bins from −200 to −50 dB per period bin. Percentiles are read from the
//! cumulative histogram (the lower edge of the first dB bin whose cumulative share reaches the
//! percentile).
//!
//! The defaults are matched to ObsPy's `PPSD` defaults (`ppsd_length = 3600`, `overlap = 0.5`,
//! `period_smoothing_width_octaves = 1`, `period_step_octaves = 0.125`,
//! `db_bins = (-200, -50, 1)`, its `fft_taper`, linear detrend, `nfft`/`nlap` rule, dB values
//! rounded to 32-bit floats before binning); `bindings-py/tests/test_probabilistic.py` compares
//! the percentile curves with ObsPy on a recording ObsPy bundles.
//!
//! Memory is bounded by one block of samples, one Welch segment and the histogram: it does not
//! grow with the length of the recording. Each completed block is handed back to the caller
//! (who may keep, write or drop it).

use super::psd::{Psd, Quantity};
use super::reference::{CriterionCurve, ReferenceGround};
use super::welch::{Detrend, SegmentEngine, WelchConfig};
use super::window::Window;
use crate::error::{Error, Result, first_non_finite, non_finite_at, require_finite, require_positive};
use crate::linalg::lanes::lane_moments;
use std::sync::Arc;

/// Settings of a probabilistic PSD. Defaults are ObsPy's `PPSD` defaults (module docs).
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub struct PpsdConfig {
    /// Block length (s); default 3600.
    pub block_s: f64,
    /// Overlap of consecutive blocks as a fraction in [0, 1); default 0.5.
    pub overlap: f64,
    /// Width of the period averaging (octaves); default 1.
    pub smoothing_octaves: f64,
    /// Step between period bins (octaves); default 1/8.
    pub step_octaves: f64,
    /// Lower edge of the dB histogram; default −200.
    pub db_min: f64,
    /// Upper edge of the dB histogram; default −50.
    pub db_max: f64,
    /// dB bin width; default 1.
    pub db_step: f64,
    /// What the samples measure after `scale` (default velocity, as ObsPy's response output).
    pub input: Quantity,
    /// Factor applied to every sample (e.g. 1/sensitivity to go from counts to m/s); default 1.
    pub scale: f64,
    /// Optional criterion curve: blocks whose velocity exceeds it in any band are counted.
    pub criterion: Option<CriterionCurve>,
    /// Seconds after 00:00 UTC of the first sample, to place blocks in hours of the day
    /// (`None`: no hour-of-day map).
    pub start_of_day_s: Option<f64>,
    /// Bands (Hz) whose RMS is mapped over the hours of the day.
    pub bands_hz: Vec<(f64, f64)>,
    /// Quantity of the band RMS in the hour map (default velocity).
    pub band_quantity: Quantity,
}

impl Default for PpsdConfig {
    fn default() -> Self {
        Self {
            block_s: 3600.0,
            overlap: 0.5,
            smoothing_octaves: 1.0,
            step_octaves: 0.125,
            db_min: -200.0,
            db_max: -50.0,
            db_step: 1.0,
            input: Quantity::Velocity,
            scale: 1.0,
            criterion: None,
            start_of_day_s: None,
            bands_hz: Vec::new(),
            band_quantity: Quantity::Velocity,
        }
    }
}

impl PpsdConfig {
    /// Set the block length (s).
    pub fn with_block_s(mut self, block_s: f64) -> Self {
        self.block_s = block_s;
        self
    }
    /// Set what the samples measure and their scale factor.
    pub fn with_input(mut self, input: Quantity, scale: f64) -> Self {
        self.input = input;
        self.scale = scale;
        self
    }
    /// Set the criterion curve.
    pub fn with_criterion(mut self, c: CriterionCurve) -> Self {
        self.criterion = Some(c);
        self
    }
    /// Set the time of day of the first sample and the bands of the hour map.
    pub fn with_hours(mut self, start_of_day_s: f64, bands_hz: Vec<(f64, f64)>) -> Self {
        self.start_of_day_s = Some(start_of_day_s);
        self.bands_hz = bands_hz;
        self
    }
}

/// One block's result.
#[derive(Debug, Clone, PartialEq)]
pub struct PpsdBlock {
    /// Block number from 0.
    pub index: usize,
    /// Start of the block from the first sample (s).
    pub start_s: f64,
    /// Hour of the day (0–23) of the block's centre, when the start time of day is known.
    pub hour_of_day: Option<usize>,
    /// Period-binned acceleration PSD (dB re 1 (m/s²)²/Hz), one value per period bin.
    pub binned_db: Vec<f64>,
    /// The block's acceleration PSD at full resolution ((m/s²)²/Hz, DC bin dropped).
    pub psd: Psd,
    /// Band RMS of `band_quantity` in each configured band.
    pub band_rms: Vec<f64>,
    /// Worst band ratio against the criterion curve (when one is set).
    pub criterion_ratio: Option<f64>,
}

/// Accumulated hour-of-day statistics.
#[derive(Debug, Clone, PartialEq)]
pub struct HourMap {
    /// Blocks per hour (24).
    pub blocks: Vec<u64>,
    /// Sum of band mean squares per hour, `[hour * n_bands + band]`.
    pub ms_sum: Vec<f64>,
    /// Largest band RMS per hour.
    pub max_rms: Vec<f64>,
    /// Blocks per hour judged by the image-motion path (see [`ProbabilisticPsd::record_verdict`]).
    pub judged: Vec<u64>,
    /// Of those, blocks during which the rig held its limit.
    pub held: Vec<u64>,
    n_bands: usize,
}

impl HourMap {
    fn new(n_bands: usize) -> Self {
        Self {
            blocks: vec![0; 24],
            ms_sum: vec![0.0; 24 * n_bands],
            max_rms: vec![0.0; 24 * n_bands],
            judged: vec![0; 24],
            held: vec![0; 24],
            n_bands,
        }
    }

    /// Number of bands.
    pub fn n_bands(&self) -> usize {
        self.n_bands
    }

    /// RMS over the hour's blocks (√ of the mean of the blocks' mean squares), NaN for an hour
    /// without blocks; `[hour * n_bands + band]`.
    pub fn rms(&self) -> Vec<f64> {
        (0..24 * self.n_bands)
            .map(|i| {
                let n = self.blocks[i / self.n_bands.max(1)];
                if n == 0 { f64::NAN } else { (self.ms_sum[i] / n as f64).sqrt() }
            })
            .collect()
    }
}

/// Geometry of the estimate: segment sizes, frequencies and period bins.
#[derive(Debug, Clone, PartialEq)]
struct Layout {
    fs: f64,
    block_len: usize,
    step_len: usize,
    /// Frequencies k·fs/nfft for k = 1..=nfft/2.
    freq_hz: Arc<[f64]>,
    /// (2πf)^(2·(2 − order)) at those frequencies: the input density to acceleration (order 0
    /// displacement, 1 velocity, 2 acceleration).
    to_accel: Vec<f64>,
    /// Per period bin: range of indices into `freq_hz` (the frequencies whose period lies in
    /// [left, right]).
    bin_ranges: Vec<(usize, usize)>,
    /// The ends of all bin ranges, sorted, without repeats, from 0.
    cuts: Vec<usize>,
    /// Per period bin: positions of its range's ends in `cuts`.
    bin_cuts: Vec<(usize, usize)>,
    centres_s: Vec<f64>,
    db_edges: Vec<f64>,
}

fn prev_pow2(x: f64) -> usize {
    // ObsPy's prev_pow_2: 2^floor(log2 x).
    if x < 1.0 { 1 } else { 1usize << (x.log2().floor() as u32) }
}

impl Layout {
    fn new(fs: f64, cfg: &PpsdConfig) -> Result<(Self, WelchConfig)> {
        require_positive("fs", fs)?;
        require_positive("block_s", cfg.block_s)?;
        if !(0.0..1.0).contains(&cfg.overlap) {
            return Err(Error::OutOfRange { what: "overlap".into(), value: cfg.overlap, min: 0.0, max: 1.0 });
        }
        require_positive("smoothing_octaves", cfg.smoothing_octaves)?;
        require_positive("step_octaves", cfg.step_octaves)?;
        require_finite("db_min", cfg.db_min)?;
        require_finite("db_max", cfg.db_max)?;
        require_positive("db_step", cfg.db_step)?;
        require_positive("scale", cfg.scale)?;
        if cfg.input.motion_order().is_none() {
            return Err(Error::invalid("input", format!("{} is not a motion quantity", cfg.input.name())));
        }
        let n_db = ((cfg.db_max - cfg.db_min) / cfg.db_step) as usize;
        if n_db == 0 || n_db > 100_000 {
            return Err(Error::invalid("db_max", format!("gives {n_db} dB bins from {} dB", cfg.db_min)));
        }
        let block = fs * cfg.block_s;
        if block > 1e9 {
            return Err(Error::invalid(
                "block_s",
                format!("{} s at {fs} Hz is too many samples", cfg.block_s),
            ));
        }
        // ObsPy: len = int(fs·ppsd_length); step in time ppsd_length·(1 − overlap).
        let block_len = block as usize;
        let step_len = ((cfg.block_s * (1.0 - cfg.overlap) * fs).round() as usize).max(1);
        let nfft = prev_pow2(block / 4.0);
        if nfft < 16 {
            return Err(Error::invalid(
                "block_s",
                format!("{} s at {fs} Hz gives segments of {nfft} samples; need at least 16", cfg.block_s),
            ));
        }
        let nlap = (0.75 * nfft as f64) as usize;
        let freq_hz: Arc<[f64]> = (1..=nfft / 2).map(|k| k as f64 * fs / nfft as f64).collect();
        crate::grid::validate_freqs("freq_hz", &freq_hz)?;
        let power = 2 * (2 - cfg.input.motion_order().unwrap_or(0));
        let to_accel = freq_hz.iter().map(|&f| (2.0 * std::f64::consts::PI * f).powi(power)).collect();
        // Period bins as ObsPy's _setup_period_binning, with limits the shortest and longest
        // period of the PSD.
        let (p_min, p_max) = (1.0 / freq_hz[freq_hz.len() - 1], 1.0 / freq_hz[0]);
        let step = 2f64.powf(cfg.step_octaves);
        let width = 2f64.powf(cfg.smoothing_octaves);
        let mut left = p_min / width.sqrt();
        let mut bins = Vec::new();
        loop {
            let right = left * width;
            let centre = (left * right).sqrt();
            bins.push((left, centre, right));
            if centre >= p_max || bins.len() > 10_000 {
                break;
            }
            left *= step;
        }
        let periods: Vec<f64> = freq_hz.iter().map(|f| 1.0 / f).collect();
        let mut bin_ranges = Vec::new();
        let mut centres_s = Vec::new();
        for (l, c, r) in bins {
            if !(r > p_min && l < p_max) {
                continue;
            }
            // Periods 1/f in [l, r]  ⇔  frequencies with l <= 1/f <= r (tested on the period,
            // as ObsPy does, so the rounding of 1/f decides the same way).
            // The periods fall as k rises, so those in [l, r] are one run, found by bisection.
            let (a, end) = (periods.partition_point(|&p| p > r), periods.partition_point(|&p| p >= l));
            if a >= end {
                return Err(Error::invalid(
                    "smoothing_octaves",
                    format!(
                        "{} octaves leaves the period bin at {c} s without PSD values",
                        cfg.smoothing_octaves
                    ),
                ));
            }
            bin_ranges.push((a, end));
            centres_s.push(c);
        }
        let db_edges = (0..=n_db)
            .map(|i| cfg.db_min + (cfg.db_max - cfg.db_min) * i as f64 / n_db as f64)
            .collect::<Vec<_>>();
        let taper = cosine_taper_20(nfft);
        let wcfg = WelchConfig::new(nfft)
            .with_noverlap(nlap)
            .with_window(Window::Custom(taper))
            .with_detrend(Detrend::Linear);
        let mut cuts: Vec<usize> = bin_ranges.iter().flat_map(|&(a, b)| [a, b]).chain([0]).collect();
        cuts.sort_unstable();
        cuts.dedup();
        let at = |v: usize| cuts.partition_point(|&c| c < v);
        let bin_cuts = bin_ranges.iter().map(|&(a, b)| (at(a), at(b))).collect();
        Ok((
            Self {
                fs,
                block_len,
                step_len,
                freq_hz,
                to_accel,
                bin_ranges,
                cuts,
                bin_cuts,
                centres_s,
                db_edges,
            },
            wcfg,
        ))
    }
}

/// The cosine taper of McNamara & Buland's method: a half cosine over 10 % of the samples at
/// each end, one in between (the same index rule as ObsPy's `cosine_taper(n, 0.2)`, checked
/// against it in the Python tests).
pub fn cosine_taper_20(n: usize) -> Vec<f64> {
    let frac = (n as f64 * 0.2 / 2.0 + 0.5) as usize;
    let (i1, mut i2, mut i3, i4) =
        (0usize, frac.saturating_sub(1), n.saturating_sub(frac), n.saturating_sub(1));
    if i1 == i2 {
        i2 += 1;
    }
    if i3 == i4 {
        i3 = i3.saturating_sub(1);
    }
    let mut w = vec![0.0; n];
    for (i, v) in w.iter_mut().enumerate() {
        *v = if i <= i2 {
            0.5 * (1.0 - (std::f64::consts::PI * (i - i1) as f64 / (i2 - i1) as f64).cos())
        } else if i < i3 {
            1.0
        } else {
            0.5 * (1.0 + (std::f64::consts::PI * (i3 as f64 - i as f64) / (i4 - i3) as f64).cos())
        };
    }
    w
}

/// A streaming probabilistic PSD of one axis (module docs).
#[derive(Debug)]
pub struct ProbabilisticPsd {
    cfg: PpsdConfig,
    layout: Layout,
    work: BlockWork,
    buf: Vec<f64>,
    fill: usize,
    n_blocks: usize,
    hist: Vec<u64>,
    below_nlnm: Vec<u64>,
    above_nhnm: Vec<u64>,
    nlnm_db: Vec<Option<f64>>,
    nhnm_db: Vec<Option<f64>>,
    above_criterion: u64,
    hours: HourMap,
}

/// The buffers of one block's spectral work (one per thread): the segment engine, the sum of
/// the segments' |X|² and the running sum of the spectrum in dB at the cuts.
#[derive(Debug)]
struct BlockWork {
    engine: SegmentEngine,
    sums: Vec<f64>,
    /// The trend sums of each piece of one step (see `block_spectrum`).
    pieces: Vec<(f64, f64)>,
    prefix: Vec<(f64, f64)>,
}

impl BlockWork {
    fn new(engine: SegmentEngine, n_cuts: usize) -> Self {
        Self {
            sums: vec![0.0; engine.n_bins()],
            pieces: Vec::new(),
            prefix: Vec::with_capacity(n_cuts),
            engine,
        }
    }
}

/// What a block gives before it is counted: everything that depends on its samples only.
struct BlockSpectrum {
    binned_db: Vec<f64>,
    psd: Psd,
    band_rms: Vec<f64>,
    criterion_ratio: Option<f64>,
}

/// One step of a running sum that carries its rounding error along (Knuth's two-sum; Higham,
/// Accuracy and Stability of Numerical Algorithms, 2nd ed., 2002, §4.3): (hi, lo) + v. The
/// period-bin means are differences of this running sum at the ends of each bin's range
/// (O(n + bins) instead of O(n · bins per octave)); with the carried error each range sum is
/// within about one rounding of the exact sum, however long the prefix before it (a plain
/// prefix sum would lose the digits of short ranges far along the spectrum).
#[inline(always)]
fn two_sum_step(hi: f64, lo: f64, v: f64) -> (f64, f64) {
    let s = hi + v;
    let bv = s - hi;
    let err = (hi - (s - bv)) + (v - bv);
    (s, lo + err)
}

/// `a` = m·2^e with m in [1, 2), for a positive normal or infinite `a`.
#[inline(always)]
fn mantissa_exponent(a: f64) -> (f64, i64) {
    let b = a.to_bits();
    (f64::from_bits((b & 0x000f_ffff_ffff_ffff) | 0x3ff0_0000_0000_0000), ((b >> 52) & 0x7ff) as i64 - 1023)
}

/// Σ 10·log10(max(a, smallest normal)) over `xs` (ObsPy's floor before the log; NaN takes the
/// floor too, as `f64::max` gives), as 10·log10 of the product: the mantissas multiplied in
/// eight lanes and the binary exponents added, renormalised every 128 values per lane, then one
/// log10. The sum of the logs is the log of the product; each product step rounds by at most
/// ε/2, so n values carry at most about n·ε·4.3 dB of error, far below one value's own rounding
/// in the sum of logs for the ranges here. About twenty times faster than a log10 per value.
fn db_sum(xs: &[f64]) -> f64 {
    const LANES: usize = 8;
    const PER_LANE: usize = 128; // a product of 128 mantissas in [1, 2) stays below 2^128
    if xs.contains(&f64::INFINITY) {
        return f64::INFINITY;
    }
    let (mut m_tot, mut e_tot) = (1.0f64, 0i64);
    for block in xs.chunks(PER_LANE * LANES) {
        let (mut p, mut e) = ([1.0f64; LANES], [0i64; LANES]);
        let mut it = block.chunks_exact(LANES);
        for c in &mut it {
            for l in 0..LANES {
                let (m, x) = mantissa_exponent(c[l].max(f64::MIN_POSITIVE));
                p[l] *= m;
                e[l] += x;
            }
        }
        for (l, a) in it.remainder().iter().enumerate() {
            let (m, x) = mantissa_exponent(a.max(f64::MIN_POSITIVE));
            p[l] *= m;
            e[l] += x;
        }
        for l in 0..LANES {
            let (m, x) = mantissa_exponent(p[l]);
            let (mt, xt) = mantissa_exponent(m_tot * m);
            m_tot = mt;
            e_tot += e[l] + x + xt;
        }
    }
    10.0 * (m_tot.log10() + e_tot as f64 * std::f64::consts::LOG10_2)
}

/// The spectral part of one block (`samples` of one block length, each multiplied by `scale`
/// before use): Welch average of its segments, acceleration density, dB, period-bin means
/// rounded to f32, band RMS and criterion ratio. Pure in the samples, so blocks can run on
/// any thread in any order. A sample that is not finite is an error naming its index in the
/// recording (`offset` is that of `samples[0]`).
fn block_spectrum(
    layout: &Layout,
    cfg: &PpsdConfig,
    w: &mut BlockWork,
    samples: &[f64],
    scale: f64,
    offset: usize,
) -> Result<BlockSpectrum> {
    let (nfft, step) = (w.engine.nperseg(), w.engine.step());
    w.sums.iter_mut().for_each(|s| *s = 0.0);
    let n_seg = if samples.len() >= nfft { (samples.len() - nfft) / step + 1 } else { 0 };
    let bad = |at: usize, v: &[f64]| {
        first_non_finite(v).map_or(Ok(()), |i| Err(non_finite_at("samples", v[i], offset + at + i)))
    };
    let per = nfft / step;
    if per * step == nfft && n_seg > 0 && w.engine.detrend() == Detrend::Linear {
        // The segments overlap by 3/4, so each is `per` pieces of one step shared with its
        // neighbours: the linear trend's sums are taken once per piece and combined per
        // segment, as Σ (i − mid)·xᵢ = Σₖ [Σ (m − mid_p)·x + (k − (per − 1)/2)·step·Σ x]
        // over the pieces k (m the index in the piece, mid_p its centre). A sample that is
        // not finite makes its piece's sums not finite; only then is the piece searched.
        let n_pieces = n_seg + per - 1;
        let mid_p = (step as f64 - 1.0) / 2.0;
        w.pieces.clear();
        for (j, piece) in samples[..n_pieces * step].chunks_exact(step).enumerate() {
            let (a, b) = lane_moments(piece, scale, mid_p, true);
            if !(a.is_finite() && b.is_finite()) {
                bad(j * step, piece)?;
            }
            w.pieces.push((a, b));
        }
        bad(n_pieces * step, &samples[n_pieces * step..])?;
        let centre = (per as f64 - 1.0) / 2.0;
        for s in 0..n_seg {
            let p = &w.pieces[s..s + per];
            let s0 = p.iter().fold(0.0, |t, &(a, _)| t + a);
            let s1 = p
                .iter()
                .enumerate()
                .fold(0.0, |t, (k, &(a, b))| t + b + (k as f64 - centre) * step as f64 * a);
            let seg = &samples[s * step..s * step + nfft];
            w.engine.add_segment_power_with(seg, scale, Some((s0, s1)), &mut w.sums)?;
        }
    } else {
        bad(0, samples)?;
        for s in 0..n_seg {
            w.engine.add_segment_power(&samples[s * step..s * step + nfft], scale, &mut w.sums)?;
        }
    }
    let fs = layout.fs;
    let nf = layout.freq_hz.len();
    // Bins 1..nf; the last is the Nyquist bin (nfft is even).
    let (mid_scale, last_scale, n_seg) =
        (w.engine.bin_scale(1, fs), w.engine.bin_scale(nf, fs), n_seg as f64);
    let acc: Vec<f64> = w.sums[1..=nf]
        .iter()
        .zip(&layout.to_accel)
        .enumerate()
        .map(|(i, (s, to_a))| {
            let c = if i + 1 == nf { last_scale } else { mid_scale };
            s / n_seg * c * to_a
        })
        .collect();
    // dB (ObsPy floors at the smallest normal double before the log) and its running sum,
    // kept at the cuts (see `range_sums`).
    w.prefix.clear();
    w.prefix.push((0.0, 0.0));
    let (mut hi, mut lo) = (0.0f64, 0.0f64);
    for c in layout.cuts.windows(2) {
        (hi, lo) = two_sum_step(hi, lo, db_sum(&acc[c[0]..c[1]]));
        w.prefix.push((hi, lo));
    }
    let mut binned_db: Vec<f64> = layout
        .bin_cuts
        .iter()
        .zip(&layout.bin_ranges)
        .map(|(&(ca, cb), &(a, b))| {
            let ((ha, la), (hb, lb)) = (w.prefix[ca], w.prefix[cb]);
            ((hb - ha) + (lb - la)) / (b - a) as f64
        })
        .collect();
    // Rounded to f32 as ObsPy stores it, so values on a bin edge fall the same way.
    binned_db.iter_mut().for_each(|m| *m = *m as f32 as f64);
    let psd = Psd::on_checked_freqs(Arc::clone(&layout.freq_hz), acc, Quantity::Acceleration)?;
    let criterion_ratio = match cfg.criterion {
        Some(c) => Some(c.evaluate(&psd)?.worst_ratio),
        None => None,
    };
    let band_rms = if cfg.bands_hz.is_empty() {
        Vec::new()
    } else {
        let q = psd.to(cfg.band_quantity)?;
        cfg.bands_hz.iter().map(|&(a, b)| q.band_rms(a, b)).collect::<Result<Vec<_>>>()?
    };
    Ok(BlockSpectrum { binned_db, psd, band_rms, criterion_ratio })
}

impl ProbabilisticPsd {
    /// A new estimate for samples at `fs` Hz. Errors name the offending setting.
    pub fn new(fs: f64, cfg: &PpsdConfig) -> Result<Self> {
        let (layout, wcfg) = Layout::new(fs, cfg)?;
        if let Some(t) = cfg.start_of_day_s {
            require_finite("start_of_day_s", t)?;
        }
        for (i, &(a, b)) in cfg.bands_hz.iter().enumerate() {
            if !(a > 0.0 && b > a && b.is_finite()) {
                return Err(Error::invalid(
                    format!("bands_hz[{i}]"),
                    format!("needs 0 < lo < hi, got {a}–{b}"),
                ));
            }
        }
        if cfg.band_quantity.motion_order().is_none() {
            return Err(Error::invalid(
                "band_quantity",
                format!("{} is not a motion quantity", cfg.band_quantity.name()),
            ));
        }
        let engine = SegmentEngine::new(&wcfg)?;
        Ok(Self::with_parts(cfg, layout, engine))
    }

    /// An empty estimate on checked settings.
    fn with_parts(cfg: &PpsdConfig, layout: Layout, engine: SegmentEngine) -> Self {
        let work = BlockWork::new(engine, layout.cuts.len());
        let nb = layout.centres_s.len();
        let n_db = layout.db_edges.len() - 1;
        let model =
            |m: ReferenceGround| layout.centres_s.iter().map(|&t| m.accel_db_at_period(t).ok()).collect();
        Self {
            cfg: cfg.clone(),
            buf: vec![0.0; layout.block_len],
            fill: 0,
            n_blocks: 0,
            hist: vec![0; nb * n_db],
            below_nlnm: vec![0; nb],
            above_nhnm: vec![0; nb],
            nlnm_db: model(ReferenceGround::Nlnm),
            nhnm_db: model(ReferenceGround::Nhnm),
            above_criterion: 0,
            hours: HourMap::new(cfg.bands_hz.len()),
            work,
            layout,
        }
    }

    /// An empty estimate with the same settings (sharing the FFT plan).
    fn sibling(&self) -> Self {
        Self::with_parts(&self.cfg, self.layout.clone(), self.work.engine.fork())
    }

    /// Samples per block.
    pub fn block_samples(&self) -> usize {
        self.layout.block_len
    }
    /// Samples between block starts.
    pub fn step_samples(&self) -> usize {
        self.layout.step_len
    }
    /// Welch segment length (samples).
    pub fn nfft(&self) -> usize {
        self.work.engine.nperseg()
    }
    /// Centre periods of the period bins (s), increasing.
    pub fn period_centres_s(&self) -> &[f64] {
        &self.layout.centres_s
    }
    /// dB bin edges (n_db + 1 values).
    pub fn db_edges(&self) -> &[f64] {
        &self.layout.db_edges
    }
    /// Blocks counted so far.
    pub fn n_blocks(&self) -> usize {
        self.n_blocks
    }
    /// The histogram, `[period_bin * n_db + db_bin]` (counts of blocks).
    pub fn histogram(&self) -> &[u64] {
        &self.hist
    }
    /// Blocks whose velocity exceeded the criterion curve in at least one band.
    pub fn blocks_above_criterion(&self) -> u64 {
        self.above_criterion
    }
    /// The hour-of-day statistics.
    pub fn hours(&self) -> &HourMap {
        &self.hours
    }
    /// The settings.
    pub fn config(&self) -> &PpsdConfig {
        &self.cfg
    }

    /// Push samples; returns the blocks this chunk completed. A chunk with a non-finite sample
    /// is rejected whole (the error names its index in the chunk).
    pub fn push(&mut self, mut data: &[f64]) -> Result<Vec<PpsdBlock>> {
        crate::error::require_all_finite("samples", data)?;
        let mut out = Vec::new();
        let (n, step) = (self.layout.block_len, self.layout.step_len);
        while !data.is_empty() {
            let take = (n - self.fill).min(data.len());
            let s = self.cfg.scale;
            self.buf[self.fill..self.fill + take].iter_mut().zip(&data[..take]).for_each(|(b, v)| *b = v * s);
            self.fill += take;
            data = &data[take..];
            if self.fill == n {
                out.push(self.process_block()?);
                let keep = n - step.min(n);
                self.buf.copy_within(n - keep.., 0);
                self.fill = keep;
            }
        }
        Ok(out)
    }

    fn process_block(&mut self) -> Result<PpsdBlock> {
        // The buffer holds the scaled samples already.
        let spec = block_spectrum(&self.layout, &self.cfg, &mut self.work, &self.buf, 1.0, 0)?;
        Ok(self.count_block(spec))
    }

    /// Count a block's spectrum into the histogram, the model and criterion shares and the
    /// hour map, as the next block of the recording.
    fn count_block(&mut self, spec: BlockSpectrum) -> PpsdBlock {
        let BlockSpectrum { binned_db, psd, band_rms, criterion_ratio } = spec;
        let n_db = self.layout.db_edges.len() - 1;
        for (b, &v) in binned_db.iter().enumerate() {
            // Bin i with edges[i] < v <= edges[i+1]; below the first edge -> 0, above -> last.
            let i = self.layout.db_edges.partition_point(|&e| e < v);
            let i = i.saturating_sub(1).min(n_db - 1);
            self.hist[b * n_db + i] += 1;
            if self.nlnm_db[b].is_some_and(|l| v < l) {
                self.below_nlnm[b] += 1;
            }
            if self.nhnm_db[b].is_some_and(|h| v > h) {
                self.above_nhnm[b] += 1;
            }
        }
        if criterion_ratio.is_some_and(|r| r > 1.0) {
            self.above_criterion += 1;
        }
        let fs = self.layout.fs;
        let start_s = (self.n_blocks * self.layout.step_len) as f64 / fs;
        let hour_of_day = self.cfg.start_of_day_s.map(|t0| {
            let centre = t0 + start_s + self.layout.block_len as f64 / fs / 2.0;
            ((centre.rem_euclid(86_400.0) / 3600.0).floor() as usize).min(23)
        });
        if let Some(h) = hour_of_day {
            self.hours.blocks[h] += 1;
            let nb = self.hours.n_bands;
            for (j, r) in band_rms.iter().enumerate() {
                self.hours.ms_sum[h * nb + j] += r * r;
                let m = &mut self.hours.max_rms[h * nb + j];
                *m = m.max(*r);
            }
        }
        let block = PpsdBlock {
            index: self.n_blocks,
            start_s,
            hour_of_day,
            binned_db,
            psd,
            band_rms,
            criterion_ratio,
        };
        self.n_blocks += 1;
        block
    }

    /// Record whether the rig held its image-motion limit during a block (judged elsewhere, e.g.
    /// by `quiet_hours` through a rig model), in the block's hour of the day. Blocks without an
    /// hour are ignored.
    pub fn record_verdict(&mut self, block: &PpsdBlock, holds: bool) {
        if let Some(h) = block.hour_of_day {
            self.hours.judged[h] += 1;
            if holds {
                self.hours.held[h] += 1;
            }
        }
    }

    /// The percentile curve (dB) over the period bins, read from the cumulative histogram as
    /// ObsPy's `get_percentile`: the lower edge of the first dB bin whose cumulative share
    /// reaches `q`/100 (for q = 0 the first bin with a count). Errors before the first block.
    pub fn percentile_db(&self, q: f64) -> Result<Vec<f64>> {
        if self.n_blocks == 0 {
            return Err(Error::invalid("samples", "no complete block yet"));
        }
        if !(0.0..=100.0).contains(&q) {
            return Err(Error::OutOfRange { what: "percentile".into(), value: q, min: 0.0, max: 100.0 });
        }
        let p = q / 100.0;
        let n_db = self.layout.db_edges.len() - 1;
        Ok(self
            .hist
            .chunks(n_db)
            .map(|row| {
                let total = row.iter().sum::<u64>().max(1) as f64;
                let mut cum = 0u64;
                let mut j = n_db;
                for (i, c) in row.iter().enumerate() {
                    cum += c;
                    let frac = cum as f64 / total;
                    if (p == 0.0 && frac > 0.0) || (p > 0.0 && frac >= p) {
                        j = i;
                        break;
                    }
                }
                self.layout.db_edges[j]
            })
            .collect())
    }

    /// Mean over the histogram (dB, from the dB bin centres) per period bin.
    pub fn mean_db(&self) -> Vec<f64> {
        let e = &self.layout.db_edges;
        let n_db = e.len() - 1;
        self.hist
            .chunks(n_db)
            .map(|row| {
                let n = row.iter().sum::<u64>();
                if n == 0 {
                    return f64::NAN;
                }
                row.iter().enumerate().map(|(i, &c)| c as f64 * 0.5 * (e[i] + e[i + 1])).sum::<f64>()
                    / n as f64
            })
            .collect()
    }

    /// Share of blocks below Peterson's low-noise model per period bin (NaN outside the model's
    /// 0.1–100 000 s).
    pub fn share_below_nlnm(&self) -> Vec<f64> {
        self.share(&self.below_nlnm, &self.nlnm_db)
    }

    /// Share of blocks above Peterson's high-noise model per period bin.
    pub fn share_above_nhnm(&self) -> Vec<f64> {
        self.share(&self.above_nhnm, &self.nhnm_db)
    }

    fn share(&self, counts: &[u64], model: &[Option<f64>]) -> Vec<f64> {
        counts
            .iter()
            .zip(model)
            .map(
                |(&c, m)| {
                    if m.is_some() && self.n_blocks > 0 { c as f64 / self.n_blocks as f64 } else { f64::NAN }
                },
            )
            .collect()
    }
}

/// One probabilistic PSD per axis over whole in-memory recordings. The blocks of all axes are
/// worked in parallel (rayon), each thread with its own FFT buffers; their spectra are then
/// counted axis by axis in block order, so every count, sum and block equals what pushing each
/// axis through [`ProbabilisticPsd::push`] gives, whatever the number of threads. Returns each
/// axis's estimate (left as after that push) with its blocks.
pub fn probabilistic_psd_axes(
    axes: &[&[f64]],
    fs: f64,
    cfg: &PpsdConfig,
) -> Result<Vec<(ProbabilisticPsd, Vec<PpsdBlock>)>> {
    use rayon::prelude::*;
    if axes.is_empty() {
        return Err(Error::invalid("x", "no axis given"));
    }
    let in_axis = |a: usize, e: Error| Error::invalid(format!("x[{a}]"), e.to_string());
    let first = ProbabilisticPsd::new(fs, cfg)?;
    let (n, adv) = (first.layout.block_len, first.layout.step_len.min(first.layout.block_len));
    let mut jobs = Vec::new();
    // The samples are checked for finiteness as the blocks read them (see `block_spectrum`);
    // the tail after the last block here.
    for (a, x) in axes.iter().enumerate() {
        if x.len() < n {
            crate::error::require_all_finite("samples", x).map_err(|e| in_axis(a, e))?;
            return Err(Error::invalid(
                format!("x[{a}]"),
                format!("{} samples are fewer than one block of {n}", x.len()),
            ));
        }
        let count = (x.len() - n) / adv + 1;
        let end = (count - 1) * adv + n;
        if let Some(i) = first_non_finite(&x[end..]) {
            return Err(in_axis(a, non_finite_at("samples", x[end + i], end + i)));
        }
        jobs.extend((0..count).map(|k| (a, k * adv)));
    }
    let spectra: Vec<Result<BlockSpectrum>> = jobs
        .par_iter()
        .map_init(
            || BlockWork::new(first.work.engine.fork(), first.layout.cuts.len()),
            |w, &(a, s)| block_spectrum(&first.layout, &first.cfg, w, &axes[a][s..s + n], cfg.scale, s),
        )
        .collect();
    let mut est: Vec<ProbabilisticPsd> = (1..axes.len()).map(|_| first.sibling()).collect();
    est.insert(0, first);
    let mut spectra = spectra.into_iter();
    let mut out = Vec::with_capacity(axes.len());
    for (a, (x, mut p)) in axes.iter().zip(est).enumerate() {
        let count = (x.len() - n) / adv + 1;
        let mut blocks = Vec::with_capacity(count);
        for spec in spectra.by_ref().take(count) {
            blocks.push(p.count_block(spec.map_err(|e| in_axis(a, e))?));
        }
        // Leave the stream as the push would: the samples after the last block's step.
        let tail = &x[count * adv..];
        p.buf[..tail.len()].iter_mut().zip(tail).for_each(|(b, v)| *b = v * cfg.scale);
        p.fill = tail.len();
        out.push((p, blocks));
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::test_signals::white_noise as noise;

    #[test]
    fn segment_rule_matches_mcnamara_buland() {
        // McNamara & Buland (2004) (docs/references.md#s4): 1 h at 100 Hz -> segments of
        // 2^16 samples (the power of two below 360 000/4 = 90 000) at 75 % overlap.
        let p = ProbabilisticPsd::new(100.0, &PpsdConfig::default()).unwrap();
        assert_eq!(p.block_samples(), 360_000);
        assert_eq!(p.step_samples(), 180_000);
        assert_eq!(p.nfft(), 65_536);
        assert_eq!(p.work.engine.step(), 65_536 - 49_152);
        // Bins step by 1/8 octave.
        let c = p.period_centres_s();
        for w in c.windows(2) {
            assert!((w[1] / w[0] - 2f64.powf(0.125)).abs() < 1e-12);
        }
        assert!((c[0] - 0.02).abs() < 1e-12, "{}", c[0]); // the Nyquist period 2/fs
    }

    #[test]
    fn white_acceleration_lands_on_its_level_and_streams_in_chunks() {
        // White acceleration noise sigma at fs: one-sided level 2σ²/fs (Parseval,
        // docs/references.md#s12); σ = 1e-5 m/s², fs = 50 Hz -> 4e-12 -> −114.0 dB.
        let fs = 50.0;
        let cfg = PpsdConfig::default().with_block_s(200.0).with_input(Quantity::Acceleration, 1.0);
        let x = noise(50 * 2000, 1e-5, 3);
        let mut one = ProbabilisticPsd::new(fs, &cfg).unwrap();
        let blocks = one.push(&x).unwrap();
        // Blocks of 10 000 samples every 5 000: (100 000 − 10 000)/5 000 + 1 = 19.
        assert_eq!(blocks.len(), 19);
        let med = one.percentile_db(50.0).unwrap();
        let want = 10.0 * (2.0 * 1e-10 / fs).log10();
        for (t, m) in one.period_centres_s().iter().zip(&med) {
            if *t > 0.1 && *t < 10.0 {
                // The mean of the log of a chi-square average sits a little below the log of
                // the mean (a fraction of a dB at ~20 degrees of freedom), and bins are 1 dB.
                assert!((m - want).abs() < 2.0, "period {t}: {m} vs {want}");
            }
        }
        let mut chunked = ProbabilisticPsd::new(fs, &cfg).unwrap();
        let mut got = Vec::new();
        for c in x.chunks(777) {
            got.extend(chunked.push(c).unwrap());
        }
        assert_eq!(got, blocks);
        assert_eq!(chunked.histogram(), one.histogram());
        // Far above the low-noise model at short periods: none below it.
        assert!(one.share_below_nlnm().iter().filter(|v| v.is_finite()).all(|&v| v == 0.0));
    }

    #[test]
    fn the_first_sample_that_is_not_finite_is_named_wherever_it_lies() {
        // 40 Hz, 100 s blocks (4000 samples, step 2000), segments of 512 in pieces of 128: a
        // block's pieces cover its first 3968 samples, the last 32 are its remainder, and
        // after the 19th block 777 samples are left over. A bad sample in a piece, in a
        // remainder, in the tail, and the first of two, each named by axis and index.
        let fs = 40.0;
        let cfg = PpsdConfig::default().with_block_s(100.0);
        let clean = noise(40 * 1000 + 777, 1.0, 5);
        for (bad, value, want) in [
            (vec![5000], f64::NAN, 5000),
            (vec![3980], f64::INFINITY, 3980),
            (vec![40_500], f64::NEG_INFINITY, 40_500),
            (vec![40_776], f64::NAN, 40_776),
            (vec![30_000, 7], f64::NAN, 7),
        ] {
            let mut x = clean.clone();
            bad.iter().for_each(|&i| x[i] = value);
            let e = probabilistic_psd_axes(&[&clean, &x], fs, &cfg).unwrap_err().to_string();
            assert!(
                e.contains("x[1]") && e.contains(&format!("value {value} at index {want} is not finite")),
                "{e}"
            );
            // The stream says the same of the chunk.
            let e = ProbabilisticPsd::new(fs, &cfg).unwrap().push(&x).unwrap_err().to_string();
            assert!(e.contains(&format!("at index {want} is not finite")), "{e}");
        }
    }

    #[test]
    fn in_memory_axes_equal_the_stream_whatever_the_threads() {
        // Blocks worked in parallel and counted in order must give what one push per axis
        // gives, bit for bit, on 1 and 2 threads; with hours, bands and a criterion on, and a
        // step that does not divide the data (so a tail is left in the buffer).
        let fs = 40.0;
        let mut cfg = PpsdConfig::default()
            .with_block_s(100.0)
            .with_input(Quantity::Velocity, 1e-3)
            .with_hours(3000.0, vec![(0.5, 4.0), (4.0, 12.0)])
            .with_criterion(CriterionCurve::VcA);
        cfg.overlap = 0.3;
        let axes: Vec<Vec<f64>> =
            (0..3).map(|k| noise(40 * 1000 + 777 * k, 1.0 + k as f64, 20 + k as u64)).collect();
        let refs: Vec<&[f64]> = axes.iter().map(|v| v.as_slice()).collect();
        let serial: Vec<(ProbabilisticPsd, Vec<PpsdBlock>)> = axes
            .iter()
            .map(|x| {
                let mut p = ProbabilisticPsd::new(fs, &cfg).unwrap();
                let b = p.push(x).unwrap();
                (p, b)
            })
            .collect();
        for threads in [1, 2] {
            let pool = rayon::ThreadPoolBuilder::new().num_threads(threads).build().unwrap();
            let got = pool.install(|| probabilistic_psd_axes(&refs, fs, &cfg)).unwrap();
            assert_eq!(got.len(), 3);
            for ((g, gb), (s, sb)) in got.iter().zip(&serial) {
                assert_eq!(gb, sb);
                assert_eq!(g.histogram(), s.histogram());
                assert_eq!(g.hours(), s.hours());
                assert_eq!(g.blocks_above_criterion(), s.blocks_above_criterion());
                let bits = |v: Vec<f64>| v.iter().map(|x| x.to_bits()).collect::<Vec<_>>();
                assert_eq!(bits(g.share_below_nlnm()), bits(s.share_below_nlnm()));
                assert_eq!(bits(g.mean_db()), bits(s.mean_db()));
                assert_eq!((g.n_blocks(), g.fill), (s.n_blocks(), s.fill));
                assert_eq!(g.buf[..g.fill], s.buf[..s.fill]);
            }
        }
        // The first bad sample is named in its axis, and a short axis is refused.
        let mut bad = axes[1].clone();
        bad[30_000] = f64::INFINITY;
        bad[39_000] = f64::NAN;
        let e = probabilistic_psd_axes(&[&axes[0], &bad], fs, &cfg).unwrap_err();
        assert!(e.to_string().contains("x[1]") && e.to_string().contains("index 30000"), "{e}");
        let e = probabilistic_psd_axes(&[&axes[0], &axes[1][..3000]], fs, &cfg).unwrap_err();
        assert!(e.to_string().contains("fewer than one block of 4000"), "{e}");
    }

    #[test]
    fn db_sums_match_a_log_per_value() {
        // Against the direct Σ 10·log10 (libm's log10 per value) over ranges of every length
        // up to 3000, magnitudes from 1e-300 to 1e300, with the floor (0, NaN, subnormals).
        use rand::{Rng, SeedableRng};
        let mut rng = rand::rngs::StdRng::seed_from_u64(11);
        let mut xs: Vec<f64> = (0..3000).map(|_| 10f64.powf(rng.random_range(-300.0..300.0))).collect();
        xs[5] = 0.0;
        xs[77] = f64::NAN;
        xs[900] = 1e-320;
        let direct = |v: &[f64]| v.iter().map(|a| 10.0 * a.max(f64::MIN_POSITIVE).log10()).sum::<f64>();
        for n in (0..40).chain([127, 128, 129, 1023, 1024, 1025, 3000]) {
            let (got, want) = (db_sum(&xs[..n]), direct(&xs[..n]));
            let scale = xs[..n].iter().map(|a| (10.0 * a.max(f64::MIN_POSITIVE).log10()).abs()).sum::<f64>();
            assert!((got - want).abs() <= 1e-13 * scale.max(1.0), "n {n}: {got} vs {want}");
        }
        assert_eq!(db_sum(&[]), 0.0);
        assert_eq!(db_sum(&[1.0, f64::INFINITY]), f64::INFINITY);
        assert!((db_sum(&[100.0; 10]) - 200.0).abs() < 1e-12);
    }

    #[test]
    fn running_sum_differences_match_the_direct_sums() {
        // Range sums as differences of the carried running sum against sums taken range by
        // range (the direct definition), on values like a spectrum in dB, with ranges short
        // and long, near the start and the end.
        let v: Vec<f64> =
            noise(30_000, 3.0, 5).iter().enumerate().map(|(i, e)| -140.0 - 1e-3 * i as f64 + e).collect();
        let mut prefix = vec![(0.0, 0.0)];
        for &x in &v {
            let (h, l) = *prefix.last().unwrap();
            prefix.push(two_sum_step(h, l, x));
        }
        for (a, b) in [(0, 1), (0, 30_000), (29_999, 30_000), (17, 4_000), (20_000, 20_003), (1_000, 29_000)]
        {
            let ((ha, la), (hb, lb)) = (prefix[a], prefix[b]);
            let m = ((hb - ha) + (lb - la)) / (b - a) as f64;
            let direct = v[a..b].iter().sum::<f64>() / (b - a) as f64;
            assert!((m - direct).abs() <= 1e-14 * direct.abs(), "{a}..{b}: {m} vs {direct}");
        }
    }

    #[test]
    fn hour_map_and_criterion_count_blocks() {
        let fs = 20.0;
        // 1-minute blocks without overlap, first sample at 01:59:00 -> block 0 in hour 1,
        // blocks 1.. in hour 2.
        let mut cfg = PpsdConfig::default()
            .with_block_s(60.0)
            .with_input(Quantity::Velocity, 1.0)
            .with_hours(7140.0, vec![(1.0, 5.0)])
            .with_criterion(CriterionCurve::VcE);
        cfg.overlap = 0.0;
        let mut p = ProbabilisticPsd::new(fs, &cfg).unwrap();
        // White velocity 1e-4 m/s rms: band 1-5 Hz holds 4/10 of the variance -> 6.3e-5 m/s,
        // above VC-E's 3.12 µm/s in every band.
        let b = p.push(&noise(20 * 180, 1e-4, 9)).unwrap();
        assert_eq!(b.len(), 3);
        assert_eq!(b.iter().map(|b| b.hour_of_day.unwrap()).collect::<Vec<_>>(), vec![1, 2, 2]);
        assert_eq!(p.hours().blocks[1], 1);
        assert_eq!(p.hours().blocks[2], 2);
        assert_eq!(p.blocks_above_criterion(), 3);
        let r = p.hours().rms();
        assert!((r[2] / (1e-4 * 0.4f64.sqrt()) - 1.0).abs() < 0.3, "{}", r[2]);
        assert!(r[5].is_nan());
        p.record_verdict(&b[0], true);
        p.record_verdict(&b[1], false);
        assert_eq!((p.hours().judged[1], p.hours().held[1]), (1, 1));
        assert_eq!((p.hours().judged[2], p.hours().held[2]), (1, 0));
    }

    #[test]
    fn bad_settings_are_named() {
        let e = ProbabilisticPsd::new(100.0, &PpsdConfig { overlap: 1.0, ..Default::default() }).unwrap_err();
        assert!(e.to_string().contains("overlap"), "{e}");
        let e = ProbabilisticPsd::new(1.0, &PpsdConfig::default().with_block_s(10.0)).unwrap_err();
        assert!(e.to_string().contains("block_s"), "{e}");
        let e = ProbabilisticPsd::new(100.0, &PpsdConfig::default().with_input(Quantity::Velocity, 0.0))
            .unwrap_err();
        assert!(e.to_string().contains("scale"), "{e}");
        let mut p = ProbabilisticPsd::new(100.0, &PpsdConfig::default().with_block_s(10.0)).unwrap();
        assert!(p.percentile_db(50.0).unwrap_err().to_string().contains("no complete block"));
        let e = p.push(&[0.0, f64::NAN]).unwrap_err();
        assert!(e.to_string().contains("index 1"), "{e}");
    }

    #[test]
    fn taper_is_flat_in_the_middle_and_zero_at_the_ends() {
        let w = cosine_taper_20(100);
        assert_eq!(w[0], 0.0);
        assert_eq!(w[99], 0.0);
        assert!(w[10..90].iter().all(|&v| v == 1.0));
        assert!((w[5] - 0.5 * (1.0 - (std::f64::consts::PI * 5.0 / 9.0).cos())).abs() < 1e-15);
    }
}

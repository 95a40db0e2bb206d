//! Welch PSD, cross-spectral density and coherence, one-shot and streaming.
//!
//! Conventions follow `scipy.signal.welch` / `csd` / `coherence` with `scaling='density'`,
//! `return_onesided=True`, `nfft = nperseg`, `average='mean'`:
//! - segments of `nperseg` samples start at 0 and advance by `nperseg − noverlap`; a trailing
//!   partial segment is dropped;
//! - each segment is detrended, multiplied by the window w and transformed (real FFT);
//! - P(f_k) = c_k · mean over segments of conj(X_k)·Y_k / (fs · Σw²), with c_k = 2 except at
//!   k = 0 and, for even `nperseg`, at the Nyquist bin k = nperseg/2 (c_k = 1);
//! - f_k = k·fs/nperseg, k = 0..=nperseg/2 (the DC bin is included).

use std::sync::Arc;

use num_complex::Complex64;
use realfft::{RealFftPlanner, RealToComplex};

use super::psd::{Psd, Quantity};
use super::window::Window;
use crate::error::{Error, Result, require_positive};
use crate::linalg::lanes::{complex_as_reals, lane_moments, with_best_simd};

/// Largest accepted `nperseg` (2²³ samples); refused up front.
pub const MAX_NPERSEG: usize = 1 << 23;

/// Per-segment trend removal before windowing (scipy `detrend=`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Detrend {
    /// No trend removal (scipy `detrend=False`).
    None,
    /// Subtract the segment mean (scipy `'constant'`, the default).
    #[default]
    Constant,
    /// Subtract the least-squares straight line (scipy `'linear'`).
    Linear,
}

impl Detrend {
    /// Parse scipy's names: "constant", "linear", "none" / "false".
    pub fn from_name(name: &str) -> Result<Detrend> {
        match name.trim().to_ascii_lowercase().as_str() {
            "constant" => Ok(Detrend::Constant),
            "linear" => Ok(Detrend::Linear),
            "none" | "false" => Ok(Detrend::None),
            _ => Err(Error::UnknownName {
                kind: "detrend".into(),
                name: name.to_string(),
                known: "constant, linear, none".into(),
            }),
        }
    }
}

/// How segment periodograms are combined.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
#[non_exhaustive]
pub enum Average {
    /// Arithmetic mean (scipy `average='mean'`).
    #[default]
    Mean,
}

/// Welch options, named as in `scipy.signal.welch`.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub struct WelchConfig {
    /// Samples per segment (default 256, scipy's default for a named window).
    pub nperseg: usize,
    /// Samples shared by consecutive segments; `None` means `nperseg / 2` (floor).
    pub noverlap: Option<usize>,
    /// Data window (default periodic Hann).
    pub window: Window,
    /// Per-segment detrending (default [`Detrend::Constant`]).
    pub detrend: Detrend,
    /// Averaging of segments (default [`Average::Mean`]).
    pub average: Average,
}

impl Default for WelchConfig {
    fn default() -> Self {
        Self {
            nperseg: 256,
            noverlap: None,
            window: Window::Hann,
            detrend: Detrend::Constant,
            average: Average::Mean,
        }
    }
}

impl WelchConfig {
    /// Defaults with the given segment length.
    pub fn new(nperseg: usize) -> Self {
        Self { nperseg, ..Self::default() }
    }
    /// Set `noverlap`.
    pub fn with_noverlap(mut self, noverlap: usize) -> Self {
        self.noverlap = Some(noverlap);
        self
    }
    /// Set the window.
    pub fn with_window(mut self, window: Window) -> Self {
        self.window = window;
        self
    }
    /// Set the detrending.
    pub fn with_detrend(mut self, detrend: Detrend) -> Self {
        self.detrend = detrend;
        self
    }
    /// The effective overlap: `noverlap` or `nperseg / 2`.
    pub fn effective_noverlap(&self) -> usize {
        self.noverlap.unwrap_or(self.nperseg / 2)
    }
}

/// A Welch estimate including the DC bin (f = 0).
#[derive(Debug, Clone, PartialEq)]
pub struct WelchPsd {
    /// Bin frequencies k·fs/nperseg (Hz), k = 0..=nperseg/2.
    pub freq_hz: Vec<f64>,
    /// One-sided density (input unit²/Hz).
    pub values: Vec<f64>,
    /// Number of averaged segments.
    pub n_segments: usize,
}

impl WelchPsd {
    /// Drop the DC bin and wrap as a [`Psd`] of the given quantity (the input's unit).
    pub fn to_psd(&self, quantity: Quantity) -> Result<Psd> {
        if self.values.len() != self.freq_hz.len() {
            return Err(Error::shape("WelchPsd values vs freq_hz", self.freq_hz.len(), self.values.len()));
        }
        let tail = |v: &[f64]| v.get(1..).unwrap_or_default().to_vec();
        Psd::new(tail(&self.freq_hz), tail(&self.values), quantity)
    }
}

/// A cross-spectral density estimate Pxy (scipy.signal.csd conventions), DC bin included.
#[derive(Debug, Clone, PartialEq)]
pub struct CrossSpectrum {
    /// Bin frequencies (Hz).
    pub freq_hz: Vec<f64>,
    /// One-sided complex density conj(X)·Y scaled (unit of x · unit of y / Hz).
    pub values: Vec<Complex64>,
    /// Number of averaged segments.
    pub n_segments: usize,
}

/// Magnitude-squared coherence |Pxy|²/(Pxx·Pyy), DC bin included.
#[derive(Debug, Clone, PartialEq)]
pub struct Coherence {
    /// Bin frequencies (Hz).
    pub freq_hz: Vec<f64>,
    /// Coherence in [0, 1]; set to 0 where Pxx·Pyy = 0 (scipy gives NaN there).
    pub values: Vec<f64>,
    /// Number of averaged segments.
    pub n_segments: usize,
}

/// The per-segment work: detrend, window, real FFT. Owns its buffers, so transforming a
/// segment allocates nothing; the plan and the window are shared by its forks (one per thread).
pub(crate) struct SegmentEngine {
    nperseg: usize,
    step: usize,
    window: Arc<[f64]>,
    /// The longest run of window weights equal to 1.
    flat: (usize, usize),
    win_sq_sum: f64,
    detrend: Detrend,
    plan: Plan,
    /// Even length: the windowed samples in pairs (sample 2j real, 2j + 1 imaginary).
    pairs: Vec<Complex64>,
    /// Odd length: the windowed samples.
    real_input: Vec<f64>,
    scratch: Vec<Complex64>,
    out: Vec<Complex64>,
}

/// How a windowed segment is transformed.
#[derive(Clone)]
enum Plan {
    /// Even length n: a complex FFT of the n/2 sample pairs, then the split into the spectrum
    /// of the real segment (the standard real-input FFT through a half-length complex one,
    /// e.g. Press et al., Numerical Recipes, 3rd ed., 2007, §12.3). The split repeats the
    /// operations of `realfft`'s even-length transform one for one (tested bit for bit), and
    /// is written out here so the power can be taken in the same pass.
    Even { fft: Arc<dyn rustfft::Fft<f64>>, twiddles: Arc<[Complex64]> },
    /// Odd length: `realfft`'s transform.
    Odd(Arc<dyn RealToComplex<f64>>),
}

impl std::fmt::Debug for SegmentEngine {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("SegmentEngine").field("nperseg", &self.nperseg).field("step", &self.step).finish()
    }
}

/// Split step of the even-length real FFT, in place: `out[..n/2]` holds the complex FFT of
/// the sample pairs on entry and `out` the spectrum X_0..X_{n/2} on return.
fn split_in_place(out: &mut [Complex64], twiddles: &[Complex64]) {
    let h = out.len() - 1;
    let z0 = out[0];
    out[0] = Complex64::new(z0.re + z0.im, 0.0);
    out[h] = Complex64::new(z0.re - z0.im, 0.0);
    for (i, tw) in twiddles.iter().enumerate().map(|(j, t)| (j + 1, t)) {
        let (x, y) = split_pair(out[i], out[h - i], *tw);
        out[i] = x;
        out[h - i] = y;
    }
    if h.is_multiple_of(2) {
        out[h / 2].im = -out[h / 2].im;
    }
}

/// X_i and X_{n/2−i} from Z_i and Z_{n/2−i} (twiddle already halved), in `realfft`'s order of
/// operations.
#[inline(always)]
fn split_pair(z: Complex64, z_rev: Complex64, tw: Complex64) -> (Complex64, Complex64) {
    let sum = z + z_rev;
    let diff = z - z_rev;
    let half_sum_re = 0.5 * sum.re;
    let half_diff_im = 0.5 * diff.im;
    let twiddled_real = sum.im * tw.re + diff.re * tw.im;
    let twiddled_im = sum.im * tw.im - diff.re * tw.re;
    (
        Complex64::new(half_sum_re + twiddled_real, half_diff_im + twiddled_im),
        Complex64::new(half_sum_re - twiddled_real, twiddled_im - half_diff_im),
    )
}

/// The pairs (i, n/2 − i), i = 1..=m, of [`split_power`]: `z_lo[k]` is Z_{k+1} and `z_hi` runs
/// backwards (`z_hi[m − 1 − k]` is Z_{n/2−k−1}), as do `s_lo` and `s_hi`. Separate slices tell
/// the compiler the stores cannot overlap, so the loop is vectorized.
#[inline(always)]
fn split_power_pairs(
    z_lo: &[Complex64],
    z_hi: &[Complex64],
    tw: &[Complex64],
    s_lo: &mut [f64],
    s_hi: &mut [f64],
) {
    let m = tw.len();
    let (z_lo, z_hi, s_lo, s_hi) = (&z_lo[..m], &z_hi[..m], &mut s_lo[..m], &mut s_hi[..m]);
    for k in 0..m {
        let r = m - 1 - k;
        let (x, y) = split_pair(z_lo[k], z_hi[r], tw[k]);
        s_lo[k] += x.re * x.re + x.im * x.im;
        s_hi[r] += y.re * y.re + y.im * y.im;
    }
}

/// `sums[k] += |X_k|²` straight from the complex FFT `z` of the sample pairs: the split of
/// [`split_in_place`] without storing X (the same values, so the same sums).
#[inline(always)]
fn split_power(z: &[Complex64], twiddles: &[Complex64], sums: &mut [f64]) {
    let h = z.len();
    let (a, b) = (z[0].re + z[0].im, z[0].re - z[0].im);
    // |X|² = re² + im² with im = 0: re² + 0 is re² exactly.
    sums[0] += a * a;
    sums[h] += b * b;
    let m = twiddles.len();
    let (head, tail) = sums.split_at_mut(h - m);
    split_power_pairs(&z[1..=m], &z[h - m..h], twiddles, &mut head[1..=m], &mut tail[..m]);
    if h.is_multiple_of(2) {
        // X = conj(Z) at the centre: the same squares.
        let c = z[h / 2];
        sums[h / 2] += c.re * c.re + c.im * c.im;
    }
}

/// The sums a segment's trend is fitted from, with xᵢ = scale·seg[i] and mid = (n − 1)/2:
/// (Σ xᵢ, Σ (i − mid)·xᵢ) for a linear trend, (Σ xᵢ, 0) for a constant, (0, 0) for none. Taken
/// in one pass over the samples ([`lane_moments`]).
pub(crate) fn trend_sums(detrend: Detrend, seg: &[f64], scale: f64) -> (f64, f64) {
    match detrend {
        Detrend::None => (0.0, 0.0),
        Detrend::Constant => (lane_moments(seg, scale, 0.0, false).0, 0.0),
        Detrend::Linear => lane_moments(seg, scale, (seg.len() as f64 - 1.0) / 2.0, true),
    }
}

/// `input = w · (scale·seg − trend)`, the trend as `detrend` asks (module docs) from the
/// segment's [`trend_sums`], in one pass that fills the FFT input. Over `flat`, where every
/// weight is exactly 1, the product with w is left out (y · 1 = y exactly, so the values are
/// the same; the weights there need not be read).
#[inline(always)]
fn window_detrended(
    detrend: Detrend,
    seg: &[f64],
    scale: f64,
    (s0, s1): (f64, f64),
    w: &[f64],
    flat: (usize, usize),
    input: &mut [f64],
) {
    let n = seg.len();
    let nf = n as f64;
    let mid = (nf - 1.0) / 2.0;
    let trend0 = s0 / nf;
    let stt = nf * (nf * nf - 1.0) / 12.0;
    let slope = if stt > 0.0 { s1 / stt } else { 0.0 };
    let (f0, f1) = flat;
    for (lo, hi, weighted) in [(0, f0, true), (f0, f1, false), (f1, n, true)] {
        let (o, v, w) = (&mut input[lo..hi], &seg[lo..hi], &w[lo..hi]);
        // The expressions of each detrend kept as they were, so the rounding is unchanged.
        match (detrend, weighted) {
            (Detrend::None, true) => o.iter_mut().zip(v).zip(w).for_each(|((o, v), w)| *o = v * scale * w),
            (Detrend::None, false) => o.iter_mut().zip(v).for_each(|(o, v)| *o = v * scale),
            (Detrend::Constant, true) => {
                o.iter_mut().zip(v).zip(w).for_each(|((o, v), w)| *o = (v * scale - trend0) * w)
            }
            (Detrend::Constant, false) => o.iter_mut().zip(v).for_each(|(o, v)| *o = v * scale - trend0),
            (Detrend::Linear, true) => {
                for (i, ((o, v), w)) in o.iter_mut().zip(v).zip(w).enumerate() {
                    *o = (v * scale - (trend0 + slope * ((lo + i) as i32 as f64 - mid))) * w;
                }
            }
            (Detrend::Linear, false) => {
                for (i, (o, v)) in o.iter_mut().zip(v).enumerate() {
                    *o = v * scale - (trend0 + slope * ((lo + i) as i32 as f64 - mid));
                }
            }
        }
    }
}

/// The longest run of weights exactly 1 (empty `(0, 0)` when none).
fn flat_run(w: &[f64]) -> (usize, usize) {
    let (mut best, mut start) = ((0, 0), None);
    for (i, &v) in w.iter().chain([0.0].iter()).enumerate() {
        match (v == 1.0, start) {
            (true, None) => start = Some(i),
            (false, Some(s)) => {
                if i - s > best.1 - best.0 {
                    best = (s, i);
                }
                start = None;
            }
            _ => {}
        }
    }
    best
}

/// `sums[k] += |spec[k]|²` (compiled for the widest SIMD set; the same operations per bin).
fn add_power(sums: &mut [f64], spec: &[Complex64]) {
    with_best_simd(
        #[inline(always)]
        || sums.iter_mut().zip(spec).for_each(|(s, c)| *s += c.re * c.re + c.im * c.im),
    );
}

impl SegmentEngine {
    pub(crate) fn new(cfg: &WelchConfig) -> Result<Self> {
        let n = cfg.nperseg;
        if n == 0 {
            return Err(Error::invalid("nperseg", "must be >= 1, got 0"));
        }
        if n > MAX_NPERSEG {
            return Err(Error::TooLarge { what: "nperseg".into(), value: n, limit: MAX_NPERSEG });
        }
        let noverlap = cfg.effective_noverlap();
        if noverlap >= n {
            return Err(Error::invalid("noverlap", format!("must be < nperseg = {n}, got {noverlap}")));
        }
        let window: Arc<[f64]> = cfg.window.weights(n)?.into();
        let win_sq_sum = window.iter().map(|w| w * w).sum();
        let plan = if n.is_multiple_of(2) {
            // The twiddles as realfft computes them: e^{−2πik/n}/2, k = 1..⌈n/4⌉ − 1.
            let count = if n.is_multiple_of(4) { n / 4 } else { n / 4 + 1 };
            let c = -2.0 * std::f64::consts::PI / n as f64;
            let twiddles = (1..count)
                .map(|k| Complex64::new((c * k as f64).cos(), (c * k as f64).sin()) * 0.5)
                .collect();
            Plan::Even { fft: rustfft::FftPlanner::<f64>::new().plan_fft_forward(n / 2), twiddles }
        } else {
            Plan::Odd(RealFftPlanner::<f64>::new().plan_fft_forward(n))
        };
        Ok(Self::with_plan(n, n - noverlap, window, win_sq_sum, cfg.detrend, plan))
    }

    fn with_plan(
        n: usize,
        step: usize,
        window: Arc<[f64]>,
        win_sq_sum: f64,
        detrend: Detrend,
        plan: Plan,
    ) -> Self {
        let zero = Complex64::new(0.0, 0.0);
        let (pairs, real_input, scratch) = match &plan {
            Plan::Even { fft, .. } => {
                (vec![zero; n / 2], Vec::new(), vec![zero; fft.get_outofplace_scratch_len()])
            }
            Plan::Odd(fft) => (Vec::new(), fft.make_input_vec(), fft.make_scratch_vec()),
        };
        Self {
            nperseg: n,
            step,
            flat: flat_run(&window),
            window,
            win_sq_sum,
            detrend,
            plan,
            pairs,
            real_input,
            scratch,
            out: vec![zero; n / 2 + 1],
        }
    }

    /// An engine with the same plan and window and buffers of its own (for another thread).
    pub(crate) fn fork(&self) -> Self {
        Self::with_plan(
            self.nperseg,
            self.step,
            Arc::clone(&self.window),
            self.win_sq_sum,
            self.detrend,
            self.plan.clone(),
        )
    }

    pub(crate) fn nperseg(&self) -> usize {
        self.nperseg
    }

    pub(crate) fn step(&self) -> usize {
        self.step
    }

    pub(crate) fn detrend(&self) -> Detrend {
        self.detrend
    }

    pub(crate) fn n_bins(&self) -> usize {
        self.nperseg / 2 + 1
    }

    /// Transform one segment (length `nperseg`) into the internal spectrum buffer.
    pub(crate) fn transform(&mut self, seg: &[f64]) -> Result<&[Complex64]> {
        self.transform_scaled(seg, 1.0)
    }

    /// Detrend and window `scale · seg` into the FFT input and run the FFT: for an even length
    /// the complex FFT of the pairs lands in `out[..n/2]` (split still to do), for an odd
    /// length `out` holds the spectrum.
    fn window_and_fft(&mut self, seg: &[f64], scale: f64, sums: Option<(f64, f64)>) -> Result<()> {
        let n = self.nperseg;
        if seg.len() != n {
            return Err(Error::shape("Welch segment", n, seg.len()));
        }
        debug_assert!(n <= MAX_NPERSEG && MAX_NPERSEG < i32::MAX as usize);
        let input = match self.plan {
            Plan::Even { .. } => complex_as_reals(&mut self.pairs),
            Plan::Odd(_) => &mut self.real_input[..],
        };
        let (w, detrend, flat) = (&self.window[..], self.detrend, self.flat);
        // Compiled for the widest SIMD set of the CPU (chosen at run time); no fused
        // multiply-adds are formed, so the rounding is that of the plain expressions.
        let sums = sums.unwrap_or_else(|| trend_sums(detrend, seg, scale));
        with_best_simd(
            #[inline(always)]
            || window_detrended(detrend, seg, scale, sums, w, flat, input),
        );
        match &self.plan {
            Plan::Even { fft, .. } => {
                let h = n / 2;
                fft.process_outofplace_with_scratch(&mut self.pairs, &mut self.out[..h], &mut self.scratch);
            }
            Plan::Odd(fft) => fft
                .process_with_scratch(&mut self.real_input, &mut self.out, &mut self.scratch)
                .map_err(|e| Error::invalid("FFT buffers", e.to_string()))?,
        }
        Ok(())
    }

    /// Transform the segment `scale · seg` (each sample multiplied by `scale` first, as if the
    /// scaled samples had been stored): the detrend sums are taken in one pass over the samples,
    /// and the trend removal and the window in a second pass that fills the FFT input.
    pub(crate) fn transform_scaled(&mut self, seg: &[f64], scale: f64) -> Result<&[Complex64]> {
        self.window_and_fft(seg, scale, None)?;
        if let Plan::Even { twiddles, .. } = &self.plan {
            split_in_place(&mut self.out, twiddles);
        }
        Ok(&self.out)
    }

    /// `sums[k] += |X_k|²` for the segment `scale · seg` (as [`SegmentEngine::transform_scaled`]
    /// then [`add_power`], with the same values; for an even length the split and the squares
    /// are one pass).
    pub(crate) fn add_segment_power(&mut self, seg: &[f64], scale: f64, sums: &mut [f64]) -> Result<()> {
        self.add_segment_power_with(seg, scale, None, sums)
    }

    /// [`SegmentEngine::add_segment_power`] with the segment's [`trend_sums`] given (`None`:
    /// taken here), for callers that assemble them from the sums of shared pieces.
    pub(crate) fn add_segment_power_with(
        &mut self,
        seg: &[f64],
        scale: f64,
        trend: Option<(f64, f64)>,
        sums: &mut [f64],
    ) -> Result<()> {
        self.window_and_fft(seg, scale, trend)?;
        match &self.plan {
            Plan::Even { twiddles, .. } => {
                let z = &self.out[..self.nperseg / 2];
                with_best_simd(
                    #[inline(always)]
                    || split_power(z, twiddles, sums),
                );
            }
            Plan::Odd(_) => add_power(sums, &self.out),
        }
        Ok(())
    }

    /// Density scale and one-sided factor for bin k: c_k / (fs Σw²).
    pub(crate) fn bin_scale(&self, k: usize, fs: f64) -> f64 {
        let base = 1.0 / (fs * self.win_sq_sum);
        let nyquist = self.nperseg.is_multiple_of(2) && k == self.nperseg / 2;
        if k == 0 || nyquist { base } else { 2.0 * base }
    }

    pub(crate) fn freqs(&self, fs: f64) -> Vec<f64> {
        (0..self.n_bins()).map(|k| k as f64 * fs / self.nperseg as f64).collect()
    }

    /// Turn accumulated Σ|X|² over `n_seg` segments into the density.
    pub(crate) fn finalize_auto(&self, sums: &[f64], n_seg: usize, fs: f64) -> WelchPsd {
        let values = sums
            .iter()
            .enumerate()
            .map(|(k, s)| s / n_seg as f64 * self.bin_scale(k, fs))
            .collect::<Vec<_>>();
        WelchPsd { freq_hz: self.freqs(fs), values, n_segments: n_seg }
    }
}

fn check_fs(fs: f64) -> Result<f64> {
    require_positive("fs", fs)
}

fn check_len(nperseg: usize, len: usize, what: &str) -> Result<()> {
    if nperseg > len {
        return Err(Error::invalid("nperseg", format!("{nperseg} exceeds the length {len} of {what}")));
    }
    Ok(())
}

/// Welch PSD of `x` sampled at `fs` Hz (scipy.signal.welch conventions, module docs).
///
/// Errors: `fs` not finite or <= 0; `nperseg` 0 or longer than `x`; `noverlap >= nperseg`;
/// a non-finite sample (the error names its index).
pub fn welch(x: &[f64], fs: f64, cfg: &WelchConfig) -> Result<WelchPsd> {
    check_fs(fs)?;
    let mut eng = SegmentEngine::new(cfg)?;
    check_len(eng.nperseg(), x.len(), "x")?;
    crate::error::require_all_finite("x", x)?;
    let (n, step) = (eng.nperseg(), eng.step());
    let n_seg = (x.len() - n) / step + 1;
    let threads = rayon::current_num_threads();
    // Parallel over runs of segments, each thread with its own plan, buffers and accumulator,
    // when there is enough work to pay for it (about 2^20 samples transformed; common practice,
    // no source). The run sums are added in run order, so the result does not depend on the
    // scheduling (only on the number of threads through the runs' rounding).
    let sums = if threads > 1 && n_seg >= 8 && n_seg * n >= 1 << 20 {
        use rayon::prelude::*;
        let runs = (threads * 4).min(n_seg);
        let per = n_seg.div_ceil(runs);
        let parts = (0..n_seg.div_ceil(per))
            .into_par_iter()
            .map(|r| -> Result<Vec<f64>> {
                let mut e = eng.fork();
                let mut sums = vec![0.0; e.n_bins()];
                for s in r * per..((r + 1) * per).min(n_seg) {
                    e.add_segment_power(&x[s * step..s * step + n], 1.0, &mut sums)?;
                }
                Ok(sums)
            })
            .collect::<Result<Vec<_>>>()?;
        let mut sums = vec![0.0; eng.n_bins()];
        for p in parts {
            sums.iter_mut().zip(p).for_each(|(a, b)| *a += b);
        }
        sums
    } else {
        let mut sums = vec![0.0; eng.n_bins()];
        for s in 0..n_seg {
            eng.add_segment_power(&x[s * step..s * step + n], 1.0, &mut sums)?;
        }
        sums
    };
    Ok(eng.finalize_auto(&sums, n_seg, fs))
}

/// Cross-spectral density Pxy of `x` and `y` (scipy.signal.csd conventions: conj(X)·Y, density
/// scaling, one-sided). `x` and `y` must have equal lengths; errors as [`welch`].
pub fn csd(x: &[f64], y: &[f64], fs: f64, cfg: &WelchConfig) -> Result<CrossSpectrum> {
    let (sxy, sxx, syy, eng, n_seg) = cross_sums(x, y, fs, cfg)?;
    drop((sxx, syy));
    let values = sxy.iter().enumerate().map(|(k, s)| s / n_seg as f64 * eng.bin_scale(k, fs)).collect();
    Ok(CrossSpectrum { freq_hz: eng.freqs(fs), values, n_segments: n_seg })
}

/// Magnitude-squared coherence |Pxy|²/(Pxx·Pyy) (scipy.signal.coherence conventions).
pub fn coherence(x: &[f64], y: &[f64], fs: f64, cfg: &WelchConfig) -> Result<Coherence> {
    let (sxy, sxx, syy, eng, n_seg) = cross_sums(x, y, fs, cfg)?;
    // Scale factors cancel in the ratio, but keep them for identical rounding to scipy's order.
    let values = (0..sxy.len())
        .map(|k| {
            let c = eng.bin_scale(k, fs) / n_seg as f64;
            let (pxy, pxx, pyy) = (sxy[k] * c, sxx[k] * c, syy[k] * c);
            let d = pxx * pyy;
            if d > 0.0 { pxy.norm_sqr() / d } else { 0.0 }
        })
        .collect();
    Ok(Coherence { freq_hz: eng.freqs(fs), values, n_segments: n_seg })
}

type CrossSums = (Vec<Complex64>, Vec<f64>, Vec<f64>, SegmentEngine, usize);

fn cross_sums(x: &[f64], y: &[f64], fs: f64, cfg: &WelchConfig) -> Result<CrossSums> {
    check_fs(fs)?;
    if x.len() != y.len() {
        return Err(Error::shape("length of y vs x", x.len(), y.len()));
    }
    let mut eng = SegmentEngine::new(cfg)?;
    check_len(eng.nperseg(), x.len(), "x")?;
    crate::error::require_all_finite("x", x)?;
    crate::error::require_all_finite("y", y)?;
    let (n, step, nb) = (eng.nperseg(), eng.step(), eng.n_bins());
    let mut xs = vec![Complex64::new(0.0, 0.0); nb];
    let mut sxy = vec![Complex64::new(0.0, 0.0); nb];
    let mut sxx = vec![0.0; nb];
    let mut syy = vec![0.0; nb];
    let mut n_seg = 0;
    let mut start = 0;
    while start + n <= x.len() {
        xs.copy_from_slice(eng.transform(&x[start..start + n])?);
        let ys = eng.transform(&y[start..start + n])?;
        for k in 0..nb {
            sxy[k] += xs[k].conj() * ys[k];
            sxx[k] += xs[k].norm_sqr();
            syy[k] += ys[k].norm_sqr();
        }
        n_seg += 1;
        start += step;
    }
    Ok((sxy, sxx, syy, eng, n_seg))
}

/// Streaming Welch estimator for 1 to 3 axes with memory bounded by the segment length.
///
/// Push chunks of any size, interleaved (`x0 y0 z0 x1 y1 …`, a chunk may end mid-frame) or per
/// axis. Each axis keeps one segment buffer; a segment is transformed as soon as it is full, with
/// one shared FFT plan and scratch (no allocation per segment). [`WelchStream::finish`] gives the
/// same numbers as [`welch`] on the concatenated samples of each axis.
#[derive(Debug)]
pub struct WelchStream {
    engine: SegmentEngine,
    fs: f64,
    bufs: Vec<Vec<f64>>,
    fill: Vec<usize>,
    sums: Vec<Vec<f64>>,
    n_seg: Vec<usize>,
    n_samples: Vec<u64>,
    phase: usize,
}

impl WelchStream {
    /// A stream for `n_axes` (1..=3) channels sampled at `fs` Hz.
    pub fn new(fs: f64, cfg: &WelchConfig, n_axes: usize) -> Result<Self> {
        check_fs(fs)?;
        if !(1..=3).contains(&n_axes) {
            return Err(Error::invalid("n_axes", format!("must be 1, 2 or 3, got {n_axes}")));
        }
        let engine = SegmentEngine::new(cfg)?;
        let (n, nb) = (engine.nperseg(), engine.n_bins());
        Ok(Self {
            fs,
            bufs: vec![vec![0.0; n]; n_axes],
            fill: vec![0; n_axes],
            sums: vec![vec![0.0; nb]; n_axes],
            n_seg: vec![0; n_axes],
            n_samples: vec![0; n_axes],
            phase: 0,
            engine,
        })
    }

    /// Number of axes.
    pub fn n_axes(&self) -> usize {
        self.bufs.len()
    }

    /// Samples received so far on `axis` (0 when out of range).
    pub fn n_samples(&self, axis: usize) -> u64 {
        self.n_samples.get(axis).copied().unwrap_or(0)
    }

    /// Forget all data (keeps the plan and buffers).
    pub fn reset(&mut self) {
        self.fill.iter_mut().for_each(|f| *f = 0);
        self.sums.iter_mut().for_each(|s| s.iter_mut().for_each(|v| *v = 0.0));
        self.n_seg.iter_mut().for_each(|c| *c = 0);
        self.n_samples.iter_mut().for_each(|c| *c = 0);
        self.phase = 0;
    }

    fn complete_segment(&mut self, axis: usize) -> Result<()> {
        self.engine.add_segment_power(&self.bufs[axis], 1.0, &mut self.sums[axis])?;
        self.n_seg[axis] += 1;
        let step = self.engine.step();
        let n = self.engine.nperseg();
        self.bufs[axis].copy_within(step.., 0);
        self.fill[axis] = n - step;
        Ok(())
    }

    fn check_chunk(
        &self,
        name: &str,
        data: &[f64],
        first_index: impl Fn(usize) -> (usize, u64),
    ) -> Result<()> {
        match data.iter().position(|v| !v.is_finite()) {
            Some(i) => {
                let (axis, idx) = first_index(i);
                Err(Error::invalid(
                    name,
                    format!("sample {} (axis {axis}, sample index {idx}) is not finite", data[i]),
                ))
            }
            None => Ok(()),
        }
    }

    /// Push samples of one axis. A chunk containing a non-finite sample is rejected whole
    /// (the stream is left unchanged) and the error names the axis and sample index.
    pub fn push_axis(&mut self, axis: usize, mut data: &[f64]) -> Result<()> {
        if axis >= self.n_axes() {
            return Err(Error::invalid("axis", format!("must be < {}, got {axis}", self.n_axes())));
        }
        let base = self.n_samples[axis];
        self.check_chunk("samples", data, |i| (axis, base + i as u64))?;
        let n = self.engine.nperseg();
        while !data.is_empty() {
            let take = (n - self.fill[axis]).min(data.len());
            let f = self.fill[axis];
            self.bufs[axis][f..f + take].copy_from_slice(&data[..take]);
            self.fill[axis] += take;
            self.n_samples[axis] += take as u64;
            data = &data[take..];
            if self.fill[axis] == n {
                self.complete_segment(axis)?;
            }
        }
        Ok(())
    }

    /// Push one chunk per axis (`chunks.len()` must equal [`WelchStream::n_axes`]).
    pub fn push_axes(&mut self, chunks: &[&[f64]]) -> Result<()> {
        if chunks.len() != self.n_axes() {
            return Err(Error::shape("number of axis chunks", self.n_axes(), chunks.len()));
        }
        for (a, c) in chunks.iter().enumerate() {
            let base = self.n_samples[a];
            self.check_chunk("samples", c, |i| (a, base + i as u64))?;
        }
        for (a, c) in chunks.iter().enumerate() {
            self.push_axis(a, c)?;
        }
        Ok(())
    }

    /// Push interleaved samples (`x0 y0 z0 x1 …` for 3 axes; plain samples for 1 axis). A chunk
    /// may end in the middle of a frame; the next chunk continues with the next axis.
    pub fn push_interleaved(&mut self, data: &[f64]) -> Result<()> {
        let na = self.n_axes();
        if na == 1 {
            return self.push_axis(0, data);
        }
        let mut ns = [0u64; 3];
        ns[..na].copy_from_slice(&self.n_samples);
        let phase = self.phase;
        self.check_chunk("samples", data, |i| {
            let a = (phase + i) % na;
            let before = (0..i).filter(|j| (phase + j) % na == a).count() as u64;
            (a, ns[a] + before)
        })?;
        let n = self.engine.nperseg();
        for &v in data {
            let a = self.phase;
            let f = self.fill[a];
            self.bufs[a][f] = v;
            self.fill[a] += 1;
            self.n_samples[a] += 1;
            if self.fill[a] == n {
                self.complete_segment(a)?;
            }
            self.phase = (self.phase + 1) % na;
        }
        Ok(())
    }

    /// Same as [`WelchStream::push_interleaved`] (reads naturally for a single axis).
    pub fn push(&mut self, data: &[f64]) -> Result<()> {
        self.push_interleaved(data)
    }

    /// The estimate for every axis from all segments completed so far (the stream can go on).
    /// Errors when an axis has no complete segment, or the axes received different numbers of
    /// samples.
    pub fn finish(&self) -> Result<Vec<WelchPsd>> {
        let n0 = self.n_samples[0];
        if let Some(a) = (1..self.n_axes()).find(|&a| self.n_samples[a] != n0) {
            return Err(Error::invalid(
                "samples",
                format!("axis {a} received {} samples but axis 0 received {n0}", self.n_samples[a]),
            ));
        }
        if self.n_seg[0] == 0 {
            check_len(self.engine.nperseg(), n0 as usize, "the pushed data")?;
        }
        Ok((0..self.n_axes())
            .map(|a| self.engine.finalize_auto(&self.sums[a], self.n_seg[a], self.fs))
            .collect())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::test_signals::white_noise as noise;
    use approx::assert_relative_eq;
    use std::f64::consts::PI;

    #[test]
    fn parseval_white_noise() {
        // Parseval / white-noise level (docs/references.md#s12): for sigma = 2, fs = 100 Hz the
        // one-sided level is 2 sigma²/fs = 0.08 and ∫P df ≈ var(x).
        let x = noise(65_536, 2.0, 7);
        let fs = 100.0;
        let p = welch(&x, fs, &WelchConfig::default()).unwrap();
        assert_eq!(p.n_segments, 511);
        assert_eq!(p.freq_hz.len(), 129);
        let df = fs / 256.0;
        let integral: f64 = p.values.iter().sum::<f64>() * df;
        let var = x.iter().map(|v| v * v).sum::<f64>() / x.len() as f64;
        assert!((integral / var - 1.0).abs() < 0.01, "{integral} vs {var}");
        let mean_level = p.values[1..128].iter().sum::<f64>() / 127.0;
        assert!((mean_level / 0.08 - 1.0).abs() < 0.02, "{mean_level}");
    }

    #[test]
    fn sine_peak_power_and_flattop_amplitude() {
        // Bin-centred sine A = 3 at 20 fs/256 (docs/references.md#s12): Hann density peak
        // (A²/2)/(1.5 fs/256) = 7.68 at fs = 100; ∫P df = A²/2 = 4.5.
        let fs = 100.0;
        let (a, f0) = (3.0, 20.0 * 100.0 / 256.0);
        let x: Vec<f64> = (0..8192).map(|i| a * (2.0 * PI * f0 * i as f64 / fs).sin()).collect();
        let p = welch(&x, fs, &WelchConfig::default()).unwrap();
        assert_relative_eq!(p.values[20], 7.68, max_relative = 1e-9);
        assert_relative_eq!(p.values.iter().sum::<f64>() * fs / 256.0, 4.5, max_relative = 1e-9);
        // Flat-top: an off-bin sine's amplitude from the peak bin of the *power spectrum*
        // (density × ENBW in Hz = density × fs Σw²/(Σw)²) is within the flat-top's 0.01 dB
        // scalloping (F. J. Harris 1978, from memory: verify; checked here at 0.2 %).
        let f1 = 20.37 * fs / 256.0;
        let x: Vec<f64> = (0..8192).map(|i| a * (2.0 * PI * f1 * i as f64 / fs + 0.3).sin()).collect();
        let cfg = WelchConfig::default().with_window(Window::FlatTop);
        let p = welch(&x, fs, &cfg).unwrap();
        let w = Window::FlatTop.weights(256).unwrap();
        let (s1, s2): (f64, f64) = (w.iter().sum(), w.iter().map(|v| v * v).sum());
        let kmax = (0..p.values.len()).max_by(|&i, &j| p.values[i].total_cmp(&p.values[j])).unwrap();
        let power = p.values[kmax] * fs * s2 / (s1 * s1);
        let amp = (2.0 * power).sqrt();
        assert!((amp / a - 1.0).abs() < 2e-3, "flat-top amplitude {amp}");
    }

    #[test]
    fn matches_naive_dft_definition_hann_half_overlap() {
        // Textbook definition (docs/references.md#s12): P_k = c_k/(fs Σw²)·mean|Σ w x e^{-2πikn/N}|².
        let x = noise(40, 1.0, 3);
        let fs = 8.0;
        let n = 8;
        let cfg = WelchConfig::new(n);
        let p = welch(&x, fs, &cfg).unwrap();
        let w: Vec<f64> = (0..n).map(|i| 0.5 - 0.5 * (2.0 * PI * i as f64 / n as f64).cos()).collect();
        let s2: f64 = w.iter().map(|v| v * v).sum();
        let starts: Vec<usize> = (0..).map(|s| s * 4).take_while(|s| s + n <= x.len()).collect();
        assert_eq!(p.n_segments, starts.len());
        for k in 0..=n / 2 {
            let mut acc = 0.0;
            for &s in &starts {
                let seg = &x[s..s + n];
                let m = seg.iter().sum::<f64>() / n as f64;
                let (mut re, mut im) = (0.0, 0.0);
                for (j, v) in seg.iter().enumerate() {
                    let ph = -2.0 * PI * (k * j) as f64 / n as f64;
                    re += w[j] * (v - m) * ph.cos();
                    im += w[j] * (v - m) * ph.sin();
                }
                acc += re * re + im * im;
            }
            let c = if k == 0 || k == n / 2 { 1.0 } else { 2.0 };
            let expected = c * acc / starts.len() as f64 / (fs * s2);
            assert_relative_eq!(p.values[k], expected, max_relative = 1e-12, epsilon = 1e-300);
            assert_relative_eq!(p.freq_hz[k], k as f64 * fs / n as f64);
        }
    }

    #[test]
    fn even_split_is_realfft_bit_for_bit_and_power_pass_equals_it() {
        // The even-length path (complex FFT of the pairs, then the split) against realfft's
        // transform of the same windowed samples, and the fused power pass against the squares
        // of that spectrum: equal to the last bit, for n ≡ 0 and 2 (mod 4) and odd n.
        // The probabilistic PSD's taper (flat over 80 %) also checks that skipping the weights
        // equal to 1 changes nothing.
        let tapered = [(1000usize, true), (4096, true), (1001, true)];
        let plain = [2usize, 6, 8, 10, 1000, 1002, 4096, 7, 1001].map(|n| (n, false));
        for (n, taper) in plain.into_iter().chain(tapered) {
            let x = noise(n, 1.0, n as u64 + 40);
            let w = if taper {
                super::super::probabilistic::cosine_taper_20(n)
            } else {
                Window::Hann.weights(n).unwrap()
            };
            let cfg =
                WelchConfig::new(n).with_detrend(Detrend::Linear).with_window(Window::Custom(w.clone()));
            let mut eng = SegmentEngine::new(&cfg).unwrap();
            if taper {
                assert_eq!(eng.flat.1 - eng.flat.0, w.iter().filter(|&&v| v == 1.0).count());
            }
            let got = eng.transform_scaled(&x, 0.5).unwrap().to_vec();
            // The same windowed input (every weight applied) through realfft.
            let mut input = vec![0.0; n];
            let t = trend_sums(Detrend::Linear, &x, 0.5);
            window_detrended(Detrend::Linear, &x, 0.5, t, &w, (0, 0), &mut input);
            let fft = RealFftPlanner::<f64>::new().plan_fft_forward(n);
            let mut want = fft.make_output_vec();
            fft.process(&mut input, &mut want).unwrap();
            let bits =
                |v: &[Complex64]| v.iter().map(|c| (c.re.to_bits(), c.im.to_bits())).collect::<Vec<_>>();
            assert_eq!(bits(&got), bits(&want), "n = {n}");
            let mut direct = vec![1.0; n / 2 + 1];
            add_power(&mut direct, &got);
            let mut fused = vec![1.0; n / 2 + 1];
            eng.add_segment_power(&x, 0.5, &mut fused).unwrap();
            let b = |v: &[f64]| v.iter().map(|c| c.to_bits()).collect::<Vec<_>>();
            assert_eq!(b(&fused), b(&direct), "n = {n}");
            // A fork gives the same.
            let mut again = vec![1.0; n / 2 + 1];
            eng.fork().add_segment_power(&x, 0.5, &mut again).unwrap();
            assert_eq!(b(&again), b(&direct), "n = {n}");
        }
    }

    #[test]
    fn linear_detrend_matches_the_least_squares_line() {
        // Linear detrending as scipy.signal.detrend(type='linear'): the least-squares line is
        // removed, so (i) a pure line leaves zeros and (ii) the periodogram matches the direct
        // DFT of w·(x − a − b·t), a and b from the normal equations. Lengths not a multiple of
        // the eight partial sums exercise the tail.
        for n in [13usize, 64, 1001] {
            let x = noise(3 * n, 1.0, n as u64);
            let cfg = WelchConfig::new(n).with_noverlap(n / 3).with_detrend(Detrend::Linear);
            let mut eng = SegmentEngine::new(&cfg).unwrap();
            let line: Vec<f64> = (0..n).map(|i| 1e5 - 3.25 * i as f64).collect();
            let spec = eng.transform(&line).unwrap();
            // Left: rounding of the 1e5-sized samples, against a spectrum of ~1e5·n without it.
            assert!(spec.iter().all(|c| c.norm() < 1e-12 * 1e5 * n as f64), "n = {n}");
            let p = welch(&x, 1.0, &cfg).unwrap();
            let w = Window::Hann.weights(n).unwrap();
            let s2: f64 = w.iter().map(|v| v * v).sum();
            let step = n - n / 3;
            let starts: Vec<usize> = (0..).map(|s| s * step).take_while(|s| s + n <= x.len()).collect();
            for k in [0, 1, n / 4, n / 2] {
                let mut acc = 0.0;
                for &s in &starts {
                    let seg = &x[s..s + n];
                    let t: Vec<f64> = (0..n).map(|i| i as f64).collect();
                    let (st, sx) = (t.iter().sum::<f64>(), seg.iter().sum::<f64>());
                    let stt: f64 = t.iter().map(|v| v * v).sum();
                    let stx: f64 = t.iter().zip(seg).map(|(a, b)| a * b).sum();
                    let nf = n as f64;
                    let b = (nf * stx - st * sx) / (nf * stt - st * st);
                    let a = (sx - b * st) / nf;
                    let (mut re, mut im) = (0.0, 0.0);
                    for (j, v) in seg.iter().enumerate() {
                        let ph = -2.0 * PI * (k * j) as f64 / n as f64;
                        let y = w[j] * (v - a - b * j as f64);
                        re += y * ph.cos();
                        im += y * ph.sin();
                    }
                    acc += re * re + im * im;
                }
                let c = if k == 0 || (n % 2 == 0 && k == n / 2) { 1.0 } else { 2.0 };
                let expected = c * acc / starts.len() as f64 / s2;
                assert_relative_eq!(p.values[k], expected, max_relative = 1e-10, epsilon = 1e-18);
            }
        }
    }

    #[test]
    fn streaming_equals_one_shot() {
        let n = 300_001;
        let axes = [noise(n, 1.0, 11), noise(n, 0.5, 12), noise(n, 2.0, 13)];
        let cfg = WelchConfig::new(1000).with_noverlap(300).with_detrend(Detrend::Linear);
        let fs = 250.0;
        let oneshot: Vec<WelchPsd> = axes.iter().map(|x| welch(x, fs, &cfg).unwrap()).collect();
        let check = |got: &[WelchPsd]| {
            for (g, o) in got.iter().zip(&oneshot) {
                assert_eq!(g.n_segments, o.n_segments);
                for (a, b) in g.values.iter().zip(&o.values) {
                    assert_relative_eq!(*a, *b, max_relative = 1e-12);
                }
            }
        };
        // Per-axis pushes in chunks of 7 and 10⁵.
        for chunk in [7usize, 100_000] {
            let mut s = WelchStream::new(fs, &cfg, 3).unwrap();
            for i in (0..n).step_by(chunk) {
                let e = (i + chunk).min(n);
                s.push_axes(&[&axes[0][i..e], &axes[1][i..e], &axes[2][i..e]]).unwrap();
            }
            check(&s.finish().unwrap());
        }
        // Interleaved in chunks of 1 sample (and of 5, ending mid-frame).
        let inter: Vec<f64> = (0..n).flat_map(|i| [axes[0][i], axes[1][i], axes[2][i]]).collect();
        for chunk in [1usize, 5] {
            let mut s = WelchStream::new(fs, &cfg, 3).unwrap();
            for c in inter.chunks(chunk) {
                s.push_interleaved(c).unwrap();
            }
            check(&s.finish().unwrap());
        }
        // Single axis, chunk 1.
        let mut s = WelchStream::new(fs, &cfg, 1).unwrap();
        for v in &axes[0] {
            s.push(std::slice::from_ref(v)).unwrap();
        }
        check(&s.finish().unwrap()[..1]);
    }

    #[test]
    fn stream_rejects_nan_and_short_data_and_unequal_axes() {
        let cfg = WelchConfig::new(16);
        let mut s = WelchStream::new(10.0, &cfg, 2).unwrap();
        s.push_interleaved(&[1.0, 2.0, 3.0]).unwrap();
        // Next value goes to axis 1 (sample 1), then axis 0 sample 2.
        let e = s.push_interleaved(&[0.0, f64::NAN]).unwrap_err();
        assert!(e.to_string().contains("axis 0, sample index 2"), "{e}");
        assert_eq!(s.n_samples(0), 2); // rejected chunk left the stream unchanged
        let e = s.finish().unwrap_err();
        assert!(e.to_string().contains("axis 1 received 1 samples"), "{e}");
        s.push_axis(1, &[0.0]).unwrap();
        let e = s.finish().unwrap_err();
        assert!(e.to_string().contains("16 exceeds the length 2"), "{e}");
        assert!(WelchStream::new(10.0, &cfg, 4).unwrap_err().to_string().contains("got 4"));
        assert!(WelchStream::new(0.0, &cfg, 1).unwrap_err().to_string().contains("fs"));
    }

    #[test]
    fn csd_of_self_is_welch_and_coherence_of_filtered_is_one() {
        let x = noise(20_000, 1.0, 5);
        let fs = 50.0;
        let cfg = WelchConfig::new(512);
        let p = welch(&x, fs, &cfg).unwrap();
        let c = csd(&x, &x, fs, &cfg).unwrap();
        for (a, b) in c.values.iter().zip(&p.values) {
            assert_relative_eq!(a.re, *b, max_relative = 1e-13, epsilon = 1e-300);
            assert!(a.im.abs() <= 1e-13 * b.abs());
        }
        // y = x filtered by a 3-tap FIR (linear, time invariant): coherence ≈ 1 except where
        // the filter has a zero; the FIR [1, 0.5, 0.25] has none on the unit circle.
        let y: Vec<f64> = (0..x.len())
            .map(|i| {
                x[i] + if i >= 1 { 0.5 * x[i - 1] } else { 0.0 } + if i >= 2 { 0.25 * x[i - 2] } else { 0.0 }
            })
            .collect();
        let coh = coherence(&x, &y, fs, &cfg).unwrap();
        for v in &coh.values[1..] {
            assert!(*v > 0.99 && *v <= 1.0 + 1e-12, "{v}");
        }
        // Independent noise: low coherence.
        let z = noise(20_000, 1.0, 99);
        let coh = coherence(&x, &z, fs, &cfg).unwrap();
        let mean = coh.values[1..].iter().sum::<f64>() / (coh.values.len() - 1) as f64;
        assert!(mean < 0.05, "{mean}");
    }

    #[test]
    fn bad_input_errors_name_the_value() {
        let x = noise(100, 1.0, 1);
        let cfg = WelchConfig::new(32);
        for fs in [0.0, -1.0, f64::NAN] {
            let e = welch(&x, fs, &cfg).unwrap_err();
            assert!(matches!(e, Error::InvalidArgument { ref name, .. } if name == "fs"), "{e}");
            assert!(e.to_string().contains(&format!("{fs}")), "{e}");
        }
        let e = welch(&x, 1.0, &WelchConfig::new(128)).unwrap_err();
        assert!(e.to_string().contains("128 exceeds the length 100"), "{e}");
        assert!(welch(&x, 1.0, &WelchConfig::new(0)).unwrap_err().to_string().contains("nperseg"));
        let e = welch(&x, 1.0, &WelchConfig::new(32).with_noverlap(32)).unwrap_err();
        assert!(matches!(e, Error::InvalidArgument { ref name, .. } if name == "noverlap"), "{e}");
        assert!(e.to_string().contains("got 32"));
        let mut y = x.clone();
        y[57] = f64::NAN;
        let e = welch(&y, 1.0, &cfg).unwrap_err();
        assert!(e.to_string().contains("index 57"), "{e}");
        let e = csd(&x, &x[..99], 1.0, &cfg).unwrap_err();
        assert!(matches!(e, Error::ShapeMismatch { expected: 100, got: 99, .. }), "{e}");
    }

    #[test]
    fn to_psd_drops_dc() {
        let x = noise(1000, 1.0, 2);
        let p = welch(&x, 10.0, &WelchConfig::new(100)).unwrap();
        let q = p.to_psd(Quantity::Acceleration).unwrap();
        assert_eq!(q.len(), 50);
        assert_eq!(q.freq_hz()[0], 0.1);
        assert_eq!(q.values(), &p.values[1..]);
        let empty = WelchPsd { freq_hz: vec![], values: vec![], n_segments: 0 };
        assert!(matches!(empty.to_psd(Quantity::Velocity), Err(Error::InvalidGrid { .. })));
    }
}

//! Power spectral densities: the [`Psd`] type, Welch estimation (one-shot and streaming),
//! cross-spectra and coherence, time-resolved interval statistics, reference ground spectra
//! and vibration criterion curves.
//!
//! All PSDs are one-sided per Hz (mean square = ∫₀^∞ S(f) df).
//!
//! ```
//! use stillsky::FreqGrid;
//! use stillsky::spectrum::{welch, Quantity, ReferenceGround, WelchConfig, WelchStream, BandWidth};
//!
//! // Welch estimate of a recorded acceleration (scipy.signal.welch defaults: Hann, 256, 50 %).
//! let fs = 200.0;
//! let x: Vec<f64> = (0..20_000).map(|i| 1e-4 * (0.7 * i as f64).sin()).collect();
//! let est = welch(&x, fs, &WelchConfig::default())?;
//! let acc = est.to_psd(Quantity::Acceleration)?; // DC bin dropped
//! let vel = acc.to(Quantity::Velocity)?;          // ÷ (2πf)²
//! let bands = vel.octave_band_rms(BandWidth::ThirdOctave);
//! assert_eq!(bands.centre_hz.len(), bands.rms.len());
//!
//! // The same estimate from chunks, with memory bounded by one segment.
//! let mut stream = WelchStream::new(fs, &WelchConfig::default(), 1)?;
//! for chunk in x.chunks(1000) {
//!     stream.push(chunk)?;
//! }
//! assert_eq!(stream.finish()?[0].values, est.values);
//!
//! // Peterson's low-noise model on 0.1–10 Hz.
//! let nlnm = ReferenceGround::Nlnm.psd(&FreqGrid::log(0.1, 10.0, 200)?)?;
//! assert!(nlnm.rms() < 1e-7);
//! # Ok::<(), stillsky::Error>(())
//! ```

pub mod interval;
pub mod probabilistic;
pub mod psd;
pub mod psd_file;
pub mod reference;
pub mod transfer;
pub mod welch;
pub mod window;

pub use interval::{BandRmsStats, IntervalStream, band_rms_distribution, interval_psds, percentile_linear};
pub use probabilistic::{HourMap, PpsdBlock, PpsdConfig, ProbabilisticPsd, probabilistic_psd_axes};
pub use psd::{BandLevels, BandWidth, Extrapolate, Psd, Quantity};
pub use psd_file::MAX_PSD_FILE_BYTES;
pub use reference::{CriterionCurve, CriterionResult, ReferenceGround};
pub use transfer::{TransferEstimate, transfer_estimate};
pub use welch::{
    Average, Coherence, CrossSpectrum, Detrend, WelchConfig, WelchPsd, WelchStream, coherence, csd, welch,
};
pub use window::Window;

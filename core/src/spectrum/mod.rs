//! Power spectral densities: the [`Psd`] type, Welch estimation (one-shot and streaming),
//! cross-spectra and coherence, time-resolved interval statistics, reference ground spectra
//! and vibration criterion curves.
//!
//! All PSDs are one-sided per Hz (mean square = ∫₀^∞ S(f) df).

pub mod interval;
pub mod psd;
pub mod psd_file;
pub mod reference;
pub mod welch;
pub mod window;

pub use interval::{BandRmsStats, IntervalStream, band_rms_distribution, interval_psds, percentile_linear};
pub use psd::{BandLevels, BandWidth, Extrapolate, Psd, Quantity};
pub use reference::{CriterionCurve, CriterionResult, ReferenceGround};
pub use welch::{
    Average, Coherence, CrossSpectrum, Detrend, WelchConfig, WelchPsd, WelchStream, coherence, csd, welch,
};
pub use window::Window;

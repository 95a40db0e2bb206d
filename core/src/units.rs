//! Angle and profile constants shared by the image, budget and transient modules.

/// Arcseconds per radian (180 × 3600 / π).
pub const ARCSEC_PER_RAD: f64 = 206_264.806_247_096_36;

/// FWHM of a Gaussian per unit σ: 2√(2 ln 2).
pub const FWHM_PER_SIGMA: f64 = 2.354_820_045_030_949_3;

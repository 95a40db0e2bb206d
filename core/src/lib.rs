//! # stillsky: will the star stay inside one pixel?
//!
//! A library for the image motion of telescope rigs (mount, tripod or pier, footing, isolator
//! pads, soil) driven by ground vibration and wind. Rigs are linear multi-degree-of-freedom
//! structures with complex (lossy) stiffness; responses are reported in the sensor plane in
//! micrometres, arcseconds and pixels.
//!
//! ## Conventions (hold everywhere)
//! - SI units inside: m, kg, s, N, rad, Pa. Frequencies are Hz at every API; ω = 2πf inside.
//!   Arguments carry their unit in the name where it is not SI (`focal_length_mm`, `pixel_um`).
//! - Harmonic convention e^{+iωt}. Complex stiffness k* = k′(ω)(1 + iη(ω)); a viscous damper
//!   adds iωc. Dynamic stiffness Z(ω) = K*(ω) + iωC − ω²M.
//! - PSDs are one-sided, per Hz: mean square = ∫₀^∞ S(f) df. RMS integrals use the trapezoid
//!   rule on the given grid.
//! - Frequency grids are strictly increasing, finite and > 0. Spectra are interpolated log–log
//!   and never extrapolated silently.
//! - Axes: x east, y north, z up. Azimuth from north through east; altitude above the horizon.
//!   Rotational DOFs are small rotations about a body's centre of gravity (right-hand rule). A
//!   point at offset r from the CG moves as u_p = u + θ × r; a force F there gives moment r × F.
//! - Base excitation moves every ground attachment together as a rigid ground: translations
//!   x, y, z and small rotations rx, ry, rz about the origin. Ground rotations follow from the
//!   translation PSDs and a surface-wave phase velocity ([`surface_waves`]) where one is known.
//!   Transmissibility = absolute response / ground motion.
//! - Only rotation of the optics moves a star's image (a source at infinity). A small rotation θ
//!   turns the line of sight â by θ × â; `image_x` is its component along increasing azimuth,
//!   `image_y` along increasing altitude. arcsec = rad × 206264.806; µm on the sensor =
//!   f_mm × 1000 × rad; plate scale ″/px = 206.264806 × pixel_um / f_mm.
//!
//! ## Modules
//! - [`grid`]: validated frequency grids.
//! - [`material`], [`section`]: named materials (with sources) and tube/rod sections.
//! - [`stiffness`]: complex stiffness models and series/parallel combinators.
//! - [`soil`]: impedance of a rigid circular contact on an elastic half-space; soil presets.
//! - [`surface_waves`]: ground tilt and twist from surface waves; Rayleigh-wave speed;
//!   coherency between points.
//! - [`assembly`]: bodies, nodes, connectors and beams → mass, damping, stiffness matrices.
//! - [`model`]: the assembled [`model::Model`] with named inputs and outputs.
//! - [`frf`]: frequency response by direct complex solve per frequency (or modal superposition
//!   where exact), and [`frf::variants`] for many variants that each replace a few springs.
//! - [`modes`]: natural frequencies, mode shapes, modal damping and participation.
//! - [`rig`]: builders for payloads, mounts (alt-azimuth, German equatorial), tripods, pads,
//!   piers, floors.
//! - [`sky`]: hour angle and declination to altitude and azimuth; RA and Dec axes on the sky.
//! - [`spectrum`], [`wind`]: PSDs, Welch estimation, reference ground spectra, wind spectra.
//! - [`response`], [`image`]: response PSDs with per-mode shares; image motion in arcsec, µm, px.
//! - [`guider`]: the sampled-data guide loop (exposure, cadence, gains, latency, hold, aliasing).
//! - [`skymap`]: image RMS over the sky (altitude × azimuth or hour angle × declination).
//! - [`budget`], [`peak`]: the star image budget (FWHM, elongation); the expected peak excursion.
//! - [`transient`]: time histories by FFT convolution (gusts, steps, random realisations) and a
//!   Newmark check.
//! - [`identify`], [`checks`]: tap-test identification; static safety checks.
//! - [`pier_table`]: pier sizing table (tilt under a top load, rocking, bending and torsion
//!   frequencies) from cantilever formulas and from the beam model.
//! - [`people`]: a person on the deck: the walking force (harmonic load factors) as a time
//!   history and a line spectrum, and the static tilt of a person standing at a distance.
//! - [`distance_attenuation`]: ground vibration carried from one distance from its source to
//!   another (Bornitz spreading and soil damping), a rough estimate.
//! - [`tonal`]: tonal disturbance lines (a machine near the rig) carried to the image at their
//!   own frequencies.
//! - [`monitor`]: streaming estimate of image motion from live accelerometer samples.
//! - [`schema`]: the model file (TOML): both layers, reading, expansion, writing.
//! - [`io`]: text and TOML reading, recordings, PSD files, atomic writes.
//! - [`batch`]: isolator catalogues, the isolator sweep, ground sources and the one-model report.
#![forbid(unsafe_code)]
#![cfg_attr(not(test), deny(clippy::unwrap_used, clippy::expect_used, clippy::panic))]

pub mod assembly;
pub mod batch;
pub mod budget;
pub mod checks;
pub mod distance_attenuation;
pub mod error;
pub mod footing_impedance;
pub mod frf;
pub mod grid;
pub mod guider;
pub mod identify;
pub mod image;
pub mod io;
pub mod linalg;
pub mod material;
pub mod model;
pub mod modes;
pub mod monitor;
pub mod peak;
pub mod people;
pub mod pier_table;
pub mod quiet_hours;
pub mod response;
pub mod rig;
pub mod schema;
pub mod section;
pub mod sensor_response;
pub mod sky;
pub mod skymap;
pub mod soil;
pub mod spectrum;
pub mod statics;
pub mod stiffness;
pub mod surface_waves;
#[cfg(test)]
mod test_signals;
pub mod tonal;
pub mod transient;
pub mod units;
pub mod wind;

pub use error::{Error, Result};
pub use grid::FreqGrid;
pub use num_complex::Complex64;

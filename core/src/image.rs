//! Image motion on the sensor plane: arcsec, µm and pixels; probability of leaving a radius;
//! exposure split, guiding, the star image budget and the expected peak excursion.
//!
//! Conventions (docs/references.md#s11):
//! - arcsec = rad × 206264.806; µm on the sensor = f_mm × 1000 × rad; plate scale
//!   ″/px = 206.264806 × pixel_um / f_mm.
//! - Motion is zero-mean Gaussian. Isotropic 2-D motion with per-axis σ leaves a radius R with
//!   probability exp(−R²/2σ²) (Rayleigh); the anisotropic, correlated case is integrated
//!   numerically over angle ([`p_outside`]).
//! - Blur: FWHM = 2.35482 σ per axis (of that axis' σ), added in quadrature to the seeing FWHM
//!   (exact for Gaussian profiles only; real seeing is closer to Moffat — common practice). The
//!   full budget (diffraction, pixel, guiding, smear, wander) is [`crate::budget`].
//! - Exposure T (random start): centroid wander has weight sinc²(πfT), smear within the frame
//!   1 − sinc²(πfT) (boxcar average; Bendat & Piersol, *Random Data*, from memory: verify).
//! - Guiding: the sampled-data loop of [`crate::guider`] (guide exposure, cadence, gains,
//!   latency, zero-order hold, aliasing) turns each PSD into the time-averaged residual PSD; the
//!   science exposure's start is taken as random against the guide clock. [`Guiding`] is the
//!   integrator-only shorthand (guide exposure = cadence, latency 0).
//! - Peak: the expected largest |excursion| per axis within an exposure, Davenport's peak factor
//!   ([`crate::peak`]).

use crate::budget::{BudgetInputs, StarBudget, star_budget};
use crate::error::{Error, Result, require_positive};
use crate::grid::{FreqGrid, trapezoid};
use crate::guider::GuideLoop;
use crate::model::Model;
use crate::peak::PeakExcursion;
use crate::response::{Disturbances, response_psd};
use crate::spectrum::BandWidth;
use serde::Serialize;
use std::f64::consts::PI;

pub use crate::units::{ARCSEC_PER_RAD, FWHM_PER_SIGMA};

/// Plate scale (arcsec per pixel).
pub fn plate_scale_arcsec_per_px(pixel_um: f64, focal_length_mm: f64) -> f64 {
    ARCSEC_PER_RAD * pixel_um / (focal_length_mm * 1000.0)
}

/// P(r > R) for isotropic 2-D Gaussian motion with per-axis σ (Rayleigh).
pub fn p_outside_isotropic(radius: f64, sigma: f64) -> f64 {
    if sigma <= 0.0 {
        return if radius < 0.0 { 1.0 } else { 0.0 };
    }
    (-radius * radius / (2.0 * sigma * sigma)).exp()
}

/// P(r > R) for zero-mean 2-D Gaussian motion with variances `var_x`, `var_y` and covariance
/// `cov_xy`. With principal variances a², b² the probability outside is
/// (1/2πab) ∫₀^{2π} e^{−R²q(θ)/2}/q(θ) dθ, q = cos²θ/a² + sin²θ/b² (the integrand of the
/// probability inside, (1 − e^{−R²q/2})/q, less its R = 0 value, whose integral is exactly 2πab),
/// integrated by the trapezoid rule on 512 angles (spectrally accurate for a smooth periodic
/// integrand). Summing the outside directly keeps small probabilities free of the rounding
/// noise of 1 − P(inside).
pub fn p_outside(radius: f64, var_x: f64, var_y: f64, cov_xy: f64) -> f64 {
    let tr = var_x + var_y;
    let det = (var_x * var_y - cov_xy * cov_xy).max(0.0);
    let disc = (0.25 * (var_x - var_y).powi(2) + cov_xy * cov_xy).sqrt();
    let (a2, b2) = (0.5 * tr + disc, (0.5 * tr - disc).max(0.0));
    if a2 <= 0.0 {
        return 0.0;
    }
    if b2 <= 1e-15 * a2 || det <= 0.0 {
        // Degenerate: motion along one line; P(|x| > R) = erfc(R / (a√2)).
        return erfc(radius / (2.0 * a2).sqrt());
    }
    let (a, b) = (a2.sqrt(), b2.sqrt());
    let m = 512;
    let mut acc = 0.0;
    for k in 0..m {
        let th = 2.0 * PI * k as f64 / m as f64;
        let q = th.cos().powi(2) / a2 + th.sin().powi(2) / b2;
        acc += (-radius * radius * q / 2.0).exp() / q;
    }
    (acc * (2.0 * PI / m as f64) / (2.0 * PI * a * b)).clamp(0.0, 1.0)
}

/// Complementary error function (Numerical Recipes' erfcc rational approximation, relative
/// error < 1.2e-7; ample for a probability).
fn erfc(x: f64) -> f64 {
    let z = x.abs();
    let t = 1.0 / (1.0 + 0.5 * z);
    let r = t
        * (-z * z - 1.265_512_23
            + t * (1.000_023_68
                + t * (0.374_091_96
                    + t * (0.096_784_18
                        + t * (-0.186_288_06
                            + t * (0.278_868_07
                                + t * (-1.135_203_98
                                    + t * (1.488_515_87 + t * (-0.822_152_23 + t * 0.170_872_77)))))))))
            .exp();
    if x >= 0.0 { r } else { 2.0 - r }
}

/// sinc²(πfT) with sinc(u) = sin(u)/u.
pub fn sinc2(f_hz: f64, t_s: f64) -> f64 {
    let u = PI * f_hz * t_s;
    if u.abs() < 1e-8 { 1.0 } else { (u.sin() / u).powi(2) }
}

/// Guiding by a pure integrator (shorthand for [`GuideLoop::new`]): the guide exposure fills the
/// cadence and the latency is 0, so at the guide samples the loop is the classic integrator with
/// one frame of delay (the frame's own exposure), stable for 0 < g < 2. For a shorter guide
/// exposure, a latency or a proportional gain use [`ImageOptions::guide_loop`].
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Guiding {
    /// Guide exposure cadence T_g (s).
    pub cadence_s: f64,
    /// Integrator gain g in (0, 2).
    pub gain: f64,
}

impl From<Guiding> for GuideLoop {
    fn from(g: Guiding) -> GuideLoop {
        GuideLoop::new(g.cadence_s, g.gain)
    }
}

/// Options of an image-motion evaluation.
#[derive(Debug, Clone, PartialEq, Default)]
#[non_exhaustive]
pub struct ImageOptions {
    /// Split into centroid wander and smear for exposures of this length (s).
    pub exposure_s: Option<f64>,
    /// Guide with a pure integrator (exposure = cadence, latency 0) before statistics.
    pub guide: Option<Guiding>,
    /// Guide with a full loop (guide exposure, latency, proportional gain); give this or `guide`.
    pub guide_loop: Option<GuideLoop>,
    /// Radius for the probability of leaving it, in pixels (default ½ pixel).
    pub radius_px: Option<f64>,
    /// Seeing FWHM (arcsec); defaults to the model's optics.
    pub seeing_fwhm_arcsec: Option<f64>,
    /// Compute per-mode shares (costs one solve per mode row; default on).
    pub skip_mode_shares: bool,
}

impl ImageOptions {
    /// Set the exposure length (s).
    pub fn exposure(mut self, t_s: f64) -> Self {
        self.exposure_s = Some(t_s);
        self
    }
    /// Set guiding by a pure integrator.
    pub fn guiding(mut self, g: Guiding) -> Self {
        self.guide = Some(g);
        self
    }
    /// Set guiding by a full loop.
    pub fn guiding_loop(mut self, g: GuideLoop) -> Self {
        self.guide_loop = Some(g);
        self
    }

    /// The guide loop to apply, validated (stability included).
    pub fn effective_guide(&self) -> Result<Option<GuideLoop>> {
        let g = match (self.guide, self.guide_loop) {
            (Some(_), Some(_)) => {
                return Err(Error::invalid(
                    "guide",
                    "give either guide (integrator) or guide_loop, not both",
                ));
            }
            (Some(g), None) => Some(GuideLoop::from(g)),
            (None, g) => g,
        };
        if let Some(g) = &g {
            g.validate()?;
        }
        Ok(g)
    }
}

/// The motion without the guider and what the sampler folded in, when a guider is applied.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GuidedMotion {
    /// Guide Nyquist frequency 1/(2T_g) (Hz).
    pub nyquist_hz: f64,
    /// PSD of image_x and image_y without the guider (arcsec²/Hz).
    pub unguided_psd_arcsec2: [Vec<f64>; 2],
    /// Co-spectrum without the guider (arcsec²/Hz).
    pub unguided_co_psd_arcsec2: Vec<f64>,
    /// RMS without the guider per axis and radial (arcsec).
    pub unguided_per_axis_arcsec: [f64; 2],
    pub unguided_rms_arcsec: f64,
    /// The aliased part of the guided PSD per axis (arcsec²/Hz) and its RMS per axis (arcsec).
    pub aliased_psd_arcsec2: [Vec<f64>; 2],
    pub aliased_per_axis_arcsec: [f64; 2],
}

/// One mode's share of the image mean square.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ModeShare {
    /// "mode 3" or "quasi-static".
    pub label: String,
    pub frequency_hz: f64,
    /// Fraction of the radial mean square (sums to 1 over all entries).
    pub share: f64,
}

/// Wander/smear split for an exposure.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ExposureSplit {
    pub exposure_s: f64,
    /// RMS centroid wander between exposures, radial (arcsec).
    pub wander_rms_arcsec: f64,
    /// RMS smear within one exposure, radial (arcsec).
    pub smear_rms_arcsec: f64,
}

/// Image motion of a model under given disturbances.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ImageMotion {
    pub freq_hz: Vec<f64>,
    /// PSD of image_x and image_y on the sky (arcsec²/Hz), after guiding if requested.
    pub psd_arcsec2: [Vec<f64>; 2],
    /// Co-spectrum of image_x with image_y (arcsec²/Hz).
    pub co_psd_arcsec2: Vec<f64>,
    /// Cumulative RMS from low frequency, per axis (arcsec).
    pub cumulative_rms_arcsec: [Vec<f64>; 2],
    pub per_axis_arcsec: [f64; 2],
    /// Radial RMS √(σx² + σy²) (arcsec).
    pub rms_arcsec: f64,
    pub rms_um: f64,
    pub rms_px: f64,
    pub plate_scale_arcsec_per_px: f64,
    pub focal_length_mm: f64,
    pub pixel_um: f64,
    /// Probability that the image is outside `radius_px` at a random instant.
    pub p_outside: f64,
    pub radius_px: f64,
    /// Covariance (arcsec²): [var_x, var_y, cov_xy].
    pub covariance_arcsec2: [f64; 3],
    pub seeing_fwhm_arcsec: Option<f64>,
    /// Blur FWHM of all the motion per axis, 2.35482 σ of that axis (arcsec; no exposure split).
    pub blur_fwhm_arcsec: [f64; 2],
    /// Seeing and that blur in quadrature, per axis (arcsec), when seeing is known. The full
    /// star size (diffraction, pixel, exposure split) is in `budget`.
    pub total_fwhm_arcsec: Option<[f64; 2]>,
    /// The star image budget: each source's FWHM, the star's FWHM along x and y, elongation.
    pub budget: StarBudget,
    /// Expected largest |excursion| per axis within one exposure (with an exposure length).
    pub peak: Option<PeakExcursion>,
    pub mode_share: Vec<ModeShare>,
    /// Share of the mean square per disturbance input.
    pub input_share: Vec<(String, f64)>,
    pub exposure: Option<ExposureSplit>,
    /// The guide loop applied (the PSDs and statistics above are after guiding).
    pub guide: Option<GuideLoop>,
    /// Unguided PSDs and the aliased part, when guided.
    pub guiding: Option<GuidedMotion>,
    /// The third-octave band (centre Hz) holding the largest part of the mean square, and its share.
    pub dominant_band_hz: f64,
    pub dominant_band_share: f64,
    /// Notes on coverage or assumptions.
    pub notes: Vec<String>,
}

fn cumulative(f: &[f64], y: &[f64]) -> Vec<f64> {
    crate::grid::cumulative_from_low(f, y).into_iter().map(f64::sqrt).collect()
}

impl ImageMotion {
    /// P(outside radius) for another radius in pixels.
    pub fn p_outside_px(&self, radius_px: f64) -> f64 {
        let s = self.plate_scale_arcsec_per_px;
        let [vx, vy, c] = self.covariance_arcsec2;
        p_outside(radius_px * s, vx, vy, c)
    }

    /// The mode with the largest share.
    pub fn dominant_mode(&self) -> Option<&ModeShare> {
        self.mode_share.iter().max_by(|a, b| a.share.total_cmp(&b.share))
    }
}

impl Model {
    /// Image motion under `disturbances` on `grid` (see module docs for the statistics).
    pub fn image_motion(
        &self,
        grid: &FreqGrid,
        disturbances: &Disturbances,
        opts: &ImageOptions,
    ) -> Result<ImageMotion> {
        let optics = self
            .optics()
            .ok_or_else(|| Error::invalid("optics", "the model has no [optics] section"))?
            .clone();
        if let Some(t) = opts.exposure_s {
            require_positive("exposure_s", t)?;
        }
        let guide = opts.effective_guide()?;
        let radius_px = opts.radius_px.unwrap_or(0.5);
        require_positive("radius_px", radius_px)?;
        let r = response_psd(self, grid, disturbances, &["image_x", "image_y"], !opts.skip_mode_shares)?;
        let f = &r.freq_hz;
        let a2 = ARCSEC_PER_RAD * ARCSEC_PER_RAD;
        // Every spectrum that enters a statistic, on the sky (arcsec²/Hz): the two axes, their
        // co-spectrum, each input's part and each mode's part; guided together when guiding.
        let mut parts: Vec<Vec<f64>> = vec![r.psd[0].clone(), r.psd[1].clone(), r.co_spectra[0].2.clone()];
        let ni = r.inputs.len();
        for ax in 0..2 {
            parts.extend(r.by_input[ax].iter().cloned());
        }
        let nm = r.by_mode.as_ref().map_or(0, |bm| bm[0].len());
        if let Some(bm) = &r.by_mode {
            for ax in 0..2 {
                parts.extend(bm[ax].iter().cloned());
            }
        }
        parts.iter_mut().for_each(|p| p.iter_mut().for_each(|v| *v *= a2));
        let mut guided_motion = None;
        if let Some(g) = &guide {
            let refs: Vec<&[f64]> = parts.iter().map(Vec::as_slice).collect();
            let res = g.residual(f, &refs)?;
            let rms = |p: &[f64]| trapezoid(f, p).sqrt();
            let unguided_per_axis = [rms(&parts[0]), rms(&parts[1])];
            guided_motion = Some(GuidedMotion {
                nyquist_hz: g.nyquist_hz(),
                unguided_per_axis_arcsec: unguided_per_axis,
                unguided_rms_arcsec: unguided_per_axis[0].hypot(unguided_per_axis[1]),
                aliased_per_axis_arcsec: [rms(&res[0].aliased), rms(&res[1].aliased)],
                aliased_psd_arcsec2: [res[0].aliased.clone(), res[1].aliased.clone()],
                unguided_psd_arcsec2: [parts[0].clone(), parts[1].clone()],
                unguided_co_psd_arcsec2: parts[2].clone(),
            });
            parts = res.into_iter().map(|p| p.total).collect();
        }
        let by_input_at = |ax: usize, i: usize| &parts[3 + ax * ni + i];
        let by_mode_at = |ax: usize, j: usize| &parts[3 + 2 * ni + ax * nm + j];
        let (px, py, co) = (parts[0].clone(), parts[1].clone(), parts[2].clone());
        let (vx, vy, cxy) = (trapezoid(f, &px), trapezoid(f, &py), trapezoid(f, &co));
        let total = vx + vy;
        let plate = optics.plate_scale_arcsec_per_px();
        let rms = total.sqrt();
        let um_per_arcsec = optics.focal_length_mm * 1000.0 / ARCSEC_PER_RAD;
        let seeing = opts.seeing_fwhm_arcsec.or(optics.seeing_fwhm_arcsec);
        if let Some(s) = seeing {
            crate::error::require_non_negative("seeing_fwhm_arcsec", s)?;
        }
        let blur = [FWHM_PER_SIGMA * vx.sqrt(), FWHM_PER_SIGMA * vy.sqrt()];
        let mode_share = match &r.by_mode {
            Some(_) if total > 0.0 => {
                let n = r.mode_frequency_hz.len();
                (0..=n)
                    .map(|j| {
                        let s = trapezoid(f, by_mode_at(0, j)) + trapezoid(f, by_mode_at(1, j));
                        ModeShare {
                            label: if j < n { format!("mode {}", j + 1) } else { "quasi-static".into() },
                            frequency_hz: if j < n { r.mode_frequency_hz[j] } else { 0.0 },
                            share: s / total,
                        }
                    })
                    .collect()
            }
            _ => Vec::new(),
        };
        let input_share = r
            .inputs
            .iter()
            .enumerate()
            .map(|(i, name)| {
                let s = trapezoid(f, by_input_at(0, i)) + trapezoid(f, by_input_at(1, i));
                (name.clone(), if total > 0.0 { s / total } else { 0.0 })
            })
            .collect();
        let budget = self.star_budget(f, [&px, &py, &co], plate, seeing, opts.exposure_s, guide.as_ref())?;
        let peak =
            opts.exposure_s.map(|t| PeakExcursion::from_psd(f, [&px, &py], [vx.sqrt(), vy.sqrt()], t, plate));
        let exposure = opts.exposure_s.map(|t| {
            let wx: Vec<f64> =
                f.iter().zip(px.iter().zip(&py)).map(|(&fh, (a, b))| (a + b) * sinc2(fh, t)).collect();
            let wander = trapezoid(f, &wx);
            ExposureSplit {
                exposure_s: t,
                wander_rms_arcsec: wander.sqrt(),
                smear_rms_arcsec: (total - wander).max(0.0).sqrt(),
            }
        });
        // Dominant third-octave band of the radial PSD.
        let radial: Vec<f64> = px.iter().zip(&py).map(|(a, b)| a + b).collect();
        let (mut best_c, mut best_s) = (f64::NAN, 0.0);
        let bw = BandWidth::ThirdOctave;
        let (k0, k1) = (bw.nearest_index(f[0]), bw.nearest_index(f[f.len() - 1]));
        for k in k0..=k1 {
            let (lo, hi) = bw.edges_hz(k);
            let s = band_integral(f, &radial, lo, hi);
            if s > best_s {
                best_s = s;
                best_c = bw.centre_hz(k);
            }
        }
        let mut notes = Vec::new();
        if let Some(nn) = disturbances.coverage_note(grid) {
            notes.push(nn);
        }
        Ok(ImageMotion {
            freq_hz: f.clone(),
            cumulative_rms_arcsec: [cumulative(f, &px), cumulative(f, &py)],
            psd_arcsec2: [px, py],
            co_psd_arcsec2: co,
            per_axis_arcsec: [vx.sqrt(), vy.sqrt()],
            rms_arcsec: rms,
            rms_um: rms * um_per_arcsec,
            rms_px: rms / plate,
            plate_scale_arcsec_per_px: plate,
            focal_length_mm: optics.focal_length_mm,
            pixel_um: optics.pixel_um,
            p_outside: p_outside(radius_px * plate, vx, vy, cxy),
            radius_px,
            covariance_arcsec2: [vx, vy, cxy],
            seeing_fwhm_arcsec: seeing,
            blur_fwhm_arcsec: blur,
            total_fwhm_arcsec: seeing.map(|s| [s.hypot(blur[0]), s.hypot(blur[1])]),
            budget,
            peak,
            mode_share,
            input_share,
            exposure,
            guide,
            guiding: guided_motion,
            dominant_band_hz: best_c,
            dominant_band_share: if total > 0.0 { best_s / total } else { 0.0 },
            notes,
        })
    }
}

impl Model {
    /// The star budget from the (guided) PSDs [x, y, co] (arcsec²/Hz) on `f`: the motion split
    /// into guiding residual (below the guide Nyquist frequency), smear and wander (module docs of
    /// [`crate::budget`]).
    fn star_budget(
        &self,
        f: &[f64],
        psd: [&[f64]; 3],
        plate: f64,
        seeing: Option<f64>,
        exposure_s: Option<f64>,
        guide: Option<&GuideLoop>,
    ) -> Result<StarBudget> {
        let optics =
            self.optics().ok_or_else(|| Error::invalid("optics", "the model has no [optics] section"))?;
        let (lo, hi) = (f[0], f[f.len() - 1]);
        let smear_w: Vec<f64> = f.iter().map(|&fh| exposure_s.map_or(1.0, |t| 1.0 - sinc2(fh, t))).collect();
        let cov = |w: &dyn Fn(usize) -> f64, a: f64, b: f64| -> [f64; 3] {
            psd.map(|p| {
                let y: Vec<f64> = p.iter().enumerate().map(|(k, v)| v * w(k)).collect();
                band_integral(f, &y, a, b)
            })
        };
        let smear = |k: usize| smear_w[k];
        let wander = |k: usize| 1.0 - smear_w[k];
        let split = guide.map_or(lo, |g| g.nyquist_hz().clamp(lo, hi));
        star_budget(&BudgetInputs {
            seeing_fwhm_arcsec: seeing,
            aperture_mm: optics.aperture_mm,
            wavelength_nm: optics.wavelength_nm,
            plate_scale_arcsec_per_px: plate,
            exposure_s,
            guide_nyquist_hz: guide.map(GuideLoop::nyquist_hz),
            guiding: guide.map(|_| cov(&smear, lo, split)),
            smear: cov(&smear, split, hi),
            wander: if exposure_s.is_some() { cov(&wander, lo, hi) } else { [0.0; 3] },
        })
    }
}

/// ∫ y df over [lo, hi] ∩ grid, trapezoid with linear interpolation at the edges.
fn band_integral(f: &[f64], y: &[f64], lo: f64, hi: f64) -> f64 {
    let mut s = 0.0;
    for k in 1..f.len() {
        let (a, b) = (f[k - 1].max(lo), f[k].min(hi));
        if b <= a {
            continue;
        }
        let lerp = |x: f64| y[k - 1] + (y[k] - y[k - 1]) * (x - f[k - 1]) / (f[k] - f[k - 1]);
        s += 0.5 * (b - a) * (lerp(a) + lerp(b));
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn plate_scale_check_values() {
        // docs/references.md#s11 (computed from the published formula).
        assert_relative_eq!(plate_scale_arcsec_per_px(3.76, 1000.0), 0.77556, max_relative = 1e-5);
        assert_relative_eq!(plate_scale_arcsec_per_px(5.4, 800.0), 1.39229, max_relative = 1e-5);
        // Issue check: 3.8 µm at 3910 mm ≈ 0.200 ″/px (common practice).
        assert_relative_eq!(plate_scale_arcsec_per_px(3.8, 3910.0), 0.2005, max_relative = 1e-3);
    }

    #[test]
    fn rayleigh_and_anisotropic_probability() {
        // docs/references.md#s11: P(r > σ) = 0.606531, P(r > 2σ) = 0.135335, P(r > 3σ) = 0.011109.
        for (k, p) in [(1.0, 0.606531), (2.0, 0.135335), (3.0, 0.011109)] {
            assert_relative_eq!(p_outside_isotropic(k, 1.0), p, max_relative = 1e-5);
            assert_relative_eq!(
                p_outside(k, 1.0, 1.0, 0.0),
                p_outside_isotropic(k, 1.0),
                max_relative = 1e-9
            );
        }
        // Rotation invariance: a correlated pair equals its principal-axis form.
        let (a2, b2, th) = (2.0f64, 0.5f64, 0.6f64);
        let (c, s) = (th.cos(), th.sin());
        let vx = a2 * c * c + b2 * s * s;
        let vy = a2 * s * s + b2 * c * c;
        let cxy = (a2 - b2) * c * s;
        assert_relative_eq!(p_outside(1.3, vx, vy, cxy), p_outside(1.3, a2, b2, 0.0), max_relative = 1e-9);
        // Far tails keep their relative accuracy (no 1 − P(inside) rounding floor near 1e-16):
        // a star of σ = 0.05 px leaves ½ px with P = e^{−50} (Rayleigh), not ~1e-16.
        assert_relative_eq!(p_outside(0.5, 0.0025, 0.0025, 0.0), (-50.0f64).exp(), max_relative = 1e-12);
        assert_eq!(p_outside(0.5, 1e-6, 1e-6, 0.0), 0.0);
        assert_relative_eq!(p_outside(0.0, 2.0, 0.5, 0.3), 1.0, max_relative = 1e-12);
    }

    #[test]
    fn anisotropic_probability_matches_monte_carlo() {
        // Monte Carlo of 2-D Gaussian samples (seeded): within 1 %.
        use rand::{Rng, SeedableRng};
        let mut rng = rand::rngs::StdRng::seed_from_u64(7);
        let (sx, sy, rho) = (1.0f64, 0.4f64, 0.3f64);
        let n = 400_000;
        let r = 0.9;
        let mut out = 0usize;
        for _ in 0..n {
            let (u, v): (f64, f64) =
                (rng.sample(rand_distr::StandardNormal), rng.sample(rand_distr::StandardNormal));
            let x = sx * u;
            let y = sy * (rho * u + (1.0 - rho * rho).sqrt() * v);
            if x * x + y * y > r * r {
                out += 1;
            }
        }
        let mc = out as f64 / n as f64;
        let p = p_outside(r, sx * sx, sy * sy, rho * sx * sy);
        assert_relative_eq!(p, mc, max_relative = 0.01);
    }

    #[test]
    fn sinc2_check_values() {
        // docs/references.md#s11: sinc² at fT = 0.25 is 0.810569, at 0.5 is (2/π)², at 1 is 0.
        assert_relative_eq!(sinc2(0.25, 1.0), 0.810569, max_relative = 1e-6);
        assert_relative_eq!(sinc2(0.5, 1.0), (2.0 / PI).powi(2), max_relative = 1e-12);
        assert!(sinc2(1.0, 1.0) < 1e-30);
    }
}

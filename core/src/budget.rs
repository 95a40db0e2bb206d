//! The star image budget: what each source adds to a star's FWHM, along both sensor axes, and
//! the elongation of the star.
//!
//! Every term is treated as a 2-D Gaussian with a covariance (arcsec²), and independent terms
//! add their covariances; the FWHM along an axis is 2√(2 ln 2)·σ = 2.35482 σ of that axis. This
//! is exact for Gaussian profiles only (real seeing is closer to a Moffat profile, the Airy
//! pattern has rings, a pixel is a box): the budget is a quadrature sum of FWHM-equivalent
//! widths (common practice; REFERENCES §11 for Gaussian widths in quadrature).
//!
//! Terms:
//! - seeing: the given FWHM, isotropic;
//! - diffraction: the Airy core of a clear circular aperture D at wavelength λ, FWHM
//!   1.02899 λ/D rad ([`AIRY_FWHM_PER_LAMBDA_OVER_D`]; from the Airy intensity [2J₁(x)/x]² of
//!   M. Born & E. Wolf, *Principles of Optics*, Fraunhofer diffraction at a circular aperture,
//!   section number from memory), as a Gaussian of the same FWHM;
//! - pixel sampling: a pixel of pitch p (arcsec) is a box, variance p²/12 per axis (the variance
//!   of a uniform distribution; treating it as a Gaussian is common practice, no source);
//! - guiding residual: the guided motion below the guide Nyquist frequency 1/(2T_g) that smears
//!   within the exposure (aliased vibration included), when a guider is applied;
//! - vibration smear: the motion above the guide Nyquist frequency (all of it when unguided)
//!   that smears within the exposure, weight 1 − sinc²(πfT) for an exposure T;
//! - wander between exposures: the exposure-to-exposure centroid motion, weight sinc²(πfT). It
//!   does not widen a single exposure; it widens an unregistered stack (or one long exposure).
//!
//! Without an exposure length all motion counts as smear (a long exposure).

use crate::error::{Result, require_positive};
use crate::units::{ARCSEC_PER_RAD, FWHM_PER_SIGMA};
use serde::Serialize;

/// FWHM of the Airy pattern in units of λ/D: 2x/π with [2J₁(x)/x]² = ½ at x = 1.6163399
/// (computed from the Airy intensity by bisection with Bessel's integral for J₁).
pub const AIRY_FWHM_PER_LAMBDA_OVER_D: f64 = 1.028_994;

/// Wavelength used when `[optics]` gives none (nm): the middle of the visible band (common
/// practice, no source).
pub const DEFAULT_WAVELENGTH_NM: f64 = 550.0;

/// Airy FWHM (arcsec) of a clear circular aperture `aperture_mm` at `wavelength_nm`.
pub fn airy_fwhm_arcsec(aperture_mm: f64, wavelength_nm: f64) -> f64 {
    AIRY_FWHM_PER_LAMBDA_OVER_D * (wavelength_nm * 1e-9) / (aperture_mm * 1e-3) * ARCSEC_PER_RAD
}

/// A term of the budget.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum BudgetTerm {
    Seeing,
    Diffraction,
    PixelSampling,
    GuidingResidual,
    VibrationSmear,
    WanderBetweenExposures,
}

/// One line of the budget.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BudgetLine {
    pub term: BudgetTerm,
    /// What the line is, for people (e.g. "diffraction (280 mm, 550 nm)").
    pub label: String,
    /// [var_x, var_y, cov_xy] on the sky (arcsec²), x and y the sensor axes (image_x, image_y).
    pub covariance_arcsec2: [f64; 3],
    /// FWHM-equivalent width 2.35482 σ along x and y (arcsec).
    pub fwhm_arcsec: [f64; 2],
    /// Whether the line widens a single exposure (false only for the wander between exposures).
    pub in_exposure: bool,
}

/// The size and shape of a star image from a total covariance.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct StarShape {
    /// FWHM along the sensor x and y axes (arcsec).
    pub fwhm_arcsec: [f64; 2],
    /// The same in pixels.
    pub fwhm_px: [f64; 2],
    /// FWHM along the principal axes (arcsec), major ≥ minor.
    pub major_fwhm_arcsec: f64,
    pub minor_fwhm_arcsec: f64,
    /// major / minor (1 for a round star).
    pub elongation: f64,
    /// Direction of the major axis on the sensor: degrees from +x toward +y, in (−90, 90].
    pub major_axis_deg: f64,
}

impl StarShape {
    /// From a covariance [var_x, var_y, cov_xy] (arcsec²) and the plate scale.
    pub fn from_covariance(c: [f64; 3], plate_scale_arcsec_per_px: f64) -> StarShape {
        let [vx, vy, cxy] = c;
        let half_tr = 0.5 * (vx + vy);
        let disc = (0.25 * (vx - vy).powi(2) + cxy * cxy).sqrt();
        let (l1, l2) = (half_tr + disc, (half_tr - disc).max(0.0));
        let fwhm = [FWHM_PER_SIGMA * vx.max(0.0).sqrt(), FWHM_PER_SIGMA * vy.max(0.0).sqrt()];
        let mut angle = 0.5 * (2.0 * cxy).atan2(vx - vy).to_degrees();
        if angle <= -90.0 {
            angle += 180.0;
        }
        StarShape {
            fwhm_arcsec: fwhm,
            fwhm_px: fwhm.map(|v| v / plate_scale_arcsec_per_px),
            major_fwhm_arcsec: FWHM_PER_SIGMA * l1.sqrt(),
            minor_fwhm_arcsec: FWHM_PER_SIGMA * l2.sqrt(),
            elongation: if l2 > 0.0 { (l1 / l2).sqrt() } else { f64::INFINITY },
            major_axis_deg: angle,
        }
    }
}

/// The budget: its lines and the star they make.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StarBudget {
    pub lines: Vec<BudgetLine>,
    /// Exposure length the motion was split for (s); None: all motion counted as smear.
    pub exposure_s: Option<f64>,
    /// Wavelength of the diffraction line (nm).
    pub wavelength_nm: f64,
    /// The star in one exposure: every line with `in_exposure`.
    pub exposure: StarShape,
    /// An unregistered stack of exposures (or one long exposure): every line.
    pub unregistered_stack: StarShape,
    /// Terms left out and why.
    pub notes: Vec<String>,
}

impl StarBudget {
    /// The line of a term, if present.
    pub fn line(&self, term: BudgetTerm) -> Option<&BudgetLine> {
        self.lines.iter().find(|l| l.term == term)
    }
}

/// What the budget is built from.
#[derive(Debug, Clone, PartialEq)]
pub struct BudgetInputs {
    pub seeing_fwhm_arcsec: Option<f64>,
    /// Clear aperture (mm); None leaves diffraction out.
    pub aperture_mm: Option<f64>,
    /// Wavelength (nm); None: [`DEFAULT_WAVELENGTH_NM`].
    pub wavelength_nm: Option<f64>,
    pub plate_scale_arcsec_per_px: f64,
    pub exposure_s: Option<f64>,
    /// Guide Nyquist frequency (Hz) when a guider is applied (labels only).
    pub guide_nyquist_hz: Option<f64>,
    /// Motion covariances [var_x, var_y, cov_xy] (arcsec²): the guiding residual (None when
    /// unguided), the vibration smear and the wander between exposures.
    pub guiding: Option<[f64; 3]>,
    pub smear: [f64; 3],
    pub wander: [f64; 3],
}

fn iso(var: f64) -> [f64; 3] {
    [var, var, 0.0]
}

fn line(term: BudgetTerm, label: String, c: [f64; 3], in_exposure: bool) -> BudgetLine {
    BudgetLine {
        term,
        label,
        covariance_arcsec2: c,
        fwhm_arcsec: [FWHM_PER_SIGMA * c[0].max(0.0).sqrt(), FWHM_PER_SIGMA * c[1].max(0.0).sqrt()],
        in_exposure,
    }
}

/// Build the budget (module docs). Errors: a non-positive plate scale, aperture, wavelength or
/// exposure, or a negative seeing.
pub fn star_budget(i: &BudgetInputs) -> Result<StarBudget> {
    let plate = require_positive("plate scale", i.plate_scale_arcsec_per_px)?;
    let wavelength =
        require_positive("optics.wavelength_nm", i.wavelength_nm.unwrap_or(DEFAULT_WAVELENGTH_NM))?;
    let mut lines = Vec::new();
    let mut notes = Vec::new();
    let var_of_fwhm = |w: f64| (w / FWHM_PER_SIGMA).powi(2);
    match i.seeing_fwhm_arcsec {
        Some(s) => {
            crate::error::require_non_negative("seeing_fwhm_arcsec", s)?;
            lines.push(line(BudgetTerm::Seeing, "seeing".into(), iso(var_of_fwhm(s)), true));
        }
        None => notes.push("no seeing given: the budget leaves seeing out".into()),
    }
    match i.aperture_mm {
        Some(d) => {
            require_positive("optics.aperture_mm", d)?;
            let w = airy_fwhm_arcsec(d, wavelength);
            lines.push(line(
                BudgetTerm::Diffraction,
                format!("diffraction ({d} mm, {wavelength} nm)"),
                iso(var_of_fwhm(w)),
                true,
            ));
        }
        None => notes.push("no aperture_mm in [optics]: the budget leaves diffraction out".into()),
    }
    lines.push(line(
        BudgetTerm::PixelSampling,
        format!("pixel sampling ({plate:.3} arcsec box)"),
        iso(plate * plate / 12.0),
        true,
    ));
    if let Some(t) = i.exposure_s {
        require_positive("exposure_s", t)?;
    }
    if let Some(c) = i.guiding {
        let lab = match i.guide_nyquist_hz {
            Some(f) => format!("guiding residual (below {f:.3} Hz)"),
            None => "guiding residual".into(),
        };
        lines.push(line(BudgetTerm::GuidingResidual, lab, c, true));
    }
    let smear_label = match (i.exposure_s, i.guide_nyquist_hz) {
        (Some(t), Some(f)) => format!("vibration smear within {t} s (above {f:.3} Hz)"),
        (Some(t), None) => format!("vibration smear within {t} s"),
        (None, Some(f)) => format!("vibration (above {f:.3} Hz, no exposure split)"),
        (None, None) => "vibration (all motion, no exposure split)".into(),
    };
    lines.push(line(BudgetTerm::VibrationSmear, smear_label, i.smear, true));
    if i.exposure_s.is_some() {
        lines.push(line(
            BudgetTerm::WanderBetweenExposures,
            "wander between exposures".into(),
            i.wander,
            false,
        ));
    }
    let sum = |all: bool| -> [f64; 3] {
        let mut c = [0.0; 3];
        for l in lines.iter().filter(|l| all || l.in_exposure) {
            for k in 0..3 {
                c[k] += l.covariance_arcsec2[k];
            }
        }
        c
    };
    Ok(StarBudget {
        exposure: StarShape::from_covariance(sum(false), plate),
        unregistered_stack: StarShape::from_covariance(sum(true), plate),
        lines,
        exposure_s: i.exposure_s,
        wavelength_nm: wavelength,
        notes,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;
    use std::f64::consts::PI;

    /// J₁ by Bessel's integral J₁(x) = (1/π) ∫₀^π cos(τ − x sin τ) dτ (Simpson, 2000 panels).
    fn bessel_j1(x: f64) -> f64 {
        let n = 2000;
        let h = PI / n as f64;
        let s: f64 = (0..=n)
            .map(|k| {
                let w = if k == 0 || k == n {
                    1.0
                } else if k % 2 == 1 {
                    4.0
                } else {
                    2.0
                };
                let t = k as f64 * h;
                w * (t - x * t.sin()).cos()
            })
            .sum();
        s * h / 3.0 / PI
    }

    #[test]
    fn airy_fwhm_from_the_airy_pattern() {
        // Airy intensity [2J₁(x)/x]², x = π D θ/λ (Born & Wolf, Principles of Optics): the half
        // maximum by bisection gives FWHM = 2x/π λ/D ≈ 1.029 λ/D.
        let (mut lo, mut hi) = (1.0f64, 2.0f64);
        for _ in 0..60 {
            let m = 0.5 * (lo + hi);
            if (2.0 * bessel_j1(m) / m).powi(2) > 0.5 { lo = m } else { hi = m }
        }
        assert_relative_eq!(2.0 * lo / PI, AIRY_FWHM_PER_LAMBDA_OVER_D, max_relative = 1e-6);
        assert_relative_eq!(AIRY_FWHM_PER_LAMBDA_OVER_D, 1.029, max_relative = 1e-3);
        // 280 mm at 550 nm: 1.029 × 550e-9 / 0.28 rad = 0.4169 arcsec.
        assert_relative_eq!(airy_fwhm_arcsec(280.0, 550.0), 0.416_91, max_relative = 1e-4);
    }

    fn inputs() -> BudgetInputs {
        BudgetInputs {
            seeing_fwhm_arcsec: Some(2.0),
            aperture_mm: Some(200.0),
            wavelength_nm: None,
            plate_scale_arcsec_per_px: 0.5,
            exposure_s: Some(2.0),
            guide_nyquist_hz: Some(0.25),
            guiding: Some([0.01, 0.02, 0.005]),
            smear: [0.09, 0.25, 0.1],
            wander: [0.04, 0.01, -0.01],
        }
    }

    #[test]
    fn lines_combine_to_the_fwhm() {
        let b = star_budget(&inputs()).unwrap();
        assert_eq!(b.lines.len(), 6);
        assert_eq!(b.wavelength_nm, DEFAULT_WAVELENGTH_NM);
        // Quadrature: FWHM² along each axis is the sum of the lines' FWHM² (Gaussian widths,
        // REFERENCES §11).
        for (shape, all) in [(&b.exposure, false), (&b.unregistered_stack, true)] {
            for ax in 0..2 {
                let s: f64 =
                    b.lines.iter().filter(|l| all || l.in_exposure).map(|l| l.fwhm_arcsec[ax].powi(2)).sum();
                assert_relative_eq!(shape.fwhm_arcsec[ax], s.sqrt(), max_relative = 1e-12);
            }
            assert_relative_eq!(shape.fwhm_px[0], shape.fwhm_arcsec[0] / 0.5, max_relative = 1e-12);
        }
        // Seeing 2″ on its own line; pixel line 2.35482 × 0.5/√12.
        assert_relative_eq!(b.line(BudgetTerm::Seeing).unwrap().fwhm_arcsec[0], 2.0, max_relative = 1e-12);
        assert_relative_eq!(
            b.line(BudgetTerm::PixelSampling).unwrap().fwhm_arcsec[1],
            FWHM_PER_SIGMA * 0.5 / 12f64.sqrt(),
            max_relative = 1e-12
        );
        assert!(!b.line(BudgetTerm::WanderBetweenExposures).unwrap().in_exposure);
    }

    #[test]
    fn elongation_and_direction() {
        // A covariance rotated by 30° from principal variances 4 and 1: elongation 2, major axis
        // at 30°, principal FWHMs 2.35482 × 2 and 2.35482 × 1.
        let th = 30f64.to_radians();
        let (c, s) = (th.cos(), th.sin());
        let cov = [4.0 * c * c + s * s, 4.0 * s * s + c * c, 3.0 * c * s];
        let sh = StarShape::from_covariance(cov, 1.0);
        assert_relative_eq!(sh.elongation, 2.0, max_relative = 1e-12);
        assert_relative_eq!(sh.major_axis_deg, 30.0, max_relative = 1e-12);
        assert_relative_eq!(sh.major_fwhm_arcsec, 2.0 * FWHM_PER_SIGMA, max_relative = 1e-12);
        assert_relative_eq!(sh.minor_fwhm_arcsec, FWHM_PER_SIGMA, max_relative = 1e-12);
        // Mirrored about the x axis: −30°.
        let sh = StarShape::from_covariance([cov[0], cov[1], -cov[2]], 1.0);
        assert_relative_eq!(sh.major_axis_deg, -30.0, max_relative = 1e-12);
        let round = StarShape::from_covariance([1.0, 1.0, 0.0], 1.0);
        assert_relative_eq!(round.elongation, 1.0, max_relative = 1e-12);
    }

    #[test]
    fn missing_terms_and_bad_input() {
        let b = star_budget(&BudgetInputs {
            seeing_fwhm_arcsec: None,
            aperture_mm: None,
            exposure_s: None,
            guiding: None,
            guide_nyquist_hz: None,
            ..inputs()
        })
        .unwrap();
        assert_eq!(b.lines.len(), 2);
        assert_eq!(b.notes.len(), 2);
        assert_eq!(b.exposure, b.unregistered_stack);
        let e = star_budget(&BudgetInputs { aperture_mm: Some(0.0), ..inputs() }).unwrap_err();
        assert!(e.to_string().contains("aperture_mm"), "{e}");
        let e = star_budget(&BudgetInputs { wavelength_nm: Some(-1.0), ..inputs() }).unwrap_err();
        assert!(e.to_string().contains("wavelength_nm"), "{e}");
    }
}

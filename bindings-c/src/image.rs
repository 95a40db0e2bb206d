//! Image motion of a model for a ground-acceleration PSD.

use crate::error::{deref, deref_mut, guard, slice};
use crate::model::stillsky_model;
use stillsky_core::monitor::image_motion_from_ground_acceleration;

/// Image-motion statistics (zero-mean Gaussian motion assumed). `x` is along increasing
/// azimuth, `y` along increasing altitude (rotated by the camera angle); radial = sqrt(σx² + σy²).
#[allow(non_camel_case_types)]
#[repr(C)]
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct stillsky_image_motion {
    pub rms_x_arcsec: f64,
    pub rms_y_arcsec: f64,
    pub rms_radial_arcsec: f64,
    pub rms_x_um: f64,
    pub rms_y_um: f64,
    pub rms_radial_um: f64,
    pub rms_x_px: f64,
    pub rms_y_px: f64,
    pub rms_radial_px: f64,
    /// Per-axis σ of the isotropic approximation, sqrt((σx² + σy²)/2), in pixels.
    pub sigma_iso_px: f64,
    /// The radius passed in (px).
    pub radius_px: f64,
    /// P(offset > radius) = exp(−R²/2σ_iso²) (Rayleigh law of isotropic 2-D Gaussian motion;
    /// with unequal axes an approximation).
    pub p_outside: f64,
}

/// Image motion of `model` (which needs an `[optics]` section) for one-sided ground
/// acceleration PSDs ((m/s²)²/Hz) on `freq_hz[0..n_freq]` (Hz, strictly increasing, > 0, at
/// least 2 points). `acc_psd_x|y|z` each hold `n_freq` values or are NULL for an axis without
/// excitation (at least one non-NULL). Per image axis σ² = Σ_axes ∫ |H(f)|² S(f)/(2πf)⁴ df by
/// the trapezoid rule on the given grid (H: image rad per m of ground displacement; ground axes
/// uncorrelated). `radius_px` (≥ 0) is the radius for `p_outside`.
///
/// # Safety
/// `model` is NULL or a live handle; each non-NULL PSD pointer and `freq_hz` point to `n_freq`
/// doubles; `out` is NULL or writable.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_image_motion_compute(
    model: *const stillsky_model,
    freq_hz: *const f64,
    n_freq: usize,
    acc_psd_x: *const f64,
    acc_psd_y: *const f64,
    acc_psd_z: *const f64,
    radius_px: f64,
    out: *mut stillsky_image_motion,
) -> i32 {
    guard("stillsky_image_motion_compute", || {
        // SAFETY: caller contract.
        let (m, f, out) =
            unsafe { (deref(model, "model")?, slice(freq_hz, n_freq, "freq_hz")?, deref_mut(out, "out")?) };
        let mut psd: [Option<&[f64]>; 3] = [None; 3];
        for (p, (ptr, name)) in
            psd.iter_mut().zip([(acc_psd_x, "acc_psd_x"), (acc_psd_y, "acc_psd_y"), (acc_psd_z, "acc_psd_z")])
        {
            if !ptr.is_null() {
                // SAFETY: caller contract.
                *p = Some(unsafe { slice(ptr, n_freq, name) }?);
            }
        }
        let r = image_motion_from_ground_acceleration(&m.model, f, psd, radius_px)?;
        *out = stillsky_image_motion {
            rms_x_arcsec: r.rms_x_arcsec,
            rms_y_arcsec: r.rms_y_arcsec,
            rms_radial_arcsec: r.rms_radial_arcsec,
            rms_x_um: r.rms_x_um,
            rms_y_um: r.rms_y_um,
            rms_radial_um: r.rms_radial_um,
            rms_x_px: r.rms_x_px,
            rms_y_px: r.rms_y_px,
            rms_radial_px: r.rms_radial_px,
            sigma_iso_px: r.sigma_iso_px,
            radius_px: r.radius_px,
            p_outside: r.p_outside,
        };
        Ok(())
    })
}

//! Frequency-dependent impedance of a rigid circular footing on an elastic half-space: the
//! dimensionless stiffness and damping k(a0), c(a0), a0 = ωR/V_s, of Veletsos & Verbič (1973)
//! for vertical, horizontal and rocking motion and of the rotational cone (Wolf 1994) for
//! torsion; the forms, coefficients and sources are in [`crate::soil`] and
//! docs/references.md#s8-5.

use crate::error::{Error, Result, require_non_negative, require_positive};
use num_complex::Complex64;
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// Motion of a rigid circular footing.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum FootingMode {
    /// Order as in [`crate::soil::Soil::contact_models`].
    Vertical,
    Horizontal,
    Rocking,
    Torsion,
}

/// Coefficients of Veletsos & Verbič (1973), Table 1, at ν = 0, 1/3, 0.45, 0.5 (from memory:
/// verify): rows ν, α₁, β₁, β₂, β₃, γ₁, γ₂, γ₃, γ₄.
const VV_TABLE: [[f64; 9]; 4] = [
    [0.0, 0.775, 0.525, 0.8, 0.0, 0.25, 1.0, 0.0, 0.85],
    [1.0 / 3.0, 0.65, 0.5, 0.8, 0.0, 0.35, 0.8, 0.0, 0.75],
    [0.45, 0.6, 0.5, 0.8, 0.023, 0.0, 0.0, 0.17, 0.85],
    [0.5, 0.6, 0.5, 0.8, 0.027, 0.0, 0.0, 0.85, 0.95],
];

/// The Veletsos & Verbič coefficients (α₁, β₁, β₂, β₃, γ₁, γ₂, γ₃, γ₄) at ν, linear in ν between
/// the tabulated rows (ν is clamped to [0, 0.5]).
pub(crate) fn vv_coefficients(nu: f64) -> [f64; 8] {
    let nu = nu.clamp(0.0, 0.5);
    let j = (1..VV_TABLE.len()).find(|&j| nu <= VV_TABLE[j][0]).unwrap_or(VV_TABLE.len() - 1);
    let (a, b) = (&VV_TABLE[j - 1], &VV_TABLE[j]);
    let t = (nu - a[0]) / (b[0] - a[0]);
    std::array::from_fn(|i| a[i + 1] + t * (b[i + 1] - a[i + 1]))
}

/// Depth of the rotational cone over the radius for torsion, z₀/R = 9π/32 (Wolf 1994).
pub const TORSION_CONE_DEPTH_RATIO: f64 = 9.0 * PI / 32.0;

/// Dimensionless dynamic stiffness and damping (k, c) of a rigid circular surface footing at
/// a0 = ωR/V_s ≥ 0 and Poisson ratio ν; the impedance is K·(k + i·a0·c) (see the module doc).
pub fn impedance_coefficients(mode: FootingMode, nu: f64, a0: f64) -> (f64, f64) {
    let [a1, b1, b2, b3, g1, g2, g3, g4] = vv_coefficients(nu);
    let lag = |b: f64| {
        let x = (b * a0).powi(2);
        x / (1.0 + x)
    };
    match mode {
        FootingMode::Vertical => (1.0 - g1 * lag(g2) - g3 * a0 * a0, g4 + g1 * g2 * lag(g2)),
        FootingMode::Horizontal => (1.0, a1),
        FootingMode::Rocking => (1.0 - b1 * lag(b2) - b3 * a0 * a0, b1 * b2 * lag(b2)),
        FootingMode::Torsion => {
            let b = TORSION_CONE_DEPTH_RATIO;
            (1.0 - lag(b) / 3.0, b * lag(b) / 3.0)
        }
    }
}

/// Frequency-dependent impedance of one motion of a rigid circular footing on a half-space,
/// a [`StiffnessModel::HalfSpace`]: K*(f) = K·[k(a0) + i(a0·c(a0) + η·k(a0))], a0 = 2πfR/V_s.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FootingImpedance {
    pub mode: FootingMode,
    /// Static stiffness K, embedment included (N/m, or N·m/rad for rocking and torsion).
    pub static_stiffness: f64,
    /// Footing radius R (m).
    pub radius_m: f64,
    /// Shear-wave speed of the soil V_s (m/s).
    pub shear_wave_speed_m_s: f64,
    /// Poisson ratio of the soil, in [0, 0.5].
    pub poisson_ratio: f64,
    /// Soil loss factor η (default 0).
    #[serde(default)]
    pub loss_factor: f64,
}

impl FootingImpedance {
    /// K*(f) at `f_hz` ≥ 0.
    pub fn at(&self, f_hz: f64) -> Complex64 {
        let a0 = 2.0 * PI * f_hz.abs() * self.radius_m / self.shear_wave_speed_m_s;
        let (k, c) = impedance_coefficients(self.mode, self.poisson_ratio, a0);
        self.static_stiffness * Complex64::new(k, a0 * c + self.loss_factor * k)
    }

    /// Validate; errors name the field under `name`.
    pub fn validate(&self, name: &dyn std::fmt::Display) -> Result<()> {
        require_positive(|| format!("{name}.half_space.static_stiffness"), self.static_stiffness)?;
        require_positive(|| format!("{name}.half_space.radius_m"), self.radius_m)?;
        require_positive(|| format!("{name}.half_space.shear_wave_speed_m_s"), self.shear_wave_speed_m_s)?;
        require_non_negative(|| format!("{name}.half_space.loss_factor"), self.loss_factor)?;
        let nu = self.poisson_ratio;
        if !(nu.is_finite() && (0.0..=0.5).contains(&nu)) {
            return Err(Error::invalid(
                format!("{name}.half_space.poisson_ratio"),
                format!("must lie in [0, 0.5], got {nu}"),
            ));
        }
        Ok(())
    }
}

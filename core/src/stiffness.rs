//! Complex stiffness models k*(f) and their series / parallel combination.
//!
//! Convention e^{+iωt}: k*(ω) = k′(ω)(1 + iη(ω)); a viscous dashpot contributes iωc. Every model
//! is evaluated at a frequency in Hz. Models serialise as TOML tables (see docs/model-file.md).
//!
//! - [`StiffnessModel::Hysteretic`]: k(1 + iη), frequency independent. Standard for rubber over a
//!   decade or two, but not causal (a time history shows a tiny precursor).
//! - [`StiffnessModel::KelvinVoigt`]: k + iωc (spring and dashpot in parallel). Causal.
//! - [`StiffnessModel::Zener`]: standard linear solid, k*(x) = (k₀ + k∞·ix)/(1 + ix), x = ωτ.
//! - [`StiffnessModel::FractionalZener`]: (k₀ + k∞(ix)^α)/(1 + (ix)^α), 0 < α ≤ 1
//!   (Bagley & Torvik 1983).
//! - [`StiffnessModel::Table`]: k′(f) and η(f) from a data sheet, log–log interpolation in k′,
//!   linear-in-log-f interpolation in η, held constant beyond the first and last rows (stated
//!   policy: a data sheet's end values are the best estimate there).
//! - [`StiffnessModel::HalfSpace`]: a rigid circular footing on a half-space, stiffness and
//!   radiation damping as functions of a0 = ωR/V_s ([`crate::footing_impedance::FootingImpedance`]).
//! - [`StiffnessModel::Series`], [`StiffnessModel::Parallel`]: 1/k* = Σ 1/k*ᵢ and k* = Σ k*ᵢ.

use crate::error::{Error, Result, require_non_negative, require_positive};
use crate::footing_impedance::FootingImpedance;
use crate::linalg::lanes::{CLane, LANES, Lane};
use num_complex::Complex64;
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// A complex stiffness model (N/m for translation, N·m/rad for rotation).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case", deny_unknown_fields)]
pub enum StiffnessModel {
    /// k(1 + iη).
    Hysteretic { k: f64, loss_factor: f64 },
    /// k + iωc.
    KelvinVoigt { k: f64, c: f64 },
    /// Standard linear solid: relaxed k₀, unrelaxed k∞ > k₀, relaxation time τ (s).
    Zener { k0: f64, k_inf: f64, tau_s: f64 },
    /// Fractional-derivative Zener with order α in (0, 1].
    FractionalZener { k0: f64, k_inf: f64, tau_s: f64, alpha: f64 },
    /// Tabulated storage stiffness and loss factor against frequency.
    Table { freq_hz: Vec<f64>, k: Vec<f64>, loss_factor: Vec<f64> },
    /// Frequency-dependent impedance of a footing on a half-space.
    HalfSpace(FootingImpedance),
    /// Elements in series.
    Series(Vec<StiffnessModel>),
    /// Elements in parallel.
    Parallel(Vec<StiffnessModel>),
}

impl StiffnessModel {
    /// A constant hysteretic spring.
    pub fn hysteretic(k: f64, loss_factor: f64) -> Self {
        StiffnessModel::Hysteretic { k, loss_factor }
    }

    /// Complex stiffness at `f_hz` (≥ 0).
    pub fn at(&self, f_hz: f64) -> Complex64 {
        let w = 2.0 * PI * f_hz;
        match self {
            StiffnessModel::Hysteretic { k, loss_factor } => Complex64::new(*k, k * loss_factor),
            StiffnessModel::KelvinVoigt { k, c } => Complex64::new(*k, w * c),
            StiffnessModel::Zener { k0, k_inf, tau_s } => {
                let ix = Complex64::new(0.0, w * tau_s);
                (k0 + k_inf * ix) / (1.0 + ix)
            }
            StiffnessModel::FractionalZener { k0, k_inf, tau_s, alpha } => {
                let x = w * tau_s;
                // (ix)^α = x^α e^{iαπ/2}; x = 0 gives 0.
                let p = Complex64::from_polar(x.powf(*alpha), alpha * PI / 2.0);
                (k0 + k_inf * p) / (1.0 + p)
            }
            StiffnessModel::Table { freq_hz, k, loss_factor } => {
                let (kp, eta) = table_lookup(freq_hz, k, loss_factor, f_hz);
                Complex64::new(kp, kp * eta)
            }
            StiffnessModel::HalfSpace(h) => h.at(f_hz),
            StiffnessModel::Series(parts) => {
                let inv: Complex64 = parts.iter().map(|p| 1.0 / p.at(f_hz)).sum();
                1.0 / inv
            }
            StiffnessModel::Parallel(parts) => parts.iter().map(|p| p.at(f_hz)).sum(),
        }
    }

    /// The static (f → 0) storage stiffness.
    pub fn static_stiffness(&self) -> f64 {
        self.at(0.0).re
    }

    /// True when k* does not depend on frequency (hysteretic springs and combinations of them).
    pub fn is_frequency_independent(&self) -> bool {
        match self {
            StiffnessModel::Hysteretic { .. } => true,
            StiffnessModel::KelvinVoigt { c, .. } => *c == 0.0,
            StiffnessModel::Series(p) | StiffnessModel::Parallel(p) => {
                p.iter().all(|m| m.is_frequency_independent())
            }
            _ => false,
        }
    }

    /// True when [`elastic_at`](Self::elastic_at) does not depend on frequency (the viscous part,
    /// which assembly moves into C, may): hysteretic springs, Kelvin–Voigt, and parallel groups of
    /// them; series groups only when every element is frequency independent.
    pub fn elastic_is_constant(&self) -> bool {
        match self {
            StiffnessModel::Hysteretic { .. } | StiffnessModel::KelvinVoigt { .. } => true,
            StiffnessModel::Parallel(p) => p.iter().all(|m| m.elastic_is_constant()),
            StiffnessModel::Series(p) => p.iter().all(|m| m.is_frequency_independent()),
            _ => false,
        }
    }

    /// The part of the model that is a plain viscous dashpot in parallel with the rest (N·s/m).
    ///
    /// Assembly moves this part into the damping matrix C, so that Z = K*(ω) + iωC − ω²M holds
    /// with K* = [`elastic_at`](Self::elastic_at). Dashpots inside a series chain stay in K*.
    pub fn viscous_part(&self) -> f64 {
        match self {
            StiffnessModel::KelvinVoigt { c, .. } => *c,
            StiffnessModel::Parallel(p) => p.iter().map(|m| m.viscous_part()).sum(),
            _ => 0.0,
        }
    }

    /// [`at`](Self::at) for [`LANES`] frequencies at once (closed forms per lane for the hysteretic,
    /// Kelvin–Voigt and Zener models; the others lane by lane).
    #[inline(always)]
    pub fn at_lanes(&self, f_hz: &Lane) -> CLane {
        let mut r = CLane::ZERO;
        match self {
            StiffnessModel::Hysteretic { k, loss_factor } => {
                r = CLane::splat(Complex64::new(*k, k * loss_factor))
            }
            // One loop per part, each the same expression in every lane, so the compiler packs
            // lanes into vectors (one loop for both parts got packed (re, im) pairs instead).
            StiffnessModel::KelvinVoigt { k, c } => {
                let wc = 2.0 * PI * c;
                r.re = [*k; LANES];
                for (i, f) in r.im.iter_mut().zip(f_hz) {
                    *i = wc * f;
                }
            }
            StiffnessModel::Zener { k0, k_inf, tau_s } => {
                // (k₀ + k∞·ix)/(1 + ix) = (k₀ + k∞x² + i(k∞ − k₀)x)/(1 + x²).
                let (wt, dk) = (2.0 * PI * tau_s, k_inf - k0);
                let x: Lane = f_hz.map(|f| wt * f);
                let d: Lane = x.map(|x| 1.0 / (1.0 + x * x));
                for l in 0..LANES {
                    r.re[l] = (k0 + k_inf * (x[l] * x[l])) * d[l];
                }
                for l in 0..LANES {
                    r.im[l] = dk * x[l] * d[l];
                }
            }
            _ => {
                for l in 0..LANES {
                    r.set(l, self.at(f_hz[l]));
                }
            }
        }
        r
    }

    /// [`elastic_at`](Self::elastic_at) for [`LANES`] frequencies at once.
    #[inline(always)]
    pub fn elastic_at_lanes(&self, f_hz: &Lane) -> CLane {
        let mut r = self.at_lanes(f_hz);
        let c = self.viscous_part();
        if c != 0.0 {
            for l in 0..LANES {
                r.im[l] -= 2.0 * PI * f_hz[l] * c;
            }
        }
        r
    }

    /// k*(f) without the [`viscous_part`](Self::viscous_part).
    pub fn elastic_at(&self, f_hz: f64) -> Complex64 {
        self.at(f_hz) - Complex64::new(0.0, 2.0 * PI * f_hz * self.viscous_part())
    }

    /// Loss factor η = Im k* / Re k* at `f_hz`.
    pub fn loss_factor_at(&self, f_hz: f64) -> f64 {
        let k = self.at(f_hz);
        k.im / k.re
    }

    /// Validate every parameter; errors name `name` and the field. The name is formatted only
    /// when a check fails (`format_args!` works here), so sweeps can validate thousands of specs.
    pub fn validate(&self, name: impl std::fmt::Display) -> Result<()> {
        self.validate_named(&name)
    }

    fn validate_named(&self, name: &dyn std::fmt::Display) -> Result<()> {
        let f = |field: &str| format!("{name}.{field}");
        match self {
            StiffnessModel::Hysteretic { k, loss_factor } => {
                require_positive(|| f("stiffness"), *k)?;
                require_non_negative(|| f("loss_factor"), *loss_factor)?;
            }
            StiffnessModel::KelvinVoigt { k, c } => {
                // k = 0 is a pure dashpot (e.g. radiation damping in parallel with a spring).
                require_non_negative(|| f("stiffness"), *k)?;
                require_non_negative(|| f("damping"), *c)?;
                if *k == 0.0 && *c == 0.0 {
                    return Err(Error::invalid(f("stiffness"), "spring and dashpot are both zero"));
                }
            }
            StiffnessModel::Zener { k0, k_inf, tau_s } => {
                require_positive(|| f("k0"), *k0)?;
                require_positive(|| f("k_inf"), *k_inf)?;
                require_positive(|| f("tau_s"), *tau_s)?;
                if k_inf < k0 {
                    return Err(Error::invalid(f("k_inf"), format!("must be >= k0 = {k0}, got {k_inf}")));
                }
            }
            StiffnessModel::FractionalZener { k0, k_inf, tau_s, alpha } => {
                StiffnessModel::Zener { k0: *k0, k_inf: *k_inf, tau_s: *tau_s }.validate_named(name)?;
                if !(alpha.is_finite() && *alpha > 0.0 && *alpha <= 1.0) {
                    return Err(Error::invalid(f("alpha"), format!("must lie in (0, 1], got {alpha}")));
                }
            }
            StiffnessModel::Table { freq_hz, k, loss_factor } => {
                crate::grid::validate_freqs(&f("table.freq_hz"), freq_hz)?;
                if k.len() != freq_hz.len() {
                    return Err(Error::shape(f("table.stiffness"), freq_hz.len(), k.len()));
                }
                if loss_factor.len() != freq_hz.len() {
                    return Err(Error::shape(f("table.loss_factor"), freq_hz.len(), loss_factor.len()));
                }
                for (i, (kk, e)) in k.iter().zip(loss_factor).enumerate() {
                    require_positive(|| format!("{name}.table.stiffness[{i}]"), *kk)?;
                    require_non_negative(|| format!("{name}.table.loss_factor[{i}]"), *e)?;
                }
            }
            StiffnessModel::HalfSpace(h) => h.validate(name)?,
            StiffnessModel::Series(parts) | StiffnessModel::Parallel(parts) => {
                if parts.is_empty() {
                    return Err(Error::invalid(
                        name.to_string(),
                        "a series/parallel group needs at least one element",
                    ));
                }
                for (i, p) in parts.iter().enumerate() {
                    p.validate_named(&format_args!("{name}[{i}]"))?;
                }
            }
        }
        Ok(())
    }
}

/// Interpolate (k′, η) at f: log–log in k′, linear in log f for η; end values held outside.
fn table_lookup(freq_hz: &[f64], k: &[f64], eta: &[f64], f_hz: f64) -> (f64, f64) {
    let n = freq_hz.len();
    if n == 1 || f_hz <= freq_hz[0] {
        return (k[0], eta[0]);
    }
    if f_hz >= freq_hz[n - 1] {
        return (k[n - 1], eta[n - 1]);
    }
    let j = freq_hz.partition_point(|&x| x <= f_hz).clamp(1, n - 1);
    let (f0, f1) = (freq_hz[j - 1], freq_hz[j]);
    let t = (f_hz.ln() - f0.ln()) / (f1.ln() - f0.ln());
    let kp = (k[j - 1].ln() + t * (k[j].ln() - k[j - 1].ln())).exp();
    (kp, eta[j - 1] + t * (eta[j] - eta[j - 1]))
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn zener_check_values() {
        // docs/references.md#s10 (computed from the published formula), E0 = 1, E_inf = 2.
        let m = StiffnessModel::Zener { k0: 1.0, k_inf: 2.0, tau_s: 1.0 / (2.0 * PI) };
        for (x, ep, epp) in [(0.1, 1.009901, 0.099010), (1.0, 1.5, 0.5), (10.0, 1.990099, 0.099010)] {
            let k = m.at(x); // ω τ = x when f = x and τ = 1/2π
            assert_relative_eq!(k.re, ep, max_relative = 1e-6);
            assert_relative_eq!(k.im, epp, max_relative = 1e-5);
        }
        // Peak loss factor (E_inf − E0)/(2 sqrt(E0 E_inf)) at x = 1/sqrt 2.
        assert_relative_eq!(
            m.loss_factor_at(1.0 / 2f64.sqrt()),
            1.0 / (2.0 * 2f64.sqrt()),
            max_relative = 1e-12
        );
    }

    #[test]
    fn fractional_zener_check_values() {
        // docs/references.md#s10: α = 0.5 at x = 1 gives E' = 1.5, E'' = 0.207107, η = 0.138071;
        // the loss peak at x = ρ^(1/α) = 0.5 is 1/7.
        let m = StiffnessModel::FractionalZener { k0: 1.0, k_inf: 2.0, tau_s: 1.0 / (2.0 * PI), alpha: 0.5 };
        let k = m.at(1.0);
        assert_relative_eq!(k.re, 1.5, max_relative = 1e-9);
        assert_relative_eq!(k.im, 0.207107, max_relative = 2e-6);
        assert_relative_eq!(m.loss_factor_at(0.5), 1.0 / 7.0, max_relative = 1e-9);
        // α = 1 reduces to the standard linear solid.
        let f1 = StiffnessModel::FractionalZener { k0: 1.0, k_inf: 3.0, tau_s: 0.01, alpha: 1.0 };
        let z = StiffnessModel::Zener { k0: 1.0, k_inf: 3.0, tau_s: 0.01 };
        assert_relative_eq!(f1.at(7.0).re, z.at(7.0).re, max_relative = 1e-12);
        assert_relative_eq!(f1.at(7.0).im, z.at(7.0).im, max_relative = 1e-12);
    }

    #[test]
    fn kelvin_voigt_loss_factor() {
        // docs/references.md#s10: k = 1e5, c = 100 at 10 Hz gives η = 0.0628.
        let m = StiffnessModel::KelvinVoigt { k: 1e5, c: 100.0 };
        assert_relative_eq!(m.loss_factor_at(10.0), 2.0 * PI * 10.0 * 100.0 / 1e5, max_relative = 1e-12);
        assert_eq!(m.viscous_part(), 100.0);
        assert_relative_eq!(m.elastic_at(10.0).im, 0.0);
    }

    #[test]
    fn soft_pad_in_series_dominates() {
        // Series springs: k_eff = k_pad / (1 + k_pad / k_leg) (elementary mechanics).
        let (kp, kl) = (2.0e5, 5.0e7);
        let m = StiffnessModel::Series(vec![
            StiffnessModel::hysteretic(kl, 0.0),
            StiffnessModel::hysteretic(kp, 0.0),
        ]);
        assert_relative_eq!(m.at(3.0).re, kp / (1.0 + kp / kl), max_relative = 1e-12);
    }

    #[test]
    fn table_interpolates_log_log_and_holds_ends() {
        let m = StiffnessModel::Table {
            freq_hz: vec![1.0, 100.0],
            k: vec![1e5, 4e5],
            loss_factor: vec![0.1, 0.3],
        };
        m.validate("pad").unwrap();
        let k = m.at(10.0);
        assert_relative_eq!(k.re, 2e5, max_relative = 1e-12); // geometric midpoint
        assert_relative_eq!(k.im / k.re, 0.2, max_relative = 1e-12);
        assert_relative_eq!(m.at(1000.0).re, 4e5);
        assert_relative_eq!(m.at(0.01).re, 1e5);
    }

    #[test]
    fn validation_names_fields() {
        let e = StiffnessModel::hysteretic(-1.0, 0.1).validate("pad").unwrap_err();
        assert!(e.to_string().contains("pad.stiffness"), "{e}");
        let e = StiffnessModel::hysteretic(1.0, f64::NAN).validate("pad").unwrap_err();
        assert!(e.to_string().contains("pad.loss_factor"), "{e}");
        let e = StiffnessModel::Zener { k0: 2.0, k_inf: 1.0, tau_s: 1.0 }.validate("p").unwrap_err();
        assert!(e.to_string().contains("p.k_inf"));
        let e = StiffnessModel::Series(vec![
            StiffnessModel::hysteretic(1.0, 0.0),
            StiffnessModel::hysteretic(0.0, 0.0),
        ])
        .validate("chain")
        .unwrap_err();
        assert!(e.to_string().contains("chain[1].stiffness"), "{e}");
    }
}

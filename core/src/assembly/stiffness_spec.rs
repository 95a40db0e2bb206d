//! Stiffness as written in a model file ([`StiffnessSpec`]: a plain spring, `zener`, `table`,
//! `series` or `parallel`) and its conversion to and from a [`StiffnessModel`].

use crate::error::{Error, Result};
use crate::footing_impedance::FootingImpedance;
use crate::stiffness::StiffnessModel;
use serde::{Deserialize, Serialize};

/// `{ k0, k_inf, tau_s }` of a standard linear solid.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ZenerSpec {
    pub k0: f64,
    pub k_inf: f64,
    pub tau_s: f64,
    /// Fractional order (omit or 1 for the standard linear solid).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub alpha: Option<f64>,
}

/// Tabulated stiffness against frequency.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct TableSpec {
    pub freq_hz: Vec<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub stiffness_n_per_m: Option<Vec<f64>>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub stiffness_nm_per_rad: Option<Vec<f64>>,
    pub loss_factor: Vec<f64>,
}

/// A stiffness as written in a model file: exactly one of a plain spring (with loss factor
/// and/or dashpot), `zener`, `table`, `series` or `parallel`. Translational springs use the
/// `_n_per_m` / `_ns_per_m` names, rotational ones `_nm_per_rad` / `_nms_per_rad`.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct StiffnessSpec {
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub stiffness_n_per_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub stiffness_nm_per_rad: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub loss_factor: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub damping_ns_per_m: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub damping_nms_per_rad: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub zener: Option<ZenerSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub table: Option<TableSpec>,
    /// A footing's frequency-dependent half-space impedance.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub half_space: Option<FootingImpedance>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub series: Option<Vec<StiffnessSpec>>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub parallel: Option<Vec<StiffnessSpec>>,
}

impl StiffnessSpec {
    /// Convert to a [`StiffnessModel`]; `angular` selects the rotational unit names.
    pub fn to_model(&self, name: &str, angular: bool) -> Result<StiffnessModel> {
        let (k_name, c_name) = if angular {
            ("stiffness_nm_per_rad", "damping_nms_per_rad")
        } else {
            ("stiffness_n_per_m", "damping_ns_per_m")
        };
        let (k, c, wrong_k, wrong_c) = if angular {
            (
                self.stiffness_nm_per_rad,
                self.damping_nms_per_rad,
                self.stiffness_n_per_m,
                self.damping_ns_per_m,
            )
        } else {
            (
                self.stiffness_n_per_m,
                self.damping_ns_per_m,
                self.stiffness_nm_per_rad,
                self.damping_nms_per_rad,
            )
        };
        if wrong_k.is_some() || wrong_c.is_some() {
            return Err(Error::invalid(
                name.to_string(),
                format!(
                    "use {k_name} / {c_name} here (the other unit family belongs to the other kind of spring)"
                ),
            ));
        }
        let forms = [
            k.is_some() || c.is_some(),
            self.zener.is_some(),
            self.table.is_some(),
            self.half_space.is_some(),
            self.series.is_some(),
            self.parallel.is_some(),
        ];
        let count = forms.iter().filter(|b| **b).count();
        if count != 1 {
            return Err(Error::invalid(
                name.to_string(),
                format!(
                    "give exactly one stiffness: {k_name} (with loss_factor and/or {c_name}), zener, table, half_space, series or parallel; found {count}"
                ),
            ));
        }
        let m = if let Some(z) = &self.zener {
            if self.loss_factor.is_some() {
                return Err(Error::invalid(
                    format!("{name}.loss_factor"),
                    "not used with zener (its loss follows from k0, k_inf, tau_s)",
                ));
            }
            match z.alpha {
                None => StiffnessModel::Zener { k0: z.k0, k_inf: z.k_inf, tau_s: z.tau_s },
                Some(alpha) => {
                    StiffnessModel::FractionalZener { k0: z.k0, k_inf: z.k_inf, tau_s: z.tau_s, alpha }
                }
            }
        } else if let Some(h) = &self.half_space {
            if self.loss_factor.is_some() {
                return Err(Error::invalid(
                    format!("{name}.loss_factor"),
                    "not used with half_space (give half_space.loss_factor)",
                ));
            }
            StiffnessModel::HalfSpace(h.clone())
        } else if let Some(t) = &self.table {
            let ks = if angular { &t.stiffness_nm_per_rad } else { &t.stiffness_n_per_m };
            let ks = ks
                .clone()
                .ok_or_else(|| Error::invalid(format!("{name}.table"), format!("needs {k_name}")))?;
            StiffnessModel::Table { freq_hz: t.freq_hz.clone(), k: ks, loss_factor: t.loss_factor.clone() }
        } else if let Some(parts) = self.series.as_ref().or(self.parallel.as_ref()) {
            let kind = if self.series.is_some() { "series" } else { "parallel" };
            let ms = parts
                .iter()
                .enumerate()
                .map(|(i, p)| p.to_model(&format!("{name}.{kind}[{i}]"), angular))
                .collect::<Result<Vec<_>>>()?;
            if self.series.is_some() { StiffnessModel::Series(ms) } else { StiffnessModel::Parallel(ms) }
        } else {
            let eta = self.loss_factor.unwrap_or(0.0);
            match (k, c) {
                (Some(k), None) => StiffnessModel::Hysteretic { k, loss_factor: eta },
                (Some(k), Some(c)) if eta == 0.0 => StiffnessModel::KelvinVoigt { k, c },
                (Some(k), Some(c)) => StiffnessModel::Parallel(vec![
                    StiffnessModel::Hysteretic { k, loss_factor: eta },
                    StiffnessModel::KelvinVoigt { k: 0.0, c },
                ]),
                _ => return Err(Error::invalid(format!("{name}.{k_name}"), "is required")),
            }
        };
        m.validate(name)?;
        Ok(m)
    }

    /// The spec of a model (inverse of [`to_model`](Self::to_model) for display).
    pub fn from_model(m: &StiffnessModel, angular: bool) -> StiffnessSpec {
        let mut s = StiffnessSpec::default();
        let set_k = |s: &mut StiffnessSpec, k: f64| {
            if angular { s.stiffness_nm_per_rad = Some(k) } else { s.stiffness_n_per_m = Some(k) }
        };
        match m {
            StiffnessModel::Hysteretic { k, loss_factor } => {
                set_k(&mut s, *k);
                if *loss_factor != 0.0 {
                    s.loss_factor = Some(*loss_factor);
                }
            }
            StiffnessModel::KelvinVoigt { k, c } => {
                set_k(&mut s, *k);
                if angular { s.damping_nms_per_rad = Some(*c) } else { s.damping_ns_per_m = Some(*c) }
            }
            StiffnessModel::Zener { k0, k_inf, tau_s } => {
                s.zener = Some(ZenerSpec { k0: *k0, k_inf: *k_inf, tau_s: *tau_s, alpha: None })
            }
            StiffnessModel::FractionalZener { k0, k_inf, tau_s, alpha } => {
                s.zener = Some(ZenerSpec { k0: *k0, k_inf: *k_inf, tau_s: *tau_s, alpha: Some(*alpha) })
            }
            StiffnessModel::Table { freq_hz, k, loss_factor } => {
                s.table = Some(TableSpec {
                    freq_hz: freq_hz.clone(),
                    stiffness_n_per_m: (!angular).then(|| k.clone()),
                    stiffness_nm_per_rad: angular.then(|| k.clone()),
                    loss_factor: loss_factor.clone(),
                })
            }
            StiffnessModel::HalfSpace(h) => s.half_space = Some(h.clone()),
            StiffnessModel::Series(p) => {
                s.series = Some(p.iter().map(|m| Self::from_model(m, angular)).collect())
            }
            StiffnessModel::Parallel(p) => {
                s.parallel = Some(p.iter().map(|m| Self::from_model(m, angular)).collect())
            }
        }
        s
    }
}

//! `[ground]` and what a stand stands on: an elastic half-space under each contact
//! ([`crate::soil`]), or rigid ground whose contacts move with the ground motion.

use crate::error::{Error, Result, require_non_negative};
use crate::soil::{Radiation, Soil};
use crate::surface_waves::{GroundWaves, rayleigh_speed_ratio};
use serde::{Deserialize, Serialize};

/// What a tripod or pier stands on.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Support {
    /// The `[ground]` (soil or rigid).
    #[default]
    Ground,
    /// The `[floor]` deck body.
    Floor,
}

/// Ground model.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum GroundKind {
    /// Elastic half-space under each contact.
    #[default]
    Soil,
    /// Rigid (paver, slab): contacts move with the ground motion.
    Rigid,
}

/// `radiation_damping`: `false` (default), `true` or `"dashpots"` (constant dashpots), or
/// `"frequency"` (the a0-dependent impedance of [`crate::soil::FootingImpedance`]).
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
#[serde(untagged)]
pub enum RadiationSpec {
    Flag(bool),
    Name(String),
}

impl RadiationSpec {
    fn radiation(&self) -> Result<Radiation> {
        Ok(match self {
            RadiationSpec::Flag(false) => Radiation::Off,
            RadiationSpec::Flag(true) => Radiation::Dashpots,
            RadiationSpec::Name(n) => match n.as_str() {
                "dashpots" => Radiation::Dashpots,
                "frequency" => Radiation::Frequency,
                _ => {
                    return Err(Error::invalid(
                        "ground.radiation_damping",
                        format!("must be true, false, \"dashpots\" or \"frequency\", got \"{n}\""),
                    ));
                }
            },
        })
    }
}

/// `[ground]`: what is under the feet or footing.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct GroundSpec {
    /// `soil` (default) or `rigid`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub kind: Option<GroundKind>,
    /// Soil preset name (see [`crate::soil::SOIL_PRESETS`]) ...
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub soil: Option<String>,
    /// ... or explicit half-space properties.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub soil_properties: Option<Soil>,
    /// Contact radius of each tripod foot on the soil (m).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub contact_radius_m: Option<f64>,
    /// Radiation damping: none (default), constant dashpots (`true`, an upper bound for light
    /// contacts), or `"frequency"` (stiffness and damping as functions of a0).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub radiation_damping: Option<RadiationSpec>,
    /// Phase velocity of the surface waves (m/s) that tilt and twist the ground; default the
    /// Rayleigh-wave speed of the soil, none on rigid ground. 0 leaves ground rotation out.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub phase_velocity_m_s: Option<f64>,
    /// Luco–Wong incoherence α of the ground motion between feet (default none: coherent).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub incoherence: Option<f64>,
}

impl GroundSpec {
    /// How ground motion travels under the rig ([`GroundWaves`]): the given phase velocity, or
    /// the Rayleigh-wave speed of the soil; None on rigid ground without one, or when it is 0.
    pub(super) fn waves(&self) -> Result<Option<GroundWaves>> {
        let soil = self.soil()?.map(|(s, _)| s);
        let vs = soil.as_ref().map(Soil::shear_wave_speed_m_s);
        let c = match (self.phase_velocity_m_s, &soil) {
            (Some(c), _) => {
                require_non_negative("ground.phase_velocity_m_s", c)?;
                c
            }
            (None, Some(s)) => rayleigh_speed_ratio(s.poisson_ratio)? * s.shear_wave_speed_m_s(),
            (None, None) => {
                if self.incoherence.is_some() {
                    return Err(Error::invalid(
                        "ground.incoherence",
                        "needs a phase_velocity_m_s on rigid ground",
                    ));
                }
                return Ok(None);
            }
        };
        if c == 0.0 {
            return Ok(None);
        }
        let w =
            GroundWaves { phase_velocity_m_s: c, incoherence: self.incoherence, shear_wave_speed_m_s: vs };
        w.validate("ground")?;
        Ok(Some(w))
    }

    /// The soil, or None for rigid ground; with it how radiation damping is modelled.
    pub(super) fn soil(&self) -> Result<Option<(Soil, Radiation)>> {
        match self.kind.unwrap_or_default() {
            GroundKind::Rigid => {
                if self.soil.is_some() || self.soil_properties.is_some() {
                    return Err(Error::invalid("ground.soil", "not used with kind = \"rigid\""));
                }
                Ok(None)
            }
            GroundKind::Soil => {
                let s = match (&self.soil, &self.soil_properties) {
                    (Some(n), None) => Soil::preset(n)?,
                    (None, Some(s)) => s.clone(),
                    (None, None) => {
                        return Err(Error::invalid(
                            "ground.soil",
                            "is required (a preset name, soil_properties, or kind = \"rigid\")",
                        ));
                    }
                    (Some(_), Some(_)) => {
                        return Err(Error::invalid("ground.soil", "give soil or soil_properties, not both"));
                    }
                };
                s.validate("ground.soil_properties")?;
                let rad = match &self.radiation_damping {
                    Some(r) => r.radiation()?,
                    None => Radiation::Off,
                };
                Ok(Some((s, rad)))
            }
        }
    }
}

//! Rig builders: payload, mount head, tripod, pads, ground, pier, floor → generic model.
//! (Placeholder types; the real builders replace them.)

use crate::assembly::{ModelSpec, OpticsSpec};
use crate::error::{Error, Result};
use serde::{Deserialize, Serialize};

/// Placeholder section types (replaced by the real builders).
pub type PayloadSpec = toml::Value;
pub type MountSpec = toml::Value;
pub type TripodSpec = toml::Value;
pub type PadSpec = toml::Value;
pub type GroundSpec = toml::Value;
pub type PierSpec = toml::Value;
pub type FloorSpec = toml::Value;

/// The rig layer of a model file.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RigSpec {
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub payload: Option<PayloadSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub mount: Option<MountSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub tripod: Option<TripodSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub pads: Option<PadSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub ground: Option<GroundSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub pier: Option<PierSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub floor: Option<FloorSpec>,
}

impl RigSpec {
    /// True when no rig section is present.
    pub fn is_empty(&self) -> bool {
        self == &RigSpec::default()
    }

    /// Expand into generic-layer bodies, nodes, springs and beams (posed for the optics'
    /// pointing when given).
    pub fn expand(&self, _optics: Option<&OpticsSpec>) -> Result<ModelSpec> {
        if self.is_empty() {
            return Ok(ModelSpec::default());
        }
        Err(Error::unsupported("the rig layer is not available yet"))
    }
}

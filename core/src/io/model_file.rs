//! The TOML model file: a generic layer (`[[body]]`, `[[node]]`, `[[spring]]`,
//! `[[torsion_spring]]`, `[[general_spring]]`, `[[beam]]`, `[optics]`, `[wind]`) and a rig layer
//! (`[payload]`, `[mount]`, `[tripod]`, `[pads]`, `[ground]`, `[pier]`, `[floor]`) that expands
//! into the generic one. Unknown keys are errors naming the key and line. See
//! docs/model-file.md.

use crate::assembly::{
    BeamSpec, BodySpec, GeneralSpringSpec, ModelSpec, NodeSpec, OpticsSpec, SpringSpec, WindLoadSpec,
};
use crate::error::{Error, Result};
use crate::model::Model;
use crate::rig::RigSpec;
use serde::{Deserialize, Serialize};

/// Largest model file accepted (bytes).
pub const MAX_MODEL_FILE_BYTES: usize = 16 << 20;

/// A whole model file, both layers.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ModelFile {
    /// Free text describing the model.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub title: Option<String>,
    #[serde(default, rename = "body", skip_serializing_if = "Vec::is_empty")]
    pub bodies: Vec<BodySpec>,
    #[serde(default, rename = "node", skip_serializing_if = "Vec::is_empty")]
    pub nodes: Vec<NodeSpec>,
    #[serde(default, rename = "spring", skip_serializing_if = "Vec::is_empty")]
    pub springs: Vec<SpringSpec>,
    #[serde(default, rename = "torsion_spring", skip_serializing_if = "Vec::is_empty")]
    pub torsion_springs: Vec<SpringSpec>,
    #[serde(default, rename = "general_spring", skip_serializing_if = "Vec::is_empty")]
    pub general_springs: Vec<GeneralSpringSpec>,
    #[serde(default, rename = "beam", skip_serializing_if = "Vec::is_empty")]
    pub beams: Vec<BeamSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub optics: Option<OpticsSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub wind: Option<WindLoadSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub payload: Option<crate::rig::PayloadSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub mount: Option<crate::rig::MountSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub tripod: Option<crate::rig::TripodSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub pads: Option<crate::rig::PadSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub ground: Option<crate::rig::GroundSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub pier: Option<crate::rig::PierSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub floor: Option<crate::rig::FloorSpec>,
}

/// Line (1-based) and column of a byte offset.
fn line_col(text: &str, offset: usize) -> (usize, usize) {
    let offset = offset.min(text.len());
    let before = &text[..offset];
    let line = before.matches('\n').count() + 1;
    let col = before.rfind('\n').map_or(offset, |p| offset - p - 1) + 1;
    (line, col)
}

/// Byte offset of a line `key = ...` (or `key.sub = ...`) in the table that starts at `start`
/// (up to the next table header).
fn find_key(text: &str, start: usize, key: &str) -> Option<usize> {
    let region = text.get(start..)?;
    let mut off = start;
    for (i, line) in region.split_inclusive('\n').enumerate() {
        let t = line.trim_start();
        if i > 0 && t.starts_with('[') {
            break;
        }
        if let Some(rest) = t.strip_prefix(key) {
            let rest = rest.trim_start();
            if rest.starts_with('=') || rest.starts_with('.') {
                return Some(off + (line.len() - t.len()));
            }
        }
        off += line.len();
    }
    None
}

impl ModelFile {
    /// Parse TOML text; `file` names the source in errors.
    pub fn parse(text: &str, file: &str) -> Result<ModelFile> {
        if text.len() > MAX_MODEL_FILE_BYTES {
            return Err(Error::TooLarge {
                what: format!("size of {file} (bytes)"),
                value: text.len(),
                limit: MAX_MODEL_FILE_BYTES,
            });
        }
        toml::from_str::<ModelFile>(text).map_err(|e| {
            let msg = e.message().trim().to_string();
            let location = match e.span() {
                Some(s) => {
                    // For an unknown key the span covers its table: point at the key itself.
                    let key_at = msg
                        .strip_prefix("unknown field `")
                        .and_then(|r| r.split('`').next())
                        .and_then(|key| find_key(text, s.start, key));
                    let (l, c) = line_col(text, key_at.unwrap_or(s.start));
                    format!("line {l}, column {c}")
                }
                None => "unknown line".into(),
            };
            Error::Parse { file: file.into(), location, reason: msg }
        })
    }

    /// Read and parse a file.
    pub fn read(path: &std::path::Path) -> Result<ModelFile> {
        let name = path.display().to_string();
        let meta =
            std::fs::metadata(path).map_err(|e| Error::Io { path: name.clone(), reason: e.to_string() })?;
        if meta.len() as usize > MAX_MODEL_FILE_BYTES {
            return Err(Error::TooLarge {
                what: format!("size of {name} (bytes)"),
                value: meta.len() as usize,
                limit: MAX_MODEL_FILE_BYTES,
            });
        }
        let text = std::fs::read_to_string(path)
            .map_err(|e| Error::Io { path: name.clone(), reason: e.to_string() })?;
        Self::parse(&text, &name)
    }

    /// The rig layer of this file.
    pub fn rig(&self) -> RigSpec {
        RigSpec {
            payload: self.payload.clone(),
            mount: self.mount.clone(),
            tripod: self.tripod.clone(),
            pads: self.pads.clone(),
            ground: self.ground.clone(),
            pier: self.pier.clone(),
            floor: self.floor.clone(),
        }
    }

    /// The generic model: the rig layer expanded, followed by the file's own generic entries.
    pub fn expanded(&self) -> Result<ModelSpec> {
        let mut spec = self.rig().expand(self.optics.as_ref())?;
        spec.bodies.extend(self.bodies.iter().cloned());
        spec.nodes.extend(self.nodes.iter().cloned());
        spec.springs.extend(self.springs.iter().cloned());
        spec.torsion_springs.extend(self.torsion_springs.iter().cloned());
        spec.general_springs.extend(self.general_springs.iter().cloned());
        spec.beams.extend(self.beams.iter().cloned());
        if self.optics.is_some() {
            spec.optics = self.optics.clone();
        }
        if self.wind.is_some() {
            spec.wind = self.wind.clone();
        }
        Ok(spec)
    }

    /// Expand and assemble.
    pub fn to_model(&self) -> Result<Model> {
        Model::from_spec(&self.expanded()?)
    }
}

/// The generic-layer TOML of a spec (what a rig file expands to), for users to inspect and edit.
pub fn spec_to_toml(spec: &ModelSpec) -> Result<String> {
    toml::to_string_pretty(spec).map_err(|e| Error::invalid("model", format!("cannot write TOML: {e}")))
}

impl Model {
    /// Build from model-file text (`file` names the source in errors).
    pub fn from_toml_str(text: &str, file: &str) -> Result<Model> {
        ModelFile::parse(text, file)?.to_model()
    }

    /// Build from a model file on disk.
    pub fn from_toml_path(path: &std::path::Path) -> Result<Model> {
        ModelFile::read(path)?.to_model()
    }
}

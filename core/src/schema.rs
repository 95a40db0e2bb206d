//! The model file: its schema, and reading, expanding and writing it.
//!
//! A model file (TOML) has a generic layer ([`ModelSpec`]: `[[body]]`, `[[node]]`, `[[spring]]`,
//! `[[torsion_spring]]`, `[[general_spring]]`, `[[beam]]`, `[optics]`, `[wind]`) and a rig layer
//! ([`RigSpec`]: `[payload]`, `[mount]`, `[tripod]`, `[pads]`, `[ground]`, `[pier]`, `[floor]`)
//! that expands into the generic one, side by side at the top level with an optional `title`.
//! Unknown keys are errors naming the key and line. See docs/model-file.md.

use crate::assembly::ModelSpec;
use crate::error::{Error, Result};
use crate::io::read_text_capped;
use crate::io::toml_doc::{read_shared, struct_fields};
use crate::model::Model;
use crate::rig::{MountKind, RigSpec};
use crate::sky::PierSide;
use serde::{Deserialize, Serialize};

/// Largest model file accepted (bytes).
pub const MAX_MODEL_FILE_BYTES: usize = 16 << 20;

/// A whole model file: its title and both layers, each written at the top level of the file.
#[derive(Debug, Clone, Default, PartialEq, Serialize)]
pub struct ModelFile {
    /// Free text describing the model.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub title: Option<String>,
    /// The generic layer as written in the file (without the rig's expansion).
    #[serde(flatten)]
    pub generic: ModelSpec,
    /// The rig layer.
    #[serde(flatten)]
    pub rig: RigSpec,
}

/// A pointing that replaces the file's own (`[optics]`) before the rig layer is expanded, so the
/// payload is posed for it exactly as if the file had been edited. `None` keeps the file's value.
/// Alt-azimuth pointings take `altitude_deg`/`azimuth_deg`, equatorial ones `hour_angle_deg`,
/// `declination_deg` and `pier_side`.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct Pointing {
    pub altitude_deg: Option<f64>,
    pub azimuth_deg: Option<f64>,
    pub hour_angle_deg: Option<f64>,
    pub declination_deg: Option<f64>,
    pub pier_side: Option<PierSide>,
    /// The azimuth the wind blows from (deg), for a wind load derived from the rig's parts
    /// ([`ModelFile::set_wind_from`]): it turns with the pointing like the parts do.
    pub wind_from_deg: Option<f64>,
}

impl Pointing {
    /// True when nothing is overridden.
    pub fn is_empty(&self) -> bool {
        self == &Pointing::default()
    }
}

/// The one top-level key outside the two layers.
#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct Head {
    #[serde(default)]
    title: Option<String>,
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
        let mut f = ModelFile::default();
        let shares = [struct_fields::<Head>(), struct_fields::<ModelSpec>(), struct_fields::<RigSpec>()];
        read_shared(text, file, &shares, |i, d| {
            match i {
                0 => f.title = Head::deserialize(d)?.title,
                1 => f.generic = ModelSpec::deserialize(d)?,
                _ => f.rig = RigSpec::deserialize(d)?,
            }
            Ok(())
        })?;
        Ok(f)
    }

    /// Read and parse a file.
    pub fn read(path: &std::path::Path) -> Result<ModelFile> {
        let text = read_text_capped(path, MAX_MODEL_FILE_BYTES)?;
        Self::parse(&text, &path.display().to_string())
    }

    /// Replace the pointing of `[optics]` (see [`Pointing`]) and the wind's direction; the rig
    /// layer poses the payload and derives the wind parts for them when the file is expanded.
    /// An empty override changes nothing.
    pub fn repoint(&mut self, p: &Pointing) -> Result<()> {
        if let Some(az) = p.wind_from_deg {
            self.set_wind_from(az)?;
        }
        let p = &Pointing { wind_from_deg: None, ..*p };
        if p.is_empty() {
            return Ok(());
        }
        let o = self.generic.optics.as_mut().ok_or_else(|| {
            Error::invalid("optics", "the model has no [optics] section to take a pointing")
        })?;
        let altaz = p.altitude_deg.is_some() || p.azimuth_deg.is_some();
        let equatorial = p.hour_angle_deg.is_some() || p.declination_deg.is_some() || p.pier_side.is_some();
        let file_equatorial = o.hour_angle_deg.is_some()
            || self.rig.mount.as_ref().is_some_and(|m| m.kind == Some(MountKind::Equatorial));
        if altaz && (equatorial || file_equatorial) {
            return Err(Error::invalid(
                "pointing",
                "this model is pointed by hour angle, declination and pier side, not altitude and azimuth",
            ));
        }
        if equatorial && !file_equatorial {
            return Err(Error::invalid(
                "pointing",
                "this model is pointed by altitude and azimuth (hour angle and declination need an equatorial mount or optics.latitude_deg)",
            ));
        }
        if p.altitude_deg.is_some() {
            o.altitude_deg = p.altitude_deg;
        }
        if p.azimuth_deg.is_some() {
            o.azimuth_deg = p.azimuth_deg;
        }
        if equatorial {
            o.hour_angle_deg = p.hour_angle_deg.or(o.hour_angle_deg);
            o.declination_deg = p.declination_deg.or(o.declination_deg);
            o.pier_side = p.pier_side.or(o.pier_side);
            if p.hour_angle_deg.is_some() && p.pier_side.is_none() && self.rig.mount.is_some() {
                // A new hour angle takes its usual side unless one is given.
                o.pier_side = None;
            }
            // Derived values of the old pointing (as an expanded file carries them) go.
            o.altitude_deg = None;
            o.azimuth_deg = None;
        }
        if file_equatorial && self.rig.mount.is_some() {
            // The rig layer checks an equatorial pointing against the mount when it expands.
            return Ok(());
        }
        o.validate()
    }

    /// Set the azimuth the wind blows from (deg from north through east) for the wind load the
    /// rig layer derives from its parts. Refused when the file's own `[wind]` section fixes the
    /// load (remove it to derive the wind from the parts) or when there is no rig layer.
    pub fn set_wind_from(&mut self, from_azimuth_deg: f64) -> Result<()> {
        crate::error::require_finite("wind from_azimuth_deg", from_azimuth_deg)?;
        if self.generic.wind.is_some() {
            return Err(Error::invalid(
                "wind direction",
                "the model's [wind] section fixes the load and its direction; remove it to derive the wind from the rig's parts",
            ));
        }
        if self.rig.mount.is_none() {
            return Err(Error::invalid(
                "wind direction",
                "needs a rig layer ([mount] and a stand) to derive the wind from",
            ));
        }
        let w = self.rig.wind_load.get_or_insert_with(Default::default);
        if w.derive == Some(false) {
            return Err(Error::invalid(
                "wind direction",
                "wind_load.derive = false: the model takes no wind",
            ));
        }
        w.from_azimuth_deg = Some(from_azimuth_deg);
        Ok(())
    }

    /// The generic model: the rig layer expanded, followed by the file's own generic entries.
    pub fn expanded(&self) -> Result<ModelSpec> {
        let g = &self.generic;
        let mut spec = self.rig.expand(g.optics.as_ref())?;
        spec.bodies.extend(g.bodies.iter().cloned());
        spec.nodes.extend(g.nodes.iter().cloned());
        spec.springs.extend(g.springs.iter().cloned());
        spec.torsion_springs.extend(g.torsion_springs.iter().cloned());
        spec.general_springs.extend(g.general_springs.iter().cloned());
        spec.beams.extend(g.beams.iter().cloned());
        // The optics come back from the rig layer (with an equatorial pointing's altitude and
        // azimuth filled in).
        if g.wind.is_some() {
            spec.wind = g.wind.clone();
        }
        // A hand-written [ground_waves] overrides what [ground] implies.
        if g.ground_waves.is_some() {
            spec.ground_waves = g.ground_waves.clone();
        }
        Ok(spec)
    }

    /// Expand and assemble.
    pub fn to_model(&self) -> Result<Model> {
        Model::from_spec(&self.expanded()?)
    }

    /// The file as TOML (both layers as written, not expanded).
    pub fn to_toml(&self) -> Result<String> {
        write_toml(self)
    }
}

/// The generic-layer TOML of a spec (what a rig file expands to), for users to inspect and edit.
pub fn spec_to_toml(spec: &ModelSpec) -> Result<String> {
    write_toml(spec)
}

fn write_toml<T: Serialize>(value: &T) -> Result<String> {
    toml::to_string_pretty(value).map_err(|e| Error::invalid("model", format!("cannot write TOML: {e}")))
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

#[cfg(test)]
mod tests {
    use super::*;

    const EXAMPLES: [&str; 5] = [
        "tripod-lawn.toml",
        "tripod-paver.toml",
        "tripod-paver-generic.toml",
        "pier.toml",
        "equatorial-pier.toml",
    ];

    fn example(name: &str) -> std::path::PathBuf {
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../docs/examples").join(name)
    }

    #[test]
    fn written_file_reads_back_the_same() {
        for name in EXAMPLES {
            let f = ModelFile::read(&example(name)).unwrap();
            assert!(f.title.is_some(), "{name}");
            let again = ModelFile::parse(&f.to_toml().unwrap(), name).unwrap();
            assert_eq!(again, f, "{name}");
        }
    }

    #[test]
    fn layers_land_in_their_parts() {
        let f = ModelFile::read(&example("pier.toml")).unwrap();
        assert!(f.rig.pier.is_some() && f.rig.mount.is_some() && f.generic.optics.is_some());
        assert!(f.generic.bodies.is_empty() && f.rig.tripod.is_none());
        let g = ModelFile::read(&example("tripod-paver-generic.toml")).unwrap();
        assert!(g.rig.is_empty() && !g.generic.bodies.is_empty() && !g.generic.springs.is_empty());
    }

    #[test]
    fn errors_name_the_first_bad_entry_in_key_order_across_layers() {
        // Messages and places as the single-struct reader gave them before the schema moved
        // here: the first bad top-level entry in key order wins, whichever layer it is in.
        let body =
            "[[body]]\nname = \"a\"\nmass_kg = \"heavy\"\ncg_m = [0, 0, 0]\ninertia_kgm2 = [1, 1, 1]\n";
        for (text, location, reason) in [
            (
                format!("[tripod]\nlegs = \"x\"\n{body}"),
                "line 5, column 11",
                "invalid type: string \"heavy\", expected f64",
            ),
            (
                "zzz = 1\n[tripod]\nlegs = \"x\"\n".into(),
                "line 3, column 8",
                "invalid type: string \"x\", expected usize",
            ),
            (
                "title = 5\nwind = 3\n".into(),
                "line 1, column 9",
                "invalid type: integer `5`, expected a string",
            ),
            (
                "payload = 3\nbody = 3\n".into(),
                "line 2, column 8",
                "invalid type: integer `3`, expected a sequence",
            ),
        ] {
            let e = ModelFile::parse(&text, "m.toml").unwrap_err();
            assert_eq!(
                e,
                Error::Parse { file: "m.toml".into(), location: location.into(), reason: reason.into() },
                "{text}"
            );
        }
    }

    #[test]
    fn unknown_top_level_key_lists_title_and_both_layers() {
        let e = ModelFile::parse("title = \"t\"\nwobble = 1\n", "m.toml").unwrap_err();
        let Error::Parse { file, location, reason } = e else { panic!("{e:?}") };
        assert_eq!((file.as_str(), location.as_str()), ("m.toml", "line 2, column 1"));
        assert_eq!(
            reason,
            "unknown field `wobble`, expected one of `title`, `body`, `node`, `spring`, `torsion_spring`, \
             `general_spring`, `beam`, `optics`, `wind`, `ground_waves`, `payload`, `mount`, `tripod`, `pads`, `ground`, \
             `pier`, `floor`, `wind_load`"
        );
    }
}

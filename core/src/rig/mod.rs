//! Rig builders: payload, mount head, tripod, pads, ground, pier, floor → generic model.
//!
//! A rig file names hardware (`[payload]`, `[mount]`, `[tripod]`, `[pads]`, `[ground]`,
//! `[pier]`, `[floor]`); [`RigSpec::expand`] turns it into the generic layer
//! ([`ModelSpec`]: bodies, nodes, springs, beams) that [`crate::model::Model::from_spec`]
//! assembles. `stillsky::schema::spec_to_toml(&spec)` prints the expansion, so every number the
//! builders choose can be read and edited. Keys, units and defaults: docs/model-file.md.
//!
//! Geometry (x east, y north, z up, m). z = 0 is the surface the rig stands on: the soil or
//! paver surface, or the base of a pier footing. The rig's vertical axis is the z axis.
//!
//! One file per part: `payload.rs` (one rigid body posed for the pointing), `mount.rs` (the
//! head body and the pivot springs to the payload), `tripod.rs` (legs, feet, pads under the
//! feet), `ground.rs` (soil or rigid), `pier.rs` (a column on a footing) and `floor.rs` (a deck
//! body on springs). Shared pieces: `mass.rs` (mass properties), `elements.rs` (the bodies and
//! springs written out) and `fields.rs` (reading optional keys with named errors).

mod elements;
mod fields;
mod floor;
mod ground;
mod mass;
mod mount;
mod payload;
mod pier;
mod tripod;
mod wind;

pub use floor::FloorSpec;
pub use ground::{GroundKind, GroundSpec, Support};
pub use mount::{DEFAULT_PIVOT_TRANSLATIONAL_STIFFNESS_N_PER_M, MountKind, MountSpec};
pub use payload::{PartAxis, PartKind, PartSpec, PayloadSpec, payload_frame};
pub use pier::{DEFAULT_FOOTING_DENSITY_KG_M3, FootingSpec, PierSpec};
pub use tripod::{PadSpec, TripodGeometry, TripodSpec};
pub use wind::{
    BAR_DRAG_COEFFICIENT, BOX_DRAG_COEFFICIENT, CYLINDER_DRAG_COEFFICIENT, DEFAULT_WIND_FROM_AZIMUTH_DEG,
    DISC_DRAG_COEFFICIENT, WindLoadRigSpec, wind_toward,
};

use crate::assembly::{GROUND, ModelSpec, OpticsSpec};
use crate::error::{Error, Result};
use crate::sky::{Equatorial, PierSide};
use crate::soil::Soil;
use elements::to_body;
use fields::{body_name, pos, pos_or};
use mass::{Mass, combine};
use serde::{Deserialize, Serialize};
use tripod::{TripodPlan, foot_contact};
use wind::WindParts;

/// The pointing the payload is posed for.
enum Pose {
    AltAz { alt: f64, az: f64 },
    Equatorial { q: Equatorial, side: PierSide },
}

impl Pose {
    /// The pointing of `optics` for this mount: altitude and azimuth for an alt-azimuth head,
    /// hour angle, declination and pier side for an equatorial one (the latitude from
    /// `[mount]`). Without optics: the zenith, on an equatorial head at hour angle 0.
    fn new(mount: &MountSpec, optics: Option<&OpticsSpec>) -> Result<Pose> {
        match mount.kind()? {
            MountKind::Altazimuth => match optics {
                Some(o) => {
                    if o.hour_angle_deg.is_some() || o.declination_deg.is_some() {
                        return Err(Error::invalid(
                            "optics.hour_angle_deg",
                            "an alt-azimuth mount is pointed by altitude_deg and azimuth_deg (or set mount.kind = \"equatorial\")",
                        ));
                    }
                    o.validate()?;
                    let (alt, az) = o.altitude_deg.zip(o.azimuth_deg).ok_or_else(|| {
                        Error::invalid("optics.altitude_deg", "is required (with azimuth_deg)")
                    })?;
                    Ok(Pose::AltAz { alt, az })
                }
                None => Ok(Pose::AltAz { alt: 90.0, az: 0.0 }),
            },
            MountKind::Equatorial => {
                let lat = mount.latitude()?;
                let (ha, dec, side) = match optics {
                    Some(o) => {
                        if o.latitude_deg.is_some() {
                            return Err(Error::invalid(
                                "optics.latitude_deg",
                                "an equatorial rig takes the site latitude from mount.latitude_deg",
                            ));
                        }
                        if o.altitude_deg.is_some() || o.azimuth_deg.is_some() {
                            return Err(Error::invalid(
                                "optics.altitude_deg",
                                "an equatorial mount is pointed by hour_angle_deg, declination_deg (and pier_side)",
                            ));
                        }
                        let ha = o.hour_angle_deg.ok_or_else(|| {
                            Error::invalid("optics.hour_angle_deg", "is required on an equatorial mount")
                        })?;
                        let dec = o.declination_deg.ok_or_else(|| {
                            Error::invalid("optics.declination_deg", "is required on an equatorial mount")
                        })?;
                        (ha, dec, o.pier_side)
                    }
                    None => (0.0, lat, None),
                };
                let q = Equatorial::new(lat, ha, dec).map_err(|e| match e {
                    Error::InvalidArgument { name, reason } => Error::InvalidArgument {
                        name: if name == "latitude_deg" {
                            format!("mount.{name}")
                        } else {
                            format!("optics.{name}")
                        },
                        reason,
                    },
                    other => other,
                })?;
                Ok(Pose::Equatorial { q, side: side.unwrap_or_else(|| PierSide::usual(ha)) })
            }
        }
    }

    /// The payload frame [â, e_s, e_u].
    fn frame(&self) -> [[f64; 3]; 3] {
        match self {
            Pose::AltAz { alt, az } => payload_frame(*alt, *az),
            Pose::Equatorial { q, side } => {
                let a = q.line_of_sight();
                let s = q.dec_axis(*side);
                let u = [s[1] * a[2] - s[2] * a[1], s[2] * a[0] - s[0] * a[2], s[0] * a[1] - s[1] * a[0]];
                [a, s, u]
            }
        }
    }
}

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
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub wind_load: Option<WindLoadRigSpec>,
}

impl RigSpec {
    /// True when no rig section is present.
    pub fn is_empty(&self) -> bool {
        self == &RigSpec::default()
    }

    /// Expand into generic-layer bodies, nodes, springs and beams, posed for the optics'
    /// pointing (zenith when `optics` is `None`). The result carries `optics` unchanged.
    pub fn expand(&self, optics: Option<&OpticsSpec>) -> Result<ModelSpec> {
        let mut out = ModelSpec { optics: optics.cloned(), ..Default::default() };
        if self.is_empty() {
            return Ok(out);
        }
        let pose = match &self.mount {
            Some(m) => Pose::new(m, optics)?,
            None => {
                if let Some(o) = optics {
                    o.validate()?;
                }
                Pose::AltAz { alt: 90.0, az: 0.0 }
            }
        };
        if let (Some(o), Pose::Equatorial { q, side, .. }) = (out.optics.as_mut(), &pose) {
            // The generic layer's optics carry the pointing in both forms.
            let (h, a) = q.alt_az();
            o.altitude_deg = Some(h);
            o.azimuth_deg = Some(a);
            o.latitude_deg = Some(q.latitude_deg);
            o.pier_side = Some(*side);
            o.validate()?;
        }
        if self.tripod.is_some() && self.pier.is_some() {
            return Err(Error::invalid("pier", "a rig has either [tripod] or [pier], not both"));
        }
        if self.pads.is_some() && self.tripod.is_none() {
            return Err(Error::invalid("pads", "pads go under tripod feet; there is no [tripod]"));
        }
        if self.payload.is_some() && self.mount.is_none() {
            return Err(Error::invalid(
                "mount",
                "is required to carry the payload (the pivot is on the mount)",
            ));
        }
        if self.mount.is_some() && self.tripod.is_none() && self.pier.is_none() {
            return Err(Error::invalid("tripod", "the mount needs a [tripod] or a [pier] to stand on"));
        }
        let stand_on = self
            .tripod
            .as_ref()
            .map(|t| (t.on.unwrap_or_default(), "tripod.on"))
            .or_else(|| self.pier.as_ref().map(|p| (p.on.unwrap_or_default(), "pier.on")));
        if self.ground.is_some() && !matches!(stand_on, Some((Support::Ground, _))) {
            return Err(Error::invalid(
                "ground",
                "nothing stands on the ground (no tripod or pier with on = \"ground\")",
            ));
        }

        if self.pier.is_some() && self.ground.as_ref().is_some_and(|g| g.contact_radius_m.is_some()) {
            return Err(Error::invalid(
                "ground.contact_radius_m",
                "is for tripod feet; a pier footing's size sets its contact",
            ));
        }
        // Floor.
        let floor = match &self.floor {
            Some(f) => Some(f.build(&mut out)?),
            None => None,
        };
        // The stand's support surface.
        let (support, support_z) = match stand_on {
            None => (GROUND.to_string(), 0.0),
            Some((Support::Ground, _)) => (GROUND.to_string(), 0.0),
            Some((Support::Floor, field)) => match &floor {
                Some((name, z)) => (name.clone(), *z),
                None => return Err(Error::invalid(field, "is \"floor\" but there is no [floor]")),
            },
        };
        let Some(mount) = &self.mount else {
            return Ok(out);
        };
        let mount_name = body_name("mount.name", &mount.name, "mount")?;
        let payload_name = match &self.payload {
            Some(p) => Some(body_name("payload.name", &p.name, "payload")?),
            None => None,
        };
        if payload_name.as_deref() == Some(mount_name.as_str()) {
            return Err(Error::invalid("payload.name", "must differ from mount.name"));
        }

        // Stand geometry and extra masses on the mount body.
        let mut extras: Vec<Mass> = Vec::new();
        let top_z;
        let mut tripod_plan = None;
        let mut pier_base = None;
        if let Some(t) = &self.tripod {
            let g = t.geometry()?;
            top_z = support_z + g.height_m;
            let plan = TripodPlan::new(t, g, support_z, top_z)?;
            extras.extend(plan.head_masses());
            tripod_plan = Some(plan);
        } else if let Some(p) = &self.pier {
            let h = pos("pier.height_m", p.height_m)?;
            let base = p.base(self, &support, support_z, &mut out)?;
            top_z = base.z + h;
            pier_base = Some(base);
        } else {
            return Ok(out);
        }

        let mut wind = WindParts::new(self.wind_load.as_ref())?;
        // Mount body.
        let (own, ph) = mount.own_mass(top_z)?;
        let mut parts = vec![own];
        parts.extend(extras);
        out.bodies.push(to_body(&mount_name, &combine(&parts)));
        let pivot = [0.0, 0.0, top_z + ph];

        // Payload and the pivot joint.
        if let Some(w) = wind.as_mut() {
            let area = pos_or("mount.wind_area_m2", mount.wind_area_m2, ph * ph)?;
            w.bluff("mount head", &mount_name, [0.0, 0.0, top_z + ph / 2.0], area, BOX_DRAG_COEFFICIENT);
        }
        if let (Some(p), Some(pname)) = (&self.payload, &payload_name) {
            let posed = p.posed(pivot, pose.frame())?;
            out.bodies.push(to_body(pname, &posed));
            if let Some(w) = wind.as_mut() {
                p.wind(pname, pivot, pose.frame(), w)?;
            }
            match &pose {
                Pose::AltAz { alt, az } => mount.joint(&mount_name, pname, pivot, *alt, *az, &mut out)?,
                Pose::Equatorial { q, side } => mount.joint_equatorial(
                    &mount_name,
                    pname,
                    pivot,
                    q.pole(),
                    q.dec_axis(*side),
                    &mut out,
                )?,
            }
        }

        // Stand elements.
        if let Some(plan) = tripod_plan {
            let contact = foot_contact(self, &support)?;
            if let Some(w) = wind.as_mut() {
                plan.wind(&mount_name, &support, &contact, w);
            }
            plan.build(&mount_name, &support, contact, &mut out)?;
        }
        if let (Some(p), Some(base)) = (&self.pier, pier_base) {
            if let Some(w) = wind.as_mut() {
                p.wind(&base, &mount_name, top_z, w)?;
            }
            out.beams.push(p.column(&base, &mount_name, top_z)?);
            if let Some(f) = &self.floor {
                f.gap(&out, &base)?.into_iter().for_each(|s| out.springs.push(s));
            }
        } else if self.floor.as_ref().is_some_and(|f| f.gap_stiffness_n_per_m.is_some()) {
            return Err(Error::invalid(
                "floor.gap_stiffness_n_per_m",
                "bridges the deck to a pier footing; there is no pier on a footing",
            ));
        }
        out.wind = wind.and_then(WindParts::finish);
        out.ground_waves = match &self.ground {
            Some(g) => g.waves()?,
            None => None,
        };
        Ok(out)
    }

    fn ground(&self) -> Result<&GroundSpec> {
        self.ground.as_ref().ok_or_else(|| Error::invalid("ground", "is required (soil or kind = \"rigid\")"))
    }

    /// The soil of `[ground]`, or None for rigid ground.
    fn soil(&self) -> Result<Option<(Soil, crate::soil::Radiation)>> {
        self.ground()?.soil()
    }
}

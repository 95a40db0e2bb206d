//! Names and DOF numbering: every body, node, spring and beam name is claimed once; bodies,
//! nodes and internal beam nodes get their free DOFs in file order; the ground's three
//! translations follow as carrier `ground`.

use super::carrier::Carrier;
use super::carrier::STATION_TOLERANCE_M;
use super::spec::{Dof, GROUND, MAX_DOFS, ModelSpec};
use super::vector::{finite3, norm, sub};
use crate::error::{Error, Result, require_non_negative, require_positive};
use std::collections::BTreeMap;

/// What a global DOF belongs to.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct DofLabel {
    /// Body, node or `beam#k` name.
    pub owner: String,
    pub dof: Dof,
}

impl std::fmt::Display for DofLabel {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}:{}", self.owner, self.dof.name())
    }
}

/// The points of one beam: its end carriers (filled in by the beam assembly once every carrier
/// exists) and its internal nodes.
pub(super) struct BeamNodes {
    pub(super) nodes: Vec<Carrier>,
}

/// The numbered model: `n` free DOFs with their labels, every carrier by name (the ground
/// included) and the points of each beam.
pub(super) struct Numbering {
    pub(super) n: usize,
    pub(super) labels: Vec<DofLabel>,
    pub(super) carriers: BTreeMap<String, Carrier>,
    pub(super) beam_nodes: Vec<BeamNodes>,
}

/// Claim names, number the free DOFs and place the carriers.
pub(super) fn number(spec: &ModelSpec) -> Result<Numbering> {
    let mut names: BTreeMap<String, &'static str> = BTreeMap::new();
    let mut claim = |name: &str, kind: &'static str| -> Result<()> {
        if name.is_empty() {
            return Err(Error::invalid(format!("{kind} name"), "must not be empty"));
        }
        if name == GROUND || name.contains(':') || name.contains('#') {
            return Err(Error::invalid(
                format!("{kind} name '{name}'"),
                "'ground' is reserved and names may not contain ':' or '#'",
            ));
        }
        if let Some(k) = names.insert(name.to_string(), kind) {
            return Err(Error::invalid(format!("{kind} name '{name}'"), format!("already used by a {k}")));
        }
        Ok(())
    };
    let mut labels = Vec::new();
    let mut carriers: BTreeMap<String, Carrier> = BTreeMap::new();
    let free = |labels: &mut Vec<DofLabel>,
                owner: &str,
                dofs: &[Dof],
                allowed: &[Dof]|
     -> Result<[Option<usize>; 6]> {
        let mut idx = [None; 6];
        for d in dofs {
            if !allowed.contains(d) {
                return Err(Error::invalid(
                    format!("'{owner}'.dofs"),
                    format!("'{}' is not allowed here", d.name()),
                ));
            }
            if idx[d.index()].is_some() {
                return Err(Error::invalid(
                    format!("'{owner}'.dofs"),
                    format!("'{}' listed twice", d.name()),
                ));
            }
            idx[d.index()] = Some(usize::MAX);
        }
        for d in Dof::ALL {
            if idx[d.index()].is_some() {
                idx[d.index()] = Some(labels.len());
                labels.push(DofLabel { owner: owner.to_string(), dof: d });
            }
        }
        Ok(idx)
    };
    for b in &spec.bodies {
        claim(&b.name, "body")?;
        let p = format!("body '{}'", b.name);
        require_positive(|| format!("{p}.mass_kg"), b.mass_kg)?;
        finite3(&format!("{p}.cg_m"), b.cg_m)?;
        for (i, v) in b.inertia_kgm2.iter().enumerate() {
            let rot = [Dof::Rx, Dof::Ry, Dof::Rz][i];
            if b.dofs.contains(&rot) {
                require_positive(|| format!("{p}.inertia_kgm2[{i}]"), *v)?;
            } else {
                require_non_negative(|| format!("{p}.inertia_kgm2[{i}]"), *v)?;
            }
        }
        finite3(&format!("{p}.products_kgm2"), b.products_kgm2)?;
        let index = free(&mut labels, &b.name, &b.dofs, &Dof::ALL)?;
        let tied = std::array::from_fn(|i| index[i].is_none());
        carriers.insert(
            b.name.clone(),
            Carrier { origin: b.cg_m, index, rotates: true, tied, ground: 0, stations: Vec::new() },
        );
    }
    for nd in &spec.nodes {
        claim(&nd.name, "node")?;
        let p = format!("node '{}'", nd.name);
        require_positive(|| format!("{p}.mass_kg"), nd.mass_kg)?;
        finite3(&format!("{p}.at_m"), nd.at_m)?;
        let index = free(&mut labels, &nd.name, &nd.dofs, &[Dof::X, Dof::Y, Dof::Z])?;
        let tied = std::array::from_fn(|i| i < 3 && index[i].is_none());
        carriers.insert(
            nd.name.clone(),
            Carrier { origin: nd.at_m, index, rotates: false, tied, ground: 0, stations: Vec::new() },
        );
    }
    for s in spec.springs.iter().chain(&spec.torsion_springs) {
        claim(&s.name, "spring")?;
    }
    for s in &spec.general_springs {
        claim(&s.name, "general_spring")?;
    }
    // Beams: internal nodes, and own rotations at pinned ends.
    let mut beam_nodes = Vec::new();
    for bm in &spec.beams {
        claim(&bm.name, "beam")?;
        let p = format!("beam '{}'", bm.name);
        finite3(&format!("{p}.from_at_m"), bm.from_at_m)?;
        finite3(&format!("{p}.to_at_m"), bm.to_at_m)?;
        bm.section.validate(&format!("{p}.section"))?;
        bm.material()?;
        require_non_negative(|| format!("{p}.added_mass_kg_per_m"), bm.added_mass_kg_per_m)?;
        require_non_negative(|| format!("{p}.added_loss_factor"), bm.added_loss_factor)?;
        if bm.elements == 0 || bm.elements > 200 {
            return Err(Error::invalid(
                format!("{p}.elements"),
                format!("must lie in 1..=200, got {}", bm.elements),
            ));
        }
        if norm(sub(bm.to_at_m, bm.from_at_m)) < 1e-9 {
            return Err(Error::invalid(format!("{p}.to_at_m"), "the beam has zero length"));
        }
        let mut nodes = Vec::new();
        for k in 0..=bm.elements {
            let t = k as f64 / bm.elements as f64;
            let pos = std::array::from_fn(|i| bm.from_at_m[i] + t * (bm.to_at_m[i] - bm.from_at_m[i]));
            let end = if k == 0 {
                Some(&bm.from)
            } else if k == bm.elements {
                Some(&bm.to)
            } else {
                None
            };
            let owner = format!("{}#{k}", bm.name);
            // End carriers are filled in once every carrier (and the ground) exists.
            let c = match end {
                None => Carrier {
                    origin: pos,
                    index: free(&mut labels, &owner, &Dof::ALL, &Dof::ALL)?,
                    rotates: true,
                    tied: [false; 6],
                    ground: 0,
                    stations: Vec::new(),
                },
                Some(_) => Carrier {
                    origin: pos,
                    index: [None; 6],
                    rotates: true,
                    tied: [false; 6],
                    ground: 0,
                    stations: Vec::new(),
                },
            };
            nodes.push(c);
        }
        beam_nodes.push(BeamNodes { nodes });
    }
    let n = labels.len();
    if n == 0 {
        return Err(Error::unsupported("the model has no free DOFs (no bodies or nodes)"));
    }
    if n > MAX_DOFS {
        return Err(Error::TooLarge { what: "free DOFs".into(), value: n, limit: MAX_DOFS });
    }
    carriers.insert(
        GROUND.into(),
        Carrier {
            origin: [0.0; 3],
            index: std::array::from_fn(|k| Some(n + k)),
            rotates: true,
            tied: [false; 6],
            ground: n,
            stations: stations(spec),
        },
    );
    for c in carriers.values_mut() {
        c.ground = n;
    }
    for bn in &mut beam_nodes {
        for c in &mut bn.nodes {
            c.ground = n;
        }
    }
    Ok(Numbering { n, labels, carriers, beam_nodes })
}

/// The places where connectors touch the ground, grouped by horizontal position within
/// [`STATION_TOLERANCE_M`]; empty when there are fewer than two.
fn stations(spec: &ModelSpec) -> Vec<[f64; 2]> {
    let mut points: Vec<[f64; 3]> = Vec::new();
    let g = |name: &str| name == GROUND;
    // Torsion springs move no point of the ground along; axial and general springs and beams do.
    for s in &spec.springs {
        if g(&s.from) {
            points.extend(s.from_at_m.or(s.at_m));
        }
        if g(&s.to) {
            points.extend(s.to_at_m.or(s.at_m));
        }
    }
    for s in &spec.general_springs {
        if g(&s.from) || g(&s.to) {
            points.push(s.at_m);
        }
    }
    for b in &spec.beams {
        if g(&b.from) {
            points.push(b.from_at_m);
        }
        if g(&b.to) {
            points.push(b.to_at_m);
        }
    }
    let mut out: Vec<[f64; 2]> = Vec::new();
    for p in points {
        let near = |s: &[f64; 2]| (s[0] - p[0]).hypot(s[1] - p[1]) < STATION_TOLERANCE_M;
        if p.iter().all(|v| v.is_finite()) && !out.iter().any(near) {
            out.push([p[0], p[1]]);
        }
    }
    if out.len() < 2 { Vec::new() } else { out }
}

//! Axial springs (along a line of action) and torsion springs (about an axis): rank-one terms
//! k*(ω) b bᵀ, folded into the constant matrices when their stiffness does not depend on
//! frequency.

use super::carrier::{Carrier, connect, lookup};
use super::matrices::{Builder, RankOneTerm};
use super::spec::{GROUND, ModelSpec};
use super::vector::{finite3, norm, sub, unit};
use crate::error::{Error, Result};
use crate::stiffness::StiffnessModel;
use std::collections::BTreeMap;

/// Add the `[[spring]]` entries.
pub(super) fn add_axial(
    spec: &ModelSpec,
    carriers: &BTreeMap<String, Carrier>,
    b: &mut Builder,
) -> Result<()> {
    let nfull = b.nfull;
    for s in &spec.springs {
        let who = format!("spring '{}'", s.name);
        connect(&s.from, &s.to, &who)?;
        if s.axis.is_some() {
            return Err(Error::invalid(format!("{who}.axis"), "axial springs take direction, not axis"));
        }
        let (pa, pb) = match (s.at_m, s.from_at_m, s.to_at_m) {
            (Some(p), None, None) => (p, p),
            (None, Some(a), Some(bp)) => (a, bp),
            _ => {
                return Err(Error::invalid(who.clone(), "give either at_m, or both from_at_m and to_at_m"));
            }
        };
        finite3(&format!("{who}.at_m"), pa)?;
        finite3(&format!("{who}.at_m"), pb)?;
        let dir = match s.direction {
            Some(d) => unit(&format!("{who}.direction"), d)?,
            None if norm(sub(pb, pa)) > 1e-9 => unit(&format!("{who}.direction"), sub(pb, pa))?,
            None => {
                return Err(Error::invalid(
                    format!("{who}.direction"),
                    "is required for a zero-length spring",
                ));
            }
        };
        let model = s.stiffness().to_model(&who, false)?;
        let ta = lookup(carriers, &who, &s.from)?.point_map(pa, nfull);
        let tb = lookup(carriers, &who, &s.to)?.point_map(pb, nfull);
        let bvec: Vec<f64> =
            (0..nfull).map(|g| (0..3).map(|i| dir[i] * (tb[i][g] - ta[i][g])).sum()).collect();
        add_rank_one(b, &s.name, model, &bvec);
    }
    Ok(())
}

/// Add the `[[torsion_spring]]` entries.
pub(super) fn add_torsion(
    spec: &ModelSpec,
    carriers: &BTreeMap<String, Carrier>,
    b: &mut Builder,
) -> Result<()> {
    let nfull = b.nfull;
    for s in &spec.torsion_springs {
        let who = format!("torsion_spring '{}'", s.name);
        connect(&s.from, &s.to, &who)?;
        if s.direction.is_some() || s.from_at_m.is_some() || s.to_at_m.is_some() {
            return Err(Error::invalid(who.clone(), "torsion springs take axis (and optionally at_m) only"));
        }
        let axis = unit(
            &format!("{who}.axis"),
            s.axis.ok_or_else(|| Error::invalid(format!("{who}.axis"), "is required"))?,
        )?;
        let model = s.stiffness().to_model(&who, true)?;
        let p = s.at_m.unwrap_or([0.0; 3]);
        let (ca, cb) = (lookup(carriers, &who, &s.from)?, lookup(carriers, &who, &s.to)?);
        for (c, nm) in [(&ca, &s.from), (&cb, &s.to)] {
            if !c.rotates && nm != GROUND {
                return Err(Error::unsupported(format!(
                    "{who} ends on node '{nm}', which has no rotational DOFs"
                )));
            }
        }
        let (ta, tb) = (ca.point_map(p, nfull), cb.point_map(p, nfull));
        let bvec: Vec<f64> =
            (0..nfull).map(|g| (0..3).map(|i| axis[i] * (tb[3 + i][g] - ta[3 + i][g])).sum()).collect();
        add_rank_one(b, &s.name, model, &bvec);
    }
    Ok(())
}

fn add_rank_one(b: &mut Builder, name: &str, model: StiffnessModel, bvec: &[f64]) {
    let nfull = b.nfull;
    let sparse: Vec<(usize, f64)> =
        bvec.iter().enumerate().filter(|(_, v)| **v != 0.0).map(|(i, v)| (i, *v)).collect();
    b.springs.push(RankOneTerm { name: name.to_string(), model: model.clone(), b: sparse.clone() });
    let c = model.viscous_part();
    if c != 0.0 {
        for (i, &bi) in bvec.iter().enumerate() {
            for (j, &bj) in bvec.iter().enumerate() {
                b.damping[i + j * nfull] += c * bi * bj;
            }
        }
    }
    if model.elastic_is_constant() {
        let k = model.elastic_at(0.0);
        for (i, &bi) in bvec.iter().enumerate() {
            for (j, &bj) in bvec.iter().enumerate() {
                if bi != 0.0 && bj != 0.0 {
                    b.k_const[i + j * nfull] += k * bi * bj;
                }
            }
        }
    } else {
        b.terms.push(RankOneTerm { name: name.to_string(), model, b: sparse });
    }
}

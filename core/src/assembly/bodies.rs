//! Mass of rigid bodies (mass and full inertia tensor at the CG) and of point nodes.

use super::carrier::Carrier;
use super::matrices::Builder;
use super::spec::ModelSpec;
use std::collections::BTreeMap;

/// Add every body's and node's mass on its free DOFs.
pub(super) fn add_masses(spec: &ModelSpec, carriers: &BTreeMap<String, Carrier>, b: &mut Builder) {
    let nfull = b.nfull;
    for body in &spec.bodies {
        let c = &carriers[&body.name];
        let [ixx, iyy, izz] = body.inertia_kgm2;
        let [ixy, ixz, iyz] = body.products_kgm2;
        let j = [[ixx, ixy, ixz], [ixy, iyy, iyz], [ixz, iyz, izz]];
        for a in 0..6 {
            for bb in 0..6 {
                let v = if a < 3 && bb < 3 {
                    if a == bb { body.mass_kg } else { 0.0 }
                } else if a >= 3 && bb >= 3 {
                    j[a - 3][bb - 3]
                } else {
                    0.0
                };
                if let (Some(ga), Some(gb)) = (c.index[a], c.index[bb]) {
                    b.mass[ga + gb * nfull] += v;
                }
            }
        }
    }
    for nd in &spec.nodes {
        for g in carriers[&nd.name].index.iter().flatten() {
            b.mass[g + g * nfull] += nd.mass_kg;
        }
    }
}

//! The generic structural layer: bodies, nodes, connectors and beams, and their assembly into
//! mass, damping and (complex) stiffness matrices.
//!
//! Every connector end is a *point on a carrier* (a rigid body, a node, an internal beam node or
//! the ground). The point's six motion components (three translations, three small rotations)
//! are a linear map of the global DOFs: for a body with centre of gravity c and a point p,
//! r = p − c, u_p = u + θ × r and θ_p = θ. Each element contributes Tᵀ k T with T its map.
//! Held DOFs of a body or node are fixed (zero absolute motion) and carry no global index.
//!
//! Global DOF order: the free DOFs of bodies (in file order, each in x, y, z, rx, ry, rz order),
//! then nodes, then internal beam nodes. The ground's six DOFs follow the free DOFs in the "full"
//! system: translations and small rotations of a rigid ground about the origin, so a ground point
//! p moves as u_g + θ_g × p. Base excitation moves them; held DOFs follow them (a kinematic tie).
//!
//! Files: `spec.rs` and `stiffness_spec.rs` (the generic layer as written in a model file),
//! `numbering.rs` (names, DOF numbering, carriers), `carrier.rs` (the map of a point's motion),
//! `matrices.rs` (the assembled matrices), and one file per kind of element: `bodies.rs`
//! (body and node mass), `springs.rs` (axial and torsion springs), `general.rs` (6 × 6
//! springs), `beams.rs` (beam elements).

mod beams;
mod bodies;
mod carrier;
mod general;
mod matrices;
mod numbering;
mod spec;
mod springs;
mod stiffness_spec;
mod vector;

pub(crate) use carrier::{Carrier, GROUND_DOFS};
pub(crate) use matrices::{Assembled, RankOneTerm};
pub use numbering::DofLabel;
pub use spec::{
    BeamSpec, BodySpec, Dof, GROUND, GeneralSpringSpec, MAX_DOFS, ModelSpec, NodeSpec, OpticsSpec,
    SpringSpec, WindLoadSpec, WindPartSpec,
};
pub use stiffness_spec::{StiffnessSpec, TableSpec, ZenerSpec};

use crate::error::Result;
use matrices::Builder;
use numbering::Numbering;

/// Assemble a validated spec into matrices.
pub(crate) fn assemble(spec: &ModelSpec) -> Result<Assembled> {
    let Numbering { n, labels, carriers, mut beam_nodes } = numbering::number(spec)?;
    let stations = carriers.get(GROUND).map_or(0, |g| g.stations.len());
    let mut b = Builder::new(n + GROUND_DOFS + 3 * stations);
    bodies::add_masses(spec, &carriers, &mut b);
    springs::add_axial(spec, &carriers, &mut b)?;
    springs::add_torsion(spec, &carriers, &mut b)?;
    general::add(spec, &carriers, &mut b)?;
    beams::add(spec, &carriers, &mut beam_nodes, n, &mut b)?;
    // Bodies/nodes that nothing connects to are caught by the rigid-body check in the model.
    Ok(Assembled {
        n,
        labels,
        mass: b.mass,
        damping: b.damping,
        k_const: b.k_const,
        terms: b.terms,
        springs: b.springs,
        stations: carriers.get(GROUND).map(|g| g.stations.clone()).unwrap_or_default(),
        carriers,
    })
}

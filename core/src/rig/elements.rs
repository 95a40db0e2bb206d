//! Generic-layer elements the builders write: a body from a mass, and axial and torsion springs
//! acting at one point.

use super::mass::{Mass, V3};
use crate::assembly::{BodySpec, Dof, SpringSpec};
use crate::stiffness::StiffnessModel;

/// Unit vectors of the model axes.
pub(super) const EX: V3 = [1.0, 0.0, 0.0];
pub(super) const EY: V3 = [0.0, 1.0, 0.0];
pub(super) const EZ: V3 = [0.0, 0.0, 1.0];

/// A 6-DOF body carrying `mass` (its full inertia tensor).
pub(super) fn to_body(name: &str, mass: &Mass) -> BodySpec {
    let j = mass.j;
    BodySpec {
        name: name.to_string(),
        mass_kg: mass.m,
        cg_m: mass.c,
        inertia_kgm2: [j[0][0], j[1][1], j[2][2]],
        products_kgm2: [j[0][1], j[0][2], j[1][2]],
        dofs: Dof::ALL.to_vec(),
    }
}

/// An axial spring between `from` and `to` acting at `at` along `dir`.
pub(super) fn axial(name: &str, from: &str, to: &str, at: V3, dir: V3, model: &StiffnessModel) -> SpringSpec {
    SpringSpec {
        name: name.into(),
        from: from.into(),
        to: to.into(),
        at_m: Some(at),
        direction: Some(dir),
        ..Default::default()
    }
    .with_model(model, false)
}

/// A torsion spring between `from` and `to` at `at` about `axis`.
pub(super) fn torsion(
    name: &str,
    from: &str,
    to: &str,
    at: V3,
    axis: V3,
    model: &StiffnessModel,
) -> SpringSpec {
    SpringSpec {
        name: name.into(),
        from: from.into(),
        to: to.into(),
        at_m: Some(at),
        axis: Some(axis),
        ..Default::default()
    }
    .with_model(model, true)
}

//! Small 3-vector helpers of the assembly, with named errors for bad input.

use crate::error::{Error, Result, require_finite};

pub(super) fn sub(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
}
pub(super) fn norm(a: [f64; 3]) -> f64 {
    (a[0] * a[0] + a[1] * a[1] + a[2] * a[2]).sqrt()
}
pub(super) fn cross(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]]
}
pub(super) fn unit(name: &str, v: [f64; 3]) -> Result<[f64; 3]> {
    for x in v {
        require_finite(name, x)?;
    }
    let l = norm(v);
    if l < 1e-12 {
        return Err(Error::invalid(name, "must be a non-zero vector"));
    }
    Ok([v[0] / l, v[1] / l, v[2] / l])
}
pub(super) fn finite3(name: &str, v: [f64; 3]) -> Result<()> {
    for x in v {
        require_finite(name, x)?;
    }
    Ok(())
}

//! Reading optional rig keys: required, positive, defaulted values, body names and materials,
//! each failing with an error that names its key.

use crate::assembly::GROUND;
use crate::error::{Error, Result, require_finite, require_non_negative, require_positive};
use crate::material::Material;

pub(super) fn req(name: &str, v: Option<f64>) -> Result<f64> {
    let v = v.ok_or_else(|| Error::invalid(name, "is required"))?;
    require_finite(name, v)
}
pub(super) fn pos(name: &str, v: Option<f64>) -> Result<f64> {
    require_positive(name, req(name, v)?)
}
pub(super) fn pos_or(name: &str, v: Option<f64>, default: f64) -> Result<f64> {
    v.map_or(Ok(default), |x| require_positive(name, x))
}
pub(super) fn nonneg_or(name: &str, v: Option<f64>, default: f64) -> Result<f64> {
    v.map_or(Ok(default), |x| require_non_negative(name, x))
}
pub(super) fn fin_or(name: &str, v: Option<f64>, default: f64) -> Result<f64> {
    v.map_or(Ok(default), |x| require_finite(name, x))
}
pub(super) fn pos3(name: &str, v: Option<[f64; 3]>) -> Result<[f64; 3]> {
    let v = v.ok_or_else(|| Error::invalid(name, "is required"))?;
    for (i, x) in v.iter().enumerate() {
        require_positive(|| format!("{name}[{i}]"), *x)?;
    }
    Ok(v)
}
pub(super) fn body_name(field: &str, v: &Option<String>, default: &str) -> Result<String> {
    match v {
        None => Ok(default.to_string()),
        Some(n) if n.is_empty() || n == GROUND || n.contains(':') || n.contains('#') => Err(Error::invalid(
            field,
            format!("'{n}' is not allowed (empty, 'ground', or containing ':' or '#')"),
        )),
        Some(n) => Ok(n.clone()),
    }
}

pub(super) fn material_of(
    field: &str,
    preset: &Option<String>,
    props: &Option<Material>,
) -> Result<Material> {
    let m = match (preset, props) {
        (Some(n), None) => Material::preset(n)?,
        (None, Some(m)) => m.clone(),
        (None, None) => {
            return Err(Error::invalid(field, "is required (a preset name, or ..._properties)"));
        }
        (Some(_), Some(_)) => {
            return Err(Error::invalid(field, "give a preset name or explicit properties, not both"));
        }
    };
    m.validate(field)?;
    Ok(m)
}

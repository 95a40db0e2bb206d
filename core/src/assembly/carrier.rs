//! Carriers of points (bodies, nodes, internal beam nodes, the ground) and the linear map from
//! the global DOFs to the motion of a point on one.

use super::vector::sub;
use crate::error::{Error, Result};
use std::collections::BTreeMap;

/// A carrier of points: its reference position and the global index of each of its 6 DOFs.
#[derive(Debug, Clone)]
pub(crate) struct Carrier {
    pub(crate) origin: [f64; 3],
    /// Global index of x, y, z, rx, ry, rz (None = held or absent).
    pub(crate) index: [Option<usize>; 6],
    /// Whether the carrier has rotational DOFs at all (bodies, beam nodes) or not (nodes).
    pub(crate) rotates: bool,
    /// Held translations x, y, z that follow the ground (a kinematic tie): they map to the
    /// ground's columns, the last three of the N columns of [`Carrier::point_map`].
    pub(crate) tied: [bool; 3],
}

impl Carrier {
    /// The 6 × N map (dense rows) of the motion of point `p` on this carrier; N = free DOFs + 3,
    /// the last three the ground's translations.
    pub(crate) fn point_map(&self, p: [f64; 3], nfull: usize) -> [Vec<f64>; 6] {
        let mut rows: [Vec<f64>; 6] = std::array::from_fn(|_| vec![0.0; nfull]);
        let r = sub(p, self.origin);
        for i in 0..3 {
            if let Some(g) = self.index[i] {
                rows[i][g] += 1.0;
            } else if self.tied[i] {
                rows[i][nfull - 3 + i] += 1.0;
            }
            if let Some(g) = self.index[3 + i] {
                rows[3 + i][g] += 1.0;
            }
        }
        // u_p = u + θ × r: (θ × r)_x = θy rz − θz ry, etc.
        let th = |k: usize| self.index[3 + k];
        let add = |rows: &mut [Vec<f64>; 6], row: usize, dof: Option<usize>, c: f64| {
            if let Some(g) = dof {
                rows[row][g] += c;
            }
        };
        add(&mut rows, 0, th(1), r[2]);
        add(&mut rows, 0, th(2), -r[1]);
        add(&mut rows, 1, th(2), r[0]);
        add(&mut rows, 1, th(0), -r[2]);
        add(&mut rows, 2, th(0), r[1]);
        add(&mut rows, 2, th(1), -r[0]);
        rows
    }
}

/// The carrier named in `field` of element `who`.
pub(super) fn lookup(carriers: &BTreeMap<String, Carrier>, who: &str, field: &str) -> Result<Carrier> {
    carriers.get(field).cloned().ok_or_else(|| Error::UnknownName {
        kind: format!("carrier in {who}"),
        name: field.into(),
        known: carriers.keys().cloned().collect::<Vec<_>>().join(", "),
    })
}

/// A connector must join two different carriers.
pub(super) fn connect(s_from: &str, s_to: &str, who: &str) -> Result<()> {
    if s_from == s_to {
        return Err(Error::invalid(format!("{who}.to"), format!("connects '{s_from}' to itself")));
    }
    Ok(())
}

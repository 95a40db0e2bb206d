//! Carriers of points (bodies, nodes, internal beam nodes, the ground) and the linear map from
//! the global DOFs to the motion of a point on one.

use super::vector::sub;
use crate::error::{Error, Result};
use std::collections::BTreeMap;

/// The rigid ground's columns in the full system: translations x, y, z and small rotations rx,
/// ry, rz about the origin, right after the free DOFs. Where the ground is touched at two or
/// more places apart (stations), each station's own translations x, y, z follow them.
pub(crate) const GROUND_DOFS: usize = 6;

/// Ground attachment points closer than this horizontally share a station (m).
pub(crate) const STATION_TOLERANCE_M: f64 = 0.01;

/// A carrier of points: its reference position and the global index of each of its 6 DOFs.
#[derive(Debug, Clone)]
pub(crate) struct Carrier {
    pub(crate) origin: [f64; 3],
    /// Global index of x, y, z, rx, ry, rz (None = held or absent).
    pub(crate) index: [Option<usize>; 6],
    /// Whether the carrier has rotational DOFs at all (bodies, beam nodes) or not (nodes).
    pub(crate) rotates: bool,
    /// Held DOFs that follow the ground (a kinematic tie): a held translation at the carrier's
    /// origin o moves as u_g + θ_g × o, a held rotation as θ_g; both map to the ground's
    /// columns.
    pub(crate) tied: [bool; 6],
    /// The first of the ground's columns (the number of free DOFs).
    pub(crate) ground: usize,
    /// On the ground's carrier, its stations (horizontal positions, m) when there are two or
    /// more: a point also moves with its station's own translations.
    pub(crate) stations: Vec<[f64; 2]>,
}

/// The station of a point: the nearest one horizontally.
pub(crate) fn station_of(stations: &[[f64; 2]], p: [f64; 3]) -> Option<usize> {
    let d2 = |s: &[f64; 2]| (s[0] - p[0]).powi(2) + (s[1] - p[1]).powi(2);
    (0..stations.len()).min_by(|&a, &b| d2(&stations[a]).total_cmp(&d2(&stations[b])))
}

impl Carrier {
    /// The 6 × N map (dense rows) of the motion of point `p` on this carrier; N = free DOFs +
    /// the ground's columns.
    pub(crate) fn point_map(&self, p: [f64; 3], nfull: usize) -> [Vec<f64>; 6] {
        let mut rows: [Vec<f64>; 6] = std::array::from_fn(|_| vec![0.0; nfull]);
        let g0 = self.ground;
        if let Some(s) = station_of(&self.stations, p) {
            for (i, row) in rows.iter_mut().take(3).enumerate() {
                let g = g0 + GROUND_DOFS + 3 * s + i;
                if g < nfull {
                    row[g] += 1.0;
                }
            }
        }
        let r = sub(p, self.origin);
        // A DOF's column: its own, or the ground's where it is tied.
        let col = |k: usize| self.index[k].or(self.tied[k].then_some(g0 + k));
        for (k, row) in rows.iter_mut().enumerate() {
            if let Some(g) = col(k) {
                row[g] += 1.0;
            }
        }
        // A held translation tied to the ground also follows the ground's rotation at the
        // carrier's origin: u_o = u_g + θ_g × o.
        for i in 0..3 {
            if self.index[i].is_none() && self.tied[i] {
                let o = self.origin;
                let (a, b) = ((i + 1) % 3, (i + 2) % 3);
                // (θ × o)_i = θ_a o_b − θ_b o_a for (i, a, b) cyclic.
                rows[i][g0 + 3 + a] += o[b];
                rows[i][g0 + 3 + b] -= o[a];
            }
        }
        // u_p = u + θ × r: (θ × r)_x = θy rz − θz ry, etc.
        let th = |k: usize| col(3 + k);
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

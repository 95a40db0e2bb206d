//! The assembled matrices and how element terms are added into them.

use super::carrier::Carrier;
use super::numbering::DofLabel;
use crate::stiffness::StiffnessModel;
use num_complex::Complex64;
use std::collections::BTreeMap;

/// A rank-one stiffness term k*(ω) b bᵀ with b sparse over the full DOFs.
#[derive(Debug, Clone)]
pub(crate) struct RankOneTerm {
    pub(crate) name: String,
    pub(crate) model: StiffnessModel,
    pub(crate) b: Vec<(usize, f64)>,
}

/// Assembled matrices over the full system (free DOFs followed by 3 ground translations).
#[derive(Debug, Clone)]
pub(crate) struct Assembled {
    pub(crate) n: usize,
    pub(crate) labels: Vec<DofLabel>,
    /// Column-major nfull² (nfull = n + the ground's columns).
    pub(crate) mass: Vec<f64>,
    pub(crate) damping: Vec<f64>,
    /// Frequency-independent complex stiffness (hysteretic springs, beams, general springs).
    pub(crate) k_const: Vec<Complex64>,
    /// Frequency-dependent springs.
    pub(crate) terms: Vec<RankOneTerm>,
    /// Every rank-one spring (also those folded into `k_const` and `damping`), by name, so that
    /// sweeps can replace them.
    pub(crate) springs: Vec<RankOneTerm>,
    pub(crate) carriers: BTreeMap<String, Carrier>,
    /// The ground's stations (horizontal positions, m), each with three columns after the rigid
    /// ground's six; empty when the ground is touched at one place only.
    pub(crate) stations: Vec<[f64; 2]>,
}

/// The matrices while elements are added (column-major nfull², nfull = free DOFs + the ground's 6).
pub(super) struct Builder {
    pub(super) nfull: usize,
    pub(super) mass: Vec<f64>,
    pub(super) damping: Vec<f64>,
    pub(super) k_const: Vec<Complex64>,
    pub(super) terms: Vec<RankOneTerm>,
    pub(super) springs: Vec<RankOneTerm>,
}

impl Builder {
    pub(super) fn new(nfull: usize) -> Builder {
        Builder {
            nfull,
            mass: vec![0.0; nfull * nfull],
            damping: vec![0.0; nfull * nfull],
            k_const: vec![Complex64::default(); nfull * nfull],
            terms: Vec::new(),
            springs: Vec::new(),
        }
    }

    pub(super) fn add_mass(&mut self, t: &[Vec<f64>], m: &[f64], dim: usize) {
        add_tkt(&mut self.mass, self.nfull, t, dim, |i, j| m[i * dim + j]);
    }
}

/// Add Tᵀ k T into a column-major nfull² matrix; T has `dim` dense rows.
pub(super) fn add_tkt<T: Copy + std::ops::Mul<f64, Output = T> + std::ops::AddAssign + Default>(
    target: &mut [T],
    nfull: usize,
    t: &[Vec<f64>],
    dim: usize,
    k: impl Fn(usize, usize) -> T,
) {
    // kt = k T (dim × nfull), then target += Tᵀ kt, over non-zero columns only.
    let nz: Vec<usize> = (0..nfull).filter(|&g| t.iter().any(|row| row[g] != 0.0)).collect();
    let mut kt = vec![T::default(); dim * nz.len()];
    for i in 0..dim {
        for (c, &g) in nz.iter().enumerate() {
            let mut s = T::default();
            for (j, row) in t.iter().enumerate().take(dim) {
                if row[g] != 0.0 {
                    s += k(i, j) * row[g];
                }
            }
            kt[i * nz.len() + c] = s;
        }
    }
    for (c2, &g2) in nz.iter().enumerate() {
        for &g1 in &nz {
            let mut s = T::default();
            for (i, row) in t.iter().enumerate().take(dim) {
                if row[g1] != 0.0 {
                    s += kt[i * nz.len() + c2] * row[g1];
                }
            }
            target[g1 + g2 * nfull] += s;
        }
    }
}

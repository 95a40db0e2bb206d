//! Frequency-independent structure of Z(ω) for an [`FrfPlan`](crate::frf::FrfPlan), fixed once per
//! plan: the solver order (natural or reverse Cuthill–McKee, whichever has the smaller band),
//! the solver it implies, where each structurally non-zero entry lands in solver storage, the
//! right-hand sides and output rows in that order, and which fast kernels (SIMD lanes, modal
//! superposition) apply.

use super::modal::ModalLayout;
use crate::linalg::lanes::BandLanes;
use crate::model::{Input, Model};
use num_complex::Complex64;

/// Which linear solver an [`FrfPlan`](crate::frf::FrfPlan) uses per frequency.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
#[non_exhaustive]
pub enum SolverChoice {
    /// Pick by the rule in [`FrfPlan::solver`](crate::frf::FrfPlan::solver)'s docs (default).
    #[default]
    Auto,
    /// faer's dense partial-pivot LU on the natural order (the reference path).
    Dense,
    /// The banded LU of [`crate::linalg::BandLu`] after the better of the natural and the
    /// reverse Cuthill–McKee orderings.
    Banded,
}

/// The solver an [`FrfPlan`](crate::frf::FrfPlan) settled on.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SolverKind {
    /// Dense LU (faer).
    Dense,
    /// Banded LU with `kl` sub- and `ku` super-diagonals after reordering.
    Banded { kl: usize, ku: usize },
}

/// One structurally non-zero entry of Z in solver storage: Z = k + iωc − ω²m there.
#[derive(Debug, Clone, Copy)]
pub(super) struct Entry {
    pub(super) pos: usize,
    pub(super) k: Complex64,
    pub(super) c: f64,
    pub(super) m: f64,
}

/// A resolved input in solver order: constants of −Z_fg e_d (or a fixed load), plus the
/// contributions of frequency-dependent terms `(term, row, b_i·b_g)`.
#[derive(Debug, Clone)]
pub(super) struct RhsPlan {
    pub(super) entries: Vec<(usize, Complex64, f64, f64)>,
    pub(super) terms: Vec<(usize, usize, f64)>,
}

/// Storage of the lane kernel ([`crate::linalg::lanes`]): the same solver order as the scalar
/// path, band (kl, ku) of that order, positions in the lane band storage.
#[derive(Debug, Clone)]
pub(super) struct LaneLayout {
    pub(super) kl: usize,
    pub(super) ku: usize,
    pub(super) entries: Vec<Entry>,
    pub(super) terms: Vec<Vec<(usize, f64)>>,
}

/// Largest lane band storage n·(kl + ku + 1) the lane kernel takes (512 KiB of lanes, so one
/// thread's factor stays in L2); larger or denser models use the scalar kernels.
const LANE_STORAGE_MAX: usize = 4096;

/// Frequency-independent structure of Z(ω), computed once per plan.
#[derive(Debug, Clone)]
pub(super) struct Layout {
    pub(super) kind: SolverKind,
    /// The lane kernel, when the model is small or narrow enough (see
    /// [`FrfPlan::lanes`](crate::frf::FrfPlan::lanes)).
    pub(super) lanes: Option<LaneLayout>,
    /// Modal superposition, when the model is proportionally damped (see
    /// [`FrfPlan::is_modal`](crate::frf::FrfPlan::is_modal)).
    pub(super) modal: Option<ModalLayout>,
    /// Storage length of the Z buffer.
    pub(super) len: usize,
    pub(super) entries: Vec<Entry>,
    /// Per term: (storage position, b_i·b_j).
    pub(super) terms: Vec<Vec<(usize, f64)>>,
    pub(super) rhs: Vec<RhsPlan>,
    /// Output rows as sparse (solver index, weight).
    pub(super) rows: Vec<Vec<(usize, f64)>>,
    /// `pos[model DOF] = solver index`.
    pub(super) pos: Vec<usize>,
}

/// Reverse Cuthill–McKee ordering of a symmetric pattern (George & Liu, Computer Solution of
/// Large Sparse Positive Definite Systems, 1981, §4.3): returns `order[new] = old`.
fn reverse_cuthill_mckee(adj: &[Vec<usize>]) -> Vec<usize> {
    let n = adj.len();
    let mut seen = vec![false; n];
    let mut order = Vec::with_capacity(n);
    while order.len() < n {
        // Start each component at a node of least degree.
        let start = (0..n).filter(|&i| !seen[i]).min_by_key(|&i| adj[i].len()).unwrap_or(0);
        seen[start] = true;
        let mut head = order.len();
        order.push(start);
        while head < order.len() {
            let v = order[head];
            head += 1;
            let mut nb: Vec<usize> = adj[v].iter().copied().filter(|&u| !seen[u]).collect();
            nb.sort_by_key(|&u| adj[u].len());
            for u in nb {
                seen[u] = true;
                order.push(u);
            }
        }
    }
    order.reverse();
    order
}

/// (kl, ku) of a pattern under `pos[old] = new`.
fn bandwidths(adj: &[Vec<usize>], pos: &[usize]) -> (usize, usize) {
    let (mut kl, mut ku) = (0, 0);
    for (i, nb) in adj.iter().enumerate() {
        for &j in nb {
            let (a, b) = (pos[i], pos[j]);
            if a > b { kl = kl.max(a - b) } else { ku = ku.max(b - a) }
        }
    }
    (kl, ku)
}

impl Layout {
    pub(super) fn new(model: &Model, inputs: &[Input], rows: &[f64], choice: SolverChoice) -> Layout {
        let n = model.dof_count();
        let nz =
            |k: usize| model.k_ff[k] != Complex64::default() || model.c_ff[k] != 0.0 || model.m_ff[k] != 0.0;
        let mut pattern = vec![false; n * n];
        for (k, p) in pattern.iter_mut().enumerate() {
            *p = nz(k);
        }
        for t in &model.terms {
            for &(i, _) in &t.bf {
                for &(j, _) in &t.bf {
                    pattern[i + j * n] = true;
                }
            }
        }
        let mut adj = vec![Vec::new(); n];
        for j in 0..n {
            for i in 0..n {
                if i != j && (pattern[i + j * n] || pattern[j + i * n]) {
                    adj[i].push(j);
                }
            }
        }
        let natural: Vec<usize> = (0..n).collect();
        let rcm = reverse_cuthill_mckee(&adj);
        let mut rcm_pos = vec![0; n];
        for (new, &old) in rcm.iter().enumerate() {
            rcm_pos[old] = new;
        }
        let (nat_b, rcm_b) = (bandwidths(&adj, &natural), bandwidths(&adj, &rcm_pos));
        let (pos, (kl, ku)) =
            if rcm_b.0 + rcm_b.1 < nat_b.0 + nat_b.1 { (rcm_pos, rcm_b) } else { (natural.clone(), nat_b) };
        // Rule: banded when its elimination count n·kl·(kl + ku + 1) is below a sixth of the
        // dense n³ (dense LU ≈ n³/3 complex multiply–adds, so a ≥ 2× margin before the banded
        // kernel's plain loops compete with faer's SIMD kernels).
        let banded_cost = (n * kl * (kl + ku + 1)) as f64;
        let dense_cost = (n as f64).powi(3);
        let use_band = match choice {
            SolverChoice::Dense => false,
            SolverChoice::Banded => true,
            SolverChoice::Auto => n > 0 && 6.0 * banded_cost < dense_cost,
        };
        let (kind, pos, len, ld) = if use_band {
            let ld = 2 * kl + ku + 1;
            (SolverKind::Banded { kl, ku }, pos, ld * n, ld)
        } else {
            (SolverKind::Dense, natural, n * n, n)
        };
        let at = |i: usize, j: usize| -> usize {
            let (a, b) = (pos[i], pos[j]);
            match kind {
                SolverKind::Dense => a + b * n,
                SolverKind::Banded { kl, ku } => kl + ku + a - b + b * ld,
            }
        };
        let place = |at: &dyn Fn(usize, usize) -> usize| {
            let mut entries = Vec::new();
            for j in 0..n {
                for i in 0..n {
                    let k = i + j * n;
                    if nz(k) {
                        entries.push(Entry {
                            pos: at(i, j),
                            k: model.k_ff[k],
                            c: model.c_ff[k],
                            m: model.m_ff[k],
                        });
                    }
                }
            }
            let terms: Vec<Vec<(usize, f64)>> = model
                .terms
                .iter()
                .map(|t| {
                    let mut v = Vec::with_capacity(t.bf.len() * t.bf.len());
                    for &(j, bj) in &t.bf {
                        for &(i, bi) in &t.bf {
                            v.push((at(i, j), bi * bj));
                        }
                    }
                    v
                })
                .collect();
            (entries, terms)
        };
        let (entries, terms) = place(&at);
        // The lane kernel works in the scalar path's order (a lane it cannot take is redone by the
        // scalar path, whose solution must land in the same places).
        let (lkl, lku) = match kind {
            SolverKind::Banded { kl, ku } => (kl, ku),
            SolverKind::Dense => nat_b,
        };
        let lanes = (matches!(choice, SolverChoice::Auto)
            && n > 0
            && n * (lkl + lku + 1) <= LANE_STORAGE_MAX)
            .then(|| {
                let lu = BandLanes::new(n, lkl, lku);
                let (entries, terms) = place(&|i, j| lu.index(pos[i], pos[j]));
                LaneLayout { kl: lkl, ku: lku, entries, terms }
            });
        let rhs = inputs
            .iter()
            .map(|inp| match inp {
                Input::Load(v) => RhsPlan {
                    entries: (0..n)
                        .filter(|&i| v[i] != 0.0)
                        .map(|i| (pos[i], Complex64::new(-v[i], 0.0), 0.0, 0.0))
                        .collect(),
                    terms: Vec::new(),
                },
                Input::Ground(d) => {
                    let mut e = Vec::new();
                    for i in 0..n {
                        let k = i + d * n;
                        if model.k_fg[k] != Complex64::default()
                            || model.c_fg[k] != 0.0
                            || model.m_fg[k] != 0.0
                        {
                            e.push((pos[i], model.k_fg[k], model.c_fg[k], model.m_fg[k]));
                        }
                    }
                    let mut terms = Vec::new();
                    for (ti, t) in model.terms.iter().enumerate() {
                        if t.bg[*d] != 0.0 {
                            for &(i, bi) in &t.bf {
                                terms.push((ti, pos[i], bi * t.bg[*d]));
                            }
                        }
                    }
                    RhsPlan { entries: e, terms }
                }
            })
            .collect();
        let modal = if matches!(choice, SolverChoice::Auto) {
            ModalLayout::try_new(model, inputs, rows)
        } else {
            None
        };
        let rows = rows
            .chunks_exact(n.max(1))
            .map(|r| (0..n).filter(|&i| r[i] != 0.0).map(|i| (pos[i], r[i])).collect())
            .collect();
        Layout { kind, lanes, modal, len, entries, terms, rhs, rows, pos }
    }

    /// Per-frequency cost estimate (multiply–adds) used for the parallel threshold.
    pub(super) fn cost(&self, n: usize, nrhs: usize) -> f64 {
        match self.kind {
            SolverKind::Dense => (n as f64).powi(3) / 3.0 + (n * n * nrhs) as f64,
            SolverKind::Banded { kl, ku } => {
                (n * (kl + 1) * (kl + ku + 1) + n * nrhs * (2 * kl + ku + 1)) as f64
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rcm_finds_the_band_of_a_shuffled_path() {
        // Path 0–1–…–9 relabelled by i ↦ 3i mod 10: natural bandwidth is large, RCM gives 1.
        let n = 10;
        let mut adj = vec![Vec::new(); n];
        for i in 0..n - 1 {
            let (a, b) = ((3 * i) % n, (3 * (i + 1)) % n);
            adj[a].push(b);
            adj[b].push(a);
        }
        let order = reverse_cuthill_mckee(&adj);
        let mut pos = vec![0; n];
        for (new, &old) in order.iter().enumerate() {
            pos[old] = new;
        }
        assert_eq!(bandwidths(&adj, &pos), (1, 1));
        let natural: Vec<usize> = (0..n).collect();
        assert!(bandwidths(&adj, &natural).0 > 1);
    }
}

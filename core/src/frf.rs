//! Frequency response by a direct complex solve per frequency.
//!
//! Z(ω) x = b with Z(ω) = K*(ω) + iωC − ω²M over the free DOFs, for every requested input at
//! once (one LU per frequency, many right-hand sides). [`FrfPlan`] resolves names once and owns
//! its scratch space, so evaluating many grids allocates nothing per frequency; evaluation is
//! parallel over frequency blocks (rayon) when the work is large enough to pay.

use crate::error::{Error, Result};
use crate::linalg::lanes::{BandLanes, CLane, LANES, Lane, LaneMask, pad_block, with_best_simd};
use crate::linalg::{BandLu, ComplexLu};
use crate::model::{Input, Model};
use ndarray::Array3;
use num_complex::Complex64;
use rayon::prelude::*;
use std::f64::consts::PI;

/// FRF values on a grid: `data[[f, out, in]]`.
#[derive(Debug, Clone, PartialEq)]
pub struct Frf {
    pub freq_hz: Vec<f64>,
    pub inputs: Vec<String>,
    pub outputs: Vec<String>,
    /// Shape (n_freq, n_out, n_in).
    pub data: Array3<Complex64>,
}

impl Frf {
    /// One output/input pair over the grid.
    pub fn series(&self, output: &str, input: &str) -> Result<Vec<Complex64>> {
        let o = self.outputs.iter().position(|x| x == output).ok_or_else(|| Error::UnknownName {
            kind: "output".into(),
            name: output.into(),
            known: self.outputs.join(", "),
        })?;
        let i = self.inputs.iter().position(|x| x == input).ok_or_else(|| Error::UnknownName {
            kind: "input".into(),
            name: input.into(),
            known: self.inputs.join(", "),
        })?;
        Ok((0..self.freq_hz.len()).map(|f| self.data[[f, o, i]]).collect())
    }
}

/// Which linear solver an [`FrfPlan`] uses per frequency.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
#[non_exhaustive]
pub enum SolverChoice {
    /// Pick by the rule in [`FrfPlan::solver`]'s docs (default).
    #[default]
    Auto,
    /// faer's dense partial-pivot LU on the natural order (the reference path).
    Dense,
    /// The banded LU of [`crate::linalg::BandLu`] after the better of the natural and the
    /// reverse Cuthill–McKee orderings.
    Banded,
}

/// The solver an [`FrfPlan`] settled on.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SolverKind {
    /// Dense LU (faer).
    Dense,
    /// Banded LU with `kl` sub- and `ku` super-diagonals after reordering.
    Banded { kl: usize, ku: usize },
}

/// One structurally non-zero entry of Z in solver storage: Z = k + iωc − ω²m there.
#[derive(Debug, Clone, Copy)]
struct Entry {
    pos: usize,
    k: Complex64,
    c: f64,
    m: f64,
}

/// A resolved input in solver order: constants of −Z_fg e_d (or a fixed load), plus the
/// contributions of frequency-dependent terms `(term, row, b_i·b_g)`.
#[derive(Debug, Clone)]
struct RhsPlan {
    entries: Vec<(usize, Complex64, f64, f64)>,
    terms: Vec<(usize, usize, f64)>,
}

/// Storage of the lane kernel ([`crate::linalg::lanes`]): the same solver order as the scalar
/// path, band (kl, ku) of that order, positions in the lane band storage.
#[derive(Debug, Clone)]
struct LaneLayout {
    kl: usize,
    ku: usize,
    entries: Vec<Entry>,
    terms: Vec<Vec<(usize, f64)>>,
}

/// Modal superposition for proportionally damped models: K* = K′(1 + iη) with one loss factor
/// η, C = αM + βK′, and no frequency-dependent terms. With K′φ = λMφ, φᵀMφ = I, every FRF is
/// Σ_r (c·φ_r)(φ_rᵀb(ω)) / (λ_r(1 + iη) + iω(α + βλ_r) − ω²), exact with all n modes
/// (Clough & Penzien, Dynamics of Structures, 2nd ed., 1993, §12-3 and §13-2).
#[derive(Debug, Clone)]
struct ModalLayout {
    eta: f64,
    alpha: f64,
    beta: f64,
    lambda: Vec<f64>,
    /// Output rows times mode shapes: `rows[o][r]`.
    rows: Vec<Vec<f64>>,
    /// Per input and mode: φᵀb(ω) = q0 + iω·q1 − ω²·q2 (loads: q0 only).
    inputs: Vec<Vec<(Complex64, f64, f64)>>,
}

/// Largest model the modal path takes: its eigen-solution (≈ 10n³ flops, once per plan) must
/// not outweigh the direct path's per-frequency savings on a typical grid.
const MODAL_DOFS_MAX: usize = 64;

impl ModalLayout {
    /// The modal path, when `model` is proportionally damped to round-off (relative 1e-12 in the
    /// Frobenius norm) and small enough.
    fn try_new(model: &Model, inputs: &[Input], rows: &[f64]) -> Option<ModalLayout> {
        let n = model.dof_count();
        if n == 0 || n > MODAL_DOFS_MAX || !model.terms.is_empty() {
            return None;
        }
        let dot = |a: &[f64], b: &[f64]| a.iter().zip(b).map(|(x, y)| x * y).sum::<f64>();
        let kr: Vec<f64> = model.k_ff.iter().map(|z| z.re).collect();
        let ki: Vec<f64> = model.k_ff.iter().map(|z| z.im).collect();
        let kk = dot(&kr, &kr);
        if kk == 0.0 {
            return None;
        }
        let eta = dot(&ki, &kr) / kk;
        let tol = 1e-12;
        let resid = |a: &[f64], f: &dyn Fn(usize) -> f64| {
            a.iter().enumerate().map(|(i, x)| (x - f(i)).powi(2)).sum::<f64>()
        };
        if resid(&ki, &|i| eta * kr[i]) > tol * tol * kk {
            return None;
        }
        // C ≈ αM + βK′ by least squares on the Frobenius inner product.
        let (m, c) = (&model.m_ff, &model.c_ff);
        let (mm, mk, cm, ck) = (dot(m, m), dot(m, &kr), dot(c, m), dot(c, &kr));
        let det = mm * kk - mk * mk;
        let (alpha, beta) = if det.abs() > 1e-12 * mm * kk {
            ((cm * kk - ck * mk) / det, (ck * mm - cm * mk) / det)
        } else {
            // M ∥ K′: all of C on M.
            (cm / mm, 0.0)
        };
        let cc = dot(c, c);
        if resid(c, &|i| alpha * m[i] + beta * kr[i]) > tol * tol * cc.max(f64::MIN_POSITIVE) && cc > 0.0 {
            return None;
        }
        let (lambda, phi) = crate::linalg::sym_generalized_eigen(&kr, m, n).ok()?;
        let mode = |r: usize| &phi[r * n..(r + 1) * n];
        let rows = rows.chunks_exact(n).map(|row| (0..n).map(|r| dot(row, mode(r))).collect()).collect();
        let inputs = inputs
            .iter()
            .map(|inp| match inp {
                Input::Load(v) => (0..n).map(|r| (Complex64::new(dot(v, mode(r)), 0.0), 0.0, 0.0)).collect(),
                Input::Ground(d) => {
                    // b = −(K*_fg + iωC_fg − ω²M_fg) e_d, its columns taken once per input.
                    let cols = d * n..(d + 1) * n;
                    let kre: Vec<f64> = model.k_fg[cols.clone()].iter().map(|z| z.re).collect();
                    let kim: Vec<f64> = model.k_fg[cols.clone()].iter().map(|z| z.im).collect();
                    let (c, m) = (&model.c_fg[cols.clone()], &model.m_fg[cols]);
                    (0..n)
                        .map(|r| {
                            (
                                -Complex64::new(dot(&kre, mode(r)), dot(&kim, mode(r))),
                                -dot(c, mode(r)),
                                -dot(m, mode(r)),
                            )
                        })
                        .collect()
                }
            })
            .collect();
        Some(ModalLayout { eta, alpha, beta, lambda, rows, inputs })
    }

    /// FRFs at up to [`LANES`] frequencies `f_hz` into `out` (per frequency n_out × n_in);
    /// call inside [`with_best_simd`]. Returns the lanes where a modal denominator is below
    /// [`crate::linalg::SINGULAR_PIVOT_RATIO`] of λ_r + ω² (Z numerically singular there, as the
    /// direct path's pivot test would report).
    #[inline(always)]
    fn evaluate_lanes(&self, f_hz: &[f64], acc: &mut [CLane], out: &mut [Complex64]) -> LaneMask {
        let mut w = pad_block(f_hz);
        let mut w2: Lane = [0.0; LANES];
        for l in 0..LANES {
            w[l] *= 2.0 * PI;
            w2[l] = w[l] * w[l];
        }
        let ni = self.inputs.len();
        let mut bad: LaneMask = 0;
        acc.iter_mut().for_each(|x| *x = CLane::ZERO);
        for (r, &lam) in self.lambda.iter().enumerate() {
            let mut den = CLane::ZERO;
            for l in 0..LANES {
                den.re[l] = lam - w2[l];
                den.im[l] = lam * self.eta + w[l] * (self.alpha + self.beta * lam);
            }
            let dn = den.norm_sqr();
            for l in 0..LANES {
                let scale = crate::linalg::SINGULAR_PIVOT_RATIO * (lam.abs() + w2[l]);
                // NaN compares false: a NaN denominator is flagged too.
                let ok = dn[l] > scale * scale;
                bad |= (!ok as LaneMask) << l;
            }
            let inv = den.inv();
            for (j, q) in self.inputs.iter().enumerate() {
                let (q0, q1, q2) = q[r];
                let mut qr = CLane::ZERO;
                for l in 0..LANES {
                    qr.re[l] = q0.re - w2[l] * q2;
                    qr.im[l] = q0.im + w[l] * q1;
                }
                let qr = qr * inv;
                for (o, row) in self.rows.iter().enumerate() {
                    acc[o * ni + j] = acc[o * ni + j] + qr.scale(row[r]);
                }
            }
        }
        let per = acc.len();
        for (l, o) in out.chunks_exact_mut(per).take(f_hz.len()).enumerate() {
            for (x, a) in o.iter_mut().zip(acc.iter()) {
                *x = a.get(l);
            }
        }
        bad
    }
}

/// Largest lane band storage n·(kl + ku + 1) the lane kernel takes (512 KiB of lanes, so one
/// thread's factor stays in L2); larger or denser models use the scalar kernels.
const LANE_STORAGE_MAX: usize = 4096;

/// Frequency-independent structure of Z(ω), computed once per plan.
#[derive(Debug, Clone)]
struct Layout {
    kind: SolverKind,
    /// The lane kernel, when the model is small or narrow enough (see [`FrfPlan::lanes`]).
    lanes: Option<LaneLayout>,
    /// Modal superposition, when the model is proportionally damped (see [`FrfPlan::is_modal`]).
    modal: Option<ModalLayout>,
    /// Storage length of the Z buffer.
    len: usize,
    entries: Vec<Entry>,
    /// Per term: (storage position, b_i·b_j).
    terms: Vec<Vec<(usize, f64)>>,
    rhs: Vec<RhsPlan>,
    /// Output rows as sparse (solver index, weight).
    rows: Vec<Vec<(usize, f64)>>,
    /// `pos[model DOF] = solver index`.
    pos: Vec<usize>,
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
    fn new(model: &Model, inputs: &[Input], rows: &[f64], choice: SolverChoice) -> Layout {
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
    fn cost(&self, n: usize, nrhs: usize) -> f64 {
        match self.kind {
            SolverKind::Dense => (n as f64).powi(3) / 3.0 + (n * n * nrhs) as f64,
            SolverKind::Banded { kl, ku } => {
                (n * (kl + 1) * (kl + ku + 1) + n * nrhs * (2 * kl + ku + 1)) as f64
            }
        }
    }
}

/// A reusable FRF evaluation for fixed inputs and outputs of one model.
///
/// At construction the plan fixes the sparsity pattern of Z(ω) and picks a solver
/// ([`FrfPlan::solver`]); per frequency it only fills the structurally non-zero entries, factors
/// and solves all inputs at once.
#[derive(Debug, Clone)]
pub struct FrfPlan<'m> {
    model: &'m Model,
    input_names: Vec<String>,
    output_names: Vec<String>,
    inputs: Vec<Input>,
    /// Output rows, row-major n_out × n.
    rows: Vec<f64>,
    choice: SolverChoice,
    layout: Layout,
}

enum Factor {
    Dense(ComplexLu),
    Banded(BandLu),
}

/// Scratch for one thread of an [`FrfPlan`].
pub(crate) struct Scratch {
    z: Vec<Complex64>,
    pub(crate) b: Vec<Complex64>,
    kv: Vec<Complex64>,
    lu: Factor,
}

/// Scratch for one thread solving [`LANES`] frequencies at a time: the lane kernel when the plan
/// has one, and a scalar [`Scratch`] for the lanes it hands back (or for every lane otherwise).
pub(crate) struct LaneScratch {
    lu: Option<BandLanes>,
    z: Vec<CLane>,
    /// Solutions in solver order, column-major n × (n_in + extra), one lane per frequency.
    pub(crate) b: Vec<CLane>,
    kv: Vec<CLane>,
    /// Z and right-hand sides before elimination (for the backward-error check).
    z0: Vec<CLane>,
    b0: Vec<CLane>,
    scalar: Scratch,
}

impl<'m> FrfPlan<'m> {
    /// Resolve input and output names.
    pub fn new(model: &'m Model, inputs: &[&str], outputs: &[&str]) -> Result<Self> {
        let mut rows = Vec::with_capacity(outputs.len() * model.dof_count());
        for o in outputs {
            rows.extend(model.output(o)?);
        }
        Self::from_rows(model, inputs, outputs.iter().map(|s| s.to_string()).collect(), rows)
    }

    /// A plan whose outputs are arbitrary real rows over the free DOFs (row-major
    /// `names.len()` × n), e.g. modal coordinates φᵀM.
    pub fn with_rows(model: &'m Model, inputs: &[&str], names: Vec<String>, rows: Vec<f64>) -> Result<Self> {
        let n = model.dof_count();
        if rows.len() != names.len() * n {
            return Err(Error::shape("output rows", names.len() * n, rows.len()));
        }
        Self::from_rows(model, inputs, names, rows)
    }

    /// Resolve the inputs and lay out the solver once (the modal path's eigen-solution included).
    fn from_rows(
        model: &'m Model,
        inputs: &[&str],
        output_names: Vec<String>,
        rows: Vec<f64>,
    ) -> Result<Self> {
        if inputs.is_empty() {
            return Err(Error::invalid("inputs", "at least one input is needed"));
        }
        let ins = inputs.iter().map(|n| model.input(n)).collect::<Result<Vec<_>>>()?;
        let layout = Layout::new(model, &ins, &rows, SolverChoice::Auto);
        Ok(FrfPlan {
            model,
            input_names: inputs.iter().map(|s| s.to_string()).collect(),
            output_names,
            inputs: ins,
            rows,
            choice: SolverChoice::Auto,
            layout,
        })
    }

    /// The same plan with a forced solver choice (for checks and benchmarks; results agree to
    /// round-off).
    pub fn with_solver(mut self, choice: SolverChoice) -> Self {
        self.choice = choice;
        self.layout = Layout::new(self.model, &self.inputs, &self.rows, choice);
        self
    }

    /// The solver in use. Rule for [`SolverChoice::Auto`]: take the smaller bandwidth of the
    /// natural and the reverse Cuthill–McKee order of Z's pattern (union of M, C, K and all
    /// frequency-dependent terms); use the banded LU when n·kl·(kl + ku + 1) < n³/6, otherwise
    /// faer's dense LU.
    pub fn solver(&self) -> SolverKind {
        self.layout.kind
    }

    pub(crate) fn model(&self) -> &'m Model {
        self.model
    }

    pub(crate) fn n_inputs(&self) -> usize {
        self.inputs.len()
    }

    pub(crate) fn scratch_with(&self, extra_rhs: usize) -> Scratch {
        let n = self.model.dof_count();
        let m = self.inputs.len() + extra_rhs;
        Scratch {
            z: vec![Complex64::default(); self.layout.len],
            b: vec![Complex64::default(); n * m],
            kv: vec![Complex64::default(); self.model.terms.len()],
            lu: match self.layout.kind {
                SolverKind::Dense => Factor::Dense(ComplexLu::new(n, m)),
                SolverKind::Banded { kl, ku } => Factor::Banded(BandLu::new(n, kl, ku)),
            },
        }
    }

    /// Band (kl, ku) of the lane kernel, when this plan uses it.
    ///
    /// Rule for [`SolverChoice::Auto`]: when the band storage n·(kl + ku + 1) of the scalar
    /// kernel's order is at most 4096 entries (a dense model counts with its natural band), eight
    /// frequencies are eliminated at once, one per SIMD lane, without row exchanges; a frequency
    /// whose solution has a backward error above 1e-14, or whose pivots look singular, is redone
    /// by the scalar kernel. [`SolverChoice::Dense`] and [`SolverChoice::Banded`] use only the scalar
    /// kernels (the reference paths).
    pub fn lanes(&self) -> Option<(usize, usize)> {
        self.layout.lanes.as_ref().map(|l| (l.kl, l.ku))
    }

    /// True when [`FrfPlan::evaluate`] sums modes instead of solving. Rule for
    /// [`SolverChoice::Auto`]: at most 64 DOFs, no frequency-dependent stiffness, one loss factor
    /// η with K* = K′(1 + iη) and C = αM + βK′ (Rayleigh damping), each to a relative 1e-12.
    pub fn is_modal(&self) -> bool {
        self.layout.modal.is_some()
    }

    pub(crate) fn lane_scratch_with(&self, extra_rhs: usize) -> LaneScratch {
        let n = self.model.dof_count();
        let lu = self.layout.lanes.as_ref().map(|ll| BandLanes::new(n, ll.kl, ll.ku));
        let len = lu.as_ref().map_or(0, |l| l.storage_len());
        LaneScratch {
            z: vec![CLane::ZERO; len],
            b: vec![CLane::ZERO; n * (self.inputs.len() + extra_rhs)],
            kv: vec![CLane::ZERO; self.model.terms.len()],
            z0: vec![CLane::ZERO; len],
            b0: vec![CLane::ZERO; n * (self.inputs.len() + extra_rhs)],
            lu,
            scalar: self.scratch_with(extra_rhs),
        }
    }

    /// [`FrfPlan::solve_at`] for up to [`LANES`] frequencies `f_hz` at once: afterwards lane l of
    /// `s.b` holds the solutions at `f_hz[l]` (lanes past `f_hz.len()` are unspecified). Uses the
    /// lane kernel where the plan has one and the scalar kernel for the lanes it hands back; call
    /// inside [`with_best_simd`].
    #[inline(always)]
    pub(crate) fn solve_lanes(
        &self,
        s: &mut LaneScratch,
        f_hz: &[f64],
        extra: &[Vec<(usize, f64)>],
    ) -> Result<()> {
        let bad = match (self.layout.lanes.as_ref(), s.lu.take()) {
            (Some(ll), Some(mut lu)) => {
                let bad = self.lane_kernel(ll, &mut lu, s, f_hz, extra);
                s.lu = Some(lu);
                bad
            }
            _ => LaneMask::MAX,
        };
        if bad != 0 {
            for (l, &fh) in f_hz.iter().enumerate().take(LANES) {
                if bad & (1 << l) != 0 {
                    self.solve_at(&mut s.scalar, fh, extra)?;
                    for (x, y) in s.b.iter_mut().zip(&s.scalar.b) {
                        x.set(l, *y);
                    }
                }
            }
        }
        Ok(())
    }

    /// Fill, factor, solve and check the lanes; returns the lanes to redo.
    #[inline(always)]
    fn lane_kernel(
        &self,
        ll: &LaneLayout,
        lu: &mut BandLanes,
        s: &mut LaneScratch,
        f_hz: &[f64],
        extra: &[Vec<(usize, f64)>],
    ) -> LaneMask {
        let m = self.model;
        let n = m.dof_count();
        if f_hz.is_empty() {
            return 0;
        }
        let fl = pad_block(f_hz);
        let mut w: Lane = [0.0; LANES];
        let mut w2: Lane = [0.0; LANES];
        for l in 0..LANES {
            w[l] = 2.0 * PI * fl[l];
            w2[l] = w[l] * w[l];
        }
        s.z.iter_mut().for_each(|z| *z = CLane::ZERO);
        for e in &ll.entries {
            let z = &mut s.z[e.pos];
            for l in 0..LANES {
                z.re[l] = e.k.re - w2[l] * e.m;
                z.im[l] = e.k.im + w[l] * e.c;
            }
        }
        for ((t, kv), pos) in m.terms.iter().zip(s.kv.iter_mut()).zip(&ll.terms) {
            *kv = t.model.elastic_at_lanes(&fl);
            for &(p, bb) in pos {
                s.z[p] = s.z[p] + kv.scale(bb);
            }
        }
        s.b.iter_mut().for_each(|x| *x = CLane::ZERO);
        for (j, r) in self.layout.rhs.iter().enumerate() {
            let col = &mut s.b[j * n..(j + 1) * n];
            for &(i, k, c, mm) in &r.entries {
                for l in 0..LANES {
                    col[i].re[l] = w2[l] * mm - k.re;
                    col[i].im[l] = -(k.im + w[l] * c);
                }
            }
            for &(t, i, bb) in &r.terms {
                col[i] = col[i] + s.kv[t].scale(-bb);
            }
        }
        let ni = self.inputs.len();
        for (j, e) in extra.iter().enumerate() {
            let col = &mut s.b[(ni + j) * n..(ni + j + 1) * n];
            for &(i, v) in e {
                col[self.solver_index(i)] = CLane::splat(Complex64::new(v, 0.0));
            }
        }
        let nrhs = ni + extra.len();
        s.z0.copy_from_slice(&s.z);
        s.b0.copy_from_slice(&s.b);
        let bad = lu.factor_in_place(&mut s.z);
        lu.solve_in_place(&s.z, &mut s.b, nrhs);
        bad | lu.backward_error_mask(&s.z0, &s.b0, &s.b, nrhs)
    }

    /// Output rows dotted with the solved input columns of lane `s.b`, scattered into `out`
    /// (per frequency n_out × n_in, for the first `count` lanes).
    #[inline(always)]
    fn project_lanes(&self, s: &LaneScratch, count: usize, out: &mut [Complex64]) {
        let n = self.model.dof_count();
        let ni = self.inputs.len();
        let per = self.output_names.len() * ni;
        for (o, row) in self.layout.rows.iter().enumerate() {
            for j in 0..ni {
                let x = &s.b[j * n..(j + 1) * n];
                let mut acc = CLane::ZERO;
                for &(i, r) in row {
                    acc = acc + x[i].scale(r);
                }
                for l in 0..count {
                    out[l * per + o * ni + j] = acc.get(l);
                }
            }
        }
    }

    /// Evaluate on a validated grid.
    pub fn evaluate(&self, freq_hz: &[f64]) -> Result<Frf> {
        crate::grid::validate_freqs("freq_hz", freq_hz)?;
        let (no, ni) = (self.output_names.len(), self.inputs.len());
        let mut data = Array3::<Complex64>::zeros((freq_hz.len(), no, ni));
        self.evaluate_into(
            freq_hz,
            data.as_slice_mut().ok_or_else(|| Error::invalid("data", "not contiguous"))?,
        )?;
        Ok(Frf {
            freq_hz: freq_hz.to_vec(),
            inputs: self.input_names.clone(),
            outputs: self.output_names.clone(),
            data,
        })
    }

    /// Evaluate into `out` laid out (n_freq, n_out, n_in) row-major.
    pub fn evaluate_into(&self, freq_hz: &[f64], out: &mut [Complex64]) -> Result<()> {
        crate::grid::validate_freqs("freq_hz", freq_hz)?;
        if self.output_names.is_empty() {
            return Err(Error::invalid("outputs", "at least one output is needed"));
        }
        let per = self.output_names.len() * self.inputs.len();
        if out.len() != freq_hz.len() * per {
            return Err(Error::shape("FRF output buffer", freq_hz.len() * per, out.len()));
        }
        let n = self.model.dof_count();
        if let Some(ml) = &self.layout.modal {
            let mut acc = vec![CLane::ZERO; per];
            return with_best_simd(
                #[inline(always)]
                || {
                    for (o, f) in out.chunks_mut(LANES * per).zip(freq_hz.chunks(LANES)) {
                        let bad = ml.evaluate_lanes(f, &mut acc, o);
                        if let Some(&fh) =
                            f.iter().enumerate().find(|(l, _)| bad & (1 << l) != 0).map(|(_, fh)| fh)
                        {
                            return Err(Error::Singular { freq_hz: fh });
                        }
                    }
                    Ok(())
                },
            );
        }
        let block = self.block_len(freq_hz.len(), self.layout.cost(n, self.inputs.len()));
        out.par_chunks_mut(block * per).zip(freq_hz.par_chunks(block)).try_for_each(|(o, f)| {
            let mut ls = self.lane_scratch_with(0);
            with_best_simd(
                #[inline(always)]
                || {
                    for (ob, fb) in o.chunks_mut(LANES * per).zip(f.chunks(LANES)) {
                        self.solve_lanes(&mut ls, fb, &[])?;
                        self.project_lanes(&ls, fb.len(), ob);
                    }
                    Ok(())
                },
            )
        })
    }

    /// Frequencies per parallel block: one block (sequential) below ~2·10⁵ multiply–adds in
    /// total, where a thread hop costs more than it saves (tuned on the chain benches).
    pub(crate) fn block_len(&self, n_freq: usize, cost_per_freq: f64) -> usize {
        if n_freq as f64 * cost_per_freq > 2e5 && rayon::current_num_threads() > 1 {
            (n_freq / (4 * rayon::current_num_threads())).max(16).next_multiple_of(LANES)
        } else {
            n_freq.max(1)
        }
    }

    /// Fill Z(ω) and the right-hand sides (the plan's inputs, then `extra` fixed real columns
    /// given in model order as sparse (index, value)), factor and solve: afterwards `s.b` holds
    /// the solutions in solver order, column-major n × (n_in + extra.len()).
    pub(crate) fn solve_at(&self, s: &mut Scratch, f_hz: f64, extra: &[Vec<(usize, f64)>]) -> Result<()> {
        let m = self.model;
        let n = m.dof_count();
        let w = 2.0 * PI * f_hz;
        let w2 = w * w;
        let lay = &self.layout;
        s.z.iter_mut().for_each(|z| *z = Complex64::default());
        for e in &lay.entries {
            s.z[e.pos] = Complex64::new(e.k.re - w2 * e.m, e.k.im + w * e.c);
        }
        for ((t, kv), pos) in m.terms.iter().zip(s.kv.iter_mut()).zip(&lay.terms) {
            *kv = t.model.elastic_at(f_hz);
            for &(p, bb) in pos {
                s.z[p] += *kv * bb;
            }
        }
        s.b.iter_mut().for_each(|x| *x = Complex64::default());
        for (j, r) in lay.rhs.iter().enumerate() {
            let col = &mut s.b[j * n..(j + 1) * n];
            for &(i, k, c, mm) in &r.entries {
                col[i] = -Complex64::new(k.re - w2 * mm, k.im + w * c);
            }
            for &(t, i, bb) in &r.terms {
                col[i] -= s.kv[t] * bb;
            }
        }
        let ni = self.inputs.len();
        for (j, e) in extra.iter().enumerate() {
            let col = &mut s.b[(ni + j) * n..(ni + j + 1) * n];
            for &(i, v) in e {
                col[self.solver_index(i)] = Complex64::new(v, 0.0);
            }
        }
        let nrhs = ni + extra.len();
        let res = match &mut s.lu {
            Factor::Dense(lu) => lu.solve_in_place(&mut s.z, &mut s.b),
            Factor::Banded(lu) => {
                let r = lu.factor_in_place(&mut s.z);
                if r.is_ok() {
                    lu.solve_in_place(&s.z, &mut s.b, nrhs);
                }
                r
            }
        };
        res.map_err(|_| Error::Singular { freq_hz: f_hz })
    }

    /// Solver-order index of model DOF `i`.
    pub(crate) fn solver_index(&self, i: usize) -> usize {
        self.layout.pos[i]
    }

    /// Output rows (sparse, solver order).
    pub(crate) fn sparse_rows(&self) -> &[Vec<(usize, f64)>] {
        &self.layout.rows
    }
}

/// Z(ω) = K*(ω) + iωC − ω²M over the free DOFs into `z` (column-major n × n).
pub(crate) fn build_dynamic_stiffness(m: &Model, f_hz: f64, z: &mut [Complex64]) {
    let w = 2.0 * PI * f_hz;
    let w2 = w * w;
    for (((zk, k), c), mm) in z.iter_mut().zip(&m.k_ff).zip(&m.c_ff).zip(&m.m_ff) {
        *zk = Complex64::new(k.re - w2 * mm, k.im + w * c);
    }
    let n = m.dof_count();
    for t in &m.terms {
        let kv = t.model.elastic_at(f_hz);
        for &(j, bj) in &t.bf {
            for &(i, bi) in &t.bf {
                z[i + j * n] += kv * (bi * bj);
            }
        }
    }
}

impl Model {
    /// FRF of every `outputs` × `inputs` pair on `freq_hz` (see [`crate::model`] for names).
    pub fn frf(&self, freq_hz: &[f64], inputs: &[&str], outputs: &[&str]) -> Result<Frf> {
        FrfPlan::new(self, inputs, outputs)?.evaluate(freq_hz)
    }
}

#[cfg(test)]
pub(crate) mod tests {
    use super::*;

    /// A chain ground–s0–m0–s1–m1–… with mixed spring models (as the bench generator). `pads`
    /// overrides the stiffness lines of the first springs.
    pub(crate) fn chain(n: usize, pads: &[&str]) -> Model {
        let mut s = String::new();
        for i in 0..n {
            s.push_str(&format!(
                "[[body]]\nname = \"m{i}\"\nmass_kg = {}\ncg_m = [0, 0, {}]\ninertia_kgm2 = [1, 1, 1]\ndofs = [\"z\"]\n\n",
                2.0 + (i % 5) as f64,
                i as f64 * 0.1
            ));
        }
        for i in 0..n {
            let from = if i == 0 { "ground".to_string() } else { format!("m{}", i - 1) };
            let k = 1.0e6 * (1.0 + 0.3 * ((i * 7) % 11) as f64);
            let stiff = if let Some(p) = pads.get(i) {
                p.to_string()
            } else if i == 0 {
                "zener = { k0 = 4e5, k_inf = 1.2e6, tau_s = 0.002 }".to_string()
            } else if i % 3 == 0 {
                format!("stiffness_n_per_m = {k}\ndamping_ns_per_m = 40.0")
            } else {
                format!("stiffness_n_per_m = {k}\nloss_factor = 0.02")
            };
            s.push_str(&format!(
                "[[spring]]\nname = \"s{i}\"\nfrom = \"{from}\"\nto = \"m{i}\"\nat_m = [0, 0, {}]\ndirection = [0, 0, 1]\n{stiff}\n\n",
                i as f64 * 0.1
            ));
        }
        Model::from_toml_str(&s, "chain").unwrap()
    }

    pub(crate) fn pier(elements: usize) -> Model {
        let s = format!(
            "[[body]]\nname = \"head\"\nmass_kg = 30\ncg_m = [0, 0, 1.5]\ninertia_kgm2 = [0.6, 0.6, 0.4]\n\n\
             [[beam]]\nname = \"pier\"\nfrom = \"ground\"\nto = \"head\"\nfrom_at_m = [0, 0, 0]\nto_at_m = [0, 0, 1.5]\n\
             section = {{ shape = \"tube\", outer_diameter_m = 0.2, wall_m = 0.006 }}\nmaterial = \"steel-s235\"\n\
             elements = {elements}\nadded_mass_kg_per_m = 40\nadded_loss_factor = 0.02\n"
        );
        Model::from_toml_str(&s, "pier").unwrap()
    }

    pub(crate) fn max_rel_diff(a: &[Complex64], b: &[Complex64]) -> f64 {
        let scale = b.iter().map(|x| x.norm()).fold(0.0, f64::max);
        a.iter().zip(b).map(|(x, y)| (x - y).norm()).fold(0.0, f64::max) / scale
    }

    fn grid(nf: usize) -> Vec<f64> {
        (0..nf).map(|k| 0.5 * (1000.0f64).powf(k as f64 / (nf - 1) as f64)).collect()
    }

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

    #[test]
    fn banded_path_matches_dense_path() {
        // Oracle: the dense faer LU path on the natural order (the original direct solve).
        for (m, ins, outs) in [
            (chain(6, &[]), vec!["ground_z", "force:m2:z"], vec!["m5:z", "m0:z"]),
            (chain(12, &[]), vec!["ground_z"], vec!["m11:z"]),
            (chain(48, &[]), vec!["ground_z", "force:m30:z"], vec!["m47:z", "m10:z"]),
            (pier(8), vec!["ground_x", "ground_z", "force:head:y"], vec!["head:rx", "head:x", "head:z"]),
        ] {
            let f = grid(300);
            let auto = FrfPlan::new(&m, &ins, &outs).unwrap();
            assert!(matches!(auto.solver(), SolverKind::Banded { .. }), "{:?}", auto.solver());
            if ins[0] == "ground_z" {
                // A chain is tridiagonal in a suitable order, whatever order assembly numbers it.
                assert_eq!(auto.solver(), SolverKind::Banded { kl: 1, ku: 1 });
            }
            let dense = FrfPlan::new(&m, &ins, &outs).unwrap().with_solver(SolverChoice::Dense);
            assert_eq!(dense.solver(), SolverKind::Dense);
            let a = auto.evaluate(&f).unwrap();
            let d = dense.evaluate(&f).unwrap();
            let e = max_rel_diff(a.data.as_slice().unwrap(), d.data.as_slice().unwrap());
            assert!(e < 1e-9, "n = {}: {e}", m.dof_count());
        }
    }

    #[test]
    fn modal_path_matches_dense_path_for_proportional_damping() {
        // Oracle: the dense direct solve. (a) one loss factor, no dashpots; (b) dashpots c = βk
        // on every spring (C = βK′, Rayleigh with α = 0).
        let springs = |i: usize| 1.0e6 * (1.0 + 0.3 * ((i * 7) % 11) as f64);
        let uniform: Vec<String> =
            (0..10).map(|i| format!("stiffness_n_per_m = {}\nloss_factor = 0.03", springs(i))).collect();
        let rayleigh: Vec<String> = (0..10)
            .map(|i| format!("stiffness_n_per_m = {}\ndamping_ns_per_m = {}", springs(i), 2e-4 * springs(i)))
            .collect();
        for pads in [&uniform, &rayleigh] {
            let pr: Vec<&str> = pads.iter().map(|s| s.as_str()).collect();
            let m = chain(10, &pr);
            let (ins, outs) = (["ground_z", "force:m4:z"], ["m9:z", "m0:z"]);
            let plan = FrfPlan::new(&m, &ins, &outs).unwrap();
            assert!(plan.is_modal());
            let dense = FrfPlan::new(&m, &ins, &outs).unwrap().with_solver(SolverChoice::Dense);
            assert!(!dense.is_modal());
            let f = grid(500);
            let (a, d) = (plan.evaluate(&f).unwrap(), dense.evaluate(&f).unwrap());
            let e = max_rel_diff(a.data.as_slice().unwrap(), d.data.as_slice().unwrap());
            assert!(e < 1e-9, "{e}");
        }
        // Not proportional: a Zener pad (frequency dependent), or two loss factors.
        assert!(!FrfPlan::new(&chain(10, &[]), &["ground_z"], &["m9:z"]).unwrap().is_modal());
        let mut mixed = uniform.clone();
        mixed[3] = format!("stiffness_n_per_m = {}\nloss_factor = 0.05", springs(3));
        let pr: Vec<&str> = mixed.iter().map(|s| s.as_str()).collect();
        assert!(!FrfPlan::new(&chain(10, &pr), &["ground_z"], &["m9:z"]).unwrap().is_modal());
    }

    #[test]
    fn dense_path_matches_formula_for_one_dof() {
        // Receptance of a 1-DOF hysteretic oscillator: 1/(k(1+iη) − ω²m) (closed form).
        let m = chain(1, &["stiffness_n_per_m = 1e6\nloss_factor = 0.05"]);
        let f = grid(50);
        let r = FrfPlan::new(&m, &["force:m0:z"], &["m0:z"]).unwrap().evaluate(&f).unwrap();
        for (k, &fh) in f.iter().enumerate() {
            let w = 2.0 * PI * fh;
            let h = 1.0 / Complex64::new(1e6 - w * w * 2.0, 1e6 * 0.05);
            assert!((r.data[[k, 0, 0]] - h).norm() <= 1e-12 * h.norm());
        }
    }
}

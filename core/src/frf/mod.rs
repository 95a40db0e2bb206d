//! Frequency response of a model: Z(ω) x = b with Z(ω) = K*(ω) + iωC − ω²M over the free DOFs,
//! for every requested input at once.
//!
//! - [`FrfPlan`] (here): resolves names once, owns its scratch space and evaluates grids by one
//!   LU per frequency (many right-hand sides), eight frequencies at a time where the lane kernel
//!   applies, in parallel over frequency blocks (rayon) when the work is large enough to pay.
//! - `layout`: the frequency-independent structure (solver order and band, storage positions).
//! - `modal`: the modal-superposition path for small proportionally damped models.
//! - [`variants`]: many variants of one model that each replace a few springs (Woodbury
//!   identity and rational form).
//!
//! RMS outputs integrate |H|²·S over the grid by the trapezoid rule (S a one-sided input PSD
//! per Hz given on the grid).

mod layout;
mod modal;
pub mod variants;

pub use layout::{SolverChoice, SolverKind};

use crate::error::{Error, Result};
use crate::grid::FreqGrid;
use crate::linalg::lanes::{BandLanes, CLane, LANES, Lane, LaneMask, pad_block, with_best_simd};
use crate::linalg::{BandLu, ComplexLu};
use crate::model::{Input, Model};
use layout::{LaneLayout, Layout};
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

/// An RMS output requested from an evaluation: the RMS response of each (output, input) pair to
/// an input PSD on the evaluation grid, RMS = sqrt(∫ |H|² S df) by the trapezoid rule.
#[derive(Debug)]
pub struct RmsOut<'a> {
    /// One-sided input PSD per Hz, one value ≥ 0 per grid frequency.
    pub input_psd: &'a [f64],
    /// The RMS values, row-major as the evaluation documents (per (output, input) last).
    pub rms: &'a mut [f64],
}

/// Trapezoid weights times the PSD, zero-padded to `len` ≥ the grid length:
/// Σ_k w_k |H_k|² equals Σ ½ (f_k − f_{k−1}) (y_k + y_{k−1}) with y = |H|² S.
pub(crate) fn trapezoid_psd_weights(grid: &FreqGrid, input_psd: &[f64], len: usize) -> Result<Vec<f64>> {
    let (f, nf) = (grid.hz(), grid.len());
    if input_psd.len() != nf {
        return Err(Error::shape("input_psd (one value per frequency)", nf, input_psd.len()));
    }
    for (i, &v) in input_psd.iter().enumerate() {
        crate::error::require_non_negative(|| format!("input_psd[{i}]"), v)?;
    }
    let mut wts = vec![0.0; len.max(nf)];
    crate::grid::add_trapezoid_weights(f, Some(input_psd), &mut wts[..nf]);
    Ok(wts)
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

    /// FRFs on `grid` as an owned [`Frf`].
    pub fn evaluate(&self, grid: &FreqGrid) -> Result<Frf> {
        let (no, ni) = (self.output_names.len(), self.inputs.len());
        let mut data = Array3::<Complex64>::zeros((grid.len(), no, ni));
        self.evaluate_into(
            grid,
            Some(data.as_slice_mut().ok_or_else(|| Error::invalid("data", "not contiguous"))?),
            None,
        )?;
        Ok(Frf {
            freq_hz: grid.hz().to_vec(),
            inputs: self.input_names.clone(),
            outputs: self.output_names.clone(),
            data,
        })
    }

    /// Evaluate on `grid` into caller-owned buffers: the FRFs into `frf_out` when given, laid
    /// out (n_freq, n_out, n_in) row-major, and the RMS response to an input PSD when `rms` is
    /// given, laid out (n_out, n_in). Without `frf_out` the FRFs are still computed (in a
    /// temporary buffer) when the RMS needs them.
    pub fn evaluate_into(
        &self,
        grid: &FreqGrid,
        frf_out: Option<&mut [Complex64]>,
        rms: Option<RmsOut<'_>>,
    ) -> Result<()> {
        if self.output_names.is_empty() {
            return Err(Error::invalid("outputs", "at least one output is needed"));
        }
        let per = self.output_names.len() * self.inputs.len();
        let nf = grid.len();
        if let Some(out) = &frf_out
            && out.len() != nf * per
        {
            return Err(Error::shape("FRF output buffer", nf * per, out.len()));
        }
        let Some(RmsOut { input_psd, rms }) = rms else {
            return match frf_out {
                Some(out) => self.frf_into(grid.hz(), out),
                None => Ok(()),
            };
        };
        let wts = trapezoid_psd_weights(grid, input_psd, nf)?;
        if rms.len() != per {
            return Err(Error::shape("FRF RMS buffer", per, rms.len()));
        }
        let mut tmp = Vec::new();
        let out = match frf_out {
            Some(out) => out,
            None => {
                tmp.resize(nf * per, Complex64::default());
                &mut tmp[..]
            }
        };
        self.frf_into(grid.hz(), out)?;
        rms.fill(0.0);
        for (h, w) in out.chunks_exact(per).zip(&wts) {
            for (r, x) in rms.iter_mut().zip(h) {
                *r += w * x.norm_sqr();
            }
        }
        rms.iter_mut().for_each(|r| *r = r.sqrt());
        Ok(())
    }

    /// FRFs on a valid grid into `out`, (n_freq, n_out, n_in) row-major, its length checked.
    fn frf_into(&self, freq_hz: &[f64], out: &mut [Complex64]) -> Result<()> {
        let per = self.output_names.len() * self.inputs.len();
        let n = self.model.dof_count();
        if let Some(ml) = &self.layout.modal {
            return ml.evaluate_into(freq_hz, per, out);
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
    /// FRF of every `outputs` × `inputs` pair on `freq_hz` (see [`crate::model`] for names;
    /// the grid is validated as [`FreqGrid::new`] does).
    pub fn frf(&self, freq_hz: &[f64], inputs: &[&str], outputs: &[&str]) -> Result<Frf> {
        let plan = FrfPlan::new(self, inputs, outputs)?;
        plan.evaluate(&FreqGrid::new(freq_hz.to_vec())?)
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

    fn grid(nf: usize) -> FreqGrid {
        FreqGrid::new((0..nf).map(|k| 0.5 * (1000.0f64).powf(k as f64 / (nf - 1) as f64)).collect()).unwrap()
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
        for (k, &fh) in f.hz().iter().enumerate() {
            let w = 2.0 * PI * fh;
            let h = 1.0 / Complex64::new(1e6 - w * w * 2.0, 1e6 * 0.05);
            assert!((r.data[[k, 0, 0]] - h).norm() <= 1e-12 * h.norm());
        }
    }

    #[test]
    fn rms_output_is_the_trapezoid_integral_of_the_frf() {
        // Oracle: RMS = sqrt(∫ |H|² S df) by the trapezoid rule on the grid (crate conventions),
        // summed here directly from the owned FRFs.
        let m = chain(6, &[]);
        let (ins, outs) = (["ground_z", "force:m2:z"], ["m5:z", "m0:z"]);
        let plan = FrfPlan::new(&m, &ins, &outs).unwrap();
        let f = grid(400);
        let psd: Vec<f64> = f.hz().iter().map(|x| 1e-12 / (1.0 + x / 30.0)).collect();
        let h = plan.evaluate(&f).unwrap();
        let mut buf = vec![Complex64::default(); f.len() * 4];
        let (mut with_frf, mut rms_only) = (vec![0.0; 4], vec![0.0; 4]);
        let rms = |r| Some(RmsOut { input_psd: &psd, rms: r });
        plan.evaluate_into(&f, Some(&mut buf), rms(&mut with_frf)).unwrap();
        plan.evaluate_into(&f, None, rms(&mut rms_only)).unwrap();
        assert_eq!(buf.as_slice(), h.data.as_slice().unwrap());
        assert_eq!(with_frf, rms_only);
        let hz = f.hz();
        for (o, j) in (0..2).flat_map(|o| (0..2).map(move |j| (o, j))) {
            let y = |k: usize| h.data[[k, o, j]].norm_sqr() * psd[k];
            let ms: f64 = (1..hz.len()).map(|k| 0.5 * (hz[k] - hz[k - 1]) * (y(k) + y(k - 1))).sum();
            let got = rms_only[o * 2 + j];
            assert!((got - ms.sqrt()).abs() <= 1e-12 * ms.sqrt(), "({o}, {j}): {got} vs {}", ms.sqrt());
        }
        // Bad requests: PSD length, a negative PSD value (named by index), RMS buffer length.
        let r = plan.evaluate_into(&f, None, Some(RmsOut { input_psd: &psd[1..], rms: &mut rms_only }));
        assert!(matches!(r, Err(Error::ShapeMismatch { .. })), "{r:?}");
        let mut neg = psd.clone();
        neg[3] = -1.0;
        let e =
            plan.evaluate_into(&f, None, Some(RmsOut { input_psd: &neg, rms: &mut rms_only })).unwrap_err();
        assert!(e.to_string().contains("input_psd[3]"), "{e}");
        let r = plan.evaluate_into(&f, None, Some(RmsOut { input_psd: &psd, rms: &mut [0.0; 3] }));
        assert!(matches!(r, Err(Error::ShapeMismatch { .. })), "{r:?}");
        let r = plan.evaluate_into(&f, Some(&mut buf[1..]), None);
        assert!(matches!(r, Err(Error::ShapeMismatch { .. })), "{r:?}");
    }
}

//! Many variants of one model, each replacing a few rank-one springs (isolator pads, feet).
//!
//! With U = [b_1 … b_k] the full-system vectors of the replaced springs and
//! D(ω) = diag(k_new,s(f) − k_old,s(f)) (complete complex stiffness, viscous part included), every
//! variant is Z(ω) + U_f D U_fᵀ, and its ground load changes by −U_f D U_gᵀ e_d. Per frequency the
//! reference Z(ω) is factored once and solved for the inputs and U_f (k extra columns); per
//! variant only the k × k capacitance system (I + D U_fᵀ Z⁻¹ U_f) w = D (g − U_fᵀ x_0) is solved
//! (Woodbury identity; Hager, SIAM Review 31, 1989), and x = x_0 + Z⁻¹U_f w; with fewer outputs
//! than inputs its transpose is solved once per output row instead. Any stiffness model works,
//! replaced and replacing alike.
//!
//! For k ≤ [`RATIONAL_SPRINGS_MAX`] each variant instead evaluates a rational form. By the
//! matrix determinant lemma det(I + D G) = Σ_S d_S det G[S, S], and y·det(I + D G) = Σ_S d_S
//! det M[{0} ∪ S, {0} ∪ S] with the bordered M = [[c·x0, −c·Y], [g − h, G]] (Cramer's rule): both
//! are multilinear in the stiffness changes d_s, with the principal minors as coefficients, taken
//! once per frequency. A variant then costs 2^k − 1 complex multiply-adds per output (nested one
//! spring at a time) instead of a factorisation. Each lane carries the bound
//! Σ_S |d_S|·perm|M[S, S]| on the rounding of these sums; where it exceeds [`CANCELLATION_MAX`]
//! times the value (cancellation near a resonance or an antiresonance), that block is redone by
//! the capacitance solve.
//!
//! Both stages run eight frequencies at once, one per SIMD lane ([`crate::linalg::lanes`]): the
//! reference solves through [`FrfPlan`]'s lane kernel, the capacitance systems through the same
//! banded kernel with kl = ku = k − 1, each lane checked by its backward error and redone by the
//! pivoted scalar solver when the check fails; the rational-form sums are those of
//! [`crate::linalg::rational`]. The RMS integral is accumulated in the same pass.

use super::{FrfPlan, RmsOut, trapezoid_psd_weights};
use crate::error::{Error, Result};
use crate::grid::FreqGrid;
use crate::linalg::lanes::{
    BandLanes, CLane, LANES, Lane, LaneMask, dense_backward_error_mask, dense_factor, dense_solve, pad_block,
    principal_minors, with_best_simd,
};
use crate::linalg::rational::{RationalLoop, RationalSums, with_rational_sums};
use crate::linalg::solve_small_in_place;
use crate::model::{Input, Model};
use crate::stiffness::StiffnessModel;
use ndarray::{Array3, Array4};
use num_complex::Complex64;
use rayon::prelude::*;

/// Largest number of replaced springs evaluated through the rational form (2^k terms per output).
pub const RATIONAL_SPRINGS_MAX: usize = 4;

/// Largest accepted ratio of the rounding bound of a rational-form sum to its modulus (about
/// 1e4·(k + 2)·ε ≈ 1e-11 relative error); larger ratios take the capacitance solve.
pub const CANCELLATION_MAX: f64 = 1e4;

/// Variants of one model that each replace the same named springs by other stiffness models.
#[derive(Debug, Clone)]
pub struct VariantPlan<'m> {
    plan: FrfPlan<'m>,
    springs: Vec<usize>,
    /// U_f columns, sparse over the free DOFs (model order).
    u: Vec<Vec<(usize, f64)>>,
    /// g[s + k·j] = −b_g,s[d] for ground input j along d, 0 for loads.
    gvec: Vec<Complex64>,
    n_out: usize,
    /// Evaluate variants by the rational form (k ≤ [`RATIONAL_SPRINGS_MAX`]).
    rational: bool,
}

impl<'m> VariantPlan<'m> {
    /// Resolve the springs to replace (by their names in the model file) and the inputs/outputs.
    pub fn new(model: &'m Model, spring_names: &[&str], inputs: &[&str], outputs: &[&str]) -> Result<Self> {
        if spring_names.is_empty() {
            return Err(Error::invalid("spring_names", "at least one spring to replace is needed"));
        }
        let plan = FrfPlan::new(model, inputs, outputs)?;
        if outputs.is_empty() {
            return Err(Error::invalid("outputs", "at least one output is needed"));
        }
        let mut springs = Vec::new();
        for name in spring_names {
            let i = model.springs.iter().position(|t| t.name == *name).ok_or_else(|| Error::UnknownName {
                kind: "rank-one spring".into(),
                name: name.to_string(),
                known: model.springs.iter().map(|t| t.name.clone()).collect::<Vec<_>>().join(", "),
            })?;
            if springs.contains(&i) {
                return Err(Error::invalid("spring_names", format!("'{name}' is listed twice")));
            }
            springs.push(i);
        }
        let k = springs.len();
        let u: Vec<Vec<(usize, f64)>> = springs.iter().map(|&i| model.springs[i].bf.clone()).collect();
        let ins: Vec<Input> = inputs.iter().map(|n| model.input(n)).collect::<Result<_>>()?;
        let mut gvec = vec![Complex64::default(); k * ins.len()];
        for (j, inp) in ins.iter().enumerate() {
            if let Input::Ground(d) = inp {
                for (s, &i) in springs.iter().enumerate() {
                    gvec[s + k * j] = Complex64::new(-model.springs[i].bg[*d], 0.0);
                }
            }
        }
        Ok(VariantPlan { plan, springs, u, gvec, n_out: outputs.len(), rational: k <= RATIONAL_SPRINGS_MAX })
    }

    /// The same plan with the rational form switched on or off (tests compare both paths).
    #[cfg(test)]
    fn with_rational(mut self, on: bool) -> Self {
        self.rational = on && self.springs.len() <= RATIONAL_SPRINGS_MAX;
        self
    }

    /// Number of replaced springs k.
    pub fn n_springs(&self) -> usize {
        self.springs.len()
    }

    /// Per-block record length: [c·x0 | c·Y | G | g − h | k_old | rational coefficients].
    fn rec_len(&self) -> usize {
        let (k, ni, no) = (self.springs.len(), self.plan.n_inputs(), self.n_out);
        no * ni + no * k + k * k + k * ni + k + self.bound_len()
    }

    /// Rational-form coefficients per block, and their bounds: [D_S | N_(o,j),S] over subsets S.
    fn bound_len(&self) -> usize {
        if self.rational { (1 + self.n_out * self.plan.n_inputs()) << self.springs.len() } else { 0 }
    }

    /// Reference solutions reduced to what each variant needs, one record of
    /// [`VariantPlan::rec_len`] lanes per block of [`LANES`] frequencies.
    fn reduce(&self, f: &[f64]) -> Result<(Vec<CLane>, Vec<Lane>)> {
        let model = self.plan.model();
        let (k, ni, no) = (self.springs.len(), self.plan.n_inputs(), self.n_out);
        let n = model.dof_count();
        let (rec, brec) = (self.rec_len(), self.bound_len());
        let nb = f.len().div_ceil(LANES);
        let mut out = vec![CLane::ZERO; nb * rec];
        // One bound slot per block at least, so the chunks below pair up when there are none.
        let bw = brec.max(1);
        let mut bounds = vec![[0.0; LANES]; nb * bw];
        let block = self.plan.block_len(f.len(), (n * n) as f64).next_multiple_of(LANES);
        let upos: Vec<Vec<(usize, f64)>> =
            self.u.iter().map(|c| c.iter().map(|&(i, v)| (self.plan.solver_index(i), v)).collect()).collect();
        let chunks = out.par_chunks_mut(block / LANES * rec).zip(f.par_chunks(block));
        chunks.zip(bounds.par_chunks_mut(block / LANES * bw)).try_for_each(|((ob, fb), bb)| {
            let mut s = self.plan.lane_scratch_with(k);
            with_best_simd(
                #[inline(always)]
                || {
                    for (b, (r, fl)) in ob.chunks_exact_mut(rec).zip(fb.chunks(LANES)).enumerate() {
                        self.plan.solve_lanes(&mut s, fl, &self.u)?;
                        let col = |j: usize| &s.b[j * n..(j + 1) * n];
                        let dot = |row: &[(usize, f64)], x: &[CLane]| {
                            row.iter().fold(CLane::ZERO, |acc, &(i, v)| acc + x[i].scale(v))
                        };
                        let (cx0, r) = r.split_at_mut(no * ni);
                        let (cy, r) = r.split_at_mut(no * k);
                        let (g, r) = r.split_at_mut(k * k);
                        let (gh, r) = r.split_at_mut(k * ni);
                        let (k_old, rat) = r.split_at_mut(k);
                        for (o, row) in self.plan.sparse_rows().iter().enumerate() {
                            for j in 0..ni {
                                cx0[o * ni + j] = dot(row, col(j));
                            }
                            for q in 0..k {
                                cy[o * k + q] = dot(row, col(ni + q));
                            }
                        }
                        for (p, up) in upos.iter().enumerate() {
                            for q in 0..k {
                                g[p + q * k] = dot(up, col(ni + q));
                            }
                            for j in 0..ni {
                                gh[p + j * k] =
                                    CLane::splat(self.gvec[p + k * j]) + dot(up, col(j)).scale(-1.0);
                            }
                        }
                        let fl8 = pad_block(fl);
                        for (ko, &i) in k_old.iter_mut().zip(&self.springs) {
                            *ko = model.springs[i].model.at_lanes(&fl8);
                        }
                        if self.rational {
                            let rb = &mut bb[b * bw..(b + 1) * bw];
                            self.rational_coefficients(cx0, cy, g, gh, rat, rb);
                        }
                    }
                    Ok(())
                },
            )
        })?;
        Ok((out, bounds))
    }

    /// Principal minors of the bordered M = [[c·x0, −c·Y], [g − h, G]] per (output, input):
    /// `rat` gets [D_S | N_(o,j),S], `rb` their permanent bounds (see the module notes).
    fn rational_coefficients(
        &self,
        cx0: &[CLane],
        cy: &[CLane],
        g: &[CLane],
        gh: &[CLane],
        rat: &mut [CLane],
        rb: &mut [Lane],
    ) {
        let (k, ni) = (self.springs.len(), self.plan.n_inputs());
        let (ns, m) = (1usize << k, k + 1);
        let mut a = vec![CLane::ZERO; m * m];
        let ((dc, nca), (db, nba)) = (rat.split_at_mut(ns), rb.split_at_mut(ns));
        for (t, (&x0, (nc, nb))) in
            cx0.iter().zip(nca.chunks_exact_mut(ns).zip(nba.chunks_exact_mut(ns))).enumerate()
        {
            let (o, j) = (t / ni, t % ni);
            a[0] = x0;
            for q in 0..k {
                a[(q + 1) * m] = cy[o * k + q].scale(-1.0);
                a[q + 1] = gh[q + j * k];
                for p in 0..k {
                    a[p + 1 + (q + 1) * m] = g[p + q * k];
                }
            }
            let (det, per) = principal_minors(&a, m);
            for s in 0..ns {
                nc[s] = det[(s << 1) | 1];
                nb[s] = per[(s << 1) | 1];
                if t == 0 {
                    dc[s] = det[s << 1];
                    db[s] = per[s << 1];
                }
            }
        }
    }

    /// FRFs of every variant, shape (n_variant, n_freq, n_out, n_in).
    pub fn evaluate(
        &self,
        grid: &FreqGrid,
        replacements: &[Vec<StiffnessModel>],
    ) -> Result<Array4<Complex64>> {
        let mut a = Array4::zeros((replacements.len(), grid.len(), self.n_out, self.plan.n_inputs()));
        let buf = a.as_slice_mut().ok_or_else(|| Error::invalid("variant FRFs", "not contiguous"))?;
        self.evaluate_into(grid, replacements, Some(buf), None)?;
        Ok(a)
    }

    /// Only the RMS responses to `input_psd`, shape (n_variant, n_out, n_in): no FRF array is
    /// stored, so memory does not grow with n_variant × n_freq (ranking specs needs only these).
    pub fn evaluate_rms(
        &self,
        grid: &FreqGrid,
        replacements: &[Vec<StiffnessModel>],
        input_psd: &[f64],
    ) -> Result<Array3<f64>> {
        let mut rms = Array3::<f64>::zeros((replacements.len(), self.n_out, self.plan.n_inputs()));
        let rs = rms.as_slice_mut().ok_or_else(|| Error::invalid("variant RMS", "not contiguous"))?;
        self.evaluate_into(grid, replacements, None, Some(RmsOut { input_psd, rms: rs }))?;
        Ok(rms)
    }

    /// Evaluate every variant into caller-owned buffers (callers that own a large output, such
    /// as a binding handing it to numpy, avoid a copy): the FRFs into `frf_out` when given, laid
    /// out (n_variant, n_freq, n_out, n_in) row-major, and the RMS response of each (variant,
    /// output, input) to an input PSD when `rms` is given, laid out (n_variant, n_out, n_in);
    /// RMS = sqrt(∫ |H|² S df), trapezoid rule on the grid. `replacements[v][s]` replaces the
    /// s-th named spring in variant v. The RMS is the same arithmetic with or without `frf_out`.
    pub fn evaluate_into(
        &self,
        grid: &FreqGrid,
        replacements: &[Vec<StiffnessModel>],
        frf_out: Option<&mut [Complex64]>,
        rms: Option<RmsOut<'_>>,
    ) -> Result<()> {
        self.run(grid, replacements, frf_out, rms).map(|_| ())
    }

    /// Output and input counts (n_out, n_in) of the FRF layout.
    pub fn shape(&self) -> (usize, usize) {
        (self.n_out, self.plan.n_inputs())
    }

    /// [`VariantPlan::evaluate_into`]; returns how many (variant, frequency) pairs the rational
    /// form handed to the capacitance solve.
    fn run(
        &self,
        grid: &FreqGrid,
        replacements: &[Vec<StiffnessModel>],
        out: Option<&mut [Complex64]>,
        rms: Option<RmsOut<'_>>,
    ) -> Result<usize> {
        let freq_hz = grid.hz();
        let (k, ni, no) = (self.springs.len(), self.plan.n_inputs(), self.n_out);
        let nf = freq_hz.len();
        let per_v = ni * no * nf;
        if let Some(o) = &out
            && o.len() != per_v * replacements.len()
        {
            return Err(Error::shape("variant FRF buffer", per_v * replacements.len(), o.len()));
        }
        for (v, r) in replacements.iter().enumerate() {
            if r.len() != k {
                return Err(Error::shape(format!("replacements[{v}] (one model per spring)"), k, r.len()));
            }
            for (s, m) in r.iter().enumerate() {
                m.validate(format_args!("replacements[{v}][{s}]"))?;
            }
        }
        // Trapezoid weights times the PSD, padded to whole lane blocks (zero without an RMS).
        let mut wts = vec![0.0; nf.next_multiple_of(LANES)];
        let mut rms_out = None;
        if let Some(RmsOut { input_psd, rms: r }) = rms {
            wts = trapezoid_psd_weights(grid, input_psd, nf.next_multiple_of(LANES))?;
            if r.len() != replacements.len() * no * ni {
                return Err(Error::shape("variant RMS buffer", replacements.len() * no * ni, r.len()));
            }
            rms_out = Some(r);
        }
        let (recs, bounds) = self.reduce(freq_hz)?;
        // Variants in chunks (parallel), each run by [`VariantLoop`]. A chunk writes one FRF
        // stream per variant, a block at a time; with 64 streams the whole FRF evaluation took
        // 33–36 ms, with 16 about 21 ms (same machine, one thread; RMS-only 14–15 ms either way).
        let chunk = replacements.len().div_ceil(4 * rayon::current_num_threads()).clamp(1, 16);
        let mut rms_buf = vec![0.0; replacements.len() * no * ni];
        let outs: Vec<Option<&mut [Complex64]>> = match out {
            Some(o) => o.chunks_mut(chunk * per_v).map(Some).collect(),
            None => replacements.chunks(chunk).map(|_| None).collect(),
        };
        let redone = outs
            .into_par_iter()
            .zip(replacements.par_chunks(chunk))
            .zip(rms_buf.par_chunks_mut(chunk * no * ni))
            .map(|((o, reps), racc)| {
                let mut ws = VariantScratch::new(k, ni, no, reps.len());
                let redone = with_rational_sums(VariantLoop {
                    plan: self,
                    recs: &recs,
                    bounds: &bounds,
                    freq_hz,
                    wts: &wts,
                    reps,
                    out: o,
                    ws: &mut ws,
                })?;
                for (a, acc) in racc.iter_mut().zip(&ws.acc) {
                    *a = acc.iter().sum::<f64>().sqrt();
                }
                Ok::<usize, Error>(redone)
            })
            .try_reduce(|| 0, |a, b| Ok(a + b))?;
        if let Some(r) = rms_out {
            r.copy_from_slice(&rms_buf);
        }
        Ok(redone)
    }

    /// Rational form of the block for k = K springs and NS = 2^K subsets (module notes), with
    /// the stiffness changes in `ws.d`: the FRFs into `ws.y`, and the lanes whose rounding bound
    /// fails [`CANCELLATION_MAX`].
    #[inline(always)]
    fn rational_form<R: RationalSums, const K: usize, const NS: usize>(
        &self,
        sums: R,
        ws: &mut VariantScratch,
        r: &[CLane],
        rb: &[Lane],
    ) -> LaneMask {
        let [.., rat] = self.split(r);
        let VariantScratch { d, y, .. } = ws;
        sums.quotients::<K, NS>(d, rat, rb, CANCELLATION_MAX, y)
    }

    /// Write the block's FRFs `ws.y` for its `count` valid lanes into `dst` (when given) and add
    /// w·|H|² to the variant's RMS sums.
    #[inline(always)]
    fn emit(
        &self,
        ws: &mut VariantScratch,
        count: usize,
        mut dst: Option<&mut [Complex64]>,
        v: usize,
        wl: &Lane,
    ) {
        let t_n = ws.y.len();
        for (t, y) in ws.y.iter().enumerate() {
            match dst.as_deref_mut() {
                // A whole block of one (output, input) pair is contiguous: a fixed-size array the
                // compiler writes with a few shuffles and vector stores.
                Some(dst) if count == LANES && t_n == 1 => {
                    if let Some(d) = dst.first_chunk_mut::<LANES>() {
                        for l in 0..LANES {
                            d[l] = Complex64::new(y.re[l], y.im[l]);
                        }
                    }
                }
                Some(dst) => {
                    for l in 0..count {
                        dst[l * t_n + t] = y.get(l);
                    }
                }
                None => {}
            }
            let acc = &mut ws.acc[v * t_n + t];
            let m2 = y.norm_sqr();
            // Only the valid lanes: a padding lane may hold an unchecked value.
            if count == LANES {
                for l in 0..LANES {
                    acc[l] += wl[l] * m2[l];
                }
            } else {
                for l in 0..count {
                    acc[l] += wl[l] * m2[l];
                }
            }
        }
    }

    /// The record of a block split into (c·x0, c·Y, G, g − h, k_old, rational coefficients).
    #[inline(always)]
    fn split<'r>(&self, r: &'r [CLane]) -> [&'r [CLane]; 6] {
        let (k, ni, no) = (self.springs.len(), self.plan.n_inputs(), self.n_out);
        let (cx0, r) = r.split_at(no * ni);
        let (cy, r) = r.split_at(no * k);
        let (g, r) = r.split_at(k * k);
        let (gh, r) = r.split_at(k * ni);
        let (k_old, rat) = r.split_at(k);
        [cx0, cy, g, gh, k_old, rat]
    }

    /// D = k_new − k_old per lane into `ws.d`.
    #[inline(always)]
    fn stiffness_change(&self, ws: &mut VariantScratch, k_old: &[CLane], rep: &[StiffnessModel], fl: &Lane) {
        for (s, d) in ws.d.iter_mut().enumerate() {
            *d = rep[s].at_lanes(fl) + k_old[s].scale(-1.0);
        }
    }

    /// Capacitance systems (I + D G) w = D (g − h) for k = K springs, D from `ws.d`
    /// ([`VariantPlan::stiffness_change`]), unrolled: `ws.w` gets w,
    /// `ws.a0`/`ws.w0` the systems (column-major k × k, k × n_in), `ws.bad` the lanes to redo.
    #[inline(always)]
    fn capacitance_small<const K: usize>(&self, ws: &mut VariantScratch, r: &[CLane]) {
        let [_, _, g, gh, ..] = self.split(r);
        let mut a = [[CLane::ZERO; K]; K];
        for q in 0..K {
            for p in 0..K {
                a[p][q] = ws.d[p] * g[p + q * K];
            }
            for l in 0..LANES {
                a[q][q].re[l] += 1.0;
            }
        }
        let a0 = a;
        let mut bad = dense_factor(&mut a);
        for j in 0..self.plan.n_inputs() {
            let mut x = [CLane::ZERO; K];
            for p in 0..K {
                x[p] = ws.d[p] * gh[p + j * K];
            }
            let x0 = x;
            dense_solve(&a, &mut x);
            bad |= dense_backward_error_mask(&a0, &x0, &x);
            for p in 0..K {
                ws.w[j * K + p] = x[p];
                ws.w0[j * K + p] = x0[p];
            }
        }
        if bad != 0 {
            // Only the lanes to redo need the system again (see finish_block).
            for q in 0..K {
                for p in 0..K {
                    ws.a0[p + q * K] = a0[p][q];
                }
            }
        }
        ws.bad = bad;
    }

    /// Whether the general-k capacitance path solves the transposed system (fewer outputs than
    /// inputs): c·Y(I + D G)⁻¹ D (g − h) = zᵀ D (g − h) with (I + D G)ᵀ z = (c·Y)ᵀ, one
    /// right-hand side per output instead of one per input.
    fn transposed(&self) -> bool {
        self.n_out < self.plan.n_inputs()
    }

    /// [`VariantPlan::capacitance_small`] for any k (banded kernel with kl = ku = k − 1), on the
    /// side with fewer right-hand sides ([`VariantPlan::transposed`]): `ws.w` gets w (k × n_in)
    /// or z (k × n_out), `ws.a0`/`ws.w0` the system solved and its right-hand sides.
    #[inline(always)]
    fn capacitance_band(&self, ws: &mut VariantScratch, r: &[CLane]) {
        let k = self.springs.len();
        let [_, cy, g, gh, ..] = self.split(r);
        let t = self.transposed();
        for q in 0..k {
            for p in 0..k {
                let mut x = ws.d[p] * g[p + q * k];
                if p == q {
                    x = x + CLane::splat(Complex64::new(1.0, 0.0));
                }
                // a0 holds the matrix solved: I + D G, or its transpose.
                let (i, j) = if t { (q, p) } else { (p, q) };
                ws.a0[i + j * k] = x;
                ws.band[ws.lu.index(i, j)] = x;
            }
        }
        let nrhs = if t { self.n_out } else { self.plan.n_inputs() };
        for j in 0..nrhs {
            for p in 0..k {
                ws.w0[p + j * k] = if t { cy[j * k + p] } else { ws.d[p] * gh[p + j * k] };
            }
        }
        let m = k * nrhs;
        ws.band0.copy_from_slice(&ws.band);
        ws.w[..m].copy_from_slice(&ws.w0[..m]);
        let mut bad = ws.lu.factor_in_place(&mut ws.band);
        ws.lu.solve_in_place(&ws.band, &mut ws.w[..m], nrhs);
        bad |= ws.lu.backward_error_mask(&ws.band0, &ws.w0[..m], &ws.w[..m], nrhs);
        ws.bad = bad;
        ws.transposed = t;
    }

    /// Redo the flagged lanes with the pivoted scalar solver, then write the block's FRFs for
    /// the valid lanes into `dst` (when given) and add w·|H|² to the variant's RMS sums.
    #[inline(always)]
    fn finish_block(
        &self,
        ws: &mut VariantScratch,
        r: &[CLane],
        fb: &[f64],
        dst: Option<&mut [Complex64]>,
        v: usize,
        wl: &Lane,
    ) -> Result<()> {
        let (k, ni, no) = (self.springs.len(), self.plan.n_inputs(), self.n_out);
        let [cx0, cy, _, gh, ..] = self.split(r);
        let t = ws.transposed;
        let m = k * if t { no } else { ni };
        if ws.bad != 0 {
            for (l, &fh) in fb.iter().enumerate() {
                if ws.bad & (1 << l) != 0 {
                    let mut a: Vec<Complex64> = ws.a0.iter().map(|x| x.get(l)).collect();
                    let mut w: Vec<Complex64> = ws.w0[..m].iter().map(|x| x.get(l)).collect();
                    solve_small_in_place(&mut a, k, &mut w, m / k)
                        .map_err(|_| Error::Singular { freq_hz: fh })?;
                    for (x, y) in ws.w.iter_mut().zip(&w) {
                        x.set(l, *y);
                    }
                }
            }
        }
        if t {
            // H = c·x0 + zᵀ D (g − h).
            for j in 0..ni {
                for q in 0..k {
                    ws.w0[q] = ws.d[q] * gh[q + j * k];
                }
                for o in 0..no {
                    let mut y = cx0[o * ni + j];
                    for q in 0..k {
                        y = y.add_mul(ws.w[q + o * k], ws.w0[q]);
                    }
                    ws.y[o * ni + j] = y;
                }
            }
        } else {
            for o in 0..no {
                for j in 0..ni {
                    let mut y = cx0[o * ni + j];
                    for q in 0..k {
                        y = y.add_mul(cy[o * k + q], ws.w[q + j * k]);
                    }
                    ws.y[o * ni + j] = y;
                }
            }
        }
        self.emit(ws, fb.len(), dst, v, wl);
        Ok(())
    }
}

/// The variant loop of one parallel chunk, compiled for the CPU's best SIMD set: blocks of
/// frequencies outermost so a block's record stays in L1 while every variant of the chunk uses
/// it. Returns how many (variant, frequency) pairs the rational form handed over.
struct VariantLoop<'a, 'm> {
    plan: &'a VariantPlan<'m>,
    recs: &'a [CLane],
    bounds: &'a [Lane],
    freq_hz: &'a [f64],
    wts: &'a [f64],
    reps: &'a [Vec<StiffnessModel>],
    /// The chunk's FRFs, or none when only the RMS is wanted.
    out: Option<&'a mut [Complex64]>,
    ws: &'a mut VariantScratch,
}

impl RationalLoop for VariantLoop<'_, '_> {
    type Output = Result<usize>;

    #[inline(always)]
    fn run<R: RationalSums>(self, sums: R) -> Result<usize> {
        let VariantLoop { plan, recs, bounds, freq_hz, wts, reps, mut out, ws } = self;
        let (k, ni, no) = (plan.springs.len(), plan.plan.n_inputs(), plan.n_out);
        let per_v = ni * no * freq_hz.len();
        let (rec, bw) = (plan.rec_len(), plan.bound_len().max(1));
        let mut redone = 0;
        for (b, ((r, rb), fb)) in
            recs.chunks_exact(rec).zip(bounds.chunks_exact(bw)).zip(freq_hz.chunks(LANES)).enumerate()
        {
            let fl = pad_block(fb);
            let mut wl: Lane = [0.0; LANES];
            wl.copy_from_slice(&wts[b * LANES..(b + 1) * LANES]);
            let valid: LaneMask = (1 << fb.len()) - 1;
            for (v, rep) in reps.iter().enumerate() {
                let mut dst = out.as_deref_mut().map(|o| &mut o[v * per_v + b * LANES * no * ni..]);
                // The stiffness changes, shared by the rational form and the capacitance solve
                // that redoes its rejected lanes.
                let [.., k_old, _] = plan.split(r);
                plan.stiffness_change(ws, k_old, rep, &fl);
                let rejected = valid
                    & match (plan.rational, k) {
                        (true, 1) => plan.rational_form::<R, 1, 2>(sums, ws, r, rb),
                        (true, 2) => plan.rational_form::<R, 2, 4>(sums, ws, r, rb),
                        (true, 3) => plan.rational_form::<R, 3, 8>(sums, ws, r, rb),
                        (true, 4) => plan.rational_form::<R, 4, 16>(sums, ws, r, rb),
                        _ => LaneMask::MAX,
                    };
                if rejected == 0 {
                    plan.emit(ws, fb.len(), dst.as_deref_mut(), v, &wl);
                    continue;
                }
                redone += rejected.count_ones() as usize;
                // Capacitance systems, unrolled for the usual few springs.
                match k {
                    1 => plan.capacitance_small::<1>(ws, r),
                    2 => plan.capacitance_small::<2>(ws, r),
                    3 => plan.capacitance_small::<3>(ws, r),
                    4 => plan.capacitance_small::<4>(ws, r),
                    _ => plan.capacitance_band(ws, r),
                }
                plan.finish_block(ws, r, fb, dst, v, &wl)?;
            }
        }
        Ok(redone)
    }
}

/// Per-task scratch of the variant loop.
struct VariantScratch {
    lu: BandLanes,
    d: Vec<CLane>,
    /// The capacitance matrix, column-major k × k, and in band storage (general k).
    a0: Vec<CLane>,
    band: Vec<CLane>,
    band0: Vec<CLane>,
    /// Right-hand sides and solutions, column-major k × n_in (k × n_out when transposed).
    w: Vec<CLane>,
    w0: Vec<CLane>,
    /// Lanes the scalar solver must redo.
    bad: LaneMask,
    /// The last capacitance solve was of the transposed system ([`VariantPlan::transposed`]).
    transposed: bool,
    /// The block's FRFs per (output, input).
    y: Vec<CLane>,
    /// RMS sums per (variant of the chunk, output, input), per lane.
    acc: Vec<Lane>,
}

impl VariantScratch {
    fn new(k: usize, ni: usize, no: usize, nv: usize) -> Self {
        let lu = BandLanes::new(k, k - 1, k - 1);
        let len = lu.storage_len();
        VariantScratch {
            lu,
            d: vec![CLane::ZERO; k],
            a0: vec![CLane::ZERO; k * k],
            band: vec![CLane::ZERO; len],
            band0: vec![CLane::ZERO; len],
            bad: 0,
            transposed: false,
            w: vec![CLane::ZERO; k * ni.max(no)],
            w0: vec![CLane::ZERO; k * ni.max(no)],
            y: vec![CLane::ZERO; no * ni],
            acc: vec![[0.0; LANES]; nv * no * ni],
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::frf::tests::{chain, max_rel_diff};

    /// FRFs and RMS of every variant as owned arrays, through [`VariantPlan::evaluate_into`].
    fn with_rms(
        plan: &VariantPlan,
        grid: &FreqGrid,
        reps: &[Vec<StiffnessModel>],
        psd: &[f64],
    ) -> Result<(Array4<Complex64>, Array3<f64>)> {
        let (no, ni) = plan.shape();
        let mut h = Array4::zeros((reps.len(), grid.len(), no, ni));
        let mut rms = Array3::zeros((reps.len(), no, ni));
        let rms_out = RmsOut { input_psd: psd, rms: rms.as_slice_mut().unwrap() };
        plan.evaluate_into(grid, reps, Some(h.as_slice_mut().unwrap()), Some(rms_out))?;
        Ok((h, rms))
    }

    #[test]
    fn woodbury_variants_match_direct_models() {
        // Oracle: a model assembled with the replacement springs, solved by the dense direct path.
        let base = chain(12, &[]);
        let f: Vec<f64> = (0..400).map(|k| 0.5 + k as f64 * 0.9).collect();
        let g = FreqGrid::new(f.clone()).unwrap();
        let names = ["s0", "s1", "s5"];
        let variants: Vec<(Vec<StiffnessModel>, [String; 3])> = (0..4)
            .map(|v| {
                let kv = 3e5 * (1.0 + v as f64);
                (
                    vec![
                        StiffnessModel::Zener { k0: kv, k_inf: 2.5 * kv, tau_s: 0.001 * (1.0 + v as f64) },
                        StiffnessModel::Hysteretic { k: 2.0 * kv, loss_factor: 0.1 },
                        StiffnessModel::KelvinVoigt { k: kv, c: 80.0 },
                    ],
                    [
                        format!(
                            "zener = {{ k0 = {kv}, k_inf = {}, tau_s = {} }}",
                            2.5 * kv,
                            0.001 * (1.0 + v as f64)
                        ),
                        format!("stiffness_n_per_m = {}\nloss_factor = 0.1", 2.0 * kv),
                        format!("stiffness_n_per_m = {kv}\ndamping_ns_per_m = 80.0"),
                    ],
                )
            })
            .collect();
        let ins = ["ground_z", "force:m3:z"];
        let outs = ["m11:z", "m2:z"];
        let plan = VariantPlan::new(&base, &names, &ins, &outs).unwrap();
        let reps: Vec<Vec<StiffnessModel>> = variants.iter().map(|v| v.0.clone()).collect();
        let run = |p: &VariantPlan| {
            let mut got = Array4::zeros((reps.len(), f.len(), outs.len(), ins.len()));
            let redone = p.run(&g, &reps, Some(got.as_slice_mut().unwrap()), None).unwrap();
            (got, redone)
        };
        let (got, redone) = run(&plan);
        let (capacitance, _) = run(&plan.clone().with_rational(false));
        assert_eq!(redone, 0, "well-damped chain: no lane should need the capacitance solve");
        let psd: Vec<f64> = f.iter().map(|x| 1e-12 / (1.0 + x / 30.0)).collect();
        let rms_only = plan.evaluate_rms(&g, &reps, &psd).unwrap();
        for (v, (_, toml)) in variants.iter().enumerate() {
            let mut pads: Vec<String> = (0..12)
                .map(|i| {
                    let k = 1.0e6 * (1.0 + 0.3 * ((i * 7) % 11) as f64);
                    if i % 3 == 0 {
                        format!("stiffness_n_per_m = {k}\ndamping_ns_per_m = 40.0")
                    } else {
                        format!("stiffness_n_per_m = {k}\nloss_factor = 0.02")
                    }
                })
                .collect();
            pads[0] = toml[0].clone();
            pads[1] = toml[1].clone();
            pads[5] = toml[2].clone();
            let pr: Vec<&str> = pads.iter().map(|s| s.as_str()).collect();
            let m = chain(12, &pr);
            let direct = FrfPlan::new(&m, &ins, &outs)
                .unwrap()
                .with_solver(crate::frf::SolverChoice::Dense)
                .evaluate(&g)
                .unwrap();
            for (path, got) in [("rational", &got), ("capacitance", &capacitance)] {
                let g = got.index_axis(ndarray::Axis(0), v).to_owned();
                let e = max_rel_diff(g.as_slice().unwrap(), direct.data.as_slice().unwrap());
                assert!(e < 1e-9, "{path}, variant {v}: {e}");
            }
            // The RMS-only evaluation against the trapezoid rule on the direct FRFs (docs/conventions.md rule).
            for (o, j) in (0..outs.len()).flat_map(|o| (0..ins.len()).map(move |j| (o, j))) {
                let y = |k: usize| direct.data[[k, o, j]].norm_sqr() * psd[k];
                let ms: f64 = (1..f.len()).map(|k| 0.5 * (f[k] - f[k - 1]) * (y(k) + y(k - 1))).sum();
                let got = rms_only[[v, o, j]];
                assert!(
                    (got - ms.sqrt()).abs() <= 1e-9 * ms.sqrt(),
                    "variant {v} ({o}, {j}): {got} vs {}",
                    ms.sqrt()
                );
            }
        }
    }

    #[test]
    fn rms_matches_direct_path_when_the_spring_is_unchanged() {
        // Oracle: replacing s0 by its own model must give the direct dense FRF of the base model;
        // the RMS is then the trapezoid integral of |H|²·S of that direct FRF (docs/conventions.md rule).
        let base = chain(6, &[]);
        let f: Vec<f64> = (0..300).map(|k| 0.5 + k as f64 * 1.3).collect();
        let g = FreqGrid::new(f.clone()).unwrap();
        let s: Vec<f64> = f.iter().map(|x| 1e-12 / (1.0 + x / 50.0)).collect();
        let same = vec![vec![StiffnessModel::Zener { k0: 4e5, k_inf: 1.2e6, tau_s: 0.002 }]];
        let plan = VariantPlan::new(&base, &["s0"], &["ground_z"], &["m5:z"]).unwrap();
        let (h, rms) = with_rms(&plan, &g, &same, &s).unwrap();
        let d = FrfPlan::new(&base, &["ground_z"], &["m5:z"])
            .unwrap()
            .with_solver(crate::frf::SolverChoice::Dense)
            .evaluate(&g)
            .unwrap();
        let e = max_rel_diff(h.as_slice().unwrap(), d.data.as_slice().unwrap());
        assert!(e < 1e-9, "{e}");
        let ms: f64 = (1..f.len())
            .map(|k| {
                0.5 * (f[k] - f[k - 1])
                    * (d.data[[k, 0, 0]].norm_sqr() * s[k] + d.data[[k - 1, 0, 0]].norm_sqr() * s[k - 1])
            })
            .sum();
        assert!((rms[[0, 0, 0]] - ms.sqrt()).abs() <= 1e-9 * ms.sqrt());
        assert!(matches!(with_rms(&plan, &g, &same, &s[1..]), Err(Error::ShapeMismatch { .. })));
        let mut neg = s.clone();
        neg[3] = -1.0;
        assert!(with_rms(&plan, &g, &same, &neg).is_err());
    }

    #[test]
    fn general_k_path_matches_direct_models() {
        // Five replaced springs take the banded capacitance kernel (k > 4), and the lanes of a
        // 13-point grid include padding. Three shapes: one input and output, more inputs than
        // outputs (the transposed capacitance system), more outputs than inputs. Oracle:
        // rebuilt models solved by the dense direct path.
        let base = chain(8, &[]);
        let f: Vec<f64> = (0..13).map(|k| 1.0 + k as f64 * 37.0).collect();
        let g = FreqGrid::new(f.clone()).unwrap();
        let names = ["s0", "s1", "s2", "s3", "s4"];
        let reps: Vec<Vec<StiffnessModel>> = (0..3)
            .map(|v| {
                (0..5)
                    .map(|i| StiffnessModel::Hysteretic {
                        k: 3e5 * (1.0 + (v + i) as f64),
                        loss_factor: 0.05,
                    })
                    .collect()
            })
            .collect();
        let shapes: [(&[&str], &[&str]); 3] = [
            (&["ground_z"], &["m7:z"]),
            (&["ground_z", "force:m2:z", "force:m6:z"], &["m7:z"]),
            (&["ground_z"], &["m7:z", "m3:z", "m0:z"]),
        ];
        for (ins, outs) in shapes {
            let plan = VariantPlan::new(&base, &names, ins, outs).unwrap();
            assert_eq!(plan.transposed(), outs.len() < ins.len());
            let psd = vec![1e-12; f.len()];
            let (got, rms) = with_rms(&plan, &g, &reps, &psd).unwrap();
            for (v, rep) in reps.iter().enumerate() {
                let pads: Vec<String> = rep
                    .iter()
                    .map(|m| match m {
                        StiffnessModel::Hysteretic { k, loss_factor } => {
                            format!("stiffness_n_per_m = {k}\nloss_factor = {loss_factor}")
                        }
                        _ => unreachable!(),
                    })
                    .collect();
                let pr: Vec<&str> = pads.iter().map(|s| s.as_str()).collect();
                let direct = FrfPlan::new(&chain(8, &pr), ins, outs)
                    .unwrap()
                    .with_solver(crate::frf::SolverChoice::Dense)
                    .evaluate(&g)
                    .unwrap();
                let gv = got.index_axis(ndarray::Axis(0), v).to_owned();
                for (o, j) in (0..outs.len()).flat_map(|o| (0..ins.len()).map(move |j| (o, j))) {
                    let a: Vec<Complex64> = (0..f.len()).map(|q| gv[[q, o, j]]).collect();
                    let d: Vec<Complex64> = (0..f.len()).map(|q| direct.data[[q, o, j]]).collect();
                    assert!(max_rel_diff(&a, &d) < 1e-9, "{ins:?} -> {outs:?}: variant {v}, ({o}, {j})");
                    // Trapezoid rule of |H|² S on the grid (docs/conventions.md).
                    let ms: f64 = (1..f.len())
                        .map(|q| 0.5 * (f[q] - f[q - 1]) * 1e-12 * (d[q].norm_sqr() + d[q - 1].norm_sqr()))
                        .sum();
                    assert!((rms[[v, o, j]] - ms.sqrt()).abs() <= 1e-9 * ms.sqrt());
                }
            }
        }
    }

    #[test]
    fn cancelling_lanes_take_the_capacitance_solve() {
        // Nearly undamped chain (loss factor 3e-6): near the resonances of the modified system
        // det(I + D G) is a small sum of O(1) terms, so the rational form must hand those lanes
        // over. Oracle: the modified model solved by the dense direct path.
        let lossy = |k: f64| format!("stiffness_n_per_m = {k}\nloss_factor = 3e-6");
        let pads: Vec<String> = (0..6).map(|i| lossy(1.0e6 * (1.0 + 0.3 * ((i * 7) % 11) as f64))).collect();
        let pr: Vec<&str> = pads.iter().map(|s| s.as_str()).collect();
        let base = chain(6, &pr);
        let mut modified = pads.clone();
        modified[2] = lossy(2.2e6);
        let pr: Vec<&str> = modified.iter().map(|s| s.as_str()).collect();
        let target = chain(6, &pr);
        // A coarse grid plus points within ±5e-6 (relative) of each modified resonance.
        let mut f: Vec<f64> = (0..400).map(|k| 1.0 + k as f64 * 1.7).collect();
        for fj in target.modes().unwrap().frequency_hz {
            f.extend((-50..=50).map(|m| fj * (1.0 + m as f64 * 1e-7)));
        }
        f.sort_by(f64::total_cmp);
        f.dedup();
        let g = FreqGrid::new(f.clone()).unwrap();
        let reps = vec![vec![StiffnessModel::Hysteretic { k: 2.2e6, loss_factor: 3e-6 }]];
        let plan = VariantPlan::new(&base, &["s2"], &["ground_z"], &["m5:z"]).unwrap();
        let mut got = vec![Complex64::default(); f.len()];
        let redone = plan.run(&g, &reps, Some(&mut got), None).unwrap();
        assert!(redone > 0 && redone < f.len() / 2, "{redone} of {}", f.len());
        let direct = FrfPlan::new(&target, &["ground_z"], &["m5:z"])
            .unwrap()
            .with_solver(crate::frf::SolverChoice::Dense)
            .evaluate(&g)
            .unwrap();
        // Direct solves of this system (transmissibility ≈ 1/η at resonance) are themselves only
        // good to about 1e-9: the dense and the banded direct paths differ by 8e-10 here.
        let e = max_rel_diff(&got, direct.data.as_slice().unwrap());
        assert!(e < 1e-8, "against the dense direct path: {e}");
        // The lanes the rational form kept against the capacitance solve of the same Woodbury
        // identity: they agree within the accepted rounding bound, CANCELLATION_MAX·(k + 2)·ε.
        let mut cap = vec![Complex64::default(); f.len()];
        plan.clone().with_rational(false).run(&g, &reps, Some(&mut cap), None).unwrap();
        let e = max_rel_diff(&got, &cap);
        assert!(e < CANCELLATION_MAX * 4.0 * f64::EPSILON, "against the capacitance solve: {e}");
        // Without stored FRFs the handed-over lanes still reach the RMS: the same sums as with them.
        let s = vec![1e-12; f.len()];
        let (_, with_frf) = with_rms(&plan, &g, &reps, &s).unwrap();
        assert_eq!(plan.evaluate_rms(&g, &reps, &s).unwrap(), with_frf);
    }

    #[test]
    fn variants_reject_bad_input() {
        let base = chain(4, &[]);
        assert!(matches!(
            VariantPlan::new(&base, &["nope"], &["ground_z"], &["m3:z"]),
            Err(Error::UnknownName { .. })
        ));
        let plan = VariantPlan::new(&base, &["s0"], &["ground_z"], &["m3:z"]).unwrap();
        let (g1, g2) = (FreqGrid::new(vec![1.0]).unwrap(), FreqGrid::new(vec![1.0, 2.0]).unwrap());
        let r = plan.evaluate(&g2, &[vec![]]);
        assert!(matches!(r, Err(Error::ShapeMismatch { .. })), "{r:?}");
        let r = plan.evaluate(&g1, &[vec![StiffnessModel::Hysteretic { k: f64::NAN, loss_factor: 0.0 }]]);
        assert!(r.is_err());
        // Names are built only on failure, and still name the spec, the field and the index.
        let good = vec![StiffnessModel::Hysteretic { k: 1e6, loss_factor: 0.1 }];
        let bad = vec![StiffnessModel::Zener { k0: 1e6, k_inf: 2e6, tau_s: -1.0 }];
        let e = plan.evaluate(&g2, &[good.clone(), bad]).unwrap_err().to_string();
        assert!(e.contains("replacements[1][0].tau_s"), "{e}");
        let e = plan.evaluate_rms(&g2, &[good], &[1.0, -1.0]).unwrap_err().to_string();
        assert!(e.contains("input_psd[1]"), "{e}");
    }
}

//! Frequency response by a direct complex solve per frequency.
//!
//! Z(ω) x = b with Z(ω) = K*(ω) + iωC − ω²M over the free DOFs, for every requested input at
//! once (one LU per frequency, many right-hand sides). [`FrfPlan`] resolves names once and owns
//! its scratch space, so evaluating many grids allocates nothing per frequency; evaluation is
//! parallel over frequency blocks (rayon) when the work is large enough to pay.

use crate::error::{Error, Result};
use crate::linalg::ComplexLu;
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

/// A reusable FRF evaluation for fixed inputs and outputs of one model.
#[derive(Debug, Clone)]
pub struct FrfPlan<'m> {
    model: &'m Model,
    input_names: Vec<String>,
    output_names: Vec<String>,
    inputs: Vec<Input>,
    /// Output rows, row-major n_out × n.
    rows: Vec<f64>,
}

/// Scratch for one thread of an [`FrfPlan`].
struct Scratch {
    z: Vec<Complex64>,
    b: Vec<Complex64>,
    lu: ComplexLu,
}

impl<'m> FrfPlan<'m> {
    /// Resolve input and output names.
    pub fn new(model: &'m Model, inputs: &[&str], outputs: &[&str]) -> Result<Self> {
        if inputs.is_empty() {
            return Err(Error::invalid("inputs", "at least one input is needed"));
        }
        let ins = inputs.iter().map(|n| model.input(n)).collect::<Result<Vec<_>>>()?;
        let mut rows = Vec::with_capacity(outputs.len() * model.dof_count());
        for o in outputs {
            rows.extend(model.output(o)?);
        }
        Ok(FrfPlan {
            model,
            input_names: inputs.iter().map(|s| s.to_string()).collect(),
            output_names: outputs.iter().map(|s| s.to_string()).collect(),
            inputs: ins,
            rows,
        })
    }

    /// A plan whose outputs are arbitrary real rows over the free DOFs (row-major
    /// `names.len()` × n), e.g. modal coordinates φᵀM.
    pub fn with_rows(model: &'m Model, inputs: &[&str], names: Vec<String>, rows: Vec<f64>) -> Result<Self> {
        let n = model.dof_count();
        if rows.len() != names.len() * n {
            return Err(Error::shape("output rows", names.len() * n, rows.len()));
        }
        let mut plan = FrfPlan::new(model, inputs, &[])?;
        plan.output_names = names;
        plan.rows = rows;
        Ok(plan)
    }

    fn scratch(&self) -> Scratch {
        let n = self.model.dof_count();
        let m = self.inputs.len();
        Scratch {
            z: vec![Complex64::default(); n * n],
            b: vec![Complex64::default(); n * m],
            lu: ComplexLu::new(n, m),
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
        // Parallel blocks when the total work is worth a thread hop.
        let work = freq_hz.len() as f64 * (n as f64).powi(3);
        let block = if work > 2e6 {
            (freq_hz.len() / (4 * rayon::current_num_threads())).max(16)
        } else {
            freq_hz.len()
        };
        out.par_chunks_mut(block * per).zip(freq_hz.par_chunks(block)).try_for_each(|(o, f)| {
            let mut s = self.scratch();
            for (k, &fh) in f.iter().enumerate() {
                self.solve_one(&mut s, fh, &mut o[k * per..(k + 1) * per])?;
            }
            Ok(())
        })
    }

    fn solve_one(&self, s: &mut Scratch, f_hz: f64, out: &mut [Complex64]) -> Result<()> {
        let m = self.model;
        let n = m.dof_count();
        let w = 2.0 * PI * f_hz;
        build_dynamic_stiffness(m, f_hz, &mut s.z);
        for (j, inp) in self.inputs.iter().enumerate() {
            m.fill_input(inp, w, &mut s.b[j * n..(j + 1) * n]);
        }
        s.lu.solve_in_place(&mut s.z, &mut s.b).map_err(|_| Error::Singular { freq_hz: f_hz })?;
        let ni = self.inputs.len();
        for (o, row) in self.rows.chunks_exact(n.max(1)).enumerate() {
            for j in 0..ni {
                let x = &s.b[j * n..(j + 1) * n];
                let mut acc = Complex64::default();
                for (r, xv) in row.iter().zip(x) {
                    if *r != 0.0 {
                        acc += xv * *r;
                    }
                }
                out[o * ni + j] = acc;
            }
        }
        Ok(())
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

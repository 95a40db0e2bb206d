//! Batch sweeps that replace a few rank-one springs of a model (isolator pads, feet).
//!
//! With U = [b_1 … b_k] the full-system vectors of the replaced springs and
//! D(ω) = diag(k_new,s(f) − k_old,s(f)) (complete complex stiffness, viscous part included), every
//! variant is Z(ω) + U_f D U_fᵀ, and its ground load changes by −U_f D U_gᵀ e_d. Per frequency the
//! reference Z(ω) is factored once and solved for the inputs and U_f (k extra columns); per
//! variant only the k × k capacitance system (I + D U_fᵀ Z⁻¹ U_f) w = D (g − U_fᵀ x_0) is solved
//! (Woodbury identity; Hager, SIAM Review 31, 1989), and x = x_0 + Z⁻¹U_f w. Any stiffness model
//! works, replaced and replacing alike.

use crate::error::{Error, Result};
use crate::frf::FrfPlan;
use crate::linalg::solve_small_in_place;
use crate::model::{Input, Model};
use crate::stiffness::StiffnessModel;
use ndarray::{Array3, Array4};
use num_complex::Complex64;
use rayon::prelude::*;

/// Reference solutions at one frequency, reduced to what each variant needs.
struct Reduced {
    /// c·x0: n_out × n_in.
    cx0: Vec<Complex64>,
    /// c·Y: n_out × k (Y = Z⁻¹U_f).
    cy: Vec<Complex64>,
    /// G = U_fᵀ Y: k × k, column-major.
    g: Vec<Complex64>,
    /// U_fᵀ x0: k × n_in, column-major.
    h: Vec<Complex64>,
    /// k_old,s(f).
    k_old: Vec<Complex64>,
}

/// A sweep over replacement stiffness models for named springs of one model.
#[derive(Debug, Clone)]
pub struct SweepPlan<'m> {
    plan: FrfPlan<'m>,
    springs: Vec<usize>,
    /// U_f columns, sparse over the free DOFs (model order).
    u: Vec<Vec<(usize, f64)>>,
    /// g[s + k·j] = −b_g,s[d] for ground input j along d, 0 for loads.
    gvec: Vec<Complex64>,
    n_out: usize,
}

impl<'m> SweepPlan<'m> {
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
        Ok(SweepPlan { plan, springs, u, gvec, n_out: outputs.len() })
    }

    /// Number of replaced springs k.
    pub fn n_springs(&self) -> usize {
        self.springs.len()
    }

    fn reduce(&self, model: &Model, f: &[f64]) -> Result<Vec<Reduced>> {
        let n = model.dof_count();
        let (k, ni, no) = (self.springs.len(), self.plan.n_inputs(), self.n_out);
        let cost = (n * n) as f64;
        let block = self.plan.block_len(f.len(), cost);
        let parts: Vec<Vec<Reduced>> = f
            .par_chunks(block)
            .map(|fb| {
                let mut s = self.plan.scratch_with(k);
                let uf: Vec<Vec<(usize, f64)>> = self.u.clone();
                let upos: Vec<Vec<(usize, f64)>> = uf
                    .iter()
                    .map(|c| c.iter().map(|&(i, v)| (self.plan.solver_index(i), v)).collect())
                    .collect();
                let mut v = Vec::with_capacity(fb.len());
                for &fh in fb {
                    self.plan.solve_at(&mut s, fh, &uf)?;
                    let col = |j: usize| &s.b[j * n..(j + 1) * n];
                    let dot = |row: &[(usize, f64)], x: &[Complex64]| -> Complex64 {
                        row.iter().map(|&(i, r)| x[i] * r).sum()
                    };
                    let rows = self.plan.sparse_rows();
                    let mut cx0 = vec![Complex64::default(); no * ni];
                    let mut cy = vec![Complex64::default(); no * k];
                    for (o, row) in rows.iter().enumerate() {
                        for j in 0..ni {
                            cx0[o * ni + j] = dot(row, col(j));
                        }
                        for q in 0..k {
                            cy[o * k + q] = dot(row, col(ni + q));
                        }
                    }
                    let mut g = vec![Complex64::default(); k * k];
                    let mut h = vec![Complex64::default(); k * ni];
                    for (p, up) in upos.iter().enumerate() {
                        for q in 0..k {
                            g[p + q * k] = dot(up, col(ni + q));
                        }
                        for j in 0..ni {
                            h[p + j * k] = dot(up, col(j));
                        }
                    }
                    let k_old = self.springs.iter().map(|&i| model.springs[i].model.at(fh)).collect();
                    v.push(Reduced { cx0, cy, g, h, k_old });
                }
                Ok(v)
            })
            .collect::<Result<_>>()?;
        Ok(parts.into_iter().flatten().collect())
    }

    /// FRFs of every variant, shape (n_variant, n_freq, n_out, n_in).
    pub fn evaluate(
        &self,
        freq_hz: &[f64],
        replacements: &[Vec<StiffnessModel>],
    ) -> Result<Array4<Complex64>> {
        crate::grid::validate_freqs("freq_hz", freq_hz)?;
        let mut a = Array4::zeros((replacements.len(), freq_hz.len(), self.n_out, self.plan.n_inputs()));
        let buf = a.as_slice_mut().ok_or_else(|| Error::invalid("sweep output", "not contiguous"))?;
        self.evaluate_into(freq_hz, replacements, buf)?;
        Ok(a)
    }

    /// FRFs of every variant and the RMS response of each (variant, output, input) pair to an
    /// input PSD given on `freq_hz`: RMS = sqrt(∫ |H|² S df), trapezoid rule on the grid.
    /// Shapes: FRF (n_variant, n_freq, n_out, n_in), RMS (n_variant, n_out, n_in).
    pub fn evaluate_with_rms(
        &self,
        freq_hz: &[f64],
        replacements: &[Vec<StiffnessModel>],
        input_psd: &[f64],
    ) -> Result<(Array4<Complex64>, Array3<f64>)> {
        if input_psd.len() != freq_hz.len() {
            return Err(Error::shape("input_psd (one value per frequency)", freq_hz.len(), input_psd.len()));
        }
        for (i, &v) in input_psd.iter().enumerate() {
            crate::error::require_non_negative(&format!("input_psd[{i}]"), v)?;
        }
        let h = self.evaluate(freq_hz, replacements)?;
        let (nv, nf, no, ni) = h.dim();
        let mut rms = Array3::<f64>::zeros((nv, no, ni));
        let hs = h.as_slice().ok_or_else(|| Error::invalid("sweep output", "not contiguous"))?;
        let rs = rms.as_slice_mut().ok_or_else(|| Error::invalid("sweep RMS", "not contiguous"))?;
        let per = no * ni;
        for (hv, rv) in hs.chunks_exact((nf * per).max(1)).zip(rs.chunks_exact_mut(per.max(1))) {
            // Trapezoid: Σ ½ (f_k − f_{k−1}) (y_k + y_{k−1}), y = |H|² S.
            let mut prev = vec![0.0; per];
            for (kf, hk) in hv.chunks_exact(per).enumerate() {
                for (p, (x, acc)) in hk.iter().zip(rv.iter_mut()).enumerate() {
                    let y = x.norm_sqr() * input_psd[kf];
                    if kf > 0 {
                        *acc += 0.5 * (freq_hz[kf] - freq_hz[kf - 1]) * (y + prev[p]);
                    }
                    prev[p] = y;
                }
            }
            rv.iter_mut().for_each(|x| *x = x.sqrt());
        }
        Ok((h, rms))
    }

    /// FRFs of every variant into `out`, laid out (n_variant, n_freq, n_out, n_in) row-major.
    /// `replacements[v][s]` replaces the s-th named spring in variant v.
    pub fn evaluate_into(
        &self,
        freq_hz: &[f64],
        replacements: &[Vec<StiffnessModel>],
        out: &mut [Complex64],
    ) -> Result<()> {
        crate::grid::validate_freqs("freq_hz", freq_hz)?;
        let (k, ni, no) = (self.springs.len(), self.plan.n_inputs(), self.n_out);
        let per = ni * no * freq_hz.len();
        if out.len() != per * replacements.len() {
            return Err(Error::shape("sweep output buffer", per * replacements.len(), out.len()));
        }
        for (v, r) in replacements.iter().enumerate() {
            if r.len() != k {
                return Err(Error::shape(format!("replacements[{v}] (one model per spring)"), k, r.len()));
            }
            for (s, m) in r.iter().enumerate() {
                m.validate(&format!("replacements[{v}][{s}]"))?;
            }
        }
        // Per frequency one contiguous record [c·x0 | c·Y | G | g − h | k_old] (cache friendly in
        // the variant loop below).
        let (lc, ly, lg, lh) = (no * ni, no * k, k * k, k * ni);
        let rec = lc + ly + lg + lh + k;
        let mut flat = Vec::with_capacity(rec * freq_hz.len());
        for r in self.reduce(self.plan.model(), freq_hz)? {
            flat.extend_from_slice(&r.cx0);
            flat.extend_from_slice(&r.cy);
            flat.extend_from_slice(&r.g);
            flat.extend(self.gvec.iter().zip(&r.h).map(|(g, h)| g - h));
            flat.extend_from_slice(&r.k_old);
        }
        out.par_chunks_mut(per.max(1)).zip(replacements.par_iter()).try_for_each(|(o, rep)| {
            let mut a = vec![Complex64::default(); k * k];
            let mut w = vec![Complex64::default(); k * ni];
            let mut d = vec![Complex64::default(); k];
            for (fi, (&fh, r)) in freq_hz.iter().zip(flat.chunks_exact(rec)).enumerate() {
                let (cx0, r) = r.split_at(lc);
                let (cy, r) = r.split_at(ly);
                let (g, r) = r.split_at(lg);
                let (gh, k_old) = r.split_at(lh);
                for s in 0..k {
                    d[s] = rep[s].at(fh) - k_old[s];
                }
                // A = I + D G, W = D (g − h).
                for q in 0..k {
                    for p in 0..k {
                        a[p + q * k] = d[p] * g[p + q * k];
                    }
                    a[q + q * k] += 1.0;
                }
                for j in 0..ni {
                    for p in 0..k {
                        w[p + j * k] = d[p] * gh[p + j * k];
                    }
                }
                solve_small_in_place(&mut a, k, &mut w, ni).map_err(|_| Error::Singular { freq_hz: fh })?;
                let dst = &mut o[fi * no * ni..(fi + 1) * no * ni];
                for oi in 0..no {
                    for j in 0..ni {
                        let mut acc = cx0[oi * ni + j];
                        for q in 0..k {
                            acc += cy[oi * k + q] * w[q + j * k];
                        }
                        dst[oi * ni + j] = acc;
                    }
                }
            }
            Ok(())
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::frf::tests::{chain, max_rel_diff};

    #[test]
    fn woodbury_sweep_matches_direct_models() {
        // Oracle: a model assembled with the replacement springs, solved by the dense direct path.
        let base = chain(12, &[]);
        let f: Vec<f64> = (0..400).map(|k| 0.5 + k as f64 * 0.9).collect();
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
        let plan = SweepPlan::new(&base, &names, &ins, &outs).unwrap();
        let reps: Vec<Vec<StiffnessModel>> = variants.iter().map(|v| v.0.clone()).collect();
        let got = plan.evaluate(&f, &reps).unwrap();
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
                .evaluate(&f)
                .unwrap();
            let g = got.index_axis(ndarray::Axis(0), v).to_owned();
            let e = max_rel_diff(g.as_slice().unwrap(), direct.data.as_slice().unwrap());
            assert!(e < 1e-9, "variant {v}: {e}");
        }
    }

    #[test]
    fn rms_matches_direct_path_when_the_spring_is_unchanged() {
        // Oracle: replacing s0 by its own model must give the direct dense FRF of the base model;
        // the RMS is then the trapezoid integral of |H|²·S of that direct FRF (DESIGN.md rule).
        let base = chain(6, &[]);
        let f: Vec<f64> = (0..300).map(|k| 0.5 + k as f64 * 1.3).collect();
        let s: Vec<f64> = f.iter().map(|x| 1e-12 / (1.0 + x / 50.0)).collect();
        let same = vec![vec![StiffnessModel::Zener { k0: 4e5, k_inf: 1.2e6, tau_s: 0.002 }]];
        let plan = SweepPlan::new(&base, &["s0"], &["ground_z"], &["m5:z"]).unwrap();
        let (h, rms) = plan.evaluate_with_rms(&f, &same, &s).unwrap();
        let d = FrfPlan::new(&base, &["ground_z"], &["m5:z"])
            .unwrap()
            .with_solver(crate::frf::SolverChoice::Dense)
            .evaluate(&f)
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
        assert!(matches!(plan.evaluate_with_rms(&f, &same, &s[1..]), Err(Error::ShapeMismatch { .. })));
        let mut neg = s.clone();
        neg[3] = -1.0;
        assert!(plan.evaluate_with_rms(&f, &same, &neg).is_err());
    }

    #[test]
    fn sweep_rejects_bad_input() {
        let base = chain(4, &[]);
        assert!(matches!(
            SweepPlan::new(&base, &["nope"], &["ground_z"], &["m3:z"]),
            Err(Error::UnknownName { .. })
        ));
        let plan = SweepPlan::new(&base, &["s0"], &["ground_z"], &["m3:z"]).unwrap();
        let r = plan.evaluate(&[1.0, 2.0], &[vec![]]);
        assert!(matches!(r, Err(Error::ShapeMismatch { .. })), "{r:?}");
        let r = plan.evaluate(&[1.0], &[vec![StiffnessModel::Hysteretic { k: f64::NAN, loss_factor: 0.0 }]]);
        assert!(r.is_err());
    }
}

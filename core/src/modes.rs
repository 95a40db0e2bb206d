//! Natural frequencies, mode shapes, modal damping and participation.
//!
//! Undamped modes solve K′φ = ω²Mφ (generalised symmetric eigenproblem, mass-normalised
//! shapes). Where stiffness depends on frequency, each mode's K′ is re-evaluated at that mode's
//! own frequency (fixed-point iteration, a few steps).
//!
//! Modal damping is the modal strain-energy estimate: with φ mass-normalised,
//! ζ_j = φᵀK″(f_j)φ / (2ω_j²) + φᵀCφ / (2ω_j), i.e. half the modal loss factor plus the viscous
//! modal damping ratio. It is accurate for light, non-proportional damping.
//!
//! Participation for ground input d: Γ_jd = φ_jᵀ(M r_d + M_fg e_d), where r_d is the static
//! response of the free DOFs to a unit ground translation; the effective modal mass is Γ².

use crate::error::{Error, Result};
use crate::frf::build_dynamic_stiffness;
use crate::model::Model;
use ndarray::Array2;
use num_complex::Complex64;
use std::f64::consts::PI;

/// Modes of a model, ascending in frequency.
#[derive(Debug, Clone, PartialEq)]
pub struct Modes {
    pub frequency_hz: Vec<f64>,
    pub damping_ratio: Vec<f64>,
    /// Mass-normalised shapes, (dof_count, n_modes).
    pub shapes: Array2<f64>,
    /// Γ for ground x, y, z: (n_modes, 3).
    pub participation: Array2<f64>,
    /// Effective modal mass Γ² (kg): (n_modes, 3).
    pub effective_mass_kg: Array2<f64>,
}

impl Modes {
    /// For each mode, the DOF label that moves most (by kinetic energy share φ_i² M_ii).
    pub fn dominant_dofs(&self, model: &Model) -> Vec<String> {
        let n = model.dof_count();
        let m = model.mass_matrix();
        (0..self.frequency_hz.len())
            .map(|j| {
                let i = (0..n)
                    .max_by(|&a, &b| {
                        let ea = self.shapes[[a, j]].powi(2) * m[[a, a]];
                        let eb = self.shapes[[b, j]].powi(2) * m[[b, b]];
                        ea.total_cmp(&eb)
                    })
                    .unwrap_or(0);
                model.dof_labels()[i].to_string()
            })
            .collect()
    }
}

impl Model {
    /// All modes of the model.
    pub fn modes(&self) -> Result<Modes> {
        let n = self.dof_count();
        let (vals0, vecs0) = crate::linalg::sym_generalized_eigen(&self.static_stiffness(), &self.m_ff, n)?;
        let mut freqs: Vec<f64> = vals0.iter().map(|l| l.max(0.0).sqrt() / (2.0 * PI)).collect();
        let mut shapes = vecs0;
        if !self.terms.is_empty() {
            // Re-evaluate K′ at each mode's own frequency.
            for j in 0..n {
                let mut fj = freqs[j];
                for _ in 0..6 {
                    let (v, ph) =
                        crate::linalg::sym_generalized_eigen(&self.real_stiffness_at(fj), &self.m_ff, n)?;
                    let f_new = v[j].max(0.0).sqrt() / (2.0 * PI);
                    shapes[j * n..(j + 1) * n].copy_from_slice(&ph[j * n..(j + 1) * n]);
                    let done = (f_new - fj).abs() <= 1e-10 * f_new.max(1e-300);
                    fj = f_new;
                    if done {
                        break;
                    }
                }
                freqs[j] = fj;
            }
            // keep ascending order
            let mut order: Vec<usize> = (0..n).collect();
            order.sort_by(|&a, &b| freqs[a].total_cmp(&freqs[b]));
            let f2: Vec<f64> = order.iter().map(|&j| freqs[j]).collect();
            let s2: Vec<f64> = order.iter().flat_map(|&j| shapes[j * n..(j + 1) * n].to_vec()).collect();
            freqs = f2;
            shapes = s2;
        }
        // Damping by modal strain energy, and participation.
        let mut zeta = Vec::with_capacity(n);
        let mut z = vec![Complex64::default(); n * n];
        for j in 0..n {
            let phi = &shapes[j * n..(j + 1) * n];
            let w = 2.0 * PI * freqs[j];
            // Im Z(ω) = Im K*(ω) + ωC, so φᵀ Im Z φ / (2ω²) gives both terms at once.
            build_dynamic_stiffness(self, freqs[j], &mut z);
            let q: f64 = (0..n).map(|a| (0..n).map(|b| phi[a] * z[a + b * n].im * phi[b]).sum::<f64>()).sum();
            zeta.push(if w > 0.0 { q / (2.0 * w * w) } else { 0.0 });
        }
        let r = self.static_influence()?;
        let mut part = Array2::zeros((n, 3));
        for j in 0..n {
            let phi = &shapes[j * n..(j + 1) * n];
            for d in 0..3 {
                let mut g = 0.0;
                for a in 0..n {
                    let mut mr = self.m_fg[a + d * n];
                    for b in 0..n {
                        mr += self.m_ff[a + b * n] * r[b + d * n];
                    }
                    g += phi[a] * mr;
                }
                part[[j, d]] = g;
            }
        }
        let eff = part.mapv(|g: f64| g * g);
        let shapes = Array2::from_shape_fn((n, n), |(i, j)| shapes[i + j * n]);
        Ok(Modes {
            frequency_hz: freqs,
            damping_ratio: zeta,
            shapes,
            participation: part,
            effective_mass_kg: eff,
        })
    }

    /// Static response of the free DOFs to unit ground translations, column-major n × 3.
    pub(crate) fn static_influence(&self) -> Result<Vec<f64>> {
        let n = self.dof_count();
        let mut k: Vec<Complex64> =
            self.static_stiffness().into_iter().map(|x| Complex64::new(x, 0.0)).collect();
        let mut b = vec![Complex64::default(); n * 3];
        for d in 0..3 {
            let inp = crate::model::Input::Ground(d);
            self.fill_input(&inp, 0.0, &mut b[d * n..(d + 1) * n]);
            for v in &mut b[d * n..(d + 1) * n] {
                v.im = 0.0;
            }
        }
        let mut lu = crate::linalg::ComplexLu::new(n, 3);
        lu.solve_in_place(&mut k, &mut b).map_err(|_| Error::Singular { freq_hz: 0.0 })?;
        Ok(b.into_iter().map(|c| c.re).collect())
    }
}

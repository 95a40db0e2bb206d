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

use crate::assembly::Dof;
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
    /// The first mode's frequency (Hz) and damping ratio; NaN for a model without modes.
    pub fn first(&self) -> (f64, f64) {
        (
            self.frequency_hz.first().copied().unwrap_or(f64::NAN),
            self.damping_ratio.first().copied().unwrap_or(f64::NAN),
        )
    }

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

/// Where one mode's energy sits: kinetic energy per body (or node) and strain energy per
/// connector, each as a share of the mode's total (shares sum to 1).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ModeEnergy {
    /// (owner, share of φᵀMφ), largest first.
    pub bodies: Vec<(String, f64)>,
    /// (connector, share of φᵀK′φ), largest first; beams and general springs (not rank-one
    /// springs) are summed into one entry "beams and general springs".
    pub connectors: Vec<(String, f64)>,
}

/// Name of the strain-energy entry that gathers every connector that is not a rank-one spring.
pub const OTHER_CONNECTORS: &str = "beams and general springs";

impl Modes {
    /// Kinetic-energy shares per owner (body, node, beam point) and strain-energy shares per
    /// connector of mode `j` ("which part rings"): with φ mass-normalised, the kinetic shares are
    /// φ_Bᵀ M_BB φ_B over the owner's DOFs (M couples DOFs of one owner only), and a rank-one
    /// spring's strain share is Re k(f_j) (bᵀφ)² / φᵀK′(f_j)φ.
    pub fn energy(&self, model: &Model, j: usize) -> Result<ModeEnergy> {
        let n = model.dof_count();
        if j >= self.frequency_hz.len() {
            return Err(Error::invalid("mode index", format!("{j} >= {}", self.frequency_hz.len())));
        }
        let phi: Vec<f64> = (0..n).map(|i| self.shapes[[i, j]]).collect();
        let labels = model.dof_labels();
        let mut bodies: Vec<(String, f64)> = Vec::new();
        let mut total_t = 0.0;
        for a in 0..n {
            for b in 0..n {
                let e = phi[a] * model.m_ff[a + b * n] * phi[b];
                total_t += e;
                if labels[a].owner == labels[b].owner {
                    match bodies.iter_mut().find(|(o, _)| *o == labels[a].owner) {
                        Some(x) => x.1 += e,
                        None => bodies.push((labels[a].owner.clone(), e)),
                    }
                }
            }
        }
        let f = self.frequency_hz[j];
        let k = model.real_stiffness_at(f);
        let total_v: f64 = (0..n).map(|a| (0..n).map(|b| phi[a] * k[a + b * n] * phi[b]).sum::<f64>()).sum();
        let mut connectors: Vec<(String, f64)> = Vec::new();
        let mut springs = 0.0;
        for t in &model.springs {
            let q: f64 = t.bf.iter().map(|(i, v)| v * phi[*i]).sum();
            let e = t.model.elastic_at(f).re * q * q;
            springs += e;
            match connectors.iter_mut().find(|(c, _)| *c == t.name) {
                Some(x) => x.1 += e,
                None => connectors.push((t.name.clone(), e)),
            }
        }
        let rest = total_v - springs;
        if rest.abs() > 1e-9 * total_v.abs() {
            connectors.push((OTHER_CONNECTORS.to_string(), rest));
        }
        let norm = |v: &mut Vec<(String, f64)>, total: f64| {
            for x in v.iter_mut() {
                x.1 = if total > 0.0 { x.1 / total } else { 0.0 };
            }
            v.sort_by(|a, b| b.1.total_cmp(&a.1));
        };
        norm(&mut bodies, total_t);
        norm(&mut connectors, total_v);
        Ok(ModeEnergy { bodies, connectors })
    }

    /// A name for mode `j` in the mount's own axes: the owner with the most kinetic energy and
    /// what it mostly does. Rotations read as a nod (the image moves in altitude, or declination
    /// on an equatorial rig), a swing (in azimuth, or right ascension) or a roll about the line
    /// of sight; translations read across or along the pointing (horizontal) or vertical.
    /// Without `[optics]` the global axes are used.
    pub fn label(&self, model: &Model, j: usize) -> Result<String> {
        Ok(self.label_with(model, j, &self.energy(model, j)?))
    }

    /// [`Modes::label`] from mode `j`'s energy shares already computed by [`Modes::energy`].
    pub fn label_with(&self, model: &Model, j: usize, e: &ModeEnergy) -> String {
        let Some((owner, _)) = e.bodies.first() else { return String::new() };
        let n = model.dof_count();
        let (mut t, mut r) = ([0.0f64; 3], [0.0f64; 3]);
        let (mut et, mut er) = (0.0, 0.0);
        for (i, l) in model.dof_labels().iter().enumerate() {
            if &l.owner != owner {
                continue;
            }
            let v = self.shapes[[i, j]];
            let m = model.m_ff[i + i * n];
            let k = Dof::ALL.iter().position(|d| *d == l.dof).unwrap_or(0);
            if k < 3 {
                t[k] = v;
                et += m * v * v;
            } else {
                r[k - 3] = v;
                er += m * v * v;
            }
        }
        fn pick(v: &[f64; 3], axes: &[([f64; 3], &'static str); 3]) -> &'static str {
            let dot = |a: &[f64; 3], b: &[f64; 3]| a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
            axes.iter()
                .map(|(a, name)| (dot(v, a).abs(), *name))
                .fold((0.0, ""), |m, x| if x.0 > m.0 { x } else { m })
                .1
        }
        let what = match model.optics() {
            Some(o) => {
                // A turn about e1 (along which the image moves for azimuth or RA) moves the
                // image along e2, and a turn about e2 moves it along e1.
                let (los, e1, e2) = o.reference_axes();
                let (nod, swing) = if matches!(o.equatorial(), Ok(Some(_))) {
                    ("declination nod", "right-ascension swing")
                } else {
                    ("altitude nod", "azimuth swing")
                };
                if er >= et {
                    pick(&r, &[(e1, nod), (e2, swing), (los, "roll about the line of sight")])
                } else {
                    let up = [0.0, 0.0, 1.0];
                    let h = [los[0], los[1], 0.0];
                    let hn = (h[0] * h[0] + h[1] * h[1]).sqrt();
                    let along = if hn > 1e-9 { [h[0] / hn, h[1] / hn, 0.0] } else { [0.0, 1.0, 0.0] };
                    let across = [along[1], -along[0], 0.0];
                    pick(
                        &t,
                        &[
                            (across, "sway across the pointing"),
                            (along, "sway along the pointing"),
                            (up, "vertical bounce"),
                        ],
                    )
                }
            }
            None => {
                let g = [([1.0, 0.0, 0.0], "x"), ([0.0, 1.0, 0.0], "y"), ([0.0, 0.0, 1.0], "z")];
                if er >= et {
                    match pick(&r, &g) {
                        "x" => "rotation about x",
                        "y" => "rotation about y",
                        _ => "rotation about z",
                    }
                } else {
                    match pick(&t, &g) {
                        "x" => "sway along x",
                        "y" => "sway along y",
                        _ => "bounce along z",
                    }
                }
            }
        };
        format!("{owner}: {what}")
    }
}

impl Model {
    /// All modes of the model (computed once per model, then cloned).
    pub fn modes(&self) -> Result<Modes> {
        if let Some(m) = self.modes_cache.get().and_then(|a| a.downcast_ref::<Modes>()) {
            return Ok(m.clone());
        }
        let m = self.compute_modes()?;
        let _ = self.modes_cache.set(std::sync::Arc::new(m.clone()));
        Ok(m)
    }

    fn compute_modes(&self) -> Result<Modes> {
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

    /// Static response of the free DOFs to unit motions of the ground's DOFs (translations,
    /// then rotations), column-major n × 6.
    pub(crate) fn static_influence(&self) -> Result<Vec<f64>> {
        let n = self.dof_count();
        let nd = crate::assembly::GROUND_DOFS;
        let mut k: Vec<Complex64> =
            self.static_stiffness().into_iter().map(|x| Complex64::new(x, 0.0)).collect();
        let mut b = vec![Complex64::default(); n * nd];
        for d in 0..nd {
            let inp = crate::model::Input::Ground(d);
            self.fill_input(&inp, 0.0, &mut b[d * n..(d + 1) * n]);
            for v in &mut b[d * n..(d + 1) * n] {
                v.im = 0.0;
            }
        }
        let mut lu = crate::linalg::ComplexLu::new(n, nd);
        lu.solve_in_place(&mut k, &mut b).map_err(|_| Error::Singular { freq_hz: 0.0 })?;
        Ok(b.into_iter().map(|c| c.re).collect())
    }
}

#[cfg(test)]
mod tests {
    use crate::model::Model;

    /// Two masses in a chain: ground –k1– m1 –k2– m2 along z.
    fn chain(m1: f64, m2: f64, k1: f64, k2: f64) -> Model {
        let text = format!(
            r#"
[[body]]
name = "lower"
mass_kg = {m1}
cg_m = [0, 0, 1]
inertia_kgm2 = [1, 1, 1]
dofs = ["z"]
[[body]]
name = "upper"
mass_kg = {m2}
cg_m = [0, 0, 2]
inertia_kgm2 = [1, 1, 1]
dofs = ["z"]
[[spring]]
name = "k1"
from = "ground"
to = "lower"
at_m = [0, 0, 0.5]
direction = [0, 0, 1]
stiffness_n_per_m = {k1}
[[spring]]
name = "k2"
from = "lower"
to = "upper"
at_m = [0, 0, 1.5]
direction = [0, 0, 1]
stiffness_n_per_m = {k2}
"#
        );
        Model::from_toml_str(&text, "chain").unwrap()
    }

    #[test]
    fn energy_shares_match_the_two_mass_chain_by_hand() {
        // Closed form (elementary vibration theory, e.g. Thomson & Dahleh, Theory of Vibration
        // with Applications, the two-DOF chain): ω² roots of m1 m2 ω⁴ − (m1 k2 + m2 (k1 + k2)) ω² + k1 k2 = 0;
        // shape (1, r) with r = (k1 + k2 − m1 ω²)/k2. Kinetic shares m_i φ_i² / Σ; strain
        // shares k1 φ1² and k2 (φ2 − φ1)² over their sum (= ω² Σ m φ²).
        let (m1, m2, k1, k2) = (3.0, 1.0, 4.0e4, 1.0e4);
        let model = chain(m1, m2, k1, k2);
        let modes = model.modes().unwrap();
        let (a, b, c) = (m1 * m2, -(m1 * k2 + m2 * (k1 + k2)), k1 * k2);
        let disc = (b * b - 4.0 * a * c).sqrt();
        for (j, w2) in [(-b - disc) / (2.0 * a), (-b + disc) / (2.0 * a)].into_iter().enumerate() {
            let f = w2.sqrt() / (2.0 * std::f64::consts::PI);
            assert!((modes.frequency_hz[j] / f - 1.0).abs() < 1e-10);
            let r = (k1 + k2 - m1 * w2) / k2;
            let (t1, t2) = (m1, m2 * r * r);
            let (v1, v2) = (k1, k2 * (r - 1.0) * (r - 1.0));
            let e = modes.energy(&model, j).unwrap();
            let get = |v: &[(String, f64)], n: &str| v.iter().find(|x| x.0 == n).unwrap().1;
            assert!((get(&e.bodies, "lower") - t1 / (t1 + t2)).abs() < 1e-9, "{e:?}");
            assert!((get(&e.bodies, "upper") - t2 / (t1 + t2)).abs() < 1e-9, "{e:?}");
            assert!((get(&e.connectors, "k1") - v1 / (v1 + v2)).abs() < 1e-9, "{e:?}");
            assert!((get(&e.connectors, "k2") - v2 / (v1 + v2)).abs() < 1e-9, "{e:?}");
            assert_eq!(e.connectors.len(), 2, "no beams: nothing else stores energy");
        }
        assert!(modes.energy(&model, 2).is_err());
        // No [optics]: global axes. The first mode moves the upper mass most (r > 1).
        assert_eq!(modes.label(&model, 0).unwrap(), "upper: bounce along z");
    }

    #[test]
    fn a_tube_rocking_about_y_nods_in_altitude_when_it_points_east_and_rolls_when_north() {
        // The line of sight (sin A cos h, cos A cos h, sin h) and the altitude axis
        // (cos A, −sin A, 0): pointing east (A = 90°) the altitude axis is −y, pointing north
        // (A = 0°) the line of sight is +y.
        let text = |az: f64| {
            format!(
                r#"
[[body]]
name = "tube"
mass_kg = 5
cg_m = [0, 0, 1]
inertia_kgm2 = [20, 20, 20]
dofs = ["ry"]
[[torsion_spring]]
name = "axis"
from = "ground"
to = "tube"
axis = [0, 1, 0]
stiffness_nm_per_rad = 5.0e4
[optics]
body = "tube"
focal_length_mm = 1000
pixel_um = 3.76
altitude_deg = 0
azimuth_deg = {az}
"#
            )
        };
        let east = Model::from_toml_str(&text(90.0), "east").unwrap();
        assert_eq!(east.modes().unwrap().label(&east, 0).unwrap(), "tube: altitude nod");
        let north = Model::from_toml_str(&text(0.0), "north").unwrap();
        assert_eq!(north.modes().unwrap().label(&north, 0).unwrap(), "tube: roll about the line of sight");
        let e = east.modes().unwrap().energy(&east, 0).unwrap();
        assert_eq!((e.bodies[0].0.as_str(), e.connectors[0].0.as_str()), ("tube", "axis"));
        assert!((e.bodies[0].1 - 1.0).abs() < 1e-12 && (e.connectors[0].1 - 1.0).abs() < 1e-12);
    }
}

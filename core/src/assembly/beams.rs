//! Euler–Bernoulli beams: elements with consistent mass between the beam's end carriers and its
//! internal nodes, each in the beam's local axes.

use super::carrier::{Carrier, connect, lookup};
use super::matrices::{Builder, add_tkt};
use super::numbering::BeamNodes;
use super::spec::ModelSpec;
use super::vector::{cross, norm, sub, unit};
use crate::error::{Error, Result};
use crate::material::Material;
use crate::section::Section;
use num_complex::Complex64;
use std::collections::BTreeMap;

/// Add the `[[beam]]` entries; `n` is the number of free DOFs (the ground's x follows them).
pub(super) fn add(
    spec: &ModelSpec,
    carriers: &BTreeMap<String, Carrier>,
    beam_nodes: &mut [BeamNodes],
    n: usize,
    b: &mut Builder,
) -> Result<()> {
    let nfull = b.nfull;
    for (bm, bn) in spec.beams.iter().zip(beam_nodes.iter_mut()) {
        let who = format!("beam '{}'", bm.name);
        connect(&bm.from, &bm.to, &who)?;
        let mat = bm.material()?;
        let ne = bm.elements;
        for (k, end) in [(0usize, &bm.from), (ne, &bm.to)] {
            let c = lookup(carriers, &who, end)?;
            bn.nodes[k] = c;
        }
        let axis = sub(bm.to_at_m, bm.from_at_m);
        let len = norm(axis) / ne as f64;
        let ex = unit(&who, axis)?;
        let hint = match bm.orientation {
            Some(o) => unit(&format!("{who}.orientation"), o)?,
            None if ex[2].abs() > 0.99 => [1.0, 0.0, 0.0],
            None => [0.0, 0.0, 1.0],
        };
        let ez0 = cross(ex, hint);
        if norm(ez0) < 1e-6 {
            return Err(Error::invalid(format!("{who}.orientation"), "must not be parallel to the beam"));
        }
        let ez = unit(&who, ez0)?;
        let ey = cross(ez, ex);
        let lam = [ex, ey, ez];
        let (ke, me) = beam_element(&mat, &bm.section, len, bm.added_mass_kg_per_m);
        let eta = mat.loss_factor + bm.added_loss_factor;
        for e in 0..ne {
            let pa = std::array::from_fn(|i| bm.from_at_m[i] + axis[i] * e as f64 / ne as f64);
            let pb = std::array::from_fn(|i| bm.from_at_m[i] + axis[i] * (e + 1) as f64 / ne as f64);
            let mut ends = Vec::new();
            for (k, p) in [(e, pa), (e + 1, pb)] {
                let c = &bn.nodes[k];
                if !c.rotates && (k == 0 || k == ne) && c.index[0] != Some(n) {
                    return Err(Error::unsupported(format!(
                        "{who}: beam ends must be on a body or the ground; '{}' is a point node without rotations",
                        if k == 0 { &bm.from } else { &bm.to }
                    )));
                }
                ends.push(c.point_map(p, nfull));
            }
            // local 12 rows: [u_a, θ_a, u_b, θ_b] in local axes = λ · global
            let mut t: Vec<Vec<f64>> = Vec::with_capacity(12);
            for map in &ends {
                for blk in 0..2 {
                    for r in 0..3 {
                        let row: Vec<f64> = (0..nfull)
                            .map(|g| (0..3).map(|c| lam[r][c] * map[3 * blk + c][g]).sum())
                            .collect();
                        t.push(row);
                    }
                }
            }
            let f = Complex64::new(1.0, eta);
            add_tkt(&mut b.k_const, nfull, &t, 12, |i, j| f * ke[i][j]);
            let mflat: Vec<f64> = me.iter().flatten().copied().collect();
            b.add_mass(&t, &mflat, 12);
        }
    }
    Ok(())
}

/// 12 × 12 local stiffness and consistent mass of a 3-D Euler–Bernoulli element of length `l`,
/// DOF order [u, v, w, θx, θy, θz] at each end, local x along the beam (Przemieniecki 1968;
/// standard in finite-element texts).
fn beam_element(
    m: &Material,
    s: &Section,
    l: f64,
    added_kg_per_m: f64,
) -> ([[f64; 12]; 12], [[f64; 12]; 12]) {
    let e = m.youngs_modulus_pa;
    let g = m.shear_modulus_pa();
    let a = s.area_m2();
    let (iy, iz) = s.second_moments_m4();
    let j = s.torsion_constant_m4();
    let mut k = [[0.0; 12]; 12];
    let mut set = |i: usize, jj: usize, v: f64| {
        k[i][jj] += v;
        if i != jj {
            k[jj][i] += v;
        }
    };
    let ea = e * a / l;
    set(0, 0, ea);
    set(6, 6, ea);
    set(0, 6, -ea);
    let gj = g * j / l;
    set(3, 3, gj);
    set(9, 9, gj);
    set(3, 9, -gj);
    // bending in x–y plane (v, θz) with I_z
    let (a1, a2, a3, a4) =
        (12.0 * e * iz / l.powi(3), 6.0 * e * iz / l.powi(2), 4.0 * e * iz / l, 2.0 * e * iz / l);
    set(1, 1, a1);
    set(7, 7, a1);
    set(1, 7, -a1);
    set(1, 5, a2);
    set(1, 11, a2);
    set(5, 7, -a2);
    set(7, 11, -a2);
    set(5, 5, a3);
    set(11, 11, a3);
    set(5, 11, a4);
    // bending in x–z plane (w, θy) with I_y; signs flip on the coupling terms
    let (b1, b2, b3, b4) =
        (12.0 * e * iy / l.powi(3), 6.0 * e * iy / l.powi(2), 4.0 * e * iy / l, 2.0 * e * iy / l);
    set(2, 2, b1);
    set(8, 8, b1);
    set(2, 8, -b1);
    set(2, 4, -b2);
    set(2, 10, -b2);
    set(4, 8, b2);
    set(8, 10, b2);
    set(4, 4, b3);
    set(10, 10, b3);
    set(4, 10, b4);
    // consistent mass
    let mu = m.density_kg_m3 * a + added_kg_per_m;
    let mut mm = [[0.0; 12]; 12];
    let mut setm = |i: usize, jj: usize, v: f64| {
        mm[i][jj] += v;
        if i != jj {
            mm[jj][i] += v;
        }
    };
    let c = mu * l / 420.0;
    setm(0, 0, mu * l / 3.0);
    setm(6, 6, mu * l / 3.0);
    setm(0, 6, mu * l / 6.0);
    let rj = m.density_kg_m3 * (iy + iz) * l; // polar mass moment per element (structural part)
    setm(3, 3, rj / 3.0);
    setm(9, 9, rj / 3.0);
    setm(3, 9, rj / 6.0);
    for (v, th, sg) in [(1usize, 5usize, 1.0), (2, 4, -1.0)] {
        let (v2, th2) = (v + 6, th + 6);
        setm(v, v, 156.0 * c);
        setm(v2, v2, 156.0 * c);
        setm(v, v2, 54.0 * c);
        setm(v, th, sg * 22.0 * l * c);
        setm(v2, th2, -sg * 22.0 * l * c);
        setm(v, th2, -sg * 13.0 * l * c);
        setm(v2, th, sg * 13.0 * l * c);
        setm(th, th, 4.0 * l * l * c);
        setm(th2, th2, 4.0 * l * l * c);
        setm(th, th2, -3.0 * l * l * c);
    }
    (k, mm)
}

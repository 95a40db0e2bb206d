//! General 6 × 6 springs: a symmetric stiffness matrix with a loss factor between two carriers
//! at one point.

use super::carrier::{Carrier, connect, lookup};
use super::matrices::{Builder, add_tkt};
use super::spec::ModelSpec;
use super::vector::finite3;
use crate::error::{Error, Result, require_finite, require_non_negative};
use num_complex::Complex64;
use std::collections::BTreeMap;

/// Add the `[[general_spring]]` entries.
pub(super) fn add(spec: &ModelSpec, carriers: &BTreeMap<String, Carrier>, b: &mut Builder) -> Result<()> {
    let nfull = b.nfull;
    for s in &spec.general_springs {
        let who = format!("general_spring '{}'", s.name);
        connect(&s.from, &s.to, &who)?;
        finite3(&format!("{who}.at_m"), s.at_m)?;
        require_non_negative(|| format!("{who}.loss_factor"), s.loss_factor)?;
        for i in 0..6 {
            for j in 0..6 {
                require_finite(|| format!("{who}.matrix[{i}][{j}]"), s.matrix[i][j])?;
                if (s.matrix[i][j] - s.matrix[j][i]).abs()
                    > 1e-9 * (s.matrix[i][j].abs() + s.matrix[j][i].abs())
                {
                    return Err(Error::invalid(
                        format!("{who}.matrix"),
                        format!("is not symmetric at [{i}][{j}]"),
                    ));
                }
            }
            if s.matrix[i][i] < 0.0 {
                return Err(Error::invalid(
                    format!("{who}.matrix[{i}][{i}]"),
                    "diagonal stiffness must be >= 0",
                ));
            }
        }
        let ta = lookup(carriers, &who, &s.from)?.point_map(s.at_m, nfull);
        let tb = lookup(carriers, &who, &s.to)?.point_map(s.at_m, nfull);
        let d: Vec<Vec<f64>> = (0..6).map(|i| (0..nfull).map(|g| tb[i][g] - ta[i][g]).collect()).collect();
        let f = Complex64::new(1.0, s.loss_factor);
        add_tkt(&mut b.k_const, nfull, &d, 6, |i, j| f * s.matrix[i][j]);
    }
    Ok(())
}

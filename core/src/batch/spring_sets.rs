//! Many alternatives of one rig that differ only in the stiffness of named rank-one springs
//! (pads, soil contacts, joints), evaluated without rebuilding a model for each.
//!
//! [`spring_changes`] decides whether an alternative qualifies: its generic spec must equal the
//! base spec except for the stiffness fields of `[[spring]]` and `[[torsion_spring]]` entries
//! with the same name, ends, points and direction or axis, each name once in the base. Those
//! are exactly the springs the assembly turns into one rank-one term k*(ω) b bᵀ under their own
//! name, which [`crate::frf::variants::VariantPlan`] replaces by a Woodbury update or a rational
//! form. Any stiffness model qualifies, replaced and replacing alike: constant, hysteretic,
//! viscous, Zener, tabulated, half-space footing impedance, series and parallel chains (the plan
//! evaluates the complete complex stiffness at each frequency). An alternative does not qualify,
//! and is rebuilt, when it adds or removes a body, node, mass, spring or beam, moves a spring,
//! changes a general (6 × 6) spring, a beam, the optics, the wind or the ground's waves — e.g. a
//! rig-layer sweep's "no pad" entry, where the feet stand on rigid ground with no spring at all.
//!
//! [`SpringSets`] then gives, per alternative and per disturbance, the image statistics that
//! [`Model::image_motion`] gives on the rebuilt model (no guiding, no exposure split): the FRFs
//! of `image_x`, `image_y` to every input come from one plan over all alternatives and are
//! reused for every disturbance, and the statistics repeat `image_motion`'s arithmetic in the
//! same order (per-input |H|²·S summed, the co-spectrum Re(H_x H_y*)·S, scaled to arcsec², the
//! trapezoid rule). What still needs a model per alternative (its modes, a static load, a
//! transient) is not computed here.

use crate::assembly::ModelSpec;
use crate::error::{Error, Result};
use crate::frf::variants::VariantPlan;
use crate::grid::{FreqGrid, trapezoid};
use crate::image::p_outside;
use crate::model::Model;
use crate::response::Disturbances;
use crate::stiffness::StiffnessModel;
use crate::units::ARCSEC_PER_RAD;
use num_complex::Complex64;
use rayon::prelude::*;

/// Alternatives evaluated per plan call: bounds the FRF buffer (n × grid × 2 × inputs complex
/// values) while keeping the plan's per-frequency reference solves few.
const SETS_PER_CALL: usize = 256;

/// The springs of `other` that differ from `base`, with their new stiffness models, when that is
/// all that differs (see the module docs); `None` when `other` needs a model of its own. An
/// empty list means the two specs are equal.
pub fn spring_changes(base: &ModelSpec, other: &ModelSpec) -> Option<Vec<(String, StiffnessModel)>> {
    if base.springs.len() != other.springs.len() || base.torsion_springs.len() != other.torsion_springs.len()
    {
        return None;
    }
    let mut probe = other.clone();
    let mut out = Vec::new();
    let kinds = [
        (&base.springs, &other.springs, &mut probe.springs, false),
        (&base.torsion_springs, &other.torsion_springs, &mut probe.torsion_springs, true),
    ];
    for (b, o, p, angular) in kinds {
        for (i, (bs, os)) in b.iter().zip(o.iter()).enumerate() {
            if bs == os {
                continue;
            }
            if bs.geometry() != os.geometry() {
                return None;
            }
            let once = base.springs.iter().chain(&base.torsion_springs).filter(|s| s.name == bs.name).count();
            if once != 1 {
                return None;
            }
            let model = os.stiffness().to_model(&format!("spring '{}'", os.name), angular).ok()?;
            out.push((os.name.clone(), model));
            p[i] = bs.clone();
        }
    }
    (probe == *base).then_some(out)
}

/// A disturbance's inputs on the grid: (input name, PSD) pairs.
type InputPsds = Vec<(String, Vec<f64>)>;

/// Image statistics of one alternative under one disturbance, as [`Model::image_motion`] gives
/// them on the rebuilt model.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ImageStats {
    /// Radial RMS √(σx² + σy²) (arcsec).
    pub rms_arcsec: f64,
    pub rms_px: f64,
    /// P(outside the radius) at a random instant.
    pub p_outside: f64,
    /// [var_x, var_y, cov_xy] (arcsec²).
    pub covariance_arcsec2: [f64; 3],
}

/// A base model and the named rank-one springs its alternatives replace.
#[derive(Debug, Clone)]
pub struct SpringSets<'m> {
    model: &'m Model,
    names: Vec<String>,
}

impl<'m> SpringSets<'m> {
    /// `names`: the springs (`[[spring]]` or `[[torsion_spring]]` names) that alternatives
    /// replace. The model needs `[optics]`.
    pub fn new(model: &'m Model, names: &[&str]) -> Result<SpringSets<'m>> {
        if model.optics().is_none() {
            return Err(Error::invalid("optics", "the model has no [optics] section"));
        }
        // Resolves the names (unknown ones are refused here, not per call).
        VariantPlan::new(model, names, &["ground_z"], &["image_x"])?;
        Ok(SpringSets { model, names: names.iter().map(|s| s.to_string()).collect() })
    }

    /// The base model's stiffness model of each named spring (an alternative that leaves a
    /// spring as it is takes this entry).
    pub fn base_models(&self) -> Vec<StiffnessModel> {
        self.names
            .iter()
            .filter_map(|n| self.model.springs.iter().find(|t| &t.name == n).map(|t| t.model.clone()))
            .collect()
    }

    /// Image statistics for every alternative (`sets[a][s]` replaces the s-th named spring)
    /// under every disturbance, indexed `[a][d]`, radius `radius_px` for P(outside). A
    /// disturbance that cannot be put on the grid is an error in each alternative's entry; an
    /// alternative with an invalid stiffness model is an error in each of its entries.
    pub fn image_stats(
        &self,
        grid: &FreqGrid,
        sets: &[Vec<StiffnessModel>],
        disturbances: &[Disturbances],
        radius_px: f64,
    ) -> Result<Vec<Vec<Result<ImageStats>>>> {
        crate::error::require_positive("radius_px", radius_px)?;
        let optics =
            self.model.optics().ok_or_else(|| Error::invalid("optics", "the model has no [optics]"))?;
        let plate = optics.plate_scale_arcsec_per_px();
        let on_grid: Vec<Result<InputPsds>> =
            disturbances.iter().map(|d| d.on_grid(self.model, grid)).collect();
        // The union of the disturbances' inputs, in first-seen order; each disturbance's own
        // inputs as columns of it, in its own order (the order image_motion sums them in).
        let mut inputs: Vec<String> = Vec::new();
        for (name, _) in on_grid.iter().flatten().flatten() {
            if !inputs.contains(name) {
                inputs.push(name.clone());
            }
        }
        let columns: Vec<Vec<usize>> = on_grid
            .iter()
            .map(|r| match r {
                Ok(v) => v.iter().filter_map(|(n, _)| inputs.iter().position(|x| x == n)).collect(),
                Err(_) => Vec::new(),
            })
            .collect();
        let k = self.names.len();
        let valid: Vec<Result<()>> = sets
            .iter()
            .enumerate()
            .map(|(a, set)| {
                if set.len() != k {
                    return Err(Error::shape(format!("sets[{a}] (one model per spring)"), k, set.len()));
                }
                set.iter().enumerate().try_for_each(|(s, m)| m.validate(format_args!("sets[{a}][{s}]")))
            })
            .collect();
        let good: Vec<usize> = (0..sets.len()).filter(|&a| valid[a].is_ok()).collect();
        let mut frfs: Vec<Option<Vec<Complex64>>> = vec![None; sets.len()];
        let (nf, ni) = (grid.len(), inputs.len());
        if ni > 0 && !good.is_empty() {
            let names: Vec<&str> = self.names.iter().map(String::as_str).collect();
            let ins: Vec<&str> = inputs.iter().map(String::as_str).collect();
            let plan = VariantPlan::new(self.model, &names, &ins, &["image_x", "image_y"])?;
            let per = nf * 2 * ni;
            for chunk in good.chunks(SETS_PER_CALL) {
                let reps: Vec<Vec<StiffnessModel>> = chunk.iter().map(|&a| sets[a].clone()).collect();
                let mut buf = vec![Complex64::default(); per * chunk.len()];
                plan.evaluate_into(grid, &reps, Some(&mut buf), None)?;
                for (c, &a) in chunk.iter().enumerate() {
                    frfs[a] = Some(buf[c * per..(c + 1) * per].to_vec());
                }
            }
        }
        let f = grid.hz();
        Ok((0..sets.len())
            .into_par_iter()
            .map(|a| {
                (0..disturbances.len())
                    .map(|d| {
                        valid[a].clone()?;
                        let ins = on_grid[d].as_ref().map_err(Clone::clone)?;
                        let h = frfs[a].as_deref().unwrap_or_default();
                        Ok(stats_from_frf(f, h, ni, &columns[d], ins, plate, radius_px))
                    })
                    .collect()
            })
            .collect())
    }
}

/// `image_motion`'s statistics from FRFs laid out (frequency, output x|y, input) over `ni`
/// inputs, for the inputs `cols` (columns of the FRF) with PSDs `ins`, in that order.
fn stats_from_frf(
    f: &[f64],
    h: &[Complex64],
    ni: usize,
    cols: &[usize],
    ins: &[(String, Vec<f64>)],
    plate: f64,
    radius_px: f64,
) -> ImageStats {
    let nf = f.len();
    let at = |k: usize, o: usize, c: usize| h.get(k * 2 * ni + o * ni + c).copied().unwrap_or_default();
    let a2 = ARCSEC_PER_RAD * ARCSEC_PER_RAD;
    let mut px = vec![0.0; nf];
    let mut py = vec![0.0; nf];
    let mut co = vec![0.0; nf];
    for k in 0..nf {
        let mut c_sum = 0.0;
        for (&c, (_, s)) in cols.iter().zip(ins) {
            px[k] += at(k, 0, c).norm_sqr() * s[k];
            py[k] += at(k, 1, c).norm_sqr() * s[k];
            c_sum += (at(k, 0, c) * at(k, 1, c).conj()).re * s[k];
        }
        co[k] = c_sum;
    }
    for p in [&mut px, &mut py, &mut co] {
        p.iter_mut().for_each(|v| *v *= a2);
    }
    let (vx, vy, cxy) = (trapezoid(f, &px), trapezoid(f, &py), trapezoid(f, &co));
    let rms = (vx + vy).sqrt();
    ImageStats {
        rms_arcsec: rms,
        rms_px: rms / plate,
        p_outside: p_outside(radius_px * plate, vx, vy, cxy),
        covariance_arcsec2: [vx, vy, cxy],
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::assembly::SpringSpec;
    use crate::batch::GroundSource;
    use crate::image::ImageOptions;
    use crate::schema::ModelFile;
    use crate::spectrum::ReferenceGround;
    use crate::wind::{Turbulence, WindSpec, WindSpectrum};

    const LAWN: &str = include_str!("../../../docs/examples/tripod-lawn.toml");

    fn lawn() -> ModelSpec {
        ModelFile::parse(LAWN, "tripod-lawn.toml").unwrap().expanded().unwrap()
    }

    fn disturbances(grid: &FreqGrid) -> Vec<Disturbances> {
        let g = GroundSource::Reference(ReferenceGround::Nhnm)
            .load(grid, [1.0; 3], &crate::io::series::SeriesOptions::default())
            .unwrap();
        let ground = Disturbances { ground: g.axes, ..Disturbances::default() };
        let wind = WindSpec::new(WindSpectrum::Kaimal, 4.0, 2.0, Turbulence::Intensity(0.2));
        vec![ground.clone(), Disturbances { wind: Some(wind), ..ground }]
    }

    /// The spring with a stiffer, differently shaped model: the old one in parallel with a
    /// Zener element of half its 10 Hz storage stiffness.
    fn stiffer(s: &SpringSpec, angular: bool) -> SpringSpec {
        let old = s.stiffness().to_model("s", angular).unwrap();
        let k = 0.5 * old.at(10.0).re;
        let new =
            StiffnessModel::Parallel(vec![old, StiffnessModel::Zener { k0: k, k_inf: 2.0 * k, tau_s: 0.01 }]);
        s.clone().with_model(&new, angular)
    }

    #[test]
    fn soil_contacts_and_joints_match_rebuilt_models() {
        // Oracle: each alternative's model built from its spec and solved by Model::image_motion.
        let base = lawn();
        let contact = base.springs.iter().position(|s| s.from == "ground" || s.to == "ground").unwrap();
        let joint = 0;
        assert!(!base.torsion_springs.is_empty(), "the lawn rig has joints (torsion springs)");
        let mut a = base.clone();
        a.springs[contact] = stiffer(&base.springs[contact], false);
        let mut b = base.clone();
        b.torsion_springs[joint] = stiffer(&base.torsion_springs[joint], true);
        let mut both = a.clone();
        both.torsion_springs[joint] = b.torsion_springs[joint].clone();
        let (cn, jn) = (base.springs[contact].name.clone(), base.torsion_springs[joint].name.clone());
        let alts = [base.clone(), a, b, both];
        let names = [cn.as_str(), jn.as_str()];
        let model = Model::from_spec(&base).unwrap();
        let plan = SpringSets::new(&model, &names).unwrap();
        let sets: Vec<Vec<StiffnessModel>> = alts
            .iter()
            .map(|alt| {
                let ch = spring_changes(&base, alt).unwrap();
                let mut set = plan.base_models();
                for (n, m) in ch {
                    set[names.iter().position(|x| *x == n).unwrap()] = m;
                }
                set
            })
            .collect();
        let grid = FreqGrid::log(0.2, 100.0, 300).unwrap();
        let dist = disturbances(&grid);
        let got = plan.image_stats(&grid, &sets, &dist, 0.5).unwrap();
        let opts = ImageOptions { skip_mode_shares: true, ..ImageOptions::default() };
        let rel = |x: f64, y: f64| (x - y).abs() / y.abs().max(1e-300);
        for (alt, row) in alts.iter().zip(&got) {
            let m = Model::from_spec(alt).unwrap();
            for (d, r) in dist.iter().zip(row) {
                let want = m.image_motion(&grid, d, &opts).unwrap();
                let r = r.as_ref().unwrap();
                assert!(rel(r.rms_arcsec, want.rms_arcsec) < 1e-9, "{} vs {}", r.rms_arcsec, want.rms_arcsec);
                assert!(rel(r.rms_px, want.rms_px) < 1e-9);
                // P(outside) = 1 − P(inside) carries about 1e-16 absolute rounding on either path.
                assert!(
                    rel(r.p_outside, want.p_outside) < 1e-9 || (r.p_outside - want.p_outside).abs() <= 1e-15
                );
                for k in 0..3 {
                    assert!(rel(r.covariance_arcsec2[k], want.covariance_arcsec2[k]) < 1e-9);
                }
            }
        }
        // The changes are visible: a stiffer contact and a stiffer joint move the image less.
        assert!(got[3][0].as_ref().unwrap().rms_arcsec != got[0][0].as_ref().unwrap().rms_arcsec);
        // A bad stiffness is an error in its own entries only.
        let mut bad = sets.clone();
        bad[1][0] = StiffnessModel::Zener { k0: 1e5, k_inf: 2e5, tau_s: -1.0 };
        let r = plan.image_stats(&grid, &bad, &dist, 0.5).unwrap();
        assert!(r[1].iter().all(|e| e.as_ref().is_err_and(|e| e.to_string().contains("sets[1][0]"))));
        assert_eq!(r[2], got[2]);
        assert!(matches!(SpringSets::new(&model, &["no-such-spring"]), Err(Error::UnknownName { .. })));
    }

    #[test]
    fn only_stiffness_changes_qualify() {
        let base = lawn();
        assert_eq!(spring_changes(&base, &base), Some(Vec::new()));
        // A moved spring, a heavier body, a removed spring, a renamed spring: a model of their own.
        let mut moved = base.clone();
        let p = moved.springs[0].at_m.or(moved.springs[0].from_at_m).unwrap();
        if moved.springs[0].at_m.is_some() {
            moved.springs[0].at_m = Some([p[0] + 0.01, p[1], p[2]]);
        } else {
            moved.springs[0].from_at_m = Some([p[0] + 0.01, p[1], p[2]]);
        }
        assert_eq!(spring_changes(&base, &moved), None);
        let mut heavy = stiffer_first(&base);
        heavy.bodies[0].mass_kg *= 1.1;
        assert_eq!(spring_changes(&base, &heavy), None);
        let mut fewer = base.clone();
        fewer.springs.pop();
        assert_eq!(spring_changes(&base, &fewer), None);
        let mut renamed = stiffer_first(&base);
        renamed.springs[0].name.push('2');
        assert_eq!(spring_changes(&base, &renamed), None);
        // A stiffness change alone qualifies, naming the spring and its new model.
        let ch = spring_changes(&base, &stiffer_first(&base)).unwrap();
        assert_eq!(ch.len(), 1);
        assert_eq!(ch[0].0, base.springs[0].name);
        assert!(matches!(ch[0].1, StiffnessModel::Parallel(_)));
    }

    fn stiffer_first(base: &ModelSpec) -> ModelSpec {
        let mut s = base.clone();
        s.springs[0] = stiffer(&base.springs[0], false);
        s
    }
}

//! The assembled structural [`Model`]: matrices over the free DOFs, named inputs and outputs.
//!
//! Inputs (one column of the FRF each):
//! - `ground_x`, `ground_y`, `ground_z`: unit ground displacement (m) of every ground attachment.
//! - `ground_rx`, `ground_ry`, `ground_rz`: unit rotation (rad) of the rigid ground about the
//!   origin; a ground point p moves as θ × p.
//! - `ground_x@k`, `ground_y@k`, `ground_z@k`: unit displacement of the ground at station k only
//!   (see [`Model::ground_stations`]), for differential motion between places apart.
//! - `wind`: the reference drag force ρ Ū u Σ C_d A (N), shared over the wind's parts in
//!   proportion to their C_d A, each at its centre of pressure along its own direction.
//! - `force:NAME:x|y|z`: unit force at the CG of body or node NAME; `moment:NAME:x|y|z`: unit
//!   moment (N·m) on body NAME.
//! - `force:NAME:x|y|z@X,Y,Z`: unit force at the point (X, Y, Z) (m, model frame) of body NAME:
//!   the force at its CG plus the moment r × F, r from the CG to the point (a footfall on a
//!   deck, a hand on a tube).
//!
//! Outputs (one row each):
//! - `NAME:x|y|z|rx|ry|rz`: absolute displacement (m) or rotation (rad) of a body's CG or a node.
//! - `image_x`, `image_y`: line-of-sight motion on the sky (rad) along increasing azimuth and
//!   altitude, or along increasing right ascension and declination when the optics are pointed
//!   by hour angle and declination (rotated by the camera rotation), from the rotation of the
//!   optics body.
//! - `image_ra`, `image_dec`: along increasing right ascension and declination, unrotated
//!   (equatorial pointings only).
//!
//! So output `payload:z` for input `ground_z` is the dimensionless transmissibility.

pub(crate) use crate::assembly::GROUND_DOFS;
use crate::assembly::{self, Assembled, Dof, DofLabel, GROUND, ModelSpec, OpticsSpec, WindLoadSpec};
use crate::error::{Error, Result};
use crate::spectrum::Quantity;
use ndarray::{Array1, Array2};
use num_complex::Complex64;
use std::f64::consts::PI;

/// The image outputs (angles on the sky).
pub const IMAGE_OUTPUTS: [&str; 4] = ["image_x", "image_y", "image_ra", "image_dec"];

/// The three ground-motion inputs.
pub const GROUND_INPUTS: [&str; 3] = ["ground_x", "ground_y", "ground_z"];

/// The three ground-rotation inputs: tilt about x and y and torsion about z of a rigid ground
/// about the origin (rad); a ground point p moves as θ_g × p.
pub const GROUND_ROTATION_INPUTS: [&str; 3] = ["ground_rx", "ground_ry", "ground_rz"];

/// A resolved input: ground motion along one of the ground's DOFs (0–2 translations, 3–5
/// rotations), or a fixed load vector over the free DOFs.
#[derive(Debug, Clone, PartialEq)]
pub(crate) enum Input {
    Ground(usize),
    Load(Vec<f64>),
}

/// A frequency-dependent rank-one stiffness term restricted to the free DOFs (`bf`) and the
/// ground's DOFs (`bg`).
#[derive(Debug, Clone)]
pub(crate) struct Term {
    /// The connector's name (for sweeps that replace a spring).
    pub(crate) name: String,
    pub(crate) model: crate::stiffness::StiffnessModel,
    pub(crate) bf: Vec<(usize, f64)>,
    pub(crate) bg: Vec<f64>,
}

/// An assembled linear structure. Immutable once built; cheap to share between threads.
#[derive(Debug, Clone)]
pub struct Model {
    spec: ModelSpec,
    n: usize,
    labels: Vec<DofLabel>,
    /// Column-major n × n blocks over the free DOFs, and n × ng couplings to the ground's
    /// columns (the rigid ground's six, then three per station).
    pub(crate) m_ff: Vec<f64>,
    pub(crate) c_ff: Vec<f64>,
    pub(crate) k_ff: Vec<Complex64>,
    pub(crate) m_fg: Vec<f64>,
    pub(crate) c_fg: Vec<f64>,
    pub(crate) k_fg: Vec<Complex64>,
    pub(crate) terms: Vec<Term>,
    /// Every rank-one spring by name, with its full stiffness model (viscous part included);
    /// used by [`crate::frf::variants::VariantPlan`]. Z(ω) already contains `model.at(f)·b bᵀ`
    /// for each.
    pub(crate) springs: Vec<Term>,
    carriers: std::collections::BTreeMap<String, assembly::Carrier>,
    /// The ground's stations (horizontal positions, m); empty when it is touched at one place.
    stations: Vec<[f64; 2]>,
    /// [`Model::modes`], computed on first use (the model is immutable): a sweep row, its gust
    /// plan and its transients ask for the same modes several times.
    /// Type-erased so that `model` does not import `modes` (which imports `model`).
    pub(crate) modes_cache: std::sync::OnceLock<std::sync::Arc<dyn std::any::Any + Send + Sync>>,
}

impl Model {
    /// Validate and assemble a generic-layer spec. Refuses structures with a free rigid-body
    /// mode, naming the body and DOF.
    pub fn from_spec(spec: &ModelSpec) -> Result<Model> {
        if let Some(o) = &spec.optics {
            o.validate()?;
        }
        if let Some(w) = &spec.ground_waves {
            w.validate("ground_waves")?;
        }
        let a = assembly::assemble(spec)?;
        let model = Model::from_assembled(spec.clone(), a)?;
        if let Some(o) = &spec.optics {
            let c = model.carrier(&o.body, "optics.body")?;
            if !c.rotates {
                return Err(Error::invalid(
                    "optics.body",
                    format!("'{}' is a node; optics need a rigid body", o.body),
                ));
            }
        }
        if let Some(w) = &spec.wind {
            for (k, p) in w.parts()?.iter().enumerate() {
                let field =
                    if w.parts.is_empty() { "wind.body".to_string() } else { format!("wind.part[{k}].body") };
                model.carrier(&p.body, &field)?;
            }
        }
        model.check_supported()?;
        Ok(model)
    }

    fn from_assembled(spec: ModelSpec, a: Assembled) -> Result<Model> {
        let n = a.n;
        let ng = GROUND_DOFS + 3 * a.stations.len();
        let nf = n + ng;
        let block = |full: &[f64]| -> (Vec<f64>, Vec<f64>) {
            let ff = (0..n * n).map(|k| full[(k % n) + (k / n) * nf]).collect();
            let fg = (0..n * ng).map(|k| full[(k % n) + (n + k / n) * nf]).collect();
            (ff, fg)
        };
        let (m_ff, m_fg) = block(&a.mass);
        let (c_ff, c_fg) = block(&a.damping);
        let k_ff = (0..n * n).map(|k| a.k_const[(k % n) + (k / n) * nf]).collect();
        let k_fg = (0..n * ng).map(|k| a.k_const[(k % n) + (n + k / n) * nf]).collect();
        let split = |t: assembly::RankOneTerm| {
            let mut bg = vec![0.0; ng];
            let mut bf = Vec::new();
            for (i, v) in t.b {
                if i < n { bf.push((i, v)) } else { bg[i - n] = v }
            }
            Term { name: t.name, model: t.model, bf, bg }
        };
        let terms = a.terms.into_iter().map(split).collect();
        let springs = a.springs.into_iter().map(split).collect();
        Ok(Model {
            spec,
            n,
            labels: a.labels,
            m_ff,
            c_ff,
            k_ff,
            m_fg,
            c_fg,
            k_fg,
            terms,
            springs,
            carriers: a.carriers,
            stations: a.stations,
            modes_cache: std::sync::OnceLock::new(),
        })
    }

    /// The ground's stations: the horizontal positions (m) where connectors touch the ground,
    /// when there are two or more. Station k (from 1) has the inputs `ground_x@k`, `ground_y@k`,
    /// `ground_z@k`: its own translation on top of the rigid ground's.
    pub fn ground_stations(&self) -> &[[f64; 2]] {
        &self.stations
    }

    /// Number of free DOFs.
    pub fn dof_count(&self) -> usize {
        self.n
    }

    /// Label of each free DOF, in matrix order.
    pub fn dof_labels(&self) -> &[DofLabel] {
        &self.labels
    }

    /// The generic-layer spec this model was built from.
    pub fn spec(&self) -> &ModelSpec {
        &self.spec
    }

    /// The optics, if the model has them.
    pub fn optics(&self) -> Option<&OpticsSpec> {
        self.spec.optics.as_ref()
    }

    /// `wind` carried by the log profile from its own height to the load's height
    /// ([`WindLoadSpec::load_height_m`], [`crate::wind::WindSpec::carried_to`]).
    pub fn wind_at_load(&self, wind: &crate::wind::WindSpec) -> Result<crate::wind::WindSpec> {
        let load = self.wind().ok_or_else(|| Error::invalid("wind", "the model takes no wind"))?;
        wind.carried_to(load.load_height_m()?.max(1e-3))
    }

    /// The wind load placement, if any.
    pub fn wind(&self) -> Option<&WindLoadSpec> {
        self.spec.wind.as_ref()
    }

    /// Mass matrix M (n × n, kg and kg·m²).
    pub fn mass_matrix(&self) -> Array2<f64> {
        col_major(self.n, self.n, &self.m_ff)
    }

    /// Viscous damping matrix C (n × n).
    pub fn damping_matrix(&self) -> Array2<f64> {
        col_major(self.n, self.n, &self.c_ff)
    }

    /// Complex stiffness K*(f) (n × n) at `f_hz`, without the viscous part (which is in C), so
    /// that Z(ω) = K*(ω) + iωC − ω²M.
    pub fn stiffness_matrix(&self, f_hz: f64) -> Array2<Complex64> {
        let mut k = self.k_ff.clone();
        let n = self.n;
        for t in &self.terms {
            let kv = t.model.elastic_at(f_hz);
            for &(i, bi) in &t.bf {
                for &(j, bj) in &t.bf {
                    k[i + j * n] += kv * bi * bj;
                }
            }
        }
        col_major(n, n, &k)
    }

    /// Names of all inputs this model accepts.
    pub fn input_names(&self) -> Vec<String> {
        let mut v: Vec<String> =
            GROUND_INPUTS.iter().chain(&GROUND_ROTATION_INPUTS).map(|s| s.to_string()).collect();
        for k in 1..=self.stations.len() {
            v.extend(GROUND_INPUTS.iter().map(|g| format!("{g}@{k}")));
        }
        if self.spec.wind.is_some() {
            v.push("wind".into());
        }
        for (name, c) in &self.carriers {
            if name == GROUND {
                continue;
            }
            if name.contains('#') {
                continue;
            }
            for (k, d) in ["x", "y", "z"].iter().enumerate() {
                if c.index[k].is_some() {
                    v.push(format!("force:{name}:{d}"));
                }
            }
            for (k, d) in ["x", "y", "z"].iter().enumerate() {
                if c.index[3 + k].is_some() {
                    v.push(format!("moment:{name}:{d}"));
                }
            }
        }
        v
    }

    /// Names of all outputs this model offers.
    pub fn output_names(&self) -> Vec<String> {
        let mut v: Vec<String> =
            self.labels.iter().filter(|l| !l.owner.contains('#')).map(|l| l.to_string()).collect();
        if let Some(o) = &self.spec.optics {
            v.push("image_x".into());
            v.push("image_y".into());
            if o.hour_angle_deg.is_some() {
                v.push("image_ra".into());
                v.push("image_dec".into());
            }
        }
        v
    }

    fn carrier(&self, name: &str, field: &str) -> Result<&assembly::Carrier> {
        self.carriers.get(name).filter(|_| name != GROUND).ok_or_else(|| Error::UnknownName {
            kind: format!("body or node ({field})"),
            name: name.into(),
            known: self
                .carriers
                .keys()
                .filter(|k| *k != GROUND && !k.contains('#'))
                .cloned()
                .collect::<Vec<_>>()
                .join(", "),
        })
    }

    /// Resolve an input name.
    pub(crate) fn input(&self, name: &str) -> Result<Input> {
        if let Some(k) = GROUND_INPUTS.iter().chain(&GROUND_ROTATION_INPUTS).position(|g| *g == name) {
            return Ok(Input::Ground(k));
        }
        if let Some((axis, station)) = name.split_once('@') {
            let d = GROUND_INPUTS.iter().position(|g| *g == axis);
            let k = station.parse::<usize>().ok().filter(|k| (1..=self.stations.len()).contains(k));
            if let (Some(d), Some(k)) = (d, k) {
                return Ok(Input::Ground(GROUND_DOFS + 3 * (k - 1) + d));
            }
        }
        let unknown = || Error::UnknownName {
            kind: "input".into(),
            name: name.into(),
            known: "ground_x, ground_y, ground_z, ground_rx, ground_ry, ground_rz, ground_x|y|z@STATION, \
                    wind, force:BODY:x|y|z[@X,Y,Z], moment:BODY:x|y|z"
                .into(),
        };
        let n = self.n;
        if name == "wind" {
            let w = self
                .spec
                .wind
                .as_ref()
                .ok_or_else(|| Error::invalid("input 'wind'", "the model has no [wind] section"))?;
            // Per unit reference force ρ Ū u Σ C_d A: Σ_i (C_d A)_i T_iᵀ ê_i / Σ C_d A.
            let parts = w.parts()?;
            let total = w.drag_area_m2()?;
            let mut v = vec![0.0; n];
            for p in &parts {
                let c = self.carrier(&p.body, "wind part body")?;
                let map = c.point_map_free(p.centre_of_pressure_m, n);
                let s = p.drag_coefficient * p.area_m2 / total;
                for (g, vg) in v.iter_mut().enumerate() {
                    *vg += s * (0..3).map(|i| map[i][g] * p.direction[i]).sum::<f64>();
                }
            }
            return Ok(Input::Load(v));
        }
        let (base, at) = match name.split_once('@') {
            Some((b, p)) => (b, Some(parse_point(name, p)?)),
            None => (name, None),
        };
        let parts: Vec<&str> = base.split(':').collect();
        if parts.len() != 3 || !(parts[0] == "force" || parts[0] == "moment") {
            return Err(unknown());
        }
        let c = self.carrier(parts[1], name)?;
        let axis = ["x", "y", "z"].iter().position(|a| *a == parts[2]).ok_or_else(unknown)?;
        if let Some(p) = at {
            if parts[0] == "moment" {
                return Err(Error::invalid(
                    format!("input '{name}'"),
                    "a moment acts on the whole body; a point ('@X,Y,Z') goes with a force only",
                ));
            }
            // F at p = F at the CG plus r × F: the transpose of the point's motion map.
            let map = c.point_map_free(p, n);
            return Ok(Input::Load(map[axis].clone()));
        }
        let k = if parts[0] == "force" { axis } else { 3 + axis };
        let g = c.index[k].ok_or_else(|| {
            Error::invalid(
                format!("input '{name}'"),
                format!("'{}' has no free {} DOF", parts[1], Dof::ALL[k].name()),
            )
        })?;
        let mut v = vec![0.0; n];
        v[g] = 1.0;
        Ok(Input::Load(v))
    }

    /// Resolve an output name to a real row over the free DOFs.
    pub(crate) fn output(&self, name: &str) -> Result<Vec<f64>> {
        let n = self.n;
        if IMAGE_OUTPUTS.contains(&name) {
            let o = self.spec.optics.as_ref().ok_or_else(|| {
                Error::invalid(format!("output '{name}'"), "the model has no [optics] section")
            })?;
            let c = self.carrier(&o.body, "optics.body")?;
            let (los, ex, ey) = o.axes();
            let e = match name {
                "image_x" => ex,
                "image_y" => ey,
                _ => {
                    if o.hour_angle_deg.is_none() {
                        return Err(Error::invalid(
                            format!("output '{name}'"),
                            "needs optics pointed by hour_angle_deg and declination_deg",
                        ));
                    }
                    let (_, ra, dec) = o.reference_axes();
                    if name == "image_ra" { ra } else { dec }
                }
            };
            // e·(θ × â) = θ·(â × e)
            let w =
                [los[1] * e[2] - los[2] * e[1], los[2] * e[0] - los[0] * e[2], los[0] * e[1] - los[1] * e[0]];
            let mut v = vec![0.0; n];
            for k in 0..3 {
                if let Some(g) = c.index[3 + k] {
                    v[g] += w[k];
                }
            }
            return Ok(v);
        }
        let (owner, dof) = name.rsplit_once(':').ok_or_else(|| Error::UnknownName {
            kind: "output".into(),
            name: name.into(),
            known: "BODY:x|y|z|rx|ry|rz, image_x, image_y, image_ra, image_dec".into(),
        })?;
        let c = self.carrier(owner, name)?;
        let d = Dof::parse(dof)?;
        let g = c.index[d.index()].ok_or_else(|| {
            Error::invalid(
                format!("output '{name}'"),
                format!("'{owner}' has no free {} DOF (held or absent)", d.name()),
            )
        })?;
        let mut v = vec![0.0; n];
        v[g] = 1.0;
        Ok(v)
    }

    /// The load vector of an input at `f_hz` (n, complex): for ground inputs −Z_fg(ω)·e_d; for
    /// forces and moments the fixed generalised force.
    pub fn input_vector(&self, name: &str, f_hz: f64) -> Result<Array1<Complex64>> {
        crate::error::require_non_negative("f_hz", f_hz)?;
        let inp = self.input(name)?;
        let mut out = vec![Complex64::default(); self.n];
        self.fill_input(&inp, 2.0 * PI * f_hz, &mut out);
        Ok(Array1::from(out))
    }

    /// The physical quantity of an output by its name: the image outputs and `BODY:rx|ry|rz`
    /// are angles (rad), every other output a displacement (m). The one naming rule used by
    /// response PSDs and transient results.
    pub fn output_quantity(name: &str) -> Quantity {
        let angle = IMAGE_OUTPUTS.contains(&name)
            || name.ends_with(":rx")
            || name.ends_with(":ry")
            || name.ends_with(":rz");
        if angle { Quantity::Angle } else { Quantity::Displacement }
    }

    /// The output row of an output name (n, real).
    pub fn output_vector(&self, name: &str) -> Result<Array1<f64>> {
        Ok(Array1::from(self.output(name)?))
    }

    /// Write the right-hand side of `inp` at ω into `out` (length n).
    pub(crate) fn fill_input(&self, inp: &Input, w: f64, out: &mut [Complex64]) {
        let n = self.n;
        match inp {
            Input::Load(v) => {
                for (o, x) in out.iter_mut().zip(v) {
                    *o = Complex64::new(*x, 0.0);
                }
            }
            Input::Ground(d) => {
                let f = w / (2.0 * PI);
                for i in 0..n {
                    let k = i + d * n;
                    out[i] = -(self.k_fg[k] + Complex64::new(-w * w * self.m_fg[k], w * self.c_fg[k]));
                }
                for t in &self.terms {
                    if t.bg[*d] != 0.0 {
                        let kv = t.model.elastic_at(f);
                        for &(i, bi) in &t.bf {
                            out[i] -= kv * bi * t.bg[*d];
                        }
                    }
                }
            }
        }
    }

    /// Static (f → 0) real stiffness over the free DOFs, column-major.
    pub(crate) fn static_stiffness(&self) -> Vec<f64> {
        self.real_stiffness_at(0.0)
    }

    /// Re K*(f) over the free DOFs, column-major.
    pub(crate) fn real_stiffness_at(&self, f_hz: f64) -> Vec<f64> {
        let n = self.n;
        let mut k: Vec<f64> = self.k_ff.iter().map(|c| c.re).collect();
        for t in &self.terms {
            let kv = t.model.elastic_at(f_hz).re;
            for &(i, bi) in &t.bf {
                for &(j, bj) in &t.bf {
                    k[i + j * n] += kv * bi * bj;
                }
            }
        }
        k
    }

    /// Refuse a structure with a free rigid-body mode, naming the body and DOF that moves most.
    fn check_supported(&self) -> Result<()> {
        let n = self.n;
        let k = self.static_stiffness();
        let (vals, vecs) = crate::linalg::sym_generalized_eigen(&k, &self.m_ff, n).map_err(|e| match e {
            Error::NotPositiveDefinite { .. } => Error::unsupported(format!(
                "the mass matrix is not positive definite ({e}); every free DOF needs mass or inertia"
            )),
            other => other,
        })?;
        let lmax = vals.iter().cloned().fold(0.0f64, f64::max);
        let tol = (2.0 * PI * 1e-3f64).powi(2).max(1e-12 * lmax);
        if let Some(j) = vals.iter().position(|&l| l < tol) {
            let phi = &vecs[j * n..(j + 1) * n];
            let (imax, _) = phi
                .iter()
                .enumerate()
                .map(|(i, p)| (i, p * p * self.m_ff[i + i * n]))
                .fold((0, -1.0), |a, b| if b.1 > a.1 { b } else { a });
            let l = &self.labels[imax];
            return Err(Error::unsupported(format!(
                "'{}' is free to move in {} (a rigid-body mode at {:.2e} Hz): connect it to the ground through springs or beams, or hold that DOF",
                l.owner,
                l.dof.name(),
                vals[j].max(0.0).sqrt() / (2.0 * PI)
            )));
        }
        Ok(())
    }
}

impl assembly::Carrier {
    /// 6 × n dense map of a point's motion over the free DOFs only.
    pub(crate) fn point_map_free(&self, p: [f64; 3], n: usize) -> Vec<Vec<f64>> {
        self.point_map(p, n + GROUND_DOFS)
            .into_iter()
            .map(|mut r| {
                r.truncate(n);
                r
            })
            .collect()
    }
}

/// The point of a `force:NAME:x@X,Y,Z` input (three finite numbers in m).
fn parse_point(name: &str, text: &str) -> Result<[f64; 3]> {
    let bad = || {
        Error::invalid(
            format!("input '{name}'"),
            "the point after '@' must be X,Y,Z in m (three finite numbers)",
        )
    };
    let v: Vec<f64> = text
        .split(',')
        .map(|t| t.trim().parse::<f64>())
        .collect::<std::result::Result<_, _>>()
        .map_err(|_| bad())?;
    if v.len() != 3 || v.iter().any(|x| !x.is_finite()) {
        return Err(bad());
    }
    Ok([v[0], v[1], v[2]])
}

fn col_major<T: Copy>(rows: usize, cols: usize, v: &[T]) -> Array2<T> {
    Array2::from_shape_fn((rows, cols), |(i, j)| v[i + j * rows])
}

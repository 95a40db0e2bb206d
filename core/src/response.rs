//! Response PSDs of a model's outputs from ground-motion, wind and load spectra.
//!
//! Uncorrelated inputs: S_y(f) = Σᵢ |H_yi(f)|² Sᵢ(f). A full cross-spectral input matrix:
//! S_y = H S Hᴴ ([`response_psd_cross`]).
//!
//! Per-mode shares are exact, cross terms included: with the mass-normalised undamped modes Φ
//! (a complete basis, ΦΦᵀM = I), the direct solution x splits as x = r·u_g + Σⱼ φⱼ qⱼ, where r·u_g
//! is the quasi-static motion that follows the ground and qⱼ = φⱼᵀM(x − r·u_g). The output
//! y = c x then splits into yⱼ = (cφⱼ)qⱼ plus the quasi-static part, and the share of mode j is
//! ∫ Σᵢ Re(conj(yⱼᵢ) y_i) Sᵢ df / ∫ S_y df. Shares sum to 1 exactly; a share can be negative
//! where modes interfere destructively.

use crate::error::{Error, Result};
use crate::frf::FrfPlan;
use crate::grid::FreqGrid;
use crate::model::{GROUND_DOFS, GROUND_INPUTS, GROUND_ROTATION_INPUTS, Model};
use crate::spectrum::{Extrapolate, Psd, Quantity};
use crate::surface_waves::GroundWaves;
use crate::wind::WindSpec;
use num_complex::Complex64;

/// The disturbances acting on a model; every part is optional.
#[derive(Debug, Clone, Default)]
pub struct Disturbances {
    /// Ground-motion PSD per axis x, y, z (any motion quantity; converted to displacement).
    pub ground: [Option<Psd>; 3],
    /// Wind at the model's `[wind]` load point (force PSD from the linearised drag).
    pub wind: Option<WindSpec>,
    /// Further uncorrelated loads: an input name (`force:BODY:x`, `moment:BODY:y`, `wind`) and
    /// its force (N²/Hz) or moment ((N·m)²/Hz) PSD.
    pub loads: Vec<(String, Psd)>,
    /// How the ground motion travels, overriding the model's `[ground_waves]`; with either, the
    /// ground PSDs also tilt and twist the ground (inputs `ground_rx`, `ground_ry`, `ground_rz`).
    pub ground_waves: Option<GroundWaves>,
}

impl Disturbances {
    /// The same ground PSD on all three axes scaled per axis (e.g. [1, 1, 1] or [0.5, 0.5, 1]).
    pub fn with_ground_all(mut self, psd: &Psd, scale: [f64; 3]) -> Result<Self> {
        for (k, s) in scale.iter().enumerate() {
            self.ground[k] = if *s > 0.0 { Some(psd.scale(*s)?) } else { None };
        }
        Ok(self)
    }

    /// Resolve into (input name, displacement/force PSD on `grid`) pairs. Spectra are resampled
    /// log–log onto the grid; outside a spectrum's own range its value is taken as zero
    /// ([`Extrapolate::Zero`]), and [`Disturbances::coverage_note`] reports such gaps.
    pub fn on_grid(&self, model: &Model, grid: &FreqGrid) -> Result<Vec<(String, Vec<f64>)>> {
        let mut out = Vec::new();
        let mut disp: [Option<Vec<f64>>; 3] = [None, None, None];
        for (k, g) in self.ground.iter().enumerate() {
            if let Some(p) = g {
                let d = p.to(Quantity::Displacement).map_err(|e| match e {
                    Error::InvalidArgument { reason, .. } => {
                        Error::invalid(format!("ground PSD ({})", GROUND_INPUTS[k]), reason)
                    }
                    other => other,
                })?;
                let v = d.resample(grid, Extrapolate::Zero)?.values().to_vec();
                out.push((GROUND_INPUTS[k].to_string(), v.clone()));
                disp[k] = Some(v);
            }
        }
        if let Some(w) = self.ground_waves.as_ref().or(model.spec().ground_waves.as_ref()) {
            let rot = w.rotation_psds(grid, &disp)?;
            for (name, r) in GROUND_ROTATION_INPUTS.iter().zip(rot) {
                if let Some(r) = r {
                    out.push((name.to_string(), r));
                }
            }
            // Differential motion: with coherency γ̄ between stations, each axis splits into a
            // common part γ̄ S (the rigid ground) and an own part (1 − γ̄) S at every station.
            let stations = model.ground_stations();
            if w.incoherence.is_some_and(|a| a > 0.0) && stations.len() >= 2 {
                let gbar = w.mean_coherency(stations, grid);
                let mut own = Vec::new();
                for (name, v) in out.iter_mut() {
                    if let Some(d) = GROUND_INPUTS.iter().position(|g| g == name) {
                        let s: Vec<f64> = v.iter().zip(&gbar).map(|(s, g)| s * (1.0 - g)).collect();
                        for k in 1..=stations.len() {
                            own.push((format!("{name}@{k}"), s.clone(), d));
                        }
                        v.iter_mut().zip(&gbar).for_each(|(s, g)| *s *= g);
                    }
                }
                own.sort_by_key(|(_, _, d)| *d);
                out.extend(own.into_iter().map(|(n, s, _)| (n, s)));
            }
        }
        if let Some(w) = &self.wind {
            let load = model.wind().ok_or_else(|| {
                Error::invalid("wind", "the model has no [wind] section (load point, area, drag coefficient)")
            })?;
            let w = &model.wind_at_load(w)?;
            let chi = w.admittance_sq(grid, load.total_area_m2()?)?;
            let f = w.drag_force_psd(1.0, load.drag_area_m2()?, grid, chi.as_deref())?;
            out.push(("wind".to_string(), f.values().to_vec()));
        }
        for (name, p) in &self.loads {
            if !matches!(p.quantity(), Quantity::Force | Quantity::Moment) {
                return Err(Error::invalid(
                    format!("load '{name}'"),
                    format!("needs a force or moment PSD, got {}", p.quantity()),
                ));
            }
            out.push((name.clone(), p.resample(grid, Extrapolate::Zero)?.values().to_vec()));
        }
        if out.is_empty() {
            return Err(Error::invalid("disturbances", "give at least one of ground, wind or loads"));
        }
        Ok(out)
    }

    /// A note when a given spectrum does not cover the analysis grid (those parts count as 0),
    /// and the share of the wind's σ_u² below the grid's first frequency when above 0.1 %.
    pub fn coverage_note(&self, grid: &FreqGrid) -> Option<String> {
        let (lo, hi) = (grid.hz()[0], grid.hz()[grid.len() - 1]);
        let mut short = Vec::new();
        let named = self
            .ground
            .iter()
            .enumerate()
            .filter_map(|(k, p)| p.as_ref().map(|p| (GROUND_INPUTS[k].to_string(), p)));
        for (name, p) in named.chain(self.loads.iter().map(|(n, p)| (n.clone(), p))) {
            let (a, b) = p.span_hz();
            if a > lo * (1.0 + 1e-9) || b < hi * (1.0 - 1e-9) {
                short.push(format!("{name} covers {a:.3}–{b:.1} Hz"));
            }
        }
        let share = self.wind.as_ref().and_then(|w| w.variance_share_below(lo).ok());
        if let Some(share) = share.filter(|s| *s > 1e-3) {
            short.push(format!(
                "wind: {:.1} % of σ_u² lies below the grid's first frequency {lo:.3} Hz",
                100.0 * share
            ));
        }
        (!short.is_empty()).then(|| {
            format!(
                "analysis grid {lo:.3}–{hi:.1} Hz; outside their range these spectra count as zero: {}",
                short.join("; ")
            )
        })
    }
}

/// Response spectra of several outputs.
#[derive(Debug, Clone, PartialEq)]
pub struct ResponseSpectra {
    pub freq_hz: Vec<f64>,
    pub outputs: Vec<String>,
    pub inputs: Vec<String>,
    /// PSD per output (unit² of the output per Hz).
    pub psd: Vec<Vec<f64>>,
    /// Contribution of each input to each output's PSD: `[out][in][f]`.
    pub by_input: Vec<Vec<Vec<f64>>>,
    /// Co-spectrum Re S_ab of each output pair (a < b), as `(a, b, values)`.
    pub co_spectra: Vec<(usize, usize, Vec<f64>)>,
    /// Per-mode contribution to each output's PSD `[out][mode][f]` (present when requested);
    /// the last entry is the quasi-static ground-following part.
    pub by_mode: Option<Vec<Vec<Vec<f64>>>>,
    /// Modal frequencies (Hz) for `by_mode`.
    pub mode_frequency_hz: Vec<f64>,
}

impl ResponseSpectra {
    /// One output's PSD as a [`Psd`] of `quantity`.
    pub fn output_psd(&self, output: &str, quantity: Quantity) -> Result<Psd> {
        let k = self.outputs.iter().position(|o| o == output).ok_or_else(|| Error::UnknownName {
            kind: "output".into(),
            name: output.into(),
            known: self.outputs.join(", "),
        })?;
        Psd::new(self.freq_hz.clone(), self.psd[k].clone(), quantity)
    }
}

/// Response PSDs of `outputs` under uncorrelated `disturbances` on `grid`; with `modal_shares`
/// the exact per-mode decomposition is computed too.
pub fn response_psd(
    model: &Model,
    grid: &FreqGrid,
    disturbances: &Disturbances,
    outputs: &[&str],
    modal_shares: bool,
) -> Result<ResponseSpectra> {
    let inputs = disturbances.on_grid(model, grid)?;
    let in_names: Vec<&str> = inputs.iter().map(|(n, _)| n.as_str()).collect();
    let n = model.dof_count();
    let nf = grid.len();
    let no = outputs.len();
    let ni = inputs.len();
    if no == 0 {
        return Err(Error::invalid("outputs", "at least one output is needed"));
    }
    let out_rows: Vec<Vec<f64>> = outputs.iter().map(|o| model.output(o)).collect::<Result<_>>()?;
    // Rows: the outputs, then (optionally) the modal coordinates φⱼᵀM.
    let mut names: Vec<String> = outputs.iter().map(|s| s.to_string()).collect();
    let mut rows: Vec<f64> = out_rows.iter().flatten().copied().collect();
    let mut modal = None;
    if modal_shares {
        let modes = model.modes()?;
        let m = model.mass_matrix();
        for j in 0..n {
            names.push(format!("mode{j}"));
            for b in 0..n {
                rows.push((0..n).map(|a| modes.shapes[[a, j]] * m[[a, b]]).sum());
            }
        }
        // Quasi-static influence r_d (n × 3) and, per mode, φⱼᵀM r_d.
        let r = model.static_influence()?;
        modal = Some((modes, r));
    }
    let plan = FrfPlan::with_rows(model, &in_names, names, rows)?;
    let frf = plan.evaluate(grid)?;
    let mut psd = vec![vec![0.0; nf]; no];
    let mut by_input = vec![vec![vec![0.0; nf]; ni]; no];
    for f in 0..nf {
        for o in 0..no {
            for (i, (_, s)) in inputs.iter().enumerate() {
                let v = frf.data[[f, o, i]].norm_sqr() * s[f];
                by_input[o][i][f] = v;
                psd[o][f] += v;
            }
        }
    }
    let mut co_spectra = Vec::new();
    for a in 0..no {
        for b in a + 1..no {
            let v = (0..nf)
                .map(|f| {
                    inputs
                        .iter()
                        .enumerate()
                        .map(|(i, (_, s))| (frf.data[[f, a, i]] * frf.data[[f, b, i]].conj()).re * s[f])
                        .sum()
                })
                .collect();
            co_spectra.push((a, b, v));
        }
    }
    let (by_mode, mode_frequency_hz) = match modal {
        None => (None, Vec::new()),
        Some((modes, r)) => {
            let ground_axis: Vec<Option<usize>> = in_names
                .iter()
                .map(|nm| GROUND_INPUTS.iter().chain(&GROUND_ROTATION_INPUTS).position(|g| g == nm))
                .collect();
            let m = model.mass_matrix();
            // φⱼᵀ M r_d and c·φⱼ, c·r_d
            let pmr: Vec<[f64; GROUND_DOFS]> = (0..n)
                .map(|j| {
                    std::array::from_fn(|d| {
                        (0..n)
                            .map(|a| {
                                modes.shapes[[a, j]] * (0..n).map(|b| m[[a, b]] * r[b + d * n]).sum::<f64>()
                            })
                            .sum()
                    })
                })
                .collect();
            let mut bm = vec![vec![vec![0.0; nf]; n + 1]; no];
            for o in 0..no {
                let c = &out_rows[o];
                let cphi: Vec<f64> =
                    (0..n).map(|j| (0..n).map(|a| c[a] * modes.shapes[[a, j]]).sum()).collect();
                let cr: [f64; GROUND_DOFS] =
                    std::array::from_fn(|d| (0..n).map(|a| c[a] * r[a + d * n]).sum());
                for f in 0..nf {
                    for (i, (_, s)) in inputs.iter().enumerate() {
                        let y = frf.data[[f, o, i]];
                        for j in 0..n {
                            let mut q = frf.data[[f, no + j, i]];
                            if let Some(d) = ground_axis[i] {
                                q -= pmr[j][d];
                            }
                            bm[o][j][f] += (y.conj() * (q * cphi[j])).re * s[f];
                        }
                        if let Some(d) = ground_axis[i] {
                            bm[o][n][f] += (y.conj() * Complex64::new(cr[d], 0.0)).re * s[f];
                        }
                    }
                }
            }
            (Some(bm), modes.frequency_hz.clone())
        }
    };
    Ok(ResponseSpectra {
        freq_hz: grid.hz().to_vec(),
        outputs: outputs.iter().map(|s| s.to_string()).collect(),
        inputs: in_names.iter().map(|s| s.to_string()).collect(),
        psd,
        by_input,
        co_spectra,
        by_mode,
        mode_frequency_hz,
    })
}

/// Response PSD of `outputs` from correlated inputs with cross-spectral matrix `s_in`
/// (laid out `[f][i][j]`, Hermitian per frequency): S_y = H S Hᴴ.
pub fn response_psd_cross(
    model: &Model,
    grid: &FreqGrid,
    inputs: &[&str],
    s_in: &[Vec<Vec<Complex64>>],
    outputs: &[&str],
) -> Result<Vec<Vec<f64>>> {
    let nf = grid.len();
    let ni = inputs.len();
    if s_in.len() != nf {
        return Err(Error::shape("cross-spectral matrix (frequencies)", nf, s_in.len()));
    }
    for (f, m) in s_in.iter().enumerate() {
        if m.len() != ni || m.iter().any(|r| r.len() != ni) {
            return Err(Error::invalid(
                "cross-spectral matrix",
                format!("must be {ni} × {ni} at every frequency (index {f})"),
            ));
        }
        for i in 0..ni {
            for j in 0..ni {
                if !(m[i][j].re.is_finite() && m[i][j].im.is_finite()) {
                    return Err(Error::invalid(
                        "cross-spectral matrix",
                        format!("entry [{i}][{j}] at index {f} is not finite"),
                    ));
                }
                if (m[i][j] - m[j][i].conj()).norm() > 1e-9 * (m[i][i].norm() + m[j][j].norm() + 1e-300) {
                    return Err(Error::invalid(
                        "cross-spectral matrix",
                        format!("is not Hermitian at [{i}][{j}], index {f}"),
                    ));
                }
            }
            if m[i][i].re < 0.0 {
                return Err(Error::invalid(
                    "cross-spectral matrix",
                    format!("negative auto-spectrum [{i}][{i}] at index {f}"),
                ));
            }
        }
    }
    let frf = model.frf(grid.hz(), inputs, outputs)?;
    Ok((0..outputs.len())
        .map(|o| {
            (0..nf)
                .map(|f| {
                    let mut acc = Complex64::default();
                    for i in 0..ni {
                        for j in 0..ni {
                            acc += frf.data[[f, o, i]] * s_in[f][i][j] * frf.data[[f, o, j]].conj();
                        }
                    }
                    acc.re
                })
                .collect()
        })
        .collect())
}

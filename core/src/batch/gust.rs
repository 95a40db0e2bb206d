//! The design gust of a wind case, used by the sweep's gust columns and the report's gust plot.

use crate::error::Result;
use crate::model::Model;
use crate::wind::WindSpec;

/// The design gust of a wind case: a "1-cosine" gust of amplitude 3 σ_u (peak factor 3,
/// common practice, no source) lasting 2 s, starting at t = 0.5 s; 8 s are simulated at
/// 200 Hz with the quadratic drag law (padding decay tolerance 1e-4). Returns (peak px,
/// settle time from the gust's start, s).
pub const GUST_START_S: f64 = 0.5;

/// The design gust's image response (see [`GUST_START_S`]).
pub fn design_gust_response(model: &Model, wind: &WindSpec) -> Result<crate::transient::ImageTransient> {
    use crate::transient::{Gust, GustWind, TransientOptions};
    let u = wind.effective_speed_m_s()?;
    let gust = Gust::one_minus_cosine_duration(3.0 * wind.sigma_u_m_s()?, 2.0).starting_at(GUST_START_S);
    let gw = GustWind::new(u).with_air_density(wind.air_density_kg_m3);
    let opts = TransientOptions::default().with_decay_tolerance(1e-4);
    model.gust_response(&gust, &gw, 200.0, 8.0, &opts)
}

/// Peak (px) and settle time from the gust's start (s) of the design gust (see
/// [`GUST_START_S`]).
pub fn design_gust(model: &Model, wind: &WindSpec) -> Result<(f64, f64)> {
    let r = design_gust_response(model, wind)?;
    let settle = r.metrics.settle_time_s.map_or(f64::NAN, |t| (t - GUST_START_S).max(0.0));
    Ok((r.metrics.peak_px, settle))
}

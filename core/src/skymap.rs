//! The sky map: image RMS over the sky for one rig, one set of disturbances and one wind
//! direction, on altitude × azimuth for an alt-azimuth rig or hour angle × declination for an
//! equatorial one, with the best and worst cells named.
//!
//! Each cell re-points the model file ([`crate::schema::ModelFile::repoint`]; equatorial cells
//! take the usual pier side, [`crate::sky::PierSide::usual`]), rebuilds the model and runs the
//! image-motion pipeline ([`crate::image`]). Disturbances stay fixed in the site's frame.
//!
//! Cells whose line of sight is lower than `min_altitude_deg` (default 20°; below the horizon
//! included) are not computed: they hold NaN and are never named best or worst. The altitude of
//! an equatorial cell is sin h = sin φ sin δ + cos φ cos δ cos H ([`crate::sky::Equatorial`]).

use crate::error::{Error, Result};
use crate::grid::FreqGrid;
use crate::image::ImageOptions;
use crate::response::Disturbances;
use crate::schema::{ModelFile, Pointing};
use crate::sky::{Equatorial, PierSide};
use serde::Serialize;

/// Lowest altitude mapped by default (deg): targets lower than this are rarely imaged
/// (common practice, no source).
pub const DEFAULT_MIN_ALTITUDE_DEG: f64 = 20.0;

/// How the rig is pointed, and so the two axes of its map.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum SkyFrame {
    /// Rows are altitudes, columns azimuths (deg from north through east).
    AltAz,
    /// Rows are hour angles (deg, positive west), columns declinations (deg).
    Equatorial,
}

impl SkyFrame {
    /// The names of the row and column coordinates (also the CSV column names).
    pub fn axis_names(self) -> [&'static str; 2] {
        match self {
            SkyFrame::AltAz => ["altitude_deg", "azimuth_deg"],
            SkyFrame::Equatorial => ["hour_angle_deg", "declination_deg"],
        }
    }
}

/// The cells to map: row and column coordinates (deg) in the frame's order.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SkyGrid {
    pub frame: SkyFrame,
    pub rows_deg: Vec<f64>,
    pub cols_deg: Vec<f64>,
    /// Cells lower than this altitude (deg) are skipped.
    pub min_altitude_deg: f64,
}

/// `from`, `from + step`, … up to `to` (inclusive within 1e-9 of a step).
pub fn stepped(name: &str, from: f64, to: f64, step: f64) -> Result<Vec<f64>> {
    if !(from.is_finite() && to.is_finite() && step.is_finite()) || step <= 0.0 || to < from {
        return Err(Error::invalid(
            name,
            format!("needs finite from ≤ to and a step > 0, got {from}:{to}:{step}"),
        ));
    }
    let n = ((to - from) / step + 1e-9).floor() as usize + 1;
    if n > 1000 {
        return Err(Error::invalid(name, format!("{n} values; at most 1000")));
    }
    Ok((0..n).map(|k| from + k as f64 * step).collect())
}

impl SkyGrid {
    /// The default grid for a model file. Alt-azimuth: altitude 20…90° by 10° × azimuth
    /// 0…330° by 30°. Equatorial: hour angle −6…+6 h by 1 h × declination by 10° over the
    /// band whose meridian altitude 90° − |φ − δ| is at least 20° (multiples of 10° inside
    /// [φ − 70°, φ + 70°] ∩ [−90°, 90°]).
    pub fn default_for(file: &ModelFile) -> Result<SkyGrid> {
        let min = DEFAULT_MIN_ALTITUDE_DEG;
        Ok(match latitude_of(file)? {
            None => SkyGrid {
                frame: SkyFrame::AltAz,
                rows_deg: stepped("altitude_deg", 20.0, 90.0, 10.0)?,
                cols_deg: stepped("azimuth_deg", 0.0, 330.0, 30.0)?,
                min_altitude_deg: min,
            },
            Some(lat) => {
                let lo = ((lat - 90.0 + min).max(-90.0) / 10.0).ceil() * 10.0;
                let hi = ((lat + 90.0 - min).min(90.0) / 10.0).floor() * 10.0;
                SkyGrid {
                    frame: SkyFrame::Equatorial,
                    rows_deg: stepped("hour_angle_deg", -90.0, 90.0, 15.0)?,
                    cols_deg: stepped("declination_deg", lo, hi, 10.0)?,
                    min_altitude_deg: min,
                }
            }
        })
    }

    /// Check the grid against the frame: at least one row and column, finite values,
    /// altitudes in [−90, 90], declinations in [−90, 90].
    pub fn validate(&self) -> Result<()> {
        let [rn, cn] = self.frame.axis_names();
        for (name, v) in [(rn, &self.rows_deg), (cn, &self.cols_deg)] {
            if v.is_empty() {
                return Err(Error::invalid(format!("sky grid {name}"), "needs at least one value"));
            }
            if let Some(x) = v.iter().find(|x| !x.is_finite()) {
                return Err(Error::invalid(format!("sky grid {name}"), format!("{x} is not finite")));
            }
            let bounded = matches!(name, "altitude_deg" | "declination_deg");
            if let Some(x) = v.iter().find(|x| bounded && !(-90.0..=90.0).contains(*x)) {
                return Err(Error::invalid(format!("sky grid {name}"), format!("{x} is outside [-90, 90]")));
            }
        }
        if !self.min_altitude_deg.is_finite() || !(-90.0..=90.0).contains(&self.min_altitude_deg) {
            return Err(Error::invalid(
                "sky grid min_altitude_deg",
                format!("must lie in [-90, 90], got {}", self.min_altitude_deg),
            ));
        }
        Ok(())
    }
}

/// Map axes chosen by name; `None` keeps the rig's default ([`SkyGrid::default_for`]).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct SkyAxes {
    pub altitude_deg: Option<Vec<f64>>,
    pub azimuth_deg: Option<Vec<f64>>,
    pub hour_angle_deg: Option<Vec<f64>>,
    pub declination_deg: Option<Vec<f64>>,
    pub min_altitude_deg: Option<f64>,
}

impl SkyGrid {
    /// The rig's default grid with the given axes put in; axes of the other frame (altitude
    /// for an equatorial rig, hour angle for an alt-azimuth one) are a named error.
    pub fn for_file(file: &ModelFile, axes: &SkyAxes) -> Result<SkyGrid> {
        let mut g = SkyGrid::default_for(file)?;
        let (rows, cols, other) = match g.frame {
            SkyFrame::AltAz => {
                (&axes.altitude_deg, &axes.azimuth_deg, [&axes.hour_angle_deg, &axes.declination_deg])
            }
            SkyFrame::Equatorial => {
                (&axes.hour_angle_deg, &axes.declination_deg, [&axes.altitude_deg, &axes.azimuth_deg])
            }
        };
        if other.iter().any(|a| a.is_some()) {
            let want = match g.frame {
                SkyFrame::AltAz => "this rig is pointed by altitude and azimuth: give altitudes and azimuths",
                SkyFrame::Equatorial => "this rig is equatorial: give hour angles and declinations",
            };
            return Err(Error::invalid("sky grid", want));
        }
        if let Some(r) = rows {
            g.rows_deg = r.clone();
        }
        if let Some(c) = cols {
            g.cols_deg = c.clone();
        }
        if let Some(m) = axes.min_altitude_deg {
            g.min_altitude_deg = m;
        }
        g.validate()?;
        Ok(g)
    }
}

/// The site latitude of an equatorially pointed file, None for an alt-azimuth one.
fn latitude_of(file: &ModelFile) -> Result<Option<f64>> {
    let spec = file.expanded()?;
    let optics = spec
        .optics
        .as_ref()
        .ok_or_else(|| Error::invalid("optics", "the model file has no [optics] section"))?;
    Ok(optics.equatorial()?.map(|e| e.latitude_deg))
}

/// One cell of a map: where it points and its image RMS.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SkyCell {
    pub row: usize,
    pub col: usize,
    /// Altitude (deg) or hour angle (deg), by the frame.
    pub row_deg: f64,
    /// Azimuth (deg) or declination (deg), by the frame.
    pub col_deg: f64,
    /// Altitude of the line of sight (deg).
    pub altitude_deg: f64,
    pub rms_arcsec: f64,
    pub rms_px: f64,
}

/// Image RMS over the sky (see module docs).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SkyMap {
    pub frame: SkyFrame,
    /// Site latitude (deg) of an equatorial rig.
    pub latitude_deg: Option<f64>,
    pub rows_deg: Vec<f64>,
    pub cols_deg: Vec<f64>,
    pub min_altitude_deg: f64,
    /// Altitude of each cell's line of sight (deg), `[row][col]`.
    pub altitude_deg: Vec<Vec<f64>>,
    /// Radial image RMS (arcsec), `[row][col]`; NaN where skipped.
    pub rms_arcsec: Vec<Vec<f64>>,
    /// Radial image RMS (px), `[row][col]`; NaN where skipped.
    pub rms_px: Vec<Vec<f64>>,
    /// The computed cells with the smallest and the largest RMS (None if every cell is skipped).
    pub best: Option<SkyCell>,
    pub worst: Option<SkyCell>,
}

/// Compass point of an azimuth (deg from north through east), eight points.
fn compass(az_deg: f64) -> &'static str {
    const P: [&str; 8] =
        ["north", "north-east", "east", "south-east", "south", "south-west", "west", "north-west"];
    P[((az_deg.rem_euclid(360.0) + 22.5) / 45.0).floor() as usize % 8]
}

/// A number without trailing zeros (at most two decimals).
fn short(v: f64) -> String {
    let s = format!("{v:.2}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" { "0".into() } else { s.into() }
}

impl SkyCell {
    /// Where the cell points, in words: "hour angle +2 h, declination 60°" or
    /// "altitude 30°, azimuth 90° (east)".
    pub fn place(&self, frame: SkyFrame) -> String {
        match frame {
            SkyFrame::AltAz => format!(
                "altitude {}°, azimuth {}° ({})",
                short(self.row_deg),
                short(self.col_deg),
                compass(self.col_deg)
            ),
            SkyFrame::Equatorial => {
                let h = self.row_deg / 15.0;
                let sign = if h > 0.0 { "+" } else { "" };
                format!("hour angle {sign}{} h, declination {}°", short(h), short(self.col_deg))
            }
        }
    }

    /// The place and the RMS: "hour angle +2 h, declination 60°, 0.31″ = 0.55 px".
    pub fn describe(&self, frame: SkyFrame) -> String {
        format!("{}, {:.3}″ = {:.3} px", self.place(frame), self.rms_arcsec, self.rms_px)
    }
}

impl SkyMap {
    /// The cell at `[row][col]`.
    pub fn cell(&self, row: usize, col: usize) -> Option<SkyCell> {
        Some(SkyCell {
            row,
            col,
            row_deg: *self.rows_deg.get(row)?,
            col_deg: *self.cols_deg.get(col)?,
            altitude_deg: *self.altitude_deg.get(row)?.get(col)?,
            rms_arcsec: *self.rms_arcsec.get(row)?.get(col)?,
            rms_px: *self.rms_px.get(row)?.get(col)?,
        })
    }

    /// The computed cells (NaN ones left out) with the smallest and largest RMS; the first in
    /// row-major order wins a tie.
    pub fn extremes(&self) -> Option<(SkyCell, SkyCell)> {
        let cells = (0..self.rows_deg.len())
            .flat_map(|i| (0..self.cols_deg.len()).map(move |j| (i, j)))
            .filter_map(|(i, j)| self.cell(i, j))
            .filter(|c| c.rms_arcsec.is_finite());
        let mut out: Option<(SkyCell, SkyCell)> = None;
        for c in cells {
            out = Some(match out {
                None => (c, c),
                Some((b, w)) => (
                    if c.rms_arcsec < b.rms_arcsec { c } else { b },
                    if c.rms_arcsec > w.rms_arcsec { c } else { w },
                ),
            });
        }
        out
    }

    /// One sentence naming the best and worst cells, or saying none was computed.
    pub fn summary_text(&self) -> String {
        match (&self.best, &self.worst) {
            (Some(b), Some(w)) => {
                format!("best: {}; worst: {}", b.describe(self.frame), w.describe(self.frame))
            }
            _ => format!(
                "no cell of the sky map is {}° or more above the horizon",
                short(self.min_altitude_deg)
            ),
        }
    }

    /// For an equatorial map, how the tube's side of the pier is chosen (the map may change
    /// abruptly at the meridian, where the side changes); None for an alt-az map.
    pub fn pier_side_text(&self) -> Option<&'static str> {
        matches!(self.frame, SkyFrame::Equatorial).then_some(
            "the tube on the usual side of the pier: west of it for hour angles below 0, east from the meridian on (counterweights down), so the map may jump at hour angle 0",
        )
    }

    /// The map as CSV: a header, then one row per cell (row-major) with the two coordinates,
    /// rms_arcsec and rms_px (NaN where skipped). Numbers are written in the shortest form that
    /// reads back to the same value.
    pub fn csv_text(&self) -> String {
        let [rn, cn] = self.frame.axis_names();
        let mut s = format!("{rn},{cn},rms_arcsec,rms_px\n");
        for (i, r) in self.rows_deg.iter().enumerate() {
            for (j, c) in self.cols_deg.iter().enumerate() {
                s.push_str(&format!("{r},{c},{},{}\n", self.rms_arcsec[i][j], self.rms_px[i][j]));
            }
        }
        s
    }
}

/// Image RMS of `file` over `sky` (see module docs).
pub fn sky_map(
    file: &ModelFile,
    sky: &SkyGrid,
    grid: &FreqGrid,
    disturbances: &Disturbances,
    opts: &ImageOptions,
) -> Result<SkyMap> {
    sky.validate()?;
    let latitude = latitude_of(file)?;
    let lat = match (sky.frame, latitude) {
        (SkyFrame::Equatorial, Some(l)) => Some(l),
        (SkyFrame::AltAz, None) => None,
        (SkyFrame::Equatorial, None) => {
            return Err(Error::invalid(
                "sky grid",
                "hour angle × declination needs an equatorial rig (an equatorial mount or optics.latitude_deg)",
            ));
        }
        (SkyFrame::AltAz, Some(_)) => {
            return Err(Error::invalid(
                "sky grid",
                "this rig is pointed by hour angle and declination: map it on hour angle × declination",
            ));
        }
    };
    let (nr, nc) = (sky.rows_deg.len(), sky.cols_deg.len());
    let altitude = (0..nr)
        .map(|i| {
            (0..nc)
                .map(|j| match lat {
                    None => Ok(sky.rows_deg[i]),
                    Some(l) => Ok(Equatorial::new(l, sky.rows_deg[i], sky.cols_deg[j])?.alt_az().0),
                })
                .collect::<Result<Vec<f64>>>()
        })
        .collect::<Result<Vec<_>>>()?;
    let (rms_arcsec, rms_px) = map_over(file, nr, nc, grid, disturbances, opts, |i, j| {
        if altitude[i][j] < sky.min_altitude_deg {
            return None;
        }
        let (r, c) = (sky.rows_deg[i], sky.cols_deg[j]);
        Some(match sky.frame {
            SkyFrame::AltAz => Pointing { altitude_deg: Some(r), azimuth_deg: Some(c), ..Default::default() },
            SkyFrame::Equatorial => Pointing {
                hour_angle_deg: Some(r),
                declination_deg: Some(c),
                pier_side: Some(PierSide::usual(r)),
                ..Default::default()
            },
        })
    })?;
    let mut map = SkyMap {
        frame: sky.frame,
        latitude_deg: lat,
        rows_deg: sky.rows_deg.clone(),
        cols_deg: sky.cols_deg.clone(),
        min_altitude_deg: sky.min_altitude_deg,
        altitude_deg: altitude,
        rms_arcsec,
        rms_px,
        best: None,
        worst: None,
    };
    if let Some((b, w)) = map.extremes() {
        map.best = Some(b);
        map.worst = Some(w);
    }
    Ok(map)
}

/// Radial RMS (arcsec, px) of `file` re-pointed at each cell of an `nr` × `nc` grid; a cell
/// whose pointing is `None` is skipped and holds NaN.
#[allow(clippy::type_complexity)]
fn map_over(
    file: &ModelFile,
    nr: usize,
    nc: usize,
    grid: &FreqGrid,
    disturbances: &Disturbances,
    opts: &ImageOptions,
    pointing: impl Fn(usize, usize) -> Option<Pointing> + Sync,
) -> Result<(Vec<Vec<f64>>, Vec<Vec<f64>>)> {
    use rayon::prelude::*;
    if file.generic.optics.is_none() {
        return Err(Error::invalid("optics", "the model file has no [optics] section"));
    }
    let opts = ImageOptions { skip_mode_shares: true, ..opts.clone() };
    let cells: Vec<(usize, usize)> = (0..nr).flat_map(|i| (0..nc).map(move |j| (i, j))).collect();
    let vals = cells
        .par_iter()
        .map(|&(i, j)| {
            let Some(p) = pointing(i, j) else { return Ok((f64::NAN, f64::NAN)) };
            let mut f = file.clone();
            f.repoint(&p)?;
            let im = f.to_model()?.image_motion(grid, disturbances, &opts)?;
            Ok((im.rms_arcsec, im.rms_px))
        })
        .collect::<Result<Vec<_>>>()?;
    let rows = |k: usize| -> Vec<Vec<f64>> {
        (0..nr)
            .map(|i| (0..nc).map(|j| if k == 0 { vals[i * nc + j].0 } else { vals[i * nc + j].1 }).collect())
            .collect()
    };
    Ok((rows(0), rows(1)))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn stepped_values_and_bad_steps() {
        assert_eq!(stepped("x", -90.0, 90.0, 15.0).unwrap().len(), 13);
        assert_eq!(
            stepped("x", 0.0, 330.0, 30.0).unwrap(),
            (0..12).map(|k| 30.0 * k as f64).collect::<Vec<_>>()
        );
        for (a, b, s) in [(0.0, 10.0, 0.0), (10.0, 0.0, 1.0), (0.0, f64::NAN, 1.0), (0.0, 1e6, 1.0)] {
            let e = stepped("declination_deg", a, b, s).unwrap_err();
            assert!(matches!(&e, Error::InvalidArgument { name, .. } if name == "declination_deg"), "{e}");
        }
    }

    #[test]
    fn words_for_places() {
        let c = SkyCell {
            row: 0,
            col: 0,
            row_deg: 30.0,
            col_deg: 60.0,
            altitude_deg: 50.0,
            rms_arcsec: 0.3126,
            rms_px: 0.55,
        };
        assert_eq!(c.place(SkyFrame::Equatorial), "hour angle +2 h, declination 60°");
        assert_eq!(c.describe(SkyFrame::Equatorial), "hour angle +2 h, declination 60°, 0.313″ = 0.550 px");
        let c = SkyCell { row_deg: -22.5, col_deg: -5.0, ..c };
        assert_eq!(c.place(SkyFrame::Equatorial), "hour angle -1.5 h, declination -5°");
        let c = SkyCell { row_deg: 40.0, col_deg: 90.0, ..c };
        assert_eq!(c.place(SkyFrame::AltAz), "altitude 40°, azimuth 90° (east)");
        assert_eq!(compass(350.0), "north");
        assert_eq!(compass(200.0), "south");
    }
}

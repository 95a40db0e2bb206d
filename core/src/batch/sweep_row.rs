//! One row of the isolator sweep, defined once: [`SWEEP_ROW`] names each column and its kind, and
//! the CSV text, the CSV reader and the bindings all convert through [`SweepRow::values`] and
//! [`SweepRow::from_values`].

use crate::error::{Error, Result};
use std::path::Path;

/// How a column's value is written: as text, a number (six significant digits in CSV, empty for
/// NaN), a flag (`true`/`false`, empty when not applicable) or an optional message.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ColumnKind {
    Text,
    Number,
    Flag,
    Message,
}

/// A column's value in a row (see [`ColumnKind`]).
#[derive(Debug, Clone, PartialEq)]
pub enum SweepValue {
    Text(String),
    Number(f64),
    Flag(Option<bool>),
    Message(Option<String>),
}

/// The columns of a sweep row, in order, with their kinds.
pub const SWEEP_ROW: [(&str, ColumnKind); 17] = [
    ("key", ColumnKind::Text),
    ("spec", ColumnKind::Text),
    ("spectrum", ColumnKind::Text),
    ("wind", ColumnKind::Text),
    ("status", ColumnKind::Text),
    ("rms_arcsec", ColumnKind::Number),
    ("rms_px", ColumnKind::Number),
    ("p_outside_half_px", ColumnKind::Number),
    ("first_mode_hz", ColumnKind::Number),
    ("first_mode_zeta", ColumnKind::Number),
    ("ratio_to_none", ColumnKind::Number),
    ("worse_than_none", ColumnKind::Flag),
    ("pad_load_n", ColumnKind::Number),
    ("overloaded", ColumnKind::Flag),
    ("gust_peak_px", ColumnKind::Number),
    ("gust_ringdown_s", ColumnKind::Number),
    ("error", ColumnKind::Message),
];

/// The columns of a sweep CSV, in order (the names of [`SWEEP_ROW`]).
pub const SWEEP_COLUMNS: [&str; 17] = {
    let mut names = [""; 17];
    let mut i = 0;
    while i < 17 {
        names[i] = SWEEP_ROW[i].0;
        i += 1;
    }
    names
};

/// One row of a sweep.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepRow {
    pub key: String,
    pub spec: String,
    pub spectrum: String,
    pub wind: String,
    /// None for a good row, else the error message.
    pub error: Option<String>,
    pub rms_arcsec: f64,
    pub rms_px: f64,
    pub p_outside_half_px: f64,
    pub first_mode_hz: f64,
    pub first_mode_zeta: f64,
    pub ratio_to_none: f64,
    pub worse_than_none: bool,
    pub pad_load_n: f64,
    /// None when the isolator has no rated load (or for the baseline).
    pub overloaded: Option<bool>,
    /// Worst peak image excursion (px) over the wind case's gust family ([`super::gust::gust_family`]); NaN
    /// when calm or when the family could not be run.
    pub gust_peak_px: f64,
    /// Longest ring-down over the gust family: from the end of a gust until the image stays
    /// within ½ px (s); infinite if some gust leaves the image ringing past the record; NaN when
    /// calm or when the family could not be run.
    pub gust_ringdown_s: f64,
}

/// Six significant digits, plain for ordinary magnitudes, exponent form otherwise.
pub(crate) fn sig6(x: f64) -> String {
    if !x.is_finite() {
        return String::new();
    }
    if x == 0.0 {
        return "0".into();
    }
    let a = x.abs();
    if (1e-3..1e6).contains(&a) {
        let digits = (5 - a.log10().floor() as i32).max(0) as usize;
        format!("{x:.digits$}")
    } else {
        format!("{x:.5e}")
    }
}

impl SweepValue {
    /// The CSV text of the value.
    pub fn csv(&self) -> String {
        match self {
            SweepValue::Text(s) => s.clone(),
            SweepValue::Number(x) => sig6(*x),
            SweepValue::Flag(b) => b.map(|b| b.to_string()).unwrap_or_default(),
            SweepValue::Message(m) => m.clone().unwrap_or_default(),
        }
    }

    /// Parse CSV text as a value of `kind` (`column` names it in errors).
    pub fn parse_csv(text: &str, kind: ColumnKind, column: &str) -> std::result::Result<SweepValue, String> {
        Ok(match kind {
            ColumnKind::Text => SweepValue::Text(text.into()),
            ColumnKind::Number if text.is_empty() => SweepValue::Number(f64::NAN),
            ColumnKind::Number => SweepValue::Number(
                text.parse::<f64>().map_err(|_| format!("{column} '{text}' is not a number"))?,
            ),
            ColumnKind::Flag => SweepValue::Flag(match text {
                "" => None,
                "true" => Some(true),
                "false" => Some(false),
                v => return Err(format!("{column} '{v}' is not true/false")),
            }),
            ColumnKind::Message => SweepValue::Message((!text.is_empty()).then(|| text.to_string())),
        })
    }
}

impl SweepRow {
    /// The key of a combination: `spec|spectrum|wind` (the unit of resume).
    pub fn key_of(spec: &str, spectrum: &str, wind: &str) -> String {
        format!("{spec}|{spectrum}|{wind}")
    }

    /// An error row for one combination (line breaks in `reason` become spaces).
    pub fn failed(spec: &str, spectrum: &str, wind: &str, reason: String) -> SweepRow {
        SweepRow {
            key: Self::key_of(spec, spectrum, wind),
            spec: spec.into(),
            spectrum: spectrum.into(),
            wind: wind.into(),
            error: Some(reason.replace(['\n', '\r'], " ")),
            rms_arcsec: f64::NAN,
            rms_px: f64::NAN,
            p_outside_half_px: f64::NAN,
            first_mode_hz: f64::NAN,
            first_mode_zeta: f64::NAN,
            ratio_to_none: f64::NAN,
            worse_than_none: false,
            pad_load_n: f64::NAN,
            overloaded: None,
            gust_peak_px: f64::NAN,
            gust_ringdown_s: f64::NAN,
        }
    }

    /// True for an error row.
    pub fn is_error(&self) -> bool {
        self.error.is_some()
    }

    /// The values in [`SWEEP_ROW`] order.
    pub fn values(&self) -> Vec<SweepValue> {
        use SweepValue::{Flag, Message, Number, Text};
        let bad = self.is_error();
        vec![
            Text(self.key.clone()),
            Text(self.spec.clone()),
            Text(self.spectrum.clone()),
            Text(self.wind.clone()),
            Text(if bad { "error" } else { "ok" }.into()),
            Number(self.rms_arcsec),
            Number(self.rms_px),
            Number(self.p_outside_half_px),
            Number(self.first_mode_hz),
            Number(self.first_mode_zeta),
            Number(self.ratio_to_none),
            Flag(if bad { None } else { Some(self.worse_than_none) }),
            Number(self.pad_load_n),
            Flag(self.overloaded),
            Number(self.gust_peak_px),
            Number(self.gust_ringdown_s),
            Message(self.error.clone()),
        ]
    }

    /// A row from values in [`SWEEP_ROW`] order. A `status` of `error` makes an error row (its
    /// message may be empty); `ok` with a message is refused.
    pub fn from_values(v: Vec<SweepValue>) -> std::result::Result<SweepRow, String> {
        if v.len() != SWEEP_ROW.len() {
            return Err(format!("expected {} fields, got {}", SWEEP_ROW.len(), v.len()));
        }
        let mut text = Vec::new();
        let mut num = Vec::new();
        let mut flag = Vec::new();
        let mut message = None;
        for (x, (name, kind)) in v.into_iter().zip(SWEEP_ROW) {
            match (x, kind) {
                (SweepValue::Text(s), ColumnKind::Text) => text.push(s),
                (SweepValue::Number(n), ColumnKind::Number) => num.push(n),
                (SweepValue::Flag(b), ColumnKind::Flag) => flag.push(b),
                (SweepValue::Message(m), ColumnKind::Message) => message = m,
                (x, _) => return Err(format!("{name}: {x:?} is not a {kind:?} value")),
            }
        }
        let error = match text[4].as_str() {
            "ok" if message.is_some() => return Err("status and error disagree".into()),
            "ok" => None,
            "error" => Some(message.unwrap_or_default()),
            v => return Err(format!("status '{v}' is not ok/error")),
        };
        let [key, spec, spectrum, wind, _status] =
            <[String; 5]>::try_from(text).map_err(|_| "text fields")?;
        Ok(SweepRow {
            key,
            spec,
            spectrum,
            wind,
            error,
            rms_arcsec: num[0],
            rms_px: num[1],
            p_outside_half_px: num[2],
            first_mode_hz: num[3],
            first_mode_zeta: num[4],
            ratio_to_none: num[5],
            worse_than_none: flag[0].unwrap_or(false),
            pad_load_n: num[6],
            overloaded: flag[1],
            gust_peak_px: num[7],
            gust_ringdown_s: num[8],
        })
    }

    /// The CSV fields, in [`SWEEP_COLUMNS`] order.
    pub fn fields(&self) -> Vec<String> {
        self.values().iter().map(SweepValue::csv).collect()
    }

    /// Parse a row written by [`fields`](Self::fields) (`line` names it in errors).
    pub fn from_fields(f: &[&str], file: &str, line: usize) -> Result<SweepRow> {
        let perr =
            |reason: String| Error::Parse { file: file.into(), location: format!("line {line}"), reason };
        if f.len() != SWEEP_COLUMNS.len() {
            return Err(perr(format!("expected {} fields, got {}", SWEEP_COLUMNS.len(), f.len())));
        }
        let values = f
            .iter()
            .zip(SWEEP_ROW)
            .map(|(t, (name, kind))| SweepValue::parse_csv(t, kind, name))
            .collect::<std::result::Result<Vec<_>, String>>()
            .map_err(perr)?;
        SweepRow::from_values(values).map_err(perr)
    }
}

/// Read the rows of a sweep CSV (complete lines only; header checked).
pub fn read_sweep_csv(path: &Path) -> Result<Vec<SweepRow>> {
    let file = path.display().to_string();
    crate::io::atomic::read_table(path, &SWEEP_COLUMNS, "not a sweep file")?
        .iter()
        .map(|(line, rec)| SweepRow::from_fields(&rec.iter().collect::<Vec<_>>(), &file, *line))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn row_fields_round_trip() {
        let r = SweepRow::failed("a", "b", "c", "bad\nthing".into());
        let f = r.fields();
        let back = SweepRow::from_fields(&f.iter().map(String::as_str).collect::<Vec<_>>(), "x", 2).unwrap();
        assert_eq!(back.error.as_deref(), Some("bad thing"));
        assert_eq!(sig6(0.0123456789), "0.0123457");
        assert_eq!(sig6(123.456789), "123.457");
        assert_eq!(sig6(1.5e-7), "1.50000e-7");
    }

    #[test]
    fn a_good_row_round_trips_through_values_and_text() {
        let mut r = SweepRow::failed("soft", "night", "calm", String::new());
        r.error = None;
        (r.rms_arcsec, r.rms_px, r.p_outside_half_px, r.first_mode_hz, r.first_mode_zeta) =
            (0.125, 0.5, 0.01, 9.5, 0.04);
        (r.ratio_to_none, r.pad_load_n, r.gust_peak_px, r.gust_ringdown_s) = (1.5, 30.0, 0.7, 1.25);
        r.worse_than_none = true;
        r.overloaded = Some(false);
        assert_eq!(SweepRow::from_values(r.values()).unwrap(), r);
        let f = r.fields();
        assert_eq!(f[4], "ok");
        assert_eq!(f[11], "true");
        assert_eq!(f[13], "false");
        assert_eq!(f[5], "0.125000");
        let mut bad = r.values();
        bad[16] = SweepValue::Message(Some("why".into()));
        assert_eq!(SweepRow::from_values(bad).unwrap_err(), "status and error disagree");
        let e = SweepRow::from_fields(&["x"; 17], "f.csv", 3).unwrap_err();
        assert!(e.to_string().contains("line 3"), "{e}");
    }
}

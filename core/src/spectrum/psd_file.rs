//! PSD files: a small CSV format of our own.
//!
//! ```text
//! # stillsky psd, quantity=acceleration, unit=(m/s^2)^2/Hz
//! freq_hz,value
//! 0.1,1.5e-14
//! 0.2,1.1e-14
//! ```
//!
//! Line 1 is the header (quantity name as [`Quantity::name`], unit as [`Quantity::unit_ascii`]),
//! line 2 the column names, then one `freq_hz,value` row per line. Frequencies must be finite,
//! positive and strictly increasing; values finite and non-negative. A final newline (and
//! `\r\n` line ends) are accepted; blank lines are not. Every error names the file and line.

use std::path::Path;

use super::psd::{Psd, Quantity};
use crate::error::{Error, Result};

/// Largest PSD file read (bytes): [`crate::grid::MAX_GRID_LEN`] rows of about 50 characters each
/// fit well inside it.
pub const MAX_PSD_FILE_BYTES: usize = 256 << 20;

const MAGIC: &str = "# stillsky psd";
const COLUMNS: &str = "freq_hz,value";

impl Psd {
    /// Parse the PSD CSV format (module docs); `file_label` names the source in errors.
    pub fn from_csv_str(text: &str, file_label: &str) -> Result<Psd> {
        let perr = |line: usize, reason: String| Error::Parse {
            file: file_label.to_string(),
            location: format!("line {line}"),
            reason,
        };
        let body = text.strip_suffix('\n').unwrap_or(text);
        let mut lines = body.split('\n').map(|l| l.strip_suffix('\r').unwrap_or(l));
        let header = lines.next().unwrap_or("");
        let quantity = parse_header(header).map_err(|r| perr(1, r))?;
        match lines.next() {
            Some(l) if l.trim() == COLUMNS => {}
            Some(l) => return Err(perr(2, format!("expected column line '{COLUMNS}', got '{l}'"))),
            None => return Err(perr(2, format!("missing column line '{COLUMNS}'"))),
        }
        let mut freq = Vec::new();
        let mut vals = Vec::new();
        for (i, line) in lines.enumerate() {
            let n = i + 3;
            if freq.len() >= crate::grid::MAX_GRID_LEN {
                return Err(Error::TooLarge {
                    what: format!("rows in {file_label}"),
                    value: freq.len() + 1,
                    limit: crate::grid::MAX_GRID_LEN,
                });
            }
            let mut fields = line.split(',');
            let (Some(a), Some(b), None) = (fields.next(), fields.next(), fields.next()) else {
                return Err(perr(n, format!("expected 2 comma-separated fields, got '{line}'")));
            };
            let f: f64 =
                a.trim().parse().map_err(|_| perr(n, format!("freq_hz '{}' is not a number", a.trim())))?;
            let v: f64 =
                b.trim().parse().map_err(|_| perr(n, format!("value '{}' is not a number", b.trim())))?;
            if !f.is_finite() || f <= 0.0 {
                return Err(perr(n, format!("freq_hz {f} must be finite and > 0")));
            }
            if let Some(&prev) = freq.last()
                && f <= prev
            {
                return Err(perr(n, format!("freq_hz {f} is not greater than the previous {prev}")));
            }
            if !v.is_finite() || v < 0.0 {
                return Err(perr(n, format!("value {v} must be finite and >= 0")));
            }
            freq.push(f);
            vals.push(v);
        }
        if freq.is_empty() {
            return Err(perr(3, "no data rows".into()));
        }
        Psd::new(freq, vals, quantity)
    }

    /// Read a PSD CSV file (module docs). I/O failures give [`Error::Io`] naming the path.
    pub fn read_csv(path: impl AsRef<Path>) -> Result<Psd> {
        let path = path.as_ref();
        let label = path.display().to_string();
        let text = crate::io::read_text_capped(path, MAX_PSD_FILE_BYTES)?;
        Psd::from_csv_str(&text, &label)
    }

    /// Write the PSD CSV format. Numbers use the shortest text that reads back to the same f64.
    pub fn to_csv_string(&self) -> String {
        let q = self.quantity();
        let mut s = format!("{MAGIC}, quantity={}, unit={}\n{COLUMNS}\n", q.name(), q.unit_ascii());
        for (f, v) in self.freq_hz().iter().zip(self.values()) {
            s.push_str(&format!("{f:e},{v:e}\n"));
        }
        s
    }
}

fn parse_header(line: &str) -> std::result::Result<Quantity, String> {
    let Some(rest) = line.strip_prefix(MAGIC) else {
        return Err(format!("header must start with '{MAGIC}', got '{line}'"));
    };
    let mut quantity = None;
    let mut unit = None;
    for part in rest.split(',').map(str::trim).filter(|p| !p.is_empty()) {
        let Some((k, v)) = part.split_once('=') else {
            return Err(format!("header field '{part}' is not key=value"));
        };
        match k.trim() {
            "quantity" => {
                quantity = Some(Quantity::from_name(v.trim()).map_err(|e| e.to_string())?);
            }
            "unit" => unit = Some(v.trim().to_string()),
            other => return Err(format!("unknown header key '{other}' (known: quantity, unit)")),
        }
    }
    let q = quantity.ok_or("header has no quantity=...")?;
    match unit {
        Some(u) if u == q.unit_ascii() => Ok(q),
        Some(u) => Err(format!("unit '{u}' does not match quantity {q} (expected '{}')", q.unit_ascii())),
        None => Err("header has no unit=...".into()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn round_trip_is_exact() {
        let p = Psd::new(
            vec![0.1, 0.3, 1.0 / 3.0, 7.0],
            vec![1.5e-14, 0.0, 2.0 / 3.0, 1e300],
            Quantity::Acceleration,
        )
        .unwrap();
        let s = p.to_csv_string();
        assert!(s.starts_with("# stillsky psd, quantity=acceleration, unit=(m/s^2)^2/Hz\nfreq_hz,value\n"));
        let q = Psd::from_csv_str(&s, "mem").unwrap();
        assert_eq!(p, q);
        let crlf = s.replace('\n', "\r\n");
        assert_eq!(Psd::from_csv_str(&crlf, "mem").unwrap(), p);
        for qu in Quantity::ALL {
            let p = Psd::new(vec![1.0], vec![2.0], qu).unwrap();
            assert_eq!(Psd::from_csv_str(&p.to_csv_string(), "x").unwrap(), p);
        }
    }

    #[test]
    fn reader_is_strict_and_names_file_and_line() {
        let h = "# stillsky psd, quantity=velocity, unit=(m/s)^2/Hz\nfreq_hz,value\n";
        let cases = [
            (format!("{h}1,2\n2,abc\n"), "line 4", "abc"),
            (format!("{h}1,2\n1,3\n"), "line 4", "not greater"),
            (format!("{h}0,2\n"), "line 3", "freq_hz 0"),
            (format!("{h}1,-2\n"), "line 3", "-2"),
            (format!("{h}1,NaN\n"), "line 3", "NaN"),
            (format!("{h}1,2,3\n"), "line 3", "2 comma-separated"),
            (format!("{h}1,2\n\n3,4\n"), "line 4", "2 comma-separated"),
            (h.to_string(), "line 3", "no data"),
            ("freq_hz,value\n1,2\n".to_string(), "line 1", "header"),
            ("# stillsky psd, quantity=jerk, unit=x\nfreq_hz,value\n1,2\n".into(), "line 1", "jerk"),
            (
                "# stillsky psd, quantity=velocity, unit=m^2/Hz\nfreq_hz,value\n1,2\n".into(),
                "line 1",
                "m^2/Hz",
            ),
            ("# stillsky psd, quantity=velocity, unit=(m/s)^2/Hz\nf,v\n1,2\n".into(), "line 2", "f,v"),
        ];
        for (text, loc, needle) in cases {
            let e = Psd::from_csv_str(&text, "ground.csv").unwrap_err();
            match &e {
                Error::Parse { file, location, reason } => {
                    assert_eq!(file, "ground.csv");
                    assert_eq!(location, loc, "{e}");
                    assert!(reason.contains(needle), "{e}");
                }
                other => panic!("expected Parse, got {other}"),
            }
        }
    }

    #[test]
    fn missing_file_is_io_error_naming_path() {
        let e = Psd::read_csv("/nonexistent/dir/p.csv").unwrap_err();
        assert!(matches!(e, Error::Io { .. }) && e.to_string().contains("/nonexistent/dir/p.csv"), "{e}");
    }
}

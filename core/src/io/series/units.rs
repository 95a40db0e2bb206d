//! Physical units of recorded motion and their exact conversion to SI.

use crate::error::{Error, Result};

/// Standard acceleration of gravity, exactly 9.80665 m/s² (3rd CGPM 1901; ISO 80000-3).
pub const STANDARD_GRAVITY_M_S2: f64 = 9.80665;

/// What a recorded series measures. Samples are stored in the SI unit named here.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum SeriesQuantity {
    /// Acceleration in m/s².
    Acceleration,
    /// Velocity in m/s.
    Velocity,
    /// Displacement in m.
    Displacement,
    /// Raw digitizer counts (no physical unit was supplied).
    Counts,
    /// An image position (a star's centroid track) in arcsec; tracks in px are converted with
    /// the plate scale ([`super::SeriesOptions::plate_scale_arcsec_per_px`]).
    ImageAngle,
}

impl SeriesQuantity {
    /// The SI unit of the stored samples ("m/s^2", "m/s", "m" or "counts").
    pub fn si_unit(self) -> &'static str {
        match self {
            SeriesQuantity::Acceleration => "m/s^2",
            SeriesQuantity::Velocity => "m/s",
            SeriesQuantity::Displacement => "m",
            SeriesQuantity::Counts => "counts",
            SeriesQuantity::ImageAngle => "arcsec",
        }
    }
}

/// A unit a recording may be written in.
///
/// In a column name the unit is the suffix after the first underscore (`z_m_s2`, `ax_g`,
/// `n_um_s`); [`Unit::parse`] accepts exactly the tokens of [`Unit::TOKENS`].
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Unit {
    /// m/s² (token `m_s2`).
    MetrePerSecondSquared,
    /// Standard gravity g = 9.80665 m/s² (token `g`).
    StandardGravity,
    /// m/s (token `m_s`).
    MetrePerSecond,
    /// mm/s (token `mm_s`).
    MillimetrePerSecond,
    /// µm/s (token `um_s`).
    MicrometrePerSecond,
    /// m (token `m`).
    Metre,
    /// mm (token `mm`).
    Millimetre,
    /// µm (token `um`).
    Micrometre,
    /// Image position in arcsec (token `arcsec`), kept in arcsec.
    Arcsecond,
    /// Image position in pixels (token `px`): readers convert it to arcsec with the plate
    /// scale; [`Unit::to_si`] leaves it in px.
    Pixel,
}

/// How a unit maps to SI: multiply by an exact factor or divide by an exact power of ten.
/// Dividing by 1000 (rather than multiplying by 0.001, which is not representable) keeps the
/// conversion correctly rounded: 1234 mm → 1.234 m is the f64 nearest to 1.234.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Scale {
    Mul(f64),
    Div(f64),
}

impl Unit {
    /// Every unit with its column-name token, in the order errors list them.
    pub const TOKENS: [(&'static str, Unit); 10] = [
        ("m_s2", Unit::MetrePerSecondSquared),
        ("g", Unit::StandardGravity),
        ("m_s", Unit::MetrePerSecond),
        ("mm_s", Unit::MillimetrePerSecond),
        ("um_s", Unit::MicrometrePerSecond),
        ("m", Unit::Metre),
        ("mm", Unit::Millimetre),
        ("um", Unit::Micrometre),
        ("arcsec", Unit::Arcsecond),
        ("px", Unit::Pixel),
    ];

    /// Comma-separated list of the known tokens, for error messages.
    pub fn known_tokens() -> String {
        Self::TOKENS.iter().map(|(t, u)| format!("{t} ({})", u.symbol())).collect::<Vec<_>>().join(", ")
    }

    /// Parse a unit token (case-insensitive; `µm`/`µm_s` accepted for `um`/`um_s`).
    ///
    /// ```
    /// use stillsky::io::series::Unit;
    /// assert_eq!(Unit::parse("mm_s").unwrap(), Unit::MillimetrePerSecond);
    /// assert!(Unit::parse("furlong").is_err());
    /// ```
    pub fn parse(token: &str) -> Result<Unit> {
        let t = token.trim().to_ascii_lowercase().replace('µ', "u");
        Self::TOKENS.iter().find(|(k, _)| *k == t).map(|(_, u)| *u).ok_or_else(|| Error::UnknownName {
            kind: "unit".into(),
            name: token.to_string(),
            known: Self::known_tokens(),
        })
    }

    /// The column-name token of this unit.
    pub fn token(self) -> &'static str {
        Self::TOKENS.iter().find(|(_, u)| *u == self).map(|(t, _)| *t).unwrap_or("?")
    }

    /// Printed symbol (m/s^2, g, mm/s, ...).
    pub fn symbol(self) -> &'static str {
        match self {
            Unit::MetrePerSecondSquared => "m/s^2",
            Unit::StandardGravity => "g",
            Unit::MetrePerSecond => "m/s",
            Unit::MillimetrePerSecond => "mm/s",
            Unit::MicrometrePerSecond => "um/s",
            Unit::Metre => "m",
            Unit::Millimetre => "mm",
            Unit::Micrometre => "um",
            Unit::Arcsecond => "arcsec",
            Unit::Pixel => "px",
        }
    }

    /// The quantity this unit measures.
    pub fn quantity(self) -> SeriesQuantity {
        match self {
            Unit::MetrePerSecondSquared | Unit::StandardGravity => SeriesQuantity::Acceleration,
            Unit::MetrePerSecond | Unit::MillimetrePerSecond | Unit::MicrometrePerSecond => {
                SeriesQuantity::Velocity
            }
            Unit::Metre | Unit::Millimetre | Unit::Micrometre => SeriesQuantity::Displacement,
            Unit::Arcsecond | Unit::Pixel => SeriesQuantity::ImageAngle,
        }
    }

    fn scale(self) -> Scale {
        match self {
            Unit::MetrePerSecondSquared | Unit::MetrePerSecond | Unit::Metre => Scale::Mul(1.0),
            Unit::Arcsecond | Unit::Pixel => Scale::Mul(1.0),
            Unit::StandardGravity => Scale::Mul(STANDARD_GRAVITY_M_S2),
            Unit::MillimetrePerSecond | Unit::Millimetre => Scale::Div(1e3),
            Unit::MicrometrePerSecond | Unit::Micrometre => Scale::Div(1e6),
        }
    }

    /// Convert a value in this unit to SI (m/s², m/s or m); image units stay as they are
    /// (arcsec; px needs a plate scale, which the readers apply).
    ///
    /// ```
    /// use stillsky::io::series::Unit;
    /// assert_eq!(Unit::StandardGravity.to_si(1.0), 9.80665);
    /// assert_eq!(Unit::Micrometre.to_si(5.0), 5e-6);
    /// ```
    pub fn to_si(self, v: f64) -> f64 {
        match self.scale() {
            Scale::Mul(f) => v * f,
            Scale::Div(d) => v / d,
        }
    }

    /// Size of one of this unit in SI (1 g → 9.80665).
    pub fn si_per_unit(self) -> f64 {
        self.to_si(1.0)
    }
}

/// A physical value with its unit, e.g. the full scale of a WAV recording (`2.0 g`).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PhysicalValue {
    /// The number, in `unit`.
    pub value: f64,
    /// Its unit.
    pub unit: Unit,
}

impl PhysicalValue {
    /// A value with its unit.
    pub fn new(value: f64, unit: Unit) -> Self {
        PhysicalValue { value, unit }
    }
    /// The value in SI.
    pub fn si(&self) -> f64 {
        self.unit.to_si(self.value)
    }
}

/// A digitizer sensitivity: `counts_per_unit` counts for one `unit` (e.g. 1500 counts per mm/s).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Sensitivity {
    /// Counts for one `unit` of ground motion; finite and non-zero.
    pub counts_per_unit: f64,
    /// The unit the sensitivity refers to; fixes the quantity of the converted series.
    pub unit: Unit,
}

impl Sensitivity {
    /// A sensitivity of `counts_per_unit` counts per one `unit`.
    pub fn new(counts_per_unit: f64, unit: Unit) -> Self {
        Sensitivity { counts_per_unit, unit }
    }
    /// Convert counts to SI.
    pub fn to_si(&self, counts: f64) -> f64 {
        self.unit.to_si(counts / self.counts_per_unit)
    }
}

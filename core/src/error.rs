//! The one error type of the library.
//!
//! Every variant carries the context a user needs to fix the input: the field, file, line or
//! value that was wrong. The enum is deliberately *not* `#[non_exhaustive]`: the Python and C
//! bindings match it exhaustively, so a new variant fails their build until it is mapped.

/// Errors returned by every fallible function in `stillsky`.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum Error {
    /// A parameter or field has a value that is not allowed (NaN, negative, zero, ...).
    #[error("invalid {name}: {reason}")]
    InvalidArgument { name: String, reason: String },
    /// Two inputs that must agree in length or shape do not.
    #[error("shape mismatch in {what}: expected {expected}, got {got}")]
    ShapeMismatch { what: String, expected: usize, got: usize },
    /// A frequency grid is empty, unsorted, has duplicates, or non-finite / non-positive values.
    #[error("invalid frequency grid {name}: {reason}")]
    InvalidGrid { name: String, reason: String },
    /// A value lies outside the range where a model or table is defined.
    #[error("{what} = {value} is outside the valid range [{min}, {max}]")]
    OutOfRange { what: String, value: f64, min: f64, max: f64 },
    /// A name (body, input, output, preset, window, ...) is not known.
    #[error("unknown {kind} '{name}'; known: {known}")]
    UnknownName { kind: String, name: String, known: String },
    /// The structure cannot be analysed: e.g. a free rigid-body mode, a connector to nothing.
    #[error("unsupported model: {reason}")]
    UnsupportedModel { reason: String },
    /// The dynamic stiffness matrix is singular at a frequency.
    #[error("singular dynamic stiffness at {freq_hz} Hz (a DOF without stiffness or mass?)")]
    Singular { freq_hz: f64 },
    /// A matrix that must be symmetric positive definite is not.
    #[error("{matrix} matrix is not positive definite: {reason}")]
    NotPositiveDefinite { matrix: String, reason: String },
    /// An iterative method did not converge.
    #[error("no convergence in {what}: {reason}")]
    NoConvergence { what: String, reason: String },
    /// A file or text could not be parsed; `location` names the line (and column when known).
    #[error("cannot parse {file} at {location}: {reason}")]
    Parse { file: String, location: String, reason: String },
    /// Reading or writing a file failed.
    #[error("I/O error on {path}: {reason}")]
    Io { path: String, reason: String },
    /// A size exceeds a stated limit (refused up front rather than running out of memory).
    #[error("{what} = {value} exceeds the limit of {limit}")]
    TooLarge { what: String, value: usize, limit: usize },
}

/// Result alias used throughout the crate.
pub type Result<T> = std::result::Result<T, Error>;

impl Error {
    /// Shorthand for [`Error::InvalidArgument`].
    pub fn invalid(name: impl Into<String>, reason: impl Into<String>) -> Self {
        Error::InvalidArgument { name: name.into(), reason: reason.into() }
    }
    /// Shorthand for [`Error::UnsupportedModel`].
    pub fn unsupported(reason: impl Into<String>) -> Self {
        Error::UnsupportedModel { reason: reason.into() }
    }
    /// Shorthand for [`Error::ShapeMismatch`].
    pub fn shape(what: impl Into<String>, expected: usize, got: usize) -> Self {
        Error::ShapeMismatch { what: what.into(), expected, got }
    }
}

/// The name of a checked parameter: a string, or a closure that builds it only when the check
/// fails (hot loops validate thousands of parameters and should not format names that succeed).
pub trait ParamName {
    /// The name, built now.
    fn param_name(self) -> String;
}

impl ParamName for &str {
    fn param_name(self) -> String {
        self.to_string()
    }
}

impl<F: FnOnce() -> String> ParamName for F {
    fn param_name(self) -> String {
        self()
    }
}

/// Check that a parameter is finite and > 0.
pub fn require_positive(name: impl ParamName, v: f64) -> Result<f64> {
    if !v.is_finite() {
        return Err(Error::invalid(name.param_name(), format!("must be finite, got {v}")));
    }
    if v <= 0.0 {
        return Err(Error::invalid(name.param_name(), format!("must be > 0, got {v}")));
    }
    Ok(v)
}

/// Check that a parameter is finite and >= 0.
pub fn require_non_negative(name: impl ParamName, v: f64) -> Result<f64> {
    if !v.is_finite() {
        return Err(Error::invalid(name.param_name(), format!("must be finite, got {v}")));
    }
    if v < 0.0 {
        return Err(Error::invalid(name.param_name(), format!("must be >= 0, got {v}")));
    }
    Ok(v)
}

/// Check that a parameter is finite.
pub fn require_finite(name: impl ParamName, v: f64) -> Result<f64> {
    if !v.is_finite() {
        return Err(Error::invalid(name.param_name(), format!("must be finite, got {v}")));
    }
    Ok(v)
}

/// Check that every value of a slice is finite; the error names the first bad index.
pub fn require_all_finite(name: &str, v: &[f64]) -> Result<()> {
    match first_non_finite(v) {
        Some(i) => Err(non_finite_at(name, v[i], i)),
        None => Ok(()),
    }
}

/// The index of the first value of `v` that is not finite.
pub fn first_non_finite(v: &[f64]) -> Option<usize> {
    // Whole chunks first (a branch-free test the compiler vectorizes), then the first bad one.
    let c = v.chunks(4096).position(|c| c.iter().fold(false, |bad, x| bad | !x.is_finite()))?;
    v.iter().skip(c * 4096).position(|x| !x.is_finite()).map(|i| i + c * 4096)
}

/// The error of [`require_all_finite`] for `value` at `index`.
pub fn non_finite_at(name: &str, value: f64, index: usize) -> Error {
    Error::invalid(name, format!("value {value} at index {index} is not finite"))
}

//! Status codes: numbered by hand, never reused, never renumbered.

use stillsky_core::Error;

/// Status returned (as `int32_t`) by every fallible function. `STILLSKY_STATUS_OK` is 0;
/// every other value is an error and `stillsky_last_error_message` gives its text. Numbers are
/// fixed forever: new codes get new numbers, retired codes are never reused.
#[allow(non_camel_case_types)]
#[repr(i32)]
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum stillsky_status {
    /// Success.
    Ok = 0,
    /// A parameter has a value that is not allowed (NaN, negative, empty, not UTF-8, ...).
    InvalidArgument = 1,
    /// A required pointer argument was NULL.
    NullPointer = 2,
    /// Model text or file could not be parsed (the message names file, line and column).
    Parse = 3,
    /// The structure cannot be analysed (e.g. a body free to move; the message names it).
    UnsupportedModel = 4,
    /// Reading a file failed.
    Io = 5,
    /// The dynamic stiffness matrix is singular at a frequency.
    Singular = 6,
    /// An output buffer is too small; the needed count is reported where the call says so.
    BufferTooSmall = 7,
    /// An input, output, body or other name is not known (the message lists the known ones).
    UnknownName = 8,
    /// A size exceeds a stated limit.
    TooLarge = 9,
    /// An iterative method did not converge.
    NoConvergence = 10,
    /// A bug inside the library was caught at the boundary (a Rust panic); the message has
    /// the panic text. The handle involved should be freed and not used again.
    Internal = 11,
    /// Two inputs that must agree in length or shape do not.
    ShapeMismatch = 12,
    /// A frequency grid is empty, unsorted, has duplicates or non-positive/non-finite values.
    InvalidGrid = 13,
    /// A value is outside the range where it is defined (the message gives the range).
    OutOfRange = 14,
    /// A matrix that must be positive definite is not.
    NotPositiveDefinite = 15,
}

impl stillsky_status {
    /// Every status, in numeric order.
    pub const ALL: [stillsky_status; 16] = [
        Self::Ok,
        Self::InvalidArgument,
        Self::NullPointer,
        Self::Parse,
        Self::UnsupportedModel,
        Self::Io,
        Self::Singular,
        Self::BufferTooSmall,
        Self::UnknownName,
        Self::TooLarge,
        Self::NoConvergence,
        Self::Internal,
        Self::ShapeMismatch,
        Self::InvalidGrid,
        Self::OutOfRange,
        Self::NotPositiveDefinite,
    ];

    /// Total conversion from a C integer (no transmute).
    pub fn from_i32(code: i32) -> Option<Self> {
        Self::ALL.iter().copied().find(|s| *s as i32 == code)
    }

    /// The NUL-terminated name of the status.
    pub(crate) fn text(self) -> &'static [u8] {
        match self {
            Self::Ok => b"STILLSKY_STATUS_OK\0",
            Self::InvalidArgument => b"STILLSKY_STATUS_INVALID_ARGUMENT\0",
            Self::NullPointer => b"STILLSKY_STATUS_NULL_POINTER\0",
            Self::Parse => b"STILLSKY_STATUS_PARSE\0",
            Self::UnsupportedModel => b"STILLSKY_STATUS_UNSUPPORTED_MODEL\0",
            Self::Io => b"STILLSKY_STATUS_IO\0",
            Self::Singular => b"STILLSKY_STATUS_SINGULAR\0",
            Self::BufferTooSmall => b"STILLSKY_STATUS_BUFFER_TOO_SMALL\0",
            Self::UnknownName => b"STILLSKY_STATUS_UNKNOWN_NAME\0",
            Self::TooLarge => b"STILLSKY_STATUS_TOO_LARGE\0",
            Self::NoConvergence => b"STILLSKY_STATUS_NO_CONVERGENCE\0",
            Self::Internal => b"STILLSKY_STATUS_INTERNAL\0",
            Self::ShapeMismatch => b"STILLSKY_STATUS_SHAPE_MISMATCH\0",
            Self::InvalidGrid => b"STILLSKY_STATUS_INVALID_GRID\0",
            Self::OutOfRange => b"STILLSKY_STATUS_OUT_OF_RANGE\0",
            Self::NotPositiveDefinite => b"STILLSKY_STATUS_NOT_POSITIVE_DEFINITE\0",
        }
    }
}

/// The status for a core error: an exhaustive match, so a new core variant breaks this build
/// until it is mapped.
pub fn status_of(e: &Error) -> stillsky_status {
    match e {
        Error::InvalidArgument { .. } => stillsky_status::InvalidArgument,
        Error::ShapeMismatch { .. } => stillsky_status::ShapeMismatch,
        Error::InvalidGrid { .. } => stillsky_status::InvalidGrid,
        Error::OutOfRange { .. } => stillsky_status::OutOfRange,
        Error::UnknownName { .. } => stillsky_status::UnknownName,
        Error::UnsupportedModel { .. } => stillsky_status::UnsupportedModel,
        Error::Singular { .. } => stillsky_status::Singular,
        Error::NotPositiveDefinite { .. } => stillsky_status::NotPositiveDefinite,
        Error::NoConvergence { .. } => stillsky_status::NoConvergence,
        Error::Parse { .. } => stillsky_status::Parse,
        Error::Io { .. } => stillsky_status::Io,
        Error::TooLarge { .. } => stillsky_status::TooLarge,
    }
}

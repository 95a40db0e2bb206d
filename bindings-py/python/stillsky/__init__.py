"""stillsky: will the star stay inside one pixel?

Python interface to the stillsky core (Rust). SI units throughout, frequencies in Hz, harmonic
convention e^{+iωt}, one-sided PSDs per Hz. See docs/python.md for shapes, dtypes, copies,
threading and exceptions.
"""

from ._native import (
    ConvergenceError,
    InvalidInputError,
    Model,
    Modes,
    NotPositiveDefiniteError,
    SingularSystemError,
    StillskyError,
    StillskyIOError,
    UnsupportedModelError,
    __version__,
)

__all__ = [
    "Model",
    "Modes",
    "StillskyError",
    "InvalidInputError",
    "UnsupportedModelError",
    "SingularSystemError",
    "NotPositiveDefiniteError",
    "ConvergenceError",
    "StillskyIOError",
    "__version__",
]

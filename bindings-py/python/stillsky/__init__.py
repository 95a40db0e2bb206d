"""stillsky: will the star stay inside one pixel?

Python interface to the stillsky core (Rust). SI units throughout, frequencies in Hz, harmonic
convention e^{+iωt}, one-sided PSDs per Hz. See docs/python.md for shapes, dtypes, copies,
threading and exceptions.
"""

from ._native import (
    ConvergenceError,
    ImageMotion,
    InvalidInputError,
    Model,
    Modes,
    NotPositiveDefiniteError,
    Psd,
    Series,
    SingularSystemError,
    StillskyError,
    StillskyIOError,
    UnsupportedModelError,
    Wind,
    __version__,
    coherence,
    criterion_curve,
    csd,
    identify_ringdown,
    read_series,
    reference_ground,
    welch,
    wind_spectrum,
)

__all__ = [
    "Model",
    "Modes",
    "Psd",
    "Wind",
    "ImageMotion",
    "welch",
    "csd",
    "coherence",
    "reference_ground",
    "criterion_curve",
    "wind_spectrum",
    "read_series",
    "Series",
    "identify_ringdown",
    "StillskyError",
    "InvalidInputError",
    "UnsupportedModelError",
    "SingularSystemError",
    "NotPositiveDefiniteError",
    "ConvergenceError",
    "StillskyIOError",
    "__version__",
]

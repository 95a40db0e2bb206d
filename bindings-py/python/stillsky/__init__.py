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
    Psd,
    SingularSystemError,
    StillskyError,
    StillskyIOError,
    UnsupportedModelError,
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
    "welch",
    "csd",
    "coherence",
    "reference_ground",
    "criterion_curve",
    "wind_spectrum",
    "read_series",
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

# The isolator sweep (stillsky.distributed, on Dask, is imported on its own: it needs dask).
from ._sweep import SweepTable, sweep  # noqa: E402

__all__ += ["sweep", "SweepTable"]

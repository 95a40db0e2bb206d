"""stillsky: will the star stay inside one pixel?

Python interface to the stillsky core (Rust). SI units throughout, frequencies in Hz, harmonic
convention e^{+iωt}, one-sided PSDs per Hz. See docs/python.md for shapes, dtypes, copies,
threading and exceptions.
"""

from ._native import (
    ConvergenceError,
    Gust,
    ImageTransient,
    ImageMotion,
    InvalidInputError,
    Model,
    Modes,
    NotPositiveDefiniteError,
    Psd,
    RingdownComparison,
    RingdownId,
    Series,
    SingularSystemError,
    StaticChecks,
    StillskyError,
    StillskyIOError,
    Transient,
    UnsupportedModelError,
    Wind,
    __version__,
    coherence,
    compare_ringdowns,
    criterion_curve,
    csd,
    identify_ringdown,
    random_realisation,
    read_series,
    reference_ground,
    spring_sweep,
    static_checks,
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
    "RingdownId",
    "compare_ringdowns",
    "RingdownComparison",
    "Transient",
    "ImageTransient",
    "Gust",
    "random_realisation",
    "static_checks",
    "spring_sweep",
    "StaticChecks",
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

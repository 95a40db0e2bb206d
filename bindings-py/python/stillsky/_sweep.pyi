import os
from collections.abc import Iterable, Sequence
from typing import Any

COLUMNS: tuple[str, ...]

class SweepTable(list[dict[str, Any]]):
    """A sweep's rows (dicts with the keys of COLUMNS) in sweep order: spectra, then wind
    cases, then isolators with the baseline ``none`` first."""

    columns: tuple[str, ...]
    def errors(self) -> list[dict[str, Any]]: ...
    def to_pandas(self) -> Any:
        """A pandas DataFrame of the rows (ImportError without pandas)."""
    def to_csv(self, path: str | os.PathLike[str] | None = None) -> str:
        """The command-line sweep's CSV text, byte for byte; written to path when given."""

def sweep(
    model: str | os.PathLike[str],
    specs: str | os.PathLike[str] | Sequence[dict[str, Any]],
    spectra: str | os.PathLike[str] | Iterable[str | os.PathLike[str]],
    wind: str | Iterable[str] | None = None,
    *,
    f_min_hz: float | None = None,
    f_max_hz: float | None = None,
    n_freq: int | None = None,
    pad_prefix: str | None = None,
    ground_scale: Sequence[float] | None = None,
    fs_hz: float | None = None,
    threads: int | None = None,
    temperature_c: float | None = None,
) -> SweepTable:
    """Sweep isolator specs over ground spectra and wind cases; the command-line sweep's rows.

    Args:
        model: model file path or TOML text.
        specs: catalogue path, catalogue TOML text, or a list of isolator dicts (the
            catalogue's fields: name, model, compression_n_per_m, ...).
        spectra: recording / PSD file paths, URLs (fetched with fsspec), ``nlnm``/``nhnm``.
        wind: ``calm`` or ``SPEED[:HEIGHT[:SPECTRUM[:INTENSITY]]]`` cases (default calm).
        threads: threads of the core's pool (default all cores); rows do not depend on it.
        temperature_c: the night's temperature (°C) for pads with a temperature table
            (default 20: the catalogue as written).

    Computed in Rust with the GIL released. Bad input raises InvalidInputError; a recording
    that cannot be read gives error rows (one per spec and wind case) naming file and line.
    """

# Helpers shared with stillsky.distributed (text-only sweep inputs and one task's rows).
def model_text(model: Any) -> tuple[str, str]: ...
def catalogue_text(specs: Any) -> tuple[str, str]: ...
def spectra_list(spectra: Any) -> list[str]: ...
def wind_list(wind: Any) -> list[str]: ...
def run_part(
    model: str,
    model_name: str,
    cat: str,
    cat_name: str,
    spectra: Sequence[str],
    labels: Sequence[str],
    wind: Sequence[str],
    options: dict[str, Any],
) -> list[dict[str, Any]]: ...

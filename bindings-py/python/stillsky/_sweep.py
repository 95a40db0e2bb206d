"""The isolator sweep from Python: ``stillsky.sweep`` and its table.

The rows are computed by the core (``stillsky::batch::sweep_rows``) with the interpreter
released; they are the command-line sweep's rows at full precision (``SweepTable.to_csv``
writes the command line's file byte for byte). Inputs travel as text, so the same code runs
one part of a sweep on a Dask worker (``stillsky.distributed``).
"""

from __future__ import annotations

import json
import os
import shutil
import tempfile
from pathlib import Path

from . import _native

COLUMNS = tuple(_native.sweep_columns())


class SweepTable(list):
    """A sweep's rows (a list of dicts with the keys of ``COLUMNS``), in sweep order."""

    columns = COLUMNS

    def errors(self) -> list[dict]:
        """The error rows."""
        return [r for r in self if r["status"] == "error"]

    def to_pandas(self):
        """The rows as a pandas DataFrame (needs pandas)."""
        try:
            import pandas as pd
        except ImportError as e:  # pandas stays optional
            raise ImportError("SweepTable.to_pandas needs pandas: pip install pandas") from e
        return pd.DataFrame(list(self), columns=list(COLUMNS))

    def to_csv(self, path: str | os.PathLike | None = None) -> str:
        """The CSV text of the command-line sweep (six significant digits); written to
        ``path`` when given."""
        text = _native.sweep_csv(self)
        if path is not None:
            Path(path).write_text(text, encoding="utf-8")
        return text


def _looks_like_path(x, marker: str) -> bool:
    if isinstance(x, os.PathLike):
        return True
    return isinstance(x, str) and "\n" not in x and marker not in x


def model_text(model) -> tuple[str, str]:
    """(TOML text, name for messages) of a Model, a model path or TOML text."""
    if isinstance(model, _native.Model):
        # A Model carries its model-file text (the same text pickling sends).
        _, (text, label) = model.__reduce__()
        return text, label
    if _looks_like_path(model, "["):
        return Path(model).read_text(encoding="utf-8"), str(model)
    if isinstance(model, str):
        return model, "<model>"
    raise TypeError(f"model: expected a Model, a path or TOML text, got {type(model).__name__}")


def catalogue_text(specs) -> tuple[str, str]:
    """(TOML text, name) of a catalogue path, catalogue text or a list of isolator dicts."""
    if isinstance(specs, (list, tuple)):
        if not all(isinstance(s, dict) for s in specs):
            raise TypeError("specs: a list must hold isolator dicts (the catalogue file's fields)")
        return _native.catalogue_toml(json.dumps(list(specs)), "<specs>"), "<specs>"
    if _looks_like_path(specs, "[[isolator]]"):
        return Path(specs).read_text(encoding="utf-8"), str(specs)
    if isinstance(specs, str):
        return specs, "<catalogue>"
    raise TypeError(f"specs: expected a path, catalogue text or a list of dicts, got {type(specs).__name__}")


def spectra_list(spectra) -> list[str]:
    if isinstance(spectra, (str, os.PathLike)):
        spectra = [spectra]
    out = [os.fspath(s) for s in spectra]
    if not all(isinstance(s, str) for s in out):
        raise TypeError("spectra: expected paths, URLs or reference model names (nlnm, nhnm)")
    return out


def wind_list(wind) -> list[str]:
    if wind is None:
        return []
    if isinstance(wind, str):
        return [wind]
    return [str(w) for w in wind]


def _is_url(s: str) -> bool:
    return "://" in s and not s.startswith("file://")


def run_part(model, model_name, cat, cat_name, spectra, labels, wind, options) -> list[dict]:
    """Rows of one part of a sweep (text inputs; spectra as paths, URLs or reference names;
    labels as the whole sweep's). A URL is fetched (fsspec) into a temporary file; one that
    cannot be fetched gives error rows naming it."""
    tmp = None
    local, fetch_failed = [], {}
    try:
        for i, s in enumerate(spectra):
            if not _is_url(s):
                local.append(s)
                continue
            try:
                import fsspec

                if tmp is None:
                    tmp = tempfile.mkdtemp(prefix="stillsky-sweep-")
                d = os.path.join(tmp, str(i))
                os.mkdir(d)
                p = os.path.join(d, os.path.basename(s.split("?", 1)[0]) or "recording")
                with fsspec.open(s, "rb") as src, open(p, "wb") as dst:
                    shutil.copyfileobj(src, dst)
                local.append(p)
            except Exception as e:  # noqa: BLE001 - any failure becomes error rows
                fetch_failed[i] = f"cannot fetch {s}: {type(e).__name__}: {e}"
                local.append(None)
        keep = [i for i in range(len(spectra)) if i not in fetch_failed]
        rows = []
        if keep:
            rows = _native.sweep_rows(
                model, model_name, cat, cat_name,
                [local[i] for i in keep], wind, labels=[labels[i] for i in keep], **options,
            )
        # Messages name what the caller gave, not the temporary copy.
        for i in keep:
            if local[i] != spectra[i]:
                for r in rows:
                    if r["error"]:
                        r["error"] = r["error"].replace(local[i], spectra[i])
    finally:
        if tmp is not None:
            shutil.rmtree(tmp, ignore_errors=True)
    if not fetch_failed:
        return rows
    plan = _native.sweep_plan(model, model_name, cat, cat_name, spectra, wind, **options)
    by_key = {r["key"]: r for r in rows}
    out = []
    for i, label in enumerate(labels):
        for w in plan["winds"]:
            for s in plan["specs"]:
                if i in fetch_failed:
                    out.append(_native.sweep_error_row(s, label, w, fetch_failed[i]))
                else:
                    out.append(by_key[_native.sweep_key(s, label, w)])
    return out


def sweep(
    model,
    specs,
    spectra,
    wind=None,
    *,
    f_min_hz: float | None = None,
    f_max_hz: float | None = None,
    n_freq: int | None = None,
    pad_prefix: str | None = None,
    ground_scale=None,
    fs_hz: float | None = None,
    threads: int | None = None,
    temperature_c: float | None = None,
) -> SweepTable:
    """Sweep isolator specs over ground spectra and wind cases on this machine.

    See ``_native.pyi`` for the arguments; returns a :class:`SweepTable`.
    """
    options = dict(
        f_min_hz=f_min_hz, f_max_hz=f_max_hz, n_freq=n_freq, pad_prefix=pad_prefix,
        ground_scale=None if ground_scale is None else [float(v) for v in ground_scale],
        fs_hz=fs_hz, threads=threads, temperature_c=temperature_c,
    )
    m, mn = model_text(model)
    c, cn = catalogue_text(specs)
    sp, w = spectra_list(spectra), wind_list(wind)
    plan = _native.sweep_plan(m, mn, c, cn, sp, w, **options)
    return SweepTable(run_part(m, mn, c, cn, sp, plan["labels"], w, options))

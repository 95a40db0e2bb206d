"""Design studies from Python: ``stillsky.study`` and its table.

The rows are computed by the core (``stillsky::batch::study_rows_of``) with the interpreter
released; they are the command-line study's rows at full precision (``StudyTable.to_csv`` writes
the command line's file byte for byte). ``stillsky.distributed.study`` runs the same rows on a
Dask cluster.
"""

from __future__ import annotations

import os
from pathlib import Path

from . import _native


class StudyTable(list):
    """A study's rows (a list of dicts with the keys of ``columns``), in study order:
    variants (``base`` first), then grounds, then wind cases."""

    def __init__(self, rows=(), *, plan=None):
        super().__init__(rows)
        self._plan = plan
        self.columns = tuple(plan.columns()) if plan is not None else ()

    def errors(self) -> list[dict]:
        """The error rows."""
        return [r for r in self if r["status"] == "error"]

    def to_pandas(self):
        """The rows as a pandas DataFrame (needs pandas)."""
        try:
            import pandas as pd
        except ImportError as e:  # pandas stays optional
            raise ImportError("StudyTable.to_pandas needs pandas: pip install pandas") from e
        return pd.DataFrame(list(self), columns=list(self.columns))

    def to_csv(self, path: str | os.PathLike | None = None) -> str:
        """The CSV text of the command-line study (six significant digits); written to ``path``
        when given."""
        if self._plan is None:
            raise ValueError("this table has no study to name its columns")
        text = self._plan.csv(list(self))
        if path is not None:
            Path(path).write_text(text, encoding="utf-8")
        return text


def study_source(study) -> tuple[str, str, str]:
    """(study text, name for messages, folder its file names are relative to) of a study file
    path, or of study text (whose file names are relative to the working directory)."""
    if isinstance(study, os.PathLike) or (isinstance(study, str) and "\n" not in study and "=" not in study):
        p = Path(study)
        return p.read_text(encoding="utf-8"), str(p), str(p.resolve().parent)
    if isinstance(study, str):
        return study, "<study>", os.getcwd()
    raise TypeError(f"study: expected a study file path or study text, got {type(study).__name__}")


_PLANS: dict = {}


def cached_plan(text: str, name: str, folder: str):
    """The loaded study for this text, loaded once per process (a Dask worker keeps its plans,
    so the model files, catalogue and study are read and parsed once per worker)."""
    key = (text, name, folder)
    plan = _PLANS.get(key)
    if plan is None:
        if len(_PLANS) >= 16:
            _PLANS.clear()
        plan = _native.StudyPlan(text, name, folder)
        _PLANS[key] = plan
    return plan


def study(study, *, threads: int | None = None) -> StudyTable:
    """Run a study (a study file path or its text) on this machine; returns a :class:`StudyTable`
    with the command line's rows at full precision."""
    text, name, folder = study_source(study)
    plan = cached_plan(text, name, folder)
    return StudyTable(plan.rows(None, threads), plan=plan)

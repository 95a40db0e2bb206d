import os
from typing import Any

from ._native import StudyPlan

class StudyTable(list[dict[str, Any]]):
    """A study's rows (dicts with the keys of ``columns``) in study order: variants (``base``
    first), then grounds, then wind cases."""

    columns: tuple[str, ...]
    def __init__(self, rows: Any = ..., *, plan: StudyPlan | None = ...) -> None: ...
    def errors(self) -> list[dict[str, Any]]: ...
    def to_pandas(self) -> Any:
        """A pandas DataFrame of the rows (ImportError without pandas)."""
    def to_csv(self, path: str | os.PathLike[str] | None = None) -> str:
        """The command-line study's CSV text, byte for byte; written to path when given."""

def study_source(study: str | os.PathLike[str]) -> tuple[str, str, str]: ...
def cached_plan(text: str, name: str, folder: str) -> StudyPlan: ...
def study(study: str | os.PathLike[str], *, threads: int | None = None) -> StudyTable:
    """Run a study (a study file path or its text) on this machine."""

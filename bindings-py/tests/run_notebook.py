"""Execute docs/notebooks/first-look.ipynb headlessly; exit non-zero if any cell errors.

Usage: python bindings-py/tests/run_notebook.py [path.ipynb]
"""

import os
import pathlib
import sys
import time

import nbformat
from nbclient import NotebookClient

ROOT = pathlib.Path(__file__).resolve().parents[2]
DEFAULT = ROOT / "docs" / "notebooks" / "first-look.ipynb"


def run(path: pathlib.Path = DEFAULT, timeout_s: int = 120) -> float:
    nb = nbformat.read(path, as_version=4)
    os.environ.setdefault("MPLBACKEND", "Agg")
    client = NotebookClient(nb, timeout=timeout_s, kernel_name="python3", resources={"metadata": {"path": str(path.parent)}})
    t0 = time.perf_counter()
    client.execute()  # raises CellExecutionError on the first failing cell
    return time.perf_counter() - t0


if __name__ == "__main__":
    p = pathlib.Path(sys.argv[1]) if len(sys.argv) > 1 else DEFAULT
    dt = run(p)
    print(f"{p.name}: all cells ran in {dt:.1f} s")

"""The ```python examples of docs/python.md run without error against the installed module.

Each fenced block runs on its own, in a fresh namespace, from the repository root (the examples
open files such as docs/examples/tripod-lawn.toml by relative path).
"""

import pathlib
import re

import pytest

ROOT = pathlib.Path(__file__).resolve().parents[2]
PAGE = ROOT / "docs" / "python.md"
FENCE = re.compile(r"^```python[ \t]*\n(.*?)^```[ \t]*$", re.S | re.M)


def python_blocks(path):
    text = path.read_text(encoding="utf-8")
    return [(text.count("\n", 0, m.start()) + 1, m.group(1)) for m in FENCE.finditer(text)]


BLOCKS = python_blocks(PAGE)


def test_the_page_has_examples():
    # Guards the extraction: python.md has at least the quick start and the tap-test example.
    assert len(BLOCKS) >= 2, BLOCKS


@pytest.mark.parametrize("line,code", BLOCKS, ids=[f"python.md:{line}" for line, _ in BLOCKS])
def test_example_runs(line, code, monkeypatch):
    monkeypatch.chdir(ROOT)
    monkeypatch.setenv("MPLBACKEND", "Agg")
    exec(compile(code, f"{PAGE}:{line}", "exec"), {"__name__": f"python_md_{line}"})

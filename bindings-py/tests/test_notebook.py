"""The first-look notebook runs headlessly without errors (its code is test code)."""

import json

from run_notebook import DEFAULT, run


def test_notebook_committed_without_outputs():
    nb = json.loads(DEFAULT.read_text())
    for cell in nb["cells"]:
        if cell["cell_type"] == "code":
            assert cell.get("outputs", []) == [] and cell.get("execution_count") is None


def test_notebook_runs():
    run(DEFAULT)

"""Executes every demo notebook headless; any error in a cell fails the test."""

from pathlib import Path

import nbformat
import pytest
from nbclient import NotebookClient

NOTEBOOKS = sorted((Path(__file__).resolve().parents[2] / "notebooks-demo").glob("*.ipynb"))


@pytest.mark.parametrize("path", NOTEBOOKS, ids=[p.name for p in NOTEBOOKS])
def test_notebook_runs(path: Path) -> None:
    nb = nbformat.read(path, as_version=4)
    NotebookClient(nb, timeout=300, kernel_name="python3", resources={"metadata": {"path": str(path.parent)}}).execute()
    latex = [
        o for c in nb.cells if c.cell_type == "code" for o in c.get("outputs", []) if "text/latex" in o.get("data", {})
    ]
    assert latex, "a Realization should display as typeset matrices"

"""Executes every demo notebook headless, as a new user's Jupyter would (the inline
backend), and checks what it shows: no cell fails, each notebook holds the number of
pictures it is written to draw, every cell that draws holds a picture, and a Realization
displays as typeset matrices. A backend that throws figures away (a non-interactive one
set inside the kernel) fails the picture count. The stored notebooks must be the ones
notebooks-demo/make_notebooks.py writes."""

import base64
import re
import sys
from pathlib import Path

import nbformat
import pytest
from nbclient import NotebookClient

HERE = Path(__file__).resolve().parent.parent.parent / "notebooks-demo"
NOTEBOOKS = sorted(HERE.glob("*.ipynb"))

# Pictures each notebook draws (one per figure), counted by hand from the cells.
EXPECTED_FIGURES = {
    "01_canonical_forms.ipynb": 3,  # step responses, pole and zero map, frequency response
    "02_hidden_modes.ipynb": 4,  # staircase, pole map, frequency response, controllability matrix
    "03_fleet_batch.ipynb": 4,  # distribution, what the statistic predicts, step and frequency response
    "04_identified_impulse_response.ipynb": 5,  # two singular-value sets, Hankel, error, frequency, impulse
    "05_jordan_and_multivariable_forms.ipynb": 3,  # impulse response per block, pole-zero map, singular values
    "06_identified_fleet_in_seconds.ipynb": 3,  # zero distribution, pole and zero map, fleet frequency response
    "07_parametric_two_mass_drive.ipynb": 1,  # frequency response over the shaft stiffness
}

DRAWS = re.compile(r"plotting\.\w+_(?:plot|map)\(|plt\.subplots\(|plt\.figure\(")
PNG_MAGIC = b"\x89PNG\r\n\x1a\n"


def images(cell):
    return [o["data"]["image/png"] for o in cell.get("outputs", []) if "image/png" in o.get("data", {})]


def test_every_notebook_has_an_expected_count():
    assert {p.name for p in NOTEBOOKS} == set(EXPECTED_FIGURES)


def test_stored_notebooks_are_the_generated_ones():
    sys.path.insert(0, str(HERE))
    try:
        import make_notebooks
    finally:
        sys.path.remove(str(HERE))
    for name, make in make_notebooks.NOTEBOOKS.items():
        stored = nbformat.read(HERE / name, as_version=4)
        generated = make()
        assert [c.source for c in stored.cells] == [c.source for c in generated.cells], (
            f"{name} is out of date: run python notebooks-demo/make_notebooks.py"
        )
        assert all(not c.get("outputs") for c in stored.cells if c.cell_type == "code"), "stored without outputs"
        # cell ids are stable, so the stored file is byte for byte what the script writes
        assert (HERE / name).read_text() == nbformat.writes(generated) + "\n", f"{name}: regenerate it"


@pytest.mark.parametrize("path", NOTEBOOKS, ids=[p.name for p in NOTEBOOKS])
def test_notebook_runs_and_shows_its_pictures(path: Path) -> None:
    nb = nbformat.read(path, as_version=4)
    client = NotebookClient(
        nb,
        timeout=300,
        kernel_name="python3",
        resources={"metadata": {"path": str(path.parent)}},
    )
    client.execute()
    code = [c for c in nb.cells if c.cell_type == "code"]
    pictures = [img for c in code for img in images(c)]
    for img in pictures:
        assert base64.b64decode(img)[:8] == PNG_MAGIC
    assert len(pictures) == EXPECTED_FIGURES[path.name], (
        f"{path.name}: {len(pictures)} pictures in the executed notebook, expected {EXPECTED_FIGURES[path.name]}"
    )
    for c in code:
        if DRAWS.search(c.source):
            assert images(c), f"{path.name}: a cell that draws shows no picture:\n{c.source[:200]}"
    latex = [o for c in code for o in c.get("outputs", []) if "text/latex" in o.get("data", {})]
    assert latex, "a Realization should display as typeset matrices"

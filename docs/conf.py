"""Sphinx configuration of the statewright documentation (built by scripts/build_docs.sh).

The API reference is generated from the package's docstrings (numpydoc); the demo notebooks
in notebooks-demo/ are copied into notebooks/ and executed by myst-nb during the build, so
the rendered pages show their real outputs; the user-guide pages are MyST text notebooks,
executed the same way.
"""

from __future__ import annotations

import shutil
from pathlib import Path

import statewright

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent

project = "statewright"
author = "the statewright developers"
copyright = "the statewright developers"
release = statewright.__version__
version = release

extensions = [
    "myst_nb",
    "numpydoc",
    "sphinx.ext.autodoc",
    "sphinx.ext.mathjax",
]

exclude_patterns = ["_build", "**.ipynb_checkpoints", "README.md"]
templates_path: list = []
html_theme = "alabaster"
html_title = f"statewright {release}"
html_static_path: list = []
html_theme_options = {
    "description": "state-space realizations with a Rust core",
    "page_width": "1100px",
}

# Notebooks and user-guide pages are executed at build time; a failing cell fails the build.
nb_execution_mode = "force"
nb_execution_timeout = 600
nb_execution_raise_on_error = True
nb_execution_show_tb = True
nb_merge_streams = True
myst_enable_extensions = ["dollarmath", "amsmath"]

# numpydoc: one page per public function, members not listed twice.
numpydoc_show_class_members = False
numpydoc_class_members_toctree = False
numpydoc_xref_param_type = False
autodoc_member_order = "bysource"
autodoc_typehints = "none"
autodoc_default_options = {"members": False}

# --------------------------------------------------------------------------------------
# the demo notebooks, copied into the source tree (notebooks/ is not kept in git)
# --------------------------------------------------------------------------------------
_NOTEBOOK_DIR = HERE / "notebooks"
_NOTEBOOK_DIR.mkdir(exist_ok=True)
for _old in _NOTEBOOK_DIR.glob("*.ipynb"):
    if not (ROOT / "notebooks-demo" / _old.name).exists():
        _old.unlink()
for _nb in sorted((ROOT / "notebooks-demo").glob("*.ipynb")):
    _target = _NOTEBOOK_DIR / _nb.name
    if not _target.exists() or _target.read_bytes() != _nb.read_bytes():
        shutil.copyfile(_nb, _target)

# --------------------------------------------------------------------------------------
# the API reference, one section per area, generated from statewright.__all__ so that a
# public name added to the package appears without an edit here (in "More" until placed)
# --------------------------------------------------------------------------------------
AREAS = [
    ("Objects and errors", ["Realization", "Staircase", "Decomposition", "ModelError"]),
    ("Realizations", ["realize", "realize_transfer_matrix"]),
    (
        "Transfer-function recovery",
        ["faddeev_leverrier", "characteristic_polynomial", "transfer_function"],
    ),
    (
        "Structure",
        [
            "controllability_matrix",
            "observability_matrix",
            "controllability_staircase",
            "observability_staircase",
            "is_controllable",
            "is_observable",
            "kalman_decomposition",
            "minimal_realization",
            "similarity",
        ],
    ),
    (
        "Identified models, Gramians and balancing",
        [
            "realize_markov",
            "gramians",
            "hankel_singular_values",
            "balanced_realization",
        ],
    ),
    ("Batches", ["realize_batch", "transfer_function_batch"]),
    ("Other libraries", ["realize_expression", "from_scipy"]),
]


def _api_page() -> str:
    public = list(statewright.__all__)
    placed = {name for _, names in AREAS for name in names}
    sections = [(title, [n for n in names if n in public]) for title, names in AREAS]
    more = [n for n in public if n not in placed]
    if more:
        sections.append(("More", more))
    lines = [
        "API reference",
        "=============",
        "",
        "Everything is imported from the top-level package (``import statewright as sw``). Every",
        "bad input raises :class:`statewright.ModelError` naming the argument and the fault.",
        "",
        ".. currentmodule:: statewright",
        "",
    ]
    for title, names in sections:
        if not names:
            continue
        lines += [title, "-" * len(title), ""]
        for name in names:
            obj = getattr(statewright, name)
            if isinstance(obj, type):
                members = ":members:" if name != "ModelError" else ""
                lines += [f".. autoclass:: {name}", f"   {members}".rstrip(), ""]
            else:
                lines += [f".. autofunction:: {name}", ""]
    extras = [
        ("Plots (``statewright.plotting``)", "statewright.plotting", "plotting"),
        ("Clusters (``statewright.cluster``)", "statewright.cluster", "cluster"),
    ]
    for title, module, _ in extras:
        lines += [
            title,
            "-" * len(title),
            "",
            f".. automodule:: {module}",
            "   :members:",
            "",
        ]
    return "\n".join(lines).replace("\n   \n", "\n\n")


_api = HERE / "api.rst"
_text = _api_page()
if not _api.exists() or _api.read_text() != _text:
    _api.write_text(_text)

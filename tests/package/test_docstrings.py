"""Runs the Examples sections of the public docstrings as doctests (each checks an identity
or a hand-worked value stated beside it)."""

import doctest
import importlib
import pkgutil

import pytest

import statewright

# every module of the package (the compiled core aside): a new module is covered by default
MODULES = [statewright] + [
    importlib.import_module(m.name)
    for m in pkgutil.walk_packages(statewright.__path__, "statewright.")
    if m.name != "statewright._core" and not m.name.endswith("demo")
]


@pytest.mark.parametrize("module", MODULES, ids=[m.__name__ for m in MODULES])
def test_docstring_examples(module):
    result = doctest.testmod(module, optionflags=doctest.NORMALIZE_WHITESPACE)
    assert result.failed == 0
    if module.__name__ in ("statewright._api.recover", "statewright._api.structure"):
        assert result.attempted >= 5

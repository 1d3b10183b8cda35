"""Runs the Examples sections of the public docstrings as doctests (each checks an identity
or a hand-worked value stated beside it)."""

import doctest

import pytest

import statewright
from statewright import _api, _batch, _identify, _interop, _objects, _structure, _transfer_matrix, cluster

MODULES = [statewright, _api, _objects, _structure, _batch, _interop, _identify, _transfer_matrix, cluster]


@pytest.mark.parametrize("module", MODULES, ids=[m.__name__ for m in MODULES])
def test_docstring_examples(module):
    result = doctest.testmod(module, optionflags=doctest.NORMALIZE_WHITESPACE)
    assert result.failed == 0
    if module is _api:
        assert result.attempted >= 10

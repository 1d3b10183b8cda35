"""Controllability / observability indices from the staircase step sizes, against the exact
ranks of the controllability matrix's column sequence (sympy)."""

import numpy as np
import pytest

import statewright as sw
from structure_helpers import scan_indices


def _random_integer_model(rng, n, m, structure):
    a = rng.integers(-3, 4, size=(n, n))
    b = rng.integers(-2, 3, size=(n, m))
    if structure == "deficient":
        b[:, -1] = b[:, 0] * 2  # a repeated input: one index 0
    if structure == "uncontrollable":
        a[n // 2 :, : n // 2] = 0  # lower block not reached
        b[n // 2 :, :] = 0
    return a.astype(float), b.astype(float)


@pytest.mark.parametrize("seed", range(12))
@pytest.mark.parametrize("structure", ["generic", "deficient", "uncontrollable"])
def test_indices_match_exact_column_selection(seed, structure):
    rng = np.random.default_rng(seed)
    n, m = int(rng.integers(2, 7)), int(rng.integers(1, 4))
    a, b = _random_integer_model(rng, n, m, structure)
    st = sw.controllability_staircase(a, b)
    exact = scan_indices(a.astype(int).tolist(), b.astype(int).tolist())  # (sympy) in input order
    assert st.controllability_indices() == tuple(sorted(exact, reverse=True))
    assert sum(st.controllability_indices()) == st.rank
    # (identity) duality: the observability indices of (A^T, B^T)
    ob = sw.observability_staircase(a.T, np.zeros((n, 1)), b.T)
    assert ob.observability_indices() == st.controllability_indices()


def test_hand_example_and_wrong_kind():
    # (hand) a double integrator on input 1 and a first-order lag on input 2: indices (2, 1)
    a = [[0, 1, 0], [0, 0, 0], [0, 0, -1]]
    b = [[0, 0], [1, 0], [0, 1]]
    st = sw.controllability_staircase(a, b)
    assert st.controllability_indices() == (2, 1)
    with pytest.raises(sw.ModelError, match="observability_indices"):
        st.observability_indices()

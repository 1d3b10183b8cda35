"""Fuzz tests of the Luenberger multivariable forms, float and exact (contract in
tests/fuzz_strategies.py), and a valid-data property: the indices sum to n and the form
keeps the Markov parameters."""

import numpy as np
from hypothesis import given
from hypothesis import strategies as st

import statewright as sw
from fuzz_strategies import (
    CI,
    CI_SLOW,
    FAILED,
    attempt,
    bad_tol,
    check_realization,
    exact_model,
    float_model,
    option,
    watchdog_output,  # noqa: F401  (autouse fixture: the watchdog prints past capture)
)

FORMS = ("controller", "observer")


@CI
@given(data=float_model(), form=option(FORMS), tol=st.one_of(st.none(), bad_tol()))
def test_multivariable_float(data, form, tol):
    (a, b, c, d), (n, m, p) = data
    r = attempt(sw.multivariable_canonical_form, a, b, c, d, form, tol=tol)
    if r is FAILED:
        return
    check_realization(r, exact=False)
    width = r.n_inputs if form == "controller" else r.n_outputs
    assert len(r.info["indices"]) == width and sum(r.info["indices"]) == r.n_states
    assert r.info["residual"] <= 2**-26 and r.info["condition"] <= 2**26


@CI_SLOW
@given(data=exact_model(), form=option(FORMS))
def test_multivariable_exact(data, form):
    (a, b, c, d), _ = data
    r = attempt(sw.multivariable_canonical_form, a, b, c, d, form, exact=True)
    if r is FAILED:
        return
    check_realization(r, exact=True)
    width = r.n_inputs if form == "controller" else r.n_outputs
    assert len(r.info["indices"]) == width and sum(r.info["indices"]) == r.n_states


@st.composite
def controllable_models(draw):
    n = draw(st.integers(1, 6))
    m = draw(st.integers(1, 3))
    entries = st.integers(-3, 3)
    a = np.array(draw(st.lists(entries, min_size=n * n, max_size=n * n)), dtype=float).reshape(n, n)
    b = np.array(draw(st.lists(entries, min_size=n * m, max_size=n * m)), dtype=float).reshape(n, m)
    c = np.array(draw(st.lists(entries, min_size=2 * n, max_size=2 * n)), dtype=float).reshape(2, n)
    return a, b, c, np.zeros((2, m))


@CI
@given(model=controllable_models())
def test_float_and_exact_agree_on_valid_data(model):
    """(identity) where both succeed: the same indices, and the first 2n Markov parameters
    of the float form match the input's (relative to ||C|| ||B|| on A/||A||)."""
    a, b, c, d = model
    exact = attempt(sw.multivariable_canonical_form, *(x.astype(int).tolist() for x in (a, b, c, d)), exact=True)
    r = attempt(sw.multivariable_canonical_form, *(x.copy() for x in (a, b, c, d)))  # inputs are overwritten
    if exact is FAILED or r is FAILED:
        return
    assert r.info["indices"] == exact.info["indices"]
    n = a.shape[0]
    alpha = max(np.linalg.norm(a), 1.0)
    pa, pr = b.copy(), r.b.copy()
    for _ in range(2 * n):
        assert np.linalg.norm(c @ pa - r.c @ pr) <= 1e-9 * np.linalg.norm(c) * np.linalg.norm(b) * max(
            1.0, np.linalg.norm(r.a / alpha, 2) ** (2 * n)
        )
        pa, pr = a @ pa / alpha, r.a @ pr / alpha

"""Fuzz tests of the structure routines (contract in tests/fuzz_strategies.py)."""

import math  # noqa: F401
from fractions import Fraction  # noqa: F401

import numpy as np  # noqa: F401
import pytest  # noqa: F401
from hypothesis import given, reject, settings  # noqa: F401
from hypothesis import strategies as st  # noqa: F401

import statewright as sw  # noqa: F401
from fuzz_strategies import *  # noqa: F403
from fuzz_strategies import watchdog_output  # noqa: F401  (autouse fixture: the watchdog prints past capture)

# structure
# --------------------------------------------------------------------------------------


# The two staircases are duals: (function, decision, which of B and C is the pair's own).
STAIRCASES = {
    "controllability": (sw.controllability_staircase, sw.is_controllable, "b"),
    "observability": (sw.observability_staircase, sw.is_observable, "c"),
}


@pytest.mark.parametrize("kind", sorted(STAIRCASES))
@CI
@given(model=float_model(), tol=bad_tol(), with_other=st.booleans())
def test_staircase(kind, model, tol, with_other):
    # The pair's own matrix is always passed; the other (C for controllability, B for
    # observability) only when with_other is set. The decision must agree with the rank.
    staircase, decision, own = STAIRCASES[kind]
    (a, b, c, _), _ = model
    a2, b2, c2 = copy.deepcopy((a, b, c))  # the inputs are overwritten after each call
    b_in = b if own == "b" or with_other else None
    c_in = c if own == "c" or with_other else None
    s = attempt(staircase, a, b_in, c_in, tol=tol)
    n = np.shape(a)[0] if s is not FAILED else None
    if s is not FAILED:
        check_staircase(
            s, n, np.shape(b)[1] if b_in is not None else None, np.shape(c)[0] if c_in is not None else None
        )
    yes = attempt(decision, a2, b2 if own == "b" else c2, tol=tol)
    if yes is not FAILED:
        assert isinstance(yes, bool)
        if s is not FAILED:
            assert yes == (s.rank == n)


@CI
@given(model=float_model(), tol=bad_tol())
def test_kalman_decomposition(model, tol):
    (a, b, c, d), _ = model
    k = attempt(sw.kalman_decomposition, a, b, c, d, tol=tol)
    if k is FAILED:
        return
    n, m, p = model_dims(a, b, c)
    assert isinstance(k, sw.Decomposition)
    check_realization(k.realization, n=n, m=m, p=p, exact=False)
    check_array(k.transform, (n, n))
    assert len(k.sizes) == 4 and sum(k.sizes) == n and min(k.sizes) >= 0
    assert math.isfinite(k.info["condition"])
    check_realization(k.minimal(), n=k.sizes[0], m=m, p=p)


@CI
@given(model=float_model(), tol=bad_tol())
def test_minimal_realization(model, tol):
    (a, b, c, d), _ = model
    r = attempt(sw.minimal_realization, a, b, c, d, tol=tol)
    if r is not FAILED:
        n, m, p = model_dims(a, b, c)
        check_realization(r, m=m, p=p, exact=False, max_n=n)


@st.composite
def similarity_pair(draw):
    """Mostly two realizations of one transfer function; sometimes anything."""
    kind = draw(st.sampled_from(["forms", "forms", "forms", "tuples", "garbage", "mismatch"]))
    n = draw(st.integers(0, 8))
    rng = np.random.default_rng(draw(st.integers(0, 2**32 - 1)))
    den = np.concatenate([[1.0], rng.standard_normal(n)])
    num = rng.standard_normal(n + 1)
    if kind == "garbage":
        shapes = [(n, n), (n, 1), (1, n), (1, 1)]
        r1 = tuple(draw(fuzz_float_arg(s)) for s in shapes)
        r2 = draw(st.sampled_from([r1, None, "abc", (1, 2, 3), [1, 2, 3, 4], 5]))
        return r1, r2
    f1, f2 = draw(st.sampled_from(COMPANION_FORMS)), draw(st.sampled_from(COMPANION_FORMS))
    try:
        r1, r2 = sw.realize(num, den, f1), sw.realize(num, den, f2)
    except sw.ModelError:
        reject()
    if kind == "tuples":
        layout = draw(st.sampled_from(LAYOUTS))
        r1 = tuple(lay_out(np.array(x), layout) for x in r1)
    if kind == "mismatch":
        r2 = sw.realize(rng.standard_normal(n + 2), np.concatenate([[1.0], rng.standard_normal(n + 1)]), f2)
    return r1, r2


@CI
@given(pair=similarity_pair(), tol=bad_tol())
def test_similarity(pair, tol):
    r1, r2 = pair
    t = attempt(sw.similarity, r1, r2, tol=tol)
    if t is not FAILED:
        n = np.asarray(r1[0]).shape[0] if not isinstance(r1, sw.Realization) else r1.n_states
        check_array(t, (n, n))


# --------------------------------------------------------------------------------------

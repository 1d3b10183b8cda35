"""Fuzz tests of Ho-Kalman, Gramians and balancing (contract in tests/fuzz_strategies.py)."""

import math  # noqa: F401
from fractions import Fraction  # noqa: F401

import numpy as np  # noqa: F401
import pytest  # noqa: F401
from hypothesis import given, reject, settings  # noqa: F401
from hypothesis import strategies as st  # noqa: F401

import statewright as sw  # noqa: F401
from fuzz_strategies import *  # noqa: F403
from fuzz_strategies import watchdog_output  # noqa: F401  (autouse fixture: the watchdog prints past capture)


@st.composite
def markov_data(draw):
    k = draw(st.sampled_from([0, 1, 2, 3, 5, 8, 13, 21]))
    p, m = draw(WIDTHS), draw(WIDTHS)
    shape = draw(st.sampled_from([(k, p, m), (k, p, m), (k,)]))
    return draw(fuzz_float_arg(shape))


def bad_order():
    return st.one_of(
        st.none(), st.none(), st.integers(-2, 12), st.sampled_from([1.5, "2", True, 10**30, np.int64(2), [2], nan])
    )


@CI
@given(markov=markov_data(), order=bad_order(), tol=bad_tol())
def test_realize_markov(markov, order, tol):
    r = attempt(sw.realize_markov, markov, order, tol=tol)
    if r is not FAILED:
        check_realization(r, exact=False)
        sv = r.info["singular_values"]
        assert np.all(np.diff(sv) <= 0), "Hankel singular values not descending"
        if isinstance(order, (int, np.integer)) and not isinstance(order, bool):
            assert r.n_states == order


@st.composite
def stable_or_any_model(draw):
    """Mostly a stable model (continuous or discrete) at some scale; sometimes anything."""
    discrete = draw(st.booleans())
    if draw(st.integers(0, 3)) == 0:
        return draw(float_model()), discrete
    n, m, p = draw(st.integers(0, 8)), draw(st.integers(1, 3)), draw(st.integers(1, 3))
    rng = np.random.default_rng(draw(st.integers(0, 2**32 - 1)))
    q = np.linalg.qr(rng.standard_normal((n, n)))[0] if n else np.zeros((0, 0))
    if discrete:
        poles = rng.uniform(-0.95, 0.95, n)
    else:
        poles = -np.abs(rng.standard_normal(n)) - draw(st.sampled_from([1e-8, 1e-3, 0.1, 1.0]))
    scale = draw(st.sampled_from([1.0, 1.0, 1e-150, 1e150, 1e-300, 1e300]))
    a = q @ np.diag(poles) @ q.T
    b, c = rng.standard_normal((n, m)) * scale, rng.standard_normal((p, n))
    layout = draw(st.sampled_from(LAYOUTS))
    return ((lay_out(a, layout), b, lay_out(c, layout), np.zeros((p, m))), (n, m, p)), discrete


@CI
@given(data=stable_or_any_model(), discrete=flag())
def test_gramians_and_hankel_singular_values(data, discrete):
    ((a, b, c, _), _), stable_discrete = data
    discrete = stable_discrete if isinstance(discrete, bool) else discrete
    out = attempt(sw.gramians, a, b, c, discrete=discrete)
    if out is not FAILED:
        n = np.shape(a)[0]
        wc, wo = out
        check_array(wc, (n, n))
        check_array(wo, (n, n))
    hsv = attempt(sw.hankel_singular_values, a, b, c, discrete=discrete)
    if hsv is not FAILED:
        assert hsv.ndim == 1 and np.all(hsv >= 0) and np.all(np.diff(hsv) <= 0)


@CI
@given(data=stable_or_any_model(), order=bad_order())
def test_balanced_realization(data, order):
    ((a, b, c, d), _), discrete = data
    r = attempt(sw.balanced_realization, a, b, c, d, order=order, discrete=discrete)
    if r is not FAILED:
        n, m, p = model_dims(a, b, c)
        check_realization(r, m=m, p=p, exact=False, max_n=n)
        assert r.info["error_bound"] >= 0


# --------------------------------------------------------------------------------------

"""Fuzz tests of the Jordan form, float and exact (contract in tests/fuzz_strategies.py),
and a valid-data property: repeated rational poles come back exactly."""

from fractions import Fraction

import numpy as np
from hypothesis import given
from hypothesis import strategies as st

import statewright as sw
from fuzz_strategies import (
    CI,
    CI_SLOW,
    FAILED,
    attempt,
    check_realization,
    polynomial_degree,
    transfer_function_data,
    watchdog_output,  # noqa: F401  (autouse fixture: the watchdog prints past capture)
)

TOLS = st.one_of(
    st.none(),
    st.sampled_from([1e-6, 1e-3, 1e-12, 0.5, 0.0, -1.0, float("nan"), float("inf"), 1e300, "1e-6", [1e-6]]),
)


@CI
@given(tf=transfer_function_data(), tol=TOLS)
def test_jordan_float(tf, tol):
    num, den = tf
    r = attempt(sw.realize, num, den, "jordan", tol=tol)
    if r is FAILED:
        return
    check_realization(r, m=1, p=1, exact=False, max_n=max(0, np.size(np.asarray(den, dtype=object)) - 1))
    assert (
        sum(
            r.info["multiplicities"][k] * (1 if r.info["poles"][k].imag == 0 else 2)
            for k in range(len(r.info["poles"]))
        )
        == r.n_states
    )


@CI_SLOW
@given(tf=transfer_function_data(exact=True))
def test_jordan_exact(tf):
    num, den = tf
    n = polynomial_degree(den)  # before the call: the inputs are overwritten after it
    r = attempt(sw.realize, num, den, "jordan", exact=True)
    if r is FAILED:
        return
    check_realization(r, m=1, p=1, exact=True)
    if n is not None:
        assert r.n_states == n


@st.composite
def repeated_rational_poles(draw):
    poles = draw(st.lists(st.fractions(-5, 5, max_denominator=4), min_size=1, max_size=3, unique=True))
    mult = [draw(st.integers(1, 3)) for _ in poles]
    den = [Fraction(1)]
    for p, m in zip(poles, mult):
        for _ in range(m):
            den = [x - p * y for x, y in zip(den + [Fraction(0)], [Fraction(0)] + den)]
    num = draw(st.lists(st.integers(-4, 4), min_size=1, max_size=len(den) - 1))
    return poles, mult, num, den


@CI_SLOW
@given(data=repeated_rational_poles())
def test_exact_repeated_rational_poles_round_trip(data):
    # (identity) the exact Jordan form realizes num/den exactly, one block per pole and
    # multiplicity, poles on the diagonal
    poles, mult, num, den = data
    r = sw.realize(num, den, "jordan", exact=True)
    got_num, got_den = sw.transfer_function(r.a, r.b, r.c, r.d, exact=True)
    lead = next((x for x in num if x != 0), None)
    if lead is None:
        assert all(x == 0 for x in got_num[0, 0])
    else:
        # cross-multiplied: num * got_den == got_num * den
        a = np.polymul(np.array(num, dtype=object), got_den)
        b = np.polymul(got_num[0, 0], np.array(den, dtype=object))
        assert list(np.trim_zeros(a, "f")) == list(np.trim_zeros(b, "f"))
    assert sorted(r.info["multiplicities"]) == sorted(mult)
    assert sorted(set(np.diag(r.a).tolist())) == sorted(poles)

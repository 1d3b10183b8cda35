"""Fuzz tests of the realizations: SISO canonical forms and transfer matrices (contract in tests/fuzz_strategies.py)."""

import math  # noqa: F401
from fractions import Fraction  # noqa: F401

import numpy as np  # noqa: F401
import pytest  # noqa: F401
from hypothesis import given, reject, settings  # noqa: F401
from hypothesis import strategies as st  # noqa: F401

import statewright as sw  # noqa: F401
from fuzz_strategies import *  # noqa: F403
from fuzz_strategies import watchdog_output  # noqa: F401  (autouse fixture: the watchdog prints past capture)

# realizations of a SISO transfer function
# --------------------------------------------------------------------------------------


@CI
@given(tf=transfer_function_data(), form=option(FORMS), exact=flag())
def test_realize_float(tf, form, exact):
    num, den = tf
    if exact is True or (isinstance(exact, np.bool_) and exact):
        exact = False
    r = attempt(sw.realize, num, den, form, exact=exact)
    if r is FAILED:
        return
    check_realization(r, m=1, p=1, exact=False, max_n=max(0, np.size(np.asarray(den, dtype=object)) - 1))


@CI_SLOW
@given(tf=transfer_function_data(exact=True), form=option(COMPANION_FORMS + ("modal",)))
def test_realize_exact(tf, form):
    num, den = tf
    n = polynomial_degree(den)  # before the call: the inputs are overwritten after it
    r = attempt(sw.realize, num, den, form, exact=True)
    if r is FAILED:
        return
    check_realization(r, m=1, p=1, exact=True)
    if n is not None:
        assert r.n_states == n


@CI
@given(data=st.data(), form=st.sampled_from(FORMS))
def test_realize_valid_round_trip(data, form):
    """Valid data: the realization exists (modal aside), and its order is deg den."""
    n = data.draw(ORDERS)
    den = data.draw(float_array((n + 1,), regime="unit", layout="c"))
    den[0] = data.draw(st.sampled_from([1.0, -2.0, 0.5, 1e-3]))
    num = data.draw(float_array((data.draw(st.integers(1, n + 1)),), regime="unit"))
    r = attempt(sw.realize, num, den, form)
    if form != "modal":
        assert r is not FAILED, "a companion form of finite, well-scaled data must exist"
    if r is not FAILED:
        check_realization(r, n=n, m=1, p=1, exact=False)


# --------------------------------------------------------------------------------------
# transfer matrices and identified models
# --------------------------------------------------------------------------------------


@st.composite
def transfer_matrix_data(draw, exact=False):
    p, m = draw(st.integers(1, 3)), draw(st.integers(1, 3))
    k = draw(st.sampled_from([1, 2, 3, 4]))
    num_k = draw(st.sampled_from([0, 1, k - 1, k, k + 1]))
    common = draw(st.booleans())
    den_shape = (k,) if common else (p, m, k)
    arg = fuzz_exact_arg if exact else fuzz_float_arg
    return draw(arg((p, m, max(num_k, 0)))), draw(arg(den_shape)), (p, m)


TRANSFER_MATRIX_FORMS = ("block_controller", "block_observer")


@CI
@given(
    data=transfer_matrix_data(),
    form=option(TRANSFER_MATRIX_FORMS),
    minimal=flag(),
    tol=bad_tol(),
    merge_tol=bad_tol(),
)
def test_realize_transfer_matrix_float(data, form, minimal, tol, merge_tol):
    num, den, _ = data
    r = attempt(sw.realize_transfer_matrix, num, den, form, minimal=minimal, tol=tol, merge_tol=merge_tol)
    if r is not FAILED:
        p, m = np.shape(num)[:2]  # a drawn "wrong" shape may still be a valid transfer matrix
        check_realization(r, m=m, p=p, exact=False)


@CI_SLOW
@given(data=transfer_matrix_data(exact=True), form=option(TRANSFER_MATRIX_FORMS))
def test_realize_transfer_matrix_exact(data, form):
    num, den, _ = data
    r = attempt(sw.realize_transfer_matrix, num, den, form, exact=True)
    if r is not FAILED:
        p, m = np.shape(num)[:2]  # a drawn "wrong" shape may still be a valid transfer matrix
        check_realization(r, m=m, p=p, exact=True)

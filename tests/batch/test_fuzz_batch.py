"""Fuzz tests of the batch functions and their dask versions (contract in tests/fuzz_strategies.py)."""

import math  # noqa: F401
from fractions import Fraction  # noqa: F401

import numpy as np  # noqa: F401
import pytest  # noqa: F401
from hypothesis import given, reject, settings  # noqa: F401
from hypothesis import strategies as st  # noqa: F401

import statewright as sw  # noqa: F401
from fuzz_strategies import *  # noqa: F403
from fuzz_strategies import watchdog_output  # noqa: F401  (autouse fixture: the watchdog prints past capture)

# batches
# --------------------------------------------------------------------------------------


@st.composite
def batch_polynomials(draw):
    count = draw(st.sampled_from([0, 1, 2, 3, 5]))
    n = draw(ORDERS)
    k = draw(st.sampled_from([0, 1, n, n + 1, n + 1, n + 2]))
    num = draw(fuzz_float_arg((count, k), bad_rate=0.08))
    den = draw(fuzz_float_arg((count, n + 1), bad_rate=0.08))
    numeric = isinstance(den, np.ndarray) and den.dtype.kind in "biuf"  # not a junk array of strings
    if draw(st.booleans()) and numeric and den.shape == (count, n + 1) and count:
        den = np.array(den, dtype=float)
        den[:, 0] = draw(st.sampled_from([1.0, -3.0, 0.0, 1e-300]))
    return num, den, count, n


@CI
@given(data=batch_polynomials(), form=option(FORMS))
def test_realize_batch(data, form):
    num, den, _, _ = data
    out = attempt(sw.realize_batch, num, den, form)
    if out is FAILED:
        return
    count, n = np.shape(den)[0], np.shape(den)[1] - 1
    a, b, c, d = out
    check_array(a, (count, n, n))
    check_array(b, (count, n, 1))
    check_array(c, (count, 1, n))
    check_array(d, (count, 1, 1))


@st.composite
def batch_models(draw):
    count = draw(st.sampled_from([0, 1, 2, 3, 5]))
    n, m, p = draw(model_shapes())
    shapes = [(count, n, n), (count, n, m), (count, p, n), (count, p, m)]
    return tuple(draw(fuzz_float_arg(s, bad_rate=0.08)) for s in shapes), (count, n, m, p)


@CI
@given(model=batch_models())
def test_transfer_function_batch(model):
    (a, b, c, d), _ = model
    out = attempt(sw.transfer_function_batch, a, b, c, d)
    if out is FAILED:
        return
    (count, n, _), (_, _, m), (_, p, _) = np.shape(a), np.shape(b), np.shape(c)
    check_array(out[0], (count, p, m, n + 1))
    check_array(out[1], (count, n + 1))


# --------------------------------------------------------------------------------------
# cluster (dask), synchronous scheduler
# --------------------------------------------------------------------------------------


@CI_SLOW
@given(data=batch_polynomials(), form=option(FORMS), model=batch_models(), chunk=st.integers(1, 3))
def test_cluster_functions(data, form, model, chunk):
    dask = pytest.importorskip("dask")
    da = pytest.importorskip("dask.array")
    from statewright.cluster import realize_batch_dask, transfer_function_batch_dask

    def realize_then_compute(num, den):
        if isinstance(num, np.ndarray) and num.ndim == 2 and num.dtype.kind in "biuf":
            num = da.from_array(num, chunks=(chunk, -1))
        return dask.compute(*realize_batch_dask(num, den, form), scheduler="synchronous")

    num, den, _, _ = data
    out = attempt(realize_then_compute, num, den)
    if out is not FAILED:
        count, n = np.shape(den)[0], np.shape(den)[1] - 1
        for x, shape in zip(out, ((count, n, n), (count, n, 1), (count, 1, n), (count, 1, 1))):
            check_array(x, shape)

    (a, b, c, d), _ = model

    def transfer_then_compute(a, b, c, d):
        return dask.compute(*transfer_function_batch_dask(a, b, c, d), scheduler="synchronous")

    out = attempt(transfer_then_compute, a, b, c, d)
    if out is not FAILED:
        (count, n, _), (_, _, m), (_, p, _) = np.shape(a), np.shape(b), np.shape(c)
        check_array(out[0], (count, p, m, n + 1))
        check_array(out[1], (count, n + 1))


# --------------------------------------------------------------------------------------

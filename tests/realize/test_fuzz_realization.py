"""Fuzz tests of the Realization object and its methods (contract in tests/fuzz_strategies.py)."""

import math  # noqa: F401
from fractions import Fraction  # noqa: F401

import numpy as np  # noqa: F401
import pytest  # noqa: F401
from hypothesis import given, reject, settings  # noqa: F401
from hypothesis import strategies as st  # noqa: F401

import statewright as sw  # noqa: F401
from fuzz_strategies import *  # noqa: F403
from fuzz_strategies import watchdog_output  # noqa: F401  (autouse fixture: the watchdog prints past capture)

# Realization and its methods
# --------------------------------------------------------------------------------------

POINTS = st.one_of(
    st.complex_numbers(max_magnitude=1e6, allow_nan=False, allow_infinity=False),
    st.floats(allow_nan=False, allow_infinity=False),
    st.sampled_from(
        [
            0,
            1j,
            -1.0,
            1e300,
            1e-300,
            1e300j,
            nan,
            inf,
            complex(nan, 0),
            10**400,
            -(10**400),
            "1j",
            "abc",
            None,
            [1j, 2.0],
            [[1.0]],
            np.array([]),
            np.array([1e-300, 1e300]),
            np.arange(5.0)[::2],
            Fraction(1, 3),
            Decimal("2"),
            b"1",
            [1, "x"],
            True,
        ]
    ).map(copy.deepcopy),
    hnp.arrays(np.complex128, st.integers(0, 4), elements=st.complex_numbers(max_magnitude=1e3)),
)


@st.composite
def realization_args(draw):
    if draw(st.integers(0, 3)) == 0:
        (a, b, c, d), shape = draw(exact_model())
        return (a, b, c, d), shape, True
    (a, b, c, d), shape = draw(float_model())
    return (a, b, c, d), shape, False


@CI
@given(args=realization_args(), info=st.one_of(st.none(), st.just({"k": 1.0})), data=st.data())
def test_realization_and_methods(args, info, data):
    (a, b, c, d), _, exact = args
    r = attempt(sw.Realization, a, b, c, d, info)
    if r is FAILED:
        return
    n, m, p = model_dims(a, b, c)
    check_realization(r, n=n, m=m, p=p)
    s = data.draw(POINTS)
    g = attempt(r.evaluate, s)
    if g is not FAILED:
        assert g.dtype == np.complex128
        points = np.asarray(s, dtype=complex)
        assert g.shape == ((p, m) if points.ndim == 0 else (points.size, p, m))
    poles = attempt(r.poles)
    if poles is not FAILED:
        assert poles.shape == (n,) and poles.dtype == np.complex128
    method = data.draw(option(METHODS))
    tf = attempt(r.transfer_function, method=method)
    if tf is not FAILED:
        check_array(tf[0], (p, m, n + 1), exact=r.exact)
        check_array(tf[1], (n + 1,), exact=r.exact)
    t_exact = r.exact and data.draw(st.booleans())
    t = data.draw((fuzz_exact_arg if t_exact else fuzz_float_arg)((n, n)))
    if not r.exact and n and data.draw(st.booleans()):
        # a well-conditioned T too, so that the success path is exercised
        t = np.eye(n) + 0.1 * np.asarray(data.draw(float_array((n, n), regime="unit", layout="c")))
    rt = attempt(r.transform, t)
    if rt is not FAILED:
        check_realization(rt, n=n, m=m, p=p)
    tol = data.draw(bad_tol())
    mr = attempt(r.minimal_realization, tol=tol)
    if mr is not FAILED:
        check_realization(mr, m=m, p=p, max_n=n, exact=False)
    k = attempt(r.kalman_decomposition, tol=tol)
    if k is not FAILED:
        assert sum(k.sizes) == n
    for method_name in ("controllability_staircase", "observability_staircase"):
        st_ = attempt(getattr(r, method_name), tol=tol)
        if st_ is not FAILED:
            check_staircase(st_, n, None)
    for method_name in ("is_controllable", "is_observable"):
        yes = attempt(getattr(r, method_name), tol=tol)
        assert yes is FAILED or isinstance(yes, bool)


@CI
@given(info=st.sampled_from([[1, 2], "ab", 5, 2.5, {"a": nan}, [("k", 1.0)], object(), {1, 2}]))
def test_realization_info_argument(info):
    """The documented ``info`` parameter: a mapping is kept (the caller's own values, not
    checked), anything else is a ModelError."""
    try:
        r = sw.Realization([[1.0]], [[1.0]], [[1.0]], [[0.0]], info)
    except sw.ModelError as exc:
        assert "internal error" not in str(exc)
        return
    assert isinstance(r.info, types.MappingProxyType)


# --------------------------------------------------------------------------------------

"""Bad input to the structure routines: ModelError (a ValueError) naming the argument."""

import numpy as np
import pytest

import statewright as sw
from swtest_helpers import names_argument

A = np.array([[-1.0, 2.0, 0.0], [0.0, -2.0, 1.0], [1.0, 0.0, -3.0]])
B = np.array([[1.0], [0.0], [1.0]])
C = np.array([[1.0, 1.0, 0.0]])
D = np.array([[0.0]])


def call(fn, a=A, b=B, c=C, d=D, **kw):
    """Call one structure routine with the four (possibly altered) matrices."""
    if fn == "controllability_staircase":
        return sw.controllability_staircase(a, b, c, **kw)
    if fn == "observability_staircase":
        return sw.observability_staircase(a, b, c, **kw)
    if fn == "is_controllable":
        return sw.is_controllable(a, b, **kw)
    if fn == "is_observable":
        return sw.is_observable(a, c, **kw)
    if fn == "kalman_decomposition":
        return sw.kalman_decomposition(a, b, c, d, **kw)
    if fn == "minimal_realization":
        return sw.minimal_realization(a, b, c, d, **kw)
    raise AssertionError(fn)


USES = {
    "controllability_staircase": "abc",
    "observability_staircase": "abc",
    "is_controllable": "ab",
    "is_observable": "ac",
    "kalman_decomposition": "abcd",
    "minimal_realization": "abcd",
}
CASES = [(fn, arg) for fn, args in USES.items() for arg in args]


def expect_error(name, fn, **kw):
    with pytest.raises(sw.ModelError) as e:
        call(fn, **kw)
    assert isinstance(e.value, ValueError)
    assert names_argument(str(e.value), name), str(e.value)
    return str(e.value)


def default(name):
    return {"a": A, "b": B, "c": C, "d": D}[name]


@pytest.mark.parametrize("fn,arg", CASES)
@pytest.mark.parametrize("value", [np.nan, np.inf, -np.inf])
def test_non_finite(fn, arg, value):
    m = default(arg).copy()
    m.flat[-1] = value
    msg = expect_error(arg, fn, **{arg: m})
    assert "NaN" in msg or "finite" in msg or "inf" in msg.lower()


@pytest.mark.parametrize("fn,arg", CASES)
def test_wrong_shape(fn, arg):
    bad = {
        "a": np.ones((3, 2)),
        "b": np.ones((2, 1)),
        "c": np.ones((1, 4)),
        "d": np.ones((2, 1)),
    }[arg]
    expect_error(arg, fn, **{arg: bad})


@pytest.mark.parametrize("fn,arg", CASES)
@pytest.mark.parametrize(
    "bad",
    ["abc", {"x": 1}, [[1.0, "x"]], np.ones((3, 3, 1)), A + 1j, object()],
    ids=["str", "dict", "mixed", "3d", "complex", "object"],
)
def test_wrong_type(fn, arg, bad):
    expect_error(arg, fn, **{arg: bad})


OPTIONAL = {("observability_staircase", "b"), ("controllability_staircase", "c")}


@pytest.mark.parametrize("fn,arg", [case for case in CASES if case not in OPTIONAL])
def test_none_argument(fn, arg):
    # only b of the observability staircase and c of the controllability one may be None
    expect_error(arg, fn, **{arg: None})


def test_observability_staircase_b_optional():
    s = sw.observability_staircase(A, None, C)
    assert s.b.shape == (3, 0)
    assert s.rank == sw.observability_staircase(A, B, C).rank


@pytest.mark.parametrize("fn", list(USES))
@pytest.mark.parametrize("tol", [-1.0, -1e-300, np.nan, np.inf, "1e-3", True, [1e-3], 1j])
def test_bad_tol(fn, tol):
    expect_error("tol", fn, tol=tol)


@pytest.mark.parametrize("fn", list(USES))
@pytest.mark.parametrize("tol", [0, 0.0, 1e-12, np.float32(1e-6), np.int64(1)])
def test_good_tol_types(fn, tol):
    call(fn, tol=tol)


def test_inputs_not_modified():
    a, b, c, d = A.copy(), B.copy(), C.copy(), D.copy()
    for fn in USES:
        call(fn, a=a, b=b, c=c, d=d)
    for x, y in ((a, A), (b, B), (c, C), (d, D)):
        np.testing.assert_array_equal(x, y)


def test_lists_and_integers_accepted():
    s1 = sw.controllability_staircase(A.astype(int).tolist(), B.astype(int).tolist())
    s2 = sw.controllability_staircase(A, B)
    assert s1.rank == s2.rank and s1.blocks == s2.blocks
    np.testing.assert_array_equal(s1.a, s2.a)

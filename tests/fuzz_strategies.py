"""Shared machinery of the fuzz tests (tests/*/test_fuzz_*.py): hypothesis settings, the
watchdog, the contract every call must keep, and the strategies that draw valid and
malformed arguments.

The contract checked (docs: API contract, "Conventions for every function"): every call
either succeeds, with finite results of the documented shapes that never alias the
caller's arrays (the inputs are overwritten after the call and the results must not
change), or raises ``statewright.ModelError``. Never any other exception, and never a
``ModelError`` whose message contains "internal error": that is the binding's last-resort
panic guard, and it must never fire.

Inputs are drawn from every regime the contract names: NaN and infinity, empty arrays,
mismatched shapes, huge (1e300) and tiny (1e-300, subnormal) magnitudes, exact data with
huge Python ints and Fractions with huge denominators, wrong types, and every array layout
(strided views, transposes, negative strides, read-only arrays and views, Fortran order,
float32 / float16 / integer / boolean / big-endian / object dtypes, nested lists). Model
orders stay at or below 12 (orders 0 and 1 included), and exact data with huge entries stay
at low order, so that a single call takes well under a second.

A hang is a contract violation too, and it cannot be interrupted from Python: a watchdog
ends the whole run (exit status 3) when one call takes longer than
``STATEWRIGHT_FUZZ_CALL_TIMEOUT`` seconds (default 60), printing the call and its arguments.

Examples per test come from the environment variable ``STATEWRIGHT_FUZZ_EXAMPLES`` (the
hypothesis profile "ci"); the default keeps the whole file under a minute. The long run:

    sh scripts/fuzz_long.sh        (5,000 examples per test)
"""

import copy
import faulthandler
import math
import os
import subprocess
import sys
import threading
import time
import types
import warnings
from decimal import Decimal
from fractions import Fraction

import numpy as np
import pytest
from hypothesis import HealthCheck, given, reject, settings
from hypothesis import strategies as st
from hypothesis.extra import numpy as hnp

import statewright as sw
from swtest_helpers import ALL_FORMS, COMPANION_FORMS

# --------------------------------------------------------------------------------------
# settings
# --------------------------------------------------------------------------------------

EXAMPLES = int(os.environ.get("STATEWRIGHT_FUZZ_EXAMPLES", "150"))

settings.register_profile(
    "ci",
    max_examples=EXAMPLES,
    deadline=None,
    derandomize=False,
    database=None,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large, HealthCheck.filter_too_much],
)
CI = settings(settings.get_profile("ci"))
# Exact arithmetic and dask graphs cost more per call: a quarter of the examples.
CI_SLOW = settings(settings.get_profile("ci"), max_examples=max(10, EXAMPLES // 4))

FORMS = ALL_FORMS
METHODS = ("auto", "recursion", "exact")

# --------------------------------------------------------------------------------------
# watchdog: a call that never returns ends the run, naming the call
# --------------------------------------------------------------------------------------

CALL_TIMEOUT = float(os.environ.get("STATEWRIGHT_FUZZ_CALL_TIMEOUT", "60"))
_CURRENT = {"since": None, "call": None, "capture": None}


def _describe(call):
    fn, args, kwargs = call
    owner = getattr(fn, "__self__", None)
    with np.printoptions(threshold=200, precision=17):
        text = f"{getattr(fn, '__qualname__', fn)}(*{args!r}, **{kwargs!r})"
        if isinstance(owner, sw.Realization):
            text += f"\non the realization (A, B, C, D) = {tuple(owner)!r}"
        return text


def _watchdog():
    while True:
        time.sleep(0.5)
        since, call = _CURRENT["since"], _CURRENT["call"]
        if since is None or time.monotonic() - since < CALL_TIMEOUT:
            continue
        capture = _CURRENT["capture"]
        try:
            if capture is not None:
                capture.suspend_global_capture(in_=False)
        except Exception:
            pass
        sys.stderr.write(f"\n\nHANG: this call has not returned after {CALL_TIMEOUT:.0f} s:\n{_describe(call)}\n")
        sys.stderr.flush()
        os._exit(3)


threading.Thread(target=_watchdog, name="statewright-fuzz-watchdog", daemon=True).start()


@pytest.fixture(autouse=True)
def watchdog_output(pytestconfig):
    """Lets the watchdog print past pytest's output capture."""
    _CURRENT["capture"] = pytestconfig.pluginmanager.getplugin("capturemanager")
    yield


# --------------------------------------------------------------------------------------
# the contract
# --------------------------------------------------------------------------------------


class _Failed:
    """The call raised ModelError (a permitted outcome)."""


FAILED = _Failed()


def _leaves(obj, out):
    """Every array and scalar a result holds (Realization, Staircase, Decomposition, tuples,
    lists, mappings)."""
    if isinstance(obj, np.ndarray):
        out.append(obj)
    elif isinstance(obj, sw.Realization):
        for x in obj:
            out.append(x)
        _leaves(dict(obj.info), out)
    elif isinstance(obj, sw.Staircase):
        for x in (
            obj.a,
            obj.b,
            obj.c,
            obj.transform,
            obj.singular_values,
            obj.rank_gaps,
            obj.tol,
            obj.blocks,
            obj.rank,
        ):
            _leaves(x, out)
    elif isinstance(obj, sw.Decomposition):
        _leaves(obj.realization, out)
        _leaves(obj.transform, out)
        _leaves(dict(obj.info), out)
        _leaves(obj.sizes, out)
    elif isinstance(obj, (tuple, list)):
        for x in obj:
            _leaves(x, out)
    elif isinstance(obj, dict):
        for x in obj.values():
            _leaves(x, out)
    else:
        out.append(obj)
    return out


def _input_arrays(obj, out, depth=0):
    """Every numpy array reachable from the call's arguments."""
    if depth > 6:
        return out
    if isinstance(obj, np.ndarray):
        out.append(obj)
        if obj.dtype == object:
            for x in obj.reshape(-1)[:200]:
                _input_arrays(x, out, depth + 1)
    elif isinstance(obj, sw.Realization):
        out.extend(obj)
    elif isinstance(obj, (tuple, list)):
        for x in obj[:200]:
            _input_arrays(x, out, depth + 1)
    elif isinstance(obj, dict):
        for x in obj.values():
            _input_arrays(x, out, depth + 1)
    return out


def _check_finite(leaf):
    if isinstance(leaf, np.ndarray):
        if leaf.dtype == object:
            bad = [x for x in leaf.reshape(-1) if not isinstance(x, Fraction)]
            assert not bad, f"an exact result holds non-Fraction entries {bad[:3]!r}"
        else:
            assert leaf.dtype.kind in "fcbiu", f"result of dtype {leaf.dtype}"
            assert np.all(np.isfinite(leaf)), f"a result is not finite: {leaf!r}"
            if leaf.dtype.kind in "fc":
                assert leaf.dtype.itemsize in (8, 16), f"result of dtype {leaf.dtype}, expected float64/complex128"
    elif isinstance(leaf, (float, complex, np.floating, np.complexfloating)):
        assert np.isfinite(leaf), f"a scalar result is not finite: {leaf!r}"


def _roots(arrays):
    roots = []
    for x in arrays:
        r = x
        while isinstance(r.base, np.ndarray):
            r = r.base
        if not any(r is y for y in roots):
            roots.append(r)
    return roots


def _overwrite(arrays):
    """Overwrite every input array (through its base, making read-only ones writable)."""
    for r in _roots(arrays):
        try:
            if not r.flags.writeable:
                r.flags.writeable = True
            with np.errstate(all="ignore"):
                if r.dtype == object:
                    r[...] = 7
                elif r.dtype.kind in "fciub":
                    r[...] = 7
                else:
                    r[...] = "7"
        except (ValueError, TypeError):
            pass


def _same(x, y):
    if x.shape != y.shape or x.dtype != y.dtype:
        return False
    if x.dtype == object:
        return bool(np.all(x == y))
    return x.tobytes() == y.tobytes()


def attempt(fn, *args, mutable=(), **kwargs):
    """Calls ``fn``; returns its result, or FAILED when it raised ModelError.

    Any other exception propagates (a contract violation). On success the result must be
    finite and must not alias any input array: the inputs (and ``mutable``, e.g. arrays held
    by a SciPy system) are overwritten and the result compared with its snapshot.
    """
    _CURRENT["call"] = (fn, args, kwargs)
    _CURRENT["since"] = time.monotonic()
    # backstop for a hang that holds the GIL (the watchdog thread cannot run then)
    faulthandler.dump_traceback_later(2 * CALL_TIMEOUT + 5, exit=True)
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            result = fn(*args, **kwargs)
    except sw.ModelError as exc:
        message = str(exc)
        assert "internal error" not in message, f"the panic guard fired: {message}"
        assert message, "ModelError without a message"
        return FAILED
    finally:
        _CURRENT["since"] = None
        faulthandler.cancel_dump_traceback_later()
    leaves = _leaves(result, [])
    for leaf in leaves:
        _check_finite(leaf)
    inputs = _input_arrays((args, kwargs, list(mutable)), [])
    outputs = [x for x in leaves if isinstance(x, np.ndarray)]
    for o in outputs:
        for i in inputs:
            if np.may_share_memory(o, i):
                assert not np.shares_memory(o, i, max_work=10**6), "a result aliases an input array"
    snapshot = [o.copy() for o in outputs]
    _overwrite([i for i in inputs if not _in_realization(i, args, kwargs)])
    for o, s in zip(outputs, snapshot):
        assert _same(o, s), "a result changed when the input was overwritten after the call"
    return result


def _in_realization(arr, args, kwargs):
    """Arrays owned by a Realization passed in are read-only by design: not overwritten."""
    for x in list(args) + list(kwargs.values()):
        if isinstance(x, sw.Realization) and any(arr is y for y in x):
            return True
    return False


def check_realization(r, n=None, m=None, p=None, exact=None, max_n=None):
    assert isinstance(r, sw.Realization)
    a, b, c, d = r
    for x in (a, b, c, d):
        assert isinstance(x, np.ndarray) and x.ndim == 2
        assert not x.flags.writeable, "a Realization's arrays are read-only"
    k = a.shape[0]
    assert a.shape == (k, k) and b.shape[0] == k and c.shape[1] == k
    assert d.shape == (c.shape[0], b.shape[1])
    if n is not None:
        assert k == n, (k, n)
    if max_n is not None:
        assert k <= max_n
    if m is not None:
        assert b.shape[1] == m
    if p is not None:
        assert c.shape[0] == p
    if exact is True:
        assert all(x.dtype == object for x in r)
    elif exact is False:
        assert all(x.dtype == np.float64 and x.flags.c_contiguous for x in r)
    assert r.n_states == k and r.n_inputs == b.shape[1] and r.n_outputs == c.shape[0]


def model_dims(a, b, c):
    """(n, m, p) of arguments that were accepted (a drawn "wrong" shape may still fit)."""
    return np.shape(a)[0], np.shape(b)[1], np.shape(c)[0]


def check_array(x, shape, exact=False):
    assert isinstance(x, np.ndarray)
    assert x.shape == tuple(shape), (x.shape, shape)
    if exact:
        assert x.dtype == object
    else:
        assert x.dtype == np.float64


# --------------------------------------------------------------------------------------
# strategies: numbers
# --------------------------------------------------------------------------------------

nan, inf = float("nan"), float("inf")
SPECIAL = [
    0.0,
    -0.0,
    1.0,
    -1.0,
    0.5,
    -2.0,
    3.0,
    1e300,
    -1e300,
    1e-300,
    -1e-300,
    5e-324,
    2.2250738585072014e-308,
    1.7976931348623157e308,
    -1.7976931348623157e308,
    1e150,
    1e-150,
    1e154,
    1e-154,
    2.0**1000,
    2.0**-1000,
]

REGIMES = {
    "unit": st.floats(-10, 10, allow_nan=False, allow_infinity=False, allow_subnormal=False)
    | st.integers(-4, 4).map(float),
    "wide": st.floats(allow_nan=False, allow_infinity=False),
    "special": st.sampled_from(SPECIAL),
    "huge": st.sampled_from([1e300, -1e300, 1.7976931348623157e308, 1e200, -1e250, 2.0, -3.0, 0.0]),
    "tiny": st.sampled_from([1e-300, -1e-300, 5e-324, 2.2e-308, 1e-200, 1.0, -1.0, 0.0]),
    "nonfinite": st.sampled_from([nan, inf, -inf, 1.0, 0.0, -2.0]),
    "spread": st.sampled_from([1e-8, -1e-4, 1.0, -3.0, 1e4, -1e8, 0.0]),
}
REGIME_NAMES = ["unit"] * 8 + ["wide", "special", "huge", "tiny", "nonfinite", "spread"]

LAYOUTS = ["c"] * 6 + [
    "fortran",
    "strided",
    "transposed",
    "reversed",
    "readonly",
    "readonly_view",
    "float32",
    "float16",
    "longdouble",
    "int64",
    "int32",
    "bool",
    "list",
    "object",
    "bigendian",
    "fractions",
]


def _strided(x):
    if x.ndim == 0:
        return x.copy()
    big = np.zeros(tuple(2 * s + 1 for s in x.shape), dtype=x.dtype)
    view = big[tuple(slice(1, None, 2) for _ in x.shape)]
    view[...] = x
    return view


def _reversed(x):
    idx = tuple(slice(None, None, -1) for _ in x.shape)
    return x[idx].copy()[idx]


def lay_out(x, layout):
    """``x`` (a float64 C array) in another memory layout, dtype or container."""
    with np.errstate(all="ignore"):
        if layout == "c":
            return x
        if layout == "fortran":
            return np.asfortranarray(x)
        if layout == "strided":
            return _strided(x)
        if layout == "transposed":
            return np.ascontiguousarray(x.T).T
        if layout == "reversed":
            return _reversed(x)
        if layout == "readonly":
            y = x.copy()
            y.flags.writeable = False
            return y
        if layout == "readonly_view":
            y = x.copy().view()
            y.flags.writeable = False
            return y
        if layout == "float32":
            return x.astype(np.float32)
        if layout == "float16":
            return x.astype(np.float16)
        if layout == "longdouble":
            return x.astype(np.longdouble)
        if layout in ("int64", "int32"):
            if np.all(np.isfinite(x)) and np.all(np.abs(x) < 2.0**30):
                return np.round(x).astype(layout)
            return x
        if layout == "bool":
            return np.isfinite(x) & (x != 0)
        if layout == "list":
            return x.tolist()
        if layout == "object":
            return x.astype(object)
        if layout == "bigendian":
            return x.astype(">f8")
        if layout == "fractions":
            if not np.all(np.isfinite(x)):
                return x
            out = np.empty(x.shape, dtype=object)
            out.reshape(-1)[:] = [Fraction(float(v)) for v in x.reshape(-1)]
            return out
    raise AssertionError(layout)


JUNK = [
    None,
    "abc",
    "1.0",
    b"\x00\x01",
    {"a": 1},
    {1, 2},
    1 + 2j,
    [[1, 2], [3]],
    [[1.0, "x"]],
    np.array([[1 + 1j]]),
    np.zeros((2, 2, 2)),
    np.zeros((1, 1, 1, 1)),
    np.array([["a", "b"]]),
    np.array([], dtype=float),
    [],
    [[]],
    np.datetime64("2020-01-01"),
    np.array([[np.timedelta64(1, "s")]]),
    Decimal("1.5"),
    Fraction(1, 3),
    10**400,
    -(10**400),
    [[10**400]],
    [[1e308 * 10]],
    [[nan]],
    True,
    0,
    3.5,
    np.float64(nan),
    np.array([[None]]),
    np.empty((0, 0)),
    np.empty((3, 0)),
    np.empty((0, 3)),
    object(),
    slice(1, 2),
    range(3),
    [range(2), range(2)],
]


@st.composite
def float_array(draw, shape, regime=None, layout=None):
    """An array-like of this shape for the float API, in any value regime and layout."""
    regime = regime or draw(st.sampled_from(REGIME_NAMES))
    x = draw(hnp.arrays(np.float64, shape, elements=REGIMES[regime]))
    return lay_out(x, layout or draw(st.sampled_from(LAYOUTS)))


def wrong_shape(shape):
    """A shape that differs from ``shape`` (another size, another dimension count)."""
    options = [tuple(shape) + (1,), tuple(shape[:-1]) if shape else (2,), (0,) * max(1, len(shape))]
    for i in range(len(shape)):
        for delta in (-1, 1, 2):
            s = list(shape)
            s[i] = s[i] + delta
            if s[i] >= 0:
                options.append(tuple(s))
    return st.sampled_from([s for s in options if s != tuple(shape)])


@st.composite
def fuzz_arg(draw, array, shape, bad_rate):
    """Mostly ``array(shape)``; sometimes junk or an ``array`` of a wrong shape."""
    roll = draw(st.floats(0, 1))
    if roll < bad_rate / 2:
        return draw(st.sampled_from(JUNK).map(copy.deepcopy))
    if roll < bad_rate:
        return draw(array(draw(wrong_shape(shape))))
    return draw(array(tuple(shape)))


def fuzz_float_arg(shape, bad_rate=0.12):
    return fuzz_arg(float_array, shape, bad_rate)


ORDERS = st.sampled_from([0, 1, 1, 2, 2, 3, 3, 4, 4, 5, 6, 7, 8, 10, 12])
WIDTHS = st.sampled_from([0, 1, 1, 1, 2, 2, 3])


def bad_tol():
    return st.one_of(
        st.none(),
        st.none(),
        st.none(),
        st.sampled_from(
            [
                0.0,
                0,
                1e-12,
                1e-6,
                1.0,
                1e300,
                5e-324,
                -1.0,
                nan,
                inf,
                -inf,
                "1e-9",
                True,
                [1e-9],
                1 + 1j,
                np.float32(1e-6),
                np.int64(0),
                10**400,
                Decimal("0.1"),
            ]
        ),
    )


def flag():
    return st.one_of(
        st.booleans(),
        st.booleans(),
        st.booleans(),
        st.sampled_from([None, 0, 1, "yes", np.bool_(True), np.bool_(False), 1.0]),
    )


def option(allowed):
    return st.one_of(
        *([st.sampled_from(allowed)] * 4),
        st.sampled_from([None, 3, "", "Modal", "modal ", "controllable", "AUTO", b"auto", ["modal"], "exact\x00", "é"]),
    )


# --------------------------------------------------------------------------------------
# strategies: exact numbers
# --------------------------------------------------------------------------------------


def huge_int():
    return st.builds(
        lambda k, sign, r: sign * (10**k + r), st.integers(20, 300), st.sampled_from([1, -1]), st.integers(0, 10**6)
    )


EXACT_SMALL = st.one_of(
    st.integers(-9, 9),
    st.builds(Fraction, st.integers(-50, 50), st.integers(1, 50)),
    st.sampled_from(["0.25", "-1/3", " 3 ", "1e-3", "7", "-0.125", "2/4"]),
    st.sampled_from([np.int64(3), np.int32(-2), np.uint8(5)]),
)
EXACT_HUGE = st.one_of(
    EXACT_SMALL,
    huge_int(),
    st.builds(lambda p, q: Fraction(p, q), st.integers(-(10**6), 10**6), huge_int().map(abs)),
    st.builds(lambda p, q: Fraction(p, q), huge_int(), huge_int().map(abs)),
    st.sampled_from(["1e300", "-1e-300", "123456789012345678901234567890/7", Decimal("1e-300"), Decimal("2.5")]),
)
EXACT_BAD = st.sampled_from(
    [
        1.5,
        0.0,
        nan,
        inf,
        "abc",
        "1/0",
        "",
        None,
        True,
        np.float64(1.0),
        1 + 1j,
        Decimal("NaN"),
        Decimal("Infinity"),
        [1],
        object(),
        "0x10",
        "1/2/3",
        10**2000,
        Fraction(1, 10**2000),
        "1" + "0" * 9000,
        "1e100000",
    ]
).map(copy.deepcopy)


@st.composite
def exact_array(draw, shape, bad_rate=0.05):
    """Exact data of ``shape``: huge entries only when there are few of them (a call stays fast)."""
    size = int(np.prod(shape)) if shape else 1
    max_dim = max(shape) if shape else 1
    entries = EXACT_HUGE if max_dim <= 3 else EXACT_SMALL
    if max_dim > 6:
        entries = st.integers(-9, 9) | st.just(0)
    flat = draw(st.lists(entries, min_size=size, max_size=size))
    if draw(st.floats(0, 1)) < bad_rate and size:
        flat[draw(st.integers(0, size - 1))] = draw(EXACT_BAD)
    arr = np.empty(size, dtype=object)
    arr[:] = flat
    arr = arr.reshape(shape)
    layout = draw(st.sampled_from(["list", "list", "object", "object", "strided", "transposed", "readonly", "int64"]))
    if layout == "list":
        return arr.tolist()
    if layout == "strided":
        return _strided(arr)
    if layout == "transposed":
        return np.ascontiguousarray(arr.T).T
    if layout == "readonly":
        arr.flags.writeable = False
        return arr
    if layout == "int64" and all(isinstance(v, int) and abs(v) < 2**62 for v in flat):
        return arr.astype(np.int64)
    return arr


def fuzz_exact_arg(shape, bad_rate=0.1):
    return fuzz_arg(exact_array, shape, bad_rate)


@st.composite
def model_shapes(draw):
    return draw(ORDERS), draw(WIDTHS), draw(WIDTHS)


@st.composite
def float_model(draw, bad_rate=0.12):
    n, m, p = draw(model_shapes())
    shapes = [(n, n), (n, m), (p, n), (p, m)]
    return tuple(draw(fuzz_float_arg(s, bad_rate)) for s in shapes), (n, m, p)


@st.composite
def exact_model(draw):
    n = draw(st.sampled_from([0, 1, 1, 2, 2, 3, 3, 4, 5, 6, 8, 12]))
    m, p = draw(WIDTHS), draw(WIDTHS)
    shapes = [(n, n), (n, m), (p, n), (p, m)]
    return tuple(draw(fuzz_exact_arg(s)) for s in shapes), (n, m, p)


@st.composite
def polynomial(draw, length, exact=False):
    if exact:
        return draw(fuzz_exact_arg((length,), bad_rate=0.06))
    x = draw(fuzz_float_arg((length,), bad_rate=0.06))
    if draw(st.integers(0, 9)) == 0 and isinstance(x, np.ndarray) and x.ndim == 1 and x.size > 1:
        x = np.array(x, dtype=float)
        x[: draw(st.integers(1, x.size))] = 0.0  # leading zeros (possibly all)
    return x


@st.composite
def transfer_function_data(draw, exact=False):
    n = draw(ORDERS)
    k = draw(st.sampled_from([0, 1, n, n + 1, n + 1, n + 1, n + 2]))
    return draw(polynomial(k, exact)), draw(polynomial(n + 1, exact))


def polynomial_degree(den):
    """The order of the realization of exact ``den``: its length after leading zeros are
    dropped (None when it cannot be told)."""
    try:
        arr = np.asarray(den, dtype=object).reshape(-1)
        values = [
            Fraction(v.strip())
            if isinstance(v, str)
            else Fraction(int(v))
            if isinstance(v, np.integer)
            else Fraction(v)
            for v in arr
        ]
    except Exception:
        return None
    nz = [i for i, v in enumerate(values) if v != 0]
    return None if not nz else len(values) - 1 - nz[0]


def check_staircase(s, n, m, p=None):
    assert isinstance(s, sw.Staircase)
    check_array(s.a, (n, n))
    if s.b is not None and m is not None:
        check_array(s.b, (n, m))
    if p is not None:
        check_array(s.c, (p, n))
    check_array(s.transform, (n, n))
    assert 0 <= s.rank <= n and sum(s.blocks) == s.rank
    assert all(b > 0 for b in s.blocks)
    assert math.isfinite(s.tol) and s.tol >= 0

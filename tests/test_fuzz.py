"""Fuzz tests: every public function and method on valid and malformed input.

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

    sh scripts/fuzz_long.sh        (5,000 examples per test: about 107,500 in all)
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
def _watchdog_output(pytestconfig):
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
        for x in (obj.a, obj.b, obj.c, obj.transform, obj.singular_values, obj.margins, obj.tol,
                  obj.blocks, obj.rank):
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
SPECIAL = [0.0, -0.0, 1.0, -1.0, 0.5, -2.0, 3.0, 1e300, -1e300, 1e-300, -1e-300, 5e-324,
           2.2250738585072014e-308, 1.7976931348623157e308, -1.7976931348623157e308, 1e150, 1e-150,
           1e154, 1e-154, 2.0 ** 1000, 2.0 ** -1000]

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

LAYOUTS = (["c"] * 6 + ["fortran", "strided", "transposed", "reversed", "readonly", "readonly_view",
                         "float32", "float16", "longdouble", "int64", "int32", "bool", "list", "object",
                         "bigendian", "fractions"])


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
            if np.all(np.isfinite(x)) and np.all(np.abs(x) < 2.0 ** 30):
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
    None, "abc", "1.0", b"\x00\x01", {"a": 1}, {1, 2}, 1 + 2j, [[1, 2], [3]], [[1.0, "x"]],
    np.array([[1 + 1j]]), np.zeros((2, 2, 2)), np.zeros((1, 1, 1, 1)), np.array([["a", "b"]]),
    np.array([], dtype=float), [], [[]], np.datetime64("2020-01-01"), np.array([[np.timedelta64(1, "s")]]),
    Decimal("1.5"), Fraction(1, 3), 10 ** 400, -(10 ** 400), [[10 ** 400]], [[1e308 * 10]], [[nan]],
    True, 0, 3.5, np.float64(nan), np.array([[None]]), np.empty((0, 0)), np.empty((3, 0)), np.empty((0, 3)),
    object(), slice(1, 2), range(3), [range(2), range(2)],
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
        st.none(), st.none(), st.none(),
        st.sampled_from([0.0, 0, 1e-12, 1e-6, 1.0, 1e300, 5e-324, -1.0, nan, inf, -inf, "1e-9", True,
                         [1e-9], 1 + 1j, np.float32(1e-6), np.int64(0), 10 ** 400, Decimal("0.1")]),
    )


def flag():
    return st.one_of(st.booleans(), st.booleans(), st.booleans(),
                     st.sampled_from([None, 0, 1, "yes", np.bool_(True), np.bool_(False), 1.0]))


def option(allowed):
    return st.one_of(*([st.sampled_from(allowed)] * 4),
                     st.sampled_from([None, 3, "", "Modal", "modal ", "controllable", "AUTO", b"auto",
                                      ["modal"], "exact\x00", "é"]))


# --------------------------------------------------------------------------------------
# strategies: exact numbers
# --------------------------------------------------------------------------------------

def _huge_int():
    return st.builds(lambda k, sign, r: sign * (10 ** k + r), st.integers(20, 300), st.sampled_from([1, -1]),
                     st.integers(0, 10 ** 6))


EXACT_SMALL = st.one_of(
    st.integers(-9, 9),
    st.builds(Fraction, st.integers(-50, 50), st.integers(1, 50)),
    st.sampled_from(["0.25", "-1/3", " 3 ", "1e-3", "7", "-0.125", "2/4"]),
    st.sampled_from([np.int64(3), np.int32(-2), np.uint8(5)]),
)
EXACT_HUGE = st.one_of(
    EXACT_SMALL,
    _huge_int(),
    st.builds(lambda p, q: Fraction(p, q), st.integers(-(10 ** 6), 10 ** 6), _huge_int().map(abs)),
    st.builds(lambda p, q: Fraction(p, q), _huge_int(), _huge_int().map(abs)),
    st.sampled_from(["1e300", "-1e-300", "123456789012345678901234567890/7", Decimal("1e-300"), Decimal("2.5")]),
)
EXACT_BAD = st.sampled_from([1.5, 0.0, nan, inf, "abc", "1/0", "", None, True, np.float64(1.0), 1 + 1j,
                             Decimal("NaN"), Decimal("Infinity"), [1], object(), "0x10", "1/2/3",
                             10 ** 2000, Fraction(1, 10 ** 2000), "1" + "0" * 9000, "1e100000"]).map(copy.deepcopy)


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
    layout = draw(st.sampled_from(["list", "list", "object", "object", "strided", "transposed", "readonly",
                                   "int64"]))
    if layout == "list":
        return arr.tolist()
    if layout == "strided":
        return _strided(arr)
    if layout == "transposed":
        return np.ascontiguousarray(arr.T).T
    if layout == "readonly":
        arr.flags.writeable = False
        return arr
    if layout == "int64" and all(isinstance(v, int) and abs(v) < 2 ** 62 for v in flat):
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


def _degree(den):
    """The order of the realization of exact ``den``: its length after leading zeros are
    dropped (None when it cannot be told)."""
    try:
        arr = np.asarray(den, dtype=object).reshape(-1)
        values = [Fraction(v.strip()) if isinstance(v, str) else Fraction(int(v)) if isinstance(v, np.integer)
                  else Fraction(v) for v in arr]
    except Exception:
        return None
    nz = [i for i, v in enumerate(values) if v != 0]
    return None if not nz else len(values) - 1 - nz[0]


# --------------------------------------------------------------------------------------
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
    n = _degree(den)  # before the call: the inputs are overwritten after it
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
# recovery
# --------------------------------------------------------------------------------------


@CI
@given(data=st.data(), exact=flag(), method=option(METHODS))
def test_faddeev_leverrier_and_characteristic_polynomial_float(data, exact, method):
    n = data.draw(ORDERS)
    a = data.draw(fuzz_float_arg((n, n)))
    if exact is True or (isinstance(exact, np.bool_) and exact):
        exact = False
    out = attempt(sw.faddeev_leverrier, a, exact=exact, method=method)
    if out is not FAILED:
        n = np.shape(a)[0]  # as accepted (a drawn "wrong" shape may be square too)
        coeffs, adj = out
        check_array(coeffs, (n + 1,))
        check_array(adj, (n, n, n))
        assert coeffs[0] == 1.0
    coeffs = attempt(sw.characteristic_polynomial, a, exact=exact, method=method)
    if coeffs is not FAILED:
        check_array(coeffs, (np.shape(a)[0] + 1,))


@CI_SLOW
@given(data=st.data())
def test_faddeev_leverrier_and_characteristic_polynomial_exact(data):
    n = data.draw(st.sampled_from([0, 1, 2, 3, 4, 5, 6, 8, 12]))
    a = data.draw(fuzz_exact_arg((n, n)))
    out = attempt(sw.faddeev_leverrier, a, exact=True)
    if out is not FAILED:
        n = np.shape(a)[0]  # as accepted
        coeffs, adj = out
        check_array(coeffs, (n + 1,), exact=True)
        check_array(adj, (n, n, n), exact=True)
        assert coeffs[0] == 1
    coeffs = attempt(sw.characteristic_polynomial, a, exact=True)
    if coeffs is not FAILED:
        check_array(coeffs, (np.shape(a)[0] + 1,), exact=True)


@CI
@given(model=float_model(), method=option(METHODS), accuracy=flag())
def test_transfer_function_float(model, method, accuracy):
    (a, b, c, d), _ = model
    out = attempt(sw.transfer_function, a, b, c, d, method=method, return_accuracy=accuracy)
    if out is FAILED:
        return
    n, m, p = model_dims(a, b, c)
    num, den = out[0], out[1]
    check_array(num, (p, m, n + 1))
    check_array(den, (n + 1,))
    if accuracy is True or (isinstance(accuracy, np.bool_) and accuracy):
        assert len(out) == 3 and out[2]["method"]
    else:
        assert len(out) == 2


@CI_SLOW
@given(model=exact_model(), accuracy=st.booleans())
def test_transfer_function_exact(model, accuracy):
    (a, b, c, d), _ = model
    out = attempt(sw.transfer_function, a, b, c, d, exact=True, return_accuracy=accuracy)
    if out is FAILED:
        return
    n, m, p = model_dims(a, b, c)
    check_array(out[0], (p, m, n + 1), exact=True)
    check_array(out[1], (n + 1,), exact=True)


@CI
@given(data=st.data())
def test_transfer_function_spread_eigenvalues_all_methods(data):
    """Valid, badly spread models (the exact fallback's territory): every method succeeds or
    says why (overflow), with finite results."""
    n = data.draw(st.integers(1, 12))
    decades = data.draw(st.floats(0, 12))
    rng = np.random.default_rng(data.draw(st.integers(0, 2 ** 32 - 1)))
    t = rng.standard_normal((n, n)) + n * np.eye(n)
    poles = -(10.0 ** np.linspace(-decades / 2, decades / 2, n))
    a = t @ np.diag(poles) @ np.linalg.inv(t)
    b, c, d = rng.standard_normal((n, 2)), rng.standard_normal((1, n)), rng.standard_normal((1, 2))
    layout = data.draw(st.sampled_from(LAYOUTS))
    for method in METHODS:
        out = attempt(sw.transfer_function, lay_out(a.copy(), layout), b.copy(), c.copy(), d.copy(), method=method,
                      return_accuracy=True)
        if out is not FAILED:
            check_array(out[0], (1, 2, n + 1))
            check_array(out[1], (n + 1,))
    assert attempt(sw.transfer_function, a.copy(), b.copy(), c.copy(), d.copy()) is not FAILED


@CI
@given(data=st.data(), exact=st.booleans())
def test_controllability_and_observability_matrices(data, exact):
    n = data.draw(ORDERS if not exact else st.sampled_from([0, 1, 2, 3, 4, 6]))
    m = data.draw(WIDTHS)
    arg = fuzz_exact_arg if exact else fuzz_float_arg
    a, b = data.draw(arg((n, n))), data.draw(arg((n, m)))
    k = attempt(sw.controllability_matrix, a, b, exact=exact)
    if k is not FAILED:
        n, m = np.shape(b)  # as accepted (a drawn "wrong" shape may still fit)
        check_array(k, (n, n * m), exact=exact)
    a = data.draw(arg((n, n)))
    c = data.draw(arg((m, n)))
    o = attempt(sw.observability_matrix, a, c, exact=exact)
    if o is not FAILED:
        p, n = np.shape(c)
        check_array(o, (n * p, n), exact=exact)


# --------------------------------------------------------------------------------------
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
# structure
# --------------------------------------------------------------------------------------


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
        check_staircase(s, n, np.shape(b)[1] if b_in is not None else None,
                        np.shape(c)[0] if c_in is not None else None)
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
    rng = np.random.default_rng(draw(st.integers(0, 2 ** 32 - 1)))
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
# interop
# --------------------------------------------------------------------------------------

sympy = pytest.importorskip("sympy")
S, T = sympy.Symbol("s"), sympy.Symbol("t")

SYMPY_COEFFS = st.one_of(
    st.integers(-9, 9).map(sympy.Integer),
    st.builds(lambda p, q: sympy.Rational(p, q), st.integers(-50, 50), st.integers(1, 50)),
    _huge_int().map(sympy.Integer),
    st.builds(lambda p, q: sympy.Rational(p, q), st.integers(-9, 9), _huge_int().map(abs)),
    st.sampled_from([sympy.Float(0.1), sympy.Float("1e400"), sympy.pi, sympy.sqrt(2), sympy.I, sympy.nan,
                     sympy.oo, sympy.zoo, sympy.Integer(10) ** 400, sympy.Float("1e-400"), T, sympy.E]),
)


@st.composite
def sympy_polynomial(draw, degree):
    coeffs = draw(st.lists(st.integers(-9, 9).map(sympy.Integer) | SYMPY_COEFFS if degree <= 4
                           else st.integers(-9, 9).map(sympy.Integer), min_size=degree + 1, max_size=degree + 1))
    return sum(c * S ** (degree - i) for i, c in enumerate(coeffs))


@st.composite
def sympy_expression(draw):
    dn = draw(st.integers(0, 12))
    num = draw(sympy_polynomial(draw(st.integers(0, dn + 1))))
    den = draw(sympy_polynomial(dn))
    kind = draw(st.sampled_from(["ratio"] * 5 + ["pair", "poly_pair", "sum", "delay", "root", "string",
                                                 "constant", "other", "bad_pair", "matrix", "z_inverse"]))
    if kind == "ratio":
        return num / den if den != 0 else num / (den + 1)
    if kind == "pair":
        return (num, den)
    if kind == "poly_pair":
        try:
            return (sympy.Poly(num, S), sympy.Poly(den, S))
        except Exception:
            reject()
    if kind == "sum":
        return num / (den + 1) + 1 / (S + 2)
    if kind == "delay":
        return sympy.exp(-S) / (S + 1)
    if kind == "root":
        return 1 / (sympy.sqrt(S) + 1)
    if kind == "string":
        return "1/(s+1)"
    if kind == "constant":
        return draw(SYMPY_COEFFS)
    if kind == "other":
        return 1 / (S + T)
    if kind == "bad_pair":
        return (num, den, num)
    if kind == "matrix":
        return sympy.Matrix([[1 / (S + 1)]])
    return 1 / (1 - S ** -1 / 2)


@CI_SLOW
@given(expr=sympy_expression(),
       symbol=st.sampled_from([S, S, S, S, T, "s", None, sympy.Integer(1)]),
       form=option(FORMS), exact=flag())
def test_realize_expression(expr, symbol, form, exact):
    r = attempt(sw.realize_expression, expr, symbol, form, exact=exact)
    if r is not FAILED:
        check_realization(r, m=1, p=1)


scipy_signal = pytest.importorskip("scipy.signal")


@st.composite
def scipy_system(draw):
    """A scipy.signal system (its arrays returned too, to be overwritten after the call)."""
    kind = draw(st.sampled_from(["ss", "ss", "tf", "tf", "tf_mimo", "zpk", "dss", "dtf", "junk"]))
    n = draw(st.sampled_from([0, 1, 2, 3, 4, 6, 8, 12]))
    if kind in ("ss", "dss"):
        m, p = draw(st.integers(1, 2)), draw(st.integers(1, 2))
        mats = [np.array(draw(float_array(s, layout="c")), dtype=float) for s in ((n, n), (n, m), (p, n), (p, m))]
        build = lambda: scipy_signal.StateSpace(*mats, **({"dt": 0.1} if kind == "dss" else {}))  # noqa: E731
        held = lambda x: [x.A, x.B, x.C, x.D]  # noqa: E731
    elif kind in ("tf", "dtf", "tf_mimo"):
        k = draw(st.integers(1, n + 2))
        shape = (draw(st.integers(2, 3)), k) if kind == "tf_mimo" else (k,)
        num = np.array(draw(float_array(shape, layout="c")), dtype=float)
        den = np.array(draw(float_array((n + 1,), layout="c")), dtype=float)
        build = lambda: scipy_signal.TransferFunction(num, den, **({"dt": True} if kind == "dtf" else {}))  # noqa: E731
        held = lambda x: [x.num, x.den]  # noqa: E731
    elif kind == "zpk":
        z = draw(hnp.arrays(np.complex128, draw(st.integers(0, 4)),
                            elements=st.complex_numbers(max_magnitude=1e3) | st.just(complex(nan, 0))))
        p = draw(hnp.arrays(np.complex128, n, elements=st.complex_numbers(max_magnitude=1e3)))
        if draw(st.booleans()):  # conjugate pairs
            z, p = np.concatenate([z, z.conj()]), np.concatenate([p, p.conj()])
        k = draw(REGIMES[draw(st.sampled_from(REGIME_NAMES))])
        build = lambda: scipy_signal.ZerosPolesGain(z, p, k)  # noqa: E731
        held = lambda x: [x.zeros, x.poles]  # noqa: E731
    else:
        return draw(st.sampled_from(JUNK + [(np.ones(1), np.ones(2))]).map(copy.deepcopy)), []
    try:  # SciPy's own constructors refuse some data: not statewright's concern
        with warnings.catch_warnings(), np.errstate(all="ignore"):
            warnings.simplefilter("ignore")
            system = build()
    except Exception:
        reject()
    return system, held(system)


@CI
@given(system=scipy_system(), form=st.one_of(st.none(), st.none(), option(FORMS)))
def test_from_scipy(system, form):
    sys_obj, arrays = system
    r = attempt(sw.from_scipy, sys_obj, form, mutable=arrays)
    if r is not FAILED:
        check_realization(r, exact=False)


# --------------------------------------------------------------------------------------
# Realization and its methods
# --------------------------------------------------------------------------------------

POINTS = st.one_of(
    st.complex_numbers(max_magnitude=1e6, allow_nan=False, allow_infinity=False),
    st.floats(allow_nan=False, allow_infinity=False),
    st.sampled_from([0, 1j, -1.0, 1e300, 1e-300, 1e300j, nan, inf, complex(nan, 0), 10 ** 400, -(10 ** 400),
                     "1j", "abc", None, [1j, 2.0], [[1.0]], np.array([]), np.array([1e-300, 1e300]),
                     np.arange(5.0)[::2], Fraction(1, 3), Decimal("2"), b"1", [1, "x"], True]).map(copy.deepcopy),
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
@given(data=transfer_matrix_data(), form=option(TRANSFER_MATRIX_FORMS), minimal=flag(), tol=bad_tol())
def test_realize_transfer_matrix_float(data, form, minimal, tol):
    num, den, _ = data
    r = attempt(sw.realize_transfer_matrix, num, den, form, minimal=minimal, tol=tol)
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


@st.composite
def markov_data(draw):
    k = draw(st.sampled_from([0, 1, 2, 3, 5, 8, 13, 21]))
    p, m = draw(WIDTHS), draw(WIDTHS)
    shape = draw(st.sampled_from([(k, p, m), (k, p, m), (k,)]))
    return draw(fuzz_float_arg(shape))


def bad_order():
    return st.one_of(st.none(), st.none(), st.integers(-2, 12),
                     st.sampled_from([1.5, "2", True, 10 ** 30, np.int64(2), [2], nan]))


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
    rng = np.random.default_rng(draw(st.integers(0, 2 ** 32 - 1)))
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
# no hang on huge exact data
# --------------------------------------------------------------------------------------

HUGE_EXACT_SCRIPT = """
import statewright as sw
try:
    sw.realize([10 ** 1000000], [1, 2], exact=True)
except sw.ModelError as exc:
    assert "internal error" not in str(exc)
"""


def run_within(script, seconds, what):
    """Run `script` in a fresh interpreter (so that a hang is cut off); fail if it takes
    more than `seconds` or exits with an error."""
    try:
        proc = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, timeout=seconds)
    except subprocess.TimeoutExpired:
        pytest.fail(f"{what} took more than {seconds} s")
    assert proc.returncode == 0, proc.stderr


def test_exact_huge_integer_finishes():
    """A one-state exact realization with a million-digit numerator (Python itself builds
    and prints such an int in well under a second) either succeeds or is refused with
    ModelError within 10 s: "no input, however bad, hangs". Run in a subprocess so that a
    hang is cut off."""
    run_within(HUGE_EXACT_SCRIPT, 10, "realize([10**1000000], [1, 2], exact=True)")


LARGE_EXACT_SCRIPT = """
import random
from fractions import Fraction
import statewright as sw
rng = random.Random(1)
a = [[Fraction(rng.getrandbits(4000) + 1, rng.getrandbits(4000) + 1) for _ in range(6)] for _ in range(6)]
try:
    sw.characteristic_polynomial(a, exact=True)
except sw.ModelError as exc:
    assert "internal error" not in str(exc)
"""


def test_exact_entries_within_the_size_limit_finish():
    """Exact entries just inside the per-entry size limit (4000-bit numerators and
    denominators, 36 of them): the characteristic polynomial of this 6 x 6 matrix either
    comes back or is refused with ModelError within 20 s."""
    run_within(LARGE_EXACT_SCRIPT, 20, "characteristic_polynomial(6 x 6 of 4000-bit fractions, exact=True)")

"""Property-based tests: realization round trips, and bad input always raising ModelError
(with a message that names the argument)."""

import math
from fractions import Fraction

import numpy as np
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st
from hypothesis.extra import numpy as hnp

import statewright as sw
from swtest_helpers import ALL_FORMS, COMPANION_FORMS, EPS, names_argument

SETTINGS = settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
SETTINGS_GARBAGE = settings(
    max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much]
)

# Round-trip tolerances, relative to the coefficient scale ||den||_1 * ||num||_1 of the
# monic-normalised input (both 1-norms are >= the largest coefficient). The four direct
# companion forms cost one or two roundings per coefficient (observed worst ~6e-17 over
# 1500 random models): 1e-15. The Markov-parameter forms (controllability, observability)
# carry h_k that grow like |pole|^k (observed worst ~1.3e-15): 2e-14. The denominator of
# every companion form is -a_i copied exactly, so it must come back to within an ulp.
ROUND_TRIP_RTOL = {
    "controllable_canonical": 1e-15,
    "observable_canonical": 1e-15,
    "controller": 1e-15,
    "observer": 1e-15,
    "controllability": 2e-14,
    "observability": 2e-14,
}
# The modal form's B and C come from eigenvectors: its tolerance (times n + 1) is scaled by
# the eigenvector condition number reported in r.info (observed worst ~2e-15 * condition).
MODAL_RTOL = 1e-14


# --------------------------------------------------------------------------------------
# strategies
# --------------------------------------------------------------------------------------

GRID = 0.25  # poles on a jittered grid: separated by at least GRID - 2 * JITTER
JITTER = 0.04


@st.composite
def poles(draw, n):
    """n poles, real or in conjugate pairs, |Re| <= 3, 0.25 <= Im <= 3, separated by >= 0.17."""
    n_pairs = draw(st.integers(0, n // 2))
    n_real = n - 2 * n_pairs
    jit = st.floats(-JITTER, JITTER, allow_nan=False)
    real_idx = draw(st.lists(st.integers(-12, 12), min_size=n_real, max_size=n_real, unique=True))
    pair_idx = draw(
        st.lists(st.tuples(st.integers(-12, 12), st.integers(1, 12)), min_size=n_pairs, max_size=n_pairs, unique=True)
    )
    out = [k * GRID + draw(jit) for k in real_idx]
    for kr, kw in pair_idx:
        z = complex(kr * GRID + draw(jit), kw * GRID + draw(jit))
        out += [z, z.conjugate()]
    return out


@st.composite
def transfer_functions(draw, max_order=10):
    """(num, den) of order 1..max_order, stable or not, non-monic, deg num <= deg den."""
    n = draw(st.integers(1, max_order))
    p = draw(poles(n))
    lead = draw(st.floats(0.25, 4.0)) * draw(st.sampled_from([-1.0, 1.0]))
    den = lead * np.real(np.poly(p))
    m = draw(st.integers(0, n))
    zeros = draw(poles(m)) if m else []
    gain = draw(st.floats(0.1, 10.0)) * draw(st.sampled_from([-1.0, 1.0]))
    num = gain * np.real(np.atleast_1d(np.poly(zeros))) if m else np.array([gain])
    return num, den


def _normalised(num, den):
    den = np.asarray(den, float)
    num = np.asarray(num, float)
    n = len(den) - 1
    return np.concatenate([np.zeros(n + 1 - len(num)), num]) / den[0], den / den[0]


# --------------------------------------------------------------------------------------
# round trips
# --------------------------------------------------------------------------------------


@pytest.mark.parametrize("form", COMPANION_FORMS)
@SETTINGS
@given(tf=transfer_functions())
def test_round_trip_companion_forms(form, tf):
    # (identity) realize(form) -> transfer_function returns the monic-normalised input
    num, den = tf
    enum, eden = _normalised(num, den)
    r = sw.realize(num, den, form=form)
    n = len(den) - 1
    assert r.n_states == n
    gnum, gden = r.transfer_function()
    assert gnum.shape == (1, 1, n + 1) and gden.shape == (n + 1,)
    scale = np.sum(np.abs(eden)) * np.sum(np.abs(enum))
    tol = ROUND_TRIP_RTOL[form] * scale
    assert np.max(np.abs(gden - eden)) <= EPS * np.sum(np.abs(eden)), (gden, eden)
    assert np.max(np.abs(gnum[0, 0] - enum)) <= tol, (gnum[0, 0], enum, scale)


@SETTINGS
@given(tf=transfer_functions(max_order=8))
def test_round_trip_modal(tf):
    # (identity) the modal form realizes the same transfer function, within its conditioning
    num, den = tf
    enum, eden = _normalised(num, den)
    try:
        r = sw.realize(num, den, form="modal")
    except sw.ModelError as err:
        # refused only for ill-conditioned eigenvectors, and says so
        assert "modal" in str(err)
        return
    cond = r.info["eigenvector_condition"]
    assert 1.0 <= cond <= r.info["condition_limit"]
    gnum, gden = r.transfer_function()
    scale = np.sum(np.abs(eden)) * np.sum(np.abs(enum))
    np.testing.assert_allclose(gden, eden, rtol=0, atol=MODAL_RTOL * cond * np.sum(np.abs(eden)) * len(eden))
    np.testing.assert_allclose(gnum[0, 0], enum, rtol=0, atol=MODAL_RTOL * cond * scale * len(eden))


@SETTINGS
@given(tf=transfer_functions(max_order=6), form=st.sampled_from(COMPANION_FORMS))
def test_round_trip_exact(tf, form):
    # (identity) in exact arithmetic the round trip is exact
    num, den = tf
    fnum = [Fraction(float(x)).limit_denominator(1000) for x in num]
    fden = [Fraction(float(x)).limit_denominator(1000) for x in den]
    assume(fden[0] != 0)
    r = sw.realize(fnum, fden, form=form, exact=True)
    gnum, gden = r.transfer_function()
    n = len(fden) - 1
    lead = fden[0]
    expected_den = [x / lead for x in fden]
    while fnum and fnum[0] == 0:
        fnum.pop(0)
    expected_num = [Fraction(0)] * (n + 1 - len(fnum)) + [x / lead for x in fnum]
    assert list(gden) == expected_den
    assert list(gnum[0, 0]) == expected_num


@SETTINGS
@given(tf=transfer_functions(max_order=8), form=st.sampled_from(ALL_FORMS))
def test_poles_are_roots_of_den(tf, form):
    # (numpy.roots reference)
    num, den = tf
    try:
        r = sw.realize(num, den, form=form)
    except sw.ModelError:
        assume(False)
    got = np.sort_complex(np.asarray(r.poles(), dtype=complex))
    ref = np.sort_complex(np.roots(den))
    # simple poles, separated by >= 0.17: match each reference pole to its nearest
    for z in ref:
        assert np.min(np.abs(got - z)) <= 1e-6 * max(1.0, abs(z)), (got, ref)
    assert len(got) == len(ref)


# --------------------------------------------------------------------------------------
# known-bad input classes: ModelError naming the argument
# --------------------------------------------------------------------------------------


def _raises_naming(fn, name, *, contains=None):
    with pytest.raises(sw.ModelError) as err:
        fn()
    msg = str(err.value)
    assert "panicked" not in msg and "internal error" not in msg, msg
    assert names_argument(msg, name), f"message does not name {name!r}: {msg!r}"
    if contains is not None:
        assert contains in msg, f"{contains!r} not in {msg!r}"
    return msg


def test_model_error_is_value_error():
    assert issubclass(sw.ModelError, ValueError)


BAD_VALUES = st.sampled_from([math.nan, math.inf, -math.inf])


@SETTINGS
@given(
    n=st.integers(1, 8),
    data=st.data(),
    bad=BAD_VALUES,
    which=st.sampled_from(["num", "den"]),
    form=st.sampled_from(ALL_FORMS),
)
def test_nonfinite_num_den(n, data, bad, which, form):
    den = [1.0] + [float(i + 1) for i in range(n)]
    num = [1.0] * data.draw(st.integers(1, n + 1))
    target = num if which == "num" else den
    target[data.draw(st.integers(0, len(target) - 1))] = bad
    _raises_naming(lambda: sw.realize(num, den, form=form), which)


def _model(n, m, p):
    rng = np.random.default_rng(n + 10 * m + 100 * p)
    return [
        rng.standard_normal((n, n)),
        rng.standard_normal((n, m)),
        rng.standard_normal((p, n)),
        rng.standard_normal((p, m)),
    ]


@SETTINGS
@given(
    n=st.integers(1, 6),
    m=st.integers(1, 3),
    p=st.integers(1, 3),
    which=st.integers(0, 3),
    data=st.data(),
    bad=BAD_VALUES,
)
def test_nonfinite_abcd(n, m, p, which, data, bad):
    mats = _model(n, m, p)
    target = mats[which]
    i = data.draw(st.integers(0, target.shape[0] - 1))
    j = data.draw(st.integers(0, target.shape[1] - 1))
    target[i, j] = bad
    name = "abcd"[which]
    _raises_naming(lambda: sw.transfer_function(*mats), name)
    if which == 0:
        _raises_naming(lambda: sw.characteristic_polynomial(mats[0]), "a")
        _raises_naming(lambda: sw.faddeev_leverrier(mats[0]), "a")
        _raises_naming(lambda: sw.controllability_matrix(mats[0], mats[1]), "a")
    if which == 1:
        _raises_naming(lambda: sw.controllability_matrix(mats[0], mats[1]), "b")
    if which == 2:
        _raises_naming(lambda: sw.observability_matrix(mats[0], mats[2]), "c")


@SETTINGS
@given(
    n=st.integers(1, 6),
    m=st.integers(1, 3),
    p=st.integers(1, 3),
    which=st.integers(0, 3),
    delta=st.integers(1, 3),
    axis=st.integers(0, 1),
)
def test_shape_mismatch(n, m, p, which, delta, axis):
    mats = _model(n, m, p)
    shape = list(mats[which].shape)
    if which == 0:
        shape[axis] += delta  # non-square a
    elif which == 1:
        shape[0] += delta  # b rows != n (b's columns define m)
    elif which == 2:
        shape[1] += delta  # c columns != n
    else:
        shape[axis] += delta  # d not p x m
    mats[which] = np.ones(shape)
    name = "abcd"[which]
    _raises_naming(lambda: sw.transfer_function(*mats), name)
    if which == 0:
        _raises_naming(lambda: sw.characteristic_polynomial(mats[0]), "a")
        _raises_naming(lambda: sw.faddeev_leverrier(mats[0]), "a")
    if which == 1:
        _raises_naming(lambda: sw.controllability_matrix(mats[0], mats[1]), "b")
    if which == 2:
        _raises_naming(lambda: sw.observability_matrix(mats[0], mats[2]), "c")


@SETTINGS
@given(n=st.integers(0, 5), extra=st.integers(1, 3), form=st.sampled_from(ALL_FORMS))
def test_improper(n, extra, form):
    den = [1.0] * (n + 1)
    num = [1.0] * (n + 1 + extra)
    msg = _raises_naming(lambda: sw.realize(num, den, form=form), "num")
    assert "improper" in msg


@SETTINGS
@given(k=st.integers(0, 5), form=st.sampled_from(ALL_FORMS), exact=st.booleans())
def test_zero_or_empty_den(k, form, exact):
    assume(not (exact and form == "modal"))
    den = [0] * k
    _raises_naming(lambda: sw.realize([1], den, form=form, exact=exact), "den")


@pytest.mark.parametrize("exact", [False, True])
def test_empty_num(exact):
    _raises_naming(lambda: sw.realize([], [1, 2], exact=exact), "num")


@SETTINGS
@given(form=st.text(max_size=30))
def test_unknown_form(form):
    assume(form not in ALL_FORMS)
    _raises_naming(lambda: sw.realize([1.0], [1.0, 2.0], form=form), "form")


@pytest.mark.parametrize("form", [None, 3, b"controller", ["controller"], "Controller", " modal"])
def test_form_wrong_type_or_spelling(form):
    _raises_naming(lambda: sw.realize([1.0], [1.0, 2.0], form=form), "form")


@pytest.mark.parametrize("method", ["fast", "", None, 1, "Exact"])
def test_unknown_method(method):
    a = np.eye(2)
    _raises_naming(lambda: sw.characteristic_polynomial(a, method=method), "method")
    _raises_naming(lambda: sw.faddeev_leverrier(a, method=method), "method")
    _raises_naming(
        lambda: sw.transfer_function(a, np.ones((2, 1)), np.ones((1, 2)), np.zeros((1, 1)), method=method), "method"
    )


WRONG_TYPES = ["abc", {"x": 1}, None, object(), [[1, 2], [3]], b"\x00\x01", 1 + 2j, [1 + 1j, 2]]


@pytest.mark.parametrize("bad", WRONG_TYPES, ids=lambda v: type(v).__name__)
@pytest.mark.parametrize("which", ["num", "den"])
def test_wrong_types_num_den(bad, which):
    args = {"num": [1.0], "den": [1.0, 2.0]}
    args[which] = bad
    _raises_naming(lambda: sw.realize(args["num"], args["den"]), which)


@pytest.mark.parametrize("bad", WRONG_TYPES + [[[[1.0]]]], ids=lambda v: type(v).__name__)
@pytest.mark.parametrize("which", [0, 1, 2, 3])
def test_wrong_types_abcd(bad, which):
    mats = _model(2, 1, 1)
    mats[which] = bad
    _raises_naming(lambda: sw.transfer_function(*mats), "abcd"[which])


@pytest.mark.parametrize("bad", WRONG_TYPES + [[1.0, 2.0], [[[1.0]]]], ids=lambda v: type(v).__name__)
def test_wrong_types_a_alone(bad):
    _raises_naming(lambda: sw.characteristic_polynomial(bad), "a")
    _raises_naming(lambda: sw.faddeev_leverrier(bad), "a")


def test_num_two_dimensional_refused():
    _raises_naming(lambda: sw.realize([[1.0, 2.0]], [1.0, 2.0, 3.0]), "num")
    _raises_naming(lambda: sw.realize([1.0], [[1.0, 2.0]]), "den")


@SETTINGS
@given(
    x=st.floats(allow_nan=False, allow_infinity=False).filter(lambda v: v != int(v)),
    which=st.sampled_from(["num", "den"]),
)
def test_exact_refuses_floats(x, which):
    args = {"num": [1, 2], "den": [1, 3, 5]}
    args[which] = args[which] + [x] if which == "den" else [x, 1]
    _raises_naming(lambda: sw.realize(args["num"], args["den"], exact=True), which)


@pytest.mark.parametrize("x", [0.5, 1.0, np.float64(2.0), np.float32(0.25)])
def test_exact_refuses_float_types_even_integral(x):
    # floats are refused in exact mode, whatever their value (1.0 included)
    _raises_naming(lambda: sw.realize([x], [1, 2], exact=True), "num")
    _raises_naming(lambda: sw.characteristic_polynomial([[1, x], [0, 1]], exact=True), "a")
    mats = [[[1, 0], [0, 1]], [[1], [0]], [[0, 1]], [[x]]]
    _raises_naming(lambda: sw.transfer_function(*mats, exact=True), "d")
    _raises_naming(lambda: sw.controllability_matrix([[1, 0], [0, 1]], [[x], [1]], exact=True), "b")


@pytest.mark.parametrize("bad", ["1/0", "abc", "", "1/2/3", "0x10", "nan", "inf", "1e", "--1", "1 / 0"])
@pytest.mark.parametrize("which", ["num", "den"])
def test_exact_malformed_strings(bad, which):
    args = {"num": ["1", "2"], "den": ["1", "3", "5"]}
    args[which] = args[which][:-1] + [bad]
    _raises_naming(lambda: sw.realize(args["num"], args["den"], exact=True), which)


@pytest.mark.parametrize("bad", ["1/0", "abc", "nan"])
def test_exact_malformed_strings_matrices(bad):
    a = [["1", "0"], ["0", bad]]
    _raises_naming(lambda: sw.characteristic_polynomial(a, exact=True), "a")
    _raises_naming(lambda: sw.transfer_function(a, [[1], [0]], [[0, 1]], [[0]], exact=True), "a")
    _raises_naming(lambda: sw.transfer_function([[1, 0], [0, 1]], [[1], [0]], [[0, bad]], [[0]], exact=True), "c")


def test_modal_exact_refused():
    _raises_naming(lambda: sw.realize([1], [1, 3, 2], form="modal", exact=True), "form")


def test_overflow_is_model_error():
    # finite data whose normalisation overflows float64
    with pytest.raises(sw.ModelError):
        sw.realize([1e300], [1e-300, 1.0])
    # eigenvalues 1e200 (three times): c_2 = 3e400 overflows. (A full matrix of 1e200 would
    # not do: its coefficients are exactly [1, -3e200, 0, 0].)
    with pytest.raises(sw.ModelError):
        sw.characteristic_polynomial(np.diag([1e200, 1e200, 1e200]))
    with pytest.raises(sw.ModelError):
        sw.transfer_function(np.diag([1e200, 1e200]), np.ones((2, 1)), np.ones((1, 2)), np.zeros((1, 1)))
    np.testing.assert_array_equal(sw.characteristic_polynomial(np.full((3, 3), 1e200)), [1.0, -3e200, 0.0, 0.0])


def test_markov_forms_overflow_is_model_error():
    # finite data, finite normalisation, but the Markov parameters h_k overflow:
    # den = [tiny, 0, 1, 0] makes a_1 ~ 2.3e192 and h_3 = -a_1 h_1 ~ -5e384.
    num, den = [1.0, 0.0, 0.0], [4.38850848097551e-193, 0.0, 1.0, 0.0]
    for form in ("controllability", "observability"):
        try:
            r = sw.realize(num, den, form=form)
        except sw.ModelError as err:
            assert "internal error" not in str(err)
            continue
        for part in r:
            assert np.all(np.isfinite(part)), (form, part)


# --------------------------------------------------------------------------------------
# random garbage: success (with finite results) or ModelError, nothing else
# --------------------------------------------------------------------------------------

scalars = st.one_of(
    st.none(),
    st.booleans(),
    st.integers(min_value=-(10**30), max_value=10**30),
    st.integers(min_value=-(10**400), max_value=10**400),
    st.floats(),
    st.floats(allow_nan=False, allow_infinity=False, min_value=-1e6, max_value=1e6),
    st.fractions(max_denominator=1000),
    st.text(max_size=6),
    st.sampled_from(["1/3", "0.1", "1/0", "-2", "1e3", "abc", "  7 ", "nan"]),
    st.complex_numbers(allow_nan=True),
)
garbage = st.recursive(
    scalars,
    lambda children: st.one_of(
        st.lists(children, max_size=5),
        st.dictionaries(st.text(max_size=3), children, max_size=2),
        st.tuples(children, children),
    ),
    max_leaves=20,
)
arrays = hnp.arrays(
    dtype=st.sampled_from([np.float64, np.float32, np.int64]),
    shape=hnp.array_shapes(min_dims=0, max_dims=3, min_side=0, max_side=4),
)
anything = st.one_of(garbage, arrays)
forms = st.one_of(st.sampled_from(ALL_FORMS), st.text(max_size=5), st.none())


def _check_finite_result(result):
    if isinstance(result, tuple):
        for part in result:
            _check_finite_result(part)
        return
    if isinstance(result, dict):
        return
    arr = np.asarray(result)
    if arr.dtype != object:
        assert np.all(np.isfinite(arr)), f"non-finite result {arr!r}"


def _ok_or_model_error(fn):
    try:
        result = fn()
    except sw.ModelError as err:
        # a panic in the core is reported as ModelError by the binding, but it is a bug
        assert "panicked" not in str(err) and "internal error" not in str(err), str(err)
        return None
    # any other exception propagates and fails the test
    if isinstance(result, sw.Realization):
        for part in result:
            _check_finite_result(part)
    else:
        _check_finite_result(result)
    return result


@SETTINGS_GARBAGE
@given(num=anything, den=anything, form=forms, exact=st.booleans())
def test_garbage_realize(num, den, form, exact):
    _ok_or_model_error(lambda: sw.realize(num, den, form=form, exact=exact))


@SETTINGS_GARBAGE
@given(tf=st.tuples(anything, anything), form=st.sampled_from(ALL_FORMS))
def test_garbage_realize_numeric_like(tf, form):
    num, den = tf
    _ok_or_model_error(lambda: sw.realize(num, den, form=form))


@SETTINGS_GARBAGE
@given(
    a=anything,
    b=anything,
    c=anything,
    d=anything,
    exact=st.booleans(),
    method=st.sampled_from(["auto", "recursion", "exact"]),
)
def test_garbage_transfer_function(a, b, c, d, exact, method):
    _ok_or_model_error(lambda: sw.transfer_function(a, b, c, d, exact=exact, method=method))


@SETTINGS_GARBAGE
@given(a=anything, exact=st.booleans(), method=st.sampled_from(["auto", "recursion", "exact"]))
def test_garbage_charpoly(a, exact, method):
    _ok_or_model_error(lambda: sw.characteristic_polynomial(a, exact=exact, method=method))
    _ok_or_model_error(lambda: sw.faddeev_leverrier(a, exact=exact, method=method))


@SETTINGS_GARBAGE
@given(
    n=st.integers(1, 5),
    m=st.integers(1, 3),
    vals=st.lists(st.floats(width=64), min_size=40, max_size=40),
    exact=st.booleans(),
)
def test_garbage_float_values_right_shapes(n, m, vals, exact):
    # right shapes, any float64 values (huge, tiny, subnormal, nan, inf)
    a = np.array(vals[: n * n] + [0.0] * max(0, n * n - len(vals))).reshape(n, n)
    b = np.resize(np.array(vals), (n, m))
    c = np.resize(np.array(vals[::-1]), (1, n))
    d = np.zeros((1, m))
    _ok_or_model_error(lambda: sw.transfer_function(a, b, c, d, exact=exact))
    _ok_or_model_error(lambda: sw.characteristic_polynomial(a))
    _ok_or_model_error(lambda: sw.controllability_matrix(a, b))
    _ok_or_model_error(lambda: sw.observability_matrix(a, c))
    for form in ALL_FORMS:
        _ok_or_model_error(lambda: sw.realize(vals[:n], vals[n : 2 * n + 1], form=form))

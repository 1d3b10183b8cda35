"""The Realization object and the array conventions: shapes, dtypes, no aliasing, pickling,
LaTeX display, evaluate, transform, poles, accepted input types."""

import pickle
from fractions import Fraction

import numpy as np
import pytest

import statewright as sw
from swtest_helpers import ALL_FORMS, COMPANION_FORMS, state_space_value, transfer_function_value

NUM = [1.0, -2.0, 0.5, 3.0]
DEN = [2.0, 1.0, 4.0, 3.0]
POINTS = np.array([0.1 + 1.0j, -0.5 + 0.25j, 2.0 + 0.0j, 0.0 - 3.0j])


def _mimo():
    rng = np.random.default_rng(42)
    return (
        rng.standard_normal((4, 4)),
        rng.standard_normal((4, 2)),
        rng.standard_normal((3, 4)),
        rng.standard_normal((3, 2)),
    )


def _assert_float_matrix(x, shape):
    assert isinstance(x, np.ndarray)
    assert x.dtype == np.float64
    assert x.ndim == 2 and x.shape == shape
    assert x.flags.c_contiguous


# --------------------------------------------------------------------------------------
# structure
# --------------------------------------------------------------------------------------


@pytest.mark.parametrize("form", ALL_FORMS)
def test_unpacking_and_attributes(form):
    r = sw.realize(NUM, DEN, form=form)
    A, B, C, D = r
    assert A is r.a or np.array_equal(A, r.a)
    np.testing.assert_array_equal(B, r.b)
    np.testing.assert_array_equal(C, r.c)
    np.testing.assert_array_equal(D, r.d)
    assert (r.n_states, r.n_inputs, r.n_outputs) == (3, 1, 1)
    _assert_float_matrix(r.a, (3, 3))
    _assert_float_matrix(r.b, (3, 1))
    _assert_float_matrix(r.c, (1, 3))
    _assert_float_matrix(r.d, (1, 1))
    assert len(list(r)) == 4


def test_one_state_still_two_dimensional():
    r = sw.realize([2.0], [1.0, 3.0])
    _assert_float_matrix(r.a, (1, 1))
    _assert_float_matrix(r.b, (1, 1))
    _assert_float_matrix(r.c, (1, 1))
    _assert_float_matrix(r.d, (1, 1))


def test_info_is_read_only_mapping():
    r = sw.realize(NUM, DEN, form="controller")
    assert len(r.info) == 0
    m = sw.realize(NUM, DEN, form="modal")
    assert "eigenvector_condition" in m.info and "condition_limit" in m.info
    with pytest.raises((TypeError, AttributeError)):
        m.info["eigenvector_condition"] = 0.0


def test_realization_is_frozen():
    r = sw.realize(NUM, DEN)
    with pytest.raises((AttributeError, TypeError)):
        r.a = np.zeros((3, 3))


def test_realization_constructor_mimo():
    a, b, c, d = _mimo()
    r = sw.Realization(a, b, c, d)
    assert (r.n_states, r.n_inputs, r.n_outputs) == (4, 2, 3)
    for x, y in zip(r, (a, b, c, d)):
        np.testing.assert_array_equal(x, y)


# --------------------------------------------------------------------------------------
# no aliasing
# --------------------------------------------------------------------------------------


def test_realize_does_not_alias_inputs():
    num = np.array(NUM)
    den = np.array(DEN)
    r = sw.realize(num, den)
    before = [x.copy() for x in r]
    num[:] = 99.0
    den[:] = -7.0
    for x, y in zip(r, before):
        np.testing.assert_array_equal(x, y)


def test_transfer_function_does_not_alias_inputs():
    a, b, c, d = (x.copy() for x in _mimo())
    num, den = sw.transfer_function(a, b, c, d)
    num0, den0 = num.copy(), den.copy()
    for x in (a, b, c, d):
        x[...] = 123.0
    np.testing.assert_array_equal(num, num0)
    np.testing.assert_array_equal(den, den0)


def test_zero_state_transfer_function_does_not_alias_d():
    # with 0 states num is D itself in value; it must still be a fresh array
    d = np.array([[1.0, 2.0]])
    num, den = sw.transfer_function(np.zeros((0, 0)), np.zeros((0, 2)), np.zeros((1, 0)), d)
    d[0, 0] = 50.0
    assert num[0, 0, 0] == 1.0


def test_realization_constructor_does_not_alias():
    a, b, c, d = (x.copy() for x in _mimo())
    r = sw.Realization(a, b, c, d)
    keep = [x.copy() for x in r]
    for x in (a, b, c, d):
        x[...] = 0.0
    for x, y in zip(r, keep):
        np.testing.assert_array_equal(x, y)


def test_transform_does_not_alias_T():
    r = sw.realize(NUM, DEN)
    T = np.array([[1.0, 2.0, 0.0], [0.0, 1.0, 3.0], [1.0, 0.0, 1.0]])
    r2 = r.transform(T)
    keep = [x.copy() for x in r2]
    T[...] = 0.0
    for x, y in zip(r2, keep):
        np.testing.assert_array_equal(x, y)
    # and r itself is unchanged by its transform
    np.testing.assert_array_equal(r.a, sw.realize(NUM, DEN).a)


def test_controllability_matrix_one_state_does_not_alias_b():
    # n = 1: [B] equals b in value; it must be a fresh array
    a = np.array([[2.0]])
    b = np.array([[3.0, 4.0]])
    K = sw.controllability_matrix(a, b)
    b[0, 0] = -1.0
    a[0, 0] = -1.0
    np.testing.assert_array_equal(K, [[3.0, 4.0]])
    c = np.array([[5.0]])
    O = sw.observability_matrix(np.array([[2.0]]), c)
    c[0, 0] = 0.0
    np.testing.assert_array_equal(O, [[5.0]])


def test_faddeev_leverrier_does_not_alias():
    a = np.array([[1.0, 2.0], [3.0, 4.0]])
    coeffs, adj = sw.faddeev_leverrier(a)
    keep = adj.copy()
    a[...] = 0.0
    np.testing.assert_array_equal(adj, keep)


# --------------------------------------------------------------------------------------
# pickling and display
# --------------------------------------------------------------------------------------


@pytest.mark.parametrize("form", ALL_FORMS)
def test_pickle_round_trip(form):
    r = sw.realize(NUM, DEN, form=form)
    r2 = pickle.loads(pickle.dumps(r))
    assert type(r2) is type(r)
    for x, y in zip(r, r2):
        np.testing.assert_array_equal(x, y)
        assert x.dtype == y.dtype
    assert dict(r2.info) == dict(r.info)
    np.testing.assert_array_equal(r2.evaluate(POINTS), r.evaluate(POINTS))


def test_pickle_exact_round_trip():
    r = sw.realize(["1/3", 2], [3, "0.5", 7], exact=True)
    r2 = pickle.loads(pickle.dumps(r))
    for x, y in zip(r, r2):
        assert y.dtype == object
        assert all(isinstance(v, Fraction) for v in y.ravel())
        assert (x == y).all()


def test_repr_latex_float():
    r = sw.realize(NUM, DEN)
    tex = r._repr_latex_()
    assert isinstance(tex, str)
    assert "\\begin" in tex


def test_repr_latex_exact_keeps_fractions():
    r = sw.realize([1], [3, 1], exact=True)  # A = [[-1/3]], C = [[1/3]]
    tex = r._repr_latex_()
    assert "\\begin" in tex
    assert "\\frac" in tex
    assert "frac{1}{3}" in tex
    assert "0.333" not in tex


def test_repr_is_string():
    r = sw.realize(NUM, DEN)
    assert isinstance(repr(r), str) and repr(r)


# --------------------------------------------------------------------------------------
# evaluate, transform, poles, transfer_function
# --------------------------------------------------------------------------------------


def test_evaluate_shapes_siso():
    r = sw.realize(NUM, DEN)
    v = r.evaluate(0.5 + 1.0j)
    assert isinstance(v, np.ndarray) and v.shape == (1, 1) and np.iscomplexobj(v)
    v = r.evaluate(2.0)  # a real scalar is a point too
    assert v.shape == (1, 1) and np.iscomplexobj(v)
    w = r.evaluate(POINTS)
    assert w.shape == (len(POINTS), 1, 1) and np.iscomplexobj(w)
    for k, s in enumerate(POINTS):
        np.testing.assert_allclose(w[k, 0, 0], transfer_function_value(NUM, DEN, s), rtol=1e-12)  # (identity)
    w = r.evaluate([0.5j, 1.0])
    assert w.shape == (2, 1, 1)


def test_evaluate_mimo():
    a, b, c, d = _mimo()
    r = sw.Realization(a, b, c, d)
    v = r.evaluate(0.3 + 0.8j)
    assert v.shape == (3, 2) and np.iscomplexobj(v)
    np.testing.assert_allclose(v, state_space_value(a, b, c, d, 0.3 + 0.8j), rtol=1e-12)  # (identity) dense solve
    w = r.evaluate(POINTS)
    assert w.shape == (len(POINTS), 3, 2)
    for k, s in enumerate(POINTS):
        np.testing.assert_allclose(w[k], state_space_value(a, b, c, d, s), rtol=1e-11, atol=1e-13)


def test_evaluate_zero_states():
    r = sw.realize([3.0], [2.0])
    np.testing.assert_array_equal(r.evaluate(POINTS), np.full((len(POINTS), 1, 1), 1.5 + 0j))


@pytest.mark.parametrize("form", ALL_FORMS)
def test_transform_keeps_transfer_function(form):
    # (identity) T^-1 A T, T^-1 B, C T, D has the same transfer function
    r = sw.realize(NUM, DEN, form=form)
    T = np.array([[2.0, 1.0, 0.0], [0.0, 1.0, -1.0], [1.0, 0.5, 3.0]])
    r2 = r.transform(T)
    Ti = np.linalg.inv(T)
    np.testing.assert_allclose(r2.a, Ti @ r.a @ T, rtol=1e-12, atol=1e-12)
    np.testing.assert_allclose(r2.b, Ti @ r.b, rtol=1e-12, atol=1e-12)
    np.testing.assert_allclose(r2.c, r.c @ T, rtol=1e-12, atol=1e-12)
    np.testing.assert_array_equal(r2.d, r.d)
    n1, d1 = r.transfer_function()
    n2, d2 = r2.transfer_function()
    np.testing.assert_allclose(d2, d1, rtol=1e-11, atol=1e-12)
    np.testing.assert_allclose(n2, n1, rtol=1e-11, atol=1e-12)
    np.testing.assert_allclose(r2.evaluate(POINTS), r.evaluate(POINTS), rtol=1e-11)


def test_transform_exact():
    # (identity) exact similarity keeps the exact transfer function
    r = sw.realize([1, 2], [1, 3, "1/2"], exact=True)
    T = np.array([[Fraction(1), Fraction(2)], [Fraction(1, 3), Fraction(1)]], dtype=object)
    r2 = r.transform(T)
    n1, d1 = r.transfer_function()
    n2, d2 = r2.transfer_function()
    assert (d1 == d2).all() and (n1 == n2).all()


def test_transform_refuses_singular_and_wrong_shape():
    r = sw.realize(NUM, DEN)
    with pytest.raises(sw.ModelError):
        r.transform(np.zeros((3, 3)))
    with pytest.raises(sw.ModelError):
        r.transform(np.eye(2))
    with pytest.raises(sw.ModelError):
        r.transform(np.array([[1.0, np.nan, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]]))


@pytest.mark.parametrize("form", ALL_FORMS)
def test_poles_equal_roots(form):
    # (numpy.roots reference)
    r = sw.realize(NUM, DEN, form=form)
    got = np.sort_complex(np.asarray(r.poles(), dtype=complex))
    ref = np.sort_complex(np.roots(DEN))
    np.testing.assert_allclose(got, ref, rtol=1e-10, atol=1e-12)


@pytest.mark.parametrize("form", COMPANION_FORMS)
def test_transfer_function_method_matches_function(form):
    r = sw.realize(NUM, DEN, form=form)
    n1, d1 = r.transfer_function()
    n2, d2 = sw.transfer_function(r.a, r.b, r.c, r.d)
    np.testing.assert_array_equal(n1, n2)
    np.testing.assert_array_equal(d1, d2)
    # (identity) the monic-normalised input
    np.testing.assert_allclose(d1, np.array(DEN) / DEN[0], rtol=1e-14)
    np.testing.assert_allclose(n1[0, 0], np.array(NUM) / DEN[0], rtol=1e-13, atol=1e-14)


# --------------------------------------------------------------------------------------
# accepted input types
# --------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    "num,den",
    [
        ([1, -2, 0, 3], [2, 1, 4, 3]),  # ints
        (np.array([1, -2, 0, 3], dtype=np.int32), np.array([2, 1, 4, 3], dtype=np.int64)),
        (np.array([1, -2, 0, 3], dtype=np.float32), np.array([2, 1, 4, 3], dtype=np.float32)),
        ((1, -2, 0, 3), (2.0, 1.0, 4.0, 3.0)),  # tuples
        (np.array([1.0, -2.0, 0.0, 3.0])[::1], np.array([9.0, 2.0, 9.0, 1.0, 9.0, 4.0, 9.0, 3.0])[1::2]),  # strided
    ],
)
def test_realize_input_types(num, den):
    r = sw.realize(num, den)
    ref = sw.realize([1.0, -2.0, 0.0, 3.0], [2.0, 1.0, 4.0, 3.0])
    for x, y in zip(r, ref):
        assert x.dtype == np.float64 and x.flags.c_contiguous
        np.testing.assert_array_equal(x, y)


def test_transfer_function_input_types():
    a, b, c, d = _mimo()
    ref_num, ref_den = sw.transfer_function(a, b, c, d)
    variants = [
        (np.asfortranarray(a), np.asfortranarray(b), np.asfortranarray(c), np.asfortranarray(d)),
        (a.tolist(), b.tolist(), c.tolist(), d.tolist()),
        (a.T.copy().T, b, c, d),  # Fortran-ordered view
        (a[:, ::1], b, c[::1, :], d),
    ]
    for args in variants:
        num, den = sw.transfer_function(*args)
        np.testing.assert_array_equal(num, ref_num)
        np.testing.assert_array_equal(den, ref_den)
        assert num.dtype == np.float64 and num.flags.c_contiguous and den.dtype == np.float64
    # float32 and int data: converted (the values change, so compare with the converted data)
    a32 = a.astype(np.float32)
    num, den = sw.transfer_function(a32, b, c, d)
    n64, d64 = sw.transfer_function(a32.astype(np.float64), b, c, d)
    np.testing.assert_array_equal(num, n64)
    np.testing.assert_array_equal(den, d64)
    ai = np.array([[1, 2], [3, 4]], dtype=np.int16)
    num, den = sw.transfer_function(ai, [[1], [0]], [[0, 1]], [[0]])
    np.testing.assert_allclose(den, [1.0, -5.0, -2.0])  # (identity) trace 5, det -2
    assert den.dtype == np.float64


def test_characteristic_polynomial_input_types():
    ref = sw.characteristic_polynomial([[1.0, 2.0], [3.0, 4.0]])
    for a in (
        [[1, 2], [3, 4]],
        np.array([[1, 2], [3, 4]], dtype=np.float32),
        np.asfortranarray(np.array([[1.0, 2.0], [3.0, 4.0]])),
        ((1, 2), (3, 4)),
    ):
        c = sw.characteristic_polynomial(a)
        assert c.dtype == np.float64 and c.shape == (3,)
        np.testing.assert_array_equal(c, ref)


# --------------------------------------------------------------------------------------
# bad input to the object's methods
# --------------------------------------------------------------------------------------


@pytest.mark.parametrize("s", [-1.0, -2.0 + 0.0j, np.array([0.5, -1.0])])
def test_evaluate_at_a_pole_is_model_error(s):
    # a finite result does not exist at a pole: ModelError, not inf
    r = sw.realize([1.0], [1.0, 3.0, 2.0])
    with pytest.raises(sw.ModelError) as err:
        r.evaluate(s)
    assert str(err.value).startswith("s") or "'s'" in str(err.value)


@pytest.mark.parametrize("s", ["abc", "1+", None, np.nan, [np.inf], {"s": 1}, [[1j]], object()])
def test_evaluate_bad_points_are_model_error(s):
    r = sw.realize([1.0], [1.0, 3.0, 2.0])
    with pytest.raises(sw.ModelError):
        r.evaluate(s)


def test_evaluate_empty_points():
    r = sw.realize([1.0], [1.0, 3.0, 2.0])
    assert r.evaluate(np.array([], dtype=complex)).shape == (0, 1, 1)


@pytest.mark.parametrize(
    "which,shape",
    [("a", (2, 3)), ("b", (3, 1)), ("c", (1, 3)), ("d", (2, 1))],
)
def test_realization_constructor_shape_errors(which, shape):
    mats = {"a": np.eye(2), "b": np.ones((2, 1)), "c": np.ones((1, 2)), "d": np.zeros((1, 1))}
    mats[which] = np.ones(shape)
    with pytest.raises(sw.ModelError) as err:
        sw.Realization(mats["a"], mats["b"], mats["c"], mats["d"])
    assert str(err.value).startswith(which + ":") or f"'{which}'" in str(err.value), str(err.value)


def test_transform_overflow_names_t():
    # T = 1e-320 I is finite and nonsingular, but T^-1 overflows: the error is about T,
    # not about the realization's (finite) A
    r = sw.realize([1.0], [1.0, 3.0, 2.0])
    with pytest.raises(sw.ModelError) as err:
        r.transform(np.eye(2) * 1e-320)
    msg = str(err.value)
    assert msg.lower().startswith("t") or "transform" in msg, msg

"""Transfer-function recovery: transfer_function, faddeev_leverrier, characteristic_polynomial,
controllability / observability matrices."""

from fractions import Fraction

import numpy as np
import pytest
import scipy.signal
import sympy

import statewright as sw
from swtest_helpers import exact_faddeev_leverrier, frac, frac_array

s_sym = sympy.symbols("s")


# --------------------------------------------------------------------------------------
# sympy references
# --------------------------------------------------------------------------------------


def _rat(x):
    f = frac(x)
    return sympy.Rational(f.numerator, f.denominator)


def _smat(rows):
    rows = np.asarray(rows, dtype=object)
    return sympy.Matrix(rows.shape[0], rows.shape[1], [_rat(v) for v in rows.ravel()])


def _coeffs(expr, n):
    """Coefficients of a polynomial in s, highest power first, padded to length n + 1."""
    expr = sympy.expand(expr)
    if expr == 0:
        c = []
    else:
        c = sympy.Poly(expr, s_sym).all_coeffs()
    c = [Fraction(int(sympy.fraction(x)[0]), int(sympy.fraction(x)[1])) for x in c]
    assert len(c) <= n + 1
    return [Fraction(0)] * (n + 1 - len(c)) + c


def sympy_transfer_function(a, b, c, d):
    """Exact (num (p, m, n+1) object array, den list) of C adj(sI-A) B + det(sI-A) D."""
    A, B, C, D = _smat(a), _smat(b), _smat(c), _smat(d)
    n = A.shape[0]
    M = s_sym * sympy.eye(n) - A
    adj = M.adjugate(method="berkowitz")
    det = M.det(method="berkowitz")
    G = C * adj * B + det * D
    p, m = G.shape
    num = np.empty((p, m, n + 1), dtype=object)
    for i in range(p):
        for j in range(m):
            num[i, j, :] = _coeffs(G[i, j], n)
    return num, _coeffs(det, n)


def sympy_adjugates(a):
    """N_0..N_{n-1} of adj(sI-A) = sum N_k s^(n-1-k), exact (n, n, n) object array."""
    A = _smat(a)
    n = A.shape[0]
    adj = (s_sym * sympy.eye(n) - A).adjugate(method="berkowitz")
    out = np.empty((n, n, n), dtype=object)
    for i in range(n):
        for j in range(n):
            coeffs = _coeffs(adj[i, j], n - 1)
            for k in range(n):
                out[k, i, j] = coeffs[k]
    return out


def _assert_exact_array(actual, expected, what=""):
    actual = np.asarray(actual)
    expected = np.asarray(expected, dtype=object)
    assert actual.dtype == object, f"{what}: dtype {actual.dtype}"
    assert actual.shape == expected.shape, f"{what}: shape {actual.shape} != {expected.shape}"
    for idx in np.ndindex(actual.shape):
        assert isinstance(actual[idx], Fraction), f"{what}{idx}: {type(actual[idx]).__name__}"
        assert actual[idx] == expected[idx], f"{what}{idx}: {actual[idx]} != {expected[idx]}"


# --------------------------------------------------------------------------------------
# examples
# --------------------------------------------------------------------------------------

SISO_INT = (
    [[1, 2, 0], [-3, 0, 1], [2, -1, -4]],
    [[1], [0], [2]],
    [[0, 1, -1]],
    [[3]],
)
MIMO_INT = (
    [[0, 1, 0], [-2, -3, 1], [1, 0, -1]],
    [[1, 0], [0, 2], [-1, 1]],
    [[1, 0, 1], [0, -1, 2]],
    [[0, 1], [2, 0]],
)
MIMO_RATIONAL = (
    [["1/2", 1, 0, "-3/4"], [0, "2/3", 1, 0], [1, 0, "-1/5", 2], ["0.1", 0, 0, 1]],
    [[1, 0], ["1/3", 1], [0, -2], [2, "0.5"]],
    [[1, 0, 0, "7/3"], [0, "-1/2", 1, 0], [2, 1, 0, 0]],
    [[0, 0], ["1/7", 0], [0, 1]],
)


def _random_model(n, m, p, seed):
    rng = np.random.default_rng(seed)
    return (
        rng.standard_normal((n, n)),
        rng.standard_normal((n, m)),
        rng.standard_normal((p, n)),
        rng.standard_normal((p, m)),
    )


# --------------------------------------------------------------------------------------
# transfer_function against scipy.signal.ss2tf (floats)
# --------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    "model",
    [
        tuple(np.array(x, dtype=float) for x in SISO_INT),
        tuple(np.array(x, dtype=float) for x in MIMO_INT),
        _random_model(3, 2, 2, 1),
        _random_model(5, 1, 1, 2),
        _random_model(6, 3, 2, 3),
        _random_model(4, 2, 3, 4),
    ],
)
def test_transfer_function_vs_scipy(model):
    # (scipy.signal reference) ss2tf, one input column at a time
    a, b, c, d = model
    n, m, p = a.shape[0], b.shape[1], c.shape[0]
    num, den = sw.transfer_function(a, b, c, d)
    assert num.shape == (p, m, n + 1) and den.shape == (n + 1,)
    assert num.dtype == np.float64 and den.dtype == np.float64
    assert den[0] == 1.0
    for j in range(m):
        snum, sden = scipy.signal.ss2tf(a, b, c, d, input=j)
        scale = max(1.0, float(np.max(np.abs(sden))))
        np.testing.assert_allclose(den, sden, rtol=1e-11, atol=1e-11 * scale)
        nscale = max(1.0, float(np.max(np.abs(snum))))
        np.testing.assert_allclose(num[:, j, :], snum, rtol=1e-10, atol=1e-10 * max(nscale, scale))


# --------------------------------------------------------------------------------------
# transfer_function against sympy (exact)
# --------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    "model",
    [SISO_INT, MIMO_INT, MIMO_RATIONAL],
    ids=["single_input_single_output", "several_inputs_outputs", "several_inputs_outputs_rational"],
)
def test_transfer_function_exact_vs_sympy(model):
    # (sympy exact) C adj(sI-A) B + det(sI-A) D, entry by entry equal as Fractions
    num, den = sw.transfer_function(*model, exact=True)
    enum, eden = sympy_transfer_function(*model)
    _assert_exact_array(den, eden, "den")
    _assert_exact_array(num, enum, "num")


def test_transfer_function_exact_siso_float_data_vs_sympy():
    # (sympy exact) exact arithmetic applies to the data given; Fractions of dyadic values
    a, b, c, d = _random_model(4, 1, 1, 11)
    fa, fb, fc, fd = (frac_array(x) for x in (a, b, c, d))
    num, den = sw.transfer_function(fa, fb, fc, fd, exact=True)
    enum, eden = sympy_transfer_function(fa, fb, fc, fd)
    _assert_exact_array(den, eden, "den")
    _assert_exact_array(num, enum, "num")
    # and the float result is that exact result correctly rounded, or within the certified bound
    fnum, fden = sw.transfer_function(a, b, c, d)
    for x, ref in zip(np.concatenate([fnum.ravel(), fden]), np.concatenate([num.ravel(), den])):
        if ref != 0:
            assert abs(Fraction(float(x)) - ref) / abs(ref) <= 3.6e-15


@pytest.mark.parametrize("method", ["auto", "recursion", "exact"])
def test_transfer_function_methods_agree_on_small_model(method):
    # (sympy exact) every method is accurate on a small well-conditioned integer model
    num, den = sw.transfer_function(*(np.array(x, float) for x in MIMO_INT), method=method)
    enum, eden = sympy_transfer_function(*MIMO_INT)
    np.testing.assert_allclose(den, [float(x) for x in eden], rtol=1e-13, atol=1e-13)
    np.testing.assert_allclose(num, np.array(enum.tolist(), dtype=float), rtol=1e-13, atol=1e-12)


def test_transfer_function_return_accuracy():
    a, b, c, d = _random_model(4, 2, 2, 5)
    num, den, acc = sw.transfer_function(a, b, c, d, return_accuracy=True)
    assert isinstance(acc, dict)
    assert isinstance(acc["method"], str) and acc["method"]
    assert isinstance(acc["relative_error_bound"], float)
    assert 0.0 <= acc["relative_error_bound"] <= 3.6e-15
    num2, den2 = sw.transfer_function(a, b, c, d)
    np.testing.assert_array_equal(num, num2)
    np.testing.assert_array_equal(den, den2)


def test_transfer_function_zero_states():
    # (identity) a static gain: den = [1], num = D
    num, den = sw.transfer_function(np.zeros((0, 0)), np.zeros((0, 2)), np.zeros((3, 0)), np.arange(6.0).reshape(3, 2))
    assert den.shape == (1,) and den[0] == 1.0
    assert num.shape == (3, 2, 1)
    np.testing.assert_array_equal(num[:, :, 0], np.arange(6.0).reshape(3, 2))


# --------------------------------------------------------------------------------------
# faddeev_leverrier
# --------------------------------------------------------------------------------------

INT_MATRICES = [
    [[2]],
    [[1, 2], [3, 4]],
    [[3, 1, 5], [3, 3, 1], [4, 6, 4]],
    [[0, 1, 0, 0], [0, 0, 1, 0], [0, 0, 0, 1], [-5, 2, -7, 1]],
    [[1, -2, 3, 0, 1], [4, 0, -1, 2, 2], [0, 3, 1, -1, 0], [2, 2, 0, 1, -3], [1, 0, 1, 1, 1]],
]


@pytest.mark.parametrize("a", INT_MATRICES)
def test_faddeev_leverrier_exact_vs_sympy(a):
    # (sympy exact) adjugate of (sI-A) expanded in powers of s, and charpoly
    coeffs, adj = sw.faddeev_leverrier(a, exact=True)
    n = len(a)
    _assert_exact_array(adj, sympy_adjugates(a), "adjugates")
    charpoly = [Fraction(int(x)) for x in sympy.Matrix(a).charpoly(s_sym).all_coeffs()]
    _assert_exact_array(coeffs, charpoly, "coeffs")
    assert np.asarray(adj).shape == (n, n, n)


def test_faddeev_leverrier_exact_rational_entries():
    # (sympy exact)
    a = [["1/3", "0.2", 0], [1, "-5/2", "1/7"], ["0.75", 0, 2]]
    coeffs, adj = sw.faddeev_leverrier(a, exact=True)
    _assert_exact_array(adj, sympy_adjugates(a), "adjugates")
    charpoly = sympy.Matrix(_smat(a)).charpoly(s_sym).all_coeffs()
    _assert_exact_array(
        coeffs, [Fraction(int(sympy.fraction(x)[0]), int(sympy.fraction(x)[1])) for x in charpoly], "coeffs"
    )


@pytest.mark.parametrize("seed", [0, 1, 2])
@pytest.mark.parametrize("n", [1, 3, 6])
def test_faddeev_leverrier_float_vs_exact(n, seed):
    # (sympy exact) float adjugates vs sympy's adjugate of (sI-A) on the exact float entries
    a = np.random.default_rng(seed + 10 * n).standard_normal((n, n))
    coeffs, adj = sw.faddeev_leverrier(a)
    assert coeffs.shape == (n + 1,) and adj.shape == (n, n, n)
    assert coeffs.dtype == np.float64 and adj.dtype == np.float64
    ref = sympy_adjugates(frac_array(a)) if n <= 3 else np.array(exact_faddeev_leverrier(a)[1])
    ref = np.array(ref.tolist(), dtype=float)
    scale = max(1.0, float(np.max(np.abs(ref))))
    np.testing.assert_allclose(adj, ref, rtol=1e-12, atol=1e-13 * scale)
    ecoeffs = exact_faddeev_leverrier(a)[0]
    np.testing.assert_allclose(coeffs, [float(x) for x in ecoeffs], rtol=4e-15)


def test_faddeev_leverrier_recurrence_identity():
    # (identity) N_0 = I, N_k = A N_{k-1} + c_k I, and A N_{n-1} + c_n I = 0 (Cayley-Hamilton)
    a = np.random.default_rng(3).standard_normal((5, 5))
    coeffs, adj = sw.faddeev_leverrier(a)
    n = 5
    np.testing.assert_array_equal(adj[0], np.eye(n))
    for k in range(1, n):
        np.testing.assert_allclose(adj[k], a @ adj[k - 1] + coeffs[k] * np.eye(n), atol=1e-12)
    np.testing.assert_allclose(a @ adj[n - 1] + coeffs[n] * np.eye(n), 0.0, atol=1e-12)


# --------------------------------------------------------------------------------------
# characteristic_polynomial
# --------------------------------------------------------------------------------------


@pytest.mark.parametrize("a", INT_MATRICES)
def test_characteristic_polynomial_exact_vs_sympy(a):
    # (sympy exact)
    coeffs = sw.characteristic_polynomial(a, exact=True)
    charpoly = [Fraction(int(x)) for x in sympy.Matrix(a).charpoly(s_sym).all_coeffs()]
    _assert_exact_array(coeffs, charpoly, "coeffs")


@pytest.mark.parametrize("seed", range(4))
@pytest.mark.parametrize("n", [1, 2, 5, 9])
def test_characteristic_polynomial_float_vs_numpy(n, seed):
    # (numpy.poly reference, eigenvalue route) and exactly rounded reference
    a = np.random.default_rng(100 * n + seed).standard_normal((n, n))
    coeffs = sw.characteristic_polynomial(a)
    assert coeffs.shape == (n + 1,) and coeffs.dtype == np.float64 and coeffs[0] == 1.0
    ref = np.poly(a)
    np.testing.assert_allclose(coeffs, ref, rtol=1e-9, atol=1e-11 * max(1.0, np.max(np.abs(ref))))


def test_characteristic_polynomial_zero_by_zero():
    # (identity) the empty matrix has characteristic polynomial 1 and no adjugate terms
    c = sw.characteristic_polynomial(np.zeros((0, 0)))
    np.testing.assert_array_equal(c, [1.0])
    coeffs, adj = sw.faddeev_leverrier(np.zeros((0, 0)))
    np.testing.assert_array_equal(coeffs, [1.0])
    assert adj.shape == (0, 0, 0)


def test_characteristic_polynomial_zero_by_zero_exact():
    # (identity)
    c = sw.characteristic_polynomial(np.empty((0, 0), dtype=object), exact=True)
    assert list(c) == [Fraction(1)]


def test_characteristic_polynomial_methods():
    a = np.random.default_rng(9).standard_normal((6, 6))
    ref = [float(x) for x in exact_faddeev_leverrier(a)[0]]
    for method in ("auto", "recursion", "exact"):
        c = sw.characteristic_polynomial(a, method=method)
        np.testing.assert_allclose(c, ref, rtol=1e-12, err_msg=method)
    # method="exact" is correctly rounded: (exact FL on the float data, integer arithmetic)
    np.testing.assert_array_equal(sw.characteristic_polynomial(a, method="exact"), ref)


# --------------------------------------------------------------------------------------
# exact-mode types and decimal strings
# --------------------------------------------------------------------------------------


def test_exact_mode_output_types():
    num, den = sw.transfer_function(*MIMO_INT, exact=True)
    coeffs, adj = sw.faddeev_leverrier(MIMO_INT[0], exact=True)
    cp = sw.characteristic_polynomial(MIMO_INT[0], exact=True)
    for arr in (num, den, coeffs, adj, cp):
        assert isinstance(arr, np.ndarray) and arr.dtype == object
        assert all(isinstance(x, Fraction) for x in arr.ravel())


def test_decimal_string_is_exact():
    # (identity) "0.1" is 1/10 exactly, not the nearest binary float
    cp = sw.characteristic_polynomial([["0.1"]], exact=True)
    assert list(cp) == [Fraction(1), Fraction(-1, 10)]
    assert cp[1] != Fraction(0.1)
    cp = sw.characteristic_polynomial([["0.1", "0.2"], ["0.3", "1/3"]], exact=True)
    # by hand: trace = 1/10 + 1/3 = 13/30, det = 1/30 - 6/100 = -2/75
    assert list(cp) == [Fraction(1), Fraction(-13, 30), Fraction(-2, 75)]
    num, den = sw.transfer_function([["0.1"]], [["0.2"]], [["0.3"]], [["0.4"]], exact=True)
    # G = 0.06/(s - 0.1) + 0.4 = (0.4 s + 0.02)/(s - 0.1)
    assert list(den) == [Fraction(1), Fraction(-1, 10)]
    assert list(num[0, 0]) == [Fraction(2, 5), Fraction(1, 50)]


def test_exact_accepts_mixed_int_fraction_string():
    a = [[1, Fraction(1, 3)], ["-2/5", "0.25"]]
    cp = sw.characteristic_polynomial(a, exact=True)
    # trace = 5/4, det = 1/4 + 2/15 = 23/60
    assert list(cp) == [Fraction(1), Fraction(-5, 4), Fraction(23, 60)]


# --------------------------------------------------------------------------------------
# controllability / observability matrices
# --------------------------------------------------------------------------------------


def test_controllability_matrix_float():
    # (identity) [B, AB, A^2B] by numpy products
    a, b, c, _ = _random_model(4, 2, 3, 21)
    K = sw.controllability_matrix(a, b)
    ref = np.hstack([np.linalg.matrix_power(a, k) @ b for k in range(4)])
    assert K.shape == (4, 8) and K.dtype == np.float64 and K.flags.c_contiguous
    np.testing.assert_allclose(K, ref, rtol=1e-13, atol=1e-13 * np.max(np.abs(ref)))
    O = sw.observability_matrix(a, c)
    ref = np.vstack([c @ np.linalg.matrix_power(a, k) for k in range(4)])
    assert O.shape == (12, 4) and O.dtype == np.float64 and O.flags.c_contiguous
    np.testing.assert_allclose(O, ref, rtol=1e-13, atol=1e-13 * np.max(np.abs(ref)))


def test_controllability_matrix_exact():
    # (sympy exact)
    a, b, c, _ = MIMO_RATIONAL
    A, B, C = _smat(a), _smat(b), _smat(c)
    K = sw.controllability_matrix(a, b, exact=True)
    ref = sympy.Matrix.hstack(*[A**k * B for k in range(4)])
    _assert_exact_array(
        K,
        np.array(
            [
                [Fraction(int(sympy.fraction(x)[0]), int(sympy.fraction(x)[1])) for x in ref.row(i)]
                for i in range(ref.rows)
            ],
            dtype=object,
        ),
        "K",
    )
    O = sw.observability_matrix(a, c, exact=True)
    ref = sympy.Matrix.vstack(*[C * A**k for k in range(4)])
    _assert_exact_array(
        O,
        np.array(
            [
                [Fraction(int(sympy.fraction(x)[0]), int(sympy.fraction(x)[1])) for x in ref.row(i)]
                for i in range(ref.rows)
            ],
            dtype=object,
        ),
        "O",
    )


def test_controllability_of_companion_forms():
    # (identity) the controllability form has K = I, the observability form has O = I
    num, den = [1.0, -2.0, 7.0], [1.0, 4.0, 2.0, 3.0]
    r = sw.realize(num, den, form="controllability")
    np.testing.assert_array_equal(sw.controllability_matrix(r.a, r.b), np.eye(3))
    r = sw.realize(num, den, form="observability")
    np.testing.assert_array_equal(sw.observability_matrix(r.a, r.c), np.eye(3))

"""The exact evaluation of float data (method="exact", and the fallback of method="auto").

Every float64 is a dyadic rational, so the characteristic polynomial and transfer matrix of
float data have exact values; statewright computes them (multi-modular Hessenberg method,
numerators from the Markov parameters) and rounds each coefficient once. The
checks compare bit for bit with float(Fraction(...)) of an exact reference, which Python
rounds to nearest (identity): the integer Faddeev-LeVerrier recursion in Python integers
(swtest_helpers), or a product of linear factors where the structure fixes the answer.
"""

import time
from fractions import Fraction

import numpy as np
import pytest
from test_accuracy import make_matrix

import statewright as sw
from swtest_helpers import exact_faddeev_leverrier, exact_scalar_transfer_function, names_argument

EXACT = "exact, rounded once"


def _rounded(values):
    return np.array([float(x) for x in values])  # float(Fraction) rounds to nearest (identity)


@pytest.mark.parametrize("n,family,d", [(16, "spread", 0.0), (24, "spread", 0.5), (20, "clustered", -3.0)])
def test_siso_transfer_function_is_correctly_rounded(n, family, d):
    # (exact integer reference, Python integers) every coefficient bit for bit
    a = make_matrix(n, family, seed=3)
    rng = np.random.default_rng(n)
    b, c, dd = rng.standard_normal((n, 1)), rng.standard_normal((1, n)), np.array([[d]])
    rnum, rden = exact_scalar_transfer_function(a, b, c, dd)
    num, den, acc = sw.transfer_function(a, b, c, dd, method="exact", return_accuracy=True)
    assert acc["method"] == EXACT
    np.testing.assert_array_equal(den, _rounded(rden))
    np.testing.assert_array_equal(num[0, 0], _rounded(rnum))
    # the default agrees with it wherever it had to fall back, and is certified otherwise
    num2, den2, acc2 = sw.transfer_function(a, b, c, dd, return_accuracy=True)
    if acc2["method"] == EXACT:
        np.testing.assert_array_equal(num2, num)
        np.testing.assert_array_equal(den2, den)


def test_mimo_transfer_matrix_is_correctly_rounded():
    # (exact reference: C N_{k-1} B + c_k D in Fractions from the exact adjugate sequence)
    # Two outputs, three inputs, a zero column of B and a zero row of C, D nonzero with an
    # entry of 1 (d - 1 = 0 in the combination) and a subnormal entry.
    n, p, m = 10, 3, 3
    a = make_matrix(n, "spread", seed=5)
    rng = np.random.default_rng(77)
    b = rng.standard_normal((n, m)) * np.array([1.0, 0.0, 1e-3])
    c = rng.standard_normal((p, n)) * np.array([[1.0], [1e4], [0.0]])
    d = np.array([[1.0, 0.0, 2.5], [5e-324, -1.0, 0.0], [0.0, 3.0, 0.0]])
    coeffs, adj = exact_faddeev_leverrier(a)
    fb = [[Fraction(float(x)) for x in row] for row in b]
    fc = [[Fraction(float(x)) for x in row] for row in c]
    fd = [[Fraction(float(x)) for x in row] for row in d]
    num, den = sw.transfer_function(a, b, c, d, method="exact")
    np.testing.assert_array_equal(den, _rounded(coeffs))
    for i in range(p):
        for j in range(m):
            ref = [fd[i][j]]
            for k in range(1, n + 1):
                nk = adj[k - 1]
                cnb = sum(fc[i][r] * sum(Fraction(nk[r][s]) * fb[s][j] for s in range(n)) for r in range(n))
                ref.append(cnb + coeffs[k] * fd[i][j])
            np.testing.assert_array_equal(num[i, j], _rounded(ref), err_msg=f"entry ({i}, {j})")


def _hidden_triangular(n, seed):
    """P U P^T with U upper triangular (diagonal spread over four decades, normal entries
    above it) and P a random permutation: exact in floating point, and the triangular
    structure is hidden. Returns (A, diagonal of U, P)."""
    rng = np.random.default_rng(seed)
    u = np.triu(rng.standard_normal((n, n)), 1)
    diag = -(10.0 ** rng.uniform(-2.0, 2.0, n))
    u[np.diag_indices(n)] = diag
    perm = rng.permutation(n)
    pm = np.eye(n)[perm]
    return pm @ u @ pm.T, diag, pm


def _product_of_factors(roots):
    """Coefficients of prod (s - r), highest power first, exactly (roots: Fractions)."""
    poly = [Fraction(1)]
    for r in roots:
        poly = [x - r * y for x, y in zip(poly + [Fraction(0)], [Fraction(0)] + poly)]
    return poly


@pytest.mark.parametrize("n", [96, 128])
def test_fallback_beyond_order_64(n):
    # (identity) a permutation similarity of a triangular matrix keeps det(sI - A) =
    # prod (s - u_ii); with b = P e_n and c = e_n^T P^T the transfer function is the (n, n)
    # cofactor of sI - U over det(sI - U), so its numerator is prod_{i<n} (s - u_ii).
    a, diag, pm = _hidden_triangular(n, seed=n)
    b = pm[:, [n - 1]]
    c = pm[:, [n - 1]].T
    num, den, acc = sw.transfer_function(a, b, c, np.zeros((1, 1)), return_accuracy=True)
    assert acc["method"] == EXACT  # the double-double bound cannot certify this one
    roots = [Fraction(float(r)) for r in diag]
    np.testing.assert_array_equal(den, _rounded(_product_of_factors(roots)))
    np.testing.assert_array_equal(num[0, 0], _rounded([Fraction(0)] + _product_of_factors(roots[:-1])))
    np.testing.assert_array_equal(sw.characteristic_polynomial(a), den)


def test_refused_beyond_the_time_budget_before_any_work():
    # Entries spanning 2^-500 .. 2^500 at order 200 need integers of about 1,100 bits and
    # coefficients of about 220,000 bits: minutes of work, refused at once.
    rng = np.random.default_rng(9)
    n = 200
    a = rng.standard_normal((n, n)) * 2.0 ** rng.choice([-500, 500], (n, n))
    started = time.perf_counter()
    with pytest.raises(sw.ModelError, match="request too large") as info:
        sw.characteristic_polynomial(a, method="exact")
    assert time.perf_counter() - started < 5.0
    assert names_argument(str(info.value), "a")
    assert "method='recursion'" in str(info.value)


# ---- exact rational data (exact=True): coefficients and transfer functions beyond order 64


def test_exact_rational_mode_beyond_order_64():
    # (identity) as above, with rational entries: P U P^T for U upper triangular with
    # diagonal q_i, so det(sI - A) = prod (s - q_i), and the (n, n) cofactor gives the
    # numerator prod_{i<n} (s - q_i) for b = P e_n, c = e_n^T P^T.
    n = 80
    rng = np.random.default_rng(80)
    diag = [Fraction(int(rng.integers(-50, 50)), int(rng.integers(1, 9))) for _ in range(n)]
    u = np.empty((n, n), dtype=object)
    for i in range(n):
        for j in range(n):
            u[i, j] = (
                diag[i]
                if i == j
                else (Fraction(int(rng.integers(-9, 9)), int(rng.integers(1, 5))) if j > i else Fraction(0))
            )
    perm = rng.permutation(n)
    a = u[np.ix_(perm, perm)]  # P U P^T with P the permutation matrix of perm
    last = int(np.where(perm == n - 1)[0][0])
    b = np.array([[Fraction(int(i == last))] for i in range(n)], dtype=object)
    c = b.T.copy()
    d = np.array([[Fraction(1, 3)]], dtype=object)
    num, den = sw.transfer_function(a, b, c, d, exact=True)
    char = _product_of_factors(diag)
    assert list(den) == char
    assert list(sw.characteristic_polynomial(a, exact=True)) == char
    cofactor = [Fraction(0)] + _product_of_factors(diag[:-1])
    assert list(num[0, 0]) == [x + Fraction(1, 3) * y for x, y in zip(cofactor, char)]


def test_exact_adjugates_keep_the_order_64_limit():
    a = np.eye(65, dtype=int)
    with pytest.raises(sw.ModelError, match="request too large") as info:
        sw.faddeev_leverrier(a, exact=True)
    assert names_argument(str(info.value), "a")

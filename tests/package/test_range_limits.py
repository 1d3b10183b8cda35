"""Data at the ends of the float64 range, and exact data with large fractions.

Each case here was found by the fuzz suite (tests/test_fuzz.py) returning infinity, NaN, a
foreign exception or running for minutes. The contract (API conventions): a finite input
gives a finite, correct result when the result is representable, and ModelError otherwise.
References: homogeneity under power-of-two scaling (identity), closed forms worked by hand
(identity), mpmath at 50 digits and sympy's exact arithmetic.
"""

import math
import random
import time
from fractions import Fraction

import mpmath
import numpy as np
import pytest
import sympy

import statewright as sw

BIG = np.finfo(float).max
EPS = np.finfo(float).eps


# --------------------------------------------------------------------------------------
# staircases near the top of the range
# --------------------------------------------------------------------------------------


def test_staircase_output_matrix_at_the_top_of_the_range():
    # A = 0, B = e_8, C = [MAX] * 8. The staircase maps e_8 to the first axis by one
    # reflection that swaps e_1 and -e_8, so C Q is a signed permutation of C (identity):
    # every entry has magnitude MAX, although an intermediate C e_1 + C e_8 overflows.
    n = 8
    b = np.zeros((n, 1))
    b[-1, 0] = 1.0
    c = np.full((1, n), BIG)
    s = sw.controllability_staircase(np.zeros((n, n)), b, c)
    assert s.rank == 1
    assert np.all(np.abs(s.c) == BIG)
    q = s.transform
    assert np.allclose(q.T @ q, np.eye(n), atol=4 * EPS)


def test_staircase_default_tol_finite_when_the_norm_overflows():
    # ||A||_F = sqrt(2) MAX is not representable; the documented tol n^2 eps ||A||_F is
    # 4 eps sqrt(2) MAX, about 1.1e293 (identity).
    a = np.array([[BIG, BIG], [0.0, 0.0]])
    s = sw.controllability_staircase(a, np.zeros((2, 0)))
    expected = 4 * EPS * BIG * math.sqrt(2)
    assert s.tol == pytest.approx(expected, rel=1e-14)
    assert s.rank == 0


@pytest.mark.parametrize("k", [-1000, -700, 700, 1000])
def test_staircase_commutes_with_power_of_two_scaling(k):
    # (identity) the staircase of (2^k A, 2^k B, C) is that of (A, B, C) with A and B
    # scaled by 2^k: every step is homogeneous in (A, B, tol). Powers of two scale exactly.
    rng = np.random.default_rng(7)
    a, b, c = rng.standard_normal((5, 5)), rng.standard_normal((5, 2)), rng.standard_normal((1, 5))
    plain = sw.controllability_staircase(a, b, c)
    scale = 2.0**k
    scaled = sw.controllability_staircase(a * scale, b * scale, c)
    assert scaled.blocks == plain.blocks
    np.testing.assert_allclose(scaled.transform, plain.transform, rtol=0, atol=64 * EPS)
    np.testing.assert_allclose(scaled.a / scale, plain.a, rtol=0, atol=64 * EPS * np.linalg.norm(a))
    assert scaled.tol / scale == pytest.approx(plain.tol, rel=1e-14)


def test_observability_staircase_at_the_top_of_the_range():
    # The dual of the first case (identity): B Q-rows are a signed permutation of B.
    n = 6
    c = np.zeros((1, n))
    c[0, -1] = 1.0
    b = np.full((n, 1), BIG)
    s = sw.observability_staircase(np.zeros((n, n)), b, c)
    assert s.rank == 1
    assert np.all(np.abs(s.b) == BIG)


def test_unrepresentable_staircase_is_refused():
    # B = [MAX, MAX]^T: its singular value sqrt(2) MAX, and the transformed B, lie beyond
    # the range; ModelError, never an infinity.
    with pytest.raises(sw.ModelError, match="overflows the float64 range"):
        sw.controllability_staircase(np.zeros((2, 2)), np.array([[BIG], [BIG]]))


# --------------------------------------------------------------------------------------
# evaluation and poles near the range limits
# --------------------------------------------------------------------------------------


def mp_response(a, b, c, d, s):
    """C (sI - A)^-1 B + D at 50 digits (mpmath)."""
    with mpmath.workdps(50):
        n = len(a)
        pencil = mpmath.matrix([[(s if i == j else 0) - mpmath.mpf(a[i][j]) for j in range(n)] for i in range(n)])
        x = mpmath.lu_solve(pencil, mpmath.matrix([[mpmath.mpf(v)] for v in np.ravel(b)]))
        return complex(sum(mpmath.mpf(c[0][i]) * x[i] for i in range(n)) + mpmath.mpf(d[0][0]))


@pytest.mark.parametrize("s", [1e300, 1.5e-300, 1e200j, 3e-200 + 1e-200j])
def test_evaluate_at_extreme_points(s):
    r = sw.realize([1, 3], [1, 3, 2], "controller")  # (s + 3) / (s^2 + 3 s + 2)
    value = r.evaluate(s)[0, 0]
    a, b, c, d = (np.asarray(x).tolist() for x in r)
    ref = mp_response(a, b, c, d, mpmath.mpc(s))
    assert abs(value - ref) <= 1e-14 * abs(ref)


def test_evaluate_with_entries_near_the_top_of_the_range():
    # A = diag(1e308, -1e308), B = [1, 1]^T, C = [1e308, 1e308]: G(1) = 1e308/(1 - 1e308)
    # + 1e308/(1 + 1e308), about -1 + 1 (mpmath reference); the naive solve gives inf - inf.
    a = np.diag([1e308, -1e308])
    b = np.ones((2, 1))
    c = np.array([[1e308, 1e308]])
    d = np.zeros((1, 1))
    r = sw.Realization(a, b, c, d)
    value = r.evaluate(1.0)[0, 0]
    ref = mp_response(a.tolist(), b.tolist(), c.tolist(), d.tolist(), mpmath.mpf(1))
    assert np.isfinite(value)
    assert abs(value - ref) <= 1e-14 * 2  # terms of magnitude 1 cancel


def test_evaluate_refuses_points_beyond_the_range():
    r = sw.realize([1], [1, 1])
    with pytest.raises(sw.ModelError, match="^s: "):
        r.evaluate(10**400)


def test_evaluate_refuses_an_unrepresentable_value():
    # G(s) = 1e300 / (s + 1e-300) at s = 1e-300 is 5e599: beyond the range.
    r = sw.Realization([[-1e-300]], [[1e300]], [[1.0]], [[0.0]])
    with pytest.raises(sw.ModelError, match="beyond the float64 range"):
        r.evaluate(1e-300)


def test_poles_at_the_top_of_the_range():
    # (identity) a triangular matrix has its diagonal as eigenvalues.
    r = sw.Realization([[1.7e308, 1.7e308], [0.0, -1.7e308]], np.ones((2, 1)), np.ones((1, 2)), [[0.0]])
    np.testing.assert_array_equal(r.poles(), np.array([-1.7e308, 1.7e308], dtype=complex))


def test_poles_of_tiny_entries():
    # (identity) eigenvalues of [[0, 1], [-2, -3]] * 1e-300 are -1e-300 and -2e-300.
    r = sw.Realization(np.array([[0.0, 1.0], [-2.0, -3.0]]) * 1e-300, [[0.0], [1.0]], [[1.0, 0.0]], [[0.0]])
    np.testing.assert_allclose(r.poles().real, [-2e-300, -1e-300], rtol=1e-14)


# --------------------------------------------------------------------------------------
# exact data with large fractions
# --------------------------------------------------------------------------------------


def random_fractions(rng, rows, cols, bits):
    return [
        [Fraction(rng.getrandbits(bits) - 2 ** (bits - 1), rng.getrandbits(bits) + 1) for _ in range(cols)]
        for _ in range(rows)
    ]


def test_exact_charpoly_with_large_fractions_matches_sympy():
    rng = random.Random(11)
    a = random_fractions(rng, 4, 4, 300)
    got = sw.characteristic_polynomial(a, exact=True)
    ref = sympy.Matrix(a).charpoly().all_coeffs()  # sympy's exact arithmetic
    assert [sympy.Rational(x.numerator, x.denominator) for x in got] == ref


def test_exact_adjugates_with_large_fractions_match_sympy():
    # adj(sI - A) = sum_k N_k s^(n-1-k); at s = 0 it is adj(-A) (identity, sympy reference).
    rng = random.Random(12)
    a = random_fractions(rng, 3, 3, 200)
    coeffs, adj = sw.faddeev_leverrier(a, exact=True)
    ref = (-sympy.Matrix(a)).adjugate()
    got = sympy.Matrix([[sympy.Rational(x.numerator, x.denominator) for x in row] for row in adj[-1]])
    assert got == ref
    # every returned Fraction is in lowest terms (Fraction normalizes; check it was not fed junk)
    assert all(math.gcd(x.numerator, x.denominator) == 1 for x in adj.reshape(-1))


def test_exact_transfer_function_with_large_fractions_matches_sympy():
    rng = random.Random(13)
    a = random_fractions(rng, 3, 3, 150)
    b = random_fractions(rng, 3, 1, 150)
    c = random_fractions(rng, 1, 3, 150)
    d = random_fractions(rng, 1, 1, 150)
    num, den = sw.transfer_function(a, b, c, d, exact=True)
    s = sympy.Symbol("s")
    am, bm, cm, dm = (sympy.Matrix(x) for x in (a, b, c, d))
    g = sympy.cancel((cm * (s * sympy.eye(3) - am).adjugate() * bm)[0, 0] + dm[0, 0] * (s * sympy.eye(3) - am).det())
    ref = sympy.Poly(sympy.expand(g), s).all_coeffs()
    got = [sympy.Rational(x.numerator, x.denominator) for x in num.reshape(-1)]
    assert got == ref
    assert [sympy.Rational(x.numerator, x.denominator) for x in den] == sympy.Matrix(a).charpoly().all_coeffs()


def test_exact_recursion_within_the_entry_limit_finishes():
    # 6 x 6 of 4000-bit fractions (inside the 4096-bit entry limit): the common
    # denominator has about 144,000 bits. Measured 3 s here (the rational recursion it
    # replaced took minutes); a generous bound, not a timing test.
    rng = random.Random(1)
    a = [[Fraction(rng.getrandbits(4000) + 1, rng.getrandbits(4000) + 1) for _ in range(6)] for _ in range(6)]
    started = time.monotonic()
    coeffs = sw.characteristic_polynomial(a, exact=True)
    assert time.monotonic() - started < 60
    # (identity) c_1 = -trace(A)
    assert coeffs[1] == -sum(a[i][i] for i in range(6))


def test_exact_recursion_beyond_its_budget_is_refused_quickly():
    # 64 x 64 entries 1/(2i + 3): the common denominator would need far more bits than the
    # order-64 budget allows; refused before it is formed in full.
    a = [[Fraction(1, 2 * (64 * i + j) + 3) for j in range(64)] for i in range(64)]
    started = time.monotonic()
    with pytest.raises(sw.ModelError, match=r"^a: request too large"):
        sw.characteristic_polynomial(a, exact=True)
    assert time.monotonic() - started < 10

"""parametric_transfer_function: against sympy's own exact route, substitution identities and
a hand derivation (references named beside each check)."""

import random
from fractions import Fraction

import numpy as np
import pytest

import statewright as sw

sympy = pytest.importorskip("sympy")

from parametric_models import (  # noqa: E402
    fraction_matrix,
    random_model,
    random_point,
    symbols,
    sympy_transfer_function,
    two_mass_drive,
)

S = sympy.Symbol("s")


def _coefficients(poly, n):
    """Coefficients of a Poly in s, highest power first, padded to the grid s^n .. s^0."""
    coeffs = [poly.domain.to_sympy(c) for c in poly.rep.to_list()]
    return [sympy.Integer(0)] * (n + 1 - len(coeffs)) + coeffs


def _assert_equal_coefficients(ours, reference):
    assert len(ours) == len(reference)
    for k, (x, y) in enumerate(zip(ours, reference)):
        assert sympy.cancel(x - y) == 0, (k, x, y)


def _check_against_sympy(a, b, c, d):
    num, den = sw.parametric_transfer_function(a, b, c, d, S)
    n = a.shape[0]
    num_ref, den_ref = sympy_transfer_function(a, b, c, d, S)  # (sympy: Berkowitz, cancel)
    _assert_equal_coefficients(_coefficients(den, n), den_ref)
    assert num.shape == (c.shape[0], b.shape[1])
    for i in range(num.shape[0]):
        for j in range(num.shape[1]):
            _assert_equal_coefficients(_coefficients(num[i, j], n), num_ref[i][j])
    return num, den


# Orders 2 to 7 (order 8: the mass-spring chain below); the larger ones sparser, so that
# sympy's own route (the reference) stays quick.
CASES = [
    (2, 2, 1, 1, 0.9),
    (3, 3, 2, 1, 0.7),
    (4, 3, 1, 2, 0.5),
    (5, 4, 1, 1, 0.4),
    (6, 4, 1, 1, 0.3),
    (7, 3, 1, 1, 0.25),
]


@pytest.mark.parametrize("n, parameters, m, p, density", CASES)
def test_equals_sympy_exact_route(n, parameters, m, p, density):
    # (sympy) det and adjugate of sI - A by the Berkowitz method, each coefficient cancelled
    a, b, c, d, _ = random_model(100 + n, n, parameters, m=m, p=p, density=density)
    _check_against_sympy(a, b, c, d)


@pytest.mark.parametrize("n, parameters, m, p, density", CASES)
def test_substitution_gives_the_exact_transfer_function(n, parameters, m, p, density):
    # (identity) substituting rationals for the parameters commutes with the recursion:
    # the result equals transfer_function(exact=True) of the substituted model.
    a, b, c, d, params = random_model(100 + n, n, parameters, m=m, p=p, density=density)
    _check_substitution(a, b, c, d, params, n)


@pytest.mark.parametrize("n, seed", [(4, 0), (4, 1), (5, 0), (5, 1), (6, 0), (6, 1)])
def test_benchmark_models_substitute_exactly(n, seed):
    # (identity) as above, on the models of benchmarks/bench_parametric.py (4 parameters,
    # density 0.5). Order 5, seed 1 once spent minutes in the lowest-terms GCDs (a large
    # numerator against a small denominator factor in other variables); a hang would stall here.
    a, b, c, d, params = random_model(1000 * n + seed, n, 4, density=0.5)
    _check_substitution(a, b, c, d, params, n)


def _check_substitution(a, b, c, d, params, n):
    num, den = sw.parametric_transfer_function(a, b, c, d, S)
    for trial in range(3):
        point = random_point(7 * n + trial, params)
        try:
            mats = [fraction_matrix(x, point) for x in (a, b, c, d)]
        except (TypeError, ZeroDivisionError):  # a denominator vanishes there: not a valid point
            continue
        num_ref, den_ref = sw.transfer_function(*mats, exact=True)
        den_sub = [Fraction(str(sympy.Rational(x.subs(point)))) for x in _coefficients(den, n)]
        assert den_sub == list(den_ref)
        for i in range(num.shape[0]):
            for j in range(num.shape[1]):
                got = [Fraction(str(sympy.Rational(x.subs(point)))) for x in _coefficients(num[i, j], n)]
                assert got == list(num_ref[i, j])


def test_two_mass_drive_against_the_hand_derivation():
    # Hand derivation (Laplace transform of Newton's second law for each mass, shaft torque
    # (k/s + b)(w1 - w2)): w1/T = (J2 s^2 + b s + k) / (s (J1 J2 s^2 + (J1 + J2)(b s + k))),
    # w2/T = (b s + k) / (s (J1 J2 s^2 + (J1 + J2)(b s + k))).
    a, b, c, d, (J1, J2, k, bb) = two_mass_drive()
    num, den = sw.parametric_transfer_function(a, b, c, d, S)
    common = S * (J1 * J2 * S**2 + (J1 + J2) * (bb * S + k))
    motor = (J2 * S**2 + bb * S + k) / common
    load = (bb * S + k) / common
    assert sympy.cancel(num[0, 0].as_expr() / den.as_expr() - motor) == 0
    assert sympy.cancel(num[1, 0].as_expr() / den.as_expr() - load) == 0
    # the monic denominator: s^3 + b (J1+J2)/(J1 J2) s^2 + k (J1+J2)/(J1 J2) s
    assert sympy.cancel(den.as_expr() - sympy.expand(common / (J1 * J2))) == 0
    assert den.domain == sympy.ZZ.frac_field(J1, J2, bb, k) or str(den.domain).startswith("ZZ(")
    _check_against_sympy(a, b, c, d)


def test_mass_spring_chain_of_order_eight():
    # (sympy) four masses in a chain, springs k1..k4 to the left neighbour, one damper:
    # a physical order-8 model with polynomial-denominator-free entries over 1/m_i.
    m = sympy.symbols("m1:5", positive=True)
    k = sympy.symbols("k1:5", positive=True)
    c = sympy.Symbol("c", positive=True)
    n = 8
    a = sympy.zeros(n, n)
    for i in range(4):
        a[2 * i, 2 * i + 1] = 1
        left = k[i]
        right = k[i + 1] if i < 3 else 0
        a[2 * i + 1, 2 * i] = -(left + right) / m[i]
        if i > 0:
            a[2 * i + 1, 2 * i - 2] = k[i] / m[i]
        if i < 3:
            a[2 * i + 1, 2 * i + 2] = right / m[i]
    a[7, 7] = -c / m[3]
    b = sympy.zeros(n, 1)
    b[1, 0] = 1 / m[0]
    cm = sympy.zeros(1, n)
    cm[0, 6] = 1
    _check_against_sympy(a, b, cm, sympy.zeros(1, 1))


def test_domains_follow_the_coefficients():
    k, j = sympy.symbols("k j")
    # integer polynomial entries: ZZ[j, k] (sympy's own domain for such coefficients)
    num, den = sw.parametric_transfer_function([[0, 1], [-k, -j]], [[0], [1]], [[1, 0]], [[0]], S)
    assert den.domain == sympy.ZZ[j, k]
    assert den.as_expr() == S**2 + j * S + k
    # a rational coefficient: QQ[j, k]
    num, den = sw.parametric_transfer_function([[k / 2]], [[1]], [[1]], [[0]], S)
    assert den.domain == sympy.QQ[k]
    assert den.as_expr() == S - k / 2
    # no parameters: QQ, and the exact route's values (transfer_function(exact=True))
    num, den = sw.parametric_transfer_function([[1, 2], [3, 4]], [[1], [0]], [[0, 1]], [[Fraction(1, 2)]], S)
    ref_num, ref_den = sw.transfer_function([[1, 2], [3, 4]], [[1], [0]], [[0, 1]], [[Fraction(1, 2)]], exact=True)
    assert den.domain == sympy.QQ
    assert [Fraction(int(x.p), int(x.q)) for x in den.all_coeffs()] == list(ref_den)
    assert [Fraction(int(x.p), int(x.q)) for x in num[0, 0].all_coeffs()] == list(ref_num[0, 0])


def test_each_coefficient_in_lowest_terms():
    # (identity) (k^2 - 1)/(k - 1) entries reduce to k + 1; a coefficient's numerator and
    # denominator share no factor (sympy.gcd).
    k, j = sympy.symbols("k j")
    a = sympy.Matrix([[(k**2 - 1) / (k - 1), 1 / (j + k)], [j / (k - 1), (j * k + k**2) / (j + k)]])
    num, den = sw.parametric_transfer_function(a, [[1], [1]], [[1, 1]], [[0]], S)
    for coeff in _coefficients(den, 2) + _coefficients(num[0, 0], 2):
        p, q = sympy.fraction(sympy.factor(coeff))
        assert sympy.gcd(sympy.expand(p), sympy.expand(q)) in (1, -1)
    assert sympy.cancel(_coefficients(den, 2)[1] - (-(k + 1) - k)) == 0


def test_random_seeded_models_of_mixed_structure():
    # (sympy) seeded MIMO models with a direct term, orders 2 and 3
    rng = random.Random(5)
    for trial in range(2):
        n = rng.randint(2, 3)
        a, b, c, d, _ = random_model(900 + trial, n, 2, m=2, p=2, density=0.6)
        d = d + sympy.Matrix(2, 2, lambda i, j: symbols(2)[(i + j) % 2] / 3)
        _check_against_sympy(a, b, c, d)


def test_returns_numpy_array_of_polys():
    a, b, c, d, _ = two_mass_drive()
    num, den = sw.parametric_transfer_function(a, b, c, d, S)
    assert isinstance(num, np.ndarray) and num.dtype == object and num.shape == (2, 1)
    assert all(isinstance(x, sympy.Poly) for x in num.reshape(-1))
    assert isinstance(den, sympy.Poly) and den.gens == (S,) and den.LC() == 1 and den.degree() == 3

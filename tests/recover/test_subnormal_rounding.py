"""Coefficients in the subnormal range are correctly rounded (rounded once, to the
subnormal grid itself): bit-exact against Python's ``float(Fraction)``, which is correctly
rounded (round to nearest, ties to even), on the exact value of the float data."""

from fractions import Fraction

import numpy as np
import pytest
import sympy as sp

import statewright as sw

TINY = 2.0**-1074  # the subnormal quantum


def _exact_charpoly(a):
    """(sympy) the characteristic polynomial of the float matrix, exactly."""
    m = sp.Matrix([[sp.Rational(Fraction(float(x))) for x in row] for row in a])
    lam = sp.Symbol("s")
    return [Fraction(int(sp.fraction(c)[0]), int(sp.fraction(c)[1])) for c in m.charpoly(lam).all_coeffs()]


def _double_rounding_case(k, delta, sign):
    """det [[1 + delta, 1], [d, B]] = B - d + B delta with B = 2^-1023 + 2^-1074 and
    d = B - k 2^-1074: for delta = 2^-52 the exact value is (k + 1/2) 2^-1074 + 2^-1126,
    just above a tie of the subnormal grid; rounding first to 53 bits lands on the tie."""
    b = 2.0**-1023 + TINY
    d = b - k * TINY
    return sign * np.array([[1.0 + delta, 1.0], [d, b]])


CASES = [
    _double_rounding_case(k, delta, sign)
    for k in (2**20, 2**20 + 2, 2**30, 2**40, 6, 1)
    for delta in (2.0**-52, -(2.0**-53), 3 * 2.0**-52)
    for sign in (1.0, -1.0)
]


@pytest.mark.parametrize("method", ["auto", "exact"])
@pytest.mark.parametrize("index", range(len(CASES)))
def test_subnormal_determinant_is_correctly_rounded(method, index):
    a = CASES[index]
    got = sw.characteristic_polynomial(a, method=method)
    ref = [float(c) for c in _exact_charpoly(a)]  # (Python float(Fraction): correctly rounded)
    assert abs(ref[2]) < 2.0**-1022  # the case is in the subnormal range
    assert [x.hex() for x in got] == [x.hex() for x in ref]


def test_the_tie_case_rounds_up():
    """(hand-worked) k = 2^20, delta = 2^-52: exact value (2^20 + 1/2) 2^-1074 + 2^-1126,
    above the tie, so the result is (2^20 + 1) 2^-1074 (a double rounding gives 2^20)."""
    got = sw.characteristic_polynomial(_double_rounding_case(2**20, 2.0**-52, 1.0), method="exact")
    assert got[2] == (2**20 + 1) * TINY


@pytest.mark.parametrize("seed", range(20))
@pytest.mark.parametrize("method", ["auto", "exact"])
def test_random_tiny_matrices(seed, method):
    """Dense 3 x 3 matrices scaled so that the constant coefficient is subnormal."""
    rng = np.random.default_rng(seed)
    a = rng.standard_normal((3, 3)) * 2.0 ** int(rng.integers(-358, -345))
    got = sw.characteristic_polynomial(a, method=method)
    ref = [float(c) for c in _exact_charpoly(a)]  # (Python float(Fraction))
    assert [x.hex() for x in got] == [x.hex() for x in ref]


@pytest.mark.parametrize("index", range(0, len(CASES), 5))
def test_transfer_function_numerator_subnormal(index):
    """num of C (sI - A)^-1 B with C = [0, 1], B = e_1 is d s + (stuff): compare every
    coefficient with the exact value (sympy), rounded by float(Fraction)."""
    a = CASES[index]
    b, c = np.array([[1.0], [0.0]]), np.array([[0.0, 1.0]])
    num, den = sw.transfer_function(a, b, c, [[0.0]], method="exact")
    s = sp.Symbol("s")
    am = sp.Matrix([[sp.Rational(Fraction(float(x))) for x in row] for row in a])
    adj = (s * sp.eye(2) - am).adjugate()
    ref_num = sp.Poly(sp.expand((sp.Matrix(c.astype(int).tolist()) * adj * sp.Matrix(b.astype(int).tolist()))[0]), s)
    coeffs = [Fraction(str(x)) for x in ref_num.all_coeffs()]
    coeffs = [Fraction(0)] * (3 - len(coeffs)) + coeffs
    assert [x.hex() for x in num[0, 0]] == [float(x).hex() for x in coeffs]
    assert [x.hex() for x in den] == [float(x).hex() for x in _exact_charpoly(a)]

"""Fuzz tests of the parametric functions over malformed expressions (contract in
tests/fuzz_strategies.py: success with results of the documented kinds, or ModelError)."""

from fractions import Fraction

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

import statewright as sw
from fuzz_strategies import (
    CI_SLOW,
    FAILED,
    attempt,
    check_realization,
    huge_int,
    option,
    watchdog_output,  # noqa: F401  (autouse fixture: the watchdog prints past capture)
)
from swtest_helpers import ALL_FORMS

sympy = pytest.importorskip("sympy")

S = sympy.Symbol("s")
K, J, B = sympy.symbols("k J b")

GOOD_ENTRIES = [
    sympy.Integer(0),
    sympy.Integer(1),
    sympy.Integer(-3),
    sympy.Rational(2, 7),
    K,
    -K / J,
    B / J,
    1 / (J + K),
    K * J - B**2,
    (K**2 - 1) / (K - 1),
    3,
    Fraction(5, 4),
    np.int64(2),
]
BAD_ENTRIES = [
    0.5,
    np.float64(1.5),
    sympy.Float(0.25) * K,
    sympy.sin(K),
    sympy.sqrt(K),
    sympy.exp(J),
    sympy.pi * K,
    sympy.I * K,
    sympy.zoo,
    sympy.nan,
    sympy.oo,
    K / (J - J),
    S * K,
    1 / (S * J),
    "k/J",
    None,
    True,
    K ** (10**6),
    [1, 2],
    object(),
    sympy.Matrix([[K]]),
]


@st.composite
def entry(draw, bad_rate=0.1):
    if draw(st.floats(0, 1)) < bad_rate:
        return draw(st.sampled_from(BAD_ENTRIES))
    if draw(st.booleans()):
        return sympy.Integer(draw(huge_int())) if draw(st.floats(0, 1)) < 0.05 else draw(st.sampled_from(GOOD_ENTRIES))
    x, y = draw(st.sampled_from(GOOD_ENTRIES)), draw(st.sampled_from(GOOD_ENTRIES[1:5]))
    return sympy.sympify(x) * y if not isinstance(x, Fraction) else sympy.Rational(x.numerator, x.denominator) * y


@st.composite
def matrix(draw, rows, cols):
    kind = draw(st.sampled_from(["lists"] * 4 + ["sympy", "array", "wrong_shape", "flat", "scalar", "ragged"]))
    if kind == "wrong_shape":
        rows, cols = draw(st.integers(0, 3)), draw(st.integers(0, 3))
    data = [[draw(entry()) for _ in range(cols)] for _ in range(rows)]
    if kind == "sympy" and all(isinstance(x, (int, sympy.Expr)) for row in data for x in row):
        try:
            return sympy.Matrix(rows, cols, [x for row in data for x in row])
        except Exception:
            return data
    if kind == "array":
        arr = np.empty((rows, cols), dtype=object)
        for i in range(rows):
            for j in range(cols):
                arr[i, j] = data[i][j]
        return arr
    if kind == "flat":
        return [x for row in data for x in row]
    if kind == "scalar":
        return draw(entry())
    if kind == "ragged" and rows > 1:
        return [data[0], data[1][:-1] if cols else [1]]
    return data


@st.composite
def model(draw):
    n, m, p = draw(st.integers(0, 4)), draw(st.integers(1, 2)), draw(st.integers(1, 2))
    return [draw(matrix(*shape)) for shape in ((n, n), (n, m), (p, n), (p, m))]


@CI_SLOW
@given(mats=model(), s=st.sampled_from([S, S, S, S, "s", None, K, sympy.Integer(1)]))
def test_parametric_transfer_function(mats, s):
    result = attempt(sw.parametric_transfer_function, *mats, s)
    if result is FAILED:
        return
    num, den = result
    assert isinstance(den, sympy.Poly) and den.LC() == 1
    assert isinstance(num, np.ndarray) and num.dtype == object
    assert all(isinstance(x, sympy.Poly) and x.degree() <= den.degree() for x in num.reshape(-1))


BAD_COEFFICIENTS = [x for x in BAD_ENTRIES if isinstance(x, (float, sympy.Expr))]


@st.composite
def coefficient(draw):
    if draw(st.floats(0, 1)) < 0.05:
        return draw(st.sampled_from(BAD_COEFFICIENTS))
    x = draw(st.sampled_from(GOOD_ENTRIES))
    return sympy.Rational(x.numerator, x.denominator) if isinstance(x, Fraction) else sympy.sympify(x)


@st.composite
def expression(draw):
    den = sum(draw(coefficient()) * S**k for k in range(draw(st.integers(0, 4)))) + draw(
        st.sampled_from([S, J * S**2, 0])
    )
    num = sum(draw(coefficient()) * S**k for k in range(draw(st.integers(0, 3))))
    kind = draw(st.sampled_from(["ratio"] * 4 + ["pair", "bad_s", "delay", "root", "string", "triple"]))
    if kind == "pair":
        return (num, den)
    if kind == "bad_s":
        return 1 / (S + K ** (1 / S))
    if kind == "delay":
        return sympy.exp(-S * K) / (S + 1)
    if kind == "root":
        return 1 / (sympy.sqrt(S * K) + 1)
    if kind == "string":
        return "k/(s+J)"
    if kind == "triple":
        return (num, den, num)
    try:
        return num / den
    except Exception:
        return num


@CI_SLOW
@given(expr=expression(), form=option(ALL_FORMS))
def test_realize_expression_with_parameters(expr, form):
    r = attempt(sw.realize_expression, expr, S, form)
    if r is not FAILED:
        check_realization(r, m=1, p=1)

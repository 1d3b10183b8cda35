"""realize_expression with parameters: each companion form realizes the expression
identically in the parameters (references named beside each check)."""

import pytest

import statewright as sw
from swtest_helpers import COMPANION_FORMS

sympy = pytest.importorskip("sympy")

S = sympy.Symbol("s")
J, B, K, R = sympy.symbols("J b k R", positive=True)

EXPRESSIONS = [
    1 / (J * S**2 + B * S + K),
    (K * S + 1) / (J * S**2 + B * S + K) + sympy.Rational(1, 2),
    (S + R) / (S**3 + J * S**2 / R + K * S + B),
    (B * S + K) / (S * (J * S**2 + B * S + K)),
]


def _sympy_transfer(r):
    # (sympy) C (sI - A)^-1 B + D by sympy's own inverse, cancelled
    a, b, c, d = (sympy.Matrix(x.tolist()) for x in r)
    n = a.shape[0]
    if n == 0:
        return sympy.cancel(d[0, 0])
    return sympy.cancel((c * (S * sympy.eye(n) - a).inv() * b + d)[0, 0])


@pytest.mark.parametrize("form", COMPANION_FORMS)
@pytest.mark.parametrize("index", range(len(EXPRESSIONS)))
def test_each_form_realizes_the_expression(form, index):
    expr = EXPRESSIONS[index]
    r = sw.realize_expression(expr, S, form)
    assert r.a.dtype == object
    assert set(r.info["parameters"]) == expr.free_symbols - {S}
    assert sympy.cancel(_sympy_transfer(r) - expr) == 0


def test_controllable_canonical_pattern_from_the_contract():
    # (API contract table) ones on the superdiagonal, last row [-a_0, ..., -a_{n-1}] of the
    # monic denominator, B = e_n, C = [c_0, ..., c_{n-1}], D = b_n.
    r = sw.realize_expression((K * S + 1) / (J * S**2 + B * S + K), S, "controllable_canonical")
    a, b, c, d = r
    assert [sympy.simplify(x) for x in a[1]] == [-K / J, -B / J]
    assert list(a[0]) == [0, 1]
    assert [list(x) for x in b] == [[0], [1]]
    assert [sympy.simplify(x - y) for x, y in zip(c[0], [1 / J, K / J])] == [0, 0]
    assert d[0, 0] == 0


def test_agrees_with_parametric_transfer_function():
    # (identity) the transfer function of the realization, by the parametric recursion,
    # is the expression over its monic denominator
    expr = (S + R) / (S**3 + J * S**2 / R + K * S + B)
    r = sw.realize_expression(expr, S, "observability")
    num, den = sw.parametric_transfer_function(r.a, r.b, r.c, r.d, S)
    assert sympy.cancel(num[0, 0].as_expr() / den.as_expr() - expr) == 0


def test_parameter_free_expressions_keep_fractions():
    from fractions import Fraction

    r = sw.realize_expression((S + 3) / (2 * S**2 + 6 * S + 4), S)
    assert isinstance(r.a[0, 0], Fraction)


@pytest.mark.parametrize(
    "expr, word",
    [
        (sympy.sin(S) / (S + K), "rational"),
        (1 / (sympy.sqrt(S) + K), "rational"),
        (sympy.sqrt(K) / (S + 1), "rational function of the parameters"),
        (sympy.pi * K / (S + 1), "rational function of the parameters"),
        (sympy.Float(0.5) * K / (S + 1), "float"),
        (K * S**2 / (S + 1), "improper"),
        (K / (S - S), "finite"),
    ],
)
def test_refusals_name_expr(expr, word):
    with pytest.raises(sw.ModelError, match="expr") as info:
        sw.realize_expression(expr, S)
    assert word in str(info.value)


def test_modal_and_float_mode_refused_with_parameters():
    with pytest.raises(sw.ModelError, match="form"):
        sw.realize_expression(1 / (S + K), S, "modal")
    with pytest.raises(sw.ModelError, match="symbols other than"):
        sw.realize_expression(1 / (S + K), S, exact=False)

"""The Jordan (parallel) form: exact against sympy (apart, jordan_form), float against the
exact form and sympy's residues; tolerance and refusals."""

from fractions import Fraction

import numpy as np
import pytest
import sympy as sp

import statewright as sw

s = sp.Symbol("s")
EPS = np.finfo(float).eps


def _expr(coeffs):
    return sum(sp.Rational(str(Fraction(c))) * s**k for k, c in enumerate(reversed(list(coeffs))))


def _sym(r):
    return [
        sp.Matrix([[sp.Rational(x.numerator, x.denominator) for x in row] for row in m]) for m in (r.a, r.b, r.c, r.d)
    ]


def _apart_terms(expr):
    """(sympy reference) {(monic factor, order): numerator} of sympy.apart's expansion."""
    out = {}
    for term in sp.Add.make_args(sp.apart(sp.together(expr), s)):
        num, den = sp.fraction(sp.together(term))
        coeff, factors = sp.factor_list(den, s)
        if not factors:
            continue  # the polynomial part (none for proper data)
        ((f, j),) = factors
        lc = sp.Poly(f, s).LC()
        out[(tuple(sp.Poly(sp.expand(f / lc), s).all_coeffs()), j)] = sp.expand(num / (coeff * lc**j))
    return out


CASES = [
    ([1, 2], [1, 5, 7, 3]),  # (s+2)/((s+1)^2 (s+3))
    ([2, -1, 3], sp.Poly((s + 1) ** 3 * (s - 2), s).all_coeffs()),  # triple pole and a simple one
    ([1, 0, 0, 1], sp.Poly((s**2 + 1) ** 2 * (s + 3), s).all_coeffs()),  # double irreducible quadratic
    ([3, 1], sp.Poly((s**2 + 2) * (2 * s + 1) ** 2, s).all_coeffs()),  # non-monic, rational double pole -1/2
    ([1, 0], sp.Poly(s**2 * (s - sp.Rational(3, 4)) * (s**2 - 2), s).all_coeffs()),  # pole 0 twice, s^2 - 2
]


@pytest.mark.parametrize("num, den", CASES)
def test_exact_jordan_form_against_sympy(num, den):
    den = [Fraction(str(c)) for c in den]
    r = sw.realize(num, den, "jordan", exact=True)
    A, B, C, D = _sym(r)
    g = _expr(num) / _expr(den)
    # (identity) the transfer function is preserved exactly
    assert sp.simplify(C * (s * sp.eye(A.shape[0]) - A).inv() * B + D - sp.Matrix([[g]])) == sp.zeros(1, 1)
    # (sympy reference) A is similar to the companion matrix: the same exact Jordan form
    companion = sp.Matrix(sw.realize(num, den, "controllable_canonical", exact=True).a.tolist())
    assert A.jordan_form()[1] == companion.jordan_form()[1]
    # (sympy reference) partial fractions of every order: sympy.apart
    ref = _apart_terms(g)
    got = {}
    for f, m, nums in zip(r.info["factors"], r.info["multiplicities"], r.info["residues"]):
        for j, p in enumerate(nums, start=1):
            if any(x != 0 for x in p):
                got[(tuple(sp.Rational(x.numerator, x.denominator) for x in f), j)] = sp.expand(_expr(p))
    assert got == ref


def test_hand_derivation_double_pole():
    # (hand) (s+2)/((s+1)^2 (s+3)) = (1/4)/(s+1) + (1/2)/(s+1)^2 - (1/4)/(s+3)
    r = sw.realize([1, 2], [1, 5, 7, 3], "jordan", exact=True)
    F = Fraction
    assert r.a.tolist() == [[F(-3), 0, 0], [0, F(-1), F(1)], [0, 0, F(-1)]]
    assert r.b[:, 0].tolist() == [1, 0, 1] and r.c[0].tolist() == [F(-1, 4), F(1, 2), F(1, 4)]
    assert r.info["multiplicities"] == (1, 2)


def test_exact_rational_poles_give_true_jordan_blocks():
    # (identity) a rational pole of multiplicity 3: the 3x3 block [[p,1,0],[0,p,1],[0,0,p]]
    den = sp.Poly((s - sp.Rational(1, 3)) ** 3, s).all_coeffs()
    r = sw.realize([1], [Fraction(str(c)) for c in den], "jordan", exact=True)
    p = Fraction(1, 3)
    assert r.a.tolist() == [[p, 1, 0], [0, p, 1], [0, 0, p]]


def test_float_matches_the_exact_form():
    # (sympy reference via the exact form) the same example in float: residues to 1e-15
    f = sw.realize([1.0, 2.0], [1.0, 5.0, 7.0, 3.0], "jordan")
    e = sw.realize([1, 2], [1, 5, 7, 3], "jordan", exact=True)
    np.testing.assert_allclose(f.a, e.a.astype(float), atol=4 * EPS)
    np.testing.assert_allclose(f.c, e.c.astype(float), rtol=8 * EPS)
    np.testing.assert_array_equal(f.b, e.b.astype(float))
    assert f.info["multiplicities"] == (1, 2)
    assert f.info["transfer_error"] <= 1e-14
    assert np.isfinite(f.info["condition"]) and f.info["condition"] >= 1
    assert f.info["cluster_spread"][1] <= 1e-7


def test_float_repeated_complex_pair_against_sympy_residues():
    # (s + 1) / ((s^2 + 2 s + 5)^2 (s + 1/2)): poles -1 +- 2j twice, -1/2
    den_expr = (s**2 + 2 * s + 5) ** 2 * (s + sp.Rational(1, 2))
    den = [float(c) for c in sp.Poly(den_expr, s).all_coeffs()]
    r = sw.realize([1.0, 1.0], den, "jordan")
    assert r.info["multiplicities"] == (2, 1)  # ascending real part: -1 +- 2j first
    p = -1 + 2 * sp.I
    g = (s + 1) / den_expr
    h = (s + 1) / ((s - sp.conjugate(p)) ** 2 * (s + sp.Rational(1, 2)))  # g (s - p)^2
    # (sympy reference) r_2 = h(p), r_1 = h'(p)
    ref = [complex(sp.N(sp.diff(h, s).subs(s, p), 30)), complex(sp.N(h.subs(s, p), 30))]
    np.testing.assert_allclose(r.info["residues"][0], ref, rtol=1e-13)
    np.testing.assert_allclose(r.info["poles"][0], -1 + 2j, rtol=1e-15)
    # the documented pattern: [[s, w], [-w, s]] blocks with I above
    np.testing.assert_allclose(r.a[:4, :4], [[-1, 2, 1, 0], [-2, -1, 0, 1], [0, 0, -1, 2], [0, 0, -2, -1]], atol=1e-14)
    for z in (0.3j, 1.0 + 1.0j, 5.0j):
        ref_value = complex(sp.N(g.subs(s, sp.nsimplify(z)), 30))
        np.testing.assert_allclose(r.evaluate(z)[0, 0], ref_value, rtol=1e-12)


def test_default_tol_merges_a_rounded_repeated_pair_and_a_smaller_tol_splits_it():
    # (identity) np.poly of a double pole rounds the coefficients: two roots ~1e-8 apart
    den = list(np.poly([-0.3, -0.3, -2.0]))
    r = sw.realize([1.0], den, "jordan")
    assert r.info["multiplicities"] == (1, 2)
    assert r.info["tol"] == 1e-6
    # two poles at relative distance 1e-3 are merged only when asked
    den = list(np.poly([-1.0, -1.001]))
    assert sw.realize([1.0], den, "jordan").info["multiplicities"] == (1, 1)
    merged = sw.realize([1.0], den, "jordan", tol=2e-3)
    assert merged.info["multiplicities"] == (2,)
    # (hand) (s + c)^2 - (s + 1)(s + 1.001) = (0.001 / 2)^2 with c = 1.0005: a second-order change
    assert 1e-8 < merged.info["transfer_error"] < 1e-5


def test_bad_tolerances_are_refused():
    for bad in (-1.0, float("nan"), float("inf"), "1e-6"):
        with pytest.raises(sw.ModelError, match="tol"):
            sw.realize([1.0], [1.0, 2.0, 1.0], "jordan", tol=bad)
    with pytest.raises(sw.ModelError, match="tol"):
        sw.realize([1.0], [1.0, 2.0, 1.0], "modal", tol=1e-6)
    with pytest.raises(sw.ModelError, match="tol"):
        sw.realize([1], [1, 2, 1], "jordan", exact=True, tol=1e-6)


@pytest.mark.parametrize("form, key", [("jordan", "condition"), ("modal", "eigenvector_condition")])
def test_condition_of_a_singular_basis_is_none_not_infinite(form, key):
    # (API contract: a float result is finite) poles 1e60 apart in magnitude make the
    # basis from the balanced companion form singular in float64; the fuzz run found the
    # Jordan form reporting inf there. The diagnostic is None instead.
    r = sw.realize([0.0, 0.0, 0.0, 0.0], [1e-60, 1.0, 1.0, 4.99100856e-84, 0.0], form)
    assert r.info[key] is None
    r = sw.realize([1.0, 3.0], [1.0, 3.0, 2.0], form)  # poles -1, -2 (hand): a finite figure
    assert np.isfinite(r.info[key]) and r.info[key] >= 1.0

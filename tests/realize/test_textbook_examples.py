"""Worked examples from published textbooks.

The values below are recalled, not copied: every one is marked "(from memory)", and every
recalled number is re-derived independently inside the test (sympy, exact) before
statewright is compared with it, so a misremembered value fails loudly instead of
silently testing the wrong thing.
"""

from fractions import Fraction

import numpy as np
import sympy

import statewright as sw

s = sympy.symbols("s")


def _frac_rows(rows):
    return [[Fraction(x) for x in row] for row in rows]


def _sympy_tf(A, B, C, D):
    """Exact G(s) = C (sI - A)^-1 B + D as a sympy expression."""
    A, B, C, D = (sympy.Matrix(x) for x in (A, B, C, D))
    n = A.shape[0]
    return sympy.simplify((C * (s * sympy.eye(n) - A).inv() * B + D)[0, 0])


def _assert_exact_equal(actual, expected):
    actual = np.asarray(actual, dtype=object)
    expected = np.asarray(expected, dtype=object)
    assert actual.shape == expected.shape
    for idx in np.ndindex(actual.shape):
        assert isinstance(actual[idx], Fraction)
        assert actual[idx] == expected[idx], (idx, actual[idx], expected[idx])


# --------------------------------------------------------------------------------------
# Nise, Control Systems Engineering: phase-variable form with a numerator polynomial
# (from memory): C(s)/R(s) = (s^2 + 7s + 2)/(s^3 + 9s^2 + 26s + 24), phase-variable
# (controllable canonical) form A = [[0,1,0],[0,0,1],[-24,-26,-9]], B = [0,0,1]^T,
# C = [2, 7, 1].
# --------------------------------------------------------------------------------------

NISE_NUM = [1, 7, 2]
NISE_DEN = [1, 9, 26, 24]
NISE_A = [[0, 1, 0], [0, 0, 1], [-24, -26, -9]]
NISE_B = [[0], [0], [1]]
NISE_C = [[2, 7, 1]]


def test_nise_recalled_values_are_consistent():
    # (sympy exact) the recalled matrices do realize the recalled transfer function
    G = _sympy_tf(NISE_A, NISE_B, NISE_C, [[0]])
    assert sympy.simplify(G - (s**2 + 7 * s + 2) / (s**3 + 9 * s**2 + 26 * s + 24)) == 0
    assert sympy.factor(s**3 + 9 * s**2 + 26 * s + 24) == (s + 2) * (s + 3) * (s + 4)


def test_nise_phase_variable_form():
    # Nise, Control Systems Engineering (from memory), verified above with sympy
    r = sw.realize(NISE_NUM, NISE_DEN, form="controllable_canonical", exact=True)
    _assert_exact_equal(r.a, _frac_rows(NISE_A))
    _assert_exact_equal(r.b, _frac_rows(NISE_B))
    _assert_exact_equal(r.c, _frac_rows(NISE_C))
    _assert_exact_equal(r.d, [[Fraction(0)]])
    rf = sw.realize(NISE_NUM, NISE_DEN)
    np.testing.assert_array_equal(rf.a, NISE_A)
    np.testing.assert_array_equal(rf.c, NISE_C)


def test_nise_modal_form():
    # poles -2, -3, -4 (sympy factorisation above): ascending real part gives diag(-4, -3, -2);
    # residues of (s^2+7s+2)/((s+2)(s+3)(s+4)) are C_i B_i for each mode (sympy exact)
    r = sw.realize(NISE_NUM, NISE_DEN, form="modal")
    np.testing.assert_allclose(r.a, np.diag([-4.0, -3.0, -2.0]), atol=1e-12)
    G = (s**2 + 7 * s + 2) / ((s + 2) * (s + 3) * (s + 4))
    residues = [float(sympy.limit((s - p) * G, s, p)) for p in (-4, -3, -2)]
    np.testing.assert_allclose(r.c[0] * r.b[:, 0], residues, rtol=1e-12)
    # hand check of those residues: at -4: (16-28+2)/((-2)(-1)) = -5; at -3: (9-21+2)/((-1)(1)) = 10;
    # at -2: (4-14+2)/((1)(2)) = -4
    np.testing.assert_allclose(residues, [-5.0, 10.0, -4.0])


# --------------------------------------------------------------------------------------
# Ogata, Modern Control Engineering: canonical forms of Y(s)/U(s) = (s + 3)/(s^2 + 3s + 2)
# (from memory): controllable canonical A = [[0, 1], [-2, -3]], B = [0; 1], C = [3, 1];
# observable canonical A = [[0, -2], [1, -3]], B = [3; 1], C = [0, 1]; diagonal form
# with poles -1, -2 and C_i B_i = 2 (at -1) and -1 (at -2).
# --------------------------------------------------------------------------------------


def test_ogata_recalled_values_are_consistent():
    # (sympy exact)
    target = (s + 3) / (s**2 + 3 * s + 2)
    assert sympy.simplify(_sympy_tf([[0, 1], [-2, -3]], [[0], [1]], [[3, 1]], [[0]]) - target) == 0
    assert sympy.simplify(_sympy_tf([[0, -2], [1, -3]], [[3], [1]], [[0, 1]], [[0]]) - target) == 0
    assert sympy.simplify(sympy.apart(target, s) - (2 / (s + 1) - 1 / (s + 2))) == 0


def test_ogata_canonical_forms():
    # Ogata, Modern Control Engineering (from memory), verified above with sympy
    r = sw.realize([1, 3], [1, 3, 2], form="controllable_canonical", exact=True)
    _assert_exact_equal(r.a, _frac_rows([[0, 1], [-2, -3]]))
    _assert_exact_equal(r.b, _frac_rows([[0], [1]]))
    _assert_exact_equal(r.c, _frac_rows([[3, 1]]))
    r = sw.realize([1, 3], [1, 3, 2], form="observable_canonical", exact=True)
    _assert_exact_equal(r.a, _frac_rows([[0, -2], [1, -3]]))
    _assert_exact_equal(r.b, _frac_rows([[3], [1]]))
    _assert_exact_equal(r.c, _frac_rows([[0, 1]]))


def test_ogata_diagonal_form():
    # statewright orders by ascending real part: -2 first, then -1
    r = sw.realize([1.0, 3.0], [1.0, 3.0, 2.0], form="modal")
    np.testing.assert_allclose(r.a, np.diag([-2.0, -1.0]), atol=1e-13)
    np.testing.assert_allclose(r.c[0] * r.b[:, 0], [-1.0, 2.0], rtol=1e-12)


# --------------------------------------------------------------------------------------
# Franklin, Powell & Emami-Naeini, Feedback Control of Dynamic Systems: control canonical
# form of G(s) = (s + 2)/(s^2 + 7s + 12) (from memory): A = [[-7, -12], [1, 0]], B = [1; 0],
# C = [1, 2], D = 0; modal form from G(s) = 2/(s + 4) - 1/(s + 3).
# (That book's "control canonical form" is statewright's `controller` form.)
# --------------------------------------------------------------------------------------


def test_fpe_recalled_values_are_consistent():
    # (sympy exact)
    target = (s + 2) / (s**2 + 7 * s + 12)
    assert sympy.simplify(_sympy_tf([[-7, -12], [1, 0]], [[1], [0]], [[1, 2]], [[0]]) - target) == 0
    assert sympy.simplify(sympy.apart(target, s) - (2 / (s + 4) - 1 / (s + 3))) == 0


def test_fpe_control_canonical_and_modal():
    # Franklin, Powell & Emami-Naeini (from memory), verified above with sympy
    r = sw.realize([1, 2], [1, 7, 12], form="controller", exact=True)
    _assert_exact_equal(r.a, _frac_rows([[-7, -12], [1, 0]]))
    _assert_exact_equal(r.b, _frac_rows([[1], [0]]))
    _assert_exact_equal(r.c, _frac_rows([[1, 2]]))
    _assert_exact_equal(r.d, [[Fraction(0)]])
    m = sw.realize([1.0, 2.0], [1.0, 7.0, 12.0], form="modal")
    np.testing.assert_allclose(m.a, np.diag([-4.0, -3.0]), atol=1e-13)
    np.testing.assert_allclose(m.c[0] * m.b[:, 0], [2.0, -1.0], rtol=1e-12)


# --------------------------------------------------------------------------------------
# Ogata, Modern Control Engineering: y''' + 6y'' + 11y' + 6y = 6u (from memory), i.e.
# G(s) = 6/(s^3 + 6s^2 + 11s + 6) with poles -1, -2, -3.
# --------------------------------------------------------------------------------------


def test_third_order_three_real_poles():
    # (sympy exact) factorisation and partial fractions re-derived here
    assert sympy.factor(s**3 + 6 * s**2 + 11 * s + 6) == (s + 1) * (s + 2) * (s + 3)
    G = 6 / (s**3 + 6 * s**2 + 11 * s + 6)
    assert sympy.simplify(sympy.apart(G, s) - (3 / (s + 1) - 6 / (s + 2) + 3 / (s + 3))) == 0
    r = sw.realize([6.0], [1.0, 6.0, 11.0, 6.0], form="modal")
    np.testing.assert_allclose(r.a, np.diag([-3.0, -2.0, -1.0]), atol=1e-12)
    np.testing.assert_allclose(r.c[0] * r.b[:, 0], [3.0, -6.0, 3.0], rtol=1e-12)
    r = sw.realize([6], [1, 6, 11, 6], exact=True)
    _assert_exact_equal(r.a, _frac_rows([[0, 1, 0], [0, 0, 1], [-6, -11, -6]]))
    _assert_exact_equal(r.c, _frac_rows([[6, 0, 0]]))


# --------------------------------------------------------------------------------------
# Kailath, Linear Systems: the controller / observer / controllability / observability
# forms of H(s) = (b1 s^2 + b2 s + b3)/(s^3 + a1 s^2 + a2 s + a3) (from memory: controller
# form A = [[-a1, -a2, -a3], [1, 0, 0], [0, 1, 0]], b = e1, c = [b1, b2, b3]; the
# controllability form has the controllability matrix I and c = Markov parameters).
# Instantiated with a1, a2, a3 = 6, 11, 6 and b1, b2, b3 = 1, 5, 3.
# --------------------------------------------------------------------------------------


def test_kailath_forms_symbolic_then_numeric():
    a1, a2, a3, b1, b2, b3 = sympy.symbols("a1 a2 a3 b1 b2 b3")
    H = (b1 * s**2 + b2 * s + b3) / (s**3 + a1 * s**2 + a2 * s + a3)
    Ac = sympy.Matrix([[-a1, -a2, -a3], [1, 0, 0], [0, 1, 0]])
    bc = sympy.Matrix([1, 0, 0])
    cc = sympy.Matrix([[b1, b2, b3]])
    # (sympy exact) the recalled controller form realizes H for all coefficients
    assert sympy.simplify((cc * (s * sympy.eye(3) - Ac).inv() * bc)[0, 0] - H) == 0
    # Markov parameters by series expansion in 1/s (sympy exact)
    z = sympy.symbols("z")
    vals = {a1: 6, a2: 11, a3: 6, b1: 1, b2: 5, b3: 3}
    Hz = sympy.simplify(H.subs(vals).subs(s, 1 / z))
    ser = sympy.series(Hz, z, 0, 4).removeO()
    markov = [Fraction(str(ser.coeff(z, k))) for k in (1, 2, 3)]
    assert markov == [Fraction(1), Fraction(-1), Fraction(-2)]  # hand: 1; 5-6 = -1; 3-6*(-1)-11 = -2

    r = sw.realize([1, 5, 3], [1, 6, 11, 6], form="controller", exact=True)
    _assert_exact_equal(r.a, _frac_rows([[-6, -11, -6], [1, 0, 0], [0, 1, 0]]))
    _assert_exact_equal(r.b, _frac_rows([[1], [0], [0]]))
    _assert_exact_equal(r.c, _frac_rows([[1, 5, 3]]))
    r = sw.realize([1, 5, 3], [1, 6, 11, 6], form="controllability", exact=True)
    _assert_exact_equal(r.c, [markov])
    _assert_exact_equal(sw.controllability_matrix(r.a, r.b, exact=True), _frac_rows(np.eye(3, dtype=int).tolist()))
    r = sw.realize([1, 5, 3], [1, 6, 11, 6], form="observability", exact=True)
    _assert_exact_equal(r.b, [[m] for m in markov])
    _assert_exact_equal(sw.observability_matrix(r.a, r.c, exact=True), _frac_rows(np.eye(3, dtype=int).tolist()))


# --------------------------------------------------------------------------------------
# Faddeev-LeVerrier by hand on A = [[3, 1, 5], [3, 3, 1], [4, 6, 4]]: a small worked example
# of the recursion as it is commonly reproduced (values recalled, from memory; source not
# certain, so every value is re-derived with sympy below):
# c1 = -10, N1 = A - 10 I; c2 = 4; c3 = -40: p(s) = s^3 - 10 s^2 + 4 s - 40, det A = 40,
# eigenvalues 10 and +-2j.
# --------------------------------------------------------------------------------------

FL_A = [[3, 1, 5], [3, 3, 1], [4, 6, 4]]


def test_faddeev_leverrier_worked_example():
    M = sympy.Matrix(FL_A)
    # (sympy exact) re-derive the recalled values
    assert M.charpoly(s).all_coeffs() == [1, -10, 4, -40]
    assert M.det() == 40
    assert set(M.eigenvals()) == {10, 2 * sympy.I, -2 * sympy.I}
    adj = (s * sympy.eye(3) - M).adjugate()
    N = [sympy.Matrix(3, 3, lambda i, j: sympy.Poly(adj[i, j], s).coeff_monomial(s ** (2 - k))) for k in range(3)]
    assert N[0] == sympy.eye(3)
    assert N[1] == M - 10 * sympy.eye(3)
    assert N[2] == M * N[1] + 4 * sympy.eye(3)

    coeffs, adjs = sw.faddeev_leverrier(FL_A, exact=True)
    _assert_exact_equal(coeffs, [Fraction(x) for x in (1, -10, 4, -40)])
    for k in range(3):
        _assert_exact_equal(adjs[k], [[Fraction(int(N[k][i, j])) for j in range(3)] for i in range(3)])
    cf, af = sw.faddeev_leverrier(np.array(FL_A, dtype=float))
    np.testing.assert_array_equal(cf, [1.0, -10.0, 4.0, -40.0])
    np.testing.assert_array_equal(
        af, np.array([[[float(N[k][i, j]) for j in range(3)] for i in range(3)] for k in range(3)])
    )
    # A^-1 = -N_2 / c_3 (identity of the recursion), checked against numpy
    np.testing.assert_allclose(-af[2] / cf[3], np.linalg.inv(np.array(FL_A, dtype=float)), rtol=1e-14)

"""Minimal realization: pole-zero cancellations, hidden MIMO modes, the info it reports.

Reduced transfer functions are computed exactly in sympy (sympy.cancel); responses are
compared with numpy's C (sI - A)^-1 B + D of the original model.
"""

import numpy as np
import pytest
import sympy

import statewright as sw
from structure_helpers import EPS, assert_same_response, response
from swtest_helpers import COMPANION_FORMS

S = sympy.symbols("s")
POINTS = [0.5j, 2.0j, 1.0 + 1.0j, -0.5 + 3.0j, 7.0 - 2.0j]


def poly_coeffs(expr):
    """Integer/rational coefficients of a polynomial in s, highest power first."""
    return [sympy.Rational(c) for c in sympy.Poly(expr, S).all_coeffs()]


def reduced(num_roots, den_roots, gain=1):
    """(num, den) float coefficient lists of gain*prod(s - z)/prod(s - p) and the reduced
    (num, den) after sympy.cancel, as exact rationals (denominator monic)."""
    num = gain * sympy.prod([S - z for z in num_roots])
    den = sympy.prod([S - p for p in den_roots])
    g = sympy.cancel(num / den)
    rn, rd = sympy.fraction(g)
    lead = sympy.Poly(rd, S).LC()
    rn, rd = sympy.expand(rn / lead), sympy.expand(rd / lead)
    return (
        [float(c) for c in poly_coeffs(sympy.expand(num))],
        [float(c) for c in poly_coeffs(sympy.expand(den))],
        poly_coeffs(rn),
        poly_coeffs(rd),
    )


def check_siso_against(r, rnum, rden, rel=1e-10):
    """r has degree len(rden)-1 and transfer function rnum/rden (exact rationals), to a
    relative accuracy `rel`."""
    n = len(rden) - 1
    assert r.n_states == n
    # coefficients, after normalising the denominator to be monic (sympy exact reference)
    num, den = r.transfer_function()
    num = np.asarray(num, dtype=float).reshape(-1)
    den = np.asarray(den, dtype=float).reshape(-1)
    num, den = num / den[0], den / den[0]
    ref_num = np.array([0.0] * (n + 1 - len(rnum)) + [float(c) for c in rnum])
    ref_den = np.array([float(c) for c in rden])
    scale = max(np.abs(ref_den).max(), np.abs(ref_num).max())
    np.testing.assert_allclose(den, ref_den, rtol=0, atol=rel * scale)
    np.testing.assert_allclose(num[-len(ref_num) :], ref_num, rtol=0, atol=rel * scale)
    # values at complex points (sympy exact rational function evaluated in floats)
    for z in POINTS:
        ref = complex(
            np.polyval([complex(float(c)) for c in rnum], z) / np.polyval([complex(float(c)) for c in rden], z)
        )
        np.testing.assert_allclose(r.evaluate(z)[0, 0], ref, rtol=rel)


# --------------------------------------------------------------------------------------
# the basic example: G(s) = (s+1)(s+3) / ((s+1)(s+2)(s+4))
# --------------------------------------------------------------------------------------


@pytest.mark.parametrize("form", COMPANION_FORMS)
def test_single_cancellation_all_forms(form):
    num, den, rnum, rden = reduced([-1, -3], [-1, -2, -4])
    assert rnum == [1, 3] and rden == [1, 6, 8]  # (sympy exact) (s+3)/((s+2)(s+4))
    r = sw.realize(num, den, form)
    assert r.n_states == 3
    m = sw.minimal_realization(*r)
    check_siso_against(m, rnum, rden)
    # the minimal part is controllable and observable (identity)
    assert sw.is_controllable(m.a, m.b) and sw.is_observable(m.a, m.c)
    # poles: -2 and -4 remain, -1 is gone
    np.testing.assert_allclose(np.sort(np.linalg.eigvals(m.a).real), [-4.0, -2.0], atol=1e-12)
    # info: the controllable forms are controllable with the cancelled mode unobservable,
    # the observable forms are observable with the cancelled mode uncontrollable (identity)
    controllable_forms = {"controllable_canonical", "controller", "controllability"}
    assert m.info["controllable_dimension"] == (3 if form in controllable_forms else 2)
    assert m.info["minimal_dimension"] == 2
    A, B, C, D = r
    assert m.info["tol"][0] == pytest.approx(9 * EPS * max(np.linalg.norm(A), np.linalg.norm(B)), rel=1e-12)
    assert m.info["tol"][1] == pytest.approx(9 * EPS * max(np.linalg.norm(A), np.linalg.norm(C)), rel=1e-12)
    assert len(m.info["controllability_singular_values"]) >= 1
    assert len(m.info["observability_singular_values"]) >= 1
    np.testing.assert_array_equal(m.d, D)


def test_single_cancellation_modal_form():
    # the modal form splits the (rounded, nearly zero) residue of the cancelled pole
    # between B and C, about 1e-8 each: a near-cancellation, removed with a caller's tol
    num, den, rnum, rden = reduced([-1, -3], [-1, -2, -4])
    r = sw.realize(num, den, "modal")
    m = sw.minimal_realization(*r, tol=1e-6)
    assert m.n_states == 2
    for z in POINTS:
        ref = np.polyval([1.0, 3.0], z) / np.polyval([1.0, 6.0, 8.0], z)
        np.testing.assert_allclose(m.evaluate(z)[0, 0], ref, rtol=1e-7)


# exact cancellations of integer roots (numerator roots, denominator roots)
CANCELLATIONS = [
    ([-1, -3], [-1, -2, -4]),
    ([-1, -1, -5], [-1, -1, -2, -3]),  # a double pole cancelled twice
    ([-2], [-1, -2, -3]),
    ([-2, -19], [-1, -2, -4, -9]),
    ([-9, -8, -5, -11], [-9, -8, -5, -3, -1, -7]),
    ([-4, -9, -7], [-4, -9, -7, -3, -1]),
    ([-1, -2, -3], [-1, -2, -3]),  # everything cancels: a pure gain
    ([-3, -4], [-1, -2]),  # biproper, nothing cancels
]


@pytest.mark.parametrize("form", COMPANION_FORMS)
@pytest.mark.parametrize(
    "zeros,poles", CANCELLATIONS, ids=[f"{len(z)}z{len(p)}p-{i}" for i, (z, p) in enumerate(CANCELLATIONS)]
)
def test_exact_cancellations_default_tol(zeros, poles, form):
    # integer coefficients: every companion form holds exact data, and the cancellations
    # are exact ("exact pole-zero cancellations are found with the default" tol)
    num, den, rnum, rden = reduced(zeros, poles)
    r = sw.realize(num, den, form)
    m = sw.minimal_realization(*r)
    assert m.info["minimal_dimension"] == m.n_states
    check_siso_against(m, rnum, rden)
    assert_same_response(tuple(m), tuple(r), delta=1e-13)


@pytest.mark.parametrize("form", COMPANION_FORMS)
@pytest.mark.parametrize(
    "zeros,poles", CANCELLATIONS, ids=[f"{len(z)}z{len(p)}p-{i}" for i, (z, p) in enumerate(CANCELLATIONS)]
)
def test_exact_cancellations_explicit_tol(zeros, poles, form):
    # a tol relative to the data, far above rounding and far below the kept couplings
    num, den, rnum, rden = reduced(zeros, poles)
    r = sw.realize(num, den, form)
    tol = 1e-9 * max(np.linalg.norm(x) for x in r[:3])
    m = sw.minimal_realization(*r, tol=tol)
    # the companion forms of degree 5-6 with clustered roots are ill-conditioned: what was
    # cut is rounding amplified to ~1e-8, and the reduced coefficients carry that much
    check_siso_against(m, rnum, rden, rel=1e-6)


def test_full_cancellation_leaves_the_gain():
    m = sw.minimal_realization(*sw.realize([1.0, 1.0], [1.0, 1.0]))
    assert m.n_states == 0
    np.testing.assert_array_equal(m.d, [[1.0]])
    m = sw.minimal_realization(*sw.realize([2.0, 6.0], [1.0, 3.0], "observable_canonical"))
    assert m.n_states == 0
    np.testing.assert_allclose(m.d, [[2.0]], rtol=1e-15)


def test_no_cancellation_keeps_every_state():
    # (s+3)/((s+1)(s+2)(s+4)): coprime (sympy gcd 1), so 3 states stay
    num, den = sympy.expand(S + 3), sympy.expand((S + 1) * (S + 2) * (S + 4))
    assert sympy.gcd(num, den) == 1
    for form in COMPANION_FORMS + ("modal",):
        r = sw.realize([1.0, 3.0], [1.0, 7.0, 14.0, 8.0], form)
        m = sw.minimal_realization(*r)
        assert m.n_states == 3
        assert_same_response(tuple(m), tuple(r), delta=1e-13)


def test_near_cancellation_with_tol():
    # (s + 1 + 1e-9)/((s+1)(s+2)): at the default tol the 1e-9 difference is kept; a tol
    # of 1e-6 removes it, at the cost of an error of about 1e-9 in the response
    r = sw.realize([1.0, 1.0 + 1e-9], [1.0, 3.0, 2.0])
    assert sw.minimal_realization(*r).n_states == 2
    m = sw.minimal_realization(*r, tol=1e-6)
    assert m.n_states == 1
    for z in POINTS:
        np.testing.assert_allclose(m.evaluate(z), r.evaluate(z), rtol=1e-7)
        np.testing.assert_allclose(m.evaluate(z)[0, 0], 1.0 / (z + 2.0), rtol=1e-7)


# --------------------------------------------------------------------------------------
# MIMO
# --------------------------------------------------------------------------------------


def test_mimo_hidden_modes():
    # modes -1..-4; the inputs cannot reach -3, the outputs cannot see -4 (identity, PBH)
    A = np.diag([-1.0, -2.0, -3.0, -4.0])
    B = np.array([[1.0, 0.0], [1.0, 2.0], [0.0, 0.0], [3.0, 1.0]])
    C = np.array([[1.0, 1.0, 1.0, 0.0], [0.0, 2.0, 5.0, 0.0]])
    D = np.array([[0.0, 1.0], [0.5, 0.0]])
    m = sw.minimal_realization(A, B, C, D)
    assert m.n_states == 2 and (m.n_inputs, m.n_outputs) == (2, 2)
    assert m.info["controllable_dimension"] == 3
    np.testing.assert_allclose(np.sort(np.linalg.eigvals(m.a).real), [-2.0, -1.0], atol=1e-12)
    for z in POINTS:
        np.testing.assert_allclose(m.evaluate(z), response(A, B, C, D, z), rtol=1e-12, atol=1e-14)
    # hidden by a random change of coordinates, still two states (tol above its rounding)
    rng = np.random.default_rng(8)
    Sx = rng.standard_normal((4, 4)) + 4 * np.eye(4)
    Ah, Bh, Ch = Sx @ A @ np.linalg.inv(Sx), Sx @ B, C @ np.linalg.inv(Sx)
    mh = sw.minimal_realization(Ah, Bh, Ch, D, tol=1e-8)
    assert mh.n_states == 2
    assert_same_response(tuple(mh), (A, B, C, D), delta=1e-8)


def entrywise_realization(residues, pole):
    """One state per (i, j) entry of G(s) = R / (s - pole): a non-minimal realization."""
    p, m = residues.shape
    n = p * m
    A = pole * np.eye(n)
    B = np.zeros((n, m))
    C = np.zeros((p, n))
    k = 0
    for i in range(p):
        for j in range(m):
            B[k, j] = 1.0
            C[i, k] = residues[i, j]
            k += 1
    return A, B, C, np.zeros((p, m))


@pytest.mark.parametrize(
    "residues",
    [
        [[1, 2], [3, 6]],  # rank 1
        [[1, 0], [0, 1]],  # rank 2
        [[1, 2, 3], [2, 4, 6], [1, 1, 1]],  # rank 2
        [[0, 0], [0, 0]],  # rank 0
        [[2, 1, 0], [1, 0, 1]],  # rank 2, 2 x 3
    ],
)
def test_mimo_mcmillan_degree_single_pole(residues):
    # for G(s) = R/(s + 2) the McMillan degree is rank R (Gilbert's realization,
    # from memory); rank in sympy (sympy exact)
    Rs = sympy.Matrix(residues)
    degree = Rs.rank()
    R = np.array(residues, dtype=float)
    A, B, C, D = entrywise_realization(R, -2.0)
    m = sw.minimal_realization(A, B, C, D)
    assert m.n_states == degree
    for z in POINTS:
        np.testing.assert_allclose(m.evaluate(z), R / (z + 2.0), rtol=1e-12, atol=1e-14)


def test_exact_integer_system_minimal_dimension():
    # the integer 4-state system of test_kalman: its Hankel rank (the minimal dimension) is
    # rank(O K) = 1 (sympy exact)
    A = np.array([[9, 0, 12, 12], [16, -8, 9, 8], [-26, 2, -28, -16], [0, -2, -1, -13]], dtype=float)
    B = np.array([[3], [5], [-10], [7]], dtype=float)
    C = np.array([[2, 0, 0, 0]], dtype=float)
    As, Bs, Cs = (sympy.Matrix(x.astype(int)) for x in (A, B, C))
    K = sympy.Matrix.hstack(*[As**j * Bs for j in range(4)])
    O = sympy.Matrix.vstack(*[Cs * As**j for j in range(4)])
    hankel_rank = (O * K).rank()
    assert hankel_rank == 1
    m = sw.minimal_realization(A, B, C, [[0.0]])
    assert m.info["controllable_dimension"] == K.rank()
    assert m.n_states == hankel_rank
    assert_same_response(tuple(m), (A, B, C, np.zeros((1, 1))), delta=1e-12)


def test_exact_integer_system_explicit_tol():
    # the same system with a tol inside the gap of the reported singular values: the Hankel
    # rank 1 and controllable dimension 3 (sympy exact, as above) are found
    A = np.array([[9, 0, 12, 12], [16, -8, 9, 8], [-26, 2, -28, -16], [0, -2, -1, -13]], dtype=float)
    B = np.array([[3], [5], [-10], [7]], dtype=float)
    C = np.array([[2, 0, 0, 0]], dtype=float)
    m = sw.minimal_realization(A, B, C, [[0.0]], tol=1e-9)
    assert m.info["controllable_dimension"] == 3
    assert m.n_states == 1
    assert_same_response(tuple(m), (A, B, C, np.zeros((1, 1))), delta=1e-8)


def test_already_minimal_and_empty():
    rng = np.random.default_rng(4)
    A = rng.standard_normal((5, 5))
    B = rng.standard_normal((5, 2))
    C = rng.standard_normal((3, 5))
    D = rng.standard_normal((3, 2))
    m = sw.minimal_realization(A, B, C, D)
    assert m.n_states == 5
    assert m.info["controllable_dimension"] == 5 and m.info["minimal_dimension"] == 5
    assert_same_response(tuple(m), (A, B, C, D))
    # nothing removed: the state matrix is similar to A (a power-of-two diagonal scaling and
    # orthogonal transformations), so it has the same eigenvalues (identity)
    ev = np.sort_complex(np.linalg.eigvals(m.a))
    ev0 = np.sort_complex(np.linalg.eigvals(A))
    np.testing.assert_allclose(ev, ev0, rtol=0, atol=1e-12 * np.linalg.norm(A))
    e = sw.minimal_realization(np.zeros((0, 0)), np.zeros((0, 2)), np.zeros((1, 0)), [[1.0, 2.0]])
    assert e.n_states == 0 and e.n_inputs == 2 and e.n_outputs == 1
    z = sw.minimal_realization(A, np.zeros((5, 2)), C, D)
    assert z.n_states == 0
    np.testing.assert_array_equal(z.d, D)

"""Invariant and transmission zeros, normal rank, DC gain and zeros-poles-gain.

References: sympy (exact determinant of the system matrix), mpmath (polynomial roots at
60 digits), scipy.linalg.solve (DC gain), numpy.poly, identities and constructed models
whose zeros are known by construction.
"""

import itertools
import json
from fractions import Fraction
from pathlib import Path

import mpmath
import numpy as np
import pytest
import scipy.linalg
import sympy

import statewright as sw

RNG_SEED = 20261203


def orthogonal(rng, n):
    q, r = np.linalg.qr(rng.standard_normal((n, n)))
    return q * np.sign(np.diag(r))


def as_complex_sorted(values):
    z = np.array(values, dtype=complex)
    return z[np.lexsort((z.imag, z.real))]


def matched_distance(found, expected):
    """Largest distance after pairing each expected value with its nearest found value."""
    found = list(np.asarray(found, dtype=complex))
    worst = 0.0
    for e in np.asarray(expected, dtype=complex):
        k = int(np.argmin([abs(f - e) for f in found]))
        worst = max(worst, abs(found[k] - e) / (1 + abs(e)))
        found.pop(k)
    return worst


def exact_zeros(a, b, c, d, digits=60):
    """Roots of det [[sI - A, -B], [C, D]] (the Rosenbrock system matrix), exact
    determinant by sympy, roots by mpmath at ``digits`` digits."""
    s = sympy.Symbol("s")
    to_q = lambda x: sympy.Rational(Fraction(float(x)))  # noqa: E731 - the float's exact value
    n = a.shape[0]
    A = sympy.Matrix(a.shape[0], a.shape[1], [to_q(x) for x in a.ravel()])
    B = sympy.Matrix(b.shape[0], b.shape[1], [to_q(x) for x in b.ravel()])
    C = sympy.Matrix(c.shape[0], c.shape[1], [to_q(x) for x in c.ravel()])
    D = sympy.Matrix(d.shape[0], d.shape[1], [to_q(x) for x in d.ravel()])
    P = sympy.BlockMatrix([[s * sympy.eye(n) - A, -B], [C, D]]).as_explicit()
    det = sympy.Poly(P.det(method="berkowitz"), s)
    coeffs = det.all_coeffs()
    if all(cf == 0 for cf in coeffs):
        return None
    with mpmath.workdps(digits):
        if len(coeffs) == 1:
            return np.array([], dtype=complex)
        roots = mpmath.polyroots([mpmath.mpf(cf.p) / cf.q for cf in coeffs], maxsteps=400, extraprec=400)
        return np.array([complex(r) for r in roots])


# ---------------------------------------------------------------------------- square models


@pytest.mark.parametrize("n, m", [(2, 1), (3, 1), (4, 1), (3, 2), (4, 2), (4, 3)])
def test_square_zeros_match_the_exact_determinant_of_the_system_matrix(n, m):
    # Reference: sympy determinant of the Rosenbrock system matrix, mpmath roots.
    # Small integer data keep the exact determinant cheap.
    rng = np.random.default_rng(RNG_SEED + 10 * n + m)
    for trial in range(2):
        a = rng.integers(-5, 6, (n, n)).astype(float)
        b = rng.integers(-3, 4, (n, m)).astype(float)
        c = rng.integers(-3, 4, (m, n)).astype(float)
        d = rng.integers(-2, 3, (m, m)).astype(float) if trial == 1 else np.zeros((m, m))
        expected = exact_zeros(a, b, c, d)
        if expected is None:  # det P(s) = 0 identically: G is singular for every s
            assert sw.normal_rank(a, b, c, d) < m
            continue
        z = sw.invariant_zeros(a, b, c, d)
        assert z.dtype == complex
        assert len(z) == len(expected), (z, expected)
        assert matched_distance(z, expected) < 1e-10, (z, expected)
        # sorted by real part, then imaginary part
        assert np.array_equal(z, as_complex_sorted(z))


def test_zeros_are_invariant_under_state_input_and_output_scaling():
    # (identity) zeros of (T^-1 A T, T^-1 B R, L C T, L D R) are those of (A, B, C, D).
    rng = np.random.default_rng(RNG_SEED)
    n, m = 4, 2
    a, b, c = rng.standard_normal((n, n)), rng.standard_normal((n, m)), rng.standard_normal((m, n))
    d = np.zeros((m, m))
    t = np.diag([1e-6, 3.0, 7e5, 0.01])
    r = np.diag([1e8, 3e-4])
    ell = np.diag([5e-9, 11.0])
    z1 = sw.invariant_zeros(a, b, c, d)
    z2 = sw.invariant_zeros(np.linalg.solve(t, a @ t), np.linalg.solve(t, b @ r), ell @ c @ t, ell @ d @ r)
    assert len(z1) == len(z2) == n - m  # generic square model with CB invertible
    assert matched_distance(z2, z1) < 1e-9


# ---------------------------------------------------------------------------- planted zeros


def planted_model(rng, rows, cols):
    """A (rows x cols) model whose invariant zeros are known by construction: every entry is
    (s + 1)(s - 2)(s^2 + 2s + 5) q_ij(s) / den(s), with random integer cofactors q_ij of
    degree 1, one controllable companion block per input (exact integer data)."""
    common = np.real(np.poly([-1.0, 2.0, -1 + 2j, -1 - 2j]))
    den = np.real(np.poly([-3.0, -4.0, -5.0, -6.0, -7.0, -8.0]))
    n = 6
    blocks_a, blocks_b, blocks_c = [], [], []
    for _ in range(cols):
        comp = np.diag(np.ones(n - 1), 1)
        comp[-1, :] = -den[:0:-1]
        blocks_a.append(comp)
        e = np.zeros((n, 1))
        e[-1, 0] = 1.0
        blocks_b.append(e)
        # controllable canonical: C = [c_0, ..., c_{n-1}] of the numerator (degree n - 1)
        cofactors = [rng.integers(-3, 4, 2).astype(float) + [4.0, 0.0] for _ in range(rows)]
        blocks_c.append(np.array([np.polymul(common, q)[::-1] for q in cofactors]))
    a = scipy.linalg.block_diag(*blocks_a)
    b = scipy.linalg.block_diag(*blocks_b)
    c = np.hstack(blocks_c)
    return a, b, c, np.zeros((rows, cols))


PLANTED = [-1.0, 2.0, -1 + 2j, -1 - 2j]


@pytest.mark.parametrize("rows, cols", [(2, 1), (3, 1), (1, 2), (1, 3), (3, 2)])
def test_non_square_models_have_exactly_the_planted_zeros(rows, cols):
    # Reference: the construction (known structure). G = common(s) Q(s) / den(s) with Q a
    # random rows x cols matrix of degree-1 polynomials, of full rank min(rows, cols) at
    # every s (generic). So rank G drops exactly at the roots of common(s), by
    # min(rows, cols): each planted zero has that multiplicity, and there are no others.
    rng = np.random.default_rng(RNG_SEED + rows * 7 + cols)
    a, b, c, d = planted_model(rng, rows, cols)
    z = sw.invariant_zeros(a, b, c, d)
    expected = PLANTED * min(rows, cols)
    assert len(z) == len(expected), (z, expected)
    assert matched_distance(z, expected) < 1e-8, (z, expected)
    assert sw.normal_rank(a, b, c, d) == min(rows, cols)
    # (identity) a signed permutation of the states (exact) changes no zero. Known limit: a
    # zero of a non-square model is a non-generic structure, and in permuted coordinates the
    # rounding of the reduction can land above the default tol (3e-11 against 4e-12 on the
    # 3 x 2 case), so this check passes the caller's tol, as the docstring advises.
    perm = np.eye(a.shape[0])[rng.permutation(a.shape[0])] * rng.choice([-1.0, 1.0], a.shape[0])
    z2 = sw.invariant_zeros(perm.T @ a @ perm, perm.T @ b, c @ perm, d, tol=1e-9)
    assert len(z2) == len(expected) and matched_distance(z2, expected) < 1e-7


def test_wide_model_zeros_match_the_dual():
    # (identity) the dual (A^T, C^T, B^T, D^T) has the same invariant zeros.
    rng = np.random.default_rng(RNG_SEED + 3)
    a, b, c, d = planted_model(rng, 3, 1)
    z1 = sw.invariant_zeros(a, b, c, d)
    z2 = sw.invariant_zeros(a.T, c.T, b.T, d.T)
    assert matched_distance(z2, z1) < 1e-10 and len(z1) == len(z2) == 4


def test_tall_model_without_common_zeros_has_none():
    # (known structure) [1/(s+1); 1/(s+2)]: no s makes both entries' numerators vanish.
    a = np.diag([-1.0, -2.0])
    b = np.array([[1.0], [1.0]])
    c = np.eye(2)
    d = np.zeros((2, 1))
    assert sw.invariant_zeros(a, b, c, d).size == 0
    assert sw.normal_rank(a, b, c, d) == 1


# ---------------------------------------------------------------------------- published


def test_two_by_two_example_with_a_right_half_plane_zero():
    # (from memory) the textbook 2x2 plant G = [[1/(s+1), 2/(s+3)], [1/(s+1), 1/(s+1)]]
    # has one transmission zero, at s = +1, although no entry has a zero there:
    # det G = (1 - s) / ((s+1)^2 (s+3)) (identity, checked by sympy below).
    a = np.diag([-1.0, -3.0, -1.0])
    b = np.array([[1.0, 0.0], [0.0, 1.0], [0.0, 1.0]])
    c = np.array([[1.0, 2.0, 0.0], [1.0, 0.0, 1.0]])
    d = np.zeros((2, 2))
    s = sympy.Symbol("s")
    G = sympy.Matrix([[1 / (s + 1), 2 / (s + 3)], [1 / (s + 1), 1 / (s + 1)]])
    assert sympy.simplify(G.det() - (1 - s) / ((s + 1) ** 2 * (s + 3))) == 0
    z = sw.transmission_zeros(a, b, c, d)
    assert z.shape == (1,) and abs(z[0] - 1.0) < 1e-13
    assert np.allclose(sw.invariant_zeros(a, b, c, d), [1.0], atol=1e-13)


def test_uncontrollable_mode_is_invariant_not_transmission_zero():
    # (identity) det [[-1-s, 0, 1], [0, -5-s, 0], [1, 1, 0]] = s + 5, while the transfer
    # function is 1/(s+1) (checked by sympy).
    a = np.diag([-1.0, -5.0])
    b = np.array([[1.0], [0.0]])
    c = np.array([[1.0, 1.0]])
    d = np.zeros((1, 1))
    assert np.allclose(exact_zeros(a, b, c, d), [-5.0])
    assert np.allclose(sw.invariant_zeros(a, b, c, d), [-5.0], atol=1e-14)
    assert sw.transmission_zeros(a, b, c, d).size == 0


# ---------------------------------------------------------------------------- SISO


@pytest.mark.parametrize("order", [3, 6, 10])
def test_siso_zeros_match_mpmath_roots_of_the_numerator(order):
    # Reference: mpmath.polyroots at 60 digits of the numerator given to realize().
    rng = np.random.default_rng(RNG_SEED + order)
    num = rng.standard_normal(order)
    den = np.concatenate([[1.0], rng.standard_normal(order)])
    r = sw.realize(num, den)
    q = orthogonal(rng, order)
    z = sw.invariant_zeros(q.T @ r.a @ q, q.T @ r.b, r.c @ q, r.d)
    with mpmath.workdps(60):
        ref = [complex(x) for x in mpmath.polyroots([mpmath.mpf(float(v)) for v in num], maxsteps=400, extraprec=300)]
    assert len(z) == order - 1
    assert matched_distance(z, ref) < 1e-9, (z, ref)


@pytest.mark.parametrize("decades", [4, 6])
def test_siso_zeros_spread_over_decades_are_accurate_relative_to_their_size(decades):
    # Reference: exact_zeros (sympy determinant of the Rosenbrock system matrix of the float
    # data, mpmath roots at 60 digits). Poles spread over `decades` decades behind a
    # random similarity: the pencil alone loses relative accuracy on the small zeros; the
    # refinement against the numerator keeps each zero accurate relative to its own size.
    rng = np.random.default_rng(RNG_SEED + decades)
    order = 8
    poles = -np.logspace(-decades / 2, decades / 2, order)
    t = rng.standard_normal((order, order))
    a = t @ np.diag(poles) @ np.linalg.inv(t)
    b = rng.standard_normal((order, 1))
    c = rng.standard_normal((1, order))
    d = np.zeros((1, 1))
    z, info = sw.invariant_zeros(a, b, c, d, return_info=True)
    ref = exact_zeros(a, b, c, d)
    assert info["refined"] and info["residual"] < 1e-12
    assert len(z) == len(ref) == order - 1
    worst = 0.0
    found = list(z)
    for e in ref:
        k = int(np.argmin([abs(f - e) for f in found]))
        worst = max(worst, abs(found[k] - e) / abs(e))
        found.pop(k)
    assert worst < 1e-12, (z, ref)


def test_zeros_poles_gain_against_mpmath_roots():
    # Reference: mpmath.polyroots at 60 digits.
    rng = np.random.default_rng(RNG_SEED + 99)
    num = rng.standard_normal(4) * 3
    den = np.concatenate([[2.0], rng.standard_normal(6)])
    zeros, poles, gain = sw.zeros_poles_gain(num, den)
    with mpmath.workdps(60):
        rz = [complex(x) for x in mpmath.polyroots([mpmath.mpf(float(v)) for v in num], extraprec=300)]
        rp = [complex(x) for x in mpmath.polyroots([mpmath.mpf(float(v)) for v in den], extraprec=300)]
    assert zeros.shape == (3,) and poles.shape == (6,)
    assert matched_distance(zeros, rz) < 1e-12 and matched_distance(poles, rp) < 1e-12
    assert gain == num[0] / den[0]
    assert np.array_equal(zeros, as_complex_sorted(zeros))
    assert np.array_equal(poles, as_complex_sorted(poles))


def test_realize_zeros_poles_gain_matches_numpy_poly():
    # Reference: numpy.poly for the coefficients of the factored polynomials.
    zeros = [-1 + 2j, -1 - 2j, 0.5]
    poles = [-3.0, -2.0 + 1j, -2.0 - 1j, -0.25]
    r = sw.realize_zeros_poles_gain(zeros, poles, 4.0, form="observer")
    num, den = sw.transfer_function(*r)
    assert np.allclose(den, np.real(np.poly(poles)), rtol=1e-14, atol=1e-14)
    assert np.allclose(num[0, 0], np.concatenate([[0.0], 4.0 * np.real(np.poly(zeros))]), rtol=1e-13, atol=1e-13)
    assert r.a.dtype == np.float64


def test_realize_zeros_poles_gain_refuses_unpaired_complex_values():
    with pytest.raises(sw.ModelError, match="poles"):
        sw.realize_zeros_poles_gain([], [-1 + 1j, -1 - 2j], 1.0)
    with pytest.raises(sw.ModelError, match="zeros"):
        sw.realize_zeros_poles_gain([0.5j], [-1.0, -2.0], 1.0)
    with pytest.raises(sw.ModelError, match="improper|zeros"):
        sw.realize_zeros_poles_gain([-1.0, -2.0], [-3.0], 1.0)


# ---------------------------------------------------------------------------- DC gain


@pytest.mark.parametrize("m, p", [(1, 1), (2, 3), (3, 2)])
def test_dc_gain_matches_a_scipy_solve(m, p):
    # Reference: D - C scipy.linalg.solve(A, B) and D + C scipy.linalg.solve(I - A, B).
    rng = np.random.default_rng(RNG_SEED + 5 * m + p)
    n = 5
    a = rng.standard_normal((n, n)) - 3 * np.eye(n)
    b, c, d = rng.standard_normal((n, m)), rng.standard_normal((p, n)), rng.standard_normal((p, m))
    g = sw.dc_gain(a, b, c, d)
    assert g.shape == (p, m)
    assert np.allclose(g, d - c @ scipy.linalg.solve(a, b), rtol=1e-12, atol=1e-12)
    ad = 0.3 * a / np.max(np.abs(np.linalg.eigvals(a)))
    gd = sw.dc_gain(ad, b, c, d, discrete=True)
    assert np.allclose(gd, d + c @ scipy.linalg.solve(np.eye(n) - ad, b), rtol=1e-12, atol=1e-12)


def test_dc_gain_refuses_an_integrator_and_keeps_a_cancelled_one():
    with pytest.raises(sw.ModelError, match="s = 0"):
        sw.dc_gain([[0.0, 1.0], [0.0, -1.0]], [[0.0], [1.0]], [[1.0, 0.0]], [[0.0]])
    with pytest.raises(sw.ModelError, match="z = 1"):
        sw.dc_gain([[1.0]], [[1.0]], [[1.0]], [[0.0]], discrete=True)
    # (identity) A = diag(0, -2), B = [0; 1], C = [1, 1]: G = 1/(s+2), G(0) = 1/2.
    g = sw.dc_gain(np.diag([0.0, -2.0]), [[0.0], [1.0]], [[1.0, 1.0]], [[0.0]])
    assert abs(g[0, 0] - 0.5) < 1e-15


# ---------------------------------------------------------------------------- batch and method


def test_batch_equals_single_calls_and_counts():
    rng = np.random.default_rng(RNG_SEED + 7)
    count, n, m, p = 12, 5, 2, 1
    a = rng.standard_normal((count, n, n))
    b = rng.standard_normal((count, n, m))
    c = rng.standard_normal((count, p, n))
    d = np.zeros((count, p, m))
    zeros, counts = sw.invariant_zeros_batch(a, b, c, d)
    assert zeros.shape == (count, n) and counts.shape == (count,)
    for i in range(count):
        single = sw.invariant_zeros(a[i], b[i], c[i], d[i])
        assert counts[i] == len(single)
        assert np.array_equal(zeros[i, : counts[i]], single)
        assert np.all(zeros[i, counts[i] :] == 0)


def test_batch_names_the_bad_model():
    a = np.zeros((4, 2, 2))
    a[:] = -np.eye(2)
    a[2, 0, 0] = np.nan
    with pytest.raises(sw.ModelError, match="model 2"):
        sw.invariant_zeros_batch(a, np.ones((4, 2, 1)), np.ones((4, 1, 2)), np.zeros((4, 1, 1)))


def test_realization_zeros_method():
    # (identity) the method is the function on the realization's own matrices.
    r = sw.realize([1.0, 3.0, 2.0], [1.0, 6.0, 11.0, 6.0], form="observer")
    assert np.array_equal(r.zeros(), sw.invariant_zeros(*r))
    assert np.allclose(r.zeros(), [-2.0, -1.0], atol=1e-13)


def _sympy_gain_at(a, b, c, d, point):
    """lim_{s -> point} G(s) per entry, exactly (sympy cancel, then the limit); None when an
    entry is infinite."""
    s = sympy.symbols("s")
    rat = lambda x: sympy.Matrix(x.shape[0], x.shape[1], lambda i, j: sympy.Rational(x[i, j]))  # noqa: E731
    am, bm, cm, dm = rat(a), rat(b), rat(c), rat(d)
    n = a.shape[0]
    resolvent = s * sympy.eye(n) - am
    g = cm * resolvent.adjugate() * bm / resolvent.det() + dm
    out = np.zeros(g.shape)
    for i in range(g.rows):
        for j in range(g.cols):
            v = sympy.limit(sympy.cancel(g[i, j]), s, point)
            if not v.is_finite:
                return None
            out[i, j] = float(v)
    return out


@pytest.mark.parametrize("discrete", [False, True])
@pytest.mark.parametrize("seed", range(60))
def test_dc_gain_at_an_exact_pole_is_refused_or_exact(discrete, seed):
    # A pole exactly at s = 0 (z = 1): a zero first column of A (of A - I). Reference:
    # sympy's exact limit of G at that point: infinite -> refused; finite (the pole
    # cancelled: b's first entry 0 and the first column of A zero below the diagonal
    # make the state uncontrollable) -> equal. Before the reduced model's test allowed for
    # the reduction's rounding, 4 of these 120 (seeds 8, 12, 24 discrete, 48 continuous)
    # came back with a finite "gain" (3e15 on one) where G is infinite.
    rng = np.random.default_rng(500 + seed)
    n, m, p = 2 + seed % 3, 1 + seed % 2, 1 + (seed // 6) % 2
    a = rng.standard_normal((n, n))
    point = 1 if discrete else 0
    if discrete:
        a /= 1.5 * np.max(np.abs(np.linalg.eigvals(a)))
    a[:, 0] = 0.0
    a[0, 0] = float(point)
    b, c, d = rng.standard_normal((n, m)), rng.standard_normal((p, n)), rng.standard_normal((p, m))
    cancelled = seed % 6 >= 3
    if cancelled:
        b[0, :] = 0.0
        a[0, 1:] = 0.0  # the first state neither steered nor fed by the others
    ref = _sympy_gain_at(a, b, c, d, point)
    if ref is None:
        with pytest.raises(sw.ModelError, match="z = 1" if discrete else "s = 0"):
            sw.dc_gain(a, b, c, d, discrete=discrete)
    else:
        g = sw.dc_gain(a, b, c, d, discrete=discrete)
        assert np.max(np.abs(g - ref)) <= 1e-10 * max(1.0, np.max(np.abs(ref)))
    assert (ref is None) != cancelled


def saved_search_case():
    """The 1 x 2 planted model of ``data/planted_1x2_search_case.json``, bit for bit: the
    orthogonal coordinates come from numpy's QR, whose rounding changes between numpy
    releases, and only some coordinates make the default decisions miss the zeros."""
    with open(Path(__file__).parent / "data" / "planted_1x2_search_case.json") as f:
        model = json.load(f)["model"]
    return [np.array([[float.fromhex(x) for x in row] for row in model[k]]) for k in "abcd"]


@pytest.mark.parametrize("seed, rows, cols, own", [("saved", 1, 2, False), (0, 2, 3, True), (7, 1, 2, True)])
def test_planted_non_square_zeros_found_by_the_verified_candidate_search(seed, rows, cols, own):
    # Reference: the construction (the planted zeros with multiplicity min(rows, cols),
    # checked exactly by scripts/nonsquare_zeros_survey.py's sympy Smith-McMillan form).
    # Cases where the default decisions miss them (survey seeds in the model's own
    # coordinates; a saved model in orthogonal ones): a kept singular value of rounding
    # origin; the candidate reduction that drops it is accepted because its zeros are
    # zeros of a pencil within rounding of the data.
    if own:
        a, b, c, d = planted_model(np.random.default_rng(seed * 100 + rows * 7 + cols), rows, cols)
    else:
        a, b, c, d = saved_search_case()
    z, info = sw.invariant_zeros(a, b, c, d, return_info=True)
    expected = PLANTED * min(rows, cols)
    assert len(z) == len(expected) and matched_distance(z, expected) < 1e-6
    assert info["candidate_tol"] is not None and info["candidate_tol"] > info["tol"]
    # An explicit tol is the caller's decision: no search.
    assert sw.invariant_zeros(a, b, c, d, tol=info["tol"], return_info=True)[1]["candidate_tol"] is None


@pytest.mark.parametrize("seed", range(6))
def test_candidate_search_invents_no_zero(seed):
    # Reference: sympy, the gcd of the maximal minors of the system matrix of small random
    # integer non-square models (generically no zero), in the given coordinates.
    rng = np.random.default_rng(900 + seed)
    rows, cols = [(2, 1), (1, 2), (3, 1), (1, 3), (3, 2), (2, 3)][seed]
    n = 3
    a = np.diag(np.ones(n - 1), 1)
    a[-1, :] = rng.integers(-3, 4, n)
    b = rng.integers(-3, 4, (n, cols)).astype(float)
    c = rng.integers(-3, 4, (rows, n)).astype(float)
    d = np.zeros((rows, cols))
    s = sympy.Symbol("s")
    as_int = lambda x: sympy.Matrix(x.astype(int))  # noqa: E731
    pencil = sympy.BlockMatrix([[s * sympy.eye(n) - as_int(a), -as_int(b)], [as_int(c), as_int(d)]]).as_explicit()
    size = min(n + rows, n + cols)
    g = 0
    for r in itertools.combinations(range(n + rows), size):
        for cc in itertools.combinations(range(n + cols), size):
            g = sympy.gcd(g, sympy.expand(pencil.extract(list(r), list(cc)).det()))
    expected = sympy.Poly(g, s).degree() if g != 0 else 0
    z = sw.invariant_zeros(a, b, c, d)
    assert len(z) == expected

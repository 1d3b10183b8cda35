"""Kalman decomposition into (controllable, observable) parts.

Four-part systems are planted in the pattern of the API and hidden behind orthogonal and
non-orthogonal changes of coordinates; sizes, subspaces, zero pattern, condition number and
transfer function are checked against the construction (identity), numpy and sympy.
"""

import itertools

import numpy as np
import pytest
import sympy

import statewright as sw
from structure_helpers import (
    EPS,
    KALMAN_PATTERN,
    assert_same_response,
    expected_kalman_subspaces,
    hide,
    orthogonal,
    part_slices,
    planted_kalman,
    subspace_distance,
    well_conditioned,
)
from swtest_helpers import names_argument


def check_decomposition(k, A, B, C, D, tol):
    """The properties every Kalman decomposition of (A, B, C, D) has (API contract)."""
    n = A.shape[0]
    sizes = k.sizes
    assert isinstance(sizes, tuple) and len(sizes) == 4 and sum(sizes) == n
    T = k.transform
    assert T.shape == (n, n)
    r = k.realization
    assert isinstance(r, sw.Realization)
    assert (r.n_states, r.n_inputs, r.n_outputs) == (n, B.shape[1], C.shape[0])
    np.testing.assert_array_equal(r.d, D)
    sl = part_slices(sizes)
    # each part's basis is orthonormal, and X1 ⊥ X2, X4 ⊥ X2, X3 ⊥ (X1, X2, X4) (identity)
    for i in range(4):
        X = T[:, sl[i]]
        assert np.linalg.norm(X.T @ X - np.eye(X.shape[1])) <= 100 * max(n, 1) * EPS

    def cross(i, j):
        return np.linalg.norm(T[:, sl[i]].T @ T[:, sl[j]]) if sizes[i] and sizes[j] else 0.0

    assert cross(0, 1) <= 1e3 * n * EPS
    assert cross(3, 1) <= 1e3 * n * EPS
    for j in (0, 1, 3):
        assert cross(2, j) <= 1e3 * n * EPS
    # condition number: the 2-norm one of T (numpy reference)
    cond = np.linalg.cond(T) if n else 1.0
    assert k.info["condition"] == pytest.approx(cond, rel=1e-6)
    # the realization is (T^-1 A T, T^-1 B, C T) (identity, numpy solve) up to the pattern
    # entries set to zero; those were small
    if n:
        At = np.linalg.solve(T, A @ T)
        Bt = np.linalg.solve(T, B)
        Ct = C @ T
        slack = cond * (1e3 * n * EPS + 10 * tol)
        assert np.linalg.norm(At - r.a) <= slack * max(np.linalg.norm(A), 1e-300)
        assert np.linalg.norm(Bt - r.b) <= slack * max(np.linalg.norm(B), 1e-300)
        assert np.linalg.norm(Ct - r.c) <= slack * max(np.linalg.norm(C), 1e-300)
    assert 0.0 <= k.info["pattern_residual"] <= cond * (1e3 * max(n, 1) * EPS + 10 * tol)
    # the zero pattern, exactly
    for i in range(4):
        for j in range(4):
            if not KALMAN_PATTERN[i, j]:
                assert np.all(r.a[sl[i], sl[j]] == 0.0), f"A block ({i + 1}, {j + 1}) not zero"
    assert np.all(r.b[sl[2]] == 0.0) and np.all(r.b[sl[3]] == 0.0)
    assert np.all(r.c[:, sl[1]] == 0.0) and np.all(r.c[:, sl[3]] == 0.0)
    # transfer function unchanged, of the whole and of the minimal part (numpy reference)
    assert_same_response(tuple(r), (A, B, C, D), delta=max(n, 1) * EPS * cond + tol)
    mini = k.minimal()
    assert isinstance(mini, sw.Realization) and mini.n_states == sizes[0]
    assert_same_response(tuple(mini), (A, B, C, D), delta=max(n, 1) * EPS * cond + tol)
    return T


# (sizes, inputs, outputs)
PLANTED = [
    ((2, 1, 1, 1), 1, 1),
    ((1, 0, 2, 1), 2, 1),
    ((0, 2, 1, 0), 1, 2),
    ((1, 1, 1, 1), 2, 2),
    ((2, 2, 2, 2), 2, 3),
    ((3, 0, 0, 0), 1, 1),
    ((0, 0, 0, 3), 2, 2),
    ((0, 0, 2, 0), 1, 1),
    ((0, 3, 0, 0), 1, 1),
    ((2, 0, 0, 2), 3, 1),
    ((1, 2, 0, 2), 1, 2),
    ((3, 1, 2, 0), 2, 2),
]


@pytest.mark.parametrize("orthogonal_change", [True, False], ids=["orthogonal", "general"])
@pytest.mark.parametrize("sizes,m,p", PLANTED)
def test_planted_kalman(sizes, m, p, orthogonal_change):
    rng = np.random.default_rng(hash((sizes, m, p, orthogonal_change)) % 2**32)
    n = sum(sizes)
    A0, B0, C0 = planted_kalman(sizes, m, p, rng)
    S = orthogonal(n, rng) if orthogonal_change else well_conditioned(n, rng, cond=10.0)
    A, B, C = hide(A0, B0, C0, S)
    D = rng.standard_normal((p, m))
    # the hidden data carry rounding errors of the change of coordinates, amplified by the
    # staircase; a tol far above them and far below the planted couplings
    tol = 1e-6
    k = sw.kalman_decomposition(A, B, C, D, tol=tol)
    assert k.sizes == sizes
    T = check_decomposition(k, A, B, C, D, tol)
    # the subspaces are the planted ones (identity): R = span(X1, X2), R∩N = span(X2),
    # N = span(X2, X4)
    R, N, RN = expected_kalman_subspaces(sizes, S)
    sl = part_slices(sizes)
    assert subspace_distance(np.hstack([T[:, sl[0]], T[:, sl[1]]]), R) <= 1e-8
    assert subspace_distance(T[:, sl[1]], RN) <= 1e-8
    assert subspace_distance(np.hstack([T[:, sl[1]], T[:, sl[3]]]), N) <= 1e-8
    # the minimal part's poles are those of the planted A11 (identity)
    np.testing.assert_allclose(
        np.sort_complex(np.linalg.eigvals(k.minimal().a)),
        np.sort_complex(np.linalg.eigvals(A0[sl[0], sl[0]])),
        atol=1e-8,
    )


@pytest.mark.parametrize("sizes,m,p", PLANTED)
def test_planted_kalman_in_form_default_tol(sizes, m, p):
    # already in the four-part form (exact zeros): the default tol recovers the sizes
    rng = np.random.default_rng(7 + sum(sizes) * 11 + m + 3 * p)
    A, B, C = planted_kalman(sizes, m, p, rng)
    D = np.zeros((p, m))
    k = sw.kalman_decomposition(A, B, C, D)
    assert k.sizes == sizes
    check_decomposition(k, A, B, C, D, n_sq_tol(A, B, C))


def n_sq_tol(A, B, C):
    n = A.shape[0]
    return n * n * EPS * max(np.linalg.norm(A), np.linalg.norm(B), np.linalg.norm(C))


def test_documented_diagonal_example():
    # modes -1, -2, -3, -4; the input reaches the first two, the output sees the first and
    # third (identity, PBH on a diagonal A)
    A = np.diag([-1.0, -2.0, -3.0, -4.0])
    B = np.array([[1.0], [1.0], [0.0], [0.0]])
    C = np.array([[1.0, 0.0, 1.0, 0.0]])
    D = np.array([[0.5]])
    k = sw.kalman_decomposition(A, B, C, D)
    assert k.sizes == (1, 1, 1, 1)
    T = check_decomposition(k, A, B, C, D, n_sq_tol(A, B, C))
    # one mode per part, in the documented order (identity)
    np.testing.assert_allclose(np.diag(k.realization.a), [-1.0, -2.0, -3.0, -4.0], atol=1e-14)
    assert k.info["condition"] == pytest.approx(1.0, rel=1e-12)
    np.testing.assert_allclose(np.abs(T), np.eye(4), atol=1e-15)


@pytest.mark.parametrize("cmask", list(itertools.product([0, 1], repeat=3)))
@pytest.mark.parametrize("omask", list(itertools.product([0, 1], repeat=3)))
def test_diagonal_patterns_pbh(cmask, omask):
    # A diagonal with distinct modes, hidden by an exact integer change of coordinates
    # (unit upper bidiagonal S, S^-1 integer: the hidden data are exact). PBH (identity):
    # mode i is controllable iff row i of B is nonzero, observable iff column i of C is.
    lam = np.array([-1.0, -2.0, -3.0])
    Bd = np.array([[1.0, 2.0], [2.0, -1.0], [1.0, 1.0]]) * np.array(cmask)[:, None]
    Cd = np.array([[1.0, -1.0, 2.0], [3.0, 1.0, 1.0]]) * np.array(omask)[None, :]
    S = np.array([[1.0, 1.0, 0.0], [0.0, 1.0, 1.0], [0.0, 0.0, 1.0]])
    Sinv = np.array([[1.0, -1.0, 1.0], [0.0, 1.0, -1.0], [0.0, 0.0, 1.0]])
    assert np.array_equal(S @ Sinv, np.eye(3))
    A, B, C = S @ np.diag(lam) @ Sinv, S @ Bd, Cd @ Sinv
    D = np.zeros((2, 2))
    expected = (
        sum(c and o for c, o in zip(cmask, omask)),
        sum(c and not o for c, o in zip(cmask, omask)),
        sum(o and not c for c, o in zip(cmask, omask)),
        sum(not c and not o for c, o in zip(cmask, omask)),
    )
    k = sw.kalman_decomposition(A, B, C, D)
    assert k.sizes == expected
    check_decomposition(k, A, B, C, D, n_sq_tol(A, B, C))
    # each part carries its modes (identity): the eigenvalues of the diagonal blocks
    sl = part_slices(k.sizes)
    ra = k.realization.a
    for part, wanted in enumerate(
        [
            [l for l, c, o in zip(lam, cmask, omask) if c and o],
            [l for l, c, o in zip(lam, cmask, omask) if c and not o],
            [l for l, c, o in zip(lam, cmask, omask) if o and not c],
            [l for l, c, o in zip(lam, cmask, omask) if not c and not o],
        ]
    ):
        got = np.sort(np.linalg.eigvals(ra[sl[part], sl[part]]).real)
        np.testing.assert_allclose(got, np.sort(wanted), atol=1e-12)
    assert sw.minimal_realization(A, B, C, D).n_states == expected[0]


def test_published_example_two_inputs():
    # C.-T. Chen, Linear System Theory and Design, 3rd ed., the third-order two-input
    # example of the controllability decomposition (from memory):
    # A = [[1,1,0],[0,1,0],[0,1,1]], B = [[0,1],[1,0],[0,1]], C = [1,1,1].
    A = np.array([[1.0, 1.0, 0.0], [0.0, 1.0, 0.0], [0.0, 1.0, 1.0]])
    B = np.array([[0.0, 1.0], [1.0, 0.0], [0.0, 1.0]])
    C = np.array([[1.0, 1.0, 1.0]])
    D = np.zeros((1, 2))
    # re-verified exactly (sympy exact): controllability rank 2, observability rank 2,
    # PBH at the only eigenvalue 1 fails for both; R = {(b, a, b)}, N = span{(1, 0, -1)}
    As, Bs, Cs = sympy.Matrix(A.astype(int)), sympy.Matrix(B.astype(int)), sympy.Matrix(C.astype(int))
    K = sympy.Matrix.hstack(Bs, As * Bs, As**2 * Bs)
    O = sympy.Matrix.vstack(Cs, Cs * As, Cs * As**2)
    assert K.rank() == 2 and O.rank() == 2
    assert set(As.eigenvals()) == {1}
    assert sympy.Matrix.hstack(As - sympy.eye(3), Bs).rank() == 2
    assert sympy.Matrix.vstack(As - sympy.eye(3), Cs).rank() == 2
    R = K.columnspace()
    N = O.nullspace()
    dim_rn = len(R) + len(N) - sympy.Matrix.hstack(*(R + N)).rank()
    assert dim_rn == 0
    expected = (len(R) - dim_rn, dim_rn, 3 - sympy.Matrix.hstack(*(R + N)).rank(), len(N) - dim_rn)
    assert expected == (2, 0, 0, 1)

    assert sw.controllability_staircase(A, B).rank == 2
    assert sw.observability_staircase(A, B, C).rank == 2
    assert not sw.is_controllable(A, B) and not sw.is_observable(A, C)
    k = sw.kalman_decomposition(A, B, C, D)
    assert k.sizes == expected
    T = check_decomposition(k, A, B, C, D, n_sq_tol(A, B, C))
    sl = part_slices(k.sizes)
    Rf = np.array(sympy.Matrix.hstack(*R), dtype=float)
    Nf = np.array(sympy.Matrix.hstack(*N), dtype=float)
    assert subspace_distance(T[:, sl[0]], Rf) <= 1e-12
    assert subspace_distance(T[:, sl[3]], Nf) <= 1e-12
    # the transfer matrix, exactly: C (sI - A)^-1 B (sympy exact)
    s = sympy.symbols("s")
    G = sympy.simplify(Cs * (s * sympy.eye(3) - As).inv() * Bs)
    mini = sw.minimal_realization(A, B, C, D)
    assert mini.n_states == 2
    for z in (0.5j, 2.0 + 1.0j, -3.0 + 0.25j):
        ref = np.array(G.subs(s, sympy.nsimplify(z)).evalf(30), dtype=complex)
        np.testing.assert_allclose(mini.evaluate(z), ref, rtol=1e-12)
        np.testing.assert_allclose(k.minimal().evaluate(z), ref, rtol=1e-12)


def test_exact_integer_system_sympy():
    # an integer 4-state system (exact data) with distinct eigenvalues -3, -17, -10 ± sqrt 6;
    # its structure is decided exactly in sympy: sizes (1, 2, 1, 0)
    A = np.array([[9, 0, 12, 12], [16, -8, 9, 8], [-26, 2, -28, -16], [0, -2, -1, -13]], dtype=float)
    B = np.array([[3], [5], [-10], [7]], dtype=float)
    C = np.array([[2, 0, 0, 0]], dtype=float)
    D = np.zeros((1, 1))
    As, Bs, Cs = (sympy.Matrix(x.astype(int)) for x in (A, B, C))
    K = sympy.Matrix.hstack(*[As**j * Bs for j in range(4)])
    O = sympy.Matrix.vstack(*[Cs * As**j for j in range(4)])
    R, N = K.columnspace(), O.nullspace()
    span = sympy.Matrix.hstack(*(R + N)).rank()
    dim_rn = len(R) + len(N) - span
    expected = (len(R) - dim_rn, dim_rn, 4 - span, len(N) - dim_rn)
    assert expected == (1, 2, 1, 0)  # (sympy exact)
    assert sw.controllability_staircase(A, B).rank == len(R)
    assert sw.observability_staircase(A, B, C).rank == 4 - len(N)
    k = sw.kalman_decomposition(A, B, C, D)
    assert k.sizes == expected
    check_decomposition(k, A, B, C, D, n_sq_tol(A, B, C))


@pytest.mark.parametrize("tol", [1e-10, 1e-8])
def test_exact_integer_system_explicit_tol(tol):
    # the same system as above; sizes (1, 2, 1, 0) established exactly in sympy there
    A = np.array([[9, 0, 12, 12], [16, -8, 9, 8], [-26, 2, -28, -16], [0, -2, -1, -13]], dtype=float)
    B = np.array([[3], [5], [-10], [7]], dtype=float)
    C = np.array([[2, 0, 0, 0]], dtype=float)
    D = np.zeros((1, 1))
    k = sw.kalman_decomposition(A, B, C, D, tol=tol)
    assert k.sizes == (1, 2, 1, 0)
    check_decomposition(k, A, B, C, D, 1e-7)


@pytest.mark.parametrize("seed", [0, 1, 2, 3, 66, 106, 159])
def test_default_tol_never_fails_internally(seed):
    # rotated planted systems at the default tol: whatever the rank decisions, the result
    # is a consistent decomposition or a ModelError that explains itself, never an
    # internal failure of the core
    rng = np.random.default_rng(seed)
    sizes = tuple(int(x) for x in rng.integers(0, 4, 4))
    m, p = int(rng.integers(1, 4)), int(rng.integers(1, 4))
    n = sum(sizes)
    A0, B0, C0 = planted_kalman(sizes, m, p, rng)
    S = orthogonal(n, rng) if seed % 2 else well_conditioned(n, rng, 10.0)
    A, B, C = hide(A0, B0, C0, S)
    D = np.zeros((p, m))
    try:
        k = sw.kalman_decomposition(A, B, C, D)
    except sw.ModelError as e:
        assert "internal" not in str(e) and "panic" not in str(e), str(e)
        assert names_argument(str(e), "tol")
        return
    assert sum(k.sizes) == n and k.transform.shape == (n, n)
    cond = k.info["condition"]
    assert cond < 1 / EPS
    # whatever was decided, the transfer function is kept (numpy reference)
    delta = 1e3 * n * EPS * cond
    assert_same_response(tuple(k.realization), (A, B, C, D), delta=delta)
    assert_same_response(tuple(k.minimal()), (A, B, C, D), delta=delta)


def test_near_cancellation_needs_tol():
    # a 1e-8 coupling into the unobservable mode: observable at the default tol,
    # unobservable at tol = 1e-5 (the caller's choice)
    A = np.diag([-1.0, -2.0, -3.0])
    B = np.array([[1.0], [1.0], [1.0]])
    C = np.array([[1.0, 1.0, 1e-8]])
    D = np.zeros((1, 1))
    assert sw.kalman_decomposition(A, B, C, D).sizes == (3, 0, 0, 0)
    k = sw.kalman_decomposition(A, B, C, D, tol=1e-5)
    assert k.sizes == (2, 1, 0, 0)
    assert k.info["pattern_residual"] >= 1e-9  # the dropped coupling shows up here
    assert k.info["pattern_residual"] <= 1e-7


def test_empty_and_trivial():
    k = sw.kalman_decomposition(np.zeros((0, 0)), np.zeros((0, 1)), np.zeros((1, 0)), [[2.0]])
    assert k.sizes == (0, 0, 0, 0) and k.transform.shape == (0, 0)
    assert k.minimal().n_states == 0
    np.testing.assert_array_equal(k.minimal().d, [[2.0]])
    # nothing reachable and nothing seen
    A = np.array([[-1.0, 2.0], [0.0, -3.0]])
    k = sw.kalman_decomposition(A, np.zeros((2, 1)), np.zeros((1, 2)), [[0.0]])
    assert k.sizes == (0, 0, 0, 2)
    # everything reachable, nothing seen
    k = sw.kalman_decomposition(A, np.array([[0.0], [1.0]]), np.zeros((1, 2)), [[0.0]])
    assert k.sizes == (0, 2, 0, 0)
    # nothing reachable, everything seen
    k = sw.kalman_decomposition(A, np.zeros((2, 1)), np.array([[1.0, 0.0]]), [[0.0]])
    assert k.sizes == (0, 0, 2, 0)
    assert k.minimal().n_states == 0


def test_repr_and_info_are_read_only():
    k = sw.kalman_decomposition(np.diag([-1.0, -2.0]), np.ones((2, 1)), np.array([[1.0, 0.0]]), [[0.0]])
    assert k.sizes == (1, 1, 0, 0)
    assert set(k.info) >= {"condition", "pattern_residual"}
    with pytest.raises(TypeError):
        k.info["condition"] = 0.0
    with pytest.raises(ValueError):
        k.transform[0, 0] = 2.0

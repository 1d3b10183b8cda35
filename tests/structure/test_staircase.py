"""Controllability and observability staircase forms, is_controllable / is_observable.

Systems are planted in a known staircase form and hidden behind random orthogonal changes
of coordinates; the recovered sizes, zero patterns, transformation and frequency response
are checked against the construction (identity) and against numpy references.
"""

import numpy as np
import pytest
import sympy
from sympy.polys.matrices import DomainMatrix

import statewright as sw
from structure_helpers import (
    EPS,
    assert_same_response,
    hide,
    orthogonal,
    planted_staircase,
    random_blocks,
    response,
    subspace_distance,
)


def step_starts(blocks):
    return np.concatenate([[0], np.cumsum(blocks)]).astype(int)


def balanced_columns(B):
    """B with its columns scaled by powers of two to the exponent of the largest column norm
    (the input balancing of the default tol, API version 2)."""
    norms = np.linalg.norm(B, axis=0)
    e = np.array([np.floor(np.log2(x)) if x > 0 else 0.0 for x in norms])
    top = e[norms > 0].max() if np.any(norms > 0) else 0.0
    return B * np.where(norms > 0, 2.0 ** (top - e), 1.0)


def check_default_thresholds(s, A, B):
    """The documented default of API version 2: the first step against n^2 eps ||B_hat||_F,
    every later step against n^2 eps ||A||_F."""
    n = A.shape[0]
    assert s.tol == pytest.approx(n * n * EPS * np.linalg.norm(A), rel=1e-12, abs=0.0)
    if s.thresholds:
        assert s.thresholds[0] == pytest.approx(n * n * EPS * np.linalg.norm(balanced_columns(B)), rel=1e-12, abs=0.0)
    for t in s.thresholds[1:]:
        assert t == pytest.approx(s.tol, rel=1e-14)


def check_controllability_staircase(s, A, B, C, nc, blocks):
    """Every property of a controllability staircase of the planted system (A, B, C)."""
    n, m = B.shape
    scale = max(np.linalg.norm(A), np.linalg.norm(B))
    # sizes (planted, identity)
    assert s.rank == nc
    assert s.blocks == blocks
    assert sum(s.blocks) == s.rank
    assert s.n_states == n
    # default tolerance (version 2: each step against its own data block)
    check_default_thresholds(s, A, B)
    tol = max(s.thresholds, default=s.tol)
    # Q orthogonal (identity Q^T Q = I)
    Q = s.transform
    assert Q.shape == (n, n)
    assert np.linalg.norm(Q.T @ Q - np.eye(n)) <= 10 * max(n, 1) * EPS
    # the transformed matrices are Q^T A Q, Q^T B, C Q (identity) up to the zeroed
    # parts, whose norm is at most tol per step
    slack = 100 * max(n, 1) * EPS * scale + len(s.singular_values) * tol
    assert np.linalg.norm(Q.T @ A @ Q - s.a) <= slack
    assert np.linalg.norm(Q.T @ B - s.b) <= slack

    # the reported split residual is that of the returned Q (identity)
    def rel(x, y):
        return 0.0 if x == 0 else x / y

    if nc < n:
        assert s.split_residual[0] == pytest.approx(
            rel(np.linalg.norm((Q.T @ A @ Q)[nc:, :nc]), np.linalg.norm(A)), rel=1e-6, abs=10 * EPS
        )
        assert s.split_residual[1] == pytest.approx(
            rel(np.linalg.norm((Q.T @ B)[nc:]), np.linalg.norm(B)), rel=1e-6, abs=10 * EPS
        )
    if C is not None:
        assert np.linalg.norm(C @ Q - s.c) <= 100 * max(n, 1) * EPS * np.linalg.norm(C)
    else:
        assert s.c is None
    # zero pattern: exactly zero below the controllable part and below the staircase
    assert np.all(s.a[nc:, :nc] == 0.0)
    assert np.all(s.b[nc:, :] == 0.0)
    st = step_starts(s.blocks)
    if s.blocks:
        assert np.all(s.b[st[1] :, :] == 0.0)
        # B_1 of full row rank k_1
        # B_1 of full row rank k_1: the first step decided on the balanced columns Q^T B_hat
        sv = np.linalg.svd((Q.T @ balanced_columns(B))[: st[1]], compute_uv=False)
        assert sv.min() > s.thresholds[0]
    for i in range(len(s.blocks)):
        cols = slice(st[i], st[i + 1])
        below = st[i + 2] if i + 2 < len(st) else n
        assert np.all(s.a[below:, cols] == 0.0), f"nonzero below step {i + 1}"
        if i + 1 < len(s.blocks):
            sub = s.a[st[i + 1] : st[i + 2], cols]
            sv = np.linalg.svd(sub, compute_uv=False)
            assert len(sv) == s.blocks[i + 1]  # k_{i+1} <= k_i
            assert sv.min() > s.thresholds[i + 1], "subdiagonal block not of full row rank"
    # the decisions: kept singular values above each step's threshold, discarded ones not
    assert len(s.singular_values) == len(s.rank_gaps) == len(s.thresholds) == len(s.backward_errors)
    for sv, (kept, dropped), t in zip(s.singular_values, s.rank_gaps, s.thresholds):
        assert np.all(np.diff(sv) <= 0)  # descending
        big = sv[sv > t]
        assert (kept is None) == (big.size == 0)
        if kept is not None:
            assert kept == big[-1] and kept > t
        assert dropped <= t
    for k, sv, t in zip(s.blocks, s.singular_values, s.thresholds):
        assert int(np.sum(sv > t)) == k
    # the controllable subspace is Q[:, :nc]
    return Q[:, :nc]


# (n, m, blocks): controllable dimension 0..n, one to three inputs
CASES = [
    (1, 1, [1]),
    (1, 1, []),
    (3, 1, [1, 1, 1]),
    (3, 1, [1, 1]),
    (4, 1, [1]),
    (4, 2, []),
    (5, 2, [2, 2, 1]),
    (5, 2, [2, 1]),
    (6, 2, [2, 1, 1]),
    (6, 3, [3, 3]),
    (7, 3, [2, 2, 1]),
    (7, 3, [3, 1]),
    (8, 3, [3, 2, 2, 1]),
    (9, 2, [2, 2, 2, 2, 1]),
    (12, 3, [3, 3, 2, 1, 1]),
]


@pytest.mark.parametrize("n,m,blocks", CASES)
def test_planted_controllability_staircase(n, m, blocks):
    rng = np.random.default_rng(1000 + 17 * n + 5 * m + len(blocks))
    p = 2
    A0, B0, C0 = planted_staircase(blocks, n, m, p, rng)
    U = orthogonal(n, rng)
    A, B, C = hide(A0, B0, C0, U)
    nc = sum(blocks)
    s = sw.controllability_staircase(A, B, C)
    basis = check_controllability_staircase(s, A, B, C, nc, blocks)
    # the controllable subspace is the planted one, U * span(e_1..e_nc) (identity)
    assert subspace_distance(basis, U[:, :nc]) <= 1e-10
    # unchanged transfer function (numpy reference C (sI-A)^-1 B + D)
    D = rng.standard_normal((p, m))
    assert_same_response((s.a, s.b, s.c, D), (A, B, C, D))
    # the controllable part alone has the same transfer function (identity)
    assert_same_response((s.a[:nc, :nc], s.b[:nc], s.c[:, :nc], D), (A, B, C, D))
    # is_controllable agrees
    assert sw.is_controllable(A, B) is (nc == n)
    # without c
    s2 = sw.controllability_staircase(A, B)
    assert s2.c is None and s2.rank == nc and s2.blocks == blocks


@pytest.mark.parametrize("n,m,blocks", CASES)
def test_planted_observability_staircase(n, m, blocks):
    rng = np.random.default_rng(2000 + 13 * n + 7 * m + len(blocks))
    q = 2  # inputs of the observed system
    # the dual of a planted controllability staircase: (A^T, C = B^T) has observable
    # dimension sum(blocks) (identity)
    A0, B0, C0 = planted_staircase(blocks, n, m, q, rng)
    U = orthogonal(n, rng)
    Ah, Bh, Ch = hide(A0, B0, C0, U)
    A, C, B = Ah.T, Bh.T, Ch.T
    no = sum(blocks)
    s = sw.observability_staircase(A, B, C)
    assert s.rank == no and s.blocks == blocks
    # default tolerance (version 2), the dual of the controllability one: rows of C
    check_default_thresholds(s, A.T, C.T)
    tol = max(s.thresholds, default=s.tol)
    Q = s.transform
    assert np.linalg.norm(Q.T @ Q - np.eye(n)) <= 10 * max(n, 1) * EPS
    scale = max(np.linalg.norm(A), np.linalg.norm(C))
    slack = 100 * max(n, 1) * EPS * scale + len(s.singular_values) * tol
    assert np.linalg.norm(Q.T @ A @ Q - s.a) <= slack
    assert np.linalg.norm(C @ Q - s.c) <= slack
    assert np.linalg.norm(Q.T @ B - s.b) <= 100 * max(n, 1) * EPS * np.linalg.norm(B)
    # Q^T A Q = [[A_o, 0], [A_21, A_u]], C Q = [C_o, 0] exactly
    assert np.all(s.a[:no, no:] == 0.0)
    assert np.all(s.c[:, no:] == 0.0)
    st = step_starts(blocks)
    if blocks:
        assert np.all(s.c[:, st[1] :] == 0.0)
        assert np.linalg.svd(balanced_columns(C.T).T @ Q[:, : st[1]], compute_uv=False).min() > s.thresholds[0]
    for i in range(len(blocks)):
        rows = slice(st[i], st[i + 1])
        right = st[i + 2] if i + 2 < len(st) else n
        assert np.all(s.a[rows, right:] == 0.0)
        if i + 1 < len(blocks):
            sv = np.linalg.svd(s.a[rows, st[i + 1] : st[i + 2]], compute_uv=False)
            assert len(sv) == blocks[i + 1] and sv.min() > s.thresholds[i + 1]
    # unobservable subspace = Q[:, no:] = U^-T * span(e_{no+1}..e_n): orthogonal to the
    # observable directions (identity: C x = 0 and C A^k x = 0 there)
    if no < n:
        O = np.vstack([C @ np.linalg.matrix_power(A, k) for k in range(n)])
        assert np.linalg.norm(O @ Q[:, no:]) <= 1e-9 * np.linalg.norm(O)
    assert subspace_distance(Q[:, :no], U[:, :no]) <= 1e-10
    D = rng.standard_normal((C.shape[0], B.shape[1]))
    assert_same_response((s.a, s.b, s.c, D), (A, B, C, D))
    assert_same_response((s.a[:no, :no], s.b[:no], s.c[:, :no], D), (A, B, C, D))
    assert sw.is_observable(A, C) is (no == n)
    assert sw.observability_staircase(A, None, C).rank == no


@pytest.mark.parametrize("seed", range(8))
def test_dual_consistency(seed):
    # observability of (A, C) is controllability of (A^T, C^T) (identity): same ranks,
    # steps, kept singular values, and the same observable subspace
    rng = np.random.default_rng(3000 + seed)
    n = int(rng.integers(2, 9))
    p = int(rng.integers(1, 4))
    no = int(rng.integers(0, n + 1))
    blocks = random_blocks(no, p, rng)
    A0, B0, C0 = planted_staircase(blocks, n, p, 2, rng)
    Ah, Bh, Ch = hide(A0, B0, C0, orthogonal(n, rng))
    A, B, C = Ah.T, Ch.T, Bh.T  # the dual of the planted controllability system
    so = sw.observability_staircase(A, B, C)
    sc = sw.controllability_staircase(A.T, C.T, B.T)
    assert so.rank == sc.rank == no
    assert so.blocks == sc.blocks == blocks
    assert so.tol == pytest.approx(sc.tol, rel=1e-14)
    for x, y in zip(so.singular_values, sc.singular_values):
        big = x > so.tol
        np.testing.assert_allclose(x[big], y[y > sc.tol], rtol=1e-10)
    assert subspace_distance(so.transform[:, :no], sc.transform[:, :no]) <= 1e-10
    # the identities of each form
    assert np.allclose(so.transform.T @ A @ so.transform, so.a, atol=1e-12 * np.linalg.norm(A))
    assert np.allclose(sc.transform.T @ A.T @ sc.transform, sc.a, atol=1e-12 * np.linalg.norm(A))
    # the observability form of (A, C) and the controllability form of (A^T, C^T) are
    # transposes of staircase forms of the same step sizes: the zero patterns agree
    assert np.array_equal(so.a[:no, no:] == 0, (sc.a[no:, :no] == 0).T)
    assert sw.is_observable(A, C) == sw.is_controllable(A.T, C.T)


# --------------------------------------------------------------------------------------
# badly scaled but controllable: the controllability matrix lies, the staircase does not
# --------------------------------------------------------------------------------------


@pytest.mark.parametrize("n", [15, 16, 18, 20])
def test_badly_scaled_controllable_pair(n):
    d = -(10.0 ** np.linspace(-3, 3, n))
    A = np.diag(d)
    B = np.ones((n, 1))
    # truth (identity, PBH): distinct eigenvalues of a diagonal A and no zero entry in B
    # => rank [A - d_i I, B] = n for every i => controllable
    assert len(set(d.tolist())) == n and np.all(B != 0)
    # the controllability matrix, by statewright and by numpy, looks rank deficient
    K = sw.controllability_matrix(A, B)
    Knp = np.hstack([np.linalg.matrix_power(A, k) @ B for k in range(n)])
    np.testing.assert_allclose(K, Knp, rtol=1e-12)
    assert np.linalg.matrix_rank(Knp) < n
    assert np.linalg.matrix_rank(K) < n
    # the staircase decides correctly
    s = sw.controllability_staircase(A, B)
    assert s.rank == n and s.blocks == [1] * n
    assert sw.is_controllable(A, B)
    # dual: (A^T, B^T) observable (identity)
    assert sw.is_observable(A.T, B.T)
    assert sw.observability_staircase(A.T, None, B.T).rank == n
    # every decision clears the tolerance by orders of magnitude
    assert min(k for k, _ in s.rank_gaps) > 1e6 * s.tol


def test_badly_scaled_exact_rank_sympy():
    # (sympy exact) the rank of the controllability matrix of the very same float data:
    # each float64 is a dyadic rational, so sympy.Rational(float) is exact
    n = 15
    d = -(10.0 ** np.linspace(-3, 3, n))
    A = sympy.diag(*[sympy.Rational(float(x)) for x in d])
    b = sympy.ones(n, 1)
    cols = [b]
    for _ in range(n - 1):
        cols.append(A * cols[-1])
    K = sympy.Matrix.hstack(*cols)
    exact_rank = DomainMatrix.from_Matrix(K).convert_to(sympy.QQ).rank()
    assert exact_rank == n
    Af, Bf = np.diag(d), np.ones((n, 1))
    assert np.linalg.matrix_rank(sw.controllability_matrix(Af, Bf)) < exact_rank
    assert sw.controllability_staircase(Af, Bf).rank == exact_rank
    assert sw.is_controllable(Af, Bf)


def test_badly_scaled_uncontrollable_mode_still_found():
    # the same spread of modes with one input entry zero: exactly one mode unreachable
    # (identity, PBH: rank [A - d_k I, B] = n - 1 when B_k = 0)
    n = 16
    d = -(10.0 ** np.linspace(-3, 3, n))
    ek = np.eye(n)
    # the extreme modes are found at the default tol
    for k in (0, 1, n - 1):
        B = np.ones((n, 1))
        B[k] = 0.0
        s = sw.controllability_staircase(np.diag(d), B)
        assert s.rank == n - 1
        assert not sw.is_controllable(np.diag(d), B)
        # the unreachable direction is e_k (identity)
        assert subspace_distance(s.transform[:, n - 1 :], ek[:, k : k + 1]) <= 1e-8
    # an interior mode: the rounding in its direction is amplified through the
    # preceding small steps, so the caller raises tol (the documented remedy); the
    # reachable steps all keep singular values far above it
    k = 7
    B = np.ones((n, 1))
    B[k] = 0.0
    s = sw.controllability_staircase(np.diag(d), B, tol=1e-5)
    assert s.rank == n - 1
    assert min(kept for kept, _ in s.rank_gaps if kept is not None) > 1e-3
    assert subspace_distance(s.transform[:, n - 1 :], ek[:, k : k + 1]) <= 1e-4


# --------------------------------------------------------------------------------------
# the tolerance
# --------------------------------------------------------------------------------------


def test_tolerance_decides_near_uncontrollable():
    rng = np.random.default_rng(41)
    n, m = 6, 2
    blocks = [2, 1]
    A0, B0, C0 = planted_staircase(blocks, n, m, 1, rng)
    # a coupling of size 1e-7 from the controllable part into the unreachable part
    A0[4, 0] = 1e-7
    U = orthogonal(n, rng)
    A, B, C = hide(A0, B0, C0, U)
    s = sw.controllability_staircase(A, B)
    assert s.rank > sum(blocks)
    # the decision for the weak step was made on a singular value of size about 1e-7
    assert any(k is not None and 1e-9 < k < 1e-5 for k, _ in s.rank_gaps)
    s2 = sw.controllability_staircase(A, B, tol=1e-5)
    assert s2.tol == 1e-5
    assert s2.rank == sum(blocks) and s2.blocks == blocks
    assert any(1e-9 < dropped <= 1e-5 for _, dropped in s2.rank_gaps)
    assert not sw.is_controllable(A, B, tol=1e-5)
    assert sw.is_controllable(A, B, tol=0.0) is (s.rank == n)
    # zeroed parts are below tol: Q^T A Q differs from .a by at most about tol (identity)
    Q = s2.transform
    assert np.linalg.norm(Q.T @ A @ Q - s2.a) <= 2e-5
    assert np.linalg.norm(Q.T @ A @ Q - s2.a) >= 1e-9  # the coupling was really dropped


def test_zero_tolerance_and_huge_tolerance():
    A = np.array([[-1.0, 2.0], [0.5, -3.0]])
    B = np.array([[1.0], [0.0]])
    assert sw.controllability_staircase(A, B, tol=0).rank == 2
    # a tol above every singular value: nothing is reachable
    s = sw.controllability_staircase(A, B, tol=1e3)
    assert s.rank == 0 and s.blocks == []
    assert s.rank_gaps == [(None, 1.0)]
    assert np.all(s.b == 0.0)


def test_scaling_invariance_of_decisions():
    # the default tol scales with the data: multiplying A and B by 2**k changes no decision
    rng = np.random.default_rng(5)
    A0, B0, _ = planted_staircase([2, 1, 1], 6, 2, 1, rng)
    A, B, _ = hide(A0, B0, np.zeros((1, 6)), orthogonal(6, rng))
    ref = sw.controllability_staircase(A, B)
    for k in (-40, -10, 10, 40):
        s = sw.controllability_staircase(A * 2.0**k, B * 2.0**k)
        assert s.rank == ref.rank == 4 and s.blocks == ref.blocks
        assert s.tol == pytest.approx(ref.tol * 2.0**k, rel=1e-14)


# --------------------------------------------------------------------------------------
# small cases and documented examples
# --------------------------------------------------------------------------------------


def test_empty_and_inputless():
    s = sw.controllability_staircase(np.zeros((0, 0)), np.zeros((0, 1)))
    assert s.rank == 0 and s.blocks == [] and s.transform.shape == (0, 0)
    assert s.tol >= 0.0
    assert sw.is_controllable(np.zeros((0, 0)), np.zeros((0, 2)))
    assert sw.is_observable(np.zeros((0, 0)), np.zeros((1, 0)))
    # no input columns: nothing reachable
    A = np.diag([-1.0, -2.0, -3.0])
    s = sw.controllability_staircase(A, np.zeros((3, 0)))
    assert s.rank == 0 and s.b.shape == (3, 0)
    assert not sw.is_controllable(A, np.zeros((3, 0)))
    assert not sw.is_observable(A, np.zeros((0, 3)))
    # a zero B
    assert sw.controllability_staircase(A, np.zeros((3, 2))).rank == 0


def test_diagonal_system_by_hand():
    # modes -1, -2, -3; the input reaches the first two (identity, PBH)
    A = np.diag([-1.0, -2.0, -3.0])
    B = np.array([[1.0], [1.0], [0.0]])
    C = np.array([[1.0, 0.0, 1.0]])
    s = sw.controllability_staircase(A, B, C)
    assert s.rank == 2 and s.blocks == [1, 1]
    # the unreachable mode keeps its eigenvalue (identity)
    np.testing.assert_allclose(s.a[2, 2], -3.0, rtol=1e-14)
    np.testing.assert_allclose(np.sort(np.linalg.eigvals(s.a[:2, :2]).real), [-2.0, -1.0], rtol=1e-13)
    # the first step is B itself: singular value sqrt(2) (identity)
    np.testing.assert_allclose(s.singular_values[0], [np.sqrt(2.0)], rtol=1e-15)
    o = sw.observability_staircase(A, B, C)
    assert o.rank == 2 and o.blocks == [1, 1]
    np.testing.assert_allclose(o.a[2, 2], -2.0, rtol=1e-14)  # the unseen mode is -2
    assert not sw.is_observable(A, C) and not sw.is_controllable(A, B)
    for z in (0.5j, 2.0 + 1.0j):
        np.testing.assert_allclose(response(s.a, s.b, s.c, [[0.0]], z), response(A, B, C, [[0.0]], z), rtol=1e-14)


def test_jordan_block_pbh_sympy():
    # a 3x3 Jordan block at -2: controllable from the last state only, observable from the
    # first only (sympy exact PBH rank tests)
    A = np.array([[-2.0, 1.0, 0.0], [0.0, -2.0, 1.0], [0.0, 0.0, -2.0]])
    lam = sympy.Integer(-2)
    As = sympy.Matrix(A.astype(int).tolist())
    for k in range(3):
        B = np.zeros((3, 1))
        B[k] = 1.0
        pbh = sympy.Matrix.hstack(As - lam * sympy.eye(3), sympy.Matrix(B.astype(int).tolist()))
        expected = pbh.rank() == 3
        assert sw.is_controllable(A, B) is expected
        assert expected is (k == 2)
        # reachable dimension = k + 1 (the chain e_k, e_{k-1}, ..., e_0; identity)
        assert sw.controllability_staircase(A, B).rank == k + 1
        Cm = B.T
        pbh_o = sympy.Matrix.vstack(As - lam * sympy.eye(3), sympy.Matrix(Cm.astype(int).tolist()))
        assert sw.is_observable(A, Cm) is (pbh_o.rank() == 3)
        assert sw.observability_staircase(A, None, Cm).rank == 3 - k


def test_repeated_eigenvalue_needs_as_many_inputs():
    # A = -I_3: one input reaches one direction, three independent inputs reach all
    # (identity: the reachable space is range B)
    A = -np.eye(3)
    assert sw.controllability_staircase(A, np.ones((3, 1))).rank == 1
    assert sw.controllability_staircase(A, np.array([[1.0, 0.0], [0.0, 1.0], [1.0, 1.0]])).rank == 2
    s = sw.controllability_staircase(A, np.eye(3))
    assert s.rank == 3 and s.blocks == [3]


def test_results_are_read_only():
    s = sw.controllability_staircase(np.diag([-1.0, -2.0]), np.ones((2, 1)))
    for x in (s.a, s.b, s.transform):
        with pytest.raises(ValueError):
            x[0, 0] = 1.0


def test_margins_is_a_deprecated_alias_of_rank_gaps():
    # version 2 of the API contract renames Staircase.margins (it read as stability
    # margins); the old name stays one version as an alias that warns
    a = np.diag([-1.0, -2.0, -3.0])
    b = np.array([[1.0], [1.0], [0.0]])
    s = sw.controllability_staircase(a, b)
    with pytest.warns(DeprecationWarning, match="rank_gaps"):
        old = s.margins
    assert old == s.rank_gaps
    assert "rank_gaps" in repr(s)

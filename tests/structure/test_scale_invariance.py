"""Rank decisions under scaling of inputs, outputs and states (API version 2).

Controllability, observability and minimality are invariant under nonsingular scalings of
the inputs, the outputs and the states (identity: the controllable subspace of
(S^-1 A S, S^-1 B D_u) is S^-1 times that of (A, B), and similarly for C). The default tol
must give the same decisions: every size below is compared with the planted one and across
scalings by powers of two over 2^-40 .. 2^40 and random orthogonal state coordinates.
"""

import numpy as np
import pytest

import statewright as sw
from structure_helpers import assert_same_response, hide, orthogonal, planted_kalman, planted_staircase

EXPONENTS = (-40, -17, 0, 23, 40)


def scaled(A, B, C, eu, ey, ex):
    """(S^-1 A S, S^-1 B Du, Dy C S) with diagonal powers of two (exact in floating point)."""
    s = np.ldexp(1.0, np.asarray(ex))
    du = np.ldexp(1.0, np.asarray(eu))
    dy = np.ldexp(1.0, np.asarray(ey))
    return A * s[None, :] / s[:, None], B / s[:, None] * du[None, :], C * s[None, :] * dy[:, None]


def planted(seed, n, m, p, nc):
    rng = np.random.default_rng(seed)
    blocks = [min(m, nc)] * (nc // max(min(m, nc), 1)) if nc else []
    rest = nc - sum(blocks)
    if rest:
        blocks.append(rest)
    A0, B0, C0 = planted_staircase(blocks, n, m, p, rng)
    return hide(A0, B0, C0, orthogonal(n, rng)), rng


@pytest.mark.parametrize("seed", range(6))
@pytest.mark.parametrize("k", EXPONENTS)
def test_uniform_input_and_state_scaling_keeps_every_decision(seed, k):
    # B scaled by 2^k (one input unit, or all states by one factor): the staircase makes
    # the same decisions bit for bit (the default balances B's columns exactly)
    (A, B, C), _ = planted(seed, 8, 2, 2, 5)
    ref = sw.controllability_staircase(A, B, C)
    s = sw.controllability_staircase(A, B * 2.0**k, C)
    assert s.rank == ref.rank == 5 and s.blocks == ref.blocks
    np.testing.assert_array_equal(s.transform, ref.transform)
    assert sw.is_controllable(A, B * 2.0**k) is False
    o = sw.observability_staircase(A.T, None, B.T * 2.0**k)
    assert o.rank == 5


def test_the_reported_case_small_b_is_not_uncontrollable():
    # B tiny in the caller's units: version 1 judged it against ||A|| and found nothing
    # reachable, so the minimal realization had 0 states; the transfer function
    # C (sI - A)^-1 B is that of the unscaled model times 1e-14 (identity)
    A = np.array([[-1.0, 2.0, 0.0], [0.0, -3.0, 1.0], [0.5, 0.0, -2.0]]) * 1e3
    B = np.array([[1.0], [0.0], [1.0]]) * 1e-14
    C = np.array([[1.0, 1.0, 0.0]])
    D = np.zeros((1, 1))
    assert sw.controllability_staircase(A, B).rank == 3
    m = sw.minimal_realization(A, B, C, D)
    assert m.n_states == 3
    assert m.info["markov_residual"] <= m.info["markov_tolerance"]
    for z in (1j, 100.0 + 10j, 2000j):
        ref = C @ np.linalg.solve(z * np.eye(3) - A, B)  # numpy reference
        np.testing.assert_allclose(m.evaluate(z), ref, rtol=1e-10)
    k = sw.kalman_decomposition(A, B, C, D)
    assert k.sizes == (3, 0, 0, 0)
    assert k.info["zeroed_b"] == 0.0


def _planted_four_parts(seed):
    """A planted four-part system (sizes known by construction, structure_helpers), hidden
    by a random orthogonal change of coordinates; the generator for further draws too."""
    rng = np.random.default_rng(500 + seed)
    sizes = tuple(int(x) for x in rng.integers(1, 3, 4))
    m, p = int(rng.integers(1, 3)), int(rng.integers(1, 3))
    n = sum(sizes)
    A0, B0, C0 = planted_kalman(sizes, m, p, rng)
    A, B, C = hide(A0, B0, C0, orthogonal(n, rng))
    return rng, sizes, (A, B, C, np.zeros((p, m)))


@pytest.mark.parametrize("seed", range(10))
def test_kalman_and_minimal_sizes_under_scalings_and_rotations(seed):
    # planted four-part systems (sizes known by construction), hidden by an orthogonal
    # change of coordinates, then inputs, outputs and states scaled by powers of two
    rng, sizes, (A, B, C, D) = _planted_four_parts(seed)
    m, p, n = B.shape[1], C.shape[0], A.shape[0]
    ref = sw.kalman_decomposition(A, B, C, D)
    assert ref.sizes == sizes
    assert sw.minimal_realization(A, B, C, D).n_states == sizes[0]
    for _ in range(3):
        eu = rng.integers(-40, 41, m)
        ey = rng.integers(-40, 41, p)
        ex = rng.integers(-40, 41, n)
        # inputs, outputs and all states by one factor: the Kalman sizes are unchanged
        Au, Bu, Cu = scaled(A, B, C, eu, ey, np.full(n, ex[0]))
        assert sw.kalman_decomposition(Au, Bu, Cu, D).sizes == sizes, (eu, ey, ex[0])
        As, Bs, Cs = scaled(A, B, C, eu, ey, ex)
        # each state by its own factor: the minimal realization decides on the balanced
        # model: unchanged
        mr = sw.minimal_realization(As, Bs, Cs, D)
        assert mr.n_states == sizes[0]
        assert mr.info["markov_residual"] <= mr.info["markov_tolerance"]
        # and the transfer function is kept (numpy reference)
        assert_same_response(tuple(mr), (As, Bs, Cs, D), delta=1e-10)
        # a second orthogonal coordinate system, then the same scaling
        Ar, Br, Cr = scaled(*hide(A, B, C, orthogonal(n, rng)), eu, ey, ex)
        assert sw.minimal_realization(Ar, Br, Cr, D).n_states == sizes[0]


@pytest.mark.parametrize("seed", range(6))
def test_input_scaling_by_different_powers(seed):
    # each input by its own power of two, the outputs likewise: the staircase decisions
    # are those of the unscaled pair (B_hat has the same bits)
    (A, B, C), rng = planted(seed, 9, 2, 2, 6)
    ref = sw.controllability_staircase(A, B)
    for eu in ((-40, 40), (40, -40), (-13, 29)):
        Bs = B * np.ldexp(1.0, np.array(eu))[None, :]
        s = sw.controllability_staircase(A, Bs)
        assert s.rank == ref.rank == 6 and s.blocks == ref.blocks
        np.testing.assert_array_equal(s.transform, ref.transform)
        o = sw.observability_staircase(A.T, None, Bs.T)
        assert o.rank == 6


@pytest.mark.parametrize("seed", range(10))
def test_kalman_under_per_state_scaling(seed):
    # each state scaled by its own power of two (2^-40 .. 2^40): T has orthonormal blocks in
    # the caller's (here badly scaled) coordinates, so the decomposition is right, or
    # refused by its verification; a transfer function that changed is never returned
    rng, sizes, (A, B, C, D) = _planted_four_parts(seed)
    m, p, n = B.shape[1], C.shape[0], A.shape[0]
    for _ in range(3):
        eu, ey, ex = rng.integers(-40, 41, m), rng.integers(-40, 41, p), rng.integers(-40, 41, n)
        As, Bs, Cs = scaled(A, B, C, eu, ey, ex)
        try:
            k = sw.kalman_decomposition(As, Bs, Cs, D)
        except sw.ModelError as e:
            assert "verification" in str(e) or "tol" in str(e), str(e)
            continue
        assert k.info["markov_residual"] <= 1e-9
        assert k.sizes == sizes, (eu, ey, ex)

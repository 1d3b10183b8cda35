"""realize_markov: Ho–Kalman / SVD of the block Hankel matrix."""

import numpy as np
import pytest

import statewright as sw


def markov_of(a, b, c, d, k):
    out = [d]
    ab = b
    for _ in range(1, k):
        out.append(c @ ab)
        ab = a @ ab
    return np.array(out)


def random_stable(n, m, p, seed, radius=0.9):
    rng = np.random.default_rng(seed)
    a = rng.standard_normal((n, n))
    a *= radius / max(abs(np.linalg.eigvals(a)))
    return a, rng.standard_normal((n, m)), rng.standard_normal((p, n)), rng.standard_normal((p, m))


@pytest.mark.parametrize("n,m,p,seed", [(1, 1, 1, 0), (3, 1, 1, 1), (4, 2, 3, 2), (6, 2, 1, 3), (5, 3, 2, 4)])
def test_noise_free_recovers_order_and_markov(n, m, p, seed):
    a, b, c, d = random_stable(n, m, p, seed)
    k = 4 * n + 4
    h = markov_of(a, b, c, d, k)
    r = sw.realize_markov(h)
    assert r.info["order"] == n == r.n_states
    # Markov parameters of the result equal the data (identity h_i = C A^(i-1) B).
    h2 = markov_of(r.a, r.b, r.c, r.d, k)
    assert np.max(abs(h2 - h)) < 1e-10 * np.max(abs(h))
    # Same poles as the generating system (identity: similar realizations).
    assert np.allclose(np.sort_complex(np.linalg.eigvals(r.a)), np.sort_complex(np.linalg.eigvals(a)), atol=1e-8)
    # Singular-value gap: the n-th above tol, the (n+1)-th at rounding level.
    s = r.info["singular_values"]
    assert s[n - 1] > 1e6 * r.info["tol"] and (len(s) == n or s[n] <= r.info["tol"])


def test_lightly_noisy_gap_and_order():
    a, b, c, d = random_stable(4, 1, 1, 7, radius=0.8)
    k = 40
    h = markov_of(a, b, c, d, k)
    rng = np.random.default_rng(8)
    noisy = h + 1e-6 * rng.standard_normal(h.shape)
    s = sw.realize_markov(noisy).info["singular_values"]
    # The gap after 4 singular values (identity: rank 4 plus a perturbation of norm ~ 1e-6 * sqrt(size)).
    assert s[3] / s[4] > 100
    r = sw.realize_markov(noisy, order=4)
    h2 = markov_of(r.a, r.b, r.c, r.d, k)
    assert np.max(abs(h2 - h)) < 1e-4 * np.max(abs(h))
    assert np.max(abs(np.linalg.eigvals(r.a))) < 1


def test_first_order_hand_worked():
    # 2 / (z - 0.5): h_i = 2 * 0.5^(i-1) (hand-worked); D = 1.
    h = [1.0] + [2 * 0.5 ** (i - 1) for i in range(1, 10)]
    r = sw.realize_markov(h)
    assert r.info["order"] == 1
    assert r.a[0, 0] == pytest.approx(0.5, rel=1e-14)
    assert (r.c @ r.b)[0, 0] == pytest.approx(2.0, rel=1e-14)
    assert r.d[0, 0] == 1.0


def test_factors_are_balanced_on_the_hankel_matrix():
    # O = U_n S^(1/2), G = S^(1/2) V_n^T: O^T O = G G^T = diag(S_n) for the extended
    # observability / controllability matrices of the result (identity, noise-free data).
    a, b, c, d = random_stable(3, 2, 2, 5)
    r = sw.realize_markov(markov_of(a, b, c, d, 16))
    rows, cols = r.info["hankel_blocks"]
    obs = np.vstack([r.c @ np.linalg.matrix_power(r.a, i) for i in range(rows)])
    ctr = np.hstack([np.linalg.matrix_power(r.a, j) @ r.b for j in range(cols)])
    s = np.diag(r.info["singular_values"][:3])
    assert np.allclose(obs.T @ obs, s, atol=1e-10 * s[0, 0])
    assert np.allclose(ctr @ ctr.T, s, atol=1e-10 * s[0, 0])


def test_only_d_and_order_zero():
    r = sw.realize_markov([[[3.0, 1.0]]])
    assert r.n_states == 0 and r.d.tolist() == [[3.0, 1.0]]
    r = sw.realize_markov(markov_of(*random_stable(2, 1, 1, 3), 10), order=0)
    assert r.n_states == 0


def test_given_order_smaller_than_true():
    a, b, c, d = random_stable(4, 1, 1, 11)
    r = sw.realize_markov(markov_of(a, b, c, d, 20), order=2)
    assert r.n_states == 2 and r.info["order"] == 2


@pytest.mark.parametrize(
    "bad,order,match",
    [
        (np.zeros((4, 1, 1)), 3, "too few Markov parameters"),
        (np.zeros((0, 1, 1)), None, "markov"),
        (np.zeros((3, 2)), None, "markov"),
        ([[[np.nan]], [[1.0]]], None, "markov"),
        ("abc", None, "markov"),
        (np.ones((6, 1, 1)), -1, "order"),
        (np.ones((6, 1, 1)), 1.5, "order"),
    ],
)
def test_bad_input(bad, order, match):
    with pytest.raises(sw.ModelError, match=match):
        sw.realize_markov(bad, order)


def test_order_above_rank_refused():
    # Rank-1 Hankel data (h_i = 1: 1/(z - 1)); order 2 would divide by a zero singular value.
    with pytest.raises(sw.ModelError, match="order"):
        sw.realize_markov(np.array([0.0, 1.0, 0.0, 0.0, 0.0, 0.0]).reshape(-1, 1, 1), order=2)


def test_bad_tol():
    with pytest.raises(sw.ModelError, match="tol"):
        sw.realize_markov([0.0, 1.0, 0.5], tol=-1.0)

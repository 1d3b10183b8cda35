"""Gramians (Lyapunov / Stein equations), Hankel singular values, balanced realization."""

import numpy as np
import pytest
import scipy.linalg as sla

import statewright as sw


def random_stable(n, m, p, seed, discrete=False):
    rng = np.random.default_rng(seed)
    a = rng.standard_normal((n, n))
    ev = np.linalg.eigvals(a)
    if discrete:
        a *= 0.95 / max(abs(ev))
    else:
        a -= (max(ev.real) + 0.3) * np.eye(n)
    return a, rng.standard_normal((n, m)), rng.standard_normal((p, n)), rng.standard_normal((p, m))


def rel(x, y):
    return np.linalg.norm(x - y) / np.linalg.norm(y)


CASES = [(1, 1, 1, 0), (2, 1, 1, 1), (5, 2, 3, 2), (8, 1, 2, 3), (20, 3, 2, 4), (40, 2, 2, 5)]


@pytest.mark.parametrize("n,m,p,seed", CASES)
def test_continuous_gramians(n, m, p, seed):
    a, b, c, _ = random_stable(n, m, p, seed)
    wc, wo = sw.gramians(a, b, c)
    # Lyapunov residuals (identity), relative to the data's scale.
    scale_c = 2 * np.linalg.norm(a) * np.linalg.norm(wc) + np.linalg.norm(b @ b.T)
    scale_o = 2 * np.linalg.norm(a) * np.linalg.norm(wo) + np.linalg.norm(c.T @ c)
    assert np.linalg.norm(a @ wc + wc @ a.T + b @ b.T) / scale_c < 1e-14
    assert np.linalg.norm(a.T @ wo + wo @ a + c.T @ c) / scale_o < 1e-14
    # scipy.linalg reference.
    assert rel(wc, sla.solve_continuous_lyapunov(a, -b @ b.T)) < 1e-10
    assert rel(wo, sla.solve_continuous_lyapunov(a.T, -c.T @ c)) < 1e-10
    assert np.array_equal(wc, wc.T) and np.min(np.linalg.eigvalsh(wc)) > -1e-12 * np.linalg.norm(wc)


@pytest.mark.parametrize("n,m,p,seed", CASES)
def test_discrete_gramians(n, m, p, seed):
    a, b, c, _ = random_stable(n, m, p, seed, discrete=True)
    wc, wo = sw.gramians(a, b, c, discrete=True)
    # Stein residuals (identity).
    scale_c = np.linalg.norm(a) ** 2 * np.linalg.norm(wc) + np.linalg.norm(wc) + np.linalg.norm(b @ b.T)
    scale_o = np.linalg.norm(a) ** 2 * np.linalg.norm(wo) + np.linalg.norm(wo) + np.linalg.norm(c.T @ c)
    assert np.linalg.norm(a @ wc @ a.T - wc + b @ b.T) / scale_c < 1e-14
    assert np.linalg.norm(a.T @ wo @ a - wo + c.T @ c) / scale_o < 1e-14
    # scipy.linalg reference.
    assert rel(wc, sla.solve_discrete_lyapunov(a, b @ b.T)) < 1e-9
    assert rel(wo, sla.solve_discrete_lyapunov(a.T, c.T @ c)) < 1e-9


def test_closed_forms():
    # 1/(s+1): Wc = Wo = 1/2, sigma = 1/2; z-domain 1/(z-0.5): W = 1/(1-0.25) = 4/3 (hand).
    wc, wo = sw.gramians([[-1.0]], [[1.0]], [[1.0]])
    assert wc[0, 0] == pytest.approx(0.5, rel=1e-15) and wo[0, 0] == pytest.approx(0.5, rel=1e-15)
    wc, _ = sw.gramians([[0.5]], [[1.0]], [[1.0]], discrete=True)
    assert wc[0, 0] == pytest.approx(4 / 3, rel=1e-15)
    assert sw.hankel_singular_values([[-1.0]], [[1.0]], [[1.0]])[0] == pytest.approx(0.5, rel=1e-15)


@pytest.mark.parametrize("discrete", [False, True])
@pytest.mark.parametrize("n,m,p,seed", CASES[1:])
def test_hankel_singular_values_match_scipy(n, m, p, seed, discrete):
    a, b, c, _ = random_stable(n, m, p, seed, discrete)
    solve = sla.solve_discrete_lyapunov if discrete else (lambda x, q: sla.solve_continuous_lyapunov(x, -q))
    wc, wo = solve(a, b @ b.T), solve(a.T, c.T @ c)
    ref = np.sort(np.sqrt(abs(np.linalg.eigvals(wc @ wo))))[::-1]  # scipy.linalg reference
    s = sw.hankel_singular_values(a, b, c, discrete=discrete)
    assert np.all(np.diff(s) <= 0)
    big = ref > 1e-6 * ref[0]
    assert np.allclose(s[big], ref[big], rtol=1e-8)


@pytest.mark.parametrize("discrete", [False, True])
@pytest.mark.parametrize("n,m,p,seed", CASES[1:])
def test_balanced_gramians_equal_and_diagonal(n, m, p, seed, discrete):
    a, b, c, d = random_stable(n, m, p, seed, discrete)
    r = sw.balanced_realization(a, b, c, d, discrete=discrete)
    s = r.info["hankel_singular_values"]
    k = r.n_states
    wc, wo = sw.gramians(r.a, r.b, r.c, discrete=discrete)
    # Balanced: Wc = Wo = diag(sigma) (identity), errors relative to sigma_1.
    assert np.max(abs(wc - np.diag(s[:k]))) < 1e-9 * s[0]
    assert np.max(abs(wo - np.diag(s[:k]))) < 1e-9 * s[0]
    # Same transfer matrix (identity) at a few points.
    for pt in [1.3j, 0.7 + 2j] if not discrete else [np.exp(0.4j), 1.7]:
        g = c @ np.linalg.solve(pt * np.eye(n) - a, b) + d
        assert np.allclose(r.evaluate(pt), g, atol=1e-8 * np.max(abs(g)))


def hinf_grid(r1, r2, discrete):
    """max over a dense grid of the largest singular value of G1 - G2 (a lower estimate of the H-infinity norm)."""
    pts = (
        np.exp(1j * np.linspace(0, np.pi, 4001)) if discrete else 1j * np.concatenate(([0.0], np.logspace(-4, 4, 4000)))
    )
    diff = r1.evaluate(pts) - r2.evaluate(pts)
    return max(np.linalg.svd(x, compute_uv=False)[0] for x in diff)


@pytest.mark.parametrize("discrete", [False, True])
@pytest.mark.parametrize("n,m,p,seed", [(6, 1, 1, 21), (10, 2, 2, 22), (20, 1, 2, 23)])
def test_truncation_error_bound(n, m, p, seed, discrete):
    a, b, c, d = random_stable(n, m, p, seed, discrete)
    full = sw.Realization(a, b, c, d)
    for order in (1, n // 2, n - 1):
        r = sw.balanced_realization(a, b, c, d, order=order, discrete=discrete)
        s = r.info["hankel_singular_values"]
        assert r.info["error_bound"] == pytest.approx(2 * s[order:].sum(), rel=1e-14)
        err = hinf_grid(full, r, discrete)
        # Glover's bound (Glover 1984; discrete: Al-Saggaf & Franklin 1987), from memory. It is
        # attained for the last state of a single-input single-output model, so allow rounding
        # (the smallest sigma is only accurate to about n * eps * sigma_1 absolutely).
        assert err <= r.info["error_bound"] * (1 + 1e-6) + 1e-10 * s[0]
        # Lower bound ||G - G_r||_inf >= sigma_{r+1} (Glover 1984, from memory); the grid may
        # miss the peak slightly, so only a loose check.
        assert err >= 0.5 * s[order] - 1e-10 * s[0]
        # Truncation keeps stability (Pernebo & Silverman 1982, from memory).
        ev = np.linalg.eigvals(r.a)
        assert np.all(abs(ev) < 1) if discrete else np.all(ev.real < 0)


def test_non_minimal_model():
    # (s + 2) / ((s + 1)(s + 2)) in companion form: one Hankel singular value at rounding level.
    r = sw.realize([1.0, 2.0], [1.0, 3.0, 2.0])
    s = sw.hankel_singular_values(*r[:3])
    assert s[0] == pytest.approx(0.5, rel=1e-12)  # that of 1/(s+1) (hand)
    assert s[1] < 1e-12
    br = sw.balanced_realization(*r)
    assert br.n_states == 1 and br.info["error_bound"] < 1e-12
    with pytest.raises(sw.ModelError, match="order"):
        sw.balanced_realization(*r, order=2)


@pytest.mark.parametrize(
    "a,discrete",
    [
        ([[0.0, 1.0], [-1.0, 0.0]], False),  # poles +-j
        ([[1.0, 0.0], [0.0, -1.0]], False),
        ([[0.0, 0.0], [0.0, -1.0]], False),  # a pole at 0
        ([[0.5, 0.0], [0.0, -1.0]], True),  # a pole on the unit circle
        ([[0.0, 1.1], [-1.1, 0.0]], True),
    ],
)
def test_unstable_refused(a, discrete):
    b, c, d = [[0.0], [1.0]], [[1.0, 0.0]], [[0.0]]
    for call in (
        lambda: sw.gramians(a, b, c, discrete=discrete),
        lambda: sw.hankel_singular_values(a, b, c, discrete=discrete),
        lambda: sw.balanced_realization(a, b, c, d, discrete=discrete),
    ):
        with pytest.raises(sw.ModelError, match="not stable"):
            call()


@pytest.mark.parametrize(
    "args,match",
    [
        (([[-1.0, 0.0]], [[1.0]], [[1.0]]), "a"),
        (([[-1.0]], [[1.0], [1.0]], [[1.0]]), "b"),
        (([[-1.0]], [[1.0]], [[1.0, 2.0]]), "c"),
        (([[np.inf]], [[1.0]], [[1.0]]), "a"),
        (([[-1.0]], "b", [[1.0]]), "b"),
    ],
)
def test_bad_shapes(args, match):
    with pytest.raises(sw.ModelError, match=match):
        sw.gramians(*args)
    with pytest.raises(sw.ModelError, match=match):
        sw.hankel_singular_values(*args)


def test_bad_options():
    a, b, c, d = [[-1.0]], [[1.0]], [[1.0]], [[0.0]]
    with pytest.raises(sw.ModelError, match="d"):
        sw.balanced_realization(a, b, c, [[0.0, 1.0]])
    with pytest.raises(sw.ModelError, match="order"):
        sw.balanced_realization(a, b, c, d, order=2)
    with pytest.raises(sw.ModelError, match="order"):
        sw.balanced_realization(a, b, c, d, order=-1)
    with pytest.raises(sw.ModelError, match="discrete"):
        sw.gramians(a, b, c, discrete="yes")


def test_empty_model():
    wc, wo = sw.gramians(np.zeros((0, 0)), np.zeros((0, 1)), np.zeros((1, 0)))
    assert wc.shape == (0, 0) and wo.shape == (0, 0)
    r = sw.balanced_realization(np.zeros((0, 0)), np.zeros((0, 1)), np.zeros((1, 0)), [[2.0]])
    assert r.n_states == 0 and r.d[0, 0] == 2.0

"""similarity(r1, r2): the unique T with r2 == r1.transform(T) for minimal realizations.

References: the exact T = K1 K2^-1 from the controllability matrices (sympy exact), a
planted T applied by Realization.transform (identity), numpy residuals.
"""

import numpy as np
import pytest
import sympy

import statewright as sw
from structure_helpers import orthogonal, well_conditioned
from swtest_helpers import names_argument

TFS = [
    ([1, 3], [1, 3, 2]),
    ([2, 1, 5], [1, 4, 6, 4]),
    ([1, 0, -1, 2], [1, 2, 3, 4, 5]),
    ([3, 1, 4, 1, 5], [2, 7, 1, 8, 2]),  # biproper, non-monic denominator
    ([1], [1, 0, 0]),  # double integrator
]
PAIRS = [
    ("controllable_canonical", "observable_canonical"),
    ("controller", "observer"),
    ("controllability", "observability"),
    ("controllable_canonical", "controller"),
    ("observer", "controllability"),
]


def exact_t(r1, r2):
    """T = K1 K2^-1 in exact arithmetic (sympy exact): for SISO minimal realizations
    r2 = r1.transform(T) gives K2 = T^-1 K1."""

    def controllability_matrix_of(r):
        A = sympy.Matrix(r.to_sympy()[0])
        B = sympy.Matrix(r.to_sympy()[1])
        n = A.shape[0]
        return sympy.Matrix.hstack(*[A**k * B for k in range(n)])

    return controllability_matrix_of(r1) * controllability_matrix_of(r2).inv()


@pytest.mark.parametrize("form1,form2", PAIRS)
@pytest.mark.parametrize("num,den", TFS)
def test_companion_pairs(num, den, form1, form2):
    r1 = sw.realize(num, den, form1)
    r2 = sw.realize(num, den, form2)
    t = sw.similarity(r1, r2)
    n = r1.n_states
    assert isinstance(t, np.ndarray) and t.shape == (n, n)
    # reproduces r2 (identity)
    r = r1.transform(t)
    for x, y in zip(r, r2):
        np.testing.assert_allclose(x, y, rtol=1e-9, atol=1e-9 * max(1.0, np.abs(y).max()))
    # equals the exact T (sympy exact; unique for minimal realizations)
    te = np.array(
        exact_t(sw.realize(num, den, form1, exact=True), sw.realize(num, den, form2, exact=True)), dtype=float
    )
    np.testing.assert_allclose(t, te, rtol=1e-9, atol=1e-9 * np.abs(te).max())
    # and the way back is the inverse (identity)
    t_back = sw.similarity(r2, r1)
    np.testing.assert_allclose(t @ t_back, np.eye(n), atol=1e-8)


def test_modal_against_controllable_canonical():
    num, den = [1.0, 5.0, 3.0], [1.0, 6.0, 11.0, 6.0]  # poles -1, -2, -3
    r1 = sw.realize(num, den, "controllable_canonical")
    r2 = sw.realize(num, den, "modal")
    t = sw.similarity(r1, r2)
    # (numpy reference) T = K1 K2^-1 from the controllability matrices
    K1 = np.hstack([np.linalg.matrix_power(r1.a, k) @ r1.b for k in range(3)])
    K2 = np.hstack([np.linalg.matrix_power(r2.a, k) @ r2.b for k in range(3)])
    np.testing.assert_allclose(t, K1 @ np.linalg.inv(K2), rtol=1e-9, atol=1e-10)
    np.testing.assert_allclose(np.linalg.solve(t, r1.a @ t), r2.a, atol=1e-9)


@pytest.mark.parametrize("n,m,p,seed", [(1, 1, 1, 0), (3, 1, 2, 1), (5, 2, 2, 2), (6, 3, 1, 3), (8, 2, 3, 4)])
@pytest.mark.parametrize("kind", ["orthogonal", "general"])
def test_planted_transformation_recovered(n, m, p, seed, kind):
    rng = np.random.default_rng(500 + seed)
    A = rng.standard_normal((n, n)) / np.sqrt(n) - 0.5 * np.eye(n)
    B = rng.standard_normal((n, m))
    C = rng.standard_normal((p, n))
    D = rng.standard_normal((p, m))
    r1 = sw.Realization(A, B, C, D)
    assert sw.is_controllable(A, B) and sw.is_observable(A, C)
    T0 = orthogonal(n, rng) if kind == "orthogonal" else well_conditioned(n, rng, cond=20.0)
    r2 = r1.transform(T0)
    t = sw.similarity(r1, r2)
    # the planted T (identity: unique for a minimal realization)
    np.testing.assert_allclose(t, T0, rtol=0, atol=1e-9 * np.linalg.norm(T0))
    # tuples work the same
    t2 = sw.similarity(tuple(r1), tuple(r2))
    np.testing.assert_allclose(t2, t, rtol=0, atol=1e-12 * np.linalg.norm(T0))
    # reproduces r2 (identity)
    for x, y in zip(r1.transform(t), r2):
        np.testing.assert_allclose(x, y, rtol=0, atol=1e-9 * max(1.0, np.linalg.norm(y)))


def test_identity_and_scaling():
    r = sw.realize([1, 2, 3], [1, 4, 5, 6])
    np.testing.assert_allclose(sw.similarity(r, r), np.eye(3), atol=1e-12)
    # a diagonal scaling by powers of two is recovered exactly enough
    T0 = np.diag([2.0, 0.25, 8.0])
    np.testing.assert_allclose(sw.similarity(r, r.transform(T0)), T0, rtol=1e-12, atol=1e-12)
    # the zero-state case: two equal gains
    g = (np.zeros((0, 0)), np.zeros((0, 2)), np.zeros((1, 0)), np.array([[1.0, 2.0]]))
    assert sw.similarity(g, g).shape == (0, 0)


def test_largest_size_accepted():
    # 40 states: distinct modes, all reached and seen (identity, PBH)
    n = 40
    A = np.diag(-np.linspace(1.0, 3.0, n))
    B = np.ones((n, 1))
    C = np.ones((1, n))
    D = np.zeros((1, 1))
    P = np.eye(n)[::-1]  # a permutation: reverses the states
    r1 = sw.Realization(A, B, C, D)
    t = sw.similarity(r1, r1.transform(P))
    np.testing.assert_allclose(t, P, atol=1e-6)


# --------------------------------------------------------------------------------------
# refusals
# --------------------------------------------------------------------------------------


def test_not_minimal():
    # (s+1)/((s+1)(s+2)) in controllable canonical form: controllable, not observable
    r = sw.realize([1, 1], [1, 3, 2], "controllable_canonical")
    ok = sw.realize([1], [1, 2, 0], "controllable_canonical")  # some minimal 2-state model
    with pytest.raises(sw.ModelError, match="not minimal") as e:
        sw.similarity(r, r)
    assert names_argument(str(e.value), "r1")
    with pytest.raises(sw.ModelError, match="not minimal") as e:
        sw.similarity(ok, r)
    assert names_argument(str(e.value), "r2")
    ro = sw.realize([1, 1], [1, 3, 2], "observable_canonical")
    with pytest.raises(sw.ModelError, match="not minimal"):
        sw.similarity(ro, ro)


def test_not_similar():
    r1 = sw.realize([1, 3], [1, 3, 2])
    # a different numerator
    with pytest.raises(sw.ModelError, match="not similar") as e:
        sw.similarity(r1, sw.realize([1, 4], [1, 3, 2], "observable_canonical"))
    assert names_argument(str(e.value), "r2")
    # a different denominator
    with pytest.raises(sw.ModelError, match="not similar"):
        sw.similarity(r1, sw.realize([1, 3], [1, 3, 3]))
    # the same strictly proper part but a different D
    with pytest.raises(sw.ModelError, match="not similar"):
        sw.similarity(sw.realize([1, 4, 5], [1, 3, 2]), sw.realize([2, 7, 7], [1, 3, 2]))
    # two gains that differ
    g1 = (np.zeros((0, 0)), np.zeros((0, 1)), np.zeros((1, 0)), [[1.0]])
    g2 = (np.zeros((0, 0)), np.zeros((0, 1)), np.zeros((1, 0)), [[2.0]])
    with pytest.raises(sw.ModelError, match="not similar"):
        sw.similarity(g1, g2)


def test_tolerance():
    rng = np.random.default_rng(12)
    r1 = sw.realize([1, 2, 3], [1, 4, 5, 6])
    r2 = r1.transform(well_conditioned(3, rng, cond=5.0))
    a, b, c, d = (np.array(x) for x in r2)
    c_pert = c * (1 + 1e-11)
    # a 1e-11 relative change: within the default tol (sqrt(eps)), not within 1e-14
    sw.similarity(r1, (a, b, c_pert, d))
    with pytest.raises(sw.ModelError, match="not similar"):
        sw.similarity(r1, (a, b, c_pert, d), tol=1e-14)
    # a 1e-4 change is outside the default, inside tol=1e-2
    c_big = c * (1 + 1e-4)
    with pytest.raises(sw.ModelError, match="not similar"):
        sw.similarity(r1, (a, b, c_big, d))
    sw.similarity(r1, (a, b, c_big, d), tol=1e-2)


def test_shapes_and_size_limit():
    r1 = sw.realize([1, 3], [1, 3, 2])
    r3 = sw.realize([1, 3, 1], [1, 3, 2, 1])
    with pytest.raises(sw.ModelError) as e:
        sw.similarity(r1, r3)
    assert names_argument(str(e.value), "r2")
    A = np.diag([-1.0, -2.0])
    mimo = sw.Realization(A, np.eye(2), np.eye(2), np.zeros((2, 2)))
    with pytest.raises(sw.ModelError) as e:
        sw.similarity(r1, mimo)
    assert names_argument(str(e.value), "r2")
    n = 41
    big = (np.diag(-np.arange(1.0, n + 1)), np.ones((n, 1)), np.ones((1, n)), np.zeros((1, 1)))
    with pytest.raises(sw.ModelError, match="40"):
        sw.similarity(big, big)


@pytest.mark.parametrize("bad", [None, 5, "abc", (1, 2, 3), [np.eye(2)]])
def test_wrong_types(bad):
    r = sw.realize([1, 3], [1, 3, 2])
    with pytest.raises(sw.ModelError) as e:
        sw.similarity(bad, r)
    assert names_argument(str(e.value), "r1")
    with pytest.raises(sw.ModelError) as e:
        sw.similarity(r, bad)
    assert names_argument(str(e.value), "r2")


@pytest.mark.parametrize("tol", [-1.0, float("nan"), float("inf"), "1e-3", True])
def test_bad_tol(tol):
    r = sw.realize([1, 3], [1, 3, 2])
    with pytest.raises(sw.ModelError) as e:
        sw.similarity(r, r, tol=tol)
    assert names_argument(str(e.value), "tol")


@pytest.mark.parametrize("which", range(4))
def test_non_finite_entries(which):
    r = sw.realize([1, 3], [1, 3, 2])
    parts = [np.array(x) for x in r]
    parts[which] = parts[which].copy()
    parts[which].flat[0] = np.nan
    with pytest.raises(sw.ModelError) as e:
        sw.similarity(r, tuple(parts))
    assert names_argument(str(e.value), "abcd"[which])

"""to_discrete / to_continuous: references are scipy.signal.cont2discrete (every method it
shares), scipy.linalg.expm and logm, exact rational arithmetic (fractions), and identities
(round trips, prewarped frequency match)."""

import re
from fractions import Fraction

import numpy as np
import pytest
import scipy.linalg
import scipy.signal

import statewright as sw

# Our method name -> scipy.signal.cont2discrete's method name (same mathematics).
SCIPY_METHODS = {
    "zero_order_hold": "zoh",
    "first_order_hold": "foh",
    "impulse_invariant": "impulse",
    "bilinear": "bilinear",
    "forward_difference": "euler",
    "backward_difference": "backward_diff",
}
ALL_METHODS = tuple(SCIPY_METHODS)


def random_model(seed, n=4, m=2, p=3, proper=False, stable_margin=0.5):
    rng = np.random.default_rng(seed)
    a = rng.standard_normal((n, n)) / np.sqrt(max(n, 1))
    a -= (np.max(np.linalg.eigvals(a).real, initial=0.0) + stable_margin) * np.eye(n)
    b = rng.standard_normal((n, m))
    c = rng.standard_normal((p, n))
    d = np.zeros((p, m)) if proper else rng.standard_normal((p, m))
    return a, b, c, d


def max_rel(x, y):
    x, y = np.asarray(x, float), np.asarray(y, float)
    return np.max(np.abs(x - y), initial=0.0) / max(np.max(np.abs(y), initial=0.0), 1e-300)


@pytest.mark.parametrize("method", ALL_METHODS)
@pytest.mark.parametrize("seed", range(4))
def test_against_scipy_cont2discrete(method, seed):
    # Reference: scipy.signal.cont2discrete with the corresponding method.
    a, b, c, d = random_model(seed, proper=(method == "impulse_invariant"))
    t = [0.05, 0.3, 1.0, 2.5][seed]
    r = sw.to_discrete(a, b, c, d, t, method)
    ref = scipy.signal.cont2discrete((a, b, c, d), t, method=SCIPY_METHODS[method])
    for got, want in zip((r.a, r.b, r.c, r.d), ref[:4]):
        assert max_rel(got, want) < 1e-12
    assert r.sample_time == t


def test_zero_order_hold_of_an_integrator_against_scipy():
    # Double integrator (singular A): scipy.signal.cont2discrete zoh, and the closed form
    # A_d = [[1, T], [0, 1]], B_d = [[T^2/2], [T]] (from memory).
    a = np.array([[0.0, 1.0], [0.0, 0.0]])
    b = np.array([[0.0], [1.0]])
    c = np.array([[1.0, 0.0]])
    d = np.zeros((1, 1))
    t = 0.2
    r = sw.to_discrete(a, b, c, d, t)
    ref = scipy.signal.cont2discrete((a, b, c, d), t, method="zoh")
    np.testing.assert_allclose(r.a, ref[0], rtol=0, atol=1e-15)
    np.testing.assert_allclose(r.b, ref[1], rtol=0, atol=1e-15)
    np.testing.assert_allclose(r.a, [[1.0, t], [0.0, 1.0]], rtol=1e-15)
    np.testing.assert_allclose(r.b, [[t * t / 2], [t]], rtol=1e-15)


@pytest.mark.parametrize("scale", [1e-3, 1.0, 30.0, 400.0])
def test_zero_order_hold_state_matrix_is_scipy_expm(scale):
    # Reference: scipy.linalg.expm(A T), over norms that need 0 to ~10 squarings.
    rng = np.random.default_rng(11)
    a = rng.standard_normal((6, 6)) * scale / 6
    a -= np.eye(6) * (np.max(np.linalg.eigvals(a).real) + 0.1 * scale)
    b = np.zeros((6, 1))
    r = sw.to_discrete(a, b, np.zeros((1, 6)), np.zeros((1, 1)), 1.0)
    want = scipy.linalg.expm(a)
    assert np.max(np.abs(r.a - want)) <= 1e-12 * max(np.max(np.abs(want)), 1e-300) + 1e-300


def test_zero_order_hold_inverse_is_scipy_logm():
    # Reference: scipy.linalg.logm(A_d) / T for a discrete model with complex eigenvalues.
    rng = np.random.default_rng(5)
    q, _ = np.linalg.qr(rng.standard_normal((5, 5)))
    ad = q @ np.diag([0.9, 0.5, 0.2, 1.3, 0.7]) @ q.T
    ad[0:2, 0:2] = [[0.6, 0.5], [-0.5, 0.6]]
    t = 0.1
    r = sw.to_continuous(ad, np.zeros((5, 1)), np.zeros((1, 5)), np.zeros((1, 1)), t)
    want = np.real(scipy.linalg.logm(ad)) / t
    assert max_rel(r.a, want) < 1e-11
    assert r.sample_time is None
    assert r.info["residual"] < 1e-13


@pytest.mark.parametrize("method", ALL_METHODS)
def test_round_trip_is_the_identity(method):
    # Identity: to_continuous(to_discrete(G)) = G (below the Nyquist frequency).
    a, b, c, d = random_model(3, n=5, m=2, p=2, proper=(method == "impulse_invariant"))
    t = 0.25
    dm = sw.to_discrete(a, b, c, d, t, method)
    back = sw.to_continuous(dm.a, dm.b, dm.c, dm.d, t, method)
    for got, want in zip(back, (a, b, c, d)):
        assert np.max(np.abs(got - want)) < 1e-10 * max(1.0, np.max(np.abs(want)))


@pytest.mark.parametrize("method", ["zero_order_hold", "first_order_hold", "bilinear"])
def test_round_trip_with_an_integrator(method):
    # Identity on a model with a pole at s = 0 (eigenvalue 1 of A_d: log is 0 there).
    a = np.array([[0.0, 1.0, 0.0], [0.0, -2.0, 1.0], [0.0, 0.0, -5.0]])
    b = np.array([[0.0], [0.0], [5.0]])
    c = np.array([[1.0, 0.0, 0.0]])
    d = np.zeros((1, 1))
    t = 0.1
    dm = sw.to_discrete(a, b, c, d, t, method)
    assert np.isclose(np.max(np.abs(np.linalg.eigvals(dm.a))), 1.0)
    back = sw.to_continuous(dm.a, dm.b, dm.c, dm.d, t, method)
    for got, want in zip(back, (a, b, c, d)):
        np.testing.assert_allclose(got, want, rtol=0, atol=1e-11)


def test_bilinear_prewarp_matches_the_response_at_the_prewarp_frequency():
    # Identity: G_d(exp(j w0 T)) = G_c(j w0) for the bilinear map prewarped at w0.
    a, b, c, d = random_model(8, n=4, m=1, p=1)
    t, w0 = 0.2, 7.0
    dm = sw.to_discrete(a, b, c, d, t, "bilinear", prewarp_frequency=w0)
    g_c = sw.frequency_response(a, b, c, d, [w0])
    g_d = sw.frequency_response(dm.a, dm.b, dm.c, dm.d, [w0], sample_time=t)
    assert abs(g_d[0, 0, 0] - g_c[0, 0, 0]) < 1e-12 * abs(g_c[0, 0, 0])
    plain = sw.to_discrete(a, b, c, d, t, "bilinear")
    g_plain = sw.frequency_response(plain.a, plain.b, plain.c, plain.d, [w0], sample_time=t)
    assert abs(g_plain[0, 0, 0] - g_c[0, 0, 0]) > 1e-6  # the prewarp did something
    back = sw.to_continuous(dm.a, dm.b, dm.c, dm.d, t, "bilinear", prewarp_frequency=w0)
    for got, want in zip(back, (a, b, c, d)):
        np.testing.assert_allclose(got, want, rtol=0, atol=1e-11)


@pytest.mark.parametrize("w0", [0.0, -1.0, np.pi / 0.2, 100.0, np.nan])
def test_prewarp_outside_the_band_is_refused(w0):
    a, b, c, d = random_model(1, n=2, m=1, p=1)
    with pytest.raises(sw.ModelError, match="prewarp_frequency"):
        sw.to_discrete(a, b, c, d, 0.2, "bilinear", prewarp_frequency=w0)


def test_prewarp_with_another_method_is_refused():
    a, b, c, d = random_model(1, n=2, m=1, p=1)
    with pytest.raises(sw.ModelError, match="prewarp_frequency"):
        sw.to_discrete(a, b, c, d, 0.2, "zero_order_hold", prewarp_frequency=1.0)


@pytest.mark.parametrize("method", ["zero_order_hold", "first_order_hold", "impulse_invariant"])
@pytest.mark.parametrize("eigenvalue", [-0.5, 0.0])
def test_no_real_logarithm_is_refused_naming_the_eigenvalue(method, eigenvalue):
    ad = np.diag([0.8, eigenvalue])
    bd = np.ones((2, 1))
    cd = np.ones((1, 2))
    dd = cd @ bd * 0.1 if method == "impulse_invariant" else np.zeros((1, 1))
    with pytest.raises(sw.ModelError, match="negative real axis") as e:
        sw.to_continuous(ad, bd, cd, dd, 0.1, method)
    named = re.search(r"eigenvalue (\S+)\+0j", str(e.value))
    assert named and float(named.group(1)) == eigenvalue


def test_impulse_invariant_needs_a_strictly_proper_model():
    a, b, c, d = random_model(2, n=2, m=1, p=1)
    with pytest.raises(sw.ModelError, match="d:"):
        sw.to_discrete(a, b, c, d, 0.1, "impulse_invariant")


def test_bilinear_singular_map_is_refused():
    # A with the eigenvalue 2/T: the bilinear map sends it to infinity.
    t = 0.5
    a = np.array([[2.0 / t]])
    with pytest.raises(sw.ModelError, match="bilinear"):
        sw.to_discrete(a, [[1.0]], [[1.0]], [[0.0]], t, "bilinear")
    with pytest.raises(sw.ModelError, match="-1"):
        sw.to_continuous([[-1.0]], [[1.0]], [[1.0]], [[0.0]], t, "bilinear")


@pytest.mark.parametrize("bad", [0.0, -1.0, np.inf, np.nan])
def test_bad_sample_time(bad):
    a, b, c, d = random_model(2, n=2, m=1, p=1)
    with pytest.raises(sw.ModelError, match="sample_time"):
        sw.to_discrete(a, b, c, d, bad)


def test_unknown_method():
    a, b, c, d = random_model(2, n=2, m=1, p=1)
    with pytest.raises(sw.ModelError, match="method"):
        sw.to_discrete(a, b, c, d, 0.1, "matched")


def exact_gbt(a, b, c, d, t, alpha):
    """Reference in Fractions: the generalized bilinear formulas written out directly."""
    import sympy

    n = len(a)
    A, B, C, D = (sympy.Matrix(x) for x in (a, b, c, d))
    I = sympy.eye(n)
    inv = (I - alpha * t * A).inv()
    ad = inv * (I + (1 - alpha) * t * A)
    bd = inv * t * B
    cd = C * inv
    dd = D + alpha * C * bd
    return ad, bd, cd, dd


@pytest.mark.parametrize(
    "method,alpha",
    [("bilinear", Fraction(1, 2)), ("forward_difference", 0), ("backward_difference", 1)],
)
def test_exact_mode_against_sympy(method, alpha):
    # Reference: sympy's exact matrix inverse on the same formulas (rational arithmetic).
    import sympy

    a = [[Fraction(-1, 3), Fraction(2)], [Fraction(0), Fraction(-5, 7)]]
    b = [[Fraction(1)], [Fraction(3, 2)]]
    c = [[Fraction(2, 5), Fraction(-1)]]
    d = [[Fraction(1, 9)]]
    t = Fraction(1, 10)
    r = sw.to_discrete(a, b, c, d, t, method, exact=True)
    ref = exact_gbt(a, b, c, d, sympy.Rational(1, 10), sympy.Rational(alpha))
    for got, want in zip((r.a, r.b, r.c, r.d), ref):
        assert got.dtype == object
        for x, y in zip(np.ravel(got), list(want)):
            assert isinstance(x, Fraction)
            assert x == Fraction(int(sympy.fraction(y)[0]), int(sympy.fraction(y)[1]))
    back = sw.to_continuous(r.a, r.b, r.c, r.d, t, method, exact=True)
    for got, want in zip(back, (a, b, c, d)):
        assert np.array_equal(np.asarray(got, dtype=object), np.asarray(want, dtype=object))


def test_exact_mode_refuses_the_exponential_methods():
    with pytest.raises(sw.ModelError, match="exact"):
        sw.to_discrete([[1]], [[1]], [[1]], [[0]], Fraction(1, 2), "zero_order_hold", exact=True)


def test_empty_model():
    # n = 0: a pure gain is the same in both time bases.
    r = sw.to_discrete(np.zeros((0, 0)), np.zeros((0, 2)), np.zeros((1, 0)), [[1.0, 2.0]], 0.5)
    assert r.a.shape == (0, 0) and r.b.shape == (0, 2)
    np.testing.assert_array_equal(r.d, [[1.0, 2.0]])
    back = sw.to_continuous(r.a, r.b, r.c, r.d, 0.5)
    np.testing.assert_array_equal(back.d, [[1.0, 2.0]])


def test_realization_methods_use_the_time_base():
    # A continuous Realization converts to discrete and back; the time base travels.
    a, b, c, d = random_model(4, n=3, m=1, p=1)
    r = sw.Realization(a, b, c, d)
    assert r.sample_time is None
    dm = r.to_discrete(0.1)
    assert dm.sample_time == 0.1
    back = dm.to_continuous()
    assert back.sample_time is None
    np.testing.assert_allclose(back.a, a, atol=1e-11)
    with pytest.raises(sw.ModelError, match="sample_time"):
        r.to_continuous()
    with pytest.raises(sw.ModelError, match="sample_time"):
        dm.to_discrete(0.1)


def test_to_continuous_batch_equals_single_calls():
    # Identity: batch results equal a loop of single calls bit for bit.
    models = [sw.to_discrete(*random_model(s, n=3, m=1, p=2), 0.2) for s in range(6)]
    stack = [np.stack([getattr(r, x) for r in models]) for x in "abcd"]
    ba, bb, bc, bd = sw.to_continuous_batch(*stack, 0.2)
    for i, r in enumerate(models):
        single = sw.to_continuous(r.a, r.b, r.c, r.d, 0.2)
        np.testing.assert_array_equal(ba[i], single.a)
        np.testing.assert_array_equal(bb[i], single.b)
        np.testing.assert_array_equal(bc[i], single.c)
        np.testing.assert_array_equal(bd[i], single.d)


def test_to_continuous_batch_names_the_bad_model():
    models = [sw.to_discrete(*random_model(s, n=2, m=1, p=1), 0.2) for s in range(4)]
    stack = [np.stack([getattr(r, x) for r in models]) for x in "abcd"]
    stack[0][2] = np.diag([0.5, -0.3])
    with pytest.raises(sw.ModelError, match="model 2"):
        sw.to_continuous_batch(*stack, 0.2)


def test_time_base_survives_transform_pickle_and_display():
    # Identity: the time base is part of the model; similarity and pickling keep it.
    import pickle

    h = np.array([0.0] + [0.5 ** (k - 1) for k in range(1, 12)])  # 1 / (z - 0.5)
    r = sw.realize_markov(h, sample_time=0.25)
    assert r.sample_time == 0.25
    assert sw.realize_markov(h).sample_time == 1.0
    assert r.transform([[2.0]]).sample_time == 0.25
    assert pickle.loads(pickle.dumps(r)).sample_time == 0.25
    assert "sample_time=0.25" in repr(r) and "sample time 0.25" in r._repr_latex_()
    back = r.to_continuous()
    assert np.isclose(back.a[0, 0], np.log(0.5) / 0.25)  # A = log(A_d) / T (identity)
    with pytest.raises(sw.ModelError, match="sample_time"):
        sw.Realization([[1.0]], [[1.0]], [[1.0]], [[0.0]], sample_time=-1.0)


def badly_scaled_model(seed, n=6):
    # States in very different units: D^-1 A D with D = diag(2^e), e over -20..20, so that
    # ||A|| is about 1e10 while the poles stay of order 1.
    a, b, c, d = random_model(seed, n=n, m=2, p=2)
    e = 2.0 ** np.random.default_rng(100 + seed).integers(-20, 21, n)
    return a * e[None, :] / e[:, None], b / e[:, None], c * e[None, :], d


def mpmath_hold(a, b, t, digits=50):
    # Reference: the block exponential exp([[A, B], [0, 0]] T) (Van Loan 1978) in mpmath.
    import mpmath

    n, m = b.shape
    block = np.zeros((n + m, n + m))
    block[:n, :n], block[:n, n:] = a * t, b * t
    with mpmath.workdps(digits):
        e = mpmath.expm(mpmath.matrix(block.tolist()))
        full = np.array([[float(e[i, j]) for j in range(n + m)] for i in range(n)])
    return full[:, :n], full[:, n:]


@pytest.mark.parametrize("seed", range(4))
def test_zero_order_hold_of_badly_scaled_states_against_mpmath(seed):
    # Before the states were balanced, exp(A T) of these models came out with relative
    # errors from 1e-7 up to 1 (the squarings amplified the rounding of a norm 1e10 times
    # the spectral radius). Reference: mpmath's exponential at 50 digits.
    a, b, c, d = badly_scaled_model(seed)
    t = [0.05, 0.3, 1.0, 2.5][seed]
    r = sw.to_discrete(a, b, c, d, t)
    ad, bd = mpmath_hold(a, b, t)
    # Entry by entry against each row and column scale (the entries span 2^±40).
    scale = np.abs(ad).max(axis=1, keepdims=True) * np.abs(ad).max(axis=0, keepdims=True)
    assert np.max(np.abs(r.a - ad) / np.sqrt(scale)) <= 1e-12
    assert max_rel(r.b, bd) <= 1e-12
    np.testing.assert_array_equal(r.c, c)
    np.testing.assert_array_equal(r.d, d)


@pytest.mark.parametrize("method", ALL_METHODS)
def test_badly_scaled_states_round_trip_and_match_the_balanced_model(method):
    # (identity) every method commutes with an exact diagonal similarity: converting the
    # badly scaled model equals converting the well-scaled one and scaling back, and the
    # round trip returns the model.
    a0, b0, c0, d0 = random_model(7, n=5, m=2, p=2, proper=(method == "impulse_invariant"))
    e = 2.0 ** np.array([-18, 0, 15, -7, 20])
    a, b, c = a0 * e[None, :] / e[:, None], b0 / e[:, None], c0 * e[None, :]
    t = 0.4
    r0 = sw.to_discrete(a0, b0, c0, d0, t, method)
    r = sw.to_discrete(a, b, c, d0, t, method)
    back_a = r.a * e[:, None] / e[None, :]
    assert max_rel(back_a, r0.a) <= 1e-12
    assert max_rel(r.b * e[:, None], r0.b) <= 1e-12
    assert max_rel(r.c / e[None, :], r0.c) <= 1e-12
    assert max_rel(r.d, r0.d) <= 1e-12
    if method != "impulse_invariant":
        back = sw.to_continuous(r.a, r.b, r.c, r.d, t, method)
        assert max_rel(back.a * e[:, None] / e[None, :], a0) <= 1e-9
        assert max_rel(back.b * e[:, None], b0) <= 1e-9


def _quad_and_info(r):
    return (r.a, r.b, r.c, r.d), dict(r.info)


@pytest.mark.parametrize("seed", range(6))
@pytest.mark.parametrize("n, m, p", [(1, 1, 1), (4, 2, 3), (8, 2, 1), (5, 5, 2), (0, 2, 2)])
def test_float64_fast_path_gives_the_general_paths_bits(seed, n, m, p):
    # (identity) the same model as float64 arrays (fast path) and as nested lists (the
    # general path) must give identical bits, info and time base.
    a, b, c, d = random_model(seed, n, m, p)
    t = 0.1 * (seed + 1)
    fast = sw.to_discrete(a, b, c, d, t)
    # nested lists lose the shape of an empty model: integer arrays also take the general path
    slow = (lambda x: x.astype(np.int64)) if n == 0 else (lambda x: x.tolist())
    general = sw.to_discrete(slow(a), slow(b), slow(c), d.tolist(), t)
    for x, y in zip(_quad_and_info(fast)[0], _quad_and_info(general)[0]):
        assert x.shape == y.shape and x.tobytes() == y.tobytes()
    assert fast.info == general.info and fast.sample_time == general.sample_time == t
    # and against the reference (scipy.signal.cont2discrete)
    if n:
        ref = scipy.signal.cont2discrete((a, b, c, d), t, method="zoh")
        assert max_rel(fast.a, ref[0]) < 1e-13 and max_rel(fast.b, ref[1]) < 1e-13


def test_fast_path_leaves_other_inputs_to_the_general_path():
    a, b, c, d = random_model(3, 3, 2, 2)
    ref = sw.to_discrete(a, b, c, d, 0.25)
    # Fortran order, a numpy float sample time, a big-endian array: the same bits
    for args in [
        (np.asfortranarray(a), b, c, d, 0.25),
        (a, b, c, d, np.float64(0.25)),
        (a.astype(">f8"), b, c, d, 0.25),
    ]:
        r = sw.to_discrete(*args)
        assert r.a.tobytes() == ref.a.tobytes() and r.b.tobytes() == ref.b.tobytes()
    r = sw.to_discrete(a, b, c, d, 1)
    assert r.sample_time == 1
    # the outputs are fresh, read-only arrays: the input is not touched
    assert not r.a.flags.writeable and not np.shares_memory(r.a, a)
    # bad input keeps the general path's messages, naming the argument
    bad_a = a.copy()
    bad_a[1, 1] = np.nan
    with pytest.raises(sw.ModelError, match="^a: "):
        sw.to_discrete(bad_a, b, c, d, 0.25)
    with pytest.raises(sw.ModelError, match="sample_time"):
        sw.to_discrete(a, b, c, d, -0.25)
    with pytest.raises(sw.ModelError, match="^b: "):
        sw.to_discrete(a, b[:2], c, d, 0.25)
    with pytest.raises(sw.ModelError, match="method"):
        sw.to_discrete(a, b, c, d, 0.25, method="zero order hold")

"""frequency_response: references are a direct complex solve of (jwI - A) X = B (numpy),
scipy.signal.freqresp / dfreqresp (SISO), and closed forms (identity)."""

import numpy as np
import pytest
import scipy.signal

import statewright as sw


def random_model(seed, n, m, p, margin=0.3):
    rng = np.random.default_rng(seed)
    a = rng.standard_normal((n, n)) / np.sqrt(max(n, 1))
    a -= (np.max(np.linalg.eigvals(a).real, initial=0.0) + margin) * np.eye(n)
    return a, rng.standard_normal((n, m)), rng.standard_normal((p, n)), rng.standard_normal((p, m))


def direct(a, b, c, d, points):
    """C (sI - A)^-1 B + D by numpy's dense complex solve at every point."""
    n = a.shape[0]
    return np.array([c @ np.linalg.solve(s * np.eye(n) - a, b) + d for s in points])


@pytest.mark.parametrize("n,m,p", [(1, 1, 1), (5, 2, 3), (12, 1, 1), (30, 3, 2)])
def test_against_a_direct_complex_solve(n, m, p):
    # Reference: numpy.linalg.solve of (jwI - A) X = B, then C X + D.
    a, b, c, d = random_model(n, n, m, p)
    w = np.concatenate([[0.0], np.logspace(-3, 3, 40)])
    g = sw.frequency_response(a, b, c, d, w)
    assert g.shape == (len(w), p, m) and g.dtype == complex
    ref = direct(a, b, c, d, 1j * w)
    assert np.max(np.abs(g - ref)) <= 1e-11 * np.max(np.abs(ref))


def test_discrete_against_a_direct_complex_solve():
    # Reference: numpy solve at z = exp(jwT).
    a, b, c, d = random_model(3, 6, 2, 2)
    a = a / (1.1 * np.max(np.abs(np.linalg.eigvals(a))))
    t = 0.01
    w = np.linspace(0, np.pi / t, 25)
    g = sw.frequency_response(a, b, c, d, w, sample_time=t)
    ref = direct(a, b, c, d, np.exp(1j * w * t))
    assert np.max(np.abs(g - ref)) <= 1e-12 * np.max(np.abs(ref))


def test_against_scipy_freqresp():
    # Reference: scipy.signal.freqresp on a well-conditioned SISO model of order 6.
    a, b, c, d = random_model(21, 6, 1, 1)
    w = np.logspace(-2, 2, 50)
    _, h = scipy.signal.freqresp(scipy.signal.StateSpace(a, b, c, d), w)
    g = sw.frequency_response(a, b, c, d, w)[:, 0, 0]
    assert np.max(np.abs(g - h) / np.abs(h)) < 1e-9


def test_against_scipy_dfreqresp():
    # Reference: scipy.signal.dfreqresp (w in rad/sample) with w * T as our rad/s.
    a, b, c, d = random_model(22, 5, 1, 1)
    dm = sw.to_discrete(a, b, c, d, 0.1)
    w = np.linspace(0.01, np.pi / 0.1, 30)
    _, h = scipy.signal.dfreqresp(scipy.signal.StateSpace(dm.a, dm.b, dm.c, dm.d, dt=0.1), w * 0.1)
    g = sw.frequency_response(dm.a, dm.b, dm.c, dm.d, w, sample_time=0.1)[:, 0, 0]
    assert np.max(np.abs(g - h) / np.abs(h)) < 1e-9


def test_lightly_damped_oscillator_closed_form():
    # G(s) = w0^2 / (s^2 + 2 z w0 s + w0^2) (identity), at and around resonance.
    w0, z = 50.0, 1e-4
    a = np.array([[0.0, 1.0], [-(w0**2), -2 * z * w0]])
    b = np.array([[0.0], [w0**2]])
    c = np.array([[1.0, 0.0]])
    w = np.array([w0 * 0.5, w0, w0 * 2])
    g = sw.frequency_response(a, b, c, [[0.0]], w)[:, 0, 0]
    s = 1j * w
    want = w0**2 / (s**2 + 2 * z * w0 * s + w0**2)
    assert np.max(np.abs(g - want) / np.abs(want)) < 1e-10


def test_frequency_at_a_pole_is_refused_and_named():
    # An undamped oscillator has poles at +-j w0; an integrator at 0.
    a = np.array([[0.0, 1.0], [-4.0, 0.0]])
    b, c = np.array([[0.0], [1.0]]), np.array([[1.0, 0.0]])
    with pytest.raises(sw.ModelError, match=r"frequencies\[2\]") as e:
        sw.frequency_response(a, b, c, [[0.0]], [0.5, 1.0, 2.0])
    assert "pole" in str(e.value)
    # Discrete: z = 1 at w = 0 for a summer x[k+1] = x[k] + u[k].
    with pytest.raises(sw.ModelError, match=r"frequencies\[0\]"):
        sw.frequency_response([[1.0]], [[1.0]], [[1.0]], [[0.0]], [0.0, 1.0], sample_time=0.1)


def test_empty_model_and_empty_frequencies():
    g = sw.frequency_response(np.zeros((0, 0)), np.zeros((0, 2)), np.zeros((1, 0)), [[1.0, 2.0]], [0.0, 5.0])
    np.testing.assert_array_equal(g, np.array([[[1.0, 2.0]]] * 2, dtype=complex))
    a, b, c, d = random_model(1, 3, 1, 1)
    assert sw.frequency_response(a, b, c, d, []).shape == (0, 1, 1)


@pytest.mark.parametrize("bad", [[np.nan], [np.inf], [[1.0, 2.0]]])
def test_bad_frequencies(bad):
    a, b, c, d = random_model(1, 3, 1, 1)
    with pytest.raises(sw.ModelError, match="frequencies"):
        sw.frequency_response(a, b, c, d, bad)


def test_many_frequencies_in_parallel_match_a_direct_solve():
    # Enough work to spread over threads; reference: numpy solve on a sample of points.
    a, b, c, d = random_model(9, 40, 1, 1)
    w = np.logspace(-2, 2, 3000)
    g = sw.frequency_response(a, b, c, d, w)
    pick = np.arange(0, 3000, 97)
    ref = direct(a, b, c, d, 1j * w[pick])
    assert np.max(np.abs(g[pick] - ref)) <= 1e-11 * np.max(np.abs(ref))


def test_batch_equals_single_calls_and_names_the_bad_model():
    # Identity: batch results equal single calls bit for bit.
    models = [random_model(s, 4, 2, 1) for s in range(5)]
    stack = [np.stack([m[i] for m in models]) for i in range(4)]
    w = np.linspace(0, 10, 17)
    g = sw.frequency_response_batch(*stack, w)
    assert g.shape == (5, 17, 1, 2)
    for i, m in enumerate(models):
        np.testing.assert_array_equal(g[i], sw.frequency_response(*m, w))
    stack[0][3] = np.diag([0.0, -1.0, -2.0, -3.0])
    with pytest.raises(sw.ModelError, match="model 3"):
        sw.frequency_response_batch(*stack, w)


def test_realization_method_uses_its_time_base():
    a, b, c, d = random_model(2, 3, 1, 1)
    r = sw.Realization(a, b, c, d)
    w = [0.1, 1.0]
    np.testing.assert_array_equal(r.frequency_response(w), sw.frequency_response(a, b, c, d, w))
    dm = r.to_discrete(0.05)
    np.testing.assert_array_equal(
        dm.frequency_response(w), sw.frequency_response(dm.a, dm.b, dm.c, dm.d, w, sample_time=0.05)
    )


def mpmath_response(a, b, c, d, s, digits=40):
    """C (sI - A)^-1 B + D in mpmath (the float data taken exactly)."""
    import mpmath

    with mpmath.workdps(digits):
        n = a.shape[0]
        m = mpmath.matrix([[(s if i == j else 0) - mpmath.mpf(float(a[i, j])) for j in range(n)] for i in range(n)])
        out = np.zeros((c.shape[0], b.shape[1]), complex)
        for j in range(b.shape[1]):
            x = mpmath.lu_solve(m, mpmath.matrix([mpmath.mpf(float(v)) for v in b[:, j]]))
            for i in range(c.shape[0]):
                total = mpmath.fsum(mpmath.mpf(float(c[i, k])) * x[k] for k in range(n))
                out[i, j] = complex(total + mpmath.mpf(float(d[i, j])))
    return out


@pytest.mark.parametrize("seed", range(3))
def test_badly_scaled_states_are_not_a_pole(seed):
    # States in very different units (D^-1 A D, D = diag(2^e), e over -20..20): ||A|| near
    # 1e10 while the poles are of order 1. Before the states were balanced, a frequency at
    # the imaginary part of a pole but far from it was refused as "at a pole". Reference:
    # mpmath's solve of the given (unbalanced) data; a frequency really at a pole is still
    # refused (identity: sI - A singular).
    a0, b, c, d = random_model(40 + seed, 6, 2, 2)
    ev = np.linalg.eigvals(a0)
    e = 2.0 ** np.random.default_rng(seed).integers(-20, 21, 6)
    a, b, c = a0 * e[None, :] / e[:, None], b / e[:, None], c * e[None, :]
    w = np.concatenate([np.abs(ev.imag[ev.imag > 0]), [0.0, 0.1, 1.0, 10.0]])
    g = sw.frequency_response(a, b, c, d, w)
    for k, wk in enumerate(w):
        ref = mpmath_response(a, b, c, d, 1j * wk)
        assert np.max(np.abs(g[k] - ref)) <= 1e-12 * np.max(np.abs(ref)), wk
    batch = sw.frequency_response_batch(a[None], b[None], c[None], d[None], w)
    np.testing.assert_array_equal(batch[0], g)
    integrator = a.copy()
    integrator[:, 0] = 0.0  # a zero column: a pole at s = 0 in any state scaling
    with pytest.raises(sw.ModelError, match="pole"):
        sw.frequency_response(integrator, b, c, d, [0.0])


@pytest.mark.parametrize("coupling", [0.0, 3.0, 8.0])
def test_well_and_ill_conditioned_models_within_the_backward_error_bound(coupling):
    # Reference: numpy's dense complex solve. A = Q (-I + coupling * shift) Q^T is normal for
    # coupling 0 and strongly non-normal otherwise (cond(jwI - A) up to about 5e12 for 8.0).
    # Both solves are backward stable, so they differ by at most about
    # n eps cond(jwI - A) |C| |X| (common practice); the well-conditioned case to 1e-13.
    rng = np.random.default_rng(5)
    n = 14
    q, _ = np.linalg.qr(rng.standard_normal((n, n)))
    a = q @ (-np.eye(n) + np.diag(np.full(n - 1, coupling), 1)) @ q.T
    b, c, d = rng.standard_normal((n, 2)), rng.standard_normal((3, n)), np.zeros((3, 2))
    w = np.logspace(-2, 2, 50)
    g = sw.frequency_response(a, b, c, d, w)
    eps = np.finfo(float).eps
    for k, wk in enumerate(w):
        m = 1j * wk * np.eye(n) - a
        x = np.linalg.solve(m, b)
        ref = c @ x + d
        err = np.max(np.abs(g[k] - ref))
        if coupling == 0.0:
            assert err <= 1e-13 * np.max(np.abs(ref))
        else:
            assert err <= n * eps * np.linalg.cond(m) * np.linalg.norm(c) * np.linalg.norm(x)


def test_singular_to_working_precision_is_refused_not_answered():
    # cond(jwI - A) beyond 1/eps (coupling 20: about 1e17): refused, never a wrong number.
    rng = np.random.default_rng(5)
    n = 14
    q, _ = np.linalg.qr(rng.standard_normal((n, n)))
    a = q @ (-np.eye(n) + np.diag(np.full(n - 1, 20.0), 1)) @ q.T
    with pytest.raises(sw.ModelError, match=r"frequencies\[0\]"):
        sw.frequency_response(a, np.ones((n, 1)), np.ones((1, n)), np.zeros((1, 1)), [0.01])


@pytest.mark.parametrize("outputs, inputs", [(1, 1), (3, 2)])
def test_refusals_only_where_the_point_is_singular_to_working_precision(outputs, inputs):
    # The refusal comes from a condition estimate of sI - A (LINPACK's growth-seeking
    # right-hand side on the triangular factor), a lower bound of cond_1 up to a factor 2
    # (identity: ||U^-1|| <= ||L|| ||M^-1|| with ||L||_1 <= 2 for a Hessenberg elimination
    # with partial pivoting) and about 1/eps at the threshold. So a point well inside
    # 1/eps is answered (and within the backward-error bound, numpy's dense solve as
    # reference, common practice) and a point beyond about 10/eps is refused.
    rng = np.random.default_rng(11)
    n = 14
    q, _ = np.linalg.qr(rng.standard_normal((n, n)))
    b, c, d = rng.standard_normal((n, inputs)), rng.standard_normal((outputs, n)), np.zeros((outputs, inputs))
    eps = np.finfo(float).eps
    refused = answered = 0
    for coupling in np.linspace(4.0, 24.0, 41):
        a = q @ (-np.eye(n) + np.diag(np.full(n - 1, coupling), 1)) @ q.T
        for wk in (0.01, 1.0):
            m = 1j * wk * np.eye(n) - a
            cond = np.linalg.cond(m, 1)
            try:
                g = sw.frequency_response(a, b, c, d, [wk])[0]
            except sw.ModelError as exc:
                assert "frequencies[0]" in str(exc) and "singular to working precision" in str(exc)
                assert cond * eps >= 0.5, (coupling, wk, cond)
                refused += 1
                continue
            assert cond * eps <= 10.0, (coupling, wk, cond)
            x = np.linalg.solve(m, b)
            err = np.max(np.abs(g - c @ x))
            assert err <= n * eps * cond * np.linalg.norm(c) * np.linalg.norm(x), (coupling, wk)
            answered += 1
    assert refused > 10 and answered > 10

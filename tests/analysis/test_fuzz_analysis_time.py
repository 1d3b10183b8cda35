"""Fuzz tests of the time-base functions: to_discrete, to_continuous, frequency_response,
their batches and the Realization methods that use the time base (contract in
tests/fuzz_strategies.py: success with finite, unaliased results of the documented shapes,
or ModelError)."""

import numpy as np
from hypothesis import given
from hypothesis import strategies as st

import statewright as sw
from fuzz_strategies import (
    CI,
    CI_SLOW,
    FAILED,
    LAYOUTS,
    attempt,
    check_realization,
    exact_model,
    flag,
    float_model,
    fuzz_float_arg,
    inf,
    lay_out,
    model_dims,
    nan,
    option,
    watchdog_output,  # noqa: F401  (autouse fixture: the watchdog prints past capture)
)

METHODS = (
    "zero_order_hold",
    "first_order_hold",
    "impulse_invariant",
    "bilinear",
    "forward_difference",
    "backward_difference",
)


def sample_times():
    return st.one_of(
        st.sampled_from([1.0, 0.1, 1e-3, 10.0, 1e-300, 1e300, 0.0, -1.0, nan, inf, None, "0.1", True, [0.1]]),
        st.floats(min_value=1e-6, max_value=1e3),
    )


def prewarps():
    return st.one_of(st.none(), st.none(), st.sampled_from([1.0, 0.5, 1e3, 0.0, -1.0, nan, "1", True]))


@st.composite
def sensible_model(draw):
    """Mostly a well-scaled stable model (continuous or discrete-like), sometimes anything."""
    if draw(st.integers(0, 3)) == 0:
        return draw(float_model())
    n, m, p = draw(st.integers(0, 8)), draw(st.integers(0, 3)), draw(st.integers(0, 3))
    rng = np.random.default_rng(draw(st.integers(0, 2**32 - 1)))
    q = np.linalg.qr(rng.standard_normal((n, n)))[0] if n else np.zeros((0, 0))
    poles = draw(
        st.sampled_from(
            [
                -np.abs(rng.standard_normal(n)) - 0.1,
                rng.uniform(0.05, 0.95, n),
                rng.uniform(-0.95, 0.95, n),
                np.zeros(n),
                rng.standard_normal(n) * 50,
            ]
        )
    )
    a = q @ np.diag(poles) @ q.T
    b, c = rng.standard_normal((n, m)), rng.standard_normal((p, n))
    d = draw(st.sampled_from([np.zeros((p, m)), rng.standard_normal((p, m))]))
    layout = draw(st.sampled_from(LAYOUTS))
    return (lay_out(a, layout), b, lay_out(c, layout), d), (n, m, p)


@CI
@given(data=sensible_model(), t=sample_times(), method=option(METHODS), prewarp=prewarps(), forward=flag())
def test_to_discrete_and_to_continuous(data, t, method, prewarp, forward):
    (a, b, c, d), _ = data
    fn = sw.to_discrete if forward is True else sw.to_continuous
    r = attempt(fn, a, b, c, d, t, method, prewarp_frequency=prewarp)
    if r is not FAILED:
        n, m, p = model_dims(a, b, c)
        check_realization(r, n=n, m=m, p=p, exact=False)
        assert (r.sample_time == float(t)) if forward is True else r.sample_time is None
        assert r.info["method"] == method


@CI_SLOW
@given(data=exact_model(), t=st.sampled_from(["1/10", 1, "0.5", "0", "-1", 0.1, None]), method=option(METHODS))
def test_exact_conversions(data, t, method):
    (a, b, c, d), _ = data
    for fn in (sw.to_discrete, sw.to_continuous):
        r = attempt(fn, a, b, c, d, t, method, exact=True)
        if r is not FAILED:
            check_realization(r, exact=True)


@CI
@given(
    data=sensible_model(),
    w=st.one_of(fuzz_float_arg((0,)), fuzz_float_arg((1,)), fuzz_float_arg((7,)), fuzz_float_arg((40,))),
    t=st.one_of(st.none(), sample_times()),
)
def test_frequency_response(data, w, t):
    # 40 frequencies take the real Schur route for every order up to 13 (k >= 3n), fewer the
    # general Hessenberg route for the larger orders.
    (a, b, c, d), _ = data
    # attempt() overwrites the inputs after the call (the aliasing check): keep copies.
    kept = [x.copy() if isinstance(x, np.ndarray) else x for x in (a, b, c, d, w)]
    g = attempt(sw.frequency_response, a, b, c, d, w, sample_time=t)
    if g is not FAILED:
        n, m, p = model_dims(*kept[:3])
        assert g.dtype == complex and g.shape == (np.size(kept[4]), p, m)
        check_against_a_direct_solve(*kept, t, g)


def check_against_a_direct_solve(a, b, c, d, w, t, g):
    """G at each frequency against numpy.linalg.solve of (sI - A) X = B (identity), where
    sI - A is well conditioned: agreement within 1e-9 times its condition number."""
    if not (type(w) is np.ndarray and w.dtype == np.float64) or not (t is None or type(t) is float):
        return
    if not all(type(x) is np.ndarray and x.dtype == np.float64 for x in (a, b, c, d)):
        return
    n = a.shape[0]
    if n == 0 or not all(np.all(np.isfinite(x)) for x in (a, b, c, d)):
        return
    scale = max(1.0, float(np.max(np.abs(b), initial=0.0)) * float(np.max(np.abs(c), initial=0.0)))
    for wk, gk in zip(w.ravel(), g):
        s = 1j * wk if t is None else np.exp(1j * wk * t)
        m = s * np.eye(n) - a
        cond = np.linalg.cond(m)
        if not np.isfinite(cond) or cond > 1e6:
            continue
        want = c @ np.linalg.solve(m, b) + d
        size = scale * np.linalg.norm(np.linalg.inv(m), 2) + float(np.max(np.abs(d), initial=0.0))
        assert np.max(np.abs(gk - want), initial=0.0) <= 1e-9 * cond * max(size, 1.0), (wk, gk, want)


@st.composite
def model_stack(draw):
    count = draw(st.sampled_from([0, 1, 2, 5]))
    n, m, p = draw(st.integers(0, 4)), draw(st.integers(0, 2)), draw(st.integers(0, 2))
    rng = np.random.default_rng(draw(st.integers(0, 2**32 - 1)))
    a = rng.standard_normal((count, n, n)) * 0.3 - np.eye(n) * draw(st.sampled_from([0.5, 0.0, -0.5]))
    b, c, d = rng.standard_normal((count, n, m)), rng.standard_normal((count, p, n)), rng.standard_normal((count, p, m))
    if draw(st.integers(0, 4)) == 0 and count:
        a[draw(st.integers(0, count - 1))] = draw(st.sampled_from([nan, inf, 0.0, -2.0]))
    shapes = draw(st.sampled_from(["ok"] * 6 + ["bad_b", "2d"]))
    if shapes == "bad_b":
        b = np.zeros((count, n + 1, m))
    elif shapes == "2d":
        a = a.reshape(-1) if a.size else a
    return a, b, c, d


@CI
@given(models=model_stack(), w=fuzz_float_arg((5,)), t=st.one_of(st.none(), sample_times()), method=option(METHODS))
def test_batches(models, w, t, method):
    a, b, c, d = models
    g = attempt(sw.frequency_response_batch, a, b, c, d, w, sample_time=t)
    if g is not FAILED:
        assert g.shape == (a.shape[0], np.size(w), c.shape[1], b.shape[2])
    out = attempt(sw.to_continuous_batch, a, b, c, d, 0.1 if t is None else t, method)
    if out is not FAILED:
        for x, y in zip(out, (a, b, c, d)):
            assert x.shape == y.shape and x.dtype == np.float64


@CI
@given(data=sensible_model(), t=sample_times(), method=option(METHODS), w=fuzz_float_arg((3,)))
def test_realization_time_base_methods(data, t, method, w):
    (a, b, c, d), _ = data
    r = attempt(sw.Realization, a, b, c, d, sample_time=t)
    if r is FAILED:
        return
    for call in (
        lambda: r.frequency_response(w),
        lambda: r.to_continuous(method),
        lambda: r.to_discrete(0.1, method),
        lambda: r.gramians(),
        lambda: r.hankel_singular_values(),
        lambda: r.balanced(),
    ):
        out = attempt(call)
        if isinstance(out, sw.Realization):
            check_realization(out, exact=False)

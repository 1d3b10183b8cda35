"""Fuzz tests of the verified balanced truncation (contract in tests/fuzz_strategies.py):
whatever comes back satisfies its own reported checks, and the figures are finite."""

import numpy as np
from hypothesis import given
from hypothesis import strategies as st

import statewright as sw
from fuzz_strategies import (
    CI,
    FAILED,
    attempt,
    check_realization,
    watchdog_output,  # noqa: F401  (autouse fixture: the watchdog prints past capture)
)

FIGURES = (
    "error_bound",
    "error_estimate",
    "error_frequency",
    "error_allowance",
    "hinf_estimate",
    "hankel_accuracy",
    "balance_residual",
    "balance_relative_residual",
)


@st.composite
def hard_stable_model(draw):
    """Stable models with spread poles, light damping, strong couplings and scaled states."""
    discrete = draw(st.booleans())
    n, m, p = draw(st.integers(1, 9)), draw(st.integers(1, 2)), draw(st.integers(1, 2))
    rng = np.random.default_rng(draw(st.integers(0, 2**32 - 1)))
    spread = draw(st.sampled_from([0.0, 3.0, 8.0]))
    if discrete:
        poles = 1 - np.logspace(-spread / 2 - 1, -0.05, n) * rng.uniform(0.5, 1, n)
    else:
        poles = -np.logspace(-spread / 2, spread / 2, n) * rng.uniform(0.5, 1, n)
    coupling = draw(st.sampled_from([0.0, 1.0, 30.0]))
    a = np.diag(poles) + coupling * np.triu(rng.standard_normal((n, n)), 1) * (0.02 if discrete else 1)
    if draw(st.booleans()):
        q = np.linalg.qr(rng.standard_normal((n, n)))[0]
        a = q @ a @ q.T
    e = rng.integers(-30, 31, n) * draw(st.sampled_from([0, 1]))
    dd = np.ldexp(1.0, e)
    b = rng.standard_normal((n, m)) / dd[:, None]
    c = rng.standard_normal((p, n)) * dd[None, :]
    a = a * dd[None, :] / dd[:, None]
    order = draw(st.one_of(st.none(), st.integers(0, n)))
    return a, b, c, rng.standard_normal((p, m)), order, discrete


@CI
@given(case=hard_stable_model())
def test_balanced_realization_meets_its_own_checks(case):
    a, b, c, d, order, discrete = case
    r = attempt(sw.balanced_realization, a, b, c, d, order=order, discrete=discrete)
    if r is FAILED:
        return
    n, m, p = a.shape[0], b.shape[1], c.shape[0]
    check_realization(r, m=m, p=p, exact=False, max_n=n)
    info = r.info
    for key in FIGURES:
        assert np.isfinite(info[key]) and info[key] >= 0, key
    s = info["hankel_singular_values"]
    assert len(s) == n and np.all(np.diff(s) <= 0) and np.all(s >= 0)
    # The checks the routine promises (module documentation of src/gramian/balance.rs).
    assert info["error_estimate"] <= info["error_bound"] * (1 + 1e-6) + info["error_allowance"]
    assert info["balance_residual"] <= 1e-8
    if n:
        assert s[0] <= info["hinf_estimate"] * (1 + 1e-6) + info["hankel_accuracy"]
    if r.n_states < n and np.any(s[r.n_states :] > info["hankel_accuracy"]):
        # states whose Hankel singular values are resolved (above the stated accuracy) were
        # discarded: the bound cannot be 0 (values at rounding level may be reported as 0)
        assert info["error_bound"] > 0
    hsv = attempt(sw.hankel_singular_values, a, b, c, discrete=discrete)
    if hsv is not FAILED:
        np.testing.assert_array_equal(hsv, s)

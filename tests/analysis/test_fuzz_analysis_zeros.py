"""Fuzz tests of the zeros-and-gains routines (contract in tests/fuzz_strategies.py): any
input either gives finite results of the documented shapes or raises ModelError."""

import numpy as np
from hypothesis import given
from hypothesis import strategies as st

import statewright as sw
from fuzz_strategies import (
    CI,
    CI_SLOW,
    COMPANION_FORMS,
    FAILED,
    attempt,
    bad_tol,
    flag,
    float_model,
    fuzz_float_arg,
    model_dims,
    option,
    transfer_function_data,
    watchdog_output,  # noqa: F401  (autouse fixture: the watchdog prints past capture)
)


def check_zeros(z, n):
    assert isinstance(z, np.ndarray) and z.dtype == np.complex128 and z.ndim == 1
    assert z.size <= n
    assert np.all(np.isfinite(z))
    order = np.lexsort((z.imag, z.real))
    assert np.array_equal(z, z[order])


@CI
@given(model=float_model(), tol=bad_tol())
def test_invariant_and_transmission_zeros(model, tol):
    (a, b, c, d), _ = model
    for fn in (sw.invariant_zeros, sw.transmission_zeros):
        z = attempt(fn, a, b, c, d, tol=tol)
        if z is not FAILED:
            check_zeros(z, model_dims(a, b, c)[0])


@CI
@given(
    seed=st.integers(0, 2**32 - 1),
    n=st.integers(1, 12),
    decades=st.integers(0, 8),
    d=st.sampled_from([0.0, 0.0, 1.0, 1e-9]),
)
def test_siso_zeros_with_spread_poles(seed, n, decades, d):
    # SISO models with poles over up to 8 decades behind a random similarity: the path of
    # the refinement against the numerator. Contract: sorted finite zeros (at most n), the
    # refinement's figures consistent, and the pencil check passed (the residual).
    rng = np.random.default_rng(seed)
    poles = -np.logspace(-decades / 2, decades / 2, n) * rng.uniform(0.8, 1.25, n)
    t = rng.standard_normal((n, n))
    a = t @ np.diag(poles) @ np.linalg.inv(t)
    b, c = rng.standard_normal((n, 1)), rng.standard_normal((1, n))
    out = attempt(sw.invariant_zeros, a, b, c, np.array([[d]]), return_info=True)
    if out is FAILED:
        return
    z, info = out
    check_zeros(z, n)
    assert isinstance(info["refined"], bool)
    assert info["refinement_move"] >= 0.0
    assert info["refined"] or info["refinement_move"] == 0.0
    if info["refined"]:
        assert info["refinement_move"] <= 1e-6
    assert info["residual"] <= max(np.sqrt(np.finfo(float).eps), 10 * (n + 1) * info["tol"])


@CI_SLOW
@given(model=float_model(), tol=bad_tol())
def test_normal_rank(model, tol):
    (a, b, c, d), _ = model
    r = attempt(sw.normal_rank, a, b, c, d, tol=tol)
    if r is not FAILED:
        n, m, p = model_dims(a, b, c)
        assert isinstance(r, int) and 0 <= r <= min(m, p)


@CI_SLOW
@given(model=float_model(), discrete=flag())
def test_dc_gain(model, discrete):
    (a, b, c, d), _ = model
    g = attempt(sw.dc_gain, a, b, c, d, discrete=discrete)
    if g is not FAILED:
        n, m, p = model_dims(a, b, c)
        assert g.shape == (p, m) and g.dtype == np.float64


@CI
@given(data=transfer_function_data())
def test_zeros_poles_gain(data):
    num, den = data
    out = attempt(sw.zeros_poles_gain, num, den)
    if out is not FAILED:
        zeros, poles, gain = out
        assert zeros.dtype == poles.dtype == np.complex128
        assert isinstance(gain, float) and np.isfinite(gain)
        assert zeros.size <= poles.size


ROOTS = st.one_of(
    st.lists(st.complex_numbers(max_magnitude=1e6, allow_nan=False, allow_infinity=False), max_size=6),
    st.lists(st.floats(allow_nan=True, allow_infinity=True), max_size=6),
    st.sampled_from([[], [1j], [1 + 1j, 1 - 1j], [np.nan], "abc", None, [[1.0]], [1e308 + 1e308j, 1e308 - 1e308j]]),
    fuzz_float_arg((3,)),
)


@st.composite
def paired(draw):
    """Valid conjugate-paired root lists most of the time."""
    real = draw(st.lists(st.floats(-1e3, 1e3), max_size=4))
    pairs = draw(st.lists(st.tuples(st.floats(-1e3, 1e3), st.floats(1e-3, 1e3)), max_size=3))
    out = list(real)
    for re, im in pairs:
        out += [complex(re, im), complex(re, -im)]
    return out


@CI_SLOW
@given(
    zeros=st.one_of(paired(), ROOTS),
    poles=st.one_of(paired(), paired(), ROOTS),
    gain=st.one_of(st.floats(-1e3, 1e3), st.sampled_from([0.0, np.nan, np.inf, 1e308, "1", None, 1j])),
    form=option(COMPANION_FORMS + ("modal",)),
)
def test_realize_zeros_poles_gain(zeros, poles, gain, form):
    r = attempt(sw.realize_zeros_poles_gain, zeros, poles, gain, form=form)
    if r is not FAILED:
        assert isinstance(r, sw.Realization)
        assert r.a.dtype == np.float64 and r.n_inputs == 1 and r.n_outputs == 1


@st.composite
def float_batch(draw):
    count = draw(st.sampled_from([0, 1, 2, 3]))
    n, m, p = draw(st.sampled_from([0, 1, 2, 3])), draw(st.sampled_from([0, 1, 2])), draw(st.sampled_from([0, 1, 2]))
    shapes = [(count, n, n), (count, n, m), (count, p, n), (count, p, m)]
    return tuple(draw(fuzz_float_arg(s, bad_rate=0.1)) for s in shapes), (count, n)


@CI_SLOW
@given(batch=float_batch(), tol=bad_tol())
def test_invariant_zeros_batch(batch, tol):
    (a, b, c, d), (count, n) = batch
    out = attempt(sw.invariant_zeros_batch, a, b, c, d, tol=tol)
    if out is not FAILED:
        zeros, counts = out
        assert zeros.dtype == np.complex128 and zeros.ndim == 2 and counts.ndim == 1
        assert zeros.shape[0] == counts.shape[0]
        assert np.all(counts <= zeros.shape[1])

"""The certified batch (eight models per SIMD lane group) against single calls, bit for bit
(reference: statewright.transfer_function on the same arrays, the batch contract), on
ragged batches that do not fill the last lane group, with models only the exact route can
certify mixed in; and the single-call fast paths of realize against the general route."""

from __future__ import annotations

import numpy as np
import pytest

import statewright as sw


def spread_models(count, n, seed):
    """A = T diag(poles) T^-1 with real poles over eight decades: the double-double bound
    does not certify these, the exact route runs (common practice for identified models)."""
    rng = np.random.default_rng(seed)
    out = []
    for _ in range(count):
        t = rng.standard_normal((n, n))
        poles = -(10.0 ** np.linspace(-4, 4, n))
        out.append(t @ np.diag(poles) @ np.linalg.inv(t))
    return np.array(out)


def bits(x):
    return np.ascontiguousarray(x).view(np.uint64)


@pytest.mark.parametrize("count", [1, 7, 8, 9, 29])
@pytest.mark.parametrize("shape", [(8, 1, 1), (5, 2, 3), (1, 1, 1)])
def test_lane_batch_equals_single_calls_bit_for_bit(count, shape):
    n, m, p = shape
    rng = np.random.default_rng(count * 100 + n)
    a = rng.standard_normal((count, n, n))
    if n > 1 and count > 1:
        a[1::3] = spread_models(len(a[1::3]), n, seed=count)
    a[2::5, 0, :] = 0.0  # zeros in some lanes only
    b, c, d = rng.standard_normal((count, n, m)), rng.standard_normal((count, p, n)), rng.standard_normal((count, p, m))
    num, den = sw.transfer_function_batch(a, b, c, d)
    exact_route = 0
    for i in range(count):
        n1, d1, info = sw.transfer_function(a[i], b[i], c[i], d[i], return_accuracy=True)
        exact_route += info["method"] == "exact, rounded once"
        assert np.array_equal(bits(num[i]), bits(n1)) and np.array_equal(bits(den[i]), bits(d1)), i
    if n > 1 and count > 1:
        assert exact_route > 0  # the fallback ran inside the lane batch


def test_round_trip_batch_equals_single_calls_bit_for_bit():
    # realize_batch (in place, default form) + transfer_function_batch, 8k + 5 models.
    rng = np.random.default_rng(4)
    count = 8 * 12 + 5
    den = np.hstack([rng.uniform(0.5, 2.0, (count, 1)), rng.standard_normal((count, 8))])
    num = rng.standard_normal((count, 9))
    num[3, :2] = 0.0  # leading zeros
    a, b, c, d = sw.realize_batch(num, den)
    tnum, tden = sw.transfer_function_batch(a, b, c, d)
    for i in range(count):
        r = sw.realize(num[i], den[i])
        for got, want in zip((a[i], b[i], c[i], d[i]), (r.a, r.b, r.c, r.d)):
            assert np.array_equal(bits(got), bits(want)), i
        n1, d1 = sw.transfer_function(r.a, r.b, r.c, r.d)
        assert np.array_equal(bits(tnum[i]), bits(n1)) and np.array_equal(bits(tden[i]), bits(d1)), i


@pytest.mark.parametrize(
    "num, den",
    [
        ([0.5, 4.0], [2.0, 1.2, 5.0]),
        ([0.0, 0.0, 3.0], [1.0, 0.0, 4.0]),
        ([7.0], [3.0]),
        ([1.0, 2.0, 3.0], [1.0, 1e-3, 2.0]),
        ([1.0, 2.0], [0.0, 1.0, 3.0]),  # a leading zero in den: the general route
    ],
)
def test_realize_fast_paths_equal_the_general_route(num, den):
    # Arrays and lists take the fast paths; a float32 array and tuples go through the full
    # validation; every route gives the same bits.
    routes = [
        sw.realize(np.array(num), np.array(den)),
        sw.realize(list(num), list(den)),
        sw.realize(tuple(num), tuple(den)),
        sw.realize(np.array(num)[::-1][::-1].copy(), np.array(den)),
    ]
    for r in routes[1:]:
        for got, want in zip((r.a, r.b, r.c, r.d), (routes[0].a, routes[0].b, routes[0].c, routes[0].d)):
            assert got.shape == want.shape and np.array_equal(bits(got), bits(want))
            assert not got.flags.writeable
    # The transfer function of the result is num/den (identity), at s = 1j.
    s = 1j
    want = np.polyval(num, s) / np.polyval(den, s)
    assert np.isclose(routes[0].evaluate(s)[0, 0], want, rtol=1e-12)


@pytest.mark.parametrize(
    "num, den, match",
    [
        (np.array([1.0, np.nan]), np.array([1.0, 2.0]), "num"),
        (np.array([1.0]), np.array([1.0, np.inf]), "den"),
        (np.array([], dtype=float), np.array([1.0, 2.0]), "num"),
        (np.array([1.0, 2.0, 3.0]), np.array([1.0, 2.0]), "improper|degree"),
        (np.array([[1.0, 2.0]]), np.array([1.0, 2.0]), "num"),
        (np.array([1.0]), np.array([1e-320, 1.0]), "overflow|normalis"),
    ],
)
def test_realize_fast_path_refusals_match_the_general_route(num, den, match):
    with pytest.raises(sw.ModelError, match=match) as fast:
        sw.realize(num, den)
    with pytest.raises(sw.ModelError) as general:
        sw.realize(tuple(num.tolist()) if num.ndim == 1 else num.tolist(), tuple(den.tolist()))
    assert str(fast.value) == str(general.value)


@pytest.mark.parametrize("layout", ["contiguous", "fortran", "strided"])
def test_batch_reads_its_inputs_in_place_without_changing_them(layout):
    # The batch bindings read C-contiguous float64 inputs in place (no copy) and copy any
    # other layout: every layout gives the same bits (identity), and no input changes.
    rng = np.random.default_rng(31)
    count, n = 13, 5
    num = rng.standard_normal((count, n))
    den = np.hstack([np.ones((count, 1)), rng.standard_normal((count, n))])
    a, b, c, d = sw.realize_batch(num, den)
    ref_num, ref_den = sw.transfer_function_batch(a, b, c, d)
    ref_real = sw.realize_batch(num, den)

    def arrange(x):
        if layout == "fortran":
            return np.asfortranarray(x)
        if layout == "strided":
            wide = np.zeros(x.shape[:-1] + (2 * x.shape[-1],))
            wide[..., ::2] = x
            return wide[..., ::2]
        return np.array(x)

    args = [arrange(x) for x in (a, b, c, d)]
    before = [x.copy() for x in args]
    got_num, got_den = sw.transfer_function_batch(*args)
    assert np.array_equal(bits(got_num), bits(ref_num)) and np.array_equal(bits(got_den), bits(ref_den))
    for x, y in zip(args, before):
        assert np.array_equal(bits(x), bits(y))
    n_in, d_in = arrange(num), arrange(den)
    n_before, d_before = n_in.copy(), d_in.copy()
    for got, want in zip(sw.realize_batch(n_in, d_in), ref_real):
        assert np.array_equal(bits(got), bits(want))
    assert np.array_equal(bits(n_in), bits(n_before)) and np.array_equal(bits(d_in), bits(d_before))
    z_ref = sw.invariant_zeros_batch(a, b, c, d)
    z_got = sw.invariant_zeros_batch(*args)
    for x, y in zip(z_got, z_ref):
        assert np.array_equal(np.asarray(x), np.asarray(y), equal_nan=True)

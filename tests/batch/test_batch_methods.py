"""transfer_function_batch(method=...): each model equals the single call bit for bit
(reference: statewright.transfer_function on the same arrays, the batch contract)."""

from __future__ import annotations

import numpy as np
import pytest

import statewright as sw


def models(count, n, m, p, seed):
    rng = np.random.default_rng(seed)
    a = rng.standard_normal((count, n, n))
    a[::3] *= 10.0 ** rng.uniform(-2, 2, (len(a[::3]), n, 1))  # badly scaled rows as well
    return a, rng.standard_normal((count, n, m)), rng.standard_normal((count, p, n)), rng.standard_normal((count, p, m))


@pytest.mark.parametrize("method", ["hessenberg", "auto", "recursion"])
@pytest.mark.parametrize("shape", [(6, 1, 1), (4, 2, 3), (1, 1, 1), (0, 1, 1)])
def test_batch_equals_single_calls(method, shape):
    n, m, p = shape
    a, b, c, d = models(40, n, m, p, seed=n * 10 + m)
    num, den = sw.transfer_function_batch(a, b, c, d, method=method)
    for i in range(len(a)):
        n1, d1 = sw.transfer_function(a[i], b[i], c[i], d[i], method=method)
        assert np.array_equal(num[i], n1) and np.array_equal(den[i], d1), i


def test_hessenberg_batch_with_progress_and_errors():
    a, b, c, d = models(10, 5, 1, 1, seed=3)
    seen = []
    num, den = sw.transfer_function_batch(a, b, c, d, method="hessenberg", progress=lambda k, t: seen.append(k))
    assert seen == [0, 10]
    a[7, 2, 2] = np.inf
    with pytest.raises(sw.ModelError, match="model 7 of the batch"):
        sw.transfer_function_batch(a, b, c, d, method="hessenberg")
    with pytest.raises(sw.ModelError, match="method"):
        sw.transfer_function_batch(a, b, c, d, method="fast")

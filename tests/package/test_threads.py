"""Thread safety and determinism.

* Eight Python threads call the single-model functions and the batch functions (which
  release the GIL and run on the core's own thread pool) at the same time; every result
  must equal the serial result bit for bit (``np.array_equal`` and equal bytes).
* The same computation in fresh processes with ``RAYON_NUM_THREADS=1``, ``=2`` and the
  default must give the same SHA-256 hashes of the result bytes: results do not depend on
  how the batch is split over threads.
"""

import json
import os
import random
import subprocess
import sys
from concurrent.futures import ThreadPoolExecutor
from fractions import Fraction

import numpy as np
import pytest

import statewright as sw

THREADS = 8
ROUNDS = 6  # every task runs ROUNDS times under the pool, in shuffled order


def spread_model(n=10, decades=4.0, seed=3):
    """A = T diag(-10**linspace(-2, 2, n)) T^-1 (eigenvalue magnitudes over four decades):
    the certified float path cannot certify it, so the exact fallback runs."""
    rng = np.random.default_rng(seed)
    t = rng.standard_normal((n, n)) + np.eye(n) * 2
    a = t @ np.diag(-(10.0 ** np.linspace(-decades / 2, decades / 2, n))) @ np.linalg.inv(t)
    return a, rng.standard_normal((n, 2)), rng.standard_normal((2, n)), rng.standard_normal((2, 2))


def random_model(n, m, p, seed):
    rng = np.random.default_rng(seed)
    return (
        rng.standard_normal((n, n)),
        rng.standard_normal((n, m)),
        rng.standard_normal((p, n)),
        rng.standard_normal((p, m)),
    )


def batch_inputs(count=3000, order=8, seed=11):
    rng = np.random.default_rng(seed)
    den = np.hstack([np.ones((count, 1)), rng.standard_normal((count, order))])
    num = rng.standard_normal((count, order + 1))
    return num, den


def arrays_of(result):
    """The arrays (and numbers) of a result, flattened, in a fixed order."""
    out = []

    def walk(x):
        if isinstance(x, np.ndarray) and x.dtype == object:
            # exact results: Fractions compared by value (their bytes are pointers)
            out.append(np.array([str(e) for e in x.reshape(-1)]).reshape(x.shape))
        elif isinstance(x, np.ndarray):
            out.append(x)
        elif isinstance(x, sw.Realization):
            for y in x:
                walk(y)
        elif isinstance(x, sw.Staircase):
            for y in (x.a, x.b, x.c, x.transform, x.singular_values):
                walk(y)
            out.append(np.array(x.blocks + [x.rank], dtype=np.int64))
        elif isinstance(x, (tuple, list)):
            for y in x:
                walk(y)
        elif isinstance(x, dict):
            for k in sorted(x):
                walk(x[k])
        elif x is None:
            out.append(np.zeros(0))
        else:
            out.append(np.array(x))

    walk(result)
    return out


def tasks():
    """(name, zero-argument callable) pairs covering the functions under test."""
    out = []
    for i, (num, den) in enumerate(
        [
            ([1.0, 3.0], [1.0, 3.0, 2.0]),
            ([2.5, 10.0], [1.0, 20.0]),
            ([0.3, -1.0, 2.0, 0.5], [2.0, 1.0, 0.7, 0.2]),
            ([1.0], [1.0, 6.0, 11.0, 6.0]),
        ]
    ):
        for form in (
            "controllable_canonical",
            "observable_canonical",
            "controller",
            "observer",
            "controllability",
            "observability",
            "modal",
        ):
            out.append((f"realize[{i},{form}]", lambda num=num, den=den, form=form: sw.realize(num, den, form)))
    spread = spread_model()
    out.append(
        ("transfer_function[spread, exact fallback]", lambda: sw.transfer_function(*spread, return_accuracy=True))
    )
    out.append(("characteristic_polynomial[spread]", lambda: sw.characteristic_polynomial(spread[0])))
    for seed, (n, m, p) in enumerate([(4, 1, 1), (6, 2, 3), (12, 3, 2), (1, 1, 1), (0, 1, 1)]):
        model = random_model(n, m, p, seed)
        out.append((f"transfer_function[{seed}]", lambda model=model: sw.transfer_function(*model)))
        out.append(
            (
                f"transfer_function_exact_method[{seed}]",
                lambda model=model: sw.transfer_function(*model, method="exact"),
            )
        )
        out.append((f"characteristic_polynomial[{seed}]", lambda model=model: sw.characteristic_polynomial(model[0])))
        out.append((f"faddeev_leverrier[{seed}]", lambda model=model: sw.faddeev_leverrier(model[0])))
        out.append(
            (
                f"controllability_staircase[{seed}]",
                lambda model=model: sw.controllability_staircase(model[0], model[1], model[2]),
            )
        )
        out.append(
            (
                f"observability_staircase[{seed}]",
                lambda model=model: sw.observability_staircase(model[0], model[1], model[2]),
            )
        )
        out.append((f"minimal_realization[{seed}]", lambda model=model: sw.minimal_realization(*model)))
    # a model with hidden (uncontrollable and unobservable) modes, so minimal_realization reduces
    a = np.diag([-1.0, -2.0, -3.0, -4.0, -5.0])
    b = np.array([[1.0], [1.0], [0.0], [0.0], [1.0]])
    c = np.array([[1.0, 0.0, 1.0, 0.0, 1.0]])
    q = np.linalg.qr(np.random.default_rng(5).standard_normal((5, 5)))[0]
    hidden = (q.T @ a @ q, q.T @ b, c @ q, np.zeros((1, 1)))
    out.append(("minimal_realization[hidden]", lambda: sw.minimal_realization(*hidden)))
    out.append(("controllability_staircase[hidden]", lambda: sw.controllability_staircase(hidden[0], hidden[1])))
    out.append(("observability_staircase[hidden]", lambda: sw.observability_staircase(hidden[0], None, hidden[2])))
    # exact data (the integer recursion after clearing denominators) and range-limit data
    rng = random.Random(9)

    def frac(r, c):
        return [[Fraction(rng.randint(-999, 999), rng.randint(1, 999)) for _ in range(c)] for _ in range(r)]

    exact_model = (frac(5, 5), frac(5, 2), frac(2, 5), frac(2, 2))
    out.append(("transfer_function[exact]", lambda: sw.transfer_function(*exact_model, exact=True)))
    out.append(("faddeev_leverrier[exact]", lambda: sw.faddeev_leverrier(exact_model[0], exact=True)))
    huge = (np.zeros((6, 6)), np.eye(6, 1, -5), np.full((1, 6), np.finfo(float).max))
    out.append(("controllability_staircase[range limit]", lambda: sw.controllability_staircase(*huge)))
    num, den = batch_inputs()
    out.append(("realize_batch", lambda: sw.realize_batch(num, den)))
    out.append(("realize_batch[observer]", lambda: sw.realize_batch(num[:500], den[:500], "observer")))
    ra, rb, rc, rd = sw.realize_batch(num, den)
    out.append(("transfer_function_batch", lambda: sw.transfer_function_batch(ra, rb, rc, rd)))
    sa, sb, sc, sd = (np.stack([x] * 40) for x in spread)
    out.append(("transfer_function_batch[spread]", lambda: sw.transfer_function_batch(sa, sb, sc, sd)))
    return out


def test_spread_model_takes_the_exact_fallback():
    """The spread model really exercises the exact path (otherwise the thread test would
    not cover it)."""
    _, _, accuracy = sw.transfer_function(*spread_model(), return_accuracy=True)
    assert accuracy["method"] == "exact, rounded once", accuracy


def test_threads_equal_serial_bit_for_bit():
    work = tasks()
    serial = {name: arrays_of(fn()) for name, fn in work}
    schedule = [item for item in work for _ in range(ROUNDS)]
    random.Random(0).shuffle(schedule)
    with ThreadPoolExecutor(max_workers=THREADS) as pool:
        futures = [(name, pool.submit(fn)) for name, fn in schedule]
        results = [(name, f.result()) for name, f in futures]
    assert len(results) == len(work) * ROUNDS
    for name, result in results:
        got, ref = arrays_of(result), serial[name]
        assert len(got) == len(ref), name
        for x, y in zip(got, ref):
            assert x.shape == y.shape and x.dtype == y.dtype, name
            assert np.array_equal(x, y), name
            assert x.tobytes() == y.tobytes(), name


def test_threads_errors_are_model_errors():
    """Failing calls from several threads at once each raise their own ModelError."""
    num, den = batch_inputs(count=400, order=4, seed=2)
    den[173, 2] = np.nan

    def bad_batch():
        with pytest.raises(sw.ModelError, match="model 173 of the batch"):
            sw.realize_batch(num, den)

    def bad_single():
        with pytest.raises(sw.ModelError):
            sw.transfer_function(np.eye(3), np.ones((2, 1)), np.ones((1, 3)), [[0.0]])

    with ThreadPoolExecutor(max_workers=THREADS) as pool:
        futures = [pool.submit(bad_batch if i % 2 else bad_single) for i in range(64)]
        for f in futures:
            f.result()


# --------------------------------------------------------------------------------------
# determinism across processes and thread counts
# --------------------------------------------------------------------------------------

HASH_SCRIPT = r"""
import hashlib, json, sys
import numpy as np
import statewright as sw

def h(*arrays):
    d = hashlib.sha256()
    for x in arrays:
        x = np.ascontiguousarray(x)
        d.update(str((x.shape, x.dtype.str)).encode())
        d.update(x.tobytes())
    return d.hexdigest()

rng = np.random.default_rng(2024)
count, order = 20000, 8
den = np.hstack([np.ones((count, 1)), rng.standard_normal((count, order))])
num = rng.standard_normal((count, order + 1))
out = {}
A, B, C, D = sw.realize_batch(num, den)
out["realize_batch"] = h(A, B, C, D)
out["realize_batch_observability"] = h(*sw.realize_batch(num[:3000], den[:3000], "observability"))
out["transfer_function_batch"] = h(*sw.transfer_function_batch(A, B, C, D))
# a batch mixing certified and exact-fallback models
n = 10
t = rng.standard_normal((n, n)) + 2 * np.eye(n)
spread = t @ np.diag(-(10.0 ** np.linspace(-2, 2, n))) @ np.linalg.inv(t)
mixed_a = np.stack([spread if i % 7 == 0 else rng.standard_normal((n, n)) for i in range(700)])
mixed_b = rng.standard_normal((700, n, 2))
mixed_c = rng.standard_normal((700, 2, n))
mixed_d = rng.standard_normal((700, 2, 2))
out["transfer_function_batch_mixed"] = h(*sw.transfer_function_batch(mixed_a, mixed_b, mixed_c, mixed_d))
out["transfer_function_single"] = h(*sw.transfer_function(spread, mixed_b[0], mixed_c[0], mixed_d[0]))
out["characteristic_polynomial"] = h(sw.characteristic_polynomial(spread))
out["realize_modal"] = h(*sw.realize(num[0], den[0], "modal"))
s = sw.controllability_staircase(mixed_a[1], mixed_b[1], mixed_c[1])
out["controllability_staircase"] = h(s.a, s.b, s.c, s.transform)
out["minimal_realization"] = h(*sw.minimal_realization(mixed_a[1], mixed_b[1], mixed_c[1], mixed_d[1]))
json.dump(out, sys.stdout, sort_keys=True)
"""


def run_hash_script(threads):
    env = dict(os.environ)
    env.pop("RAYON_NUM_THREADS", None)
    if threads is not None:
        env["RAYON_NUM_THREADS"] = str(threads)
    proc = subprocess.run([sys.executable, "-c", HASH_SCRIPT], env=env, capture_output=True, text=True, timeout=600)
    assert proc.returncode == 0, proc.stderr
    return json.loads(proc.stdout)


def test_hashes_agree_across_processes_and_thread_counts():
    runs = {threads: run_hash_script(threads) for threads in (1, 2, None)}
    reference = runs[None]
    assert len(reference) == 9
    for threads, hashes in runs.items():
        assert hashes == reference, f"RAYON_NUM_THREADS={threads} differs: " + ", ".join(
            k for k in reference if hashes.get(k) != reference[k]
        )
    # and a second default run (a fresh process) agrees too
    assert run_hash_script(None) == reference

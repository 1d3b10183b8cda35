"""Frequency response and zero-order-hold discretization, side by side with SciPy and numpy.

    maturin develop --release && python benchmarks/bench_frequency.py

Prints one table (median of several repeats, wall-clock): statewright.frequency_response at
1,000 frequencies on a stable order-100 SISO model and a 3-output, 2-input one against
scipy.signal.freqresp (SISO only: it takes one input and one output) and a
numpy.linalg.solve loop (the accuracy column is the largest relative difference from the
numpy solve), and statewright.to_discrete (zero-order hold) against
scipy.signal.cont2discrete per call. The load average and OPENBLAS_NUM_THREADS are printed:
on a shared machine SciPy's threaded BLAS slows down far more than the rest, so compare
runs with OPENBLAS_NUM_THREADS=1 as well.
"""

import os
import platform
import sys

import numpy as np
import scipy
import scipy.signal

import statewright as sw

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from timing import median_time  # noqa: E402


def best_of(fn, repeats, inner=1):
    """Median over ``repeats`` of the mean time of ``inner`` calls (the name is historical)."""
    if inner == 1:
        return median_time(fn, repeats)

    def block():
        for _ in range(inner):
            fn()

    return median_time(block, repeats) / inner


def stable_model(n, seed=0, m=1, p=1):
    """A stable model with spread, lightly damped poles (a scenario of our own)."""
    rng = np.random.default_rng(seed)
    a = rng.standard_normal((n, n)) / np.sqrt(n)
    a -= (np.max(np.linalg.eigvals(a).real) + 0.05) * np.eye(n)
    return a, rng.standard_normal((n, m)), rng.standard_normal((p, n)), np.zeros((p, m))


def numpy_loop(a, b, c, d, w):
    n = a.shape[0]
    eye = np.eye(n)
    return np.array([c @ np.linalg.solve(1j * wk * eye - a, b) + d for wk in w])


def frequency_rows():
    n, k = 100, 1000
    a, b, c, d = stable_model(n)
    w = np.logspace(-2, 2, k)
    ref = numpy_loop(a, b, c, d, w)[:, 0, 0]
    ours = sw.frequency_response(a, b, c, d, w)[:, 0, 0]
    sys = scipy.signal.StateSpace(a, b, c, d)
    import warnings

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        _, theirs = scipy.signal.freqresp(sys, w)
        t_scipy = best_of(lambda: scipy.signal.freqresp(sys, w), 5)
    t_ours = best_of(lambda: sw.frequency_response(a, b, c, d, w), 11)
    t_loop = best_of(lambda: numpy_loop(a, b, c, d, w), 3)

    def rel(x, ref=ref):
        return float(np.max(np.abs(x - ref) / np.abs(ref)))

    faster = min(t_scipy, t_loop)
    rows = [
        ("frequency_response n=100 k=1000", "statewright", t_ours, rel(ours), faster / t_ours),
        ("", "scipy.signal.freqresp", t_scipy, rel(theirs), None),
        ("", "numpy solve loop", t_loop, 0.0, None),
    ]
    a, b, c, d = stable_model(n, seed=1, m=2, p=3)
    ref = numpy_loop(a, b, c, d, w)
    ours = sw.frequency_response(a, b, c, d, w)
    t_ours = best_of(lambda: sw.frequency_response(a, b, c, d, w), 11)
    t_loop = best_of(lambda: numpy_loop(a, b, c, d, w), 3)
    rows += [
        ("frequency_response 3x2 n=100 k=1000", "statewright", t_ours, rel(ours, ref), t_loop / t_ours),
        ("", "numpy solve loop", t_loop, 0.0, None),
    ]
    return rows


def discretize_rows():
    rows = []
    for n in (4, 20, 100):
        a, b, c, d = stable_model(n, seed=n)
        t = 0.05
        ours = sw.to_discrete(a, b, c, d, t)
        ref = scipy.signal.cont2discrete((a, b, c, d), t, method="zoh")
        err = max(
            float(np.max(np.abs(ours.a - ref[0])) / np.max(np.abs(ref[0]))),
            float(np.max(np.abs(ours.b - ref[1])) / np.max(np.abs(ref[1]))),
        )
        inner = 200 if n <= 20 else 10
        t_ours = best_of(lambda: sw.to_discrete(a, b, c, d, t), 5, inner)
        t_scipy = best_of(lambda: scipy.signal.cont2discrete((a, b, c, d), t, method="zoh"), 5, inner)
        rows.append((f"to_discrete zero_order_hold n={n}", "statewright", t_ours, err, t_scipy / t_ours))
        rows.append(("", "scipy.signal.cont2discrete", t_scipy, 0.0, None))
    return rows


def main():
    print(
        f"machine: {platform.processor() or platform.machine()}, {os.cpu_count()} cores, "
        f"Python {platform.python_version()}, numpy {np.__version__}, scipy {scipy.__version__}, "
        f"load average {os.getloadavg()[0]:.1f}, OPENBLAS_NUM_THREADS={os.environ.get('OPENBLAS_NUM_THREADS', 'unset')}"
    )
    print(f"| {'case':36} | {'routine':28} | {'time':>10} | {'max rel. diff.':>14} | {'speed-up':>8} |")
    print(f"| {'-' * 36} | {'-' * 28} | {'-' * 10}: | {'-' * 14}: | {'-' * 8}: |")
    for case, routine, t, err, speedup in frequency_rows() + discretize_rows():
        unit = f"{t * 1e3:8.2f} ms" if t >= 1e-3 else f"{t * 1e6:8.1f} us"
        s = f"{speedup:7.1f}x" if speedup is not None else ""
        print(f"| {case:36} | {routine:28} | {unit:>10} | {err:14.1e} | {s:>8} |")


if __name__ == "__main__":
    main()

"""Benchmark: the structure routines' verification cost, beside scipy.linalg, same run.

Run: python benchmarks/bench_staircase.py
Prints a Markdown table of median times: the controllability staircase and the minimal
realization at their default tol (scale-invariant thresholds, verified candidate search,
eigenvector-guided split, Markov-parameter check) and with an explicit tol (one pass, the
version-1 path), the Kalman decomposition likewise (its default reuses the minimal
realization's passes and rank guard), and scipy.linalg's Hessenberg reduction and SVD of the
same A (comparable orthogonal O(n^3) work). The ratio default / explicit is the cost of the
extra checks.
"""

from __future__ import annotations

import os

import numpy as np
import scipy.linalg

import statewright as sw
from timing import median_time


def cases(rng):
    for n in (50, 100, 200):
        a = rng.standard_normal((n, n)) / np.sqrt(n)
        yield "random, m=5", n, a, rng.standard_normal((n, 5))
        yield "random, m=1", n, a, rng.standard_normal((n, 1))
        # a planted uncontrollable half in random orthogonal coordinates (m = 1)
        nc = n // 2
        ap = rng.standard_normal((n, n)) / np.sqrt(n)
        ap[nc:, :nc] = 0.0
        bp = np.zeros((n, 1))
        bp[:nc] = rng.standard_normal((nc, 1))
        q, _ = np.linalg.qr(rng.standard_normal((n, n)))
        yield "planted half, m=1", n, q @ ap @ q.T, q @ bp


def attempt(fn, *args, **kwargs):
    """``fn(*args, **kwargs)``; a refusal (ModelError) is timed like a result."""
    try:
        return fn(*args, **kwargs)
    except sw.ModelError:
        return None


def main() -> None:
    rng = np.random.default_rng(0)
    eps = np.finfo(float).eps
    print(f"machine: {os.cpu_count()} cores; numpy {np.__version__}, scipy {scipy.__version__}")
    print(
        "| case | n | staircase default [ms] | explicit tol [ms] | ratio | minimal default [ms] "
        "| explicit tol [ms] | ratio | kalman default [ms] | explicit tol [ms] | ratio "
        "| scipy hessenberg [ms] | scipy svd [ms] |"
    )
    print("| --- " * 13 + "|")
    for name, n, a, b in cases(rng):
        c = rng.standard_normal((2, n))
        d = np.zeros((2, b.shape[1]))
        tol = n * n * eps * max(np.linalg.norm(a), np.linalg.norm(b))
        repeat = 15 if n < 200 else 7
        t_sd = median_time(lambda: sw.controllability_staircase(a, b), repeat)
        t_se = median_time(lambda: sw.controllability_staircase(a, b, tol=tol), repeat)
        t_md = median_time(lambda: sw.minimal_realization(a, b, c, d), repeat)
        t_me = median_time(lambda: sw.minimal_realization(a, b, c, d, tol=tol), repeat)
        t_kd = median_time(lambda: attempt(sw.kalman_decomposition, a, b, c, d), repeat)
        t_ke = median_time(lambda: attempt(sw.kalman_decomposition, a, b, c, d, tol=tol), repeat)
        t_h = median_time(lambda: scipy.linalg.hessenberg(a, calc_q=True), repeat)
        t_v = median_time(lambda: scipy.linalg.svd(a), repeat)
        print(
            f"| {name} | {n} | {t_sd * 1e3:.2f} | {t_se * 1e3:.2f} | {t_sd / t_se:.2f} | {t_md * 1e3:.2f} "
            f"| {t_me * 1e3:.2f} | {t_md / t_me:.2f} | {t_kd * 1e3:.2f} | {t_ke * 1e3:.2f} | {t_kd / t_ke:.2f} "
            f"| {t_h * 1e3:.2f} | {t_v * 1e3:.2f} |"
        )


if __name__ == "__main__":
    main()

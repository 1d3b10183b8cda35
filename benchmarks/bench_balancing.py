"""Balanced truncation beside scipy.linalg on the same work.

Reference route (numpy/scipy, square-root balancing as usually written):
``scipy.linalg.solve_continuous_lyapunov`` (or ``solve_discrete_lyapunov``) for both
Gramians, ``scipy.linalg.cholesky`` of each, ``numpy.linalg.svd`` of ``Lo^T Lc`` and the
truncated projection. statewright: ``hankel_singular_values`` and ``balanced_realization``
(Hammarling factors, SVD, balancing-free truncation and the verification of the result).

Run (release build): ``maturin develop --release && python benchmarks/bench_balancing.py``.
Prints one table: median seconds over repeats, and the ratio statewright / scipy.
"""

from __future__ import annotations

import platform
import sys
import time

import numpy as np
import scipy
import scipy.linalg as sla

import statewright as sw


def model(n, discrete, seed):
    rng = np.random.default_rng(seed)
    a = rng.standard_normal((n, n)) / np.sqrt(n)
    ev = np.linalg.eigvals(a)
    if discrete:
        a *= 0.95 / max(abs(ev))
    else:
        a -= (max(ev.real) + 0.3) * np.eye(n)
    return a, rng.standard_normal((n, 2)), rng.standard_normal((2, n)), np.zeros((2, 2))


def scipy_square_root(a, b, c, order, discrete):
    if discrete:
        wc = sla.solve_discrete_lyapunov(a, b @ b.T)
        wo = sla.solve_discrete_lyapunov(a.T, c.T @ c)
    else:
        wc = sla.solve_continuous_lyapunov(a, -b @ b.T)
        wo = sla.solve_continuous_lyapunov(a.T, -c.T @ c)
    lc = sla.cholesky(wc, lower=True)
    lo = sla.cholesky(wo, lower=True)
    u, s, vt = np.linalg.svd(lo.T @ lc)
    root = 1 / np.sqrt(s[:order])
    t = lc @ vt[:order].T * root
    ti = (u[:, :order] * root).T @ lo.T
    return s, ti @ a @ t, ti @ b, c @ t


def median_time(fn, repeats):
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return float(np.median(times))


def main():
    print(
        f"# {platform.machine()} {platform.processor() or ''}, Python {sys.version.split()[0]}, "
        f"numpy {np.__version__}, scipy {scipy.__version__}, statewright {getattr(sw, '__version__', '?')}"
    )
    print(
        "| n | time base | scipy square root (s) | statewright hankel_singular_values (s) | "
        "statewright balanced_realization, order n/2 (s) | ratio balanced / scipy |"
    )
    print("| --- | --- | --- | --- | --- | --- |")
    for n in (20, 50, 100, 200):
        for discrete in (False, True):
            a, b, c, d = model(n, discrete, seed=n)
            order = n // 2
            repeats = 7 if n <= 100 else 3
            t_ref = median_time(lambda: scipy_square_root(a, b, c, order, discrete), repeats)
            t_hsv = median_time(lambda: sw.hankel_singular_values(a, b, c, discrete=discrete), repeats)
            t_bal = median_time(lambda: sw.balanced_realization(a, b, c, d, order=order, discrete=discrete), repeats)
            print(
                f"| {n} | {'discrete' if discrete else 'continuous'} | {t_ref:.4f} | {t_hsv:.4f} | "
                f"{t_bal:.4f} | {t_bal / t_ref:.2f} |"
            )


if __name__ == "__main__":
    main()

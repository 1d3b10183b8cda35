"""Benchmark: identified-model routines vs the same work in scipy.linalg / numpy, same run.

* ``gramians`` (both Gramians, Bartels–Stewart on a real Schur form) vs two calls of
  ``scipy.linalg.solve_continuous_lyapunov`` (and ``solve_discrete_lyapunov``).
* ``realize_markov`` (Ho–Kalman: SVD of the block Hankel matrix, order at the gap) vs the
  same algorithm written with numpy: build the Hankel matrix, ``numpy.linalg.svd``, factor,
  A from the shifted Hankel matrix through the SVD's orthonormal factors.
* ``balanced_realization`` (square-root method) vs the same written with scipy.linalg:
  two Lyapunov solves, square-root factors (symmetric eigendecompositions), one SVD, the
  projections.

Run: python benchmarks/bench_identify.py
Prints Markdown tables of median times and ratios (statewright / reference) and checks
that both sides agree, so the work compared is the same.
"""

from __future__ import annotations

import os

import numpy as np
import scipy
import scipy.linalg as sl

import statewright as sw
from timing import median_time


def stable_model(rng, n, m, p, discrete=False):
    q = np.linalg.qr(rng.standard_normal((n, n)))[0]
    if discrete:
        poles = rng.uniform(0.1, 0.9, n) * rng.choice([-1.0, 1.0], n)
    else:
        poles = -np.logspace(-1, 1, n)
    a = q @ np.diag(poles) @ q.T
    return a, rng.standard_normal((n, m)), rng.standard_normal((p, n)), np.zeros((p, m))


def reference_gramians(a, b, c, discrete):
    if discrete:
        return sl.solve_discrete_lyapunov(a, b @ b.T), sl.solve_discrete_lyapunov(a.T, c.T @ c)
    return sl.solve_continuous_lyapunov(a, -b @ b.T), sl.solve_continuous_lyapunov(a.T, -c.T @ c)


def reference_ho_kalman(markov, order):
    """Ho–Kalman with numpy: Hankel of Markov parameters 1..2r, SVD, balanced factors."""
    k, p, m = markov.shape
    r = (k - 1) // 2
    h = np.block([[markov[1 + i + j] for j in range(r)] for i in range(r)])
    hs = np.block([[markov[2 + i + j] for j in range(r)] for i in range(r)])
    u, s, vt = np.linalg.svd(h)
    root = np.sqrt(s[:order])
    obs = u[:, :order] * root
    ctr = (vt[:order].T * root).T
    # least squares O A Gamma = H_shift through the SVD's orthonormal factors (as in the core)
    a = (u[:, :order].T @ hs @ vt[:order].T) / root[:, None] / root[None, :]
    return a, ctr[:, :m], obs[:p], markov[0]


def reference_balanced(a, b, c, d, order):
    wc, wo = reference_gramians(a, b, c, False)
    # square-root factors from symmetric eigendecompositions (a Cholesky factorization fails
    # once the Gramians are numerically singular, as they are with few inputs and n >= 50)
    lc, lo = (v * np.sqrt(np.clip(w, 0.0, None)) for w, v in (sl.eigh(wc), sl.eigh(wo)))
    u, s, vt = sl.svd(lo.T @ lc)
    root = 1.0 / np.sqrt(s[:order])
    t = lc @ vt[:order].T * root
    ti = (root[:, None] * u[:, :order].T) @ lo.T
    return ti @ a @ t, ti @ b, c @ t, d


def main() -> None:
    rng = np.random.default_rng(0)
    print(f"machine: {os.cpu_count()} cores; numpy {np.__version__}; scipy {scipy.__version__}")
    print()
    print("| routine | n | statewright [ms] | reference [ms] | ratio | agreement |")
    print("| --- | --- | --- | --- | --- | --- |")
    for discrete in (False, True):
        for n in (20, 50, 100):
            a, b, c, _ = stable_model(rng, n, 2, 2, discrete)
            repeat = 20 if n < 100 else 8
            ours = sw.gramians(a, b, c, discrete=discrete)
            ref = reference_gramians(a, b, c, discrete)
            agree = max(np.linalg.norm(x - y) / np.linalg.norm(y) for x, y in zip(ours, ref))
            t_ours = median_time(lambda: sw.gramians(a, b, c, discrete=discrete), repeat)
            t_ref = median_time(lambda: reference_gramians(a, b, c, discrete), repeat)
            name = "gramians (discrete)" if discrete else "gramians"
            print(f"| {name} | {n} | {t_ours * 1e3:.2f} | {t_ref * 1e3:.2f} | {t_ours / t_ref:.2f} | {agree:.1e} |")
    for n, k in ((10, 41), (20, 81), (40, 161)):
        a, b, c, _ = stable_model(rng, n, 2, 2, discrete=True)
        markov = np.empty((k, 2, 2))
        markov[0] = 0.0
        power = np.eye(n)
        for i in range(1, k):
            markov[i] = c @ power @ b
            power = power @ a
        ours = sw.realize_markov(markov, order=n)
        ref = reference_ho_kalman(markov, n)
        # same model: compare the Markov parameters of the two realizations (identity)
        agree = max(np.linalg.norm(ours.c @ np.linalg.matrix_power(ours.a, i) @ ours.b
                                   - ref[2] @ np.linalg.matrix_power(ref[0], i) @ ref[1]) for i in range(5))
        repeat = 20 if n < 40 else 8
        t_ours = median_time(lambda: sw.realize_markov(markov, order=n), repeat)
        t_ref = median_time(lambda: reference_ho_kalman(markov, n), repeat)
        print(f"| realize_markov ({k} Markov parameters) | {n} | {t_ours * 1e3:.2f} | {t_ref * 1e3:.2f} "
              f"| {t_ours / t_ref:.2f} | {agree:.1e} |")
    for n in (20, 50, 100):
        a, b, c, d = stable_model(rng, n, 2, 2)
        order = n // 4
        ours = sw.balanced_realization(a, b, c, d, order=order)
        ref = reference_balanced(a, b, c, d, order)
        s = 1j * 0.7
        g_ours = ours.evaluate(s)
        g_ref = ref[2] @ np.linalg.solve(s * np.eye(order) - ref[0], ref[1]) + ref[3]
        agree = np.linalg.norm(g_ours - g_ref) / np.linalg.norm(g_ref)
        repeat = 20 if n < 100 else 8
        t_ours = median_time(lambda: sw.balanced_realization(a, b, c, d, order=order), repeat)
        t_ref = median_time(lambda: reference_balanced(a, b, c, d, order), repeat)
        print(f"| balanced_realization (to n/4) | {n} | {t_ours * 1e3:.2f} | {t_ref * 1e3:.2f} "
              f"| {t_ours / t_ref:.2f} | {agree:.1e} |")


if __name__ == "__main__":
    main()

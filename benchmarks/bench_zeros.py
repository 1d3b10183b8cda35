"""Zeros of SISO identified-like models: statewright.invariant_zeros (system pencil) against
numpy.roots of the numerator that scipy.signal.ss2tf recovers.

Models: A = T diag(poles) T^-1 with real poles spread over several decades, T a random
matrix, B and C random, D = 0 (order 20 by default). Reference: the zeros of the same float
data at 80 digits with mpmath: the n - 1 nonzero eigenvalues of the zero-dynamics matrix
(I - B (CB)^-1 C) A (identity: C is a left eigenvector of it for the eigenvalue 0, and its
other eigenvalues are the zeros when CB != 0). Error of a zero set: the largest relative
distance |z - z_ref| / |z_ref| after pairing each reference zero with the nearest computed
one (the recovered numerator may have extra spurious roots; they are not counted). The
"refined" column says whether the SISO refinement against the numerator polynomial (in
double-double) replaced the pencil zeros (info["refined"]).

    python benchmarks/bench_zeros.py [--models 8] [--order 20] [--seed 1]
        [--transform random|orthogonal] [--decades 3 4 5 6]
"""

import argparse
import platform
import time

import mpmath
import numpy as np
import scipy
import scipy.signal

import statewright as sw


def identified_like(rng, order, decades, transform="random"):
    poles = -np.logspace(-decades / 2, decades / 2, order) * rng.uniform(0.8, 1.25, order)
    t = rng.standard_normal((order, order))
    if transform == "orthogonal":
        t = np.linalg.qr(t)[0]
    a = t @ np.diag(poles) @ np.linalg.inv(t)
    b = rng.standard_normal((order, 1))
    c = rng.standard_normal((1, order))
    return a, b, c, np.zeros((1, 1))


def reference_zeros(a, b, c, digits=80):
    with mpmath.workdps(digits):
        A = mpmath.matrix(a.tolist())
        B = mpmath.matrix(b.tolist())
        C = mpmath.matrix(c.tolist())
        cb = (C * B)[0, 0]
        proj = mpmath.eye(a.shape[0]) - B * C / cb
        values = mpmath.eig(proj * A, left=False, right=False)
        values = sorted(values, key=lambda v: abs(v))[1:]  # drop the eigenvalue 0
        return np.array([complex(v) for v in values])


def error(found, ref):
    found = list(np.asarray(found, dtype=complex))
    worst = 0.0
    for r in ref:
        if not found:
            return np.inf
        k = int(np.argmin([abs(f - r) for f in found]))
        worst = max(worst, abs(found[k] - r) / abs(r))
        found.pop(k)
    return worst


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--models", type=int, default=12)
    parser.add_argument("--order", type=int, default=20)
    parser.add_argument("--seed", type=int, default=1)
    parser.add_argument("--transform", choices=["random", "orthogonal"], default="random")
    parser.add_argument("--decades", type=int, nargs="+", default=[3, 4, 5, 6])
    args = parser.parse_args()
    rng = np.random.default_rng(args.seed)
    print(
        f"# {platform.machine()} {platform.python_version()} numpy {np.__version__} "
        f"scipy {scipy.__version__} mpmath {mpmath.__version__}; order {args.order}, T {args.transform}"
    )
    print(
        "| model | pole decades | zero magnitudes | statewright rel. error | ss2tf + roots rel. error "
        "| statewright better | refined |"
    )
    print("| --- | --- | --- | --- | --- | --- | --- |")
    wins = 0
    t_sw = t_sp = 0.0
    rows = 0
    for i in range(args.models):
        decades = args.decades[i % len(args.decades)]
        a, b, c, d = identified_like(rng, args.order, decades, args.transform)
        ref = reference_zeros(a, b, c)
        t0 = time.perf_counter()
        z_sw, info = sw.invariant_zeros(a, b, c, d, return_info=True)
        t1 = time.perf_counter()
        num, _ = scipy.signal.ss2tf(a, b, c, d)
        z_sp = np.roots(num[0])
        t2 = time.perf_counter()
        t_sw += t1 - t0
        t_sp += t2 - t1
        e_sw, e_sp = error(z_sw, ref), error(z_sp, ref)
        better = e_sw < e_sp
        wins += better
        rows += 1
        mags = np.abs(ref)
        print(
            f"| {i} | {decades} | {mags.min():.1e} .. {mags.max():.1e} | {e_sw:.1e} | {e_sp:.1e} | "
            f"{'yes' if better else 'NO'} | {'yes' if info['refined'] else 'no'} |"
        )
    print(f"\nstatewright more accurate on {wins} of {rows} models")
    print(f"time per model: statewright {1e3 * t_sw / rows:.2f} ms, ss2tf + roots {1e3 * t_sp / rows:.2f} ms")


if __name__ == "__main__":
    main()

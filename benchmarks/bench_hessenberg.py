"""Identified-like models: method="hessenberg" and method="auto" batches beside a SciPy loop.

Run: python benchmarks/bench_hessenberg.py   (writes benchmarks/results/hessenberg_batch.md)

Models as in bench_spread_batch.py: A = T diag(poles) T^-1 with T standard normal and real
poles -10^U(-2, 2) (four decades), B and C standard normal, D = 0. For n = 8, 16, 24:
the time of ``transfer_function_batch(..., method=...)`` (all cores) against a Python loop
over ``scipy.signal.ss2tf``, and on every model the worst coefficient-wise relative error
of both against ``method="exact"`` (the exact transfer function of the float data, rounded
once): the worst over the batch and the number of models where statewright's worst error
is at most SciPy's.
"""

from __future__ import annotations

import os
import platform
import sys
import time
from pathlib import Path

import numpy as np
import scipy
from scipy import signal

import statewright as sw

sys.path.insert(0, str(Path(__file__).resolve().parent))
from bench_spread_batch import spread_models  # noqa: E402

OUT = Path(__file__).resolve().parent / "results"


def worst_per_model(num: np.ndarray, den: np.ndarray, ref_num: np.ndarray, ref_den: np.ndarray) -> np.ndarray:
    """Worst relative error of each model over its denominator and numerator coefficients."""
    x = np.concatenate([den, num.reshape(len(num), -1)], axis=1)
    r = np.concatenate([ref_den, ref_num.reshape(len(ref_num), -1)], axis=1)
    with np.errstate(divide="ignore", invalid="ignore"):
        rel = np.where(r != 0, np.abs(x - r) / np.abs(r), 0.0)
    return rel.max(axis=1)


def best_of(fn, repeat: int) -> float:
    best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    return best


def main() -> None:
    machine = (
        f"{os.cpu_count()} cores, {platform.machine()}, Python {platform.python_version()}, "
        f"numpy {np.__version__}, SciPy {scipy.__version__}"
    )
    lines = [
        f"Machine: {machine}.",
        "",
        "| n | models | method | statewright batch | SciPy ss2tf loop | ratio | worst error: statewright "
        "| SciPy | models with statewright <= SciPy |",
        "| --- | --- | --- | --- | --- | --- | --- | --- | --- |",
    ]
    for n, count in ((8, 2000), (16, 1000), (24, 500)):
        a, b, c, d = spread_models(count, n, seed=n)
        ref_num, ref_den = sw.transfer_function_batch(a, b, c, d, method="exact")
        t0 = time.perf_counter()
        ref = [signal.ss2tf(a[i], b[i], c[i], d[i]) for i in range(count)]
        t_scipy = time.perf_counter() - t0
        s_num = np.stack([r[0] for r in ref])[:, None, :, :]
        s_den = np.stack([r[1] for r in ref])
        w_scipy = worst_per_model(s_num, s_den, ref_num, ref_den)
        for method in ("hessenberg", "auto"):
            t_ours = best_of(lambda: sw.transfer_function_batch(a, b, c, d, method=method), 3)
            num, den = sw.transfer_function_batch(a, b, c, d, method=method)
            w_ours = worst_per_model(num, den, ref_num, ref_den)
            lines.append(
                f"| {n} | {count:,} | {method} | {t_ours:.3f} s | {t_scipy:.2f} s | {t_scipy / t_ours:.1f}x | "
                f"{w_ours.max():.1e} | {w_scipy.max():.1e} | {int(np.sum(w_ours <= w_scipy))} / {count} |"
            )
            print(lines[-1], flush=True)
    OUT.mkdir(parents=True, exist_ok=True)
    (OUT / "hessenberg_batch.md").write_text("\n".join(lines) + "\n")
    print("\n".join(lines))


if __name__ == "__main__":
    main()

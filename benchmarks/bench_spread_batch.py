"""Batch of identified-like models with fast and slow modes, side by side with SciPy.

Run: python benchmarks/bench_spread_batch.py   (writes benchmarks/results/spread_batch.md)

Models: A = T diag(poles) T^-1 with T standard normal and real poles spread over four
decades (1e-2 .. 1e2), B and C standard normal, D = 0: what a fleet of identified plants
with fast and slow modes looks like. Here the certified double-double recursion cannot
certify most coefficients, so statewright's default falls back to the exact evaluation.

Compared on the same models: statewright.transfer_function_batch (all cores) against a
Python loop over scipy.signal.ss2tf, and the accuracy of both on a subset against the exact
transfer function of the float data (Faddeev-LeVerrier in Python integers, as in
scripts/accuracy_report.py), maximum coefficient-wise relative error.
"""

from __future__ import annotations

import os
import sys
import time
from pathlib import Path

import numpy as np
from scipy import signal

import statewright as sw

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "scripts"))
from accuracy_report import exact_sequence, rel_error  # noqa: E402

OUT = Path(__file__).resolve().parent / "results"


def spread_models(count: int, n: int, seed: int) -> tuple:
    rng = np.random.default_rng(seed)
    a = np.empty((count, n, n))
    for i in range(count):
        t = rng.standard_normal((n, n))
        a[i] = t @ np.diag(-(10.0 ** rng.uniform(-2.0, 2.0, n))) @ np.linalg.inv(t)
    b = rng.standard_normal((count, n, 1))
    c = rng.standard_normal((count, 1, n))
    d = np.zeros((count, 1, 1))
    return a, b, c, d


def main() -> None:
    lines = [f"Machine: {os.cpu_count()} cores.", "",
             "| n | models | exact fallbacks | statewright batch | SciPy ss2tf loop | ratio | worst error: statewright | SciPy |",
             "| --- | --- | --- | --- | --- | --- | --- | --- |"]
    for n, count in ((8, 2000), (16, 1000), (24, 500)):
        a, b, c, d = spread_models(count, n, seed=n)
        fallbacks = sum(sw.transfer_function(a[i], b[i], c[i], d[i], return_accuracy=True)[2]["method"]
                        == "exact, rounded once" for i in range(min(count, 200)))
        t0 = time.perf_counter()
        num, den = sw.transfer_function_batch(a, b, c, d)
        t_ours = time.perf_counter() - t0
        t0 = time.perf_counter()
        ref = [signal.ss2tf(a[i], b[i], c[i], d[i]) for i in range(count)]
        t_scipy = time.perf_counter() - t0
        worst_ours = worst_scipy = 0.0
        for i in range(10):
            exact_den, exact_num = exact_sequence(a[i], b[i], c[i])
            worst_ours = max(worst_ours, rel_error(den[i], exact_den), rel_error(num[i, 0, 0], exact_num))
            worst_scipy = max(worst_scipy, rel_error(ref[i][1], exact_den), rel_error(ref[i][0][0], exact_num))
        lines.append(f"| {n} | {count:,} | {fallbacks / min(count, 200):.0%} | {t_ours:.2f} s | {t_scipy:.2f} s | "
                     f"{t_scipy / t_ours:.1f}× | {worst_ours:.1e} | {worst_scipy:.1e} |")
        print(lines[-1], flush=True)
    OUT.mkdir(parents=True, exist_ok=True)
    (OUT / "spread_batch.md").write_text("\n".join(lines) + "\n")
    print("\n".join(lines[:4]))


if __name__ == "__main__":
    main()

"""Benchmark: controllability staircase vs one numpy SVD of an n x n matrix, same run.

Run: python benchmarks/bench_staircase.py
Prints a Markdown table of median times and ratios (staircase / SVD).
"""

from __future__ import annotations

import os

import numpy as np

import statewright as sw
from timing import median_time


def main() -> None:
    rng = np.random.default_rng(0)
    print(f"machine: {os.cpu_count()} cores; numpy {np.__version__}")
    print("| n | m | staircase [ms] | numpy SVD n x n [ms] | ratio |")
    print("| --- | --- | --- | --- | --- |")
    for n in (50, 100, 200):
        m = 5
        a = rng.standard_normal((n, n))
        b = rng.standard_normal((n, m))
        repeat = 30 if n < 200 else 15
        sw.controllability_staircase(a, b)  # warm-up
        np.linalg.svd(a)
        t_s = median_time(lambda: sw.controllability_staircase(a, b), repeat)
        t_svd = median_time(lambda: np.linalg.svd(a), repeat)
        print(f"| {n} | {m} | {t_s * 1e3:.2f} | {t_svd * 1e3:.2f} | {t_s / t_svd:.2f} |")


if __name__ == "__main__":
    main()

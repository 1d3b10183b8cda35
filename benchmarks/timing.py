"""Shared timing helper for the benchmark scripts (run them from the project root)."""

from __future__ import annotations

import time

import numpy as np


def median_time(fn, repeat: int) -> float:
    """Median wall time of ``repeat`` calls of ``fn`` (seconds)."""
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return float(np.median(times))

"""Batch benchmarks, side by side with SciPy in one run.

Run: python benchmarks/bench_batch.py [--quick]
Writes benchmarks/results/batch.md (the README table) and benchmarks/results/scaling.png.

P1: N random order-8 SISO models, transfer function -> realization -> transfer function:
    statewright's batch functions vs a Python loop over scipy.signal.tf2ss / ss2tf
    (the SciPy loop is timed on a subset and scaled, since it takes minutes for 100,000).
P2: one order-4 realization call, statewright.realize vs scipy.signal.tf2ss (arrays, then lists).
P3: one order-4 transfer-function call, statewright.transfer_function vs scipy.signal.ss2tf.
Scaling: batch time vs batch size and vs order.
"""

from __future__ import annotations

import argparse
import os
import platform
import time
from pathlib import Path

import numpy as np
import scipy
from scipy import signal

import statewright as sw

OUT = Path(__file__).parent / "results"


def random_models(count: int, order: int, seed: int = 0) -> tuple:
    rng = np.random.default_rng(seed)
    den = np.hstack([np.ones((count, 1)), rng.standard_normal((count, order))])
    num = rng.standard_normal((count, order + 1))
    return num, den


def best_of(fn, repeat: int) -> float:
    best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    return best


def p1(count: int, scipy_subset: int) -> dict:
    num, den = random_models(count, 8)

    def ours() -> None:
        a, b, c, d = sw.realize_batch(num, den)
        sw.transfer_function_batch(a, b, c, d)

    def theirs() -> None:
        for i in range(scipy_subset):
            a, b, c, d = signal.tf2ss(num[i], den[i])
            signal.ss2tf(a, b, c, d)

    t_ours = best_of(ours, 3)
    t_theirs = best_of(theirs, 1) * count / scipy_subset
    return {"count": count, "ours": t_ours, "scipy": t_theirs}


def p2() -> dict:
    num, den = random_models(1, 4)
    n0, d0 = num[0], den[0]
    loops = 20000

    def repeat(fn):
        def run() -> None:
            for _ in range(loops):
                fn(n0, d0)
        return run

    t_ours = best_of(repeat(sw.realize), 5) / loops
    t_theirs = best_of(repeat(signal.tf2ss), 5) / loops
    n_list, d_list = n0.tolist(), d0.tolist()  # plain lists, as typed in a notebook

    def repeat_lists(fn):
        def run() -> None:
            for _ in range(loops):
                fn(n_list, d_list)

        return run

    t_lists = best_of(repeat_lists(sw.realize), 5) / loops
    t_theirs_lists = best_of(repeat_lists(signal.tf2ss), 5) / loops
    return {"ours": t_ours, "scipy": t_theirs, "ours_lists": t_lists, "scipy_lists": t_theirs_lists}


def p3() -> dict:
    """One order-4 transfer-function recovery (correctly rounded) vs scipy.signal.ss2tf."""
    num, den = random_models(1, 4, seed=3)
    a, b, c, d = sw.realize(num[0], den[0])
    loops = 5000

    def repeat(fn):
        def run() -> None:
            for _ in range(loops):
                fn(a, b, c, d)

        return run

    t_ours = best_of(repeat(sw.transfer_function), 5) / loops
    t_theirs = best_of(repeat(signal.ss2tf), 5) / loops
    return {"ours": t_ours, "scipy": t_theirs}


def scaling(quick: bool) -> tuple:
    sizes = [10**3, 10**4, 10**5] + ([] if quick else [10**6])
    by_size = []
    for count in sizes:
        num, den = random_models(count, 8)
        def run() -> None:
            a, b, c, d = sw.realize_batch(num, den)
            sw.transfer_function_batch(a, b, c, d)
        by_size.append((count, best_of(run, 2 if count < 10**6 else 1)))
    orders = [2, 4, 8, 12, 16, 20, 30]
    by_order = []
    for order in orders:
        count = 2000
        num, den = random_models(count, order, seed=order)
        def run() -> None:
            a, b, c, d = sw.realize_batch(num, den)
            sw.transfer_function_batch(a, b, c, d)
        by_order.append((order, best_of(run, 2) / count))
    return by_size, by_order


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--quick", action="store_true", help="smaller sizes (for a smoke run)")
    args = parser.parse_args()
    OUT.mkdir(exist_ok=True)
    count = 10_000 if args.quick else 100_000
    machine = f"{os.cpu_count()} cores, {platform.machine()}, Python {platform.python_version()}, numpy {np.__version__}, SciPy {scipy.__version__}"
    r1 = p1(count, scipy_subset=1000 if args.quick else 3000)
    r2 = p2()
    r3 = p3()
    by_size, by_order = scaling(args.quick)

    lines = [
        f"Machine: {machine}.",
        "",
        "| benchmark | statewright | SciPy | ratio (SciPy / statewright) |",
        "| --- | --- | --- | --- |",
        f"| P1: {r1['count']:,} order-8 models, tf -> ss -> tf | {r1['ours']:.2f} s | {r1['scipy']:.1f} s | {r1['scipy'] / r1['ours']:.0f}x |",
        f"| P2: one order-4 realization | {r2['ours'] * 1e6:.1f} us | {r2['scipy'] * 1e6:.1f} us | {r2['scipy'] / r2['ours']:.1f}x |",
        f"| P2, coefficients as lists | {r2['ours_lists'] * 1e6:.1f} us | {r2['scipy_lists'] * 1e6:.1f} us | "
        f"{r2['scipy_lists'] / r2['ours_lists']:.1f}x |",
        f"| P3: one order-4 transfer function | {r3['ours'] * 1e6:.1f} us | {r3['scipy'] * 1e6:.1f} us | "
        f"{r3['scipy'] / r3['ours']:.1f}x |",
        "",
        "| batch size (order 8) | time [s] | per model [us] |",
        "| --- | --- | --- |",
    ] + [f"| {c:,} | {t:.3f} | {t / c * 1e6:.2f} |" for c, t in by_size] + [
        "",
        "| order | per model [us] (batch of 2,000) |",
        "| --- | --- |",
    ] + [f"| {o} | {t * 1e6:.2f} |" for o, t in by_order]
    text = "\n".join(lines)
    (OUT / "batch.md").write_text(text + "\n")
    print(text)

    import matplotlib
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    fig, (ax1, ax2) = plt.subplots(1, 2, figsize=(10, 4))
    c, t = zip(*by_size)
    ax1.loglog(c, t, "o-", label="statewright batch")
    ax1.loglog(c, np.array(c) * r1["scipy"] / r1["count"], "s--", label="SciPy loop (per-model rate)")
    ax1.set_xlabel("models in the batch"); ax1.set_ylabel("tf -> ss -> tf time [s]"); ax1.legend()
    ax1.set_title("linear in the number of models (order 8)")
    o, t = zip(*by_order)
    ax2.loglog(o, np.array(t) * 1e6, "o-")
    ax2.set_xticks(list(o)); ax2.set_xticklabels([str(x) for x in o]); ax2.minorticks_off()
    ax2.set_xlabel("model order n"); ax2.set_ylabel("time per model [us]")
    ax2.set_title("growth with the order")
    fig.suptitle(machine, fontsize=8)
    fig.tight_layout()
    fig.savefig(OUT / "scaling.png", dpi=110)


if __name__ == "__main__":
    main()

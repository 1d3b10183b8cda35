"""Memory-growth check: many small calls, resident set size sampled as they run.

Runs ``--calls`` small calls (default 10**6), alternating ``realize`` of an order-4 transfer
function (cycling through the canonical forms) and ``transfer_function`` of an order-4
model, on fresh inputs drawn from a fixed pool. The resident set size (VmRSS from
/proc/self/status; the peak from getrusage where /proc is missing) is sampled every tenth
of the run and printed as a table. The first tenth is warm-up (allocator pools, caches);
the check fails (exit status 1) when RSS grows by more than ``--threshold-mb`` (default
20 MB) from the end of the warm-up to the end of the run. ``--with-errors`` makes every
tenth call a failing one (NaN in the data), so that the error path (ModelError raised from
the core) is checked for leaks too. ``--exact`` makes every ``transfer_function`` call take
the exact route (``method="exact"``: multi-modular characteristic polynomials, the prime
cache, the reconstruction), so that path is checked too.

    python scripts/memory_check.py                 # 10**6 calls, under a minute
    python scripts/memory_check.py --calls 100000  # a quick run
    python scripts/memory_check.py --with-errors
    python scripts/memory_check.py --exact
"""

import argparse
import resource
import sys
import time

import numpy as np

import statewright as sw

FORMS = ("controllable_canonical", "observable_canonical", "controller", "observer",
         "controllability", "observability")


def rss_mb():
    """Current resident set size in MB (the peak, from getrusage, where /proc is missing)."""
    try:
        with open("/proc/self/status") as f:
            for line in f:
                if line.startswith("VmRSS:"):
                    return int(line.split()[1]) / 1024.0
    except OSError:
        pass
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    return peak / (1024.0 * 1024.0) if sys.platform == "darwin" else peak / 1024.0


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--calls", type=int, default=10 ** 6, help="number of calls (default 10**6)")
    parser.add_argument("--threshold-mb", type=float, default=20.0,
                        help="allowed RSS growth after the warm-up tenth, in MB (default 20)")
    parser.add_argument("--with-errors", action="store_true",
                        help="make every tenth call fail with ModelError (NaN data)")
    parser.add_argument("--exact", action="store_true",
                        help="transfer_function with method='exact' (the exact route) instead of the default")
    args = parser.parse_args(argv)
    method = "exact" if args.exact else "auto"
    calls = max(10, args.calls)
    step = calls // 10

    rng = np.random.default_rng(0)
    pool = 64
    nums = rng.standard_normal((pool, 5))
    dens = np.hstack([np.ones((pool, 1)), rng.standard_normal((pool, 4))])
    models = [(rng.standard_normal((4, 4)), rng.standard_normal((4, 1)), rng.standard_normal((1, 4)),
               rng.standard_normal((1, 1))) for _ in range(pool)]

    bad_den = dens[0].copy()
    bad_den[2] = np.nan
    bad_model = (models[0][0].copy(), models[0][1], models[0][2], models[0][3])
    bad_model[0][1, 1] = np.nan

    rows = [(0, rss_mb(), 0.0)]
    start = time.perf_counter()
    checksum = 0.0
    errors = 0
    for i in range(1, calls + 1):
        j = i % pool
        if args.with_errors and i % 10 == 0:
            try:
                if i % 20:
                    sw.realize(nums[j], bad_den)
                else:
                    sw.transfer_function(*bad_model)
            except sw.ModelError:
                errors += 1
        elif i % 2:
            r = sw.realize(nums[j], dens[j], FORMS[i % len(FORMS)])
            checksum += r.a[3, 3]
        else:
            num, den = sw.transfer_function(*models[j], method=method)
            checksum += den[-1]
        if i % step == 0:
            rows.append((i, rss_mb(), time.perf_counter() - start))

    print(f"{'calls':>10} {'RSS (MB)':>10} {'change (MB)':>12} {'elapsed (s)':>12}")
    for count, rss, elapsed in rows:
        print(f"{count:>10} {rss:>10.1f} {rss - rows[0][1]:>+12.1f} {elapsed:>12.1f}")
    warm = rows[1][1]
    growth = rows[-1][1] - warm
    print(f"growth after warm-up ({rows[1][0]} calls): {growth:+.1f} MB (threshold {args.threshold_mb:.1f} MB); "
          f"checksum {checksum:.6g}; ModelErrors raised {errors}")
    if growth > args.threshold_mb:
        print("FAIL: memory grows with the number of calls")
        return 1
    print("OK")
    return 0


if __name__ == "__main__":
    sys.exit(main())

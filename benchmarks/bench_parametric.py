"""Parametric transfer functions: statewright against sympy's own exact route, same results.

For each seeded model (order n, a given number of parameters, entries integers, parameters,
products, quotients k/p and p/(q+1) as in tests/parametric/parametric_models.py):

* statewright: ``parametric_transfer_function`` (sympy in and out, the conversions included);
* sympy: ``det(sI - A)`` and ``adj(sI - A)`` by the Berkowitz method, ``C adj B + det D``
  expanded, every coefficient of s brought to lowest terms by ``sympy.cancel``.

The results are checked equal (``cancel(ours - theirs) == 0`` per coefficient) and the best
of ``--repeat`` runs is timed. Use a release build (``maturin develop --release``).

    python benchmarks/bench_parametric.py [--repeat 3] [--orders 4 5 6] [--parameters 4]
"""

import argparse
import os
import platform
import sys
import time

import sympy

import statewright as sw

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "tests", "parametric"))
from parametric_models import random_model, sympy_transfer_function  # noqa: E402

S = sympy.Symbol("s")


def best_of(repeat, fn):
    best, result = float("inf"), None
    for _ in range(repeat):
        t = time.perf_counter()
        result = fn()
        best = min(best, time.perf_counter() - t)
    return best, result


def coefficients(poly, n):
    coeffs = [poly.domain.to_sympy(c) for c in poly.rep.to_list()]
    return [sympy.Integer(0)] * (n + 1 - len(coeffs)) + coeffs


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--repeat", type=int, default=3)
    parser.add_argument("--orders", type=int, nargs="+", default=[3, 4, 5, 6])
    parser.add_argument("--parameters", type=int, default=4)
    parser.add_argument("--density", type=float, default=0.5)
    parser.add_argument("--seeds", type=int, default=2)
    args = parser.parse_args()
    versions = f"Python {platform.python_version()}, sympy {sympy.__version__}"
    print(f"machine: {platform.machine()}, {os.cpu_count()} cores, {versions}")
    print(f"{'order':>5} {'params':>6} {'seed':>4} {'terms':>6} {'statewright s':>13} {'sympy s':>9} {'speed-up':>8}")
    for n in args.orders:
        for seed in range(args.seeds):
            a, b, c, d, _ = random_model(1000 * n + seed, n, args.parameters, density=args.density)
            ours_t, (num, den) = best_of(args.repeat, lambda: sw.parametric_transfer_function(a, b, c, d, S))
            ref_t, (num_ref, den_ref) = best_of(
                max(1, args.repeat // 3), lambda: sympy_transfer_function(a, b, c, d, S)
            )
            for x, y in zip(coefficients(den, n), den_ref):
                assert sympy.cancel(x - y) == 0
            for x, y in zip(coefficients(num[0, 0], n), num_ref[0][0]):
                assert sympy.cancel(x - y) == 0
            terms = sum(len(sympy.Add.make_args(sympy.numer(sympy.together(x)))) for x in den_ref)
            speed_up = ref_t / ours_t
            print(f"{n:>5} {args.parameters:>6} {seed:>4} {terms:>6} {ours_t:>13.4f} {ref_t:>9.3f} {speed_up:>7.0f}x")


if __name__ == "__main__":
    main()

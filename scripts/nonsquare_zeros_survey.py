"""Survey of invariant_zeros on non-square models with planted zeros, against an exact
reference (the known weak spot noted in the README's "Zeros and gains").

Run: python scripts/nonsquare_zeros_survey.py [--seeds K]

Models: ``planted_model`` of tests/analysis/test_zeros.py (rows x cols, every entry
(s + 1)(s - 2)(s^2 + 2s + 5) q_ij(s) / den(s) with random integer cofactors q_ij of
degree 1, one controllable companion block per input, exact integer data), in their own
coordinates and in random orthogonal ones. Reference: the Smith-McMillan zeros of
G = N / den computed exactly in sympy (N's invariant factors from the gcds of its minors,
each reduced against den), which are the invariant zeros of this controllable realization
(a wide model's unobservable modes do not lower the rank of its full-row-rank pencil).
Printed per shape and coordinates: how many models return exactly the reference zeros
(count and values within 1e-6), how many return fewer, and how many more.

A second table checks that no zero is invented: small random integer models (entries in
-3..3, n = 2..5; in some, A a companion matrix), whose invariant zeros are the roots of
the gcd of the maximal minors of the system matrix [[sI - A, -B], [C, D]], computed
exactly in sympy.
"""

from __future__ import annotations

import argparse
import collections
import itertools
import sys
from pathlib import Path

import numpy as np
import sympy as sp

import statewright as sw

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))
sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests" / "analysis"))
from test_zeros import matched_distance, orthogonal, planted_model  # noqa: E402

S = sp.symbols("s")
DEN = sp.expand(sp.prod([S + k for k in range(3, 9)]))
SHAPES = ((2, 1), (3, 1), (1, 2), (1, 3), (3, 2), (2, 3))


def reference_zeros(c: np.ndarray, rows: int, cols: int) -> np.ndarray:
    """Exact Smith-McMillan zeros of the planted model whose C is given (n = 6 per block)."""
    n, k = 6, min(rows, cols)
    num = sp.zeros(rows, cols)
    for j in range(cols):
        for i in range(rows):
            coeffs = c[i, j * n : (j + 1) * n]
            num[i, j] = sum(sp.Integer(int(round(coeffs[t]))) * S**t for t in range(n))
    divisors = [sp.Integer(1)]
    for size in range(1, k + 1):
        g = sp.Integer(0)
        for r in itertools.combinations(range(rows), size):
            for cc in itertools.combinations(range(cols), size):
                g = sp.gcd(g, sp.expand(num.extract(list(r), list(cc)).det()))
        divisors.append(g)
    product = sp.Integer(1)
    for i in range(1, k + 1):
        eta = sp.cancel(divisors[i] / divisors[i - 1])
        product *= sp.fraction(sp.cancel(eta / DEN))[0]
    poly = sp.Poly(sp.expand(product), S)
    zeros = []
    if poly.degree() > 0:
        for factor, mult in sp.factor_list(poly.as_expr())[1]:
            zeros += [complex(r) for r in sp.Poly(factor, S).nroots(n=30, maxsteps=200)] * mult
    return np.array(zeros)


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--seeds", type=int, default=40)
    args = parser.parse_args()
    counts: collections.Counter = collections.Counter()
    for seed in range(args.seeds):
        for rows, cols in SHAPES:
            rng = np.random.default_rng(seed * 100 + rows * 7 + cols)
            a, b, c, d = planted_model(rng, rows, cols)
            q = orthogonal(rng, a.shape[0])
            ref = reference_zeros(c, rows, cols)
            for name, (aa, bb, cc) in (("own", (a, b, c)), ("orthogonal", (q.T @ a @ q, q.T @ b, c @ q))):
                z = sw.invariant_zeros(aa, bb, cc, d)
                right = len(z) == len(ref) and (len(z) == 0 or matched_distance(z, ref) < 1e-6)
                counts[(rows, cols, name, "right")] += right
                counts[(rows, cols, name, "fewer")] += len(z) < len(ref)
                counts[(rows, cols, name, "more")] += len(z) > len(ref)
                counts[(rows, cols, name, "total")] += 1
    print("| shape (outputs x inputs) | coordinates | models | exactly the reference zeros | fewer zeros | more zeros |")
    print("| --- | --- | --- | --- | --- | --- |")
    for rows, cols in SHAPES:
        for name in ("own", "orthogonal"):
            t = counts[(rows, cols, name, "total")]
            print(
                f"| {rows} x {cols} | {name} | {t} | {counts[(rows, cols, name, 'right')]} | "
                f"{counts[(rows, cols, name, 'fewer')]} | {counts[(rows, cols, name, 'more')]} |"
            )
    integer_models(args.seeds)


def exact_pencil_zeros(a, b, c, d) -> list:
    """Roots (with multiplicity) of the gcd of the maximal nonzero minors of the system matrix."""
    n, m, p = a.shape[0], b.shape[1], c.shape[0]
    rat = lambda x: sp.Matrix(x.shape[0], x.shape[1], lambda i, j: sp.Integer(int(x[i, j])))  # noqa: E731
    pencil = sp.BlockMatrix([[S * sp.eye(n) - rat(a), -rat(b)], [rat(c), rat(d)]]).as_explicit()
    rows, cols = n + p, n + m
    for size in range(min(rows, cols), 0, -1):
        g = sp.Integer(0)
        for r in itertools.combinations(range(rows), size):
            for cc in itertools.combinations(range(cols), size):
                g = sp.gcd(g, sp.expand(pencil.extract(list(r), list(cc)).det()))
        if g != 0:
            poly = sp.Poly(g, S)
            out = []
            if poly.degree() > 0:
                for factor, mult in sp.factor_list(poly.as_expr())[1]:
                    out += [complex(x) for x in sp.Poly(factor, S).nroots(n=30, maxsteps=200)] * mult
            return out
    return []


def integer_models(seeds: int) -> None:
    rng = np.random.default_rng(2026)
    counts: collections.Counter = collections.Counter()
    for trial in range(seeds * len(SHAPES)):
        rows, cols = SHAPES[trial % len(SHAPES)]
        n = int(rng.integers(2, 6))
        a = rng.integers(-3, 4, (n, n)).astype(float)
        if trial % 2:
            a = np.diag(np.ones(n - 1), 1)
            a[-1, :] = rng.integers(-3, 4, n)
        b = rng.integers(-3, 4, (n, cols)).astype(float)
        c = rng.integers(-3, 4, (rows, n)).astype(float)
        d = rng.integers(-3, 4, (rows, cols)).astype(float) * (trial % 3 == 0)
        ref = exact_pencil_zeros(a, b, c, d)
        z = sw.invariant_zeros(a, b, c, d)
        right = len(z) == len(ref) and (len(z) == 0 or matched_distance(z, ref) < 1e-6)
        key = "right" if right else ("fewer" if len(z) < len(ref) else ("more" if len(z) > len(ref) else "other"))
        counts[key] += 1
        counts["with zeros"] += len(ref) > 0
    total = seeds * len(SHAPES)
    print()
    print("| random integer models | with zeros (exact) | exactly the reference zeros | fewer | more | other values |")
    print("| --- | --- | --- | --- | --- | --- |")
    print(
        f"| {total} | {counts['with zeros']} | {counts['right']} | {counts['fewer']} | {counts['more']} | "
        f"{counts['other']} |"
    )


if __name__ == "__main__":
    main()

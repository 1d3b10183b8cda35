"""Exact rational data: statewright's characteristic polynomial and transfer function with
exact=True, side by side with sympy on the same work, results checked equal.

Run: python benchmarks/bench_exact.py   (writes benchmarks/results/exact.md)

sympy reference: Matrix.charpoly() (its DomainMatrix characteristic polynomial over QQ) for
the characteristic polynomial; for a SISO transfer function, det(sI - A) from charpoly and
C adj(sI - A) B from the matrix determinant lemma, charpoly(A - B C) - charpoly(A), i.e.
two charpoly calls (statewright gets the numerator from the Markov parameters instead).
"""

from __future__ import annotations

import time
from fractions import Fraction
from pathlib import Path

import numpy as np
import sympy

import statewright as sw

OUT = Path(__file__).resolve().parent / "results"


def random_fractions(rng: np.random.Generator, shape, max_den: int, max_num: int = 100) -> np.ndarray:
    out = np.empty(shape, dtype=object)
    for idx in np.ndindex(*shape):
        out[idx] = Fraction(int(rng.integers(-max_num + 1, max_num)), int(rng.integers(1, max_den + 1)))
    return out


def big_fractions(rng: np.random.Generator, shape, bits: int) -> np.ndarray:
    out = np.empty(shape, dtype=object)
    for idx in np.ndindex(*shape):
        num = int.from_bytes(rng.bytes(bits // 8), "little") - (1 << (bits - 1))
        den = int.from_bytes(rng.bytes(bits // 8), "little") | 1
        out[idx] = Fraction(num, den)
    return out


def sympy_charpoly(a: np.ndarray) -> list:
    m = sympy.Matrix(a.shape[0], a.shape[1], [sympy.Rational(x.numerator, x.denominator) for x in a.flat])
    return [Fraction(int(c.p), int(c.q)) for c in m.charpoly().all_coeffs()]


def timed(fn):
    t0 = time.perf_counter()
    out = fn()
    return out, time.perf_counter() - t0


def main() -> None:
    rng = np.random.default_rng(2026)
    lines = ["| work | n | entries | statewright | sympy | ratio | equal |", "| --- | --- | --- | --- | --- | --- | --- |"]
    cases = [(10, "p/q, q <= 10"), (20, "p/q, q <= 10"), (20, "p/q, q <= 1000"), (30, "p/q, q <= 100"),
             (40, "p/q, q <= 7"), (6, "4000-bit p/q")]
    for n, label in cases:
        a = big_fractions(rng, (n, n), 4000) if "4000" in label else \
            random_fractions(rng, (n, n), int(label.split("<= ")[1]))
        ours, t_ours = timed(lambda: sw.characteristic_polynomial(a, exact=True))
        ref, t_ref = timed(lambda: sympy_charpoly(a))
        equal = list(ours) == ref
        lines.append(f"| characteristic polynomial | {n} | {label} | {t_ours * 1e3:.1f} ms | {t_ref * 1e3:.1f} ms | "
                     f"{t_ref / t_ours:.0f}× | {equal} |")
        print(lines[-1], flush=True)
        assert equal
    for n, max_den in ((10, 10), (20, 10), (30, 7)):
        a = random_fractions(rng, (n, n), max_den)
        b = random_fractions(rng, (n, 1), max_den)
        c = random_fractions(rng, (1, n), max_den)
        d = np.array([[Fraction(0)]], dtype=object)
        (num, den), t_ours = timed(lambda: sw.transfer_function(a, b, c, d, exact=True))

        def reference():
            char = sympy_charpoly(a)
            perturbed = sympy_charpoly(a - b @ c)
            return [x - y for x, y in zip(perturbed, char)], char

        (rnum, rden), t_ref = timed(reference)
        equal = list(den) == rden and list(num[0, 0]) == rnum
        lines.append(f"| SISO transfer function | {n} | p/q, q <= {max_den} | {t_ours * 1e3:.1f} ms | "
                     f"{t_ref * 1e3:.1f} ms | {t_ref / t_ours:.0f}× | {equal} |")
        print(lines[-1], flush=True)
        assert equal
    OUT.mkdir(parents=True, exist_ok=True)
    (OUT / "exact.md").write_text("\n".join(lines) + "\n")
    print("\n".join(lines[:2]))


if __name__ == "__main__":
    main()

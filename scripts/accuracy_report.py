"""Accuracy report: statewright's characteristic polynomial and transfer function against an
exact reference, side by side with the eigenvalue route (numpy.poly / scipy.signal.ss2tf), and the time of one
transfer_function call beside one scipy.signal.ss2tf call on the same model.

Run: python scripts/accuracy_report.py   (writes benchmarks/results/accuracy.md)

Reference: every float64 is a dyadic rational, so the characteristic polynomial and
C adj(sI - A) B of the float data are computed exactly (Faddeev-LeVerrier in Python
integers), then compared in mpmath at 50 significant digits. Error = max over coefficients
of |computed - exact| / |exact| (exactly zero coefficients skipped).
"""

from __future__ import annotations

import time
from fractions import Fraction
from pathlib import Path

import mpmath
import numpy as np
from scipy import signal

import statewright as sw

mpmath.mp.dps = 50
OUT = Path(__file__).resolve().parent.parent / "benchmarks" / "results"


def exact_sequence(a: np.ndarray, b: np.ndarray, c: np.ndarray):
    """Exact char poly and SISO numerator of float data (Fractions)."""
    n = a.shape[0]
    fa = [[Fraction(float(x)) for x in row] for row in a]
    scale = 1
    for row in fa:
        for x in row:
            scale = max(scale, x.denominator)
    m = [[int(x * scale) for x in row] for row in fa]  # A = M / scale, scale a power of two
    nk = [[int(i == j) for j in range(n)] for i in range(n)]
    coeffs = [Fraction(1)]
    adj = []
    for k in range(1, n + 1):
        adj.append((nk, k - 1))
        prod = [[sum(m[i][l] * nk[l][j] for l in range(n)) for j in range(n)] for i in range(n)]
        ck = -sum(prod[i][i] for i in range(n)) // k
        coeffs.append(Fraction(ck, scale ** k))
        for i in range(n):
            prod[i][i] += ck
        nk = prod
    # The integer recursion above is on M; numerator terms C N_k(M) B / scale^k.
    fb = [Fraction(float(x)) for x in b[:, 0]]
    fc = [Fraction(float(x)) for x in c[0]]
    num = [Fraction(0)]
    for mat, k in adj:
        v = sum(fc[i] * sum(mat[i][j] * fb[j] for j in range(n)) for i in range(n))
        num.append(v / scale ** k)
    return coeffs, num


def rel_error(x, ref) -> float:
    worst = mpmath.mpf(0)
    for xi, ri in zip(x, ref):
        if ri == 0:
            continue
        r = mpmath.mpf(ri.numerator) / ri.denominator
        worst = max(worst, abs((mpmath.mpf(float(xi)) - r) / r))
    return float(worst)


def make(n: int, family: str, rng: np.random.Generator) -> np.ndarray:
    if family == "well-conditioned":
        poles = -rng.uniform(0.5, 2.0, n)
    elif family == "clustered":
        poles = -1.0 + 0.05 * rng.standard_normal(n)
    else:
        poles = -(10.0 ** rng.uniform(-2, 2, n))
    t = rng.standard_normal((n, n))
    return t @ np.diag(poles) @ np.linalg.inv(t)


def main() -> None:
    rng = np.random.default_rng(2026)
    cases = [(n, "well-conditioned") for n in (4, 8, 12)] + [
        (n, fam) for n in (20, 30, 40) for fam in ("clustered", "spread")]
    lines = ["| n | poles | char. poly: statewright | numpy.poly | transfer fn: statewright | scipy ss2tf | method "
             "| time [ms]: statewright | scipy ss2tf |",
             "| --- | --- | --- | --- | --- | --- | --- | --- | --- |"]
    worse = 0
    for n, family in cases:
        a = make(n, family, rng)
        b = rng.standard_normal((n, 1))
        c = rng.standard_normal((1, n))
        d = np.zeros((1, 1))
        ref_den, ref_num = exact_sequence(a, b, c)
        t0 = time.perf_counter()
        num, den, acc = sw.transfer_function(a, b, c, d, return_accuracy=True)
        elapsed = time.perf_counter() - t0
        ours_cp = rel_error(sw.characteristic_polynomial(a), ref_den)
        theirs_cp = rel_error(np.poly(a), ref_den)
        t0 = time.perf_counter()
        snum, sden = signal.ss2tf(a, b, c, d)
        scipy_elapsed = time.perf_counter() - t0
        ours_tf = max(rel_error(num[0, 0], ref_num), rel_error(den, ref_den))
        theirs_tf = max(rel_error(snum[0], ref_num), rel_error(sden, ref_den))
        worse += (ours_cp > max(theirs_cp, 2.3e-16)) + (ours_tf > max(theirs_tf, 2.3e-16))
        lines.append(f"| {n} | {family} | {ours_cp:.1e} | {theirs_cp:.1e} | {ours_tf:.1e} | {theirs_tf:.1e} | "
                     f"{acc['method']} | {elapsed * 1e3:.1f} | {scipy_elapsed * 1e3:.1f} |")
        print(lines[-1], flush=True)
    lines.append("")
    lines.append(f"Cases where statewright is less accurate than the eigenvalue route: {worse}.")
    OUT.mkdir(parents=True, exist_ok=True)
    (OUT / "accuracy.md").write_text("\n".join(lines) + "\n")
    print("\n".join(lines[:2]))
    print(lines[-1])


if __name__ == "__main__":
    main()

"""Survey of the Hessenberg route against the exact route (the table in the README).

Run: python scripts/hessenberg_survey.py [--models K]

For seeded well-conditioned, clustered and spread models (A = T diag(poles) T^-1 with T
standard normal; poles in [-2, -0.5], near -1, or -10^U(-2, 2)), and random normal A, the
transfer function by ``method="hessenberg"`` is compared coefficient by coefficient with
``method="exact"`` (the exact transfer function of the float data, rounded once) and so is
``scipy.signal.ss2tf``. Printed per family and order: the worst coefficient-wise relative
error of both, the worst ratio of the Hessenberg route's error to its own estimate (must be
at most 1), and on how many models the Hessenberg route's worst error is at most SciPy's.

The last column is a floor no float reduction can beat: the characteristic polynomial of
``scipy.linalg.hessenberg(a)`` (an orthogonal reduction rounded to float64) computed
exactly, compared with the exact characteristic polynomial of ``a``, and counted where it is
at most SciPy's denominator error. It isolates the reduction's rounding (backward error of
order eps ||A||) from the recurrence's.
"""

from __future__ import annotations

import argparse

import numpy as np
import scipy.linalg
from scipy import signal

import statewright as sw

FAMILIES = ("well-conditioned", "clustered", "spread", "random normal")


def make_model(n: int, family: str, rng: np.random.Generator) -> tuple:
    """One SISO model of the family (D = 0)."""
    if family == "random normal":
        a = rng.standard_normal((n, n))
    else:
        if family == "well-conditioned":
            poles = -rng.uniform(0.5, 2.0, n)
        elif family == "clustered":
            poles = -1.0 + 0.05 * rng.standard_normal(n)
        else:
            poles = -(10.0 ** rng.uniform(-2.0, 2.0, n))
        t = rng.standard_normal((n, n))
        a = t @ np.diag(poles) @ np.linalg.inv(t)
    return a, rng.standard_normal((n, 1)), rng.standard_normal((1, n)), np.zeros((1, 1))


def worst_relative(x: np.ndarray, ref: np.ndarray) -> float:
    """Largest |x - ref| / |ref| over the nonzero reference coefficients."""
    mask = ref != 0
    if not mask.any():
        return 0.0
    return float(np.max(np.abs(x[mask] - ref[mask]) / np.abs(ref[mask])))


def compare(a, b, c, d) -> dict:
    """Errors of the Hessenberg route and of SciPy against the exact route, one model."""
    ref_num, ref_den = sw.transfer_function(a, b, c, d, method="exact")
    num, den, acc = sw.transfer_function(a, b, c, d, method="hessenberg", return_accuracy=True)
    s_num, s_den = signal.ss2tf(a, b, c, d)
    ours = max(worst_relative(den, ref_den), worst_relative(num[0, 0], ref_num[0, 0]))
    theirs = max(worst_relative(s_den, ref_den), worst_relative(s_num[0], ref_num[0, 0]))
    # The exact reference is itself rounded once: allow its half unit.
    slack = np.finfo(float).eps / 2
    ratio = 0.0
    for x, ref, est in (
        (den, ref_den, acc["den_error_estimate"]),
        (num[0, 0], ref_num[0, 0], acc["num_error_estimate"][0, 0]),
    ):
        err = np.abs(x - ref) - slack * np.abs(ref)
        with np.errstate(divide="ignore", invalid="ignore"):
            r = np.where(err <= 0, 0.0, err / est)
        ratio = max(ratio, float(np.max(r)) if r.size else 0.0)
    floor_den = np.asarray(sw.characteristic_polynomial(scipy.linalg.hessenberg(a), method="exact"))
    floor_ok = worst_relative(floor_den, ref_den) <= worst_relative(s_den, ref_den)
    return {
        "ours": ours,
        "scipy": theirs,
        "ratio": ratio,
        "estimate": acc["relative_error_estimate"],
        "floor_ok": floor_ok,
    }


def survey(orders, models: int, seed: int = 2026) -> list:
    """Rows (family, n, worst ours, worst SciPy, worst error/estimate, models where ours <= SciPy)."""
    rng = np.random.default_rng(seed)
    rows = []
    for family in FAMILIES:
        for n in orders:
            res = [compare(*make_model(n, family, rng)) for _ in range(models)]
            rows.append(
                {
                    "family": family,
                    "n": n,
                    "models": models,
                    "ours": max(r["ours"] for r in res),
                    "scipy": max(r["scipy"] for r in res),
                    "ratio": max(r["ratio"] for r in res),
                    "not_worse": sum(r["ours"] <= r["scipy"] for r in res),
                    "floor_ok": sum(r["floor_ok"] for r in res),
                }
            )
    return rows


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--models", type=int, default=50, help="models per family and order")
    args = parser.parse_args()
    rows = survey((4, 8, 16, 24), args.models)
    print(
        "| poles | n | models | worst rel. error: hessenberg | SciPy ss2tf | worst error / estimate "
        "| models with hessenberg <= SciPy | exactly reduced floor <= SciPy (denominator) |"
    )
    print("| --- | --- | --- | --- | --- | --- | --- | --- |")
    for r in rows:
        print(
            f"| {r['family']} | {r['n']} | {r['models']} | {r['ours']:.1e} | {r['scipy']:.1e} | "
            f"{r['ratio']:.2f} | {r['not_worse']} / {r['models']} | {r['floor_ok']} / {r['models']} |"
        )


if __name__ == "__main__":
    main()

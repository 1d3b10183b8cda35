"""Accuracy survey of the Hankel singular values and balanced truncation on ill-conditioned
models: statewright against the usual scipy-based square-root route, both against an
80-digit mpmath reference (tests/hankel_reference.py).

    python scripts/hankel_survey.py            # the README table (a few minutes)
    python scripts/hankel_survey.py --quick    # smaller sizes

Columns: the Gramian condition number (mpmath), the relative error of sigma_1, the worst
relative error over all sigma_i, the relative error of the smallest sigma_n (ours vs the
scipy route), and for statewright the worst error in units of its stated accuracy
``|sigma_i - ref_i| / (hankel_accuracy + 1e-12 sigma_i)`` (at most 1 means the statement
holds), whether sigma_1 <= the H-infinity norm (dense grid in float64 and the peak checked
in mpmath), and the truncation error of order n/2 over the bound on a dense grid.
"""

from __future__ import annotations

import os
import sys
import warnings

import numpy as np
import scipy.linalg as sla

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "tests"))

import hankel_reference as ref  # noqa: E402

import statewright as sw  # noqa: E402


def scipy_hsv(a, b, c, discrete):
    """The usual route: scipy Lyapunov solves, Cholesky factors, SVD of the product."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        if discrete:
            wc, wo = sla.solve_discrete_lyapunov(a, b @ b.T), sla.solve_discrete_lyapunov(a.T, c.T @ c)
        else:
            wc = sla.solve_continuous_lyapunov(a, -b @ b.T)
            wo = sla.solve_continuous_lyapunov(a.T, -c.T @ c)
        try:
            lc, lo = sla.cholesky(wc, lower=True), sla.cholesky(wo, lower=True)
        except (np.linalg.LinAlgError, ValueError):
            return None
        return np.linalg.svd(lo.T @ lc, compute_uv=False)


def families(quick):
    sizes = (8, 12) if quick else (8, 12, 16)
    for n in sizes:
        for discrete in (False, True):
            yield f"coupled cascade n={n}", ref.coupled_cascade(n, discrete=discrete), discrete
            yield f"stiff chain n={n}", ref.stiff_chain(n, decades=10, discrete=discrete), discrete
    for stages in (3, 5) if quick else (3, 5, 7):
        for discrete in (False, True):
            yield (f"oscillator cascade n={2 * stages}", ref.oscillator_cascade(stages, discrete=discrete), discrete)
            yield f"lightly damped n={2 * stages}", ref.lightly_damped(stages, discrete=discrete), discrete


def rel(x, y):
    return abs(x - y) / y


def main():
    quick = "--quick" in sys.argv
    print(
        "| model | time | cond(Wc) | sigma_n/sigma_1 | err sigma_1 ours / scipy | worst err ours / scipy | "
        "err sigma_n ours / scipy | ours, units of stated accuracy | sigma_1 <= Hinf | "
        "truncation error / bound (order n/2) |"
    )
    print("| --- | --- | --- | --- | --- | --- | --- | --- | --- | --- |")
    for name, (a, b, c, d), discrete in families(quick):
        n = a.shape[0]
        exact = np.array([float(v) for v in ref.mp_hankel_singular_values(a, b, c, discrete)])
        wc, _ = ref.mp_gramians(a, b, c, discrete)
        cond = ref.mp_condition(wc)
        acc = float("nan")
        for order in [1, None] + list(range(2, n + 1)):
            try:
                acc = sw.balanced_realization(a, b, c, d, discrete=discrete, order=order).info["hankel_accuracy"]
                break
            except sw.ModelError:
                continue
        ours = sw.hankel_singular_values(a, b, c, discrete=discrete)
        theirs = scipy_hsv(a, b, c, discrete)
        units = max(abs(o - e) / (acc + 1e-12 * e) for o, e in zip(ours, exact))
        freqs = ref.frequency_grid(a, discrete)
        g = ref.response(a, b, c, 0 * d, freqs, discrete)
        gains = np.array([np.linalg.svd(x, compute_uv=False)[0] for x in g])
        top = freqs[np.argmax(gains)]
        hinf = max(gains.max(), ref.mp_peak_gain(a, b, c, [top], discrete))
        try:
            r = sw.balanced_realization(a, b, c, d, order=n // 2, discrete=discrete)
            diff = g - ref.response(r.a, r.b, r.c, r.d - d, freqs, discrete)
            trunc = f"{ref.peak(diff) / r.info['error_bound']:.3f}"
        except sw.ModelError as exc:
            trunc = f"refused ({str(exc)[:40]}...)"
        if theirs is None:
            sc1 = scw = scn = "Cholesky fails"
        else:
            sc1 = f"{rel(theirs[0], exact[0]):.1e}"
            scw = f"{max(rel(t, e) for t, e in zip(theirs, exact)):.1e}"
            scn = f"{rel(theirs[-1], exact[-1]):.1e}"
        print(
            f"| {name} | {'discrete' if discrete else 'continuous'} | {cond:.1e} | {exact[-1] / exact[0]:.1e} | "
            f"{rel(ours[0], exact[0]):.1e} / {sc1} | {max(rel(o, e) for o, e in zip(ours, exact)):.1e} / {scw} | "
            f"{rel(ours[-1], exact[-1]):.1e} / {scn} | {units:.2f} | {ours[0] <= hinf * (1 + 1e-12)} | {trunc} |"
        )


if __name__ == "__main__":
    main()

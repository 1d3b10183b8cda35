"""Accuracy survey of the modal form over spread poles (table for the README).

For each model the denominator's float coefficients are taken as exact; the reference is
their roots and residues at 80 digits (mpmath ``polyroots`` on the same floats). Printed
per model: the largest relative error of the realization's poles, of its residues
(B_k C_k per mode), of its DC gain ``D - C A^-1 B`` (evaluated exactly from the returned
floats), and, for comparison, the largest relative pole error of the eigenvalue route
(``numpy.roots``) on the same coefficients.

    python scripts/modal_accuracy_survey.py           # the README table
    python scripts/modal_accuracy_survey.py --quick   # three models (what the tests run)
"""

from __future__ import annotations

import sys

import mpmath as mp
import numpy as np

import statewright as sw

mp.mp.dps = 80


def reference(num, den):
    """Roots, residues and DC gain of num/den at 80 digits, the floats taken as exact."""
    den = [mp.mpf(float(x)) for x in den]
    num = [mp.mpf(float(x)) for x in num]
    lead = den[0]
    den = [x / lead for x in den]
    num = [x / lead for x in num]
    n = len(den) - 1
    num = [mp.mpf(0)] * (n + 1 - len(num)) + num
    d = num[0]
    strict = [num[i] - den[i] * d for i in range(1, n + 1)]
    roots = mp.polyroots(den, maxsteps=2000, extraprec=400)
    dden = [den[i] * (n - i) for i in range(n)]
    residues = [mp.polyval(strict, z) / mp.polyval(dden, z) for z in roots]
    dc = d + (strict[-1] / den[-1] if den[-1] != 0 else mp.inf)
    return roots, residues, dc


def modes(r):
    """(pole, residue) per mode of a modal realization (upper member of each pair)."""
    a, b, c = r.a, r.b[:, 0], r.c[0]
    out, i, n = [], 0, r.n_states
    while i < n:
        if i + 1 < n and a[i, i + 1] != 0.0:
            s, w = a[i, i], a[i, i + 1]
            b1, b2, c1, c2 = (mp.mpf(float(x)) for x in (b[i], b[i + 1], c[i], c[i + 1]))
            x = (c1 * b1 + c2 * b2) / 2
            y = -(c1 * b2 - c2 * b1) / 2
            out.append((mp.mpc(s, w), mp.mpc(x, y)))
            i += 2
        else:
            out.append((mp.mpf(float(a[i, i])), mp.mpf(float(b[i])) * mp.mpf(float(c[i]))))
            i += 1
    return out


def exact_dc(r):
    """D - C A^-1 B of the returned floats, at 80 digits."""
    a = mp.matrix([[mp.mpf(float(x)) for x in row] for row in r.a])
    b = mp.matrix([mp.mpf(float(x)) for x in r.b[:, 0]])
    c = mp.matrix([[mp.mpf(float(x)) for x in r.c[0]]])
    return mp.mpf(float(r.d[0, 0])) - (c * mp.lu_solve(a, b))[0]


def nearest(z, pool):
    return min(pool, key=lambda w: abs(w - z))


def survey_row(name, num, den):
    roots, residues, dc = reference(num, den)
    r = sw.realize(num, den, "modal")
    pole_err = res_err = 0.0
    for pole, res in modes(r):
        k = min(range(len(roots)), key=lambda j: abs(roots[j] - pole))
        pole_err = max(pole_err, float(abs(pole - roots[k]) / abs(roots[k])))
        res_err = max(res_err, float(abs(res - residues[k]) / abs(residues[k])))
    dc_err = float(abs(exact_dc(r) - dc) / abs(dc))
    eig = np.roots(np.asarray(den, dtype=float))
    eig_err = max(float(abs(mp.mpc(z) - nearest(mp.mpc(z), roots)) / abs(nearest(mp.mpc(z), roots))) for z in eig)
    return name, len(den) - 1, pole_err, res_err, dc_err, eig_err


def models(quick=False):
    out = [("s^2 + 1e8 s + 1", [1.0], [1.0, 1e8, 1.0])]
    for decades, n in ((4, 6), (8, 8), (8, 12), (12, 10), (16, 12)):
        poles = -np.logspace(0, -decades, n)
        out.append((f"{n} real poles over {decades} decades", [1.0], list(np.poly(poles))))
    for decades, pairs in ((6, 3), (10, 4)):
        mags = np.logspace(0, -decades, pairs)
        poles = np.concatenate([m * np.exp(1j * np.array([0.75 * np.pi, -0.75 * np.pi])) for m in mags])
        out.append((f"{pairs} complex pairs over {decades} decades", [1.0, 1.0], list(np.real(np.poly(poles)))))
    out.append(("poles 1, 2, ..., 10", [1.0], list(np.poly(np.arange(1.0, 11.0)))))
    rng = np.random.default_rng(20261203)
    poles = -(10.0 ** rng.uniform(-6, 2, 9))
    out.append(("9 random real poles in [1e-6, 1e2]", list(rng.normal(size=4)), list(np.poly(poles))))
    if quick:
        return [out[0], out[2], out[-2]]
    return out


def main(argv):
    rows = [survey_row(*m) for m in models("--quick" in argv)]
    print("| model | n | pole error | residue error | DC gain error | eigenvalue route pole error |")
    print("| --- | --- | --- | --- | --- | --- |")
    for name, n, pe, re, de, ee in rows:
        print(f"| {name} | {n} | {pe:.1e} | {re:.1e} | {de:.1e} | {ee:.1e} |")


if __name__ == "__main__":
    main(sys.argv[1:])

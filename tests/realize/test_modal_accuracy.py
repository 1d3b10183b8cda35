"""Modal form accuracy for spread poles, against mpmath roots and residues at 80 digits of
the same float coefficients; refusals name the real reason."""

import mpmath as mp
import numpy as np
import pytest

import statewright as sw

EPS = np.finfo(float).eps


def _reference(num, den):
    """(mpmath reference) roots, residues and DC gain of num/den, floats taken as exact."""
    with mp.workdps(80):
        den = [mp.mpf(float(x)) for x in den]
        num = [mp.mpf(float(x)) for x in num]
        den, num = [x / den[0] for x in den], [x / den[0] for x in num]
        n = len(den) - 1
        num = [mp.mpf(0)] * (n + 1 - len(num)) + num
        strict = [num[i] - den[i] * num[0] for i in range(1, n + 1)]
        roots = mp.polyroots(den, maxsteps=2000, extraprec=400)
        dden = [den[i] * (n - i) for i in range(n)]
        residues = [mp.polyval(strict, z) / mp.polyval(dden, z) for z in roots]
        dc = num[0] + strict[-1] / den[-1]
        return roots, residues, dc


def _modes(r):
    """(pole, residue) of each mode (upper member of a pair), at 80 digits from the floats."""
    a, b, c = r.a, r.b[:, 0], r.c[0]
    out, i = [], 0
    with mp.workdps(80):
        while i < r.n_states:
            if i + 1 < r.n_states and a[i, i + 1] != 0.0:
                b1, b2, c1, c2 = (mp.mpf(float(x)) for x in (b[i], b[i + 1], c[i], c[i + 1]))
                # (identity) C (sI - M)^-1 B = r/(s - p) + conj(r)/(s - conj(p)) for M = [[s, w], [-w, s]]
                res = mp.mpc((c1 * b1 + c2 * b2) / 2, -(c1 * b2 - c2 * b1) / 2)
                out.append((mp.mpc(a[i, i], a[i, i + 1]), res))
                i += 2
            else:
                out.append((mp.mpf(float(a[i, i])), mp.mpf(float(b[i])) * mp.mpf(float(c[i]))))
                i += 1
    return out


def _errors(num, den):
    roots, residues, dc = _reference(num, den)
    r = sw.realize(num, den, "modal")
    pole_err = res_err = 0.0
    with mp.workdps(80):
        for pole, res in _modes(r):
            k = min(range(len(roots)), key=lambda j: abs(roots[j] - pole))
            pole_err = max(pole_err, float(abs(pole - roots[k]) / abs(roots[k])))
            res_err = max(res_err, float(abs(res - residues[k]) / abs(residues[k])))
        a = mp.matrix([[mp.mpf(float(x)) for x in row] for row in r.a])
        b = mp.matrix([mp.mpf(float(x)) for x in r.b[:, 0]])
        c = mp.matrix([[mp.mpf(float(x)) for x in r.c[0]]])
        got_dc = mp.mpf(float(r.d[0, 0])) - (c * mp.lu_solve(a, b))[0]
        dc_err = float(abs(got_dc - dc) / abs(dc))
    return r, pole_err, res_err, dc_err


def test_stiff_quadratic_dc_gain_to_full_accuracy():
    # s^2 + 1e8 s + 1: DC gain exactly 1 (identity: c_0/a_0), slow pole -1e-8 (mpmath)
    r, pole_err, res_err, dc_err = _errors([1.0], [1.0, 1e8, 1.0])
    assert pole_err <= EPS and res_err <= 2 * EPS, (pole_err, res_err)
    dc = float((r.d - r.c @ np.linalg.solve(r.a, r.b))[0, 0])
    assert abs(dc - 1.0) <= 2 * EPS, dc
    assert dc_err <= 2 * EPS


@pytest.mark.parametrize(
    "poles",
    [
        -np.logspace(0, -8, 8),  # eight decades, real
        -np.logspace(0, -12, 10),  # twelve decades, real
        np.concatenate([m * np.exp(1j * np.array([0.75, -0.75]) * np.pi) for m in np.logspace(0, -6, 3)]),
    ],
    ids=["8-real-8-decades", "10-real-12-decades", "3-pairs-6-decades"],
)
def test_spread_poles_as_accurate_as_the_best_roots(poles):
    # (mpmath reference) poles within an ulp of the exact roots of the same float coefficients
    den = list(np.real(np.poly(poles)))
    r, pole_err, res_err, dc_err = _errors([1.0, 1.0], den)
    assert pole_err <= 1.5 * EPS, pole_err
    assert res_err <= 8 * EPS, res_err
    assert dc_err <= 64 * EPS, dc_err  # a sum of n residue terms: a few roundings each
    assert r.info["pole_error"] <= 2 * EPS


def test_well_separated_poles_are_not_refused():
    # poles 1, ..., 10: a Vandermonde basis of condition ~1e13, but the form is accurate
    den = list(np.poly(np.arange(1.0, 11.0)))
    r, pole_err, res_err, _ = _errors([1.0], den)
    assert pole_err <= 1.5 * EPS and res_err <= 1e-13  # residues conditioned by the cancellation in den
    # the basis condition exceeds the former refusal limit 1/(n sqrt(eps)): reported only
    assert r.info["eigenvector_condition"] > r.info["condition_limit"]


def test_large_gain_is_not_a_false_overflow():
    # 1e155 / ((s + 1)(s + 2)) = 1e155/(s + 1) - 1e155/(s + 2) (hand)
    r = sw.realize([1e155], [1.0, 3.0, 2.0], "modal")
    prod = r.b[:, 0] * r.c[0]
    np.testing.assert_allclose(prod, [-1e155, 1e155], rtol=2 * EPS)
    assert np.all(np.isfinite(r.b)) and np.all(np.isfinite(r.c))


def test_refusal_names_the_coincident_poles():
    # (identity) (s + 1)^2 (s + 4): the double pole is defective in any companion form
    with pytest.raises(sw.ModelError) as err:
        sw.realize([1.0], [1.0, 6.0, 9.0, 4.0], "modal")
    msg = str(err.value)
    assert "coincide" in msg and "-1.000000e0" in msg and "jordan" in msg
    assert "-4.000000e0" not in msg

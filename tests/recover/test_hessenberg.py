"""method="hessenberg": the orthogonal Hessenberg reduction and La Budde's recurrence.

References: the exact route of the same float data (``method="exact"``, correctly rounded,
itself checked against integer arithmetic in test_exact_fallback.py), identities of the
characteristic polynomial, scipy.signal.ss2tf for orientation (printed, not asserted).
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
import pytest

import statewright as sw

sys.path.insert(0, str(Path(__file__).resolve().parents[2] / "scripts"))
from hessenberg_survey import FAMILIES, compare, make_model  # noqa: E402

EPS = float(np.finfo(float).eps)


@pytest.mark.parametrize("family", FAMILIES)
def test_error_within_estimate_on_a_seeded_survey(family):
    # Reference: method="exact" (the exact transfer function of the float data, rounded once).
    rng = np.random.default_rng(1616)
    worst = []
    for n in (3, 8, 16):
        for _ in range(6):
            r = compare(*make_model(n, family, rng))
            assert r["ratio"] <= 1.0, (family, n, r)
            worst.append((n, r["ours"], r["scipy"], r["ratio"]))
    print(f"\n{family}: (n, worst rel. error hessenberg, SciPy ss2tf, error/estimate)")
    for row in worst:
        print("  %2d  %.1e  %.1e  %.2f" % row)


def test_mimo_within_estimate():
    # Reference: method="exact"; three inputs, two outputs, nonzero D.
    rng = np.random.default_rng(7)
    for n in (1, 2, 5, 9):
        a = rng.standard_normal((n, n))
        b, c, d = rng.standard_normal((n, 3)), rng.standard_normal((2, n)), rng.standard_normal((2, 3))
        ref_num, ref_den = sw.transfer_function(a, b, c, d, method="exact")
        num, den, acc = sw.transfer_function(a, b, c, d, method="hessenberg", return_accuracy=True)
        assert np.all(np.abs(num - ref_num) <= acc["num_error_estimate"] + EPS / 2 * np.abs(ref_num))
        assert np.all(np.abs(den - ref_den) <= acc["den_error_estimate"] + EPS / 2 * np.abs(ref_den))
        assert acc["method"].startswith("hessenberg")
        assert acc["relative_error_bound"] is None  # an estimate is not a bound


def test_characteristic_polynomial_of_a_triangular_matrix():
    # Identity: det(sI - A) of a triangular A is the product of (s - a_ii):
    # (s - 1)(s + 2)(s - 3)(s + 0.5) = s^4 - 1.5 s^3 - 6 s^2 + 3.5 s + 3 (Vieta: elementary
    # symmetric functions of the roots 1, -2, 3, -0.5).
    a = np.triu(np.arange(16.0).reshape(4, 4), 1) + np.diag([1.0, -2.0, 3.0, -0.5])
    coeffs = sw.characteristic_polynomial(a, method="hessenberg")
    np.testing.assert_allclose(coeffs, [1.0, -1.5, -6.0, 3.5, 3.0], rtol=1e-14, atol=1e-14)


def test_similarity_invariance():
    # Identity: det(sI - T^-1 A T) = det(sI - A); a companion matrix of known coefficients.
    coeffs = np.array([1.0, 0.5, -2.0, 3.0, 0.25])
    comp = np.diag(np.ones(3), 1)
    comp[-1] = -coeffs[:0:-1]
    t = np.random.default_rng(3).standard_normal((4, 4))
    a = np.linalg.solve(t, comp @ t)
    got = sw.characteristic_polynomial(a, method="hessenberg")
    ref = sw.characteristic_polynomial(a, method="exact")
    np.testing.assert_allclose(got, ref, rtol=1e-12, atol=1e-13)
    np.testing.assert_allclose(got, coeffs, rtol=1e-10, atol=1e-12)


def test_zero_order_and_refusals():
    num, den = sw.transfer_function(np.zeros((0, 0)), np.zeros((0, 1)), np.zeros((1, 0)), [[2.0]], method="hessenberg")
    assert den.tolist() == [1.0] and num.tolist() == [[[2.0]]]
    with pytest.raises(sw.ModelError, match="adjugates"):
        sw.faddeev_leverrier([[1.0, 2.0], [3.0, 4.0]], method="hessenberg")
    with pytest.raises(sw.ModelError, match="a"):
        sw.transfer_function([[np.nan]], [[1.0]], [[1.0]], [[0.0]], method="hessenberg")
    with pytest.raises(sw.ModelError, match="Hessenberg|range"):
        big = np.full((3, 3), 1e300)
        sw.transfer_function(big, np.ones((3, 1)), np.ones((1, 3)), [[0.0]], method="hessenberg")


def test_auto_keeps_its_promise_beside_hessenberg():
    # Reference: method="exact". "auto" stays correctly rounded (within 0.625 ulp) on a
    # spread model where the Hessenberg route is not.
    rng = np.random.default_rng(11)
    a, b, c, d = make_model(8, "spread", rng)
    ref_num, ref_den = sw.transfer_function(a, b, c, d, method="exact")
    num, den = sw.transfer_function(a, b, c, d)
    ulp = np.spacing(np.abs(ref_den))
    assert np.all(np.abs(den - ref_den) <= 0.625 * ulp)
    ulp_n = np.spacing(np.abs(ref_num))
    assert np.all(np.abs(num - ref_num) <= 0.625 * ulp_n)

"""The controllability and observability forms carry the Markov parameters of the float
data correctly rounded: bit-exact against Python Fractions (exact recurrence on the float
coefficients, rounded once by ``float(Fraction)``, which is correctly rounded)."""

from fractions import Fraction

import numpy as np
import pytest

import statewright as sw


def _markov_reference(num, den):
    """(Python Fractions) h_1..h_n of num/den from den * G = num, rounded once."""
    den = [Fraction(float(x)) for x in np.trim_zeros(np.asarray(den, dtype=float), "f")]
    n = len(den) - 1
    num = [Fraction(float(x)) for x in np.asarray(num, dtype=float)]
    num = [Fraction(0)] * (n + 1 - len(num)) + num
    h = [num[0] / den[0]]
    for j in range(1, n + 1):
        h.append((num[j] - sum(den[i] * h[j - i] for i in range(1, j + 1))) / den[0])
    return [float(x) for x in h[1:]]


def _cases():
    rng = np.random.default_rng(2026)
    out = []
    for n in (1, 2, 5, 12, 30, 45):
        poles = -rng.uniform(0.1, 10.0, n)
        out.append((rng.standard_normal(n), np.poly(poles), f"monic n={n}"))
        out.append((rng.standard_normal(n + 1), 3.7 * np.poly(poles), f"leading 3.7, proper, n={n}"))
    out.append(([1e-300, 2.0], [1.0, 1e-5, 1e-310], "tiny coefficients"))
    out.append(([3.0], [0.0, 0.1, 0.3], "leading zero in den"))
    return out


CASES = _cases()


@pytest.mark.parametrize("num, den, label", CASES, ids=[c[2] for c in CASES])
def test_markov_parameters_bit_exact(num, den, label):
    ref = _markov_reference(num, den)
    r = sw.realize(num, den, "controllability")
    assert [x.hex() for x in r.c[0]] == [x.hex() for x in ref]
    o = sw.realize(num, den, "observability")
    assert [x.hex() for x in o.b[:, 0]] == [x.hex() for x in ref]


def test_plain_float_recurrence_is_far_off_at_order_30():
    """The reason for the exact evaluation: the plain float recurrence (common practice)
    on the same data loses many digits by order 30."""
    rng = np.random.default_rng(30)
    den = np.poly(-rng.uniform(0.1, 10.0, 30))
    num = rng.standard_normal(30)
    ref = _markov_reference(num, den)
    h = []
    for j in range(1, 31):
        h.append(num[j - 1] - sum(den[i] * h[j - i - 1] for i in range(1, j)))
    worst_ulps = max(abs(x - y) / np.spacing(abs(y)) for x, y in zip(h, ref) if y != 0)
    assert worst_ulps > 1e3
    r = sw.realize(num, den, "controllability")
    assert np.array_equal(r.c[0], ref)


def test_batch_uses_the_same_rounding():
    num, den, _ = CASES[9]
    _, _, c, _ = sw.realize_batch(np.array([num]), np.array([den]), "controllability")
    assert np.array_equal(c[0, 0], _markov_reference(num, den))

"""Fuzz tests of transfer-function recovery, and no hang on huge exact data (contract in tests/fuzz_strategies.py)."""

import math  # noqa: F401
from fractions import Fraction  # noqa: F401

import numpy as np  # noqa: F401
import pytest  # noqa: F401
from hypothesis import given, reject, settings  # noqa: F401
from hypothesis import strategies as st  # noqa: F401

import statewright as sw  # noqa: F401
from fuzz_strategies import *  # noqa: F403
from fuzz_strategies import watchdog_output  # noqa: F401  (autouse fixture: the watchdog prints past capture)

# recovery
# --------------------------------------------------------------------------------------


@CI
@given(data=st.data(), exact=flag(), method=option(METHODS))
def test_faddeev_leverrier_and_characteristic_polynomial_float(data, exact, method):
    n = data.draw(ORDERS)
    a = data.draw(fuzz_float_arg((n, n)))
    if exact is True or (isinstance(exact, np.bool_) and exact):
        exact = False
    out = attempt(sw.faddeev_leverrier, a, exact=exact, method=method)
    if out is not FAILED:
        n = np.shape(a)[0]  # as accepted (a drawn "wrong" shape may be square too)
        coeffs, adj = out
        check_array(coeffs, (n + 1,))
        check_array(adj, (n, n, n))
        assert coeffs[0] == 1.0
    coeffs = attempt(sw.characteristic_polynomial, a, exact=exact, method=method)
    if coeffs is not FAILED:
        check_array(coeffs, (np.shape(a)[0] + 1,))


@CI_SLOW
@given(data=st.data())
def test_faddeev_leverrier_and_characteristic_polynomial_exact(data):
    n = data.draw(st.sampled_from([0, 1, 2, 3, 4, 5, 6, 8, 12]))
    a = data.draw(fuzz_exact_arg((n, n)))
    out = attempt(sw.faddeev_leverrier, a, exact=True)
    if out is not FAILED:
        n = np.shape(a)[0]  # as accepted
        coeffs, adj = out
        check_array(coeffs, (n + 1,), exact=True)
        check_array(adj, (n, n, n), exact=True)
        assert coeffs[0] == 1
    coeffs = attempt(sw.characteristic_polynomial, a, exact=True)
    if coeffs is not FAILED:
        check_array(coeffs, (np.shape(a)[0] + 1,), exact=True)


@CI
@given(model=float_model(), method=option(METHODS), accuracy=flag())
def test_transfer_function_float(model, method, accuracy):
    (a, b, c, d), _ = model
    out = attempt(sw.transfer_function, a, b, c, d, method=method, return_accuracy=accuracy)
    if out is FAILED:
        return
    n, m, p = model_dims(a, b, c)
    num, den = out[0], out[1]
    check_array(num, (p, m, n + 1))
    check_array(den, (n + 1,))
    if accuracy is True or (isinstance(accuracy, np.bool_) and accuracy):
        assert len(out) == 3 and out[2]["method"]
    else:
        assert len(out) == 2


@CI_SLOW
@given(model=exact_model(), accuracy=st.booleans())
def test_transfer_function_exact(model, accuracy):
    (a, b, c, d), _ = model
    out = attempt(sw.transfer_function, a, b, c, d, exact=True, return_accuracy=accuracy)
    if out is FAILED:
        return
    n, m, p = model_dims(a, b, c)
    check_array(out[0], (p, m, n + 1), exact=True)
    check_array(out[1], (n + 1,), exact=True)


@CI
@given(data=st.data())
def test_transfer_function_spread_eigenvalues_all_methods(data):
    """Valid, badly spread models (the exact fallback's territory): every method succeeds or
    says why (overflow), with finite results."""
    n = data.draw(st.integers(1, 12))
    decades = data.draw(st.floats(0, 12))
    rng = np.random.default_rng(data.draw(st.integers(0, 2**32 - 1)))
    t = rng.standard_normal((n, n)) + n * np.eye(n)
    poles = -(10.0 ** np.linspace(-decades / 2, decades / 2, n))
    a = t @ np.diag(poles) @ np.linalg.inv(t)
    b, c, d = rng.standard_normal((n, 2)), rng.standard_normal((1, n)), rng.standard_normal((1, 2))
    layout = data.draw(st.sampled_from(LAYOUTS))
    for method in METHODS:
        out = attempt(
            sw.transfer_function,
            lay_out(a.copy(), layout),
            b.copy(),
            c.copy(),
            d.copy(),
            method=method,
            return_accuracy=True,
        )
        if out is not FAILED:
            check_array(out[0], (1, 2, n + 1))
            check_array(out[1], (n + 1,))
    assert attempt(sw.transfer_function, a.copy(), b.copy(), c.copy(), d.copy()) is not FAILED


@CI
@given(data=st.data(), exact=st.booleans())
def test_controllability_and_observability_matrices(data, exact):
    n = data.draw(ORDERS if not exact else st.sampled_from([0, 1, 2, 3, 4, 6]))
    m = data.draw(WIDTHS)
    arg = fuzz_exact_arg if exact else fuzz_float_arg
    a, b = data.draw(arg((n, n))), data.draw(arg((n, m)))
    k = attempt(sw.controllability_matrix, a, b, exact=exact)
    if k is not FAILED:
        n, m = np.shape(b)  # as accepted (a drawn "wrong" shape may still fit)
        check_array(k, (n, n * m), exact=exact)
    a = data.draw(arg((n, n)))
    c = data.draw(arg((m, n)))
    o = attempt(sw.observability_matrix, a, c, exact=exact)
    if o is not FAILED:
        p, n = np.shape(c)
        check_array(o, (n * p, n), exact=exact)


# --------------------------------------------------------------------------------------
# no hang on huge exact data
# --------------------------------------------------------------------------------------

HUGE_EXACT_SCRIPT = """
import statewright as sw
try:
    sw.realize([10 ** 1000000], [1, 2], exact=True)
except sw.ModelError as exc:
    assert "internal error" not in str(exc)
"""


def run_within(script, seconds, what):
    """Run `script` in a fresh interpreter (so that a hang is cut off); fail if it takes
    more than `seconds` or exits with an error."""
    try:
        proc = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, timeout=seconds)
    except subprocess.TimeoutExpired:
        pytest.fail(f"{what} took more than {seconds} s")
    assert proc.returncode == 0, proc.stderr


def test_exact_huge_integer_finishes():
    """A one-state exact realization with a million-digit numerator (Python itself builds
    and prints such an int in well under a second) either succeeds or is refused with
    ModelError within 10 s: "no input, however bad, hangs". Run in a subprocess so that a
    hang is cut off."""
    run_within(HUGE_EXACT_SCRIPT, 10, "realize([10**1000000], [1, 2], exact=True)")


LARGE_EXACT_SCRIPT = """
import random
from fractions import Fraction
import statewright as sw
rng = random.Random(1)
a = [[Fraction(rng.getrandbits(4000) + 1, rng.getrandbits(4000) + 1) for _ in range(6)] for _ in range(6)]
try:
    sw.characteristic_polynomial(a, exact=True)
except sw.ModelError as exc:
    assert "internal error" not in str(exc)
"""


def test_exact_entries_within_the_size_limit_finish():
    """Exact entries just inside the per-entry size limit (4000-bit numerators and
    denominators, 36 of them): the characteristic polynomial of this 6 x 6 matrix either
    comes back or is refused with ModelError within 20 s."""
    run_within(LARGE_EXACT_SCRIPT, 20, "characteristic_polynomial(6 x 6 of 4000-bit fractions, exact=True)")

"""Canonical forms of `realize`: matrix patterns, D and the c_i rule, pure gains, zero
numerators, the modal ordering and block pattern, and frequency responses."""

from fractions import Fraction

import numpy as np
import pytest
import scipy.signal

import statewright as sw
from swtest_helpers import (
    ALL_FORMS,
    COMPANION_FORMS,
    EPS,
    expected_form,
    frac_array,
    normalized,
    state_space_value,
    to_float,
    transfer_function_value,
)

# Third-order examples (num, den), highest power first.
PROPER = ([4, 6, 2, 10], [2, 8, 4, 6])  # = (2s^3+3s^2+s+5)/(s^3+4s^2+2s+3) after /2
STRICT = ([1, -2, 7], [1, 4, 2, 3])
STRICT_NONMONIC = ([0.5, 3.0], [4.0, -2.0, 1.0, 8.0])  # degree 1 over degree 3
LEADING_ZEROS = ([0, 0, 4, 6, 2, 10], [0, 2, 8, 4, 6])  # same model as PROPER
CASES = {
    "proper": PROPER,
    "strict": STRICT,
    "strict_nonmonic": STRICT_NONMONIC,
    "leading_zeros": LEADING_ZEROS,
}

# Complex test points, away from every pole of the examples.
POINTS = [0.3 + 0.7j, -0.25 + 2.0j, 1.5 - 0.5j, 4.0 + 0.0j, 0.0 + 10.0j, -7.5 + 3.25j]


def _assert_close(actual, expected, rtol=4 * EPS, what=""):
    actual = np.asarray(actual, dtype=float)
    expected = to_float(expected)
    assert actual.shape == expected.shape, f"{what}: shape {actual.shape} != {expected.shape}"
    scale = max(1.0, float(np.max(np.abs(expected)))) if expected.size else 1.0
    np.testing.assert_allclose(actual, expected, rtol=rtol, atol=rtol * scale, err_msg=what)


def _assert_exact(actual, expected, what=""):
    assert actual.dtype == object, f"{what}: dtype {actual.dtype}, expected object"
    assert actual.shape == expected.shape, f"{what}: shape {actual.shape} != {expected.shape}"
    for idx in np.ndindex(actual.shape):
        assert isinstance(actual[idx], Fraction), f"{what}{idx}: {type(actual[idx])} is not Fraction"
        assert actual[idx] == expected[idx], f"{what}{idx}: {actual[idx]} != {expected[idx]}"


# --------------------------------------------------------------------------------------
# patterns
# --------------------------------------------------------------------------------------


def test_controllable_canonical_literal():
    # (identity) hand-worked: b = [2, 3, 1, 5], den monic [1, 4, 2, 3]; D = b_3 = 2,
    # c_i = b_i - a_i b_3: c_0 = 5 - 3*2 = -1, c_1 = 1 - 2*2 = -3, c_2 = 3 - 4*2 = -5.
    r = sw.realize(*PROPER)
    A, B, C, D = r
    np.testing.assert_array_equal(A, [[0, 1, 0], [0, 0, 1], [-3, -2, -4]])
    np.testing.assert_array_equal(B, [[0], [0], [1]])
    np.testing.assert_array_equal(C, [[-1, -3, -5]])
    np.testing.assert_array_equal(D, [[2]])


def test_controller_literal():
    # (identity) same model; controller form: first row [-a_2, -a_1, -a_0], C = [c_2, c_1, c_0].
    A, B, C, D = sw.realize(*PROPER, form="controller")
    np.testing.assert_array_equal(A, [[-4, -2, -3], [1, 0, 0], [0, 1, 0]])
    np.testing.assert_array_equal(B, [[1], [0], [0]])
    np.testing.assert_array_equal(C, [[-5, -3, -1]])
    np.testing.assert_array_equal(D, [[2]])


def test_controllability_literal():
    # (identity) strictly proper (s^2 - 2s + 7)/(s^3 + 4s^2 + 2s + 3): Markov parameters
    # h_1 = 1, h_2 = -2 - 4*1 = -6, h_3 = 7 - 4*(-6) - 2*1 = 29.
    A, B, C, D = sw.realize(*STRICT, form="controllability")
    np.testing.assert_array_equal(A, [[0, 0, -3], [1, 0, -2], [0, 1, -4]])
    np.testing.assert_array_equal(B, [[1], [0], [0]])
    np.testing.assert_array_equal(C, [[1, -6, 29]])
    np.testing.assert_array_equal(D, [[0]])


@pytest.mark.parametrize("case", sorted(CASES))
@pytest.mark.parametrize("form", COMPANION_FORMS)
def test_form_pattern_float(form, case):
    # (identity) expected matrices rebuilt from the API.md table in exact arithmetic
    num, den = CASES[case]
    r = sw.realize(num, den, form=form)
    eA, eB, eC, eD = expected_form(num, den, form)
    # Markov parameters accumulate a few roundings; everything else is a single rounding or two.
    rtol = 64 * EPS if form in ("controllability", "observability") else 4 * EPS
    _assert_close(r.a, eA, rtol, f"{form}/{case} A")
    _assert_close(r.b, eB, rtol, f"{form}/{case} B")
    _assert_close(r.c, eC, rtol, f"{form}/{case} C")
    _assert_close(r.d, eD, rtol, f"{form}/{case} D")
    assert r.n_states == 3 and r.n_inputs == 1 and r.n_outputs == 1


EXACT_CASES = {
    "proper": PROPER,
    "strict": STRICT,
    "leading_zeros": LEADING_ZEROS,
    "rational": (["1/3", 2, "0.25", Fraction(-5, 7)], [3, "0.5", 1, "-7/2"]),
    "strict_rational": (["0.1", "-1/9"], [Fraction(2, 3), 0, "1.5", 4]),
}


@pytest.mark.parametrize("case", sorted(EXACT_CASES))
@pytest.mark.parametrize("form", COMPANION_FORMS)
def test_form_pattern_exact(form, case):
    # (identity) exact rational arithmetic: the API.md table entry by entry, as Fractions
    num, den = EXACT_CASES[case]
    r = sw.realize(num, den, form=form, exact=True)
    eA, eB, eC, eD = expected_form(num, den, form)
    _assert_exact(r.a, eA, f"{form}/{case} A")
    _assert_exact(r.b, eB, f"{form}/{case} B")
    _assert_exact(r.c, eC, f"{form}/{case} C")
    _assert_exact(r.d, eD, f"{form}/{case} D")


def test_c_rule_and_direct_term_exact():
    # (identity) D = b_n and c_i = b_i - a_i b_n, non-monic denominator, checked literally
    num = [6, 0, "1/2", -3]
    den = [3, 3, 0, "3/2"]  # monic: [1, 1, 0, 1/2]; b = [2, 0, 1/6, -1]
    A, B, C, D = sw.realize(num, den, exact=True)
    assert D[0, 0] == Fraction(2)
    # c_0 = -1 - (1/2)*2 = -2, c_1 = 1/6 - 0*2 = 1/6, c_2 = 0 - 1*2 = -2
    assert list(C[0]) == [Fraction(-2), Fraction(1, 6), Fraction(-2)]
    assert list(A[2]) == [Fraction(-1, 2), Fraction(0), Fraction(-1)]


def test_leading_zeros_stripped():
    # (identity) leading zeros of num and den change nothing
    for form in ALL_FORMS:
        r1 = sw.realize(*PROPER, form=form)
        r2 = sw.realize(*LEADING_ZEROS, form=form)
        for x, y in zip(r1, r2):
            np.testing.assert_array_equal(x, y)


# --------------------------------------------------------------------------------------
# controller form against scipy
# --------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    "num,den",
    [
        PROPER,
        STRICT,
        STRICT_NONMONIC,
        ([1.0], [1.0, 0.2, 3.0]),
        ([2.5, -1.0, 0.0, 4.0, 1.0], [1.5, 2.0, -3.0, 0.5, 7.0]),
        ([1e-3, 2.0, 1e3], [1.0, 1e2, 1e-1, 10.0]),
    ],
)
def test_controller_matches_scipy_tf2ss(num, den):
    # (scipy.signal reference) scipy's SISO realization is the controller form
    A, B, C, D = sw.realize(num, den, form="controller")
    sA, sB, sC, sD = scipy.signal.tf2ss(num, den)
    for name, x, y in (("A", A, sA), ("B", B, sB), ("C", C, sC), ("D", D, sD)):
        y = np.atleast_2d(y)
        assert x.shape == y.shape, name
        scale = max(1.0, float(np.max(np.abs(y))))
        np.testing.assert_allclose(x, y, rtol=8 * EPS, atol=8 * EPS * scale, err_msg=name)


# --------------------------------------------------------------------------------------
# pure gains and zero numerators
# --------------------------------------------------------------------------------------


@pytest.mark.parametrize("form", ALL_FORMS)
@pytest.mark.parametrize("num,den", [([3.0], [2.0]), ([0, 3], [0, 0, 2]), ([-7], [0.5])])
def test_pure_gain(form, num, den):
    # (identity) zero-order denominator: 0 states, D = gain
    r = sw.realize(num, den, form=form)
    gain = float(np.trim_zeros(np.asarray(num, float), "f")[0] / np.trim_zeros(np.asarray(den, float), "f")[0])
    assert r.n_states == 0
    assert r.a.shape == (0, 0)
    assert r.b.shape == (0, 1)
    assert r.c.shape == (1, 0)
    assert r.d.shape == (1, 1)
    assert r.d[0, 0] == gain
    assert r.n_inputs == 1 and r.n_outputs == 1
    np.testing.assert_allclose(r.evaluate(1.0 + 2.0j), [[gain]], rtol=0, atol=0)


@pytest.mark.parametrize("form", COMPANION_FORMS)
def test_pure_gain_exact(form):
    # (identity)
    r = sw.realize(["3"], [2], form=form, exact=True)
    assert r.n_states == 0
    assert r.d.shape == (1, 1)
    assert r.d[0, 0] == Fraction(3, 2) and isinstance(r.d[0, 0], Fraction)


CARRIER = {
    "controllable_canonical": "c",
    "controller": "c",
    "controllability": "c",
    "observable_canonical": "b",
    "observer": "b",
    "observability": "b",
}


@pytest.mark.parametrize("num", [[0], [0.0, 0.0, 0.0], [0, 0, 0, 0]])
@pytest.mark.parametrize("form", COMPANION_FORMS)
def test_zero_numerator(form, num):
    # (identity) zero numerator is valid: the form of the denominator, carrier vector zero, D = 0
    den = [2.0, 8.0, 4.0, 6.0]
    r = sw.realize(num, den, form=form)
    eA, eB, eC, _ = expected_form([0], den, form)
    np.testing.assert_allclose(r.a, to_float(eA), rtol=4 * EPS)
    np.testing.assert_array_equal(getattr(r, CARRIER[form]), np.zeros((3, 1) if CARRIER[form] == "b" else (1, 3)))
    other = "b" if CARRIER[form] == "c" else "c"
    expected_other = eB if other == "b" else eC
    np.testing.assert_array_equal(getattr(r, other), to_float(expected_other))
    np.testing.assert_array_equal(r.d, [[0.0]])
    np.testing.assert_array_equal(r.evaluate(0.5 + 1j), [[0.0]])


def test_zero_numerator_modal():
    # (identity) API.md: in the modal form both B and C are zero for a zero numerator
    den = np.poly([-1.0, -2.0, -3.0])
    r = sw.realize([0.0], den, form="modal")
    np.testing.assert_allclose(np.diag(r.a), [-3.0, -2.0, -1.0], rtol=1e-12)
    np.testing.assert_array_equal(r.c, np.zeros((1, 3)))
    np.testing.assert_array_equal(r.b, np.zeros((3, 1)))
    np.testing.assert_array_equal(r.d, [[0.0]])


@pytest.mark.parametrize("form", COMPANION_FORMS)
def test_zero_numerator_exact(form):
    # (identity)
    den = [2, "1/3", 4, 6]
    r = sw.realize([0, 0], den, form=form, exact=True)
    eA, eB, eC, eD = expected_form([0], den, form)
    _assert_exact(r.a, eA, "A")
    _assert_exact(r.b, eB, "B")
    _assert_exact(r.c, eC, "C")
    _assert_exact(r.d, eD, "D")


# --------------------------------------------------------------------------------------
# modal form
# --------------------------------------------------------------------------------------


def _block_structure(A, tol):
    """Parse a real block-diagonal A into [(s, w)] with w = 0 for 1x1 blocks; asserts the
    [[s, w], [-w, s]] pattern (w > 0) and zeros outside the blocks."""
    n = A.shape[0]
    blocks = []
    covered = np.zeros_like(A, dtype=bool)
    i = 0
    while i < n:
        if i + 1 < n and A[i, i + 1] != 0.0:
            s, w = A[i, i], A[i, i + 1]
            assert w > 0, f"block at {i}: w = {w} must be > 0"
            assert A[i + 1, i] == -w, f"block at {i}: lower-left {A[i + 1, i]} != -w = {-w}"
            assert A[i + 1, i + 1] == s, f"block at {i}: diagonal {A[i + 1, i + 1]} != {s}"
            blocks.append((s, w))
            covered[i : i + 2, i : i + 2] = True
            i += 2
        else:
            blocks.append((A[i, i], 0.0))
            covered[i, i] = True
            i += 1
    assert np.all(A[~covered] == 0.0), "nonzero entries outside the diagonal blocks"
    return blocks


def test_modal_order_and_blocks():
    # (identity) poles with distinct real parts, mixed real and complex
    poles = [-0.5, -2.0 + 3.0j, -2.0 - 3.0j, 1.0, -4.0, -1.0 + 0.5j, -1.0 - 0.5j, 0.25 + 2.0j, 0.25 - 2.0j]
    den = np.real(np.poly(poles))
    num = [1.0, -2.0, 0.5, 3.0, 0.0, 1.0, 2.0, -1.0]
    r = sw.realize(num, den, form="modal")
    blocks = _block_structure(r.a, 0.0)
    expected = [(-4.0, 0.0), (-2.0, 3.0), (-1.0, 0.5), (-0.5, 0.0), (0.25, 2.0), (1.0, 0.0)]
    assert len(blocks) == len(expected)
    for (s, w), (es, ew) in zip(blocks, expected):
        assert abs(s - es) < 1e-9 and abs(w - ew) < 1e-9, (blocks, expected)
    assert "eigenvector_condition" in r.info and "condition_limit" in r.info
    assert r.info["eigenvector_condition"] <= r.info["condition_limit"]
    for s in POINTS:
        np.testing.assert_allclose(r.evaluate(s)[0, 0], transfer_function_value(num, den, s), rtol=1e-10)


def test_modal_ties_by_frequency():
    # (identity) equal real parts: real pole first (w = 0), then ascending w
    poles = [-1.0 + 2.0j, -1.0 - 2.0j, -1.0, -1.0 + 0.5j, -1.0 - 0.5j, -3.0]
    den = np.real(np.poly(poles))
    r = sw.realize([1.0, 1.0], den, form="modal")
    blocks = _block_structure(r.a, 0.0)
    expected = [(-3.0, 0.0), (-1.0, 0.0), (-1.0, 0.5), (-1.0, 2.0)]
    assert len(blocks) == len(expected), blocks
    for (s, w), (es, ew) in zip(blocks, expected):
        assert abs(s - es) < 1e-9 and abs(w - ew) < 1e-9, (blocks, expected)


def test_modal_three_real_poles():
    # (identity) 1/((s+1)(s+2)(s+3)): A = diag(-3, -2, -1); residues 1/2, -1, 1/2 as C_i B_i
    r = sw.realize([1.0], [1.0, 6.0, 11.0, 6.0], form="modal")
    np.testing.assert_allclose(r.a, np.diag([-3.0, -2.0, -1.0]), atol=1e-13)
    np.testing.assert_allclose(r.c[0] * r.b[:, 0], [0.5, -1.0, 0.5], rtol=1e-12)


@pytest.mark.parametrize(
    "den",
    [
        [1.0, 4.0, 5.0, 2.0],  # (s+1)^2 (s+2)
        [1.0, 2.0, 1.0],  # (s+1)^2
        list(np.real(np.poly([-1 + 2j, -1 - 2j, -1 + 2j, -1 - 2j]))),  # double complex pair
        [1.0, 0.0, 0.0],  # s^2
    ],
)
def test_modal_refuses_defective(den):
    # (identity) a repeated pole of a companion matrix is defective: no modal form
    with pytest.raises(sw.ModelError) as err:
        sw.realize([1.0], den, form="modal")
    assert "modal form does not exist" in str(err.value)


def test_modal_refused_in_exact_mode():
    with pytest.raises(sw.ModelError) as err:
        sw.realize([1], [1, 3, 2], form="modal", exact=True)
    assert "form" in str(err.value) or "modal" in str(err.value)


# --------------------------------------------------------------------------------------
# frequency responses
# --------------------------------------------------------------------------------------


@pytest.mark.parametrize("case", sorted(CASES))
@pytest.mark.parametrize("form", ALL_FORMS)
def test_frequency_response_every_form(form, case):
    # (identity) r.evaluate(s) = num(s)/den(s) at several complex points
    num, den = CASES[case]
    r = sw.realize(num, den, form=form)
    for s in POINTS:
        got = r.evaluate(s)
        assert got.shape == (1, 1)
        want = transfer_function_value(num, den, s)
        np.testing.assert_allclose(got[0, 0], want, rtol=1e-11, err_msg=f"{form}/{case} at s={s}")
        # and the matrices themselves, through an independent dense solve
        np.testing.assert_allclose(state_space_value(r.a, r.b, r.c, r.d, s)[0, 0], want, rtol=1e-11)
    vec = r.evaluate(np.array(POINTS))
    assert vec.shape == (len(POINTS), 1, 1)
    np.testing.assert_allclose(vec[:, 0, 0], [transfer_function_value(num, den, s) for s in POINTS], rtol=1e-11)


@pytest.mark.parametrize("form", COMPANION_FORMS)
def test_frequency_response_exact_realization(form):
    # (identity) an exact realization evaluates like its float counterpart
    num, den = EXACT_CASES["rational"]
    r = sw.realize(num, den, form=form, exact=True)
    b, d = normalized(num, den)
    for s in POINTS:
        np.testing.assert_allclose(r.evaluate(s)[0, 0], transfer_function_value(b, d, s), rtol=1e-12)


def test_frequency_response_higher_order_all_forms():
    # (identity) 7th order, mixed poles, proper with a nonzero direct term
    rng = np.random.default_rng(7)
    poles = [-0.3, -1.2 + 0.8j, -1.2 - 0.8j, 0.4 + 1.5j, 0.4 - 1.5j, -2.0, 0.9]
    den = 1.7 * np.real(np.poly(poles))
    num = rng.standard_normal(8)
    for form in ALL_FORMS:
        r = sw.realize(num, den, form=form)
        for s in POINTS:
            np.testing.assert_allclose(
                r.evaluate(s)[0, 0], transfer_function_value(num, den, s), rtol=1e-10, err_msg=form
            )


def test_exact_inputs_as_fraction_strings_give_fractions():
    # (identity) decimal strings are exact: 0.1 is 1/10, not the binary float
    r = sw.realize(["0.1"], [1, "0.3"], exact=True)
    assert r.a[0, 0] == Fraction(-3, 10)
    assert r.c[0, 0] == Fraction(1, 10)
    expected = frac_array([[Fraction(1)]])
    _assert_exact(r.b, expected, "B")

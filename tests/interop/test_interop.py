"""Interop with sympy and scipy.signal: Realization.to_sympy / to_scipy, realize_expression,
from_scipy. References: sympy's exact rational arithmetic (the transfer function
C (sI - A)^-1 B + D rebuilt symbolically and cancelled against the input expression),
scipy.signal's own frequency responses, and identities (data passed through unchanged)."""

import subprocess
import sys
from fractions import Fraction

import numpy as np
import pytest

import statewright as sw
from swtest_helpers import ALL_FORMS, COMPANION_FORMS, names_argument

sympy = pytest.importorskip("sympy")
signal = pytest.importorskip("scipy.signal")

# scipy warns when converting a state-space model whose numerator has (near-)zero leading
# coefficients, as every strictly proper model does; the values compared are unaffected
pytestmark = pytest.mark.filterwarnings("ignore:Badly conditioned filter coefficients")

s, z, k = sympy.symbols("s z k")
R = sympy.Rational

# (expression, symbol): invented plant and compensator models, continuous and discrete
EXPRESSIONS = [
    ((s + 3) / (s**2 + 3 * s + 2), s),  # strictly proper
    ((R(5, 2) * s + 10) / (s + 20), s),  # lead compensator: D != 0
    (1 / (s + 1) + 2 / (s + R(1, 3)), s),  # a sum, brought together
    ((s**2 + s / 7 + 3) / (4 * s**3 + s**2 + R(9, 10) * s + 2), s),  # leading coefficient 4
    ((3 * s**2 - 1) / (2 * s**2 + s + 5), s),  # biproper
    (R(-7, 3) / (s**4 + 2 * s**3 + 3 * s**2 + 4 * s + 5), s),  # order 4, constant numerator
    (1 / (1 - z**-1 / 2), z),  # discrete, in powers of 1/z
    ((z - R(1, 4)) / ((z - R(1, 2)) * (z + R(1, 3))), z),  # discrete, factored
    (R(3, 4), s),  # pure gain: 0 states
    (sympy.Integer(0), s),  # zero
]


def sympy_transfer(A, B, C, D, x):
    """C (xI - A)^-1 B + D in sympy's exact arithmetic (a 1x1 or p x m Matrix)."""
    n = A.shape[0]
    if n == 0:
        return D
    return C * (x * sympy.eye(n) - A).LUsolve(B) + D


def all_rational(*matrices):
    return all(isinstance(e, sympy.Rational) for m in matrices for e in m)


# --------------------------------------------------------------------------------------
# sympy -> statewright -> sympy
# --------------------------------------------------------------------------------------


@pytest.mark.parametrize("form", COMPANION_FORMS)
@pytest.mark.parametrize("case", range(len(EXPRESSIONS)))
def test_expression_round_trip_exact(case, form):
    expr, x = EXPRESSIONS[case]
    r = sw.realize_expression(expr, x, form)
    assert r.exact
    A, B, C, D = r.to_sympy()
    assert all_rational(A, B, C, D)  # exact in, exact out: no Floats anywhere
    assert (A.shape, B.shape, C.shape, D.shape) == tuple(m.shape for m in r)
    G = sympy_transfer(A, B, C, D, x)
    assert G.shape == (1, 1)
    assert sympy.cancel(G[0, 0] - expr) == 0  # (sympy exact)
    # the order is the degree of the denominator as sympy writes it
    den = sympy.fraction(sympy.together(expr))[1]
    assert r.n_states == sympy.Poly(den, x).degree()  # (sympy exact)


def test_expression_matches_realize_on_coefficients():
    # (s + 3) / (2 s^2 + 6 s + 4): the coefficients are [1, 3] and [2, 6, 4]
    for form in COMPANION_FORMS:
        got = sw.realize_expression((s + 3) / (2 * s**2 + 6 * s + 4), s, form)
        want = sw.realize([1, 3], [2, 6, 4], form, exact=True)
        assert got == want  # (identity: realize of the coefficients)


def test_to_sympy_keeps_fractions_exactly():
    r = sw.realize(["1/3", "0.7"], ["2", "1/9", "5"], exact=True)
    for m, sm in zip(r, r.to_sympy()):
        assert sm.shape == m.shape
        for i in range(m.shape[0]):
            for j in range(m.shape[1]):
                f = m[i, j]
                assert sm[i, j] == R(f.numerator, f.denominator)  # (identity)


def test_to_sympy_of_float_data_is_the_exact_binary_value():
    r = sw.realize([0.1, 0.3], [1.0, 0.7, 0.12], "observable_canonical")
    mats = r.to_sympy()
    assert all_rational(*mats)
    for m, sm in zip(r, mats):
        for i in range(m.shape[0]):
            for j in range(m.shape[1]):
                e = sm[i, j]
                assert Fraction(int(e.p), int(e.q)) == Fraction(float(m[i, j]))  # (identity: dyadic value)
                assert float(e) == m[i, j]  # (identity)
    # and the symbolic transfer function of those exact values is what the floats evaluate to
    G = sympy_transfer(*mats, s)[0, 0]
    for point in (0.5j, 1 + 2j, -2.0):  # (s = -3 is the zero)
        want = complex(G.subs(s, sympy.nsimplify(point)).evalf(30))  # (sympy exact)
        np.testing.assert_allclose(r.evaluate(point)[0, 0], want, rtol=1e-14)


def test_to_sympy_zero_states_and_mimo_shapes():
    r = sw.Realization(np.zeros((0, 0)), np.zeros((0, 3)), np.zeros((2, 0)), np.arange(6.0).reshape(2, 3))
    A, B, C, D = r.to_sympy()
    assert (A.shape, B.shape, C.shape, D.shape) == ((0, 0), (0, 3), (2, 0), (2, 3))
    assert D == sympy.Matrix([[0, 1, 2], [3, 4, 5]])  # (identity)


def test_pair_of_polys_is_taken_as_given():
    # (s + 1) / ((s + 1)(s + 2)): sympy cancels the expression, the pair keeps both factors
    num, den = sympy.Poly(s + 1, s), sympy.Poly((s + 1) * (s + 2), s)
    r = sw.realize_expression((num, den), s, "controller")
    assert r.n_states == 2
    G = sympy_transfer(*r.to_sympy(), s)[0, 0]
    assert sympy.cancel(G - 1 / (s + 2)) == 0  # (sympy exact)
    assert sw.realize_expression((s + 1) / ((s + 1) * (s + 2)), s).n_states == 1
    # plain polynomial expressions in a pair work the same
    r2 = sw.realize_expression((s + 1, s**2 + 3 * s + 2), s, "controller")
    assert r2 == r  # (identity)


def test_float_mode_evaluates_coefficients():
    expr = (sympy.pi * s + sympy.sqrt(2)) / (s**2 + sympy.Float("0.4") * s + 3)
    for form in ALL_FORMS:
        r = sw.realize_expression(expr, s, form, exact=False)
        assert not r.exact and r.a.dtype == np.float64
        for point in (0.3j, 2 - 1j, 5.0):
            want = complex(expr.subs(s, sympy.nsimplify(point)).evalf(30))  # (sympy, 30 digits)
            np.testing.assert_allclose(r.evaluate(point)[0, 0], want, rtol=1e-13)


def test_exact_is_the_default():
    r = sw.realize_expression(1 / (s + R(1, 3)), s)
    assert r.exact and r.a[0, 0] == Fraction(-1, 3)  # (identity)


@pytest.mark.parametrize(
    "expr, symbol, kwargs, name",
    [
        (sympy.exp(-s) / (s + 1), s, {}, "expr"),  # a delay
        (sympy.sqrt(s) / (s + 1), s, {}, "expr"),  # a root
        (1 / (sympy.Abs(s) + 1), s, {}, "expr"),
        (k / (s + 1), s, {"exact": False}, "expr"),  # another free symbol in float (parameters are exact only)
        (s**2 / (s + 1), s, {}, "expr"),  # improper
        (s**3 + 1, s, {}, "expr"),  # a polynomial is improper too
        ("1/(s + 1)", s, {}, "expr"),  # strings are not parsed
        (1.5, s, {}, "expr"),
        (None, s, {}, "expr"),
        (sympy.Matrix([[1 / (s + 1)]]), s, {}, "expr"),  # a transfer matrix
        (sympy.Eq(s, 1), s, {}, "expr"),
        (sympy.zoo, s, {}, "expr"),
        (sympy.nan, s, {}, "expr"),
        (sympy.Float("0.5") * s / (s + 1), s, {}, "expr"),  # a Float in exact mode
        (sympy.pi / (s + 1), s, {}, "expr"),  # irrational in exact mode
        (sympy.I / (s + 1), s, {"exact": False}, "expr"),  # complex coefficient
        (sympy.Float("1e400") / (s + 1), s, {"exact": False}, "expr"),  # beyond float64
        ((s + 1, s, s), s, {}, "expr"),  # a pair has two entries
        ((sympy.Poly(1, s), sympy.Poly(0, s)), s, {}, "expr"),  # zero denominator
        ((1 / s, s + 1), s, {}, "expr"),  # not a polynomial
        ((sympy.Poly(k + 1, k), s + 1), s, {"exact": False}, "expr"),  # another symbol in float
        ((s + 1, 2.0), s, {}, "expr"),
        (1 / (s + 1), "s", {}, "symbol"),
        (1 / (s + 1), s + 1, {}, "symbol"),
        (1 / (s + 1), None, {}, "symbol"),
        (1 / (s + 1), s, {"form": "bogus"}, "form"),
        (1 / (s + 1), s, {"form": "modal"}, "form"),  # modal needs exact=False
        (1 / (s + 1), s, {"exact": "yes"}, "exact"),
    ],
)
def test_realize_expression_bad_input(expr, symbol, kwargs, name):
    with pytest.raises(sw.ModelError) as info:
        sw.realize_expression(expr, symbol, **kwargs)
    assert names_argument(str(info.value), name), str(info.value)  # (API contract: names the argument)


def test_bad_expression_messages_say_what_is_wrong():
    with pytest.raises(sw.ModelError, match="k"):  # parameters are offered in exact mode only
        sw.realize_expression(k / (s + 1), s, exact=False)
    with pytest.raises(sw.ModelError, match="improper"):
        sw.realize_expression(s**2 / (s + 1), s)
    with pytest.raises(sw.ModelError, match="rational function"):
        sw.realize_expression(sympy.exp(-s) / (s + 1), s)


# --------------------------------------------------------------------------------------
# scipy.signal -> statewright -> scipy.signal
# --------------------------------------------------------------------------------------

W = np.array([0.01, 0.3, 1.0, 2.5, 40.0])  # rad/s
W_DISCRETE = np.array([0.05, 0.4, 1.3, 2.9])  # rad/sample


def _mimo_state_space(seed=7, n=4, m=2, p=3, dt=None):
    rng = np.random.default_rng(seed)
    a = rng.standard_normal((n, n)) - 3.0 * np.eye(n)
    mats = (a, rng.standard_normal((n, m)), rng.standard_normal((p, n)), rng.standard_normal((p, m)))
    return signal.StateSpace(*mats) if dt is None else signal.StateSpace(*mats, dt=dt)


def _channel_response(system, i, j, discrete=False):
    """scipy.signal's frequency response of the (i, j) channel of a state-space system."""
    ss = signal.StateSpace(
        system.A,
        system.B[:, [j]],
        system.C[[i], :],
        system.D[i : i + 1, j : j + 1],
        **({"dt": system.dt} if discrete else {}),
    )
    if discrete:
        return signal.dfreqresp(ss, W_DISCRETE)[1]
    return signal.freqresp(ss, W)[1]


def test_state_space_passes_through_unchanged():
    ss = _mimo_state_space()
    r = sw.from_scipy(ss)
    for mine, theirs in zip(r, (ss.A, ss.B, ss.C, ss.D)):
        assert mine.dtype == np.float64 and mine.flags.c_contiguous
        np.testing.assert_array_equal(mine, theirs)  # (identity)
    back = r.to_scipy()
    assert isinstance(back, signal.StateSpace) and back.dt is None
    for mine, theirs in zip((back.A, back.B, back.C, back.D), (ss.A, ss.B, ss.C, ss.D)):
        np.testing.assert_array_equal(mine, theirs)  # (identity)
    assert "sample_time" not in r.info


def test_state_space_results_do_not_alias():
    ss = _mimo_state_space()
    r = sw.from_scipy(ss)
    ss.A[0, 0] += 1.0
    assert r.a[0, 0] != ss.A[0, 0]
    back = r.to_scipy()
    back.A[0, 0] += 1.0  # writable, and the realization is untouched
    assert r.a[0, 0] != back.A[0, 0]


def test_mimo_state_space_frequency_response():
    ss = _mimo_state_space(seed=11, n=5, m=2, p=3)
    r = sw.from_scipy(ss)
    back = r.to_scipy()
    values = r.evaluate(1j * W)
    for i in range(3):
        for j in range(2):
            want = _channel_response(ss, i, j)  # (scipy.signal reference)
            np.testing.assert_allclose(_channel_response(back, i, j), want, rtol=1e-13, atol=0)
            np.testing.assert_allclose(values[:, i, j], want, rtol=1e-12)


@pytest.mark.parametrize("form", ALL_FORMS)
def test_transfer_function_round_trip(form):
    tf = signal.TransferFunction([2.0, 1.0, 8.0], [1.0, 3.0, 6.5, 5.0])  # a plant with a lightly damped pair
    r = sw.from_scipy(tf, form)
    want = signal.freqresp(tf, W)[1]  # (scipy.signal reference)
    np.testing.assert_allclose(r.evaluate(1j * W)[:, 0, 0], want, rtol=1e-12)
    np.testing.assert_allclose(signal.freqresp(r.to_scipy(), W)[1], want, rtol=1e-12)
    assert r == sw.realize([2.0, 1.0, 8.0], [1.0, 3.0, 6.5, 5.0], form)  # (identity: realize)


def test_lti_constructor_objects_are_accepted():
    r = sw.from_scipy(signal.lti([4.0], [1.0, 0.5]))
    np.testing.assert_allclose(
        r.evaluate(1j * W)[:, 0, 0], signal.freqresp(signal.lti([4.0], [1.0, 0.5]), W)[1], rtol=1e-14
    )  # (scipy.signal reference)
    r2 = sw.from_scipy(signal.lti(np.array([[-1.0]]), np.array([[1.0]]), np.array([[2.0]]), np.array([[0.0]])))
    assert r2.n_states == 1 and r2.c[0, 0] == 2.0  # (identity)


def test_pure_gain_has_no_states():
    r = sw.from_scipy(signal.TransferFunction([2.5], [1.0]))
    assert r.n_states == 0 and r.d[0, 0] == 2.5  # (identity)
    back = r.to_scipy()
    assert back.A.shape == (0, 0) and back.B.shape == (0, 1) and back.C.shape == (1, 0)
    np.testing.assert_allclose(signal.freqresp(back, W)[1], 2.5)  # (scipy.signal reference)


@pytest.mark.parametrize("form", ["controllable_canonical", "controller", "controllability"])
def test_single_input_several_outputs(form):
    # two outputs (position and speed of an invented drive) over one denominator
    num = np.array([[0.0, 0.0, 5.0], [0.0, 5.0, 0.0]])
    den = np.array([1.0, 1.2, 9.0])
    tf = signal.TransferFunction(num, den)
    r = sw.from_scipy(tf, form)
    assert (r.n_states, r.n_inputs, r.n_outputs) == (2, 1, 2)
    values = r.evaluate(1j * W)
    for i in range(2):
        want = signal.freqresp(signal.TransferFunction(num[i], den), W)[1]  # (scipy.signal reference)
        np.testing.assert_allclose(values[:, i, 0], want, rtol=1e-13)


def test_several_outputs_refuse_forms_that_put_the_numerator_in_b():
    tf = signal.TransferFunction([[1.0, 2.0], [0.0, 1.0]], [1.0, 3.0, 2.0])
    for form in ("observable_canonical", "observer", "observability", "modal"):
        with pytest.raises(sw.ModelError) as info:
            sw.from_scipy(tf, form)
        assert names_argument(str(info.value), "form")  # (API contract)


def test_zeros_poles_gain():
    zeros_poles_gain = signal.ZerosPolesGain([-1.0], [-0.5 + 2.0j, -0.5 - 2.0j, -3.0], 4.0)
    for form in ALL_FORMS:
        r = sw.from_scipy(zeros_poles_gain, form)
        want = signal.freqresp(zeros_poles_gain, W)[1]  # (scipy.signal reference)
        np.testing.assert_allclose(r.evaluate(1j * W)[:, 0, 0], want, rtol=1e-12)
    modal = sw.from_scipy(zeros_poles_gain, "modal")
    np.testing.assert_allclose(
        modal.poles(), np.sort_complex(zeros_poles_gain.poles), rtol=1e-13
    )  # (scipy.signal reference)


def test_zeros_poles_gain_not_in_conjugate_pairs_is_refused():
    zeros_poles_gain = signal.ZerosPolesGain([], [-1.0 + 2.0j, -2.0 - 2.0j], 1.0)
    with pytest.raises(sw.ModelError) as info:
        sw.from_scipy(zeros_poles_gain)
    assert names_argument(str(info.value), "system") and "conjugate" in str(info.value)


def test_discrete_systems_keep_their_sample_time():
    ss = _mimo_state_space(seed=3, n=3, m=1, p=2, dt=0.05)
    ss = signal.StateSpace(0.2 * ss.A / np.abs(ss.A).sum(), ss.B, ss.C, ss.D, dt=0.05)  # a stable discrete model
    r = sw.from_scipy(ss)
    assert r.info["sample_time"] == 0.05  # (identity)
    back = r.to_scipy(sample_time=r.info["sample_time"])
    assert isinstance(back, signal.dlti) and back.dt == 0.05
    for i in range(2):
        want = _channel_response(ss, i, 0, discrete=True)  # (scipy.signal reference)
        np.testing.assert_allclose(_channel_response(back, i, 0, discrete=True), want, rtol=1e-13)
        np.testing.assert_allclose(r.evaluate(np.exp(1j * W_DISCRETE))[:, i, 0], want, rtol=1e-12)

    tf = signal.dlti([1.0, -0.25], [1.0, -0.6, 0.08], dt=0.1)
    r2 = sw.from_scipy(tf, "observer")
    assert r2.info["sample_time"] == 0.1
    want = signal.dfreqresp(tf, W_DISCRETE)[1]  # (scipy.signal reference)
    np.testing.assert_allclose(signal.dfreqresp(r2.to_scipy(sample_time=0.1), W_DISCRETE)[1], want, rtol=1e-13)

    unspecified = sw.from_scipy(signal.dlti([1.0], [1.0, 0.5]))
    assert unspecified.info["sample_time"] is True
    assert unspecified.to_scipy(sample_time=True).dt is True


def test_exact_realization_to_scipy_rounds_to_nearest():
    r = sw.realize(["1/3"], ["1", "1/7"], exact=True)
    back = r.to_scipy()
    assert back.A[0, 0] == float(Fraction(-1, 7)) and back.C[0, 0] == float(Fraction(1, 3))  # (identity)


def test_exact_entries_beyond_float64_are_refused():
    r = sw.realize([1], [1, 10**400], exact=True)  # A = [[-10^400]]: exact, but no float64
    with pytest.raises(sw.ModelError) as info:
        r.to_scipy()
    assert names_argument(str(info.value), "a")  # (API contract: float results are finite)
    with pytest.raises(sw.ModelError):
        r.evaluate(1j)
    assert r.to_sympy()[0][0, 0] == -(sympy.Integer(10) ** 400)  # (sympy exact)


@pytest.mark.parametrize(
    "system",
    [None, [1.0, 2.0], np.eye(2), "TransferFunction", 3.0, (np.eye(1),) * 4],
)
def test_from_scipy_refuses_other_objects(system):
    with pytest.raises(sw.ModelError) as info:
        sw.from_scipy(system)
    assert names_argument(str(info.value), "system")  # (API contract)


def test_from_scipy_refuses_a_realization_and_a_sympy_expression():
    for system in (sw.realize([1.0], [1.0, 1.0]), 1 / (s + 1)):
        with pytest.raises(sw.ModelError) as info:
            sw.from_scipy(system)
        assert names_argument(str(info.value), "system")


def test_from_scipy_bad_data():
    with pytest.raises(sw.ModelError) as info:
        sw.from_scipy(signal.TransferFunction([1.0, 2.0, 3.0], [1.0, 2.0]))  # improper
    assert names_argument(str(info.value), "system") and "improper" in str(info.value)
    with pytest.raises(sw.ModelError) as info:
        sw.from_scipy(signal.StateSpace([[np.nan]], [[1.0]], [[1.0]], [[0.0]]))
    assert names_argument(str(info.value), "system")
    with pytest.raises(sw.ModelError) as info:
        sw.from_scipy(signal.TransferFunction([1.0], [1.0, 2.0, 1.0]), "modal")  # repeated pole
    assert names_argument(str(info.value), "system")


def test_from_scipy_form_checks():
    with pytest.raises(sw.ModelError) as info:
        sw.from_scipy(_mimo_state_space(), "controller")  # a StateSpace is taken as given
    assert names_argument(str(info.value), "form")
    with pytest.raises(sw.ModelError) as info:
        sw.from_scipy(signal.TransferFunction([1.0], [1.0, 1.0]), "phase_variable")
    assert names_argument(str(info.value), "form")


@pytest.mark.parametrize("bad", [0, -0.1, float("nan"), float("inf"), "0.1", False, [0.1]])
def test_to_scipy_bad_sample_time(bad):
    with pytest.raises(sw.ModelError) as info:
        sw.realize([1.0], [1.0, 1.0]).to_scipy(sample_time=bad)
    assert names_argument(str(info.value), "sample_time")


# --------------------------------------------------------------------------------------
# optional dependencies
# --------------------------------------------------------------------------------------


def test_import_does_not_load_sympy_or_scipy():
    code = (
        "import sys, statewright\n"
        "loaded = sorted(m for m in sys.modules if m.split('.')[0] in ('sympy', 'scipy'))\n"
        "print(','.join(loaded))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == ""  # (lazy import: numpy is the only required dependency)


def test_missing_sympy_says_how_to_install(monkeypatch):
    monkeypatch.setitem(sys.modules, "sympy", None)  # makes `import sympy` fail
    r = sw.realize([1.0], [1.0, 1.0])
    with pytest.raises(ImportError, match=r"statewright\[interop\]"):
        r.to_sympy()
    with pytest.raises(ImportError, match=r"statewright\[interop\]"):
        sw.realize_expression(None, None)


def test_missing_scipy_says_how_to_install(monkeypatch):
    monkeypatch.setitem(sys.modules, "scipy.signal", None)
    r = sw.realize([1.0], [1.0, 1.0])
    with pytest.raises(ImportError, match=r"statewright\[interop\]"):
        r.to_scipy()
    with pytest.raises(sw.ModelError) as info:
        sw.from_scipy([1.0])
    assert names_argument(str(info.value), "system")


def test_docstring_examples():
    import doctest

    from statewright._api import interop

    result = doctest.testmod(interop, optionflags=doctest.NORMALIZE_WHITESPACE)
    assert result.failed == 0 and result.attempted >= 5  # (doctest: hand-worked values in the docstrings)

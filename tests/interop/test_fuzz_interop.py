"""Fuzz tests of the conversions from sympy and SciPy (contract in tests/fuzz_strategies.py)."""

import math  # noqa: F401
from fractions import Fraction  # noqa: F401

import numpy as np  # noqa: F401
import pytest  # noqa: F401
from hypothesis import given, reject, settings  # noqa: F401
from hypothesis import strategies as st  # noqa: F401

import statewright as sw  # noqa: F401
from fuzz_strategies import *  # noqa: F403
from fuzz_strategies import watchdog_output  # noqa: F401  (autouse fixture: the watchdog prints past capture)

# interop
# --------------------------------------------------------------------------------------

sympy = pytest.importorskip("sympy")
S, T = sympy.Symbol("s"), sympy.Symbol("t")

SYMPY_COEFFS = st.one_of(
    st.integers(-9, 9).map(sympy.Integer),
    st.builds(lambda p, q: sympy.Rational(p, q), st.integers(-50, 50), st.integers(1, 50)),
    huge_int().map(sympy.Integer),
    st.builds(lambda p, q: sympy.Rational(p, q), st.integers(-9, 9), huge_int().map(abs)),
    st.sampled_from(
        [
            sympy.Float(0.1),
            sympy.Float("1e400"),
            sympy.pi,
            sympy.sqrt(2),
            sympy.I,
            sympy.nan,
            sympy.oo,
            sympy.zoo,
            sympy.Integer(10) ** 400,
            sympy.Float("1e-400"),
            T,
            sympy.E,
        ]
    ),
)


@st.composite
def sympy_polynomial(draw, degree):
    coeffs = draw(
        st.lists(
            st.integers(-9, 9).map(sympy.Integer) | SYMPY_COEFFS
            if degree <= 4
            else st.integers(-9, 9).map(sympy.Integer),
            min_size=degree + 1,
            max_size=degree + 1,
        )
    )
    return sum(c * S ** (degree - i) for i, c in enumerate(coeffs))


@st.composite
def sympy_expression(draw):
    dn = draw(st.integers(0, 12))
    num = draw(sympy_polynomial(draw(st.integers(0, dn + 1))))
    den = draw(sympy_polynomial(dn))
    kind = draw(
        st.sampled_from(
            ["ratio"] * 5
            + [
                "pair",
                "poly_pair",
                "sum",
                "delay",
                "root",
                "string",
                "constant",
                "other",
                "bad_pair",
                "matrix",
                "z_inverse",
            ]
        )
    )
    if kind == "ratio":
        return num / den if den != 0 else num / (den + 1)
    if kind == "pair":
        return (num, den)
    if kind == "poly_pair":
        try:
            return (sympy.Poly(num, S), sympy.Poly(den, S))
        except Exception:
            reject()
    if kind == "sum":
        return num / (den + 1) + 1 / (S + 2)
    if kind == "delay":
        return sympy.exp(-S) / (S + 1)
    if kind == "root":
        return 1 / (sympy.sqrt(S) + 1)
    if kind == "string":
        return "1/(s+1)"
    if kind == "constant":
        return draw(SYMPY_COEFFS)
    if kind == "other":
        return 1 / (S + T)
    if kind == "bad_pair":
        return (num, den, num)
    if kind == "matrix":
        return sympy.Matrix([[1 / (S + 1)]])
    return 1 / (1 - S**-1 / 2)


@CI_SLOW
@given(
    expr=sympy_expression(),
    symbol=st.sampled_from([S, S, S, S, T, "s", None, sympy.Integer(1)]),
    form=option(FORMS),
    exact=flag(),
)
def test_realize_expression(expr, symbol, form, exact):
    r = attempt(sw.realize_expression, expr, symbol, form, exact=exact)
    if r is not FAILED:
        check_realization(r, m=1, p=1)


scipy_signal = pytest.importorskip("scipy.signal")


@st.composite
def scipy_system(draw):
    """A scipy.signal system (its arrays returned too, to be overwritten after the call)."""
    kind = draw(
        st.sampled_from(
            [
                "state_space",
                "state_space",
                "transfer_function",
                "transfer_function",
                "transfer_function_several_outputs",
                "zeros_poles_gain",
                "discrete_state_space",
                "discrete_transfer_function",
                "junk",
            ]
        )
    )
    n = draw(st.sampled_from([0, 1, 2, 3, 4, 6, 8, 12]))
    if kind in ("state_space", "discrete_state_space"):
        m, p = draw(st.integers(1, 2)), draw(st.integers(1, 2))
        mats = [np.array(draw(float_array(s, layout="c")), dtype=float) for s in ((n, n), (n, m), (p, n), (p, m))]
        build = lambda: scipy_signal.StateSpace(*mats, **({"dt": 0.1} if kind == "discrete_state_space" else {}))  # noqa: E731
        held = lambda x: [x.A, x.B, x.C, x.D]  # noqa: E731
    elif kind in ("transfer_function", "discrete_transfer_function", "transfer_function_several_outputs"):
        k = draw(st.integers(1, n + 2))
        shape = (draw(st.integers(2, 3)), k) if kind == "transfer_function_several_outputs" else (k,)
        num = np.array(draw(float_array(shape, layout="c")), dtype=float)
        den = np.array(draw(float_array((n + 1,), layout="c")), dtype=float)
        dt = {"dt": True} if kind == "discrete_transfer_function" else {}
        build = lambda: scipy_signal.TransferFunction(num, den, **dt)  # noqa: E731
        held = lambda x: [x.num, x.den]  # noqa: E731
    elif kind == "zeros_poles_gain":
        z = draw(
            hnp.arrays(
                np.complex128,
                draw(st.integers(0, 4)),
                elements=st.complex_numbers(max_magnitude=1e3) | st.just(complex(nan, 0)),
            )
        )
        p = draw(hnp.arrays(np.complex128, n, elements=st.complex_numbers(max_magnitude=1e3)))
        if draw(st.booleans()):  # conjugate pairs
            z, p = np.concatenate([z, z.conj()]), np.concatenate([p, p.conj()])
        k = draw(REGIMES[draw(st.sampled_from(REGIME_NAMES))])
        build = lambda: scipy_signal.ZerosPolesGain(z, p, k)  # noqa: E731
        held = lambda x: [x.zeros, x.poles]  # noqa: E731
    else:
        return draw(st.sampled_from(JUNK + [(np.ones(1), np.ones(2))]).map(copy.deepcopy)), []
    try:  # SciPy's own constructors refuse some data: not statewright's concern
        with warnings.catch_warnings(), np.errstate(all="ignore"):
            warnings.simplefilter("ignore")
            system = build()
    except Exception:
        reject()
    return system, held(system)


@CI
@given(system=scipy_system(), form=st.one_of(st.none(), st.none(), option(FORMS)))
def test_from_scipy(system, form):
    sys_obj, arrays = system
    r = attempt(sw.from_scipy, sys_obj, form, mutable=arrays)
    if r is not FAILED:
        check_realization(r, exact=False)


# --------------------------------------------------------------------------------------

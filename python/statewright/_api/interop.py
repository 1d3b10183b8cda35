"""Public conversions in: sympy expressions and scipy.signal systems to Realizations.

sympy and SciPy are optional (``pip install 'statewright[interop]'``): they are imported
only inside the functions that need them, so ``import statewright`` needs numpy alone.
(The conversions out, ``Realization.to_sympy`` / ``to_scipy``, are in ``_compute.interop``.)
"""

from __future__ import annotations

import importlib
import math
from fractions import Fraction
from typing import Any, Dict, List, Optional, Tuple, Union

import numpy as np

from .._base import validate as v
from .._compute.interop import require
from .._core import ModelError
from .._results.realization import Realization
from .realize import FORMS, realize

__all__ = ["realize_expression", "from_scipy"]

# The forms whose A and B depend on the denominator alone, so that one realization serves
# every output row of a single-input transfer function with a common denominator.
_SHARED_DENOMINATOR_FORMS = ("controllable_canonical", "controller", "controllability")


# --------------------------------------------------------------------------------------
# sympy expression -> Realization
# --------------------------------------------------------------------------------------


def _symbol_names(symbols: Any) -> str:
    return ", ".join(sorted(str(x) for x in symbols))


def _polynomial_parts(sympy: Any, expr: Any, symbol: Any) -> Tuple[Any, Any]:
    """(numerator, denominator) as sympy Polys in ``symbol``, checked."""
    bad = (sympy.zoo, sympy.nan, sympy.oo, -sympy.oo)
    if isinstance(expr, (tuple, list, sympy.Tuple)):
        if len(expr) != 2:
            raise ModelError(f"expr: a pair (numerator, denominator) has two entries, found {len(expr)}")
        parts = []
        for part, which in zip(expr, ("numerator", "denominator")):
            if isinstance(part, sympy.Poly):
                part = part.as_expr()
            if not isinstance(part, sympy.Expr):
                raise ModelError(
                    f"expr: the {which} of the pair must be a sympy Poly or expression, found a {type(part).__name__}"
                )
            if part.has(*bad):
                raise ModelError(f"expr: the {which} {part} is not finite")
            others = part.free_symbols - {symbol}
            if others:
                raise ModelError(
                    f"expr: the {which} contains symbols other than {symbol} ({_symbol_names(others)}); "
                    "substitute numbers for them first (expr.subs(...))"
                )
            if not part.is_polynomial(symbol):
                raise ModelError(f"expr: the {which} {part} is not a polynomial in {symbol}")
            parts.append(part)
        num_expr, den_expr = parts
    else:
        if isinstance(expr, sympy.Poly):
            expr = expr.as_expr()
        if isinstance(expr, (str, bytes)):
            raise ModelError(
                "expr: strings are not parsed; build the expression with sympy "
                "(e.g. s = sympy.Symbol('s'); expr = 1 / (s + 1))"
            )
        if not isinstance(expr, sympy.Expr):
            raise ModelError(
                "expr: expected a scalar sympy expression rational in the symbol, or a pair "
                f"(numerator, denominator) of sympy Polys, found a {type(expr).__name__}"
            )
        if expr.has(*bad):
            raise ModelError(f"expr: {expr} is not finite")
        others = expr.free_symbols - {symbol}
        if others:
            raise ModelError(
                f"expr: contains symbols other than {symbol} ({_symbol_names(others)}); "
                "substitute numbers for them first (expr.subs(...))"
            )
        if expr.is_rational_function(symbol) is not True:
            raise ModelError(
                f"expr: {expr} is not a rational function of {symbol} (a ratio of polynomials); "
                "time delays, roots and other functions of the symbol have no finite-order realization"
            )
        num_expr, den_expr = sympy.fraction(sympy.together(expr))
    try:
        num = sympy.Poly(num_expr, symbol)
        den = sympy.Poly(den_expr, symbol)
    except sympy.PolynomialError as exc:
        raise ModelError(f"expr: cannot be read as a ratio of polynomials in {symbol} ({exc})") from None
    if den.is_zero:
        raise ModelError("expr: the denominator is zero")
    if not num.is_zero and num.degree() > den.degree():
        raise ModelError(
            f"expr: the transfer function is improper (numerator degree {num.degree()} exceeds "
            f"denominator degree {den.degree()}); a state-space realization needs deg num <= deg den"
        )
    return num, den


def _exact_coefficient(sympy: Any, c: Any, which: str) -> Fraction:
    if isinstance(c, sympy.Rational):  # Integer is a Rational
        return Fraction(int(c.p), int(c.q))
    if isinstance(c, sympy.Float):
        raise ModelError(
            f"expr: the {which} coefficient {c} is a float; exact mode needs rational numbers "
            "(write sympy.Rational('0.1') for 0.1) or pass exact=False"
        )
    raise ModelError(
        f"expr: the {which} coefficient {c} is not a rational number; pass exact=False to compute with its float value"
    )


def _float_coefficient(sympy: Any, c: Any, which: str) -> float:
    try:
        value = complex(sympy.N(c, 20))
    except (TypeError, ValueError):
        raise ModelError(f"expr: the {which} coefficient {c} is not a number") from None
    if value.imag != 0.0:
        raise ModelError(f"expr: the {which} coefficient {c} is not real; state-space data are real")
    if not math.isfinite(value.real):
        raise ModelError(f"expr: the {which} coefficient {c} does not fit in float64")
    return value.real


def realize_expression(
    expr: Any,
    symbol: Any,
    form: str = "controllable_canonical",
    *,
    exact: bool = True,
) -> Realization:
    r"""State-space realization of a transfer function written as a sympy expression.

    ``realize(num, den, form, exact=exact)`` of the numerator and denominator
    coefficients of ``expr`` in ``symbol`` (``s`` or ``z`` alike).

    Parameters
    ----------
    expr : sympy expression, or a pair of sympy Polys
        A scalar expression rational in ``symbol`` (``(7*s + 9) / (s**2 + 5*s + 11)``,
        ``1 / (1 - z**-1 / 2)``, sums and products of such), brought to one fraction by
        ``sympy.together``; or a ``(numerator, denominator)`` pair of sympy ``Poly``\ s (or
        polynomial expressions) in ``symbol``. Common factors of numerator and denominator
        are not cancelled, in either case (apply ``sympy.cancel`` first for the lowest
        order), so the order is the degree of the denominator as written.
    symbol : sympy.Symbol
        The transform variable.
    form : str
        As for :func:`statewright.realize` (``"modal"`` needs ``exact=False``).
    exact : bool
        True (default): the coefficients must be sympy Rationals (or Integers) and the
        result holds :class:`fractions.Fraction`\ s. False: the coefficients are evaluated
        to float64 (so ``pi``, ``sqrt(2)`` and sympy Floats are accepted).

    Returns
    -------
    Realization

    Raises
    ------
    ModelError
        ``expr`` is not rational in ``symbol`` (a delay ``exp(-s)``, a root), holds other
        free symbols, is improper or not finite, has a zero denominator, or (exact mode) a
        coefficient that is not a rational number; ``symbol`` is not a sympy Symbol;
        ``form`` is unknown.
    ImportError
        sympy is not installed.

    Examples
    --------
    >>> import sympy, statewright as sw
    >>> s = sympy.Symbol("s")
    >>> r = sw.realize_expression((7 * s + 9) / (2 * s**2 + 10 * s + 22), s)
    >>> r.a.tolist()
    [[Fraction(0, 1), Fraction(1, 1)], [Fraction(-11, 1), Fraction(-5, 1)]]
    >>> r.c.tolist()
    [[Fraction(9, 2), Fraction(7, 2)]]
    """
    sympy = require("sympy", "realize_expression")
    if not isinstance(symbol, sympy.Symbol):
        raise ModelError(f"symbol: expected a sympy Symbol (e.g. sympy.Symbol('s')), found a {type(symbol).__name__}")
    form = v.check_option(form, "form", FORMS)
    exact = v.check_flag(exact, "exact")
    if exact and form == "modal":
        raise ModelError(
            "form: 'modal' is not offered in exact arithmetic (the poles are not rational in general); pass exact=False"
        )
    num, den = _polynomial_parts(sympy, expr, symbol)
    coeffs: List[List[Union[Fraction, float]]] = []
    for poly, which in ((num, "numerator"), (den, "denominator")):
        if exact:
            coeffs.append([_exact_coefficient(sympy, c, which) for c in poly.all_coeffs()])
        else:
            coeffs.append([_float_coefficient(sympy, c, which) for c in poly.all_coeffs()])
    try:
        return realize(coeffs[0], coeffs[1], form, exact=exact)
    except ModelError as exc:
        message = str(exc)
        if message.startswith(("num", "den")):  # what realize calls num and den is expr here
            raise ModelError(f"expr: {message}") from None
        raise


# --------------------------------------------------------------------------------------
# scipy.signal -> Realization
# --------------------------------------------------------------------------------------


def _transfer_function_realization(num: np.ndarray, den: np.ndarray, form: str, info: Dict[str, Any]) -> Realization:
    """A realization of num / den, num of shape (k,) or (p, k) over one common den."""
    if num.ndim == 1 or (num.ndim == 2 and num.shape[0] == 1):
        r = realize(num.reshape(-1), den, form)
        return Realization._trusted(r.a, r.b, r.c, r.d, info={**r.info, **info})
    if num.ndim != 2:
        raise ModelError(f"system: expected a numerator of 1 or 2 dimensions, found shape {num.shape}")
    assert form in _SHARED_DENOMINATOR_FORMS  # checked by from_scipy
    rows = [realize(row, den, form) for row in num]
    a, b = rows[0].a, rows[0].b
    if not all(np.array_equal(x.a, a) and np.array_equal(x.b, b) for x in rows):
        raise ModelError("system: the outputs do not share one realization of the denominator")
    c = np.vstack([x.c for x in rows])
    d = np.vstack([x.d for x in rows])
    return Realization._trusted(a, b, c, d, info=info)


def from_scipy(system: Any, form: Optional[str] = None) -> Realization:
    r"""A :class:`Realization` of a ``scipy.signal`` linear time-invariant system.

    Parameters
    ----------
    system : scipy.signal.lti or dlti
        A ``StateSpace``, ``TransferFunction`` or ``ZerosPolesGain`` object (what
        ``scipy.signal.lti(...)`` and ``dlti(...)`` return), continuous or discrete.

        * ``StateSpace``: the matrices as given (float64 copies).
        * ``TransferFunction``: :func:`statewright.realize` of its coefficients. A
          single-input, several-output transfer function (numerator of shape (p, k) over
          one denominator) is realized with the A and B of the denominator shared by all
          outputs, which the ``controllable_canonical``, ``controller`` and
          ``controllability`` forms allow.
        * ``ZerosPolesGain``: the polynomials ``gain * prod(s - zero)`` and
          ``prod(s - pole)``, realized as a transfer function. Complex zeros and poles
          must come in exact conjugate pairs.
    form : str, optional
        The canonical form for transfer-function and zeros-poles-gain objects (default
        ``"controllable_canonical"``); not accepted for ``StateSpace`` objects, which are
        taken as given.

    Returns
    -------
    Realization
        Float. For a discrete system, ``info["sample_time"]`` is SciPy's ``dt`` (``True``
        when unspecified); ``r.to_scipy(sample_time=r.info.get("sample_time"))`` gives the
        system back. Continuous systems have no ``"sample_time"``.

    Raises
    ------
    ModelError
        ``system`` is not a scipy.signal system, or its data cannot be realized (improper,
        NaN or infinity, zeros or poles not in conjugate pairs); ``form`` is unknown, given
        for a ``StateSpace``, or does not suit a several-output transfer function.

    Examples
    --------
    >>> import scipy.signal, statewright as sw
    >>> r = sw.from_scipy(scipy.signal.TransferFunction([0.5, 4], [1, 1.2, 5]), "observable_canonical")
    >>> r.a
    array([[ 0. , -5. ],
           [ 1. , -1.2]])
    """
    if form is not None:
        form = v.check_option(form, "form", FORMS)
    try:
        signal = importlib.import_module("scipy.signal")
    except ImportError:
        raise ModelError(
            "system: expected a scipy.signal system (lti, dlti, StateSpace, TransferFunction or "
            f"ZerosPolesGain), found a {type(system).__name__} (and SciPy is not installed)"
        ) from None
    if not isinstance(system, (signal.lti, signal.dlti)):
        raise ModelError(
            "system: expected a scipy.signal system (lti, dlti, StateSpace, TransferFunction or "
            f"ZerosPolesGain), found {v._describe(system)}"
        )
    info: Dict[str, Any] = {}
    if isinstance(system, signal.dlti):
        info["sample_time"] = system.dt
    if isinstance(system, signal.StateSpace):
        if form is not None:
            raise ModelError(
                "form: a StateSpace object is taken as given; form applies to transfer-function "
                "and zeros-poles-gain objects only (use Realization.transform to change coordinates)"
            )
        try:
            return Realization(system.A, system.B, system.C, system.D, info=info)
        except ModelError as exc:
            raise _system_error(exc) from None
    chosen = form if form is not None else "controllable_canonical"
    try:
        if isinstance(system, signal.TransferFunction):
            num = v._float_array(system.num, "num")
            den = v.float_polynomial(system.den, "den")
        elif isinstance(system, signal.ZerosPolesGain):
            num, den = _zeros_poles_gain_polynomials(system.zeros, system.poles, system.gain)
        else:
            raise ModelError(f"system: unsupported scipy.signal system class {type(system).__name__}")
    except ModelError as exc:
        raise _system_error(exc) from None
    if num.ndim == 2 and num.shape[0] > 1 and chosen not in _SHARED_DENOMINATOR_FORMS:
        raise ModelError(
            f"form: {chosen!r} puts the numerator into B, so it cannot serve the {num.shape[0]} outputs "
            "of this single-input transfer function at once; use one of "
            f"{', '.join(map(repr, _SHARED_DENOMINATOR_FORMS))}"
        )
    try:
        return _transfer_function_realization(num, den, chosen, info)
    except ModelError as exc:
        raise _system_error(exc) from None


def _system_error(exc: ModelError) -> ModelError:
    """A failure on the data of ``system``, named as such."""
    message = str(exc)
    return exc if message.startswith("system") else ModelError(f"system: {message}")


def _zeros_poles_gain_polynomials(zeros: Any, poles: Any, gain: Any) -> Tuple[np.ndarray, np.ndarray]:
    z = np.atleast_1d(np.asarray(zeros, dtype=complex)).reshape(-1)
    p = np.atleast_1d(np.asarray(poles, dtype=complex)).reshape(-1)
    k = np.asarray(gain)
    if k.size != 1:
        raise ModelError(f"system: expected one gain (a single-input, single-output system), found shape {k.shape}")
    if np.iscomplexobj(k) and np.imag(k).item() != 0:
        raise ModelError("system: the gain is complex; state-space data are real")
    gain_value = float(np.real(k).item())
    for roots, what in ((z, "zeros"), (p, "poles")):
        if not np.all(np.isfinite(roots)):
            raise ModelError(f"system: the {what} contain NaN or infinity")
    polys: List[np.ndarray] = []
    for roots, what in ((z, "zeros"), (p, "poles")):
        # numpy.poly returns real coefficients exactly when the complex roots come in
        # exact conjugate pairs
        coeffs = np.atleast_1d(np.poly(roots)) if roots.size else np.ones(1)
        if np.iscomplexobj(coeffs):
            raise ModelError(
                f"system: the complex {what} are not in conjugate pairs, so the polynomial "
                "coefficients would not be real"
            )
        polys.append(np.asarray(coeffs, dtype=np.float64))
    return gain_value * polys[0], polys[1]

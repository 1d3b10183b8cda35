"""Parametric (symbolic) models: transfer matrices and canonical forms with named parameters."""

from __future__ import annotations

from typing import Any, List, Tuple

import numpy as np

from .._base import symbolic as sym
from .._base import validate as v
from .._compute import parametric as compute
from .._compute.interop import require
from .._core import ModelError
from .._results.realization import Realization

__all__ = ["parametric_transfer_function", "realize_parametric_expression"]

SympyPoly = Any
"""A ``sympy.Poly`` (sympy ships no type information)."""


def _check_symbol(sympy: Any, s: Any, arg: str) -> None:
    if not isinstance(s, sympy.Symbol):
        raise ModelError(f"{arg}: expected a sympy Symbol (e.g. sympy.Symbol('s')), found a {type(s).__name__}")


def parametric_transfer_function(a: Any, b: Any, c: Any, d: Any, s: Any) -> Tuple[np.ndarray, SympyPoly]:
    r"""Transfer matrix of a state-space model whose entries are functions of named parameters.

    ``C (sI - A)^-1 B + D = num(s) / den(s)`` with ``den = det(sI - A)`` monic in ``s``
    and every coefficient a rational function of the parameters in lowest terms, computed
    by the Faddeev–LeVerrier recursion over the parameters' integer polynomials in the Rust
    core (after clearing denominators; its only divisions are by the integers k).

    Parameters
    ----------
    a, b, c, d : sympy Matrix or nested lists, shapes (n, n), (n, m), (p, n), (p, m)
        Entries: ints, :class:`fractions.Fraction`\ s or sympy expressions rational in the
        parameters (``k / J1``, ``1 / (R1 + R2)``) with rational coefficients. The
        parameters are every free symbol other than ``s``.
    s : sympy.Symbol
        The transform variable (``s`` or ``z``); it may not occur in the entries.

    Returns
    -------
    num : (p, m) numpy object array of sympy.Poly
        ``num[i, j]`` the numerator of entry (i, j), a ``Poly`` in ``s`` of degree at most n
        over the same denominator.
    den : sympy.Poly
        ``det(sI - A)``, monic of degree n.

    Both have one sympy domain: ``ZZ[parameters]`` when every coefficient is an integer
    polynomial, ``QQ[parameters]`` when it is a polynomial with rational coefficients,
    else the field ``ZZ(parameters)``; ``QQ`` without parameters.

    Raises
    ------
    ModelError
        An argument is not a 2-D matrix or the shapes do not fit (A not square); an entry is
        a float, a string, not finite, contains ``s``, or is not rational in the parameters
        (``sqrt(k)``, ``sin(k)``, ``pi``); ``s`` is not a Symbol; the estimated work exceeds
        the core's budget (the message gives the estimate).
    ImportError
        sympy is not installed.

    Notes
    -----
    Each coefficient is brought to lowest terms (polynomial GCD of its numerator and
    denominator, integer content included). Nothing is cancelled in ``s``: a common root
    of ``num[i, j]`` and ``den`` stays, as in ``transfer_function(exact=True)``, so
    ``den`` has degree n. The result is generic: valid for parameter values at which no
    entry denominator of the model vanishes. Substituting numbers for the parameters gives
    ``transfer_function(..., exact=True)`` of the substituted model.

    Examples
    --------
    A mass m on a spring k with damping b, force in, position out:

    >>> import sympy, statewright as sw
    >>> m, b, k, s = sympy.symbols("m b k s")
    >>> num, den = sw.parametric_transfer_function(
    ...     [[0, 1], [-k / m, -b / m]], [[0], [1 / m]], [[1, 0]], [[0]], s)
    >>> sympy.simplify(den.as_expr() - (s**2 + b * s / m + k / m))   # (hand derivation)
    0
    >>> num[0, 0].as_expr()
    1/m
    """
    sympy = require("sympy", "parametric_transfer_function")
    _check_symbol(sympy, s, "s")
    matrices = [sym.matrix_entries(sympy, x, name) for x, name in zip((a, b, c, d), "abcd")]
    params = sym.parameters_of(sympy, (e for _, _, entries in matrices for e in entries), s)
    plain = [sym.matrix_to_plain(sympy, x, params, name, s) for x, name in zip(matrices, "abcd")]
    num, den = compute.transfer_function_plain(*plain)
    p, m = matrices[2][0], matrices[1][1]
    n = len(den) - 1
    domain = sym.ResultDomain(sympy, params, [*num, *den])
    out = np.empty((p, m), dtype=object)
    for i in range(p):
        for j in range(m):
            start = (i * m + j) * (n + 1)
            out[i, j] = domain.poly(num[start : start + n + 1], s)
    return out, domain.poly(den, s)


def realize_parametric_expression(
    sympy: Any, num: Any, den: Any, s: Any, params: Tuple[Any, ...], form: str
) -> Realization:
    """The realization in ``form`` of ``num / den`` (sympy Polys in ``s`` whose coefficients
    hold the parameters); entries are sympy expressions, ``info["parameters"]`` the symbols.
    Called by :func:`statewright.realize_expression` after its checks."""
    coefficients: List[List[sym.PlainEntry]] = []
    for poly, which in ((num, "numerator"), (den, "denominator")):
        converter_entries = [
            sym.entry_to_plain(
                sympy,
                sym.as_sympy(sympy, c, "expr", f"the {which} coefficient"),
                params,
                "expr",
                f"the {which} coefficient of {s}**{poly.degree() - k}",
                s,
            )
            for k, c in enumerate(poly.all_coeffs())
        ]
        coefficients.append(converter_entries)
    quad = compute.realize_plain(coefficients[0], coefficients[1], form)
    domain = sym.ResultDomain(sympy, params, [e for _, _, entries in quad for e in entries])
    arrays = []
    for rows, cols, entries in quad:
        x = np.empty((rows, cols), dtype=object)
        for k, e in enumerate(entries):
            x[k // cols, k % cols] = domain.expression(e)
        arrays.append(x)
    v.check_model_shapes(*arrays)
    a, b, c, d = arrays
    return Realization._trusted(a, b, c, d, info={"parameters": params})

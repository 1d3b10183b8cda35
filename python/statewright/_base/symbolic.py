"""sympy expressions to and from the plain format of the parametric core (checked once here).

The plain format, shared with the compiled core (``src/python/parametric.rs``) and never a
string: a polynomial in the parameters ``p_0 .. p_{v-1}`` is a list of terms
``(exponents, numerator, denominator)``, ``exponents`` a tuple of ``v`` non-negative ints
(the power of each parameter) and the coefficient the rational ``numerator / denominator``
of two Python ints; an entry is a pair ``(numerator polynomial, denominator polynomial)``;
a matrix is ``(rows, cols, entries)`` with the entries row-major. The parameters are the
free symbols other than the transform variable, in ``sympy.default_sort_key`` order.

sympy is passed in by the caller (it is optional, imported by the public layer), so this
module imports nothing of statewright above ``_core``.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any, Dict, Iterable, List, Sequence, Tuple

import numpy as np

from .._core import ModelError

__all__ = [
    "Plain",
    "PlainEntry",
    "PlainMatrix",
    "parameters_of",
    "entry_to_plain",
    "matrix_entries",
    "matrix_to_plain",
    "ResultDomain",
]

Plain = List[Tuple[Tuple[int, ...], int, int]]
PlainEntry = Tuple[Plain, Plain]
PlainMatrix = Tuple[int, int, List[PlainEntry]]

_ONE: Plain = [((), 1, 1)]


def _describe(x: Any) -> str:
    return f"a {type(x).__name__} ({x!r})" if not isinstance(x, (list, tuple)) else f"a {type(x).__name__}"


def as_sympy(sympy: Any, x: Any, arg: str, at: str) -> Any:
    """An exact sympy number or expression for an entry; floats, strings and the like refused."""
    if isinstance(x, (bool, np.bool_)):
        raise ModelError(f"{arg}: {at} is a bool ({x!r}); expected a number or a sympy expression")
    if isinstance(x, (int, np.integer)):
        return sympy.Integer(int(x))
    if isinstance(x, Fraction):
        return sympy.Rational(x.numerator, x.denominator)
    if isinstance(x, (float, np.floating)):
        raise ModelError(
            f"{arg}: {at} is the float {x!r}; parametric models are exact: write sympy.Rational(...) "
            "or a Fraction (e.g. sympy.Rational('0.1') for 0.1)"
        )
    if isinstance(x, (str, bytes)):
        raise ModelError(
            f"{arg}: {at} is a string; strings are not parsed: build the entry with sympy "
            "(e.g. k = sympy.Symbol('k'); k / 2)"
        )
    if isinstance(x, sympy.Poly):
        x = x.as_expr()
    if not isinstance(x, sympy.Expr):
        raise ModelError(f"{arg}: {at} is {_describe(x)}; expected an int, a Fraction or a sympy expression")
    if x.has(sympy.zoo, sympy.nan, sympy.oo, -sympy.oo):
        raise ModelError(f"{arg}: {at} ({x}) is not finite")
    if x.atoms(sympy.Float):
        raise ModelError(
            f"{arg}: {at} ({x}) holds a float; parametric models are exact: write sympy.Rational(...) for its numbers"
        )
    return x


def parameters_of(sympy: Any, exprs: Iterable[Any], s: Any) -> Tuple[Any, ...]:
    """The free symbols of ``exprs`` other than ``s``, in sympy's default sort order."""
    found = set()
    for e in exprs:
        found |= e.free_symbols
    found.discard(s)
    return tuple(sorted(found, key=sympy.default_sort_key))


def _terms(poly: Any, count: int) -> Plain:
    """A sympy PolyElement over ZZ (or QQ) as plain terms, exponents padded to ``count``."""
    out: Plain = []
    for exponents, c in poly.terms():
        e = tuple(int(k) for k in exponents) + (0,) * (count - len(exponents))
        if hasattr(c, "numerator") and not isinstance(c, int):
            out.append((e, int(c.numerator), int(c.denominator)))
        else:
            out.append((e, int(c), 1))
    return out


class _Converter:
    """Expressions in fixed parameters to plain entries (one sympy field shared by all)."""

    def __init__(self, sympy: Any, params: Sequence[Any]) -> None:
        self.sympy = sympy
        self.params = tuple(params)
        self.field = None
        if self.params:
            from sympy.polys.fields import FracField  # type: ignore[import-untyped]

            self.field = FracField(self.params, sympy.ZZ)

    def entry(self, x: Any, arg: str, at: str, s: Any) -> PlainEntry:
        sympy = self.sympy
        if s is not None and x.has(s):
            raise ModelError(
                f"{arg}: {at} ({x}) contains the transform variable {s}; the entries of a state-space "
                "matrix are functions of the parameters only"
            )
        if isinstance(x, sympy.Rational):
            return ([((0,) * len(self.params), int(x.p), int(x.q))] if x != 0 else [], _ONE)
        if self.field is None:
            raise ModelError(f"{arg}: {at} ({x}) is not a rational number")
        try:
            value = self.field.from_expr(x)
        except (ValueError, TypeError, sympy.PolynomialError, sympy.polys.polyerrors.CoercionFailed):
            raise ModelError(
                f"{arg}: {at} ({x}) is not a rational function of the parameters "
                f"({', '.join(map(str, self.params))}) with rational coefficients; roots, functions such "
                "as sin or exp, and irrational numbers such as pi have no place in the exact route "
                "(introduce a symbol for them)"
            ) from None
        count = len(self.params)
        return (_terms(value.numer, count), _terms(value.denom, count))


def entry_to_plain(sympy: Any, x: Any, params: Sequence[Any], arg: str, at: str, s: Any = None) -> PlainEntry:
    """One checked entry in the plain format (``s``: the transform variable, refused in it)."""
    return _Converter(sympy, params).entry(as_sympy(sympy, x, arg, at), arg, at, s)


def matrix_entries(sympy: Any, x: Any, arg: str) -> Tuple[int, int, List[Any]]:
    """``(rows, cols, entries)`` of a 2-D matrix of numbers or sympy expressions, each checked."""
    if isinstance(x, sympy.MatrixBase):
        rows, cols = x.shape
        flat = list(x)
    else:
        if isinstance(x, (str, bytes)):
            raise ModelError(f"{arg}: expected a 2-D matrix (a sympy Matrix or nested lists), found a string")
        try:
            arr = np.array(x, dtype=object)
        except Exception as exc:
            raise ModelError(f"{arg}: cannot be read as a matrix ({exc})") from None
        if arr.ndim != 2:
            raise ModelError(
                f"{arg}: expected a 2-D matrix (a sympy Matrix or nested lists), found {arr.ndim} dimension(s) "
                f"with shape {arr.shape}"
            )
        rows, cols = arr.shape
        flat = list(arr.reshape(-1))
    entries = [as_sympy(sympy, e, arg, f"entry ({k // max(cols, 1)}, {k % max(cols, 1)})") for k, e in enumerate(flat)]
    return int(rows), int(cols), entries


def matrix_to_plain(
    sympy: Any, matrix: Tuple[int, int, List[Any]], params: Sequence[Any], arg: str, s: Any
) -> PlainMatrix:
    """A checked matrix from :func:`matrix_entries` in the plain format."""
    rows, cols, entries = matrix
    converter = _Converter(sympy, params)
    plain = [
        converter.entry(e, arg, f"entry ({k // max(cols, 1)}, {k % max(cols, 1)})", s) for k, e in enumerate(entries)
    ]
    return rows, cols, plain


class ResultDomain:
    """One sympy domain for a set of plain results: ``ZZ[params]`` when every denominator is
    1, ``QQ[params]`` when every denominator is a constant, else the field ``ZZ(params)``;
    ``QQ`` when there are no parameters."""

    def __init__(self, sympy: Any, params: Sequence[Any], entries: Iterable[PlainEntry]) -> None:
        self.sympy = sympy
        self.params = tuple(params)
        entries = list(entries)
        dens = [d for _, d in entries]
        constant = all(all(not any(e) for e, _, _ in d) for d in dens)
        ones = constant and all(len(d) == 1 and d[0][1] == d[0][2] for d in dens)
        if not self.params:
            self.kind, self.domain = "numbers", sympy.QQ
        elif ones:
            self.kind, self.domain = "integer ring", sympy.ZZ[self.params]
        elif constant:
            self.kind, self.domain = "rational ring", sympy.QQ[self.params]
        else:
            self.kind, self.domain = "field", sympy.ZZ.frac_field(*self.params)

    def _dict(self, plain: Plain) -> Dict[Any, Any]:
        count = len(self.params)
        return {tuple(e) + (0,) * (count - len(e)): (p, q) for e, p, q in plain}

    def element(self, entry: PlainEntry) -> Any:
        """The domain element of a plain entry (every coefficient an integer over 1)."""
        sympy = self.sympy
        num, den = entry
        if self.kind == "numbers":
            n = sum((Fraction(p, q) for _, p, q in num), Fraction(0))
            d = sum((Fraction(p, q) for _, p, q in den), Fraction(0))
            value = n / d
            return sympy.QQ(value.numerator, value.denominator)
        if self.kind == "field":
            field = self.domain.field
            ring = field.ring
            numer = ring.from_dict({e: sympy.ZZ(p // q) for e, (p, q) in self._dict(num).items()})
            denom = ring.from_dict({e: sympy.ZZ(p // q) for e, (p, q) in self._dict(den).items()})
            return field.raw_new(numer, denom)  # already in lowest terms (the core's reduction)
        constant = Fraction(sum(Fraction(p, q) for _, p, q in den))
        ring = self.domain.ring
        if self.kind == "integer ring":
            return ring.from_dict({e: sympy.ZZ(p // q) for e, (p, q) in self._dict(num).items()})
        scaled = {e: Fraction(p, q) / constant for e, (p, q) in self._dict(num).items()}
        return ring.from_dict({e: sympy.QQ(f.numerator, f.denominator) for e, f in scaled.items()})

    def expression(self, entry: PlainEntry) -> Any:
        return self.domain.to_sympy(self.element(entry))

    def poly(self, coefficients: Sequence[PlainEntry], s: Any) -> Any:
        """``sympy.Poly`` in ``s`` of coefficients highest power first."""
        return self.sympy.Poly.from_list([self.element(c) for c in coefficients], s, domain=self.domain)

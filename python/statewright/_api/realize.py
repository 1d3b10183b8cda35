"""Public functions: realizations of SISO transfer functions in the canonical forms.
Each validates its input once (``_base.validate``), calls the Rust core and wraps the result."""

from __future__ import annotations

from typing import Any, Optional

import numpy as np

from .. import _core
from .._base import validate as v
from .._compute import forms as _forms
from .._core import ModelError
from .._results.realization import Realization

__all__ = ["realize", "FORMS"]

FORMS = (
    "controllable_canonical",
    "observable_canonical",
    "controller",
    "observer",
    "controllability",
    "observability",
    "modal",
    "jordan",
)

# The forms the core realizes from float coefficients alone (no tolerance, no info beyond
# the modal form's): the ones the plain-list fast path of ``realize`` serves.
_LIST_FORMS = frozenset(FORMS) - {"jordan"}
#: Argument types the core reads directly (lists item by item, float64 1-D arrays as they are).
_FAST_TYPES = frozenset({list, np.ndarray})


def realize(
    num: Any, den: Any, form: str = "controllable_canonical", *, exact: bool = False, tol: Optional[float] = None
) -> Realization:
    r"""State-space realization of a SISO transfer function in a canonical form.

    After leading zeros are dropped and the denominator is made monic,
    ``G(s) = (b_n s^n + ... + b_0) / (s^n + a_{n-1} s^{n-1} + ... + a_0)`` is split into
    the direct term ``D = [[b_n]]`` and the strictly proper part with numerator
    coefficients ``c_i = b_i - a_i b_n``; the form then places ``a`` and ``c`` (or the
    Markov parameters ``h_k = C A^{k-1} B``) as in the table below. Every form satisfies
    ``C (sI - A)^-1 B + D = num(s) / den(s)``.

    Parameters
    ----------
    num, den : (k,) array_like
        Coefficients, highest power first (s or z alike). ``deg num <= deg den``.
    form : str
        ``"controllable_canonical"`` (phase variables: ones on the superdiagonal, last row
        ``[-a_0, ..., -a_{n-1}]``, ``B = e_n``, ``C = [c_0, ..., c_{n-1}]``),
        ``"observable_canonical"`` (its transpose), ``"controller"`` (first row
        ``[-a_{n-1}, ..., -a_0]``, ones on the subdiagonal, ``B = e_1``,
        ``C = [c_{n-1}, ..., c_0]``), ``"observer"`` (its transpose), ``"controllability"``
        (controllability matrix the identity, ``C = [h_1, ..., h_n]``, the Markov
        parameters of the float data computed exactly and correctly rounded; the form is
        ill-conditioned at high order, its coordinates being the Krylov basis),
        ``"observability"`` (its transpose), ``"modal"`` (real block diagonal of the
        poles, ``[[s, w], [-w, s]]`` per complex pair, by ascending real part; float only)
        or ``"jordan"`` (the real Jordan, or parallel, form: one block per distinct pole, a
        Jordan chain for a repeated pole, ``[[s, w], [-w, s]]`` with ``I`` above it for a
        repeated complex pair; ``B`` the last unit vector of each block, ``C`` the
        partial-fraction residues, highest order first).
    exact : bool
        Compute in exact rational arithmetic: entries are ints, Fractions or decimal
        strings, results are object arrays of :class:`fractions.Fraction`. With
        ``"jordan"`` the denominator is factored over the rationals: a rational pole gives
        a true Jordan block, a factor without rational roots its companion block (chained
        for its powers).
    tol : float, optional
        ``"jordan"`` in float only: poles closer than ``tol`` relative to the larger one
        are one repeated pole. Default ``1e-6`` (an exactly repeated root of multiplicity
        m comes out of the root finder spread by about ``eps**(2/m)``).

    Returns
    -------
    Realization
        n states for ``deg den = n`` (0 states for a pure gain). For ``modal``, ``info``
        holds ``"pole_separation"`` (the smallest relative distance between two poles, the
        existence decision) and ``"separation_limit"`` (``sqrt(eps)``), ``"pole_error"``
        (estimated relative error of the poles against the exact roots of the float
        coefficients) and, as a diagnostic only, ``"eigenvector_condition"`` (condition
        number of the transformation from the balanced companion form; large for poles as
        tame as 1, ..., 10; None when that basis is singular in float64) with
        ``"condition_limit"`` ``1/(n sqrt(eps))`` for comparison.
        For ``jordan`` in float: ``"poles"`` (one per block, upper member of a pair),
        ``"multiplicities"``, ``"residues"`` (per pole, the coefficients of
        ``1/(s - p)^1 .. 1/(s - p)^m``), ``"cluster_spread"`` (largest relative distance
        of a computed root from its pole), ``"tol"``, ``"condition"`` (of the
        transformation from the balanced companion form; None when that basis is singular
        in float64) and ``"transfer_error"`` (the
        verification: largest relative deviation of the result's transfer function from
        ``num/den`` at sample points on the imaginary axis). In exact mode: ``"factors"``
        (monic, highest power first), ``"multiplicities"`` and ``"residues"`` (per factor
        the numerator polynomials of ``1/f^1 .. 1/f^m``).

    Raises
    ------
    ModelError
        Empty ``num`` or ``den``; zero ``den``; improper transfer function; NaN or
        infinity; unknown ``form``; ``modal`` with repeated or nearly repeated poles
        (relative separation below ``sqrt(eps)``; the message names both poles) or with
        ``exact=True``; ``jordan`` when merging the poles within ``tol`` changes the
        transfer function by more than ``max(tol, sqrt(eps))`` relative; ``tol`` with
        another form; a float in exact mode; an order above 4096 (1024 for ``modal``,
        float ``jordan``, float ``controllability`` and ``observability``, 256 for exact
        ``jordan``), refused before anything of that size
        is allocated.

    Notes
    -----
    The companion forms involve no rounding beyond the normalisation by the leading
    denominator coefficient. The modal form takes the balanced companion matrix's
    eigenvalues as starting values only and refines them as roots of the denominator
    (Aberth iteration in double-double), so its poles are the exact roots of the float
    coefficients, rounded, and each residue ``c(p)/a'(p)`` is split between ``B`` and
    ``C`` by a power of two (``B_k C_k`` is the rounded residue). The Jordan form clusters
    those roots; see ``DEVELOPERS.md``.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> r = sw.realize([0.5, 4], [1, 1.2, 5], "observable_canonical")   # (0.5 s + 4) / (s^2 + 1.2 s + 5)
    >>> r.a
    array([[ 0. , -5. ],
           [ 1. , -1.2]])
    >>> bool(np.allclose(r.evaluate(1j), (0.5j + 4) / ((1j) ** 2 + 1.2j + 5)))
    True

    A double pole by hand, ``(s + 2)/((s + 1)^2 (s + 3)) = (1/4)/(s + 1) + (1/2)/(s + 1)^2
    - (1/4)/(s + 3)``, in the exact Jordan form:

    >>> j = sw.realize([1, 2], [1, 5, 7, 3], "jordan", exact=True)
    >>> [[str(x) for x in row] for row in j.a]
    [['-3', '0', '0'], ['0', '-1', '1'], ['0', '0', '-1']]
    >>> [str(x) for x in j.c[0]], [str(x) for x in j.b[:, 0]]
    (['-1/4', '1/2', '1/4'], ['1', '0', '1'])
    """
    if (
        tol is None
        and exact is False
        and type(form) is str
        and form in _LIST_FORMS
        and type(num) in _FAST_TYPES
        and type(den) in _FAST_TYPES
    ):
        # Fast path of single calls on plain lists and float64 arrays: the core reads them
        # itself and checks finiteness and shape. On anything it refuses (a TypeError for
        # what it cannot read as float64 numbers, an int too large for a float, or a
        # ModelError) the full validation below runs, so every refusal names the argument
        # and the fault exactly as it would without this path.
        try:
            (a, b, c, d), info = _core.realize_float(num, den, form)
        except (TypeError, OverflowError, ModelError):
            pass
        else:
            return Realization._trusted(a, b, c, d, info, frozen=True)
    form = v.check_option(form, "form", FORMS)
    tol = v.tol(tol)
    if tol is not None and form != "jordan":
        raise ModelError(f"tol: only form='jordan' takes a tolerance, not form={form!r}")
    if form == "jordan":
        if v.check_flag(exact, "exact"):
            if tol is not None:
                raise ModelError("tol: the exact Jordan form factors exactly and takes no tolerance")
            fa, fb, fc, fd, info = _forms.jordan_exact(v.exact_polynomial(num, "num"), v.exact_polynomial(den, "den"))
            return Realization._trusted(fa, fb, fc, fd, info)
        a, b, c, d, info = _forms.jordan_float(
            v.float_polynomial(num, "num", check_finite=False), v.float_polynomial(den, "den", check_finite=False), tol
        )
        return Realization._trusted(a, b, c, d, info, frozen=True)
    if v.check_flag(exact, "exact"):
        n_in = v.exact_polynomial(num, "num")
        d_in = v.exact_polynomial(den, "den")
        ea, eb, ec, ed = _core.realize_exact(v.to_core(n_in), v.to_core(d_in), form)
        fa, fb, fc, fd = (v.fraction_array(x, (x[0], x[1])) for x in (ea, eb, ec, ed))
        return Realization._trusted(fa, fb, fc, fd)
    (a, b, c, d), info = _core.realize_float(
        v.float_polynomial(num, "num", check_finite=False), v.float_polynomial(den, "den", check_finite=False), form
    )
    return Realization._trusted(a, b, c, d, info, frozen=True)

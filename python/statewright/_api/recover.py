"""Public functions: transfer-function recovery (Faddeev–LeVerrier). Each validates its input once
(``_base.validate``), calls the Rust core (through ``_compute.recover``) and returns arrays."""

from __future__ import annotations

from typing import Any, Dict, Literal, Tuple, Union, overload

import numpy as np

from .. import _core
from .._base import validate as v
from .._compute import hessenberg as compute_hessenberg
from .._compute import recover as compute
from .._compute.recover import METHODS

__all__ = [
    "faddeev_leverrier",
    "characteristic_polynomial",
    "transfer_function",
]


def faddeev_leverrier(a: Any, *, exact: bool = False, method: str = "auto") -> Tuple[np.ndarray, np.ndarray]:
    r"""Characteristic polynomial and adjugate sequence of A by the Faddeev–LeVerrier recursion.

    ``det(sI - A) = s^n + c_1 s^{n-1} + ... + c_n`` and
    ``adj(sI - A) = N_0 s^{n-1} + N_1 s^{n-2} + ... + N_{n-1}`` with ``N_0 = I``,
    ``c_k = -tr(A N_{k-1}) / k``, ``N_k = A N_{k-1} + c_k I``.

    Parameters
    ----------
    a : (n, n) array_like
    exact : bool
        Exact rational input and output (object arrays of Fractions).
    method : {"auto", "recursion", "exact"}
        For float data (see :func:`transfer_function` for the accuracy of each;
        ``"hessenberg"`` gives no adjugates and is refused here). Here the
        exact evaluation runs the recursion in big integers (the adjugates need it), so
        with ``method="auto"`` an order above 64 whose double-double result cannot be
        certified raises ModelError rather than take minutes.

    Returns
    -------
    coeffs : (n + 1,) ndarray
        ``[1, c_1, ..., c_n]``.
    adjugates : (n, n, n) ndarray
        ``N_0 .. N_{n-1}``.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> coeffs, adj = sw.faddeev_leverrier([[0, 1], [-2, -3]])
    >>> coeffs
    array([1., 3., 2.])
    >>> adj[1]          # adj(sI - A) = I s + N_1
    array([[ 3.,  1.],
           [-2.,  0.]])
    """
    if v.check_flag(exact, "exact"):
        am = v.require_square(v.exact_matrix(a, "a"))
        n = am.shape[0]
        exact_coeffs, exact_adj = _core.faddeev_leverrier_exact(v.to_core(am), True)
        adj_arr = np.empty((n, n, n), dtype=object)
        for k, m in enumerate(exact_adj):
            adj_arr[k] = v.fraction_array(m, (n, n))
        return v.fraction_array(exact_coeffs, (n + 1,)), adj_arr
    method = v.check_option(method, "method", METHODS)
    am = v.require_square(v.float_matrix(a, "a"))
    coeffs, adj, _ = _core.faddeev_leverrier_float(am, method, True)
    return coeffs, adj


def characteristic_polynomial(a: Any, *, exact: bool = False, method: str = "auto") -> np.ndarray:
    r"""Coefficients ``[1, c_1, ..., c_n]`` of ``det(sI - A)``, highest power first.

    Float data: ``method="auto"`` returns the certified double-double Faddeev–LeVerrier
    result when its running error bound certifies every coefficient to 2^-56 relative (so
    the float64 result is within 0.625 ulp), and otherwise the exact characteristic
    polynomial of the float data (multi-modular Hessenberg method) rounded once, every
    coefficient correctly rounded. ``method="hessenberg"``: orthogonal Hessenberg
    reduction and La Budde's recurrence, backward stable, O(n^3), not correctly rounded
    (see :func:`transfer_function`). ``method="recursion"``: plain float64.

    Examples
    --------
    >>> import statewright as sw
    >>> sw.characteristic_polynomial([[1, 2], [3, 4]], exact=True).tolist()
    [Fraction(1, 1), Fraction(-5, 1), Fraction(-2, 1)]
    """
    if v.check_flag(exact, "exact"):
        am = v.require_square(v.exact_matrix(a, "a"))
        exact_coeffs, _ = _core.faddeev_leverrier_exact(v.to_core(am), False)
        return v.fraction_array(exact_coeffs, (am.shape[0] + 1,))
    method = v.check_option(method, "method", METHODS)
    am = v.require_square(v.float_matrix(a, "a"))
    if method == "hessenberg":
        return compute_hessenberg.characteristic_polynomial_hessenberg(am)[0]
    coeffs, _, _ = _core.faddeev_leverrier_float(am, method, False)
    return coeffs


@overload
def transfer_function(
    a: Any,
    b: Any,
    c: Any,
    d: Any,
    *,
    exact: bool = ...,
    method: str = ...,
    return_accuracy: Literal[False] = ...,
) -> Tuple[np.ndarray, np.ndarray]: ...
@overload
def transfer_function(
    a: Any,
    b: Any,
    c: Any,
    d: Any,
    *,
    exact: bool = ...,
    method: str = ...,
    return_accuracy: Literal[True],
) -> Tuple[np.ndarray, np.ndarray, Dict[str, Any]]: ...
@overload
def transfer_function(
    a: Any,
    b: Any,
    c: Any,
    d: Any,
    *,
    exact: bool = ...,
    method: str = ...,
    return_accuracy: bool,
) -> Union[Tuple[np.ndarray, np.ndarray], Tuple[np.ndarray, np.ndarray, Dict[str, Any]]]: ...
def transfer_function(
    a: Any,
    b: Any,
    c: Any,
    d: Any,
    *,
    exact: bool = False,
    method: str = "auto",
    return_accuracy: bool = False,
) -> Union[Tuple[np.ndarray, np.ndarray], Tuple[np.ndarray, np.ndarray, Dict[str, Any]]]:
    r"""Transfer matrix ``C (sI - A)^-1 B + D = num(s) / den(s)`` of a state-space model.

    ``num = C adj(sI - A) B + det(sI - A) D`` from the Faddeev–LeVerrier sequence:
    the coefficient of ``s^{n-k}`` is ``C N_{k-1} B + c_k D`` (and ``D`` for ``s^n``).

    Parameters
    ----------
    a, b, c, d : array_like
        ``(n, n)``, ``(n, m)``, ``(p, n)``, ``(p, m)``.
    exact : bool
        Exact rational data in and out (object arrays of Fractions).
    method : {"auto", "recursion", "exact", "hessenberg"}
        How float data are evaluated:

        * ``"auto"`` (default): the recursion in double-double arithmetic carrying a
          componentwise running error bound; accepted when the bound certifies every
          coefficient to 2^-56 relative before the final rounding (so the float64 result
          is within 0.625 ulp of the exact value), otherwise the ``"exact"`` evaluation.
        * ``"exact"``: the exact characteristic polynomial and numerators of the float data
          (each float64 is a dyadic rational), each coefficient rounded once: correctly
          rounded, however spread the eigenvalues. Computed by Hessenberg reductions modulo
          word-size primes and Chinese remaindering (numerators from the Markov parameters
          modulo the same primes): about 5 ms at n = 20 and 35 ms at n = 40 with spread
          poles.
        * ``"recursion"``: the plain float64 recursion, unchecked. Accurate for small,
          well-scaled models; catastrophically inaccurate when eigenvalue magnitudes are
          spread (relative errors of 1e-1 at n = 8 over four decades, far worse at n = 20).
        * ``"hessenberg"``: for each input, an orthogonal Householder reduction of A to
          upper Hessenberg form with that input's column of B along the first axis, La
          Budde's recurrence for the characteristic polynomials of all trailing blocks, and
          the numerators from the first column of the Hessenberg adjugate (products of
          subdiagonal entries times those polynomials). Backward stable, O(n^3) per input,
          no growth with the bit length of the data; not correctly rounded: like every
          backward-stable route, small coefficients of models with spread eigenvalues lose
          relative accuracy. Comes with an a-posteriori estimate (not a bound) of every
          coefficient's error.
    return_accuracy : bool
        Also return ``{"method": ..., "relative_error_bound": ...}`` saying which
        evaluation was used and its bound on the relative error of every coefficient
        (None when nothing is certified, as can happen with ``method="recursion"`` and
        always with ``"hessenberg"``). With ``method="hessenberg"`` the dictionary also has
        ``"relative_error_estimate"`` (largest estimated relative error, None where an
        estimate reaches its coefficient), ``"num_error_estimate"`` (p, m, n + 1) and
        ``"den_error_estimate"`` (n + 1,): estimated absolute errors, first order in the
        unit roundoff, of each coefficient.

    Returns
    -------
    num : (p, m, n + 1) ndarray
        Numerators on the common power grid ``s^n .. s^0``.
    den : (n + 1,) ndarray
        The monic ``det(sI - A)``.

    Raises
    ------
    ModelError
        Shapes that do not fit, NaN or infinity, a result outside the float64 range; an
        order above 256 (the recursion costs about n**4 operations); an exact evaluation
        (``method="exact"``, or the fallback of ``"auto"``) whose estimated time exceeds
        30 s, judged before any work from the order and the bit length of the data
        (``method="recursion"`` returns the unchecked float64 value). ``exact=True``
        answers to the same 30 s budget.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> num, den = sw.transfer_function([[0, 1], [-2, -3]], [[0], [1]], [[3, 1]], [[0]])
    >>> num[0, 0], den
    (array([0., 1., 3.]), array([1., 3., 2.]))
    >>> num, den, acc = sw.transfer_function([[0, 1], [-2, -3]], [[0], [1]], [[3, 1]], [[0]],
    ...                                      method="hessenberg", return_accuracy=True)
    >>> bool(np.allclose(den, [1, 3, 2])), acc["relative_error_estimate"] < 1e-13
    (True, True)
    """
    if v.check_flag(exact, "exact"):
        mats = [v.exact_matrix(x, name) for x, name in zip((a, b, c, d), "abcd")]
        v.check_model_shapes(*mats)
        result = compute.transfer_function_exact(mats[0], mats[1], mats[2], mats[3])
        if v.check_flag(return_accuracy, "return_accuracy"):
            return result + ({"method": "exact rational arithmetic", "relative_error_bound": 0.0},)
        return result
    method = v.check_option(method, "method", METHODS)
    if method == "hessenberg":
        num, den, accuracy = compute_hessenberg.transfer_function_hessenberg(*v.float_model(a, b, c, d))
    else:
        # the core copies the matrices and checks their finiteness (same message)
        num, den, accuracy = compute.transfer_function_float(*v.float_model_for_core(a, b, c, d), method)
    if v.check_flag(return_accuracy, "return_accuracy"):
        return num, den, accuracy
    return num, den

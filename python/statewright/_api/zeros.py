"""Zeros and gains: invariant and transmission zeros, normal rank, DC gain, and the
zeros-poles-gain form of a SISO transfer function. The computations are in the Rust core
(``src/zeros``); this module validates input and wraps results."""

from __future__ import annotations

import numbers
from typing import Any, Optional, Tuple

import numpy as np

from .._base import validate as v
from .._compute import zeros as compute
from .._core import ModelError
from .._results.realization import Realization
from .realize import FORMS

__all__ = [
    "invariant_zeros",
    "transmission_zeros",
    "normal_rank",
    "dc_gain",
    "zeros_poles_gain",
    "realize_zeros_poles_gain",
    "invariant_zeros_batch",
]


def invariant_zeros(a: Any, b: Any, c: Any, d: Any, *, tol: Optional[float] = None, return_info: bool = False) -> Any:
    r"""The finite invariant zeros of a state-space model.

    The complex ``z`` at which the system pencil ``[[A - z I, B], [C, D]]`` loses rank below
    its normal rank, for square and non-square models alike. They include the input- and
    output-decoupling zeros (uncontrollable or unobservable modes); see
    :func:`transmission_zeros` for the zeros of the transfer matrix alone.

    Parameters
    ----------
    a, b, c, d : (n, n), (n, m), (p, n), (p, m) array_like
    tol : float, optional
        Relative tolerance of the rank decisions: singular values above ``tol * ||S||_F``
        count, ``S`` the system matrix ``[[A, B], [C, D]]`` after balancing by powers of two
        (states, inputs and outputs). Default ``N**2 * eps`` with ``N = n + max(m, p)``, so
        the decisions do not depend on the units of states, inputs or outputs.
    return_info : bool, optional
        Also return a dict: ``normal_rank``, ``tol``, ``norm``, ``regular_order`` (order of
        the regular pencil solved), ``decisions`` (the singular values of every rank
        decision), ``residual`` (largest relative smallest-singular-value of the pencil at
        the verified zeros), ``verified`` (how many were checked), ``refined`` (whether
        the zeros of a SISO model of order <= 40 were refined against its numerator
        polynomial, see Notes), ``refinement_move`` (the largest relative move) and
        ``candidate_tol`` (the relative tol of an accepted candidate reduction, see
        Notes; None when the default decisions stand).

    Returns
    -------
    zeros : (k,) complex ndarray
        Sorted by ascending real part, then imaginary part; complex zeros in exact
        conjugate pairs. ``k <= n``.

    Raises
    ------
    ModelError
        Bad input (naming the argument), a computed zero that fails the check against the
        pencil, or a zero beyond the float64 range.

    Notes
    -----
    Emami-Naeini and Van Dooren (Automatica, 1982): orthogonal staircase steps reduce the
    pencil to a regular one with the same finite zeros, whose generalized eigenvalues are
    found by the QZ algorithm. Backward stable: for models with poles over several decades
    the zeros are far more accurate than the roots of the recovered numerator polynomial.
    For a SISO model (order <= 40) the pencil zeros then start Aberth-Ehrlich steps in
    double-double on the numerator polynomial, whose coefficients the recovery certifies
    (or computes exactly and rounds once, while the entries' binary exponents span at most
    200 bits): the pencil's absolute error ``eps * ||A||`` would otherwise
    cost the small zeros their relative accuracy when poles spread over many decades. The
    refined zeros are kept only if every one converges and stays within ``1e-6``
    (relative) of its pencil value. Every zero is checked against the (balanced) system
    pencil within a work budget. A non-square model's zeros (or those of a model whose
    normal rank is below min(m, p)) are a non-generic structure: rounding amplified along
    the reduction can keep a singular value that exact data would make zero, and the zeros
    it carries would be missed. Under the default tol the kept values between the
    threshold and ``sqrt(eps) * ||S||_F`` (at most four) are therefore tried as thresholds,
    and a candidate is accepted only when it keeps the normal rank, contains every zero
    found before and more, and each cluster of q coincident zeros makes the q smallest
    relevant singular values of the pencil at most ``100 * N * eps`` relative (zeros of a
    pencil within rounding of the data). ``scripts/nonsquare_zeros_survey.py``: 480 of 480
    planted non-square models right against an exact reference (451 without the search),
    none of 240 random integer models given a zero they do not have.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> r = sw.realize([1.0, 3.0, 2.0], [1.0, 6.0, 11.0, 6.0])   # (s+1)(s+2) / den
    >>> z = sw.invariant_zeros(*r)
    >>> bool(np.allclose(z, [-2.0, -1.0]))
    True
    """
    am, bm, cm, dm = v.float_model(a, b, c, d)
    zeros, info = compute.invariant_zeros(am, bm, cm, dm, v.tol(tol))
    return (zeros, info) if v.check_flag(return_info, "return_info") else zeros


def transmission_zeros(a: Any, b: Any, c: Any, d: Any, *, tol: Optional[float] = None) -> np.ndarray:
    r"""The zeros of the transfer matrix: invariant zeros of a minimal realization.

    Uncontrollable and unobservable modes (decoupling zeros) are removed first by
    :func:`minimal_realization` (its default tol); ``tol`` is that of
    :func:`invariant_zeros`.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> a = np.diag([-1.0, -5.0]); b = [[1.0], [0.0]]; c = [[1.0, 1.0]]; d = [[0.0]]
    >>> sw.invariant_zeros(a, b, c, d)          # the uncontrollable mode at -5
    array([-5.+0.j])
    >>> sw.transmission_zeros(a, b, c, d)       # G = 1/(s+1) has none
    array([], dtype=complex128)
    """
    am, bm, cm, dm = v.float_model(a, b, c, d)
    return compute.invariant_zeros(am, bm, cm, dm, v.tol(tol), transmission=True)[0]


def normal_rank(a: Any, b: Any, c: Any, d: Any, *, tol: Optional[float] = None) -> int:
    r"""The normal rank of the transfer matrix ``G(s) = C (sI - A)^{-1} B + D``: its rank
    at almost every ``s``, from the same pencil reduction as :func:`invariant_zeros`
    (same ``tol``).

    Examples
    --------
    >>> import statewright as sw
    >>> sw.normal_rank([[-1.0]], [[1.0, 2.0]], [[1.0], [3.0]], [[0.0, 0.0], [0.0, 0.0]])
    1
    """
    am, bm, cm, dm = v.float_model(a, b, c, d)
    return compute.normal_rank(am, bm, cm, dm, v.tol(tol))


def dc_gain(a: Any, b: Any, c: Any, d: Any, *, discrete: bool = False) -> np.ndarray:
    r"""The steady-state gain ``G(0) = D - C A^{-1} B`` (``G(1) = D + C (I - A)^{-1} B`` when
    ``discrete``), shape (p, m).

    Computed by an LU solve (never an explicit inverse) on the model balanced by powers of
    two. When ``A`` (or ``I - A``) is numerically singular (smallest singular value at most
    ``n * eps * ||M||_F``) the minimal realization is tried, since a cancelled pole at 0
    (or 1) leaves the gain finite. When that removes no state, the pole is steered and
    seen and the gain is refused; when it removes some, its M is judged singular within
    ``sqrt(eps) * ||M||_F``, because the reduction's rounding moves a pole that stays at
    0 (or 1) by more than ``n * eps``.

    Raises
    ------
    ModelError
        Bad input, or a pole at s = 0 (z = 1) that the inputs steer and the outputs see
        (the gain is infinite; the message names it).

    Examples
    --------
    >>> import statewright as sw
    >>> r = sw.realize([1.0, 2.0], [1.0, 4.0, 3.0])   # (s + 2) / ((s + 1)(s + 3))
    >>> sw.dc_gain(*r)
    array([[0.66666667]])
    """
    am, bm, cm, dm = v.float_model(a, b, c, d)
    return compute.dc_gain(am, bm, cm, dm, v.check_flag(discrete, "discrete"))[0]


def zeros_poles_gain(num: Any, den: Any) -> Tuple[np.ndarray, np.ndarray, float]:
    r"""Zeros, poles and gain of a SISO transfer function ``num / den``:
    ``G(s) = k (s - z_1)...(s - z_q) / ((s - p_1)...(s - p_n))``.

    Parameters
    ----------
    num, den : 1-D array_like
        Coefficients, highest power first; leading zeros are dropped. Proper
        (``deg num <= deg den``).

    Returns
    -------
    zeros, poles : complex ndarray
        Roots of ``num`` and ``den`` (companion eigenvalues with balancing), each sorted by
        ascending real part, then imaginary part.
    gain : float
        The ratio of the leading coefficients (0 for a zero numerator).

    Examples
    --------
    >>> import statewright as sw
    >>> z, p, k = sw.zeros_poles_gain([2.0, 2.0], [1.0, 3.0, 2.0])
    >>> z, p, k
    (array([-1.+0.j]), array([-2.+0.j, -1.+0.j]), 2.0)
    """
    n_in = v.float_polynomial(num, "num")
    d_in = v.float_polynomial(den, "den")
    return compute.zeros_poles_gain(n_in, d_in)


def _roots(x: Any, arg: str) -> np.ndarray:
    if x is None or isinstance(x, (str, bytes, dict, set)):
        raise ModelError(f"{arg}: expected a 1-D array of (complex) numbers, found a {type(x).__name__}")
    try:
        arr = np.array(x, dtype=np.complex128, copy=True).reshape(-1) if np.ndim(x) <= 1 else None
    except (TypeError, ValueError, OverflowError) as exc:
        raise ModelError(f"{arg}: cannot be read as complex numbers ({exc})") from None
    if arr is None:
        raise ModelError(f"{arg}: expected a 1-D array of (complex) numbers, found shape {np.shape(x)}")
    if not np.all(np.isfinite(arr)):
        raise ModelError(f"{arg}: contains NaN or infinity; all values must be finite")
    return arr


def realize_zeros_poles_gain(zeros: Any, poles: Any, gain: Any, form: str = "controllable_canonical") -> Realization:
    r"""A realization of ``gain * (s - z_1)...(s - z_q) / ((s - p_1)...(s - p_n))``.

    Complex zeros and poles must come in conjugate pairs (they are matched to a relative
    ``64 eps``), so the realization is real; each pair enters as the real quadratic factor
    ``s^2 - 2 Re(z) s + |z|^2``. ``form`` is any form of :func:`realize`.

    Raises
    ------
    ModelError
        A complex value without its conjugate (naming ``zeros`` or ``poles``), more zeros
        than poles, non-finite values, an unknown form.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> r = sw.realize_zeros_poles_gain([-1 + 2j, -1 - 2j], [-1.0, -2.0, -3.0], 3.0)
    >>> num, den = r.transfer_function()
    >>> num[0, 0], den
    (array([ 0.,  3.,  6., 15.]), array([ 1.,  6., 11.,  6.]))
    """
    form = v.check_option(form, "form", FORMS)
    z, p = _roots(zeros, "zeros"), _roots(poles, "poles")
    if isinstance(gain, (bool, np.bool_)) or not isinstance(gain, numbers.Real):
        raise ModelError(f"gain: expected a real number, found a {type(gain).__name__}")
    try:
        k = float(gain)
    except OverflowError:
        raise ModelError(f"gain: {gain!r} is beyond the float64 range") from None
    a, b, c, d = compute.realize_zeros_poles_gain(z, p, k, form)
    return Realization._trusted(a, b, c, d, frozen=True)


def invariant_zeros_batch(
    a: Any, b: Any, c: Any, d: Any, *, tol: Optional[float] = None
) -> Tuple[np.ndarray, np.ndarray]:
    r"""Invariant zeros of N models of one shape, in parallel (GIL released).

    Parameters
    ----------
    a, b, c, d : (N, n, n), (N, n, m), (N, p, n), (N, p, m) array_like
    tol : float, optional
        As :func:`invariant_zeros`.

    Returns
    -------
    zeros : (N, n) complex ndarray
        Row i holds the ``counts[i]`` zeros of model i (sorted as by
        :func:`invariant_zeros`, bit for bit the same), then zeros as padding.
    counts : (N,) int64 ndarray

    Raises
    ------
    ModelError
        Naming the index of the first failing model; nothing of the batch is returned.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> a = np.array([[[-1.0]], [[-2.0]]]); b = np.ones((2, 1, 1)); c = np.ones((2, 1, 1))
    >>> d = np.array([[[1.0]], [[0.0]]])
    >>> zeros, counts = sw.invariant_zeros_batch(a, b, c, d)
    >>> zeros, counts
    (array([[-2.+0.j],
           [ 0.+0.j]]), array([1, 0]))
    """
    am = v.float_stack(a, "a", 3, "(N, n, n)")
    bm = v.float_stack(b, "b", 3, "(N, n, m)")
    cm = v.float_stack(c, "c", 3, "(N, p, n)")
    dm = v.float_stack(d, "d", 3, "(N, p, m)")
    for name, x in (("b", bm), ("c", cm), ("d", dm)):
        if x.shape[0] != am.shape[0]:
            raise ModelError(f"{name}: expected {am.shape[0]} models (as a), found shape {x.shape}")
    return compute.invariant_zeros_batch(am, bm, cm, dm, v.tol(tol))

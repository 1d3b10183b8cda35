"""Continuous and discrete time: sampling a continuous model, recovering the continuous
model behind a discrete one, and frequency responses, for single models and batches. The
computations are in the Rust core (``src/time``); this module validates input and wraps
results."""

from __future__ import annotations

import math
from typing import Any, Optional, Tuple

import numpy as np

from .. import _core
from .._base import time_base as tb
from .._base import validate as v
from .._compute import time as compute
from .._core import ModelError
from .._results.realization import Realization

__all__ = [
    "to_discrete",
    "to_continuous",
    "frequency_response",
    "frequency_response_batch",
    "to_continuous_batch",
]

Arrays4 = Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]


_FLOAT_METHODS = frozenset(tb.METHODS)


def _convert(
    a: Any, b: Any, c: Any, d: Any, sample_time: Any, method: str, prewarp_frequency: Any, exact: Any, forward: bool
) -> Realization:
    exact = v.check_flag(exact, "exact")
    method = tb.method(method, exact)
    prewarp = tb.prewarp_frequency(prewarp_frequency, exact)
    if exact:
        arrays = tuple(v.exact_matrix(x, name) for x, name in zip((a, b, c, d), "abcd"))
        v.check_model_shapes(*arrays)
        t = tb.exact_sample_time(sample_time)
        out = compute.convert_exact(arrays, t, method, forward)  # type: ignore[arg-type]
        info = {"method": method, "sample_time": t}
        return Realization._trusted(*out, info, sample_time=t if forward else None)
    # The core copies the matrices and checks their finiteness.
    model = v.float_model_for_core(a, b, c, d)
    seconds = tb.sample_time(sample_time)
    out, info = compute.convert(model, seconds, method, prewarp, forward)
    return Realization._trusted(*out, info, frozen=True, sample_time=seconds if forward else None, owned=True)


def to_discrete(
    a: Any,
    b: Any,
    c: Any,
    d: Any,
    sample_time: Any,
    method: str = "zero_order_hold",
    *,
    prewarp_frequency: Optional[float] = None,
    exact: bool = False,
) -> Realization:
    r"""The discrete-time model of a continuous one sampled every ``sample_time`` seconds.

    ``x[k+1] = A_d x[k] + B_d u[k]``, ``y[k] = C_d x[k] + D_d u[k]``, one step per
    ``sample_time`` seconds, from ``x' = A x + B u``, ``y = C x + D u``.

    Parameters
    ----------
    a, b, c, d : array_like
        The continuous model: ``(n, n)``, ``(n, m)``, ``(p, n)``, ``(p, m)``.
    sample_time : float (or Fraction with ``exact=True``)
        Seconds per step, positive.
    method : str, optional
        ``"zero_order_hold"`` (default: the input held constant over each step; exact for
        a plant behind a sample-and-hold), ``"first_order_hold"`` (the input interpolated
        linearly between samples), ``"impulse_invariant"`` (``h_d[k] = T h_c(kT)``; needs
        D = 0), ``"bilinear"`` (``s = (2/T)(z - 1)/(z + 1)``), ``"forward_difference"``
        (``s = (z - 1)/T``), ``"backward_difference"`` (``s = (z - 1)/(T z)``).
    prewarp_frequency : float, optional
        For ``"bilinear"`` only: a frequency in rad/s, strictly between 0 and the Nyquist
        frequency ``pi / sample_time``, at which the discrete frequency response equals the
        continuous one (``T`` in the map replaced by ``2 tan(w0 T / 2) / w0``).
    exact : bool, optional
        Exact rational arithmetic (ints, Fractions or decimal strings in, Fractions out),
        offered for the rational methods ``"bilinear"``, ``"forward_difference"`` and
        ``"backward_difference"`` (no prewarping: tan is not rational).

    Returns
    -------
    Realization
        The discrete model with ``.sample_time`` set. ``.info`` holds ``"method"``,
        ``"sample_time"``, and the figures of the computation: ``"pade_degree"`` and
        ``"squarings"`` of the matrix exponential, or ``"condition"`` (the 1-norm condition
        number of the inverted matrix ``I - alpha T A``) and ``"effective_step"`` for the
        rational maps.

    Raises
    ------
    ModelError
        For bad shapes or entries, a sample time that is not positive and finite, an unknown
        method, a prewarp frequency outside (0, pi/T) or given for another method, D != 0
        with ``"impulse_invariant"``, a map that is singular at A (an eigenvalue ``2/T`` for
        the bilinear map, ``1/T`` for the backward difference), an exponential that
        overflows, or ``exact=True`` with a method that needs the exponential.

    Notes
    -----
    The holds and impulse invariance use the matrix exponential by scaling and squaring
    with Padé approximants (Higham, SIAM J. Matrix Anal. Appl. 2005); the zero-order hold
    is the exponential of one block matrix ``[[A, B], [0, 0]] T`` (Van Loan, IEEE TAC
    1978), so a singular A (integrators) needs no special case. B is balanced against A by
    a power of two first (exact). The rational maps invert ``I - alpha T A`` once
    (alpha = 1/2, 0, 1). Every method runs on a copy of the model whose states are
    balanced by powers of two (Parlett & Reinsch, Numer. Math. 1969; exact, only exponents
    change) and the result is scaled back to the given state coordinates, so states in
    very different units (a norm of A far above its spectral radius) do not cost the
    squarings their accuracy.

    Examples
    --------
    A first-order lag ``1/(s + 1)`` held every 0.5 s:

    >>> import numpy as np
    >>> import statewright as sw
    >>> r = sw.to_discrete([[-1.0]], [[1.0]], [[1.0]], [[0.0]], 0.5)
    >>> bool(np.isclose(r.a[0, 0], np.exp(-0.5))), bool(np.isclose(r.b[0, 0], 1 - np.exp(-0.5)))
    (True, True)
    >>> r.sample_time
    0.5
    """
    if exact is False and prewarp_frequency is None:
        # The commonest call (a small model as float64 arrays, a float sample time, the
        # zero-order hold): checked and converted in one core call; None for anything
        # else, which then takes the paths below (same core routine, same messages).
        plain = _core.zero_order_hold_plain(a, b, c, d, sample_time, method)
        if plain is not None:
            return Realization._from_core(*plain, sample_time)
    if (
        exact is False
        and prewarp_frequency is None
        and type(sample_time) is float
        and 0.0 < sample_time < math.inf
        and type(method) is str
        and method in _FLOAT_METHODS
    ):
        # Fast path for the common call (a float sample time, a known method name, no
        # options): the checks of _convert would pass unchanged; the model is checked as
        # always, by the same function.
        (ra, rb, rc, rd), info = compute.convert(v.float_model_for_core(a, b, c, d), sample_time, method, None, True)
        return Realization._from_core(ra, rb, rc, rd, info, sample_time)
    return _convert(a, b, c, d, sample_time, method, prewarp_frequency, exact, True)


def to_continuous(
    a: Any,
    b: Any,
    c: Any,
    d: Any,
    sample_time: Any,
    method: str = "zero_order_hold",
    *,
    prewarp_frequency: Optional[float] = None,
    exact: bool = False,
) -> Realization:
    r"""The continuous-time model whose discretization by ``method`` is the given model.

    The inverse of :func:`to_discrete` for the same method and sample time: time constants
    in seconds from a model identified in steps.

    Parameters
    ----------
    a, b, c, d : array_like
        The discrete model: ``(n, n)``, ``(n, m)``, ``(p, n)``, ``(p, m)``.
    sample_time : float (or Fraction with ``exact=True``)
        Seconds per step of the discrete model, positive.
    method : str, optional
        As for :func:`to_discrete`; default ``"zero_order_hold"``.
    prewarp_frequency : float, optional
        For ``"bilinear"`` only, as for :func:`to_discrete`.
    exact : bool, optional
        Exact rational arithmetic for the rational methods.

    Returns
    -------
    Realization
        The continuous model (``.sample_time`` is None). ``.info`` holds ``"method"``,
        ``"sample_time"`` and, for the methods through the logarithm, ``"square_roots"``
        and ``"residual"``: the relative difference between the given model and the
        discretization of the result (verified; refused above 1e-8).

    Raises
    ------
    ModelError
        As :func:`to_discrete`, and: an eigenvalue of A on the closed negative real axis
        (named in the message) for the methods through the logarithm, which then have no
        real continuous equivalent; an eigenvalue -1 of A for ``"bilinear"`` or 0 for
        ``"backward_difference"``; a D that is not ``C B T`` for ``"impulse_invariant"``;
        a verification residual above 1e-8.

    Notes
    -----
    The zero-order hold is inverted by the principal logarithm of the block matrix
    ``[[A_d, B_d], [0, I]]`` (inverse scaling and squaring: square roots by the product
    form of the Denman–Beavers iteration, then an [8/8] Padé approximant in partial
    fractions; Cheng, Higham, Kenney and Laub, SIAM J. Matrix Anal. Appl. 2001), which
    exists and is real exactly when no eigenvalue of A_d lies on the closed negative real
    axis; a pole at z = 1 (an integrator) is an ordinary case. A continuous model with
    oscillations above the Nyquist frequency ``pi / T`` comes back aliased (the principal
    logarithm): the round trip is the identity below it. As for :func:`to_discrete`, the
    computation and its verification run in state coordinates balanced by powers of two,
    and the result is scaled back to the given ones (exact).

    Examples
    --------
    >>> import numpy as np
    >>> import statewright as sw
    >>> r = sw.to_continuous([[np.exp(-0.5)]], [[1 - np.exp(-0.5)]], [[1.0]], [[0.0]], 0.5)
    >>> np.round(r.a, 12), np.round(r.b, 12)
    (array([[-1.]]), array([[1.]]))
    """
    return _convert(a, b, c, d, sample_time, method, prewarp_frequency, exact, False)


def frequency_response(
    a: Any, b: Any, c: Any, d: Any, frequencies: Any, *, sample_time: Optional[float] = None
) -> np.ndarray:
    r"""The frequency response ``G(jw) = C (jwI - A)^-1 B + D`` at k frequencies.

    In discrete time (``sample_time`` given) ``G(exp(jwT))``.

    Parameters
    ----------
    a, b, c, d : array_like
        The model: ``(n, n)``, ``(n, m)``, ``(p, n)``, ``(p, m)``.
    frequencies : (k,) array_like
        Frequencies in rad/s (any sign, finite).
    sample_time : float, optional
        None (default) for a continuous model, else seconds per step of a discrete one.

    Returns
    -------
    (k, p, m) complex ndarray
        ``G`` at each frequency.

    Raises
    ------
    ModelError
        For bad shapes or entries, a sample time that is not positive and finite, and a
        frequency at a pole of the model (``sI - A`` singular to working precision: a pivot
        of the elimination at or below ``n eps (||H||_1 + |s|)``), naming its index.

    Notes
    -----
    Laub (IEEE TAC 1981): one orthogonal Hessenberg reduction ``A = Q H Q^T``, then per
    frequency Gaussian elimination with partial pivoting on the Hessenberg matrix
    ``sI - H`` (O(n^2) per frequency instead of O(n^3)); never through the
    transfer-function coefficients, whose values are ill-conditioned at high orders. The
    triangular factor is not stored: ``C Q U^-1`` is built column by column as the rows
    of U appear, so the response comes out of one sweep per frequency, about
    ``4 n^2 (1 + min(m, p))`` flops (the dual model is reduced when there are more outputs
    than inputs). Frequencies are solved several at a time in SIMD lanes (same bits on
    every CPU) and spread over threads when the work is large. Backward stable (growth
    factor at most n); near a pole the relative accuracy falls like ``cond(sI - A) eps``. The states are
    first balanced by powers of two (exact; G does not depend on the state coordinates),
    so badly scaled states neither cost accuracy nor make ``sI - A`` look singular far
    from a pole.

    Examples
    --------
    >>> import numpy as np
    >>> import statewright as sw
    >>> g = sw.frequency_response([[-2.0]], [[1.0]], [[1.0]], [[0.0]], [0.0, 2.0])
    >>> bool(np.allclose(g[:, 0, 0], [0.5, 1 / (2 + 2j)]))
    True
    """
    model = v.float_model_for_core(a, b, c, d)
    return compute.frequency_response(model, tb.frequencies(frequencies), tb.optional_sample_time(sample_time))


def _stack(a: Any, b: Any, c: Any, d: Any) -> Arrays4:
    fa = v.float_stack(a, "a", 3, "(N, n, n)")
    fb = v.float_stack(b, "b", 3, "(N, n, m)")
    fc = v.float_stack(c, "c", 3, "(N, p, n)")
    fd = v.float_stack(d, "d", 3, "(N, p, m)")
    count, n, n2 = fa.shape
    if n2 != n:
        raise ModelError(f"a: expected a stack of square matrices (N, n, n), found shape {fa.shape}")
    m, p = fb.shape[2], fc.shape[1]
    for arg, arr, want in (("b", fb, (count, n, m)), ("c", fc, (count, p, n)), ("d", fd, (count, p, m))):
        if arr.shape != want:
            raise ModelError(f"{arg}: expected shape {want} (N models of one shape), found shape {arr.shape}")
    return fa, fb, fc, fd


def frequency_response_batch(
    a: Any, b: Any, c: Any, d: Any, frequencies: Any, *, sample_time: Optional[float] = None
) -> np.ndarray:
    r"""The frequency responses of N models of one shape at the same k frequencies.

    Parameters
    ----------
    a, b, c, d : array_like
        Stacks ``(N, n, n)``, ``(N, n, m)``, ``(N, p, n)``, ``(N, p, m)``.
    frequencies : (k,) array_like
        Frequencies in rad/s.
    sample_time : float, optional
        None (default) for continuous models, else seconds per step of discrete ones.

    Returns
    -------
    (N, k, p, m) complex ndarray
        Equal, bit for bit, to N calls of :func:`frequency_response`.

    Raises
    ------
    ModelError
        As :func:`frequency_response`; a failing model is named by its index ("model i of
        the batch"), and no partial result is returned.

    Notes
    -----
    The models are spread over the cores with the GIL released; each is computed by the
    routine of a single call.

    Examples
    --------
    >>> import numpy as np
    >>> import statewright as sw
    >>> a = np.array([[[-1.0]], [[-2.0]]])
    >>> g = sw.frequency_response_batch(a, np.ones((2, 1, 1)), np.ones((2, 1, 1)), np.zeros((2, 1, 1)), [0.0])
    >>> g[:, 0, 0, 0].real
    array([1. , 0.5])
    """
    models = _stack(a, b, c, d)
    return compute.frequency_response_batch(models, tb.frequencies(frequencies), tb.optional_sample_time(sample_time))


def to_continuous_batch(
    a: Any,
    b: Any,
    c: Any,
    d: Any,
    sample_time: Any,
    method: str = "zero_order_hold",
    *,
    prewarp_frequency: Optional[float] = None,
) -> Arrays4:
    r"""The continuous models behind N discrete models of one shape (one sample time).

    Parameters
    ----------
    a, b, c, d : array_like
        Stacks ``(N, n, n)``, ``(N, n, m)``, ``(N, p, n)``, ``(N, p, m)`` of discrete models.
    sample_time : float
        Seconds per step, shared by the batch.
    method : str, optional
        As for :func:`to_continuous`; default ``"zero_order_hold"``.
    prewarp_frequency : float, optional
        For ``"bilinear"`` only.

    Returns
    -------
    (A, B, C, D)
        Stacks of the continuous models, equal bit for bit to N calls of
        :func:`to_continuous` (each verified the same way).

    Raises
    ------
    ModelError
        As :func:`to_continuous`; a failing model is named by its index ("model i of the
        batch"), and no partial result is returned.

    Examples
    --------
    A fleet of two sampled first-order lags (0.1 s per step) and their time constants:

    >>> import numpy as np
    >>> import statewright as sw
    >>> ad = np.exp(-0.1 / np.array([2.0, 5.0])).reshape(2, 1, 1)
    >>> A, B, C, D = sw.to_continuous_batch(ad, 1 - ad, np.ones((2, 1, 1)), np.zeros((2, 1, 1)), 0.1)
    >>> np.round(-1 / A[:, 0, 0], 9)
    array([2., 5.])
    """
    models = _stack(a, b, c, d)
    out, _residuals = compute.to_continuous_batch(
        models, tb.sample_time(sample_time), tb.method(method), tb.prewarp_frequency(prewarp_frequency)
    )
    return out

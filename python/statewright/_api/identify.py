"""Identification from Markov parameters, Gramians and balanced realizations. The
computations are in the Rust core (``src/identify``, ``src/gramian``); this module
validates input and wraps results."""

from __future__ import annotations

from typing import Any, Optional, Tuple

import numpy as np

from .. import _core
from .._base import time_base as tb
from .._base import validate as v
from .._compute import identify as compute
from .._core import ModelError
from .._results.realization import Realization

__all__ = [
    "realize_markov",
    "gramians",
    "hankel_singular_values",
    "balanced_realization",
]


_MAX_ORDER = 4096  # the core's largest realization order


def _order(order: Any) -> Optional[int]:
    if order is None:
        return None
    if isinstance(order, (bool, np.bool_)) or not isinstance(order, (int, np.integer)):
        raise ModelError(f"order: expected a nonnegative int or None, found a {type(order).__name__}")
    if int(order) < 0:
        raise ModelError(f"order: must be >= 0, found {int(order)}")
    if int(order) > _MAX_ORDER:
        # no model this package accepts has more states; also keeps the value in the core's range
        raise ModelError(f"order: {int(order)} exceeds the largest supported order {_MAX_ORDER}")
    return int(order)


def _triple(a: Any, b: Any, c: Any) -> Tuple[np.ndarray, np.ndarray, np.ndarray]:
    fa, fb, fc = v.float_matrix(a, "a"), v.float_matrix(b, "b"), v.float_matrix(c, "c")
    v.check_model_shapes(fa, fb, fc, np.zeros((fc.shape[0], fb.shape[1])))
    return fa, fb, fc


def realize_markov(
    markov: Any, order: Optional[int] = None, *, tol: Optional[float] = None, sample_time: float = 1.0
) -> Realization:
    r"""A discrete-time realization from Markov parameters (Ho–Kalman / SVD of the Hankel matrix).

    Finds ``(A, B, C, D)`` with ``markov[0] = D`` and ``markov[i] = C A^(i-1) B``.

    Parameters
    ----------
    markov : (k, p, m) array_like
        Markov parameters (impulse-response matrices), ``markov[0]`` the feedthrough D.
        A 1-D array of length k is read as a single-input single-output sequence (k, 1, 1).
    order : int, optional
        The state dimension. Default: the number of singular values of the data's block
        Hankel matrix H above ``tol``.
    tol : float, optional
        Default ``n**2 * eps * ||H||_F``, n the smaller side of the block Hankel matrix H.
    sample_time : float, optional
        Seconds per step of the sequence (default 1.0): the result's ``.sample_time``, the
        time base its methods (``.to_continuous()``, ``.frequency_response(w)``, ...) use.

    Returns
    -------
    Realization
        A discrete-time realization (``.sample_time`` set). ``.info`` holds
        ``"singular_values"`` (all singular values of the data's block Hankel matrix H,
        descending), ``"order"``, ``"tol"`` and ``"hankel_blocks"`` (block
        rows, block columns). H is a finite section of the model's Hankel operator, built
        from the (possibly noisy) data: its singular values are not the model's Hankel
        singular values (:func:`hankel_singular_values`, from the Gramians), and differ
        from them for short or noisy records.

    Raises
    ------
    ModelError
        For a bad shape, non-finite data, a bad ``order`` or ``tol``, or too few Markov
        parameters for the requested order (order ``n`` needs ``min(r p, c m) >= n`` with
        ``r + c = k - 1`` block rows and columns).

    Notes
    -----
    Ho & Kalman (1966), Kung (1978): the SVD ``H = U S V^T`` of the block Hankel matrix
    (block (i, j) = ``markov[i + j + 1]``, block rows and columns split to maximise the
    attainable order) truncated to the order gives ``O = U_n S_n^(1/2)`` and
    ``G = S_n^(1/2) V_n^T``; C is the first block row of O, B the first block column of G,
    and A solves ``O A G = H_shifted`` in the least-squares sense via the pseudo-inverses.
    On noisy data read the singular values for a gap and pass ``order``.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> h = [0.0] + [0.5 ** (i - 1) for i in range(1, 12)]      # 1 / (z - 0.5)
    >>> r = sw.realize_markov(h)
    >>> r.info["order"], bool(np.isclose(r.a[0, 0], 0.5))
    (1, True)
    >>> bool(np.isclose((r.c @ r.a @ r.b)[0, 0], h[2]))           # C A B = h_2 (identity)
    True
    """
    arr = v._float_array(markov, "markov")
    if arr.ndim == 1:
        arr = np.ascontiguousarray(arr.reshape(-1, 1, 1))
    if arr.ndim != 3:
        raise ModelError(
            f"markov: expected a 3-D array of shape (k, p, m) (or 1-D for one input and output), "
            f"found shape {arr.shape}"
        )
    if arr.shape[0] == 0:
        raise ModelError("markov: expected at least one Markov parameter (markov[0] = D), found none")
    t = tb.sample_time(sample_time)
    (a, b, c, d), sv, n, tol_used, blocks = _core.realize_markov(arr, _order(order), v.tol(tol))
    sv.flags.writeable = False
    info = {
        "singular_values": sv,
        "order": int(n),
        "tol": float(tol_used),
        "hankel_blocks": (int(blocks[0]), int(blocks[1])),
    }
    return Realization._trusted(a, b, c, d, info, sample_time=t)


def gramians(a: Any, b: Any, c: Any, *, discrete: bool = False) -> Tuple[np.ndarray, np.ndarray]:
    r"""Controllability and observability Gramians of a stable model.

    ``A Wc + Wc A^T + B B^T = 0`` and ``A^T Wo + Wo A + C^T C = 0``; with ``discrete=True``
    the Stein equations ``A Wc A^T - Wc + B B^T = 0`` and ``A^T Wo A - Wo + C^T C = 0``.

    Parameters
    ----------
    a : (n, n) array_like
    b : (n, m) array_like
    c : (p, n) array_like
    discrete : bool, default False

    Returns
    -------
    wc, wo : (n, n) ndarray
        Symmetric positive semidefinite.

    Raises
    ------
    ModelError
        For inconsistent shapes, non-finite data, or an unstable model (continuous time: an
        eigenvalue with real part >= 0; discrete time: an eigenvalue of magnitude >= 1).

    Notes
    -----
    Bartels–Stewart (1972) over the real Schur form of A (Kitagawa 1977 for the Stein
    equation): backward stable, relative residual of order n eps.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> a = np.array([[-1.0, 2.0], [0.0, -3.0]]); b = np.array([[0.0], [1.0]]); c = np.array([[1.0, 0.0]])
    >>> wc, wo = sw.gramians(a, b, c)
    >>> bool(np.allclose(a @ wc + wc @ a.T + b @ b.T, 0))            # Lyapunov equation (identity)
    True
    """
    fa, fb, fc = _triple(a, b, c)
    return compute.gramians(fa, fb, fc, v.check_flag(discrete, "discrete"))


def hankel_singular_values(a: Any, b: Any, c: Any, *, discrete: bool = False) -> np.ndarray:
    r"""Hankel singular values of a stable model, descending: ``sqrt(eig(Wc Wo))``.

    Computed as the singular values of ``Lo^T Lc`` for square-root factors of the Gramians
    (``Wc = Lc Lc^T``, ``Wo = Lo Lo^T``); the product ``Wc Wo`` is never formed. Small
    values are accurate only to about ``n * eps * sigma_1`` absolutely.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> sw.hankel_singular_values([[-1.0]], [[1.0]], [[1.0]])     # 1/(s+1): 1/2 (hand)
    array([0.5])
    """
    fa, fb, fc = _triple(a, b, c)
    return compute.hankel_singular_values(fa, fb, fc, v.check_flag(discrete, "discrete"))


def balanced_realization(
    a: Any, b: Any, c: Any, d: Any, *, order: Optional[int] = None, discrete: bool = False
) -> Realization:
    r"""A balanced realization (equal, diagonal Gramians), truncated to ``order`` states.

    ``T^-1 Wc T^-T = T^T Wo T = diag(sigma_1, ..., sigma_r)``, the Hankel singular values.
    Truncation keeps stability, and the transfer matrices obey
    ``||G - G_r||_inf <= 2 * (sigma_{r+1} + ... + sigma_n)``.

    Parameters
    ----------
    a, b, c, d : array_like
        A stable model (n, n), (n, m), (p, n), (p, m).
    order : int, optional
        States to keep. Default: the Hankel singular values above ``n * eps * sigma_1``
        (all of them for a minimal model; the numerically zero ones cannot be balanced).
    discrete : bool, default False

    Returns
    -------
    Realization
        ``.info`` holds ``"hankel_singular_values"`` (all of them, descending),
        ``"error_bound"`` (twice the sum of the discarded ones) and ``"residuals"`` (relative
        residuals of the two Gramian equations).

    Raises
    ------
    ModelError
        For inconsistent shapes, non-finite data, an unstable model, or an ``order`` above n
        or above the number of numerically nonzero Hankel singular values.

    Notes
    -----
    Square-root balancing (Laub, Heath, Paige & Ward 1987): Gramians by Bartels–Stewart,
    factors from their symmetric eigen-decompositions, the SVD ``Lo^T Lc = U S Z^T``, and
    ``T = Lc Z_r S_r^(-1/2)`` with left inverse ``S_r^(-1/2) U_r^T Lo^T``. The bound is
    Glover's (1984); it holds in discrete time too (Al-Saggaf & Franklin 1987).

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> r = sw.realize([1.0, 4.0], [1.0, 5.5, 6.0])               # (s + 4) / ((s + 1.5)(s + 4))
    >>> br = sw.balanced_realization(*r, order=1)
    >>> br.n_states, float(br.info["error_bound"]) < 1e-8          # a cancellation: nothing lost
    (1, True)
    """
    arrays, info = compute.balanced_realization(
        *v.float_model(a, b, c, d), _order(order), v.check_flag(discrete, "discrete")
    )
    return Realization._trusted(*arrays, info)

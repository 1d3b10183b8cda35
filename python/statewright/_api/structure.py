"""Structure: controllability and observability staircase forms, Kalman decomposition,
minimal realization and similarity. The computations are in the Rust core
(``src/structure``); this module validates input and wraps results."""

from __future__ import annotations

from typing import Any, Optional, Tuple

import numpy as np

from .. import _core
from .._base import validate as v
from .._compute import structure as compute
from .._core import ModelError
from .._results.realization import Realization
from .._results.structure import Decomposition, Staircase

__all__ = [
    "controllability_matrix",
    "observability_matrix",
    "Staircase",
    "Decomposition",
    "controllability_staircase",
    "observability_staircase",
    "is_controllable",
    "is_observable",
    "kalman_decomposition",
    "minimal_realization",
    "similarity",
]


def controllability_matrix(a: Any, b: Any, *, exact: bool = False) -> np.ndarray:
    r"""``[B, AB, ..., A^{n-1} B]``, shape (n, n m).

    For display and hand checks. statewright never decides a rank from this matrix: its
    singular values spread like powers of the eigenvalue magnitudes, so a controllable
    model can look rank deficient; the staircase form decides instead.

    Examples
    --------
    >>> import statewright as sw
    >>> sw.controllability_matrix([[0, 1], [-2, -3]], [[0], [1]])
    array([[ 0.,  1.],
           [ 1., -3.]])
    """
    if v.check_flag(exact, "exact"):
        am, bm = v.exact_matrix(a, "a"), v.exact_matrix(b, "b")
        k = _core.controllability_matrix_exact(v.to_core(am), v.to_core(bm))
        return v.fraction_array(k, (k[0], k[1]))
    return _core.controllability_matrix_float(v.float_matrix(a, "a"), v.float_matrix(b, "b"))


def observability_matrix(a: Any, c: Any, *, exact: bool = False) -> np.ndarray:
    r"""``[C; CA; ...; CA^{n-1}]``, shape (n p, n): the dual of :func:`controllability_matrix`.

    Examples
    --------
    >>> import statewright as sw
    >>> sw.observability_matrix([[0, 1], [-2, -3]], [[1, 0]])
    array([[1., 0.],
           [0., 1.]])
    """
    if v.check_flag(exact, "exact"):
        am, cm = v.exact_matrix(a, "a"), v.exact_matrix(c, "c")
        if am.ndim == 2 and cm.ndim == 2 and cm.shape[1] != am.shape[0]:
            raise _core.ModelError(f"c: expected {am.shape[0]} columns (one per state), found shape {cm.shape}")
        return controllability_matrix(am.T.copy(), cm.T.copy(), exact=True).T.copy()
    am, cm = v.float_matrix(a, "a"), v.float_matrix(c, "c")
    if cm.shape[1] != am.shape[0]:
        raise _core.ModelError(f"c: expected {am.shape[0]} columns (one per state), found shape {cm.shape}")
    return np.ascontiguousarray(_core.controllability_matrix_float(am.T.copy(), cm.T.copy()).T)


def controllability_staircase(a: Any, b: Any, c: Any = None, *, tol: Optional[float] = None) -> Staircase:
    r"""Controllability staircase form by orthogonal transformations.

    An orthogonal Q with ``Q^T A Q = [[A_c, A_12], [0, A_u]]``, ``Q^T B = [[B_c], [0]]``,
    ``(A_c, B_c)`` controllable and block upper Hessenberg (each subdiagonal block of full
    row rank).

    Parameters
    ----------
    a : (n, n) array_like
    b : (n, m) array_like
    c : (p, n) array_like, optional
        Carried along (``C Q``) when given.
    tol : float, optional
        Singular values above tol count (absolute, every step). Default (scale invariant,
        API version 2): the first step keeps the singular values of ``B_hat`` above
        ``n**2 * eps * ||B_hat||_F``, where ``B_hat`` is B with its columns scaled by powers
        of two to the exponent of the largest column norm; every later step those of its
        block of A above ``n**2 * eps * ||A||_F`` (``.thresholds`` holds each). The default
        then searches for rounding-level values that the chain of steps amplified: candidate
        factors from the kept values between ``n**2 * eps`` and ``sqrt(eps)`` relative, and
        an eigenvector-guided split (PBH test ``|v^T B_hat| <= 1e-8 ||v|| ||B_hat||_F`` for
        left eigenvectors v, tried when a kept value is below ``1e-2`` relative); a smaller
        controllable part is accepted only when it reproduces ``A^k B`` for ``k < 2n`` to
        ``200 n**2 eps`` relative. Decisions do not change when the inputs are scaled or all
        states by one factor, nor (up to rounding) under orthogonal coordinates.

    Returns
    -------
    Staircase
        With ``.rank`` the controllable dimension, ``.blocks`` the step sizes and
        ``.singular_values`` / ``.rank_gaps`` the data each rank decision was made on.

    Notes
    -----
    Van Dooren (1981) and Paige (1981): at each step the SVD of the block that feeds the
    unreached states decides the step size; Householder reflections apply the change of
    coordinates. Backward stable. The rank of the controllability matrix is never used:
    its singular values spread like powers of the eigenvalue magnitudes, so a controllable
    model with fast and slow modes would look uncontrollable.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> a = np.diag([-1.0, -2.0, -3.0]); b = np.array([[1.0], [1.0], [0.0]])
    >>> s = sw.controllability_staircase(a, b)
    >>> s.rank, s.blocks
    (2, [1, 1])
    >>> bool(np.allclose(s.transform.T @ a @ s.transform, s.a))       # Q^T A Q (identity)
    True
    """
    am, bm = v.float_matrix(a, "a"), v.float_matrix(b, "b")
    cm = None if c is None else v.float_matrix(c, "c")
    return Staircase(compute.controllability_staircase(am, bm, cm, v.tol(tol)), "controllability")


def observability_staircase(a: Any, b: Any, c: Any, *, tol: Optional[float] = None) -> Staircase:
    r"""Observability staircase form: the dual of :func:`controllability_staircase`.

    ``Q^T A Q = [[A_o, 0], [A_21, A_u]]``, ``C Q = [C_o, 0]``, observable part first;
    ``.b`` is ``Q^T B`` (``b`` may be None). Default tol: the dual of the controllability
    one (the first step against ``n**2 * eps * ||C_hat||_F``, C with its rows scaled by
    powers of two to one exponent, later steps against ``n**2 * eps * ||A||_F``).

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> a = np.diag([-1.0, -2.0]); c = np.array([[1.0, 0.0]])
    >>> sw.observability_staircase(a, None, c).rank
    1
    """
    am, cm = v.float_matrix(a, "a"), v.float_matrix(c, "c")
    bm = None if b is None else v.float_matrix(b, "b")
    return Staircase(compute.observability_staircase(am, bm, cm, v.tol(tol)), "observability")


def is_controllable(a: Any, b: Any, *, tol: Optional[float] = None) -> bool:
    """True when the controllability staircase reaches every state (never decided from the
    rank of the controllability matrix).

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> a = np.diag([-1.0, -2.0])
    >>> sw.is_controllable(a, [[1.0], [1.0]]), sw.is_controllable(a, [[1.0], [0.0]])
    (True, False)
    """
    s = controllability_staircase(a, b, tol=tol)
    return s.rank == s.n_states


def is_observable(a: Any, c: Any, *, tol: Optional[float] = None) -> bool:
    """True when the observability staircase reaches every state.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> sw.is_observable(np.diag([-1.0, -2.0]), [[1.0, 0.0]])     # mode -2 is not seen
    False
    """
    s = observability_staircase(a, None, c, tol=tol)
    return s.rank == s.n_states


def kalman_decomposition(a: Any, b: Any, c: Any, d: Any, *, tol: Optional[float] = None) -> Decomposition:
    r"""Kalman decomposition into controllable/observable parts.

    A nonsingular T, built from orthonormal bases of the controllable subspace R, the
    unobservable subspace N and R∩N (each from staircase passes), with ``T^-1 A T`` of the
    pattern ``[[A11, 0, A13, 0], [A21, A22, A23, A24], [0, 0, A33, 0], [0, 0, A43, A44]]``,
    ``T^-1 B = [B1; B2; 0; 0]``, ``C T = [C1, 0, C3, 0]``.

    The rank decisions are made on the model balanced by an exact power-of-two diagonal
    scaling (default tol as :func:`minimal_realization`, scale invariant); when the three
    decisions (controllable subspace, unobservable subspace, and their intersection)
    disagree, no consistent decomposition exists at that tol and ModelError says so.

    Verification: the result is accepted under the default when the pattern residual is at
    most ``100 n eps max(1, cond T)`` and the minimal part's Markov residual (see
    :func:`minimal_realization`) at most ``200 n**2 eps``; larger candidate factors are
    tried first, the reduction by exact zeros last; otherwise ModelError. With an explicit
    tol the call is refused when more than half of B or of C (Frobenius norm) would be set
    to zero: B is never zeroed silently. The figures are in ``info``.

    Returns
    -------
    Decomposition
        ``.realization``, ``.transform`` (T), ``.sizes`` (dimensions of R ⊖ (R∩N), R∩N,
        (R+N)^⊥, N ⊖ (R∩N)) and ``.info["condition"]`` (2-norm condition number of T).

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> a = np.diag([-1.0, -2.0, -3.0, -4.0])
    >>> b = np.array([[1.0], [1.0], [0.0], [0.0]]); c = np.array([[1.0, 0.0, 1.0, 0.0]])
    >>> sw.kalman_decomposition(a, b, c, [[0.0]]).sizes     # modes -1, -2, -3, -4 (hand)
    (1, 1, 1, 1)
    """
    arrays, t, sizes, info = compute.kalman_decomposition(*v.float_model(a, b, c, d), v.tol(tol))
    return Decomposition(Realization._trusted(*arrays), t, sizes, info)


def minimal_realization(a: Any, b: Any, c: Any, d: Any, *, tol: Optional[float] = None) -> Realization:
    r"""The controllable and observable part: same transfer function, no state more than needed.

    The model is balanced by an exact power-of-two diagonal scaling, then a
    controllability staircase keeps the controllable part and an observability staircase of
    that part keeps its observable part (both orthogonal). Default tol (scale invariant,
    API version 2; n the order of the model): each step against the norm of its own data
    block of the balanced model, ``n**2 * eps * ||B_hat||_F`` at the first controllability
    step (B's columns scaled by powers of two to one exponent), ``n**2 * eps * ||C_hat||_F``
    at the first observability step (C's rows likewise), ``n**2 * eps * ||A||_F`` later; so
    the decisions do not change when inputs, outputs or states are scaled.

    Verification: the result's Markov parameters ``C A^k B`` (``k < 2n``, A scaled by an
    upper bound of its 2-norm, inputs and outputs to unit exponent) are compared with the
    model's; ``info["markov_residual"]`` must not exceed ``info["markov_tolerance"]``
    (``200 n**2 eps``). Under the default, rounding-level singular values amplified above
    ``n**2 eps`` (exact cancellations hidden in dense coordinates) are found by trying the
    relative factors of kept values up to ``sqrt(eps)`` (and the eigenvector-guided split of
    :func:`controllability_staircase`); only a verified smaller model is taken. A default
    result that fails the check falls back to exact zeros only, then to ModelError. With
    an explicit ``tol`` (absolute, on the balanced model) the result is refused when its
    residual exceeds ``max(200 n**2 eps, min(1/2, 100 tol / min(||A||_F, ||B||_F, ||C||_F)))``.
    ``info`` holds ``"controllable_dimension"``, ``"minimal_dimension"``, the singular
    values each decision was made on (``"controllability_singular_values"``,
    ``"observability_singular_values"``), ``"thresholds"``, ``"backward_error"`` (per
    step), ``"split_residual"``, ``"markov_residual"``, ``"markov_tolerance"`` and
    ``"tol_factor"`` (the relative factor used; None for an explicit tol).

    Examples
    --------
    >>> import statewright as sw
    >>> r = sw.realize([1, 1.5], [1, 5.5, 6])      # (s + 1.5) / ((s + 1.5)(s + 4))
    >>> sw.minimal_realization(*r).n_states
    1
    """
    arrays, info = compute.minimal_realization(*v.float_model(a, b, c, d), v.tol(tol))
    return Realization._trusted(*arrays, info)


def similarity(r1: Any, r2: Any, *, tol: Optional[float] = None) -> np.ndarray:
    r"""The T with ``r2 == r1.transform(T)`` for two minimal realizations of the same
    transfer function.

    T solves ``A1 T = T A2``, ``T B2 = B1``, ``C1 T = C2`` (least squares over T's entries,
    Householder QR), then is verified: the relative residuals of those equations and of
    ``D1 = D2`` must not exceed ``tol`` (default ``sqrt(eps)``, about 1.5e-8). Limited to 40
    states (the linear system has n² unknowns).

    Raises
    ------
    ModelError
        When either realization is not minimal (decided by the staircase), the shapes
        differ, or no T satisfies the equations within tol.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> r1 = sw.realize([0.5, 4], [1, 1.2, 5], "controllable_canonical")
    >>> r2 = sw.realize([0.5, 4], [1, 1.2, 5], "controller")
    >>> t = sw.similarity(r1, r2)
    >>> bool(np.allclose(r1.transform(t).a, r2.a))
    True
    """

    def parts(r: Any, name: str) -> Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        if isinstance(r, Realization):
            r = tuple(r)
        try:
            a, b, c, d = r
        except (TypeError, ValueError):
            raise ModelError(
                f"{name}: expected a Realization or an (A, B, C, D) tuple, found a {type(r).__name__}"
            ) from None
        return v.float_model(a, b, c, d)

    t, _residuals, _tol_used = _core.similarity_transform(parts(r1, "r1"), parts(r2, "r2"), v.tol(tol))
    return t

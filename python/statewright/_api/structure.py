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
        Singular values above tol count. Default ``n**2 * eps * max(||A||_F, ||B||_F)``.

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
    ``.b`` is ``Q^T B`` (``b`` may be None). Default tol ``n**2 * eps * max(||A||_F, ||C||_F)``.

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
    scaling (default tol as :func:`minimal_realization`); when the three decisions
    (controllable subspace, unobservable subspace, and their intersection) disagree, no
    consistent decomposition exists at that tol and ModelError says so.

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
    that part keeps its observable part (both orthogonal). States that are unreachable or
    unobservable in the given coordinates are always removed with the default tol
    (``n**2 * eps * norm``, on the balanced model); an exact pole-zero cancellation hidden
    in dense coordinates leaves a rounding-level singular value that an ill-conditioned
    reduction can lift above the default: read the singular values in ``info`` and pass a
    ``tol`` inside their gap. ``info`` holds
    ``"controllable_dimension"``, ``"minimal_dimension"`` and the singular values each
    decision was made on (``"controllability_singular_values"``,
    ``"observability_singular_values"``).

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

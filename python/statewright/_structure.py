"""Structure: controllability and observability staircase forms, Kalman decomposition,
minimal realization and similarity. The computations are in the Rust core
(``src/structure``); this module validates input and wraps results."""

from __future__ import annotations

import types
from typing import Any, List, Mapping, Optional, Tuple

import numpy as np

from . import _core
from . import _validate as v
from ._core import ModelError
from ._objects import Realization, latex_matrix

__all__ = [
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


def _tol(tol: Any) -> Optional[float]:
    if tol is None:
        return None
    if isinstance(tol, (bool, np.bool_)) or not isinstance(tol, (int, float, np.integer, np.floating)):
        raise ModelError(f"tol: expected a nonnegative number or None, found a {type(tol).__name__}")
    try:
        t = float(tol)
    except OverflowError:
        raise ModelError(f"tol: {tol!r} is beyond the float64 range") from None
    if not (np.isfinite(t) and t >= 0):
        raise ModelError(f"tol: must be finite and >= 0, found {t}")
    return t


def _model(a: Any, b: Any, c: Any, d: Any) -> Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    fa, fb, fc, fd = (v.float_matrix(x, name) for x, name in zip((a, b, c, d), "abcd"))
    v.check_model_shapes(fa, fb, fc, fd)
    return fa, fb, fc, fd


def _frozen(x: np.ndarray) -> np.ndarray:
    x.flags.writeable = False
    return x


class Staircase:
    """A staircase form ``Q^T A Q``, ``Q^T B``, ``C Q`` and the rank decisions behind it.

    Attributes
    ----------
    a, b, c : ndarray
        The transformed matrices (``c`` is None when no C was given).
    transform : ndarray
        The orthogonal Q.
    blocks : list of int
        Step sizes, summing to ``rank``.
    rank : int
        The controllable (or observable) dimension.
    singular_values : list of ndarray
        For each step, the singular values of the block whose rank was decided.
    margins : list of (float or None, float)
        For each step, the smallest singular value kept (None when none was) and the
        largest one discarded (0.0 when none was): how close each decision was to ``tol``.
    tol : float
        The tolerance used.
    """

    __slots__ = ("a", "b", "c", "transform", "blocks", "rank", "singular_values", "margins", "tol", "kind")

    def __init__(self, raw: Tuple[Any, ...], kind: str) -> None:
        a, b, c, q, blocks, rank, svs, kept, tol = raw
        self.a: np.ndarray = _frozen(a)
        self.b: np.ndarray = _frozen(b)
        self.c: Optional[np.ndarray] = None if c is None else _frozen(c)
        self.transform: np.ndarray = _frozen(q)
        self.blocks: List[int] = list(blocks)
        self.rank: int = int(rank)
        self.singular_values: List[np.ndarray] = [_frozen(s) for s in svs]
        self.margins: List[Tuple[Optional[float], float]] = [
            (float(s[k - 1]) if k > 0 else None, float(s[k]) if k < len(s) else 0.0)
            for s, k in zip(svs, kept)
        ]
        self.tol: float = float(tol)
        self.kind: str = kind

    @property
    def n_states(self) -> int:
        return int(self.a.shape[0])

    def __reduce__(self) -> Tuple[Any, ...]:
        kept = [len(s) - sum(1 for x in s if x <= self.tol) for s in self.singular_values]
        raw = (np.array(self.a), np.array(self.b), None if self.c is None else np.array(self.c),
               np.array(self.transform), list(self.blocks), self.rank,
               [np.array(s) for s in self.singular_values], kept, self.tol)
        return (Staircase, (raw, self.kind))

    def __repr__(self) -> str:
        return (f"Staircase({self.kind}, n_states={self.n_states}, rank={self.rank}, blocks={self.blocks}, "
                f"tol={self.tol:.3g}, margins={self.margins})")

    def _repr_latex_(self) -> str:
        # Show the block structure: A partitioned at the step boundaries.
        a = self.a
        cuts = np.cumsum(self.blocks).tolist()
        if self.rank < self.n_states:
            cuts = cuts[:-1] + [self.rank]
        body = latex_matrix(a)
        head = rf"\text{{{self.kind} staircase: rank {self.rank} of {self.n_states}, blocks {self.blocks}}}"
        return "$" + head + r"\quad Q^T A Q = " + body + r",\quad Q^T B = " + latex_matrix(self.b) + "$"


class Decomposition:
    """A Kalman decomposition: ``realization`` = ``(T^-1 A T, T^-1 B, C T, D)``.

    Attributes
    ----------
    realization : Realization
        Parts ordered controllable-and-observable, controllable-and-unobservable,
        uncontrollable-and-observable, uncontrollable-and-unobservable.
    transform : ndarray
        T (each part's columns orthonormal; T itself not orthogonal in general).
    sizes : tuple of 4 ints
        Dimensions of the four parts.
    info : mapping
        ``"condition"``: 2-norm condition number of T; ``"pattern_residual"``: the largest
        entry set to zero by the pattern, relative to its matrix's norm.
    """

    __slots__ = ("realization", "transform", "sizes", "info")

    def __init__(self, realization: Realization, transform: np.ndarray, sizes: Tuple[int, int, int, int],
                 info: Mapping[str, float]) -> None:
        self.realization = realization
        self.transform: np.ndarray = _frozen(transform)
        self.sizes: Tuple[int, int, int, int] = (int(sizes[0]), int(sizes[1]), int(sizes[2]), int(sizes[3]))
        self.info = types.MappingProxyType(dict(info))

    def minimal(self) -> Realization:
        """The controllable and observable part ``(A11, B1, C1, D)``."""
        k = self.sizes[0]
        a, b, c, d = self.realization
        return Realization(a[:k, :k], b[:k], c[:, :k], d)

    def __reduce__(self) -> Tuple[Any, ...]:
        return (Decomposition, (self.realization, np.array(self.transform), self.sizes, dict(self.info)))

    def __repr__(self) -> str:
        names = ("controllable+observable", "controllable+unobservable", "uncontrollable+observable",
                 "uncontrollable+unobservable")
        parts = ", ".join(f"{n}={s}" for n, s in zip(names, self.sizes))
        return f"Decomposition({parts}; condition of T {self.info['condition']:.3g})"

    def _repr_latex_(self) -> str:
        head = rf"\text{{Kalman decomposition, sizes {self.sizes}}}\quad T^{{-1}} A T = "
        return "$" + head + latex_matrix(self.realization.a) + "$"


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
        ``.singular_values`` / ``.margins`` the data each rank decision was made on.

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
    return Staircase(_core.controllability_staircase(am, bm, cm, _tol(tol)), "controllability")


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
    return Staircase(_core.observability_staircase(am, bm, cm, _tol(tol)), "observability")


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
    mats = _model(a, b, c, d)
    (ra, rb, rc, rd), t, sizes, condition, residual = _core.kalman_decomposition(*mats, _tol(tol))
    realization = Realization._trusted(ra, rb, rc, rd)
    return Decomposition(realization, t, (sizes[0], sizes[1], sizes[2], sizes[3]),
                         {"condition": condition, "pattern_residual": residual})


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
    >>> r = sw.realize([1, 1], [1, 3, 2])          # (s + 1) / ((s + 1)(s + 2))
    >>> sw.minimal_realization(*r).n_states
    1
    """
    mats = _model(a, b, c, d)
    (ra, rb, rc, rd), sc, so = _core.minimal_realization(*mats, _tol(tol))
    info = {
        "controllable_dimension": int(sc[5]),
        "minimal_dimension": int(so[5]),
        "controllability_singular_values": [np.array(s) for s in sc[6]],
        "observability_singular_values": [np.array(s) for s in so[6]],
        "tol": (float(sc[8]), float(so[8])),
    }
    return Realization._trusted(ra, rb, rc, rd, info)


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
    >>> r1 = sw.realize([1, 3], [1, 3, 2], "controllable_canonical")
    >>> r2 = sw.realize([1, 3], [1, 3, 2], "controller")
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
            raise ModelError(f"{name}: expected a Realization or an (A, B, C, D) tuple, found a {type(r).__name__}") from None
        return _model(a, b, c, d)

    t, _residuals, _tol_used = _core.similarity_transform(parts(r1, "r1"), parts(r2, "r2"), _tol(tol))
    return t

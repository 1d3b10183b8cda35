"""Result objects of the structure routines: :class:`Staircase` and :class:`Decomposition`."""

from __future__ import annotations

import types
import warnings
from typing import TYPE_CHECKING, Any, List, Mapping, Optional, Tuple

import numpy as np

from .._base.display import decomposition_latex, staircase_latex
from .._base.validate import frozen
from .._core import ModelError

if TYPE_CHECKING:  # pragma: no cover - annotations only; never imported at run time
    from .realization import Realization

__all__ = ["Staircase", "Decomposition"]


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
    rank_gaps : list of (float or None, float)
        The gap each rank decision had: for each step, the smallest singular value kept
        (None when none was) and the largest one discarded (0.0 when none was), on either
        side of ``tol``. (``margins`` is a deprecated alias, kept for one version.)
    tol : float
        The tolerance used: an explicit ``tol``, or under the default the threshold of the
        steps after the first (``n**2 * eps * ||A||_F``).
    thresholds : list of float
        The threshold each step's singular values were judged against (above it they
        count). Default: ``n**2 * eps * ||B_hat||_F`` for the first step (``B_hat`` is B
        with its columns scaled by powers of two to the exponent of the largest column
        norm; its singular values are the ones recorded), ``n**2 * eps * ||A||_F`` later.
    backward_errors : list of float
        For each step, the norm of what its decision discarded relative to the data it was
        judged against (``||B_hat||_F`` at the first step, ``||A||_F`` later).
    split_residual : (float, float)
        A posteriori backward error of the final split, from the returned Q and the data:
        ``||(Q^T A Q)_21||_F / ||A||_F`` and ``||(Q^T B)_2||_F / ||B||_F``.
    """

    __slots__ = (
        "a",
        "b",
        "c",
        "transform",
        "blocks",
        "rank",
        "singular_values",
        "rank_gaps",
        "tol",
        "kind",
        "thresholds",
        "backward_errors",
        "split_residual",
    )

    def __init__(self, raw: Tuple[Any, ...], kind: str) -> None:
        a, b, c, q, blocks, rank, svs, kept, tol = raw[:9]
        if len(raw) >= 12:
            thresholds, backward, split = raw[9], raw[10], raw[11]
        else:  # a pickle of the version-1 result: one tol for every step
            thresholds, backward, split = [tol] * len(svs), [float("nan")] * len(svs), (float("nan"),) * 2
        self.thresholds: List[float] = [float(x) for x in thresholds]
        self.backward_errors: List[float] = [float(x) for x in backward]
        self.split_residual: Tuple[float, float] = (float(split[0]), float(split[1]))
        self.a: np.ndarray = frozen(a)
        self.b: np.ndarray = frozen(b)
        self.c: Optional[np.ndarray] = None if c is None else frozen(c)
        self.transform: np.ndarray = frozen(q)
        self.blocks: List[int] = list(blocks)
        self.rank: int = int(rank)
        self.singular_values: List[np.ndarray] = [frozen(s) for s in svs]
        self.rank_gaps: List[Tuple[Optional[float], float]] = [
            (float(s[k - 1]) if k > 0 else None, float(s[k]) if k < len(s) else 0.0) for s, k in zip(svs, kept)
        ]
        self.tol: float = float(tol)
        self.kind: str = kind

    @property
    def n_states(self) -> int:
        return int(self.a.shape[0])

    @property
    def margins(self) -> List[Tuple[Optional[float], float]]:
        """Deprecated alias of :attr:`rank_gaps` (the name read as stability margins)."""
        warnings.warn(
            "Staircase.margins is deprecated; use Staircase.rank_gaps (the gap of each rank decision)",
            DeprecationWarning,
            stacklevel=2,
        )
        return self.rank_gaps

    def __reduce__(self) -> Tuple[Any, ...]:
        kept = [len(s) - sum(1 for x in s if x <= t) for s, t in zip(self.singular_values, self.thresholds)]
        raw = (
            np.array(self.a),
            np.array(self.b),
            None if self.c is None else np.array(self.c),
            np.array(self.transform),
            list(self.blocks),
            self.rank,
            [np.array(s) for s in self.singular_values],
            kept,
            self.tol,
            list(self.thresholds),
            list(self.backward_errors),
            self.split_residual,
        )
        return (Staircase, (raw, self.kind))

    def _indices(self, kind: str, width: int) -> Tuple[int, ...]:
        if self.kind != kind:
            raise ModelError(f"{kind}_indices: this is a {self.kind} staircase; use the {kind} staircase")
        # (Van Dooren 1981) the step sizes are the conjugate partition of the indices:
        # mu_j = #{steps of size >= j}, j = 1 .. number of inputs (outputs).
        return tuple(sum(1 for rho in self.blocks if rho >= j) for j in range(1, width + 1))

    def controllability_indices(self) -> Tuple[int, ...]:
        """The controllability indices, in decreasing order, one per input.

        Decided on the orthogonal staircase: the step sizes ``rho_1 >= rho_2 >= ...`` are
        the conjugate partition of the indices, ``mu_j = #{i : rho_i >= j}``
        (``rho_k`` is the rank increase of ``[B, AB, ..., A^(k-1) B]``, found here without
        forming it). They sum to :attr:`rank`; an input that adds nothing has index 0.
        Which input carries which index is decided by
        :func:`statewright.multivariable_canonical_form`.

        Examples
        --------
        >>> import statewright as sw
        >>> a = [[0, 1, 0], [0, 0, 0], [0, 0, -1]]
        >>> st = sw.controllability_staircase(a, [[0, 0], [1, 0], [0, 1]])
        >>> st.controllability_indices()
        (2, 1)
        """
        return self._indices("controllability", int(self.b.shape[1]))

    def observability_indices(self) -> Tuple[int, ...]:
        """The observability indices, in decreasing order, one per output (the dual of
        :meth:`controllability_indices`, on the observability staircase's step sizes)."""
        if self.c is None:
            return self._indices("observability", 0)
        return self._indices("observability", int(self.c.shape[0]))

    def __repr__(self) -> str:
        return (
            f"Staircase({self.kind}, n_states={self.n_states}, rank={self.rank}, blocks={self.blocks}, "
            f"tol={self.tol:.3g}, rank_gaps={self.rank_gaps})"
        )

    def _repr_latex_(self) -> str:
        """Q^T A Q, Q^T B (and C Q) with a rule after every step: the staircase of blocks."""
        return staircase_latex(self)


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
        entry set to zero by the pattern, relative to its matrix's norm; ``"zeroed_b"``,
        ``"zeroed_c"``: the Frobenius norms of the parts of ``T^-1 B`` and ``C T`` set to
        zero, relative to ``||B||_F``, ``||C||_F``; ``"markov_residual"``: the
        Markov-parameter residual of the minimal part against the model;
        ``"backward_error"``: per staircase (controllable subspace, its unobservable part,
        the unobservable subspace) the backward error of each step and the split residuals
        (A, then B or C); ``"tol_factor"``: the relative factor of the decisions (None for an
        explicit tol).
    """

    __slots__ = ("realization", "transform", "sizes", "info")

    def __init__(
        self,
        realization: "Realization",
        transform: np.ndarray,
        sizes: Tuple[int, int, int, int],
        info: Mapping[str, float],
    ) -> None:
        self.realization = realization
        self.transform: np.ndarray = frozen(transform)
        self.sizes: Tuple[int, int, int, int] = (int(sizes[0]), int(sizes[1]), int(sizes[2]), int(sizes[3]))
        self.info = types.MappingProxyType(dict(info))

    def minimal(self) -> "Realization":
        """The controllable and observable part ``(A11, B1, C1, D)``."""
        k = self.sizes[0]
        a, b, c, d = self.realization
        # the realization's own class: this module sits below the Realization module
        return type(self.realization)(a[:k, :k], b[:k], c[:, :k], d)

    def __reduce__(self) -> Tuple[Any, ...]:
        return (Decomposition, (self.realization, np.array(self.transform), self.sizes, dict(self.info)))

    def __repr__(self) -> str:
        names = (
            "controllable+observable",
            "controllable+unobservable",
            "uncontrollable+observable",
            "uncontrollable+unobservable",
        )
        parts = ", ".join(f"{n}={s}" for n, s in zip(names, self.sizes))
        return f"Decomposition({parts}; condition of T {self.info['condition']:.3g})"

    def _repr_latex_(self) -> str:
        """The transformed model with rules between its four parts."""
        return decomposition_latex(self)

"""Realizations of p x m transfer matrices in block companion forms. The computation is in
the Rust core (``src/realize/transfer_matrix.rs``); this module validates input once and
wraps the result."""

from __future__ import annotations

from typing import Any, Optional

import numpy as np

from .. import _core
from .._base import validate as v
from .._core import ModelError
from .._results.realization import Realization
from .structure import minimal_realization

__all__ = ["realize_transfer_matrix"]

TRANSFER_MATRIX_FORMS = ("block_controller", "block_observer")

#: Default relative tolerance for counting two computed denominator roots as one (float mode).
DEFAULT_MERGE_TOL = 1e-8


def _shapes(num: np.ndarray, den: np.ndarray) -> np.ndarray:
    """Checks the shapes; returns ``den`` as one denominator per entry, shape (p, m, k')."""
    if num.ndim != 3:
        raise ModelError(
            f"num: expected a 3-D array of shape (p, m, k) (outputs x inputs x coefficients), found shape {num.shape}"
        )
    p, m, k = num.shape
    if p == 0 or m == 0:
        raise ModelError(f"num: expected at least one output and one input, found shape {num.shape}")
    if k == 0:
        raise ModelError("num: the polynomials are empty; each needs at least one coefficient")
    if den.ndim == 1:
        if den.size == 0:
            raise ModelError("den: the common denominator is empty; it needs at least one coefficient")
        if all(x == 0 for x in den):
            raise ModelError("den: the common denominator is identically zero")
        out = np.empty((p, m, den.size), dtype=den.dtype)
        out[...] = den
        return out
    if den.ndim != 3 or den.shape[:2] != (p, m):
        raise ModelError(
            f"den: expected shape ({p}, {m}, k) (one denominator per entry of num) or (k,) "
            f"(one common denominator), found shape {den.shape}"
        )
    if den.shape[2] == 0:
        raise ModelError("den: the polynomials are empty; each needs at least one coefficient")
    return den


def _entries(num: np.ndarray, den: np.ndarray, s: complex) -> np.ndarray:
    """The given entries ``num_ij(s) / den_ij(s)`` (numpy's polyval; zero numerators give 0)."""
    p, m, _ = num.shape
    out = np.zeros((p, m), dtype=complex)
    for i in range(p):
        for j in range(m):
            if np.any(num[i, j] != 0):
                out[i, j] = np.polyval(num[i, j], s) / np.polyval(den[i, j], s)
    return out


def _merge_error(a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray, num: np.ndarray, den: np.ndarray) -> float:
    """Largest relative difference between the realization and the given entries at the
    check points of a merge: four points at distance ``1e-2 |lambda|`` around each pole
    ``lambda`` of the realization (``1e-2 rho`` for a pole at 0, rho the largest pole
    magnitude, 1 if all are 0) and eight on the circle of radius ``2 rho``."""
    n = a.shape[0]
    if n == 0:
        return 0.0
    poles = np.linalg.eigvals(a)
    rho = float(np.max(np.abs(poles))) or 1.0
    ring = np.exp(1j * (np.pi / 4 + np.pi / 2 * np.arange(4)))
    pts = [lam + 1e-2 * (abs(lam) or rho) * ring for lam in poles]
    pts.append(2 * rho * np.exp(1j * (np.pi / 8 + np.pi / 4 * np.arange(8))))
    worst = 0.0
    for s in np.concatenate(pts):
        want = _entries(num, den, complex(s))
        got = c @ np.linalg.solve(s * np.eye(n) - a, b) + d
        scale = float(np.max(np.abs(want)))
        if scale > 0 and np.isfinite(scale):
            worst = max(worst, float(np.max(np.abs(got - want))) / scale)
    return worst


def realize_transfer_matrix(
    num: Any,
    den: Any,
    form: str = "block_controller",
    *,
    minimal: bool = False,
    tol: Optional[float] = None,
    merge_tol: Optional[float] = None,
    exact: bool = False,
) -> Realization:
    r"""State-space realization of a p x m transfer matrix in a block companion form.

    Entry ``G_ij(s) = num[i, j](s) / den[i, j](s)`` (or over the common ``den``) is taken
    as given, not reduced first; an entry with a zero numerator contributes no denominator.
    Every entry is split into its direct term ``D_ij`` and strictly proper part.

    ``"block_controller"``: for each input column j, ``d_j`` is the monic least common
    multiple of the column's (nonzero-numerator) denominators, and each entry's strictly
    proper numerator is multiplied by ``d_j / d_ij``. The column is one single-input
    controllable canonical block: ``A_j`` the companion matrix of ``d_j`` (ones on the
    superdiagonal, last row ``[-a_0, ..., -a_{n_j-1}]``), ``B_j = e_{n_j}``, row i of
    ``C_j`` the coefficients ``[c_0, ..., c_{n_j-1}]`` (lowest power first) of that
    numerator. ``A = blkdiag(A_j)``, ``B = blkdiag(B_j)``, ``C = [C_1 ... C_m]``.
    ``"block_observer"``: the dual construction per output row i (observable canonical
    blocks over the least common multiple of the row, ``B`` the stacked rows of numerator
    coefficients, ``C = blkdiag(e_{n_i}^T)``); it is the transpose of the
    ``block_controller`` realization of ``G^T``.

    The order is the sum of the degrees of the least common multiples. It can exceed the
    McMillan degree (a pole shared by columns is realized once per column, a pole cancelled
    in an entry is kept); ``minimal=True`` removes those states.

    Parameters
    ----------
    num : (p, m, k) array_like
        Numerator coefficients of each entry, highest power first.
    den : (p, m, k') or (k',) array_like
        One denominator per entry, or one common denominator, highest power first.
    form : {"block_controller", "block_observer"}
    minimal : bool
        Follow with :func:`minimal_realization` (float mode only); ``tol`` is passed on.
    tol : float, optional
        The rank tolerance of :func:`minimal_realization` with ``minimal=True`` (absolute;
        default its scale-invariant default). Not used otherwise.
    merge_tol : float, optional
        Float mode: two computed roots ``r``, ``q`` of the denominators count as one when
        ``|r - q| <= merge_tol * max(|r|, |q|)`` (relative; default ``1e-8``; must be in
        [0, 1)). A merge is verified: the merged realization is compared with the given
        entries at four points at distance ``1e-2 |lambda|`` around each of its poles
        ``lambda`` and eight on the circle of radius twice the largest pole magnitude; when
        the largest relative difference exceeds ``max(merge_tol, 1e-10)`` the merge is
        refused and the realization without merging (exactly equal roots only, more
        states, correct) is returned; ``info["merge_error"]`` and ``info["merge_refused"]``
        say which. Checked but not used with ``exact=True``.
    exact : bool
        Exact rational arithmetic: entries are ints, Fractions or decimal strings; the
        least common multiples come from Euclid's algorithm, results are object arrays of
        :class:`fractions.Fraction`.

    Returns
    -------
    Realization
        In float mode ``info["block_orders"]`` (the order of each block),
        ``info["merge_tol"]`` and ``info["denominator_residual"]`` (see Notes); with
        ``minimal=True`` the ``info`` of :func:`minimal_realization` and these under
        ``info["block_realization"]``.

    Raises
    ------
    ModelError
        Wrong shapes; empty polynomials; a zero denominator (naming the entry); an improper
        entry (naming it); NaN or infinity; unknown ``form``; a ``merge_tol`` outside [0, 1);
        a float in exact mode; ``minimal=True`` with ``exact=True``.

    Notes
    -----
    In exact mode the realization is exact. In float mode the common factors are found
    from the roots (companion-matrix eigenvalues, balanced): roots within ``tol`` relative
    are merged (single linkage) into one root at their mean, the least common multiple is
    the product over merged roots with the largest multiplicity any entry has there, and
    ``d_j / d_ij`` is the product of the leftover roots (conjugate pairs as real
    quadratics). When a column (row) shares one denominator, or one of its denominators
    already holds every maximal multiplicity, that denominator's coefficients are used
    unchanged. ``info["denominator_residual"]`` is
    ``max_ij ||d_ij * (d_j / d_ij) - d_j||_inf / ||d_j||_inf`` (``d_ij`` monic), a
    posteriori: the realized entries carry relative errors of about that size (of order
    eps for simple, well separated roots). The computed copies of a k-fold root spread by
    about ``eps**(1/k)`` and may not merge under the default tol; the root is then realized
    more often than needed (still correct, not minimal).

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> num = [[[0, 1], [0, 2]],
    ...        [[1, 2.5], [0, 1.5]]]      # [[1/(s+0.5), 2/(s+4)], [(s+2.5)/(s+4), 1.5/(s+0.5)]]
    >>> den = [[[1, 0.5], [1, 4]],
    ...        [[1, 4], [1, 0.5]]]
    >>> r = sw.realize_transfer_matrix(num, den)
    >>> r.n_states                        # one block of order 2 per input column
    4
    >>> s = 0.5 + 1j
    >>> bool(np.allclose(r.evaluate(s), [[1 / (s + 0.5), 2 / (s + 4)], [(s + 2.5) / (s + 4), 1.5 / (s + 0.5)]]))
    True
    >>> [[str(x) for x in row] for row in sw.realize_transfer_matrix([[[1], [1]]], [2, 9, 4], exact=True).a]
    [['0', '1', '0', '0'], ['-2', '-9/2', '0', '0'], ['0', '0', '0', '1'], ['0', '0', '-2', '-9/2']]
    >>> sw.realize_transfer_matrix([[[1], [1]]], [2, 9, 4], "block_observer", minimal=True).n_states
    2
    """
    form = v.check_option(form, "form", TRANSFER_MATRIX_FORMS)
    minimal = v.check_flag(minimal, "minimal")
    t = v.tol(tol)
    mt = v.tol(merge_tol, "merge_tol") if merge_tol is not None else None
    if mt is not None and not mt < 1:
        raise ModelError(f"merge_tol: the root-merging tolerance must be in [0, 1), found {mt}")
    if v.check_flag(exact, "exact"):
        if minimal:
            raise ModelError(
                "minimal: minimal=True is available in float mode only (the minimal realization "
                "decides ranks by orthogonal staircases); use exact=False"
            )
        en = v._object_array(num, "num")
        ed = v._object_array(den, "den")
        ed = _shapes(en, ed)
        p, m, k = en.shape
        ea, eb, ec, edd = _core.realize_transfer_matrix_exact(
            v.to_core(en.reshape(p * m, k)), v.to_core(ed.reshape(p * m, ed.shape[2])), p, m, form
        )
        fa, fb, fc, fd = (v.fraction_array(x, (x[0], x[1])) for x in (ea, eb, ec, edd))
        return Realization._trusted(fa, fb, fc, fd)
    fn = v._float_array(num, "num")
    fdn = v._float_array(den, "den")
    fdn = np.ascontiguousarray(_shapes(fn, fdn))
    (a, b, c, d), info = _core.realize_transfer_matrix_float(fn, fdn, form, mt)
    info = dict(info)
    used = DEFAULT_MERGE_TOL if mt is None else mt
    unmerged = None
    if used > 0:
        (a0, b0, c0, d0), info0 = _core.realize_transfer_matrix_float(fn, fdn, form, 0.0)
        if a0.shape[0] > a.shape[0]:
            unmerged = (a0, b0, c0, d0), dict(info0)
    if unmerged is not None:
        err = _merge_error(a, b, c, d, fn, fdn)
        info["merge_error"] = err
        info["merge_refused"] = bool(err > max(used, 1e-10))
        if info["merge_refused"]:
            (a, b, c, d), info0 = unmerged
            info0.update(merge_error=err, merge_refused=True, merge_tol=used)
            info = info0
    else:
        info["merge_error"] = 0.0
        info["merge_refused"] = False
    if not minimal:
        return Realization._trusted(a, b, c, d, info, frozen=True)
    reduced = minimal_realization(a, b, c, d, tol=t)
    full = dict(reduced.info)
    full["block_realization"] = info
    return Realization._trusted(reduced.a, reduced.b, reduced.c, reduced.d, full, frozen=True)

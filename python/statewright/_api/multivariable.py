"""Public function: the Luenberger canonical forms of a multi-input, multi-output model.
Validates the model once (``_base.validate``), calls the Rust core and wraps the result."""

from __future__ import annotations

from typing import Any, Optional

from .._base import validate as v
from .._compute import forms as _forms
from .._core import ModelError
from .._results.realization import Realization

__all__ = ["multivariable_canonical_form"]

_MULTIVARIABLE_FORMS = ("controller", "observer")


def multivariable_canonical_form(
    a: Any, b: Any, c: Any, d: Any, form: str = "controller", *, exact: bool = False, tol: Optional[float] = None
) -> Realization:
    r"""The Luenberger controller (or observer) canonical form of a MIMO model.

    A change of state coordinates ``z = T x`` with ``T A T^-1 = A_c``, ``T B = B_c``,
    ``C T^-1 = C_c`` (``D`` unchanged), so the transfer matrix is the same. In the
    controller form ``A_c`` has one companion block of size ``mu_j`` per input ``j`` with
    ``mu_j > 0``: ones on the superdiagonal inside each block, zeros elsewhere except the
    last row of each block, which holds the coefficients of ``A^{mu_j}`` on the chosen
    basis; ``B_c`` is zero except the last row of each block, which has a 1 in column ``j``
    and zeros to its left. The observer form is the dual: the controller form of
    ``(A^T, C^T, B^T, D^T)``, transposed (one block per output, ``C`` with the unit entries).

    Parameters
    ----------
    a, b, c, d : array_like
        The model, shapes (n, n), (n, m), (p, n), (p, m).
    form : {"controller", "observer"}
        Which form. The controller form needs a controllable ``(A, B)``, the observer
        form an observable ``(A, C)``.
    exact : bool
        Compute in exact rational arithmetic: entries are ints, Fractions or decimal
        strings, results are object arrays of :class:`fractions.Fraction`. The indices
        are then the definition itself (exact column selection), and the form is exact.
    tol : float, optional
        Float only: the tolerance of the controllability (observability) staircase that
        decides the step sizes; default ``n^2 eps max(||A||_F, ||B||_F)`` as in
        :func:`controllability_staircase`.

    Returns
    -------
    Realization
        n states. ``info`` holds ``"indices"`` (the controllability indices, one per input
        in the given order, or the observability indices per output; they sum to n),
        ``"condition"`` (2-norm condition number of ``T``; in exact mode computed in float
        from its exact factors scaled by powers of two, ``None`` if that fails), and in
        float ``"transform"`` (``T``, ``z = T x``; the observer form's is ``T^-T`` of the
        dual's ``T``), ``"residual"`` (normwise relative residual of
        ``T A = A_c T``, ``T B = B_c``, ``C = C_c T``), ``"markov_error"`` (largest
        deviation of the first 2n Markov parameters, computed on ``A / ||A||_F``, relative
        to ``||C||_F ||B||_F``) and ``"tol"`` (the staircase tolerance used).

    Raises
    ------
    ModelError
        Bad shapes, NaN or infinity; an unknown ``form``; a model that is not
        controllable (``"controller"``) or not observable (``"observer"``); float data
        whose assignment of indices to inputs is too close to call at ``tol`` (the
        staircase's step size and the scan disagree); a transformation with condition
        number above ``1/sqrt(eps)`` (about 6.7e7: the entries would keep fewer than half
        their digits); a similarity residual above ``sqrt(eps)``; ``tol`` in exact mode;
        an order above 1024 (64 in exact mode); an exact request whose estimated time
        (from the order and the bit length of the entries, denominators cleared) exceeds
        the 30 s budget of exact arithmetic, refused before the work starts.

    Notes
    -----
    Luenberger (1967): the columns ``b_1, ..., b_m, A b_1, ..., A b_m, A^2 b_1, ...`` are
    scanned in this order and a column is kept when it is independent of those kept
    before it; ``mu_j`` counts the kept powers of ``b_j``. ``T`` stacks, per input, the
    rows ``q_j, q_j A, ..., q_j A^{mu_j - 1}``, where ``q_j`` is row ``mu_1 + ... + mu_j``
    of the inverse of ``[b_1, ..., A^{mu_1-1} b_1, ..., A^{mu_m-1} b_m]``.

    In float no rank is decided on these Krylov columns: the orthogonal controllability
    staircase decides how many columns are new at each power, and in its coordinates the
    part of ``A^{l-1} b_j`` that is new at step ``l`` is a product of the staircase's
    subdiagonal blocks; the scan keeps input ``j`` there when that part, orthogonal to the
    inputs kept before it, exceeds ``n^2 eps`` times the norm of the data it is made from
    (when only as many inputs are left as the staircase finds new directions, all are kept;
    when the scan and the staircase disagree, the call is refused).
    The form is as well conditioned as ``T``: its entries carry relative errors of about
    ``cond(T) eps``, and ``cond(T)`` grows with the spread of the pole magnitudes and with
    the indices. The structural ones and zeros are exact.

    References: D. G. Luenberger, "Canonical forms for linear multivariable systems",
    IEEE Trans. Automat. Control 12 (1967); T. Kailath, *Linear Systems* (1980), section 6.4.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> a = [[-1, 0, 0], [1, -2, 0], [0, 0, -3]]
    >>> b = [[1, 0], [0, 0], [0, 1]]
    >>> c = [[1, 1, 0], [0, 0, 1]]
    >>> r = sw.multivariable_canonical_form(a, b, c, [[0, 0], [0, 0]], exact=True)
    >>> r.info["indices"]
    (2, 1)
    >>> [[str(x) for x in row] for row in r.a]
    [['0', '1', '0'], ['-2', '-3', '0'], ['0', '0', '-3']]
    >>> [[str(x) for x in row] for row in r.b]
    [['0', '0'], ['1', '0'], ['0', '1']]
    """
    form = v.check_option(form, "form", _MULTIVARIABLE_FORMS)
    tol = v.tol(tol)
    if v.check_flag(exact, "exact"):
        if tol is not None:
            raise ModelError("tol: the exact multivariable form selects columns exactly and takes no tolerance")
        model = (v.exact_matrix(a, "a"), v.exact_matrix(b, "b"), v.exact_matrix(c, "c"), v.exact_matrix(d, "d"))
        v.check_model_shapes(*model)
        ea, eb, ec, ed, info = _forms.multivariable_exact(model, form)
        return Realization._trusted(ea, eb, ec, ed, info)
    fa, fb, fc, fd, info = _forms.multivariable_float(v.float_model(a, b, c, d), form, tol)
    return Realization._trusted(fa, fb, fc, fd, info, frozen=True)

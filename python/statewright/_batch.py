"""Batches: many models in one call, computed in parallel in the Rust core with the GIL
released. Results equal a loop of single calls bit for bit."""

from __future__ import annotations

from typing import Any, Tuple

import numpy as np

from . import _core
from . import _validate as v
from ._api import FORMS

__all__ = ["realize_batch", "transfer_function_batch"]


def realize_batch(num: Any, den: Any, form: str = "controllable_canonical") -> Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    r"""Realize N SISO transfer functions of one order n in one call.

    Parameters
    ----------
    num : (N, k) array_like
        Numerators, highest power first, ``k <= n + 1`` (shorter ones padded on the left).
    den : (N, n + 1) array_like
        Denominators; every leading coefficient must be nonzero (one order for the batch).
    form : str
        Any form of :func:`statewright.realize`.

    Returns
    -------
    A : (N, n, n) ndarray
    B : (N, n, 1) ndarray
    C : (N, 1, n) ndarray
    D : (N, 1, 1) ndarray
        ``(A[i], B[i], C[i], D[i])`` equals ``realize(num[i], den[i], form)`` bit for bit.

    Raises
    ------
    ModelError
        Shapes that do not fit; or a bad model, named by its index (the smallest failing
        index): ``"model 17 of the batch: den: contains NaN ..."``. Nothing is returned then.

    Notes
    -----
    The models are spread over all cores (rayon) with the GIL released; each output array
    is allocated once. Requests whose result would exceed 2**30 values are refused before
    allocation.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> A, B, C, D = sw.realize_batch([[1, 3], [2, 0]], [[1, 3, 2], [1, 0, 4]])
    >>> A.shape, bool(np.array_equal(A[1], sw.realize([2, 0], [1, 0, 4]).a))
    ((2, 2, 2), True)
    """
    form = v.check_option(form, "form", FORMS)
    num_a = v.float_stack(num, "num", 2, "(N, k)")
    den_a = v.float_stack(den, "den", 2, "(N, n + 1)")
    return _core.realize_batch(num_a, den_a, form)


def transfer_function_batch(a: Any, b: Any, c: Any, d: Any) -> Tuple[np.ndarray, np.ndarray]:
    r"""Transfer matrices of N state-space models of one shape in one call.

    Parameters
    ----------
    a : (N, n, n) array_like
    b : (N, n, m) array_like
    c : (N, p, n) array_like
    d : (N, p, m) array_like

    Returns
    -------
    num : (N, p, m, n + 1) ndarray
    den : (N, n + 1) ndarray
        ``(num[i], den[i])`` equals ``transfer_function(a[i], b[i], c[i], d[i])`` (default
        ``method="auto"``: certified double-double recursion, exact fallback) bit for bit.

    Raises
    ------
    ModelError
        Shapes that do not fit, or a bad model named by its (smallest) index.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> A, B, C, D = sw.realize_batch([[1, 3], [2, 0]], [[1, 3, 2], [1, 0, 4]])
    >>> num, den = sw.transfer_function_batch(A, B, C, D)
    >>> num[:, 0, 0], den
    (array([[0., 1., 3.],
           [0., 2., 0.]]), array([[1., 3., 2.],
           [1., 0., 4.]]))
    """
    mats = [v.float_stack(x, name, 3, shape) for x, name, shape in
            zip((a, b, c, d), "abcd", ("(N, n, n)", "(N, n, m)", "(N, p, n)", "(N, p, m)"))]
    return _core.transfer_function_batch(*mats)

"""Batches: many models in one call, computed in parallel in the Rust core with the GIL
released. Results equal a loop of single calls bit for bit."""

from __future__ import annotations

import re
from typing import Any, Callable, Optional, Tuple

import numpy as np

from .. import _core
from .._base import validate as v
from .._compute import hessenberg as compute_hessenberg
from .._compute.recover import METHODS
from .._core import ModelError
from .realize import FORMS

#: Models per call of the core when a progress callback is given.
PROGRESS_CHUNK = 65536

_INDEX = re.compile(r"^model (\d+) of the batch")


def offset_errors(fn: Callable[..., Any], start: int) -> Callable[..., Any]:
    """Wraps a batch call on rows ``start..``: a failing model is named by its index in the
    whole batch."""

    def run(*args: Any) -> Any:
        try:
            return fn(*args)
        except ModelError as err:
            text = _INDEX.sub(lambda m: f"model {int(m.group(1)) + start} of the batch", str(err))
            raise ModelError(text) from None

    return run


def _in_chunks(
    fn: Callable[..., Tuple[np.ndarray, ...]],
    arrays: Tuple[np.ndarray, ...],
    extra: Tuple[Any, ...],
    progress: Callable[[int, int], None],
) -> Tuple[np.ndarray, ...]:
    total = arrays[0].shape[0]
    parts = []
    progress(0, total)
    for start in range(0, total, PROGRESS_CHUNK):
        stop = min(start + PROGRESS_CHUNK, total)
        parts.append(offset_errors(fn, start)(*(x[start:stop] for x in arrays), *extra))
        progress(stop, total)
    if not parts:
        return fn(*arrays, *extra)
    return tuple(np.concatenate(p, axis=0) for p in zip(*parts))


def _check_progress(progress: Any) -> None:
    if progress is not None and not callable(progress):
        raise ModelError(
            f"progress: expected a callable progress(done, total) or None, found a {type(progress).__name__}"
        )


__all__ = ["realize_batch", "transfer_function_batch"]


def realize_batch(
    num: Any, den: Any, form: str = "controllable_canonical", *, progress: Optional[Callable[[int, int], None]] = None
) -> Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    r"""Realize N SISO transfer functions of one order n in one call.

    Parameters
    ----------
    num : (N, k) array_like
        Numerators, highest power first, ``k <= n + 1`` (shorter ones padded on the left).
    den : (N, n + 1) array_like
        Denominators; every leading coefficient must be nonzero (one order for the batch).
    form : str
        Any form of :func:`statewright.realize`.
    progress : callable, optional
        ``progress(done, total)``, called before the first and after every chunk of 65,536
        models (the core runs chunk by chunk then, and the results are joined at the end,
        one extra copy). Without it the whole batch is one call.

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
    >>> A, B, C, D = sw.realize_batch([[0.5, 4], [2, 0]], [[1, 1.2, 5], [1, 0, 4]])
    >>> A.shape, bool(np.array_equal(A[1], sw.realize([2, 0], [1, 0, 4]).a))
    ((2, 2, 2), True)
    """
    form = v.check_option(form, "form", FORMS)
    _check_progress(progress)
    # The bindings copy their input into owned core buffers: no second copy here.
    num_a = v.float_stack(num, "num", 2, "(N, k)", copy=False)
    den_a = v.float_stack(den, "den", 2, "(N, n + 1)", copy=False)
    if progress is not None and num_a.shape[0] == den_a.shape[0]:
        return _in_chunks(_core.realize_batch, (num_a, den_a), (form,), progress)  # type: ignore[return-value]
    return _core.realize_batch(num_a, den_a, form)


def transfer_function_batch(
    a: Any,
    b: Any,
    c: Any,
    d: Any,
    *,
    method: str = "auto",
    progress: Optional[Callable[[int, int], None]] = None,
) -> Tuple[np.ndarray, np.ndarray]:
    r"""Transfer matrices of N state-space models of one shape in one call.

    Parameters
    ----------
    a : (N, n, n) array_like
    b : (N, n, m) array_like
    c : (N, p, n) array_like
    d : (N, p, m) array_like
    method : {"auto", "recursion", "exact", "hessenberg"}
        As in :func:`statewright.transfer_function`. ``"hessenberg"`` (backward stable,
        O(n^3), not correctly rounded) runs on one scratch space per thread, nothing
        allocated per model.
    progress : callable, optional
        ``progress(done, total)``, as in :func:`realize_batch`.

    Returns
    -------
    num : (N, p, m, n + 1) ndarray
    den : (N, n + 1) ndarray
        ``(num[i], den[i])`` equals ``transfer_function(a[i], b[i], c[i], d[i], method=method)``
        (default ``method="auto"``: certified double-double recursion, exact fallback) bit
        for bit.

    Raises
    ------
    ModelError
        Shapes that do not fit, or a bad model named by its (smallest) index.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> A, B, C, D = sw.realize_batch([[0.5, 4], [2, 0]], [[1, 1.2, 5], [1, 0, 4]])
    >>> num, den = sw.transfer_function_batch(A, B, C, D)
    >>> num[:, 0, 0], den
    (array([[0. , 0.5, 4. ],
           [0. , 2. , 0. ]]), array([[1. , 1.2, 5. ],
           [1. , 0. , 4. ]]))
    """
    _check_progress(progress)
    mats = [
        v.float_stack(x, name, 3, shape, copy=False)
        for x, name, shape in zip((a, b, c, d), "abcd", ("(N, n, n)", "(N, n, m)", "(N, p, n)", "(N, p, m)"))
    ]
    method = v.check_option(method, "method", METHODS)
    if method == "auto":
        fn: Callable[..., Tuple[np.ndarray, np.ndarray]] = _core.transfer_function_batch
        extra: Tuple[Any, ...] = ()
    else:
        fn, extra = compute_hessenberg.transfer_function_batch_method, (method,)
    if progress is not None and len({m.shape[0] for m in mats}) == 1:
        return _in_chunks(fn, tuple(mats), extra, progress)  # type: ignore[return-value]
    return fn(*mats, *extra)

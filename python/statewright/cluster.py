"""Batches on a Dask cluster: the batch functions mapped over chunks of models.

Each chunk of rows (models) becomes one task that calls :func:`statewright.realize_batch`
or :func:`statewright.transfer_function_batch` on a worker, so the same code runs on a
laptop's ``LocalCluster`` or on a real cluster (point a ``dask.distributed.Client`` at its
scheduler). Dask is optional: ``pip install "dask[array,distributed]"``.

>>> import dask.array as da, numpy as np, statewright as sw
>>> from statewright.cluster import realize_batch_dask
>>> num = da.from_array(np.array([[0.5, 4.0], [2.0, 0.0]]), chunks=(1, 2))
>>> den = da.from_array(np.array([[1.0, 1.2, 5.0], [1.0, 0.0, 4.0]]), chunks=(1, 3))
>>> A, B, C, D = realize_batch_dask(num, den)
>>> A.compute(scheduler="synchronous").shape
(2, 2, 2)
"""

from __future__ import annotations

from typing import Any, List, Tuple

from ._api.batch import offset_errors as _offset_errors
from ._api.batch import realize_batch, transfer_function_batch
from ._base import validate as v
from ._core import ModelError

__all__ = ["realize_batch_dask", "transfer_function_batch_dask"]


def _import_dask() -> Any:
    try:
        import dask
        import dask.array as da
    except ImportError:  # pragma: no cover - depends on the environment
        raise ModelError('dask is not installed; pip install "dask[array,distributed]"') from None
    return dask, da


def _rows(x: Any, da: Any, arg: str, shape: str) -> Any:
    """A dask array of the described shape (e.g. "(N, k)"), one chunk across every axis but
    the first; numpy-like input is validated first."""
    ndim = shape.count(",") + 1
    if isinstance(x, da.Array):
        if x.ndim != ndim:
            raise ModelError(f"{arg}: expected a {ndim}-D array of shape {shape}, found shape {x.shape}")
        if x.dtype.kind not in "biuf":
            raise ModelError(f"{arg}: expected a numeric dask array, found dtype {x.dtype}")
        arr = x
    else:
        arr = da.from_array(v.float_stack(x, arg, ndim, shape), chunks=-1)
    if 0 in arr.shape:
        raise ModelError(
            f"{arg}: the batch is empty along a dimension (shape {arr.shape}); "
            "call the in-process batch function for empty batches"
        )
    arr = arr.astype(float)
    return arr.rechunk({i: -1 for i in range(1, arr.ndim)})


def realize_batch_dask(num: Any, den: Any, form: str = "controllable_canonical") -> Tuple[Any, Any, Any, Any]:
    """:func:`statewright.realize_batch` over the row chunks of dask arrays.

    Parameters
    ----------
    num : (N, k) dask or numpy array
    den : (N, n + 1) dask or numpy array (rechunked to ``num``'s row chunks)
    form : str

    Returns
    -------
    A, B, C, D : dask arrays of shapes (N, n, n), (N, n, 1), (N, 1, n), (N, 1, 1)
        Lazy; compute them together (``dask.compute(A, B, C, D)``) so each chunk runs once.
    """
    dask, da = _import_dask()
    num = _rows(num, da, "num", "(N, k)")
    den = _rows(den, da, "den", "(N, n + 1)")
    if den.shape[0] != num.shape[0]:
        raise ModelError(f"den: expected {num.shape[0]} rows (one per model, as num), found shape {den.shape}")
    den = den.rechunk({0: num.chunks[0]})
    n = den.shape[1] - 1
    outs: Tuple[List[Any], List[Any], List[Any], List[Any]] = ([], [], [], [])
    start = 0
    for nb, db, rows in zip(num.to_delayed().ravel(), den.to_delayed().ravel(), num.chunks[0]):
        part = dask.delayed(_offset_errors(realize_batch, start), nout=4)(nb, db, form)
        for out, piece, shape in zip(outs, part, ((rows, n, n), (rows, n, 1), (rows, 1, n), (rows, 1, 1))):
            out.append(da.from_delayed(piece, shape=shape, dtype=float))
        start += rows
    return tuple(da.concatenate(o, axis=0) for o in outs)


def transfer_function_batch_dask(a: Any, b: Any, c: Any, d: Any) -> Tuple[Any, Any]:
    """:func:`statewright.transfer_function_batch` over the row chunks of dask arrays.

    ``a`` (N, n, n), ``b`` (N, n, m), ``c`` (N, p, n), ``d`` (N, p, m); returns lazy
    ``num`` (N, p, m, n + 1) and ``den`` (N, n + 1).
    """
    dask, da = _import_dask()
    a = _rows(a, da, "a", "(N, n, n)")
    rest = []
    for x, name, shape in ((b, "b", "(N, n, m)"), (c, "c", "(N, p, n)"), (d, "d", "(N, p, m)")):
        x = _rows(x, da, name, shape)
        if x.shape[0] != a.shape[0]:
            raise ModelError(f"{name}: expected {a.shape[0]} models (as a), found shape {x.shape}")
        rest.append(x.rechunk({0: a.chunks[0]}))
    b, c, d = rest
    n, m, p = a.shape[1], b.shape[2], c.shape[1]
    nums, dens = [], []
    start = 0
    for ab, bb, cb, db, rows in zip(
        a.to_delayed().ravel(), b.to_delayed().ravel(), c.to_delayed().ravel(), d.to_delayed().ravel(), a.chunks[0]
    ):
        part = dask.delayed(_offset_errors(transfer_function_batch, start), nout=2)(ab, bb, cb, db)
        nums.append(da.from_delayed(part[0], shape=(rows, p, m, n + 1), dtype=float))
        dens.append(da.from_delayed(part[1], shape=(rows, n + 1), dtype=float))
        start += rows
    return da.concatenate(nums, axis=0), da.concatenate(dens, axis=0)

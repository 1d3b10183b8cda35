"""Transfer-function recovery on validated arrays (the core's Faddeev–LeVerrier routes)."""

from __future__ import annotations

from typing import Any, Dict, Tuple

import numpy as np

from .. import _core
from .._base import validate as v

__all__ = ["METHODS", "transfer_function_float", "transfer_function_exact"]

METHODS = ("auto", "recursion", "exact", "hessenberg")


def transfer_function_float(
    a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray, method: str
) -> Tuple[np.ndarray, np.ndarray, Dict[str, Any]]:
    """``(num, den, accuracy)`` of float64 matrices whose shapes were checked."""
    num, den, accuracy = _core.transfer_function_float((a, b, c, d), method)
    bound = accuracy["relative_error_bound"]
    if isinstance(bound, float) and not np.isfinite(bound):
        accuracy["relative_error_bound"] = None  # nothing certified (unchecked recursion)
    return num, den, accuracy


def transfer_function_exact(
    a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray
) -> Tuple[np.ndarray, np.ndarray]:
    """``(num, den)`` as object arrays of Fractions, from Fraction arrays whose shapes were checked."""
    n, p, m = a.shape[0], c.shape[0], b.shape[1]
    ea, eb, ec, ed = (v.to_core(x) for x in (a, b, c, d))
    exact_num, exact_den = _core.transfer_function_exact((ea, eb, ec, ed))
    return v.fraction_array(exact_num, (p, m, n + 1)), v.fraction_array(exact_den, (n + 1,))

"""Gramians, Hankel singular values and balanced realizations on validated float arrays."""

from __future__ import annotations

from typing import Any, Dict, Optional, Tuple

import numpy as np

from .. import _core

__all__ = ["gramians", "hankel_singular_values", "balanced_realization"]

Arrays4 = Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]


def gramians(a: np.ndarray, b: np.ndarray, c: np.ndarray, discrete: bool) -> Tuple[np.ndarray, np.ndarray]:
    """``(Wc, Wo)`` of a stable model whose shapes were checked."""
    wc, wo, _residuals = _core.gramians(a, b, c, discrete)
    return wc, wo


def hankel_singular_values(a: np.ndarray, b: np.ndarray, c: np.ndarray, discrete: bool) -> np.ndarray:
    """The Hankel singular values, descending."""
    return _core.hankel_singular_values(a, b, c, discrete)


def balanced_realization(
    a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray, order: Optional[int], discrete: bool
) -> Tuple[Arrays4, Dict[str, Any]]:
    """``(realization arrays, info)`` of the balanced (optionally truncated) realization."""
    (ra, rb, rc, rd), hsv, bound, residuals = _core.balanced_realization((a, b, c, d), order, discrete)
    hsv.flags.writeable = False
    # + 0.0: an empty sum in the core is -0.0, and a bound reads better without the sign
    info = {
        "hankel_singular_values": hsv,
        "error_bound": float(bound) + 0.0,
        "residuals": (float(residuals[0]), float(residuals[1])),
    }
    return (ra, rb, rc, rd), info

"""Staircase forms, Kalman decomposition and minimal realization on validated float arrays.

Each returns the core's raw result (arrays and plain values); ``_results`` wraps them."""

from __future__ import annotations

from typing import Any, Dict, Optional, Tuple

import numpy as np

from .. import _core

__all__ = ["controllability_staircase", "observability_staircase", "kalman_decomposition", "minimal_realization"]

StaircaseRaw = Tuple[Any, ...]

Arrays4 = Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]


def controllability_staircase(
    a: np.ndarray, b: np.ndarray, c: Optional[np.ndarray], tol: Optional[float]
) -> StaircaseRaw:
    """The raw controllability staircase of (A, B), carrying C along when given."""
    return tuple(_core.controllability_staircase(a, b, c, tol))


def observability_staircase(
    a: np.ndarray, b: Optional[np.ndarray], c: np.ndarray, tol: Optional[float]
) -> StaircaseRaw:
    """The raw observability staircase of (A, C), carrying B along when given."""
    return tuple(_core.observability_staircase(a, b, c, tol))


def kalman_decomposition(
    a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray, tol: Optional[float]
) -> Tuple[Arrays4, np.ndarray, Tuple[int, int, int, int], Dict[str, float]]:
    """``(realization arrays, T, sizes, info)`` of the Kalman decomposition."""
    (ra, rb, rc, rd), t, sizes, condition, residual = _core.kalman_decomposition((a, b, c, d), tol)
    info = {"condition": condition, "pattern_residual": residual}
    return (ra, rb, rc, rd), t, (sizes[0], sizes[1], sizes[2], sizes[3]), info


def minimal_realization(
    a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray, tol: Optional[float]
) -> Tuple[Arrays4, Dict[str, Any]]:
    """``(realization arrays, info)`` of the controllable and observable part."""
    (ra, rb, rc, rd), sc, so = _core.minimal_realization((a, b, c, d), tol)
    info = {
        "controllable_dimension": int(sc[5]),
        "minimal_dimension": int(so[5]),
        "controllability_singular_values": [np.array(s) for s in sc[6]],
        "observability_singular_values": [np.array(s) for s in so[6]],
        "tol": (float(sc[8]), float(so[8])),
    }
    return (ra, rb, rc, rd), info

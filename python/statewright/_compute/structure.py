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
    (ra, rb, rc, rd), t, sizes, condition, residual, checks, stairs = _core.kalman_decomposition((a, b, c, d), tol)
    zeroed_b, zeroed_c, markov, factor = checks
    info: Dict[str, Any] = {
        "condition": condition,
        "pattern_residual": residual,
        "zeroed_b": zeroed_b,
        "zeroed_c": zeroed_c,
        "markov_residual": markov,
        "tol_factor": None if factor != factor else factor,
        "backward_error": {
            name: [float(x) for x in st[10]] + [float(st[11][0]), float(st[11][1])]
            for name, st in zip(("controllable", "controllable_unobservable", "unobservable"), stairs)
        },
    }
    return (ra, rb, rc, rd), t, (sizes[0], sizes[1], sizes[2], sizes[3]), info


def minimal_realization(
    a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray, tol: Optional[float]
) -> Tuple[Arrays4, Dict[str, Any]]:
    """``(realization arrays, info)`` of the controllable and observable part."""
    (ra, rb, rc, rd), sc, so, (markov, markov_tol, factor) = _core.minimal_realization((a, b, c, d), tol)
    info = {
        "controllable_dimension": int(sc[5]),
        "minimal_dimension": int(so[5]),
        "controllability_singular_values": [np.array(s) for s in sc[6]],
        "observability_singular_values": [np.array(s) for s in so[6]],
        "tol": (float(sc[8]), float(so[8])),
        "thresholds": ([float(x) for x in sc[9]], [float(x) for x in so[9]]),
        "backward_error": ([float(x) for x in sc[10]], [float(x) for x in so[10]]),
        "split_residual": (tuple(float(x) for x in sc[11]), tuple(float(x) for x in so[11])),
        "markov_residual": float(markov),
        "markov_tolerance": float(markov_tol),
        "tol_factor": None if factor != factor else float(factor),
    }
    return (ra, rb, rc, rd), info

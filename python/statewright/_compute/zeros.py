"""Zeros and gains on validated float arrays: the core's results as numpy arrays and dicts."""

from __future__ import annotations

from typing import Any, Dict, Optional, Tuple

import numpy as np

from .. import _core

__all__ = [
    "invariant_zeros",
    "normal_rank",
    "dc_gain",
    "zeros_poles_gain",
    "realize_zeros_poles_gain",
    "invariant_zeros_batch",
]


def _complex(re: Any, im: Any) -> np.ndarray:
    out = np.empty(len(re), dtype=np.complex128)
    out.real = re
    out.imag = im
    return out


def invariant_zeros(
    a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray, tol: Optional[float], transmission: bool = False
) -> Tuple[np.ndarray, Dict[str, Any]]:
    """``(zeros, info)``: sorted complex zeros and the figures behind them."""
    re, im, info = _core.invariant_zeros((a, b, c, d), tol, transmission)
    info["decisions"] = [
        {"block": block, "pass": int(pas), "singular_values": np.array(sv), "kept": int(kept)}
        for block, pas, sv, kept in info["decisions"]
    ]
    return _complex(re, im), info


def normal_rank(a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray, tol: Optional[float]) -> int:
    return int(_core.normal_rank((a, b, c, d), tol))


def dc_gain(
    a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray, discrete: bool
) -> Tuple[np.ndarray, Dict[str, Any]]:
    g, condition, residual, reduced = _core.dc_gain((a, b, c, d), discrete)
    return g, {"condition": condition, "residual": residual, "reduced": reduced}


def zeros_poles_gain(num: np.ndarray, den: np.ndarray) -> Tuple[np.ndarray, np.ndarray, float]:
    zr, zi, pr, pi, gain = _core.zeros_poles_gain(num, den)
    return _complex(zr, zi), _complex(pr, pi), float(gain)


def realize_zeros_poles_gain(
    zeros: np.ndarray, poles: np.ndarray, gain: float, form: str
) -> Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    z = np.ascontiguousarray(zeros.real), np.ascontiguousarray(zeros.imag)
    p = np.ascontiguousarray(poles.real), np.ascontiguousarray(poles.imag)
    return tuple(_core.realize_zeros_poles_gain(z[0], z[1], p[0], p[1], gain, form))  # type: ignore[return-value]


def invariant_zeros_batch(
    a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray, tol: Optional[float]
) -> Tuple[np.ndarray, np.ndarray]:
    """``(zeros (N, n) complex, counts (N,) int64)``: row i holds counts[i] zeros, then zeros."""
    n = a.shape[1]
    re, im, counts = _core.invariant_zeros_batch(a, b, c, d, tol)
    out = np.empty(re.shape, dtype=np.complex128)
    out.real = re
    out.imag = im
    return np.ascontiguousarray(out[:, :n]), np.array(counts, dtype=np.int64).reshape(-1)

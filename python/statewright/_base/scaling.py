"""Exact power-of-two scaling of float data into a safe band, so intermediate sums cannot
overflow or underflow where the result is representable."""

from __future__ import annotations

import numpy as np

__all__ = ["range_exponent", "times_pow2"]

# Data whose largest magnitude lies outside this band are handled on a copy scaled by a
# power of two (exact), so intermediate sums cannot overflow where the result is finite.
_RANGE_LOW, _RANGE_HIGH = 1e-150, 1e150


def range_exponent(*arrays: np.ndarray) -> int:
    """e with max|x| * 2^-e near 1 when the largest magnitude is outside the safe band, else 0."""
    big = max((float(np.max(np.abs(x))) for x in arrays if x.size), default=0.0)
    if big == 0.0 or _RANGE_LOW <= big <= _RANGE_HIGH:
        return 0
    return int(np.frexp(big)[1])


def times_pow2(x: np.ndarray, e: int) -> np.ndarray:
    """x * 2^e, exactly unless the result leaves the range (ldexp saturates correctly)."""
    if e == 0:
        return x
    if np.iscomplexobj(x):
        return np.asarray(np.ldexp(x.real, e) + 1j * np.ldexp(x.imag, e))
    return np.asarray(np.ldexp(x, e))

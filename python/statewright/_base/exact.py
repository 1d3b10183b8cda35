"""Small exact linear algebra on object arrays of Fractions (used by ``transform``)."""

from __future__ import annotations

from fractions import Fraction

import numpy as np

from .._core import ModelError


def solve(t: np.ndarray, rhs: np.ndarray, arg: str) -> np.ndarray:
    """``t^-1 rhs`` by Gaussian elimination over the rationals (no rounding at all)."""
    n = t.shape[0]
    aug = [[Fraction(x) for x in list(t[i]) + list(rhs[i])] for i in range(n)]
    width = n + rhs.shape[1]
    for col in range(n):
        pivot = next((r for r in range(col, n) if aug[r][col] != 0), None)
        if pivot is None:
            raise ModelError(f"{arg}: the transformation is singular")
        aug[col], aug[pivot] = aug[pivot], aug[col]
        inv = 1 / aug[col][col]
        aug[col] = [x * inv for x in aug[col]]
        for r in range(n):
            if r != col and aug[r][col] != 0:
                f = aug[r][col]
                aug[r] = [x - f * y for x, y in zip(aug[r], aug[col])]
    out = np.empty((n, width - n), dtype=object)
    for i in range(n):
        out[i, :] = aug[i][n:]
    return out

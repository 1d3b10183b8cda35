"""Typesetting of matrices for notebooks (LaTeX) and terminals (text)."""

from __future__ import annotations

from fractions import Fraction
from typing import Any, Dict, List, Optional

import numpy as np

__all__ = ["latex_matrix", "text_matrix", "LATEX_MAX"]

LATEX_MAX = 12  # rows and columns shown before eliding, as notebooks get unreadable past that
_LATEX_MAX = LATEX_MAX


def _latex_entry(x: Any) -> str:
    if isinstance(x, Fraction):
        if x.denominator == 1:
            return str(x.numerator)
        sign = "-" if x < 0 else ""
        return rf"{sign}\frac{{{abs(x.numerator)}}}{{{x.denominator}}}"
    value = float(x)
    if value == 0.0:
        return "0"
    text = f"{value:.6g}"
    if "e" in text:
        mant, exp = text.split("e")
        return rf"{mant} \cdot 10^{{{int(exp)}}}"
    return text


def _shown(count: int) -> List[Optional[int]]:
    """Indices shown along an axis of ``count``: all up to ``_LATEX_MAX``, else the first and
    last ``_LATEX_MAX // 2`` with ``None`` marking the elision (so the first and last rows and
    columns, where the canonical forms keep their coefficients, always show)."""
    if count <= _LATEX_MAX:
        return list(range(count))
    half = _LATEX_MAX // 2
    return [*range(half), None, *range(count - half, count)]


def latex_matrix(m: np.ndarray) -> str:
    """A bmatrix, elided past ``_LATEX_MAX`` rows or columns (first and last rows and columns kept)."""
    rows, cols = m.shape
    if rows == 0 or cols == 0:
        return rf"[\,]_{{{rows}\times{cols}}}"
    col_idx = _shown(cols)
    lines = []
    for i in _shown(rows):
        if i is None:
            entries = [r"\ddots" if j is None else r"\vdots" for j in col_idx]
        else:
            entries = [r"\cdots" if j is None else _latex_entry(m[i, j]) for j in col_idx]
        lines.append(" & ".join(entries))
    return r"\begin{bmatrix}" + r" \\ ".join(lines) + r"\end{bmatrix}"


def text_matrix(m: np.ndarray) -> str:
    """Plain text for a terminal: numpy's layout, entries aligned (Fractions too), elided like
    the LaTeX past ``_LATEX_MAX`` rows or columns; an empty matrix says its shape."""
    rows, cols = m.shape
    if rows == 0 or cols == 0:
        return f"[] (empty, {rows}x{cols})"
    layout: Dict[str, Any] = {"max_line_width": 100, "threshold": _LATEX_MAX, "edgeitems": _LATEX_MAX // 2}
    if m.dtype == object:
        width = max(len(str(x)) for x in m.flat)
        return np.array2string(m, formatter={"object": lambda x: str(x).rjust(width)}, **layout)
    return np.array2string(m, **layout)

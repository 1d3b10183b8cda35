"""Typesetting of models and results for notebooks (LaTeX) and terminals (text).

LaTeX: every matrix is an ``array`` with one explicit column per shown column (the default
matrix environments of amsmath stop at ten columns, so the LaTeX of a 12-state model would
not compile in a PDF export), elided past ``LATEX_MAX`` rows or columns keeping the first
and last ones (where the canonical forms keep their coefficients). A display opens with a
caption (size, time base when the object records one, arithmetic), then places the
matrices on as many lines as their widths need (at most ``LINE_COLUMNS`` shown columns on a
line), so that a model with many inputs or outputs stays on the page. Block structure
(staircase steps, the four parts of a Kalman decomposition) is drawn as rules between the
blocks.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any, Dict, List, Optional, Sequence, Set, Tuple

import numpy as np

__all__ = [
    "LATEX_MAX",
    "LINE_COLUMNS",
    "latex_entry",
    "latex_matrix",
    "text_matrix",
    "model_caption",
    "latex_display",
    "realization_latex",
    "staircase_latex",
    "decomposition_latex",
]

LATEX_MAX = 12  # rows and columns shown before eliding, as notebooks get unreadable past that
LINE_COLUMNS = 14  # matrices share a line while their shown columns add up to at most this
_NOT_RECORDED = object()  # an object without a sample_time attribute: no time base to state


def latex_entry(x: Any) -> str:
    """One entry: a Fraction as ``\\frac``, a float to 6 significant digits with powers of
    ten written out, zero as 0."""
    if type(x).__module__.startswith("sympy"):  # the entries of a parametric realization
        import sympy  # type: ignore[import-untyped]

        return str(sympy.latex(x))
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
    """Indices shown along an axis of ``count``: all up to ``LATEX_MAX``, else the first and
    last ``LATEX_MAX // 2`` with ``None`` marking the elision (so the first and last rows and
    columns, where the canonical forms keep their coefficients, always show)."""
    if count <= LATEX_MAX:
        return list(range(count))
    half = LATEX_MAX // 2
    return [*range(half), None, *range(count - half, count)]


def _rule_positions(shown: List[Optional[int]], cuts: Sequence[int]) -> Set[int]:
    """Positions in the shown list after which a rule goes. A cut k lies between index
    k - 1 and k: the rule follows index k - 1 where that is shown, else the elision mark
    (the boundary lies inside the elided range)."""
    where = {j: p for p, j in enumerate(shown)}
    return {where.get(k - 1, where.get(None, -1)) for k in cuts} - {-1, len(shown) - 1}


def latex_matrix(m: np.ndarray, row_cuts: Sequence[int] = (), col_cuts: Sequence[int] = ()) -> str:
    """``\\left[\\begin{array}{rr|r} ... \\end{array}\\right]``: one declared column per shown
    column (no ten-column limit), elided past ``LATEX_MAX`` rows or columns, with a rule after
    row (column) k - 1 for every k in ``row_cuts`` (``col_cuts``) strictly inside the matrix.
    An empty matrix is ``[\\,]_{r\\times c}``."""
    rows, cols = m.shape
    if rows == 0 or cols == 0:
        return rf"[\,]_{{{rows}\times{cols}}}"
    col_idx, row_idx = _shown(cols), _shown(rows)
    col_rules = _rule_positions(col_idx, [int(k) for k in col_cuts if 0 < k < cols])
    row_rules = _rule_positions(row_idx, [int(k) for k in row_cuts if 0 < k < rows])
    spec = "".join(("c" if j is None else "r") + ("|" if p in col_rules else "") for p, j in enumerate(col_idx))
    lines = []
    for p, i in enumerate(row_idx):
        if i is None:
            entries = [r"\ddots" if j is None else r"\vdots" for j in col_idx]
        else:
            entries = [r"\cdots" if j is None else latex_entry(m[i, j]) for j in col_idx]
        line = " & ".join(entries)
        if p < len(row_idx) - 1:
            line += r" \\ \hline" if p in row_rules else r" \\"
        lines.append(line)
    return r"\left[\begin{array}{" + spec + "}" + " ".join(lines) + r"\end{array}\right]"


def text_matrix(m: np.ndarray) -> str:
    """Plain text for a terminal: numpy's layout, entries aligned (Fractions too), elided like
    the LaTeX past ``LATEX_MAX`` rows or columns; an empty matrix says its shape."""
    rows, cols = m.shape
    if rows == 0 or cols == 0:
        return f"[] (empty, {rows}x{cols})"
    layout: Dict[str, Any] = {"max_line_width": 100, "threshold": LATEX_MAX, "edgeitems": LATEX_MAX // 2}
    if m.dtype == object:
        width = max(len(str(x)) for x in m.flat)
        return np.array2string(m, formatter={"object": lambda x: str(x).rjust(width)}, **layout)
    return np.array2string(m, **layout)


def _count(n: int, word: str) -> str:
    return f"{n} {word}" if n == 1 else f"{n} {word}s"


def _time_base(obj: Any) -> Any:
    return getattr(obj, "sample_time", _NOT_RECORDED)


def model_caption(n_states: int, n_inputs: int, n_outputs: int, exact: bool, sample_time: Any = _NOT_RECORDED) -> str:
    """``12 states, 2 inputs, 2 outputs; continuous time; float64 entries ...``: the time base
    is stated only when given (``None``: continuous time; a number: the sample time)."""
    parts = [f"{_count(n_states, 'state')}, {_count(n_inputs, 'input')}, {_count(n_outputs, 'output')}"]
    if sample_time is not _NOT_RECORDED:
        parts.append("continuous time" if sample_time is None else f"discrete time, sample time {float(sample_time):g}")
    parts.append("exact rational entries" if exact else "float64 entries (6 significant digits shown)")
    if max(n_states, n_inputs, n_outputs) > LATEX_MAX:
        parts.append(f"first and last {LATEX_MAX // 2} rows and columns shown")
    return "; ".join(parts)


def _text(caption: str) -> str:
    """Caption text for ``\\text{...}``, LaTeX's special characters escaped."""
    for char, escaped in (("\\", r"\backslash "), ("{", r"\{"), ("}", r"\}"), ("_", r"\_"), ("%", r"\%")):
        caption = caption.replace(char, escaped)
    return caption.replace("&", r"\&").replace("#", r"\#").replace("$", r"\$")


Item = Tuple[str, np.ndarray, Sequence[int], Sequence[int]]


def latex_display(caption: str, items: Sequence[Item]) -> str:
    """``$``-delimited LaTeX: the caption on the first line, then ``name = matrix`` for each
    ``(name, matrix, row_cuts, col_cuts)``, as many on a line as fit ``LINE_COLUMNS`` shown
    columns (a matrix wider than that gets a line of its own)."""
    lines: List[List[str]] = []
    width = 0
    for name, m, row_cuts, col_cuts in items:
        w = max(1, len(_shown(m.shape[1])))
        item = f"{name} = {latex_matrix(m, row_cuts, col_cuts)}"
        if lines and width + w <= LINE_COLUMNS:
            lines[-1].append(item)
            width += w
        else:
            lines.append([item])
            width = w
    rows = [r"\text{" + _text(caption) + "}"] + [r",\quad ".join(items_on_line) for items_on_line in lines]
    return r"$\begin{array}{l}" + r" \\[6pt] ".join(rows) + r"\end{array}$"


def realization_latex(r: Any) -> str:
    """The display of a realization (anything with ``a, b, c, d``, ``n_states``, ``n_inputs``,
    ``n_outputs``, ``exact`` and optionally ``sample_time``)."""
    caption = model_caption(r.n_states, r.n_inputs, r.n_outputs, bool(r.exact), _time_base(r))
    return latex_display(caption, [(name, m, (), ()) for name, m in zip("ABCD", (r.a, r.b, r.c, r.d))])


def staircase_latex(s: Any) -> str:
    """The display of a staircase result: ``Q^T A Q``, ``Q^T B`` (and ``C Q``) with a rule after
    every step and at the reached dimension, so the staircase of blocks shows."""
    cuts = sorted(set(np.cumsum(s.blocks).tolist()) | {int(s.rank)})
    reached = "controllable" if s.kind == "controllability" else "observable"
    caption = (
        f"{s.kind} staircase: {reached} dimension {s.rank} of {s.n_states}, steps {list(s.blocks)}, "
        f"tol {s.tol:.3g}; Q orthogonal"
    )
    items: List[Item] = [("Q^T A Q", s.a, cuts, cuts), ("Q^T B", s.b, cuts, ())]
    if s.c is not None:
        items.append(("C Q", s.c, (), cuts))
    return latex_display(caption, items)


_PARTS = (
    "controllable and observable",
    "controllable and unobservable",
    "uncontrollable and observable",
    "uncontrollable and unobservable",
)


def decomposition_latex(k: Any) -> str:
    """The display of a Kalman decomposition: ``T^{-1} A T``, ``T^{-1} B``, ``C T``, ``D`` with
    rules between the four parts (empty parts leave no rule)."""
    sizes = [int(x) for x in k.sizes]
    cuts = sorted({sum(sizes[:i]) for i in range(1, 4)})
    parts = ", ".join(f"{name} {size}" for name, size in zip(_PARTS, sizes))
    condition = k.info.get("condition") if hasattr(k, "info") else None
    caption = "Kalman decomposition: " + parts + (f"; condition of T {condition:.3g}" if condition is not None else "")
    a, b, c, d = k.realization
    items: List[Item] = [
        ("T^{-1} A T", a, cuts, cuts),
        ("T^{-1} B", b, cuts, ()),
        ("C T", c, (), cuts),
        ("D", d, (), ()),
    ]
    return latex_display(caption, items)

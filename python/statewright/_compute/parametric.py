"""Core calls of the parametric routines on already checked plain data (see ``_base.symbolic``)."""

from __future__ import annotations

from typing import List, Tuple

from .. import _core
from .._base.symbolic import PlainEntry, PlainMatrix

__all__ = ["transfer_function_plain", "realize_plain"]


def transfer_function_plain(
    a: PlainMatrix, b: PlainMatrix, c: PlainMatrix, d: PlainMatrix
) -> Tuple[List[PlainEntry], List[PlainEntry]]:
    """``(num, den)``: num the p*m*(n+1) coefficient entries row-major, den the n+1 monic ones."""
    return _core.parametric_transfer_function(a, b, c, d)


def realize_plain(
    num: List[PlainEntry], den: List[PlainEntry], form: str
) -> Tuple[PlainMatrix, PlainMatrix, PlainMatrix, PlainMatrix]:
    """``(A, B, C, D)`` in the plain format of ``num / den`` (highest power first) in ``form``."""
    return _core.realize_parametric(num, den, form)

"""Conversions between continuous and discrete time and frequency responses on validated
arrays (the Rust core, ``src/time``)."""

from __future__ import annotations

from fractions import Fraction
from typing import Any, Dict, Optional, Tuple

import numpy as np

from .. import _core
from .._base import validate as v

__all__ = [
    "convert",
    "convert_exact",
    "frequency_response",
    "frequency_response_batch",
    "to_continuous_batch",
]

Arrays4 = Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]


def convert(
    model: Arrays4, sample_time: float, method: str, prewarp_frequency: Optional[float], forward: bool
) -> Tuple[Arrays4, Dict[str, Any]]:
    """``(arrays, info)``: the discrete model (``forward``) or the continuous one; the arrays
    are read-only. The core builds the whole info dict: ``"method"``, ``"sample_time"``,
    its figures (counts as ints) and ``"prewarp_frequency"`` when given."""
    return _core.convert_time_base(model, sample_time, method, prewarp_frequency, forward)


def convert_exact(model: Arrays4, sample_time: Fraction, method: str, forward: bool) -> Arrays4:
    """The exact conversion of an exact model (object arrays of Fractions)."""
    a, b, c, d = (v.to_core(x) for x in model)
    core_in = (a, b, c, d)
    pair = (sample_time.numerator, sample_time.denominator)
    out = _core.convert_time_base_exact(core_in, pair, method, forward)
    return tuple(v.fraction_array(x, (x[0], x[1])) for x in out)  # type: ignore[return-value]


def frequency_response(model: Arrays4, frequencies: np.ndarray, sample_time: Optional[float]) -> np.ndarray:
    """The (k, p, m) complex response."""
    return _core.frequency_response(model, frequencies, sample_time)


def frequency_response_batch(models: Arrays4, frequencies: np.ndarray, sample_time: Optional[float]) -> np.ndarray:
    """The (N, k, p, m) complex responses of a stack of models."""
    return _core.frequency_response_batch(models, frequencies, sample_time)


def to_continuous_batch(
    models: Arrays4, sample_time: float, method: str, prewarp_frequency: Optional[float]
) -> Tuple[Arrays4, np.ndarray]:
    """The stacked continuous models and each model's verification residual."""
    (a, b, c, d), residuals = _core.to_continuous_batch(models, sample_time, method, prewarp_frequency)
    return (a, b, c, d), residuals

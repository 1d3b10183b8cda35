"""Validation of time-base arguments: sample times, conversion methods, prewarp
frequencies and frequency grids (the same rules for the public functions and the
Realization methods)."""

from __future__ import annotations

from fractions import Fraction
from typing import Any, Optional

import numpy as np

from .._core import ModelError
from . import validate as v

#: Conversion methods between continuous and discrete time (API.md, version 2).
METHODS = (
    "zero_order_hold",
    "first_order_hold",
    "impulse_invariant",
    "bilinear",
    "forward_difference",
    "backward_difference",
)
#: The methods that are rational operations, offered with ``exact=True``.
EXACT_METHODS = ("bilinear", "forward_difference", "backward_difference")


def _positive_float(value: Any, arg: str, what: str) -> float:
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, float, Fraction, np.integer, np.floating)):
        raise ModelError(f"{arg}: expected {what}, found a {type(value).__name__}")
    try:
        t = float(value)
    except OverflowError:
        raise ModelError(f"{arg}: {value!r} is beyond the float64 range") from None
    if not (np.isfinite(t) and t > 0):
        raise ModelError(f"{arg}: must be a positive finite number, found {t}")
    return t


def sample_time(value: Any, arg: str = "sample_time") -> float:
    """A positive finite number of seconds per step, as a float."""
    return _positive_float(value, arg, "a positive number of seconds per step")


def optional_sample_time(value: Any, arg: str = "sample_time") -> Optional[float]:
    """None (continuous time) or a positive finite number of seconds per step."""
    if value is None:
        return None
    return _positive_float(value, arg, "None (continuous time) or a positive number of seconds per step")


def exact_sample_time(value: Any, arg: str = "sample_time") -> Fraction:
    """A positive exact number of seconds per step (int, Fraction or decimal string)."""
    t = v.to_fraction(value, arg)
    if t <= 0:
        raise ModelError(f"{arg}: must be a positive number of seconds, found {t}")
    return t


def method(value: Any, exact: bool = False) -> str:
    """A conversion method name; with ``exact`` only the rational methods."""
    name = v.check_option(value, "method", METHODS)
    if exact and name not in EXACT_METHODS:
        raise ModelError(
            f"method: {name!r} needs the matrix exponential, which is not rational; exact=True is offered "
            f"for {', '.join(map(repr, EXACT_METHODS))}"
        )
    return name


def prewarp_frequency(value: Any, exact: bool = False) -> Optional[float]:
    """None or a frequency in rad/s (its range, (0, pi/T), is checked by the core)."""
    if value is None:
        return None
    if exact:
        raise ModelError("prewarp_frequency: not offered with exact=True (tan is not rational)")
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, float, np.integer, np.floating)):
        raise ModelError(f"prewarp_frequency: expected a frequency in rad/s or None, found a {type(value).__name__}")
    try:
        return float(value)
    except OverflowError:
        raise ModelError(f"prewarp_frequency: {value!r} is beyond the float64 range") from None


def frequencies(value: Any) -> np.ndarray:
    """A 1-D float64 array of finite frequencies in rad/s (a scalar is one frequency)."""
    if value is None or isinstance(value, (str, bytes, dict, set)):
        raise ModelError(f"frequencies: expected a 1-D array of frequencies in rad/s, found a {type(value).__name__}")
    try:
        raw = np.asarray(value)
    except Exception as exc:
        raise ModelError(f"frequencies: cannot be read as a numeric array ({exc})") from None
    if raw.dtype.kind == "c":
        raise ModelError("frequencies: complex values are not accepted; give real frequencies in rad/s")
    if raw.dtype.kind not in "biuf" and raw.dtype != object:
        raise ModelError(f"frequencies: expected numbers, found an array of dtype {raw.dtype}")
    try:
        arr = np.array(raw, dtype=np.float64, order="C", copy=True)
    except (TypeError, ValueError, OverflowError) as exc:
        raise ModelError(f"frequencies: cannot be converted to float64 ({exc})") from None
    if arr.ndim == 0:
        arr = arr.reshape(1)
    if arr.ndim != 1:
        raise ModelError(f"frequencies: expected a 1-D array, found shape {arr.shape}")
    if not np.all(np.isfinite(arr)):
        raise ModelError("frequencies: contains NaN or infinity; all frequencies must be finite")
    return arr


def state_order(value: Any, n: int) -> Optional[int]:
    """None or a state count between 0 and n (a truncation order)."""
    if value is None:
        return None
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, np.integer)):
        raise ModelError(f"order: expected a nonnegative int or None, found a {type(value).__name__}")
    if not 0 <= int(value) <= n:
        raise ModelError(f"order: must be between 0 and the model's {n} states, found {int(value)}")
    return int(value)

"""Conversions of a model's four arrays to sympy matrices and scipy.signal systems.

sympy and SciPy are optional (``pip install 'statewright[interop]'``): they are imported
only inside the functions that need them, so ``import statewright`` needs numpy alone.
Neither ships type information, so their objects are typed ``Any`` here (the aliases
below say which class is meant).
"""

from __future__ import annotations

import importlib
import math
from fractions import Fraction
from typing import Any, Sequence, Tuple, Union

import numpy as np

from .._core import ModelError

__all__ = ["require", "check_sample_time", "sympy_matrices", "scipy_state_space"]

SympyMatrix = Any
"""A ``sympy.Matrix`` (sympy ships no type information)."""
ScipyStateSpace = Any
"""A ``scipy.signal.StateSpace`` (SciPy ships no type information)."""


def require(module: str, what: str) -> Any:
    """Imports an optional dependency, or says how to install it."""
    try:
        return importlib.import_module(module)
    except ImportError as exc:
        top = module.split(".")[0]
        raise ImportError(
            f"{what} needs {top}, an optional dependency of statewright; install it with "
            f"pip install 'statewright[interop]' (or pip install {top})"
        ) from exc


# --------------------------------------------------------------------------------------
# Realization -> sympy, scipy
# --------------------------------------------------------------------------------------


def sympy_matrices(arrays: Sequence[np.ndarray]) -> Tuple[SympyMatrix, SympyMatrix, SympyMatrix, SympyMatrix]:
    """``(A, B, C, D)`` as four ``sympy.Matrix`` of exact rationals (see ``Realization.to_sympy``)."""
    sympy = require("sympy", "Realization.to_sympy")
    out = []
    for m in arrays:
        # Fraction(x) is exact for an int, a Fraction and a float alike (a float64 is a
        # dyadic rational), so float data keep their exact binary value.
        entries = [Fraction(x) for x in m.reshape(-1).tolist()]
        out.append(sympy.Matrix(m.shape[0], m.shape[1], [sympy.Rational(f.numerator, f.denominator) for f in entries]))
    return out[0], out[1], out[2], out[3]


def check_sample_time(sample_time: Any) -> Union[None, bool, float]:
    """None (continuous time), True (discrete, sample time unspecified) or a positive finite float."""
    if sample_time is None:
        return None
    if isinstance(sample_time, (bool, np.bool_)) and sample_time:
        return True
    if isinstance(sample_time, (bool, np.bool_)) or not isinstance(sample_time, (int, float, np.integer, np.floating)):
        raise ModelError(
            "sample_time: expected None (continuous time), True (discrete time, sample time "
            f"unspecified) or a positive number, found {sample_time!r}"
        )
    value = float(sample_time)
    if not (math.isfinite(value) and value > 0.0):
        raise ModelError(f"sample_time: expected a positive finite number, found {sample_time!r}")
    return value


def scipy_state_space(arrays: Sequence[np.ndarray], sample_time: Union[None, bool, float] = None) -> ScipyStateSpace:
    """A ``scipy.signal.StateSpace`` of float64 copies (see ``Realization.to_scipy``)."""
    dt = check_sample_time(sample_time)
    signal = require("scipy.signal", "Realization.to_scipy")
    # fresh writable float64 copies: the realization's own arrays are read-only
    mats = []
    for m, name in zip(arrays, "abcd"):
        try:
            x = np.array(m, dtype=np.float64, order="C", copy=True)
        except OverflowError:
            x = np.full(m.shape, np.inf)
        if not np.all(np.isfinite(x)):
            raise ModelError(f"{name}: an exact entry is beyond the float64 range, so SciPy cannot hold it")
        mats.append(x)
    if dt is None:
        return signal.StateSpace(*mats)
    return signal.StateSpace(*mats, dt=dt)

"""The Hessenberg route on validated arrays: orthogonal Hessenberg reduction and La Budde's
recurrence in the core, with per-coefficient error estimates."""

from __future__ import annotations

from typing import Any, Dict, Optional, Tuple

import numpy as np

from .. import _core

__all__ = [
    "HESSENBERG_METHOD",
    "characteristic_polynomial_hessenberg",
    "transfer_function_hessenberg",
    "transfer_function_batch_method",
]

#: The name under which the route reports itself in ``return_accuracy`` dictionaries.
HESSENBERG_METHOD = "hessenberg reduction, La Budde recurrence (estimate)"


def worst_relative_estimate(values: np.ndarray, estimates: np.ndarray) -> Optional[float]:
    """Largest ``estimate / |value|`` (0 for zero estimates); None where an estimate reaches
    its value (no relative accuracy can be stated there)."""
    mask = estimates != 0
    if not mask.any():
        return 0.0
    v, e = np.abs(values[mask]), estimates[mask]
    if np.any(e >= v):
        return None
    return float(np.max(e / v))


def characteristic_polynomial_hessenberg(a: np.ndarray) -> Tuple[np.ndarray, np.ndarray]:
    """``(coeffs, estimates)`` of a square float64 matrix."""
    return _core.characteristic_polynomial_hessenberg(a)


def transfer_function_hessenberg(
    a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray
) -> Tuple[np.ndarray, np.ndarray, Dict[str, Any]]:
    """``(num, den, accuracy)`` of float64 matrices whose shapes were checked."""
    num, den, num_est, den_est = _core.transfer_function_hessenberg((a, b, c, d))
    worst_den = worst_relative_estimate(den, den_est)
    worst_num = worst_relative_estimate(num, num_est)
    worst = None if worst_den is None or worst_num is None else max(worst_den, worst_num)
    accuracy = {
        "method": HESSENBERG_METHOD,
        "relative_error_bound": None,  # an estimate, not a bound
        "relative_error_estimate": worst,
        "num_error_estimate": num_est,
        "den_error_estimate": den_est,
    }
    return num, den, accuracy


def transfer_function_batch_method(
    a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray, method: str
) -> Tuple[np.ndarray, np.ndarray]:
    """``(num, den)`` of a validated batch by a float method."""
    return _core.transfer_function_batch_method(a, b, c, d, method)

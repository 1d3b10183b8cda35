"""The Jordan (parallel) form on validated polynomials and the Luenberger multivariable
forms on validated models: float and exact core calls."""

from __future__ import annotations

from typing import Any, Dict, Optional, Tuple

import numpy as np

from .. import _core
from .._base import validate as v

__all__ = ["jordan_float", "jordan_exact", "multivariable_float", "multivariable_exact"]


def jordan_float(
    num: np.ndarray, den: np.ndarray, tol: Optional[float]
) -> Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, Dict[str, Any]]:
    """``(a, b, c, d, info)`` of the float Jordan form; poles and residues as complex."""
    (a, b, c, d), raw = _core.realize_jordan_float(num, den, tol)
    info: Dict[str, Any] = {
        "poles": np.array([complex(re, im) for re, im in raw["poles"]], dtype=complex),
        "multiplicities": tuple(raw["multiplicities"]),
        "cluster_spread": np.array(raw["cluster_spread"], dtype=float),
        "residues": tuple(np.array([complex(re, im) for re, im in r], dtype=complex) for r in raw["residues"]),
        "tol": raw["tol"],
        "condition": raw["condition"],
        "transfer_error": raw["transfer_error"],
    }
    for arr in (info["poles"], info["cluster_spread"], *info["residues"]):
        arr.setflags(write=False)
    return a, b, c, d, info


def jordan_exact(
    num: np.ndarray, den: np.ndarray
) -> Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, Dict[str, Any]]:
    """``(a, b, c, d, info)`` of the exact Jordan form (object arrays of Fractions); info
    holds ``factors`` (monic, highest power first), ``multiplicities`` and ``residues``
    (per factor, the numerators of ``1/f^1 .. 1/f^m``, highest power first)."""
    quad, factors = _core.realize_jordan_exact(v.to_core(num), v.to_core(den))
    a, b, c, d = (v.fraction_array(x, (x[0], x[1])) for x in quad)
    info: Dict[str, Any] = {
        "factors": tuple(tuple(v.fraction_array(f, (f[1],))) for f, _, _ in factors),
        "multiplicities": tuple(m for _, m, _ in factors),
        "residues": tuple(tuple(tuple(v.fraction_array(p, (p[1],))) for p in nums) for _, _, nums in factors),
    }
    return a, b, c, d, info


def _multivariable_info(raw: Dict[str, Any]) -> Dict[str, Any]:
    info: Dict[str, Any] = {
        "indices": tuple(int(k) for k in raw["indices"]),
        "condition": raw["condition"],
    }
    if "transform" in raw:  # float only
        transform = np.asarray(raw["transform"], dtype=float)
        transform.setflags(write=False)
        info.update(
            residual=float(raw["residual"]),
            markov_error=float(raw["markov_error"]),
            tol=raw["tol"],
            transform=transform,
        )
    return info


def multivariable_float(
    model: Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray], form: str, tol: Optional[float]
) -> Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, Dict[str, Any]]:
    """``(a, b, c, d, info)`` of the float Luenberger form (``form`` controller/observer)."""
    (a, b, c, d), raw = _core.multivariable_form_float(model, form, tol)
    return a, b, c, d, _multivariable_info(raw)


def multivariable_exact(
    model: Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray], form: str
) -> Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, Dict[str, Any]]:
    """``(a, b, c, d, info)`` of the exact Luenberger form (object arrays of Fractions)."""
    a_in, b_in, c_in, d_in = model
    core_model = (v.to_core(a_in), v.to_core(b_in), v.to_core(c_in), v.to_core(d_in))
    quad, raw = _core.multivariable_form_exact(core_model, form)
    a, b, c, d = (v.fraction_array(x, (x[0], x[1])) for x in quad)
    return a, b, c, d, _multivariable_info(raw)

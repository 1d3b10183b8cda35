"""The one place where user input is checked and converted before it reaches the core.

Every failure raises :class:`ModelError` naming the argument, the expected form and what
was found. Float data become fresh C-contiguous float64 arrays (never the caller's own),
exact data become :class:`fractions.Fraction` values.
"""

from __future__ import annotations

import numbers
from decimal import Decimal, InvalidOperation
from fractions import Fraction
from typing import Any, List, Optional, Tuple

import numpy as np

from .._core import ModelError

__all__ = [
    "float_matrix",
    "float_polynomial",
    "float_stack",
    "exact_matrix",
    "exact_polynomial",
    "fraction_array",
    "check_model_shapes",
    "check_option",
]

_REFUSED_TYPES = (str, bytes, dict, set)


def _describe(x: Any) -> str:
    if isinstance(x, np.ndarray):
        return f"an array of shape {x.shape} and dtype {x.dtype}"
    return f"a {type(x).__name__}"


def _float_array(x: Any, arg: str, check_finite: bool = True) -> np.ndarray:
    if x is None or isinstance(x, _REFUSED_TYPES):
        raise ModelError(f"{arg}: expected numbers (an array, list or scalar), found {_describe(x)}")
    try:
        raw = np.asarray(x)
    except Exception as exc:  # ragged lists and the like
        raise ModelError(f"{arg}: cannot be read as a numeric array ({exc})") from None
    if raw.dtype.kind == "c":
        raise ModelError(f"{arg}: complex values are not accepted; state-space data are real")
    if raw.dtype.kind not in "biuf" and raw.dtype != object:
        raise ModelError(f"{arg}: expected numbers, found {_describe(raw)}")
    try:
        arr = np.array(raw, dtype=np.float64, order="C", copy=True)
    except (TypeError, ValueError, OverflowError) as exc:
        raise ModelError(f"{arg}: cannot be converted to float64 ({exc})") from None
    if check_finite and not np.all(np.isfinite(arr)):
        raise ModelError(f"{arg}: contains NaN or infinity; all entries must be finite")
    return arr


def float_stack(x: Any, arg: str, ndim: int, shape_text: str, copy: bool = True) -> np.ndarray:
    """A fresh float64 C-contiguous array of ``ndim`` dimensions, for batches: finiteness is
    left to the core, which names the index of the model at fault.

    With ``copy=False`` a float64 C-contiguous array of ``ndim`` dimensions is passed through
    as it is: for bindings that copy their input into owned core buffers anyway (one copy of
    a large batch instead of two).
    """
    if not copy and type(x) is np.ndarray and x.dtype == np.float64 and x.ndim == ndim and x.flags.c_contiguous:
        return x
    arr = _float_array(x, arg, check_finite=False)
    if arr.ndim != ndim:
        raise ModelError(f"{arg}: expected a {ndim}-D array of shape {shape_text}, found shape {arr.shape}")
    return arr


def float_matrix(x: Any, arg: str) -> np.ndarray:
    """A fresh 2-D float64 C-contiguous copy of ``x``."""
    arr = _float_array(x, arg)
    if arr.ndim != 2:
        raise ModelError(
            f"{arg}: expected a 2-D array, found {arr.ndim}-D with shape {arr.shape} "
            "(a single input or output is still 2-D, e.g. shape (n, 1) or (1, n))"
        )
    return arr


def float_polynomial(x: Any, arg: str, check_finite: bool = True) -> np.ndarray:
    """A 1-D float64 coefficient array (highest power first); a scalar is degree 0.

    With ``check_finite=False`` a float64 1-D array is passed through as it is (the core
    copies it and checks finiteness itself): the fast path of single small calls.
    """
    if not check_finite and type(x) is np.ndarray and x.dtype == np.float64 and x.ndim == 1 and x.size:
        return x
    arr = _float_array(x, arg, check_finite)
    if arr.ndim == 0:
        arr = arr.reshape(1)
    if arr.ndim != 1:
        raise ModelError(f"{arg}: expected a 1-D coefficient array, found shape {arr.shape}")
    if arr.size == 0:
        raise ModelError(f"{arg}: the polynomial is empty; it needs at least one coefficient")
    return arr


#: Largest size, in bits, of the numerator or denominator of one exact entry. The exact
#: recursions multiply sizes by the order, so bigger entries would take unbounded time.
MAX_EXACT_BITS = 4096


def to_fraction(v: Any, arg: str) -> Fraction:
    """One exact number: int, Fraction (or any rational), Decimal or decimal string."""
    if isinstance(v, str) and len(v) > 2 * MAX_EXACT_BITS:
        raise ModelError(
            f"{arg}: an exact entry of {len(v)} characters exceeds the size limit "
            f"({MAX_EXACT_BITS} bits per numerator or denominator)"
        )
    q = _to_fraction(v, arg)
    if max(q.numerator.bit_length(), q.denominator.bit_length()) > MAX_EXACT_BITS:
        raise ModelError(
            f"{arg}: an exact entry needs more than {MAX_EXACT_BITS} bits "
            "(numerator or denominator); exact mode is limited to that size per entry"
        )
    return q


def _to_fraction(v: Any, arg: str) -> Fraction:
    if isinstance(v, (bool, np.bool_)):
        raise ModelError(f"{arg}: a boolean is not a number here")
    if isinstance(v, Fraction):
        return v
    if isinstance(v, (int, np.integer)):
        return Fraction(int(v))
    if isinstance(v, numbers.Rational):
        return Fraction(int(v.numerator), int(v.denominator))
    if isinstance(v, Decimal):
        if not v.is_finite():
            raise ModelError(f"{arg}: {v!r} is not finite")
        return Fraction(v)
    if isinstance(v, str):
        try:
            return Fraction(v.strip())
        except (ValueError, ZeroDivisionError, InvalidOperation):
            raise ModelError(
                f"{arg}: {v!r} is not an exact number (use an int, a Fraction, or a decimal "
                "string such as '0.25' or '1/3')"
            ) from None
    if isinstance(v, (float, np.floating)):
        raise ModelError(
            f"{arg}: exact mode takes ints, Fractions or decimal strings, found the float {v!r}; "
            f"write it as a string ('{v!r}') or a Fraction to say which exact value is meant"
        )
    raise ModelError(f"{arg}: exact mode takes ints, Fractions or decimal strings, found {_describe(v)}")


def _object_array(x: Any, arg: str) -> np.ndarray:
    if x is None or isinstance(x, (dict, set, bytes)):
        raise ModelError(f"{arg}: expected exact numbers (an array or list), found {_describe(x)}")
    try:
        raw = np.array(x, dtype=object)
    except Exception as exc:
        raise ModelError(f"{arg}: cannot be read as an array ({exc})") from None
    flat = [to_fraction(v, arg) for v in raw.reshape(-1)]
    out = np.empty(raw.shape, dtype=object)
    out.reshape(-1)[:] = flat
    return out


def exact_matrix(x: Any, arg: str) -> np.ndarray:
    """A 2-D object array of Fractions."""
    arr = _object_array(x, arg)
    if arr.ndim != 2:
        raise ModelError(f"{arg}: expected a 2-D array, found {arr.ndim}-D with shape {arr.shape}")
    return arr


def exact_polynomial(x: Any, arg: str) -> np.ndarray:
    """A 1-D object array of Fractions (a scalar is degree 0)."""
    arr = _object_array(x, arg)
    if arr.ndim == 0:
        arr = arr.reshape(1)
    if arr.ndim != 1:
        raise ModelError(f"{arg}: expected a 1-D coefficient array, found shape {arr.shape}")
    if arr.size == 0:
        raise ModelError(f"{arg}: the polynomial is empty; it needs at least one coefficient")
    return arr


def to_core(arr: np.ndarray) -> Tuple[int, int, List[int], List[int]]:
    """Fractions in the (rows, cols, numerators, denominators) form the core takes."""
    rows, cols = (arr.shape[0], arr.shape[1]) if arr.ndim == 2 else (1, arr.shape[0])
    flat = arr.reshape(-1)
    return rows, cols, [f.numerator for f in flat], [f.denominator for f in flat]


def fraction_array(data: Tuple[int, int, List[int], List[int]], shape: Tuple[int, ...]) -> np.ndarray:
    """An object array of Fractions from the core's (rows, cols, nums, dens)."""
    _, _, nums, dens = data
    out = np.empty(len(nums), dtype=object)
    out[:] = [Fraction(p, q) for p, q in zip(nums, dens)]
    return out.reshape(shape)


def require_square(a: np.ndarray) -> np.ndarray:
    """``a`` itself when it is square (the matrix A of a model)."""
    if a.shape[0] != a.shape[1]:
        raise ModelError(f"a: expected a square matrix, found shape {a.shape}")
    return a


def check_model_shapes(a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray) -> None:
    """A n×n, B n×m, C p×n, D p×m."""
    n = require_square(a).shape[0]
    if b.shape[0] != n:
        raise ModelError(f"b: expected {n} rows (one per state, as a is {n}x{n}), found shape {b.shape}")
    if c.shape[1] != n:
        raise ModelError(f"c: expected {n} columns (one per state, as a is {n}x{n}), found shape {c.shape}")
    if d.shape != (c.shape[0], b.shape[1]):
        raise ModelError(f"d: expected shape ({c.shape[0]}, {b.shape[1]}) (outputs x inputs), found shape {d.shape}")


def check_option(value: Any, arg: str, allowed: Tuple[str, ...]) -> str:
    if not isinstance(value, str) or value not in allowed:
        raise ModelError(f"{arg}: unknown value {value!r}; expected one of {', '.join(map(repr, allowed))}")
    return value


def check_flag(value: Any, arg: str) -> bool:
    if not isinstance(value, (bool, np.bool_)):
        raise ModelError(f"{arg}: expected True or False, found {_describe(value)}")
    return bool(value)


def tol(value: Any, arg: str = "tol") -> Optional[float]:
    """None (the routine's documented default) or a finite nonnegative float."""
    if value is None:
        return None
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, float, np.integer, np.floating)):
        raise ModelError(f"{arg}: expected a nonnegative number or None, found a {type(value).__name__}")
    try:
        t = float(value)
    except OverflowError:
        raise ModelError(f"{arg}: {value!r} is beyond the float64 range") from None
    if not (np.isfinite(t) and t >= 0):
        raise ModelError(f"{arg}: must be finite and >= 0, found {t}")
    return t


def float_model(a: Any, b: Any, c: Any, d: Any) -> Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """The four matrices of a model as float64 C-contiguous copies whose shapes fit together."""
    fa, fb, fc, fd = (float_matrix(x, name) for x, name in zip((a, b, c, d), "abcd"))
    check_model_shapes(fa, fb, fc, fd)
    return fa, fb, fc, fd


def float_model_for_core(a: Any, b: Any, c: Any, d: Any) -> Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """The four matrices of a model for a core routine that copies them and checks their
    finiteness itself (same message as here): float64 2-D arrays pass as they are, shapes
    checked; anything else goes through :func:`float_model`. The fast path of single
    calls on small models."""
    nd = np.ndarray
    f64 = _FLOAT64
    if (
        type(a) is nd
        and type(b) is nd
        and type(c) is nd
        and type(d) is nd
        and a.dtype is f64
        and b.dtype is f64
        and c.dtype is f64
        and d.dtype is f64
        and a.ndim == 2
        and b.ndim == 2
        and c.ndim == 2
        and d.ndim == 2
    ):
        (n, n2), (nb, m), (p, nc) = a.shape, b.shape, c.shape
        if not (n == n2 == nb == nc and d.shape == (p, m)):
            check_model_shapes(a, b, c, d)  # raises with the message naming the argument
        return a, b, c, d
    return float_model(a, b, c, d)


#: The native float64 dtype (numpy hands out this one object for it; any other float64
#: descriptor, such as a byte-swapped one, takes the general path).
_FLOAT64 = np.dtype(np.float64)


def frozen(x: np.ndarray) -> np.ndarray:
    """x made read-only (results are handed out frozen, so callers cannot edit them in place)."""
    x.flags.writeable = False
    return x

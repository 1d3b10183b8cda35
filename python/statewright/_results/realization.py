"""Result objects: :class:`Realization`, with notebook display and pickling."""

from __future__ import annotations

import types
from fractions import Fraction
from typing import Any, Dict, Iterator, Mapping, Optional, SupportsIndex, Tuple, Union, overload

import numpy as np
import numpy.typing as npt

from .._base import time_base as tb
from .._base import validate as v
from .._base.display import realization_latex, text_matrix
from .._base.exact import solve
from .._base.scaling import range_exponent, times_pow2
from .._compute import identify, interop, recover, structure, zeros
from .._compute import time as time_compute
from .._compute.recover import METHODS
from .._core import ModelError
from .structure import Decomposition, Staircase

__all__ = ["Realization"]


def _is_exact(x: Any) -> bool:
    return isinstance(x, np.ndarray) and x.dtype == object


def _holds_fraction(x: Any) -> bool:
    if isinstance(x, np.ndarray) and x.dtype != object:
        return False
    try:
        flat = np.array(x, dtype=object).reshape(-1)
    except Exception:
        return False
    return any(isinstance(e, Fraction) for e in flat)


_NO_INFO: "types.MappingProxyType[str, Any]" = types.MappingProxyType({})


class Realization:
    """A state-space model ``x' = A x + B u``, ``y = C x + D u`` (or its discrete-time twin).

    A frozen container of four 2-D arrays: float64, or object arrays of
    :class:`fractions.Fraction` for exact data. It unpacks like a tuple
    (``A, B, C, D = r``); the arrays are read-only (copy them to edit).

    Parameters
    ----------
    a, b, c, d : array_like
        ``(n, n)``, ``(n, m)``, ``(p, n)`` and ``(p, m)`` arrays. Arrays holding
        Fractions make an exact realization.
    info : mapping, optional
        Diagnostics from the computation that made the realization.
    sample_time : float, optional
        The time base: None (default) for continuous time, a positive number of seconds
        per step for discrete time (a Fraction for exact realizations made with
        ``exact=True``). Every method that depends on it uses it.

    Raises
    ------
    ModelError
        When the shapes do not fit together or an entry is not finite.
    """

    __slots__ = ("_a", "_b", "_c", "_d", "_info", "_sample_time")

    def __init__(
        self,
        a: Any,
        b: Any,
        c: Any,
        d: Any,
        info: Optional[Mapping[str, Any]] = None,
        *,
        sample_time: Optional[float] = None,
    ) -> None:
        exact = any(_holds_fraction(x) for x in (a, b, c, d))
        if exact:
            arrays = [v.exact_matrix(x, name) for x, name in zip((a, b, c, d), "abcd")]
        else:
            arrays = [v.float_matrix(x, name) for x, name in zip((a, b, c, d), "abcd")]
        v.check_model_shapes(*arrays)
        self._a, self._b, self._c, self._d = (v.frozen(x) for x in arrays)
        if info is not None and not isinstance(info, Mapping):
            raise ModelError(f"info: expected a mapping of diagnostics or None, found a {type(info).__name__}")
        self._info = types.MappingProxyType(dict(info or {}))
        self._sample_time = _time_base(sample_time)

    @classmethod
    def _trusted(
        cls,
        a: np.ndarray,
        b: np.ndarray,
        c: np.ndarray,
        d: np.ndarray,
        info: Optional[Mapping[str, Any]] = None,
        frozen: bool = False,
        sample_time: Any = None,
        owned: bool = False,
    ) -> "Realization":
        """Wraps arrays fresh from the core (already checked) without another copy; with
        ``owned`` the info dict is fresh too and is wrapped without a copy."""
        self = cls.__new__(cls)
        if frozen:
            self._a, self._b, self._c, self._d = a, b, c, d
        else:
            self._a, self._b, self._c, self._d = (v.frozen(x) for x in (a, b, c, d))
        if info:
            self._info = types.MappingProxyType(info if owned and type(info) is dict else dict(info))
        else:
            self._info = _NO_INFO
        self._sample_time = sample_time
        return self

    @classmethod
    def _from_core(
        cls, a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray, info: Dict[str, Any], sample_time: Any
    ) -> "Realization":
        """:meth:`_trusted` for read-only arrays and a fresh info dict from the core, with
        positional arguments only (the per-call path of small conversions)."""
        self = cls.__new__(cls)
        self._a, self._b, self._c, self._d = a, b, c, d
        self._info = types.MappingProxyType(info)
        self._sample_time = sample_time
        return self

    # -- the four matrices -------------------------------------------------------------
    @property
    def a(self) -> np.ndarray:
        """State matrix A, shape (n, n)."""
        return self._a

    @property
    def b(self) -> np.ndarray:
        """Input matrix B, shape (n, m)."""
        return self._b

    @property
    def c(self) -> np.ndarray:
        """Output matrix C, shape (p, n)."""
        return self._c

    @property
    def d(self) -> np.ndarray:
        """Direct feedthrough D, shape (p, m)."""
        return self._d

    @property
    def info(self) -> Mapping[str, Any]:
        """Read-only diagnostics of the computation that made this realization."""
        return self._info

    @property
    def sample_time(self) -> Any:
        """The time base: None for continuous time, else seconds per step (discrete time)."""
        return self._sample_time

    @property
    def discrete(self) -> bool:
        """True for a discrete-time realization (``sample_time`` is set)."""
        return self._sample_time is not None

    @property
    def n_states(self) -> int:
        return int(self._a.shape[0])

    @property
    def n_inputs(self) -> int:
        return int(self._b.shape[1])

    @property
    def n_outputs(self) -> int:
        return int(self._c.shape[0])

    @property
    def exact(self) -> bool:
        """True when the matrices hold exact Fractions."""
        return _is_exact(self._a) or _is_exact(self._d)

    def __iter__(self) -> Iterator[np.ndarray]:
        return iter((self._a, self._b, self._c, self._d))

    def __len__(self) -> int:
        return 4

    @overload
    def __getitem__(self, k: SupportsIndex) -> np.ndarray: ...
    @overload
    def __getitem__(self, k: slice) -> Tuple[np.ndarray, ...]: ...

    def __getitem__(self, k: Union[SupportsIndex, slice]) -> Union[np.ndarray, Tuple[np.ndarray, ...]]:
        return (self._a, self._b, self._c, self._d)[k]

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, Realization):
            return NotImplemented
        return all(x.shape == y.shape and bool(np.all(x == y)) for x, y in zip(self, other))

    __hash__ = None  # type: ignore[assignment]

    def __reduce__(self) -> Tuple[Any, ...]:
        return (
            _rebuild,
            (
                np.array(self._a),
                np.array(self._b),
                np.array(self._c),
                np.array(self._d),
                dict(self._info),
                self._sample_time,
            ),
        )

    # -- analysis ----------------------------------------------------------------------
    def _float(self) -> Tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        out = []
        for x, name in zip(self, "abcd"):
            try:
                f = np.asarray(x, dtype=np.float64)
            except OverflowError:  # an exact entry beyond the float64 range
                f = np.full(x.shape, np.inf)
            if x.dtype == object and not np.all(np.isfinite(f)):
                raise ModelError(f"{name}: an exact entry is beyond the float64 range; this computation is in float64")
            out.append(f)
        return out[0], out[1], out[2], out[3]

    def poles(self) -> np.ndarray:
        """Eigenvalues of A (complex array, sorted by real part then imaginary part)."""
        a = self._float()[0]
        if a.shape[0] == 0:
            return np.zeros(0, dtype=complex)
        # eig(2^-e A) = 2^-e eig(A): LAPACK's own norms overflow near the top of the range.
        e = range_exponent(a)
        p = times_pow2(np.linalg.eigvals(times_pow2(a, -e)).astype(complex), e)
        if not np.all(np.isfinite(p)):
            raise ModelError("a: an eigenvalue lies beyond the float64 range although the entries are finite")
        return p[np.lexsort((p.imag, p.real))]

    def transfer_function(self, *, method: str = "auto") -> Tuple[np.ndarray, np.ndarray]:
        """``(num, den)`` of ``C (sI - A)^-1 B + D``; exact for an exact realization.

        See :func:`statewright.transfer_function` for the layout and accuracy.
        """
        if self.exact:
            return recover.transfer_function_exact(*self)
        method = v.check_option(method, "method", METHODS)
        num, den, _accuracy = recover.transfer_function_float(*self._float(), method)
        return num, den

    def evaluate(self, s: npt.ArrayLike) -> np.ndarray:
        """The transfer matrix ``C (sI - A)^-1 B + D`` at s.

        A complex (p, m) array for a scalar s, a (k, p, m) array for a 1-D array of k points.
        """
        a, b, c, d = self._float()
        if s is None or isinstance(s, (str, bytes, dict, set)):
            raise ModelError(f"s: expected a number or a 1-D array of numbers, found a {type(s).__name__}")
        try:
            points = np.asarray(s, dtype=complex)
        except (TypeError, ValueError) as exc:
            raise ModelError(f"s: cannot be read as complex points ({exc})") from None
        except OverflowError:
            raise ModelError("s: a point lies beyond the float64 range") from None
        if points.ndim > 1:
            raise ModelError(f"s: expected a scalar or a 1-D array of points, found shape {points.shape}")
        if not np.all(np.isfinite(points)):
            raise ModelError("s: contains NaN or infinity")
        flat = points.reshape(-1)
        n = a.shape[0]
        out = np.broadcast_to(d.astype(complex), (flat.size,) + d.shape).copy()
        if n:
            # C (sI - A)^-1 B = 2^(eb + ec - es) · C' (s' I - A')^-1 B' with every primed
            # quantity scaled by a power of two into the safe band (no change for ordinary data).
            es, eb, ec = range_exponent(flat, a), range_exponent(b), range_exponent(c)
            pencil = times_pow2(flat, -es)[:, None, None] * np.eye(n) - times_pow2(a, -es)
            rhs = np.broadcast_to(times_pow2(b, -eb).astype(complex), (flat.size,) + b.shape)
            with np.errstate(all="ignore"):
                try:
                    x = np.linalg.solve(pencil, rhs)
                except np.linalg.LinAlgError:
                    raise ModelError("s: a point coincides with a pole (sI - A is singular there)") from None
                if not np.all(np.isfinite(x)):
                    raise ModelError("s: a point lies numerically on a pole (sI - A is singular to working precision)")
                out += times_pow2(times_pow2(c, -ec) @ x, eb + ec - es)
        if not np.all(np.isfinite(out)):
            raise ModelError("s: the transfer matrix at this point lies beyond the float64 range")
        return out[0] if points.ndim == 0 else out

    def transform(self, t: Any) -> "Realization":
        """The similar realization ``(T^-1 A T, T^-1 B, C T, D)``.

        Exact when the realization and T are exact (T of ints, Fractions or decimal strings).
        """
        if self.exact:
            tm = v.exact_matrix(t, "t")
            self._check_transform(tm)
            a = solve(tm, self._a.dot(tm), "t")
            b = solve(tm, self._b, "t")
            return Realization._trusted(a, b, self._c.dot(tm), self._d, sample_time=self._sample_time)
        tm = v.float_matrix(t, "t")
        self._check_transform(tm)
        a, b, c, d = self._float()
        if tm.shape[0] and np.linalg.cond(tm) > 1.0 / np.finfo(float).eps:
            raise ModelError("t: the transformation is singular to working precision")
        rhs = np.hstack([a @ tm, b])
        sol = np.linalg.solve(tm, rhs) if tm.shape[0] else rhs
        n = self.n_states
        parts = (sol[:, :n], sol[:, n:], c @ tm)
        if not all(np.all(np.isfinite(x)) for x in parts):
            raise ModelError("t: the transformed realization overflows float64 (T is too badly scaled)")
        return Realization(*parts, d, sample_time=self._sample_time)

    def _check_transform(self, tm: np.ndarray) -> None:
        n = self.n_states
        if tm.shape != (n, n):
            raise ModelError(f"t: expected shape ({n}, {n}) (one row and column per state), found {tm.shape}")

    # -- other libraries ---------------------------------------------------------------
    def to_sympy(self) -> Tuple[Any, Any, Any, Any]:
        """``(A, B, C, D)`` as four ``sympy.Matrix`` of exact ``sympy.Rational`` entries.

        Exact realizations keep their fractions. Float entries become the exact rational
        value of the float64 (``0.1`` becomes ``3602879701896397/36028797018963968``), so
        that symbolic algebra on the result involves no further rounding; call ``.evalf()``
        on a matrix for decimals, or realize with ``exact=True`` from decimal strings to get
        short fractions. Needs sympy (``pip install 'statewright[interop]'``).

        Examples
        --------
        >>> import statewright as sw
        >>> A, B, C, D = sw.realize(["1/2"], [1, 3], exact=True).to_sympy()
        >>> A, C
        (Matrix([[-3]]), Matrix([[1/2]]))
        """
        return interop.sympy_matrices(tuple(self))

    def to_scipy(self, *, sample_time: Union[None, bool, float] = None) -> Any:
        """A ``scipy.signal.StateSpace`` with float64 copies of the four matrices.

        ``sample_time=None`` (default) gives a continuous-time system; a positive number (or
        ``True``, unspecified) a discrete-time one with that sample time (SciPy's ``dt``).
        Exact entries are rounded to the nearest float64. Needs SciPy
        (``pip install 'statewright[interop]'``).

        Examples
        --------
        >>> import statewright as sw
        >>> sw.realize([1], [1, 2]).to_scipy().A
        array([[-2.]])
        """
        return interop.scipy_state_space(tuple(self), sample_time)

    # -- structure (float data; an exact realization is converted to float64) ------------
    def controllability_staircase(self, *, tol: Optional[float] = None) -> Staircase:
        """:func:`statewright.controllability_staircase` of (A, B), carrying C along."""
        a, b, c, _ = self._float()
        return Staircase(structure.controllability_staircase(a, b, c, v.tol(tol)), "controllability")

    def observability_staircase(self, *, tol: Optional[float] = None) -> Staircase:
        """:func:`statewright.observability_staircase` of (A, C), carrying B along."""
        a, b, c, _ = self._float()
        return Staircase(structure.observability_staircase(a, b, c, v.tol(tol)), "observability")

    def is_controllable(self, *, tol: Optional[float] = None) -> bool:
        """True when the controllability staircase reaches every state."""
        return self.controllability_staircase(tol=tol).rank == self.n_states

    def is_observable(self, *, tol: Optional[float] = None) -> bool:
        """True when the observability staircase reaches every state."""
        return self.observability_staircase(tol=tol).rank == self.n_states

    def kalman_decomposition(self, *, tol: Optional[float] = None) -> Decomposition:
        """:func:`statewright.kalman_decomposition` of this realization."""
        arrays, t, sizes, info = structure.kalman_decomposition(*self._float(), v.tol(tol))
        return Decomposition(Realization._trusted(*arrays, sample_time=self._sample_time), t, sizes, info)

    def minimal_realization(self, *, tol: Optional[float] = None) -> "Realization":
        """:func:`statewright.minimal_realization` of this realization."""
        arrays, info = structure.minimal_realization(*self._float(), v.tol(tol))
        return Realization._trusted(*arrays, info, sample_time=self._sample_time)

    # -- time base: every method below uses the realization's own sample_time -----------
    def gramians(self) -> Tuple[np.ndarray, np.ndarray]:
        """:func:`statewright.gramians` ``(Wc, Wo)`` in this realization's time base."""
        a, b, c, _ = self._float()
        return identify.gramians(a, b, c, self.discrete)

    def hankel_singular_values(self) -> np.ndarray:
        """:func:`statewright.hankel_singular_values` in this realization's time base."""
        a, b, c, _ = self._float()
        return identify.hankel_singular_values(a, b, c, self.discrete)

    def balanced(self, order: Optional[int] = None) -> "Realization":
        """:func:`statewright.balanced_realization` (truncated to ``order`` states when
        given) in this realization's time base; the result keeps it."""
        arrays, info = identify.balanced_realization(
            *self._float(), tb.state_order(order, self.n_states), self.discrete
        )
        return Realization._trusted(*arrays, info, sample_time=self._sample_time)

    def frequency_response(self, frequencies: npt.ArrayLike) -> np.ndarray:
        """:func:`statewright.frequency_response` at ``frequencies`` (rad/s): ``G(jw)``, or
        ``G(exp(jwT))`` for a discrete realization. A (k, p, m) complex array."""
        t = None if self._sample_time is None else float(self._sample_time)
        return time_compute.frequency_response(self._float(), tb.frequencies(frequencies), t)

    def to_discrete(
        self,
        sample_time: Any,
        method: str = "zero_order_hold",
        *,
        prewarp_frequency: Optional[float] = None,
        exact: bool = False,
    ) -> "Realization":
        """:func:`statewright.to_discrete` of this continuous realization.

        ``exact=True`` needs an exact realization, an exact sample time and a rational
        method; a discrete realization is refused (convert it to continuous time first).
        """
        if self._sample_time is not None:
            raise ModelError(
                f"sample_time: this realization is already discrete (sample_time={self._sample_time}); "
                "call .to_continuous() first to resample it"
            )
        return self._convert(sample_time, method, prewarp_frequency, exact, True)

    def to_continuous(
        self, method: str = "zero_order_hold", *, prewarp_frequency: Optional[float] = None, exact: bool = False
    ) -> "Realization":
        """:func:`statewright.to_continuous` of this discrete realization, with its own
        sample time; a continuous realization is refused."""
        if self._sample_time is None:
            raise ModelError(
                "sample_time: this realization is continuous (sample_time is None); to_continuous needs a discrete one"
            )
        return self._convert(self._sample_time, method, prewarp_frequency, exact, False)

    def _convert(self, sample_time: Any, method: Any, prewarp: Any, exact: Any, forward: bool) -> "Realization":
        exact = v.check_flag(exact, "exact")
        method = tb.method(method, exact)
        prewarp = tb.prewarp_frequency(prewarp, exact)
        if exact:
            if not self.exact:
                raise ModelError("exact: exact=True needs an exact realization (Fractions); this one is float64")
            t = tb.exact_sample_time(sample_time)
            out = time_compute.convert_exact(tuple(self), t, method, forward)  # type: ignore[arg-type]
            return Realization._trusted(*out, {"method": method, "sample_time": t}, sample_time=t if forward else None)
        seconds = tb.sample_time(sample_time)
        out, info = time_compute.convert(self._float(), seconds, method, prewarp, forward)
        return Realization._trusted(*out, info, frozen=True, sample_time=seconds if forward else None)

    def zeros(self, *, tol: Optional[float] = None) -> np.ndarray:
        """:func:`statewright.invariant_zeros` of this realization."""
        return zeros.invariant_zeros(*self._float(), v.tol(tol))[0]

    # -- display -----------------------------------------------------------------------
    def _repr_latex_(self) -> str:
        """Typeset matrices under a caption of the size, time base and arithmetic
        (``statewright._base.display``)."""
        return realization_latex(self)

    def __repr__(self) -> str:
        kind = "exact " if self.exact else ""
        base = "" if self._sample_time is None else f", sample_time={self._sample_time}"
        head = (
            f"Realization({kind}n_states={self.n_states}, n_inputs={self.n_inputs}, n_outputs={self.n_outputs}{base})"
        )
        body = []
        for name, m in zip("ABCD", self):
            text = text_matrix(m)
            body.append(f"{name} = {text}" if m.size == 0 else f"{name} =\n{text}")
        return head + "\n" + "\n".join(body)


def _rebuild(
    a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray, info: Dict[str, Any], sample_time: Any = None
) -> Realization:
    return Realization._trusted(a, b, c, d, info, sample_time=sample_time)


def _time_base(value: Any) -> Any:
    """None, a positive float, or (kept exact) a positive Fraction."""
    if isinstance(value, Fraction):
        return tb.exact_sample_time(value)
    return tb.optional_sample_time(value)

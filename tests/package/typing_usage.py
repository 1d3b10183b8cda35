"""Everyday use of statewright's public API, written as a user would, for the type checker.

``tests/test_typing.py`` runs ``mypy --strict`` on this file (every call must type-check
against the package's annotations and stubs) and also runs it as a script (every call
must work). Not collected by pytest: the name does not start with ``test_``.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any, Dict, List, Mapping, Optional, Tuple

import numpy as np
import numpy.typing as npt

import statewright as sw

Array = npt.NDArray[Any]

FORMS = [
    "controllable_canonical",
    "observable_canonical",
    "controller",
    "observer",
    "controllability",
    "observability",
    "modal",
]


def realizations() -> List[sw.Realization]:
    """A conveyor drive's speed loop, in every canonical form, float and exact."""
    out = [sw.realize([1.0, 3.0], [1.0, 3.0, 2.0], form) for form in FORMS]
    out.append(sw.realize(["0.3", "1/7"], ["1", "0.9", "0.18"], "controller", exact=True))
    out.append(sw.realize([Fraction(1, 2), 4], [1, 5, 6], exact=True))
    out.append(sw.realize(np.array([2.5, 10.0]), np.array([1.0, 20.0])))
    return out


def inspect(r: sw.Realization) -> Tuple[int, int, int]:
    a: Array = r.a
    b: Array = r.b
    c: Array = r.c
    d: Array = r.d
    A, B, C, D = r
    first: Array = r[0]
    head: Tuple[Array, ...] = r[0:2]
    assert first is a and len(head) == 2 and A is a and B is b and C is c and D is d
    exact: bool = r.exact
    info: Mapping[str, Any] = r.info
    poles: Array = r.poles()
    num, den = r.transfer_function()
    at_one_point: Array = r.evaluate(1j)
    along_axis: Array = r.evaluate(1j * np.logspace(-1, 1, 5))
    at_listed_points: Array = r.evaluate([0.5j, 2.0])
    assert at_one_point.shape == (1, 1) and along_axis.shape == (5, 1, 1)
    assert at_listed_points.shape == (2, 1, 1) and num.shape[-1] == den.shape[0]
    assert isinstance(exact, bool) and isinstance(info, Mapping) and poles.ndim == 1
    same: sw.Realization = r.transform(np.eye(r.n_states, dtype=int).tolist())
    equal: bool = same == r
    assert equal
    text: str = repr(r)
    latex: str = r._repr_latex_()
    assert text and latex
    return r.n_states, r.n_inputs, r.n_outputs


def recovery(r: sw.Realization) -> float:
    num, den = sw.transfer_function(r.a, r.b, r.c, r.d)
    num2, den2, accuracy = sw.transfer_function(*r, return_accuracy=True)
    method: str = accuracy["method"]
    bound: float = accuracy["relative_error_bound"]
    coeffs, adjugates = sw.faddeev_leverrier(r.a)
    exact_coeffs: Array = sw.characteristic_polynomial([[1, 2], [3, 4]], exact=True)
    recursion: Array = sw.characteristic_polynomial(r.a, method="recursion")
    k: Array = sw.controllability_matrix(r.a, r.b)
    o: Array = sw.observability_matrix(r.a, r.c)
    assert method and adjugates.shape[0] == r.n_states and exact_coeffs.shape == (3,)
    assert np.allclose(num, num2) and np.allclose(den, den2) and np.allclose(coeffs, recursion)
    assert k.shape == o.T.shape
    return bound


def structure() -> Tuple[int, int]:
    a = np.diag([-1.0, -2.0, -3.0])
    b = np.array([[1.0], [1.0], [0.0]])
    c = np.array([[1.0, 0.0, 1.0]])
    stairs: sw.Staircase = sw.controllability_staircase(a, b, c)
    q: Array = stairs.transform
    assert np.allclose(q.T @ a @ q, stairs.a)
    blocks: List[int] = stairs.blocks
    rank: int = stairs.rank
    dual: sw.Staircase = sw.observability_staircase(a, None, c, tol=1e-12)
    controllable: bool = sw.is_controllable(a, b)
    observable: bool = sw.is_observable(a, c)
    parts: sw.Decomposition = sw.kalman_decomposition(a, b, c, [[0.0]])
    t: Array = parts.transform
    assert t.shape == (3, 3) and not controllable and not observable and dual.rank == 2
    sizes: Tuple[int, ...] = parts.sizes
    smallest: sw.Realization = sw.minimal_realization(a, b, c, [[0.0]])
    assert smallest.n_states == sizes[0] == 1 and sum(blocks) == rank
    r1 = sw.realize([1, 3], [1, 3, 2], "controllable_canonical")
    r2 = sw.realize([1, 3], [1, 3, 2], "controller")
    similar: Array = sw.similarity(r1, r2)
    return rank, int(similar.shape[0])


def batches() -> Tuple[int, ...]:
    nums = np.array([[1.0, 3.0], [0.5, 1.0]])
    dens = np.array([[1.0, 3.0, 2.0], [2.0, 1.0, 4.0]])
    A, B, C, D = sw.realize_batch(nums, dens, "controller")
    num, den = sw.transfer_function_batch(A, B, C, D)
    assert num.shape == (2, 1, 1, 3) and den.shape == (2, 3)
    return tuple(int(x) for x in A.shape)


def interop() -> None:
    import scipy.signal  # type: ignore[import-untyped, import-not-found, unused-ignore]
    import sympy  # type: ignore[import-untyped, import-not-found, unused-ignore]

    s = sympy.Symbol("s")
    r: sw.Realization = sw.realize_expression((s + 3) / (s**2 + 3 * s + 2), s)
    r_float: sw.Realization = sw.realize_expression(1 / (s + sympy.pi), s, "modal", exact=False)
    pair: sw.Realization = sw.realize_expression((sympy.Poly(s + 1, s), sympy.Poly(s**2 + 1, s)), s)
    A, B, C, D = r.to_sympy()
    assert A.shape == (2, 2) and r_float.n_states == 1 and pair.n_states == 2
    system = r.to_scipy()
    discrete = r.to_scipy(sample_time=0.01)
    back: sw.Realization = sw.from_scipy(system)
    from_transfer_function: sw.Realization = sw.from_scipy(scipy.signal.TransferFunction([1.0], [1.0, 2.0]), "observer")
    sample_time: Optional[float] = sw.from_scipy(discrete).info.get("sample_time")
    assert back.n_states == 2 and from_transfer_function.n_states == 1 and sample_time == 0.01


def errors() -> List[str]:
    messages: List[str] = []
    try:
        sw.realize([], [1.0])
    except sw.ModelError as exc:
        messages.append(str(exc))
    error: ValueError = sw.ModelError("den: an example")
    messages.append(str(error))
    return messages


def main() -> Dict[str, object]:
    shapes = [inspect(r) for r in realizations()]
    bounds = [recovery(r) for r in realizations() if not r.exact]
    interop()
    return {
        "shapes": shapes,
        "bounds": bounds,
        "structure": structure(),
        "batches": batches(),
        "errors": errors(),
        "version": sw.__version__,
    }


if __name__ == "__main__":
    print(main())

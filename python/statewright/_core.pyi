"""Type stubs for the compiled core (the PyO3 binding layer). Private: use the functions
re-exported by ``statewright``, which validate their input first."""

from typing import Any, Dict, List, Optional, Tuple, Union

import numpy as np
import numpy.typing as npt

_F64 = npt.NDArray[np.float64]
_Exact = Tuple[int, int, List[int], List[int]]

CERTIFIED_TOLERANCE: float

class ModelError(ValueError):
    """Bad input to a statewright routine, or a documented failure; the message names the argument."""

def realize_float(
    num: Union[_F64, List[float]], den: Union[_F64, List[float]], form: str
) -> Tuple[Tuple[_F64, _F64, _F64, _F64], Dict[str, float]]: ...
def realize_exact(num: _Exact, den: _Exact, form: str) -> Tuple[_Exact, _Exact, _Exact, _Exact]: ...
def realize_jordan_float(
    num: _F64, den: _F64, tol: Optional[float]
) -> Tuple[Tuple[_F64, _F64, _F64, _F64], Dict[str, Any]]: ...
def realize_jordan_exact(
    num: _Exact, den: _Exact
) -> Tuple[Tuple[_Exact, _Exact, _Exact, _Exact], List[Tuple[_Exact, int, List[_Exact]]]]: ...
def multivariable_form_float(
    model: Tuple[_F64, _F64, _F64, _F64], form: str, tol: Optional[float]
) -> Tuple[Tuple[_F64, _F64, _F64, _F64], Dict[str, Any]]: ...
def multivariable_form_exact(
    model: Tuple[_Exact, _Exact, _Exact, _Exact], form: str
) -> Tuple[Tuple[_Exact, _Exact, _Exact, _Exact], Dict[str, Any]]: ...
def faddeev_leverrier_float(
    a: _F64, method: str, with_adjugates: bool
) -> Tuple[_F64, _F64, Dict[str, Union[str, float, None]]]: ...
def faddeev_leverrier_exact(a: _Exact, with_adjugates: bool) -> Tuple[_Exact, List[_Exact]]: ...

# a model travels as one tuple (a, b, c, d)
_Model = Tuple[_F64, _F64, _F64, _F64]
_ExactModel = Tuple[_Exact, _Exact, _Exact, _Exact]

def transfer_function_float(model: _Model, method: str) -> Tuple[_F64, _F64, Dict[str, Union[str, float, None]]]: ...
def transfer_function_exact(model: _ExactModel) -> Tuple[_Exact, _Exact]: ...
def controllability_matrix_float(a: _F64, b: _F64) -> _F64: ...
def controllability_matrix_exact(a: _Exact, b: _Exact) -> _Exact: ...

_Quad = Tuple[_F64, _F64, _F64, _F64]
# (A, B, C or None, Q, blocks, rank, singular values per step, kept per step, tol,
#  threshold per step, backward error per step, split residual of A and of B)
_StaircaseOut = Tuple[
    _F64,
    _F64,
    Optional[_F64],
    _F64,
    List[int],
    int,
    List[_F64],
    List[int],
    float,
    List[float],
    List[float],
    List[float],
]

def controllability_staircase(a: _F64, b: _F64, c: Optional[_F64], tol: Optional[float]) -> _StaircaseOut: ...
def observability_staircase(a: _F64, b: Optional[_F64], c: _F64, tol: Optional[float]) -> _StaircaseOut: ...
def minimal_realization(
    model: _Model, tol: Optional[float]
) -> Tuple[_Quad, _StaircaseOut, _StaircaseOut, Tuple[float, float, float]]: ...
def kalman_decomposition(
    model: _Model, tol: Optional[float]
) -> Tuple[_Quad, _F64, List[int], float, float, Tuple[float, float, float, float], List[_StaircaseOut]]: ...
def similarity_transform(r1: _Model, r2: _Model, tol: Optional[float]) -> Tuple[_F64, List[float], float]: ...
def realize_batch(num: _F64, den: _F64, form: str) -> Tuple[_F64, _F64, _F64, _F64]: ...
def transfer_function_batch(a: _F64, b: _F64, c: _F64, d: _F64) -> Tuple[_F64, _F64]: ...
def characteristic_polynomial_hessenberg(a: _F64) -> Tuple[_F64, _F64]: ...
def transfer_function_hessenberg(model: _Model) -> Tuple[_F64, _F64, _F64, _F64]: ...
def transfer_function_batch_method(a: _F64, b: _F64, c: _F64, d: _F64, method: str) -> Tuple[_F64, _F64]: ...
def transfer_function_batch_hessenberg(a: _F64, b: _F64, c: _F64, d: _F64) -> Tuple[_F64, _F64, _F64, _F64]: ...
def realize_markov(
    markov: _F64, order: Optional[int], tol: Optional[float]
) -> Tuple[_Quad, _F64, int, float, Tuple[int, int]]: ...
def gramians(a: _F64, b: _F64, c: _F64, discrete: bool) -> Tuple[_F64, _F64, List[float]]: ...
def hankel_singular_values(a: _F64, b: _F64, c: _F64, discrete: bool) -> _F64: ...

# (A, B, C, D), all Hankel singular values, the returned model's own, [(figure, value)],
# the two factor residuals, the method name
def balanced_realization(
    model: _Model, order: Optional[int], discrete: bool
) -> Tuple[_Quad, _F64, _F64, List[Tuple[str, float]], List[float], str]: ...

# (A, B, C, D) and {"block_orders", "merge_tol", "denominator_residual"}
def realize_transfer_matrix_float(
    num: _F64, den: _F64, form: str, tol: Optional[float]
) -> Tuple[_Quad, Dict[str, Union[List[int], float]]]: ...

# num, den: one entry per row (p*m rows, row-major over (i, j))
def realize_transfer_matrix_exact(
    num: _Exact, den: _Exact, p: int, m: int, form: str
) -> Tuple[_Exact, _Exact, _Exact, _Exact]: ...

# time base: (A, B, C, D) read-only and the figures of the computation
def convert_time_base(
    model: _Model, sample_time: float, method: str, prewarp_frequency: Optional[float], forward: bool
) -> Tuple[_Quad, Dict[str, Any]]: ...
def zero_order_hold_plain(
    a: Any, b: Any, c: Any, d: Any, sample_time: Any, method: Any
) -> Optional[Tuple[_F64, _F64, _F64, _F64, Dict[str, Any]]]: ...
def convert_time_base_exact(
    model: Tuple[_Exact, _Exact, _Exact, _Exact], sample_time: Tuple[int, int], method: str, forward: bool
) -> Tuple[_Exact, _Exact, _Exact, _Exact]: ...
def frequency_response(
    model: _Model, frequencies: _F64, sample_time: Optional[float]
) -> npt.NDArray[np.complex128]: ...
def frequency_response_batch(
    models: _Quad, frequencies: _F64, sample_time: Optional[float]
) -> npt.NDArray[np.complex128]: ...
def to_continuous_batch(
    models: _Quad, sample_time: float, method: str, prewarp_frequency: Optional[float]
) -> Tuple[_Quad, _F64]: ...
def invariant_zeros(
    model: _Model, tol: Optional[float], transmission: bool
) -> Tuple[List[float], List[float], Dict[str, Any]]: ...
def normal_rank(model: _Model, tol: Optional[float]) -> int: ...
def dc_gain(model: _Model, discrete: bool) -> Tuple[_F64, float, float, bool]: ...
def zeros_poles_gain(num: _F64, den: _F64) -> Tuple[List[float], List[float], List[float], List[float], float]: ...
def realize_zeros_poles_gain(
    zeros_re: _F64, zeros_im: _F64, poles_re: _F64, poles_im: _F64, gain: float, form: str
) -> _Quad: ...
def invariant_zeros_batch(a: _F64, b: _F64, c: _F64, d: _F64, tol: Optional[float]) -> Tuple[_F64, _F64, List[int]]: ...

# parametric models, in the plain format of _base/symbolic.py: a polynomial is a list of
# (exponents, numerator, denominator) terms, an entry a (numerator, denominator) pair of
# polynomials, a matrix (rows, cols, entries row-major)
_PlainPoly = List[Tuple[Tuple[int, ...], int, int]]
_PlainEntry = Tuple[_PlainPoly, _PlainPoly]
_PlainMatrix = Tuple[int, int, List[_PlainEntry]]

def parametric_transfer_function(
    a: _PlainMatrix, b: _PlainMatrix, c: _PlainMatrix, d: _PlainMatrix
) -> Tuple[List[_PlainEntry], List[_PlainEntry]]: ...
def realize_parametric(
    num: List[_PlainEntry], den: List[_PlainEntry], form: str
) -> Tuple[_PlainMatrix, _PlainMatrix, _PlainMatrix, _PlainMatrix]: ...

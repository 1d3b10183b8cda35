"""Type stubs for the compiled core (the PyO3 binding layer). Private: use the functions
re-exported by ``statewright``, which validate their input first."""

from typing import Dict, List, Tuple, Union

import numpy as np
import numpy.typing as npt

_F64 = npt.NDArray[np.float64]
_Exact = Tuple[int, int, List[int], List[int]]

CERTIFIED_TOLERANCE: float

class ModelError(ValueError):
    """Bad input to a statewright routine, or a documented failure; the message names the argument."""

def realize_float(
    num: _F64, den: _F64, form: str
) -> Tuple[Tuple[_F64, _F64, _F64, _F64], Dict[str, float]]: ...
def realize_exact(num: _Exact, den: _Exact, form: str) -> Tuple[_Exact, _Exact, _Exact, _Exact]: ...
def faddeev_leverrier_float(
    a: _F64, method: str, with_adjugates: bool
) -> Tuple[_F64, _F64, Dict[str, Union[str, float]]]: ...
def faddeev_leverrier_exact(a: _Exact) -> Tuple[_Exact, List[_Exact]]: ...
def transfer_function_float(
    a: _F64, b: _F64, c: _F64, d: _F64, method: str
) -> Tuple[_F64, _F64, Dict[str, Union[str, float]]]: ...
def transfer_function_exact(a: _Exact, b: _Exact, c: _Exact, d: _Exact) -> Tuple[_Exact, _Exact]: ...
def controllability_matrix_float(a: _F64, b: _F64) -> _F64: ...
def controllability_matrix_exact(a: _Exact, b: _Exact) -> _Exact: ...

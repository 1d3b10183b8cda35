"""statewright: state-space realizations, transfer-function recovery and structure of
linear time-invariant models, with a Rust core.

>>> import statewright as sw
>>> r = sw.realize([1, 3], [1, 3, 2], "observable_canonical")
>>> r.n_states
2
"""

from ._core import ModelError
from ._objects import Realization
from ._api import (
    characteristic_polynomial,
    controllability_matrix,
    faddeev_leverrier,
    observability_matrix,
    realize,
    transfer_function,
)
from ._interop import from_scipy, realize_expression
from ._identify import balanced_realization, gramians, hankel_singular_values, realize_markov
from ._batch import realize_batch, transfer_function_batch
from ._transfer_matrix import realize_transfer_matrix
from ._structure import (
    Decomposition,
    Staircase,
    controllability_staircase,
    is_controllable,
    is_observable,
    kalman_decomposition,
    minimal_realization,
    observability_staircase,
    similarity,
)

__version__ = "0.1.0"

__all__ = [
    "ModelError",
    "Realization",
    "realize",
    "faddeev_leverrier",
    "characteristic_polynomial",
    "transfer_function",
    "controllability_matrix",
    "observability_matrix",
    "realize_transfer_matrix",
    "realize_batch",
    "transfer_function_batch",
    "Staircase",
    "Decomposition",
    "controllability_staircase",
    "observability_staircase",
    "is_controllable",
    "is_observable",
    "kalman_decomposition",
    "minimal_realization",
    "similarity",
    "realize_markov",
    "gramians",
    "hankel_singular_values",
    "balanced_realization",
    "realize_expression",
    "from_scipy",
]

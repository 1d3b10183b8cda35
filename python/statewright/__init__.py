"""statewright: state-space realizations, transfer-function recovery and structure of
linear time-invariant models, with a Rust core.

>>> import statewright as sw
>>> r = sw.realize([1.5, 6], [1, 2.4, 3.1, 1.2], "observable_canonical")
>>> r.n_states
3
"""

# Layers, bottom to top (tests/package/test_import_graph.py enforces them): _core and
# _base (validation, exact helpers, display), _compute (core calls on validated arrays),
# _results (result objects), _api (public functions), and this module's re-exports.
from ._api.batch import realize_batch, transfer_function_batch
from ._api.identify import balanced_realization, gramians, hankel_singular_values, realize_markov
from ._api.interop import from_scipy, realize_expression
from ._api.multivariable import multivariable_canonical_form
from ._api.parametric import parametric_transfer_function
from ._api.realize import realize
from ._api.recover import characteristic_polynomial, faddeev_leverrier, transfer_function
from ._api.structure import (
    Decomposition,
    Staircase,
    controllability_matrix,
    controllability_staircase,
    is_controllable,
    is_observable,
    kalman_decomposition,
    minimal_realization,
    observability_matrix,
    observability_staircase,
    similarity,
)
from ._api.time import (
    frequency_response,
    frequency_response_batch,
    to_continuous,
    to_continuous_batch,
    to_discrete,
)
from ._api.transfer_matrix import realize_transfer_matrix
from ._api.zeros import (
    dc_gain,
    invariant_zeros,
    invariant_zeros_batch,
    normal_rank,
    realize_zeros_poles_gain,
    transmission_zeros,
    zeros_poles_gain,
)
from ._core import ModelError
from ._results.realization import Realization

__version__ = "0.1.0"

__all__ = [
    "ModelError",
    "Realization",
    "realize",
    "multivariable_canonical_form",
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
    "to_discrete",
    "to_continuous",
    "frequency_response",
    "frequency_response_batch",
    "to_continuous_batch",
    "invariant_zeros",
    "transmission_zeros",
    "normal_rank",
    "dc_gain",
    "zeros_poles_gain",
    "realize_zeros_poles_gain",
    "invariant_zeros_batch",
    "parametric_transfer_function",
]

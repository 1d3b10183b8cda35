"""Public functions: realizations of SISO transfer functions in the canonical forms.
Each validates its input once (``_base.validate``), calls the Rust core and wraps the result."""

from __future__ import annotations

from typing import Any

from .. import _core
from .._base import validate as v
from .._results.realization import Realization

__all__ = ["realize", "FORMS"]

FORMS = (
    "controllable_canonical",
    "observable_canonical",
    "controller",
    "observer",
    "controllability",
    "observability",
    "modal",
)


def realize(num: Any, den: Any, form: str = "controllable_canonical", *, exact: bool = False) -> Realization:
    r"""State-space realization of a SISO transfer function in a canonical form.

    After leading zeros are dropped and the denominator is made monic,
    ``G(s) = (b_n s^n + ... + b_0) / (s^n + a_{n-1} s^{n-1} + ... + a_0)`` is split into
    the direct term ``D = [[b_n]]`` and the strictly proper part with numerator
    coefficients ``c_i = b_i - a_i b_n``; the form then places ``a`` and ``c`` (or the
    Markov parameters ``h_k = C A^{k-1} B``) as in the table below. Every form satisfies
    ``C (sI - A)^-1 B + D = num(s) / den(s)``.

    Parameters
    ----------
    num, den : (k,) array_like
        Coefficients, highest power first (s or z alike). ``deg num <= deg den``.
    form : str
        ``"controllable_canonical"`` (phase variables: ones on the superdiagonal, last row
        ``[-a_0, ..., -a_{n-1}]``, ``B = e_n``, ``C = [c_0, ..., c_{n-1}]``),
        ``"observable_canonical"`` (its transpose), ``"controller"`` (first row
        ``[-a_{n-1}, ..., -a_0]``, ones on the subdiagonal, ``B = e_1``,
        ``C = [c_{n-1}, ..., c_0]``), ``"observer"`` (its transpose), ``"controllability"``
        (controllability matrix the identity, ``C = [h_1, ..., h_n]``),
        ``"observability"`` (its transpose) or ``"modal"`` (real block diagonal of the
        poles, ``[[s, w], [-w, s]]`` per complex pair, by ascending real part; float only).
    exact : bool
        Compute in exact rational arithmetic: entries are ints, Fractions or decimal
        strings, results are object arrays of :class:`fractions.Fraction`.

    Returns
    -------
    Realization
        n states for ``deg den = n`` (0 states for a pure gain). For ``modal``,
        ``info["eigenvector_condition"]`` is the condition number the existence decision
        was made on and ``info["condition_limit"]`` the limit ``1/(n sqrt(eps))``.

    Raises
    ------
    ModelError
        Empty ``num`` or ``den``; zero ``den``; improper transfer function; NaN or
        infinity; unknown ``form``; ``modal`` with repeated (defective) poles or with
        ``exact=True``; a float in exact mode; an order above 4096 (1024 for ``modal``),
        refused before anything of that size is allocated.

    Notes
    -----
    The companion forms involve no rounding beyond the normalisation by the leading
    denominator coefficient. The modal form balances the companion matrix by powers of two
    and uses a real non-symmetric eigen-decomposition; see ``DEVELOPERS.md``.

    Examples
    --------
    >>> import numpy as np, statewright as sw
    >>> r = sw.realize([0.5, 4], [1, 1.2, 5], "observable_canonical")   # (0.5 s + 4) / (s^2 + 1.2 s + 5)
    >>> r.a
    array([[ 0. , -5. ],
           [ 1. , -1.2]])
    >>> bool(np.allclose(r.evaluate(1j), (0.5j + 4) / ((1j) ** 2 + 1.2j + 5)))
    True
    """
    form = v.check_option(form, "form", FORMS)
    if v.check_flag(exact, "exact"):
        n_in = v.exact_polynomial(num, "num")
        d_in = v.exact_polynomial(den, "den")
        ea, eb, ec, ed = _core.realize_exact(v.to_core(n_in), v.to_core(d_in), form)
        fa, fb, fc, fd = (v.fraction_array(x, (x[0], x[1])) for x in (ea, eb, ec, ed))
        return Realization._trusted(fa, fb, fc, fd)
    (a, b, c, d), info = _core.realize_float(
        v.float_polynomial(num, "num", check_finite=False), v.float_polynomial(den, "den", check_finite=False), form
    )
    return Realization._trusted(a, b, c, d, info, frozen=True)

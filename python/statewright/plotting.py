"""Plots of the analyses: pole and zero maps, frequency responses of an original model
against a reduced or minimal one, Hankel singular values with the chosen order, the error
bound of balanced truncation against the actual error, and fleet distributions of the
quantity each decision rested on.

Needs matplotlib (``pip install 'statewright[plot]'``); it is imported when a plot is
drawn, not when this module is imported. Every helper draws into a new figure (or into
the axes it is given), in the style :data:`STYLE` (labelled axes with units, a legend,
line styles that stay distinct in black-and-white print), and returns the figure.

Models are :class:`statewright.Realization` objects or ``(A, B, C, D)`` tuples. The time
base is the model's ``sample_time`` attribute where it has one, else the ``sample_time``
keyword (``None``: continuous time).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any, cast

import numpy as np

import statewright as _sw

__all__ = [
    "STYLE",
    "fleet_distribution_plot",
    "frequency_response_plot",
    "hankel_singular_value_plot",
    "pole_zero_map",
    "reduction_error_plot",
    "use_style",
]

_EXTRA_HINT = "pip install 'statewright[plot]'"

# Six colours that stay apart for the common colour-vision deficiencies and in grey scale,
# each paired with its own line style so that a black-and-white print keeps the curves apart.
_COLOURS = ["#1f3b73", "#c8553d", "#2a9d8f", "#b8860b", "#7b3f8c", "#4d4d4d"]
_LINESTYLES = ["-", "--", "-.", ":", (0, (5, 1, 1, 1, 1, 1)), (0, (1, 1))]
_MARKERS = ["x", "+", "1", "3", "4", "2"]

STYLE: dict[str, Any] = {
    "figure.figsize": (6.4, 4.0),
    "figure.dpi": 100,
    "savefig.dpi": 200,
    "savefig.bbox": "tight",
    "font.size": 10.0,
    "axes.titlesize": 11.0,
    "axes.titleweight": "bold",
    "axes.labelsize": 10.0,
    "legend.fontsize": 8.5,
    "legend.frameon": True,
    "legend.framealpha": 0.9,
    "legend.edgecolor": "0.8",
    "xtick.labelsize": 9.0,
    "ytick.labelsize": 9.0,
    "axes.grid": True,
    "axes.grid.which": "major",
    "grid.color": "0.88",
    "grid.linewidth": 0.6,
    "axes.spines.top": False,
    "axes.spines.right": False,
    "axes.axisbelow": True,
    "lines.linewidth": 1.6,
    "lines.markersize": 6.0,
    "image.cmap": "cividis",
}
"""matplotlib rc settings of the statewright plots (the colour and line-style cycle is set
by each helper). ``matplotlib.rc_context(STYLE)`` applies them to plots of your own."""


def _pyplot() -> Any:
    """matplotlib.pyplot, or an ImportError naming the extra that installs it."""
    try:
        import matplotlib.pyplot as plt
    except ImportError as exc:
        raise ImportError(f"statewright.plotting needs matplotlib: {_EXTRA_HINT} ({exc})") from None
    return plt


def _context() -> Any:
    import matplotlib as mpl
    from cycler import cycler

    rc = dict(STYLE)
    rc["axes.prop_cycle"] = cycler(color=_COLOURS) + cycler(linestyle=_LINESTYLES)
    return mpl.rc_context(cast(Any, rc))  # STYLE's keys are valid rc names


def use_style() -> None:
    """Apply :data:`STYLE` and the statewright colour and line-style cycle globally."""
    plt = _pyplot()
    from cycler import cycler

    plt.rcParams.update(STYLE)
    plt.rcParams["axes.prop_cycle"] = cycler(color=_COLOURS) + cycler(linestyle=_LINESTYLES)


# --------------------------------------------------------------------------------------
# input handling
# --------------------------------------------------------------------------------------


def _model(x: Any, name: str) -> _sw.Realization:
    if isinstance(x, _sw.Realization):
        return x
    if isinstance(x, (tuple, list)) and len(x) == 4:
        try:
            return _sw.Realization(*x)
        except _sw.ModelError as exc:
            raise _sw.ModelError(f"{name}: {exc}") from None
    raise _sw.ModelError(f"{name}: expected a Realization or an (A, B, C, D) tuple, found a {type(x).__name__}")


def _float_model(
    r: _sw.Realization,
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    a, b, c, d = (np.asarray(m, dtype=np.float64) for m in r)
    return a, b, c, d


def _positive(x: Any, name: str) -> float:
    try:
        value = float(x)
    except (TypeError, ValueError):
        raise _sw.ModelError(f"{name}: expected a positive number, found a {type(x).__name__}") from None
    if not (np.isfinite(value) and value > 0):
        raise _sw.ModelError(f"{name}: must be finite and > 0, found {value}")
    return value


def _time_base(models: Sequence[_sw.Realization], sample_time: Any) -> float | None:
    """The common sample time (None: continuous), from the keyword or the models' attribute."""
    if sample_time is not None:
        return _positive(sample_time, "sample_time")
    found = {getattr(r, "sample_time", None) for r in models}
    if len(found) > 1:
        raise _sw.ModelError(f"models: mixed time bases {sorted(found, key=str)}; compare models of one time base")
    value = found.pop() if found else None
    return None if value is None else _positive(value, "sample_time")


def _labels(labels: Sequence[str] | None, count: int, default: Sequence[str]) -> list[str]:
    if labels is None:
        return list(default)[:count] if count <= len(default) else [f"model {i + 1}" for i in range(count)]
    out = [str(x) for x in labels]
    if len(out) != count:
        raise _sw.ModelError(f"labels: expected {count} labels (one per model), found {len(out)}")
    return out


def _zeros_of(r: _sw.Realization) -> np.ndarray | None:
    """Finite invariant zeros where they can be had: statewright.invariant_zeros when the
    package has it, else (single input, single output) the roots of the recovered
    numerator C adj(sI - A) B + D det(sI - A), which are the invariant zeros of a SISO
    realization. None for a MIMO model without invariant_zeros."""
    finder = getattr(_sw, "invariant_zeros", None)
    if finder is not None:
        return np.asarray(finder(*_float_model(r)), dtype=complex)
    if r.n_inputs == 1 and r.n_outputs == 1:
        num, _ = _sw.transfer_function(*_float_model(r))
        coeffs = np.trim_zeros(np.asarray(num[0, 0], dtype=float), "f")
        return np.roots(coeffs).astype(complex) if coeffs.size else np.zeros(0, dtype=complex)
    return None


def _response(r: _sw.Realization, w: np.ndarray, sample_time: float | None) -> np.ndarray:
    """G(jw) (G(exp(jwT)) in discrete time) as a (k, p, m) complex array."""
    finder = getattr(_sw, "frequency_response", None)
    if finder is not None:
        return np.asarray(finder(*_float_model(r), w, sample_time=sample_time))
    points = 1j * w if sample_time is None else np.exp(1j * w * sample_time)
    # One complex solve of (sI - A) X = B per point (Realization.evaluate).
    return np.asarray(r.evaluate(points))


def _default_frequencies(models: Sequence[_sw.Realization], sample_time: float | None) -> np.ndarray:
    """A log grid a decade and a half around the poles' natural frequencies (to the Nyquist
    frequency pi/T in discrete time), 600 points."""
    mags: list[float] = []
    for r in models:
        p = r.poles()
        if sample_time is not None:
            p = np.log(p[p != 0]) / sample_time  # the continuous-time equivalents
        mags.extend(float(x) for x in np.abs(p) if x > 0 and np.isfinite(x))
    low = min(mags) / 30 if mags else 1e-2
    high = max(mags) * 30 if mags else 1e2
    if sample_time is not None:
        high = np.pi / sample_time
        low = min(low, high / 1e3)
    return np.logspace(np.floor(np.log10(low)), np.log10(high), 600)


def _frequencies(frequencies: Any, models: Sequence[_sw.Realization], sample_time: float | None) -> np.ndarray:
    if frequencies is None:
        return _default_frequencies(models, sample_time)
    try:
        w = np.asarray(frequencies, dtype=float).reshape(-1)
    except (TypeError, ValueError):
        raise _sw.ModelError("frequencies: expected a 1-D array of positive numbers (rad/s)") from None
    if w.size < 2 or not np.all(np.isfinite(w)) or np.any(w <= 0):
        raise _sw.ModelError("frequencies: expected at least two finite positive frequencies (rad/s)")
    return np.sort(w)


def _new_axes(ax: Any, **kw: Any) -> tuple[Any, Any]:
    """A new figure with one axes (pyplot-managed, so that a notebook shows it), or the
    figure of the axes given."""
    plt = _pyplot()
    if ax is None:
        fig, axes = plt.subplots(1, 1, **kw)
        return fig, axes
    return ax.figure, ax


def _finish(fig: Any, own: bool) -> None:
    if own:
        fig.tight_layout()


# --------------------------------------------------------------------------------------
# pole and zero map
# --------------------------------------------------------------------------------------


def pole_zero_map(
    *models: Any,
    labels: Sequence[str] | None = None,
    zeros: Any = "auto",
    sample_time: float | None = None,
    time_unit: str = "s",
    ax: Any = None,
    title: str | None = None,
) -> Any:
    """Poles (crosses) and finite zeros (circles) of one or more models in the complex plane.

    Parameters
    ----------
    *models : Realization or (A, B, C, D)
        One or more models; each gets its own colour and marker.
    labels : sequence of str, optional
        Legend names of the models.
    zeros : "auto", None or sequence of array_like, default "auto"
        ``"auto"``: the invariant zeros (see Notes); ``None``: poles only; otherwise one
        array of zeros per model.
    sample_time : float, optional
        Discrete time when positive (the unit circle is drawn); the models' own
        ``sample_time`` is used when they have one.
    time_unit : str, default "s"
        Unit of time for the axis labels (poles in 1/time_unit, rad/time_unit).
    ax : matplotlib Axes, optional
        Draw into these axes instead of a new figure.
    title : str, optional

    Returns
    -------
    matplotlib.figure.Figure

    Notes
    -----
    With ``zeros="auto"`` the zeros are ``statewright.invariant_zeros`` where the package
    has it; otherwise, for a single-input single-output model, the roots of the recovered
    numerator ``C adj(sI - A) B + D det(sI - A)``, which are the same numbers. A MIMO model
    without ``invariant_zeros`` is drawn with its poles only (its legend entry says so).
    A zero on a pole (a cancellation) shows as a circle around a cross.

    Examples
    --------
    >>> import matplotlib; matplotlib.use("Agg")
    >>> import statewright as sw
    >>> from statewright.plotting import pole_zero_map
    >>> fig = pole_zero_map(sw.realize([1.5, 6], [1, 2.4, 3.1, 1.2]))
    >>> [t.get_text() for t in fig.axes[0].get_legend().get_texts()]
    ['poles', 'zeros', 'imaginary axis']
    """
    if not models:
        raise _sw.ModelError("models: give at least one model")
    rs = [_model(m, f"models[{i}]") for i, m in enumerate(models)]
    dt = _time_base(rs, sample_time)
    names = _labels(labels, len(rs), [""] if len(rs) == 1 else [])
    if isinstance(zeros, str):
        if zeros != "auto":
            raise _sw.ModelError(f"zeros: expected 'auto', None or one array per model, found {zeros!r}")
        zero_sets = [_zeros_of(r) for r in rs]
    elif zeros is None:
        zero_sets = [np.zeros(0, dtype=complex)] * len(rs)
    else:
        if len(zeros) != len(rs):
            raise _sw.ModelError(f"zeros: expected one array per model ({len(rs)}), found {len(zeros)}")
        zero_sets = [np.asarray(z, dtype=complex).reshape(-1) for z in zeros]
    with _context():
        own = ax is None
        fig, ax = _new_axes(ax, figsize=(5.2, 4.6))
        everything: list[complex] = []
        for k, (r, z, name) in enumerate(zip(rs, zero_sets, names)):
            colour = _COLOURS[k % len(_COLOURS)]
            p = r.poles()
            everything.extend(p)
            prefix = f"{name}: " if name else ""
            ax.plot(
                p.real,
                p.imag,
                ls="none",
                marker=_MARKERS[k % len(_MARKERS)],
                ms=9,
                mew=1.8,
                color=colour,
                label=f"{prefix}poles",
            )
            if z is None:
                ax.plot(
                    [],
                    [],
                    ls="none",
                    marker="o",
                    mfc="none",
                    color=colour,
                    label=f"{prefix}zeros not computed (MIMO)",
                )
            elif zeros is not None:
                everything.extend(z)
                ax.plot(
                    z.real,
                    z.imag,
                    ls="none",
                    marker="o",
                    ms=9,
                    mfc="none",
                    mew=1.6,
                    color=colour,
                    label=f"{prefix}zeros",
                )
        if dt is not None:
            t = np.linspace(0, 2 * np.pi, 400)
            ax.plot(np.cos(t), np.sin(t), color="0.45", lw=1.0, ls="--", label="unit circle")
            ax.set_aspect("equal", adjustable="datalim")
            ax.set_xlabel("real part (z-plane)")
            ax.set_ylabel("imaginary part (z-plane)")
        else:
            ax.axvline(0.0, color="0.45", lw=1.0, ls="--", label="imaginary axis")
            ax.set_xlabel(f"real part [1/{time_unit}]")
            ax.set_ylabel(f"imaginary part [rad/{time_unit}]")
        ax.axhline(0.0, color="0.7", lw=0.6)
        pts = np.asarray(everything, dtype=complex)
        if pts.size:
            span = max(float(np.max(np.abs(pts))), 1e-300)
            if dt is None:
                pad = 0.1 * span
                ax.set_xlim(
                    min(float(pts.real.min()), 0.0) - pad,
                    max(float(pts.real.max()), 0.0) + pad,
                )
        base = "pole and zero map" if zeros is not None else "pole map"
        where = f", sample time {dt:g} {time_unit}" if dt is not None else ""
        ax.set_title(title if title is not None else base + where)
        ax.legend(loc="best")
        _finish(fig, own)
    return fig


# --------------------------------------------------------------------------------------
# frequency response
# --------------------------------------------------------------------------------------


def frequency_response_plot(
    *models: Any,
    labels: Sequence[str] | None = None,
    frequencies: Any = None,
    sample_time: float | None = None,
    frequency_unit: str = "rad/s",
    gain_unit: str = "output/input",
    title: str | None = None,
) -> Any:
    """Frequency responses of models of the same size, one over the other.

    Single input, single output: magnitude in dB and phase in degrees. Several inputs or
    outputs: the singular values of G(jw) in dB (the largest is the gain in the worst
    input direction).

    Parameters
    ----------
    *models : Realization or (A, B, C, D)
        Typically the original model first, then a reduced or minimal one.
    labels : sequence of str, optional
        Legend names (default "original", "reduced", ...).
    frequencies : array_like, optional
        Angular frequencies in rad per time unit, positive. Default: 600 points on a log
        grid a decade and a half around the poles (to the Nyquist frequency pi/T in discrete time).
    sample_time : float, optional
        Discrete time when positive: G(exp(jwT)) is drawn up to pi/T.
    frequency_unit : str, default "rad/s"
    gain_unit : str, default "output/input"
        Unit of the gain, for the magnitude label (shown as ``dB re 1 <gain_unit>``).
    title : str, optional

    Returns
    -------
    matplotlib.figure.Figure
        Two axes (magnitude, phase) for SISO models, one for MIMO models.

    Notes
    -----
    The response is ``statewright.frequency_response`` where the package has it,
    otherwise one complex solve of ``(sI - A) X = B`` per frequency
    (:meth:`Realization.evaluate`), never through the transfer-function coefficients.
    The phase is unwrapped along the frequency axis.

    Examples
    --------
    >>> import matplotlib; matplotlib.use("Agg")
    >>> import statewright as sw
    >>> from statewright.plotting import frequency_response_plot
    >>> full = sw.realize([1.5, 6], [1, 2.4, 3.1, 1.2])
    >>> fig = frequency_response_plot(full, full.minimal_realization(), labels=["full", "minimal"])
    >>> len(fig.axes), fig.axes[0].get_ylabel()
    (2, 'magnitude [dB re 1 output/input]')
    """
    if not models:
        raise _sw.ModelError("models: give at least one model")
    rs = [_model(m, f"models[{i}]") for i, m in enumerate(models)]
    shapes = {(r.n_outputs, r.n_inputs) for r in rs}
    if len(shapes) > 1:
        raise _sw.ModelError(f"models: the models differ in their numbers of outputs and inputs {sorted(shapes)}")
    dt = _time_base(rs, sample_time)
    w = _frequencies(frequencies, rs, dt)
    names = _labels(labels, len(rs), ["original", "reduced"] if len(rs) == 2 else ["model"])
    siso = shapes.pop() == (1, 1)
    with _context():
        plt = _pyplot()
        if siso:
            fig, (ax_mag, ax_ph) = plt.subplots(2, 1, sharex=True, figsize=(6.4, 5.0))
        else:
            fig, ax_mag = plt.subplots(1, 1, figsize=(6.4, 4.0))
            ax_ph = None
        for k, (r, name) in enumerate(zip(rs, names)):
            g = _response(r, w, dt)
            style = {
                "color": _COLOURS[k % len(_COLOURS)],
                "ls": _LINESTYLES[k % len(_LINESTYLES)],
            }
            if siso:
                h = g[:, 0, 0]
                with np.errstate(divide="ignore"):
                    mag = 20 * np.log10(np.abs(h))
                ax_mag.semilogx(w, mag, label=name, **style)
                ax_ph.semilogx(w, np.degrees(np.unwrap(np.angle(h))), label=name, **style)
            else:
                sv = np.linalg.svd(g, compute_uv=False)
                with np.errstate(divide="ignore"):
                    db = 20 * np.log10(sv)
                for j in range(db.shape[1]):
                    ax_mag.semilogx(w, db[:, j], label=name if j == 0 else None, **style)
        if dt is not None:
            for ax in (ax_mag, ax_ph):
                if ax is not None:
                    ax.axvline(np.pi / dt, color="0.45", lw=1.0, ls=":")
            ax_mag.plot(
                [],
                [],
                color="0.45",
                lw=1.0,
                ls=":",
                label=f"Nyquist frequency pi/T (T = {dt:g})",
            )
        ax_mag.set_ylabel(f"magnitude [dB re 1 {gain_unit}]" if siso else f"singular values [dB re 1 {gain_unit}]")
        bottom = ax_ph if siso else ax_mag
        bottom.set_xlabel(f"frequency [{frequency_unit}]")
        if siso:
            ax_ph.set_ylabel("phase [deg]")
        ax_mag.legend(loc="best")
        kind = "frequency response" if siso else "singular values of the frequency response"
        ax_mag.set_title(title if title is not None else kind)
        fig.tight_layout()
    return fig


# --------------------------------------------------------------------------------------
# Hankel singular values and reduction
# --------------------------------------------------------------------------------------


def _hankel_data(values: Any, order: Any, error_bound: Any) -> tuple[np.ndarray, int | None, float | None]:
    if isinstance(values, _sw.Realization):
        info = values.info
        if "hankel_singular_values" not in info:
            raise _sw.ModelError(
                "values: this Realization has no info['hankel_singular_values'] (pass the result of "
                "balanced_realization, or the values themselves)"
            )
        if order is None:
            order = values.n_states
        if error_bound is None:
            error_bound = info.get("error_bound")
        values = info["hankel_singular_values"]
    try:
        hsv = np.asarray(values, dtype=float).reshape(-1)
    except (TypeError, ValueError):
        raise _sw.ModelError("values: expected a 1-D array of Hankel singular values") from None
    if hsv.size == 0 or not np.all(np.isfinite(hsv)) or np.any(hsv < 0):
        raise _sw.ModelError("values: expected at least one finite nonnegative Hankel singular value")
    if order is not None:
        if isinstance(order, bool) or not isinstance(order, (int, np.integer)) or not 0 <= int(order) <= hsv.size:
            raise _sw.ModelError(f"order: expected an integer from 0 to {hsv.size}, found {order!r}")
        order = int(order)
    bound = None if error_bound is None else float(error_bound)
    return hsv, order, bound


def hankel_singular_value_plot(
    values: Any,
    *,
    order: int | None = None,
    error_bound: float | None = None,
    gain_unit: str = "output/input",
    ax: Any = None,
    title: str | None = None,
) -> Any:
    """Hankel singular values on a log scale, with the chosen order and the error bound.

    Parameters
    ----------
    values : array_like or Realization
        Hankel singular values, descending, or a result of
        :func:`statewright.balanced_realization` (its ``info`` gives the values and the
        bound, its size the order).
    order : int, optional
        The number of states kept; the discarded values are drawn hollow and the cut as a
        vertical line.
    error_bound : float, optional
        Default, when ``order`` is given: twice the sum of the discarded values (the bound
        of balanced truncation on the largest gain of the error over all frequencies).
    gain_unit : str, default "output/input"
    ax : matplotlib Axes, optional
    title : str, optional

    Returns
    -------
    matplotlib.figure.Figure

    Notes
    -----
    Values that are zero (a mode that is exactly uncontrollable or unobservable) cannot
    be drawn on a log scale; they are drawn at the bottom of the axes as triangles.

    Examples
    --------
    >>> import matplotlib; matplotlib.use("Agg")
    >>> from statewright.plotting import hankel_singular_value_plot
    >>> fig = hankel_singular_value_plot([3.0, 1.0, 0.02, 0.001], order=2)
    >>> fig.axes[0].get_yscale()
    'log'
    """
    hsv, order, bound = _hankel_data(values, order, error_bound)
    if order is not None and bound is None:
        bound = 2.0 * float(np.sum(hsv[order:]))
    idx = np.arange(1, hsv.size + 1)
    positive = hsv > 0
    floor = float(hsv[positive].min()) / 10 if positive.any() else 1e-16
    with _context():
        own = ax is None
        fig, ax = _new_axes(ax, figsize=(6.0, 4.0))
        kept = positive & ((idx <= order) if order is not None else True)
        dropped = positive & ((idx > order) if order is not None else False)
        ax.semilogy(
            idx[kept],
            hsv[kept],
            ls="none",
            marker="o",
            color=_COLOURS[0],
            label="kept" if order is not None else "Hankel singular values",
        )
        if dropped.any():
            ax.semilogy(
                idx[dropped],
                hsv[dropped],
                ls="none",
                marker="o",
                mfc="none",
                mew=1.5,
                color=_COLOURS[1],
                label="discarded",
            )
        if (~positive).any():
            ax.semilogy(
                idx[~positive],
                np.full(int((~positive).sum()), floor),
                ls="none",
                marker="v",
                color=_COLOURS[5],
                label="exactly zero",
            )
        if order is not None:
            ax.axvline(
                order + 0.5,
                color=_COLOURS[3],
                ls="--",
                lw=1.2,
                label=f"chosen order {order}",
            )
        if bound is not None and bound > 0:
            ax.axhline(
                bound,
                color=_COLOURS[2],
                ls="-.",
                lw=1.2,
                label=rf"error bound $2\sum_{{i>r}}\sigma_i$ = {bound:.3g}",
            )
        ax.set_xlabel("index i")
        ax.set_ylabel(f"Hankel singular value [{gain_unit}]")
        ax.set_xticks(idx if idx.size <= 20 else idx[:: max(1, idx.size // 10)])
        ax.set_title(title if title is not None else "Hankel singular values")
        ax.legend(loc="best")
        _finish(fig, own)
    return fig


def reduction_error_plot(
    model: Any,
    *,
    orders: Sequence[int] | None = None,
    frequencies: Any = None,
    sample_time: float | None = None,
    gain_unit: str = "output/input",
    ax: Any = None,
    title: str | None = None,
) -> Any:
    r"""The a-priori error bound of balanced truncation against the actual error, over the order.

    For each order r the model is balanced and truncated to r states
    (:func:`statewright.balanced_realization`); drawn are the bound 2 (s_(r+1) + ... + s_n),
    the actual error max_w ||G(jw) - G_r(jw)||_2 on the frequency grid, and the lower
    bound s_(r+1) that no reduction to r states can beat.

    Parameters
    ----------
    model : Realization or (A, B, C, D)
        A stable model.
    orders : sequence of int, optional
        Default 1 .. n - 1.
    frequencies : array_like, optional
        The grid the actual error is measured on (see :func:`frequency_response_plot`).
    sample_time : float, optional
        Discrete time when positive (Stein equations, the unit circle).
    gain_unit : str, default "output/input"
    ax : matplotlib Axes, optional
    title : str, optional

    Returns
    -------
    matplotlib.figure.Figure
        Lines labelled "error bound", "actual error (grid maximum)" and
        "lower bound $\sigma_{r+1}$", in that order.

    Notes
    -----
    The grid maximum is a lower estimate of the largest gain of the error over all
    frequencies, so on a coarse grid it can fall below s_(r+1); the default grid is dense
    around the poles.

    Examples
    --------
    >>> import matplotlib; matplotlib.use("Agg")
    >>> import statewright as sw
    >>> from statewright.plotting import reduction_error_plot
    >>> fig = reduction_error_plot(sw.realize([1.5, 6], [1, 2.4, 3.1, 1.2], "modal"))
    >>> [line.get_label() for line in fig.axes[0].get_lines()][:2]
    ['error bound', 'actual error (grid maximum)']
    """
    r = _model(model, "model")
    dt = _time_base([r], sample_time)
    n = r.n_states
    if n < 2:
        raise _sw.ModelError(f"model: needs at least 2 states to compare reduced orders, found {n}")
    if orders is None:
        order_list = list(range(1, n))
    else:
        order_list = []
        for k in orders:
            if isinstance(k, bool) or not isinstance(k, (int, np.integer)) or not 0 <= int(k) < n:
                raise _sw.ModelError(f"orders: expected integers from 0 to {n - 1}, found {k!r}")
            order_list.append(int(k))
        if not order_list:
            raise _sw.ModelError("orders: give at least one order")
    w = _frequencies(frequencies, [r], dt)
    a, b, c, d = _float_model(r)
    discrete = dt is not None
    hsv = np.asarray(_sw.hankel_singular_values(a, b, c, discrete=discrete))
    full = _response(r, w, dt)
    bounds, actual = [], []
    for k in order_list:
        red = _sw.balanced_realization(a, b, c, d, order=k, discrete=discrete)
        bounds.append(float(red.info["error_bound"]))
        diff = full - _response(red, w, dt)
        actual.append(float(np.max(np.linalg.norm(diff, ord=2, axis=(1, 2)))))
    ks = np.asarray(order_list)
    floor = hsv[ks]
    with _context():
        own = ax is None
        fig, ax = _new_axes(ax, figsize=(6.0, 4.0))
        ax.semilogy(ks, bounds, marker="s", color=_COLOURS[1], ls="--", label="error bound")
        ax.semilogy(
            ks,
            np.maximum(actual, np.finfo(float).tiny),
            marker="o",
            color=_COLOURS[0],
            ls="-",
            label="actual error (grid maximum)",
        )
        ax.semilogy(
            ks,
            np.maximum(floor, np.finfo(float).tiny),
            marker="^",
            color=_COLOURS[2],
            ls=":",
            label=r"lower bound $\sigma_{r+1}$",
        )
        ax.set_xlabel("order r of the truncated model [states]")
        ax.set_ylabel(f"largest gain of the error [{gain_unit}]")
        ax.set_xticks(ks if ks.size <= 20 else ks[:: max(1, ks.size // 10)])
        ax.set_title(title if title is not None else "balanced truncation: bound and actual error")
        ax.legend(loc="best")
        _finish(fig, own)
    return fig


# --------------------------------------------------------------------------------------
# fleets
# --------------------------------------------------------------------------------------


def fleet_distribution_plot(
    values: Any,
    *,
    threshold: float | None = None,
    groups: Any = None,
    group_labels: dict[Any, str] | None = None,
    quantity: str = "decision statistic",
    unit: str = "1",
    bins: int = 40,
    log: bool = True,
    ax: Any = None,
    title: str | None = None,
) -> Any:
    """Histogram over a fleet of the quantity each model's decision rested on.

    For example the singular value a rank decision compared with its tolerance, one per
    model: values near the threshold are the decisions a small change of data or
    tolerance would flip.

    Parameters
    ----------
    values : (N,) array_like
        One nonnegative number per model.
    threshold : float, optional
        The tolerance the decisions compared the values with (a vertical line).
    groups : (N,) array_like, optional
        A label per model (for example what was decided, or how the model was made); one
        stacked histogram per distinct label.
    group_labels : dict, optional
        Legend text per group label.
    quantity : str, default "decision statistic"
    unit : str, default "1"
        Unit of the values, for the axis label.
    bins : int, default 40
    log : bool, default True
        A log axis for the values (zeros are counted in the lowest bin and reported in the
        legend).
    ax : matplotlib Axes, optional
    title : str, optional

    Returns
    -------
    matplotlib.figure.Figure

    Examples
    --------
    >>> import matplotlib; matplotlib.use("Agg")
    >>> import numpy as np
    >>> from statewright.plotting import fleet_distribution_plot
    >>> v = np.logspace(-12, 0, 50)
    >>> fig = fleet_distribution_plot(v, threshold=1e-8, groups=v > 1e-8)
    >>> fig.axes[0].get_xscale()
    'log'
    """
    try:
        x = np.asarray(values, dtype=float).reshape(-1)
    except (TypeError, ValueError):
        raise _sw.ModelError("values: expected a 1-D array of numbers, one per model") from None
    if x.size == 0 or not np.all(np.isfinite(x)):
        raise _sw.ModelError("values: expected at least one value, all finite")
    if log and np.any(x < 0):
        raise _sw.ModelError("values: a log axis needs nonnegative values (pass log=False)")
    if isinstance(bins, bool) or not isinstance(bins, (int, np.integer)) or bins < 1:
        raise _sw.ModelError(f"bins: expected a positive integer, found {bins!r}")
    if groups is None:
        g = np.zeros(x.size, dtype=int)
        names: dict[Any, str] = {0: f"{x.size} models"}
    else:
        g = np.asarray(groups).reshape(-1)
        if g.size != x.size:
            raise _sw.ModelError(f"groups: expected one label per value ({x.size}), found {g.size}")
        names = {}
    keys = list(dict.fromkeys(g.tolist()))
    if groups is not None:
        for key in keys:
            text = (group_labels or {}).get(key, str(key))
            names[key] = f"{text} ({int(np.sum(g == key))})"
    zero_count = int(np.sum(x == 0)) if log else 0
    thr = None if threshold is None else float(threshold)
    if log:
        pos = x[x > 0]
        lo = float(pos.min()) if pos.size else 1e-16
        hi = float(pos.max()) if pos.size else 1.0
        if thr is not None and thr > 0:
            lo, hi = min(lo, thr), max(hi, thr)
        lo, hi = lo / 2, hi * 2
        edges = np.logspace(np.log10(lo), np.log10(hi), bins + 1)
        shown = np.where(x > 0, x, edges[0] * 1.0001)
    else:
        edges = np.histogram_bin_edges(x, bins=bins)
        shown = x
    with _context():
        own = ax is None
        fig, ax = _new_axes(ax, figsize=(6.4, 4.0))
        data = [shown[g == key] for key in keys]
        colours = [_COLOURS[i % len(_COLOURS)] for i in range(len(keys))]
        hatches = ["", "//", "..", "\\\\", "xx", "--"]
        _, _, patches = ax.hist(
            data,
            bins=edges,
            stacked=True,
            color=colours,
            label=[names[k] for k in keys],
            edgecolor="white",
            linewidth=0.5,
        )
        for i, group in enumerate(patches if len(keys) > 1 else [patches]):
            for patch in group:
                patch.set_hatch(hatches[i % len(hatches)])
        if log:
            ax.set_xscale("log")
        if thr is not None:
            ax.axvline(thr, color="black", ls="--", lw=1.2, label=f"threshold {thr:.3g}")
        if zero_count:
            ax.plot([], [], ls="none", label=f"{zero_count} exactly zero (lowest bin)")
        ax.set_xlabel(f"{quantity} [{unit}]")
        ax.set_ylabel("models [count]")
        ax.set_title(title if title is not None else f"fleet distribution of the {quantity}")
        ax.legend(loc="best")
        _finish(fig, own)
    return fig

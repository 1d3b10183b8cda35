"""The plot helpers of statewright.plotting: each renders (Agg backend) a figure with the
expected artists, and the data drawn agree with outside references: numpy's eigenvalues
and polynomial roots, SciPy's frequency responses and Lyapunov solvers, and identities of
balanced truncation (Glover 1984: sigma_(r+1) <= ||G - G_r||_inf <= 2 (sigma_(r+1) + ... +
sigma_n))."""

import doctest
import io
import sys

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt
import numpy as np
import pytest
import scipy.linalg
import scipy.signal

import statewright as sw
from statewright import plotting

# Invented demo models: a third-order SISO positioning loop (poles -0.59, -0.90 +- 1.10j,
# zero -4) and a two-input, two-output mixing process with four stable modes.
NUM, DEN = [1.5, 6.0], [1.0, 2.4, 3.1, 1.2]
A2 = np.array(
    [
        [-0.6, 0.3, 0.0, 0.1],
        [-0.2, -1.1, 0.4, 0.0],
        [0.0, -0.5, -2.0, 0.3],
        [0.1, 0.0, -0.2, -3.5],
    ]
)
B2 = np.array([[1.0, 0.0], [0.5, 0.2], [0.0, 1.0], [0.3, -0.4]])
C2 = np.array([[1.0, 0.0, 0.5, 0.0], [0.0, 0.7, 0.0, 1.0]])
D2 = np.zeros((2, 2))


@pytest.fixture(autouse=True)
def _close_figures():
    yield
    plt.close("all")


def rendered_png(fig) -> bytes:
    buf = io.BytesIO()
    fig.savefig(buf, format="png")
    data = buf.getvalue()
    assert data[:8] == b"\x89PNG\r\n\x1a\n" and len(data) > 5000  # a real picture
    return data


def legend_texts(ax):
    return [t.get_text() for t in ax.get_legend().get_texts()]


def line(ax, label):
    found = [ln for ln in ax.get_lines() if ln.get_label() == label]
    assert len(found) == 1, f"one line labelled {label!r}, found {[ln.get_label() for ln in ax.get_lines()]}"
    return found[0]


def sorted_complex(z):
    z = np.asarray(z, dtype=complex)
    return z[np.lexsort((z.imag, z.real))]


# --------------------------------------------------------------------------------------
# pole and zero map
# --------------------------------------------------------------------------------------


def test_pole_zero_map_siso_against_numpy_roots():
    r = sw.realize(NUM, DEN)
    fig = plotting.pole_zero_map(r)
    ax = fig.axes[0]
    poles = line(ax, "poles")
    zeros = line(ax, "zeros")
    drawn_p = sorted_complex(poles.get_xdata() + 1j * poles.get_ydata())
    drawn_z = sorted_complex(zeros.get_xdata() + 1j * zeros.get_ydata())
    # numpy.roots of the denominator and numerator (outside reference)
    np.testing.assert_allclose(drawn_p, sorted_complex(np.roots(DEN)), rtol=1e-10)
    np.testing.assert_allclose(drawn_z, sorted_complex(np.roots(NUM)), rtol=1e-10)
    assert ax.get_xlabel() == "real part [1/s]" and ax.get_ylabel() == "imaginary part [rad/s]"
    assert legend_texts(ax) == ["poles", "zeros", "imaginary axis"]
    rendered_png(fig)


def test_pole_zero_map_discrete_draws_the_unit_circle():
    rng = np.random.default_rng(3)
    a = np.diag([0.9, 0.5, -0.3])
    b, c = rng.standard_normal((3, 1)), rng.standard_normal((1, 3))
    fig = plotting.pole_zero_map((a, b, c, np.zeros((1, 1))), sample_time=0.1, time_unit="s")
    ax = fig.axes[0]
    circle = line(ax, "unit circle")
    radius = np.hypot(circle.get_xdata(), circle.get_ydata())
    np.testing.assert_allclose(radius, 1.0, rtol=1e-12)  # (identity)
    poles = line(ax, "poles")
    np.testing.assert_allclose(np.sort(poles.get_xdata()), [-0.3, 0.5, 0.9])  # the diagonal (identity)
    assert "z-plane" in ax.get_xlabel() and "sample time 0.1 s" in ax.get_title()
    rendered_png(fig)


def test_pole_zero_map_several_models_and_mimo():
    full = sw.Realization(A2, B2, C2, D2)
    fig = plotting.pole_zero_map(full, sw.realize(NUM, DEN), labels=["mixer", "loop"], zeros=None)
    ax = fig.axes[0]
    mixer = line(ax, "mixer: poles")
    np.testing.assert_allclose(
        sorted_complex(mixer.get_xdata() + 1j * mixer.get_ydata()),
        sorted_complex(np.linalg.eigvals(A2)),  # numpy eigenvalues (outside reference)
        rtol=1e-10,
    )
    assert "pole map" in ax.get_title()
    assert not any("zeros" in t for t in legend_texts(ax))


def test_pole_zero_map_refuses_bad_input():
    with pytest.raises(sw.ModelError, match="models"):
        plotting.pole_zero_map()
    with pytest.raises(sw.ModelError, match=r"models\[0\]"):
        plotting.pole_zero_map("not a model")
    with pytest.raises(sw.ModelError, match="labels"):
        plotting.pole_zero_map(sw.realize(NUM, DEN), labels=["a", "b"])
    with pytest.raises(sw.ModelError, match="sample_time"):
        plotting.pole_zero_map(sw.realize(NUM, DEN), sample_time=-1.0)
    with pytest.raises(sw.ModelError, match="zeros"):
        plotting.pole_zero_map(sw.realize(NUM, DEN), zeros="some")


# --------------------------------------------------------------------------------------
# frequency response
# --------------------------------------------------------------------------------------


def test_frequency_response_siso_against_scipy():
    r = sw.realize(NUM, DEN, "controller")
    w = np.logspace(-2, 2, 300)
    fig = plotting.frequency_response_plot(
        r, sw.realize(NUM, DEN, "modal"), labels=["controller", "modal"], frequencies=w
    )
    ax_mag, ax_ph = fig.axes
    _, h = scipy.signal.freqresp(scipy.signal.TransferFunction(NUM, DEN), w)  # SciPy (outside reference)
    for name in ("controller", "modal"):
        mag = line(ax_mag, name)
        np.testing.assert_allclose(mag.get_xdata(), w)
        np.testing.assert_allclose(mag.get_ydata(), 20 * np.log10(np.abs(h)), atol=1e-9)
        phase = line(ax_ph, name).get_ydata()
        np.testing.assert_allclose(phase, np.degrees(np.unwrap(np.angle(h))), atol=1e-7)
    assert ax_mag.get_xscale() == "log" and ax_ph.get_xlabel() == "frequency [rad/s]"
    assert ax_ph.get_ylabel() == "phase [deg]"
    assert legend_texts(ax_mag) == ["controller", "modal"]
    rendered_png(fig)


@pytest.mark.filterwarnings("ignore::scipy.signal.BadCoefficients")
def test_frequency_response_mimo_singular_values_against_scipy():
    w = np.logspace(-2, 1.5, 120)
    full = sw.Realization(A2, B2, C2, D2)
    fig = plotting.frequency_response_plot(full, frequencies=w, labels=["mixer"])
    (ax,) = fig.axes
    # SciPy's SISO responses per channel, assembled and decomposed by numpy's SVD.
    g = np.empty((w.size, 2, 2), dtype=complex)
    for i in range(2):
        for j in range(2):
            sys_ij = scipy.signal.StateSpace(A2, B2[:, [j]], C2[[i]], D2[[i]][:, [j]])
            g[:, i, j] = scipy.signal.freqresp(sys_ij, w)[1]
    sv = np.linalg.svd(g, compute_uv=False)
    curves = [ln.get_ydata() for ln in ax.get_lines() if ln.get_xdata().size == w.size]
    assert len(curves) == 2  # one curve per singular value
    np.testing.assert_allclose(np.vstack(curves).T, 20 * np.log10(sv), atol=1e-9)
    assert ax.get_ylabel().startswith("singular values [dB")
    assert legend_texts(ax) == ["mixer"]
    rendered_png(fig)


def test_frequency_response_discrete_against_scipy():
    a = np.array([[0.8, 0.2], [0.0, 0.5]])
    b, c, d = np.array([[0.0], [1.0]]), np.array([[1.0, 0.0]]), np.array([[0.1]])
    dt = 0.5
    w = np.linspace(0.01, np.pi / dt, 200)
    fig = plotting.frequency_response_plot((a, b, c, d), frequencies=w, sample_time=dt)
    ax_mag = fig.axes[0]
    _, h = scipy.signal.dfreqresp(scipy.signal.StateSpace(a, b, c, d, dt=dt), w * dt)  # SciPy, w in rad/sample
    np.testing.assert_allclose(line(ax_mag, "model").get_ydata(), 20 * np.log10(np.abs(h)), atol=1e-9)
    assert any("Nyquist" in t for t in legend_texts(ax_mag))


def test_frequency_response_refuses_bad_input():
    with pytest.raises(sw.ModelError, match="models"):
        plotting.frequency_response_plot(sw.realize(NUM, DEN), sw.Realization(A2, B2, C2, D2))
    with pytest.raises(sw.ModelError, match="frequencies"):
        plotting.frequency_response_plot(sw.realize(NUM, DEN), frequencies=[1.0, -2.0])
    with pytest.raises(sw.ModelError, match="frequencies"):
        plotting.frequency_response_plot(sw.realize(NUM, DEN), frequencies=[np.nan, 1.0])


# --------------------------------------------------------------------------------------
# Hankel singular values and reduction error
# --------------------------------------------------------------------------------------


def scipy_hankel_singular_values(a, b, c):
    """sqrt(eig(Wc Wo)) from SciPy's Lyapunov solver (outside reference)."""
    wc = scipy.linalg.solve_continuous_lyapunov(a, -b @ b.T)
    wo = scipy.linalg.solve_continuous_lyapunov(a.T, -c.T @ c)
    return np.sort(np.sqrt(np.abs(np.linalg.eigvals(wc @ wo))))[::-1]


def test_hankel_singular_value_plot_from_a_balanced_result():
    br = sw.balanced_realization(A2, B2, C2, D2, order=2)
    fig = plotting.hankel_singular_value_plot(br)
    ax = fig.axes[0]
    hsv = scipy_hankel_singular_values(A2, B2, C2)
    kept, dropped = line(ax, "kept"), line(ax, "discarded")
    np.testing.assert_allclose(kept.get_ydata(), hsv[:2], rtol=1e-8)
    np.testing.assert_allclose(dropped.get_ydata(), hsv[2:], rtol=1e-8)
    np.testing.assert_array_equal(dropped.get_xdata(), [3, 4])
    cut = line(ax, "chosen order 2")
    assert set(cut.get_xdata()) == {2.5}
    bound = [ln for ln in ax.get_lines() if ln.get_label().startswith("error bound")]
    assert len(bound) == 1
    np.testing.assert_allclose(bound[0].get_ydata()[0], 2 * hsv[2:].sum(), rtol=1e-8)  # (identity)
    assert ax.get_yscale() == "log" and ax.get_xlabel() == "index i"
    rendered_png(fig)


def test_hankel_singular_value_plot_values_with_zeros():
    fig = plotting.hankel_singular_value_plot([2.0, 0.5, 0.0], order=3)
    ax = fig.axes[0]
    zero = line(ax, "exactly zero")
    assert zero.get_xdata().tolist() == [3] and zero.get_ydata()[0] > 0
    assert not any(ln.get_label().startswith("error bound") for ln in ax.get_lines())  # nothing discarded
    with pytest.raises(sw.ModelError, match="order"):
        plotting.hankel_singular_value_plot([2.0, 1.0], order=3)
    with pytest.raises(sw.ModelError, match="values"):
        plotting.hankel_singular_value_plot([2.0, -1.0])
    with pytest.raises(sw.ModelError, match="values"):
        plotting.hankel_singular_value_plot(sw.realize(NUM, DEN))


def test_reduction_error_plot_bounds_hold():
    full = sw.Realization(A2, B2, C2, D2)
    w = np.logspace(-3, 3, 2000)
    fig = plotting.reduction_error_plot(full, frequencies=w)
    ax = fig.axes[0]
    hsv = scipy_hankel_singular_values(A2, B2, C2)
    orders = np.array([1, 2, 3])
    bound = line(ax, "error bound")
    actual = line(ax, "actual error (grid maximum)")
    lower = line(ax, r"lower bound $\sigma_{r+1}$")
    np.testing.assert_array_equal(bound.get_xdata(), orders)
    expected_bound = [2 * hsv[k:].sum() for k in orders]  # (identity: twice the discarded sum)
    np.testing.assert_allclose(bound.get_ydata(), expected_bound, rtol=1e-8)
    np.testing.assert_allclose(lower.get_ydata(), hsv[orders], rtol=1e-8)
    err = np.asarray(actual.get_ydata())
    # Glover (1984): sigma_(r+1) <= ||G - G_r||_inf <= 2 sum_(i>r) sigma_i; the grid maximum
    # approaches the norm from below, so the lower bound is checked with a small slack.
    assert np.all(err <= np.asarray(expected_bound) * (1 + 1e-9))
    assert np.all(err >= hsv[orders] * (1 - 1e-2))
    assert ax.get_xlabel().startswith("order r") and ax.get_yscale() == "log"
    rendered_png(fig)


def test_reduction_error_plot_refuses_bad_input():
    with pytest.raises(sw.ModelError, match="model"):
        plotting.reduction_error_plot(sw.realize([2.0], [1.0, 1.0]))
    with pytest.raises(sw.ModelError, match="orders"):
        plotting.reduction_error_plot(sw.Realization(A2, B2, C2, D2), orders=[4])


# --------------------------------------------------------------------------------------
# fleet distributions
# --------------------------------------------------------------------------------------


def test_fleet_distribution_counts_every_model_once():
    rng = np.random.default_rng(11)
    values = 10.0 ** rng.uniform(-14, 0, 500)
    values[:7] = 0.0
    decided = values > 1e-9
    fig = plotting.fleet_distribution_plot(
        values,
        threshold=1e-9,
        groups=decided,
        group_labels={True: "kept", False: "removed"},
        quantity="margin",
    )
    ax = fig.axes[0]
    # Stacked bars, one container per group: its heights add up to the group's size and
    # all heights to the fleet's (identity: every model counted once).
    containers = ax.containers
    assert len(containers) == 2
    heights = [sum(p.get_height() for p in c) for c in containers]
    assert sum(heights) == 500
    assert sorted(heights) == sorted([int(decided.sum()), int((~decided).sum())])
    counts = {text.split(" (")[0]: int(text.split("(")[1].rstrip(")")) for text in legend_texts(ax)[:2]}
    assert counts == {"kept": int(decided.sum()), "removed": int((~decided).sum())}
    assert "7 exactly zero (lowest bin)" in legend_texts(ax)
    assert any(t.startswith("threshold 1e-09") for t in legend_texts(ax))
    assert ax.get_xscale() == "log" and ax.get_xlabel() == "margin [1]" and ax.get_ylabel() == "models [count]"
    rendered_png(fig)


def test_fleet_distribution_refuses_bad_input():
    with pytest.raises(sw.ModelError, match="values"):
        plotting.fleet_distribution_plot([])
    with pytest.raises(sw.ModelError, match="values"):
        plotting.fleet_distribution_plot([1.0, -1.0])
    with pytest.raises(sw.ModelError, match="groups"):
        plotting.fleet_distribution_plot([1.0, 2.0], groups=[1])
    with pytest.raises(sw.ModelError, match="bins"):
        plotting.fleet_distribution_plot([1.0, 2.0], bins=0)


# --------------------------------------------------------------------------------------
# style, the optional dependency, docstrings
# --------------------------------------------------------------------------------------


def test_helpers_draw_into_given_axes_with_the_style():
    fig, axes = plt.subplots(1, 2)
    out = plotting.pole_zero_map(sw.realize(NUM, DEN), ax=axes[0])
    assert out is fig and axes[0].get_lines()
    plotting.hankel_singular_value_plot([1.0, 0.1], ax=axes[1])
    assert axes[1].get_yscale() == "log"
    assert plotting.STYLE["axes.grid"] is True


def test_missing_matplotlib_names_the_extra(monkeypatch):
    monkeypatch.setitem(sys.modules, "matplotlib.pyplot", None)
    with pytest.raises(ImportError, match=r"statewright\[plot\]"):
        plotting.pole_zero_map(sw.realize(NUM, DEN))


def test_importing_statewright_does_not_import_matplotlib():
    import subprocess

    code = "import sys, statewright, statewright.plotting; print('matplotlib' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_docstring_examples():
    result = doctest.testmod(plotting, optionflags=doctest.NORMALIZE_WHITESPACE)
    assert result.failed == 0 and result.attempted >= 10

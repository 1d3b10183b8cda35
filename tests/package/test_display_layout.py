"""Notebook display of real models: matrices of any width typeset (an array environment
with one explicit column per shown column, not the ten-column default matrix
environment), a caption with the size, time base and arithmetic, a layout of A, B, C, D
that keeps wide MIMO models on the page, and the block structure of staircase and Kalman
results drawn as rules. References: LaTeX itself where a LaTeX engine is installed (the
document must compile), the API's placement of the coefficients, and identities on the
shapes and on the block sizes."""

import re
import shutil
import subprocess
from fractions import Fraction

import numpy as np
import pytest

import statewright as sw
from statewright._base import display

MATRIX_ENVIRONMENTS = ("bmatrix", "pmatrix", "vmatrix", "Bmatrix", "{matrix}", "smallmatrix")


def arrays(tex):
    """(column spec, body) of every innermost array environment, in order."""
    return re.findall(r"\\left\[\\begin\{array\}\{([^}]*)\}(.*?)\\end\{array\}\\right\]", tex)


def rows_of(body):
    rows = [r.replace(r"\hline", "").strip() for r in body.split(r"\\")]
    return [[e.strip() for e in r.split("&")] for r in rows]


def columns_in(spec):
    return len(spec.replace("|", ""))


def lines_of(tex):
    """The outer layout's lines: caption first, then the lines of name = matrix items."""
    assert tex.startswith(r"$\begin{array}{l}") and tex.endswith(r"\end{array}$")
    inner = tex[len(r"$\begin{array}{l}") : -len(r"\end{array}$")]
    return inner.split(r" \\[6pt] ")


def caption_of(tex):
    m = re.match(r"\$\\begin\{array\}\{l\}\\text\{(.*?)\}", tex)
    assert m, tex[:200]
    return m.group(1)


def companion_den(n):
    """s^n + ... with coefficients a_i = -(101 + i), so the last row of the controllable
    canonical A is [101, 102, ...] (API table: [-a_0, ..., -a_{n-1}])."""
    return [1.0] + [float(-(101 + i)) for i in reversed(range(n))]


def assert_well_formed(tex):
    assert tex.count("$") == 2 and tex.count("{") == tex.count("}")
    assert not any(env in tex for env in MATRIX_ENVIRONMENTS)
    for spec, body in arrays(tex):
        widths = {len(r) for r in rows_of(body)}
        assert widths == {columns_in(spec)}, "every row has one entry per declared column"


# --------------------------------------------------------------------------------------
# matrices of any width
# --------------------------------------------------------------------------------------


@pytest.mark.parametrize("n", [10, 11, 12, 13, 30])
def test_wide_matrices_declare_every_column(n):
    r = sw.realize([1.0], companion_den(n))
    tex = r._repr_latex_()
    assert_well_formed(tex)
    spec, body = arrays(tex)[0]
    shown = display.LATEX_MAX + 1 if n > display.LATEX_MAX else n  # the elision adds one column
    assert columns_in(spec) == shown
    last = rows_of(body)[-1]
    if n <= display.LATEX_MAX:
        assert last == [str(101 + j) for j in range(n)]  # (API table)
    else:
        half = display.LATEX_MAX // 2
        assert last == [str(101 + j) for j in range(half)] + [r"\cdots"] + [str(101 + j) for j in range(n - half, n)]


def test_entries_are_the_matrix_entries():
    rng = np.random.default_rng(7)
    a = rng.standard_normal((11, 11)) * 10.0 ** rng.integers(-8, 8, (11, 11))
    r = sw.Realization(a, np.ones((11, 1)), np.ones((1, 11)), np.zeros((1, 1)))
    spec, body = arrays(r._repr_latex_())[0]
    values = [[float(e.replace(r" \cdot 10^{", "e").rstrip("}")) for e in row] for row in rows_of(body)]
    np.testing.assert_allclose(values, a, rtol=5e-6)  # six significant digits (identity)


def test_exact_entries_stay_fractions():
    r = sw.realize([1], [1] + [Fraction(1, 3 + i) for i in range(11)], exact=True)
    tex = r._repr_latex_()
    assert_well_formed(tex)
    last = rows_of(arrays(tex)[0][1])[-1]
    assert last[0] == r"-\frac{1}{13}" and last[-1] == r"-\frac{1}{3}"  # (API table: -a_0 .. -a_10)
    assert "exact rational entries" in caption_of(tex)


@pytest.mark.skipif(shutil.which("pdflatex") is None, reason="no LaTeX engine installed")
def test_latex_compiles(tmp_path):
    rng = np.random.default_rng(3)
    twelve = sw.realize([1.0, 2.0], companion_den(12))
    mimo = sw.Realization(
        rng.standard_normal((30, 30)),
        rng.standard_normal((30, 15)),
        rng.standard_normal((14, 30)),
        rng.standard_normal((14, 15)),
    )
    a = np.diag([-1.0, -2.0, -3.0, -4.0])
    b = np.array([[1.0], [1.0], [0.0], [0.0]])
    c = np.array([[1.0, 0.0, 1.0, 0.0]])
    pieces = [
        twelve._repr_latex_(),
        mimo._repr_latex_(),
        sw.realize(["1/3", "2"], ["1", "0.5", "7"], exact=True)._repr_latex_(),
        sw.controllability_staircase(a, b, c)._repr_latex_(),
        sw.kalman_decomposition(a, b, c, np.zeros((1, 1)))._repr_latex_(),
    ]
    doc = "\n\n".join(pieces)
    (tmp_path / "models.tex").write_text(
        "\\documentclass{article}\n\\usepackage{amsmath}\n\\usepackage[a4paper,landscape,margin=1cm]{geometry}\n"
        "\\begin{document}\n" + doc + "\n\\end{document}\n"
    )
    out = subprocess.run(
        ["pdflatex", "-interaction=nonstopmode", "-halt-on-error", "models.tex"],
        cwd=tmp_path,
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert out.returncode == 0, out.stdout[-2000:]
    assert (tmp_path / "models.pdf").stat().st_size > 1000


# --------------------------------------------------------------------------------------
# caption
# --------------------------------------------------------------------------------------


def test_caption_states_size_and_arithmetic():
    tex = sw.realize([1.5, 6.0], [1.0, 2.4, 3.1, 1.2])._repr_latex_()
    cap = caption_of(tex)
    assert cap.startswith("3 states, 1 input, 1 output")
    assert "float64" in cap


def test_caption_time_base_when_recorded():
    class Timed(sw.Realization):
        __slots__ = ()
        sample_time = 5.0

    class Continuous(sw.Realization):
        __slots__ = ()
        sample_time = None

    a, b, c, d = sw.realize([1.0], [1.0, 0.5])
    assert "discrete time, sample time 5" in caption_of(Timed(a, b, c, d)._repr_latex_())
    assert "continuous time" in caption_of(Continuous(a, b, c, d)._repr_latex_())


def test_caption_without_a_time_base():
    # A realization that records no time base says nothing about one.
    r = sw.realize([1.0], [1.0, 0.5])
    if hasattr(r, "sample_time"):
        pytest.skip("this Realization records its time base")
    cap = caption_of(r._repr_latex_())
    assert "time" not in cap


def test_caption_says_when_rows_and_columns_are_elided():
    cap = caption_of(sw.realize([1.0], companion_den(20))._repr_latex_())
    assert cap.startswith("20 states") and "first and last 6 rows and columns shown" in cap


# --------------------------------------------------------------------------------------
# layout of A, B, C, D
# --------------------------------------------------------------------------------------


def shown_width(spec):
    return columns_in(spec)


def line_widths(tex):
    widths = []
    for line in lines_of(tex)[1:]:
        widths.append([shown_width(spec) for spec, _ in arrays(line)] + [1] * line.count(r"[\,]_"))
    return widths


def test_small_siso_model_on_one_line():
    tex = sw.realize([1.5, 6.0], [1.0, 2.4, 3.1, 1.2])._repr_latex_()
    lines = lines_of(tex)
    assert len(lines) == 2 and all(f"{x} = " in lines[1] for x in "ABCD")


@pytest.mark.parametrize("n, m, p", [(12, 1, 1), (8, 4, 3), (30, 15, 14), (5, 20, 2)])
def test_mimo_layout_keeps_each_line_narrow(n, m, p):
    rng = np.random.default_rng(n + m + p)
    r = sw.Realization(
        rng.standard_normal((n, n)),
        rng.standard_normal((n, m)),
        rng.standard_normal((p, n)),
        rng.standard_normal((p, m)),
    )
    tex = r._repr_latex_()
    assert_well_formed(tex)
    names = re.findall(r"(?:^| )([ABCD]) = ", " ".join(lines_of(tex)[1:]))
    assert names == list("ABCD")  # every matrix once, in order
    for widths in line_widths(tex):
        assert len(widths) == 1 or sum(widths) <= display.LINE_COLUMNS


# --------------------------------------------------------------------------------------
# block structure of staircase and Kalman results
# --------------------------------------------------------------------------------------


def rule_positions(spec):
    """Column counts after which the spec has a rule."""
    out, count = [], 0
    for ch in spec:
        if ch == "|":
            out.append(count)
        else:
            count += 1
    return out


def hline_rows(body):
    rows = body.split(r"\\")
    return [i + 1 for i, r in enumerate(rows[1:]) if r.strip().startswith(r"\hline")]


def hidden_mode_model():
    """Four states: two reached by the input (a coupled pair), two not (identity: B's
    zero rows and A's zero lower-left block), in coordinates that hide it."""
    a = np.array([[-1.0, 2.0, 0.5, 0.0], [-2.0, -1.0, 0.0, 0.3], [0.0, 0.0, -0.3, 4.0], [0.0, 0.0, -4.0, -0.3]])
    b = np.array([[1.0], [0.0], [0.0], [0.0]])
    c = np.array([[1.0, 0.0, 0.7, 0.2]])
    q = np.linalg.qr(np.random.default_rng(4).standard_normal((4, 4)))[0]
    return q.T @ a @ q, q.T @ b, c @ q


def test_staircase_shows_its_steps():
    a, b, c = hidden_mode_model()
    s = sw.controllability_staircase(a, b, c)
    assert s.rank == 2 and s.blocks == [1, 1]
    tex = s._repr_latex_()
    assert_well_formed(tex)
    (spec_a, body_a), (spec_b, body_b), (spec_c, _) = arrays(tex)
    assert rule_positions(spec_a) == [1, 2]  # after each step: cumulative block sizes (identity)
    assert hline_rows(body_a) == [1, 2]
    assert hline_rows(body_b) == [1, 2] and rule_positions(spec_c) == [1, 2]
    cap = caption_of(tex)
    assert "controllability staircase" in cap and "2 of 4" in cap and "[1, 1]" in cap
    # the zero block below the controllable part is what the rules frame
    assert np.allclose(s.a[2:, :2], 0.0, atol=1e-12)


def test_observability_staircase_shows_its_steps():
    a, b, c = hidden_mode_model()
    s = sw.observability_staircase(a.T, c.T, b.T)  # the dual model: observable part 2 of 4
    tex = s._repr_latex_()
    assert_well_formed(tex)
    spec_a = arrays(tex)[0][0]
    assert rule_positions(spec_a) == [1, 2]
    assert "observability staircase" in caption_of(tex)


def test_kalman_decomposition_shows_its_four_parts():
    a, b, c = hidden_mode_model()
    k = sw.kalman_decomposition(a, b, c, np.zeros((1, 1)))
    tex = k._repr_latex_()
    assert_well_formed(tex)
    sizes = k.sizes
    cuts = sorted({sum(sizes[:i]) for i in range(1, 4)} - {0, sum(sizes)})
    specs = arrays(tex)
    assert len(specs) == 4  # T^-1 A T, T^-1 B, C T, D
    assert rule_positions(specs[0][0]) == cuts  # (identity: cumulative part sizes)
    assert hline_rows(specs[0][1]) == cuts
    cap = caption_of(tex)
    for word in ("controllable and observable", "uncontrollable"):
        assert word in cap
    assert str(sizes[0]) in cap

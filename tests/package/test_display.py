"""Display of a Realization: the plain-text ``repr`` for terminals and ``_repr_latex_`` for
notebooks, for realizations with no states and for large ones (elided past 12 rows or
columns, keeping the first and last ones). References: the API table's placement of the
coefficients (the controllable canonical form's last row is [-a_0, ..., -a_{n-1}]) and
identities on the shapes."""

import re
from fractions import Fraction

import numpy as np
import pytest

import statewright as sw

SHOWN = 12  # rows and columns shown before eliding


def bmatrices(tex):
    """The bodies of the bracketed matrix arrays (one per matrix), in order."""
    return re.findall(r"\\left\[\\begin\{array\}\{[^}]*\}(.*?)\\end\{array\}\\right\]", tex)


def grid(body):
    """A matrix body as a list of rows of entries (rules between blocks dropped)."""
    return [[e.strip() for e in row.replace(r"\hline", "").split("&")] for row in body.split(r"\\")]


def named_blocks(text):
    """The repr's lines after the header, grouped by matrix name."""
    blocks, current = {}, None
    for line in text.splitlines()[1:]:
        m = re.match(r"^([ABCD]) =(.*)$", line)
        if m:
            current = m.group(1)
            blocks[current] = [m.group(2).strip()] if m.group(2).strip() else []
        else:
            blocks[current].append(line)
    return blocks


def assert_balanced(tex):
    assert tex.startswith("$") and tex.endswith("$") and tex.count("$") == 2
    assert tex.count(r"\begin{array}") == tex.count(r"\end{array}")
    assert "bmatrix" not in tex  # the default matrix environments stop at ten columns
    assert tex.count("{") == tex.count("}")
    for body in bmatrices(tex):
        widths = {len(row) for row in grid(body)}
        assert len(widths) == 1, "every row of a matrix has the same number of entries"


# --------------------------------------------------------------------------------------
# no states
# --------------------------------------------------------------------------------------


def test_pure_gain_repr():
    r = sw.realize([2.5], [1.0])
    text = repr(r)
    assert text.splitlines()[0] == "Realization(n_states=0, n_inputs=1, n_outputs=1)"
    blocks = named_blocks(text)
    assert blocks["A"] == ["[] (empty, 0x0)"]  # (identity: shapes (n, n), (n, m), (p, n))
    assert blocks["B"] == ["[] (empty, 0x1)"]
    assert blocks["C"] == ["[] (empty, 1x0)"]
    assert blocks["D"] == ["[[2.5]]"]


def test_pure_gain_latex():
    tex = sw.realize([2.5], [1.0])._repr_latex_()
    assert_balanced(tex)
    assert r"A = [\,]_{0\times0}" in tex
    assert r"B = [\,]_{0\times1}" in tex
    assert r"C = [\,]_{1\times0}" in tex
    assert bmatrices(tex) == ["2.5"]


def test_no_states_several_inputs_and_outputs():
    r = sw.Realization(np.zeros((0, 0)), np.zeros((0, 3)), np.zeros((2, 0)), [[1.0, 0.0, -2.0], [0.5, 3.0, 4.0]])
    blocks = named_blocks(repr(r))
    assert blocks["B"] == ["[] (empty, 0x3)"] and blocks["C"] == ["[] (empty, 2x0)"]
    assert len(blocks["D"]) == 2
    tex = r._repr_latex_()
    assert_balanced(tex)
    assert r"[\,]_{0\times3}" in tex and r"[\,]_{2\times0}" in tex
    assert grid(bmatrices(tex)[0]) == [["1", "0", "-2"], ["0.5", "3", "4"]]  # (identity)


def test_no_states_exact():
    r = sw.realize(["1/3"], ["2"], exact=True)
    text = repr(r)
    assert text.startswith("Realization(exact n_states=0")
    assert named_blocks(text)["D"] == ["[[1/6]]"]  # (identity: 1/3 / 2)
    tex = r._repr_latex_()
    assert_balanced(tex)
    assert bmatrices(tex) == [r"\frac{1}{6}"]


# --------------------------------------------------------------------------------------
# large realizations
# --------------------------------------------------------------------------------------


def _den(n):
    """A monic order-n denominator with distinct coefficients a_i = -(i + 101) ... so that
    the last row of the controllable canonical A is [-a_0, ..., -a_{n-1}] = [101 + 0, ...]."""
    a = [-(101 + i) for i in range(n)]  # a_0 .. a_{n-1}
    return [1.0] + [float(x) for x in reversed(a)]  # s^n + a_{n-1} s^{n-1} + ... + a_0


@pytest.mark.parametrize("n", [SHOWN + 1, 20, 40])
def test_large_latex_keeps_first_and_last_rows_and_columns(n):
    r = sw.realize([1.0], _den(n))
    tex = r._repr_latex_()
    assert_balanced(tex)
    a_body, b_body, c_body, d_body = bmatrices(tex)
    a = grid(a_body)
    assert len(a) == SHOWN + 1 and all(len(row) == SHOWN + 1 for row in a)  # 12 shown + the elision
    half = SHOWN // 2
    assert [row[half] for row in a[:half] + a[half + 1 :]] == [r"\cdots"] * SHOWN
    assert a[half] == [r"\vdots"] * half + [r"\ddots"] + [r"\vdots"] * half
    # last row of A (API table): [-a_0, ..., -a_{n-1}] = [101, ..., 100 + n], first and last six
    expected = [str(101 + j) for j in range(half)] + [r"\cdots"] + [str(101 + j) for j in range(n - half, n)]
    assert a[-1] == expected
    assert str(101 + half) not in a[-1]  # the middle is elided
    # first row: ones on the superdiagonal
    assert a[0][:3] == ["0", "1", "0"]
    # B = e_n: a column, elided downwards only, its last entry the 1
    b = grid(b_body)
    assert len(b) == SHOWN + 1 and all(len(row) == 1 for row in b)
    assert b[half] == [r"\vdots"] and b[-1] == ["1"] and r"\cdots" not in b_body and r"\ddots" not in b_body
    assert len(grid(c_body)[0]) == SHOWN + 1 and r"\vdots" not in c_body
    assert d_body == "0"


def test_twelve_is_shown_whole():
    tex = sw.realize([1.0], _den(SHOWN))._repr_latex_()
    assert_balanced(tex)
    assert r"\cdots" not in tex and r"\vdots" not in tex and r"\ddots" not in tex
    a = grid(bmatrices(tex)[0])
    assert len(a) == SHOWN and a[-1] == [str(101 + j) for j in range(SHOWN)]  # (API table)


def test_large_exact_latex_keeps_fractions():
    n = 16
    den = [1] + [Fraction(1, 3 + i) for i in range(n)]
    r = sw.realize([1], den, exact=True)
    tex = r._repr_latex_()
    assert_balanced(tex)
    last = grid(bmatrices(tex)[0])[-1]
    # last row: -a_0 = -1/(3 + n - 1), ..., -a_{n-1} = -1/3 (API table)
    assert last[0] == rf"-\frac{{1}}{{{3 + n - 1}}}" and last[-1] == r"-\frac{1}{3}"
    assert "0.333" not in tex


def test_large_mimo_latex_elides_both_ways():
    rng = np.random.default_rng(5)
    n, m, p = 30, 15, 14
    r = sw.Realization(
        rng.standard_normal((n, n)),
        rng.standard_normal((n, m)),
        rng.standard_normal((p, n)),
        rng.standard_normal((p, m)),
    )
    tex = r._repr_latex_()
    assert_balanced(tex)
    for body in bmatrices(tex):
        g = grid(body)
        assert len(g) == SHOWN + 1 and len(g[0]) == SHOWN + 1
        assert body.count(r"\ddots") == 1


@pytest.mark.parametrize("n", [SHOWN + 1, 40])
def test_large_repr_is_bounded_and_keeps_the_coefficients(n):
    r = sw.realize([1.0], _den(n))
    text = repr(r)
    assert text.splitlines()[0] == f"Realization(n_states={n}, n_inputs=1, n_outputs=1)"
    assert "\\" not in text  # plain text, no LaTeX
    blocks = named_blocks(text)
    for name in "AB":
        lines = blocks[name]
        assert len(lines) == SHOWN + 1  # six rows, "...", six rows
        assert lines[SHOWN // 2].strip() == "..."
    assert all(len(line) <= 100 for line in text.splitlines())  # fits a terminal
    last = blocks["A"][-1]
    assert "-101." not in last  # (API table: the last row holds -a_i = +101 ...)
    assert last.lstrip(" [").startswith("101.") and last.rstrip("]").endswith(f"{100 + n}.")
    assert blocks["B"][-1].strip(" []") == "1."
    assert "..." in blocks["C"][0]


def test_exact_repr_aligns_columns():
    r = sw.realize(["1/3", "1"], ["2", "1", "5"], exact=True)
    lines = named_blocks(repr(r))["A"]
    assert len(lines) == 2 and len(lines[0].rstrip("]")) == len(lines[1].rstrip("]"))  # columns line up
    assert lines == ["[[   0    1]", " [-5/2 -1/2]]"]  # (API table: last row -a_0, -a_1 of s^2 + s/2 + 5/2)


def test_float_repr_matches_the_matrices():
    r = sw.realize([1.0, 3.0], [1.0, 3.0, 2.0], "observable_canonical")
    blocks = named_blocks(repr(r))
    assert blocks["A"] == [np.array2string(r.a).splitlines()[0], np.array2string(r.a).splitlines()[1]]  # (numpy)

"""Block companion realizations of p x m transfer matrices (realize_transfer_matrix).

References named beside each check:
- (identity): C (sI - A)^-1 B + D of the realized model, evaluated by numpy at complex
  points, against num(s)/den(s) of every entry evaluated by numpy.polyval;
- (sympy exact): C (sI - A)^-1 B + D computed by sympy in exact rationals, each entry
  minus the input entry cancelled to zero; least common multiples by sympy.lcm;
- (Hankel rank): the McMillan degree as the rank, computed by sympy, of the exact block
  Hankel matrix of Markov parameters, these from the Laurent expansion at infinity of the
  exact input entries (power-series division in Fractions).
"""

from fractions import Fraction

import numpy as np
import pytest
import sympy

import statewright as sw

S = sympy.symbols("s")
POINTS = np.array([0.5j, 2.0j, 1.0 + 1.0j, -0.5 + 3.0j, 7.0 - 2.0j, 0.3])
FORMS = ("block_controller", "block_observer")


def pad(entries, width):
    """Nested lists of coefficient lists -> (p, m, width) list, leading zeros added."""
    return [[[0] * (width - len(c)) + list(c) for c in row] for row in entries]


# G1 (2 x 2): a shared pole (s+1) in both columns, an unreduced entry (s+1)/((s+1)(s+2)).
G1_NUM = [[[1], [2]], [[1, 1], [1, 0]]]
G1_DEN = [[[1, 1], [1, 2]], [[1, 3, 2], [1, 2, 1]]]  # (s+1)^2 in entry (1, 1)

# G2 (3 x 2): a zero entry, a constant entry, a complex pair, a biproper entry.
G2_NUM = [[[1], [0]], [[1, 2], [1]], [[2], [2, 1]]]
G2_DEN = [[[1, 1], [1]], [[1, 2, 5], [1, 3]], [[1], [1, 4]]]


def float_arrays(num, den):
    w = max(len(c) for row in num + den for c in row)
    return np.array(pad(num, w), dtype=float), np.array(pad(den, w), dtype=float)


def entry_values(num, den, s):
    return np.array([[np.polyval(n, s) / np.polyval(d, s) for n, d in zip(rn, rd)] for rn, rd in zip(num, den)])


def sym_matrix(num, den):
    def poly(c):
        return sum(sympy.Rational(Fraction(x)) * S ** (len(c) - 1 - k) for k, x in enumerate(c))

    return sympy.Matrix([[poly(n) / poly(d) for n, d in zip(rn, rd)] for rn, rd in zip(num, den)])


def sym_realized(r):
    a, b, c, d = (sympy.Matrix(x.shape[0], x.shape[1], [sympy.Rational(v) for v in x.reshape(-1)]) for x in r)
    n = a.shape[0]
    if n == 0:
        return d
    return c * (S * sympy.eye(n) - a).LUsolve(b) + d


def markov(numc, denc, count):
    """h_0 .. h_{count-1} of the Laurent expansion at infinity of a proper num/den
    (power-series division in 1/s, exact Fractions)."""
    den = [Fraction(x) for x in denc]
    while den[0] == 0:
        den = den[1:]
    nd = len(den) - 1
    num = [Fraction(x) for x in numc]
    num = ([Fraction(0)] * (nd + 1 - len(num)) + num)[-(nd + 1) :] if len(num) <= nd + 1 else num
    b = num + [Fraction(0)] * count
    h = []
    for k in range(count):
        acc = b[k] - sum(den[i] * h[k - i] for i in range(1, min(k, nd) + 1))
        h.append(acc / den[0])
    return h


def mcmillan_degree(num, den):
    """Rank of the exact block Hankel matrix [h_{i+j+1}] of the Markov parameters."""
    p, m = len(num), len(num[0])
    bound = sum(len(d) - 1 for row in den for d in row)
    k = bound + 1
    hs = [[markov(num[i][j], den[i][j], 2 * k + 1) for j in range(m)] for i in range(p)]
    rows = []
    for bi in range(k):
        for i in range(p):
            rows.append([sympy.Rational(hs[i][j][bi + bj + 1]) for bj in range(k) for j in range(m)])
    return sympy.Matrix(rows).rank()


def lcm_degrees(num, den, by):
    """Degrees of sympy.lcm over each column ("col") or row ("row"), zero numerators skipped."""
    p, m = len(num), len(num[0])
    groups = (
        [[(i, j) for i in range(p)] for j in range(m)]
        if by == "col"
        else [[(i, j) for j in range(m)] for i in range(p)]
    )
    out = []
    for g in groups:
        polys = [
            sympy.Poly([sympy.Rational(Fraction(x)) for x in den[i][j]], S).monic() for i, j in g if any(num[i][j])
        ]
        l = sympy.Poly(1, S)
        for q in polys:
            l = sympy.lcm(l, q)
        out.append(l.degree())
    return out


# ---------------------------------------------------------------- float mode


@pytest.mark.parametrize("form", FORMS)
@pytest.mark.parametrize("case", ["G1", "G2"])
def test_float_response_matches_every_entry(form, case):
    num, den = (G1_NUM, G1_DEN) if case == "G1" else (G2_NUM, G2_DEN)
    fn, fd = float_arrays(num, den)
    r = sw.realize_transfer_matrix(fn, fd, form)
    p, m = len(num), len(num[0])
    assert (r.n_outputs, r.n_inputs) == (p, m)
    for s in POINTS:
        np.testing.assert_allclose(r.evaluate(s), entry_values(num, den, s), rtol=1e-12, atol=1e-14)  # (identity)
    assert r.info["denominator_residual"] < 1e-14
    by = "col" if form == "block_controller" else "row"
    assert list(r.info["block_orders"]) == lcm_degrees(num, den, by)  # (sympy exact) lcm degrees
    assert r.n_states == sum(r.info["block_orders"])


def test_block_controller_structure():
    fn, fd = float_arrays(G1_NUM, G1_DEN)
    r = sw.realize_transfer_matrix(fn, fd)
    # Column 1: lcm (s+1)(s+2) = s^2 + 3s + 2; column 2: lcm (s+1)^2(s+2) = s^3 + 4s^2 + 5s + 2.
    assert r.info["block_orders"] == [2, 3]
    np.testing.assert_array_equal(r.a[:2, :2], [[0, 1], [-2, -3]])  # (sympy exact) lcm coefficients
    np.testing.assert_allclose(r.a[4, 2:], [-2, -5, -4], rtol=1e-14)
    np.testing.assert_array_equal(r.b, [[0, 0], [1, 0], [0, 0], [0, 0], [0, 1]])
    # Row 1 of column 1: 1 * (s+2) -> [2, 1]; row 2: (s+1) * 1 -> [1, 1].
    np.testing.assert_allclose(r.c[:, :2], [[2, 1], [1, 1]], rtol=1e-14)


def test_block_observer_is_the_dual_per_row():
    fn, fd = float_arrays(G2_NUM, G2_DEN)
    r = sw.realize_transfer_matrix(fn, fd, "block_observer")
    # Row orders: lcm(s+1) = 1 (the zero entry adds nothing), (s^2+2s+5)(s+3) = 3, (s+4) = 1.
    assert r.info["block_orders"] == [1, 3, 1]
    np.testing.assert_array_equal(r.c, [[1, 0, 0, 0, 0], [0, 0, 0, 1, 0], [0, 0, 0, 0, 1]])
    np.testing.assert_allclose(r.d, [[0, 0], [0, 0], [2, 2]], rtol=0, atol=0)


def test_common_denominator():
    num = np.array([[[0, 1, 0], [0, 0, 2]], [[1, 0, 1], [0, 1, 1]], [[0, 0, 0], [0, 0, 3]]], dtype=float)
    den = [1.0, 3.0, 2.0]
    for form in FORMS:
        r = sw.realize_transfer_matrix(num, den, form)
        expect = [[[np.polyval(n, s) / np.polyval(den, s) for n in row] for row in num] for s in POINTS]
        np.testing.assert_allclose(r.evaluate(POINTS), expect, rtol=1e-12, atol=1e-14)  # (identity)
        assert r.info["denominator_residual"] == 0.0
    assert sw.realize_transfer_matrix(num, den).n_states == 4  # two columns, each of order 2


def test_repeated_and_nearly_equal_roots_stay_accurate():
    # (s+1)^3 beside (s+1): the computed copies of the triple root spread by ~eps^(1/3).
    num = [[[1], [1]], [[1, 0], [1]]]
    den = [[[1, 3, 3, 1], [1, 1]], [[1, 1], [1, 10]]]
    fn, fd = float_arrays(num, den)
    for form in FORMS:
        r = sw.realize_transfer_matrix(fn, fd, form)
        for s in POINTS:
            np.testing.assert_allclose(r.evaluate(s), entry_values(num, den, s), rtol=1e-9)  # (identity)
    # API version 2: the root-merging tolerance is merge_tol, and a merge is verified. A
    # merge_tol of 1e-3 would merge the distinct poles 1 and 1.0001 in one column, which
    # changes the entries by about 1e-2 relative at distance 1e-2 from the pole: the merge
    # is refused and the two states are kept (a correct realization).
    num = [[[1]], [[1]]]
    den = [[[1, -1]], [[1, -1.0001]]]
    fn, fd = float_arrays(num, den)
    assert sw.realize_transfer_matrix(fn, fd).n_states == 2
    r = sw.realize_transfer_matrix(fn, fd, merge_tol=1e-3)
    assert r.n_states == 2 and r.info["merge_refused"]
    assert r.info["merge_error"] == pytest.approx(1e-2, rel=1e-3)  # delta / distance (identity)
    for s in POINTS:
        np.testing.assert_allclose(r.evaluate(s), entry_values(num, den, s), rtol=1e-12)  # (identity)


@pytest.mark.parametrize("gap", [1e-9, 1e-10, 3e-9])
def test_merging_distinct_poles_is_refused(gap):
    # poles -2 and -2(1 + gap) in one column: within the default merge_tol 1e-8, but merging
    # them changes the entries by about gap / 1e-2 at distance 1e-2 |pole| (and by O(1) at
    # distance gap): the merge is refused, both states kept. (The kept block's denominator
    # is the product of the two factors; its rounding limits the accuracy at distances of
    # order gap from the poles, so the entries are checked at 1e-3 |pole| and beyond.)
    p = -2.0
    num = [[[1]], [[1]]]
    den = [[[1, -p]], [[1, -p * (1 + gap)]]]
    fn, fd = float_arrays(num, den)
    r = sw.realize_transfer_matrix(fn, fd)
    assert r.n_states == 2 and r.info["merge_refused"] and r.info["merge_error"] > 1e-8
    for s in (p + 2e-3j, p * (1 + 1e-3), 1j, 5.0):
        np.testing.assert_allclose(r.evaluate(s), entry_values(num, den, s), rtol=1e-6)  # (identity)
    rm = sw.realize_transfer_matrix(fn, fd, minimal=True)
    # the McMillan degree of [[1/(s+2)], [1/(s+2+2 gap)]] is 2 (distinct poles; identity)
    assert rm.n_states == 2


def test_exactly_shared_poles_still_merge():
    # equal roots merge exactly and pass the check (identity: the column's lcm is s + 1)
    num = [[[1]], [[3]]]
    den = [[[1, 1]], [[1, 1]]]
    fn, fd = float_arrays(num, den)
    r = sw.realize_transfer_matrix(fn, fd)
    assert r.n_states == 1 and not r.info["merge_refused"]


@pytest.mark.parametrize("form", FORMS)
@pytest.mark.parametrize("case", ["G1", "G2", "G3", "G4"])
def test_minimal_order_is_the_mcmillan_degree(form, case):
    if case == "G1":
        num, den = G1_NUM, G1_DEN
    elif case == "G2":
        num, den = G2_NUM, G2_DEN
    elif case == "G3":
        # Rank-one 2 x 2 with a shared pole: [[1, 2], [3, 6]] / (s+1), written unreduced.
        num = [[[1, 2], [2]], [[3], [6, 12]]]
        den = [[[1, 3, 2], [1, 1]], [[1, 1], [1, 3, 2]]]
    else:
        # [[1/(s+1), 2/(s+1)], [1/(s+2), (s+3)/((s+1)(s+3))]]: the pole -1 of both columns
        # (rows) is one state, -3 cancels.
        num = [[[1], [2]], [[1], [1, 3]]]
        den = [[[1, 1], [1, 1]], [[1, 2], [1, 4, 3]]]
    fn, fd = float_arrays(num, den)
    full = sw.realize_transfer_matrix(fn, fd, form)
    r = sw.realize_transfer_matrix(fn, fd, form, minimal=True)
    degree = mcmillan_degree(num, den)
    assert r.n_states == degree  # (Hankel rank)
    assert full.n_states == {"G1": 5, "G2": 5, "G3": 4, "G4": 4}[case] >= degree
    for s in POINTS:
        np.testing.assert_allclose(r.evaluate(s), entry_values(num, den, s), rtol=1e-10, atol=1e-12)  # (identity)
    assert "block_realization" in r.info


def test_minimal_passes_tol_on():
    fn, fd = float_arrays(G1_NUM, G1_DEN)
    # API version 2: tol is the rank tolerance only, merge_tol the root-merging one
    r = sw.realize_transfer_matrix(fn, fd, minimal=True, tol=1e-9)
    assert r.info["tol"] == (1e-9, 1e-9)
    assert r.info["block_realization"]["merge_tol"] == 1e-8
    r = sw.realize_transfer_matrix(fn, fd, minimal=True, tol=1e-9, merge_tol=1e-10)
    assert r.info["block_realization"]["merge_tol"] == 1e-10


# ---------------------------------------------------------------- exact mode


@pytest.mark.parametrize("form", FORMS)
@pytest.mark.parametrize("case", ["G1", "G2", "fractions"])
def test_exact_matches_sympy(form, case):
    if case == "G1":
        num, den = G1_NUM, G1_DEN
    elif case == "G2":
        num, den = G2_NUM, G2_DEN
    else:
        num = [[["1/2"], [Fraction(1, 3), 1]], [["0.25", 0], [2, 2]]]
        den = [[[3, 1], [1, "1/3"]], [[1, 0, "-1/9"], [1, "0.5"]]]
    w = max(len(c) for row in num + den for c in row)
    r = sw.realize_transfer_matrix(pad(num, w), pad(den, w), form, exact=True)
    assert r.a.dtype == object and all(isinstance(x, Fraction) for x in r.a.reshape(-1))
    diff = sym_realized(r) - sym_matrix(num, den)
    assert all(sympy.cancel(e) == 0 for e in diff)  # (sympy exact)
    by = "col" if form == "block_controller" else "row"
    assert r.n_states == sum(lcm_degrees(num, den, by))  # (sympy exact) lcm degrees


def test_exact_common_denominator_and_float_agree():
    num = [[[1, 0], [0, 2]], [[1, 1], [0, 0]], [[3, 1], [1, -1]]]
    den = [1, "1/2", "-3/2"]
    r = sw.realize_transfer_matrix(num, den, exact=True)
    rf = sw.realize_transfer_matrix(np.array(num, dtype=float), [1, 0.5, -1.5])
    np.testing.assert_array_equal(rf.a, r.a.astype(float))  # (identity) same placement
    diff = sym_realized(r) - sym_matrix(num, [[den] * 2] * 3)
    assert all(sympy.cancel(e) == 0 for e in diff)  # (sympy exact)


# ---------------------------------------------------------------- bad input


@pytest.mark.parametrize(
    "num, den, kwargs, arg",
    [
        ([[[1, 0, 0]]], [[[0, 1, 1]]], {}, "num"),  # improper entry
        ([[[1]]], [[[0, 0]]], {}, "den"),  # zero denominator
        ([[[0]]], [[[0]]], {}, "den"),  # zero denominator, zero numerator
        ([[[1]]], [0, 0], {}, "den"),  # zero common denominator
        ([[[1], [1]]], [[[1, 1]]], {}, "den"),  # shape mismatch
        ([[1, 2]], [1, 1], {}, "num"),  # num not 3-D
        ([[[1]]], [[1, 1]], {}, "den"),  # den 2-D
        ([[[np.nan]]], [1, 1], {}, "num"),
        ([[[1]]], [1, np.inf], {}, "den"),
        ([[[1]]], [1, 1], {"form": "controller"}, "form"),
        ([[[1]]], [1, 1], {"tol": -1.0}, "tol"),
        ([[[1]]], [1, 1], {"merge_tol": 1.5}, "merge_tol"),  # version 2: merge_tol apart from tol
        ([[[1]]], [1, 1], {"merge_tol": -1.0}, "merge_tol"),
        ([[[1]]], [1, 1], {"minimal": "yes"}, "minimal"),
        ([[[0.5]]], [1, 1], {"exact": True}, "num"),  # a float in exact mode
        ([[["x"]]], [1, 1], {"exact": True}, "num"),
        ([[[1, 0]]], [[[1]]], {"exact": True}, "num"),  # improper, exact
        ([[[1]]], [[[0]]], {"exact": True}, "den"),  # zero denominator, exact
        ([[[1]]], [1, 1], {"exact": True, "minimal": True}, "minimal"),
        (np.zeros((0, 1, 1)), [1, 1], {}, "num"),
    ],
)
def test_bad_input_is_a_model_error(num, den, kwargs, arg):
    form = kwargs.pop("form", "block_controller")
    with pytest.raises(sw.ModelError, match=f"^{arg}"):
        sw.realize_transfer_matrix(num, den, form, **kwargs)


def test_improper_entry_is_named():
    with pytest.raises(sw.ModelError, match=r"entry \(1, 0\) is improper"):
        sw.realize_transfer_matrix([[[0, 1]], [[1, 0]]], [[[1, 1]], [[0, 1]]])


def test_zero_matrix_has_no_states():
    r = sw.realize_transfer_matrix(np.zeros((2, 3, 2)), [1, 2])
    assert r.n_states == 0 and r.b.shape == (0, 3) and r.c.shape == (2, 0)
    np.testing.assert_array_equal(r.evaluate(1j), np.zeros((2, 3)))  # (identity)


def test_docstring_examples():
    import doctest

    from statewright._api import transfer_matrix

    result = doctest.testmod(transfer_matrix, optionflags=doctest.NORMALIZE_WHITESPACE)
    assert result.failed == 0 and result.attempted >= 5


@pytest.mark.parametrize("seed", range(5))
def test_random_shared_poles_response(seed):
    """Entries drawn over a small pool of real poles and complex pairs (shared, repeated
    up to three times within an entry), numerators random, some zero."""
    rng = np.random.default_rng(seed)
    pool = [-3.0, -0.5, 1.25, complex(-1, 2), complex(0.5, -0.75)]
    p, m = 3, 2
    num, den = [], []
    for _ in range(p):
        rn, rd = [], []
        for _ in range(m):
            roots = []
            for c in rng.choice(len(pool), size=rng.integers(0, 4)):
                z = pool[c]
                roots += [z, np.conj(z)] if isinstance(z, complex) else [z]
            d = np.real(np.poly(roots)) * rng.uniform(0.5, 2) if roots else np.array([rng.uniform(0.5, 2)])
            nn = rng.normal(size=rng.integers(1, len(d) + 1)) if rng.uniform() > 0.2 else np.zeros(1)
            rn.append(list(nn))
            rd.append(list(d))
        num.append(rn)
        den.append(rd)
    fn, fd = float_arrays(num, den)
    for form in FORMS:
        r = sw.realize_transfer_matrix(fn, fd, form)
        for s in POINTS:
            want = entry_values(num, den, s)
            np.testing.assert_allclose(r.evaluate(s), want, rtol=1e-9, atol=1e-9 * np.max(np.abs(want)))  # (identity)
        rm = sw.realize_transfer_matrix(fn, fd, form, minimal=True)
        for s in POINTS:
            want = entry_values(num, den, s)
            np.testing.assert_allclose(rm.evaluate(s), want, rtol=1e-7, atol=1e-7 * np.max(np.abs(want)))  # (identity)

"""Luenberger controller / observer forms (multivariable_canonical_form): the transfer matrix
is preserved (scipy.signal.ss2tf, exact Markov parameters), the pattern of the form, the
indices against the exact ranks of the controllability matrix's column sequence (sympy),
their invariance under state coordinates, and the refusals."""

from fractions import Fraction

import numpy as np
import pytest
import scipy.signal
import sympy as sp

import statewright as sw
from structure_helpers import scan_indices


def _check_controller_pattern(a, b, indices):
    """(definition) companion blocks per index: ones on the superdiagonal inside each block,
    zero rows elsewhere but the block's last; B zero but the last row of each block, which
    has a 1 in its input's column and zeros to its left."""
    a, b = np.asarray(a, dtype=object), np.asarray(b, dtype=object)
    n = a.shape[0]
    last_rows = {}
    start = 0
    for j, mu in enumerate(indices):
        if mu == 0:
            continue
        for r in range(start, start + mu - 1):
            assert all(a[r, k] == (1 if k == r + 1 else 0) for k in range(n)), (r, a[r])
            assert all(x == 0 for x in b[r]), (r, b[r])
        last = start + mu - 1
        last_rows[j] = last
        assert b[last, j] == 1
        assert all(b[last, k] == 0 for k in range(j))
        start += mu
    assert start == n


def _random_integer_model(rng, n, m, p, structure="generic"):
    a = rng.integers(-3, 4, size=(n, n))
    b = rng.integers(-2, 3, size=(n, m))
    c = rng.integers(-2, 3, size=(p, n))
    d = rng.integers(-1, 2, size=(p, m))
    if structure == "repeated_input" and m > 1:
        b[:, -1] = b[:, 0] * 2  # an input that adds nothing: index 0
    return a, b, c, d


def _controllable_integer_model(seed, n, m, p, structure="generic"):
    rng = np.random.default_rng(seed)
    for _ in range(100):
        a, b, c, d = _random_integer_model(rng, n, m, p, structure)
        if sum(scan_indices(a.tolist(), b.tolist())) == n:
            return a, b, c, d
    raise AssertionError("no controllable model drawn")


def _fractions(x):
    return [[Fraction(int(v)) for v in row] for row in np.asarray(x)]


def _markov_exact(a, b, c, count):
    A, B, C = (sp.Matrix(np.asarray(x, dtype=object).tolist()) for x in (a, b, c))
    out, power = [], B
    for _ in range(count):
        out.append(C * power)
        power = A * power
    return out


def test_hand_worked_example():
    """(hand-worked) A = [[-1,0,0],[1,-2,0],[0,0,-3]], b_1 = e_1, b_2 = e_3: the scan keeps
    b_1, b_2, A b_1 = (-1, 1, 0); A b_2 = -3 b_2 depends, and A^2 b_1 = (1, -3, 0) =
    -2 b_1 - 3 A b_1: indices (2, 1), blocks [[0, 1], [-2, -3]] and [[-3]]."""
    a = [[-1, 0, 0], [1, -2, 0], [0, 0, -3]]
    b = [[1, 0], [0, 0], [0, 1]]
    c = [[1, 1, 0], [0, 0, 1]]
    d = [[0, 0], [0, 0]]
    for exact in (True, False):
        r = sw.multivariable_canonical_form(a, b, c, d, exact=exact)
        assert r.info["indices"] == (2, 1)
        np.testing.assert_array_equal(np.array(r.a, dtype=float), [[0, 1, 0], [-2, -3, 0], [0, 0, -3]])
        np.testing.assert_array_equal(np.array(r.b, dtype=float), [[0, 0], [1, 0], [0, 1]])
        # (hand-worked) T rows q_1 = (0, 1, 0), q_1 A = (1, -2, 0), q_2 = (0, 0, 1): C T^-1
        np.testing.assert_array_equal(np.array(r.c, dtype=float), [[3, 1, 0], [0, 0, 1]])


def test_order_of_inputs_is_kept():
    """(hand-worked) the second input drives the chain: b_1 = e_3 (decoupled), b_2 = e_1 with
    A e_1 = e_2: indices (1, 2) in input order, not sorted."""
    a = [[0, 0, 0], [1, 0, 0], [0, 0, -1]]
    b = [[0, 1], [0, 0], [1, 0]]
    c = [[1, 0, 1]]
    r = sw.multivariable_canonical_form(a, b, c, [[0, 0]], exact=True)
    assert r.info["indices"] == (1, 2)
    _check_controller_pattern(r.a, r.b, (1, 2))


@pytest.mark.parametrize("seed", range(10))
@pytest.mark.parametrize("structure", ["generic", "repeated_input"])
def test_indices_and_pattern_exact(seed, structure):
    rng = np.random.default_rng(100 + seed)
    n, m, p = int(rng.integers(2, 7)), int(rng.integers(1, 4)), int(rng.integers(1, 3))
    a, b, c, d = _controllable_integer_model(seed, n, m, p, structure)
    ref = scan_indices(a.tolist(), b.tolist())
    r = sw.multivariable_canonical_form(_fractions(a), _fractions(b), _fractions(c), _fractions(d), exact=True)
    assert r.info["indices"] == ref  # (sympy exact ranks)
    _check_controller_pattern(r.a, r.b, ref)
    # (identity) equal Markov parameters h_0 .. h_{2n-1} and D: the same transfer matrix
    assert _markov_exact(r.a, r.b, r.c, 2 * n) == _markov_exact(a, b, c, 2 * n)
    assert (np.asarray(r.d) == d).all()


@pytest.mark.parametrize("seed", range(10))
@pytest.mark.parametrize("structure", ["generic", "repeated_input"])
def test_indices_and_transfer_matrix_float(seed, structure):
    rng = np.random.default_rng(200 + seed)
    n, m, p = int(rng.integers(2, 7)), int(rng.integers(1, 4)), int(rng.integers(1, 3))
    a, b, c, d = _controllable_integer_model(seed, n, m, p, structure)
    ref = scan_indices(a.tolist(), b.tolist())
    # Dense float coordinates (orthogonal Q): the decisions are made on the staircase.
    q, _ = np.linalg.qr(rng.standard_normal((n, n)))
    af, bf, cf = q.T @ a @ q, q.T @ b, c @ q
    r = sw.multivariable_canonical_form(af, bf, cf, d.astype(float))
    assert r.info["indices"] == ref  # (sympy exact ranks)
    _check_controller_pattern(r.a, r.b, ref)
    assert r.info["residual"] < 1e-12 and r.info["markov_error"] < 1e-10
    for j in range(m):  # (scipy.signal.ss2tf) the transfer matrix, one input at a time
        num_ref, den_ref = scipy.signal.ss2tf(af, bf, cf, d.astype(float), input=j)
        num, den = scipy.signal.ss2tf(r.a, r.b, r.c, r.d, input=j)
        scale = max(1.0, np.abs(num_ref).max())
        np.testing.assert_allclose(den, den_ref, rtol=1e-9, atol=1e-9 * np.abs(den_ref).max())
        np.testing.assert_allclose(num, num_ref, rtol=1e-8, atol=1e-8 * scale)


@pytest.mark.parametrize("seed", range(6))
def test_observer_form_is_the_dual(seed):
    rng = np.random.default_rng(300 + seed)
    n, m, p = int(rng.integers(2, 6)), int(rng.integers(1, 3)), int(rng.integers(1, 4))
    at, ct, bt, dt = _controllable_integer_model(seed, n, p, m)  # (A^T, C^T) controllable
    a, b, c, d = at.T, bt.T, ct.T, dt.T
    ref = scan_indices(a.T.tolist(), c.T.tolist())  # (sympy) observability indices
    exact_model = (_fractions(x) for x in (a, b, c, d))
    r = sw.multivariable_canonical_form(*exact_model, "observer", exact=True)
    assert r.info["indices"] == ref
    _check_controller_pattern(np.asarray(r.a).T, np.asarray(r.c).T, ref)
    assert _markov_exact(r.a, r.b, r.c, 2 * n) == _markov_exact(a, b, c, 2 * n)  # (identity)
    rf = sw.multivariable_canonical_form(a.astype(float), b.astype(float), c.astype(float), d.astype(float), "observer")
    assert rf.info["indices"] == ref
    np.testing.assert_allclose(rf.a, np.array(r.a, dtype=float), atol=1e-9 * max(1, np.abs(rf.a).max()))


@pytest.mark.parametrize("seed", range(6))
def test_indices_invariant_under_state_coordinates(seed):
    """(identity) z = S x changes neither the indices nor the form (it is canonical)."""
    rng = np.random.default_rng(400 + seed)
    n, m, p = 5, 2, 2
    a, b, c, d = _controllable_integer_model(seed, n, m, p)
    s = np.eye(n) + np.triu(rng.integers(-2, 3, size=(n, n)), 1)  # unimodular: exact inverse
    s_inv = np.array(sp.Matrix(s.tolist()).inv().tolist(), dtype=object)
    a2, b2, c2 = s @ a @ s_inv, s @ b, c @ s_inv
    r1 = sw.multivariable_canonical_form(_fractions(a), _fractions(b), _fractions(c), _fractions(d), exact=True)
    r2 = sw.multivariable_canonical_form(_fractions(a2), _fractions(b2), _fractions(c2), _fractions(d), exact=True)
    assert r1.info["indices"] == r2.info["indices"]
    for x, y in zip(r1, r2):
        assert (np.asarray(x) == np.asarray(y)).all()
    f2 = sw.multivariable_canonical_form(*(np.asarray(x, dtype=float) for x in (a2, b2, c2, d)))
    assert f2.info["indices"] == r1.info["indices"]
    np.testing.assert_allclose(f2.a, np.array(r1.a, dtype=float), atol=1e-8 * max(1, np.abs(f2.a).max()))


def test_transform_reported():
    """(identity) info["transform"] T satisfies T A = A_c T and T B = B_c."""
    rng = np.random.default_rng(7)
    a, b, c = rng.standard_normal((6, 6)), rng.standard_normal((6, 2)), rng.standard_normal((3, 6))
    r = sw.multivariable_canonical_form(a, b, c, np.zeros((3, 2)))
    t = r.info["transform"]
    np.testing.assert_allclose(t @ a, r.a @ t, atol=1e-10 * np.abs(t).max() * np.abs(a).max())
    np.testing.assert_allclose(t @ b, r.b, atol=1e-10 * np.abs(t).max() * np.abs(b).max())
    assert r.info["condition"] == pytest.approx(np.linalg.cond(t), rel=1e-6)  # (numpy.linalg.cond)


def test_refuses_uncontrollable_and_unobservable():
    a = [[-1.0, 0.0], [0.0, -2.0]]
    with pytest.raises(sw.ModelError, match="not controllable"):
        sw.multivariable_canonical_form(a, [[1.0], [0.0]], [[1.0, 1.0]], [[0.0]])
    with pytest.raises(sw.ModelError, match="not observable"):
        sw.multivariable_canonical_form(a, [[1.0], [1.0]], [[1.0, 0.0]], [[0.0]], "observer")
    with pytest.raises(sw.ModelError, match="not controllable"):
        sw.multivariable_canonical_form([[-1, 0], [0, -1]], [[1], [1]], [[1, 0]], [[0]], exact=True)


def test_refuses_ill_conditioned_transformation():
    """Poles over six decades, one input: T is a scaled inverse Vandermonde matrix whose
    condition number (numpy, on the exact form's T) is far above 1/sqrt(eps)."""
    poles = -(10.0 ** np.arange(0, 7))
    a, b = np.diag(poles), np.ones((7, 1))
    with pytest.raises(sw.ModelError, match="condition number"):
        sw.multivariable_canonical_form(a, b, np.ones((1, 7)), [[0.0]])
    # The exact form exists and reports its condition number instead.
    r = sw.multivariable_canonical_form(
        [[int(p) if i == j else 0 for j in range(7)] for i, p in enumerate(poles)],
        [[1]] * 7,
        [[1] * 7],
        [[0]],
        exact=True,
    )
    assert r.info["condition"] > 1 / np.sqrt(np.finfo(float).eps)


def test_bad_arguments():
    a, b, c, d = [[0.0]], [[1.0]], [[1.0]], [[0.0]]
    with pytest.raises(sw.ModelError, match="form"):
        sw.multivariable_canonical_form(a, b, c, d, "modal")
    with pytest.raises(sw.ModelError, match="tol"):
        sw.multivariable_canonical_form([[0]], [[1]], [[1]], [[0]], exact=True, tol=1e-9)
    with pytest.raises(sw.ModelError, match="float"):
        sw.multivariable_canonical_form([[0.5]], [[1]], [[1]], [[0]], exact=True)
    with pytest.raises(sw.ModelError, match="b"):
        sw.multivariable_canonical_form([[0.0, 1.0], [0.0, 0.0]], [[1.0]], [[1.0, 0.0]], [[0.0]])
    with pytest.raises(sw.ModelError):
        sw.multivariable_canonical_form([[np.nan]], b, c, d)


def test_zero_states_and_single_input_matches_companion():
    r = sw.multivariable_canonical_form(np.zeros((0, 0)), np.zeros((0, 2)), np.zeros((1, 0)), [[1.0, 2.0]])
    assert r.n_states == 0 and r.info["indices"] == (0, 0)
    # (identity) one input: the controller form is the phase-variable companion form of the
    # transfer function, here (s + 3) / (s^2 + 3 s + 2).
    a = [[-1, 0], [1, -2]]
    r = sw.multivariable_canonical_form(a, [[1], [0]], [[1, 1]], [[0]], exact=True)
    ref = sw.realize([1, 3], [1, 3, 2], "controllable_canonical", exact=True)
    for x, y in zip(r, ref):
        assert (np.asarray(x) == np.asarray(y)).all()


def test_exact_budget_refused_before_the_work():
    """An order-8 model whose entries have 64 distinct 100-bit denominators: the estimate
    (numbers of about n^2 * 6500 bits) is far beyond the 30 s budget, refused at once."""
    rng = np.random.default_rng(5)
    a = [[Fraction(int(rng.integers(1, 2**62)), 2**100 + 2 * (8 * i + j) + 1) for j in range(8)] for i in range(8)]
    b = [[1, 0]] + [[0, 1]] + [[0, 0]] * 6
    with pytest.raises(sw.ModelError, match="budget"):
        sw.multivariable_canonical_form(a, b, [[1] * 8], [[0, 0]], exact=True)


def test_nearly_parallel_inputs_are_refused_not_misread():
    """b_2 = b_1 + 1e-2 e_3 on a companion A: exactly, the indices are (3, 1) (sympy), but
    the structure is not robust (models within rounding of it have (2, 2)); the float
    staircase reads the generic (2, 2) and the transformation for it is singular to
    working precision, so the float form is refused on its condition number rather than
    returned with indices the data do not have. The exact form gives (3, 1)."""
    a = [[0, 1, 0, 0], [0, 0, 1, 0], [0, 0, 0, 1], [-1, -2, -3, -4]]
    b_exact = [[0, 0], [0, 0], [1, Fraction(101, 100)], [1, 1]]
    assert scan_indices(a, b_exact) == (3, 1)
    r = sw.multivariable_canonical_form(a, b_exact, [[1, 0, 0, 0]], [[0, 0]], exact=True)
    assert r.info["indices"] == (3, 1)
    with pytest.raises(sw.ModelError, match="condition number"):
        sw.multivariable_canonical_form(
            np.array(a, dtype=float), np.array(b_exact, dtype=float), [[1.0, 0, 0, 0]], [[0.0, 0.0]]
        )


def test_observer_transform_reported():
    """(identity) the observer form's S = info["transform"]: S A S^-1 = A_o, C S^-1 = C_o."""
    rng = np.random.default_rng(11)
    a, b, c = rng.standard_normal((5, 5)), rng.standard_normal((5, 1)), rng.standard_normal((2, 5))
    r = sw.multivariable_canonical_form(a, b, c, np.zeros((2, 1)), "observer")
    s = r.info["transform"]
    np.testing.assert_allclose(s @ a, r.a @ s, atol=1e-10 * np.abs(s).max() * np.abs(a).max())
    np.testing.assert_allclose(c, r.c @ s, atol=1e-10 * np.abs(s).max() * np.abs(c).max())
    assert sum(r.info["indices"]) == 5

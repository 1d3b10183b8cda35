"""Shared reference helpers for the statewright test suite.

Everything here is computed independently of statewright: the canonical-form patterns
are rebuilt from the API contract in exact rational arithmetic, and the exact
characteristic polynomials / adjugates of float matrices are computed in integer
arithmetic on the exactly scaled float data (every float64 is a dyadic rational).
"""

import re
from fractions import Fraction

import numpy as np

EPS = float(np.finfo(float).eps)

COMPANION_FORMS = (
    "controllable_canonical",
    "observable_canonical",
    "controller",
    "observer",
    "controllability",
    "observability",
)
ALL_FORMS = COMPANION_FORMS + ("modal",)


# --------------------------------------------------------------------------------------
# exact numbers
# --------------------------------------------------------------------------------------


def frac(x):
    """Exact Fraction of an int, Fraction, float (exact binary value) or decimal string."""
    if isinstance(x, Fraction):
        return x
    if isinstance(x, str):
        return Fraction(x)
    if isinstance(x, (int, np.integer)):
        return Fraction(int(x))
    return Fraction(float(x))


def frac_array(rows):
    """Object array of Fractions of the same shape as `rows`."""
    arr = np.asarray(rows, dtype=object)
    out = np.empty(arr.shape, dtype=object)
    for idx in np.ndindex(arr.shape):
        out[idx] = frac(arr[idx])
    return out


def to_float(arr):
    return np.array(np.asarray(arr, dtype=object).tolist(), dtype=float).reshape(np.shape(arr))


# --------------------------------------------------------------------------------------
# expected canonical forms (built from the API.md table, exact)
# --------------------------------------------------------------------------------------


def normalized(num, den):
    """(b, d): num padded to den's grid and both divided by den's leading coefficient.

    Leading zeros are stripped first. Fractions, lengths n+1 each, d monic.
    """
    num = [frac(x) for x in num]
    den = [frac(x) for x in den]
    while den and den[0] == 0:
        den.pop(0)
    while num and num[0] == 0:
        num.pop(0)
    n = len(den) - 1
    lead = den[0]
    d = [x / lead for x in den]
    b = [Fraction(0)] * (n + 1 - len(num)) + [x / lead for x in num]
    return b, d


def split_coefficients(num, den):
    """(n, a, bn, c, h): a[i] = a_i, c[i] = c_i = b_i - a_i b_n, h[k-1] = h_k (Markov)."""
    b, d = normalized(num, den)
    n = len(d) - 1
    a = [d[n - i] for i in range(n)]
    bb = [b[n - i] for i in range(n + 1)]
    bn = bb[n]
    c = [bb[i] - a[i] * bn for i in range(n)]
    # c(s) = den(s) * sum_k h_k s^-k  =>  h_k = c_{n-k} - sum_{j=1}^{k-1} a_{n-j} h_{k-j}
    h = []
    for k in range(1, n + 1):
        hk = c[n - k]
        for j in range(1, k):
            hk -= a[n - j] * h[k - j - 1]
        h.append(hk)
    return n, a, bn, c, h


def _zeros(r, c):
    z = np.empty((r, c), dtype=object)
    z[...] = Fraction(0)
    return z


def expected_form(num, den, form):
    """(A, B, C, D) object arrays of Fractions for a companion form, per the API table."""
    n, a, bn, c, h = split_coefficients(num, den)
    A = _zeros(n, n)
    B = _zeros(n, 1)
    C = _zeros(1, n)
    D = _zeros(1, 1)
    D[0, 0] = bn
    if n == 0:
        return A, B, C, D
    base = form
    dual = False
    if form == "observable_canonical":
        base, dual = "controllable_canonical", True
    elif form == "observer":
        base, dual = "controller", True
    elif form == "observability":
        base, dual = "controllability", True
    if base == "controllable_canonical":
        for i in range(n - 1):
            A[i, i + 1] = Fraction(1)
        for j in range(n):
            A[n - 1, j] = -a[j]
        B[n - 1, 0] = Fraction(1)
        for j in range(n):
            C[0, j] = c[j]
    elif base == "controller":
        for j in range(n):
            A[0, j] = -a[n - 1 - j]
        for i in range(n - 1):
            A[i + 1, i] = Fraction(1)
        B[0, 0] = Fraction(1)
        for j in range(n):
            C[0, j] = c[n - 1 - j]
    elif base == "controllability":
        for i in range(n - 1):
            A[i + 1, i] = Fraction(1)
        for i in range(n):
            A[i, n - 1] = -a[i]
        B[0, 0] = Fraction(1)
        for j in range(n):
            C[0, j] = h[j]
    else:
        raise ValueError(form)
    if dual:
        A, B, C = A.T.copy(), C.T.copy(), B.T.copy()
    return A, B, C, D


# --------------------------------------------------------------------------------------
# frequency responses
# --------------------------------------------------------------------------------------


def transfer_function_value(num, den, s):
    """num(s)/den(s) in complex floating point (highest power first)."""
    num = np.asarray([complex(float(x)) for x in num])
    den = np.asarray([complex(float(x)) for x in den])
    return np.polyval(num, s) / np.polyval(den, s)


def state_space_value(A, B, C, D, s):
    """C (sI - A)^-1 B + D by a dense solve (numpy)."""
    A = np.asarray(A, dtype=float)
    n = A.shape[0]
    if n == 0:
        return np.asarray(D, dtype=complex)
    return np.asarray(C, dtype=float) @ np.linalg.solve(s * np.eye(n) - A, np.asarray(B, dtype=float)) + np.asarray(
        D, dtype=float
    )


# --------------------------------------------------------------------------------------
# exact Faddeev-LeVerrier on float data (integer arithmetic on the scaled dyadic data)
# --------------------------------------------------------------------------------------


def _dyadic_scale(values):
    """Smallest power of two 2**e with every value * 2**e an integer."""
    den = 1
    for v in values:
        q = Fraction(float(v)).denominator
        if q > den:
            den = q  # all denominators are powers of two, so the max is the lcm
    return den


def exact_faddeev_leverrier(A):
    """Exact (coeffs, adjugates) of a float matrix: coeffs are Fractions [1, c_1, ..., c_n],
    adjugates N_0..N_{n-1} as object arrays of Fractions, adj(sI-A) = sum N_k s^(n-1-k).

    Integer recursion on M = 2**e A (exact divisions by k are verified)."""
    A = np.asarray(A, dtype=float)
    n = A.shape[0]
    scale = _dyadic_scale(A.ravel())
    M = np.empty((n, n), dtype=object)
    for i in range(n):
        for j in range(n):
            M[i, j] = int(Fraction(float(A[i, j])) * scale)
    I = np.empty((n, n), dtype=object)
    I[...] = 0
    for i in range(n):
        I[i, i] = 1
    N = I.copy()
    coeffs_int = [1]
    adj_int = [N]
    for k in range(1, n + 1):
        AN = M.dot(N)
        tr = sum(AN[i, i] for i in range(n))
        q, r = divmod(-tr, k)
        assert r == 0, "integer Faddeev-LeVerrier: inexact division"
        coeffs_int.append(q)
        if k < n:
            N = AN + q * I
            adj_int.append(N)
    coeffs = [Fraction(ck, scale**k) for k, ck in enumerate(coeffs_int)]
    adjs = []
    for k, Nk in enumerate(adj_int):
        F = np.empty((n, n), dtype=object)
        for i in range(n):
            for j in range(n):
                F[i, j] = Fraction(Nk[i, j], scale**k)
        adjs.append(F)
    return coeffs, adjs


def exact_scalar_transfer_function(A, B, C, D):
    """Exact (num, den) of a float SISO model: lists of n+1 Fractions."""
    A = np.asarray(A, dtype=float)
    n = A.shape[0]
    coeffs, adjs = exact_faddeev_leverrier(A)
    b = [Fraction(float(x)) for x in np.asarray(B, dtype=float).ravel()]
    c = [Fraction(float(x)) for x in np.asarray(C, dtype=float).ravel()]
    d = Fraction(float(np.asarray(D, dtype=float).ravel()[0]))
    num = [d * coeffs[0]]
    for k in range(1, n + 1):
        Nk = adjs[k - 1]
        v = sum(c[i] * sum(Nk[i, j] * b[j] for j in range(n)) for i in range(n))
        num.append(v + d * coeffs[k])
    return num, coeffs


def coef_rel_error(x, ref):
    """max_k |x_k - ref_k| / |ref_k| over ref_k != 0 (exact subtraction, float result)."""
    x = np.asarray(x, dtype=float).ravel()
    assert len(x) == len(ref)
    worst = Fraction(0)
    for xk, rk in zip(x, ref):
        if rk == 0:
            continue
        if not np.isfinite(xk):
            return float("inf")
        e = abs(Fraction(float(xk)) - rk) / abs(rk)
        if e > worst:
            worst = e
    return float(worst)


# --------------------------------------------------------------------------------------
# messages
# --------------------------------------------------------------------------------------


def names_argument(message, name):
    """Does the error message name the argument `name`?

    Multi-letter names must appear as a word. Single-letter names (a, b, c, d) must appear
    in a form that cannot be the English article: followed by ':' or ',' or ')', quoted,
    or followed by a verb such as 'must', 'has', 'is', 'contains', 'should'."""
    if len(name) > 1:
        return re.search(rf"(?<![A-Za-z_]){re.escape(name)}(?![A-Za-z_])", message) is not None
    pats = [
        rf"(?<![A-Za-z_]){name}\s*[:,)\]]",
        rf"['\"`]{name}['\"`]",
        rf"(?<![A-Za-z_]){name}\s+(must|has|is|contains|should|needs|holds)\b",
        rf"(argument|matrix|parameter)\s+{name}(?![A-Za-z_])",
    ]
    return any(re.search(p, message) for p in pats)

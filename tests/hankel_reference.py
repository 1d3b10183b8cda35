"""High-precision references and hard test models for Hankel singular values and balanced
truncation (shared by tests/identify/ and scripts/hankel_survey.py).

References: the Lyapunov / Stein equations solved in mpmath at 80 digits over mpmath's
complex Schur form (Bartels & Stewart 1972 on a triangular matrix), the Hankel singular
values as the square roots of the eigenvalues of ``Lc^T Wo Lc`` (``Wc = Lc Lc^T``, mpmath
Cholesky and symmetric eigenvalues), and the H-infinity norm from a dense frequency grid
evaluated in mpmath.
"""

from __future__ import annotations

import mpmath
import numpy as np

DIGITS = 80


def _mp(x):
    return mpmath.matrix([[mpmath.mpf(float(v)) for v in row] for row in np.atleast_2d(x)])


def _solve_triangular_lyapunov(t, f, discrete):
    """T Y + Y T^H + F = 0 (or T Y T^H - Y + F = 0), T upper triangular (mpmath, complex)."""
    n = t.rows
    y = mpmath.matrix(n, n)
    for j in range(n - 1, -1, -1):
        # column j: the terms with y_k, k > j, are known
        acc = [mpmath.mpc(0)] * n
        for k in range(j + 1, n):
            c = mpmath.conj(t[j, k])
            if c != 0:
                for i in range(n):
                    acc[i] += y[i, k] * c
        if discrete:
            # (conj(t_jj) T - I) y_j = -F_j - T acc
            rhs = [-f[i, j] - sum(t[i, l] * acc[l] for l in range(i, n)) for i in range(n)]
            cj = mpmath.conj(t[j, j])
            for i in range(n - 1, -1, -1):
                s = rhs[i] - sum(cj * t[i, l] * y[l, j] for l in range(i + 1, n))
                y[i, j] = s / (cj * t[i, i] - 1)
        else:
            # (T + conj(t_jj) I) y_j = -F_j - acc
            rhs = [-f[i, j] - acc[i] for i in range(n)]
            cj = mpmath.conj(t[j, j])
            for i in range(n - 1, -1, -1):
                s = rhs[i] - sum(t[i, l] * y[l, j] for l in range(i + 1, n))
                y[i, j] = s / (t[i, i] + cj)
    return y


def mp_gramians(a, b, c, discrete=False):
    """(Wc, Wo) as mpmath matrices at DIGITS digits, for the float64 data given."""
    with mpmath.workdps(DIGITS):
        am, bm, cm = _mp(a), _mp(b), _mp(c)
        out = []
        for mat, rhs in ((am, bm * bm.T), (am.T, cm.T * cm)):
            q, t = mpmath.schur(mat)
            f = q.H * rhs * q
            y = _solve_triangular_lyapunov(t, f, discrete)
            w = q * y * q.H
            n = w.rows
            out.append(mpmath.matrix([[mpmath.re(w[i, j] + w[j, i]) / 2 for j in range(n)] for i in range(n)]))
        return out[0], out[1]


def mp_hankel_singular_values(a, b, c, discrete=False):
    """Hankel singular values (descending) of the float64 model, to about DIGITS digits."""
    with mpmath.workdps(DIGITS):
        wc, wo = mp_gramians(a, b, c, discrete)
        lc = mpmath.cholesky(wc)
        m = lc.T * wo * lc
        n = m.rows
        m = mpmath.matrix([[(m[i, j] + m[j, i]) / 2 for j in range(n)] for i in range(n)])
        ev = mpmath.eigsy(m, eigvals_only=True)
        vals = sorted((mpmath.sqrt(max(v, 0)) for v in ev), reverse=True)
        return vals


def mp_condition(w):
    """2-norm condition number of a symmetric positive definite mpmath matrix."""
    with mpmath.workdps(DIGITS):
        ev = mpmath.eigsy(w, eigvals_only=True)
        lo, hi = min(ev), max(ev)
        return float(hi / lo) if lo > 0 else float("inf")


def mp_peak_gain(a, b, c, freqs, discrete=False):
    """max over freqs of the largest singular value of C (sI - A)^-1 B in mpmath (30 digits)."""
    best = 0.0
    with mpmath.workdps(30):
        am, bm, cm = _mp(a), _mp(b), _mp(c)
        n = am.rows
        for w in freqs:
            s = mpmath.exp(1j * mpmath.mpf(w)) if discrete else 1j * mpmath.mpf(w)
            m = s * mpmath.eye(n) - am
            cols = []
            for j in range(bm.cols):
                x = mpmath.lu_solve(m, bm.column(j))
                cols.append([complex(mpmath.fsum(cm[i, k] * x[k] for k in range(n))) for i in range(cm.rows)])
            gn = np.array(cols).T
            best = max(best, float(np.linalg.svd(gn, compute_uv=False)[0]))
    return best


def mp_error_gain(full, reduced, freqs, discrete=False):
    """Largest singular value of G(s) - G_r(s) over freqs, both responses and their difference
    formed in mpmath (30 digits); ``full`` and ``reduced`` are (a, b, c, d) tuples.

    For stiff models float64 evaluates G(jw) near a slow pole with an absolute error of
    about eps cond(sI - A) |G|, which can exceed the truncation error's distance from its
    bound; this is the exact reference at the points where that matters."""
    worst = 0.0
    with mpmath.workdps(30):
        systems = [tuple(_mp(x) for x in model) for model in (full, reduced)]
        for w in freqs:
            s = mpmath.exp(1j * mpmath.mpf(w)) if discrete else 1j * mpmath.mpf(w)
            diff = mpmath.matrix(systems[0][2].rows, systems[0][1].cols)
            for sign, (am, bm, cm, dm) in zip((1, -1), systems):
                m = s * mpmath.eye(am.rows) - am
                for j in range(bm.cols):
                    x = mpmath.lu_solve(m, bm.column(j))
                    for i in range(cm.rows):
                        g = mpmath.fsum(cm[i, k] * x[k] for k in range(am.rows)) + dm[i, j]
                        diff[i, j] += sign * g
            e = np.array([[complex(diff[i, j]) for j in range(diff.cols)] for i in range(diff.rows)])
            worst = max(worst, float(np.linalg.svd(e, compute_uv=False)[0]))
    return worst


def frequency_grid(a, discrete=False, per_decade=200):
    """A dense grid: log-spaced over the poles' range (x100 either side) plus each pole's
    imaginary part and magnitude, where a resonance peaks (common practice)."""
    ev = np.linalg.eigvals(a)
    if discrete:
        ev = np.log(ev.astype(complex))
    mags = np.abs(ev)
    mags = mags[mags > 0]
    lo, hi = np.log10(mags.min() / 100), np.log10(mags.max() * 100)
    pts = np.logspace(lo, hi, int((hi - lo) * per_decade) + 2)
    pts = np.concatenate(([0.0], pts, np.abs(ev.imag), mags))
    if discrete:
        pts = np.concatenate((pts[pts <= np.pi], [np.pi]))
    return np.unique(pts)


def response(a, b, c, d, freqs, discrete=False):
    """G at the frequencies (float64, numpy), shape (len(freqs), p, m)."""
    pts = np.exp(1j * freqs) if discrete else 1j * freqs
    n = a.shape[0]
    return np.array([c @ np.linalg.solve(s * np.eye(n) - a, b) + d for s in pts])


def peak(values):
    return max(np.linalg.svd(g, compute_uv=False)[0] for g in values)


# ---- hard models (built here; each is a family named in the README survey) ----------------


def coupled_cascade(n, coupling=10.0, discrete=False):
    """n identical first-order stages in series, each driving the next with gain `coupling`:
    A = pole * I + coupling * (superdiagonal), input into the last stage, output from the
    first. A is one Jordan block; the Gramians' condition grows like coupling^(2n)."""
    pole = 0.5 if discrete else -1.0
    a = pole * np.eye(n) + coupling * np.eye(n, k=1)
    b = np.zeros((n, 1))
    b[-1, 0] = 1.0
    c = np.zeros((1, n))
    c[0, 0] = 1.0
    return a, b, c, np.zeros((1, 1))


def oscillator_cascade(stages, damping=0.05, coupling=5.0, discrete=False):
    """Identical lightly damped oscillators (2 states each) in series with strong coupling."""
    w = 1.0
    blk = np.array([[-damping * w, w], [-w, -damping * w]])
    if discrete:
        blk = 0.9 * np.array([[np.cos(0.3), np.sin(0.3)], [-np.sin(0.3), np.cos(0.3)]])
    n = 2 * stages
    a = np.zeros((n, n))
    for s in range(stages):
        a[2 * s : 2 * s + 2, 2 * s : 2 * s + 2] = blk
        if s + 1 < stages:
            a[2 * s, 2 * s + 2] = coupling
    b = np.zeros((n, 1))
    b[-1, 0] = 1.0
    c = np.zeros((1, n))
    c[0, 0] = 1.0
    return a, b, c, np.zeros((1, 1))


def stiff_chain(n, decades=8, discrete=False):
    """A chain of first-order modes with time constants spread over `decades` decades,
    each coupled to its neighbours (tridiagonal), one input and one output at the ends.
    Discrete time: the bilinear (Cayley) image with step 1 of the same chain, whose
    Gramians equal the continuous ones (identity), so it is as ill-conditioned."""
    poles = -np.logspace(-decades / 2, decades / 2, n)
    coupling = 0.5 * np.sqrt(np.abs(poles[:-1] * poles[1:]))
    a = np.diag(poles) + np.diag(coupling, 1)
    b = np.ones((n, 1))
    c = np.ones((1, n))
    c[0, ::2] = -1.0
    if discrete:
        inv = np.linalg.inv(np.eye(n) - a / 2)
        a, b, c = (np.eye(n) + a / 2) @ inv, inv @ b, c @ inv
    return a, b, c, np.zeros((1, 1))


def lightly_damped(modes, damping=1e-4, discrete=False, seed=0):
    """Modes with damping ratio `damping` at frequencies 1 .. 10, real couplings, two inputs
    and two outputs (a flexible structure)."""
    rng = np.random.default_rng(seed)
    n = 2 * modes
    a = np.zeros((n, n))
    for k, w in enumerate(np.linspace(1.0, 10.0, modes)):
        if discrete:
            r, th = 1.0 - damping * w * 0.1, w * 0.25
            a[2 * k : 2 * k + 2, 2 * k : 2 * k + 2] = r * np.array(
                [[np.cos(th), np.sin(th)], [-np.sin(th), np.cos(th)]]
            )
        else:
            a[2 * k : 2 * k + 2, 2 * k : 2 * k + 2] = [[-damping * w, w], [-w, -damping * w]]
    q = np.linalg.qr(rng.standard_normal((n, n)))[0]
    a = q @ a @ q.T
    return a, rng.standard_normal((n, 2)), rng.standard_normal((2, n)), np.zeros((2, 2))


def power_of_two_similarity(a, b, c, exponents):
    """(D^-1 A D, D^-1 B, C D) with D = diag(2^e): exact in floating point."""
    dd = np.ldexp(1.0, np.asarray(exponents))
    return a * dd[None, :] / dd[:, None], b / dd[:, None], c * dd[None, :]

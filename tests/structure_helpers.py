"""Reference constructions for the structure tests (staircase, Kalman decomposition,
minimal realization, similarity).

Everything here is built independently of statewright with numpy: systems are planted in
a known decomposed form and hidden behind a change of coordinates, so the sizes and
subspaces to be recovered are known by construction.
"""

import numpy as np

from swtest_helpers import EPS

# --------------------------------------------------------------------------------------
# random matrices with controlled properties
# --------------------------------------------------------------------------------------


def orthogonal(n, rng):
    """A random orthogonal matrix (QR of a Gaussian matrix, signs fixed: Haar distributed)."""
    if n == 0:
        return np.zeros((0, 0))
    q, r = np.linalg.qr(rng.standard_normal((n, n)))
    return q * np.sign(np.diag(r))


def with_singular_values(rows, cols, sigma, rng):
    """U diag(sigma) V^T of shape (rows, cols), len(sigma) == min(rows, cols)."""
    k = min(rows, cols)
    assert len(sigma) == k
    out = np.zeros((rows, cols))
    if k:
        out[:k, :k] = np.diag(sigma)
    return orthogonal(rows, rng) @ out @ orthogonal(cols, rng).T


def full_rank_block(rows, cols, rng, low=0.5, high=2.0):
    """A (rows, cols) matrix of full rank min(rows, cols), singular values in [low, high]."""
    return with_singular_values(rows, cols, rng.uniform(low, high, min(rows, cols)), rng)


def well_conditioned(n, rng, cond=10.0):
    """A random nonsingular n x n matrix with 2-norm condition number at most `cond`."""
    if n == 0:
        return np.zeros((0, 0))
    s = np.exp(rng.uniform(0.0, np.log(cond), n))
    s[0], s[-1] = 1.0, cond if n > 1 else 1.0
    return with_singular_values(n, n, s, rng)


def random_blocks(nc, m, rng):
    """A random nonincreasing list of step sizes summing to nc, each at most m."""
    blocks = []
    left = nc
    cap = m
    while left > 0:
        k = int(rng.integers(1, min(cap, left) + 1))
        blocks.append(k)
        left -= k
        cap = k
    return blocks


# --------------------------------------------------------------------------------------
# planted systems
# --------------------------------------------------------------------------------------


def planted_staircase(blocks, n, m, p, rng, scale=1.0):
    """(A, B, C) in controllability staircase form with the given step sizes.

    A = [[A_c, A_12], [0, A_u]], B = [[B_c], [0]]; B_c = [B_1; 0] with B_1 (k_1 x m) of
    full row rank and each subdiagonal block A_{i+1,i} (k_{i+1} x k_i) of full row rank
    (singular values in [0.5, 2] * scale), so the controllable dimension is sum(blocks)
    and the staircase step sizes are exactly `blocks`.
    """
    nc = sum(blocks)
    assert nc <= n and all(x >= y for x, y in zip(blocks, blocks[1:]))
    assert not blocks or blocks[0] <= m
    A = scale * rng.standard_normal((n, n)) / np.sqrt(max(n, 1))
    A[nc:, :nc] = 0.0
    B = np.zeros((n, m))
    C = rng.standard_normal((p, n))
    starts = np.concatenate([[0], np.cumsum(blocks)]).astype(int)
    if blocks:
        B[: blocks[0]] = full_rank_block(blocks[0], m, rng)
    for i in range(len(blocks)):
        r0, r1 = starts[i], starts[i + 1]
        # nothing below the next step in the columns of step i
        A[starts[min(i + 2, len(blocks))] :, r0:r1] = 0.0
        if i + 1 < len(blocks):
            A[r1 : starts[i + 2], r0:r1] = scale * full_rank_block(blocks[i + 1], blocks[i], rng)
        else:
            A[r1:, r0:r1] = 0.0
    return A, B, C


def hide(A, B, C, S):
    """(S A S^-1, S B, C S^-1): the same system in the coordinates z = S x."""
    if A.shape[0] == 0:
        return A.copy(), B.copy(), C.copy()
    Sinv = np.linalg.inv(S)
    return S @ A @ Sinv, S @ B, C @ Sinv


KALMAN_PATTERN = np.array(
    [
        [1, 0, 1, 0],
        [1, 1, 1, 1],
        [0, 0, 1, 0],
        [0, 0, 1, 1],
    ],
    dtype=bool,
)


def part_slices(sizes):
    starts = np.concatenate([[0], np.cumsum(sizes)]).astype(int)
    return [slice(starts[i], starts[i + 1]) for i in range(4)]


def planted_kalman(sizes, m, p, rng, separated=True):
    """(A, B, C) in the four-part form with the given part sizes (co, c-uo, uc-o, uc-uo).

    Blocks are Gaussian in the pattern of the API, so (generically) the controllable
    subspace is parts 1+2, the unobservable subspace parts 2+4, and the sizes are exact.
    With ``separated`` the diagonal blocks are shifted apart so that the parts' spectra are
    separated; the couplings are not conditioned, so rank decisions on rotated copies need
    a tol well above rounding (the tests use 1e-6). Without it the draws are those of
    scripts/structure_survey.py's planted Kalman survey (the harder, unseparated case).
    """
    n = sum(sizes)
    sl = part_slices(sizes)
    A = np.zeros((n, n))
    for i in range(4):
        for j in range(4):
            if KALMAN_PATTERN[i, j]:
                A[sl[i], sl[j]] = rng.standard_normal((sizes[i], sizes[j])) / np.sqrt(max(n, 1))
    # spread the spectra of the parts apart so PBH margins are comfortable
    if separated:
        shifts = (-1.0, -2.5, -4.0, -5.5)
        for i in range(4):
            A[sl[i], sl[i]] += shifts[i] * np.eye(sizes[i])
    B = np.zeros((n, m))
    B[sl[0]] = rng.standard_normal((sizes[0], m))
    B[sl[1]] = rng.standard_normal((sizes[1], m))
    C = np.zeros((p, n))
    C[:, sl[0]] = rng.standard_normal((p, sizes[0]))
    C[:, sl[2]] = rng.standard_normal((p, sizes[2]))
    return A, B, C


def expected_kalman_subspaces(sizes, S):
    """Orthonormal bases of R, N and R∩N in the coordinates z = S x of a planted system."""
    sl = part_slices(sizes)
    n = sum(sizes)
    eye = np.eye(n)
    r = S @ np.hstack([eye[:, sl[0]], eye[:, sl[1]]])
    # N = ker(O); in z-coordinates N = S * span(parts 2, 4)
    nn = S @ np.hstack([eye[:, sl[1]], eye[:, sl[3]]])
    rn = S @ eye[:, sl[1]]
    return orth(r), orth(nn), orth(rn)


# --------------------------------------------------------------------------------------
# subspaces and responses
# --------------------------------------------------------------------------------------


def orth(X):
    """Orthonormal basis of the range of X (X of full column rank)."""
    if X.shape[1] == 0:
        return np.zeros((X.shape[0], 0))
    u, s, _ = np.linalg.svd(X, full_matrices=False)
    return u


def projector(X):
    U = orth(X)
    return U @ U.T


def subspace_distance(X, Y):
    """||P_X - P_Y||_2: the sine of the largest principal angle (1 when dimensions differ)."""
    if X.shape[1] != Y.shape[1]:
        return 1.0
    if X.shape[1] == 0:
        return 0.0
    return float(np.linalg.norm(projector(X) - projector(Y), 2))


def response(A, B, C, D, s):
    """C (sI - A)^-1 B + D (numpy dense solve)."""
    A = np.asarray(A, dtype=float)
    n = A.shape[0]
    D = np.asarray(D, dtype=float)
    if n == 0:
        return D.astype(complex)
    return np.asarray(C, float) @ np.linalg.solve(s * np.eye(n) - A, np.asarray(B, float)) + D


def response_bound(A, B, C, s, delta):
    """First-order bound on |ΔG(s)| for relative backward errors `delta` in A, B, C.

    ||C|| ||R|| ||B|| (2 + ||A|| ||R||) * delta, R = (sI - A)^-1 (2-norms)."""
    A = np.asarray(A, dtype=float)
    n = A.shape[0]
    if n == 0:
        return 0.0
    R = np.linalg.inv(s * np.eye(n) - A)
    nr = np.linalg.norm(R, 2)
    return (np.linalg.norm(C, 2) * nr * np.linalg.norm(B, 2) * (2 + np.linalg.norm(A, 2) * nr)) * delta


def sample_points(A):
    """Complex points away from the spectrum of A: a circle of radius 2||A||_F + 1 and a few
    points on and near the imaginary axis."""
    r = 2.0 * np.linalg.norm(A) + 1.0 if np.asarray(A).size else 1.0
    circle = r * np.exp(1j * np.linspace(0.1, 2 * np.pi, 7, endpoint=False))
    extra = np.array([0.37j, 1.3j, 4.1j, 0.2 + 0.9j, -0.05 + 2.7j])
    return np.concatenate([circle, extra])


def assert_same_response(model, ref, delta=None, points=None, factor=1e3):
    """Compare the responses of model=(A,B,C,D) and ref=(A,B,C,D) at `points`.

    The allowed error is `factor` times the first-order bound of ref at relative backward
    error `delta` (default n eps) plus a small absolute floor relative to ||D||."""
    Ar, Br, Cr, Dr = (np.asarray(x, dtype=float) for x in ref)
    n = max(Ar.shape[0], 1)
    delta = n * EPS if delta is None else delta
    pts = sample_points(Ar) if points is None else points
    worst = 0.0
    for s in pts:
        g_ref = response(*ref, s)
        g = response(*model, s)
        bound = factor * response_bound(Ar, Br, Cr, s, delta) + factor * EPS * np.linalg.norm(Dr)
        err = float(np.max(np.abs(g - g_ref))) if g.size else 0.0
        assert err <= bound, f"response differs at s={s}: {err:.3e} > bound {bound:.3e}"
        worst = max(worst, err / bound if bound else 0.0)
    return worst


def scan_indices(a, b):
    """(sympy reference) The controllability indices in input order: scan b_1..b_m,
    A b_1..A b_m, ... in this order, keeping a column when it raises the exact rank; mu_j
    counts the kept columns A^k b_j (in input order)."""
    import sympy as sp  # only the exact references need it

    A, B = sp.Matrix(a), sp.Matrix(b)
    n, m = B.shape
    chosen, mu, blocked = sp.zeros(n, 0), [0] * m, [False] * m
    power = B
    for _ in range(n):
        for j in range(m):
            if blocked[j] or chosen.shape[1] == n:
                continue
            trial = chosen.row_join(power[:, j])
            if trial.rank() > chosen.shape[1]:
                chosen, mu[j] = trial, mu[j] + 1
            else:
                blocked[j] = True  # (identity) once A^k b_j depends, so do all later powers
        power = A * power
    return tuple(mu)

"""Seeded surveys of the rank decisions (README figures).

1. Planted uncontrollable subspaces: A = [[A_c, A_12], [0, A_u]], B = [B_c; 0] with
   Gaussian blocks, hidden by a random orthogonal change of coordinates; the controllable
   dimension is known by construction (generic Gaussian (A_c, B_c) is controllable).
   Reported: how often the planted dimension is recovered by the staircase at its default
   tol, by the version-1 default (one tol n^2 eps max(||A||_F, ||B||_F) for every step,
   passed explicitly), and by minimal_realization (controllable dimension after its
   verified candidate search), and what the PBH distance sigma_min([A - lambda I, B]) of
   the computed eigenvalues says (numpy / SciPy reference: the count of eigenvalues whose
   PBH distance is below 1e-8 ||[A, B]||).
2. SISO controllable canonical realizations of integer transfer functions with exact
   pole-zero cancellations: minimal_realization's order against the degree of the
   denominator after sympy's cancel (exact reference).
3. Planted Kalman structure: the four parts (controllable and observable, controllable and
   unobservable, uncontrollable and observable, neither) of known sizes in the pattern of
   the Kalman form with Gaussian blocks, hidden by a random orthogonal change of
   coordinates; kalman_decomposition's sizes against the planted ones.
4. Transfer matrices with integer coefficients (p x m entries over small integer
   denominators, shared poles and cancellations): the order of
   realize_transfer_matrix(minimal=True) against the McMillan degree, the rank of the
   block Hankel matrix of the Markov parameters computed exactly in sympy.

Usage: python scripts/structure_survey.py [--quick]
       python scripts/structure_survey.py --kalman-only FIRST_SEED SEEDS
           (the planted Kalman survey alone, n = 20, 50, 100, 200, with seeds
           FIRST_SEED .. FIRST_SEED + SEEDS - 1: draws beyond the full run's)
"""

import sys
import time

import numpy as np
import sympy

import statewright as sw

EPS = np.finfo(float).eps


def orthogonal(n, rng):
    q, r = np.linalg.qr(rng.standard_normal((n, n)))
    return q * np.sign(np.diag(r))


def planted(n, m, nu, rng):
    nc = n - nu
    A = rng.standard_normal((n, n)) / np.sqrt(n)
    A[nc:, :nc] = 0.0
    B = np.zeros((n, m))
    B[:nc] = rng.standard_normal((nc, m))
    Q = orthogonal(n, rng)
    return Q @ A @ Q.T, Q @ B, nc


def pbh_count(A, B):
    """Number of eigenvalues of A (numpy) with sigma_min([A - lambda I, B]) below 1e-8 ||[A, B]||."""
    n = A.shape[0]
    scale = np.linalg.norm(np.hstack([A, B]))
    count = 0
    for lam in np.linalg.eigvals(A):
        s = np.linalg.svd(np.hstack([A - lam * np.eye(n), B]), compute_uv=False)[-1]
        count += s <= 1e-8 * scale
    return n - count


def survey_planted(sizes, seeds):
    print("Planted uncontrollable subspaces (random orthogonal coordinates)")
    print(f"{'n':>4} {'m':>2} {'uncontr.':>8} {'cases':>5} {'v1 default':>10} {'staircase':>9} {'minimal':>8} {'PBH ref':>8}")
    totals = np.zeros(4)
    count = 0
    for n in sizes:
        for m in (1, 2):
            for frac in (0.1, 0.3, 0.5):
                hits = np.zeros(4)
                for seed in range(seeds):
                    rng = np.random.default_rng(10_000 * n + 100 * m + int(frac * 10) + 7 * seed)
                    nu = max(1, int(round(frac * n)))
                    A, B, nc = planted(n, m, nu, rng)
                    C = rng.standard_normal((1, n))
                    v1 = n * n * EPS * max(np.linalg.norm(A), np.linalg.norm(B))
                    hits[0] += sw.controllability_staircase(A, B, tol=v1).rank == nc
                    hits[1] += sw.controllability_staircase(A, B).rank == nc
                    try:
                        mr = sw.minimal_realization(A, B, C, np.zeros((1, m)))
                        hits[2] += mr.info["controllable_dimension"] == nc
                    except sw.ModelError:
                        pass
                    hits[3] += pbh_count(A, B) == nc if n <= 100 else 0
                totals += hits
                count += seeds
                pbh = f"{100 * hits[3] / seeds:7.0f}%" if n <= 100 else "     n/a"
                print(
                    f"{n:>4} {m:>2} {frac:>7.0%} {seeds:>5} {100 * hits[0] / seeds:>9.0f}% "
                    f"{100 * hits[1] / seeds:>8.0f}% {100 * hits[2] / seeds:>7.0f}% {pbh}"
                )
    print(
        f"all: {count} cases; v1 default {100 * totals[0] / count:.1f}%, staircase {100 * totals[1] / count:.1f}%, "
        f"minimal {100 * totals[2] / count:.1f}%"
    )


def survey_siso(cases):
    print("SISO integer pole-zero cancellations (controllable canonical form; sympy cancel reference)")
    s = sympy.symbols("s")
    rng = np.random.default_rng(77)
    hits_new = hits_v1 = 0
    worst = 0.0
    for _ in range(cases):
        common = [int(x) for x in rng.integers(-6, 7, rng.integers(1, 3))]
        poles = [int(x) for x in rng.integers(-9, 10, rng.integers(1, 4))]
        zeros = [int(x) for x in rng.integers(-9, 10, rng.integers(0, len(poles)))]
        num = sympy.expand(sympy.prod([s - z for z in zeros + common]) * int(rng.integers(1, 5)))
        den = sympy.expand(sympy.prod([s - p for p in poles + common]))
        reduced = sympy.cancel(num / den)
        degree = sympy.degree(sympy.denom(reduced), s)
        nc = [float(x) for x in sympy.Poly(num, s).all_coeffs()]
        dc = [float(x) for x in sympy.Poly(den, s).all_coeffs()]
        r = sw.realize(nc, dc, "controllable_canonical")
        a, b, c, d = r
        m = sw.minimal_realization(a, b, c, d)
        hits_new += m.n_states == degree
        worst = max(worst, m.info["markov_residual"])
        n = a.shape[0]
        v1 = n * n * EPS * max(np.linalg.norm(a), np.linalg.norm(b), np.linalg.norm(c))
        try:
            hits_v1 += sw.minimal_realization(a, b, c, d, tol=v1).n_states == degree
        except sw.ModelError:
            pass
    print(
        f"{cases} cases: McMillan degree reached {100 * hits_new / cases:.1f}% (default), "
        f"{100 * hits_v1 / cases:.1f}% with the version-1 style tol n^2 eps max(||A||, ||B||, ||C||); "
        f"largest Markov residual {worst:.1e}"
    )


def planted_kalman(sizes, m, p, rng):
    """A model in the pattern of the Kalman form with Gaussian blocks, parts of `sizes`."""
    n = sum(sizes)
    edges = np.cumsum((0,) + tuple(sizes))
    part = [slice(edges[i], edges[i + 1]) for i in range(4)]
    A = np.zeros((n, n))
    pattern = [(0, 0), (0, 2), (1, 0), (1, 1), (1, 2), (1, 3), (2, 2), (3, 2), (3, 3)]
    for i, j in pattern:
        rows, cols = part[i].stop - part[i].start, part[j].stop - part[j].start
        A[part[i], part[j]] = rng.standard_normal((rows, cols)) / np.sqrt(n)
    B = np.zeros((n, m))
    B[part[0]] = rng.standard_normal((sizes[0], m))
    B[part[1]] = rng.standard_normal((sizes[1], m))
    C = np.zeros((p, n))
    C[:, part[0]] = rng.standard_normal((p, sizes[0]))
    C[:, part[2]] = rng.standard_normal((p, sizes[2]))
    q = orthogonal(n, rng)
    return q @ A @ q.T, q @ B, C @ q.T


def survey_kalman(sizes_list, seeds, first_seed=0):
    print("Planted Kalman structure (random orthogonal coordinates): sizes recovered")
    hits = count = refused = 0
    wrong = []
    for n in sizes_list:
        for seed in range(first_seed, first_seed + seeds):
            rng = np.random.default_rng(50_000 + 31 * n + seed)
            cut = np.sort(rng.choice(np.arange(1, n), 3, replace=False))
            sizes = tuple(int(x) for x in np.diff(np.concatenate(([0], cut, [n]))))
            m, p = int(rng.integers(1, 3)), int(rng.integers(1, 3))
            A, B, C = planted_kalman(sizes, m, p, rng)
            count += 1
            try:
                got = sw.kalman_decomposition(A, B, C, np.zeros((p, m))).sizes
            except sw.ModelError:
                refused += 1
                continue
            if tuple(got) == sizes:
                hits += 1
            else:
                wrong.append((n, seed, sizes, tuple(got)))
        print(f"  n = {n:>3}: {seeds} models")
    print(
        f"{count} cases: sizes right in {100 * hits / count:.1f}%, refused (ModelError) {refused}, "
        f"returned with other sizes {len(wrong)} {wrong}"
    )


def mcmillan_degree_exact(num, den, s):
    """Rank of the block Hankel matrix of the Markov parameters, exactly (sympy)."""
    p, m = len(num), len(num[0])
    g = sympy.Matrix(p, m, lambda i, j: num[i][j] / den[i][j])
    order = sum(sympy.degree(den[i][j], s) for i in range(p) for j in range(m))
    count = 2 * order + 1
    series = [[sympy.series(g[i, j].subs(s, 1 / s), s, 0, count + 1).removeO() for j in range(m)] for i in range(p)]
    markov = [
        sympy.Matrix(p, m, lambda i, j: series[i][j].coeff(s, k)) for k in range(1, count + 1)
    ]
    half = order + 1
    hankel = sympy.Matrix.vstack(*[sympy.Matrix.hstack(*markov[r : r + half]) for r in range(half)])
    return hankel.rank()


def survey_transfer_matrix(cases):
    print("Integer transfer matrices: realize_transfer_matrix(minimal=True) against the McMillan degree (sympy)")
    s = sympy.symbols("s")
    rng = np.random.default_rng(4242)
    hits = refused = 0
    for _ in range(cases):
        p, m = int(rng.integers(1, 3)), int(rng.integers(1, 3))
        pool = [int(x) for x in rng.choice(np.arange(-6, 0), 3, replace=False)]  # shared poles
        num, den = [], []
        for i in range(p):
            row_n, row_d = [], []
            for j in range(m):
                poles = [pool[k] for k in range(3) if rng.random() < 0.6] or [pool[0]]
                zeros = [int(x) for x in rng.integers(-6, 1, rng.integers(0, len(poles)))]
                row_n.append(sympy.expand(int(rng.integers(1, 4)) * sympy.prod([s - z for z in zeros])))
                row_d.append(sympy.expand(sympy.prod([s - q for q in poles])))
            num.append(row_n)
            den.append(row_d)
        degree = mcmillan_degree_exact(num, den, s)
        k = max(sympy.degree(den[i][j], s) for i in range(p) for j in range(m)) + 1
        pad = lambda e: [0.0] * (k - len(sympy.Poly(e, s).all_coeffs())) + [float(x) for x in sympy.Poly(e, s).all_coeffs()]
        nums = np.array([[pad(num[i][j]) for j in range(m)] for i in range(p)])
        dens = np.array([[pad(den[i][j]) for j in range(m)] for i in range(p)])
        try:
            r = sw.realize_transfer_matrix(nums, dens, minimal=True)
        except sw.ModelError:
            refused += 1
            continue
        hits += r.n_states == degree
    print(f"{cases} cases: McMillan degree reached in {100 * hits / cases:.1f}%, refused {refused}")


if __name__ == "__main__":
    quick = "--quick" in sys.argv
    t0 = time.perf_counter()
    if "--kalman-only" in sys.argv:
        at = sys.argv.index("--kalman-only")
        survey_kalman((20, 50, 100, 200), int(sys.argv[at + 2]), first_seed=int(sys.argv[at + 1]))
        print(f"({time.perf_counter() - t0:.0f} s)")
        sys.exit(0)
    survey_planted((20, 50) if quick else (20, 50, 100, 200, 300), 3 if quick else 10)
    survey_siso(50 if quick else 300)
    survey_kalman((20, 50) if quick else (20, 50, 100, 200, 300), 3 if quick else 10)
    survey_transfer_matrix(30 if quick else 200)
    print(f"({time.perf_counter() - t0:.0f} s)")

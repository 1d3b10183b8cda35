"""Writes the demo notebooks (stored without outputs). Run: python notebooks-demo/make_notebooks.py

Every scenario and every number in them is invented for the demos; no model describes real
equipment. Each notebook draws its figures inline (the test suite counts them).
"""

from pathlib import Path

import nbformat
from nbformat.v4 import new_code_cell, new_markdown_cell, new_notebook

HERE = Path(__file__).parent

SETUP = (
    "%matplotlib inline\n"
    "import numpy as np\n"
    "import matplotlib.pyplot as plt\n"
    "import statewright as sw\n"
    "from statewright import plotting\n"
    "plotting.use_style()   # labelled axes, legends, line styles that survive black-and-white print\n"
)


def _notebook(cells: list) -> nbformat.NotebookNode:
    nb = new_notebook(cells=cells)
    for i, cell in enumerate(nb.cells):
        cell.id = f"cell-{i:02d}"  # stable ids: regenerating an unchanged notebook changes no byte
    nb.metadata["kernelspec"] = {
        "name": "python3",
        "display_name": "Python 3",
        "language": "python",
    }
    nb.metadata["language_info"] = {"name": "python"}
    return nb


def canonical_forms() -> nbformat.NotebookNode:
    cells = [
        new_markdown_cell(
            "# From a differential equation to every canonical form\n\n"
            "*Scenario (invented data):* the lift axis of a hydraulic scissor platform. A fit of its "
            "valve-command-to-height step response (valve command $u$ in V, platform height $y$ in cm) "
            "gave the differential equation\n\n"
            "$$0.4\\,\\dddot y + 2.2\\,\\ddot y + 5.3\\,\\dot y + 4.1\\,y = 1.8\\,\\dot u + 7.4\\,u$$\n\n"
            "so $G(s) = \\dfrac{1.8 s + 7.4}{0.4 s^3 + 2.2 s^2 + 5.3 s + 4.1}$. Before realizing it we "
            "check that the fit is minimal (a canonical form of a transfer function whose numerator and "
            "denominator share a root carries a state too many); then we realize it in every canonical "
            "form, check the hand derivation in exact arithmetic, and look at its poles, zero, step and "
            "frequency response."
        ),
        new_code_cell(
            SETUP + "from scipy import signal\nimport sympy as sp\n\nnum, den = [1.8, 7.4], [0.4, 2.2, 5.3, 4.1]"
        ),
        new_markdown_cell(
            "**Is the fit minimal?** Exactly: the greatest common divisor of numerator and denominator, "
            "over the rationals, with the coefficients as written down. Numerically: the staircases of the "
            "controllable canonical form (orthogonal transformations, a singular-value decision per step)."
        ),
        new_code_cell(
            "s = sp.symbols('s')\n"
            "num_q = sp.Poly([sp.Rational(x) for x in ['1.8', '7.4']], s)\n"
            "den_q = sp.Poly([sp.Rational(x) for x in ['0.4', '2.2', '5.3', '4.1']], s)\n"
            "print('gcd of numerator and denominator:', sp.gcd(num_q, den_q).as_expr())\n"
            "r = sw.realize(num, den, 'controllable_canonical')\n"
            "print('controllable:', r.is_controllable(), ' observable:', r.is_observable(),\n"
            "      ' minimal order:', sw.minimal_realization(*r).n_states, 'of', r.n_states)\n"
            "assert sp.gcd(num_q, den_q).degree() == 0 and sw.minimal_realization(*r).n_states == 3"
        ),
        new_markdown_cell(
            "Had the fit come back with a fourth pole-zero pair at $s = -1.5$ (a mode the test never "
            "excited), every canonical form would have four states and one of them would be invisible at "
            "the output. The controllable canonical form is controllable by construction, so the "
            "observability staircase is the one that finds it:"
        ),
        new_code_cell(
            "r4 = sw.realize(np.polymul(num, [1, 1.5]), np.polymul(den, [1, 1.5]))\n"
            "m4 = sw.minimal_realization(*r4)\n"
            "print(r4.n_states, 'states; controllable:', r4.is_controllable(), ' observable:', r4.is_observable(),\n"
            "      ' minimal order:', m4.n_states)\n"
            "print('singular values of the observability steps:',\n"
            "      [float(v.max()) for v in m4.info['observability_singular_values']])\n"
            "assert m4.n_states == 3 and not r4.is_observable()"
        ),
        new_markdown_cell(
            "Our fit is minimal. Phase variables $x_1 = z, x_2 = \\dot z, x_3 = \\ddot z$ of $a(p) z = u$, "
            "$y = c(p) z$ give the controllable canonical form. In a notebook it shows as typeset "
            "matrices, under a caption of its size and arithmetic (and its time base, where the model records one)."
        ),
        new_code_cell("r"),
        new_markdown_cell(
            "The same model in exact arithmetic, with the coefficients as they were written "
            "down, and the hand derivation checked by sympy: $C(sI-A)^{-1}B + D$ must equal $G(s)$."
        ),
        new_code_cell(
            "re = sw.realize(['1.8', '7.4'], ['0.4', '2.2', '5.3', '4.1'], 'controllable_canonical', exact=True)\n"
            "A, B, C, D = (sp.Matrix(m.tolist()) for m in re)\n"
            "G_state = sp.simplify((C * (s * sp.eye(3) - A).inv() * B)[0, 0] + D[0, 0])\n"
            "G_given = num_q.as_expr() / den_q.as_expr()\n"
            "assert sp.simplify(G_state - G_given) == 0\n"
            "re"
        ),
        new_markdown_cell("Every form, with its poles and the transfer function recovered by Faddeev–LeVerrier:"),
        new_code_cell(
            "forms = ['controllable_canonical', 'observable_canonical', 'controller', 'observer',\n"
            "         'controllability', 'observability', 'modal']\n"
            "realizations = {f: sw.realize(num, den, f) for f in forms}\n"
            "for f, rf in realizations.items():\n"
            "    n_rec, d_rec = rf.transfer_function()\n"
            "    print(f'{f:24s} poles {np.round(rf.poles(), 4)}  num {np.round(n_rec[0, 0], 12)}  den {d_rec}')\n"
            "    assert np.allclose(n_rec[0, 0][-2:], np.array(num) / den[0], rtol=1e-12)"
        ),
        new_markdown_cell(
            "The proper case: a biproper lead network $K(s) = (3s + 12)/(s + 24)$ has a direct "
            "term $D = 3$ and strictly proper remainder $(12 - 24\\cdot 3)/(s + 24)$."
        ),
        new_code_cell("sw.realize([3, 12], [1, 24], 'controller')"),
        new_markdown_cell(
            "Simulation with SciPy from each realization: the step responses coincide (they are "
            "the same input-output model)."
        ),
        new_code_cell(
            "t = np.linspace(0, 6, 400)\n"
            "fig, ax = plt.subplots(figsize=(6.4, 3.8))\n"
            "for f, rf in realizations.items():\n"
            "    _, y = signal.step(signal.StateSpace(*rf), T=t)\n"
            "    ax.plot(t, y, label=f)\n"
            "ax.set_xlabel('time [s]'); ax.set_ylabel('platform height [cm] per V of valve command')\n"
            "ax.set_title('unit step response, every form'); ax.legend(ncol=2)\n"
            "ys = [signal.step(signal.StateSpace(*rf), T=t)[1] for rf in realizations.values()]\n"
            "assert max(np.max(np.abs(y - ys[0])) for y in ys) < 1e-9"
        ),
        new_markdown_cell(
            "Poles and the zero: a real pole at $-1.33$, a complex pair at $-2.08 \\pm 1.83j$ "
            "(damping ratio 0.75), the zero at $-7.4/1.8 = -4.11$, well away from every pole."
        ),
        new_code_cell(
            "fig = plotting.pole_zero_map(r, title='lift axis: poles and zero')\n"
            "assert np.isclose(np.roots(num)[0], -7.4 / 1.8)"
        ),
        new_markdown_cell(
            "The frequency response of two of the forms, computed from their matrices (one complex solve "
            "per frequency), drawn over each other: they are the same curve."
        ),
        new_code_cell(
            "fig = plotting.frequency_response_plot(realizations['controllable_canonical'], realizations['modal'],\n"
            "                                      labels=['controllable canonical', 'modal'], gain_unit='cm/V')\n"
            "w = np.logspace(-1, 2, 50)\n"
            "diff = realizations['controllable_canonical'].evaluate(1j * w) - realizations['modal'].evaluate(1j * w)\n"
            "assert np.max(np.abs(diff)) < 1e-12"
        ),
    ]
    return _notebook(cells)


def hidden_modes() -> nbformat.NotebookNode:
    cells = [
        new_markdown_cell(
            "# Finding a hidden uncontrollable mode in a 12-state model\n\n"
            "*Scenario (invented data):* a 12-state model of a two-drive web-tension line "
            "(unwinder, rewinder, web spans), assembled from subsystem models. One resonance of the "
            "idler roll is mechanically decoupled from both drives, so no input can excite it, and "
            "one thermal state of a drive is not seen by either sensor. Neither is visible by "
            "looking at the matrices: the model arrives in physical coordinates that mix all states."
        ),
        new_code_cell(
            SETUP + "\n"
            "rng = np.random.default_rng(12)\n"
            "# Decoupled construction (hidden below): 9 controllable+observable states, 1 controllable but\n"
            "# unobservable (drive thermal state), 2 uncontrollable but observable (idler resonance).\n"
            "blocks = [np.array([[-0.2, 8.0], [-8.0, -0.2]]), np.array([[-1.0, 3.0], [-3.0, -1.0]]),\n"
            "          np.array([[-5.0]]), np.array([[-0.5, 1.5], [-1.5, -0.5]]),\n"
            "          np.array([[-12.0, 2.0], [-2.0, -12.0]])]\n"
            "co = np.zeros((9, 9)); k = 0\n"
            "for blk in blocks:\n"
            "    n_blk = blk.shape[0]; co[k:k+n_blk, k:k+n_blk] = blk; k += n_blk\n"
            "a0 = np.zeros((12, 12)); a0[:9, :9] = co\n"
            "a0[9, 9] = -0.05                       # drive thermal state: controllable, unobservable\n"
            "a0[10:, 10:] = [[-0.02, 25.0], [-25.0, -0.02]]   # idler resonance: uncontrollable\n"
            "a0[9, :9] = 0.3 * rng.standard_normal(9)          # heated by the drive currents\n"
            "a0[:9, 10:] = 0.2 * rng.standard_normal((9, 2))   # the resonance shakes the web (observable)\n"
            "b0 = np.zeros((12, 2)); b0[:10] = rng.standard_normal((10, 2))\n"
            "c0 = np.zeros((2, 12)); c0[:, :9] = rng.standard_normal((2, 9))\n"
            "c0[:, 10:] = rng.standard_normal((2, 2))\n"
            "# Physical coordinates: an invertible mixing of all states. Time in seconds.\n"
            "t_phys = np.linalg.qr(rng.standard_normal((12, 12)))[0] @ np.diag(np.linspace(1, 3, 12))\n"
            "a = np.linalg.solve(t_phys, a0 @ t_phys); b = np.linalg.solve(t_phys, b0); c = c0 @ t_phys\n"
            "d = np.zeros((2, 2))\n"
            "np.count_nonzero(np.abs(a) < 1e-12), a.shape   # no visible structure"
        ),
        new_markdown_cell(
            "The model as it arrives: twelve states, dense. Its display typesets all twelve columns "
            "(an array with explicit columns, not the ten-column default matrix environment)."
        ),
        new_code_cell("sw.Realization(a, b, c, d)"),
        new_markdown_cell(
            "The controllability staircase (orthogonal transformations, rank decided by singular values at "
            "each step) finds the reachable dimension; the margins show how clear each decision was."
        ),
        new_code_cell(
            "s = sw.controllability_staircase(a, b, c)\n"
            "print('default tol', s.tol, '-> controllable dimension', s.rank, 'of', s.n_states)\n"
            "for i, (kept, dropped) in enumerate(s.rank_gaps):\n"
            "    print(f'step {i+1}: smallest singular value kept {kept}, largest dropped {dropped:.2e}')"
        ),
        new_markdown_cell(
            "Read the margins: every step keeps singular values of order 0.1 to 5, and then one step "
            "keeps a value of a few times 1e-12, eleven decades lower, barely above the default tolerance "
            "(which only promises to find zeros that are exactly zero in the data). That value is the "
            "idler resonance's coupling blurred by the rounding of the change to physical coordinates. "
            "A tolerance inside the gap, here 1e-9 relative to the size of A, decides it:"
        ),
        new_code_cell(
            "tol = 1e-9 * np.linalg.norm(a)\n"
            "s = sw.controllability_staircase(a, b, c, tol=tol)\n"
            "print('tol', tol, '-> controllable dimension', s.rank, 'of', s.n_states, ' steps', s.blocks)\n"
            "assert s.rank == 10\n"
            "s"
        ),
        new_code_cell(
            "fig, (ax1, ax2) = plt.subplots(1, 2, figsize=(10, 4))\n"
            "ax1.spy(np.abs(s.a) > 1e-12 * np.abs(s.a).max(), markersize=6, color='#1f3b73')\n"
            "ax1.axhline(s.rank - 0.5, color='#c8553d'); ax1.axvline(s.rank - 0.5, color='#c8553d')\n"
            "ax1.set_title('nonzero pattern of $Q^T A Q$')\n"
            "ax1.set_xlabel('state (column)'); ax1.set_ylabel('state (row)')\n"
            "ax1.grid(False)\n"
            "for i, sv in enumerate(s.singular_values):\n"
            "    ax2.semilogy([i + 1] * len(sv), np.maximum(sv, 1e-18), 'o', color='#1f3b73',\n"
            "                 label='singular values of the step block' if i == 0 else None)\n"
            "ax2.axhline(s.tol, color='#c8553d', ls='--', label=f'tol = {s.tol:.1e}')\n"
            "ax2.set_xlabel('staircase step'); ax2.set_ylabel('singular value [1/s]'); ax2.legend()\n"
            "ax2.set_title('the decision of each step')\n"
            "fig.tight_layout()"
        ),
        new_markdown_cell(
            "The Kalman decomposition splits all four parts; the minimal realization keeps the "
            "9 states the drives can steer and the sensors can see, with the same transfer matrix."
        ),
        new_code_cell(
            "k = sw.kalman_decomposition(a, b, c, d, tol=tol)\n"
            "print(k)\n"
            "assert k.sizes == (9, 1, 2, 0)\n"
            "m = sw.minimal_realization(a, b, c, d, tol=tol)\n"
            "w = 1j * np.logspace(-2, 2, 200)\n"
            "full = sw.Realization(a, b, c, d)\n"
            "print('states', m.n_states, ' max difference of the frequency responses',\n"
            "      np.max(np.abs(full.evaluate(w) - m.evaluate(w))))\n"
            "assert m.n_states == 9 and np.max(np.abs(full.evaluate(w) - m.evaluate(w))) < 1e-9\n"
            "print('poles of the hidden parts:', np.round(np.linalg.eigvals(k.realization.a[9:, 9:]), 4))\n"
            "k"
        ),
        new_markdown_cell(
            "The poles of the full model against those of the minimal one: the three that are gone are "
            "the hidden ones, the drive's slow thermal pole at $-0.05$ and the idler's lightly damped pair "
            "at $-0.02 \\pm 25j$. The frequency responses (singular values, two inputs and two outputs) "
            "coincide: the hidden modes never reach the outputs from the inputs."
        ),
        new_code_cell(
            "fig = plotting.pole_zero_map(full, m, labels=['full (12 states)', 'minimal (9 states)'], zeros=None)\n"
            "fig = plotting.frequency_response_plot(full, m, labels=['full (12 states)', 'minimal (9 states)'],\n"
            "                                      gain_unit='N/A')"
        ),
        new_markdown_cell(
            "**Why not the rank of the controllability matrix?** Its singular values spread like powers of "
            "the eigenvalue magnitudes, so the answer depends on the unit of time. The same model with time "
            "in minutes ($\\mathrm{d}x/\\mathrm{d}t_{\\min} = 60\\,(A x + B u)$: every rate is 60 times "
            "larger, nothing else changes) has the same controllable subspace. The staircase, with the "
            "same relative tolerance, still says 10; numpy's rank of $[B, AB, \\ldots, A^{11}B]$ drops to "
            "7 in minutes (and to 5 in hours), calling three controllable states uncontrollable."
        ),
        new_code_cell(
            "rows = []\n"
            "for unit, scale in [('s', 1.0), ('min', 60.0), ('h', 3600.0)]:\n"
            "    a_u, b_u = scale * a, scale * b\n"
            "    s_u = sw.controllability_staircase(a_u, b_u, c, tol=1e-9 * np.linalg.norm(a_u))\n"
            "    kmat = sw.controllability_matrix(a_u, b_u)\n"
            "    sv = np.linalg.svd(kmat, compute_uv=False)\n"
            "    rows.append((unit, s_u.rank, np.linalg.matrix_rank(kmat), sv))\n"
            "    print(f'time in {unit:3s}: staircase rank {s_u.rank:2d}, numpy rank of the controllability matrix '\n"
            "          f'{np.linalg.matrix_rank(kmat):2d}, its singular values span {sv[0] / sv[-1]:.1e}')\n"
            "assert [r[1] for r in rows] == [10, 10, 10] and rows[1][2] < 10\n"
            "fig, ax = plt.subplots(figsize=(6.4, 4))\n"
            "for (unit, _, rank, sv), marker in zip(rows, 'os^'):\n"
            "    rel = sv / sv[0]\n"
            "    ax.semilogy(np.arange(1, 13), rel, marker=marker, label=f'time in {unit} (numpy rank {rank})')\n"
            "ax.axhline(12 * np.finfo(float).eps, color='black', ls='--', lw=1, label='numpy threshold 12 eps')\n"
            "ax.axvline(10.5, color='0.4', ls=':', lw=1, label='true controllable dimension 10')\n"
            "ax.set_xlabel('index i'); ax.set_ylabel('singular value / largest [1]')\n"
            "ax.set_title('controllability matrix: the rank depends on the time unit'); ax.legend(fontsize=8)"
        ),
    ]
    return _notebook(cells)


def fleet() -> nbformat.NotebookNode:
    cells = [
        new_markdown_cell(
            "# A fleet of identified pump models, in one batch\n\n"
            "*Scenario (invented data):* 2,000 circulation pumps of a district-heating network, each "
            "identified from a speed-command step test as a 4th-order transfer function from motor "
            "speed command to differential pressure. For about a third of the units the fit put a zero "
            "close to one of the poles: a mode the test hardly excited. How close varies over ten "
            "decades, from a zero that is the pole to eleven digits to one that is 10 % away. Which of "
            "these modes should a fleet-wide reduction remove? We realize all models in one call, "
            "recover their transfer functions, and look at the number each decision rests on."
        ),
        new_code_cell(
            SETUP + "from scipy import signal\n\n"
            "rng = np.random.default_rng(2024)\n"
            "count = 2000\n"
            "# Invented identification results: two dominant real poles (pump and pipe), a lightly\n"
            "# damped pair (water hammer), and for about 30 % of the units a zero near the pipe pole,\n"
            "# at a relative distance between 1e-11 and 1e-1 (log-uniform).\n"
            "dens, nums, offset = [], [], []\n"
            "for i in range(count):\n"
            "    p1, p2 = -rng.uniform(0.5, 2.0), -rng.uniform(4.0, 9.0)\n"
            "    wn, zeta = rng.uniform(15, 30), rng.uniform(0.05, 0.2)\n"
            "    den = np.polymul(np.polymul([1, -p1], [1, -p2]), [1, 2 * zeta * wn, wn ** 2])\n"
            "    if rng.random() < 0.3:\n"
            "        delta = rng.choice([-1, 1]) * 10 ** rng.uniform(-11, -1)\n"
            "        z = p2 * (1 + delta)\n"
            "    else:\n"
            "        delta, z = np.nan, -rng.uniform(20, 40)\n"
            "    num = rng.uniform(50, 80) * np.polymul([1, -z], [1, 30.0])\n"
            "    dens.append(den); nums.append(num); offset.append(delta)\n"
            "den = np.array(dens); num = np.array(nums); offset = np.array(offset)\n"
            "near = ~np.isnan(offset)\n"
            "num.shape, den.shape, int(near.sum())"
        ),
        new_markdown_cell(
            "One call realizes the whole fleet (all cores, GIL released); one call recovers the transfer functions."
        ),
        new_code_cell(
            "import time\n"
            "t0 = time.perf_counter()\n"
            "A, B, C, D = sw.realize_batch(num, den, 'controllable_canonical')\n"
            "num2, den2 = sw.transfer_function_batch(A, B, C, D)\n"
            "elapsed = time.perf_counter() - t0\n"
            "scale = den[:, :1]\n"
            "print(f'{count} models in {elapsed * 1e3:.1f} ms;',\n"
            "      'max relative coefficient error of the round trip:',\n"
            "      np.max(np.abs(den2 - den / scale) / np.abs(den / scale)))\n"
            "# numerators come back on the common power grid s^4 .. s^0 (degree 2 here)\n"
            "assert np.all(num2[:, 0, 0, :2] == 0)\n"
            "assert np.allclose(num2[:, 0, 0, 2:], num / scale, rtol=1e-12, atol=0)"
        ),
        new_markdown_cell(
            "**The decision statistic.** The controllable canonical form is controllable by construction; "
            "a near-cancelled pole is a mode the output hardly sees. The minimal realization decides it on "
            "the observability staircase (a power-of-two balanced copy, orthogonal steps): each step keeps "
            "the directions whose singular value exceeds `tol`. The smallest of the largest singular values "
            "of the steps is the number the decision rested on (from the second step on, the blocks decided "
            "are parts of A, so it has the unit 1/s). With the default `tol` (about 3e-13, which "
            "only promises to find exact zeros) nothing is removed:"
        ),
        new_code_cell(
            "def statistic(i, tol=None):\n"
            "    m = sw.minimal_realization(A[i], B[i], C[i], D[i], tol=tol)\n"
            "    steps = m.info['observability_singular_values']\n"
            "    return m, min(float(v.max()) if v.size else 0.0 for v in steps)\n"
            "results = [statistic(i) for i in range(count)]\n"
            "stat = np.array([s for _, s in results])\n"
            "default_orders = np.array([m.n_states for m, _ in results])\n"
            "print('default tol', results[0][0].info['tol'][1], '-> minimal orders',\n"
            "      dict(zip(*np.unique(default_orders, return_counts=True))))\n"
            "print('statistic of the units without a near zero: from', stat[~near].min().round(3),\n"
            "      'to', stat[~near].max().round(3))\n"
            "print('statistic of the units with a near zero:    from', f'{stat[near].min():.1e}',\n"
            "      'to', f'{stat[near].max():.1e}')"
        ),
        new_markdown_cell(
            "The fleet's distribution of that statistic, grouped by how close the zero really is. The "
            "engineering choice `tol = 1e-6` removes every mode whose statistic lies below the line. Units "
            "within a factor of 30 of the line are the hard ones: a different test, a different "
            "identification run or a tolerance 30 times larger or smaller would flip them."
        ),
        new_code_cell(
            "TOL = 1e-6\n"
            "group = np.where(~near, 'no zero near a pole',\n"
            "                 np.where(np.abs(np.nan_to_num(offset)) < 1e-6, 'zero within 1e-6 (relative)',\n"
            "                          'zero 1e-6 to 1e-1 from a pole'))\n"
            "fig = plotting.fleet_distribution_plot(stat, threshold=TOL, groups=group,\n"
            "                                       quantity='smallest singular value of an observability step',\n"
            "                                       unit='1/s', bins=50)\n"
            "hard = (stat > TOL / 30) & (stat < TOL * 30)\n"
            "print('hard to decide (within a factor 30 of tol):', int(hard.sum()), 'units')"
        ),
        new_markdown_cell(
            "What a decision costs. For each removed mode, the largest change of the pump's frequency "
            "response that the removal makes, relative to the pump's peak gain; and, for comparison, the "
            "smallest Hankel singular value relative to the largest (the share of the input-output energy "
            "that mode carries). The response change follows the statistic over ten decades, so `tol` "
            "is a statement about acceptable model error. The Hankel singular values stop resolving the "
            "mode below about 1e-8 relative: they are square roots of eigenvalues of a product of "
            "Gramians, accurate to about the square root of the machine epsilon, so they cannot make the "
            "decisions near 1e-11 that the staircase makes."
        ),
        new_code_cell(
            "w = 1j * np.logspace(-1, 2.5, 300)\n"
            "removed, change, energy = [], [], []\n"
            "for i in np.flatnonzero(near):\n"
            "    full = sw.Realization(A[i], B[i], C[i], D[i])\n"
            "    small = sw.minimal_realization(*full, tol=TOL)\n"
            "    hsv = sw.hankel_singular_values(A[i], B[i], C[i])\n"
            "    energy.append(hsv[-1] / hsv[0])\n"
            "    if small.n_states < full.n_states:\n"
            "        g_full = full.evaluate(w)\n"
            "        change.append(np.max(np.abs(g_full - small.evaluate(w))) / np.max(np.abs(g_full)))\n"
            "        removed.append(i)\n"
            "removed = np.array(removed); change = np.array(change); energy = np.array(energy)\n"
            "print(len(removed), 'modes removed with tol', TOL, '; largest relative response change',\n"
            "      f'{change.max():.1e}')\n"
            "assert change.max() < 1e-4\n"
            "fig, ax = plt.subplots(figsize=(6.4, 4))\n"
            "ax.loglog(stat[removed], np.maximum(change, 1e-17), 'o', ms=4, mfc='none',\n"
            "          label='response change of the removal (relative)')\n"
            "resolved = energy > 0\n"
            "ax.loglog(stat[near][resolved], energy[resolved], '+', ms=5,\n"
            "          label='smallest / largest Hankel singular value')\n"
            "print(int((~resolved).sum()), 'near-cancelled modes have a smallest Hankel singular value of exactly 0 '\n"
            "      '(not drawn): below the resolution of the Gramians')\n"
            "ax.axvline(TOL, color='black', ls='--', lw=1, label=f'tol = {TOL:g}')\n"
            "ax.set_xlabel('decision statistic [1/s]'); ax.set_ylabel('relative size [1]')\n"
            "ax.set_title('what the statistic predicts'); ax.legend(fontsize=8)"
        ),
        new_markdown_cell(
            "The hardest decision that went one way and the hardest that went the other: the two units "
            "nearest the tolerance on either side. The removed one loses a mode whose zero sits within "
            "about 1e-7 of its pole; its step response and frequency response do not change visibly."
        ),
        new_code_cell(
            "below = np.flatnonzero(near & (stat < TOL)); above = np.flatnonzero(near & (stat >= TOL))\n"
            "i_rem = below[np.argmax(stat[below])]; i_kept = above[np.argmin(stat[above])]\n"
            "for i in (i_rem, i_kept):\n"
            "    print(f'pump {i}: statistic {stat[i]:.2e}, zero offset {offset[i]:+.1e} (relative),',\n"
            "          'minimal order', sw.minimal_realization(A[i], B[i], C[i], D[i], tol=TOL).n_states)\n"
            "full = sw.Realization(A[i_rem], B[i_rem], C[i_rem], D[i_rem])\n"
            "small = sw.minimal_realization(*full, tol=TOL)\n"
            "t = np.linspace(0, 4, 400)\n"
            "_, y_full = signal.step(full.to_scipy(), T=t)\n"
            "_, y_small = signal.step(small.to_scipy(), T=t)\n"
            "fig, ax = plt.subplots(figsize=(6.4, 3.6))\n"
            "ax.plot(t, y_full, label=f'full ({full.n_states} states)')\n"
            "ax.plot(t, y_small, label=f'minimal ({small.n_states} states)')\n"
            "ax.set_xlabel('time [s]'); ax.set_ylabel('differential pressure [kPa] per unit command')\n"
            "ax.set_title(f'pump {i_rem}: unit step response'); ax.legend()\n"
            "print('max difference of the step responses', np.max(np.abs(y_full - y_small)))\n"
            "assert np.max(np.abs(y_full - y_small)) < 1e-4 * np.max(np.abs(y_full))\n"
            "fig = plotting.frequency_response_plot(full, small, labels=['full', 'minimal'], gain_unit='kPa')"
        ),
        new_markdown_cell("The minimal model of that pump, as typeset matrices:"),
        new_code_cell("small"),
    ]
    return _notebook(cells)


def identified_impulse_response() -> nbformat.NotebookNode:
    cells = [
        new_markdown_cell(
            "# From a noisy multi-input impulse response to a balanced, truncated model\n\n"
            "*Scenario (invented data):* a two-zone drying oven with two heater inputs (kW) and two "
            "temperature outputs (K), sampled every 5 s. A pulse test gave 60 samples of its impulse "
            "response (Markov parameters), with sensor noise. We realize a model from the samples "
            "(Ho–Kalman: SVD of the block Hankel matrix of the data), pick the order at the gap of that "
            "matrix's singular values, compute the identified model's own Hankel singular values, "
            "balance it, truncate it, and compare the a-priori error bound with the actual error."
        ),
        new_code_cell(
            SETUP + "\n"
            "T = 5.0   # sample time [s]\n"
            "rng = np.random.default_rng(5)\n"
            "# The 'true' oven (hidden from the identification): 6 states, discrete time.\n"
            "poles = np.array([0.97, 0.9, 0.75, 0.5, 0.3, 0.1])\n"
            "q = np.linalg.qr(rng.standard_normal((6, 6)))[0]\n"
            "a_true = q @ np.diag(poles) @ q.T\n"
            "b_true = rng.standard_normal((6, 2)) * np.array([[1.0], [0.8], [0.5], [0.2], [0.05], [0.01]])\n"
            "c_true = rng.standard_normal((2, 6))\n"
            "d_true = np.zeros((2, 2))\n"
            "def impulse(a, b, c, d, n):\n"
            "    a, b, c, d = (np.asarray(x, dtype=float) for x in (a, b, c, d))\n"
            "    out = np.empty((n, c.shape[0], b.shape[1])); out[0] = d\n"
            "    p = np.eye(a.shape[0])\n"
            "    for i in range(1, n):\n"
            "        out[i] = c @ p @ b; p = a @ p\n"
            "    return out\n"
            "k = 60\n"
            "markov = impulse(a_true, b_true, c_true, d_true, k)\n"
            "noisy = markov + 2e-4 * rng.standard_normal(markov.shape)\n"
            "noisy[0] = 0.0   # no direct feedthrough, known from the physics"
        ),
        new_markdown_cell(
            "**Two different sets of singular values.** `realize_markov` decides the order on the singular "
            "values of the *data's block Hankel matrix* (here 30 x 29 blocks of 2 x 2 noisy samples): "
            "they are in `info['singular_values']`. They are not the *Hankel singular values of the model*, "
            "which are the singular values of the model's infinite Hankel operator, "
            "$\\sqrt{\\lambda_i(W_c W_o)}$ from its Gramians. The data matrix is a finite section of the "
            "operator, with noise: its singular values are smaller (for this oven the second one by "
            "a third), and past the order they are the noise floor, not the model."
        ),
        new_code_cell(
            "r_full = sw.realize_markov(noisy, order=None, tol=5e-3)\n"
            "order = r_full.n_states\n"
            "data_sv = r_full.info['singular_values']\n"
            "model_hsv = sw.hankel_singular_values(*r_full[:3], discrete=True)\n"
            "print('order chosen:', order)\n"
            "print('singular values of the data Hankel matrix:', np.round(data_sv[:order + 2], 4))\n"
            "print('Hankel singular values of the model:      ', np.round(model_hsv, 4))\n"
            "fig, ax = plt.subplots(figsize=(6.4, 4))\n"
            "ax.semilogy(np.arange(1, 21), data_sv[:20], 'o-', mfc='none',\n"
            "            label='data Hankel matrix (noisy samples)')\n"
            "ax.semilogy(np.arange(1, order + 1), model_hsv, 'x--', ms=8, label=f'identified model ({order} states)')\n"
            "ax.axvline(order + 0.5, color='0.4', ls=':', label=f'chosen order {order}')\n"
            "ax.axhline(5e-3, color='black', ls='--', lw=1, label='tol = 5e-3')\n"
            "ax.set_xlabel('index i'); ax.set_ylabel('singular value [K/kW]')\n"
            "ax.set_title('two sets of singular values'); ax.legend(fontsize=8)"
        ),
        new_markdown_cell(
            "A check of that statement: with noiseless samples over a long horizon (800 steps, the "
            "slowest mode decayed to $0.97^{800} \\approx 3\\cdot 10^{-11}$) the data matrix is nearly the whole "
            "operator, and its singular values meet the true model's Hankel singular values."
        ),
        new_code_cell(
            "long = sw.realize_markov(impulse(a_true, b_true, c_true, d_true, 801), order=6)\n"
            "true_hsv = sw.hankel_singular_values(a_true, b_true, c_true, discrete=True)\n"
            "print('data Hankel matrix, 800 noiseless samples:', np.round(long.info['singular_values'][:6], 6))\n"
            "print('true model, from its Gramians:            ', np.round(true_hsv, 6))\n"
            "assert np.allclose(long.info['singular_values'][:6], true_hsv, rtol=1e-6)\n"
            "assert not np.allclose(data_sv[:order], model_hsv, rtol=0.05)"
        ),
        new_markdown_cell(
            "Balance the identified model (equal, diagonal Gramians) and truncate it to the states "
            "that carry most of the input-output energy. The a-priori bound on the truncation error, "
            "over all frequencies, is twice the sum of the discarded Hankel singular values of the model."
        ),
        new_code_cell(
            "keep = 4   # the model's Hankel singular values drop by a factor of 30 after the fourth\n"
            "r_bal = sw.balanced_realization(*r_full, order=keep, discrete=True)\n"
            "bound = r_bal.info['error_bound']\n"
            "w = np.exp(1j * np.linspace(0, np.pi, 2000))\n"
            "err = np.max(np.linalg.norm(r_full.evaluate(w) - r_bal.evaluate(w), ord=2, axis=(1, 2)))\n"
            "print(f'kept {keep} states: actual error (max over the unit circle) {err:.3e} <= bound {bound:.3e}')\n"
            "assert np.allclose(r_bal.info['hankel_singular_values'], model_hsv, rtol=1e-8)\n"
            "assert err <= bound * (1 + 1e-9)\n"
            "fig = plotting.hankel_singular_value_plot(r_bal, gain_unit='K/kW',\n"
            "                                          title='Hankel singular values of the identified model')"
        ),
        new_markdown_cell(
            "The bound against the actual error for every order the model could be truncated to, with "
            "the lower bound $\\sigma_{r+1}$ that no model of order $r$ can beat:"
        ),
        new_code_cell("fig = plotting.reduction_error_plot(r_full, sample_time=T, gain_unit='K/kW')"),
        new_markdown_cell(
            "Frequency responses up to the Nyquist frequency $\\pi/T$ (singular values: two heaters, two "
            "zones) and impulse responses of the identified and the truncated model against the samples:"
        ),
        new_code_cell(
            "fig = plotting.frequency_response_plot(r_full, r_bal, sample_time=T, gain_unit='K/kW',\n"
            "                                      labels=[f'identified ({order} states)', f'truncated ({keep})'])\n"
            "steps = np.arange(k)\n"
            "fig, axes = plt.subplots(2, 2, figsize=(10, 6), sharex=True)\n"
            "for i in range(2):\n"
            "    for j in range(2):\n"
            "        ax = axes[i, j]\n"
            "        ax.plot(steps * T, noisy[:, i, j], '.', ms=3, label='measured (noisy)')\n"
            "        ax.plot(steps * T, impulse(*r_full, k)[:, i, j], label=f'identified ({order} states)')\n"
            "        ax.plot(steps * T, impulse(*r_bal, k)[:, i, j], label=f'balanced, truncated ({keep})')\n"
            "        ax.set_title(f'heater {j + 1} -> zone {i + 1}')\n"
            "        ax.set_ylabel('temperature [K] per kW pulse')\n"
            "for ax in axes[1]:\n"
            "    ax.set_xlabel('time [s]')\n"
            "axes[0, 0].legend(fontsize=7)\n"
            "fig.tight_layout()"
        ),
        new_markdown_cell("The truncated model, as typeset matrices:"),
        new_code_cell("r_bal"),
    ]
    return _notebook(cells)


def jordan_by_hand() -> nbformat.NotebookNode:
    cells = [
        new_markdown_cell(
            "# Canonical forms by hand: a double pole (Jordan form) and two inputs (Luenberger form)\n\n"
            "*Scenario (invented data):* a batch drying oven. One heater warms two identical chambers "
            "in series (each a first-order lag of 1 min), a bypass duct carries some heat straight to "
            "the second chamber, and the thermocouple's sheath adds a lag of 15 s. Time is in minutes, "
            "heater power $u$ in kW, temperature $y$ in K above ambient:\n\n"
            "$$G(s) = \\dfrac{5 s + 12}{(s + 1)^2 (s + 4)} = \\dfrac{5 s + 12}{s^3 + 6 s^2 + 9 s + 4}.$$\n\n"
            "The two identical chambers give a **double pole** at $s = -1$: no basis of eigenvectors "
            "exists, so there is no diagonal (modal) form. The Jordan (parallel) form is what a hand "
            "derivation by partial fractions gives: one block per distinct pole, a Jordan chain for the "
            "repeated one, and $C$ holding the residues of every order."
        ),
        new_code_cell(
            SETUP + "from scipy import signal\nimport sympy as sp\n\n"
            "s = sp.symbols('s')\n"
            "num, den = [5, 12], [1, 6, 9, 4]\n"
            "G = sp.Poly(num, s).as_expr() / sp.Poly(den, s).as_expr()\n"
            "sp.apart(G, s)   # partial fractions, by sympy: the hand derivation's first step"
        ),
        new_markdown_cell(
            "With `exact=True` statewright factors the denominator over the rationals and builds the "
            "Jordan form in exact arithmetic. `info['residues']` holds, per factor, the residue of each "
            "power: for $(s+1)^2$ first the coefficient of $1/(s+1)$, then of $1/(s+1)^2$."
        ),
        new_code_cell(
            "oven = sw.realize(num, den, 'jordan', exact=True)\n"
            "print('factors (monic, highest power first):', oven.info['factors'])\n"
            "print('multiplicities:', oven.info['multiplicities'])\n"
            "print('residues:', oven.info['residues'])\n"
            "oven"
        ),
        new_markdown_cell(
            "Three checks against the partial fractions above, all exact: the residues are sympy's; the "
            "transfer function of the Jordan form is $G$ again (Faddeev–LeVerrier in rational arithmetic); "
            "and the block of the double pole is a true Jordan block, $(A_2 + I)$ nilpotent but not zero."
        ),
        new_code_cell(
            "expected = [[sp.Rational(-8, 9)], [sp.Rational(8, 9), sp.Rational(7, 3)]]   # read off sp.apart above\n"
            "assert sp.cancel(sp.apart(G, s) - (expected[0][0] / (s + 4) + expected[1][0] / (s + 1)\n"
            "                                    + expected[1][1] / (s + 1) ** 2)) == 0\n"
            "got = [[sp.Rational(r.numerator, r.denominator) for (r,) in chain] for chain in oven.info['residues']]\n"
            "assert got == expected, got\n"
            "num_back, den_back = sw.transfer_function(*oven, exact=True)\n"
            "assert list(num_back[0, 0]) == [0, 0, 5, 12] and list(den_back) == den\n"
            "block = [sp.Rational(x.numerator, x.denominator) for x in oven.a[1:, 1:].ravel()]\n"
            "A2 = sp.Matrix(2, 2, block) + sp.eye(2)\n"
            "assert A2 != sp.zeros(2, 2) and A2 ** 2 == sp.zeros(2, 2)\n"
            "print('residues, transfer function and Jordan structure agree with the hand derivation')"
        ),
        new_markdown_cell(
            "**What the chain means in time.** A Jordan chain of length two contributes "
            "$(r_1 + r_2 t)\\,e^{-t}$ to the impulse response, a term no sum of distinct exponentials "
            "has. The impulse response of each block of the Jordan form, and their sum against SciPy's "
            "impulse response of $G$:"
        ),
        new_code_cell(
            "t = np.linspace(0, 8, 400)\n"
            "r_fast, (r1, r2) = -8 / 9, (8 / 9, 7 / 3)\n"
            "fast, chain = r_fast * np.exp(-4 * t), (r1 + r2 * t) * np.exp(-t)\n"
            "_, reference = signal.impulse((num, den), T=t)\n"
            "fig, ax = plt.subplots(figsize=(7, 3.6))\n"
            "ax.plot(t, chain, label='double pole: $(8/9 + 7t/3)\\\\,e^{-t}$')\n"
            "ax.plot(t, fast, label='sheath lag: $-(8/9)\\\\,e^{-4t}$')\n"
            "ax.plot(t, fast + chain, label='sum of the blocks')\n"
            "ax.plot(t[::20], reference[::20], 'o', label='SciPy impulse response of G')\n"
            "ax.set_xlabel('time (min)'); ax.set_ylabel('temperature per energy (K/(kW min))')\n"
            "ax.set_title('Impulse response, block by block'); ax.legend()\n"
            "assert np.allclose(fast + chain, reference, atol=1e-9)"
        ),
        new_markdown_cell(
            "**Identified data: the double pole is never exactly double.** A fit of the same oven "
            "returns poles at $-1.0002$ and $-0.9999$. In float the Jordan form treats poles closer "
            "than `tol` (relative) as one repeated pole; `info` reports each cluster's spread, the "
            "transformation's condition number and the transfer function's error against the input, "
            "so the price of merging is visible. Kept apart, the two poles need eigenvectors that are "
            "nearly parallel (condition about 3e4); merged, the basis is well conditioned and the "
            "error is of the order of the spread."
        ),
        new_code_cell(
            "fitted = np.poly([-1.0002, -0.9999, -4.0])\n"
            "apart_ = sw.realize(num, fitted, 'jordan')               # default tol: 1e-6, relative\n"
            "merged = sw.realize(num, fitted, 'jordan', tol=1e-3)\n"
            "for name, r in [('kept apart', apart_), ('merged', merged)]:\n"
            "    print(f\"{name:>10}: multiplicities {r.info['multiplicities']}, \"\n"
            "          f\"spread {r.info['cluster_spread'].max():.1e}, \"\n"
            "          f\"condition {r.info['condition']:.1e}, transfer error {r.info['transfer_error']:.1e}\")\n"
            "assert apart_.info['condition'] > 1e3 > merged.info['condition']\n"
            "merged"
        ),
        new_markdown_cell(
            "The pole and zero map of the fitted model shows why: the two poles sit on top of each "
            "other at this scale, and the zero at $-2.4$ lies between them and the sheath lag."
        ),
        new_code_cell(
            "fig = plotting.pole_zero_map(merged, sw.realize(num, den, 'jordan'),\n"
            "                             labels=['fitted, merged', 'exact data'],\n"
            "                             time_unit='min', title='Drying oven: poles and zero')"
        ),
        new_markdown_cell(
            "**An irreducible factor.** A circulation fan adds a lightly damped mode "
            "$s^2 + 2 s + 5$ (roots $-1 \\pm 2j$, no rational roots). In exact mode that factor stays a "
            "companion block, so the result is still exact; in float the same factor becomes the real "
            "block $[[\\sigma, \\omega], [-\\omega, \\sigma]]$."
        ),
        new_code_cell(
            "G2 = (s + 3) / ((s + 1) ** 2 * (s ** 2 + 2 * s + 5))\n"
            "n2, d2 = (sp.Poly(x, s).all_coeffs() for x in sp.fraction(sp.cancel(G2)))\n"
            "n2, d2 = [int(x) for x in n2], [int(x) for x in d2]\n"
            "fan_exact = sw.realize(n2, d2, 'jordan', exact=True)\n"
            "fan_float = sw.realize(n2, d2, 'jordan')\n"
            "print('exact factors:', fan_exact.info['factors'])\n"
            "print('float blocks:'); print(fan_float.a.round(12))\n"
            "_, d2_back = sw.transfer_function(*fan_exact, exact=True)\n"
            "assert list(d2_back) == d2\n"
            "fan_exact"
        ),
        new_markdown_cell(
            "## Two heaters: the Luenberger controller form\n\n"
            "The oven's larger sibling has two heater elements: element 1 warms a plate, element 2 sits on "
            "the shared housing. States: element 1, plate, element 2, housing (K above ambient); inputs: "
            "the two heater powers (kW); outputs: plate and housing sensors. A multi-input model has no "
            "single companion form; the Luenberger controller form has one companion block per input, of "
            "the size of that input's **controllability index** (how many states it reaches before the "
            "other input's columns take over, scanning $b_1, b_2, A b_1, A b_2, \\dots$). In exact mode the "
            "columns are selected by exact elimination; in float the decisions are made on the orthogonal "
            "controllability staircase and the result is verified."
        ),
        new_code_cell(
            "a = [['-0.8', '0.8', '0', '0'], ['0.2', '-0.5', '0', '0.3'],\n"
            "     ['0', '0', '-0.6', '0.6'], ['0', '0.1', '0.2', '-0.4']]\n"
            "b = [['0.5', '0'], ['0', '0'], ['0', '0.4'], ['0', '0']]\n"
            "c = [['0', '1', '0', '0'], ['0', '0', '0', '1']]\n"
            "d = [['0', '0'], ['0', '0']]\n"
            "heaters = sw.multivariable_canonical_form(a, b, c, d, exact=True)\n"
            "print('controllability indices per heater:', heaters.info['indices'])\n"
            "# sympy's exact scan of the controllability matrix's columns, in the same order (reference)\n"
            "A_q, B_q = sp.Matrix(a).applyfunc(sp.Rational), sp.Matrix(b).applyfunc(sp.Rational)\n"
            "kept, count = sp.zeros(4, 0), [0, 0]\n"
            "for power in range(4):\n"
            "    for j in range(2):\n"
            "        column = A_q ** power * B_q[:, j]\n"
            "        if count[j] == power and kept.row_join(column).rank() > kept.cols:\n"
            "            kept, count[j] = kept.row_join(column), count[j] + 1\n"
            "assert tuple(count) == heaters.info['indices'] == (2, 2)\n"
            "heaters"
        ),
        new_markdown_cell(
            "The same form from float data, with the transformation's condition number and the "
            "verification figures, and the check that matters: the transfer matrix is unchanged, "
            "here against the original model's singular values over frequency."
        ),
        new_code_cell(
            "model = tuple(np.array(x, dtype=float) for x in (a, b, c, d))\n"
            "heaters_f = sw.multivariable_canonical_form(*model)\n"
            "print(f\"indices {heaters_f.info['indices']}, condition {heaters_f.info['condition']:.2f}, \"\n"
            "      f\"residual {heaters_f.info['residual']:.1e}, Markov error {heaters_f.info['markov_error']:.1e}\")\n"
            "w = np.logspace(-2, 1, 200)\n"
            "assert np.allclose(sw.frequency_response(*heaters_f, w), sw.frequency_response(*model, w), rtol=1e-10)\n"
            "fig = plotting.frequency_response_plot(model, heaters_f, labels=['physical states', 'controller form'],\n"
            "                                       frequencies=w, frequency_unit='rad/min', gain_unit='K/kW',\n"
            "                                       title='Two-heater oven: singular values')"
        ),
    ]
    return _notebook(cells)


def identified_fleet_in_seconds() -> nbformat.NotebookNode:
    cells = [
        new_markdown_cell(
            "# An identified fleet in seconds: continuous models, time constants and zeros\n\n"
            "*Scenario (invented data):* 400 belt conveyors of a parcel hub, each identified at 50 Hz "
            "(sample time 20 ms) as a discrete third-order model from motor torque command to belt "
            "speed. Physically each is a drive lag (time constant 0.25 to 0.8 s) and an elastic belt "
            "mode (20 to 40 rad/s, lightly damped). On about one unit in eight the speed sensor was "
            "moved to the far idler pulley, past an elastic span: a **non-minimum-phase zero**, which "
            "limits how fast that unit's speed loop may be tuned. The fits carry relative errors of "
            "about 1e-6 in their coefficients. Which units have the zero, and what are their time "
            "constants in seconds?"
        ),
        new_code_cell(
            SETUP + "from scipy import signal\n\n"
            "rng = np.random.default_rng(7)\n"
            "count, T = 400, 0.02                      # units, seconds per sample\n"
            "nums, dens, planted, tau_true = [], [], [], []\n"
            "for i in range(count):\n"
            "    tau, wn, zeta = rng.uniform(0.25, 0.8), rng.uniform(20, 40), rng.uniform(0.05, 0.15)\n"
            "    far_sensor = rng.random() < 0.12\n"
            "    z = rng.uniform(15, 35) if far_sensor else -rng.uniform(30, 60)\n"
            "    gain = rng.uniform(1.5, 2.5)            # (m/s) per (N m) at DC\n"
            "    num_c = gain * wn ** 2 / tau * np.array([-1 / z, 1.0])\n"
            "    den_c = np.polymul([1, 1 / tau], [1, 2 * zeta * wn, wn ** 2])\n"
            "    num_d, den_d, _ = signal.cont2discrete((num_c, den_c), T, method='zoh')\n"
            "    nums.append(np.ravel(num_d)); dens.append(den_d)\n"
            "    planted.append(far_sensor); tau_true.append(tau)\n"
            "# the identification's errors: about 1e-6, relative, on every fitted coefficient\n"
            "num = np.array(nums) * (1 + 1e-6 * rng.standard_normal((count, 4)))\n"
            "den = np.array(dens); den[:, 1:] *= 1 + 1e-6 * rng.standard_normal((count, 3))\n"
            "planted, tau_true = np.array(planted), np.array(tau_true)\n"
            "num.shape, den.shape, int(planted.sum())"
        ),
        new_markdown_cell(
            "**Back to seconds.** One call realizes the fleet, one call finds the continuous model "
            "behind each zero-order-hold sample (the principal matrix logarithm, each result verified "
            "by sampling it again). The drive's time constant is the slowest real pole's."
        ),
        new_code_cell(
            "A, B, C, D = sw.realize_batch(num, den)\n"
            "Ac, Bc, Cc, Dc = sw.to_continuous_batch(A, B, C, D, T)\n"
            "poles = np.linalg.eigvals(Ac)\n"
            "tau = np.array([-1 / p[np.abs(p.imag) < 1e-9 * np.abs(p)].real.max() for p in poles])\n"
            "print(f'time constants {tau.min():.3f} s to {tau.max():.3f} s; '\n"
            "      f'largest relative error against the planted ones: {np.max(np.abs(tau / tau_true - 1)):.1e}')\n"
            "# a check outside the tool: sample unit 0's continuous model again with SciPy\n"
            "back = signal.cont2discrete((Ac[0], Bc[0], Cc[0], Dc[0]), T, method='zoh')\n"
            "assert np.allclose(back[0], A[0], rtol=0, atol=1e-12)\n"
            "assert np.max(np.abs(tau / tau_true - 1)) < 1e-2\n"
            "unit = sw.Realization(Ac[0], Bc[0], Cc[0], Dc[0])\n"
            "print('unit 0: DC gain', float(sw.dc_gain(*unit)[0, 0]), '(m/s)/(N m)')\n"
            "unit"
        ),
        new_markdown_cell(
            "**Zeros, and the trap in them.** The invariant zeros of each continuous model (system "
            "pencil reduction, orthogonal steps) come in two kinds. The true zero of the drive, and a "
            "second one that the fit's errors created: a third-order model of relative degree two, "
            "perturbed by 1e-6, has a tiny $s^2$ term in its numerator, hence a zero near "
            "$\\pm 10^{8}$ rad/s of either sign. Flagging every zero in the right half plane flags "
            "half the fleet. A zero beyond the Nyquist frequency $\\pi / T$ is not in the data at all; "
            "the decision statistic is the magnitude of the right-half-plane zero against $\\pi / T$."
        ),
        new_code_cell(
            "zeros, counts = sw.invariant_zeros_batch(Ac, Bc, Cc, Dc)\n"
            "present = np.arange(zeros.shape[1]) < counts[:, None]\n"
            "nyquist = np.pi / T\n"
            "right = present & (zeros.real > 0)\n"
            "naive = right.any(axis=1)\n"
            "flagged = (right & (np.abs(zeros) < nyquist)).any(axis=1)\n"
            "print(f'right-half-plane zero anywhere: {naive.sum()} units; below the Nyquist frequency '\n"
            "      f'({nyquist:.0f} rad/s): {flagged.sum()} units; planted: {planted.sum()}')\n"
            "assert (flagged == planted).all()\n"
            "rhp = np.where(right, np.abs(zeros), np.inf).min(axis=1)\n"
            "fig = plotting.fleet_distribution_plot(rhp[naive], threshold=nyquist, groups=planted[naive],\n"
            "                                       group_labels={True: 'sensor past the belt span',\n"
            "                                                     False: 'sensor at the drive'},\n"
            "                                       quantity='smallest right-half-plane zero', unit='rad/s',\n"
            "                                       title='Which right-half-plane zeros are in the data?')"
        ),
        new_markdown_cell(
            "The flagged units and a few of the others on one pole and zero map (the fit-created "
            "zeros are far off the chart, as they should be):"
        ),
        new_code_cell(
            "picks = list(np.flatnonzero(flagged)[:3]) + list(np.flatnonzero(~flagged)[:3])\n"
            "models = [sw.Realization(Ac[i], Bc[i], Cc[i], Dc[i]) for i in picks]\n"
            "labels = [f'unit {i}' + (' (flagged)' if flagged[i] else '') for i in picks]\n"
            "in_band = [zeros[i, :counts[i]][np.abs(zeros[i, :counts[i]]) < nyquist] for i in picks]\n"
            "fig = plotting.pole_zero_map(*models, labels=labels, zeros=in_band,\n"
            "                             title='Conveyor drives: poles and in-band zeros')\n"
            "fig.axes[0].set_xlim(-70, 45);"
        ),
        new_markdown_cell(
            "**What the zero costs.** The frequency response of the whole fleet in one call "
            "(Hessenberg solves, all cores): the flagged units have the same gain curve but a phase "
            "that keeps falling past the belt mode, which is what limits their loop bandwidth."
        ),
        new_code_cell(
            "w = np.logspace(-1, np.log10(nyquist), 300)\n"
            "H = sw.frequency_response_batch(Ac, Bc, Cc, Dc, w)[:, :, 0, 0]\n"
            "# a check outside the tool: unit 0 by a direct complex solve of (jwI - A) x = B with numpy\n"
            "direct = [(Cc[0] @ np.linalg.solve(1j * x * np.eye(3) - Ac[0], Bc[0]) + Dc[0])[0, 0] for x in w]\n"
            "assert np.allclose(H[0], direct, rtol=1e-9)\n"
            "fig, (top, bottom) = plt.subplots(2, 1, sharex=True, figsize=(7, 5))\n"
            "groups = [(~flagged, '-', 'C0', 'sensor at the drive'),\n"
            "          (flagged, '--', 'C1', 'sensor past the belt span')]\n"
            "for group, style, colour, label in groups:\n"
            "    phase = np.degrees(np.unwrap(np.angle(H[group]), axis=1))\n"
            "    for k, (g, ph) in enumerate(zip(np.abs(H[group])[:25], phase[:25])):\n"
            "        top.loglog(w, g, style, color=colour, alpha=0.5, label=label if k == 0 else None)\n"
            "        bottom.semilogx(w, ph, style, color=colour, alpha=0.5)\n"
            "top.set_ylabel('gain ((m/s)/(N m))'); top.legend()\n"
            "top.set_title('Fleet frequency response (25 units per group)')\n"
            "bottom.set_ylabel('phase (deg)'); bottom.set_xlabel('frequency (rad/s)')"
        ),
    ]
    return _notebook(cells)


def parametric_two_mass_drive() -> nbformat.NotebookNode:
    cells = [
        new_markdown_cell(
            "# A hand derivation with named parameters: the two-mass drive of a film winder\n\n"
            "*Scenario (invented):* on a film-winding line a servo motor (inertia $J_1$) turns the "
            "take-up roll (inertia $J_2$) through a long drive shaft of stiffness $k$ and damping $b$. "
            "The commissioning engineer derived the transfer functions from motor torque $T$ to motor "
            "speed $\\omega_1$ and to roll speed $\\omega_2$ by hand, with the parameters as symbols. "
            "We check that derivation: the state-space model from Newton's law, its transfer matrix "
            "computed with the parameters kept as symbols (Faddeev–LeVerrier over polynomials in "
            "$J_1, J_2, k, b$, in the Rust core), compared with the hand result, then a canonical form "
            "with parameters and what the shaft stiffness does to the frequency response.\n\n"
            "States: shaft twist $\\theta_1 - \\theta_2$, motor speed $\\omega_1$, roll speed "
            "$\\omega_2$. With the shaft torque $k(\\theta_1 - \\theta_2) + b(\\omega_1 - \\omega_2)$:\n\n"
            "$$J_1 \\dot\\omega_1 = T - k(\\theta_1 - \\theta_2) - b(\\omega_1 - \\omega_2), \\qquad "
            "J_2 \\dot\\omega_2 = k(\\theta_1 - \\theta_2) + b(\\omega_1 - \\omega_2).$$"
        ),
        new_code_cell(
            SETUP + "import sympy as sp\n\n"
            "J1, J2, k, b = sp.symbols('J1 J2 k b', positive=True)\n"
            "s = sp.Symbol('s')\n"
            "A = sp.Matrix([[0, 1, -1], [-k / J1, -b / J1, b / J1], [k / J2, b / J2, -b / J2]])\n"
            "B = sp.Matrix([[0], [1 / J1], [0]])\n"
            "C = sp.Matrix([[0, 1, 0], [0, 0, 1]])          # motor speed, roll speed\n"
            "D = sp.zeros(2, 1)\n"
            "num, den = sw.parametric_transfer_function(A, B, C, D, s)\n"
            "den.as_expr()"
        ),
        new_markdown_cell(
            "**The hand derivation**, with the shaft as an impedance $k/s + b$:\n\n"
            "$$\\frac{\\omega_1}{T} = \\frac{J_2 s^2 + b s + k}{s\\,(J_1 J_2 s^2 + (J_1 + J_2)(b s + k))}, \\qquad "
            "\\frac{\\omega_2}{T} = \\frac{b s + k}{s\\,(J_1 J_2 s^2 + (J_1 + J_2)(b s + k))}.$$\n\n"
            "Both agree with the computed transfer matrix (sympy's `cancel` of the difference is zero):"
        ),
        new_code_cell(
            "common = s * (J1 * J2 * s ** 2 + (J1 + J2) * (b * s + k))\n"
            "by_hand = [(J2 * s ** 2 + b * s + k) / common, (b * s + k) / common]\n"
            "for i, g in enumerate(by_hand):\n"
            "    assert sp.cancel(num[i, 0].as_expr() / den.as_expr() - g) == 0\n"
            "resonance = sp.solve(sp.cancel(den.as_expr() / s).subs(b, 0), s)\n"
            "anti_resonance = sp.solve(num[0, 0].as_expr().subs(b, 0), s)\n"
            "print('undamped resonance:     ', resonance)\n"
            "print('undamped anti-resonance:', anti_resonance)\n"
            "num[0, 0].as_expr()"
        ),
        new_markdown_cell(
            "**An independent check** (identity): substituting numbers for the parameters must give the "
            "transfer function of the substituted model, recovered in exact rational arithmetic without "
            "any symbols."
        ),
        new_code_cell(
            "from fractions import Fraction\n"
            "values = {J1: sp.Rational(3, 200), J2: sp.Rational(9, 40), k: sp.Integer(42), b: sp.Rational(3, 50)}\n"
            "to_fraction = lambda x: Fraction(int(sp.numer(x)), int(sp.denom(x)))\n"
            "numbers = [np.array([[to_fraction(x) for x in row] for row in M.subs(values).tolist()], dtype=object)\n"
            "           for M in (A, B, C, D)]\n"
            "num_q, den_q = sw.transfer_function(*numbers, exact=True)\n"
            "den_sub = sp.Poly(den.as_expr().subs(values), s)\n"
            "assert [to_fraction(x) for x in den_sub.all_coeffs()] == list(den_q)\n"
            "for i in range(2):\n"
            "    num_sub = sp.Poly(num[i, 0].as_expr().subs(values), s).all_coeffs()\n"
            "    coeffs = list(num_q[i, 0])\n"
            "    lead = len(coeffs) - len(num_sub)\n"
            "    assert [to_fraction(x) for x in num_sub] == coeffs[lead:] and not any(coeffs[:lead])\n"
            "print('substituted parametric result == exact recovery of the substituted model')"
        ),
        new_markdown_cell(
            "**A canonical form with parameters.** The roll-speed transfer function realized in the "
            "controllable canonical form keeps the parameters in its entries (each in lowest terms), so "
            "a block diagram drawn from it can be labelled with $J_1, J_2, k, b$; its transfer function "
            "is the hand result again."
        ),
        new_code_cell(
            "roll = sw.realize_expression(by_hand[1], s, 'controllable_canonical')\n"
            "n_roll, d_roll = sw.parametric_transfer_function(roll.a, roll.b, roll.c, roll.d, s)\n"
            "assert sp.cancel(n_roll[0, 0].as_expr() / d_roll.as_expr() - by_hand[1]) == 0\n"
            "print('parameters:', roll.info['parameters'])\n"
            "roll"
        ),
        new_markdown_cell(
            "**What the shaft stiffness does.** With the inertias of this line ($J_1$ = 0.015 kg m², "
            "$J_2$ = 0.225 kg m²) and a light damping, three candidate shafts: the resonance "
            "$\\sqrt{k (J_1 + J_2)/(J_1 J_2)}$ moves with $\\sqrt{k}$, and the motor-speed "
            "anti-resonance $\\sqrt{k / J_2}$ with it."
        ),
        new_code_cell(
            "line = {J1: sp.Rational(3, 200), J2: sp.Rational(9, 40), b: sp.Rational(3, 50)}\n"
            "models, labels = [], []\n"
            "for stiffness in (12, 42, 150):\n"
            "    values = {**line, k: stiffness}\n"
            "    motor = (A, B, C[0, :], D[0, :])   # torque to motor speed\n"
            "    models.append(tuple(np.array(M.subs(values).tolist(), dtype=float) for M in motor))\n"
            "    labels.append(f'motor speed, k = {stiffness} N m/rad')\n"
            "w = np.logspace(0, 3, 600)\n"
            "fig = plotting.frequency_response_plot(*models, labels=labels, frequencies=w,\n"
            "                                       gain_unit='(rad/s)/(N m)',\n"
            "                                       title='Film winder: motor speed per torque')\n"
            "peaks = [w[np.argmax(np.abs(sw.frequency_response(*m, w)[:, 0, 0]))] for m in models]\n"
            "expected = [float(sp.sqrt(kk * (line[J1] + line[J2]) / (line[J1] * line[J2]))) for kk in (12, 42, 150)]\n"
            "assert np.allclose(peaks, expected, rtol=0.02), (peaks, expected)"
        ),
    ]
    return _notebook(cells)


NOTEBOOKS = {
    "01_canonical_forms.ipynb": canonical_forms,
    "02_hidden_modes.ipynb": hidden_modes,
    "03_fleet_batch.ipynb": fleet,
    "04_identified_impulse_response.ipynb": identified_impulse_response,
    "05_jordan_and_multivariable_forms.ipynb": jordan_by_hand,
    "06_identified_fleet_in_seconds.ipynb": identified_fleet_in_seconds,
    "07_parametric_two_mass_drive.ipynb": parametric_two_mass_drive,
}


if __name__ == "__main__":
    for name, make in NOTEBOOKS.items():
        nbformat.write(make(), HERE / name)
        print("wrote", HERE / name)

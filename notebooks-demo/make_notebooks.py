"""Writes the demo notebooks (stored without outputs). Run: python notebooks-demo/make_notebooks.py"""

from pathlib import Path

import nbformat
from nbformat.v4 import new_code_cell, new_markdown_cell, new_notebook

HERE = Path(__file__).parent


def canonical_forms() -> nbformat.NotebookNode:
    cells = [
        new_markdown_cell(
            "# From a differential equation to every canonical form\n\n"
            "*Scenario (invented data):* the lift axis of a small scissor platform. A fit of its "
            "valve-command-to-height response gave the differential equation\n\n"
            "$$0.5\\,\\dddot y + 3\\,\\ddot y + 5.5\\,\\dot y + 3\\,y = 2\\,\\dot u + 6\\,u$$\n\n"
            "so $G(s) = \\dfrac{2s + 6}{0.5 s^3 + 3 s^2 + 5.5 s + 3}$. We realize it in every "
            "canonical form, check the hand derivation in exact arithmetic, and simulate."
        ),
        new_code_cell(
            "import numpy as np\n"
            "import matplotlib\n"
            "matplotlib.use('Agg')\n"
            "import matplotlib.pyplot as plt\n"
            "from scipy import signal\n"
            "import sympy as sp\n"
            "import statewright as sw\n\n"
            "num, den = [2, 6], [0.5, 3, 5.5, 3]"
        ),
        new_markdown_cell(
            "Phase variables $x_1 = z, x_2 = \\dot z, x_3 = \\ddot z$ of $a(p) z = u$, "
            "$y = c(p) z$: the controllable canonical form. In a notebook it shows as typeset matrices."
        ),
        new_code_cell("r = sw.realize(num, den, 'controllable_canonical')\nr"),
        new_markdown_cell(
            "The same model in exact arithmetic, with the coefficients as they were written "
            "down, and the hand derivation checked by sympy: $C(sI-A)^{-1}B + D$ must equal $G(s)$."
        ),
        new_code_cell(
            "re = sw.realize(['2', '6'], ['0.5', '3', '5.5', '3'], 'controllable_canonical', exact=True)\n"
            "s = sp.symbols('s')\n"
            "A, B, C, D = (sp.Matrix(m.tolist()) for m in re)\n"
            "G_state = sp.simplify((C * (s * sp.eye(3) - A).inv() * B)[0, 0] + D[0, 0])\n"
            "G_given = (2 * s + 6) / (sp.Rational(1, 2) * s**3 + 3 * s**2 + sp.Rational(11, 2) * s + 3)\n"
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
            "    print(f'{f:24s} poles {np.round(rf.poles().real, 6)}  num {np.round(n_rec[0, 0], 12)}  den {d_rec}')"
        ),
        new_markdown_cell(
            "The proper case: a biproper lead network $K(s) = (3s + 12)/(s + 24)$ has a direct "
            "term $D = 3$ and strictly proper remainder $(12 - 24\\cdot 3)/(s + 24)$."
        ),
        new_code_cell("sw.realize([3, 12], [1, 24], 'controller')"),
        new_markdown_cell(
            "Simulation with SciPy from each realization: the step responses coincide (they are "
            "the same input-output model), and the pole map shows the three real modes."
        ),
        new_code_cell(
            "t = np.linspace(0, 6, 400)\n"
            "fig, (ax1, ax2) = plt.subplots(1, 2, figsize=(10, 3.5))\n"
            "for f, rf in realizations.items():\n"
            "    _, y = signal.step(signal.StateSpace(*rf), T=t)\n"
            "    ax1.plot(t, y, label=f, alpha=0.7)\n"
            "ax1.set_xlabel('time [s]'); ax1.set_ylabel('platform height [m]'); ax1.legend(fontsize=7)\n"
            "ax1.set_title('step response, every form')\n"
            "p = realizations['modal'].poles()\n"
            "ax2.plot(p.real, p.imag, 'x', ms=10)\n"
            "ax2.axvline(0, color='k', lw=0.5); ax2.axhline(0, color='k', lw=0.5)\n"
            "ax2.set_xlabel('real'); ax2.set_ylabel('imaginary'); ax2.set_title('poles')\n"
            "fig.tight_layout()\n"
            "ys = [signal.step(signal.StateSpace(*rf), T=t)[1] for rf in realizations.values()]\n"
            "assert max(np.max(np.abs(y - ys[0])) for y in ys) < 1e-9"
        ),
    ]
    nb = new_notebook(cells=cells)
    nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3", "language": "python"}
    return nb


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
            "import numpy as np\n"
            "import matplotlib\n"
            "matplotlib.use('Agg')\n"
            "import matplotlib.pyplot as plt\n"
            "import statewright as sw\n\n"
            "rng = np.random.default_rng(12)\n"
            "# Decoupled construction (hidden below): 9 controllable+observable states, 1 controllable but\n"
            "# unobservable (drive thermal state), 2 uncontrollable but observable (idler resonance).\n"
            "blocks = [np.array([[-0.2, 8.0], [-8.0, -0.2]]), np.array([[-1.0, 3.0], [-3.0, -1.0]]),\n"
            "          np.array([[-5.0]]), np.array([[-0.5, 1.5], [-1.5, -0.5]]), np.array([[-12.0, 2.0], [-2.0, -12.0]])]\n"
            "co = np.zeros((9, 9)); k = 0\n"
            "for blk in blocks:\n"
            "    s = blk.shape[0]; co[k:k+s, k:k+s] = blk; k += s\n"
            "a0 = np.zeros((12, 12)); a0[:9, :9] = co\n"
            "a0[9, 9] = -0.05                       # drive thermal state: controllable, unobservable\n"
            "a0[10:, 10:] = [[-0.02, 25.0], [-25.0, -0.02]]   # idler resonance: uncontrollable\n"
            "a0[9, :9] = 0.3 * rng.standard_normal(9)          # heated by the drive currents\n"
            "a0[:9, 10:] = 0.2 * rng.standard_normal((9, 2))   # the resonance shakes the web (observable)\n"
            "b0 = np.zeros((12, 2)); b0[:10] = rng.standard_normal((10, 2))\n"
            "c0 = np.zeros((2, 12)); c0[:, :9] = rng.standard_normal((2, 9)); c0[:, 10:] = rng.standard_normal((2, 2))\n"
            "# Physical coordinates: an invertible mixing of all states.\n"
            "t_phys = np.linalg.qr(rng.standard_normal((12, 12)))[0] @ np.diag(np.linspace(1, 3, 12))\n"
            "a = np.linalg.solve(t_phys, a0 @ t_phys); b = np.linalg.solve(t_phys, b0); c = c0 @ t_phys\n"
            "d = np.zeros((2, 2))\n"
            "np.count_nonzero(np.abs(a) < 1e-12), a.shape   # no visible structure"
        ),
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
            "keeps a value of order 1e-12, eleven decades lower, barely above the default tolerance "
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
            "ax1.spy(np.abs(s.a) > 1e-12 * np.abs(s.a).max(), markersize=6)\n"
            "ax1.axhline(s.rank - 0.5, color='r'); ax1.axvline(s.rank - 0.5, color='r')\n"
            "ax1.set_title('staircase form: Q^T A Q (red: controllable part)')\n"
            "for i, sv in enumerate(s.singular_values):\n"
            "    ax2.semilogy([i + 1] * len(sv), np.maximum(sv, 1e-18), 'o')\n"
            "ax2.axhline(s.tol, color='r', ls='--', label='tol')\n"
            "ax2.set_xlabel('staircase step'); ax2.set_ylabel('singular values of the step block'); ax2.legend()\n"
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
            "full = sw.Realization(a, b, c, d).evaluate(w)\n"
            "small = m.evaluate(w)\n"
            "print('states', m.n_states, ' max difference of the frequency responses', np.max(np.abs(full - small)))\n"
            "assert m.n_states == 9 and np.max(np.abs(full - small)) < 1e-9\n"
            "print('poles of the hidden parts:', np.round(np.linalg.eigvals(k.realization.a[9:, 9:]), 4))"
        ),
        new_markdown_cell(
            "Why not the rank of the controllability matrix? Its singular values spread like powers of "
            "the eigenvalue magnitudes (here 0.02 to 25): below they cover sixteen decades with no clean "
            "gap. numpy's default threshold happens to land on 10 for this model, but with faster or "
            "slower modes it calls a controllable model uncontrollable (the test suite shows such a "
            "case); the staircase's margins stay readable."
        ),
        new_code_cell(
            "kmat = sw.controllability_matrix(a, b)\n"
            "sv = np.linalg.svd(kmat, compute_uv=False)\n"
            "print('singular values of [B, AB, ..., A^11 B]:', np.array2string(sv, precision=2))\n"
            "print('numpy rank of it:', np.linalg.matrix_rank(kmat), ' (the staircase says', s.rank, ')')"
        ),
    ]
    nb = new_notebook(cells=cells)
    nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3", "language": "python"}
    return nb


def fleet() -> nbformat.NotebookNode:
    cells = [
        new_markdown_cell(
            "# A fleet of identified pump models, in one batch\n\n"
            "*Scenario (invented data):* 2,000 circulation pumps of a district-heating network, each "
            "identified from a speed-command step test as a 4th-order transfer function from motor "
            "speed command to differential pressure. Some fits are over-parameterised: a pole and a "
            "zero nearly coincide (a mode the test never excited). We realize all models in one "
            "call, recover their transfer functions, find the redundant modes and keep minimal models."
        ),
        new_code_cell(
            "import numpy as np\n"
            "import matplotlib\n"
            "matplotlib.use('Agg')\n"
            "import matplotlib.pyplot as plt\n"
            "from scipy import signal\n"
            "import statewright as sw\n\n"
            "rng = np.random.default_rng(2024)\n"
            "count = 2000\n"
            "# Invented identification results: two dominant real poles (pump and pipe), a lightly\n"
            "# damped pair (water hammer), and for a quarter of the units a zero that cancels one pole.\n"
            "dens, nums, redundant = [], [], []\n"
            "for i in range(count):\n"
            "    p1, p2 = -rng.uniform(0.5, 2.0), -rng.uniform(4.0, 9.0)\n"
            "    wn, zeta = rng.uniform(15, 30), rng.uniform(0.05, 0.2)\n"
            "    den = np.polymul(np.polymul([1, -p1], [1, -p2]), [1, 2 * zeta * wn, wn ** 2])\n"
            "    cancels = rng.random() < 0.25\n"
            "    z = p2 if cancels else -rng.uniform(20, 40)\n"
            "    num = rng.uniform(50, 80) * np.polymul([1, -z], [1, 30.0])\n"
            "    dens.append(den); nums.append(num); redundant.append(cancels)\n"
            "den = np.array(dens); num = np.array(nums); redundant = np.array(redundant)\n"
            "num.shape, den.shape, redundant.sum()"
        ),
        new_markdown_cell("One call realizes the whole fleet (all cores, GIL released); one call recovers the transfer functions."),
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
            "Structure of each model: a cancelled pole shows up as a mode the output cannot see "
            "(the realization is controllable by construction). The singular values behind each "
            "decision are kept, so the borderline cases can be inspected."
        ),
        new_code_cell(
            "minimal_orders = np.array([sw.minimal_realization(A[i], B[i], C[i], D[i], tol=1e-8).n_states\n"
            "                           for i in range(count)])\n"
            "print('minimal orders found:', dict(zip(*np.unique(minimal_orders, return_counts=True))))\n"
            "assert np.array_equal(minimal_orders == 3, redundant)\n"
            "fig, (ax1, ax2) = plt.subplots(1, 2, figsize=(10, 4))\n"
            "ax1.hist(minimal_orders, bins=[2.5, 3.5, 4.5], rwidth=0.6)\n"
            "ax1.set_xticks([3, 4]); ax1.set_xlabel('minimal order'); ax1.set_ylabel('pumps')\n"
            "ax1.set_title('redundant modes found in the fleet')\n"
            "poles = np.concatenate([np.roots(d) for d in den[:300]])\n"
            "ax2.plot(poles.real, poles.imag, '.', ms=3, alpha=0.5)\n"
            "ax2.set_xlabel('real'); ax2.set_ylabel('imaginary'); ax2.set_title('poles of 300 pumps')\n"
            "fig.tight_layout()"
        ),
        new_markdown_cell("A reduced model responds exactly like the full one: step responses simulated with SciPy."),
        new_code_cell(
            "i = int(np.flatnonzero(redundant)[0])\n"
            "full = sw.Realization(A[i], B[i], C[i], D[i])\n"
            "small = sw.minimal_realization(*full, tol=1e-8)\n"
            "t = np.linspace(0, 4, 400)\n"
            "_, y_full = signal.step(full.to_scipy(), T=t)\n"
            "_, y_small = signal.step(small.to_scipy(), T=t)\n"
            "plt.figure(figsize=(6, 3.5))\n"
            "plt.plot(t, y_full, label=f'full ({full.n_states} states)')\n"
            "plt.plot(t, y_small, '--', label=f'minimal ({small.n_states} states)')\n"
            "plt.xlabel('time [s]'); plt.ylabel('pressure [kPa]'); plt.legend(); plt.title(f'pump {i}')\n"
            "print('max difference', np.max(np.abs(y_full - y_small)))\n"
            "assert np.max(np.abs(y_full - y_small)) < 1e-6 * np.max(np.abs(y_full))"
        ),
        new_markdown_cell("The minimal model of that pump, as typeset matrices:"),
        new_code_cell("small"),
    ]
    nb = new_notebook(cells=cells)
    nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3", "language": "python"}
    return nb


def identified_impulse_response() -> nbformat.NotebookNode:
    cells = [
        new_markdown_cell(
            "# From a noisy multi-input impulse response to a balanced, truncated model\n\n"
            "*Scenario (invented data):* a two-zone drying oven with two heater inputs and two "
            "temperature outputs, sampled every 5 s. A pulse test gave 60 samples of its impulse "
            "response (Markov parameters), with sensor noise. We realize a model from the samples "
            "(Ho–Kalman: SVD of the block Hankel matrix), pick the order at the gap of the Hankel "
            "singular values, balance it, truncate it, and compare the a-priori error bound with "
            "the actual error."
        ),
        new_code_cell(
            "import numpy as np\n"
            "import matplotlib\n"
            "matplotlib.use('Agg')\n"
            "import matplotlib.pyplot as plt\n"
            "import statewright as sw\n\n"
            "rng = np.random.default_rng(5)\n"
            "# The 'true' oven (hidden from the identification): 6 states, discrete time.\n"
            "poles = np.array([0.97, 0.9, 0.75, 0.5, 0.3, 0.1])\n"
            "t = np.linalg.qr(rng.standard_normal((6, 6)))[0]\n"
            "a_true = t @ np.diag(poles) @ t.T\n"
            "b_true = rng.standard_normal((6, 2)) * np.array([[1.0], [0.8], [0.5], [0.2], [0.05], [0.01]])\n"
            "c_true = rng.standard_normal((2, 6))\n"
            "d_true = np.zeros((2, 2))\n"
            "k = 60\n"
            "markov = np.empty((k, 2, 2)); markov[0] = d_true\n"
            "power = np.eye(6)\n"
            "for i in range(1, k):\n"
            "    markov[i] = c_true @ power @ b_true; power = a_true @ power\n"
            "noisy = markov + 2e-4 * rng.standard_normal(markov.shape)\n"
            "noisy[0] = 0.0   # no direct feedthrough, known from the physics"
        ),
        new_code_cell(
            "r_full = sw.realize_markov(noisy, order=None, tol=5e-3)\n"
            "sv = r_full.info['singular_values']\n"
            "order = r_full.n_states\n"
            "plt.figure(figsize=(6, 3.5))\n"
            "plt.semilogy(np.arange(1, len(sv) + 1), sv, 'o-')\n"
            "plt.axvline(order + 0.5, color='r', ls='--', label=f'chosen order {order}')\n"
            "plt.xlabel('index'); plt.ylabel('Hankel singular value'); plt.legend()\n"
            "plt.title('the gap between signal and noise')\n"
            "print('order chosen:', order, ' singular values around the gap:', np.round(sv[order - 2:order + 2], 5))"
        ),
        new_markdown_cell(
            "Balance the identified model (equal, diagonal Gramians) and truncate to the states that "
            "carry most of the input-output energy. The a-priori bound on the truncation error is twice "
            "the sum of the discarded Hankel singular values."
        ),
        new_code_cell(
            "keep = 4   # the Hankel singular values drop by a factor of 30 after the fourth\n"
            "r_bal = sw.balanced_realization(*r_full, order=keep, discrete=True)\n"
            "hsv = r_bal.info['hankel_singular_values']\n"
            "bound = r_bal.info['error_bound']\n"
            "w = np.exp(1j * np.linspace(0, np.pi, 2000))\n"
            "err = np.max(np.linalg.norm(r_full.evaluate(w) - r_bal.evaluate(w), ord=2, axis=(1, 2)))\n"
            "print('Hankel singular values:', np.round(hsv, 5))\n"
            "print(f'kept {keep} states: actual error (max over the unit circle) {err:.3e} <= bound {bound:.3e}')\n"
            "assert err <= bound * (1 + 1e-9)"
        ),
        new_code_cell(
            "steps = np.arange(k)\n"
            "def impulse(r, n):\n"
            "    a, b, c, d = (np.asarray(x, dtype=float) for x in r)\n"
            "    out = np.empty((n, c.shape[0], b.shape[1])); out[0] = d\n"
            "    p = np.eye(a.shape[0])\n"
            "    for i in range(1, n):\n"
            "        out[i] = c @ p @ b; p = a @ p\n"
            "    return out\n"
            "fig, axes = plt.subplots(2, 2, figsize=(10, 6), sharex=True)\n"
            "for i in range(2):\n"
            "    for j in range(2):\n"
            "        ax = axes[i, j]\n"
            "        ax.plot(steps * 5, noisy[:, i, j], '.', ms=3, label='measured (noisy)')\n"
            "        ax.plot(steps * 5, impulse(r_full, k)[:, i, j], label=f'identified ({order} states)')\n"
            "        ax.plot(steps * 5, impulse(r_bal, k)[:, i, j], '--', label=f'balanced, truncated ({keep})')\n"
            "        ax.set_title(f'heater {j + 1} -> zone {i + 1}'); ax.set_xlabel('time [s]')\n"
            "axes[0, 0].legend(fontsize=7)\n"
            "fig.tight_layout()"
        ),
        new_markdown_cell("The truncated model, as typeset matrices:"),
        new_code_cell("r_bal"),
    ]
    nb = new_notebook(cells=cells)
    nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3", "language": "python"}
    return nb


if __name__ == "__main__":
    nbformat.write(canonical_forms(), HERE / "01_canonical_forms.ipynb")
    nbformat.write(hidden_modes(), HERE / "02_hidden_modes.ipynb")
    nbformat.write(fleet(), HERE / "03_fleet_batch.ipynb")
    nbformat.write(identified_impulse_response(), HERE / "04_identified_impulse_response.ipynb")
    print("wrote", HERE / "01_canonical_forms.ipynb", HERE / "02_hidden_modes.ipynb")

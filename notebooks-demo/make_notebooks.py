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


if __name__ == "__main__":
    nbformat.write(canonical_forms(), HERE / "01_canonical_forms.ipynb")
    print("wrote", HERE / "01_canonical_forms.ipynb")

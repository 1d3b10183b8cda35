"""The main job on built-in example data: realize a few plant and controller models in the
canonical forms and get their transfer functions back.

Run with ``python -m statewright.demo``. The models are invented for this demo (a
packaging-line conveyor drive, its lead compensator and a climate-chamber heater); they
do not describe any real equipment.
"""

from __future__ import annotations

import numpy as np

import statewright as sw

FORMS = (
    "controllable_canonical",
    "observable_canonical",
    "controller",
    "observer",
    "controllability",
    "observability",
    "modal",
)


def _poly(coeffs: np.ndarray) -> str:
    n = len(coeffs) - 1
    terms = []
    for k, c in enumerate(coeffs):
        if c == 0:
            continue
        power = n - k
        s = "" if power == 0 else ("s" if power == 1 else f"s^{power}")
        terms.append(f"{float(c):+.6g}{'' if not s else ' ' + s}")
    return " ".join(terms) if terms else "0"


def _banner(title: str) -> None:
    print("\n" + title)
    print("-" * len(title))


def main() -> None:
    np.set_printoptions(precision=5, suppress=True, linewidth=100)

    # 1. Conveyor drive, from a step-response fit (invented numbers): motor current to belt speed,
    #    G(s) = (0.8 s + 12) / (0.05 s^3 + 1.1 s^2 + 6 s + 4). Strictly proper, non-monic.
    num, den = [0.8, 12.0], [0.05, 1.1, 6.0, 4.0]
    _banner("Conveyor drive G(s) = (0.8 s + 12) / (0.05 s^3 + 1.1 s^2 + 6 s + 4)")
    for form in FORMS:
        r = sw.realize(num, den, form)
        rn, rd, acc = sw.transfer_function(*r, return_accuracy=True)
        err = np.max(np.abs(rn[0, 0] - np.array([0, 0, 16.0, 240.0])))
        print(f"\n{form}:  poles {np.round(r.poles(), 4)}")
        print("A =\n", r.a, "\nB =", r.b.ravel(), " C =", r.c.ravel(), " D =", r.d.ravel())
        print(
            f"  recovered num {_poly(rn[0, 0])} / den {_poly(rd)}  (max coefficient error {err:.1e}; {acc['method']})"
        )
        if form == "modal":
            print(
                f"  eigenvector condition {r.info['eigenvector_condition']:.3g} (limit {r.info['condition_limit']:.3g})"
            )

    # 2. Lead compensator: biproper, so the direct term D comes from the division.
    _banner("Lead compensator K(s) = (2.5 s + 10) / (s + 20): the proper case")
    r = sw.realize([2.5, 10.0], [1.0, 20.0])
    print(r)
    print("D = 2.5 is the high-frequency gain; C = 10 - 20 * 2.5 = -40 is the strictly proper remainder.")

    # 3. Climate-chamber heater with coefficients from a datasheet, kept exact.
    _banner("Climate chamber, exact: (0.3 s + 1/7) / (s^2 + 0.9 s + 0.18)")
    r = sw.realize(["0.3", "1/7"], ["1", "0.9", "0.18"], "observer", exact=True)
    print(r)
    num_e, den_e = r.transfer_function()
    print("recovered exactly:", [str(x) for x in num_e[0, 0]], "/", [str(x) for x in den_e])

    # 4. A two-input, two-output model: transfer matrix from state space.
    _banner("Two-zone oven (two heaters, two thermocouples): transfer matrix")
    a = np.array([[-0.5, 0.1, 0.0], [0.1, -0.4, 0.05], [0.0, 0.05, -0.8]])
    b = np.array([[1.0, 0.0], [0.0, 0.0], [0.0, 0.7]])
    c = np.array([[1.0, 0.0, 0.0], [0.0, 0.0, 1.0]])
    d = np.zeros((2, 2))
    mnum, mden, acc = sw.transfer_function(a, b, c, d, return_accuracy=True)
    print("common denominator:", _poly(mden))
    for i in range(2):
        for j in range(2):
            print(f"  G[{i},{j}] numerator: {_poly(mnum[i, j])}")
    print(f"method: {acc['method']}, relative error bound {acc['relative_error_bound']:.1e}")

    # 5. Why the default method exists: eigenvalues spread over four decades.
    _banner("Fast and slow modes: characteristic polynomial accuracy")
    rng = np.random.default_rng(7)
    poles = -np.logspace(-2, 2, 10)
    t = rng.standard_normal((10, 10))
    a = t @ np.diag(poles) @ np.linalg.inv(t)
    exact = sw.characteristic_polynomial(a, method="exact")
    for method in ("auto", "recursion"):
        got = sw.characteristic_polynomial(a, method=method)
        rel = np.max(np.abs(got - exact) / np.abs(exact))
        print(f"  method={method!r:12s} max relative coefficient error vs exact: {rel:.1e}")
    print("  numpy.poly (eigenvalue route):", f"{np.max(np.abs(np.poly(a) - exact) / np.abs(exact)):.1e}")
    print("\nModels from this tool must be validated before they drive real equipment.")


if __name__ == "__main__":
    main()

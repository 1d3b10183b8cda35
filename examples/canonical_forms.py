"""Canonical forms by hand and by statewright: a repeated pole in the Jordan form, the modal
form of a stiff model, and the controllability indices of a two-input model.

    python examples/canonical_forms.py
"""

import numpy as np

import statewright as sw

# A heater with a double time constant of 1 s and a sensor lag of 1/3 s, (s + 2) over
# (s + 1)^2 (s + 3). By hand: G = 1/4/(s + 1) + 1/2/(s + 1)^2 - 1/4/(s + 3).
j = sw.realize([1, 2], [1, 5, 7, 3], "jordan", exact=True)
print("Jordan form, exact")
print("A =", j.a.tolist())
print("B =", [str(x) for x in j.b[:, 0]], " C =", [str(x) for x in j.c[0]])
for f, m, nums in zip(j.info["factors"], j.info["multiplicities"], j.info["residues"]):
    print(
        "  factor",
        [str(x) for x in f],
        "multiplicity",
        m,
        "numerators of orders 1..m:",
        [[str(x) for x in p] for p in nums],
    )

jf = sw.realize([1.0, 2.0], [1.0, 5.0, 7.0, 3.0], "jordan")
print("float: poles", jf.info["poles"], "multiplicities", jf.info["multiplicities"])
print("       cluster spread", jf.info["cluster_spread"], "transfer error", jf.info["transfer_error"])

# A stiff loop: time constants 1e-8 s and 1e8 s. The modal form keeps the slow pole.
m = sw.realize([1.0], [1.0, 1e8, 1.0], "modal")
dc = (m.d - m.c @ np.linalg.solve(m.a, m.b))[0, 0]
print("\nModal form of 1/(s^2 + 1e8 s + 1): poles", np.diag(m.a), "DC gain", dc)
print("  pole separation", m.info["pole_separation"], "estimated pole error", m.info["pole_error"])

# Two inputs: a double integrator on the first, a first-order lag on the second.
a = [[0.0, 1.0, 0.0], [0.0, 0.0, 0.0], [0.0, 0.0, -1.0]]
b = [[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]]
st = sw.controllability_staircase(a, b)
print("\nStaircase step sizes", st.blocks, "-> controllability indices", st.controllability_indices())

"""Two-mass drive: the parametric transfer functions checked against a hand derivation.

A motor (inertia J1) drives a load (inertia J2) through an elastic shaft (stiffness k,
damping b). States: shaft twist theta1 - theta2, motor speed w1, load speed w2; input: motor
torque T; outputs: motor speed and load speed. Newton's second law for each mass, with the
shaft torque k (theta1 - theta2) + b (w1 - w2):

    J1 w1' = T - k (theta1 - theta2) - b (w1 - w2)
    J2 w2' =     k (theta1 - theta2) + b (w1 - w2)

Hand derivation (Laplace transform, shaft impedance z = k/s + b):

    w1 / T = (J2 s^2 + b s + k) / (s (J1 J2 s^2 + (J1 + J2)(b s + k)))
    w2 / T = (b s + k)          / (s (J1 J2 s^2 + (J1 + J2)(b s + k)))

so the load sees the shaft as a low-pass filter, and the motor speed has an
anti-resonance at sqrt(k / J2) and a resonance at sqrt(k (J1 + J2) / (J1 J2)).

Run: python scripts/two_mass_drive.py   (prints the results and checks them; exit status 0)
"""

import sympy

import statewright as sw


def main() -> None:
    J1, J2, k, b = sympy.symbols("J1 J2 k b", positive=True)
    s = sympy.Symbol("s")
    a = sympy.Matrix([[0, 1, -1], [-k / J1, -b / J1, b / J1], [k / J2, b / J2, -b / J2]])
    bm = sympy.Matrix([[0], [1 / J1], [0]])
    c = sympy.Matrix([[0, 1, 0], [0, 0, 1]])  # motor speed, load speed
    d = sympy.zeros(2, 1)

    num, den = sw.parametric_transfer_function(a, bm, c, d, s)
    print("det(sI - A) =", den.as_expr())
    print("motor speed numerator:", num[0, 0].as_expr())
    print("load speed numerator: ", num[1, 0].as_expr())

    common = s * (J1 * J2 * s**2 + (J1 + J2) * (b * s + k))
    motor_by_hand = (J2 * s**2 + b * s + k) / common
    load_by_hand = (b * s + k) / common
    assert sympy.cancel(num[0, 0].as_expr() / den.as_expr() - motor_by_hand) == 0
    assert sympy.cancel(num[1, 0].as_expr() / den.as_expr() - load_by_hand) == 0
    print("both agree with the hand derivation")

    # The resonance and anti-resonance from the factors of the results
    resonance = sympy.solve(sympy.cancel(den.as_expr() / s).subs(b, 0), s)
    anti = sympy.solve(num[0, 0].as_expr().subs(b, 0), s)
    print("undamped resonance s =", resonance, " anti-resonance s =", anti)

    # A canonical form of the load-speed transfer function, entries in the parameters
    r = sw.realize_expression(load_by_hand, s, "controllable_canonical")
    print("controllable canonical A =", r.a.tolist())
    print("C =", r.c.tolist())


if __name__ == "__main__":
    main()

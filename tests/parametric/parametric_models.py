"""Seeded parametric test models and sympy's own exact route, shared by the parametric tests.

The reference transfer matrix is computed by sympy alone, independently of statewright:
``det(sI - A)`` and ``adj(sI - A)`` by sympy's Berkowitz method (division-free
determinant expansion), ``C adj(sI - A) B + det(sI - A) D`` multiplied out, and every
coefficient of ``s`` brought to lowest terms by ``sympy.cancel``.
"""

import random
from fractions import Fraction

import sympy


def symbols(count):
    """``count`` parameter symbols p0, p1, ... (positive, as physical parameters are)."""
    return sympy.symbols(f"p0:{count}", positive=True)


def _entry(rng, params, density):
    """A random entry: zero, an integer, a parameter, a product, a ratio or a quotient by a sum."""
    if rng.random() > density:
        return sympy.Integer(0)
    kind = rng.randrange(6)
    p = rng.choice(params)
    q = rng.choice(params)
    k = sympy.Rational(rng.randint(-4, 4) or 1, rng.randint(1, 3))
    if kind == 0:
        return k
    if kind == 1:
        return k * p
    if kind == 2:
        return k * p * q
    if kind == 3:
        return p / q
    if kind == 4:
        return k / p
    return p / (q + 1)


def random_model(seed, n, p_count, m=1, p=1, density=0.5):
    """(A, B, C, D, params) as sympy Matrices with entries in ``p_count`` parameters."""
    rng = random.Random(seed)
    params = symbols(p_count)
    a = sympy.Matrix(n, n, lambda i, j: _entry(rng, params, density))
    b = sympy.Matrix(n, m, lambda i, j: _entry(rng, params, 0.7))
    c = sympy.Matrix(p, n, lambda i, j: _entry(rng, params, 0.7))
    d = sympy.Matrix(p, m, lambda i, j: _entry(rng, params, 0.3))
    return a, b, c, d, params


def sympy_transfer_function(a, b, c, d, s):
    """(num, den) by sympy's exact route: num a (p, m) nested list and den a list, each of
    coefficient lists highest power of s first, every coefficient cancelled."""
    n = a.shape[0]
    pencil = s * sympy.eye(n) - a
    den_expr = sympy.expand(pencil.det(method="berkowitz"))
    adjugate = pencil.adjugate(method="berkowitz")
    num_matrix = (c * adjugate * b + den_expr * d).applyfunc(sympy.expand)

    def coefficients(expr):
        poly = sympy.Poly(expr, s)
        coeffs = [sympy.cancel(x) for x in poly.all_coeffs()]
        return [sympy.Integer(0)] * (n + 1 - len(coeffs)) + coeffs

    den = coefficients(den_expr)
    num = [[coefficients(num_matrix[i, j]) for j in range(num_matrix.shape[1])] for i in range(num_matrix.shape[0])]
    return num, den


def random_point(seed, params):
    """Random nonzero rationals for the parameters."""
    rng = random.Random(seed)
    return {x: sympy.Rational(rng.randint(1, 9), rng.randint(1, 7)) for x in params}


def fraction_matrix(m, point):
    """A sympy Matrix with the point substituted, as nested lists of Fractions."""
    out = []
    for i in range(m.shape[0]):
        row = []
        for j in range(m.shape[1]):
            v = sympy.Rational(m[i, j].subs(point))
            row.append(Fraction(int(v.p), int(v.q)))
        out.append(row)
    return out


def two_mass_drive():
    """A two-mass drive: motor inertia J1, load inertia J2, shaft stiffness k and damping b.

    States (shaft twist theta1 - theta2, motor speed w1, load speed w2); input the motor
    torque; outputs motor speed and load speed. Newton's second law for each mass with the
    shaft torque k (theta1 - theta2) + b (w1 - w2).
    """
    J1, J2, k, b = sympy.symbols("J1 J2 k b", positive=True)
    a = sympy.Matrix([[0, 1, -1], [-k / J1, -b / J1, b / J1], [k / J2, b / J2, -b / J2]])
    bm = sympy.Matrix([[0], [1 / J1], [0]])
    c = sympy.Matrix([[0, 1, 0], [0, 0, 1]])
    d = sympy.zeros(2, 1)
    return a, bm, c, d, (J1, J2, k, b)

"""Compact canonical forms: c * N / D with primitive integer polynomials,
one fraction bar, the sign in the constant."""

from __future__ import annotations

import pathlib

import pytest
import sympy

from criticality import Model, hopf

GOLDEN = pathlib.Path(__file__).parent / "golden"


@pytest.fixture(scope="module")
def brusselator():
    m = Model(["x", "y"], {"x": "A - (B+1)*x + x^2*y", "y": "B*x - x^2*y"},
              {"A": "positive", "B": "positive"}, name="Brusselator")
    return m, hopf(m, "B")


def _primitive_integer_factors(expr) -> bool:
    """Every factor other than the rational constant is a polynomial with
    integer coefficients and content 1 (or a power of one)."""
    for factor in sympy.Mul.make_args(expr):
        if factor.is_Rational:
            continue
        base = factor.base if factor.is_Pow and factor.exp.is_Integer else factor
        poly = sympy.Poly(base, *sorted(base.free_symbols, key=str))
        if not all(c.is_Integer for c in poly.coeffs()) or poly.primitive()[0] != 1:
            return False
    return True


def test_brusselator_critical_value_and_l1(brusselator):
    """B_c = 1 + A^2 (Prigogine and Lefever, "Symmetry breaking instabilities
    in dissipative systems II", J. Chem. Phys. 48, 1968), and l1 prints as
    -(A^2 + 2)/(2 A (2 A^2 + 1)) with one fraction bar (the value: a hand
    derivation with the planar formula of Guckenheimer and Holmes 1983,
    Section 3.4, from memory; checked here against the closed form exactly)."""
    m, r = brusselator
    A = m.symbols["A"]
    assert sympy.expand(r.critical_value - (1 + A ** 2)) == 0
    assert sympy.cancel(r.l1 + (A ** 2 + 2) / (2 * A * (2 * A ** 2 + 1))) == 0
    assert str(r.l1) == "-(A**2 + 2)/(2*A*(2*A**2 + 1))"
    assert _primitive_integer_factors(r.l1)
    assert str(r.l1).count("/") == 1


def test_brusselator_latex_golden(brusselator):
    """The LaTeX block equals the golden file (one \\frac per coefficient)."""
    _, r = brusselator
    assert r.to_latex() + "\n" == (GOLDEN / "brusselator.tex").read_text()
    l1_row = next(row for row in r.to_latex().splitlines() if row.startswith("\\ell_{1}"))
    assert l1_row.count("\\frac") == 1


def test_constant_is_never_distributed_over_a_lone_sum():
    """-(a + 2)/2 keeps its factor: the constant is not spread into the sum
    (common practice, no source)."""
    from criticality.algebra.signs import SignContext

    a = sympy.Symbol("a", real=True)
    out = SignContext({a: "positive"}).factored(-(a + 2) / 2).as_expr()
    assert str(out) == "-(a + 2)/2"
    assert sympy.expand(out + (a + 2) / 2) == 0


def test_every_rational_quantity_is_compact():
    """On a three-state model every rational quantity has primitive integer
    factors and a rational constant."""
    m = Model(["x", "v", "w"], {"x": "v", "v": "-x - k3*x^3 - zeta*v + w",
                                "w": "(g*v - w)/tau"},
              {"g": "positive", "zeta": "positive", "tau": "positive", "k3": "real"})
    r = hopf(m, "g", equilibrium={"x": 0, "v": 0, "w": 0})
    for q in (r.critical_value, r.omega_squared, r.transversality, r.q_norm_squared,
              *r.cycle.amplitude_coefficients.values()):
        assert _primitive_integer_factors(q), q


def test_displays_are_compact(brusselator):
    """Im c1 (a sum after splitting c1) is shown with one fraction bar and a
    primitive numerator in the text and the LaTeX."""
    from criticality.algebra.canonical import compact
    from criticality.outputs.render import split_complex

    _, r = brusselator
    im = split_complex(r.c1)[1]
    assert str(compact(im)) == "-(4*A**4 - 7*A**2 + 4)/(6*A*(2*A**2 + 1))"
    assert sympy.cancel(compact(im) - im) == 0
    row = next(line for line in r.details().splitlines() if line.startswith("Im c1"))
    assert row.split(None, 2)[2] == "-(4*A**4 - 7*A**2 + 4)/(6*A*(2*A**2 + 1))"
    assert "- \\frac{4 A^{4} - 7 A^{2} + 4}{6 A \\left(2 A^{2} + 1\\right)}" in r.to_latex()


def test_repeated_logarithm_is_named_once():
    """A logarithm that occurs in several quantities is printed as L_1 and
    defined once, after the first block that uses it."""
    m = Model(["x", "y"], {"x": "mu*x - y - log(1 + k/a)*x^3 + x*y",
                           "y": "x + mu*y - log(1 + k/a)*y^3 + a*x^2"},
              {"mu": "real", "k": "positive", "a": "positive"})
    r = hopf(m, "mu", equilibrium={"x": 0, "y": 0})
    tex = r.to_latex()
    assert "\\ell_{1} &= - \\frac{3 L_{1}}{2}" in tex
    assert tex.count("L_{1} &= \\log{\\left(1 + \\frac{k}{a} \\right)}") == 1
    report = r.to_report()
    assert report.count("L_{1} &= ") == 1 and "L_{1}" in report


def test_repeated_logarithm_is_named_once_in_text():
    """In the text summary and details a long repeated logarithm is L1, with
    its definition shown once."""
    m = Model(["x", "y"], {"x": "mu*x - y - log(1 - m/(a*e))*x^3 + x*y",
                           "y": "x + mu*y - log(1 - m/(a*e))*y^3 + a*x^2"},
              {"mu": "real", "m": "positive", "a": "positive", "e": "positive"})
    r = hopf(m, "mu", equilibrium={"x": 0, "y": 0})
    for text in (str(r), r.details()):
        assert text.count("L1 = log(1 - m/(a*e))") == 1
        assert "l1 = Re(c1)/omega           -3*L1/2" in text
        assert text.count("log(") == 1


def test_roots_of_quotients_stay_real_where_the_quotient_is_positive():
    """A square root of N/D with D of unknown sign is one root of the quotient:
    sqrt(N)/sqrt(D) would be the root of two negative numbers at points where
    both are negative. Food chain (invented): R' = R(1 - R/K) - R C,
    C' = C (R - m) - 2 C P/(1 + C), P' = eps P (2 C/(1 + C) - d); at K = 7/2,
    m = 9/10, d = 3/4 omega and l1 evaluate in real float arithmetic
    (math module) to the exact values (common practice, no source)."""
    import math

    from criticality import Model, hopf

    m = Model(["R", "C", "P"], {"R": "R*(1 - R/K) - R*C", "C": "C*(R - m) - 2*C*P/(1 + C)",
                                "P": "eps*P*(2*C/(1 + C) - d)"},
              {"K": "positive", "m": "positive", "d": "positive", "eps": "positive"})
    r = hopf(m, "eps", equilibrium={"R": "K*(1 - d/(2 - d))", "C": "d/(2 - d)",
                                    "P": "(K*(1 - d/(2 - d)) - m)*(1 + d/(2 - d))/2"})
    S = m.symbols
    args = [S["K"], S["m"], S["d"]]
    point = (3.5, 0.9, 0.75)
    exact = r.evaluate({"K": "7/2", "m": "9/10", "d": "3/4"}, digits=20)
    omega = sympy.lambdify(args, r.omega, "math")(*point)
    l1 = sympy.lambdify(args, r.l1, "math")(*point)
    assert math.isclose(omega, float(exact.omega), rel_tol=1e-12)
    assert math.isclose(l1, float(exact.l1), rel_tol=1e-9)


def test_a_side_condition_with_an_irrational_coefficient_is_no_polynomial():
    """A side condition such as (5 - sqrt(5)) a - 8 > 0 has no polynomial over
    QQ; a sign is then decided without it instead of stopping the analysis
    with a coercion failure (common practice, no source)."""
    from criticality.algebra.signs import NEGATIVE, POSITIVE, UNDECIDED, SignContext

    a, k = sympy.symbols("a k", real=True)
    ctx = SignContext({a: "positive", k: "real"},
                      ((5 - sympy.sqrt(5)) * a / 8 - 1,))
    assert ctx.polynomial_sign(a + 1) == POSITIVE
    assert ctx.polynomial_sign(-a**2 - 2) == NEGATIVE
    assert ctx.polynomial_sign(a - k) == UNDECIDED

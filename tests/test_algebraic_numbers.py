"""Critical sets of any degree: Hopf branches over K[mu]/(m), certified signs
of algebraic numbers, and their agreement with independent evaluations."""

import mpmath
import pytest
import sympy

from criticality import Model, hopf, hopf_all
from criticality.algebra.algebraic import AlgebraicExtension, RealAlgebraicRoot
from criticality.algebra.certified import certified_sign
from criticality.algebra.flint_field import FlintRationalField, FlintRationalFunctionField
from criticality.algebra.quadratic import QuadraticExtension, lower

from reference_numeric import numeric_first_lyapunov

REACTOR = {"x": "a - x*y^2/(1 + q*y)", "y": "x*y^2/(1 + q*y) - b*y"}


def _reactor():
    return Model(states=["x", "y"], equations=REACTOR,
                 parameters={"a": "positive", "b": "positive", "q": "positive"})


def _independent_l1(model, values, critical, equilibrium, digits=25, parameter=None):
    """l1 by the mpmath projection formula at the numeric critical point."""
    sym = model.symbols
    at = {sym[k]: v for k, v in values.items()}
    at[sym[parameter or ("b" if "b" in sym else "mu")]] = critical
    eqs = [e.xreplace(at) for e in model.equations]
    point = {sym[k]: sympy.Float(mpmath.nstr(v, digits + 15), digits + 15)
             if isinstance(v, mpmath.mpf) else sympy.N(v, digits + 15) for k, v in equilibrium.items()}
    return numeric_first_lyapunov(eqs, [sym[s] for s in model.states], point, digits)[1]


def test_extension_arithmetic_reduces_modulo_the_defining_polynomial():
    """In Q(a)[t]/(t^3 - a^2) products reduce by t^3 = a^2 and inverses are
    exact (common practice, no source)."""
    a = sympy.Symbol("a")
    K = FlintRationalFunctionField([a])
    A = K.gens[0]
    L = AlgebraicExtension(K, [-A ** 2, K.zero, K.zero, K.one], "t")
    t = L.gen
    assert t ** 3 == L(A ** 2)
    x = 1 + A * t - t * t
    assert (1 / x) * x == L.one
    assert lower(t ** 6) == A ** 4
    nu_field = QuadraticExtension(L, -(t * t + 1), "nu")
    nu = nu_field.gen
    assert lower((t + nu) * (t - nu)) == 2 * t * t + 1


def test_certified_signs_of_numbers_with_radicals():
    """Signs of algebraic numbers are decided exactly: -153 + 3*sqrt(5051) > 0
    (sqrt(5051) = 71.07..., hand computation), and the real root of
    t^3 - 3t + 1 in (1, 2) is 2 cos(2 pi/9) = 1.532... (casus irreducibilis,
    trigonometric solution of the cubic; common practice, no source)."""
    Q = FlintRationalField()
    S = QuadraticExtension(Q, Q(5051), "s")
    assert certified_sign(3 * S.gen - 153) == 1
    assert certified_sign(153 - 3 * S.gen) == -1
    from fractions import Fraction
    L = AlgebraicExtension(Q, [Q(1), Q(-3), Q(0), Q(1)], "t", interval=(Fraction(1), Fraction(2)))
    t = L.gen
    r = mpmath.mpf(2) * mpmath.cos(2 * mpmath.pi / 9)
    assert abs(r - mpmath.mpf("1.5320888862379560")) < 1e-15
    assert certified_sign(t - Fraction(15320888862379560, 10 ** 16)) == 1
    assert certified_sign(t - Fraction(15320888862379561, 10 ** 16)) == -1
    assert certified_sign(t * t * t - 3 * t + 1) == 0


@pytest.mark.slow
def test_cube_root_critical_value_in_the_reactor_family():
    """The invented autocatalytic reactor with q = 1/10 has its Hopf point
    where b^3 = a^2 (a cube root, once refused as 'no closed form').  Its l1
    at a = 1 and a = 8 agrees with an independent mpmath evaluation of the
    n-dimensional projection formula (Kuznetsov, Elements of Applied
    Bifurcation Theory, 3rd ed., 2004, Section 3.5, Eq. (3.20))."""
    model = _reactor()
    r = hopf(model, "b", values={"q": "1/10"})
    assert isinstance(r.critical_value, RealAlgebraicRoot)
    assert r.routes_agree
    # proved on the whole family a > 0: the root is continuous (discriminant,
    # leading and constant coefficient never vanish) and the resultants with
    # omega^2 and the transversality never vanish (common practice, no source)
    assert all(c.status == "holds" for c in r.conditions)
    for a, b_c in ((1, 1), (8, 4)):
        e = r.evaluate(a=a, digits=30)
        assert abs(e.critical_value - b_c) < 1e-25
        ref = _independent_l1(model, {"a": a, "q": sympy.Rational(1, 10)}, sympy.Integer(b_c),
                              e.equilibrium)
        assert abs(e.l1 - ref) < 1e-20 * abs(ref)
        assert e.pair_error < 1e-20


@pytest.mark.slow
def test_irrational_cube_root_at_numeric_values_is_decided():
    """At a = 2 the critical value is the real cube root of 4 (CRootOf); the
    verdict is decided (no open conditions), and the value, l1 and the
    family's evaluation agree with the independent projection formula
    (Kuznetsov 2004, Section 3.5) and with the numeric mode."""
    model = _reactor()
    r = hopf(model, "b", values={"q": "1/10", "a": 2})
    assert isinstance(r.critical_value, sympy.CRootOf)
    assert abs(sympy.N(r.critical_value, 30) - sympy.root(4, 3)) < 1e-25
    assert r.classification == "supercritical"
    assert all(c.status == "holds" for c in r.conditions)
    fam = hopf(model, "b", values={"q": "1/10"}).evaluate(a=2, digits=30)
    with mpmath.workdps(30):
        assert abs(mpmath.mpf(str(sympy.N(r.l1, 35))) - fam.l1) < mpmath.mpf(10) ** -25
    ref = _independent_l1(model, {"a": 2, "q": sympy.Rational(1, 10)},
                          sympy.N(r.critical_value, 45), fam.equilibrium)
    assert abs(fam.l1 - ref) < 1e-20 * abs(ref)
    guess = {"x": 1.4, "y": 1.25, "b": 1.55}  # within the trust radius of the numeric mode
    num = hopf(model, "b", guess=guess, values={"q": "1/10", "a": 2}, digits=20)
    assert abs(float(num.critical_value) - float(sympy.N(r.critical_value))) < 1e-12
    assert abs(float(num.l1) - float(fam.l1)) < 1e-12


PLANAR = {"x": "{T}*x - y + mu*x^2 - x*y", "y": "x + {T}*y - x^3 + mu*y^2"}


def _planar(T):
    return Model(states=["x", "y"], equations={k: v.format(T=T) for k, v in PLANAR.items()},
                 parameters={"mu": "real"})


@pytest.mark.slow
@pytest.mark.parametrize("T,roots", [
    ("(mu^3 - 3*mu + 1)", 3),     # casus irreducibilis: three real roots, no real radicals
    ("(mu^4 - 5*mu^2 + 5)", 4),   # a quartic that is quadratic in mu^2
])
def test_every_real_root_is_a_branch_with_a_decided_verdict(T, roots):
    """Every real root of an irreducible cubic with three real roots (the
    casus irreducibilis: no expression by real radicals, common practice, no
    source) and of a quartic in mu^2 is one Hopf branch; each verdict is
    decided and l1 agrees with the independent projection formula (Kuznetsov
    2004, Section 3.5) at the root."""
    model = _planar(T)
    results = hopf_all(model, "mu", equilibrium={"x": 0, "y": 0})
    assert len(results) == roots
    assert [r.branch_index for r in results] == list(range(roots))
    assert all(r.branch_count == roots for r in results)
    values = []
    for r in results:
        assert isinstance(r.critical_value, sympy.CRootOf)
        assert r.routes_agree
        assert r.classification in ("supercritical", "subcritical")
        assert all(c.status == "holds" for c in r.conditions)
        mu_c = sympy.N(r.critical_value, 45)
        values.append(mu_c)
        ref = _independent_l1(model, {}, mu_c, {"x": 0, "y": 0})
        with mpmath.workdps(30):
            l1 = mpmath.mpf(str(sympy.N(r.l1, 30)))
            assert abs(l1 - ref) < mpmath.mpf(10) ** -20 * max(1, abs(ref))
        assert (l1 < 0) == (r.classification == "supercritical")
    assert values == sorted(values)


def test_radical_of_the_parameter_in_the_equilibrium():
    """x' = x^2 - x + beta - y, y' = x - y/2 at x0 = 3/2 - sqrt(9 - 4 beta)/2
    (a radical of the bifurcation parameter, once answered with a false 'no
    Hopf point'): the trace 2 x0 - 3/2 vanishes at beta = 27/16 (hand
    computation: sqrt(9 - 4 beta) = 3/2); l1 agrees with the independent
    projection formula (Kuznetsov 2004, Section 3.5) and the numeric mode.
    The other equilibrium (the + root) has no Hopf point: the norm's root is
    rejected there."""
    model = Model(states=["x", "y"], equations={"x": "x^2 - x + beta - y", "y": "x - y/2"},
                  parameters={"beta": "positive"})
    r = hopf(model, "beta", equilibrium={"x": "3/2 - sqrt(9 - 4*beta)/2",
                                         "y": "3 - sqrt(9 - 4*beta)"})
    assert r.critical_value == sympy.Rational(27, 16)
    assert all(c.status == "holds" for c in r.conditions)
    ref = _independent_l1(model, {}, sympy.Rational(27, 16),
                          {"x": sympy.Rational(3, 4), "y": sympy.Rational(3, 2)},
                          parameter="beta")
    with mpmath.workdps(30):
        assert abs(mpmath.mpf(str(sympy.N(r.l1, 30))) - ref) < mpmath.mpf(10) ** -20
    num = hopf(model, "beta", guess={"x": 0.7, "y": 1.4, "beta": 1.6}, digits=20)
    assert abs(float(num.critical_value) - 27 / 16) < 1e-12
    assert abs(float(num.l1) - float(ref)) < 1e-12
    from criticality.errors import NoHopfPointError
    with pytest.raises(NoHopfPointError):
        hopf(model, "beta", equilibrium={"x": "3/2 + sqrt(9 - 4*beta)/2",
                                         "y": "3 + sqrt(9 - 4*beta)"})


def test_radical_of_the_parameter_with_a_quadratic_critical_value():
    """x' = x^2 - x + beta - y, y' = x - beta y at its first equilibrium: the
    norm of the trace gives beta^2 + 5 beta + 2 = 0 (hand computation), whose
    root -5/2 + sqrt(17)/2 is negative: the condition on the declared sign of
    beta is proved to fail."""
    model = Model(states=["x", "y"], equations={"x": "x^2 - x + beta - y", "y": "x - beta*y"},
                  parameters={"beta": "positive"})
    results = hopf_all(model, "beta", equilibrium=0)
    (r,) = results
    assert sympy.simplify(r.critical_value - (-sympy.Rational(5, 2) + sympy.sqrt(17) / 2)) == 0
    assert r.condition("critical_value_admissible").status == "fails"


SELKOV = {"x": "-x + a*y + x^2*y", "y": "b - a*y - x^2*y"}


@pytest.mark.slow
def test_selkov_glycolysis_quartic_critical_set():
    """Sel'kov's glycolysis model in dimensionless form (Sel'kov, Eur. J.
    Biochem. 4 (1968) 79-86; as in Strogatz, Nonlinear Dynamics and Chaos,
    1994, Section 7.3, Example 7.3.2, from memory): the trace vanishes where
    b^4 + (2a - 1) b^2 + a + a^2 = 0, i.e. b^2 = (1 - 2a +- sqrt(1 - 8a))/2.
    In b this quartic is irreducible; its positive roots are the admissible
    branches and come first, each with l1 equal to the independent projection
    formula (Kuznetsov 2004, Section 3.5), and the family's evaluation agrees."""
    model = Model(states=["x", "y"], equations=SELKOV,
                  parameters={"a": "positive", "b": "positive"})
    a = sympy.Rational(1, 10)
    results = hopf_all(model, "b", values={"a": a})
    assert len(results) == 4
    published = sorted(sympy.sqrt((1 - 2 * a + s * sympy.sqrt(1 - 8 * a)) / 2) for s in (-1, 1))
    admissible = [r for r in results
                  if r.condition("critical_value_admissible").status == "holds"]
    assert admissible == list(results[:2])
    assert all(r.condition("critical_value_admissible").status == "fails" for r in results[2:])
    family = hopf_all(model, "b")
    assert len(family) == 2
    for r, b_c, fam in zip(admissible, published, family):
        assert abs(sympy.N(r.critical_value - b_c, 40)) < 1e-35
        assert r.classification == "supercritical"
        assert all(c.status == "holds" for c in r.conditions)
        eq = {k: sympy.N(v.xreplace({model.symbols["b"]: r.critical_value}), 45)
              for k, v in r.equilibrium.items()}
        ref = _independent_l1(model, {"a": a}, sympy.N(r.critical_value, 45), eq)
        with mpmath.workdps(30):
            assert abs(mpmath.mpf(str(sympy.N(r.l1, 30))) - ref) < mpmath.mpf(10) ** -20
        e = fam.evaluate(a=a, digits=30)
        assert abs(e.critical_value - sympy.N(b_c, 30)) < 1e-25
        assert abs(e.l1 - ref) < 1e-20
    assert hopf(model, "b", values={"a": a}).critical_value == results[0].critical_value


WATT_BETA = {"x": "y", "y": "z^2*sin(x)*cos(x) - sin(x) - eps*y", "z": "alpha*(cos(x) - beta)"}


@pytest.mark.slow
def test_watt_governor_without_reparametrisation():
    """The Watt governor as written by Sotomayor, Mello and Braga
    ("Bifurcation analysis of the Watt governor system", Comput. Appl. Math.
    26 (2007); arXiv math/0606230), with cos(x0) = beta and z0 = 1/sqrt(beta):
    sin(acos(beta)) = sqrt(1 - beta^2) and sqrt(beta) are radicals of the
    equilibrium and the critical damping eps = 2 alpha beta^(3/2) (their Hopf
    condition; from memory) needs a radical too.  l1 agrees with the
    reparametrised model (beta = b^2) and with the independent projection
    formula (Kuznetsov 2004, Section 3.5); at numeric values the verdict is
    decided."""
    model = Model(["x", "y", "z"], WATT_BETA,
                  parameters={"eps": "positive", "alpha": "positive", "beta": "positive"})
    eq = {"x": "acos(beta)", "y": 0, "z": "1/sqrt(beta)"}
    r = hopf(model, "eps", equilibrium=eq)
    alpha, beta = model.symbols["alpha"], model.symbols["beta"]
    assert sympy.simplify(r.critical_value - 2 * alpha * beta ** sympy.Rational(3, 2)) == 0
    e = r.evaluate(alpha="1/2", beta="81/100", digits=30)
    sym = model.symbols
    at = {sym["alpha"]: sympy.Rational(1, 2), sym["beta"]: sympy.Rational(81, 100),
          sym["eps"]: sympy.Rational(729, 1000)}
    eqs = [f.xreplace(at) for f in model.equations]
    point = {sym["x"]: sympy.acos(sympy.Rational(81, 100)), sym["y"]: 0,
             sym["z"]: sympy.Rational(10, 9)}
    ref = numeric_first_lyapunov(eqs, [sym["x"], sym["y"], sym["z"]], point, 25)[1]
    assert abs(e.critical_value - mpmath.mpf(729) / 1000) < 1e-14
    assert abs(e.l1 - ref) < 1e-18 * abs(ref)
    fixed = hopf(model, "eps", equilibrium=eq, values={"beta": "1/2", "alpha": 1})
    assert fixed.critical_value == sympy.sqrt(2) / 2
    assert fixed.classification == "supercritical"
    assert all(c.status == "holds" for c in fixed.conditions)


def _random_critical_model(seed):
    """A planar model whose trace vanishes on an irreducible polynomial of
    degree 2 to 4 in mu with real roots, and random mu-dependent
    nonlinear terms (invented test data)."""
    import random
    rng = random.Random(seed)
    mu = sympy.Symbol("mu")
    while True:
        degree = rng.choice((2, 3, 4))
        T = sympy.Add(*[rng.randint(-4, 4) * mu ** k for k in range(degree)]) + mu ** degree
        poly = sympy.Poly(T, mu)
        if poly.is_irreducible and poly.count_roots() >= 1:
            break
    c = [rng.choice((-2, -1, 1, 2, 3)) for _ in range(4)]
    eqs = {"x": f"({T})*x - y + {c[0]}*mu*x^2 + {c[1]}*x*y - x^3",
           "y": f"x + ({T})*y + {c[2]}*y^2 + {c[3]}*mu*x^2*y"}
    return Model(states=["x", "y"], equations=eqs, parameters={"mu": "real"}), poly


@pytest.mark.slow
@pytest.mark.parametrize("seed", [1, 3, 4, 7])
def test_random_critical_sets_of_degree_two_to_four(seed):
    """On random models with critical sets of degree 2 to 4 both arithmetic
    backends (python-flint and the pure-sympy stand-in) give the same
    branches, the two series routes agree, l1 equals the independent
    projection formula (Kuznetsov 2004, Section 3.5) and the numeric mode
    started near each root reproduces it."""
    model, poly = _random_critical_model(seed)
    flint_results = hopf_all(model, "mu", equilibrium={"x": 0, "y": 0})
    sympy_results = hopf_all(model, "mu", equilibrium={"x": 0, "y": 0}, backend="sympy")
    assert len(flint_results) == len(sympy_results) == poly.count_roots()
    for r, s in zip(flint_results, sympy_results):
        assert r.routes_agree and s.routes_agree
        mu_c = sympy.N(r.critical_value, 45)
        assert abs(mu_c - sympy.N(s.critical_value, 45)) < 1e-40
        with mpmath.workdps(30):
            l1 = mpmath.mpf(str(sympy.N(r.l1, 35)))
            assert abs(l1 - mpmath.mpf(str(sympy.N(s.l1, 35)))) < mpmath.mpf(10) ** -25
            ref = _independent_l1(model, {}, mu_c, {"x": 0, "y": 0})
            assert abs(l1 - ref) < mpmath.mpf(10) ** -20 * max(1, abs(ref))
        guess = {"x": 0.001, "y": 0.001, "mu": float(mu_c) + 1e-3}
        num = hopf(model, "mu", guess=guess, digits=20)
        assert abs(float(num.critical_value) - float(mu_c)) < 1e-12
        assert abs(float(num.l1) - float(l1)) < 1e-10 * max(1, abs(float(l1)))

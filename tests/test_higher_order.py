"""Lyapunov coefficients beyond the first: the normalization method
(criticality.local.lyapunov), its exact agreement with the center-manifold route and
with the published closed formula for c2, and which coefficients are invariant
under the choices left open at the resonant orders."""

from fractions import Fraction

import pytest
import sympy

from criticality import Model, hopf
from criticality.hopf_analysis.engine import run_engine
from criticality.local.prepare import prepare_system
from criticality.local.lyapunov import complex_normal_form, normalization_series
from criticality.local.second_coefficient import formula_c1_c2

from test_routes_agree import random_hopf_model

NF = {"x": "mu*x - w*y + (a1*x - b1*y)*(x^2 + y^2) + (a2*x - b2*y)*(x^2 + y^2)^2"
           " + (a3*x - b3*y)*(x^2 + y^2)^3",
      "y": "w*x + mu*y + (b1*x + a1*y)*(x^2 + y^2) + (b2*x + a2*y)*(x^2 + y^2)^2"
           " + (b3*x + a3*y)*(x^2 + y^2)^3"}


def _normal_form_model():
    return Model(states=["x", "y"], equations=NF,
                 parameters={"mu": "real", "w": "positive", "a1": "real", "b1": "real",
                             "a2": "real", "b2": "real", "a3": "real", "b3": "real"})


def _branch(model, order, parameter="mu"):
    mu = model.symbols[parameter]
    problem = prepare_system(tuple(model.equations), tuple(model.state_symbols),
                      tuple(model.parameter_symbols), mu, tuple(0 for _ in model.states), order)
    return run_engine(problem).branches[0]


def test_normal_form_coefficients_read_off():
    """z' = (mu + i w) z + c1 z|z|^2 + c2 z|z|^4 + c3 z|z|^6 with z = x + i y:
    the unit-eigenvector convention gives 2^k c_k, so l_k = 2^k Re(c_k)/w
    (the normal form itself: common practice, no source; the factor 2^k is the
    documented change from z = x + i y, where <q, q> = 1/2)."""
    r = hopf(_normal_form_model(), "mu", equilibrium={"x": 0, "y": 0}, order=7)
    a1, b1, a2, a3, w = (r.model.symbols[s] for s in ("a1", "b1", "a2", "a3", "w"))
    assert sympy.simplify(r.c1 - 2 * (a1 + sympy.I * b1)) == 0
    assert sympy.simplify(r.l1 - 2 * a1 / w) == 0
    assert sympy.simplify(r.l2 - 4 * a2 / w) == 0
    assert sympy.simplify(r.lyapunov_coefficients[2] - 8 * a3 / w) == 0
    assert r.routes_agree


def test_imaginary_parts_of_the_normal_form():
    """The imaginary parts come back too: c2 = 4 (a2 + i b2) exactly, from all
    three routes (common practice, no source)."""
    bc = _branch(_normal_form_model(), 5)
    tower = bc.branch.tower
    c2 = bc.c_complex[1]
    m = _normal_form_model()
    a2, b2 = m.symbols["a2"], m.symbols["b2"]
    w = m.symbols["w"]
    assert sympy.simplify(tower.to_sympy(c2.a) - 4 * a2) == 0
    # c2.b is the coefficient of nu = i w
    assert sympy.simplify(tower.to_sympy(c2.b) * w - 4 * b2) == 0


@pytest.mark.slow
@pytest.mark.parametrize("n,seed,symbolic", [(2, 1, False), (3, 2, False), (4, 3, True),
                                              (3, 7, True), (5, 4, False)])
def test_normalization_method_equals_center_manifold_route(n, seed, symbolic):
    """c1, c2, c3 from the normalization method equal the center-manifold
    route's exactly, real and imaginary parts, at any point (not only where
    l1 = 0): both routes make the same choice at the resonant orders."""
    model, _ = random_hopf_model(n, seed, symbolic=symbolic)
    bc = _branch(model, 7)
    assert len(bc.c_complex) == 3
    assert all(a == b for a, b in zip(bc.c_complex, bc.c_center))
    assert bc.routes_agree


@pytest.mark.slow
@pytest.mark.parametrize("n,seed,symbolic", [(2, 5, False), (3, 6, True), (4, 8, False),
                                              (5, 11, False)])
def test_published_formula_for_c2_agrees(n, seed, symbolic):
    """The closed formula for G32 (Kuznetsov, Numerical normalization
    techniques for all codim 2 bifurcations of equilibria in ODE's, SIAM J.
    Numer. Anal. 36, 1999, Bautin case; c2 = G32/12) equals the
    normalization method's c2 exactly on random models."""
    model, _ = random_hopf_model(n, seed, symbolic=symbolic)
    bc = _branch(model, 5)
    eb = bc.eigenbasis
    c1, c2 = formula_c1_c2(bc.taylor, eb)
    assert c1 / eb.qq == bc.c_complex[0] == bc.c1_projection
    assert c2 / eb.qq ** 2 == bc.c_complex[1]


def test_published_formula_at_a_point_where_l1_vanishes():
    """On a random model with a symbolic cubic coefficient k, solve l1 = 0 for
    k (l1 is affine in k) and compare l2 from the formula (Kuznetsov, SIAM J.
    Numer. Anal. 36, 1999) with the normalization method there."""
    model, origin = random_hopf_model(3, 21, symbolic=False)
    k = sympy.Symbol("k", real=True)
    x1 = model.state_symbols[0]
    eqs = {s: e + (k * x1 ** 3 if i == 1 else 0)
           for i, (s, e) in enumerate(zip(model.states, model.equations))}
    base = Model(states=list(model.states), equations=eqs, parameters={"mu": "real", "k": "real"})
    r = hopf(base, "mu", equilibrium=origin)
    kk = base.symbols["k"]
    roots = sympy.solve(r.l1, kk)
    assert len(roots) == 1
    at = base.with_values(k=roots[0])
    bc = _branch(at, 5)
    assert bc.c_complex[0].a == 0 or not bc.c_complex[0].a
    eb = bc.eigenbasis
    _, c2 = formula_c1_c2(bc.taylor, eb)
    assert c2 / eb.qq ** 2 == bc.c_complex[1] == bc.c_center[1]
    assert (c2 / eb.qq ** 2).a != 0


def _shift(series, other, k):
    return other.c[k] - series.c[k]


def test_choices_at_resonant_orders_what_is_invariant():
    """alpha_1 changes c2 by conj(alpha_1) c1 - alpha_1 conj(c1) (purely
    imaginary: Re c2 invariant even where Re c1 != 0); alpha_2 changes Re c3 by
    -2 Re(c1) Re(alpha_2) (derivation in criticality.local.lyapunov; common
    practice, no source)."""
    model, _ = random_hopf_model(3, 2)
    bc = _branch(model, 7)
    N, eb = bc.eigenbasis.nu_field, bc.eigenbasis
    base = normalization_series(bc.taylor, eb, 7)
    assert base.c[0].a  # Re c1 != 0 here
    for alpha in (N.element(Fraction(1, 3), 0), N.element(0, Fraction(2, 5)),
                  N.element(Fraction(-3, 7), Fraction(1, 2))):
        other = normalization_series(bc.taylor, eb, 7, choices={1: alpha})
        assert other.c[0] == base.c[0]
        c1 = base.c[0]
        assert _shift(base, other, 1) == alpha.conjugate() * c1 - alpha * c1.conjugate()
        assert not _shift(base, other, 1).a
    alpha2 = N.element(Fraction(5, 3), Fraction(1, 4))
    other = normalization_series(bc.taylor, eb, 7, choices={2: alpha2})
    assert other.c[1] == base.c[1]
    assert _shift(base, other, 2).a == -2 * base.c[0].a * alpha2.a


def test_re_c3_invariant_only_where_re_c1_and_re_c2_vanish():
    """With Re c1 = Re c2 = 0 no choice at the resonant orders moves Re c3 (the formal invariants of the
    radial equation; common practice, no source)."""
    flat = Model(states=["x", "y"], parameters={"mu": "real"}, equations={
        "x": "mu*x - y - 2*y*(x^2 + y^2) + (x^2 + y^2)^3*x",
        "y": "x + mu*y + 2*x*(x^2 + y^2) + (x^2 + y^2)^3*y"})
    bc = _branch(flat, 7)
    eb, N = bc.eigenbasis, bc.eigenbasis.nu_field
    base = normalization_series(bc.taylor, eb, 7)
    assert not base.c[0].a and not base.c[1].a and base.c[2].a
    alpha = N.element(Fraction(1, 3), Fraction(1, 5))
    for choice in ({1: alpha}, {2: alpha}, {1: alpha, 2: N.element(2, 1)}):
        other = normalization_series(bc.taylor, eb, 7, choices=choice)
        assert other.c[2].a == base.c[2].a


def test_re_c1_zero_re_c2_nonzero_case_moves_re_c3():
    """A field with Re c1 = 0 and Re c2 != 0: alpha_1 moves Re c3 by a
    multiple of Re c2 (so l3 is not invariant there)."""
    m = Model(states=["x", "y"], parameters={"mu": "real"}, equations={
        "x": "mu*x - y - y*(x^2 + y^2) - x*(x^2 + y^2)^2",
        "y": "x + mu*y + x*(x^2 + y^2) - y*(x^2 + y^2)^2"})
    bc = _branch(m, 7)
    eb, N = bc.eigenbasis, bc.eigenbasis.nu_field
    base = normalization_series(bc.taylor, eb, 7)
    assert not base.c[0].a and base.c[1].a
    other = normalization_series(bc.taylor, eb, 7, choices={1: N.element(Fraction(1, 2), 0)})
    assert other.c[2].a != base.c[2].a


def test_hopf_order_seven_reports_three_coefficients():
    """hopf(order=7) fills l1, l2, l3 and checks all routes."""
    model, origin = random_hopf_model(3, 5)
    r = hopf(model, "mu", equilibrium=origin, order=7)
    assert len(r.lyapunov_coefficients) == 3 and r.l2 is not None
    assert r.routes_agree


def test_complex_normal_form_rejects_even_order():
    """The order is odd (a resonant degree): a clear error otherwise."""
    model, _ = random_hopf_model(2, 1)
    bc = _branch(model, 5)
    with pytest.raises(ValueError, match="odd"):
        complex_normal_form(bc.taylor, bc.eigenbasis, 4)


def test_planar_normal_form_matches_the_closed_formula():
    """The order-by-order planar normal form gives the same c1 as the closed
    formula c1 = i/(2 omega)(g20 g11 - 2|g11|^2 - |g02|^2/3) + g21/2 (Hassard,
    Kazarinoff and Wan, Theory and Applications of Hopf Bifurcation, 1981;
    Guckenheimer and Holmes, 1983, Section 3.4) on random complex quadratic and
    cubic terms, exactly."""
    import random as _random

    from criticality.algebra.flint_field import FlintRationalField
    from criticality.algebra.quadratic import QuadraticExtension
    from criticality.local.normal_form import hassard_c1, planar_normal_form

    Q = FlintRationalField()
    rng = _random.Random(5)
    for W in (1, 3, 7):
        N = QuadraticExtension(Q, Q(-W), "nu")
        G = {(j, l): N.element(Q(rng.randint(-5, 5)), Q(rng.randint(-5, 5)))
             for j in range(4) for l in range(4) if 2 <= j + l <= 3}
        assert planar_normal_form(G, N, 3)[0] == hassard_c1(G, N, Q(W))

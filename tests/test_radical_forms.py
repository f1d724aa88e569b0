"""Closed forms on request: ``HopfResult.in_radicals()`` turns an algebraic
critical value (a root of a polynomial of degree 3 or 4) into real radicals
where they exist, and into the cosine form for the casus irreducibilis."""

from __future__ import annotations

import mpmath
import pytest
import sympy

from criticality import ClosedFormUnavailableError, Model, hopf, hopf_all
from criticality.algebra.radicals import real_radical_form
from criticality.algebra.signs import context_for
from models import BRUSSELATOR
from reference_numeric import numeric_first_lyapunov

# the invented autocatalytic reactor of tests/test_algebraic_numbers.py: b_c^3 = a^2
REACTOR = Model(["x", "y"], {"x": "a - x*y^2/(1 + y/10)", "y": "x*y^2/(1 + y/10) - b*y"},
                {"a": "positive", "b": "positive"})
# an invented planar family whose Hopf set is the cubic mu^3 - s mu - 1 = 0 (trace zero)
CUBIC = Model(["x", "y"], {"x": "y", "y": "(mu^3 - s*mu - 1)*y - x - x^2*y"}, {"s": "positive"})
SELKOV = Model(["x", "y"], {"x": "-x + a*y + x^2*y", "y": "b - a*y - x^2*y"},
               {"a": "positive", "b": "positive"})


def _close(expr, reference, tol=1e-35):
    """``|expr - reference| < tol`` at 45 digits (``reference`` an mpf)."""
    with mpmath.workdps(45):
        return abs(mpmath.mpf(str(sympy.N(expr, 45))) - reference) < tol


def _reactor_point(a, b):
    """The reactor's equilibrium: y = a/b, x = b (1 + y/10)/y (common practice, no source)."""
    y = a / b
    return {"x": b * (1 + y / 10) / y, "y": y}


@pytest.mark.slow
def test_a_binomial_critical_value_is_a_real_power():
    """b_c^3 = a^2 gives b_c = a^(2/3); l1 in radicals at a = 1 and a = 8 equals
    the independent projection formula (Kuznetsov, Elements of Applied
    Bifurcation Theory, 3rd ed., 2004, Section 3.5), evaluated with mpmath."""
    r = hopf(REACTOR, "b")
    view = r.in_radicals()
    a, b = REACTOR.symbols["a"], REACTOR.symbols["b"]
    assert view.critical_value == a ** sympy.Rational(2, 3)
    assert view.conditions == () and not view.l1.has(sympy.CRootOf)
    (form,) = view.forms.values()
    assert form.how == "binomial"
    for value in (1, 8):
        b_c = sympy.Integer(value) ** sympy.Rational(2, 3)
        point = _reactor_point(sympy.Integer(value), b_c)
        at = {a: value, b: b_c, **{REACTOR.symbols[k]: v for k, v in point.items()}}
        omega, l1, _ = numeric_first_lyapunov(REACTOR.equations, REACTOR.state_symbols, at)
        with mpmath.workdps(30):
            assert abs(mpmath.mpf(str(sympy.N(view.l1.subs(a, value), 35))) - l1) < 1e-25
            assert abs(mpmath.mpf(str(sympy.N(view.omega.subs(a, value), 35))) - omega) < 1e-25


def test_cardano_where_the_cubic_has_one_real_root():
    """mu^3 - s mu - 1 = 0: one real root where 4 s^3 < 27, given by Cardano's
    formula in real radicals (Abramowitz and Stegun, Handbook of Mathematical
    Functions, 1964, 3.8.2); the form states that condition, and at s = 1 and
    s = 1/2 it equals mpmath's polyroots."""
    r = hopf_all(CUBIC, "mu")[0]
    view = r.in_radicals()
    s = CUBIC.symbols["s"]
    assert view.conditions == (sympy.StrictLessThan(4 * s ** 3 - 27, 0),)
    assert next(iter(view.forms.values())).how == "Cardano"
    assert not view.critical_value.has(sympy.Abs, sympy.sign)  # q < 0: one real cube root
    for value in (1, sympy.Rational(1, 2)):
        with mpmath.workdps(40):
            real = [x.real for x in mpmath.polyroots([1, 0, -mpmath.mpf(value), -1],
                                                     extraprec=100) if abs(x.imag) < 1e-30]
            assert len(real) == 1
            assert _close(view.critical_value.subs(s, value), real[0])


def test_the_casus_irreducibilis_has_the_cosine_form_only():
    """At s = 3 the cubic has three real roots: no form in real radicals
    exists (the casus irreducibilis; Hoelder 1891, from memory), so
    in_radicals() refuses and names it; the trigonometric form (Viete; Abramowitz
    and Stegun 1964, 3.8.2) gives each branch, equal to mpmath's polyroots."""
    results = hopf_all(CUBIC, "mu", values={"s": 3})
    assert len(results) == 3
    with mpmath.workdps(40):
        roots = sorted(x.real for x in mpmath.polyroots([1, 0, -3, -1], extraprec=100))
    for k, r in enumerate(sorted(results, key=lambda r: sympy.N(r.critical_value))):
        with pytest.raises(ClosedFormUnavailableError, match="casus irreducibilis"):
            r.in_radicals()
        view = r.in_radicals(trigonometric=True)
        assert view.critical_value.has(sympy.cos) and view.conditions == ()
        assert _close(view.critical_value, roots[k])
        assert abs(sympy.N(view.l1, 30) - sympy.N(r.l1, 30)) < 1e-25


def test_the_family_cosine_form_states_three_real_roots():
    """For symbolic s the cosine form holds where 4 s^3 > 27; at s = 2 each
    branch equals the k-th real root (Abramowitz and Stegun 1964, 3.8.2)."""
    s = CUBIC.symbols["s"]
    with mpmath.workdps(40):
        roots = sorted(x.real for x in mpmath.polyroots([1, 0, -2, -1], extraprec=100))
    for k, r in enumerate(hopf_all(CUBIC, "mu")):
        view = r.in_radicals(trigonometric=True)
        assert view.conditions == (sympy.StrictGreaterThan(4 * s ** 3 - 27, 0),)
        assert _close(view.critical_value.subs(s, 2), roots[k])


@pytest.mark.slow
def test_selkov_quartic_in_b_squared():
    """Sel'kov's glycolysis model (Sel'kov, Eur. J. Biochem. 4 (1968) 79-86;
    Strogatz, Nonlinear Dynamics and Chaos, 1994, Example 7.3.2, from memory):
    b_c^2 = (1 - 2a -+ sqrt(1 - 8a))/2, valid where 1 - 8a > 0."""
    a = SELKOV.symbols["a"]
    published = [(1 - 2 * a + sgn * sympy.sqrt(1 - 8 * a)) / 2 for sgn in (-1, 1)]
    for r, b2 in zip(hopf_all(SELKOV, "b"), published):
        view = r.in_radicals()
        assert view.conditions == (sympy.StrictGreaterThan(1 - 8 * a, 0),)
        assert sympy.simplify(view.critical_value ** 2 - b2) == 0
        assert view.critical_value.is_positive is not False


def test_a_result_without_algebraic_roots_is_unchanged():
    """The Brusselator's B_c = 1 + A^2 (Prigogine and Lefever 1968) has no
    root to convert."""
    r = hopf(BRUSSELATOR, "B")
    view = r.in_radicals()
    assert view.forms == {} and view.conditions == ()
    assert view.critical_value == r.critical_value and view.l1 == r.l1
    assert "critical_value = A**2 + 1" in str(view)


def test_shapes_without_a_real_radical_form_are_refused_by_name():
    """A general quartic is not converted, and a sign proved false is named."""
    x, s = sympy.Dummy("x"), sympy.Symbol("s", positive=True)
    ctx = context_for([s], {s: "positive"})
    with pytest.raises(ClosedFormUnavailableError, match="degree 4"):
        real_radical_form(sympy.Lambda(x, x ** 4 + x + s), 0, None, ctx)
    with pytest.raises(ClosedFormUnavailableError, match="negative under the declared"):
        real_radical_form(sympy.Lambda(x, x ** 3 + s ** 2), 0, 0, ctx)
    with pytest.raises(ClosedFormUnavailableError, match="one real root"):
        real_radical_form(sympy.Lambda(x, x ** 3 - s), 1, None, ctx)
    form = real_radical_form(sympy.Lambda(x, x ** 3 + s), 0, None, ctx)
    assert form.expr == -sympy.cbrt(s) and form.conditions == ()


def test_the_command_line_gives_the_form_or_the_reason(tmp_path, capsys):
    """``analyse --in-radicals`` appends the form and its condition; for the
    casus irreducibilis it names the reason and ``--cosine-form``."""
    from criticality.cli.main import main

    path = tmp_path / "cubic.toml"
    path.write_text('states = ["x", "y"]\nbifurcation_parameter = "mu"\n[parameters]\n'
                    'mu = { assume = "real" }\ns = { assume = "positive" }\n[equations]\n'
                    'x = "y"\ny = "(mu^3 - s*mu - 1)*y - x - x^2*y"\n')
    assert main(["analyse", str(path), "--in-radicals"]) == 0
    out = capsys.readouterr().out
    assert "by the Cardano form of real root 1" in out and "valid where 4*s**3 - 27 < 0" in out
    assert main(["analyse", str(path), "--in-radicals", "--set", "s=3"]) == 0
    assert "casus irreducibilis" in capsys.readouterr().out
    assert main(["analyse", str(path), "--cosine-form", "--set", "s=3"]) == 0
    assert "by the trigonometric form of real root 1" in capsys.readouterr().out

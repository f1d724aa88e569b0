"""The model's symbols: Model.symbols are the symbols results use;
Model.declared_symbols carry the declared assumptions, and
result.with_declared_symbols() speaks in them."""

from __future__ import annotations

import sympy

from criticality import Model, hopf
from models import BRUSSELATOR


def _brusselator():
    return BRUSSELATOR


def test_results_use_model_symbols():
    """Every free symbol of a result is one of Model.symbols."""
    m = _brusselator()
    r = hopf(m, "B")
    own = set(m.symbols.values())
    for e in (r.critical_value, r.omega, r.l1, *r.cycle.amplitudes.values()):
        assert e.free_symbols <= own


def test_a_users_positive_symbol_matches():
    """sympy.Symbol('A', positive=True) substitutes into the declared view
    (B_c = 1 + A^2: Prigogine and Lefever 1968), everywhere, the lazily
    computed Jacobian included."""
    m = _brusselator()
    r = hopf(m, "B").with_declared_symbols()
    A = sympy.Symbol("A", positive=True)
    assert r.critical_value.subs(A, 3) == 10
    assert r.l1.subs(A, 1) == sympy.Rational(-1, 2)
    assert all(s.is_positive for s in r.l1.free_symbols)
    assert r.jacobian.free_symbols == {A}
    assert r.cycle.amplitude_coefficients["x"].subs(A, 1) == sympy.Rational(4, 3)
    assert r.evaluate(A=1).classification == "supercritical"


def test_real_parameters_keep_their_symbols():
    """A model with only real parameters gives back the same result."""
    m = Model(["x", "y"], {"x": "mu*x - y", "y": "x + mu*y - x^2*y"}, {"mu": "real"})
    r = hopf(m, "mu", equilibrium={"x": 0, "y": 0})
    assert r.with_declared_symbols() is r
    assert m.declared_symbols == m.symbols

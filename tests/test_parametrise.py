"""The automatic radical-free parametrisation (eliminate="auto"): the finder,
its use by hopf(), the Hopf condition back in the original parameters, the
outputs and the command line."""

from __future__ import annotations

import json
import os
import pickle
import subprocess
import sys

import mpmath
import pytest
import sympy

from criticality import EquilibriumNotFoundError, Model, hopf
from criticality.algebra.elimination import triangular_eliminations
from criticality.cli.main import main
from criticality.local.parametrise import find_parametrisations
from criticality.outputs.json_io import read_expressions, result_expressions

from models import BRUSSELATOR, BRUSSELATOR_TOML, LORENZ

#: Invented kinetics for these tests (no source): the Brusselator scheme with a
#: second-order loss c x^2 of the intermediate x.  Its positive equilibrium is
#: x* = (sqrt(1 + 4 A c) - 1)/(2 c): a square root of the feed A, the
#: bifurcation parameter.
QUADRATIC_LOSS = Model(["x", "y"], {"x": "A - (B + 1)*x + x^2*y - c*x^2", "y": "B*x - x^2*y"},
                       {"A": "positive", "B": "positive", "c": "positive"})

#: Rosenzweig and MacArthur's predator-prey model with a Holling type II
#: response (M. L. Rosenzweig and R. H. MacArthur, Graphical representation and
#: stability conditions of predator-prey interactions, Am. Nat. 97, 1963).
ROSENZWEIG_MACARTHUR = Model(
    ["x", "y"], {"x": "r*x*(1 - x/K) - a*x*y/(b + x)", "y": "y*(c*a*x/(b + x) - d)"},
    {p: "positive" for p in ("r", "K", "a", "b", "c", "d")})

#: The Gray-Scott reactor (P. Gray and S. K. Scott, Autocatalytic reactions in the
#: isothermal, continuous stirred tank reactor, Chem. Eng. Sci. 38, 1983).
GRAY_SCOTT = Model(["u", "v"], {"u": "F*(1 - u) - u*v^2", "v": "u*v^2 - (F + k)*v"},
                   {"F": "positive", "k": "positive"})


def _sym(name: str, model: Model | None = None, word: str = "real") -> sympy.Symbol:
    """The model's symbol for ``name``, else a coordinate with its sign word."""
    if model is not None and name in model.symbols:
        return model.symbols[name]
    return sympy.Symbol(name, **{word: True})


# -- the finder -----------------------------------------------------------------------------

def test_kernel_solves_one_equation_at_a_time():
    """The elimination kernel finds the triangular order and sets aside the
    single-symbol factor x of b x - x^2 y (the interior branch)."""
    x, y, a, b = sympy.symbols("x y a b")
    (e,) = triangular_eliminations([a - x, b * x - x ** 2 * y], [y, a], required=[a]).found
    assert e.values == {a: x, y: b / x} and e.checked and e.linear
    assert x in e.nonzero


def test_brusselator_is_parametrised_by_x_eq():
    """For the Brusselator in B the equations are linear in (y, A): A = x_eq,
    y = B/x_eq (the classical parametrisation by the steady state x* = A);
    A declared positive makes x_eq positive."""
    best = find_parametrisations(BRUSSELATOR, "B").best
    assert best.unknowns == ("y", "A") and best.kind == "linear"
    x = _sym("x_eq", word="positive")
    assert best.eliminated == (("A", x),)
    assert best.point == (x, _sym("B", BRUSSELATOR) / x)
    assert best.nonzero == (x,)
    assert best.implied == (("x_eq", "positive"),)


def test_the_bifurcation_parameter_is_never_eliminated():
    """Gray-Scott in k: every linear or triangular set would eliminate k
    itself; the finder returns none and says why."""
    search = find_parametrisations(GRAY_SCOTT, "k")
    assert search.best is None and not search.capped
    assert "'F'" in search.reason and "only sets that eliminate 'k'" in search.reason
    with pytest.raises(EquilibriumNotFoundError, match="no radical-free parametrisation"):
        hopf(GRAY_SCOTT, "k", eliminate="auto")


def test_no_parameter_to_eliminate():
    """x' = mu - x^2 has no parameter besides mu: nothing to solve for."""
    m = Model(["x"], {"x": "mu - x^2"}, {"mu": "real"})
    search = find_parametrisations(m, "mu")
    assert search.found == () and "no parameter other than 'mu'" in search.reason


def test_a_parameter_inside_a_function_is_not_linear():
    """I enters only through tanh: no set is linear (sympy's solve would
    invert tanh; the finder does not claim that as radical-free)."""
    m = Model(["u", "w"], {"u": "-u + tanh(a*u - b*w + I)", "w": "eps*(u - c*w)"},
              {"a": "positive", "b": "positive", "eps": "positive", "c": "positive",
               "I": "real"})
    search = find_parametrisations(m, "a")
    assert search.found == () and "inside a function" in search.reason


@pytest.mark.parametrize("constant", ["pi", "sqrt(2)", "sin(1)"])
def test_irrational_constants_are_carried(constant):
    """Constants outside QQ (pi, sqrt(2), sin(1)) are carried through the
    elimination as atoms: a = x_eq^3/(k b) with k the constant (common
    practice, no source)."""
    m = Model(["x", "y"], {"x": f"{constant}*a - x^2*y", "y": "x - b*y"},
              {"a": "positive", "b": "positive"})
    best = find_parametrisations(m, "b").best
    k = m.parse(constant)
    (x,) = best.coordinates
    assert x.name == "x_eq"
    assert sympy.simplify(dict(best.eliminated)["a"] - x ** 3 / (k * _sym("b", m))) == 0


def test_a_zero_denominator_is_no_parametrisation():
    """Rosenzweig-MacArthur in K: b = -x_eq would solve the equations on the
    predator-free branch but makes the denominator b + x vanish; every
    parametrisation found keeps b + x_eq non-zero."""
    found = find_parametrisations(ROSENZWEIG_MACARTHUR, "K").found
    b = _sym("b", ROSENZWEIG_MACARTHUR)

    def x_of(p):
        return next(c for c in p.coordinates if c.name == "x_eq")
    assert found and all(sympy.cancel(v + x_of(p)) != 0 for p in found
                         for n, v in p.eliminated if n == "b")
    assert all(b + x_of(p) in p.nonzero
               for p in found if "y" in p.unknowns)


def test_finder_is_deterministic():
    """The same model gives the same ranked list, call after call."""
    first = [p.describe() for p in find_parametrisations(LORENZ, "r").found]
    again = [p.describe() for p in find_parametrisations(LORENZ, "r").found]
    assert first == again and first[0].startswith("equilibrium coordinate x_eq")


@pytest.mark.slow
def test_finder_does_not_depend_on_the_hash_seed():
    """The ranking and the expressions are the same under two hash seeds."""
    code = ("from criticality.local.parametrise import find_parametrisations\n"
            "import sys; sys.path.insert(0, 'tests')\n"
            "from models import LORENZ\n"
            "from test_parametrise import ROSENZWEIG_MACARTHUR as R\n"
            "print([p.describe() for p in find_parametrisations(LORENZ, 'r').found])\n"
            "print([p.describe() for p in find_parametrisations(R, 'K').found])\n")
    outs = []
    for seed in ("1", "2"):
        env = dict(os.environ, PYTHONHASHSEED=seed)
        outs.append(subprocess.run([sys.executable, "-c", code], env=env, check=True,
                                   capture_output=True, text=True).stdout)
    assert outs[0] == outs[1] and "x_eq" in outs[0]


# -- hopf(..., eliminate="auto") ----------------------------------------------------------

def test_brusselator_hopf_condition_in_both_forms():
    """Parametrised: B_c = 1 + x_eq^2, omega = x_eq; back in the original
    parameters B_c = 1 + A^2 with omega = A (Prigogine and Lefever 1968; Strogatz,
    Nonlinear Dynamics and Chaos, 1994, Exercise 8.3.1, from memory), and the
    Hopf point is supercritical."""
    r = hopf(BRUSSELATOR, "B", eliminate="auto")
    x, A, B = _sym("x_eq", word="positive"), _sym("A", BRUSSELATOR), _sym("B", BRUSSELATOR)
    assert sympy.expand(r.critical_value - (1 + x ** 2)) == 0 and r.omega == x
    assert r.classification == "supercritical"
    assert r.parametrisation.how == "automatic" and r.substitutions == {"A": x}
    assert r.assumptions["x_eq"] == "positive"
    d = r.direct_forms
    assert d.degree == 1 and sympy.expand(d.critical_value - (1 + A ** 2)) == 0
    assert sympy.expand(d.hopf_set.subs(B, 1 + A ** 2)) == 0


def test_rosenzweig_macarthur_hump_criterion():
    """The Hopf point lies where the equilibrium sits at the hump of the prey
    isocline, x* = (K - b)/2 (Rosenzweig and MacArthur 1963, the graphical
    stability criterion; M. L. Rosenzweig, Paradox of enrichment, Science 171,
    1971): K_c = b + 2 x_eq in the family, and with x* = b d/(a c - d)
    K_c = b (a c + d)/(a c - d) in the original parameters.  The onset is
    supercritical for positive prey density (from memory)."""
    r = hopf(ROSENZWEIG_MACARTHUR, "K", eliminate="auto", assume={"x_eq": "positive"})
    x = _sym("x_eq", word="positive")
    a, b, c, d = (_sym(n, ROSENZWEIG_MACARTHUR) for n in "abcd")
    assert sympy.expand(r.critical_value - (b + 2 * x)) == 0
    assert sympy.cancel(r.direct_forms.critical_value - b * (a * c + d) / (a * c - d)) == 0
    assert r.classification == "supercritical"
    assert r.direct_forms.l1_boundary is None  # one sign: no boundary to take back
    eliminated = dict(r.parametrisation.eliminated)
    (name,) = eliminated
    # the eliminated parameter, put back at x_eq = x*, gives the model's own value
    star = b * d / (a * c - d)
    assert sympy.cancel(eliminated[name].subs(x, star) - _sym(name, ROSENZWEIG_MACARTHUR)) == 0


@pytest.mark.slow
def test_radical_equilibrium_agrees_with_the_numeric_mode():
    """The invented quadratic-loss kinetics: auto solves for (y, c) with
    c = (A - x_eq)/x_eq^2 (no radical); at x_eq = 1/2, B = 2 the family point
    is A_c = 11/16, c = 3/4, and the numeric mode started near it finds the
    same Hopf point, frequency and l1 to 25 digits (mpmath's root finder on
    the same model, an independent route)."""
    r = hopf(QUADRATIC_LOSS, "A", eliminate="auto")
    assert r.parametrisation.unknowns == ("y", "c")
    assert not any(isinstance(e, sympy.Pow) and not e.exp.is_Integer
                   for e in sympy.preorder_traversal(r.critical_value))
    point = r.family_point(x_eq="1/2", B=2)
    assert point == {"A": sympy.Rational(11, 16), "c": sympy.Rational(3, 4), "B": 2}
    exact = r.evaluate(x_eq="1/2", B=2, digits=30)
    num = hopf(QUADRATIC_LOSS, "A", guess={"x": 0.5, "y": 4, "A": 0.7},
               values={"B": 2, "c": "3/4"}, digits=30)
    with mpmath.workdps(30):
        for key in ("critical_value", "omega", "l1"):
            assert abs(mpmath.mpf(getattr(exact, key)) - mpmath.mpf(getattr(num, key))) < 1e-25
    # the Hopf set in the original parameters vanishes there; it is quadratic in A
    d = r.direct_forms
    at = {_sym("A", QUADRATIC_LOSS): point["A"], _sym("B", QUADRATIC_LOSS): 2,
          _sym("c", QUADRATIC_LOSS): point["c"]}
    assert d.degree == 2 and d.hopf_set.xreplace(at) == 0
    # where l1 can change sign on the Hopf set: a polynomial in the original parameters
    assert d.l1_boundary is not None and d.l1_boundary.free_symbols <= set(at)
    assert point["A"] in [sympy.nsimplify(v.xreplace(at)) for v in d.candidates]


@pytest.mark.slow
def test_refusals_and_notes_name_the_parametrisation():
    """Where the engine must ask which radical equilibrium to use, the error
    names eliminate='auto' and what it would do; a solved equilibrium with
    radicals says the same in the notes."""
    with pytest.raises(EquilibriumNotFoundError, match=r"eliminate='auto' \(--eliminate auto\) "
                       r"would solve for y, c instead"):
        hopf(QUADRATIC_LOSS, "A")
    r = hopf(LORENZ, "r", equilibrium=1)
    assert any("eliminate='auto'" in n and "b = x_eq**2/(r - 1)" in n for n in r.notes)


def test_named_parametrisation_is_recorded_too():
    """eliminate=[...] fills the same field, marked as named."""
    r = hopf(BRUSSELATOR, "B", eliminate=["A", "y"])
    assert r.parametrisation.how == "named" and r.parametrisation.unknowns == ("A", "y")
    assert r.direct_forms.critical_value is not None


def test_eliminate_option_is_checked():
    """Only a list of names or the word 'auto'."""
    from criticality import ParameterError
    with pytest.raises(ParameterError, match="or 'auto'"):
        hopf(BRUSSELATOR, "B", eliminate="automatic")


# -- outputs --------------------------------------------------------------------------------

def test_outputs_say_which_parametrisation():
    """Text, LaTeX and JSON carry the parametrisation line; JSON reads back."""
    r = hopf(BRUSSELATOR, "B", eliminate="auto")
    assert "Parametrisation (automatic, linear in y, A)" in r.summary()
    details = " ".join(r.details().split())
    assert "A = x_eq eliminated" in details
    assert "Direct form: In the original parameters the Hopf set is A**2 - B + 1 = 0" in details
    latex = r.to_latex()  # the names in math mode, not as escaped code
    assert "$x_{\\mathrm{eq}}$" in latex and "x\\_eq" not in latex
    assert "Hopf set in the original parameters" in latex
    assert "A = x_eq" not in r.to_report() and "$x_{\\mathrm{eq}} \\neq 0$" in r.to_report()
    assert "Parametrisation (automatic" in r.to_report(fragment=True)
    text = r.to_json()
    doc = json.loads(text)["parametrisation"]
    assert doc["how"] == "automatic" and doc["unknowns"] == ["y", "A"]
    assert doc["direct"]["critical_value"] == "A**2 + 1" and doc["direct"]["degree"] == 1
    back, mine = read_expressions(text), result_expressions(r)
    assert "parametrisation.direct.hopf_set" in back and set(back) == set(mine)
    assert all(sympy.expand(back[k] - mine[k]) == 0 for k in mine)


def test_a_parametrised_result_pickles():
    """The record and the direct forms are plain data."""
    r = hopf(BRUSSELATOR, "B", eliminate="auto")
    s = pickle.loads(pickle.dumps(r))
    assert s.parametrisation == r.parametrisation and s.direct_forms == r.direct_forms


def test_cli_eliminate_auto(tmp_path, capsys):
    """--eliminate auto on the command line: the summary names the
    parametrisation, the JSON carries it."""
    model = tmp_path / "b.toml"
    model.write_text(BRUSSELATOR_TOML)
    assert main(["analyse", str(model), "--eliminate", "auto", "-q"]) == 0
    assert "Parametrisation (automatic" in capsys.readouterr().out
    assert main(["json", str(model), "--eliminate", "auto", "-q"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["parametrisation"]["coordinates"] == ["x_eq"]

"""JSON round trip: every exact expression written to JSON reads back, through
the project's own parser, to the same expression; numeric values agree with
an independent mpmath evaluation."""

from __future__ import annotations

import json

import mpmath
import pytest
import sympy

from criticality import Model, hopf
from criticality.errors import ModelFileError
from models import LORENZ, LORENZ_EQUILIBRIUM
from criticality.outputs.json_io import (SCHEMA, SCHEMA_VERSION, read_expressions,
                                     result_expressions, result_to_json)

TOP_KEYS = {"schema", "schema_version", "generator", "analysis", "status", "conventions",
            "model", "parameter", "assumptions", "equilibrium", "branch", "critical_value",
            "omega_squared", "omega", "period", "transversality", "eigenvalue_derivative", "c1",
            "l1", "planar_coefficient", "lyapunov_coefficients", "q_norm_squared",
            "classification", "verdict", "supercritical_where", "l1_zero_set", "conditions",
            "cycle", "routes_agree", "parametrisation", "notes", "cautions", "numeric"}


def _canonical(e):
    """``e`` rebuilt with sympy's automatic evaluation at every node (the
    engine keeps some products unevaluated, e.g. ``Mul(-1, 3, b**2)``)."""
    if e.is_Atom:
        return e
    return e.func(*[_canonical(a) for a in e.args])


def _same(a, b) -> bool:
    if a == b or _canonical(a) == _canonical(b):
        return True
    return sympy.count_ops(a) < 400 and sympy.simplify(a - b) == 0


CASES = {
    "planar pair": (Model(["x", "y"], {"x": "mu*x - y + a*x*y", "y": "x + mu*y - x^2*y"},
                          {"mu": "real", "a": "real"}), dict(parameter="mu",
                                                             equilibrium={"x": 0, "y": 0})),
    "convection (radical equilibrium)": (LORENZ, dict(parameter="r",
                                                      equilibrium=LORENZ_EQUILIBRIUM)),
    "lagged stage (condition on k3)": (
        Model(["x", "v", "w"], {"x": "v", "v": "-x - k3*x^3 - zeta*v + w", "w": "(g*v - w)/tau"},
              {"g": "positive", "zeta": "positive", "tau": "positive", "k3": "real"}),
        dict(parameter="g", equilibrium={"x": 0, "v": 0, "w": 0})),
    "Arrhenius, parametrised by the steady state": (
        Model(["c", "T"], {"c": "q*(1 - c) - k*c*exp(-E/T)",
                           "T": "q*(T0 - T) + h*k*c*exp(-E/T) - U*(T - T0)"},
              {"q": "positive", "k": "positive", "E": "positive", "h": "positive",
               "U": "positive", "T0": "positive"}),
        dict(parameter="U", eliminate=["k", "T0"],
             assume={"c_eq": "positive", "T_eq": "positive"})),
}


@pytest.fixture(scope="module", params=sorted(CASES))
def case(request):
    model, options = CASES[request.param]
    options = dict(options)
    return hopf(model, options.pop("parameter"), **options)


@pytest.mark.slow
def test_every_expression_reads_back_equal(case):
    """Strings read back through parse_expression equal the result's own
    expressions (structurally after sympy's automatic evaluation)."""
    text = result_to_json(case)
    back = read_expressions(text)
    mine = result_expressions(case)
    assert set(back) == set(mine) and len(back) >= 20
    unequal = [path for path in mine if not _same(back[path], mine[path])]
    assert unequal == []


def test_schema_keys_and_version(case):
    """The top-level keys are exactly the documented ones."""
    doc = json.loads(result_to_json(case))
    assert set(doc) == TOP_KEYS
    assert doc["schema"] == SCHEMA and doc["schema_version"] == SCHEMA_VERSION == 1
    assert list(doc)[:2] == ["schema", "schema_version"]
    assert doc["numeric"] is None
    assert all(isinstance(v, str) for v in doc["conventions"].values())


def test_unrepresentable_expressions_are_marked():
    """An expression the model syntax cannot write is an object with the
    sympy text, never a silently wrong string."""
    from criticality.outputs.json_io import _expr

    q = sympy.Symbol("q", real=True)
    assert _expr(sympy.Abs(q) + 1) == {"unrepresentable": "Abs(q) + 1"}
    assert _expr(sympy.nan) is None


def test_numeric_section_matches_mpmath():
    """Numeric values (digits as asked) agree with an independent mpmath
    evaluation of the closed forms read back from the same document."""
    model, options = CASES["convection (radical equilibrium)"]
    options = dict(options)
    result = hopf(model, options.pop("parameter"), **options)
    text = result_to_json(result, point={"sigma": 10, "b": "8/3"}, digits=40)
    doc = json.loads(text)
    numeric = doc["numeric"]
    assert numeric["digits"] == 40 and numeric["point"] == {"sigma": "10", "b": "8/3"}
    back = read_expressions(text)
    own = model.symbols  # the document is read back in the model's own symbols
    values = {own["sigma"]: 10, own["b"]: sympy.Rational(8, 3)}
    with mpmath.workdps(50):
        for key in ("critical_value", "omega", "l1", "transversality"):
            exact = mpmath.mpf(sympy.N(back[key].xreplace(values), 50))
            assert abs(mpmath.mpf(numeric[key]) - exact) <= abs(exact) * mpmath.mpf(10) ** -38
        for part in ("re", "im"):
            exact = mpmath.mpf(sympy.N(back[f"c1.{part}"].xreplace(values), 50))
            assert abs(mpmath.mpf(numeric["c1"][part]) - exact) <= abs(exact) * 1e-38
        # the real eigenvalue is -(sigma + b + 1) = -41/3 (trace of the Jacobian)
        real = [e for e in numeric["eigenvalues"] if abs(mpmath.mpf(e["im"])) < 1e-20]
        assert abs(mpmath.mpf(real[0]["re"]) + mpmath.mpf(41) / 3) < mpmath.mpf(10) ** -35
    # the critical value of this system is sigma (sigma + b + 3) / (sigma - b - 1)
    # (Guckenheimer and Holmes 1983, Section 2.3, for the convection model; from memory)
    assert mpmath.almosteq(mpmath.mpf(numeric["critical_value"]), mpmath.mpf(470) / 19, 1e-35)
    assert numeric["classification"] == "subcritical"


def test_reading_rejects_other_documents():
    """Text that is not JSON of this schema is refused with a clear error."""
    with pytest.raises(ModelFileError, match="not a JSON document"):
        read_expressions("{not json")
    with pytest.raises(ModelFileError, match="criticality/hopf-result"):
        read_expressions(json.dumps({"schema": "something else"}))

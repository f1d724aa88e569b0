"""JSON output of a Hopf result in a documented, versioned schema.

Pipeline place: result -> **JSON** (``result.to_json()``, ``criticality
json``).  The schema is described in ``docs/json-schema.md``; its name and
version are the first two keys of every document (``"schema"``,
``"schema_version"``).

Exact expressions are strings in the model syntax of
:func:`criticality.format_expression`, so :func:`read_expressions` (or any
program with the same small grammar) reads them back through
:func:`criticality.parse_expression` to the same sympy expressions.  Complex
quantities are objects ``{"re": ..., "im": ...}``.  An expression the model
syntax cannot write (it would need ``Abs`` or the imaginary unit) is the
object ``{"unrepresentable": "<sympy text>"}``.  With a parameter point, a
``"numeric"`` section holds every quantity as a decimal string of ``digits``
significant digits.
"""

from __future__ import annotations

import json
from typing import TYPE_CHECKING, Any, Mapping

import mpmath
import sympy

from .envelope import SCHEMA_VERSION, document_symbols, envelope, read_document
from .render import CAUTIONS, split_complex, try_model_text
from ..renderers import register_renderer
from ..errors import ModelFileError, ParameterError
from ..model.expressions import parse_expression

if TYPE_CHECKING:
    from ..hopf_analysis.results import HopfResult

__all__ = ["SCHEMA", "SCHEMA_VERSION", "result_to_json", "result_to_dict", "read_expressions",
           "result_expressions"]

#: the schema's name, the value of the ``"schema"`` key
SCHEMA = "criticality/hopf-result"

_CONVENTION_KEYS = ("inner_product", "eigenvectors", "normal_form", "lyapunov", "classical",
                    "sign", "cycle")


def _expr(value):
    """An exact expression as a string of the model syntax (or a marker)."""
    if value is None:
        return None
    value = sympy.sympify(value, strict=True)
    if value.has(sympy.nan, sympy.zoo, sympy.oo, -sympy.oo):
        return None
    text = try_model_text(value)
    return text if text is not None else {"unrepresentable": sympy.sstr(value)}


def nu_to_complex(value: Any) -> dict:
    re, im = split_complex(value)
    return {"re": _expr(re), "im": _expr(im)}


def _relation(rel):
    if rel is None:
        return None
    return {"expression": _expr(rel.lhs - rel.rhs), "relation": rel.rel_op}


def _model(model) -> dict:
    return {
        "name": model.name,
        "description": model.description,
        "states": list(model.states),
        "kind": getattr(model, "kind", "flow"),
        "bifurcation_parameter": model.bifurcation_parameter,
        "parameters": [{"name": p.name, "assumption": p.assumption,
                        "value": _expr(p.default) if p.default is not None else None,
                        "description": p.description, "declared": p.declared,
                        "unit": getattr(p, "unit", None)}
                       for p in model.parameters],
        "state_units": dict(getattr(model, "state_units", None) or {}),
        "equations": {s: _expr(e) for s, e in zip(model.states, model.equations)},
    }


def _cycle(cycle) -> dict:
    return {
        "side": cycle.side,
        "side_condition": _relation(cycle.side_condition),
        "stable": cycle.stable,
        "radius_squared": _expr(cycle.radius_squared),
        "amplitude_squared_slopes": {k: _expr(v) for k, v in cycle.amplitude_coefficients.items()},
        "amplitudes": {k: _expr(v) for k, v in cycle.amplitudes.items()},
        "amplitude_power": cycle.amplitude_power,
        "period": _expr(cycle.period),
        "frequency_slope": _expr(cycle.frequency_slope),
    }


def _number(value, digits: int):
    if isinstance(value, bool) or value is None:
        return value
    if isinstance(value, mpmath.mpc):
        return {"re": mpmath.nstr(value.real, digits), "im": mpmath.nstr(value.imag, digits)}
    if isinstance(value, mpmath.mpf):
        return mpmath.nstr(value, digits)
    return str(value)


def _numeric(result, point: Mapping, digits: int) -> dict:
    if not isinstance(point, Mapping):
        raise ParameterError(f"point must be a mapping {{name: value}}; got {point!r:.60}")
    num = result.evaluate(dict(point), digits=digits)
    with mpmath.workdps(digits + 10):  # mpc() rounds to the working precision
        return _numeric_fields(num, digits)


def _numeric_fields(num, digits: int) -> dict:
    n = lambda v: _number(v, digits)  # noqa: E731
    return {
        "point": {k: _expr(v) for k, v in num.values.items()},
        "digits": digits,
        "critical_value": n(num.critical_value), "omega_squared": n(num.omega_squared),
        "omega": n(num.omega), "period": n(num.period), "transversality": n(num.transversality),
        "c1": n(mpmath.mpc(num.c1)), "l1": n(num.l1),
        "lyapunov_coefficients": [n(v) for v in num.lyapunov_coefficients],
        "classification": num.classification,
        "equilibrium": {k: n(v) for k, v in num.equilibrium.items()},
        "amplitude_squared_slopes": {k: n(v) for k, v in num.amplitude_coefficients.items()},
        "eigenvalues": [n(mpmath.mpc(e)) for e in num.eigenvalues],
        "pair_error": n(num.pair_error), "others_stable": num.others_stable,
        "conditions": [{"key": k, "value": n(v), "relation": rel}
                       for k, v, rel in num.conditions],
    }


def _parametrisation(result) -> dict | None:
    """How the family was parametrised by the equilibrium, and the Hopf
    condition in the original parameters (``null`` for a given or solved
    equilibrium)."""
    par = getattr(result, "parametrisation", None)
    if par is None:
        return None
    direct = getattr(result, "direct_forms", None)
    return {"how": par.how, "kind": par.kind, "unknowns": list(par.unknowns),
            "coordinates": [str(c) for c in par.coordinates],
            "nonzero": [_expr(e) for e in par.nonzero],
            "description": par.describe(),
            "direct": None if direct is None else {
                "hopf_set": _expr(direct.hopf_set),
                "degree": None if direct.degree is None else int(direct.degree),
                "critical_value": _expr(direct.critical_value),
                "l1_boundary": _expr(direct.l1_boundary), "note": direct.note}}


def result_to_dict(result: HopfResult, *, point: Mapping | None = None, digits: int = 30) -> dict:
    """The result as plain Python data in the JSON schema (see
    :func:`result_to_json`)."""
    conventions = result.conventions
    body = {
        "model": dict(_model(result.model), fixed={
            p.name: _expr(v) for p, v in getattr(result, "fixed_parameters", ())}),
        "parameter": result.parameter,
        "assumptions": dict(result.assumptions),
        "equilibrium": {"method": result.equilibrium_how,
                        "point": {k: _expr(v) for k, v in result.equilibrium.items()},
                        "eliminated": {k: _expr(v) for k, v in result.substitutions.items()}},
        "branch": {"index": result.branch_index, "count": result.branch_count},
        "critical_value": _expr(result.critical_value),
        "omega_squared": _expr(result.omega_squared),
        "omega": _expr(result.omega),
        "period": _expr(result.period),
        "transversality": _expr(result.transversality),
        "eigenvalue_derivative": nu_to_complex(result.eigenvalue_derivative),
        "c1": nu_to_complex(result.c1),
        "l1": _expr(result.l1),
        "planar_coefficient": _expr(result.planar_coefficient),
        "lyapunov_coefficients": [_expr(c) for c in result.lyapunov_coefficients],
        "q_norm_squared": _expr(result.q_norm_squared),
        "classification": result.classification,
        "verdict": result.verdict,
        "supercritical_where": _relation(result.supercritical_where),
        "l1_zero_set": _relation(result.l1_zero_set),
        "conditions": [{"key": c.key, "description": c.description, "expression": _expr(c.expr),
                        "relation": c.relation, "status": c.status} for c in result.conditions],
        "cycle": _cycle(result.cycle),
        "routes_agree": bool(result.routes_agree),
        "parametrisation": _parametrisation(result),
    }
    return envelope(SCHEMA, "hopf", body, status=result.status,
                    conventions={k: getattr(conventions, k) for k in _CONVENTION_KEYS},
                    notes=result.notes, cautions=CAUTIONS,
                    tail={"numeric": None if point is None else _numeric(result, point, digits)})


def result_to_json(result: HopfResult, *, point: Mapping | None = None, digits: int = 30,
                   indent: int | None = 2) -> str:
    """The result as a JSON document (schema ``criticality/hopf-result``, version 1).

    Parameters
    ----------
    result : HopfResult
    point : mapping, optional
        Parameter values (numbers or exact text such as ``"8/3"``); with it,
        the ``"numeric"`` section holds every quantity evaluated there (model
        defaults fill the parameters not given).
    digits : int
        Significant digits of the numeric values.
    indent : int or None
        Indentation of the JSON text (None: one line).

    Returns
    -------
    str

    Examples
    --------
    >>> from criticality import Model, hopf
    >>> m = Model(["x", "y"], {"x": "y", "y": "-x + mu*y - x^2*y"}, {"mu": "real"})
    >>> doc = json.loads(result_to_json(hopf(m, "mu", equilibrium={"x": 0, "y": 0})))
    >>> doc["schema_version"], doc["critical_value"], doc["l1"], doc["c1"]
    (1, '0', '-1/4', {'re': '-1/4', 'im': '0'})
    """
    data = result_to_dict(result, point=point, digits=digits)
    return json.dumps(data, indent=indent, ensure_ascii=True)


# -- reading back ------------------------------------------------------------------------


def _kind(value) -> str:
    return "null" if value is None else {bool: "a boolean", int: "a number", float: "a number",
                                          str: "a string", list: "an array",
                                          dict: "an object"}.get(type(value), "a value")


def _shape_error(path: str, expected: str, value) -> ModelFileError:
    return ModelFileError(f"JSON field {path!r} must be {expected}, found {_kind(value)}; the "
                          "document does not follow the schema (docs/json-schema.md)")


def _object(value, path: str) -> dict:
    """An object or null (read as empty)."""
    if value is None:
        return {}
    if not isinstance(value, dict):
        raise _shape_error(path, "an object", value)
    return value


def _array(value, path: str) -> list:
    """An array or null (read as empty)."""
    if value is None:
        return []
    if not isinstance(value, list):
        raise _shape_error(path, "an array", value)
    return value


def _walk(doc: dict) -> list:
    """``(path, text)`` of every exact expression in a document; a field of
    the wrong shape raises :class:`ModelFileError` naming its path."""
    out = []

    def add(path, value) -> None:
        if isinstance(value, str):
            out.append((path, value))
        elif value is not None:
            raise _shape_error(path, "an expression string or null", value)

    def add_complex(path: str, value: object) -> None:
        value = _object(value, path)
        add(path + ".re", value.get("re"))
        add(path + ".im", value.get("im"))

    def add_relation(path: str, value: object) -> None:
        add(path + ".expression", _object(value, path).get("expression"))

    def add_named(path: str, value: object) -> None:
        for name, text in _object(value, path).items():
            add(f"{path}.{name}", text)

    for key in ("critical_value", "omega_squared", "omega", "period", "transversality", "l1",
                "planar_coefficient", "q_norm_squared"):
        add(key, doc.get(key))
    for key in ("eigenvalue_derivative", "c1"):
        add_complex(key, doc.get(key))
    for k, value in enumerate(_array(doc.get("lyapunov_coefficients"),
                                     "lyapunov_coefficients")):
        add(f"lyapunov_coefficients.{k}", value)
    for key in ("supercritical_where", "l1_zero_set"):
        add_relation(key, doc.get(key))
    for k, c in enumerate(_array(doc.get("conditions"), "conditions")):
        c = _object(c, f"conditions.{k}")
        add(f"conditions.{c.get('key', k)}.expression", c.get("expression"))
    eq = _object(doc.get("equilibrium"), "equilibrium")
    for part in ("point", "eliminated"):
        add_named(f"equilibrium.{part}", eq.get(part))
    par = _object(doc.get("parametrisation"), "parametrisation")
    for k, value in enumerate(_array(par.get("nonzero"), "parametrisation.nonzero")):
        add(f"parametrisation.nonzero.{k}", value)
    direct = _object(par.get("direct"), "parametrisation.direct")
    for key in ("hopf_set", "critical_value", "l1_boundary"):
        add(f"parametrisation.direct.{key}", direct.get(key))
    cycle = _object(doc.get("cycle"), "cycle")
    add_relation("cycle.side_condition", cycle.get("side_condition"))
    for key in ("radius_squared", "period", "frequency_slope"):
        add(f"cycle.{key}", cycle.get(key))
    for part in ("amplitude_squared_slopes", "amplitudes"):
        add_named(f"cycle.{part}", cycle.get(part))
    model = _object(doc.get("model"), "model")
    add_named("model.equations", model.get("equations"))
    for k, p in enumerate(_array(model.get("parameters"), "model.parameters")):
        p = _object(p, f"model.parameters.{k}")
        add(f"model.parameters.{p.get('name', k)}.value", p.get("value"))
    return out


def read_expressions(json_text: str, *, exact: bool | None = None) -> dict:
    """Every exact expression of a JSON document, read back as sympy.

    Parameters
    ----------
    json_text : str
        A document written by :func:`result_to_json`.
    exact : bool, optional
        Read decimals as exact fractions (default for closed-form results)
        or as floats (default for results of the numeric mode).

    Returns
    -------
    dict
        Dotted path (``"l1"``, ``"c1.re"``, ``"cycle.amplitudes.x"``,
        ``"conditions.transversal.expression"``, ...) -> sympy expression in
        the model's own symbols, rebuilt from the document
        (:func:`~criticality.outputs.envelope.document_symbols`: states real,
        each parameter with its declared assumption), so that they equal the
        result's expressions; any other name is read as a real symbol.

    Raises
    ------
    ModelFileError
        If the text is not JSON of this schema; expression errors name the
        path of the offending string.
    """
    doc = read_document(json_text, SCHEMA)
    if exact is None:
        exact = not str(doc.get("status", "")).startswith("numeric")
    symbols = document_symbols(doc)
    out = {}
    for path, text in _walk(doc):
        out[path] = parse_expression(text, symbols, context=f"JSON field {path!r}", exact=exact,
                                     on_unknown=_any_name)
    return out


def _any_name(name: str, column: int) -> None:
    """Names a document's expressions may use beyond the model's (read as real)."""


def result_expressions(result: HopfResult) -> dict:
    """The result's own expressions under the paths :func:`read_expressions`
    uses (only those the model syntax can write), for comparisons."""
    doc = result_to_dict(result)
    paths = {path for path, _ in _walk(doc)}
    re_c1, im_c1 = split_complex(result.c1)
    re_d, im_d = split_complex(result.eigenvalue_derivative)
    table = {"critical_value": result.critical_value, "omega_squared": result.omega_squared,
             "omega": result.omega, "period": result.period,
             "transversality": result.transversality, "l1": result.l1,
             "planar_coefficient": result.planar_coefficient,
             "q_norm_squared": result.q_norm_squared, "c1.re": re_c1, "c1.im": im_c1,
             "eigenvalue_derivative.re": re_d, "eigenvalue_derivative.im": im_d,
             "cycle.radius_squared": result.cycle.radius_squared,
             "cycle.period": result.cycle.period,
             "cycle.frequency_slope": result.cycle.frequency_slope}
    for k, c in enumerate(result.lyapunov_coefficients):
        table[f"lyapunov_coefficients.{k}"] = c
    for rel, key in ((result.supercritical_where, "supercritical_where"),
                     (result.l1_zero_set, "l1_zero_set"),
                     (result.cycle.side_condition, "cycle.side_condition")):
        if rel is not None:
            table[f"{key}.expression"] = rel.lhs - rel.rhs
    for c in result.conditions:
        table[f"conditions.{c.key}.expression"] = c.expr
    for name, value in result.equilibrium.items():
        table[f"equilibrium.point.{name}"] = value
    for name, value in result.substitutions.items():
        table[f"equilibrium.eliminated.{name}"] = value
    par, direct = getattr(result, "parametrisation", None), getattr(result, "direct_forms", None)
    for k, value in enumerate(par.nonzero if par is not None else ()):
        table[f"parametrisation.nonzero.{k}"] = value
    for key in ("hopf_set", "critical_value", "l1_boundary"):
        if direct is not None and getattr(direct, key) is not None:
            table[f"parametrisation.direct.{key}"] = getattr(direct, key)
    for name, value in result.cycle.amplitude_coefficients.items():
        table[f"cycle.amplitude_squared_slopes.{name}"] = value
    for name, value in result.cycle.amplitudes.items():
        table[f"cycle.amplitudes.{name}"] = value
    for name, value in zip(result.model.states, result.model.equations):
        table[f"model.equations.{name}"] = value
    for p in result.model.parameters:
        if p.default is not None:
            table[f"model.parameters.{p.name}.value"] = p.default
    return {path: sympy.sympify(value, strict=True) for path, value in table.items() if path in paths}


register_renderer("hopf", "json", result_to_json)
register_renderer("hopf", "dict", result_to_dict)

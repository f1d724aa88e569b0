"""Validation of a model's pieces, collecting every problem.

Internal to :mod:`criticality.model.core`: :class:`_Assembler` checks states,
parameters, equations, the equilibrium and the bifurcation parameter, records
notes (undeclared parameters, floats made exact) and raises one
:class:`~criticality.errors.InvalidModelError` listing every problem, each with
its file line where the model came from a file.
"""

from __future__ import annotations

import warnings
from types import MappingProxyType
from typing import Any, Mapping

import sympy

from .syntax import _suggest
from ..errors import ExpressionError, ForbiddenExpressionError, InvalidModelError, NameTypoWarning
from .delayed import delayed_terms
from .delay_checks import delay_problems
from .expressions import convert_sympy, format_expression, name_problem, parse_expression
from .parameter import (_NUMBER_TYPES, _PARAMETER_KEYS, Parameter, _assumption_problem,
                        _constant, _name_of, _sign_problem, assumption_of, symbol_for)

__all__: list[str] = []


def _describe(value: object) -> str:
    kind = {bool: "a boolean", dict: "a table", list: "a list", str: "a string"}
    return kind.get(type(value), type(value).__name__)


_GREEK = frozenset("alpha beta gamma delta epsilon zeta eta theta iota kappa lambda mu nu xi "
                   "omicron pi rho sigma tau upsilon phi chi psi omega".split())

class _Assembler:
    """Validates the pieces of a model, collecting every problem."""

    def __init__(self, source: str | None = None, locate=None, problems=()):
        self.source = source
        self.locate = locate
        self.problems: list[str] = list(problems)
        self.notes: list[str] = []
        self.bad_names: set[str] = set()
        self.parameter_names: set[str] = set()
        self.noted_symbols: set[str] = set()

    # -- locations --------------------------------------------------------

    def line(self, section: str, key: str | None = None, value: bool = False) -> int | None:
        if self.locate is None:
            return None
        return self.locate(section, key, value)

    def at(self, label: str, section: str, key: str | None = None) -> str:
        line = self.line(section, key)
        return f"{label}, line {line}" if line is not None else label

    def problem(self, label: str, section: str, key: str | None, message: str) -> None:
        self.problems.append(f"{self.at(label, section, key)}: {message}")

    # -- the pieces ---------------------------------------------------------

    def text(self, field: str, value: object) -> str | None:
        if value is None or isinstance(value, str):
            return value
        self.problem(f"the {field}", field, None, f"expected a string, found {_describe(value)}")
        return None

    def states(self, states: object) -> list[str]:
        if states is None:
            self.problems.append("the model has no states (give the ordered list of state names)")
            return []
        if isinstance(states, (str, bytes)) or not isinstance(states, (list, tuple)):
            self.problem("states", "states", None, "expected a list of names such as "
                         f"['x', 'y'], found {_describe(states)} {str(states)[:40]!r}")
            return []
        names: list[str] = []
        for item in map(_name_of, states):
            problem = name_problem(item)
            if problem is not None:
                self.problem("states", "states", None, f"state {str(item)[:40]!r}: {problem}")
                self.bad_names.add(str(item))
            elif item in names:
                self.problem("states", "states", None, f"the state {item!r} is listed twice")
            else:
                names.append(str(item))
        if not names and not self.problems:
            self.problems.append("the model has no states (give the ordered list of state names)")
        return names

    def parameters(self, parameters: object) -> list[Parameter]:
        if parameters is None:
            return []
        if isinstance(parameters, Mapping):
            items = [(_name_of(k), v) for k, v in parameters.items()]
        elif isinstance(parameters, (list, tuple)):
            items = [(p.name, p) if isinstance(p, Parameter) else (_name_of(p), None)
                     for p in parameters]
        else:
            self.problem("parameters", "parameters", None, "expected a table (mapping) of "
                         f"names to assumptions, found {_describe(parameters)}")
            return []
        result: list[Parameter] = []
        seen: set = set()  # the names declared so far (a set: reading stays linear)
        for name, spec in items:
            self.parameter_names.add(str(name))
            if isinstance(name, str) and name in seen:
                self.problem(f"parameter {name!r}", "parameters", name, "declared twice")
                continue
            parameter = self.parameter(name, spec)
            if parameter is not None:
                result.append(parameter)
                seen.add(parameter.name)
        return result

    def parameter(self, name: object, spec: object) -> Parameter | None:
        label = f"parameter {str(name)[:40]!r}"
        problem = name_problem(name)
        if problem is not None:
            self.bad_names.add(str(name))
            self.problem(label, "parameters", None, problem)
            return None
        assert isinstance(name, str)  # name_problem refuses every other type
        if isinstance(spec, Parameter):
            if spec.name != name:
                self.problem(label, "parameters", name, f"is given a Parameter named {spec.name!r}")
                return None
            return spec
        fields = self.parameter_fields(label, name, spec)
        if fields is None:
            return None
        assumption, value, description, unit = fields
        before = len(self.problems)
        if unit is not None and not isinstance(unit, str):
            self.problem(label, "parameters", name, "the unit must be a string")
        problem = _assumption_problem(assumption)
        if problem is not None:
            self.problem(label, "parameters", name, problem)
        if description is not None and not isinstance(description, str):
            self.problem(label, "parameters", name, "the description must be a string")
        if value is not None:
            value = self.value(label, name, value, assumption if problem is None else "real")
        if len(self.problems) > before:
            return None
        return Parameter(name, assumption, value, True, description, unit)

    def parameter_fields(self, label: str, name: str, spec: object):
        if spec is None or isinstance(spec, str):
            return spec or "real", None, None, None
        if isinstance(spec, _NUMBER_TYPES) and not isinstance(spec, bool):
            return "real", spec, None, None
        if not isinstance(spec, Mapping):
            self.problem(label, "parameters", name, "expected an assumption word or a table "
                         f"{{assume, value, description, unit}}, found {_describe(spec)}")
            return None
        unknown = [k for k in spec if k not in _PARAMETER_KEYS]
        for key in unknown:
            close = _suggest(str(key), _PARAMETER_KEYS)
            hint = f"did you mean {close[0]!r}? " if close else ""
            self.problem(label, "parameters", name, f"unknown key {key!r}; {hint}"
                         f"(allowed: {', '.join(_PARAMETER_KEYS)})")
        if unknown:
            return None
        return (spec.get("assume", "real"), spec.get("value"), spec.get("description"),
                spec.get("unit"))

    def value(self, label: str, name: str, raw: object, assumption: str):
        context = f"value of parameter {name!r}"
        try:
            value = _constant(raw, context, self.line("parameters", name, True))
        except ExpressionError as exc:
            self.problems.append(str(exc))
            return None
        problem = _sign_problem(name, assumption, value)
        if problem is not None:
            self.problem(label, "parameters", name, problem)
        return value

    def clashes(self, states: list[str], parameters: list[Parameter]) -> list[Parameter]:
        kept = []
        for parameter in parameters:
            if parameter.name in states:
                self.problem(f"parameter {parameter.name!r}", "parameters", parameter.name,
                             "the name is also a state; a name is either a state or a parameter")
            else:
                kept.append(parameter)
        return kept

    def equations(self, equations: object, states: list[str], symbols: dict) -> tuple[list, dict]:
        """The right-hand sides in state order, and the undeclared names they use."""
        given = self.equation_table(equations, states, symbols)
        unknown: dict[str, str] = {}
        result: list = []
        for state in states:
            if state not in given:
                self.problem(f"state {state!r}", "equations", None, "has no equation")
                result.append(None)
                continue
            result.append(self.expression(given[state], f"equation for {state!r}",
                                          ("equations", state), symbols, unknown, states))
        return result, unknown

    def equation_table(self, equations: object, states: list[str], symbols: dict) -> dict:
        if isinstance(equations, (list, tuple)):
            if len(equations) != len(states):
                self.problem("equations", "equations", None, f"{len(equations)} equations are "
                             f"given for {len(states)} states; give one per state, in state order")
                return {}
            return dict(zip(states, equations))
        if not isinstance(equations, Mapping):
            self.problem("equations", "equations", None, "expected a table from state names "
                         f"to right-hand sides, found {_describe(equations)}")
            return {}
        table = {}
        for key, value in equations.items():
            name = _name_of(key)
            if name in states:
                table[name] = value
            elif str(name) not in self.bad_names:
                known = name in symbols or str(name) in self.parameter_names
                what = "a parameter, not a state" if known else "not a state"
                close = _suggest(str(name), states)
                hint = f"; did you mean {close[0]!r}?" if close else ""
                self.problem(f"equation for {str(name)[:40]!r}", "equations", str(name),
                             f"{name!r} is {what}{hint} (states: {', '.join(states) or 'none'})")
        return table

    def expression(self, raw: object, context: str, place: tuple[str, str | None], symbols: Mapping,
                   unknown: dict | None, delayed=None):
        """Parse text or check a sympy expression; None (and a problem) on failure."""
        def collect(name, column):
            unknown.setdefault(name, context)
        on_unknown = None if unknown is None else collect
        try:
            if isinstance(raw, str):
                return parse_expression(raw, symbols, context=context, on_unknown=on_unknown,
                                        line=self.line(*place, True), delayed=delayed)
            self.note_floats(raw, context)
            self.note_assumptions(raw, symbols)
            value = convert_sympy(raw, symbols, context=context, on_unknown=on_unknown,
                                  line=self.line(*place))
            if delayed is None and delayed_terms(value):
                raise ForbiddenExpressionError("a delayed state is allowed only in an equation",
                                               context=context, line=self.line(*place))
            return value
        except ExpressionError as exc:
            self.problems.append(str(exc))
            return None

    def note_floats(self, raw: object, context: str) -> None:
        floats = [raw] if isinstance(raw, float) else (
            sorted(raw.atoms(sympy.Float), key=float) if isinstance(raw, sympy.Basic) else [])
        for number in floats[:5]:
            value = convert_sympy(number)
            self.notes.append(f"the floating-point number {format_expression(sympy.Float(number))} "
                              f"in the {context} was read as the exact fraction "
                              f"{format_expression(value)}")

    def note_assumptions(self, raw: object, symbols: Mapping) -> None:
        """Note user symbols whose sympy assumptions differ from the model's
        symbol of that name (plain and real symbols are matched silently)."""
        if not isinstance(raw, sympy.Basic):
            return
        for symbol in sorted(raw.free_symbols, key=str):
            own = symbols.get(symbol.name)
            if own is None:
                own = symbol_for(symbol.name)  # an undeclared name becomes a real parameter
            accepted = (sympy.Symbol(symbol.name).assumptions0, own.assumptions0)
            if symbol.assumptions0 not in accepted and symbol.name not in self.noted_symbols:
                self.noted_symbols.add(symbol.name)
                given = getattr(symbol, "_assumptions_orig", None) or symbol.assumptions0
                given = ", ".join(f"{k}={v}" for k, v in sorted(given.items())
                                  if k not in ("commutative", "real"))
                kept = assumption_of(own)
                self.notes.append(
                    f"the sympy symbol {symbol.name!r} came with assumptions ({given or 'other'});"
                    f" the model uses its own {kept} symbol of that name, but sympy may already "
                    "have rewritten your expression with them (e.g. sqrt(b*c) as sqrt(b)*sqrt(c))")

    def undeclared(self, unknown: dict, known: list[str]) -> list[Parameter]:
        result = []
        for name in sorted(unknown):
            note = f"parameter {name!r} was not declared; assumed real"
            hint = _suggest(name, known)
            if hint:
                note += f" (did you mean {' or '.join(map(repr, hint))}?)"
            if hint and len(name) > 2 and name not in _GREEK:  # a Greek letter is deliberate
                warnings.warn(NameTypoWarning(
                    f"{unknown[name]} uses {name!r}, which is not declared (taken as a real "
                    f"parameter); did you mean {' or '.join(map(repr, hint))}?"), stacklevel=2)
            self.notes.append(note)
            result.append(Parameter(name, "real", None, False))
        return result

    def equilibrium(self, equilibrium: object, states: list[str], symbols: dict):
        if equilibrium is None:
            return None
        if not isinstance(equilibrium, Mapping):
            self.problem("equilibrium", "equilibrium", None, "expected a table from state "
                         f"names to values, found {_describe(equilibrium)}")
            return None
        table = {}
        for key, raw in equilibrium.items():
            name = _name_of(key)
            if name not in states:
                close = _suggest(str(name), states)
                hint = f"; did you mean {close[0]!r}?" if close else ""
                self.problem(f"equilibrium value for {str(name)[:40]!r}", "equilibrium",
                             str(name), f"{name!r} is not a state{hint}")
                continue
            context = f"equilibrium value for {name!r}"
            value = self.expression(raw, context, ("equilibrium", name), symbols, None)
            used = sorted(s.name for s in value.free_symbols if s.name in states) if (
                value is not None) else []
            if used:
                self.problem(context, "equilibrium", name, f"uses the state(s) {', '.join(used)}; "
                             "an equilibrium value may depend on parameters only")
            table[name] = value
        given = {_name_of(k) for k in equilibrium}
        missing = [s for s in states if s not in given]
        if missing:
            self.problem("equilibrium", "equilibrium", None,
                         f"no value for the state(s) {', '.join(missing)}; give every state")
        return MappingProxyType({s: table[s] for s in states if s in table})

    def bifurcation(self, name: object, parameters: list[Parameter], states: list[str]):
        name = _name_of(name)
        if name is None:
            return None
        names = [p.name for p in parameters]
        if name in names:
            return name
        if name in states:
            message = f"{name!r} is a state; the bifurcation parameter must be a parameter"
        else:
            close = _suggest(str(name), names)
            hint = f"; did you mean {close[0]!r}?" if close else ""
            message = f"{str(name)[:40]!r} is not a parameter of the model{hint}"
        self.problem("bifurcation_parameter", "bifurcation_parameter", None, message)
        return None

    def state_units(self, units: object, states: list[str]) -> dict:
        """The ``units`` table: state name -> unit text."""
        if units is None:
            return {}
        if not isinstance(units, Mapping):
            self.problem("units", "units", None, "expected a table of state name = \"unit\", "
                         f"found {_describe(units)}")
            return {}
        out = {}
        for key, unit in units.items():
            if key not in states:
                close = _suggest(str(key), states)
                hint = f"did you mean {close[0]!r}? " if close else ""
                self.problem(f"unit of {str(key)[:40]!r}", "units", str(key),
                             f"{str(key)[:40]!r} is not a state; {hint}(a parameter's unit is "
                             "the key unit in its own table)")
            elif not isinstance(unit, str):
                self.problem(f"unit of {key!r}", "units", key, "the unit must be a string")
            else:
                out[key] = unit
        return out

    def run(self, states, equations, parameters, name, description, equilibrium,
            bifurcation_parameter, error=InvalidModelError, units=None) -> dict:
        """Validate everything; return the normalised fields or raise ``error``."""
        fields: dict[str, Any] = {"name": self.text("name", name),
                  "description": self.text("description", description)}
        state_names = self.states(states)
        declared = self.clashes(state_names, self.parameters(parameters))
        symbols = {n: symbol_for(n) for n in state_names}
        symbols.update((p.name, p.symbol) for p in declared)
        rhs, unknown = self.equations(equations, state_names, symbols)
        unknown = {n: c for n, c in unknown.items() if n not in self.bad_names}
        extra = self.undeclared(unknown, list(symbols))
        symbols.update((p.name, p.symbol) for p in extra)
        fields["equilibrium_hint"] = self.equilibrium(equilibrium, state_names, symbols)
        fields["state_units"] = MappingProxyType(self.state_units(units, state_names))
        fields["bifurcation_parameter"] = self.bifurcation(bifurcation_parameter,
                                                           declared + extra, state_names)
        self.problems += delay_problems(state_names, rhs, declared + extra, self.at)
        if self.problems:
            raise error(self.problems, source=self.source)
        fields.update(states=tuple(state_names), parameters=tuple(declared + extra),
                      equations=tuple(rhs), notes=tuple(self.notes), source=self.source,
                      symbols=MappingProxyType(symbols))
        return fields

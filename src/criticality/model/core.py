"""The model a user states: states, parameters, right-hand sides.

This is the first stage of the pipeline (model -> equilibrium -> linear part ->
...).  A :class:`Model` is an immutable value object, validated and normalised
once at construction, from Python (strings or sympy expressions) or from a TOML
model file (:meth:`Model.from_text`, :meth:`Model.from_file`; the schema is in
``docs/model-files.md``).  Validation collects every problem and raises one
:class:`~criticality.errors.InvalidModelError` listing them all.

Every state is the model's own ``Symbol(name, real=True)``; every parameter
is a symbol carrying its declared assumption with the keyword a user would
write (``Symbol(name, positive=True)`` for a positive parameter,
``Symbol(name, real=True)`` for a real one;
:func:`~criticality.model.parameter.symbol_for`).  Every
result speaks in exactly these symbols (:attr:`Model.symbols`), so a user's
own ``sympy.Symbol("A", positive=True)`` substitutes into it.  Sympy applies
the assumptions as it builds expressions (``Abs(A)`` is ``A``,
``sqrt(b*(r - 1))`` is ``sqrt(b)*sqrt(r - 1)`` for a positive ``b``); the
engine's tower of fields merges such split radicals again
(:mod:`criticality.algebra.domain`).
"""

from __future__ import annotations

import os
from types import MappingProxyType
from typing import Mapping, Sequence

import sympy

from .syntax import _NOT_FINITE, _suggest
from ..errors import ExpressionError, InvalidModelError, ParameterError
from .checks import _Assembler
from .expressions import convert_sympy, format_expression, parse_expression
from .parameter import ASSUMPTIONS, Parameter, _constant, _name_of, _sign_problem

__all__ = ["Model", "Parameter", "ASSUMPTIONS"]

_FIELDS = ("name", "description", "states", "parameters", "equations", "equilibrium_hint",
           "bifurcation_parameter", "notes", "lines", "source", "symbols", "state_units",
           "kind")

#: what the right-hand sides mean: ``"flow"`` (x' = f(x)) or ``"map"`` (x -> F(x))
KINDS = ("flow", "map")


def _kind_problem(kind: object) -> str | None:
    if isinstance(kind, str) and kind in KINDS:
        return None
    shown = repr(kind) if isinstance(kind, str) else f"a {type(kind).__name__}"
    return (f"kind must be \"flow\" (the equations give x') or \"map\" (the equations give "
            f"the next state), not {shown}")


class Model:
    """A dynamical model x' = f(x; p): ordered states, parameters, right-hand sides.

    Parameters
    ----------
    states : list of str
        State names in order (sympy symbols are accepted and matched by name).
    equations : mapping or list
        One right-hand side per state: ``{"x": "mu*x - y", ...}`` or a list in
        state order.  Strings are read by :func:`~criticality.parse_expression`;
        sympy expressions and Python numbers are checked against the same
        whitelist, their symbols matched by name.
    parameters : mapping or list, optional
        ``{"a": "positive"}``, ``{"a": {"assume": "positive", "value": "1/2",
        "description": "..."}}``, ``{"a": 2}`` (real, value 2), a list of names
        or :class:`Parameter` objects.  Names the equations use without
        declaring them become real parameters (``declared=False``), ordered
        alphabetically after the declared ones, with a note.
    name, description : str, optional
    equilibrium : mapping, optional
        A known equilibrium, every state mapped to an expression in the
        parameters (exposed as :attr:`equilibrium_hint`).
    bifurcation_parameter : str, optional
        The parameter to vary by default.
    kind : str, optional
        ``"flow"`` (default): the right-hand sides give ``x'``; ``"map"``: they
        give the next state, ``x -> F(x)`` (fixed points instead of
        equilibria; see :func:`criticality.flip` and
        :func:`criticality.neimark_sacker`).

    Raises
    ------
    InvalidModelError
        Listing every problem found.

    Examples
    --------
    >>> m = Model(["x", "y"], {"x": "mu*x - y - x*(x^2 + y^2)",
    ...                        "y": "x + mu*y - y*(x^2 + y^2)"})
    >>> m.parameter_symbols, m.notes
    ((mu,), ("parameter 'mu' was not declared; assumed real",))
    """

    __slots__ = tuple("_symbols" if k == "symbols" else k for k in _FIELDS)

    name: str | None
    description: str | None
    states: tuple[str, ...]
    parameters: tuple[Parameter, ...]
    equations: tuple[sympy.Expr, ...]
    equilibrium_hint: Mapping[str, sympy.Expr] | None
    bifurcation_parameter: str | None
    notes: tuple[str, ...]
    lines: Mapping[str, int]
    source: str | None
    _symbols: Mapping[str, sympy.Symbol]
    kind: str

    def __init__(self, states: Sequence[str], equations: Mapping[str, object] | Sequence[object],
                 parameters: Mapping[str, object] | Sequence[object] | None = None, *,
                 name: str | None = None,
                 description: str | None = None, equilibrium: Mapping | None = None,
                 bifurcation_parameter: str | None = None, state_units: Mapping | None = None,
                 kind: str = "flow") -> None:
        problem = _kind_problem(kind)
        if problem is not None:
            raise InvalidModelError([problem])
        fields = _Assembler().run(states, equations, parameters, name, description,
                                  equilibrium, bifurcation_parameter, units=state_units)
        self._fill(dict(fields, kind=kind), {})

    def _fill(self, fields: dict, lines: Mapping[str, int]) -> None:
        fields = dict(fields, lines=MappingProxyType(dict(lines)))
        for key in _FIELDS:
            object.__setattr__(self, "_symbols" if key == "symbols" else key, fields[key])

    @classmethod
    def _build(cls, fields: dict, lines: Mapping[str, int]) -> "Model":
        model = object.__new__(cls)
        model._fill(fields, lines)
        return model

    def __setattr__(self, key, value):
        raise AttributeError("a Model is immutable; derive a changed copy with with_values() "
                             "or build a new Model")

    def __delattr__(self, key):
        raise AttributeError("a Model is immutable")

    def __reduce__(self):
        fields = {k: getattr(self, k) for k in _FIELDS if k != "lines"}
        fields["symbols"] = dict(self.symbols)
        fields["state_units"] = dict(self.state_units)
        if self.equilibrium_hint is not None:
            fields["equilibrium_hint"] = dict(self.equilibrium_hint)
        return (_restore, (fields, dict(self.lines)))

    # -- reading ----------------------------------------------------------------

    @classmethod
    def from_text(cls, text: str, source: str | None = None) -> "Model":
        """Read a model from the text of a TOML model file (see docs/model-files.md).

        Raises
        ------
        ModelFileSyntaxError
            The text is not TOML (the message gives line and column).
        InvalidModelFileError
            Listing every problem of the content, with file lines.
        """
        from .toml_file import read_model_text
        return read_model_text(cls, text, source)

    @classmethod
    def from_file(cls, path: str | os.PathLike[str]) -> "Model":
        """Read a TOML model file; see :meth:`from_text`."""
        from .toml_file import read_model_file
        return read_model_file(cls, path)

    @classmethod
    def _from_pieces(cls, pieces: dict, *, source: str, locate, problems: list,
                     lines: Mapping[str, int], error) -> "Model":
        pieces = dict(pieces)
        kind = pieces.pop("kind", None)
        kind = "flow" if kind is None else kind
        problem = _kind_problem(kind)
        if problem is not None:
            at = locate("kind")
            problems.append(f"{f'line {at}: ' if at else ''}{problem}")
        assembler = _Assembler(source, locate, problems)
        fields = dict(assembler.run(error=error, **pieces), kind=kind)
        return cls._build(fields, {s: n for s, n in lines.items() if s in fields["states"]})

    # -- derived views ---------------------------------------------------------

    @property
    def state_symbols(self) -> tuple[sympy.Symbol, ...]:
        """The symbols of the states, in state order."""
        return tuple(self.symbols[s] for s in self.states)

    @property
    def parameter_symbols(self) -> tuple[sympy.Symbol, ...]:
        """The symbols of the parameters, in parameter order."""
        return tuple(self.symbols[p.name] for p in self.parameters)

    @property
    def symbols(self) -> Mapping[str, sympy.Symbol]:
        """Name -> the model's sympy symbol, for states and parameters alike
        (read-only).

        States are ``Symbol(name, real=True)``; a parameter's symbol carries
        its declared assumption with the keyword a user would write:
        ``Symbol(name, positive=True)`` for ``"positive"`` (likewise
        ``negative``, ``nonnegative``, ``nonzero``) and ``Symbol(name,
        real=True)`` for ``"real"`` and for names the model did not declare.
        Every result uses exactly these symbols, so a symbol made by hand with
        the declared assumption is the same symbol and substitutes into it.

        Examples
        --------
        >>> import sympy
        >>> from criticality import hopf
        >>> m = Model(["x", "y"], {"x": "A - (B + 1)*x + x^2*y", "y": "B*x - x^2*y"},
        ...           {"A": "positive", "B": "positive"})
        >>> m.symbols["A"] == sympy.Symbol("A", positive=True)
        True
        >>> m.symbols["x"] == sympy.Symbol("x", real=True)
        True
        >>> r = hopf(m, "B")
        >>> r.critical_value
        A**2 + 1
        >>> r.critical_value.subs(sympy.Symbol("A", positive=True), 2)
        5
        >>> r.critical_value.subs(m.symbols["A"], 2)
        5
        """
        return self._symbols

    @property
    def declared_symbols(self) -> Mapping[str, sympy.Symbol]:
        """The same mapping as :attr:`symbols`, kept for compatibility: the
        model's own symbols carry the declared assumptions."""
        return self._symbols

    @property
    def delays(self) -> tuple:
        """The distinct delays of the equations (``x(t - tau)``), empty for an
        ordinary differential equation."""
        from .delayed import delays_of
        return delays_of(self.equations)

    def parameter(self, name: str) -> Parameter:
        """The parameter called ``name``.

        Raises
        ------
        ParameterError
            For a state or an unknown name (with a suggestion).
        """
        name = _name_of(name)
        for parameter in self.parameters:
            if parameter.name == name:
                return parameter
        if name in self.states:
            raise ParameterError(f"{name!r} is a state of the model, not a parameter")
        names = [p.name for p in self.parameters]
        close = _suggest(str(name), names)
        hint = f"; did you mean {' or '.join(map(repr, close))}?" if close else ""
        listing = f" (parameters: {', '.join(names)})" if names else " (it has no parameters)"
        raise ParameterError(f"the model has no parameter {str(name)[:40]!r}{hint}{listing}")

    def defaults(self) -> dict[str, sympy.Expr]:
        """The default values of the parameters that have one, by name."""
        return {p.name: p.default for p in self.parameters if p.default is not None}

    def parse(self, text: str | sympy.Expr, context: str = "expression") -> sympy.Expr:
        """Read an expression in terms of this model's states and parameters.

        Text goes through :func:`~criticality.parse_expression`; sympy
        expressions are checked and moved onto the model's symbols by name.
        Names that are neither states nor parameters raise
        :class:`~criticality.errors.UnknownSymbolError` with a suggestion.
        """
        if isinstance(text, str):
            return parse_expression(text, self.symbols, context=context)
        return convert_sympy(text, self.symbols, context=context)

    # -- derived models and text --------------------------------------------------

    def value_substitution(self, values: Mapping) -> dict:
        """``{symbol: exact value}`` for a mapping of parameter values, checked
        as in :meth:`with_values` (raises :class:`ParameterError`)."""
        substitution, problems = self._substitution(dict(values))
        if problems:
            raise ParameterError("; ".join(problems))
        return substitution

    def _substitution(self, given: dict):
        substitution, problems = {}, []
        for key, raw in given.items():
            try:
                parameter = self.parameter(key)
                value = _constant(raw, f"value for parameter {parameter.name!r}")
            except (ParameterError, ExpressionError) as exc:
                problems.append(str(exc))
                continue
            problem = _sign_problem(parameter.name, parameter.assumption, value)
            if problem is not None:
                problems.append(problem)
            substitution[parameter.symbol] = value
        return substitution, problems

    def with_values(self, values: Mapping | None = None, /, **more: object) -> "Model":
        """A copy with exact values substituted for some parameters.

        Values may be numbers (floats are read by their decimal digits), text
        read exactly (``"1/3"``, ``"sqrt(2)"``) or sympy numbers.  The
        parameters disappear from the copy; a value that breaks the parameter's
        assumption, or makes an equation undefined or non-real, raises
        :class:`~criticality.errors.ParameterError`.  Names that are not Python
        identifiers (``lambda``) go in the mapping argument:
        ``model.with_values({"lambda": 2})``.
        """
        substitution, problems = self._substitution({**dict(values or {}), **more})
        equations = tuple(e.xreplace(substitution) for e in self.equations)
        hint = None if self.equilibrium_hint is None else {
            s: v.xreplace(substitution) for s, v in self.equilibrium_hint.items()}
        problems += _broken(dict(zip(self.states, equations)), "equation for", substitution)
        problems += _broken(hint or {}, "equilibrium value for", substitution)
        if problems:
            raise ParameterError("; ".join(problems))
        return self._derived(substitution, equations, hint)

    def _derived(self, substitution: dict, equations: tuple, hint: dict | None) -> "Model":
        fixed = {s.name: v for s, v in substitution.items()}
        notes = [f"parameter {n!r} was set to {format_expression(v)}" for n, v in fixed.items()]
        bifurcation = self.bifurcation_parameter
        if bifurcation in fixed:
            notes.append(f"the bifurcation parameter {bifurcation!r} was given a value; "
                         "the model no longer names one")
            bifurcation = None
        fields = {k: getattr(self, k) for k in _FIELDS if k != "lines"}
        fields.update(
            parameters=tuple(p for p in self.parameters if p.name not in fixed),
            equations=equations, bifurcation_parameter=bifurcation,
            equilibrium_hint=None if hint is None else MappingProxyType(hint),
            notes=self.notes + tuple(notes),
            symbols=MappingProxyType({k: v for k, v in self.symbols.items() if k not in fixed}))
        return Model._build(fields, self.lines)

    def fixed_point_flow(self) -> "Model":
        """For a map ``x -> F(x)``: the flow ``x' = F(x) - x``, whose
        equilibria are the map's fixed points and whose Taylor forms are the
        map's except for the Jacobian, shifted by ``-I``.

        Raises
        ------
        ModelKindError
            For a model that is not a map.
        """
        from ..errors import ModelKindError
        if self.kind != "map":
            raise ModelKindError("fixed_point_flow() needs a map (kind=\"map\"); this model "
                                 "is a flow")
        fields = {k: getattr(self, k) for k in _FIELDS if k != "lines"}
        fields.update(kind="flow", equations=tuple(
            e - s for e, s in zip(self.equations, self.state_symbols)))
        return Model._build(fields, self.lines)

    def require_kind(self, kind: str, analysis: str, hint: str = "") -> None:
        """Raise :class:`~criticality.errors.ModelKindError` unless the model
        is of ``kind`` (``"flow"`` or ``"map"``)."""
        from ..errors import ModelKindError
        if self.kind != kind:
            what = {"map": "a map (kind=\"map\": the equations give the next state)",
                    "flow": "a flow (the equations give x')"}[kind]
            raise ModelKindError(f"{analysis} needs {what}, but the model "
                                 f"{self.name + ' ' if self.name else ''}is a {self.kind}"
                                 + (f"; {hint}" if hint else ""))

    def to_toml(self) -> str:
        """The model as the text of a TOML model file; :meth:`from_text` reads it
        back to an equal model."""
        from .toml_file import model_to_toml
        return model_to_toml(self)

    # -- value semantics ------------------------------------------------------------

    def _key(self) -> tuple:
        hint = None if self.equilibrium_hint is None else tuple(self.equilibrium_hint.items())
        return (self.name, self.description, self.states, self.parameters, self.equations,
                hint, self.bifurcation_parameter, self.kind)

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, Model):
            return NotImplemented
        return self._key() == other._key()

    def __hash__(self) -> int:
        return hash(self._key())

    def __repr__(self) -> str:
        head = f"{self.name!r}, " if self.name else ""
        tail = ", kind='map'" if self.kind == "map" else ""
        return (f"Model({head}states=({', '.join(self.states)}), "
                f"parameters=({', '.join(p.name for p in self.parameters)}){tail})")

    def __str__(self) -> str:
        if self.kind == "map":
            lines = [f"{self.name or 'model'} (map: next state from the current one)"]
            lines += [f"  {s} -> {format_expression(e)}"
                      for s, e in zip(self.states, self.equations)]
        else:
            lines = [self.name or "model"]
            lines += [f"  {s}' = {format_expression(e)}"
                      for s, e in zip(self.states, self.equations)]
        for p in self.parameters:
            value = "" if p.default is None else f" = {format_expression(p.default)}"
            lines.append(f"  {p.name}: {p.assumption}{value}")
        return "\n".join(lines)


def _restore(fields: dict, lines: dict) -> Model:
    """Rebuild a pickled model."""
    fields = dict(fields, symbols=MappingProxyType(fields["symbols"]),
                  state_units=MappingProxyType(dict(fields.get("state_units",
           "kind") or {})))
    fields.setdefault("kind", "flow")
    if fields["equilibrium_hint"] is not None:
        fields["equilibrium_hint"] = MappingProxyType(fields["equilibrium_hint"])
    return Model._build(fields, lines)


def _broken(table: Mapping[str, sympy.Expr], label: str, substitution: dict) -> list[str]:
    """Problems of expressions made undefined or non-real by a substitution."""
    shown = ", ".join(f"{s} = {format_expression(v)}" for s, v in substitution.items())
    problems = []
    for name, expr in table.items():
        if expr.has(*_NOT_FINITE):
            problems.append(f"setting {shown} makes the {label} {name!r} undefined "
                            "(a division by zero or a singular function value)")
        elif expr.has(sympy.I) or any(part.is_number and part.is_extended_real is False
                                      for part in expr.atoms(sympy.Pow, sympy.Function)):
            problems.append(f"setting {shown} makes the {label} {name!r} non-real")
    return problems

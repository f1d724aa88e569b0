"""A model's parameters: the :class:`Parameter` value object and the checks
of assumptions and values that the model and its validation share.

Pipeline place: part of the model stage; :mod:`.core` and :mod:`.checks`
both build on it (so neither needs the other to import it).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Any

import sympy

from .syntax import _suggest
from ..errors import ExpressionError, ParameterError
from .expressions import convert_sympy, format_expression, name_problem, parse_expression

__all__ = ["Parameter", "ASSUMPTIONS", "symbol_for", "assumption_of", "critical_symbol"]

#: the sign assumptions a parameter may carry
ASSUMPTIONS = ("real", "positive", "nonnegative", "nonzero", "negative")
_SIGN_TEST = {"positive": ("is_positive", "> 0"), "nonnegative": ("is_nonnegative", ">= 0"),
              "negative": ("is_negative", "< 0"), "nonzero": ("is_nonzero", "!= 0")}
_PARAMETER_KEYS = ("assume", "value", "description", "unit")
_NUMBER_TYPES = (int, float, Fraction, sympy.Expr)


def symbol_for(name: str, assumption: str = "real") -> sympy.Symbol:
    """The model's symbol for a name with a declared assumption.

    It carries exactly the keyword a user would write, ``Symbol(name,
    positive=True)`` for ``"positive"`` (likewise ``negative``,
    ``nonnegative``, ``nonzero``, each of which implies real in sympy) and
    ``Symbol(name, real=True)`` for ``"real"``, so that the user's own symbol
    is the same symbol.

    >>> symbol_for("A", "positive") == sympy.Symbol("A", positive=True)
    True
    >>> symbol_for("x").is_real
    True
    """
    if assumption not in ASSUMPTIONS:
        raise ParameterError(f"unknown assumption {assumption!r} for {name!r} "
                             f"(one of {', '.join(ASSUMPTIONS)})")
    return sympy.Symbol(name, **{assumption: True})


def assumption_of(symbol: sympy.Symbol) -> str:
    """The assumption word a symbol made by :func:`symbol_for` carries
    (``"real"`` for any other symbol).

    >>> assumption_of(symbol_for("b", "nonnegative"))
    'nonnegative'
    """
    given = getattr(symbol, "_assumptions_orig", None) or {}
    return next((word for word in ASSUMPTIONS if given.get(word) is True), "real")


def critical_symbol(symbol: sympy.Symbol) -> sympy.Symbol:
    """The symbol ``<name>_c`` that stands for the critical value of a
    parameter in a result (``mu - mu_c``); it carries the parameter's
    assumption, as a value of that parameter.

    >>> critical_symbol(symbol_for("r", "positive")) == sympy.Symbol("r_c", positive=True)
    True
    """
    return symbol_for(f"{symbol.name}_c", assumption_of(symbol))


def _assumption_problem(assumption: object) -> str | None:
    if isinstance(assumption, str) and assumption in ASSUMPTIONS:
        return None
    if not isinstance(assumption, str):
        return f"the assumption must be a word, not {type(assumption).__name__}"
    close = _suggest(assumption, ASSUMPTIONS)
    hint = f"did you mean {close[0]!r}? " if close else ""
    return f"unknown assumption {assumption!r}; {hint}(one of {', '.join(ASSUMPTIONS)})"


def _constant(raw: object, context: str, line: int | None = None) -> sympy.Expr:
    """An exact real constant from text, a Python number or a sympy number."""
    used: list[str] = []
    collect = (lambda name, column: used.append(name))
    if isinstance(raw, str):
        value = parse_expression(raw, {}, context=context, line=line, on_unknown=collect)
    else:
        value = convert_sympy(raw, {}, context=context, on_unknown=collect)
    if used or value.free_symbols:
        names = ", ".join(dict.fromkeys(used or sorted(map(str, value.free_symbols))))
        raise ExpressionError(f"a value must be a constant number; it uses {names}",
                              context=context, line=line)
    if value.is_extended_real is False:
        raise ExpressionError(f"the value {value} is not real", context=context, line=line)
    return value


def _sign_problem(name: str, assumption: str, value: sympy.Expr) -> str | None:
    """Say how ``value`` violates the assumption of parameter ``name``, if it does."""
    if assumption not in _SIGN_TEST:
        return None
    attribute, relation = _SIGN_TEST[assumption]
    verdict = getattr(value, attribute)
    if verdict is None:
        verdict = getattr(sympy.Float(value.evalf(60), 60), attribute)
    if verdict:
        return None
    shown = format_expression(value)
    if verdict is None:
        return f"cannot decide whether the value {shown} of {name!r} is {assumption}"
    return f"the value {shown} violates the assumption that {name!r} is {assumption} ({relation})"


@dataclass(frozen=True)
class Parameter:
    """A symbolic parameter of a model.

    Attributes
    ----------
    name : str
        The parameter's name.
    assumption : str
        One of ``"real"``, ``"positive"``, ``"nonnegative"``, ``"nonzero"``,
        ``"negative"``; the parameter's symbol carries it as the sympy
        assumption of that name (see :attr:`symbol`).
    default : sympy.Expr or None
        An exact real constant (e.g. ``Rational(1, 2)``) or None.  Text, Python
        numbers and sympy numbers are accepted and converted exactly.
    declared : bool
        False for a name the equations use but the model did not declare.
    description : str or None
        What the parameter means, for people reading the model.
    unit : str or None
        Its unit (free text such as ``"1/day"``), for axis labels and tables.
    """

    name: str
    assumption: str = "real"
    default: sympy.Expr | None = None
    declared: bool = True
    description: str | None = None
    unit: str | None = None

    def __post_init__(self):
        problems = [p for p in (name_problem(self.name), _assumption_problem(self.assumption))
                    if p is not None]
        if self.description is not None and not isinstance(self.description, str):
            problems.append("the description must be a string")
        if self.unit is not None and not isinstance(self.unit, str):
            problems.append("the unit must be a string")
        if self.default is not None and not problems:
            try:
                value = _constant(self.default, f"value of parameter {self.name!r}")
            except ExpressionError as exc:
                problems.append(str(exc))
            else:
                object.__setattr__(self, "default", value)
                problems.append(_sign_problem(self.name, self.assumption, value))
        problems = [p for p in problems if p]
        if problems:
            raise ParameterError(f"parameter {self.name!r}: " + "; ".join(problems))

    @property
    def symbol(self) -> sympy.Symbol:
        """The model's symbol for this parameter: ``Symbol(name, positive=True)``
        for a positive parameter, ``Symbol(name, real=True)`` for a real one
        (see :func:`symbol_for`)."""
        return symbol_for(self.name, self.assumption)


def _name_of(key: object) -> Any:
    """A name given as a string or as a sympy symbol (matched by name)."""
    return key.name if isinstance(key, sympy.Symbol) else key

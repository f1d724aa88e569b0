"""The one delayed form the parser reads: a state applied to ``t`` minus a delay.

Internal to :mod:`criticality.model.expressions`.  Inside an equation, ``x(t -
tau)`` (``x`` a state, ``tau`` a parameter name) and ``x(t - 0.5)``, ``x(t - 1/3)`` (a positive
number, written with numbers and pi only) become :class:`~criticality.model.delayed.Delayed`.  Everything else
that calls a state is refused with a message that says what to write:
``x(t)`` (write ``x``), ``x(t + 1)`` (a future value), ``x(t - 2*tau)`` (name
the delay), ``x(s - 1)`` (the time is ``t``), ``x(t - y)`` (a state is not a
delay), several arguments, keywords.
"""

from __future__ import annotations

from typing import Any

import ast

import sympy

from .delayed import Delayed
from .syntax import _KW_PREFIX
from ..errors import ExpressionSyntaxError, ForbiddenExpressionError

__all__: list[str] = []

_TIME = "t"


def _plain(ident: str) -> str:
    return ident[len(_KW_PREFIX):] if ident.startswith(_KW_PREFIX) else ident


def delayed_call(builder: Any, node: Any) -> sympy.Expr:  # node: an ast.Call on a Name
    """Build ``Delayed(state, delay)`` from the call node ``state(t - delay)``."""
    state = _plain(node.func.id)
    form = f"{state}(t - tau)"
    if node.keywords or len(node.args) != 1 or isinstance(node.args[0], ast.Starred):
        raise builder.error(ExpressionSyntaxError, f"a delayed state takes one argument, the "
                            f"delayed time, as in {form}", node)
    arg = node.args[0]
    if isinstance(arg, ast.Name) and _plain(arg.id) == _TIME:
        raise builder.error(ForbiddenExpressionError, f"write {state} for the current value "
                            f"{state}(t); a delayed value is written {form}", node)
    if isinstance(arg, ast.BinOp) and isinstance(arg.op, ast.Add) and _is_time(arg.left):
        raise builder.error(ForbiddenExpressionError, f"{builder.piece(node)} is a future value;"
                            f" a retarded equation uses past values such as {form}", node)
    if not (isinstance(arg, ast.BinOp) and isinstance(arg.op, ast.Sub)):
        raise builder.error(ForbiddenExpressionError, f"{builder.piece(node)} calls the state "
                            f"{state!r}; the only call of a state is the delayed value {form} "
                            f"(if {state!r} multiplies the bracket, write {state}*(...))", node)
    if not _is_time(arg.left):
        raise builder.error(ForbiddenExpressionError, f"in {builder.piece(node)} the time must "
                            f"be written t, as in {form}", node)
    state_symbol = builder.symbols[state] if builder.symbols is not None else sympy.Symbol(
        state, real=True)
    return Delayed(state_symbol, _delay(builder, node, arg.right, state))


def _is_time(node) -> bool:
    return isinstance(node, ast.Name) and _plain(node.id) == _TIME


def _numeric(node) -> bool:
    """Whether a delay is written with numbers only (``0.5``, ``1/3``, ``2*pi``)."""
    for part in ast.walk(node):
        if isinstance(part, ast.Name) and _plain(part.id) != "pi":
            return False
        if not isinstance(part, (ast.Constant, ast.Name, ast.BinOp, ast.UnaryOp, ast.operator,
                                 ast.unaryop, ast.Load)):
            return False
    return True


def _delay(builder, call, node, state: str) -> sympy.Expr:
    form = f"{state}(t - tau)"
    if isinstance(node, ast.Name):
        name = _plain(node.id)
        if name in builder.delayed:
            raise builder.error(ForbiddenExpressionError, f"in {builder.piece(call)} the delay "
                                f"{name!r} is a state; a delay is a positive parameter or a "
                                "positive number", node)
        if name == "pi":
            return sympy.pi
        value = builder.name(node, 0)
        if not isinstance(value, sympy.Symbol):
            raise builder.error(ForbiddenExpressionError, f"the delay {name!r} in "
                                f"{builder.piece(call)} is not a parameter", node)
        return value
    if _numeric(node):
        value = builder.build(node, 1)
        if value.is_zero:
            raise builder.error(ForbiddenExpressionError, f"the delay in {builder.piece(call)} "
                                f"is 0; write {state} for the current value", node)
        if not value.is_positive:
            raise builder.error(ForbiddenExpressionError, f"the delay in {builder.piece(call)} "
                                "must be positive", node)
        return value
    raise builder.error(ForbiddenExpressionError, f"the delay in {builder.piece(call)} must be "
                        f"one parameter name or a positive number, as in {form} or {state}(t - 1)"
                        "; for a multiple of a delay declare a new positive parameter", node)

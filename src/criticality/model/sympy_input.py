"""Expressions built with sympy: the whitelist check and the inverse printer.

Internal to :mod:`criticality.model.expressions`.  :func:`convert_sympy` applies the
parser's whitelist to an expression a user built with sympy and moves it onto
the model's own symbols (matched by name); :func:`format_expression` writes an
expression in the model syntax so that ``parse_expression`` reads it back
unchanged.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any, Callable, Mapping

import mpmath
import sympy
from sympy.core.function import AppliedUndef

from .syntax import (_DECIMAL, _MAX_DECIMAL_EXPONENT, _NOT_FINITE, FUNCTIONS,
                           MAX_EXPONENT, NOT_ANALYTIC, _decimal_to_rational, _suggest,
                           name_problem, MAX_CONSTANT_BITS, constant_out_of_range)
from .delayed import Delayed
from ..errors import ExpressionLimitError, ForbiddenExpressionError, UnknownSymbolError

__all__ = ["convert_sympy", "format_expression", "decimal_to_rational"]

_FUNCTION_NAMES = {cls: name for name, cls in FUNCTIONS.items() if name not in ("ln", "sqrt")}
_FUNCTION_CLASSES = frozenset(_FUNCTION_NAMES)
_ADD, _MUL, _NEG, _POW, _ATOM = 1, 2, 3, 4, 5


def decimal_to_rational(text: str, *, where: dict | None = None) -> sympy.Rational:
    """Exact value of a decimal numeral such as ``'-1.5e-3'`` (Python's ``repr``
    of a float, or sympy's text of a Float)."""
    body = text.strip()
    negative = body.startswith("-")
    match = _DECIMAL.fullmatch(body.lstrip("+-"))
    if not body or match is None or not (match.group(1) or match.group(2)):
        raise ForbiddenExpressionError(f"{text!r} is not a finite decimal number", **(where or {}))
    intpart, frac, exp = match.group(1), match.group(2) or "", match.group(3)
    if abs(int(exp or 0)) > _MAX_DECIMAL_EXPONENT:
        raise ExpressionLimitError(f"the number {text} is out of range (decimal exponents are "
                                   f"limited to +-{_MAX_DECIMAL_EXPONENT})", **(where or {}))
    value = _decimal_to_rational(intpart, frac, exp)
    return -value if negative else value


def _float_value(number, exact: bool, where: dict | None) -> sympy.Expr:
    """A Python or sympy float as an exact fraction of its shortest decimal text."""
    if isinstance(number, float):
        text = repr(number)
    else:
        if not number.is_finite:
            raise ForbiddenExpressionError(f"the number {number} is not finite", **(where or {}))
        text = mpmath.libmp.to_str(number._mpf_, mpmath.libmp.prec_to_dps(number._prec))
    if text in ("inf", "-inf", "nan", "+inf", "-nan"):
        raise ForbiddenExpressionError(f"the number {text} is not finite", **(where or {}))
    value = decimal_to_rational(text, where=where)
    return value if exact else sympy.Float(number)


def convert_sympy(expr: Any, symbols: Mapping[str, sympy.Expr] | None = None, *,
                  context: str | None = None, line: int | None = None, exact: bool = True,
                  on_unknown: Callable[[str, None], object] | None = None) -> sympy.Expr:
    """Check a sympy expression (or a Python number) against the model syntax.

    Symbols are matched by name, whatever assumptions they carry, and replaced
    by ``symbols[name]`` (or by ``Symbol(name, real=True)`` when ``symbols`` is
    None).  Floats become exact fractions of their decimal text unless
    ``exact`` is False.  Unknown names call ``on_unknown(name, None)`` or raise
    :class:`~criticality.errors.UnknownSymbolError`.

    ``context`` and ``line`` say where the expression belongs, as for
    :func:`~criticality.model.expressions.parse_expression`.

    Raises
    ------
    ForbiddenExpressionError
        Functions outside the whitelist, the imaginary unit, infinities, NaN,
        undefined functions, relations and other non-expressions.
    ExpressionLimitError
        A power with a numeric exponent beyond ``MAX_EXPONENT``.
    """
    where: dict[str, Any] = {"context": context, "line": line}
    if isinstance(expr, bool) or not isinstance(expr, (int, float, Fraction, sympy.Expr)):
        raise ForbiddenExpressionError(f"expected an expression, found {type(expr).__name__} "
                                       f"{_short(expr)}", **where)
    if isinstance(expr, int):
        return sympy.Integer(expr)
    if isinstance(expr, Fraction):
        return sympy.Rational(expr.numerator, expr.denominator)
    if isinstance(expr, float):
        return _float_value(expr, exact, where)
    replacements: dict = {}
    seen: set = set()
    stack = [expr]
    while stack:
        node = stack.pop()
        if node in seen:
            continue
        seen.add(node)
        target = _check_node(node, stack, symbols, where, exact, on_unknown)
        if target is not None and target is not node:
            replacements[node] = target
    result = expr.xreplace(replacements) if replacements else expr
    if result.has(*_NOT_FINITE, sympy.I):
        raise ForbiddenExpressionError(f"{_short(result)} is not a finite real expression",
                                       **where)
    for atom in result.atoms(sympy.Function, sympy.Pow):
        if atom.is_number and not atom.is_Rational and constant_out_of_range(atom):
            raise ExpressionLimitError(f"the value of {_short(atom)} is beyond "
                                       f"2^+-{MAX_CONSTANT_BITS}, too large or too small to "
                                       "evaluate", **where)
    return result


def _check_node(node, stack, symbols, where, exact, on_unknown):
    if node.is_Symbol:
        return _symbol(node, symbols, where, on_unknown)
    if node in _NOT_FINITE or node is sympy.I or node.is_Number and not node.is_finite:
        word = "the imaginary unit I" if node is sympy.I else f"{node} (not finite)"
        raise ForbiddenExpressionError(f"{word} is not allowed; the model must be real and finite",
                                       **where)
    if node.is_Float:
        return _float_value(node, exact, where)
    if node.is_Rational or node is sympy.pi or node is sympy.E:
        return None
    if node.is_Pow:
        base, exponent = node.args
        if exponent.is_Number and abs(exponent) > MAX_EXPONENT and base not in (
                sympy.S.Zero, sympy.S.One, sympy.S.NegativeOne):
            raise ExpressionLimitError(f"the exponent of {_short(node)} is beyond "
                                       f"+-{MAX_EXPONENT}", **where)
    elif isinstance(node, Delayed):
        _check_delayed(node, where)
    elif not (node.is_Add or node.is_Mul or type(node) in _FUNCTION_CLASSES):
        raise ForbiddenExpressionError(_refusal(node), **where)
    stack.extend(node.args)
    return None


def _check_delayed(node, where) -> None:
    """A delayed state built with sympy: a symbol and a positive number or a symbol."""
    state, delay = node.args
    if not state.is_Symbol:
        raise ForbiddenExpressionError(f"{_short(node)}: only a state symbol can be delayed",
                                       **where)
    if not (delay.is_Symbol or delay.is_Rational and delay.is_positive or delay is sympy.pi
            or delay.is_Float and delay.is_positive):
        raise ForbiddenExpressionError(f"{_short(node)}: the delay must be a parameter symbol or "
                                       "a positive number", **where)


def _symbol(node, symbols, where, on_unknown):
    name = node.name
    problem = name_problem(name)
    if problem is not None:
        raise ForbiddenExpressionError(f"the symbol {name!r} cannot be used: {problem}",
                                       piece=name, **where)
    if symbols is None:
        return sympy.Symbol(name, real=True)
    target = symbols.get(name)
    if target is not None:
        return target
    if on_unknown is not None:
        on_unknown(name, None)
        return sympy.Symbol(name, real=True)
    suggestions = _suggest(name, list(symbols))
    hint = f"; did you mean {' or '.join(map(repr, suggestions))}?" if suggestions else ""
    raise UnknownSymbolError(f"unknown name {name!r}{hint}", name=name, suggestions=suggestions,
                             piece=name, **where)


def _refusal(node) -> str:
    kind = type(node).__name__
    if isinstance(node, AppliedUndef):
        return f"the undefined function {kind} in {_short(node)} is not allowed"
    if kind in NOT_ANALYTIC:
        return f"{_short(node)} is not allowed: {NOT_ANALYTIC[kind]}"
    if isinstance(node, sympy.NumberSymbol):
        return f"the constant {kind} is not allowed; write its value (only pi and exp(1) are known)"
    if isinstance(node, sympy.Function):
        return (f"the function {kind} in {_short(node)} is not allowed "
                f"(allowed: {', '.join(FUNCTIONS)})")
    return f"{_short(node)} ({kind}) is not allowed in a model expression"


def _short(obj) -> str:
    text = str(obj)
    return repr(text if len(text) <= 60 else text[:57] + "...")


# -- printing ----------------------------------------------------------------


def format_expression(expr: sympy.Expr | int | float) -> str:
    """Write an expression in the model syntax.

    ``parse_expression(format_expression(e)) == e`` for every expression of
    the grammar in sympy's automatic canonical form whose symbols are real
    (floats read back equal with ``exact=False``).  Euler's number prints as
    ``exp(1)``, pi as ``pi``.

    Raises
    ------
    ForbiddenExpressionError
        For the imaginary unit, infinities, other constants, functions outside
        the whitelist and symbols whose names the parser would not read back.

    Examples
    --------
    >>> from criticality.model.expressions import parse_expression
    >>> format_expression(parse_expression("x^2/(2*K + x) - exp(1)*y"))
    'x**2/(2*K + x) - exp(1)*y'
    """
    if isinstance(expr, (int, Fraction)) and not isinstance(expr, bool):
        expr = convert_sympy(expr)
    if not isinstance(expr, sympy.Expr):
        raise ForbiddenExpressionError(f"cannot write {type(expr).__name__} {_short(expr)} as an "
                                       "expression")
    return _text(expr)[0]


def _text(e) -> tuple[str, int]:
    if e in _NOT_FINITE:
        raise ForbiddenExpressionError(f"cannot write {e}: it is not finite")
    if e.is_Number:
        return _number(e)
    if e is sympy.pi:
        return "pi", _ATOM
    if e is sympy.E:
        return "exp(1)", _ATOM
    if e.is_Symbol:
        problem = name_problem(e.name)
        if problem is not None:
            raise ForbiddenExpressionError(f"cannot write the symbol {e.name!r}: {problem}")
        return e.name, _ATOM
    if e.is_Add:
        return _sum(e)
    if e.is_Mul:
        return _product(e)
    if e.is_Pow:
        return _power(e)
    if isinstance(e, Delayed):
        return f"{_text(e.state)[0]}(t - {_wrap(*_text(e.delay), _POW)})", _ATOM
    if type(e) in _FUNCTION_CLASSES and len(e.args) == 1:
        return f"{_FUNCTION_NAMES[type(e)]}({_text(e.args[0])[0]})", _ATOM
    if e is sympy.I:
        raise ForbiddenExpressionError("cannot write the imaginary unit I: "
                                       "model expressions are real")
    raise ForbiddenExpressionError("cannot write " + _refusal(e).replace(" is not allowed", ""))


def _number(e) -> tuple[str, int]:
    if not e.is_finite:
        raise ForbiddenExpressionError(f"cannot write {e}: it is not finite")
    if e.is_Integer:
        return str(int(e)), (_ATOM if e >= 0 else _NEG)
    if e.is_Rational:
        text = f"{abs(int(e.p))}/{int(e.q)}"
        return (text, _MUL) if e > 0 else ("-" + text, _NEG)
    text = repr(float(e)) if e._prec == 53 else "inf"
    if text in ("inf", "-inf"):
        text = mpmath.libmp.to_str(e._mpf_, mpmath.libmp.prec_to_dps(e._prec) + 2)
    return text, (_NEG if text.startswith("-") else _ATOM)


def _wrap(text: str, prec: int, least: int) -> str:
    return text if prec >= least else f"({text})"


def _sum(e) -> tuple[str, int]:
    out: list[str] = []
    for term in e.as_ordered_terms():
        coeff = term.as_coeff_Mul()[0]
        negative = coeff.is_extended_negative
        text, prec = _text(-term if negative else term)
        text = _wrap(text, prec, _MUL)
        if not out:
            out.append("-" + text if negative else text)
        else:
            out.append((" - " if negative else " + ") + text)
    return "".join(out), _ADD


def _product(e) -> tuple[str, int]:
    coeff, rest = e.as_coeff_Mul()
    if coeff.is_extended_negative:
        text, prec = _text(sympy.Mul(-coeff, rest))
        return "-" + _wrap(text, prec, _MUL), _NEG
    return _fraction(sympy.Mul.make_args(e))


def _fraction(factors) -> tuple[str, int]:
    numerator, denominator = [], []
    for factor in factors:
        if factor.is_Rational and not factor.is_Integer:
            if factor.p != 1:
                numerator.append(sympy.Integer(factor.p))
            denominator.append(sympy.Integer(factor.q))
        elif factor.is_Pow and factor.exp.is_Rational and factor.exp.is_negative:
            denominator.append(sympy.Pow(factor.base, -factor.exp))
        else:
            numerator.append(factor)
    top = "*".join(_wrap(*_text(f), _POW) for f in numerator) or "1"
    if not denominator:
        return top, (_MUL if len(numerator) > 1 else _text(numerator[0])[1])
    parts = [_text(f) for f in denominator]
    if len(parts) == 1:
        bottom = _wrap(*parts[0], _POW)
    else:
        bottom = "(" + "*".join(_wrap(t, p, _POW) for t, p in parts) + ")"
    return f"{top}/{bottom}", _MUL


def _power(e) -> tuple[str, int]:
    base, exponent = e.args
    if base is sympy.E:
        return f"exp({_text(exponent)[0]})", _ATOM
    if exponent is sympy.S.Half:
        return f"sqrt({_text(base)[0]})", _ATOM
    if exponent.is_Rational and exponent.is_negative:
        return _fraction([e])
    base_text = _wrap(*_text(base), _ATOM)
    exp_text, exp_prec = _text(exponent)
    return f"{base_text}**{_wrap(exp_text, exp_prec, _ATOM)}", _POW

"""Whitelisted expression parser and its inverse printer.

This is the entry point of all model text: right-hand sides, equilibrium
values, parameter values and conditions go through :func:`parse_expression`,
which walks Python's :mod:`ast` by hand and builds sympy objects.  User text is
never passed to ``eval``, ``exec``, ``sympify`` or ``parse_expr``.
:func:`format_expression` prints an expression back in the same syntax, and
:func:`convert_sympy` checks an expression a user built with sympy against the
same whitelist.

Grammar
-------
::

    expression := term (("+" | "-") term)*
    term       := factor (("*" | "/") factor)*
    factor     := ("+" | "-") factor | power
    power      := atom [("**" | "^") factor]
    atom       := number | name | function "(" expression ")" | "(" expression ")"

* ``^`` means power, exactly like ``**`` (it is replaced before parsing, so
  ``x^2 + 1`` is ``x**2 + 1``); powers are right-associative.
* Numbers are decimal: ``3``, ``0.1``, ``2.5e-3``, ``1_000``.  Decimals are
  exact fractions by default (``0.1`` is 1/10); ``exact=False`` gives floats.
* Names are letters, digits and underscores, not starting with a digit or with
  ``__``; every name is a real symbol (``E``, ``I``, ``S``, ``N``, ``beta``,
  ``gamma``, ``lambda`` are ordinary names).  ``pi`` is the constant pi and
  Euler's number is written ``exp(1)``.
* Functions (one argument each): ``exp``, ``log`` (natural, alias ``ln``),
  ``sqrt``, ``sin``, ``cos``, ``tan``, ``cot``, ``sec``, ``csc``, ``sinh``,
  ``cosh``, ``tanh``, ``coth``, ``sech``, ``csch``, ``asin``, ``acos``,
  ``atan``, ``asinh``, ``acosh``, ``atanh``, ``erf``, ``erfc``.  Functions that
  are not analytic (``abs``, ``sign``, ``min``, ``max``, ``floor``,
  ``Heaviside``, ...) are refused, because the analysis needs an analytic
  vector field.
* Statement keywords (``lambda``, ``as``, ``del``, ``from``, ...) may be used
  as names; the words ``and or not in is if else for None True False async
  await yield`` may not.
* Only ASCII is accepted; the error for a look-alike character (a Unicode
  minus, a Greek letter, a superscript) names the ASCII spelling to use.
* sympy evaluates each operation as usual (``sin(-x)`` is ``-sin(x)``,
  ``sqrt(4*x)`` is ``2*sqrt(x)``), except that a function of a function or of
  a non-integer power is kept as written: sympy's rewriting of such
  compositions (``cosh(asinh(x))`` to ``sqrt(x**2 + 1)``) queries its
  assumption system at a cost that grows steeply with depth.  ``sqrt(x^2)``,
  which sympy makes ``Abs(x)`` for real ``x``, is refused as not analytic.
* Refused: attributes, subscripts, calls of anything but the functions above,
  keyword or star arguments, lambdas, comprehensions, conditionals,
  comparisons, boolean operators, strings, complex literals, several
  statements, empty text.  Size limits (the ``MAX_*`` constants) make hostile
  text fail fast with :class:`~criticality.errors.ExpressionLimitError`.
"""

from __future__ import annotations

import ast
import difflib
from typing import Callable, Collection, Mapping

import sympy

from .syntax import (EXPRESSION_KEYWORDS, FUNCTIONS, MAX_DEPTH, MAX_EXPONENT,
                           MAX_LITERAL_DIGITS, MAX_NAME_LENGTH, MAX_NESTING, MAX_NODES,
                           MAX_TEXT_LENGTH, MAX_TRANSCENDENTAL,
                           NOT_ANALYTIC, RESERVED_NAMES, _DECIMAL, _FLOAT_RANGE, _KW_PREFIX,
                           _MAX_DECIMAL_EXPONENT, _MAX_POWER_BITS, _MAX_ROOT_BITS,
                           _MAX_TOTAL_POWER_BITS, _NOT_FINITE, _Chunk, _decimal_to_rational,
                           _parse_chunk, _quote, _scan, _split_terms, _suggest, _Where,
                           name_problem, MAX_CONSTANT_BITS, constant_out_of_range)
from .sympy_input import convert_sympy, format_expression
from .delay_syntax import delayed_call
from ..errors import (CriticalityError, ExpressionLimitError, ExpressionSyntaxError,
                     ForbiddenExpressionError, UnknownSymbolError)

__all__ = [
    "parse_expression", "format_expression", "convert_sympy", "name_problem",
    "FUNCTIONS", "NOT_ANALYTIC", "RESERVED_NAMES", "EXPRESSION_KEYWORDS",
    "MAX_TEXT_LENGTH", "MAX_DEPTH", "MAX_NODES", "MAX_LITERAL_DIGITS", "MAX_EXPONENT",
    "MAX_NAME_LENGTH", "MAX_NESTING", "MAX_TRANSCENDENTAL",
]

_REFUSED_NODES = {
    ast.Attribute: "attribute access such as {piece} is not allowed",
    ast.Subscript: "subscripts such as {piece} are not allowed; write indexed names as x1 or x_1",
    ast.Lambda: "lambda expressions are not allowed",
    ast.ListComp: "comprehensions such as {piece} are not allowed",
    ast.SetComp: "comprehensions such as {piece} are not allowed",
    ast.DictComp: "comprehensions such as {piece} are not allowed",
    ast.GeneratorExp: "comprehensions such as {piece} are not allowed",
    ast.IfExp: "conditional expressions such as {piece} are not allowed; the analysis "
               "needs one analytic formula",
    ast.Compare: "comparisons such as {piece} are not allowed in an expression",
    ast.BoolOp: "boolean operators ('and', 'or') such as {piece} are not allowed",
    ast.Tuple: "the comma-separated list {piece} is not one expression",
    ast.List: "lists such as {piece} are not allowed",
    ast.Set: "sets such as {piece} are not allowed",
    ast.Dict: "dicts such as {piece} are not allowed",
    ast.JoinedStr: "strings are not allowed",
    ast.FormattedValue: "strings are not allowed",
    ast.NamedExpr: "assignment expressions (':=') are not allowed",
    ast.Starred: "star arguments such as {piece} are not allowed",
    ast.Await: "'await' is not allowed", ast.Yield: "'yield' is not allowed",
    ast.YieldFrom: "'yield' is not allowed", ast.Slice: "slices are not allowed",
}
_OPERATORS = {ast.Mod: "%", ast.FloorDiv: "//", ast.MatMult: "@", ast.LShift: "<<",
              ast.RShift: ">>", ast.BitOr: "|", ast.BitAnd: "&", ast.BitXor: "^"}


class _Builder:
    """Walks a checked syntax tree and builds the sympy expression."""

    def __init__(self, where: _Where, symbols, on_unknown, exact: bool, delayed=None):
        self.where, self.symbols, self.on_unknown, self.exact = where, symbols, on_unknown, exact
        self.delayed = delayed   # state names that may be written x(t - tau), or None
        self.power_budget = _MAX_TOTAL_POWER_BITS
        self.floats = False
        self.level = 0          # functions and non-integer powers around the current node
        self.transcendental = 0
        self.chunk: _Chunk | None = None

    def error(self, cls, message: str, node, **kw):
        assert self.chunk is not None  # set before the first node is visited
        start, end = self.chunk.span(node)
        return self.where.error(cls, message, start, end, **kw)

    def piece(self, node) -> str:
        assert self.chunk is not None
        start, end = self.chunk.span(node)
        return _quote(self.where.text[start:end])

    def build(self, node, depth: int) -> sympy.Expr:
        if depth > MAX_DEPTH:
            raise self.error(ExpressionLimitError,
                             f"the expression is nested more than {MAX_DEPTH} deep", node)
        method = _METHODS.get(type(node))
        if method is None:
            template = _REFUSED_NODES.get(type(node), "{piece} is not allowed in an expression")
            raise self.error(ForbiddenExpressionError,
                             template.format(piece=self.piece(node)), node)
        try:
            return method(self, node, depth)
        except CriticalityError:
            raise
        except (ArithmeticError, ValueError, TypeError, RecursionError, MemoryError) as exc:
            message = (f"{self.piece(node)} could not be evaluated exactly "
                       f"({type(exc).__name__}: {str(exc)[:80]})")
            raise self.error(ExpressionLimitError, message, node) from None

    # -- leaves -----------------------------------------------------------

    def constant(self, node, depth):
        value = node.value
        if isinstance(value, bool) or value is None or value is Ellipsis:
            raise self.error(ForbiddenExpressionError, f"{self.piece(node)} is not a number", node)
        if isinstance(value, int):
            return sympy.Integer(value)
        if isinstance(value, float):
            return self.decimal(node)
        if isinstance(value, complex):
            raise self.error(ForbiddenExpressionError, f"the imaginary number {self.piece(node)} "
                             "is not allowed; the model must be real", node)
        raise self.error(ForbiddenExpressionError, "strings are not allowed", node)

    def decimal(self, node):
        literal = self.chunk.code[node.col_offset:node.end_col_offset].replace("_", "")
        match = _DECIMAL.fullmatch(literal)
        if match is None:
            raise self.error(ExpressionSyntaxError,
                             f"{self.piece(node)} is not a decimal number", node)
        intpart, frac, exp = match.group(1), match.group(2) or "", match.group(3)
        if abs(int(exp or 0)) > _MAX_DECIMAL_EXPONENT or node.value == float("inf"):
            raise self.error(ExpressionLimitError, f"the number {self.piece(node)} is out of "
                             f"range (decimal exponents are limited to +-{_MAX_DECIMAL_EXPONENT} "
                             "and values to 1e308)", node)
        value = _decimal_to_rational(intpart, frac, exp)
        if self.exact:
            return value
        self.floats = True
        return sympy.Float(value, 15)

    def name(self, node, depth):
        ident = node.id
        name = ident[len(_KW_PREFIX):] if ident.startswith(_KW_PREFIX) else ident
        if name == "pi":
            return sympy.pi
        if name in FUNCTIONS:
            raise self.error(ForbiddenExpressionError, f"{name!r} is a function; "
                             f"call it with an argument, as in {name}(x)", node)
        if self.symbols is None:
            return sympy.Symbol(name, real=True)
        found = self.symbols.get(name)
        if found is not None:
            return found
        if self.on_unknown is not None:
            self.on_unknown(name, self.where.position(self.chunk.span(node)[0])[1])
            return sympy.Symbol(name, real=True)
        known = sorted(self.symbols)
        message = f"unknown name {name!r}"
        suggestions = _suggest(name, known)
        if suggestions:
            message += f"; did you mean {' or '.join(map(repr, suggestions))}?"
        elif known and len(known) <= 15:
            message += f" (known names: {', '.join(known)})"
        raise self.error(UnknownSymbolError, message, node, name=name, suggestions=suggestions)

    # -- operators --------------------------------------------------------

    def unary(self, node, depth):
        negative = False
        while isinstance(node, ast.UnaryOp):
            if isinstance(node.op, ast.USub):
                negative = not negative
            elif not isinstance(node.op, ast.UAdd):
                word = "not" if isinstance(node.op, ast.Not) else "~"
                raise self.error(ForbiddenExpressionError, f"the operator {word!r} in "
                                 f"{self.piece(node)} is not allowed", node)
            node = node.operand
        value = self.build(node, depth + 1)
        return -value if negative else value

    def binary(self, node, depth):
        op = type(node.op)
        if op in (ast.Add, ast.Sub):
            return sympy.Add(*self.chain(node, (ast.Add, ast.Sub), depth))
        if op in (ast.Mult, ast.Div):
            # Python reads -a*b as (-a)*b; sympy's -(a*b) keeps a sum a unexpanded,
            # so take the sign of the first factor off the whole product.
            negative = False
            leftmost = node
            while isinstance(leftmost, ast.BinOp) and isinstance(leftmost.op, (ast.Mult, ast.Div)):
                leftmost = leftmost.left
            unsigned = leftmost
            while isinstance(unsigned, ast.UnaryOp) and isinstance(unsigned.op,
                                                                   (ast.USub, ast.UAdd)):
                negative ^= isinstance(unsigned.op, ast.USub)
                unsigned = unsigned.operand
            product = sympy.Mul(*self.chain(node, (ast.Mult, ast.Div), depth, leftmost, unsigned))
            if product.is_Pow or product.is_Mul:
                self.check_degree(product, node)
            return -product if negative else product
        if op is ast.Pow:
            if _integer_literal(node.right):
                base = self.build(node.left, depth + 1)
                return self.power(base, self.build(node.right, depth + 1), node)
            self.enter(node)
            try:
                base = self.build(node.left, depth + 1)
                exponent = self.build(node.right, depth + 1)
            finally:
                self.level -= 1
            return self.power(base, exponent, node)
        symbol = _OPERATORS.get(op, op.__name__)
        raise self.error(ForbiddenExpressionError, f"the operator {symbol!r} in "
                         f"{self.piece(node)} is not allowed", node)

    def chain(self, node, ops, depth, replace=None, by=None) -> list:
        """Operands of a left-associated run of + and - (or * and /), built in
        text order without recursing along the run; the first operand
        ``replace`` is built as ``by``."""
        items = []
        while isinstance(node, ast.BinOp) and isinstance(node.op, ops):
            items.append((node.op, node.right))
            node = node.left
        items.append((None, by if node is replace else node))
        operands = []
        for op, operand in reversed(items):
            value = self.build(operand, depth + 1)
            if isinstance(op, ast.Sub):
                value = -value
            elif isinstance(op, ast.Div):
                if _is_zero(value):
                    raise self.error(ForbiddenExpressionError,
                                     f"division by zero: {self.piece(operand)} is 0", operand)
                value = sympy.Pow(value, -1)
            operands.append(value)
        return operands

    def power(self, base, exponent, node):
        if _is_zero(base) and exponent.is_number and exponent.is_extended_negative:
            raise self.error(ForbiddenExpressionError,
                             f"division by zero: {self.piece(node)} is a negative power of 0", node)
        if exponent.is_Number:
            self.check_numeric_power(base, exponent, node)
        evaluate = exponent.is_Integer or not _composed(base)
        return self.check_value(sympy.Pow(base, exponent, evaluate=evaluate), node)

    def check_numeric_power(self, base, exponent, node) -> None:
        trivial = base in (sympy.S.Zero, sympy.S.One, sympy.S.NegativeOne)
        if abs(exponent) > MAX_EXPONENT and not trivial:
            raise self.error(ExpressionLimitError, f"the exponent of {self.piece(node)} is "
                             f"beyond +-{MAX_EXPONENT}", node)
        if not base.is_Rational or trivial:
            return
        bits = max(int(base.p).bit_length(), int(base.q).bit_length())
        if not exponent.is_Integer and bits > _MAX_ROOT_BITS:
            raise self.error(ExpressionLimitError, f"{self.piece(node)} takes a fractional power "
                             f"of a number of more than {_MAX_ROOT_BITS} bits", node)
        size = int(bits * abs(exponent)) + 1
        self.power_budget -= size
        if size > _MAX_POWER_BITS or self.power_budget < 0:
            raise self.error(ExpressionLimitError, f"the value of {self.piece(node)} would have "
                             f"about {int(size * 0.30103)} digits, beyond the limit", node)

    def enter(self, node) -> None:
        """Count a function call or non-integer power around the nodes built next.

        sympy's automatic rewriting and assumption queries on such nested
        constructs cost time that grows steeply with their nesting."""
        self.level += 1
        self.transcendental += 1
        if self.level > MAX_NESTING:
            self.level -= 1
            raise self.error(ExpressionLimitError, f"functions and non-integer powers are nested "
                             f"more than {MAX_NESTING} deep in {self.piece(node)}", node)
        if self.transcendental > MAX_TRANSCENDENTAL:
            self.level -= 1
            raise self.error(ExpressionLimitError, f"more than {MAX_TRANSCENDENTAL} function "
                             "calls and non-integer powers in one expression", node)

    def call(self, node, depth):
        if self.delayed is not None and isinstance(node.func, ast.Name) and (
                node.func.id in self.delayed):
            return delayed_call(self, node)
        name = self.function_name(node)
        self.enter(node)
        try:
            argument = self.build(node.args[0], depth + 1)
        finally:
            self.level -= 1
        if self.floats:
            self.check_floats(argument, node)
        if name == "sqrt":
            return self.power(argument, sympy.Rational(1, 2), node)
        value = FUNCTIONS[name](argument, evaluate=not _composed(argument))
        return self.check_value(value, node)

    def function_name(self, node) -> str:
        func = node.func
        if isinstance(func, ast.Constant):
            raise self.error(ExpressionSyntaxError, f"missing '*' before '(' in {self.piece(node)}?"
                             " write 2*(x + 1), not 2(x + 1)", node)
        if not isinstance(func, ast.Name):
            raise self.error(ForbiddenExpressionError, f"calling {self.piece(func)} is not "
                             "allowed; only the listed functions can be called", node)
        name = func.id[len(_KW_PREFIX):] if func.id.startswith(_KW_PREFIX) else func.id
        if name not in FUNCTIONS:
            raise self.error(ForbiddenExpressionError, self.unknown_function(name), node)
        if node.keywords:
            raise self.error(ForbiddenExpressionError,
                             f"keyword arguments are not allowed in {self.piece(node)}", node)
        if any(isinstance(arg, ast.Starred) for arg in node.args):
            raise self.error(ForbiddenExpressionError,
                             f"star arguments are not allowed in {self.piece(node)}", node)
        if len(node.args) != 1:
            hint = ("; for a logarithm to base b write log(x)/log(b)"
                    if name in ("log", "ln") else "")
            raise self.error(ExpressionSyntaxError, f"{name} takes exactly one argument "
                             f"({len(node.args)} given){hint}", node)
        return name

    def unknown_function(self, name: str) -> str:
        if name in NOT_ANALYTIC:
            return f"the function {name!r} is not allowed: {NOT_ANALYTIC[name]}"
        message = f"{name!r} is not a known function"
        suggestions = difflib.get_close_matches(name, list(FUNCTIONS), n=2, cutoff=0.7)
        if suggestions:
            message += f"; did you mean {' or '.join(map(repr, suggestions))}?"
        return message + (f" (if {name!r} multiplies the bracket, write {name}*(...); "
                          f"allowed functions: {', '.join(FUNCTIONS)})")

    # -- checks on values -------------------------------------------------

    def check_value(self, value, node):
        if value.has(sympy.Abs, sympy.sign):
            raise self.error(ForbiddenExpressionError, f"{self.piece(node)} equals {value} for "
                             "real values, which is not analytic at 0; write the analytic "
                             "form you mean (e.g. x instead of sqrt(x^2))", node)
        if value.is_number:
            if value.has(*_NOT_FINITE):
                raise self.error(ForbiddenExpressionError, f"{self.piece(node)} is not finite "
                                 "(a singular value such as 1/0 or log(0))", node)
            if value.has(sympy.I) or value.is_extended_real is False:
                raise self.error(ForbiddenExpressionError,
                                 f"{self.piece(node)} is not a real number", node)
            if not value.is_Rational:
                self.check_magnitude(value, node)
        elif value.is_Pow or value.is_Mul:
            self.check_degree(value, node)
        if self.floats:
            self.check_floats(value, node)
        return value

    def check_magnitude(self, value, node) -> None:
        """A constant must have a value the engine can evaluate: within
        2^+-MAX_CONSTANT_BITS (``exp(exp(1000))`` is refused by its value,
        however it is spelled)."""
        if constant_out_of_range(value):
            raise self.error(ExpressionLimitError, f"the value of {self.piece(node)} is beyond "
                             f"2^+-{MAX_CONSTANT_BITS} (about 10^+-"
                             f"{int(MAX_CONSTANT_BITS * 0.30103)}), too large or too small to "
                             "evaluate", node)

    def check_degree(self, value, node) -> None:
        """The exponent limit on the evaluated power: sympy merges
        ``(x^1000)^1000`` into ``x^1000000`` and ``x^600*x^600`` into
        ``x^1200``; such a power is refused as if written so."""
        powers = [value] if value.is_Pow else [a for a in value.args if a.is_Pow]
        for p in powers:
            if p.exp.is_Number and abs(p.exp) > MAX_EXPONENT and p.base not in (
                    sympy.S.Zero, sympy.S.One, sympy.S.NegativeOne):
                raise self.error(ExpressionLimitError, f"{self.piece(node)} evaluates to a power "
                                 f"{p.base}^{p.exp}, whose exponent is beyond +-{MAX_EXPONENT}",
                                 node)

    def check_floats(self, value, node) -> None:
        for number in value.atoms(sympy.Float):
            if not abs(number) <= _FLOAT_RANGE:
                raise self.error(ExpressionLimitError, f"{self.piece(node)} leaves the range of "
                                 "floating-point numbers (1e308)", node)


def _integer_literal(node) -> bool:
    """Whether an exponent is written as an integer, such as 2 or -3."""
    while isinstance(node, ast.UnaryOp) and isinstance(node.op, (ast.USub, ast.UAdd)):
        node = node.operand
    return isinstance(node, ast.Constant) and type(node.value) is int


def _is_zero(value: sympy.Expr) -> bool:
    """Whether a value is 0, without asking sympy's assumptions about symbols."""
    return bool(value.is_zero) if value.is_number else value == 0


def _composed(argument: sympy.Expr) -> bool:
    """Whether an argument holds a function or a fractional power of symbols.

    Such compositions are built unevaluated: sympy's rewriting of them
    (cosh(asinh(x)) -> sqrt(x**2 + 1), log(exp(x)) -> x, ...) asks its
    assumption system questions whose cost grows steeply with the depth of
    the composition, seconds for a few levels.
    """
    if argument.is_number:
        return False
    return any(isinstance(part, sympy.Function) or part.is_Pow and not part.exp.is_Integer
               for part in sympy.preorder_traversal(argument))


_METHODS: dict[type, Callable] = {
    ast.Constant: _Builder.constant, ast.Name: _Builder.name, ast.UnaryOp: _Builder.unary,
    ast.BinOp: _Builder.binary, ast.Call: _Builder.call,
}


def parse_expression(text: str, symbols: Mapping[str, sympy.Expr] | None = None, *,
                     context: str | None = None, line: int | None = None, exact: bool = True,
                     on_unknown: Callable[[str, int], object] | None = None,
                     delayed: Collection[str] | None = None) -> sympy.Expr:
    """Read one expression of the model syntax (see the module docstring).

    Parameters
    ----------
    text : str
        The expression, e.g. ``"mu*x - x^3"``.
    symbols : mapping of str to sympy.Symbol, optional
        Names the text may use.  Without it, every name becomes
        ``Symbol(name, real=True)``.
    context : str, optional
        What the text belongs to, e.g. ``"equation for 'x'"``; errors start with it.
    line : int, optional
        Line of the text in its file; errors report it (plus the row inside a
        multi-line text).
    exact : bool
        Decimal literals become exact fractions (default) or floats.
    on_unknown : callable, optional
        Called as ``on_unknown(name, column)`` for a name missing from
        ``symbols``; the name then becomes ``Symbol(name, real=True)``.  Without
        it such a name raises :class:`~criticality.errors.UnknownSymbolError`.
    delayed : collection of str, optional
        State names that may appear at a delayed time, ``x(t - tau)`` with
        ``tau`` a name of ``symbols`` (or an unknown name, with
        ``on_unknown``) or a positive number; read as
        :class:`~criticality.model.delayed.Delayed`.  Any other call of a
        state is refused (:mod:`criticality.model.delay_syntax`).

    Returns
    -------
    sympy.Expr

    Raises
    ------
    ExpressionSyntaxError, ForbiddenExpressionError, ExpressionLimitError, UnknownSymbolError

    Examples
    --------
    >>> parse_expression("x^2 + 0.1*lambda")
    lambda/10 + x**2
    """
    where = _Where(text if isinstance(text, str) else "", context, line)
    if not isinstance(text, str):
        raise where.error(ExpressionSyntaxError,
                          f"expected the text of an expression, got {type(text).__name__}")
    if len(text) > MAX_TEXT_LENGTH:
        raise where.error(ExpressionLimitError, f"the expression has {len(text)} characters; "
                          f"the limit is {MAX_TEXT_LENGTH}")
    if not text.strip():
        raise where.error(ExpressionSyntaxError, "the expression is empty")
    tokens = _scan(text, where)
    builder = _Builder(where, symbols, on_unknown, exact,
                       None if delayed is None else frozenset(delayed))
    terms, nodes = [], 0
    for lo, hi in _split_terms(tokens):
        builder.chunk = _Chunk(tokens, lo, hi, len(text))
        tree = _parse_chunk(builder.chunk, where)
        nodes += sum(1 for _ in ast.walk(tree))
        if nodes > MAX_NODES:
            raise where.error(ExpressionLimitError, f"the expression has more than {MAX_NODES} "
                              "parts", builder.chunk.starts[0])
        terms.append(builder.build(tree, 0))
    try:
        result = sympy.Add(*terms)
    except (ArithmeticError, ValueError, TypeError, RecursionError, MemoryError) as exc:
        raise where.error(ExpressionLimitError, f"the sum could not be formed ({exc})") from None
    if result.has(*_NOT_FINITE):
        raise where.error(ForbiddenExpressionError, "the expression is not finite")
    if result.has(sympy.I):
        raise where.error(ForbiddenExpressionError, "the expression is not real under the "
                          f"declared signs: sympy evaluates it to {_short_text(result)}, with "
                          "the imaginary unit I (an even root of a quantity the assumptions make "
                          "negative, such as sqrt(-b) for b positive); check the signs declared "
                          "for its parameters")
    return result


def _short_text(expr: sympy.Expr, limit: int = 80) -> str:
    text = sympy.sstr(expr)
    return text if len(text) <= limit else text[:limit - 3] + "..."

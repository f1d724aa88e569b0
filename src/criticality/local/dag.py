"""Expressions as a shared graph, for fast derivatives and compiled code.

Pipeline place: model equations (sympy) -> **expression graph** -> compiled
Taylor data (:mod:`criticality.local.compiled`).

Differentiating a model many times over with sympy spends most of its time in
sympy's assumption system (every new product asks for signs).  Here an
expression is a node in a hash-consed graph: a node is created once for each
distinct operation on distinct operands, so equal subexpressions are shared by
construction (the common-subexpression elimination that code generation
needs comes for free), and derivatives follow the usual rules node by node,
memoised.  Small simplifications keep the graph small: constants are folded,
``0`` and ``1`` drop out of sums and products.

Only the operations of the project's whitelisted expression language occur:
sums, products, powers, and the functions of
:data:`criticality.model.syntax.FUNCTIONS`.  :meth:`ExpressionGraph.source`
prints the nodes needed for a list of outputs as the body of one Python
function (names chosen here, numbers printed from sympy's exact numbers;
no user text is involved), for the back ends of :mod:`criticality.local.codegen`.
"""

from __future__ import annotations

from typing import Any

import sympy

from .codegen import UnsupportedExpression

__all__ = ["ExpressionGraph"]

_UNARY = {sympy.exp: "exp", sympy.log: "log", sympy.sin: "sin", sympy.cos: "cos",
          sympy.tan: "tan", sympy.sinh: "sinh", sympy.cosh: "cosh", sympy.tanh: "tanh",
          sympy.asin: "asin", sympy.acos: "acos", sympy.atan: "atan", sympy.asinh: "asinh",
          sympy.acosh: "acosh", sympy.atanh: "atanh", sympy.erf: "erf", sympy.erfc: "erfc"}
_RECIPROCAL = {sympy.sec: "cos", sympy.csc: "sin", sympy.cot: "tan", sympy.coth: "tanh",
               sympy.sech: "cosh", sympy.csch: "sinh"}
_HALF = sympy.Rational(1, 2)


class ExpressionGraph:
    """A hash-consed expression graph over numbered arguments ``a0, a1, ...``."""

    def __init__(self) -> None:
        self.nodes: list = []      # node id -> key tuple
        self.index: dict = {}      # key -> node id
        self._d: dict = {}         # (node, argument) -> derivative node
        self.zero = self.const(sympy.Integer(0))
        self.one = self.const(sympy.Integer(1))

    # -- construction --------------------------------------------------------------------
    def _node(self, key) -> int:
        k = self.index.get(key)
        if k is None:
            k = len(self.nodes)
            self.nodes.append(key)
            self.index[key] = k
        return k

    def const(self, value: Any) -> int:
        return self._node(("c", sympy.sympify(value, strict=True)))

    def arg(self, k: int) -> int:
        return self._node(("a", k))

    def value(self, a: Any) -> Any:
        key = self.nodes[a]
        return key[1] if key[0] == "c" else None

    def add(self, a: int, b: int) -> int:
        va, vb = self.value(a), self.value(b)
        if va is not None and vb is not None:
            return self.const(va + vb)
        if va == 0:
            return b
        if vb == 0:
            return a
        return self._node(("+",) + ((a, b) if a <= b else (b, a)))

    def mul(self, a: int, b: int) -> int:
        va, vb = self.value(a), self.value(b)
        if va is not None and vb is not None:
            return self.const(va * vb)
        if va == 0 or vb == 0:
            return self.zero
        if va == 1:
            return b
        if vb == 1:
            return a
        return self._node(("*",) + ((a, b) if a <= b else (b, a)))

    def neg(self, a: int) -> int:
        return self.mul(self.const(-1), a)

    def power(self, a: int, e: Any) -> int:
        """``a ** e`` for a sympy number ``e`` (an integer or a rational)."""
        e = sympy.sympify(e, strict=True)
        va = self.value(a)
        if e == 0:
            return self.one
        if e == 1:
            return a
        if va is not None and (e.is_Integer and (va != 0 or e > 0)):
            return self.const(va ** e)
        return self._node(("^", a, e))

    def gpower(self, a: int, b: int) -> int:
        """``a ** b`` for a node ``b``."""
        vb = self.value(b)
        if vb is not None and vb.is_Rational:
            return self.power(a, vb)
        return self._node(("**", a, b))

    def func(self, name: str, a: int) -> int:
        va = self.value(a)
        if va is not None and va == 0 and name in ("sin", "tan", "sinh", "tanh", "asin", "atan",
                                                  "asinh", "atanh", "erf"):
            return self.zero
        return self._node(("f", name, a))

    # -- from sympy -----------------------------------------------------------------------
    def from_sympy(self, expr: Any, args: dict, cache: dict | None = None) -> int:
        """The node of a sympy expression; ``args`` maps symbols to argument numbers."""
        cache = {} if cache is None else cache
        hit = cache.get(expr)
        if hit is not None:
            return hit
        out = self._convert(expr, args, cache)
        cache[expr] = out
        return out

    def _convert(self, e, args, cache) -> int:
        if e in args:
            return self.arg(args[e])
        if e.is_Number:
            return self.const(e)
        if e is sympy.pi or e is sympy.E:
            return self._node(("k", e))
        if e.is_Symbol:
            raise UnsupportedExpression(f"no value for the symbol {e}")
        sub = [self.from_sympy(a, args, cache) for a in e.args]
        if isinstance(e, sympy.Add):
            out = sub[0]
            for s in sub[1:]:
                out = self.add(out, s)
            return out
        if isinstance(e, sympy.Mul):
            out = sub[0]
            for s in sub[1:]:
                out = self.mul(out, s)
            return out
        if isinstance(e, sympy.Pow):
            return self.gpower(sub[0], sub[1])
        func = type(e)
        if isinstance(e, sympy.exp):
            return self.func("exp", sub[0])
        if func in _UNARY:
            return self.func(_UNARY[func], sub[0])
        if func in _RECIPROCAL:
            return self.power(self.func(_RECIPROCAL[func], sub[0]), -1)
        raise UnsupportedExpression(f"the numeric compiler cannot differentiate "
                                    f"{func.__name__} (in {sympy.sstr(e)[:80]})")

    # -- derivatives --------------------------------------------------------------------------
    def diff(self, a: int, k: int) -> int:
        """The derivative of node ``a`` with respect to argument ``k``."""
        key = (a, k)
        hit = self._d.get(key)
        if hit is not None:
            return hit
        out = self._diff(a, k)
        self._d[key] = out
        return out

    def depends(self, a: int) -> frozenset:
        """The arguments node ``a`` depends on."""
        cache: dict[int, frozenset] | None = getattr(self, "_deps", None)
        if cache is None:
            cache = self._deps = {}  # type: ignore[var-annotated]  # typed on the line above
        hit = cache.get(a)
        if hit is not None:
            return hit
        key = self.nodes[a]
        if key[0] == "a":
            out = frozenset((key[1],))
        elif key[0] in ("c", "k"):
            out = frozenset()
        elif key[0] in ("+", "*", "**"):
            out = self.depends(key[1]) | self.depends(key[2])
        else:  # "^" and "f"
            out = self.depends(key[1] if key[0] == "^" else key[2])
        cache[a] = out
        return out

    def _diff(self, a: int, k: int) -> int:
        if k not in self.depends(a):
            return self.zero
        key = self.nodes[a]
        op = key[0]
        if op == "a":
            return self.one
        if op == "+":
            return self.add(self.diff(key[1], k), self.diff(key[2], k))
        if op == "*":
            x, y = key[1], key[2]
            return self.add(self.mul(self.diff(x, k), y), self.mul(x, self.diff(y, k)))
        if op == "^":
            x, e = key[1], key[2]
            return self.mul(self.mul(self.const(e), self.power(x, e - 1)), self.diff(x, k))
        if op == "**":
            x, y = key[1], key[2]
            dx, dy = self.diff(x, k), self.diff(y, k)
            part = self.mul(self.mul(y, self.power(x, -1)), dx)
            part = self.add(part, self.mul(dy, self.func("log", x)))
            return self.mul(a, part)
        name, x = key[1], key[2]
        return self.mul(self._fprime(name, a, x), self.diff(x, k))

    def _fprime(self, name: str, f: int, x: int) -> int:
        sq = self.mul(x, x)
        one = self.one
        if name == "exp":
            return f
        if name == "log":
            return self.power(x, -1)
        if name == "sin":
            return self.func("cos", x)
        if name == "cos":
            return self.neg(self.func("sin", x))
        if name == "tan":
            return self.add(one, self.mul(f, f))
        if name == "sinh":
            return self.func("cosh", x)
        if name == "cosh":
            return self.func("sinh", x)
        if name == "tanh":
            return self.add(one, self.neg(self.mul(f, f)))
        if name in ("asin", "acos"):
            r = self.power(self.add(one, self.neg(sq)), -_HALF)
            return r if name == "asin" else self.neg(r)
        if name == "atan":
            return self.power(self.add(one, sq), -1)
        if name == "asinh":
            return self.power(self.add(sq, one), -_HALF)
        if name == "acosh":
            return self.power(self.add(sq, self.const(-1)), -_HALF)
        if name == "atanh":
            return self.power(self.add(one, self.neg(sq)), -1)
        if name in ("erf", "erfc"):
            c = self.mul(self.const(2), self.power(self._node(("k", sympy.pi)), -_HALF))
            g = self.mul(c, self.func("exp", self.neg(sq)))
            return g if name == "erf" else self.neg(g)
        raise UnsupportedExpression(f"no derivative rule for {name}")

    # -- code -------------------------------------------------------------------------------
    def source(self, outputs: Any, n_args: int, backend: str) -> str:
        """Python source of ``_generated(args)`` returning the output nodes."""
        need = set()
        stack = list(outputs)
        while stack:
            a = stack.pop()
            if a in need:
                continue
            need.add(a)
            key = self.nodes[a]
            if key[0] in ("+", "*", "**"):
                stack += [key[1], key[2]]
            elif key[0] == "^":
                stack.append(key[1])
            elif key[0] == "f":
                stack.append(key[2])
        mp = backend == "mpmath"
        names: dict = {}
        consts: list = []
        body: list = []

        def number(v) -> str:
            if v.is_Integer and (not mp or abs(v) < 2 ** 53):
                return f"({int(v)})" if v < 0 else f"{int(v)}"
            if not mp:
                return f"({float(v)!r})"
            name = f"k{len(consts)}"
            if v.is_Rational:
                consts.append(f"    {name} = mpf({int(v.p)})/{int(v.q)}")
            else:
                consts.append(f"    {name} = mpf('{sympy.sstr(v, full_prec=True)}')")
            return name

        for a in sorted(need):
            key = self.nodes[a]
            op = key[0]
            if op == "c":
                names[a] = number(key[1])
                continue
            if op == "a":
                names[a] = f"a{key[1]}"
                continue
            if op == "k":
                names[a] = "pi" if key[1] is sympy.pi else "E"
                continue
            if op == "+":
                text = f"{names[key[1]]} + {names[key[2]]}"
            elif op == "*":
                text = f"{names[key[1]]}*{names[key[2]]}"
            elif op == "**":
                text = f"{names[key[1]]}**{names[key[2]]}"
            elif op == "^":
                x, e = names[key[1]], key[2]
                if e == _HALF:
                    text = f"sqrt({x})"
                elif e == -_HALF:
                    text = f"1/sqrt({x})"
                elif e == -1:
                    text = f"1/{x}"
                elif e == 2 and not mp:
                    text = f"{x}*{x}"
                elif e.is_Integer and e < 0:
                    text = f"1/{x}**{-int(e)}"
                else:
                    text = f"{x}**{number(e)}"
            else:
                text = f"{key[1]}({names[key[2]]})"
            names[a] = f"t{a}"
            body.append(f"    t{a} = {text}")
        head = ["def _generated(args):"]
        if n_args:
            head.append("    " + ", ".join(f"a{i}" for i in range(n_args)) +
                        (", = args" if n_args == 1 else " = args"))
        out = "    return [" + ", ".join(names[a] for a in outputs) + "]"
        return "\n".join(head + consts + body + [out, ""])

"""Compile lists of sympy expressions into fast numeric functions.

Pipeline place: Taylor data, closed forms -> **code generation** -> numeric
mode, continuation, sweeps.

:func:`compile_expressions` takes sympy expressions (built by the project's
whitelisted parser or by the engine, never from user text read here), removes
common subexpressions with :func:`sympy.cse`, prints the result as the body of
one Python function with the project's own printer (:class:`_Printer`, which
knows a fixed set of node types and refuses the rest), and compiles it for one
of three numeric back ends:

* ``"math"``: Python floats (one point, fastest per call);
* ``"numpy"``: float64 or complex128 arrays (many points at once);
* ``"mpmath"``: mpmath numbers at the current working precision.

Safety.  The generated source is made only of names this module chooses
(``a0, a1, ...`` for the arguments, ``t0, t1, ...`` for subexpressions), of
numbers printed from sympy's exact numbers, and of the whitelisted function
names below; no text written by a user ever reaches ``compile``/``exec``.
That is why executing it is acceptable under the project's rule that user
text never goes to ``eval``/``exec``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Sequence

import sympy

from ..errors import ParameterError

__all__ = ["CompiledExpressions", "compile_expressions", "BACKENDS", "operation_count", "UnsupportedExpression",
           "generate_source"]

BACKENDS = ("math", "numpy", "mpmath")

# sympy function class -> name used in the generated code (bound per back end)
_FUNCTIONS = {
    sympy.exp: "exp", sympy.log: "log", sympy.sin: "sin", sympy.cos: "cos",
    sympy.tan: "tan", sympy.sinh: "sinh", sympy.cosh: "cosh", sympy.tanh: "tanh",
    sympy.asin: "asin", sympy.acos: "acos", sympy.atan: "atan", sympy.asinh: "asinh",
    sympy.acosh: "acosh", sympy.atanh: "atanh", sympy.erf: "erf", sympy.erfc: "erfc",
    sympy.re: "real", sympy.im: "imag", sympy.Abs: "absolute", sympy.conjugate: "conj",
}
# reciprocal functions, printed as 1/f(x)
_RECIPROCAL = {sympy.sec: "cos", sympy.csc: "sin", sympy.cot: "tan", sympy.coth: "tanh",
               sympy.sech: "cosh", sympy.csch: "sinh"}


class UnsupportedExpression(ParameterError):
    """An expression contains a node the numeric printer does not know."""


def _math_namespace() -> dict:
    ns = {name: getattr(math, name) for name in
          ("exp", "log", "sin", "cos", "tan", "sinh", "cosh", "tanh", "asin", "acos", "atan",
           "asinh", "acosh", "atanh", "erf", "erfc", "sqrt")}
    ns.update(real=lambda x: x.real, imag=lambda x: x.imag, absolute=abs,
              conj=lambda x: x.conjugate(), pi=math.pi, E=math.e, I=1j, mpf=float)
    return ns


def _numpy_namespace() -> dict:
    import numpy as np

    ns = {name: getattr(np, name) for name in
          ("exp", "log", "sin", "cos", "tan", "sinh", "cosh", "tanh", "sqrt", "real", "imag",
           "absolute", "conj")}
    ns.update(asin=np.arcsin, acos=np.arccos, atan=np.arctan, asinh=np.arcsinh,
              acosh=np.arccosh, atanh=np.arctanh, pi=np.pi, E=np.e, I=1j, mpf=float)
    try:
        from scipy import special
        ns.update(erf=special.erf, erfc=special.erfc)
    except ImportError:  # pragma: no cover - scipy ships with the numeric extras
        ns.update(erf=np.vectorize(math.erf), erfc=np.vectorize(math.erfc))
    return ns


def _mpmath_namespace() -> dict:
    import mpmath

    ns = {name: getattr(mpmath, name) for name in
          ("exp", "log", "sin", "cos", "tan", "sinh", "cosh", "tanh", "asin", "acos", "atan",
           "asinh", "acosh", "atanh", "erf", "erfc", "sqrt", "re", "im", "conj", "mpf")}
    ns.update(real=mpmath.re, imag=mpmath.im, absolute=abs, pi=mpmath.pi, E=mpmath.e,
              I=mpmath.mpc(0, 1))
    return ns


_NAMESPACES = {"math": _math_namespace, "numpy": _numpy_namespace, "mpmath": _mpmath_namespace}


class _Printer:
    """Python source for a sympy expression over a fixed set of node types."""

    def __init__(self, names: dict, backend: str) -> None:
        self.names = names          # Symbol -> generated name
        self.backend = backend
        self.constants: dict = {}   # printed constant -> generated name (mpmath only)

    def constant(self, p: int, q: int = 1) -> str:
        if q == 1 and self.backend != "mpmath":
            return f"{p}" if p >= 0 else f"({p})"
        if self.backend != "mpmath":
            return repr(p / q) if p >= 0 else f"({p / q!r})"
        if q == 1 and abs(p) < 2 ** 53:
            return f"{p}" if p >= 0 else f"({p})"
        key = f"mpf({p})/{q}" if q != 1 else f"mpf({p})"
        if key not in self.constants:
            self.constants[key] = f"k{len(self.constants)}"
        return self.constants[key]

    def doprint(self, e) -> str:
        if e in self.names:
            return self.names[e]
        if isinstance(e, sympy.Integer):
            return self.constant(int(e))
        if isinstance(e, sympy.Rational):
            return self.constant(int(e.p), int(e.q))
        if isinstance(e, sympy.Float):
            if self.backend == "mpmath":
                text = sympy.sstr(e, full_prec=True)
                key = f"mpf('{text}')"
                if key not in self.constants:
                    self.constants[key] = f"k{len(self.constants)}"
                return self.constants[key]
            return f"({float(e)!r})"
        if e is sympy.pi:
            return "pi"
        if e is sympy.E:
            return "E"
        if e is sympy.I:
            return "I"
        if isinstance(e, sympy.Add):
            return "(" + " + ".join(self.doprint(a) for a in e.args) + ")"
        if isinstance(e, sympy.Mul):
            return self.mul(e)
        if isinstance(e, sympy.Pow):
            return self.power(e.base, e.exp)
        func = type(e)
        if func in _FUNCTIONS and len(e.args) == 1:
            return f"{_FUNCTIONS[func]}({self.doprint(e.args[0])})"
        if func in _RECIPROCAL and len(e.args) == 1:
            return f"(1/{_RECIPROCAL[func]}({self.doprint(e.args[0])}))"
        raise UnsupportedExpression(f"the numeric compiler cannot print {func.__name__} "
                                    f"(in {sympy.sstr(e)[:80]})")

    def mul(self, e) -> str:
        num, den = [], []
        for a in e.args:
            if isinstance(a, sympy.Pow) and a.exp.is_Rational and a.exp < 0:
                den.append(self.power(a.base, -a.exp))
            elif isinstance(a, sympy.Rational) and not isinstance(a, sympy.Integer) \
                    and a.p in (1, -1) and self.backend != "mpmath":
                num.append("(-1)" if a.p == -1 else "1")
                den.append(str(a.q))
            else:
                num.append(self.doprint(a))
        text = "*".join(num) if num else "1"
        if den:
            text += "/" + (den[0] if len(den) == 1 else "(" + "*".join(den) + ")")
        return f"({text})"

    def power(self, base, exp) -> str:
        b = self.doprint(base)
        if exp.is_Integer:
            k = int(exp)
            if k == 1:
                return b
            if k == -1:
                return f"(1/{b})"
            if k < 0:
                return f"(1/{b}**{-k})"
            return f"({b}**{k})" if k > 2 or self.backend == "mpmath" else f"({b}*{b})"
        if exp == sympy.Rational(1, 2):
            return f"sqrt({b})"
        if exp == -sympy.Rational(1, 2):
            return f"(1/sqrt({b}))"
        return f"({b}**{self.doprint(exp)})"


@dataclass(frozen=True)
class CompiledExpressions:
    """A compiled list of expressions: ``fn(args) -> list of values``.

    Picklable: it is rebuilt from its generated source (text made by this
    module's printer, never user text), so it can be shipped to workers.
    """

    source: str
    backend: str
    count: int
    arity: int

    def __post_init__(self) -> None:
        namespace = dict(_NAMESPACES[self.backend]())
        # generated source only: see the module docstring on why exec is safe here
        exec(compile(self.source, "<criticality generated>", "exec"), namespace)  # noqa: S102
        object.__setattr__(self, "_fn", namespace["_generated"])

    def __call__(self, args: Sequence) -> list:
        return self._fn(args)  # type: ignore[attr-defined]  # set in __post_init__, not a field

    def __reduce__(self) -> tuple:
        return (CompiledExpressions, (self.source, self.backend, self.count, self.arity))


def operation_count(exprs: Any) -> int:
    """Operations in ``exprs`` as sympy counts them (a size measure)."""
    return int(sum(sympy.count_ops(e) for e in exprs))


def generate_source(exprs: Sequence, args: Sequence, backend: str, *, cse: bool = True) -> str:
    """The Python source of ``_generated(args)`` returning the list of ``exprs``."""
    if backend not in BACKENDS:
        raise ParameterError(f"unknown numeric back end {backend!r}; expected one of "
                             f"{', '.join(BACKENDS)}")
    exprs = [sympy.sympify(e, strict=True) for e in exprs]  # sympy objects only (no strings reach here)
    names = {s: f"a{i}" for i, s in enumerate(args)}
    unknown = set().union(*(e.free_symbols for e in exprs)) - set(names) if exprs else set()
    if unknown:
        raise ParameterError(f"no value for {', '.join(sorted(map(str, unknown)))} in the "
                             "expressions to compile")
    if cse:
        subs, reduced = sympy.cse(exprs, symbols=sympy.numbered_symbols("_cse"), order="none")
    else:
        subs, reduced = [], exprs
    printer = _Printer(names, backend)
    body = []
    for k, (sym, expr) in enumerate(subs):
        text = printer.doprint(expr)
        names[sym] = f"t{k}"
        body.append(f"    t{k} = {text}")
    out = [printer.doprint(e) for e in reduced]
    head = ["def _generated(args):"]
    if args:
        head.append("    " + ", ".join(f"a{i}" for i in range(len(args))) +
                    (", = args" if len(args) == 1 else " = args"))
    head += [f"    {name} = {key}" for key, name in printer.constants.items()]
    return "\n".join(head + body + ["    return [" + ", ".join(out) + "]", ""])


def compile_expressions(exprs: Sequence, args: Sequence, backend: str = "numpy", *,
                        cse: bool = True) -> CompiledExpressions:
    """Compile ``exprs`` (sympy expressions in the symbols ``args``).

    Returns a :class:`CompiledExpressions` ``fn`` with ``fn(values)`` the list
    of the expressions at ``values`` (in the order of ``args``).

    Examples
    --------
    >>> import sympy
    >>> x, y = sympy.symbols("x y")
    >>> fn = compile_expressions([x * sympy.exp(y) + 1, sympy.exp(y)], [x, y], "math")
    >>> fn([2.0, 0.0])
    [3.0, 1.0]
    """
    source = generate_source(exprs, args, backend, cse=cse)
    return CompiledExpressions(source, backend, len(exprs), len(args))

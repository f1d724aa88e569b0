"""A Hopf result with its algebraic critical value in closed form, on request.

Pipeline place: :class:`~criticality.hopf_analysis.results.HopfResult` ->
**real radical (or cosine) forms of its RealAlgebraicRoot atoms**
(:mod:`criticality.algebra.radicals`) -> the user.

The result itself keeps the critical value as the root of its defining
polynomial: that is exact everywhere.  :meth:`HopfResult.in_radicals` gives
the same quantities with each such root replaced by its closed form and
states the sign conditions the form relies on.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Mapping

import sympy

from ..algebra.algebraic import RealAlgebraicRoot
from ..algebra.radicals import RadicalForm, real_radical_form
from ..algebra.signs import context_for
from ..errors import ClosedFormUnavailableError

__all__ = ["RadicalView", "radical_view"]

#: the quantities a view carries, by their result field names
QUANTITIES = ("critical_value", "omega_squared", "omega", "transversality", "l1")


@dataclass(frozen=True)
class RadicalView:
    """The main quantities of a Hopf result in closed form.

    Attributes
    ----------
    forms : mapping
        ``{RealAlgebraicRoot: RadicalForm}``: each root of the result and
        its closed form (formula and conditions).
    quantities : mapping
        ``{name: expression}`` for ``critical_value``, ``omega_squared``,
        ``omega``, ``transversality``, ``l1``, with every root replaced.
    conditions : tuple
        The sign conditions, over all forms, that the declared assumptions do
        not decide: the forms hold where these hold.
    """

    forms: Mapping
    quantities: Mapping
    conditions: tuple

    def __getattr__(self, name: str) -> sympy.Expr:
        quantities = self.__dict__.get("quantities", {})
        if name in quantities:
            return quantities[name]
        raise AttributeError(name)

    def __str__(self) -> str:
        lines = [f"{name} = {sympy.sstr(e)}" for name, e in self.quantities.items()]
        for root, form in self.forms.items():
            lam, k, bound = _defining(root)
            which = "positive root" if bound is not None else "real root"
            lines.append(f"by the {form.how} form of {which} {k + 1} (in increasing order) of "
                         f"{sympy.sstr(lam.expr.xreplace({lam.variables[0]: sympy.Symbol('x')}))}"
                         " = 0")
        if self.conditions:
            lines.append("valid where " + ", ".join(sympy.sstr(c) for c in self.conditions))
        return "\n".join(lines)


def radical_view(result: Any, *, trigonometric: bool = False) -> RadicalView:
    """See :meth:`criticality.hopf_analysis.results.HopfResult.in_radicals`
    (``result`` is a HopfResult; not imported here, which would close a
    cycle with the result module that calls this)."""
    values = {name: getattr(result, name) for name in QUANTITIES}
    roots = sorted({a for e in values.values()
                    for a in e.atoms(RealAlgebraicRoot, sympy.CRootOf)},
                   key=sympy.default_sort_key)
    symbols = result.model.symbols
    words = {symbols[n]: w for n, w in result.assumptions.items() if n in symbols}
    free = {s for e in values.values() for s in e.free_symbols}
    context = context_for(free, {s: words.get(s) or _word(s) for s in free})
    forms: dict[sympy.Expr, RadicalForm] = {
        r: real_radical_form(*_defining(r), context, trigonometric=trigonometric)
        for r in roots}
    table = {r: f.expr for r, f in forms.items()}
    quantities = {name: e.xreplace(table) for name, e in values.items()}
    conditions: list = []
    for f in forms.values():
        conditions += [c for c in f.conditions if c not in conditions]
    return RadicalView(forms, quantities, tuple(conditions))


def _defining(root: sympy.Expr) -> tuple[sympy.Lambda, int, Any]:
    """``(Lambda(x, m(x)), k, bound)`` of a RealAlgebraicRoot, or of a real
    CRootOf (sympy numbers the real roots first, in increasing order)."""
    if isinstance(root, sympy.CRootOf):
        if not root.is_real:
            raise ClosedFormUnavailableError(f"{root} is not a real root")
        x = sympy.Dummy("x")
        return sympy.Lambda(x, root.poly.as_expr().xreplace({root.poly.gen: x})), root.index, None
    args = root.args
    return args[0], int(args[1]), args[2] if len(args) > 2 else None


def _word(symbol: sympy.Symbol) -> str:
    """The sign word a symbol's own assumptions give."""
    for word in ("positive", "negative", "nonnegative", "nonzero"):
        if getattr(symbol, f"is_{word}"):
            return word
    return "real"

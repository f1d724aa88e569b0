"""Linear part and Taylor forms of a retarded equation at an equilibrium.

Pipeline place: model -> equilibrium -> **delay forms** -> critical set ->
normal form.  A retarded equation ``x' = f(x(t), x(t - tau_1), ...)`` is a
function of the *extended vector* ``X`` of the current states and of every
delayed state the equations use (one slot per pair (state, delay)).  At the
equilibrium ``x0`` (where every slot equals ``x0``), :func:`delay_forms`
gives

* the matrices ``A_0`` (current states) and ``A_k`` (delay ``tau_k``) of the
  linear part ``L phi = A_0 phi(0) + sum_k A_k phi(-tau_k)``;
* the second and third derivatives of ``f`` on extended vectors, so that
  ``B(U, V)`` and ``C(U, V, W)`` act on the extended vectors of functions on
  ``[-tau_max, 0]`` (a function ``v exp(lambda theta)`` has the extended vector
  ``(v, v_i exp(-lambda tau_k), ...)``, :meth:`DelayForms.extend`).

The characteristic matrix is ``Delta(lambda) = lambda I - A_0 - sum_k A_k
exp(-lambda tau_k)``; its determinant is the characteristic quasi-polynomial.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Callable, Sequence

from dataclasses import dataclass
from itertools import combinations_with_replacement

import sympy

from .cx import ONE, ZERO, Cx, cx
from ..model.delayed import current_form, delayed_terms

if TYPE_CHECKING:
    from ..local.equilibria import EquilibriumChoice
    from ..algebra.field import Element
    from ..local.prepare import EquilibriumSpec
    from ..model.core import Model

__all__ = ["DelayForms", "delay_forms", "equilibrium_point"]


@dataclass(frozen=True)
class DelayForms:
    """The linear part and the Taylor forms of a retarded equation at ``x0``.

    Attributes
    ----------
    states : tuple of sympy.Symbol
    point : tuple of sympy.Expr
        The equilibrium ``x0``.
    delays : tuple of sympy.Expr
        ``tau_1, ..., tau_m`` (numbers or parameter symbols).
    slots : tuple of (int, int)
        The coordinates of the extended vector: ``(i, 0)`` is state ``i`` now,
        ``(i, k)`` state ``i`` at ``t - tau_k``.
    matrices : tuple of sympy.Matrix
        ``A_0, A_1, ..., A_m``.
    second, third : tuple of dict
        Per equation, the nonzero derivatives ``{(a, b): d2f/dX_a dX_b}`` and
        ``{(a, b, c): d3f/...}`` at the equilibrium, sorted index tuples.
    """

    states: tuple
    point: tuple
    delays: tuple
    slots: tuple
    matrices: tuple
    second: tuple
    third: tuple

    @property
    def n(self) -> int:
        return len(self.states)

    def extend(self, v: Sequence, factors: Any) -> list:
        """The extended vector of ``v exp(lambda theta)``, with ``factors[k-1] =
        exp(-lambda tau_k)`` (Cx values)."""
        return [v[i] if k == 0 else v[i] * factors[k - 1] for i, k in self.slots]

    def delta(self, lam: Element, factors: Any) -> list:
        """``Delta(lambda)`` as rows of Cx, with ``factors[k-1] = exp(-lambda tau_k)``."""
        n = self.n
        rows = []
        for i in range(n):
            row = []
            for j in range(n):
                entry = (cx(lam) if i == j else ZERO) - cx(self.matrices[0][i, j])
                for k, factor in enumerate(factors, start=1):
                    a = self.matrices[k][i, j]
                    if not _is_zero(a):
                        entry = entry - factor * a
                row.append(entry)
            rows.append(row)
        return rows

    def delta_prime(self, factors: Any, delays: Sequence | None = None) -> list:
        """``d Delta / d lambda = I + sum_k tau_k A_k exp(-lambda tau_k)``."""
        delays = self.delays if delays is None else delays
        rows = []
        for i in range(self.n):
            row = []
            for j in range(self.n):
                entry = ONE if i == j else ZERO
                for k, factor in enumerate(factors, start=1):
                    a = self.matrices[k][i, j]
                    if not _is_zero(a):
                        entry = entry + factor * (delays[k - 1] * a)
                row.append(entry)
            rows.append(row)
        return rows

    def B(self, u: Sequence, v: Sequence) -> list:
        """The symmetric second derivative on extended vectors (Cx lists)."""
        out = []
        for table in self.second:
            total = ZERO
            for (a, b), h in table.items():
                term = u[a] * v[b] if a == b else u[a] * v[b] + u[b] * v[a]
                total = total + term * h
            out.append(total)
        return out

    def C(self, u: Sequence, v: Sequence, w: sympy.Symbol) -> list:
        """The symmetric third derivative on extended vectors (Cx lists)."""
        out = []
        for table in self.third:
            total = ZERO
            for idx, h in table.items():
                total = total + _symmetric_product(idx, (u, v, w)) * h
            out.append(total)
        return out

    def substitute(self, mapping: dict) -> "DelayForms":
        """A copy with ``mapping`` (symbol -> expression) substituted everywhere."""
        def s(e):
            return sympy.sympify(e, strict=True).xreplace(mapping)
        return DelayForms(self.states, tuple(s(p) for p in self.point),
                          tuple(s(d) for d in self.delays), self.slots,
                          tuple(m.xreplace(mapping) for m in self.matrices),
                          tuple({k: sympy.cancel(s(v)) for k, v in t.items()} for t in self.second),
                          tuple({k: sympy.cancel(s(v)) for k, v in t.items()} for t in self.third))


    def converted(self, conv: Callable) -> "DelayForms":
        """A copy whose coefficients are converted by ``conv`` (sympy -> field
        element); the matrices become read-only grids indexed ``[i, j]``."""
        grids = tuple(_Grid([[conv(m[i, j]) for j in range(m.cols)] for i in range(m.rows)])
                      for m in self.matrices)
        return DelayForms(self.states, self.point, tuple(conv(d) for d in self.delays),
                          self.slots, grids,
                          tuple({k: conv(v) for k, v in t.items()} for t in self.second),
                          tuple({k: conv(v) for k, v in t.items()} for t in self.third))


class _Grid:
    """A matrix of field elements indexed like a sympy Matrix (``M[i, j]``)."""

    __slots__ = ("rows_",)

    def __init__(self, rows) -> None:
        self.rows_ = rows

    def __getitem__(self, key):
        i, j = key
        return self.rows_[i][j]


def _symmetric_product(idx, vectors) -> Cx:
    """sum over distinct orderings of the index triple of u[a] v[b] w[c]."""
    from itertools import permutations
    total = ZERO
    for a, b, c in set(permutations(idx)):
        total = total + vectors[0][a] * vectors[1][b] * vectors[2][c]
    return total


def _is_zero(a) -> bool:
    return a == 0 if isinstance(a, (int, sympy.Basic)) else not a


def equilibrium_point(model: Model, equilibrium: EquilibriumSpec = None) -> EquilibriumChoice:
    """The equilibrium of a retarded model (where every delayed value equals
    the current one): given as a mapping, the model's own hint, or solved from
    the equations with delays set to zero.

    Returns an :class:`~criticality.local.equilibria.EquilibriumChoice`.
    """
    from collections.abc import Mapping
    from ..local.equilibria import given_equilibrium, select_equilibrium, solve_equilibria
    from ..algebra.signs import context_for
    if isinstance(equilibrium, Mapping):
        return given_equilibrium(model, equilibrium)
    if equilibrium is None and model.equilibrium_hint:
        return given_equilibrium(model, model.equilibrium_hint)
    eqs = [current_form(e) for e in model.equations]
    candidates = solve_equilibria(model, eqs)
    assumptions = {model.symbols[p.name]: p.assumption for p in model.parameters}
    ctx = context_for(model.parameter_symbols, assumptions)
    return select_equilibrium(model, candidates, equilibrium, ctx)


def delay_forms(model: Model, point: Sequence, *, order: int = 3) -> DelayForms:
    """The linear part and Taylor forms up to ``order`` at the equilibrium ``point``."""
    states = tuple(model.state_symbols)
    terms = sorted(delayed_terms(list(model.equations)), key=sympy.default_sort_key)
    delays = model.delays
    index = {s: i for i, s in enumerate(states)}
    slots = [(i, 0) for i in range(len(states))]
    variables = list(states)
    replace = {}
    for term in sorted(terms, key=lambda d: (delays.index(d.delay), index[d.state])):
        slots.append((index[term.state], delays.index(term.delay) + 1))
        v = sympy.Dummy(f"{term.state.name}_lag{delays.index(term.delay) + 1}", real=True)
        variables.append(v)
        replace[term] = v
    rhs = [e.xreplace(replace) for e in model.equations]
    at = {v: point[i] for v, (i, _k) in zip(variables, slots)}
    n, m = len(states), len(delays)
    mats = [sympy.zeros(n, n) for _ in range(m + 1)]
    second, third = [], []
    for i, f in enumerate(rhs):
        first = [sympy.diff(f, v) for v in variables]
        for a, (j, k) in enumerate(slots):
            mats[k][i, j] = sympy.cancel(first[a].xreplace(at))
        h2, h3 = {}, {}
        for a, b in combinations_with_replacement(range(len(variables)), 2):
            d2 = sympy.diff(first[a], variables[b])
            if d2 == 0:
                continue
            value = sympy.cancel(d2.xreplace(at))
            if value != 0:
                h2[(a, b)] = value
            if order >= 3:
                for c in range(b, len(variables)):
                    d3 = sympy.cancel(sympy.diff(d2, variables[c]).xreplace(at))
                    if d3 != 0:
                        h3[(a, b, c)] = d3
        second.append(h2)
        third.append(h3)
    return DelayForms(states, tuple(point), tuple(delays), tuple(slots), tuple(mats),
                      tuple(second), tuple(third))

"""A state evaluated at a delayed time: ``x(t - tau)`` as a sympy object.

Pipeline place: part of the model stage.  The whitelisted parser
(:mod:`criticality.model.expressions`) turns the text ``x(t - tau)`` into
``Delayed(x, tau)``; :func:`convert_sympy` accepts the same object from users
who build expressions with sympy; the printers write it back as
``x(t - tau)`` (model syntax) and ``x(t - \\tau)`` (LaTeX).

A :class:`Delayed` value is tied to the pair (state symbol, delay), not to
text: two occurrences of ``x(t - tau)`` are the same sympy object, and
substituting a value for ``tau`` gives ``Delayed(x, value)`` (a delay of 0 is
the current state ``x`` itself).  The delay is a positive number or a symbol;
that a symbolic delay is a declared positive parameter, and that the first
argument is a state, is checked by the model (:mod:`criticality.model.checks`).
"""

from __future__ import annotations

from typing import Any, Iterable

import sympy

__all__ = ["Delayed", "delayed_terms", "delays_of", "current_form"]


class Delayed(sympy.Function):
    """``Delayed(x, tau)``: the state ``x`` at time ``t - tau``.

    Examples
    --------
    >>> x, tau = sympy.symbols("x tau", real=True)
    >>> Delayed(x, tau)
    x(t - tau)
    >>> Delayed(x, 0)
    x
    """

    nargs = 2

    @classmethod
    def eval(cls, state: Any, delay: Any) -> Any:
        if not isinstance(state, sympy.Symbol):
            raise TypeError(f"a delayed state is a state symbol at t - delay, not {state}")
        if delay.is_number:
            if delay.is_zero:
                return state
            if delay.is_extended_negative:
                raise ValueError(f"the delay {delay} of {state} is negative; a retarded "
                                 "equation uses past values x(t - tau) with tau > 0")
        return None

    @property
    def state(self) -> sympy.Symbol:
        """The state symbol."""
        return self.args[0]

    @property
    def delay(self) -> sympy.Expr:
        """The delay (a positive number or a parameter symbol)."""
        return self.args[1]

    def _eval_is_real(self):
        return True

    def _sympystr(self, printer) -> str:
        return f"{printer._print(self.state)}(t - {printer._print(self.delay)})"

    def _latex(self, printer) -> str:
        return rf"{printer._print(self.state)}\left(t - {printer._print(self.delay)}\right)"

    def _pretty(self, printer):
        return printer._print_seq((sympy.Symbol(self._sympystr(sympy.StrPrinter())),))


def delayed_terms(expr: sympy.Basic) -> set:
    """The :class:`Delayed` objects in an expression (or in several)."""
    if isinstance(expr, (list, tuple)):
        found: set = set()
        for e in expr:
            found |= delayed_terms(e)
        return found
    return set(expr.atoms(Delayed)) if isinstance(expr, sympy.Basic) else set()


def delays_of(exprs: Iterable[sympy.Basic]) -> tuple:
    """The distinct delays used by expressions, numbers first (ascending), then symbols by name."""
    delays = {d.delay for d in delayed_terms(list(exprs))}
    numbers = sorted((d for d in delays if d.is_number), key=lambda d: float(d))
    others = sorted((d for d in delays if not d.is_number), key=str)
    return tuple(numbers + others)


def current_form(expr: sympy.Expr) -> sympy.Expr:
    """The expression with every delayed state replaced by its current value
    (what the equilibria of a retarded equation solve)."""
    terms = delayed_terms(expr)
    return expr.xreplace({d: d.state for d in terms}) if terms else expr

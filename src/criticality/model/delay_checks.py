"""Model-level checks of delayed states (internal to :mod:`criticality.model.checks`).

The parser reads ``x(t - tau)`` in an equation; the model then requires that
``x`` is a state and that a symbolic delay is a parameter declared
``positive`` (a delay is a duration; the analysis of a retarded equation needs
tau > 0).  Every problem is returned as text, to be listed with the others.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Callable, Sequence

from .delayed import delayed_terms

if TYPE_CHECKING:
    import sympy

    from .parameter import Parameter

__all__: list[str] = []


def delay_problems(states: Sequence[str], equations: Sequence[sympy.Expr],
                   parameters: Sequence[Parameter], at: Callable[..., str]) -> list[str]:
    """Problems of the delayed terms of the equations (one text each)."""
    by_name = {p.name: p for p in parameters}
    problems: list[str] = []
    reported: set = set()
    for state, rhs in zip(states, equations):
        if rhs is None:
            continue
        where = at(f"equation for {state!r}", "equations", state)
        for term in sorted(delayed_terms(rhs), key=str):
            if term.state.name not in states:
                problems.append(f"{where}: {term} delays {term.state.name!r}, which is not a "
                                "state; only states can be delayed")
            delay = term.delay
            if delay.is_number:
                if not (delay.is_real and delay.is_positive):
                    problems.append(f"{where}: the delay {delay} in {term} must be a positive "
                                    "number")
                continue
            if not delay.is_Symbol:
                problems.append(f"{where}: the delay {delay} in {term} must be one parameter or "
                                "a positive number")
                continue
            name = delay.name
            if name in reported:
                continue
            parameter = by_name.get(name)
            if name in states:
                problems.append(f"{where}: the delay {name!r} in {term} is a state; a delay is "
                                "a positive parameter or a positive number")
            elif parameter is None or not parameter.declared:
                reported.add(name)
                problems.append(f"{where}: the delay {name!r} in {term} is not declared; declare "
                                f"it as a positive parameter ({name} = \"positive\")")
            elif parameter.assumption != "positive":
                reported.add(name)
                problems.append(f"{where}: the delay {name!r} in {term} is declared "
                                f"{parameter.assumption}; a delay must be declared positive "
                                f"({name} = \"positive\")")
    return problems

"""The one check of the options every analysis takes.

Pipeline place: the entry of every analysis, before any computation (before
the equilibrium is solved); :func:`criticality.local.prepare.prepare` calls
:func:`check_options`, and the entry points that do not prepare a problem
(the numeric mode, the evaluation of a result) call the single checks.

Each check takes the value a caller handed in and returns it normalised (a
plain ``int``, a ``dict``), or raises :class:`~criticality.errors.ParameterError`
(:class:`~criticality.errors.OrderError` for the order) naming the option,
what it takes and what it got.  Options a mode cannot use are refused by
:func:`refuse_unused`, never dropped.
"""

from __future__ import annotations

import math
import numbers
from fractions import Fraction
from typing import Any, Mapping

from ..errors import EquilibriumNotFoundError, OrderError, ParameterError
from ..model.parameter import ASSUMPTIONS

__all__ = ["MAX_ORDER", "BACKENDS", "EQUILIBRIUM_WORDS", "check_order", "check_branch",
           "check_backend", "check_values", "check_assume", "check_equilibrium",
           "check_eliminate", "AUTO_ELIMINATE", "check_second", "check_digits", "check_point",
           "check_name", "refuse_unused", "check_options", "equilibrium_count_bound", "pick_branch"]

#: highest normal-form order (l1 .. l10); each order costs a series solve
MAX_ORDER = 21
#: the exact arithmetic of the parameter field
BACKENDS = ("flint", "sympy")
#: sign conditions that select a solved equilibrium
EQUILIBRIUM_WORDS = ("positive", "nonnegative", "nonzero")


def _shown(value: Any) -> str:
    text = repr(value)
    return text if len(text) <= 60 else text[:57] + "..."


def _is_int(value: Any) -> bool:
    return isinstance(value, numbers.Integral) and not isinstance(value, bool)


def check_order(order: Any, *, low: int = 3, odd: bool = True) -> int:
    """The order of a normal form: an odd integer in ``low .. MAX_ORDER``
    (3 gives ``l1``, ``2k + 1`` gives ``l1 .. lk``)."""
    ok = _is_int(order) and low <= order <= MAX_ORDER and (not odd or order % 2 == 1)
    if not ok:
        what = "an odd integer" if odd else "an integer"
        raise OrderError(f"order must be {what} from {low} to {MAX_ORDER} (3 gives l1, 5 gives "
                         f"l2); got {_shown(order)}")
    return int(order)


def check_branch(branch: Any, option: str = "branch") -> int | None:
    """A branch index: ``None`` or an integer ``>= 0``."""
    if branch is None:
        return None
    if not _is_int(branch) or branch < 0:
        raise ParameterError(f"{option} must be an integer >= 0 (0 is the first branch of the "
                             f"critical set); got {_shown(branch)}")
    return int(branch)


def check_backend(backend: Any) -> str:
    """``"flint"`` or ``"sympy"``."""
    if not isinstance(backend, str) or backend not in BACKENDS:
        raise ParameterError(f"backend must be one of {', '.join(map(repr, BACKENDS))}; got "
                             f"{_shown(backend)}")
    return backend


def check_name(name: Any, option: str) -> str:
    """A parameter name given as an option (the model checks it exists)."""
    if not isinstance(name, str) or not name:
        raise ParameterError(f"{option} must be the name of a parameter (a non-empty string); "
                             f"got {_shown(name)}")
    return name


def check_second(parameter: Any, second: Any) -> str:
    """The second parameter of a codimension-two analysis: a name other
    than the first."""
    check_name(second, "second")
    if second == parameter:
        raise ParameterError(f"the second parameter must differ from the first ('{parameter}'): "
                             "the analysis varies the first across its critical value and "
                             "solves for the second; name another parameter")
    return second


def _mapping(value: Any, option: str, example: str) -> dict | None:
    if value is None:
        return None
    if not isinstance(value, Mapping):
        raise ParameterError(f"{option} must be a mapping such as {example}; got "
                             f"{_shown(value)} ({type(value).__name__})")
    out = {}
    for key, item in value.items():
        name = key if isinstance(key, str) else getattr(key, "name", None)  # sympy symbols
        if not isinstance(name, str) or not name:
            raise ParameterError(f"{option} must map names (strings or symbols) to values; "
                                 f"got the key {_shown(key)}")
        out[name] = item
    return out


def _number_problem(value: Any) -> str | None:
    """Why ``value`` is not an exact or finite number (None when it is one);
    strings and sympy objects are read later by the model."""
    if isinstance(value, bool) or value is None:
        return f"a number or an expression, not {value!r}"
    if isinstance(value, float) and not math.isfinite(value):
        return f"a finite number, not {value!r}"
    if isinstance(value, complex):
        return f"a real number, not {value!r}"
    if isinstance(value, (numbers.Number, str, Fraction)):
        return None
    try:  # sympy objects and mpmath numbers
        import sympy
        if isinstance(value, sympy.Basic):
            if value.has(sympy.nan, sympy.zoo, sympy.oo, -sympy.oo):
                return f"a finite number, not {value}"
            return None
        import mpmath
        if isinstance(value, mpmath.mpf):
            return None if mpmath.isfinite(value) else f"a finite number, not {value}"
    except ImportError:  # pragma: no cover - both are dependencies
        pass
    return f"a number or an expression, not a {type(value).__name__}"


def check_values(values: Any, option: str = "values") -> dict | None:
    """``{name: number or expression}`` with finite numbers."""
    out = _mapping(values, option, "{'a': 1, 'b': '1/2'}")
    for key, value in (out or {}).items():
        problem = _number_problem(value)
        if problem:
            raise ParameterError(f"{option}['{key}'] must be {problem}")
    return out


def check_point(values: Any, option: str = "values") -> dict:
    """The parameter point of an evaluation: like :func:`check_values`."""
    return check_values(values if values is not None else {}, option) or {}


def check_assume(assume: Any) -> dict | None:
    """``{name: assumption word}``."""
    out = _mapping(assume, "assume", "{'x_eq': 'positive'}")
    for key, value in (out or {}).items():
        if not isinstance(value, str) or value not in ASSUMPTIONS:
            raise ParameterError(f"assume['{key}'] must be one of {', '.join(ASSUMPTIONS)}; got "
                                 f"{_shown(value)}")
    return out


#: the value of eliminate= that lets the engine choose the unknowns (local.parametrise)
AUTO_ELIMINATE = "auto"


def check_eliminate(eliminate: Any) -> tuple | str | None:
    """A sequence of names (parameters or states) to solve for, or
    :data:`AUTO_ELIMINATE` (the engine finds a linear or triangular set)."""
    if eliminate is None or eliminate == AUTO_ELIMINATE:
        return eliminate
    if isinstance(eliminate, str) or not isinstance(eliminate, (list, tuple)) or not all(
            isinstance(n, str) and n for n in eliminate):
        raise ParameterError("eliminate must be a list of names (one parameter or state per "
                             f"state), e.g. ['a', 'b'], or '{AUTO_ELIMINATE}' to let the engine "
                             f"choose them; got {_shown(eliminate)}")
    return tuple(eliminate)


def equilibrium_count_bound(model: Any) -> int | None:
    """Bezout's bound on the number of isolated equilibria of a polynomial
    model (the product of the total degrees in the states), or None when a
    right-hand side is not polynomial in the states.  (Bezout's theorem;
    e.g. Cox, Little and O'Shea, Ideals, Varieties, and Algorithms, 2015,
    Ch. 8 section 7.)"""
    import sympy
    total = 1
    states = tuple(model.state_symbols)
    for f in model.equations:
        try:
            degree = sympy.Poly(f, *states).total_degree() if states else 0
        except (sympy.PolynomialError, sympy.GeneratorsNeeded):
            return None
        total *= max(degree, 1)
        if total > 10**6:
            return total
    return total


def check_equilibrium(equilibrium: Any, model: Any = None) -> Any:
    """``None``, a mapping ``{state: value}`` (no value None, NaN or
    infinite), an index ``>= 0`` (below Bezout's bound for a polynomial
    model) or one of :data:`EQUILIBRIUM_WORDS`; checked before any
    equilibrium is solved."""
    if equilibrium is None:
        return None
    if isinstance(equilibrium, Mapping):
        out = _mapping(equilibrium, "equilibrium", "{'x': 0, 'y': 'a/b'}") or {}
        for key, value in out.items():
            problem = _number_problem(value)
            if problem:
                raise ParameterError(f"equilibrium['{key}'] must be {problem}")
        return out
    if isinstance(equilibrium, str):
        if equilibrium not in EQUILIBRIUM_WORDS:
            raise ParameterError(
                "equilibrium must be a mapping {state: value}, the index of a solved "
                f"equilibrium, or one of {', '.join(map(repr, EQUILIBRIUM_WORDS))}; got "
                f"{_shown(equilibrium)}")
        return equilibrium
    if not _is_int(equilibrium) or equilibrium < 0:
        raise ParameterError(
            "equilibrium must be a mapping {state: value}, an index >= 0 of a solved "
            f"equilibrium, or one of {', '.join(map(repr, EQUILIBRIUM_WORDS))}; got "
            f"{_shown(equilibrium)} ({type(equilibrium).__name__})")
    bound = equilibrium_count_bound(model) if model is not None else None
    if bound is not None and equilibrium >= bound:
        raise EquilibriumNotFoundError(
            f"equilibrium index {equilibrium} is out of range: this polynomial model has at most "
            f"{bound} isolated equilibri{'um' if bound == 1 else 'a'} (Bezout's bound), "
            f"indices 0 to {bound - 1}")
    return int(equilibrium)


def check_digits(digits: Any, low: int = 5, high: int = 10000) -> int:
    """A number of significant digits in ``low .. high``."""
    if not _is_int(digits) or not low <= digits <= high:
        raise ParameterError(f"digits must be an integer from {low} to {high}; got "
                             f"{_shown(digits)}")
    return int(digits)


def refuse_unused(mode: str, **given: Any) -> None:
    """Refuse the options a mode cannot use (each given as ``name=value``;
    ``None`` means not given)."""
    used = [name for name, value in given.items() if value is not None]
    if used:
        names = ", ".join(f"{n}=" for n in used)
        raise ParameterError(f"{mode} does not use {names}; leave "
                             f"{'it' if len(used) == 1 else 'them'} out")


def check_options(model: Any = None, *, parameter: Any = None, equilibrium: Any = None,
                  eliminate: Any = None, values: Any = None, assume: Any = None,
                  order: Any = 3, backend: Any = "flint", low_order: int = 2) -> dict:
    """Every option of :func:`~criticality.local.prepare.prepare`, checked
    at once; returns them normalised."""
    if parameter is not None:
        check_name(parameter, "parameter")
    if not _is_int(order) or not low_order <= order <= MAX_ORDER:
        raise OrderError(f"order must be an integer from {low_order} to {MAX_ORDER}; got "
                         f"{_shown(order)}")
    return {"equilibrium": check_equilibrium(equilibrium, model),
            "eliminate": check_eliminate(eliminate), "values": check_values(values),
            "assume": check_assume(assume), "order": int(order),
            "backend": check_backend(backend)}


def pick_branch(results: tuple, branch: Any) -> Any:
    """``results[branch]``, or a :class:`ParameterError` naming the branches
    that exist."""
    index = check_branch(branch) or 0
    if index >= len(results):
        raise ParameterError(f"branch {index} does not exist: there "
                             f"{'is' if len(results) == 1 else 'are'} {len(results)} "
                             f"solution(s) (branch 0 to {len(results) - 1})")
    return results[index]

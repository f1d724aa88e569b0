"""Bautin (generalised Hopf) points: where l1 vanishes on the Hopf set.

Pipeline place: Hopf engine at order 5 (``c1``, ``c2`` on each branch of the
critical set, as field elements) -> **solve Re c1 = 0 for a second
parameter** -> ``l2`` there -> :class:`BautinPoint`.

On a branch of the Hopf set, ``Re c1`` is an element of the branch's field in
which the second parameter is a generator; its factors of degree one or two
(or even of degree four) in that parameter are solved in closed form, and
``Re c2``, ``omega^2``, the critical value and ``d Re(c1) / d second`` (along
the Hopf curve) are carried to the solution by exact substitution.

Scenario (derived from the radial normal form
``r' = r (beta + l1 r^2 + l2 r^4)``, common practice; Kuznetsov, Elements of
Applied Bifurcation Theory, 3rd ed., 2004, Section 8.3, from memory): cycles
solve ``beta + l1 s + l2 s^2 = 0`` (``s = r^2``), and two of them (a fold of
cycles) exist only where ``l1 l2 < 0``.  So the fold of cycles emanates from
the Bautin point along the side of the Hopf curve where ``l1`` has the sign
opposite to ``l2``:

* ``l2 < 0``: on the subcritical side (``l1 > 0``) a stable equilibrium
  coexists, between the Hopf curve and the fold of cycles, with a stable
  large cycle, separated by an unstable small one: bistability and
  hysteresis (abrupt onset of large oscillations, return at a lower value);
* ``l2 > 0``: on the supercritical side (``l1 < 0``) the stable small cycle
  born at the Hopf curve meets an unstable outer cycle at the fold of
  cycles and both vanish: the oscillation is lost abruptly and the state
  leaves the neighbourhood.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, ClassVar, Mapping, Sequence

import mpmath
import sympy

from ..local.prepare import EquilibriumSpec, expr, prepare, sign_word, solve_for
from ..renderers import Rendered, render
from ..algebra.quadratic import lower
from ..hopf_analysis.engine import run_engine
from ..errors import InadmissiblePointError, NoHopfPointError
from ..kinds import Sign, coerce
from ..local.boundary import guarded
from ..local.options import check_digits, check_point, check_second
from ..model.expressions import parse_expression

if TYPE_CHECKING:
    from ..model.core import Model

__all__ = ["BautinPoint", "bautin_points", "BAUTIN_CONVENTIONS"]


BAUTIN_CONVENTIONS = (
    "l1 = Re(c1)/omega and l2 = Re(c2)/omega for the unit eigenvector <q, q> = 1, with "
    "z' = (beta + i omega) z + c1 z|z|^2 + c2 z|z|^4 (l2 is invariant under the choices of the "
    "normal form; see criticality.local.lyapunov)",
    "the fold of cycles lies on the side of the Hopf curve where l1 l2 < 0",
)


@dataclass(frozen=True)
class BautinPoint(Rendered):
    """A point of the Hopf set where ``l1 = 0``, with ``l2`` there."""

    result_kind: ClassVar[str] = "bautin"

    parameter: str
    second: str
    second_value: sympy.Expr
    critical_value: sympy.Expr
    omega_squared: sympy.Expr
    l2: sympy.Expr
    l2_sign: Sign
    l1_slope: sympy.Expr
    l1_slope_sign: Sign
    fold_of_cycles_side: str
    scenario: str
    branch_index: int
    notes: tuple = ()
    conventions: tuple = BAUTIN_CONVENTIONS

    def __post_init__(self) -> None:
        coerce(self, l2_sign=Sign, l1_slope_sign=Sign)

    def rows(self) -> list[tuple[str, str, object]]:
        return [("second", "second parameter", self.second),
                ("second_value", f"{self.second} at the Bautin point", self.second_value),
                ("critical_value", f"{self.parameter} at the Bautin point", self.critical_value),
                ("omega_squared", "omega^2", self.omega_squared), ("l2", "l2", self.l2),
                ("l2_sign", "sign of l2", self.l2_sign),
                ("l1_slope", f"d Re(c1) / d {self.second} along the Hopf curve", self.l1_slope),
                ("fold_of_cycles_side", "fold of cycles", self.fold_of_cycles_side),
                ("scenario", "scenario", self.scenario)]

    def evaluate(self, values: Mapping | None = None, digits: int = 30) -> dict:
        """The numeric values of the point's quantities at ``values``
        (names of the remaining parameters -> numbers)."""
        digits = check_digits(digits, 5, 10000)
        subs = {k: parse_expression(v, {}) if isinstance(v, str)
                else sympy.sympify(v, strict=True) for k, v in check_point(values).items()}
        out = {}
        with mpmath.workdps(digits):
            for key in ("second_value", "critical_value", "omega_squared", "l2", "l1_slope"):
                e = getattr(self, key)
                e = e.xreplace({s: subs[s.name] for s in e.free_symbols if s.name in subs})
                out[key] = sympy.N(e, digits)
        _require_point(self, subs, out)
        return out


def _require_point(point, subs, out) -> None:
    """Raise :class:`InadmissiblePointError` where the evaluated Bautin point
    is not one: a value undefined (a vanishing denominator) or not real, or
    ``omega^2 <= 0`` (no pair +-i omega)."""
    at = ", ".join(f"{k} = {sympy.sstr(v)}" for k, v in subs.items()) or "these values"
    which = f"the Bautin point at {point.second} = {sympy.sstr(point.second_value)}"
    w2 = out["omega_squared"]
    if w2.is_number and not w2.has(sympy.zoo, sympy.nan) and sympy.im(w2) == 0 and w2 <= 0:
        raise InadmissiblePointError(
            f"at {at}: omega^2 = {sympy.sstr(w2)} <= 0 at {which}: no pair +-i omega there, so "
            "it is not a Bautin point at these values", quantity="omega_squared", value=w2,
            branch=which)
    for key, v in out.items():
        if v.has(sympy.zoo, sympy.nan, sympy.oo, -sympy.oo):
            raise InadmissiblePointError(
                f"at {at}: {key} of {which} is undefined (a denominator vanishes), so the "
                "point does not exist there", quantity=key, value=None, branch=which)
        if v.is_number and abs(sympy.im(v)) > 0:
            raise InadmissiblePointError(
                f"at {at}: {key} of {which} is {v}, not a real number, so the point does not "
                "exist there", quantity=key, value=v, branch=which)


def _scenario(l2_sign, slope_sign, second, value_text):
    if l2_sign == "zero":
        return ("l2 vanishes too: a degenerate Bautin point (codimension three or more); the "
                "next Lyapunov coefficient (order 7) decides", "undecided")
    if l2_sign not in ("negative", "positive"):
        return ("the sign of l2 is not decided under the assumptions; evaluate l2 at a "
                "parameter point", "undecided")
    fold_side_l1 = "positive" if l2_sign == "negative" else "negative"
    if slope_sign in ("positive", "negative"):
        up = (slope_sign == "positive") == (fold_side_l1 == "positive")
        side = f"{second} {'>' if up else '<'} {value_text}"
    else:
        side = f"where l1 is {fold_side_l1} (sign of the slope undecided)"
    if l2_sign == "negative":
        text = (f"l2 < 0: a fold of cycles emanates on the subcritical side ({side}); there a "
                "stable equilibrium and a stable large cycle coexist between the Hopf curve and "
                "the fold of cycles: bistability and hysteresis")
    else:
        text = (f"l2 > 0: a fold of cycles emanates on the supercritical side ({side}); the "
                "stable small cycle meets an unstable outer cycle there and the oscillation is "
                "lost abruptly")
    return text, side


def _points_on_branch(prep, bc, second, index):
    tower = bc.branch.tower
    re_c1 = lower(bc.c_center[0].a)
    re_c2 = lower(bc.c_center[1].a)
    points, unsolved = solve_for(tower, re_c1, second, positive=prep.assumptions.get(second)
                                 == "positive")
    out = []
    for sp in points:
        W = sp.substitute(bc.branch.W)
        target = sp.target
        ctx = prep.context(target)
        if sign_word(target, W, ctx) in ("zero", "negative", "nonpositive"):
            continue
        E = lambda x: expr(target, x, ctx)  # noqa: E731
        c2 = sp.substitute(re_c2)
        slope = sp.substitute(tower.derivative(re_c1, second))
        l2_sign = sign_word(target, c2, ctx)
        slope_sign = sign_word(target, slope, ctx)
        value = E(sp.value)
        text, side = _scenario(l2_sign, slope_sign, second.name, sympy.sstr(value))
        W_e = E(W)
        out.append(BautinPoint(prep.parameter, second.name, value, E(sp.substitute(bc.branch.value)),
                               W_e, E(c2) / sympy.sqrt(W_e), l2_sign, E(slope), slope_sign, side,
                               text, index))
    return out, unsolved


@guarded("the Bautin analysis")
def bautin_points(model: Model, parameter: str, second: str, *,
                  equilibrium: EquilibriumSpec = None, eliminate: Sequence[str] | None = None,
                  values: Mapping[str, object] | None = None,
                  assume: Mapping[str, str] | None = None, backend: str = "flint") -> tuple:
    """Bautin points of the Hopf set of ``parameter``, solved for ``second``.

    Parameters
    ----------
    model : Model
    parameter : str
        The Hopf bifurcation parameter.
    second : str
        The parameter (or free equilibrium coordinate) solved from ``l1 = 0``.
    equilibrium, eliminate, values, assume, backend
        As for :func:`criticality.hopf`.

    Returns
    -------
    tuple of BautinPoint
        One per closed-form solution on each branch of the Hopf set.

    Examples
    --------
    >>> from criticality import Model
    >>> m = Model(["x", "y"], {"x": "mu*x - y + k*x^3 - x*(x^2 + y^2)^2",
    ...                        "y": "x + mu*y + k*y^3 - y*(x^2 + y^2)^2"})
    >>> p = bautin_points(m, "mu", "k", equilibrium={"x": 0, "y": 0})[0]
    >>> p.second_value, p.l2, p.l2_sign
    (0, -4, 'negative')
    """
    check_second(parameter or getattr(model, "bifurcation_parameter", None), second)
    prep = prepare(model, parameter, equilibrium=equilibrium, eliminate=eliminate,
                   values=values, assume=assume, order=5, backend=backend, vary=True,
                   keep=(second,))
    sec = prep.symbol(second)
    out = run_engine(prep)
    found, unsolved = [], []
    for index, bc in enumerate(out.branches):
        pts, uns = _points_on_branch(prep, bc, sec, index)
        found.extend(pts)
        unsolved.extend(uns)
    if not found:
        extra = f"; no closed form for {', '.join(map(str, unsolved))} = 0" if unsolved else ""
        raise NoHopfPointError(f"l1 does not vanish at an admissible closed-form value of "
                               f"'{second}' on the Hopf set{extra}", reason="no_bautin_point")
    return tuple(found)

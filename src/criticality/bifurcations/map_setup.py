"""Shared preparation for the bifurcations of maps ``x -> F(x)``.

Pipeline place: map model -> **fixed point, Taylor forms of F, multipliers**
-> flip, Neimark-Sacker and fold of maps.

A map's fixed points are the equilibria of the flow ``x' = F(x) - x``
(:meth:`Model.fixed_point_flow`), so the engine's preparation stage (given,
solved or parametrised equilibria; the tower of fields; Taylor forms) is
reused unchanged; the map's Jacobian is that flow's plus the identity and its
higher Taylor forms are the same.

Multipliers on the unit circle are reached through the Cayley transform
``lambda = (1 + s) / (1 - s)``, which maps the unit circle onto the imaginary
axis and the open unit disc onto the open left half-plane: with
``chi(lambda)`` the characteristic polynomial of ``A = DF(x0)``,

    chi~(s) = (1 - s)^n chi((1 + s) / (1 - s))

has the roots ``s = (lambda - 1) / (lambda + 1)``; a pair ``e^{+-i theta}``
becomes ``s = +-i tan(theta / 2)``, so the engine's Hurwitz machinery finds
Neimark-Sacker points exactly as it finds Hopf points, with ``W = tan^2(theta/2)``
in the field (never a trigonometric value), and the Hurwitz determinants of the
transformed cofactor are the conditions for the other multipliers to lie inside
the unit circle (common practice, no source).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Mapping, Sequence

from ..algebra import upoly
from ..algebra.linalg import identity
from ..algebra.quadratic import lower
from ..local.linear import hurwitz_determinants
from ..local.prepare import prepare, sign_word, unknown_symbol

if TYPE_CHECKING:
    import sympy

    from ..algebra.domain import Tower
    from ..algebra.field import Element
    from ..algebra.signs import SignContext
    from ..local.prepare import EquilibriumSpec, PreparedProblem
    from ..local.taylor import TaylorForms
    from ..model.core import Model

__all__ = ["prepare_map", "map_jacobian", "cayley", "inside_unit_circle", "unknown_symbol",
           "condition_status"]


def prepare_map(model: Model, parameter: str, *, equilibrium: EquilibriumSpec = None,
                eliminate: Sequence[str] | None = None, values: Mapping | None = None,
                assume: Mapping[str, str] | None = None, order: int = 3, backend: str = "flint",
                analysis: str = "this analysis") -> PreparedProblem:
    """The prepared problem of the map's fixed-point flow (see the module docstring)."""
    model.require_kind("map", analysis, "for flows use hopf(), fold(), bautin_points() or "
                       "bogdanov_takens()")
    return prepare(model.fixed_point_flow(), parameter, equilibrium=equilibrium,
                   eliminate=eliminate, values=values, assume=assume, order=order,
                   backend=backend)


def map_jacobian(taylor: TaylorForms) -> list[list[Element]]:
    """``DF(x0)`` from the Taylor forms of ``F(x) - x``."""
    K = taylor.field
    A = taylor.jacobian()
    one = identity(K, taylor.n)
    return [[a + e for a, e in zip(row, erow)] for row, erow in zip(A, one)]


def _binomial_power(K, p, k):
    out = [K.one]
    for _ in range(k):
        out = upoly.mul(out, p)
    return out


def cayley(K: Any, chi: Sequence[Element]) -> list[Element]:
    """Coefficients (lowest first, monic) of ``(1 - s)^n chi((1 + s)/(1 - s))``.

    The degree drops by the multiplicity of the multiplier -1; an identically
    vanishing transform cannot occur for a monic ``chi``.
    """
    n = len(chi) - 1
    plus, minus = [K.one, K.one], [K.one, -K.one]
    acc: list = []
    for k, a in enumerate(chi):
        if not a:
            continue
        term = upoly.mul(_binomial_power(K, plus, k), _binomial_power(K, minus, n - k))
        acc = upoly.add(acc, upoly.scale(term, a))
    return upoly.monic(upoly.trim(acc))


def inside_unit_circle(K: Any, poly: Sequence[Element]) -> list[Element]:
    """Elements that are all positive iff every root of ``poly`` (a polynomial
    in the multiplier, lowest coefficient first) lies inside the unit circle:
    the Hurwitz determinants of its Cayley transform, and the transform's
    leading coefficient where the degree would drop."""
    poly = upoly.trim(poly)
    if len(poly) < 2:
        return []
    n = len(poly) - 1
    lead = upoly.evaluate(poly, -K.one, K.zero) * (K.one if n % 2 == 0 else -K.one)
    transformed = cayley(K, poly)
    out = [lead / poly[-1]]  # (-1)^n chi(-1) > 0: no root at or beyond -1 crosses
    out += hurwitz_determinants(K, transformed) if len(transformed) > 1 else []
    return out


def condition_status(tower: Tower, x: Any, ctx: SignContext | None, want: str = "positive") -> str:
    """``"holds"``, ``"fails"`` or ``"open"`` for ``x > 0`` (``want="positive"``)
    or ``x != 0`` (``want="nonzero"``)."""
    word = sign_word(tower, lower(x), ctx)
    if want == "nonzero":
        return {"positive": "holds", "negative": "holds", "zero": "fails"}.get(word, "open")
    return {"positive": "holds", "negative": "fails", "zero": "fails",
            "nonpositive": "fails"}.get(word, "open")

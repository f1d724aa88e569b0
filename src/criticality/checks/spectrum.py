"""A numeric check of a located bifurcation point: the spectrum there.

Pipeline place: flip / Neimark-Sacker / fold-Hopf / Hopf-Hopf result ->
**eigenvalues of the original model's Jacobian at the reported point (mpmath)**
-> :class:`SpectrumCheck`.

The reported point (the values of the solved symbols, of the eliminated
parameters and the equilibrium or fixed point) is substituted into the
model's own equations, the Jacobian is evaluated at ``digits`` significant
digits and its eigenvalues are computed by ``mpmath.eig``, independently of the
exact engine.  The point must be an equilibrium (a fixed point for maps) and
the expected critical eigenvalues (multipliers for maps) must be among the
eigenvalues.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Mapping

from dataclasses import dataclass

import mpmath
import sympy

from ..errors import InadmissiblePointError, ParameterError
from ..model.parameter import symbol_for

if TYPE_CHECKING:
    from ..model.core import Model

__all__ = ["SpectrumCheck", "spectrum_check"]


@dataclass(frozen=True)
class SpectrumCheck:
    """Expected critical eigenvalues, the computed spectrum and the distance."""

    expected: tuple
    eigenvalues: tuple
    distance: float
    agrees: bool
    residual: float = 0.0

    def summary(self) -> str:
        show = lambda zs: ", ".join(mpmath.nstr(z, 12) for z in zs)  # noqa: E731
        return (f"expected critical eigenvalues: {show(self.expected)}\n"
                f"computed spectrum (mpmath): {show(self.eigenvalues)}\n"
                f"largest distance: {self.distance:.3g}; residual of the point: "
                f"{self.residual:.3g} ({'agrees' if self.agrees else 'differs'})")

    __str__ = summary


def _mp(e, digits):
    re, im = sympy.N(e, digits + 10).as_real_imag()
    return mpmath.mpc(mpmath.mpf(str(re)), mpmath.mpf(str(im)))


def _expected(result, table, digits, values=None):
    num = lambda e: _mp(sympy.sympify(e, strict=True).xreplace(table), digits)  # noqa: E731
    if hasattr(result, "omega1"):
        w1, w2 = (_frequency(result, w, num, values) for w in ("omega1", "omega2"))
        return [1j * w1, -1j * w1, 1j * w2, -1j * w2]
    if hasattr(result, "G200"):
        w = _frequency(result, "omega", num, values)
        return [mpmath.mpc(0), 1j * w, -1j * w]
    if hasattr(result, "multiplier"):
        lam = num(result.multiplier)
        return [lam, mpmath.conj(lam)]
    return [mpmath.mpc(-1)]


def _frequency(result, name, num, values):
    """The frequency ``name`` of ``result`` at the point; an imaginary one
    (``omega^2 < 0``: a real pair, which the spectrum would match as well) is
    no critical pair, and raises :class:`InadmissiblePointError`."""
    w = num(getattr(result, name))
    if abs(mpmath.im(w)) > abs(mpmath.re(w)) * mpmath.mpf(10) ** (-mpmath.mp.dps // 2) or \
            not mpmath.re(w) > 0:
        raise InadmissiblePointError(
            f"at {', '.join(f'{k} = {v}' for k, v in (values or {}).items()) or 'this point'}: "
            f"{name} = {mpmath.nstr(w, 12)} is not a positive real number "
            f"({name}^2 = {mpmath.nstr(w * w, 12)}): the point has no pair +-i {name} there, "
            "so there is nothing to check", quantity=name, value=w,
            branch=f"{getattr(result, 'result_kind', 'the point')}")
    return mpmath.re(w)


def _resolved(result, model, values):
    given = dict(model.value_substitution(values or {}))
    table = dict(given)
    found = getattr(result, "values", None) or getattr(result, "critical_values", {})
    for name, e in found.items():
        table[model.symbols.get(name, symbol_for(name))] = sympy.sympify(e, strict=True)
    for _ in range(len(table) + 1):
        table = {k: v.xreplace(table) for k, v in table.items()}
    return table


def spectrum_check(result: Any, model: Model, values: Mapping[str, object] | None = None, *,
                   digits: int = 30) -> SpectrumCheck:
    """Evaluate the Jacobian (flows) or ``DF`` (maps) of ``model`` at the point of
    ``result`` and compare its spectrum with the critical eigenvalues.

    Parameters
    ----------
    result : FlipResult, NeimarkSackerResult, FoldHopfResult or HopfHopfResult
    model : Model
        The model the result was computed from.
    values : mapping, optional
        Values of the parameters the point still depends on.
    digits : int
        Working precision; agreement means a distance below ``10**(-digits/2)``.
    """
    table = _resolved(result, model, values)
    point = getattr(result, "equilibrium", None) or getattr(result, "fixed_point")
    at = {model.symbols[s]: sympy.sympify(v, strict=True).xreplace(table) for s, v in point.items()}
    f = sympy.Matrix(model.equations)
    J = f.jacobian(model.state_symbols).xreplace(table).xreplace(at)
    shift = sympy.Matrix(model.state_symbols) if model.kind == "map" else sympy.zeros(len(at), 1)
    res = (f - shift).xreplace(table).xreplace(at)
    free = J.free_symbols | res.free_symbols
    if free:
        raise ParameterError(f"the point depends on {', '.join(sorted(map(str, free)))}; give "
                             "values=... for them")
    with mpmath.workdps(digits):
        M = mpmath.matrix([[_mp(e, digits) for e in row] for row in J.tolist()])
        ev = list(mpmath.eig(M, left=False, right=False))
        expected = _expected(result, table, digits, values)
        dist = max(min(abs(e - x) for e in ev) for x in expected)
        residual = max(abs(_mp(e, digits)) for e in res)
        tol = mpmath.mpf(10) ** (-digits // 2)
        return SpectrumCheck(tuple(expected), tuple(ev), float(dist),
                             bool(dist < tol and residual < tol), float(residual))

"""A :class:`HopfResult` from the numbers of the numeric mode.

Pipeline place: numeric mode -> **result**.  Every quantity is a sympy Float
with the requested number of digits; the status and a note say that the
result is numeric and how many of its digits are correct.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from collections.abc import Mapping

import mpmath
import sympy

from ..local.critical import Condition
from ..errors import ClosedFormUnavailableError
from ..kinds import Classification, ConditionStatus, Side
from .results import CyclePrediction, HopfResult

if TYPE_CHECKING:
    from ..model.core import Model

__all__ = ["numeric_result"]


def _f(x, digits):
    if digits <= 15:  # float64 results: no decimal round trip needed
        return sympy.Float(float(x), digits)
    return sympy.Float(mpmath.nstr(x, digits + 2, strip_zeros=False), digits)


def _c(x, digits):
    x = mpmath.mpc(x)
    re, im = _f(x.real, digits), _f(x.imag, digits)
    if not re or not im:
        return re + sympy.I * im
    # the canonical form sympy's arithmetic would build (a Float, then Float*I),
    # assembled directly: the arithmetic costs more than the numeric analysis
    return sympy.Add._from_args((re, sympy.Mul._from_args((im, sympy.I))))


class _NumericDetails:
    """The display-oriented parts of a numeric result (plain mpmath data, so
    it pickles as it is)."""

    portable = True

    def __init__(self, data, digits, model) -> None:
        self.data, self.digits, self.model = data, digits, model

    def reduced_system(self):
        raise ClosedFormUnavailableError(
            "the reduced system is not shown in the numeric mode; the normal-form coefficients "
            "were computed directly by the normalization method")

    def jacobian(self):
        return sympy.Matrix([[_f(a, self.digits) for a in row] for row in self.data["A"]])

    def characteristic_polynomial(self):
        lam = sympy.Symbol("lambda")
        return self.jacobian().charpoly(lam).as_expr()

    def eigenvector_q(self):
        return tuple(_c(x, self.digits) for x in self.data["q"])

    def eigenvector_p(self):
        return tuple(_c(x, self.digits) for x in self.data["p"])


def _conditions(d, digits):
    beta = mpmath.re(d["dlam"])
    tol = mpmath.mpf(10) ** (-digits)
    others = d["others_max_re"]
    return (
        Condition("omega_squared_positive", "omega^2 > 0: the pair is imaginary, not a real "
                  "pair +-kappa", _f(d["W"], digits), ">", ConditionStatus.HOLDS if d["W"] > 0 else ConditionStatus.FAILS),
        Condition("transversal", "the pair crosses with non-zero speed: Re d lambda / d mu != 0",
                  _f(beta, digits), "!=", ConditionStatus.HOLDS if abs(beta) > tol else ConditionStatus.FAILS),
        Condition("others_stable", "the largest real part of the other eigenvalues is negative "
                  "(float64 eigenvalues)", _f(-others, min(digits, 15)), ">",
                  ConditionStatus.HOLDS if others < 0 else ConditionStatus.FAILS),
    )


class _Amplitudes(Mapping):
    """``{state: sqrt(k_j (mu - mu_c))}``, each expression built when first
    read (building them all costs more than the numeric analysis itself)."""

    def __init__(self, coeffs, offset) -> None:
        self._coeffs, self._offset = dict(coeffs), offset
        self._built: dict = {}

    def __getitem__(self, key):
        if key not in self._built:
            self._built[key] = sympy.sqrt(self._coeffs[key] * self._offset)
        return self._built[key]

    def __iter__(self):
        return iter(self._coeffs)

    def __len__(self) -> int:
        return len(self._coeffs)

    def __reduce__(self):
        return (_Amplitudes, (self._coeffs, self._offset))

    def __eq__(self, other):
        return isinstance(other, Mapping) and dict(self.items()) == dict(other.items())

    def __repr__(self) -> str:
        return repr(dict(self.items()))


def _cycle(d, digits, mu, mu_c, states, stable_others, correct):
    """The cycle near onset from the first ``c_j`` whose real part is not zero
    to the computed accuracy (``correct`` digits): ``rho^(2j) = -beta / Re c_j``
    as in the exact engine; undecided where every computed ``Re c_j`` is zero."""
    beta = mpmath.re(d["dlam"])
    omega = d["omega"]
    tol = mpmath.mpf(10) ** (-correct)
    j, R, S = 0, None, None
    for index, c in enumerate(d["c"], start=1):
        if abs(mpmath.re(c)) >= tol * max(1, abs(c) / omega):
            j, R, S = index, mpmath.re(c), mpmath.im(c)
            break
    period = 2 * sympy.pi / _f(omega, digits)
    if not j:
        return CyclePrediction(Side.UNDECIDED, None, None, sympy.nan, {}, {}, period, sympy.nan)
    k = -beta / R
    offset = mu - mu_c
    side = Side.ABOVE if k > 0 else Side.BELOW
    stable = bool(R < 0 and stable_others)
    if j == 1:
        coeffs = {s: _f(4 * k * abs(x) ** 2, digits) for s, x in zip(states, d["q"])}
        slope = _f(mpmath.im(d["dlam"]) - beta * S / R, digits)
        return CyclePrediction(side, None, stable, _f(k, digits) * offset,
                               _Amplitudes(coeffs, offset), coeffs, period, slope)
    root = sympy.Pow(_f(k, digits) * offset, sympy.Rational(1, 2 * j))
    amps = {s: _f(2 * abs(x), digits) * root for s, x in zip(states, d["q"])}
    # the lower Re c_i vanish only to the computed accuracy, their Im c_i need not: the
    # frequency is then not linear in mu - mu_c to leading order
    return CyclePrediction(side, None, stable, sympy.Pow(_f(k, digits) * offset, sympy.Rational(1, j)),
                           amps, {}, period, sympy.nan, 2 * j)


def numeric_result(original: Model, parameter: str, d: dict, digits: int, correct: int,
                   agreement: float, routes: bool, order: int, how: str) -> HopfResult:
    """Build the result; ``correct`` digits are reported, ``agreement`` is the
    raw estimate of correct digits, ``how`` the note that says how it was found."""
    model = original
    with mpmath.workdps(digits + 10):
        mu = original.symbols[parameter]
        mu_c = _f(d["mu_c"], digits)
        omega = d["omega"]
        c1 = d["c"][0]
        l1 = mpmath.re(c1) / omega
        lyap = tuple(_f(mpmath.re(c) / omega, digits) for c in d["c"])
        conds = _conditions(d, digits)
        cls = Classification.SUPERCRITICAL if l1 < 0 else Classification.SUBCRITICAL
        if abs(l1) < mpmath.mpf(10) ** (-correct) * max(1, abs(c1) / omega):
            cls = Classification.DEGENERATE
        status = f"numeric ({correct} correct digits)"
        note = how
        verdict = {Classification.SUPERCRITICAL: "supercritical (numeric): l1 < 0",
                   Classification.SUBCRITICAL: "subcritical (numeric): l1 > 0",
                   Classification.DEGENERATE: "l1 is zero to the computed accuracy: the next Lyapunov "
                                 "coefficient decides"}[cls]
        dlam = d["dlam"]
        return HopfResult(
            model=original, parameter=parameter, parameter_symbol=mu,
            equilibrium={s: _f(x, digits) for s, x in zip(model.states, d["x0"])},
            equilibrium_how="located numerically", critical_value=mu_c,
            omega_squared=_f(d["W"], digits), omega=_f(omega, digits),
            transversality=_f(mpmath.re(dlam), digits), eigenvalue_derivative=_c(dlam, digits),
            c1=_c(c1, digits), l1=_f(l1, digits), planar_coefficient=_f(mpmath.re(c1) / 2, digits),
            lyapunov_coefficients=lyap, classification=cls, verdict=verdict,
            supercritical_where=None, l1_zero_set=None, conditions=conds,
            cycle=_cycle(d, digits, mu, mu_c, model.states,
                         conds[2].status == ConditionStatus.HOLDS, correct),
            q_norm_squared=sympy.Integer(1), routes_agree=bool(routes), branch_index=0,
            branch_count=1, substitutions={},
            notes=tuple(getattr(original, "notes", ())) + (note,),
            assumptions={p.name: p.assumption for p in original.parameters},
            status=status, _details=_NumericDetails(d, digits, model))

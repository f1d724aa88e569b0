"""Numeric evaluation of a result at a parameter point, to any precision.

Pipeline place: result -> **numeric evaluation** (mpmath).

Every closed form of a :class:`HopfResult` is evaluated at the given
parameter values with ``digits`` significant digits; as an independent check,
the eigenvalues of the Jacobian at the critical point are computed numerically
(``mpmath.eig``): the critical pair must sit at ``+-i omega`` and the report
says where the other eigenvalues lie.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Any, ClassVar, Mapping

import mpmath
import sympy

from ..local.boundary import guarded
from ..errors import InadmissiblePointError, ParameterError
from ..kinds import Classification, coerce
from ..local.options import check_digits, check_point
from ..model.parameter import assumption_of
from ..renderers import render

#: a HopfResult, typed loosely: the result imports this module at run time, and a
#: type-only import back would make the two modules import each other
ResultLike = Any

__all__ = ["NumericHopfResult", "evaluate_result", "parameter_values", "require_hopf_point",
           "branch_words"]


@dataclass(frozen=True)
class NumericHopfResult:
    """A :class:`HopfResult` evaluated at one parameter point.

    Numbers are ``mpmath.mpf`` (``mpc`` for complex ones) computed with
    ``digits`` significant digits (plus guard digits); do arithmetic on them
    inside ``mpmath.workdps(digits)`` to keep that precision.  ``eigenvalues`` are the numeric eigenvalues of the
    Jacobian at the critical point; ``pair_error`` is the distance of the
    nearest one to ``i omega`` (a check of the closed forms), and
    ``others_stable`` says whether all other eigenvalues have negative real
    parts.
    """

    values: Mapping[str, object]
    digits: int
    critical_value: Any  # an mpmath number
    omega_squared: Any  # an mpmath number
    omega: Any  # an mpmath number
    period: Any  # an mpmath number
    transversality: Any  # an mpmath number
    c1: Any  # an mpmath number
    l1: Any  # an mpmath number
    lyapunov_coefficients: tuple
    classification: Classification
    equilibrium: Mapping[str, object]
    amplitude_coefficients: Mapping[str, Any]
    eigenvalues: tuple
    pair_error: Any  # an mpmath number
    others_stable: bool
    conditions: tuple

    result_kind: ClassVar[str] = "hopf_numeric_point"

    def __post_init__(self) -> None:
        coerce(self, classification=Classification)

    def _repr_html_(self) -> str:
        return render(self, "html")

    def _repr_markdown_(self) -> str:
        return render(self, "markdown")

    def amplitude(self, offset: float) -> dict:
        """Predicted amplitude of each state at ``mu = mu_c + offset`` (on the
        side where the cycle exists, else NaN)."""
        with mpmath.workdps(self.digits):
            out = {}
            for name, k in self.amplitude_coefficients.items():
                v = k * mpmath.mpf(offset)
                out[name] = mpmath.sqrt(v) if v >= 0 else mpmath.nan
            return out

    def __str__(self) -> str:
        rows = [("critical value", self.critical_value), ("omega", self.omega),
                ("period", self.period), ("transversality", self.transversality),
                ("l1", self.l1), ("classification", self.classification),
                ("|lambda - i omega| (numeric check)", self.pair_error),
                ("other eigenvalues stable", self.others_stable)]
        width = max(len(r[0]) for r in rows)
        d = min(self.digits, 15)
        fmt = lambda v: mpmath.nstr(v, d) if isinstance(v, (mpmath.mpf, mpmath.mpc)) else str(v)  # noqa: E731
        return "\n".join(f"{k.ljust(width)}  {fmt(v)}" for k, v in rows)


def parameter_values(result: ResultLike, values: Mapping) -> dict:
    """Exact sympy values for the parameters of ``result`` (defaults filled in).

    Raises
    ------
    ParameterError
        If a name is unknown or a parameter has no value.
    """
    model = result.model
    known = {str(s) for s in _free_parameters(result)}
    out = {}
    for key, raw in values.items():
        if key not in known and key not in model.symbols:
            raise ParameterError(f"'{key}' is not a parameter of this result (parameters: "
                                 f"{', '.join(sorted(known))})")
        out[key] = _exact(model, key, raw)
    defaults = model.defaults() if hasattr(model, "defaults") else {}
    for name in sorted(known):  # not set order: the JSON must not depend on the hash seed
        if name not in out and name in defaults:
            out[name] = defaults[name]
    missing = sorted(k for k in known if k not in out and k != result.parameter)
    if missing:
        raise ParameterError(f"no value for {', '.join(map(repr, missing))}; give "
                             f"{'it' if len(missing) == 1 else 'them'} as keyword arguments")
    return out


def _exact(model, key, raw):
    if isinstance(raw, sympy.Basic):
        return raw
    if isinstance(raw, bool):
        raise ParameterError(f"the value of '{key}' must be a number, not {raw!r}")
    if isinstance(raw, int):
        return sympy.Integer(raw)
    if isinstance(raw, Fraction):
        return sympy.Rational(raw.numerator, raw.denominator)
    if isinstance(raw, float):
        return sympy.Rational(repr(raw))
    if isinstance(raw, (mpmath.mpf,)):
        return sympy.Float(raw, mpmath.mp.dps)
    if isinstance(raw, str):
        return model.parse(raw, context=f"value of '{key}'")
    raise ParameterError(f"the value of '{key}' must be a number, got {type(raw).__name__}")


def _free_parameters(result):
    syms = set()
    for e in (result.critical_value, result.omega_squared, result.l1, result.transversality):
        syms |= e.free_symbols
    for v in result.equilibrium.values():
        syms |= v.free_symbols
    syms.discard(result.parameter_symbol)
    return syms


def _num(expr, subs, digits, what=None):
    """``expr`` at the point as an mpmath number.  Where it is undefined (a
    pole, e.g. an amplitude coefficient where l1 = 0) the result is NaN, or,
    when ``what`` names a quantity the evaluation cannot do without, an error."""
    v = sympy.N(expr.xreplace(subs), digits)
    if v.free_symbols:
        raise ParameterError(f"no value for {', '.join(sorted(map(str, v.free_symbols)))}")
    if v.has(sympy.zoo, sympy.nan, sympy.oo, -sympy.oo):
        if what is not None:
            raise ParameterError(f"the {what} is undefined at this parameter point (division by "
                                 "zero); the point lies outside the admissible set")
        return mpmath.nan
    re, im = v.as_real_imag()
    if im != 0 and abs(im) > abs(re) * sympy.Float(10) ** (-digits + 3):
        return mpmath.mpc(_mpf(re, digits), _mpf(im, digits))
    return _mpf(re, digits)


def _mpf(x, digits):
    """A sympy number as an mpmath number through its binary value (no
    decimal string, so no limit on the number of digits)."""
    value = sympy.Float(x, digits)
    mpf = getattr(value, "_mpf_", None)
    return mpmath.mpf(mpf) if mpf is not None else mpmath.mpf(str(value))  # NaN


def branch_words(result: ResultLike) -> str:
    """``"branch 1 of 2 (hopf_all()[0]), mu_c = ..."``: which branch a result is."""
    index, count = getattr(result, "branch_index", 0), getattr(result, "branch_count", 1)
    value = sympy.sstr(result.critical_value)
    if len(value) > 80:
        value = value[:77] + "..."
    return (f"branch {index + 1} of {count} (hopf_all()[{index}]), "
            f"{result.parameter}_c = {value}")


def require_hopf_point(result: ResultLike, values: Mapping, critical_value: Any,
                       omega_squared: Any, sheets: Mapping[str, Any], digits: int) -> None:
    """Raise :class:`InadmissiblePointError` where the branch has no Hopf
    point at ``values``: a critical value that is not real or not defined,
    ``omega^2 <= 0`` (the eigenvalues that sum to zero are real, or zero), or
    a critical value that belongs to the equilibrium with the other sign of
    one of its roots (a condition ``on_chosen_sheet`` negative there).  The
    numbers are the closed forms evaluated at the point."""
    at = ", ".join(f"{k} = {sympy.sstr(v)}" for k, v in values.items()) or "these values"
    which = branch_words(result)
    show = lambda v: mpmath.nstr(v, min(digits, 15))  # noqa: E731
    other = [k for k, v in sheets.items() if isinstance(v, mpmath.mpf) and v < 0]
    sheet = (" The critical value there belongs to the equilibrium with the other sign of a "
             "root in the chosen one (the condition "
             f"'{other[0]}' is {show(sheets[other[0]])} < 0): the chosen equilibrium has no "
             "Hopf point on this branch at these values.") if other else ""
    if not isinstance(critical_value, mpmath.mpf) or not mpmath.isfinite(critical_value):
        raise InadmissiblePointError(
            f"at {at}: the critical value of {which} is {show(critical_value)}, not a real "
            "number, so there is no Hopf point on this branch there; try the other branches "
            "(hopf_all) or other values." + sheet,
            quantity="critical_value", value=critical_value, branch=which)
    declared = assumption_of(result.parameter_symbol)
    outside = {"positive": critical_value <= 0, "nonnegative": critical_value < 0,
               "negative": critical_value >= 0, "nonzero": critical_value == 0}.get(declared)
    if outside:
        raise InadmissiblePointError(
            f"at {at}: the critical value of {which} is {show(critical_value)}, outside the declared range of '{result.parameter}' "
            f"({declared}), so there is no admissible Hopf point on this branch there; try the "
            "other branches (hopf_all) or other values.",
            quantity="critical_value", value=critical_value, branch=which)
    if isinstance(omega_squared, mpmath.mpc) or not omega_squared > 0:
        if isinstance(omega_squared, mpmath.mpf) and omega_squared == 0:
            what = ("omega^2 = 0: a double zero eigenvalue (Bogdanov-Takens territory), not a "
                    "pair +-i omega")
        elif isinstance(omega_squared, mpmath.mpf) and omega_squared < 0:
            what = (f"omega^2 = {show(omega_squared)} < 0: the two eigenvalues that sum to "
                    "zero are a real pair +-kappa (a neutral saddle), not +-i omega")
        else:
            what = f"omega^2 = {show(omega_squared)} is not a positive real number"
        raise InadmissiblePointError(
            f"at {at}: {what}, so there is no Hopf point on {which} there (the conditions of "
            "the result say where there is one)." + sheet,
            quantity="omega_squared", value=omega_squared, branch=which)
    if other:
        raise InadmissiblePointError(
            f"at {at}: {which} is not a Hopf point of the chosen equilibrium." + sheet,
            quantity=other[0], value=sheets[other[0]], branch=which)


@guarded("the evaluation of the result")
def evaluate_result(result: ResultLike, values: Mapping, *, digits: int = 30) -> NumericHopfResult:
    """Evaluate every quantity of ``result`` at ``values``."""
    check_digits(digits, 5, 10000)
    exact = parameter_values(result, check_point(values))
    subs = {result.model.symbols.get(k, sympy.Symbol(k, real=True)): v for k, v in exact.items()}
    for s in _free_parameters(result):
        if str(s) in exact:
            subs[s] = exact[str(s)]
    with mpmath.workdps(digits + 5):
        mu_c = _num(result.critical_value, subs, digits + 5, "critical value")
        at_c = dict(subs)
        at_c[result.parameter_symbol] = sympy.Float(mu_c, digits + 5) if isinstance(
            mu_c, mpmath.mpf) else mu_c
        require_hopf_point(result, exact, mu_c, _num(result.omega_squared, subs, digits + 5),
                           {c.key: _num(c.expr, subs, digits + 5) for c in result.conditions
                            if c.key.startswith("on_chosen_sheet")}, digits)
        omega = _num(result.omega, subs, digits + 5, "frequency omega")
        l1 = _num(result.l1, subs, digits + 5)
        lyap = tuple(_num(e, subs, digits + 5) for e in result.lyapunov_coefficients)
        eq = {k: _num(v, at_c, digits + 5) for k, v in result.equilibrium.items()}
        amps = {k: _num(v, subs, digits + 5) for k, v in result.cycle.amplitude_coefficients.items()}
        J = mpmath.matrix([[_num(x, subs, digits + 5) for x in row]
                           for row in result.jacobian.tolist()])
        eigs = mpmath.eig(J, left=False, right=False)
        target = mpmath.mpc(0, omega)
        pair_error = min(abs(e - target) for e in eigs)
        tol = mpmath.mpf(10) ** (-(digits // 2))
        others = [e for e in eigs if abs(e - target) > tol and abs(e + target) > tol]
        conds = tuple((c.key, _num(c.expr, subs, digits + 5), c.relation) for c in result.conditions)
        cls = (Classification.SUPERCRITICAL if l1 < 0 else
               Classification.SUBCRITICAL if l1 > 0 else Classification.DEGENERATE)
        transversality = _num(result.transversality, subs, digits + 5)
        if result.classification in (Classification.NONTRANSVERSAL,
                                     Classification.INADMISSIBLE):
            cls = result.classification  # no verdict for the family, none at its points
        elif transversality == 0:
            cls = Classification.NONTRANSVERSAL
        return NumericHopfResult(
            values=exact, digits=digits, critical_value=mu_c, omega_squared=omega ** 2,
            omega=omega, period=2 * mpmath.pi / omega,
            transversality=transversality,
            c1=_num(result.c1, subs, digits + 5), l1=l1, lyapunov_coefficients=lyap,
            classification=cls, equilibrium=eq, amplitude_coefficients=amps,
            eigenvalues=tuple(eigs), pair_error=pair_error,
            others_stable=all(mpmath.re(e) < 0 for e in others), conditions=conds)

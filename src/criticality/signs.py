"""Deciding signs of rational functions of the parameters.

Pipeline place: used by the critical set (is omega^2 > 0? is the critical
value admissible?) and by the criticality condition (the sign of l1).

A polynomial is proved positive when, after replacing negative parameters by
their opposites, every parameter it contains is positive (or nonnegative with a
non-zero constant term) and every coefficient has the same sign.  Where that
fails, the admissibility conditions of the Hopf set are used the way one does
by hand: a condition ``sigma - b - 1 > 0`` that is linear in ``sigma`` becomes
the substitution ``sigma = b + 1 + t`` with ``t > 0``, after which the factor
often is a sum of positive terms.  Nothing is guessed: what cannot be proved
is reported as undecided.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from itertools import combinations

import sympy

__all__ = ["POSITIVE", "NEGATIVE", "NONNEGATIVE", "NONPOSITIVE", "ZERO", "UNKNOWN",
           "SignContext", "FactorSign", "FactoredSign"]

POSITIVE, NEGATIVE, NONNEGATIVE, NONPOSITIVE, ZERO, UNKNOWN = (
    "positive", "negative", "nonnegative", "nonpositive", "zero", "unknown")

_NEG = {POSITIVE: NEGATIVE, NEGATIVE: POSITIVE, NONNEGATIVE: NONPOSITIVE,
        NONPOSITIVE: NONNEGATIVE, ZERO: ZERO, UNKNOWN: UNKNOWN}


def _mul_sign(s, t):
    if ZERO in (s, t):
        return ZERO
    if UNKNOWN in (s, t):
        return UNKNOWN
    neg = (s in (NEGATIVE, NONPOSITIVE)) != (t in (NEGATIVE, NONPOSITIVE))
    strict = s in (POSITIVE, NEGATIVE) and t in (POSITIVE, NEGATIVE)
    if strict:
        return NEGATIVE if neg else POSITIVE
    return NONPOSITIVE if neg else NONNEGATIVE


@dataclass(frozen=True)
class FactorSign:
    """One factor of a factored rational function with its proven sign."""

    expr: sympy.Expr
    multiplicity: int
    in_denominator: bool
    sign: str


@dataclass(frozen=True)
class FactoredSign:
    """A rational function as ``constant * prod(factor**m)`` with signs.

    Attributes
    ----------
    constant : sympy.Rational
    factors : tuple of FactorSign
    sign : str
        The proven sign of the whole, or ``"unknown"``.
    """

    constant: sympy.Rational
    factors: tuple
    sign: str

    @property
    def undecided(self) -> tuple:
        """The factors whose sign decides the whole (odd multiplicity, unknown)."""
        return tuple(f for f in self.factors if f.sign == UNKNOWN and f.multiplicity % 2)

    def as_expr(self) -> sympy.Expr:
        """``constant * prod`` in one Mul, known-sign factors first."""
        num, den = [], []
        for f in self.factors:
            (den if f.in_denominator else num).append(f.expr ** f.multiplicity)
        out = sympy.Mul(self.constant, *num, evaluate=True)
        if den:
            out = out / sympy.Mul(*den)
        return out

    def sign_part(self) -> sympy.Expr:
        """Product of the undecided factors, times the sign of the rest."""
        rest = _sign_value(self.constant)
        for f in self.factors:
            if f.sign == UNKNOWN:
                continue
            rest *= _sign_value_str(f.sign) ** f.multiplicity
        und = [f.expr for f in self.undecided]
        return sympy.Mul(rest, *und)


def _sign_value(c):
    return 1 if c > 0 else -1 if c < 0 else 0


def _sign_value_str(s):
    return {POSITIVE: 1, NEGATIVE: -1, NONNEGATIVE: 1, NONPOSITIVE: -1}.get(s, 1)


@dataclass
class SignContext:
    """What is known about the signs of the symbols.

    Parameters
    ----------
    assumptions : dict
        symbol -> ``"positive" | "nonnegative" | "negative" | "nonzero" | "real"``.
    side_conditions : list of sympy.Expr
        Expressions known to be positive on the admissible set.
    """

    assumptions: dict
    side_conditions: list = field(default_factory=list)

    def with_conditions(self, conditions) -> "SignContext":
        return SignContext(dict(self.assumptions), list(self.side_conditions) + list(conditions))

    # -- polynomials ----------------------------------------------------------------
    def polynomial_sign(self, expr) -> str:
        """Sign of a polynomial expression in the symbols (``unknown`` if not proved)."""
        expr = sympy.expand(expr)
        if expr.is_Number:
            return POSITIVE if expr > 0 else NEGATIVE if expr < 0 else ZERO
        s = self._plain_sign(expr)
        if s != UNKNOWN:
            return s
        return self._sign_with_conditions(expr)

    def _plain_sign(self, expr) -> str:
        flips = {}
        for sym in expr.free_symbols:
            a = self.assumptions.get(sym, "real")
            if a in ("negative", "nonpositive"):
                flips[sym] = -sym
            elif a not in ("positive", "nonnegative"):
                return _square_sign(expr)
        if flips:
            expr = sympy.expand(expr.xreplace(flips))
        gens = sorted(expr.free_symbols, key=sympy.default_sort_key)
        if not gens:
            return POSITIVE if expr > 0 else NEGATIVE if expr < 0 else ZERO
        terms = sympy.Poly(expr, *gens).terms()
        signs = {c > 0 for _, c in terms}
        if len(signs) != 1:
            return UNKNOWN
        positive = signs.pop()
        strict = all(self.assumptions.get(s) in ("positive", "negative") for s in gens) or \
            any(all(e == 0 for e in m) for m, _ in terms)
        if strict:
            return POSITIVE if positive else NEGATIVE
        return NONNEGATIVE if positive else NONPOSITIVE

    def _sign_with_conditions(self, expr) -> str:
        subs_list = [s for s in (self._linear_substitution(c) for c in self.side_conditions) if s]
        for r in (1, 2):
            for combo in combinations(subs_list, r):
                e = expr
                used = set()
                ok = True
                for var, repl, t in combo:
                    if var in used:
                        ok = False
                        break
                    used.add(var)
                    e = e.xreplace({var: repl})
                if not ok:
                    continue
                e = sympy.expand(e)
                extra = {t: "positive" for _, _, t in combo}
                ctx = SignContext({**self.assumptions, **extra})
                num, den = sympy.fraction(sympy.together(e))
                s = _mul_sign(ctx._plain_sign(sympy.expand(num)), ctx._plain_sign(sympy.expand(den)))
                if s != UNKNOWN:
                    return s
        return UNKNOWN

    def _linear_substitution(self, cond):
        """For ``cond > 0`` linear in some positive symbol with a constant
        coefficient: ``(symbol, replacement, t)`` meaning symbol = (t - rest)/c."""
        cond = sympy.expand(cond)
        for sym in sorted(cond.free_symbols, key=sympy.default_sort_key):
            poly = sympy.Poly(cond, sym)
            if poly.degree() != 1:
                continue
            c = poly.coeff_monomial(sym)
            if not c.is_Number:
                continue
            rest = sympy.expand(cond - c * sym)
            t = sympy.Dummy(f"t_{sym}", positive=True)
            return sym, (t - rest) / c, t
        return None

    # -- rational functions -----------------------------------------------------------------
    def factored(self, expr) -> FactoredSign:
        """Factor a rational function and decide the sign of each factor."""
        num, den = sympy.fraction(sympy.together(expr))
        cn, fn = sympy.factor_list(num)
        cd, fd = sympy.factor_list(den)
        return self._assemble(cn / cd, [(f, m, False) for f, m in fn] + [(f, m, True) for f, m in fd])

    def from_factors(self, constant, factors) -> FactoredSign:
        """Like :meth:`factored` for a factorisation already at hand:
        ``factors`` is a list of ``(expr, multiplicity, in_denominator)``."""
        return self._assemble(constant, factors)

    def _assemble(self, constant, factors) -> FactoredSign:
        out = []
        total = POSITIVE if constant > 0 else NEGATIVE if constant < 0 else ZERO
        for f, m, in_den in factors:
            s = self.polynomial_sign(f)
            if s == UNKNOWN and m % 2 == 0:
                s = NONNEGATIVE
            fs = s
            if s in (NEGATIVE, NONPOSITIVE):
                # keep factors positive on display: flip the sign into the constant
                f, constant = sympy.expand(-f), constant * (-1) ** m
                fs = _NEG[s]
            out.append(FactorSign(f, m, in_den, fs))
            total = _mul_sign(total, s if m % 2 else (POSITIVE if s != ZERO else ZERO))
        out.sort(key=lambda f: (f.sign == UNKNOWN, f.in_denominator, sympy.count_ops(f.expr)))
        return FactoredSign(sympy.Rational(constant), tuple(out), total)

    def sign(self, expr) -> str:
        return self.factored(expr).sign


def _square_sign(expr) -> str:
    """Nonnegative when the polynomial is a constant times a perfect square."""
    c, factors = sympy.factor_list(expr)
    if factors and all(m % 2 == 0 for _, m in factors):
        return NONNEGATIVE if c > 0 else NONPOSITIVE
    return UNKNOWN

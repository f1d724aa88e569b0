"""Deciding signs of rational functions of the parameters.

Pipeline place: used by the critical set (is omega^2 > 0? is the critical
value admissible?), by the criticality condition (the sign of l1) and by the
choice of equilibrium branches.

A polynomial is proved positive when, after replacing negative parameters by
their opposites, every parameter it contains is positive (or nonnegative with a
non-zero constant term) and every coefficient has the same sign.  Where that
fails, the admissibility conditions of the Hopf set are used the way one does
by hand: a condition ``sigma - b - 1 > 0`` that is linear in ``sigma`` becomes
the substitution ``sigma = b + 1 + t`` with ``t > 0``, after which a factor
often is a sum of positive terms.  Nothing is guessed: what cannot be proved
is reported as ``"undecided"`` (:attr:`criticality.kinds.Sign.UNDECIDED`).

All polynomial work is done with python-flint in one context over every known
symbol (plus two slack variables for the substitutions).
"""

from __future__ import annotations

from dataclasses import dataclass
from itertools import combinations
from typing import Any, Iterable, Mapping

import flint
import sympy

from ..budget import checkpoint
from ..kinds import Sign

__all__ = ["POSITIVE", "NEGATIVE", "NONNEGATIVE", "NONPOSITIVE", "ZERO", "UNDECIDED",
           "SignContext", "FactorSign", "FactoredSign", "context_for", "truth"]

POSITIVE, NEGATIVE, NONNEGATIVE, NONPOSITIVE, ZERO, UNDECIDED = (
    Sign.POSITIVE, Sign.NEGATIVE, Sign.NONNEGATIVE, Sign.NONPOSITIVE, Sign.ZERO, Sign.UNDECIDED)
#: the former name of UNDECIDED (whose word was "unknown"), for code written against it
UNKNOWN = UNDECIDED

_NEG = {POSITIVE: NEGATIVE, NEGATIVE: POSITIVE, NONNEGATIVE: NONPOSITIVE,
        NONPOSITIVE: NONNEGATIVE, ZERO: ZERO, UNDECIDED: UNDECIDED}
_VALUE = {POSITIVE: 1, NEGATIVE: -1, NONNEGATIVE: 1, NONPOSITIVE: -1}
_SLACK = 2


def mul_sign(s: Sign, t: Sign) -> Sign:
    """Sign of a product from the signs of the factors."""
    if ZERO in (s, t):
        return ZERO
    if UNDECIDED in (s, t):
        return UNDECIDED
    neg = (s in (NEGATIVE, NONPOSITIVE)) != (t in (NEGATIVE, NONPOSITIVE))
    if s in (POSITIVE, NEGATIVE) and t in (POSITIVE, NEGATIVE):
        return NEGATIVE if neg else POSITIVE
    return NONPOSITIVE if neg else NONNEGATIVE


@dataclass(frozen=True)
class FactorSign:
    """One factor of a factored rational function with its proven sign."""

    expr: sympy.Expr
    multiplicity: int
    in_denominator: bool
    sign: Sign


@dataclass(frozen=True)
class FactoredSign:
    """A rational function as ``constant * prod(factor**m)`` with signs.

    Factors proved negative are stored negated (the constant absorbs the
    sign), so every displayed factor is positive, nonnegative or undecided.
    """

    constant: sympy.Rational
    factors: tuple
    sign: Sign

    @property
    def undecided(self) -> tuple:
        """The factors whose sign decides the whole (odd multiplicity, unknown)."""
        return tuple(f for f in self.factors if f.sign == UNDECIDED and f.multiplicity % 2)

    def as_expr(self) -> sympy.Expr:
        """``constant * prod`` built in one go, known-sign factors first."""
        num = [f.expr ** f.multiplicity for f in self.factors if not f.in_denominator]
        den = [f.expr ** -f.multiplicity for f in self.factors if f.in_denominator]
        # One Mul, so that the constant is never distributed over a sum:
        # -(A^2 + 2)/(2 A (2 A^2 + 1)), not (-A^2/2 - 1)/(A (2 A^2 + 1)).  sympy
        # distributes a number over a lone sum, so that case stays unevaluated.
        if len(num) == 1 and not den and num[0].is_Add and self.constant != 1:
            return sympy.Mul(self.constant, num[0], evaluate=False)
        return sympy.Mul(self.constant, *num, *den)

    def sign_part(self) -> tuple:
        """``(s, P)``: the sign of the whole is ``s * sign(P)``, with ``P`` the
        product of the undecided factors and ``s`` = +1 or -1."""
        rest = 1 if self.constant > 0 else -1
        for f in self.factors:
            if f.sign != UNDECIDED:
                rest *= _VALUE.get(f.sign, 1) ** f.multiplicity
        return rest, sympy.Mul(*[f.expr for f in self.undecided])


class SignContext:
    """What is known about the signs of the symbols.

    Parameters
    ----------
    assumptions : dict
        symbol -> ``"positive" | "nonnegative" | "negative" | "nonzero" | "real"``.
    side_conditions : sequence of sympy.Expr
        Polynomials known to be positive on the admissible set.
    """

    def __init__(self, assumptions: Mapping[sympy.Symbol, str],
                 side_conditions: Iterable[sympy.Expr] = ()) -> None:
        self.assumptions = dict(assumptions)
        self.side_conditions = tuple(side_conditions)
        self._symbols = sorted(self.assumptions, key=sympy.default_sort_key)
        self._index = {s: i for i, s in enumerate(self._symbols)}
        n = len(self._symbols)
        names = tuple(f"v{i}" for i in range(n)) + tuple(f"t{i}" for i in range(_SLACK))
        self.ctx = flint.fmpq_mpoly_ctx.get(names, "degrevlex")
        self._kinds = [self.assumptions[s] for s in self._symbols] + ["positive"] * _SLACK
        self._subs = None
        self._sides = None
        self._flint_signs: dict = {}

    def with_conditions(self, conditions: Iterable[sympy.Expr]) -> "SignContext":
        return SignContext(self.assumptions, self.side_conditions + tuple(conditions))

    # -- conversion ------------------------------------------------------------------
    def _poly_from_sympy(self, expr):
        syms = sorted(expr.free_symbols, key=sympy.default_sort_key)
        if any(s not in self._index for s in syms):
            return None
        n = self.ctx.nvars()
        if not syms:
            return self.ctx.from_dict({(0,) * n: flint.fmpq(int(expr.p), int(expr.q))}) \
                if expr.is_Rational else None
        try:
            poly = sympy.Poly(expr, *syms, domain="QQ")
        except (sympy.PolynomialError, sympy.CoercionFailed):
            # coefficients outside QQ (a side condition with sqrt(5) in it): no polynomial
            # over the field's ring, so the sign is left to the other tests
            return None
        idx = [self._index[s] for s in syms]
        data = {}
        for monom, c in poly.terms():
            e = [0] * n
            for i, k in zip(idx, monom):
                e[i] = k
            data[tuple(e)] = flint.fmpq(int(c.p), int(c.q))
        return self.ctx.from_dict(data)

    def poly_from_flint(self, poly: Any, field_symbols: Any) -> Any:
        """Embed an ``fmpz_mpoly`` over ``field_symbols`` (None if a symbol is unknown)."""
        try:
            idx = [self._index[s] for s in field_symbols]
        except KeyError:
            return None
        n = self.ctx.nvars()
        data = {}
        for monom, c in poly.to_dict().items():
            e = [0] * n
            for i, k in zip(idx, monom):
                e[i] = k
            data[tuple(e)] = flint.fmpq(int(c))
        return self.ctx.from_dict(data)

    # -- polynomial signs ----------------------------------------------------------------
    def polynomial_sign(self, poly: Any) -> Sign:
        """Sign of a polynomial (sympy expression or embedded flint polynomial)."""
        if isinstance(poly, sympy.Basic):
            poly = self._poly_from_sympy(sympy.expand(poly))
            if poly is None:
                return UNDECIDED
        s = self._plain_sign(poly)
        if s != UNDECIDED:
            return s
        s = self._side_condition_multiple(poly)
        return s if s != UNDECIDED else self._sign_with_conditions(poly)

    def _plain_sign(self, p) -> Sign:
        if p.is_zero():
            return ZERO
        degrees = p.degrees()
        used = [i for i, d in enumerate(degrees) if d > 0]
        if not used:
            c = p.coeffs()[0]
            return POSITIVE if c > 0 else NEGATIVE
        gens = list(self.ctx.gens())
        flip, strict_vars = False, True
        for i in used:
            kind = self._kinds[i]
            if kind in ("negative", "nonpositive"):
                gens[i] = -gens[i]
                flip = True
            elif kind not in ("positive", "nonnegative"):
                # a real symbol that occurs only to even powers acts as a nonnegative one
                if any(m[i] % 2 for m in p.monoms()):
                    return _square_sign(p)
                strict_vars = strict_vars and kind == "nonzero"
                continue
            strict_vars = strict_vars and kind in ("positive", "negative")
        if flip:
            p = p.compose(*gens)
        coeffs = p.coeffs()
        positive = coeffs[0] > 0
        if any((c > 0) != positive for c in coeffs):
            return UNDECIDED
        if strict_vars or _has_constant(p):
            return POSITIVE if positive else NEGATIVE
        return NONNEGATIVE if positive else NONPOSITIVE

    def _side_polys(self):
        if self._sides is None:
            polys = (self._poly_from_sympy(sympy.expand(c)) for c in self.side_conditions)
            self._sides = [p for p in polys if p is not None and not p.is_zero()]
        return self._sides

    def _side_condition_multiple(self, p) -> Sign:
        """``p`` is a constant multiple of a polynomial known to be positive."""
        for g in self._side_polys():
            lp, lg = p.coeffs()[0], g.coeffs()[0]
            if p * lg == g * lp:
                return POSITIVE if lp / lg > 0 else NEGATIVE
        return UNDECIDED

    def _substitutions(self):
        """``(var index, rest, c)`` for side conditions ``c v + rest > 0`` linear
        in ``v``, with ``c`` of proven strict sign and free of ``v``."""
        if self._subs is None:
            subs = []
            for p in self._side_polys():
                for i in range(len(self._symbols)):
                    if p.degrees()[i] != 1:
                        continue
                    c, rest = _linear_split(self.ctx, p, i)
                    if c is None or self._plain_sign(c) not in (POSITIVE, NEGATIVE):
                        continue
                    subs.append((i, rest, c, p))
            self._subs = subs
        return self._subs

    def _sign_with_conditions(self, p) -> Sign:
        """Substitute ``v = (t - rest)/c`` (``t > 0``) from one or two side
        conditions and try the plain test again on ``c^d p``."""
        subs = self._substitutions()
        gens = self.ctx.gens()
        n = len(self._symbols)
        for r in (1, 2):
            for combo in combinations(subs, r):
                if r == 2 and (combo[0][0] == combo[1][0] or combo[1][3].degrees()[combo[0][0]]
                               or combo[0][3].degrees()[combo[1][0]]):
                    continue
                q, sign = p, 1
                for k, (i, rest, c, _) in enumerate(combo):
                    q, d = _substitute_linear(q, i, gens[n + k] - rest, c)
                    if d % 2 and self._plain_sign(c) == NEGATIVE:
                        sign = -sign
                s = self._plain_sign(q)
                if s != UNDECIDED:
                    return s if sign == 1 else _NEG[s]
        return UNDECIDED

    # -- rational functions ----------------------------------------------------------------
    def sign(self, expr: sympy.Expr) -> Sign:
        """Sign of a sympy rational function of the known symbols."""
        return self.factored(expr).sign

    def factored(self, expr: sympy.Expr) -> FactoredSign:
        """Factor a sympy rational function (with flint) and decide each factor."""
        from .flint_field import FlintRationalFunctionField

        expr = sympy.together(expr)
        if not _plain_rational(expr):  # radicals, constants such as pi, functions
            s = self.structural_sign(expr)
            return FactoredSign(sympy.Integer(1), (FactorSign(expr, 1, False, s),), s)
        syms = sorted(expr.free_symbols, key=sympy.default_sort_key)
        if not syms:
            return self.assemble(sympy.Rational(expr), [])
        K = FlintRationalFunctionField(syms)
        x = K.from_sympy(expr)
        return self.from_flint(K, x.num, x.den)

    def structural_sign(self, expr: sympy.Expr) -> Sign:
        """Sign of an expression that is not a rational function (radicals,
        powers with symbolic exponents, constants such as ``pi`` or
        ``sin(1)``, ``exp``), from its structure: products and powers of
        terms of known sign, sums of terms of one sign; UNKNOWN otherwise."""
        if _plain_rational(expr):
            return self.factored(expr).sign
        if expr.is_number:
            return _number_sign(expr)
        if expr.is_Mul:
            out = POSITIVE
            for a in expr.args:
                out = mul_sign(out, self.structural_sign(a))
            return out
        if expr.is_Add:
            return _sum_sign([self.structural_sign(a) for a in expr.args])
        if isinstance(expr, sympy.exp):
            return POSITIVE
        if expr.is_Pow:
            return _power_sign(self.structural_sign(expr.base), expr.exp)
        return UNKNOWN

    def from_flint(self, K: Any, num: Any, den: Any) -> FactoredSign:
        """Factored sign of ``num/den`` (``fmpz_mpoly`` of the field ``K``)."""
        cn, fn = num.factor()
        cd, fd = den.factor()
        items = [(f, int(m), False) for f, m in fn] + [(f, int(m), True) for f, m in fd]
        constant = sympy.Rational(int(cn), int(cd))
        decided = []
        for f, m, in_den in items:
            checkpoint()
            key = (K.symbols, str(f))
            s = self._flint_signs.get(key)
            if s is None:
                emb = self.poly_from_flint(f, K.symbols)
                s = self._flint_signs[key] = self.polynomial_sign(emb) if emb is not None \
                    else UNDECIDED
            # Orient the factor here, on the flint polynomial: negating a large
            # sympy Add (as assemble would) costs a full re-flattening.
            if s in (NEGATIVE, NONPOSITIVE) or (s == UNDECIDED and _leading_negative(K, f)):
                f, constant, s = -f, constant * (-1) ** m, _NEG.get(s, s)
            decided.append((K.poly_to_sympy(f), m, in_den, s))
        return self.assemble(constant, decided, oriented=True)

    def assemble(self, constant: Any, decided: Any, *, oriented: bool = False) -> FactoredSign:
        """Combine ``(expr, multiplicity, in_denominator, sign)`` factors.

        With ``oriented=True`` the factors are already non-negative where
        their sign is known (and printed with a leading + otherwise)."""
        out = []
        total = POSITIVE if constant > 0 else NEGATIVE if constant < 0 else ZERO
        for f, m, in_den, s in decided:
            if m % 2:
                total = mul_sign(total, s)
            else:
                total = mul_sign(total, ZERO if s == ZERO else
                                 POSITIVE if s in (POSITIVE, NEGATIVE) else NONNEGATIVE)
                # an even power of a factor of unknown sign stays marked unknown
                # (its square root is not the factor itself)
            if oriented:
                pass
            elif s in (NEGATIVE, NONPOSITIVE):
                f, constant, s = -f, constant * (-1) ** m, _NEG[s]
            elif s == UNDECIDED and f.could_extract_minus_sign():
                f, constant = -f, constant * (-1) ** m  # print with a leading +
            out.append(FactorSign(f, m, in_den, s))
        out.sort(key=lambda f: (f.sign == UNDECIDED, f.in_denominator, len(f.expr.args)))
        return FactoredSign(sympy.Rational(constant), tuple(out), total)


def _plain_rational(expr: sympy.Expr) -> bool:
    """True for a rational function with rational coefficients (what the
    flint route factors)."""
    if expr.is_Rational or expr.is_Symbol:
        return True
    if expr.is_Add or expr.is_Mul:
        return all(_plain_rational(a) for a in expr.args)
    if expr.is_Pow:
        return expr.exp.is_Integer and _plain_rational(expr.base)
    return False


def _number_sign(expr: sympy.Expr) -> Sign:
    """Sign of a constant (sympy's certified numeric evaluation)."""
    try:
        if expr.is_zero:
            return ZERO
        if expr.is_extended_positive:
            return POSITIVE
        if expr.is_extended_negative:
            return NEGATIVE
    except (TypeError, ValueError, ArithmeticError, RecursionError):
        pass
    return UNKNOWN


def _sum_sign(signs: list) -> Sign:
    if all(s in (POSITIVE, NONNEGATIVE, ZERO) for s in signs):
        return POSITIVE if POSITIVE in signs else NONNEGATIVE if NONNEGATIVE in signs else ZERO
    if all(s in (NEGATIVE, NONPOSITIVE, ZERO) for s in signs):
        return NEGATIVE if NEGATIVE in signs else NONPOSITIVE if NONPOSITIVE in signs else ZERO
    return UNKNOWN


def _power_sign(base: Sign, exponent: sympy.Expr) -> Sign:
    """Sign of ``base**exponent`` from the sign of a real base."""
    if exponent.is_Integer:
        if base == UNKNOWN or (base == ZERO and exponent < 0):
            return UNKNOWN
        if exponent % 2 == 0:
            return ZERO if base == ZERO else POSITIVE if base in (POSITIVE, NEGATIVE) \
                else NONNEGATIVE
        return base
    if base == POSITIVE:
        return POSITIVE
    if base in (NONNEGATIVE, ZERO) and exponent.is_Rational and exponent > 0:
        return NONNEGATIVE
    return UNKNOWN


def context_for(parameters: Iterable[sympy.Symbol], assumptions: Mapping[sympy.Symbol, str],
                atoms: Iterable = ()) -> SignContext:
    """The sign context of a parameter field: declared assumptions for the
    parameters, and positivity for atoms such as ``exp(...)``."""
    known = {s: assumptions.get(s, "real") for s in parameters}
    for atom in atoms:
        known[atom.symbol] = "positive" if atom.positive else "real"
    return SignContext(known)


def truth(sign: Sign) -> bool | None:
    """``True`` for a proven positive sign, ``False`` for a proven negative one,
    else None."""
    return {POSITIVE: True, NEGATIVE: False}.get(sign)


def _leading_negative(K, p) -> bool:
    """Whether the polynomial's first term in sympy's printing order (highest
    total degree, then lexicographic in the sorted symbols) is negative."""
    terms = p.to_dict()
    if not terms:
        return False
    lead = max(terms, key=lambda mon: (sum(mon), mon))
    return int(terms[lead]) < 0


def _has_constant(p) -> bool:
    zero = (0,) * p.context().nvars()
    return zero in p.to_dict()


def _linear_split(ctx, p, i):
    """``(c, rest)`` with ``p = c * v_i + rest`` and neither containing ``v_i``."""
    c, rest = {}, {}
    for monom, coeff in p.to_dict().items():
        if monom[i] == 1:
            c[monom[:i] + (0,) + monom[i + 1:]] = coeff
        elif monom[i] == 0:
            rest[monom] = coeff
        else:
            return None, None
    return ctx.from_dict(c), ctx.from_dict(rest)


def _substitute_linear(p, i, numerator, c):
    """``(c^d p(v_i = numerator / c), d)`` with d the degree of p in ``v_i``."""
    ctx = p.context()
    d = p.degrees()[i]
    if d == 0:
        return p, 0
    buckets: dict = {}
    for monom, coeff in p.to_dict().items():
        k = monom[i]
        buckets.setdefault(k, {})[monom[:i] + (0,) + monom[i + 1:]] = coeff
    out = ctx.from_dict({})
    for k, data in buckets.items():
        out += ctx.from_dict(data) * numerator ** k * c ** (d - k)
    return out, d


def _square_sign(p) -> Sign:
    """Nonnegative (nonpositive) when the polynomial is a constant times a square."""
    content, factors = p.factor()
    if factors and all(int(m) % 2 == 0 for _, m in factors):
        return NONNEGATIVE if content > 0 else NONPOSITIVE
    return UNDECIDED

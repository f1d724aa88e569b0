"""Polynomial questions about elements of the parameter field.

Pipeline place: used by the critical set (:mod:`criticality.local.critical`),
which asks them without seeing a field's representation: the factors of a
numerator as polynomials in one generator, the degrees of a factor, the
resultant that detects two roots summing to zero, and a value at an integer
point.  Each function works on the python-flint field (fast paths with
``fmpz_mpoly``) and on the pure-sympy stand-in.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any, Callable, Sequence

import flint
import sympy

from .field import Element
from .flint_field import FlintRationalField, FlintRationalFunctionField

__all__ = ["NumeratorFactor", "numerator_factors", "pair_resultant", "value_at",
           "rational_evaluator", "resultant_factors", "MAX_RESULTANT_TERMS"]

#: polynomials above this many terms are not eliminated by :func:`resultant_factors`
MAX_RESULTANT_TERMS = 400


class NumeratorFactor:
    """One irreducible factor of a numerator, seen as a polynomial in a generator.

    Attributes
    ----------
    coefficients : list
        Field elements, lowest degree first (``len - 1`` is the degree).
    degrees : dict
        Generator symbol -> degree of the factor in it.
    """

    __slots__ = ("coefficients", "degrees", "_expr")

    def __init__(self, coefficients: Any, degrees: Any, expr: Any) -> None:
        self.coefficients = coefficients
        self.degrees = degrees
        self._expr = expr

    def expr(self) -> sympy.Expr:
        """The factor as a sympy expression (built on demand)."""
        return self._expr()


def numerator_factors(K: Any, x: Element, symbol: sympy.Symbol) -> list:
    """The irreducible factors of the numerator of ``x`` (an element of ``K``)
    as polynomials in ``symbol``."""
    x = K(x)
    out = []
    if isinstance(K, FlintRationalFunctionField):
        one = K.one
        for poly, _m in x.num.factor()[1]:
            coeffs = K.coefficients_in(poly, symbol)
            deg = max(coeffs)
            c = [K.from_polynomials(coeffs[k], one.num) if k in coeffs else K.zero
                 for k in range(deg + 1)]
            degrees = dict(zip(K.symbols, poly.degrees()))
            out.append(NumeratorFactor(c, degrees, lambda poly=poly: K.poly_to_sympy(poly)))
        return out
    num, _ = sympy.fraction(sympy.together(K.to_sympy(x)))
    for f, _m in sympy.factor_list(num)[1]:
        p = sympy.Poly(f, symbol)
        c = [K.from_sympy(a) for a in reversed(p.all_coeffs())]
        degrees = {s: sympy.degree(f, s) for s in K.symbols}
        out.append(NumeratorFactor(c, degrees, lambda f=f: f))
    return out


def pair_resultant(K: Any, coeffs: Sequence[Element]) -> Element | None:
    """``Res_s(E, O)`` for ``f(l) = E(l^2) + l O(l^2)`` with coefficients in
    ``K``, by python-flint's multivariate resultant; None on a field without
    that fast path (the caller uses the Hurwitz determinant)."""
    if not isinstance(K, FlintRationalFunctionField):
        return None
    coeffs = [K(c) for c in coeffs]
    den = K.one.num
    for c in coeffs:
        den = den * (c.den / den.gcd(c.den))
    polys = [c.num * (den / c.den) for c in coeffs]
    names = tuple(str(x) for x in K.symbols) + ("s_",)
    ctx = flint.fmpz_mpoly_ctx.get(names, "degrevlex")
    nv = len(K.symbols)

    def lift(part):
        data = {}
        for k, p in enumerate(part):
            for monom, v in p.to_dict().items():
                data[tuple(monom) + (k,)] = v
        return ctx.from_dict(data)

    E, O = lift(polys[0::2]), lift(polys[1::2])
    if O.is_zero():
        return K.zero
    R = E.resultant(O, "s_")
    data = {tuple(m[:nv]): v for m, v in R.to_dict().items()}
    return K.from_polynomials(K.ctx.from_dict(data), K.one.num) if data else K.zero


def value_at(K: Any, x: Element, point: Sequence[int]) -> Element | None:
    """``x`` at integer values of the generators (in ``K.symbols`` order), as
    an element of QQ on the same backend; ``ZeroDivisionError`` at a pole;
    None where the field cannot evaluate cheaply."""
    if isinstance(K, FlintRationalFunctionField):
        x = K(x)
        return FlintRationalField()(Fraction(int(x.num(*point)), 1)) / \
            FlintRationalField()(Fraction(int(x.den(*point)), 1))
    return None


def rational_evaluator(K: Any, elements: Sequence[Element]
                       ) -> Callable[[Sequence[Fraction]], list[Fraction]] | None:
    """A function from rational values of the generators (in ``K.symbols``
    order) to the values of ``elements`` there, for many points: each element
    is converted once, each point is then evaluated in C.  It raises
    ``ZeroDivisionError`` at a pole.  None where the field cannot evaluate
    cheaply (the sympy stand-in, elements of an extension).

    Examples
    --------
    >>> a, b = sympy.symbols("a b")
    >>> K = FlintRationalFunctionField([a, b])
    >>> at = rational_evaluator(K, [K.from_sympy(a / b + 1)])
    >>> at([Fraction(1, 2), Fraction(3)])
    [Fraction(7, 6)]
    """
    if not isinstance(K, FlintRationalFunctionField) or not K.symbols:
        return None
    try:
        xs = [K(x) for x in elements]
    except (TypeError, ValueError):
        return None
    ctx = flint.fmpq_mpoly_ctx.get(tuple(str(s) for s in K.symbols), "degrevlex")
    pairs = [(ctx.from_dict(x.num.to_dict()), ctx.from_dict(x.den.to_dict())) for x in xs]

    def at(point: Sequence[Fraction]) -> list[Fraction]:
        values = [flint.fmpq(v.numerator, v.denominator) for v in point]
        out = []
        for num, den in pairs:
            d = den(*values)
            if d == 0:
                raise ZeroDivisionError("a pole of the element")
            q = num(*values) / d
            out.append(Fraction(int(q.p), int(q.q)))
        return out
    return at


def rational_field(K: Any) -> FlintRationalField | None:
    """QQ on the backend of ``K``."""
    return FlintRationalField() if isinstance(K, FlintRationalFunctionField) else None


def resultant_factors(p: sympy.Expr, q: sympy.Expr, symbol: sympy.Symbol) -> list | None:
    """The distinct irreducible factors of ``Res_symbol(num p, num q)``, as
    sympy expressions (python-flint's resultant and factorisation); None when
    a numerator is not a polynomial with rational coefficients or has more
    than :data:`MAX_RESULTANT_TERMS` terms.

    Examples
    --------
    >>> x, a, b = sympy.symbols("x a b")
    >>> resultant_factors(b - 1 - x**2, a - x, x)
    [a**2 - b + 1]
    """
    nums = [sympy.fraction(sympy.together(e))[0] for e in (p, q)]
    symbols = sorted(set().union(*(e.free_symbols for e in nums)) | {symbol},
                     key=sympy.default_sort_key)
    try:
        polys = [sympy.Poly(e, *symbols, domain="QQ") for e in nums]
    except (sympy.PolynomialError, sympy.CoercionFailed):
        return None
    if any(len(f.terms()) > MAX_RESULTANT_TERMS for f in polys):
        return None
    ring = FlintRationalFunctionField(symbols).ring
    flints = [ring.from_sympy(f.clear_denoms()[1].as_expr()) for f in polys]
    R = flints[0].resultant(flints[1], str(symbol))
    if R.is_zero():
        return []
    return [ring.to_sympy(f) for f, _ in R.factor()[1]]

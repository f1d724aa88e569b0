"""The linear part: characteristic polynomial, its factors, Hurwitz determinants.

Pipeline place: Taylor forms -> **linear part** -> critical set.

The characteristic polynomial ``chi(lambda) = det(lambda I - A)`` is computed
by reduction to Hessenberg form and Hyman's recurrence (Cohen, A Course in
Computational Algebraic Number Theory, 1993, Algorithm 2.2.9): O(n^3) field
operations and no expanded determinant.  Over the flint parameter field it is
then factored in ``Z[lambda, parameters]``, so that the Hurwitz determinant is
built only for the factor that carries the critical pair.
"""

from __future__ import annotations

import flint
import sympy

from .algebra import upoly
from .algebra.flint_field import FlintRationalFunctionField
from .algebra.linalg import determinant
from .algebra.quadratic import QuadraticElement

__all__ = ["characteristic_polynomial", "hurwitz_matrix", "hurwitz_determinants",
           "hurwitz_determinant", "factor_univariate"]


def characteristic_polynomial(K, A):
    """Coefficients (lowest degree first, monic) of ``det(lambda I - A)``."""
    n = len(A)
    H = [list(r) for r in A]
    for m in range(1, n - 1):
        best, best_size = None, None
        for i in range(m, n):
            x = H[i][m - 1]
            if x:
                s = K.size(x)
                if best is None or s < best_size:
                    best, best_size = i, s
        if best is None:
            continue
        if best != m:
            H[best], H[m] = H[m], H[best]
            for row in H:
                row[best], row[m] = row[m], row[best]
        t_inv = 1 / H[m][m - 1]
        for i in range(m + 1, n):
            u = H[i][m - 1]
            if not u:
                continue
            u = u * t_inv
            hi, hm = H[i], H[m]
            for j in range(m - 1, n):
                if hm[j]:
                    hi[j] = hi[j] - u * hm[j]
            for row in H:
                if row[i]:
                    row[m] = row[m] + u * row[i]
    one, zero = K.one, K.zero
    p = [[one]]
    for m in range(1, n + 1):
        pm = upoly.mul([-H[m - 1][m - 1], one], p[m - 1]) if H[m - 1][m - 1] else [zero] + p[m - 1]
        t = one
        for i in range(1, m):
            t = t * H[m - i][m - i - 1]
            if not t:
                break
            c = H[m - i - 1][m - 1]
            if c:
                pm = upoly.sub(pm, upoly.scale(p[m - i - 1], t * c))
        p.append(upoly.trim(pm))
    return p[n]


def hurwitz_matrix(coeffs):
    """Hurwitz matrix of ``a0 x^m + a1 x^(m-1) + ... + am`` given as the
    coefficient list lowest degree first; entry (i, j) is ``a_(2j - i)``
    (1-based indices), zero outside 0..m."""
    m = len(coeffs) - 1
    a = list(reversed(coeffs))  # a[0] leading
    zero = coeffs[0] - coeffs[0]

    def entry(i, j):
        k = 2 * j - i
        return a[k] if 0 <= k <= m else zero

    return [[entry(i, j) for j in range(1, m + 1)] for i in range(1, m + 1)]


def hurwitz_determinant(K, coeffs, k: int):
    """``Delta_k``, the k-th leading principal minor of the Hurwitz matrix."""
    H = hurwitz_matrix(coeffs)
    return determinant(K, [row[:k] for row in H[:k]])


def hurwitz_determinants(K, coeffs):
    """``[Delta_1, ..., Delta_m]`` of a polynomial of degree m.

    Computed from Routh's array, whose first column holds the ratios
    ``Delta_k / Delta_(k-1)`` (Gantmacher, The Theory of Matrices, vol. 2,
    1959, Chapter XV): O(m^2) field operations instead of m determinants.
    Where a first-column entry vanishes the determinants are taken directly.
    """
    m = len(coeffs) - 1
    a = list(reversed(coeffs))
    if a[0] != 1:
        inv = 1 / a[0]
        a = [x * inv for x in a]
    zero = coeffs[0] - coeffs[0]
    prev, cur = a[0::2], a[1::2]
    out, acc = [], None
    for k in range(1, m + 1):
        pivot = cur[0] if cur else zero
        if not pivot:
            return out + [hurwitz_determinant(K, coeffs, j) for j in range(k, m + 1)]
        acc = pivot if acc is None else acc * pivot
        out.append(acc)
        inv = 1 / pivot
        nxt = [prev[j + 1] - prev[0] * inv * (cur[j + 1] if j + 1 < len(cur) else zero)
               for j in range(len(prev) - 1)]
        prev, cur = cur, nxt
    return out


def _in_base(x) -> bool:
    return not isinstance(x, QuadraticElement) or (not x.b and _in_base(x.a))


def _base_part(x):
    while isinstance(x, QuadraticElement):
        x = x.a
    return x


def factor_univariate(tower, coeffs):
    """Factor a polynomial in lambda with coefficients in the tower's base field.

    Returns a list of ``(factor_coeffs, multiplicity)``, each factor monic in
    lambda with coefficients in the base field.  Coefficients that involve
    radicals (or a sympy-backed field) are not factored: the polynomial is
    returned whole.
    """
    K = tower.base
    if not all(_in_base(c) for c in coeffs) or not isinstance(K, FlintRationalFunctionField):
        return _factor_with_sympy(tower, coeffs) if all(_in_base(c) for c in coeffs) \
            else [(list(coeffs), 1)]
    coeffs = [K(_base_part(c)) for c in coeffs]
    names = tuple(str(s) for s in K.symbols) + ("lambda_",)
    ctx = flint.fmpz_mpoly_ctx.get(names, "degrevlex")
    nv = len(K.symbols)
    den = K._one_poly
    for c in coeffs:
        g = den.gcd(c.den)
        den = den * (c.den / g)
    data = {}
    for k, c in enumerate(coeffs):
        num = c.num * (den / c.den)
        for monom, v in num.to_dict().items():
            data[tuple(monom) + (k,)] = v
    _, factors = ctx.from_dict(data).factor()
    out = []
    for f, mult in factors:
        by_power: dict = {}
        for monom, v in f.to_dict().items():
            by_power.setdefault(monom[nv], {})[tuple(monom[:nv])] = v
        deg = max(by_power)
        poly = [K.from_polynomials(K.ctx.from_dict(by_power[k]), K._one_poly)
                if k in by_power else K.zero for k in range(deg + 1)]
        if deg == 0:
            continue
        out.append((upoly.monic(poly), int(mult)))
    return out


def _factor_with_sympy(tower, coeffs):
    lam = sympy.Dummy("lambda")
    K = tower.base
    expr = sum((K.to_sympy(K(_base_part(c))) * lam ** k for k, c in enumerate(coeffs)), sympy.S.Zero)
    num, _ = sympy.fraction(sympy.together(expr))
    _, factors = sympy.factor_list(num, lam)
    out = []
    for f, mult in factors:
        p = sympy.Poly(f, lam)
        if p.degree() == 0:
            continue
        poly = [K.from_sympy(c) for c in reversed(p.all_coeffs())]
        out.append((upoly.monic(poly), int(mult)))
    return out

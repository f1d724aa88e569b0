"""The linear part: characteristic polynomial, its factors, Hurwitz determinants.

Pipeline place: Taylor forms -> **linear part** -> critical set.

The characteristic polynomial ``chi(lambda) = det(lambda I - A)``
(:func:`criticality.algebra.linalg.characteristic_polynomial`, Berkowitz's
division-free algorithm on integer polynomials) is factored in
``Z[lambda, parameters]`` through the polynomial-ring view of the field, so
that the Hurwitz determinant is built only for the factor that carries the
critical pair.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Sequence

from ..algebra import upoly
from ..algebra.field import clear_denominators
from ..algebra.linalg import determinant
from ..algebra.quadratic import QuadraticElement

if TYPE_CHECKING:
    from ..algebra import Tower
    from ..algebra.field import Element

__all__ = ["hurwitz_matrix", "hurwitz_determinants",
           "hurwitz_determinant", "factor_univariate"]


def hurwitz_matrix(coeffs: Sequence[Element]) -> list[list[Element]]:
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


def hurwitz_determinant(K: Any, coeffs: Sequence[Element], k: int) -> Element:
    """``Delta_k``, the k-th leading principal minor of the Hurwitz matrix."""
    H = hurwitz_matrix(coeffs)
    return determinant(K, [row[:k] for row in H[:k]])


def hurwitz_determinants(K: Any, coeffs: Sequence[Element]) -> list[Element]:
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
    out: list = []
    acc = None
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


def factor_univariate(tower: Tower, coeffs: Sequence[Element]) -> list:
    """Factor a polynomial in lambda with coefficients in the tower's base field.

    Returns a list of ``(factor_coeffs, multiplicity)``, each factor monic in
    lambda with coefficients in the base field, factored in
    ``Z[parameters, lambda]`` (the ring view of either backend).  Coefficients
    that involve radicals are not factored: the polynomial is returned whole.
    """
    K = tower.base
    if not all(_in_base(c) for c in coeffs):
        return [(list(coeffs), 1)]
    R = K.ring
    _, nums = clear_denominators(K, [_base_part(c) for c in coeffs])
    Rl = R.extend("lambda_")
    _, factors = Rl.factor(Rl.from_coefficients(nums))
    out = []
    for f, mult in factors:
        by_power = Rl.split(f)
        deg = max(by_power)
        if deg == 0:
            continue
        poly = [K.from_ring(by_power[k]) if k in by_power else K.zero for k in range(deg + 1)]
        out.append((upoly.monic(poly), int(mult)))
    return out

"""Dense univariate polynomials over a field: lists of coefficients, lowest
degree first, without trailing zeros (the zero polynomial is ``[]``)."""

from __future__ import annotations

from typing import Callable, Sequence

from .field import Element

#: a dense univariate polynomial: its coefficients, lowest degree first
UPoly = list[Element]
#: what the functions accept for one (any sequence of coefficients)
UPolyLike = Sequence[Element]

__all__ = ["trim", "degree", "add", "sub", "mul", "scale", "divmod_", "gcd", "monic",
           "evaluate", "derivative", "map_coeffs", "even_odd_parts"]


def trim(p: UPolyLike) -> UPoly:
    p = list(p)
    while p and not p[-1]:
        p.pop()
    return p


def degree(p: UPolyLike) -> int:
    return len(p) - 1


def add(p: UPolyLike, q: UPolyLike) -> UPoly:
    n = max(len(p), len(q))
    out = []
    for i in range(n):
        a = p[i] if i < len(p) else None
        b = q[i] if i < len(q) else None
        out.append(b if a is None else a if b is None else a + b)
    return trim(out)


def sub(p: UPolyLike, q: UPolyLike) -> UPoly:
    return add(p, [-c for c in q])


def scale(p: UPolyLike, c: Element) -> UPoly:
    return trim([a * c for a in p])


def mul(p: UPolyLike, q: UPolyLike) -> UPoly:
    if not p or not q:
        return []
    out = [None] * (len(p) + len(q) - 1)
    for i, a in enumerate(p):
        if not a:
            continue
        for j, b in enumerate(q):
            if not b:
                continue
            v = a * b
            out[i + j] = v if out[i + j] is None else out[i + j] + v
    zero = p[0] - p[0]
    return trim([zero if c is None else c for c in out])


def divmod_(p: UPolyLike, q: UPolyLike) -> tuple[UPoly, UPoly]:
    """Quotient and remainder of ``p`` by non-zero ``q``."""
    q = trim(q)
    if not q:
        raise ZeroDivisionError("polynomial division by zero")
    r = trim(p)
    if len(r) < len(q):
        return [], r
    inv = 1 / q[-1]
    quot = [None] * (len(r) - len(q) + 1)
    r = list(r)
    for k in range(len(r) - len(q), -1, -1):
        c = r[k + len(q) - 1] * inv
        quot[k] = c
        if c:
            for j, b in enumerate(q):
                if b:
                    r[k + j] = r[k + j] - c * b
    zero = q[0] - q[0]
    return trim([zero if c is None else c for c in quot]), trim(r[:len(q) - 1])


def monic(p: UPolyLike) -> UPoly:
    p = trim(p)
    if not p:
        return p
    inv = 1 / p[-1]
    return [c * inv for c in p]


def gcd(p: UPolyLike, q: UPolyLike) -> UPoly:
    """Monic gcd by Euclid's algorithm (fine for the small degrees here)."""
    a, b = trim(p), trim(q)
    while b:
        _, r = divmod_(a, b)
        a, b = b, r
    return monic(a)


def evaluate(p: UPolyLike, x: Element, zero: Element) -> Element:
    acc = zero
    for c in reversed(p):
        acc = acc * x + c
    return acc


def derivative(p: UPolyLike) -> UPoly:
    return trim([c * k for k, c in enumerate(p)][1:])


def map_coeffs(p: UPolyLike, fn: Callable[[Element], Element]) -> UPoly:
    return trim([fn(c) for c in p])


def even_odd_parts(p: UPolyLike) -> tuple[UPoly, UPoly]:
    """``p(x) = E(x**2) + x O(x**2)``: returns ``(E, O)``."""
    return trim(p[0::2]), trim(p[1::2])

"""Truncated bivariate series: the one module for series arithmetic.

A series is a dict ``{(a, b): c}`` of coefficients of ``u^a v^b`` (``u, v``
the two center coordinates, or ``z`` and ``conj z``) over any of the engine's
fields, truncated at a total degree given by the caller.  The center-manifold
reduction, the planar normal form and the n-dimensional normalization all
compute with these functions.
"""

from __future__ import annotations

from typing import Any, Container, Sequence

from ..budget import checkpoint

__all__ = ["mul", "compose", "compose_degree", "conjugate", "add_into", "derivative"]


def compose(K: Any, part: dict, polys: Sequence[dict], order: int, cache: dict) -> dict:
    """``P(u)`` for ``u_j = polys[j]`` (bivariate dicts ``{(a, b): c}``),
    truncated at total degree ``order``.  ``cache`` memoises powers of the
    ``polys`` between calls."""
    out: dict = {}
    for e, c in part.items():
        term = {(0, 0): c}
        for j, k in enumerate(e):
            if k:
                term = mul(term, _power(polys, j, k, order, cache), order)
        for m, v in term.items():
            out[m] = out[m] + v if m in out else v
    return out


def _power(polys, j, k, order, cache):
    key = (j, k)
    if key not in cache:
        cache[key] = polys[j] if k == 1 else mul(_power(polys, j, k - 1, order, cache),
                                                 polys[j], order)
    return cache[key]


def mul(p: dict, q: dict, order: int, exact: bool = False,
        keep: Container[tuple[int, int]] | None = None) -> dict:
    """Product of two bivariate dicts truncated at total degree ``order``.

    With ``exact`` only the terms of total degree ``order`` are formed, and
    ``keep`` (a set of exponent pairs) restricts them further: the wanted
    coefficients are computed without the rest of the product.
    """
    out: dict = {}
    for (a, b), c in p.items():
        for (d, e), f in q.items():
            deg = a + b + d + e
            if deg > order or (exact and deg < order):
                continue
            m = (a + d, b + e)
            if keep is not None and deg == order and m not in keep:
                continue
            v = c * f
            out[m] = out[m] + v if m in out else v
    return out


def conjugate(P: dict) -> dict:
    """The series of ``conj(P)`` in ``(z, conj z)``: exponents swapped,
    coefficients conjugated."""
    return {(l, j): c.conjugate() for (j, l), c in P.items()}


def add_into(out: dict, P: dict, sign: int = 1) -> None:
    """``out += sign * P`` in place."""
    for m, c in P.items():
        v = c if sign == 1 else -c
        out[m] = out[m] + v if m in out else v


def derivative(P: dict, var: int) -> dict:
    """``dP/dz`` (``var = 0``) or ``dP/d conj(z)`` (``var = 1``)."""
    out = {}
    for (j, l), c in P.items():
        k = j if var == 0 else l
        if k:
            out[(j - 1, l) if var == 0 else (j, l - 1)] = c * k
    return out


def compose_degree(G: dict, H: dict, Hb: dict, order: int,
                   keep: Container[tuple[int, int]] | None = None) -> dict:
    """The terms of total degree ``order`` of ``G(H, Hb)`` (only the monomials
    in ``keep``, if given).  ``H`` starts at degree one, so ``H^j`` is only
    needed up to degree ``order - l`` when it is to be multiplied by
    ``Hb^l``."""
    out: dict = {}
    cache: dict = {}

    def power(which, k, top):
        key = (which, k, top)
        if key not in cache:
            base = H if which == 0 else Hb
            cache[key] = {m: c for m, c in base.items() if sum(m) <= top} if k == 1 else \
                mul(power(which, k - 1, top - 1), base, top)
        return cache[key]

    for (j, l), c in G.items():
        if j + l > order:
            continue
        checkpoint()
        if j and l:
            term = mul(power(0, j, order - l), power(1, l, order - j), order, True, keep)
        else:
            term = power(0, j, order) if j else power(1, l, order)
            term = {m: v for m, v in term.items() if sum(m) == order
                    and (keep is None or m in keep)}
        add_into(out, {m: c * v for m, v in term.items()})
    return out

"""Taylor forms of the vector field at the equilibrium.

Pipeline place: equilibrium -> **Taylor forms** -> linear part, eigenbasis,
center manifold, normal form.

After the shift ``u = x - x0`` the field reads
``u' = A u + (1/2) B(u, u) + (1/6) C(u, u, u) + ...``.  The engine stores it as
one dictionary per component, ``{exponent tuple: coefficient}`` for the
monomials ``u**e`` of total degree 1..order, with coefficients in the tower of
fields.  Polynomial right-hand sides are shifted term by term (binomial
expansion in the field, one pass over ``Poly.terms()``); other analytic
right-hand sides are differentiated with sympy only where they are not
polynomial, and the derivatives evaluated at the equilibrium.

The multilinear forms ``B``, ``C``, ... are evaluated from the same
dictionaries by polarisation (:func:`multilinear`).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Callable, Iterator, Sequence

from dataclasses import dataclass
from itertools import permutations
from math import comb, factorial

import sympy

from ..errors import ComputationLimitError, NotAnalyticError

if TYPE_CHECKING:
    from ..algebra.field import Element

__all__ = ["RawTaylor", "TaylorForms", "raw_taylor", "multilinear"]


@dataclass(frozen=True)
class RawTaylor:
    """Sympy-level Taylor data, before conversion into the field.

    ``polynomial[i]`` is ``{exponent: coefficient}`` of component ``i`` in the
    original variables (to be shifted in the field) or None;
    ``shifted[i]`` is ``{exponent: coefficient}`` in ``u = x - x0`` (already
    evaluated at the equilibrium) for non-polynomial components, or None.
    """

    polynomial: tuple
    shifted: tuple
    order: int

    def map(self, fn: Callable[[sympy.Expr], sympy.Expr]) -> "RawTaylor":
        """Apply ``fn`` to every coefficient."""
        def apply(part):
            return tuple(None if d is None else {e: fn(c) for e, c in d.items()} for d in part)
        return RawTaylor(apply(self.polynomial), apply(self.shifted), self.order)

    def coefficients(self) -> Iterator[sympy.Expr]:
        """Every sympy coefficient (for discovering the field's generators)."""
        for part in (self.polynomial, self.shifted):
            for d in part:
                if d:
                    yield from d.values()


def raw_taylor(equations: Sequence[sympy.Expr], states: Sequence[sympy.Symbol],
               equilibrium: Sequence[sympy.Expr], order: int,
               names: Sequence[str] | None = None) -> RawTaylor:
    """Split each right-hand side into polynomial terms or shifted derivatives.

    Parameters
    ----------
    equations : sequence of sympy.Expr
    states : sequence of sympy.Symbol
    equilibrium : sequence of sympy.Expr
        ``x0``, aligned with ``states``.
    order : int
        Highest total degree kept.
    names : sequence of str, optional
        State names, for error messages.
    """
    names = names or [str(s) for s in states]
    polys: list = []
    shifted: list = []
    for i, f in enumerate(equations):
        _check_size(f, names[i])
        terms = _polynomial_terms(f, states)
        if terms is not None:
            polys.append(terms)
            shifted.append(None)
        else:
            polys.append(None)
            shifted.append(_shifted_derivatives(f, states, equilibrium, order, names[i]))
    return RawTaylor(tuple(polys), tuple(shifted), order)


#: most terms a right-hand side may expand to (a bound on the expanded
#: polynomial, computed before expanding it)
MAX_EXPANDED_TERMS = 5_000


def expanded_terms_bound(f: sympy.Expr) -> int:
    """An upper bound on the number of terms of ``expand(f)``: sums add,
    products multiply, ``g^e`` has at most ``C(t + e - 1, e)`` terms for a
    ``g`` of ``t`` terms (the number of monomials of degree ``e`` in ``t``
    variables; common practice, no source); other atoms count as one.
    Capped just above the limit, so that it stays cheap."""
    cap = MAX_EXPANDED_TERMS + 1
    if f.is_Add:
        return min(cap, sum(expanded_terms_bound(a) for a in f.args))
    if f.is_Mul:
        out = 1
        for a in f.args:
            out = min(cap, out * expanded_terms_bound(a))
        return out
    if f.is_Pow and f.exp.is_Integer and f.exp > 1:
        t, e = expanded_terms_bound(f.base), int(f.exp)
        if t == 1:
            return 1
        return cap if e >= cap else min(cap, comb(t + e - 1, e))
    return 1


def _check_size(f, name) -> None:
    size = expanded_terms_bound(f)
    if size > MAX_EXPANDED_TERMS:
        raise ComputationLimitError(
            f"the right-hand side for '{name}' would expand to more than {MAX_EXPANDED_TERMS} "
            "polynomial terms (a power of a sum, such as (x + y + 1)^200), beyond what the exact "
            "engine expands; write the model in a smaller form, fix parameters (values={...}), "
            "or use the numeric mode (guess={...})")


def _polynomial_terms(f, states):
    if not f.has(*states):
        return {(0,) * len(states): f} if f != 0 else {}
    try:
        poly = sympy.Poly(f, *states)
    except sympy.PolynomialError:
        return None
    if any(c.has(*states) for c in poly.coeffs()):
        return None
    return dict(poly.terms())


def _shifted_derivatives(f, states, equilibrium, order, name):
    """``{alpha: d^alpha f(x0) / alpha!}`` for ``|alpha| <= order``."""
    n = len(states)
    at = dict(zip(states, equilibrium))
    out = {}
    value = f.xreplace(at)
    _check_finite(value, name, "value")
    out[(0,) * n] = value
    frontier = [((0,) * n, f, 0)]  # (alpha, derivative, last index)
    for _ in range(order):
        nxt = []
        for alpha, g, last in frontier:
            for j in range(last, n):
                if not g.has(states[j]):
                    continue
                dg = sympy.diff(g, states[j])
                if dg == 0:
                    continue
                beta = alpha[:j] + (alpha[j] + 1,) + alpha[j + 1:]
                denom = 1
                for b in beta:
                    denom *= factorial(b)
                val = dg.xreplace(at)
                _check_finite(val, name, "derivative with respect to " + " and ".join(
                    f"{states[k]}" + (f" (order {m})" if m > 1 else "")
                    for k, m in enumerate(beta) if m))
                if val != 0:
                    out[beta] = val / denom
                nxt.append((beta, dg, j))
        frontier = nxt
    return out


def _check_finite(value, name, what):
    if value.has(sympy.zoo, sympy.nan, sympy.oo, -sympy.oo):
        raise NotAnalyticError(
            f"the right-hand side for '{name}' is not analytic at the equilibrium "
            f"(its {what} there is {value}); the analysis needs a vector field that is "
            "smooth at the equilibrium.")


class TaylorForms:
    """The shifted field ``u' = sum_k F_k(u)`` with coefficients in a field.

    Attributes
    ----------
    field
        The field of the coefficients.
    n : int
        Dimension.
    order : int
        Highest total degree stored.
    components : tuple of dict
        ``components[i][e]`` is the coefficient of ``u**e`` in component ``i``.
    """

    def __init__(self, field: Any, n: int, order: int, components: Any) -> None:
        self.field = field
        self.n = n
        self.order = order
        self.components = tuple(components)
        self._by_degree = [
            {k: {e: c for e, c in comp.items() if sum(e) == k} for k in range(order + 1)}
            for comp in self.components
        ]

    @classmethod
    def from_raw(cls, raw: RawTaylor, equilibrium: Any, convert: Any, field: Any) -> "TaylorForms":
        """Convert ``raw`` into ``field`` (``convert`` maps sympy -> element),
        shifting polynomial components by ``equilibrium`` (field elements)."""
        comps = []
        n = len(equilibrium)
        for poly, shifted in zip(raw.polynomial, raw.shifted):
            if poly is not None:
                terms = {e: convert(c) for e, c in poly.items()}
                comps.append(_shift(field, terms, equilibrium, raw.order))
            else:
                comps.append({e: convert(c) for e, c in shifted.items()})
        for comp in comps:
            for e in [e for e, c in comp.items() if not c]:
                del comp[e]
        return cls(field, n, raw.order, comps)

    def map(self, fn: Callable[[Element], Element], field: Any) -> "TaylorForms":
        """Apply a field homomorphism to every coefficient."""
        return TaylorForms(field, self.n, self.order,
                           [{e: fn(c) for e, c in comp.items()} for comp in self.components])

    def residual(self) -> list[Element]:
        """The constant terms (the field at the equilibrium)."""
        zero = (0,) * self.n
        return [comp.get(zero, self.field.zero) for comp in self.components]

    def jacobian(self) -> list[list[Element]]:
        K = self.field
        A = [[K.zero] * self.n for _ in range(self.n)]
        for i, comp in enumerate(self.components):
            for e, c in self._by_degree[i][1].items():
                A[i][e.index(1)] = c
        return A

    def degree_part(self, i: int, k: int) -> dict:
        return self._by_degree[i][k] if k <= self.order else {}

    def form(self, k: int, *vectors: Sequence[Element]) -> list[Element]:
        """The symmetric k-linear form ``D^k F(0)[v1, ..., vk]`` (e.g.
        ``form(2, q, q)`` is ``B(q, q)``)."""
        return [multilinear(self.field, self.degree_part(i, k), vectors) for i in range(self.n)]


def _shift(K, terms, x0, order):
    """Expand ``sum c_e x**e`` at ``x = x0 + u`` up to total degree ``order``."""
    n = len(x0)
    powers: dict = {}

    def power(j, k):  # (x0_j + u_j)**k as {degree in u_j: coeff}
        key = (j, k)
        if key not in powers:
            x = x0[j]
            powers[key] = {i: comb(k, i) * x ** (k - i) if x else (K.one if i == k else K.zero)
                           for i in range(min(k, order) + 1)}
        return powers[key]

    out: dict = {}
    for e, c in terms.items():
        partial = {(0,) * n: c}
        for j, k in enumerate(e):
            if k == 0:
                continue
            pj = power(j, k)
            nxt = {}
            for m, cm in partial.items():
                deg = sum(m)
                for i, ci in pj.items():
                    if deg + i > order or not ci:
                        continue
                    mm = m[:j] + (m[j] + i,) + m[j + 1:]
                    v = cm * ci
                    nxt[mm] = nxt[mm] + v if mm in nxt else v
            partial = nxt
        for m, v in partial.items():
            out[m] = out[m] + v if m in out else v
    return out


def multilinear(K: Any, part: dict, vectors: Sequence[Sequence[Element]]) -> Element:
    """``D^k P[v1, ..., vk]`` for a homogeneous part ``{e: c}`` of degree k.

    For ``P = c * u**e`` the k-th derivative tensor is ``c * e!`` on the index
    multiset of ``e``; summing over every ordering of that multiset (``k!``
    permutations, repeated ones included) counts each entry ``e!`` times.
    """
    acc = K.zero
    for e, c in part.items():
        idx = [j for j, m in enumerate(e) for _ in range(m)]
        s = K.zero
        for perm in permutations(idx):
            t = c
            for v, j in zip(vectors, perm):
                x = v[j]
                if not x:
                    t = None
                    break
                t = t * x
            if t is not None:
                s = s + t
        acc = acc + s
    return acc

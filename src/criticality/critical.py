"""The critical set: where a pair of eigenvalues crosses the imaginary axis.

Pipeline place: linear part -> **critical set** -> eigenbasis.

For the factor ``phi(lambda)`` of the characteristic polynomial that carries
the pair, the Hurwitz determinant ``Delta_(m-1)`` vanishes exactly where two
eigenvalues sum to zero.  Its numerator is factored; every factor of degree one
or two in the bifurcation parameter gives closed-form critical values (degree
two adjoins the square root of its discriminant).  On each branch
``omega^2`` is the common root ``s = -omega^2`` of the even and odd parts of
``phi`` (``phi(l) = E(l^2) + l O(l^2)``), never an explicit eigenvalue; the
remaining eigenvalues are described by the cofactor ``chi / (l^2 + omega^2)``,
whose Hurwitz determinants become the stability conditions; the
transversality is ``d lambda / d mu = -phi_mu / phi_lambda`` at
``lambda = i omega``.
"""

from __future__ import annotations

from dataclasses import dataclass

import sympy

import flint

from .algebra import upoly
from .algebra.flint_field import FlintRationalFunctionField
from .algebra.quadratic import QuadraticElement, QuadraticExtension, lower
from .errors import DegenerateHopfError, NoHopfPointError
from .linear import factor_univariate, hurwitz_determinant, hurwitz_determinants

__all__ = ["Condition", "CriticalBranch", "find_critical_branches", "nu_extension"]


@dataclass(frozen=True)
class Condition:
    """A condition of the analysis and what is known about it.

    Attributes
    ----------
    key : str
        ``"omega_squared_positive"``, ``"critical_value_admissible"``,
        ``"others_stable"``, ``"transversal"``, ...
    description : str
        One sentence in words.
    expr : sympy.Expr
        The quantity that must be positive (or non-zero, see ``relation``).
    relation : str
        ``">"`` or ``"!="``.
    status : str
        ``"holds"`` (proved under the assumptions), ``"fails"`` (proved false)
        or ``"open"`` (stated, not proved: the result is valid where it holds).
    """

    key: str
    description: str
    expr: sympy.Expr
    relation: str
    status: str

    @property
    def inequality(self):
        if self.relation == ">":
            return sympy.StrictGreaterThan(self.expr, 0, evaluate=False)
        return sympy.Ne(self.expr, 0, evaluate=False)


@dataclass(frozen=True)
class CriticalBranch:
    """One closed-form branch of the critical set.

    ``value`` and every other element live in ``tower`` (the field after the
    substitution of the critical value); ``chi`` is the characteristic
    polynomial there, ``cofactor`` its part without the critical pair.
    """

    index: int
    value: object
    tower: object
    W: object
    chi: list
    cofactor: list
    transversality: tuple  # (Re d lambda/d mu, coefficient b of nu in d lambda/d mu)
    nu_field: object
    images: dict


def nu_extension(tower, W):
    """The field ``top(nu)`` with ``nu**2 = -W`` (``nu = i omega``)."""
    W_expr = tower.to_sympy(W)
    return QuadraticExtension(tower.top, -W, "nu", root=sympy.I * sympy.sqrt(W_expr))


def _solutions(tower_mu, mu, d):
    """Critical values from ``d = 0``: list of ``(kind, data)`` with kind
    ``"linear"`` (value), ``"quadratic"`` ((c2, c1, c0)) or ``"unsolved"`` (expr)."""
    K = tower_mu.base
    d = lower(d)
    if isinstance(d, QuadraticElement):
        return [("unsolved", tower_mu.to_sympy(d))]
    d = K(d)
    out = []
    if isinstance(K, FlintRationalFunctionField):
        _, factors = d.num.factor()
        for poly, _m in factors:
            coeffs = K.coefficients_in(poly, mu)
            deg = max(coeffs)
            c = [K.from_polynomials(coeffs[k], K._one_poly) if k in coeffs else K.zero
                 for k in range(deg + 1)]
            out.append(_classify(c, lambda: K.poly_to_sympy(poly)))
    else:
        num, _ = sympy.fraction(sympy.together(K.to_sympy(d)))
        for f, _m in sympy.factor_list(num)[1]:
            p = sympy.Poly(f, mu)
            c = [K.from_sympy(x) for x in reversed(p.all_coeffs())]
            out.append(_classify(c, lambda f=f: f))
    return [o for o in out if o is not None]


def linear_alternatives(tower_mu, mu, d) -> list:
    """Names of other parameters in which every factor of ``d`` that is not
    linear in ``mu`` is linear: analysing the Hopf set with respect to one of
    them gives it in closed form without square roots."""
    K = tower_mu.base
    d = lower(d)
    if isinstance(d, QuadraticElement) or not isinstance(K, FlintRationalFunctionField):
        return []
    candidates = None
    atoms = {a.symbol for a in tower_mu.atoms}
    for poly, _m in K(d).num.factor()[1]:
        degrees = dict(zip(K.symbols, poly.degrees()))
        if degrees.get(mu, 0) <= 1:
            continue
        linear = {s for s, k in degrees.items() if k == 1 and s != mu and s not in atoms}
        candidates = linear if candidates is None else candidates & linear
    return sorted(str(s) for s in candidates or ())


def _classify(c, expr):
    deg = len(c) - 1
    if deg == 0:
        return None
    if deg == 1:
        return ("linear", -c[0] / c[1])
    if deg == 2:
        return ("quadratic", (c[2], c[1], c[0]))
    return ("unsolved", expr())


def _branch_values(tower_mu, mu, solution):
    """``[(value, target tower)]`` for one solution."""
    kind, data = solution
    target = tower_mu.fresh()
    if kind == "linear":
        return [(data, target)]
    c2, c1, c0 = data
    s = target.sqrt(c1 * c1 - 4 * c2 * c0)
    out = [((-c1 + s) / (2 * c2), target)]
    other = tower_mu.fresh()
    s2 = other.sqrt(c1 * c1 - 4 * c2 * c0)
    out.append(((-c1 - s2) / (2 * c2), other))
    return out


def _pair_carriers(factors):
    """Factors that can carry a pair summing to zero: every factor of degree
    >= 2, and the product of two linear factors (two real eigenvalues, which
    can meet at zero: a double zero eigenvalue)."""
    linear = []
    for f, mult in factors:
        if len(f) - 1 >= 2:
            yield f
        else:
            linear.extend([f] * min(mult, 2))
    for i in range(len(linear)):
        for j in range(i + 1, len(linear)):
            yield upoly.mul(linear[i], linear[j])


def pair_sum_condition(tower, f):
    """An element vanishing exactly where two roots of ``f`` sum to zero.

    For ``f(l) = E(l^2) + l O(l^2)`` this is the resultant ``Res_s(E, O)``,
    which equals the Hurwitz determinant ``Delta_(m-1)`` up to a constant
    factor and a power of the leading coefficient (Orlando's formula:
    ``Delta_(m-1)`` is, up to sign, the product of ``l_i + l_j`` over the pairs
    of roots).  With coefficients in the flint field it is computed by
    python-flint's multivariate resultant, much faster than the determinant;
    otherwise the Hurwitz determinant is used.
    """
    K = tower.base
    coeffs = [lower(c) for c in f]
    if not isinstance(K, FlintRationalFunctionField) or any(
            isinstance(c, QuadraticElement) for c in coeffs):
        return hurwitz_determinant(tower.top, f, len(f) - 2)
    coeffs = [K(c) for c in coeffs]
    den = K._one_poly
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
    return K.from_polynomials(K.ctx.from_dict(data), K._one_poly) if data else K.zero


def find_critical_branches(tower_mu, mu, chi, *, describe=str):
    """All closed-form branches of the critical set.

    Returns ``(branches, notes)``; raises :class:`NoHopfPointError` when no
    branch exists and :class:`DegenerateHopfError` when the only branches are
    degenerate.
    """
    notes, branches, degenerate = [], [], []
    K = tower_mu.top
    candidates = []
    for f in _pair_carriers(factor_univariate(tower_mu, chi)):
        d = pair_sum_condition(tower_mu, f)
        if not d:
            notes.append("a factor of the characteristic polynomial has a pair of opposite "
                         "eigenvalues for every parameter value (a conservative part); it is "
                         "not a crossing")
            continue
        solutions = _solutions(tower_mu, mu, d)
        if any(kind != "linear" for kind, _ in solutions):
            others = linear_alternatives(tower_mu, mu, d)
            if others:
                notes.append(f"the critical set is not linear in {describe(mu)} (its critical "
                             "value needs a square root or has no closed form) but it is linear "
                             f"in {', '.join(map(repr, others))}: an analysis with respect to "
                             "one of those gives the Hopf set without radicals")
        for sol in solutions:
            if sol[0] == "unsolved":
                notes.append(f"critical values where {sol[1]} = 0 have no closed form in "
                             f"{describe(mu)} (degree > 2); they were not analysed")
                continue
            candidates.extend((f, v, t) for v, t in _branch_values(tower_mu, mu, sol))
    for f, value, target in candidates:
        try:
            branch = _make_branch(tower_mu, mu, chi, f, value, target, len(branches))
        except DegenerateHopfError as exc:
            degenerate.append(exc)
            continue
        except ZeroDivisionError:
            notes.append(f"a candidate critical value ({tower_mu.to_sympy(value)}) makes the "
                         "characteristic polynomial undefined (a denominator vanishes); skipped")
            continue
        if branch is not None:
            branches.append(branch)
    if not branches:
        if degenerate:
            raise degenerate[0]
        if not candidates:
            raise NoHopfPointError(
                f"no pair of eigenvalues can cross the imaginary axis as {describe(mu)} varies: "
                "the Hurwitz determinant of the characteristic polynomial has no zero that "
                f"depends on {describe(mu)}" + (f" ({'; '.join(notes)})" if notes else ""),
                reason="empty_critical_set")
        raise NoHopfPointError(
            "the critical set is empty: where two eigenvalues sum to zero, omega^2 = 0 "
            "identically", reason="omega_squared_nonpositive")
    return branches, notes, degenerate


def _make_branch(tower_mu, mu, chi, f, value, target, index):
    images = tower_mu.radical_images(mu, value, target)
    sub = lambda c: tower_mu.substitute(c, mu, value, target, images)  # noqa: E731
    f_at = [sub(c) for c in f]
    chi_at = [sub(c) for c in chi]
    E, O = upoly.even_odd_parts(f_at)
    g = upoly.gcd(E, O)
    if len(g) < 2:
        return None
    if len(g) > 2:
        raise DegenerateHopfError(
            "at this critical value two pairs of eigenvalues lie on the imaginary axis at once "
            "(a double Hopf point); the single-pair analysis does not apply",
            reason="two_critical_pairs")
    W = g[0]
    if not W:
        raise DegenerateHopfError(
            "at this critical value the pair of eigenvalues meets at zero (a double zero "
            "eigenvalue: Bogdanov-Takens territory), not on the imaginary axis away from zero",
            reason="zero_eigenvalue")
    lam2 = [W, target.top.zero, target.top.one]
    cofactor, rem = upoly.divmod_(chi_at, lam2)
    if rem:
        return None
    if cofactor and not cofactor[0]:
        raise DegenerateHopfError(
            "at this critical value another eigenvalue is zero (a fold-Hopf point); the "
            "single-pair analysis does not apply", reason="zero_eigenvalue")
    if len(cofactor) > 2 and not upoly.divmod_(cofactor, lam2)[1]:
        raise DegenerateHopfError(
            "at this critical value the pair +-i omega is a double eigenvalue (1:1 resonance)",
            reason="two_critical_pairs")
    if len(cofactor) > 2 and not hurwitz_determinant(target.top, cofactor, len(cofactor) - 2):
        raise DegenerateHopfError(
            "at this critical value a second pair of eigenvalues sums to zero; it may lie on "
            "the imaginary axis too (double Hopf) or be a real pair +-kappa",
            reason="two_critical_pairs")
    nu_field = nu_extension(target, W)
    f_mu = [sub(tower_mu.derivative(c, mu)) for c in f]
    num = upoly.evaluate(f_mu, nu_field.gen, nu_field.zero)
    den = upoly.evaluate(upoly.derivative(f_at), nu_field.gen, nu_field.zero)
    dlam = -(nu_field(num) / nu_field(den))
    return CriticalBranch(index, value, target, W, chi_at, cofactor,
                          (dlam.a, dlam.b), nu_field, images)


def cofactor_hurwitz(branch):
    """Hurwitz determinants of the cofactor (all positive iff the other
    eigenvalues lie in the open left half-plane)."""
    if len(branch.cofactor) < 2:
        return []
    return hurwitz_determinants(branch.tower.top, branch.cofactor)

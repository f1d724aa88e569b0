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

import random
from dataclasses import dataclass, replace
from typing import TYPE_CHECKING, Any, Callable, Sequence

import sympy

from fractions import Fraction

from ..algebra import upoly
from ..algebra.algebraic import AlgebraicElement, RealAlgebraicRoot
from ..algebra.certified import is_numeric
from ..algebra.polyops import (numerator_factors, pair_resultant, rational_evaluator,
                               rational_field, value_at)
from ..algebra.quadratic import QuadraticElement, QuadraticExtension, lower
from ..errors import ClosedFormUnavailableError, DegenerateHopfError, NoHopfPointError
from ..kinds import ConditionStatus, coerce
from .linear import factor_univariate, hurwitz_determinant, hurwitz_determinants
from .solve import analytic_sqrt

if TYPE_CHECKING:
    from ..algebra import Tower
    from ..algebra.field import Element

__all__ = ["Condition", "CriticalBranch", "CriticalSet", "find_critical_branches",
           "nu_extension"]


@dataclass(frozen=True)
class Condition:
    """A condition of the analysis and what is known about it.

    Attributes
    ----------
    key : str
        ``"omega_squared_positive"``, ``"critical_value_admissible"``,
        ``"on_chosen_sheet"`` (the critical value belongs to the chosen
        equilibrium, not to the one with the other sign of its root),
        ``"others_stable"``, ``"transversal"``, ...
    description : str
        One sentence in words.
    expr : sympy.Expr
        The quantity that must be positive (or non-zero, see ``relation``).
    relation : str
        ``">"`` or ``"!="``.
    status : ConditionStatus
        ``"holds"`` (proved under the assumptions), ``"fails"`` (proved false)
        or ``"open"`` (stated, not proved: the result is valid where it holds).
    """

    key: str
    description: str
    expr: sympy.Expr
    relation: str
    status: ConditionStatus

    def __post_init__(self) -> None:
        coerce(self, status=ConditionStatus)

    @property
    def inequality(self) -> sympy.Basic:
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
    value: Any
    tower: Any
    W: Any
    chi: list
    cofactor: list
    transversality: tuple  # (Re d lambda/d mu, coefficient b of nu in d lambda/d mu)
    nu_field: Any
    images: dict
    cofactor_factors: tuple = ()
    #: ``(sqrt(G) as a sympy expression, r)`` for each radical of the equilibrium whose image
    #: at the critical value is ``r`` with a sign not proved: the branch lies on the chosen
    #: sheet of that root (the chosen equilibrium) exactly where ``r > 0``
    sheets: tuple = ()


@dataclass(frozen=True)
class CriticalSet:
    """The outcome of the search for branches, as data.

    Attributes
    ----------
    branches : tuple of CriticalBranch
        In the order of their index (admissible ones first).
    notes : tuple of str
        Sentences for the result's notes.
    degenerate : tuple of DegenerateHopfError
        Candidates that are degenerate Hopf points.
    unexamined : int
        Candidates not examined (the search stopped after ``want``).
    linear_in : tuple of str
        Other parameters in which every non-linear factor of the critical set
        is linear (an analysis in one of them needs no roots).
    needs_root : bool
        Whether some branch's critical value is a root (degree >= 2).
    """

    branches: tuple
    notes: tuple
    degenerate: tuple
    unexamined: int
    linear_in: tuple = ()
    needs_root: bool = False


def nu_extension(tower: Tower, W: Element) -> QuadraticExtension:
    """The field ``top(nu)`` with ``nu**2 = -W`` (``nu = i omega``); the
    expression ``I*sqrt(W)`` is formed only if an output needs it."""
    return QuadraticExtension(tower.top, -W, "nu",
                              root=lambda: sympy.I * sympy.sqrt(tower.to_sympy(W)))


def _solutions(tower_mu, mu, d, algebraic: bool = False):
    """Critical values from ``d = 0``: list of ``(kind, data)`` with kind
    ``"linear"`` (value), ``"quadratic"`` ((c2, c1, c0)), ``"algebraic"``
    (the coefficients of an irreducible factor of degree >= 3, lowest first;
    only with ``algebraic=True``) or ``"unsolved"`` (expr)."""
    K = tower_mu.base
    d = lower(d)
    if isinstance(d, QuadraticElement):
        if not algebraic:
            return [("unsolved", tower_mu.to_sympy(d))]
        # radicals of mu: the zeros of d are among those of its norm over K
        # (a polynomial in mu), which also holds the zeros of the conjugates of d (the
        # other signs of the roots: other equilibria); _make_branch keeps the roots of d
        # itself on the chosen sheet and drops the others (_OtherSheet)
        d = norm_to_base(d)
        if not d:
            return []
    out = [_classify(f.coefficients, f.expr, algebraic)
           for f in numerator_factors(K, K(d), mu)]
    return [o for o in out if o is not None]


def norm_to_base(x: Element) -> Element:
    """The norm of a tower element down to the base field (the product of its
    conjugates under every sign change of the radicals)."""
    x = lower(x)
    while isinstance(x, QuadraticElement):
        x = lower(x.norm())
    return x


def linear_alternatives(tower_mu: Tower, mu: sympy.Symbol, d: Element) -> list:
    """Names of other parameters in which every factor of ``d`` that is not
    linear in ``mu`` is linear: analysing the Hopf set with respect to one of
    them gives it in closed form without square roots."""
    K = tower_mu.base
    d = lower(d)
    if isinstance(d, (QuadraticElement, AlgebraicElement)) or not d:
        return []
    candidates = None
    atoms = {a.symbol for a in tower_mu.atoms}
    for factor in numerator_factors(K, K(d), mu):
        degrees = factor.degrees
        if degrees.get(mu, 0) <= 1:
            continue
        linear = {s for s, k in degrees.items() if k == 1 and s != mu and s not in atoms}
        candidates = linear if candidates is None else candidates & linear
    return sorted(str(s) for s in candidates or ())


def _classify(c, expr, algebraic: bool = False):
    deg = len(c) - 1
    if deg == 0:
        return None
    if deg == 1:
        return ("linear", -c[0] / c[1])
    if deg == 2:
        return ("quadratic", (c[2], c[1], c[0]))
    if algebraic:
        return ("algebraic", tuple(c))
    return ("unsolved", expr())


def _branch_values(tower_mu, mu, solution):
    """``[(value, target tower)]`` for one solution."""
    kind, data = solution
    if kind == "algebraic":
        return _root_values(tower_mu, mu, data)
    target = tower_mu.fresh(drop=mu)
    if kind == "linear":
        return [(target.project(data), target)]
    c2, c1, c0 = (target.project(c) for c in data)
    if _provably_negative(target, c1 * c1 - 4 * c2 * c0):
        return []  # both roots are complex: no real critical value
    out = []
    for sign in (1, -1):
        if sign == -1:
            target = tower_mu.fresh(drop=mu)
        c2, c1, c0 = (target.project(c) for c in data)
        s = analytic_sqrt(target, c1 * c1 - 4 * c2 * c0)
        out.append(((-c1 + sign * s) / (2 * c2), target))
    return out


def _provably_negative(tower, x) -> bool:
    """True where ``x`` (a tower element) is negative under the declared
    assumptions."""
    if tower.positivity is None:
        return False
    try:
        return tower.positivity(-tower.to_sympy(x)) is True
    except (sympy.PolynomialError, ValueError, TypeError):
        return False


def _root_values(tower_mu, mu, coeffs):
    """``[(value, target tower)]`` for an irreducible factor of degree >= 3:
    one branch per real root, each in its own extension ``K[t]/(m)``.

    With numeric coefficients the real roots are isolated exactly (sympy's
    ``CRootOf`` and its intervals).  With symbolic ones the root is the
    family's ``RealAlgebraicRoot`` (counting only positive roots when the
    parameter is declared positive) and the number of real roots is the
    largest found at a few sample points of the parameters."""
    probe = tower_mu.fresh(drop=mu)
    low = [probe.project(c) for c in coeffs]
    x = sympy.Dummy("x")
    body = sympy.Add(*[probe.to_sympy(c) * x ** k for k, c in enumerate(low)])
    if probe.to_sympy(low[-1]).could_extract_minus_sign():
        body = -body  # the same roots, printed with a positive leading term
    if is_numeric(probe):
        poly = sympy.Poly(body, x)
        roots = [((Fraction(int(a.p), int(a.q)), Fraction(int(b.p), int(b.q))), sympy.CRootOf(
            poly, k)) for k, ((a, b), _m) in enumerate(poly.intervals())]
    else:
        positive = tower_mu.positivity is not None and tower_mu.positivity(mu) is True
        bound = (sympy.Integer(0),) if positive else ()
        roots = [(None, RealAlgebraicRoot(sympy.Lambda(x, body), k, *bound))
                 for k in range(_real_root_count(probe, low, body, x, positive))]
    out = []
    for interval, root in roots:
        target = tower_mu.fresh(drop=mu)
        modulus = [target.project(c) for c in coeffs]
        out.append((target.adjoin_root(modulus, root, interval), target))
    return out


def _real_root_count(probe, low, body, x, positive) -> int:
    """The largest number of real (positive) roots of ``body`` (the
    polynomial with coefficients ``low``, elements of ``probe``) at a few
    sample points of its parameters (positive rationals of several scales)."""
    symbols = sorted(body.free_symbols - {x}, key=sympy.default_sort_key)
    rng = random.Random(len(symbols))
    best = 0
    scales = (Fraction(1, 100), Fraction(1, 10), 1, 10, 100)
    sample = _sampler(probe, low, body, x, symbols)
    for trial in range(15):
        point = [Fraction(rng.randint(1, 97), 97) * rng.choice(scales) for _ in symbols]
        p = sample(point)
        if p is None or not p.is_sqf:
            continue
        best = max(best, p.count_roots(0, None) - (1 if p.eval(0) == 0 else 0)
                   if positive else p.count_roots())
    return best


def _sampler(probe, low, body, x, symbols):
    """A function from a point (values of ``symbols``) to ``body`` there as a
    polynomial in ``x`` of full degree, or None where the degree drops or a
    coefficient is undefined.

    Where the coefficients lie in the flint parameter field, each is converted
    once and every point is evaluated in C (sympy's substitution into the
    whole body was most of the time on the ring models' quartic factors);
    otherwise the body is substituted point by point."""
    degree = len(low) - 1
    K = probe.base
    evaluate = None
    if not any(isinstance(c, (QuadraticElement, AlgebraicElement)) for c in low) and \
            set(symbols) <= set(K.symbols):
        evaluate = rational_evaluator(K, low)
    if evaluate is not None:
        where = [symbols.index(s) if s in symbols else None for s in K.symbols]

        def sample(point):
            full = [point[i] if i is not None else Fraction(1) for i in where]
            try:
                values = evaluate(full)
            except ZeroDivisionError:
                return None
            if not values[-1]:
                return None
            return sympy.Poly([sympy.Rational(v.numerator, v.denominator)
                               for v in reversed(values)], x, domain=sympy.QQ)
        return sample

    def sample(point):
        values = {s: sympy.Rational(v.numerator, v.denominator)
                  for s, v in zip(symbols, point)}
        try:
            p = sympy.Poly(body.xreplace(values), x)
        except sympy.PolynomialError:
            return None
        return p if p.degree() == degree else None
    return sample


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


def pair_sum_condition(tower: Tower, f: Sequence[Element]) -> Element:
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
    if not any(isinstance(c, (QuadraticElement, AlgebraicElement)) for c in coeffs):
        R = pair_resultant(K, coeffs)
        if R is not None:
            return R
    return hurwitz_determinant(tower.top, f, len(f) - 2)


def _pair_sums_vanish(tower, coeffs) -> bool:
    """Whether two roots of the polynomial sum to zero for every parameter
    value.  A non-zero Hurwitz determinant at a random integer point settles it
    in milliseconds; only when that is zero is the exact condition computed."""
    K = tower.base
    low = [lower(c) for c in coeffs]
    Q = rational_field(K)
    if Q is not None and K.symbols and not any(
            isinstance(c, (QuadraticElement, AlgebraicElement)) for c in low):
        rng = random.Random(len(coeffs))
        for _ in range(2):
            point = [rng.randint(-10 ** 6, 10 ** 6) for _ in K.symbols]
            try:
                values = [value_at(K, x, point) for x in low]
            except ZeroDivisionError:
                continue
            if hurwitz_determinant(Q, values, len(values) - 2):
                return False
    return not pair_sum_condition(tower, coeffs)


class _OtherSheet(Exception):
    """A zero of the norm of the pair condition that is a zero of a conjugate
    only: on the chosen sheet of the equilibrium's roots the condition does
    not vanish there (the point belongs to another equilibrium)."""


def find_critical_branches(tower_mu: Tower, mu: sympy.Symbol, chi: Sequence[Element], *,
                           describe: Callable[[sympy.Symbol], str] = str,
                           accept: Callable[[CriticalBranch], bool] | None = None,
                           want: int | None = None,
                           admissible: Callable[[CriticalBranch], bool] | None = None,
                           on_sheet: Callable[[CriticalBranch], bool] | None = None
                           ) -> CriticalSet:
    """The closed-form branches of the critical set.

    Candidates are examined in a fixed order: critical values that need no
    new square root first, then by the degree of the factor that carries the
    pair.  ``accept(branch)`` may reject a branch (e.g. omega^2 provably <= 0);
    with ``want`` the search stops after that many accepted branches (the
    others can be expensive: square roots make every later element a pair).
    ``admissible(branch)`` returns False where the critical value provably
    violates the parameter's declared range: such branches are kept, but
    after all the others (so that branch 0 is admissible whenever one is),
    and do not count towards ``want``.

    Where the pair condition involves a root of the equilibrium that depends
    on ``mu`` (``sqrt(G(mu))``), its zeros come from its norm, which also
    vanishes where a conjugate does (the other sign of the root: another
    equilibrium).  Each candidate is checked on the chosen sheet: the
    condition itself must vanish there with the root's image its principal
    value (proved exactly, or by certified enclosures at numeric values);
    candidates proved to lie on another sheet are dropped and named in the
    notes.  Where the sign of the image is not decided, the branch keeps it in
    ``sheets`` (stated as a condition on the result), and ``on_sheet(branch)``
    may still prove it false (then the branch is dropped the same way).

    Returns a :class:`CriticalSet`; raises :class:`NoHopfPointError` when it
    is proved that no branch exists, :class:`DegenerateHopfError` when the
    only branches are degenerate, and :class:`ClosedFormUnavailableError`
    when a factor of the critical set may carry branches that were not found
    (no real root at the sample points of a family).
    """
    notes: list = []
    branches: list = []
    degenerate: list = []
    late: list = []
    other_sheet: list = []
    factors = factor_univariate(tower_mu, chi)
    info: dict = {"linear_in": (), "rootless": []}
    candidates = _candidates(tower_mu, mu, factors, describe, notes, info)
    examined = rejected = 0
    for f, value, target, d in candidates:
        if want is not None and len(branches) >= want:
            break
        examined += 1
        try:
            branch = _make_branch(tower_mu, mu, chi, f, value, target, len(branches), factors,
                                  zeros=(lower(d),))
        except DegenerateHopfError as exc:
            degenerate.append(exc)
            continue
        except ZeroDivisionError:
            notes.append(f"a candidate critical value ({tower_mu.to_sympy(value)}) makes the "
                         "characteristic polynomial undefined (a denominator vanishes); skipped")
            continue
        except _OtherSheet:
            other_sheet.append(target.to_sympy(value))
            continue
        if branch is None:
            continue
        if on_sheet is not None and branch.sheets and not on_sheet(branch):
            other_sheet.append(target.to_sympy(value))
            continue
        if accept is not None and not accept(branch):
            rejected += 1
            continue
        if admissible is not None and not admissible(branch):
            late.append(branch)
            continue
        branches.append(branch)
    if rejected:
        notes.append(f"{rejected} branch(es) of the critical set have omega^2 <= 0 (neutral "
                     "saddles) and were dropped")
    if other_sheet:
        roots = ", ".join(sorted({sympy.sstr(e.root) for e in tower_mu.levels}))
        notes.append(f"{len(other_sheet)} candidate critical value(s) of {describe(mu)} ("
                     f"{', '.join(sympy.sstr(v) for v in other_sheet)}) solve the pair "
                     f"condition only with the other sign of {roots}: they belong to another "
                     "equilibrium, not to the chosen one, and were dropped")
    if late:
        notes.append(f"{len(late)} branch(es) of the critical set have a critical value "
                     f"outside the declared range of {describe(mu)}; they are listed last")
        branches = [replace(b, index=k) for k, b in enumerate(branches + late)]
    unexamined = len(candidates) - examined
    if unexamined:
        notes.append(f"{unexamined} further candidate critical value(s) were not examined "
                     "(hopf_all examines every branch)")
    if branches:
        return CriticalSet(tuple(branches), tuple(notes), tuple(degenerate), unexamined,
                           tuple(info["linear_in"]), any(len(b.tower.levels) for b in branches))
    if degenerate:
        raise degenerate[0]
    if info["rootless"]:
        raise ClosedFormUnavailableError(
            f"the critical set contains {info['rootless'][0]} = 0, whose roots in "
            f"{describe(mu)} depend on the parameters; no real root was found at sample "
            "points of the parameters, so no branch is given in closed form (which is not a "
            "proof that none exists). Fix the parameters (values={...}) for exact roots, or "
            "use the numeric mode (guess={...}) near a suspected Hopf point.")
    if not candidates:
        raise NoHopfPointError(
            f"no pair of eigenvalues can cross the imaginary axis as {describe(mu)} varies: "
            "the Hurwitz determinant of the characteristic polynomial has no real zero that "
            f"depends on {describe(mu)}" + (f" ({'; '.join(notes)})" if notes else ""),
            reason="empty_critical_set")
    raise NoHopfPointError(
        "on every branch of the critical set omega^2 <= 0 under the declared assumptions: "
        "where two eigenvalues sum to zero they are a real pair +-kappa (a neutral saddle), "
        "not a pair crossing the imaginary axis", reason="omega_squared_nonpositive")


def _candidates(tower_mu, mu, factors, describe, notes, info):
    """``(factor, critical value, target tower, pair condition)`` in the order
    of examination; ``info`` collects the parameters in which the critical set
    is linear and the factors whose roots were not found."""
    found = []
    for f in _pair_carriers(factors):
        d = pair_sum_condition(tower_mu, f)
        if not d:
            notes.append("a factor of the characteristic polynomial has a pair of opposite "
                         "eigenvalues for every parameter value (a conservative part); it is "
                         "not a crossing")
            continue
        solutions = _solutions(tower_mu, mu, d, algebraic=True)
        if any(kind != "linear" for kind, _ in solutions):
            others = linear_alternatives(tower_mu, mu, d)
            info["linear_in"] = tuple(others)
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
            rank = {"linear": 0, "quadratic": 1}.get(sol[0], 2)
            values = _branch_values(tower_mu, mu, sol)
            if not values and sol[0] == "quadratic":
                notes.append(f"the zeros in {describe(mu)} of a quadratic factor of the critical "
                             "set are complex (negative discriminant), so no real parameter "
                             "value reaches them")
            if not values and sol[0] == "algebraic" and not is_numeric(tower_mu.fresh(drop=mu)):
                x = sympy.Symbol(str(mu))
                info["rootless"].append(sympy.Add(*[tower_mu.to_sympy(c) * x ** k
                                                    for k, c in enumerate(sol[1])]))
            found.extend((rank, len(f), len(found) + k, f, v, t, d)
                         for k, (v, t) in enumerate(values))
    found.sort(key=lambda c: c[:3])
    return [c[3:] for c in found]


def _cofactor_factors(factors, sub, lam2, cofactor):
    """The cofactor ``chi / (l^2 + W)`` as a product of the factors of chi at
    the critical value (smaller Hurwitz determinants than the whole)."""
    if len(factors) < 2:
        return [cofactor]
    out, divided = [], False
    for g, mult in factors:
        g_at = upoly.trim([sub(c) for c in g])
        if not divided:
            q, r = upoly.divmod_(g_at, lam2)
            if not r:
                divided = True
                if len(q) > 1:
                    out.append(q)
                mult -= 1
        out.extend([g_at] * mult)
    return out if divided else [cofactor]


def _make_branch(tower_mu, mu, chi, f, value, target, index, factors=(), zeros=()):
    images, sheets = tower_mu.sheet_images(mu, value, target, zeros=zeros)
    sub = lambda c: tower_mu.substitute(c, mu, value, target, images)  # noqa: E731
    for z in zeros:
        # a zero of the norm only (a conjugate of the condition vanishes, not the condition)
        if isinstance(z, QuadraticElement) and sub(z):
            raise _OtherSheet()
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
    if len(cofactor) > 2 and _pair_sums_vanish(target, cofactor):
        raise DegenerateHopfError(
            "at this critical value a second pair of eigenvalues sums to zero; it may lie on "
            "the imaginary axis too (double Hopf) or be a real pair +-kappa",
            reason="two_critical_pairs")
    parts = _cofactor_factors(factors, sub, lam2, cofactor)
    nu_field = nu_extension(target, W)
    f_mu = [sub(tower_mu.derivative(c, mu)) for c in f]
    num = upoly.evaluate(f_mu, nu_field.gen, nu_field.zero)
    den = upoly.evaluate(upoly.derivative(f_at), nu_field.gen, nu_field.zero)
    dlam = -(nu_field(num) / nu_field(den))
    return CriticalBranch(index, value, target, W, chi_at, cofactor,
                          (dlam.a, dlam.b), nu_field, images, tuple(parts),
                          tuple((ext.root, r) for ext, r in sheets))


def cofactor_hurwitz(branch: CriticalBranch) -> list[tuple[str, Element]]:
    """``[(label, Delta)]``: the Hurwitz determinants of each factor of the
    cofactor; all positive iff the other eigenvalues lie in the open left
    half-plane.  Labels are ``"k"`` (one factor) or ``"i_k"`` (factor i)."""
    parts = [p for p in (branch.cofactor_factors or (branch.cofactor,)) if len(p) > 1]
    out = []
    for i, part in enumerate(parts, start=1):
        for k, d in enumerate(hurwitz_determinants(branch.tower.top, part), start=1):
            out.append((f"{i}_{k}" if len(parts) > 1 else f"{k}", d))
    return out

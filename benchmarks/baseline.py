"""The plain-sympy route to the Hopf point and l1, as a competent user writes it.

This is what the engine is measured against.  It follows the conventions of
DESIGN.md and uses sympy's everyday tools, with no algebraic tricks:

1. shift the field to the equilibrium, ``f(x0 + y)`` (``subs``, simultaneous);
2. the Jacobian at the origin by ``jacobian`` (i.e. ``diff``);
3. the characteristic polynomial by ``Matrix.charpoly``;
4. the Hurwitz determinant Delta_(n-1) by ``Matrix.det`` of the Hurwitz matrix
   H[i, j] = a_(2j - i) (1-based, a_0 = 1, a_k = 0 outside 0..n);
5. ``solve(Delta_(n-1), mu)``; of the returned set the route keeps the branch
   the case follows (the solution that equals the case's declared critical
   value at one admissible sample point, evaluated numerically); none found is
   an error;
6. omega^2: write chi(lambda) = E(lambda^2) + lambda O(lambda^2); at the Hopf
   point lambda = +-i omega is a common root, so s = -omega^2 is the root of
   gcd(E, O) (``sympy.gcd`` of the numerators after ``together``; the gcd must
   have degree 1 in s);
7. omega = sqrt(omega^2); q from ``(A - I omega 1).nullspace()``, p from
   ``(A.T + I omega 1).nullspace()``, scaled so that <p, q> = 1 with
   <a, b> = conj(a)^T b (``a.H * b``);
8. B and C, the second and third derivative forms at the equilibrium, from
   ``diff`` (the full tensors);
9. h11 = A^-1 B(q, conj q) and h20 = (2 i omega 1 - A)^-1 B(q, q) by ``LUsolve``;
10. c1 = 1/2 <p, C(q, q, conj q)> - <p, B(q, h11)> + 1/2 <p, B(conj q, h20)>
    (Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed., 2004,
    section 3.5, the n-dimensional formula);
11. Re c1 as (c1 + conjugate(c1))/2, and l1 = Re c1 / (omega <q, q>), which is
    the unit-eigenvector normalisation <q, q> = 1 of DESIGN.md without a
    square root of <q, q>;
12. the "simplified" baseline applies ``simplify`` to l1 at the end; the
    "no-simplify" baseline returns it as it stands.

Nothing is simplified in between (sympy's automatic evaluation only).  The
symbols carry the declared assumptions (positive/real), as a careful user's
would, so ``conjugate`` of a parameter evaluates to itself.
"""

from __future__ import annotations

import time
from dataclasses import dataclass
from typing import Callable

import sympy as sp

from reference import mp_eval, relative_difference

__all__ = ["BaselineError", "BaselineResult", "hopf_baseline"]


class BaselineError(RuntimeError):
    """The plain route could not produce a result (no branch, bad gcd, empty nullspace)."""


@dataclass(frozen=True)
class BaselineResult:
    """What the plain route returns, with the wall time of each stage (seconds)."""

    critical_value: sp.Expr
    omega_squared: sp.Expr
    l1: sp.Expr
    stages: tuple


class _Clock:
    """Stage timer: ``lap(name)`` records the time since the previous lap."""

    def __init__(self, progress: Callable[[str, float], None] | None = None):
        self.laps: list[tuple[str, float]] = []
        self._last = time.perf_counter()
        self._progress = progress

    def lap(self, name: str) -> None:
        now = time.perf_counter()
        self.laps.append((name, now - self._last))
        self._last = now
        if self._progress is not None:
            self._progress(name, self.laps[-1][1])


def hurwitz_determinant(coeffs: list) -> sp.Expr:
    """Delta_(n-1) of lambda^n + a1 lambda^(n-1) + ... + an, from [1, a1, ..., an]."""
    n = len(coeffs) - 1
    size = n - 1

    def a(k: int):
        return coeffs[k] if 0 <= k <= n else sp.S.Zero

    H = sp.Matrix(size, size, lambda i, j: a(2 * (j + 1) - (i + 1)))
    return H.det()


def _select_branch(solutions: list, case, point: dict) -> sp.Expr:
    """The solution that equals the case's declared critical value at ``point``."""
    import mpmath

    values = {p.name: v for p, v in point.items()}
    with mpmath.workdps(30):
        target = mp_eval(case.critical_value, values)
        for sol in solutions:
            if relative_difference(mp_eval(sol, values), target) < 1e-15:
                return sol
    raise BaselineError(f"solve returned {len(solutions)} solutions, none is the "
                        f"declared branch {case.critical_value}")


def _omega_squared(chi: sp.Poly, mu: sp.Symbol, mu_c: sp.Expr) -> sp.Expr:
    """omega^2 from the common root s = -omega^2 of the even and odd parts of chi."""
    lam, s = chi.gen, sp.Dummy("s")
    at_c = sp.numer(sp.together(chi.as_expr().subs(mu, mu_c)))
    coeffs = sp.Poly(at_c, lam).all_coeffs()[::-1]  # coeffs[k] multiplies lam**k
    even = sum(c * s ** (k // 2) for k, c in enumerate(coeffs) if k % 2 == 0)
    odd = sum(c * s ** (k // 2) for k, c in enumerate(coeffs) if k % 2 == 1)
    g = sp.Poly(sp.gcd(sp.expand(even), sp.expand(odd)), s)
    if g.degree() != 1:
        raise BaselineError(f"gcd of the even and odd parts has degree {g.degree()}, not 1")
    g1, g0 = g.all_coeffs()
    return g0 / g1


def _derivative_forms(shifted: list, states: tuple, at: dict):
    """Second and third derivative tensors of the shifted field at the origin."""
    n = len(states)
    second = [[[sp.diff(f, states[j], states[k]).subs(at) for k in range(n)]
               for j in range(n)] for f in shifted]
    third = [[[[sp.diff(f, states[j], states[k], states[m]).subs(at) for m in range(n)]
               for k in range(n)] for j in range(n)] for f in shifted]
    return second, third


def _form(tensor: list, *vectors) -> sp.Matrix:
    """Apply a derivative tensor (nested lists) to vectors: sum over all indices."""
    n = len(tensor)
    out = []
    for i in range(n):
        total = sp.S.Zero
        entries = [(tensor[i], sp.S.One)]
        for vec in vectors:
            entries = [(sub[j], w * vec[j]) for sub, w in entries for j in range(n)]
        for value, weight in entries:
            total += value * weight
        out.append(total)
    return sp.Matrix(out)


def _linear_part(case, clock: _Clock):
    """Shifted field, Jacobian at the equilibrium, characteristic polynomial."""
    states = case.states
    shift = {x: x + case.equilibrium[x] for x in states}
    shifted = [sp.sympify(f).subs(shift, simultaneous=True) for f in case.equations]
    origin = {x: 0 for x in states}
    J = sp.Matrix(shifted).jacobian(states).subs(origin)
    clock.lap("jacobian")
    chi = J.charpoly(sp.Symbol("lambda"))
    clock.lap("charpoly")
    return shifted, origin, J, chi


def _eigenvectors(A: sp.Matrix, omega: sp.Expr):
    """q with A q = i omega q, p with A^T p = -i omega p, <p, q> = 1."""
    n = A.rows
    kernel_q = (A - sp.I * omega * sp.eye(n)).nullspace()
    kernel_p = (A.T + sp.I * omega * sp.eye(n)).nullspace()
    if not kernel_q or not kernel_p:
        raise BaselineError("nullspace found no eigenvector (zero test failed)")
    q, p = kernel_q[0], kernel_p[0]
    p = p / sp.conjugate((p.H * q)[0])
    return q, p


def hopf_baseline(case, *, simplify_result: bool,
                  progress: Callable[[str, float], None] | None = None) -> BaselineResult:
    """Critical value, omega^2 and l1 of ``case`` by the plain-sympy route.

    Parameters
    ----------
    case : cases.Case
        The model.
    simplify_result : bool
        Apply ``sympy.simplify`` to l1 at the end (the "simplified" baseline).
    progress : callable, optional
        Called as ``progress(stage, seconds)`` when a stage finishes (the
        runner uses it to say where a timed-out run was).
    """
    clock = _Clock(progress)
    mu = case.bifurcation
    shifted, origin, J, chi = _linear_part(case, clock)
    delta = hurwitz_determinant(chi.all_coeffs())
    clock.lap("hurwitz det")
    mu_c = _select_branch(sp.solve(delta, mu), case, case.sample_points(1)[0])
    clock.lap("solve")
    omega2 = _omega_squared(chi, mu, mu_c)
    omega = sp.sqrt(omega2)
    clock.lap("omega^2")
    A = J.subs(mu, mu_c)
    q, p = _eigenvectors(A, omega)
    clock.lap("nullspace")
    at = {**origin, mu: mu_c}
    second, third = _derivative_forms(shifted, case.states, at)
    clock.lap("derivatives")
    qb = q.applyfunc(sp.conjugate)
    n = case.n
    h11 = A.LUsolve(_form(second, q, qb))
    h20 = (2 * sp.I * omega * sp.eye(n) - A).LUsolve(_form(second, q, q))
    clock.lap("LUsolve")
    c1 = ((p.H * _form(third, q, q, qb))[0] / 2 - (p.H * _form(second, q, h11))[0]
          + (p.H * _form(second, qb, h20))[0] / 2)
    l1 = (c1 + sp.conjugate(c1)) / 2 / (omega * (q.H * q)[0])
    clock.lap("c1, l1")
    if simplify_result:
        l1 = sp.simplify(l1)
        clock.lap("simplify")
    return BaselineResult(mu_c, omega2, l1, tuple(clock.laps))

"""Numeric reference for the benchmark: checks of the cases and an independent l1.

At one point of the free parameters (exact rationals) this module evaluates the
case's declared critical value, substitutes it, and works with numbers only:

* the eigenvalues of the Jacobian (numpy) must contain exactly one pair on the
  imaginary axis, at +-i omega with the declared omega^2, all others in the
  open left half plane;
* l1 by the n-dimensional projection formula (Kuznetsov, Elements of Applied
  Bifurcation Theory, 3rd ed., 2004, section 3.5) evaluated in mpmath: q and p
  from bordered linear solves at the known eigenvalue i omega, B and C from the
  Taylor coefficients of the field at the equilibrium.  No symbolic algebra in
  the parameters is involved, so it is independent of both the baseline and
  the engine.

``mp_eval`` evaluates a sympy expression (possibly huge, with conjugates and
radicals) in mpmath without recursion and without ``lambdify``; the runner uses
it to compare the routes' l1 at the same points.
"""

from __future__ import annotations

from dataclasses import dataclass
from itertools import combinations_with_replacement

import mpmath
import numpy as np
import sympy as sp

__all__ = ["mp_eval", "PointCheck", "check_point", "numeric_l1", "relative_difference",
           "classical_planar_l1"]

_FUNCTIONS = {
    sp.conjugate: mpmath.conj, sp.re: mpmath.re, sp.im: mpmath.im, sp.Abs: abs,
    sp.exp: mpmath.exp, sp.log: mpmath.log, sp.sin: mpmath.sin, sp.cos: mpmath.cos,
    sp.tan: mpmath.tan, sp.sinh: mpmath.sinh, sp.cosh: mpmath.cosh, sp.tanh: mpmath.tanh,
    sp.atan: mpmath.atan, sp.asin: mpmath.asin, sp.acos: mpmath.acos,
    sp.transpose: lambda x: x, sp.adjoint: mpmath.conj,  # on scalars
}


def _leaf(node: sp.Basic, values: dict):
    """mpmath value of an atom: number, named symbol, i, pi, E."""
    if node.is_Symbol:
        return values[node.name]
    if node is sp.I:
        return mpmath.mpc(0, 1)
    if node.is_Rational:
        return mpmath.mpf(node.p) / node.q
    if node.is_Float or node.is_NumberSymbol:
        return mpmath.mpf(node.evalf(mpmath.mp.dps + 5)._mpf_)
    raise TypeError(f"cannot evaluate atom {node!r}")


def _root(node: sp.Basic, values: dict):
    """mpmath value of an algebraic number given as a root of a polynomial
    (the engine's critical values of degree >= 3), by sympy's own evaluation
    at the point."""
    point = {s: sp.Float(mpmath.nstr(values[s.name], mpmath.mp.dps + 5), mpmath.mp.dps + 5)
             for s in node.free_symbols}
    exact = {s: sp.nsimplify(v, rational=True) for s, v in point.items()}
    return mpmath.mpf(sp.N(node.xreplace(exact), mpmath.mp.dps + 5)._mpf_)


def _combine(node: sp.Basic, args: list):
    """mpmath value of a compound node from its arguments' values."""
    if node.is_Add:
        return mpmath.fsum(args)
    if node.is_Mul:
        return mpmath.fprod(args)
    if node.is_Pow:
        base, exponent = args
        if node.exp.is_Integer:
            return base ** int(node.exp)
        if isinstance(base, mpmath.mpf) and base >= 0:
            return mpmath.power(base, exponent)  # a real root of a nonnegative number
        return mpmath.power(mpmath.mpc(base), exponent)
    for function, mp_function in _FUNCTIONS.items():
        if isinstance(node, function):
            return mp_function(*args)
    raise TypeError(f"cannot evaluate {type(node).__name__} in {node!r}")


def mp_eval(expr: sp.Basic, values: dict):
    """Evaluate ``expr`` at ``values`` (symbol name -> number) in the current mpmath precision.

    Shared subexpressions are evaluated once; the traversal is iterative, so
    deep expressions do not hit the recursion limit.
    """
    values = {k: mpmath.mpmathify(v) if not isinstance(v, sp.Basic) else _leaf(v, {})
              for k, v in values.items()}
    done: dict = {}
    stack = [(expr, False)]
    while stack:
        node, expanded = stack.pop()
        if node in done:
            continue
        if isinstance(node, (sp.Lambda, sp.CRootOf)) or type(node).__name__ == "RealAlgebraicRoot":
            done[node] = _root(node, values)
        elif not node.args:
            done[node] = _leaf(node, values)
        elif expanded:
            done[node] = _combine(node, [done[a] for a in node.args])
        else:
            stack.append((node, True))
            stack.extend((a, False) for a in node.args if a not in done)
    return done[expr]


def relative_difference(a, b) -> mpmath.mpf:
    """|a - b| / max(|a|, |b|), 0 when both vanish."""
    scale = max(abs(a), abs(b))
    return mpmath.mpf(0) if scale == 0 else abs(a - b) / scale


# --- Taylor data of the field at the equilibrium, numerically ----------------------


def _at_point(case, point: dict) -> tuple[list, dict]:
    """Right-hand sides and equilibrium with all parameters replaced by exact numbers."""
    full = dict(point)
    full[case.bifurcation] = case.critical_value.xreplace(point)
    equations = [sp.sympify(f).xreplace(full) for f in case.equations]
    equilibrium = {s: sp.sympify(v).xreplace(full) for s, v in case.equilibrium.items()}
    return equations, equilibrium


def _taylor(case, point: dict) -> tuple:
    """A (mp matrix), and B, C as dicts (i, j, k[, l]) -> symmetric tensor entry."""
    equations, equilibrium = _at_point(case, point)
    ys = sp.symbols(f"_y0:{case.n}")
    shift = {s: equilibrium[s] + y for s, y in zip(case.states, ys)}
    zero = {y: sp.S.Zero for y in ys}
    n = case.n
    A = mpmath.matrix(n, n)
    B, C = {}, {}
    for i, f in enumerate(equations):
        g = f.xreplace(shift)
        first = [sp.diff(g, y) for y in ys]
        for j in range(n):
            A[i, j] = mpmath.re(mp_eval(first[j].xreplace(zero), {}))
        for j, k in combinations_with_replacement(range(n), 2):
            second = sp.diff(first[j], ys[k])
            if second == 0:
                continue
            value = mpmath.re(mp_eval(second.xreplace(zero), {}))
            if value != 0:
                B[i, j, k] = value
            for m in range(k, n):
                third = sp.diff(second, ys[m]).xreplace(zero)
                if third != 0:
                    C[i, j, k, m] = mpmath.re(mp_eval(third, {}))
    return A, B, C


def _apply(tensor: dict, n: int, *vectors) -> mpmath.matrix:
    """Symmetric multilinear form from its upper-triangular entries, applied to vectors."""
    from itertools import permutations

    out = mpmath.matrix(n, 1)
    for (i, *idx), value in tensor.items():
        total = 0
        for perm in set(permutations(idx)):
            term = value
            for vec, j in zip(vectors, perm):
                term *= vec[j]
            total += term
        out[i] += total
    return out


# --- checks and the numeric l1 ----------------------------------------------------------


@dataclass(frozen=True)
class PointCheck:
    """Outcome of the numeric check of one case at one parameter point."""

    ok: bool
    message: str
    omega: float
    next_real_part: float


def check_point(case, point: dict, tol: float = 1e-9) -> PointCheck:
    """Exactly one pair at +-i omega (declared omega^2), every other eigenvalue in Re < 0."""
    equations, equilibrium = _at_point(case, point)
    residual = [complex(f.xreplace(equilibrium).evalf(30)) for f in equations]
    if max(abs(r) for r in residual) > 1e-20:
        return PointCheck(False, f"not an equilibrium: residual {residual}", 0.0, 0.0)
    with mpmath.workdps(30):
        A, _, _ = _taylor(case, point)
        omega2 = mp_eval(case.omega_squared.xreplace(point), {})
    J = np.array(A.tolist(), dtype=float)
    eigenvalues = np.linalg.eigvals(J)
    on_axis = [z for z in eigenvalues if abs(z.real) < tol]
    others = [z for z in eigenvalues if abs(z.real) >= tol]
    omega = float(mpmath.sqrt(omega2)) if omega2 > 0 else float("nan")
    next_re = max((z.real for z in others), default=float("-inf"))
    if len(on_axis) != 2 or not all(abs(abs(z.imag) - omega) < 1e-7 for z in on_axis):
        return PointCheck(False, f"eigenvalues on the axis: {on_axis}, omega={omega}", omega,
                          next_re)
    if next_re >= 0:
        return PointCheck(False, f"another eigenvalue has Re >= 0: {next_re}", omega, next_re)
    return PointCheck(True, "one simple pair on the axis", omega, next_re)


def _null_vector(M: mpmath.matrix, guess: np.ndarray, row_weights: np.ndarray):
    """Null vector of a singular M: fix the largest component of ``guess`` to 1, drop the
    row with the largest weight (a combination of the others), solve the rest."""
    n = M.rows
    j = int(np.argmax(np.abs(guess)))
    r = int(np.argmax(np.abs(row_weights)))
    rows = [i for i in range(n) if i != r]
    cols = [c for c in range(n) if c != j]
    sub = mpmath.matrix([[M[i, c] for c in cols] for i in rows])
    rhs = mpmath.matrix([-M[i, j] for i in rows])
    sol = mpmath.lu_solve(sub, rhs)
    v = mpmath.matrix(n, 1)
    v[j] = 1
    for c, s in zip(cols, sol):
        v[c] = s
    residual = mpmath.fsum(M[r, c] * v[c] for c in range(n))
    return v, abs(residual)


def numeric_l1(case, point: dict, dps: int = 30):
    """l1 = Re(c1)/(omega <q,q>) by the projection formula, in mpmath at ``dps`` digits.

    Returns (l1, residual) where residual measures how far i omega is from an
    eigenvalue of A at this point (it should be at the level of 10^-dps).
    """
    with mpmath.workdps(dps + 10):
        A, B, C = _taylor(case, point)
        n = case.n
        omega = mpmath.sqrt(mp_eval(case.omega_squared.xreplace(point), {}))
        nu = mpmath.mpc(0, 1) * omega
        eye = mpmath.eye(n)
        J = np.array(A.tolist(), dtype=float)
        values, left, right = _numpy_eig(J)
        idx = int(np.argmin(np.abs(values - complex(0, float(omega)))))
        q, res_q = _null_vector(A - nu * eye, right[:, idx], left[:, idx])
        # p solves A^T p = -i omega p; its conjugate is the left eigenvector for +i omega.
        p, res_p = _null_vector(A.T + nu * eye, np.conj(left[:, idx]), right[:, idx])
        conj = lambda v: v.apply(mpmath.conj)  # noqa: E731
        dot = lambda a, b: mpmath.fsum(mpmath.conj(a[i]) * b[i] for i in range(n))  # noqa: E731
        p = p / mpmath.conj(dot(p, q))
        qb = conj(q)
        h11 = mpmath.lu_solve(A, _apply(B, n, q, qb))
        h20 = mpmath.lu_solve(2 * nu * eye - A, _apply(B, n, q, q))
        c1 = (dot(p, _apply(C, n, q, q, qb)) / 2 - dot(p, _apply(B, n, q, h11))
              + dot(p, _apply(B, n, qb, h20)) / 2)
        l1 = mpmath.re(c1) / (omega * mpmath.re(dot(q, q)))
        return +l1, max(res_q, res_p)


def _numpy_eig(J: np.ndarray):
    """Eigenvalues with right and left eigenvectors (columns), in matching order."""
    values, right = np.linalg.eig(J)
    left_values, left = np.linalg.eig(J.T)
    order = [int(np.argmin(np.abs(left_values - v))) for v in values]
    return values, left[:, order], right


def classical_planar_l1(case, point: dict):
    """2 a / omega from the classical planar coefficient a, for a planar case whose
    Jacobian at the critical value is [[0, -omega], [omega, 0]].

    a = (f_xxx + f_xyy + g_xxy + g_yyy)/16
        + (f_xy (f_xx + f_yy) - g_xy (g_xx + g_yy) - f_xx g_xx + f_yy g_yy)/(16 omega)
    (Guckenheimer and Holmes, Nonlinear Oscillations, Dynamical Systems, and
    Bifurcations of Vector Fields, 1983, section 3.4); the factor 2/omega is the
    conversion to the unit-eigenvector normalisation stated in DESIGN.md.
    """
    (f, g), equilibrium = _at_point(case, point)
    x, y = case.states
    at = {x: equilibrium[x], y: equilibrium[y]}
    d = lambda h, *v: sp.diff(h, *v).xreplace(at)  # noqa: E731
    omega = d(g, x)
    if d(f, x) != 0 or d(g, y) != 0 or d(f, y) != -omega:
        raise ValueError("the linear part is not [[0, -omega], [omega, 0]]")
    a = (d(f, x, x, x) + d(f, x, y, y) + d(g, x, x, y) + d(g, y, y, y)) / 16 + (
        d(f, x, y) * (d(f, x, x) + d(f, y, y)) - d(g, x, y) * (d(g, x, x) + d(g, y, y))
        - d(f, x, x) * d(g, x, x) + d(f, y, y) * d(g, y, y)) / (16 * omega)
    return 2 * a / omega

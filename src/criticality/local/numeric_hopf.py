"""The Hopf point and its normal form by dense numeric linear algebra.

Pipeline place: compiled Taylor data -> **numeric Hopf point** (Newton on the
Hopf system) -> eigen-data -> normal-form coefficients (the engine's own
projection formula and normalization method over a numeric field, and a
dense numpy projection formula as a second route).

The Hopf system (the eigenvector formulation; common practice, no source).
With unknowns ``y = (x, mu, omega, v_r, v_i)``, ``v = v_r + i v_i``::

    f(x, mu) = 0,   A(x, mu) v_r + omega v_i = 0,   A(x, mu) v_i - omega v_r = 0,
    Re(c^H v) = 1,  Im(c^H v) = 0,

``3n + 2`` equations in ``3n + 2`` unknowns; ``c`` is the eigenvector at the
guess.  Its solutions are exactly the points where ``A`` has the eigenvalue
``i omega``; a real pair ``+-kappa`` (a neutral saddle) is not a solution, so
no Hurwitz determinant is needed.  The Jacobian is analytic: it uses the
compiled second derivatives (``D^2 f [., v]``) and ``d A / d mu``.

Newton stays local: every step is capped (a trust region of scaled radius
``radius`` around the guess, in the max norm with scale ``max(1, |guess|)``
per coordinate), damped by backtracking on the residual, and an iterate that
would leave the region stops the search with an error that says where it was
heading and how far that is from the guess.

More digits: the float64 solution is refined in mpmath by simplified Newton
steps (residual at full precision, correction from the float64 Jacobian:
each step gains about ``16 - log10(cond)`` digits).
"""

from __future__ import annotations

from typing import Any

from dataclasses import dataclass

import mpmath
import sympy

from ..algebra.quadratic import QuadraticExtension
from ..budget import checkpoint
from ..errors import DegenerateHopfError, EquilibriumNotFoundError, NoHopfPointError
from .eigenbasis import Eigenbasis

__all__ = ["FloatField", "MpField", "HopfSystem", "HopfPoint", "eigen_data",
           "numpy_projection_c1", "numpy_projection_c1_real", "engine_eigenbasis",
           "numpy_transversality"]


class FloatField:
    """Python floats as an engine field (``size`` = -|x|: partial pivoting)."""

    backend = "float64"
    symbols: tuple = ()
    level = 0
    zero = 0.0
    one = 1.0

    def __call__(self, value: Any) -> float:
        if hasattr(value, "ext"):
            return value
        return float(value)

    def size(self, x: Any) -> float:
        return -abs(x)

    def to_sympy(self, x: Any) -> sympy.Expr:
        return sympy.Float(x, 15)

    def is_zero(self, x: Any) -> bool:
        return not x


class MpField(FloatField):
    """mpmath numbers at the working precision as an engine field."""

    backend = "mpmath"

    def __init__(self) -> None:
        self.zero = mpmath.mpf(0)
        self.one = mpmath.mpf(1)

    def __call__(self, value: Any) -> Any:
        if hasattr(value, "ext"):
            return value
        if isinstance(value, sympy.Basic):
            return mpmath.mpf(sympy.N(value, mpmath.mp.dps + 5))
        return mpmath.mpf(value)

    def to_sympy(self, x: Any) -> sympy.Expr:
        return sympy.Float(x, mpmath.mp.dps)


@dataclass(frozen=True)
class HopfPoint:
    """A solution of the Hopf system (float64 numpy arrays, or mpmath lists)."""

    x: Any
    mu: Any
    omega: Any
    q: Any               # complex eigenvector, A q = i omega q
    params: tuple        # every parameter value (the bifurcation parameter set to mu)
    iterations: int
    distance: float      # scaled max-norm distance of (x, mu) from the guess
    correction: float    # size of the last Newton correction (scaled)
    condition: float     # condition number of the Newton matrix at the solution


def _np():
    import numpy as np
    return np


class HopfSystem:
    """The Hopf system of a compiled model with the bifurcation parameter at
    index ``mu_index`` of the parameter vector ``params`` (float values)."""

    def __init__(self, compiled: Any, params: Any, mu_index: int, active_index: int = 0) -> None:
        self.ct = compiled
        self.dense = compiled.dense()
        self.params = list(params)
        self.mu_index = mu_index
        self.k = active_index    # position of mu among the compiled active parameters
        self.n = compiled.n

    # -- evaluation --------------------------------------------------------------------
    def _values(self, x, mu, extra=None):
        np = _np()
        p = list(self.params)
        p[self.mu_index] = mu
        if extra:
            for idx, val in extra.items():
                p[idx] = val
        try:
            vals = np.array(self.ct.values(x, p, "math"), dtype=float)
        except (ValueError, ZeroDivisionError, OverflowError, TypeError):
            return None, p
        if not np.all(np.isfinite(vals)):
            return None, p
        return vals, p

    def split(self, y: Any) -> tuple:
        n = self.n
        return y[:n], y[n], y[n + 1], y[n + 2:2 * n + 2], y[2 * n + 2:3 * n + 2]

    def residual(self, y: Any, c: Any, extra: Any = None) -> tuple:
        np = _np()
        x, mu, om, vr, vi = self.split(y)
        vals, _ = self._values(x, mu, extra)
        if vals is None:
            return None, None
        A = self.dense.jacobian(vals)
        G = np.concatenate([self.dense.residual(vals), A @ vr + om * vi, A @ vi - om * vr,
                            [c.real @ vr + c.imag @ vi - 1, c.real @ vi - c.imag @ vr]])
        return G, (vals, A)

    def jacobian(self, y: Any, c: Any, cache: Any, param_columns: Any = ()) -> Any:
        """The Newton matrix; ``param_columns`` adds columns d/d(active k)."""
        np = _np()
        n = self.n
        x, mu, om, vr, vi = self.split(y)
        vals, A = cache
        D = self.dense
        m = 3 * n + 2
        M = np.zeros((m, m + len(param_columns)))
        eye = np.eye(n)
        M[:n, :n] = A
        M[:n, n] = D.f_param(vals, self.k)
        Ju = D.J_param(vals, self.k)
        M[n:2 * n, :n] = D.hessian_times(vals, vr)
        M[n:2 * n, n] = Ju @ vr
        M[n:2 * n, n + 1] = vi
        M[n:2 * n, n + 2:2 * n + 2] = A
        M[n:2 * n, 2 * n + 2:m] = om * eye
        M[2 * n:3 * n, :n] = D.hessian_times(vals, vi)
        M[2 * n:3 * n, n] = Ju @ vi
        M[2 * n:3 * n, n + 1] = -vr
        M[2 * n:3 * n, n + 2:2 * n + 2] = -om * eye
        M[2 * n:3 * n, 2 * n + 2:m] = A
        M[3 * n, n + 2:2 * n + 2] = c.real
        M[3 * n, 2 * n + 2:m] = c.imag
        M[3 * n + 1, n + 2:2 * n + 2] = -c.imag
        M[3 * n + 1, 2 * n + 2:m] = c.real
        for col, k in enumerate(param_columns):
            Jk = D.J_param(vals, k)
            M[:n, m + col] = D.f_param(vals, k)
            M[n:2 * n, m + col] = Jk @ vr
            M[2 * n:3 * n, m + col] = Jk @ vi
        return M

    # -- the start -----------------------------------------------------------------------
    def start(self, x: Any, mu: Any) -> Any:
        """``(y0, c)``: the guess with the eigenvector of the complex pair
        nearest the imaginary axis."""
        np = _np()
        vals, _ = self._values(x, mu)
        if vals is None:
            raise EquilibriumNotFoundError("the model cannot be evaluated at the guess (a "
                                           "logarithm, root or division is undefined there)")
        A = self.dense.jacobian(vals)
        lam, V = np.linalg.eig(A)
        scale = max(1.0, float(np.max(np.abs(lam))))
        pairs = [i for i in range(self.n) if lam[i].imag > 1e-9 * scale]
        if not pairs:
            raise NoHopfPointError(
                "at the guess the Jacobian has no complex pair of eigenvalues, so the numeric "
                f"mode cannot tell which pair to follow (eigenvalues: "
                f"{', '.join(f'{z.real:.4g}' for z in lam)}); give a guess nearer the Hopf "
                "point, where a complex pair is close to the imaginary axis",
                reason="empty_critical_set")
        i = min(pairs, key=lambda j: abs(lam[j].real) / abs(lam[j]))
        v = V[:, i] / V[np.argmax(np.abs(V[:, i])), i]
        c = v / np.vdot(v, v).real
        y0 = np.concatenate([np.asarray(x, dtype=float), [mu, lam[i].imag], v.real, v.imag])
        return y0, c

    # -- Newton ----------------------------------------------------------------------------
    def solve(self, x: Any, mu: Any, *, radius: float = 1.0, tol: float = 1e-12,
              max_iter: int = 60) -> HopfPoint:
        """Newton's method from the guess ``(x, mu)``, kept within ``radius``."""
        np = _np()
        guess = np.concatenate([np.asarray(x, dtype=float), [mu]])
        scale = np.maximum(1.0, np.abs(guess))
        x = self.equilibrium(np.asarray(x, dtype=float), mu, scale[:self.n], radius)
        y, c = self.start(x, mu)
        y, its, corr, cond = self.newton(y, c, guess, scale, radius, tol, max_iter)
        return self.point(y, guess, scale, its, corr, cond)

    def equilibrium(self, x: Any, mu: Any, scale: Any, radius: Any, max_iter: int = 30) -> Any:
        """A damped Newton solve of ``f(x, mu) = 0`` at the guessed ``mu``
        (the start of the Hopf system); the guess itself if it fails."""
        np = _np()
        x0 = x.copy()
        vals, _ = self._values(x, mu)
        if vals is None:
            return x0
        F = self.dense.residual(vals)
        for _ in range(max_iter):
            norm = float(np.max(np.abs(F)))
            if norm < 1e-13 * max(1.0, float(np.max(np.abs(x)))):
                return x
            try:
                d = np.linalg.solve(self.dense.jacobian(vals), -F)
            except np.linalg.LinAlgError:
                return x0
            t = min(1.0, radius / 4 / max(float(np.max(np.abs(d) / scale)), 1e-300))
            while t > 1e-4:
                xt = x + t * d
                vt, _ = self._values(xt, mu)
                if vt is not None and float(np.max(np.abs(xt - x0) / scale)) <= radius:
                    Ft = self.dense.residual(vt)
                    if float(np.max(np.abs(Ft))) < (1 - t / 4) * norm:
                        x, vals, F = xt, vt, Ft
                        break
                t /= 2
            else:
                return x0
        return x if float(np.max(np.abs(F))) < 1e-8 else x0

    def newton(self, y: Any, c: Any, guess: Any, scale: Any, radius: Any, tol: Any, max_iter: Any,
               extra: Any = None) -> Any:
        np = _np()
        n = self.n
        G, cache = self.residual(y, c, extra)
        if G is None:
            raise EquilibriumNotFoundError("the model cannot be evaluated at the guess")
        norm = float(np.max(np.abs(G)))
        corr = np.inf
        floor = tol * max(1.0, float(np.max(np.abs(y))))
        region = radius / 8  # the step's trust region, adapted below
        for it in range(1, max_iter + 1):
            checkpoint()
            M = self.jacobian(y, c, cache)
            try:
                delta = np.linalg.solve(M, -G)
            except np.linalg.LinAlgError:
                raise DegenerateHopfError("the Newton matrix of the Hopf system is singular: "
                                          "the pair is not simple or the crossing is not "
                                          "transversal here", reason="two_critical_pairs")
            step = float(np.max(np.abs(delta[:n + 1]) / scale))
            t = 1.0 if step <= region else region / step
            while True:
                trial = y + t * delta
                far = float(np.max(np.abs(trial[:n + 1] - guess) / scale))
                Gt, ct = self.residual(trial, c, extra)
                if Gt is not None and far <= radius and \
                        float(np.max(np.abs(Gt))) < max((1 - t / 4) * norm, floor):
                    break
                t /= 2
                if t < 1e-6:
                    where = trial[:n + 1]
                    if far <= radius:
                        raise EquilibriumNotFoundError(
                            f"Newton's method on the Hopf system stalled (the residual "
                            f"{norm:.2e} no longer decreases) at parameter value "
                            f"{y[n]:.6g}, at distance {far:.3g} from the guess: there may be no "
                            "Hopf point near the guess; give a guess closer to one")
                    raise EquilibriumNotFoundError(
                        f"Newton's method found no Hopf point within distance {radius:g} of "
                        f"the guess (scaled max norm); its iterates were heading to "
                        f"parameter value {where[n]:.6g} at distance {far:.3g} from the "
                        "guess. Give a guess closer to the Hopf point you mean (or a larger "
                        "radius=)")
            region = min(radius / 2, 2 * region) if t == 1.0 else max(region / 2, radius / 64)
            y, G, cache = trial, Gt, ct
            norm = float(np.max(np.abs(G)))
            corr = t * step
            if norm < floor and corr < 1e-9:
                cond = float(np.linalg.cond(self.jacobian(y, c, cache)))
                return y, it, corr, cond
        raise EquilibriumNotFoundError(
            "Newton's method on the Hopf system did not converge from the guess (residual "
            f"{norm:.2e} after {max_iter} steps); give a guess closer to the Hopf point")

    def point(self, y: Any, guess: Any, scale: Any, its: Any, corr: Any, cond: Any) -> HopfPoint:
        np = _np()
        x, mu, om, vr, vi = self.split(y)
        q = vr + 1j * vi
        if om < 0:
            om, q = -om, q.conj()
        vals, _ = self._values(x, mu)
        A = self.dense.jacobian(vals)
        if om <= 1e-10 * max(1.0, float(np.max(np.abs(A)))):
            raise DegenerateHopfError("omega vanishes at the located point: a double zero "
                                      "eigenvalue, not a Hopf point", reason="zero_eigenvalue")
        p = list(self.params)
        p[self.mu_index] = float(mu)
        far = float(np.max(np.abs(y[:self.n + 1] - guess) / scale))
        return HopfPoint(np.array(x), float(mu), float(om), q, tuple(p), its, far, corr, cond)

    # -- more digits ---------------------------------------------------------------------
    def refine(self, pt: HopfPoint, dps: int, params: Any = None, max_iter: int = 60) -> tuple:
        """The point at ``dps`` digits (mpmath lists), by simplified Newton steps;
        ``params`` are the parameter values at that precision (default: the
        float values)."""
        np = _np()
        n = self.n
        c = pt.q / np.vdot(pt.q, pt.q).real
        y = np.concatenate([pt.x, [pt.mu, pt.omega], pt.q.real, pt.q.imag])
        G, cache = self.residual(y, c)
        inv = np.linalg.inv(self.jacobian(y, c, cache))
        ct = self.ct
        lin = ct.layout.by_degree[1]
        with mpmath.workdps(dps):
            ym = [mpmath.mpf(float(v)) for v in y]
            cr = [mpmath.mpf(float(v)) for v in c.real]
            ci = [mpmath.mpf(float(v)) for v in c.imag]
            pm = list(params) if params is not None else [mpmath.mpf(v) for v in self.params]
            tol = mpmath.mpf(10) ** (-dps + 3)
            last = None
            for _ in range(max_iter):
                checkpoint()
                x, mu, om = ym[:n], ym[n], ym[n + 1]
                vr, vi = ym[n + 2:2 * n + 2], ym[2 * n + 2:]
                pm[self.mu_index] = mu
                vals = ct.values(x, pm, "mpmath")
                Avr, Avi = [mpmath.mpf(0)] * n, [mpmath.mpf(0)] * n
                for i, idx, pos in lin:
                    Avr[i] += vals[pos] * vr[idx[0]]
                    Avi[i] += vals[pos] * vi[idx[0]]
                G = [vals[ct.layout.f[i]] for i in range(n)]
                G += [Avr[i] + om * vi[i] for i in range(n)]
                G += [Avi[i] - om * vr[i] for i in range(n)]
                G += [mpmath.fsum(a * b for a, b in zip(cr, vr)) +
                      mpmath.fsum(a * b for a, b in zip(ci, vi)) - 1,
                      mpmath.fsum(a * b for a, b in zip(cr, vi)) -
                      mpmath.fsum(a * b for a, b in zip(ci, vr))]
                size = max(abs(g) for g in G)
                if size < tol * max(1, max(abs(v) for v in ym)):
                    break
                if last is not None and size > last / 10:
                    raise EquilibriumNotFoundError(
                        f"refining the Hopf point to {dps} digits stalls (the Hopf system is "
                        "too ill-conditioned for float64 corrections); ask for fewer digits")
                last = size
                delta = inv @ np.array([float(g) for g in G])
                ym = [a - mpmath.mpf(float(d)) for a, d in zip(ym, delta)]
            x, mu, om = ym[:n], ym[n], ym[n + 1]
            q = [mpmath.mpc(a, b) for a, b in zip(ym[n + 2:2 * n + 2], ym[2 * n + 2:])]
            if om < 0:
                om, q = -om, [mpmath.conj(z) for z in q]
            pm[self.mu_index] = mu
            return x, mu, om, q, pm


# -- eigen-data and coefficients ----------------------------------------------------------

def _left_vector(A, omega, q):
    """``conj(p)`` (left eigenvector for ``i omega``) with ``conj(p)^T q = 1``,
    from a bordered system (numpy)."""
    np = _np()
    n = len(q)
    M = np.zeros((n + 1, n + 1), dtype=complex)
    M[:n, :n] = A.T - 1j * omega * np.eye(n)
    M[:n, n] = q.conj()
    M[n, :n] = q
    rhs = np.zeros(n + 1, dtype=complex)
    rhs[n] = 1
    sol = np.linalg.solve(M, rhs)
    pbar = sol[:n]
    return pbar / (pbar @ q)


def _left_vector_mp(A, omega, q):
    n = len(q)
    M = mpmath.matrix(n + 1, n + 1)
    for i in range(n):
        for j in range(n):
            M[i, j] = A[j][i]
        M[i, i] -= mpmath.mpc(0, omega)
        M[i, n] = mpmath.conj(q[i])
        M[n, i] = q[i]
    rhs = mpmath.matrix(n + 1, 1)
    rhs[n] = 1
    sol = mpmath.lu_solve(M, rhs)
    pbar = [sol[i] for i in range(n)]
    norm = mpmath.fsum(a * b for a, b in zip(pbar, q))
    return [x / norm for x in pbar]


def eigen_data(compiled: Any, vals: Any, omega: Any, q: Any, backend: str) -> tuple:
    """``(A, pbar)`` at the point: the Jacobian (nested lists for mpmath,
    numpy otherwise) and ``conj(p)`` normalised by ``conj(p)^T q = 1``."""
    if backend == "mpmath":
        n = compiled.n
        A = [[mpmath.mpf(0)] * n for _ in range(n)]
        for i, idx, pos in compiled.layout.by_degree[1]:
            A[i][idx[0]] = vals[pos]
        return A, _left_vector_mp(A, omega, q)
    A = compiled.dense().jacobian(vals)
    return A, _left_vector(A, omega, q)


def engine_eigenbasis(A: Any, omega: Any, q: Any, pbar: Any, K: Any) -> Eigenbasis:
    """The engine's :class:`Eigenbasis` from numeric eigenvectors: ``q = A v +
    nu v`` and ``conj(p) = A^T w + nu w`` with ``nu = i omega`` (so the
    engine's projection formula and normalization method run unchanged over
    the numeric field ``K``)."""
    n = len(q)
    A = [[K(A[i][j]) for j in range(n)] for i in range(n)]
    W = K(omega) ** 2
    om = K(omega)
    Av = [K(z.real) for z in q]
    v = [K(z.imag) / om for z in q]
    wA = [K(z.real) for z in pbar]
    w = [K(z.imag) / om for z in pbar]
    N = QuadraticExtension(K, -W, "nu", root=sympy.Symbol("nu"))
    qe = [N.element(a, b) for a, b in zip(Av, v)]
    pe = [N.element(a, b) for a, b in zip(wA, w)]
    A2 = [[sum((A[i][k] * A[k][j] for k in range(n)), K.zero) for j in range(n)]
          for i in range(n)]
    qq = sum((a * a for a in Av), K.zero) + W * sum((b * b for b in v), K.zero)
    e2 = [-x for x in v]

    def dot(a, b):
        return sum((x * y for x, y in zip(a, b)), K.zero)

    gram = ((dot(w, Av), dot(w, e2)), (dot(wA, Av), dot(wA, e2)),
            dot(w, Av) * dot(wA, e2) - dot(w, e2) * dot(wA, Av))
    return Eigenbasis(A, A2, W, v, Av, qe, pe, w, wA, qq, K, N, gram)


def numpy_projection_c1(dense: Any, vals: Any, A: Any, omega: Any, q: Any, pbar: Any) -> Any:
    """``c1`` in the unit convention by the projection formula with dense
    complex solves (Kuznetsov 2004, Section 3.5; see
    :mod:`criticality.local.projection`)."""
    np = _np()
    n = len(q)
    qb = q.conj()
    Bqqb = dense.form(vals, 2, q, qb)
    Bqq = dense.form(vals, 2, q, q)
    Cqqqb = dense.form(vals, 3, q, q, qb)
    try:
        h11 = np.linalg.solve(A, Bqqb)
        h20 = np.linalg.solve(2j * omega * np.eye(n) - A, Bqq)
    except np.linalg.LinAlgError:
        raise DegenerateHopfError("the Jacobian is singular or 2 i omega is an eigenvalue at "
                                  "the located point", reason="resonance")
    c1 = 0.5 * (pbar @ Cqqqb) - pbar @ dense.form(vals, 2, q, h11) \
        + 0.5 * (pbar @ dense.form(vals, 2, qb, h20))
    return c1 / np.vdot(q, q).real


def numpy_projection_c1_real(dense: Any, vals: Any, A: Any, omega: Any, q: Any, pbar: Any) -> Any:
    """The same ``c1`` with the two solves realified (``2n x 2n`` real block
    system for ``(2 i omega I - A) h = r``): a second route whose rounding
    differs, used to estimate the float64 error."""
    np = _np()
    n = len(q)
    qb = q.conj()
    Bqqb = dense.form(vals, 2, q, qb).real
    Bqq = dense.form(vals, 2, q, q)
    eye = np.eye(n)
    M = np.block([[-A, -2 * omega * eye], [2 * omega * eye, -A]])
    try:
        h11 = np.linalg.solve(A, Bqqb)
        hh = np.linalg.solve(M, np.concatenate([Bqq.real, Bqq.imag]))
    except np.linalg.LinAlgError:
        raise DegenerateHopfError("the Jacobian is singular or 2 i omega is an eigenvalue at "
                                  "the located point", reason="resonance")
    h20 = hh[:n] + 1j * hh[n:]
    t1 = pbar @ dense.form(vals, 3, q, q, qb)
    t2 = pbar @ dense.form(vals, 2, q, h11.astype(complex))
    t3 = pbar @ dense.form(vals, 2, qb, h20)
    return (0.5 * t1 - t2 + 0.5 * t3) / float(np.sum(q.real ** 2 + q.imag ** 2))


def numpy_transversality(dense: Any, vals: Any, A: Any, q: Any, pbar: Any, k: int) -> Any:
    """``d lambda / d mu`` at the point (the equilibrium moves with mu)."""
    np = _np()
    dx = np.linalg.solve(A, -dense.f_param(vals, k))
    return pbar @ (dense.J_param(vals, k) @ q + dense.form(vals, 2, q, dx.astype(complex)))

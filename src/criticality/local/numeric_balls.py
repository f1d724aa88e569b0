"""The numeric mode's order-3 quantities at many digits, in ball arithmetic.

Pipeline place: numeric Hopf point refined to ``dps`` digits -> compiled
values (mpmath) -> **eigen-data, c1 by two routes, d lambda / d mu** (balls,
:class:`criticality.algebra.balls.BallArithmetic`) -> numeric result.

The same formulas as the float64 route of :mod:`criticality.local.numeric_hopf`
(Kuznetsov 2004, Elements of Applied Bifurcation Theory, Section 3.5, the
projection formula; see :mod:`criticality.local.projection`): ``conj(p)``
from a bordered system, ``c1`` by complex solves and, as a second route whose
rounding differs, by realified solves (the ``2n x 2n`` real block system for
``(2 i omega I - A) h = r``).  The solves run in C (python-flint) instead of
pure-Python mpmath.  Every value returned is the midpoint of a ball; the
ball radii, relative to the values, are returned as ``"rounding"``: a bound of
the rounding in this stage (not of the error of the point itself, which the
caller estimates).
"""

from __future__ import annotations

from typing import Any

import mpmath

from ..algebra.balls import BallArithmetic, SolveFailed
from ..errors import DegenerateHopfError

__all__ = ["ball_coefficients"]


def _forms(B: BallArithmetic, compiled: Any, V: dict) -> Any:
    """``form(k, *vectors)`` = ``D^k f [v1, ..., vk]`` on balls."""
    n = compiled.n
    tensors = {k: (r.tolist(), c.tolist(), p.tolist())
               for k, (r, c, p) in compiled.dense().tensors.items()}

    def form(k: int, *vectors: Any) -> list:
        out = [B.zero] * n
        if k not in tensors:
            return out
        for r, cs, p in zip(*tensors[k]):
            t = V[p]
            for v, j in zip(vectors, cs):
                t = t * v[j]
            out[r] += t
        return out

    return form


def _solve(B: BallArithmetic, rows: Any, rhs: Any, what: str) -> list:
    try:
        return B.solve(rows, rhs)
    except SolveFailed:
        raise DegenerateHopfError(f"{what} is singular at the located point",
                                  reason="resonance") from None


def ball_coefficients(compiled: Any, vals: Any, omega: Any, q: Any, dps: int,
                      tiny: Any) -> dict:
    """``A``, ``conj(p)``, ``c1`` (complex and realified routes), ``d lambda /
    d mu`` and ``<q, q>`` at ``dps`` digits from the compiled values ``vals``
    (mpmath numbers) at the point with frequency ``omega`` and eigenvector
    ``q`` (mpmath ``mpc``); results as mpmath numbers, with ``"rounding"``
    the largest relative radius of the balls behind them (absolute for a
    value below ``tiny``; relative to the largest entry for ``conj(p)``)."""
    n = compiled.n
    lay = compiled.layout
    with BallArithmetic(dps) as B:
        V: dict = {}
        for k in range(2, lay.order + 1):
            for _, _, pos in lay.by_degree[k]:
                V[pos] = B.complex(vals[pos])
        A = [[B.zero] * n for _ in range(n)]
        for i, idx, pos in lay.by_degree[1]:
            A[i][idx[0]] = B.complex(vals[pos])
        om = B.complex(omega)
        iom = B.complex(mpmath.mpc(0, omega))
        qv = [B.complex(z) for z in q]
        qb = [B.conj(z) for z in qv]
        # conj(p): (A^T - i omega) w + conj(q) s = 0, q^T w = 1
        M = [[A[j][i] - (iom if i == j else 0) for j in range(n)] + [qb[i]] for i in range(n)]
        M.append(qv + [B.zero])
        w = _solve(B, M, [B.zero] * n + [B.complex(1)], "the bordered eigenvector system")[:n]
        norm = B.dot(w, qv)
        pbar = [x / norm for x in w]
        form = _forms(B, compiled, V)
        qq = B.dot(qb, qv)
        Bqqb, Bqq = form(2, qv, qb), form(2, qv, qv)
        t1 = B.dot(pbar, form(3, qv, qv, qb))
        # route 1: complex solves
        h11 = _solve(B, A, Bqqb, "the Jacobian")
        S = [[(2 * iom if i == j else 0) - A[i][j] for j in range(n)] for i in range(n)]
        h20 = _solve(B, S, Bqq, "2 i omega I - A")
        c1 = (t1 / 2 - B.dot(pbar, form(2, qv, h11)) + B.dot(pbar, form(2, qb, h20)) / 2) / qq
        # route 2: realified solves
        h11r = _solve(B, A, [z.real for z in Bqqb], "the Jacobian")
        block = [[-A[i][j] for j in range(n)] + [-2 * om if i == j else 0 for j in range(n)]
                 for i in range(n)]
        block += [[2 * om if i == j else 0 for j in range(n)] + [-A[i][j] for j in range(n)]
                  for i in range(n)]
        hh = _solve(B, block, [z.real for z in Bqq] + [z.imag for z in Bqq], "2 i omega I - A")
        h20r = [hh[i].real + B.complex(mpmath.mpc(0, 1)) * hh[n + i].real for i in range(n)]
        c1r = (t1 / 2 - B.dot(pbar, form(2, qv, [z.real for z in h11r]))
               + B.dot(pbar, form(2, qb, h20r)) / 2) / qq.real
        # d lambda / d mu (the equilibrium moves with mu)
        f_mu = [B.zero] * n
        for i, pos in lay.f_p[0]:
            f_mu[i] = B.complex(vals[pos])
        dx = _solve(B, A, [-v for v in f_mu], "the Jacobian")
        dA_q = [B.zero] * n
        for i, j, pos in lay.J_p[0]:
            dA_q[i] += B.complex(vals[pos]) * qv[j]
        Bq = form(2, qv, dx)
        dlam = B.dot(pbar, [a + b for a, b in zip(dA_q, Bq)])
        pnorm = max(abs(B.to_mpmath(z)) for z in pbar)
        rounding = max([B.radius(z) / max(abs(B.to_mpmath(z)), tiny) for z in (c1, c1r, dlam)]
                       + [B.radius(z) / pnorm for z in pbar])
        return {"A": [[B.to_mpf(a) for a in row] for row in A],
                "pbar": [B.to_mpmath(z) for z in pbar], "c1": B.to_mpmath(c1),
                "c1_real": B.to_mpmath(c1r), "dlam": B.to_mpmath(dlam), "qq": B.to_mpf(qq),
                "rounding": float(rounding)}

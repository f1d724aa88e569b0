"""An independent numeric Lyapunov coefficient, for checking the engine.

This is the n-dimensional projection formula for the first Lyapunov
coefficient (Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed.,
2004, Section 3.5) evaluated numerically with mpmath: eigenvectors from
``mpmath.eig``, derivative tensors from sympy ``diff`` evaluated at the point,
linear solves with ``mpmath.lu_solve``.  It shares no code with the engine.
"""

from __future__ import annotations

from itertools import permutations, product

import mpmath
import sympy


def _tensor(exprs, states, at, order):
    """D^order f at the point, as a dict index-tuple -> mpf (symmetric)."""
    n = len(states)
    out = {}
    for i, f in enumerate(exprs):
        for idx in product(range(n), repeat=order):
            if list(idx) != sorted(idx):
                continue
            d = f
            for j in idx:
                d = sympy.diff(d, states[j])
            if d == 0:
                continue
            v = mpmath.mpf(sympy.N(d.xreplace(at), mpmath.mp.dps + 5))
            out[(i,) + idx] = v
    return out


def _apply(T, n, vectors):
    res = [mpmath.mpc(0)] * n
    for key, v in T.items():
        i, idx = key[0], key[1:]
        seen = set()
        for perm in permutations(idx):
            if perm in seen:
                continue
            seen.add(perm)
            t = v
            for vec, j in zip(vectors, perm):
                t *= vec[j]
            res[i] += t
    return res


def numeric_first_lyapunov(equations, states, at, digits=30):
    """``(omega, l1, c1)`` with the unit-eigenvector normalisation at the point
    ``at`` (a dict symbol -> exact value for every state and parameter)."""
    with mpmath.workdps(digits + 10):
        n = len(states)
        J = mpmath.matrix(n, n)
        for i, f in enumerate(equations):
            for j, s in enumerate(states):
                J[i, j] = mpmath.mpf(sympy.N(sympy.diff(f, s).xreplace(at), digits + 15))
        E, ER = mpmath.eig(J, left=False, right=True)
        k = max(range(n), key=lambda m: mpmath.im(E[m]) - abs(mpmath.re(E[m])) * 1e6)
        omega = mpmath.im(E[k])
        q = [ER[i, k] for i in range(n)]
        norm = mpmath.sqrt(sum(abs(x) ** 2 for x in q))
        q = [x / norm for x in q]
        EL, L = mpmath.eig(J.T, left=False, right=True)
        k2 = min(range(n), key=lambda m: abs(EL[m] + 1j * omega))
        p = [L[i, k2] for i in range(n)]
        s = sum(mpmath.conj(a) * b for a, b in zip(p, q))
        p = [a / mpmath.conj(s) for a in p]  # <p, q> = conj(p)^T q = 1
        B = _tensor(equations, states, at, 2)
        C = _tensor(equations, states, at, 3)
        qb = [mpmath.conj(x) for x in q]
        inner = lambda a, b: sum(mpmath.conj(x) * y for x, y in zip(a, b))  # noqa: E731
        Bqqb = _apply(B, n, [q, qb])
        Bqq = _apply(B, n, [q, q])
        h11 = mpmath.lu_solve(J, mpmath.matrix(Bqqb))
        M = mpmath.matrix(n, n)
        for i in range(n):
            for j in range(n):
                M[i, j] = (2j * omega if i == j else 0) - J[i, j]
        h20 = mpmath.lu_solve(M, mpmath.matrix(Bqq))
        c1 = (inner(p, _apply(C, n, [q, q, qb])) / 2
              - inner(p, _apply(B, n, [q, [h11[i] for i in range(n)]]))
              + inner(p, _apply(B, n, [qb, [h20[i] for i in range(n)]])) / 2)
        return omega, mpmath.re(c1) / omega, c1

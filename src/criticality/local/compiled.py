"""Taylor data of a model, compiled once for numeric evaluation at any point.

Pipeline place: model -> **compiled Taylor data** -> numeric Hopf point,
continuation, numeric normal form.

For right-hand sides ``f(x; p)`` the derivatives that a numeric Hopf analysis
needs are differentiated once by sympy, along nonzero paths only (a derivative
is taken with respect to the states that occur in the previous one, with
nondecreasing indices, so sparse models stay cheap), then compiled with common
subexpressions removed (:mod:`criticality.local.codegen`):

* every ``d^|e| f_i / d x^e`` for ``1 <= |e| <= order`` (and ``f_i`` itself);
* ``d f_i / d p`` and ``d^2 f_i / d x_j d p`` for the *active* parameters
  (the bifurcation parameter, and the second parameter of a curve).

:class:`CompiledTaylor` evaluates them at a point (Python floats, numpy or
mpmath) and lays the values out as dense arrays (``f``, the Jacobian, the
contractions of the second and third derivatives with vectors) or as the
engine's :class:`~criticality.local.taylor.TaylorForms` over a numeric field,
so the engine's own projection formula and normalization method run on them.
"""

from __future__ import annotations

from dataclasses import dataclass
from itertools import permutations
from math import factorial
from typing import Any, Sequence

import sympy

from ..budget import checkpoint
from .codegen import CompiledExpressions
from .dag import ExpressionGraph
from .taylor import TaylorForms

__all__ = ["CompiledTaylor", "compile_taylor"]


def _derivatives(graph, f: int, i: int, n: int, order: int, out: list) -> None:
    """Append ``(i, index tuple, node)`` for f and its nonzero x-derivatives."""
    out.append((i, (), f))
    stack: list[tuple[int, tuple[int, ...]]] = [(f, ())]
    while stack:
        node, idx = stack.pop()
        if len(idx) >= order:
            continue
        start = idx[-1] if idx else 0
        deps = graph.depends(node)
        for j in range(start, n):
            if j not in deps:
                continue
            d = graph.diff(node, j)
            if d == graph.zero:
                continue
            key = idx + (j,)
            out.append((i, key, d))
            stack.append((d, key))


@dataclass(frozen=True)
class _Layout:
    """Where each derivative sits in the flat list of compiled values."""

    n: int
    order: int
    f: tuple                 # position of f_i
    by_degree: tuple         # degree k -> tuple of (i, index tuple, position)
    f_p: tuple               # active k -> tuple of (i, position)
    J_p: tuple               # active k -> tuple of (i, j, position)


class CompiledTaylor:
    """Compiled derivatives of ``f(x; p)`` at any point.

    Parameters
    ----------
    equations, states : sequences of sympy objects
    parameters : sequence of sympy.Symbol
        Every symbol of the equations other than the states, in the order of
        the parameter vector given to :meth:`values`.
    active : sequence of int
        Indices into ``parameters`` of the parameters whose first derivatives
        are compiled.
    order : int
        Highest x-derivative.
    """

    def __init__(self, equations: Any, states: Any, parameters: Any, active: Sequence[int],
                 order: int) -> None:
        self.n = len(states)
        self.order = order
        self.states = tuple(states)
        self.parameters = tuple(parameters)
        self.active = tuple(active)
        graph = ExpressionGraph()
        args = {s: k for k, s in enumerate(self.states)}
        args.update({s: self.n + k for k, s in enumerate(self.parameters)})
        cache: dict = {}
        roots = [graph.from_sympy(sympy.sympify(f, strict=True), args, cache) for f in equations]
        entries: list = []
        for i, f in enumerate(roots):
            checkpoint()
            _derivatives(graph, f, i, self.n, order, entries)
        outputs = [node for _, _, node in entries]
        positions = {(i, idx): k for k, (i, idx, _) in enumerate(entries)}
        by_degree: list[list] = [[] for _ in range(order + 1)]
        for (i, idx), k in positions.items():
            by_degree[len(idx)].append((i, idx, k))
        f_p, J_p = [], []
        for a in self.active:
            fp, jp = [], []
            for i, f in enumerate(roots):
                d = graph.diff(f, self.n + a)
                if d != graph.zero:
                    fp.append((i, len(outputs)))
                    outputs.append(d)
            for i, idx, k in by_degree[1]:
                d = graph.diff(entries[k][2], self.n + a)
                if d != graph.zero:
                    jp.append((i, idx[0], len(outputs)))
                    outputs.append(d)
            f_p.append(tuple(fp))
            J_p.append(tuple(jp))
        self.graph = graph
        self.outputs = tuple(outputs)
        self.layout = _Layout(self.n, order, tuple(positions[(i, ())] for i in range(self.n)),
                              tuple(tuple(d) for d in by_degree), tuple(f_p), tuple(J_p))
        self._compiled: dict = {}

    # -- compiled functions ----------------------------------------------------------------
    def function(self, backend: str) -> CompiledExpressions:
        """The compiled list of every derivative for ``backend``."""
        fn = self._compiled.get(backend)
        if fn is None:
            source = self.graph.source(self.outputs, self.n + len(self.parameters), backend)
            fn = CompiledExpressions(source, backend, len(self.outputs),
                                     self.n + len(self.parameters))
            self._compiled[backend] = fn
        return fn

    def values(self, x: Any, p: Any, backend: str = "math") -> list:
        """Every compiled derivative at state ``x`` and parameters ``p``."""
        return self.function(backend)(list(x) + list(p))

    # -- dense views (numpy) --------------------------------------------------------------
    def dense(self) -> Any:
        """Index arrays for the numpy views (built once)."""
        cached = getattr(self, "_dense", None)
        if cached is None:
            cached = _DenseIndex(self.layout)
            self._dense = cached
        return cached

    # -- the engine's Taylor forms over a numeric field ---------------------------------------
    def taylor_forms(self, vals: Any, field: Any, order: int | None = None) -> TaylorForms:
        """:class:`TaylorForms` (coefficients of ``u^e``, i.e. derivative / e!)
        from compiled values ``vals``, in ``field``."""
        order = self.order if order is None else order
        n = self.n
        comps: list[dict] = [dict() for _ in range(n)]
        for k in range(1, order + 1):
            for i, idx, pos in self.layout.by_degree[k]:
                v = vals[pos]
                if not v:
                    continue
                e = [0] * n
                for j in idx:
                    e[j] += 1
                denom = 1
                for m in e:
                    if m > 1:
                        denom *= factorial(m)
                comps[i][tuple(e)] = field(v) / denom if denom != 1 else field(v)
        for i in range(n):
            v = vals[self.layout.f[i]]
            if v:
                comps[i][(0,) * n] = field(v)
        return TaylorForms(field, n, order, comps)

    def __reduce__(self) -> tuple:
        raise TypeError("CompiledTaylor is rebuilt from the model on each worker, not pickled")


class _DenseIndex:
    """numpy index arrays for f, J, the derivative tensors and the mu parts."""

    def __init__(self, layout: _Layout) -> None:
        import numpy as np

        self.n = layout.n
        self.f = np.array(layout.f, dtype=np.intp)
        d1 = layout.by_degree[1] if layout.order >= 1 else ()
        self.J = (np.array([e[0] for e in d1], dtype=np.intp),
                  np.array([e[1][0] for e in d1], dtype=np.intp),
                  np.array([e[2] for e in d1], dtype=np.intp))
        self.tensors = {}
        for k in range(2, layout.order + 1):
            rows, cols, pos = [], [], []
            for i, idx, p in layout.by_degree[k]:
                for perm in set(permutations(idx)):
                    rows.append(i)
                    cols.append(perm)
                    pos.append(p)
            cols_arr = np.array(cols, dtype=np.intp).reshape(len(cols), k)
            self.tensors[k] = (np.array(rows, dtype=np.intp), cols_arr,
                               np.array(pos, dtype=np.intp))
        self.f_p = [(np.array([e[0] for e in t], dtype=np.intp),
                     np.array([e[1] for e in t], dtype=np.intp)) for t in layout.f_p]
        self.J_p = [(np.array([e[0] for e in t], dtype=np.intp),
                     np.array([e[1] for e in t], dtype=np.intp),
                     np.array([e[2] for e in t], dtype=np.intp)) for t in layout.J_p]

    def residual(self, vals):
        return vals[self.f]

    def jacobian(self, vals):
        import numpy as np

        A = np.zeros((self.n, self.n), dtype=vals.dtype)
        i, j, p = self.J
        A[i, j] = vals[p]
        return A

    def f_param(self, vals, k: int):
        import numpy as np

        out = np.zeros(self.n, dtype=vals.dtype)
        i, p = self.f_p[k]
        out[i] = vals[p]
        return out

    def J_param(self, vals, k: int):
        import numpy as np

        out = np.zeros((self.n, self.n), dtype=vals.dtype)
        i, j, p = self.J_p[k]
        out[i, j] = vals[p]
        return out

    def form(self, vals, k: int, *vectors):
        """``D^k f [v1, ..., vk]`` (a vector; complex if any vector is)."""
        import numpy as np

        if k not in self.tensors:
            return np.zeros(self.n, dtype=complex)
        rows, cols, pos = self.tensors[k]
        w = vals[pos].astype(complex)
        for m, v in enumerate(vectors):
            w = w * v[cols[:, m]]
        out = np.zeros(self.n, dtype=complex)
        np.add.at(out, rows, w)
        return out

    def hessian_times(self, vals, v):
        """The matrix ``M`` with ``M @ u = D^2 f [u, v]`` (``v`` real)."""
        import numpy as np

        M = np.zeros((self.n, self.n), dtype=float)
        if 2 not in self.tensors:
            return M
        rows, cols, pos = self.tensors[2]
        np.add.at(M, (rows, cols[:, 0]), vals[pos] * v[cols[:, 1]])
        return M


def compile_taylor(equations: Any, states: Any, parameters: Any, active: Any,
                   order: int) -> CompiledTaylor:
    """Build a :class:`CompiledTaylor` (see there)."""
    return CompiledTaylor(equations, states, parameters, active, order)


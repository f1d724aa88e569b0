"""Frozen result objects of the Hopf analysis.

Pipeline place: engine -> **result** -> outputs (text, LaTeX, JSON, numeric
checks, plots).

Every quantity is an exact sympy expression in the remaining parameters; every
result carries the conventions it was computed in (:class:`Conventions`), so
that a number copied into a paper can be traced to its normalisation and sign.
"""

from __future__ import annotations

from dataclasses import dataclass, field, is_dataclass
from functools import cached_property
from typing import TYPE_CHECKING, Any, ClassVar, Mapping, Sequence

import sympy

from ..kinds import Classification, Side, coerce
from ..renderers import render

if TYPE_CHECKING:
    from ..checks.numeric import NumericHopfResult
    from ..local.critical import Condition
    from ..model.core import Model
    from .radical_view import RadicalView

__all__ = ["Conventions", "CONVENTIONS", "CyclePrediction", "ReducedSystemView", "StoredDetails",
           "HopfResult"]


@dataclass(frozen=True)
class Conventions:
    """The mathematical conventions of a result (stated on every output)."""

    inner_product: str = "<a, b> = conj(a)^T b"
    eigenvectors: str = ("A q = i omega q with omega > 0, A^T p = -i omega p, <p, q> = 1, and the "
                         "unit normalisation <q, q> = 1")
    normal_form: str = ("on the center manifold, x - x0 = z q + conj(z q) + O(|z|^2) and "
                        "z' = (beta + i omega) z + c1 z|z|^2 + c2 z|z|^4 + ...")
    lyapunov: str = ("l1 = Re(c1) / omega (unit-eigenvector normalisation); l_k = Re(c_k) / omega, "
                     "meaningful where l_1 = ... = l_(k-1) = 0")
    classical: str = ("for a planar system x' = -omega y + f, y' = omega x + g, the coefficient a "
                      "of Guckenheimer and Holmes (1983, Section 3.4) equals omega * l1 / 2; "
                      "other normalisations of q scale l1 by |q|^2 but never change its sign")
    sign: str = "l1 < 0: supercritical (stable cycle); l1 > 0: subcritical (unstable cycle)"
    cycle: str = ("radius rho^2 = -beta'(mu_c) (mu - mu_c) / Re(c1); amplitude of x_j is "
                  "2 rho |q_j|; period 2 pi / omega to leading order")

    def lines(self) -> tuple:
        return (self.inner_product, self.eigenvectors, self.normal_form, self.lyapunov,
                self.classical, self.sign, self.cycle)


CONVENTIONS = Conventions()


@dataclass(frozen=True)
class CyclePrediction:
    """The periodic orbit born at the Hopf point, to leading order.

    Attributes
    ----------
    side : Side
        ``"above"`` (mu > mu_c), ``"below"`` (mu < mu_c) or ``"undecided"``.
    side_condition : sympy relational or None
        For ``"undecided"``: the cycle exists for mu > mu_c exactly where this
        holds.
    stable : bool or None
        Whether the cycle is orbitally stable (l1 < 0 and the other
        eigenvalues stable); None when not decided.
    radius_squared : sympy.Expr
        ``rho^2`` as a function of the parameter symbol (unit normalisation):
        ``k (mu - mu_c)``, or ``(k (mu - mu_c))^(1/j)`` where ``l1 = ... =
        l_(j-1) = 0`` identically and ``l_j`` decides.
    amplitudes : Mapping[str, sympy.Expr]
        Half peak-to-peak amplitude of each state variable, a function of the
        bifurcation parameter symbol: ``sqrt(k_j (mu - mu_c))`` (a
        ``(2j)``-th root law where ``l_j`` decides, see ``amplitude_power``).
    amplitude_coefficients : Mapping[str, sympy.Expr]
        ``k_j`` in ``amplitude_j**2 = k_j (mu - mu_c)``; empty where the
        amplitudes follow another law (``amplitude_power != 2``).
    period : sympy.Expr
        ``2 pi / omega``.
    frequency_slope : sympy.Expr
        ``d omega_cycle / d mu`` at onset: the cycle's angular frequency is
        ``omega + frequency_slope (mu - mu_c) + O((mu - mu_c)^2)``.  NaN when
        the frequency is not linear in ``mu - mu_c`` to leading order (a
        lower ``c_i`` with ``Re c_i = 0`` but ``Im c_i != 0``).
    amplitude_power : int
        ``p`` in ``amplitude_j^p ~ (mu - mu_c)``: 2 when l1 decides, ``2j``
        when ``l_j`` decides because ``l1 = ... = l_(j-1) = 0`` identically.
    """

    side: Side
    side_condition: Any
    stable: Any
    radius_squared: sympy.Expr
    amplitudes: Mapping[str, sympy.Expr]
    amplitude_coefficients: Mapping[str, sympy.Expr]
    period: sympy.Expr
    frequency_slope: sympy.Expr
    amplitude_power: int = 2

    def __post_init__(self) -> None:
        coerce(self, side=Side)


@dataclass(frozen=True)
class ReducedSystemView:
    """The vector field on the center manifold, as sympy expressions.

    In the rotation coordinates ``(x, y)`` of the center plane the reduced
    system reads ``x' = -omega y + f(x, y)``, ``y' = omega x + g(x, y)``, with
    ``state = x0 + x Re(q) - y Im(q) + h`` for the (non-normalised) eigenvector
    ``q`` in ``eigenvector``.  ``manifold`` gives the graph ``h`` to the
    computed order as expressions in ``(x, y)``.  ``x``, ``y`` and ``omega``
    are symbols chosen not to clash with the model's names (``omega`` stands
    for the result's ``omega``).
    """

    x: sympy.Symbol
    y: sympy.Symbol
    f: sympy.Expr
    g: sympy.Expr
    order: int
    eigenvector: tuple
    manifold: tuple
    omega: sympy.Symbol = sympy.Symbol("omega", positive=True)

    def equations(self) -> tuple[sympy.Eq, sympy.Eq]:
        """``(x' = -omega y + f, y' = omega x + g)`` as sympy equations."""
        return (sympy.Eq(sympy.Symbol(f"{self.x}'"), -self.omega * self.y + self.f),
                sympy.Eq(sympy.Symbol(f"{self.y}'"), self.omega * self.x + self.g))

    def to_latex(self) -> str:
        """The reduced system as a LaTeX ``aligned`` block."""
        lx, ly = sympy.latex(self.x), sympy.latex(self.y)
        fx = sympy.latex(-self.omega * self.y + self.f)
        fy = sympy.latex(self.omega * self.x + self.g)
        return (f"\\begin{{aligned}} \\dot{{{lx}}} &= {fx} \\\\ "
                f"\\dot{{{ly}}} &= {fy} \\end{{aligned}}")

    def _repr_latex_(self) -> str:
        return f"$${self.to_latex()}$$"

    def __str__(self) -> str:
        return (f"{self.x}' = {sympy.sstr(-self.omega * self.y + self.f)}\n"
                f"{self.y}' = {sympy.sstr(self.omega * self.x + self.g)}")


@dataclass(frozen=True)
class HopfResult:
    """The Hopf analysis of one branch of the critical set.

    All expressions are exact sympy objects in the model's remaining
    parameters; see :attr:`conventions` for the normalisation.
    """

    result_kind: ClassVar[str] = "hopf"

    model: Model
    parameter: str
    parameter_symbol: sympy.Symbol
    equilibrium: Mapping[str, sympy.Expr]
    equilibrium_how: str
    critical_value: sympy.Expr
    omega_squared: sympy.Expr
    omega: sympy.Expr
    transversality: sympy.Expr
    eigenvalue_derivative: sympy.Expr
    c1: sympy.Expr
    l1: sympy.Expr
    planar_coefficient: sympy.Expr
    lyapunov_coefficients: tuple
    classification: Classification
    verdict: str
    supercritical_where: Any
    l1_zero_set: Any
    conditions: tuple
    cycle: CyclePrediction
    q_norm_squared: sympy.Expr
    routes_agree: bool
    branch_index: int
    branch_count: int
    substitutions: Mapping[str, sympy.Expr]
    notes: tuple
    assumptions: Mapping[str, str]
    conventions: Conventions = CONVENTIONS
    status: str = "closed form"
    _details: Any = field(default=None, repr=False, compare=False)
    #: ``(parameter record, value)`` of the parameters fixed before the analysis (``values=``)
    fixed_parameters: tuple = ()
    #: how the family was parametrised by the equilibrium (``eliminate=``), or None:
    #: a :class:`~criticality.local.parametrise.Parametrisation` (unknowns, coordinates,
    #: eliminated parameters, factors assumed non-zero)
    parametrisation: Any = None
    #: the Hopf condition back in the original parameters, as far as it exists
    #: (:class:`~criticality.hopf_analysis.direct.DirectForms`), for a parametrised family
    direct_forms: Any = None

    def __post_init__(self) -> None:
        coerce(self, classification=Classification)

    # -- computed on first access (display-oriented, not needed for the verdict) ----------
    @cached_property
    def reduced_system(self) -> ReducedSystemView:
        """The vector field on the center manifold (see :class:`ReducedSystemView`)."""
        return self._details.reduced_system()

    @cached_property
    def jacobian(self) -> sympy.Matrix:
        """The Jacobian at the equilibrium at the critical point."""
        return self._details.jacobian()

    @cached_property
    def characteristic_polynomial(self) -> sympy.Expr:
        """``det(lambda I - A)`` at the critical point, as
        ``(lambda^2 + omega^2) * (rest)``."""
        return self._details.characteristic_polynomial()

    @cached_property
    def eigenvector_q(self) -> tuple:
        """``q`` with ``A q = i omega q`` (not normalised; ``<q, q>`` is
        ``q_norm_squared``), as expressions in ``omega``."""
        return self._details.eigenvector_q()

    @cached_property
    def eigenvector_p(self) -> tuple:
        """``p`` with ``A^T p = -i omega p`` and ``<p, q> = 1``."""
        return self._details.eigenvector_p()

    # -- derived -------------------------------------------------------------------------
    @property
    def l2(self) -> sympy.Expr | None:
        """The second Lyapunov coefficient, or None if not computed (use order=5)."""
        return self.lyapunov_coefficients[1] if len(self.lyapunov_coefficients) > 1 else None

    @property
    def period(self) -> sympy.Expr:
        return self.cycle.period

    def condition(self, key: str) -> Condition:
        """The condition with the given key (e.g. ``"omega_squared_positive"``)."""
        for c in self.conditions:
            if c.key == key:
                return c
        raise KeyError(key)

    def family_point(self, values: Mapping | None = None, **kwargs: object) -> dict:
        """The point in the original parameters that a point of a
        parametrised family stands for: the eliminated parameters and the
        critical value at the given free symbols (``x_eq=1, b=2``), exact.

        This is the forward direction (rational in the coordinates); the
        way back, from the original parameters to the coordinates, solves
        the equilibrium equations and is what :attr:`direct_forms` states
        as far as it exists.
        """
        from ..checks.numeric import parameter_values
        from ..local.options import check_point

        merged = dict(values or {})
        merged.update(kwargs)
        exact = parameter_values(self, check_point(merged))
        table = {s: exact[s.name] for e in (self.critical_value, *self.substitutions.values())
                 for s in e.free_symbols if s.name in exact}
        mu_c = sympy.cancel(self.critical_value.xreplace(table))
        out = {name: sympy.cancel(v.xreplace(table).xreplace({self.parameter_symbol: mu_c}))
               for name, v in self.substitutions.items()}
        out[self.parameter] = mu_c
        out.update({k: v for k, v in exact.items() if k in self.model.symbols})
        return out

    # -- the user's own symbols -------------------------------------------------------------
    def with_declared_symbols(self) -> "HopfResult":
        """This result, unchanged; kept for compatibility.  A result already
        speaks in the model's :attr:`~criticality.Model.symbols`, which carry
        the declared assumptions, so ``sympy.Symbol("A", positive=True)``
        matches a parameter declared positive.

        Examples
        --------
        >>> import sympy
        >>> from criticality import Model, hopf
        >>> m = Model(["x", "y"], {"x": "A - (B + 1)*x + x^2*y", "y": "B*x - x^2*y"},
        ...           {"A": "positive", "B": "positive"})
        >>> r = hopf(m, "B")
        >>> r.with_declared_symbols() is r
        True
        >>> r.critical_value.subs(sympy.Symbol("A", positive=True), 2)
        5
        """
        return self

    # -- numeric ---------------------------------------------------------------------------
    def evaluate(self, values: Mapping | None = None, *, digits: int = 30,
                 **kwargs: object) -> NumericHopfResult:
        """Every quantity at a parameter point, to ``digits`` significant digits.

        Parameters are given as a mapping or as keywords (``r.evaluate(a=1)``);
        returns a :class:`criticality.checks.numeric.NumericHopfResult`.
        """
        from ..checks.numeric import evaluate_result

        merged = dict(values or {})
        merged.update(kwargs)
        return evaluate_result(self, merged, digits=digits)

    def in_radicals(self, *, trigonometric: bool = False) -> "RadicalView":
        """The critical value, omega^2, omega, the transversality and l1 with
        each algebraic critical value (``RealAlgebraicRoot``, a root of a
        polynomial of degree 3 or more) in closed form, where one in real
        radicals exists: binomials (``b^3 = a^2`` gives ``a^(2/3)``), cubics
        with one real root (Cardano), quartics in ``mu^2``.  A cubic with
        three real roots has none (the casus irreducibilis):
        ``trigonometric=True`` gives its cosine form.  The view states the
        sign conditions the form relies on that the declared assumptions do
        not decide (:class:`~criticality.hopf_analysis.radical_view.RadicalView`).

        Raises
        ------
        ClosedFormUnavailableError
            Where no such form exists or a sign it needs is proved false.
        """
        from .radical_view import radical_view

        return radical_view(self, trigonometric=trigonometric)

    def evaluate_many(self, points: Mapping,
                      quantities: Sequence[str] = ("critical_value", "omega", "l1"),
                      **kwargs: Any) -> Mapping:
        """Quantities at many parameter points: arrays in, arrays out
        (float64, compiled once; see :func:`criticality.checks.sweeps.evaluate_many`)."""
        from ..checks.sweeps import evaluate_many

        return evaluate_many(self, points, quantities, **kwargs)

    # -- outputs (rendered by the renderers registered for the kind "hopf") ----------------
    def summary(self) -> str:
        """A short plain-text summary (at most 40 lines): the verdict, the main
        quantities, the condition, one line of conventions, the cautions."""
        return render(self, "text")

    def details(self) -> str:
        """The full plain text: every quantity, the conditions, the cycle, the
        notes, every convention and caution."""
        return render(self, "details")

    def to_latex(self) -> str:
        """Every quantity as a LaTeX equation (an ``align``-ready block)."""
        return render(self, "latex")

    def to_report(self, **options: Any) -> str:
        """The LaTeX derivation report (``fragment=True``: no preamble)."""
        return render(self, "report", **options)

    def to_json(self, **kwargs: Any) -> str:
        """The result as JSON in the documented, versioned schema."""
        return render(self, "json", **kwargs)

    def to_numpy_module(self) -> str:
        """The closed forms as a standalone Python module (numpy only)."""
        return render(self, "numpy")

    def to_c(self, prefix: str = "hopf_") -> str:
        """The closed forms as C99 functions (``math.h`` only)."""
        return render(self, "c", prefix=prefix)

    def _repr_latex_(self):
        return render(self, "notebook_latex")

    def _repr_html_(self):
        return render(self, "html")

    def _repr_markdown_(self):
        return render(self, "markdown")

    def _latex(self, printer=None):
        return self.to_latex()

    def _sympystr(self, printer=None):
        return self.summary()

    def __str__(self) -> str:
        return self.summary()

    def __repr__(self) -> str:
        return (f"HopfResult(parameter={self.parameter!r}, critical_value={self.critical_value}, "
                f"classification={self.classification!r})")

    # -- pickling: the lazy parts leave as plain sympy data --------------------------------
    def __getstate__(self) -> dict:
        """The instance state with the display-oriented parts built and stored
        as sympy objects, so that no field element (a python-flint object) or
        closure of the engine is pickled."""
        state = dict(self.__dict__)
        if self._details is not None and not getattr(self._details, "portable", False):
            state["_details"] = StoredDetails.of(self)
        return {k: v if k == "model" else _keep_shape(v) for k, v in state.items()}


@dataclass(frozen=True)
class StoredDetails:
    """The display-oriented parts of a :class:`HopfResult` as plain sympy
    data (what a pickled result carries instead of the engine's field
    elements); the same methods as the engine's lazy builder."""

    reduced: ReducedSystemView
    jacobian_matrix: sympy.Matrix
    charpoly: sympy.Expr
    q: tuple
    p: tuple
    portable: ClassVar[bool] = True

    @classmethod
    def of(cls, result: "HopfResult") -> "StoredDetails":
        """Build every display-oriented part of ``result`` once."""
        return cls(result.reduced_system, result.jacobian, result.characteristic_polynomial,
                   result.eigenvector_q, result.eigenvector_p)

    def reduced_system(self) -> ReducedSystemView:
        return self.reduced

    def jacobian(self) -> sympy.Matrix:
        return self.jacobian_matrix

    def characteristic_polynomial(self) -> sympy.Expr:
        return self.charpoly

    def eigenvector_q(self) -> tuple:
        return self.q

    def eigenvector_p(self) -> tuple:
        return self.p


# -- pickling expressions in the shape they were built in ---------------------------------
# sympy pickles an expression as its class and arguments and rebuilds it with evaluation;
# the engine builds some products and roots unevaluated (to spare sympy's assumption
# queries), which evaluation would regroup.  These helpers store the tree node by node and
# rebuild Add, Mul and Pow unevaluated, so that a pickled result equals the original.

_UNEVALUATED = (sympy.Add, sympy.Mul, sympy.Pow)


class _Shape:
    """An expression tree stored node by node (pickles to a nested tuple)."""

    __slots__ = ("tree",)

    def __init__(self, expr: sympy.Basic) -> None:
        self.tree = _tree(expr)

    def __reduce__(self):
        return _rebuild, (self.tree,)


def _tree(expr):
    """``(class, unevaluated?, argument trees)``, or the atom itself."""
    if not isinstance(expr, sympy.Basic) or not expr.args or \
            type(expr).__getnewargs__ is not sympy.Basic.__getnewargs__:
        return expr
    return (type(expr), isinstance(expr, _UNEVALUATED), tuple(_tree(a) for a in expr.args))


def _rebuild(tree):
    if not isinstance(tree, tuple):
        return tree
    cls, unevaluated, args = tree
    args = tuple(_rebuild(a) for a in args)
    return cls(*args, evaluate=False) if unevaluated else cls(*args)


def _keep_shape(value):
    """``value`` with every sympy expression (also inside containers and frozen
    dataclasses) wrapped for a shape-preserving pickle."""
    if isinstance(value, sympy.Basic):
        return _Shape(value) if value.args else value
    if isinstance(value, dict):
        return {k: _keep_shape(v) for k, v in value.items()}
    if isinstance(value, tuple) and not hasattr(value, "_fields"):
        return tuple(_keep_shape(v) for v in value)
    if is_dataclass(value) and not isinstance(value, type) and hasattr(value, "__dict__") and \
            type(value).__reduce__ is object.__reduce__ and \
            type(value).__reduce_ex__ is object.__reduce_ex__:
        copy = object.__new__(type(value))
        copy.__dict__.update({k: _keep_shape(v) for k, v in value.__dict__.items()})
        return copy
    return value

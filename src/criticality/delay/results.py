"""The frozen result of the Hopf analysis of a retarded equation.

Pipeline place: normal form -> **result** -> outputs (text, LaTeX, JSON),
``evaluate`` and the validation by simulation.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any, ClassVar, Mapping

import sympy

from ..hopf_analysis.results import CyclePrediction
from ..renderers import Rendered, render
from ..kinds import Classification, coerce

if TYPE_CHECKING:
    from ..model.core import Model
    from .evaluate import NumericDelayResult
    from .simulate import DelayValidation

__all__ = ["DelayConventions", "DELAY_CONVENTIONS", "DelayHopfResult"]


@dataclass(frozen=True)
class DelayConventions:
    """The conventions of a delay Hopf result (stated on every output)."""

    equation: str = ("retarded equation x' = f(x(t), x(t - tau_1), ...); linear part "
                     "L phi = A_0 phi(0) + sum_k A_k phi(-tau_k); characteristic matrix "
                     "Delta(lambda) = lambda I - A_0 - sum_k A_k exp(-lambda tau_k)")
    eigenfunctions: str = ("q(theta) = q exp(i omega theta) on [-tau_max, 0] with "
                           "Delta(i omega) q = 0 and omega > 0; adjoint psi(s) = p exp(-i omega s) "
                           "on [0, tau_max] with p Delta(i omega) = 0 (p a row vector)")
    pairing: str = ("bilinear form <psi, phi> = psi(0) phi(0) - sum_k int_{-tau_k}^0 "
                    "psi(xi + tau_k) A_k phi(xi) d xi; <psi, q> = p Delta'(i omega) q, "
                    "normalised to 1; Delta'(lambda) = I + sum_k tau_k A_k exp(-lambda tau_k)")
    normal_form: str = ("on the center manifold x_t(theta) - x0 = z q(theta) + conj(z q(theta)) "
                        "+ O(|z|^2) and z' = (beta + i omega) z + c1 z|z|^2 + ...; c1 is "
                        "reported for the unit normalisation conj(q)^T q = 1")
    lyapunov: str = "l1 = Re(c1) / omega; l1 < 0 supercritical, l1 > 0 subcritical"
    cycle: str = ("radius rho^2 = -beta'(mu_c) (mu - mu_c) / Re(c1) with beta = Re lambda; "
                  "amplitude of x_j is 2 rho |q_j|; period 2 pi / omega to leading order")
    crossing: str = ("critical delays tau_j = (theta + 2 pi j) / omega, j = 0, 1, ..., where "
                     "exp(-i omega tau) = -P(i omega)/Q(i omega); sign Re(d lambda/d tau) = "
                     "sign F'(omega^2) with F(s) = |P(i sqrt s)|^2 - |Q(i sqrt s)|^2 "
                     "(Cooke and van den Driessche 1986)")

    def lines(self) -> tuple:
        return (self.equation, self.eigenfunctions, self.pairing, self.normal_form,
                self.lyapunov, self.cycle, self.crossing)


DELAY_CONVENTIONS = DelayConventions()


@dataclass(frozen=True)
class DelayHopfResult(Rendered):
    """Hopf bifurcation of a retarded equation, in closed form.

    Attributes
    ----------
    model : criticality.Model
    parameter : str
        The bifurcation parameter (a delay in ``mode == "delay"``).
    mode : str
        ``"delay"`` (the delay is the bifurcation parameter) or
        ``"parameter"`` (another parameter, the delays fixed).
    delays : tuple of sympy.Expr
    equilibrium : Mapping[str, sympy.Expr]
    matrices : tuple of sympy.Matrix
        ``A_0, A_1, ...`` of the linear part.
    quasi_polynomial : sympy.Expr
        ``det Delta(lambda)`` in ``lambda`` (symbol ``lambda``).
    P, Q : sympy.Expr
        ``quasi_polynomial = P(lambda) + Q(lambda) exp(-lambda tau)``.
    frequency_polynomial : sympy.Expr
        ``F(s) = |P(i sqrt s)|^2 - |Q(i sqrt s)|^2`` (symbol ``s = omega^2``).
    omega, theta : sympy.Expr
        The crossing frequency and the phase ``omega tau mod 2 pi`` of the first crossing.
    critical_value : sympy.Expr
        The first critical value (``tau_0`` or ``mu_0``).
    critical_sequence : sympy.Expr
        Every critical value as a function of ``j = 0, 1, 2, ...`` (symbol ``j``).
    crossing_indicator : sympy.Expr
        Delay mode: ``F'(omega^2)``, whose sign is the crossing direction at
        every ``tau_j``.  Parameter mode: ``Re(d lambda/d mu)``.
    crossing_direction : int or None
        +1 (roots move to the right as the parameter grows), -1, or None (undecided).
    transversality : sympy.Expr
        ``Re(d lambda/d mu)`` at the first crossing.
    eigenvalue_derivative : sympy.Expr
        ``d lambda/d mu`` there (complex).
    c1 : sympy.Expr
        The first normal-form coefficient (unit normalisation, complex).
    l1 : sympy.Expr
        ``Re(c1)/omega``.
    l1_sequence : sympy.Expr or None
        Delay mode: ``l1`` at ``tau_j`` as a function of ``j``.
    classification : str
        ``"supercritical"``, ``"subcritical"``, ``"depends"`` or ``"degenerate"``.
    verdict : str
    criticality_condition : sympy relational or bool
        ``l1 < 0`` (supercritical) written in the parameters.
    conditions : tuple
        Side conditions of the crossing that the assumptions do not decide.
    stability_conditions : tuple of str
        What the other roots must satisfy for the first crossing to be a loss
        of stability (stated, not assumed).
    eigenvector_q, eigenvector_p : tuple of sympy.Expr
        ``q`` and ``p`` normalised so that ``p Delta'(i omega) q = 1``
        (``q`` as computed; ``q_norm_squared = conj(q)^T q``).
    cycle : CyclePrediction
    routes_agree : bool
        The projection form and the Hassard-Kazarinoff-Wan procedure give the same c1.
    compact : Mapping[str, sympy.Expr]
        Where omega or the critical value hold radicals or acos: ``c1``, ``l1``
        and ``transversality`` as rational functions of the symbols ``omega``
        and ``tau_0`` (the closed forms above), which read far shorter.
    """

    model: Model
    parameter: str
    mode: str
    delays: tuple
    equilibrium: Mapping
    matrices: tuple
    quasi_polynomial: sympy.Expr
    P: sympy.Expr
    Q: sympy.Expr
    frequency_polynomial: sympy.Expr
    omega: sympy.Expr
    theta: sympy.Expr
    critical_value: sympy.Expr
    critical_sequence: sympy.Expr
    crossing_indicator: sympy.Expr
    crossing_direction: Any
    transversality: sympy.Expr
    eigenvalue_derivative: sympy.Expr
    c1: sympy.Expr
    l1: sympy.Expr
    l1_sequence: Any
    classification: Classification
    verdict: str
    criticality_condition: Any
    conditions: tuple
    stability_conditions: tuple
    eigenvector_q: tuple
    eigenvector_p: tuple
    q_norm_squared: sympy.Expr
    cycle: CyclePrediction
    routes_agree: bool
    notes: tuple = ()
    compact: Mapping = field(default_factory=dict)
    conventions: DelayConventions = DELAY_CONVENTIONS
    kind: str = "hopf_delay"
    result_kind: ClassVar[str] = "hopf_delay"
    status: str = "closed form"
    _details: object = field(default=None, repr=False, compare=False)

    def __post_init__(self) -> None:
        coerce(self, classification=Classification)

    @property
    def parameter_symbol(self) -> sympy.Symbol:
        return self.model.symbols[self.parameter]

    @property
    def period(self) -> sympy.Expr:
        """``2 pi / omega``."""
        return 2 * sympy.pi / self.omega

    @property
    def omega_squared(self) -> sympy.Expr:
        return sympy.expand(self.omega ** 2)

    @property
    def lyapunov_coefficients(self) -> tuple:
        return (self.l1,)

    def critical_values(self, count: int = 3) -> tuple:
        """The first ``count`` critical values ``j = 0 .. count-1``."""
        from .critical import J_INDEX
        return tuple(sympy.simplify(self.critical_sequence.xreplace({J_INDEX: j}))
                     for j in range(count))

    def evaluate(self, values: Mapping | None = None, *, digits: int = 30) -> NumericDelayResult:
        """Every quantity at a parameter point, to ``digits`` digits (mpmath), with
        an independent check: the residual of the quasi-polynomial at ``i omega``.

        Returns a dict of mpmath numbers (``residual`` should be ~0)."""
        from .evaluate import evaluate_result
        return evaluate_result(self, values or {}, digits)

    def latex_document(self) -> str:
        """The report as a complete LaTeX document."""
        return render(self, "report")

    def to_json(self, *, point: Mapping | None = None,  # type: ignore[override]
                digits: int = 30) -> str:  # narrower than Rendered: the delay JSON takes a point
        """The result as JSON in the shared envelope (with numbers at ``point``)."""
        return render(self, "json", point=point, digits=digits)

    def to_dict(self, *, point: Mapping | None = None,  # type: ignore[override]
                digits: int = 30) -> dict:
        """The JSON document as a dictionary."""
        return render(self, "dict", point=point, digits=digits)

    def validate(self, values: Mapping | None = None, **options: Any) -> DelayValidation:
        """Simulate the delay equation near onset (:func:`criticality.delay.validate_delay`)."""
        from .simulate import validate_delay
        return validate_delay(self, values or {}, **options)

    def to_latex_inline(self) -> str:
        from .render import latex_inline
        return latex_inline(self)

    def _sympystr(self, printer=None):
        return self.summary()

    def __repr__(self) -> str:
        return (f"DelayHopfResult(parameter={self.parameter!r}, mode={self.mode!r}, "
                f"critical_value={self.critical_value}, omega={self.omega}, l1={self.l1}, "
                f"classification={self.classification!r})")

"""The report of a simulation check: frozen values that print as a table.

Pipeline place: result -> validation (simulation) -> **report** -> text,
LaTeX.

:class:`ValidationReport` gathers one :class:`CycleMeasurement` per offset
``mu - mu_c`` (predicted and measured amplitudes and periods, relative
errors) and, for a subcritical onset, one :class:`BracketOutcome` per offset
(starts inside and outside the predicted unstable cycle).  ``str(report)``
gives a plain-text table; :meth:`ValidationReport.to_latex` a LaTeX fragment
(a ``tabular`` and a verdict sentence) that compiles without extra packages.
Building strings is pure; nothing here prints or writes files.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar, Mapping

from ..kinds import Classification, RunStatus, Side, coerce
from ..outputs.escape import tex_text
from ..renderers import render

__all__ = ["CycleMeasurement", "BracketOutcome", "ValidationReport"]

#: the verdicts a report can carry
VERDICTS = ("confirmed", "not confirmed", "inconclusive")


@dataclass(frozen=True)
class CycleMeasurement:
    """The cycle measured by simulation at one offset.

    Attributes
    ----------
    offset : float
        ``mu - mu_c`` (its sign is the side where the cycle exists).
    mu : float
        The value of the bifurcation parameter.
    approach : str
        How the cycle was found: ``"forward"`` (integration past the
        transient), ``"backward"`` (the same in reversed time, for a cycle
        that repels in every direction) or ``"shooting"`` (Newton's method on
        the periodic orbit, for a cycle that integration cannot reach).
    status : str
        ``"measured"``, ``"escaped"`` (the orbit left the neighbourhood: no
        cycle there), ``"decayed"`` (it fell onto the equilibrium) or
        ``"undecided"``.
    predicted_amplitudes, measured_amplitudes : mapping of str to float
        Half peak-to-peak amplitude of each state (measured: empty unless
        measured).
    amplitude_errors : mapping of str to float or None
        ``measured / predicted - 1``; None for a state whose predicted
        amplitude vanishes at leading order.
    predicted_period : float
        ``2 pi / omega``.
    corrected_period : float
        ``2 pi / (omega + frequency_slope * offset)`` (first order).
    measured_period, period_error, corrected_period_error : float or None
        The measured period and its relative errors against the two
        predictions.
    settle_time : float
        Time integrated before the measurement window (0 for shooting).
    window : float
        Length of the measurement window.
    drift : float or None
        Relative change of the amplitude between the two halves of the
        window (what is left of the transient); for shooting, the size of
        the last Newton step relative to the radius.
    floquet : float or None
        Shooting only: the largest modulus of the nontrivial Floquet
        multipliers (below 1: the cycle attracts; above 1: it repels in some
        direction).
    predicted_floquet : float or None
        Its prediction: the larger of the radial multiplier
        ``exp(-2 Re(dlambda/dmu) (mu - mu_c) T)`` and ``exp(Re(lambda_k) T)``
        for the other eigenvalues, with the measured period ``T``.
    floquet_error : float or None
        ``log(floquet) / log(predicted_floquet) - 1``.
    """

    offset: float
    mu: float
    approach: str
    status: RunStatus
    predicted_amplitudes: Mapping[str, float]
    measured_amplitudes: Mapping[str, float]
    amplitude_errors: Mapping[str, float | None]
    predicted_period: float
    corrected_period: float
    measured_period: float | None
    period_error: float | None
    corrected_period_error: float | None
    settle_time: float
    window: float
    drift: float | None
    floquet: float | None = None
    predicted_floquet: float | None = None
    floquet_error: float | None = None

    def __post_init__(self) -> None:
        coerce(self, status=RunStatus)

    @property
    def measured(self) -> bool:
        return self.status == RunStatus.MEASURED

    @property
    def worst_amplitude_error(self) -> float | None:
        """The largest |relative error| over the states with a prediction."""
        errs = [abs(e) for e in self.amplitude_errors.values() if e is not None]
        return max(errs) if errs else None


@dataclass(frozen=True)
class BracketOutcome:
    """Starts inside and outside a predicted unstable cycle, at one offset.

    Attributes
    ----------
    offset, mu : float
        As in :class:`CycleMeasurement` (on the side where the equilibrium is
        stable and the unstable cycle exists).
    radius : float
        The predicted radius ``rho`` in the center coordinate.
    predicted_amplitudes : mapping of str to float
        The predicted amplitude of each state (``2 rho |q_j|``).
    inside_factor, outside_factor : float
        The starts, as multiples of the predicted radius along the cycle.
    inside, outside : str
        ``"decayed"`` (fell onto the equilibrium), ``"escaped"`` (left the
        neighbourhood) or ``"undecided"`` (neither within the time limit).
    inside_time, outside_time : float
        When the outcome was reached (or the time limit).
    """

    offset: float
    mu: float
    radius: float
    predicted_amplitudes: Mapping[str, float]
    inside_factor: float
    inside: RunStatus
    inside_time: float
    outside_factor: float
    outside: RunStatus
    outside_time: float

    def __post_init__(self) -> None:
        coerce(self, inside=RunStatus, outside=RunStatus)

    @property
    def as_predicted(self) -> bool:
        """The inside start decays and the outside start leaves."""
        return self.inside == "decayed" and self.outside == "escaped"


@dataclass(frozen=True)
class ValidationReport:
    """The outcome of :func:`criticality.validate`.

    Attributes
    ----------
    parameter : str
        The bifurcation parameter.
    values : mapping of str to float
        The other parameters at the checked point.
    critical_value, omega, l1 : float
        The prediction at that point.
    classification : str
        ``"supercritical"`` or ``"subcritical"`` (from the sign of l1 there).
    side : str
        ``"above"`` or ``"below"``: where the predicted cycle exists.
    predicted_stable : bool
        Whether the predicted cycle attracts (l1 < 0 and the other
        eigenvalues stable).
    states : tuple of str
    measurements : tuple of CycleMeasurement
        One per offset (empty when the cycle cannot be reached by
        integration in either time direction).
    brackets : tuple of BracketOutcome
        One per offset for a subcritical onset, else empty.
    orders : tuple of float or None
        Observed order of the amplitude error between successive offsets,
        ``log(e_i / e_(i+1)) / log(d_i / d_(i+1))`` (None where undefined).
    verdict : str
        ``"confirmed"``, ``"not confirmed"`` or ``"inconclusive"``.
    reasons : tuple of str
        Why the verdict is what it is, one sentence each.
    warnings : tuple of str
        Things the user should know (a poor local prediction, a capped
        transient, ...).
    tolerance : float
        The largest relative amplitude error accepted at the smallest offset.
    method : str
        The scipy integrator used.
    rtol : float
        Its relative tolerance.
    elapsed : float
        Wall-clock seconds spent.
    """

    result_kind: ClassVar[str] = "validation"

    parameter: str
    values: Mapping[str, float]
    critical_value: float
    omega: float
    l1: float
    classification: Classification
    side: Side
    predicted_stable: bool
    states: tuple
    measurements: tuple
    brackets: tuple
    orders: tuple
    verdict: str
    reasons: tuple
    warnings: tuple
    tolerance: float
    method: str
    rtol: float
    elapsed: float

    def __post_init__(self) -> None:
        coerce(self, classification=Classification, side=Side)

    @property
    def confirmed(self) -> bool:
        """True when the simulation confirms the prediction."""
        return self.verdict == "confirmed"

    def __str__(self) -> str:
        return "\n".join(_text_lines(self))

    def to_latex(self) -> str:
        """The report as a LaTeX fragment (a ``tabular`` and the verdict)."""
        return "\n".join(_latex_lines(self))

    def _repr_html_(self) -> str:
        return render(self, "html")

    def _repr_markdown_(self) -> str:
        return render(self, "markdown")


# -- text -------------------------------------------------------------------------------------

_APPROACH = {"forward": "", "backward": " (reversed time)", "shooting": " (shooting)"}


def _g(x, digits: int = 6) -> str:
    if x is None:
        return "-"
    return f"{x:.{digits}g}"


def _e(x) -> str:
    return "-" if x is None else f"{x:+.2e}"


def _header(r: ValidationReport) -> list:
    at = ", ".join(f"{k} = {_g(v)}" for k, v in sorted(r.values.items()))
    return [f"Simulation check of the Hopf prediction in {r.parameter}"
            + (f" at {at}" if at else ""),
            f"  {r.parameter}_c = {_g(r.critical_value, 10)}, omega = {_g(r.omega, 10)}, "
            f"l1 = {_g(r.l1)} ({r.classification}); the cycle exists "
            f"{r.side} {r.parameter}_c",
            f"  integrator {r.method}, rtol {r.rtol:.0e}, {r.elapsed:.1f} s"]


def _rows(r: ValidationReport) -> list:
    rows = []
    for m in r.measurements:
        off = f"{m.offset:+.4g}" + _APPROACH[m.approach]
        if not m.measured:
            rows.append((off, "-", "-", m.status, "-"))
            continue
        for s in r.states:
            rows.append((off, s, _g(m.predicted_amplitudes[s]), _g(m.measured_amplitudes.get(s)),
                         _e(m.amplitude_errors.get(s))))
            off = ""
        rows.append(("", "period", _g(m.corrected_period, 8), _g(m.measured_period, 8),
                     _e(m.corrected_period_error)))
        if m.floquet is not None:
            rows.append(("", "max |Floquet|", _g(m.predicted_floquet, 8), _g(m.floquet, 8),
                         _e(m.floquet_error)))
    return rows


def _table(head, rows) -> list:
    widths = [max(len(str(x)) for x in col) for col in zip(head, *rows)]
    fmt = lambda row: "  " + "  ".join(str(x).ljust(w) for x, w in zip(row, widths))  # noqa: E731
    return [fmt(head), "  " + "  ".join("-" * w for w in widths)] + [fmt(x) for x in rows]


def _bracket_rows(r: ValidationReport) -> list:
    return [(f"{b.offset:+.4g}", _g(b.radius), f"{b.inside_factor:g} x: {b.inside} "
             f"(t = {b.inside_time:.4g})", f"{b.outside_factor:g} x: {b.outside} "
             f"(t = {b.outside_time:.4g})", "yes" if b.as_predicted else "no")
            for b in r.brackets]


def _text_lines(r: ValidationReport) -> list:
    lines = _header(r)
    if r.measurements:
        lines += ["", "Amplitudes (half peak-to-peak) and period; the period is predicted to "
                  "first order in the offset", ""]
        lines += _table((f"{r.parameter} - {r.parameter}_c", "state", "predicted", "measured",
                         "rel. error"), _rows(r))
    if r.orders:
        lines += ["", "  observed order of the amplitude error: "
                  + ", ".join("-" if o is None else f"{o:.2f}" for o in r.orders)]
    if r.brackets:
        lines += ["", "Bracketing of the unstable cycle (starts along the predicted cycle)", ""]
        lines += _table(("offset", "radius", "inside start", "outside start", "as predicted"),
                        _bracket_rows(r))
    lines += ["", f"Verdict: {r.verdict}"] + [f"  - {x}" for x in r.reasons]
    if r.warnings:
        lines += ["Warnings:"] + [f"  - {w}" for w in r.warnings]
    return lines


# -- LaTeX ------------------------------------------------------------------------------------


def _tex_name(name: str) -> str:
    if "_" in name:
        head, tail = name.split("_", 1)
        return f"{_tex_name(head)}_{{\\mathrm{{{tail.replace('_', '')}}}}}"
    greek = {"alpha", "beta", "gamma", "delta", "epsilon", "mu", "nu", "sigma", "omega", "rho",
             "kappa", "lambda", "tau", "theta", "eta", "xi", "zeta", "phi", "psi", "chi"}
    return f"\\{name}" if name in greek else (name if len(name) == 1 else f"\\mathit{{{name}}}")


def _tex_num(x, digits: int = 6) -> str:
    if x is None:
        return "--"
    text = f"{x:.{digits}g}"
    if "e" in text:
        mant, exp = text.split("e")
        return f"{mant} \\cdot 10^{{{int(exp)}}}"
    return text


def _tex_err(x) -> str:
    return "--" if x is None else _tex_num(x, 2)


def _latex_measurements(r: ValidationReport, p: str) -> list:
    lines = ["\\begin{tabular}{rlrrr}", "\\hline",
             f"${p} - {p}_c$ & & predicted & measured & relative error \\\\", "\\hline"]
    for m in r.measurements:
        off = f"${_tex_num(m.offset, 4)}$" + _APPROACH[m.approach]
        if not m.measured:
            lines.append(f"{off} & & & {m.status} & \\\\")
            continue
        for s in r.states:
            cells = (_tex_num(m.predicted_amplitudes[s]), _tex_num(m.measured_amplitudes.get(s)),
                     _tex_err(m.amplitude_errors.get(s)))
            lines.append(f"{off} & ${_tex_name(s)}$ & " + " & ".join(f"${c}$" for c in cells)
                         + " \\\\")
            off = ""
        cells = (_tex_num(m.corrected_period, 8), _tex_num(m.measured_period, 8),
                 _tex_err(m.corrected_period_error))
        lines.append(" & period & " + " & ".join(f"${c}$" for c in cells) + " \\\\")
        if m.floquet is not None:
            cells = (_tex_num(m.predicted_floquet, 8), _tex_num(m.floquet, 8),
                     _tex_err(m.floquet_error))
            lines.append(" & $\\max|\\rho_k|$ & " + " & ".join(f"${c}$" for c in cells)
                         + " \\\\")
    return lines + ["\\hline", "\\end{tabular}", ""]


def _latex_brackets(r: ValidationReport) -> list:
    lines = ["\\begin{tabular}{rrll}", "\\hline",
             "offset & radius & inside start & outside start \\\\", "\\hline"]
    for b in r.brackets:
        lines.append(f"${_tex_num(b.offset, 4)}$ & ${_tex_num(b.radius)}$ & "
                     f"{b.inside_factor:g}: {b.inside} & {b.outside_factor:g}: {b.outside} \\\\")
    return lines + ["\\hline", "\\end{tabular}", ""]


def _latex_lines(r: ValidationReport) -> list:
    p = _tex_name(r.parameter)
    lines = [f"% simulation check of the Hopf prediction ({r.method}, rtol {r.rtol:.0e})",
             f"$ {p}_c = {_tex_num(r.critical_value, 10)}$, "
             f"$\\omega = {_tex_num(r.omega, 10)}$, $l_1 = {_tex_num(r.l1)}$ "
             f"({r.classification}).\n"]
    if r.measurements:
        lines += _latex_measurements(r, p)
    if r.brackets:
        lines += _latex_brackets(r)
    lines.append(f"Verdict: \\textbf{{{r.verdict}}}. " + " ".join(tex_text(x) for x in r.reasons))
    if r.warnings:
        lines.append("Warnings: " + " ".join(tex_text(w) for w in r.warnings))
    return lines



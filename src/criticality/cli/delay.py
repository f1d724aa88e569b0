"""Command-line output and the simulation check for delay equations.

Pipeline place: **command line** -> model file -> ``hopf`` (which hands a model
with ``x(t - tau)`` to :func:`criticality.delay.hopf_delay`) -> outputs.  A
shell only.

* ``analyse``, ``report``, ``json`` and ``evaluate`` call :func:`delay_output`
  when the result is a delay result;
* ``delay-confirm MODEL -p tau [--set ...] [--offsets ...]`` simulates the
  retarded equation near onset at three offsets and compares amplitudes and
  periods with the prediction (exit 11 when contradicted, 12 when
  inconclusive).
* The registry entry ``hopf_delay`` also gets the generic subcommand
  ``hopf-delay`` (:mod:`criticality.cli.analyses`).
"""

from __future__ import annotations

from typing import Any

import argparse

from ..errors import ParameterError
from . import ranges
from .options import time_limit_option
from .support import Stage, equilibrium_choice, pairs, read_model, write_output

__all__ = ["delay_output", "register"]

EXIT_CONTRADICTED, EXIT_INCONCLUSIVE = 11, 12


def _merged(dicts) -> dict:
    out = {}
    for d in dicts or ():
        out.update(d)
    return out


def _numeric_text(num) -> str:
    lines = [f"Numeric values ({num.digits} digits) at "
             + (", ".join(f"{k} = {v}" for k, v in num.values.items()) or "the model's values")]
    for key in ("critical_value", "omega", "period", "transversality", "c1", "l1",
                "numeric_c1", "numeric_slope", "residual"):
        lines.append(f"  {key}: {getattr(num, key)}")
    for state, k in num.amplitude_coefficients.items():
        lines.append(f"  amplitude^2 of {state} per unit offset: {k}")
    return "\n".join(lines)


def delay_output(args: argparse.Namespace, result: Any, what: str) -> int:
    """Render a delay result for the main subcommands (text, latex, fragment, json, evaluate)."""
    point = _merged(getattr(args, "point", None))
    digits = getattr(args, "digits", 20)
    if getattr(result, "kind", "") == "hopf_delay_numeric" and (point or what == "evaluate"):
        raise ParameterError("a Hopf point located numerically (--guess) has no closed form to "
                             "evaluate at other values: give the values with --set and run "
                             "again")
    if what == "text":
        text = result.summary()
        if point:
            text += "\n" + _numeric_text(result.evaluate(point, digits=digits))
    elif what == "latex":
        text = result.latex_document()
    elif what == "fragment":
        text = result.to_latex()
    elif what == "json":
        text = result.to_json(point=point or None, digits=digits)
    else:
        text = _numeric_text(result.evaluate(point, digits=digits))
    write_output(text + "\n", args.output, force=args.force)
    return 0


def _confirm(args) -> int:
    from ..hopf_analysis.analysis import hopf

    quiet = bool(getattr(args, "quiet", False))
    with Stage("reading the model", quiet=quiet):
        model = read_model(args.model)
    values = _merged(args.values)
    with Stage("delay Hopf analysis", quiet=quiet):
        result = hopf(model, args.parameter, equilibrium=args.equilibrium,
                      values=values or None, branch=args.branch)
    if getattr(result, "kind", "") != "hopf_delay":
        from ..errors import ModelKindError

        raise ModelKindError("delay-confirm simulates a model with delays; this model has none "
                             "(use confirm for an ordinary model)")
    point = _merged(args.point)
    offsets = list(args.offsets) if args.offsets else None
    with Stage("simulating the delay equation at three offsets", quiet=quiet):
        report = result.validate(  # type: ignore[union-attr]  # a delay model, no guess
            _floats(point), offsets=offsets)
    write_output(str(report) + "\n", args.output, force=args.force)
    if report.status == "confirmed":
        return 0
    return EXIT_CONTRADICTED if not report.agrees else EXIT_INCONCLUSIVE


def _floats(point: dict) -> dict:
    import sympy
    from ..errors import ParameterError
    from ..model.expressions import parse_expression
    out = {}
    for k, v in point.items():
        value = parse_expression(v, {}, context=f"--at {k}") if isinstance(v, str) else v
        try:
            out[k] = float(sympy.N(value))
        except (TypeError, ValueError, OverflowError):
            raise ParameterError(f"--at {k}: expected a number, got {v!r}") from None
    return out


def register(subparsers: Any) -> None:
    """Add the ``delay-confirm`` subcommand."""
    p = subparsers.add_parser(
        "delay-confirm", help="simulate a delay equation near onset and compare with the "
        "prediction", description="Simulate the retarded equation (method of steps, RK4 with "
        "Hermite history) at three offsets past the critical value and compare amplitudes and "
        "periods with the predicted cycle.")
    p.add_argument("-q", "--quiet", action="store_true", default=argparse.SUPPRESS)
    p.add_argument("--debug", action="store_true", default=argparse.SUPPRESS)
    p.add_argument("model", help="TOML model file, or - for standard input")
    p.add_argument("-p", "--parameter", help="the bifurcation parameter (a delay or another)")
    p.add_argument("-e", "--equilibrium", type=equilibrium_choice, metavar="CHOICE")
    p.add_argument("--set", dest="values", action="append", default=[], metavar="NAME=VALUE",
                   type=lambda s: pairs([s], "--set"), help="fix a parameter before the analysis")
    p.add_argument("--at", dest="point", action="append", default=[], metavar="NAME=VALUE",
                   type=lambda s: pairs([s], "--at"),
                   help="numeric values of the remaining parameters for the simulation")
    p.add_argument("--offsets", type=ranges.real_list("--offsets", ranges.OFFSETS, signed=True),
                   help="comma-separated offsets from the critical value (default 2%%, 1%%, "
                   "0.5%% of it)")
    p.add_argument("--branch", type=ranges.integer("--branch", ranges.BRANCH), default=None)
    time_limit_option(p)
    p.add_argument("-o", "--output", metavar="FILE")
    p.add_argument("-f", "--force", action="store_true")
    p.set_defaults(handler=_confirm)

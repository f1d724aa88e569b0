"""Command-line subcommands for the analyses beyond Hopf.

Pipeline place: **command line** -> model file -> registered analysis ->
outputs.  A shell only: it parses arguments, calls the analysis found in
:mod:`criticality.registry` and prints or writes what it returns.

:func:`register` adds one subcommand per registered analysis other than
``hopf`` (whose subcommands live in :mod:`criticality.cli.main`), named after the
registry entry with ``-`` for ``_``:

``fold``
    a simple zero eigenvalue (fold, transcritical or pitchfork point)
``bautin``
    the points of the Hopf set where l1 vanishes, with l2 and the scenario
``bogdanov-takens``
    the double zero eigenvalue in two parameters, with a, b and the sign of ab
``flip``, ``neimark-sacker``
    period doubling and the Neimark-Sacker point of a map's fixed point
    (model files with ``kind = "map"``); ``fold`` treats a map's multiplier +1
``fold-hopf``, ``hopf-hopf``
    a zero eigenvalue with a pair, and two pairs, in two parameters (``--second``)

Each takes the model file, ``-p/--parameter`` (and ``--second`` where the
analysis needs two symbols), the equilibrium options of the main command,
``--format text|latex|json`` and ``-o/--output`` with ``-f/--force``.
"""

from __future__ import annotations

from typing import Any


from .options import flags as _flags
from .options import UsageError, time_limit_option
from .support import (Stage, eliminate_option, equilibrium_choice, pairs,
                      read_model, write_output)
from ..budget import time_limit

__all__ = ["register"]


def _options(parser, analysis) -> None:
    parser.add_argument("model", help="TOML model file, or - to read standard input")
    parser.add_argument("-p", "--parameter", help="the (first) bifurcation parameter "
                        "(default: the model file's bifurcation_parameter)")
    if "second" in analysis.needs:
        parser.add_argument("--second", required=True,
                            help="the second symbol: a parameter, or a free equilibrium "
                            "coordinate such as x_eq when --eliminate is used")
    parser.add_argument("-e", "--equilibrium", type=equilibrium_choice, metavar="CHOICE",
                        help='the equilibrium: "x=0, y=1", an index, or positive / '
                        "nonnegative / nonzero")
    parser.add_argument("--eliminate", type=eliminate_option, metavar="NAMES",
                        help="parametrise the family by the equilibrium: names, or auto "
                        "(see `analyse --help`)")
    parser.add_argument("--set", dest="values", action="append", default=[],
                        metavar="NAME=VALUE", type=lambda s: pairs([s], "--set"),
                        help="fix a parameter to an exact value first (repeatable)")
    parser.add_argument("--assume", action="append", default=[], metavar="NAME=SIGN",
                        type=lambda s: pairs([s], "--assume"),
                        help="a sign assumption, e.g. --assume x_eq=positive (repeatable)")
    if analysis.name in ("fold", "flip", "neimark_sacker"):
        parser.add_argument("--solve-for", metavar="NAME",
                            help="the symbol solved from det A = 0 (default: the parameter)")
    parser.add_argument("--backend", choices=("flint", "sympy"), default="flint",
                        help="exact arithmetic of the parameter field (default flint)")
    time_limit_option(parser)
    parser.add_argument("--format", choices=("text", "latex", "json"), default="text",
                        help="output format (default text)")
    parser.add_argument("-o", "--output", metavar="FILE",
                        help="write to FILE (atomically) instead of standard output")
    parser.add_argument("-f", "--force", action="store_true", help="overwrite FILE")


def _merged(dicts) -> dict:
    out = {}
    for d in dicts:
        out.update(d)
    return out


def _render(result, fmt: str) -> str:
    items = result if isinstance(result, tuple) else (result,)
    if fmt == "json":
        if len(items) == 1:
            return items[0].to_json() + "\n"
        return "[\n" + ",\n".join(r.to_json() for r in items) + "\n]\n"
    render = (lambda r: r.to_latex()) if fmt == "latex" else (lambda r: r.summary())
    if not items:
        return "(none found)\n"
    return "\n\n".join(render(r) for r in items) + "\n"


def _handler(analysis):
    def run(args) -> int:
        quiet = bool(getattr(args, "quiet", False))
        with Stage("reading the model", quiet=quiet):
            model = read_model(args.model)
        symbols = [args.parameter or model.bifurcation_parameter]
        if "second" in analysis.needs:
            if args.second == symbols[0]:
                raise UsageError(f"--second {args.second}: the second symbol must differ from "
                                 f"the bifurcation parameter (-p {symbols[0]})")
            symbols.append(args.second)
        options = dict(equilibrium=args.equilibrium, eliminate=args.eliminate,
                       values=_merged(args.values) or None, assume=_merged(args.assume) or None,
                       backend=args.backend)
        if getattr(args, "solve_for", None):
            options["solve_for"] = args.solve_for
        label = f"{analysis.name.replace('_', '-')} analysis"
        with Stage(label, quiet=quiet), time_limit(args.time_limit, f"the {label}"):
            result = analysis(model, *symbols, **options)
        write_output(_render(result, args.format), args.output, force=args.force)
        return 0
    return run


def register(subparsers: Any) -> None:
    """Add a subcommand for every registered analysis other than ``hopf``."""
    from ..registry import analyses

    for analysis in analyses():
        if analysis.name == "hopf":
            continue
        name = analysis.name.replace("_", "-")
        p = subparsers.add_parser(name, help=analysis.description,
                                  description=analysis.description[:1].upper()
                                  + analysis.description[1:] + ".")
        _flags(p)
        _options(p, analysis)
        p.set_defaults(handler=_handler(analysis))

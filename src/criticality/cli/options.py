"""The analysis options shared by every subcommand, and the Hopf analysis
they ask for.

Pipeline place: **command line** (options) -> model file -> ``hopf``.  The
main command (:mod:`.main`) and the subcommand modules (:mod:`.analyses`,
:mod:`.checks`) all build on this module, so none of them imports another.
"""

from __future__ import annotations

import argparse
from typing import Any, Iterable, Mapping

from . import ranges
from .support import (Stage, eliminate_option, equilibrium_choice, pairs, read_model,
                      split_top_level)

__all__ = ["UsageError", "flags", "time_limit_option", "add_analysis_options", "merge", "quiet", "analyse_from_args"]


class UsageError(Exception):
    """A command line that parses but does not make sense."""


def flags(parser: argparse.ArgumentParser) -> None:
    """``-q/--quiet`` and ``--debug``, accepted before or after a subcommand."""
    parser.add_argument("-q", "--quiet", action="store_true", default=argparse.SUPPRESS,
                        help="no progress messages on standard error")
    parser.add_argument("--debug", action="store_true", default=argparse.SUPPRESS,
                        help="show the traceback of an error")


def time_limit_option(parser: argparse.ArgumentParser) -> None:
    """``--time-limit SECONDS|none``: the budget of the whole command (reading,
    analysis, output), :data:`~.ranges.DEFAULT_TIME_LIMIT` by default."""
    parser.add_argument("--time-limit", type=ranges.time_limit_value,
                        default=ranges.DEFAULT_TIME_LIMIT, metavar="SECONDS",
                        help="stop after this many seconds with a message naming the stage "
                        "reached and ways to make the problem smaller (exit code 7; default "
                        f"{ranges.DEFAULT_TIME_LIMIT:g}; none: no limit)")
    parser.set_defaults(command_budget=True)


def add_analysis_options(parser: argparse.ArgumentParser) -> None:
    """The options that choose what to analyse (shared by the subcommands)."""
    parser.add_argument("model", help="TOML model file, or - to read standard input")
    parser.add_argument("-p", "--parameter", help="the bifurcation parameter (default: the "
                        "model file's bifurcation_parameter)")
    parser.add_argument("-e", "--equilibrium", type=equilibrium_choice, metavar="CHOICE",
                        help='the equilibrium: "x=0, y=sqrt(b*(r-1))", an index (0, 1, ...) of '
                        "the solved equilibria, or positive / nonnegative / nonzero (default: "
                        "the model file's, else the only one)")
    parser.add_argument("--eliminate", type=eliminate_option, metavar="NAMES",
                        help="parametrise the family by the equilibrium: solve f(x0) = 0 for "
                        "these names (comma-separated, one per state); the other states "
                        "become free symbols <state>_eq. 'auto' lets the engine choose "
                        "parameters in which f(x0) = 0 is linear or triangular (no radicals)")
    parser.add_argument("--set", dest="values", action="append", default=[], metavar="NAME=VALUE",
                        type=lambda s: pairs([s], "--set"),
                        help="fix a parameter to an exact value before the analysis, e.g. "
                        "--set a=1/2 (repeatable)")
    parser.add_argument("--assume", action="append", default=[], metavar="NAME=SIGN",
                        type=lambda s: pairs([s], "--assume"),
                        help="a sign assumption, e.g. --assume x_eq=positive (repeatable)")
    parser.add_argument("--order", type=ranges.integer("--order", ranges.ORDER, odd=True),
                        default=3, help="order of the normal form: 3 gives l1, 5 also l2 "
                        f"(default 3; an odd number up to {ranges.ORDER[1]})")
    parser.add_argument("--branch", type=ranges.integer("--branch", ranges.BRANCH), default=None,
                        help="branch of the critical set (default 0)")
    parser.add_argument("--backend", choices=("flint", "sympy"), default="flint",
                        help="exact arithmetic of the parameter field (default flint)")
    time_limit_option(parser)
    parser.add_argument("--guess", type=lambda s: pairs(split_top_level(s), "--guess"),
                        metavar="NAME=VALUE,...",
                        help="numeric mode for equilibria without closed form: starting values "
                        "for every state and the parameter, e.g. --guess V=-60,m=0.05,I=10; "
                        "the other parameters need values (--set or the model file)")


def merge(dicts: Iterable[Mapping], option: str) -> dict:
    out = {}
    for d in dicts:
        for key, value in d.items():
            if key in out:
                raise UsageError(f"{option}: {key!r} is given twice")
            out[key] = value
    return out


def quiet(args: argparse.Namespace) -> bool:
    return bool(getattr(args, "quiet", False))


def analyse_from_args(args: argparse.Namespace) -> Any:
    """Read the model named by ``args`` and run the Hopf analysis the options
    ask for; returns the :class:`~criticality.HopfResult`."""
    from ..registry import get

    with Stage("reading the model", quiet=quiet(args)):
        model = read_model(args.model)
    values = merge(args.values, "--set") or None
    assume = merge(args.assume, "--assume") or None
    run = get("hopf").function
    name = args.parameter or model.bifurcation_parameter or "?"
    guess = getattr(args, "guess", None)
    if guess:
        with Stage(f"numeric Hopf analysis in {name}", quiet=quiet(args)):
            return run(model, args.parameter, guess=guess, order=args.order, values=values,
                       digits=max(getattr(args, "digits", 30), 15),
                       time_limit=getattr(args, "time_limit", None))
    with Stage(f"Hopf analysis in {name}", quiet=quiet(args)):
        return run(model, args.parameter, equilibrium=args.equilibrium,
                   eliminate=args.eliminate, branch=args.branch, order=args.order,
                   values=values, assume=assume, backend=args.backend,
                   time_limit=getattr(args, "time_limit", None))

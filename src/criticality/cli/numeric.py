"""Command-line subcommands for numeric Hopf curves and batch analyses.

Pipeline place: **command line** -> model file(s) -> ``hopf_curve`` /
``analyse_many`` -> CSV, plot, JSON files.  A shell only: it parses
arguments, calls the library and writes what it returns.

``curve``
    follow the Hopf point of ``-p`` as ``--along NAME=LOW:HIGH:COUNT`` moves,
    from ``--guess``; the table as CSV (standard output or ``--csv FILE``) and
    optionally ``--plot FILE``, the curve coloured by verdict.
``batch``
    the Hopf analysis of many model files: one JSON per model and
    ``summary.csv`` in ``--out-dir``; models that fail are listed with their
    error.  Exit status 0 when every model succeeded, 1 otherwise.

Both take ``--scheduler ADDRESS`` to run on a dask cluster.
"""

from __future__ import annotations

from typing import Any

import argparse
import sys

from .ranges import time_limit_value

__all__ = ["register"]


def _flags(parser) -> None:
    parser.add_argument("-q", "--quiet", action="store_true", default=argparse.SUPPRESS,
                        help="no progress messages on standard error")
    parser.add_argument("--debug", action="store_true", default=argparse.SUPPRESS,
                        help="show the traceback of an error")


def _range(text: str):
    """``NAME=LOW:HIGH:COUNT`` -> (name, low, high, count)."""
    name, sep, rest = text.partition("=")
    parts = rest.split(":")
    if not sep or not name.strip() or len(parts) != 3:
        raise argparse.ArgumentTypeError(f"expected NAME=LOW:HIGH:COUNT, got {text!r}")
    try:
        low, high, count = float(parts[0]), float(parts[1]), int(parts[2])
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected numbers in NAME=LOW:HIGH:COUNT, got "
                                         f"{text!r}") from None
    if count < 2:
        raise argparse.ArgumentTypeError(f"COUNT must be at least 2, got {count}")
    return name.strip(), low, high, count


def register(subparsers: Any) -> None:
    """Add the ``curve`` and ``batch`` subcommands."""
    from .support import pairs

    p = subparsers.add_parser(
        "curve", help="follow the Hopf point as a second parameter moves (numeric)",
        description="Follow the Hopf point of the bifurcation parameter as another parameter "
                    "moves, by pseudo-arclength continuation from a guess; print the table "
                    "(CSV) and optionally draw the curve coloured by verdict.")
    _flags(p)
    p.add_argument("model", help="TOML model file, or - to read standard input")
    p.add_argument("-p", "--parameter", help="the bifurcation parameter (default: the model "
                   "file's bifurcation_parameter)")
    p.add_argument("--along", required=True, type=_range, metavar="NAME=LOW:HIGH:COUNT",
                   help="the second parameter and the values of the table's rows")
    p.add_argument("--guess", required=True, action="append", metavar="NAME=VALUE",
                   type=lambda s: pairs([s], "--guess"),
                   help="start values of every state and of the parameter at LOW (repeatable)")
    p.add_argument("--set", dest="values", action="append", default=[], metavar="NAME=VALUE",
                   type=lambda s: pairs([s], "--set"),
                   help="values of the other parameters (repeatable; model defaults fill the "
                   "rest)")
    p.add_argument("--order", type=int, choices=(3, 5), default=3,
                   help="3: l1; 5: also l2")
    p.add_argument("--csv", metavar="FILE", help="write the table to FILE (default: standard "
                   "output)")
    p.add_argument("--plot", metavar="FILE", help="draw the curve (.png, .svg or .pdf)")
    p.add_argument("--scheduler", metavar="ADDRESS", help="a dask scheduler address")
    p.add_argument("-f", "--force", action="store_true", help="overwrite existing files")
    p.set_defaults(handler=_curve)

    p = subparsers.add_parser(
        "batch", help="the Hopf analysis of many model files",
        description="Analyse every model file; write one JSON per model and summary.csv "
                    "into --out-dir. Models that fail are recorded with their error. Exit "
                    "status 0 when every model succeeded, 1 otherwise.")
    _flags(p)
    p.add_argument("models", nargs="+", help="TOML model files")
    p.add_argument("--out-dir", required=True, metavar="DIR", help="an existing folder")
    p.add_argument("-p", "--parameter", help="the bifurcation parameter of every model "
                   "(default: each file's own)")
    p.add_argument("--time-limit", type=time_limit_value, metavar="SECONDS",
                   help="wall-clock budget per model")
    p.add_argument("--scheduler", metavar="ADDRESS", help="a dask scheduler address")
    p.add_argument("-f", "--force", action="store_true", help="overwrite existing files")
    p.set_defaults(handler=_batch)


def _merged(items, what):
    from ..errors import ParameterError

    out = {}
    for d in items:
        for key, value in d.items():
            if key in out:
                raise ParameterError(f"{what}: {key!r} is given twice")
            out[key] = value
    return out


def _curve(args) -> int:
    import numpy as np

    from ..checks.continuation import hopf_curve
    from ..errors import ParameterError
    from .support import Stage, read_model, write_output

    model = read_model(args.model)
    parameter = args.parameter or model.bifurcation_parameter
    if not parameter:
        raise ParameterError("name the bifurcation parameter with -p (the model file does not "
                             "choose one)")
    name, low, high, count = args.along
    guess = {k: float(v) if _is_number(v) else v for k, v in _merged(args.guess,
                                                                     "--guess").items()}
    with Stage("following the Hopf curve", quiet=bool(getattr(args, "quiet", False))):
        curve = hopf_curve(model, parameter, {name: np.linspace(low, high, count)}, guess,
                           values=_merged(args.values, "--set"), order=args.order,
                           scheduler=args.scheduler)
    text = curve.to_csv()
    write_output(text, args.csv, force=args.force)
    if args.plot:
        from ..outputs.plots import save_figure

        ax = curve.plot()
        save_figure(ax.figure, args.plot, force=args.force)
    for note in curve.notes[:1]:
        if not getattr(args, "quiet", False):
            sys.stderr.write(note + "\n")
    return 0


def _is_number(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return True


def _batch(args) -> int:
    from .support import typo_warnings
    from ..checks.batch import analyse_many

    with typo_warnings():
        summary = analyse_many(args.models, parameter=args.parameter, out_dir=args.out_dir,
                               time_limit=args.time_limit, force=args.force,
                               scheduler=args.scheduler)
    if not getattr(args, "quiet", False):
        for row in summary.rows:
            line = (f"{row.path}: {row.classification}, {row.parameter} = {row.critical_value}"
                    if row.status == "ok" else f"{row.path}: failed: {row.error}")
            sys.stderr.write(line + "\n")
    return 0 if not summary.failed else 1

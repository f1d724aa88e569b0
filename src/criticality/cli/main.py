"""The ``criticality`` command line.

Pipeline place: **command line** -> model file -> analysis -> outputs.  A
shell only: it parses arguments, calls the library and renders or writes what
the library returns; there is no mathematics here.

Subcommands
-----------
``analyse`` (also ``analyze``)
    the terminal summary of the Hopf analysis of a model file
``report``
    the LaTeX derivation report (a standalone document; ``--fragment`` for the
    equations only)
``json``
    the result as JSON (schema ``criticality/hopf-result``)
``evaluate``
    every quantity at a parameter point, ``--digits`` significant digits
``list``
    the analyses the package offers (from :mod:`criticality.registry`)
``demo``
    analyse a bundled invented model and show every output
``export``
    the closed forms as a standalone numpy module or as C code

plus the subcommands registered by :mod:`criticality.cli.main.analyses` (``fold``,
``bautin``, ``bogdanov-takens``) and by :mod:`criticality.cli.main.checks` (the
simulation check ``confirm`` and the diagrams ``plane`` and ``survey``) and by
:mod:`criticality.cli.numeric` (the numeric Hopf curve ``curve`` and the batch
analysis ``batch``).

Exit status
-----------
0 success; 1 another error of the package;
2 bad command line; 3 the model cannot be used (file, syntax, content);
4 a parameter is unknown or lacks a value; 5 equilibrium problem or a vector
field that is not analytic there; 6 no Hopf point or a degenerate one; 7 no
closed form or a size limit; 8 a missing optional extra; 9 an output file
exists (use ``--force``) or cannot be written; 10 a numerical validation could not run; 11 the
simulation contradicts the prediction and 12 it is inconclusive (``confirm``,
``survey``); 70 an
internal error (a bug: rerun with ``--debug`` and report it); 130
interrupted.  The codes 3 to 10 are the ``exit_code`` of the error classes in
:mod:`criticality.errors`.
"""

from __future__ import annotations

from typing import Sequence

import argparse
import sys
import traceback

from . import analyses, checks, delay, export, numeric, ranges
from .options import UsageError as _UsageError
from .options import add_analysis_options, analyse_from_args
from .options import flags as _flags
from .options import merge as _merge
from .options import quiet as _quiet
from .support import Stage, pairs, write_output
from .delay import delay_output
from .guard import command_guard
from ..budget import BudgetExpired
from ..errors import ComputationLimitError, CriticalityError

__all__ = ["main", "build_parser", "add_analysis_options", "analyse_from_args",
           "EXIT_OK", "EXIT_USAGE", "EXIT_INTERNAL", "EXIT_INTERRUPTED"]

EXIT_OK, EXIT_USAGE, EXIT_INTERNAL, EXIT_INTERRUPTED = 0, 2, 70, 130
_DEMO = "demo.toml"


# -- options ---------------------------------------------------------------------------------


def _point_options(parser, digits: int) -> None:
    parser.add_argument("--at", dest="point", action="append", default=[], metavar="NAME=VALUE",
                        type=lambda s: pairs([s], "--at"),
                        help="evaluate at this parameter value (repeatable, exact text such as "
                        "8/3); model defaults fill the rest")
    parser.add_argument("--digits", type=ranges.integer("--digits", ranges.DIGITS),
                        default=digits, help="significant digits of numeric values (default "
                        f"{digits}, at most {ranges.DIGITS[1]})")


def _output_options(parser) -> None:
    parser.add_argument("-o", "--output", metavar="FILE",
                        help="write to FILE (written atomically) instead of standard output")
    parser.add_argument("-f", "--force", action="store_true",
                        help="overwrite FILE if it exists")


# -- handlers --------------------------------------------------------------------------------


def _analyse(args) -> int:
    from ..outputs.text import numeric_summary, result_summary

    result = analyse_from_args(args)
    if getattr(result, "kind", "") in ("hopf_delay", "hopf_delay_numeric"):
        return delay_output(args, result, "text")
    text = result_summary(result, width=args.width)
    if args.in_radicals or args.cosine_form:
        text += "\n" + _radical_block(result, args.cosine_form)
    point = _merge(args.point, "--at")
    if point:
        with Stage("numeric evaluation", quiet=_quiet(args)):
            text += "\n" + numeric_summary(result.evaluate(point, digits=args.digits))
    write_output(text, args.output, force=args.force)
    return EXIT_OK


def _radical_block(result, cosine: bool) -> str:
    """The closed form of an algebraic critical value (``--in-radicals``), or
    the reason there is none."""
    from ..errors import ClosedFormUnavailableError

    head = "In closed form (on request; the forms hold where the conditions hold)"
    if not hasattr(result, "in_radicals"):
        return f"{head}\n  not available: this result is numeric\n"
    try:
        view = result.in_radicals(trigonometric=cosine)
    except ClosedFormUnavailableError as exc:
        return f"{head}\n  not available: {exc}\n"
    if not view.forms:
        return f"{head}\n  the critical value is already in radicals\n"
    return head + "\n" + "".join(f"  {line}\n" for line in str(view).splitlines())


def _report(args) -> int:
    from ..outputs.latex import latex_report, result_to_latex

    result = analyse_from_args(args)
    if getattr(result, "kind", "") in ("hopf_delay", "hopf_delay_numeric"):
        return delay_output(args, result, "fragment" if args.fragment else "latex")
    with Stage("writing the LaTeX", quiet=_quiet(args)):
        text = result_to_latex(result) + "\n" if args.fragment else latex_report(result)
    written = write_output(text, args.output, force=args.force)
    if written and not _quiet(args):
        print(f"criticality: wrote {written}; compile it with: pdflatex {written}",
              file=sys.stderr)
    return EXIT_OK


def _json(args) -> int:
    from ..outputs.json_io import result_to_json

    result = analyse_from_args(args)
    if getattr(result, "kind", "") in ("hopf_delay", "hopf_delay_numeric"):
        return delay_output(args, result, "json")
    point = _merge(args.point, "--at") or None
    with Stage("writing the JSON", quiet=_quiet(args)):
        text = result_to_json(result, point=point, digits=args.digits,
                              indent=None if args.compact else 2) + "\n"
    write_output(text, args.output, force=args.force)
    return EXIT_OK


def _evaluate(args) -> int:
    from ..outputs.text import numeric_summary

    result = analyse_from_args(args)
    if getattr(result, "kind", "") in ("hopf_delay", "hopf_delay_numeric"):
        return delay_output(args, result, "evaluate")
    point = _merge(args.point, "--at")
    with Stage("numeric evaluation", quiet=_quiet(args)):
        numeric = result.evaluate(point, digits=args.digits)
    write_output(numeric_summary(numeric), args.output, force=args.force)
    return EXIT_OK


def _list(args) -> int:
    from ..registry import analyses

    rows = analyses()
    width = max(len(a.name) for a in rows)
    lines = ["Analyses offered by criticality:"]
    for a in rows:
        needs = ", ".join(getattr(a, "needs", ()) or ())
        lines.append(f"  {a.name.ljust(width)}  {a.description}"
                     + (f" [needs: {needs}]" if needs else ""))
    lines.append("The Hopf analysis runs with analyse, report, json and evaluate; the others "
                 "with the subcommand of their name ("
                 + ", ".join(a.name.replace("_", "-") for a in rows if a.name != "hopf") + ").")
    print("\n".join(lines))
    return EXIT_OK


def _demo(args) -> int:
    from .demo import run_demo

    return run_demo(args, quiet=_quiet(args))


# -- parser ----------------------------------------------------------------------------------


def _subcommand(sub, name, handler, help_text, description, aliases=()):
    p = sub.add_parser(name, help=help_text, description=description, aliases=list(aliases))
    _flags(p)
    p.set_defaults(handler=handler)
    return p


def _register_extensions(sub) -> None:
    """Subcommands of other modules: the analyses beyond Hopf, the simulation
    check and the diagrams."""
    for module in (analyses, checks, numeric, export, delay):
        module.register(sub)


def build_parser() -> argparse.ArgumentParser:
    """The argument parser of the ``criticality`` command."""
    from .. import __version__

    parser = argparse.ArgumentParser(
        prog="criticality",
        description="Exact symbolic Hopf bifurcation analysis of a model file: where the "
                    "steady state starts to oscillate, with the frequency, the first Lyapunov "
                    "coefficient and the super/subcritical condition in closed form.",
        epilog="Start with: criticality demo.  Exit status: 0 ok, 2 bad command line, 3-10 "
               "errors of the package (see docs/cli.md).")
    parser.add_argument("--version", action="version", version=f"criticality {__version__}")
    _flags(parser)
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    _add_subcommands(sub)
    _register_extensions(sub)
    return parser


def _add_subcommands(sub) -> None:
    """The subcommands of this module."""
    p = _subcommand(sub, "analyse", _analyse, "terminal summary of the Hopf analysis",
                    "Analyse a model file and print a summary: a table of quantities, the "
                    "verdict in words, the conditions, the cycle, conventions and cautions.",
                    aliases=("analyze",))
    add_analysis_options(p)
    _point_options(p, 20)
    _output_options(p)
    p.add_argument("--width", type=ranges.integer("--width", ranges.WIDTH), default=100,
                   help=f"line width (default 100; {ranges.WIDTH[0]} to {ranges.WIDTH[1]})")
    p.add_argument("--in-radicals", action="store_true",
                   help="also give an algebraic critical value (a root of degree 3 or 4) in "
                   "real radicals where they exist, with the conditions the form needs")
    p.add_argument("--cosine-form", action="store_true",
                   help="as --in-radicals, with the cosine form for a cubic with three real "
                   "roots (which has no form in real radicals)")
    p = _subcommand(sub, "report", _report, "LaTeX derivation report",
                    "Write the derivation as a standalone LaTeX document (pdflatex).")
    add_analysis_options(p)
    _output_options(p)
    p.add_argument("--fragment", action="store_true",
                   help="only the equations (an align* block), not a whole document")
    p = _subcommand(sub, "json", _json, "the result as JSON",
                    "Write the result in the JSON schema criticality/hopf-result (version 1).")
    add_analysis_options(p)
    _point_options(p, 30)
    _output_options(p)
    p.add_argument("--compact", action="store_true", help="one line instead of indented JSON")
    p = _subcommand(sub, "evaluate", _evaluate, "numeric values at a parameter point",
                    "Evaluate every quantity at a parameter point to --digits digits.")
    add_analysis_options(p)
    _point_options(p, 30)
    _output_options(p)
    _subcommand(sub, "list", _list, "list the analyses offered", "List the analyses offered.")
    p = _subcommand(sub, "demo", _demo, "analyse a bundled example and show every output",
                    "Analyse a bundled invented model and show the summary, the LaTeX, the "
                    "JSON and a numeric evaluation.")
    p.add_argument("--output-dir", metavar="DIR",
                   help="also write the model, the LaTeX report and the JSON into DIR")
    p.add_argument("-f", "--force", action="store_true", help="overwrite files in DIR")
    p.add_argument("--digits", type=ranges.integer("--digits", ranges.DIGITS), default=20,
                   help="digits of the numeric evaluation")


# -- entry point -----------------------------------------------------------------------------


_PARSER: list = []


def _shared_parser() -> argparse.ArgumentParser:
    """One parser per process: building it costs more than most failing
    command lines (parse_args keeps no state between calls)."""
    if not _PARSER:
        _PARSER.append(build_parser())
    return _PARSER[0]


def _report_error(exc: BaseException, debug: bool) -> None:
    if debug:
        traceback.print_exception(type(exc), exc, exc.__traceback__, file=sys.stderr)
    message = str(exc).strip() or type(exc).__name__
    print(f"criticality: error: {message}", file=sys.stderr)


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line with ``argv`` (default: ``sys.argv[1:]``); returns
    the exit status (see the module docstring)."""
    parser = _shared_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:  # --help, --version, or a usage error (already printed)
        return exc.code if isinstance(exc.code, int) else EXIT_USAGE
    handler = getattr(args, "handler", None)
    if handler is None:
        parser.print_help(sys.stderr)
        return EXIT_USAGE
    debug = bool(getattr(args, "debug", False))
    try:
        with command_guard(args, hard=argv is None):
            return int(handler(args))
    except _UsageError as exc:
        parser.print_usage(sys.stderr)
        print(f"criticality: error: {exc}", file=sys.stderr)
        return EXIT_USAGE
    except CriticalityError as exc:
        _report_error(exc, debug)
        return exc.exit_code
    except KeyboardInterrupt:
        print("criticality: interrupted", file=sys.stderr)
        return EXIT_INTERRUPTED
    except BudgetExpired:  # a stop delivered just as the budget ended
        print("criticality: error: the command stopped at its time limit", file=sys.stderr)
        return ComputationLimitError.exit_code
    except Exception as exc:  # a bug: say so in one paragraph
        if debug:
            traceback.print_exc()
        print(f"criticality: internal error ({type(exc).__name__}: {exc}); this is a bug -- "
              "rerun with --debug for the traceback and please report it with the model file",
              file=sys.stderr)
        return EXIT_INTERNAL


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())

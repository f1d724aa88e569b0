"""Command-line subcommands for the simulation check and the diagrams.

Pipeline place: **command line** -> model file -> ``hopf`` -> validation,
plots -> files.  A shell only: it parses arguments, calls the library and
writes what it returns; there is no mathematics here.

:func:`register` adds three subcommands to the ``criticality`` command:

``confirm``
    simulate the model near onset and print (or write) the check report;
    exit status 0 when the prediction is confirmed, 2 when it is not or the
    check is inconclusive.
``plane``
    draw the Hopf curve in a plane of two parameters (PNG, SVG or PDF) and
    optionally write its points as CSV.
``survey``
    both at once into a folder: ``report.txt``, ``report.tex``,
    ``plane.png``, ``plane.svg``, ``curve.csv`` and ``amplitude.png``.

Every subcommand takes the model file (``-`` for standard input), the
bifurcation parameter (``-p``; default: the file's own), an equilibrium
(``--equilibrium "x=0, y=0"``; default: the file's, else the engine's
choice), the branch (``--branch``) and parameter values (``--set name=value``,
repeatable; values are read exactly by the model's own parser).  Files are
written atomically and never overwritten without ``--force``.
"""

from __future__ import annotations

import argparse
import os
import sys

from .errors import CriticalityError, ParameterError

__all__ = ["register", "EXIT_NOT_CONFIRMED"]

#: exit status of ``confirm`` when the simulation does not confirm the prediction
EXIT_NOT_CONFIRMED = 2


# -- shared options ---------------------------------------------------------------------------


def _common(parser) -> None:
    parser.add_argument("model", help="TOML model file, or - to read standard input")
    parser.add_argument("-p", "--parameter", help="the bifurcation parameter (default: the "
                        "model file's bifurcation_parameter)")
    parser.add_argument("--equilibrium", metavar="STATE=EXPR,...",
                        help='the equilibrium, e.g. "x=0, y=sqrt(b*(r-1))" (default: the '
                        "model file's, else the engine's choice)")
    parser.add_argument("--branch", type=int, default=None, help="branch of the critical set "
                        "(default 0)")
    parser.add_argument("--set", dest="values", action="append", default=[],
                        metavar="NAME=VALUE", help="a parameter value, read exactly "
                        "(repeatable); model defaults fill the rest")
    parser.add_argument("--force", action="store_true", help="overwrite existing files")


def _plane_options(parser, required: bool) -> None:
    parser.add_argument("--x", required=required, help="parameter on the horizontal axis")
    parser.add_argument("--y", help="parameter on the vertical axis (default: the bifurcation "
                        "parameter)")
    parser.add_argument("--x-range", nargs=2, type=float, metavar=("LOW", "HIGH"),
                        required=required)
    parser.add_argument("--y-range", nargs=2, type=float, metavar=("LOW", "HIGH"),
                        required=required)
    parser.add_argument("--stability", choices=("closed-form", "eigenvalues"),
                        default="closed-form", help="how the stable region is decided")
    parser.add_argument("--size", nargs=2, type=float, default=(6.4, 4.8),
                        metavar=("WIDTH", "HEIGHT"), help="figure size in inches")
    parser.add_argument("--dpi", type=int, default=100, help="pixels per inch of PNG output")
    parser.add_argument("--points", type=int, default=400, help="samples along the curve")


def _check_options(parser) -> None:
    parser.add_argument("--offsets", type=float, nargs="+", metavar="DELTA",
                        help="distances |mu - mu_c| to check (default: from the problem's scale)")
    parser.add_argument("--tolerance", type=float, default=0.05,
                        help="largest relative error accepted at the smallest offset")
    parser.add_argument("--method", choices=("DOP853", "RK45", "Radau", "BDF", "LSODA"),
                        help="scipy integrator (default: DOP853, LSODA when stiff)")
    parser.add_argument("--max-periods", type=int, default=4000,
                        help="cap on the length of one run, in periods")


def register(subparsers) -> None:
    """Add the ``confirm``, ``plane`` and ``survey`` subcommands.

    ``subparsers`` is what ``ArgumentParser.add_subparsers()`` returned; each
    subcommand sets ``handler`` to a function ``handler(args) -> int``.
    """
    p = subparsers.add_parser(
        "confirm", help="check the predicted cycle by simulating the model",
        description="Simulate the model near onset and compare the cycle with the prediction.")
    _common(p)
    _check_options(p)
    p.add_argument("--format", choices=("text", "latex"), default="text")
    p.add_argument("-o", "--output", help="write the report here instead of standard output")
    p.add_argument("--amplitude-plot", metavar="FILE",
                   help="also draw the predicted and simulated amplitudes (PNG, SVG or PDF)")
    p.set_defaults(handler=_guarded(_confirm))

    p = subparsers.add_parser(
        "plane", help="draw the Hopf curve in a plane of two parameters",
        description="Draw the Hopf curve, its super- and subcritical pieces, the points where "
                    "l1 vanishes and the region where the equilibrium is stable.")
    _common(p)
    _plane_options(p, required=True)
    p.add_argument("-o", "--output", required=True, help="image file (.png, .svg or .pdf)")
    p.add_argument("--csv", metavar="FILE", help="also write the curve's points as CSV")
    p.set_defaults(handler=_guarded(_plane))

    p = subparsers.add_parser(
        "survey", help="the check report and the diagrams, into one folder",
        description="Write report.txt, report.tex, plane.png, plane.svg, curve.csv and "
                    "amplitude.png into a folder.")
    _common(p)
    _check_options(p)
    _plane_options(p, required=True)
    p.add_argument("--out-dir", required=True, help="folder for the files (created if needed)")
    p.set_defaults(handler=_guarded(_survey))


def _guarded(handler):
    """Report the package's own errors as one paragraph and their exit status."""
    def run(args) -> int:
        try:
            return handler(args)
        except CriticalityError as exc:
            print(f"criticality: error: {exc}", file=sys.stderr)
            return exc.exit_code
    run.__name__ = handler.__name__
    run.__doc__ = handler.__doc__
    return run


# -- turning arguments into library calls -------------------------------------------------------


def _pairs(items, what: str) -> dict:
    out = {}
    for item in items:
        name, sep, value = item.partition("=")
        if not sep or not name.strip() or not value.strip():
            raise ParameterError(f"{what} must be written NAME=VALUE, got {item!r}")
        out[name.strip()] = value.strip()
    return out


def _split_top_level(text: str) -> list:
    """Split at commas that are not inside parentheses."""
    parts, depth, current = [], 0, []
    for ch in text:
        if ch == "," and depth == 0:
            parts.append("".join(current))
            current = []
            continue
        depth += (ch == "(") - (ch == ")")
        current.append(ch)
    parts.append("".join(current))
    return [p for p in (x.strip() for x in parts) if p]


def _load(args):
    """The model, the result and the parameter values named by ``args``."""
    from .analysis import hopf
    from .model import Model

    if args.model == "-":
        model = Model.from_text(sys.stdin.read(), source="<stdin>")
    else:
        model = Model.from_file(args.model)
    equilibrium = None
    if args.equilibrium:
        equilibrium = _pairs(_split_top_level(args.equilibrium), "each equilibrium entry")
    result = hopf(model, args.parameter, equilibrium=equilibrium, branch=args.branch)
    return result, _pairs(args.values, "--set")


def _write(path: str, text: str, force: bool) -> None:
    from ._files import write_text_atomic

    write_text_atomic(path, text, force=force)


def _validate(args, result, values):
    from .validation import validate

    return validate(result, values, offsets=args.offsets, tolerance=args.tolerance,
                    method=args.method, max_periods=args.max_periods)


def _confirm(args) -> int:
    """``confirm``: the simulation check report."""
    result, values = _load(args)
    report = _validate(args, result, values)
    text = report.to_latex() if args.format == "latex" else str(report)
    if args.output:
        _write(args.output, text + "\n", args.force)
    else:
        print(text)
    if args.amplitude_plot:
        from .plots import plot_amplitude, save_figure

        drawn = plot_amplitude(result, values, simulated=report)
        save_figure(drawn.figure, args.amplitude_plot, force=args.force)
    return 0 if report.confirmed else EXIT_NOT_CONFIRMED


def _diagram(args, result, values):
    from .plots import plot_parameter_plane

    y = args.y or result.parameter
    return plot_parameter_plane(
        result, args.x, y, values=values, x_range=tuple(args.x_range),
        y_range=tuple(args.y_range), stability=args.stability.replace("-", " "),
        figsize=tuple(args.size), dpi=args.dpi, points=args.points)


def _plane(args) -> int:
    """``plane``: the parameter-plane diagram (and its CSV)."""
    from .plots import save_figure, write_curve_csv

    result, values = _load(args)
    for path in filter(None, (args.output, args.csv)):
        _refuse_existing(path, args.force)
    drawn = _diagram(args, result, values)
    save_figure(drawn.figure, args.output, force=args.force)
    if args.csv:
        write_curve_csv(drawn.curve, args.csv, force=args.force)
    print(f"wrote {args.output}" + (f" and {args.csv}" if args.csv else ""))
    return 0


def _refuse_existing(path, force):
    from ._files import check_writable

    check_writable(path, force)


_SURVEY_FILES = ("report.txt", "report.tex", "plane.png", "plane.svg", "curve.csv",
                 "amplitude.png")


def _survey(args) -> int:
    """``survey``: report and diagrams into one folder."""
    from .plots import plot_amplitude, save_figure, write_curve_csv

    result, values = _load(args)
    os.makedirs(args.out_dir, exist_ok=True)
    paths = {name: os.path.join(args.out_dir, name) for name in _SURVEY_FILES}
    for path in paths.values():
        _refuse_existing(path, args.force)
    drawn = _diagram(args, result, values)
    save_figure(drawn.figure, paths["plane.png"], force=args.force)
    save_figure(drawn.figure, paths["plane.svg"], force=args.force)
    write_curve_csv(drawn.curve, paths["curve.csv"], force=args.force)
    report = _validate(args, result, values)
    _write(paths["report.txt"], str(report) + "\n", args.force)
    _write(paths["report.tex"], report.to_latex() + "\n", args.force)
    amp = plot_amplitude(result, values, simulated=report)
    save_figure(amp.figure, paths["amplitude.png"], force=args.force)
    print(str(report))
    print(f"\nwrote {', '.join(_SURVEY_FILES)} into {args.out_dir}")
    return 0 if report.confirmed else EXIT_NOT_CONFIRMED


def _standalone(argv=None) -> int:
    """Run these subcommands without the main command (for tests and debugging)."""
    parser = argparse.ArgumentParser(prog="criticality")
    sub = parser.add_subparsers(dest="command", required=True)
    register(sub)
    args = parser.parse_args(argv)
    return args.handler(args)

"""Command-line subcommands for the simulation check and the diagrams.

Pipeline place: **command line** -> model file -> ``hopf`` -> validation,
plots -> files.  A shell only: it parses arguments, calls the library and
writes what it returns; there is no mathematics here.

:func:`register` adds three subcommands to the ``criticality`` command:

``confirm``
    simulate the model near onset and print (or write) the check report;
    exit status 0 when the prediction is confirmed, 11 when it is not, 12
    when the check is inconclusive.
``plane``
    draw the Hopf curve in a plane of two parameters (PNG, SVG or PDF) and
    optionally write its points as CSV.
``survey``
    both at once into a folder: ``report.txt``, ``report.tex``,
    ``plane.png``, ``plane.svg``, ``curve.csv`` and ``amplitude.png``.

Every subcommand takes the analysis options of the main command
(:func:`criticality.cli.options.add_analysis_options`: the model file, ``-p``,
``--equilibrium``, ``--eliminate``, ``--set`` to fix parameters before the
analysis, ...) and ``--at NAME=VALUE`` (repeatable) for the parameter point
of the check and the fixed parameters of the diagram; model defaults fill the
rest.  Files are written atomically and never overwritten without
``--force``.  Errors of the package are reported by the main command's
:func:`criticality.cli.main.main` with their exit status.
"""

from __future__ import annotations

from typing import Any

import os
import sys

from .options import add_analysis_options, analyse_from_args
from . import ranges
from .options import flags as _flags

__all__ = ["register", "EXIT_NOT_CONFIRMED", "EXIT_INCONCLUSIVE"]

#: exit status of ``confirm`` and ``survey`` when the simulation contradicts the prediction
EXIT_NOT_CONFIRMED = 11
#: exit status when the simulation can neither confirm nor contradict it
EXIT_INCONCLUSIVE = 12

_SURVEY_FILES = ("report.txt", "report.tex", "plane.png", "plane.svg", "curve.csv",
                 "amplitude.png")


# -- options ---------------------------------------------------------------------------------


def _common(parser) -> None:
    from .support import pairs

    _flags(parser)
    add_analysis_options(parser)
    parser.add_argument("--at", dest="point", action="append", default=[], metavar="NAME=VALUE",
                        type=lambda s: pairs([s], "--at"),
                        help="the parameter point of the check, and the fixed parameters of "
                        "the diagram (repeatable, exact text such as 8/3); model defaults "
                        "fill the rest")
    parser.add_argument("-f", "--force", action="store_true", help="overwrite existing files")


def _plane_options(parser) -> None:
    parser.add_argument("--x", required=True, help="parameter on the horizontal axis")
    parser.add_argument("--y", help="parameter on the vertical axis (default: the bifurcation "
                        "parameter)")
    for axis in ("x", "y"):
        parser.add_argument(f"--{axis}-range", nargs=2, type=ranges.range_bound(f"--{axis}-range"),
                            action=ranges.OrderedPair, metavar=("LOW", "HIGH"), required=True)
    parser.add_argument("--stability", choices=("closed-form", "eigenvalues"),
                        default="closed-form", help="how the stable region is decided")
    parser.add_argument("--size", nargs=2, type=ranges.real("--size", ranges.SIZE),
                        default=(6.4, 4.8),
                        metavar=("WIDTH", "HEIGHT"), help="figure size in inches")
    parser.add_argument("--dpi", type=ranges.integer("--dpi", ranges.DPI), default=100,
                        help="pixels per inch of PNG output")
    parser.add_argument("--points", type=ranges.integer("--points", ranges.POINTS), default=400,
                        help="samples along the curve")


def _check_options(parser) -> None:
    parser.add_argument("--offsets", type=ranges.real("--offsets", ranges.OFFSETS), nargs="+",
                        metavar="DELTA",
                        help="distances |mu - mu_c| to check (default: from the problem's scale)")
    parser.add_argument("--tolerance", type=ranges.real("--tolerance", ranges.TOLERANCE),
                        default=0.05,
                        help="largest relative error accepted at the smallest offset")
    parser.add_argument("--method", choices=("DOP853", "RK45", "Radau", "BDF", "LSODA"),
                        help="scipy integrator (default: DOP853, LSODA when stiff)")
    parser.add_argument("--max-periods", type=ranges.integer("--max-periods", ranges.MAX_PERIODS),
                        default=4000,
                        help="cap on the length of one run, in periods")


def register(subparsers: Any) -> None:
    """Add the ``confirm``, ``plane`` and ``survey`` subcommands.

    ``subparsers`` is what ``ArgumentParser.add_subparsers()`` returned; each
    subcommand sets ``handler`` to a function ``handler(args) -> int``.
    """
    p = subparsers.add_parser(
        "confirm", help="check the predicted cycle by simulating the model",
        description="Simulate the model near onset and compare the cycle with the prediction. "
                    f"Exit status 0: confirmed; {EXIT_NOT_CONFIRMED}: not confirmed; "
                    f"{EXIT_INCONCLUSIVE}: inconclusive.")
    _common(p)
    _check_options(p)
    p.add_argument("--format", choices=("text", "latex"), default="text")
    p.add_argument("-o", "--output", metavar="FILE",
                   help="write the report to FILE instead of standard output")
    p.add_argument("--amplitude-plot", metavar="FILE",
                   help="also draw the predicted and simulated amplitudes (PNG, SVG or PDF)")
    p.set_defaults(handler=_confirm)

    p = subparsers.add_parser(
        "plane", help="draw the Hopf curve in a plane of two parameters",
        description="Draw the Hopf curve, its super- and subcritical pieces, the points where "
                    "l1 vanishes and the region where the equilibrium is stable.")
    _common(p)
    _plane_options(p)
    p.add_argument("-o", "--output", required=True, metavar="FILE",
                   help="image file (.png, .svg or .pdf)")
    p.add_argument("--csv", metavar="FILE", help="also write the curve's points as CSV")
    p.set_defaults(handler=_plane)

    p = subparsers.add_parser(
        "survey", help="the check report and the diagrams, into one folder",
        description="Write " + ", ".join(_SURVEY_FILES) + " into a folder.")
    _common(p)
    _check_options(p)
    _plane_options(p)
    p.add_argument("--out-dir", required=True, metavar="DIR",
                   help="folder for the files (created if needed)")
    p.set_defaults(handler=_survey)


# -- turning arguments into library calls -------------------------------------------------------


def _quiet(args) -> bool:
    return bool(getattr(args, "quiet", False))


def _point(args) -> dict:
    from ..errors import ParameterError

    out = {}
    for d in args.point:
        for key, value in d.items():
            if key in out:
                raise ParameterError(f"--at: {key!r} is given twice")
            out[key] = value
    return out


def _analyse(args):
    return analyse_from_args(args), _point(args)


def _validate(args, result, values):
    from .support import Stage
    from ..checks.validation import validate

    with Stage("simulating the model near onset", quiet=_quiet(args)):
        return validate(result, values, offsets=args.offsets, tolerance=args.tolerance,
                        method=args.method, max_periods=args.max_periods)


def _status(report) -> int:
    return {"confirmed": 0, "not confirmed": EXIT_NOT_CONFIRMED}.get(report.verdict,
                                                                    EXIT_INCONCLUSIVE)


def _confirm(args) -> int:
    """``confirm``: the simulation check report (and the amplitude plot; the
    files are written all or nothing)."""
    from ..files import write_all

    result, values = _analyse(args)
    files = [p for p in (args.output, args.amplitude_plot) if p not in (None, "-")]
    for path in files:
        _refuse_existing(path, args.force)
    report = _validate(args, result, values)
    text = (report.to_latex() if args.format == "latex" else str(report)) + "\n"
    items = {}
    if args.output not in (None, "-"):
        items[args.output] = text
    if args.amplitude_plot:
        from ..outputs.plots import figure_bytes, plot_amplitude

        drawn = plot_amplitude(result, values, simulated=report)
        items[args.amplitude_plot] = figure_bytes(drawn.figure, args.amplitude_plot)
    write_all(items, force=args.force)
    if args.output in (None, "-"):
        sys.stdout.write(text)
    return _status(report)


def _diagram(args, result, values):
    from .support import Stage
    from ..outputs.plots import plot_parameter_plane

    y = args.y or result.parameter
    with Stage("drawing the parameter plane", quiet=_quiet(args)):
        return plot_parameter_plane(
            result, args.x, y, values=values, x_range=tuple(args.x_range),
            y_range=tuple(args.y_range), stability=args.stability.replace("-", " "),
            figsize=tuple(args.size), dpi=args.dpi, points=args.points)


def _check_picture(args) -> None:
    """--size and --dpi together: a picture of at most ranges.MAX_PIXELS pixels."""
    from .options import UsageError

    width, height = args.size
    pixels = width * height * args.dpi ** 2
    if pixels > ranges.MAX_PIXELS:
        raise UsageError(f"--size {width:g} {height:g} at --dpi {args.dpi} makes a picture of "
                         f"{pixels:.3g} pixels; the limit is {ranges.MAX_PIXELS:.0e} (a smaller "
                         "--size or --dpi)")


def _make_folder(folder) -> None:
    """The survey's folder, created only once every file is ready."""
    from ..errors import OutputError

    try:
        os.makedirs(folder, exist_ok=True)
    except OSError as exc:
        raise OutputError(f"cannot create the folder {folder}: {exc.strerror or exc}") from None


def _refuse_existing(path, force):
    from ..files import check_writable

    check_writable(path, force)


def _plane(args) -> int:
    """``plane``: the parameter-plane diagram (and its CSV)."""
    from ..checks.plane import curve_csv
    from ..files import write_all
    from ..outputs.plots import figure_bytes

    _check_picture(args)
    result, values = _analyse(args)
    for path in filter(None, (args.output, args.csv)):
        _refuse_existing(path, args.force)
    drawn = _diagram(args, result, values)
    items: dict[str, str | bytes] = {args.output: figure_bytes(drawn.figure, args.output)}
    if args.csv:
        items[args.csv] = curve_csv(drawn.curve)
    write_all(items, force=args.force)
    if not _quiet(args):
        print(f"criticality: wrote {args.output}" + (f" and {args.csv}" if args.csv else ""),
              file=sys.stderr)
    return 0


def _survey(args) -> int:
    """``survey``: report and diagrams into one folder."""
    from ..checks.plane import curve_csv
    from ..files import write_all
    from ..outputs.plots import figure_bytes, plot_amplitude

    _check_picture(args)
    result, values = _analyse(args)
    paths = {name: os.path.join(args.out_dir, name) for name in _SURVEY_FILES}
    if os.path.isdir(args.out_dir):
        for path in paths.values():
            _refuse_existing(path, args.force)
    drawn = _diagram(args, result, values)
    report = _validate(args, result, values)
    amp = plot_amplitude(result, values, simulated=report)
    contents = {"report.txt": str(report) + "\n", "report.tex": report.to_latex() + "\n",
                "plane.png": figure_bytes(drawn.figure, paths["plane.png"]),
                "plane.svg": figure_bytes(drawn.figure, paths["plane.svg"]),
                "curve.csv": curve_csv(drawn.curve),
                "amplitude.png": figure_bytes(amp.figure, paths["amplitude.png"])}
    _make_folder(args.out_dir)
    write_all({paths[name]: contents[name] for name in _SURVEY_FILES}, force=args.force)
    print(str(report))
    if not _quiet(args):
        print(f"criticality: wrote {', '.join(_SURVEY_FILES)} into {args.out_dir}",
              file=sys.stderr)
    return _status(report)

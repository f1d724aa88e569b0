"""The ``export`` subcommand: the closed forms as a numpy module or C code.

Pipeline place: **command line** -> Hopf analysis ->
:mod:`criticality.outputs.export`.  A shell only.
"""

from __future__ import annotations

from typing import Any

import argparse
import sys

__all__ = ["register"]


def _export(args) -> int:
    from .options import analyse_from_args
    from .support import Stage, write_output
    from ..outputs.export import c_code, numpy_module

    result = analyse_from_args(args)
    with Stage(f"writing the {args.to} code", quiet=bool(getattr(args, "quiet", False))):
        text = numpy_module(result) if args.to == "numpy" else c_code(result, args.prefix)
    written = write_output(text, args.output, force=args.force)
    if written and not getattr(args, "quiet", False):
        print(f"criticality: wrote {written}", file=sys.stderr)
    return 0


def register(subparsers: Any) -> None:
    """Add the ``export`` subcommand."""
    from .options import add_analysis_options

    p = subparsers.add_parser(
        "export", help="the closed forms as a numpy module or C code",
        description="Write the closed forms (critical value, omega, transversality, l1, the "
                    "cycle's coefficients) as a standalone Python module (numpy only) or as "
                    "C99 functions (math.h only).")
    p.add_argument("-q", "--quiet", action="store_true", default=argparse.SUPPRESS,
                   help="no progress messages on standard error")
    p.add_argument("--debug", action="store_true", default=argparse.SUPPRESS,
                   help="show the traceback of an error")
    add_analysis_options(p)
    p.add_argument("--to", choices=("numpy", "c"), default="numpy",
                   help="the target: a Python module using numpy (default) or C99 code")
    p.add_argument("--prefix", default="hopf_", help="prefix of the C function names")
    p.add_argument("-o", "--output", metavar="FILE",
                   help="write to FILE (written atomically) instead of standard output")
    p.add_argument("-f", "--force", action="store_true", help="overwrite FILE if it exists")
    p.set_defaults(handler=_export)

"""``criticality demo``: the whole job on a bundled invented model.

Pipeline place: **command line**.  Reads ``criticality/data/demo.toml`` with
:mod:`importlib.resources`, runs the analysis and prints every output (the
summary, an excerpt of the LaTeX, an excerpt of the JSON, numeric values at
the file's parameter values and at a second point where the verdict flips);
with ``--output-dir`` it also writes the model, the LaTeX report and the JSON
there.  No mathematics here.
"""

from __future__ import annotations

import argparse
import json
import os
from importlib.resources import files
from typing import TYPE_CHECKING, cast

from .support import Stage, write_output

if TYPE_CHECKING:
    from ..hopf_analysis.results import HopfResult

__all__ = ["demo_text", "run_demo", "DEMO_RESOURCE"]

#: the bundled model, relative to the package
DEMO_RESOURCE = ("data", "demo.toml")
_RULE = "=" * 78


def demo_text() -> str:
    """The text of the bundled demo model file."""
    resource = files("criticality")
    for part in DEMO_RESOURCE:
        resource = resource.joinpath(part)
    return resource.read_text(encoding="utf-8")


def _heading(title: str) -> str:
    return f"\n{_RULE}\n{title}\n{_RULE}\n"


def _json_excerpt(result, digits: int) -> str:
    from ..outputs.json_io import result_to_dict

    data = result_to_dict(result, point={}, digits=digits)
    keys = ("schema", "schema_version", "parameter", "critical_value", "omega_squared", "l1",
            "classification")
    excerpt = {k: data[k] for k in keys}
    excerpt["numeric"] = {k: data["numeric"][k] for k in ("point", "critical_value", "l1",
                                                           "classification")}
    return json.dumps(excerpt, indent=2) + "\n  (excerpt; the full document has " \
        f"{len(data)} top-level keys)\n"


def _write_files(result, text: str, folder: str, force: bool) -> list:
    from ..outputs.json_io import result_to_json
    from ..outputs.latex import latex_report

    from ..errors import OutputError
    from ..files import write_all

    items = {os.path.join(folder, name): content for name, content in (
        ("demo-model.toml", text), ("demo-report.tex", latex_report(result)),
        ("demo-result.json", result_to_json(result, point={}) + "\n"))}
    try:
        os.makedirs(folder, exist_ok=True)
    except OSError as exc:
        raise OutputError(f"cannot create the folder {folder}: {exc.strerror or exc}") from None
    return list(write_all(items, force=force))  # all three or none


def run_demo(args: argparse.Namespace, *, quiet: bool = False) -> int:
    """Print the demo; returns the exit status."""
    from ..hopf_analysis.analysis import hopf
    from ..outputs.latex import result_to_latex
    from ..model.core import Model
    from ..outputs.text import numeric_summary, result_summary

    text = demo_text()
    model = Model.from_text(text, source="criticality/data/demo.toml")
    with Stage("Hopf analysis of the demo model", quiet=quiet):
        result = cast("HopfResult", hopf(model))  # the bundled demo model is an ordinary flow
    digits = args.digits
    parts = [_heading("criticality demo: an invented greenhouse heating loop"),
             "The bundled model file (criticality/data/demo.toml):\n\n", text,
             _heading("1. The terminal summary (criticality analyse demo.toml)"),
             result_summary(result),
             _heading("2. LaTeX: the quantities as equations (criticality report ... "
                      "--fragment); the full report is a standalone document"),
             result_to_latex(result) + "\n",
             _heading("3. JSON (criticality json demo.toml --at ...)"),
             _json_excerpt(result, digits),
             _heading("4. Numbers at the file's parameter values (criticality evaluate)"),
             numeric_summary(result.evaluate({}, digits=digits)),
             "\nThe same loop with a milder asymmetry, c = 1:\n",
             numeric_summary(result.evaluate({"c": 1}, digits=digits))]
    if args.output_dir:
        written = _write_files(result, text, args.output_dir, args.force)
        parts.append(_heading("5. Files written"))
        parts.append("\n".join(f"  {p}" for p in written) + "\n")
    parts.append(_heading("Next steps"))
    parts.append("  criticality demo --output-dir demo-out      # the model, report and JSON\n"
                 "  pdflatex demo-out/demo-report.tex           # the derivation as a PDF\n"
                 "  criticality analyse my-model.toml           # your own model "
                 "(docs/model-files.md)\n")
    write_output("".join(parts), None)
    return 0

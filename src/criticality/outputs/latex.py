"""LaTeX output of a Hopf result: equations, a notebook block and a report.

Pipeline place: result -> **LaTeX** (``result.to_latex()``,
``result._repr_latex_()``, :func:`latex_report`, ``criticality report``).

* :func:`result_to_latex`: every quantity as a row of an ``align*`` block,
  sized for one column of a two-column page: long sums inside an expression
  are named (``P_{1} = ...``, defined below the block) and what is still too
  wide breaks between terms.
* :func:`result_to_notebook_latex`: a compact ``$$\\begin{aligned}...$$``
  block for Jupyter.
* :func:`latex_report`: a standalone document (amsmath, amssymb, geometry,
  booktabs only) with the whole derivation: model and assumptions,
  equilibrium, Jacobian, characteristic polynomial and critical set,
  frequency and transversality, eigenvectors, the reduced system on the
  center manifold, normal-form coefficients, the criticality condition, the
  cycle, the conditions, the conventions and the cautions.

Model names are typeset without ever colliding with LaTeX macros (``E``,
``I``, ``lambda``, ``gamma``, ``x_eq`` all work); see
:func:`criticality.outputs.latex_expr.latex_name`.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import sympy

from ..renderers import register_renderer
from .latex_expr import latex_name
from .latex_sections import Document, parametrisation_head, report_body

if TYPE_CHECKING:
    from ..hopf_analysis.results import HopfResult

__all__ = ["result_to_latex", "result_to_notebook_latex", "latex_report", "latex_name"]

_PREAMBLE = r"""\documentclass[11pt]{article}
\usepackage[margin=2.2cm]{geometry}
\usepackage{amsmath}
\usepackage{amssymb}
\usepackage{booktabs}
\allowdisplaybreaks
\setlength{\parindent}{0pt}
\setlength{\parskip}{0.6\baselineskip}
\renewcommand{\arraystretch}{1.5}
\newcommand{\statuslabel}[1]{\textsc{#1}}
"""


def _quantity_rows(doc: Document) -> list:
    r, w = doc.result, doc.writer
    rows = []
    rows += w.align_rows(doc.mu_c, r.critical_value)
    rows += w.align_rows(doc.omega_tex + "^{2}", r.omega_squared)
    rows += w.align_rows(doc.omega_tex, r.omega)
    rows += w.align_rows("T", 2 * sympy.pi * doc.omega ** -1)
    rows += w.align_rows(doc.re_dlambda, r.transversality)
    re_c1, im_c1 = doc.split(r.c1)
    rows += w.align_rows("\\operatorname{Re} c_{1}", re_c1)
    rows += w.align_rows("\\operatorname{Im} c_{1}", doc.with_omega(im_c1))
    rows += w.align_rows("\\ell_{1}", doc.over_omega(r.l1))
    for k, coefficient in enumerate(r.lyapunov_coefficients[1:], start=2):
        rows += w.align_rows(f"\\ell_{{{k}}}", doc.over_omega(coefficient))
    rows.append(f"&\\text{{classification: {doc.text(r.classification)}}}")
    if r.supercritical_where is not None:
        rows.append("&\\text{supercritical exactly where}")
        rows += doc.inequality_rows(r.supercritical_where)
    direct = getattr(r, "direct_forms", None)
    if r.parametrisation is not None:
        rows.append(f"&\\text{{{parametrisation_head(doc)}}}")
    if direct is not None and direct.hopf_set is not None:
        rows.append("&\\text{Hopf set in the original parameters}")
        rows += w.align_rows("0", direct.hopf_set)
    return rows


def _with_definitions(doc: Document, rows: list, environment: str) -> list:
    definitions = doc.writer.definition_rows()
    if not definitions:
        return rows
    if environment == "align*":
        return rows + ["\\intertext{where}"] + definitions
    return rows + ["&\\text{where}"] + definitions


def result_to_latex(result: HopfResult, width: float = 40) -> str:
    """Every quantity of ``result`` as a row of one ``align*`` block.

    Parameters
    ----------
    result : HopfResult
    width : float
        Target width of a line of mathematics in characters; the default
        fits one column of a two-column page.

    Returns
    -------
    str
        ``\\begin{align*} ... \\end{align*}`` (amsmath), with the named
        factors defined after ``\\intertext{where}``.

    Examples
    --------
    >>> from criticality import Model, hopf
    >>> m = Model(["x", "y"], {"x": "y", "y": "-x + mu*y - x^2*y"}, {"mu": "real"})
    >>> tex = result_to_latex(hopf(m, "mu", equilibrium={"x": 0, "y": 0}))
    >>> [row for row in tex.splitlines() if row.startswith("\\\\ell")]
    ['\\\\ell_{1} &= - \\\\frac{1}{4} \\\\\\\\']
    """
    doc = Document(result, width=width, threshold=max(16, width * 0.55), zero_left=True)
    rows = _with_definitions(doc, _quantity_rows(doc), "align*")
    return doc.block(rows)


def result_to_notebook_latex(result: HopfResult, width: float = 70) -> str:
    """A compact ``$$\\begin{aligned} ... \\end{aligned}$$`` block for
    Jupyter (``_repr_latex_``): the critical value, the frequency, ``l1``
    and the verdict."""
    doc = Document(result, width=width, threshold=max(16, width * 0.5))
    w, r = doc.writer, result
    rows = w.align_rows(doc.mu_c, r.critical_value)
    rows += w.align_rows(doc.omega_tex + "^{2}", r.omega_squared)
    rows += w.align_rows("\\ell_{1}", doc.over_omega(r.l1))
    rows.append(f"&\\text{{classification: {doc.text(r.classification)}}}")
    if r.supercritical_where is not None:
        rows.append("&\\text{supercritical exactly where}")
        rows += doc.inequality_rows(r.supercritical_where)
    rows = _with_definitions(doc, rows, "aligned")
    return "$$\\begin{aligned}\n" + " \\\\\n".join(rows) + "\n\\end{aligned}$$"


def latex_report(result: HopfResult, width: float = 66, fragment: bool = False) -> str:
    """A standalone LaTeX document with the whole derivation of ``result``.

    It compiles with pdflatex using only amsmath, amssymb, geometry and
    booktabs (Debian's texlive-latex-base and texlive-latex-recommended).

    Parameters
    ----------
    result : HopfResult
    width : float
        Target width of a line of mathematics, in characters.
    fragment : bool
        Only the sections (no preamble, no ``\\begin{document}``), to drop
        into an existing article that loads amsmath, amssymb and booktabs.

    Returns
    -------
    str
        The text of a ``.tex`` file (or of the fragment).
    """
    from .. import __version__

    doc = Document(result, width=width, threshold=max(24, width * 0.45))
    if fragment:
        return (f"% criticality {__version__}: Hopf analysis (needs amsmath, amssymb, booktabs)\n"
                "\\providecommand{\\statuslabel}[1]{\\textsc{#1}}\n" + report_body(doc) + "\n")
    title = doc.text(f"Hopf bifurcation of {result.model.name}" if result.model.name
                     else "Hopf bifurcation analysis")
    head = _PREAMBLE + (f"\\title{{{title}}}\n"
                        f"\\author{{criticality {__version__}}}\n\\date{{}}\n"
                        "\\begin{document}\n\\maketitle\n")
    return head + report_body(doc) + "\n\\end{document}\n"



register_renderer("hopf", "latex", result_to_latex)
register_renderer("hopf", "notebook_latex", result_to_notebook_latex)
register_renderer("hopf", "report", latex_report)

"""The registry of renderers: how each kind of result becomes text, LaTeX,
JSON, HTML or Markdown.

Pipeline place: beside the results.  A result never imports its printers: it
names its kind (the class attribute ``result_kind``) and asks this registry
for the renderer of a format.  The output modules register their renderers
when they are imported; this module knows, per kind, which modules those are
(a static table, imported on first use), so that asking for a renderer is
enough to load it.

A new kind of result plugs in with one line per format, from its own output
module::

    register_renderer("my_kind", "text", my_text_function)

and, if that module should load by itself, one entry in :data:`PROVIDERS`
(or a call to :func:`add_provider`).

Examples
--------
>>> "latex" in FORMATS and "html" in FORMATS
True
>>> sorted(PROVIDERS)[:3]
['bautin', 'bogdanov_takens', 'flip']
"""

from __future__ import annotations

from importlib import import_module
from typing import Any, Callable

__all__ = ["FORMATS", "PROVIDERS", "register_renderer", "add_provider", "renderer", "render",
           "formats_of", "Rendered"]

#: the formats a renderer may be registered for
FORMATS = ("text", "details", "latex", "notebook_latex", "report", "json", "dict", "html",
           "markdown", "numpy", "c")

#: kind -> the output modules that register its renderers (imported on first use)
PROVIDERS: dict = {
    "hopf": ("criticality.outputs.text", "criticality.outputs.latex",
             "criticality.outputs.json_io", "criticality.outputs.notebook",
             "criticality.outputs.export"),
    "hopf_numeric_point": ("criticality.outputs.notebook",),
    "fold": ("criticality.outputs.simple", "criticality.outputs.notebook"),
    "bautin": ("criticality.outputs.simple", "criticality.outputs.notebook"),
    "bogdanov_takens": ("criticality.outputs.simple", "criticality.outputs.notebook"),
    "flip": ("criticality.outputs.simple", "criticality.outputs.notebook"),
    "neimark_sacker": ("criticality.outputs.simple", "criticality.outputs.notebook"),
    "fold_hopf": ("criticality.outputs.simple", "criticality.outputs.notebook"),
    "hopf_hopf": ("criticality.outputs.simple", "criticality.outputs.notebook"),
    "hopf_delay": ("criticality.delay.render",),
    "validation": ("criticality.outputs.notebook",),
}

_REGISTRY: dict = {}
_LOADED: set = set()


def register_renderer(kind: str, fmt: str, function: Callable[..., Any]) -> Callable[..., Any]:
    """Register ``function(result, **options)`` as the ``fmt`` renderer of
    results of kind ``kind`` (replacing an earlier one); returns it."""
    if fmt not in FORMATS:
        raise ValueError(f"unknown output format {fmt!r}; known: {', '.join(FORMATS)}")
    _REGISTRY[(kind, fmt)] = function
    return function


def add_provider(kind: str, *modules: str) -> None:
    """Name further modules that register renderers for ``kind``."""
    PROVIDERS[kind] = tuple(PROVIDERS.get(kind, ())) + tuple(modules)
    _LOADED.discard(kind)


def _load(kind: str) -> None:
    if kind in _LOADED:
        return
    for module in PROVIDERS.get(kind, ()):
        import_module(module)
    _LOADED.add(kind)


def renderer(kind: str, fmt: str) -> Callable[..., Any]:
    """The registered renderer, loading the kind's output modules first.

    Raises
    ------
    LookupError
        Naming the kind, the format and the formats that kind has.
    """
    _load(kind)
    try:
        return _REGISTRY[(kind, fmt)]
    except KeyError:
        have = ", ".join(formats_of(kind)) or "none"
        raise LookupError(f"no {fmt!r} renderer is registered for results of kind {kind!r} "
                          f"(registered formats: {have})") from None


def formats_of(kind: str) -> tuple:
    """The formats registered for ``kind``."""
    _load(kind)
    return tuple(f for f in FORMATS if (kind, f) in _REGISTRY)


def render(result: Any, fmt: str, **options: Any) -> Any:
    """``result`` in the format ``fmt``, by the renderer registered for its
    kind (the class attribute ``result_kind``)."""
    kind = getattr(result, "result_kind", None)
    if kind is None:
        raise LookupError(f"{type(result).__name__} declares no result_kind")
    return renderer(kind, fmt)(result, **options)


class Rendered:
    """The display methods every result kind shares, each a call to
    :func:`render` for the kind's ``result_kind``: a result class lists its
    fields and inherits these (text, details, LaTeX, JSON and its dictionary,
    and the notebook displays)."""

    __slots__ = ()

    def summary(self) -> str:
        """The result as plain text (a table, notes, conventions and cautions)."""
        return render(self, "text")

    def details(self) -> str:
        """The full plain text."""
        return render(self, "details")

    def to_latex(self) -> str:
        """The quantities as an ``align*`` block."""
        return render(self, "latex")

    def to_json(self, **kwargs: Any) -> str:
        """The result as JSON in the shared envelope."""
        return render(self, "json", **kwargs)

    def to_dict(self, **kwargs: Any) -> dict:
        """The JSON document as a dictionary."""
        return render(self, "dict", **kwargs)

    def _repr_html_(self) -> str:
        return render(self, "html")

    def _repr_markdown_(self) -> str:
        return render(self, "markdown")

    def _repr_latex_(self) -> str:
        return render(self, "notebook_latex")

    def __str__(self) -> str:
        return self.summary()

"""The one JSON envelope of every result kind.

Pipeline place: result -> **envelope** -> JSON text.  Every document starts
with the same keys, in this order::

    {"schema": ..., "schema_version": 1, "generator": {...}, "analysis": ...,
     "status": ..., "conventions": ..., <the kind's own keys>, "notes": [...],
     "cautions": [...]}

``schema_version`` is the integer 1 for every kind.  Documents written before
the envelope was shared stored the version of the fold, Bautin and
Bogdanov-Takens results as the string ``"1"``; :func:`read_envelope` reads
both.
"""

from __future__ import annotations

import json
from typing import Any, Mapping, Sequence

from .render import CAUTIONS
from ..errors import ModelFileError
from ..model.parameter import ASSUMPTIONS, symbol_for

__all__ = ["SCHEMA_VERSION", "READABLE_VERSIONS", "envelope", "read_envelope", "read_document",
           "document_symbols"]

#: the version every document is written with
SCHEMA_VERSION = 1
#: versions the reader accepts (old documents stored the version as a string)
READABLE_VERSIONS = (1, "1")


def envelope(schema: str, analysis: str, body: Mapping[str, Any], *, status: str, conventions: Any,
             notes: Sequence[str] = (), cautions: Sequence[str] = CAUTIONS,
             tail: Mapping | None = None) -> dict:
    """The document of one result: the shared head, ``body``, notes,
    cautions, then ``tail`` (keys that belong after the cautions).

    >>> doc = envelope("criticality.fold", "fold", {"a": "2"}, status="closed form",
    ...                conventions=["A q = 0"])
    >>> list(doc)[:6], doc["schema_version"]
    (['schema', 'schema_version', 'generator', 'analysis', 'status', 'conventions'], 1)
    """
    from .. import __version__

    doc = {"schema": schema, "schema_version": SCHEMA_VERSION,
           "generator": {"name": "criticality", "version": __version__},
           "analysis": analysis, "status": status, "conventions": conventions}
    doc.update(body)
    doc["notes"] = list(notes)
    doc["cautions"] = list(cautions)
    doc.update(tail or {})
    return doc


def read_envelope(doc: Any, schema: str | None = None) -> dict:
    """Check the head of a parsed document; returns it.

    Raises
    ------
    ModelFileError
        If it is not an object of ``schema`` (any criticality schema when
        None) or its version is not one this reader knows.

    >>> read_envelope({"schema": "criticality.fold", "schema_version": "1"})["schema"]
    'criticality.fold'
    """
    name = doc.get("schema") if isinstance(doc, dict) else None
    if schema is not None and name != schema:
        raise ModelFileError(f"not a {schema} document (the key 'schema' is missing or "
                             "different)")
    if not isinstance(name, str) or not name.startswith("criticality"):
        raise ModelFileError("not a criticality document (the key 'schema' is missing or "
                             "names another schema)")
    version = doc.get("schema_version")
    if version not in READABLE_VERSIONS or isinstance(version, bool):
        raise ModelFileError(f"{name} document of schema_version {version!r}: this reader "
                             f"knows version {SCHEMA_VERSION}")
    return doc


def read_document(text: str, schema: str | None = None) -> dict:
    """Parse JSON text of any result kind and check its envelope."""
    try:
        doc = json.loads(text)
    except (TypeError, ValueError) as exc:
        raise ModelFileError(f"not a JSON document: {exc}") from None
    except RecursionError:
        raise ModelFileError("not a JSON document this reader accepts: arrays or objects are "
                             "nested too deeply") from None
    return read_envelope(doc, schema)


def document_symbols(doc: Mapping[str, Any]) -> dict:
    """Name -> the sympy symbol a result used, rebuilt from a document: the
    states real, each parameter with the assumption the document declares
    for it (``model.parameters``, a list of objects with ``name`` and
    ``assumption`` or an object name -> assumption), and further free symbols
    (``x_eq`` of a parametrised family) with the word under ``assumptions``.
    These are the model's own symbols (:attr:`criticality.Model.symbols`), so
    expressions read back equal the result's.

    Raises
    ------
    ModelFileError
        For an assumption word the model syntax does not know.

    >>> table = document_symbols({"model": {"states": ["x"], "parameters": [
    ...     {"name": "a", "assumption": "positive"}]}})
    >>> table["a"].is_positive, table["x"].is_real
    (True, True)
    """
    model = doc.get("model")
    model = model if isinstance(model, Mapping) else {}
    declared: dict[str, object] = {}
    extra = doc.get("assumptions")
    if isinstance(extra, Mapping):
        declared.update((str(k), v) for k, v in extra.items())
    listed = model.get("parameters")
    if isinstance(listed, Mapping):
        declared.update((str(k), v) for k, v in listed.items())
    elif isinstance(listed, list):
        declared.update((str(p.get("name")), p.get("assumption", "real")) for p in listed
                        if isinstance(p, Mapping) and isinstance(p.get("name"), str))
    out = {}
    for name, word in declared.items():
        if word not in ASSUMPTIONS:
            raise ModelFileError(f"the document declares {name!r} as {str(word)[:40]!r}; "
                                 f"expected one of {', '.join(ASSUMPTIONS)}")
        out[name] = symbol_for(name, str(word))
    states = model.get("states")
    for name in states if isinstance(states, list) else ():
        if isinstance(name, str):
            out[name] = symbol_for(name)
    return out

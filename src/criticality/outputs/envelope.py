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

__all__ = ["SCHEMA_VERSION", "READABLE_VERSIONS", "envelope", "read_envelope", "read_document"]

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

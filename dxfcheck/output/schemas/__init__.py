"""The published JSON Schemas (draft 2020-12) of every JSON document.

One file per document, shipped with the package and printed by
``dxfcheck schema NAME``; each schema's ``schema`` constant is the
document's versioned name (:data:`DOCUMENTS`), so that a document's version
and its schema's change together.  ``solve``, ``check`` and ``compare`` also
accept the error document (``error.json``) they print with ``--json`` when
they refuse a drawing; ``check`` builds on ``solve`` by ``$ref``, and so
do ``linings`` and ``skeleton`` for the parts they share.
"""

from __future__ import annotations

import json
from importlib import resources
from typing import Any

__all__ = ["DOCUMENTS", "SCHEMA_NAMES", "load_schema", "name_of_document", "schema_text"]

#: Schema name (``dxfcheck schema NAME``) -> the versioned name of the
#: document it describes (the document's ``schema`` field).
DOCUMENTS: dict[str, str] = {
    "solve": "dxfcheck.solve/2",
    "check": "dxfcheck.check/2",
    "compare": "dxfcheck.revision.compare/2",
    "batch": "dxfcheck.batch/2",
    "sensitivity": "dxfcheck.statics.sampling/1",
    "linings": "dxfcheck.linings/1",
    "skeleton": "dxfcheck.skeleton/1",
}
#: The names ``dxfcheck schema`` takes, in the order it lists them: the
#: documents', then ``error`` (the refusal document of ``solve``, ``check``
#: and ``compare``, printed under the command's own ``schema`` name; their
#: schemas include it).
SCHEMA_NAMES: tuple[str, ...] = (*DOCUMENTS, "error")


def _resolve(name: str) -> str:
    """A schema name, or a document's versioned name, as a schema name."""
    if name in SCHEMA_NAMES:
        return name
    for short, full in DOCUMENTS.items():
        if name == full:
            return short
    raise KeyError(name)


def schema_text(name: str) -> str:
    """The schema's JSON text as shipped.

    Raises
    ------
    KeyError
        For a name that is neither a schema name nor a document's name.
    """
    return (resources.files(__name__) / f"{_resolve(name)}.json").read_text(encoding="utf-8")


def load_schema(name: str) -> dict[str, Any]:
    """The schema as a dict (see :func:`schema_text`)."""
    data: dict[str, Any] = json.loads(schema_text(name))
    return data


def name_of_document(doc: dict[str, Any]) -> str:
    """The schema name whose versioned name is the document's ``schema``
    (an error document names its command's, whose schema includes it).

    Raises
    ------
    KeyError
        When the document names no published schema.
    """
    name = doc.get("schema")
    for short, full in DOCUMENTS.items():
        if name == full:
            return short
    raise KeyError(name)

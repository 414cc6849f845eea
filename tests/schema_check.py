"""Every JSON document the tests read is checked against its published
schema (``dxfcheck/output/schemas``, JSON Schema draft 2020-12) with the
``jsonschema`` package: :func:`output_json` parses a command's output and
validates it; ``conftest.py`` offers it as the fixture ``output_json`` too.
(The project's own convention: no published source.)"""

from __future__ import annotations

import json
from collections import Counter
from functools import cache
from typing import Any

import jsonschema
from referencing import Registry, Resource

from dxfcheck.output.schemas import SCHEMA_NAMES, load_schema, name_of_document

__all__ = ["VALIDATED", "output_json", "registry", "validate_document", "validator"]

#: Documents validated in this run, per schema name (printed at the end).
VALIDATED: Counter[str] = Counter()


@cache
def registry() -> Registry:
    """Every shipped schema under its ``$id`` (they refer to each other)."""
    resources = [Resource.from_contents(load_schema(n)) for n in SCHEMA_NAMES]
    return Registry().with_resources((r.id(), r) for r in resources if r.id())


@cache
def validator(name: str) -> jsonschema.Draft202012Validator:
    schema = load_schema(name)
    jsonschema.Draft202012Validator.check_schema(schema)
    return jsonschema.Draft202012Validator(schema, registry=registry())


def validate_document(doc: Any, name: str | None = None) -> Any:
    """``doc``, after validating it against its schema (by its ``schema``
    field unless ``name`` is given); raises ``jsonschema.ValidationError``."""
    name = name or name_of_document(doc)
    error = jsonschema.exceptions.best_match(validator(name).iter_errors(doc))
    if error is not None:
        raise error
    VALIDATED[name] += 1
    return doc


def output_json(text: str) -> Any:
    """Parse one JSON document printed by dxfcheck and validate it."""
    return validate_document(json.loads(text))

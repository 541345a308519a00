"""Validation of JSON reports against ``verifier/schema/report.schema.json`` (used by conftest and CLI tests)."""

from __future__ import annotations

import functools
import importlib
from typing import Any

from verifier.schema import report_schema


@functools.lru_cache(maxsize=2)
def _validator(definition: str | None) -> Any:
    """A validator for the whole report (None) or for one of its ``$defs``; None without jsonschema."""
    try:
        jsonschema = importlib.import_module("jsonschema")
    except ImportError:
        return None
    schema = report_schema()
    if definition is not None:
        schema = {**schema, "$ref": f"#/$defs/{definition}"}
        schema.pop("required", None)
        schema.pop("properties", None)
    cls = jsonschema.Draft202012Validator
    cls.check_schema(schema)
    return cls(schema)


def _check(data: Any, definition: str | None) -> None:
    validator = _validator(definition)
    if validator is None:
        return
    errors = sorted(validator.iter_errors(data), key=lambda e: list(e.absolute_path))
    if errors:
        lines = [f"{'/'.join(map(str, e.absolute_path)) or '<top>'}: {e.message}" for e in errors[:10]]
        raise AssertionError("report does not match report.schema.json:\n" + "\n".join(lines))


def validate_report(data: Any) -> None:
    """Raise AssertionError if ``data`` (a whole report) does not match the schema."""
    _check(data, None)


def validate_claim(data: Any) -> None:
    """Raise AssertionError if ``data`` (one claim of a report) does not match the schema."""
    _check(data, "claim")

"""The JSON contract (see README): stable fields, only ever extended."""

from __future__ import annotations

import json

from verifier.api import Report


def render(report: Report) -> str:
    """The report as indented JSON."""
    return json.dumps(report.to_dict(), indent=2, ensure_ascii=False) + "\n"

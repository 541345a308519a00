"""Reading a JSON report (the only thing the re-checker takes from qreferee: its output)."""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any


class Unreadable(Exception):
    """The report cannot be read as a qreferee JSON report."""


def read_report(path: str | Path) -> dict[str, Any]:
    """The report at ``path`` as a dict with a list of ``claims``."""
    try:
        data = json.loads(Path(path).read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, json.JSONDecodeError) as exc:
        raise Unreadable(f"cannot read {path}: {exc}") from exc
    if not isinstance(data, dict) or not isinstance(data.get("claims"), list):
        raise Unreadable(f"{path} is not a qreferee JSON report (no list of claims)")
    return data

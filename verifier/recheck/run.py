"""Re-check every certificate of a report, and print the outcome.

Exit status of ``qreferee recheck``: 0 every certificate confirmed; 1 some certificate not
re-checked (a construct or method this checker does not implement), none failed; 4 some
certificate failed (``recheck-failed``); 2 the report cannot be read.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field
from typing import Any

from verifier.recheck.check import CONFIRMED, FAILED, NOT_RECHECKED, Result, recheck

EXIT_CONFIRMED = 0
EXIT_NOT_RECHECKED = 1
EXIT_UNREADABLE = 2
EXIT_FAILED = 4


@dataclass
class Rechecked:
    """The re-checker's results on a whole report, in claim order."""

    entries: list[tuple[dict[str, Any], Result]] = field(default_factory=list)

    def count(self, status: str) -> int:
        """How many certificates got ``status``."""
        return sum(1 for _, r in self.entries if r.status == status)

    @property
    def exit_code(self) -> int:
        """See the module docstring."""
        if self.count(FAILED):
            return EXIT_FAILED
        if self.count(NOT_RECHECKED):
            return EXIT_NOT_RECHECKED
        return EXIT_CONFIRMED


def recheck_report(report: dict[str, Any]) -> Rechecked:
    """Re-check the certificate of every proved claim of a JSON report."""
    out = Rechecked()
    for claim in report.get("claims", []):
        if not isinstance(claim, dict) or claim.get("verdict") != "proved":
            continue
        cert = claim.get("certificate")
        if cert is None:
            out.entries.append((claim, Result(NOT_RECHECKED, ["the proved claim carries no certificate"])))
            continue
        out.entries.append((claim, recheck(cert)))
    return out


def render_text(done: Rechecked) -> str:
    """One line per certificate, ``file:line:col: severity: status: details``, and a summary."""
    lines = []
    for claim, result in done.entries:
        where = f"{claim.get('file')}:{claim.get('line')}:{claim.get('column')}"
        severity = {CONFIRMED: "note", NOT_RECHECKED: "warning", FAILED: "error"}[result.status]
        what = "; ".join(result.reasons) or "the certificate holds"
        if result.notes:
            what += " (" + "; ".join(result.notes) + ")"
        lines.append(f"{where}: {severity}: {result.status}: {what}")
    lines.append(
        f"recheck: {done.count(CONFIRMED)} confirmed, {done.count(NOT_RECHECKED)} not rechecked, "
        f"{done.count(FAILED)} failed"
    )
    if done.count(FAILED):
        lines.append("RECHECK FAILED: a certificate of qreferee does not hold up; please report it")
    return "\n".join(lines) + "\n"


def render_json(done: Rechecked) -> str:
    """The results as JSON: one entry per proved claim, and a summary."""
    data = {
        "rechecks": [
            {"file": c.get("file"), "line": c.get("line"), "column": c.get("column"), "label": c.get("label")}
            | r.to_dict()
            for c, r in done.entries
        ],
        "summary": {s: done.count(s) for s in (CONFIRMED, NOT_RECHECKED, FAILED)},
    }
    return json.dumps(data, indent=2) + "\n"

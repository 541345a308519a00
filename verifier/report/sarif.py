"""The report as SARIF 2.1.0 (the OASIS Static Analysis Results Interchange Format).

One run; the driver is ``qreferee`` with a fixed list of rules, so rule ids and indices
are stable from run to run:

* ``qreferee/proved``, ``qreferee/refuted``, ``qreferee/unproven``: one per verdict;
* ``qreferee/error/<code>``: one per diagnostic code (``qreferee explain <code>``), used by
  claims whose verdict is ``error`` and by document diagnostics alike;
* ``qreferee/error``: an error claim without a code.

Levels: ``error`` for refuted and error claims, ``warning`` for unproven, ``note`` for
proved; a document diagnostic keeps its own severity.  Columns count Unicode code points
(``columnKind``), as qreferee's columns do, and ``endColumn`` is one past the claim's
last character, as SARIF wants.
"""

from __future__ import annotations

import hashlib
import json
from pathlib import Path, PurePath
from typing import Any
from urllib.parse import quote

from verifier import __version__
from verifier.api import ClaimResult, Report
from verifier.diagnostics import CODES, Diagnostic
from verifier.location import Location

SCHEMA_URI = "https://docs.oasis-open.org/sarif/sarif/v2.1.0/os/schemas/sarif-schema-2.1.0.json"
LEVEL = {"proved": "note", "refuted": "error", "unproven": "warning", "error": "error"}
_VERDICT_RULES = {
    "proved": ("Proved", "The claim is proved, with a certificate (space, bound, method, coefficients compared)."),
    "refuted": ("Refuted", "The claim is false: the first coefficient at which the two sides differ is named."),
    "unproven": ("Unproven", "No proof applies; the report says how far the two sides agree."),
}


def rule_id(verdict: str, code: str | None = None) -> str:
    """The rule of a verdict, or of an error's diagnostic code."""
    if verdict != "error":
        return f"qreferee/{verdict}"
    return f"qreferee/error/{code}" if code in CODES else "qreferee/error"


def rules() -> list[dict[str, Any]]:
    """Every rule, in a fixed order (verdicts, the generic error, then codes as listed in CODES)."""
    out: list[dict[str, Any]] = []
    for verdict, (name, text) in _VERDICT_RULES.items():
        out.append(
            {
                "id": rule_id(verdict),
                "name": name,
                "shortDescription": {"text": f"claim {verdict}"},
                "fullDescription": {"text": text},
                "defaultConfiguration": {"level": LEVEL[verdict]},
            }
        )
    out.append(
        {
            "id": "qreferee/error",
            "name": "Error",
            "shortDescription": {"text": "claim cannot be read or has no meaning"},
            "fullDescription": {"text": "The claim cannot be read or has no meaning."},
            "defaultConfiguration": {"level": "error"},
        }
    )
    for code, (stage, doc) in CODES.items():
        out.append(
            {
                "id": rule_id("error", code),
                "name": "".join(part.capitalize() for part in code.split("-")),
                "shortDescription": {"text": code},
                "fullDescription": {"text": doc},
                "help": {"text": f"{doc} Run 'qreferee explain {code}'."},
                "defaultConfiguration": {"level": "error"},
                "properties": {"stage": stage},
            }
        )
    return out


def artifact_uri(file: str, base: Path | None = None) -> str:
    """A URI reference for a file name as qreferee reports it.

    Relative names stay relative; an absolute name under ``base`` (the current folder by
    default) is made relative to it, as code-scanning tools expect; any other absolute name
    becomes a ``file://`` URI.
    """
    path = PurePath(file.replace("\\", "/"))
    if path.is_absolute():
        root = PurePath((base or Path.cwd()).as_posix())
        if path.is_relative_to(root):
            return quote(path.relative_to(root).as_posix())
        return "file://" + quote(path.as_posix())
    return quote(path.as_posix())


def _region(start: Location, end: Location | None) -> dict[str, int]:
    region = {"startLine": max(start.line, 1), "startColumn": max(start.column, 1)}
    if end is not None and (end.line, end.column) >= (start.line, start.column):
        region["endLine"] = end.line
        region["endColumn"] = end.column + 1
    return region


def _location(start: Location, end: Location | None) -> dict[str, Any]:
    return {
        "physicalLocation": {
            "artifactLocation": {"uri": artifact_uri(start.file)},
            "region": _region(start, end),
        }
    }


def _claim_result(c: ClaimResult, index: dict[str, int]) -> dict[str, Any]:
    o = c.outcome
    rid = rule_id(o.verdict, o.code)
    who = f" [{c.name}]" if c.name else (f" ({c.label})" if c.label else "")
    hint = f" (hint: {o.hint})" if o.hint else ""
    text = f"{o.verdict}{who}: {o.message}{hint}"
    properties: dict[str, Any] = {
        "verdict": o.verdict,
        "claimKind": o.kind,
        "name": c.name,
        "label": c.label,
        "source": c.source,
        "space": o.space,
        "method": o.method,
        "bound": o.bound,
        "termsCompared": o.terms_compared,
        "firstDifference": o.first_difference,
        "seconds": round(c.seconds, 6),
    }
    if o.code:
        properties["code"] = o.code
    suggestion = getattr(o, "suggestion", None)
    if suggestion:
        properties["suggestion"] = suggestion
    fingerprint = hashlib.sha256(f"{c.location.file}\0{c.name or ''}\0{c.source}".encode()).hexdigest()
    return {
        "ruleId": rid,
        "ruleIndex": index[rid],
        "level": LEVEL.get(o.verdict, "error"),
        "message": {"text": text},
        "locations": [_location(c.location, c.end)],
        "partialFingerprints": {"qrefereeClaim/v1": fingerprint},
        "properties": properties,
    }


def _diagnostic_result(d: Diagnostic, index: dict[str, int]) -> dict[str, Any]:
    rid = rule_id("error", d.code)
    hint = f" (hint: {d.hint})" if d.hint else ""
    level = d.severity if d.severity in ("error", "warning", "note") else "error"
    return {
        "ruleId": rid,
        "ruleIndex": index[rid],
        "level": level,
        "message": {"text": f"{d.message} [{d.code}]{hint}"},
        "locations": [_location(d.location, None)],
        "properties": {"code": d.code, "diagnostic": True},
    }


def to_sarif(report: Report) -> dict[str, Any]:
    """The SARIF log of a run, as a JSON-ready dict."""
    all_rules = rules()
    index = {r["id"]: i for i, r in enumerate(all_rules)}
    results = [_diagnostic_result(d, index) for d in report.diagnostics]
    results += [_claim_result(c, index) for c in report.claims]
    files = list(dict.fromkeys([*report.files, *(c.location.file for c in report.claims)]))
    return {
        "$schema": SCHEMA_URI,
        "version": "2.1.0",
        "runs": [
            {
                "tool": {
                    "driver": {
                        "name": "qreferee",
                        "version": __version__,
                        "semanticVersion": __version__,
                        "rules": all_rules,
                    }
                },
                "artifacts": [{"location": {"uri": artifact_uri(f)}} for f in files],
                "columnKind": "unicodeCodePoints",
                "results": results,
                "properties": {"summary": report.summary},
            }
        ],
    }


def render(report: Report) -> str:
    """The SARIF log as indented JSON."""
    return json.dumps(to_sarif(report), indent=2, ensure_ascii=False) + "\n"

"""``--format sarif``: SARIF 2.1.0, validated against the standard's JSON schema.

The schema ``tests/data/sarif-2.1.0-rtm.5.json`` is the JSON Schema (draft-04) of SARIF
2.1.0, the OASIS standard, as distributed unchanged in the npm package
``@microsoft/jest-sarif`` 1.0.0-beta.0 (MIT licence), file
``lib/schemas/sarif-2.1.0-rtm.5.json``.  It is validated with the ``jsonschema`` package.
"""

from __future__ import annotations

import importlib
import json
import os
import subprocess
import sys
from pathlib import Path
from types import ModuleType
from typing import Any

import pytest
from verifier import check_path, check_text
from verifier.api import Report
from verifier.diagnostics import CODES
from verifier.report import sarif

REPO = Path(__file__).resolve().parent.parent
SAMPLES = REPO / "sample_docs"
SCHEMA = Path(__file__).parent / "data" / "sarif-2.1.0-rtm.5.json"


def jsonschema() -> ModuleType:
    """The validator; in CI (env CI set) it must be installed."""
    try:
        return importlib.import_module("jsonschema")
    except ImportError:
        if os.environ.get("CI"):
            raise
        pytest.skip("jsonschema not installed")


def validate(log: dict[str, Any]) -> None:
    js = jsonschema()
    schema = json.loads(SCHEMA.read_text(encoding="utf-8"))
    validator_class = js.validators.validator_for(schema)
    validator_class.check_schema(schema)
    errors = sorted(validator_class(schema).iter_errors(log), key=lambda e: list(e.path))
    assert not errors, "\n".join(f"{list(e.path)}: {e.message}" for e in errors[:10])


def both_samples() -> Report:
    report = Report()
    for name in ("paper.tex", "note.md"):
        r = check_path(SAMPLES / name)
        report.claims += r.claims
        report.diagnostics += r.diagnostics
        report.files += r.files
    return report


def test_samples_validate_against_the_schema() -> None:
    log = sarif.to_sarif(both_samples())
    validate(log)
    assert log["version"] == "2.1.0"
    assert log["$schema"].startswith("https://")


def test_schema_rejects_a_broken_log() -> None:
    log = sarif.to_sarif(both_samples())
    del log["runs"][0]["tool"]["driver"]["name"]
    js = jsonschema()
    schema = json.loads(SCHEMA.read_text(encoding="utf-8"))
    assert list(js.validators.validator_for(schema)(schema).iter_errors(log)), "the validator is really used"


def test_one_result_per_claim_with_level_rule_and_region(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(REPO)
    report = both_samples()
    run = sarif.to_sarif(report)["runs"][0]
    driver = run["tool"]["driver"]
    assert driver["name"] == "qreferee" and driver["version"]
    assert "informationUri" not in driver
    rules = driver["rules"]
    ids = [r["id"] for r in rules]
    assert len(ids) == len(set(ids))
    assert ids[:4] == ["qreferee/proved", "qreferee/refuted", "qreferee/unproven", "qreferee/error"]
    assert {f"qreferee/error/{code}" for code in CODES} <= set(ids)
    results = run["results"]
    assert len(results) == len(report.claims) + len(report.diagnostics)
    level = {"proved": "note", "refuted": "error", "unproven": "warning", "error": "error"}
    for c, r in zip(report.claims, results[len(report.diagnostics) :], strict=True):
        assert r["level"] == level[c.verdict]
        assert rules[r["ruleIndex"]]["id"] == r["ruleId"]
        if c.verdict == "error":
            assert r["ruleId"] == f"qreferee/error/{c.outcome.code}"
        else:
            assert r["ruleId"] == f"qreferee/{c.verdict}"
        assert c.outcome.message in r["message"]["text"]
        (loc,) = r["locations"]
        phys = loc["physicalLocation"]
        assert phys["artifactLocation"]["uri"] == sarif.artifact_uri(c.location.file)
        assert not phys["artifactLocation"]["uri"].startswith(("/", "file:"))  # relative to the current folder
        region = phys["region"]
        assert (region["startLine"], region["startColumn"]) == (c.location.line, c.location.column)
        if "endLine" in region:
            assert (region["endLine"], region["endColumn"]) == (c.end.line, c.end.column + 1)
        assert r["properties"]["verdict"] == c.verdict
    assert run["columnKind"] == "unicodeCodePoints"


def test_rule_ids_are_stable() -> None:
    a = sarif.to_sarif(check_text("%@claim\n\\[ E_4^2 = E_8 \\]\n", "a.tex"))
    b = sarif.to_sarif(both_samples())
    assert a["runs"][0]["tool"]["driver"]["rules"] == b["runs"][0]["tool"]["driver"]["rules"]


def test_end_column_is_exclusive() -> None:
    text = "%@claim name=x\n\\[ E_4^2 = E_8 \\]\n"
    (result,) = sarif.to_sarif(check_text(text, "doc.tex"))["runs"][0]["results"]
    region = result["locations"][0]["physicalLocation"]["region"]
    line = text.splitlines()[1]
    claim = line[region["startColumn"] - 1 : region["endColumn"] - 1]
    assert claim == "E_4^2 = E_8"


def test_diagnostics_are_results(tmp_path: Path) -> None:
    (tmp_path / "main.tex").write_text("\\input{missing}\n%@claim\n\\[ E_4 = E_6 \\]\n", encoding="utf-8")
    report = check_path(tmp_path / "main.tex")
    assert report.diagnostics
    log = sarif.to_sarif(report)
    validate(log)
    results = log["runs"][0]["results"]
    diag = results[0]
    assert diag["ruleId"] == "qreferee/error/include-missing"
    assert diag["level"] == "error"
    assert diag["properties"]["diagnostic"] is True
    assert results[1]["ruleId"] == "qreferee/refuted"


def test_uris_are_encoded() -> None:
    assert sarif.artifact_uri("sample docs/paper #1.tex") == "sample%20docs/paper%20%231.tex"
    assert sarif.artifact_uri("/abs/p.tex", base=Path("/elsewhere")) == "file:///abs/p.tex"
    assert sarif.artifact_uri("/abs/dir/p.tex", base=Path("/abs")) == "dir/p.tex"
    assert sarif.artifact_uri("dir\\p.tex") == "dir/p.tex"


def test_cli_sarif(tmp_path: Path) -> None:
    proc = subprocess.run(
        [sys.executable, "-m", "verifier", "check", "sample_docs/paper.tex", "--format", "sarif"],
        cwd=REPO,
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert proc.returncode == 2
    log = json.loads(proc.stdout)
    validate(log)
    uris = {r["locations"][0]["physicalLocation"]["artifactLocation"]["uri"] for r in log["runs"][0]["results"]}
    assert uris == {"sample_docs/paper.tex"}

"""The JSON report's schema (verifier/schema/report.schema.json), the README's field table, error sources.

Every report built anywhere in the suite is validated by the fixture in ``conftest.py``;
these tests check that the schema is a valid JSON Schema, that it is live (it rejects
broken reports), that its enumerations list exactly the values the engine produces, and
that the README's table is the one generated from it.
"""

from __future__ import annotations

import copy
import importlib
import json
import subprocess
import sys
from pathlib import Path
from typing import Any

import pytest
from verifier.api import check_path, check_text
from verifier.schema import SCHEMA_PATH, TABLE_END, TABLE_START, readme_block, report_schema

from report_contract import validate_claim, validate_report

REPO = Path(__file__).resolve().parent.parent

# One claim of every kind, decided by every method.  The mathematics is classical and only
# the kinds and methods are asserted here; the verdicts are checked in the other test files.
EVERY_KIND = r"""
%@claim
\[ E_4^2 = E_8 \]
%@claim
\[ E_4 \neq E_6 \]
%@claim
\[ E_4 = 1 + 240q + 2160q^2 + \cdots \]
%@claim
\[ \sigma_3(n) = \sigma_3(n) \]
%@claim
\[ \tau(5) = 4830 \]
%@claim
\[ \tau(n) \equiv \sigma_{11}(n) \pmod{691} \]
%@claim
\[ \Delta \in S_{12}(\mathrm{SL}_2(\mathbb Z)) \]
%@claim
\[ \dim M_{12}(\Gamma_0(1)) = 2 \]
%@claim
\[ \Delta \text{ is a normalised eigenform} \]
%@claim solve=a,b
\[ E_{12} = a E_4^3 + b E_6^2 \]
%@claim
\[ \frac{\eta(2\tau)^{24}}{\eta(\tau)^{16}} = \frac{\eta(2\tau)^{24}}{\eta(\tau)^{16}} \]
%@claim
\[ p(5n+4) \equiv 0 \pmod 5 \]
%@claim
\[ (q;q^5)_\infty \neq (q^4;q^5)_\infty \]
"""


def jsonschema() -> Any:
    try:
        return importlib.import_module("jsonschema")
    except ImportError:  # pragma: no cover - jsonschema is a test dependency
        pytest.skip("jsonschema not installed")


def test_the_schema_is_a_valid_json_schema() -> None:
    schema = json.loads(SCHEMA_PATH.read_text(encoding="utf-8"))
    jsonschema().Draft202012Validator.check_schema(schema)
    assert schema == report_schema()


def test_the_validation_is_live_and_rejects_broken_reports() -> None:
    jsonschema()
    data = check_text("%@claim\n\\[ E_4^2 = E_8 \\]\n", "doc.tex").to_dict()
    validate_report(data)
    for path, value in (
        (("claims", 0, "kind"), "guess"),
        (("claims", 0, "method"), "numerics"),
        (("claims", 0, "verdict"), "probably"),
        (("claims", 0, "line"), 0),
        (("summary", "proved"), -1),
        (("tool",), "other"),
    ):
        broken = copy.deepcopy(data)
        node: Any = broken
        for key in path[:-1]:
            node = node[key]
        node[path[-1]] = value
        with pytest.raises(AssertionError):
            validate_report(broken)
    missing = copy.deepcopy(data)
    del missing["claims"][0]["source"]
    with pytest.raises(AssertionError):
        validate_report(missing)
    bad_witness = copy.deepcopy(data["claims"][0])
    bad_witness["first_difference"] = {"n": 1, "left": "0.5", "right": "1"}  # not an exact rational
    with pytest.raises(AssertionError):
        validate_claim(bad_witness)


def test_additions_do_not_break_the_schema() -> None:
    """Fields are only ever added: a report with a new field (one a later version adds) still validates."""
    data = check_text("%@claim\n\\[ E_4^2 = E_8 \\]\n", "doc.tex").to_dict()
    data["claims"][0]["a_later_field"] = {"anything": [1, 2, 3]}
    data["later"] = True
    validate_report(data)


def test_enumerations_list_exactly_what_the_engine_produces() -> None:
    data = check_text(EVERY_KIND, "kinds.tex").to_dict()
    claim = report_schema()["$defs"]["claim"]["properties"]
    kinds = {c["kind"] for c in data["claims"]}
    methods = {c["method"] for c in data["claims"]}
    assert kinds == set(claim["kind"]["enum"])
    assert methods | {None} == set(claim["method"]["enum"])
    assert {c["verdict"] for c in data["claims"]} == {"proved"}


def test_congruence_witness_carries_its_modulus() -> None:
    # tau(2) = -24 (from memory) and sigma_11(2) = 1 + 2^11 = 2049 differ modulo 7, so the
    # congruence fails modulo 7 * 691 = 4837; the witness must say which modulus it is about.
    data = check_text("%@claim\n\\[ \\tau(n) \\equiv \\sigma_{11}(n) \\pmod{4837} \\]\n", "c.tex").to_dict()
    (claim,) = data["claims"]
    assert claim["verdict"] == "refuted"
    assert claim["first_difference"]["modulus"] == 4837


def test_screen_reports_validate() -> None:
    from verifier.screen import screen

    result = screen(REPO / "sample_docs" / "paper.tex", untagged=True)
    data = result.to_dict()
    validate_report(data)
    assert "screen" in data and all("untagged" in c for c in data["claims"])


def test_sample_reports_validate() -> None:
    for name in ("paper.tex", "note.md"):
        validate_report(check_path(REPO / "sample_docs" / name).to_dict())


def test_readme_table_is_generated_from_the_schema() -> None:
    readme = (REPO / "README.md").read_text(encoding="utf-8")
    start, end = readme.find(TABLE_START), readme.find(TABLE_END)
    assert 0 <= start < end, "the README must contain the generated table of report fields"
    assert readme[start : end + len(TABLE_END) + 1] == readme_block(), "run python -m verifier.schema"


def test_readme_table_lists_every_field() -> None:
    schema = report_schema()
    table = readme_block()
    names = [f"`{k}`" for k in schema["properties"]]
    for prefix, definition in (
        ("claims[].", "claim"),
        ("claims[].space.", "space"),
        ("claims[].first_difference.", "first_difference"),
        ("diagnostics[].", "diagnostic"),
        ("screen.", "screen"),
    ):
        names += [f"`{prefix}{k}`" for k in schema["$defs"][definition]["properties"]]
    for name in names:
        assert f"| {name} |" in table


def test_the_schema_module_prints_the_table() -> None:
    proc = subprocess.run(
        [sys.executable, "-m", "verifier.schema"], capture_output=True, text=True, timeout=60, cwd=REPO
    )
    assert proc.returncode == 0 and proc.stdout == readme_block()


def test_every_claim_field_is_in_the_schema() -> None:
    """The schema allows additions, so this checks the other way: nothing produced today is unlisted."""
    data = check_text(EVERY_KIND, "kinds.tex").to_dict()
    listed = set(report_schema()["$defs"]["claim"]["properties"])
    for c in data["claims"]:
        assert set(c) <= listed
    assert set(data) <= set(report_schema()["properties"])


# -- error claims keep their source text -------------------------------------------------


@pytest.mark.parametrize(
    ("doc", "code", "source"),
    [
        ("%@claim colour=red\n\\[ E_4^2 = E_8 \\]\n", "unknown-option", "E_4^2 = E_8"),
        ("%@claim name=x\nno display here\n", "orphan-tag", "%@claim name=x"),
        ("%@claim\n\\[ E_4^2 = \\]\n", "incomplete", "E_4^2 ="),
        ("%@claim weight=9\n\\[ E_4^2 = E_8 \\]\n", "weight-mismatch", "E_4^2 = E_8"),
        (
            "\\newcommand{\\loop}{\\loop}\n%@claim\n\\[ \\loop = E_8 \\]\n",
            "macro-expansion",
            "\\loop = E_8",
        ),
    ],
)
def test_error_claims_keep_their_source(doc: str, code: str, source: str) -> None:
    report = check_text(doc, "e.tex")
    errors = [c for c in report.claims if c.verdict == "error"]
    assert errors, report.to_dict()
    assert errors[0].outcome.code == code
    assert errors[0].source == source


def test_markdown_error_claims_keep_their_source() -> None:
    report = check_text("<!-- @claim colour=red -->\n$$ E_4^2 = E_8 $$\n", "e.md")
    (claim,) = report.claims
    assert claim.outcome.code == "unknown-option" and claim.source == "E_4^2 = E_8"

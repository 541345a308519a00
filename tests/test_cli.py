"""The real command line, run as a subprocess (``python -m verifier``).

Checks exit codes, the ``file:line:col: severity: verdict: message`` shape of text output,
the JSON contract, ``explain`` and ``--help``, recovery after a malformed claim, and that
the sample manuscripts give exactly the verdicts ``sample_docs/README.md`` promises.
"""

from __future__ import annotations

import json
import re
import subprocess
import sys
from fractions import Fraction
from pathlib import Path
from typing import Any

import pytest

from report_contract import validate_report

REPO = Path(__file__).resolve().parent.parent
SAMPLES = REPO / "sample_docs"

VERDICTS = ("proved", "refuted", "unproven", "error")
SEVERITY = {"proved": "note", "refuted": "error", "unproven": "warning", "error": "error"}

CLAIM_LINE = re.compile(
    r"^(?P<file>[^:\n]+):(?P<line>\d+):(?P<column>\d+): "
    r"(?P<severity>error|warning|note): "
    r"(?P<verdict>proved|refuted|unproven|error)"
    r"(?: \[(?P<name>[^\]]+)\]| \((?P<label>[^)]+)\))?: "
    r"(?P<message>\S.*)$"
)
DIAGNOSTIC_LINE = re.compile(
    r"^(?P<file>[^:\n]+):(?P<line>\d+):(?P<column>\d+): (?P<severity>error|warning|note): (?P<message>\S.*)$"
)

# The JSON contract: top level and one claim.  Fields may be added, never removed.
CONTRACT_TOP = {"tool", "version", "claims", "summary"}
CONTRACT_CLAIM = {
    "file",
    "line",
    "column",
    "name",
    "label",
    "source",
    "kind",
    "verdict",
    "message",
    "space",
    "method",
    "bound",
    "terms_compared",
    "first_difference",
    "seconds",
}


def run(*args: str, cwd: Path = REPO) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "verifier", *args],
        cwd=cwd,
        capture_output=True,
        text=True,
        timeout=120,
    )


def write(tmp_path: Path, name: str, text: str) -> Path:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def run_json(*args: str, cwd: Path = REPO) -> tuple[int, dict[str, Any]]:
    proc = run("check", "--format", "json", *args, cwd=cwd)
    data = json.loads(proc.stdout)
    validate_report(data)
    return proc.returncode, data


TRUE_DOC = "%@claim name=a\n\\[ E_4^2 = E_8 \\]\n%@claim name=b\n\\[ 1728\\Delta = E_4^3 - E_6^2 \\]\n"
REFUTED_DOC = TRUE_DOC + "%@claim name=c\n\\[ E_4 E_6 = E_{12} \\]\n"
# A printed side with no \cdots and no O(q^n) claims every coefficient: not proved.
UNPROVEN_DOC = TRUE_DOC + "%@claim name=u\n\\[ E_4 - E_4 = 0q \\]\n"
ERROR_DOC = REFUTED_DOC + "%@claim name=e\n\\[ E_4 + E_6 = E_{10} \\]\n"


# ---------------------------------------------------------------------------
# Exit codes
# ---------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("text", "code"),
    [
        pytest.param(TRUE_DOC, 0, id="all-proved"),
        pytest.param(REFUTED_DOC, 1, id="refuted"),
        pytest.param(UNPROVEN_DOC, 1, id="unproven"),
        pytest.param(ERROR_DOC, 2, id="error"),
    ],
)
def test_exit_codes(tmp_path: Path, text: str, code: int) -> None:
    path = write(tmp_path, "doc.tex", text)
    proc = run("check", str(path))
    assert proc.returncode == code, proc.stdout + proc.stderr
    assert proc.stderr == ""


def test_exit_code_matches_json_summary(tmp_path: Path) -> None:
    path = write(tmp_path, "doc.tex", UNPROVEN_DOC)
    code, data = run_json(str(path))
    assert code == 1
    assert data["summary"] == {"proved": 2, "refuted": 0, "unproven": 1, "error": 0}


def test_missing_file_is_exit_2(tmp_path: Path) -> None:
    proc = run("check", str(tmp_path / "absent.tex"))
    assert proc.returncode == 2


def test_usage_errors_are_exit_2() -> None:
    assert run().returncode == 2  # no command
    assert run("check", "--format", "xml", "x.tex").returncode == 2  # argparse


# ---------------------------------------------------------------------------
# Text output
# ---------------------------------------------------------------------------


def test_text_lines_have_the_editor_shape(tmp_path: Path) -> None:
    path = write(tmp_path, "doc.tex", ERROR_DOC)
    proc = run("check", "doc.tex", cwd=tmp_path)
    lines = proc.stdout.splitlines()
    claim_lines = [m for m in map(CLAIM_LINE.match, lines) if m]
    assert [(m["name"], m["verdict"]) for m in claim_lines] == [
        ("a", "proved"),
        ("b", "proved"),
        ("c", "refuted"),
        ("e", "error"),
    ]
    for m in claim_lines:
        assert m["file"] == "doc.tex"
        assert m["severity"] == SEVERITY[m["verdict"]]
    assert [(int(m["line"]), int(m["column"])) for m in claim_lines[:3]] == [(2, 4), (4, 4), (6, 4)]
    # Every line naming the file is either a claim or a diagnostic of the same shape.
    for line in lines:
        if line.startswith("doc.tex:"):
            assert CLAIM_LINE.match(line) or DIAGNOSTIC_LINE.match(line), line
    assert path.exists()


def test_text_reports_witness_numbers(tmp_path: Path) -> None:
    write(tmp_path, "doc.tex", REFUTED_DOC)
    proc = run("check", "doc.tex", cwd=tmp_path)
    (refuted,) = [m for m in map(CLAIM_LINE.match, proc.stdout.splitlines()) if m and m["verdict"] == "refuted"]
    # E_4 E_6 = E_10 and E_12 differ at q^1: -264 vs 65520/691 (docs/method.md#eisenstein).
    assert "-264" in refuted["message"] and "65520/691" in refuted["message"]


# ---------------------------------------------------------------------------
# JSON contract
# ---------------------------------------------------------------------------


def test_json_contract(tmp_path: Path) -> None:
    write(tmp_path, "doc.tex", ERROR_DOC)
    code, data = run_json("doc.tex", cwd=tmp_path)
    assert code == 2
    assert set(data) >= CONTRACT_TOP
    assert data["tool"] == "qreferee"
    assert isinstance(data["version"], str) and data["version"]
    assert set(data["summary"]) == set(VERDICTS)
    assert data["summary"] == {"proved": 2, "refuted": 1, "unproven": 0, "error": 1}
    assert len(data["claims"]) == 4
    for claim in data["claims"]:
        assert set(claim) >= CONTRACT_CLAIM, CONTRACT_CLAIM - set(claim)
        assert claim["file"] == "doc.tex"
        assert isinstance(claim["line"], int) and isinstance(claim["column"], int)
        assert claim["name"] is None or isinstance(claim["name"], str)
        assert claim["label"] is None or isinstance(claim["label"], str)
        assert isinstance(claim["source"], str)
        assert claim["kind"] in ("equality", "inequality", "prefix")
        assert claim["verdict"] in VERDICTS
        assert isinstance(claim["message"], str) and claim["message"]
        assert claim["space"] is None or isinstance(claim["space"], dict)
        assert claim["method"] is None or isinstance(claim["method"], str)
        assert claim["bound"] is None or isinstance(claim["bound"], int)
        assert isinstance(claim["terms_compared"], int)
        fd = claim["first_difference"]
        assert fd is None or set(fd) == {"n", "left", "right"}
        assert isinstance(claim["seconds"], int | float)
    proved, _, refuted, error = data["claims"]
    assert proved["method"] == "sturm" and proved["bound"] == 0
    assert proved["space"]["weight"] == "8" and proved["space"]["group"] == "SL2(Z)"
    assert refuted["first_difference"] == {"n": 1, "left": "-264", "right": "65520/691"}
    assert error["verdict"] == "error" and error["first_difference"] is None


def test_json_is_the_only_thing_on_stdout(tmp_path: Path) -> None:
    write(tmp_path, "doc.tex", TRUE_DOC)
    proc = run("check", "--format", "json", "doc.tex", cwd=tmp_path)
    validate_report(json.loads(proc.stdout))  # the whole of stdout parses, and matches the schema
    assert proc.returncode == 0


# ---------------------------------------------------------------------------
# explain, --help
# ---------------------------------------------------------------------------


def test_explain_mixed_weight() -> None:
    proc = run("explain", "mixed-weight")
    assert proc.returncode == 0
    assert proc.stdout.startswith("mixed-weight")


def test_explain_unknown_code() -> None:
    proc = run("explain", "no-such-code")
    assert proc.returncode == 2
    assert proc.stdout == ""
    assert proc.stderr


def test_explain_lists_every_code_once() -> None:
    proc = run("explain")
    assert proc.returncode == 0
    codes = [line.split()[0] for line in proc.stdout.splitlines() if line.strip()]
    assert len(codes) == len(set(codes))
    for needed in ("mixed-weight", "zero-division", "budget", "too-large", "weight-mismatch", "group-mismatch"):
        assert needed in codes


def test_help() -> None:
    proc = run("--help")
    assert proc.returncode == 0
    assert "usage: qreferee" in proc.stdout
    assert "check" in proc.stdout and "explain" in proc.stdout
    check = run("check", "--help")
    assert check.returncode == 0 and "--format" in check.stdout


# ---------------------------------------------------------------------------
# A malformed claim: an error where it is, and the rest is still checked
# ---------------------------------------------------------------------------

MALFORMED = """\
\\documentclass{article}
\\begin{document}
%@claim name=before
\\[ E_4 E_6 = E_{10} \\]
%@claim name=broken
\\[ E_4^2 = E_8 + ( \\]
%@claim name=after
\\[ E_4 E_{10} = E_{14} \\]
%@claim name=after-refuted
\\[ E_4 = E_6 \\]
\\end{document}
"""


def test_malformed_claim_is_located_and_the_rest_is_checked(tmp_path: Path) -> None:
    write(tmp_path, "m.tex", MALFORMED)
    code, data = run_json("m.tex", cwd=tmp_path)
    assert code == 2
    got = {c["name"]: c for c in data["claims"]}
    assert got["before"]["verdict"] == "proved"
    broken = got["broken"]
    assert broken["verdict"] == "error"
    assert broken["code"] == "brackets"
    # line 6 is "\[ E_4^2 = E_8 + ( \]"; the unclosed '(' is column 18.
    assert (broken["line"], broken["column"]) == (6, 18)
    assert got["after"]["verdict"] == "proved"
    assert got["after-refuted"]["verdict"] == "refuted"
    assert got["after-refuted"]["first_difference"]["n"] == 1
    text = run("check", "m.tex", cwd=tmp_path).stdout
    assert re.search(r"^m\.tex:6:18: error: error \[broken\]: ", text, re.M)


def test_malformed_markdown_claim(tmp_path: Path) -> None:
    write(
        tmp_path,
        "m.md",
        "# n\n\n<!-- @claim name=x -->\n$$ E_4 E_6 = $$\n\n<!-- @claim name=y -->\n$$ E_4^2 = E_8 $$\n",
    )
    code, data = run_json("m.md", cwd=tmp_path)
    assert code == 2
    assert [(c["name"], c["verdict"]) for c in data["claims"]] == [("x", "error"), ("y", "proved")]
    assert data["claims"][0]["line"] == 4


# ---------------------------------------------------------------------------
# The sample manuscripts keep the promises of sample_docs/README.md
# ---------------------------------------------------------------------------


def _readme_mistakes() -> list[dict[str, str]]:
    rows = []
    for line in (SAMPLES / "README.md").read_text(encoding="utf-8").splitlines():
        if not re.match(r"^\| (paper\.tex|note\.md) \|", line):
            continue
        cells = [c.strip() for c in line.strip().strip("|").split("|")]
        file, claim, location, verdict, detail = cells[:5]
        rows.append({"file": file, "claim": claim, "location": location, "verdict": verdict, "detail": detail})
    return rows


def _readme_summaries() -> dict[str, tuple[dict[str, int], int]]:
    out = {}
    pattern = re.compile(
        r"qreferee check sample_docs/(\S+)\s+# (\d+) proved, (\d+) refuted, (\d+) unproven, (\d+) errors?; exit (\d)"
    )
    for m in pattern.finditer((SAMPLES / "README.md").read_text(encoding="utf-8")):
        counts = dict(zip(VERDICTS, map(int, m.group(2, 3, 4, 5)), strict=True))
        out[m.group(1)] = (counts, int(m.group(6)))
    return out


def test_readme_lists_mistakes_in_both_samples() -> None:
    rows = _readme_mistakes()
    assert {r["file"] for r in rows} == {"paper.tex", "note.md"}
    assert len(rows) >= 6
    assert set(_readme_summaries()) == {"paper.tex", "note.md"}


@pytest.mark.parametrize("sample", ["paper.tex", "note.md"])
def test_sample_verdicts_match_readme(sample: str) -> None:
    code, data = run_json(f"sample_docs/{sample}")
    summary, exit_code = _readme_summaries()[sample]
    assert data["summary"] == summary
    assert code == exit_code
    source_lines = (SAMPLES / sample).read_text(encoding="utf-8").splitlines()
    claims = {c["name"]: c for c in data["claims"]}
    assert len(claims) == len(data["claims"]), "claim names are unique"
    promised = {r["claim"]: r for r in _readme_mistakes() if r["file"] == sample}
    for name, claim in claims.items():
        row = promised.get(name)
        if row is None:
            assert claim["verdict"] == "proved", (name, claim["message"])
            continue
        assert claim["verdict"] == row["verdict"], (name, claim["message"])
        assert f"{claim['line']}:{claim['column']}" == row["location"], name
        detail = row["detail"]
        witness = re.fullmatch(r"q\^(-?\d+): left (\S+), right (\S+)", detail)
        if witness:
            fd = claim["first_difference"]
            assert fd is not None, name
            assert fd["n"] == int(witness[1])
            assert Fraction(fd["left"]) == Fraction(witness[2])
            assert Fraction(fd["right"]) == Fraction(witness[3])
        elif re.fullmatch(r"[a-z-]+", detail):
            assert claim["code"] == detail, name
        else:
            assert claim["first_difference"] is None, name
        # The source marks it, in a comment just above the tag.
        above = "\n".join(source_lines[max(0, claim["line"] - 6) : claim["line"]])
        assert "deliberate mistake" in above, name
    assert set(promised) <= set(claims)


def test_samples_have_enough_claims() -> None:
    _, paper = run_json("sample_docs/paper.tex")
    _, note = run_json("sample_docs/note.md")
    assert len(paper["claims"]) + len(note["claims"]) >= 20


def test_both_samples_in_one_run() -> None:
    code, data = run_json("sample_docs/paper.tex", "sample_docs/note.md")
    assert code == 2
    files = {c["file"] for c in data["claims"]}
    assert files == {"sample_docs/paper.tex", "sample_docs/note.md"}
    text = run("check", "sample_docs/paper.tex", "sample_docs/note.md").stdout
    claim_lines = [m for m in map(CLAIM_LINE.match, text.splitlines()) if m]
    assert len(claim_lines) == len(data["claims"])


# ---------------------------------------------------------------------------
# Regressions for bugs found while writing these tests
# ---------------------------------------------------------------------------


def test_missing_latex_file_is_reported_at_its_path(tmp_path: Path) -> None:
    code, data = run_json("absent.tex", cwd=tmp_path)
    assert code == 2
    (diag,) = data["diagnostics"]
    assert diag["code"] == "unreadable"
    assert diag["file"].endswith("absent.tex")


def test_claim_starting_with_left_is_located_at_left(tmp_path: Path) -> None:
    write(tmp_path, "l.tex", "%@claim\n\\[ \\left(E_4\\right)^2 = E_8 \\]\n")
    _, data = run_json("l.tex", cwd=tmp_path)
    (claim,) = data["claims"]
    assert (claim["line"], claim["column"]) == (2, 4)
    assert claim["source"].startswith("\\left(")

"""What the language server keeps from one edit to the next, tested without an editor.

An edit usually changes one display.  The worker keeps the rows of every display
(``verifier.scan.memo``), the results of every block (``CachedChecker(keep_results=True)``)
and the finding of every result (``verifier.lsp.engine``); the findings cross to the server
once (``verifier.lsp.wire``) and the server keeps the JSON data of each diagnostic.  These
tests check that what is kept is exactly what a fresh check finds, and that a change to a
macro or a define still reaches the blocks that use it.

The identities used (level one, trivial character): E_8 = E_4^2, E_10 = E_4 E_6,
E_14 = E_4^2 E_6, since M_8, M_10 and M_14 are one-dimensional and all the series have
constant term 1 (Serre, A Course in Arithmetic, VII.3.2, Corollary 2 of Theorem 4).
Doubling one side of such an identity makes it false (constant terms 1 and 2).
"""

from __future__ import annotations

import pickle
from pathlib import Path
from typing import Any

import pytest
from hypothesis import given
from hypothesis import strategies as st
from verifier.api import check_path
from verifier.cache import CachedChecker
from verifier.lsp import engine, wire
from verifier.lsp.model import Checked, Finding, Pos, Span
from verifier.scan import DisplayMemo, scan_path
from verifier.scan.document import ClaimBlock, DefineTag, ScannedDocument
from verifier.scan.text import blank_comments

MAIN = r"""\newcommand{\Eis}[1]{E_{#1}}
\section{First}
%@claim name=e8
\[ \Eis{8} = \Eis{4}^2 \]
%@claim name=e10
\begin{align}
  E_{10} &= E_4 E_6 \label{eq:ten} \\
  E_{14} &= E_4^2 E_6
\end{align}
%@define F = E_4 E_6
%@claim name=f
\[ F = E_{10} \]
%@claim name=plain
\[ E_8 = E_4 E_4 \]
"""

# The claim e10 gets a false companion on the same line: every later offset moves, no line does.
LONGER = MAIN.replace(r"E_{10} &= E_4 E_6 \label", r"E_{10} &= E_4 E_6, \quad E_8 = 2E_4^2 \label")


def _check(path: Path, text: str, version: int) -> Checked:
    return engine.check(engine.Request(str(path), version, {str(path): text}, no_cache=True))


def _verdicts(checked: Checked) -> list[tuple[str | None, str, int, int]]:
    return [
        (f.result.name, f.result.verdict, f.span.start.line, f.span.start.character)
        for f in checked.findings
        if f.result is not None
    ]


def _fresh(path: Path, text: str) -> list[tuple[str | None, str, int, int]]:
    """The verdicts of a check from scratch (no memo, no cache) of ``text``."""
    fresh = path.with_name("fresh-" + path.name)
    fresh.write_text(text, encoding="utf-8")
    report = check_path(fresh)
    return [(c.name, c.verdict, c.location.line - 1, c.location.column - 1) for c in report.claims]


@pytest.fixture()
def main(tmp_path: Path) -> Path:
    path = tmp_path / "paper.tex"
    path.write_text(MAIN, encoding="utf-8")
    engine._SESSIONS.clear()
    engine._CHECKERS.clear()
    return path


def test_an_unchanged_block_keeps_its_finding_and_the_verdicts_match_a_fresh_check(main: Path) -> None:
    first = _check(main, MAIN, 1)
    # Serre VII.3.2: all four blocks hold.
    assert [v for _, v, _, _ in _verdicts(first)] == ["proved"] * 5
    second = _check(main, LONGER, 2)
    assert (second.checked, second.reused) == (1, 3)
    assert _verdicts(second) == _fresh(main, LONGER)
    assert [v for _, v, _, _ in _verdicts(second)] == ["proved", "proved", "refuted", "proved", "proved", "proved"]
    before = {
        f.result.name: f for f in first.findings if f.result is not None and not (f.result.name or "").startswith("e10")
    }
    after = {
        f.result.name: f
        for f in second.findings
        if f.result is not None and not (f.result.name or "").startswith("e10")
    }
    assert before.keys() == after.keys() == {"e8", "f", "plain"}
    for name in before:
        assert after[name] is before[name], name  # the very same finding object
    # Back to the first text: the blocks after the edit moved back and are reported there.
    third = _check(main, MAIN, 3)
    assert _verdicts(third) == _verdicts(first)


def test_a_macro_change_rechecks_the_blocks_that_use_it(main: Path) -> None:
    first = _check(main, MAIN, 1)
    # \Eis{k} now means 2E_k: E_8 = E_4^2 becomes 2E_8 = 4E_4^2, still true (Serre VII.3.2).
    doubled = MAIN.replace(r"\newcommand{\Eis}[1]{E_{#1}}", r"\newcommand{\Eis}[1]{2E_{#1}}")
    second = _check(main, doubled, 2)
    assert (second.checked, second.reused) == (1, 3)
    assert _verdicts(second) == _fresh(main, doubled)
    # \Eis{k} = 2E_k only on the left now: 2E_8 = E_4^2 is false (constant terms 2 and 1).
    lopsided = MAIN.replace(r"\[ \Eis{8} = \Eis{4}^2 \]", r"\[ \Eis{8} = E_4^2 \]").replace(
        r"\newcommand{\Eis}[1]{E_{#1}}", r"\newcommand{\Eis}[1]{2E_{#1}}"
    )
    third = _check(main, lopsided, 3)
    assert third.checked == 1
    assert _verdicts(third)[0][:2] == ("e8", "refuted")
    assert _verdicts(third) == _fresh(main, lopsided)
    unchanged = {f.result.name: f for f in first.findings if f.result is not None}
    for f in third.findings:
        if f.result is not None and f.result.name in ("f", "plain"):
            assert f is unchanged[f.result.name]


def test_a_define_change_rechecks_the_blocks_after_it(main: Path) -> None:
    _check(main, MAIN, 1)
    # F = 2 E_4 E_6 makes F = E_10 false (constant terms 2 and 1).
    changed = MAIN.replace("%@define F = E_4 E_6", "%@define F = 2 E_4 E_6")
    second = _check(main, changed, 2)
    assert second.checked == 2  # f and plain come after the define
    assert dict((n, v) for n, v, _, _ in _verdicts(second))["f"] == "refuted"
    assert _verdicts(second) == _fresh(main, changed)


def test_a_block_moved_to_another_line_is_reported_at_its_new_place(main: Path) -> None:
    first = _check(main, MAIN, 1)
    moved = MAIN.replace(r"\section{First}", "\\section{First}\n\nA new paragraph.\n")
    second = _check(main, moved, 2)
    assert second.reused == 4 and second.checked == 0  # the verdicts come from the cache
    assert _verdicts(second) == _fresh(main, moved)
    assert [line for _, _, line, _ in _verdicts(second)] == [line + 3 for _, _, line, _ in _verdicts(first)]


# -- the memo of display rows -------------------------------------------------------------


def _shape(doc: ScannedDocument) -> list[Any]:
    out: list[Any] = []
    for item in doc.items:
        if isinstance(item, DefineTag):
            out.append(("define", item.tag, item.text and (item.text.text, item.text.origins), item.origin))
        else:
            rows = [(r.text.text, r.text.origins, r.label, r.source_text) for r in item.rows]
            out.append(("block", item.tag, item.options, item.environment, rows, item.problems, item.source))
    return [out, doc.diagnostics, doc.files]


def test_a_scan_with_the_memo_reads_as_a_scan_without_it(tmp_path: Path) -> None:
    path = tmp_path / "paper.tex"
    memo = DisplayMemo()
    # A comment inside a display is blanked before reading, but the author's text of the row keeps it.
    noted = MAIN.replace(r"E_4 E_6 \label", r"E_4 % first note" "\n" r"E_6 \label")
    renoted = noted.replace("first note", "other note")  # as long: the blanked text is the same
    for text in (MAIN, LONGER, "% a comment line\n" + LONGER, noted, renoted, MAIN):
        with_memo = scan_path(path, {path: text}, memo)
        assert _shape(with_memo) == _shape(scan_path(path, {path: text}))
    assert memo.hits > 0


def test_the_memo_reads_a_display_again_when_a_macro_it_may_use_changes(tmp_path: Path) -> None:
    path = tmp_path / "paper.tex"
    memo = DisplayMemo()
    scan_path(path, {path: MAIN}, memo)
    hits = memo.hits
    doubled = MAIN.replace(r"\newcommand{\Eis}[1]{E_{#1}}", r"\newcommand{\Eis}[1]{2E_{#1}}")
    doc = scan_path(path, {path: doubled}, memo)
    assert memo.hits == hits  # the macros in force changed: every display is read again
    first = next(item for item in doc.items if isinstance(item, ClaimBlock))
    assert "2E_{8}" in first.rows[0].text.text
    assert _shape(doc) == _shape(scan_path(path, {path: doubled}))


def _blank_reference(text: str) -> str:
    """Comments blanked one character at a time: a backslash escapes the next character."""
    out = list(text)
    i = 0
    while i < len(text):
        if text[i] == "\\":
            i += 2
        elif text[i] == "%":
            while i < len(text) and text[i] != "\n":
                out[i] = " "
                i += 1
        else:
            i += 1
    return "".join(out)


@given(st.text(alphabet="ab\\%\n {}é", max_size=40))
def test_blank_comments_agrees_with_a_character_by_character_reading(text: str) -> None:
    # common practice: TeX's % starts a comment to the end of the line unless escaped as \%.
    assert blank_comments(text) == _blank_reference(text)


# -- the verdict cache's results ----------------------------------------------------------


def test_kept_results_are_the_same_objects_and_plain_results_are_fresh_copies(main: Path) -> None:
    doc = scan_path(main)
    keeping, plain = CachedChecker(use_disk=False, keep_results=True), CachedChecker(use_disk=False)
    a, b = keeping.check_document(scan_path(main)), keeping.check_document(doc)
    assert keeping.stats.hits == 4
    assert all(x is y for x, y in zip(a.claims, b.claims, strict=True))
    c, d = plain.check_document(scan_path(main)), plain.check_document(doc)
    assert plain.stats.hits == 4
    assert all(x is not y and x.outcome is not y.outcome for x, y in zip(c.claims, d.claims, strict=True))
    assert [_timeless(x.to_dict()) for x in b.claims] == [_timeless(x.to_dict()) for x in d.claims]


def _timeless(data: dict[str, Any]) -> dict[str, Any]:
    return {k: v for k, v in data.items() if k != "seconds"}


# -- the wire between worker and server ---------------------------------------------------


def _finding(line: int) -> Finding:
    span = Span("/tmp/x.tex", Pos(line, 0), Pos(line, 5))
    return Finding(span, "information", f"proved: line {line}", "proved")


def test_findings_sent_again_arrive_as_the_objects_the_server_has() -> None:
    sender, receiver = wire.Table(), wire.Table()
    a, b, c = _finding(1), _finding(2), _finding(3)
    first = wire.loads(wire.dumps(Checked("/tmp/x.tex", 1, findings=[a, b]), sender), receiver)
    assert isinstance(first, Checked)
    got_a, got_b = first.findings
    assert got_a == a and got_a is not a
    second = wire.loads(wire.dumps(Checked("/tmp/x.tex", 2, findings=[b, c]), sender), receiver)
    assert isinstance(second, Checked)
    assert second.findings[0] is got_b and second.findings[1] == c
    assert len(wire.dumps(Checked("/tmp/x.tex", 3, findings=[b, c]), sender)) < len(
        pickle.dumps(Checked("/tmp/x.tex", 3, findings=[b, c]))
    )


def test_a_reference_the_receiver_cannot_resolve_is_an_error() -> None:
    sender = wire.Table()
    a = _finding(1)
    wire.dumps(Checked("/tmp/x.tex", 1, findings=[a]), sender)
    data = wire.dumps(Checked("/tmp/x.tex", 2, findings=[a]), sender)
    with pytest.raises(pickle.UnpicklingError):
        wire.loads(data, wire.Table())  # a receiver that never saw the first message


def test_the_servers_diagnostic_data_is_made_once_per_diagnostic() -> None:
    pytest.importorskip("pygls")
    from lsprotocol import types
    from verifier.lsp.server import _DiagnosticData

    data = _DiagnosticData()
    converter = data.converter()
    d = types.Diagnostic(
        range=types.Range(types.Position(1, 0), types.Position(1, 4)),
        message="proved",
        severity=types.DiagnosticSeverity.Information,
        source="qreferee",
    )
    params = types.PublishDiagnosticsParams(uri="file:///tmp/x.tex", diagnostics=[d])
    one, two = converter.unstructure(params), converter.unstructure(params)
    assert one == two and one["diagnostics"][0] is two["diagnostics"][0]
    assert one["diagnostics"][0]["range"]["start"] == {"line": 1, "character": 0}
    data.keep([])
    assert converter.unstructure(params)["diagnostics"][0] is not one["diagnostics"][0]

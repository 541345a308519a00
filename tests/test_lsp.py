"""The language server, driven as an editor drives it: a pygls client speaking JSON-RPC over stdio
to ``python -m verifier lsp`` in a subprocess.

The identities used (level one, trivial character):
- E_8 = E_4^2, E_10 = E_4 E_6, E_14 = E_4^2 E_6: M_8, M_10, M_14 are one-dimensional
  (Serre, A Course in Arithmetic, VII.3.2, Corollary 2 of Theorem 4), and all series have
  constant term 1.
- E_12 = (441/691) E_4^3 + (250/691) E_6^2: M_12 is spanned by E_4^3 and E_6^2 (same
  reference); the coefficients follow from the constant terms and the q^1 coefficients
  240*3 = 720 and -504*2 = -1008 of E_4^3 and E_6^2 against 65520/691 of E_12 (from memory,
  re-derived here: 441*720 - 250*1008 = 65520).
"""

from __future__ import annotations

import asyncio
import re
import subprocess
import sys
from collections.abc import Awaitable, Callable
from pathlib import Path
from typing import Any

import pytest

pytest.importorskip("pygls")

from lsprotocol import types
from pygls.lsp.client import LanguageClient

TIMEOUT = 60.0

MAIN = r"""\newcommand{\Eis}[1]{E_{#1}}
%@claim name=e8
\[ \Eis{8} = \Eis{4}^2 \]
%@claim name=typo
\[ E_{12} = \frac{441}{619}E_4^3 + \frac{250}{691}E_6^2 \]
%@claim name=undefined
\[ E_8 = E_4^2 + 0\cdot\foo \]
An untagged display that reads as a claim:
\[ E_{10} = E_4 E_6 \]
\input{part}
"""

PART = r"""%@claim name=inpart
\[ \Eis{14} = \Eis{4}^2\Eis{6} \]
"""


def test_the_arithmetic_behind_the_e12_coefficients() -> None:
    # The q^1 coefficients of E_4^3, E_6^2, E_12 (240, -504 and 65520/691: Serre, VII.4.2, E_k = 1 - 2k/B_k sum ...).
    from fractions import Fraction

    assert Fraction(441, 691) * 720 + Fraction(250, 691) * (-1008) == Fraction(65520, 691)
    assert Fraction(441, 691) + Fraction(250, 691) == 1


class Session:
    """A client connected to a server subprocess, with queues of what the server sent."""

    def __init__(self, folder: Path, *args: str) -> None:
        self.folder = folder
        self.args = args
        self.client = LanguageClient("qreferee-test", "1")
        self.diagnostics: dict[str, asyncio.Queue[types.PublishDiagnosticsParams]] = {}
        self.logs: asyncio.Queue[str] = asyncio.Queue()
        self.texts: dict[str, str] = {}
        self.versions: dict[str, int] = {}

        @self.client.feature(types.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS)
        def on_diagnostics(ls: Any, params: types.PublishDiagnosticsParams) -> None:
            self.queue(params.uri).put_nowait(params)

        @self.client.feature(types.WINDOW_LOG_MESSAGE)
        def on_log(ls: Any, params: types.LogMessageParams) -> None:
            self.logs.put_nowait(params.message)

    def queue(self, uri: str) -> asyncio.Queue[types.PublishDiagnosticsParams]:
        return self.diagnostics.setdefault(uri, asyncio.Queue())

    async def start(self) -> None:
        await self.client.start_io(sys.executable, "-m", "verifier", "lsp", "--debounce", "0.05", *self.args)
        await self.client.initialize_async(
            types.InitializeParams(
                capabilities=types.ClientCapabilities(), process_id=None, root_uri=self.folder.as_uri()
            )
        )
        self.client.initialized(types.InitializedParams())

    async def stop(self) -> None:
        await self.client.shutdown_async(None)
        self.client.exit(None)
        await self.client.stop()

    def open(self, path: Path) -> str:
        uri = path.as_uri()
        self.texts[uri] = path.read_text(encoding="utf-8")
        self.versions[uri] = 1
        item = types.TextDocumentItem(uri, "latex", 1, self.texts[uri])
        self.client.text_document_did_open(types.DidOpenTextDocumentParams(item))
        return uri

    def change(self, uri: str, text: str) -> None:
        self.texts[uri] = text
        self.versions[uri] += 1
        self.client.text_document_did_change(
            types.DidChangeTextDocumentParams(
                types.VersionedTextDocumentIdentifier(version=self.versions[uri], uri=uri),
                [types.TextDocumentContentChangeWholeDocument(text)],
            )
        )

    def apply(self, edit: types.WorkspaceEdit) -> None:
        """Apply a workspace edit to the open texts and send the changes."""
        assert edit.changes
        for uri, edits in edit.changes.items():
            text = self.texts[uri]
            for e in sorted(edits, key=lambda e: (e.range.start.line, e.range.start.character), reverse=True):
                a, b = offset(text, e.range.start), offset(text, e.range.end)
                text = text[:a] + e.new_text + text[b:]
            self.change(uri, text)

    async def next_diagnostics(self, uri: str) -> list[types.Diagnostic]:
        params = await asyncio.wait_for(self.queue(uri).get(), TIMEOUT)
        return list(params.diagnostics)

    async def next_log(self, pattern: str = "checked") -> str:
        while True:
            message = await asyncio.wait_for(self.logs.get(), TIMEOUT)
            if re.search(pattern, message):
                return message


def offset(text: str, pos: types.Position) -> int:
    """The index in ``text`` of an LSP position (these texts are ASCII, so units are characters)."""
    lines = text.splitlines(keepends=True)
    return sum(len(line) for line in lines[: pos.line]) + pos.character


def position(text: str, needle: str, after: int = 0) -> types.Position:
    """Where ``needle`` starts in ``text``."""
    i = text.index(needle, after)
    line = text.count("\n", 0, i)
    return types.Position(line, i - (text.rfind("\n", 0, i) + 1))


def by_line(diagnostics: list[types.Diagnostic]) -> dict[int, types.Diagnostic]:
    return {d.range.start.line: d for d in diagnostics}


def run(folder: Path, body: Callable[[Session], Awaitable[None]], *args: str) -> None:
    async def main() -> None:
        session = Session(folder, *args)
        await session.start()
        try:
            await body(session)
        finally:
            await session.stop()

    asyncio.run(main())


@pytest.fixture()
def paper(tmp_path: Path) -> Path:
    (tmp_path / "paper.tex").write_text(MAIN, encoding="utf-8")
    (tmp_path / "part.tex").write_text(PART, encoding="utf-8")
    return tmp_path


def test_open_publishes_verdicts_at_each_claims_range_in_its_own_file(paper: Path) -> None:
    async def body(s: Session) -> None:
        uri = s.open(paper / "paper.tex")
        found = by_line(await s.next_diagnostics(uri))
        part = await s.next_diagnostics((paper / "part.tex").as_uri())
        e8 = found[2]
        assert e8.severity == types.DiagnosticSeverity.Information and e8.message.startswith("proved")
        # The range is the claim itself: from its first character to its last (macros as typed).
        assert e8.range.start == position(MAIN, r"\Eis{8}")
        end = position(MAIN, r"^2 \]", MAIN.index("name=e8"))
        assert e8.range.end == types.Position(end.line, end.character + 2)
        typo = found[4]
        assert typo.severity == types.DiagnosticSeverity.Error and typo.message.startswith("refuted")
        assert typo.range.start == position(MAIN, "E_{12}")
        undefined = [d for d in found.values() if d.code == "unknown-symbol"]
        assert len(undefined) == 1 and undefined[0].range.start == position(MAIN, r"\foo")
        assert undefined[0].code_description is None or undefined[0].code_description.href.startswith("file:")
        # The claim of the \input file is reported in that file, at its place there.
        assert len(part) == 1 and part[0].severity == types.DiagnosticSeverity.Information
        assert part[0].range.start == position(PART, r"\Eis{14}")
        assert "4 blocks checked" in await s.next_log()

    run(paper, body, "--no-cache")


def test_an_edit_rechecks_only_the_edited_claim(paper: Path) -> None:
    async def body(s: Session) -> None:
        uri = s.open(paper / "paper.tex")
        first = await s.next_diagnostics(uri)
        await s.next_log()
        # E_8 = E_4^2 becomes the false E_8 = 2 E_4^2 (constant terms 1 and 2).
        s.change(uri, MAIN.replace(r"\Eis{8} = \Eis{4}^2", r"\Eis{8} = 2\Eis{4}^2"))
        second = await s.next_diagnostics(uri)
        log = await s.next_log()
        assert "1 block checked, 3 reused" in log
        changed = [d for d in second if d not in first]
        assert len(changed) == 1 and changed[0].range.start.line == 2
        assert changed[0].severity == types.DiagnosticSeverity.Error and changed[0].message.startswith("refuted")
        assert len(second) == len(first)
        # The \input file's diagnostics did not change, so they are not sent again.
        part = s.queue((paper / "part.tex").as_uri())
        assert part.qsize() == 1  # only the first publication

    run(paper, body, "--no-cache")


def test_hover_and_the_suggested_correction_that_proves_the_claim(paper: Path) -> None:
    async def body(s: Session) -> None:
        uri = s.open(paper / "paper.tex")
        await s.next_diagnostics(uri)
        await s.next_log()
        at = position(MAIN, "E_{12}")
        hover = await s.client.text_document_hover_async(
            types.HoverParams(types.TextDocumentIdentifier(uri), types.Position(at.line, at.character + 3))
        )
        assert hover is not None and isinstance(hover.contents, types.MarkupContent)
        text = hover.contents.value
        assert "refuted" in text and "first difference" in text and r"\frac{441}{619}" in text
        # The first difference is at q^0: 1 against 441/619 + 250/691 (computed here with Fraction).
        from fractions import Fraction

        right0 = Fraction(441, 619) + Fraction(250, 691)
        assert f"\\tfrac{{{right0.numerator}}}{{{right0.denominator}}}" in text
        rng = types.Range(at, types.Position(at.line, at.character + 1))
        actions = await s.client.text_document_code_action_async(
            types.CodeActionParams(types.TextDocumentIdentifier(uri), rng, types.CodeActionContext([]))
        )
        assert actions is not None
        fix = [a for a in actions if isinstance(a, types.CodeAction) and "correction" in a.title]
        assert len(fix) == 1 and fix[0].edit is not None
        s.apply(fix[0].edit)
        assert r"\frac{441}{691}E_4^3" in s.texts[uri]
        after = by_line(await s.next_diagnostics(uri))
        assert after[at.line].severity == types.DiagnosticSeverity.Information
        assert after[at.line].message.startswith("proved")

    run(paper, body, "--no-cache")


def test_quick_fixes_add_a_tag_and_a_define(paper: Path) -> None:
    async def body(s: Session) -> None:
        uri = s.open(paper / "paper.tex")
        await s.next_diagnostics(uri)
        await s.next_log()
        at = position(MAIN, "E_{10}")
        tag: list[types.CodeAction] = []
        for _ in range(100):  # the offers of tags follow the verdicts
            actions = await s.client.text_document_code_action_async(
                types.CodeActionParams(
                    types.TextDocumentIdentifier(uri), types.Range(at, at), types.CodeActionContext([])
                )
            )
            tag = [a for a in actions or [] if isinstance(a, types.CodeAction) and "%@claim" in a.title]
            if tag:
                break
            await asyncio.sleep(0.1)
        assert len(tag) == 1 and tag[0].edit is not None
        s.apply(tag[0].edit)
        after = by_line(await s.next_diagnostics(uri))
        # The display is now a claim (one line lower), and E_10 = E_4 E_6 is proved.
        assert after[at.line + 1].message.startswith("proved")
        foo = position(s.texts[uri], r"\foo")
        actions = await s.client.text_document_code_action_async(
            types.CodeActionParams(
                types.TextDocumentIdentifier(uri), types.Range(foo, foo), types.CodeActionContext([])
            )
        )
        define = [a for a in actions or [] if isinstance(a, types.CodeAction) and "define" in a.title]
        assert len(define) == 1 and define[0].edit is not None
        s.apply(define[0].edit)
        # Complete the skeleton with a weight-8 form: E_8 = E_4^2 + 0 * E_4^2 holds.
        s.change(uri, s.texts[uri].replace("%@define \\foo = \n", "%@define \\foo = E_4^2\n"))
        after = await s.next_diagnostics(uri)
        line = position(s.texts[uri], r"\foo", s.texts[uri].index("name=undefined")).line
        assert by_line(after)[line].message.startswith("proved")

    run(paper, body, "--no-cache")


def test_a_macro_change_in_the_main_file_rechecks_the_input_file(paper: Path) -> None:
    async def body(s: Session) -> None:
        uri = s.open(paper / "paper.tex")
        part_uri = (paper / "part.tex").as_uri()
        await s.next_diagnostics(uri)
        assert (await s.next_diagnostics(part_uri))[0].message.startswith("proved")
        await s.next_log()
        # \Eis{k} now means 2 E_k: E_8 = E_4^2 becomes 2E_8 = 4E_4^2 (still true, but a new text);
        # E_14 = E_4^2 E_6 becomes 2E_14 = 8 E_4^2 E_6, which is false.
        s.change(uri, MAIN.replace(r"\newcommand{\Eis}[1]{E_{#1}}", r"\newcommand{\Eis}[1]{2E_{#1}}"))
        part = await s.next_diagnostics(part_uri)
        assert part[0].severity == types.DiagnosticSeverity.Error and part[0].message.startswith("refuted")
        assert "2 blocks checked, 2 reused" in await s.next_log()

    run(paper, body, "--no-cache")


def test_a_claim_over_its_time_budget_is_reported_and_the_next_edit_is_served(tmp_path: Path) -> None:
    # A product of high weight needs thousands of coefficients: far more than a millisecond.
    text = (
        "%@claim name=slow\n\\[ E_4^{40} E_6^{40} = E_4^{40} E_6^{40} + 0 \\]\n"
        "%@claim name=quick\n\\[ E_8 = E_4^2 \\]\n"
    )
    (tmp_path / "slow.tex").write_text(text, encoding="utf-8")

    async def body(s: Session) -> None:
        uri = s.open(tmp_path / "slow.tex")
        found = await s.next_diagnostics(uri)
        slow = [d for d in found if d.code == "time-budget"]
        assert slow and all(d.severity == types.DiagnosticSeverity.Error for d in slow)
        assert "0.001 s" in slow[0].message
        await s.next_log()
        # The next edit is checked as usual: the server reports the check of the new text.
        s.change(uri, text.replace("E_8 = E_4^2", "E_8 = 3E_4^2"))
        assert "2 claims" in await s.next_log()

    run(tmp_path, body, "--no-cache", "--max-seconds", "0.001")


def test_the_version_option_does_not_load_pygls() -> None:
    code = "import sys\nfrom verifier.cli import build_parser\nbuild_parser()\nprint('pygls' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"

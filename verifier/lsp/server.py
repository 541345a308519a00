"""The language server (pygls): verdicts as diagnostics, hovers and quick fixes in the editor.

The message loop only keeps books.  Checks run in one worker process
(:mod:`verifier.lsp.engine`), one at a time, newest edit first:

- an edit schedules a check of its manuscript after a quiet period (``debounce``), and
  tells the running check, if any, to stop at its next chunk;
- a check that stopped early is started again with the newest text (its finished chunks
  are in the cache);
- a worker that does not answer within :data:`PATIENCE` seconds of a newer edit (one claim
  stuck below the time budget's reach) is replaced by a fresh one.

Diagnostics are published per file of the manuscript (a claim in an ``\\input`` file is
reported in that file), and only for files whose diagnostics changed.  After each check a
``window/logMessage`` says how many blocks were decided and how many came from the cache.
"""

from __future__ import annotations

import asyncio
import contextlib
import multiprocessing
import sys
import time
from collections.abc import Callable, Iterable, Sequence
from dataclasses import dataclass
from multiprocessing.connection import Connection
from pathlib import Path
from typing import Any

from cattrs import Converter
from lsprotocol import types
from pygls.lsp.server import LanguageServer
from pygls.protocol import default_converter
from pygls.uris import from_fs_path, to_fs_path

from verifier import __version__, method
from verifier.lsp import DEFAULT_SECONDS, engine, hover, roots, wire
from verifier.lsp.model import Checked, Edit, Finding, Fix, Pos, Span

SUFFIXES = (".tex", ".ltx", ".latex", ".md", ".markdown", ".mdown")
DEFAULT_DEBOUNCE = 0.3
# Seconds a newer edit waits for the worker to give up an older check before it is replaced.
PATIENCE = 3.0

_SEVERITY = {
    "error": types.DiagnosticSeverity.Error,
    "warning": types.DiagnosticSeverity.Warning,
    "information": types.DiagnosticSeverity.Information,
    "hint": types.DiagnosticSeverity.Hint,
}


@dataclass
class Options:
    """The command line of ``qreferee lsp``."""

    debounce: float = DEFAULT_DEBOUNCE
    max_seconds: float | None = DEFAULT_SECONDS
    max_terms: int | None = None
    no_cache: bool = False
    config: str | None = None


class Worker:
    """The process that checks manuscripts, with a pipe to it."""

    def __init__(self, generation: Any) -> None:
        ctx = multiprocessing.get_context("spawn")
        self.conn, child = ctx.Pipe()
        self.process = ctx.Process(target=engine.worker_main, args=(child, generation), daemon=True)
        self.process.start()
        child.close()
        self.table = wire.Table()  # the findings this worker sent last

    def stop(self) -> None:
        """End the process at once (whatever it is doing)."""
        self.process.kill()
        self.process.join(timeout=5)
        self.conn.close()


class _DiagnosticData:
    """The JSON data of each published diagnostic, made once per diagnostic object.

    After an edit most diagnostics of a file are the objects published last time (see
    :meth:`QrefereeServer.diagnostic`); the converter's hook for :class:`types.Diagnostic`
    gives their data from here instead of converting them again.  Only the diagnostics
    published now are kept.
    """

    def __init__(self) -> None:
        self.plain: Callable[[Any], Any] = lambda d: d
        self.data: dict[int, tuple[types.Diagnostic, Any]] = {}

    def converter(self) -> Converter:
        converter: Converter = default_converter()  # type: ignore[no-untyped-call]
        self.plain = converter.get_unstructure_hook(types.Diagnostic)
        converter.register_unstructure_hook(types.Diagnostic, self.hook)
        return converter

    def hook(self, diagnostic: types.Diagnostic) -> Any:
        known = self.data.get(id(diagnostic))
        if known is not None and known[0] is diagnostic:
            return known[1]
        data = self.plain(diagnostic)
        self.data[id(diagnostic)] = (diagnostic, data)
        return data

    def keep(self, published: Iterable[list[types.Diagnostic]]) -> None:
        """Forget the data of diagnostics no longer published."""
        kept: dict[int, tuple[types.Diagnostic, Any]] = {}
        for diagnostics in published:
            for d in diagnostics:
                known = self.data.get(id(d))
                if known is not None and known[0] is d:
                    kept[id(d)] = known
        self.data = kept


class QrefereeServer(LanguageServer):
    """The server's state: the last check of each manuscript, and the queue of checks to make."""

    def __init__(self, options: Options) -> None:
        data = _DiagnosticData()
        super().__init__("qreferee", __version__, converter_factory=data.converter)
        self.diagnostic_data = data
        # main file -> id(finding) -> (finding, the lines its range was converted with, its diagnostic)
        self.made: dict[str, dict[int, tuple[Finding, tuple[str | None, str | None], types.Diagnostic]]] = {}
        self.options = options
        self.results: dict[str, Checked] = {}  # main file -> its last complete check
        self.published: dict[str, list[types.Diagnostic]] = {}  # uri -> what it shows now
        self.results_paths: dict[str, list[str]] = {}  # main file -> the files last published for it
        self.counter = 0  # the number of the newest edit
        self.generation: Any = multiprocessing.get_context("spawn").Value("q", 0)
        self.timers: dict[str, asyncio.TimerHandle] = {}
        self.pending: dict[str, None] = {}  # main files waiting for a check, oldest first
        self.running: tuple[str, int, float] | None = None  # (main, version, started)
        self.newer_since: float | None = None  # when an edit arrived during the running check
        self.worker: Worker | None = None

    # -- the worker -----------------------------------------------------------------------

    def start_worker(self) -> Worker:
        """The worker, started (or started again) when needed."""
        if self.worker is None or not self.worker.process.is_alive():
            if self.worker is not None:
                self._drop_worker()
            self.worker = Worker(self.generation)
            loop = asyncio.get_running_loop()
            conn = self.worker.conn
            loop.add_reader(conn.fileno(), self._answer, conn)
        return self.worker

    def _drop_worker(self) -> None:
        if self.worker is None:
            return
        with contextlib.suppress(RuntimeError, ValueError, OSError):
            asyncio.get_running_loop().remove_reader(self.worker.conn.fileno())
        self.worker.stop()
        self.worker = None

    def close(self) -> None:
        """Stop the worker (the server is shutting down)."""
        for handle in self.timers.values():
            handle.cancel()
        self.timers.clear()
        self._drop_worker()

    # -- scheduling -------------------------------------------------------------------------

    def main_for(self, path: Path) -> Path:
        """The manuscript that ``path`` is part of."""
        text = self._text(path) or ""
        known = [(Path(main), c.files) for main, c in self.results.items()]
        return roots.main_of(path, text, known)

    def edited(self, path: Path, delay: float) -> None:
        """``path`` changed: check its manuscript after ``delay`` seconds of quiet."""
        main = str(self.main_for(path))
        self.counter += 1
        self.generation.value = self.counter
        if self.running is not None and self.newer_since is None:
            self.newer_since = time.monotonic()
        old = self.timers.pop(main, None)
        if old is not None:
            old.cancel()
        loop = asyncio.get_running_loop()
        self.timers[main] = loop.call_later(delay, self._ready, main)

    def _ready(self, main: str) -> None:
        self.timers.pop(main, None)
        self.pending[main] = None
        self._pump()

    def _pump(self) -> None:
        if not self.pending:
            return
        if self.running is not None:
            self._check_patience()
            return
        main = next(iter(self.pending))
        del self.pending[main]
        request = engine.Request(
            main,
            self.counter,
            self._overlay(),
            max_seconds=self.options.max_seconds,
            max_terms=self.options.max_terms,
            no_cache=self.options.no_cache,
            config=self.options.config,
        )
        worker = self.start_worker()
        self.running = (main, request.version, time.monotonic())
        self.newer_since = None
        try:
            worker.conn.send(request)
        except OSError as exc:
            self.running = None
            self._log(f"qreferee: cannot reach the checking process ({exc}); starting a new one", error=True)
            self._drop_worker()
            self.pending[main] = None
            asyncio.get_running_loop().call_later(0.5, self._pump)
            return
        asyncio.get_running_loop().call_later(PATIENCE, self._check_patience)

    def _check_patience(self) -> None:
        """Replace a worker that keeps a newer edit waiting too long."""
        if self.running is None or self.newer_since is None:
            return
        waited = time.monotonic() - self.newer_since
        if waited < PATIENCE:
            asyncio.get_running_loop().call_later(PATIENCE - waited + 0.05, self._check_patience)
            return
        main = self.running[0]
        self._log(f"qreferee: the check of {Path(main).name} did not stop for a newer edit; restarting the checker")
        self.running = None
        self._drop_worker()
        self.pending.setdefault(main)
        self._pump()

    def _answer(self, conn: Connection) -> None:
        """The worker sent something: a finished (or given up) check, or it died."""
        table = self.worker.table if self.worker is not None and self.worker.conn is conn else wire.Table()
        try:
            answer = wire.loads(conn.recv_bytes(), table)
        except (EOFError, OSError):
            answer = None
        except Exception:  # the two ends disagree (see verifier.lsp.wire): start afresh
            answer = None
        if isinstance(answer, engine.Untagged):
            last = self.results.get(answer.main)
            if last is not None and last.version == answer.version:
                last.untagged_spans, last.untagged = answer.spans, answer.fixes
            return
        running, self.running = self.running, None
        if not isinstance(answer, Checked):
            main = running[0] if running else None
            detail = f": {answer}" if isinstance(answer, str) else ""
            self._log(f"qreferee: the checking process failed{detail}; starting a new one", error=True)
            self._drop_worker()
            if isinstance(answer, str) and main is not None:
                self._failed(main, answer)
            elif main is not None:
                self.pending.setdefault(main)
        elif answer.superseded:
            self.pending.setdefault(answer.main)
        else:
            self.results[answer.main] = answer
            if answer.main not in self.pending and answer.main not in self.timers:
                self._publish(answer)
            self._log(
                f"qreferee: {Path(answer.main).name}: {sum(1 for f in answer.findings if f.result)} claims; "
                f"{answer.checked} block{'s' if answer.checked != 1 else ''} checked, {answer.reused} reused, "
                f"in {answer.seconds:.3f} s"
            )
        self._pump()

    def _failed(self, main: str, message: str) -> None:
        """A check crashed: say so on the main file, keep the other diagnostics."""
        uri = self._uri(main)
        diag = types.Diagnostic(
            range=types.Range(types.Position(0, 0), types.Position(0, 0)),
            message=f"qreferee could not check this manuscript: {message}",
            severity=types.DiagnosticSeverity.Error,
            source="qreferee",
            code="internal",
        )
        self._send(uri, [diag])

    # -- documents -------------------------------------------------------------------------

    def _overlay(self) -> dict[str, str]:
        out: dict[str, str] = {}
        for uri, doc in self.workspace.text_documents.items():
            path = to_fs_path(uri)
            if path and path.lower().endswith(SUFFIXES):
                out[str(Path(path).resolve())] = doc.source
        return out

    def _open_doc(self, path: str) -> Any:
        for uri, doc in self.workspace.text_documents.items():
            fs = to_fs_path(uri)
            if fs and str(Path(fs).resolve()) == path:
                return doc
        return None

    def _text(self, path: Path) -> str | None:
        doc = self._open_doc(str(path.resolve()))
        if doc is not None:
            return str(doc.source)
        try:
            return path.read_text(encoding="utf-8", errors="replace")
        except OSError:
            return None

    def _lines(self, path: str) -> Sequence[str]:
        text = self._text(Path(path))
        return (text or "").splitlines(keepends=True)

    def _uri(self, path: str) -> str:
        for uri in self.workspace.text_documents:
            fs = to_fs_path(uri)
            if fs and str(Path(fs).resolve()) == path:
                return str(uri)
        return str(from_fs_path(path) or Path(path).as_uri())

    # -- positions ---------------------------------------------------------------------------

    def to_client(self, lines: Sequence[str], pos: Pos) -> types.Position:
        """A position in characters as the client counts (UTF-16 code units unless agreed otherwise)."""
        codec = self.workspace.position_codec
        if pos.line >= len(lines):
            return types.Position(pos.line, pos.character)
        return codec.position_to_client_units(lines, types.Position(pos.line, pos.character))

    def from_client(self, path: str, position: types.Position) -> Pos:
        """A client position as :class:`Pos`."""
        lines = self._lines(path)
        p = self.workspace.position_codec.position_from_client_units(lines, position)
        return Pos(p.line, p.character)

    def range_of(self, span: Span, lines: Sequence[str] | None = None) -> types.Range:
        """A span as an LSP range."""
        lines = lines if lines is not None else self._lines(span.path)
        return types.Range(self.to_client(lines, span.start), self.to_client(lines, span.end))

    # -- publishing --------------------------------------------------------------------------

    def diagnostic(self, finding: Finding, lines: Sequence[str]) -> types.Diagnostic:
        """A finding as an LSP diagnostic (the code linked to the section of the method notes)."""
        description = None
        notes = method.path()
        if finding.anchor and notes is not None:
            description = types.CodeDescription(href=f"{notes.as_uri()}#{finding.anchor}")
        return types.Diagnostic(
            range=self.range_of(finding.span, lines),
            message=finding.message,
            severity=_SEVERITY[finding.severity],
            code=finding.code or (finding.result.verdict if finding.result else None),
            code_description=description,
            source="qreferee",
        )

    def _publish(self, checked: Checked) -> None:
        paths = list(dict.fromkeys([*checked.files, *(f.span.path for f in checked.findings)]))
        before = self.results_paths.get(checked.main, [])
        for path in before:
            if path not in paths:
                self._send(self._uri(path), [])
        self.results_paths[checked.main] = paths
        # A finding the worker sent again (verifier.lsp.wire) is the same object: its
        # diagnostic is reused when the lines its range lies on read as before.
        known, made = self.made.get(checked.main, {}), {}
        for path in paths:
            lines = self._lines(path)
            diagnostics = []
            for f in checked.for_path(path):
                ends = (_line(lines, f.span.start.line), _line(lines, f.span.end.line))
                old = known.get(id(f))
                diagnostic = old[2] if old is not None and old[0] is f and old[1] == ends else self.diagnostic(f, lines)
                made[id(f)] = (f, ends, diagnostic)
                diagnostics.append(diagnostic)
            self._send(self._uri(path), diagnostics)
        self.made[checked.main] = made
        self.diagnostic_data.keep(self.published.values())

    def _send(self, uri: str, diagnostics: list[types.Diagnostic]) -> None:
        if self.published.get(uri) == diagnostics:
            return  # nothing changed in this file
        self.published[uri] = diagnostics
        doc = self.workspace.text_documents.get(uri)
        self.text_document_publish_diagnostics(
            types.PublishDiagnosticsParams(uri=uri, diagnostics=diagnostics, version=doc.version if doc else None)
        )

    def _log(self, message: str, error: bool = False) -> None:
        kind = types.MessageType.Error if error else types.MessageType.Log
        self.window_log_message(types.LogMessageParams(type=kind, message=message))

    # -- hover and code actions --------------------------------------------------------------

    def findings_at(self, path: str, pos: Pos) -> list[Finding]:
        """Claims whose range holds ``pos``; else the claims of the tagged display that holds it."""
        exact: list[Finding] = []
        in_block: list[Finding] = []
        for checked in self.results.values():
            for f in checked.findings:
                if f.result is None:
                    continue
                if f.span.contains(path, pos):
                    exact.append(f)
                elif f.block is not None and f.block.contains(path, pos):
                    in_block.append(f)
        return exact or in_block

    def hover(self, path: str, position: types.Position) -> types.Hover | None:
        """The hover at a position: the claims there, in Markdown."""
        found = self.findings_at(path, self.from_client(path, position))
        texts = [hover.render(f.result) for f in found if f.result is not None]
        if not texts:
            return None
        return types.Hover(
            contents=types.MarkupContent(kind=types.MarkupKind.Markdown, value="\n\n---\n\n".join(texts))
        )

    def _edit(self, fix: Fix) -> types.WorkspaceEdit:
        changes: dict[str, list[types.TextEdit]] = {}
        for e in fix.edits:
            changes.setdefault(self._uri(e.span.path), []).append(self._text_edit(e))
        return types.WorkspaceEdit(changes=changes)

    def _text_edit(self, e: Edit) -> types.TextEdit:
        return types.TextEdit(range=self.range_of(e.span), new_text=e.text)

    def code_actions(self, path: str, rng: types.Range) -> list[types.CodeAction]:
        """Quick fixes for the findings that touch ``rng``, and tags for untagged displays there."""
        start, end = self.from_client(path, rng.start), self.from_client(path, rng.end)
        lines = self._lines(path)
        out: list[types.CodeAction] = []
        for checked in self.results.values():
            for f in checked.findings:
                if not f.fixes or not _touches(f.span, path, start, end):
                    continue
                diag = self.diagnostic(f, lines)
                for fix in f.fixes:
                    out.append(
                        types.CodeAction(
                            title=fix.title,
                            kind=types.CodeActionKind.QuickFix,
                            diagnostics=[diag],
                            edit=self._edit(fix),
                            is_preferred=fix.preferred,
                        )
                    )
            for span, fix in zip(checked.untagged_spans, checked.untagged, strict=True):
                if _touches(span, path, start, end):
                    action = types.CodeAction(title=fix.title, kind=types.CodeActionKind.QuickFix, edit=self._edit(fix))
                    out.append(action)
        return out


def _line(lines: Sequence[str], number: int) -> str | None:
    return lines[number] if 0 <= number < len(lines) else None


def _touches(span: Span, path: str, start: Pos, end: Pos) -> bool:
    return span.path == path and span.start <= end and start <= span.end


def _path(uri: str) -> Path | None:
    fs = to_fs_path(uri)
    if not fs or not fs.lower().endswith(SUFFIXES):
        return None
    return Path(fs).resolve()


def build(options: Options | None = None) -> QrefereeServer:
    """The server with its features registered."""
    server = QrefereeServer(options or Options())

    @server.feature(types.INITIALIZED)
    def initialized(ls: QrefereeServer, params: types.InitializedParams) -> None:
        ls.start_worker()  # the engine loads while the author reads

    @server.feature(types.TEXT_DOCUMENT_DID_OPEN)
    def did_open(ls: QrefereeServer, params: types.DidOpenTextDocumentParams) -> None:
        path = _path(params.text_document.uri)
        if path is not None:
            ls.edited(path, 0.0)

    @server.feature(types.TEXT_DOCUMENT_DID_CHANGE)
    def did_change(ls: QrefereeServer, params: types.DidChangeTextDocumentParams) -> None:
        path = _path(params.text_document.uri)
        if path is not None:
            ls.edited(path, ls.options.debounce)

    @server.feature(types.TEXT_DOCUMENT_DID_SAVE)
    def did_save(ls: QrefereeServer, params: types.DidSaveTextDocumentParams) -> None:
        path = _path(params.text_document.uri)
        if path is not None:
            ls.edited(path, 0.0)

    @server.feature(types.TEXT_DOCUMENT_HOVER)
    def on_hover(ls: QrefereeServer, params: types.HoverParams) -> types.Hover | None:
        path = _path(params.text_document.uri)
        return ls.hover(str(path), params.position) if path is not None else None

    @server.feature(
        types.TEXT_DOCUMENT_CODE_ACTION,
        types.CodeActionOptions(code_action_kinds=[types.CodeActionKind.QuickFix]),
    )
    def on_code_action(ls: QrefereeServer, params: types.CodeActionParams) -> list[types.CodeAction] | None:
        path = _path(params.text_document.uri)
        return ls.code_actions(str(path), params.range) if path is not None else None

    @server.feature(types.SHUTDOWN)
    def on_shutdown(ls: QrefereeServer, params: None) -> None:
        ls.close()

    return server


def serve(options: Options | None = None) -> int:
    """Run the server on standard input and output until the client says exit."""
    server = build(options)
    protocol_out = sys.stdout.buffer
    sys.stdout = sys.stderr  # a stray print must never corrupt the protocol stream
    try:
        server.start_io(sys.stdin.buffer, protocol_out)
    finally:
        server.close()
    return 0

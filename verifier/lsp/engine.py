"""One check of a manuscript for the language server, run in a worker process.

The editor's unsaved buffers replace the files on disk (:func:`verifier.scan.scan_path`
with an overlay).  Checks go through :class:`verifier.cache.CachedChecker`, the verdict
cache that ``check`` and ``watch`` share: a claim is decided again only when its text, a
define before it or a macro it uses changed.  The worker keeps one checker per set of
settings, so its memory cache lives from one edit to the next.

An edit usually changes one display, so the worker also keeps, per manuscript, what it
built last time: the rows of every display (:class:`verifier.scan.memo.DisplayMemo`), the
results of every block (the checker's ``keep_results``) and the finding of every result.
A block whose text, defines, macros and place are unchanged costs a key and a look-up.

The tagged blocks are checked in chunks.  Between two chunks the check asks ``stop()``
whether a newer edit has arrived; if so it gives up (what it decided so far is in the
cache) and the newer check starts at once.  A single claim is bounded by the time budget
(``max_seconds``), enforced in the worker's main thread; a claim over it becomes an
``error`` with code ``time-budget``.
"""

from __future__ import annotations

import os
import sys
import time
from collections.abc import Callable
from dataclasses import dataclass, field
from multiprocessing.connection import Connection
from pathlib import Path
from typing import TYPE_CHECKING, Any

from verifier import method
from verifier.lsp import DEFAULT_SECONDS, fixes
from verifier.lsp.model import SCAN_SEVERITY, SEVERITY, Checked, Finding, Fix, Pos, Span, absolute, span_of
from verifier.scan.document import ClaimBlock, DefineTag, ScannedDocument
from verifier.scan.memo import DisplayMemo

if TYPE_CHECKING:
    from verifier.api import ClaimResult
    from verifier.cache import CachedChecker
    from verifier.diagnostics import Diagnostic

# Tagged blocks decided between two looks at whether a newer edit has arrived.
CHUNK = 16
# Seconds of quiet after the verdicts before the "add a tag" offers are made: making them
# at once would take the processor from the server and the editor while they show the verdicts.
UNTAGGED_PAUSE = 0.1


@dataclass
class Request:
    """What to check: the main file, the open buffers, and the options of the server."""

    main: str  # absolute path
    version: int
    overlay: dict[str, str] = field(default_factory=dict)  # absolute path -> buffer text
    max_seconds: float | None = DEFAULT_SECONDS
    max_terms: int | None = None
    no_cache: bool = False
    config: str | None = None


@dataclass
class Untagged:
    """The "add a tag" offers of a manuscript, sent after its verdicts."""

    main: str
    version: int
    spans: list[Span] = field(default_factory=list)
    fixes: list[Fix] = field(default_factory=list)


_CHECKERS: dict[Any, CachedChecker] = {}


@dataclass
class _Session:
    """What the worker keeps of the last complete check of one manuscript."""

    memo: DisplayMemo = field(default_factory=DisplayMemo)
    # id(result) -> (result, its finding): a result given again gets the same finding
    findings: dict[int, tuple[ClaimResult, Finding]] = field(default_factory=dict)
    scanned: tuple[int, ScannedDocument] | None = None  # (version, scan) for the untagged offers


# The sessions of the manuscripts checked most recently (the least recent are dropped).
_SESSIONS: dict[str, _Session] = {}
MAX_SESSIONS = 8


def _session(main: str) -> _Session:
    session = _SESSIONS.pop(main, None) or _Session()
    _SESSIONS[main] = session
    while len(_SESSIONS) > MAX_SESSIONS:
        _SESSIONS.pop(next(iter(_SESSIONS)))
    return session


def _checker(max_terms: int, max_seconds: float, tag_defaults: dict[str, str], use_disk: bool) -> CachedChecker:
    from verifier.cache import CachedChecker

    key = (max_terms, max_seconds, tuple(sorted(tag_defaults.items())), use_disk)
    if key not in _CHECKERS:
        _CHECKERS[key] = CachedChecker(
            max_terms=max_terms,
            run_options={"max_seconds": max_seconds},
            tag_defaults=tag_defaults,
            use_disk=use_disk,
            keep_results=True,
        )
    return _CHECKERS[key]


def check(request: Request, stop: Callable[[], bool] = lambda: False) -> Checked:
    """Check ``request.main`` with the buffers of ``request.overlay``; see the module docstring."""
    from verifier.cache import default_cache_dir
    from verifier.config import resolve
    from verifier.scan import scan_path

    start = time.perf_counter()
    main = Path(request.main)
    settings = resolve(
        main,
        Path(request.config) if request.config else None,
        max_terms=request.max_terms,
        max_seconds=request.max_seconds,
        no_cache=request.no_cache,
    )
    overlay = {Path(p): t for p, t in request.overlay.items()}
    session = _session(request.main)
    doc = scan_path(main, overlay, session.memo)
    session.scanned = (request.version, doc)
    checker = _checker(settings.max_terms, settings.max_seconds, settings.tag_defaults, settings.cache)
    cache_dir = default_cache_dir(main)
    done = Checked(request.main, request.version, files=list(dict.fromkeys(absolute(f) for f in doc.files)))
    blocks = [item for item in doc.items if isinstance(item, ClaimBlock)]
    claims: list[ClaimResult] = []
    diagnostics: list[Diagnostic] = []
    for k in range(0, max(len(blocks), 1), CHUNK):
        if k and stop():
            done.superseded = True
            return done
        chosen = {id(b) for b in blocks[k : k + CHUNK]}
        part = ScannedDocument(
            [item for item in doc.items if isinstance(item, DefineTag) or id(item) in chosen],
            list(doc.diagnostics) if k == 0 else [],
            list(doc.files),
        )
        report = checker.check_document(part, cache_dir)
        claims.extend(report.claims)
        if k == 0:
            diagnostics = list(report.diagnostics)
        done.checked += checker.stats.misses
        done.reused += checker.stats.hits
    spans = [(b, _block_span(b)) for b in blocks]
    at = 0  # claims come in the blocks' order: look from the block of the previous claim on
    known, session.findings = session.findings, {}
    for result in claims:
        same = known.get(id(result))
        if same is not None and same[0] is result:
            # The same result object: its block's text and place are unchanged (the cache key,
            # file and line), so its span, block and fixes are too.
            finding = same[1]
        else:
            finding, at = _claim_finding(result, spans, at)
        session.findings[id(result)] = (result, finding)
        done.findings.append(finding)
    for d in diagnostics:
        hint = f" (hint: {d.hint})" if d.hint else ""
        done.findings.append(
            Finding(
                span_of(d.location),
                SCAN_SEVERITY.get(d.severity, "error"),
                d.message + hint,
                d.code,
                method.for_code(d.code),
            )
        )
    done.seconds = time.perf_counter() - start
    return done


def _block_span(block: ClaimBlock) -> Span:
    """From the start of the tag's line to the last character of the display's claims."""
    tag = Pos(block.tag.line - 1, 0)
    path = absolute(block.tag.file)
    if not block.rows or any(r.text.source.display != block.tag.file for r in block.rows):
        return Span(path, tag, Pos(block.tag.line - 1, block.tag.column))
    source = block.rows[0].text.source
    last = max(max(r.text.origins) for r in block.rows if r.text.origins)
    line, col = source.line_col(last + 1)
    return Span(path, tag, Pos(line - 1, col - 1))


def _claim_finding(result: ClaimResult, spans: list[tuple[ClaimBlock, Span]], at: int) -> tuple[Finding, int]:
    """The finding of one claim, and the index of its block in ``spans`` (searched from ``at``)."""
    o = result.outcome
    span = span_of(result.location, result.end)
    order = [*range(at, len(spans)), *range(0, at)]
    index = next((i for i in order if spans[i][1].contains(span.path, span.start)), None)
    owner = spans[index] if index is not None else None
    label = f" [{result.name}]" if result.name else (f" ({result.label})" if result.label else "")
    hint = f" (hint: {o.hint})" if o.hint else ""
    how = method.for_method(o.method) if o.verdict == "proved" else None
    anchor = method.for_code(o.code) or how or method.for_kind(o.kind)
    finding = Finding(
        span, SEVERITY[o.verdict], f"{o.verdict}{label}: {o.message}{hint}", o.code, anchor, result, [], None
    )
    if owner is not None:
        block, finding.block = owner
        from verifier.scan import is_markdown

        for fix in (fixes.correction(block, result), fixes.define_skeleton(block, result, is_markdown(span.path))):
            if fix is not None:
                finding.fixes.append(fix)
    return finding, at if index is None else index


def untagged(request: Request) -> Untagged:
    """A tag for each untagged display that the untagged discovery can read (after the verdicts)."""
    from verifier.scan import scan_path
    from verifier.screen import untagged_blocks

    overlay = {Path(p): t for p, t in request.overlay.items()}
    out = Untagged(request.main, request.version)
    session = _SESSIONS.get(request.main)
    scanned = session.scanned if session is not None else None
    try:
        doc = scanned[1] if scanned is not None and scanned[0] == request.version else None
        found = untagged_blocks(doc or scan_path(Path(request.main), overlay), overlay)
    except Exception:  # a courtesy: a failure here never hides the verdicts
        return out
    for block in found:
        offer = fixes.add_tag(block)
        if offer is not None:
            out.spans.append(offer[0])
            out.fixes.append(offer[1])
    return out


# -- the worker process ------------------------------------------------------------------

_GENERATION: Any = None  # a shared integer: the number of the newest request


def worker_main(conn: Connection, generation: Any) -> None:
    """The worker process: answer each :class:`Request` from ``conn`` with a :class:`Checked`.

    Answers go through :mod:`verifier.lsp.wire` (findings the server has are not sent again).
    A check that crashes is answered with the error's text.  The process's standard output
    is the language server's protocol stream, so it is pointed at standard error first.
    """
    global _GENERATION
    from verifier.lsp import wire

    table = wire.Table()  # the findings the server has from this process
    os.dup2(2, 1)
    sys.stdout = sys.stderr
    _GENERATION = generation
    import verifier.api  # noqa: F401  (the first check should not pay for the imports)

    while True:
        try:
            request = conn.recv()
        except (EOFError, OSError, KeyboardInterrupt):
            return
        if not isinstance(request, Request):
            return
        answer: Checked | str
        try:
            answer = run(request)
        except Exception as exc:  # a bug: say so, and keep serving
            answer = f"{type(exc).__name__}: {exc}"
        try:
            conn.send_bytes(wire.dumps(answer, table))
            if isinstance(answer, Checked) and not answer.superseded and not conn.poll(UNTAGGED_PAUSE):
                conn.send_bytes(wire.dumps(untagged(request), table))
        except (OSError, ValueError):
            return


def run(request: Request) -> Checked:
    """Check in the worker; stop early when a newer request has been made."""

    def stop() -> bool:
        return _GENERATION is not None and int(_GENERATION.value) > request.version

    return check(request, stop)

"""What the language server knows about a checked manuscript, as plain data.

Positions here are 0-based lines and columns counted in characters (code points), as the
rest of qreferee counts them; :mod:`verifier.lsp.server` converts them to the client's
units.  Everything is picklable: it is built in the worker process and sent back.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING

from verifier.location import Location

if TYPE_CHECKING:
    from verifier.api import ClaimResult

# Verdict -> severity of the diagnostic in the editor.
SEVERITY = {"proved": "information", "unproven": "warning", "refuted": "error", "error": "error"}
# Severity of a scan diagnostic (``Diagnostic.severity``) -> severity in the editor.
SCAN_SEVERITY = {"error": "error", "warning": "warning", "note": "information"}


@dataclass(frozen=True, order=True)
class Pos:
    """A 0-based line and a 0-based column in characters."""

    line: int
    character: int


@dataclass(frozen=True)
class Span:
    """A range ``[start, end)`` in one file (an absolute path)."""

    path: str
    start: Pos
    end: Pos

    def contains(self, path: str, pos: Pos) -> bool:
        """Whether ``pos`` in ``path`` lies in the span (its end included, for a cursor after it)."""
        return path == self.path and self.start <= pos <= self.end


@dataclass(frozen=True)
class Edit:
    """Replace the text of ``span`` by ``text`` (an empty span inserts)."""

    span: Span
    text: str


@dataclass
class Fix:
    """A quick fix: a title and the edits that make it."""

    title: str
    edits: list[Edit]
    preferred: bool = False


@dataclass
class Finding:
    """One thing to show in the editor: a claim's verdict or a problem the scan found."""

    span: Span
    severity: str  # error | warning | information | hint
    message: str
    code: str | None = None
    anchor: str | None = None  # the section of docs/method.md behind the code or the verdict
    result: ClaimResult | None = None
    fixes: list[Fix] = field(default_factory=list)
    block: Span | None = None  # the tagged display the claim belongs to


@dataclass
class Checked:
    """The findings of one check of a manuscript, by file."""

    main: str
    version: int  # the request's number (newer requests have larger numbers)
    files: list[str] = field(default_factory=list)  # absolute paths of the manuscript's files
    findings: list[Finding] = field(default_factory=list)
    untagged: list[Fix] = field(default_factory=list)  # "add a tag" for untagged displays that read as claims
    untagged_spans: list[Span] = field(default_factory=list)  # the displays of ``untagged``, in order
    checked: int = 0  # tagged blocks decided in this check
    reused: int = 0  # tagged blocks whose verdicts came from the cache
    seconds: float = 0.0
    superseded: bool = False  # a newer edit arrived; the check stopped early and found nothing

    def for_path(self, path: str) -> list[Finding]:
        """The findings in one file."""
        return [f for f in self.findings if f.span.path == path]


@functools.lru_cache(maxsize=4096)
def absolute(display: str) -> str:
    """The absolute path of a file as the scanner names it (relative names are to the current folder)."""
    return str(Path(display).resolve())


def point(loc: Location) -> Pos:
    """A scanner location (1-based) as a :class:`Pos`."""
    return Pos(max(loc.line - 1, 0), max(loc.column - 1, 0))


def span_of(start: Location, end: Location | None = None) -> Span:
    """The span from ``start`` through the character at ``end`` (inclusive); one character without ``end``."""
    a = point(start)
    b = point(end) if end is not None and end.file == start.file else a
    if b < a:
        b = a
    return Span(absolute(start.file), a, Pos(b.line, b.character + 1))

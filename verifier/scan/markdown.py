"""Scan a Markdown note for ``<!-- @claim ... -->`` and ``<!-- @define ... -->`` tags.

A claim tag applies to the next ``$$ ... $$`` block or fenced block of language
``math``.  Macro definitions written anywhere in the note (typically inside a math
block, as MathJax and KaTeX allow) are expanded in later claims.
"""

from __future__ import annotations

import re
from pathlib import Path

from verifier.diagnostics import Diagnostic
from verifier.location import Location
from verifier.scan import macros as macro_mod
from verifier.scan.definitions import Region, classify, definition_items, math_regions, split_definitions
from verifier.scan.display import join_continued_rows, normalise_row, rows_of
from verifier.scan.document import MAX_FILE_BYTES, ClaimBlock, DefineTag, ScannedDocument
from verifier.scan.files import decode_source, near_miss_tags
from verifier.scan.options import parse_options
from verifier.scan.text import MappedText, SourceFile

_TAG = re.compile(r"<!--\s*@(?P<kind>claim|define)(?![A-Za-z])(?P<rest>.*?)-->", re.S)
_FENCE_OPEN = re.compile(r"(?P<fence>`{3,}|~{3,})[ \t]*math[ \t]*\r?\n")


def scan_markdown_source(source: SourceFile) -> ScannedDocument:
    """Scan one Markdown source."""
    doc = ScannedDocument(files=[source.display])
    text = source.text
    fenced = fenced_ranges(text)
    doc.diagnostics.extend(near_miss_tags(source, markdown=True, skip=fenced))
    # A tag shown inside a fenced code block is an example, not a claim.
    events: list[tuple[int, object]] = [
        (m.start(), m) for m in _TAG.finditer(text) if not any(a <= m.start() < b for a, b in fenced)
    ]
    events.extend(macro_mod.find_definitions(text))
    # Definitions in the author's text (docs/method.md#author-definitions), outside code.
    events.extend(
        (r.start, r) for r in math_regions(text) if classify(r, text) and not any(a <= r.start < b for a, b in fenced)
    )
    events.sort(key=lambda e: e[0])
    macros: dict[str, macro_mod.Macro] = {}
    tagged: list[tuple[int, int]] = []
    for offset, payload in events:
        if isinstance(payload, Region):
            if not any(a <= payload.start < b for a, b in tagged):
                doc.items.extend(definition_items(payload, text, source, macros))
        elif isinstance(payload, macro_mod.Macro):
            macros[payload.name] = payload
        elif isinstance(payload, macro_mod.DefinitionProblem):
            doc.diagnostics.append(Diagnostic("bad-macro", "warning", _loc(source, offset), payload.message, ""))
        else:
            assert isinstance(payload, re.Match)
            span = _tag(source, payload, macros, doc)
            if span is not None:
                tagged.append(span)
    return doc


def _tag(
    source: SourceFile, m: re.Match[str], macros: dict[str, macro_mod.Macro], doc: ScannedDocument
) -> tuple[int, int] | None:
    """Read one tag; returns the offsets of the math block it tags, if any."""
    text = source.text
    loc = _loc(source, m.start())
    rest_start = m.start("rest")
    rest = m.group("rest")
    if m.group("kind") == "define":
        mapped = MappedText(rest, list(range(rest_start, rest_start + len(rest))), source)
        define = DefineTag(loc, None)
        try:
            define.text = macro_mod.expand(mapped, macros)
        except macro_mod.MacroError as exc:
            define.problems.append(Diagnostic("macro-expansion", "error", _loc(source, exc.origin), str(exc), ""))
        doc.items.append(define)
        return None
    options, problems = parse_options(rest.replace("\n", " "))
    block = ClaimBlock(loc, options, [], "", source=" ".join(text[m.start() : m.end()].split()))
    for p in problems:
        block.problems.append(Diagnostic(p.code, "error", _loc(source, rest_start + p.offset), p.message, p.hint))
    doc.items.append(block)
    i = m.end()
    while i < len(text) and text[i] in " \t\r\n":
        i += 1
    if text.startswith("$$", i):
        start = i + 2
        close = text.find("$$", start)
        opener = "$$"
    else:
        fence = _FENCE_OPEN.match(text, i)
        if fence is None:
            block.problems.append(
                Diagnostic(
                    "orphan-tag",
                    "error",
                    loc,
                    "this claim tag is not followed by a math block",
                    "put a $$ ... $$ block or a ```math fence right after the tag",
                )
            )
            return None
        start = fence.end()
        closing = re.compile(r"^[ \t]*" + re.escape(fence.group("fence")) + r"[ \t]*\r?$", re.M)
        found = closing.search(text, start)
        close = found.start() if found else -1
        opener = fence.group("fence") + "math"
    if close < 0:
        block.problems.append(
            Diagnostic(
                "unclosed-display",
                "error",
                _loc(source, i),
                f"{opener} is never closed",
                "close the math block",
            )
        )
        return None
    block.environment = opener
    block.source = " ".join(text[start:close].split())
    content = MappedText(text[start:close], list(range(start, close)), source)
    for row in rows_of(content, opener):
        try:
            block.rows.append(normalise_row(row, macros))
        except macro_mod.MacroError as exc:
            block.problems.append(Diagnostic("macro-expansion", "error", _loc(source, exc.origin), str(exc), ""))
    block.rows = join_continued_rows(block.rows)
    if not block.problems:
        doc.items[-1:] = split_definitions(block)
    return (i, close + 2)


_FENCE_LINE = re.compile(r"^[ \t]{0,3}(`{3,}|~{3,})[^\n]*$", re.M)


def fenced_ranges(text: str) -> list[tuple[int, int]]:
    """Offsets ``[start, end)`` of fenced code blocks (an unclosed fence runs to the end)."""
    ranges: list[tuple[int, int]] = []
    opener: re.Match[str] | None = None
    for m in _FENCE_LINE.finditer(text):
        fence = m.group(1)
        if opener is None:
            opener = m
        elif (
            fence[0] == opener.group(1)[0]
            and len(fence) >= len(opener.group(1))
            and not m.group(0).strip()[len(fence) :]
        ):
            ranges.append((opener.start(), m.end()))
            opener = None
    if opener is not None:
        ranges.append((opener.start(), len(text)))
    return ranges


def _loc(source: SourceFile, offset: int) -> Location:
    line, col = source.line_col(offset)
    return Location(source.display, line, col)


def scan_markdown_path(path: Path, display: str) -> ScannedDocument:
    """Scan a Markdown file."""
    try:
        data = path.read_bytes()
    except OSError as exc:
        doc = ScannedDocument()
        doc.diagnostics.append(
            Diagnostic(
                "unreadable",
                "error",
                Location(display, 1, 1),
                f"cannot read {display}: {exc.strerror or exc}",
                "check the path",
            )
        )
        return doc
    if len(data) > MAX_FILE_BYTES:
        doc = ScannedDocument()
        doc.diagnostics.append(
            Diagnostic(
                "unreadable",
                "error",
                Location(display, 1, 1),
                f"{display} is larger than {MAX_FILE_BYTES} bytes",
                "",
            )
        )
        return doc
    decoded = decode_source(data, display)
    if decoded.text is None:
        doc = ScannedDocument()
    else:
        doc = scan_markdown_source(SourceFile(display, decoded.text, path))
    if decoded.problem is not None:
        doc.diagnostics.insert(0, decoded.problem)
    return doc

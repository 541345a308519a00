"""Reading a manuscript file's bytes as text, and tags that are almost right.

A file that is not text (it has NUL bytes, or most of it does not decode) is not read
at all; a text file that is not valid UTF-8 is read with replacement characters, and
either way the scan reports an ``unreadable`` error, so the run never passes silently.
A comment that looks like a tag but is not one (``% @claim``, ``%@Claim``,
``<!--@claim-->``) gets a ``near-miss-tag`` warning naming the tag that was meant.
"""

from __future__ import annotations

import re
from collections.abc import Sequence
from dataclasses import dataclass

from verifier.diagnostics import Diagnostic
from verifier.location import Location
from verifier.scan.text import SourceFile

# Share of undecodable or control characters above which a file is taken as binary.
BINARY_SHARE = 0.10


@dataclass(frozen=True)
class Decoded:
    """The text of a file (None if it is not text) and the problem found, if any."""

    text: str | None
    problem: Diagnostic | None


def decode_source(data: bytes, display: str) -> Decoded:
    """Decode ``data`` as UTF-8; a binary file gives no text and an ``unreadable`` error."""
    at = Location(display, 1, 1)
    if b"\x00" in data:
        return Decoded(None, _unreadable(at, f"{display} is a binary file, not text", "give the .tex or .md source"))
    try:
        return Decoded(data.decode("utf-8"), None)
    except UnicodeDecodeError as exc:
        bad_at = exc.start
    text = data.decode("utf-8", errors="replace")
    odd = sum(1 for ch in text if ch == "\ufffd" or (ord(ch) < 32 and ch not in "\t\n\r\f"))
    if odd > BINARY_SHARE * max(len(text), 1):
        return Decoded(None, _unreadable(at, f"{display} is a binary file, not text", "give the .tex or .md source"))
    prefix = data[:bad_at].decode("utf-8", errors="replace")
    line = prefix.count("\n") + 1
    column = len(prefix) - (prefix.rfind("\n") + 1) + 1
    return Decoded(
        text,
        _unreadable(
            Location(display, line, column),
            f"{display} is not valid UTF-8 (byte 0x{data[bad_at]:02x}); it was read with replacement characters",
            "save the file as UTF-8 (for example with iconv -f latin1 -t utf-8)",
        ),
    )


def _unreadable(at: Location, message: str, hint: str) -> Diagnostic:
    return Diagnostic("unreadable", "error", at, message, hint)


# A comment line that looks like a LaTeX tag but is not one: a space after '%' or '@',
# capital letters or a plural.
_LATEX_NEAR = re.compile(r"^\ufeff?[ \t]*%[ \t]*@[ \t]*(?P<word>claims?|defines?)(?![A-Za-z])", re.M | re.I)
_LATEX_EXACT = re.compile(r"^\ufeff?[ \t]*%@(claim|define)(?![A-Za-z])", re.M)
_MARKDOWN_NEAR = re.compile(r"<!--[ \t]*@?[ \t]*@?(?P<word>claims?|defines?)(?![A-Za-z])", re.I)
_MARKDOWN_EXACT = re.compile(r"<!--\s*@(claim|define)(?![A-Za-z])")


def near_miss_tags(source: SourceFile, markdown: bool, skip: Sequence[tuple[int, int]] = ()) -> list[Diagnostic]:
    """A warning for each almost-tag of ``source`` outside the ``skip`` ranges (code blocks)."""
    text = source.text
    out: list[Diagnostic] = []
    near, exact = (_MARKDOWN_NEAR, _MARKDOWN_EXACT) if markdown else (_LATEX_NEAR, _LATEX_EXACT)
    for m in near.finditer(text):
        start = m.start() if markdown else text.find("%", m.start())
        if exact.match(text, m.start()) or any(a <= start < b for a, b in skip):
            continue
        if markdown and "@" not in m.group(0):
            continue  # <!-- claim --> is ordinary prose in a comment
        word = m.group("word").lower()
        intended = "claim" if word.startswith("claim") else "define"
        tag = f"<!-- @{intended} -->" if markdown else f"%@{intended}"
        line, column = source.line_col(start)
        written = " ".join(m.group(0).split())
        out.append(
            Diagnostic(
                "near-miss-tag",
                "warning",
                Location(source.display, line, column),
                f"'{written}' is not a tag, so the display after it is not checked; did you mean {tag}?",
                f"write exactly {tag}",
            )
        )
    return out

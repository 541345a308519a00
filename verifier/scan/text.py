"""Text that remembers where each of its characters came from.

Every transformation before parsing (comment removal, macro expansion, deleting
labels and spacing commands, splitting rows) produces a new :class:`MappedText` whose
characters keep the offset of their origin in a :class:`SourceFile`.  Characters that a
macro body introduced carry the offset of the macro call, so a diagnostic inside an
expansion points at the place the author typed.
"""

from __future__ import annotations

import bisect
import re
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field
from pathlib import Path

from verifier.location import Location


@dataclass
class SourceFile:
    """One file of the manuscript as read from disk (or given as text)."""

    display: str
    text: str
    path: Path | None = None
    _line_starts: list[int] = field(default_factory=list, repr=False)

    def __post_init__(self) -> None:
        self._line_starts = [0] + [m.end() for m in re.finditer("\n", self.text)]

    @property
    def line_starts(self) -> list[int]:
        """The offset of the first character of each line (do not modify)."""
        return self._line_starts

    def line_col(self, offset: int) -> tuple[int, int]:
        """1-based line and column of a character offset."""
        offset = max(0, min(offset, len(self.text)))
        line = bisect.bisect_right(self._line_starts, offset) - 1
        return line + 1, offset - self._line_starts[line] + 1


class MappedText:
    """A string with, for each character, its offset in ``source``."""

    __slots__ = ("origins", "source", "text")

    def __init__(self, text: str, origins: list[int], source: SourceFile) -> None:
        assert len(text) == len(origins)
        self.text = text
        self.origins = origins
        self.source = source

    @classmethod
    def from_source(cls, source: SourceFile, start: int = 0, end: int | None = None) -> MappedText:
        """The slice ``[start, end)`` of a file, each character mapped to itself."""
        end = len(source.text) if end is None else end
        return cls(source.text[start:end], list(range(start, end)), source)

    def __len__(self) -> int:
        return len(self.text)

    def __str__(self) -> str:
        return self.text

    def slice(self, start: int, end: int | None = None) -> MappedText:
        """Characters ``[start, end)``."""
        end = len(self.text) if end is None else end
        return MappedText(self.text[start:end], self.origins[start:end], self.source)

    def origin(self, index: int) -> int:
        """Source offset of character ``index`` (the end maps to just after the last one)."""
        if not self.origins:
            return 0
        if index >= len(self.origins):
            return self.origins[-1] + 1
        return self.origins[max(index, 0)]

    def location(self, index: int) -> Location:
        """File, line and column of character ``index``."""
        line, col = self.source.line_col(self.origin(index))
        return Location(self.source.display, line, col)

    def source_slice(self, start: int = 0, end: int | None = None) -> str:
        """The author's original text covering characters ``[start, end)``.

        Characters produced by a macro map to the start of the call, so the slice runs
        up to where the next character of this text comes from (the end of the call).
        """
        end = len(self.text) if end is None else end
        if start >= end or not self.origins:
            return ""
        a = self.origin(start)
        # Extend over characters that were blanked (\right, \nonumber...): they belong to the claim.
        while end < len(self.text) and self.text[end] == " " and not self.source.text[self.origins[end]].isspace():
            end += 1
        last = max(self.origins[start:end]) + 1
        b = self.origins[end] if end < len(self.origins) else last
        return self.source.text[a : max(b, last)].rstrip()

    def strip(self) -> MappedText:
        """Without leading and trailing white space."""
        start = len(self.text) - len(self.text.lstrip())
        end = len(self.text.rstrip())
        return self.slice(start, max(start, end))

    def sub(self, pattern: re.Pattern[str], repl: Callable[[re.Match[str]], str] | str) -> MappedText:
        """Replace each match of ``pattern``.

        A replacement as long as the match keeps the positions one for one; otherwise
        every new character maps to the start of the match.
        """
        if pattern.search(self.text) is None:
            return self  # most patterns do not occur in a row; a text is never changed in place
        out: list[str] = []
        origins: list[int] = []
        pos = 0
        for m in pattern.finditer(self.text):
            out.append(self.text[pos : m.start()])
            origins.extend(self.origins[pos : m.start()])
            new = repl(m) if callable(repl) else m.expand(repl)
            if len(new) == m.end() - m.start():
                # Same length (blanking, one-for-one rewrites): keep every position.
                origins.extend(self.origins[m.start() : m.end()])
            else:
                origins.extend([self.origin(m.start())] * len(new))
            out.append(new)
            pos = m.end()
        out.append(self.text[pos:])
        origins.extend(self.origins[pos:])
        return MappedText("".join(out), origins, self.source)

    def blank(self, pattern: re.Pattern[str]) -> MappedText:
        """Replace each match by as many spaces (keeps every position)."""
        return self.sub(pattern, lambda m: " " * len(m.group(0)))

    @staticmethod
    def concat(parts: list[MappedText], source: SourceFile) -> MappedText:
        """Join pieces (all from ``source``)."""
        return MappedText("".join(p.text for p in parts), [o for p in parts for o in p.origins], source)


def blank_comments(text: str) -> str:
    """Replace every TeX comment (``%`` to end of line, not ``\\%``) by spaces."""
    # A % starts a comment when an even run of backslashes precedes it (each pair is an
    # escaped backslash); the comment runs to the end of its line.
    parts: list[str] = []
    done = 0
    i = text.find("%")
    while i >= 0:
        k = i
        while k > done and text[k - 1] == "\\":
            k -= 1
        if (i - k) % 2:
            i = text.find("%", i + 1)
            continue
        end = text.find("\n", i)
        end = len(text) if end < 0 else end
        parts += [text[done:i], " " * (end - i)]
        done = end
        i = text.find("%", end)
    parts.append(text[done:])
    return "".join(parts)


_CONTROL = re.compile(r"\\([A-Za-z]+|.)", re.S)


def tokens_with_depth(text: str, start: int = 0) -> Iterator[tuple[int, str, int]]:
    """Yield ``(index, token, depth)`` for each character or control sequence.

    ``depth`` is the brace depth outside the token: an opening brace is reported at the
    depth it opens from, a closing brace at the depth it returns to.  Control sequences
    (``\\begin``, ``\\\\``, ``\\{``) are single tokens, so escaped braces do not count.
    """
    depth = 0
    i = start
    n = len(text)
    while i < n:
        ch = text[i]
        if ch == "\\":
            m = _CONTROL.match(text, i)
            tok = m.group(0) if m else ch
            yield i, tok, depth
            i += len(tok)
            continue
        if ch == "}":
            depth -= 1
        yield i, ch, depth
        if ch == "{":
            depth += 1
        i += 1


def matching_brace(text: str, open_index: int) -> int:
    """Index of the ``}`` closing the ``{`` at ``open_index`` (-1 if none)."""
    for i, tok, depth in tokens_with_depth(text, open_index):
        if tok == "}" and depth == 0:
            return i
    return -1

"""Scan a LaTeX manuscript for ``%@claim`` and ``%@define`` tags.

A ``%@claim`` comment line tags the next display-math block (``\\[..\\]``, ``$$..$$``,
``equation``, ``align``, ``gather``, ``multline`` and their starred forms).  Macro
definitions are collected in reading order and ``\\input``/``\\include`` are followed,
relative to the main file and never outside its folder.
"""

from __future__ import annotations

import bisect
import re
from collections.abc import Mapping
from pathlib import Path

from verifier.diagnostics import Diagnostic
from verifier.location import Location
from verifier.scan import macros as macro_mod
from verifier.scan.definitions import Region, classify, definition_items, end_of, math_regions, split_definitions
from verifier.scan.display import join_continued_rows, normalise_row, rows_of
from verifier.scan.document import (
    MAX_FILE_BYTES,
    MAX_FILES,
    MAX_INCLUDE_DEPTH,
    ClaimBlock,
    DefineTag,
    ScannedDocument,
)
from verifier.scan.files import decode_source, near_miss_tags
from verifier.scan.memo import DisplayMemo
from verifier.scan.options import parse_options
from verifier.scan.text import MappedText, SourceFile, blank_comments

ENVIRONMENTS = ("equation", "align", "gather", "multline", "flalign", "alignat", "eqnarray", "subequations")
_TAG_LINE = re.compile(r"^\ufeff?[ \t]*%@(?P<kind>claim|define)(?P<rest>(?![A-Za-z]).*)$", re.M)
_INCLUDE = re.compile(
    r"\\(?P<cmd>input|include|subfile)(?![A-Za-z])\s*(?:\{(?P<braced>[^{}]*)\}|(?P<bare>[^\s{}\\%]+))"
)
# The visible form of the tags (qreferee.sty): \qrclaim[options] and \qrdefine{NAME = ...}.
COMMAND_TAG = re.compile(r"\\qr(?P<kind>claim|define)(?![A-Za-z@])")
# A command tag right after one of these is the command being defined, not a tag.
_DEFINING = re.compile(
    r"\\(?:(?:re)?newcommand|providecommand|DeclareRobustCommand|def|let|gdef|edef|xdef)\*?\s*\{?\s*$"
)
_DISPLAY_OPEN = re.compile(r"\\\[|\$\$|\\begin\s*\{(?P<env>(?:" + "|".join(ENVIRONMENTS) + r")\*?)\}")


class _Reader:
    """Walks the main file and its includes, filling a :class:`ScannedDocument`."""

    def __init__(self, root: Path, overlay: Mapping[Path, str] | None = None, memo: DisplayMemo | None = None) -> None:
        self.root = root.resolve()
        self.memo = memo
        self._macros_key: str | None = None
        # Texts that replace files on disk (an editor's unsaved buffers), by resolved path.
        self.overlay = {p.resolve(): t for p, t in (overlay or {}).items()}
        self.doc = ScannedDocument()
        self.macros: dict[str, macro_mod.Macro] = {}
        self.active: list[Path] = []
        self.tagged: list[tuple[str, int, int]] = []  # tagged displays: (file, start, end)

    def read_path(self, path: Path, at: Location | None) -> None:
        resolved = path.resolve()
        display = _display_name(resolved, self.root)
        at = at or Location(display, 1, 1)
        if len(self.doc.files) >= MAX_FILES:
            self._problem("unreadable", at, f"more than {MAX_FILES} files; {display} not read", "")
            return
        try:
            data = self.overlay[resolved].encode("utf-8") if resolved in self.overlay else resolved.read_bytes()
        except OSError as exc:
            self._problem("unreadable", at, f"cannot read {display}: {exc.strerror or exc}", "check the path")
            return
        if len(data) > MAX_FILE_BYTES:
            self._problem("unreadable", at, f"{display} is larger than {MAX_FILE_BYTES} bytes", "")
            return
        decoded = decode_source(data, display)
        if decoded.problem is not None:
            self.doc.diagnostics.append(decoded.problem)
        if decoded.text is None:
            return
        text = decoded.text
        self.active.append(resolved)
        self.doc.files.append(display)
        self.read_source(SourceFile(display, text, resolved))
        self.active.pop()

    def read_source(self, source: SourceFile) -> None:
        raw = source.text
        bare = blank_comments(raw)
        self.doc.diagnostics.extend(near_miss_tags(source, markdown=False))
        events: list[
            tuple[int, str, re.Match[str] | Region | tuple[int, macro_mod.Macro | macro_mod.DefinitionProblem]]
        ] = []
        for m in _TAG_LINE.finditer(raw):
            events.append((m.start(), "tag", m))
        for m in COMMAND_TAG.finditer(bare):
            if not _DEFINING.search(bare, max(0, m.start() - 40), m.start()):
                events.append((m.start(), "command", m))
        for m in _INCLUDE.finditer(bare):
            events.append((m.start(), "include", m))
        for offset, found in macro_mod.find_definitions(bare):
            events.append((offset, "macro", (offset, found)))
        for region in math_regions(bare):
            if classify(region, bare):
                events.append((region.start, "author", region))
        events.sort(key=lambda e: e[0])
        tag_offsets = [e[0] for e in events if e[1] in ("tag", "command")]
        for offset, kind, payload in events:
            if kind == "macro":
                assert isinstance(payload, tuple)
                found = payload[1]
                if isinstance(found, macro_mod.Macro):
                    if not (found.name in self.macros and bare.startswith("\\providecommand", offset)):
                        self.macros[found.name] = found
                        self._macros_key = None
                else:
                    assert isinstance(found, macro_mod.DefinitionProblem)
                    loc = _loc(source, found.offset)
                    self.doc.diagnostics.append(
                        Diagnostic(
                            "bad-macro",
                            "warning",
                            loc,
                            found.message,
                            "claims using this macro will not parse",
                        )
                    )
            elif kind == "author":
                assert isinstance(payload, Region)
                if not any(f == source.display and a <= payload.start < b for f, a, b in self.tagged):
                    self.doc.items.extend(definition_items(payload, bare, source, self.macros))
            elif kind == "include":
                assert isinstance(payload, re.Match)
                self._include(source, payload)
            elif kind == "command":
                assert isinstance(payload, re.Match)
                self._command_tag(source, bare, payload, tag_offsets)
            else:
                assert isinstance(payload, re.Match)
                self._tag(source, bare, payload, tag_offsets)

    def _include(self, source: SourceFile, m: re.Match[str]) -> None:
        at = _loc(source, m.start())
        name = (m.group("braced") or m.group("bare") or "").strip()
        if not name:
            return
        if len(self.active) >= MAX_INCLUDE_DEPTH:
            self._problem(
                "include-cycle",
                at,
                f"\\{m.group('cmd')} nested deeper than {MAX_INCLUDE_DEPTH}",
                "",
            )
            return
        # TeX resolves every \input against the folder it runs in: the main file's.
        try:
            target = self.root / name
            if target.suffix != ".tex" and not target.is_file():
                target = target.with_name(target.name + ".tex")
            target = target.resolve()
            exists = target.is_file()
        except (OSError, ValueError) as exc:  # a name too long for the file system, a NUL byte
            why = exc.strerror if isinstance(exc, OSError) and exc.strerror else str(exc)
            shown = name if len(name) <= 60 else name[:57] + "..."
            self._problem(
                "include-missing", at, f"cannot read \\{m.group('cmd')}{{{shown}}}: {why}", "check the file name"
            )
            return
        if not target.is_relative_to(self.root):
            self._problem(
                "include-outside",
                at,
                f"{name} lies outside the manuscript's folder; not read",
                "keep all parts of the manuscript under the main file's folder",
            )
            return
        if not exists and target not in self.overlay:
            self._problem("include-missing", at, f"{name} not found", "check the file name")
            return
        if target in self.active:
            self._problem("include-cycle", at, f"{name} is already being read", "remove the circular \\input")
            return
        self.read_path(target, at)

    def _tag(self, source: SourceFile, bare: str, m: re.Match[str], tag_offsets: list[int]) -> None:
        # A further '%' on the tag line starts the author's own remark.
        rest = re.split(r"(?<!\\)%", m.group("rest"), maxsplit=1)[0]
        self._tagged(source, bare, m.group("kind"), m.start("kind") - 2, rest, m.start("rest"), m.end(), tag_offsets)

    def _command_tag(self, source: SourceFile, bare: str, m: re.Match[str], tag_offsets: list[int]) -> None:
        """``\\qrclaim[options]`` (the brackets are optional) or ``\\qrdefine{NAME = ...}``."""
        kind = m.group("kind")
        extent = command_extent(bare, m)
        if isinstance(extent, str):
            self._problem("bad-option" if kind == "claim" else "bad-define", _loc(source, m.start()), extent, "")
            return
        rest_start, after = extent
        rest = bare[rest_start : after - 1] if after > m.end() else ""
        self._tagged(source, bare, kind, m.start(), rest, rest_start, after, tag_offsets)

    def _tagged(
        self,
        source: SourceFile,
        bare: str,
        kind: str,
        at: int,
        rest: str,
        rest_start: int,
        after: int,
        tag_offsets: list[int],
    ) -> None:
        """A tag of ``kind`` at offset ``at`` with option or definition text ``rest``; the display follows ``after``."""
        loc = _loc(source, at)
        if kind == "define":
            text = MappedText(rest, list(range(rest_start, rest_start + len(rest))), source)
            define = DefineTag(loc, None)
            try:
                define.text = macro_mod.expand(text, self.macros)
            except macro_mod.MacroError as exc:
                define.problems.append(Diagnostic("macro-expansion", "error", _loc(source, exc.origin), str(exc), ""))
            self.doc.items.append(define)
            return
        options, option_problems = parse_options(rest)
        block = ClaimBlock(loc, options, [], "", source=" ".join(source.text[at:after].split()))
        for p in option_problems:
            block.problems.append(Diagnostic(p.code, "error", _loc(source, rest_start + p.offset), p.message, p.hint))
        self.doc.items.append(block)
        i = after
        while i < len(bare) and bare[i] in " \t\r\n":
            i += 1
        opener = _DISPLAY_OPEN.match(bare, i)
        after_tag = bisect.bisect_right(tag_offsets, at)  # tag_offsets is sorted
        next_tag = tag_offsets[after_tag] if after_tag < len(tag_offsets) else None
        if opener is None or (next_tag is not None and next_tag < i):
            block.problems.append(
                Diagnostic(
                    "orphan-tag",
                    "error",
                    loc,
                    "this claim tag is not followed by display math",
                    "put \\[ ... \\], $$ ... $$ or an equation/align environment right after the tag",
                )
            )
            return
        env = opener.group("env") or ("\\[" if opener.group(0) == "\\[" else "$$")
        closer = {"\\[": "\\]", "$$": "$$"}.get(env, f"\\end{{{env}}}")
        close = _find_closer(bare, opener.end(), closer, env)
        if close < 0:
            block.problems.append(
                Diagnostic(
                    "unclosed-display",
                    "error",
                    _loc(source, opener.start()),
                    f"{opener.group(0)} is never closed",
                    f"add {closer}",
                )
            )
            return
        block.environment = env
        self.tagged.append((source.display, opener.start(), close + 1))
        block.source = " ".join(source.text[opener.end() : close].split())
        key = (env, source.text[opener.end() : close], self._macros()) if self.memo is not None else None
        known = self.memo.get(key, opener.end(), source) if self.memo is not None else None
        if known is not None:
            block.rows = known
        else:
            content = MappedText(bare[opener.end() : close], list(range(opener.end(), close)), source)
            for row in rows_of(content, env):
                try:
                    block.rows.append(normalise_row(row, self.macros))
                except macro_mod.MacroError as exc:
                    block.problems.append(
                        Diagnostic(
                            "macro-expansion",
                            "error",
                            _loc(source, exc.origin),
                            str(exc),
                            "check the definition of the macro",
                        )
                    )
            block.rows = join_continued_rows(block.rows)
            if self.memo is not None and not block.problems:
                self.memo.put(key, opener.end(), block.rows)
        if not block.problems:
            self.doc.items[-1:] = split_definitions(block)

    def _macros(self) -> str:
        """The macros in force, as text (what a display's reading depends on besides its text)."""
        if self._macros_key is None:
            self._macros_key = repr(sorted((m.name, m.nargs, m.default, m.body) for m in self.macros.values()))
        return self._macros_key

    def _problem(self, code: str, at: Location | None, message: str, hint: str) -> None:
        where = at or Location(str(self.root), 1, 1)
        self.doc.diagnostics.append(Diagnostic(code, "error", where, message, hint))


def command_extent(bare: str, m: re.Match[str]) -> tuple[int, int] | str:
    """Where a command tag's argument starts and where the tag ends, or what is wrong with it.

    ``m`` is a match of :data:`COMMAND_TAG` in the comment-free text ``bare``.
    """
    kind = m.group("kind")
    i = m.end()
    while i < len(bare) and bare[i] in " \t\r\n":
        i += 1
    opener, closer = ("[", "]") if kind == "claim" else ("{", "}")
    if i < len(bare) and bare[i] == opener:
        close = _matching(bare, i, closer)
        if close < 0:
            return f"the {'options' if kind == 'claim' else 'definition'} of \\qr{kind} are never closed"
        return i + 1, close + 1
    if kind == "claim":
        return m.end(), m.end()
    return "\\qrdefine needs its definition in braces: \\qrdefine{F = E_4 E_6}"


def find_tags(text: str) -> list[tuple[int, int, str]]:
    """Every tag of a LaTeX source as the scanner reads it: (start, end, kind), in order.

    Comment lines (``%@claim``, ``%@define``) and commands (``\\qrclaim[...]``,
    ``\\qrdefine{...}``) alike; a claim tag tags the display that starts after ``end``.
    """
    bare = blank_comments(text)
    found = [(m.start(), m.end(), m.group("kind")) for m in _TAG_LINE.finditer(text)]
    for m in COMMAND_TAG.finditer(bare):
        if _DEFINING.search(bare, max(0, m.start() - 40), m.start()):
            continue
        extent = command_extent(bare, m)
        if not isinstance(extent, str):
            found.append((m.start(), extent[1], m.group("kind")))
    return sorted(found)


def _matching(text: str, start: int, closer: str) -> int:
    """The offset of ``closer`` matching the bracket at ``start``, outside braces; -1 if none."""
    depth = 0
    i = start + 1
    while i < len(text):
        c = text[i]
        if c == "\\":
            i += 2
            continue
        if c == "{":
            depth += 1
        elif c == "}":
            if depth == 0:
                return i if closer == "}" else -1
            depth -= 1
        elif c == closer and depth == 0:
            return i
        i += 1
    return -1


def _find_closer(text: str, start: int, closer: str, env: str) -> int:
    if not env.startswith(("\\", "$")):
        # Same-name nesting is not legal LaTeX for these environments; take the first end.
        m = end_of(env).search(text, start)
        return m.start() if m else -1
    return text.find(closer, start)


def _loc(source: SourceFile, offset: int) -> Location:
    line, col = source.line_col(offset)
    return Location(source.display, line, col)


def _display_name(path: Path, root: Path) -> str:
    try:
        return str(path.relative_to(Path.cwd()))
    except ValueError:
        return str(path)


def scan_latex_path(
    path: Path, overlay: Mapping[Path, str] | None = None, memo: DisplayMemo | None = None
) -> ScannedDocument:
    """Scan a LaTeX file and everything it includes.

    ``overlay`` gives texts that replace files on disk (by path), such as an editor's unsaved buffers.
    ``memo`` reuses the rows of displays that have not changed since the last scan with it.
    """
    reader = _Reader(path.resolve().parent, overlay, memo)
    reader.read_path(path, None)
    if memo is not None:
        memo.finish()
    return reader.doc


def scan_latex_text(text: str, display: str = "<text>") -> ScannedDocument:
    """Scan LaTeX given as a string (includes are resolved against the current folder)."""
    reader = _Reader(Path.cwd())
    reader.doc.files.append(display)
    reader.read_source(SourceFile(display, text))
    return reader.doc

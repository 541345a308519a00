"""Definitions where authors make them (docs/method.md#author-definitions).

A formula ``X := ...`` (also ``\\coloneqq``, ``\\overset{\\mathrm{def}}{=}``,
``\\stackrel{\\text{def}}{=}``), displayed or inline, defines X for the rest of the document.
An inline ``$X = ...$`` right after a defining word of the sentence ("where", "let",
"set", "define", "put", "we write") is a definition too; any other inline ``$X = ...$``
is only remembered as a *mention*, so that a later claim that uses an unknown X can ask
for a ``%@define`` naming the place.

The scanners call :func:`math_regions` on comment-free text and :func:`definition_rows`
on each region; what comes out becomes a :class:`verifier.scan.document.DefineTag` whose
``origin`` says how it was found.  Positions are kept (MappedText) as everywhere.
"""

from __future__ import annotations

import functools
import re
from collections.abc import Iterator
from dataclasses import dataclass, replace

from verifier.scan import macros as macro_mod
from verifier.scan.display import Row, normalise_row, rows_of
from verifier.scan.document import ClaimBlock, DefineTag
from verifier.scan.text import MappedText, SourceFile, tokens_with_depth

# The definition symbols; each is replaced by '=' (padded, positions kept) for the parser.
DEF_SYMBOL = re.compile(
    r":\s*=|\\coloneqq(?![A-Za-z])|\\coloneq(?![A-Za-z])|\\colon\s*=|\\mathrel\s*\{\s*:\s*=\s*\}"
    r"|\\(?:overset|stackrel)\s*\{\s*(?:\\(?:mathrm|text|textrm|rm|mbox|scriptscriptstyle)\s*)?\{?\s*def\.?\s*\}?\s*\}"
    r"\s*\{\s*=\s*\}"
)
_OPEN = re.compile(
    r"\$\$|\$|\\\[|\\\(|\\begin\s*\{(?P<env>(?:equation|align|gather|multline|flalign|alignat|eqnarray|math|displaymath)"
    r"\*?)\}"
)
# "where $X = ...$", "Let $X = ...$", "we set $X = ...$", "Define $X = ...$" (the word must
# stand right before the formula).
_DEFINING_WORD = re.compile(
    r"(?:^|[\s(,;:])(?:where|Where|let|Let|set|Set|define|Define|put|Put|write|Write|denote|Denote)"
    r"(?:\s+(?:now|also|here|again))?\s*(?:by\s*)?$"
)
# An inline formula 'NAME(arg)? = ...' with a single '='.
_SIMPLE_LHS = re.compile(
    r"^\s*(?P<name>[A-Za-z](?:_(?:\{[^{}]*\}|[A-Za-z0-9]))?|\\[A-Za-z]+(?:_(?:\{[^{}]*\}|[A-Za-z0-9]))?)"
    r"\s*(?:\(\s*(?:\\tau|z|q)\s*\))?\s*=(?!=)"
)
# Names that are never taken from the author's prose: the nome and the variable.
NEVER_DEFINED = frozenset({"q", "\\tau", "z", "n", "x"})


@dataclass(frozen=True)
class Region:
    """A math formula of the source: where its content starts and ends, and how it was set."""

    start: int  # offset of the opening delimiter
    content_start: int
    content_end: int
    env: str  # "$", "\\(", "$$", "\\[" or an environment name
    inline: bool


def math_regions(bare: str) -> Iterator[Region]:
    """Every math formula of comment-free LaTeX (or Markdown) text, in order."""
    pos = 0
    n = len(bare)
    while pos < n:
        m = _OPEN.search(bare, pos)
        if m is None:
            return
        if m.start() > 0 and bare[m.start() - 1] == "\\" and m.group(0).startswith("$"):
            pos = m.end()  # \$ is a dollar sign
            continue
        token = m.group(0)
        env = m.group("env")
        if env:
            close = end_of(env).search(bare, m.end())
            end, after = (close.start(), close.end()) if close else (-1, -1)
            kind, inline = env.rstrip("*"), False
        else:
            closer = {"$$": "$$", "$": "$", "\\[": "\\]", "\\(": "\\)"}[token]
            end = _find_unescaped(bare, closer, m.end())
            after = end + len(closer)
            kind, inline = token, token in ("$", "\\(")
        if end < 0:
            return
        yield Region(m.start(), m.end(), end, kind, inline)
        pos = after


@functools.lru_cache(maxsize=64)
def end_of(env: str) -> re.Pattern[str]:
    """The pattern of ``\\end{env}``."""
    return re.compile(r"\\end\s*\{" + re.escape(env) + r"\}")


def _find_unescaped(text: str, closer: str, start: int) -> int:
    i = text.find(closer, start)
    while i > 0 and text[i - 1] == "\\" and closer.startswith("$"):
        i = text.find(closer, i + 1)
    return i


@dataclass(frozen=True)
class FoundDefinition:
    """A row of a formula that defines (``origin`` author/prose) or only mentions a name."""

    text: MappedText  # 'X = body' (the definition symbol replaced by '=')
    origin: str  # "author" (:=), "prose" (defining word + '='), "mention"


def classify(region: Region, bare: str) -> str | None:
    """How the formula defines: "author", "prose", "mention", or None (it defines nothing)."""
    content = bare[region.content_start : region.content_end]
    if DEF_SYMBOL.search(content):
        return "author"
    if not region.inline:
        return None
    m = _SIMPLE_LHS.match(content)
    if m is None or content.count("=") != 1 or m.group("name") in NEVER_DEFINED:
        return None
    before = bare[max(0, region.start - 60) : region.start]
    return "prose" if _DEFINING_WORD.search(before) else "mention"


def as_equation(row: MappedText) -> MappedText:
    """The row with its definition symbol written as '=' (positions kept)."""
    return row.sub(DEF_SYMBOL, lambda m: "=" + " " * (len(m.group(0)) - 1))


_LHS_AT = re.compile(
    r"(?:^|,|;|\\q?quad|\\text\s*\{\s*and\s*\})\s*"
    r"([A-Za-z](?:_(?:\{[^{}]*\}|[A-Za-z0-9]))?|\\[A-Za-z]+(?:_(?:\{[^{}]*\}|[A-Za-z0-9]))?)"
    r"\s*(?:\([^()]*\))?\s*=(?!=)"
)


def defined_names(text: str) -> list[str]:
    """The names a definition row defines (``X = ...``, after :func:`as_equation`), for one that is not read."""
    return [m.group(1) for m in _LHS_AT.finditer(text)]


_PIECE_SEP = re.compile(r",|;|\\qquad(?![A-Za-z])|\\quad(?![A-Za-z])|\\(?:text|mbox)\s*\{\s*and\s*\}")


def pieces(row: MappedText) -> list[MappedText]:
    """A row that holds a definition, cut at its top-level separators (``X := a,\\quad X^2 = b``).

    Only rows with a definition symbol are cut here; every other row is read whole by the
    grammar (rule ``row``).
    """
    s = row.text
    cuts: list[tuple[int, int]] = []
    depth = 0
    for i, tok, brace in tokens_with_depth(s):
        if tok in "([":
            depth += 1
        elif tok in ")]":
            depth -= 1
        elif brace == 0 and depth == 0:
            m = _PIECE_SEP.match(s, i)
            if m and (not cuts or i >= cuts[-1][1]):
                cuts.append((i, m.end()))
    out, start = [], 0
    for a, b in cuts:
        out.append(row.slice(start, a))
        start = b
    out.append(row.slice(start))
    return [p for p in out if p.text.strip()]


_RELATION_TOKENS = frozenset({"=", "\\neq", "\\ne"})


def chain_after_definition(piece: MappedText) -> tuple[MappedText, MappedText | None]:
    """``X := B = C`` as the definition ``X := B`` and the claim ``B = C`` (None: no chain).

    The first definition symbol is the definition's; the next relation at the top level
    (outside braces and brackets) starts the chain that the author claims about B.
    """
    m = DEF_SYMBOL.search(piece.text)
    if m is None:
        return piece, None
    depth = 0
    for i, tok, brace in tokens_with_depth(piece.text, m.end()):
        if tok in "([":
            depth += 1
        elif tok in ")]":
            depth -= 1
        elif brace == 0 and depth == 0 and tok in _RELATION_TOKENS:
            if DEF_SYMBOL.match(piece.text, i):
                continue
            return piece.slice(0, i), piece.slice(m.end())
    return piece, None


def split_definitions(block: ClaimBlock) -> list[ClaimBlock | DefineTag]:
    """A tagged display whose rows hold definitions (``X := ...``), in reading order: blocks
    with the claims, and for each definition a checking block and its define item."""
    if not any(DEF_SYMBOL.search(row.text.text) for row in block.rows):
        return [block]
    out: list[ClaimBlock | DefineTag] = []
    kept: list[Row] = []

    def flush() -> None:
        if kept:
            out.append(replace(block, rows=list(kept)))
            kept.clear()

    for row in block.rows:
        if not DEF_SYMBOL.search(row.text.text):
            kept.append(row)
            continue
        for piece in pieces(row.text):
            if not DEF_SYMBOL.search(piece.text):
                kept.append(Row(piece, row.label, " ".join(piece.source_slice().split())))
                continue
            flush()
            piece, chain = chain_after_definition(piece)
            text = as_equation(piece)
            lead = len(text.text) - len(text.text.lstrip())
            at = text.location(lead)
            source_text = " ".join(piece.source_slice().split())
            check = ClaimBlock(at, {}, [Row(text, row.label, source_text)], block.environment, source=source_text)
            check.definition = True
            out.extend([check, DefineTag(at, text, origin="author")])
            if chain is not None:
                kept.append(Row(chain, row.label, " ".join(chain.source_slice().split())))
    flush()
    return out


def definition_items(
    region: Region, bare: str, source: SourceFile, macros: dict[str, macro_mod.Macro]
) -> list[ClaimBlock | DefineTag]:
    """The definitions (and mentions) a formula makes, as items of the document.

    A definition gives two items: a block that checks it where the name already has a
    meaning (``definition=True``; it yields no claim for a new name), then the define item
    that gives the name the author's meaning from there on.
    """
    origin = classify(region, bare)
    if origin is None:
        return []
    content = MappedText(
        bare[region.content_start : region.content_end],
        list(range(region.content_start, region.content_end)),
        source,
    )
    env = region.env if region.env not in ("$", "\\(") else "\\["
    items: list[ClaimBlock | DefineTag] = []
    for raw in rows_of(content, env):
        if origin == "author" and not DEF_SYMBOL.search(raw.text):
            continue
        try:
            row = normalise_row(raw, macros)
        except macro_mod.MacroError:
            continue
        text = as_equation(row.text)
        lead = len(text.text) - len(text.text.lstrip())
        at = text.location(lead)
        if origin != "mention":
            block = ClaimBlock(at, {}, [Row(text, None, row.source_text)], env, source=row.source_text)
            block.definition = True
            items.append(block)
        items.append(DefineTag(at, text, origin=origin))
    return items

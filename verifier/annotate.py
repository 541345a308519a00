r"""An annotated copy of a manuscript: every tagged claim carries its verdict.

With one output file (:func:`annotate`), only the claims of the main file are placed next
to their display; claims read from ``\input``/``\include`` files are counted in the
summary.  With an output folder (:func:`annotate_paper`, :func:`paper_copies`), every file
of the paper gets its own copy, at the same relative path, so that the copies compile as a
whole.  Claims whose display cannot be found (an orphan tag, an unclosed display) and
document diagnostics are listed in the summary.  The input is never modified: the command
line writes the copies elsewhere.

LaTeX
=====

Every insertion is one span on one line, between two markers that typeset nothing
(``\iffalse ... \fi`` skips its text, so no package is needed)::

    \iffalse<qreferee>\fi ... \iffalse</qreferee>\fi{}

No line is added or removed, so every line of the copy keeps its number (and pdflatex's
messages about the copy point at the source's lines).  The spans are:

* just before ``\begin{document}``: ``\usepackage{xcolor}`` (only when the preamble does
  not load xcolor) and the definitions, by ``\providecommand``, of ``\qrefereeNote``,
  ``\qrefereeColor`` and ``\qrefereeSummary``, and (by ``\definecolor``, when a colour
  package is loaded) of colours named ``qreferee`` + verdict or severity.  A file without
  ``\begin{document}`` (a part meant for ``\input``) gets the definitions, and no
  ``\usepackage``, at its very start; its notes are coloured when the document that
  inputs it loads color or xcolor;
* right after the end of each tagged display (``\end{align}``, ``\]``, ``$$``), on the
  same line: one note per claim of the display, as a paragraph of its own below the
  display (never inside the math, never a margin note);
* just before ``\end{document}`` (at the start, for a file without one): the summary.

To get the source back byte for byte, delete every span from ``\iffalse<qreferee>\fi`` to
the next ``\iffalse</qreferee>\fi{}`` (the ``{}`` keeps a letter after the span from
joining the ``\fi``), for instance with::

    perl -pe 's{\\iffalse<qreferee>\\fi.*?\\iffalse</qreferee>\\fi\{\}}{}g' copy.tex > source.tex

or call :func:`strip_annotations`.  The text inside a span is ASCII and its backslashes
are escaped, so a span never contains the closing marker early.

Markdown
========

Every insertion is a group of whole lines around the marker ``<!-- qreferee-note -->``.
After the line that closes each tagged math block come a blank line, a blockquote line
with the verdict (one list item per claim when the block holds several), a line holding
only the marker (an HTML comment) and another blank line: Pandoc and CommonMark both need
the blank lines to start and end a blockquote, so the text after the block is not drawn
into it.  The summary goes at the end of the file, after a blank line.  The notes are
printable ASCII with plain-text verdicts (``**qreferee: proved**``), so the copy also goes
through Pandoc to PDF with a default LaTeX engine.  To get the source back, delete every
line that contains the marker, the blank line just before each group of them and the
blank line just after it (every group but the summary has one); :data:`MARKDOWN_STRIP` is
that as a Perl substitution::

    perl -0777 -pe 's/^\r?\n(?:[^\n]*<!-- qreferee-note -->[^\n]*(?:\n|\z))+(?:\r?\n)?//mg' copy.md > source.md

with one exception: if the source did not end with a line break, the copy gained a
``\n`` before its first note line at the end, and that ``\n`` must go too
(:func:`strip_annotations` does this).

A manuscript that already contains either marker is refused (strip it first).
"""

from __future__ import annotations

import re
from collections.abc import Iterable
from dataclasses import dataclass, field
from pathlib import Path

from verifier.api import ClaimResult, Report
from verifier.diagnostics import Diagnostic
from verifier.report.tex_message import ascii_line, message_tex, reading_tex, tex_escape, tt_escape
from verifier.report.text import CAUTION
from verifier.scan import is_markdown
from verifier.scan.latex import ENVIRONMENTS, find_tags
from verifier.scan.markdown import fenced_ranges as _fenced_ranges
from verifier.scan.text import blank_comments

LATEX_OPEN = r"\iffalse<qreferee>\fi"
# The closing marker ends in "{}" so that text right after it (a letter) never merges with \fi.
LATEX_CLOSE = r"\iffalse</qreferee>\fi{}"
MARKDOWN_MARK = "<!-- qreferee-note -->"
# Perl (-0777) substitution that removes the Markdown notes (see the module documentation).
MARKDOWN_STRIP = r"s/^\r?\n(?:[^\n]*<!-- qreferee-note -->[^\n]*(?:\n|\z))+(?:\r?\n)?//mg"

_LATEX_SPAN = re.compile(re.escape(LATEX_OPEN) + r".*?" + re.escape(LATEX_CLOSE))

VERDICT_ORDER = ("error", "refuted", "unproven", "proved")
_COLOURS = {
    "proved": "0,0.45,0.1",
    "refuted": "0.75,0,0",
    "unproven": "0.8,0.45,0",
    "error": "0.55,0,0.55",
    "warning": "0.8,0.45,0",
    "note": "0.3,0.3,0.3",
    "summary": "0.2,0.2,0.2",
}


class AlreadyAnnotated(ValueError):
    """The manuscript already contains qreferee's markers."""


@dataclass
class _Block:
    """A tagged display of the main file: tag line, last line, where its note goes."""

    first_line: int
    last_line: int
    insert_at: int
    claims: list[ClaimResult] = field(default_factory=list)


# ---------------------------------------------------------------------------
# Public entry points
# ---------------------------------------------------------------------------


def has_annotations(text: str, markdown: bool) -> bool:
    """True if ``text`` already holds qreferee's markers (LaTeX or Markdown)."""
    if markdown:
        return MARKDOWN_MARK in text
    return LATEX_OPEN in text or LATEX_CLOSE in text


def annotate(text: str, report: Report, main_file: str, markdown: bool) -> str:
    """The annotated copy of ``text``, the main file of ``report`` (named ``main_file`` there).

    Raises :class:`AlreadyAnnotated` if ``text`` already contains the markers.
    """
    if has_annotations(text, markdown):
        raise AlreadyAnnotated("the manuscript already contains qreferee annotations; strip them first")
    if markdown:
        return _annotate_markdown(text, report, main_file)
    return _annotate_latex(text, report, main_file)


def annotate_paper(texts: dict[str, str], report: Report) -> dict[str, str]:
    """Annotated copies of every file of a paper, so that the copies compile as a whole.

    ``texts`` maps each file named in ``report.files`` (the main file first) to its text;
    the result maps the same names to their copies.  Each file's claims are noted in its own
    copy; the main file's copy holds the summary of the whole paper, and the claims whose
    display could not be found, whichever file they are in.  An ``\\input`` file gets the
    note macros (by ``\\providecommand``) at its start, so it also compiles when it is
    input elsewhere.
    """
    main = report.files[0]
    for name, text in texts.items():
        if has_annotations(text, is_markdown(name)):
            raise AlreadyAnnotated(f"{name} already contains qreferee annotations; strip them first")
    copies: dict[str, str] = {}
    orphans: list[ClaimResult] = []
    for name in report.files:
        if name == main or name not in texts:
            continue
        if is_markdown(name):
            copies[name] = _annotate_markdown(texts[name], report, name)
            continue
        copies[name], left = _latex_copy(texts[name], report, name, summary=False, whole_paper=True)
        orphans.extend(left)
    if is_markdown(main):
        copies[main] = _annotate_markdown(texts[main], report, main)
    else:
        copies[main] = _latex_copy(
            texts[main], report, main, summary=True, whole_paper=True, unplaced_elsewhere=orphans
        )[0]
    return {name: copies[name] for name in report.files if name in copies}


def paper_copies(report: Report, root: Path) -> dict[Path, bytes]:
    """Annotated copies of every file of ``report``, keyed by their paths relative to ``root``.

    The files are read again (undecodable bytes are kept as they are, so each copy differs
    from its file only by the notes).  Raises :class:`AlreadyAnnotated` and ``OSError``.
    """
    texts = {name: Path(name).read_bytes().decode("utf-8", errors="surrogateescape") for name in report.files}
    base = root.resolve()
    return {
        Path(name).resolve().relative_to(base): text.encode("utf-8", errors="surrogateescape")
        for name, text in annotate_paper(texts, report).items()
    }


def strip_annotations(text: str, markdown: bool) -> str:
    """The inverse of :func:`annotate`: the source, byte for byte."""
    if not markdown:
        return _LATEX_SPAN.sub("", text)
    lines = _lines(text)
    drop = set()
    for i, line in enumerate(lines):
        if MARKDOWN_MARK in line:
            drop.add(i)
            if i and MARKDOWN_MARK not in lines[i - 1] and _blank(lines[i - 1]):
                drop.add(i - 1)  # the blank line that opens each group of notes
            if i + 1 < len(lines) and MARKDOWN_MARK not in lines[i + 1] and _blank(lines[i + 1]):
                drop.add(i + 1)  # the blank line that closes a group under a math block
    kept = [line for i, line in enumerate(lines) if i not in drop]
    if lines and MARKDOWN_MARK in lines[-1] and not lines[-1].endswith("\n") and kept:
        # The source had no final line break; annotate added exactly one "\n".
        kept[-1] = kept[-1][:-1]
    return "".join(kept)


# ---------------------------------------------------------------------------
# Shared
# ---------------------------------------------------------------------------


def _blank(line: str) -> bool:
    return not line.strip("\r\n")


def _lines(text: str) -> list[str]:
    """Lines with their terminators (only ``\\n`` ends a line, as in the scanners)."""
    parts = text.split("\n")
    lines = [p + "\n" for p in parts[:-1]]
    if parts[-1]:
        lines.append(parts[-1])
    return lines


def _line_of(text: str, offset: int) -> int:
    return text.count("\n", 0, offset) + 1


def _assign(blocks: list[_Block], claims: Iterable[ClaimResult]) -> list[ClaimResult]:
    """Give each claim to the block whose lines hold it; return the claims left over."""
    left: list[ClaimResult] = []
    for c in claims:
        home = next((b for b in blocks if b.first_line <= c.location.line <= b.last_line), None)
        if home is None:
            left.append(c)
        else:
            home.claims.append(c)
    return left


def _summary_counts(report: Report) -> str:
    s = report.summary
    total = sum(s.values())
    return (
        f"{total} claim{'s' if total != 1 else ''}: {s['proved']} proved, {s['refuted']} refuted, "
        f"{s['unproven']} unproven, {s['error']} error{'s' if s['error'] != 1 else ''}"
    )


def _claim_id(c: ClaimResult) -> str:
    who = c.name or c.label
    where = f"[{who}] line {c.location.line}" if who else f"line {c.location.line}"
    return f"{where}, {_link_text(c)}" if c.link else where


def _link_text(c: ClaimResult) -> str:
    """``link 2 of 3``: which link of a chain ``A = B = C = D`` the claim is."""
    assert c.link is not None
    return f"link {c.link[0]} of {c.link[1]}"


def _claim_message(c: ClaimResult) -> str:
    o = c.outcome
    code = f" [{o.code}]" if o.code else ""
    hint = f" (hint: {o.hint})" if o.hint else ""
    suggestion = getattr(o, "suggestion", None)
    fix = f" (suggested: {suggestion})" if suggestion and suggestion not in o.message else ""
    return " ".join(f"{o.message}{code}{hint}{fix}".split())


def _diagnostic_text(d: Diagnostic) -> str:
    hint = f" (hint: {d.hint})" if d.hint else ""
    return " ".join(f"{d.location}: {d.severity}: {d.message} [{d.code}]{hint}".split())


# ---------------------------------------------------------------------------
# LaTeX
# ---------------------------------------------------------------------------

_ENVIRONMENTS = ENVIRONMENTS
_DISPLAY_OPEN = re.compile(r"\\\[|\$\$|\\begin\s*\{(?P<env>(?:" + "|".join(_ENVIRONMENTS) + r")\*?)\}")
_BEGIN_DOCUMENT = re.compile(r"\\begin\s*\{document\}")
_END_DOCUMENT = re.compile(r"\\end\s*\{document\}")
_PACKAGES = re.compile(r"\\(?:usepackage|RequirePackage)\s*(?:\[[^\]]*\])?\s*\{([^{}]*)\}")


def _latex_setup(with_package: bool) -> str:
    colours = "".join(rf"\definecolor{{qreferee{name}}}{{rgb}}{{{rgb}}}" for name, rgb in _COLOURS.items())
    parts = [
        r"\usepackage{xcolor}" if with_package else "",
        r"\ifdefined\definecolor" + colours + r"\fi",
        r"\providecommand{\qrefereeColor}[2]{\ifdefined\textcolor\textcolor{qreferee#1}{#2}\else#2\fi}",
        # A note: a paragraph of its own below the display, then the text after the display
        # goes on unindented, as it would after the display itself.
        r"\providecommand{\qrefereeNote}[3]{\par\begingroup\noindent\raggedright\small"
        r"\frenchspacing\qrefereeColor{#1}{\rule[-0.3ex]{0.75em}{1.9ex}~\textbf{qreferee: #1}}~#2:~#3"
        r"\par\endgroup\addvspace{\smallskipamount}\csname @doendpe\endcsname}",
        r"\providecommand{\qrefereeSummary}[2]{\par\medskip\begingroup\noindent\raggedright\small\frenchspacing"
        r"\qrefereeColor{summary}{\textbf{qreferee summary:}}~#1.\par\texttt{#2}\par\endgroup}",
    ]
    return "".join(parts)


def _latex_note(c: ClaimResult, with_file: bool = False) -> str:
    verdict = c.verdict if c.verdict in _COLOURS else "error"
    who = tex_escape(f"{c.location.file}: {_claim_id(c)}" if with_file else _claim_id(c))
    if c.link:
        reading = reading_tex(c.reading)
        who += f" ({reading})" if reading else f" (\\texttt{{{tt_escape(c.source or c.reading)}}})"
    return rf"\qrefereeNote{{{verdict}}}{{{who}}}{{{message_tex(_claim_message(c))}}}"


def _latex_span(body: str) -> str:
    assert "\n" not in body and LATEX_CLOSE not in body
    return LATEX_OPEN + body + LATEX_CLOSE


def _latex_blocks(text: str) -> list[_Block]:
    """Every tagged display of a LaTeX source, found as the scanner finds it."""
    bare = blank_comments(text)
    tags = find_tags(text)
    starts = [start for start, _, _ in tags]
    blocks: list[_Block] = []
    for tag_start, tag_end, kind in tags:
        if kind != "claim":
            continue
        i = tag_end
        while i < len(bare) and bare[i] in " \t\r\n":
            i += 1
        opener = _DISPLAY_OPEN.match(bare, i)
        next_tag = next((t for t in starts if t > tag_start), None)
        if opener is None or (next_tag is not None and next_tag < i):
            continue
        env = opener.group("env")
        if env:
            closer = re.compile(r"\\end\s*\{" + re.escape(env) + r"\}").search(bare, opener.end())
            end = closer.end() if closer else -1
        else:
            token = "\\]" if opener.group(0) == "\\[" else "$$"
            found = bare.find(token, opener.end())
            end = found + len(token) if found >= 0 else -1
        if end < 0:
            continue
        blocks.append(_Block(_line_of(text, tag_start), _line_of(text, end - 1), end))
    return blocks


def _annotate_latex(text: str, report: Report, main_file: str) -> str:
    return _latex_copy(text, report, main_file, summary=True, whole_paper=False)[0]


def _latex_copy(
    text: str,
    report: Report,
    file: str,
    summary: bool,
    whole_paper: bool,
    unplaced_elsewhere: Iterable[ClaimResult] = (),
) -> tuple[str, list[ClaimResult]]:
    """The annotated copy of ``file`` and the claims of it whose display was not found.

    ``summary``: the copy gets the summary of the report (the main file).  ``whole_paper``:
    every file of the paper gets its own copy, so claims of other files are not counted as
    "not marked here", and ``unplaced_elsewhere`` (their orphans) go into this summary.
    """
    bare = blank_comments(text)
    begin = _BEGIN_DOCUMENT.search(bare)
    end = _END_DOCUMENT.search(bare, begin.end()) if begin else None
    body_start = begin.end() if begin else 0
    body_end = end.start() if end else len(text)
    blocks = [b for b in _latex_blocks(text) if body_start <= b.insert_at <= body_end]
    mine = [c for c in report.claims if c.location.file == file]
    unplaced = _assign(blocks, mine)
    elsewhere = [c for c in report.claims if c.location.file != file]

    insertions: list[tuple[int, str]] = []
    for b in blocks:
        if b.claims:
            insertions.append((b.insert_at, _latex_span("".join(_latex_note(c) for c in b.claims))))

    summary_body = ""
    if summary:
        counts = tex_escape(_summary_counts(report))
        if elsewhere and not whole_paper:
            files = sorted({c.location.file for c in elsewhere})
            counts += tex_escape(f"; {len(elsewhere)} of them in other files ({', '.join(files)}), not marked here")
        caution = tt_escape(CAUTION) if report.claims else ""
        summary_body = rf"\qrefereeSummary{{{counts}}}{{{caution}}}" + "".join(_latex_note(c) for c in unplaced)
        summary_body += "".join(_latex_note(c, with_file=True) for c in unplaced_elsewhere)
        summary_body += "".join(
            rf"\qrefereeNote{{{d.severity if d.severity in _COLOURS else 'error'}}}"
            rf"{{{tex_escape(d.code)}}}{{{tt_escape(_diagnostic_text(d))}}}"
            for d in report.diagnostics
        )

    if begin is not None:
        preamble = bare[: begin.start()]
        loaded = {p.strip() for m in _PACKAGES.finditer(preamble) for p in m.group(1).split(",")}
        with_package = "xcolor" not in loaded and (summary or not whole_paper)
        insertions.append((begin.start(), _latex_span(_latex_setup(with_package=with_package))))
        if summary_body:
            insertions.append((end.start() if end else len(text), _latex_span(summary_body)))
    else:
        start = 1 if text.startswith("\ufeff") else 0
        insertions.append((start, _latex_span(_latex_setup(with_package=False) + summary_body)))
    return _apply(text, insertions), ([] if summary else unplaced)


def _apply(text: str, insertions: list[tuple[int, str]]) -> str:
    out: list[str] = []
    last = 0
    for offset, piece in sorted(insertions, key=lambda x: x[0]):
        out.append(text[last:offset])
        out.append(piece)
        last = offset
    out.append(text[last:])
    return "".join(out)


# ---------------------------------------------------------------------------
# Markdown
# ---------------------------------------------------------------------------

_MD_TAG = re.compile(r"<!--\s*@(?P<kind>claim|define)(?![A-Za-z])(?P<rest>.*?)-->", re.S)
_FENCE_OPEN = re.compile(r"(?P<fence>`{3,}|~{3,})[ \t]*math[ \t]*\r?\n")


def _markdown_blocks(text: str) -> list[_Block]:
    """Every tagged math block of a Markdown source, found as the scanner finds it."""
    fenced = _fenced_ranges(text)
    blocks: list[_Block] = []
    for m in _MD_TAG.finditer(text):
        if m.group("kind") != "claim" or any(a <= m.start() < b for a, b in fenced):
            continue
        i = m.end()
        while i < len(text) and text[i] in " \t\r\n":
            i += 1
        if text.startswith("$$", i):
            close = text.find("$$", i + 2)
            end = close + 2 if close >= 0 else -1
        else:
            fence = _FENCE_OPEN.match(text, i)
            if fence is None:
                continue
            closing = re.compile(r"^[ \t]*" + re.escape(fence.group("fence")) + r"[ \t]*\r?$", re.M)
            found = closing.search(text, fence.end())
            end = found.end() if found else -1
        if end < 0:
            continue
        newline = text.find("\n", end - 1)
        insert_at = len(text) if newline < 0 else newline + 1
        blocks.append(_Block(_line_of(text, m.start()), _line_of(text, end - 1), insert_at))
    return blocks


def _md_code(text: str) -> str:
    """``text`` as a Markdown code span (safe from emphasis, links and HTML), in ASCII."""
    text = ascii_line(text).replace("<!--", "<!- -").replace("-->", "- ->")
    longest = max((len(r) for r in re.findall(r"`+", text)), default=0)
    fence = "`" * (longest + 1)
    pad = " " if text.startswith("`") or text.endswith("`") or not text.strip() else ""
    return f"{fence}{pad}{text}{pad}{fence}"


def _md_claim(c: ClaimResult) -> str:
    verdict = c.verdict
    who = c.name or c.label
    what = f"{who}: {_claim_message(c)}" if who else _claim_message(c)
    if c.link:
        link = f"{_link_text(c)} ({ascii_line(c.source or c.reading)})"
        what = f"{who}, {link}: {_claim_message(c)}" if who else f"{link}: {_claim_message(c)}"
    return f"**qreferee: {verdict}** {_md_code(what)}"


def _md_lines(items: list[str], indent: str) -> list[str]:
    if len(items) == 1:
        return [f"{indent}> {items[0]} {MARKDOWN_MARK}"]
    return [f"{indent}> - {item} {MARKDOWN_MARK}" for item in items]


def _annotate_markdown(text: str, report: Report, main_file: str) -> str:
    blocks = _markdown_blocks(text)
    mine = [c for c in report.claims if c.location.file == main_file]
    unplaced = _assign(blocks, mine)
    lines = _lines(text)
    insertions: list[tuple[int, str]] = []
    for b in blocks:
        if not b.claims:
            continue
        closing_line = lines[b.last_line - 1] if b.last_line <= len(lines) else ""
        indent = closing_line[: len(closing_line) - len(closing_line.lstrip(" \t"))]
        new = ["", *_md_lines([_md_claim(c) for c in b.claims], indent), f"{indent}{MARKDOWN_MARK}", ""]
        insertions.append((b.insert_at, _join_lines(text, b.insert_at, new, closing_line)))

    summary = [f"**qreferee summary**: {_summary_counts(report)}"]
    summary += [f"line {c.location.line}: {_md_claim(c)}" for c in unplaced]
    summary += [_md_code(_diagnostic_text(d)) for d in report.diagnostics]
    items = ["", f"> {summary[0]} {MARKDOWN_MARK}", *[f"> - {s} {MARKDOWN_MARK}" for s in summary[1:]], MARKDOWN_MARK]
    insertions.append((len(text), _join_lines(text, len(text), items, lines[-1] if lines else "")))
    return _apply(text, insertions)


def _join_lines(text: str, at: int, new: list[str], previous_line: str) -> str:
    """Whole new lines to insert at ``at`` (just after a line break, or at the very end)."""
    if at < len(text) or text.endswith("\n") or not text:
        eol = "\r\n" if previous_line.endswith("\r\n") else "\n"
        return "".join(line + eol for line in new)
    # The last line has no line break: give it one "\n"; the copy then ends without one too.
    return "\n" + "\n".join(new)

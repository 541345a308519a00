"""Stage 1, the scanner: tags, displays, rows, options, macros, includes, positions.

Every expectation is written out by hand from the fixture text (line and column
numbers are 1-based and counted in the source the author typed).  Diagnostics are
checked by code and position, never by wording.
"""

from __future__ import annotations

import os
import threading
import time
from collections.abc import Callable
from pathlib import Path
from typing import Any

import pytest
from verifier.diagnostics import CODES
from verifier.location import Location
from verifier.scan import is_markdown, scan_path, scan_text
from verifier.scan.display import Row
from verifier.scan.document import ClaimBlock, DefineTag, ScannedDocument
from verifier.scan.text import MappedText, SourceFile

DATA = Path(__file__).parent / "data" / "scan"

# ---------------------------------------------------------------------------
# Helpers
# ---------------------------------------------------------------------------


def claims(doc: ScannedDocument) -> list[ClaimBlock]:
    return [it for it in doc.items if isinstance(it, ClaimBlock)]


def defines(doc: ScannedDocument) -> list[DefineTag]:
    return [it for it in doc.items if isinstance(it, DefineTag)]


def only_claim(doc: ScannedDocument) -> ClaimBlock:
    found = claims(doc)
    assert len(found) == 1, found
    return found[0]


def squash(text: str) -> str:
    """Collapse white space: row texts keep blanks where commands were removed."""
    return " ".join(text.split())


def first_loc(text: MappedText) -> str:
    """Location of the first non-blank character."""
    i = len(text.text) - len(text.text.lstrip())
    assert i < len(text.text), "row is blank"
    return short(text.location(i))


def loc_of(text: MappedText, needle: str, nth: int = 0) -> str:
    """Location of the ``nth`` occurrence of ``needle`` in the (expanded) text."""
    i = -1
    for _ in range(nth + 1):
        i = text.text.index(needle, i + 1)
    return short(text.location(i))


def short(loc: Location) -> str:
    return f"{loc.line}:{loc.column}"


def problem_codes(block: ClaimBlock | DefineTag) -> list[str]:
    return [p.code for p in block.problems]


def all_codes(doc: ScannedDocument) -> list[str]:
    out = [d.code for d in doc.diagnostics]
    for it in doc.items:
        out.extend(p.code for p in it.problems)
    return out


def rows_summary(block: ClaimBlock) -> list[tuple[str, str | None, str]]:
    return [(squash(r.text.text), r.label, first_loc(r.text)) for r in block.rows]


def run_bounded(fn: Callable[[], Any], seconds: float = 10.0) -> Any:
    """Run ``fn`` in a daemon thread; fail (instead of hanging) if it does not return."""
    box: dict[str, Any] = {}

    def target() -> None:
        try:
            box["value"] = fn()
        except BaseException as exc:  # pragma: no cover - re-raised below
            box["error"] = exc

    t = threading.Thread(target=target, daemon=True)
    t.start()
    t.join(seconds)
    assert not t.is_alive(), f"did not finish within {seconds}s"
    if "error" in box:
        raise box["error"]
    return box["value"]


def write(root: Path, rel: str, text: str) -> Path:
    path = root / rel
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text, encoding="utf-8")
    return path


# ---------------------------------------------------------------------------
# MappedText and SourceFile: the position bookkeeping everything relies on
# ---------------------------------------------------------------------------


def test_source_line_col_is_one_based() -> None:
    src = SourceFile("f.tex", "ab\ncd\n\nef")
    assert src.line_col(0) == (1, 1)
    assert src.line_col(1) == (1, 2)
    assert src.line_col(2) == (1, 3)  # the newline itself ends line 1
    assert src.line_col(3) == (2, 1)
    assert src.line_col(6) == (3, 1)
    assert src.line_col(7) == (4, 1)
    assert src.line_col(9) == (4, 3)  # end of text


def test_mapped_text_keeps_offsets_through_slice_blank_and_sub() -> None:
    import re

    src = SourceFile("f.tex", "x\n  a \\, b \\quad c")
    text = MappedText.from_source(src, 2)
    assert short(text.location(0)) == "2:1"
    blanked = text.blank(re.compile(r"\\,|\\quad"))
    assert len(blanked) == len(text)
    assert blanked.text == "  a    b       c"
    assert short(blanked.location(blanked.text.index("c"))) == "2:16"
    # A replacement of another length maps every new character to the match start.
    shorter = text.sub(re.compile(r"\\quad"), "Q")
    q = shorter.text.index("Q")
    assert short(shorter.location(q)) == "2:10"
    assert short(shorter.location(shorter.text.index("c"))) == "2:16"
    assert text.slice(2, 3).text == "a"
    assert short(text.slice(2, 3).location(0)) == "2:3"
    assert text.strip().text.startswith("a")
    assert text.source_slice(2, 6) == "a \\,"


def test_location_str_is_file_line_column() -> None:
    assert str(Location("paper.tex", 12, 3)) == "paper.tex:12:3"


def test_is_markdown_by_suffix() -> None:
    assert is_markdown("note.md")
    assert is_markdown("NOTE.MARKDOWN")
    assert not is_markdown("paper.tex")
    assert not is_markdown("<text>")


# ---------------------------------------------------------------------------
# LaTeX: every display environment, rows, labels, normalisation (fixture file)
# ---------------------------------------------------------------------------

ENVIRONMENTS_EXPECTED: list[tuple[str, str, str, list[tuple[str, str | None, str]]]] = [
    # name, tag line:col, environment, rows (squashed text, label, first character)
    ("brackets", "5:1", "\\[", [("E_4^2 = E_8", None, "6:4")]),
    ("dollars", "7:1", "$$", [("E_4 E_6 = E_{10}", None, "8:4")]),
    ("equation", "9:1", "equation", [("E_4 E_{10} = E_{14}", "eq:fourteen", "11:3")]),
    ("equation-star", "13:1", "equation*", [("E_6 E_8 = E_{14}", None, "15:3")]),
    (
        "align",
        "17:1",
        "align",
        [
            ("E_4^2 = E_8", "eq:eight", "19:3"),
            ("E_4 E_6 = E_{10}", None, "20:3"),
            ("E_6 E_8 = E_{14}", None, "21:3"),
        ],
    ),
    ("align-star", "23:1", "align*", [("E_4^3 = E_{12}", None, "25:3"), ("E_6^2 = E_{12}", None, "26:3")]),
    ("gather", "28:1", "gather", [("E_8 = E_4^2", None, "30:3"), ("E_{10} = E_4 E_6", None, "31:3")]),
    ("gather-star", "33:1", "gather*", [("\\Delta = \\frac{E_4^3 - E_6^2}{1728}", None, "35:3")]),
    ("multline", "37:1", "multline", [("E_4^3 - E_6^2 = 1728 \\Delta", None, "39:3")]),
    ("multline-star", "42:1", "multline*", [("E_4 E_8 = E_{12}", "eq:twelve", "44:3")]),
]


@pytest.fixture(scope="module")
def environments_doc() -> ScannedDocument:
    text = (DATA / "environments.tex").read_text(encoding="utf-8")
    return scan_text(text, "environments.tex")


def test_environments_fixture_has_no_problems(environments_doc: ScannedDocument) -> None:
    assert all_codes(environments_doc) == []
    assert [c.options["name"] for c in claims(environments_doc)] == [e[0] for e in ENVIRONMENTS_EXPECTED]


@pytest.mark.parametrize("expected", ENVIRONMENTS_EXPECTED, ids=[e[0] for e in ENVIRONMENTS_EXPECTED])
def test_every_environment(environments_doc: ScannedDocument, expected: Any) -> None:
    name, tag, env, rows = expected
    block = next(c for c in claims(environments_doc) if c.options.get("name") == name)
    assert block.tag.file == "environments.tex"
    assert short(block.tag) == tag
    assert block.environment == env
    assert rows_summary(block) == rows


def test_row_source_text_is_the_authors_text(environments_doc: ScannedDocument) -> None:
    align = next(c for c in claims(environments_doc) if c.options.get("name") == "align")
    assert [r.source_text for r in align.rows] == [
        "E_4^2 &= E_8 \\label{eq:eight}",
        "E_4 E_6 &= E_{10} \\nonumber",
        "E_6 E_8 &= E_{14}, \\tag{$\\ast$}",
    ]
    multline = next(c for c in claims(environments_doc) if c.options.get("name") == "multline")
    assert multline.rows[0].source_text == "E_4^3 - E_6^2 \\\\ = 1728 \\Delta"


def test_multline_second_line_keeps_its_position(environments_doc: ScannedDocument) -> None:
    block = next(c for c in claims(environments_doc) if c.options.get("name") == "multline")
    row = block.rows[0].text
    assert loc_of(row, "=") == "40:3"
    assert loc_of(row, "1728") == "40:5"
    assert loc_of(row, "\\Delta") == "40:10"


def test_every_character_maps_back_to_the_same_character(environments_doc: ScannedDocument) -> None:
    """Without macros, each kept character of a row is the character at its origin."""
    source = (DATA / "environments.tex").read_text(encoding="utf-8")
    for block in claims(environments_doc):
        for row in block.rows:
            for i, ch in enumerate(row.text.text):
                if not ch.isspace():
                    assert source[row.text.origin(i)] == ch, (block.options, i)


# ---------------------------------------------------------------------------
# LaTeX: tags and normalisation details
# ---------------------------------------------------------------------------


def test_tag_position_is_the_percent_sign() -> None:
    doc = scan_text("intro\n   %@claim name=x\n\\[ a = b \\]\n", "p.tex")
    block = only_claim(doc)
    assert (block.tag.file, block.tag.line, block.tag.column) == ("p.tex", 2, 4)
    assert rows_summary(block) == [("a = b", None, "3:4")]


def test_blank_lines_between_tag_and_display_are_allowed() -> None:
    doc = scan_text("%@claim\n\n\n   \\begin{equation}\n a = b\n\\end{equation}\n")
    assert rows_summary(only_claim(doc)) == [("a = b", None, "5:2")]


@pytest.mark.parametrize(
    "text",
    [
        "text %@claim\n\\[ a = b \\]\n",  # not at the start of a line
        "%@claimed\n\\[ a = b \\]\n",  # another word
        "\\%@claim\n\\[ a = b \\]\n",  # an escaped percent sign is not a comment
        "% @claim\n\\[ a = b \\]\n",  # a space breaks the tag
    ],
)
def test_not_a_tag(text: str) -> None:
    doc = scan_text(text)
    assert doc.items == []
    # An almost-tag is not read, but it is never silently ignored either.
    expected = ["near-miss-tag"] if text.startswith("% @") else []
    assert [d.code for d in doc.diagnostics] == expected


def test_untagged_displays_are_ignored() -> None:
    doc = scan_text("\\[ x = y \\]\n%@claim\n\\[ a = b \\]\n\\begin{align} c &= d \\end{align}\n")
    assert [squash(r.text.text) for c in claims(doc) for r in c.rows] == ["a = b"]


def test_comment_inside_display_is_dropped() -> None:
    doc = scan_text("%@claim\n\\[ a = b % the 1 + 1 = 3 remark\n \\]\n")
    assert rows_summary(only_claim(doc)) == [("a = b", None, "2:4")]


@pytest.mark.parametrize(
    ("body", "expected"),
    [
        ("E_4\\,E_6 = E_{10}", "E_4 E_6 = E_{10}"),
        ("E_4\\;E_6\\!\\:E_8 = 1", "E_4 E_6 E_8 = 1"),
        ("a \\quad = \\qquad b", "a = b"),
        ("a \\hspace{1em} = b~", "a = b"),
        ("a = b \\nonumber", "a = b"),
        ("a = b \\notag", "a = b"),
        ("a = b \\tag{3.1}", "a = b"),
        ("a = b \\tag*{(A)}", "a = b"),
        ("a = b.", "a = b"),
        ("a = b ,", "a = b"),
        ("a = b;", "a = b"),
        # The delimiter keeps the position of its sizing command, so a claim that starts
        # with \left( is located at the backslash.
        ("\\left( a \\right)^2 = \\bigl[ b \\bigr]", "( a ) ^2 = [ b ]"),
        ("\\displaystyle a = b", "a = b"),
        ("a = \\frac12 b", "a = \\frac{1}{2} b"),
        ("a = \\dfrac 3 4", "a = \\dfrac{3}{4}"),
        ("a = \\tfrac{5}{6}", "a = \\tfrac{5}{6}"),
        ("a = 1 + \\mathcal{O}(q^5)", "a = 1 + O(q^5)"),
        ("a = 1 + \\mathrm O(q^5)", "a = 1 + O(q^5)"),
        ("a = b + \\cdots.", "a = b + \\cdots"),
        ("a = b \\label{eq:x}.", "a = b"),
    ],
)
def test_normalisation_removes_what_is_not_mathematics(body: str, expected: str) -> None:
    block = only_claim(scan_text(f"%@claim\n\\[ {body} \\]\n"))
    assert block.problems == []
    assert [squash(r.text.text) for r in block.rows] == [expected]


def test_label_is_extracted_and_removed() -> None:
    block = only_claim(scan_text("%@claim\n\\begin{equation}\\label{ eq:main } a = b\\end{equation}\n"))
    assert block.rows[0].label == "eq:main"
    assert "label" not in block.rows[0].text.text


def test_positions_survive_normalisation() -> None:
    doc = scan_text("%@claim\n\\[ \\left( E_4 \\right)^2 \\,=\\, \\frac12 E_8 \\]\n")
    row = only_claim(doc).rows[0].text
    # Sized delimiters map to their sizing command (\left, \right).
    assert loc_of(row, "(") == "2:4"
    assert loc_of(row, "E_4") == "2:11"
    assert loc_of(row, ")") == "2:15"
    assert loc_of(row, "=") == "2:27"
    assert loc_of(row, "E_8") == "2:39"
    # \frac12 is rewritten to \frac{1}{2}; the new text points at \frac.
    assert loc_of(row, "\\frac") == "2:31"


def test_trailing_empty_row_of_align_is_dropped() -> None:
    block = only_claim(scan_text("%@claim\n\\begin{align*} a &= b \\\\ \\end{align*}\n"))
    assert rows_summary(block) == [("a = b", None, "2:16")]


def test_intertext_is_not_a_row() -> None:
    block = only_claim(scan_text("%@claim\n\\begin{align}\na &= b \\\\\n\\intertext{and also}\nc &= d\n\\end{align}\n"))
    assert rows_summary(block) == [("a = b", None, "3:1"), ("c = d", None, "5:1")]


def test_aligned_inside_dollars_gives_rows() -> None:
    block = only_claim(scan_text("%@claim\n$$\\begin{aligned} a &= b \\\\ c &= d \\end{aligned}$$\n"))
    assert block.environment == "$$"
    assert rows_summary(block) == [("a = b", None, "2:19"), ("c = d", None, "2:29")]


def test_split_inside_equation_gives_rows() -> None:
    block = only_claim(
        scan_text("%@claim\n\\begin{equation}\\begin{split}\na &= b \\\\\nc &= d\n\\end{split}\\end{equation}\n")
    )
    assert block.environment == "equation"
    assert rows_summary(block) == [("a = b", None, "3:1"), ("c = d", None, "4:1")]


def test_empty_display_gives_a_blank_row() -> None:
    block = only_claim(scan_text("%@claim\n\\begin{equation} \\end{equation}\n"))
    assert block.problems == []
    assert all(not r.text.text.strip() for r in block.rows)


def test_items_are_in_reading_order_with_defines() -> None:
    doc = scan_text(
        "%@define F = E_4 E_6\n%@claim name=first\n\\[ F = E_{10} \\]\n%@define G = E_4^2\n"
        "%@claim name=second\n\\[ G = E_8 \\]\n"
    )
    kinds = [(type(it).__name__, short(it.tag)) for it in doc.items]
    assert kinds == [("DefineTag", "1:1"), ("ClaimBlock", "2:1"), ("DefineTag", "4:1"), ("ClaimBlock", "5:1")]


def test_define_tag_text_and_position() -> None:
    d = defines(scan_text("text\n%@define F = E_4 E_6\n"))
    assert len(d) == 1
    assert d[0].problems == []
    assert short(d[0].tag) == "2:1"
    assert d[0].text is not None
    assert squash(d[0].text.text) == "F = E_4 E_6"
    assert loc_of(d[0].text, "F") == "2:10"
    assert loc_of(d[0].text, "E_6") == "2:18"


# ---------------------------------------------------------------------------
# Orphan tags and unclosed displays
# ---------------------------------------------------------------------------


@pytest.mark.parametrize(
    "text",
    [
        "%@claim\nSome prose.\n\\[ a = b \\]\n",
        "%@claim\n",
        "%@claim\n\\begin{displaymath} a = b \\end{displaymath}\n",  # not a supported environment
        "%@claim\n%@define F = 1\n\\[ a = b \\]\n",  # another tag comes first
    ],
)
def test_orphan_tag(text: str) -> None:
    doc = scan_text(text, "p.tex")
    block = claims(doc)[0]
    assert problem_codes(block) == ["orphan-tag"]
    assert block.problems[0].location == Location("p.tex", 1, 1)
    assert block.rows == []


def test_two_tags_in_a_row_only_the_second_gets_the_display() -> None:
    doc = scan_text("%@claim name=a\n%@claim name=b\n\\[ x = y \\]\n")
    first, second = claims(doc)
    assert problem_codes(first) == ["orphan-tag"]
    assert problem_codes(second) == []
    assert rows_summary(second) == [("x = y", None, "3:4")]


@pytest.mark.parametrize(
    ("text", "where"),
    [
        ("%@claim\n\\[ a = b\n", "2:1"),
        ("%@claim\n$$ a = b\n", "2:1"),
        ("%@claim\n\n  \\begin{align} a &= b\n", "3:3"),
        ("%@claim\n\\begin{equation} a = b \\end{equation*}\n", "2:1"),
        ("%@claim\n\\begin{multline*} a = b \\end{multline}\n", "2:1"),
    ],
)
def test_unclosed_display(text: str, where: str) -> None:
    block = only_claim(scan_text(text))
    assert problem_codes(block) == ["unclosed-display"]
    assert short(block.problems[0].location) == where
    assert block.rows == []


def test_unclosed_display_does_not_swallow_later_tags() -> None:
    doc = scan_text("%@claim\n\\[ a = b\n%@claim\n\\begin{equation} c = d \\end{equation}\n")
    first, second = claims(doc)
    # The first \[ is never closed before the end of the file; the second claim is intact.
    assert "unclosed-display" in problem_codes(first)
    assert problem_codes(second) == []
    assert rows_summary(second) == [("c = d", None, "4:18")]


# ---------------------------------------------------------------------------
# Tag options
# ---------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("tag", "expected"),
    [
        ("%@claim", {}),
        ("%@claim name=square", {"name": "square"}),
        ("%@claim name=a weight=8", {"name": "a", "weight": "8"}),
        ("%@claim name=a, weight=8", {"name": "a", "weight": "8"}),
        ("%@claim group={\\Gamma_0(4)}", {"group": "\\Gamma_0(4)"}),
        ("%@claim group={\\Gamma_0(4), \\Gamma_1(4)} name=two", {"group": "\\Gamma_0(4), \\Gamma_1(4)", "name": "two"}),
        ("%@claim group=\\Gamma_0(4) weight=2", {"group": "\\Gamma_0(4)", "weight": "2"}),
        ("%@claim name={a long name}", {"name": "a long name"}),
        ("%@claim   name=x\t weight=4  ", {"name": "x", "weight": "4"}),
    ],
)
def test_options(tag: str, expected: dict[str, str]) -> None:
    block = only_claim(scan_text(tag + "\n\\[ a = b \\]\n"))
    assert block.problems == []
    assert block.options == expected


@pytest.mark.parametrize(
    ("tag", "col", "suggestion"),
    [
        ("%@claim weigth=8", 9, "weight"),
        ("%@claim name=a grop={\\Gamma_0(4)}", 16, "group"),
        ("%@claim nmae=a", 9, "name"),
    ],
)
def test_unknown_option_with_did_you_mean(tag: str, col: int, suggestion: str) -> None:
    block = only_claim(scan_text(tag + "\n\\[ a = b \\]\n", "p.tex"))
    assert problem_codes(block) == ["unknown-option"]
    p = block.problems[0]
    assert p.location == Location("p.tex", 1, col)
    assert p.severity == "error"
    assert repr(suggestion) in p.hint  # the hint names the intended option
    # The display is still read; the unknown option is simply not kept.
    assert len(block.rows) == 1
    assert set(block.options) <= {"name", "group", "weight"}


def test_unknown_option_without_near_name_lists_known_options() -> None:
    block = only_claim(scan_text("%@claim colour=red\n\\[ a = b \\]\n"))
    assert problem_codes(block) == ["unknown-option"]
    hint = block.problems[0].hint
    assert all(name in hint for name in ("name", "group", "weight"))


@pytest.mark.parametrize(
    ("tag", "col", "kept"),
    [
        ("%@claim name", 9, {}),  # no value
        ("%@claim weight=2 name", 18, {"weight": "2"}),
        ("%@claim name={abc", 14, {}),  # unclosed brace: points at the brace
        ("%@claim name=a name=b", 16, {"name": "b"}),  # given twice
        ("%@claim =3", 9, {}),  # no key
    ],
)
def test_bad_option(tag: str, col: int, kept: dict[str, str]) -> None:
    block = only_claim(scan_text(tag + "\n\\[ a = b \\]\n", "p.tex"))
    assert problem_codes(block) == ["bad-option"]
    assert block.problems[0].location == Location("p.tex", 1, col)
    assert block.options == kept
    assert len(block.rows) == 1


# ---------------------------------------------------------------------------
# Macros
# ---------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("preamble", "body", "expected"),
    [
        ("\\newcommand{\\A}{E_4}", "\\A^2 = E_8", "E_4^2 = E_8"),
        ("\\newcommand\\A{E_4}", "\\A^2 = E_8", "E_4^2 = E_8"),
        ("\\newcommand*{\\A}{E_4}", "\\A^2 = E_8", "E_4^2 = E_8"),
        ("\\newcommand{\\E}[1]{E_{#1}}", "\\E{4}^2 = \\E8", "E_{4}^2 = E_{8}"),
        ("\\newcommand{\\P}[2]{#1^{#2}}", "\\P{E_4}{2} = E_8", "E_4^{2} = E_8"),
        ("\\newcommand{\\E}[2][4]{E_{#1}^{#2}}", "\\E{2} = \\E[6]{3}", "E_{4}^{2} = E_{6}^{3}"),
        ("\\def\\A{E_4}", "\\A = 1", "E_4 = 1"),
        ("\\def\\E#1{E_{#1}}", "\\E4 = \\E{6}", "E_{4} = E_{6}"),
        ("\\DeclareMathOperator{\\Tr}{Tr}", "\\Tr = 1", "\\operatorname{Tr} = 1"),
        ("\\newcommand{\\A}{E_4}\\renewcommand{\\A}{E_6}", "\\A = 1", "E_6 = 1"),
        ("\\newcommand{\\A}{E_4}\n\\newcommand{\\B}{\\A\\A}", "\\B = E_8", "E_4E_4 = E_8"),
        ("\\providecommand{\\A}{E_4}", "\\A = 1", "E_4 = 1"),
        ("\\newcommand{\\A}{E_4}\\providecommand{\\A}{E_6}", "\\A = 1", "E_4 = 1"),
        ("\\newcommand*{\\A}{E_4}\\providecommand*{\\A}{E_6}", "\\A = 1", "E_4 = 1"),
        ("\\newcommand{\\A}{E_4}\\providecommand{\\B}{E_6}", "\\A = \\B", "E_4 = E_6"),
        ("% \\newcommand{\\A}{E_4}", "\\A = 1", "\\A = 1"),  # commented out
        ("\\newcommand{\\Aa}{E_4}", "\\A = \\Aa", "\\A = E_4"),  # whole control words only
    ],
)
def test_macro_expansion(preamble: str, body: str, expected: str) -> None:
    doc = scan_text(f"{preamble}\n%@claim\n\\[ {body} \\]\n")
    assert all_codes(doc) == []
    assert [squash(r.text.text) for r in only_claim(doc).rows] == [expected]


def test_providecommand_does_not_override_existing_macro_from_another_line() -> None:
    doc = scan_text("\\newcommand{\\A}{E_4}\n\\providecommand{\\A}{E_6}\n%@claim\n\\[ \\A = 1 \\]\n")
    assert squash(only_claim(doc).rows[0].text.text) == "E_4 = 1"


def test_macro_defined_after_the_claim_does_not_apply() -> None:
    doc = scan_text("%@claim\n\\[ \\A = 1 \\]\n\\newcommand{\\A}{E_4}\n")
    assert squash(only_claim(doc).rows[0].text.text) == "\\A = 1"


def test_redefinition_applies_only_to_later_claims() -> None:
    doc = scan_text(
        "\\newcommand{\\A}{E_4}\n%@claim\n\\[ \\A = 1 \\]\n\\renewcommand{\\A}{E_6}\n%@claim\n\\[ \\A = 1 \\]\n"
    )
    assert [squash(c.rows[0].text.text) for c in claims(doc)] == ["E_4 = 1", "E_6 = 1"]


def test_positions_after_macro_expansion() -> None:
    doc = scan_text("\\newcommand{\\E}[1]{E_{#1}}\n\\newcommand{\\A}{E_4}\n%@claim\n\\[ \\A + \\E{12} = E_6 \\]\n")
    row = only_claim(doc).rows[0]
    assert squash(row.text.text) == "E_4 + E_{12} = E_6"
    assert row.source_text == "\\A + \\E{12} = E_6"
    # Characters a macro body introduced point at the macro call...
    assert loc_of(row.text, "E_4") == "4:4"
    assert loc_of(row.text, "E_{") == "4:9"
    # ...the argument keeps its own place...
    assert loc_of(row.text, "12") == "4:12"
    # ...and what follows an expansion keeps its place too.
    assert loc_of(row.text, "+") == "4:7"
    assert loc_of(row.text, "=") == "4:16"
    assert loc_of(row.text, "E_6") == "4:18"
    assert first_loc(row.text) == "4:4"


def test_macros_expand_in_define_tags() -> None:
    d = defines(scan_text("\\newcommand\\A{E_4}\n%@define F = \\A^2 E_6\n"))[0]
    assert d.text is not None
    assert squash(d.text.text) == "F = E_4^2 E_6"
    assert loc_of(d.text, "E_4") == "2:14"
    assert loc_of(d.text, "E_6") == "2:19"


@pytest.mark.parametrize(
    "preamble",
    [
        "\\newcommand{\\R}{\\R+1}",  # directly recursive
        "\\def\\R{\\R}",
        "\\newcommand{\\R}[1]{\\R{#1}}",  # recursive with an argument
        "\\def\\R{\\S}\\def\\S{\\R}",  # mutually recursive
        "\\newcommand{\\R}{\\S}\\renewcommand{\\S}{x\\R}",
    ],
)
def test_recursive_macro_is_a_diagnostic_not_a_hang(preamble: str) -> None:
    text = f"{preamble}\n%@claim\n\\[ \\R{{y}} = 1 \\]\n"
    doc = run_bounded(lambda: scan_text(text))
    block = only_claim(doc)
    assert problem_codes(block) == ["macro-expansion"]
    assert short(block.problems[0].location) == "3:4"  # the \\R the author typed
    assert block.rows == []


def test_exploding_macro_is_a_diagnostic_not_a_hang() -> None:
    tens = ["\\def\\a{xxxxxxxxxx}"]
    for prev, name in zip("abcdef", "bcdefg", strict=True):
        tens.append(f"\\def\\{name}{{" + f"\\{prev}" * 10 + "}")
    text = "".join(tens) + "\n%@claim\n\\[ \\g = 1 \\]\n"  # 10^7 characters if expanded
    start = time.perf_counter()
    doc = run_bounded(lambda: scan_text(text))
    assert time.perf_counter() - start < 5
    block = only_claim(doc)
    assert problem_codes(block) == ["macro-expansion"]
    assert short(block.problems[0].location) == "3:4"


def test_recursive_macro_in_define_tag() -> None:
    doc = run_bounded(lambda: scan_text("\\def\\a{\\a}\n%@define F = \\a\n"))
    d = defines(doc)[0]
    assert problem_codes(d) == ["macro-expansion"]
    assert short(d.problems[0].location) == "2:14"


def test_macro_missing_argument() -> None:
    doc = scan_text("\\newcommand{\\E}[1]{E_{#1}}\n%@claim\n\\[ a = \\E \\]\n")
    block = only_claim(doc)
    assert problem_codes(block) == ["macro-expansion"]
    assert block.problems[0].location.line == 3


def test_one_bad_row_does_not_lose_the_others() -> None:
    doc = scan_text("\\def\\R{\\R}\n%@claim\n\\begin{align}\na &= b \\\\\n\\R &= c \\\\\nd &= e\n\\end{align}\n")
    block = only_claim(doc)
    assert problem_codes(block) == ["macro-expansion"]
    assert [squash(r.text.text) for r in block.rows] == ["a = b", "d = e"]


def test_recursive_macro_diagnostic_points_at_the_call() -> None:
    doc = scan_text("\\def\\R{\\R}\n%@claim\n\\[ a + b = \\R \\]\n")
    block = only_claim(doc)
    assert problem_codes(block) == ["macro-expansion"]
    assert short(block.problems[0].location) == "3:12"  # the \R the author typed


@pytest.mark.parametrize(
    "definition",
    [
        "\\newcommand{\\X}[x]{E}",  # argument count not a number
        "\\newcommand{\\X}",  # no body
        "\\newcommand{\\X}[1][{E}",  # unclosed default
        "\\def\\X#2{E}",  # parameters out of order
        "\\def\\X#1.{E}",  # delimited parameters
        "\\DeclareMathOperator{\\X}",  # no text
    ],
)
def test_unreadable_macro_definition(definition: str) -> None:
    doc = scan_text(f"x\n{definition}\n%@claim\n\\[ a = b \\]\n", "p.tex")
    assert [d.code for d in doc.diagnostics] == ["bad-macro"]
    assert doc.diagnostics[0].location == Location("p.tex", 2, 1)
    assert doc.diagnostics[0].severity == "warning"
    assert [squash(r.text.text) for r in only_claim(doc).rows] == ["a = b"]


# ---------------------------------------------------------------------------
# \input and \include (a manuscript tree in tmp_path)
# ---------------------------------------------------------------------------


@pytest.fixture
def paper(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    """A manuscript folder ``paper/`` inside tmp_path; file names are shown relative to it."""
    root = tmp_path / "paper"
    root.mkdir()
    monkeypatch.chdir(root)
    return root


def test_input_is_followed_with_exact_positions(paper: Path) -> None:
    write(
        paper,
        "main.tex",
        "\\newcommand{\\A}{E_4}\n"
        "%@claim name=one\n"
        "\\[ \\A^2 = E_8 \\]\n"
        "\\input{sections/part}\n"
        "%@claim name=three\n"
        "\\[ \\B = E_6 \\]\n",
    )
    write(
        paper,
        "sections/part.tex",
        "Some prose.\n"
        "\\newcommand{\\B}{E_6}\n"
        "  %@claim name=two\n"
        "\\begin{align}\n"
        "  \\A\\B &= E_{10} \\label{eq:ten}\n"
        "\\end{align}\n",
    )
    doc = scan_path(paper / "main.tex")
    assert all_codes(doc) == []
    assert doc.files == ["main.tex", os.path.join("sections", "part.tex")]
    one, two, three = claims(doc)
    assert [c.options["name"] for c in (one, two, three)] == ["one", "two", "three"]
    assert (one.tag.file, short(one.tag)) == ("main.tex", "2:1")
    assert rows_summary(one) == [("E_4^2 = E_8", None, "3:4")]
    part = os.path.join("sections", "part.tex")
    assert (two.tag.file, short(two.tag)) == (part, "3:3")
    assert rows_summary(two) == [("E_4E_6 = E_{10}", "eq:ten", "5:3")]
    assert two.rows[0].text.location(0).file == part
    assert loc_of(two.rows[0].text, "E_6") == "5:5"  # \B, a macro of the included file
    assert loc_of(two.rows[0].text, "E_{10}") == "5:11"
    # A macro defined in the included file is known after the \input.
    assert (three.tag.file, short(three.tag)) == ("main.tex", "5:1")
    assert rows_summary(three) == [("E_6 = E_6", None, "6:4")]


@pytest.mark.parametrize(
    "command",
    ["\\input{part}", "\\input{part.tex}", "\\include{part}", "\\input part", "\\input  {part}"],
)
def test_input_forms(paper: Path, command: str) -> None:
    write(paper, "main.tex", f"{command}\n")
    write(paper, "part.tex", "%@claim\n\\[ a = b \\]\n")
    doc = scan_path(paper / "main.tex")
    assert all_codes(doc) == []
    block = only_claim(doc)
    assert block.tag == Location("part.tex", 1, 1)


def test_commented_input_is_not_followed(paper: Path) -> None:
    write(paper, "main.tex", "% \\input{part}\n")
    write(paper, "part.tex", "%@claim\n\\[ a = b \\]\n")
    doc = scan_path(paper / "main.tex")
    assert doc.items == []
    assert doc.files == ["main.tex"]


def test_include_missing(paper: Path) -> None:
    write(paper, "main.tex", "text\n  \\input{nowhere}\n%@claim\n\\[ a = b \\]\n")
    doc = scan_path(paper / "main.tex")
    assert [d.code for d in doc.diagnostics] == ["include-missing"]
    assert doc.diagnostics[0].location == Location("main.tex", 2, 3)
    assert len(only_claim(doc).rows) == 1  # scanning goes on


def test_include_outside_parent_folder_refused(paper: Path) -> None:
    write(paper.parent, "secret.tex", "%@claim\n\\[ x = y \\]\n")
    write(paper, "main.tex", "\\input{../secret}\n\\input{../secret.tex}\n")
    doc = scan_path(paper / "main.tex")
    assert [d.code for d in doc.diagnostics] == ["include-outside", "include-outside"]
    assert [short(d.location) for d in doc.diagnostics] == ["1:1", "2:1"]
    assert doc.items == []
    assert doc.files == ["main.tex"]


def test_include_outside_through_subfolder_refused(paper: Path) -> None:
    write(paper.parent, "secret.tex", "%@claim\n\\[ x = y \\]\n")
    write(paper, "main.tex", "\\input{sections/../../secret}\n")
    (paper / "sections").mkdir()
    doc = scan_path(paper / "main.tex")
    assert [d.code for d in doc.diagnostics] == ["include-outside"]
    assert doc.items == []


def test_include_absolute_path_refused(paper: Path, tmp_path: Path) -> None:
    secret = write(tmp_path, "elsewhere/secret.tex", "%@claim\n\\[ x = y \\]\n")
    write(paper, "main.tex", f"\\input{{{secret}}}\n")
    doc = scan_path(paper / "main.tex")
    assert [d.code for d in doc.diagnostics] == ["include-outside"]
    assert doc.items == []


def _symlink(link: Path, target: Path) -> None:
    try:
        link.symlink_to(target)
    except (OSError, NotImplementedError):
        pytest.skip("symbolic links are not available here")


def test_include_symlink_leaving_folder_refused(paper: Path) -> None:
    secret = write(paper.parent, "secret.tex", "%@claim\n\\[ x = y \\]\n")
    _symlink(paper / "link.tex", secret)
    write(paper, "main.tex", "\\input{link.tex}\n")
    doc = scan_path(paper / "main.tex")
    assert [d.code for d in doc.diagnostics] == ["include-outside"]
    assert doc.items == []


def test_include_symlink_leaving_folder_refused_without_suffix(paper: Path) -> None:
    secret = write(paper.parent, "secret.tex", "%@claim\n\\[ x = y \\]\n")
    _symlink(paper / "link.tex", secret)
    write(paper, "main.tex", "\\input{link}\n")
    doc = scan_path(paper / "main.tex")
    assert [d.code for d in doc.diagnostics] == ["include-outside"]
    assert doc.items == []


def test_include_cycle(paper: Path) -> None:
    write(paper, "a.tex", "%@claim\n\\[ a = b \\]\n\\input{b}\n")
    write(paper, "b.tex", "\\input{a}\n%@claim\n\\[ c = d \\]\n")
    doc = run_bounded(lambda: scan_path(paper / "a.tex"))
    assert [d.code for d in doc.diagnostics] == ["include-cycle"]
    assert doc.diagnostics[0].location == Location("b.tex", 1, 1)
    assert [short(c.tag) for c in claims(doc)] == ["1:1", "2:1"]
    assert [c.tag.file for c in claims(doc)] == ["a.tex", "b.tex"]
    assert doc.files == ["a.tex", "b.tex"]


def test_include_self(paper: Path) -> None:
    write(paper, "main.tex", "x\n\\input{main}\n")
    doc = run_bounded(lambda: scan_path(paper / "main.tex"))
    assert [d.code for d in doc.diagnostics] == ["include-cycle"]
    assert doc.diagnostics[0].location == Location("main.tex", 2, 1)


def test_same_file_input_twice_is_not_a_cycle(paper: Path) -> None:
    write(paper, "main.tex", "\\input{part}\n\\input{part}\n")
    write(paper, "part.tex", "%@claim\n\\[ a = b \\]\n")
    doc = scan_path(paper / "main.tex")
    assert all_codes(doc) == []
    assert len(claims(doc)) == 2


def test_nested_input_is_relative_to_the_main_file(paper: Path) -> None:
    write(paper, "main.tex", "\\input{sections/intro}\n")
    write(paper, "sections/intro.tex", "\\input{sections/table}\n")
    write(paper, "sections/table.tex", "%@claim\n\\[ a = b \\]\n")
    doc = scan_path(paper / "main.tex")
    assert all_codes(doc) == []
    assert only_claim(doc).tag.file == os.path.join("sections", "table.tex")


def test_nested_input_is_not_relative_to_the_including_file(paper: Path) -> None:
    write(paper, "main.tex", "\\input{sections/intro}\n")
    write(paper, "sections/intro.tex", "text\n\\input{table}\n")
    write(paper, "sections/table.tex", "%@claim\n\\[ a = b \\]\n")
    doc = scan_path(paper / "main.tex")
    assert [d.code for d in doc.diagnostics] == ["include-missing"]
    assert doc.diagnostics[0].location == Location(os.path.join("sections", "intro.tex"), 2, 1)
    assert doc.items == []


def test_missing_main_file_is_unreadable(paper: Path) -> None:
    doc = scan_path(paper / "absent.tex")
    assert [d.code for d in doc.diagnostics] == ["unreadable"]
    doc = scan_path(paper / "absent.md")
    assert [d.code for d in doc.diagnostics] == ["unreadable"]


def test_scan_path_reads_markdown_by_suffix(paper: Path) -> None:
    write(paper, "note.md", "<!-- @claim -->\n$$ a = b $$\n")
    doc = scan_path(paper / "note.md")
    block = only_claim(doc)
    assert block.environment == "$$"
    assert short(block.tag) == "1:1"


# ---------------------------------------------------------------------------
# Markdown
# ---------------------------------------------------------------------------


@pytest.fixture(scope="module")
def note_doc() -> ScannedDocument:
    return scan_text((DATA / "note.md").read_text(encoding="utf-8"), "note.md")


def test_markdown_fixture(note_doc: ScannedDocument) -> None:
    assert all_codes(note_doc) == []
    d = defines(note_doc)
    assert len(d) == 1
    assert short(d[0].tag) == "7:1"
    assert d[0].text is not None
    assert squash(d[0].text.text) == "F = E_{4} E_{6}"
    summary = [(c.options, c.environment, short(c.tag), rows_summary(c)) for c in claims(note_doc)]
    assert summary == [
        (
            {"name": "square", "group": "\\mathrm{SL}_2(\\mathbb{Z})"},
            "$$",
            "9:1",
            [("E_{4}^2 = E_{8}", None, "10:4")],
        ),
        ({"name": "fenced", "weight": "10"}, "```math", "12:1", [("E_4 E_6 = E_{10}", None, "14:1")]),
        ({"name": "tilde"}, "~~~math", "17:1", [("F = E_{10}", None, "19:1")]),
        ({"name": "aligned"}, "$$", "22:1", [("E_4^2 = E_8", None, "25:1"), ("E_4 E_6 = E_{10}", None, "26:1")]),
    ]


def test_markdown_row_positions(note_doc: ScannedDocument) -> None:
    square = claims(note_doc)[0].rows[0]
    assert square.source_text == "\\Eis{4}^2 = \\Eis{8}"
    assert loc_of(square.text, "4") == "10:9"
    assert loc_of(square.text, "=") == "10:14"
    assert loc_of(square.text, "8") == "10:21"
    fenced = claims(note_doc)[1].rows[0]
    assert loc_of(fenced.text, "E_{10}") == "14:11"


def test_markdown_flag_overrides_file_name() -> None:
    text = "<!-- @claim -->\n$$ a = b $$\n"
    assert claims(scan_text(text, "<stdin>", markdown=True))
    assert scan_text(text, "<stdin>", markdown=False).items == []
    assert claims(scan_text(text, "x.md"))


def test_markdown_option_problem_on_second_line_of_tag() -> None:
    doc = scan_text("<!-- @claim name=a\n   wieght=2 -->\n$$ a = b $$\n", "n.md")
    block = only_claim(doc)
    assert block.options == {"name": "a"}
    assert problem_codes(block) == ["unknown-option"]
    assert block.problems[0].location == Location("n.md", 2, 4)
    assert "'weight'" in block.problems[0].hint


def test_markdown_tag_position_and_inline_display() -> None:
    doc = scan_text("text\n\n  <!-- @claim --> $$ a = b $$\n", "n.md")
    block = only_claim(doc)
    assert short(block.tag) == "3:3"
    assert rows_summary(block) == [("a = b", None, "3:22")]


def test_markdown_orphan_tag() -> None:
    doc = scan_text("<!-- @claim -->\nprose\n$$ a = b $$\n", "n.md")
    block = only_claim(doc)
    assert problem_codes(block) == ["orphan-tag"]
    assert block.problems[0].location == Location("n.md", 1, 1)


def test_markdown_other_fence_language_is_orphan() -> None:
    doc = scan_text("<!-- @claim -->\n```python\na = b\n```\n", "n.md")
    assert problem_codes(only_claim(doc)) == ["orphan-tag"]


@pytest.mark.parametrize(
    ("text", "where"),
    [
        ("<!-- @claim -->\n$$ a = b\n", "2:1"),
        ("<!-- @claim -->\n\n```math\na = b\n", "3:1"),
        ("<!-- @claim -->\n````math\na = b\n```\n", "2:1"),  # a shorter fence does not close
    ],
)
def test_markdown_unclosed(text: str, where: str) -> None:
    block = only_claim(scan_text(text, "n.md"))
    assert problem_codes(block) == ["unclosed-display"]
    assert short(block.problems[0].location) == where


def test_markdown_recursive_macro() -> None:
    doc = run_bounded(lambda: scan_text("$$\\def\\R{\\R}$$\n<!-- @claim -->\n$$ \\R = 1 $$\n", "n.md"))
    block = only_claim(doc)
    assert problem_codes(block) == ["macro-expansion"]
    assert block.problems[0].location == Location("n.md", 3, 4)


def test_markdown_bad_macro() -> None:
    doc = scan_text("$$\\newcommand{\\X}[y]{1}$$\n<!-- @claim -->\n$$ a = b $$\n", "n.md")
    assert [d.code for d in doc.diagnostics] == ["bad-macro"]
    assert short(doc.diagnostics[0].location) == "1:3"


def test_markdown_define_position() -> None:
    d = defines(scan_text("x\n<!-- @define G = E_4^2 -->\n", "n.md"))[0]
    assert short(d.tag) == "2:1"
    assert d.text is not None
    assert loc_of(d.text, "G") == "2:14"


# ---------------------------------------------------------------------------
# Regressions: CRLF line endings, ASCII dots
# ---------------------------------------------------------------------------


def test_crlf_line_endings_latex() -> None:
    doc = scan_text("%@claim\r\n\\[ a = b \\]\r\n")
    block = only_claim(doc)
    assert block.problems == []
    assert block.options == {}


def test_crlf_line_endings_markdown() -> None:
    doc = scan_text("<!-- @claim\r\n-->\r\n$$ a = b $$\r\n", "n.md")
    assert only_claim(doc).problems == []


def test_crlf_positions_and_named_option() -> None:
    doc = scan_text("%@claim name=x\r\n\\begin{align}\r\n a &= b \\\\\r\n c &= d\r\n\\end{align}\r\n")
    block = only_claim(doc)
    assert block.options == {"name": "x"}
    assert block.problems == []
    assert rows_summary(block) == [("a = b", None, "3:2"), ("c = d", None, "4:2")]


def test_trailing_ascii_dots_survive() -> None:
    block = only_claim(scan_text("%@claim\n\\[ E_4 = 1 + 240q + ... \\]\n"))
    assert squash(block.rows[0].text.text) == "E_4 = 1 + 240q + ..."


# ---------------------------------------------------------------------------
# Diagnostics carry documented codes only
# ---------------------------------------------------------------------------


def test_every_scan_code_used_here_is_documented() -> None:
    for code in (
        "unreadable",
        "include-outside",
        "include-missing",
        "include-cycle",
        "orphan-tag",
        "unclosed-display",
        "bad-option",
        "unknown-option",
        "bad-macro",
        "macro-expansion",
    ):
        assert CODES[code][0] == "scan"


def test_row_type() -> None:
    block = only_claim(scan_text("%@claim\n\\[ a = b \\]\n"))
    assert all(isinstance(r, Row) for r in block.rows)

"""Stage 2, the claim grammar: what is accepted, the AST it gives, what is rejected.

ASTs are compared through a compact S-expression (see :func:`sx`), so a test states
the structure it expects (precedence, associativity, where an argument attaches)
without depending on spans; spans and failure offsets are checked separately, as
exact character offsets into the claim text.  Failures are checked by code and
offset, never by wording.
"""

from __future__ import annotations

from typing import Any

import pytest
from verifier.diagnostics import CODES
from verifier.parse import ast
from verifier.parse.grammar import ParseFailure, grammar_path, parse_claim, parse_definition
from verifier.scan import scan_text

# ---------------------------------------------------------------------------
# Helpers
# ---------------------------------------------------------------------------


def sx(node: ast.Node) -> Any:
    """The AST without spans.

    Number -> int; Name -> its text, with ``@arg`` when an argument was written;
    BinOp -> (op, left, right); Neg -> ("neg", x); Power -> ("^", base, exponent);
    Dots -> "..."; BigO -> ("O", inner); Decimal -> ("dec", text);
    Relation -> (side, rel, side, rel, side, ...).
    """
    if isinstance(node, ast.Number):
        return node.value
    if isinstance(node, ast.Name):
        return node.text if node.arg is None else f"{node.text}@{node.arg}"
    if isinstance(node, ast.BinOp):
        return (node.op, sx(node.left), sx(node.right))
    if isinstance(node, ast.Neg):
        return ("neg", sx(node.operand))
    if isinstance(node, ast.Power):
        return ("^", sx(node.base), node.exponent)
    if isinstance(node, ast.Dots):
        return "..."
    if isinstance(node, ast.BigO):
        return ("O", sx(node.inner))
    if isinstance(node, ast.Decimal):
        return ("dec", node.text)
    if isinstance(node, ast.Relation):
        out: list[Any] = [sx(node.sides[0])]
        for rel, side in zip(node.rels, node.sides[1:], strict=True):
            out.extend([rel, sx(side)])
        return tuple(out)
    if isinstance(node, ast.Definition):
        return ("def", node.name, sx(node.body))
    if isinstance(node, ast.Call):
        return ("call", node.name, sx(node.argument))
    raise AssertionError(f"unexpected node {node!r}")


def ok(text: str) -> ast.Relation:
    result = parse_claim(text)
    assert isinstance(result, ast.Relation), result
    return result


def fail(text: str) -> ParseFailure:
    result = parse_claim(text)
    assert isinstance(result, ParseFailure), result
    return result


def spans_are_consistent(node: ast.Node, text: str) -> None:
    """Every span lies inside the text and inside its parent's span."""
    start, end = node.span
    assert 0 <= start < end <= len(text), (node, text)
    for child in ast.children(node):
        cs, ce = child.span
        assert start <= cs and ce <= end, (node, child)
        spans_are_consistent(child, text)


# ---------------------------------------------------------------------------
# Accepted claims and their structure
# ---------------------------------------------------------------------------

ACCEPTED: list[tuple[str, Any]] = [
    # names, subscripts, arguments
    ("E_4 = E_{4}", ("E_4", "=", "E_{4}")),
    ("E_{12} = E_{ 12 }", ("E_{12}", "=", "E_{ 12 }")),
    ("E_4(\\tau) = E_4", ("E_4@tau", "=", "E_4")),
    ("E_4( \\tau ) = E_4(2\\tau)", ("E_4@tau", "=", "E_4@2tau")),
    ("\\Delta(\\tau) = j(\\tau)", ("\\Delta@tau", "=", "j@tau")),
    ("f(z) = g(q)", ("f@z", "=", "g@q")),
    ("\\theta_3 = \\Delta_{12}(\\tau)", ("\\theta_3", "=", "\\Delta_{12}@tau")),
    # powers
    ("E_4^2 = E_8", (("^", "E_4", 2), "=", "E_8")),
    ("E_4(\\tau)^2 = E_8(\\tau)", (("^", "E_4@tau", 2), "=", "E_8@tau")),
    ("E_4^2(\\tau) = E_8", (("^", "E_4@tau", 2), "=", "E_8")),  # the argument belongs to the base
    ("E_4^{3} = E_{4}^{ 3 }", (("^", "E_4", 3), "=", ("^", "E_{4}", 3))),
    ("E_4 ^ 2 = q^{23}", (("^", "E_4", 2), "=", ("^", "q", 23))),
    ("x = 691^{-1}", ("x", "=", ("^", 691, -1))),
    ("x = q^{-1} + 744", ("x", "=", ("+", ("^", "q", -1), 744))),
    ("(E_4 + E_6)^2 = x", (("^", ("+", "E_4", "E_6"), 2), "=", "x")),
    ("x = {-1}^2", ("x", "=", ("^", ("neg", 1), 2))),
    ("-a^2 = x", (("neg", ("^", "a", 2)), "=", "x")),  # minus binds looser than power
    # fractions
    ("x = \\frac{441}{691}", ("x", "=", ("/", 441, 691))),
    ("x = \\dfrac{1}{2}", ("x", "=", ("/", 1, 2))),
    ("x = \\tfrac{1}{2}", ("x", "=", ("/", 1, 2))),
    ("x = \\frac{E_4^3 - E_6^2}{1728}", ("x", "=", ("/", ("-", ("^", "E_4", 3), ("^", "E_6", 2)), 1728))),
    ("x = \\frac{1}{2}E_4", ("x", "=", ("*", ("/", 1, 2), "E_4"))),
    ("x = \\frac{1}{2}{3}", ("x", "=", ("*", ("/", 1, 2), 3))),
    ("a/b = c", (("/", "a", "b"), "=", "c")),
    ("a/b/c = 1", (("/", ("/", "a", "b"), "c"), "=", 1)),
    # products
    ("a \\cdot b = a \\times b", (("*", "a", "b"), "=", ("*", "a", "b"))),
    ("a * b = c", (("*", "a", "b"), "=", "c")),
    ("2E_4 E_6 = x", (("*", ("*", 2, "E_4"), "E_6"), "=", "x")),
    ("2E_4^2 = x", (("*", 2, ("^", "E_4", 2)), "=", "x")),
    ("E_4^2E_6 = x", (("*", ("^", "E_4", 2), "E_6"), "=", "x")),
    ("E_4(\\tau)E_6(\\tau) = x", (("*", "E_4@tau", "E_6@tau"), "=", "x")),
    # NAME(expr) parses as an application; for a form, elaboration reads it as a product
    # (tests/test_prove.py checks the verdict), for sigma_k(n) as an arithmetic function.
    ("E_4 (E_6) = x", (("call", "E_4", "E_6"), "=", "x")),
    ("(a+b)(c+d) = x", (("*", ("+", "a", "b"), ("+", "c", "d")), "=", "x")),
    ("2(a) = x", (("*", 2, "a"), "=", "x")),
    ("a + b \\cdot c = x", (("+", "a", ("*", "b", "c")), "=", "x")),
    # sums, signs, associativity
    ("a - b - c = 0", (("-", ("-", "a", "b"), "c"), "=", 0)),
    ("a - b + c = 0", (("+", ("-", "a", "b"), "c"), "=", 0)),
    ("-a + b = 0", (("+", ("neg", "a"), "b"), "=", 0)),
    ("+a = b", ("a", "=", "b")),
    ("E_4 = -E_6", ("E_4", "=", ("neg", "E_6"))),
    # brackets and braces
    ("(E_4) = {E_6}", ("E_4", "=", "E_6")),
    ("[a] = ((b))", ("a", "=", "b")),
    ("{a + b} = c", (("+", "a", "b"), "=", "c")),
    # relations
    ("A \\neq B", ("A", "!=", "B")),
    ("A \\ne B", ("A", "!=", "B")),
    ("A = B = C", ("A", "=", "B", "=", "C")),
    ("A = B \\neq C", ("A", "=", "B", "!=", "C")),
    ("A \\neq B = C", ("A", "!=", "B", "=", "C")),
    # printed expansions
    (
        "E_4 = 1 + 240q + 2160q^2 + \\cdots",
        ("E_4", "=", ("+", ("+", ("+", 1, ("*", 240, "q")), ("*", 2160, ("^", "q", 2))), "...")),
    ),
    ("E_4 = 1 + 240 q + \\dots", ("E_4", "=", ("+", ("+", 1, ("*", 240, "q")), "..."))),
    ("E_4 = 1 + \\ldots", ("E_4", "=", ("+", 1, "..."))),
    ("E_4 = 1 + \\dotsb", ("E_4", "=", ("+", 1, "..."))),
    ("E_4 = 1 + ...", ("E_4", "=", ("+", 1, "..."))),
    ("E_4 = 1 + 240q + O(q^{5})", ("E_4", "=", ("+", ("+", 1, ("*", 240, "q")), ("O", ("^", "q", 5))))),
    ("E_4 = 1 + O ( q^5 )", ("E_4", "=", ("+", 1, ("O", ("^", "q", 5))))),
    ("E_4 = 1 + O(q)", ("E_4", "=", ("+", 1, ("O", "q")))),
    (
        "\\Delta = q - 24q^2 + 252q^3 + O(q^4)",
        (
            "\\Delta",
            "=",
            ("+", ("+", ("-", "q", ("*", 24, ("^", "q", 2))), ("*", 252, ("^", "q", 3))), ("O", ("^", "q", 4))),
        ),
    ),
    # decimals are syntax; elaboration rejects them as not exact
    ("x = 0.5", ("x", "=", ("dec", "0.5"))),
    # white space is insignificant
    ("  E_4^2=E_8  ", (("^", "E_4", 2), "=", "E_8")),
    ("E_4\n=\tE_8", ("E_4", "=", "E_8")),
]


@pytest.mark.parametrize(("text", "expected"), ACCEPTED, ids=[a[0] for a in ACCEPTED])
def test_accepted(text: str, expected: Any) -> None:
    rel = ok(text)
    assert sx(rel) == expected
    spans_are_consistent(rel, text)


# The LaTeX rule: an unbraced subscript or superscript is exactly one character.
TEX_TOKEN_RULE: list[tuple[str, Any]] = [
    ("E_12 = x", (("*", "E_1", 2), "=", "x")),  # E_12 is E_1 followed by 2
    ("E_{12} = x", ("E_{12}", "=", "x")),
    ("q^23 = x", (("*", ("^", "q", 2), 3), "=", "x")),  # q^23 is q^2 followed by 3
    ("q^{23} = x", (("^", "q", 23), "=", "x")),
    ("E_4^23 = x", (("*", ("^", "E_4", 2), 3), "=", "x")),
    ("\\Delta_12 = x", (("*", "\\Delta_1", 2), "=", "x")),
    ("E_kE_4 = x", (("*", "E_k", "E_4"), "=", "x")),
]


@pytest.mark.parametrize(("text", "expected"), TEX_TOKEN_RULE, ids=[t[0] for t in TEX_TOKEN_RULE])
def test_one_character_sub_and_superscripts(text: str, expected: Any) -> None:
    assert sx(ok(text)) == expected


def test_spans_are_exact() -> None:
    text = "E_4(\\tau)^2 = \\frac{1}{2} q + O(q^{5})"
    rel = ok(text)
    assert rel.span == (0, len(text))
    lhs, rhs = rel.sides
    assert isinstance(lhs, ast.Power)
    assert lhs.span == (0, 11)
    assert isinstance(lhs.base, ast.Name)
    assert lhs.base.span == (0, 9)
    assert text[slice(*lhs.base.span)] == "E_4(\\tau)"
    assert isinstance(rhs, ast.BinOp)
    assert text[slice(*rhs.span)] == "\\frac{1}{2} q + O(q^{5})"
    prod, big_o = rhs.left, rhs.right
    assert isinstance(prod, ast.BinOp)
    assert text[slice(*prod.span)] == "\\frac{1}{2} q"
    assert isinstance(prod.right, ast.Name)
    assert text[slice(*prod.right.span)] == "q"
    frac = prod.left
    assert isinstance(frac, ast.BinOp)
    assert text[slice(*frac.left.span)] == "1"
    assert text[slice(*frac.right.span)] == "2"
    assert isinstance(big_o, ast.BigO)
    assert text[slice(*big_o.span)] == "O(q^{5})"
    assert text[slice(*big_o.inner.span)] == "q^{5}"


def test_spans_of_names_numbers_dots_and_relation_sides() -> None:
    text = "A = 12 B + \\cdots"
    a, rhs = ok(text).sides
    assert text[slice(*a.span)] == "A"
    assert isinstance(rhs, ast.BinOp)
    assert text[slice(*rhs.right.span)] == "\\cdots"
    num = rhs.left
    assert isinstance(num, ast.BinOp)
    assert isinstance(num.left, ast.Number)
    assert text[slice(*num.left.span)] == "12"
    chain = "A = B \\neq C"
    sides = ok(chain).sides
    assert [chain[slice(*s.span)] for s in sides] == ["A", "B", "C"]


def test_walk_visits_every_node_parents_first() -> None:
    rel = ok("E_4^2 = -E_8 + O(q^3)")
    kinds = [type(n).__name__ for n in ast.walk(rel)]
    assert kinds == ["Relation", "Power", "Name", "BinOp", "Neg", "Name", "BigO", "Power", "Name"]


# ---------------------------------------------------------------------------
# Definitions
# ---------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("text", "name", "body"),
    [
        (" F = E_4 E_6", "F", ("*", "E_4", "E_6")),
        ("F(\\tau) = E_4(\\tau)^2", "F", ("^", "E_4@tau", 2)),
        ("F_{1} = 1", "F_{1}", 1),
        ("\\phi = E_4 - E_6", "\\phi", ("-", "E_4", "E_6")),
        ("G = \\frac{E_4^3 - E_6^2}{1728}", "G", ("/", ("-", ("^", "E_4", 3), ("^", "E_6", 2)), 1728)),
    ],
)
def test_definition(text: str, name: str, body: Any) -> None:
    d = parse_definition(text)
    assert isinstance(d, ast.Definition), d
    assert d.name == name
    assert text[slice(*d.name_span)] == name
    assert sx(d.body) == body


@pytest.mark.parametrize(
    ("text", "code", "offset"),
    [
        ("", "empty-claim", 0),
        ("F", "incomplete", 1),
        ("F = ", "incomplete", 3),
        ("= E_4", "syntax", 0),
        ("F = G = H", "syntax", 6),  # a definition is not a chain
        ("2 = 3", "syntax", 0),  # the defined thing must be a name
        ("F = (E_4", "brackets", 4),
    ],
)
def test_definition_rejected(text: str, code: str, offset: int) -> None:
    d = parse_definition(text)
    assert isinstance(d, ParseFailure), d
    assert (d.code, d.offset) == (code, offset)


# ---------------------------------------------------------------------------
# Rejected claims: code and offset
# ---------------------------------------------------------------------------

REJECTED: list[tuple[str, str, int]] = [
    # unbalanced brackets: the offset is the offending bracket
    ("(E_4 = 1", "brackets", 0),
    ("((a) = b", "brackets", 0),
    ("E_4) = 1", "brackets", 3),
    ("E_4 = {1", "brackets", 6),
    ("\\frac{1}{2 = 1", "brackets", 8),
    ("E_4 = [1)", "brackets", 8),
    ("{a = (b}", "brackets", 7),
    ("E_4 = 1 +) ", "brackets", 9),
    ("E_4(\\tau = 1", "brackets", 3),
    ("a = b]", "brackets", 5),
    # no relation: offset is the end of the text (trailing blanks ignored)
    ("E_4", "no-relation", 3),
    ("E_4 + E_6", "no-relation", 9),
    ("E_4 E_6  ", "no-relation", 7),
    # a trailing operator: offset is the end of the text
    ("E_4 = 1 +", "incomplete", 9),
    ("E_4 = 1 + ", "incomplete", 9),
    ("E_4 = 1 -", "incomplete", 9),
    ("E_4 = 1 \\cdot", "incomplete", 13),
    ("E_4 = 1 \\times", "incomplete", 14),
    ("E_4 = 1 /", "incomplete", 9),
    ("E_4 = 1 *", "incomplete", 9),
    ("E_4 = E_6^", "incomplete", 10),
    ("E_4 =", "incomplete", 5),
    ("E_4 \\neq", "incomplete", 8),
    ("E_4 = \\frac{1}", "incomplete", 14),
    # stray characters and misplaced tokens: the offset is the culprit
    ("E_4 = 1 # 2", "syntax", 8),
    ("E_4 = 1 & 2", "syntax", 8),
    ("E_4 < 1", "syntax", 4),
    ("E_4 = 1 @ 2", "syntax", 8),
    ("E_4 = \\ 1", "syntax", 6),
    ("E_4 = \\{1\\}", "syntax", 6),
    ("x = E _4", "syntax", 6),
    ("= 1", "syntax", 0),
    ("E_4 = = 1", "syntax", 6),
    ("a = b^{}", "syntax", 7),  # an empty exponent (letters are allowed: q^n in generating functions)
    ("x^-1 = 1", "syntax", 2),
    ("x = a^2^3", "syntax", 7),  # double superscript, as in LaTeX
    ("a - -b = c", "syntax", 4),
    ("x = \\frac + 1", "syntax", 10),
    ("x = \\frac12", "syntax", 9),  # the scanner rewrites \frac12; the parser itself does not
    # empty
    ("", "empty-claim", 0),
    ("  \n\t", "empty-claim", 0),
]


@pytest.mark.parametrize(("text", "code", "offset"), REJECTED, ids=[r[0] or "<empty>" for r in REJECTED])
def test_rejected(text: str, code: str, offset: int) -> None:
    f = fail(text)
    assert (f.code, f.offset) == (code, offset)
    assert f.code in CODES and CODES[f.code][0] == "parse"
    assert f.message  # there is something to show
    assert f.hint


def test_brackets_reported_before_syntax() -> None:
    # Both a stray character and an unclosed bracket: the bracket is reported.
    f = fail("E_4 = # (1")
    assert (f.code, f.offset) == ("brackets", 8)


def test_escaped_braces_do_not_count_as_brackets() -> None:
    # \{ and \} are not grouping braces; the claim fails on the backslash instead.
    f = fail("a = \\{b")
    assert f.code == "syntax"


def test_parse_never_raises_on_odd_input() -> None:
    for text in ["\\", "^", "_", "{}", "()", "O(", "\\frac{}{}", "E_{}", "E_", "1e5 = 1", "\x00", "é = 1"]:
        result = parse_claim(text)
        assert isinstance(result, ast.Relation | ParseFailure)


def test_grammar_file_is_found() -> None:
    assert grammar_path().name == "claim.lark"
    assert grammar_path().is_file()


# ---------------------------------------------------------------------------
# Scanner and grammar together: a scanned row parses, and offsets map back
# ---------------------------------------------------------------------------


def test_scanned_rows_parse_and_spans_map_to_the_source() -> None:
    doc = scan_text(
        "\\newcommand{\\E}[1]{E_{#1}}\n"
        "%@claim\n"
        "\\begin{align}\n"
        "  \\E4^2 &= \\E8 \\label{eq:a} \\\\\n"
        "  E_4 \\, E_6 &= E_{10}, \\nonumber\n"
        "\\end{align}\n",
        "p.tex",
    )
    block = doc.items[0]
    rows = block.rows  # type: ignore[union-attr]
    parsed = [ok(r.text.text) for r in rows]
    assert [sx(p) for p in parsed] == [(("^", "E_{4}", 2), "=", "E_{8}"), (("*", "E_4", "E_6"), "=", "E_{10}")]
    # The right side of the second row is E_{10}, at line 5 column 17 of the source.
    rhs = parsed[1].sides[1]
    loc = rows[1].text.location(rhs.span[0])
    assert (loc.file, loc.line, loc.column) == ("p.tex", 5, 17)
    # The macro call \E8 is where E_{8} comes from.
    loc = rows[0].text.location(parsed[0].sides[1].span[0])
    assert (loc.line, loc.column) == (4, 12)


def test_failure_offset_maps_to_the_source() -> None:
    doc = scan_text("%@claim\n\\[\n  E_4 \\cdot (E_6 + 1 = E_{10}\n\\]\n", "p.tex")
    row = doc.items[0].rows[0]  # type: ignore[union-attr]
    f = fail(row.text.text)
    assert f.code == "brackets"
    loc = row.text.location(f.offset)
    assert (loc.line, loc.column) == (3, 13)


def test_scanner_rewritten_frac_parses() -> None:
    doc = scan_text("%@claim\n\\[ x = \\frac12 + \\tfrac 3 4 \\]\n")
    row = doc.items[0].rows[0]  # type: ignore[union-attr]
    assert sx(ok(row.text.text)) == ("x", "=", ("+", ("/", 1, 2), ("/", 3, 4)))


# ---------------------------------------------------------------------------
# Regressions: \not=, digit groups, keywords in operand position
# ---------------------------------------------------------------------------


def test_not_equals_relation() -> None:
    assert sx(ok("A \\not= B")) == ("A", "!=", "B")
    assert sx(ok("A = B \\not= C")) == ("A", "=", "B", "!=", "C")


def test_not_equals_with_space_is_normalised_by_the_scanner() -> None:
    doc = scan_text("%@claim\n\\[ a \\not = b \\]\n")
    row = doc.items[0].rows[0]  # type: ignore[union-attr]
    assert sx(ok(row.text.text)) == ("a", "!=", "b")


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("j = 196 884 q", ("j", "=", ("*", 196884, "q"))),
        ("x = 1 2 3", ("x", "=", 123)),
        ("x = 12 34 56", ("x", "=", 123456)),
        ("x = 2 E_4 3", ("x", "=", ("*", ("*", 2, "E_4"), 3))),  # only digits next to digits join
        ("x = 2 \\cdot 3", ("x", "=", ("*", 2, 3))),  # an explicit product stays a product
        ("x = q^2 3", ("x", "=", ("*", ("^", "q", 2), 3))),  # an exponent does not join
    ],
)
def test_digit_groups_are_one_number(text: str, expected: Any) -> None:
    assert sx(ok(text)) == expected


def test_digit_group_span_covers_both_groups() -> None:
    text = "j = 196 884 q"
    num = ok(text).sides[1]
    assert isinstance(num, ast.BinOp)
    assert text[slice(*num.left.span)] == "196 884"


@pytest.mark.parametrize(
    ("text", "value"),
    [
        ("x = 1 000", 1000),
        ("x = 196 084", 196084),
        ("x = 1 000 000", 1000000),
        ("x = 20 000", 20000),
    ],
)
def test_digit_group_keeps_leading_zeros(text: str, value: int) -> None:
    assert sx(ok(text)) == ("x", "=", value)


def test_thin_space_digit_grouping_after_scanning() -> None:
    doc = scan_text("%@claim\n\\[ j = q^{-1} + 744 + 196\\,884q + 21\\,493\\,760 q^2 \\]\n")
    row = doc.items[0].rows[0]  # type: ignore[union-attr]
    assert sx(ok(row.text.text)) == (
        "j",
        "=",
        ("+", ("+", ("+", ("^", "q", -1), 744), ("*", 196884, "q")), ("*", 21493760, ("^", "q", 2))),
    )


@pytest.mark.parametrize(
    ("text", "offset"),
    [
        ("x = \\cdot E_6", 4),
        ("x = \\neq 1", 4),
        ("x = \\times_3", 4),
        ("x = a \\cdot \\cdot b", 12),
    ],
)
def test_operator_keyword_in_operand_position(text: str, offset: int) -> None:
    f = fail(text)
    assert (f.code, f.offset) == ("syntax", offset)


def test_control_words_that_merely_start_like_keywords_are_names() -> None:
    assert sx(ok("x = \\nu + \\notin + \\timesx + \\fracture")) == (
        "x",
        "=",
        ("+", ("+", ("+", "\\nu", "\\notin"), "\\timesx"), "\\fracture"),
    )

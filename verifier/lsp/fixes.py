"""Quick fixes as text edits: apply a suggested correction, add a tag, define a symbol.

A correction comes from the ``suggestion`` of a refuted claim ("holds with NEW in place of
OLD; ..."), which lists the changed coefficients in the order of the claim's summands
(:mod:`verifier.claims.suggest`).  The claim is parsed again, its summands are walked in the
same order, and each change becomes an edit of the coefficient the author wrote, at its
place in the source.  When the place is not certain (the coefficient comes out of a macro,
two summands could be the one meant, a sign would have to move where no operator is
written) no fix is offered: a fix is a convenience, and the edited claim is decided anew.
"""

from __future__ import annotations

import itertools
import re
from dataclasses import dataclass
from fractions import Fraction
from typing import TYPE_CHECKING

from verifier.lsp.model import Edit, Fix, Pos, Span, absolute
from verifier.parse import ast
from verifier.parse.grammar import ParseFailure, parse_claim
from verifier.scan.document import ClaimBlock
from verifier.scan.text import MappedText, SourceFile

if TYPE_CHECKING:
    from verifier.api import ClaimResult

_CHANGE = re.compile(r"(-?\d+(?:/\d+)?) in place of (-?\d+(?:/\d+)?)")
_UNKNOWN = re.compile(r"unknown symbol (\S+)")


def _pos(source: SourceFile, offset: int) -> Pos:
    line, col = source.line_col(offset)
    return Pos(line - 1, col - 1)


def _span(source: SourceFile, start: int, end: int) -> Span:
    return Span(absolute(source.display), _pos(source, start), _pos(source, end))


def _offset(source: SourceFile, line: int, column: int) -> int:
    starts = [0] + [m.end() for m in re.finditer("\n", source.text)]
    return starts[line - 1] + column - 1 if 1 <= line <= len(starts) else -1


def latex_number(value: Fraction) -> str:
    """A non-negative rational as the author would type it: ``691`` or ``\\frac{441}{691}``."""
    if value.denominator == 1:
        return str(value.numerator)
    return f"\\frac{{{value.numerator}}}{{{value.denominator}}}"


@dataclass
class _Summand:
    sign: int  # +1 or -1, from the operators around it
    coefficient: ast.Node | None  # the written number, None when none is written (1)
    value: Fraction  # sign * coefficient
    term: ast.Node
    operator: int | None  # index in the claim's text of the '+' or '-' before it, if written


def _number(node: ast.Node) -> Fraction | None:
    try:
        return ast.constant_value(node)
    except ZeroDivisionError:
        return None


def _summands(node: ast.Node, text: str, sign: int = 1, operator: int | None = None) -> list[_Summand] | None:
    """The summands of a side in the order :mod:`verifier.claims.suggest` numbers them."""
    if isinstance(node, ast.BinOp) and node.op in "+-":
        left = _summands(node.left, text, sign, operator)
        gap = text.find(node.op, node.left.span[1], node.right.span[0])
        right = _summands(node.right, text, sign if node.op == "+" else -sign, gap if gap >= 0 else None)
        return None if left is None or right is None else left + right
    if isinstance(node, ast.Neg):
        return None  # a written minus sign without an operator in front: not edited
    value = _number(node)
    if value is not None:
        return [_Summand(sign, node, sign * value, node, operator)]
    if isinstance(node, ast.BinOp) and node.op == "*":
        c = _number(node.left)
        if c is not None:
            return [_Summand(sign, node.left, sign * c, node, operator)]
    if isinstance(node, ast.BinOp) and node.op == "/" and _number(node.right) is not None:
        return None  # X/691: the coefficient is split around the term
    return [_Summand(sign, None, Fraction(sign), node, operator)]


def _changes(suggestion: str) -> list[tuple[Fraction, Fraction]]:
    """(old, new) pairs of a suggestion, in its order."""
    return [(Fraction(old), Fraction(new)) for new, old in _CHANGE.findall(suggestion)]


def _identity(text: MappedText, start: int, end: int) -> tuple[int, int] | None:
    """The source range of ``text[start:end]`` when its characters were typed there (no macro)."""
    while start < end and text.text[start].isspace():
        start += 1
    while end > start and text.text[end - 1].isspace():
        end -= 1
    if start >= end:
        return None
    origins = text.origins[start:end]
    if any(b <= a for a, b in itertools.pairwise(origins)):
        return None
    return origins[0], origins[-1] + 1


def _claim_row(block: ClaimBlock, result: ClaimResult) -> tuple[MappedText, int] | None:
    """The row of ``block`` that holds ``result``, and the source offset of the claim's start."""
    for row in block.rows:
        source = row.text.source
        if source.display != result.location.file:
            continue
        at = _offset(source, result.location.line, result.location.column)
        if at in row.text.origins:
            return row.text, at
    return None


def correction(block: ClaimBlock, result: ClaimResult) -> Fix | None:
    """The suggested correction of a refuted claim as edits, or None."""
    suggestion = result.outcome.suggestion
    if result.verdict != "refuted" or not suggestion:
        return None
    changes = _changes(suggestion)
    found = _claim_row(block, result)
    if not changes or found is None:
        return None
    text, at = found
    parsed = parse_claim(text.text)
    if isinstance(parsed, ParseFailure):
        return None  # a continued row (= ... on the next line) is not parsed alone
    pair = next(
        (i for i in range(len(parsed.rels)) if text.origin(_skip_space(text.text, parsed.sides[i].span[0])) == at),
        None,
    )
    if pair is None:
        return None
    left = _summands(parsed.sides[pair], text.text)
    right = _summands(parsed.sides[pair + 1], text.text)
    if left is None or right is None or not left:
        return None
    unknowns = left[1:] + right  # the first summand on the left is the one kept fixed
    fits = [
        chosen
        for chosen in itertools.combinations(range(len(unknowns)), len(changes))
        if all(unknowns[i].value == old for i, (old, _) in zip(chosen, changes, strict=True))
    ]
    if len(fits) != 1:
        return None
    edits: list[Edit] = []
    for i, (_, new) in zip(fits[0], changes, strict=True):
        edit = _edit(text, unknowns[i], new)
        if edit is None:
            return None
        edits.append(edit)
    return Fix(f"qreferee: apply the suggested correction ({suggestion})", edits, preferred=True)


def _skip_space(text: str, i: int) -> int:
    while i < len(text) and text[i].isspace():
        i += 1
    return i


def _edit(text: MappedText, s: _Summand, new: Fraction) -> Edit | None:
    """The edit that gives summand ``s`` the value ``new``."""
    if new == 0:
        return None
    source = text.source
    magnitude = abs(new)
    if s.coefficient is not None:
        where = _identity(text, *s.coefficient.span)
        if where is None or _number(s.coefficient) is None or (_number(s.coefficient) or 0) < 0:
            return None
        start, end = where
        replacement = latex_number(magnitude)
    else:
        term = _identity(text, *s.term.span)
        if term is None:
            return None
        start = end = term[0]
        replacement = "" if magnitude == 1 else latex_number(magnitude) + " "
    if (new > 0) == (s.sign > 0):
        return Edit(_span(source, start, end), replacement)
    # The sign changes: rewrite from the operator before the summand.
    if s.operator is None:
        return None
    op = _identity(text, s.operator, s.operator + 1)
    if op is None or op[1] > start:
        return None
    sign = "+" if new > 0 else "-"
    return Edit(_span(source, op[0], end), sign + source.text[op[1] : start] + replacement)


def define_skeleton(block: ClaimBlock, result: ClaimResult, markdown: bool) -> Fix | None:
    """Insert a define tag for the unknown symbol of ``result`` before its claim's tag."""
    if result.outcome.code != "unknown-symbol":
        return None
    m = _UNKNOWN.search(result.outcome.message)
    if m is None:
        return None
    name = m.group(1)
    tag = Span(absolute(block.tag.file), Pos(block.tag.line - 1, 0), Pos(block.tag.line - 1, 0))
    line = f"<!-- @define {name} = -->\n" if markdown else f"%@define {name} = \n"
    return Fix(
        f"qreferee: define {name} (a %@define line before the claim; complete its right side)", [Edit(tag, line)]
    )


def add_tag(block: ClaimBlock) -> tuple[Span, Fix] | None:
    """For an untagged display found by :func:`verifier.screen.untagged_blocks`: the display and a tag for it."""
    if not block.rows:
        return None
    source = block.rows[0].text.source
    opener = _offset(source, block.tag.line, block.tag.column)
    if opener < 0:
        return None
    line_start = source.text.rfind("\n", 0, opener) + 1
    last = max(o for r in block.rows for o in r.text.origins)
    display = _span(source, opener, last + 1)
    if source.text[line_start:opener].strip():
        # The display opens in the middle of a line: the tag needs a line of its own.
        edit = Edit(_span(source, opener, opener), "\n%@claim\n")
    else:
        edit = Edit(_span(source, line_start, line_start), "%@claim\n")
    return display, Fix("qreferee: tag this display as a claim (%@claim)", [edit])

"""From the inside of a display-math block to the rows that are claims.

Shared by the LaTeX and Markdown scanners: split align/gather rows, join multline
rows, pull out ``\\label``, and delete what carries no mathematics (``\\tag``,
``\\nonumber``, spacing commands, ``\\left``/``\\right`` sizes, ``&``, trailing
punctuation).  Every step keeps the source position of each character.
"""

from __future__ import annotations

import itertools
import re
from dataclasses import dataclass

from verifier.scan import macros as macro_mod
from verifier.scan.text import MappedText, matching_brace, tokens_with_depth

# Inner environments that hold one equation broken over lines (like multline).
INNER_JOIN_ENVIRONMENTS = ("multlined",)

_LABEL = re.compile(r"\\label\s*\{([^{}]*)\}")
_TAG = re.compile(r"\\tag\*?\s*\{[^{}]*\}")
_DROP = re.compile(
    r"\\(nonumber|notag|displaystyle|textstyle|thinspace|enspace|medspace|thickspace|"
    r"negthinspace)(?![A-Za-z])"
    r"|\\[,;:!> ]|~|&"
)
# \left( -> "(" at the position of the backslash, so a claim starting with \left( starts there.
_SIZED = re.compile(r"\\(left|right|middle|[bB]igg?[lrm]?)(?![A-Za-z])\s*(\\[{}]|[()\[\]|./])?")
_HSPACE = re.compile(r"\\[hv]space\*?\s*\{[^{}]*\}")
# Inner environments, also the numbered ones that MathJax users put inside $$...$$
# (docs/method.md#layout); alignat and alignedat carry their column count {n}.
_INNER_ENV = re.compile(
    r"\\(begin|end)\s*\{(aligned|gathered|split|multlined|align|gather|eqnarray|flalign|equation|subequations"
    r"|alignat|alignedat|cases|dcases)\*?\}(\[[a-z]\]|\s*\{\s*\d+\s*\})?"
)
_PAIRED_INNER = re.compile(r"\\begin\s*\{(aligned|split|align|flalign|alignat|alignedat)\*?\}")
# A case distinction that gives a value (f(n) = \begin{cases} ... or \left\{ \begin{array} ...) is
# one piecewise definition, not a list of claims.
_PIECEWISE = re.compile(r"(=|\\[{]|\\lbrace)\s*\\begin\s*\{d?cases\*?\}")
_ALIGNAT_COLUMNS = re.compile(r"^\s*\{\s*\d+\s*\}")
_MATHCAL_O = re.compile(r"\\(mathcal|mathrm|mathit)\s*(\{\s*O\s*\}|O)")
# Bold and upright names are the plain names: \mathbf{E}_4, \mathrm{E}_4, \boldsymbol\Delta.
_STYLED_NAME = re.compile(
    r"\\(?:mathbf|mathrm|mathit|mathsf|boldsymbol|bm|pmb)\s*(?:\{\s*(\\[A-Za-z]+|[A-Za-z])\s*\}|(\\[A-Za-z]+))"
)
_FRAC_DIGITS = re.compile(r"\\([dt]?frac)\s*(\d)\s*(\d)")
# An empty group, and an empty sub- or superscript (\sigma_{} from a macro with an empty
# argument), carry nothing.
_EMPTY_GROUP = re.compile(r"[_^]?\s*\{\s*\}")
# The derivative D = q d/dq = (2 pi i)^{-1} d/dtau, however it is spelled (docs/method.md#derivatives).
_DERIVATIVE = re.compile(
    r"q\s*\\[dt]?frac\s*\{\s*d\s*\}\s*\{\s*d\s*q\s*\}"
    r"|\\[dt]?frac\s*\{\s*1\s*\}\s*\{\s*2\s*\\pi\s*i\s*\}\s*\\[dt]?frac\s*\{\s*d\s*\}\s*\{\s*d\s*\\tau\s*\}"
    r"|\\[dt]?frac\s*\{\s*1\s*\}\s*\{\s*2\s*\\pi\s*i\s*\}\s*\\[dt]?frac\s*\{\s*d\s*\}\s*\{\s*d\s*z\s*\}"
)
_RELATION = re.compile(r"=|\\neq?(?![A-Za-z])")
_TRAILING = re.compile(r"(?<![.])[.,;]\s*$")
_NOT_EQUAL = re.compile(r"\\not\s*=")
_ROW_BREAK = re.compile(r"\\\\\*?(\s*\[[^\]]*\])?")
_INTERTEXT = re.compile(r"\\(intertext|shortintertext)\s*\{")


@dataclass(frozen=True)
class Row:
    """One claim row of a display, normalised for the parser."""

    text: MappedText
    label: str | None
    source_text: str  # the author's text of the row, for reports


def rows_of(content: MappedText, env: str) -> list[MappedText]:
    """Split a display's content into rows (before normalisation)."""
    content = _drop_intertext(content)
    squashed = content.text.replace(" ", "")
    paired = env.startswith(("align", "flalign", "alignat")) or _PAIRED_INNER.search(content.text) is not None
    joined = env.startswith("multline") or any(f"\\begin{{{e}}}" in squashed for e in INNER_JOIN_ENVIRONMENTS)
    if env.startswith("alignat"):
        content = content.blank(_ALIGNAT_COLUMNS)
    if _PIECEWISE.search(content.text):
        # Kept whole: the parser reports it with a hint (one claim per case).
        return [content]
    cases = "\\begin{cases}" in squashed or "\\begin{dcases}" in squashed
    content = content.blank(_INNER_ENV)
    if cases:
        # In a case list 'claim & condition' the condition follows the claim as a qualifier.
        paired = False
    if joined:
        # multline: one equation broken over lines.
        return [content.blank(_ROW_BREAK)]
    # Everywhere else a line break separates claims (in a plain display too, so that
    # 'A = B \\ C = D' never reads as the chain A = BC = D).
    rows = [r for r in _split_rows(content) if r.text.strip()]
    if paired:
        # Columns come in pairs 'lhs &= rhs': every second '&' starts another equation.
        rows = [c for r in rows for c in _split_columns(r) if c.text.strip()]
    return rows


def _drop_intertext(content: MappedText) -> MappedText:
    s = content.text
    m = _INTERTEXT.search(s)
    while m:
        close = matching_brace(s, m.end() - 1)
        if close < 0:
            break
        content = MappedText.concat(
            [
                content.slice(0, m.start()),
                _spaces(content, m.start(), close + 1),
                content.slice(close + 1),
            ],
            content.source,
        )
        s = content.text
        m = _INTERTEXT.search(s, close + 1)
    return content


def _spaces(text: MappedText, a: int, b: int) -> MappedText:
    return MappedText(" " * (b - a), text.origins[a:b], text.source)


def _split_rows(content: MappedText) -> list[MappedText]:
    """Split at ``\\\\`` outside braces and nested environments."""
    rows: list[MappedText] = []
    env_depth = 0
    start = 0
    for i, tok, depth in tokens_with_depth(content.text):
        if tok == "\\begin":
            env_depth += 1
        elif tok == "\\end":
            env_depth -= 1
        elif tok == "\\\\" and depth == 0 and env_depth <= 0 and i >= start:
            rows.append(content.slice(start, i))
            m = _ROW_BREAK.match(content.text, i)
            start = m.end() if m else i + 2
    rows.append(content.slice(start))
    return rows


def _split_columns(row: MappedText) -> list[MappedText]:
    """Split an align row at every second ``&``: columns come in pairs ``lhs &= rhs``."""
    ampersands = [i for i, tok, depth in tokens_with_depth(row.text) if tok == "&" and depth == 0]
    cuts = ampersands[1::2]
    if not cuts:
        return [row]
    bounds = [0, *cuts, len(row.text)]
    return [row.slice(a + (1 if k else 0), b) for k, (a, b) in enumerate(itertools.pairwise(bounds))]


_QUAD = re.compile(r"\\q?quad(?![A-Za-z])")
# Before or after these a \quad is only spacing; between two operands it separates two
# statements, and the grammar reads it there (docs/method.md#layout).
_OPERATOR_BEFORE = re.compile(r"(^|[=+\-(\[{&,;<>]|\\(neq?|equiv|cdot|times|iff|in|leq?|geq?|[A-Za-z]*arrow))\s*$")
_OPERATOR_AFTER = re.compile(r"^\s*($|[=+\-)\]}&.,;]|\\(neq?|equiv|cdot|times|[cl]?dots|iff|\\)(?![A-Za-z]))")


def _spacing_quads(text: MappedText) -> MappedText:
    """Blank every ``\\quad``/``\\qquad`` that stands next to an operator or an edge of the row."""
    s = text.text
    spans = []
    for m in _QUAD.finditer(s):
        before = _QUAD.sub(" ", s[max(0, m.start() - 16) : m.start()]) if m.start() else ""
        after = s[m.end() : m.end() + 16]
        if m.start() == 0 or _OPERATOR_BEFORE.search(before) or _OPERATOR_AFTER.match(after) or not before.strip():
            spans.append((m.start(), m.end()))
    if not spans:
        return text
    chars = list(s)
    for a, b in spans:
        chars[a:b] = " " * (b - a)
    return MappedText("".join(chars), text.origins, text.source)


def normalise_row(row: MappedText, macros: dict[str, macro_mod.Macro]) -> Row:
    """Expand macros, extract the label, delete non-mathematical commands.

    Raises :class:`verifier.scan.macros.MacroError` when expansion fails.
    """
    source_text = " ".join(row.source_slice().split())
    text = macro_mod.expand(row, macros)
    label_match = _LABEL.search(text.text)
    label = label_match.group(1).strip() if label_match else None
    text = text.blank(_LABEL).blank(_TAG).blank(_HSPACE).blank(_DROP).blank(_EMPTY_GROUP)
    text = text.sub(_SIZED, _sized_delimiter)
    text = text.sub(_MATHCAL_O, lambda m: "O")
    text = text.sub(_STYLED_NAME, lambda m: m.group(1) or m.group(2))
    text = text.sub(_DERIVATIVE, lambda m: "D " + " " * (len(m.group(0)) - 2))
    text = text.sub(_FRAC_DIGITS, lambda m: f"\\{m.group(1)}{{{m.group(2)}}}{{{m.group(3)}}}")
    text = text.blank(_TRAILING)
    text = _spacing_quads(text)
    text = text.sub(_NOT_EQUAL, lambda m: "\\neq")
    return Row(text, label, source_text)


def _sized_delimiter(m: re.Match[str]) -> str:
    delim = (m.group(2) or "").lstrip("\\")
    if delim in (".", ""):
        delim = " "
    return delim + " " * (len(m.group(0)) - 1)


def join_continued_rows(rows: list[Row]) -> list[Row]:
    """Merge a row that only continues the previous one (``&\\quad + 435456q^3 + \\cdots``).

    A row with no relation of its own that starts with ``+`` or ``-`` is the rest of the
    expression above it, broken over lines as authors do in align and split.
    """
    out: list[Row] = []
    for row in rows:
        body = row.text.text.lstrip()
        if out and body[:1] in "+-" and body and not _RELATION.search(body):
            prev = out[-1]
            text = MappedText.concat(
                [prev.text, MappedText(" ", [row.text.origin(0)], row.text.source), row.text], row.text.source
            )
            out[-1] = Row(text, prev.label or row.label, f"{prev.source_text} {row.source_text}")
        else:
            out.append(row)
    return out

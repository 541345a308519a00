"""The hover text of a claim: its reading, its space, its certificate or its refutation, as Markdown.

Mathematics is written between ``$...$`` (inline) and ``$$...$$`` (display), which editors
that render math in Markdown show typeset and the others show as LaTeX source.
"""

from __future__ import annotations

from fractions import Fraction
from typing import TYPE_CHECKING, Any

from verifier import method

if TYPE_CHECKING:
    from verifier.api import ClaimResult

# Rows of the coefficient table shown on each side of the first difference.
TABLE_CONTEXT = 3


def _latex_value(value: Any) -> str:
    try:
        f = Fraction(str(value))
    except (ValueError, ZeroDivisionError):
        return str(value)
    if f.denominator == 1:
        return str(f.numerator)
    sign = "-" if f < 0 else ""
    return f"{sign}\\tfrac{{{abs(f.numerator)}}}{{{f.denominator}}}"


def _space(space: dict[str, Any] | None) -> str | None:
    if not space:
        return None
    parts = []
    if "weight" in space:
        parts.append(f"weight ${space['weight']}$")
    if "group" in space:
        parts.append(f"group ${space['group']}$")
    if "character" in space:
        parts.append(f"character ${space['character']}$")
    if "dimension" in space:
        parts.append(f"dimension {space['dimension']}")
    rest = [f"{k} {v}" for k, v in space.items() if k not in ("weight", "group", "character", "dimension")]
    return ", ".join(parts + rest)


def _certificate(cert: dict[str, Any]) -> list[str]:
    lines = []
    how = cert.get("method")
    if how:
        anchor = method.for_method(str(how))
        where = f" ({method.reference(anchor)})" if anchor else ""
        lines.append(f"- method: `{how}`{where}")
    if cert.get("bound") is not None:
        lines.append(f"- bound: {cert['bound']}")
    for piece in cert.get("pieces") or []:
        if isinstance(piece, dict):
            lines.append(
                f"- piece of weight ${piece.get('weight')}$, $E_2$-power {piece.get('e2_power')}, "
                f"character {piece.get('character')}: zero through $q^{{{piece.get('bound')}}}$"
            )
    coefficients = cert.get("coefficients")
    if isinstance(coefficients, dict) and "from" in coefficients:
        lines.append(f"- coefficients compared: $q^{{{coefficients.get('from')}}}$ to $q^{{{coefficients.get('to')}}}$")
    return lines


def _table(result: ClaimResult) -> list[str]:
    o = result.outcome
    rows = [r for r in o.table if isinstance(r, list) and len(r) >= 3]
    if not rows:
        return []
    first = (o.first_difference or {}).get("n")
    at = next((i for i, r in enumerate(rows) if str(r[0]) == str(first)), 0)
    shown = rows[max(0, at - TABLE_CONTEXT) : at + TABLE_CONTEXT + 1]
    lines = ["| $n$ | left | right | |", "|---:|---:|---:|:--|"]
    for r in shown:
        mark = "first difference" if str(r[0]) == str(first) else ("" if r[1] == r[2] else "differs")
        lines.append(f"| {r[0]} | ${_latex_value(r[1])}$ | ${_latex_value(r[2])}$ | {mark} |")
    return lines


def render(result: ClaimResult) -> str:
    """The Markdown shown when the cursor rests on a claim."""
    o = result.outcome
    title = f"**qreferee: {o.verdict}**"
    if result.name:
        title += f" `{result.name}`"
    if result.label:
        title += f" ({result.label})"
    out = [title, "", o.message]
    if o.hint:
        out += ["", f"hint: {o.hint}"]
    if result.reading:
        out += ["", "read as", "", f"$$ {result.reading} $$"]
    space = _space(o.space)
    if space:
        out += ["", f"space: {space}"]
    certificate = result.certificate()
    if certificate:
        out += ["", "certificate:", "", *_certificate(certificate)]
    if o.verdict == "refuted" or o.first_difference:
        table = _table(result)
        if table:
            out += ["", "coefficients around the first difference:", "", *table]
    if o.suggestion:
        out += ["", f"suggestion: {o.suggestion}"]
    anchor = method.for_code(o.code) or method.for_kind(o.kind)
    if anchor:
        section = method.section(anchor)
        title_of = f" ({section.title})" if section is not None else ""
        out += ["", f"see {method.reference(anchor)}{title_of}"]
    if o.code:
        from verifier.diagnostics import explain

        text = explain(o.code)
        if text:
            out += ["", text]
    return "\n".join(out)

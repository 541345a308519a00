"""Trailing qualifiers that say where tau lives, which are not part of the claim.

Authors end an identity with ``\\quad\\text{for all }\\tau\\in\\mathbb H``,
``(\\tau\\in\\mathbb H)`` or ``\\text{for } \\mathrm{Im}\\,\\tau > 0``.  These state the
domain of the functions, not a membership in a space of forms, so they are taken off the
end of the claim (with the same positions for the rest) and named in the claim's reading.
"""

from __future__ import annotations

import re

from verifier.scan.text import MappedText

_UPPER_HALF_PLANE = r"\\(?:mathbb|mathfrak|mathcal|mathbf)\s*(?:\{\s*H\s*\}|H)|\\H(?![A-Za-z])|\\mathbb\s*\{\s*H\s*\}"
_VARIABLE = r"(?:\\tau|z)"
_IMAGINARY_PART = (
    r"(?:\\(?:mathrm|operatorname|text)\s*\{\s*Im\s*\}|\\Im(?![A-Za-z])|\bIm)\s*(?:\(\s*"
    + _VARIABLE
    + r"\s*\)|"
    + _VARIABLE
    + r")"
)
_DOMAIN = re.compile(
    r"[,;]?\s*(?P<body>\(?\s*(?:\\(?:text|textrm|mbox|mathrm)\s*\{\s*(?:for(?:\s+all|\s+every)?|where|with|if)?\s*\}\s*)?"
    r"(?:" + _VARIABLE + r"\s*\\in\s*(?:" + _UPPER_HALF_PLANE + r")"
    r"|" + _IMAGINARY_PART + r"\s*>\s*0)"
    r"\s*\)?)\s*[.,;]?\s*$"
)


def drop_domain(text: MappedText) -> tuple[MappedText, str | None]:
    """``text`` without a trailing domain qualifier (blanked in place), and the qualifier's text."""
    m = _DOMAIN.search(text.text)
    if m is None:
        return text, None
    body = m.group("body").strip()
    if body.startswith("(") != body.endswith(")"):
        return text, None  # a bracket that belongs to the claim
    blanked = text.text[: m.start()] + " " * (m.end() - m.start()) + text.text[m.end() :]
    return MappedText(blanked, text.origins, text.source), " ".join(body.split())

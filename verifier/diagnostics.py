"""Diagnostics: one stable code per kind of problem, grouped by pipeline stage.

A diagnostic is data (code, severity, location, message, hint); formatting belongs to
:mod:`verifier.report`.  Every code is documented here, and ``qreferee explain CODE``
prints the documentation.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from verifier.location import Location

# code -> (stage, one-line documentation)
CODES: dict[str, tuple[str, str]] = {
    # scan
    "unreadable": (
        "scan",
        "A file of the manuscript cannot be read (missing, not text, too large).",
    ),
    "include-outside": (
        "scan",
        "An \\input/\\include points outside the main file's folder; it is not followed.",
    ),
    "include-missing": ("scan", "An \\input/\\include names a file that does not exist."),
    "include-cycle": ("scan", "An \\input/\\include would read a file that is already being read."),
    "orphan-tag": ("scan", "A claim tag is not followed by a display-math block."),
    "near-miss-tag": (
        "scan",
        "A comment looks like a tag but is not one (a space, a capital letter, a plural), so nothing after it is checked.",
    ),
    "no-claims": ("scan", "The document has no tagged claim, so nothing was checked; the run does not pass."),
    "unclosed-display": ("scan", "A tagged display-math block is never closed."),
    "bad-option": ("scan", "A tag option cannot be read (no value, unclosed brace, given twice)."),
    "unknown-option": ("scan", "A tag option has a name the tool does not know."),
    "bad-macro": ("scan", "A macro definition cannot be read, so it is not expanded."),
    "macro-expansion": (
        "scan",
        "Expanding the author's macros failed (too deep, too large, missing argument).",
    ),
    # parse
    "syntax": ("parse", "The claim is not in the claim language at this point."),
    "brackets": ("parse", "A bracket or brace is unbalanced."),
    "no-relation": ("parse", "A claim needs '=' or '\\neq' between two sides."),
    "incomplete": ("parse", "The claim ends in the middle of an expression."),
    "empty-claim": ("parse", "The tagged display is empty."),
    "bad-define": ("parse", "A define tag cannot be read as NAME = expression."),
    # elaborate
    "unknown-symbol": ("elaborate", "A name is neither a known form nor defined in the document."),
    "mixed-weight": ("elaborate", "A sum adds forms of different weights."),
    "not-exact": ("elaborate", "A decimal number appears; claims are checked in exact arithmetic."),
    "bad-expansion": (
        "elaborate",
        "A printed q-expansion is malformed (O(...) of something other than q^n, dots inside a product).",
    ),
    "weight-mismatch": (
        "elaborate",
        "The weight stated in the tag differs from the weight inferred.",
    ),
    "group-mismatch": (
        "elaborate",
        "The group stated in the tag is not one the claim's forms live on.",
    ),
    "character-mismatch": ("prove", "The character stated in the tag differs from the character of the claim's forms."),
    "bad-group": ("elaborate", "The group= option cannot be read."),
    "unsupported": ("elaborate", "The claim uses a construction this version does not prove."),
    "not-modular": (
        "prove",
        "A form in the claim is modular for no Gamma_0(N); the message says which condition fails.",
    ),
    "too-large": (
        "elaborate",
        "The claim exceeds a size limit (exponent, weight, coefficient budget).",
    ),
    # prove
    "zero-division": ("prove", "A side divides by a form that is identically zero."),
    "budget": ("prove", "Proving the claim needs more coefficients than the budget allows."),
    "time-budget": ("prove", "The claim ran past its time budget (--max-seconds) and was stopped."),
    "internal": ("prove", "qreferee found an inconsistency in its own computation; the claim is not decided."),
    "no-witness": (
        "prove",
        "The sides looked different, but no exponent with two different exact values was found, so no "
        "verdict of difference is given.",
    ),
}


@dataclass(frozen=True)
class Diagnostic:
    """A problem found in the document, outside the verdict of any one claim."""

    code: str
    severity: str  # "error" | "warning" | "note"
    location: Location
    message: str
    hint: str = ""

    def __post_init__(self) -> None:
        assert self.code in CODES, self.code

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready form."""
        return {
            "file": self.location.file,
            "line": self.location.line,
            "column": self.location.column,
            "code": self.code,
            "severity": self.severity,
            "message": self.message,
            "hint": self.hint,
        }


def explain(code: str) -> str | None:
    """Documentation of ``code``, or None if there is no such code."""
    entry = CODES.get(code)
    if entry is None:
        return None
    stage, doc = entry
    return f"{code} ({stage} stage): {doc}"

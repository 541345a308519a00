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
    "archive-member": (
        "scan",
        "A member of a submitted archive was left out (a link, an absolute path, a nested archive); "
        "the rest is screened.",
    ),
    "orphan-tag": ("scan", "A claim tag is not followed by a display-math block."),
    "near-miss-tag": (
        "scan",
        "A comment looks like a tag but is not one (a space, a capital letter, a plural), "
        "so nothing after it is checked.",
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
    "unsupported-notation": (
        "elaborate",
        "The claim is written in a notation qreferee does not read yet; the message names the construct "
        "and the hint the nearest form that is read.",
    ),
    "ambiguous-notation": (
        "parse",
        "The claim can be read in two ways that give different mathematics (a bracketed fraction that may be "
        "a Kronecker symbol); qreferee does not guess.",
    ),
    "series-only": (
        "prove",
        "The sides are q-series with no modular proof here (a product that is no eta quotient, a weighted sum "
        "over Z, unequal powers of q); they agree as far as compared, which is evidence, not a proof.",
    ),
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


# code -> (an example that triggers it, how to fix it); printed by ``qreferee explain CODE``.
EXAMPLES: dict[str, tuple[str, str]] = {
    "unreadable": ("qreferee check figure.png  (or a .tex saved as Latin-1)", "give the UTF-8 .tex or .md source"),
    "include-outside": ("\\input{../common/defs}", "keep every part of the paper under the main file's folder"),
    "include-missing": ("\\input{sectoin2}  (no sectoin2.tex)", "correct the file name, or add the file"),
    "include-cycle": ("a.tex has \\input{b} and b.tex has \\input{a}", "remove the circular \\input"),
    "archive-member": (
        "a .zip holding a symbolic link or figures.zip",
        "ask the authors for an archive of plain files",
    ),
    "orphan-tag": ("%@claim followed by a paragraph of text", "put the tag on the line right before \\[ ... \\]"),
    "near-miss-tag": ("% @claim   or   %@Claim   or   <!-- @claims -->", "write exactly %@claim (or <!-- @claim -->)"),
    "no-claims": (
        "a paper with identities but no %@claim line",
        "tag the identities, or run 'qreferee screen --untagged FILE' to check untagged displays",
    ),
    "unclosed-display": ("%@claim then \\begin{align} without \\end{align}", "close the environment"),
    "bad-option": ("%@claim weight=", "give the option a value: weight=8"),
    "unknown-option": ("%@claim wieght=8", "use one of name, weight, group, character, for, solve, nome"),
    "bad-macro": ("\\newcommand{\\E}[1]{E_#1  (brace not closed)", "correct the definition"),
    "macro-expansion": ("\\def\\x{\\x\\x} used in a claim", "define the macro without recursion"),
    "syntax": ("E_4^2 == E_8", "write the claim in the claim language: E_4^2 = E_8"),
    "brackets": ("(E_4 + E_6 = E_8", "close every bracket: (E_4 + E_6) ..."),
    "no-relation": ("E_4^2", "state the identity: E_4^2 = E_8"),
    "incomplete": ("E_4^2 = E_8 +", "complete the last term"),
    "empty-claim": ("%@claim then \\[ \\]", "put the identity inside the display"),
    "bad-define": ("%@define E_4 = E_2^2", "choose a new name: %@define F = E_2^2"),
    "unknown-symbol": ("E_12 = 441/691 E_4^3 + ...", "write E_{12}; known names are listed in the README"),
    "mixed-weight": ("E_4 + E_6 = E_{10}", "make every term of a sum the same weight: E_4 E_6 = E_{10}"),
    "not-exact": ("E_4 = 1 + 240.0 q + \\cdots", "write exact numbers: 240 or \\frac{1}{2}"),
    "bad-expansion": ("1 + \\cdots + 240q", "put \\cdots or O(q^n) at the end: 1 + 240q + \\cdots"),
    "weight-mismatch": ("%@claim weight=6 on E_4^2 = E_8", "state the weight of the forms (8), or correct the claim"),
    "group-mismatch": ("%@claim group={\\Gamma_0(3)} on E_4(2\\tau) = ...", "state a level the forms live on (2)"),
    "character-mismatch": ("%@claim character=trivial on \\theta^2 = ...", "state the character found (\\chi_{-4})"),
    "bad-group": ("%@claim group=Gamma", "write SL2(Z), \\Gamma_0(N) or \\Gamma_1(N)"),
    "unsupported": ("r_3(10^{9}) = ... (no formula, too far to expand)", "restate the claim, or check it by hand"),
    "not-modular": ("\\eta(\\tau)^5 = ...", "use a form that is modular on some Gamma_0(N), or multiply it out"),
    "too-large": ("E_4^{2^{2^{2^{2^{2}}}}} = ...   or a 5000-digit number", "use smaller numbers, or split the claim"),
    "zero-division": ("E_4 / (E_4^3 - E_6^2 - 1728\\Delta) = ...", "do not divide by a form that is 0"),
    "budget": ("an identity of weight 2000 at level 1000", "raise --max-terms, or split the claim"),
    "time-budget": ("a claim that needs minutes of computation", "raise --max-seconds"),
    "no-witness": (
        "(a claim found to differ where no coefficient could be shown)",
        "nothing to fix in the manuscript; report it, the claim is left undecided",
    ),
    "unsupported-notation": (
        "\\prod_{n\\ge1}(1-q^n)^{n} = ...   (an infinite product with a non-periodic exponent)",
        "give each factor a constant exponent, (1-q^{Mn+a})^{r}, or write a q-Pochhammer symbol (q^a;q^M)_\\infty",
    ),
    "ambiguous-notation": (
        "\\sum_{d\\mid n}\\left(\\frac{n}{d}\\right)^2   (the Jacobi symbol (n/d), or the fraction n/d?)",
        "write \\chi_{D}(n) for a Kronecker symbol, or the fraction without brackets: \\frac{n}{d}",
    ),
    "series-only": (
        "(q;q^5)_\\infty (q^4;q^5)_\\infty = \\prod_{n\\ge1}(1-q^{5n-1})(1-q^{5n-4})   (no eta quotient)",
        "nothing, if evidence suffices; for a proof, state the claim between eta quotients or as a printed expansion",
    ),
    "internal": ("(a bug in qreferee)", "report it with the claim; the other claims are still checked"),
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
    text = f"{code} ({stage} stage): {doc}"
    example = EXAMPLES.get(code)
    if example is not None:
        text += f"\n  example: {example[0]}\n  fix: {example[1]}"
    return text

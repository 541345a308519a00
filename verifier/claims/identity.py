"""Identities of forms: ``A = B`` and ``A \\neq B`` between two sides of modular forms.

Read: both sides elaborated to typed expressions and rescaled so every exponent is integral
(:mod:`verifier.claims.sides`).  Decided by the prover's generic route: denominators
cleared, the difference split by weight, power of E_2 and character, each piece compared
through its Sturm or valence bound (docs/method.md#claim-identity).  A refuted equality gets
a suggested correction when a change of its coefficients makes it true.
"""

from __future__ import annotations

from typing import Any

from verifier.claims.kind import ParsedClaim, Unread, certified
from verifier.claims.sides import SidesReading, decide_sides, read_sides
from verifier.prove.outcome import Outcome
from verifier.prove.prover import Prover

KINDS = ("equality", "inequality")


def read(claim: ParsedClaim, /) -> SidesReading | Unread | None:
    """The claim when its two sides are forms and neither prints an expansion."""
    if claim.space is not None:
        return None
    found = read_sides(claim)
    return found if found.kind in KINDS else None


def decide(reading: SidesReading, prover: Prover, /) -> Outcome:
    """Proved through the Sturm bound of every piece, or refuted at the first differing coefficient."""
    return decide_sides(reading, prover)


def certify(outcome: Outcome, /) -> dict[str, Any] | None:
    """The prover's certificate: the cleared difference, its pieces and their bounds."""
    return certified(outcome)

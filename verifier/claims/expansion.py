"""Printed expansions: ``f = 1 + 240q + 2160q^2 + \\cdots`` (or ``+ O(q^N)``).

Read like an identity of forms (:mod:`verifier.claims.sides`); a side that prints its
coefficients makes the claim one of this kind.  Decided only over the range it prints
(docs/method.md#claim-expansion): every printed coefficient is compared with the exact
series; a printed polynomial with no ``\\cdots`` or ``O(...)`` can be refuted but not proved.
"""

from __future__ import annotations

from typing import Any

from verifier.claims.kind import ParsedClaim, Unread, certified
from verifier.claims.sides import SidesReading, decide_sides, read_sides
from verifier.prove.outcome import Outcome
from verifier.prove.prover import Prover

KINDS = ("prefix",)


def read(claim: ParsedClaim, /) -> SidesReading | Unread | None:
    """The claim when one of its sides prints an expansion."""
    if claim.space is not None:
        return None
    found = read_sides(claim)
    return found if found.kind in KINDS else None


def decide(reading: SidesReading, prover: Prover, /) -> Outcome:
    """The printed coefficients compared with the exact series, over the printed range only."""
    return decide_sides(reading, prover)


def certify(outcome: Outcome, /) -> dict[str, Any] | None:
    """The compared range and the coefficients."""
    return certified(outcome)

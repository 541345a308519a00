"""Unknown coefficients: ``solve=a,b`` on an identity with unknowns (docs/method.md#claim-solve).

Read: the tag's unknowns (:func:`verifier.options.parse_unknowns`) and the two sides, which are
elaborated again for each trial value of the unknowns (:func:`verifier.claims.sides.side_builder`).
Decided by the linear system of :mod:`verifier.prove.solve` (shared with the suggestions for
refuted identities): the values that make the identity true, each proved like an identity.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from verifier.claims.kind import ParsedClaim, Reading, Unread, certified
from verifier.claims.sides import side_builder
from verifier.elaborate import ir
from verifier.options import parse_unknowns
from verifier.prove.outcome import Outcome
from verifier.prove.prover import Prover
from verifier.prove.solve import Build, decide_solve

KINDS = ("solve",)


@dataclass
class SolveReading(Reading):
    """The unknowns, and the two sides built for given values of them."""

    build: Build
    unknowns: list[str]


def read(claim: ParsedClaim, /) -> SolveReading | Unread | None:
    """A tag with ``solve=``: an equality whose unknowns are to be found."""
    if claim.space is not None or "solve" not in claim.options:
        return None
    unknowns = parse_unknowns(claim.options["solve"])
    if claim.rel != "=" or not unknowns:
        return Unread("solve", "bad-option", "solve= needs unknowns and an equality", "write solve=a,b")
    left, right = claim.sides
    build_sides = side_builder(claim.elaborator, claim.text, Fraction(1))(left, right, {})

    def build(values: dict[str, Fraction]) -> tuple[ir.Side, ir.Side] | str:
        sides: tuple[ir.Side, ir.Side] | str = build_sides(values)
        if not isinstance(sides, str) and (sides[0].printed or sides[1].printed):
            return "solve= works on identities between forms, not printed expansions"
        return sides

    return SolveReading(build, unknowns, kind="solve")


def decide(reading: SolveReading, prover: Prover, /) -> Outcome:
    """The unknowns found by a linear system and the identity proved with them."""
    return decide_solve(prover, reading.build, reading.unknowns)


def certify(outcome: Outcome, /) -> dict[str, Any] | None:
    """The certificate of the identity with the values found."""
    return certified(outcome)

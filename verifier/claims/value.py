"""Values: a claim about arithmetic functions with no free variable (``\\tau(5) = 4830``).

Read with the other claims about arithmetic functions (:mod:`verifier.claims.coefficients`);
decided by computing both sides exactly (docs/method.md#claim-value).  A congruence at one
value (``\\tau(5) \\equiv 0 \\pmod 5``) is the congruence kind's, decided the same way.
"""

from __future__ import annotations

from typing import Any

from verifier.arith.values import NotEvaluable, Values
from verifier.claims.coefficients import ArithmeticClaim, SequenceReading, read_sequences, values_for, witness_dict
from verifier.claims.kind import ParsedClaim, Unread, certified
from verifier.prove import certificate
from verifier.prove.outcome import Outcome, differ_modulo, frac_str
from verifier.prove.prover import Prover

KINDS = ("value",)


def read(claim: ParsedClaim, /) -> SequenceReading | Unread | None:
    """A claim about arithmetic functions with no free variable and no modulus."""
    found = read_sequences(claim)
    return found if found is not None and found.kind in KINDS else None


def decide(reading: SequenceReading, prover: Prover, /) -> Outcome:
    """Both sides computed exactly."""
    return at_a_value(reading.claim, values_for(prover), reading.kind)


def certify(outcome: Outcome, /) -> dict[str, Any] | None:
    """A computation: both sides in the arithmetic language and their values (method ``computation``)."""
    return certified(outcome)


def at_a_value(claim: ArithmeticClaim, values: Values, kind: str) -> Outcome:
    """Both sides computed exactly (modulo the modulus, if any): proved or refuted."""
    try:
        a = values.value(claim.left, {})
        b = values.value(claim.right, {})
    except NotEvaluable as exc:
        return Outcome("error", kind, f"cannot compute: {exc}", code=exc.code)
    equal = not differ_modulo(a, b, claim.modulus)
    holds = equal if claim.rel != "!=" else not equal
    what = f"left {frac_str(a)}, right {frac_str(b)}" + (f" (mod {claim.modulus})" if claim.modulus else "")
    return Outcome(
        "proved" if holds else "refuted",
        kind,
        f"computed exactly: {what}",
        method="computation",
        first_difference=None if equal else witness_dict(None, a, b, claim.modulus),
        relation=claim.rel,
        certificate=certificate.values(claim.left, claim.right, claim.rel, None, None, a, b, kind, claim.modulus)
        if holds
        else None,
    )

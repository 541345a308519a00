"""Deciding claims about arithmetic functions: for all n, at a given n, and modulo M.

* At a given n (``\\tau(5) = 4830``): both sides are computed exactly; proved or refuted.
* For all n >= n0: both sides are first compared directly for n0 <= n <= CHECK (a
  difference refutes, with n and both values).  Then each side is translated into its
  generating function (:mod:`verifier.arith.genfun`), the constant terms are removed
  when n0 >= 1, and the identity of generating functions is proved like any identity of
  forms (split by weight and E_2-power, Sturm bound per piece).  A side without a known
  modular generating function leaves the claim ``unproven`` with the range checked.
* Congruences: refuted by a direct difference mod M; proved by Sturm's theorem for
  congruences when the pieces allow it (:mod:`verifier.prove.congruence`).

Every proof is cross-checked against the direct values; a disagreement is reported as an
internal inconsistency, never as a proof.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from verifier.arith import terms as t
from verifier.arith.genfun import Untranslatable, add, const, generating_function
from verifier.arith.values import NotEvaluable, Values
from verifier.elaborate import ir
from verifier.numbers import prime_factors
from verifier.prove import certificate, groups
from verifier.prove.evaluate import laurent_to
from verifier.prove.outcome import Witness, differ_modulo
from verifier.prove.prover import Outcome, Prover, _frac_str

CHECK = 60  # n checked directly before any proof is attempted
EXTENDED = 400  # n checked directly before a claim is left unproven


@dataclass(frozen=True)
class ArithmeticClaim:
    """``left rel right`` in the variable ``var`` (None: no free variable), for n >= start."""

    left: t.A
    right: t.A
    rel: str  # "=", "!=", "≡"
    var: str | None
    start: int
    modulus: int | None = None


def _fmt(x: Fraction) -> str:
    return _frac_str(x)


_differs = differ_modulo


def decide_arithmetic(prover: Prover, claim: ArithmeticClaim, values: Values) -> Outcome:
    """Decide an arithmetic claim (see the module docstring).

    When no proof applies, the direct comparison goes on to n = start + EXTENDED before the
    claim is called unproven, so that a counterexample a little further out still refutes it.
    """
    outcome = _decide(prover, claim, values)
    if outcome.verdict == "unproven" and claim.var is not None and claim.rel != "!=":
        further = _first_direct_difference(claim, values, claim.start + CHECK + 1, claim.start + EXTENDED)
        if isinstance(further, tuple):
            kind = "congruence" if claim.modulus is not None else "arithmetic"
            return _refuted(kind, claim, *further)
        if further is None:
            outcome.message = outcome.message.replace(
                f"{claim.start} <= n <= {claim.start + CHECK}", f"{claim.start} <= n <= {claim.start + EXTENDED}"
            )
    return outcome


def _decide(prover: Prover, claim: ArithmeticClaim, values: Values) -> Outcome:
    kind = "congruence" if claim.modulus is not None else ("arithmetic" if claim.var else "value")
    if claim.var is None:
        return _at_a_value(claim, values, kind)
    first = _first_direct_difference(claim, values, claim.start, claim.start + CHECK)
    if isinstance(first, Outcome):
        return first
    if first is not None:
        n, a, b = first
        if claim.rel == "!=":
            return Outcome(
                "proved",
                kind,
                f"the sides differ at n = {n}: left {_fmt(a)}, right {_fmt(b)}",
                method="computation",
                first_difference=_fd(n, a, b, claim.modulus),
                relation="!=",
            )
        return _refuted(kind, claim, n, a, b)
    if claim.rel == "!=":
        # No n differs so far: the claim is refuted exactly when the equality can be proved.
        equal = _decide(prover, dataclasses.replace(claim, rel="="), values)
        if equal.verdict == "proved":
            return Outcome(
                "refuted",
                kind,
                f"the sides are equal: {equal.message}",
                equal.space,
                equal.method,
                equal.bound,
                equal.terms_compared,
                components=equal.components,
                relation="!=",
            )
        return Outcome(
            "unproven",
            kind,
            f"the sides agree for {claim.start} <= n <= {claim.start + CHECK}",
            method="computation",
            terms_compared=CHECK + 1,
            relation="!=",
        )
    try:
        left = generating_function(claim.left, claim.var, values)
        right = generating_function(claim.right, claim.var, values)
    except Untranslatable as exc:
        return Outcome(
            "unproven",
            kind,
            f"the sides agree for {claim.start} <= n <= {claim.start + CHECK} (computed directly), "
            f"but no proof applies: {exc}",
            method="computation",
            terms_compared=CHECK + 1,
        )
    lowest = 0 if claim.start <= 0 else 1
    if lowest == 1:
        left, right = _without_constant(prover, left), _without_constant(prover, right)
    sides = (ir.Side(left, False), ir.Side(right, False))
    if claim.modulus is not None:
        return _congruence(prover, claim, sides, values, kind)
    outcome = prover.decide(sides[0], sides[1], "=")
    if outcome.verdict == "proved":
        check = _first_direct_difference(claim, values, lowest, max(lowest + CHECK, (outcome.bound or 0) + 2))
        if check is not None:
            return Outcome(
                "error",
                kind,
                "internal inconsistency: the generating functions agree but the direct "
                "values do not; please report this claim",
                code="internal",
            )
        covered = f"n >= {lowest}" if claim.start <= lowest else f"n >= {lowest} (so for n >= {claim.start})"
        const_note = (
            "constant terms removed, as the claim starts at n = 1" if lowest == 1 else "constant terms compared"
        )
        outcome.kind = kind
        outcome.message = f"for all {covered}: the generating functions are equal ({const_note}); {outcome.message}"
        return outcome
    if outcome.verdict == "refuted":
        fd = outcome.first_difference
        at = int(fd["n"]) if fd is not None and isinstance(fd["n"], int) else None
        if at is not None and at >= claim.start:
            direct = _first_direct_difference(claim, values, claim.start, at + 1)
            if isinstance(direct, tuple):
                return _refuted(kind, claim, *direct)
            return Outcome(
                "error",
                kind,
                "internal inconsistency: the generating functions differ at "
                f"q^{at} but the direct values agree; please report this claim",
                code="internal",
            )
        return Outcome(
            "unproven",
            kind,
            f"the identity holds for {claim.start} <= n <= {claim.start + CHECK} "
            "but fails below the stated range; no proof for the range alone is attempted",
        )
    outcome.kind = kind
    return outcome


def _without_constant(prover: Prover, g: ir.Expr) -> ir.Expr:
    c0 = laurent_to(g, 1, prover.table, prover.max_terms)[0]
    return g if c0 == 0 else add(g, const(c0), -1)


def _fd(n: int | None, a: Fraction, b: Fraction, modulus: int | None = None) -> dict[str, Any]:
    return Witness(n, a, b, modulus).to_dict()


def _refuted(kind: str, claim: ArithmeticClaim, n: int, a: Fraction, b: Fraction) -> Outcome:
    if claim.modulus is not None:
        msg = (
            f"at n = {n}: left {_fmt(a)}, right {_fmt(b)}, which differ modulo {claim.modulus} "
            f"(residues {_residue(a, claim.modulus)} and {_residue(b, claim.modulus)})"
        )
    else:
        msg = f"at n = {n}: left {_fmt(a)}, right {_fmt(b)}"
    return Outcome(
        "refuted",
        kind,
        msg,
        method="computation",
        first_difference=_fd(n, a, b, claim.modulus),
        terms_compared=n + 1,
        relation=claim.rel,
    )


def _residue(x: Fraction, m: int) -> str:
    if x.denominator % m == 0 or any(x.denominator % p == 0 for p in prime_factors(m)):
        return "not integral"
    return str(x.numerator * pow(x.denominator, -1, m) % m)


def _first_direct_difference(
    claim: ArithmeticClaim, values: Values, lo: int, hi: int
) -> tuple[int, Fraction, Fraction] | Outcome | None:
    assert claim.var is not None
    for n in range(max(lo, 0), hi + 1):
        try:
            a = values.value(claim.left, {claim.var: n})
            b = values.value(claim.right, {claim.var: n})
        except NotEvaluable as exc:
            return Outcome("error", "arithmetic", f"cannot compute the sides at n = {n}: {exc}", code=exc.code)
        if _differs(a, b, claim.modulus):
            return n, a, b
    return None


def _at_a_value(claim: ArithmeticClaim, values: Values, kind: str) -> Outcome:
    try:
        a = values.value(claim.left, {})
        b = values.value(claim.right, {})
    except NotEvaluable as exc:
        return Outcome("error", kind, f"cannot compute: {exc}", code=exc.code)
    equal = not _differs(a, b, claim.modulus)
    holds = equal if claim.rel != "!=" else not equal
    what = f"left {_fmt(a)}, right {_fmt(b)}" + (f" (mod {claim.modulus})" if claim.modulus else "")
    return Outcome(
        "proved" if holds else "refuted",
        kind,
        f"computed exactly: {what}",
        method="computation",
        first_difference=None if equal else _fd(None, a, b, claim.modulus),
        relation=claim.rel,
    )


def _congruence(
    prover: Prover, claim: ArithmeticClaim, sides: tuple[ir.Side, ir.Side], values: Values, kind: str
) -> Outcome:
    try:
        from verifier.prove.congruence import Piece, decide_congruence, needed_precision, scaled_precision
    except ImportError:
        return Outcome(
            "unproven",
            kind,
            f"the sides agree modulo {claim.modulus} for {claim.start} <= n <= "
            f"{claim.start + CHECK}; congruence proofs are not available",
            method="computation",
        )
    from verifier.prove.evaluate import graded_add, graded_fraction
    from verifier.prove.prover import claim_level

    assert claim.modulus is not None
    level = claim_level(*sides)
    left, right = sides

    def chars(atom: ir.Atom) -> int:
        from verifier.forms import registry

        return int(registry.character(atom.key, int(atom.scale), atom.params, level).kernel)

    keys_probe_l, den_l = graded_fraction(left.expr, 1, prover.table, chars)
    keys_probe_r, den_r = graded_fraction(right.expr, 1, prover.table, chars)
    if len(den_l) != 1 or len(den_r) != 1:
        return Outcome("unproven", kind, "congruences between quotients are not proved", method="computation")
    weights = [(w, j) for (w, j, _) in {**keys_probe_l, **keys_probe_r}]
    prec = max(needed_precision(weights, claim.modulus, level), 2)
    for _attempt in range(2):
        nl, _ = graded_fraction(left.expr, prec, prover.table, chars)
        nr, _ = graded_fraction(right.expr, prec, prover.table, chars)
        diff = graded_add(nl, nr, -1)
        pieces = [Piece(w, j, k, s) for (w, j, k), s in diff.items()]
        decision = decide_congruence(pieces, claim.modulus, level)
        # A proof scaled by a denominator (docs/method.md#congruence-denominators) may need more terms.
        wanted = scaled_precision(decision)
        if decision.proved or wanted is None or wanted <= prec or wanted > prover.max_terms:
            break
        prec = wanted
    if decision.proved:
        check = _first_direct_difference(claim, values, max(claim.start, 1), claim.start + CHECK)
        if check is not None:
            return Outcome(
                "error", kind, "internal inconsistency in a congruence proof; please report this claim", code="internal"
            )
        return Outcome(
            "proved",
            kind,
            f"for all n >= {max(claim.start, 1)}, modulo {claim.modulus}: {decision.reason}",
            method="sturm-congruence",
            bound=decision.bound,
            components=decision.details,
            certificate=certificate.congruence(
                left,
                right,
                claim.modulus,
                level,
                groups.index_gamma0(level),
                decision.bound,
                [(pc.weight, pc.e2_power, pc.kernel) for pc in pieces],
                decision.details,
            ),
        )
    return Outcome(
        "unproven",
        kind,
        f"the sides agree modulo {claim.modulus} for {claim.start} <= n <= "
        f"{claim.start + CHECK}, but no proof applies: {decision.reason}",
        method="computation",
        components=decision.details,
    )

"""Congruences: ``a(n) \\equiv b(n) \\pmod M`` for all n, and ``f \\equiv g \\pmod M`` between forms.

Read with the other claims about arithmetic functions (:mod:`verifier.claims.coefficients`;
a form in a congruence stands for its sequence of coefficients).  Decided
(docs/method.md#claim-congruence): refuted by a direct difference modulo M (with both
values); proved by Sturm's theorem for congruences (:mod:`verifier.prove.congruence`,
docs/method.md#congruences-sturm) applied to the generating functions, and cross-checked
against the direct values.  A congruence at one value is computed (:mod:`verifier.claims.value`).
Congruences of progressions ``a(mn+t)`` are the progression kind's.
"""

from __future__ import annotations

import dataclasses
import math
from fractions import Fraction
from typing import Any

from verifier import numbers
from verifier.arith.values import Values
from verifier.claims.coefficients import (
    CHECK,
    ArithmeticClaim,
    SequenceReading,
    decide_arithmetic,
    first_direct_difference,
    read_sequences,
    values_for,
)
from verifier.claims.kind import ParsedClaim, Unread, certified
from verifier.claims.value import at_a_value
from verifier.elaborate import ir
from verifier.elaborate.fold import fold_eta
from verifier.parse.ast import NClass
from verifier.prove import certificate, groups
from verifier.prove.outcome import Outcome
from verifier.prove.prover import Prover
from verifier.prove.restrict import Restriction, restriction

KINDS = ("congruence",)


def read(claim: ParsedClaim, /) -> SequenceReading | Unread | None:
    """A congruence (a claim with a modulus) about arithmetic functions or coefficients of forms."""
    found = read_sequences(claim)
    return found if found is not None and found.kind in KINDS else None


def decide(reading: SequenceReading, prover: Prover, /) -> Outcome:
    """Computed at a value; for all n compared directly, then proved modulo M."""
    values = values_for(prover)
    if reading.claim.var is None:
        return at_a_value(reading.claim, values, reading.kind)
    return decide_arithmetic(prover, reading.claim, values, prove_modulo)


def certify(outcome: Outcome, /) -> dict[str, Any] | None:
    """The pieces of the difference, the modulus and the bound of Sturm's theorem for congruences."""
    return certified(outcome)


def prove_modulo(
    prover: Prover, claim: ArithmeticClaim, sides: tuple[ir.Side, ir.Side], values: Values, kind: str
) -> Outcome:
    """The generating functions of the two sides congruent modulo M, by Sturm's theorem for congruences."""
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

    def attempt(left: ir.Side, right: ir.Side, modulus: int) -> tuple[Any, list[Piece], int] | Outcome:
        level = claim_level(left, right)

        def chars(atom: ir.Atom) -> int:
            from verifier.forms import registry

            return int(registry.character(atom.key, int(atom.scale), atom.params, level).kernel)

        try:
            poles = _poles(left, right, level)
            keys_probe_l, den_l = graded_fraction(left.expr, 1, prover.table, chars)
            keys_probe_r, den_r = graded_fraction(right.expr, 1, prover.table, chars)
        except TypeError as exc:  # a side shifted by a power of q is no modular form
            return Outcome("unproven", kind, f"no proof applies: {exc}", method="computation")
        # Only a constant denominator is divided out exactly: N/D = R (mod M) is not N = R (mod M)
        # for a form D that is 1 only through the first terms, such as E_4(70 tau).
        c_l, c_r = _constant_denominator(left.expr, den_l), _constant_denominator(right.expr, den_r)
        if c_l is None or c_r is None:
            return Outcome("unproven", kind, "congruences between quotients are not proved", method="computation")
        weights = [(w, j) for (w, j, _) in {**keys_probe_l, **keys_probe_r}]
        sieve: Restriction | None = None
        if claim.n_class is not None:
            found = _restriction(claim.n_class, level, den_l, den_r, weights)
            if isinstance(found, str):
                return Outcome(
                    "unproven",
                    kind,
                    f"the sides agree modulo {claim.modulus} for {claim.span(claim.start + CHECK)}, "
                    f"but no proof applies: {found}",
                    method="computation",
                )
            sieve = found
        # The level of the proof: the restricted difference lies on Gamma_0(N m^2) (docs/method.md#classes-of-n).
        proof_level = level if sieve is None else sieve.level
        prec = max(needed_precision(weights, modulus, proof_level), 2)
        if prec > prover.max_terms:
            # The proof would need more coefficients than one claim may compute (--max-terms).
            return Outcome(
                "unproven",
                kind,
                f"the sides agree modulo {claim.modulus} for {claim.span(claim.start + CHECK)}, but the proof on "
                f"Gamma_0({proof_level}) needs {prec} coefficients, more than the limit of {prover.max_terms} "
                "(--max-terms)",
                method="computation",
            )
        for _attempt in range(2):
            nl, _ = graded_fraction(left.expr, prec, prover.table, chars)
            nr, _ = graded_fraction(right.expr, prec, prover.table, chars)
            nl = {key: s.scale(1 / c_l) for key, s in nl.items()}
            nr = {key: s.scale(1 / c_r) for key, s in nr.items()}
            diff = graded_add(nl, nr, -1)
            pieces = [Piece(w, j, k, s if sieve is None else sieve.restrict(s)) for (w, j, k), s in diff.items()]
            decision = decide_congruence(pieces, modulus, proof_level)
            # A proof scaled by a denominator (docs/method.md#congruence-denominators) may need more terms.
            wanted = scaled_precision(decision)
            if decision.proved or wanted is None or wanted <= prec or wanted > prover.max_terms:
                break
            prec = wanted
        if poles and decision.proved:
            # Sturm's theorem modulo M is about forms holomorphic at every cusp; a side with a pole
            # at another cusp (docs/method.md#poles-at-cusps) proves nothing, though its Frobenius
            # lift may still be holomorphic (tried by the caller).
            why = (
                f"a side may have a pole at the cusps {poles} of Gamma_0({level}); congruences are proved only "
                "between forms holomorphic at every cusp"
            )
            details = [{**d, "proved": False, "reason": why} for d in decision.details]
            decision = dataclasses.replace(decision, proved=False, reason=why, details=details)
        return decision, pieces, proof_level

    # 1/f_1^2 is eta(tau)^(-2): quotients and products of eta quotients are folded into one atom.
    left, right = (dataclasses.replace(s, expr=fold_eta(s.expr)) for s in sides)
    sides = (left, right)
    first = attempt(left, right, claim.modulus)
    if isinstance(first, Outcome):
        return first
    decision, pieces, level = first
    # Frobenius lifts are not combined with a class of n (the lifted sides would need their own restriction).
    if not decision.proved and decision.witness is None and decision.undefined is None and claim.n_class is None:
        decision = _frobenius(decision, sides, attempt, claim.modulus)
    if decision.proved:
        low = claim.start if claim.of_forms else max(claim.start, 1)
        check = first_direct_difference(claim, values, low, claim.start + CHECK)
        if check is not None:
            return Outcome(
                "error", kind, "internal inconsistency in a congruence proof; please report this claim", code="internal"
            )
        return Outcome(
            "proved",
            kind,
            f"for all n >= {low}{_on(claim)}, modulo {claim.modulus}: {decision.reason}",
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
                None
                if claim.n_class is None
                else {"modulus": claim.n_class.modulus, "residues": sorted(claim.n_class.residues), "level": level},
            ),
        )
    return Outcome(
        "unproven",
        kind,
        f"the sides agree modulo {claim.modulus} for {claim.span(claim.start + CHECK)}, "
        f"but no proof applies: {decision.reason}",
        method="computation",
        components=decision.details,
    )


def _restriction(
    n_class: NClass, level: int, den_l: Any, den_r: Any, weights: list[tuple[Fraction, int]]
) -> Restriction | str:
    """How the difference of the sides is restricted to the class of n (docs/method.md#classes-of-n),
    or why it is not: only holomorphic modular forms without denominators are twisted."""
    from verifier.prove.evaluate import graded_is_one

    if not (graded_is_one(den_l) and graded_is_one(den_r)):
        return "a side has a denominator; only forms are restricted to a class of n"
    if any(j for _, j in weights):
        return (
            f"restricting to {n_class.text} twists the generating functions by characters, and a side has "
            "a quasimodular E_2 piece: twists of quasimodular forms are not covered (docs/method.md#classes-of-n)"
        )
    return restriction(level, n_class.modulus, n_class.residues)


def _denominator_free(expr: ir.Expr) -> bool:
    """Whether ``expr`` divides by nothing but nonzero constants (eta quotients are atoms, not quotients)."""
    if isinstance(expr, ir.Quotient):
        assert expr.left is not None
        return isinstance(expr.right, ir.Const) and expr.right.value != 0 and _denominator_free(expr.left)
    if isinstance(expr, ir.Power):
        assert expr.base is not None
        if expr.exponent < 0:
            return isinstance(expr.base, ir.Const) and expr.base.value != 0
        return _denominator_free(expr.base)
    if isinstance(expr, ir.Sum | ir.Product):
        assert expr.left is not None and expr.right is not None
        return _denominator_free(expr.left) and _denominator_free(expr.right)
    if isinstance(expr, ir.Deriv | ir.Hecke | ir.Shift):
        assert expr.base is not None
        return _denominator_free(expr.base)
    return isinstance(expr, ir.Const | ir.Atom | ir.QPower)


def _constant_denominator(expr: ir.Expr, den: Any) -> Fraction | None:
    """The denominator of a side as an exact nonzero constant, or None when the side divides by a form."""
    if not _denominator_free(expr) or len(den) != 1:
        return None
    ((key, s),) = den.items()
    if key[:2] != (Fraction(0), 0) or s.offset != 0 or s.poly.degree() != 0 or s.poly[0] == 0:
        return None
    return Fraction(int(s.poly[0].p), int(s.poly[0].q))


def _poles(left: ir.Side, right: ir.Side, level: int) -> str:
    """The cusps a/d (other than infinity) where a piece of left - right may have a pole, as text."""
    from verifier.forms import registry
    from verifier.prove import orders

    try:
        bounds = orders.difference_bounds(left.expr, right.expr, level)
    except registry.NotModular:
        return "(unknown)"
    return ", ".join(f"a/{d}" for d, v in sorted(bounds.items()) if d != level and v < 0)


def _on(claim: ArithmeticClaim) -> str:
    """The class of n of a claim, as the proof's message says it (restricted by twists)."""
    if claim.n_class is None:
        return ""
    return f" with {claim.n_class.text} (the difference restricted to the class by twists, docs/method.md#classes-of-n)"


def _frobenius(decision: Any, sides: tuple[ir.Side, ir.Side], attempt: Any, modulus: int) -> Any:
    """Retry each unproved prime power p^e with the eta quotients of both sides lifted by Frobenius
    (docs/method.md#congruence-frobenius): the lifted sides are congruent to the author's modulo p^e
    coefficientwise, so a proof for them modulo p^e is one for the claim.  Returns ``decision``, with
    the prime powers proved this way replaced, and proved when every prime power is."""
    from verifier.forms.registry import NotModular
    from verifier.numbers import prime_factors
    from verifier.prove.frobenius import describe, lift_side

    # A decision that stopped before looking at any prime power (say, at a piece of half-integral
    # weight) has no details: every prime power of the modulus is then still to be proved.
    details = list(decision.details) or [
        {
            "prime": p,
            "exponent": numbers.valuation(modulus, p),
            "modulus": p ** numbers.valuation(modulus, p),
            "proved": False,
        }
        | {"reason": decision.reason}
        for p in prime_factors(modulus)
    ]
    changed = False
    for i, detail in enumerate(details):
        if detail.get("proved"):
            continue
        p, e = int(detail["prime"]), int(detail["exponent"])
        # Lifted as power series first (a lift need not be a holomorphic form to equal the other side's).
        series = [lift_side(s.expr, p, e, holomorphic=False) for s in sides]
        if series[0] is not None and series[0] == series[1]:
            text = describe(series[0])
            # Both sides are congruent modulo p^e to one and the same form (ir equality ignores the
            # spelling): nothing is left to compare, whatever the weight (f_1^3 = f_3 (mod 3)).
            details[i] = {
                "prime": p,
                "exponent": e,
                "modulus": p**e,
                "proved": True,
                "vanishing_pieces": [],
                "bound": 0,
                "coefficients_compared": 0,
                "frobenius": {"left": text, "right": text, "level": None, "same": True},
                "reason": f"both sides lifted by Frobenius to the same series {text} "
                "(docs/method.md#congruence-frobenius)",
            }
            changed = True
            continue
        maybe = [lift_side(s.expr, p, e) for s in sides]
        lifted = [x for x in maybe if x is not None]
        if len(lifted) != 2 or all(x == s.expr for x, s in zip(lifted, sides, strict=True)):
            continue
        new_sides = [dataclasses.replace(s, expr=x) for x, s in zip(lifted, sides, strict=True)]
        try:
            result = attempt(new_sides[0], new_sides[1], p**e)
        except NotModular:  # a lifted side on no known space proves nothing
            continue
        if isinstance(result, Outcome):
            continue
        sub, _pieces, level = result
        if not sub.proved:
            continue
        (sub_detail,) = sub.details
        texts = [describe(x) for x in lifted]
        details[i] = {
            **sub_detail,
            "frobenius": {"left": texts[0], "right": texts[1], "level": level},
            "reason": f"eta quotients lifted by Frobenius (left {texts[0]}, right {texts[1]}, "
            f"docs/method.md#congruence-frobenius); {sub_detail.get('reason', '')}",
        }
        changed = True
    if not changed:
        return decision
    failing = [d for d in details if not d.get("proved")]
    if failing:
        reason = "; ".join(f"mod {d['modulus']}: {d.get('reason', 'not proved')}" for d in failing)
        return dataclasses.replace(decision, reason=reason, details=details)
    from verifier.prove.congruence import crt_head

    head = crt_head(math.prod(int(d["modulus"]) for d in details), [int(d["modulus"]) for d in details])
    bounds = [int(d["bound"]) for d in details if d.get("bound") is not None]
    return dataclasses.replace(
        decision,
        proved=True,
        reason=head + "; ".join(f"mod {d['modulus']}: {d['reason']}" for d in details),
        details=details,
        bound=max(bounds) if bounds else decision.bound,
    )

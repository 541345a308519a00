"""Coefficient identities for all n (docs/method.md#claim-arithmetic), and the reading of
every claim about arithmetic functions (``\\sigma_3(n)``, ``a_n(f)``, ``\\tau(5)``).

The reading is shared with the value kind (:mod:`verifier.claims.value`, no free variable)
and the congruence kind (:mod:`verifier.claims.congruence`, a modulus); this module decides
the claims for all n, and is the comparison the congruence kind builds on.

* For all n >= n0: both sides are first compared directly for n0 <= n <= CHECK (a
  difference refutes, with n and both values).  Then each side is translated into its
  generating function (:mod:`verifier.arith.genfun`), the constant terms are removed
  when n0 >= 1, and the identity of generating functions is proved like any identity of
  forms (split by weight and E_2-power, Sturm bound per piece).  A side without a known
  modular generating function leaves the claim ``unproven`` with the range checked.
* Congruences: refuted by a direct difference mod M; the proof step is the congruence
  kind's (``prove_modulo``).

Every proof is cross-checked against the direct values; a disagreement is reported as an
internal inconsistency, never as a proof.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Callable
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from verifier.arith import terms as t
from verifier.arith.elaborate import ArithmeticError_, to_arith, uses_arithmetic
from verifier.arith.genfun import Untranslatable, add, const, fractional_shift, generating_function
from verifier.arith.values import NotEvaluable, Values
from verifier.claims.kind import ParsedClaim, Reading, Unread, certified
from verifier.elaborate import ir
from verifier.elaborate.elaborator import Problem
from verifier.elaborate.rescale import rescale_expr, rescale_factor, rescale_side
from verifier.elaborate.shift import classify, has_shift, strip_side
from verifier.numbers import prime_factors
from verifier.parse.ast import NClass
from verifier.prove import certificate
from verifier.prove.evaluate import laurent_to
from verifier.prove.outcome import Witness, differ_modulo
from verifier.prove.prover import Outcome, Prover, _frac_str
from verifier.series.qseries import QSeries

KINDS = ("arithmetic",)
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
    n_class: NClass | None = None  # stated only on this class of n (docs/method.md#classes-of-n)
    of_forms: bool = False  # written between forms, with no n: a claim about power series, from q^0

    def covers(self, n: int) -> bool:
        """Whether the claim speaks about n (its range, and its class of n when it has one)."""
        return n >= self.start and (self.n_class is None or n in self.n_class)

    def span(self, hi: int) -> str:
        """The range ``start <= n <= hi`` as the messages say it, with the class of n."""
        head = f"{self.start} <= n <= {hi}"
        return head if self.n_class is None else f"{head} with {self.n_class.text}"


@dataclass
class SequenceReading(Reading):
    """A claim about arithmetic functions: its kind is ``value``, ``arithmetic`` or ``congruence``."""

    claim: ArithmeticClaim


def read(claim: ParsedClaim, /) -> SequenceReading | Unread | None:
    """A claim about arithmetic functions with a free variable (and no modulus)."""
    found = read_sequences(claim)
    return found if found is not None and found.kind in KINDS else None


def decide(reading: SequenceReading, prover: Prover, /) -> Outcome:
    """Compared directly, then proved by the generating functions (see the module docstring)."""
    return decide_arithmetic(prover, reading.claim, values_for(prover))


def certify(outcome: Outcome, /) -> dict[str, Any] | None:
    """The certificate of the identity of generating functions."""
    return certified(outcome)


def read_sequences(claim: ParsedClaim) -> SequenceReading | Unread | None:
    """Any claim about arithmetic functions (or a congruence), read once; None when it is none."""
    if "sequences" not in claim.memo:
        claim.memo["sequences"] = _read_sequences(claim)
    found: SequenceReading | Unread | None = claim.memo["sequences"]
    return found


def _read_sequences(claim: ParsedClaim) -> SequenceReading | Unread | None:
    if claim.space is not None:
        return None
    left_node, right_node = claim.sides
    rel, text, elaborator = claim.rel, claim.text, claim.elaborator
    forms, matrices = elaborator.definitions, elaborator.matrices
    # On a class of n (docs/method.md#classes-of-n) a form, like a form in a congruence, stands for its
    # sequence of coefficients: an identity of forms is not what the class restricts.
    arithmetic = any(uses_arithmetic(n, forms, matrices) for n in (left_node, right_node))
    by_coefficients = rel == "≡" or (claim.n_class is not None and not arithmetic)
    if not (by_coefficients or arithmetic):
        return None
    kind = "congruence" if claim.modulus is not None else "arithmetic"
    sides: list[Any] = []
    for node in (left_node, right_node):
        if not uses_arithmetic(node, forms, matrices) and by_coefficients:
            # A form in a congruence stands for its sequence of coefficients: a sum of forms of
            # different weights is a power series like any other, compared weight by weight.
            elaborator.allow_mixed = True
            try:
                side = elaborator.side(node, text.text)
            finally:
                elaborator.allow_mixed = False
            if isinstance(side, Problem):
                return Unread(kind, side.code, side.message, side.hint, at=side.span[0])
            if side.printed:
                return Unread(
                    kind,
                    "unsupported",
                    "congruences with printed expansions are not supported (a side with a power of q that "
                    "multiplies no form, such as q^2 or \\frac{3q^2}{f_1^4}, is read as a printed expansion)",
                    "write the power of q as a factor in front of a form, as in q^2 \\frac{1}{f_1^4} or q^2 E_4",
                )
            sides.append(coefficients_of(side.expr))
            continue
        try:
            sides.append(to_arith(node, text.text, forms, matrices, lambda f: f))
        except ArithmeticError_ as exc:
            return Unread(kind, "unsupported", str(exc), exc.hint, at=exc.span[0])
    free = set().union(*(t.free_variables(s) for s in sides))
    if len(free) > 1:
        return Unread(
            kind,
            "syntax",
            f"the claim has several free variables ({', '.join(sorted(free))})",
            "a claim for all n has one free variable",
        )
    var = next(iter(free)) if free else None
    if var is None and any(isinstance(s, t.Fun) and s.name == "coef" and isinstance(s.arg, t.Var) for s in sides):
        var = "n"
    # A congruence written between forms (E_4 \equiv 1 \pmod{240}) is one between power series: their
    # constant terms are part of it.  One written with n (a_F(n), r_4(n), sigma_3(n)) is about a
    # sequence of n and starts at n = 1, like every claim for all n (docs/method.md#claim-congruence).
    start = claim.start_n if claim.start_n is not None else (0 if rel == "≡" and (not free or not arithmetic) else 1)
    n_class = claim.n_class
    if n_class is not None:
        if var is None or n_class.var != var:
            return Unread(
                kind,
                "syntax",
                f"the class '{n_class.text}' is about {n_class.var}, but the claim's variable is {var or 'missing'}",
                "state the class on the claim's own variable",
            )
        if not n_class.residues:
            return Unread(
                kind,
                "unsupported",
                f"no n satisfies '{n_class.text}': a claim on an empty class says nothing",
                "check the class of n",
            )
        start = max(start, 1)  # a class of n is read on n >= 1 (docs/method.md#classes-of-n)
    found = ArithmeticClaim(sides[0], sides[1], rel, var, start, claim.modulus, n_class, of_forms=not arithmetic)
    if claim.modulus is None and var is None:
        kind = "value"
    return SequenceReading(found, kind=kind)


def coefficients_of(form: ir.Expr) -> t.Fun:
    """The coefficient sequence n -> a_n(form) as an arithmetic function of n."""
    return t.Fun(f"a({form.text})", "coef", None, t.Var("n", "n"), form)


def values_for(prover: Prover) -> Values:
    """Exact values of arithmetic functions, with the coefficients of forms from the prover's table."""

    def series_of(form: ir.Expr, prec: int) -> Any:
        factor = rescale_factor(ir.Side(form, False))
        if factor == 1:
            return laurent_to(form, prec, prover.table, prover.max_terms * 2)
        # f_1^2 = q^{-1/12} eta(tau)^2 is a power series in q: evaluated as f(q^T), T the least factor
        # making every exponent integral, and read back at the multiples of T (docs/method.md#eta-offset).
        scaled = laurent_to(rescale_expr(form, factor), prec * factor, prover.table, prover.max_terms * 2)
        lowest = min(scaled.valuation, 0)
        if any(scaled[i] != 0 for i in range(lowest, prec * factor) if i % factor):
            raise NotEvaluable("the form has fractional exponents (q^{1/24}, ...); its a(n) is not defined")
        first = -(-lowest // factor)
        kept = [scaled[factor * n] for n in range(first, prec)]
        return QSeries.from_coefficients(kept, first, prec)

    return Values(series_of)


def _fmt(x: Fraction) -> str:
    return _frac_str(x)


_differs = differ_modulo


ProveModulo = Callable[[Prover, "ArithmeticClaim", tuple[ir.Side, ir.Side], Values, str], Outcome]


def decide_arithmetic(
    prover: Prover, claim: ArithmeticClaim, values: Values, prove_modulo: ProveModulo | None = None
) -> Outcome:
    """Decide a claim for all n (see the module docstring); ``prove_modulo`` proves a congruence's sides.

    When no proof applies, the direct comparison goes on to n = start + EXTENDED before the
    claim is called unproven, so that a counterexample a little further out still refutes it.
    """
    outcome = _decide(prover, claim, values, prove_modulo)
    if outcome.verdict == "unproven" and claim.var is not None and claim.rel != "!=":
        further = first_direct_difference(claim, values, claim.start + CHECK + 1, claim.start + EXTENDED)
        if isinstance(further, tuple):
            kind = "congruence" if claim.modulus is not None else "arithmetic"
            return refuted(kind, claim, *further)
        if further is None:
            outcome.message = outcome.message.replace(
                claim.span(claim.start + CHECK), claim.span(claim.start + EXTENDED)
            )
    return outcome


def _decide(prover: Prover, claim: ArithmeticClaim, values: Values, prove_modulo: ProveModulo | None) -> Outcome:
    kind = "congruence" if claim.modulus is not None else "arithmetic"
    if claim.var is None:
        raise ValueError("a claim without a free variable is decided at its value (verifier.claims.value)")
    first = first_direct_difference(claim, values, claim.start, claim.start + CHECK)
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
                first_difference=witness_dict(n, a, b, claim.modulus),
                relation="!=",
                certificate=certificate.values(claim.left, claim.right, "!=", claim.var, n, a, b, kind, claim.modulus),
            )
        return refuted(kind, claim, n, a, b)
    if claim.rel == "!=":
        # No n differs so far: the claim is refuted exactly when the equality can be proved.
        equal = _decide(prover, dataclasses.replace(claim, rel="="), values, prove_modulo)
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
            f"the sides agree for {claim.span(claim.start + CHECK)}",
            method="computation",
            terms_compared=CHECK + 1,
            relation="!=",
        )
    rescaled: Rescaled | None = None
    try:
        left = generating_function(claim.left, claim.var, values)
        right = generating_function(claim.right, claim.var, values)
        # The congruence proof needs forms: an integral power of q in front is divided out too.
        shifted = claim.modulus is not None and (has_shift(left) or has_shift(right))
        if fractional_shift(left) or fractional_shift(right) or shifted:
            rescaled = _rescaled(prover, claim, left, right)
    except Untranslatable as exc:
        modulo = "" if claim.modulus is None else f" modulo {claim.modulus}"
        return Outcome(
            "unproven",
            kind,
            f"the sides agree{modulo} for {claim.span(claim.start + CHECK)} (computed directly), "
            f"but no proof applies: {exc}",
            method="computation",
            terms_compared=CHECK + 1,
        )
    lowest = 0 if claim.start <= 0 else 1
    if rescaled is not None:
        # The constant terms were found equal (modulo M): the claim for n >= 0 is the same claim.
        lowest = 0
        sides = rescaled.sides
    else:
        if lowest == 1:
            left, right = _without_constant(prover, left), _without_constant(prover, right)
        sides = (ir.Side(left, False), ir.Side(right, False))
    if claim.modulus is not None:
        if prove_modulo is None:
            raise ValueError("a congruence needs the congruence kind's proof step")
        if rescaled is None:
            return prove_modulo(prover, claim, sides, values, kind)
        stripped = (strip_side(sides[0]), strip_side(sides[1]))
        return rescaled.annotate(prove_modulo(prover, claim, stripped, values, kind))
    outcome = prover.decide(sides[0], sides[1], "=", unit=Fraction(1 if rescaled is None else rescaled.factor))
    if rescaled is not None:
        outcome = rescaled.annotate(outcome)
    if outcome.verdict == "proved":
        check = first_direct_difference(claim, values, lowest, max(lowest + CHECK, (outcome.bound or 0) + 2))
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
        if at is not None and at >= claim.start and claim.covers(at):
            direct = first_direct_difference(claim, values, claim.start, at + 1)
            if isinstance(direct, tuple):
                return refuted(kind, claim, *direct)
            return Outcome(
                "error",
                kind,
                "internal inconsistency: the generating functions differ at "
                f"q^{at} but the direct values agree; please report this claim",
                code="internal",
            )
        if claim.n_class is not None:
            return Outcome(
                "unproven",
                kind,
                f"the identity holds for {claim.span(claim.start + CHECK)} but fails for some n outside "
                f"{claim.n_class.text}; identities on a class of n are proved only as congruences "
                "(docs/method.md#classes-of-n)",
            )
        return Outcome(
            "unproven",
            kind,
            f"the identity holds for {claim.start} <= n <= {claim.start + CHECK} "
            "but fails below the stated range; no proof for the range alone is attempted",
        )
    outcome.kind = kind
    return outcome


@dataclass(frozen=True)
class Rescaled:
    """The two generating functions after tau -> T tau, with the common power q^c in front of them.

    A side f(q) with fractional exponents in its parts (f_1^2 = q^{-1/12} eta(tau)^2) is a power
    series in q; f(q^T) = q^c F with F a quotient of forms on Gamma_0(N) (docs/method.md#eta-offset).
    The coefficient of q^n in f is that of q^{Tn - c} in F, so the claim about every coefficient
    of the two sides is the same claim about F_left and F_right.
    """

    sides: tuple[ir.Side, ir.Side]  # rescaled, the common q^c still in front
    factor: int  # T
    power: Fraction  # c

    def note(self) -> str:
        divided = f"q^{{{_fmt(self.power)}}} in front of both sides divided out"
        return divided if self.factor == 1 else f"read with tau -> {self.factor} tau, {divided}"

    def annotate(self, outcome: Outcome) -> Outcome:
        """The outcome of the rescaled claim, saying how it was rescaled (message and certificate)."""
        if outcome.verdict == "proved":
            outcome.message = f"{self.note()}: {outcome.message}"
            if outcome.certificate is not None:
                outcome.certificate["rescaled"] = {"tau_factor": self.factor, "q_power": _fmt(self.power)}
        return outcome


def _rescaled(prover: Prover, claim: ArithmeticClaim, left: ir.Expr, right: ir.Expr) -> Rescaled:
    """Both generating functions rescaled to integral exponents, or Untranslatable with the reason."""
    if claim.n_class is not None:
        # The class restricts the author's n; after tau -> T tau the exponents are T n - c.
        raise Untranslatable(
            f"a generating function with a power of q in front of its forms, on the class {claim.n_class.text} "
            "(the class would have to follow the rescaling)"
        )
    pair = (ir.Side(left, False), ir.Side(right, False))
    factor = rescale_factor(*pair)
    try:
        sides = (rescale_side(pair[0], factor), rescale_side(pair[1], factor))
    except ValueError as exc:
        raise Untranslatable(str(exc)) from exc
    power = classify(*sides)
    if power is None:
        raise Untranslatable(
            "the terms of the generating functions carry different powers of q (after rescaling to integral exponents)"
        )
    if power.denominator != 1:
        raise Untranslatable("a generating function with a fractional power of q that no rescaling removes")
    if claim.start > 0:
        # Only the claim for n >= 0 is rescaled: the constant terms must agree (modulo M) for it to be the same claim.
        c = [laurent_to(strip_side(s).expr, 1 - int(power), prover.table, prover.max_terms)[-int(power)] for s in sides]
        if _differs(c[0], c[1], claim.modulus):
            raise Untranslatable(
                f"a generating function with a power of q in front of its forms, and constant terms {_fmt(c[0])} and "
                f"{_fmt(c[1])} that differ; only the claim for n >= 0 is rescaled"
            )
    return Rescaled(sides, factor, power)


def _without_constant(prover: Prover, g: ir.Expr) -> ir.Expr:
    c0 = laurent_to(g, 1, prover.table, prover.max_terms)[0]
    return g if c0 == 0 else add(g, const(c0), -1)


def witness_dict(n: int | None, a: Fraction, b: Fraction, modulus: int | None = None) -> dict[str, Any]:
    return Witness(n, a, b, modulus).to_dict()


def refuted(kind: str, claim: ArithmeticClaim, n: int, a: Fraction, b: Fraction) -> Outcome:
    if claim.modulus is not None:
        msg = (
            f"at n = {n}: left {_fmt(a)}, right {_fmt(b)}, which differ modulo {claim.modulus} "
            f"(residues {_residue(a, claim.modulus)} and {_residue(b, claim.modulus)})"
        )
    else:
        msg = f"at n = {n}: left {_fmt(a)}, right {_fmt(b)}"
    if claim.n_class is not None:
        msg = msg.replace(f"at n = {n}:", f"at n = {n} (in the class {claim.n_class.text}):", 1)
    return Outcome(
        "refuted",
        kind,
        msg,
        method="computation",
        first_difference=witness_dict(n, a, b, claim.modulus),
        terms_compared=n + 1,
        relation=claim.rel,
    )


def _residue(x: Fraction, m: int) -> str:
    if x.denominator % m == 0 or any(x.denominator % p == 0 for p in prime_factors(m)):
        return "not integral"
    return str(x.numerator * pow(x.denominator, -1, m) % m)


def first_direct_difference(
    claim: ArithmeticClaim, values: Values, lo: int, hi: int
) -> tuple[int, Fraction, Fraction] | Outcome | None:
    assert claim.var is not None
    for n in range(max(lo, 0), hi + 1):
        if claim.n_class is not None and n not in claim.n_class:
            continue
        try:
            a = values.value(claim.left, {claim.var: n})
            b = values.value(claim.right, {claim.var: n})
        except NotEvaluable as exc:
            return Outcome("error", "arithmetic", f"cannot compute the sides at n = {n}: {exc}", code=exc.code)
        if _differs(a, b, claim.modulus):
            return n, a, b
    return None

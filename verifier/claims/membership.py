"""Membership: ``f \\in M_k(\\Gamma_0(N), \\chi)``, ``f \\in S_k(...)`` (docs/method.md#claim-membership).

The grammar reads the claim's shape (rule ``space_claim``) and :func:`verifier.parse.spaces.parse_space`
the space; :func:`read_space` and :func:`read_form` are shared with the dimension and
eigenform kinds.

Membership is proved from the weight, the level and character of every atom, and the
orders at the cusps (Ligozat's formula for eta quotients, docs/method.md#eta-modularity, #ligozat; Eisenstein
series and theta series of quadratic forms are holomorphic at every cusp).  It is refuted
only for reasons that hold whatever the level: a wrong weight or character of a nonzero
form, a nonzero E_2-part, a non-integral exponent, a pole, a cusp order that is negative
(or zero, for cusp forms) for a single eta quotient, or a nonzero constant term for a
claimed cusp form.  A level that may be too large (the inferred level does not divide N)
is ``unproven``: eta-quotient levels are sufficient, not necessary (docs/method.md#eta-modularity).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from verifier.claims.kind import ParsedClaim, Reading, Unread, certified
from verifier.elaborate import ir
from verifier.elaborate.elaborator import Problem
from verifier.elaborate.rescale import rescale_factor
from verifier.forms import registry
from verifier.numbers import QuadraticCharacter
from verifier.parse.spaces import SpaceSpec, parse_space
from verifier.prove import certificate, groups, orders
from verifier.prove.evaluate import graded_fraction, laurent_to
from verifier.prove.prover import Outcome, Prover, Setup, _first_nonzero, _frac_str, space_of

KIND = "membership"
KINDS = (KIND,)


@dataclass
class MembershipReading(Reading):
    """``side \\in spec``."""

    side: ir.Side
    spec: SpaceSpec


def read(claim: ParsedClaim, /) -> MembershipReading | Unread | None:
    """``f \\in M_k(...)`` or ``f \\in S_k(...)``: the form elaborated, the space read."""
    if claim.space is None or claim.space.kind != KIND:
        return None
    spec = read_space(claim)
    if isinstance(spec, Unread) or spec is None:
        return spec
    side = read_form(claim)
    if isinstance(side, Unread):
        return side
    return MembershipReading(side, spec, kind=KIND)


def decide(reading: MembershipReading, prover: Prover, /) -> Outcome:
    """Proved from weight, level, character and cusp orders; refuted only for level-free reasons."""
    return decide_membership(prover, reading.side, reading.spec)


def certify(outcome: Outcome, /) -> dict[str, Any] | None:
    """The space, the form and the cusp-order bounds the proof used."""
    return certified(outcome)


def read_space(claim: ParsedClaim) -> SpaceSpec | Unread | None:
    """The space of a claim about a space, read by :func:`parse_space` (None: the claim names none)."""
    assert claim.space is not None
    spec = parse_space(claim.space.space) if claim.space.space is not None else None
    if isinstance(spec, str):
        return Unread(claim.space.kind, "syntax", spec, at=claim.space.space_at)
    return spec


def read_form(claim: ParsedClaim) -> ir.Side | Unread:
    """The form of a claim about a space, elaborated."""
    assert claim.space is not None and claim.space.form is not None
    side = claim.elaborator.side(claim.space.form, claim.text.text)
    if isinstance(side, Problem):
        return Unread(claim.space.kind, side.code, side.message, side.hint, at=side.span[0])
    return side


def space_dict(spec: SpaceSpec) -> dict[str, Any]:
    chi = spec.character.name if spec.character is not None else "trivial"
    space = space_of(spec.weight, spec.level, 0, chi)
    if spec.group_kind == "Gamma1":
        space["group"] = f"Gamma1({spec.level})"
        space.pop("dimension", None)  # space_of gives dim M_k(Gamma_0(N)), not that of Gamma_1(N)
    elif spec.cusp and "dimension" in space:
        assert spec.weight is not None
        space["dimension"] = groups.dim_cusp(int(spec.weight), spec.level)
    space["cusp_forms"] = spec.cusp
    return space


def decide_membership(prover: Prover, side: ir.Side, spec: SpaceSpec) -> Outcome:
    """Decide ``side \\in spec``."""
    space = space_dict(spec)
    if side.printed:
        return Outcome("error", KIND, "a printed expansion is not a form; name the form", space, code="bad-expansion")
    expr = side.expr
    if rescale_factor(side) != 1:
        return Outcome(
            "refuted",
            KIND,
            "the q-expansion has non-integral exponents (an eta quotient with sum of delta*r_delta "
            "not divisible by 24), but forms on Gamma_0(N) are invariant under tau -> tau + 1",
            space,
            "cusp-orders",
        )
    weight = expr.typ.weight
    try:
        atoms = ir.atoms_of(expr)
        level = 1
        for atom in atoms:
            n = registry.level(atom.key, int(atom.scale), atom.params)
            level = level * n // math.gcd(level, n)
        if weight is not None and weight.denominator == 2 and level % 4:
            level *= 4 // math.gcd(level, 4)
        work_level = level * spec.level // math.gcd(level, spec.level)

        def chars(atom: ir.Atom) -> int:
            return int(registry.character(atom.key, int(atom.scale), atom.params, work_level).kernel)

        # Bounds for the numerator N of f = N / D: a piece of N vanishing through its bound is 0.
        setup = Setup(
            work_level, (weight or Fraction(0)) + expr.typ.den_weight, orders.fraction_bounds(expr, work_level)[0]
        )
        need = setup.bound(setup.weight) + 1
        if need > prover.max_terms:  # checked before any series is built
            return Outcome(
                "error",
                KIND,
                f"deciding it needs {need} coefficients (the Sturm bound at level {work_level}), "
                f"more than the budget of {prover.max_terms}",
                code="budget",
                hint="raise --max-terms if this is intended",
            )
        num, _ = graded_fraction(expr, max(need, 2), prover.table, chars)
        series = laurent_to(expr, max(need, 2), prover.table, prover.max_terms * 2)
    except registry.NotModular as exc:
        return Outcome("refuted", KIND, f"not modular: {exc}", space, "cusp-orders")
    nonzero = [(w, j, k) for (w, j, k), s in num.items() if _first_nonzero(s, setup.bound(w - 2 * j) + 1) is not None]
    if not nonzero:
        return Outcome("proved", KIND, "the form is 0, which lies in every space", space, "cusp-orders")
    # Reasons that refute whatever the level.
    if series.valuation < 0:
        return Outcome(
            "refuted",
            KIND,
            f"the form has a pole at infinity (its expansion starts at q^{series.valuation})",
            space,
            "cusp-orders",
        )
    if weight is not None and weight != spec.weight:
        return Outcome(
            "refuted",
            KIND,
            f"the form has weight {_frac_str(weight)}, not {_frac_str(spec.weight)}",
            space,
            "cusp-orders",
        )
    if any(j for _, j, _ in nonzero) and not expr.typ.den_weight:
        return Outcome("refuted", KIND, "the form is quasimodular: its E_2-part is nonzero", space, "cusp-orders")
    if spec.cusp and series.valuation == 0:
        return Outcome(
            "refuted",
            KIND,
            f"not a cusp form: its constant term is {_frac_str(series[0])}, not 0",
            space,
            "cusp-orders",
        )
    found = sorted({k for _, _, k in nonzero})
    wanted = spec.character.kernel if spec.character is not None else 1
    if spec.group_kind == "Gamma0" and found != [wanted] and not expr.typ.den_weight:
        names = ", ".join(QuadraticCharacter(k).name for k in found)
        return Outcome(
            "refuted",
            KIND,
            f"the form has character {names}, not {QuadraticCharacter(wanted).name}",
            space,
            "cusp-orders",
        )
    if spec.group_kind == "Gamma1":
        wide = [QuadraticCharacter(k) for k in found if spec.level % QuadraticCharacter(k).conductor]
        if wide and not expr.typ.den_weight:
            return Outcome(
                "refuted",
                KIND,
                f"the form has character {wide[0].name}, which is not a character mod {spec.level}",
                space,
                "cusp-orders",
            )
    single = _single_eta(expr)
    if single is not None:
        exact = registry.cusp_orders("eta", single, work_level) or {}
        worst = min(exact.items(), key=lambda kv: kv[1])
        if worst[1] < 0 or (spec.cusp and worst[1] == 0):
            what = "a pole" if worst[1] < 0 else "it does not vanish there, so it is not a cusp form"
            return Outcome(
                "refuted",
                KIND,
                f"at the cusps c/{worst[0]} of Gamma_0({work_level}) the eta quotient has order "
                f"{_frac_str(worst[1])} (Ligozat): {what}",
                space,
                "cusp-orders",
            )
    # A nonzero form is in no zero space (docs/method.md#dimension-gamma0, trivial character, even weight).
    if (
        spec.group_kind == "Gamma0"
        and wanted == 1
        and spec.weight.denominator == 1
        and spec.weight % 2 == 0
        and (groups.dim_cusp if spec.cusp else groups.dim_modular)(int(spec.weight), spec.level) == 0
    ):
        return Outcome("refuted", KIND, f"the form is nonzero but {spec.text()} = 0", space, "dimension-formula")
    # What a proof needs.
    if expr.typ.den_weight:
        return Outcome("unproven", KIND, "the form is a quotient; its holomorphy at the cusps is not decided", space)
    if spec.level % level:
        return Outcome(
            "unproven",
            KIND,
            f"the forms used are known to be modular on Gamma_0({level}), not on Gamma_0({spec.level}); "
            "no proof that the combination has the smaller level is attempted",
            space,
        )
    bounds = setup.bounds
    low = min(bounds.values())
    if low < 0:
        return Outcome("unproven", KIND, "some terms have poles at cusps; whether they cancel is not decided", space)
    if spec.cusp and any(v <= 0 for d, v in bounds.items() if d != work_level):
        return Outcome(
            "unproven",
            KIND,
            "some terms do not vanish at every cusp (e.g. Eisenstein series); whether the sum does is not decided",
            space,
        )
    detail = ", ".join(f"d={d}: {_frac_str(v)}" for d, v in sorted(bounds.items()))
    return Outcome(
        "proved",
        KIND,
        f"weight {_frac_str(spec.weight)}, level {level} divides {spec.level}, character "
        f"{QuadraticCharacter(found[0]).name}, orders at the cusps >= ({detail})",
        space,
        "cusp-orders",
        components=[{"cusp_denominator": d, "order_at_least": _frac_str(v)} for d, v in sorted(bounds.items())],
        certificate=None
        if spec.group_kind != "Gamma0"
        else certificate.membership(
            side,
            space,
            {
                "weight": _frac_str(spec.weight),
                "level": spec.level,
                "character": wanted,
                "cusp_forms": spec.cusp,
                "group": spec.group_kind,
            },
            level,
            bounds,
        ),
    )


def _single_eta(expr: ir.Expr) -> tuple[Any, ...] | None:
    if isinstance(expr, ir.Atom) and expr.key == "eta":
        return expr.params
    if isinstance(expr, ir.Product) and isinstance(expr.left, ir.Const) and isinstance(expr.right, ir.Atom):
        return expr.right.params if expr.right.key == "eta" and expr.left.value != 0 else None
    return None

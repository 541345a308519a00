"""Reading a claim between two sides of forms: the sides elaborated, rescaled and checked.

Shared by the identities of forms (:mod:`verifier.claims.identity`), the printed expansions
(:mod:`verifier.claims.expansion`) and ``solve=`` (:mod:`verifier.claims.solve`).  The two
sides are elaborated once per claim (``ParsedClaim.memo``); which of the first two kinds the
claim is shows only then (a side that prints its expansion makes it a ``prefix`` claim).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from verifier.claims.kind import ParsedClaim, Reading, Unread
from verifier.elaborate import ir
from verifier.elaborate.elaborator import Elaborator, Problem, is_builtin, normal_name
from verifier.elaborate.rescale import rescale_factor, rescale_side
from verifier.forms import registry
from verifier.forms.registry import NotModular
from verifier.options import parse_character, parse_group, parse_nome, parse_weight
from verifier.parse import ast
from verifier.prove.outcome import Outcome
from verifier.prove.prover import Prover, claim_level
from verifier.scan.text import MappedText

Build = Callable[[dict[str, Fraction]], tuple[ir.Side, ir.Side] | str]  # the two sides for values of unknowns


@dataclass
class SidesReading(Reading):
    """``left rel right`` between two sides of forms, in the rescaled variable q^(1/unit)."""

    left: ir.Side
    right: ir.Side
    rel: str
    unit: Fraction  # the author's exponent is the internal one divided by this
    character: str | None  # the tag's character= option
    suggest_with: Callable[[Prover], str | None] | None = None

    @property
    def crash_kind(self) -> str:
        return "equality" if self.rel == "=" else "inequality"

    def over_budget(self, prover: Prover) -> str:
        return f"deciding it needs about {prover.precision_needed(self.left, self.right)} coefficients"

    def suggest(self, prover: Prover) -> str | None:
        return None if self.suggest_with is None else self.suggest_with(prover)


def read_sides(claim: ParsedClaim) -> SidesReading | Unread:
    """The two sides of ``claim`` read as forms (once per claim; the kinds share the reading)."""
    if "sides" not in claim.memo:
        claim.memo["sides"] = _read(claim)
    found: SidesReading | Unread = claim.memo["sides"]
    return found


def decide_sides(reading: SidesReading, prover: Prover) -> Outcome:
    """The identity of the two sides decided by the prover, then the tag's character checked."""
    outcome = prover.decide(reading.left, reading.right, reading.rel, reading.unit)
    return check_character(outcome, reading.character)


def _read(claim: ParsedClaim) -> SidesReading | Unread:
    left_node, right_node = claim.sides
    text, elaborator, options = claim.text, claim.elaborator, claim.options
    kind = "equality" if claim.rel == "=" else "inequality"
    nome = parse_nome(options.get("nome", ""))
    if nome is None:
        return Unread(
            kind,
            "bad-option",
            f"cannot read nome={options['nome']}",
            "write nome={e^{\\pi i \\tau}} or nome={e^{2\\pi i \\tau}}",
            at_tag=True,
        )
    elaborator.nome = nome
    elaborator.allow_mixed = any(
        isinstance(n, ast.BigSum) and n.kind == "at_least" for side in (left_node, right_node) for n in ast.walk(side)
    )
    sides: list[ir.Side] = []
    try:
        for node in (left_node, right_node):
            side = elaborator.side(node, text.text)
            if isinstance(side, Problem):
                return Unread(kind, side.code, side.message, side.hint, at=side.span[0])
            sides.append(side)
    finally:
        elaborator.nome = Fraction(1)
        elaborator.allow_mixed = False
    # q -> q^T makes every exponent integral (eta offsets, q^{1/24}, the nome); docs/method.md#eta-offset.
    t = rescale_factor(*sides)
    try:
        left, right = (rescale_side(s, t) for s in sides)
    except ValueError as exc:
        return Unread(kind, "unsupported", str(exc))
    if left.printed or right.printed:
        kind = "prefix"
    try:
        problem = check_options(options, left, right, t)
    except NotModular as exc:
        problem = ("not-modular", f"not modular: {exc}", "")
    if problem is not None:
        code, message, hint = problem
        return Unread(kind, code, message, hint, at_tag=True)
    shown = claim.shown
    redefined = sorted(
        {
            elaborator.authored[n]
            for node in (left_node, right_node)
            for n in names_in(node)
            if n in elaborator.authored and is_builtin(n)
        }
    )
    if redefined:
        shown += " [" + "; ".join(redefined) + "]"
    if claim.letter is not None:
        shown += f" (with {claim.letter} read as q)"
    make_build = side_builder(elaborator, text, nome)

    def suggest(prover: Prover) -> str | None:
        from verifier.claims.suggest import suggestion  # (suggest uses solve, which uses this module)

        if left.printed or right.printed:
            return None
        return suggestion(prover, left_node, right_node, make_build)

    return SidesReading(
        left, right, claim.rel, Fraction(t) * nome, options.get("character"), suggest, kind=kind, shown=shown
    )


def names_in(node: ast.Node) -> set[str]:
    """The names (of forms, functions, unknowns) a side uses, normalised."""
    out = set()
    for n in ast.walk(node):
        if isinstance(n, ast.Name):
            out.add(normal_name(n.text))
        elif isinstance(n, ast.Call):
            out.add(normal_name(n.name))
    return out


def side_builder(
    elaborator: Elaborator, text: MappedText, nome: Fraction
) -> Callable[[ast.Node, ast.Node, dict[str, Fraction]], Callable[[dict[str, Fraction]], Any]]:
    """Elaborate a claim's two sides again with values for unknown names (solve=, suggestions).

    The definitions and matrices known at this point of the document are captured now.
    """
    definitions, matrices = dict(elaborator.definitions), dict(elaborator.matrices)

    def make_build(lt: ast.Node, rt: ast.Node, fixed: dict[str, Fraction]) -> Build:
        def build(values: dict[str, Fraction]) -> tuple[ir.Side, ir.Side] | str:
            local = Elaborator(definitions)
            local.matrices, local.nome, local.unknowns = matrices, nome, {**values, **fixed}
            sides = []
            for node in (lt, rt):
                side = local.side(node, text.text)
                if isinstance(side, Problem):
                    return side.message
                sides.append(side)
            factor = rescale_factor(*sides)
            return rescale_side(sides[0], factor), rescale_side(sides[1], factor)

        return build

    return make_build


def check_options(options: Any, left: ir.Side, right: ir.Side, t: int) -> tuple[str, str, str] | None:
    """The tag's weight=, character= and group= checked against the two sides (code, message, hint)."""
    if "weight" in options:
        stated = parse_weight(options["weight"])
        if stated is None:
            return (
                "bad-option",
                f"cannot read weight={options['weight']}",
                "write weight=8 or weight=1/2",
            )
        for side, which in ((left, "left"), (right, "right")):
            w = side.expr.typ.weight
            if not side.printed and w is not None and w != stated:
                return (
                    "weight-mismatch",
                    f"the tag states weight {stated}, but the {which} side ({_short(side.expr.text)}) has weight {w}",
                    "correct the tag or the claim",
                )
    if "character" in options and parse_character(options["character"]) is None:
        return ("bad-option", f"cannot read character={options['character']}", "write \\chi_{-4} or trivial")
    if "group" in options and t == 1:
        # (A rescaled claim lives at T times the author's level; its group is not compared.)
        group = parse_group(options["group"])
        if group is None:
            return (
                "bad-group",
                f"cannot read group={options['group']}",
                "write SL2(Z), \\Gamma_0(N) or \\Gamma_1(N)",
            )
        level = claim_level(left, right)
        if group[1] % level:
            needs = [
                (a.text, n)
                for s in (left, right)
                for a in ir.atoms_of(s.expr)
                if group[1] % (n := registry.level(a.key, int(a.scale), a.params))
            ]
            culprit = f" ({needs[0][0]} needs level {needs[0][1]})" if needs else ""
            return (
                "group-mismatch",
                f"the tag states level {group[1]}, but the claim needs level {level}{culprit}",
                "state a group the forms live on",
            )
    return None


def check_character(outcome: Outcome, stated: str | None) -> Outcome:
    """A decided claim whose tag states another character than the one found is an error."""
    if stated is None or outcome.space is None or outcome.verdict == "error":
        return outcome
    chi = parse_character(stated)
    found = outcome.space.get("character")
    if chi is not None and found != chi.name:
        return Outcome(
            "error",
            outcome.kind,
            f"the tag states character {chi.name}, but the claim's forms have character {found}",
            outcome.space,
            code="character-mismatch",
            hint="correct the tag or the claim",
        )
    return outcome


def _short(text: str) -> str:
    text = " ".join(text.split())
    return text if len(text) <= 40 else text[:37] + "..."

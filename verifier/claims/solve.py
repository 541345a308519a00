"""Unknown coefficients: ``%@claim solve=a,b`` on ``E_{12} = a E_4^3 + b E_6^2`` (docs/method.md#claim-solve).

Read: the tag's unknowns (:func:`verifier.options.parse_unknowns`) and the two sides, which are
elaborated again for each trial value of the unknowns (:func:`verifier.claims.sides.side_builder`).

The claim is affine in the unknowns: F(a) = F_0 + sum a_i F_i with F the cleared difference
N_L D_R - N_R D_L.  Every piece of F lies in a space where coefficients 0..B determine the
form (Sturm or valence bound), so the claim holds exactly for the rational solutions of the
finite linear system "coefficients 0..B of F(a) vanish".  Linearity is checked (F(2 e_i)
must equal F_0 + 2 F_i); an unknown in a denominator or a power is refused.  The same
system finds the suggested corrections of refuted identities (:mod:`verifier.claims.suggest`).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from verifier.claims.kind import ParsedClaim, Reading, Unread, certified
from verifier.claims.sides import Build, side_builder
from verifier.elaborate import ir
from verifier.forms import registry
from verifier.options import parse_unknowns
from verifier.prove import certificate
from verifier.prove.prover import Outcome, Prover, _frac_str

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


def _vector(prover: Prover, left: ir.Side, right: ir.Side, keys: list[tuple[Any, ...]] | None) -> dict[Any, Fraction]:
    setup = prover.setup(left, right)
    level = setup.level

    def chars(atom: ir.Atom) -> int:
        return int(registry.character(atom.key, int(atom.scale), atom.params, level).kernel)

    need = setup.bound(setup.weight) + 1
    *_, p = prover._cleared(left, right, need, chars)
    out: dict[Any, Fraction] = {}
    for (w, j, k), s in p.items():
        b = setup.bound(w - 2 * j)
        for n in range(min(0, s.valuation), b + 1):
            out[(w, j, k, n)] = s[n]
    return out


def decide_solve(prover: Prover, build: Build, unknowns: list[str], with_certificate: bool = True) -> Outcome:
    """Solve for the unknowns exactly; proved (unique or a family), or refuted (no solution).

    With ``with_certificate``, a proved outcome carries a certificate (:func:`_certificate`).
    """
    zero = dict.fromkeys(unknowns, Fraction(0))
    sides = build(zero)
    if isinstance(sides, str):
        return Outcome("error", "solve", sides, code="syntax")
    base = _vector(prover, *sides, None)
    columns: list[dict[Any, Fraction]] = []
    units: list[tuple[ir.Side, ir.Side]] = []
    for u in unknowns:
        one = build({**zero, u: Fraction(1)})
        two = build({**zero, u: Fraction(2)})
        if isinstance(one, str) or isinstance(two, str):
            return Outcome("error", "solve", one if isinstance(one, str) else str(two), code="syntax")
        units.append(one)
        v1, v2 = _vector(prover, *one, None), _vector(prover, *two, None)
        keys = set(base) | set(v1) | set(v2)
        col = {k: v1.get(k, Fraction(0)) - base.get(k, Fraction(0)) for k in keys}
        if any(v2.get(k, Fraction(0)) - base.get(k, Fraction(0)) != 2 * col[k] for k in keys):
            return Outcome(
                "error",
                "solve",
                f"the claim is not linear in {u}",
                code="unsupported",
                hint="unknowns may appear only as coefficients of forms",
            )
        columns.append(col)
    rows = sorted(set(base).union(*(set(c) for c in columns)), key=str)
    matrix = [[c.get(r, Fraction(0)) for c in columns] + [-base.get(r, Fraction(0))] for r in rows]
    solution, free = _solve(matrix, len(unknowns))
    if solution is None:
        return Outcome(
            "refuted",
            "solve",
            "no values of " + ", ".join(unknowns) + " make the identity true "
            f"({len(rows)} coefficients compared up to the Sturm bound of each piece)",
            method="linear-algebra",
            terms_compared=len(rows),
        )
    assignment = ", ".join(f"{u} = {_frac_str(v)}" for u, v in zip(unknowns, solution, strict=True))
    cert = _certificate(prover, build, unknowns, solution, not free, sides, units) if with_certificate else None
    if free:
        names = ", ".join(unknowns[i] for i in free)
        return Outcome(
            "proved",
            "solve",
            f"holds for a family of solutions ({names} free); one of them: {assignment}",
            method="linear-algebra",
            terms_compared=len(rows),
            components=[{"unknown": u, "value": _frac_str(v)} for u, v in zip(unknowns, solution, strict=True)],
            certificate=cert,
        )
    return Outcome(
        "proved",
        "solve",
        f"holds exactly for {assignment} (the unique solution; {len(rows)} "
        "coefficients up to the Sturm bound of each piece)",
        method="linear-algebra",
        terms_compared=len(rows),
        components=[{"unknown": u, "value": _frac_str(v)} for u, v in zip(unknowns, solution, strict=True)],
        certificate=cert,
    )


def _certificate(
    prover: Prover,
    build: Build,
    unknowns: list[str],
    solution: list[Fraction],
    unique: bool,
    zero: tuple[ir.Side, ir.Side],
    units: list[tuple[ir.Side, ir.Side]],
) -> dict[str, Any] | None:
    """The claim at the solution, proved on its own (its Sturm or valence certificate), and the
    sides at 0 and at each unit vector, from which a re-checker sees the solution is unique."""
    sides = build(dict(zip(unknowns, solution, strict=True)))
    if isinstance(sides, str):
        return None
    instance = prover.decide(sides[0], sides[1], "=")
    if instance.verdict != "proved" or (instance.certificate or {}).get("method") not in ("sturm", "valence"):
        return None  # the generic certificate of a method the re-checker does not cover
    return {
        "format": certificate.FORMAT,
        "method": "linear-algebra",
        "kind": "solve",
        "space_used": instance.space,
        "bound": instance.bound,
        "unknowns": list(unknowns),
        "solution": [_frac_str(v) for v in solution],
        "unique": unique,
        "instance": instance.certificate,
        "family": {
            "zero": {"left": certificate.side_record(zero[0]), "right": certificate.side_record(zero[1])},
            "units": [{"left": certificate.side_record(a), "right": certificate.side_record(b)} for a, b in units],
        },
    }


def _solve(matrix: list[list[Fraction]], n: int) -> tuple[list[Fraction] | None, list[int]]:
    """Gauss–Jordan over Q: (a solution with free variables set to 0, indices of free variables)."""
    rows = [r[:] for r in matrix]
    pivots: list[int] = []
    r = 0
    for c in range(n):
        pivot = next((i for i in range(r, len(rows)) if rows[i][c] != 0), None)
        if pivot is None:
            continue
        rows[r], rows[pivot] = rows[pivot], rows[r]
        p = rows[r][c]
        rows[r] = [x / p for x in rows[r]]
        for i in range(len(rows)):
            if i != r and rows[i][c] != 0:
                f = rows[i][c]
                rows[i] = [a - f * b for a, b in zip(rows[i], rows[r], strict=True)]
        pivots.append(c)
        r += 1
    if any(all(x == 0 for x in row[:n]) and row[n] != 0 for row in rows):
        return None, []
    solution = [Fraction(0)] * n
    for i, c in enumerate(pivots):
        solution[c] = rows[i][n]
    return solution, [c for c in range(n) if c not in pivots]

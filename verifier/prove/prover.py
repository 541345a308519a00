"""Decide a claim: prove it with a certificate, refute it with a witness, or say why not.

Equalities of forms (MATH.md §3.8): clear denominators, so that ``L = R`` becomes
``P = N_L D_R - N_R D_L = 0`` with ``P`` a polynomial in holomorphic (quasi)modular
atoms; split ``P`` by weight and by power of E_2; each piece lies in
``M_{w-2j}(Gamma_0(N))`` and is zero iff its coefficients ``a_0 .. a_B`` vanish, with ``B``
the Sturm bound (§3.2).  A refutation is then certain, and its witness is the first
exponent at which the author's two sides themselves differ.

Printed expansions are claims about exactly the printed range; they are decided by
computing that range exactly.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any

from verifier.elaborate import ir
from verifier.prove import groups
from verifier.prove.evaluate import (
    AtomTable,
    BudgetExceeded,
    Graded,
    graded_add,
    graded_fraction,
    graded_mul,
    laurent_to,
)
from verifier.series.qseries import QSeries

DEFAULT_MAX_TERMS = 50_000
# Coefficients of weight-k forms to q^n have about k*log2(n) bits: bound terms x weight,
# so that a claim's memory stays in the hundreds of megabytes at most.
MAX_WORK = 20_000_000


@dataclass
class Outcome:
    """The verdict on one claim and everything that supports it."""

    verdict: str  # proved | refuted | unproven | error
    kind: str  # equality | inequality | prefix
    message: str
    space: dict[str, Any] | None = None
    method: str | None = None
    bound: int | None = None
    terms_compared: int = 0
    first_difference: dict[str, Any] | None = None
    components: list[dict[str, Any]] = field(default_factory=list)
    code: str | None = None
    hint: str = ""


def _frac_str(x: Fraction) -> str:
    return str(x.numerator) if x.denominator == 1 else f"{x.numerator}/{x.denominator}"


def _wstr(w: Fraction | None) -> str:
    return "any" if w is None else _frac_str(w)


def claim_level(left: ir.Side, right: ir.Side) -> int:
    """Least common level of both sides."""
    a, b = left.expr.typ.level, right.expr.typ.level
    from math import gcd

    return a * b // gcd(a, b)


def claim_weight(left: ir.Side, right: ir.Side) -> Fraction | None:
    """The weight of the claim (of its form sides), None when no side fixes one."""
    for side in (left, right):
        if not side.printed and side.expr.typ.weight is not None:
            return side.expr.typ.weight
    return None


def space_of(weight: Fraction | None, level: int, depth: int = 0) -> dict[str, Any]:
    """The certificate's description of a space of forms."""
    space: dict[str, Any] = {
        "weight": _wstr(weight),
        "group": groups.group_name(level),
        "character": "trivial",
    }
    if weight is not None and weight.denominator == 1 and depth == 0:
        space["dimension"] = groups.dim_modular(int(weight), level)
    if depth:
        space["quasimodular_depth"] = depth
    return space


class Prover:
    """Decides claims, sharing one :class:`AtomTable` across a run."""

    def __init__(self, table: AtomTable | None = None, max_terms: int = DEFAULT_MAX_TERMS) -> None:
        self.table = table or AtomTable()
        self.max_terms = max_terms

    # -- planning -------------------------------------------------------------------
    def precision_needed(self, left: ir.Side, right: ir.Side) -> int:
        """Coefficients a claim will need (used to compute each atom once, large enough)."""
        if left.printed or right.printed:
            need = _prefix_range(left, right)[1] + 2
            weight = _heaviest(left, right)
        else:
            weight = _proof_weight(left, right)
            need = groups.sturm_bound(weight, claim_level(left, right)) + 1
        # A claim over budget is refused before computing; it must not inflate the plan.
        return 0 if need > self.max_terms or need * max(weight, Fraction(12)) > MAX_WORK else need

    # -- deciding -------------------------------------------------------------------
    def decide(self, left: ir.Side, right: ir.Side, rel: str) -> Outcome:
        """Decide ``left rel right`` (``rel`` is ``'='`` or ``'!='``)."""
        try:
            if left.printed or right.printed:
                return self._prefix(left, right, rel)
            return self._forms(left, right, rel)
        except BudgetExceeded as exc:
            kind = "prefix" if (left.printed or right.printed) else ("equality" if rel == "=" else "inequality")
            return Outcome(
                "error",
                kind,
                f"deciding this claim needs {exc.needed} coefficients, over the budget "
                f"({self.max_terms} coefficients, and coefficients x weight <= {MAX_WORK})",
                code="budget",
                hint="raise --max-terms if this is intended",
            )
        except ZeroDivisionError as exc:
            return Outcome("error", "equality", f"division by a zero series: {exc}", code="zero-division")

    def _forms(self, left: ir.Side, right: ir.Side, rel: str) -> Outcome:
        kind = "equality" if rel == "=" else "inequality"
        level = claim_level(left, right)
        weight_p = _proof_weight(left, right)
        prec = groups.sturm_bound(weight_p, level) + 1
        if prec > self.max_terms or prec * max(weight_p, Fraction(12)) > MAX_WORK:
            raise BudgetExceeded(prec)
        nl, dl = graded_fraction(left.expr, prec, self.table)
        nr, dr = graded_fraction(right.expr, prec, self.table)
        for den, side in ((dl, left), (dr, right)):
            if _graded_zero(den, level) is None:
                return Outcome(
                    "error",
                    kind,
                    f"{side.expr.text} divides by a form that is identically zero",
                    code="zero-division",
                    hint="check the denominator",
                )
        p = graded_add(graded_mul(nl, dr), graded_mul(nr, dl), -1)
        components: list[dict[str, Any]] = []
        differing: list[tuple[Fraction, int, int]] = []
        terms = 0
        for (w, j), series in sorted(p.items(), key=lambda kv: (kv[0][0], -kv[0][1])):
            wt = w - 2 * j
            assert wt >= 0, "clearing denominators leaves holomorphic pieces of weight >= 0"
            b = groups.sturm_bound(wt, level)
            n = _first_nonzero(series, b + 1)
            terms += b + 1
            comp = {
                "weight": _frac_str(wt),
                "e2_power": j,
                "bound": b,
                "dimension": groups.dim_modular(int(wt), level) if wt.denominator == 1 else None,
            }
            components.append(comp)
            if n is not None:
                differing.append((wt, j, n))
        wl, wr = left.expr.typ.weight, right.expr.typ.weight
        # The E_2-depth actually present: a numerator piece that vanishes through its
        # Sturm bound is zero, so E_2-parts that cancel (2E_2(2tau) - E_2) do not count.
        depth = max((_nonzero_depth(g, level) for g in (nl, nr)), default=0)
        weight = wl if wl is not None else wr
        cleared = left.expr.typ.den_weight + right.expr.typ.den_weight
        space = space_of(weight, level, depth)
        proof_space = space
        if cleared:
            # Quotients are meromorphic, so the claim's weight-k "space" has no dimension;
            # the certificate adds the space the cleared identity N_L D_R = N_R D_L lives in.
            space.pop("dimension", None)
            space["meromorphic"] = True
            proof_space = space_of(weight_p, level, depth)
            space["cleared_space"] = proof_space
        bound = max((c["bound"] for c in components), default=0)
        how = _how(components, cleared, level)
        if not differing:
            if kind == "equality":
                return Outcome(
                    "proved",
                    kind,
                    f"equal in {_space_text(proof_space)}: {how}",
                    space,
                    "sturm",
                    bound,
                    terms,
                    components=components,
                )
            return Outcome(
                "refuted",
                kind,
                f"the two sides are equal in {_space_text(proof_space)}: {how}",
                space,
                "sturm",
                bound,
                terms,
                components=components,
            )
        witness = self._witness(left, right, prec)
        weights_note = ""
        if wl is not None and wr is not None and wl != wr:
            weights_note = f"; the sides have different weights ({_wstr(wl)} and {_wstr(wr)})"
        if witness is None:
            wt, j, n = differing[0]
            detail = f"the weight-{_frac_str(wt)} part{' of E_2^' + str(j) if j else ''} is nonzero at q^{n}"
            msg = f"the sides differ ({detail}; the first differing coefficient lies beyond q^{self.max_terms})"
            fd = None
        else:
            n_w, left_c, right_c = witness
            msg = f"coefficients of q^{n_w} differ: left {_frac_str(left_c)}, right {_frac_str(right_c)}{weights_note}"
            fd = {"n": n_w, "left": _frac_str(left_c), "right": _frac_str(right_c)}
        verdict = "refuted" if kind == "equality" else "proved"
        method = "sturm" if kind == "equality" else "witness"
        if kind == "inequality":
            msg = "the sides differ: " + msg
        return Outcome(verdict, kind, msg, space, method, bound, terms, fd, components)

    def _witness(self, left: ir.Side, right: ir.Side, prec: int) -> tuple[int, Fraction, Fraction] | None:
        """First exponent where the two sides' Laurent series differ, searching up to the budget."""
        stop = max(prec, 8)
        while True:
            try:
                a = laurent_to(left.expr, stop, self.table, self.max_terms * 2)
                b = laurent_to(right.expr, stop, self.table, self.max_terms * 2)
            except BudgetExceeded:
                return None
            start = min(0, a.valuation, b.valuation)
            n = a.first_difference(b, start, stop)
            if n is not None:
                return n, a[n], b[n]
            if stop >= self.max_terms:
                return None
            stop = min(stop * 2, self.max_terms)

    def _prefix(self, left: ir.Side, right: ir.Side, rel: str) -> Outcome:
        start_hint, stop, exact_range = _prefix_range(left, right)
        level = claim_level(left, right)
        weight = claim_weight(left, right)
        depth = max(left.expr.typ.depth, right.expr.typ.depth)
        space = space_of(weight, level, depth) if weight is not None else None
        heaviest = _heaviest(left, right)
        if stop > self.max_terms or stop * max(heaviest, Fraction(12)) > MAX_WORK:
            raise BudgetExceeded(stop)
        a = laurent_to(left.expr, stop, self.table, self.max_terms * 2)
        b = laurent_to(right.expr, stop, self.table, self.max_terms * 2)
        start = min(0, a.valuation, b.valuation, start_hint)
        n = a.first_difference(b, start, stop)
        terms = stop - start
        rng = f"q^{start}..q^{stop - 1}"
        if n is not None:
            fd = {"n": n, "left": _frac_str(a[n]), "right": _frac_str(b[n])}
            msg = f"coefficients of q^{n} differ: left {fd['left']}, right {fd['right']}"
            if rel == "=":
                return Outcome("refuted", "prefix", msg, space, "expansion", None, terms, fd)
            return Outcome(
                "proved",
                "prefix",
                "the expansions differ: " + msg,
                space,
                "expansion",
                None,
                terms,
                fd,
            )
        if not exact_range:
            # A printed polynomial with no \cdots and no O(...): it claims every coefficient.
            msg = (
                f"the sides agree on {rng}, but the printed side ends without \\cdots or O(q^n), "
                "so it claims all coefficients; no proof of that is attempted"
            )
            return Outcome(
                "unproven",
                "prefix",
                msg,
                space,
                "expansion",
                None,
                terms,
                hint="add + \\cdots or + O(q^n) if only the printed terms are meant",
            )
        if rel == "=":
            return Outcome(
                "proved",
                "prefix",
                f"the printed coefficients {rng} are exact",
                space,
                "expansion",
                None,
                terms,
            )
        return Outcome("refuted", "prefix", f"the expansions agree on {rng}", space, "expansion", None, terms)


def _heaviest(left: ir.Side, right: ir.Side) -> Fraction:
    """Largest weight (with denominators) among the sides: sizes the coefficients."""
    return max(abs(s.expr.typ.weight or Fraction(0)) + s.expr.typ.den_weight for s in (left, right))


def _proof_weight(left: ir.Side, right: ir.Side) -> Fraction:
    ws = [w for w in (left.expr.typ.weight, right.expr.typ.weight) if w is not None]
    return max(ws, default=Fraction(0)) + left.expr.typ.den_weight + right.expr.typ.den_weight


def _prefix_range(left: ir.Side, right: ir.Side) -> tuple[int, int, bool]:
    """(lowest exponent to compare, stop, whether the range is what the claim states)."""
    truncs = [s.truncation for s in (left, right) if s.truncation is not None]
    if truncs:
        return 0, min(truncs), True
    # No truncation anywhere: compare well past the printed degree and any Sturm bound.
    deg = max(left.degree, right.degree)
    w = claim_weight(left, right) or Fraction(0)
    b = groups.sturm_bound(w + left.expr.typ.den_weight + right.expr.typ.den_weight, claim_level(left, right))
    return 0, max(deg + 2, b + 2, 10), False


def _first_nonzero(series: QSeries, stop: int) -> int | None:
    if series.is_zero() or series.valuation >= stop:
        return None
    return series.valuation


def _nonzero_depth(g: Graded, level: int) -> int:
    """Highest E_2-power whose coefficient form is nonzero (checked to its Sturm bound)."""
    depths = [j for (w, j), s in g.items() if _first_nonzero(s, groups.sturm_bound(w - 2 * j, level) + 1) is not None]
    return max(depths, default=0)


def _graded_zero(g: Graded, level: int) -> bool | None:
    """True if nonzero; None if every piece vanishes to its Sturm bound (so g = 0)."""
    for (w, j), series in g.items():
        if _first_nonzero(series, groups.sturm_bound(w - 2 * j, level) + 1) is not None:
            return True
    return None


def _space_text(space: dict[str, Any]) -> str:
    group = "SL2(Z)" if space["group"] == "SL2(Z)" else space["group"].replace("Gamma0", "Gamma_0")
    dim = f", dim {space['dimension']}" if "dimension" in space else ""
    if "quasimodular_depth" in space:
        return f"QM_{space['weight']}({group}) (depth {space['quasimodular_depth']})"
    return f"M_{space['weight']}({group}{dim})"


def _how(components: list[dict[str, Any]], cleared: Fraction, level: int) -> str:
    n = sum(c["bound"] + 1 for c in components)
    parts = []
    if cleared:
        parts.append(f"after clearing denominators of weight {_frac_str(cleared)}")
    if len(components) == 1:
        c = components[0]
        parts.append(f"Sturm bound {c['bound']}, {n} coefficient{'s' if n != 1 else ''} compared")
    elif components:
        pieces = ", ".join(
            f"weight {c['weight']}{' x E_2^' + str(c['e2_power']) if c['e2_power'] else ''} to q^{c['bound']}"
            for c in components
        )
        parts.append(f"{len(components)} components ({pieces}), {n} coefficients compared")
    else:
        parts.append("both sides are the same expression")
    return "; ".join(parts)

"""Decide a claim: prove it with a certificate, refute it with a witness, or say why not.

Equalities of forms (docs/method.md#claim-identity): clear denominators, so that ``L = R`` becomes
``P = N_L D_R - N_R D_L = 0`` with ``P`` a polynomial in holomorphic (quasi)modular
atoms; split ``P`` by weight and by power of E_2; each piece lies in
``M_{w-2j}(Gamma_0(N))`` and is zero iff its coefficients ``a_0 .. a_B`` vanish, with ``B``
the Sturm bound (docs/method.md#sturm-bound).  A refutation is then certain, and its witness is the first
exponent at which the author's two sides themselves differ.

Printed expansions are claims about exactly the printed range; they are decided by
computing that range exactly.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from verifier.elaborate import ir
from verifier.elaborate.shift import classify, strip_side
from verifier.forms import registry
from verifier.numbers import QuadraticCharacter
from verifier.prove import certificate, groups, orders
from verifier.prove.evaluate import (
    AtomTable,
    BudgetExceeded,
    CharacterOf,
    Graded,
    graded_add,
    graded_fraction,
    graded_mul,
    laurent_to,
)
from verifier.prove.outcome import Outcome, frac_str
from verifier.series.qseries import QSeries

__all__ = ["Outcome", "Prover", "Setup", "claim_level", "space_of"]

DEFAULT_MAX_TERMS = 50_000
# How far sides with no modular proof are compared (docs/method.md#series-only).
SERIES_TERMS = 500
# Coefficients of weight-k forms to q^n have about k*log2(n) bits: bound terms x weight,
# so that a claim's memory stays in the hundreds of megabytes at most.
MAX_WORK = 20_000_000


_frac_str = frac_str


def _wstr(w: Fraction | None) -> str:
    return "any" if w is None else _frac_str(w)


def claim_level(left: ir.Side, right: ir.Side) -> int:
    """The least common level of every atom of both sides (after rescaling).

    Raises :class:`verifier.forms.registry.NotModular` for an atom modular on no Gamma_0(N).
    A claim with a half-integral weight is on some Gamma_0(4N) (docs/method.md#half-integral-weight).
    """
    level = 1
    half = False
    for side in (left, right):
        for atom in ir.atoms_of(side.expr):
            n = registry.level(atom.key, int(atom.scale), atom.params)
            level = level * n // math.gcd(level, n)
            half = half or (atom.typ.weight is not None and atom.typ.weight.denominator == 2)
    if half and level % 4:
        level *= 4 // math.gcd(level, 4)
    return level


@dataclass(frozen=True)
class Setup:
    """What a proof between forms needs: level, weight after clearing, cusp-order bounds."""

    level: int
    weight: Fraction
    bounds: dict[int, Fraction]

    @property
    def has_poles(self) -> bool:
        """Whether some cusp other than infinity may carry a pole."""
        return any(v < 0 for d, v in self.bounds.items() if d != self.level)

    def bound(self, weight: Fraction) -> int:
        """Largest n to compare for a piece of this weight.

        Holomorphic at every cusp: the Sturm bound floor(k m / 12) (docs/method.md#sturm-bound, #half-integral-weight).
        Otherwise the valence bound floor(k m / 12 - sum_{s != inf} L_s) with L_s the
        lower bounds of the orders, each cusp c/d counted phi(gcd(d, N/d)) times (docs/method.md#poles-at-cusps).
        """
        m = groups.index_gamma0(self.level)
        if not self.has_poles:
            return groups.sturm_bound(weight, self.level)
        total = Fraction(weight) * m / 12
        for d, v in self.bounds.items():
            if d != self.level:
                g = math.gcd(d, self.level // d)
                total -= v * sum(1 for a in range(1, g + 1) if math.gcd(a, g) == 1)
        return math.floor(total)


def claim_weight(left: ir.Side, right: ir.Side) -> Fraction | None:
    """The weight of the claim (of its form sides), None when no side fixes one."""
    for side in (left, right):
        if not side.printed and side.expr.typ.weight is not None:
            return side.expr.typ.weight
    return None


def space_of(
    weight: Fraction | None, level: int, depth: int = 0, character: str = "trivial", holomorphic: bool = True
) -> dict[str, Any]:
    """The certificate's description of a space of forms."""
    space: dict[str, Any] = {
        "weight": _wstr(weight),
        "group": groups.group_name(level),
        "character": character,
    }
    if weight is not None and weight.denominator == 1 and depth == 0 and character == "trivial" and holomorphic:
        space["dimension"] = groups.dim_modular(int(weight), level)
    if depth:
        space["quasimodular_depth"] = depth
    return space


class Prover:
    """Decides claims, sharing one :class:`AtomTable` across a run."""

    def __init__(self, table: AtomTable | None = None, max_terms: int = DEFAULT_MAX_TERMS) -> None:
        self.table = table or AtomTable()
        self.max_terms = max_terms
        self.unit = Fraction(1)
        self.shift = Fraction(0)  # a power of q divided out of both sides (internal units)
        self._last_table: list[list[Any]] = []

    # -- planning -------------------------------------------------------------------
    def precision_needed(self, left: ir.Side, right: ir.Side) -> int:
        """Coefficients a claim will need (used to compute each atom once, large enough)."""
        if not (left.printed or right.printed):
            if classify(left, right) is None:
                return 0
            left, right = strip_side(left), strip_side(right)
        if left.printed or right.printed:
            need = _prefix_range(left, right, self.unit)[1] + 2
            weight = _heaviest(left, right)
        else:
            try:
                setup = self.setup(left, right)
            except registry.NotModular:
                return 0
            weight = setup.weight
            need = setup.bound(weight) + 1
        # A claim over budget is refused before computing; it must not inflate the plan.
        return 0 if need > self.max_terms or need * max(weight, Fraction(12)) > MAX_WORK else need

    # -- deciding -------------------------------------------------------------------
    def _exponent(self, n: int) -> int | str:
        """An internal exponent as the author wrote it (undoing rescaling and the nome)."""
        e = Fraction(n + self.shift) / self.unit
        return int(e) if e.denominator == 1 else f"{e.numerator}/{e.denominator}"

    def _exp(self, n: int) -> str:
        e = self._exponent(n)
        return str(e) if isinstance(e, int) and e >= 0 else f"{{{e}}}"

    def decide(self, left: ir.Side, right: ir.Side, rel: str, unit: Fraction = Fraction(1)) -> Outcome:
        """Decide ``left rel right`` (``rel`` is ``'='`` or ``'!='``).

        ``unit`` converts internal exponents to the author's: the claim was rescaled by T
        and its q is the nome q^(nome), so the author's exponent is n / (T * nome).
        """
        self.unit = unit
        self.shift = Fraction(0)
        try:
            if left.printed or right.printed:
                return self._prefix(left, right, rel)
            common = classify(left, right)
            if common is None:
                return self._series(left, right, rel)
            # Both sides are q^c times forms: decide the forms (docs/method.md#products).
            self.shift = common
            left, right = strip_side(left), strip_side(right)
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
        except registry.NotModular as exc:
            kind = "prefix" if (left.printed or right.printed) else ("equality" if rel == "=" else "inequality")
            return Outcome("error", kind, f"not modular: {exc}", code="not-modular")

    def setup(self, left: ir.Side, right: ir.Side) -> Setup:
        """Level, characters and cusp-order bounds of a claim between forms."""
        level = claim_level(left, right)
        bounds = orders.difference_bounds(left.expr, right.expr, level)
        return Setup(level, _proof_weight(left, right), bounds)

    def _forms(self, left: ir.Side, right: ir.Side, rel: str) -> Outcome:
        kind = "equality" if rel == "=" else "inequality"
        setup = self.setup(left, right)
        level = setup.level
        weight_p = setup.weight
        need = setup.bound(weight_p) + 1
        if need > self.max_terms or need * max(weight_p, Fraction(12)) > MAX_WORK:
            raise BudgetExceeded(need)
        depth_typed = max(left.expr.typ.depth, right.expr.typ.depth)
        if setup.has_poles and depth_typed:
            return Outcome(
                "unproven",
                kind,
                "the claim mixes E_2 with forms that have poles at cusps; no proof method is implemented for that",
                code="unsupported",
            )

        def chars(atom: ir.Atom) -> int:
            return int(registry.character(atom.key, int(atom.scale), atom.params, level).kernel)

        nl, dl, nr, dr, p = self._cleared(left, right, need, chars)
        for den, side in ((dl, left), (dr, right)):
            # A known nonzero coefficient proves a denominator nonzero; "identically zero" needs
            # every piece to vanish through a bound valid for the denominator itself.
            if any(not s.is_zero() for s in den.values()):
                continue
            den_setup = Setup(level, side.expr.typ.den_weight, orders.fraction_bounds(side.expr, level)[1])
            known = min((s.prec for s in den.values()), default=need)
            if all(den_setup.bound(w - 2 * j) < known for (w, j, _) in den):
                return Outcome(
                    "error",
                    kind,
                    f"{side.expr.text} divides by a form that is identically zero",
                    code="zero-division",
                    hint="check the denominator",
                )
            return Outcome(
                "unproven",
                kind,
                f"could not decide whether the denominator of {side.expr.text} vanishes",
                code="unsupported",
            )
        components: list[dict[str, Any]] = []
        pieces: list[dict[str, Any]] = []
        differing: list[tuple[Fraction, int, int]] = []
        terms = 0
        for (w, j, kernel), series in sorted(p.items(), key=lambda kv: (kv[0][0], -kv[0][1], kv[0][2])):
            wt = w - 2 * j
            b = setup.bound(wt)
            n = _first_nonzero(series, b + 1)
            start = min(0, series.valuation)
            terms += b + 1 - start
            chi = QuadraticCharacter(kernel)
            comp: dict[str, Any] = {
                "weight": _frac_str(wt),
                "e2_power": j,
                "character": chi.name,
                "bound": b,
                "dimension": groups.dim_modular(int(wt), level)
                if wt.denominator == 1 and chi.is_trivial and not setup.has_poles
                else None,
            }
            if start < 0:
                comp["from"] = start
            components.append(comp)
            pieces.append({"weight": _frac_str(wt), "e2_power": j, "character": kernel, "bound": b, "from": start})
            if n is not None:
                differing.append((wt, j, n))
        wl, wr = left.expr.typ.weight, right.expr.typ.weight
        # The E_2-depth actually present: a numerator piece that vanishes through its
        # bound is zero, so E_2-parts that cancel (2E_2(2tau) - E_2) do not count.
        depth = max((_nonzero_depth(g, setup) for g in (nl, nr)), default=0)
        weight = wl if wl is not None else wr
        cleared = left.expr.typ.den_weight + right.expr.typ.den_weight
        top = max((Fraction(c["weight"]) for c in components), default=Fraction(0))
        characters = sorted({c["character"] for c in components if Fraction(c["weight"]) == top}) or ["trivial"]
        character = characters[0] if len(characters) == 1 else "mixed: " + ", ".join(characters)
        space = space_of(weight, level, depth, character, not setup.has_poles)
        proof_space = space
        if cleared:
            # Quotients are meromorphic, so the claim's weight-k "space" has no dimension;
            # the certificate adds the space the cleared identity N_L D_R = N_R D_L lives in.
            space.pop("dimension", None)
            space["meromorphic"] = True
            proof_space = space_of(weight_p, level, depth, character, not setup.has_poles)
            space["cleared_space"] = proof_space
        if setup.has_poles:
            space["poles_at_cusps"] = True
            space["cusp_order_bounds"] = {str(d): _frac_str(v) for d, v in setup.bounds.items() if d != level}
        method = "valence" if setup.has_poles else "sturm"
        bound = max((c["bound"] for c in components), default=0)
        how = _how(components, cleared, setup)
        if not differing:
            verdict = "proved" if kind == "equality" else "refuted"
            text = "equal" if kind == "equality" else "the two sides are equal"
            outcome = Outcome(
                verdict,
                kind,
                f"{text} in {_space_text(proof_space)}: {how}",
                space,
                method,
                bound,
                terms,
                components=components,
            )
            if verdict == "proved":
                kernels = sorted({p["character"] for p in pieces if Fraction(p["weight"]) == top})
                facts: dict[str, Any] = {
                    "space": {
                        "weight": _wstr(weight),
                        "level": level,
                        "character": kernels[0] if len(kernels) == 1 else (kernels or 1),
                        "proof_weight": _frac_str(weight_p),
                        "cleared_weight": _frac_str(cleared),
                    },
                    "pieces": pieces,
                    "bound": bound,
                    "index": groups.index_gamma0(level),
                }
                if setup.has_poles:
                    facts["cusp_order_bounds"] = {str(d): _frac_str(v) for d, v in setup.bounds.items() if d != level}
                coefficients = self._coefficients(left, bound + 1)
                if coefficients is not None:
                    facts["coefficients"] = coefficients
                outcome.certificate = certificate.make(method, "=", left, right, self.unit, **facts)
            return outcome
        self._last_table = []
        witness = self._witness(left, right, need)
        notes = ""
        if wl is not None and wr is not None and wl != wr:
            notes = f"; the sides have different weights ({_wstr(wl)} and {_wstr(wr)})"
        if witness is None:
            # A component judged nonzero, yet the two sides agree as far as they were computed:
            # without a coefficient that differs there is no verdict of difference.
            wt, j, n = differing[0]
            part = f"the weight-{_frac_str(wt)} part{' of E_2^' + str(j) if j else ''}"
            return Outcome(
                "unproven",
                kind,
                f"{part} of the cleared difference looks nonzero at q^{self._exp(n)}, but the two sides "
                f"agree through q^{self._exp(self.max_terms - 1)} (or could not be expanded that far); "
                "no coefficient witnesses a difference",
                space,
                method,
                bound,
                terms,
                components=components,
                code="no-witness",
                hint="please report this claim: qreferee's split into components disagrees with the expansions",
            )
        n_w, left_c, right_c = witness
        msg = f"coefficients of q^{self._exp(n_w)} differ: left {_frac_str(left_c)}, right {_frac_str(right_c)}{notes}"
        fd = {"n": self._exponent(n_w), "left": _frac_str(left_c), "right": _frac_str(right_c)}
        verdict = "refuted" if kind == "equality" else "proved"
        cert = None
        if kind == "inequality":
            msg = "the sides differ: " + msg
            method = "witness"
            cert = certificate.make(
                "witness", "!=", left, right, self.unit, witness=self._witness_record(n_w, left_c, right_c)
            )
        return Outcome(
            verdict, kind, msg, space, method, bound, terms, fd, components, table=self._last_table, certificate=cert
        )

    def _coefficients(self, side: ir.Side, stop: int) -> dict[str, Any] | None:
        """The certificate's record of a side's coefficients below q^stop (None over budget)."""
        try:
            a = laurent_to(side.expr, stop, self.table, self.max_terms * 2)
        except BudgetExceeded:
            return None
        start = min(0, a.valuation)
        return certificate.coefficient_record(start, a.coefficients(start, stop))

    @staticmethod
    def _witness_record(n: int, left: Fraction, right: Fraction) -> dict[str, Any]:
        return {"n": n, "left": _frac_str(left), "right": _frac_str(right)}

    def _cleared(
        self, left: ir.Side, right: ir.Side, need: int, chars: CharacterOf
    ) -> tuple[Graded, Graded, Graded, Graded, Graded]:
        """N_L, D_L, N_R, D_R and P = N_L D_R - N_R D_L, every piece known through q^(need-1).

        Pieces with poles at infinity lose precision in products, so the working precision
        is raised until every piece is known far enough.
        """
        work = need
        for _ in range(8):
            nl, dl = graded_fraction(left.expr, work, self.table, chars)
            nr, dr = graded_fraction(right.expr, work, self.table, chars)
            p = graded_add(graded_mul(nl, dr), graded_mul(nr, dl), -1)
            known = min((s.prec for g in (nl, dl, nr, dr, p) for s in g.values()), default=need)
            if known >= need:
                return nl, dl, nr, dr, p
            work += need - known
            if work > self.max_terms * 2:
                break
        raise BudgetExceeded(work)

    def _prefix_space(self, left: ir.Side, right: ir.Side) -> dict[str, Any] | None:
        """The space of the form side of a printed-expansion claim, when it has one."""
        try:
            level = claim_level(left, right)

            def chars(atom: ir.Atom) -> int:
                return int(registry.character(atom.key, int(atom.scale), atom.params, level).kernel)

            side = left if not left.printed else right
            names = _character_names(graded_fraction(side.expr, 1, self.table, chars)[0])
        except (registry.NotModular, TypeError):
            return None
        depth = max(left.expr.typ.depth, right.expr.typ.depth)
        character = names[0] if len(names) == 1 else ("trivial" if not names else "mixed: " + ", ".join(names))
        return space_of(claim_weight(left, right), level, depth, character)

    def _table(self, a: QSeries, b: QSeries, n: int, start: int, before: int = 3, after: int = 8) -> list[list[Any]]:
        """Rows [exponent, left, right] around the first difference, within the known range."""
        lo = max(start, n - before)
        hi = min(a.prec, b.prec, n + after + 1)
        return [[self._exponent(m), _frac_str(a[m]), _frac_str(b[m])] for m in range(lo, hi)]

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
                self._last_table = self._table(a, b, n, start)
                return n, a[n], b[n]
            if stop >= self.max_terms:
                return None
            stop = min(stop * 2, self.max_terms)

    def _series(self, left: ir.Side, right: ir.Side, rel: str) -> Outcome:
        """Sides with no modular proof, compared coefficient by coefficient (docs/method.md#series-only).

        A difference is a certain refutation (of ``=``; a proof of ``\\neq``); agreement is
        only evidence, so the verdict is then ``unproven`` with the range compared.
        """
        kind = "equality" if rel == "=" else "inequality"
        # SERIES_TERMS of the author's exponents (internal exponents are T * nome times larger).
        stop = min(math.ceil(SERIES_TERMS * self.unit) + 1, self.max_terms)
        a = laurent_to(left.expr, stop, self.table, self.max_terms * 2)
        b = laurent_to(right.expr, stop, self.table, self.max_terms * 2)
        start = min(0, a.valuation, b.valuation)
        n = a.first_difference(b, start, stop)
        terms = stop - start
        rng = f"q^{self._exp(start)}..q^{self._exp(stop - 1)}"
        reason = (
            "no modular proof applies (a product that is no eta quotient, a sum with no modular form, "
            "or unequal powers of q)"
        )
        if n is not None:
            fd = {"n": self._exponent(n), "left": _frac_str(a[n]), "right": _frac_str(b[n])}
            msg = f"coefficients of q^{self._exp(n)} differ: left {fd['left']}, right {fd['right']}"
            table = self._table(a, b, n, start)
            if rel == "=":
                return Outcome("refuted", kind, msg, None, "series", None, terms, fd, table=table)
            return Outcome(
                "proved",
                kind,
                "the sides differ: " + msg,
                None,
                "series",
                None,
                terms,
                fd,
                table=table,
                relation="!=",
                certificate=certificate.minimal("series", kind, None, None),
            )
        return Outcome(
            "unproven",
            kind,
            f"the sides agree on {rng}; {reason}, so this is evidence, not a proof",
            None,
            "series",
            None,
            terms,
            code="series-only",
            hint="state the claim with eta quotients, or as a printed expansion with + O(q^n), to get a proof",
            relation=rel if rel == "=" else "!=",
        )

    def _prefix(self, left: ir.Side, right: ir.Side, rel: str) -> Outcome:
        start_hint, stop, exact_range = _prefix_range(left, right, self.unit)
        weight = claim_weight(left, right)
        space = self._prefix_space(left, right) if weight is not None else None
        heaviest = _heaviest(left, right)
        if stop > self.max_terms or stop * max(heaviest, Fraction(12)) > MAX_WORK:
            raise BudgetExceeded(stop)
        a = laurent_to(left.expr, stop, self.table, self.max_terms * 2)
        b = laurent_to(right.expr, stop, self.table, self.max_terms * 2)
        start = min(0, a.valuation, b.valuation, start_hint)
        n = a.first_difference(b, start, stop)
        terms = stop - start
        rng = f"q^{self._exp(start)}..q^{self._exp(stop - 1)}"
        if n is not None:
            fd = {"n": self._exponent(n), "left": _frac_str(a[n]), "right": _frac_str(b[n])}
            msg = f"coefficients of q^{self._exp(n)} differ: left {fd['left']}, right {fd['right']}"
            table = self._table(a, b, n, start)
            if rel == "=":
                return Outcome("refuted", "prefix", msg, space, "expansion", None, terms, fd, table=table)
            return Outcome(
                "proved",
                "prefix",
                "the expansions differ: " + msg,
                space,
                "expansion",
                None,
                terms,
                fd,
                table=table,
                relation="!=",
                certificate=certificate.make(
                    "witness", "!=", left, right, self.unit, witness=self._witness_record(n, a[n], b[n])
                ),
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
                certificate=certificate.make(
                    "expansion",
                    "=",
                    left,
                    right,
                    self.unit,
                    coefficients=certificate.coefficient_record(start, a.coefficients(start, stop)),
                ),
            )
        return Outcome(
            "refuted", "prefix", f"the expansions agree on {rng}", space, "expansion", None, terms, relation="!="
        )


def _heaviest(left: ir.Side, right: ir.Side) -> Fraction:
    """Largest weight (with denominators) among the sides: sizes the coefficients."""
    return max(abs(s.expr.typ.weight or Fraction(0)) + s.expr.typ.den_weight for s in (left, right))


def _character_names(g: Graded) -> list[str]:
    return sorted({QuadraticCharacter(k).name for (_, _, k) in g})


def _proof_weight(left: ir.Side, right: ir.Side) -> Fraction:
    ws = [w for w in (left.expr.typ.weight, right.expr.typ.weight) if w is not None]
    return max(ws, default=Fraction(0)) + left.expr.typ.den_weight + right.expr.typ.den_weight


def _prefix_range(left: ir.Side, right: ir.Side, unit: Fraction = Fraction(1)) -> tuple[int, int, bool]:
    """(lowest exponent to compare, stop, whether the range is what the claim states).

    ``unit`` is the claim's rescaling (exponents are those of q^{1/unit}): with no truncation,
    at least the first ten powers of the author's q are compared.
    """
    truncs = [s.truncation for s in (left, right) if s.truncation is not None]
    if truncs:
        return 0, min(truncs), True
    # No truncation anywhere: compare well past the printed degree and any Sturm bound.
    deg = math.ceil(max(left.degree, right.degree))
    w = claim_weight(left, right) or Fraction(0)
    try:
        level = claim_level(left, right)
    except registry.NotModular:
        level = 1
    b = groups.sturm_bound(w + left.expr.typ.den_weight + right.expr.typ.den_weight, level)
    return 0, max(deg + 2, b + 2, math.ceil(10 * unit)), False


def _first_nonzero(series: QSeries, stop: int) -> int | None:
    if series.is_zero() or series.valuation >= stop:
        return None
    return series.valuation


def _nonzero_depth(g: Graded, setup: Setup) -> int:
    """Highest E_2-power whose coefficient form is nonzero (checked to its bound)."""
    depths = [j for (w, j, _), s in g.items() if _first_nonzero(s, setup.bound(w - 2 * j) + 1) is not None]
    return max(depths, default=0)


def _space_text(space: dict[str, Any]) -> str:
    group = "SL2(Z)" if space["group"] == "SL2(Z)" else space["group"].replace("Gamma0", "Gamma_0")
    chi = "" if space["character"] == "trivial" else f", {space['character']}"
    dim = f", dim {space['dimension']}" if "dimension" in space else ""
    name = "M^!" if space.get("poles_at_cusps") else "M"
    if "quasimodular_depth" in space:
        return f"QM_{space['weight']}({group}{chi}) (depth {space['quasimodular_depth']})"
    return f"{name}_{space['weight']}({group}{chi}{dim})"


def _how(components: list[dict[str, Any]], cleared: Fraction, setup: Setup) -> str:
    n = sum(c["bound"] + 1 - c.get("from", 0) for c in components)
    parts = []
    if cleared:
        parts.append(f"after clearing denominators of weight {_frac_str(cleared)}")
    if setup.has_poles:
        parts.append("poles at cusps bounded by the orders of the eta quotients (valence formula)")
    bound_name = "valence bound" if setup.has_poles else "Sturm bound"
    if len(components) == 1:
        c = components[0]
        parts.append(f"{bound_name} {c['bound']}, {n} coefficient{'s' if n != 1 else ''} compared")
    elif components:
        pieces = ", ".join(
            f"weight {c['weight']}{' x E_2^' + str(c['e2_power']) if c['e2_power'] else ''} to q^{c['bound']}"
            for c in components
        )
        parts.append(f"{len(components)} components ({pieces}), {n} coefficients compared")
    else:
        parts.append("both sides are the same expression")
    return "; ".join(parts)

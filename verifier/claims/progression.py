"""Arithmetic progressions of coefficients of eta-type products, decided by U_m.

Claims (docs/method.md#progressions), for ``F = sum a(n) q^n = prod f_delta^{r_delta}``:

* identities ``sum_{n >= 0} a(mn + t) q^n = G`` with G a sum of products
  ``gamma q^e prod f_delta^{s_delta}`` (one component of a dissection is such a claim);
* congruences ``a(mn + t) = 0 (mod M)`` for all n >= 0.

The proof: choose a multiplier ``E = prod eta(delta tau)^{u_delta}`` so that
``h = prod eta(delta tau)^{r_delta} * E(m tau)`` is a holomorphic eta quotient of integral
weight k on Gamma_0(N) with character chi (Gordon-Hughes-Newman, Ligozat) and
``U_m h = q^{(t+e)/m} P_E(q) sum a(mn+t) q^n`` (e the order of h at infinity).  Then U_m h
lies in M_k(Gamma_0(N'), chi) with N' = N times the primes of m not dividing N, and
Sturm's theorem (modulo M for congruences; the valence bound when a term of the claimed
side has poles at cusps) reduces the claim to finitely many coefficients.  Every proof is
cross-checked against the direct coefficients of the progression; a disagreement is an
internal error, never a proof.  Refutations are found by direct computation and carry the
first failing n with both values.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any

from flint import fmpz_poly, nmod_poly

from verifier.claims.kind import ParsedClaim, Reading, Unread, certified
from verifier.claims.products import Mono
from verifier.elaborate.elaborator import Problem
from verifier.forms.eta import EtaQuotient
from verifier.numbers import QuadraticCharacter, divisors, euler_phi, prime_factors
from verifier.parse.ast import NClass
from verifier.prove.groups import group_name, index_gamma0, sturm_bound
from verifier.prove.outcome import Outcome, Witness, frac_str
from verifier.prove.prover import Prover

DIRECT = 200  # progression terms compared directly before any proof is attempted
DIRECT_LIMIT = 200_000  # coefficients of F computed when looking for a counterexample
EXACT_SPAN = 20_000  # coefficients of F an identity search compares exactly when the screen finds no failure
MAX_BOUND = 60_000  # largest target bound attempted (the budget of one claim)
_SMALL = range(-4, 5)  # exponents tried for eta(delta tau), delta > 1, in the multiplier
_TWELFTHS = range(-1, 4)  # eta(tau)^(24 j) factors tried on top of the least exponent


class Internal(Exception):
    """A proof and the direct coefficients disagree (a bug; never reported as proved)."""


@dataclass(frozen=True)
class Plan:
    """A multiplier E and the spaces the proof uses."""

    multiplier: EtaQuotient  # E(tau)
    h: EtaQuotient  # prod eta(delta tau)^r * E(m tau)
    weight: int
    level: int  # least GHN level of h
    character: QuadraticCharacter
    target_level: int  # level of U_m h (and of the claimed side)
    bound: int  # largest exponent compared
    e: int  # order of h at infinity
    k: int  # (t + e) / m: U_m h = q^k P_E(q) sum a(mn+t) q^n
    terms: tuple[tuple[Fraction, EtaQuotient], ...] = ()  # gamma_i E(tau) prod eta^{s_i}
    cusp_bounds: dict[int, Fraction] = field(default_factory=dict)  # lower bounds of orders, by d
    unit: EtaQuotient | None = None  # U = 1 (mod the modulus), a factor of h (congruences only)

    def record(self, m: int, compared: int, modulus: int | None) -> dict[str, Any]:
        """The JSON ``progression`` object of a proved claim."""
        return {
            "m": m,
            "multiplier": self.multiplier.label(),
            "unit": self.unit.label() if self.unit is not None else None,
            "form": {
                "eta": self.h.label(),
                "weight": self.weight,
                "level": self.level,
                "character": self.character.name,
            },
            "target": {
                "weight": self.weight,
                "level": self.target_level,
                "character": self.character.name,
                "sturm_bound": self.bound,
            },
            "coefficients_compared": compared,
            "modulus": modulus,
        }


def raised_level(level: int, m: int) -> int:
    """The level of U_m f for f on Gamma_0(level): times each prime of m not dividing it."""
    return level * math.prod(p for p in prime_factors(m) if level % p)


def compatible(exps: dict[int, int], m: int, t: int) -> bool:
    """Whether some eta quotient E makes the class t mod m reachable: m | 24 t + s_F."""
    s = sum(d * r for d, r in exps.items())
    return (24 * t + s) % m == 0


def _multipliers(exps: dict[int, int], m: int, t: int) -> list[EtaQuotient]:
    """Candidate multipliers E with the right q-order of h (e integral, e = -t mod m)."""
    s = sum(d * r for d, r in exps.items())
    big_l = math.lcm(*exps) if exps else 1
    deltas = [d for d in divisors(big_l) if d > 1][:3]
    out = []
    for small in itertools.product(_SMALL, repeat=len(deltas)):
        w_small = sum(d * u for d, u in zip(deltas, small, strict=True))
        # e = (s + m w) / 24 must be an integer = -t mod m; solve for u_1 modulo 24.
        base = [
            u1
            for u1 in range(24)
            if (s + m * (w_small + u1)) % 24 == 0 and ((s + m * (w_small + u1)) // 24 + t) % m == 0
        ]
        for u1 in base:
            for j in _TWELFTHS:
                u = {1: u1 + 24 * j, **dict(zip(deltas, small, strict=True))}
                out.append(EtaQuotient.of(u))
    return out


def plan(
    exps: dict[int, int],
    m: int,
    t: int,
    rhs: tuple[Mono, ...] | None,
    congruence: bool = False,
    modulus: int | None = None,
) -> Plan | str:
    """The multiplier with the least bound for which the proof applies, or why none does.

    ``rhs`` is the claimed sum of products (None for a congruence to 0).  For a congruence
    to a nonzero ``rhs`` (``congruence``) only plans whose terms are holomorphic at every
    cusp are kept: Sturm's theorem modulo M is applied to a form, not to a quotient.  For a
    congruence to 0 modulo a prime power (``modulus``), when no multiplier alone makes h a
    holomorphic form of integral weight, h is also multiplied by a unit U = 1 (mod M)
    (:func:`units`, docs/method.md#progression-units).
    """
    if not compatible(exps, m, t):
        s = sum(d * r for d, r in exps.items())
        return (
            f"the class {t} mod {m} is not reachable by U_{m} on an eta quotient "
            f"(m does not divide 24t + s_F = {24 * t + s}); sieving it needs characters"
        )
    f_eta = EtaQuotient.of(exps)
    best: Plan | None = None
    reasons: list[str] = []
    over: list[int] = []  # least bounds of the multipliers whose target space is beyond the budget
    for mult in _multipliers(exps, m, t):
        try:
            p = _try(f_eta, mult, m, t, rhs, reasons)
        except _OverBudget as exc:
            over.append(exc.least)
            continue
        if p is not None and congruence and p.cusp_bounds:
            reasons.append("every multiplier leaves a term of the claimed side with a pole at a cusp")
            p = None
        if p is not None and (best is None or p.bound < best.bound):
            best = p
    if best is None and rhs is None and modulus is not None:
        best = _plan_with_unit(f_eta, exps, m, t, modulus)
        if best is None and len(prime_factors(modulus)) > 1:
            reasons.append(
                f"no multiplier makes h a holomorphic form of integral weight, and a unit = 1 modulo {modulus} "
                "is sought only for a prime power"
            )
    if best is None and over:
        return f"the target space's bound (at least {min(over)}) exceeds the budget ({MAX_BOUND})"
    if best is None:
        why = reasons[0] if reasons else "no multiplier makes h a holomorphic form of integral weight"
        return why
    return best


def _within_budget(weight: int, target: int) -> None:
    """Raise :class:`_OverBudget` when M_k(Gamma_0(target)) already has a bound beyond MAX_BOUND.

    Checked before the cusps of the target level are enumerated (poles at cusps only raise
    the bound), so that a level of 10^12 costs a factorisation, not a walk over its divisors.
    """
    least = weight * index_gamma0(target) // 12
    if least > MAX_BOUND:
        raise _OverBudget(least)


class _OverBudget(Exception):
    """A multiplier whose target space has a bound beyond MAX_BOUND, found before its cusps are enumerated."""

    def __init__(self, least: int) -> None:
        super().__init__(least)
        self.least = least


MAX_UNIT_POWER = 4  # j in U_d^j tried
MAX_UNIT_LEVELS = 6  # the least divisors d of m lcm(delta) tried in U_d


def units(modulus: int, m: int, exps: dict[int, int]) -> list[EtaQuotient]:
    """Eta quotients U = 1 (mod M) with q-offset 0, for a prime power M = l^a (else none).

    ``U_d = eta(d tau)^l / eta(d l tau) = f_d^l / f_{dl}`` is 1 modulo l, because
    ``(1 - x)^l = 1 - x^l (mod l)`` (Frobenius) gives ``f_d^l = f_{dl} (mod l)`` and f_{dl} is a
    unit of Z[[q]].  Writing ``U_d = 1 + l X``, the binomial theorem gives
    ``U_d^(l^(a-1)) = 1 (mod l^a)``.  Candidates: ``U_d^(j l^(a-1))`` for the least few d
    dividing m lcm(delta) and ``1 <= j <= 4``, then ``U_1^(l^(a-1)) U_d^(l^(a-1))`` for those d.
    """
    primes = prime_factors(modulus)
    if len(primes) != 1:
        return []
    ell = primes[0]
    power = modulus // ell
    big_l = math.lcm(*exps) if exps else 1
    ds = divisors(m * big_l)[:MAX_UNIT_LEVELS]

    def unit(d: int, j: int) -> EtaQuotient:
        return EtaQuotient.of({d: ell * j * power, d * ell: -j * power})

    out = [unit(d, j) for d in ds for j in range(1, MAX_UNIT_POWER + 1)]
    out += [unit(1, 1) * unit(d, 1) for d in ds if d > 1]
    return out


def _plan_with_unit(f_eta: EtaQuotient, exps: dict[int, int], m: int, t: int, modulus: int) -> Plan | None:
    """The plan of least bound with h = F(tau) E(m tau) U(tau), U from :func:`units`, or None."""
    best: Plan | None = None
    candidates = _multipliers(exps, m, t)
    for unit in units(modulus, m, exps):
        for mult in candidates:
            try:
                p = _try(f_eta, mult, m, t, None, [], unit)
            except _OverBudget:
                continue
            if p is not None and (best is None or p.bound < best.bound):
                best = p
    return best


def _try(
    f_eta: EtaQuotient,
    mult: EtaQuotient,
    m: int,
    t: int,
    rhs: tuple[Mono, ...] | None,
    reasons: list[str],
    unit: EtaQuotient | None = None,
) -> Plan | None:
    h = f_eta * mult.scaled(m)
    if unit is not None:
        assert rhs is None and unit.s == 0  # U changes h only modulo M and keeps its q-order
        h = h * unit
    if h.is_half_integral or h.weight < 1 or h.s % 24:
        return None
    level = h.least_level()
    if level is None:
        return None
    _within_budget(int(h.weight), raised_level(level, m))
    if not h.is_holomorphic(level):
        return None
    e = h.s // 24
    if (t + e) % m or e < 0:
        return None
    k_weight = int(h.weight)
    character = h.character(level)
    target = raised_level(level, m)
    terms: list[tuple[Fraction, EtaQuotient]] = []
    cusp_bounds: dict[int, Fraction] = {}
    if rhs:
        c = Fraction(f_eta.s, 24)
        for mono in rhs:
            lam = Fraction(t, m) + c / m - (Fraction(mono.s, 24) - mono.shift)
            if lam != 0:
                reasons.append(
                    f"the term {mono.text()} has q-shift lambda = {frac_str(lam)} != 0 (its q-power does not "
                    "match the progression); such a term must vanish on its own"
                )
                return None
            term = mult * EtaQuotient.of(dict(mono.exps))
            if term.weight != k_weight:
                reasons.append(f"the term {mono.text()} has weight {term.weight} after multiplying, not {k_weight}")
                return None
            term_level = term.least_level()
            if term_level is None:
                reasons.append(f"the term {mono.text()} is not an eta quotient on any Gamma_0(N)")
                return None
            target = math.lcm(target, term_level)
            terms.append((mono.coeff, term))
    _within_budget(k_weight, target)
    if rhs:
        for _, term in terms:
            if term.level_failure(target) is not None:
                return None
            if term.character(target).kernel != character.kernel:
                reasons.append(
                    f"a term of the claimed side has character {term.character(target).name}, not {character.name}"
                )
                return None
        for d in divisors(target):
            if d == target:
                continue
            low = min([Fraction(0)] + [term.order_at_cusp(d, target) for _, term in terms])
            if low < 0:
                cusp_bounds[d] = low
    pole_sum = sum(
        (low * euler_phi(math.gcd(d, target // d)) for d, low in cusp_bounds.items()),
        Fraction(0),
    )
    bound = math.floor(Fraction(k_weight * index_gamma0(target), 12) - pole_sum)
    if not cusp_bounds:
        assert bound == sturm_bound(k_weight, target)
    return Plan(mult, h, k_weight, level, character, target, bound, e, (t + e) // m, tuple(terms), cusp_bounds, unit)


# -- coefficients -------------------------------------------------------------------


def product_coefficients(exps: dict[int, int], count: int) -> list[int]:
    """The first ``count`` coefficients of ``prod f_delta^{r_delta}`` (exact integers)."""
    if count <= 0:
        return []
    poly = EtaQuotient.of(exps).product_poly(count)
    return _padded(poly, count)


def product_residues(exps: dict[int, int], count: int, modulus: int) -> list[int]:
    """The first ``count`` coefficients of ``prod f_delta^{r_delta}`` modulo ``modulus``.

    The numerator and denominator of :meth:`EtaQuotient.product_parts` (small integers) are
    reduced modulo M, and the denominator is inverted in (Z/M)[q] by FLINT's Newton
    iteration (its constant term is 1, a unit modulo any M, prime or not).
    """
    if count <= 0:
        return []
    top, bottom = (nmod_poly(part, modulus) for part in EtaQuotient.of(exps).product_parts(count))
    result = top if bottom.is_one() else bottom.inverse_series_trunc(count).mul_low(top, count)
    out = [int(c) for c in result.coeffs()[:count]]
    return out + [0] * (count - len(out))


def _padded(poly: fmpz_poly, count: int) -> list[int]:
    coeffs = [int(c) for c in poly.coeffs()[:count]]
    return coeffs + [0] * (count - len(coeffs))


class Progression:
    """``a(mn + t)`` for ``F = prod f_delta^{r_delta}``, with cached coefficients of F."""

    def __init__(self, exps: dict[int, int], m: int, t: int) -> None:
        self.exps, self.m, self.t = exps, m, t
        self._coeffs: list[int] = []
        self._residues: tuple[list[int], int] = ([], 0)

    def values(self, count: int, modulus: int | None = None) -> list[int]:
        """``a(mn + t)`` for ``0 <= n < count`` (residues in [0, M) when a modulus is given)."""
        need = self.m * (count - 1) + self.t + 1 if count > 0 else 0
        if modulus is not None:
            if self._residues[1] != modulus or len(self._residues[0]) < need:
                have = len(self._residues[0]) if self._residues[1] == modulus else 0
                self._residues = (product_residues(self.exps, max(need, 2 * have), modulus), modulus)
            return self._residues[0][self.t : need : self.m]
        if len(self._coeffs) < need:
            self._coeffs = product_coefficients(self.exps, max(need, 2 * len(self._coeffs)))
        return self._coeffs[self.t : need : self.m]

    def exact(self, n: int) -> int:
        """The exact value a(mn + t)."""
        return self.values(n + 1)[n]


def sum_coefficients(terms: tuple[Mono, ...], count: int) -> list[Fraction] | list[int]:
    """The first ``count`` coefficients of a sum of products with integral q-shifts.

    Integers when every coefficient of the sum is an integer, else exact fractions.
    """
    den = math.lcm(*(m.coeff.denominator for m in terms)) if terms else 1
    total = fmpz_poly([])
    for mono in terms:
        if mono.shift.denominator != 1:
            raise ValueError(f"{mono.text()} has a fractional power of q")
        shift = int(mono.shift)
        if shift >= count:
            continue
        if shift < 0:
            raise ValueError(f"{mono.text()} has a negative power of q")
        body = EtaQuotient.of(dict(mono.exps)).product_poly(count - shift)
        scaled = body * int(mono.coeff * den)
        total += scaled.left_shift(shift) if shift else scaled
    values = _padded(total, count)
    if den == 1:
        return values
    return [Fraction(v, den) for v in values]


def u_operator(h: EtaQuotient, m: int, count: int, modulus: int | None = None) -> list[int]:
    """The coefficients of q^0 .. q^(count-1) of U_m h, from h's own expansion (mod M if given)."""
    e = h.s // 24
    length = max(m * (count - 1) + 1 - e, 0)
    if modulus is None:
        body = product_coefficients(dict(h.exponents), length)
    else:
        body = product_residues(dict(h.exponents), length, modulus)
    full = [0] * e + body
    return [full[m * n] if m * n < len(full) else 0 for n in range(count)]


def cross_check(prog: Progression, p: Plan, count: int, modulus: int | None = None) -> list[int]:
    """U_m h computed from h must equal q^k P_E(q) sum a(mn+t) q^n (exactly, or modulo M).

    With a unit U in h (congruences only) the equality holds modulo M, since U = 1 (mod M);
    U itself is checked to be 1 modulo M through the same range.

    Returns the coefficients of U_m h.
    """
    direct = prog.values(count, modulus)
    if p.unit is not None:
        assert modulus is not None  # U = 1 only modulo M
        if product_residues(dict(p.unit.exponents), count, modulus) != [1] + [0] * (count - 1):
            raise Internal(f"the unit {p.unit.label()} is not 1 modulo {modulus} through q^{count - 1}")
    if modulus is None:
        pe = product_coefficients(dict(p.multiplier.exponents), count)
        expected = _padded(fmpz_poly(direct).mul_low(fmpz_poly(pe), count), count)
    else:
        pe = product_residues(dict(p.multiplier.exponents), count, modulus)
        prod = nmod_poly(direct, modulus).mul_low(nmod_poly(pe, modulus), count)
        expected = [int(c) for c in prod.coeffs()] + [0] * count
    expected_list = ([0] * p.k + expected)[:count]
    from_h = u_operator(p.h, prog.m, count, modulus)
    if expected_list != from_h:
        raise Internal("U_m h and the direct coefficients of the progression disagree")
    return from_h


# -- decisions -----------------------------------------------------------------------


def first_failure(values: list[int], targets: list[Fraction] | list[int] | None, modulus: int | None) -> int | None:
    """The first index where ``values`` differs from ``targets`` (0 when None), modulo ``modulus``."""
    for n, a in enumerate(values):
        b = targets[n] if targets is not None else 0
        if modulus is None:
            if a != b:
                return n
        elif isinstance(b, int):
            if (a - b) % modulus:
                return n
        elif Witness(n, Fraction(a), b, modulus).differs():
            return n
    return None


def refuted(kind: str, what: str, n: int, a: int, b: Fraction, modulus: int | None) -> Outcome:
    """A refutation with the first failing n and both values (residues for congruences)."""
    w = Witness(n, Fraction(a), b, modulus)
    if modulus is not None:
        msg = f"fails at n = {n}: {what} = {a}, which is {a % modulus} modulo {modulus}, not {frac_str(b % modulus)}"
    else:
        msg = f"fails at n = {n}: {what} = {a}, but the claimed side has {frac_str(b)}"
    return Outcome("refuted", kind, msg, method="computation", first_difference=w.to_dict(), terms_compared=n + 1)


SCREEN_PRIME = 2**61 - 1  # identities are screened modulo this prime before exact values are computed


def sum_residues(terms: tuple[Mono, ...], count: int, modulus: int) -> list[int] | None:
    """:func:`sum_coefficients` modulo a prime; None if a coefficient's denominator is divisible by it."""
    total = [0] * count
    for mono in terms:
        if mono.shift.denominator != 1 or mono.shift < 0:
            raise ValueError(f"{mono.text()} is not a power series term")
        if mono.coeff.denominator % modulus == 0:
            return None
        gamma = mono.coeff.numerator * pow(mono.coeff.denominator, -1, modulus) % modulus
        shift = int(mono.shift)
        if shift >= count:
            continue
        for i, c in enumerate(product_residues(dict(mono.exps), count - shift, modulus)):
            total[i + shift] = (total[i + shift] + gamma * c) % modulus
    return total


def direct_search(
    prog: Progression, rhs: tuple[Mono, ...] | None, modulus: int | None, upto: int, exact: bool = False
) -> tuple[int, int, Fraction] | None:
    """The first n < upto where the claim fails, by direct computation, or None (see :func:`search`)."""
    return search(prog, rhs, modulus, upto, exact).found


@dataclass(frozen=True)
class Search:
    """What a direct search found: the first failure ``(n, a, b)`` or None, and how far it is exact.

    Without a failure, the claim holds (modulo M for a congruence) for every n < ``exact``,
    and agrees modulo :data:`SCREEN_PRIME` for ``exact <= n < screened``.
    """

    found: tuple[int, int, Fraction] | None
    exact: int
    screened: int


def search(
    prog: Progression, rhs: tuple[Mono, ...] | None, modulus: int | None, upto: int, exact: bool = False
) -> Search:
    """The first n < upto where the claim fails, by direct computation.

    A congruence is scanned modulo M.  An identity is screened modulo a large prime first
    (unless ``exact``): a difference there is a real difference, and the exact values are then
    computed only up to it, so the n returned is the first exact failure.  A difference that
    vanishes modulo the prime could be missed by the screen: that only ever leaves a claim
    unproven, since proofs never rest on this search, and the result says how far the
    agreement is exact (``Search.exact``) and how far only modulo the prime.
    """
    step = DIRECT
    done = 0
    exact_done = 0
    while done < upto:
        count = min(upto, max(step, 2 * done))
        if rhs is None and modulus is not None:
            n = next((i for i, x in enumerate(prog.values(count, modulus)) if x), None)
            if n is not None:
                return Search((n, prog.exact(n), Fraction(0)), n, n)
            done = exact_done = count
            continue
        if rhs is not None and modulus is not None:
            claimed = sum_residues(rhs, count, modulus)
            if claimed is not None:
                residues = prog.values(count, modulus)
                n = next((i for i in range(count) if residues[i] != claimed[i]), None)
                if n is not None:
                    return Search((n, prog.exact(n), Fraction(sum_coefficients(rhs, n + 1)[n])), n, n)
                done = exact_done = count
                continue
        if rhs is not None and modulus is None and not exact and count > DIRECT:
            screened = sum_residues(rhs, count, SCREEN_PRIME)
            if screened is not None:
                residues = prog.values(count, SCREEN_PRIME)
                hit = next((i for i in range(count) if residues[i] != screened[i]), None)
                if hit is None:
                    done = count
                    continue
                count = hit + 1
        values = prog.values(count)
        targets = sum_coefficients(rhs, count) if rhs is not None else None
        n = first_failure(values, targets, modulus)
        if n is not None:
            return Search((n, values[n], Fraction(targets[n]) if targets is not None else Fraction(0)), n, n)
        done = exact_done = count
    # No failure: the agreement beyond the first terms was screened modulo a prime only.  The
    # values are compared exactly through EXACT_SPAN coefficients of F once, so that the answer
    # can say how far the sides agree exactly (a refutation never needs this: its exact values
    # are computed up to the failure).
    span = min(done, max(DIRECT, (EXACT_SPAN - prog.t) // prog.m + 1))
    if rhs is not None and exact_done < span:
        values = prog.values(span)
        targets = sum_coefficients(rhs, span)
        n = first_failure(values, targets, modulus)
        if n is not None:
            return Search((n, values[n], Fraction(targets[n])), n, n)
        exact_done = span
    return Search(None, exact_done, done)


def search_limit(prog: Progression) -> int:
    """How many progression terms the direct search covers (DIRECT_LIMIT coefficients of F)."""
    return max(DIRECT, (DIRECT_LIMIT - prog.t) // prog.m + 1)


@dataclass(frozen=True)
class Claim:
    """``sum a(mn+t) q^n = rhs`` (rhs a sum of products) or ``a(mn+t) = 0 (mod modulus)``.

    With both ``rhs`` and ``modulus``: the congruence ``sum a(mn+t) q^n = rhs (mod modulus)``,
    e.g. an internal congruence ``a(mn+t) = c a(n)`` (rhs ``c F``).
    """

    what: str  # how a(mn+t) is written, for messages
    exps: dict[int, int]
    m: int
    t: int
    rhs: tuple[Mono, ...] | None = None
    modulus: int | None = None
    start: int = 0  # the author's n is the n of a(mn + t) plus this (a claim for n >= start)
    step: int = 1  # ... times this: the author's n is step * n + start (a claim on a class of n)

    def author_n(self, n: int) -> int:
        """The author's n for the n of a(mn + t)."""
        return self.step * n + self.start

    def range_text(self) -> str:
        """The author's n this claim covers, as messages say it."""
        if self.step == 1:
            return f"for all n >= {self.start}"
        return f"for all n = {self.start} + {self.step}n' (n' >= 0)"

    @property
    def kind(self) -> str:
        """``congruence`` or ``arithmetic`` (an identity of generating functions)."""
        return "congruence" if self.modulus is not None else "arithmetic"


def decide(claim: Claim | ProgressionReading, prover: Prover | None = None) -> Outcome:
    """Prove, refute or leave unproven one progression claim (see the module docstring).

    Given the kind's reading (:func:`read`), the claims it stands for are decided together: a
    dissection, or the classes of a residue set.  No series of the prover are needed.
    """
    if isinstance(claim, ProgressionReading):
        found = claim.found
        if found.n_class is not None:
            return decide_class(found.n_class, found.claims)
        if found.residues is not None:
            return decide_residues(found.residues[0], found.claims)
        if found.dissection is not None:
            return decide_dissection(found.dissection, found.claims)
        claim = found.claims[0]
        assert isinstance(claim, Claim)
    try:
        return _decide(claim)
    except Internal as exc:
        return Outcome("error", claim.kind, f"internal inconsistency: {exc}; please report this claim", code="internal")


def _what(claim: Claim, n: int) -> str:
    return f"{claim.what} at n = {n} (argument {claim.m * n + claim.t})"


def _decide(claim: Claim) -> Outcome:
    kind, m, t, modulus = claim.kind, claim.m, claim.t, claim.modulus
    prog = Progression(claim.exps, m, t)
    try:
        first = direct_search(prog, claim.rhs, modulus, DIRECT)
    except ValueError as exc:
        return Outcome("unproven", kind, f"the claimed side is not a power series in q: {exc}", code="unsupported")
    if first is not None:
        n, a, b = first
        return refuted(kind, claim.what, claim.author_n(n), a, b, modulus)
    if claim.rhs is not None and modulus is not None:
        return _decide_relative(claim, prog)
    t_proof = t
    if t >= m:
        if claim.rhs is not None:
            return _unproven(claim, prog, f"t = {t} >= m = {m}: the shifted series is not U_{m} of a form")
        t_proof = t % m  # prove the stronger statement for t mod m
    proof_prog = prog if t_proof == t else Progression(claim.exps, m, t_proof)
    p = plan(claim.exps, m, t_proof, claim.rhs, modulus=modulus if claim.rhs is None else None)
    if isinstance(p, str):
        return _unproven(claim, prog, p)
    if p.bound > MAX_BOUND:
        return _unproven(claim, prog, f"the target space's bound {p.bound} exceeds the budget ({MAX_BOUND})")
    count = p.bound + 1
    from_h = cross_check(proof_prog, p, count, modulus if claim.rhs is None else None)
    if claim.rhs is None:
        assert modulus is not None
        bad = first_failure(from_h, None, modulus)
        if bad is None:
            values = proof_prog.values(count, modulus)
            if any(values):
                raise Internal("Sturm's bound is met but a direct coefficient is not 0 modulo M")
            return _proved(claim, p, count, t_proof)
    else:
        rhs_form = sum_coefficients(
            tuple(Mono.make(gamma, Fraction(term.s, 24), dict(term.exponents)) for gamma, term in p.terms), count
        )
        bad = first_failure(from_h, rhs_form, None)
        direct = direct_search(proof_prog, claim.rhs, None, count, exact=True)
        if bad is None:
            if direct is not None:
                raise Internal("the forms agree through the bound but the direct coefficients do not")
            return _proved(claim, p, count, t_proof)
        if direct is None:
            raise Internal("the forms differ within the bound but the direct coefficients agree")
    # Not proved: a difference exists; find it in the claimed range.
    found = direct_search(prog, claim.rhs, modulus, search_limit(prog))
    if found is not None:
        n, a, b = found
        return refuted(kind, claim.what, claim.author_n(n), a, b, modulus)
    if t_proof != t:
        return _unproven(
            claim,
            prog,
            f"a({m}n+{t_proof}) is not 0 modulo {modulus} for some n below the claimed range, "
            "so the proof for the whole class does not apply",
        )
    raise Internal("the proof failed but no direct counterexample was found")


def _decide_relative(claim: Claim, prog: Progression) -> Outcome:
    """``sum a(mn+t) q^n = rhs (mod M)``: U_m h and E times rhs compared modulo M.

    Both are forms in M_k(Gamma_0(N''), chi) with integer coefficients (the plan requires every
    term holomorphic and of the same weight and character, and lambda = 0), so Sturm's bound
    modulo M applies to their difference.
    """
    assert claim.rhs is not None and claim.modulus is not None
    m, t, modulus = claim.m, claim.t, claim.modulus
    if t >= m or claim.start:
        return _unproven(claim, prog, "a congruence to a nonzero side is proved only for 0 <= t < m and n >= 0")
    if any(mono.coeff.denominator != 1 for mono in claim.rhs):
        return _unproven(claim, prog, "the claimed side has a coefficient that is not an integer")
    p = plan(claim.exps, m, t, claim.rhs, congruence=True)
    if isinstance(p, str):
        return _unproven(claim, prog, p)
    if p.bound > MAX_BOUND:
        return _unproven(claim, prog, f"the target space's bound {p.bound} exceeds the budget ({MAX_BOUND})")
    count = p.bound + 1
    from_h = cross_check(prog, p, count, modulus)
    forms_side = sum_residues(
        tuple(Mono.make(gamma, Fraction(term.s, 24), dict(term.exponents)) for gamma, term in p.terms),
        count,
        modulus,
    )
    claimed = sum_residues(claim.rhs, count, modulus)
    assert forms_side is not None and claimed is not None  # integer coefficients
    bad = next((i for i in range(count) if from_h[i] != forms_side[i]), None)
    direct_bad = next((i for i, x in enumerate(prog.values(count, modulus)) if x != claimed[i]), None)
    if bad is None:
        if direct_bad is not None:
            raise Internal("the forms agree modulo M through the bound but the direct coefficients do not")
        return _proved(claim, p, count, t)
    found = direct_search(prog, claim.rhs, modulus, search_limit(prog))
    if found is None:
        raise Internal("the forms differ modulo M within the bound but no direct counterexample was found")
    n, a, b = found
    return refuted(claim.kind, claim.what, n, a, b, modulus)


def _unproven(claim: Claim, prog: Progression, reason: str) -> Outcome:
    result = search(prog, claim.rhs, claim.modulus, search_limit(prog))
    if result.found is not None:
        n, a, b = result.found
        return refuted(claim.kind, claim.what, claim.author_n(n), a, b, claim.modulus)
    mod = f" modulo {claim.modulus}" if claim.modulus is not None else ""
    start = claim.start
    if claim.step == 1:
        held = f"holds{mod} for {start} <= n < {claim.author_n(result.exact)}"
    else:  # the n of a class: n = start + step n'
        held = f"holds{mod} for the n = {start} + {claim.step}n' below {claim.author_n(result.exact)}"
    if result.screened > result.exact:
        held += (
            f" (exact values), and agrees modulo the prime 2^61 - 1 for n < {claim.author_n(result.screened)} "
            "(an agreement, not a proof)"
        )
    else:
        held += " (computed directly)"
    return Outcome(
        "unproven",
        claim.kind,
        f"{held}, but no proof applies: {reason}",
        method="computation",
        terms_compared=result.exact,
    )


def _proved(claim: Claim, p: Plan, count: int, t_proof: int) -> Outcome:
    m = claim.m
    space = {"weight": str(p.weight), "group": group_name(p.target_level), "character": p.character.name}
    record = p.record(m, count, claim.modulus)
    record["t"] = t_proof
    record["poles"] = {str(d): frac_str(v) for d, v in sorted(p.cusp_bounds.items())}
    record.update(_recheck_fields(claim, p))
    bound_kind = "valence bound" if p.cusp_bounds else "Sturm bound"
    target = f"M_{p.weight}(Gamma0({p.target_level}), {p.character.name})"
    if claim.modulus is not None and claim.rhs is not None:
        msg = (
            f"for all n >= {claim.start}, sum {claim.what} q^n = the claimed side modulo {claim.modulus}: with "
            f"E = {p.multiplier.label()}, h = {p.h.label()} is in M_{p.weight}(Gamma0({p.level}), {p.character.name}); "
            f"U_{m} h and E times the claimed side are in {target} and agree modulo {claim.modulus} "
            f"for q^0..q^{p.bound} (Sturm bound)"
        )
    elif claim.modulus is not None:
        stronger = f" (proved for the whole class {t_proof} mod {m})" if t_proof != claim.t else ""
        unit = (
            f" and the unit U = {p.unit.label()} = 1 modulo {claim.modulus} (h = F(tau) E({m}tau) U(tau), "
            f"so U_{m} h = q^{p.k} P_E sum {claim.what} q^n modulo {claim.modulus})"
            if p.unit is not None
            else ""
        )
        msg = (
            f"{claim.range_text()}, {claim.what} = 0 modulo {claim.modulus}{stronger}: "
            f"with E = {p.multiplier.label()}{unit}, "
            f"h = {p.h.label()} is in M_{p.weight}(Gamma0({p.level}), {p.character.name}); U_{m} h is in {target}, "
            f"and its coefficients of q^0..q^{p.bound} ({bound_kind}) are 0 modulo {claim.modulus}"
        )
    else:
        msg = (
            f"for all n >= {claim.start}: with E = {p.multiplier.label()}, h = {p.h.label()} is in "
            f"M_{p.weight}(Gamma0({p.level}), {p.character.name}); U_{m} h and E times the claimed side are in "
            f"{target} and agree for q^0..q^{p.bound} ({bound_kind})"
        )
    certificate = {
        "format": 1,
        "method": "u-operator",
        "kind": claim.kind,
        "space_used": space,
        "bound": p.bound,
        "progression": record,
    }
    return Outcome(
        "proved",
        claim.kind,
        msg,
        space=space,
        method="u-operator",
        bound=p.bound,
        terms_compared=count,
        certificate=certificate,
        progression=record,
    )


def _recheck_fields(claim: Claim, p: Plan) -> dict[str, Any]:
    """What an independent re-checker needs to rebuild the proof (verifier/prove/certificate.py)."""
    terms = None
    if claim.rhs is not None:
        terms = [
            {"coeff": frac_str(mono.coeff), "shift": frac_str(mono.shift), "product": [list(x) for x in mono.exps]}
            for mono in claim.rhs
        ]
    return {
        "product": [[d, r] for d, r in sorted(claim.exps.items()) if r],
        "multiplier_exponents": [list(x) for x in p.multiplier.exponents],
        "form_exponents": [list(x) for x in p.h.exponents],
        "character_kernel": p.character.kernel,
        "e": p.e,
        "claimed_t": claim.t,
        "start": claim.start,
        "terms": terms,
    }


def decide_dissection(p: int, claims: tuple[Claim, ...]) -> Outcome:
    """A p-dissection: every class t mod p is a claim of its own; all must be proved.

    A refutation names the first exponent N = p n + t of F where the two sides differ.
    """
    outcomes = [decide(c) for c in claims]
    refutations = []
    for c, o in zip(claims, outcomes, strict=True):
        w = o.witness
        if o.verdict == "refuted" and w is not None and isinstance(w.n, int):
            refutations.append((p * w.n + c.t, w))
    if refutations:
        at, w = min(refutations, key=lambda x: x[0])
        witness = Witness(at, w.left, w.right)
        return Outcome(
            "refuted",
            "equality",
            f"the coefficients of q^{at} differ: left {frac_str(w.left)}, right {frac_str(w.right)} "
            f"(class {at % p} of the {p}-dissection)",
            method="computation",
            first_difference=witness.to_dict(),
            terms_compared=at + 1,
        )
    for o in outcomes:
        if o.verdict == "error":
            return o
    if all(o.verdict == "proved" for o in outcomes):
        record = {"dissection": p, "components": [o.progression for o in outcomes]}
        message = (
            f"the {p}-dissection holds: each class t mod {p} is proved by U_{p} ("
            + "; ".join(f"t = {c.t}: bound {o.bound}" for c, o in zip(claims, outcomes, strict=True))
            + ")"
        )
        return _all_classes_proved("equality", message, outcomes, record)
    reasons = "; ".join(
        f"t = {c.t}: {o.message}" for c, o in zip(claims, outcomes, strict=True) if o.verdict != "proved"
    )
    return Outcome("unproven", "equality", f"not every class of the {p}-dissection is proved ({reasons})")


def _all_classes_proved(kind: str, message: str, outcomes: list[Outcome], record: dict[str, Any]) -> Outcome:
    """The proved outcome of a claim made of several classes, each proved by U_m on its own."""
    bound = max(o.bound or 0 for o in outcomes)
    certificate = {
        "format": 1,
        "method": "u-operator",
        "kind": kind,
        "space_used": None,
        "bound": bound,
        "progression": record,
    }
    return Outcome(
        "proved",
        kind,
        message,
        method="u-operator",
        bound=bound,
        terms_compared=sum(o.terms_compared for o in outcomes),
        certificate=certificate,
        progression=record,
    )


def decide_residues(var: str, claims: tuple[Claim, ...]) -> Outcome:
    """``a(mn + t) = 0 (mod M)`` for every listed t: one verdict for the set.

    Each class is decided on its own (:func:`decide`).  Proved only when every class is
    proved; refuted by the first listed t that is refuted (its n and both residues);
    otherwise unproven (or an internal error), with the reasons of the classes not proved.
    """
    outcomes = [decide(c) for c in claims]
    labels = [f"{var} = {c.t - c.m * c.start}" for c in claims]
    for label, o in zip(labels, outcomes, strict=True):
        if o.verdict == "refuted":
            return _component_refuted(o, f"{label}: {o.message}")
    record = {"residues": [c.t - c.m * c.start for c in claims], "components": [o.progression for o in outcomes]}
    message = (
        "every listed class is proved by U_m ("
        + "; ".join(f"{label}: bound {o.bound}" for label, o in zip(labels, outcomes, strict=True))
        + ")"
    )
    return _joined(outcomes, labels, message, record, "not every listed class is proved")


def decide_class(n_class: NClass, claims: tuple[Claim, ...]) -> Outcome:
    """``a(mn + t) = 0 (mod M)`` for the n of a class: one progression claim per residue.

    Proved when every residue's progression is proved; refuted at the least n of the class
    (the author's n) where a progression is refuted; otherwise unproven with the reasons.
    """
    outcomes = [decide(c) for c in claims]
    refuted_ones = [(o.witness.n, o) for o in outcomes if o.verdict == "refuted" and o.witness is not None]
    if refuted_ones:
        _, o = min(refuted_ones, key=lambda pair: int(pair[0] or 0))
        return _component_refuted(o, f"{o.message} (n in the class {n_class.text})")
    first = claims[0]
    m0 = first.m // first.step
    record = {
        "n_class": {"modulus": n_class.modulus, "residues": sorted(n_class.residues)},
        "argument": [m0, first.t - m0 * first.start],  # the author's a(m0 n + t0)
        "starts": [c.start for c in claims],  # n0, the least n of each residue: n = n0 + k n'
        "components": [o.progression for o in outcomes],
    }
    message = f"on the class {n_class.text}, one progression per residue: " + "; ".join(o.message for o in outcomes)
    labels = [f"n = {c.start} + {c.step}n'" for c in claims]
    return _joined(outcomes, labels, message, record, f"not every residue of the class {n_class.text} is proved")


def _component_refuted(o: Outcome, message: str) -> Outcome:
    """A claim of several classes refuted by one of them, with that class's witness."""
    assert o.witness is not None
    return Outcome(
        "refuted",
        "congruence",
        message,
        method="computation",
        first_difference=o.witness.to_dict(),
        terms_compared=o.terms_compared,
    )


def _joined(outcomes: list[Outcome], labels: list[str], message: str, record: dict[str, Any], unproven: str) -> Outcome:
    """A claim of several classes none of which is refuted: an error of one, proved when all are, else unproven."""
    for o in outcomes:
        if o.verdict == "error":
            return o
    if all(o.verdict == "proved" for o in outcomes):
        return _all_classes_proved("congruence", message, outcomes, record)
    reasons = "; ".join(
        f"{label}: {o.message}" for label, o in zip(labels, outcomes, strict=True) if o.verdict != "proved"
    )
    return Outcome(
        "unproven",
        "congruence",
        f"{unproven} ({reasons})",
        method="computation",
        terms_compared=min(o.terms_compared for o in outcomes),
    )


# The kind's three steps (verifier/claims/kind.py); decide is above.


@dataclass
class ProgressionReading(Reading):
    """The progression claims a written claim stands for (:class:`verifier.claims.reading.Reading`)."""

    found: Any


def read(claim: ParsedClaim, /) -> ProgressionReading | Unread | None:
    """A progression, a congruence of a progression or a dissection; None for any other claim.

    A plain identity between products is read as a dissection only when the forms route
    cannot take it (a side it cannot read, or two sides of different weights).
    """
    from verifier.claims.reading import read as read_shapes

    if claim.space is not None:
        return None
    left, right = claim.sides
    elaborator = claim.elaborator

    def dissection_ok() -> bool:
        sides = [elaborator.side(n, claim.text.text) for n in (left, right)]
        weights = [None if isinstance(s, Problem) else s.expr.typ.weight for s in sides]
        return any(isinstance(s, Problem) for s in sides) or weights[0] != weights[1]

    found = read_shapes(
        left,
        right,
        claim.rel,
        claim.modulus,
        claim.start_n,
        elaborator.products,
        elaborator.author_forms(),
        dissection_ok,
        claim.residues,
        claim.n_class,
    )
    if found is None:
        if claim.residues is not None:
            var = claim.residues[0]
            return Unread(
                claim.relation_kind,
                "unsupported",
                f"a residue set ({var} in a list) is read only after a congruence a(mn+{var}) "
                "\\equiv 0 \\pmod{M} of a partition-type function",
                "tag each residue class as its own claim",
            )
        return None
    dissection = found.residues is None and found.dissection is not None
    kind = "congruence" if claim.modulus is not None else ("equality" if dissection else "arithmetic")
    return ProgressionReading(found, kind=kind, shown=claim.shown)


def certify(outcome: Outcome, /) -> dict[str, Any] | None:
    """The multiplier, the level and the bound of the U_m proof (built by the decision)."""
    return certified(outcome)

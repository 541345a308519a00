"""Decide congruences ``F = 0 (mod M)`` coefficient by coefficient.

See docs/method.md#congruences-sturm, #congruence-weights and #congruence-e2.

``F`` is given as homogeneous pieces ``sum_i f_i E_2^{j_i}`` with ``f_i`` in
``M_{w_i - 2 j_i}(Gamma_0(N), chi_i)``: the difference of the two sides of a claim, split by
weight, power of the quasimodular ``E_2`` and character.  Over ``C`` such a splitting is
unique; modulo a prime it is not (``E_{p-1} = 1`` and ``E_2 = E_{p+1}`` mod p), so a piece
that is not 0 mod M never refutes anything.  What this module proves:

For each prime power ``p^e || M`` separately (a congruence mod M holds iff it holds mod every
``p^e``, by the Chinese remainder theorem):

1. A piece whose ``f_i`` is p-integral and 0 mod ``p^e`` through the Sturm bound of its own
   weight is 0 mod ``p^e`` for every n (docs/method.md#congruences-sturm; ``E_2`` has integer coefficients), so it is
   set aside.  This is how ``691 E_4^3 = 691`` (mod 691) enters the worked example of
   docs/method.md#congruences-sturm.
2. Valuations (docs/method.md#congruence-denominators): ``v_i`` is the least p-adic valuation of a
   coefficient of ``f_i`` (read through each piece's own Sturm bound, which suffices: if
   ``p^(-v) f`` is p-integral, it is not 0 mod p, so some ``n <= B`` shows valuation v), and
   ``v_i < e`` for a piece not set aside.  With ``a = max(0, -v_i)`` the claim is scaled:
   ``p^a F = 0 (mod p^(a+e))`` iff ``F = 0 (mod p^e)``.  The scaled piece ``p^a f_i`` has
   valuation ``a + v_i``, so its other factors need only be exact mod ``p^(t_i)``, ``t_i = e - v_i``.
3. A plan (:func:`_plan`) makes the pieces one modular form: ``E_2`` becomes a substitute S with
   ``E_2 = S (mod p^s)``, ``s >= t_i`` (docs/method.md#congruence-e2): first the level-one ones
   (``E_{p+1}`` mod p, 1 mod 8 and mod 3, ``E_8`` mod 9, ``E_6`` mod 16), else
   ``E_2(tau) - p^s E_2(p^s tau)`` of weight 2 on ``Gamma_0(p^s)``, which raises the level to
   ``lcm(N, p^s)``.  The pieces must share one character, and each is multiplied by a level-one
   ``H_i = 1 (mod p^(t_i))`` (docs/method.md#congruence-weights): ``E_{p-1}^{p^(t-1)}`` for p >= 5,
   powers of ``E_4`` and ``E_6`` for p = 2, 3, up to the least common weight ``K`` so reachable.
4. ``G = sum_i p^a f_i S^{j_i} H_i`` lies in ``M_K(Gamma_0(N'), chi)``, is p-integral, and
   ``G = p^a F (mod p^(a+e))`` coefficientwise.  ``G = 0 (mod p^(a+e))`` everywhere iff it is so for
   ``n <= B = floor(K m_0(N') / 12)`` (docs/method.md#congruences-sturm, prime powers in the same space).
   A nonzero residue within ``B`` is therefore a true coefficient of ``F`` that is not 0 mod ``p^e``.

Everything else (half-integral weight, poles, several characters, weights no multiplier
joins, an ``E_2`` substitute of too large a level) is reported as not proved, with the reason.
Eta quotients lifted by Frobenius (docs/method.md#congruence-frobenius) are tried by the caller.
The known coefficients of ``F`` itself are always scanned:
a coefficient with a denominator not prime to M means the congruence is undefined, and a
coefficient not 0 mod M is reported as a witness (a refutation if it lies in the claim's
range).  As a guard against inconsistent input, ``G`` and ``F`` are also compared mod ``p^e``
through ``B``: they must agree, whatever the verdict.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

import flint
from flint import fmpz_mod_poly_ctx

from verifier import numbers
from verifier.forms.eisenstein import eisenstein_constant, eisenstein_series
from verifier.numbers import QuadraticCharacter
from verifier.prove.groups import group_name, sturm_bound
from verifier.series.qseries import QSeries

MAX_E2_LEVEL = 10_000  # the largest p^s for the substitute E_2(tau) - p^s E_2(p^s tau)


@dataclass(frozen=True)
class Piece:
    """One homogeneous piece ``f * E_2^j`` of ``F = left - right``.

    ``weight`` is the total weight ``w``; ``f`` (``series``) is a holomorphic modular form of
    weight ``w - 2 * e2_power`` on ``Gamma_0(level)`` with the quadratic character of the given
    squarefree ``kernel`` (1 = trivial), known at least to :func:`needed_precision`.
    """

    weight: Fraction
    e2_power: int
    kernel: int
    series: QSeries


@dataclass
class CongruenceDecision:
    """The outcome of :func:`decide_congruence`.

    ``proved`` is True only when ``F = 0 (mod M)`` is proved for every n.  ``details`` has one
    dict per prime power of M (and nothing else).  ``witness``, when set, is the least exponent n
    among the known coefficients of ``F`` at which the coefficient is M-integral but not 0 mod M
    (``{"n", "value", "modulus", "prime_powers"}``): a refutation if n lies in the claim's range.
    ``undefined``, when set, is the least n at which the coefficient of ``F`` has a denominator
    not prime to M (``{"n", "value", "primes"}``).
    """

    proved: bool
    reason: str
    bound: int | None
    details: list[dict[str, Any]]
    witness: dict[str, Any] | None = None
    undefined: dict[str, Any] | None = None


# ---------------------------------------------------------------------------
# Small arithmetic helpers
# ---------------------------------------------------------------------------


def _factor(m: int) -> list[tuple[int, int]]:
    """``m = prod p^e`` for m >= 2, primes increasing."""
    return sorted((int(p), int(e)) for p, e in flint.fmpz(m).factor())


def _valuation(x: Fraction, p: int) -> int:
    """The p-adic valuation of a nonzero rational."""
    return numbers.valuation(x.numerator, p) - numbers.valuation(x.denominator, p)


def _frac_str(x: Fraction) -> str:
    return str(x.numerator) if x.denominator == 1 else f"{x.numerator}/{x.denominator}"


def _residues(series: QSeries, stop: int, m: int) -> list[int | None]:
    """Residues mod m of the coefficients of ``q^0 .. q^(stop-1)``; None where not m-integral.

    The series must have valuation >= 0 and be known below ``stop``.
    """
    out: list[int | None] = [0] * stop
    if stop <= 0 or series.is_zero():
        return out
    num = series.poly.numer()
    den = int(series.poly.denom())
    coprime = math.gcd(den, m) == 1
    inv = pow(den, -1, m) if coprime else 0
    for n in range(max(series.offset, 0), stop):
        c = int(num[n - series.offset])
        if coprime:
            out[n] = c * inv % m
        else:
            x = Fraction(c, den)
            out[n] = x.numerator * pow(x.denominator, -1, m) % m if math.gcd(x.denominator, m) == 1 else None
    return out


def _divisor_sums_mod(r: int, stop: int, m: int) -> list[int]:
    """``sigma_r(n) mod m`` for ``0 <= n < stop`` (with sigma_r(0) := 0)."""
    s = [0] * stop
    for d in range(1, stop):
        t = pow(d, r, m)
        for n in range(d, stop, d):
            s[n] += t
    return [x % m for x in s]


def _eisenstein_mod(k: int, stop: int, m: int) -> list[int]:
    """``E_k mod m`` through ``q^(stop-1)``; ``-2k/B_k`` must be m-integral."""
    c = eisenstein_constant(k)
    if math.gcd(c.denominator, m) != 1:
        raise ArithmeticError(f"E_{k} is not integral modulo {m}")
    cm = c.numerator * pow(c.denominator, -1, m) % m
    sig = _divisor_sums_mod(k - 1, stop, m)
    out = [cm * x % m for x in sig]
    if stop > 0:
        out[0] = 1 % m
    return out


# ---------------------------------------------------------------------------
# Multipliers H = 1 (mod p^e) and E_2 substitutions (docs/method.md#congruence-weights, #congruence-e2)
# ---------------------------------------------------------------------------


@dataclass(frozen=True)
class _Generator:
    """``E_k^power``, a level-one form of weight ``k * power`` that is 1 mod p^e."""

    k: int
    power: int

    @property
    def weight(self) -> int:
        return self.k * self.power

    def name(self, exponent: int = 1) -> str:
        total = self.power * exponent
        return f"E_{self.k}" if total == 1 else f"E_{self.k}^{total}"


def _generators(p: int, e: int) -> list[_Generator]:
    """The multipliers of docs/method.md#congruence-weights for p^e.

    The base forms are ``E_{p-1}`` (p >= 5) and ``E_4``, ``E_6`` (p = 2, 3).  ``E_k = 1 (mod p^a)``
    exactly when ``p^a`` divides the constant ``-2k/B_k`` (the divisor sums are integers and
    ``sigma_{k-1}(1) = 1``), so ``a`` is read off the Bernoulli number: 1 for ``E_{p-1}`` (von
    Staudt-Clausen), 4 and 1 for ``E_4`` at 2 and 3, 3 and 2 for ``E_6``.  Then
    ``H = 1 + p^a X`` gives ``H^p = 1 + p^(a+1) X + ... = 1 (mod p^(a+1))`` (the middle binomial
    terms carry ``p^(2a+1)`` for odd p, and ``2^(2a)`` with 2a >= a+1 for p = 2), so
    ``E_k^(p^(e-a)) = 1 (mod p^e)``.
    """
    bases = [p - 1] if p >= 5 else [4, 6]
    out: list[_Generator] = []
    for k in bases:
        a = _valuation(eisenstein_constant(k), p)
        if a < 1:
            raise ArithmeticError(f"E_{k} is not 1 mod {p}")  # cannot happen (von Staudt-Clausen)
        out.append(_Generator(k, p ** max(0, e - a)))
    return out


def _substitution(p: int, e: int) -> str | None:
    """How E_2 is made modular mod p^e (docs/method.md#congruence-e2): ``"E_{p+1}"``, ``"1"`` or None (no way)."""
    if p >= 5 and e == 1:
        return "E_{p+1}"
    if (p == 2 and e <= 3) or (p == 3 and e == 1):
        return "1"
    return None


@dataclass(frozen=True)
class _Substitute:
    """A modular form S with ``E_2 = S (mod p^s)``: ``E_k`` (k), the constant 1 (k = 0), or
    ``E_2(tau) - N E_2(N tau)`` (k = 2, ``shift`` = N = p^s, a form on Gamma_0(N)).

    docs/method.md#congruence-e2: ``E_{p+1}`` mod p (p >= 5, Kummer); 1 mod 3 and mod 8
    (``E_2 = 1 - 24 sum sigma(n) q^n``); ``E_8`` mod 9 and ``E_6`` mod 16, because
    ``-24 = 480 = 3 (mod 9)`` with ``sigma_7(n) = sigma_1(n) (mod 3)``, and ``-24 = -504 = 8 (mod 16)``
    with ``sigma_5(n) = sigma_1(n) (mod 2)`` (Fermat's little theorem, divisor by divisor).  For every
    p^s, ``E_2(tau) - p^s E_2(p^s tau)`` differs from E_2 by p^s times a series with integer
    coefficients, and it lies in M_2(Gamma_0(p^s)) (docs/method.md#e2).
    """

    k: int
    s: int
    shift: int = 1

    @property
    def name(self) -> str:
        if self.shift > 1:
            return f"E_2(tau) - {self.shift} E_2({self.shift} tau)"
        return "1" if self.k == 0 else f"E_{self.k}"


def _substitutes(p: int) -> list[_Substitute]:
    """The substitutes for E_2 at p, by increasing precision s."""
    if p >= 5:
        return [_Substitute(p + 1, 1)]
    if p == 3:
        return [_Substitute(0, 1), _Substitute(8, 2)]
    return [_Substitute(0, 3), _Substitute(6, 4)]


def _effective_weight(weight: int, j: int, p: int, sub: str | None) -> int | None:
    """Weight of ``f E_2^j`` after the substitution (``weight`` is the weight of f)."""
    if j == 0:
        return weight
    if sub == "E_{p+1}":
        return weight + j * (p + 1)
    if sub == "1":
        return weight
    return None


def _decompose(gap: int, gens: list[_Generator]) -> tuple[int, ...] | None:
    """Exponents ``(a, b)`` with ``a w_0 + b w_1 = gap`` (a >= 0 as large as possible), or None."""
    if gap < 0:
        return None
    w0 = gens[0].weight
    if len(gens) == 1:
        return (gap // w0,) if gap % w0 == 0 else None
    w1 = gens[1].weight
    for a in range(gap // w0, -1, -1):
        rest = gap - a * w0
        if rest % w1 == 0:
            return (a, rest // w1)
    return None


def _common_weight(weights: list[int], gens: list[_Generator]) -> int | None:
    """The least K >= max(weights) with every K - k reachable by the multipliers, or None."""
    g = math.gcd(*(x.weight for x in gens))
    if len({w % g for w in weights}) > 1:
        return None
    top = max(weights)
    # Beyond the Frobenius number of the generators every multiple of g is reachable.
    limit = top + math.prod(x.weight for x in gens) + g
    for cand in range(top, limit + 1, g):
        if all(_decompose(cand - w, gens) is not None for w in weights):
            return cand
    return None  # pragma: no cover - the Frobenius bound guarantees a hit


def _classes(weights: list[int], gens: list[_Generator]) -> dict[int, list[int]]:
    """Weights grouped by residue mod the gcd of the multiplier weights."""
    g = math.gcd(*(x.weight for x in gens))
    out: dict[int, list[int]] = {}
    for w in weights:
        out.setdefault(w % g, []).append(w)
    return out


# ---------------------------------------------------------------------------
# Precision
# ---------------------------------------------------------------------------


def needed_precision(pieces_weights: list[tuple[Fraction, int]], modulus: int, level: int) -> int:
    """How many coefficients (``q^0 .. q^(prec-1)``) :func:`decide_congruence` needs of every piece.

    ``pieces_weights`` lists ``(total weight, E_2 power)`` of the pieces.  The result covers the
    Sturm bound of each piece's own weight (step 1 of the module docstring) and, for every prime
    power of the modulus, the bound of the common weight of every class of pieces the multipliers
    could join (any subset of such a class needs no more).  Half-integral or negative weights
    need nothing (they are never proved).
    """
    prec = 1
    usable: list[tuple[int, int]] = []
    for w, j in pieces_weights:
        wf = Fraction(w) - 2 * j
        if wf.denominator != 1 or wf < 0 or j < 0:
            continue
        usable.append((int(wf), j))
        prec = max(prec, sturm_bound(int(wf), level) + 1)
    m = abs(modulus)
    if m < 2 or level < 1:
        return prec
    for p, e in _factor(m):
        sub = _substitution(p, e)
        gens = _generators(p, e)
        effective = [k for wf, j in usable if (k := _effective_weight(wf, j, p, sub)) is not None]
        for group in _classes(effective, gens).values():
            k_common = _common_weight(group, gens)
            if k_common is not None:
                prec = max(prec, sturm_bound(k_common, level) + 1)
    return prec


def scaled_precision(decision: CongruenceDecision) -> int | None:
    """The precision a scaled proof (docs/method.md#congruence-denominators) asked for, if any."""
    needs = [d.get("needed_precision") for d in decision.details]
    wanted = [int(n) for n in needs if isinstance(n, int)]
    return max(wanted) if wanted else None


# ---------------------------------------------------------------------------
# The decision
# ---------------------------------------------------------------------------


@dataclass
class _Item:
    """A validated piece: integral weight ``wf`` of its modular coefficient."""

    index: int
    weight: Fraction
    wf: int
    j: int
    kernel: int
    series: QSeries

    def label(self) -> str:
        e2 = "" if self.j == 0 else (" E_2" if self.j == 1 else f" E_2^{self.j}")
        chi = "" if self.kernel == 1 else f", {QuadraticCharacter(self.kernel).name}"
        return f"piece {self.index} (weight {_frac_str(self.weight)}{e2}{chi})"


@dataclass
class _PrimePowerResult:
    detail: dict[str, Any]
    proved: bool
    summary: str
    bound: int | None = None
    inconsistent: bool = False


def _not_proved(reason: str, details: list[dict[str, Any]] | None = None) -> CongruenceDecision:
    return CongruenceDecision(False, reason, None, details or [])


def decide_congruence(pieces: list[Piece], modulus: int, level: int) -> CongruenceDecision:
    """Decide whether every coefficient of ``F = sum f_i E_2^{j_i}`` is 0 mod ``modulus``.

    Returns ``proved=True`` only through the argument of the module docstring
    (docs/method.md#congruences-sturm, #congruence-weights, #congruence-e2); otherwise ``proved=False``
    and ``reason`` says why.  The pieces must be known to :func:`needed_precision` (with fewer
    coefficients the answer is not proved).
    """
    if modulus == 0 or abs(modulus) < 2:
        return _not_proved(f"the modulus must be an integer of absolute value at least 2, not {modulus}")
    if level < 1:
        return _not_proved(f"the level must be a positive integer, not {level}")
    m = abs(modulus)

    # -- validate and merge the pieces ---------------------------------------------
    merged: dict[tuple[Fraction, int, int], _Item] = {}
    for index, piece in enumerate(pieces):
        w = Fraction(piece.weight)
        j = piece.e2_power
        if j < 0:
            return _not_proved(f"piece {index} has a negative power of E_2 ({j})")
        wf = w - 2 * j
        zero = piece.series.is_zero()
        # The zero form: no negative-weight form but 0, and the characteristic-0 Sturm bound
        # (docs/method.md#sturm-bound; #half-integral-weight in half-integral weight, which lives on some Gamma_0(4N)).
        sturm_ok = wf.denominator == 1 or level % 4 == 0
        if zero and (wf < 0 or (sturm_ok and piece.series.prec > sturm_bound(wf, level))):
            continue
        if wf.denominator != 1:
            return _not_proved(
                f"piece {index} has half-integral weight {_frac_str(wf)}: congruences in half-integral "
                "weight are not covered (docs/method.md#claim-congruence)"
            )
        if not zero and piece.series.valuation < 0:
            return _not_proved(
                f"piece {index} has a pole at infinity (q^{piece.series.valuation}): congruences with poles "
                "are not covered (docs/method.md#unproven)"
            )
        try:
            chi = QuadraticCharacter(piece.kernel)
        except ValueError:
            return _not_proved(f"piece {index} has an invalid character kernel {piece.kernel}")
        if not zero:
            if wf < 0:
                return _not_proved(f"piece {index} has negative weight {wf} but a nonzero series: not a modular form")
            if level % chi.conductor:
                return _not_proved(
                    f"piece {index} has character {chi.name} of conductor {chi.conductor}, not a character "
                    f"mod the level {level}"
                )
            if (int(wf) % 2 == 1) != (not chi.is_even):
                return _not_proved(
                    f"piece {index}: weight {wf} with character {chi.name} violates the parity condition "
                    "(docs/method.md#characters), yet the series is nonzero: inconsistent input"
                )
            if wf == 0 and (piece.series.valuation > 0 or piece.series.poly.degree() > 0):
                return _not_proved(
                    f"piece {index} has weight 0 but is not constant: not a holomorphic modular form "
                    "(docs/method.md#poles-at-cusps)"
                )
        key = (w, j, piece.kernel)
        if key in merged:
            old = merged[key]
            old.series = old.series + piece.series
        else:
            merged[key] = _Item(index, w, int(wf), j, piece.kernel, piece.series)
    items = list(merged.values())

    # -- scan the known coefficients of F itself -----------------------------------
    undefined, witness, f_res, f_prec = _scan(items, m)

    # -- each prime power ----------------------------------------------------------
    results = [_decide_prime_power(items, p, e, level, f_res, f_prec) for p, e in _factor(m)]
    details = [r.detail for r in results]
    bounds = [r.bound for r in results if r.bound is not None]
    bound = max(bounds) if bounds else None

    if undefined is not None:
        primes = ", ".join(str(p) for p in undefined["primes"])
        return CongruenceDecision(
            False,
            f"the congruence mod {m} is not defined: the coefficient of q^{undefined['n']} of left - right is "
            f"{undefined['value']}, whose denominator is divisible by {primes}",
            bound,
            details,
            witness,
            undefined,
        )
    inconsistent = [r for r in results if r.inconsistent]
    if witness is not None:
        # A proof mod p^e and a coefficient that is not 0 mod p^e cannot both be right.
        inconsistent += [r for r in results if r.proved and r.detail["modulus"] in witness["prime_powers"]]
    if inconsistent:
        return CongruenceDecision(
            False,
            "inconsistent input (the declared weights, characters or level cannot all be right): "
            + "; ".join(r.summary for r in inconsistent),
            bound,
            details,
            witness,
        )
    if witness is not None:
        return CongruenceDecision(
            False,
            f"false: the coefficient of q^{witness['n']} of left - right is {witness['value']}, "
            f"not 0 mod {m} (fails mod {', '.join(str(x) for x in witness['prime_powers'])})",
            bound,
            details,
            witness,
        )
    if all(r.proved for r in results):
        head = crt_head(m, [int(r.detail["modulus"]) for r in results])
        return CongruenceDecision(True, head + "; ".join(r.summary for r in results), bound, details)
    failing = [r for r in results if not r.proved]
    return CongruenceDecision(False, "; ".join(r.summary for r in failing), bound, details)


def crt_head(m: int, moduli: list[int]) -> str:
    """How a proof modulo ``m`` from the prime powers ``moduli`` begins its message."""
    if len(moduli) == 1:
        return ""  # the message of the one prime power says "mod p^e: ..." itself
    parts = " * ".join(str(x) for x in moduli)
    return f"proved mod {m} = {parts}, one prime power at a time (Chinese remainder theorem): "


def _scan(items: list[_Item], m: int) -> tuple[dict[str, Any] | None, dict[str, Any] | None, list[int | None], int]:
    """Residues mod m of the known coefficients of ``F = sum f_i E_2^{j_i}``.

    Returns (first undefined coefficient, first nonzero residue, residues, precision).
    """
    if not items:
        return None, None, [], 0
    prec = min(it.series.prec for it in items)
    top_j = max(it.j for it in items)
    total = QSeries.constant(0, prec)
    if prec > 0:
        e2 = eisenstein_series(2, prec)
        powers = [QSeries.constant(1, prec)]
        for _ in range(top_j):
            powers.append(powers[-1] * e2)
        for it in items:
            total = total + it.series.truncate(prec) * powers[it.j]
    if prec <= 0 or total.is_zero():
        return None, None, [0] * max(prec, 0), max(prec, 0)
    # Poles were refused, so the valuation is >= 0.
    residues = _residues(total, prec, m)
    undefined: dict[str, Any] | None = None
    witness: dict[str, Any] | None = None
    for n, r in enumerate(residues):
        if r is None and undefined is None:
            value = total[n]
            primes = [p for p, _ in _factor(m) if value.denominator % p == 0]
            undefined = {"n": n, "value": _frac_str(value), "primes": primes}
        if r is not None and r != 0 and witness is None:
            value = total[n]
            failing = [p**e for p, e in _factor(m) if r % (p**e) != 0]
            witness = {"n": n, "value": _frac_str(value), "modulus": m, "prime_powers": failing}
        if undefined is not None and witness is not None:
            break
    return undefined, witness, residues, prec


def _decide_prime_power(
    items: list[_Item], p: int, e: int, level: int, f_res: list[int | None], f_prec: int
) -> _PrimePowerResult:
    """Steps 1-4 of the module docstring for one prime power."""
    q = p**e
    group = group_name(level)
    detail: dict[str, Any] = {"prime": p, "exponent": e, "modulus": q, "proved": False}

    def fail(reason: str, **more: Any) -> _PrimePowerResult:
        detail["reason"] = reason
        detail.update(more)
        return _PrimePowerResult(detail, False, f"mod {q}: {reason}", bound=more.get("bound"))

    # Step 1: pieces that are 0 mod q by themselves.
    vanishing: list[dict[str, Any]] = []
    active: list[_Item] = []
    own_bound = 0
    for it in items:
        b = sturm_bound(it.wf, level)
        own_bound = max(own_bound, b)
        if it.series.prec <= b:
            return fail(
                f"{it.label()} is known only below q^{it.series.prec}; its own Sturm bound is {b}",
                needed_precision=b + 1,
            )
        res = _residues(it.series, b + 1, q)
        if all(r == 0 for r in res):
            vanishing.append({"piece": it.index, "bound": b})
        else:
            active.append(it)
    detail["vanishing_pieces"] = vanishing
    if not active:
        detail.update(proved=True, bound=own_bound, coefficients_compared=own_bound + 1)
        why = (
            "every piece is 0 mod "
            f"{q} through the Sturm bound of its own weight (B <= {own_bound}, {group}, "
            "docs/method.md#congruences-sturm)"
        )
        detail["reason"] = why
        return _PrimePowerResult(detail, True, f"mod {q}: {why}", bound=own_bound)

    # Step 2: valuations (docs/method.md#congruence-denominators).  v_i is the least p-adic
    # valuation of a coefficient of f_i; it is reached within f_i's own Sturm bound (if
    # p^(-v) f_i is p-integral and not 0 mod p, Sturm's theorem gives an n <= B_i where it is
    # not 0 mod p), and v_i < e because the piece is not 0 mod p^e.  The claim is scaled by p^a,
    # a = max(0, -v_i): p^a F = 0 (mod p^(a+e)) iff F = 0 (mod p^e) for p-integral F.  The
    # scaled piece p^a f_i has valuation a + v_i, so it tolerates an error = 0 mod p^(t_i) in its
    # other factors, t_i = e - v_i: E_2 may be replaced there by S with E_2 = S (mod p^s), s >= t_i,
    # and its multiplier need only be = 1 (mod p^(t_i)).
    valuations: dict[int, int] = {}
    for it in active:
        b = sturm_bound(it.wf, level)
        vals = [_valuation(it.series[n], p) for n in range(b + 1) if it.series[n] != 0]
        valuations[it.index] = min(vals) if vals else e
    a = max(0, max(-v for v in valuations.values()))
    tolerance = {it.index: e - valuations[it.index] for it in active}
    if a:
        detail["scaled_by"] = p**a
    q_scaled = p ** (a + e)

    # Step 3: one character, then a plan: the E_2 substitute and joinable weights.
    kernels = sorted({it.kernel for it in active})
    if len(kernels) > 1:
        names = ", ".join(QuadraticCharacter(k).name for k in kernels)
        return fail(
            f"the pieces not 0 mod {q} carry different characters ({names}); no single space contains them, "
            "and a mismatch between components does not refute a congruence (docs/method.md#congruence-e2)"
        )
    plan, why_not = _plan(active, p, level, tolerance)
    if plan is None:
        return fail(why_not)
    if plan.substitutes:
        detail["e2_replaced_by"] = plan.e2_name()
        detail["e2_modulus"] = p ** min(sub.s for sub in plan.substitutes.values())
    k_common, proof_level = plan.weight, plan.level
    big_b = sturm_bound(k_common, proof_level)
    stop = big_b + 1
    for it in active:
        if it.series.prec < stop:
            return fail(
                f"{it.label()} is known only below q^{it.series.prec}; weight {k_common} on "
                f"{group_name(proof_level)} needs a_0..a_{big_b}",
                needed_precision=stop,
                weight=k_common,
                bound=big_b,
            )

    # Step 4: the scaled pieces p^a f_i are p-integral through B (by the choice of a).
    residues: list[list[int]] = []
    for it in active:
        res = _residues(it.series.scale(p**a), stop, q_scaled)
        bad = next((n for n, r in enumerate(res) if r is None), None)
        if bad is not None:
            return _inconsistent(
                detail,
                q,
                f"{it.label()} has a larger power of {p} in the denominator of q^{bad} than within its own Sturm bound",
            )
        residues.append([int(r) for r in res if r is not None])
    q_true, q = q, q_scaled  # from here on q is the scaled modulus p^(a+e)

    # Step 5: G = sum p^a f_i S_i^{j_i} H_i mod q, through q^B.
    ctx: Any = fmpz_mod_poly_ctx(q)
    gen_cache: dict[tuple[int, int], Any] = {}

    def generator(g: _Generator) -> Any:
        if (g.k, g.power) not in gen_cache:
            gen_cache[(g.k, g.power)] = ctx(_eisenstein_mod(g.k, stop, q)).pow_trunc(g.power, stop)
        return gen_cache[(g.k, g.power)]

    total = ctx([0])
    used: list[dict[str, Any]] = []
    for it, coeffs in zip(active, residues, strict=True):
        t_i = tolerance[it.index]
        term = ctx(coeffs)
        sub = plan.substitutes.get(it.index)
        if it.j and sub is not None and sub.k:
            s_series = _substitute_mod(sub, stop, q)
            # Defence in depth: S = E_2 (mod p^s) through B (docs/method.md#congruence-e2).
            ps = p**sub.s
            if [c % ps for c in _padded(ctx(s_series), stop)] != _eisenstein_mod(2, stop, ps):
                return _inconsistent(detail, q, f"{sub.name} is not congruent to E_2 mod {ps}")
            term = term.mul_low(ctx(s_series).pow_trunc(it.j, stop), stop)
        gens = plan.generators[it.index]
        exps = _decompose(k_common - plan.weights[it.index], gens)
        assert exps is not None
        factors: list[str] = []
        for g, n_g in zip(gens, exps, strict=True):
            if n_g:
                s = generator(g)
                # Defence in depth: the multiplier is 1 mod p^(t_i) through B (docs/method.md#congruence-weights).
                pt = p**t_i
                if any(int(c) % pt != (1 % pt if n == 0 else 0) for n, c in enumerate(_padded(s, stop))):
                    return _inconsistent(detail, q, f"the multiplier {g.name()} is not 1 mod {pt}")
                term = term.mul_low(s.pow_trunc(n_g, stop), stop)
                factors.append(g.name(n_g))
        total = total + term
        used.append(
            {
                "piece": it.index,
                "weight": _frac_str(it.weight),
                "e2_power": it.j,
                "modular_weight": it.wf,
                "valuation": valuations[it.index],
                "weight_after_substitution": plan.weights[it.index],
                "multiplier": " * ".join(factors) or "1",
                "multiplier_modulus": p**t_i,
            }
        )
    g_res = _padded(total, stop)
    detail.update(multipliers=used, weight=k_common, bound=big_b, coefficients_compared=stop, level=proof_level)
    if proof_level != level:
        detail["e2_level"] = proof_level

    # Guard: G = p^a F (mod p^(a+e)) coefficientwise; compare where F is known.
    scale = q // q_true
    for n in range(min(stop, f_prec)):
        fr = f_res[n]
        if fr is not None and (scale * (fr % q_true)) % q != g_res[n]:
            return _inconsistent(
                detail,
                q,
                f"the modular form built for the proof differs from left - right mod {q} at q^{n}",
            )

    sub_text = ""
    if plan.substitutes:
        sub_text = f"E_2 -> {plan.e2_name()} (docs/method.md#congruence-e2); "
    if scale > 1:
        sub_text = f"scaled by {scale} and proved mod {q} (docs/method.md#congruence-denominators); " + sub_text
    mult = sorted({u["multiplier"] for u in used if u["multiplier"] != "1"})
    mult_text = (
        f"multipliers {', '.join(mult)} (each = 1 modulo the precision its piece needs, "
        "docs/method.md#congruence-weights); "
        if mult
        else ""
    )
    vanish_text = f"{len(vanishing)} piece(s) 0 mod {q_true} by themselves; " if vanishing else ""
    bad_n = next((n for n, r in enumerate(g_res) if r != 0), None)
    q_scaled, q = q, q_true  # messages speak of the claim's modulus
    where = group_name(proof_level)
    if bad_n is not None:
        detail["first_nonzero"] = bad_n
        return fail(
            f"{vanish_text}{sub_text}{mult_text}the weight-{k_common} form on {where} has coefficient of q^{bad_n} "
            f"= {g_res[bad_n]} mod {q_scaled}, not 0 (so left - right is not 0 mod {q} there)",
            weight=k_common,
            bound=big_b,
        )
    why = (
        f"{vanish_text}{sub_text}{mult_text}weight {k_common} on {where}: a_0..a_{big_b} = 0 mod {q_scaled} "
        f"(Sturm bound B = {big_b}, docs/method.md#congruences-sturm)"
    )
    detail.update(proved=True, reason=why)
    return _PrimePowerResult(detail, True, f"mod {q}: {why}", bound=big_b)


@dataclass
class _Plan:
    """How the pieces not 0 mod p^e are made into one modular form (step 3 of the module docstring).

    ``substitutes`` maps a piece with E_2 to its substitute; ``weights`` the piece's weight after the
    substitution; ``generators`` the multipliers allowed for the piece (= 1 modulo the precision it
    needs); ``weight`` the common weight K and ``level`` the level of the resulting form.
    """

    substitutes: dict[int, _Substitute]
    weights: dict[int, int]
    generators: dict[int, list[_Generator]]
    weight: int
    level: int

    def e2_name(self) -> str:
        return ", ".join(sorted({s.name for s in self.substitutes.values()}))


def _plan(active: list[_Item], p: int, level: int, tolerance: dict[int, int]) -> tuple[_Plan | None, str]:
    """The first plan that joins the pieces: level-one substitutes for E_2, else ``E_2 - p^s E_2(p^s tau)``.

    Returns (plan, "") or (None, why no plan exists).
    """
    gens = {it.index: _generators(p, tolerance[it.index]) for it in active}
    with_e2 = [it for it in active if it.j > 0]
    reasons: list[str] = []
    options: list[tuple[dict[int, _Substitute], int]] = []
    level_one: dict[int, _Substitute] = {}
    for it in with_e2:
        c = next((c for c in _substitutes(p) if c.s >= tolerance[it.index]), None)
        if c is None:
            break
        level_one[it.index] = c
    else:
        options.append((level_one, level))
    if with_e2:
        if len(level_one) < len(with_e2):
            reasons.append(
                f"no level-one form is congruent to E_2 to the {p}-adic precision "
                f"{p}^{max(tolerance[it.index] for it in with_e2)} some piece needs "
                "(E_{p+1} mod p, 1 mod 3 and mod 8, E_8 mod 9, E_6 mod 16)"
            )
        s = max(tolerance[it.index] for it in with_e2)
        if p**s <= MAX_E2_LEVEL:
            sub = _Substitute(2, s, p**s)
            options.append(({it.index: sub for it in with_e2}, math.lcm(level, p**s)))
        else:
            reasons.append(f"E_2 - {p**s} E_2({p**s} tau) would need level {p**s}, more than {MAX_E2_LEVEL}")
    for subs, lev in options:
        weights = {it.index: it.wf + (it.j * subs[it.index].k if it.j else 0) for it in active}
        k_common = _common_weight_per_piece(weights, gens)
        if k_common is not None:
            return _Plan(subs, weights, gens, k_common, lev), ""
        ws = ", ".join(str(k) for k in sorted(set(weights.values())))
        where = " and ".join(sorted({s.name for s in subs.values()})) or "no substitution"
        reasons.append(
            f"with {where} the pieces have weights {ws}, and no product of the multipliers = 1 modulo the precision "
            "each piece needs joins them, so no common weight is reachable (docs/method.md#congruence-weights)"
        )
    return None, "; ".join(reasons) + " (docs/method.md#congruence-e2)"


def _common_weight_per_piece(weights: dict[int, int], gens: dict[int, list[_Generator]]) -> int | None:
    """The least K >= every weight with each ``K - k_i`` a sum of the weights of piece i's multipliers."""
    if not weights:
        return None
    steps = {i: math.gcd(*(g.weight for g in gens[i])) for i in weights}
    if any((weights[i] - weights[j]) % math.gcd(steps[i], steps[j]) for i in weights for j in weights):
        return None
    top = max(weights.values())
    # Beyond k_i + (product of piece i's multiplier weights) every multiple of its step is reachable,
    # and the admissible K form one class modulo the lcm of the steps.
    limit = max(weights[i] + math.prod(g.weight for g in gens[i]) for i in weights) + math.lcm(*steps.values())
    start = next(
        (
            k
            for k in range(top, top + math.lcm(*steps.values()) + 1)
            if all((k - weights[i]) % steps[i] == 0 for i in weights)
        ),
        None,
    )
    if start is None:
        return None
    for cand in range(start, max(limit, start) + 1, math.lcm(*steps.values())):
        if all(_decompose(cand - weights[i], gens[i]) is not None for i in weights):
            return cand
    return None  # pragma: no cover - the Frobenius bound guarantees a hit


def _substitute_mod(sub: _Substitute, stop: int, m: int) -> list[int]:
    """The substitute S mod m through ``q^(stop-1)``."""
    if sub.shift == 1:
        return _eisenstein_mod(sub.k, stop, m)
    # E_2(tau) - N E_2(N tau), N = sub.shift (docs/method.md#e2: a form of weight 2 on Gamma_0(N)).
    out = _eisenstein_mod(2, stop, m)
    base = list(out)
    n_shift = sub.shift
    for n in range(0, stop, n_shift):
        out[n] = (out[n] - n_shift * base[n // n_shift]) % m
    return out


def _padded(poly: Any, stop: int) -> list[int]:
    """Coefficients ``0 .. stop-1`` of an ``fmpz_mod_poly`` as ints."""
    cs = [int(c) for c in poly.coeffs()][:stop]
    return cs + [0] * (stop - len(cs))


def _inconsistent(detail: dict[str, Any], q: int, reason: str) -> _PrimePowerResult:
    detail["reason"] = reason
    detail["proved"] = False
    return _PrimePowerResult(detail, False, f"mod {q}: {reason}", inconsistent=True)

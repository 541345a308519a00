"""Congruences F = 0 (mod M) through :mod:`verifier.prove.congruence`.

Every case names its source beside it.  Every verdict is checked independently of the engine:
coefficients come from ``sympy.divisor_sigma``, ``sympy.bernoulli``, the product
``q prod (1 - q^n)^24`` and brute-force lattice counts, in plain integer and ``Fraction``
arithmetic.  A proved case is checked on 200 coefficients; a case that is not proved because it
is false is checked to have a coefficient that really differs mod M.
"""

from __future__ import annotations

import json
from collections.abc import Callable
from fractions import Fraction
from functools import cache

import pytest
import sympy
from verifier.forms.delta import delta_series
from verifier.forms.eisenstein import eisenstein_series
from verifier.prove.congruence import CongruenceDecision, Piece, decide_congruence, needed_precision
from verifier.series.qseries import QSeries

CHECK = 200  # coefficients checked independently for every proved case

# ---------------------------------------------------------------------------
# Independent coefficients (not the engine's)
# ---------------------------------------------------------------------------


@cache
def tau_list(count: int) -> tuple[int, ...]:
    """tau(0..count-1) from q prod (1 - q^n)^24 with plain integer lists."""
    body = [1] + [0] * (count - 1)  # prod (1 - q^n)^24 mod q^(count-1), shifted by q below
    for n in range(1, count):
        for _ in range(24):
            for i in range(count - 1, n - 1, -1):
                body[i] -= body[i - n]
    return (0, *body[: count - 1])


def sigma(r: int, n: int) -> int:
    return int(sympy.divisor_sigma(n, r))


def eis(k: int, n: int) -> Fraction:
    """a_n(E_k) = -2k/B_k sigma_{k-1}(n) for n >= 1, and 1 for n = 0 (docs/method.md#eisenstein), via sympy."""
    if n == 0:
        return Fraction(1)
    b = sympy.bernoulli(k)
    return Fraction(-2 * k) / Fraction(int(b.p), int(b.q)) * sigma(k - 1, n)


def theta_power(s: int, count: int) -> list[int]:
    """r_s(n), n < count: the number of x in Z^s with x_1^2 + ... + x_s^2 = n, by brute force."""
    one = [0] * count
    x = 0
    while x * x < count:
        one[x * x] += 1 if x == 0 else 2
        x += 1
    out = [1] + [0] * (count - 1)
    for _ in range(s):
        new = [0] * count
        for i, a in enumerate(out):
            if a:
                for j in range(count - i):
                    if one[j]:
                        new[i + j] += a * one[j]
        out = new
    return out


def residue(x: Fraction, m: int) -> int | None:
    """x mod m for an m-integral rational, None otherwise."""
    if sympy.gcd(x.denominator, m) != 1:
        return None
    return x.numerator * pow(x.denominator, -1, m) % m


def all_zero_mod(values: list[Fraction], m: int) -> bool:
    return all(residue(v, m) == 0 for v in values)


def first_nonzero_mod(values: list[Fraction], m: int) -> int | None:
    return next((n for n, v in enumerate(values) if residue(v, m) != 0), None)


# ---------------------------------------------------------------------------
# Building the engine's input
# ---------------------------------------------------------------------------

Spec = tuple[Fraction | int, int, int, Callable[[int], QSeries]]  # (weight, E_2 power, kernel, series at prec)


def decide(spec: list[Spec], modulus: int, level: int = 1, extra: int = 0) -> CongruenceDecision:
    prec = needed_precision([(Fraction(w), j) for w, j, _, _ in spec], modulus, level) + extra
    pieces = [Piece(Fraction(w), j, kernel, make(prec)) for w, j, kernel, make in spec]
    return decide_congruence(pieces, modulus, level)


def E(k: int, c: Fraction | int = 1) -> Callable[[int], QSeries]:
    return lambda prec: eisenstein_series(k, prec).scale(c)


def const(c: Fraction | int) -> Callable[[int], QSeries]:
    return lambda prec: QSeries.constant(c, prec)


def delta(c: Fraction | int = 1) -> Callable[[int], QSeries]:
    return lambda prec: delta_series(prec).scale(c)


def theta_series(s: int) -> Callable[[int], QSeries]:
    """theta^s = (sum_{n in Z} q^{n^2})^s, built with the engine's series arithmetic."""

    def make(prec: int) -> QSeries:
        coeffs = [0] * prec
        x = 0
        while x * x < prec:
            coeffs[x * x] += 1 if x == 0 else 2
            x += 1
        return QSeries.from_coefficients(coeffs) ** s

    return make


# tau(n) = sigma_11(n) mod 691 (docs/method.md#congruences-sturm worked example; Ramanujan 1916):
# F = Delta - sum sigma_11 q^n = Delta - (691/65520)(E_12 - 1).
C691 = Fraction(691, 65520)
TAU_SIGMA11: list[Spec] = [(12, 0, 1, delta()), (12, 0, 1, E(12, -C691)), (0, 0, 1, const(C691))]


def tau_minus_sigma11(count: int) -> list[Fraction]:
    t = tau_list(count)
    return [Fraction(t[n] - (sigma(11, n) if n else 0)) for n in range(count)]


# tau(n) = n sigma_3(n) mod 7 (docs/method.md#congruence-e2 worked example): sum n sigma_3(n) q^n = D((E_4 - 1)/240)
# = (E_2 E_4 - E_6)/720 (Ramanujan's equations, docs/method.md#derivatives), so F = Delta - E_4 E_2/720 + E_6/720.
TAU_N_SIGMA3: list[Spec] = [(12, 0, 1, delta()), (6, 1, 1, E(4, Fraction(-1, 720))), (6, 0, 1, E(6, Fraction(1, 720)))]


def tau_minus_n_sigma3(count: int) -> list[Fraction]:
    t = tau_list(count)
    return [Fraction(t[n] - (n * sigma(3, n) if n else 0)) for n in range(count)]


# ---------------------------------------------------------------------------
# Proved cases
# ---------------------------------------------------------------------------


def test_tau_sigma11_mod_691() -> None:
    """docs/method.md#congruences-sturm worked example (Ramanujan 1916)."""
    d = decide(TAU_SIGMA11, 691)
    assert d.proved, d.reason
    assert d.bound == 1
    assert d.witness is None and d.undefined is None
    assert all_zero_mod(tau_minus_sigma11(CHECK), 691)


def test_worked_example_h_form_mod_691() -> None:
    """docs/method.md#congruences-sturm: H = 691 E_12 - 691 E_4^3 - 65520 Delta is 0 mod 691, with B = 1 and a_1(H)
    = -691*720."""

    def h(prec: int) -> QSeries:
        e12 = eisenstein_series(12, prec).scale(691)
        return e12 - (eisenstein_series(4, prec) ** 3).scale(691) - delta_series(prec).scale(65520)

    d = decide([(12, 0, 1, h)], 691)
    assert d.proved, d.reason
    assert d.bound == 1
    assert h(2)[1] == -691 * 720
    # Independently: 691 E_12 = 691 + 65520 sigma_11, and E_4^3 by convolution of 1 + 240 sigma_3.
    e4 = [1] + [240 * sigma(3, n) for n in range(1, CHECK)]
    e4sq = [sum(e4[i] * e4[n - i] for i in range(n + 1)) for n in range(CHECK)]
    e4cube = [sum(e4sq[i] * e4[n - i] for i in range(n + 1)) for n in range(CHECK)]
    t = tau_list(CHECK)
    values = [
        Fraction(691 * (1 if n == 0 else 0) + (65520 * sigma(11, n) if n else 0) - 691 * e4cube[n] - 65520 * t[n])
        for n in range(CHECK)
    ]
    assert all_zero_mod(values, 691)


def test_tau_n_sigma3_mod_7_with_e2_piece() -> None:
    """docs/method.md#congruence-e2 worked example: E_2 -> E_8, E_6 * E_6, weight 12, B = 1."""
    d = decide(TAU_N_SIGMA3, 7)
    assert d.proved, d.reason
    assert d.bound == 1
    (detail,) = d.details
    assert detail["e2_replaced_by"] == "E_8"
    assert detail["weight"] == 12
    assert {u["multiplier"] for u in detail["multipliers"]} == {"1", "E_6"}
    assert all_zero_mod(tau_minus_n_sigma3(CHECK), 7)


PRIMES_5_59 = [p for p in range(5, 60) if sympy.isprime(p)]


@pytest.mark.parametrize("p", PRIMES_5_59)
def test_e_p_minus_1_is_one_mod_p(p: int) -> None:
    """E_{p-1} = 1 mod p (docs/method.md#congruence-weights; von Staudt-Clausen, Hardy-Wright Thm 118)."""
    d = decide([(p - 1, 0, 1, E(p - 1)), (0, 0, 1, const(-1))], p)
    assert d.proved, d.reason
    assert all_zero_mod([eis(p - 1, n) - (1 if n == 0 else 0) for n in range(CHECK)], p)


@pytest.mark.parametrize("p", [p for p in PRIMES_5_59 if p <= 29])
def test_e_p_minus_1_is_not_one_mod_p_squared(p: int) -> None:
    """docs/method.md#congruence-weights: E_{p-1} != 1 mod p^2 for 5 <= p <= 29."""
    d = decide([(p - 1, 0, 1, E(p - 1)), (0, 0, 1, const(-1))], p * p)
    assert not d.proved
    assert first_nonzero_mod([eis(p - 1, n) - (1 if n == 0 else 0) for n in range(CHECK)], p * p) == 1


def test_e4_is_one_mod_240_but_not_480() -> None:
    """docs/method.md#congruence-weights: E_4 = 1 mod 240 = 2^4 * 3 * 5; mod 480 it fails (E_4 != 1 mod 32)."""
    spec: list[Spec] = [(4, 0, 1, E(4)), (0, 0, 1, const(-1))]
    d = decide(spec, 240)
    assert d.proved, d.reason
    assert [x["modulus"] for x in d.details] == [16, 3, 5]
    values = [eis(4, n) - (1 if n == 0 else 0) for n in range(CHECK)]
    assert all_zero_mod(values, 240)
    d = decide(spec, 480, extra=2)
    assert not d.proved
    assert first_nonzero_mod(values, 480) == 1
    assert d.witness is not None and d.witness["n"] == 1 and d.witness["prime_powers"] == [32]


def test_counterexample_1_and_e4_mod_25_not_proved() -> None:
    """docs/method.md#congruence-weights counterexample: f = 1, g = E_4, M = 25; f E_4 - g = 0 yet a_1(E_4) = 240
    != 0 mod 25."""
    d = decide([(0, 0, 1, const(1)), (4, 0, 1, E(4, -1))], 25)
    assert not d.proved
    assert first_nonzero_mod([Fraction(1 if n == 0 else 0) - eis(4, n) for n in range(CHECK)], 25) == 1


def test_kummer_prime_power_e6_e26_mod_25() -> None:
    """Kummer congruence (docs/method.md#congruence-weights sources, Serre LNM 350): E_6 = E_26 mod 25 since 26 = 6
    mod 20.

    Proved with the multiplier E_4^5 = 1 mod 25; modulo 125 the gap 20 is not a multiple of 100,
    and the congruence is indeed false.
    """
    spec: list[Spec] = [(6, 0, 1, E(6)), (26, 0, 1, E(26, -1))]
    d = decide(spec, 25)
    assert d.proved, d.reason
    assert d.details[0]["multipliers"][0]["multiplier"] == "E_4^5"
    values = [eis(6, n) - eis(26, n) for n in range(CHECK)]
    assert all_zero_mod(values, 25)
    d = decide(spec, 125)
    assert not d.proved
    assert first_nonzero_mod(values, 125) == 1


def test_kummer_prime_power_e8_e50_mod_49() -> None:
    """Kummer congruence: E_8 = E_50 mod 49 since 50 = 8 mod 42; multiplier E_6^7 = 1 mod 49
    (docs/method.md#congruence-weights)."""
    d = decide([(8, 0, 1, E(8)), (50, 0, 1, E(50, -1))], 49)
    assert d.proved, d.reason
    assert all_zero_mod([eis(8, n) - eis(50, n) for n in range(CHECK)], 49)


def test_gap_two_mod_8() -> None:
    """docs/method.md#congruence-weights gap-2 trick: E_4 = E_6 mod 8 via E_4 E_6 = E_6 E_4 in weight 10."""
    d = decide([(4, 0, 1, E(4)), (6, 0, 1, E(6, -1))], 8)
    assert d.proved, d.reason
    assert d.details[0]["weight"] == 10
    assert all_zero_mod([eis(4, n) - eis(6, n) for n in range(CHECK)], 8)


def test_e2_is_one_mod_24_only() -> None:
    """docs/method.md#congruence-e2: E_2 = 1 mod 24 (mod 8 and mod 3 the substitution E_2 -> 1); mod 48 and mod 9
    unproven and false."""
    spec: list[Spec] = [(2, 1, 1, const(1)), (0, 0, 1, const(-1))]
    values = [eis(2, n) - (1 if n == 0 else 0) for n in range(CHECK)]
    d = decide(spec, 24)
    assert d.proved, d.reason
    assert all_zero_mod(values, 24)
    for m in (48, 9):
        d = decide(spec, m)
        assert not d.proved
        assert first_nonzero_mod(values, m) == 1


@pytest.mark.parametrize("p", [5, 7, 11, 13, 17, 19, 23])
def test_e2_is_e_p_plus_1_mod_p(p: int) -> None:
    """docs/method.md#congruence-e2 (Kummer): E_2 = E_{p+1} mod p for p >= 5."""
    d = decide([(2, 1, 1, const(1)), (p + 1, 0, 1, E(p + 1, -1))], p)
    assert d.proved, d.reason
    assert all_zero_mod([eis(2, n) - eis(p + 1, n) for n in range(CHECK)], p)


def test_theta4_is_one_mod_8_on_gamma0_4() -> None:
    """theta^4 = 1 + 8 sum ... (Jacobi's four-square theorem, docs/method.md#sums-of-squares): 1 mod 8, not mod 16,
    level 4."""
    spec: list[Spec] = [(2, 0, 1, theta_series(4)), (0, 0, 1, const(-1))]
    values = [Fraction(r - (1 if n == 0 else 0)) for n, r in enumerate(theta_power(4, CHECK))]
    d = decide(spec, 8, level=4)
    assert d.proved, d.reason
    assert d.details[0]["weight"] == 6 and d.bound == 3  # gap 2 closed with E_6 and E_4
    assert all_zero_mod(values, 8)
    d = decide(spec, 16, level=4)
    assert not d.proved
    assert first_nonzero_mod(values, 16) == 1


def test_composite_modulus_crt() -> None:
    """E_4 = 1 mod 240 and E_6 = 1 mod 504 (docs/method.md#congruence-weights): E_4 = E_6 mod gcd = 24, proved
    prime by prime."""
    d = decide([(4, 0, 1, E(4)), (6, 0, 1, E(6, -1))], 24)
    assert d.proved, d.reason
    assert [x["modulus"] for x in d.details] == [8, 3]
    assert all_zero_mod([eis(4, n) - eis(6, n) for n in range(CHECK)], 24)


# ---------------------------------------------------------------------------
# Not proved because false
# ---------------------------------------------------------------------------


def test_tau_sigma11_mod_691_squared_not_proved() -> None:
    """tau(n) = sigma_11(n) holds mod 691 only: tau(2) - sigma_11(2) = -2073 = -3 * 691."""
    d = decide(TAU_SIGMA11, 691**2)
    assert not d.proved
    values = tau_minus_sigma11(CHECK)
    assert first_nonzero_mod(values, 691**2) == 2
    assert values[2] == -3 * 691


@pytest.mark.parametrize("m", [2**11, 2**13, 2, 691 * 2])
def test_tau_sigma11_power_of_two_variants_never_proved(m: int) -> None:
    """Ramanujan's tau = sigma_11 mod 2^11 (from memory) is a statement about a residue class of n;
    for all n it is false already mod 2: tau(2) = -24 is even, sigma_11(2) = 2049 is odd."""
    d = decide(TAU_SIGMA11, m, extra=2)
    assert not d.proved
    values = tau_minus_sigma11(CHECK)
    assert first_nonzero_mod(values, m) == 2
    assert d.witness is not None and d.witness["n"] == 2


def test_tau_n_sigma3_mod_49_not_proved() -> None:
    """docs/method.md#congruence-e2: no substitution for E_2 mod 49 -- and the congruence is false: tau(2) - 2
    sigma_3(2) = -42."""
    d = decide(TAU_N_SIGMA3, 49)
    assert not d.proved
    assert "E_2" in d.reason
    values = tau_minus_n_sigma3(CHECK)
    assert first_nonzero_mod(values, 49) == 2


# ---------------------------------------------------------------------------
# Not proved although true, or not defined: the method's limits, stated
# ---------------------------------------------------------------------------


def test_mixed_characters_not_proved_even_when_true() -> None:
    """theta^2 = 1 + 4 sum (chi_{-4} * 1)(n) q^n = 1 mod 4 is true, but theta^2 (chi_{-4}) and 1 (trivial)
    lie in different spaces; a component mismatch neither proves nor refutes (docs/method.md#congruence-e2)."""
    d = decide([(1, 0, -1, theta_series(2)), (0, 0, 1, const(-1))], 4, level=4)
    assert not d.proved
    assert "character" in d.reason
    assert d.witness is None
    values = [Fraction(r - (1 if n == 0 else 0)) for n, r in enumerate(theta_power(2, CHECK))]
    assert all_zero_mod(values, 4)


def test_non_integral_pieces_not_proved() -> None:
    """sigma_3(n) = sigma(n) mod 2 (d^3 = d mod 2) is true, but its pieces E_4/240, E_2/24 are not 2-integral."""
    spec: list[Spec] = [
        (4, 0, 1, E(4, Fraction(1, 240))),
        (0, 0, 1, const(Fraction(-1, 240) - Fraction(1, 24))),
        (2, 1, 1, const(Fraction(1, 24))),
    ]
    d = decide(spec, 2, extra=CHECK)
    assert not d.proved
    # Scaled by 2^4 (docs/method.md#congruence-denominators), the weights 0, 4, 6 cannot be joined mod 2^5.
    assert "no common weight" in d.reason
    assert d.witness is None and d.undefined is None  # the known coefficients of F are all 0 mod 2
    assert all_zero_mod([Fraction(sigma(3, n) - sigma(1, n)) if n else Fraction(0) for n in range(CHECK)], 2)


def test_undefined_congruence() -> None:
    """(E_4 - 1)/7 has a_1 = 240/7: 'mod 7' is not defined for it."""
    d = decide([(4, 0, 1, E(4, Fraction(1, 7))), (0, 0, 1, const(Fraction(-1, 7)))], 7, extra=2)
    assert not d.proved
    assert d.undefined is not None and d.undefined["n"] == 1 and d.undefined["primes"] == [7]
    assert "not defined" in d.reason


def test_half_integral_weight_not_proved() -> None:
    """docs/method.md#claim-congruence: no congruence bound is used in half-integral weight."""
    d = decide([(Fraction(1, 2), 0, 1, theta_series(1)), (0, 0, 1, const(-1))], 2, level=4)
    assert not d.proved
    assert "half-integral" in d.reason


def test_pole_not_proved() -> None:
    """docs/method.md#unproven: poles together with congruences are unproven."""

    def pole(prec: int) -> QSeries:
        return QSeries.monomial(-1, prec) + eisenstein_series(4, prec)

    d = decide([(0, 0, 1, pole)], 2)
    assert not d.proved
    assert "pole" in d.reason


def test_insufficient_precision_not_proved() -> None:
    pieces = [
        Piece(Fraction(8), 0, 1, eisenstein_series(8, 5)),
        Piece(Fraction(50), 0, 1, eisenstein_series(50, 3).scale(-1)),
    ]
    d = decide_congruence(pieces, 49, 1)
    assert not d.proved
    assert d.details[0]["needed_precision"] == 5


def test_mislabelled_input_is_caught() -> None:
    """Delta declared as weight 4: its 'own Sturm bound' would be 0, but a_1 = 1 is not 0 mod 2."""
    d = decide([(4, 0, 1, delta())], 2, extra=3)
    assert not d.proved
    assert "inconsistent" in d.reason


def test_bad_modulus_and_level() -> None:
    spec = [Piece(Fraction(4), 0, 1, eisenstein_series(4, 3))]
    for m, n in ((1, 1), (0, 1), (7, 0)):
        assert not decide_congruence(spec, m, n).proved


# ---------------------------------------------------------------------------
# Precision and output shape
# ---------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("weights", "modulus", "level", "expected"),
    [
        ([(Fraction(12), 0), (Fraction(12), 0), (Fraction(0), 0)], 691, 1, 2),  # B = 1 in weight 12
        (
            [(Fraction(12), 0), (Fraction(6), 1), (Fraction(6), 0)],
            7,
            1,
            2,
        ),  # docs/method.md#congruence-e2: weight 12, B = 1
        ([(Fraction(6), 0), (Fraction(26), 0)], 25, 1, 3),  # weight 26, B = 2
        ([(Fraction(2), 0), (Fraction(0), 0)], 8, 4, 4),  # weight 6 on Gamma0(4), B = 3
        ([(Fraction(1, 2), 0)], 2, 4, 1),  # half-integral: nothing to compute
    ],
)
def test_needed_precision(weights: list[tuple[Fraction, int]], modulus: int, level: int, expected: int) -> None:
    assert needed_precision(weights, modulus, level) == expected


def test_details_are_plain_data() -> None:
    for spec, m in ((TAU_N_SIGMA3, 7), (TAU_SIGMA11, 691 * 4), (TAU_N_SIGMA3, 49)):
        d = decide(spec, m)
        json.dumps({"proved": d.proved, "reason": d.reason, "bound": d.bound, "details": d.details})
        assert all({"prime", "exponent", "modulus", "proved", "reason"} <= set(x) for x in d.details)


# ---------------------------------------------------------------------------
# E_2 to higher 2-adic precision: E_2(tau) - 2^s E_2(2^s tau) on Gamma_0(2^s)
# ---------------------------------------------------------------------------


def _e2_power_minus(count: int, power: int, other: int, c_other: int) -> list[int]:
    """Coefficients of E_2^power - (1 + c_other sum sigma_{other-1}(n) q^n) with plain integers."""
    e2 = [1] + [-24 * int(sympy.divisor_sigma(n, 1)) for n in range(1, count)]
    acc = [1] + [0] * (count - 1)
    for _ in range(power):
        acc = [sum(acc[i] * e2[n - i] for i in range(n + 1)) for n in range(count)]
    ek = [1] + [c_other * int(sympy.divisor_sigma(n, other - 1)) for n in range(1, count)]
    return [x - y for x, y in zip(acc, ek, strict=True)]


@pytest.mark.parametrize(
    ("power", "k", "c_k", "modulus", "verdict"),
    [
        # E_2^2 - E_4 = 12 D E_2 = -288 sum n sigma(n) q^n (Ramanujan 1916, docs/method.md#derivatives):
        # true mod 288 = 2^5 * 3^2, where the 2-part needs E_2 mod 32 (E_2(tau) - 32 E_2(32 tau)).
        (2, 4, 240, 288, "proved"),
        (2, 4, 240, 576, "refuted"),
        (2, 4, 240, 864, "refuted"),
        # E_2^3 = E_6 (mod 432 = 2^4 * 3^3): the q-coefficients are -72 and -504, and the brute force below
        # finds every coefficient of the difference divisible by 432 (sympy); the 3-part needs E_2 mod 27.
        (3, 6, -504, 72, "proved"),
        (3, 6, -504, 432, "proved"),
        (3, 6, -504, 288, "refuted"),
        (3, 6, -504, 864, "refuted"),
    ],
)
def test_e2_powers_against_eisenstein(power: int, k: int, c_k: int, modulus: int, verdict: str) -> None:
    from verifier.api import check_text

    diff = _e2_power_minus(120, power, k, c_k)
    first = next((n for n, x in enumerate(diff) if x % modulus), None)
    assert (first is None) == (verdict == "proved")  # brute force with sympy
    doc = f"%@claim\n\\[ E_2^{power} \\equiv E_{k} \\pmod{{{modulus}}} \\]\n"
    (c,) = check_text(doc, "t.tex").to_dict()["claims"]
    assert c["verdict"] == verdict, c["message"]
    if verdict == "refuted":
        assert c["first_difference"]["n"] == first
    elif modulus == 288:
        two = next(d for d in c["components"] if d["prime"] == 2)
        assert two["e2_level"] == 32 and two["bound"] == 16  # weight 4, index 48 (docs/method.md#sturm-bound)

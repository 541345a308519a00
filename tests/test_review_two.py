"""Adversarial review of four changes to congruences: forms compared from q^0, sides that add forms of
different weights, an integral power of q in front of both sides divided out, and the re-checker's
constant factors and eta quotients of high order.

Every verdict is judged by brute force written here (plain integers and fractions: products
prod (1 - q^{dk})^r from :mod:`tests.brute`, E_k from the divisor-sum formula with sympy's sigma and
Bernoulli numbers, theta as a sum over squares), never by qreferee itself.  Sources of the true claims:
- EIS: E_k = 1 - (2k/B_k) sum sigma_{k-1}(n) q^n (common practice), so E_4 = 1 (mod 240),
  E_6 = 1 (mod 504), E_2 = 1 (mod 24) and, for p >= 5, E_k = E_k' (mod p) when k = k' (mod p - 1)
  (Kummer's congruences for B_k/k; common practice).  Checked below by brute force.
- RAM: Ramanujan's D E_4 = (E_2 E_4 - E_6)/3 (Ramanujan 1916, from memory), so E_2 E_4 - E_6 = 720 sum n sigma_3(n) q^n.
- TAU: tau(n) = sigma_11(n) (mod 691) and tau(n) = n sigma_3(n) (mod 7) (Swinnerton-Dyer, LNM 350
  (1973), from memory); tau(n) is odd exactly for odd squares n (from memory; checked by brute force).
- FROB: (1 - x)^p = 1 - x^p (mod p), so f_k^p = f_{pk} (mod p), lifted to p^e (common practice).
- JAC: Delta = q prod (1 - q^n)^24 (Jacobi's product formula, common practice); theta^2 = 1 + 4 sum
  (sum_{d | n} chi_{-4}(d)) q^n and theta^4 = 1 + 8 sum_{4 does not divide d | n} d q^n (Jacobi's two- and
  four-square theorems, common practice).

Section (a): strict xfail regressions for wrong verdicts and re-checker failures found in the review.
Section (b): adversarial claims answered correctly.  Section (c): altered certificates the
re-checker must not confirm.
"""

from __future__ import annotations

import copy
from collections.abc import Callable
from fractions import Fraction
from typing import Any

import pytest
from sympy import bernoulli, divisor_sigma
from tests.brute import eta_product
from verifier.api import check_text
from verifier.recheck.check import CONFIRMED, recheck

COUNT = 120
F_K = "%@define f_k = (q^k;q^k)_\\infty\n"
EIS = "EIS: divisor-sum formula for E_k, common practice"
KUMMER = "EIS with Kummer's congruences (common practice)"
RAM = "RAM: Ramanujan 1916 (from memory)"
TAU = "TAU: Swinnerton-Dyer, LNM 350 (1973), from memory"
FROB = "FROB: (1 - x)^p = 1 - x^p (mod p), common practice"
JAC = "JAC: Jacobi's product and square theorems, common practice"

Series = list[Fraction]


# -- brute force ------------------------------------------------------------------------------


def eis(k: int) -> Series:
    c = Fraction(-24) if k == 2 else Fraction(-2 * k) / Fraction(str(bernoulli(k)))
    return [Fraction(1)] + [c * int(divisor_sigma(n, k - 1)) for n in range(1, COUNT)]


def eta(exps: dict[int, int], shift: int = 0) -> Series:
    """q^shift prod_d prod_k (1 - q^{dk})^{r_d}."""
    e = eta_product(exps, COUNT)
    return [Fraction(0)] * shift + [Fraction(x) for x in e[: COUNT - shift]]


def theta() -> Series:
    out = [Fraction(0)] * COUNT
    for m in range(-12, 13):
        if m * m < COUNT:
            out[m * m] += 1
    return out


def const(c: int) -> Series:
    return [Fraction(c)] + [Fraction(0)] * (COUNT - 1)


def mul(*xs: Series) -> Series:
    out = const(1)
    for b in xs:
        new = [Fraction(0)] * COUNT
        for i, x in enumerate(out):
            if x:
                for j in range(COUNT - i):
                    new[i + j] += x * b[j]
        out = new
    return out


def add(*xs: Series) -> Series:
    return [sum(t, Fraction(0)) for t in zip(*xs, strict=True)]


def sc(c: int, a: Series) -> Series:
    return [c * x for x in a]


def deriv(a: Series) -> Series:
    return [n * x for n, x in enumerate(a)]


def V2(a: Series) -> Series:
    """a(q^2)."""
    return [a[n // 2] if n % 2 == 0 else Fraction(0) for n in range(COUNT)]


def shifted(a: Series, s: int) -> Series:
    return [Fraction(0)] * s + a[: COUNT - s]


def off(x: Fraction, modulus: int) -> bool:
    """Whether x is not 0 modulo the modulus (x may have a denominator prime to it)."""
    y = x / modulus
    return any(y.denominator % p == 0 for p in range(2, modulus + 1) if modulus % p == 0)


def first_failure(
    a: Series, b: Series, modulus: int, start: int = 0, member: Callable[[int], bool] = lambda n: True
) -> int | None:
    return next((n for n in range(start, COUNT) if member(n) and off(a[n] - b[n], modulus)), None)


def run(body: str, defines: str = "") -> dict[str, Any]:
    (c,) = check_text(defines + "%@claim\n\\[ " + body + " \\]\n", "review2.tex").to_dict()["claims"]
    return c


E2, E4, E6, E8 = eis(2), eis(4), eis(6), eis(8)
DELTA = eta({1: 24}, 1)
TH = theta()
TH4 = mul(TH, TH, TH, TH)
ODD: Callable[[int], bool] = lambda n: n % 2 == 1  # noqa: E731
EVEN: Callable[[int], bool] = lambda n: n % 2 == 0  # noqa: E731


# -- (a) regressions --------------------------------------------------------------------------

DEFINES = "%@define F = E_4\n%@define T = \\theta^4\n%@define H = 240\\Delta\n"


# Regression (these three): a claim written with n (a_F(n), r_4(n)) is about a sequence and starts at
# n = 1; only a congruence written between forms, with no n, speaks of q^0.
def test_a_rearranged_coefficient_congruence_gets_the_same_verdict() -> None:
    # F = E_4, H = 240 Delta: a_F(n) - a_H(n) = 240 (sigma_3(n) - tau(n)) for n >= 1 (EIS), 1 at n = 0.
    diff = add(E4, sc(-240, DELTA))
    assert first_failure(diff, const(0), 240, 1) is None and first_failure(diff, const(0), 240, 0) == 0
    one = run("a_F(n) \\equiv a_H(n) \\pmod{240}", DEFINES)
    other = run("a_F(n) - a_H(n) \\equiv 0 \\pmod{240}", DEFINES)
    assert one["verdict"] == other["verdict"], (one["message"], other["message"])


def test_a_coefficient_congruence_with_zero_reads_like_one_with_an_arithmetic_zero() -> None:
    assert first_failure(E4, const(0), 240, 1) is None  # EIS
    one = run("a_F(n) \\equiv 0 \\pmod{240}", DEFINES)
    other = run("a_F(n) \\equiv 0 \\cdot \\sigma_3(n) \\pmod{240}", DEFINES)
    assert one["verdict"] == other["verdict"], (one["message"], other["message"])


def test_r4_and_the_coefficients_of_theta4_get_the_same_verdict() -> None:
    assert first_failure(TH4, const(0), 8, 1) is None  # JAC: r_4(n) = 8 sigma(n) - 32 sigma(n/4)
    one = run("r_4(n) \\equiv 0 \\pmod 8", DEFINES)
    other = run("a_T(n) \\equiv 0 \\pmod 8", DEFINES)
    assert one["verdict"] == other["verdict"], (one["message"], other["message"])


# A class of n that contains 0, on a congruence between forms whose constant terms differ.  Decision:
# a class of n is read on n >= 1 (docs/method.md#classes-of-n), because the twists that restrict a
# form to a class do not see q^0; the message says so.  Without a class the same forms are compared
# from q^0 and the claim is refuted at n = 0.
CLASS_AT_ZERO = [
    ("E_4 \\equiv 0 \\pmod{240} \\quad (n \\text{ even})", E4, const(0), 240),
    ("E_4 \\equiv 0 \\pmod{240} \\quad (n \\equiv 0 \\pmod 2)", E4, const(0), 240),
    ("\\Delta + 1 \\equiv 0 \\pmod{2} \\quad (n \\text{ even})", add(DELTA, const(1)), const(0), 2),
]


@pytest.mark.parametrize(("body", "left", "right", "modulus"), CLASS_AT_ZERO)
def test_a_class_containing_zero_is_read_from_n_1_and_says_so(
    body: str, left: Series, right: Series, modulus: int
) -> None:
    assert first_failure(left, right, modulus, 0, EVEN) == 0 and first_failure(left, right, modulus, 1, EVEN) is None
    c = run(body)
    assert c["verdict"] == "proved" and c["message"].startswith("for all n >= 1 with n ")
    bare = run(body.split("\\quad")[0])
    assert bare["verdict"] == "refuted" and bare["first_difference"]["n"] == 0


# True claims, proved, whose certificates have a weight-0 constant piece and a joint Sturm bound B >= 1.
# Regression: the re-checker raised IndexError on them (a constant series stores one coefficient).
RECHECK_CRASH = [
    ("\\theta^4 \\equiv 1 \\pmod 8", TH4, const(1), 8, JAC),
    ("E_4 + E_6 + E_{8} \\equiv 3 \\pmod{24}", add(E4, E6, E8), const(3), 24, EIS),
    ("E_4 + 2E_6 \\equiv 3 \\pmod{48}", add(E4, sc(2, E6)), const(3), 48, EIS),
    ("E_2^2 + E_4 \\equiv 2 \\pmod{48}", add(mul(E2, E2), E4), const(2), 48, EIS),
    ("D\\Delta + E_4 \\equiv \\Delta + 1 \\pmod 2", add(deriv(DELTA), E4), add(DELTA, const(1)), 2, TAU),
    (
        "E_4 + \\eta(2\\tau)^{12} \\equiv 1 + \\eta(\\tau)^{24} \\pmod{2}",
        add(E4, eta({2: 12}, 1)),
        add(const(1), DELTA),
        2,
        FROB,
    ),
    # E_2 -> 1 modulo 8 leaves a constant piece even where none is written.
    ("\\theta^{4} - E_2 \\equiv 0 \\pmod{8}", add(TH4, sc(-1, E2)), const(0), 8, JAC),
    (
        "\\Delta(2\\tau) + E_6 \\equiv \\Delta^{2} + 1 \\pmod{2}",
        add(V2(DELTA), E6),
        add(mul(DELTA, DELTA), const(1)),
        2,
        FROB,
    ),
]


@pytest.mark.parametrize(("body", "left", "right", "modulus", "source"), RECHECK_CRASH)
def test_certificates_with_a_constant_piece_are_rechecked(
    body: str, left: Series, right: Series, modulus: int, source: str
) -> None:
    assert first_failure(left, right, modulus) is None
    c = run(body)
    assert c["verdict"] == "proved", c["message"]
    assert recheck(c["certificate"]).status == CONFIRMED


# -- (b) adversarial claims answered correctly ------------------------------------------------

# (claim, left, right, modulus, range start, class or None, re-check expected to confirm, source or "false")
Case = tuple[str, Series, Series, int, int, Callable[[int], bool] | None, bool, str]
CASES: list[Case] = [
    ("E_4 \\equiv 1 \\pmod{240}", E4, const(1), 240, 0, None, True, EIS),
    ("E_4 \\equiv 2 \\pmod{240}", E4, const(2), 240, 0, None, False, "false at q^0"),
    ("E_4 \\equiv 241 \\pmod{240}", E4, const(241), 240, 0, None, True, EIS),
    ("E_4 \\equiv 0 \\pmod{240}", E4, const(0), 240, 0, None, False, "false at q^0"),
    ("E_4 \\equiv 0 \\pmod{240} \\quad (n \\ge 1)", E4, const(0), 240, 1, None, True, EIS),
    ("E_4 \\equiv 1 \\pmod{480}", E4, const(1), 480, 0, None, False, "false"),
    ("E_6 \\equiv 1 \\pmod{504}", E6, const(1), 504, 0, None, True, EIS),
    ("E_4 + E_6 \\equiv 2 \\pmod{24}", add(E4, E6), const(2), 24, 0, None, True, EIS),
    ("E_4 + E_6 \\equiv 2 \\pmod{48}", add(E4, E6), const(2), 48, 0, None, False, "false"),
    (
        "E_4 + E_6 + \\Delta \\equiv 2 + \\Delta \\pmod{24}",
        add(E4, E6, DELTA),
        add(const(2), DELTA),
        24,
        0,
        None,
        True,
        EIS,
    ),
    ("E_4 + E_6 + E_{8} \\equiv 3 \\pmod{48}", add(E4, E6, E8), const(3), 48, 0, None, False, "false"),
    ("E_2 \\equiv 1 \\pmod{24}", E2, const(1), 24, 0, None, True, EIS),
    ("E_2 \\equiv E_4 \\pmod{48}", E2, E4, 48, 0, None, False, "false"),
    ("E_2 \\equiv E_6 \\pmod{16}", E2, E6, 16, 0, None, True, EIS),
    ("E_2 \\equiv E_6 \\pmod{32}", E2, E6, 32, 0, None, False, "false"),
    ("E_2 \\equiv E_8 \\pmod{9}", E2, E8, 9, 0, None, True, EIS),
    ("E_2 \\equiv E_8 \\pmod{27}", E2, E8, 27, 0, None, False, "false"),
    ("E_2 \\equiv E_6 \\pmod 5", E2, E6, 5, 0, None, True, KUMMER),
    ("E_2 \\equiv E_6 + 1 \\pmod 5", E2, add(E6, const(1)), 5, 0, None, False, "false at q^0"),
    ("E_4 - E_{16} \\equiv 0 \\pmod{13}", add(E4, sc(-1, eis(16))), const(0), 13, 0, None, True, KUMMER),
    ("E_4 + E_{16} \\equiv 2E_{28} \\pmod{169}", add(E4, eis(16)), sc(2, eis(28)), 169, 0, None, False, "false"),
    ("E_2 E_4 - E_6 \\equiv 0 \\pmod{720}", add(mul(E2, E4), sc(-1, E6)), const(0), 720, 0, None, True, RAM),
    ("E_2 E_4 - E_6 \\equiv 0 \\pmod{1440}", add(mul(E2, E4), sc(-1, E6)), const(0), 1440, 0, None, False, "false"),
    ("D E_4 \\equiv 0 \\pmod{240}", deriv(E4), const(0), 240, 0, None, True, EIS),
    ("D E_4 \\equiv 240\\Delta \\pmod{480}", deriv(E4), sc(240, DELTA), 480, 0, None, True, TAU),
    ("\\theta^4 \\equiv 1 \\pmod{16}", TH4, const(1), 16, 0, None, False, "false"),
    ("\\theta^2 \\equiv 1 + 4\\Delta \\pmod 4", mul(TH, TH), add(const(1), sc(4, DELTA)), 4, 0, None, True, JAC),
    ("\\theta + E_4 \\equiv \\theta + 2 \\pmod{240}", add(TH, E4), add(TH, const(2)), 240, 0, None, False, "false"),
    ("\\theta + E_2 \\equiv \\theta + 1 \\pmod{8}", add(TH, E2), add(TH, const(1)), 8, 0, None, False, EIS),
    (
        "\\theta^3 + E_6 \\equiv \\theta^3 + 1 \\pmod{1008}",
        add(mul(TH, TH, TH), E6),
        add(mul(TH, TH, TH), const(1)),
        1008,
        0,
        None,
        False,
        "false",
    ),
    ("\\Delta \\equiv \\theta(\\tau) \\pmod 2", DELTA, TH, 2, 0, None, False, "false at q^0"),
    ("\\Delta \\equiv 0 \\pmod{2} \\quad (n \\text{ even})", DELTA, const(0), 2, 1, EVEN, True, TAU),
    ("\\Delta \\equiv 1 \\pmod{2} \\quad (n \\text{ odd})", DELTA, const(1), 2, 1, ODD, False, "false"),
    ("E_4 \\equiv E_6 \\pmod{2} \\quad (n \\ge 0)", E4, E6, 2, 0, None, True, EIS),
    (
        "\\tau(n) \\equiv \\sigma_{11}(n) \\pmod{691}",
        DELTA,
        [Fraction(0)] + [Fraction(int(divisor_sigma(n, 11))) for n in range(1, COUNT)],
        691,
        1,
        None,
        True,
        TAU,
    ),
]


@pytest.mark.parametrize(("body", "left", "right", "modulus", "start", "member", "confirm", "source"), CASES)
def test_forms_from_q0_and_sums_of_weights(
    body: str,
    left: Series,
    right: Series,
    modulus: int,
    start: int,
    member: Callable[[int], bool] | None,
    confirm: bool,
    source: str,
) -> None:
    _judge(run(body), left, right, modulus, start, member, confirm, source)


def _judge(
    c: dict[str, Any],
    left: Series,
    right: Series,
    modulus: int,
    start: int,
    member: Callable[[int], bool] | None,
    confirm: bool,
    source: str,
) -> None:
    """The verdict on one case against the brute force: proved (and re-checked) or refuted at its first n."""
    n = first_failure(left, right, modulus, start, member or (lambda k: True))
    assert (n is None) == (not source.startswith("false")), "the source and the brute force disagree"
    if n is None:
        assert c["verdict"] == "proved", c["message"]
        if confirm:
            assert recheck(c["certificate"]).status == CONFIRMED
    else:
        assert c["verdict"] == "refuted", c["message"]
        w = c["first_difference"]
        assert w["n"] == n and (Fraction(w["left"]), Fraction(w["right"])) == (left[n], right[n])


# An integral power of q in front of both sides (f_k = (q^k; q^k)_oo).
SHIFTS: list[Case] = [
    ("f_1^{24} \\equiv f_2^{12} \\pmod 8", eta({1: 24}), eta({2: 12}), 8, 0, None, True, FROB),
    ("q f_1^{24} \\equiv \\Delta \\pmod 7", eta({1: 24}, 1), DELTA, 7, 0, None, True, JAC),
    ("q f_1^{24} \\equiv q^7 f_7^{24} \\pmod 7", eta({1: 24}, 1), eta({7: 24}, 7), 7, 0, None, False, "false"),
    ("q f_1^{24} \\equiv \\Delta \\pmod 7 \\quad (n \\ge 2)", eta({1: 24}, 1), DELTA, 7, 2, None, True, JAC),
    ("q f_1^{24} - \\Delta \\equiv 0 \\pmod 7", add(eta({1: 24}, 1), sc(-1, DELTA)), const(0), 7, 0, None, True, JAC),
    ("q^2 f_4^{6} \\equiv q^2 f_8^{3} \\pmod 2", eta({4: 6}, 2), eta({8: 3}, 2), 2, 0, None, True, FROB),
    ("q^2 f_4^{6} \\equiv q^2 f_8^{3} \\pmod 4", eta({4: 6}, 2), eta({8: 3}, 2), 4, 0, None, False, "false"),
    ("q^{-1} \\Delta \\equiv f_5^{4} f_1^{4} \\pmod 5", eta({1: 24}), eta({1: 4, 5: 4}), 5, 0, None, True, FROB),
    ("q^{-1} \\Delta \\equiv f_5^{4} f_1^{4} \\pmod{25}", eta({1: 24}), eta({1: 4, 5: 4}), 25, 0, None, False, "false"),
    (
        "\\frac{q^{2}}{f_1^{24}} \\equiv \\frac{q^{2}}{f_2^{12}} \\pmod{8}",
        eta({1: -24}, 2),
        eta({2: -12}, 2),
        8,
        0,
        None,
        True,
        FROB,
    ),
    (
        "q^{2} f_1^{24} \\equiv q \\Delta(\\tau) + q^2 f_3^8 \\pmod{3}",
        eta({1: 24}, 2),
        add(shifted(DELTA, 1), eta({3: 8}, 2)),
        3,
        0,
        None,
        False,
        "false",
    ),
    ("q^2 E_4 \\equiv q^2 E_6 \\pmod{24} \\quad (n \\ge 3)", shifted(E4, 2), shifted(E6, 2), 24, 3, None, True, EIS),
    (
        "q^2 E_4 \\equiv 2q^2 E_6 \\pmod{240} \\quad (n \\ge 3)",
        shifted(E4, 2),
        shifted(sc(2, E6), 2),
        240,
        3,
        None,
        False,
        "false",
    ),
    (
        "E_4 + \\eta(4\\tau)^{6} \\equiv 1 + \\eta(\\tau)^{24} \\pmod{2}",
        add(E4, eta({4: 6}, 1)),
        add(const(1), DELTA),
        2,
        0,
        None,
        True,
        FROB,
    ),
    (
        "E_6 + \\eta(4\\tau)^{6} \\equiv 1 + \\eta(8\\tau)^{3} \\pmod{4}",
        add(E6, eta({4: 6}, 1)),
        add(const(1), eta({8: 3}, 1)),
        4,
        0,
        None,
        False,
        "false",
    ),
]


@pytest.mark.parametrize(("body", "left", "right", "modulus", "start", "member", "confirm", "source"), SHIFTS)
def test_a_power_of_q_in_front(
    body: str,
    left: Series,
    right: Series,
    modulus: int,
    start: int,
    member: Callable[[int], bool] | None,
    confirm: bool,
    source: str,
) -> None:
    _judge(run(body, F_K), left, right, modulus, start, member, confirm, source)


# -- (c) altered certificates -----------------------------------------------------------------

# Proved claims (left = right mod M, the sides L, R) whose certificates are altered: the left side
# multiplied by c (false when (c - 1) L is not 0 mod M) or the modulus multiplied by k (false when
# L - R is not 0 mod kM).  A power of q in front changes neither test, so L and R are the claim's sides.
ALTERED = [
    ("E_4 \\equiv 1 \\pmod{240}", "", E4, const(1), 240),
    ("E_4 + E_6 \\equiv 2 \\pmod{24}", "", add(E4, E6), const(2), 24),
    ("E_2 \\equiv E_6 \\pmod{16}", "", E2, E6, 16),
    ("q^2 f_4^{6} \\equiv q^2 f_8^{3} \\pmod 2", F_K, eta({4: 6}, 2), eta({8: 3}, 2), 2),
    ("f_1^{24} \\equiv f_2^{12} \\pmod 8", F_K, eta({1: 24}), eta({2: 12}), 8),
    ("q^{-1} \\Delta \\equiv f_5^{4} f_1^{4} \\pmod 5", F_K, eta({1: 24}), eta({1: 4, 5: 4}), 5),
    ("3 f_1^{2} \\equiv 3 f_2 \\pmod 2", F_K, sc(3, eta({1: 2})), sc(3, eta({2: 1})), 2),
    ("\\frac{q^{2}}{f_1^{24}} \\equiv \\frac{q^{2}}{f_2^{12}} \\pmod{8}", F_K, eta({1: -24}, 2), eta({2: -12}, 2), 8),
    ("D E_4 \\equiv 0 \\pmod{240}", "", deriv(E4), const(0), 240),
]


@pytest.mark.parametrize(("body", "defines", "left", "right", "modulus"), ALTERED)
def test_altered_certificates_are_not_confirmed(
    body: str, defines: str, left: Series, right: Series, modulus: int
) -> None:
    c = run(body, defines)
    assert c["verdict"] == "proved", c["message"]
    cert = c["certificate"]
    tried = 0
    for factor in (2, 3, -1, 7, modulus + 1):
        if first_failure(sc(factor - 1, left), const(0), modulus) is None:
            continue  # still true
        bad = copy.deepcopy(cert)
        bad["left"]["expr"] = f"(* {factor} {cert['left']['expr']})"
        assert recheck(bad).status != CONFIRMED, factor
        tried += 1
    for k in (2, 3, 5):
        if first_failure(left, right, modulus * k) is None:
            continue
        bad = copy.deepcopy(cert)
        bad["modulus"] = modulus * k
        assert recheck(bad).status != CONFIRMED, k
        tried += 1
    assert tried >= 2

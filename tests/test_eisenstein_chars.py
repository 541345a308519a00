"""Eisenstein series with characters against docs/method.md#eisenstein-characters (Diamond–Shurman §4.5–4.8, from memory
there) and against brute-force theta counts (sums of squares, Hardy–Wright Thms 278, 386, via
docs/method.md#sums-of-squares)."""

from __future__ import annotations

from fractions import Fraction
from itertools import product

from verifier.forms.eisenstein_chars import eisenstein_character_series, generalised_bernoulli, is_defined
from verifier.numbers import QuadraticCharacter
from verifier.series.qseries import QSeries

TRIVIAL = QuadraticCharacter(1)
CHI_M4 = QuadraticCharacter(-1)  # kernel -1: the character of discriminant -4
CHI_M3 = QuadraticCharacter(-3)


def test_generalised_bernoulli_values() -> None:
    # docs/method.md#eisenstein-characters: B_{1,chi_-4} = -1/2, B_{3,chi_-4} = 3/2, B_{1,chi_-3} = -1/3.
    assert generalised_bernoulli(1, CHI_M4) == Fraction(-1, 2)
    assert generalised_bernoulli(3, CHI_M4) == Fraction(3, 2)
    assert generalised_bernoulli(1, CHI_M3) == Fraction(-1, 3)
    # B_{k,1} = B_k with B_1 = +1/2 (docs/method.md#eisenstein-characters) and B_4 = -1/30 (Abramowitz–Stegun Table
    # 23.2).
    assert generalised_bernoulli(1, TRIVIAL) == Fraction(1, 2)
    assert generalised_bernoulli(4, TRIVIAL) == Fraction(-1, 30)


def _squares(s: int, count: int) -> list[int]:
    """r_s(n) for n < count by brute force (independent of the engine)."""
    r = [0] * count
    bound = int(count**0.5) + 1
    for x in product(range(-bound, bound + 1), repeat=s):
        n = sum(v * v for v in x)
        if n < count:
            r[n] += 1
    return r


def test_theta_squared_is_twice_e1() -> None:
    # docs/method.md#eisenstein-characters: theta^2 = 2 E_1^{1, chi_-4} (r_2, Hardy–Wright Thm 278).
    e = eisenstein_character_series(1, TRIVIAL, CHI_M4, 60)
    assert [2 * e[n] for n in range(60)] == _squares(2, 60)


def test_theta_sixth_power() -> None:
    # theta^6 = 8 E_3^{chi_-4, 1} - 2 E_3^{1, chi_-4}: r_6 (Grosswald, Ch. 9; docs/method.md#sums-of-squares).
    a = eisenstein_character_series(3, CHI_M4, TRIVIAL, 40)
    b = eisenstein_character_series(3, TRIVIAL, CHI_M4, 40)
    combo: QSeries = a.scale(8) - b.scale(2)
    assert [combo[n] for n in range(40)] == _squares(6, 40)


def test_parity_and_the_level_one_exception() -> None:
    # psi phi(-1) must equal (-1)^k; k = 2 with both characters trivial is excluded
    # (docs/method.md#eisenstein-characters).
    assert is_defined(1, TRIVIAL, CHI_M4)
    assert not is_defined(2, TRIVIAL, CHI_M4)
    assert not is_defined(2, TRIVIAL, TRIVIAL)
    assert is_defined(4, TRIVIAL, TRIVIAL)

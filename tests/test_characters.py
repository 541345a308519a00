"""Checks of the Kronecker symbol and quadratic characters against outside sources.

The Kronecker symbol is compared with sympy's independent implementation
(``sympy.functions.combinatorial.numbers.kronecker_symbol``) and with the rules of docs/method.md#characters
(Ireland–Rosen, A Classical Introduction to Modern Number Theory, Ch. 5, from memory), with
Legendre symbols from Euler's criterion. Character values are checked against textbook tables
(Diamond–Shurman §4.3, from memory) and against the definition of a Dirichlet character.
"""

from __future__ import annotations

import math

import pytest
from sympy.functions.combinatorial.numbers import kronecker_symbol
from verifier.numbers import TRIVIAL, QuadraticCharacter, is_fundamental_discriminant, kronecker, squarefree_kernel
from verifier.options import parse_character

PRIMES = [p for p in range(3, 100) if all(p % q for q in range(2, p))]


# ---------------------------------------------------------------------------
# The Kronecker symbol
# ---------------------------------------------------------------------------


def test_kronecker_matches_sympy_grid() -> None:
    # sympy 1.14's kronecker_symbol, an implementation independent of ours; n = 0, n < 0, even n included.
    for a in range(-40, 41):
        for n in range(-40, 41):
            assert kronecker(a, n) == int(kronecker_symbol(a, n)), (a, n)


def test_kronecker_matches_sympy_large() -> None:
    cases = [(45, 77), (13, -120), (-(10**15) - 3, 2**40 * 3**7), (10**18 + 9, -(10**12) - 39), (-8, -(2**61))]
    for a, n in cases:
        assert kronecker(a, n) == int(kronecker_symbol(a, n)), (a, n)
    # sympy's docstring examples: (45/77) = -1, (13/-120) = 1.
    assert kronecker(45, 77) == -1
    assert kronecker(13, -120) == 1


def test_kronecker_special_arguments() -> None:
    # docs/method.md#characters: (a/0) = 1 iff a = +-1; (a/-1) = sign of a (with (0/-1) = +1); (a/1) = 1.
    assert [kronecker(a, 0) for a in (-2, -1, 0, 1, 2)] == [0, 1, 0, 1, 0]
    assert [kronecker(a, -1) for a in (-5, -1, 0, 1, 5)] == [-1, -1, 1, 1, 1]
    assert all(kronecker(a, 1) == 1 for a in range(-20, 21))
    # (a/2): 0 for even a, +1 for a = +-1 mod 8, -1 for a = +-3 mod 8.
    for a in range(-40, 41):
        expected = 0 if a % 2 == 0 else (1 if a % 8 in (1, 7) else -1)
        assert kronecker(a, 2) == expected, a


def test_kronecker_legendre_by_euler_criterion() -> None:
    # Ireland–Rosen Ch. 5 (from memory): for odd primes p, (a/p) = a^((p-1)/2) mod p.
    for p in PRIMES:
        for a in range(-2 * p, 2 * p + 1):
            r = pow(a, (p - 1) // 2, p)
            expected = 0 if a % p == 0 else (1 if r == 1 else -1)
            assert kronecker(a, p) == expected, (a, p)


def test_kronecker_completely_multiplicative_in_n() -> None:
    # docs/method.md#characters: (a/mn) = (a/m)(a/n) for all nonzero m, n (the definition).
    for a in range(-15, 16):
        for m in range(-20, 21):
            for n in range(-20, 21):
                if m and n:
                    assert kronecker(a, m * n) == kronecker(a, m) * kronecker(a, n), (a, m, n)


def test_kronecker_discriminants_are_periodic() -> None:
    # docs/method.md#characters: for D = 0, 1 mod 4 (D != 0), n -> (D/n) is periodic mod |D| with chi(-1) = sign D.
    for d in range(-120, 121):
        if d == 0 or d % 4 not in (0, 1):
            continue
        for n in range(-150, 150):
            assert kronecker(d, n) == kronecker(d, n + abs(d)), (d, n)
        assert kronecker(d, -1) == (1 if d > 0 else -1)


# ---------------------------------------------------------------------------
# Squarefree kernels and discriminants
# ---------------------------------------------------------------------------


def test_squarefree_kernel_examples() -> None:
    assert squarefree_kernel(-4) == -1
    assert squarefree_kernel(12) == 3
    assert squarefree_kernel(8) == 2
    assert squarefree_kernel(1) == 1
    assert squarefree_kernel(-1) == -1
    assert squarefree_kernel(-27) == -3
    assert squarefree_kernel(2**40 * 3**7 * 5) == 15
    with pytest.raises(ValueError):
        squarefree_kernel(0)


def test_squarefree_kernel_definition() -> None:
    # d = k s^2 with k squarefree and of the sign of d (the definition, by trial division).
    for d in range(-300, 301):
        if d == 0:
            continue
        k = squarefree_kernel(d)
        assert (k > 0) == (d > 0) and d % k == 0
        s2 = d // k
        assert math.isqrt(s2) ** 2 == s2, d
        assert all(k % (p * p) for p in range(2, abs(k) + 1)), d


# Fundamental discriminants with |D| <= 30 (from memory; standard tables of quadratic fields).
FUNDAMENTAL = [-3, -4, -7, -8, -11, -15, -19, -20, -23, -24, 1, 5, 8, 12, 13, 17, 21, 24, 28, 29]


def test_fundamental_discriminants() -> None:
    assert [d for d in range(-30, 31) if is_fundamental_discriminant(d)] == sorted(FUNDAMENTAL)
    for d in FUNDAMENTAL:
        assert QuadraticCharacter.from_integer(d).disc == d


# ---------------------------------------------------------------------------
# Quadratic characters
# ---------------------------------------------------------------------------

CHARS = [QuadraticCharacter.from_integer(d) for d in FUNDAMENTAL]


def test_character_fields() -> None:
    chi = QuadraticCharacter(-1)
    assert (chi.disc, chi.conductor, chi.is_even, chi.is_trivial) == (-4, 4, False, False)
    assert (chi.name, chi.latex) == ("chi_{-4}", "\\chi_{-4}")
    chi = QuadraticCharacter(3)
    assert (chi.disc, chi.conductor, chi.is_even, chi.name) == (12, 12, True, "chi_{12}")
    chi = QuadraticCharacter(-3)
    assert (chi.disc, chi.conductor, chi.is_even, chi.name) == (-3, 3, False, "chi_{-3}")
    assert QuadraticCharacter(2).disc == 8 and QuadraticCharacter(-2).disc == -8
    assert (TRIVIAL.kernel, TRIVIAL.disc, TRIVIAL.conductor, TRIVIAL.name) == (1, 1, 1, "trivial")
    assert TRIVIAL.is_trivial and TRIVIAL.is_even
    for bad in (0, 4, -12, 18):
        with pytest.raises(ValueError):
            QuadraticCharacter(bad)


def test_character_tables() -> None:
    # Diamond–Shurman §4.3 / Ireland–Rosen Ch. 5 (from memory): the classical quadratic characters.
    for n in range(-60, 61):
        assert QuadraticCharacter(-1).value(n) == (0 if n % 2 == 0 else (1 if n % 4 == 1 else -1)), n
        assert QuadraticCharacter(-3).value(n) == [0, 1, -1][n % 3], n
        assert QuadraticCharacter(5).value(n) == [0, 1, -1, -1, 1][n % 5], n
        assert QuadraticCharacter(2).value(n) == [0, 1, 0, -1, 0, -1, 0, 1][n % 8], n
        assert QuadraticCharacter(-2).value(n) == [0, 1, 0, 1, 0, -1, 0, -1][n % 8], n
        assert QuadraticCharacter(3).value(n) == {1: 1, 11: 1, 5: -1, 7: -1}.get(n % 12, 0), n
        assert TRIVIAL.value(n) == 1


@pytest.mark.parametrize("chi", CHARS, ids=lambda c: c.name)
def test_character_is_primitive_dirichlet_character(chi: QuadraticCharacter) -> None:
    f = chi.conductor
    values = {n: chi.value(n) for n in range(-200, 201)}
    # Periodic mod the conductor, on all integers.
    assert all(values[n] == values[n + f] for n in range(-200, 201 - f))
    # Vanishes exactly off the units mod f.
    assert all((values[n] == 0) == (math.gcd(n, f) > 1) for n in values)
    # Completely multiplicative.
    for m in range(-14, 15):
        for n in range(-14, 15):
            assert chi.value(m * n) == values[m] * values[n], (m, n)
    # chi(-1) = sign D (docs/method.md#characters).
    assert values[-1] == (1 if chi.is_even else -1) == (1 if chi.disc > 0 else -1)
    # Primitive: for no proper divisor e of f is chi trivial on {n = 1 mod e, gcd(n, f) = 1}
    # (otherwise chi would be induced from a character mod e).
    for e in range(1, f):
        if f % e == 0:
            assert any(values[n] != 1 for n in range(1, f + 1, e) if math.gcd(n, f) == 1), e
    # Orthogonality: a nontrivial character sums to 0 over a period.
    if not chi.is_trivial:
        assert sum(values[n] for n in range(f)) == 0


def test_character_products() -> None:
    m4, m3, c8, c12 = (QuadraticCharacter.from_integer(d) for d in (-4, -3, 8, 12))
    assert (m4 * m3).disc == 12
    assert (m4 * m4).is_trivial
    assert (m4 * c8).disc == -8
    assert (c12 * m3).disc == -4
    assert m4 * TRIVIAL == m4
    assert m4**2 == TRIVIAL and m4**3 == m4 and m4**-1 == m4
    for a in CHARS:
        for b in CHARS:
            ab = a * b
            assert ab == b * a
            lcm = a.conductor * b.conductor // math.gcd(a.conductor, b.conductor)
            for n in range(1, 3 * lcm):
                if math.gcd(n, lcm) == 1:
                    assert ab.value(n) == a.value(n) * b.value(n), (a, b, n)


def test_from_integer_agrees_with_symbol() -> None:
    # QuadraticCharacter.from_integer(d): n -> (d/n) on n prime to 2d; on all n prime to d when the kernel
    # is 1 mod 4.
    for d in range(-60, 61):
        if d == 0:
            continue
        chi = QuadraticCharacter.from_integer(d)
        for n in range(-100, 101):
            if math.gcd(n, 2 * d) == 1 or (chi.kernel % 4 == 1 and math.gcd(n, d) == 1):
                assert chi.value(n) == kronecker(d, n), (d, n)
    # (3/2) = -1 but chi_12(2) = 0: the 2-part of the conductor is not visible in d = 3.
    assert kronecker(3, 2) == -1 and QuadraticCharacter.from_integer(3).value(2) == 0


# ---------------------------------------------------------------------------
# Reading characters from tag options
# ---------------------------------------------------------------------------

ACCEPTED: list[tuple[str, int]] = [
    ("\\chi_{-4}", -4),
    ("\\chi_{12}", 12),
    ("\\chi_{-3}", -3),
    ("\\chi_{8}", 8),
    ("\\chi_5", 5),
    ("\\chi_{-4}(n)", -4),
    ("$\\chi_{-8}$", -8),
    ("\\left(\\frac{-4}{\\cdot}\\right)", -4),
    ("(\\frac{-4}{\\cdot})", -4),
    ("\\left(\\frac{-4}{d}\\right)", -4),
    ("\\left(\\frac{-4}{n}\\right)", -4),
    ("\\left( \\frac{12}{\\,\\cdot\\,} \\right)", 12),
    ("\\bigl(\\frac{-1}{\\cdot}\\bigr)", -4),
    ("\\left(\\frac{3}{\\cdot}\\right)", 12),
    ("\\left(\\dfrac{2}{\\bullet}\\right)", 8),
    ("\\left(\\frac{\\cdot}{3}\\right)", -3),
    ("\\left(\\frac{\\cdot}{5}\\right)", 5),
    ("\\left(\\frac{\\cdot}{7}\\right)", -7),
    ("\\left(\\frac{d}{15}\\right)", -15),
    ("\\chi_{-4}^{2}", 1),
    ("\\chi_{-4}^3", -4),
    ("\\chi_{-4}\\chi_{-3}", 12),
    ("\\chi_{-4} \\cdot \\chi_{8}", -8),
    ("trivial", 1),
    ("Trivial", 1),
    ("1", 1),
    ("\\mathbf 1", 1),
    ("\\mathbf{1}", 1),
    ("\\chi_0", 1),
    ("\\chi_{0}", 1),
    ("\\varepsilon", 1),
    ("\\chi_{\u22124}", -4),
    ("chi_{-4}", -4),
]

REJECTED = [
    "",
    "\\chi",
    "\\chi_{3}",  # a modulus, not a discriminant: ambiguous
    "\\chi_{4}",
    "\\chi_{-1}",
    "\\chi_12",  # LaTeX reads this as chi_1 followed by 2
    "\\frac{-4}{\\cdot}",  # no parentheses
    "\\left(\\frac{0}{\\cdot}\\right)",
    "\\left(\\frac{\\cdot}{4}\\right)",
    "\\left(\\frac{\\cdot}{-3}\\right)",
    "\\left(\\frac{3}{5}\\right)",
    "\\left(\\frac{d}{n}\\right)",
    "\\psi",
    "__import__('os')",
    "\\chi_{-4}^{x}",
    "2",
]


@pytest.mark.parametrize(("text", "disc"), ACCEPTED)
def test_parse_character_accepts(text: str, disc: int) -> None:
    chi = parse_character(text)
    assert chi is not None
    assert chi.disc == disc


@pytest.mark.parametrize("text", REJECTED)
def test_parse_character_rejects(text: str) -> None:
    assert parse_character(text) is None


def test_parse_character_round_trips_latex() -> None:
    for chi in CHARS:
        assert parse_character(chi.latex) == chi
        assert parse_character(chi.name) == chi

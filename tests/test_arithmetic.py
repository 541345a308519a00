r"""Claims about arithmetic functions, checked by brute force independently of the engine.

Nothing here uses the engine's values or series as the expected answer.  Direct values come from
small implementations in this file: ``sympy.divisor_sigma`` for sigma_k; tau(n) from the product
q prod (1 - q^n)^24 in plain integers (docs/method.md#delta-eta-j); r_s(n) by counting the solutions of
x_1^2 + ... + x_s^2 = n one coordinate at a time; r_Q(n) by enumerating a box of lattice points;
the Kronecker symbol from its definition (docs/method.md#characters) with ``sympy.jacobi_symbol`` for odd moduli;
E_k coefficients from -2k/B_k sigma_{k-1}(n) with ``sympy.bernoulli`` (docs/method.md#eisenstein).

Sources of the identities are named beside each case: Besge (1862) as worked out in docs/method.md#quasimodular;
Ramanujan, Trans. Cambridge Philos. Soc. 22 (1916), Table IV (from memory); Huard, Ou, Spearman and
Williams, "Elementary evaluation of certain convolution sums involving divisor functions" (2002)
(from memory); Jacobi's two-, four-, six- and eight-square theorems (Hardy and Wright, Thms 278 and
386; Grosswald, *Representations of Integers as Sums of Squares*, Ch. 9; from memory); Ramanujan's
D Delta = E_2 Delta (docs/method.md#derivatives).  Every identity is also verified in this file by direct values
for 1 <= n <= 400 before the tool is asked about it, so a misremembered formula fails loudly here.
"""

from __future__ import annotations

import random
import re
from collections.abc import Callable
from dataclasses import dataclass
from fractions import Fraction
from functools import cache

import pytest
import sympy
from verifier import check_text
from verifier.api import ClaimResult
from verifier.arith import terms as t
from verifier.arith.genfun import generating_function
from verifier.arith.values import Values
from verifier.forms.theta import QuadraticForm
from verifier.prove.evaluate import AtomTable, laurent

N_DIRECT = 400  # identities are checked directly for 1 <= n <= N_DIRECT
N_SERIES = 300  # generating functions are compared coefficient by coefficient up to q^N_SERIES

# ---------------------------------------------------------------------------
# Independent arithmetic (not the engine's)
# ---------------------------------------------------------------------------


def as_index(x: Fraction | int) -> int | None:
    """x as a non-negative integer, or None (sigma_k(x) = tau(x) = r_s(x) = 0 off the integers:
    docs/method.md#arithmetic-functions)."""
    x = Fraction(x)
    if x.denominator != 1 or x < 0:
        return None
    return int(x)


@cache
def sigma_table(k: int) -> tuple[int, ...]:
    """sigma_k(0..N_DIRECT) with sigma_k(0) = 0 (docs/method.md#arithmetic-functions), via sympy.divisor_sigma."""
    return (0, *(int(sympy.divisor_sigma(n, k)) for n in range(1, N_DIRECT + 1)))


def sigma(k: int, x: Fraction | int) -> int:
    i = as_index(x)
    return 0 if i is None or i == 0 else sigma_table(k)[i]


def _mul_trunc(a: list[int], b: list[int]) -> list[int]:
    out = [0] * len(a)
    for i, x in enumerate(a):
        if x:
            for j in range(len(a) - i):
                out[i + j] += x * b[j]
    return out


@cache
def tau_table() -> tuple[int, ...]:
    """tau(0..N_DIRECT) from q prod_{n>=1} (1 - q^n)^24 (docs/method.md#delta-eta-j), in plain integers."""
    count = N_DIRECT + 1
    euler = [1] + [0] * (count - 1)
    for n in range(1, count):  # multiply by (1 - q^n)
        for i in range(count - 1, n - 1, -1):
            euler[i] -= euler[i - n]
    p2 = _mul_trunc(euler, euler)
    p4 = _mul_trunc(p2, p2)
    p8 = _mul_trunc(p4, p4)
    p24 = _mul_trunc(_mul_trunc(p8, p8), p8)
    return (0, *p24[: count - 1])


def tau(x: Fraction | int) -> int:
    i = as_index(x)
    return 0 if i is None else tau_table()[i]


@cache
def r_table(s: int) -> tuple[int, ...]:
    """r_s(0..N_DIRECT): solutions of x_1^2 + ... + x_s^2 = n, counted one coordinate at a time."""
    count = N_DIRECT + 1
    out = [1] + [0] * (count - 1)  # r_0
    for _ in range(s):
        new = [0] * count
        for n in range(count):
            x = 0
            while x * x <= n:
                new[n] += out[n - x * x] * (1 if x == 0 else 2)
                x += 1
        out = new
    return tuple(out)


def r(s: int, x: Fraction | int) -> int:
    i = as_index(x)
    return 0 if i is None else r_table(s)[i]


@cache
def hexagonal_table() -> tuple[int, ...]:
    """r_Q(0..N_SERIES) for the Gram matrix [[2,1],[1,2]], i.e. x^2 + xy + y^2 = n, by enumeration.

    x^2 + xy + y^2 >= (x^2 + y^2)/2, so |x|, |y| <= 25 covers n <= 300.
    """
    out = [0] * (N_SERIES + 1)
    for x in range(-25, 26):
        for y in range(-25, 26):
            v = x * x + x * y + y * y
            if v <= N_SERIES:
                out[v] += 1
    return tuple(out)


def kronecker(a: int, n: int) -> int:
    """The Kronecker symbol (a/n) for n >= 1 (docs/method.md#characters): (a/2) by a mod 8, odd part by Jacobi."""
    result = 1
    while n % 2 == 0:
        n //= 2
        if a % 2 == 0:
            return 0
        result *= 1 if a % 8 in (1, 7) else -1
    if n == 1:
        return result
    return result * int(sympy.jacobi_symbol(a % n, n))


def divisors(n: int) -> list[int]:
    return [d for d in range(1, n + 1) if n % d == 0]


def bernoulli(k: int) -> Fraction:
    b = sympy.bernoulli(k)
    return Fraction(int(b.p), int(b.q))


def eis(k: int, n: int) -> Fraction:
    """a_n(E_k) = -2k/B_k sigma_{k-1}(n), a_0 = 1 (docs/method.md#eisenstein; B_k from sympy.bernoulli)."""
    return Fraction(1) if n == 0 else Fraction(-2 * k) / bernoulli(k) * sigma(k - 1, n)


def residue(x: Fraction, m: int) -> int:
    return x.numerator * pow(x.denominator, -1, m) % m


# ---------------------------------------------------------------------------
# Terms of identities: LaTeX for the tool and a direct evaluator for this file
# ---------------------------------------------------------------------------

Value = Callable[[int], Fraction]


@dataclass(frozen=True)
class Term:
    latex: str
    value: Value


def S(k: int, d: int = 1) -> Term:
    """sigma_k(n/d)."""
    arg = "n" if d == 1 else f"n/{d}"
    return Term(f"\\sigma_{{{k}}}({arg})", lambda n: Fraction(sigma(k, Fraction(n, d))))


def NS(j: int, k: int) -> Term:
    """n^j sigma_k(n)."""
    power = "n" if j == 1 else f"n^{{{j}}}"
    return Term(f"{power}\\sigma_{{{k}}}(n)", lambda n: Fraction(n**j * sigma(k, n)))


def CONV(k1: int, k2: int, weight_m: int = 0) -> Term:
    """sum_{m=1}^{n-1} m^w sigma_k1(m) sigma_k2(n-m)."""
    w = "" if weight_m == 0 else ("m" if weight_m == 1 else f"m^{{{weight_m}}}")
    latex = f"\\sum_{{m=1}}^{{n-1}}{w}\\sigma_{{{k1}}}(m)\\sigma_{{{k2}}}(n-m)"
    return Term(latex, lambda n: Fraction(sum(m**weight_m * sigma(k1, m) * sigma(k2, n - m) for m in range(1, n))))


def CONV_HALF() -> Term:
    """sum_{m=1}^{n-1} sigma(m) sigma((n-m)/2) (a level-2 convolution)."""
    latex = "\\sum_{m=1}^{n-1}\\sigma(m)\\sigma\\left(\\frac{n-m}{2}\\right)"
    return Term(latex, lambda n: Fraction(sum(sigma(1, m) * sigma(1, Fraction(n - m, 2)) for m in range(1, n))))


def R(s: int) -> Term:
    return Term(f"r_{{{s}}}(n)", lambda n: Fraction(r(s, n)))


def RCONV(s: int, lower: int, upper_offset: int) -> Term:
    """sum_{m=lower}^{n-upper_offset} r_s(m) r_s(n-m)."""
    top = "n" if upper_offset == 0 else f"n-{upper_offset}"
    latex = f"\\sum_{{m={lower}}}^{{{top}}}r_{{{s}}}(m)r_{{{s}}}(n-m)"
    return Term(latex, lambda n: Fraction(sum(r(s, m) * r(s, n - m) for m in range(lower, n - upper_offset + 1))))


def TAU() -> Term:
    return Term("\\tau(n)", lambda n: Fraction(tau(n)))


def NTAU() -> Term:
    return Term("n\\tau(n)", lambda n: Fraction(n * tau(n)))


def CONV_SIGMA_TAU() -> Term:
    latex = "\\sum_{m=1}^{n-1}\\sigma(m)\\tau(n-m)"
    return Term(latex, lambda n: Fraction(sum(sigma(1, m) * tau(n - m) for m in range(1, n))))


SIGNS: dict[str, Callable[[int, int], int]] = {
    "n+d": lambda n, d: n + d,
    "d+1": lambda n, d: d + 1,
    "n/d+1": lambda n, d: n // d + 1,
}


def DS(sign: str | None, a: int, b: int = 0) -> Term:
    """sum_{d | n} (-1)^{sign} d^a (n/d)^b."""
    parts = [] if sign is None else [f"(-1)^{{{sign}}}"]
    if b:
        parts.append(f"(n/d)^{{{b}}}")
    if a:
        parts.append(f"d^{{{a}}}")
    latex = "\\sum_{d\\mid n}" + "".join(parts)

    def value(n: int) -> Fraction:
        total = 0
        for d in divisors(n):
            s = 1 if sign is None else (-1) ** SIGNS[sign](n, d)
            total += s * d**a * (n // d) ** b
        return Fraction(total)

    return Term(latex, value)


def CHI(disc: int, on_codivisor: bool, a: int) -> Term:
    """sum_{d | n} chi_disc(d) d^a, or with chi_disc(n/d)."""
    arg = "n/d" if on_codivisor else "d"
    power = "" if a == 0 else f"d^{{{a}}}"
    latex = f"\\sum_{{d\\mid n}}\\chi_{{{disc}}}({arg}){power}"

    def value(n: int) -> Fraction:
        return Fraction(sum(kronecker(disc, n // d if on_codivisor else d) * d**a for d in divisors(n)))

    return Term(latex, value)


Side = list[tuple[Fraction, Term]]


def coefficient_latex(c: Fraction, first: bool) -> str:
    sign = "-" if c < 0 else ("" if first else "+")
    c = abs(c)
    if c == 1:
        body = ""
    elif c.denominator == 1:
        body = str(c.numerator)
    else:
        body = f"\\frac{{{c.numerator}}}{{{c.denominator}}}"
    return f"{sign}{body}"


def side_latex(side: Side) -> str:
    return " ".join(f"{coefficient_latex(c, i == 0)}{term.latex}" for i, (c, term) in enumerate(side))


def side_value(side: Side, n: int) -> Fraction:
    return sum((c * term.value(n) for c, term in side), Fraction(0))


@dataclass(frozen=True)
class Identity:
    name: str
    left: Side
    right: Side
    start: int = 1  # the claim is for n >= start
    source: str = ""

    def latex(self) -> str:
        text = f"{side_latex(self.left)} = {side_latex(self.right)}"
        return text + (f" \\quad (n \\geq {self.start})" if self.start != 1 else "")

    def first_difference(self) -> tuple[int, Fraction, Fraction] | None:
        for n in range(self.start, N_DIRECT + 1):
            a, b = side_value(self.left, n), side_value(self.right, n)
            if a != b:
                return n, a, b
        return None


def one(term: Term) -> Side:
    return [(Fraction(1), term)]


F = Fraction

# True identities, one per translated type (sigma convolutions, n sigma, level-2 convolutions,
# divisor sums with (-1)^{n+d} and other signs, r_s, characters, tau).
TRUE_IDENTITIES = [
    Identity(
        "besge",
        one(CONV(1, 1)),
        [(F(5, 12), S(3)), (F(1, 12), S(1)), (F(-1, 2), NS(1, 1))],
        source="Besge (1862); docs/method.md#quasimodular",
    ),
    Identity(
        "sigma1-sigma3",
        one(CONV(1, 3)),
        [(F(21, 240), S(5)), (F(1, 24), S(3)), (F(-1, 8), NS(1, 3)), (F(-1, 240), S(1))],
        source="Ramanujan 1916, Table IV (from memory); from D E_4 = (E_2 E_4 - E_6)/3, docs/method.md#derivatives",
    ),
    Identity(
        "sigma3-sigma3",
        one(CONV(3, 3)),
        [(F(1, 120), S(7)), (F(-1, 120), S(3))],
        source="E_4^2 = E_8 (docs/method.md#eisenstein); Huard-Ou-Spearman-Williams 2002 (from memory)",
    ),
    Identity(
        "sigma1-sigma5",
        one(CONV(1, 5)),
        [(F(5, 126), S(7)), (F(1, 24), S(5)), (F(-1, 12), NS(1, 5)), (F(1, 504), S(1))],
        source="Ramanujan 1916, Table IV (from memory); D E_6 = (E_2 E_6 - E_4^2)/2, docs/method.md#derivatives",
    ),
    Identity(
        "sigma1-sigma7",
        one(CONV(1, 7)),
        [(F(1, 24), S(7)), (F(-1, 16), NS(1, 7)), (F(11, 480), S(9)), (F(-1, 480), S(1))],
        source="from memory: E_2 E_8 = (3/2) D E_8 + E_10, since the Serre derivative of E_8 is -(2/3) E_10",
    ),
    Identity(
        "sigma3-sigma5",
        one(CONV(3, 5)),
        [(F(11, 5040), S(9)), (F(-1, 240), S(5)), (F(1, 504), S(3))],
        source="E_4 E_6 = E_10 (docs/method.md#eisenstein); Huard-Ou-Spearman-Williams 2002 (from memory)",
    ),
    Identity(
        "tau-sigma5",
        one(TAU()),
        [(F(65, 756), S(11)), (F(691, 756), S(5)), (F(-691, 3), CONV(5, 5))],
        source="Ramanujan 1916 (from memory); 691 E_12 = 441 E_4^3 + 250 E_6^2, docs/method.md#eisenstein",
    ),
    Identity(
        "m-weighted-besge",
        one(CONV(1, 1, weight_m=1)),
        [(F(5, 24), NS(1, 3)), (F(1, 24), NS(1, 1)), (F(-1, 4), NS(2, 1))],
        source="from memory: symmetry m <-> n - m gives n/2 times Besge's sum",
    ),
    Identity(
        "level-2-convolution",
        one(CONV_HALF()),
        [
            (F(1, 12), S(3)),
            (F(1, 3), S(3, 2)),
            (F(1, 24), S(1)),
            (F(-1, 8), NS(1, 1)),
            (F(1, 24), S(1, 2)),
            (F(-1, 4), Term("n\\sigma(n/2)", lambda n: Fraction(n * sigma(1, Fraction(n, 2))))),
        ],
        source="Huard-Ou-Spearman-Williams 2002, Thm 2 (from memory)",
    ),
    Identity(
        "n-tau",
        one(NTAU()),
        [(F(1), TAU()), (F(-24), CONV_SIGMA_TAU())],
        source="D Delta = E_2 Delta (Ramanujan 1916; docs/method.md#derivatives)",
    ),
    Identity(
        "jacobi-four-squares",
        one(R(4)),
        [(F(8), S(1)), (F(-32), S(1, 4))],
        source="Jacobi's four-square theorem (Hardy and Wright, Thm 386)",
    ),
    Identity(
        "jacobi-eight-squares",
        one(R(8)),
        [(F(16), DS("n+d", 3))],
        source="Jacobi's eight-square theorem (Grosswald, Ch. 9, from memory)",
    ),
    Identity(
        "eight-squares-split",
        one(R(8)),
        [(F(16), S(3)), (F(-32), S(3, 2)), (F(256), S(3, 4))],
        source="Jacobi's eight-square theorem with the parities of d split out (from memory)",
    ),
    Identity(
        "sign-n-plus-d",
        one(DS("n+d", 1)),
        [(F(1), S(1)), (F(-2), S(1, 2)), (F(4), S(1, 4))],
        source="from memory: odd n gives sigma(n), even n gives -sigma(n) + 4 sigma(n/2), and "
        "sigma(2m) = 3 sigma(m) - 2 sigma(m/2)",
    ),
    Identity(
        "sign-n-plus-d-fifth",
        one(DS("n+d", 5)),
        [(F(1), S(5)), (F(-2), S(5, 2)), (F(64), S(5, 4))],
        source="from memory, as for the first powers with sigma_5(2m) = 33 sigma_5(m) - 32 sigma_5(m/2)",
    ),
    Identity(
        "sign-d",
        one(DS("d+1", 1)),
        [(F(1), S(1)), (F(-4), S(1, 2))],
        source="from memory: odd divisors minus even divisors",
    ),
    Identity(
        "sign-codivisor",
        one(DS("n/d+1", 1)),
        [(F(1), S(1)), (F(-2), S(1, 2))],
        source="from memory: d with n/d odd minus d with n/d even",
    ),
    Identity(
        "codivisor-power",
        one(DS(None, 1, 2)),
        [(F(1), NS(1, 1))],
        source="elementary: sum of d (n/d)^2 = n sum of n/d",
    ),
    Identity(
        "theta2-squared",
        one(RCONV(2, 0, 0)),
        one(R(4)),
        start=0,
        source="theta^2 theta^2 = theta^4 (from memory), including n = 0",
    ),
    Identity(
        "theta4-squared",
        one(RCONV(4, 1, 1)),
        [(F(1), R(8)), (F(-2), R(4))],
        source="(theta^4)^2 = theta^8 with the constant terms taken out (from memory)",
    ),
    Identity(
        "jacobi-two-squares",
        one(R(2)),
        [(F(4), CHI(-4, False, 0))],
        source="Jacobi's two-square theorem (Hardy and Wright, Thm 278); theta^2 = 2 E_1^{1,chi_-4}, "
        "docs/method.md#eisenstein-characters",
    ),
    Identity(
        "jacobi-six-squares",
        one(R(6)),
        [(F(16), CHI(-4, True, 2)), (F(-4), CHI(-4, False, 2))],
        source="Jacobi's six-square theorem (Grosswald, Ch. 9, from memory); docs/method.md#eisenstein-characters",
    ),
]


def decide(latex: str, tag: str = "%@claim") -> ClaimResult:
    report = check_text(f"{tag}\n\\[ {latex} \\]\n", "case.tex")
    assert len(report.claims) == 1, [c.outcome.message for c in report.claims]
    return report.claims[0]


def first_n(claim: ClaimResult) -> int | None:
    fd = claim.outcome.first_difference
    return None if fd is None else fd["n"]


@pytest.mark.parametrize("identity", TRUE_IDENTITIES, ids=lambda i: i.name)
def test_true_identities_hold_directly_and_are_proved(identity: Identity) -> None:
    # Source: identity.source; first confirmed here by direct values for n <= N_DIRECT.
    assert identity.first_difference() is None, f"{identity.name} is misremembered"
    claim = decide(identity.latex())
    assert claim.verdict == "proved", (identity.latex(), claim.outcome.message)


# False identities (first-draft slips): the first differing n and both values are computed here.
FALSE_IDENTITIES = [
    # Besge with 5n in place of 6n - 1 (a misprint of docs/method.md#quasimodular's formula).
    Identity("besge-5n", one(CONV(1, 1)), [(F(5, 12), S(3)), (F(-5, 12), NS(1, 1))]),
    # Ramanujan's sigma_1 * sigma_3 sum with the sign of sigma(n) flipped.
    Identity(
        "sigma1-sigma3-sign",
        one(CONV(1, 3)),
        [(F(21, 240), S(5)), (F(1, 24), S(3)), (F(-1, 8), NS(1, 3)), (F(1, 240), S(1))],
    ),
    # E_4^2 = E_8 read with the wrong denominator.
    Identity("sigma3-sigma3-240", one(CONV(3, 3)), [(F(1, 240), S(7)), (F(-1, 240), S(3))]),
    # The four-square theorem with a sign in place of the condition 4 does not divide d.
    Identity("four-squares-signed", one(R(4)), [(F(8), DS("n+d", 1))]),
    # The eight-square theorem without its signs.
    Identity("eight-squares-unsigned", one(R(8)), [(F(16), S(3))]),
    # The (-1)^{n+d} sum with 2 sigma(n/4) in place of 4 sigma(n/4).
    Identity("sign-n-plus-d-wrong", one(DS("n+d", 1)), [(F(1), S(1)), (F(-2), S(1, 2)), (F(2), S(1, 4))]),
    # sum of d^3 (n/d) is n sigma_2(n), not n sigma_3(n) (they differ at n = 2: 10 and 18).
    Identity("power-shifted", one(DS(None, 3, 1)), [(F(1), NS(1, 3))]),
    # The two-square theorem with chi_{-3}.
    Identity("two-squares-chi3", one(R(2)), [(F(4), CHI(-3, False, 0))]),
    # theta^2 theta^2 summed from m = 1 to n - 1 but compared with r_4 (the constant terms are missing).
    Identity("theta2-range", one(RCONV(2, 1, 1)), one(R(4))),
    # Differences that first appear beyond the directly computed range (n > 61): the generating
    # functions differ and the direct values are recomputed at the first differing n.
    Identity(
        "tau-level-67",
        one(TAU()),
        [(F(1), TAU()), (F(1), Term("\\tau(n/67)", lambda n: Fraction(tau(Fraction(n, 67)))))],
    ),
    Identity("sigma3-level-71", one(S(3)), [(F(1), S(3)), (F(1), S(3, 71))]),
]


@pytest.mark.parametrize("identity", FALSE_IDENTITIES, ids=lambda i: i.name)
def test_false_identities_are_refuted_at_the_first_difference(identity: Identity) -> None:
    found = identity.first_difference()
    assert found is not None
    n, left, right = found
    claim = decide(identity.latex())
    assert claim.verdict == "refuted", (identity.latex(), claim.outcome.message)
    fd = claim.outcome.first_difference
    assert fd is not None
    assert (fd["n"], Fraction(fd["left"]), Fraction(fd["right"])) == (n, left, right)


def test_the_late_differences_really_are_late() -> None:
    # The last two false identities agree on the directly computed range n <= 61 (CHECK = 60 in
    # the engine): their refutation must come through the generating functions.
    for identity in FALSE_IDENTITIES[-2:]:
        found = identity.first_difference()
        assert found is not None and found[0] > 61


# ---------------------------------------------------------------------------
# generating_function, directly: random expressions against direct values up to q^300
# ---------------------------------------------------------------------------

N_VAR, M_VAR, D_VAR = t.Var("n", "n"), t.Var("m", "m"), t.Var("d", "d")
HEXAGONAL = QuadraticForm.from_rows([[2, 1], [1, 2]])


def num(c: Fraction | int) -> t.Num:
    return t.Num(str(c), Fraction(c))


def binop(op: str, a: t.A, b: t.A) -> t.Bin:
    return t.Bin(f"({a.text} {op} {b.text})", op, a, b)


def power(base: t.A, k: int) -> t.A:
    return t.Pow(f"{base.text}^{k}", base, num(k))


@dataclass(frozen=True)
class Random:
    term: t.A
    value: Callable[[int], Fraction]
    text: str


def arithmetic_function(rng: random.Random) -> tuple[str, int | None, Callable[[Fraction], Fraction], object]:
    """(name, index, value at a rational argument, form) of sigma_k (k odd), tau, r_s or r_Q."""
    kind = rng.choice(["sigma", "sigma", "tau", "r", "rQ"])
    if kind == "sigma":
        k = rng.choice([1, 3, 5, 7])
        return "sigma", k, lambda x: Fraction(sigma(k, x)), None
    if kind == "tau":
        return "tau", None, lambda x: Fraction(tau(x)), None
    if kind == "r":
        s = rng.randint(1, 8)
        return "r", s, lambda x: Fraction(r(s, x)), None

    def hexagonal(x: Fraction) -> Fraction:
        i = as_index(x)
        return Fraction(0 if i is None else hexagonal_table()[i])

    return "rQ", None, hexagonal, HEXAGONAL


def random_single(rng: random.Random) -> Random:
    name, index, value, form = arithmetic_function(rng)
    d = 1 if name == "rQ" else rng.choice([1, 1, 2, 3, 4])
    arg: t.A = N_VAR if d == 1 else binop("/", N_VAR, num(d))
    term = t.Fun(f"{name}_{index}({arg.text})", name, index, arg, form)
    return Random(term, lambda n: value(Fraction(n, d)), term.text)


def random_convolution(rng: random.Random) -> Random:
    lower, offset = rng.choice([0, 1]), rng.choice([0, 1])
    a, e = rng.choice([0, 0, 1, 2]), rng.choice([0, 0, 1])
    half = rng.random() < 0.25
    fx, ix, vx, formx = arithmetic_function(rng)
    fy, iy, vy, formy = arithmetic_function(rng)
    x = t.Fun(f"{fx}(m)", fx, ix, M_VAR, formx)
    n_minus_m: t.A = binop("-", N_VAR, M_VAR)
    if half:
        n_minus_m = binop("/", n_minus_m, num(2))
    y = t.Fun(f"{fy}({n_minus_m.text})", fy, iy, n_minus_m, formy)
    body: t.A = binop("*", x, y)
    if a:
        body = binop("*", power(M_VAR, a), body)
    if e:
        body = binop("*", N_VAR, body)
    upper: t.A = N_VAR if offset == 0 else binop("-", N_VAR, num(offset))
    term = t.Sum(f"sum_m={lower}^{upper.text} {body.text}", "from", "m", num(lower), upper, body)
    scale = 2 if half else 1

    def value(n: int) -> Fraction:
        total = Fraction(0)
        for m in range(lower, n - offset + 1):
            total += m**a * vx(Fraction(m)) * vy(Fraction(n - m, scale))
        return total * n**e

    return Random(term, value, term.text)


def random_divisor_sum(rng: random.Random) -> Random:
    a = rng.randint(0, 3)
    b = rng.choice([x for x in range(0, 4) if (a - x) % 2 == 1])  # |a - b| odd: sigma_{|a-b|} is translated
    sign = rng.choice([None, "n+d", "d", "n/d", "n+n/d+1", "d+n/d"])
    factors: list[t.A] = []
    words: list[str] = []
    if sign is not None:
        pieces = {"n": N_VAR, "d": D_VAR, "n/d": binop("/", N_VAR, D_VAR), "1": num(1)}
        words = sign.split("+")
        exponent: t.A = pieces[words[0]]
        for w in words[1:]:
            exponent = binop("+", exponent, pieces[w])
        factors.append(t.Pow(f"(-1)^({exponent.text})", num(-1), exponent))

    def parity(n: int, d: int) -> int:
        return sum({"n": n, "d": d, "n/d": n // d, "1": 1}[w] for w in words)

    if a:
        factors.append(power(D_VAR, a))
    if b:
        factors.append(power(binop("/", N_VAR, D_VAR), b))
    body: t.A = factors[0]
    for f in factors[1:]:
        body = binop("*", body, f)
    term = t.Sum(f"sum_d|n {body.text}", "divides", "d", N_VAR, None, body)

    def value(n: int) -> Fraction:
        if n == 0:
            return Fraction(0)
        return Fraction(sum((-1) ** parity(n, d) * d**a * (n // d) ** b for d in divisors(n)))

    return Random(term, value, term.text)


def random_character_sum(rng: random.Random) -> Random:
    # psi phi(-1) = (-1)^k with k = a + 1 (docs/method.md#eisenstein-characters): odd characters with even a, even ones
    # with odd a.
    disc = rng.choice([-4, -3, -8, 5, 8, 12])
    a = rng.choice([0, 2]) if disc < 0 else rng.choice([1, 3])
    on_codivisor = rng.random() < 0.5
    arg: t.A = binop("/", N_VAR, D_VAR) if on_codivisor else D_VAR
    body: t.A = t.Fun(f"chi_{disc}({arg.text})", "chi", disc, arg)
    if a:
        body = binop("*", body, power(D_VAR, a))
    term = t.Sum(f"sum_d|n {body.text}", "divides", "d", N_VAR, None, body)

    def value(n: int) -> Fraction:
        if n == 0:
            return Fraction(0)
        return Fraction(sum(kronecker(disc, n // d if on_codivisor else d) * d**a for d in divisors(n)))

    return Random(term, value, term.text)


def random_expression(rng: random.Random) -> Random:
    """c_1 n^{j_1} B_1 + ... with 1-3 summands, each B a function, convolution or divisor sum."""
    summands: list[Random] = []
    for _ in range(rng.randint(1, 3)):
        basic = rng.choice(
            [random_single, random_single, random_convolution, random_divisor_sum, random_character_sum]
        )(rng)
        j = rng.choice([0, 0, 1, 2])
        c = Fraction(rng.choice([-3, -2, -1, 1, 2, 5, 24]), rng.choice([1, 1, 2, 7, 12]))
        term: t.A = basic.term
        if j:
            term = binop("*", power(N_VAR, j), term)
        term = binop("*", num(c), term)
        summands.append(Random(term, lambda n, b=basic, j=j, c=c: c * n**j * b.value(n), f"{c} n^{j} {basic.text}"))
    total = summands[0]
    for s in summands[1:]:
        total = Random(
            binop("+", total.term, s.term), lambda n, x=total, y=s: x.value(n) + y.value(n), f"{total.text} + {s.text}"
        )
    return total


RANDOM_SEEDS = range(40)


@pytest.mark.parametrize("seed", RANDOM_SEEDS)
def test_generating_function_of_random_expressions_matches_direct_values(seed: int) -> None:
    # Sources: docs/method.md#generating-functions (the translations), against direct values computed in this file.
    rng = random.Random(1000 + seed)
    expression = random_expression(rng)
    g = generating_function(expression.term, "n", Values())
    series = laurent(g, N_SERIES + 1, AtomTable())
    assert series.prec >= N_SERIES + 1
    for n in range(N_SERIES + 1):
        assert series[n] == expression.value(n), (expression.text, n)


def test_random_expressions_cover_every_kind() -> None:
    # The seeds above must exercise every translated kind at least once.
    seen: set[str] = set()

    def walk(e: t.A) -> None:
        if isinstance(e, t.Fun):
            seen.add(e.name)
            walk(e.arg)
        elif isinstance(e, t.Bin):
            walk(e.left)
            walk(e.right)
        elif isinstance(e, t.Pow):
            if isinstance(e.base, t.Num):
                seen.add("sign")
            walk(e.base)
        elif isinstance(e, t.Sum):
            seen.add(e.kind)
            walk(e.body)

    for seed in RANDOM_SEEDS:
        walk(random_expression(random.Random(1000 + seed)).term)
    assert {"sigma", "tau", "r", "rQ", "chi", "from", "divides", "sign"} <= seen


# ---------------------------------------------------------------------------
# solve=, suggestions
# ---------------------------------------------------------------------------


def eisenstein_solution(parts: list[Callable[[int], Fraction]], target: Callable[[int], Fraction]) -> list[Fraction]:
    """The coefficients x with sum x_i part_i = target on q^0 and q^1, by sympy's linear solver."""
    xs = sympy.symbols(f"x0:{len(parts)}")
    equations = [
        sum(x * sympy.Rational(str(p(n))) for x, p in zip(xs, parts, strict=True)) - sympy.Rational(str(target(n)))
        for n in range(len(parts))
    ]
    solution = sympy.solve(equations, xs, dict=True)[0]
    return [Fraction(str(solution[x])) for x in xs]


def e4_cubed(n: int) -> Fraction:
    return sum((eis(4, i) * eis(4, j) * eis(4, n - i - j) for i in range(n + 1) for j in range(n + 1 - i)), Fraction(0))


def e6_squared(n: int) -> Fraction:
    return sum((eis(6, i) * eis(6, n - i) for i in range(n + 1)), Fraction(0))


def test_solve_unique_solution_for_e12() -> None:
    # dim M_12 = 2 (docs/method.md#dimensions): two coefficients determine a and b; solved here with sympy.
    a, b = eisenstein_solution([e4_cubed, e6_squared], lambda n: eis(12, n))
    assert (a, b) == (Fraction(441, 691), Fraction(250, 691))  # docs/method.md#eisenstein
    claim = decide("E_{12} = aE_4^3 + bE_6^2", "%@claim solve=a,b")
    assert claim.verdict == "proved"
    assert {c["unknown"]: Fraction(c["value"]) for c in claim.outcome.components} == {"a": a, "b": b}
    assert "family" not in claim.outcome.message


def test_solve_unique_solution_for_delta() -> None:
    # 1728 Delta = E_4^3 - E_6^2 (docs/method.md#delta-eta-j): a = 1, b = -1.
    delta = lambda n: Fraction(1728 * tau(n))  # noqa: E731
    a, b = eisenstein_solution([e4_cubed, e6_squared], delta)
    claim = decide("1728\\Delta = aE_4^3 + bE_6^2", "%@claim solve=a,b")
    assert claim.verdict == "proved"
    assert {c["unknown"]: Fraction(c["value"]) for c in claim.outcome.components} == {"a": a, "b": b}


def test_solve_family() -> None:
    # E_8 = E_4^2 (docs/method.md#eisenstein): every a + b = 1 solves E_8 = a E_4^2 + b E_8.
    claim = decide("E_8 = aE_4^2 + bE_8", "%@claim solve=a,b")
    assert claim.verdict == "proved"
    values = {c["unknown"]: Fraction(c["value"]) for c in claim.outcome.components}
    assert values["a"] + values["b"] == 1
    assert "family" in claim.outcome.message


def test_solve_no_solution() -> None:
    # Delta has constant term 0 and E_4^3 has 1, while Delta's q-coefficient is 1 (Ramanujan 1916, table): no a.
    claim = decide("\\Delta = aE_4^3", "%@claim solve=a")
    assert claim.verdict == "refuted"


def numbers(text: str) -> set[Fraction]:
    return {Fraction(x) for x in re.findall(r"-?\d+(?:/\d+)?", text)}


def test_suggestion_names_the_corrected_coefficient() -> None:
    # 691 E_12 = 441 E_4^3 + 250 E_6^2 (docs/method.md#eisenstein) with 619 typed for 691 in one place.
    a, _ = eisenstein_solution([e4_cubed, e6_squared], lambda n: eis(12, n))
    claim = decide("E_{12} = \\frac{441}{619}E_4^3 + \\frac{250}{691}E_6^2")
    assert claim.verdict == "refuted"
    assert first_n(claim) == 0  # 441/619 + 250/691 != 1
    assert claim.outcome.suggestion is not None
    assert numbers(claim.outcome.suggestion) == {a, Fraction(441, 619)}


def test_suggestion_for_a_wrong_denominator_in_ramanujan() -> None:
    # D E_4 = (E_2 E_4 - E_6)/3 (Ramanujan 1916, docs/method.md#derivatives); with 1/2 the q-coefficients are
    # 240 (= 1 * 240 sigma_3(1)) and (240 - 24 + 504)/2 = 360.
    claim = decide("D E_4 = \\frac{E_2E_4 - E_6}{2}")
    assert claim.verdict == "refuted"
    fd = claim.outcome.first_difference
    assert fd is not None and (fd["n"], Fraction(fd["left"]), Fraction(fd["right"])) == (1, 240, 360)
    assert claim.outcome.suggestion is not None
    assert numbers(claim.outcome.suggestion) == {Fraction(1, 3), Fraction(1, 2)}


def test_no_suggestion_when_no_coefficient_fixes_it() -> None:
    # E_4 E_6 = E_10, and E_12 is no multiple of it (docs/method.md#eisenstein: their q-coefficients -264 and
    # 65520/691).
    claim = decide("E_4E_6 = E_{12}")
    assert claim.verdict == "refuted"
    assert first_n(claim) == 1
    assert claim.outcome.suggestion is None


# ---------------------------------------------------------------------------
# Congruences: refutations name n and both residues
# ---------------------------------------------------------------------------

# (claim, modulus, first n, left value at n, right value at n): values from this file.
CONGRUENCE_REFUTATIONS = [
    # Ramanujan's tau = sigma_11 (mod 691) (Ramanujan 1916) with wrong moduli.
    ("\\tau(n) \\equiv \\sigma_{11}(n) \\pmod{619}", 619, lambda n: tau(n), lambda n: sigma(11, n)),
    ("\\tau(n) \\equiv \\sigma_{11}(n) \\pmod{2073}", 2073, lambda n: tau(n), lambda n: sigma(11, n)),
    ("\\tau(n) \\equiv \\sigma_{11}(n) \\pmod{1382}", 1382, lambda n: tau(n), lambda n: sigma(11, n)),
    # tau(n) = n sigma_3(n) (mod 7) holds (Swinnerton-Dyer, LNM 350, from memory); mod 49 it does not.
    ("\\tau(n) \\equiv n\\sigma_3(n) \\pmod{49}", 49, lambda n: tau(n), lambda n: n * sigma(3, n)),
    # E_4 = 1 + 240 sum sigma_3 q^n (docs/method.md#eisenstein) is 1 mod 240, not mod 480.
    ("E_4 \\equiv 1 \\pmod{480}", 480, lambda n: eis(4, n), lambda n: Fraction(n == 0)),
    # E_6 = E_2 holds mod 5 (E_{p+1} = E_2 mod p, docs/method.md#congruence-e2) but not mod 7.
    ("E_6 \\equiv E_2 \\pmod{7}", 7, lambda n: eis(6, n), lambda n: eis(2, n)),
]


@pytest.mark.parametrize(("latex", "modulus", "left", "right"), CONGRUENCE_REFUTATIONS, ids=lambda x: str(x)[:30])
def test_congruence_refutation_names_n_and_both_residues(
    latex: str, modulus: int, left: Callable[[int], Fraction], right: Callable[[int], Fraction]
) -> None:
    start = 0 if "E_" in latex else 1
    n = next(
        n
        for n in range(start, N_DIRECT + 1)
        if residue(Fraction(left(n)), modulus) != residue(Fraction(right(n)), modulus)
    )
    claim = decide(latex)
    assert claim.verdict == "refuted", claim.outcome.message
    fd = claim.outcome.first_difference
    assert fd is not None
    assert (fd["n"], Fraction(fd["left"]), Fraction(fd["right"])) == (n, left(n), right(n))
    residues = {Fraction(residue(Fraction(left(n)), modulus)), Fraction(residue(Fraction(right(n)), modulus))}
    assert residues <= numbers(claim.outcome.message)


# True congruences: checked here to N_DIRECT, then proved by the tool.
CONGRUENCE_PROOFS = [
    # Ramanujan 1916, table of tau(n).
    ("\\tau(n) \\equiv \\sigma_{11}(n) \\pmod{691}", 691, lambda n: tau(n) - sigma(11, n)),
    # Swinnerton-Dyer, LNM 350 (1973) (from memory).
    ("\\tau(n) \\equiv n\\sigma_3(n) \\pmod{7}", 7, lambda n: tau(n) - n * sigma(3, n)),
]


@pytest.mark.parametrize(("latex", "modulus", "difference"), CONGRUENCE_PROOFS, ids=lambda x: str(x)[:30])
def test_true_congruences_are_proved(latex: str, modulus: int, difference: Callable[[int], int]) -> None:
    assert all(difference(n) % modulus == 0 for n in range(1, N_DIRECT + 1))
    assert decide(latex).verdict == "proved"


# ---------------------------------------------------------------------------
# The 'never proved' battery
# ---------------------------------------------------------------------------


SIGMA_TERM = re.compile(r"\\sigma_\{(\d+)\}\((n|n/\d+)\)")
LATE_PRIMES = [67, 71, 73, 79, 83, 89, 97]  # beyond the engine's directly computed range n <= 61


def perturb(identity: Identity, rng: random.Random) -> Identity:
    """Change one coefficient, one sigma index or argument n/d, drop a summand, or add a late term.

    A late term c sigma_k(n/p) or c tau(n/p) with a prime p > 61 changes nothing before n = p, so the
    engine's direct check passes and only the generating functions can see the difference.
    """
    sides = [list(identity.left), list(identity.right)]
    side = sides[rng.randrange(2)]
    i = rng.randrange(len(side))
    c, term = side[i]
    move = rng.choice(["coefficient", "index", "scale", "drop", "late", "late", "late"])
    sigma_term = SIGMA_TERM.fullmatch(term.latex)
    if move == "drop" and len(side) > 1:
        del side[i]
    elif move in ("index", "scale") and sigma_term is not None:
        k = int(sigma_term.group(1))
        d = 1 if sigma_term.group(2) == "n" else int(sigma_term.group(2)[2:])
        side[i] = (c, S(k + 2, d) if move == "index" else S(k, 2 * d))
    elif move == "late":
        p = rng.choice(LATE_PRIMES)
        extra = Fraction(rng.choice([-1, 1, 2]), rng.choice([1, 3, 24]))
        if rng.random() < 0.3:
            late = Term(f"\\tau(n/{p})", lambda n, p=p: Fraction(tau(Fraction(n, p))))
        else:
            late = S(rng.choice([1, 3, 5, 7]), p)
        side.append((extra, late))
    else:
        move = "coefficient"
        delta = Fraction(rng.choice([-2, -1, 1, 2]), rng.choice([1, 2, 3, 12]))
        side[i] = (c + delta if c + delta != 0 else c - delta, term)
    return Identity(f"{identity.name}~{move}", sides[0], sides[1], identity.start)


def perturbations(count: int) -> list[Identity]:
    rng = random.Random(4242)
    out: list[Identity] = []
    while len(out) < count:
        candidate = perturb(rng.choice(TRUE_IDENTITIES), rng)
        if candidate.first_difference() is not None:  # keep only the perturbations that really are false
            out.append(candidate)
    return out


PERTURBED = perturbations(40)


def test_the_battery_reaches_the_generating_functions() -> None:
    # At least a quarter of the perturbations agree on the engine's direct range (n <= 61).
    late = [p for p in PERTURBED if (found := p.first_difference()) is not None and found[0] > 61]
    assert len(late) >= 10


@pytest.mark.parametrize("identity", PERTURBED, ids=lambda i: i.name)
def test_perturbed_identities_are_never_proved(identity: Identity) -> None:
    # Each perturbation of a true identity above is false: its first differing n is computed here.
    found = identity.first_difference()
    assert found is not None
    claim = decide(identity.latex())
    assert claim.verdict != "proved", identity.latex()
    assert claim.verdict == "refuted", (identity.latex(), claim.outcome.message)
    assert first_n(claim) == found[0]


def test_generating_sums_in_q_to_a_multiple_of_n() -> None:
    # sum sigma_1(n) q^{2n} is the generating function at 2 tau, so E_2(tau) - 2 E_2(2 tau) =
    # -1 - 24 sum sigma_1(n) q^n + 48 sum sigma_1(n) q^{2n} (E_2 = 1 - 24 sum sigma_1(n) q^n,
    # docs/method.md#e2). The coefficients are checked here from sympy's sigma before the tool is asked.
    def rhs(n: int) -> int:
        value = -24 * int(sympy.divisor_sigma(n, 1)) if n else -1
        return value + (48 * int(sympy.divisor_sigma(n // 2, 1)) if n and n % 2 == 0 else 0)

    def lhs(n: int) -> int:
        e2 = lambda m: 1 if m == 0 else -24 * int(sympy.divisor_sigma(m, 1))  # noqa: E731
        return e2(n) - 2 * (e2(n // 2) if n % 2 == 0 else 0)

    assert all(lhs(n) == rhs(n) for n in range(60))
    good = "E_2(\\tau) - 2E_2(2\\tau) = -1 - 24\\sum_{n\\ge1}\\sigma_1(n)q^n + 48\\sum_{n\\ge1}\\sigma_1(n)q^{2n}"
    bad = good.replace("q^{2n}", "q^{3n}")
    # sigma_2 has no modular generating function: a sum in q^{2n} is still compared as a series, and
    # its coefficient of q^2 is sigma_2(1) = 1, not 0.
    series = "\\sum_{n\\ge1}\\sigma_2(n)q^{2n} = q^{4} + \\cdots"
    report = check_text("".join(f"%@claim\n\\[ {c} \\]\n" for c in (good, bad, series)))
    assert [c.verdict for c in report.claims] == ["proved", "refuted", "refuted"]
    witness = report.claims[2].outcome.first_difference
    assert witness is not None and (witness["n"], witness["left"], witness["right"]) == (2, "1", "0")


def test_generating_functions_of_partition_functions_are_products() -> None:
    # Euler: sum p(n) q^n = prod (1 - q^n)^{-1} = q^{1/24}/eta (Andrews, The Theory of Partitions,
    # Thm 1.1); the overpartitions: sum pbar(n) q^n = (-q;q)_inf/(q;q)_inf = eta(2tau)/eta(tau)^2
    # (Corteel and Lovejoy, Trans. AMS 356 (2004), from memory). p(1), p(2), p(3) = 1, 2, 3 here.
    assert [int(sympy.partition(n)) for n in range(4)] == [1, 1, 2, 3]
    claims = [
        "\\sum_{n\\ge0} p(n) q^n = \\prod_{n\\ge1}(1-q^n)^{-1}",
        "\\sum_{n\\ge0} p(n) x^n = \\prod_{n\\ge1}\\frac{1}{1-x^n}",
        "\\sum_{n\\ge0} p(n) q^{2n} = \\prod_{n\\ge1}\\frac{1}{1-q^{2n}}",
        "\\sum_{n\\ge0} \\overline{p}(n) q^n = \\frac{\\eta(2\\tau)}{\\eta(\\tau)^2}",
        # False: q^{1/12}/eta = q^{1/24} prod(1-q^n)^{-1} has no q^0 term, while p(0) = 1.
        "\\sum_{n\\ge0} p(n) q^n = \\frac{q^{1/12}}{\\eta(\\tau)}",
        # False: the product times (1 + q) has 1 + 1 = 2 at q^1, while p(1) = 1.
        "\\sum_{n\\ge0} p(n) q^n = (1+q)\\prod_{n\\ge1}(1-q^n)^{-1}",
        # True, but a claim about coefficients with p(n) is only compared directly (q^{1/24} in its
        # generating function): n p(n) = sum sigma(k) p(n-k) (Andrews, Ch. 1, Ex. from memory).
        "n\\,p(n) = \\sum_{k=1}^{n}\\sigma_1(k)p(n-k)",
    ]
    assert all(
        n * int(sympy.partition(n))
        == sum(int(sympy.divisor_sigma(k, 1)) * int(sympy.partition(n - k)) for k in range(1, n + 1))
        for n in range(1, 40)
    )
    report = check_text("".join(f"%@claim\n\\[ {c} \\]\n" for c in claims))
    got = [(c.verdict, c.outcome.first_difference and c.outcome.first_difference["n"]) for c in report.claims]
    assert got == [
        ("proved", None),
        ("proved", None),
        ("proved", None),
        ("proved", None),
        ("refuted", 0),
        ("refuted", 1),
        ("unproven", None),
    ]

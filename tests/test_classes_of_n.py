"""Congruences stated on a class of n (docs/method.md#classes-of-n), each with false neighbours.

Sources: H. P. F. Swinnerton-Dyer, "On l-adic representations and congruences for coefficients of
modular forms", LNM 350 (1973); J.-P. Serre, "Une interpretation des congruences relatives a la
fonction tau de Ramanujan", Seminaire Delange-Pisot-Poitou 9 (1967/68) and his Bourbaki talk (1969)
-- all from memory.  Every statement is first checked here by brute force (tau from the product
q prod (1 - q^n)^24, sigma from sympy, the classes from sympy's Legendre symbol and gcd), for
1 <= n <= N, independently of qreferee; a false neighbour (wrong class, wrong power of the modulus)
must then come out refuted at the first n of its class where brute force sees the sides differ.
"""

from __future__ import annotations

import math
from collections.abc import Callable

import pytest
from sympy import divisor_sigma, legendre_symbol
from tests.brute import tau_list
from verifier.api import check_text
from verifier.parse.grammar import parse_row
from verifier.prove.restrict import restriction
from verifier.recheck.check import recheck

N = 300


TAU = tau_list(N + 1)
Pred = Callable[[int], bool]


def legendre(p: int, sign: int) -> Pred:
    return lambda n: n % p != 0 and legendre_symbol(n % p, p) == sign


def right(a: int, b: int, c: int, n: int) -> int:
    """c n^a sigma_b(n) (b < 0: the side is 0)."""
    return 0 if b < 0 else c * n**a * int(divisor_sigma(n, b))


def first_failure(a: int, b: int, c: int, modulus: int, cls: Pred) -> int | None:
    return next((n for n in range(1, N + 1) if cls(n) and (TAU[n] - right(a, b, c, n)) % modulus), None)


def side(a: int, b: int, c: int) -> str:
    if b < 0:
        return "0"
    return ("" if c == 1 else str(c)) + ("" if a == 0 else "n" if a == 1 else f"n^{a}") + f"\\sigma_{{{b}}}(n)"


def run(a: int, b: int, c: int, modulus: str, qualifier: str) -> dict[str, object]:
    doc = f"%@claim\n\\[ \\tau(n) \\equiv {side(a, b, c)} \\pmod{{{modulus}}} {qualifier} \\]\n"
    (claim,) = check_text(doc, "classes.tex").to_dict()["claims"]
    return dict(claim)


ODD: Pred = lambda n: n % 2 == 1  # noqa: E731


def mod8(r: int) -> Pred:
    return lambda n: n % 8 == r


# (a, b, c, modulus as written, its value, qualifier as written, the class, verdict, source).
TRUE = [
    (0, 11, 1, "2^{11}", 2**11, r"\quad n \equiv 1 \pmod 8", mod8(1), "proved", "Swinnerton-Dyer 1973 (from memory)"),
    (0, 11, 1217, "2^{13}", 2**13, r"\text{for } n \equiv 3 \pmod{8}", mod8(3), "proved", "Swinnerton-Dyer 1973"),
    (0, 11, 1537, "2^{12}", 2**12, r"\quad (n \equiv 5 \bmod 8)", mod8(5), "proved", "Swinnerton-Dyer 1973"),
    (0, 11, 705, "2^{14}", 2**14, r", \quad n \equiv 7 \pmod{8}", mod8(7), "proved", "Swinnerton-Dyer 1973"),
    # The four classes mod 8 together give tau = sigma_11 mod 2^8 on odd n (1216 sigma_11(n) = 0 mod 2^8 for
    # n = 3 mod 8, ...), checked by brute force below.
    (0, 11, 1, "2^8", 2**8, r"\quad (n \text{ odd})", ODD, "proved", "Swinnerton-Dyer 1973 (consequence)"),
    (0, -1, 1, "23", 23, r"\quad \left(\frac{n}{23}\right) = -1", legendre(23, -1), "proved", "Serre 1969; SD 1973"),
    # Brute force only (no published form claimed): tau = sigma_11 mod 3 exactly on n prime to 3.
    (0, 11, 1, "3", 3, r"\quad 3 \nmid n", lambda n: n % 3 != 0, "proved", "brute force (sympy)"),
    # E_2 pieces (n sigma_9 is D E_10 up to a constant): restricting needs twists of quasimodular forms.
    (1, 9, 1, "5^2", 25, r"\quad \gcd(n,5)=1", lambda n: n % 5 != 0, "unproven", "Swinnerton-Dyer 1973"),
    (1, 9, 1, "7^2", 49, r"\quad (\frac{n}{7}) = -1", legendre(7, -1), "unproven", "Swinnerton-Dyer 1973"),
    (1, 9, 1, "49", 49, r"\text{ for } n \equiv 3, 5, 6 \pmod 7", legendre(7, -1), "unproven", "SD 1973"),
]

# False neighbours: the wrong power of the modulus, or the wrong class.
FALSE = [
    (0, 11, 1, "2^{12}", 2**12, r"\quad n \equiv 1 \pmod 8", mod8(1)),
    (0, 11, 1, "2^{11}", 2**11, r"\quad n \equiv 3 \pmod 8", mod8(3)),
    (0, 11, 705, "2^{15}", 2**15, r"\quad n \equiv 7 \pmod 8", mod8(7)),
    (0, 11, 1, "2^9", 2**9, r"\quad (n \text{ odd})", ODD),
    (0, -1, 1, "23", 23, r"\quad \left(\frac{n}{23}\right) = 1", legendre(23, 1)),
    (0, 11, 1, "9", 9, r"\quad (n, 3) = 1", lambda n: n % 3 != 0),
    (1, 9, 1, "5^3", 125, r"\quad 5 \nmid n", lambda n: n % 5 != 0),
    (1, 9, 1, "7^3", 343, r"\quad (\frac{n}{7}) = -1", legendre(7, -1)),
    (1, 9, 1, "7^2", 49, r"\quad (\frac{n}{7}) = 1", legendre(7, 1)),
]


@pytest.mark.parametrize(("a", "b", "c", "written", "modulus", "qualifier", "cls", "verdict", "source"), TRUE)
def test_true_congruences_on_a_class(
    a: int, b: int, c: int, written: str, modulus: int, qualifier: str, cls: Pred, verdict: str, source: str
) -> None:
    assert first_failure(a, b, c, modulus, cls) is None, f"brute force contradicts {source}"
    found = run(a, b, c, written, qualifier)
    assert found["verdict"] == verdict, found["message"]
    if verdict == "unproven":
        assert "quasimodular" in str(found["message"])


@pytest.mark.parametrize(("a", "b", "c", "written", "modulus", "qualifier", "cls"), FALSE)
def test_false_neighbours_are_refuted_in_their_class(
    a: int, b: int, c: int, written: str, modulus: int, qualifier: str, cls: Pred
) -> None:
    n = first_failure(a, b, c, modulus, cls)
    assert n is not None, "brute force finds no failure: not a false neighbour"
    found = run(a, b, c, written, qualifier)
    assert found["verdict"] == "refuted", found["message"]
    witness = found["first_difference"]
    assert isinstance(witness, dict)
    assert witness["n"] == n and cls(n)
    assert (TAU[n] - right(a, b, c, n)) % modulus != 0


def test_the_class_and_the_congruence_keep_their_own_moduli() -> None:
    """'n = 1 mod 8' is a class, 2^11 the congruence's modulus, in either order (common practice)."""
    for row in (
        r"\tau(n) \equiv \sigma_{11}(n) \pmod{2^{11}} \quad n \equiv 1 \pmod 8",
        r"\tau(n) \equiv \sigma_{11}(n) \quad (n \equiv 1 \pmod 8) \pmod{2^{11}}",
    ):
        parsed = parse_row(row)
        assert not hasattr(parsed, "code"), parsed
        (statement,) = parsed.statements  # type: ignore[union-attr]
        assert statement.modulus == 2**11
        assert statement.n_class is not None
        assert (statement.n_class.modulus, statement.n_class.residues) == (8, frozenset({1}))


def _members(qualifier: str) -> set[int]:
    parsed = parse_row(r"a(n) \equiv 0 \pmod 2 " + qualifier)
    assert not hasattr(parsed, "code"), parsed
    (statement,) = parsed.statements  # type: ignore[union-attr]
    assert statement.n_class is not None
    return {n for n in range(1, 200) if n in statement.n_class}


@pytest.mark.parametrize(
    ("qualifier", "cls"),
    [
        (r"\quad (n \text{ odd})", ODD),
        (r"\text{for odd } n", ODD),
        (r"\quad (n \text{ even})", lambda n: n % 2 == 0),
        (r"\quad (n, 5) = 1", lambda n: math.gcd(n, 5) == 1),
        (r"\quad \gcd(n, 5) = 1", lambda n: math.gcd(n, 5) == 1),
        (r"\quad 7 \nmid n", lambda n: n % 7 != 0),
        (r"\quad (\frac{n}{7}) = -1", legendre(7, -1)),  # \left, \right are removed by the scanner
        (r"\quad (\frac{n}{11}) = +1", legendre(11, 1)),
        (r"\text{for } n \equiv 1 \pmod{8}", mod8(1)),
        (r"\quad n \equiv 1 \pmod{2^3}", mod8(1)),
        (r"\quad n \equiv 2, -1 \pmod{9}", lambda n: n % 9 in (2, 8)),
        (r"\quad (n, 2) = 1 \quad n \equiv 1 \pmod 3", lambda n: n % 2 == 1 and n % 3 == 1),
    ],
)
def test_spellings_of_a_class(qualifier: str, cls: Pred) -> None:
    """Each spelling reads as the class sympy's Legendre symbol and gcd define."""
    assert _members(qualifier) == {n for n in range(1, 200) if cls(n)}


def test_restriction_is_exact_or_refused() -> None:
    """The combination of real characters equals the indicator on every residue (orthogonality of
    characters, common practice); a class no real character cuts out (n = 1 mod 5) is refused."""
    for m, kept in [(8, {1}), (24, {5}), (23, {n for n in range(23) if legendre(23, -1)(n)}), (5, {0})]:
        found = restriction(1, m, frozenset(kept))
        assert not isinstance(found, str), found
        assert found.level == m * m  # Ono, The Web of Modularity, Prop. 2.8 (from memory)
    assert isinstance(restriction(1, 5, frozenset({1})), str)
    assert isinstance(restriction(1, 4, frozenset({2})), str)


def test_certificate_on_a_class_is_rechecked() -> None:
    doc = "%@claim\n\\[ \\tau(n) \\equiv 0 \\pmod{23} \\quad \\left(\\frac{n}{23}\\right) = -1 \\]\n"
    (claim,) = check_text(doc, "classes.tex").to_dict()["claims"]
    assert claim["verdict"] == "proved"
    cert = claim["certificate"]
    assert cert["n_class"]["level"] == 529 and cert["level"] == 529
    assert recheck(cert).status == "confirmed"
    # A class no real character cuts out, or a wrong level, must fail the re-check.
    bad = {**cert, "n_class": {**cert["n_class"], "residues": [1]}}
    assert recheck(bad).status != "confirmed"
    bad = {**cert, "n_class": {**cert["n_class"], "level": 23}}
    assert recheck(bad).status != "confirmed"
    # Without the class, the certificate claims tau = 0 mod 23 for all n, which is false.
    bare = {k: v for k, v in cert.items() if k != "n_class"}
    assert recheck(bare).status != "confirmed"


def test_identity_on_a_class_is_refuted_only_in_the_class() -> None:
    """sigma_0(n) = 2 for n >= 2 prime to 6: false first at n = 25 (sympy), though n = 4 fails earlier."""
    first = next(n for n in range(2, N) if math.gcd(n, 6) == 1 and divisor_sigma(n, 0) != 2)
    assert divisor_sigma(4, 0) != 2 and first == 25
    doc = "%@claim\n\\[ \\sigma_0(n) = 2 \\quad (n \\ge 2) \\quad (n, 6) = 1 \\]\n"
    (claim,) = check_text(doc, "classes.tex").to_dict()["claims"]
    assert claim["verdict"] == "refuted", claim["message"]
    assert claim["first_difference"]["n"] == first


def test_identity_true_for_all_n_is_proved_on_a_class() -> None:
    """An identity proved for every n holds on the class (sigma_3 - sigma_3 = 0, common practice)."""
    doc = "%@claim\n\\[ \\sigma_1(n) = \\sigma_1(n) + \\sigma_3(n) - \\sigma_3(n) \\quad (n \\text{ odd}) \\]\n"
    (claim,) = check_text(doc, "classes.tex").to_dict()["claims"]
    assert claim["verdict"] == "proved", claim["message"]


def test_an_empty_class_is_not_decided() -> None:
    """(n/9) = -1 holds for no n: 9 is a square, so the Jacobi symbol (n/9) is never -1 (common practice)."""
    doc = "%@claim\n\\[ \\tau(n) \\neq 0 \\quad (\\frac{n}{9}) = -1 \\]\n"
    (claim,) = check_text(doc, "classes.tex").to_dict()["claims"]
    assert claim["verdict"] == "error", claim["message"]


def test_forms_on_a_class_are_compared_by_coefficients() -> None:
    """Delta = E_4^3 on odd n is false at n = 1: tau(1) = 1, while E_4^3 = 1 + 720 q + ... (E_4 = 1 + 240 q + ...)."""
    doc = "%@claim\n\\[ \\Delta = E_4^3 \\quad (n \\text{ odd}) \\]\n"
    (claim,) = check_text(doc, "classes.tex").to_dict()["claims"]
    assert claim["kind"] == "arithmetic"
    assert claim["verdict"] == "refuted", claim["message"]
    assert claim["first_difference"]["n"] == 1


def test_a_symbol_equal_to_zero_is_the_class_of_multiples() -> None:
    # (n/23) = 0 means 23 | n (the Jacobi symbol). tau(23) = 18643272 = 1 mod 23 (tau from the product
    # q prod (1-q^n)^24, computed here), so "tau(n) = 0 mod 23 when (n/23) = 0" fails at n = 23 — in the
    # class, not at n = 1 as when the qualifier was read as a separate claim.
    from verifier import check_text

    assert TAU[23] == 18643272 and 18643272 % 23 == 1
    text = "%@claim\n\\[ \\tau(n) \\equiv 0 \\pmod{23} \\quad \\text{for } \\left(\\frac{n}{23}\\right) = 0 \\]\n"
    (claim,) = check_text(text).claims
    assert claim.verdict == "refuted"
    assert claim.outcome.first_difference is not None and claim.outcome.first_difference["n"] == 23


@pytest.mark.parametrize(
    ("qualifier", "cls", "start"),
    [
        (r"\quad (n \equiv 4 \pmod{5}, \ n \ge 10)", lambda n: n % 5 == 4, 10),
        (r"\quad (n \ge 3, n \text{ odd})", ODD, 3),
        (r"\quad (n \equiv 1 \pmod 8,\quad n \geq 5)", mod8(1), 5),
        (r"\quad ((n, 5) = 1, \ n \ge 2)", lambda n: math.gcd(n, 5) == 1, 2),
    ],
)
def test_a_class_and_a_range_in_one_pair_of_parentheses(qualifier: str, cls: Pred, start: int) -> None:
    # Regression: a class and a range written together were a syntax error.
    parsed = parse_row(r"a(n) \equiv 0 \pmod 2 " + qualifier)
    assert not hasattr(parsed, "code"), parsed
    (statement,) = parsed.statements  # type: ignore[union-attr]
    assert statement.n_class is not None and statement.start is not None
    assert statement.start[1] == start
    assert {n for n in range(1, 200) if n in statement.n_class} == {n for n in range(1, 200) if cls(n)}


def test_partition_congruences_with_a_class_and_a_range() -> None:
    # p(n) = 0 mod 5 for n = 4 mod 5 (Ramanujan 1919; Hardy, Ramanujan, Ch. VI); its neighbour on
    # n = 3 mod 5 first fails at n = 13 >= 10 (p(13) = 101, sympy), not at n = 3 or 8 below the range.
    from sympy import partition

    first = next(n for n in range(10, N) if n % 5 == 3 and int(partition(n)) % 5)
    assert first == 13
    doc = (
        "%@claim\n\\[ p(n) \\equiv 0 \\pmod{5} \\quad (n \\equiv 4 \\pmod{5}, \\ n \\ge 10) \\]\n"
        "%@claim\n\\[ p(n) \\equiv 0 \\pmod{5} \\quad (n \\equiv 3 \\pmod{5}, \\ n \\ge 10) \\]\n"
    )
    true, false = check_text(doc, "c.tex").to_dict()["claims"]
    assert true["verdict"] == "proved", true["message"]
    assert false["verdict"] == "refuted" and false["first_difference"]["n"] == first
    assert false["first_difference"]["left"] == str(partition(first))

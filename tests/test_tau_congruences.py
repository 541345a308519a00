"""Classical congruences for Ramanujan's tau(n), each with a false neighbour.

Sources: H. P. F. Swinnerton-Dyer, "On l-adic representations and congruences for coefficients
of modular forms", LNM 350 (1973); J.-P. Serre, "Congruences et formes modulaires (d'apres
H. P. F. Swinnerton-Dyer)", Seminaire Bourbaki 416 (1972) -- both from memory.  Every
statement is also checked here by brute force (tau from the product q prod (1 - q^n)^24 and
sigma from sympy), independently of qreferee.  A true congruence must never be refuted; those
the method covers (docs/method.md#congruence-denominators, #congruence-e2) must be proved.
"""

from __future__ import annotations

from fractions import Fraction

import pytest
from sympy import divisor_sigma
from tests.brute import eta_product as brute_eta_product
from tests.brute import tau_list
from verifier.api import check_text

N = 120


TAU = tau_list(N + 1)


def rhs(a: int, b: int, n: int, sign: int = 1) -> int:
    return sign * n**a * int(divisor_sigma(n, b))


def first_failure(a: int, b: int, modulus: int, sign: int = 1) -> int | None:
    return next((n for n in range(1, N + 1) if (TAU[n] - rhs(a, b, n, sign)) % modulus), None)


def claim(a: int, b: int, modulus: int, sign: int = 1) -> dict[str, object]:
    factor = "" if a == 0 else ("n" if a == 1 else f"n^{a}")
    minus = "-" if sign < 0 else ""
    doc = f"%@claim\n\\[ \\tau(n) \\equiv {minus}{factor}\\sigma_{{{b}}}(n) \\pmod{{{modulus}}} \\]\n"
    (c,) = check_text(doc, "tau.tex").to_dict()["claims"]
    return dict(c)


# (a, b, modulus, verdict qreferee reaches, source).  The literature states the sharpest congruences
# modulo 2^11, 3^6 and 5^3 only for n in residue classes (n = 1 mod 8, n = 1 mod 3, n prime to 5) and
# with negative powers of n (Swinnerton-Dyer 1973, from memory); the all-n forms are below, the forms
# on a class of n in tests/test_classes_of_n.py.
TRUE = [
    (0, 11, 691, "proved", "Ramanujan; Swinnerton-Dyer 1973 (from memory)"),
    (1, 3, 7, "proved", "Swinnerton-Dyer 1973; Serre, Bourbaki 416 (from memory)"),
    (1, 9, 7, "proved", "Swinnerton-Dyer 1973: tau(n) = n sigma_9(n) mod 7 (from memory)"),
    (1, 9, 5, "proved", "Swinnerton-Dyer 1973 (from memory)"),
    (1, 1, 5, "proved", "Swinnerton-Dyer 1973: tau(n) = n sigma_9(n) = n sigma_1(n) mod 5 (from memory)"),
    (2, 7, 3, "proved", "Swinnerton-Dyer 1973: tau(n) = n^2 sigma_7(n) mod 3^3 (from memory)"),
    # docs/method.md#congruence-weights: the E_2 piece is 0 mod 5 by itself, so E_6 = E_2 (mod 5) suffices.
    (1, 9, 25, "proved", "Swinnerton-Dyer 1973, the 5^2 refinement (from memory)"),
    # docs/method.md#congruence-e2: scaled by 3, E_2 -> E_2(tau) - 81 E_2(81 tau) on Gamma_0(81).
    (2, 7, 27, "proved", "Swinnerton-Dyer 1973: tau(n) = n^2 sigma_7(n) mod 3^3 (from memory)"),
    (2, 7, 9, "proved", "Swinnerton-Dyer 1973, reduced mod 3^2 (from memory)"),
    (1, 1, 2, "proved", "tau(n) odd iff n an odd square (Serre, Bourbaki 416, from memory)"),
]

# (a, b, modulus, sign): false neighbours of the above -- a higher power of the prime, another sigma
# index, the opposite sign.
FALSE = [
    (0, 9, 691, 1),
    (0, 11, 691 * 691, 1),
    (0, 11, 691, -1),
    (1, 3, 49, 1),
    (1, 5, 7, 1),
    (1, 3, 7, -1),
    (0, 9, 5, 1),
    (1, 9, 125, 1),
    (1, 7, 25, 1),
    (1, 9, 25, -1),
    (2, 6, 3, 1),
    (2, 7, 81, 1),
    (2, 5, 27, 1),
    (2, 7, 27, -1),
    (0, 11, 3, 1),
    (0, 11, 2, 1),
    (1, 1, 4, 1),
    (0, 1, 2, 1),
]


@pytest.mark.parametrize(("a", "b", "modulus", "verdict", "source"), TRUE)
def test_classical_tau_congruences(a: int, b: int, modulus: int, verdict: str, source: str) -> None:
    assert first_failure(a, b, modulus) is None, source  # brute force
    c = claim(a, b, modulus)
    assert c["verdict"] == verdict, (source, c["message"])


@pytest.mark.parametrize(("a", "b", "modulus", "sign"), FALSE)
def test_false_neighbours_are_refuted(a: int, b: int, modulus: int, sign: int) -> None:
    n = first_failure(a, b, modulus, sign)
    assert n is not None  # brute force: the neighbour is false
    c = claim(a, b, modulus, sign)
    assert c["verdict"] == "refuted", c["message"]
    w = c["first_difference"]
    assert isinstance(w, dict)
    assert (w["n"], int(w["left"]), int(w["right"])) == (n, TAU[n], rhs(a, b, n, sign))


def eta_product(deltas: dict[int, int], count: int) -> list[int]:
    """Coefficients of q^0..q^(count-1) of prod_delta eta(delta tau)^r (sum delta r divisible by 24)."""
    s = sum(d * r for d, r in deltas.items())
    assert s % 24 == 0
    shift = s // 24
    return [0] * shift + brute_eta_product(deltas, count)[: count - shift]


# (prime, the eta quotient F with tau(n) = a_F(n) mod prime, source).  Both rest on
# (1 - x)^p = 1 - x^p (mod p) (common practice), which qreferee uses as
# docs/method.md#congruence-frobenius.
ETA_CONGRUENCES = [
    (23, {1: 1, 23: 1}, "tau(n) = a(n) of eta(tau) eta(23 tau) mod 23: Swinnerton-Dyer 1973 (from memory)"),
    (11, {1: 2, 11: 2}, "tau(n) = a(n) of eta(tau)^2 eta(11 tau)^2 mod 11: Serre, Bourbaki 416 (from memory)"),
]


def eta_claim(deltas: dict[int, int], modulus: int, sign: int = 1) -> dict[str, object]:
    body = "".join(f"\\eta({'' if d == 1 else d}\\tau)^{{{r}}}" for d, r in deltas.items())
    minus = "-" if sign < 0 else ""
    doc = f"%@define F(\\tau) = {body}\n%@claim\n\\[ \\tau(n) \\equiv {minus}a_F(n) \\pmod{{{modulus}}} \\]\n"
    (c,) = check_text(doc, "t.tex").to_dict()["claims"]
    return dict(c)


@pytest.mark.parametrize(("p", "deltas", "source"), ETA_CONGRUENCES)
def test_tau_mod_p_through_an_eta_quotient(p: int, deltas: dict[int, int], source: str) -> None:
    a = eta_product(deltas, N + 1)
    assert all((TAU[n] - a[n]) % p == 0 for n in range(1, N + 1)), source  # brute force
    c = eta_claim(deltas, p)
    assert c["verdict"] == "proved", (source, c["message"])
    (detail,) = c["components"]  # type: ignore[misc]
    if p == 23:  # weights 12 and 1, characters trivial and chi_{-23}: only the Frobenius lift joins them
        assert detail["frobenius"]["right"] == "eta(tau)^24"
    else:  # weights 12 and 2 differ by p - 1 = 10: the multiplier E_10 = 1 (mod 11) joins them
        assert "frobenius" not in detail and detail["weight"] == 12


@pytest.mark.parametrize(("p", "deltas", "source"), ETA_CONGRUENCES)
@pytest.mark.parametrize("change", ["square", "other prime", "sign"])
def test_eta_quotient_neighbours_are_refuted(p: int, deltas: dict[int, int], source: str, change: str) -> None:
    modulus = {"square": p * p, "other prime": 29, "sign": p}[change]
    sign = -1 if change == "sign" else 1
    a = eta_product(deltas, N + 1)
    n = next(n for n in range(1, N + 1) if (TAU[n] - sign * a[n]) % modulus)  # brute force: false
    c = eta_claim(deltas, modulus, sign)
    assert c["verdict"] == "refuted", (source, c["message"])
    w = c["first_difference"]
    assert isinstance(w, dict)
    assert (w["n"], int(w["left"]), int(w["right"])) == (n, TAU[n], sign * a[n])


def test_forms_congruence_delta_mod_23() -> None:
    # The same fact between forms (Swinnerton-Dyer 1973, from memory), and its neighbour mod 2 * 23.
    doc = (
        "%@claim\n\\[ \\Delta \\equiv \\eta(\\tau)\\eta(23\\tau) \\pmod{23} \\]\n"
        "%@claim\n\\[ \\Delta \\equiv \\eta(\\tau)\\eta(23\\tau) \\pmod{46} \\]\n"
    )
    true, false = check_text(doc, "t.tex").to_dict()["claims"]
    assert true["verdict"] == "proved", true["message"]
    a = eta_product({1: 1, 23: 1}, 4)
    assert false["verdict"] == "refuted" and false["first_difference"]["n"] == 2
    assert (TAU[2] - a[2]) % 46 != 0


def test_frobenius_lift_of_exponents() -> None:
    # eta(p d tau)^(p^(e-1) u) = eta(d tau)^(p^e u) (mod p^e), from (1 - x)^p = 1 - x^p (mod p)
    # (common practice); checked here on the series by brute force.
    from verifier.prove.frobenius import lift_eta

    one, three, nine, twenty_three = Fraction(1), Fraction(3), Fraction(9), Fraction(23)
    assert lift_eta(((one, 1), (twenty_three, 1)), 23, 1) == ((one, 24),)
    # Modulo 23^2 the exponent 1 of eta(23 tau) is not a multiple of 23: nothing moves.
    assert lift_eta(((one, 1), (twenty_three, 1)), 23, 2) == ((one, 1), (twenty_three, 1))
    assert lift_eta(((nine, 1),), 3, 1) == ((one, 9),)
    assert lift_eta(((three, 3),), 3, 2) == ((one, 9),)
    for deltas, lifted, m in [({9: 1}, {1: 9}, 3), ({3: 3}, {1: 9}, 9), ({3: -2, 1: 30}, {1: 24}, 3)]:
        a, b = brute_eta_product(deltas, 60), brute_eta_product(lifted, 60)
        assert all((x - y) % m == 0 for x, y in zip(a, b, strict=True))


def test_the_level_p_power_substitute_is_certified() -> None:
    c = claim(2, 7, 27)
    (detail,) = c["components"]  # type: ignore[misc]
    # 3 divides a denominator, so the E_2 pieces need E_2 mod 3^4: E_2(tau) - 81 E_2(81 tau) on Gamma_0(81)
    # (docs/method.md#congruence-e2), weight 12, Sturm bound 12 * 108 / 12 = 108 (docs/method.md#sturm-bound).
    assert detail["scaled_by"] == 3 and detail["e2_level"] == 81
    assert detail["weight"] == 12 and detail["bound"] == 108


def test_the_scaled_proof_says_how() -> None:
    c = claim(2, 7, 3)
    (detail,) = c["components"]  # type: ignore[misc]
    assert detail["scaled_by"] == 3 and detail["e2_replaced_by"] == "E_8"


def test_proof_paragraphs_name_the_new_steps() -> None:
    from verifier.report import proof_tex

    doc = (
        "%@claim\n\\[ \\tau(n) \\equiv n^2\\sigma_7(n) \\pmod{27} \\]\n"
        "%@claim\n\\[ \\Delta \\equiv \\eta(\\tau)\\eta(23\\tau) \\pmod{23} \\]\n"
    )
    report = check_text(doc, "t.tex")
    assert [c.verdict for c in report.claims] == ["proved", "proved"]
    tex = proof_tex.render(report)
    assert "$E_2(\\tau) - 81 E_2(81 \\tau)$" in tex and "\\Gamma_0(81)" in tex
    assert "\\bibitem{diamond-shurman-e2}" in tex
    assert "giving $\\Delta$ and $\\eta(\\tau)^{24}$" in tex

"""Classical congruences for Ramanujan's tau(n), each with a false neighbour.

Sources: H. P. F. Swinnerton-Dyer, "On l-adic representations and congruences for coefficients
of modular forms", LNM 350 (1973); J.-P. Serre, "Congruences et formes modulaires (d'apres
H. P. F. Swinnerton-Dyer)", Seminaire Bourbaki 416 (1972) -- both from memory.  Every
statement is also checked here by brute force (tau from the product q prod (1 - q^n)^24 and
sigma from sympy), independently of qreferee.  A true congruence must never be refuted; those
the method covers (docs/method.md#congruence-denominators, #congruence-e2) must be proved.
"""

from __future__ import annotations

import pytest
from sympy import divisor_sigma
from verifier.api import check_text

N = 120


def tau_list(count: int) -> list[int]:
    """tau(0..count-1) from q prod (1 - q^n)^24, by naive multiplication."""
    c = [1] + [0] * (count - 1)
    for j in range(1, count):
        for _ in range(24):
            for i in range(count - 1, j - 1, -1):
                c[i] -= c[i - j]
    return [0, *c[: count - 1]]


TAU = tau_list(N + 1)


def rhs(a: int, b: int, n: int) -> int:
    return n**a * int(divisor_sigma(n, b))


def first_failure(a: int, b: int, modulus: int) -> int | None:
    return next((n for n in range(1, N + 1) if (TAU[n] - rhs(a, b, n)) % modulus), None)


def claim(a: int, b: int, modulus: int) -> dict[str, object]:
    factor = "" if a == 0 else ("n" if a == 1 else f"n^{a}")
    doc = f"%@claim\n\\[ \\tau(n) \\equiv {factor}\\sigma_{{{b}}}(n) \\pmod{{{modulus}}} \\]\n"
    (c,) = check_text(doc, "tau.tex").to_dict()["claims"]
    return dict(c)


# (a, b, modulus, verdict qreferee reaches, source)
TRUE = [
    (0, 11, 691, "proved", "Ramanujan; Swinnerton-Dyer 1973 (from memory)"),
    (1, 3, 7, "proved", "Swinnerton-Dyer 1973; Serre, Bourbaki 416 (from memory)"),
    (1, 9, 5, "proved", "Swinnerton-Dyer 1973 (from memory)"),
    (1, 1, 5, "proved", "Swinnerton-Dyer 1973: tau(n) = n sigma_9(n) = n sigma_1(n) mod 5 (from memory)"),
    (2, 7, 3, "proved", "Swinnerton-Dyer 1973: tau(n) = n^2 sigma_7(n) mod 3^3 (from memory)"),
    (1, 9, 25, "unproven", "Swinnerton-Dyer 1973, the 5^2 refinement (from memory); E_2 mod 25 has no substitute"),
    (2, 7, 27, "unproven", "Swinnerton-Dyer 1973 (from memory); E_2 mod 27 has no substitute"),
    (1, 1, 2, "unproven", "tau(n) odd iff n an odd square (Serre, Bourbaki 416, from memory)"),
]

# (a, b, modulus): false neighbours of the above
FALSE = [(0, 9, 691), (0, 11, 691 * 691), (1, 3, 49), (1, 5, 7), (0, 9, 5), (2, 6, 3), (0, 11, 3), (0, 11, 2)]


@pytest.mark.parametrize(("a", "b", "modulus", "verdict", "source"), TRUE)
def test_classical_tau_congruences(a: int, b: int, modulus: int, verdict: str, source: str) -> None:
    assert first_failure(a, b, modulus) is None, source  # brute force
    c = claim(a, b, modulus)
    assert c["verdict"] == verdict, (source, c["message"])


@pytest.mark.parametrize(("a", "b", "modulus"), FALSE)
def test_false_neighbours_are_refuted(a: int, b: int, modulus: int) -> None:
    n = first_failure(a, b, modulus)
    assert n is not None  # brute force: the neighbour is false
    c = claim(a, b, modulus)
    assert c["verdict"] == "refuted", c["message"]
    w = c["first_difference"]
    assert isinstance(w, dict)
    assert (w["n"], int(w["left"]), int(w["right"])) == (n, TAU[n], rhs(a, b, n))


def test_tau_mod_23_is_never_refuted() -> None:
    # Delta = q prod (1-q^n)(1-q^{23n}) (mod 23), since (1-x)^23 = 1 - x^23 (mod 23) (common practice):
    # tau(n) is congruent mod 23 to the coefficients of eta(tau) eta(23 tau) (Swinnerton-Dyer 1973, from memory).
    doc = (
        "%@define F(\\tau) = \\eta(\\tau)\\eta(23\\tau)\n"
        "%@claim\n\\[ \\tau(n) \\equiv a_F(n) \\pmod{23} \\]\n"
        "%@claim\n\\[ \\tau(n) \\equiv a_F(n) \\pmod{29} \\]\n"
    )
    true, false = check_text(doc, "t.tex").to_dict()["claims"]
    assert true["verdict"] in ("proved", "unproven")
    assert false["verdict"] == "refuted" and false["first_difference"]["n"] == 2


def test_the_scaled_proof_says_how() -> None:
    c = claim(2, 7, 3)
    (detail,) = c["components"]  # type: ignore[misc]
    assert detail["scaled_by"] == 3 and detail["e2_replaced_by"] == "E_8"

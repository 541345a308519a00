"""The re-checker on congruences proved after lifting eta quotients by Frobenius, on E_2
substitutes named by a congruence certificate, and on memberships of sums of E_2(d tau):
honest certificates are confirmed, and a certificate with one thing altered (the modulus, the
Frobenius exponent, the lifted side, the level, the bound, the substitute, the weight) fails."""

from __future__ import annotations

import copy
from typing import Any

import pytest
from verifier import check_text
from verifier.recheck.check import CONFIRMED, FAILED, recheck
from verifier.recheck.congruence import e2_precision
from verifier.recheck.frobenius import eta_mod, moves

LIFTS = r"""
%@claim
\[ \Delta \equiv \eta(\tau)\eta(23\tau) \pmod{23} \]

%@define F(\tau) = \eta(\tau)\eta(23\tau)
%@claim
\[ \tau(n) \equiv a_F(n) \pmod{23} \]

%@claim
\[ \Delta \equiv \eta(\tau)^{15}\eta(3\tau)^{3} \pmod{9} \]

%@claim
\[ \tau(n) \equiv n^2\sigma_7(n) \pmod{3} \]

%@claim
\[ E_2(\tau) - 2E_2(2\tau) \in M_2(\Gamma_0(2)) \]

%@claim
\[ \Delta\cdot(E_2(\tau) - 3E_2(3\tau)) \in M_{14}(\Gamma_0(3)) \]
"""
# Delta = eta(tau) eta(23 tau) (mod 23): Swinnerton-Dyer, LNM 350 (1973) (from memory); the same
# as tau(n) = a_F(n). Delta = eta(tau)^15 eta(3 tau)^3 (mod 9): eta(3 tau)^3 = eta(tau)^9 (mod 9)
# from (1 - x)^3 = 1 - x^3 (mod 3) (common practice). tau(n) = n^2 sigma_7(n) (mod 3): Swinnerton-
# Dyer, ibid. (from memory). E_2(tau) - N E_2(N tau) in M_2(Gamma_0(N)): Diamond-Shurman, GTM 228,
# Section 1.2; times Delta it lies in M_14(Gamma_0(3)).


def _binomial_product(deltas: dict[int, int], count: int) -> list[int]:
    """prod (1 - q^(d n))^r through q^(count-1), exact, by the binomial theorem (a brute force)."""
    from math import comb

    c = [1] + [0] * (count - 1)
    for d, r in deltas.items():
        assert r > 0
        for n in range(1, (count - 1) // d + 1):
            j = d * n
            factor = [0] * count
            for i in range(r + 1):
                if i * j < count:
                    factor[i * j] = comb(r, i) * (-1) ** i
            c = [sum(c[a] * factor[b - a] for a in range(b + 1)) for b in range(count)]
    return c


@pytest.fixture(scope="module")
def certs() -> list[dict[str, Any]]:
    claims = check_text(LIFTS, "t.tex").to_dict()["claims"]
    assert [c["verdict"] for c in claims] == ["proved"] * 6, [c["message"] for c in claims]
    return [c["certificate"] for c in claims]


def _fails(cert: dict[str, Any], *words: str) -> None:
    result = recheck(cert)
    assert result.status == FAILED, result
    text = "; ".join(result.reasons)
    assert all(w in text for w in words), text


def test_honest_certificates_are_confirmed(certs: list[dict[str, Any]]) -> None:
    for cert in certs:
        result = recheck(cert)
        assert result.status == CONFIRMED, (cert.get("left") or cert.get("form"), result.reasons)
    lifted = [c["prime_powers"][0]["frobenius"] for c in certs[:3]]
    assert [f["right_expr"] for f in lifted] == ["(eta (1 24))", "(eta (1 24))", "(eta (1 24))"]


def test_frobenius_on_series_against_the_binomial_theorem() -> None:
    # (1 - x)^p = 1 - x^p (mod p), so prod (1 - q^(p n)) = prod (1 - q^n)^p (mod p), and
    # (1 - q^(3n))^3 = (1 - q^n)^9 (mod 9) (common practice), checked on exact binomial expansions.
    for deltas, lifted, m in [({23: 1}, {1: 23}, 23), ({3: 3}, {1: 9}, 9), ({5: 1}, {1: 5}, 5)]:
        a, b = _binomial_product(deltas, 60), _binomial_product(lifted, 60)
        assert all((x - y) % m == 0 for x, y in zip(a, b, strict=True))
        assert eta_mod(sorted(deltas.items()), 60, m) == eta_mod(sorted(lifted.items()), 60, m)
        assert eta_mod(sorted(deltas.items()), 60, m) == [x % m for x in a]
    # Not a congruence modulo the square: (1 - q^23) against (1 - q)^23 has 23 at q^1, not 0 mod 23^2.
    assert eta_mod([(23, 1)], 30, 529) != eta_mod([(1, 23)], 30, 529)


def test_frobenius_moves() -> None:
    assert moves([(1, 1), (23, 1)], [(1, 24)], 23, 1) is None
    assert moves([(9, 1)], [(1, 9)], 3, 1) is None  # through eta(3 tau)^3
    assert moves([(3, 3)], [(1, 9)], 3, 2) is None
    assert moves([(1, 30), (3, -2)], [(1, 24)], 3, 1) is None  # a negative exponent moves too
    assert moves([(1, 1), (23, 1)], [(1, 24)], 23, 2)  # 1 is no multiple of 23 modulo 23^2
    assert moves([(1, 1), (23, 1)], [(1, 25)], 23, 1)  # nothing moves off eta(tau)
    assert moves([(1, 15), (3, 3)], [(1, 23), (3, 1)], 3, 2)  # 2 is no multiple of 3 modulo 9


def _frob(cert: dict[str, Any]) -> dict[str, Any]:
    return cert["prime_powers"][0]["frobenius"]


def test_frobenius_alterations_are_caught(certs: list[dict[str, Any]]) -> None:
    delta23, _, delta9 = certs[0], certs[1], certs[2]
    # The modulus.
    cert = copy.deepcopy(delta23)
    cert["modulus"] = 46
    _fails(cert, "prime powers of 46")
    # The Frobenius exponent: eta(3 tau)^3 -> eta(tau)^9 is one move modulo 9; a lift that moves
    # only part of the exponent 3 of eta(3 tau) (2 = not a multiple of 3) is none.
    cert = copy.deepcopy(delta9)
    _frob(cert)["right_expr"] = "(eta (1 21) (3 1))"
    _fails(cert, "no Frobenius move", "multiple of 3^1")
    # The prime power's exponent: 23^2 instead of 23, alone and with the modulus.
    cert = copy.deepcopy(delta23)
    cert["prime_powers"][0].update(exponent=2, modulus=529)
    _fails(cert, "prime powers of 23")
    cert["modulus"] = 529
    _fails(cert, "not 0 mod 529")
    # The lifted side itself.
    cert = copy.deepcopy(delta23)
    _frob(cert)["right_expr"] = "(eta (1 25))"
    _fails(cert, "no Frobenius move")
    cert = copy.deepcopy(delta23)
    _frob(cert)["left_expr"] = "(* 2 (Delta 1))"
    _fails(cert, "not the author's")
    # The level after the lift and the bound of the lifted proof.
    cert = copy.deepcopy(delta23)
    _frob(cert)["level"] = 23
    _fails(cert, "level after the lift")
    cert = copy.deepcopy(delta23)
    cert["bound"] = 5
    _fails(cert, "bound")


def test_a_certificate_without_the_lifted_sides_is_not_rechecked(certs: list[dict[str, Any]]) -> None:
    cert = copy.deepcopy(certs[0])
    del _frob(cert)["left_expr"]
    result = recheck(cert)
    assert result.status == "not-rechecked" and "lifted" in result.reasons[0]


def test_e2_substitute_precisions() -> None:
    # E_2 = E_8 (mod 9), E_6 (mod 16), 1 (mod 3, mod 8), E_(p+1) (mod p): the coefficients -24 sigma_1,
    # 480 sigma_7, -504 sigma_5 and Fermat's little theorem; Kummer's congruence for B_(p+1) (Serre,
    # "Congruences et formes modulaires", Sem. Bourbaki 416, 1972; from memory).
    assert (e2_precision(3, 8), e2_precision(2, 6), e2_precision(3, 0), e2_precision(2, 0)) == (2, 4, 1, 3)
    assert (e2_precision(5, 6), e2_precision(7, 8), e2_precision(13, 14)) == (1, 1, 1)
    assert e2_precision(3, 4) == 1  # 240 + 24 = 264 = 3 * 88: E_4 = E_2 only mod 3
    assert e2_precision(5, 4) == 0  # 240 + 24 = 264 is prime to 5


def test_e2_substitute_alterations_are_caught(certs: list[dict[str, Any]]) -> None:
    tau3 = certs[3]
    detail = tau3["prime_powers"][0]
    assert detail["e2_replaced_by"] == "E_8" and detail["scaled_by"] == 3  # needs E_2 mod 9
    cert = copy.deepcopy(tau3)
    cert["prime_powers"][0]["e2_replaced_by"] = "E_4"
    _fails(cert, "E_2 = E_4 holds only mod 3^1")
    cert = copy.deepcopy(tau3)
    cert["prime_powers"][0]["weight"] = 36
    _fails(cert, "bound of weight 36")
    cert = copy.deepcopy(tau3)
    cert["prime_powers"][0]["bound"] = 3
    _fails(cert, "bound")


def test_e2_membership_alterations_are_caught(certs: list[dict[str, Any]]) -> None:
    e2_level2 = certs[4]
    assert e2_level2["form"]["expr"] == "(- (E 2 1) (* 2 (E 2 2)))"
    # E_2(tau) - 3 E_2(2 tau) keeps (1 - 3/2) E_2: quasimodular, no member of M_2(Gamma_0(2)).
    cert = copy.deepcopy(e2_level2)
    cert["form"]["expr"] = "(- (E 2 1) (* 3 (E 2 2)))"
    _fails(cert, "E_2^1")
    cert = copy.deepcopy(e2_level2)
    cert["space"]["weight"] = "4"
    _fails(cert, "weight")
    cert = copy.deepcopy(e2_level2)
    cert["form_level"] = 4
    _fails(cert, "level")
    cert = copy.deepcopy(e2_level2)
    cert["space"]["level"] = 3
    _fails(cert, "level")
    cert = copy.deepcopy(e2_level2)
    cert["space"]["character"] = -4
    _fails(cert, "character")


def test_a_lift_to_a_constant_with_half_integral_weight_is_rechecked() -> None:
    # pbar(n) = 0 (mod 2) for n >= 1: f_2 / f_1^2 = 1 (mod 2), as f_2 = f_1^2 (mod 2) from
    # (1 - x)^2 = 1 - x^2 (mod 2) (common practice; Corteel and Lovejoy, "Overpartitions", 2004,
    # from memory).  The sides have weight -1/2: only the lift is re-checked, with a direct scan.
    (claim,) = check_text(
        "%@claim\n\\[ \\overline{p}(n) \\equiv 0 \\pmod 2 \\quad (n \\ge 1) \\]\n", "t.tex"
    ).to_dict()["claims"]
    assert claim["verdict"] == "proved", claim["message"]
    cert = claim["certificate"]
    assert _frob(cert)["left_expr"] == "(- 1 1)"
    assert recheck(cert).status == CONFIRMED, recheck(cert).reasons
    # pbar(1) = 2 is not 0 mod 4 (brute force: the overpartitions of 1 are 1 and 1-bar).
    altered = copy.deepcopy(cert)
    altered["modulus"] = 4
    altered["prime_powers"][0].update(exponent=2, modulus=4)
    _fails(altered, "not 0 mod 4")
    # f_1^-2 f_2 lifted to anything but 1.
    altered = copy.deepcopy(cert)
    _frob(altered)["left_expr"] = "(- (eta (1 -2) (2 1)) 1)"
    _fails(altered, "level after the lift")  # left as it was: level 16, not the certificate's 1
    altered = copy.deepcopy(cert)
    _frob(altered)["left_expr"] = "(- 2 1)"
    _fails(altered, "not the author's")

"""The re-checker on values (method ``computation``), solved unknowns (``linear-algebra``),
progressions decided by U_m (``u-operator``), Eisenstein series with characters (``Echar``)
and theta series of odd rank: honest certificates are confirmed, and a certificate with one
thing altered (the bound, a coefficient, the level, the character, the weight, the multiplier,
the residue t, a value) fails the re-check."""

from __future__ import annotations

import copy
import json
from fractions import Fraction
from pathlib import Path
from typing import Any

import pytest
from verifier import check_text
from verifier.recheck import arith, atoms
from verifier.recheck.check import CONFIRMED, FAILED, recheck
from verifier.recheck.progression import product_coefficients

# True claims; the source of each is beside it.
VALUES = r"""
%@claim
\[ \tau(5) = 4830 \]

%@claim
\[ \sigma_3(12) = 2044 \]

%@claim
\[ r_3(3) = 8 \]

%@claim
\[ p(10) = 42 \]

%@claim
\[ \sigma(n) \neq n \]

%@claim
\[ \sum_{d \mid 12} \chi_{-4}(d) = 0 \]
"""
# tau(5) = 4830: Ramanujan, "On certain arithmetical functions" (1916), table (from memory);
# sigma_3(12), r_3(3) and the divisor sum: brute force from the definitions in this file;
# p(10) = 42: Andrews, The Theory of Partitions, table (from memory); sigma(2) = 3 != 2:
# common practice.

SOLVE = r"""
%@claim solve=a,b
\[ E_{12} = a E_4^3 + b E_6^2 \]

%@claim solve=a,b,c
\[ E_8 = a E_4^2 + b E_4^2 + c \Delta \]
"""
# E_12 = (441 E_4^3 + 250 E_6^2)/691: Serre, A Course in Arithmetic, VII.4 (from memory);
# E_8 = E_4^2 (dim M_8 = 1): Serre, ibid. (from memory); the unknowns a, b of the second
# claim multiply the same form, so only a + b = 1 is determined (c = 0).

PROGRESSIONS = r"""
%@claim
\[ \sum_{n\ge0} p(5n+4) q^n = 5\frac{f_5^5}{f_1^6} \]

%@claim
\[ \frac{f_2^5}{f_1^2 f_4^2} = \frac{f_8^5}{f_4^2 f_{16}^2} + 2q\frac{f_{16}^2}{f_8} \]

%@claim
\[ \overline{p}(4n+t) \equiv 0 \pmod{8} \quad (t \in \{3\}) \]

%@claim
\[ \overline{p}(4n) \equiv \overline{p}(n) \pmod{4} \]

%@claim
\[ p(5n+9) \equiv 0 \pmod 5 \]

%@claim
\[ p(7n+5) \equiv 0 \pmod 7 \]
"""
# Ramanujan's identity sum p(5n+4) q^n = 5 f_5^5 / f_1^6 and p(5n+4) = 0 (mod 5), p(7n+5) = 0
# (mod 7): Ramanujan 1919; Berndt, Number Theory in the Spirit of Ramanujan, Ch. 5 (from
# memory).  phi(q) = phi(q^4) + 2q psi(q^8): Berndt, Ramanujan's Notebooks III, Ch. 16,
# Entry 25 (from memory).  pbar(4n+3) = 0 (mod 8): Hirschhorn and Sellers 2005 (from memory).
# pbar(4n) = pbar(n) (mod 4): as in tests/test_progression.py (derived there, brute force).

FORMS = r"""
%@claim
\[ \theta(\tau)^2 = 1+4\sum_{n\ge1}\Bigl(\sum_{d\mid n}\chi_{-4}(d)\Bigr)q^n \]

%@claim
\[ \sum_{x,y\in\mathbb Z}q^{x^2+xy+y^2} = 1+6\sum_{n\ge1}\sum_{d\mid n}\left(\frac{d}{3}\right)q^n \]

%@claim
\[ \theta(\tau)^3 = \theta(\tau)^2\,\theta(\tau) \]
"""
# r_2(n) = 4 sum_{d | n} chi_{-4}(d) (Jacobi) and the representations by x^2 + xy + y^2,
# 6 sum_{d | n} (d/3): Grosswald, Representations of Integers as Sums of Squares, Ch. 2 and
# 9 (from memory); the third is trivially true.


def _report(text: str) -> list[dict[str, Any]]:
    data = json.loads(json.dumps(check_text(text, "m.tex").to_dict()))
    claims: list[dict[str, Any]] = data["claims"]
    for c in claims:
        assert c["verdict"] == "proved", (c["source"], c["message"])
    return claims


@pytest.fixture(scope="module")
def values() -> list[dict[str, Any]]:
    return _report(VALUES)


@pytest.fixture(scope="module")
def solved() -> list[dict[str, Any]]:
    return _report(SOLVE)


@pytest.fixture(scope="module")
def progressions() -> list[dict[str, Any]]:
    return _report(PROGRESSIONS)


@pytest.fixture(scope="module")
def forms() -> list[dict[str, Any]]:
    return _report(FORMS)


def _cert(claims: list[dict[str, Any]], index: int) -> dict[str, Any]:
    return copy.deepcopy(claims[index]["certificate"])


def _broken(cert: dict[str, Any], word: str) -> None:
    result = recheck(cert)
    assert result.status == FAILED, result
    assert any(word in r for r in result.reasons), result.reasons


# -- honest certificates -------------------------------------------------------------------
@pytest.mark.parametrize("which", ["values", "solved", "progressions", "forms"])
def test_honest_certificates_are_confirmed(which: str, request: pytest.FixtureRequest) -> None:
    claims = request.getfixturevalue(which)
    methods = {"values": "computation", "solved": "linear-algebra", "progressions": "u-operator"}
    for c in claims:
        if which in methods:
            assert c["certificate"]["method"] == methods[which]
        result = recheck(c["certificate"])
        assert result.status == CONFIRMED, (c["source"], result.reasons)


def test_brute_force_of_the_values() -> None:
    # The values the VALUES manuscript states, from the definitions (no qreferee code).
    assert sum(d**3 for d in range(1, 13) if 12 % d == 0) == 2044
    assert sum(1 for x in range(-2, 3) for y in range(-2, 3) for z in range(-2, 3) if x * x + y * y + z * z == 3) == 8
    chi = {1: 1, 3: -1}  # chi_{-4}(d) for the odd divisors of 12; 0 for the even ones
    assert sum(chi.get(d, 0) for d in range(1, 13) if 12 % d == 0) == 0


# -- values --------------------------------------------------------------------------------
def test_altered_values_are_caught(values: list[dict[str, Any]]) -> None:
    cert = _cert(values, 0)
    cert["arithmetic"]["left_value"] = "4831"
    _broken(cert, "left side")
    cert = _cert(values, 0)
    cert["arithmetic"]["right"] = "4831"  # the claim itself altered: tau(5) = 4831 is false
    _broken(cert, "differ")
    cert = _cert(values, 1)
    cert["arithmetic"]["left"] = "(sigma 5 12)"  # a different index of sigma
    _broken(cert, "left side")
    cert = _cert(values, 2)
    cert["arithmetic"]["left"] = "(r 2 3)"  # 3 is no sum of two squares
    _broken(cert, "left side")


def test_an_altered_n_or_relation_is_caught(values: list[dict[str, Any]]) -> None:
    cert = _cert(values, 4)
    cert["arithmetic"]["n"] = 1  # sigma(1) = 1: no difference at n = 1
    _broken(cert, "no difference")
    cert = _cert(values, 0)
    cert["relation"] = "!="
    _broken(cert, "no difference")


def test_an_altered_modulus_is_caught(values: list[dict[str, Any]]) -> None:
    # A congruence at a value, written into the certificate of tau(5) = 4830: 4830 = 2 3 5 7 23
    # (its factorisation, from the value itself) is 0 modulo 5 and 7, not modulo 11.
    cert = _cert(values, 0)
    cert["arithmetic"]["right"] = "0"
    cert["arithmetic"]["right_value"] = "0"
    for modulus in (5, 7):
        cert["modulus"] = modulus
        assert recheck(cert).status == CONFIRMED
    cert["modulus"] = 11
    _broken(cert, "modulo 11")


# -- solved unknowns -----------------------------------------------------------------------
def test_solve_alterations_are_caught(solved: list[dict[str, Any]]) -> None:
    cert = _cert(solved, 0)
    cert["solution"] = ["441/691", "251/691"]
    _broken(cert, "family's member")
    cert = _cert(solved, 0)
    cert["instance"]["bound"] -= 1
    _broken(cert, "bound")
    cert = _cert(solved, 0)
    cert["instance"]["space"]["weight"] = "10"
    _broken(cert, "weight")
    cert = _cert(solved, 0)
    cert["instance"]["space"]["level"] = 2
    _broken(cert, "level")
    cert = _cert(solved, 0)
    cert["instance"]["coefficients"]["values"][1] = "0"
    _broken(cert, "coefficient")
    cert = _cert(solved, 0)
    cert["family"]["units"][1] = copy.deepcopy(cert["family"]["units"][0])  # columns now dependent
    _broken(cert, "")
    cert = _cert(solved, 1)
    cert["unique"] = True  # a + b = 1 has a family of solutions
    _broken(cert, "rank")
    cert = _cert(solved, 0)
    cert["unique"] = False
    _broken(cert, "independent")


# -- progressions --------------------------------------------------------------------------
def _component(cert: dict[str, Any]) -> dict[str, Any]:
    prog: dict[str, Any] = cert["progression"]
    comps = prog.get("components")
    return comps[0] if comps else prog


@pytest.mark.parametrize("index", range(6))
def test_progression_bound_level_weight_character_are_checked(progressions: list[dict[str, Any]], index: int) -> None:
    for path, value in (
        (("target", "sturm_bound"), -1),  # the bound
        (("target", "level"), 3),  # the level of U_m h
        (("form", "level"), 3),  # the level of h
        (("form", "weight"), 1),  # the weight of h
        (("target", "weight"), 1),
        (("character_kernel",), 2),  # the character
        (("e",), 1000),  # the order of h at infinity
    ):
        cert = _cert(progressions, index)
        rec = _component(cert)
        holder = rec
        for key in path[:-1]:
            holder = holder[key]
        holder[path[-1]] = holder[path[-1]] + value if path[-1] in ("sturm_bound", "weight") else value
        result = recheck(cert)
        assert result.status == FAILED, (index, path, result)


@pytest.mark.parametrize("index", range(6))
def test_progression_multiplier_and_residue_are_checked(progressions: list[dict[str, Any]], index: int) -> None:
    cert = _cert(progressions, index)
    rec = _component(cert)
    rec["multiplier_exponents"] = [[d, u + 24] if d == 1 else [d, u] for d, u in rec["multiplier_exponents"]]
    assert recheck(cert).status == FAILED  # h is then another form (and the bound another)
    cert = _cert(progressions, index)
    rec = _component(cert)
    rec["t"] = (rec["t"] + 1) % rec["m"]
    rec["claimed_t"] = rec["t"]
    assert recheck(cert).status == FAILED
    cert = _cert(progressions, index)
    rec = _component(cert)
    rec["m"] += 1
    assert recheck(cert).status == FAILED


def test_progression_coefficients_and_claimed_side_are_checked(progressions: list[dict[str, Any]]) -> None:
    cert = _cert(progressions, 0)  # sum p(5n+4) q^n = 5 f_5^5 / f_1^6
    cert["progression"]["terms"][0]["coeff"] = "6"
    _broken(cert, "claimed side")
    cert = _cert(progressions, 1)  # a component of the 2-dissection of phi
    cert["progression"]["components"][1]["terms"][0]["product"] = [[16, 2], [8, -2]]
    assert recheck(cert).status == FAILED
    cert = _cert(progressions, 5)  # p(7n+5) = 0 (mod 7), but not mod 49: p(5) = 7
    cert["progression"]["modulus"] = 49
    _broken(cert, "modulo 49")
    cert = _cert(progressions, 0)
    cert["progression"]["product"] = [[1, -2]]  # F altered: p_2(5n+4) is no such identity
    assert recheck(cert).status == FAILED


def test_dissection_and_residue_lists_are_checked(progressions: list[dict[str, Any]]) -> None:
    cert = _cert(progressions, 1)
    cert["progression"]["components"].pop()  # a class of the dissection missing
    _broken(cert, "every t")
    cert = _cert(progressions, 2)
    cert["progression"]["residues"] = [1]
    _broken(cert, "residues")
    cert = _cert(progressions, 4)  # p(5n+9): proved for the class 4 mod 5
    assert cert["progression"]["claimed_t"] == 9 and cert["progression"]["t"] == 4
    cert["progression"]["claimed_t"] = 8
    _broken(cert, "claimed t")


def test_schoolbook_product_against_tables() -> None:
    # p(n), n = 0..11: OEIS A000041; overpartitions pbar(n), n = 0..7 (f_2 / f_1^2): OEIS A015128.
    assert product_coefficients([(1, -1)], 12) == [1, 1, 2, 3, 5, 7, 11, 15, 22, 30, 42, 56]
    assert product_coefficients([(1, -2), (2, 1)], 8) == [1, 2, 4, 8, 14, 24, 40, 64]
    # prod (1 - q^n)^3 = sum (-1)^k (2k+1) q^(k(k+1)/2) (Jacobi): 1 - 3q + 5q^3 - 7q^6.
    assert product_coefficients([(1, 3)], 8) == [1, -3, 0, 5, 0, 0, -7, 0]
    assert product_coefficients([(1, -1)], 12, 5)[4::5] == [0, 0]  # p(4), p(9) = 5, 30


# -- Eisenstein series with characters, theta of odd rank ----------------------------------
def test_generalised_bernoulli_and_eisenstein_with_characters() -> None:
    # B_{1,chi_{-4}} = (1/4)(1 - 3) = -1/2, B_{1,chi_{-3}} = -1/3 (B_{1,chi} = (1/f) sum chi(a) a,
    # Washington, Cyclotomic Fields, §4.1); B_{2,chi_5} = 4/5 from zeta_{Q(sqrt 5)}(-1) = 1/30
    # = zeta(-1) L(-1, chi_5) (from memory).
    assert arith.generalised_bernoulli(1, -1) == Fraction(-1, 2)
    assert arith.generalised_bernoulli(1, -3) == Fraction(-1, 3)
    assert arith.generalised_bernoulli(2, 5) == Fraction(4, 5)
    # theta^2 = 2 E_1^{1,chi_{-4}} (docs/method.md#eisenstein-characters): r_2(n), n = 0..9,
    # OEIS A004018.
    e1 = atoms.eisenstein_character(1, 1, -1, 10)
    assert [2 * c for c in e1.window(0, 10)] == [1, 4, 4, 0, 4, 8, 0, 0, 4, 4]
    assert not atoms.character_parity_ok(2, 1, -1) and not atoms.character_parity_ok(2, 1, 1)


def test_theta_of_odd_rank() -> None:
    # r_3(n), n = 0..9: OEIS A005875; theta = sum q^(n^2) has level 4 and trivial character
    # relative to its own multiplier (Shimura 1973, from memory).
    three = [[2, 0, 0], [0, 2, 0], [0, 0, 2]]
    assert atoms.theta(three, 10).window(0, 10) == [1, 6, 12, 8, 6, 24, 24, 0, 12, 30]
    assert arith.gram_level([[2]]) == 4 and arith.gram_kernel([[2]]) == 1
    assert arith.gram_kernel(three) == 1
    # theta(2 tau) has the character chi_8 (kernel 2) relative to the theta multiplier:
    # Koblitz, Introduction to Elliptic Curves and Modular Forms, IV.1 (from memory).
    assert arith.gram_kernel([[4]]) == 2


def test_an_odd_rank_theta_certificate_is_rechecked(forms: list[dict[str, Any]]) -> None:
    cert = _cert(forms, 2)  # theta^3 = theta^2 theta
    cert["left"]["expr"] = "(theta 1 ((2 0 0) (0 2 0) (0 0 2)))"
    assert recheck(cert).status == CONFIRMED
    cert["left"]["expr"] = "(theta 1 ((2 0 0) (0 2 0) (0 0 4)))"  # x^2 + y^2 + 2z^2: not theta^3
    assert recheck(cert).status == FAILED


def test_echar_certificate_alterations_are_caught(forms: list[dict[str, Any]]) -> None:
    for index in (0, 1):
        cert = _cert(forms, index)
        cert["space"]["level"] *= 2
        _broken(cert, "level")
        cert = _cert(forms, index)
        cert["space"]["character"] = 1
        _broken(cert, "character")
        cert = _cert(forms, index)
        cert["space"]["weight"] = "3"
        _broken(cert, "weight")
        cert = _cert(forms, index)
        cert["bound"] += 1
        _broken(cert, "bound")
    cert = _cert(forms, 0)
    # E_1^{chi_{-4},1} is the same series as E_1^{1,chi_{-4}} (both constant terms are 1/2 and
    # sum_{d | n} chi(n/d) = sum_{d | n} chi(d)), so swapping the characters changes nothing ...
    cert["right"]["expr"] = cert["right"]["expr"].replace("(Echar 1 1 -1 1)", "(Echar 1 -1 1 1)")
    assert recheck(cert).status == CONFIRMED
    # ... but another character does: E_1^{1,chi_{-3}} counts x^2 + xy + y^2, not sums of two squares.
    cert = _cert(forms, 0)
    cert["right"]["expr"] = cert["right"]["expr"].replace("(Echar 1 1 -1 1)", "(Echar 1 1 -3 1)")
    assert recheck(cert).status == FAILED
    cert = _cert(forms, 0)
    cert["right"]["expr"] = cert["right"]["expr"].replace("(Echar 1 1 -1 1)", "(Echar 2 1 -1 1)")
    assert recheck(cert).status == FAILED  # no such form (parity)


def test_lattice_points_of_e8_are_counted() -> None:
    # A Gram matrix of the E_8 lattice (even unimodular of rank 8, as in level_n.tex): theta = E_4 = 1 + 240 sum
    # sigma_3(n) q^n, so 1, 240, 2160, 6720 (Serre, A Course in Arithmetic, VII.6.6).
    e8 = [
        [2, -1, 0, 0, 0, 0, 0, 0],
        [-1, 2, -1, 0, 0, 0, 0, 0],
        [0, -1, 2, -1, 0, 0, 0, 0],
        [0, 0, -1, 2, -1, 0, 0, 0],
        [0, 0, 0, -1, 2, -1, 0, -1],
        [0, 0, 0, 0, -1, 2, -1, 0],
        [0, 0, 0, 0, 0, -1, 2, 0],
        [0, 0, 0, 0, -1, 0, 0, 2],
    ]
    assert arith.gram_level(e8) == 1 and arith.gram_kernel(e8) == 1
    assert atoms.theta(e8, 4).window(0, 4) == [1, 240, 2160, 6720]


def test_a_denominator_that_starts_late_is_expanded_further() -> None:
    # j = E_4^3 / Delta = q^-1 + 744 + ... (Serre, A Course in Arithmetic, VII.3.3): Delta starts
    # at q^1, beyond the one coefficient the printed side asks for.
    (claim,) = _report("%@claim\n\\[ j = q^{-1} + 744 + O(q) \\]\n")
    assert recheck(claim["certificate"]).status == CONFIRMED


CORPUS = [
    "tests/data/manuscripts/convolution_sums.tex",
    "tests/data/manuscripts/level_n.tex",
    "tests/data/manuscripts/styles/lattice/paper.tex",
    "tests/data/manuscripts/styles/partition/paper.tex",
    "tests/data/idiom/partitions.tex",
    "tests/data/idiom/theta.tex",
    "sample_docs/note.md",
]
COVERED = (
    "computation",
    "linear-algebra",
    "u-operator",
    "sturm",
    "valence",
    "expansion",
    "witness",
    "sturm-congruence",
    "cusp-orders",
    "dimension-formula",
    "hecke",
)


@pytest.mark.parametrize("name", CORPUS)
def test_no_certificate_of_the_corpus_fails_and_the_covered_methods_are_rechecked(name: str) -> None:
    # The corpus manuscripts cite their sources beside each claim.  Among them: identities with
    # both sides the same eta quotient (valence bound -1: nothing to compare), a cusp form whose
    # order at an irregular cusp is 1/2, and eta quotients of negative weight.
    from verifier import check_path
    from verifier.recheck.check import NOT_RECHECKED
    from verifier.recheck.run import recheck_report

    root = Path(__file__).resolve().parent.parent
    data = json.loads(json.dumps(check_path(root / name).to_dict()))
    done = recheck_report(data)
    assert done.entries
    for claim, result in done.entries:
        assert result.status != FAILED, (claim["source"], result.reasons)
        expr = json.dumps(claim["certificate"])
        # A series-only atom is re-checked when the certificate defines it (products, ``series``).
        undefined = "(series " in expr and not claim["certificate"].get("series")
        if claim["certificate"]["method"] in COVERED and not undefined:
            assert result.status != NOT_RECHECKED, (claim["source"], result.reasons)

"""Progression claims: a(mn+t) identities and congruences, and dissections (verifier/claims/).

Every true statement below comes from a published source named beside it, and is also
checked here by brute force (a naive product expansion written in this file, independent of
qreferee) on its first coefficients.  Every one has a false variant, which must be refuted
with a witness that the brute force confirms.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any

import pytest
from tests.brute import eta_product as brute
from verifier.api import check_text
from verifier.claims.products import Mono
from verifier.claims.progression import Claim, decide

# -- an independent brute force ---------------------------------------------------------


def brute_sum(terms: list[tuple[int, int, dict[int, int]]], count: int) -> list[int]:
    """sum of gamma q^e prod f^r, each term (gamma, e, exps)."""
    out = [0] * count
    for gamma, e, exps in terms:
        for i, x in enumerate(brute(exps, count - e)):
            out[i + e] += gamma * x
    return out


def claims(doc: str) -> list[dict[str, Any]]:
    data = check_text(doc, "paper.tex").to_dict()
    return list(data["claims"])


def one(body: str, defines: str = "") -> dict[str, Any]:
    (c,) = claims(defines + "%@claim\n\\[ " + body + " \\]\n")
    return c


P = {1: -1}
PBAR = {1: -2, 2: 1}
CUBIC = {1: -1, 2: -1}

# -- congruences a(mn+t) = 0 (mod M) ------------------------------------------------------

# (spelling, generating function, m, t, M, source)
CONGRUENCES = [
    ("p", P, 5, 4, 5, "Ramanujan 1919; Hardy, Ramanujan, Ch. VI"),
    ("p", P, 7, 5, 7, "Ramanujan 1919; Hardy, Ramanujan, Ch. VI"),
    ("p", P, 11, 6, 11, "Ramanujan 1919; Berndt, Number Theory in the Spirit of Ramanujan, Ch. 2"),
    ("p", P, 25, 24, 25, "Ramanujan 1919 (stated), Watson 1938 (proved) -- from memory"),
    (
        "\\overline{p}",
        PBAR,
        4,
        3,
        8,
        "Hirschhorn-Sellers, Arithmetic relations for overpartitions (2005) -- from memory",
    ),
    (
        "\\overline{p}",
        PBAR,
        8,
        7,
        64,
        "Hirschhorn-Sellers, Arithmetic relations for overpartitions (2005) -- from memory",
    ),
    (
        "\\overline{p}",
        PBAR,
        24,
        19,
        27,
        "Hirschhorn-Sellers, Arithmetic relations for overpartitions (2005) -- from memory",
    ),
    ("a_C", CUBIC, 3, 2, 3, "Chan, Ramanujan's cubic continued fraction and ... (IJNT 2010), Thm 1 -- from memory"),
    (
        "b_5",
        {1: -1, 5: 1},
        5,
        4,
        5,
        "Dandurand-Penniston, l-divisibility of l-regular partition functions -- from memory",
    ),
    (
        "b_7",
        {1: -1, 7: 1},
        7,
        5,
        7,
        "Dandurand-Penniston, l-divisibility of l-regular partition functions -- from memory",
    ),
]
CUBIC_DEFINE = "%@define C = \\frac{1}{f_1 f_2}\n"


def _direct(exps: dict[int, int], m: int, t: int, count: int) -> list[int]:
    return brute(exps, m * count + t + 1)[t::m][:count]


@pytest.mark.parametrize(("name", "exps", "m", "t", "modulus", "source"), CONGRUENCES)
def test_published_congruences_are_proved(
    name: str, exps: dict[int, int], m: int, t: int, modulus: int, source: str
) -> None:
    assert all(x % modulus == 0 for x in _direct(exps, m, t, 12)), source  # brute force, first terms
    c = one(f"{name}({m}n+{t}) \\equiv 0 \\pmod{{{modulus}}}", CUBIC_DEFINE)
    assert c["verdict"] == "proved", (source, c["message"])
    assert c["method"] == "u-operator"
    prog = c["progression"]
    assert prog["m"] == m and prog["modulus"] == modulus
    assert prog["coefficients_compared"] == prog["target"]["sturm_bound"] + 1
    assert c["certificate"]["method"] == "u-operator"


@pytest.mark.parametrize(("name", "exps", "m", "t", "modulus", "source"), CONGRUENCES)
def test_false_neighbours_of_congruences_are_refuted(
    name: str, exps: dict[int, int], m: int, t: int, modulus: int, source: str
) -> None:
    variants = [
        (m, t + 1, modulus),  # t off by one
        (m, t - 1, modulus),
        (m, t, modulus * modulus if modulus < 27 else 2 * modulus),  # a stronger modulus
    ]
    if t and t != m:
        variants.append((t, m % t if t > m % t else m, modulus))  # m and t swapped (reduced)
    for mm, tt, mod in variants:
        direct = _direct(exps, mm, tt, 40)
        first = next((n for n, x in enumerate(direct) if x % mod), None)
        if first is None:  # this variant is true after all; not a false neighbour
            continue
        c = one(f"{name}({mm}n+{tt}) \\equiv 0 \\pmod{{{mod}}}", CUBIC_DEFINE)
        assert c["verdict"] == "refuted", (mm, tt, mod, c["message"])
        w = c["first_difference"]
        assert (w["n"], int(w["left"]), w["modulus"]) == (first, direct[first], mod)


def test_t_at_least_m_proves_the_whole_class() -> None:
    # p(5n+9) = p(5(n+1)+4): Ramanujan's congruence (Ramanujan 1919) for n >= 1.
    c = one("p(5n+9) \\equiv 0 \\pmod 5")
    assert c["verdict"] == "proved" and c["progression"]["t"] == 4


def test_the_range_n_ge_1_is_read() -> None:
    # p(4) = 5 (Hardy-Wright, Table of p(n), from memory) is not 0 mod 25, but the claim starts at n = 1.
    c = one("p(5n+4) \\equiv 0 \\pmod{25} \\quad (n \\ge 1)")
    assert c["verdict"] in ("refuted", "unproven")
    if c["verdict"] == "refuted":
        assert c["first_difference"]["n"] >= 1


# -- identities sum a(mn+t) q^n = G --------------------------------------------------------

# (claim, generating function, m, t, right side as (gamma, e, exps), source)
IDENTITIES = [
    ("p(5n+4)", P, 5, 4, [(5, 0, {5: 5, 1: -6})], "Ramanujan 1919; Hardy, Ramanujan, Ch. VI"),
    (
        "p(7n+5)",
        P,
        7,
        5,
        [(7, 0, {7: 3, 1: -4}), (49, 1, {7: 7, 1: -8})],
        "Ramanujan 1919; Berndt, Number Theory in the Spirit of Ramanujan, Ch. 2",
    ),
    (
        "\\overline{p}(2n)",
        PBAR,
        2,
        0,
        [(1, 0, {4: 5, 1: -4, 8: -2})],
        "Hirschhorn-Sellers, Arithmetic relations for overpartitions (2005) -- from memory",
    ),
    (
        "\\overline{p}(2n+1)",
        PBAR,
        2,
        1,
        [(2, 0, {2: 2, 8: 2, 1: -4, 4: -1})],
        "Hirschhorn-Sellers, Arithmetic relations for overpartitions (2005) -- from memory",
    ),
    (
        "a_C(3n+2)",
        CUBIC,
        3,
        2,
        [(3, 0, {3: 3, 6: 3, 1: -4, 2: -4})],
        "Chan, Ramanujan's cubic continued fraction and ... (IJNT 2010), Thm 1 -- from memory",
    ),
]


def _latex(terms: list[tuple[int, int, dict[int, int]]]) -> str:
    out = []
    for gamma, e, exps in terms:
        num = " ".join(f"f_{{{d}}}^{{{r}}}" for d, r in exps.items() if r > 0) or "1"
        den = " ".join(f"f_{{{d}}}^{{{-r}}}" for d, r in exps.items() if r < 0) or "1"
        q = "" if e == 0 else ("q" if e == 1 else f"q^{{{e}}}")
        sign = "-" if gamma < 0 else "+"
        out.append(f" {sign} {abs(gamma)}{q}\\frac{{{num}}}{{{den}}}")
    return "".join(out).removeprefix(" + ")


@pytest.mark.parametrize(("what", "exps", "m", "t", "rhs", "source"), IDENTITIES)
def test_published_identities_are_proved(
    what: str, exps: dict[int, int], m: int, t: int, rhs: list[tuple[int, int, dict[int, int]]], source: str
) -> None:
    assert _direct(exps, m, t, 30) == brute_sum(rhs, 30), source  # brute force
    c = one(f"\\sum_{{n \\ge 0}} {what} q^n = {_latex(rhs)}", CUBIC_DEFINE)
    assert c["verdict"] == "proved", (source, c["message"])
    assert c["progression"]["target"]["sturm_bound"] == c["bound"]


@pytest.mark.parametrize(("what", "exps", "m", "t", "rhs", "source"), IDENTITIES)
def test_shifted_variants_of_identities_are_refuted(
    what: str, exps: dict[int, int], m: int, t: int, rhs: list[tuple[int, int, dict[int, int]]], source: str
) -> None:
    name = what.split("(")[0]
    variants = [
        (f"{name}({m}n+{t + 1})", m, t + 1, rhs),  # t off by one
        (f"{name}({m}n+{t})", m, t, [(g, e + 1, x) for g, e, x in rhs]),  # wrong power of q in front
        (f"{name}({m}n+{t})", m, t, [(g + 1, e, x) for g, e, x in rhs]),  # wrong constant
    ]
    if t >= 2:
        variants.append((f"{name}({t}n+{m})", t, m, rhs))  # m and t swapped
    for text, mm, tt, terms in variants:
        left, right = _direct(exps, mm, tt, 200), brute_sum(terms, 200)
        first = next(n for n in range(200) if left[n] != right[n])
        c = one(f"\\sum_{{n \\ge 0}} {text} q^n = {_latex(terms)}", CUBIC_DEFINE)
        assert c["verdict"] == "refuted", (text, c["message"])
        w = c["first_difference"]
        assert (w["n"], int(w["left"]), int(w["right"])) == (first, left[first], right[first])


def test_a_non_modular_extra_term_is_refuted_beyond_the_bound() -> None:
    # Ramanujan's identity plus 7 q^2 f_5^5/f_1^6 (lambda = 2): agrees through the Sturm bound 1 of
    # M_2(Gamma0(5)), differs at n = 2 (p(14) = 135, Hardy-Wright table, from memory).
    c = one("\\sum_{n\\ge0} p(5n+4) q^n = 5\\frac{f_5^5}{f_1^6} + 7q^2\\frac{f_5^5}{f_1^6}")
    assert c["verdict"] == "refuted"
    assert c["first_difference"]["n"] == 2 and c["first_difference"]["left"] == "135"


def test_incompatible_class_is_unproven_with_the_range() -> None:
    # sum p(2n) q^n: 2 does not divide 24*0 - 1, so no eta quotient route exists; the claimed
    # side 1/f_1^2 is false (p(2) = 2 but the coefficient of q in 1/f_1^2 is 2, of q^2 is 5,
    # while p(4) = 5 ... ) -- we only check that the verdict is never "proved".
    c = one("\\sum_{n\\ge0} p(2n) q^n = \\frac{1}{f_1^2}")
    assert c["verdict"] in ("refuted", "unproven")


def test_the_engine_cross_checks_every_proof() -> None:
    # The claim object directly: Ramanujan's mod-5 identity (Ramanujan 1919).
    rhs = (Mono.make(Fraction(5), Fraction(0), {5: 5, 1: -6}),)
    o = decide(Claim("p(5n+4)", {1: -1}, 5, 4, rhs))
    assert o.verdict == "proved" and o.progression is not None
    assert o.progression["multiplier"] == "eta(tau)^5"
    assert o.progression["form"] == {
        "eta": "eta(tau)^(-1) eta(5tau)^5",
        "weight": 2,
        "level": 5,
        "character": "chi_{5}",
    }


# -- dissections -----------------------------------------------------------------------------

PHI = {2: 5, 1: -2, 4: -2}  # phi(q) = f_2^5 / (f_1^2 f_4^2)  (Berndt, Notebooks III, Entry 22, from memory)
PSI = {2: 2, 1: -1}  # psi(q) = f_2^2 / f_1
INV_PHI_MINUS = {2: 1, 1: -2}  # 1/phi(-q) = f_2 / f_1^2
INV_PSI = {1: 1, 2: -2}  # 1/psi(q) = f_1 / f_2^2

# (name, F, right side, source)
DISSECTIONS = [
    (
        "\\frac{f_2^5}{f_1^2 f_4^2}",
        PHI,
        [(1, 0, {8: 5, 4: -2, 16: -2}), (2, 1, {16: 2, 8: -1})],
        "phi(q) = phi(q^4) + 2q psi(q^8): Berndt, Ramanujan's Notebooks III, Ch. 16, Entry 25 (from memory)",
    ),
    (
        "\\frac{f_2^5}{f_1^2 f_4^2}",
        PHI,
        [(1, 0, {18: 5, 9: -2, 36: -2}), (2, 1, {6: 2, 9: 1, 36: 1, 3: -1, 12: -1, 18: -1})],
        "phi(q) = phi(q^9) + 2q f(q^3, q^15): Hirschhorn, The Power of q, Ch. 14 (from memory)",
    ),
    (
        "\\frac{f_2^2}{f_1}",
        PSI,
        [(1, 0, {6: 1, 9: 2, 3: -1, 18: -1}), (1, 1, {18: 2, 9: -1})],
        "psi(q) = f(q^3, q^6) + q psi(q^9): Berndt, Ramanujan's Notebooks III, Ch. 16, Entry 25 (from memory)",
    ),
    (
        "\\frac{f_2}{f_1^2}",
        INV_PHI_MINUS,
        [(1, 0, {8: 5, 2: -4, 16: -2}), (2, 1, {4: 2, 16: 2, 2: -4, 8: -1})],
        "1/phi(-q) = phi(q)/phi(-q^2)^2 with phi's 2-dissection: Hirschhorn, The Power of q, Ch. 1 (from memory)",
    ),
    (
        "\\frac{f_2}{f_1^2}",
        INV_PHI_MINUS,
        [(1, 0, {6: 4, 9: 6, 3: -8, 18: -3}), (2, 1, {6: 3, 9: 3, 3: -7}), (4, 2, {6: 2, 18: 3, 3: -6})],
        "3-dissection of 1/phi(-q): Hirschhorn-Sellers (2005); Hirschhorn, The Power of q (from memory)",
    ),
    (
        "\\frac{f_1}{f_2^2}",
        INV_PSI,
        [(1, 0, {3: 2, 9: 3, 6: -6}), (-1, 1, {3: 3, 18: 3, 6: -7}), (1, 2, {3: 4, 18: 6, 6: -8, 9: -3})],
        "3-dissection of 1/psi(q) from psi's: Hirschhorn, The Power of q (from memory)",
    ),
    (
        "f_1^4",
        {1: 4},
        [(1, 0, {2: 2, 8: 10, 4: -4, 16: -4}), (4, 2, {2: 2, 16: 4, 8: -2}), (-4, 1, {2: 2, 8: 4, 4: -2})],
        "f_1^4 = (f_2 phi(-q))^2 with phi(-q) = phi(q^4) - 2q psi(q^8) (Berndt, Notebooks III, Ch. 16, Entry 25, "
        "from memory), squared here: the even piece is a sum of two eta quotients",
    ),
]


@pytest.mark.parametrize(("left", "exps", "rhs", "source"), DISSECTIONS)
def test_published_dissections_are_proved(
    left: str, exps: dict[int, int], rhs: list[tuple[int, int, dict[int, int]]], source: str
) -> None:
    assert brute(exps, 120) == brute_sum(rhs, 120), source  # brute force
    c = one(f"{left} = {_latex(rhs)}")
    assert c["verdict"] == "proved", (source, c["message"])
    assert c["progression"]["dissection"] in (2, 3)


@pytest.mark.parametrize(("left", "exps", "rhs", "source"), DISSECTIONS)
def test_false_variants_of_dissections_are_refuted(
    left: str, exps: dict[int, int], rhs: list[tuple[int, int, dict[int, int]]], source: str
) -> None:
    gamma, e, x = rhs[-1]
    for wrong in ([*rhs[:-1], (gamma + 1, e, x)], [*rhs[:-1], (gamma, e + max(d for d in x), x)]):
        a, b = brute(exps, 300), brute_sum(wrong, 300)
        first = next(n for n in range(300) if a[n] != b[n])
        c = one(f"{left} = {_latex(wrong)}")
        assert c["verdict"] == "refuted", (source, c["message"])
        w = c["first_difference"]
        assert (w["n"], int(w["left"]), int(w["right"])) == (first, a[first], b[first])


def _dissection_modulus(rhs: list[tuple[int, int, dict[int, int]]]) -> int:
    """The p of a p-dissection: the least prime dividing every delta of the right side."""
    from math import gcd

    g = 0
    for _, _, x in rhs:
        for d in x:
            g = gcd(g, d)
    return next(p for p in range(2, g + 1) if g % p == 0)


@pytest.mark.parametrize(("left", "exps", "rhs", "source"), DISSECTIONS)
def test_swapped_signed_and_shifted_dissections_are_refuted(
    left: str, exps: dict[int, int], rhs: list[tuple[int, int, dict[int, int]]], source: str
) -> None:
    p = _dissection_modulus(rhs)
    swapped = [(g, e + 1 if e % p == 0 else e - 1 if e % p == 1 else e, x) for g, e, x in rhs]  # G_0 <-> G_1
    gamma, e, x = rhs[-1]
    signed = [*rhs[:-1], (-gamma, e, x)]  # the sign of the last piece
    shifted = [*rhs[:-1], (gamma, e + 1, x)]  # the power of q in front of the last piece
    a = brute(exps, 300)
    for wrong in (swapped, signed, shifted):
        b = brute_sum(wrong, 300)
        first = next(n for n in range(300) if a[n] != b[n])  # brute force: the variant is false
        c = one(f"{left} = {_latex(wrong)}")
        assert c["verdict"] == "refuted", (source, wrong, c["message"])
        w = c["first_difference"]
        assert (w["n"], int(w["left"]), int(w["right"])) == (first, a[first], b[first])


# -- 2-dissections whose pieces are no eta quotients ------------------------------------------

# f(a, b) = (-a; ab)_oo (-b; ab)_oo (ab; ab)_oo (Jacobi's triple product; Berndt, Ramanujan's
# Notebooks III, Ch. 16, Entry 19).  psi(q) = f(q, q^3) = f(q^6, q^10) + q f(q^2, q^14) (Berndt,
# Notebooks III, Ch. 16, Entry 30 (ii)-(iii) with a = q, b = q^3 -- from memory), and with q -> -q and
# psi(q) psi(-q) = psi(q^2) phi(-q^2) = f_2 f_4 (Entry 25 (iv), from memory):
# 1/psi(q) = (f(q^6, q^10) - q f(q^2, q^14)) / (f_2 f_4).  The pieces f(q^3, q^5) and f(q, q^7) are
# generalised eta quotients, not eta quotients (docs/method.md#progressions), so these stay unproven
# (compared as series); their false variants are refuted.
F_6_10 = "(-q^6;q^{16})_\\infty(-q^{10};q^{16})_\\infty(q^{16};q^{16})_\\infty"
F_2_14 = "(-q^2;q^{16})_\\infty(-q^{14};q^{16})_\\infty(q^{16};q^{16})_\\infty"
F_K = "%@define f_k = (q^k;q^k)_\\infty\n"


def _theta_pair(a: int, b: int, count: int) -> list[int]:
    """f(q^a, q^b) = (-q^a; q^(a+b)) (-q^b; q^(a+b)) (q^(a+b); q^(a+b)) by multiplying out the factors."""
    c = [1] + [0] * (count - 1)
    period = a + b
    for start, sign in ((a, 1), (b, 1), (period, -1)):
        for j in range(start, count, period):  # multiply by (1 + sign q^j)
            for i in range(count - 1, j - 1, -1):
                c[i] += sign * c[i - j]
    return c


# (F as LaTeX, F's exponents, whether the pieces are divided by f_2 f_4, source)
NON_ETA_DISSECTIONS = [
    ("\\frac{f_2^2}{f_1}", PSI, False, "psi(q) = f(q^6,q^10) + q f(q^2,q^14): Berndt III, Ch. 16, Entry 30"),
    ("\\frac{f_1}{f_2^2}", INV_PSI, True, "1/psi(q) = psi(-q)/(f_2 f_4): Berndt III, Ch. 16, Entries 25, 30"),
]


def _non_eta_side(pieces: list[tuple[str, int, int]], over: bool) -> str:
    out = ""
    for text, sign, e in pieces:
        q = "" if e == 0 else "q" if e == 1 else f"q^{{{e}}}"
        body = f"\\frac{{{q}{text}}}{{f_2 f_4}}" if over else f"{q}{text}"
        out += (" - " if sign < 0 else " + ") + body
    return out.removeprefix(" + ")


def _non_eta_series(pieces: list[tuple[str, int, int]], over: bool, count: int) -> list[int]:
    table = {F_6_10: _theta_pair(6, 10, count), F_2_14: _theta_pair(2, 14, count)}
    out = [0] * count
    for text, sign, e in pieces:
        for i, v in enumerate(table[text][: count - e]):
            out[i + e] += sign * v
    if over:  # divide by f_2 f_4
        for delta in (2, 4):
            for j in range(delta, count, delta):
                for i in range(j, count):
                    out[i] += out[i - j]
    return out


@pytest.mark.parametrize(("left", "exps", "over", "source"), NON_ETA_DISSECTIONS)
def test_two_dissections_with_non_eta_pieces(left: str, exps: dict[int, int], over: bool, source: str) -> None:
    sign = -1 if over else 1
    true = [(F_6_10, 1, 0), (F_2_14, sign, 1)]
    a = brute(exps, 300)
    assert _non_eta_series(true, over, 300) == a, source  # brute force: the published identity
    c = one(f"{left} = {_non_eta_side(true, over)}", F_K)
    assert c["verdict"] == "unproven", c["message"]  # never refuted; no proof applies
    variants = [
        [(F_2_14, 1, 0), (F_6_10, sign, 1)],  # the two pieces swapped
        [(F_6_10, 1, 0), (F_2_14, -sign, 1)],  # the sign of the second piece
        [(F_6_10, 1, 0), (F_2_14, sign, 3)],  # q^3 in front of the second piece
    ]
    for wrong in variants:
        b = _non_eta_series(wrong, over, 300)
        first = next(n for n in range(300) if a[n] != b[n])  # brute force: the variant is false
        c = one(f"{left} = {_non_eta_side(wrong, over)}", F_K)
        assert c["verdict"] == "refuted", (wrong, c["message"])
        w = c["first_difference"]
        assert (w["n"], int(w["left"]), int(w["right"])) == (first, a[first], b[first])


def test_a_defined_generating_function_is_used() -> None:
    doc = "%@define F = \\frac{f_2}{f_1^2}\n%@claim\n\\[ a_F(8n+7) \\equiv 0 \\pmod{64} \\]\n"
    (c,) = claims(doc)
    assert c["verdict"] == "proved"  # the overpartition congruence above


def test_overpartitions_at_a_value_and_their_generating_function() -> None:
    # sum pbar(n) q^n = prod (1+q^n)/(1-q^n) = f_2/f_1^2 (Corteel and Lovejoy, "Overpartitions",
    # Trans. AMS 356 (2004), §1); the values are expanded here by brute force.
    from verifier import check_text

    terms = 8
    series = [1] + [0] * (terms - 1)
    for n in range(1, terms):
        plus = [0] * terms  # multiply by (1 + q^n)
        for i, c in enumerate(series):
            plus[i] += c
            if i + n < terms:
                plus[i + n] += c
        series = plus
        for i in range(n, terms):  # divide by (1 - q^n)
            series[i] += series[i - n]
    text = (
        f"%@claim\n\\[ \\overline{{p}}(5) = {series[5]} \\]\n"
        f"%@claim\n\\[ \\overline{{p}}(5) = {series[5] + 2} \\]\n"
        "%@claim\n\\[ \\sum_{n \\ge 0} \\overline{p}(n) q^n = \\frac{f_2}{f_1^2} \\]\n"
        "%@claim\n\\[ \\sum_{n \\ge 0} \\overline{p}(n) q^n = \\frac{f_2}{f_1^3} \\]\n"
    )
    report = check_text("%@define f_k = (q^k;q^k)_\\infty\n" + text)
    assert [c.verdict for c in report.claims] == ["proved", "refuted", "proved", "refuted"]
    assert report.claims[3].outcome.first_difference is not None
    assert report.claims[3].outcome.first_difference["n"] == 1


# -- several residues at once ------------------------------------------------------------

# (spelling, generating function, m, listed t, M, source).  Each is a consequence of a
# single published congruence modulo a divisor of m, split into the classes it covers.
RESIDUE_SETS = [
    (
        "a_C",
        CUBIC,
        9,
        (2, 5, 8),
        3,
        "Chan, cubic partitions a(3n+2) = 0 mod 3 (IJNT 2010), Thm 1 -- from memory; split mod 9",
    ),
    (
        "\\overline{p}",
        PBAR,
        8,
        (3, 7),
        8,
        "Hirschhorn-Sellers, p-bar(4n+3) = 0 mod 8 (2005) -- from memory; split mod 8",
    ),
    ("p", P, 5, (4, 9, 14), 5, "Ramanujan 1919, p(5n+4) = 0 mod 5; t >= m read as t mod m"),
]
SPELLINGS = ["\\quad (t \\in \\{{{}\\}})", "\\text{{for }} t \\in \\{{{}\\}}", ", t \\in \\{{{}\\}}"]


def _residue_claim(name: str, m: int, ts: tuple[int, ...], modulus: int, spelling: str = SPELLINGS[0]) -> str:
    listed = spelling.format(", ".join(str(t) for t in ts))
    return f"{name}({m}n+t) \\equiv 0 \\pmod{{{modulus}}} {listed}"


@pytest.mark.parametrize(("name", "exps", "m", "ts", "modulus", "source"), RESIDUE_SETS)
def test_published_residue_sets_are_proved(
    name: str, exps: dict[int, int], m: int, ts: tuple[int, ...], modulus: int, source: str
) -> None:
    for t in ts:  # brute force, first terms
        assert all(x % modulus == 0 for x in _direct(exps, m, t, 12)), source
    for spelling in SPELLINGS:
        c = one(_residue_claim(name, m, ts, modulus, spelling), CUBIC_DEFINE)
        assert c["verdict"] == "proved", (source, c["message"])
        assert c["method"] == "u-operator"
        prog = c["progression"]
        assert prog["residues"] == list(ts)
        assert [r["m"] for r in prog["components"]] == [m] * len(ts)
        assert [r["modulus"] for r in prog["components"]] == [modulus] * len(ts)


@pytest.mark.parametrize(("name", "exps", "m", "ts", "modulus", "source"), RESIDUE_SETS)
def test_false_residue_sets_are_refuted_at_the_first_failing_class(
    name: str, exps: dict[int, int], m: int, ts: tuple[int, ...], modulus: int, source: str
) -> None:
    variants = [
        (m, (*ts[:-1], ts[-1] - 1), modulus),  # the last t off by one
        (m, (ts[0] + 1, *ts[1:]), modulus),  # the first t off by one
        (m, ts, modulus * modulus),  # a stronger modulus
        (ts[0], (m % ts[0],), modulus),  # m and t swapped (reduced)
    ]
    checked = 0
    for mm, tts, mod in variants:
        failing = []
        for t in tts:
            direct = _direct(exps, mm, t, 40)
            first = next((n for n, x in enumerate(direct) if x % mod), None)
            if first is not None:
                failing.append((t, first, direct[first]))
        if not failing:  # this variant is true after all; not a false neighbour
            continue
        c = one(_residue_claim(name, mm, tts, mod), CUBIC_DEFINE)
        assert c["verdict"] == "refuted", (mm, tts, mod, c["message"])
        t, first, value = failing[0]  # the first listed class that fails
        w = c["first_difference"]
        assert (w["n"], int(w["left"]), w["modulus"]) == (first, value, mod)
        assert c["message"].startswith(f"t = {t}:")
        checked += 1
    assert checked >= 3


def test_residue_set_with_an_unreachable_class_is_unproven() -> None:
    # p(49n+r) = 0 mod 49 for r = 19, 33, 40, 47 (Ramanujan's unpublished manuscript, as edited
    # by Berndt and Ono; Watson 1938 -- from memory).  Only 47 (24r = 1 mod 49) is reachable by U_49.
    for t in (19, 33, 40, 47):
        assert all(x % 49 == 0 for x in _direct(P, 49, t, 6))  # brute force
    c = one(_residue_claim("p", 49, (19, 33, 40, 47), 49))
    assert c["verdict"] == "unproven"
    assert "t = 19:" in c["message"] and "t = 47:" not in c["message"]
    wrong = one(_residue_claim("p", 49, (19, 33, 41, 47), 49))
    assert wrong["verdict"] == "refuted"
    # p(41) = 44583 (Abramowitz-Stegun, Handbook, Table 24.5)
    assert (wrong["first_difference"]["n"], wrong["first_difference"]["left"]) == (0, "44583")


def test_residue_set_outside_a_progression_congruence_is_an_error() -> None:
    c = one("\\Delta = \\Delta \\quad (t \\in \\{1, 2\\})")
    assert c["verdict"] == "error" and c["code"] == "unsupported"


# -- exact expansions --------------------------------------------------------------------


@pytest.mark.parametrize("exps", [P, PBAR, CUBIC, {1: -6, 5: 5}, {1: -4, 4: 5, 8: -2}, {1: 3, 3: -1}, {2: 5}])
def test_exact_products_match_the_brute_force(exps: dict[int, int]) -> None:
    from verifier.forms.eta import EtaQuotient

    count = 400
    poly = EtaQuotient.of(exps).product_poly(count)
    got = [int(c) for c in poly.coeffs()] + [0] * (count - poly.length())
    assert got == brute(exps, count)


# -- internal congruences a(mn+t) = c a(n) (mod M) ----------------------------------------

# sum pbar(n) q^n = 1/phi(-q) (Corteel-Lovejoy, Overpartitions, Trans. AMS 356 (2004), from
# memory), and phi(-q) = 1 + 2 sum (-1)^k q^{k^2} = 1 (mod 2), so 1/phi(-q) = phi(-q) (mod 4):
# pbar(n) = 2 [n a square] (mod 4) for n >= 1.  Hence pbar(4n) = pbar(n) and pbar(9n) = pbar(n)
# (mod 4) (derived here from that identity; confirmed by brute force below).
INTERNAL = [(4, 4), (9, 4)]


@pytest.mark.parametrize(("m", "modulus"), INTERNAL)
def test_internal_congruences_are_proved(m: int, modulus: int) -> None:
    series = brute(PBAR, 40 * m)
    assert all((series[m * n] - series[n]) % modulus == 0 for n in range(40))  # brute force
    c = one(f"\\overline{{p}}({m}n) \\equiv \\overline{{p}}(n) \\pmod{{{modulus}}}")
    assert c["verdict"] == "proved", c["message"]
    assert c["method"] == "u-operator" and c["progression"]["modulus"] == modulus


@pytest.mark.parametrize(("m", "modulus"), INTERNAL)
def test_false_internal_congruences_are_refuted(m: int, modulus: int) -> None:
    series = brute(PBAR, 40 * m + 2)
    variants = [
        (f"\\overline{{p}}({m}n) \\equiv \\overline{{p}}(n) \\pmod{{{2 * modulus}}}", 0, 1, 2 * modulus),  # modulus
        (f"\\overline{{p}}({m}n+1) \\equiv \\overline{{p}}(n) \\pmod{{{modulus}}}", 1, 1, modulus),  # t off by one
        (f"\\overline{{p}}({m}n) \\equiv 3\\, \\overline{{p}}(n) \\pmod{{{modulus}}}", 0, 3, modulus),  # constant
        (f"\\overline{{p}}({m}n) \\equiv -\\overline{{p}}(n) \\pmod{{{modulus}}}", 0, -1, modulus),  # sign
    ]
    checked = 0
    for text, t, coeff, mod in variants:
        first = next((n for n in range(40) if (series[m * n + t] - coeff * series[n]) % mod), None)
        if first is None:  # true on these terms after all; not a false neighbour
            continue
        checked += 1
        c = one(text)
        assert c["verdict"] == "refuted", (text, c["message"])
        w = c["first_difference"]
        assert (w["n"], int(w["left"]), int(w["right"])) == (first, series[m * first + t], coeff * series[first])
    assert checked >= 3


def test_internal_congruence_outside_the_method_is_unproven() -> None:
    # p(5n+4) = 5 p(n) (mod 5) holds because both sides are 0 mod 5 (Ramanujan 1919), but the
    # q-shifts differ (lambda != 0): no single form identity covers it.
    c = one("p(5n+4) \\equiv 5\\, p(n) \\pmod 5")
    assert c["verdict"] == "unproven"
    assert "lambda" in c["message"]


# -- congruences proved with a unit U = 1 (mod l^a) in h ----------------------------------

# (spelling, generating function, m, t, M, source).  For each, no multiplier E alone makes
# F(tau) E(m tau) a holomorphic form of integral weight; a unit U = (f_d^l / f_{dl})^j = 1 (mod M)
# does (docs/method.md#progression-units).
UNIT_CONGRUENCES = [
    (
        "b_5",
        {1: -1, 5: 1},
        4,
        2,
        2,
        "sum b_5(2n) q^n = f_1^2 (mod 2), a series in q^2 mod 2: Hirschhorn and Sellers, Elementary proofs of "
        "parity results for 5-regular partitions, Bull. Aust. Math. Soc. 81 (2010); Calkin et al., Integers 8 "
        "(2008) -- from memory",
    ),
    (
        "a_G",
        {1: -2},
        2,
        1,
        2,
        "ordered pairs of partitions of an odd n: swapping the pair has no fixed point (common practice)",
    ),
    (
        "a_K",
        {1: -4},
        4,
        2,
        2,
        "1/f_1^4 = 1/f_4 (mod 2) by (1 - x)^4 = 1 - x^4 (mod 2) (Frobenius, common practice)",
    ),
    (
        "a_H",
        {1: -5},
        25,
        20,
        5,
        "1/f_1^5 = 1/f_5 (mod 5) (Frobenius, common practice) with p(5n+4) = 0 (mod 5) (Ramanujan 1919)",
    ),
]
UNIT_DEFINES = "%@define G = \\frac{1}{f_1^2}\n%@define K = \\frac{1}{f_1^4}\n%@define H = \\frac{1}{f_1^5}\n"


def _eta_label(label: str) -> dict[int, int]:
    """The exponents of an eta quotient written ``eta(dtau)^r eta(tau)`` (a certificate's spelling)."""
    import re

    out = {}
    for d, r in re.findall(r"eta\((\d*)tau\)(?:\^\(?(-?\d+)\)?)?", label):
        out[int(d or 1)] = int(r or 1)
    return out


@pytest.mark.parametrize(("name", "exps", "m", "t", "modulus", "source"), UNIT_CONGRUENCES)
def test_congruences_needing_a_unit_are_proved(
    name: str, exps: dict[int, int], m: int, t: int, modulus: int, source: str
) -> None:
    assert all(x % modulus == 0 for x in _direct(exps, m, t, 40)), source  # brute force, first terms
    if name == "b_5":  # the generating-function congruence behind it, by brute force
        b5, f1sq = brute(exps, 400), brute({1: 2}, 200)
        assert all((b5[2 * n] - f1sq[n]) % 2 == 0 for n in range(200))
    c = one(f"{name}({m}n+{t}) \\equiv 0 \\pmod{{{modulus}}}", UNIT_DEFINES)
    assert c["verdict"] == "proved", (source, c["message"])
    assert c["method"] == "u-operator"
    prog = c["progression"]
    assert prog["modulus"] == modulus and prog["m"] == m
    assert prog["unit"] is not None and c["certificate"]["progression"]["unit"] == prog["unit"]
    # The unit named by the certificate is 1 modulo M (brute force) and has q-offset 0.
    unit = _eta_label(prog["unit"])
    assert sum(d * r for d, r in unit.items()) == 0
    series = brute(unit, 200)
    assert series[0] == 1 and all(x % modulus == 0 for x in series[1:]), prog["unit"]
    # h is F(tau) E(m tau) U(tau).
    h = _eta_label(prog["form"]["eta"])
    expected = dict(exps)
    for d, r in _eta_label(prog["multiplier"]).items():
        expected[m * d] = expected.get(m * d, 0) + r
    for d, r in unit.items():
        expected[d] = expected.get(d, 0) + r
    assert h == {d: r for d, r in expected.items() if r}
    assert prog["coefficients_compared"] == prog["target"]["sturm_bound"] + 1


@pytest.mark.parametrize(("name", "exps", "m", "t", "modulus", "source"), UNIT_CONGRUENCES)
def test_false_neighbours_of_unit_congruences_are_refuted(
    name: str, exps: dict[int, int], m: int, t: int, modulus: int, source: str
) -> None:
    checked = 0
    variants = [
        (m, t + 1, modulus),
        (m, t - 1, modulus),
        (m, t, modulus**2),
        (m, t, modulus**3),
        (2 * m, t, modulus**3),
    ]
    for mm, tt, mod in variants:
        direct = _direct(exps, mm, tt, 60)
        low = 1 if tt == 0 else 0  # a(mn) with no range leaves out a(0), the constant term
        first = next((n for n, x in enumerate(direct) if x % mod and n >= low), None)
        if first is None:  # true after all on these terms; not a false neighbour
            continue
        c = one(f"{name}({mm}n+{tt}) \\equiv 0 \\pmod{{{mod}}}", UNIT_DEFINES)
        assert c["verdict"] == "refuted", (mm, tt, mod, c["message"])
        w = c["first_difference"]
        assert (w["n"], int(w["left"]), w["modulus"]) == (first, direct[first], mod)
        checked += 1
    assert checked >= 2, source


def test_a_unit_is_sought_only_for_a_prime_power() -> None:
    # 1/f_1^6 = 1/f_2^3 (mod 2) and = 1/f_3^2 (mod 3) (Frobenius, common practice), so a(6n+1) = 0
    # (mod 6); brute force confirms the first terms.  Units are sought only modulo a prime power
    # (docs/method.md#progression-units), and here no multiplier alone works, so the claim is left
    # unproven (with the range checked), never refuted; modulo 2 a unit proves it.
    assert all(x % 6 == 0 for x in _direct({1: -6}, 6, 1, 30))
    c = one("a_L(6n+1) \\equiv 0 \\pmod{6}", "%@define L = \\frac{1}{f_1^6}\n")
    assert c["verdict"] == "unproven" and c["terms_compared"] > 1000
    two = one("a_L(6n+1) \\equiv 0 \\pmod{2}", "%@define L = \\frac{1}{f_1^6}\n")
    assert two["verdict"] == "proved" and two["progression"]["unit"] is not None


def test_progressions_written_with_a_negative_residue() -> None:
    # p(5n - 1) = p(5(n-1) + 4) = 0 mod 5 for n >= 1 is Ramanujan's congruence (Hardy, Ramanujan,
    # Ch. VI); p(5n - 2) at n = 1 is p(3) = 3 (Andrews, Table 14.1), not 0 mod 5.
    from verifier import check_text

    report = check_text(
        "%@claim\n\\[ p(5n-1) \\equiv 0 \\pmod 5 \\quad (n \\ge 1) \\]\n"
        "%@claim\n\\[ p(5n-1) \\equiv 0 \\pmod 5 \\]\n"
        "%@claim\n\\[ p(5n-2) \\equiv 0 \\pmod 5 \\quad (n \\ge 1) \\]\n"
    )
    assert [c.verdict for c in report.claims] == ["proved", "proved", "refuted"]
    assert all("for all n >= 1" in c.outcome.message for c in report.claims[:2])
    witness = report.claims[2].outcome.first_difference
    assert witness is not None and witness["n"] == 1


# -- a target space beyond the budget -----------------------------------------------------

# Ramanujan's sum p(5n+4) q^n = 5 f_5^5/f_1^6 (Ramanujan 1919; Hardy, Ramanujan, Ch. VI), with
# F multiplied by f_1995^2 f_1985^2 = g(q^5), g = f_399^2 f_397^2: U_5 takes g(q^5) out as g(q), so
# sum a(5n+4) q^n = 5 f_5^5 f_399^2 f_397^2 / f_1^6 is true.  Its target level is beyond any budget.
HUGE_F = {1: -1, 1995: 2, 1985: 2}
HUGE_RHS = (Mono.make(Fraction(5), Fraction(0), {1: -6, 5: 5, 399: 2, 397: 2}),)


def test_a_target_space_beyond_the_budget_is_set_aside_before_its_cusps() -> None:
    # Regression: the cusps of a level near 10^12 were enumerated by a loop up to the level,
    # so the claim ran into the time budget instead of saying why it is not proved.
    out = decide(Claim("a(5n+4)", HUGE_F, 5, 4, HUGE_RHS))
    assert out.verdict == "unproven"
    assert "exceeds the budget" in out.message
    # brute force: the first coefficients agree (the claim is true)
    f = brute(HUGE_F, 5 * 40 + 5)
    assert [f[5 * n + 4] for n in range(40)] == brute_sum([(5, 0, {1: -6, 5: 5, 399: 2, 397: 2})], 40)


def test_an_unproven_identity_says_where_the_agreement_is_only_modulo_the_screening_prime() -> None:
    # Beyond the exact span the search compares the sides modulo 2^61 - 1 only; the message
    # must not call that range "holds", and terms_compared counts the exact values only.
    out = decide(Claim("a(5n+4)", HUGE_F, 5, 4, HUGE_RHS))
    message = out.message
    assert "(exact values)" in message and "agrees modulo the prime 2^61 - 1" in message
    assert "an agreement, not a proof" in message
    exact = int(message.split("holds for 0 <= n < ")[1].split(" ")[0])
    screened = int(message.split("for n < ")[1].split(" ")[0])
    assert exact == (20_000 - 4) // 5 + 1 and screened > exact  # the exact span: 20,000 coefficients of F
    assert out.terms_compared == exact


def test_a_false_variant_beyond_the_budget_is_refuted_at_its_first_failure() -> None:
    # The same true identity plus q^3000: the first failure is n = 3000, with the exact values.
    rhs = (*HUGE_RHS, Mono.make(Fraction(1), Fraction(3000), {}))
    out = decide(Claim("a(5n+4)", HUGE_F, 5, 4, rhs))
    assert out.verdict == "refuted"
    w = out.first_difference
    assert w is not None
    assert w["n"] == 3000
    assert Fraction(w["right"]) - Fraction(w["left"]) == 1

"""Notations read by the grammar (grammar/claim.lark, docs/method.md): residue sets after a
progression congruence, the overpartition function in its spellings, e(n tau) under the
author's definition e(x) := e^{2 pi i x}, and the half-period shift f(tau + 1/2).

Each notation is written in LaTeX and in Markdown house styles.  Every expected verdict is
justified by a published source named beside it and, in this file, by a brute-force
computation (school arithmetic on lists of integers, independent of qreferee).
"""

from __future__ import annotations

from typing import Any

import pytest
from tests import brute
from verifier.api import check_text
from verifier.parse import ast
from verifier.parse.grammar import ParseFailure, parse_definitions, parse_row

N = 60  # coefficients of the brute-force series

# -- an independent brute force ---------------------------------------------------------


def sigma(k: int, n: int) -> int:
    return sum(d**k for d in range(1, n + 1) if n % d == 0)


def minus_q(series: list[int]) -> list[int]:
    """f(-q) for f = sum a(n) q^n (integral exponents)."""
    return [(-1) ** n * a for n, a in enumerate(series)]


def claims(text: str, markdown: bool = False) -> list[dict[str, Any]]:
    return list(check_text(text, "paper.md" if markdown else "paper.tex", markdown=markdown).to_dict()["claims"])


def latex(body: str, before: str = "") -> str:
    return before + "%@claim\n\\begin{equation}\n  " + body + "\n\\end{equation}\n"


def markdown(body: str, before: str = "") -> str:
    return before + "<!-- @claim -->\n$$\n" + body + "\n$$\n"


STYLES = [(latex, False), (markdown, True)]


def one(body: str, style: Any, md: bool, before: str = "") -> dict[str, Any]:
    (c,) = claims(style(body, before), md)
    return c


# -- residue sets --------------------------------------------------------------------------


def eta_product(exps: dict[int, int], count: int = N) -> list[int]:
    """prod_delta prod_k (1 - q^{delta k})^{r_delta} to ``count`` terms (tests/brute.py)."""
    return brute.eta_product(exps, count)


P = eta_product({1: -1})  # sum p(n) q^n = 1 / prod (1 - q^n) (Euler)

RESIDUE_SPELLINGS = [
    "\\quad (t \\in \\{{{}\\}})",
    "\\quad (\\text{{for }} t \\in \\{{{}\\}})",
    "\\text{{for }} t \\in \\{{{}\\}}",
    "\\text{{ for all }} t \\in \\{{{}\\}}",
    ", t \\in \\{{{}\\}}",
    "\\quad for t \\in \\{{{}\\}}",
]


def test_the_brute_force_partitions() -> None:
    # p(0..7) = 1, 1, 2, 3, 5, 7, 11, 15 (Abramowitz-Stegun, Handbook, Table 24.5).
    assert P[:8] == [1, 1, 2, 3, 5, 7, 11, 15]


@pytest.mark.parametrize("spelling", RESIDUE_SPELLINGS)
@pytest.mark.parametrize(("style", "md"), STYLES)
def test_residue_sets_in_every_spelling(spelling: str, style: Any, md: bool) -> None:
    # p(5n+4) = 0 mod 5 (Ramanujan 1919), so also p(5n+9) = p(5(n+1)+4); brute force first.
    assert all(P[5 * n + t] % 5 == 0 for t in (4, 9) for n in range(10))
    c = one("p(5n+t) \\equiv 0 \\pmod{5} " + spelling.format("4, 9"), style, md)
    assert c["verdict"] == "proved", c["message"]
    assert c["progression"]["residues"] == [4, 9]
    # A false neighbour: p(5n+8) is not always divisible by 5 (p(8) = 22, brute force).
    assert P[8] == 22
    wrong = one("p(5n+t) \\equiv 0 \\pmod{5} " + spelling.format("4, 8"), style, md)
    assert wrong["verdict"] == "refuted"
    assert (wrong["first_difference"]["n"], int(wrong["first_difference"]["left"])) == (0, 22)


def test_residue_set_is_a_qualifier_of_the_row() -> None:
    row = parse_row("p(5n+t) \\equiv 0 \\pmod{5} \\quad (t \\in \\{4, 9, 4\\})")
    assert not isinstance(row, ParseFailure)
    (statement,) = row.statements
    assert statement.modulus == 5 and statement.residues == ("t", (4, 9))  # repeats dropped, order kept
    # A bracket that is no residue set is still a product by (...).
    product = parse_row("f = g (t)")
    assert not isinstance(product, ParseFailure) and product.statements[0].residues is None


# -- the overpartition function -------------------------------------------------------------

PBAR = eta_product({2: 1, 1: -2})  # sum pbar(n) q^n = prod (1+q^n)/(1-q^n) = f_2 / f_1^2


@pytest.mark.parametrize("name", ["\\overline{p}", "\\overline{ p }", "\\bar{p}", "\\bar p"])
@pytest.mark.parametrize(("style", "md"), STYLES)
def test_overpartition_spellings(name: str, style: Any, md: bool) -> None:
    # pbar(0..4) = 1, 2, 4, 8, 14 (Corteel-Lovejoy, Overpartitions, Trans. AMS 356 (2004), from memory).
    assert PBAR[:5] == [1, 2, 4, 8, 14]
    # pbar(4n+3) = 0 mod 8 (Hirschhorn-Sellers 2005, from memory); brute force first.
    assert all(PBAR[4 * n + 3] % 8 == 0 for n in range(14))
    c = one(f"{name}(4n+3) \\equiv 0 \\pmod{{8}}", style, md)
    assert c["verdict"] == "proved", c["message"]
    # Not mod 16: pbar(3) = 8 (brute force above).
    wrong = one(f"{name}(4n+3) \\equiv 0 \\pmod{{16}}", style, md)
    assert wrong["verdict"] == "refuted"
    assert (wrong["first_difference"]["n"], int(wrong["first_difference"]["left"])) == (0, 8)


def test_overline_of_another_letter_is_no_overpartition() -> None:
    row = parse_row("\\overline{p}(n) = \\overline{q}")
    assert not isinstance(row, ParseFailure)
    left, right = row.statements[0].relation.sides  # type: ignore[union-attr]
    assert isinstance(left, ast.Call) and left.name == ast.PBAR
    assert not any(isinstance(n, ast.Name) and n.text == ast.PBAR for n in ast.walk(right))


def test_subscripted_names_come_from_the_name_token() -> None:
    assert ast.subscript("f_{12}") == ("f", "12") and ast.integer_subscript("f_{ 12 }", "f") == 12
    assert ast.integer_subscript("\\eta_3", "\\eta") == 3 and ast.integer_subscript("b_k", "b") is None
    assert ast.subscript("a_{\\Delta}") == ("a", "\\Delta") and ast.subscript("E") is None


# -- e(n tau) under the author's definition ----------------------------------------------------

E4 = [1] + [240 * sigma(3, n) for n in range(1, N)]  # Serre, A Course in Arithmetic, VII.4.2
DELTA = [0, *eta_product({1: 24}, N - 1)]  # Delta = q prod (1 - q^n)^24 (Jacobi)

E_DEFINITIONS = [
    ("\\[ \\mathbf{e}(x) := e^{2\\pi i x}. \\]\n", False),
    ("Let $\\mathbf{e}(x) := \\exp(2\\pi i x)$ throughout.\n\n", False),
    ("We write $\\mathbf{e}(x) := e^{2 \\pi i x}$.\n\n", True),
    ("$$\\mathbf{e}(x) := e^{2\\pi i\\, x}$$\n\n", True),
]


def test_the_brute_force_forms() -> None:
    # tau(1..4) = 1, -24, 252, -1472 (Ramanujan 1916; Serre, VII.4.5) and E_4 = 1 + 240 q + 2160 q^2.
    assert DELTA[1:5] == [1, -24, 252, -1472] and E4[:3] == [1, 240, 2160]
    # E_4^3 - E_6^2 = 1728 Delta (Serre VII.4.4), here on the first coefficients.
    e6 = [1] + [-504 * sigma(5, n) for n in range(1, 8)]
    cube = [sum(E4[i] * E4[j] * E4[n - i - j] for i in range(n + 1) for j in range(n + 1 - i)) for n in range(8)]
    square = [sum(e6[i] * e6[n - i] for i in range(n + 1)) for n in range(8)]
    assert [a - b for a, b in zip(cube, square, strict=True)] == [1728 * d for d in DELTA[:8]]


@pytest.mark.parametrize(("definition", "md"), E_DEFINITIONS)
def test_e_of_n_tau_under_a_definition(definition: str, md: bool) -> None:
    style = markdown if md else latex
    sums = one("E_4(\\tau) = 1 + 240\\sum_{n\\ge1}\\sigma_3(n)\\mathbf{e}(n\\tau)", style, md, definition)
    assert sums["verdict"] == "proved", sums["message"]
    printed = " ".join(f"{c:+d}\\mathbf{{e}}({k}\\tau)" for k, c in enumerate(DELTA[1:4], 1))
    c = one(f"\\Delta(\\tau) = {printed} + O(\\mathbf{{e}}(4\\tau))", style, md, definition)
    assert c["verdict"] == "proved", c["message"]
    # 480 instead of 240: E_4 has 240 sigma_3(1) = 240 at q^1 (brute force above).
    wrong = one("E_4(\\tau) = 1 + 480\\sum_{n\\ge1}\\sigma_3(n)\\mathbf{e}(n\\tau)", style, md, definition)
    assert wrong["verdict"] == "refuted"
    assert wrong["first_difference"]["n"] == 1 and int(wrong["first_difference"]["left"]) == E4[1]


@pytest.mark.parametrize(("style", "md"), STYLES)
def test_e_of_n_tau_without_a_definition_asks_for_one(style: Any, md: bool) -> None:
    c = one("E_4(\\tau) = 1 + 240\\sum_{n\\ge1}\\sigma_3(n)\\mathbf{e}(n\\tau)", style, md)
    assert c["verdict"] == "error" and c["code"] == "unknown-symbol"
    assert "e^{2\\pi i x}" in c["hint"]


def test_e_away_from_a_multiple_of_tau_is_unsupported() -> None:
    c = one("E_4 = 1 + 240\\sum_{n\\ge1}\\sigma_3(n)\\mathbf{e}(n/2)", latex, False, E_DEFINITIONS[0][0])
    assert c["verdict"] == "error" and c["code"] == "unsupported-notation"


def test_only_the_exponential_is_an_exponential_definition() -> None:
    good = parse_definitions("e(x) = e^{2\\pi i x}")
    other = parse_definitions("e(x) = e^{\\pi i x}")
    assert not isinstance(good, ParseFailure) and good[0].exponential and good[0].arg == "x"
    assert not isinstance(other, ParseFailure) and not other[0].exponential


# -- the half-period shift f(tau + 1/2): q -> -q -------------------------------------------------

THETA = [0] * N  # theta(tau) = sum_{n in Z} q^{n^2}
for _k in range(-8, 9):
    if _k * _k < N:
        THETA[_k * _k] += 1

SHIFTS = ["(\\tau+1/2)", "(\\tau + \\frac{1}{2})", "(\\tau+\\tfrac12)", "(z+1/2)"]


def test_the_brute_force_half_shift() -> None:
    # theta(tau + 1/2) = theta(-q) = eta(tau)^2 / eta(2 tau) (DLMF 20.7.26 with q = e^{pi i tau}
    # there: theta_3(z | tau + 1) = theta_4(z | tau); Gauss's product for theta_4).
    assert minus_q(THETA) == eta_product({1: 2, 2: -1})


@pytest.mark.parametrize("shift", SHIFTS)
@pytest.mark.parametrize(("style", "md"), STYLES)
def test_theta_at_the_half_shift(shift: str, style: Any, md: bool) -> None:
    assert one(f"\\theta{shift} = \\frac{{\\eta(\\tau)^2}}{{\\eta(2\\tau)}}", style, md)["verdict"] == "proved"
    assert one(f"\\theta{shift} = \\theta_4(\\tau)", style, md)["verdict"] == "proved"
    # theta(-q) != theta(q): the coefficients of q^1 are -2 and 2 (brute force above).
    wrong = one(f"\\theta{shift} = \\theta(\\tau)", style, md)
    assert wrong["verdict"] == "refuted"
    assert (wrong["first_difference"]["n"], int(wrong["first_difference"]["left"])) == (1, minus_q(THETA)[1])


@pytest.mark.parametrize(("style", "md"), STYLES)
def test_eisenstein_and_delta_at_the_half_shift(style: Any, md: bool) -> None:
    shifted = minus_q(E4)
    printed = " ".join(f"{c:+d}q^{{{k}}}" for k, c in enumerate(shifted[1:6], 1))
    assert one(f"E_4(\\tau+1/2) = 1 {printed} + O(q^{{6}})", style, md)["verdict"] == "proved"
    # E_4(-q) = -E_4(q) + 18 E_4(q^2) - 16 E_4(q^4) (from sigma_3(2n) = 9 sigma_3(n) - 8 sigma_3(n/2),
    # multiplicativity of sigma_3); checked here by brute force.
    rhs = [-E4[n] + (18 * E4[n // 2] if n % 2 == 0 else 0) - (16 * E4[n // 4] if n % 4 == 0 else 0) for n in range(N)]
    assert rhs == shifted
    c = one("E_4(\\tau+1/2) = -E_4(\\tau) + 18E_4(2\\tau) - 16E_4(4\\tau)", style, md)
    assert c["verdict"] == "proved", c["message"]
    wrong = one("E_4(\\tau+1/2) = E_4(\\tau)", style, md)
    assert wrong["verdict"] == "refuted" and wrong["first_difference"]["n"] == 1
    delta = minus_q(DELTA)
    printed = " ".join(f"{c:+d}q^{{{k}}}" for k, c in enumerate(delta[1:5], 1))
    assert one(f"\\Delta(\\tau+1/2) = {printed} + O(q^{{5}})", style, md)["verdict"] == "proved"
    assert one("\\Delta(\\tau+1/2) = \\Delta(\\tau)", style, md)["verdict"] == "refuted"


@pytest.mark.parametrize(
    "name",
    [
        "\\eta",  # q^{1/24}: eta(tau + 1/2) picks up e^{pi i/24}
        "\\theta_2",  # q^{1/4}
        "j",  # no shift rule for a quotient read as a name
    ],
)
@pytest.mark.parametrize(("style", "md"), STYLES)
def test_half_shift_of_other_forms_is_unsupported_notation(name: str, style: Any, md: bool) -> None:
    c = one(f"{name}(\\tau+1/2) = {name}(\\tau)", style, md)
    assert c["verdict"] == "error" and c["code"] == "unsupported-notation"
    assert "(\\tau+1/2)" in c["message"] and "\\theta(\\tau+1/2)" in c["hint"]


# -- divisor sums with a divisibility condition ------------------------------------------------


def r4(n: int) -> int:
    """Representations of n as an ordered sum of four squares of integers, counted directly."""
    roots = [x for x in range(-8, 9) if x * x <= n]
    return sum(1 for a in roots for b in roots for c in roots for d in roots if a * a + b * b + c * c + d * d == n)


CONDITIONS = ["4\\nmid d", "4 \\not\\mid d", "4\\not| d"]


@pytest.mark.parametrize("condition", CONDITIONS)
@pytest.mark.parametrize(("style", "md"), STYLES)
def test_divisor_sum_with_a_non_divisibility_condition(condition: str, style: Any, md: bool) -> None:
    # Jacobi's four-square theorem: r_4(n) = 8 sum_{d | n, 4 not dividing d} d (Grosswald, Representations
    # of Integers as Sums of Squares, Ch. 9); checked here by counting.
    assert all(r4(n) == 8 * sum(d for d in range(1, n + 1) if n % d == 0 and d % 4) for n in range(1, 30))
    body = f"\\theta^4 = 1 + 8\\sum_{{n\\ge1}}\\Bigl(\\sum_{{d\\mid n,\\ {condition}}} d\\Bigr)q^n"
    assert one(body, style, md)["verdict"] == "proved"
    # 3 in place of 4: r_4(3) = 32, but 8 * (sum of the divisors of 3 not divisible by 3) = 8.
    assert r4(3) == 32
    wrong = one(body.replace(condition, condition.replace("4", "3", 1)), style, md)
    assert wrong["verdict"] == "refuted" and wrong["first_difference"]["n"] == 3


@pytest.mark.parametrize(("style", "md"), STYLES)
def test_divisor_sum_over_multiples(style: Any, md: bool) -> None:
    # sum_{d | n, 4 | d} d = 4 sigma(n/4) (d = 4e with e | n/4; common practice), checked by counting.
    def sigma_frac(n: int, m: int) -> int:
        return sigma(1, n // m) if n % m == 0 else 0

    assert all(
        sum(d for d in range(1, n + 1) if n % d == 0 and d % 4 == 0) == 4 * sigma_frac(n, 4) for n in range(1, 50)
    )
    assert one("\\sum_{d\\mid n,\\ 4 \\mid d} d = 4\\sigma(n/4) \\quad (n \\ge 1)", style, md)["verdict"] == "proved"
    wrong = one("\\sum_{d\\mid n,\\ 4 \\mid d} d = 2\\sigma(n/4) \\quad (n \\ge 1)", style, md)
    assert wrong["verdict"] == "refuted" and wrong["first_difference"]["n"] == 4
    # 2 is the parity condition: d | n with 2 not dividing d is d odd.
    row = parse_row("\\sum_{d\\mid n, 2\\nmid d} d = 1")
    assert not isinstance(row, ParseFailure)
    total = row.statements[0].relation.sides[0]  # type: ignore[union-attr]
    assert isinstance(total, ast.BigSum) and (total.kind, total.parity) == ("divides_parity", "odd")


# -- e^{2 pi i n^2 z}: a power of the summation variable in the exponent ---------------------


@pytest.mark.parametrize(
    "summand",
    ["e^{2\\pi i n^2 z}", "\\exp(2\\pi i n^2\\tau)", "\\mathbf{e}(n^2\\tau)"],
)
@pytest.mark.parametrize(("style", "md"), STYLES)
def test_theta_as_a_sum_of_exponentials(summand: str, style: Any, md: bool) -> None:
    # theta = sum_{n in Z} q^{n^2} (the definition; Whittaker-Watson Ch. XXI), THETA above by brute force.
    definition = E_DEFINITIONS[0][0] if "mathbf" in summand else ""
    c = one(f"\\theta(\\tau) = \\sum_{{n\\in\\mathbb Z}} {summand}", style, md, definition)
    assert c["verdict"] == "proved", c["message"]
    # theta^2 has r_2(1) = 4 at q^1, the sum 2 (brute force: THETA squared).
    square = [sum(THETA[i] * THETA[n - i] for i in range(n + 1)) for n in range(4)]
    assert (square[1], THETA[1]) == (4, 2)
    wrong = one(f"\\theta(\\tau)^2 = \\sum_{{n\\in\\mathbb Z}} {summand}", style, md, definition)
    assert wrong["verdict"] == "refuted" and wrong["first_difference"]["n"] == 1


def test_sums_over_n_greater_than_a_and_over_the_natural_numbers() -> None:
    # E_4 = 1 + 240 sum_{n>0} sigma_3(n) q^n (Serre, A Course in Arithmetic, Ch. VII, §4.2): "n > 0" is
    # n >= 1. Whether the natural numbers contain 0 differs between authors, so \mathbb N is refused.
    from verifier import check_text

    report = check_text(
        "%@claim\n\\[ E_4 = 1 + 240\\sum_{n>0}\\sigma_3(n)q^n \\]\n"
        "%@claim\n\\[ E_4 = 1 + 24\\sum_{n>0}\\sigma_3(n)q^n \\]\n"
        "%@claim\n\\[ E_4 = 1 + 240\\sum_{n\\in\\mathbb N}\\sigma_3(n)q^n \\]\n"
    )
    got = [(c.verdict, c.outcome.code) for c in report.claims]
    assert got == [("proved", None), ("refuted", None), ("error", "ambiguous-notation")]
    witness = report.claims[1].outcome.first_difference
    assert witness is not None and (witness["n"], witness["left"], witness["right"]) == (1, "240", "24")

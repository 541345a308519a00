"""Definitions where authors make them (docs/method.md#author-definitions), in several house styles.

Mathematics, each checked here against sympy rather than the engine:
- E_4^2 = E_8, E_4 E_6 = E_10, 1728 Delta = E_4^3 - E_6^2 (Serre, *A Course in Arithmetic*, Ch. VII §4);
- Delta = eta^24 (Jacobi's product, Serre Ch. VII §4.4; Apostol, *Modular Functions and Dirichlet
  Series*, Ch. 3), compared below with the product q prod (1 - q^n)^24 expanded by sympy;
- E_2 = 1 - 24 sum sigma_1(n) q^n (Zagier, *1-2-3 of modular forms*, §2.3).
"""

from __future__ import annotations

from fractions import Fraction

import pytest
import sympy
from verifier import check_text

N = 6
q = sympy.Symbol("q")


def _eis(c: int, k: int) -> list[Fraction]:
    return [Fraction(1)] + [Fraction(c * int(sympy.divisor_sigma(n, k))) for n in range(1, N)]


def _mul(a: list[Fraction], b: list[Fraction]) -> list[Fraction]:
    return [sum((a[i] * b[n - i] for i in range(n + 1)), Fraction(0)) for n in range(N)]


E4, E6 = _eis(240, 3), _eis(-504, 5)
# Delta from the product q prod (1 - q^n)^24 (sympy series).
_prod = sympy.expand(q * sympy.prod([(1 - q**n) ** 24 for n in range(1, N)]))
DELTA = [Fraction(int(_prod.coeff(q, n))) for n in range(N)]


def test_the_model() -> None:
    # 1728 Delta = E_4^3 - E_6^2 (Serre Ch. VII §4.4) and tau(2) = -24 (Ramanujan 1916).
    lhs = [1728 * d for d in DELTA]
    rhs = [a - b for a, b in zip(_mul(_mul(E4, E4), E4), _mul(E6, E6), strict=True)]
    assert lhs == rhs and DELTA[2] == -24


def _run(text: str, markdown: bool = False) -> list[tuple[str, str]]:
    return [(c.verdict, c.reading) for c in check_text(text, markdown=markdown).claims]


STYLES = [
    # A paper that defines with := in a display, then claims.
    ("\\[ F := E_4 E_6 \\]\n%@claim\n\\[ F = E_{10} \\]\n", False, 1),
    # \coloneqq in an align with two definitions in one row.
    (
        "\\begin{align*} F &\\coloneqq E_4 E_6, & G(\\tau) &\\coloneqq E_4(\\tau)^2 \\end{align*}\n"
        "%@claim\n\\[ F = E_{10} ,\\quad G = E_8 \\]\n",
        False,
        2,
    ),
    # Inline, \overset{\mathrm{def}}{=}, with a macro of the author's.
    (
        "\\newcommand{\\Eis}[1]{E_{#1}}\nPut $F \\overset{\\mathrm{def}}{=} \\Eis{4}\\Eis{6}$ and "
        "$G(z) \\stackrel{\\text{def}}{=} \\Eis{4}(z)^2$.\n%@claim\n\\[ F = E_{10} \\qquad G = E_8 \\]\n",
        False,
        2,
    ),
    # Prose: 'where $H = ...$'.
    ("We use $F$, where $F = E_4 E_6$, and let $G = E_4^2$.\n%@claim\n\\[ F = E_{10}; G = E_8 \\]\n", False, 2),
    # Markdown notes with MathJax.
    ("Define $F := E_4 E_6$ and set $G = E_4^2$.\n\n<!-- @claim -->\n$$ F = E_{10}, \\quad G = E_8 $$\n", True, 2),
    # A tagged display that defines and then claims, in one row.
    ("%@claim\n\\[ F := E_4 E_6 ,\\quad F = E_{10}, \\quad G := E_4^2, \\quad G = E_8 \\]\n", False, 2),
]


@pytest.mark.parametrize(("text", "markdown", "claims"), STYLES)
def test_definitions_in_house_styles(text: str, markdown: bool, claims: int) -> None:
    assert [v for v, _ in _run(text, markdown)] == ["proved"] * claims


def test_false_claims_about_an_author_defined_name_are_refuted() -> None:
    report = check_text("\\[ F := E_4 E_6 \\]\n%@claim\n\\[ F = -E_{10} \\]\n")
    (c,) = report.claims
    assert c.verdict == "refuted"
    w = c.outcome.first_difference
    assert w is not None and (w["n"], Fraction(w["left"]), Fraction(w["right"])) == (0, _mul(E4, E6)[0], -1)


def test_a_definition_of_a_known_name_is_checked() -> None:
    text = "Recall $\\Delta(\\tau) := \\eta(\\tau)^{24}$.\n%@claim\n\\[ 1728\\Delta = E_4^3 - E_6^2 \\]\n"
    (definition, claim) = check_text(text).claims
    assert definition.verdict == "proved" and "definition" in definition.note
    assert claim.verdict == "proved"
    assert "as the author defines it" in claim.reading


def test_a_different_meaning_is_refuted_and_then_used() -> None:
    # The author's Delta is half of the usual one: the definition is refuted, and later claims
    # are read with the author's meaning (and say so).
    text = (
        "Let $\\Delta := \\frac{1}{2}\\eta(\\tau)^{24}$.\n"
        "%@claim\n\\[ 2\\Delta = \\eta(\\tau)^{24} \\]\n"
        "%@claim\n\\[ 1728\\Delta = E_4^3 - E_6^2 \\]\n"
    )
    definition, doubled, classical = check_text(text).claims
    assert definition.verdict == "refuted"
    w = definition.outcome.first_difference
    assert w is not None and (w["n"], Fraction(w["left"]), Fraction(w["right"])) == (1, DELTA[1], DELTA[1] / 2)
    assert doubled.verdict == "proved" and "author" in doubled.reading
    assert classical.verdict == "refuted"
    w = classical.outcome.first_difference
    assert w is not None and w["n"] == 1
    assert Fraction(w["left"]) == 1728 * DELTA[1] / 2
    assert Fraction(w["right"]) == _mul(_mul(E4, E4), E4)[1] - _mul(E6, E6)[1]


def test_e2_defined_by_its_expansion() -> None:
    good = "Here $E_2(\\tau) := 1 - 24\\sum_{n\\ge1}\\sigma_1(n)q^n$.\n"
    (c,) = check_text(good).claims
    assert c.verdict == "proved"
    bad = "Here $E_2(\\tau) := 1 + 24\\sum_{n\\ge1}\\sigma_1(n)q^n$.\n"
    (c,) = check_text(bad).claims
    assert c.verdict == "refuted"
    w = c.outcome.first_difference
    # coefficient of q: -24 sigma_1(1) in the usual E_2, +24 in the author's (Zagier §2.3)
    assert w is not None and (w["n"], Fraction(w["left"]), Fraction(w["right"])) == (1, -24, 24)


def test_an_unread_definition_makes_the_name_an_error_with_its_place() -> None:
    text = "\\[ \\Theta := \\int_0^1 f \\]\n%@claim\n\\[ \\Theta = E_4 \\]\n"
    (c,) = check_text(text).claims
    assert c.verdict == "error" and c.outcome.code == "unknown-symbol"
    assert "<text>:1:" in c.outcome.message and "%@define" in c.outcome.hint


def test_an_unread_definition_of_a_known_name_never_falls_back_to_the_usual_meaning() -> None:
    text = "\\[ E_4 := \\int_0^1 g \\]\n%@claim\n\\[ E_4^2 = E_8 \\]\n"
    definition, claim = check_text(text).claims
    # The definition is a claim about E_4 that cannot be read; the later claim does not fall
    # back to the usual E_4, and names the place of the definition.
    assert definition.verdict == "error" and claim.verdict == "error"
    assert "<text>:1:" in claim.outcome.message


def test_a_mention_is_not_a_definition_but_the_hint_names_it() -> None:
    text = "Note that $H = E_4^2$ in this case.\n%@claim\n\\[ H = E_8 \\]\n"
    (c,) = check_text(text).claims
    assert c.verdict == "error" and c.outcome.code == "unknown-symbol"
    assert "%@define H" in c.outcome.hint and "<text>:1:" in c.outcome.hint


def test_indices_and_the_nome_are_not_definitions() -> None:
    text = (
        "where $q = e^{2\\pi i\\tau}$ and let $j = 1$.\n"
        "%@claim\n\\[ j = \\frac{E_4^3}{\\Delta} \\]\n%@claim\n\\[ E_4 = 1 + 240q + \\cdots \\]\n"
    )
    assert [v for v, _ in _run(text)] == ["proved", "proved"]


def test_a_definition_holds_from_its_place_on() -> None:
    text = "%@claim\n\\[ F = E_{10} \\]\nSet $F := E_4 E_6$.\n%@claim\n\\[ F = E_{10} \\]\n"
    assert [v for v, _ in _run(text)] == ["error", "proved"]


def test_a_definition_that_starts_a_chain_keeps_the_chain_as_claims() -> None:
    # F := E_4^2 = E_8 = 1 + 480q + ...: the definition of F and two claims about E_4^2
    # (E_4^2 = E_8 and E_8 = 1 + 480q + 61920q^2 + ...: Serre, A Course in Arithmetic, ch. VII,
    # §4.2).  G := E_4 E_6 = E_12 is false: E_4 E_6 = E_10 has another weight.
    text = (
        "%@claim\n\\[ F := E_4^2 = E_8 = 1 + 480q + \\cdots \\]\n"
        "%@claim\n\\[ G := E_4E_6 = E_{12} \\]\n"
        "%@claim\n\\[ F = E_8 \\]\n"
    )
    report = check_text(text)
    assert [(c.location.line, c.verdict) for c in report.claims] == [
        (2, "proved"),
        (2, "proved"),
        (4, "refuted"),
        (6, "proved"),
    ]

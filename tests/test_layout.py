"""The layout of a display (docs/method.md#layout): several statements in one row, equivalences,
qualifiers, and the environments authors put claims in, in several house styles.

Mathematics: E_4^2 = E_8 and E_4 E_6 = E_10 because dim M_8 = dim M_10 = 1 on SL2(Z) (Serre,
*A Course in Arithmetic*, Ch. VII §3.2 and §4.2).  The coefficients of the false variants are
computed here from ``sympy.divisor_sigma`` (E_k = 1 - (2k/B_k) sum sigma_{k-1}(n) q^n, Serre
Ch. VII §4.2), never by the engine.
"""

from __future__ import annotations

from fractions import Fraction

import pytest
import sympy
from verifier import check_text
from verifier.parse import ast
from verifier.parse.grammar import parse_row

N = 6


def _eis(k: int) -> list[Fraction]:
    c = Fraction(-2 * k) / Fraction(str(sympy.bernoulli(k)))
    return [Fraction(1)] + [c * int(sympy.divisor_sigma(n, k - 1)) for n in range(1, N)]


def _mul(a: list[Fraction], b: list[Fraction]) -> list[Fraction]:
    return [sum((a[i] * b[n - i] for i in range(n + 1)), Fraction(0)) for n in range(N)]


E4, E6, E8, E10 = _eis(4), _eis(6), _eis(8), _eis(10)


def test_the_model() -> None:
    # E_4 = 1 + 240 q + 2160 q^2 + ... (Serre Ch. VII §4.2) and the two identities of dimension one.
    assert E4[:3] == [1, 240, 2160]
    assert _mul(E4, E4) == E8 and _mul(E4, E6) == E10


def _verdicts(text: str, markdown: bool = False) -> list[tuple[str, str]]:
    report = check_text(text, markdown=markdown)
    return [(c.verdict, " ".join(c.reading.split())) for c in report.claims]


TRUE_PAIR = [("proved", "E_4^2 = E_8"), ("proved", "E_4 E_6 = E_{10}")]

# One row, two statements: every separator authors use (LaTeX house styles).
ROWS = [
    r"E_4^2 = E_8 ,\quad E_4 E_6 = E_{10}",
    r"E_4^2 = E_8 \qquad E_4 E_6 = E_{10}",
    r"E_4^2 = E_8 \quad E_4 E_6 = E_{10}",
    r"E_4^2 = E_8; \; E_4 E_6 = E_{10}",
    r"E_4^2 = E_8 \quad\text{and}\quad E_4 E_6 = E_{10}",
    r"E_4^2 = E_8, \text{ and } E_4 E_6 = E_{10}.",
    r"E_4^2 = E_8, E_4 E_6 = E_{10}",
    r"E_4^2 = E_8 \mbox{and} E_4 E_6 = E_{10}",
]


@pytest.mark.parametrize("row", ROWS)
def test_separators_make_separate_claims(row: str) -> None:
    assert _verdicts(f"%@claim\n\\[ {row} \\]\n") == TRUE_PAIR


def test_a_false_statement_next_to_a_true_one_is_refuted_alone() -> None:
    report = check_text("%@claim\n\\[ E_4^2 = E_8 ,\\qquad E_4 E_6 = 2E_{10} \\]\n")
    first, second = report.claims
    assert first.verdict == "proved"
    assert second.verdict == "refuted"
    w = second.outcome.first_difference
    assert w is not None and w["n"] == 0
    assert (Fraction(w["left"]), Fraction(w["right"])) == (_mul(E4, E6)[0], 2 * E10[0])


def test_equivalence_checks_both_equations_and_says_so() -> None:
    report = check_text("%@claim\n\\[ E_4^2 = E_8 \\iff E_4 E_6 = E_{10} \\]\n")
    assert [c.verdict for c in report.claims] == ["proved", "proved"]
    assert all(c.note and "equivalence" in c.outcome.message for c in report.claims)
    report = check_text("%@claim\n\\[ E_4^2 = 3E_8 \\Longleftrightarrow E_4 E_6 = E_{10} \\]\n")
    assert [c.verdict for c in report.claims] == ["refuted", "proved"]


def test_quad_as_spacing_is_not_a_separator() -> None:
    # \quad next to an operator or at an edge of the row only spaces the formula.
    text = "%@claim\n\\begin{align}\nE_4 &= 1 + 240q + 2160q^2 \\\\\n&\\quad + 6720q^3 + \\cdots\n\\end{align}\n"
    (c,) = check_text(text).claims
    assert c.verdict == "proved"
    # 6720 = 240 sigma_3(3) = 240 * 28 (sympy)
    assert 240 * int(sympy.divisor_sigma(3, 3)) == 6720


QUALIFIED = [
    (r"\sigma_3(n) = \sigma_3(n) \quad (n \ge 1)", ("n", 1), None),
    (r"\sigma_3(n) = \sigma_3(n), \quad n \geq 2", ("n", 2), None),
    (r"\sigma_3(n) = \sigma_3(n) \qquad \text{for all } n \geqslant 0", ("n", 0), None),
    (r"\sigma_3(n) \equiv \sigma_1(n) \pmod{2}", None, 2),
    (r"\sigma_3(n) \equiv \sigma_1(n) \pmod 2", None, 2),
    (r"\sigma_3(n) \equiv \sigma_1(n) \; (\bmod 2)", None, 2),
    (r"\sigma_3(n) \equiv \sigma_1(n) \; (\mathrm{mod}\ 2)", None, 2),
    (r"\sigma_3(n) \equiv \sigma_1(n) \pmod{2} \quad (n \ge 1)", ("n", 1), 2),
    # A modulus written as a product of prime powers is evaluated exactly.
    (r"\tau(n) \equiv \sigma_{11}(n) \pmod{691^2}", None, 691**2),
    (r"\tau(n) \equiv \sigma_{11}(n) \pmod{2^{11}}", None, 2**11),
    (r"\tau(n) \equiv \sigma_{11}(n) \; (\bmod{2^8 \cdot 3})", None, 2**8 * 3),
    (r"\tau(n) \equiv \sigma_{11}(n) \pmod{2^{3} \times 3^2}", None, 72),
    (r"\tau(n) \equiv \sigma_{11}(n) \pmod{10^{60}}", None, -1),  # too large: an error, never a verdict
]


@pytest.mark.parametrize(("row", "start", "modulus"), QUALIFIED)
def test_qualifiers_are_grammar(row: str, start: tuple[str, int] | None, modulus: int | None) -> None:
    # The scanner removes '\ ' and '\;' (spacing) before the grammar sees the row.
    parsed = parse_row(row.replace("\\ ", " ").replace("\\;", " "))
    assert isinstance(parsed, ast.Row)
    (statement,) = parsed.statements
    assert (statement.start, statement.modulus) == (start, modulus)


def test_a_trailing_modulus_covers_every_congruence_of_the_row_but_no_equation() -> None:
    parsed = parse_row(r"a(n) \equiv b(n), \quad c(n) = d(n), \quad e(n) \equiv f(n) \pmod 7")
    assert isinstance(parsed, ast.Row)
    assert [s.modulus for s in parsed.statements] == [7, None, 7]


def test_a_comma_inside_a_bracket_is_the_brackets() -> None:
    parsed = parse_row(r"[E_4, E_6]_1 = -2\cdot 5040\Delta, \quad E_4^2 = E_8")
    assert isinstance(parsed, ast.Row) and len(parsed.statements) == 2


def test_a_congruence_in_a_row_is_decided() -> None:
    # sigma_3(n) - sigma_1(n) = sum_{d | n} d(d-1)(d+1) and d(d-1)(d+1) is divisible by 6
    # (common practice), so sigma_3 = sigma_1 mod 6 for all n >= 1; checked here with sympy too.
    assert all((sympy.divisor_sigma(n, 3) - sympy.divisor_sigma(n, 1)) % 6 == 0 for n in range(1, 200))
    text = "%@claim\n\\[ \\sigma_3(n) \\equiv \\sigma_1(n) \\pmod{6} \\quad (n \\ge 1) ,\\qquad E_4^2 = E_8 \\]\n"
    report = check_text(text)
    assert [c.outcome.kind for c in report.claims] == ["congruence", "equality"]
    assert report.claims[0].verdict != "refuted" and report.claims[1].verdict == "proved"


ENVIRONMENTS = [
    # MathJax style: numbered environments inside $$...$$ (Markdown notes).
    ("$$\\begin{align} E_4^2 &= E_8 \\\\ E_4 E_6 &= E_{10} \\end{align}$$", True),
    ("$$\n\\begin{align*}\nE_4^2 &= E_8 & E_4 E_6 &= E_{10}\n\\end{align*}\n$$", True),
    ("$$\\begin{gather} E_4^2 = E_8 \\\\ E_4 E_6 = E_{10} \\end{gather}$$", True),
    ("$$\\begin{eqnarray} E_4^2 &=& E_8 \\\\ E_4 E_6 &=& E_{10} \\end{eqnarray}$$", True),
    ("$$\\begin{aligned} E_4^2 &= E_8, & E_4 E_6 &= E_{10} \\end{aligned}$$", True),
    ("$$\\begin{gathered} E_4^2 = E_8 \\\\ E_4 E_6 = E_{10} \\end{gathered}$$", True),
    # LaTeX environments.
    ("\\begin{alignat}{2} E_4^2 &= E_8 &\\qquad E_4 E_6 &= E_{10} \\end{alignat}", False),
    ("\\begin{alignat*}{2} E_4^2 &= E_8 \\\\ E_4 E_6 &= E_{10} \\end{alignat*}", False),
    ("\\begin{flalign} E_4^2 &= E_8 & E_4 E_6 &= E_{10} \\end{flalign}", False),
    ("\\begin{eqnarray*} E_4^2 &=& E_8 \\nonumber \\\\ E_4 E_6 &=& E_{10} \\end{eqnarray*}", False),
    (
        "\\begin{subequations}\\label{pair}\n\\begin{align}\nE_4^2 &= E_8 \\\\\nE_4 E_6 &= E_{10}\n"
        "\\end{align}\n\\end{subequations}",
        False,
    ),
    ("\\[ \\begin{cases} E_4^2 = E_8 \\\\ E_4 E_6 = E_{10} \\end{cases} \\]", False),
]


@pytest.mark.parametrize(("display", "markdown"), ENVIRONMENTS)
def test_environments(display: str, markdown: bool) -> None:
    tag = "<!-- @claim -->\n" if markdown else "%@claim\n"
    assert _verdicts(tag + display + "\n", markdown=markdown) == TRUE_PAIR


def test_a_false_row_in_an_environment_is_refuted() -> None:
    text = "<!-- @claim -->\n$$\\begin{align} E_4^2 &= E_8 \\\\ E_4 E_6 &= E_{10} + 1 \\end{align}$$\n"
    report = check_text(text, markdown=True)
    assert [c.verdict for c in report.claims] == ["proved", "error"]  # E_10 + 1 mixes weights 10 and 0
    text = "%@claim\n\\begin{alignat}{2} E_4^2 &= E_8 &\\quad E_4 E_6 &= -E_{10} \\end{alignat}\n"
    report = check_text(text)
    assert [c.verdict for c in report.claims] == ["proved", "refuted"]


def test_a_piecewise_value_is_an_error_with_a_hint() -> None:
    text = "%@claim\n\\[ a(n) = \\begin{cases} 1 & n = 1 \\\\ 0 & n \\ge 2 \\end{cases} \\]\n"
    (c,) = check_text(text).claims
    assert c.verdict == "error" and c.outcome.code == "unsupported" and "case" in c.outcome.hint


def test_an_unreadable_separator_is_an_error_not_a_verdict() -> None:
    # '\text{or}' is no separator: nothing of the row gets a verdict.
    claims = check_text("%@claim\n\\[ E_4^2 = E_8 \\text{ or } E_4 E_6 = E_{10} \\]\n").claims
    assert claims and all(c.verdict == "error" for c in claims)


def test_claims_about_spaces_are_statements_of_a_row() -> None:
    # E_4 is in M_4(Gamma_0(N)) for every N, E_6 in M_6 (Serre, A Course in Arithmetic, ch. VII);
    # dim M_4(Gamma_0(6)) = 5 (Diamond and Shurman, A First Course in Modular Forms, Fig. 3.4 and
    # Thm. 3.5.1, from memory); Delta is a normalised eigenform (Ramanujan's tau is multiplicative:
    # Mordell 1917).  The grammar reads each of them (rule space_claim), also several in one row.
    from verifier import check_text

    text = (
        "%@claim\n\\[ E_4 \\in M_4(\\Gamma_0(2)), \\quad E_6 \\in M_6(\\Gamma_0(3)) \\]\n"
        "%@claim\n\\[ \\dim M_4(\\Gamma_0(6)) = 5 \\qquad \\dim M_4(\\Gamma_0(6)) = 4 \\]\n"
        "%@claim\n\\[ \\Delta \\text{ is a normalised eigenform} \\]\n"
        "%@claim\n\\[ E_4 \\in M_4(\\Gamma_7(2)) \\]\n"
    )
    report = check_text(text)
    got = [(c.outcome.kind, c.verdict, c.location.line) for c in report.claims]
    assert got == [
        ("membership", "proved", 2),
        ("membership", "proved", 2),
        ("dimension", "proved", 4),
        ("dimension", "refuted", 4),
        ("eigenform", "proved", 6),
        ("membership", "error", 8),
    ]
    bad = report.claims[-1]
    assert bad.outcome.code == "syntax" and bad.location.column == 12  # at the space, not the form


def test_a_congruence_modulo_a_prime_power_is_decided() -> None:
    # tau(n) = sigma_11(n) mod 691 (Ramanujan 1916) does not hold mod 691^2: at n = 2,
    # tau(2) = -24 and sigma_11(2) = 2049 (sympy), and 2049 + 24 = 2073 = 3 * 691.
    assert int(sympy.divisor_sigma(2, 11)) + 24 == 3 * 691
    report = check_text(
        "%@claim\n\\[ \\tau(n) \\equiv \\sigma_{11}(n) \\pmod{691} \\]\n"
        "%@claim\n\\[ \\tau(n) \\equiv \\sigma_{11}(n) \\pmod{691^2} \\]\n"
    )
    assert [c.verdict for c in report.claims] == ["proved", "refuted"]
    assert report.claims[1].outcome.first_difference is not None
    assert report.claims[1].outcome.first_difference["n"] == 2

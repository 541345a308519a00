"""Property-based soundness: true identities and their mutations, in every supported family.

Each family contributes classical identities, true by published theorems (sources beside
each).  Hypothesis then rewrites them in ways that keep them true:

* both sides multiplied by a random nonzero rational;
* the sides swapped;
* one side split into a random sum of rational multiples of itself;
* the claim moved to ``difference = 0``;

and in ways that make them false (one side multiplied by a rational c != 1).  The
properties are the soundness contract of the tool:

* a true claim is ``proved`` or ``unproven``, never ``refuted``;
* the ``\\neq`` version of a true claim is never ``proved``;
* a false claim is never ``proved``, and its ``\\neq`` version is never ``refuted``.

Profiles: the default runs a few examples per property so that CI stays fast; set
``QREFEREE_HYPOTHESIS=large`` for a long local campaign (see DEVELOPERS.md).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction

import pytest
from hypothesis import given
from hypothesis import strategies as st
from verifier import check_text


@dataclass(frozen=True)
class Identity:
    family: str
    left: str
    right: str
    options: str = ""
    # A claim about coefficients (a function of n) rather than an identity of forms.
    arithmetic: bool = False
    modulus: int | None = None


NOME_PI = "nome={e^{\\pi i\\tau}}"

IDENTITIES = [
    # Level one.  Dimensions of M_8, M_10, M_12 and the relation 1728 Delta = E_4^3 - E_6^2:
    # Serre, A Course in Arithmetic, ch. VII, §3.2 and §4.4; 691 E_12 = 441 E_4^3 + 250 E_6^2
    # from the coefficients of q^0 and q^1 (Zagier, "Elliptic modular forms and their
    # applications", in The 1-2-3 of Modular Forms, §2.2; from memory).
    Identity("level one", "E_4^2", "E_8"),
    Identity("level one", "E_4E_6", "E_{10}"),
    Identity("level one", "E_4^3 - E_6^2", "1728\\Delta"),
    Identity("level one", "691E_{12}", "441E_4^3 + 250E_6^2"),
    # E_k(d tau): the same relations at tau -> 2 tau, and Jacobi's four-square theorem
    # theta^4 = (4 E_2(4 tau) - E_2(tau)) / 3 (Grosswald, Representations of Integers as Sums of
    # Squares, ch. 9, Thm. 2; the constant 1 and r_4(1) = 8 check the normalisation).
    Identity("E_k(d tau)", "E_4(2\\tau)^2", "E_8(2\\tau)"),
    Identity("E_k(d tau)", "\\theta^4", "\\frac{4E_2(4\\tau) - E_2(\\tau)}{3}"),
    # Eta quotients and thetas in the nome q = e^{2 pi i tau} (Köhler, Eta Products and Theta
    # Series Identities, Springer 2011, §1.3; Jacobi's triple product).
    Identity("eta quotients", "\\theta_3", "\\frac{\\eta(2\\tau)^5}{\\eta(\\tau)^2\\eta(4\\tau)^2}"),
    Identity("eta quotients", "\\theta_4", "\\frac{\\eta(\\tau)^2}{\\eta(2\\tau)}"),
    Identity("eta quotients", "\\theta_2", "\\frac{2\\eta(4\\tau)^2}{\\eta(2\\tau)}"),
    Identity("eta quotients", "\\theta_2\\theta_3\\theta_4", "2\\eta(2\\tau)^3"),
    Identity("eta quotients", "\\Delta", "\\eta(\\tau)^{24}"),
    # The same thetas in the nome e^{pi i tau}; Jacobi's quartic identity theta_3^4 =
    # theta_2^4 + theta_4^4 (Whittaker and Watson, A Course of Modern Analysis, §21.2).
    Identity("thetas, nome e^{pi i tau}", "\\theta_2\\theta_3\\theta_4", "2\\eta(\\tau)^3", NOME_PI),
    Identity("thetas, nome e^{pi i tau}", "\\theta_2", "\\frac{2\\eta(2\\tau)^2}{\\eta(\\tau)}", NOME_PI),
    Identity("thetas, nome e^{pi i tau}", "\\theta_3^4", "\\theta_2^4 + \\theta_4^4", NOME_PI),
    Identity("thetas, nome q", "\\theta_3^4", "\\theta_2^4 + \\theta_4^4"),
    # Quadratic forms: the hexagonal lattice (Gram matrix [[2,1],[1,2]]) has theta series
    # (eta(tau)^3 + 9 eta(9 tau)^3) / eta(3 tau) (Borwein, Borwein and Garvan, Trans. AMS 343
    # (1994), from memory); theta(tau)^2 is the theta series of 2 I_2 (common practice).
    Identity(
        "quadratic forms",
        "\\Theta_A",
        "\\frac{\\eta(\\tau)^{3} + 9\\eta(9\\tau)^{3}}{\\eta(3\\tau)}",
    ),
    Identity("quadratic forms", "\\Theta_B", "\\theta(\\tau)^2"),
    # Quasimodular: Ramanujan's differential equations (Ramanujan, "On certain arithmetical
    # functions", Trans. Cambridge Philos. Soc. 22 (1916), eq. (30)).
    Identity("quasimodular", "D E_2", "\\frac{E_2^2 - E_4}{12}"),
    Identity("quasimodular", "D E_4", "\\frac{E_2E_4 - E_6}{3}"),
    Identity("quasimodular", "D E_6", "\\frac{E_2E_6 - E_8}{2}"),
    # Coefficient claims: sum sigma_3(m) sigma_3(n-m) from E_4^2 = E_8 (Ramanujan 1916, Table
    # IV); Jacobi's four-square theorem r_4(n) = 8 sigma(n) - 32 sigma(n/4) (Grosswald, ch. 9).
    Identity(
        "coefficients",
        "\\sum_{m=1}^{n-1}\\sigma_3(m)\\sigma_3(n-m)",
        "\\frac{\\sigma_7(n)-\\sigma_3(n)}{120}",
        arithmetic=True,
    ),
    Identity("coefficients", "r_4(n)", "8\\sigma(n) - 32\\sigma(n/4)", arithmetic=True),
    # Congruences: Ramanujan's tau(n) = sigma_11(n) mod 691 (Ramanujan 1916, eq. (178)).
    Identity("congruences", "\\tau(n)", "\\sigma_{11}(n)", arithmetic=True, modulus=691),
]

DEFINES = (
    "%@define A = \\begin{pmatrix}2&1\\\\1&2\\end{pmatrix}\n%@define B = \\begin{pmatrix}2&0\\\\0&2\\end{pmatrix}\n"
)

EQUAL_IDENTITIES = [i for i in IDENTITIES if i.modulus is None]
FORM_IDENTITIES = [i for i in EQUAL_IDENTITIES if not i.arithmetic]

nonzero = st.fractions(min_value=-30, max_value=30, max_denominator=12).filter(lambda x: x != 0)
# A factor c != 1 that keeps congruences false too: c - 1 must be prime to the modulus 691.
mutation = nonzero.filter(lambda x: x != 1 and (x - 1).numerator % 691 != 0 and x.denominator % 691 != 0)


def tex(c: Fraction) -> str:
    """A rational as an author writes it (sign in front)."""
    sign = "-" if c < 0 else ""
    c = abs(c)
    body = str(c.numerator) if c.denominator == 1 else f"\\frac{{{c.numerator}}}{{{c.denominator}}}"
    return sign + body


def times(c: Fraction, x: str) -> str:
    return f"{tex(c)}\\left({x}\\right)"


def sum_of_multiples(weights: list[Fraction], x: str) -> str:
    out = times(weights[0], x)
    for w in weights[1:]:
        out += (" - " if w < 0 else " + ") + times(abs(w), x)
    return out


def decide(identity: Identity, left: str, right: str, rel: str = "=") -> tuple[str, str]:
    """The verdict and message of one claim ``left rel right`` in the identity's setting."""
    if identity.modulus is not None:
        assert rel == "="
        body = f"{left} \\equiv {right} \\pmod{{{identity.modulus}}}"
    else:
        body = f"{left} {rel} {right}"
    doc = f"{DEFINES}%@claim {identity.options}\n\\[ {body} \\]\n"
    (result,) = check_text(doc).claims
    return result.verdict, result.outcome.message


def assert_claim(identity: Identity, left: str, right: str, true: bool) -> None:
    """A true claim is never refuted and a false one never proved (the contract).

    Beyond the contract: every family here is within reach of a proof, and a false claim
    differs early, so true claims are proved and false ones refuted; ``\\neq`` the other way.
    """
    expected = {"=": "proved", "\\neq": "refuted"} if true else {"=": "refuted", "\\neq": "proved"}
    relations = ["=", "\\neq"] if identity.modulus is None else ["="]
    for rel in relations:
        verdict, message = decide(identity, left, right, rel)
        wrong = "refuted" if expected[rel] == "proved" else "proved"
        assert verdict != wrong, (identity.family, left, rel, right, message)
        assert verdict == expected[rel], (identity.family, left, rel, right, message)


def assert_true_claim(identity: Identity, left: str, right: str) -> None:
    assert_claim(identity, left, right, True)


def assert_false_claim(identity: Identity, left: str, right: str) -> None:
    assert_claim(identity, left, right, False)


@pytest.mark.parametrize("identity", IDENTITIES, ids=lambda i: f"{i.family}: {i.left}")
def test_the_identities_themselves_are_proved(identity: Identity) -> None:
    verdict, message = decide(identity, identity.left, identity.right)
    assert verdict == "proved", message


@pytest.mark.parametrize("identity", IDENTITIES, ids=lambda i: f"{i.family}: {i.left}")
@given(c=nonzero)
def test_both_sides_scaled(identity: Identity, c: Fraction) -> None:
    if identity.modulus is not None and c.numerator % identity.modulus == 0:
        return
    assert_true_claim(identity, times(c, identity.left), times(c, identity.right))


@pytest.mark.parametrize("identity", IDENTITIES, ids=lambda i: f"{i.family}: {i.left}")
def test_sides_swapped(identity: Identity) -> None:
    assert_true_claim(identity, identity.right, identity.left)


@pytest.mark.parametrize("identity", EQUAL_IDENTITIES, ids=lambda i: f"{i.family}: {i.left}")
@given(parts=st.lists(nonzero, min_size=1, max_size=3))
def test_one_side_split_into_a_sum_of_multiples(identity: Identity, parts: list[Fraction]) -> None:
    rest = 1 - sum(parts, Fraction(0))
    weights = [*parts, rest] if rest != 0 else parts
    assert sum(weights, Fraction(0)) == 1
    assert_true_claim(identity, identity.left, sum_of_multiples(weights, identity.right))


@pytest.mark.parametrize("identity", FORM_IDENTITIES, ids=lambda i: f"{i.family}: {i.left}")
def test_moved_to_difference_zero(identity: Identity) -> None:
    left = f"\\left({identity.left}\\right) - \\left({identity.right}\\right)"
    assert_true_claim(identity, left, "0")


@pytest.mark.parametrize("identity", IDENTITIES, ids=lambda i: f"{i.family}: {i.left}")
@given(c=mutation)
def test_one_side_mutated_by_a_factor_is_never_proved(identity: Identity, c: Fraction) -> None:
    assert_false_claim(identity, identity.left, times(c, identity.right))


@pytest.mark.parametrize("identity", IDENTITIES, ids=lambda i: f"{i.family}: {i.left}")
@given(c=mutation, d=nonzero)
def test_scaled_then_mutated_is_never_proved(identity: Identity, c: Fraction, d: Fraction) -> None:
    if identity.modulus is not None and d.numerator % identity.modulus == 0:
        return
    assert_false_claim(identity, times(d, identity.left), times(d * c, identity.right))


# -- The character of a product, against the eta-quotient formula ---------------------------
# For eta quotients f and g, the character of f g computed by the product rule (characters in
# the theta-multiplier convention multiply) must equal the character of the eta quotient f g
# computed directly by the Gordon-Hughes-Newman formula, with Shimura's convention for
# half-integral weight (Köhler, Eta Products and Theta Series Identities, Thm. 1.64; Shimura,
# Ann. of Math. 97 (1973)).  This is where a wrong rule once split true identities apart.


def _modular(exponents: dict[int, int]) -> dict[int, int]:
    """Adjust the exponent of eta(tau) so that sum delta r_delta = 0 mod 24 (Newman's condition)."""
    total = sum(d * r for d, r in exponents.items())
    shift = (-total) % 24
    shift = shift - 24 if shift > 12 else shift
    out = dict(exponents)
    out[1] = out.get(1, 0) + shift
    return {d: r for d, r in out.items() if r} or {1: 24}


eta_exponents = st.dictionaries(
    st.sampled_from([1, 2, 3, 4, 6, 8, 12]), st.integers(-6, 6), min_size=1, max_size=3
).map(_modular)


@given(a=eta_exponents, b=eta_exponents)
def test_product_rule_for_characters_matches_eta_quotients(a: dict[int, int], b: dict[int, int]) -> None:
    from verifier.forms.eta import EtaQuotient
    from verifier.prove.evaluate import product_kernel

    f, g = EtaQuotient.of(a), EtaQuotient.of(b)
    fg = f * g
    level = 4
    for x in (f, g, fg):
        n = x.least_level()
        assert n is not None
        level = math.lcm(level, n)
    chi_f, chi_g, chi_fg = (int(x.character(level).kernel) for x in (f, g, fg))
    assert product_kernel(f.weight, chi_f, g.weight, chi_g) == chi_fg

"""The outcome contract: no verdict of difference without a witness (tested at its one place).

Every verdict is built as an :class:`Outcome`; these tests build outcomes directly, as any
present or future decision path would, and check that a verdict saying "the sides differ"
stands only with an exponent and two exact values that differ there.
"""

from __future__ import annotations

from fractions import Fraction

import pytest
from verifier.prove.outcome import Outcome, Witness


def test_refuted_equality_without_witness_becomes_unproven() -> None:
    o = Outcome("refuted", "equality", "the weight-3/2 part is nonzero")
    assert o.verdict == "unproven"
    assert o.code == "no-witness"
    assert "the weight-3/2 part is nonzero" in o.message
    assert o.first_difference is None


def test_proved_inequality_without_witness_becomes_unproven() -> None:
    o = Outcome("proved", "inequality", "the sides differ")
    assert (o.verdict, o.code) == ("unproven", "no-witness")


@pytest.mark.parametrize("kind", ["equality", "prefix", "arithmetic", "congruence"])
def test_witness_with_equal_values_is_refused(kind: str) -> None:
    o = Outcome("refuted", kind, "m", first_difference={"n": 3, "left": "2/3", "right": "4/6"})
    assert o.verdict == "unproven"


def test_witness_must_name_an_exponent() -> None:
    o = Outcome("refuted", "equality", "m", first_difference={"n": None, "left": "1", "right": "2"})
    assert o.verdict == "unproven"
    # A claim about a single value (no variable) has no exponent to name.
    v = Outcome("refuted", "value", "m", first_difference={"n": None, "left": "1", "right": "2"})
    assert v.verdict == "refuted"


def test_witness_values_must_be_exact_numbers() -> None:
    o = Outcome("refuted", "equality", "m", first_difference={"n": 1, "left": "1.5e3", "right": "x"})
    assert o.verdict == "unproven"


def test_good_witnesses_stand() -> None:
    o = Outcome("refuted", "equality", "m", first_difference={"n": "1/4", "left": "10/7", "right": "15/7"})
    assert o.verdict == "refuted"
    assert o.witness == Witness(Fraction(1, 4), Fraction(10, 7), Fraction(15, 7))
    p = Outcome("proved", "prefix", "m", first_difference={"n": 2, "left": "0", "right": "1"}, relation="!=")
    assert p.verdict == "proved"


def test_congruence_witness_differs_as_residues() -> None:
    # 7 and 2 are equal modulo 5: no witness of a failed congruence mod 5; modulo 3 they differ.
    same = Outcome("refuted", "congruence", "m", first_difference={"n": 4, "left": "7", "right": "2", "modulus": 5})
    assert same.verdict == "unproven"
    other = Outcome("refuted", "congruence", "m", first_difference={"n": 4, "left": "7", "right": "2", "modulus": 3})
    assert other.verdict == "refuted"
    # 1/5 is not 5-integral, so 1/5 and 0 are not congruent modulo 5.
    frac = Outcome("refuted", "congruence", "m", first_difference={"n": 1, "left": "1/5", "right": "0", "modulus": 5})
    assert frac.verdict == "refuted"


def test_equality_verdicts_need_no_witness() -> None:
    # "proved" for = and "refuted" for \neq say the sides are equal: a certificate, not a witness.
    assert Outcome("proved", "equality", "equal", method="sturm", bound=2).verdict == "proved"
    assert Outcome("refuted", "inequality", "equal", method="sturm", bound=2).verdict == "refuted"
    assert Outcome("refuted", "prefix", "agree", relation="!=").verdict == "refuted"


def test_changing_a_verdict_later_is_checked_again() -> None:
    o = Outcome("unproven", "equality", "agree to q^100")
    o.verdict = "refuted"
    assert o.verdict == "unproven" and o.code == "no-witness"
    p = Outcome("refuted", "arithmetic", "m", first_difference={"n": 2, "left": "1", "right": "5/4"})
    p.first_difference = None
    assert p.verdict == "unproven"


def test_claims_about_one_form_are_outside_the_two_sided_rule() -> None:
    # Membership refutations rest on invariants (weight, orders at cusps), not on two sides.
    assert Outcome("refuted", "membership", "weight 4, not 6").verdict == "refuted"

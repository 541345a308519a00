"""The Serre derivative and D^n on quasimodular input (issue: operators on E_2).

theta_k f = D f - (k/12) E_2 f is defined for every k; on a form with E_2 in it authors use
k other than the weight (theta_1 E_2 = -E_4/12).  The expected values are computed here from
``sympy.divisor_sigma`` with plain ``Fraction`` arithmetic (E_2 = 1 - 24 sum sigma_1(n) q^n,
E_4 = 1 + 240 sum sigma_3(n) q^n, E_6 = 1 - 504 sum sigma_5(n) q^n: Serre, *A Course in
Arithmetic*, Ch. VII §4.2; Zagier, *1-2-3 of modular forms*, §2.3 and §5), never by the engine.
"""

from __future__ import annotations

from fractions import Fraction

import pytest
import sympy
from verifier import check_text

N = 12  # coefficients compared by the independent model


def _eis(c: int, k: int) -> list[Fraction]:
    return [Fraction(1)] + [Fraction(c * int(sympy.divisor_sigma(n, k))) for n in range(1, N)]


E2, E4, E6 = _eis(-24, 1), _eis(240, 3), _eis(-504, 5)


def _mul(a: list[Fraction], b: list[Fraction]) -> list[Fraction]:
    return [sum((a[i] * b[n - i] for i in range(n + 1)), Fraction(0)) for n in range(N)]


def _lin(*terms: tuple[Fraction | int, list[Fraction]]) -> list[Fraction]:
    return [sum((Fraction(c) * s[n] for c, s in terms), Fraction(0)) for n in range(N)]


def _d(a: list[Fraction]) -> list[Fraction]:
    return [n * a[n] for n in range(N)]


def _serre(k: Fraction | int, f: list[Fraction]) -> list[Fraction]:
    return _lin((1, _d(f)), (-Fraction(k) / 12, _mul(E2, f)))


def test_the_model_agrees_with_ramanujan() -> None:
    # Ramanujan (1916), "On certain arithmetical functions": D E_2 = (E_2^2 - E_4)/12.
    assert _d(E2) == _lin((Fraction(1, 12), _mul(E2, E2)), (Fraction(-1, 12), E4))


# (claim, left series, right series) with both sides computed by the model above.
CASES = [
    (r"\partial_1 E_2 = -\tfrac{1}{12}E_4", _serre(1, E2), _lin((Fraction(-1, 12), E4))),
    (r"\partial_{1}E_2 = -\frac{E_4}{12}", _serre(1, E2), _lin((Fraction(-1, 12), E4))),
    (
        r"\partial_2 E_2 = -\frac{1}{12}(E_2^2 + E_4)",
        _serre(2, E2),
        _lin((Fraction(-1, 12), _mul(E2, E2)), (Fraction(-1, 12), E4)),
    ),
    (
        r"\partial_5 (E_2 E_4) = -\frac{1}{12}(E_4^2 + 4E_2 E_6)",
        _serre(5, _mul(E2, E4)),
        _lin((Fraction(-1, 12), _mul(E4, E4)), (Fraction(-1, 3), _mul(E2, E6))),
    ),
    (
        r"D^2 E_2 = \frac{E_2^3 - 3E_2E_4 + 2E_6}{72}",
        _d(_d(E2)),
        _lin((Fraction(1, 72), _mul(E2, _mul(E2, E2))), (Fraction(-1, 24), _mul(E2, E4)), (Fraction(1, 36), E6)),
    ),
    (
        r"D^3 E_2 = D^2\left(\frac{E_2^2 - E_4}{12}\right)",
        _d(_d(_d(E2))),
        _d(_d(_lin((Fraction(1, 12), _mul(E2, E2)), (Fraction(-1, 12), E4)))),
    ),
    # False variants: a wrong weight index or a wrong constant.
    (r"\partial_2 E_2 = -\tfrac{1}{12}E_4", _serre(2, E2), _lin((Fraction(-1, 12), E4))),
    (r"\partial_1 E_2 = -\tfrac{1}{6}E_4", _serre(1, E2), _lin((Fraction(-1, 6), E4))),
    (
        r"\partial_5 (E_2 E_4) = -\frac{1}{12}(E_4^2 + E_2 E_6)",
        _serre(5, _mul(E2, E4)),
        _lin((Fraction(-1, 12), _mul(E4, E4)), (Fraction(-1, 12), _mul(E2, E6))),
    ),
]


@pytest.mark.parametrize(("claim", "left", "right"), CASES, ids=[c[0] for c in CASES])
def test_serre_on_quasimodular_input(claim: str, left: list[Fraction], right: list[Fraction]) -> None:
    result = check_text(f"%@claim\n\\[ {claim} \\]\n").claims[0]
    if left == right:
        assert result.verdict == "proved", result.outcome.message
    else:
        assert result.verdict == "refuted", result.outcome.message
        n = result.outcome.first_difference["n"]
        first = next(i for i in range(N) if left[i] != right[i])
        assert n == first
        assert Fraction(result.outcome.first_difference["left"]) == left[n]


def test_a_modular_form_with_another_weight_index_is_still_an_error() -> None:
    # theta_3 on E_4 (weight 4) is almost always a slip; qreferee asks instead of guessing.
    result = check_text("%@claim\n\\[ \\partial_3 E_4 = -\\frac13 E_6 \\]\n").claims[0]
    assert result.verdict == "error"
    assert result.outcome.code == "weight-mismatch"

"""The re-checker on series-only products (``(series h d)`` atoms defined by the certificate's
``series`` field) in expansions: an honest certificate is confirmed; an altered product (its
period, an exponent, the constant), an altered printed coefficient, or a certificate that does
not define its product are caught (failed, or not re-checked when the definition is missing)."""

from __future__ import annotations

import copy
from fractions import Fraction
from typing import Any

import pytest
from verifier import check_text
from verifier.recheck.atoms import periodic_product
from verifier.recheck.check import CONFIRMED, FAILED, NOT_RECHECKED, recheck


def _partitions_into(parts: list[int], count: int) -> list[int]:
    """Brute force: the number of partitions of 0 .. count-1 into the given parts (coin counting)."""
    ways = [1] + [0] * (count - 1)
    for part in parts:
        for n in range(part, count):
            ways[n] += ways[n - part]
    return ways


# 1 / ((q; q^5)(q^4; q^5)) counts partitions into parts = +-1 (mod 5) (the product side of the first
# Rogers-Ramanujan identity; Andrews, The Theory of Partitions, Ch. 7), counted here by brute force.
RR = _partitions_into([n for n in range(1, 12) if n % 5 in (1, 4)], 12)
DOC = r"""
%@claim
\[ \frac{1}{(q;q^5)_\infty(q^4;q^5)_\infty} = 1+q+q^2+q^3+2q^4+2q^5+3q^6+3q^7+4q^8+5q^9+\cdots \]
"""


@pytest.fixture(scope="module")
def cert() -> dict[str, Any]:
    (claim,) = check_text(DOC, "t.tex").to_dict()["claims"]
    assert claim["verdict"] == "proved", claim["message"]
    c: dict[str, Any] = claim["certificate"]
    assert c["method"] == "expansion" and len(c["series"]) == 2
    return c


def test_products_by_the_logarithmic_derivative() -> None:
    # Euler's pentagonal theorem: prod (1 - q^n) = 1 - q - q^2 + q^5 + q^7 - ... (Hardy-Wright, Thm. 353).
    assert periodic_product(1, [1], {}, 13).window(0, 13) == [1, -1, -1, 0, 0, 1, 0, 1, 0, 0, 0, 0, -1]
    # 1 / prod (1 - q^n): p(0..10) = 1, 1, 2, 3, 5, 7, 11, 15, 22, 30, 42 (Hardy-Wright, Ch. XIX; from memory).
    assert periodic_product(1, [-1], {}, 11).window(0, 11) == [1, 1, 2, 3, 5, 7, 11, 15, 22, 30, 42]
    # Odd parts = distinct parts (Euler): 1, 1, 1, 2, 2, 3, 4, 5, 6, 8, 10 (Hardy-Wright, Thm. 344; from memory).
    assert periodic_product(2, [-1, 0], {}, 11).window(0, 11) == [1, 1, 1, 2, 2, 3, 4, 5, 6, 8, 10]
    # A finite factor: (1 - q^2) alone, as c(2) = 1 with no periodic part.
    assert periodic_product(0, [], {2: 1}, 5).window(0, 5) == [1, 0, -1, 0, 0]
    # Rogers-Ramanujan: exponents -1 at n = 1, 4 (mod 5).
    assert periodic_product(5, [-1, 0, 0, -1, 0], {}, 12).window(0, 12) == [Fraction(x) for x in RR]


def test_an_honest_certificate_is_confirmed(cert: dict[str, Any]) -> None:
    result = recheck(cert)
    assert result.status == CONFIRMED, result.reasons


def _products(cert: dict[str, Any]) -> list[dict[str, Any]]:
    return [v["product"] for v in cert["series"].values()]


@pytest.mark.parametrize(
    ("field", "value"),
    [("period", 4), ("values", [1, 0, 0, 0, 1]), ("constant", "2"), ("finite", [[2, 1]])],
)
def test_an_altered_product_is_caught(cert: dict[str, Any], field: str, value: Any) -> None:
    altered = copy.deepcopy(cert)
    first = _products(altered)[0]
    if field == "period":
        first["values"] = first["values"][:4]
    first[field] = value
    result = recheck(altered)
    assert result.status == FAILED, result


def test_an_altered_printed_coefficient_is_caught(cert: dict[str, Any]) -> None:
    altered = copy.deepcopy(cert)
    altered["right"]["expr"] = altered["right"]["expr"].replace("(* 5 (q 9))", "(* 6 (q 9))", 1)
    assert altered["right"]["expr"] != cert["right"]["expr"]
    result = recheck(altered)
    assert result.status == FAILED and any("q^9" in r for r in result.reasons), result


def test_a_missing_definition_is_not_rechecked(cert: dict[str, Any]) -> None:
    altered = copy.deepcopy(cert)
    del altered["series"]
    result = recheck(altered)
    assert result.status == NOT_RECHECKED and "series" in result.reasons[0]


def test_series_products_are_refused_outside_coefficient_comparisons(cert: dict[str, Any]) -> None:
    # A Sturm-bound certificate may not contain a series-only product (it has no modular proof).
    altered = copy.deepcopy(cert)
    altered.update(method="sturm", space={"weight": "0", "level": 1, "character": 1}, pieces=[], bound=0, index=1)
    assert recheck(altered).status == NOT_RECHECKED

"""q-series that qreferee can expand exactly but knows no modular proof for.

Products whose exponent function is not that of an eta quotient (Rogers–Ramanujan-type
products, partial products), sums over Z with weights that are no unary theta series
(docs/method.md#sums-over-z), partial theta functions, and
generating functions with no modular translation (sigma_k with k even) are atoms of the
family ``"series"``.  They have no level and no character: :mod:`verifier.forms.registry`
refuses them for proofs, and a claim containing one is compared coefficient by
coefficient only: refuted at the first difference, otherwise unproven
(docs/method.md#series-only).

Parameters (all hashable):
* ``("prod", period, values, finite, constant)``: ``constant * prod_{n>=1} (1-q^n)^{c(n)}``
  with ``c(n) = values[(n-1) % period] + finite.get(n, 0)``;
* ``("zsum", alpha, beta, lower, weight, var, shift)``: ``sum_{n>=lower} w(n) q^{alpha n^2 + beta n - shift}``
  over integers n (``lower`` None: all of Z), ``w`` an arithmetic expression in ``var``;
* ``("coeffs", term, var, lower)``: ``sum_{n>=lower} a(n) q^n``.
"""

from __future__ import annotations

import math
from fractions import Fraction
from typing import Any

from verifier.series.qseries import QSeries

MAX_PERIOD = 10_000


def exponent_at(period: int, values: tuple[int, ...], finite: tuple[tuple[int, int], ...], n: int) -> int:
    """c(n) of a product ``prod (1-q^n)^{c(n)}`` in the parametrisation above."""
    extra = dict(finite).get(n, 0)
    return (values[(n - 1) % period] if period else 0) + extra


def product_series(params: tuple[Any, ...], prec: int) -> QSeries:
    """``constant * prod (1-q^n)^{c(n)}`` to ``prec`` terms, exactly.

    Multiplying by 1 - q^n subtracts the series shifted by n; dividing by it adds the
    shifted series back, running upwards (the geometric series 1/(1-x) = sum x^k).
    """
    _, period, values, finite, constant = params
    prec = max(prec, 1)
    a = [0] * prec
    a[0] = 1
    for n in range(1, prec):
        c = exponent_at(period, values, finite, n)
        for _ in range(abs(c)):
            if c > 0:
                for i in range(prec - 1, n - 1, -1):
                    a[i] -= a[i - n]
            else:
                for i in range(n, prec):
                    a[i] += a[i - n]
    return QSeries.from_coefficients([Fraction(x) * Fraction(constant) for x in a], 0, prec)


def zsum_series(params: tuple[Any, ...], prec: int) -> QSeries:
    """``sum w(n) q^{E(n)}`` with E(n) = alpha n^2 + beta n - shift >= 0 an integer."""
    from verifier.arith.values import Values

    _, alpha, beta, lower, weight, var, shift = params
    alpha, beta, shift = Fraction(alpha), Fraction(beta), Fraction(shift)
    values = Values()
    coeffs = [Fraction(0)] * max(prec, 1)
    assert alpha > 0, "a theta-like sum has a positive quadratic exponent"
    vertex = -beta / (2 * alpha)
    centre = math.floor(vertex)
    if lower is not None:
        centre = max(centre, lower)
    for direction in (1, -1):
        n = centre if direction == 1 else centre - 1
        while lower is None or n >= lower:
            e = alpha * n * n + beta * n - shift
            if e >= prec and (n - vertex) * direction >= 0:
                break  # past the vertex the exponent only grows
            if 0 <= e < prec:
                assert e.denominator == 1
                w = values.value(weight, {var: n}) if weight is not None else Fraction(1)
                coeffs[int(e)] += w
            n += direction
    return QSeries.from_coefficients(coeffs, 0, prec)


def coefficient_series(params: tuple[Any, ...], prec: int) -> QSeries:
    """``sum_{n >= lower} a(n) q^n`` from exact values of a(n)."""
    from verifier.arith.values import Values

    _, term, var, lower = params
    values = Values()
    coeffs = [Fraction(0)] * max(prec, 1)
    for n in range(max(lower, 0), prec):
        coeffs[n] = values.value(term, {var: n})
    return QSeries.from_coefficients(coeffs, 0, prec)


def build(params: tuple[Any, ...], prec: int) -> QSeries:
    """The series of a ``"series"`` atom at scale 1."""
    kind = params[0]
    if kind == "prod":
        return product_series(params, prec)
    if kind == "zsum":
        return zsum_series(params, prec)
    if kind == "coeffs":
        return coefficient_series(params, prec)
    raise KeyError(kind)

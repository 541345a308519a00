"""The discriminant Delta = q prod (1 - q^n)^24 = eta(tau)^24 (docs/method.md#delta-eta-j)."""

from __future__ import annotations

from flint import fmpz_poly

from verifier.series.qseries import QSeries


def euler_product(prec: int) -> fmpz_poly:
    """``prod_{n>=1} (1 - q^n) mod q^prec`` by Euler's pentagonal number theorem.

    ``prod (1 - q^n) = sum_{k in Z} (-1)^k q^{k(3k-1)/2}``: a sparse series, so it costs
    O(sqrt(prec)) to write down.
    """
    coeffs = [0] * max(prec, 1)
    k = 0
    while True:
        sign = -1 if k % 2 else 1
        done = True
        for e in (k * (3 * k - 1) // 2, k * (3 * k + 1) // 2):
            if e < prec:
                coeffs[e] = sign
                done = False
        if done:
            break
        k += 1
    return fmpz_poly(coeffs[:prec]) if prec > 0 else fmpz_poly([])


def delta_series(prec: int) -> QSeries:
    """Delta + O(q^prec), exactly (integer coefficients tau(n))."""
    if prec <= 1:
        return QSeries.from_coefficients([], 0, prec)
    body = euler_product(prec - 1).pow_trunc(24, prec - 1)
    return QSeries.from_integer_poly(body, 1, prec)

"""Bernoulli numbers and the normalised Eisenstein series E_k of level one.

Convention (docs/method.md#eisenstein): ``t/(e^t - 1) = sum B_n t^n / n!`` (so ``B_1 = -1/2``) and,
for even ``k >= 2``,

    E_k = 1 - (2k / B_k) * sum_{n >= 1} sigma_{k-1}(n) q^n.

E_k is a modular form of weight k on SL2(Z) for k >= 4; E_2 is quasimodular.
"""

from __future__ import annotations

from fractions import Fraction

from flint import fmpq, fmpz, fmpz_poly

from verifier.series.qseries import QSeries, fmpq_to_fraction


def bernoulli(n: int) -> Fraction:
    """The Bernoulli number B_n (with B_1 = -1/2)."""
    if n < 0:
        raise ValueError("Bernoulli numbers are indexed by n >= 0")
    return fmpq_to_fraction(fmpq.bernoulli(n))


def divisor_sigma_list(r: int, count: int) -> list[int]:
    """``[sigma_r(0) := 0, sigma_r(1), ..., sigma_r(count-1)]``."""
    return [0] + [int(fmpz(n).divisor_sigma(r)) for n in range(1, count)]


def eisenstein_constant(k: int) -> Fraction:
    """The factor ``-2k/B_k`` in front of the divisor sum of E_k."""
    if k < 2 or k % 2:
        raise ValueError(f"E_k is defined here for even k >= 2, not k = {k}")
    return Fraction(-2 * k) / bernoulli(k)


def eisenstein_series(k: int, prec: int) -> QSeries:
    """E_k + O(q^prec) for even k >= 2, exactly."""
    c = eisenstein_constant(k)
    if prec <= 0:
        return QSeries.from_coefficients([], 0, prec)
    sigmas = fmpz_poly([0] + [fmpz(n).divisor_sigma(k - 1) for n in range(1, prec)])
    series = QSeries.from_integer_poly(sigmas, 0, prec).scale(c)
    return series + QSeries.constant(1, prec)

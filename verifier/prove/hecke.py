"""Hecke operators on q-expansions (docs/method.md#hecke).

For ``f = sum a_m q^m`` in ``M_k(Gamma_0(N), chi)`` (integral weight ``k``, quadratic ``chi``):

    a_m(T_n f) = sum_{d | gcd(m, n)} chi(d) d^(k-1) a_(mn/d^2),    chi(d) = 0 when gcd(d, N) > 1.

When every prime of ``n`` divides ``N`` only ``d = 1`` survives and ``T_n = U_n``: ``a_m -> a_(mn)``.
All ``T_n`` preserve ``M_k(Gamma_0(N), chi)``, commute, and satisfy ``T_mn = T_m T_n`` for coprime
``m, n`` and ``T_(p^(r+1)) = T_p T_(p^r) - chi(p) p^(k-1) T_(p^(r-1))`` (docs/method.md#hecke).

The decisions of eigenform claims built on these operators are in
:mod:`verifier.claims.eigenform`.
"""

from __future__ import annotations

import math
from fractions import Fraction
from typing import Any, Literal

from flint import fmpq, fmpq_poly

from verifier.numbers import QuadraticCharacter, prime_factors
from verifier.series.qseries import QSeries, to_fmpq

Weight = Fraction | int
Status = Literal["proved", "refuted"]


# ---------------------------------------------------------------------------
# Checking the data
# ---------------------------------------------------------------------------


def _integral_weight(weight: Weight) -> int:
    w = Fraction(weight)
    if w.denominator == 2:
        raise NotImplementedError(
            f"Hecke operators in half-integral weight {w} (the operators T_(p^2)) are not implemented"
        )
    if w.denominator != 1:
        raise ValueError(f"the weight of a modular form is an integer or a half-integer, not {w}")
    return int(w)


def _positive(name: str, value: int) -> None:
    if isinstance(value, bool) or not isinstance(value, int) or value < 1:
        raise ValueError(f"{name} must be a positive integer, got {value!r}")


def _character(kernel: int, level: int, k: int) -> QuadraticCharacter:
    """The quadratic character with this kernel, checked to be a character mod N of parity (-1)^k."""
    _positive("the level", level)
    chi = QuadraticCharacter(kernel)
    if level % chi.conductor:
        raise ValueError(f"{chi.name} has conductor {chi.conductor}, which does not divide the level {level}")
    if chi.is_even != (k % 2 == 0):
        parity = "even" if chi.is_even else "odd"
        raise ValueError(
            f"{chi.name} is {parity} but the weight {k} is {'even' if k % 2 == 0 else 'odd'}: "
            f"M_{k}(Gamma0({level}), {chi.name}) is 0 (a form needs chi(-1) = (-1)^k)"
        )
    return chi


def nebentypus(kernel: int, level: int, d: int) -> int:
    """``chi(d)`` for the character mod N with this kernel: ``(D/d)`` if ``gcd(d, N) = 1``, else 0."""
    if math.gcd(d, level) != 1:
        return 0
    return QuadraticCharacter(kernel).value(d)


def operator_name(n: int, level: int) -> str:
    """``U_n`` when every prime of ``n`` divides ``N`` (there ``T_n = U_n``), else ``T_n``."""
    if n > 1 and all(level % p == 0 for p in prime_factors(n)):
        return f"U_{n}"
    return f"T_{n}"


def required_input_precision(n: int, prec: int) -> int:
    """How far f must be known for ``T_n f + O(q^prec)``: ``n (prec - 1) + 1`` (``a_m(T_n f)`` uses ``a_(mn)``)."""
    return max(n * (prec - 1) + 1, 0)


def _divisor_weights(n: int, k: int, kernel: int, level: int) -> list[tuple[int, Any]]:
    """The pairs ``(d, chi(d) d^(k-1))`` for the divisors d of n with ``chi(d) != 0``."""
    out: list[tuple[int, Any]] = []
    for d in range(1, n + 1):
        if n % d:
            continue
        c = nebentypus(kernel, level, d)
        if c:
            out.append((d, to_fmpq(c * Fraction(d) ** (k - 1))))
    return out


def hecke(series: QSeries, n: int, weight: Weight, kernel: int, level: int, prec: int) -> QSeries:
    """``T_n f + O(q^prec)`` for f in ``M_k(Gamma_0(N), chi)``, chi the quadratic character with this kernel.

    ``a_m(T_n f) = sum_{d | gcd(m, n)} chi(d) d^(k-1) a_(mn/d^2)`` with ``chi(d) = 0`` when
    ``gcd(d, N) > 1`` (so ``T_p = U_p`` for ``p | N``). The input must be known to
    :func:`required_input_precision` ``(n, prec)`` and be holomorphic at infinity (no negative
    exponents). Raises ValueError for bad data, NotImplementedError for half-integral weight.
    """
    k = _integral_weight(weight)
    _positive("n", n)
    _character(kernel, level, k)
    if prec <= 0:
        return QSeries(fmpq_poly([]), prec, prec)
    if series.offset < 0 and not series.is_zero():
        raise ValueError(
            f"T_{n} is applied here to series without negative powers of q; this one starts at q^{series.offset}"
        )
    need = required_input_precision(n, prec)
    if series.prec < need:
        raise ValueError(
            f"{operator_name(n, level)} f to O(q^{prec}) needs f known to O(q^{need}) "
            f"(a_m(T_n f) involves a_(mn) for m <= {prec - 1}), but f is known only to O(q^{series.prec})"
        )
    coeffs = series.poly.coeffs()
    offset = series.offset
    zero = fmpq(0)

    def a(i: int) -> Any:
        j = i - offset
        return coeffs[j] if 0 <= j < len(coeffs) else zero

    weights = _divisor_weights(n, k, kernel, level)
    out: list[Any] = []
    for m in range(prec):
        total = fmpq(0)
        for d, w in weights:
            if m % d == 0:
                total += w * a(m * n // (d * d))
        out.append(total)
    return QSeries(fmpq_poly(out), 0, prec)


__all__ = [
    "hecke",
    "nebentypus",
    "operator_name",
    "required_input_precision",
]

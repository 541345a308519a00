"""Eisenstein series with (quadratic) characters, E_k^{psi, phi} (docs/method.md#eisenstein-characters).

For primitive characters psi mod u and phi mod v with psi(-1) phi(-1) = (-1)^k,
    E_k^{psi,phi} = delta(psi) L(1-k, phi) [+ delta(phi) L(0, psi) when k = 1]
                    + 2 sum_{n>=1} sigma^{psi,phi}_{k-1}(n) q^n,
    sigma^{psi,phi}_{k-1}(n) = sum_{d | n} psi(n/d) phi(d) d^{k-1},
    L(1-k, phi) = -B_{k,phi}/k,  B_{k,phi} = v^{k-1} sum_{a=1}^{v} phi(a) B_k(a/v),
and E_k^{psi,phi}(t tau) lies in M_k(Gamma_0(u v t), psi phi), except k = 2, psi = phi = 1.
Only quadratic characters (Kronecker symbols of fundamental discriminants) occur here.
"""

from __future__ import annotations

from fractions import Fraction

from flint import fmpq, fmpq_poly

from verifier.numbers import QuadraticCharacter
from verifier.series.qseries import QSeries, fmpq_to_fraction


def generalised_bernoulli(k: int, phi: QuadraticCharacter) -> Fraction:
    """B_{k, phi} for a primitive character phi (B_{k, 1} = B_k with B_1 = +1/2).

    See docs/method.md#eisenstein-characters.
    """
    v = phi.conductor
    poly = fmpq_poly.bernoulli_poly(k)
    total = Fraction(0)
    for a in range(1, v + 1):
        c = phi.value(a) if v > 1 else 1
        if c:
            total += c * fmpq_to_fraction(poly(fmpq(a, v)))
    return total * Fraction(v) ** (k - 1)


def constant_term(k: int, psi: QuadraticCharacter, phi: QuadraticCharacter) -> Fraction:
    """The constant term delta(psi) L(1-k, phi) (+ delta(phi) L(0, psi) for k = 1)."""
    c = Fraction(0)
    if psi.is_trivial:
        c += -generalised_bernoulli(k, phi) / k
    if k == 1 and phi.is_trivial:
        c += -generalised_bernoulli(1, psi)
    return c


def is_defined(k: int, psi: QuadraticCharacter, phi: QuadraticCharacter) -> bool:
    """Whether E_k^{psi,phi} is a modular form: parity, k >= 1, and not (k = 2, psi = phi = 1)."""
    parity_ok = (psi.is_even == phi.is_even) == (k % 2 == 0)
    return k >= 1 and parity_ok and not (k == 2 and psi.is_trivial and phi.is_trivial)


def eisenstein_character_series(k: int, psi: QuadraticCharacter, phi: QuadraticCharacter, prec: int) -> QSeries:
    """E_k^{psi,phi} + O(q^prec), exactly."""
    coeffs: list[Fraction] = [constant_term(k, psi, phi)]
    for n in range(1, max(prec, 1)):
        s = 0
        for d in _divisors(n):
            s += psi.value(n // d) * phi.value(d) * d ** (k - 1)
        coeffs.append(Fraction(2 * s))
    return QSeries.from_coefficients(coeffs[: max(prec, 0)], 0, prec)


def _divisors(n: int) -> list[int]:
    small = [d for d in range(1, int(n**0.5) + 1) if n % d == 0]
    return sorted(set(small + [n // d for d in small]))


__all__ = ["constant_term", "eisenstein_character_series", "generalised_bernoulli", "is_defined"]

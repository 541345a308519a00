"""Eta quotients prod_delta eta(delta tau)^{r_delta} on Gamma_0(N) (docs/method.md#eta-theta).

With ``eta(tau) = q^{1/24} prod_{n >= 1} (1 - q^n)``, an eta quotient is

    f = q^{s/24} P(q),    P(q) = prod_delta prod_{n >= 1} (1 - q^{delta n})^{r_delta},
    s = sum_delta delta r_delta,    weight k = (sum_delta r_delta) / 2          (docs/method.md#eta-offset).

This module keeps ``P`` (an integer power series with constant term 1) apart from the
fractional prefactor ``q^{s/24}``, and supplies the modular data needed to prove
identities between such quotients:

* the least level N at which the Gordon-Hughes-Newman conditions hold (docs/method.md#eta-modularity);
* the quadratic character of the transformation law (docs/method.md#eta-modularity);
* Ligozat's orders at the cusps of Gamma_0(N) (docs/method.md#ligozat), hence holomorphy
  (docs/method.md#eta-modularity);
* for odd ``sum r_delta`` (half-integral weight) the same data read off ``f theta``,
  ``theta = eta(2tau)^5 / (eta(tau)^2 eta(4tau)^2)``, as in docs/method.md#half-integral-weight, #eta-half-integral.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from flint import fmpz_poly

from verifier import numbers
from verifier.forms.delta import euler_product
from verifier.numbers import QuadraticCharacter, prime_factors
from verifier.series.qseries import QSeries


@dataclass(frozen=True)
class EtaQuotient:
    """``prod eta(delta tau)^{r}`` over the pairs ``(delta, r)`` of ``exponents``.

    ``exponents`` is sorted by ``delta``, every ``delta`` is a positive integer occurring
    once, and every ``r`` is a nonzero integer.  The empty tuple is the constant 1.
    Build instances with :meth:`of` unless the pairs are already normalised.
    """

    exponents: tuple[tuple[int, int], ...]

    def __post_init__(self) -> None:
        previous = 0
        for delta, r in self.exponents:
            if not _is_int(delta) or not _is_int(r):
                raise TypeError(f"eta quotient exponents must be integer pairs, got {(delta, r)!r}")
            if delta < 1:
                raise ValueError(f"eta(delta tau) needs a positive integer delta, got {delta}")
            if delta <= previous:
                raise ValueError("eta quotient exponents must be sorted by delta without repetition")
            if r == 0:
                raise ValueError(f"exponent of eta({delta}tau) is 0; leave it out")
            previous = delta

    # -- construction -----------------------------------------------------------
    @classmethod
    def of(cls, mapping: Mapping[int, int] | Iterable[tuple[int, int]]) -> EtaQuotient:
        """The quotient with exponent ``r`` at ``delta`` for each entry (zero exponents dropped).

        Repeated ``delta`` (possible when pairs are given) add up.
        """
        pairs = mapping.items() if isinstance(mapping, Mapping) else mapping
        total: dict[int, int] = {}
        for delta, r in pairs:
            if not _is_int(delta) or not _is_int(r):
                raise TypeError(f"eta quotient exponents must be integer pairs, got {(delta, r)!r}")
            if delta < 1:
                raise ValueError(f"eta(delta tau) needs a positive integer delta, got {delta}")
            total[delta] = total.get(delta, 0) + r
        return cls(tuple(sorted((d, r) for d, r in total.items() if r != 0)))

    @classmethod
    def theta(cls) -> EtaQuotient:
        """``theta = sum_n q^{n^2} = eta(2tau)^5 / (eta(tau)^2 eta(4tau)^2)`` (docs/method.md#theta-nome)."""
        return cls(((1, -2), (2, 5), (4, -2)))

    def __mul__(self, other: EtaQuotient) -> EtaQuotient:
        """Product: exponents add (eta quotients form a free abelian group on the deltas)."""
        if not isinstance(other, EtaQuotient):
            return NotImplemented
        return EtaQuotient.of([*self.exponents, *other.exponents])

    def __truediv__(self, other: EtaQuotient) -> EtaQuotient:
        """Quotient: exponents subtract."""
        if not isinstance(other, EtaQuotient):
            return NotImplemented
        return self * other ** (-1)

    def __pow__(self, e: int) -> EtaQuotient:
        """Integer power: every exponent multiplied by ``e``."""
        if not _is_int(e):
            raise TypeError("eta quotients are raised to integer powers only")
        return EtaQuotient.of([(d, r * e) for d, r in self.exponents])

    def scaled(self, t: int) -> EtaQuotient:
        """``f(t tau)``: every delta multiplied by ``t``."""
        if not _is_int(t) or t < 1:
            raise ValueError(f"tau -> t tau needs a positive integer t, got {t!r}")
        return EtaQuotient(tuple((d * t, r) for d, r in self.exponents))

    # -- basic invariants -------------------------------------------------------
    @property
    def weight(self) -> Fraction:
        """k = (sum r_delta) / 2."""
        return Fraction(sum(r for _, r in self.exponents), 2)

    @property
    def is_half_integral(self) -> bool:
        """True when ``sum r_delta`` is odd (weight in 1/2 + Z)."""
        return self.weight.denominator == 2

    @property
    def s(self) -> int:
        """``s = sum delta r_delta``; the quotient is ``q^{s/24}`` times :meth:`product_series`."""
        return sum(d * r for d, r in self.exponents)

    @property
    def offset(self) -> Fraction:
        """The q-exponent ``s/24`` of the leading term (the order at infinity)."""
        return Fraction(self.s, 24)

    @property
    def lcm_delta(self) -> int:
        """L = lcm of the deltas (1 for the empty quotient); every admissible level is a multiple."""
        return math.lcm(*(d for d, _ in self.exponents)) if self.exponents else 1

    def label(self) -> str:
        """How the quotient is written in messages, e.g. ``eta(tau)^2 eta(11tau)^2``."""
        if not self.exponents:
            return "1"
        parts = []
        for d, r in self.exponents:
            arg = "tau" if d == 1 else f"{d}tau"
            parts.append(f"eta({arg})" if r == 1 else f"eta({arg})^{r}" if r > 0 else f"eta({arg})^({r})")
        return " ".join(parts)

    def __str__(self) -> str:
        return self.label()

    # -- q-expansions -------------------------------------------------------------
    def product_poly(self, prec: int) -> Any:
        """``P(q) mod q^prec`` as an ``fmpz_poly`` (P is the product without ``q^{s/24}``).

        The factors with ``r > 0`` and those with ``r < 0`` are multiplied out separately,
        each ``prod_n (1 - q^{delta n})^{|r|}`` as a power of Euler's pentagonal series in
        ``x = q^delta`` inflated to ``q``.  Both products have small integer coefficients,
        so this is cheap.  The quotient then costs a Newton inverse of the denominator to
        half the precision (exact over Z, its constant term being 1) and one Newton step
        for the quotient itself (:func:`_unit_quotient`).  Inverting the whole denominator
        at once is cheaper than inverting ``f_1`` and raising the inverse (whose
        coefficients are large) to a power.
        """
        if prec <= 0:
            return fmpz_poly([])
        top, bottom = self.product_parts(prec)
        if bottom == 1:
            return top
        return _unit_inverse(bottom, prec) if top == 1 else _unit_quotient(top, bottom, prec)

    def product_parts(self, prec: int) -> tuple[Any, Any]:
        """``(prod_{r > 0} f_delta^r, prod_{r < 0} f_delta^{-r}) mod q^prec`` as ``fmpz_poly``.

        ``P`` is the first divided by the second; both have small integer coefficients.
        """
        top = fmpz_poly([1])
        bottom = fmpz_poly([1])
        if prec <= 0 or not self.exponents:
            return (top if prec > 0 else fmpz_poly([])), bottom
        euler = euler_product(-(-prec // self.exponents[0][0]))
        for delta, r in self.exponents:
            m = -(-prec // delta)  # terms x^n with delta * n < prec
            base = euler.truncate(m)
            factor = base if abs(r) == 1 else base.pow_trunc(abs(r), m)
            if delta > 1:
                factor = factor.inflate(delta).truncate(prec)
            if r > 0:
                top = top.mul_low(factor, prec)
            else:
                bottom = bottom.mul_low(factor, prec)
        return top, bottom

    def product_series(self, prec: int) -> QSeries:
        """``prod_delta prod_n (1 - q^{delta n})^{r_delta} + O(q^prec)``, without ``q^{s/24}``."""
        return QSeries.from_integer_poly(self.product_poly(prec), 0, max(prec, 0))

    def series(self, prec: int) -> QSeries:
        """The quotient itself, ``q^{s/24} P(q) + O(q^prec)``; needs ``24 | s``.

        ``prec`` is an absolute exponent: every coefficient of ``q^n``, ``n < prec``, is exact.
        When ``24`` does not divide ``s``, rescale first (:meth:`scaled`, docs/method.md#eta-offset).
        """
        if self.s % 24:
            raise ValueError(f"{self.label()} has the fractional q-offset {self.offset}; rescale tau -> t tau first")
        e = self.s // 24
        return QSeries.from_integer_poly(self.product_poly(prec - e), e, prec)

    # -- level (docs/method.md#eta-modularity, #eta-half-integral) ----------------------------
    def modularity_failure(self) -> str | None:
        """Why no level Gamma_0(N) works, in words; None when some level does.

        The only obstruction is the first Gordon-Hughes-Newman congruence
        ``sum delta r_delta = 0 mod 24`` (docs/method.md#eta-modularity): the second one can always be met by
        enlarging N.  For half-integral weight the test is applied to ``f theta``, whose
        ``s`` is the same since ``theta`` has ``s = 2*5 - 1*2 - 4*2 = 0``.
        """
        if self.s % 24:
            return f"sum of delta*r_delta = {self.s} is not divisible by 24"
        return None

    def least_level(self) -> int | None:
        """Least N for which the GHN conditions hold (docs/method.md#eta-modularity); None if there is none.

        Integral weight: ``N = L * 24 / gcd(24, S)`` with ``L = lcm(delta)`` and
        ``S = sum (L/delta) r_delta``.  Half-integral weight (docs/method.md#eta-half-integral): the least level of
        ``f theta``, made a multiple of 4 (Shimura's setting, §3.6).
        """
        if self.modularity_failure() is not None:
            return None
        if self.is_half_integral:
            return math.lcm((self * EtaQuotient.theta())._ghn_least_level(), 4)
        return self._ghn_least_level()

    def _ghn_least_level(self) -> int:
        big_l = self.lcm_delta
        big_s = sum((big_l // d) * r for d, r in self.exponents)
        return big_l * (24 // math.gcd(24, big_s))

    def level_failure(self, level: int) -> str | None:
        """Why the GHN criterion does not apply on Gamma_0(level), in words; None if it does.

        Conditions (docs/method.md#eta-modularity): every delta divides N, ``sum delta r = 0 mod 24`` and
        ``sum (N/delta) r = 0 mod 24``; for half-integral weight also ``4 | N`` and the
        conditions for ``f theta`` -- the same congruences, since ``theta`` contributes
        ``N(5/2 - 2 - 1/2) = 0`` to the second sum.  (The test ``4 | N`` is a safeguard: for
        odd ``sum r`` the congruences already force it.  If ``N = 2M`` with M odd, then mod 2
        ``s`` is the sum of r over odd delta and ``sum (N/delta) r`` the sum over the other
        delta, so both even means ``sum r`` even; for odd N, ``sum (N/delta) r = sum r mod 2``.)
        """
        if not _is_int(level) or level < 1:
            return f"level {level!r} is not a positive integer"
        bad = [d for d, _ in self.exponents if level % d]
        if bad:
            return f"eta({bad[0]}tau) occurs but {bad[0]} does not divide the level {level}"
        reason = self.modularity_failure()
        if reason is not None:
            return reason
        if self.is_half_integral and level % 4:
            return f"half-integral weight needs a level divisible by 4, not {level}"
        t = sum((level // d) * r for d, r in self.exponents)
        if t % 24:
            return f"sum of (N/delta)*r_delta = {t} is not divisible by 24 for N = {level}"
        return None

    def _require_level(self, level: int) -> None:
        reason = self.level_failure(level)
        if reason is not None:
            raise ValueError(f"{self.label()} is not modular on Gamma0({level}): {reason}")

    # -- character (docs/method.md#eta-modularity, #eta-half-integral) ------------------------
    def character(self, level: int) -> QuadraticCharacter:
        """The character chi with ``f(gamma tau) = chi(d) (c tau + d)^k f(tau)`` on Gamma_0(level).

        Integral weight (Gordon-Hughes-Newman, docs/method.md#eta-modularity):
        ``chi(d) = ((-1)^k prod delta^{|r|} / d)``.
        Half-integral weight (§4.6): Shimura's character ``chi_{f theta} chi_{-4}^{lambda+1}``
        with ``k = lambda + 1/2``, i.e. ``f(gamma tau) = chi(d) j(gamma, tau)^{2 lambda + 1} f(tau)``.
        Raises ValueError when ``level`` is not admissible (:meth:`level_failure`).
        """
        self._require_level(level)
        if not self.is_half_integral:
            return self._ghn_character()
        chi = (self * EtaQuotient.theta())._ghn_character()
        lam_plus_1 = self.weight + Fraction(1, 2)  # lambda + 1, an integer
        return chi * QuadraticCharacter.from_integer(-4) ** int(lam_plus_1)

    def _ghn_character(self) -> QuadraticCharacter:
        # (a/d) with a = (-1)^k prod delta^{|r|}.  Every prime of a divides N, and d is prime
        # to N, so squares of those primes can be dropped: (a m^2 / d) = (a/d).  What is left
        # is (-1)^k times the squarefree part of prod_{r odd} delta.
        k = self.weight
        assert k.denominator == 1
        odd_primes: dict[int, int] = {}
        for d, r in self.exponents:
            if r % 2:
                for p in prime_factors(d):
                    e = numbers.valuation(d, p)
                    odd_primes[p] = odd_primes.get(p, 0) + e
        core = math.prod(p for p, e in odd_primes.items() if e % 2)
        sign = -1 if int(k) % 2 else 1
        return QuadraticCharacter.from_integer(sign * core)

    # -- cusps (docs/method.md#ligozat, #eta-modularity) -------------------------------------------------------
    def order_at_cusp(self, d: int, level: int) -> Fraction:
        """Ligozat's order of f at a cusp ``c/d`` of Gamma_0(level), in the local parameter.

        ``v_d = (N/24) sum_delta gcd(d, delta)^2 r_delta / (gcd(d, N/d) d delta)``  (docs/method.md#ligozat):
        eta(delta tau) has q-order ``gcd(d, delta)^2 / (24 delta)`` at c/d, and the local
        parameter there is ``q^{1/h}`` with width ``h = N / (d gcd(d, N/d))``.  It depends only
        on d; at infinity (d = N) it is ``s/24``.  Valid for d | N and every delta | N.
        The same formula is used for half-integral weight (orders may be quarters).
        """
        if not _is_int(level) or level < 1:
            raise ValueError(f"level must be a positive integer, got {level!r}")
        if not _is_int(d) or d < 1 or level % d:
            raise ValueError(f"cusp denominator {d!r} does not divide the level {level}")
        bad = [delta for delta, _ in self.exponents if level % delta]
        if bad:
            raise ValueError(f"eta({bad[0]}tau) occurs but {bad[0]} does not divide the level {level}")
        g = math.gcd(d, level // d)
        total = sum((Fraction(math.gcd(d, delta) ** 2 * r, delta) for delta, r in self.exponents), Fraction(0))
        return Fraction(level, 24 * g * d) * total

    def orders(self, level: int) -> dict[int, Fraction]:
        """``{d: order at the cusps c/d}`` for every divisor d of ``level`` (increasing d).

        There are ``phi(gcd(d, N/d))`` inequivalent cusps with denominator d (docs/method.md#cusps);
        all have the same order.
        """
        return {d: self.order_at_cusp(d, level) for d in numbers.divisors(level)}

    def is_holomorphic(self, level: int) -> bool:
        """All cusp orders >= 0 on Gamma_0(level) (eta quotients have no zeros or poles in H)."""
        return all(v >= 0 for v in self.orders(level).values())

    def is_cusp_form(self, level: int) -> bool:
        """All cusp orders > 0 on Gamma_0(level)."""
        return all(v > 0 for v in self.orders(level).values())


# -- helpers -----------------------------------------------------------------------


def _is_int(x: object) -> bool:
    return isinstance(x, int) and not isinstance(x, bool)


def _unit_inverse(f: Any, m: int) -> Any:
    """``1/f mod x^m`` for an ``fmpz_poly`` with ``f(0) = 1``, by Newton iteration over Z.

    For ``f = prod(1 - x^n)`` this is the partition generating function ``sum p(n) x^n``.
    With ``g = 1/f mod x^k`` the error ``1 - f g`` starts at ``x^k``; the step
    ``g <- g + x^k g (1 - f g) / x^k mod x^{2k}`` doubles the number of correct terms and
    only multiplies ``g`` by the ``n - k`` error terms (not by a full-length series).
    Since ``f(0) = 1`` it never leaves Z[x].
    """
    assert f[0] == 1
    g = fmpz_poly([1])
    k = 1
    while k < m:
        n = min(2 * k, m)
        err = f.truncate(n).mul_low(g, n).right_shift(k)  # coefficients k .. n-1 of f g
        g -= g.mul_low(err, n - k).left_shift(k)
        k = n
    return g.truncate(m)


def _unit_quotient(top: Any, bottom: Any, m: int) -> Any:
    """``top / bottom mod x^m`` for ``fmpz_poly`` with ``bottom(0) = 1``, exact over Z.

    The last Newton step of the inverse is merged with the multiplication by ``top``
    (Karp and Markstein, "High-precision division and square root", ACM TOMS 23 (1997)):
    with ``g = 1/bottom mod x^k``, ``k = ceil(m/2)``, and ``y0 = top g mod x^k`` (the first
    k terms of the quotient), the remainder ``top - bottom y0`` vanishes below ``x^k`` and

        top / bottom = y0 + x^k g ((top - bottom y0) / x^k)   mod x^m,

    since ``g`` is exact to ``x^k`` and the correction is needed only to ``x^(m-k)``.  This
    replaces a full-length inverse step and a full-length product of two series with
    large coefficients by a full-length product of ``bottom`` (small coefficients) with
    ``y0`` and two half-length products.
    """
    assert bottom[0] == 1
    if m <= 32:
        return _unit_inverse(bottom, m).mul_low(top, m)
    k = (m + 1) // 2
    g = _unit_inverse(bottom, k)
    y0 = g.mul_low(top, k)
    rest = (top.truncate(m) - bottom.truncate(m).mul_low(y0, m)).right_shift(k)
    return y0 + g.mul_low(rest, m - k).left_shift(k)

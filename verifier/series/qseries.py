"""Truncated Laurent series in q with exact rational coefficients.

A :class:`QSeries` stands for ``sum_{n >= offset} a_n q^n + O(q^prec)``: every
coefficient with exponent below ``prec`` is known exactly, nothing above it is.
Coefficients live in a python-flint ``fmpq_poly`` (FLINT stores it as an integer
polynomial over one common denominator, so rational series cost little more than
integer ones).  The offset is always the true valuation of the known part, so
precision bookkeeping in products and quotients is exact: multiplying by a series of
valuation ``v`` shifts the known range by ``v``, and dividing by it loses ``v``.

All operations are truncated (``mul_low``, ``pow_trunc``); nothing is ever computed
beyond the requested precision.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any

from flint import fmpq, fmpq_poly, fmpz_poly

Rational = Fraction | int


def to_fmpq(value: Rational | Any) -> Any:
    """Convert an int, Fraction or flint number to ``fmpq``."""
    if isinstance(value, Fraction):
        return fmpq(value.numerator, value.denominator)
    return fmpq(value)


def fmpq_to_fraction(value: Any) -> Fraction:
    """Convert a flint ``fmpq``/``fmpz`` to a Python ``Fraction``."""
    q = fmpq(value)
    return Fraction(int(q.p), int(q.q))


class PrecisionError(ArithmeticError):
    """A coefficient outside the known range of a series was asked for."""


class QSeries:
    """``sum a_n q^n`` known exactly for ``n < prec``; see the module docstring."""

    __slots__ = ("offset", "poly", "prec")

    def __init__(self, poly: Any, offset: int, prec: int) -> None:
        if not isinstance(poly, fmpq_poly):
            poly = fmpq_poly(poly)
        # Normalise: drop what is beyond the precision, then move leading zeros into
        # the offset so that ``offset`` is the valuation of the known part.
        length = prec - offset
        if length <= 0:
            self.poly = fmpq_poly([])
            self.offset = prec
            self.prec = prec
            return
        if poly.degree() >= length:
            poly = poly.truncate(length)
        shift = 0
        if poly.is_zero():
            shift = length
        else:
            while poly[shift] == 0:
                shift += 1
            if shift:
                poly = poly.right_shift(shift)
        self.poly = poly
        self.offset = offset + shift
        self.prec = prec

    # -- construction -----------------------------------------------------------
    @classmethod
    def from_coefficients(cls, coeffs: list[Any], offset: int = 0, prec: int | None = None) -> QSeries:
        """Series with ``a_{offset+i} = coeffs[i]``, exact up to ``prec`` (default: all given)."""
        if prec is None:
            prec = offset + len(coeffs)
        return cls(fmpq_poly([to_fmpq(c) for c in coeffs]), offset, prec)

    @classmethod
    def from_integer_poly(cls, poly: Any, offset: int, prec: int) -> QSeries:
        """Wrap an ``fmpz_poly`` (coefficient i is ``a_{offset+i}``)."""
        return cls(fmpq_poly(poly), offset, prec)

    @classmethod
    def constant(cls, value: Rational | Any, prec: int) -> QSeries:
        """The constant series ``value + O(q^prec)``."""
        return cls(fmpq_poly([to_fmpq(value)]), 0, prec)

    @classmethod
    def monomial(cls, exponent: int, prec: int, coefficient: Rational = 1) -> QSeries:
        """``coefficient * q^exponent + O(q^prec)``."""
        return cls(fmpq_poly([to_fmpq(coefficient)]), exponent, prec)

    # -- inspection -------------------------------------------------------------
    def is_zero(self) -> bool:
        """True when every known coefficient is 0."""
        return bool(self.poly.is_zero())

    @property
    def valuation(self) -> int:
        """Exponent of the first nonzero known coefficient (``prec`` if there is none)."""
        return self.offset

    def __getitem__(self, n: int) -> Fraction:
        """The exact coefficient of ``q^n``; raises :class:`PrecisionError` if unknown."""
        if n >= self.prec:
            raise PrecisionError(f"coefficient of q^{n} asked of a series known below q^{self.prec}")
        if n < self.offset:
            return Fraction(0)
        return fmpq_to_fraction(self.poly[n - self.offset])

    def coefficients(self, start: int, stop: int) -> list[Fraction]:
        """Exact coefficients of ``q^start .. q^(stop-1)``."""
        if stop > self.prec:
            raise PrecisionError(f"coefficients up to q^{stop - 1} asked of a series known below q^{self.prec}")
        return [self[n] for n in range(start, stop)]

    def truncate(self, prec: int) -> QSeries:
        """The same series with precision lowered to ``prec``."""
        if prec >= self.prec:
            return self
        return QSeries(self.poly, self.offset, prec)

    def first_difference(self, other: QSeries, start: int, stop: int) -> int | None:
        """Least ``n`` in ``[start, stop)`` where the two series differ, else None."""
        diff = self - other
        if diff.prec < stop:
            raise PrecisionError("series not known far enough to compare")
        for n in range(max(start, diff.offset), stop):
            if diff[n] != 0:
                return n
        return None

    # -- arithmetic -------------------------------------------------------------
    def _aligned(self, other: QSeries) -> tuple[Any, Any, int, int]:
        offset = min(self.offset, other.offset)
        prec = min(self.prec, other.prec)
        a = self.poly.left_shift(self.offset - offset) if self.offset > offset else self.poly
        b = other.poly.left_shift(other.offset - offset) if other.offset > offset else other.poly
        return a, b, offset, prec

    def __add__(self, other: QSeries) -> QSeries:
        a, b, offset, prec = self._aligned(other)
        return QSeries(a + b, offset, prec)

    def __sub__(self, other: QSeries) -> QSeries:
        a, b, offset, prec = self._aligned(other)
        return QSeries(a - b, offset, prec)

    def __neg__(self) -> QSeries:
        return QSeries(-self.poly, self.offset, self.prec)

    def scale(self, c: Rational | Any) -> QSeries:
        """``c * self`` for a rational constant ``c``."""
        c = to_fmpq(c)
        if c == 0:
            return QSeries(fmpq_poly([]), self.prec, self.prec)
        return QSeries(self.poly * c, self.offset, self.prec)

    def __mul__(self, other: QSeries) -> QSeries:
        offset = self.offset + other.offset
        # a = q^u (A + O(q^r)), b = q^v (B + O(q^s))  =>  ab = q^(u+v) (AB + O(q^min(r,s))).
        prec = min(self.prec + other.offset, other.prec + self.offset)
        length = prec - offset
        if length <= 0:
            return QSeries(fmpq_poly([]), prec, prec)
        return QSeries(self.poly.mul_low(other.poly, length), offset, prec)

    def __pow__(self, e: int) -> QSeries:
        if e < 0:
            return self.inverse() ** (-e)
        if e == 0:
            return QSeries.constant(1, self.prec - self.offset)
        if self.is_zero():
            prec = self.prec * e if self.prec > 0 else self.prec
            return QSeries(fmpq_poly([]), prec, prec)
        rel = self.prec - self.offset
        return QSeries(self.poly.pow_trunc(e, rel), self.offset * e, self.offset * e + rel)

    def inverse(self) -> QSeries:
        """``1/self``; the leading known coefficient must be nonzero."""
        if self.is_zero():
            raise ZeroDivisionError("division by a series whose known coefficients are all 0")
        rel = self.prec - self.offset
        return QSeries(_inverse_poly(self.poly, rel), -self.offset, rel - self.offset)

    def __truediv__(self, other: QSeries) -> QSeries:
        return self * other.inverse()

    def qderiv(self) -> QSeries:
        """``D = q d/dq``: the coefficient of q^n is multiplied by n."""
        coeffs = self.poly.coeffs()
        return QSeries(fmpq_poly([c * (self.offset + i) for i, c in enumerate(coeffs)]), self.offset, self.prec)

    def inflate(self, d: int) -> QSeries:
        """``f(d tau)``: the series with ``q`` replaced by ``q^d``."""
        if d == 1:
            return self
        coeffs = self.poly.coeffs()
        spread: list[Any] = [0] * ((len(coeffs) - 1) * d + 1 if coeffs else 0)
        for i, c in enumerate(coeffs):
            spread[i * d] = c
        return QSeries(fmpq_poly(spread), self.offset * d, self.prec * d)

    def __repr__(self) -> str:
        terms = [f"{self[n]}*q^{n}" for n in range(self.offset, min(self.prec, self.offset + 6)) if self[n]]
        return f"QSeries({' + '.join(terms) or '0'} + O(q^{self.prec}))"


def _inverse_poly(f: Any, n: int) -> Any:
    """``1/f mod x^n`` by Newton iteration (f(0) must be nonzero).

    Each step doubles the number of correct terms: g <- g (2 - f g).
    """
    c0 = f[0]
    g = fmpq_poly([1 / fmpq(c0)])
    k = 1
    two = fmpq_poly([2])
    while k < n:
        k = min(2 * k, n)
        g = g.mul_low(two - f.mul_low(g, k), k)
    return g.truncate(n) if n > 0 else fmpq_poly([])


def integer_poly(coeffs: list[int]) -> Any:
    """An ``fmpz_poly`` from Python ints (helper for atom builders)."""
    return fmpz_poly(coeffs)

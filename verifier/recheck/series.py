"""Truncated Laurent series with Fraction coefficients, multiplied by schoolbook convolution.

A :class:`Series` knows the exponent of its first stored coefficient (``lo``, always a
nonzero coefficient or the precision itself) and its absolute precision ``prec``: every
coefficient below ``prec`` is exact, nothing at or above it is known.
"""

from __future__ import annotations

from fractions import Fraction


class Unknown(Exception):
    """A coefficient beyond the precision was asked for, or a division by a series with no known nonzero term."""


class Series:
    """sum c_i q^(lo + i) + O(q^prec)."""

    __slots__ = ("coeffs", "lo", "prec")

    def __init__(self, lo: int, coeffs: list[Fraction], prec: int) -> None:
        coeffs = coeffs[: max(prec - lo, 0)]
        i = 0
        while i < len(coeffs) and coeffs[i] == 0:
            i += 1
        self.lo = lo + i if i < len(coeffs) else prec
        self.coeffs = coeffs[i:] if i < len(coeffs) else []
        self.prec = prec

    @classmethod
    def constant(cls, c: Fraction, prec: int) -> Series:
        """The constant c to precision ``prec``."""
        return cls(0, [Fraction(c)], prec) if prec > 0 else cls(prec, [], prec)

    @classmethod
    def monomial(cls, n: int, c: Fraction, prec: int) -> Series:
        """c q^n to precision ``prec``."""
        return cls(n, [Fraction(c)], prec)

    def __getitem__(self, n: int) -> Fraction:
        if n >= self.prec:
            raise Unknown(f"the coefficient of q^{n} is not known (precision {self.prec})")
        if n < self.lo:
            return Fraction(0)
        i = n - self.lo
        # Stored coefficients may stop before the precision (a constant, a monomial): the rest are 0.
        return self.coeffs[i] if i < len(self.coeffs) else Fraction(0)

    def is_zero(self) -> bool:
        """Whether every known coefficient is 0."""
        return not self.coeffs

    def window(self, start: int, stop: int) -> list[Fraction]:
        """Coefficients of q^start .. q^(stop-1)."""
        return [self[n] for n in range(start, stop)]

    def truncate(self, prec: int) -> Series:
        """The same series known only below ``prec``."""
        return Series(self.lo, list(self.coeffs), min(prec, self.prec))

    def __add__(self, other: Series) -> Series:
        lo, prec = min(self.lo, other.lo), min(self.prec, other.prec)
        out = [Fraction(0)] * max(prec - lo, 0)
        for s in (self, other):
            for i, c in enumerate(s.coeffs):
                n = s.lo + i
                if n < prec:
                    out[n - lo] += c
        return Series(lo, out, prec)

    def __neg__(self) -> Series:
        return Series(self.lo, [-c for c in self.coeffs], self.prec)

    def __sub__(self, other: Series) -> Series:
        return self + (-other)

    def scale(self, c: Fraction) -> Series:
        """c times the series."""
        return Series(self.lo, [c * x for x in self.coeffs], self.prec)

    def __mul__(self, other: Series) -> Series:
        lo = self.lo + other.lo
        prec = min(self.prec + other.lo, other.prec + self.lo)
        size = max(prec - lo, 0)
        out = [Fraction(0)] * size
        for i, a in enumerate(self.coeffs):
            if a == 0 or i >= size:
                continue
            for j in range(min(len(other.coeffs), size - i)):
                out[i + j] += a * other.coeffs[j]
        return Series(lo, out, prec)

    def power(self, e: int) -> Series:
        """The e-th power, e >= 0, by repeated squaring."""
        result = Series.constant(Fraction(1), self.prec - (e - 1) * self.lo if e else self.prec)
        base, first = self, True
        while e:
            if e & 1:
                result = base if first else result * base
                first = False
            e >>= 1
            if e:
                base = base * base
        return result

    def inverse(self) -> Series:
        """1 / series (its lowest known coefficient must be nonzero)."""
        if not self.coeffs:
            raise Unknown("division by a series with no known nonzero coefficient")
        u = self.coeffs
        r = self.prec - self.lo
        inv = [Fraction(0)] * r
        inv[0] = 1 / u[0]
        for n in range(1, r):
            acc = Fraction(0)
            for i in range(1, min(n, len(u) - 1) + 1):
                acc += u[i] * inv[n - i]
            inv[n] = -acc * inv[0]
        return Series(-self.lo, inv, r - self.lo)

    def __truediv__(self, other: Series) -> Series:
        return self * other.inverse()

    def qderiv(self) -> Series:
        """q d/dq."""
        return Series(self.lo, [c * (self.lo + i) for i, c in enumerate(self.coeffs)], self.prec)

    def inflate(self, d: int) -> Series:
        """The series in q^d."""
        out = [Fraction(0)] * (len(self.coeffs) * d)
        for i, c in enumerate(self.coeffs):
            out[i * d] = c
        return Series(self.lo * d, out, self.prec * d)

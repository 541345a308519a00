"""Brute-force truth for the reading corpus (``tests/data/manuscripts/styles/``).

This module must not import qreferee (``verifier``) or FLINT: it is the outside judge of
the corpus.  Every claim of the corpus has a *reading* here, keyed by its style and its
name (the tag's ``name=``, with ``.2``, ``.3`` for further rows of one tag, or
``untagged:LABEL`` for the editor's submission).  A reading gives both sides as
q-series (or as functions of n), built from plain Python integers and fractions:

* products by direct multiplication of the factors ``(1 - q^m)``;
* sums over Z by enumeration of the lattice points;
* Eisenstein series from divisor sums with the Bernoulli numbers of sympy;
* arithmetic functions by trial division and direct counting.

``truth(reading)`` compares the two sides through ``PREC`` coefficients (or through the
printed range of a printed expansion, or for ``n`` up to ``ARITH_N``): a claim whose sides
differ at some computed coefficient is false; a claim whose sides agree that far is taken
as true.  ``PREC`` is far above the Sturm bound of every space the corpus touches (weight
at most 14 on Gamma_0(N) with N <= 48: the bound k/12 [SL_2(Z):Gamma_0(N)] is at most
k/12 * 96 = 112 < PREC).  Beside each true claim the table names a published source; the
false claims are one-place mutations of true ones (a coefficient, a level, an exponent).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from fractions import Fraction
from functools import cache

import sympy

PREC = 160  # coefficients compared for identities of q-series
ARITH_N = 120  # n compared for claims about arithmetic functions


# -- truncated q-series with a rational leading exponent ---------------------------------


class S:
    """q^off * (c[0] + c[1] q + ... + c[PREC-1] q^(PREC-1) + O(q^PREC))."""

    __slots__ = ("c", "off")

    def __init__(self, c: list[Fraction], off: Fraction = Fraction(0)) -> None:
        self.c = (list(c) + [Fraction(0)] * PREC)[:PREC]
        self.off = Fraction(off)

    @staticmethod
    def lift(x: object) -> S:
        if isinstance(x, S):
            return x
        assert isinstance(x, int | Fraction), x
        return S([Fraction(x)])

    def _align(self, other: S) -> tuple[list[Fraction], list[Fraction], Fraction]:
        d = other.off - self.off
        assert d.denominator == 1, f"sides with exponents in different classes: {self.off}, {other.off}"
        k = int(d)
        if k >= 0:
            return self.c, [Fraction(0)] * k + other.c, self.off
        return [Fraction(0)] * (-k) + self.c, other.c, other.off

    def __add__(self, other: object) -> S:
        o = S.lift(other)
        a, b, off = self._align(o)
        return S([x + y for x, y in zip(a, b, strict=False)], off)

    __radd__ = __add__

    def __neg__(self) -> S:
        return S([-x for x in self.c], self.off)

    def __sub__(self, other: object) -> S:
        return self + (-S.lift(other))

    def __rsub__(self, other: object) -> S:
        return S.lift(other) - self

    def __mul__(self, other: object) -> S:
        if isinstance(other, int | Fraction):
            return S([x * other for x in self.c], self.off)
        assert isinstance(other, S)
        out = [Fraction(0)] * PREC
        a, b = self.c, other.c
        nz = [(i, x) for i, x in enumerate(a) if x]
        for j, y in enumerate(b):
            if y:
                for i, x in nz:
                    if i + j >= PREC:
                        break
                    out[i + j] += x * y
        return S(out, self.off + other.off)

    __rmul__ = __mul__

    def inverse(self) -> S:
        k = next(i for i, x in enumerate(self.c) if x)
        a = self.c[k:]
        out = [Fraction(0)] * PREC
        out[0] = 1 / a[0]
        for n in range(1, PREC):
            s = sum((a[i] * out[n - i] for i in range(1, min(n, len(a) - 1) + 1)), Fraction(0))
            out[n] = -s / a[0]
        return S(out, -(self.off + k))

    def __truediv__(self, other: object) -> S:
        if isinstance(other, int | Fraction):
            return self * (1 / Fraction(other))
        assert isinstance(other, S)
        return self * other.inverse()

    def __rtruediv__(self, other: object) -> S:
        return S.lift(other) * self.inverse()

    def __pow__(self, e: int) -> S:
        if e < 0:
            return self.inverse() ** (-e)
        out, base = S([Fraction(1)]), self
        while e:
            if e & 1:
                out = out * base
            e >>= 1
            if e:
                base = base * base
        return out

    def coeff(self, n: Fraction | int) -> Fraction:
        i = Fraction(n) - self.off
        if i.denominator != 1 or i < 0 or i >= PREC:
            return Fraction(0)
        return self.c[int(i)]


def series(f: Callable[[int], int | Fraction], start: int = 0) -> S:
    """sum_{n >= start} f(n) q^n."""
    return S([Fraction(f(n)) if n >= start else Fraction(0) for n in range(PREC)])


def qp(r: int | Fraction) -> S:
    """The monomial q^r."""
    return S([Fraction(1)], Fraction(r))


def scale(f: S, d: int) -> S:
    """f(d tau)."""
    out = [Fraction(0)] * PREC
    for i, x in enumerate(f.c):
        if i * d >= PREC:
            break
        out[i * d] = x
    return S(out, f.off * d)


def D(f: S) -> S:
    """q d/dq."""
    return S([(i + f.off) * x for i, x in enumerate(f.c)], f.off)


# -- products ---------------------------------------------------------------------------


def prod_factors(exps: Callable[[int], int], sign: int = -1) -> S:
    """prod_{m >= 1} (1 + sign q^m)^{exps(m)} (exps(m) may be negative)."""
    out = S([Fraction(1)])
    for m in range(1, PREC):
        e = exps(m)
        if e:
            out = out * (S.lift(1) + qp(m) * sign) ** e
    return out


def poch(a: int, step: int, sign: int = -1) -> S:
    """(sign*(-1) q^a; q^step)_infinity = prod_{n >= 0} (1 + sign q^(a + step n)), a >= 1."""
    return prod_factors(lambda m: 1 if m >= a and (m - a) % step == 0 else 0, sign)


@cache
def f(k: int) -> S:
    """f_k = (q^k; q^k)_infinity, by multiplying the factors."""
    return poch(k, k)


def eta(d: int = 1) -> S:
    """eta(d tau) = q^(d/24) f_d."""
    return f(d) * qp(Fraction(d, 24))


# -- sums -------------------------------------------------------------------------------

RANGE = range(-40, 41)  # n^2 >= 1600 > PREC: every lattice point below q^PREC is counted


def zsum(weight: Callable[[int], int | Fraction], expo: Callable[[int], int | Fraction]) -> S:
    """sum_{n in Z} weight(n) q^expo(n) by enumeration (expo must be proper on RANGE)."""
    terms: dict[Fraction, Fraction] = {}
    for n in RANGE:
        e = Fraction(expo(n))
        if e < PREC:
            terms[e] = terms.get(e, Fraction(0)) + Fraction(weight(n))
    low = min(terms)
    out = [Fraction(0)] * PREC
    for e, v in terms.items():
        i = e - low
        assert i.denominator == 1
        if i < PREC:
            out[int(i)] += v
    return S(out, low)


def theta3(d: int = 1) -> S:
    return zsum(lambda n: 1, lambda n: d * n * n)


def theta4(d: int = 1) -> S:
    return zsum(lambda n: (-1) ** (n % 2), lambda n: d * n * n)


def theta2(d: int = 1) -> S:
    """sum_{n in Z} q^{d(n+1/2)^2} (a series in q^{d/4} times integers)."""
    return zsum(lambda n: 1, lambda n: Fraction(d * (2 * n + 1) ** 2, 4))


def thetaQ(a: int, b: int, c: int) -> S:
    """sum_{x,y in Z} q^{a x^2 + b x y + c y^2} for a positive definite form."""
    out = [Fraction(0)] * PREC
    for x in RANGE:
        for y in RANGE:
            v = a * x * x + b * x * y + c * y * y
            if v < PREC:
                out[v] += 1
    return S(out)


def lambert(w: Callable[[int], int | Fraction]) -> S:
    """sum_{n >= 1} w(n) q^n / (1 - q^n) = sum_m (sum_{d | m} w(d)) q^m."""
    return series(lambda m: sum(Fraction(w(d)) for d in divisors(m)), 1)


# -- arithmetic -------------------------------------------------------------------------


@cache
def divisors(n: int) -> tuple[int, ...]:
    return tuple(d for d in range(1, n + 1) if n % d == 0)


def sigma(k: int, n: int) -> int:
    return sum(d**k for d in divisors(n)) if n >= 1 else 0


def _kron(d: int, n: int) -> int:
    """The Kronecker symbol (d/n) for n >= 1."""
    from sympy.ntheory import factorint

    out = 1
    for p, e in factorint(n).items():
        if p == 2:
            if d % 2 == 0:
                return 0
            v = 1 if d % 8 in (1, 7) else -1
        else:
            v = int(sympy.legendre_symbol(d % p, p)) if d % p else 0
        out *= v**e
    return out


def chi(d: int) -> Callable[[int], int]:
    return lambda n: _kron(d, n)


def bernoulli(k: int) -> Fraction:
    b = sympy.bernoulli(k)
    return Fraction(int(b.p), int(b.q))


@cache
def E(k: int) -> S:
    """E_k = 1 - (2k / B_k) sum sigma_{k-1}(n) q^n (Serre, A Course in Arithmetic, VII.4.2)."""
    c = -Fraction(2 * k) / bernoulli(k)
    return S.lift(1) + series(lambda n: c * sigma(k - 1, n), 1)


@cache
def Delta() -> S:
    return eta(1) ** 24


@cache
def p(n: int) -> int:
    """The partition function, by Euler's pentagonal recurrence."""
    if n < 0:
        return 0
    if n == 0:
        return 1
    total, k = 0, 1
    while True:
        g1, g2 = k * (3 * k - 1) // 2, k * (3 * k + 1) // 2
        if g1 > n:
            break
        sgn = 1 if k % 2 else -1
        total += sgn * (p(n - g1) + p(n - g2))
        k += 1
    return total


@cache
def tau(n: int) -> int:
    return int(Delta().coeff(n))


def r(quad: tuple[int, int, int], n: int) -> int:
    """Representations of n by a x^2 + b x y + c y^2, by counting."""
    return int(thetaQ(*quad).coeff(n))


def rsq(k: int, n: int) -> int:
    """Representations of n as a sum of k squares, as the coefficient of theta^k."""
    return int((theta3() ** k).coeff(n))


# -- readings ---------------------------------------------------------------------------


@dataclass(frozen=True)
class Ser:
    """Two sides as q-series, equal (mod ``mod``) through ``upto`` (default PREC) coefficients."""

    lhs: Callable[[], S]
    rhs: Callable[[], S]
    source: str = ""
    upto: int | None = None  # printed expansion: compared for exponents below upto only
    mod: int | None = None


@dataclass(frozen=True)
class Arith:
    """Two functions of n, equal (mod ``mod``) for n in ``ns``."""

    lhs: Callable[[int], int | Fraction]
    rhs: Callable[[int], int | Fraction]
    source: str = ""
    ns: range = range(1, ARITH_N + 1)
    mod: int | None = None


Reading = Ser | Arith


def _same(a: Fraction | int, b: Fraction | int, mod: int | None) -> bool:
    if mod is None:
        return Fraction(a) == Fraction(b)
    d = Fraction(a) - Fraction(b)
    return d.denominator % mod != 0 and (d.numerator % mod == 0)


def truth(reading: Reading) -> bool:
    """Whether the two sides agree as far as they are computed (False at any difference)."""
    if isinstance(reading, Arith):
        return all(_same(reading.lhs(n), reading.rhs(n), reading.mod) for n in reading.ns)
    a, b = reading.lhs(), reading.rhs()
    lo = min(a.off, b.off)
    top = min(a.off, b.off) + PREC if reading.upto is None else Fraction(reading.upto)
    e = lo
    while e < top:
        if not _same(a.coeff(e), b.coeff(e), reading.mod):
            return False
        e += Fraction(1, 24) if (a.off.denominator > 1 or b.off.denominator > 1) else 1
    return True


# -- the table of readings ----------------------------------------------------------------


def nonneg(w: Callable[[int], int | Fraction]) -> Callable[[int], int | Fraction]:
    """A weight for sum_{n >= 0}: w(n) for n >= 0, nothing for n < 0."""
    return lambda n: w(n) if n >= 0 else 0


def sgn(n: int) -> int:
    return -1 if n % 2 else 1


def coef(s: Callable[[], S]) -> Callable[[int], Fraction]:
    """n -> the coefficient of q^n in s() (the series is built once)."""
    return lambda n: cache(s)().coeff(n)


@cache
def pbar_series() -> S:
    return f(2) / f(1) ** 2


def pbar(n: int) -> Fraction:
    return pbar_series().coeff(n)


AND = "Andrews, The Theory of Partitions (1976)"
BER = "Berndt, Number Theory in the Spirit of Ramanujan (2006)"
HIR = "Hirschhorn, The Power of q (2017)"
SER = "Serre, A Course in Arithmetic (1973), Ch. VII"
RAM = "Ramanujan, On certain arithmetical functions (1916)"
GRO = "Grosswald, Representations of Integers as Sums of Squares (1985)"
FALSE = ""  # a one-place mutation of a true claim

READINGS: dict[str, Reading] = {}


def add(style: str, name: str, reading: Reading) -> None:
    key = f"{style}/{name}"
    assert key not in READINGS, key
    READINGS[key] = reading


def _partition() -> None:
    st = "partition"
    pent = lambda e: lambda: zsum(sgn, e)  # noqa: E731
    add(st, "p1", Ser(lambda: f(1), pent(lambda n: Fraction(n * (3 * n - 1), 2)), f"Euler; {AND}, Cor. 1.7"))
    add(st, "p2", Ser(lambda: f(1), pent(lambda n: n * (3 * n - 1)), FALSE))
    jac = lambda e: lambda: zsum(nonneg(lambda n: sgn(n) * (2 * n + 1)), e)  # noqa: E731
    add(st, "p3", Ser(lambda: f(1) ** 3, jac(lambda n: Fraction(n * (n + 1), 2)), f"Jacobi; {BER}, Thm 1.3.9"))
    add(st, "p4", Ser(lambda: f(1) ** 3, jac(lambda n: Fraction(n * (n - 1), 2)), FALSE))
    tri = lambda: zsum(nonneg(lambda n: 1), lambda n: Fraction(n * (n + 1), 2))  # noqa: E731
    add(st, "p5", Ser(lambda: f(2) ** 2 / f(1), tri, f"Gauss; {BER}, (1.3.14)"))
    add(st, "p6", Ser(lambda: f(2) ** 2 / f(1), lambda: zsum(nonneg(lambda n: 1), lambda n: n * (n + 1)), FALSE))
    add(st, "p7", Ser(lambda: f(1) ** 2 / f(2), lambda: theta4(), f"Gauss; {BER}, (1.3.13)"))
    add(st, "p8", Ser(lambda: f(2) ** 5 / (f(1) ** 2 * f(4) ** 2), lambda: theta3(), f"{BER}, (1.3.12)"))
    add(st, "p9", Ser(lambda: f(2) ** 5 / (f(1) ** 2 * f(4) ** 2), lambda: theta3(2), FALSE))
    add(st, "p10", Ser(lambda: poch(1, 2), lambda: f(1) / f(2), f"{AND}, Ch. 1"))
    add(st, "p11", Ser(lambda: poch(1, 1, +1), lambda: f(2) / f(1), f"Euler; {AND}, Cor. 1.2"))
    add(st, "p12", Ser(lambda: poch(1, 1, +1), lambda: 1 / poch(1, 2), f"Euler; {AND}, Cor. 1.2"))
    add(st, "p13", Ser(lambda: poch(1, 1, +1), lambda: poch(1, 2), FALSE))
    add(st, "p14", Ser(lambda: series(p), lambda: 1 / f(1), f"Euler; {AND}, Thm 1.1"))
    add(st, "p15", Arith(lambda n: p(5 * n + 4), lambda n: 0, f"Ramanujan; {AND}, Ch. 10", range(0, 200), 5))
    add(st, "p16", Arith(lambda n: p(7 * n + 5), lambda n: 0, f"Ramanujan; {AND}, Ch. 10", range(0, 200), 7))
    add(st, "p17", Arith(lambda n: p(11 * n + 6), lambda n: 0, f"Ramanujan; {AND}, Ch. 10", range(0, 150), 11))
    add(st, "p18", Arith(lambda n: p(5 * n + 3), lambda n: 0, FALSE, range(0, 200), 5))
    gen = lambda: series(lambda n: p(5 * n + 4))  # noqa: E731
    add(st, "p19", Ser(gen, lambda: 5 * f(5) ** 5 / f(1) ** 6, f"Ramanujan; {BER}, Thm 2.3.4"))
    add(st, "p20", Ser(gen, lambda: 7 * f(5) ** 5 / f(1) ** 6, FALSE))
    rr = lambda: 1 / (poch(1, 5) * poch(4, 5))  # noqa: E731
    add(st, "p21", Ser(rr, lambda: series(lambda n: [1, 1, 1, 1, 2, 2, 3, 3][n] if n < 8 else 0), f"{AND}, Ch. 7", 8))
    add(st, "p22", Ser(rr, lambda: series(lambda n: [1, 1, 1, 1, 2, 3, 3][n] if n < 7 else 0), FALSE, 7))
    add(
        st,
        "p23",
        Ser(
            pbar_series,
            lambda: series(lambda n: [1, 2, 4, 8, 14][n] if n < 5 else 0),
            "Corteel and Lovejoy, Overpartitions (2004)",
            5,
        ),
    )
    dist = lambda: poch(1, 1, +1)  # noqa: E731
    add(st, "p24", Ser(dist, lambda: series(lambda n: [1, 1, 1, 2, 2, 3, 4, 5][n] if n < 8 else 0), f"{AND}, Ch. 1", 8))
    add(
        st,
        "p25",
        Ser(
            lambda: 1 / f(1) ** 2,
            lambda: f(8) ** 5 / (f(2) ** 5 * f(16) ** 2) + 2 * qp(1) * f(4) ** 2 * f(16) ** 2 / (f(2) ** 5 * f(8)),
            f"{HIR}, (1.10.1)",
        ),
    )
    add(
        st,
        "p26",
        Ser(
            lambda: f(1) ** 2,
            lambda: f(2) * f(8) ** 5 / (f(4) ** 2 * f(16) ** 2) - 2 * qp(1) * f(2) * f(16) ** 2 / f(8),
            f"{HIR}, (1.9.4)",
        ),
    )
    add(
        st,
        "p27",
        Ser(
            lambda: 1 / f(1) ** 2,
            lambda: f(8) ** 5 / (f(2) ** 5 * f(16) ** 2) + 3 * qp(1) * f(4) ** 2 * f(16) ** 2 / (f(2) ** 5 * f(8)),
            FALSE,
        ),
    )
    jt5 = lambda e: lambda: zsum(sgn, e)  # noqa: E731
    add(
        st,
        "p28",
        Ser(
            lambda: poch(1, 5) * poch(4, 5) * f(5),
            jt5(lambda n: Fraction(n * (5 * n - 3), 2)),
            f"Jacobi triple product; {AND}, Thm 2.8",
        ),
    )
    add(st, "p29", Ser(lambda: poch(1, 5) * poch(4, 5) * f(5), jt5(lambda n: Fraction(n * (5 * n - 1), 2)), FALSE))
    add(
        st,
        "p30",
        Ser(
            lambda: prod_factors(lambda m: 2 * (m % 2 == 0)) / f(1),
            lambda: f(2) ** 2 / f(1),
            "common practice (the definition of f_k)",
        ),
    )
    add(st, "p31", Ser(lambda: poch(1, 1, +1) * poch(1, 2), lambda: S.lift(1), f"Euler; {AND}, Cor. 1.2"))
    add(st, "p32", Ser(lambda: poch(1, 1, +1) * f(2), lambda: S.lift(1), FALSE))
    add(st, "p33", Arith(pbar, lambda n: 0, "Corteel and Lovejoy, Overpartitions (2004)", range(1, PREC), 2))
    add(st, "p34", Arith(pbar, lambda n: 0, FALSE, range(1, PREC), 4))
    frob = "common practice: (1 - x)^2 = 1 - x^2 (mod 2)"
    add(st, "p35", Ser(lambda: f(1) ** 2, lambda: f(2), frob, mod=2))
    add(st, "p36", Ser(lambda: f(1) ** 4, lambda: f(4), FALSE, mod=4))
    on7 = range(5, 200, 7)
    add(st, "p37", Arith(p, lambda n: 0, f"Ramanujan; {AND}, Ch. 10", on7, 7))
    add(st, "p38", Arith(p, lambda n: 0, FALSE, range(3, 200, 5), 5))


_partition()


def _lattice() -> None:
    st = "lattice"
    two = lambda c: lambda: 1 + c * lambert(chi(-4))  # noqa: E731
    add(st, "l1", Ser(lambda: theta3() ** 2, two(4), f"Jacobi; {GRO}, Ch. 2"))
    add(
        st,
        "l2",
        Arith(lambda n: rsq(2, n), lambda n: 4 * sum(chi(-4)(d) for d in divisors(n)), f"Jacobi; {GRO}, Ch. 2"),
    )
    add(st, "l3", Arith(lambda n: rsq(2, n), lambda n: 2 * sum(chi(-4)(d) for d in divisors(n)), FALSE))
    s4 = lambda n: sigma(1, n // 4) if n % 4 == 0 else 0  # noqa: E731
    add(st, "l4", Arith(lambda n: rsq(4, n), lambda n: 8 * sigma(1, n) - 32 * s4(n), f"Jacobi; {GRO}, Ch. 9"))
    add(st, "l5", Arith(lambda n: rsq(4, n), lambda n: 8 * sigma(1, n), FALSE))
    add(st, "l6", Ser(lambda: theta3() ** 4, lambda: eta(2) ** 20 / (eta(1) ** 8 * eta(4) ** 8), f"{BER}, (1.3.12)"))
    add(st, "l7", Ser(lambda: theta3() ** 2, lambda: eta(2) ** 10 / (eta(1) ** 4 * eta(4) ** 4), f"{BER}, (1.3.12)"))
    add(st, "l8", Ser(lambda: theta3() ** 2, lambda: eta(2) ** 10 / (eta(1) ** 4 * eta(4) ** 2), FALSE))
    hexa = lambda: thetaQ(1, 1, 1)  # noqa: E731
    add(
        st,
        "l9",
        Ser(
            hexa,
            lambda: 1 + 6 * lambert(chi(-3)),
            "Lorenz (1871); Borwein and Borwein, A cubic counterpart of Jacobi's identity (1991)",
        ),
    )
    add(st, "l10", Ser(hexa, lambda: 1 + 4 * lambert(chi(-3)), FALSE))
    add(
        st,
        "l11",
        Ser(
            hexa,
            lambda: theta3() * theta3(3) + theta2() * theta2(3),
            "Borwein and Borwein, A cubic counterpart of Jacobi's identity (1991)",
        ),
    )
    add(
        st,
        "l12",
        Ser(
            lambda: theta3() ** 4,
            lambda: theta2() ** 4 + theta4() ** 4,
            "Jacobi; Whittaker and Watson, A Course of Modern Analysis, 21.3",
        ),
    )
    add(st, "l13", Ser(lambda: theta3() ** 4, lambda: theta2() ** 4 - theta4() ** 4, FALSE))
    add(st, "l14", Ser(lambda: theta4(), lambda: eta(1) ** 2 / eta(2), f"Gauss; {BER}, (1.3.13)"))
    add(st, "l15", Ser(lambda: theta2(), lambda: 2 * eta(4) ** 2 / eta(2), f"Gauss; {BER}, (1.3.14)"))
    add(st, "l16", Ser(lambda: theta4(), lambda: eta(1) ** 2 / eta(4), FALSE))
    d4 = lambda: (theta3() ** 4 + theta4() ** 4) / 2  # noqa: E731
    add(
        st,
        "l17",
        Ser(
            d4,
            lambda: series(lambda n: [1, 0, 24, 0, 24, 0, 96][n] if n < 7 else 0),
            "Conway and Sloane, Sphere Packings, Lattices and Groups, Ch. 4 (D_4)",
            7,
        ),
    )
    add(st, "l18", Ser(d4, lambda: series(lambda n: [1, 0, 24, 0, 24, 0, 72][n] if n < 7 else 0), FALSE, 7))
    e8 = lambda: (theta2() ** 8 + theta3() ** 8 + theta4() ** 8) / 2  # noqa: E731
    add(
        st,
        "l19",
        Ser(e8, lambda: scale(E(4), 2), "Conway and Sloane, Sphere Packings, Lattices and Groups, Ch. 4 (E_8)"),
    )
    add(st, "l20", Ser(e8, lambda: E(4), FALSE))
    add(
        st,
        "l21",
        Arith(
            lambda n: rsq(8, n),
            lambda n: 16 * sgn(n) * sum(sgn(d) * d**3 for d in divisors(n)),
            f"Jacobi; {GRO}, Ch. 9",
        ),
    )
    add(st, "l22", Arith(lambda n: rsq(8, n), lambda n: 16 * sigma(3, n), FALSE))
    add(
        st,
        "l23",
        Ser(
            lambda: theta3() ** 8,
            lambda: series(lambda n: [1, 16, 112, 448][n] if n < 4 else 0),
            f"{GRO}, Ch. 9 (r_8 table)",
            4,
        ),
    )
    add(
        st,
        "l24",
        Ser(
            lambda: thetaQ(1, 0, 2),
            lambda: 1 + 2 * lambert(chi(-8)),
            "Dirichlet; Dickson, Introduction to the Theory of Numbers (1929), Ch. 8 (class number one)",
        ),
    )
    add(st, "l25", Ser(lambda: thetaQ(1, 0, 2), lambda: 1 + 2 * lambert(chi(8)), FALSE))
    add(
        st,
        "l26",
        Ser(
            lambda: thetaQ(1, 1, 2),
            lambda: 1 + 2 * lambert(chi(-7)),
            "Dirichlet; Dickson, Introduction to the Theory of Numbers (1929), Ch. 8 (class number one)",
        ),
    )
    add(st, "l27", Arith(lambda n: rsq(4, n), lambda n: 0, f"Jacobi; {GRO}, Ch. 9", mod=8))
    add(st, "l28", Arith(lambda n: rsq(4, n), lambda n: 0, FALSE, mod=16))
    add(
        st,
        "l29",
        Ser(lambda: theta3() ** 2, lambda: theta3(2) ** 2 + theta2(2) ** 2, f"{BER}, Ch. 1 (duplication), from memory"),
    )
    add(
        st,
        "l30",
        Ser(lambda: theta4() ** 2, lambda: theta3(2) ** 2 - theta2(2) ** 2, f"{BER}, Ch. 1 (duplication), from memory"),
    )
    add(st, "l31", Ser(lambda: theta4() ** 2, lambda: theta3(2) ** 2 - 2 * theta2(2) ** 2, FALSE))


_lattice()

# Readings shared by several styles (the same mathematics in different notation).
E4SQ = Ser(lambda: E(4) ** 2, lambda: E(8), f"{SER}, 4.2")
E4E6 = Ser(lambda: E(4) * E(6), lambda: E(10), f"{SER}, 4.2")
E4CUBE = Ser(lambda: E(4) ** 3, lambda: E(12), FALSE)
DISC = Ser(lambda: E(4) ** 3 - E(6) ** 2, lambda: 1728 * Delta(), f"{SER}, 4.4")
DISC_BAD = Ser(lambda: E(4) ** 3 - E(6) ** 2, lambda: 1724 * Delta(), FALSE)
E12 = Ser(lambda: 691 * E(12), lambda: 441 * E(4) ** 3 + 250 * E(6) ** 2, f"{SER}, 4.2")
E12_BAD = Ser(lambda: 691 * E(12), lambda: 441 * E(4) ** 3 + 251 * E(6) ** 2, FALSE)
DELTA_ETA = Ser(lambda: Delta(), lambda: eta(1) ** 24, f"Jacobi; {SER}, 4.4")
DELTA_PROD = Ser(lambda: Delta(), lambda: qp(1) * f(1) ** 24, f"Jacobi; {SER}, 4.4")
DELTA_PROD_BAD = Ser(lambda: Delta(), lambda: qp(1) * f(1) ** 23, FALSE)
E2_LAMBERT = Ser(lambda: E(2), lambda: 1 - 24 * lambert(lambda d: d), f"{RAM}")
E4_LAMBERT = Ser(lambda: E(4), lambda: 1 + 240 * lambert(lambda d: d**3), f"{SER}, 4.2")
E6_LAMBERT = Ser(lambda: E(6), lambda: 1 - 504 * lambert(lambda d: d**5), f"{SER}, 4.2")
E6_SIGMA6 = Ser(lambda: E(6), lambda: 1 - 504 * series(lambda n: sigma(6, n), 1), FALSE)
E4_BAD = Ser(lambda: E(4), lambda: 1 + 240 * lambert(lambda d: d**2), FALSE)
RAM_E2 = Ser(lambda: D(E(2)), lambda: (E(2) ** 2 - E(4)) / 12, RAM)
RAM_E2_BAD = Ser(lambda: D(E(2)), lambda: (E(2) ** 2 - E(4)) / 24, FALSE)
RAM_E4 = Ser(lambda: D(E(4)), lambda: (E(2) * E(4) - E(6)) / 3, RAM)
RAM_E6 = Ser(lambda: D(E(6)), lambda: (E(2) * E(6) - E(4) ** 2) / 2, RAM)
RAM_E6_BAD = Ser(lambda: D(E(6)), lambda: E(2) * E(6) - E(4) ** 2, FALSE)
DDELTA = Ser(lambda: D(Delta()), lambda: E(2) * Delta(), f"Jacobi; {RAM}")
DDELTA_BAD = Ser(lambda: D(Delta()), lambda: 2 * E(2) * Delta(), FALSE)
TAU_691 = Arith(lambda n: tau(n), lambda n: sigma(11, n), RAM, mod=691)
TAU_691_BAD = Arith(lambda n: tau(n), lambda n: sigma(9, n), FALSE, mod=691)
CONV_11 = Arith(
    lambda n: sum(sigma(1, m) * sigma(1, n - m) for m in range(1, n)),
    lambda n: Fraction(5 * sigma(3, n) + (1 - 6 * n) * sigma(1, n), 12),
    f"Besge (1862); {RAM}",
)
CONV_11_BAD = Arith(
    lambda n: sum(sigma(1, m) * sigma(1, n - m) for m in range(1, n)),
    lambda n: Fraction(5 * sigma(3, n) + (1 - 12 * n) * sigma(1, n), 12),
    FALSE,
)
CONV_33 = Arith(
    lambda n: sum(sigma(3, m) * sigma(3, n - m) for m in range(1, n)),
    lambda n: Fraction(sigma(7, n) - sigma(3, n), 120),
    f"{RAM} (from E_4^2 = E_8)",
)
CONV_33_BAD = Arith(
    lambda n: sum(sigma(3, m) * sigma(3, n - m) for m in range(1, n)),
    lambda n: Fraction(sigma(7, n) - sigma(3, n), 240),
    FALSE,
)
ETA_PENT = Ser(
    lambda: eta(1),
    lambda: qp(Fraction(1, 24)) * zsum(sgn, lambda n: Fraction(n * (3 * n - 1), 2)),
    f"Euler; {AND}, Cor. 1.7",
)
J_PREFIX = Ser(
    lambda: E(4) ** 3 / Delta(),
    lambda: qp(-1) * series(lambda n: [1, 744, 196884][n] if n < 3 else 0),
    "Klein; Serre, A Course in Arithmetic, VII.3.3",
    2,
)
J_PREFIX_BAD = Ser(
    lambda: E(4) ** 3 / Delta(), lambda: qp(-1) * series(lambda n: [1, 744, 196883][n] if n < 3 else 0), FALSE, 2
)
TAU_VALUES = Arith(
    lambda n: tau(n), lambda n: [0, 1, -24, 252, -1472, 4830, -6048][n], f"{RAM} (table of tau)", range(1, 7)
)
TAU_VALUES_BAD = Arith(lambda n: tau(n), lambda n: [0, 1, -24, 252, -1472, 4380, -6048][n], FALSE, range(1, 7))


def _quasimodular() -> None:
    st = "quasimodular"
    for name, reading in (
        ("qm1", RAM_E2),
        ("qm2", RAM_E2_BAD),
        ("qm3", RAM_E4),
        ("qm4", RAM_E6),
        ("qm5", RAM_E6_BAD),
        ("qm6", Ser(lambda: D(E(4)) - E(2) * E(4) / 3, lambda: -E(6) / 3, f"Serre derivative; {RAM}")),
        ("qm7", Ser(lambda: D(E(6)) - E(2) * E(6) / 2, lambda: -(E(4) ** 2) / 2, f"Serre derivative; {RAM}")),
        ("qm8", Ser(lambda: D(E(2)) - E(2) ** 2 / 12, lambda: -E(4) / 12, f"Serre derivative; {RAM}")),
        ("qm9", Ser(lambda: D(E(2)) - E(2) ** 2 / 6, lambda: -E(4) / 12, FALSE)),
        ("qm10", Ser(lambda: Delta(), lambda: (E(4) ** 3 - E(6) ** 2) / 1728, f"{SER}, 4.4")),
        ("qm11", DDELTA),
        ("qm12", DDELTA_BAD),
        (
            "qm13",
            Ser(
                lambda: 1 / Delta(),
                lambda: qp(-1) * series(lambda n: [1, 24, 324, 3200][n] if n < 4 else 0),
                "Hardy and Ramanujan (1918), coefficients of 1/Delta",
                3,
            ),
        ),
        (
            "qm14",
            Ser(
                lambda: 1 / Delta(), lambda: qp(-1) * series(lambda n: [1, 24, 324, 3201][n] if n < 4 else 0), FALSE, 3
            ),
        ),
        (
            "qm15",
            Ser(
                lambda: E(4) / eta(1) ** 8,
                lambda: qp(Fraction(-1, 3)) * series(lambda n: [1, 248, 4124][n] if n < 3 else 0),
                "the level-one E_8 character, Kac, Infinite Dimensional Lie Algebras (1990), Ch. 12",
                2,
            ),
        ),
        (
            "qm16",
            Ser(
                lambda: E(4) / eta(1) ** 8,
                lambda: qp(Fraction(-1, 3)) * series(lambda n: [1, 248, 4123][n] if n < 3 else 0),
                FALSE,
                2,
            ),
        ),
        (
            "qm17",
            Ser(
                lambda: E(4) ** 3 / Delta(),
                lambda: E(4) ** 3 / Delta(),
                "Klein; Serre, A Course in Arithmetic, VII.3.3 (the definition of j)",
            ),
        ),
        ("qm17.2", J_PREFIX),
        ("qm18", Ser(lambda: E(6) ** 2 / Delta(), lambda: E(4) ** 3 / Delta() - 1728, f"{SER}, 3.3")),
        (
            "qm19",
            Ser(
                lambda: 2 * scale(E(2), 2) - E(2),
                lambda: 1 + 24 * lambert(lambda d: d % 2 * d),
                f"{BER}, Ch. 3, from memory",
            ),
        ),
        ("qm20", Ser(lambda: 2 * scale(E(2), 2) - E(2), lambda: 1 + 12 * lambert(lambda d: d % 2 * d), FALSE)),
        ("qm21", E2_LAMBERT),
        ("qm22", E6_LAMBERT),
        ("qm23", E6_SIGMA6),
        ("qm24", CONV_11),
        ("qm25", CONV_11_BAD),
        ("qm26", CONV_33),
        ("qm27", CONV_33_BAD),
    ):
        add(st, name, reading)


_quasimodular()


def _mdnotes() -> None:
    st = "mdnotes"
    e8 = Ser(lambda: E(8), lambda: 1 + 480 * series(lambda n: sigma(7, n), 1), f"{SER}, 4.2")
    e10 = Ser(lambda: E(10), lambda: 1 - 264 * series(lambda n: sigma(9, n), 1), f"{SER}, 4.2")
    e10_bad = Ser(lambda: E(10), lambda: 1 - 246 * series(lambda n: sigma(9, n), 1), FALSE)
    e6 = Ser(lambda: E(6), lambda: 1 - 504 * series(lambda n: sigma(5, n), 1), f"{SER}, 4.2")
    delta_pref = Ser(
        lambda: Delta(),
        lambda: series(lambda n: [0, 1, -24, 252, -1472][n] if n < 5 else 0),
        f"{RAM} (table of tau)",
        5,
    )
    for name, reading in (
        ("m1", E4SQ),
        ("m1.2", E4E6),
        ("m1.3", E4CUBE),
        ("m2", DISC),
        ("m2.2", E12),
        ("m2.3", E12_BAD),
        ("m3", DELTA_PROD),
        ("m4", DELTA_PROD_BAD),
        ("m5", E4_LAMBERT),
        ("m5.2", E4_BAD),
        ("m6", TAU_691),
        ("m6.2", TAU_691_BAD),
        ("m7", Arith(tau, lambda n: 4830, f"{RAM} (table of tau)", range(5, 6))),
        ("m7.2", Arith(tau, lambda n: -6048, f"{RAM} (table of tau)", range(6, 7))),
        ("m8", Arith(tau, lambda n: 4380, FALSE, range(5, 6))),
        ("m9", DELTA_ETA),
        ("m10", ETA_PENT),
        ("m11", e6),
        ("m11.2", E6_SIGMA6),
        ("m12", CONV_33),
        ("m12.2", CONV_33_BAD),
        ("m13", J_PREFIX_BAD),
        ("m14", e8),
        ("m14.2", e10),
        ("m14.3", e10_bad),
        ("m15", Ser(lambda: series(tau, 1), lambda: Delta(), f"{RAM}")),
        ("m15.2", delta_pref),
    ):
        add(st, name, reading)


_mdnotes()


def _thesis() -> None:
    st = "thesis"
    th4 = lambda: theta3() ** 4  # noqa: E731
    w2 = lambda: 2 * scale(E(2), 2) - E(2)  # noqa: E731
    for name, reading in (
        ("t1", E4SQ),
        ("t2", E4E6),
        ("t3", DISC),
        ("t4", DISC_BAD),
        ("t5", DELTA_ETA),
        ("t6", CONV_11),
        ("t7", CONV_11_BAD),
        ("t8", E12),
        ("t9", TAU_691),
        ("t10", DDELTA),
        ("t11", Ser(th4, lambda: eta(2) ** 20 / (eta(1) ** 8 * eta(4) ** 8), f"{BER}, (1.3.12)")),
        ("t12", Ser(th4, lambda: eta(2) ** 20 / (eta(1) ** 8 * eta(4) ** 4), FALSE)),
        ("t13", Ser(th4, lambda: 1 + 8 * lambert(lambda d: d if d % 4 else 0), f"Jacobi; {GRO}, Ch. 9")),
        ("t14", Ser(lambda: eta(2) ** 16 / eta(1) ** 8, lambda: series(lambda n: sigma(3, n) * (n % 2), 1), FALSE)),
        ("t15", Ser(lambda: eta(2) ** 16 / eta(1) ** 8, lambda: series(lambda n: sigma(3, n), 1), FALSE)),
        (
            "t16",
            Ser(
                lambda: eta(1) ** 8 * eta(2) ** 8,
                lambda: series(lambda n: [0, 1, -8, 12, 64][n] if n < 5 else 0),
                "from memory (the level-2 weight-8 newform)",
                5,
            ),
        ),
        (
            "t17",
            Ser(
                lambda: eta(1) ** 8 * eta(2) ** 8,
                lambda: series(lambda n: [0, 1, -8, 12, 60][n] if n < 5 else 0),
                FALSE,
                5,
            ),
        ),
        (
            "t18",
            Ser(
                lambda: f(1) ** 2 * f(2) ** 2,
                lambda: eta(1) ** 2 * eta(2) ** 2 / qp(Fraction(1, 4)),
                "common practice (the definition of eta)",
            ),
        ),
        ("t19", Ser(lambda: poch(1, 2) ** 2, lambda: eta(1) ** 4 / eta(2) ** 2, FALSE)),
        ("t20", Ser(lambda: poch(1, 2) ** 2, lambda: eta(1) ** 2 / eta(2) ** 2, FALSE)),
        ("t21", Ser(w2, lambda: eta(2) ** 20 / (eta(1) ** 8 * eta(4) ** 8), FALSE)),
        ("t22", Ser(lambda: E(4), lambda: theta3() ** 8, FALSE)),
    ):
        add(st, name, reading)


_thesis()


def _zvariable() -> None:
    st = "zvariable"
    th4 = lambda: theta3() ** 4  # noqa: E731
    for name, reading in (
        ("z1", Ser(lambda: eta(1), lambda: qp(Fraction(1, 24)) * f(1), "common practice (the definition of eta)")),
        ("z2", DELTA_PROD),
        ("z3", DELTA_PROD_BAD),
        ("z4", Ser(lambda: E(4), lambda: 1 + 240 * series(lambda n: sigma(3, n), 1), f"{SER}, 4.2")),
        ("z5", Ser(lambda: E(4), lambda: 1 + 240 * series(lambda n: sigma(2, n), 1), FALSE)),
        ("z6", Ser(lambda: E(6), lambda: 1 - 504 * series(lambda n: sigma(5, n), 1), f"{SER}, 4.2")),
        ("z7", E4SQ),
        ("z8", DISC),
        ("z9", DISC_BAD),
        ("z10", Ser(lambda: theta3(), lambda: theta3(), "common practice (the definition of theta)")),
        ("z10.2", Ser(th4, lambda: eta(2) ** 20 / (eta(1) ** 8 * eta(4) ** 8), f"{BER}, (1.3.12)")),
        ("z11", Ser(th4, lambda: eta(2) ** 20 / (eta(1) ** 8 * eta(4) ** 6), FALSE)),
        ("z12", DELTA_ETA),
        (
            "z13",
            Ser(
                lambda: Delta(),
                lambda: series(lambda n: [0, 1, -24, 252][n] if n < 4 else 0),
                f"{RAM} (table of tau)",
                4,
            ),
        ),
        (
            "z14",
            Ser(
                lambda: eta(1) ** 8 * eta(2) ** 8,
                lambda: qp(1) * f(1) ** 8 * f(2) ** 8,
                "common practice (the definition of eta)",
            ),
        ),
        ("z15", Ser(lambda: eta(1) ** 8 * eta(2) ** 8, lambda: qp(1) * f(1) ** 8 * f(2) ** 7, FALSE)),
        ("z16", DDELTA),
        ("z17", RAM_E4),
        ("z18", Ser(lambda: D(E(4)), lambda: (E(2) * E(4) - E(6)) / 4, FALSE)),
        ("z19", E2_LAMBERT),
        ("z20", E4E6),
    ):
        add(st, name, reading)


def _definitions() -> None:
    st = "definitions"
    F = lambda: eta(1) ** 8 * eta(2) ** 8  # noqa: E731
    W = lambda: 2 * scale(E(2), 2) - E(2)  # noqa: E731
    L = lambda: E(4) ** 3 / Delta()  # noqa: E731
    for name, reading in (
        ("d1", E4SQ),
        ("d2", Ser(lambda: E(4) ** 2, lambda: E(4) * E(6) + E(8) - E(4) * E(6), f"{SER}, 4.2")),
        ("d3", DELTA_ETA),
        ("d4", Ser(lambda: Delta(), lambda: 2 * Delta(), FALSE)),
        (
            "d5",
            Ser(
                F,
                lambda: series(lambda n: [0, 1, -8, 12, 64][n] if n < 5 else 0),
                "from memory (the level-2 weight-8 newform)",
                5,
            ),
        ),
        ("d6", Ser(F, lambda: series(lambda n: [0, 1, -8, 12, 66][n] if n < 5 else 0), FALSE, 5)),
        ("d7", DISC),
        ("d8", Ser(lambda: E(4) ** 3 - E(6) ** 2, lambda: 1728 * F(), FALSE)),
        ("d9", Ser(W, lambda: series(lambda n: [1, 24, 24, 96][n] if n < 4 else 0), f"{BER}, Ch. 3, from memory", 4)),
        ("d10", Ser(W, lambda: series(lambda n: [1, 24, 24, 72][n] if n < 4 else 0), FALSE, 4)),
        ("d11", E4E6),
        ("d12", Ser(lambda: E(4) * E(6), lambda: E(10) + Delta(), FALSE)),
        ("d13", J_PREFIX),
        ("d14", Ser(lambda: L() - 1728, lambda: E(6) ** 2 / Delta(), f"{SER}, 3.3")),
        ("d15", Ser(lambda: L() - 1728, lambda: E(6) ** 2 / F(), FALSE)),
        ("d16", DELTA_ETA),
        (
            "d17",
            Ser(
                lambda: Delta(),
                lambda: series(lambda n: [0, 1, -24, 252][n] if n < 4 else 0),
                f"{RAM} (table of tau)",
                4,
            ),
        ),
        ("d18", Ser(lambda: E(4), lambda: 1 + 240 * series(lambda n: sigma(3, n), 1), f"{SER}, 4.2")),
        ("d19", E4SQ),
        ("d20", E4CUBE),
    ):
        add(st, name, reading)


def _editor() -> None:
    st = "editor"
    th = lambda: theta3()  # noqa: E731
    for name, reading in (
        ("u1", E4SQ),
        ("u2", E4E6),
        ("u3", E4CUBE),
        ("u4", DISC),
        ("u5", DISC_BAD),
        ("u6", DELTA_PROD),
        ("u7", DELTA_ETA),
        ("u8", E12),
        ("u9", E12_BAD),
        ("u10", Ser(lambda: th() ** 4, lambda: eta(2) ** 20 / (eta(1) ** 8 * eta(4) ** 8), f"{BER}, (1.3.12)")),
        ("u11", Ser(lambda: th() ** 2, lambda: eta(2) ** 10 / (eta(1) ** 4 * eta(4) ** 2), FALSE)),
        ("u12", Ser(lambda: E(6), lambda: 1 - 504 * series(lambda n: sigma(5, n), 1), f"{SER}, 4.2")),
        ("u13", E6_SIGMA6),
        ("u14", TAU_691),
        ("u15", TAU_691_BAD),
        ("u16", DDELTA),
        ("u17", DDELTA_BAD),
        ("u18", Ser(lambda: f(2) ** 5 / (f(1) ** 2 * f(4) ** 2), lambda: theta3(), f"{BER}, (1.3.12)")),
        ("u19", CONV_11),
        ("u20", CONV_11_BAD),
    ):
        add(st, "untagged:" + name, reading)


_zvariable()
_definitions()
_editor()

STYLES = ("partition", "lattice", "quasimodular", "mdnotes", "thesis", "zvariable", "definitions", "editor")
MAIN_FILES = {
    "partition": "partition/paper.tex",
    "lattice": "lattice/paper.tex",
    "quasimodular": "quasimodular/paper.tex",
    "mdnotes": "mdnotes/notes.md",
    "thesis": "thesis/main.tex",
    "zvariable": "zvariable/paper.tex",
    "definitions": "definitions/paper.tex",
    "editor": "editor/submission.tex",
}
UNTAGGED_STYLES = ("editor",)  # read with screen(untagged=True)


def expected() -> dict[str, bool]:
    """Every reading's truth, keyed as READINGS is."""
    return {key: truth(reading) for key, reading in READINGS.items()}


if __name__ == "__main__":
    table = expected()
    for key, ok in table.items():
        print(f"{key:<32} {'true' if ok else 'false'}")
    print(f"{len(table)} claims, {sum(table.values())} true")

"""Weighted sums over Z with a quadratic exponent as unary theta series (docs/method.md#sums-over-z).

A sum ``sum_n W(n) q^{alpha n^2 + beta n}`` (over Z, or over n >= L) whose weight W is, on each
residue class modulo some period P, a polynomial of degree <= 1 in n, is rewritten by completing
the square.  With alpha = A/C, beta = B/C (integers, C > 0) and x = 2An + B,

    alpha n^2 + beta n = (x^2 - B^2) / (4AC),

so the sum is ``q^{-B^2/(4AC)} sum_x (w_0(x) + w_1(x) x) Q^{x^2}`` over x = B (mod 2A), with
Q = q^{1/(4AC)} and w_0, w_1 periodic modulo M = 2AP.  Over Z only the even part of w_0 and
the odd part of w_1 survive (x -> -x).  Each is written in the basis x -> psi(x/e) [e | x]
(e | M, psi primitive with conductor dividing M/e; these M functions are a basis of the
functions modulo M), keeping only quadratic psi: the coefficients are found by peeling
e = 1, 2, ... with the orthogonality of characters on the units modulo M/e, and the
representation is accepted only when the remainder is exactly 0.  Then

    sum_x psi(x/e) [e | x] x^nu Q^{x^2} = e^nu theta_{psi,nu}(e^2 tau / (4AC)).

A one-sided sum is half the sum over Z when w_0 is even and w_1 is odd, up to finitely many
terms, which must cancel except for the constant term.  Everything else (a weight with no
such shape, characters that are not quadratic, a one-sided sum of the wrong parity) returns
None and stays a series-only atom.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from verifier.arith import terms as t
from verifier.numbers import QuadraticCharacter, divisors, euler_phi, is_fundamental_discriminant

MAX_MODULUS = 4_000
MAX_CORRECTION = 10_000


@dataclass(frozen=True)
class Piece:
    """``coefficient * theta_{psi,nu}(scale * tau)``, psi of squarefree kernel ``kernel``."""

    coefficient: Fraction
    kernel: int
    nu: int
    scale: Fraction


@dataclass(frozen=True)
class Decomposition:
    """``q^shift * (constant + sum of pieces)``."""

    shift: Fraction
    constant: Fraction
    pieces: tuple[Piece, ...]


class _NoShape(Exception):
    pass


def shape(term: t.A, var: str, values: Any) -> tuple[int, int]:
    """(P, d): ``term`` is, on each residue class of ``var`` modulo P, a polynomial of degree <= d.

    Read from the structure of the expression (never from its values alone), so that the
    fit from 2 values per class is exact.  Raises :class:`_NoShape`.
    """

    def at(e: t.A, n: int) -> Fraction:
        return Fraction(values.value(e, {var: n}))

    if isinstance(term, t.Num):
        return 1, 0
    if isinstance(term, t.Var):
        if term.name != var:
            raise _NoShape
        return 1, 1
    if isinstance(term, t.Fun) and term.name == "chi" and term.index is not None:
        if not is_fundamental_discriminant(term.index) or shape(term.arg, var, values) not in ((1, 0), (1, 1)):
            raise _NoShape
        b, a = at(term.arg, 0), at(term.arg, 1) - at(term.arg, 0)
        if a.denominator != 1 or b.denominator != 1:
            raise _NoShape
        return abs(term.index), 0  # chi_D(an + b) has period |D| in n
    if isinstance(term, t.Pow):
        if isinstance(term.exponent, t.Num):
            k = term.exponent.value
            if k.denominator != 1 or k < 0 or k > 4:
                raise _NoShape
            p, d = shape(term.base, var, values)
            return (p, d * int(k)) if k else (1, 0)
        if shape(term.base, var, values) != (1, 0):
            raise _NoShape
        base = at(term.base, 0)
        if base == 1:
            return 1, 0
        if base != -1:
            raise _NoShape
        p, d = shape(term.exponent, var, values)
        if p != 1 or d > 2:
            raise _NoShape
        e0, e1, e2 = (at(term.exponent, n) for n in (0, 1, 2))
        if any(v.denominator != 1 for v in (e0, e1, e2)):
            raise _NoShape  # integer-valued at 3 consecutive integers: everywhere
        c2 = (e2 - 2 * e1 + e0) / 2
        c1 = e1 - e0 - c2
        return 2 * c2.denominator * c1.denominator, 0
    if isinstance(term, t.Bin):
        pl, dl = shape(term.left, var, values)
        pr, dr = shape(term.right, var, values)
        period = pl * pr // math.gcd(pl, pr)
        if term.op in "+-":
            return period, max(dl, dr)
        if term.op == "*":
            return period, dl + dr
        if term.op == "/" and (pr, dr) == (1, 0) and at(term.right, 0) != 0:
            return pl, dl
    raise _NoShape


def _characters(m: int, odd: bool) -> list[QuadraticCharacter]:
    """Primitive quadratic characters (trivial included) of conductor dividing m and given parity."""
    out = []
    for r in divisors(m):
        for d in (r, -r):
            if is_fundamental_discriminant(d) and (d < 0) == odd:
                out.append(QuadraticCharacter.from_integer(d))
    return out


def characters_of(f: list[Fraction], odd: bool) -> dict[tuple[int, int], Fraction] | None:
    """f (a function modulo M = len(f), even or odd) as sum c_{e,psi} psi(x/e)[e | x], psi quadratic.

    Keys (e, kernel of psi).  None when f is not such a combination.
    """
    m = len(f)
    residual = list(f)
    out: dict[tuple[int, int], Fraction] = {}
    for e in divisors(m):
        sub = m // e
        units = [y for y in range(sub) if math.gcd(y, sub) == 1]
        for psi in _characters(sub, odd):
            c = sum((residual[(e * y) % m] * psi.value(y) for y in units), Fraction(0)) / euler_phi(sub)
            if c:
                out[(e, psi.kernel)] = c
                for y in range(sub):
                    v = psi.value(y)
                    if v:
                        residual[(e * y) % m] -= c * v
    if any(residual):
        return None
    return out


def decompose(
    weight: t.A | None, var: str, alpha: Fraction, beta: Fraction, lower: int | None, values: Any
) -> Decomposition | None:
    """``sum_{n} W(n) q^{alpha n^2 + beta n}`` (n in Z, or n >= lower) as unary theta series, or None."""
    from verifier.arith.values import NotEvaluable

    try:
        period, degree = (1, 0) if weight is None else shape(weight, var, values)
    except (_NoShape, NotEvaluable, ZeroDivisionError, TypeError, ValueError):
        return None
    if degree > 1 or alpha <= 0:
        return None
    c = alpha.denominator * beta.denominator // math.gcd(alpha.denominator, beta.denominator)
    a_int, b_int = int(alpha * c), int(beta * c)
    m = 2 * a_int * period
    if m > MAX_MODULUS:
        return None

    def w(n: int) -> Fraction:
        return Fraction(1) if weight is None else Fraction(values.value(weight, {var: n}))

    try:
        slope = [(w(r + period) - w(r)) / period for r in range(period)]
        const = [w(r) - slope[r] * r for r in range(period)]
    except (NotEvaluable, ZeroDivisionError, TypeError, ValueError):
        return None
    w0 = [Fraction(0)] * m
    w1 = [Fraction(0)] * m
    for x in range(m):
        if (x - b_int) % (2 * a_int) == 0:
            r = ((x - b_int) // (2 * a_int)) % period
            w1[x] = slope[r] / (2 * a_int)
            w0[x] = const[r] - slope[r] * Fraction(b_int, 2 * a_int)
    half = Fraction(1)
    constant = Fraction(0)
    if lower is None:
        w0 = [(w0[x] + w0[-x % m]) / 2 for x in range(m)]
        w1 = [(w1[x] - w1[-x % m]) / 2 for x in range(m)]
    else:
        if any(w0[x] != w0[-x % m] or w1[x] != -w1[-x % m] for x in range(m)):
            return None  # a partial theta function
        x0 = 2 * a_int * lower + b_int
        if abs(x0) > MAX_CORRECTION:
            return None
        corrections: dict[int, Fraction] = {}
        span, sign = (range(x0, 1), 1) if x0 <= 0 else (range(1, x0), -1)
        for x in span:
            if (x - b_int) % (2 * a_int) == 0:
                corrections[x * x] = corrections.get(x * x, Fraction(0)) + sign * (w0[x % m] + w1[x % m] * x)
        if any(v for k, v in corrections.items() if k):
            return None
        half = Fraction(1, 2)
        constant = corrections.get(0, Fraction(0)) - w0[0] / 2
    pieces: list[Piece] = []
    for nu, f in ((0, w0), (1, w1)):
        found = characters_of(f, odd=bool(nu))
        if found is None:
            return None
        for (e, kernel), coefficient in sorted(found.items()):
            pieces.append(Piece(half * coefficient * e**nu, kernel, nu, Fraction(e * e, 4 * a_int * c)))
    return Decomposition(Fraction(-b_int * b_int, 4 * a_int * c), constant, tuple(pieces))

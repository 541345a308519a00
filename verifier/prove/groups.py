"""Gamma_0(N) and Gamma_1(N): indices, cusps, elliptic points, genus, dimensions, Sturm bounds.

Formulas: docs/method.md#index, #cusps, #elliptic-points-genus (index, cusps, elliptic points,
genus), #sturm-bound, #gamma1-bound (Sturm bounds), #dimension-level-one, #dimension-gamma0
(dimensions).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction

from verifier.numbers import divisors, euler_phi, kronecker, prime_factors


def index_gamma0(n: int) -> int:
    """m_0(N) = [SL2(Z) : Gamma_0(N)] = N prod_{p | N} (1 + 1/p)."""
    m = Fraction(n)
    for p in prime_factors(n):
        m *= Fraction(p + 1, p)
    assert m.denominator == 1
    return int(m)


def index_gamma1(n: int) -> int:
    """[SL2(Z) : Gamma_1(N)] = N^2 prod_{p | N} (1 - 1/p^2) (docs/method.md#index).

    This is the number of vectors (c, d) in (Z/N)^2 with gcd(c, d, N) = 1: the bottom rows
    of the cosets Gamma_1(N) gamma.
    """
    m = Fraction(n * n)
    for p in prime_factors(n):
        m *= Fraction(p * p - 1, p * p)
    assert m.denominator == 1
    return int(m)


def index_gamma1_projective(n: int) -> int:
    """bar m_1(N) = [PSL2(Z) : +-Gamma_1(N)] (docs/method.md#index).

    -I lies in Gamma_1(N) only for N <= 2, so for N >= 3 the image in PSL2(Z) has half the
    index of Gamma_1(N) in SL2(Z); for N = 1, 2 the two indices agree (1 and 3).
    """
    m = index_gamma1(n)
    return m if n <= 2 else m // 2


def elliptic_points(n: int) -> tuple[int, int]:
    """(epsilon_2, epsilon_3) of Gamma_0(N) (docs/method.md#elliptic-points-genus).

    The factors use the Kronecker symbols of the discriminants -4 and -3, which vanish at
    p = 2 and p = 3; (-1/p) would be wrong at p = 2.
    """
    ps = prime_factors(n)
    e2 = 0 if n % 4 == 0 else math.prod(1 + kronecker(-4, p) for p in ps)
    e3 = 0 if n % 9 == 0 else math.prod(1 + kronecker(-3, p) for p in ps)
    return e2, e3


def cusp_count(n: int) -> int:
    """epsilon_inf(N) = sum_{d | N} phi(gcd(d, N/d))."""
    return sum(euler_phi(math.gcd(d, n // d)) for d in divisors(n))


@dataclass(frozen=True)
class Cusp:
    """A cusp numerator/denominator of Gamma_0(N), with its width.

    The denominator is a positive divisor d of N; the cusp at infinity is written 1/N and
    the cusp 0 is written 0/1 (for N = 1 the single cusp is infinity, 1/1).
    """

    numerator: int
    denominator: int
    width: int


def cusps(n: int) -> list[Cusp]:
    """A complete set of inequivalent cusps of Gamma_0(N) (docs/method.md#cusps).

    Two cusps a/c, a'/c' (lowest terms) are Gamma_0(N)-equivalent iff gcd(c, N) = gcd(c', N) = d
    and a = a' mod gcd(d, N/d). So for each d | N there is one cusp per class
    c_0 in (Z/gcd(d, N/d))^x; we take the least c >= 0 with c = c_0 and gcd(c, d) = 1 (it exists
    by the Chinese remainder theorem, and c < d when d > 1). The width of c/d is
    N / gcd(d^2, N) = N / (d gcd(d, N/d)); it depends on d only, and the widths add up to m_0(N)
    (each cusp's width is the number of cosets Gamma_0(N) gamma over it).

    Ordered by denominator, then numerator: the first cusp is 0 = 0/1, the last is infinity = 1/N.
    """
    out: list[Cusp] = []
    for d in divisors(n):
        g = math.gcd(d, n // d)
        width = n // (d * g)
        if d == n:
            # The cusp at infinity (g = 1 here).
            out.append(Cusp(1, n, width))
            continue
        for c0 in range(g):
            if math.gcd(c0, g) != 1:
                continue
            c = c0
            while math.gcd(c, d) != 1:
                c += g
            out.append(Cusp(c, d, width))
    return out


def genus(n: int) -> int:
    """g_0(N) = 1 + m/12 - e2/4 - e3/3 - e_inf/2."""
    e2, e3 = elliptic_points(n)
    g = 1 + Fraction(index_gamma0(n), 12) - Fraction(e2, 4) - Fraction(e3, 3) - Fraction(cusp_count(n), 2)
    assert g.denominator == 1
    return int(g)


def dim_modular(k: int, n: int = 1) -> int:
    """dim M_k(Gamma_0(N)) for the trivial character (docs/method.md#dimension-gamma0)."""
    if k < 0 or k % 2:
        return 0
    if k == 0:
        return 1
    e2, e3 = elliptic_points(n)
    g = genus(n)
    einf = cusp_count(n)
    if k == 2:
        return g + einf - 1
    return (k - 1) * (g - 1) + (k // 4) * e2 + (k // 3) * e3 + (k // 2) * einf


def dim_cusp(k: int, n: int = 1) -> int:
    """dim S_k(Gamma_0(N)) for the trivial character (docs/method.md#dimension-gamma0)."""
    if k <= 0 or k % 2:
        return 0
    if k == 2:
        return genus(n)
    return dim_modular(k, n) - cusp_count(n)


def sturm_bound(k: Fraction | int, n: int = 1) -> int:
    """B(N, k) = floor(k m_0(N) / 12): a form in M_k(Gamma_0(N), chi) with a_0..a_B = 0 is 0.

    docs/method.md#sturm-bound (Sturm 1987); the comparison must include n = B.
    """
    return math.floor(Fraction(k) * index_gamma0(n) / 12)


def sturm_bound_gamma1(k: Fraction | int, n: int = 1) -> int:
    """B_1(N, k) = floor(k bar m_1(N) / 12): a form in M_k(Gamma_1(N)) with a_0..a_B = 0 is 0.

    docs/method.md#gamma1-bound: needed when the form is not known to have a single character mod N, where the
    Gamma_0(N) bound of :func:`sturm_bound` is not valid.
    """
    return math.floor(Fraction(k) * index_gamma1_projective(n) / 12)


def group_name(n: int) -> str:
    """How the group is written in reports."""
    return "SL2(Z)" if n == 1 else f"Gamma0({n})"

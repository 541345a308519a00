"""Gamma_0(N): index, cusps, elliptic points, genus, dimensions, Sturm bound.

Formulas and check values: MATH.md §2.1-2.3 (index, cusps, elliptic points, genus),
§3.2 (Sturm bound), §6.1-6.2 (dimensions).
"""

from __future__ import annotations

import math
from fractions import Fraction


def prime_factors(n: int) -> list[int]:
    """The distinct primes dividing n."""
    out: list[int] = []
    p = 2
    while p * p <= n:
        if n % p == 0:
            out.append(p)
            while n % p == 0:
                n //= p
        p += 1
    if n > 1:
        out.append(n)
    return out


def index_gamma0(n: int) -> int:
    """m_0(N) = [SL2(Z) : Gamma_0(N)] = N prod_{p | N} (1 + 1/p)."""
    m = Fraction(n)
    for p in prime_factors(n):
        m *= Fraction(p + 1, p)
    assert m.denominator == 1
    return int(m)


def _kronecker_small(d: int, p: int) -> int:
    # (d/p) for d in {-3, -4} and a prime p (MATH.md §2.3: vanishes at p = 2 resp. 3).
    if d == -4:
        return 0 if p == 2 else (1 if p % 4 == 1 else -1)
    if d == -3:
        return 0 if p == 3 else (1 if p % 3 == 1 else -1)
    raise ValueError(d)


def elliptic_points(n: int) -> tuple[int, int]:
    """(epsilon_2, epsilon_3) of Gamma_0(N)."""
    ps = prime_factors(n)
    e2 = 0 if n % 4 == 0 else math.prod(1 + _kronecker_small(-4, p) for p in ps)
    e3 = 0 if n % 9 == 0 else math.prod(1 + _kronecker_small(-3, p) for p in ps)
    return e2, e3


def cusp_count(n: int) -> int:
    """epsilon_inf(N) = sum_{d | N} phi(gcd(d, N/d))."""
    total = 0
    for d in range(1, n + 1):
        if n % d == 0:
            g = math.gcd(d, n // d)
            total += sum(1 for a in range(1, g + 1) if math.gcd(a, g) == 1)
    return total


def genus(n: int) -> int:
    """g_0(N) = 1 + m/12 - e2/4 - e3/3 - e_inf/2."""
    e2, e3 = elliptic_points(n)
    g = 1 + Fraction(index_gamma0(n), 12) - Fraction(e2, 4) - Fraction(e3, 3) - Fraction(cusp_count(n), 2)
    assert g.denominator == 1
    return int(g)


def dim_modular(k: int, n: int = 1) -> int:
    """dim M_k(Gamma_0(N)) for the trivial character (MATH.md §6.2)."""
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
    """dim S_k(Gamma_0(N)) for the trivial character (MATH.md §6.2)."""
    if k <= 0 or k % 2:
        return 0
    if k == 2:
        return genus(n)
    return dim_modular(k, n) - cusp_count(n)


def sturm_bound(k: Fraction | int, n: int = 1) -> int:
    """B(N, k) = floor(k m_0(N) / 12): a form in M_k(Gamma_0(N), chi) with a_0..a_B = 0 is 0.

    MATH.md §3.2 (Sturm 1987); the comparison must include n = B.
    """
    return math.floor(Fraction(k) * index_gamma0(n) / 12)


def group_name(n: int) -> str:
    """How the group is written in reports."""
    return "SL2(Z)" if n == 1 else f"Gamma0({n})"

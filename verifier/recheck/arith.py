"""Number theory from the formulas: factorisation, divisor sums, the index of Gamma_0(N),
the Sturm bound, the Newman conditions, quadratic characters and Ligozat's orders.

Sources: the index [SL_2(Z) : Gamma_0(N)] = N prod_{p | N} (1 + 1/p) and the Sturm bound
floor(k m / 12) (J. Sturm, "On the congruence of modular forms", LNM 1240, 1987); the
conditions for an eta quotient to be a form on Gamma_0(N) and its character
(M. Newman, Proc. London Math. Soc. 1959; B. Gordon and K. Hughes, 1981); the order of an
eta quotient at the cusp c/d (G. Ligozat, "Courbes modulaires de genre 1", 1975); each
cusp c/d of Gamma_0(N) occurs phi(gcd(d, N/d)) times (common practice).
"""

from __future__ import annotations

import math
from fractions import Fraction


def factor(n: int) -> dict[int, int]:
    """The prime factorisation of n >= 1 by trial division."""
    out: dict[int, int] = {}
    p = 2
    while p * p <= n:
        while n % p == 0:
            out[p] = out.get(p, 0) + 1
            n //= p
        p += 1 if p == 2 else 2
    if n > 1:
        out[n] = out.get(n, 0) + 1
    return out


def sigma(k: int, n: int) -> int:
    """sigma_k(n) = prod over p^e || n of (p^(k(e+1)) - 1) / (p^k - 1)  (k >= 1)."""
    out = 1
    for p, e in factor(n).items():
        out *= (p ** (k * (e + 1)) - 1) // (p**k - 1)
    return out


def index_gamma0(level: int) -> int:
    """[SL_2(Z) : Gamma_0(N)] = N prod_{p | N} (1 + 1/p)."""
    m = Fraction(level)
    for p in factor(level):
        m *= Fraction(p + 1, p)
    return int(m)


def sturm_bound(weight: Fraction, level: int) -> int:
    """floor(k m / 12)."""
    return math.floor(Fraction(weight) * index_gamma0(level) / 12)


def totient(n: int) -> int:
    """Euler's phi."""
    out = n
    for p in factor(n):
        out = out // p * (p - 1)
    return out


def squarefree_part(x: Fraction) -> int:
    """The squarefree integer D with x / D a rational square (sign kept)."""
    out = -1 if x < 0 else 1
    for part in (abs(x.numerator), x.denominator):
        for p, e in factor(part).items():
            if e % 2:
                out *= p
    return out


def eta_conditions(pairs: list[tuple[int, int]], level: int) -> str | None:
    """Why prod eta(d tau)^r is not a form of integral weight on Gamma_0(level) by Newman's
    criterion (None: it is one)."""
    if sum(r for _, r in pairs) % 2:
        return "its weight is not an integer"
    if any(level % d for d, _ in pairs):
        return f"some d does not divide the level {level}"
    if sum(d * r for d, r in pairs) % 24:
        return "sum d r is not divisible by 24"
    if sum((level // d) * r for d, r in pairs) % 24:
        return f"sum (N/d) r is not divisible by 24 for N = {level}"
    return None


def eta_kernel(pairs: list[tuple[int, int]]) -> int:
    """The character of an eta quotient of integral weight k: n -> ((-1)^k s / n), s = prod d^r,
    as the squarefree kernel of (-1)^k s."""
    k = sum(r for _, r in pairs) // 2
    s = Fraction(1)
    for d, r in pairs:
        s *= Fraction(d) ** r
    return squarefree_part(s * (-1) ** (k % 2))


def eta_least_level(pairs: list[tuple[int, int]]) -> int | None:
    """The least N with every d | N and sum (N/d) r = 0 mod 24 (None if none up to 24 lcm)."""
    base = 1
    for d, _ in pairs:
        base = base * d // math.gcd(base, d)
    if sum(d * r for d, r in pairs) % 24:
        return None
    for t in range(1, 25):
        n = base * t
        if sum((n // d) * r for d, r in pairs) % 24 == 0:
            return n
    return None


def ligozat_order(pairs: list[tuple[int, int]], level: int, c_den: int) -> Fraction:
    """Order of prod eta(d tau)^r at a cusp a/c_den of Gamma_0(level), in its local parameter:
    (N/24) sum_d gcd(c, d)^2 r / (gcd(c, N/c) c d)."""
    total = Fraction(0)
    for d, r in pairs:
        total += Fraction(math.gcd(c_den, d) ** 2 * r, d)
    return total * level / (24 * math.gcd(c_den, level // c_den) * c_den)


def divisors(n: int) -> list[int]:
    """The positive divisors of n, increasing."""
    return [d for d in range(1, n + 1) if n % d == 0]


def inverse_and_det(gram: list[list[int]]) -> tuple[list[list[Fraction]], Fraction]:
    """A^-1 and det A by Gauss-Jordan elimination over the rationals (A invertible)."""
    n = len(gram)
    a = [[Fraction(x) for x in row] + [Fraction(int(i == j)) for j in range(n)] for i, row in enumerate(gram)]
    det = Fraction(1)
    for col in range(n):
        pivot = next((r for r in range(col, n) if a[r][col] != 0), None)
        if pivot is None:
            raise ZeroDivisionError("the Gram matrix is singular")
        if pivot != col:
            a[col], a[pivot] = a[pivot], a[col]
            det = -det
        det *= a[col][col]
        inv_p = 1 / a[col][col]
        a[col] = [x * inv_p for x in a[col]]
        for r in range(n):
            if r != col and a[r][col] != 0:
                f = a[r][col]
                a[r] = [x - f * y for x, y in zip(a[r], a[col], strict=True)]
    return [row[n:] for row in a], det


def gram_level(gram: list[list[int]]) -> int:
    """The least N such that N A^-1 is an even integral matrix (its diagonal even)."""
    inv, det = inverse_and_det(gram)
    for n in range(1, 2 * abs(int(det)) + 1):
        if all((x * n).denominator == 1 for row in inv for x in row) and all(
            (inv[i][i] * n) % 2 == 0 for i in range(len(inv))
        ):
            return n
    raise ValueError("no level found for the Gram matrix")


def gram_kernel(gram: list[list[int]]) -> int:
    """The character of the theta series of an even lattice of rank n.

    Rank n = 2m: ((-1)^m det A / .) (Miyake, Modular Forms, §4.9; from memory).  Odd rank n: (2 det A / .)
    relative to the multiplier of theta^n (Shimura, "On modular forms of half integral weight",
    Ann. of Math. 97 (1973), §2; from memory); for A = (2), theta itself, it is trivial.
    """
    _, det = inverse_and_det(gram)
    if len(gram) % 2:
        return squarefree_part(2 * det)
    return squarefree_part(det * (-1) ** (len(gram) // 2))


def conductor(kernel: int) -> int:
    """The conductor |D| of the primitive character of kernel D (D = kernel or 4 kernel)."""
    return abs(kernel if kernel % 4 == 1 else 4 * kernel)


def bernoulli_poly(k: int, x: Fraction) -> Fraction:
    """B_k(x) = sum_j C(k, j) B_j x^(k-j) (B_1 = -1/2; common practice)."""
    return sum((math.comb(k, j) * bernoulli(j) * x ** (k - j) for j in range(k + 1)), Fraction(0))


def generalised_bernoulli(k: int, kernel: int) -> Fraction:
    """B_{k,chi} = f^(k-1) sum_{a=1}^{f} chi(a) B_k(a/f) for the primitive chi of kernel D and
    conductor f (B_{k,1} = B_k, except B_{1,1} = +1/2; Washington, Cyclotomic Fields, Prop. 4.1)."""
    f = conductor(kernel)
    total = Fraction(0)
    for a in range(1, f + 1):
        c = character_value(kernel, a, f) if f > 1 else 1
        if c:
            total += c * bernoulli_poly(k, Fraction(a, f))
    return total * Fraction(f) ** (k - 1)


def bernoulli(k: int) -> Fraction:
    """B_k (B_1 = -1/2) by the Akiyama-Tanigawa algorithm (with the sign fixed for k = 1)."""
    a = [Fraction(0)] * (k + 1)
    for m in range(k + 1):
        a[m] = Fraction(1, m + 1)
        for j in range(m, 0, -1):
            a[j - 1] = j * (a[j - 1] - a[j])
    return -a[0] if k == 1 else a[0]


def kernel_product(a: int, b: int) -> int:
    """The kernel of (a/.)(b/.)."""
    return squarefree_part(Fraction(a * b))


def kronecker(a: int, n: int) -> int:
    """The Kronecker symbol (a/n) for n >= 1 (the 2-part by (a/2) = 0, 1 for a = +-1 mod 8, -1 for +-3)."""
    out = 1
    for p, e in factor(n).items():
        if p == 2:
            s = 0 if a % 2 == 0 else (1 if a % 8 in (1, 7) else -1)
        else:
            r = a % p
            s = 0 if r == 0 else (1 if pow(r, (p - 1) // 2, p) == 1 else -1)  # Euler's criterion
        out *= s**e
    return out


def character_value(kernel: int, d: int, level: int) -> int:
    """chi(d) for the character n -> (D/n) of kernel D (discriminant D or 4D), 0 when gcd(d, N) > 1."""
    if math.gcd(d, level) > 1:
        return 0
    disc = kernel if kernel % 4 == 1 else 4 * kernel
    return kronecker(disc, d)

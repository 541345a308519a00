"""q-expansions of the certificate's atoms, by direct formulas.

* E_k = 1 - (2k / B_k) sum sigma_{k-1}(n) q^n with sigma from factorisations (the
  normalisation of qreferee's documentation; B_k by the Akiyama-Tanigawa algorithm);
* prod (1 - q^n) by Euler's pentagonal number theorem, and its inverse sum p(n) q^n by the
  partition recurrence that theorem gives;
* eta quotients prod eta(d tau)^r = q^(sum d r / 24) prod_d (prod_n (1 - q^(dn)))^r;
* Delta = eta^24;
* E_k^{psi,phi} = delta(psi) L(1-k, phi) [+ delta(phi) L(0, psi) for k = 1] + 2 sum
  sigma^{psi,phi}_{k-1}(n) q^n with L(1-k, phi) = -B_{k,phi}/k from Bernoulli polynomials, and
  the divisor sum over the divisors read off the factorisation of n (Diamond-Shurman, A First
  Course in Modular Forms, §4.5-4.8);
* theta series of an even lattice with Gram matrix A: sum_x q^(x^T A x / 2), counted over
  the integer points of a box that contains every x with x^T A x / 2 below the precision.
"""

from __future__ import annotations

import math
from fractions import Fraction

from verifier.recheck.arith import (
    bernoulli,
    character_value,
    conductor,
    factor,
    generalised_bernoulli,
    kronecker,
    sigma,
)
from verifier.recheck.series import Series

MAX_LATTICE_POINTS = 2_000_000


class TooLarge(Exception):
    """The computation would be too large for the re-checker."""


def eisenstein(k: int, prec: int) -> Series:
    """E_k to precision ``prec`` (k even, k >= 2)."""
    factor = Fraction(-2 * k) / bernoulli(k)
    coeffs = [Fraction(1)] + [factor * sigma(k - 1, n) for n in range(1, prec)]
    return Series(0, coeffs, prec)


def character_parity_ok(k: int, psi: int, phi: int) -> bool:
    """Whether E_k^{psi,phi} is a modular form: k >= 1, psi(-1) phi(-1) = (-1)^k (chi_D(-1) = sign D),
    and not k = 2 with both characters trivial."""
    sign = (1 if psi > 0 else -1) * (1 if phi > 0 else -1)
    return k >= 1 and sign == (-1) ** k and not (k == 2 and psi == 1 and phi == 1)


def _divisors_from_factors(n: int) -> list[int]:
    out = [1]
    for p, e in factor(n).items():
        out = [d * p**i for d in out for i in range(e + 1)]
    return out


def eisenstein_character(k: int, psi: int, phi: int, prec: int) -> Series:
    """E_k^{psi,phi} to precision ``prec`` (psi, phi given by their kernels)."""
    c0 = Fraction(0)
    if psi == 1:
        c0 -= generalised_bernoulli(k, phi) / k
    if k == 1 and phi == 1:
        c0 -= generalised_bernoulli(1, psi)
    fu, fv = conductor(psi), conductor(phi)
    coeffs = [c0]
    for n in range(1, prec):
        s = 0
        for d in _divisors_from_factors(n):
            a = character_value(psi, n // d, fu) if fu > 1 else 1
            b = character_value(phi, d, fv) if fv > 1 else 1
            s += a * b * d ** (k - 1)
        coeffs.append(Fraction(2 * s))
    return Series(0, coeffs[: max(prec, 0)], prec)


def euler(prec: int) -> Series:
    """prod_{n >= 1} (1 - q^n) = sum_m (-1)^m q^(m(3m-1)/2)."""
    coeffs = [Fraction(0)] * max(prec, 0)
    m = 0
    while True:
        done = True
        for j in (m, -m) if m else (0,):
            e = j * (3 * j - 1) // 2
            if e < prec:
                coeffs[e] += (-1) ** (j % 2)
                done = False
        if done and m > 0:
            break
        m += 1
    return Series(0, coeffs, prec)


def partitions(prec: int) -> Series:
    """sum p(n) q^n = 1 / prod (1 - q^n), by p(n) = sum_{j != 0} (-1)^(j+1) p(n - j(3j-1)/2)."""
    p = [0] * max(prec, 0)
    if prec > 0:
        p[0] = 1
    for n in range(1, prec):
        total, j = 0, 1
        while True:
            g1, g2 = j * (3 * j - 1) // 2, j * (3 * j + 1) // 2
            if g1 > n:
                break
            sign = 1 if j % 2 else -1
            total += sign * p[n - g1]
            if g2 <= n:
                total += sign * p[n - g2]
            j += 1
        p[n] = total
    return Series(0, [Fraction(x) for x in p], prec)


def eta_quotient(pairs: list[tuple[int, int]], prec: int) -> Series:
    """prod eta(d tau)^r to precision ``prec`` (sum d r must be divisible by 24)."""
    total = sum(d * r for d, r in pairs)
    if total % 24:
        raise TooLarge("the eta quotient has a fractional power of q in front")
    shift = total // 24
    rel = prec - shift
    if rel <= 0:
        # Every coefficient below q^shift is 0: nothing of the product is needed below prec.
        return Series(shift, [], shift)
    out = Series.constant(Fraction(1), rel)
    for d, r in pairs:
        base = euler(-(-rel // d)) if r > 0 else partitions(-(-rel // d))
        out = out * base.inflate(d).truncate(rel).power(abs(r))
    return Series(out.lo + shift, list(out.coeffs), out.prec + shift)


def _square_completion(gram: list[list[int]]) -> list[list[Fraction]]:
    """q with x^T A x = sum_i q_ii (x_i + sum_{j > i} q_ij x_j)^2 (completing squares, as in
    H. Cohen, A Course in Computational Algebraic Number Theory, Alg. 2.7.5)."""
    n = len(gram)
    q = [[Fraction(x) for x in row] for row in gram]
    for i in range(n):
        if q[i][i] <= 0:
            raise ValueError("the Gram matrix is not positive definite")
        for j in range(i + 1, n):
            q[j][i] = q[i][j]
            q[i][j] = q[i][j] / q[i][i]
        for k in range(i + 1, n):
            for m in range(k, n):
                q[k][m] -= q[k][i] * q[i][m]
    return q


def unary_theta(kernel: int, nu: int, prec: int) -> Series:
    """sum_{n in Z} psi(n) n^nu q^(n^2), psi the character of kernel D, counted over n >= 0.

    n and -n give psi(-n)(-n)^nu = psi(n) n^nu when psi(-1) = (-1)^nu (checked by the caller),
    so each n >= 1 counts twice; n = 0 counts once, and only for the trivial character with nu = 0.
    """
    disc = kernel if kernel % 4 == 1 else 4 * kernel
    coeffs = [Fraction(0)] * max(prec, 0)
    if prec > 0 and kernel == 1 and nu == 0:
        coeffs[0] = Fraction(1)
    n = 1
    while n * n < prec:
        value = 1 if disc == 1 else (0 if math.gcd(n, disc) > 1 else kronecker(disc, n))
        coeffs[n * n] += 2 * value * n**nu
        n += 1
    return Series(0, coeffs, max(prec, 0))


def theta(gram: list[list[int]], prec: int) -> Series:
    """sum over x in Z^n of q^(x^T A x / 2), for an even positive-definite Gram matrix A.

    Every x with x^T A x <= 2 (prec - 1) is visited once: the last coordinate first, each
    coordinate limited by what the squares already chosen leave (the Fincke-Pohst bound).
    """
    n = len(gram)
    q = _square_completion(gram)
    top = Fraction(2 * max(prec - 1, 0))
    counts = [0] * max(prec, 0)
    visited = 0
    x = [0] * n

    def walk(i: int, left: Fraction) -> None:
        nonlocal visited
        if i < 0:
            visited += 1
            if visited > MAX_LATTICE_POINTS:
                raise TooLarge(f"more than {MAX_LATTICE_POINTS} lattice points to count")
            v = int(top - left) // 2
            if v < prec:
                counts[v] += 1
            return
        centre = -sum((q[i][j] * x[j] for j in range(i + 1, n)), Fraction(0))
        reach = math.isqrt(math.floor(left / q[i][i])) + 1
        for xi in range(math.floor(centre) - reach, math.ceil(centre) + reach + 1):
            used = q[i][i] * (xi - centre) ** 2
            if used <= left:
                x[i] = xi
                walk(i - 1, left - used)
        x[i] = 0

    if prec > 0:
        walk(n - 1, top)
    return Series(0, [Fraction(c) for c in counts], prec)


def periodic_product(period: int, values: list[int], finite: dict[int, int], prec: int) -> Series:
    """prod_{n>=1} (1 - q^n)^c(n), c(n) = values[(n-1) % period] + finite[n], to ``prec`` terms.

    By the logarithmic derivative: q P'/P = sum_j b_j q^j with b_j = -sum_{d | j} d c(d), so
    n a_n = sum_{j=1}^{n} b_j a_(n-j) and a_0 = 1 (as n p(n) = sum sigma(k) p(n-k); Apostol,
    Introduction to Analytic Number Theory, Ch. 14); the b_j are summed over multiples, a sieve.
    """
    prec = max(prec, 1)

    def c(n: int) -> int:
        return (values[(n - 1) % period] if period else 0) + finite.get(n, 0)

    b = [0] * prec
    for d in range(1, prec):
        cd = c(d)
        if cd:
            for j in range(d, prec, d):
                b[j] -= d * cd
    a = [1] + [0] * (prec - 1)
    for n in range(1, prec):
        total = sum(b[j] * a[n - j] for j in range(1, n + 1) if b[j])
        if total % n:
            raise ValueError(f"the product recurrence gave a non-integral coefficient at q^{n}")
        a[n] = total // n
    return Series(0, [Fraction(x) for x in a], prec)

"""Integer arithmetic shared by every stage: factorisations, divisors, the Kronecker symbol and
quadratic characters (docs/method.md#characters).

Nothing here knows about manuscripts, forms or proofs, so the scanner, the parser, the forms
and the prover may all use it.

The only characters a manuscript's eta quotients, theta series and quadratic-form theta
series produce are quadratic: the Gordon–Hughes–Newman character of an eta quotient is
``d -> ((-1)^k prod delta^|r_delta| / d)`` (docs/method.md#eta-modularity), and theta series carry
``chi_D`` for a discriminant ``D``. A quadratic character is pinned down by one signed
squarefree integer, its *kernel*; this module stores exactly that.

Convention: the nebentypus of ``f`` is ``chi`` when ``f(gamma tau) = chi(d) (c tau + d)^k f(tau)``
(docs/method.md#characters). For a quadratic character ``chi = chi-bar``, so authors who write ``chi(a)`` mean
the same character.
"""

from __future__ import annotations

from dataclasses import dataclass

import flint

# ---------------------------------------------------------------------------
# The Kronecker symbol
# ---------------------------------------------------------------------------


def _jacobi(a: int, n: int) -> int:
    """The Jacobi symbol (a/n) for odd n > 0: the product of the Legendre symbols (a/p_i)^e_i.

    Computed with the usual reciprocity algorithm: (2/n) = (-1)^((n^2-1)/8), and for odd
    coprime a, n > 0, (a/n)(n/a) = (-1)^((a-1)/2 (n-1)/2); (a/n) depends only on a mod n.
    """
    a %= n
    result = 1
    while a:
        while a % 2 == 0:
            a //= 2
            if n % 8 in (3, 5):
                result = -result
        a, n = n, a
        if a % 4 == 3 and n % 4 == 3:
            result = -result
        a %= n
    return result if n == 1 else 0


def kronecker(a: int, n: int) -> int:
    """The Kronecker symbol (a/n) for all integers a and n, exactly as docs/method.md#characters defines it.

    - (a/0) = 1 if a = +-1, else 0;
    - (a/-1) = -1 if a < 0, else +1;
    - (a/2) = 0 for even a, +1 for a = +-1 mod 8, -1 for a = +-3 mod 8;
    - (a/p) is the Legendre symbol for odd primes p;
    - completely multiplicative in n: (a/n) = (a/u) prod (a/p_i)^e_i for n = u prod p_i^e_i, u = +-1.
    """
    if n == 0:
        return 1 if a in (1, -1) else 0
    result = 1
    if n < 0:
        # The unit u = -1 contributes (a/-1).
        n = -n
        if a < 0:
            result = -1
    # The factor 2^v of n contributes (a/2)^v.
    v = (n & -n).bit_length() - 1
    if v:
        if a % 2 == 0:
            return 0
        n >>= v
        if v % 2 and a % 8 in (3, 5):
            result = -result
    # The odd part: the product of the Legendre symbols is the Jacobi symbol.
    return result * _jacobi(a, n)


def squarefree_kernel(d: int) -> int:
    """The signed squarefree part of d != 0: the squarefree k with d = k s^2 and sign(k) = sign(d).

    Examples: -4 -> -1, 12 -> 3, 8 -> 2, -27 -> -3, 1 -> 1.
    """
    if d == 0:
        raise ValueError("the squarefree kernel of 0 is undefined")
    k = 1
    for p, e in flint.fmpz(abs(d)).factor():
        if e % 2:
            k *= int(p)
    return k if d > 0 else -k


def _is_squarefree(k: int) -> bool:
    return k != 0 and all(e == 1 for _, e in flint.fmpz(abs(k)).factor())


# ---------------------------------------------------------------------------
# Quadratic characters
# ---------------------------------------------------------------------------


@dataclass(frozen=True)
class QuadraticCharacter:
    """A primitive quadratic (or trivial) Dirichlet character, stored by its squarefree kernel.

    The character with kernel ``k`` is ``chi_D(n) = (D/n)`` (Kronecker symbol) with ``D`` the
    fundamental discriminant of Q(sqrt k): ``D = k`` if ``k = 1 mod 4``, else ``D = 4k``.
    ``chi_D`` is a primitive character of conductor ``|D|`` with ``chi_D(-1) = sign D``
    (docs/method.md#characters). Kernel 1 is the trivial character (D = 1, conductor 1).

    Why the kernel is canonical. For d = k s^2 and n prime to d, multiplicativity of the
    Kronecker symbol in its *upper* argument for fixed n, (D1 D2 / n) = (D1/n)(D2/n), gives
    (d/n) = (k/n) (s/n)^2 = (k/n), because (s/n) = +-1 when gcd(s, n) = 1. If moreover n is odd,
    (4k/n) = (4/n)(k/n) = (k/n). Hence every integer d whose squarefree part is k defines, on
    n prime to 2d, the same function as chi_D; two characters of this kind that agree on all n
    prime to a level N (with N divisible by both conductors) have the same kernel, because a
    primitive character is determined by its values on integers prime to any multiple of its
    conductor. So one signed squarefree integer is exactly the information a quadratic nebentypus
    carries, and equality of kernels is equality of characters on n prime to the level.
    """

    kernel: int

    def __post_init__(self) -> None:
        if not _is_squarefree(self.kernel):
            raise ValueError(f"kernel must be a nonzero squarefree integer, got {self.kernel}")

    @classmethod
    def from_integer(cls, d: int) -> QuadraticCharacter:
        """The primitive character agreeing with n -> (d/n) on every n prime to 2d (d != 0).

        If the kernel of d is 1 mod 4 (d = -3, 5, 20, -27, ...), the agreement holds on all n prime
        to d. Otherwise the conductor has a 2-part that d may lack: (3/n) and (-1/n) agree with
        chi_{12} and chi_{-4} only on odd n (for instance (3/2) = -1 but chi_{12}(2) = 0).
        """
        return cls(squarefree_kernel(d))

    @property
    def disc(self) -> int:
        """The fundamental discriminant D (1 for the trivial character)."""
        return self.kernel if self.kernel % 4 == 1 else 4 * self.kernel

    @property
    def conductor(self) -> int:
        """|D|, the least modulus of the character (1 for the trivial character)."""
        return abs(self.disc)

    @property
    def is_trivial(self) -> bool:
        """True for the trivial character (kernel 1)."""
        return self.kernel == 1

    @property
    def is_even(self) -> bool:
        """chi(-1) = +1; by (D/-1) = sign D this is D > 0 (docs/method.md#characters)."""
        return self.kernel > 0

    def value(self, n: int) -> int:
        """chi(n) = (D/n), the Kronecker symbol; 0 exactly when gcd(n, D) > 1."""
        return kronecker(self.disc, n)

    def __call__(self, n: int) -> int:
        """Same as :meth:`value`."""
        return self.value(n)

    def __mul__(self, other: QuadraticCharacter) -> QuadraticCharacter:
        """The primitive character inducing chi * psi: kernel of the product of the kernels.

        On n prime to both conductors, (D1/n)(D2/n) = (D1 D2/n), and D1 D2 has the same
        squarefree part as k1 k2 (they differ by a square factor 4 or 16).
        """
        if not isinstance(other, QuadraticCharacter):
            return NotImplemented
        return QuadraticCharacter(squarefree_kernel(self.kernel * other.kernel))

    def __pow__(self, e: int) -> QuadraticCharacter:
        """chi^e: chi for odd e, trivial for even e (chi^2 = 1, chi^-1 = chi)."""
        return self if e % 2 else TRIVIAL

    @property
    def name(self) -> str:
        """Plain-text name: ``trivial`` or ``chi_{D}`` (e.g. ``chi_{-4}``, ``chi_{12}``)."""
        return "trivial" if self.is_trivial else f"chi_{{{self.disc}}}"

    @property
    def latex(self) -> str:
        """LaTeX name: ``\\mathbf{1}`` or ``\\chi_{D}``."""
        return "\\mathbf{1}" if self.is_trivial else f"\\chi_{{{self.disc}}}"

    def __str__(self) -> str:
        return self.name


TRIVIAL = QuadraticCharacter(1)


def is_fundamental_discriminant(d: int) -> bool:
    """d = 1, or d is the discriminant of a quadratic field (d = k = 1 mod 4 or d = 4k, k = 2, 3 mod 4)."""
    return d != 0 and QuadraticCharacter.from_integer(d).disc == d


# ---------------------------------------------------------------------------
# Factorisations
# ---------------------------------------------------------------------------


def prime_factors(n: int) -> list[int]:
    """The distinct primes dividing n (FLINT's factorisation: a large n never loops to sqrt(n))."""
    if n <= 1:
        return []
    return sorted(int(p) for p, _ in flint.fmpz(n).factor())


def valuation(n: int, p: int) -> int:
    """The exponent of the prime p in the nonzero integer n."""
    if n == 0:
        raise ValueError("the valuation of 0 is infinite")
    e = 0
    while n % p == 0:
        n //= p
        e += 1
    return e


def divisors(n: int) -> list[int]:
    """The divisors of n, from its factorisation (never a loop up to n)."""
    out = [1]
    for p in prime_factors(n):
        e, m = 0, n
        while m % p == 0:
            m //= p
            e += 1
        out = [d * p**k for d in out for k in range(e + 1)]
    return sorted(out)


def euler_phi(n: int) -> int:
    """Euler's totient of n >= 1."""
    phi = n
    for p in prime_factors(n):
        phi -= phi // p
    return phi


__all__ = [
    "TRIVIAL",
    "QuadraticCharacter",
    "divisors",
    "euler_phi",
    "is_fundamental_discriminant",
    "kronecker",
    "prime_factors",
    "squarefree_kernel",
]

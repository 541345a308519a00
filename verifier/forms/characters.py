"""Quadratic Dirichlet characters and the Kronecker symbol (docs/method.md#characters).

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

import re
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
# Reading a character written by an author (tag option ``character=``)
# ---------------------------------------------------------------------------

# Integers are bounded so that factoring them is instantaneous.
_INT = r"[+-]?\d{1,18}"
# What stands for the argument of the character: \cdot, a bullet, a star, or one letter.
_VAR = r"(?:\\cdot|\\bullet|\\ast|\\star|\*|[A-Za-z])"
_FRAC = r"\\[dt]?frac"
_BRACED_INT = rf"(?:\{{({_INT})\}}|(\d))"

# \chi_{D} (D a fundamental discriminant, or 0 / 1 for the trivial character), optionally
# followed by its argument: \chi_{-4}(n). The backslash may be missing (plain text, and our own
# ``name``).
_CHI = re.compile(rf"\\?chi_{_BRACED_INT}(?:\({_VAR}\))?")
# (D/.) : the Kronecker symbol with the character's argument below.
_KRON_UPPER = re.compile(rf"\({_FRAC}\{{({_INT})\}}(?:\{{{_VAR}\}}|{_VAR})\)")
# (./m) : the Jacobi symbol with the argument on top, m odd and positive.
_KRON_LOWER = re.compile(rf"\({_FRAC}(?:\{{{_VAR}\}}|{_VAR})(?:\{{(\+?\d{{1,18}})\}}|(\d))\)")
_TRIVIAL_WORD = re.compile(
    r"(?:trivial|principal|1|\\mathbf\{1\}|\\mathbf1|\\mathbb\{1\}|\\mathbb1|\\mathbbm\{1\}|\\mathbbm1"
    r"|\\mathds\{1\}|\\mathds1|\\varepsilon)",
    re.IGNORECASE,
)
_EXPONENT = re.compile(rf"\^(?:\{{({_INT})\}}|(\d))")
_SEPARATOR = re.compile(r"\\cdot|\\times")

# Spacing commands and delimiter-size commands carry no meaning here.
_SPACING = re.compile(r"\\[,;:! ]|\\quad|\\qquad|~")
_SIZING = re.compile(r"\\(?:left|right|[bB]igg?[lr]?)(?=[()])")


def _normalise(text: str) -> str:
    s = text.strip()
    if len(s) >= 2 and s[0] == "$" and s[-1] == "$":
        s = s.strip("$")
    elif s.startswith("\\(") and s.endswith("\\)"):
        s = s[2:-2]
    s = s.replace("\u2212", "-")  # a typeset minus sign
    s = _SPACING.sub("", s)
    s = re.sub(r"\s+", "", s)
    return _SIZING.sub("", s)


def _factor(s: str, i: int) -> tuple[QuadraticCharacter, int] | None:
    """Read one factor at position i: the character and the position after it."""
    m = _CHI.match(s, i)
    if m:
        d = int(m.group(1) or m.group(2))
        if d == 0:
            # \chi_0: the principal character.
            return TRIVIAL, m.end()
        # Subscripts are read as discriminants (chi_D = (D/.)); anything else (\chi_3, \chi_4)
        # names a character by its modulus and is ambiguous.
        if not is_fundamental_discriminant(d):
            return None
        return QuadraticCharacter.from_integer(d), m.end()
    m = _KRON_UPPER.match(s, i)
    if m:
        d = int(m.group(1))
        if d == 0:
            return None
        return QuadraticCharacter.from_integer(d), m.end()
    m = _KRON_LOWER.match(s, i)
    if m:
        odd = int(m.group(1) or m.group(2))
        if odd <= 0 or odd % 2 == 0:
            return None
        # For odd m > 0, n -> (n/m) is the character chi_{m*}, m* = (-1)^((m-1)/2) m:
        # quadratic reciprocity gives (n/m) = (m*/n) for odd n > 0 prime to m.
        star = odd if odd % 4 == 1 else -odd
        return QuadraticCharacter.from_integer(star), m.end()
    m = _TRIVIAL_WORD.match(s, i)
    if m:
        return TRIVIAL, m.end()
    return None


def parse_character(text: str) -> QuadraticCharacter | None:
    """Read a quadratic character as authors write it; None if it is not readable.

    Accepted (with optional ``$...$``, spacing and ``\\left``/``\\right``/``\\bigl``... sizes):

    - ``\\chi_{D}`` or ``chi_{D}`` for a fundamental discriminant D (``\\chi_{-4}``, ``\\chi_{12}``, ``\\chi_5``);
    - ``\\left(\\frac{D}{\\cdot}\\right)`` with ``\\cdot``, ``\\bullet``, ``*`` or a letter below:
      the character agreeing with n -> (D/n) on n prime to 2D (``(-1/.)`` is chi_{-4});
    - ``\\left(\\frac{\\cdot}{m}\\right)`` for odd m > 0: n -> (n/m), which is chi_{m*};
    - the trivial character: ``trivial``, ``principal``, ``1``, ``\\mathbf 1``, ``\\chi_0``, ``\\varepsilon``;
    - products of these (juxtaposed or joined by ``\\cdot``/``\\times``) and integer powers ``^{e}``.

    Parsing is by regular expressions only; nothing is evaluated.
    """
    s = _normalise(text)
    if not s or len(s) > 400:
        return None
    i = 0
    result = TRIVIAL
    first = True
    while i < len(s):
        if not first:
            sep = _SEPARATOR.match(s, i)
            if sep:
                i = sep.end()
        got = _factor(s, i)
        if got is None:
            return None
        chi, i = got
        exp = _EXPONENT.match(s, i)
        if exp:
            chi = chi ** int(exp.group(1) or exp.group(2))
            i = exp.end()
        result = result * chi
        first = False
    return None if first else result


__all__ = [
    "TRIVIAL",
    "QuadraticCharacter",
    "is_fundamental_discriminant",
    "kronecker",
    "parse_character",
    "squarefree_kernel",
]

"""A modular form restricted to a class of n: ``F|_C = sum_{n in C} a(n) q^n`` (docs/method.md#classes-of-n).

A class ``C`` of n modulo m (a set R of residues) is *cut out by quadratic characters* when its
indicator is a rational combination of the real Dirichlet characters ``psi`` modulo m (each
``psi = chi_D`` on n prime to m and 0 elsewhere, ``D`` a fundamental discriminant with
``|D| | m``; ``D = 1`` is the principal character) and, for the multiples of the primes of m,
of the constant 1::

    1_C(n) = c_1 + sum_D c_D psi_D(n)      for every integer n,

so that ``F|_C = c_1 F + sum_D c_D (F tensor psi_D)``.  The twist of ``F`` in
``M_k(Gamma_0(N), chi)`` by a character ``psi`` modulo m lies in ``M_k(Gamma_0(N m^2), chi psi^2)``
(Ono, *The Web of Modularity*, CBMS 102 (2004), Proposition 2.8; Shimura, *Introduction to the
Arithmetic Theory of Automorphic Functions* (1971), Proposition 3.64; from memory).  For a real
``psi``, ``psi^2`` is the principal character modulo m, which is trivial on ``Gamma_0(N m^2)``: the
restriction keeps the weight and the character and lies on ``Gamma_0(N m^2)``.  The principal
character alone gives ``F - V_p U_p F`` for m = p (n prime to p), with the same level ``N p^2``
(Atkin and Lehner, Math. Ann. 185 (1970), Lemma 17; from memory).

The combination is found by orthogonality of characters and then checked exactly on every
residue modulo m, so a class it does not cut out (n = 1 mod 5, n = 2 mod 4) is refused, never
approximated.  Its coefficients are rational and each coefficient of ``F|_C`` is a coefficient
of ``F`` or 0, so ``F|_C`` is p-integral exactly where ``F`` is: Sturm's theorem modulo M applies
to it as it stands (docs/method.md#congruences-sturm), no scaling by 2 or phi(m) is needed.
Only holomorphic modular forms are twisted; a quasimodular ``E_2`` piece is not covered.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction

from flint import fmpq_poly

from verifier.numbers import divisors, euler_phi, is_fundamental_discriminant, kronecker
from verifier.series.qseries import QSeries


@dataclass(frozen=True)
class Restriction:
    """How a class of n modulo ``modulus`` is cut out: ``1_C = constant + sum_D coefficient_D psi_D``.

    ``level`` is the level of every restricted form (the form's level times ``modulus**2``).
    """

    modulus: int
    residues: frozenset[int]
    constant: Fraction
    characters: tuple[tuple[int, Fraction], ...]  # (fundamental discriminant D, coefficient)
    level: int

    def restrict(self, series: QSeries) -> QSeries:
        """The series with every coefficient of q^n, n outside the class, set to 0 (exact)."""
        poly = series.poly
        kept = [poly[i] if (series.offset + i) % self.modulus in self.residues else 0 for i in range(poly.degree() + 1)]
        return QSeries(fmpq_poly(kept), series.offset, series.prec)

    def describe(self) -> str:
        """The combination of twists, as the messages say it."""
        parts = [f"{self.constant}" if self.constant else ""] + [
            f"{c}*({'principal' if d == 1 else f'({d}/n)'} mod {self.modulus})" for d, c in self.characters if c
        ]
        return " + ".join(p for p in parts if p)


def real_characters(m: int) -> list[int]:
    """The fundamental discriminants D (1 included) with ``|D|`` dividing m: the real characters mod m."""
    return sorted({d * s for d in divisors(m) for s in (1, -1) if is_fundamental_discriminant(d * s)})


def _psi(d: int, m: int, n: int) -> int:
    return kronecker(d, n) if math.gcd(n, m) == 1 else 0


def restriction(level: int, modulus: int, residues: frozenset[int]) -> Restriction | str:
    """The restriction to the class, or the reason it is not cut out by quadratic characters."""
    m = modulus
    units = [r for r in range(m) if math.gcd(r, m) == 1]
    others = [r for r in range(m) if math.gcd(r, m) != 1]
    chosen_others = [r for r in others if r in residues]
    constant = Fraction(0)
    if chosen_others:
        if len(chosen_others) != len(others):
            return (
                f"the class modulo {m} takes some but not all n sharing a factor with {m}; only classes of n "
                f"prime to {m}, and all multiples of the primes of {m}, are cut out by quadratic characters"
            )
        constant = Fraction(1)  # 1_C = 1 - (principal) + (the part prime to m)
    phi = euler_phi(m)
    coefficients: list[tuple[int, Fraction]] = []
    for d in real_characters(m):
        c = Fraction(sum(_psi(d, m, r) for r in units if r in residues), phi)
        if d == 1 and chosen_others:
            c -= 1
        if c:
            coefficients.append((d, c))
    for n in range(m):
        value = constant + sum((c * _psi(d, m, n) for d, c in coefficients), Fraction(0))
        if value != (1 if n in residues else 0):
            return (
                f"the class is not cut out by quadratic characters modulo {m} (its indicator at n = {n} is "
                f"{1 if n in residues else 0}, the nearest combination of real characters gives {value}); only "
                "classes such as n prime to p, (n/p) = +-1 and n = r mod m with m | 24 are proved"
            )
    return Restriction(m, residues, constant, tuple(coefficients), level * m * m)

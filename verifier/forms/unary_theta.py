"""Unary theta series with a quadratic character (docs/method.md#unary-theta, #weight-one-half).

For a primitive quadratic (or trivial) character psi of conductor r and nu in {0, 1} with
psi(-1) = (-1)^nu,

    theta_{psi,nu}(tau) = sum_{n in Z} psi(n) n^nu q^{n^2}

is a modular form of weight nu + 1/2, and theta_{psi,nu}(t tau) lies in

    M_{nu+1/2}(Gamma_0(4 r^2 t), psi chi_{-4}^nu (4t/.))

in the convention of docs/method.md#half-integral-weight (characters relative to the theta
multiplier); it is holomorphic at every cusp, and a cusp form for nu = 1 (Shimura, "On modular
forms of half integral weight", Ann. of Math. 97 (1973), §2; Serre and Stark, "Modular forms
of weight 1/2", LNM 627 (1977), §2).  With the wrong parity the sum is identically 0 and no
atom is made of it.  ``tests/test_unary_theta.py`` checks the level and the character numerically
at points gamma tau.

Atom parameters: ``(kernel, nu)``, ``kernel`` the squarefree kernel of psi
(:class:`verifier.numbers.QuadraticCharacter`); the scale t is the atom's scale.
"""

from __future__ import annotations

import math
from fractions import Fraction

from verifier.numbers import QuadraticCharacter
from verifier.series.qseries import QSeries

KEY = "utheta"


def parity_ok(kernel: int, nu: int) -> bool:
    """psi(-1) = (-1)^nu: otherwise the series vanishes identically."""
    return nu in (0, 1) and QuadraticCharacter(kernel).is_even == (nu == 0)


def weight(nu: int) -> Fraction:
    """nu + 1/2."""
    return Fraction(2 * nu + 1, 2)


def level(kernel: int, nu: int, scale: int) -> int:
    """4 r^2 t."""
    r = QuadraticCharacter(kernel).conductor
    return 4 * r * r * scale


def character(kernel: int, nu: int, scale: int) -> QuadraticCharacter:
    """psi chi_{-4}^nu (4t/.), relative to the theta multiplier."""
    chi = QuadraticCharacter(kernel) * QuadraticCharacter.from_integer(4 * scale)
    return chi * QuadraticCharacter(-1) if nu else chi


def series(kernel: int, nu: int, prec: int) -> QSeries:
    """sum_{n in Z} psi(n) n^nu q^{n^2} + O(q^prec), exactly (n and -n counted separately)."""
    psi = QuadraticCharacter(kernel)
    prec = max(prec, 1)
    coeffs = [0] * prec
    for n in range(-math.isqrt(prec - 1), math.isqrt(prec - 1) + 1):
        coeffs[n * n] += psi.value(n) * n**nu
    return QSeries.from_coefficients([Fraction(c) for c in coeffs], 0, prec)


def label(kernel: int, nu: int, scale: int) -> str:
    """How the atom is written in messages."""
    disc = QuadraticCharacter(kernel).disc
    arg = "tau" if scale == 1 else f"{scale}tau"
    return f"theta[chi_{disc}, n^{nu}]({arg})"

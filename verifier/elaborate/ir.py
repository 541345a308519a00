"""Typed expressions: what a side of a claim means, independent of its LaTeX spelling.

Leaves are rational constants, the monomial ``q^n`` of a printed expansion, and atoms
(named modular forms at ``tau -> d*tau``).  Each node carries its :class:`Typ`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any


@dataclass(frozen=True)
class Typ:
    """What elaboration knows about an expression.

    ``weight`` is None for the constant 0 (which has every weight) and for printed
    q-expansions (which have none).  ``den_weight`` is the total weight of the
    denominators that clearing fractions will multiply by; ``level`` the least N with
    every atom on Gamma_0(N); ``depth`` the highest power of E_2; ``printed`` whether a
    ``q`` of a printed expansion occurs.
    """

    weight: Fraction | None
    depth: int = 0
    level: int = 1
    den_weight: Fraction = Fraction(0)
    printed: bool = False
    has_pole: bool = False
    # A sum of several weights (a generating function such as (E_4 - 1)/240); ``weight``
    # is then the largest of them.  Proofs split it by weight (docs/method.md#quasimodular).
    mixed: bool = False


@dataclass(frozen=True)
class Expr:
    """Base of typed expressions; ``text`` is the author's spelling, for messages."""

    typ: Typ = field(compare=False)
    text: str = field(compare=False)


@dataclass(frozen=True)
class Const(Expr):
    """A rational constant."""

    value: Fraction = Fraction(0)


@dataclass(frozen=True)
class QPower(Expr):
    """``q^n`` in a printed expansion (n rational until the claim is rescaled)."""

    exponent: Fraction = Fraction(1)


@dataclass(frozen=True)
class Atom(Expr):
    """A named form at ``scale * tau``: ``E2``, ``E4``, ..., ``Delta``, ``eta``, ``theta``.

    ``params`` are the family's parameters (see :mod:`verifier.forms.registry`); for eta
    quotients the scale is folded into the deltas and ``scale`` stays 1.
    """

    key: str = ""
    scale: Fraction = Fraction(1)
    params: tuple[Any, ...] = ()


@dataclass(frozen=True)
class Sum(Expr):
    """``left + sign * right``."""

    left: Expr | None = None
    right: Expr | None = None
    sign: int = 1


@dataclass(frozen=True)
class Product(Expr):
    """``left * right``."""

    left: Expr | None = None
    right: Expr | None = None


@dataclass(frozen=True)
class Quotient(Expr):
    """``left / right``."""

    left: Expr | None = None
    right: Expr | None = None


@dataclass(frozen=True)
class Power(Expr):
    """``base ^ exponent`` with an integer exponent (negative: a quotient)."""

    base: Expr | None = None
    exponent: int = 1


@dataclass(frozen=True)
class Deriv(Expr):
    """``D base`` with D = q d/dq = (2 pi i)^{-1} d/dtau (docs/method.md#derivatives)."""

    base: Expr | None = None


@dataclass(frozen=True)
class Hecke(Expr):
    """``T_n base`` (``U_n`` when ``kind`` is "U"): a Hecke operator on a modular form (docs/method.md#hecke)."""

    base: Expr | None = None
    n: int = 1
    kind: str = "T"


@dataclass(frozen=True)
class Shift(Expr):
    """``q^exponent * base`` where base is not a printed expansion: an infinite product is
    an eta quotient times a power of q (docs/method.md#products).  A claim whose sides carry
    the same shift is decided after dividing it out; otherwise the sides are compared as
    q-series only (docs/method.md#series-only)."""

    base: Expr | None = None
    exponent: Fraction = Fraction(0)


@dataclass(frozen=True)
class Side:
    """One side of a claim: an expression and, for printed expansions, where it stops.

    ``big_o`` is m for a side written ``... + O(q^m)``; ``dots`` says the side ends in
    ``\\cdots`` (it then claims every coefficient up to its highest printed power,
    ``degree``).  Exponents are in q = e^{2 pi i tau}; after the claim is rescaled
    (:mod:`verifier.elaborate.rescale`) they are integers.
    """

    expr: Expr
    printed: bool
    big_o: Fraction | None = None
    dots: bool = False
    degree: Fraction = Fraction(0)

    @property
    def truncation(self) -> int | None:
        """Exclusive bound of the claimed exponents (None: the side is exact)."""
        bounds = [b for b in (self.big_o, self.degree + 1 if self.dots else None) if b is not None]
        if not bounds:
            return None
        return math.ceil(min(bounds))


def atoms_of(expr: Expr) -> list[Atom]:
    """Every atom in an expression."""
    if isinstance(expr, Atom):
        return [expr]
    out: list[Atom] = []
    for child in (
        getattr(expr, "left", None),
        getattr(expr, "right", None),
        getattr(expr, "base", None),
    ):
        if isinstance(child, Expr):
            out.extend(atoms_of(child))
    return out

"""Typed expressions: what a side of a claim means, independent of its LaTeX spelling.

Leaves are rational constants, the monomial ``q^n`` of a printed expansion, and atoms
(named modular forms at ``tau -> d*tau``).  Each node carries its :class:`Typ`.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction


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
    """``q^n`` in a printed expansion."""

    exponent: int = 1


@dataclass(frozen=True)
class Atom(Expr):
    """A named form evaluated at ``scale * tau``: ``E2``, ``E4``, ..., ``Delta``."""

    key: str = ""
    scale: int = 1


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
class Side:
    """One side of a claim: an expression and, for printed expansions, where it stops.

    ``truncation`` is T when the side is claimed only up to ``O(q^T)`` (from ``O(q^T)``
    or from ``\\cdots`` after the last printed power); None when the side is exact.
    """

    expr: Expr
    truncation: int | None
    printed: bool
    degree: int = 0  # highest power of q printed (forms count as degree 0)


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

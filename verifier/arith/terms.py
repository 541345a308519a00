"""Arithmetic expressions in summation variables, built from the claim's AST.

They are evaluated exactly for given integer values (:mod:`verifier.arith.values`) and,
where a modular generating function is known, translated into typed form expressions
(:mod:`verifier.arith.genfun`).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Any


@dataclass(frozen=True)
class A:
    """Base of arithmetic expressions."""

    text: str


@dataclass(frozen=True)
class Num(A):
    """A rational constant."""

    value: Fraction


@dataclass(frozen=True)
class Var(A):
    """A summation or free variable (n, m, d)."""

    name: str


@dataclass(frozen=True)
class Fun(A):
    """An arithmetic function applied to an argument.

    ``name`` is one of ``sigma`` (``index`` = k), ``tau``, ``r`` (``index`` = s), ``rQ`` and
    ``coef`` (``form`` = the typed form expression whose coefficients are meant), ``p``,
    ``phi``, ``mu``, ``chi`` (``index`` = discriminant of the quadratic character).
    """

    name: str
    index: int | None
    arg: A
    form: Any = None


@dataclass(frozen=True)
class Bin(A):
    """``left op right`` with op in ``+ - * /``."""

    op: str
    left: A
    right: A


@dataclass(frozen=True)
class Pow(A):
    """``base ^ exponent`` (the exponent may involve variables: ``(-1)^{n+d}``)."""

    base: A
    exponent: A


@dataclass(frozen=True)
class Sum(A):
    """A finite sum: ``kind`` ``from`` (var = lower .. upper) or ``divides`` (var | lower)."""

    kind: str
    var: str
    lower: A
    upper: A | None
    body: A


def free_variables(e: A, bound: frozenset[str] = frozenset()) -> set[str]:
    """Variables of ``e`` not bound by a sum inside it."""
    if isinstance(e, Var):
        return set() if e.name in bound else {e.name}
    if isinstance(e, Num):
        return set()
    if isinstance(e, Fun):
        return free_variables(e.arg, bound)
    if isinstance(e, Bin):
        return free_variables(e.left, bound) | free_variables(e.right, bound)
    if isinstance(e, Pow):
        return free_variables(e.base, bound) | free_variables(e.exponent, bound)
    if isinstance(e, Sum):
        out = free_variables(e.lower, bound)
        if e.upper is not None:
            out |= free_variables(e.upper, bound)
        return out | free_variables(e.body, bound | {e.var})
    raise TypeError(type(e).__name__)

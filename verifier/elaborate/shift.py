"""Powers of q in front of forms: ``ir.Shift`` nodes (docs/method.md#products).

An infinite product is an eta quotient times q^c (``prod (1-q^n) = q^{-1/24} eta``).  A
claim whose two sides carry the same c everywhere is an identity of forms after dividing
by q^c; any other use of a shift (terms with different shifts, a derivative of a shifted
form) makes the claim one between q-series, compared coefficient by coefficient only
(docs/method.md#series-only).
"""

from __future__ import annotations

import dataclasses
from fractions import Fraction
from typing import Any

from verifier.elaborate import ir
from verifier.forms.registry import SERIES_ONLY


class Mixed:
    """The shift of an expression whose terms carry different powers of q."""


MIXED = Mixed()
Shift = Fraction | None | Mixed  # None: any shift (the constant 0)


def shift_of(expr: ir.Expr) -> Shift:
    """The power of q that ``expr`` carries in front of a form."""
    if isinstance(expr, ir.Const):
        return None if expr.value == 0 else Fraction(0)
    if isinstance(expr, ir.Atom | ir.QPower):
        return Fraction(0)
    if isinstance(expr, ir.Shift):
        assert expr.base is not None
        inner = shift_of(expr.base)
        return inner if inner is None or isinstance(inner, Mixed) else inner + expr.exponent
    if isinstance(expr, ir.Sum):
        assert expr.left is not None and expr.right is not None
        a, b = shift_of(expr.left), shift_of(expr.right)
        if isinstance(a, Mixed) or isinstance(b, Mixed):
            return MIXED
        if a is None:
            return b
        if b is None or a == b:
            return a
        return MIXED
    if isinstance(expr, ir.Product | ir.Quotient):
        assert expr.left is not None and expr.right is not None
        a, b = shift_of(expr.left), shift_of(expr.right)
        if isinstance(a, Mixed) or isinstance(b, Mixed):
            return MIXED
        if a is None or b is None:
            return None
        return a + b if isinstance(expr, ir.Product) else a - b
    if isinstance(expr, ir.Power):
        assert expr.base is not None
        a = shift_of(expr.base)
        return a if a is None or isinstance(a, Mixed) else a * expr.exponent
    if isinstance(expr, ir.Deriv | ir.Hecke):
        assert expr.base is not None
        a = shift_of(expr.base)
        return a if a is None or a == 0 else MIXED
    return MIXED


def has_shift(expr: ir.Expr) -> bool:
    """Whether a Shift node occurs in ``expr``."""
    if isinstance(expr, ir.Shift):
        return True
    return any(
        isinstance(child, ir.Expr) and has_shift(child)
        for child in (getattr(expr, "left", None), getattr(expr, "right", None), getattr(expr, "base", None))
    )


def strip(expr: ir.Expr) -> ir.Expr:
    """``expr`` with every Shift node replaced by its base (valid when :func:`shift_of` is uniform)."""
    if isinstance(expr, ir.Shift):
        assert expr.base is not None
        return strip(expr.base)
    changes: dict[str, Any] = {}
    for name in ("left", "right", "base"):
        child = getattr(expr, name, None)
        if isinstance(child, ir.Expr):
            changes[name] = strip(child)
    return dataclasses.replace(expr, **changes) if changes else expr


def series_only(expr: ir.Expr) -> bool:
    """Whether ``expr`` contains a q-series with no modular interpretation."""
    return any(a.key == SERIES_ONLY for a in ir.atoms_of(expr))


def classify(left: ir.Side, right: ir.Side) -> Fraction | None:
    """The common shift of a claim between forms (to divide out), or None: compare as q-series.

    A claim with a printed side is never stripped (printed exponents are the author's).
    """
    if series_only(left.expr) or series_only(right.expr):
        return None
    a, b = shift_of(left.expr), shift_of(right.expr)
    if isinstance(a, Mixed) or isinstance(b, Mixed):
        return None
    if a is None and b is None:
        return Fraction(0)
    if a is None:
        return b
    if b is None or a == b:
        return a
    return None


def strip_side(side: ir.Side) -> ir.Side:
    """A side without its Shift nodes."""
    if not has_shift(side.expr):
        return side
    return dataclasses.replace(side, expr=strip(side.expr))

"""Make every exponent of a claim integral by the substitution tau -> T tau.

Eta quotients carry q^{s/24} (docs/method.md#eta-offset), Jacobi's thetas in the nome e^{pi i tau}
involve eta(tau/2), and authors print q^{1/24} or q^{1/4}.  A formal identity in q is
unchanged by q -> q^T, so the whole claim is rescaled by the least T that makes every
scale, every eta delta, every eta offset and every printed exponent an integer; the
rescaled claim is an identity between forms on Gamma_0(N) with integral exponents.
Exponents reported to the author are divided by T again.
"""

from __future__ import annotations

import dataclasses
import math
from fractions import Fraction
from typing import Any

from verifier.elaborate import ir
from verifier.forms.registry import offset


def _denominators(expr: ir.Expr) -> list[int]:
    if isinstance(expr, ir.QPower):
        return [expr.exponent.denominator]
    if isinstance(expr, ir.Shift):
        assert expr.base is not None
        return [expr.exponent.denominator, *_denominators(expr.base)]
    if isinstance(expr, ir.Atom):
        dens = [Fraction(expr.scale).denominator]
        if expr.key == "eta":
            dens += [d.denominator for d, _ in expr.params]
            dens.append(offset("eta", expr.params).denominator)
        return dens
    out: list[int] = []
    for child in (getattr(expr, "left", None), getattr(expr, "right", None), getattr(expr, "base", None)):
        if isinstance(child, ir.Expr):
            out += _denominators(child)
    return out


def rescale_factor(*sides: ir.Side) -> int:
    """The least T making the claim integral (1 when it already is)."""
    dens: list[int] = []
    for side in sides:
        dens += _denominators(side.expr)
        if side.big_o is not None:
            dens.append(side.big_o.denominator)
        if side.dots:
            dens.append(side.degree.denominator)
    t = 1
    for d in dens:
        t = t * d // math.gcd(t, d)
    # Eta offsets s/24 must become integers *after* the deltas are scaled: s scales with T.
    for side in sides:
        for atom in ir.atoms_of(side.expr):
            if atom.key == "eta":
                off = offset("eta", tuple((d * t, r) for d, r in atom.params))
                if off.denominator != 1:
                    t *= off.denominator
    return t


def rescale_expr(expr: ir.Expr, t: int) -> ir.Expr:
    """``expr`` with tau replaced by ``t * tau``."""
    if t == 1:
        return expr
    if isinstance(expr, ir.QPower):
        return dataclasses.replace(expr, exponent=expr.exponent * t)
    if isinstance(expr, ir.Shift):
        assert expr.base is not None
        return dataclasses.replace(expr, base=rescale_expr(expr.base, t), exponent=expr.exponent * t)
    if isinstance(expr, ir.Atom):
        if expr.key == "eta":
            return dataclasses.replace(expr, params=tuple((d * t, r) for d, r in expr.params))
        return dataclasses.replace(expr, scale=Fraction(expr.scale) * t)
    if isinstance(expr, ir.Hecke):
        raise ValueError("a claim with Hecke operators cannot be rescaled (its exponents must be integral)")
    if isinstance(expr, ir.Deriv):
        # (Df)(q^T) = T^{-1} D(f(q^T)): the claim in q^T carries a factor 1/T per derivative.
        assert expr.base is not None
        inner = dataclasses.replace(expr, base=rescale_expr(expr.base, t))
        return ir.Product(expr.typ, expr.text, ir.Const(ir.Typ(Fraction(0)), f"1/{t}", Fraction(1, t)), inner)
    changes: dict[str, Any] = {}
    for name in ("left", "right", "base"):
        child = getattr(expr, name, None)
        if isinstance(child, ir.Expr):
            changes[name] = rescale_expr(child, t)
    return dataclasses.replace(expr, **changes) if changes else expr


def rescale_side(side: ir.Side, t: int) -> ir.Side:
    """A side with tau replaced by ``t * tau`` (its exponents multiplied by t)."""
    if t == 1:
        return side
    return ir.Side(
        rescale_expr(side.expr, t),
        side.printed,
        None if side.big_o is None else side.big_o * t,
        side.dots,
        side.degree * t,
    )

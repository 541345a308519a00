"""Products, quotients and powers of eta quotients folded into one eta quotient.

The elaborator reads ``\\frac{f_2^5}{f_1^2 f_4^2}`` as one eta quotient, but ``\\frac{1}{f_1^2}``
as 1 divided by eta(tau)^2, and ``f_1 \\cdot \\frac{1}{f_2}`` as a product of two.  As power
series these are the same thing: eta(tau)^a eta(tau)^b = eta(tau)^(a+b) and 1/eta(d tau)^r =
eta(d tau)^(-r) exactly (each f_d is a unit of Z[[q]]).  Folding them lets a congruence see an
eta quotient where the author wrote a quotient of products, so that Frobenius can act on it
(docs/method.md#congruence-frobenius).  Nothing else is rewritten.
"""

from __future__ import annotations

import dataclasses
from fractions import Fraction
from typing import Any

from verifier.elaborate import ir
from verifier.forms import registry


def _eta(expr: ir.Expr | None) -> ir.Atom | None:
    if isinstance(expr, ir.Atom) and expr.key == "eta" and expr.scale == 1:
        return expr
    return None


def _merged(a: ir.Atom, b: ir.Atom, sign: int, text: str) -> ir.Expr:
    exps: dict[Fraction, int] = dict(a.params)
    for d, r in b.params:
        exps[d] = exps.get(d, 0) + sign * r
    return eta_atom(a, registry.eta_params(exps), text)


def eta_atom(model: ir.Atom, params: tuple[tuple[Fraction, int], ...], text: str) -> ir.Expr:
    """The eta quotient with these exponents, typed like ``model`` with its weight; 1 when none is left."""
    if not params:
        return ir.Const(ir.Typ(Fraction(0)), "1", Fraction(1))
    weight = Fraction(sum(r for _, r in params), 2)
    return dataclasses.replace(model, typ=dataclasses.replace(model.typ, weight=weight), text=text, params=params)


def fold_eta(expr: ir.Expr) -> ir.Expr:
    """``expr`` with eta quotients multiplied, divided and raised to powers folded into single atoms."""
    changes: dict[str, Any] = {}
    for name in ("left", "right", "base"):
        child = getattr(expr, name, None)
        if isinstance(child, ir.Expr):
            folded = fold_eta(child)
            if folded is not child:
                changes[name] = folded
    if changes:
        expr = dataclasses.replace(expr, **changes)
    if isinstance(expr, ir.Product | ir.Quotient):
        sign = 1 if isinstance(expr, ir.Product) else -1
        left, right = _eta(expr.left), _eta(expr.right)
        if left is not None and right is not None:
            return _merged(left, right, sign, expr.text)
        if right is not None and isinstance(expr.left, ir.Const) and expr.left.value == 1:
            inverse = registry.eta_params({d: sign * r for d, r in right.params})
            return eta_atom(right, inverse, expr.text)
    if isinstance(expr, ir.Power):
        base = _eta(expr.base)
        if base is not None:
            return eta_atom(base, registry.eta_params({d: expr.exponent * r for d, r in base.params}), expr.text)
    return expr

"""Frobenius on eta quotients: a side rewritten into one congruent to it modulo p^e.

docs/method.md#congruence-frobenius.  For a power series A with integer coefficients and
constant term 1, ``A(q)^p = A(q^p) (mod p)`` (the binomial coefficients C(p, i), 0 < i < p, are
divisible by p), and ``A = B (mod p^i)`` implies ``A^p = B^p (mod p^(i+1))``.  Hence

    prod (1 - q^(delta n))^(p^e u) = prod (1 - q^(p delta n))^(p^(e-1) u)   (mod p^e)

for every integer u (a negative u inverts two congruent units of Z[[q]]), and the powers of
q^(1/24) agree on both sides.  So ``eta(p delta tau)^(p^(e-1) u) = eta(delta tau)^(p^e u)``
coefficientwise modulo p^e.  Replacing the first by the second moves an eta quotient to a
smaller level and a higher weight; ``Delta = eta(tau) eta(23 tau) (mod 23)`` is the classical
example (Swinnerton-Dyer, LNM 350, 1973).

A congruence survives the rewrite inside sums with p-integral coefficients, products of
p-integral series, the derivative D = q d/dq and multiplication by a power of q.  Anything else
(quotients, Hecke operators, constants or Eisenstein series with p in a denominator, atoms
that are not eta quotients, Delta or level-one Eisenstein series) leaves the side as it is.
"""

from __future__ import annotations

import dataclasses
from fractions import Fraction

from verifier.elaborate import ir
from verifier.elaborate.fold import eta_atom
from verifier.forms import registry
from verifier.forms.eisenstein import eisenstein_constant

EtaParams = tuple[tuple[Fraction, int], ...]


def lift_eta(params: EtaParams, p: int, e: int) -> EtaParams:
    """The exponents of an eta quotient after every ``eta(p d tau)^(p^(e-1) u) -> eta(d tau)^(p^e u)``.

    Deltas are taken from the largest down, so a chain ``p^2 d -> p d -> d`` is followed to its end.
    """
    exps: dict[Fraction, int] = dict(params)
    step = p ** (e - 1)
    while True:
        movable = [d for d, r in exps.items() if r and d.denominator == 1 and int(d) % p == 0 and r % step == 0]
        if not movable:
            break
        delta = max(movable)
        lower = delta / p
        exps[lower] = exps.get(lower, 0) + p * exps[delta]
        exps[delta] = 0
    return registry.eta_params(exps)


def _integral(x: Fraction, p: int) -> bool:
    return x.denominator % p != 0


def _atom_integral(atom: ir.Atom, p: int) -> bool:
    """Whether the atom's coefficients are p-integral (eta quotients, Delta, E_k with p-integral constant)."""
    if atom.key in ("eta", "Delta"):
        return True
    if atom.key.startswith("E") and atom.key[1:].isdigit():
        return _integral(eisenstein_constant(int(atom.key[1:])), p)
    return False


def lift_side(expr: ir.Expr, p: int, e: int, holomorphic: bool = True) -> ir.Expr | None:
    """``expr`` with every eta quotient lifted (:func:`lift_eta`), or None when the rewrite is not
    known to keep the side's coefficients modulo p^e (see the module docstring).

    With ``holomorphic`` (for a proof by Sturm's theorem), a lifted eta quotient must again be a
    holomorphic modular form on some Gamma_0(N); otherwise None.  Without it the lift is only a
    power series congruent to the side, which is all that comparing two lifts needs.
    """
    if isinstance(expr, ir.Const):
        return expr if _integral(expr.value, p) else None
    if isinstance(expr, ir.Atom):
        if not _atom_integral(expr, p):
            return None
        if expr.key != "eta":
            return expr
        params = lift_eta(expr.params, p, e)
        if params == expr.params:
            return expr
        if not params:
            return ir.Const(ir.Typ(Fraction(0)), "1", Fraction(1))
        if any(d.denominator != 1 for d, _ in params):
            return None
        eq = registry.eta_quotient(params)
        lifted = eta_atom(expr, params, eq.label())
        if not holomorphic:
            return lifted
        level = eq.least_level()
        if level is None or not eq.is_holomorphic(level):
            return None
        return dataclasses.replace(lifted, typ=dataclasses.replace(lifted.typ, level=level))
    if isinstance(expr, ir.Sum | ir.Product):
        assert expr.left is not None and expr.right is not None
        left, right = lift_side(expr.left, p, e, holomorphic), lift_side(expr.right, p, e, holomorphic)
        if left is None or right is None:
            return None
        return dataclasses.replace(expr, left=left, right=right)
    if isinstance(expr, ir.Power):
        assert expr.base is not None
        base = lift_side(expr.base, p, e, holomorphic)
        if base is None or expr.exponent < 0:
            return None
        return dataclasses.replace(expr, base=base)
    if isinstance(expr, ir.Shift):
        assert expr.base is not None
        base = lift_side(expr.base, p, e, holomorphic)
        return None if base is None else dataclasses.replace(expr, base=base)
    if isinstance(expr, ir.Deriv):
        assert expr.base is not None
        base = lift_side(expr.base, p, e, holomorphic)
        return None if base is None else dataclasses.replace(expr, base=base)
    return None


def describe(expr: ir.Expr) -> str:
    """A plain spelling of a (lifted) side for reports: eta quotients by their exponents, other atoms
    and constants as written."""
    if isinstance(expr, ir.Const):
        return str(expr.value)
    if isinstance(expr, ir.Atom):
        if expr.key == "eta":
            return str(registry.eta_quotient(expr.params).label())
        return expr.text.lstrip("\\") if expr.key == "Delta" else expr.text
    if isinstance(expr, ir.Sum) and expr.left is not None and expr.right is not None:
        if isinstance(expr.left, ir.Const) and isinstance(expr.right, ir.Const):
            return str(expr.left.value + expr.sign * expr.right.value)  # 1 - 1 (a lifted constant term) is 0
        return f"{describe(expr.left)} {'+' if expr.sign > 0 else '-'} ({describe(expr.right)})"
    if isinstance(expr, ir.Product) and expr.left is not None and expr.right is not None:
        return f"({describe(expr.left)}) ({describe(expr.right)})"
    if isinstance(expr, ir.Power) and expr.base is not None:
        return f"({describe(expr.base)})^{expr.exponent}"
    if isinstance(expr, ir.Deriv) and expr.base is not None:
        return f"D({describe(expr.base)})"
    if isinstance(expr, ir.Shift) and expr.base is not None:
        return f"q^{expr.exponent} ({describe(expr.base)})"
    return expr.text

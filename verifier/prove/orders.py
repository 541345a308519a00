"""Lower bounds for the orders of a claim's pieces at the cusps of Gamma_0(N).

Clearing denominators turns ``L = R`` into ``P = N_L D_R - N_R D_L = 0`` (see
:mod:`verifier.prove.evaluate`).  Every monomial of ``P`` is a product of atoms, so its
order at a cusp is the sum of the atoms' orders; a lower bound for every monomial is
also one for every piece of ``P`` (docs/method.md#poles-at-cusps: ord_s(sum) >= min, ord_s(product) = sum).
Eta quotients contribute their Ligozat orders (docs/method.md#ligozat); Delta(d tau) = eta(d tau)^24 too;
Eisenstein series, theta series of quadratic forms and the formal E_2 contribute 0
(holomorphic at every cusp).

Orders are in the local parameter of each cusp and depend only on its denominator d,
so bounds are dicts ``d -> Fraction`` over the divisors d of N (d = N is infinity).
"""

from __future__ import annotations

from fractions import Fraction

from verifier import numbers
from verifier.elaborate import ir
from verifier.forms import registry

Bounds = dict[int, Fraction]


def divisors(n: int) -> list[int]:
    """Positive divisors of n, increasing (from the factorisation, never a loop up to n)."""
    return numbers.divisors(n)


def _const(level: int, value: Fraction = Fraction(0)) -> Bounds:
    return dict.fromkeys(divisors(level), value)


def _add(a: Bounds, b: Bounds) -> Bounds:
    return {d: a[d] + b[d] for d in a}


def _min(a: Bounds, b: Bounds) -> Bounds:
    return {d: min(a[d], b[d]) for d in a}


def _times(a: Bounds, e: int) -> Bounds:
    return {d: v * e for d, v in a.items()}


def atom_bounds(atom: ir.Atom, level: int) -> Bounds:
    """Orders of one atom at every cusp of Gamma_0(level)."""
    orders = registry.cusp_orders(atom.key, atom.params, level, int(atom.scale))
    if orders is None:
        return _const(level)
    return {d: Fraction(orders[d]) for d in divisors(level)}


def fraction_bounds(expr: ir.Expr, level: int) -> tuple[Bounds, Bounds]:
    """Lower bounds (numerator, denominator) mirroring :func:`evaluate.graded_fraction`."""
    if isinstance(expr, ir.Const):
        return _const(level), _const(level)
    if isinstance(expr, ir.Atom):
        return atom_bounds(expr, level), _const(level)
    if isinstance(expr, ir.Sum):
        assert expr.left is not None and expr.right is not None
        an, ad = fraction_bounds(expr.left, level)
        bn, bd = fraction_bounds(expr.right, level)
        return _min(_add(an, bd), _add(bn, ad)), _add(ad, bd)
    if isinstance(expr, ir.Product):
        assert expr.left is not None and expr.right is not None
        an, ad = fraction_bounds(expr.left, level)
        bn, bd = fraction_bounds(expr.right, level)
        return _add(an, bn), _add(ad, bd)
    if isinstance(expr, ir.Quotient):
        assert expr.left is not None and expr.right is not None
        an, ad = fraction_bounds(expr.left, level)
        bn, bd = fraction_bounds(expr.right, level)
        return _add(an, bd), _add(ad, bn)
    if isinstance(expr, ir.Hecke):
        # T_n maps holomorphic forms to holomorphic forms; forms with poles are refused.
        assert expr.base is not None
        n, d = fraction_bounds(expr.base, level)
        if min(n.values()) < 0 or min(d.values()) < 0:
            raise registry.NotModular("Hecke operators on forms with poles at cusps are not supported")
        return _const(level), _const(level)
    if isinstance(expr, ir.Deriv):
        # theta_k f, f and E_4 f have at least the orders of f at every cusp.
        assert expr.base is not None
        n, d = fraction_bounds(expr.base, level)
        return _add(n, d), _add(d, d)
    if isinstance(expr, ir.Power):
        assert expr.base is not None
        n, d = fraction_bounds(expr.base, level)
        e = expr.exponent
        return (_times(n, e), _times(d, e)) if e >= 0 else (_times(d, -e), _times(n, -e))
    raise TypeError(type(expr).__name__)


def difference_bounds(left: ir.Expr, right: ir.Expr, level: int) -> Bounds:
    """Lower bounds for every piece of N_L D_R - N_R D_L."""
    nl, dl = fraction_bounds(left, level)
    nr, dr = fraction_bounds(right, level)
    return _min(_add(nl, dr), _add(nr, dl))

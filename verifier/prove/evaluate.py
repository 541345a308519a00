"""Evaluate typed expressions to exact q-expansions, in two ways.

* :func:`laurent` gives the plain Laurent series of a side (E_2 substituted, quotients
  divided out, poles kept): what the author's two sides *are*, coefficient by
  coefficient.  Used for printed expansions and for the witness of a refutation.
* :func:`graded_fraction` gives a side as numerator/denominator, each a polynomial in a
  formal symbol E_2 whose coefficients are modular forms, graded by weight and by
  character: ``{(w, j, kernel): f}`` stands for ``sum f * E_2^j`` with ``f`` in
  M_{w-2j}(Gamma_0(N), chi) where chi = (kernel / .) (a quadratic character; for
  half-integral weight the character relative to the theta multiplier, docs/method.md#half-integral-weight).
  Nothing is divided: every piece is holomorphic on H (eta quotients have no zeros), and
  proofs apply the Sturm or valence bound to each piece (docs/method.md#sturm-bound, #poles-at-cusps, #quasimodular).

Atom series are cached by an :class:`AtomTable`, each to what the claims so far needed.
"""

from __future__ import annotations

from collections.abc import Callable
from fractions import Fraction
from typing import Any

from verifier.elaborate import ir
from verifier.forms.registry import build_series
from verifier.numbers import squarefree_kernel
from verifier.series.qseries import QSeries

Key = tuple[Fraction, int, int]  # (total weight, power of E_2, character kernel)
Graded = dict[Key, QSeries]
CharacterOf = Callable[[ir.Atom], int]  # the kernel of an atom's character


class AtomTable:
    """Exact series of atoms, each computed to the precision the claim at hand asks for.

    A series is extended only when a later request needs more than is cached, and then by
    at least half again, so a run of claims asking a little more each time rebuilds each
    series only a logarithmic number of times.  A light claim never pays for a heavy one:
    it gets a truncation of what is cached, or a build at (at most 1.5 times) its own need.
    """

    GROWTH = Fraction(3, 2)  # an extension asks for at least this factor more than is cached

    def __init__(self) -> None:
        self._series: dict[tuple[str, tuple[Any, ...]], QSeries] = {}
        self.computed = 0  # how many atom expansions were built (for tests and bench)

    def cached_precision(self, key: str, params: tuple[Any, ...] = ()) -> int:
        """How many terms of ``key(params)`` at scale 1 are cached (0 if none)."""
        have = self._series.get((key, params))
        return 0 if have is None else have.prec

    def base(self, key: str, params: tuple[Any, ...], prec: int) -> QSeries:
        """The series of an atom family member at scale 1, to at least ``prec``."""
        have = self._series.get((key, params))
        if have is None or have.prec < prec:
            target = prec if have is None else max(prec, int(have.prec * self.GROWTH))
            have = build_series(key, params, target)
            self.computed += 1
            self._series[(key, params)] = have
        return have.truncate(prec)

    def atom(self, atom: ir.Atom, prec: int) -> QSeries:
        """The series of ``atom`` (at its integral scale) to precision ``prec``."""
        return self.scaled(atom.key, atom.params, int(atom.scale), prec)

    def scaled(self, key: str, params: tuple[Any, ...], scale: int, prec: int) -> QSeries:
        """The series of ``key(scale * tau)`` to precision ``prec``."""
        if scale == 1:
            return self.base(key, params, prec)
        return self.base(key, params, -(-prec // scale)).inflate(scale).truncate(prec)


# -- plain Laurent series --------------------------------------------------------------
def laurent(expr: ir.Expr, prec: int, table: AtomTable) -> QSeries:
    """The q-expansion of ``expr``, exact for exponents below the returned ``.prec``.

    The result may be known to less than ``prec`` when denominators have zeros at
    infinity; callers raise ``prec`` and retry.
    """
    if isinstance(expr, ir.Const):
        return QSeries.constant(expr.value, prec)
    if isinstance(expr, ir.QPower):
        assert expr.exponent.denominator == 1, "claims are rescaled to integral exponents before evaluation"
        e = int(expr.exponent)
        return QSeries.monomial(e, max(prec, e + 1))
    if isinstance(expr, ir.Atom):
        return table.atom(expr, prec)
    if isinstance(expr, ir.Shift):
        assert expr.base is not None and expr.exponent.denominator == 1
        e = int(expr.exponent)
        inner = laurent(expr.base, prec - e, table)
        return QSeries(inner.poly, inner.offset + e, inner.prec + e)
    if isinstance(expr, ir.Sum):
        assert expr.left is not None and expr.right is not None
        a = laurent(expr.left, prec, table)
        b = laurent(expr.right, prec, table)
        return a + b if expr.sign > 0 else a - b
    if isinstance(expr, ir.Product):
        assert expr.left is not None and expr.right is not None
        left, right = expr.left, expr.right
        if isinstance(left, ir.Const):
            return laurent(right, prec, table).scale(left.value)
        a = laurent(left, prec, table)
        b = laurent(right, prec - min(a.valuation, 0), table)
        return a * b
    if isinstance(expr, ir.Quotient):
        assert expr.left is not None and expr.right is not None
        if isinstance(expr.right, ir.Const):
            return laurent(expr.left, prec, table).scale(1 / expr.right.value)
        dp = max(prec, 1)
        den = laurent(expr.right, dp, table)
        while den.is_zero() and dp < prec + 256:
            # Not known far enough to see its leading term (e.g. Delta below q^1).
            dp = 2 * dp + 1
            den = laurent(expr.right, dp, table)
        # Dividing by a series of valuation v loses v terms: ask for them up front.
        need = prec + 2 * max(den.valuation, 0)
        if den.prec < need:
            den = laurent(expr.right, need, table)
        num = laurent(expr.left, prec + max(den.valuation, 0), table)
        return num / den
    if isinstance(expr, ir.Deriv):
        assert expr.base is not None
        return laurent(expr.base, prec, table).qderiv()
    if isinstance(expr, ir.Hecke):
        pieces = _hecke_pieces(expr, prec, table)
        return next(iter(pieces.values()), QSeries.constant(0, prec))
    if isinstance(expr, ir.Power):
        assert expr.base is not None
        base = laurent(expr.base, prec, table)
        if expr.exponent < 0:
            base = laurent(expr.base, prec + 2 * max(base.valuation, 0) * (-expr.exponent), table)
        elif base.valuation < 0:
            base = laurent(expr.base, prec - base.valuation * (expr.exponent - 1), table)
        return base**expr.exponent
    raise TypeError(type(expr).__name__)


def laurent_to(expr: ir.Expr, prec: int, table: AtomTable, limit: int) -> QSeries:
    """:func:`laurent`, raising the working precision until ``prec`` is reached."""
    work = prec
    for _ in range(6):
        s = laurent(expr, work, table)
        if s.prec >= prec:
            return s.truncate(prec)
        work += prec - s.prec
        if work > limit:
            break
    raise BudgetExceeded(work)


class BudgetExceeded(Exception):
    """More coefficients would be needed than the budget allows."""

    def __init__(self, needed: int) -> None:
        super().__init__(f"needs {needed} coefficients")
        self.needed = needed


# -- graded fractions -----------------------------------------------------------------
def graded_add(a: Graded, b: Graded, sign: int = 1) -> Graded:
    """``a + sign * b``."""
    out = dict(a)
    for k, s in b.items():
        t = s if sign > 0 else -s
        out[k] = out[k] + t if k in out else t
    return out


def _odd_integral(weight: Fraction) -> bool:
    return weight.denominator == 1 and weight.numerator % 2 == 1


def product_kernel(wa: Fraction, ka: int, wb: Fraction, kb: int) -> int:
    """The character kernel of f g, for f of weight ``wa`` and kernel ``ka``, g of ``wb``, ``kb``.

    Characters of half-integral weight are taken relative to the theta multiplier j(gamma, tau)
    (Shimura's convention), integral ones relative to (c tau + d)^k.  Since
    j(gamma, tau)^2 = chi_{-4}(d) (c tau + d), a form of integral weight k and character chi
    transforms as (chi chi_{-4}^k)(d) j^{2k}: in the theta convention its character is
    chi chi_{-4}^k.  In that single convention characters of a product simply multiply, so
    each factor is converted to it, multiplied, and the product converted back.  A factor
    of odd integral weight therefore changes the character of a half-integral product by
    chi_{-4}, and two half-integral weights of odd integral sum gain chi_{-4}
    (Shimura, "On modular forms of half integral weight", Ann. of Math. 97 (1973), §1).
    """
    flips = _odd_integral(wa) + _odd_integral(wb) + _odd_integral(wa + wb)
    kernel = ka * kb * (-1 if flips % 2 else 1)
    return int(squarefree_kernel(kernel))


def graded_mul(a: Graded, b: Graded) -> Graded:
    """``a * b``: weights and E_2-powers add, characters multiply (see :func:`product_kernel`)."""
    out: Graded = {}
    for (wa, ja, ka), sa in a.items():
        for (wb, jb, kb), sb in b.items():
            kernel = product_kernel(wa - 2 * ja, ka, wb - 2 * jb, kb)
            k = (wa + wb, ja + jb, kernel)
            p = sa * sb
            out[k] = out[k] + p if k in out else p
    return out


def _g_pow(a: Graded, e: int, prec: int) -> Graded:
    result: Graded = {(Fraction(0), 0, 1): QSeries.constant(1, prec)}
    base = a
    while e:
        if e & 1:
            result = graded_mul(result, base)
        e >>= 1
        if e:
            base = graded_mul(base, base)
    return result


def _is_one(g: Graded) -> bool:
    if len(g) != 1 or (Fraction(0), 0, 1) not in g:
        return False
    s = g[(Fraction(0), 0, 1)]
    return s.offset == 0 and s.poly.degree() == 0 and s.poly[0] == 1


def graded_is_one(g: Graded) -> bool:
    """Whether a graded polynomial is the constant 1 (a side without a denominator)."""
    return _is_one(g)


def _g_const(c: Fraction, prec: int) -> Graded:
    return {} if c == 0 else {(Fraction(0), 0, 1): QSeries.constant(c, prec)}


Fraction2 = tuple[Graded, Graded]


def graded_fraction(expr: ir.Expr, prec: int, table: AtomTable, chars: CharacterOf) -> Fraction2:
    """``expr`` as (numerator, denominator) graded polynomials in E_2, to ``prec`` terms."""
    one = _g_const(Fraction(1), prec)
    if isinstance(expr, ir.Const):
        return _g_const(expr.value, prec), one
    if isinstance(expr, ir.Atom):
        return _graded_atom(expr, prec, table, chars), one
    if isinstance(expr, ir.Sum):
        assert expr.left is not None and expr.right is not None
        an, ad = graded_fraction(expr.left, prec, table, chars)
        bn, bd = graded_fraction(expr.right, prec, table, chars)
        if _is_one(ad) and _is_one(bd):
            return graded_add(an, bn, expr.sign), one
        return graded_add(graded_mul(an, bd), graded_mul(bn, ad), expr.sign), graded_mul(ad, bd)
    if isinstance(expr, ir.Product):
        assert expr.left is not None and expr.right is not None
        an, ad = graded_fraction(expr.left, prec, table, chars)
        bn, bd = graded_fraction(expr.right, prec, table, chars)
        return graded_mul(an, bn), graded_mul(ad, bd)
    if isinstance(expr, ir.Quotient):
        assert expr.left is not None and expr.right is not None
        an, ad = graded_fraction(expr.left, prec, table, chars)
        bn, bd = graded_fraction(expr.right, prec, table, chars)
        return graded_mul(an, bd), graded_mul(ad, bn)
    if isinstance(expr, ir.Hecke):
        return _hecke_pieces(expr, prec, table), one
    if isinstance(expr, ir.Deriv):
        assert expr.base is not None
        n, d = graded_fraction(expr.base, prec, table, chars)
        if _is_one(d):
            return graded_derivative(n, prec, table), one
        # Quotient rule: D(N/Q) = (DN Q - N DQ) / Q^2.
        dn, dd = graded_derivative(n, prec, table), graded_derivative(d, prec, table)
        return graded_add(graded_mul(dn, d), graded_mul(n, dd), -1), graded_mul(d, d)
    if isinstance(expr, ir.Power):
        assert expr.base is not None
        n, d = graded_fraction(expr.base, prec, table, chars)
        e = expr.exponent
        if e < 0:
            n, d, e = d, n, -e
        return _g_pow(n, e, prec), _g_pow(d, e, prec)
    raise TypeError(f"{type(expr).__name__} has no modular meaning")


def _hecke_pieces(expr: ir.Hecke, prec: int, table: AtomTable) -> Graded:
    """T_n (or U_n) of a modular form, at the form's own level and character (docs/method.md#hecke)."""
    import math

    from verifier.forms import registry
    from verifier.prove.hecke import hecke, required_input_precision

    assert expr.base is not None
    level = 1
    for a in ir.atoms_of(expr.base):
        n_a = registry.level(a.key, int(a.scale), a.params)
        level = level * n_a // math.gcd(level, n_a)

    def chars(atom: ir.Atom) -> int:
        return int(registry.character(atom.key, int(atom.scale), atom.params, level).kernel)

    need = required_input_precision(expr.n, prec)
    num, den = graded_fraction(expr.base, need, table, chars)
    if not _is_one(den) or len(num) > 1:
        raise registry.NotModular("a Hecke operator needs one modular form of one weight and character")
    if not num:
        return {}
    (w, j, kernel), series = next(iter(num.items()))
    if j:
        raise registry.NotModular("Hecke operators do not act on quasimodular forms here")
    if expr.kind == "U":
        if level % expr.n:
            raise registry.NotModular(f"U_{expr.n} needs {expr.n} to divide the level {level}; write T_{expr.n}")
        coeffs = [series[m * expr.n] if m * expr.n < series.prec else 0 for m in range(prec)]
        return {(w, 0, kernel): QSeries.from_coefficients(coeffs, 0, prec)}
    return {(w, 0, kernel): hecke(series, expr.n, w, kernel, level, prec)}


def graded_derivative(g: Graded, prec: int, table: AtomTable) -> Graded:
    """D applied to sum f E_2^j, piece by piece (docs/method.md#quasimodular).

    With k the weight of f and theta_k f = Df - (k/12) E_2 f (the Serre derivative, modular
    of weight k + 2, same character):
        D(f E_2^j) = (theta_k f) E_2^j + ((k + j)/12) f E_2^{j+1} - (j/12) E_4 f E_2^{j-1}.
    """
    e2 = table.scaled("E2", (), 1, prec)
    e4 = table.scaled("E4", (), 1, prec)
    out: Graded = {}

    def put(key: Key, s: QSeries) -> None:
        out[key] = out[key] + s if key in out else s

    for (w, j, kernel), f in g.items():
        k = w - 2 * j
        put((w + 2, j, kernel), f.qderiv() - (e2 * f).scale(k / 12))
        put((w + 2, j + 1, kernel), f.scale((k + j) / 12))
        if j:
            put((w + 2, j - 1, kernel), (e4 * f).scale(-Fraction(j, 12)))
    return out


def _graded_atom(atom: ir.Atom, prec: int, table: AtomTable, chars: CharacterOf) -> Graded:
    w = atom.typ.weight
    assert w is not None
    if atom.key != "E2":
        return {(w, 0, chars(atom)): table.atom(atom, prec)}
    if atom.scale == 1:
        return {(w, 1, 1): QSeries.constant(1, prec)}
    # E_2(d tau) = E_2(tau)/d + g_d with g_d = E_2(d tau) - E_2(tau)/d in M_2(Gamma_0(d))
    # (docs/method.md#e2, #quasimodular).
    d = int(atom.scale)
    g = table.scaled("E2", (), d, prec) - table.scaled("E2", (), 1, prec).scale(Fraction(1, d))
    return {(w, 1, 1): QSeries.constant(Fraction(1, d), prec), (w, 0, 1): g}

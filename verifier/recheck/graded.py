"""Sides of a claim as graded fractions, and their plain q-expansions.

A graded value is ``{(w, j, D): f}`` standing for sum f E_2^j with f a modular form of
weight w and quadratic character (D/.) (for half-integral w, relative to the multiplier of
theta).  A side is a pair (numerator, denominator) of graded values (denominator None: 1).
Quasimodular rules (Kaneko-Zagier, "A generalized Jacobi theta function and quasimodular
forms", 1995; common practice):

* E_2(d tau) = E_2 / d + (E_2(d tau) - E_2 / d), the second term in M_2(Gamma_0(d));
* D(f E_2^j) = (theta_w f) E_2^j + ((w + j)/12) f E_2^(j+1) - (j/12) E_4 f E_2^(j-1), with
  the Serre derivative theta_w f = D f - (w/12) E_2 f of weight w + 2, because
  D E_2 = (E_2^2 - E_4)/12 (Ramanujan).

Characters multiply with the theta-multiplier rule: (w1, D1) (w2, D2) has character
D1 D2 (-4)^e with e = 0 for two integral weights, e = the integral weight for one
half-integral weight, and e = w1 + w2 for two half-integral weights (Shimura, "On modular
forms of half integral weight", Ann. of Math. 1973: j(g, z)^2 = (-4/d)(cz + d)).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from fractions import Fraction
from typing import Any

from verifier.recheck import arith
from verifier.recheck.atoms import (
    character_parity_ok,
    eisenstein,
    eisenstein_character,
    eta_quotient,
    periodic_product,
    theta,
    unary_theta,
)
from verifier.recheck.series import Series

Key = tuple[Fraction, int, int]
Graded = dict[Key, Series]
Side = tuple[Graded, Graded | None]

ATOM_HEADS = ("E", "Delta", "eta", "theta", "Echar", "utheta")
THETA_ETA = [(1, -2), (2, 5), (4, -2)]  # theta(tau) = eta(2 tau)^5 / (eta(tau)^2 eta(4 tau)^2)


class Unsupported(Exception):
    """A construct the re-checker does not implement (the claim is then not re-checked)."""


def char_mul(w1: Fraction, d1: int, w2: Fraction, d2: int) -> int:
    """The character of a product (theta-multiplier rule, see the module docstring)."""
    half1, half2 = w1.denominator == 2, w2.denominator == 2
    e = 0
    if half1 and half2:
        e = int(w1 + w2)
    elif half1 or half2:
        e = int(w2 if half1 else w1)
    return arith.kernel_product(d1 * d2, -1 if e % 2 else 1)


def _eta_pairs(args: list[Any]) -> list[tuple[int, int]]:
    pairs: dict[int, int] = {}
    for item in args:
        if not (isinstance(item, list) and len(item) == 2):
            raise Unsupported("an eta factor is not a pair (d r)")
        d, r = item
        if not isinstance(d, Fraction) or not isinstance(r, Fraction) or d.denominator != 1 or r.denominator != 1:
            raise Unsupported("an eta factor has a non-integral d or r")
        if d <= 0:
            raise Unsupported("an eta factor has d <= 0")
        pairs[int(d)] = pairs.get(int(d), 0) + int(r)
    return sorted((d, r) for d, r in pairs.items() if r)


def _int(x: Any, what: str) -> int:
    if not isinstance(x, Fraction) or x.denominator != 1:
        raise Unsupported(f"{what} is not an integer")
    return int(x)


def _echar(args: list[Any]) -> tuple[int, int, int, int]:
    """(k, psi, phi, d) of ``(Echar k psi phi d)``, checked: psi, phi squarefree kernels, E_k^{psi,phi} defined."""
    if len(args) != 4:
        raise Unsupported("Echar takes a weight, two characters and a scale")
    k, psi, phi, d = (_int(a, "an argument of Echar") for a in args)
    for kern in (psi, phi):
        if kern == 0 or arith.squarefree_part(Fraction(kern)) != kern:
            raise Unsupported(f"Echar: {kern} is not the kernel of a quadratic character")
    if d < 1:
        raise Unsupported("Echar: the scale is not positive")
    if not character_parity_ok(k, psi, phi):
        raise ValueError(f"E_{k} with the characters ({psi}, {phi}) is no modular form (parity, or k = 2 trivial)")
    return k, psi, phi, d


def _utheta(args: list[Any]) -> tuple[int, int, int]:
    """(psi, nu, d) of ``(utheta psi nu d)``, checked: psi a kernel of parity (-1)^nu, d >= 1."""
    if len(args) != 3:
        raise Unsupported("utheta takes a character, a power of n and a scale")
    psi, nu, d = (_int(a, "an argument of utheta") for a in args)
    if psi == 0 or arith.squarefree_part(Fraction(psi)) != psi:
        raise Unsupported(f"utheta: {psi} is not the kernel of a quadratic character")
    if nu not in (0, 1) or d < 1:
        raise Unsupported("utheta: the power of n is not 0 or 1, or the scale is not positive")
    if (psi > 0) != (nu == 0):
        raise ValueError(f"the unary theta series of ({psi}, n^{nu}) vanishes identically (parity)")
    return psi, nu, d


def _gram(x: Any) -> list[list[int]]:
    if not isinstance(x, list) or not x or not all(isinstance(r, list) and len(r) == len(x) for r in x):
        raise Unsupported("a Gram matrix is not square")
    return [[_int(v, "a Gram entry") for v in row] for row in x]


class Atoms:
    """The atoms of a claim: their level, characters, orders at cusps and series."""

    def __init__(self, series: dict[str, Any] | None = None) -> None:
        self._cache: dict[tuple[str, int], Series] = {}
        # Definitions of series-only products (the certificate's ``series``), only where the
        # method compares coefficients and no more (expansions, witnesses).
        self.series_defs = series or {}
        self.has_series = False
        self.has_e2 = False
        self.has_deriv = False
        self.half = False

    # -- structure --------------------------------------------------------------------
    def walk(self, tree: Any, out: list[Any]) -> None:
        """Collect the atoms of an expression tree (checking its operators)."""
        if isinstance(tree, Fraction):
            return
        if not isinstance(tree, list) or not tree or not isinstance(tree[0], str):
            raise Unsupported(f"unreadable expression {tree!r}")
        head, args = tree[0], tree[1:]
        if head == "series" and len(args) == 2:
            self.series_definition(tree)
            self.has_series = True
            out.append(tree)
            return
        if head in ATOM_HEADS:
            if head == "Echar":
                _echar(args)
            if head == "utheta":
                _utheta(args)
            if head == "E" and args and args[0] == 2:
                self.has_e2 = True
            out.append(tree)
            return
        if head in ("+", "-", "*", "/") and len(args) == 2:
            for a in args:
                self.walk(a, out)
            return
        if head == "^" and len(args) == 2:
            _int(args[1], "an exponent")
            self.walk(args[0], out)
            return
        if head == "D" and len(args) == 1:
            self.has_deriv = True
            self.walk(args[0], out)
            return
        if head == "q" and len(args) == 1:
            _int(args[0], "an exponent of q")
            return
        if head in ("T", "U") and len(args) == 2:
            _int(args[0], "the index of a Hecke operator")
            self.walk(args[1], out)
            return
        raise Unsupported(f"unknown operator {head}")

    def series_definition(self, atom: list[Any]) -> dict[str, Any]:
        """The product defining a ``(series h d)`` atom (Unsupported when the certificate has none)."""
        name = atom[1]
        for key, value in self.series_defs.items():
            if key == name or (isinstance(name, Fraction) and key.isdigit() and Fraction(key) == name):
                if not isinstance(value, dict) or not isinstance(value.get("product"), dict):
                    break
                return dict(value["product"])
        raise Unsupported("a series-only atom the certificate does not define as a product")

    def weight(self, atom: list[Any]) -> Fraction:
        """The weight of an atom."""
        head, args = atom[0], atom[1:]
        if head == "series":
            return Fraction(0)  # no modular weight: only coefficients are compared with it
        if head == "E":
            return Fraction(_int(args[0], "the weight of E"))
        if head == "Delta":
            return Fraction(12)
        if head == "eta":
            return Fraction(sum(r for _, r in _eta_pairs(args)), 2)
        if head == "Echar":
            return Fraction(_echar(args)[0])
        if head == "utheta":
            return Fraction(2 * _utheta(args)[1] + 1, 2)
        gram = _gram(args[1])
        return Fraction(len(gram), 2)

    def level(self, atom: list[Any]) -> int:
        """The least level of an atom (raises Unsupported when it has none)."""
        head, args = atom[0], atom[1:]
        if head == "series":
            return 1  # none: only coefficients are compared with it
        if head == "E":
            k, d = _int(args[0], "the weight of E"), _int(args[1], "a scale")
            if k < 2 or k % 2 or d < 1:
                raise Unsupported(f"E_{k}({d} tau) is not an Eisenstein series of level one at d tau")
            return d
        if head == "Delta":
            return _int(args[0], "a scale")
        if head == "eta":
            pairs = _eta_pairs(args)
            if sum(r for _, r in pairs) % 2:
                n = arith.eta_least_level(_combine(pairs, THETA_ETA))
                if n is None:
                    raise Unsupported("a half-integral eta quotient times theta satisfies no Newman condition")
                return n * 4 // math.gcd(n, 4)
            n = arith.eta_least_level(pairs)
            if n is None:
                raise Unsupported("an eta quotient satisfies the Newman conditions at no level")
            return n
        if head == "Echar":
            # E_k^{psi,phi}(d tau) is on Gamma_0(u v d) (Diamond-Shurman, Thm. 4.5.2 and §4.8).
            k, psi, phi, d = _echar(args)
            return arith.conductor(psi) * arith.conductor(phi) * d
        if head == "utheta":
            # sum psi(n) n^nu q^(d n^2) is on Gamma_0(4 r^2 d), r the conductor of psi (Shimura 1973, §2).
            psi, _, d = _utheta(args)
            return 4 * arith.conductor(psi) ** 2 * d
        gram = _gram(args[1])
        # N (dA)^-1 even integral <=> (N/d) A^-1 even integral.  For odd rank the weight is
        # half-integral, and the claim's level is made a multiple of 4 as for every such atom.
        return arith.gram_level(gram) * _int(args[0], "a scale")

    def character(self, atom: list[Any], level: int) -> int:
        """The kernel of the atom's character at ``level`` (after checking Newman's conditions there)."""
        head, args = atom[0], atom[1:]
        if head in ("E", "Delta", "series"):
            return 1
        if head == "Echar":
            _, psi, phi, _ = _echar(args)
            return arith.kernel_product(psi, phi)
        if head == "utheta":
            # psi (4d/.) (-4/.)^nu relative to the theta multiplier (Shimura 1973, §2; Serre-Stark 1977, §2).
            psi, nu, d = _utheta(args)
            return arith.kernel_product(arith.kernel_product(psi, d), -1 if nu else 1)
        if head == "theta":
            gram = _gram(args[1])
            d = _int(args[0], "a scale")
            # theta_A(d tau) = theta_{dA}(tau): the character of the scaled lattice.
            return arith.gram_kernel([[d * x for x in row] for row in gram])
        pairs = _eta_pairs(args)
        w = Fraction(sum(r for _, r in pairs), 2)
        if w.denominator == 1:
            why = arith.eta_conditions(pairs, level)
            if why:
                raise Unsupported(f"eta quotient at level {level}: {why}")
            return arith.eta_kernel(pairs)
        with_theta = _combine(pairs, THETA_ETA)
        why = arith.eta_conditions(with_theta, level)
        if why:
            raise Unsupported(f"eta quotient times theta at level {level}: {why}")
        return arith.kernel_product(arith.eta_kernel(with_theta), -1 if int(w + Fraction(1, 2)) % 2 else 1)

    def order_at(self, atom: list[Any], level: int, c_den: int) -> Fraction:
        """A lower bound for the order of the atom at the cusps a/c_den (exact for eta quotients and Delta)."""
        if atom[0] == "series":
            raise Unsupported("a series-only product has no order at a cusp")
        if atom[0] == "Delta":  # Delta(d tau) = eta(d tau)^24
            return arith.ligozat_order([(_int(atom[1], "a scale"), 24)], level, c_den)
        if atom[0] != "eta":
            return Fraction(0)  # holomorphic at every cusp
        return arith.ligozat_order(_eta_pairs(atom[1:]), level, c_den)

    # -- series -----------------------------------------------------------------------
    def series(self, atom: list[Any], prec: int) -> Series:
        """The q-expansion of an atom to precision ``prec``."""
        key = (repr(atom), prec)
        have = self._cache.get(key)
        if have is None:
            have = self._build(atom, prec)
            self._cache[key] = have
        return have

    def _build(self, atom: list[Any], prec: int) -> Series:
        head, args = atom[0], atom[1:]
        if head == "eta":
            return eta_quotient(_eta_pairs(args), prec)
        if head == "series":
            d = _int(args[1], "the scale of a series-only atom")
            if d < 1:
                raise Unsupported("a series-only atom at a scale below 1")
            spec = self.series_definition(atom)
            finite = {int(n): int(c) for n, c in spec.get("finite", [])}
            values = [int(v) for v in spec.get("values", [])]
            period = int(spec["period"])
            if period < 0 or (period and len(values) != period):
                raise ValueError("a series-only product with a malformed period")
            base = periodic_product(period, values, finite, -(-prec // d)).scale(Fraction(str(spec["constant"])))
            return base.inflate(d).truncate(prec) if d != 1 else base
        if head == "Echar":
            k, psi, phi, d = _echar(args)
            return eisenstein_character(k, psi, phi, -(-prec // d)).inflate(d).truncate(prec)
        if head == "utheta":
            psi, nu, d = _utheta(args)
            return unary_theta(psi, nu, -(-prec // d)).inflate(d).truncate(prec)
        d = _int(args[0] if head != "E" else args[1], "a scale")
        base_prec = -(-prec // d)
        if head == "E":
            base = eisenstein(_int(args[0], "the weight of E"), base_prec)
        elif head == "Delta":
            base = eta_quotient([(1, 24)], base_prec)
        else:
            base = theta(_gram(args[1]), base_prec)
        return base.inflate(d).truncate(prec) if d != 1 else base


def _combine(a: list[tuple[int, int]], b: list[tuple[int, int]]) -> list[tuple[int, int]]:
    out: dict[int, int] = dict(a)
    for d, r in b:
        out[d] = out.get(d, 0) + r
    return sorted((d, r) for d, r in out.items() if r)


# -- graded arithmetic -----------------------------------------------------------------
def g_add(a: Graded, b: Graded, sign: int = 1) -> Graded:
    """a + sign b."""
    out = dict(a)
    for k, s in b.items():
        t = s if sign > 0 else -s
        out[k] = out[k] + t if k in out else t
    return out


def g_mul(a: Graded, b: Graded) -> Graded:
    """a b, with characters multiplied by the theta-multiplier rule."""
    out: Graded = {}
    for (w1, j1, d1), s1 in a.items():
        for (w2, j2, d2), s2 in b.items():
            k = (w1 + w2, j1 + j2, char_mul(w1, d1, w2, d2))
            p = s1 * s2
            out[k] = out[k] + p if k in out else p
    return out


class Evaluator:
    """Graded fractions of expression trees at a working precision."""

    def __init__(self, atoms: Atoms, level: int, prec: int) -> None:
        self.atoms = atoms
        self.level = level
        self.prec = prec
        self._chars: dict[str, int] = {}

    def one(self, c: Fraction = Fraction(1)) -> Graded:
        """The constant c."""
        return {(Fraction(0), 0, 1): Series.constant(c, self.prec)}

    def e2(self) -> Series:
        """E_2 as a series."""
        return self.atoms.series(["E", Fraction(2), Fraction(1)], self.prec)

    def atom(self, tree: list[Any]) -> Graded:
        """An atom as a graded value."""
        if tree[0] == "E" and tree[1] == 2:
            d = int(tree[2])
            out: Graded = {(Fraction(0), 1, 1): Series.constant(Fraction(1, d), self.prec)}
            if d != 1:
                rest = self.atoms.series(tree, self.prec) - self.e2().scale(Fraction(1, d))
                out[(Fraction(2), 0, 1)] = rest
            return out
        key = repr(tree)
        if key not in self._chars:
            self._chars[key] = self.atoms.character(tree, self.level)
        return {(self.atoms.weight(tree), 0, self._chars[key]): self.atoms.series(tree, self.prec)}

    def deriv(self, a: Graded) -> Graded:
        """D = q d/dq on a graded value (quasimodular rules of the module docstring)."""
        out: Graded = {}
        e2 = self.e2()
        e4 = self.atoms.series(["E", Fraction(4), Fraction(1)], self.prec)
        for (w, j, c), f in a.items():
            pieces = [((w + 2, j, c), f.qderiv() - (e2 * f).scale(w / 12))]
            pieces.append(((w, j + 1, c), f.scale((w + j) / 12)))
            if j:
                pieces.append(((w + 4, j - 1, c), (e4 * f).scale(Fraction(-j, 12))))
            for k, s in pieces:
                out[k] = out[k] + s if k in out else s
        return out

    def side(self, tree: Any) -> Side:
        """(numerator, denominator) of an expression."""
        if isinstance(tree, Fraction):
            return self.one(tree), None
        head, args = tree[0], tree[1:]
        if head == "q":
            return {(Fraction(0), 0, 1): Series.monomial(int(args[0]), Fraction(1), self.prec)}, None
        if head in ATOM_HEADS or head == "series":
            return self.atom(tree), None
        if head in ("+", "-"):
            (na, da), (nb, db) = self.side(args[0]), self.side(args[1])
            sign = 1 if head == "+" else -1
            if da is None and db is None:
                return g_add(na, nb, sign), None
            return g_add(_times(na, db), _times(nb, da), sign), _times(da, db)
        if head == "*":
            for c, other in ((args[0], args[1]), (args[1], args[0])):
                if isinstance(c, Fraction):
                    # A constant factor scales: multiplying by the constant series would cut the
                    # precision of a factor with a pole at infinity (c q^-1 + ...) by its order.
                    n, d = self.side(other)
                    return {key: s.scale(c) for key, s in n.items()}, d
            (na, da), (nb, db) = self.side(args[0]), self.side(args[1])
            return g_mul(na, nb), _opt_mul(da, db)
        if head == "/":
            (na, da), (nb, db) = self.side(args[0]), self.side(args[1])
            return _times(na, db), _times(nb, da)
        if head == "^":
            n, d = self.side(args[0])
            e = int(args[1])
            if e < 0:
                n, d, e = (d if d is not None else self.one()), n, -e
            return _power(n, e, self), (None if d is None else _power(d, e, self))
        if head == "D":
            n, d = self.side(args[0])
            if d is None:
                return self.deriv(n), None
            return g_add(g_mul(self.deriv(n), d), g_mul(n, self.deriv(d)), -1), g_mul(d, d)
        if head in ("T", "U"):
            return self.hecke(head, int(args[0]), args[1]), None
        raise Unsupported(f"unknown operator {head}")

    def hecke(self, kind: str, n: int, tree: Any) -> Graded:
        """T_n or U_n of one modular form, at the form's own level and character:
        a_m(T_n f) = sum_{d | gcd(m, n)} chi(d) d^(k-1) a_(mn/d^2) (Diamond-Shurman, A First
        Course in Modular Forms, Prop. 5.3.1), and a_m(U_n f) = a_(mn)."""
        found: list[Any] = []
        self.atoms.walk(tree, found)
        level = 1
        for a in found:
            m = self.atoms.level(a)
            level = level * m // math.gcd(level, m)
        inner = Evaluator(self.atoms, level, max(self.prec - 1, 0) * n + 1)
        num, den = inner.side(tree)
        if den is not None or len(num) != 1:
            raise Unsupported("a Hecke operator on anything but one modular form of one weight and character")
        ((w, j, kernel), f), *_ = num.items()
        if j or w.denominator != 1:
            raise Unsupported("a Hecke operator on a quasimodular form or a form of half-integral weight")
        if kind == "U" and level % n:
            raise Unsupported(f"U_{n} with {n} not dividing the level {level}")
        k = int(w)
        out = []
        for m in range(self.prec):
            if kind == "U":
                out.append(f[m * n])
                continue
            total = Fraction(0)
            g = math.gcd(m, n) if m else n
            for d in arith.divisors(g):
                chi = arith.character_value(kernel, d, level)
                if chi:
                    total += chi * Fraction(d) ** (k - 1) * f[m * n // (d * d)]
            out.append(total)
        return {(w, 0, kernel): Series(0, out, self.prec)}


def _times(a: Graded | None, b: Graded | None) -> Graded:
    assert a is not None or b is not None
    if a is None:
        assert b is not None
        return b
    if b is None:
        return a
    return g_mul(a, b)


def _opt_mul(a: Graded | None, b: Graded | None) -> Graded | None:
    if a is None and b is None:
        return None
    return _times(a, b)


def _power(a: Graded, e: int, ev: Evaluator) -> Graded:
    out = ev.one()
    for _ in range(e):
        out = g_mul(out, a)
    return out


def plain(g: Graded | None, e2: Callable[[], Series], prec: int) -> Series:
    """The q-expansion of sum f E_2^j."""
    if g is None:
        return Series.constant(Fraction(1), prec)
    total = Series(prec, [], prec)
    for (_, j, _), f in g.items():
        term = f
        for _ in range(j):
            term = term * e2()
        total = total + term
    return total

"""Sums of eta-type products, the generating functions of partition-type claims.

A :class:`Mono` is ``c * q^e * prod_delta f_delta^{r_delta}`` with
``f_delta = prod_{n >= 1} (1 - q^{delta n}) = q^{-delta/24} eta(delta tau)``
(docs/method.md#progressions).  A :class:`ProductSum` is a finite sum of them.  This module
reads such sums from the claim AST (``f_k``, ``\\eta(k\\tau)``, ``\\eta_k``, ``q``, numbers,
``\\frac``, products, integer powers, sums) and from typed expressions of definitions
(eta atoms, constants and powers of q), and names the partition functions whose generating
functions are eta-type products:

* ``p(n)``: ``1/f_1``;  ``\\overline{p}(n)`` (overpartitions): ``f_2 / f_1^2``;
* ``b_l(n)`` (l-regular partitions): ``f_l / f_1``;  ``a_F(n)``: a defined product F.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from verifier.elaborate import ir
from verifier.elaborate.elaborator import ElaborationError
from verifier.parse import ast

MAX_TERMS = 64  # expanded products of sums beyond this are not read
PBAR = ast.PBAR  # the overpartition function, however the author spells it (the grammar's name)


def _word(sub: str) -> bool:
    """A subscript that can name a defined product: letters, digits, ``_``, or a control word."""
    body = sub[1:] if sub.startswith("\\") else sub
    return bool(body) and all(c.isalnum() or c == "_" for c in body)


class NotProduct(Exception):
    """The expression is not a sum of eta-type products; carries the span of the culprit."""

    def __init__(self, message: str, span: ast.Span | None = None) -> None:
        super().__init__(message)
        self.span = span


@dataclass(frozen=True)
class Mono:
    """``coeff * q^shift * prod f_delta^r`` over the pairs ``(delta, r)`` of ``exps``."""

    coeff: Fraction
    shift: Fraction
    exps: tuple[tuple[int, int], ...] = ()

    @staticmethod
    def make(coeff: Fraction, shift: Fraction, exps: Mapping[int, int]) -> Mono:
        """A monomial with its exponents normalised (sorted, zeros dropped)."""
        return Mono(Fraction(coeff), Fraction(shift), tuple(sorted((d, r) for d, r in exps.items() if r)))

    def times(self, other: Mono) -> Mono:
        """The product of two monomials."""
        total = dict(self.exps)
        for d, r in other.exps:
            total[d] = total.get(d, 0) + r
        return Mono.make(self.coeff * other.coeff, self.shift + other.shift, total)

    def power(self, e: int) -> Mono:
        """An integer power (the coefficient must be nonzero for negative e)."""
        if e < 0 and self.coeff == 0:
            raise ZeroDivisionError("0 to a negative power")
        return Mono.make(self.coeff**e, self.shift * e, {d: r * e for d, r in self.exps})

    @property
    def s(self) -> int:
        """``sum delta r_delta``: the product equals ``q^{-s/24}`` times an eta quotient."""
        return sum(d * r for d, r in self.exps)

    @property
    def weight(self) -> Fraction:
        """Half the sum of the exponents (the weight of the eta quotient)."""
        return Fraction(sum(r for _, r in self.exps), 2)

    def text(self) -> str:
        """A readable spelling such as ``5 q f_5^5 f_1^(-6)``."""
        parts = [] if self.coeff == 1 and (self.exps or self.shift) else [str(self.coeff)]
        if self.shift:
            parts.append("q" if self.shift == 1 else f"q^{self.shift}")
        parts += [f"f_{d}" if r == 1 else f"f_{d}^{r}" if r > 0 else f"f_{d}^({r})" for d, r in self.exps]
        return " ".join(parts) or "1"


ProductSum = tuple[Mono, ...]


def normalise(terms: list[Mono]) -> ProductSum:
    """Collect equal products and drop zero terms."""
    total: dict[tuple[Fraction, tuple[tuple[int, int], ...]], Fraction] = {}
    for m in terms:
        key = (m.shift, m.exps)
        total[key] = total.get(key, Fraction(0)) + m.coeff
    return tuple(Mono(c, s, e) for (s, e), c in sorted(total.items(), key=lambda kv: (kv[0][0], kv[0][1])) if c)


def _mul(a: ProductSum, b: ProductSum, span: ast.Span) -> ProductSum:
    if len(a) * len(b) > MAX_TERMS:
        raise NotProduct("the expanded product has too many terms", span)
    return normalise([x.times(y) for x in a for y in b])


def _pow(a: ProductSum, e: Fraction, span: ast.Span) -> ProductSum:
    if e.denominator != 1:
        raise NotProduct("only integer powers of products are read", span)
    k = int(e)
    if len(a) == 1:
        if a[0].coeff == 0 and k < 0:
            raise NotProduct("0 to a negative power", span)
        return (a[0].power(k),)
    if not a:
        if k <= 0:
            raise NotProduct("0 to a non-positive power", span)
        return ()
    if k < 0 or k > 8:
        raise NotProduct("a sum is raised only to a small non-negative power here", span)
    out: ProductSum = (Mono(Fraction(1), Fraction(0)),)
    for _ in range(k):
        out = _mul(out, a, span)
    return out


def eta_mono(delta: Fraction, r: int) -> Mono:
    """``eta(delta tau)^r = q^{delta r / 24} f_delta^r`` (delta a positive integer)."""
    if delta.denominator != 1 or delta < 1:
        raise NotProduct(f"eta({delta} tau) is not an eta-type product in q")
    return Mono.make(Fraction(1), Fraction(int(delta) * r, 24), {int(delta): r})


def from_ir(expr: ir.Expr) -> ProductSum:
    """A typed expression (of a definition) as a sum of products, or :class:`NotProduct`."""
    if isinstance(expr, ir.Const):
        return normalise([Mono(expr.value, Fraction(0))])
    if isinstance(expr, ir.QPower):
        return (Mono(Fraction(1), expr.exponent),)
    if isinstance(expr, ir.Shift):
        # q^c times a product, as a defined f_k = (q^k;q^k)_\infty is elaborated.
        assert expr.base is not None
        return tuple(m.times(Mono(Fraction(1), expr.exponent)) for m in from_ir(expr.base))
    if isinstance(expr, ir.Atom) and expr.key == "eta":
        out = Mono(Fraction(1), Fraction(0))
        for d, r in expr.params:
            out = out.times(eta_mono(Fraction(d) * Fraction(expr.scale), int(r)))
        return (out,)
    if isinstance(expr, ir.Sum):
        assert expr.left is not None and expr.right is not None
        right = from_ir(expr.right)
        if expr.sign < 0:
            right = tuple(Mono(-m.coeff, m.shift, m.exps) for m in right)
        return normalise([*from_ir(expr.left), *right])
    if isinstance(expr, ir.Product):
        assert expr.left is not None and expr.right is not None
        return _mul(from_ir(expr.left), from_ir(expr.right), (0, 0))
    if isinstance(expr, ir.Quotient):
        assert expr.left is not None and expr.right is not None
        return _div(from_ir(expr.left), from_ir(expr.right), (0, 0))
    if isinstance(expr, ir.Power):
        assert expr.base is not None
        return _pow(from_ir(expr.base), Fraction(expr.exponent), (0, 0))
    raise NotProduct(f"{expr.text} is not an eta-type product")


def _div(a: ProductSum, b: ProductSum, span: ast.Span) -> ProductSum:
    if len(b) != 1 or b[0].coeff == 0:
        raise NotProduct("only division by a single product is read", span)
    return _mul(a, (b[0].power(-1),), span)


class Reader:
    """Reads AST nodes as sums of products, with the document's definitions.

    ``products`` maps defined names to their sums of products; ``forms`` are the
    elaborator's typed definitions (tried when a name is not in ``products``).
    """

    def __init__(self, products: Mapping[str, ProductSum], forms: Mapping[str, ir.Expr]) -> None:
        self.products = products
        self.forms = forms

    def name(self, text: str, arg: str | None, span: ast.Span) -> ProductSum:
        """The value of a name (``q``, ``f_k``, ``\\eta``, a defined name)."""
        text = text.replace(" ", "")
        scale = 1
        if arg is not None and arg != "q":
            # The parser normalises the argument: "tau", "2tau" (a multiple), "tau/2", "z".
            factor = arg.removesuffix("tau")
            if factor == arg or not (factor == "" or (factor.isdigit() and factor.isascii())):
                raise NotProduct(f"cannot read the argument ({arg})", span)
            scale = int(factor or 1)
        if text == "q":
            if scale != 1:
                raise NotProduct("q takes no argument", span)
            return (Mono(Fraction(1), Fraction(1)),)
        for key in (text, text.lstrip("\\"), "\\" + text.lstrip("\\")):
            if key in self.products:
                if scale != 1:
                    raise NotProduct(f"{text}({arg}) at a multiple of tau is not read", span)
                return self.products[key]
            if key in self.forms:
                if scale != 1:
                    raise NotProduct(f"{text}({arg}) at a multiple of tau is not read", span)
                try:
                    return from_ir(self.forms[key])
                except ElaborationError as exc:
                    raise NotProduct(f"{text}: {exc.problem.message}", span) from exc
        k = ast.integer_subscript(text, "f")
        if k is not None:
            if arg not in (None, "q"):
                raise NotProduct("f_k takes no argument", span)
            if k < 1:
                raise NotProduct("f_k needs k >= 1", span)
            return (Mono.make(Fraction(1), Fraction(0), {k: 1}),)
        if text == "\\eta":
            return (eta_mono(Fraction(scale), 1),)
        k = ast.integer_subscript(text, "\\eta")
        if k is not None and arg is None:
            return (eta_mono(Fraction(k), 1),)
        raise NotProduct(f"{text} is not a product this claim can read", span)

    def read(self, node: ast.Node) -> ProductSum:
        """The sum of products of ``node``, or :class:`NotProduct`."""
        if isinstance(node, ast.Number):
            return normalise([Mono(Fraction(node.value), Fraction(0))])
        if isinstance(node, ast.Name):
            return self.name(node.text, node.arg, node.span)
        if isinstance(node, ast.Neg):
            return tuple(Mono(-m.coeff, m.shift, m.exps) for m in self.read(node.operand))
        if isinstance(node, ast.BinOp):
            a, b = self.read(node.left), self.read(node.right)
            if node.op == "+":
                return normalise([*a, *b])
            if node.op == "-":
                return normalise([*a, *(Mono(-m.coeff, m.shift, m.exps) for m in b)])
            if node.op == "*":
                return _mul(a, b, node.span)
            return _div(a, b, node.span)
        if isinstance(node, ast.Power):
            if not isinstance(node.exponent, Fraction):
                raise NotProduct("the exponent is not a number", node.span)
            base = node.base
            if isinstance(base, ast.Name) and base.text == "q" and base.arg is None:
                return (Mono(Fraction(1), node.exponent),)
            return _pow(self.read(base), node.exponent, node.span)
        if isinstance(node, ast.Call):
            # q(...) and F(...): a product written without an operator.
            return _mul(self.name(node.name, None, node.name_span), self.read(node.argument), node.span)
        raise NotProduct("this construction is not a product", node.span)


def partition_function(name: str, products: Mapping[str, ProductSum], forms: Mapping[str, Any]) -> Mono | None:
    """The generating function of a named partition-type function, or None.

    ``p``, ``\\pbar`` (the overpartitions, rewritten from ``\\overline{p}``), ``b_l`` and
    ``a_F`` for a defined F that is a single product with integral exponents of q.
    """
    name = name.replace(" ", "")
    if name == "p":
        return Mono.make(Fraction(1), Fraction(0), {1: -1})
    if name == PBAR:
        return Mono.make(Fraction(1), Fraction(0), {1: -2, 2: 1})
    ell = ast.integer_subscript(name, "b")
    if ell is not None:
        if ell < 1:
            return None
        return Mono.make(Fraction(1), Fraction(0), {1: -1, ell: 1})
    parts = ast.subscript(name)
    if parts is not None and parts[0] == "a" and _word(parts[1]):
        sub = parts[1].lstrip("\\")
        try:
            value = Reader(products, forms).name(sub, None, (0, 0))
        except NotProduct:
            return None
        if len(value) == 1 and value[0].shift.denominator == 1:
            return value[0]
    return None

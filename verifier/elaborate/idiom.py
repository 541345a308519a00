"""Meaning of the q-series idiom: infinite products, q-Pochhammer symbols and sums over Z.

The grammar (``grammar/claim.lark``, section "q-series idiom") reads the notation; this
module turns it into typed expressions (docs/method.md#products, #sums-over-z):

* a product of factors ``(1 - s q^{Mn+b})^r`` (also ``1 + q^n``, quotients and powers of
  them) and q-Pochhammer symbols ``(±q^a; q^M)_\\infty`` have an exponent function c with
  ``prod = C * prod_{n>=1} (1-q^n)^{c(n)}``.  When c(n) depends only on gcd(n, L) the
  product is the eta quotient ``q^{-s/24} prod eta(d tau)^{r_d}`` (Möbius inversion);
  otherwise it is a series-only atom;
* ``sum_{n in Z} (±1)^n q^{a n^2 + b n + c}`` is a product by the Jacobi triple product,
  and so goes the same way; sums with periodic weights (times n), and one-sided sums of the
  right symmetry, are combinations of unary theta series (:mod:`verifier.elaborate.unary`)
  when the characters needed are quadratic; the rest are series-only atoms.

Series-only atoms are compared coefficient by coefficient (docs/method.md#series-only).
A construct outside this reading raises ``unsupported-notation`` naming it, with the
nearest form that is read.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Callable
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any

from verifier.elaborate import ir
from verifier.forms.registry import SERIES_ONLY
from verifier.parse import ast

MAX_PERIOD = 2_000
MAX_FINITE = 2_000
CODE = "unsupported-notation"


class IdiomError(Exception):
    """A construct of the q-series idiom that is not read; ``construct`` names it."""

    def __init__(self, construct: str, hint: str, node: ast.Node) -> None:
        super().__init__(construct)
        self.construct = construct
        self.hint = hint
        self.node = node


# -- polynomials in one variable, read from the AST ----------------------------------------
Poly = dict[int, Fraction]


def poly_of(node: ast.Node, var: str) -> Poly | None:
    """``node`` as a polynomial in ``var`` with rational coefficients, or None."""
    if isinstance(node, ast.Number):
        return {0: Fraction(node.value)} if node.value else {}
    if isinstance(node, ast.Name):
        return {1: Fraction(1)} if node.text == var and node.arg is None else None
    if isinstance(node, ast.Neg):
        inner = poly_of(node.operand, var)
        return None if inner is None else {k: -v for k, v in inner.items()}
    if isinstance(node, ast.Call) and node.name == var:
        # n(3n-1): the variable times a bracket.
        inner = poly_of(node.argument, var)
        return None if inner is None else _pmul({1: Fraction(1)}, inner)
    if isinstance(node, ast.Power) and isinstance(node.exponent, Fraction):
        base = poly_of(node.base, var)
        e = node.exponent
        if base is None or e.denominator != 1 or e < 0 or e > 4:
            return None
        out: Poly = {0: Fraction(1)}
        for _ in range(int(e)):
            out = _pmul(out, base)
        return out
    if isinstance(node, ast.BinOp):
        a, b = poly_of(node.left, var), poly_of(node.right, var)
        if a is None or b is None:
            return None
        if node.op == "+":
            return _padd(a, b, 1)
        if node.op == "-":
            return _padd(a, b, -1)
        if node.op == "*":
            return _pmul(a, b)
        if node.op == "/" and set(b) == {0}:
            return {k: v / b[0] for k, v in a.items()}
    return None


Poly2 = dict[tuple[int, int], Fraction]
PolyN = dict[tuple[int, ...], Fraction]


def poly2_of(node: ast.Node, x: str, y: str) -> Poly2 | None:
    """``node`` as a polynomial in ``x`` and ``y`` with rational coefficients, or None."""
    found = polyn_of(node, (x, y))
    return None if found is None else {(k[0], k[1]): v for k, v in found.items()}


def polyn_of(node: ast.Node, names: tuple[str, ...], max_power: int = 2) -> PolyN | None:
    """``node`` as a polynomial in ``names`` (exponent tuples) with rational coefficients, or None.

    Powers above ``max_power`` are refused, so a hostile exponent cannot blow up the expansion.
    """
    zero = (0,) * len(names)

    def unit(name: str) -> PolyN:
        return {tuple(int(v == name) for v in names): Fraction(1)}

    if isinstance(node, ast.Number):
        return {zero: Fraction(node.value)} if node.value else {}
    if isinstance(node, ast.Name) and node.arg is None and node.text in names:
        return unit(node.text)
    if isinstance(node, ast.Neg):
        inner = polyn_of(node.operand, names, max_power)
        return None if inner is None else {k: -v for k, v in inner.items()}
    if isinstance(node, ast.Call) and node.name in names:
        inner = polyn_of(node.argument, names, max_power)
        return None if inner is None else _pnmul(unit(node.name), inner)
    if isinstance(node, ast.Power) and isinstance(node.exponent, Fraction):
        base = polyn_of(node.base, names, max_power)
        e = node.exponent
        if base is None or e.denominator != 1 or e < 0 or e > max_power:
            return None
        out: PolyN = {zero: Fraction(1)}
        for _ in range(int(e)):
            out = _pnmul(out, base)
        return out
    if isinstance(node, ast.BinOp):
        a, b = polyn_of(node.left, names, max_power), polyn_of(node.right, names, max_power)
        if a is None or b is None:
            return None
        if node.op in "+-":
            sign = 1 if node.op == "+" else -1
            out = dict(a)
            for k, v in b.items():
                out[k] = out.get(k, Fraction(0)) + sign * v
            return {k: v for k, v in out.items() if v}
        if node.op == "*":
            return _pnmul(a, b)
        if node.op == "/" and set(b) == {zero}:
            return {k: v / b[zero] for k, v in a.items()}
    return None


def _pnmul(a: PolyN, b: PolyN) -> PolyN:
    out: PolyN = {}
    for i, u in a.items():
        for k, v in b.items():
            key = tuple(x + y for x, y in zip(i, k, strict=True))
            out[key] = out.get(key, Fraction(0)) + u * v
    return {k: v for k, v in out.items() if v}


def _padd(a: Poly, b: Poly, sign: int) -> Poly:
    out = dict(a)
    for k, v in b.items():
        out[k] = out.get(k, Fraction(0)) + sign * v
    return {k: v for k, v in out.items() if v}


def _pmul(a: Poly, b: Poly) -> Poly:
    out: Poly = {}
    for i, x in a.items():
        for j, y in b.items():
            out[i + j] = out.get(i + j, Fraction(0)) + x * y
    return {k: v for k, v in out.items() if v}


def _exponent_node(e: Fraction | ast.Node, span: ast.Span) -> ast.Node:
    if isinstance(e, Fraction):
        if e.denominator == 1 and e >= 0:
            return ast.Number(span, int(e))
        return (
            ast.BinOp(span, "/", ast.Number(span, abs(e.numerator)), ast.Number(span, e.denominator))
            if e > 0
            else (ast.Neg(span, ast.BinOp(span, "/", ast.Number(span, -e.numerator), ast.Number(span, e.denominator))))
        )
    return e


def q_exponent(node: ast.Node, var: str | None) -> Poly | None:
    """If ``node`` is ``q`` or ``q^{E}``, E as a polynomial in ``var``; else None."""
    if isinstance(node, ast.Name) and node.text == "q" and node.arg is None:
        return {0: Fraction(1)}
    if isinstance(node, ast.Power) and isinstance(node.base, ast.Name) and node.base.text == "q":
        return poly_of(_exponent_node(node.exponent, node.span), var or "\0")
    return None


# -- exponent functions -----------------------------------------------------------------
@dataclass
class ExponentFunction:
    """``constant * prod_{n>=1} (1-q^n)^{c(n)}``: c periodic mod ``period`` plus finitely many corrections."""

    period: int = 1
    values: list[int] = field(default_factory=lambda: [0])
    finite: dict[int, int] = field(default_factory=dict)
    constant: Fraction = Fraction(1)

    def c(self, n: int) -> int:
        return self.values[(n - 1) % self.period] + self.finite.get(n, 0)

    def _widen(self, period: int) -> None:
        if period > MAX_PERIOD:
            raise OverflowError
        self.values = [self.values[i % self.period] for i in range(period)]
        self.period = period

    def times(self, other: ExponentFunction, power: int = 1) -> None:
        period = self.period * other.period // math.gcd(self.period, other.period)
        self._widen(period)
        for i in range(period):
            self.values[i] += power * other.values[i % other.period]
        for n, e in other.finite.items():
            self.finite[n] = self.finite.get(n, 0) + power * e
        self.finite = {n: e for n, e in self.finite.items() if e}
        self.constant *= other.constant**power

    def add_progression(self, first: int, step: int, sign: int, power: int, stop: int | None) -> None:
        """Multiply by prod_{j>=0, first + j step < stop} (1 - sign q^{first + j step})^power (first >= 1)."""
        if sign < 0:
            # 1 + x = (1 - x^2) / (1 - x).
            self.add_progression(2 * first, 2 * step, 1, power, None if stop is None else 2 * stop - first)
            self.add_progression(first, step, 1, -power, stop)
            return
        if stop is not None:
            if (stop - first) // step > MAX_FINITE:
                raise OverflowError
            for n in range(first, stop, step):
                self.finite[n] = self.finite.get(n, 0) + power
            return
        period = self.period * step // math.gcd(self.period, step)
        self._widen(period)
        for i in range(period):
            if (i + 1 - first) % step == 0:
                self.values[i] += power
        for n in range(first - step, 0, -step):
            self.finite[n] = self.finite.get(n, 0) - power

    def eta_quotient(self) -> dict[int, int] | None:
        """r_d with prod = constant * prod_d f_d^{r_d}, if c(n) depends only on gcd(n, period)."""
        if any(self.finite.values()):
            return None
        L = self.period
        for n in range(1, L + 1):
            if self.values[n - 1] != self.values[math.gcd(n, L) - 1]:
                return None
        r: dict[int, int] = {}
        for d in range(1, L + 1):
            if L % d == 0:
                r[d] = sum(_mobius(d // e) * self.values[e - 1] for e in range(1, d + 1) if d % e == 0)
        return {d: v for d, v in r.items() if v}


def _mobius(n: int) -> int:
    out, p = 1, 2
    while p * p <= n:
        if n % p == 0:
            n //= p
            if n % p == 0:
                return 0
            out = -out
        p += 1
    return -out if n > 1 else out


# -- reading factors of a product ---------------------------------------------------------
@dataclass(frozen=True)
class Factor:
    """``(1 - sign q^{first + step j})`` for j = 0, 1, ... (step 0: a single factor)."""

    sign: int
    first: Fraction
    step: Fraction


def _linear_factor(node: ast.Node, var: str | None) -> tuple[int, Poly] | None:
    """``1 - q^E`` or ``1 + q^E`` (also ``1 - c q^E`` with c = ±1): (sign, E)."""
    if not (isinstance(node, ast.BinOp) and node.op in "+-"):
        return None
    if not (isinstance(node.left, ast.Number) and node.left.value == 1):
        return None
    sign = 1 if node.op == "-" else -1
    right = node.right
    e = q_exponent(right, var)
    if e is None:
        return None
    return sign, e


def mentions(node: ast.Node, var: str) -> bool:
    """Whether ``var`` occurs free in ``node`` (products and sums over ``var`` bind it)."""
    if isinstance(node, ast.Name):
        return node.text == var
    if isinstance(node, ast.BigProd | ast.BigSum) and node.var == var:
        return False
    if isinstance(node, ast.Power) and isinstance(node.exponent, ast.Node) and mentions(node.exponent, var):
        return True
    if isinstance(node, ast.Call) and node.name == var:
        return True
    return any(mentions(child, var) for child in ast.children(node))


def _fail(construct: str, hint: str, node: ast.Node) -> IdiomError:
    return IdiomError(construct, hint, node)


class ProductReader:
    """Exponent functions of products and q-Pochhammer symbols."""

    def __init__(self, text: str) -> None:
        self.text = text
        # Factors written after a product that do not involve its index (\prod(1-q^n) \prod(1+q^n),
        # (q;q)_\infty E_4): they multiply the product, as a reader takes them.
        self.outside: list[ast.Node] = []

    def product(self, node: ast.BigProd) -> ExponentFunction:
        """``\\prod_{n >= L} body`` or ``\\prod_{n=L}^{N} body``."""
        if node.lower is None or not isinstance(node.lower, ast.Number):
            raise _fail("a product whose lower limit is not a number", "write \\prod_{n \\ge 1}", node)
        lower = node.lower.value
        stop: int | None = None
        if node.upper is not None:
            if not isinstance(node.upper, ast.Number):
                raise _fail(
                    "a finite product with a symbolic upper limit",
                    "give the limit as a number, or write \\prod_{n \\ge 1} for the infinite product",
                    node,
                )
            stop = node.upper.value + 1
        out = ExponentFunction()
        self._body(node.body, node.var, lower, stop, 1, out)
        return out

    def _body(self, node: ast.Node, var: str, lower: int, stop: int | None, power: int, out: ExponentFunction) -> None:
        if power == 1 and not mentions(node, var):
            self.outside.append(node)
            return
        if isinstance(node, ast.BinOp) and node.op == "*":
            self._body(node.left, var, lower, stop, power, out)
            self._body(node.right, var, lower, stop, power, out)
            return
        if isinstance(node, ast.BinOp) and node.op == "/":
            if not (isinstance(node.left, ast.Number) and node.left.value == 1):
                self._body(node.left, var, lower, stop, power, out)
            self._body(node.right, var, lower, stop, -power, out)
            return
        if isinstance(node, ast.Power):
            e = node.exponent
            if not isinstance(e, Fraction):
                raise _fail(
                    "an infinite product with a non-periodic exponent",
                    "the exponent of each factor must be a constant integer, as in \\prod_{n \\ge 1}(1-q^n)^{24}",
                    node,
                )
            if e.denominator != 1:
                raise _fail("a product with a fractional exponent", "write integral exponents", node)
            self._body(node.base, var, lower, stop, power * int(e), out)
            return
        found = _linear_factor(node, var)
        if found is None:
            raise _fail(
                "a factor of a product that is not 1 - q^{an+b} or 1 + q^{an+b}",
                "write each factor as (1-q^{Mn+a}) or (1+q^{Mn+a}), or use (q^a;q^M)_\\infty",
                node,
            )
        sign, exps = found
        if set(exps) - {0, 1}:
            raise _fail(
                "a factor whose exponent is not linear in the index",
                "write the factor as (1-q^{Mn+a}) with integers M >= 1 and a",
                node,
            )
        step, first_at_0 = exps.get(1, Fraction(0)), exps.get(0, Fraction(0))
        if step.denominator != 1 or first_at_0.denominator != 1:
            raise _fail("a factor with a fractional exponent", "write q^{Mn+a} with integers M and a", node)
        if step <= 0:
            raise _fail(
                "an infinite product whose factors do not tend to 1",
                "the exponent must grow with the index: (1-q^{Mn+a}) with M >= 1",
                node,
            )
        first = int(step) * lower + int(first_at_0)
        self._progression(
            out, first, int(step), sign, power, None if stop is None else int(step) * stop + int(first_at_0), node
        )

    def _progression(
        self, out: ExponentFunction, first: int, step: int, sign: int, power: int, stop: int | None, node: ast.Node
    ) -> None:
        if stop is not None and stop <= first:
            return
        if first < 0:
            raise _fail(
                "a product with a factor 1 - q^{e} for e < 0 (not a power series in q)",
                "start the index where the exponent is positive",
                node,
            )
        if first == 0:
            if sign > 0:
                raise _fail(
                    "a product with the factor 1 - q^0 = 0", "start the index where the exponent is positive", node
                )
            out.constant *= Fraction(2) ** power
            first += step
            if stop is not None and stop <= first:
                return
        try:
            out.add_progression(first, step, sign, power, stop)
        except OverflowError as exc:
            raise _fail("a product whose period is too long", f"keep the moduli below {MAX_PERIOD}", node) from exc

    def pochhammer(self, node: ast.Pochhammer) -> ExponentFunction:
        """``(a_1, ..., a_k; q^M)_\\infty`` and ``(a; q^M)_N`` with ``a = ±q^j``."""
        base = q_exponent(node.nome, None)
        if base is None or set(base) != {0} or base[0].denominator != 1 or base[0] < 1:
            raise _fail(
                "a q-Pochhammer symbol whose base is not q^M",
                "write (a;q)_\\infty or (a;q^M)_\\infty with an integer M >= 1",
                node.nome,
            )
        step = int(base[0])
        stop_count: int | None = None
        if node.length is not None:
            if not isinstance(node.length, ast.Number):
                raise _fail(
                    "a finite q-Pochhammer symbol (a;q)_n of symbolic length",
                    "give the length as a number, or write (a;q)_\\infty",
                    node,
                )
            stop_count = node.length.value
        out = ExponentFunction()
        for a in node.bases:
            sign, first = self._pochhammer_base(a)
            stop = None if stop_count is None else first + step * stop_count
            self._progression(out, first, step, sign, 1, stop, a)
        return out

    def _pochhammer_base(self, node: ast.Node) -> tuple[int, int]:
        """``±q^j`` or ``±1``: (sign, j) for the factors (1 - sign q^{j + M i})."""
        sign = 1
        while isinstance(node, ast.Neg):
            sign, node = -sign, node.operand
        if isinstance(node, ast.Number) and node.value == 1:
            return sign, 0
        e = q_exponent(node, None)
        if e is None or set(e) - {0} or e.get(0, Fraction(0)).denominator != 1:
            raise _fail(
                "a q-Pochhammer symbol whose parameter is not ±q^j",
                "write (q^j;q^M)_\\infty or (-q^j;q^M)_\\infty with an integer j >= 0",
                node,
            )
        return sign, int(e.get(0, Fraction(0)))


# -- typed expressions from exponent functions --------------------------------------------
def series_atom(params: tuple[Any, ...], src: str, scale: Fraction = Fraction(1)) -> ir.Atom:
    """A series-only atom (no weight, no level: docs/method.md#series-only)."""
    return ir.Atom(ir.Typ(None, has_pole=True), src, SERIES_ONLY, scale, params)


def shifted(base: ir.Expr, exponent: Fraction, src: str) -> ir.Expr:
    """``q^exponent * base`` (no node when the exponent is 0)."""
    if exponent == 0:
        return base
    if isinstance(base, ir.Shift):
        assert base.base is not None
        return shifted(base.base, base.exponent + exponent, src)
    return ir.Shift(base.typ, src, base, exponent)


def product_expr(
    ef: ExponentFunction,
    src: str,
    node: ast.Node,
    eta: Callable[[Fraction, dict[Fraction, int]], ir.Expr],
    scale: Fraction = Fraction(1),
) -> ir.Expr:
    """The product ``ef`` at ``q -> q^scale``: an eta quotient times a power of q, or a series-only atom."""
    r = ef.eta_quotient()
    if r is not None:
        s = sum(d * v for d, v in r.items())
        quotient = eta(ef.constant, {Fraction(d) * scale: v for d, v in r.items()})
        return shifted(quotient, Fraction(-s, 24) * scale, src)
    params = (
        "prod",
        ef.period,
        tuple(ef.values),
        tuple(sorted((n, e) for n, e in ef.finite.items() if e)),
        ef.constant,
    )
    return series_atom(params, src, scale)


# -- sums over Z -----------------------------------------------------------------------
def sign_and_weight(factors: list[ast.Node], var: str) -> tuple[int, list[ast.Node]]:
    """Split off ``(-1)^var`` (sign -1) from the other weight factors."""
    sign = 1
    rest: list[ast.Node] = []
    for f in factors:
        if (
            isinstance(f, ast.Power)
            and isinstance(f.exponent, ast.Name)
            and f.exponent.text == var
            and _is_minus_one(f.base)
        ):
            sign = -sign
        else:
            rest.append(f)
    return sign, rest


def _is_minus_one(node: ast.Node) -> bool:
    return isinstance(node, ast.Neg) and isinstance(node.operand, ast.Number) and node.operand.value == 1


def triple_product(alpha: Fraction, beta: Fraction, sign: int) -> tuple[ExponentFunction, int, Fraction, int]:
    """``sum_{n in Z} sign^n q^{alpha n^2 + beta n}`` as ``c * q^{gamma} * P(q^{1/T})``.

    Returns (P, T, gamma, c).  Jacobi's triple product in Ramanujan's form
    f(a, b) = sum a^{n(n+1)/2} b^{n(n-1)/2} = (-a; ab)(-b; ab)(ab; ab) with a = sign x^i,
    b = sign x^j, x = q^{1/T}, i = T(alpha + beta), j = T(alpha - beta) (Berndt,
    Ramanujan's Notebooks III, Ch. 16, Entry 19; Andrews, The Theory of Partitions, Thm 2.8).
    The index is first shifted (n -> n + k) so that i, j >= 0.
    """
    k = math.floor((alpha - beta) / (2 * alpha))
    # n -> n + k: alpha n^2 + (beta + 2 alpha k) n + (alpha k^2 + beta k), sign^k.
    beta2 = beta + 2 * alpha * k
    gamma = alpha * k * k + beta * k
    c = sign ** abs(k)
    t = 1
    for x in (alpha + beta2, alpha - beta2):
        t = t * x.denominator // math.gcd(t, x.denominator)
    i, j = int(t * (alpha + beta2)), int(t * (alpha - beta2))
    assert i >= 0 and j >= 0
    out = ExponentFunction()
    m = i + j
    for first in (i, j):
        if first == 0:
            out.constant *= 1 + sign  # the factor (1 + sign x^0)
            first = m
        out.add_progression(first, m, -sign, 1, None)
    out.add_progression(m, m, 1, 1, None)
    return out, t, gamma, c


# -- reading sums ------------------------------------------------------------------------
def substitute(node: ast.Node, mapping: dict[str, ast.Node]) -> ast.Node:
    """``node`` with the variables of ``mapping`` replaced (bound variables are left alone)."""
    if isinstance(node, ast.Name) and node.arg is None and node.text in mapping:
        return mapping[node.text]
    if isinstance(node, ast.Call) and node.name in mapping:
        return ast.BinOp(node.span, "*", mapping[node.name], substitute(node.argument, mapping))
    if isinstance(node, ast.BigSum | ast.BigProd) and node.var in mapping:
        mapping = {k: v for k, v in mapping.items() if k != node.var}
    changes: dict[str, Any] = {}
    for f in dataclasses_fields(node):
        value = getattr(node, f)
        if isinstance(value, ast.Node):
            changes[f] = substitute(value, mapping)
        elif isinstance(value, tuple) and value and all(isinstance(v, ast.Node) for v in value):
            changes[f] = tuple(substitute(v, mapping) for v in value)
    return dataclasses.replace(node, **changes) if changes else node


def dataclasses_fields(node: ast.Node) -> list[str]:
    return [f.name for f in dataclasses.fields(node) if f.name != "span"]


def _product_of(nodes: list[ast.Node], span: ast.Span) -> ast.Node:
    if not nodes:
        return ast.Number(span, 1)
    out = nodes[0]
    for f in nodes[1:]:
        out = ast.BinOp(span, "*", out, f)
    return out


def _fresh(node: ast.Node, avoid: set[str]) -> list[str]:
    """Summation letters the arithmetic reader knows that ``node`` does not use."""
    from verifier.arith.elaborate import VARIABLES

    used = {n.text for n in ast.walk(node) if isinstance(n, ast.Name)} | avoid
    return [v for v in "jkldmni" if v in VARIABLES and v not in used]


class SumReader:
    """Sums over Z, theta-like one-sided sums, Lambert series and double sums."""

    def __init__(self, elaborator: Any, text: str) -> None:
        self.elaborator = elaborator
        self.text = text

    def read(self, node: ast.BigSum, src: str) -> ir.Expr | None:
        if node.kind == "pair":
            return self._double(node, src)
        if node.kind == "lattice":
            return self._lattice(node, src)
        for inner in ast.walk(node.body):
            if isinstance(inner, ast.Pochhammer) and inner.length is not None and mentions(inner.length, node.var):
                raise _fail(
                    "a sum whose terms contain a finite q-Pochhammer symbol (a;q)_n of symbolic length",
                    "state the product side of the identity, or the sum as a printed expansion + O(q^N)",
                    inner,
                )
        lambert = self._lambert(node)
        if lambert is not None:
            return self._double(lambert, src)
        factors = ast.factors(node.body)
        qs = [(i, q_exponent(f, node.var)) for i, f in enumerate(factors)]
        found = [(i, e) for i, e in qs if e is not None and mentions(factors[i], node.var)]
        if node.kind == "integers":
            if len(found) != 1:
                raise _fail(
                    "a sum over Z without a single factor q^{E(n)}",
                    "write \\sum_{n\\in\\mathbb Z} (-1)^n q^{n(3n-1)/2}, or w(n) q^{a n^2 + b n} as the summand",
                    node,
                )
        elif not found or set(found[0][1]) <= {0, 1}:
            return None  # a generating function sum_{n >= L} a(n) q^n
        i, e = found[0]
        if max(e) != 2 or e[2] <= 0:
            raise _fail(
                "a sum over the integers whose exponent is not a quadratic polynomial with positive leading term",
                "write q^{n^2}, q^{n(n+1)/2} or q^{n(3n-1)/2}",
                factors[i],
            )
        weights = [f for k, f in enumerate(factors) if k != i]
        lower = None
        if node.kind != "integers":
            if not isinstance(node.lower, ast.Number):
                raise _fail("a sum whose lower limit is not a number", "write \\sum_{n \\ge 0}", node)
            lower = node.lower.value
        alpha, beta, gamma = e.get(2, Fraction(0)), e.get(1, Fraction(0)), e.get(0, Fraction(0))
        sign, rest = sign_and_weight(weights, node.var)
        constants = [w for w in rest if not mentions(w, node.var)]
        rest = [w for w in rest if mentions(w, node.var)]
        factor = self.elaborator.expr(_product_of(constants, node.span), self.text) if constants else None
        if lower is None and not rest:
            p, t, shift, c = triple_product(alpha, beta, sign)

            el = self.elaborator
            out = product_expr(p, src, node, lambda c0, params: el.eta_expr(c0, params, src, node), Fraction(1, t))
            if c != 1:
                out = self.elaborator.mul(ir.Const(ir.Typ(Fraction(0)), str(c), Fraction(c)), out, src, node)
            out = shifted(out, shift + gamma, src)
            if any(a.key == SERIES_ONLY for a in ir.atoms_of(out)):
                # No eta quotient (f(q^6, q^10)): a combination of unary theta series may still be one.
                unary = self._unary(node, alpha, beta, lower, [w for w in weights if mentions(w, node.var)], src)
                if unary is not None:
                    out = shifted(unary, gamma, src)
        else:
            # Constant factors are multiplied in below (``factor``), so the weight is the rest.
            varying = [w for w in weights if mentions(w, node.var)]
            unary = self._unary(node, alpha, beta, lower, varying, src)
            out = unary if unary is not None else self._theta_like(node, alpha, beta, gamma, lower, varying, src)
            if unary is not None:
                out = shifted(out, gamma, src)
        return out if factor is None else self.elaborator.mul(factor, out, src, node)

    def _unary(
        self, node: ast.BigSum, alpha: Fraction, beta: Fraction, lower: int | None, weights: list[ast.Node], src: str
    ) -> ir.Expr | None:
        """The sum as a combination of unary theta series with quadratic characters, or None
        (docs/method.md#sums-over-z, #unary-theta)."""
        from verifier.arith.elaborate import ArithmeticError_, to_arith
        from verifier.arith.values import Values
        from verifier.elaborate.elaborator import _atom
        from verifier.elaborate.unary import decompose
        from verifier.forms import unary_theta
        from verifier.forms.registry import AtomInfo

        term: Any = None
        if weights:
            el = self.elaborator
            try:
                term = to_arith(_product_of(weights, node.span), self.text, el.definitions, el.matrices, lambda f: f)
            except ArithmeticError_:
                return None
        found = decompose(term, node.var, alpha, beta, lower, Values())
        if found is None:
            return None
        terms: list[ir.Expr] = []
        if found.constant:
            terms.append(ir.Const(ir.Typ(Fraction(0)), frac_text(found.constant), found.constant))
        for piece in found.pieces:
            info = AtomInfo(unary_theta.KEY, unary_theta.weight(piece.nu), params=(piece.kernel, piece.nu))
            atom: ir.Expr = _atom(info, piece.scale, src, node)
            if piece.coefficient != 1:
                c = ir.Const(ir.Typ(Fraction(0)), frac_text(piece.coefficient), piece.coefficient)
                atom = ir.Product(ir.Typ(atom.typ.weight, 0, atom.typ.level), src, c, atom)
            terms.append(atom)
        if not terms:
            return ir.Const(ir.Typ(Fraction(0)), "0", Fraction(0))
        out = terms[0]
        for more in terms[1:]:
            weight = max(w for w in (out.typ.weight, more.typ.weight) if w is not None)
            typ = ir.Typ(weight, 0, _lcm(out.typ.level, more.typ.level), mixed=True)
            out = ir.Sum(typ, src, out, more, 1)
        if len(terms) > 1 or found.constant:
            out = dataclasses.replace(out, typ=dataclasses.replace(out.typ, mixed=True))
        return shifted(out, found.shift, src)

    def _theta_like(
        self,
        node: ast.BigSum,
        alpha: Fraction,
        beta: Fraction,
        gamma: Fraction,
        lower: int | None,
        weights: list[ast.Node],
        src: str,
    ) -> ir.Expr:
        from verifier.arith.elaborate import ArithmeticError_, to_arith
        from verifier.arith.values import NotEvaluable, Values

        weight: Any = None
        if weights:
            el = self.elaborator
            try:
                weight = to_arith(_product_of(weights, node.span), self.text, el.definitions, el.matrices, lambda f: f)
                for n in (0, 1, -1, 2):
                    Values().value(weight, {node.var: n})
            except (ArithmeticError_, NotEvaluable, ZeroDivisionError, TypeError) as exc:
                raise _fail(
                    "a weight of a sum over Z that is not an arithmetic expression in the index",
                    "use (-1)^n, (2n+1), \\chi_D(n) or periodic values written with them",
                    node,
                ) from exc
        t = alpha.denominator * beta.denominator // math.gcd(alpha.denominator, beta.denominator)
        vertex = -beta / (2 * alpha)
        candidates = [math.floor(vertex), math.floor(vertex) + 1]
        if lower is not None:
            candidates = [max(c, lower) for c in candidates]
        low = min(alpha * n * n + beta * n for n in candidates)
        params = ("zsum", alpha * t, beta * t, lower, weight, node.var, low * t)
        return shifted(series_atom(params, src, Fraction(1, t)), low + gamma, src)

    def _lambert(self, node: ast.BigSum) -> ast.BigSum | None:
        """``sum_{n>=1} w(n) q^n/(1-q^n)`` as the double sum ``sum_{n,m>=1} w(n) q^{nm}``."""
        if node.kind not in ("at_least", "from") or node.upper is not None:
            return None
        factors = ast.factors(node.body)
        for k, f in enumerate(factors):
            if not (isinstance(f, ast.BinOp) and f.op == "/"):
                continue
            den = _linear_factor(f.right, node.var)
            if den is None or den[0] != 1 or den[1] != {1: Fraction(1)}:
                continue
            num = ast.factors(f.left)
            qn = [x for x in num if q_exponent(x, node.var) == {1: Fraction(1)}]
            if len(qn) != 1:
                continue
            other = _fresh(node.body, {node.var})[0]
            body = [*factors[:k], *[x for x in num if x is not qn[0]], *factors[k + 1 :]]
            span = node.span
            qnm = ast.Power(
                span, ast.Name(span, "q"), ast.BinOp(span, "*", ast.Name(span, node.var), ast.Name(span, other))
            )
            return ast.BigSum(span, "pair", node.var, node.lower, None, _product_of([*body, qnm], span), other)
        return None

    def _lattice(self, node: ast.BigSum, src: str) -> ir.Expr:
        """``sum_{x_1..x_r in Z} q^{Q(x)}``: the theta series of Q = sum_{i<=j} c_ij x_i x_j, with
        Gram matrix A_ii = 2 c_ii, A_ij = c_ij (Q(v) = v^T A v / 2), for a positive definite
        form with integral c_ij (docs/method.md#sums-over-z)."""
        names = (node.var, node.var2, *node.more)
        rank = len(names)
        factors = ast.factors(node.body)
        if len(factors) != 1 or not _is_q_power(factors[0]):
            raise _fail(
                f"a sum over Z^{rank} whose summand is not a single power q^{{Q}}",
                "write \\sum_{x,y\\in\\mathbb Z} q^{x^2+xy+y^2}, or define a Gram matrix and write \\Theta_A",
                node,
            )
        qf = factors[0]
        assert isinstance(qf, ast.Power)
        e = polyn_of(_exponent_node(qf.exponent, qf.span), names)
        if e is None or any(sum(k) != 2 for k in e):
            raise _fail(
                f"a sum over Z^{rank} whose exponent is not a quadratic form in {', '.join(names)}",
                "write q^{x^2+xy+y^2} (no linear or constant terms)",
                qf,
            )
        gram = [[0] * rank for _ in range(rank)]
        for powers, c in e.items():
            if c.denominator != 1:
                raise _fail(
                    f"a sum over Z^{rank} whose quadratic form has the coefficient {c}, not an integer",
                    "write a quadratic form with integral coefficients",
                    qf,
                )
            i, j = (k for k, p in enumerate(powers) for _ in range(p))
            if i == j:
                gram[i][i] = 2 * int(c)
            else:
                gram[i][j] = gram[j][i] = int(c)
        from verifier.elaborate.elaborator import _atom
        from verifier.forms.registry import AtomInfo
        from verifier.forms.theta import QuadraticForm

        form = QuadraticForm.from_rows(gram)
        if form.validate() is not None:
            raise _fail(
                f"a sum over Z^{rank} whose exponent is not a positive definite quadratic form",
                "write q^{Q} with Q positive definite (e.g. x^2+y^2+z^2)",
                qf,
            )
        return _atom(AtomInfo("theta", form.weight, params=(form.gram,)), Fraction(1), src, node)

    def _double(self, node: ast.BigSum, src: str) -> ir.Expr:
        """``sum_{n,m >= 1} w(n, m) q^{nm}`` = ``sum_N (sum_{d | N} w(d, N/d)) q^N``."""
        if not (isinstance(node.lower, ast.Number) and node.lower.value == 1):
            raise _fail("a double sum that does not start at n, m = 1", "write \\sum_{n,m \\ge 1}", node)
        factors = ast.factors(node.body)
        exps = [f for f in factors if _is_q_power(f)]
        if len(exps) != 1:
            raise _fail(
                "a double sum without a single factor q^{nm}",
                "write \\sum_{n,m \\ge 1} w(n) q^{nm}",
                node,
            )
        qf = exps[0]
        assert isinstance(qf, ast.Power)
        e = qf.exponent
        if not (
            isinstance(e, ast.BinOp)
            and e.op == "*"
            and {getattr(e.left, "text", ""), getattr(e.right, "text", "")} == {node.var, node.var2}
        ):
            raise _fail("a double sum whose exponent is not nm", "write \\sum_{n,m \\ge 1} w(n,m) q^{nm}", qf)
        total, divisor = _fresh(node.body, {node.var, node.var2})[:2]
        span = node.span
        n_total = ast.Name(span, total)
        d = ast.Name(span, divisor)
        weights = [f for f in factors if f is not qf]
        body = substitute(_product_of(weights, span), {node.var: d, node.var2: ast.BinOp(span, "/", n_total, d)})
        inner = ast.BigSum(span, "divides", divisor, n_total, None, body)
        outer = ast.BigSum(
            span,
            "at_least",
            total,
            ast.Number(span, 1),
            None,
            ast.BinOp(span, "*", inner, ast.Power(span, ast.Name(span, "q"), n_total)),
        )
        result: ir.Expr = self.elaborator.generating_sum(outer, self.text)
        return result


def frac_text(c: Fraction) -> str:
    return str(c.numerator) if c.denominator == 1 else f"{c.numerator}/{c.denominator}"


def _lcm(a: int, b: int) -> int:
    return a * b // math.gcd(a, b)


def _is_q_power(node: ast.Node) -> bool:
    return isinstance(node, ast.Power) and isinstance(node.base, ast.Name) and node.base.text == "q"


_NOT_A_NOME = frozenset("qnmdkljiepz")


def nome_letter(sides: tuple[ast.Node, ...], defined: set[str]) -> str | None:
    """The letter an author uses for q in a claim that never writes q (``\\prod (1 - x^n)``), or None.

    It must be a single letter that is never a summation index, never has an argument or is
    applied to one, is not a defined name, and is the base of a power somewhere; it must
    also be the only such letter.
    """
    names: set[str] = set()
    bases: set[str] = set()
    bad: set[str] = set(defined)
    for side in sides:
        for node in ast.walk(side):
            if isinstance(node, ast.Name):
                names.add(node.text)
                if node.arg is not None:
                    bad.add(node.text)
            elif isinstance(node, ast.Call):
                bad.add(node.name)
            elif isinstance(node, ast.BigSum | ast.BigProd):
                bad |= {node.var, getattr(node, "var2", "")}
            if isinstance(node, ast.Power) and isinstance(node.base, ast.Name):
                bases.add(node.base.text)
            if isinstance(node, ast.Power) and isinstance(node.exponent, ast.Node):
                bad |= {n.text for n in ast.walk(node.exponent) if isinstance(n, ast.Name)}
    if "q" in names:
        return None
    found = {x for x in bases if len(x) == 1 and x.isalpha() and x.islower() and x not in _NOT_A_NOME and x not in bad}
    return next(iter(found)) if len(found) == 1 else None

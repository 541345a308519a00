"""The claim AST: small frozen dataclasses, each with its span in the claim text.

Spans are ``(start, end)`` character offsets into the *normalised claim text* the
parser saw; :class:`verifier.scan.text.MappedText` turns them back into file, line and
column of the author's source.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

from verifier.limits import MAX_CONSTANT_BITS, TooLarge, check_bits, number_text, power_bits

Span = tuple[int, int]


# The overpartition function, written \overline{p}, \bar{p} or \bar p (grammar terminal OVERPARTITION).
PBAR = "\\pbar"


@dataclass(frozen=True)
class Node:
    """Base of every AST node."""

    span: Span


@dataclass(frozen=True)
class Number(Node):
    """A non-negative integer literal."""

    value: int


@dataclass(frozen=True)
class Decimal(Node):
    """A decimal literal such as 0.5: rejected by elaboration (not exact)."""

    text: str


@dataclass(frozen=True)
class Name(Node):
    """A symbol: ``E_4``, ``\\Delta``, ``j``, ``q`` or a user-defined name.

    ``arg`` is the argument written after it, normalised: ``None`` (none written),
    ``"tau"``, ``"2tau"`` (a multiple of tau), ``"z"`` or ``"q"``.
    """

    text: str
    arg: str | None = None


@dataclass(frozen=True)
class BinOp(Node):
    """``left op right`` with ``op`` one of ``+ - * /``."""

    op: str
    left: Node
    right: Node


@dataclass(frozen=True)
class Neg(Node):
    """Unary minus."""

    operand: Node


@dataclass(frozen=True)
class Power(Node):
    """``base^exponent``: a rational constant (``q^{1/24}``, ``E_4^2``), or an expression
    of summation variables (``(-1)^{n+d}``, ``q^n``)."""

    base: Node
    exponent: Fraction | Node


@dataclass(frozen=True)
class Prime(Node):
    """``f'``: the derivative D = q d/dq of ``operand``."""

    operand: Node


@dataclass(frozen=True)
class Bracket(Node):
    """The Rankin–Cohen bracket ``[left, right]_n``."""

    left: Node
    right: Node
    n: int


@dataclass(frozen=True)
class Call(Node):
    """``name(argument)``: an arithmetic function (``\\sigma_3(n)``) or, for a form, a product."""

    name: str
    name_span: Span
    argument: Node


@dataclass(frozen=True)
class KroneckerSymbol(Call):
    """``\\left(\\frac{D}{d}\\right)`` or ``\\left(\\frac{d}{p}\\right)`` read as the Kronecker symbol
    ``\\chi_{D}(d)`` (docs/method.md#characters); ``name`` is that ``\\chi_{D}``."""


@dataclass(frozen=True)
class BigSum(Node):
    """``\\sum`` over ``var``: ``kind`` is ``"from"`` (var = lower .. upper), ``"divides"``
    (var | target) or ``"at_least"`` (var >= lower); ``upper`` None means no upper limit.

    The q-series idiom adds (docs/method.md#sums-over-z): ``"integers"`` (var in Z),
    ``"lattice"`` (var, var2, *more in Z: a theta series of a quadratic form),
    ``"pair"`` (var, var2 >= lower), ``"between"`` (lower < var < upper, written with <),
    ``"between_closed"`` (lower <= var <= upper), ``"below"`` (var < upper),
    ``"divides_parity"`` (var | lower with var odd or even: ``parity``), ``"divides_step"``
    (var | lower with ``step`` | var, or with step not dividing var when ``parity`` is ``"not"``),
    ``"split"`` (var + var2 = upper with var, var2 >= lower) and ``"linear"`` (c1 var + c2 var2 =
    upper, ``coefficients``)."""

    kind: str
    var: str
    lower: Node | None
    upper: Node | None
    body: Node
    var2: str = ""
    parity: str = ""
    coefficients: tuple[int, int] = (1, 1)
    more: tuple[str, ...] = ()  # the third and further variables of a lattice sum
    step: int = 0  # the M of a condition M | var or M does not divide var ("divides_step")


@dataclass(frozen=True)
class BigProd(Node):
    """``\\prod`` over ``var`` with the same index kinds as :class:`BigSum`."""

    kind: str
    var: str
    lower: Node | None
    upper: Node | None
    body: Node


@dataclass(frozen=True)
class Pochhammer(Node):
    """The q-Pochhammer symbol ``(a_1, ..., a_k; base)_length``; ``length`` None is infinity."""

    bases: tuple[Node, ...]
    nome: Node
    length: Node | None


@dataclass(frozen=True)
class Dots(Node):
    """``\\cdots`` in a printed expansion."""


@dataclass(frozen=True)
class BigO(Node):
    """``O(q^m)`` in a printed expansion; ``inner`` must be a power of q."""

    inner: Node


@dataclass(frozen=True)
class Relation(Node):
    """``side_0 rel_0 side_1 rel_1 side_2 ...``; ``rels`` are ``"="`` or ``"!="``."""

    sides: tuple[Node, ...]
    rels: tuple[str, ...]
    domain: str | None = None  # a trailing "for all tau in H": where the functions live, not a claim


@dataclass(frozen=True)
class SpaceClaim(Node):
    """A claim about a space of forms (docs/method.md#claim-membership, #claim-dimension, #claim-eigenform).

    ``kind`` is ``membership`` (``form \\in space``), ``dimension`` (``\\dim space = value``) or
    ``eigenform`` (``form \\text{ is a normalised eigenform}``).  ``space`` is the space as
    written (read by :func:`verifier.parse.spaces.parse_space`), ``space_at`` its offset.
    """

    kind: str
    form: Node | None = None
    space: str | None = None
    space_at: int = 0
    value: int | None = None


@dataclass(frozen=True)
class NClass:
    """A class of n written after a claim (docs/method.md#classes-of-n): ``n`` is in it when
    ``n mod modulus`` is one of ``residues``.  ``(n \\text{ odd})`` is (2, {1}), ``(n, 5) = 1`` is
    (5, {1, 2, 3, 4}), ``(\\frac{n}{7}) = -1`` is (7, {3, 5, 6}), ``n \\equiv 1 \\pmod 8`` is (8, {1}).
    ``text`` says it as the author did, normalised (``n odd``, ``n = 1 mod 8``).
    """

    var: str
    modulus: int
    residues: frozenset[int]
    text: str

    def __contains__(self, n: object) -> bool:
        return isinstance(n, int) and n % self.modulus in self.residues

    def meet(self, other: NClass) -> NClass:
        """Both classes at once (the moduli combined by their least common multiple)."""
        import math

        m = math.lcm(self.modulus, other.modulus)
        kept = frozenset(r for r in range(m) if r in self and r in other)
        return NClass(self.var, m, kept, f"{self.text} and {other.text}")


@dataclass(frozen=True)
class Statement(Node):
    """One relation of a row with its qualifiers (docs/method.md#layout).

    ``modulus`` comes from ``\\pmod{M}``; ``start`` is ``(variable, n0)`` from ``(n \\ge n0)``;
    ``iff`` is set on both halves of ``A = B \\iff C = D``: the equivalence itself is the author's.
    ``residues`` is ``(t, values)`` from a residue set ``(t \\in \\{3, 5, 6\\})`` after a
    progression congruence (docs/method.md#progressions), values in the author's order.
    ``n_class`` is the class of n the claim is stated on (``(n \\text{ odd})``, ``(n, 5) = 1``, ...).
    """

    relation: Relation | SpaceClaim
    modulus: int | None = None
    start: tuple[str, int] | None = None
    iff: bool = False
    residues: tuple[str, tuple[int, ...]] | None = None
    n_class: NClass | None = None


@dataclass(frozen=True)
class Row(Node):
    """The statements of one row of a display, in order."""

    statements: tuple[Statement, ...]


@dataclass(frozen=True)
class Definition(Node):
    """``NAME = expr`` or ``NAME(\\tau) = expr`` from a define tag.

    ``NAME(x) = expr`` defines a function of a variable: ``arg`` is then the variable, and
    ``exponential`` says that the body is ``e^{2\\pi i x}`` (docs/method.md#exponential-notation).
    """

    name: str
    name_span: Span
    body: Node
    arg: str | None = None
    exponential: bool = False


def factors(node: Node) -> list[Node]:
    """The factors of a product chain ``a * b * c``, in order (iteratively: long products are read)."""
    out: list[Node] = []
    stack = [node]
    while stack:
        n = stack.pop()
        if isinstance(n, BinOp) and n.op == "*":
            stack += [n.right, n.left]
        else:
            out.append(n)
    return out


def subscript(name: str) -> tuple[str, str] | None:
    """A subscripted name as ``(head, subscript)``, or None without a subscript.

    The NAME terminal of ``grammar/claim.lark`` is a letter or a control word, then ``_`` and
    one character or a braced word: ``f_{12}`` -> ``("f", "12")``, ``\\eta_3`` ->
    ``("\\eta", "3")``, ``a_{C}`` -> ``("a", "C")``.
    """
    head, underscore, sub = name.replace(" ", "").partition("_")
    if not underscore or not head:
        return None
    if sub.startswith("{") and sub.endswith("}"):
        sub = sub[1:-1]
    elif len(sub) != 1:
        return None
    return (head, sub) if sub else None


def integer_subscript(name: str, head: str) -> int | None:
    """``k`` of ``head_k`` / ``head_{k}`` with k written in digits (``f_{12}`` -> 12), else None."""
    parts = subscript(name)
    if parts is None or parts[0] != head or not parts[1].isdigit() or not parts[1].isascii():
        return None
    return int(parts[1])


def walk(node: Node) -> list[Node]:
    """All nodes of a tree, parents before children."""
    out: list[Node] = [node]
    for child in children(node):
        out.extend(walk(child))
    return out


def children(node: Node) -> tuple[Node, ...]:
    """The direct children of ``node``."""
    if isinstance(node, BinOp | Bracket):
        return (node.left, node.right)
    if isinstance(node, Prime):
        return (node.operand,)
    if isinstance(node, Call):
        return (node.argument,)
    if isinstance(node, BigSum | BigProd):
        return tuple(n for n in (node.lower, node.upper, node.body) if n is not None)
    if isinstance(node, Pochhammer):
        return (*node.bases, node.nome, *((node.length,) if node.length is not None else ()))
    if isinstance(node, Neg):
        return (node.operand,)
    if isinstance(node, Power):
        return (node.base,)
    if isinstance(node, BigO):
        return (node.inner,)
    if isinstance(node, Relation):
        return node.sides
    if isinstance(node, Definition):
        return (node.body,)
    if isinstance(node, Row):
        return node.statements
    if isinstance(node, Statement):
        return (node.relation,)
    if isinstance(node, Definitions):
        return node.items
    return ()


def constant_value(node: Node) -> Fraction | None:
    """The value of a node made only of numbers (3, 441/691, \\frac{1}{24}, 691^{-1}), else None.

    Raises ZeroDivisionError for a zero denominator, and :class:`verifier.limits.TooLarge`
    before building a constant of more than ``MAX_CONSTANT_BITS`` bits (a tower such as
    2^{2^{2^{2^{2}}}}).  The walk is iterative, so a sum of any length is folded.
    """
    results: list[Fraction | None] = []
    stack: list[tuple[Node, bool]] = [(node, False)]
    while stack:
        n, ready = stack.pop()
        if isinstance(n, Number):
            results.append(Fraction(n.value))
        elif isinstance(n, Neg):
            if not ready:
                stack += [(n, True), (n.operand, False)]
                continue
            inner = results.pop()
            results.append(None if inner is None else -inner)
        elif isinstance(n, BinOp):
            if not ready:
                stack += [(n, True), (n.right, False), (n.left, False)]
                continue
            b, a = results.pop(), results.pop()
            results.append(None if a is None or b is None else _bounded(_apply(n.op, a, b)))
        elif isinstance(n, Power) and isinstance(n.exponent, Fraction) and n.exponent.denominator == 1:
            if not ready:
                stack += [(n, True), (n.base, False)]
                continue
            base = results.pop()
            results.append(None if base is None else _power(base, int(n.exponent)))
        else:
            results.append(None)
    return results[0]


def _apply(op: str, a: Fraction, b: Fraction) -> Fraction:
    if op == "/":
        return a / b
    return a + b if op == "+" else a - b if op == "-" else a * b


def _bounded(x: Fraction) -> Fraction:
    check_bits(x.numerator, "a constant")
    check_bits(x.denominator, "a constant")
    return x


def _power(base: Fraction, exponent: int) -> Fraction:
    if base == 0:
        if exponent < 0:
            raise ZeroDivisionError("0 to a negative power")
        return Fraction(1 if exponent == 0 else 0)
    if abs(base.numerator) == base.denominator:  # 1 and -1: no growth
        return base ** (exponent % 2)
    bits = max(abs(base.numerator).bit_length(), base.denominator.bit_length())
    if power_bits(bits, exponent) > MAX_CONSTANT_BITS:
        raise TooLarge(f"a power of {number_text(base)} to the {number_text(exponent)} is too large to compute")
    return base**exponent


@dataclass(frozen=True)
class Definitions(Node):
    """The author's definitions in one row (docs/method.md#author-definitions)."""

    items: tuple[Definition, ...]

"""The claim AST: small frozen dataclasses, each with its span in the claim text.

Spans are ``(start, end)`` character offsets into the *normalised claim text* the
parser saw; :class:`verifier.scan.text.MappedText` turns them back into file, line and
column of the author's source.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

Span = tuple[int, int]


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
class BigSum(Node):
    """``\\sum`` over ``var``: ``kind`` is ``"from"`` (var = lower .. upper), ``"divides"``
    (var | target) or ``"at_least"`` (var >= lower); ``upper`` None means no upper limit."""

    kind: str
    var: str
    lower: Node | None
    upper: Node | None
    body: Node


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


@dataclass(frozen=True)
class Definition(Node):
    """``NAME = expr`` or ``NAME(\\tau) = expr`` from a define tag."""

    name: str
    name_span: Span
    body: Node
    arg: str | None = None


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
    if isinstance(node, BigSum):
        return tuple(n for n in (node.lower, node.upper, node.body) if n is not None)
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
    return ()


def constant_value(node: Node) -> Fraction | None:
    """The value of a node made only of numbers (3, 441/691, \\frac{1}{24}, 691^{-1}), else None.

    Raises ZeroDivisionError for a zero denominator.
    """
    if isinstance(node, Number):
        return Fraction(node.value)
    if isinstance(node, Neg):
        inner = constant_value(node.operand)
        return None if inner is None else -inner
    if isinstance(node, BinOp):
        a, b = constant_value(node.left), constant_value(node.right)
        if a is None or b is None:
            return None
        if node.op == "/":
            return a / b
        return a + b if node.op == "+" else a - b if node.op == "-" else a * b
    if isinstance(node, Power) and isinstance(node.exponent, Fraction) and node.exponent.denominator == 1:
        base = constant_value(node.base)
        return None if base is None else base ** int(node.exponent)
    return None

"""The shape of a claim's tree: long sums and products balanced, nesting bounded.

The parser builds ``a + b + c + ...`` as a left-nested chain, one level per term.  A
machine-made sum of 10,000 terms would then be 10,000 levels deep, past what any
recursive walk can follow.  Sums and products are associative, so a chain of more than
:data:`BALANCE_FROM` terms is rebuilt as a balanced tree of the same terms in the same
order (depth about log2 of the length); shorter chains are left exactly as written.
Whatever nesting remains (brackets inside powers inside fractions ...) is measured, and
a tree nested deeper than :data:`verifier.limits.MAX_NESTING` is refused as too large.
"""

from __future__ import annotations

import dataclasses

from verifier.limits import MAX_NESTING, TooLarge
from verifier.parse import ast

BALANCE_FROM = 32  # chains of at most this many terms keep the parser's shape


def _chain_op(node: ast.Node) -> str | None:
    if isinstance(node, ast.BinOp):
        if node.op in "+-":
            return "+"
        if node.op == "*":
            return "*"
    return None


def nesting(node: ast.Node) -> int:
    """Depth of ``node``'s tree where a chain of sums (or of products) counts as one level."""
    return _measure(node)[0]


def _measure(node: ast.Node) -> tuple[int, int]:
    """(nesting depth, number of terms of the longest chain of sums or of products), in one walk."""
    deepest = longest = 0
    # (node, depth, the running count of operators of the chain the node belongs to)
    stack: list[tuple[ast.Node, int, list[int] | None]] = [(node, 1, None)]
    while stack:
        n, depth, chain = stack.pop()
        if depth > deepest:
            deepest = depth
        op = _chain_op(n)
        if op is not None:
            if chain is None:
                chain = [0]
            chain[0] += 1
            if chain[0] + 1 > longest:
                longest = chain[0] + 1
        for child in _all_children(n):
            if op is not None and _chain_op(child) == op:
                stack.append((child, depth, chain))
            else:
                stack.append((child, depth + 1, None))
    return deepest, longest


def _all_children(node: ast.Node) -> tuple[ast.Node, ...]:
    kids = ast.children(node)
    if isinstance(node, ast.Power) and isinstance(node.exponent, ast.Node):
        kids = (*kids, node.exponent)
    return kids


def _terms(node: ast.Node) -> list[tuple[int, ast.Node]]:
    """The signed terms of a sum chain (or the factors of a product chain), iteratively."""
    op = _chain_op(node)
    out: list[tuple[int, ast.Node]] = []
    stack: list[tuple[int, ast.Node]] = [(1, node)]
    while stack:
        sign, n = stack.pop()
        if isinstance(n, ast.BinOp) and _chain_op(n) == op:
            flip = -1 if n.op == "-" else 1
            stack.append((sign * flip, n.right))
            stack.append((sign, n.left))
        else:
            out.append((sign, n))
    return out


def balance(node: ast.Node) -> ast.Node:
    """``node`` with every chain longer than :data:`BALANCE_FROM` balanced (raises TooLarge if too deep)."""
    depth, longest = _measure(node)
    if depth > MAX_NESTING:
        raise TooLarge(f"the claim is nested {depth} levels deep (the limit is {MAX_NESTING})")
    # Without a chain longer than BALANCE_FROM, _rebuild gives back the very same tree.
    return _rebuild(node) if longest > BALANCE_FROM else node


def _rebuild(node: ast.Node) -> ast.Node:
    # Recursion here follows only the nesting between chains, bounded by MAX_NESTING.
    op = _chain_op(node)
    if op is not None:
        terms = _terms(node)
        rebuilt = [(s, _rebuild(t)) for s, t in terms]
        if len(terms) > BALANCE_FROM:
            return _balanced(rebuilt, op)
        if all(a[1] is b[1] for a, b in zip(rebuilt, terms, strict=True)):
            return node
        return _left_nested(rebuilt, op)
    changes: dict[str, object] = {}
    for f in dataclasses.fields(node):
        value = getattr(node, f.name)
        if isinstance(value, ast.Node):
            new = _rebuild(value)
            if new is not value:
                changes[f.name] = new
        elif isinstance(value, tuple) and value and all(isinstance(v, ast.Node) for v in value):
            new_tuple = tuple(_rebuild(v) for v in value)
            if any(a is not b for a, b in zip(new_tuple, value, strict=True)):
                changes[f.name] = new_tuple
    return dataclasses.replace(node, **changes) if changes else node  # type: ignore[arg-type]


def _balanced(terms: list[tuple[int, ast.Node]], op: str) -> ast.Node:
    """The terms combined as a balanced tree; the first term's sign is +1."""
    if len(terms) == 1:
        return terms[0][1]
    mid = len(terms) // 2
    left = _balanced(terms[:mid], op)
    rest = terms[mid:]
    if op == "*":
        right = _balanced(rest, op)
        return ast.BinOp((left.span[0], right.span[1]), "*", left, right)
    sign = rest[0][0]
    right = _balanced([(s * sign, t) for s, t in rest], op)
    return ast.BinOp((left.span[0], right.span[1]), "+" if sign > 0 else "-", left, right)


def _left_nested(terms: list[tuple[int, ast.Node]], op: str) -> ast.Node:
    """The terms combined left to right, as the parser nests a short chain."""
    acc = terms[0][1]
    for sign, term in terms[1:]:
        symbol = "*" if op == "*" else ("+" if sign > 0 else "-")
        acc = ast.BinOp((acc.span[0], term.span[1]), symbol, acc, term)
    return acc

"""Suggested corrections for refuted linear claims.

Each summand c_i T_i of both sides (c_i its leading rational coefficient, 1 when none is
written) gets an unknown in place of c_i, the first one on the left kept fixed so that 0 is
not a solution; the linear system of :mod:`verifier.prove.solve` then says whether some
other coefficients make the identity true.  Only a unique solution is offered.
"""

from __future__ import annotations

from collections.abc import Callable
from fractions import Fraction

from verifier.parse import ast
from verifier.prove.prover import Prover, _frac_str
from verifier.prove.solve import Build, decide_solve

PREFIX = "\u00a7coef"  # names of the unknowns; no LaTeX name can start with this character


def numeric_value(node: ast.Node) -> Fraction | None:
    """The value of a node made only of numbers (3, \\frac{441}{691}, 691^{-1}); None otherwise."""
    try:
        return ast.constant_value(node)
    except ZeroDivisionError:
        return None


def _split(term: ast.Node) -> tuple[Fraction, ast.Node | None]:
    """(coefficient, rest) of a summand; rest None for a constant term."""
    value = numeric_value(term)
    if value is not None:
        return value, None
    if isinstance(term, ast.BinOp) and term.op == "*":
        c = numeric_value(term.left)
        if c is not None:
            return c, term.right
    if isinstance(term, ast.BinOp) and term.op == "/":
        c = numeric_value(term.right)
        if c is not None and c != 0:
            inner_c, inner_rest = _split(term.left)
            return inner_c / c, inner_rest
    return Fraction(1), term


def _summands(node: ast.Node, sign: int = 1) -> list[tuple[int, ast.Node]]:
    if isinstance(node, ast.BinOp) and node.op in "+-":
        right = _summands(node.right, sign if node.op == "+" else -sign)
        return _summands(node.left, sign) + right
    if isinstance(node, ast.Neg):
        return _summands(node.operand, -sign)
    return [(sign, node)]


def templated(side: ast.Node, first_index: int) -> tuple[ast.Node, list[tuple[str, Fraction]]]:
    """The side with every coefficient replaced by an unknown (numbered from first_index)."""
    pieces: ast.Node | None = None
    unknowns: list[tuple[str, Fraction]] = []
    for i, (sign, term) in enumerate(_summands(side)):
        c, rest = _split(term)
        name = f"{PREFIX}{first_index + i}"
        unknowns.append((name, sign * c))
        coef = ast.Name(term.span, name)
        piece: ast.Node = coef if rest is None else ast.BinOp(term.span, "*", coef, rest)
        pieces = piece if pieces is None else ast.BinOp(side.span, "+", pieces, piece)
    assert pieces is not None
    return pieces, unknowns


def suggestion(
    prover: Prover,
    left: ast.Node,
    right: ast.Node,
    make_build: Callable[[ast.Node, ast.Node, dict[str, Fraction]], Build],
) -> str | None:
    """A corrected claim, when exactly one choice of the other coefficients makes it true."""
    lt, lu = templated(left, 0)
    rt, ru = templated(right, len(lu))
    fixed_name, fixed_value = lu[0]
    unknowns = [n for n, _ in lu[1:] + ru]
    if not unknowns or len(unknowns) > 12:
        return None
    build = make_build(lt, rt, {fixed_name: fixed_value})
    outcome = decide_solve(prover, build, unknowns)
    if outcome.verdict != "proved" or "family" in outcome.message:
        return None
    solved = {c["unknown"]: Fraction(c["value"]) for c in outcome.components}
    written = dict(lu[1:] + ru)
    changes = [(written[n], solved[n]) for n in unknowns if solved[n] != written[n]]
    if not changes or len(changes) > 3:
        return None
    return "holds with " + "; ".join(f"{_frac_str(new)} in place of {_frac_str(old)}" for old, new in changes)

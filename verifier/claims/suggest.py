"""Suggested corrections for refuted linear claims.

Each summand c_i T_i of both sides (c_i its leading rational coefficient, 1 when none is
written) gets an unknown in place of c_i, the first one on the left kept fixed so that 0 is
not a solution; the linear system of :mod:`verifier.claims.solve` then says whether some
other coefficients make the identity true.  Only a unique solution is offered.
"""

from __future__ import annotations

from collections.abc import Callable
from fractions import Fraction

from verifier.claims.sides import Build
from verifier.claims.solve import decide_solve
from verifier.parse import ast
from verifier.prove.prover import Prover, _frac_str

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
    """A corrected claim, when exactly one choice of the other coefficients makes it true.

    The first coefficient of the left side is kept fixed, then that of the right side; of
    the two corrections the one that changes fewer coefficients wins, and on a tie the one
    that changes a number the author wrote (a wrong 1/864 in \\frac{1}{864}(E_4^3 - E_6^2))
    rather than an unwritten factor 1.
    """
    lt, lu = templated(left, 0)
    rt, ru = templated(right, len(lu))
    options = []
    for fixed_index in (0, len(lu)):
        found = _solve_fixing(prover, lt, rt, lu + ru, fixed_index, make_build)
        if found is not None:
            options.append(found)
    if not options:
        return None
    changes = min(options, key=lambda ch: (len(ch), sum(old == 1 for old, _ in ch)))
    return "holds with " + "; ".join(f"{_frac_str(new)} in place of {_frac_str(old)}" for old, new in changes)


def _solve_fixing(
    prover: Prover,
    lt: ast.Node,
    rt: ast.Node,
    written: list[tuple[str, Fraction]],
    fixed_index: int,
    make_build: Callable[[ast.Node, ast.Node, dict[str, Fraction]], Build],
) -> list[tuple[Fraction, Fraction]] | None:
    """The changed coefficients (old, new) with one coefficient kept as written, or None."""
    if fixed_index >= len(written):
        return None
    fixed_name, fixed_value = written[fixed_index]
    if fixed_value == 0:
        return None
    unknowns = [n for i, (n, _) in enumerate(written) if i != fixed_index]
    if not unknowns or len(unknowns) > 12:
        return None
    build = make_build(lt, rt, {fixed_name: fixed_value})
    outcome = decide_solve(prover, build, unknowns, with_certificate=False)
    if outcome.verdict != "proved" or "family" in outcome.message:
        return None
    solved = {c["unknown"]: Fraction(c["value"]) for c in outcome.components}
    values = dict(written)
    changes = [(values[n], solved[n]) for n in unknowns if solved[n] != values[n]]
    if not changes or len(changes) > 3:
        return None
    return changes

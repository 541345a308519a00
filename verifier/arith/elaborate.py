"""From the claim AST to arithmetic expressions (:mod:`verifier.arith.terms`).

Recognised functions: ``\\sigma(n)``, ``\\sigma_k(n)``, ``\\tau(n)`` (Ramanujan's function),
``r_s(n)`` (representations as a sum of s squares), ``r_Q(n)`` (by a defined Gram matrix Q),
``p(n)`` (partitions), ``a_F(n)``/``c_F(n)`` (coefficients of a defined form F),
``\\varphi(n)``, ``\\mu(n)`` and ``\\chi_D(n)`` (the Kronecker symbol (D/n)); single letters are
variables; sums ``\\sum_{m=a}^{b}`` and ``\\sum_{d \\mid n}``.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from fractions import Fraction
from typing import Any

from verifier.arith import terms as t
from verifier.parse import ast

_SIGMA = re.compile(r"^\\sigma(?:_(?:\{\s*(\d+)\s*\}|(\d)))?$")
_R = re.compile(r"^r_(?:\{\s*(\w+)\s*\}|(\w))$")
_COEF = re.compile(r"^[ac]_(?:\{\s*(\\?\w+)\s*\}|(\w))$")
_CHI = re.compile(r"^\\chi_(?:\{\s*(-?\d+)\s*\}|(\d))$")
VARIABLES = frozenset("nmdklji")


class ArithmeticError_(Exception):
    """The expression is not an arithmetic expression qreferee knows; carries the span."""

    def __init__(self, message: str, span: ast.Span, hint: str = "") -> None:
        super().__init__(message)
        self.span = span
        self.hint = hint


def function_kind(name: str, forms: dict[str, Any], matrices: dict[str, Any]) -> tuple[str, int | None, Any] | None:
    """What ``name(...)`` is as an arithmetic function, or None."""
    name = name.replace(" ", "")
    m = _SIGMA.match(name)
    if m:
        return ("sigma", int(m.group(1) or m.group(2) or 1), None)
    if name == "\\tau":
        return ("tau", None, None)
    m = _R.match(name)
    if m:
        sub = m.group(1) or m.group(2)
        if sub.isdigit():
            return ("r", int(sub), None)
        if sub in matrices:
            return ("rQ", None, matrices[sub])
        return None
    if name == "p":
        return ("p", None, None)
    if name == "\\pbar":  # \overline{p}, the overpartitions (the scanner spells it \pbar)
        return ("pbar", None, None)
    if name in ("\\varphi", "\\phi"):
        return ("phi", None, None)
    if name == "\\mu":
        return ("mu", None, None)
    m = _CHI.match(name)
    if m:
        return ("chi", int(m.group(1) or m.group(2)), None)
    m = _COEF.match(name)
    if m:
        sub = (m.group(1) or m.group(2)).lstrip("\\")
        for key in (sub, "\\" + sub):
            if key in forms:
                return ("coef", None, forms[key])
    return None


def uses_arithmetic(node: ast.Node, forms: dict[str, Any], matrices: dict[str, Any]) -> bool:
    """Whether a claim's AST contains arithmetic functions or finite sums (outside the
    generating-function sums ``\\sum_{n \\ge 1} a(n) q^n``, which are forms)."""
    if isinstance(node, ast.BigSum) and node.kind in ("at_least", "integers"):
        # A sum over n >= L or over Z is a q-series; a Kronecker symbol in its index is its weight.
        return False
    if isinstance(node, ast.Call) and function_kind(node.name, forms, matrices) is not None:
        return True
    if isinstance(node, ast.BigSum) and node.kind not in ("at_least", "integers", "pair", "lattice"):
        return True
    return any(uses_arithmetic(child, forms, matrices) for child in ast.children(node))


def _is_product_call(node: ast.Node, forms: dict[str, Any], matrices: dict[str, Any]) -> bool:
    return isinstance(node, ast.Call) and function_kind(node.name, forms, matrices) is None and node.name in VARIABLES


def to_arith(
    node: ast.Node, text: str, forms: dict[str, Any], matrices: dict[str, Any], form_of: Callable[[Any], Any]
) -> t.A:
    """Translate an AST node; raises :class:`ArithmeticError_`."""
    src = text[node.span[0] : node.span[1]]

    def go(n: ast.Node) -> t.A:
        return to_arith(n, text, forms, matrices, form_of)

    if isinstance(node, ast.Number):
        return t.Num(src, Fraction(node.value))
    if isinstance(node, ast.Name):
        if node.arg is None and len(node.text) == 1 and node.text in VARIABLES:
            return t.Var(src, node.text)
        raise ArithmeticError_(
            f"{node.text} is not an arithmetic function or a variable here",
            node.span,
            "write sigma_k(n), tau(n), r_s(n), p(n), a_F(n) for a defined form F, or a variable",
        )
    if isinstance(node, ast.Call) and function_kind(node.name, forms, matrices) is None and node.name in VARIABLES:
        # n(5 sigma_3(n) - ...) and d (n/d): a variable times a bracket.
        return t.Bin(src, "*", t.Var(node.name, node.name), go(node.argument))
    if isinstance(node, ast.Call):
        kind = function_kind(node.name, forms, matrices)
        if kind is None:
            raise ArithmeticError_(f"unknown arithmetic function {node.name}", node.name_span)
        name, index, form = kind
        if name == "sigma" and index is not None and index < 0:
            raise ArithmeticError_("sigma_k needs k >= 0", node.name_span)
        return t.Fun(src, name, index, go(node.argument), form_of(form) if form is not None else None)
    if isinstance(node, ast.Neg):
        return t.Bin(src, "*", t.Num("-1", Fraction(-1)), go(node.operand))
    if isinstance(node, ast.BinOp):
        return t.Bin(src, node.op, go(node.left), go(node.right))
    if isinstance(node, ast.Power) and _is_product_call(node.base, forms, matrices):
        # d (n/d)^2 parses as a call raised to the power; in LaTeX the power is on the bracket.
        assert isinstance(node.base, ast.Call)
        inner = ast.Power(node.span, node.base.argument, node.exponent)
        return t.Bin(src, "*", t.Var(node.base.name, node.base.name), go(inner))
    if isinstance(node, ast.Power):
        base = go(node.base)
        if isinstance(node.exponent, Fraction):
            if node.exponent.denominator != 1 or node.exponent < 0:
                raise ArithmeticError_("powers in arithmetic expressions are non-negative integers", node.span)
            return t.Pow(src, base, t.Num(str(node.exponent), node.exponent))
        return t.Pow(src, base, go(node.exponent))
    if isinstance(node, ast.BigSum) and node.kind not in ("at_least", "from", "divides"):
        return go(_desugar_range(node, forms, matrices))
    if isinstance(node, ast.BigSum):
        if node.kind == "at_least":
            raise ArithmeticError_(
                "an infinite sum is a generating function; it needs q^n in its body and a form on the other side",
                node.span,
            )
        assert node.lower is not None
        upper = go(node.upper) if node.upper is not None else None
        if node.kind == "from" and upper is None:
            raise ArithmeticError_("a sum from m = a needs an upper limit", node.span)
        return t.Sum(src, node.kind, node.var, go(node.lower), upper, go(node.body))
    raise ArithmeticError_("this construction has no arithmetic meaning", node.span)


# Functions that vanish at 0, at negative and at non-integral arguments (sigma_k(x) = 0 unless x is a
# positive integer, and the same for Ramanujan's tau): summing them over a longer range adds nothing.
_VANISHING = frozenset({"sigma", "tau"})


def _only_inside_vanishing(node: ast.Node, var: str, forms: dict[str, Any], matrices: dict[str, Any]) -> bool:
    """Whether every occurrence of ``var`` in ``node`` is inside the argument of sigma_k or tau."""
    if isinstance(node, ast.Call):
        kind = function_kind(node.name, forms, matrices)
        if kind is not None and kind[0] in _VANISHING:
            return True
        if node.name == var:
            return False
    if isinstance(node, ast.Name):
        return node.text != var
    if isinstance(node, ast.Power) and isinstance(node.exponent, ast.Node):
        if not _only_inside_vanishing(node.exponent, var, forms, matrices):
            return False
    return all(_only_inside_vanishing(c, var, forms, matrices) for c in ast.children(node))


def _desugar_range(node: ast.BigSum, forms: dict[str, Any], matrices: dict[str, Any]) -> ast.Node:
    """A sum whose range is written as a condition, as a sum over m = a..b or d | n (docs/method.md#sums-over-z)."""
    from verifier.elaborate.idiom import substitute

    sp = node.span
    if node.var not in VARIABLES:
        # \sum_{a+b=n}: summation letters outside n, m, d, k, l, j, i are renamed to a free one.
        used = {x.text for x in ast.walk(node) if isinstance(x, ast.Name)} | {node.var2}
        fresh = next((v for v in "mkjlid" if v not in used), None)
        if fresh is None:
            raise ArithmeticError_(f"cannot rename the summation variable {node.var}", node.span)
        import dataclasses

        node = dataclasses.replace(node, var=fresh, body=substitute(node.body, {node.var: ast.Name(sp, fresh)}))

    def num(v: int) -> ast.Node:
        return ast.Number(sp, v) if v >= 0 else ast.Neg(sp, ast.Number(sp, -v))

    def plus(a: ast.Node, c: int) -> ast.Node:
        if c == 0:
            return a
        return ast.BinOp(sp, "+" if c > 0 else "-", a, ast.Number(sp, abs(c)))

    body = node.body
    if node.kind in ("between", "between_closed"):
        assert node.lower is not None and node.upper is not None
        inner = 1 if node.kind == "between" else 0
        lower = constant_lower(node.lower) + inner
        return ast.BigSum(sp, "from", node.var, num(lower), plus(node.upper, -inner), body)
    if node.kind == "below":
        assert node.upper is not None
        if not _only_inside_vanishing(body, node.var, forms, matrices):
            raise ArithmeticError_(
                f"the sum over {node.var} < ... has no lower limit, and its terms need not vanish at {node.var} <= 0",
                node.span,
                f"write \\sum_{{0<{node.var}<n}} or \\sum_{{{node.var}=1}}^{{n-1}}",
            )
        return ast.BigSum(sp, "from", node.var, num(1), plus(node.upper, -1), body)
    if node.kind == "divides_parity":
        # [d odd] = (1 - (-1)^d)/2, [d even] = (1 + (-1)^d)/2, as two divisor sums with signs.
        sign = ast.Power(sp, ast.Neg(sp, ast.Number(sp, 1)), ast.Name(sp, node.var))
        op = "-" if node.parity == "odd" else "+"
        plain = ast.BigSum(sp, "divides", node.var, node.lower, None, body)
        signed = ast.BigSum(sp, "divides", node.var, node.lower, None, ast.BinOp(sp, "*", sign, body))
        return ast.BinOp(sp, "/", ast.BinOp(sp, op, plain, signed), ast.Number(sp, 2))
    if node.kind == "divides_step":
        # sum_{d | n, M | d} g(d) = sum_{e | n/M} g(M e) (empty unless M | n); M not dividing d: the rest.
        assert node.lower is not None
        var = ast.Name(sp, node.var)
        multiples = ast.BigSum(
            sp,
            "divides",
            node.var,
            ast.BinOp(sp, "/", node.lower, ast.Number(sp, node.step)),
            None,
            substitute(body, {node.var: ast.BinOp(sp, "*", ast.Number(sp, node.step), var)}),
        )
        if node.parity != "not":
            return multiples
        return ast.BinOp(sp, "-", ast.BigSum(sp, "divides", node.var, node.lower, None, body), multiples)
    if node.kind == "split":
        assert node.lower is not None and node.upper is not None
        low = constant_lower(node.lower)
        other = ast.BinOp(sp, "-", node.upper, ast.Name(sp, node.var))
        return ast.BigSum(sp, "from", node.var, num(low), plus(node.upper, -low), substitute(body, {node.var2: other}))
    if node.kind == "linear":
        assert node.upper is not None
        c1, c2 = node.coefficients
        if not _only_inside_vanishing(body, node.var2, forms, matrices):
            raise ArithmeticError_(
                f"{node.var2} is used outside sigma_k(...) or tau(...), so the range of the sum is not determined",
                node.span,
                "write the convolution with explicit limits, \\sum_{m=1}^{n-1}",
            )
        rest = ast.BinOp(sp, "-", node.upper, ast.BinOp(sp, "*", ast.Number(sp, c1), ast.Name(sp, node.var)))
        other = rest if c2 == 1 else ast.BinOp(sp, "/", rest, ast.Number(sp, c2))
        return ast.BigSum(sp, "from", node.var, num(1), node.upper, substitute(body, {node.var2: other}))
    raise ArithmeticError_(
        "a sum over the integers or a double sum is a q-series, not an arithmetic expression",
        node.span,
        "put q^{...} in its body and compare it with a form",
    )


def constant_lower(node: ast.Node) -> int:
    """The integer lower limit of a range written as a condition."""
    value = ast.constant_value(node)
    if value is None or value.denominator != 1:
        raise ArithmeticError_("the limit of this range must be an integer", node.span)
    return int(value)

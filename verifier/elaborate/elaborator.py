"""Elaboration: AST -> typed expressions, with weight inference and its diagnostics.

Rules (level one and ``f(d tau)``):
* ``E_k`` (k even >= 4) has weight k, ``\\Delta`` weight 12, ``E_2`` weight 2 and
  E_2-depth 1, ``j = E_4^3/\\Delta`` weight 0 with a pole at infinity; ``f(d\\tau)``
  keeps the weight and multiplies the level by d; constants have weight 0 and the
  constant 0 every weight.
* Products add weights, quotients subtract them, integer powers multiply them.
* A sum must have one weight; otherwise the ``mixed-weight`` diagnostic names both
  weights and the terms they come from.
* ``q`` belongs to printed expansions; ``\\cdots`` and ``O(q^m)`` may only be summands of
  a side, and they fix where the printed side stops.
"""

from __future__ import annotations

import dataclasses
import math
import re
from collections.abc import Iterator, Mapping
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from verifier.elaborate import ir
from verifier.elaborate.rescale import rescale_expr
from verifier.forms.registry import AtomInfo, Unknown, eta_params, lookup
from verifier.limits import number_text
from verifier.parse import ast
from verifier.parse.shape import BALANCE_FROM

MAX_EXPONENT = 10_000
MAX_WEIGHT = Fraction(20_000)
MAX_LEVEL = 10_000
MAX_DEPTH = 40  # highest power of E_2 (the graded pieces multiply pairwise)


@dataclass(frozen=True)
class Problem:
    """An elaboration diagnostic at ``span`` of the claim text."""

    code: str
    message: str
    hint: str
    span: ast.Span


class ElaborationError(Exception):
    """Raised internally; carries the :class:`Problem`."""

    def __init__(self, problem: Problem) -> None:
        super().__init__(problem.message)
        self.problem = problem


def _fmt_weight(w: Fraction | None) -> str:
    return "any" if w is None else str(w)


class Elaborator:
    """Elaborates sides of claims in the context of the document's definitions."""

    def __init__(self, definitions: dict[str, ir.Expr] | None = None) -> None:
        self.definitions: dict[str, ir.Expr] = dict(definitions or {})
        self.matrices: dict[str, Any] = {}  # Gram matrices from define tags, by name
        # Definitions read as sums of eta-type products (verifier.claims.products), by name.
        self.products: dict[str, Any] = {}
        # Families f_k := body(k) from define tags: letter -> (index letter, body, its text).
        self.families: dict[str, tuple[str, ast.Node, str]] = {}
        # The nome of the claim being elaborated: 1 for q = e^{2 pi i tau}, 1/2 for
        # Jacobi's e^{pi i tau} (tag option nome=).
        self.nome = Fraction(1)
        # Values of the unknowns of a solve= claim while it is elaborated (see claims/solve.py).
        self.unknowns: dict[str, Fraction] = {}
        # Set while a claim with a generating-function sum is elaborated: its other side may
        # mix weights (1 - E_2)/24, which the proof splits by weight.
        self.allow_mixed = False
        self._text = ""  # the claim text being elaborated (for hints that look past a node)
        # Definitions found in the author's text (docs/method.md#author-definitions): names whose
        # definition could not be read (name -> why), where each author-defined name was defined
        # (name -> note for readings), and inline 'X = ...' that did not clearly define X.
        self.unread: dict[str, str] = {}
        self.authored: dict[str, str] = {}
        self.mentions: dict[str, str] = {}
        # Names the author defines as e(x) = e^{2 pi i x}: the parser reads e(n tau) as q^n
        # (docs/method.md#exponential-notation).
        self.exponentials: set[str] = set()

    # -- public -------------------------------------------------------------------
    def side(self, node: ast.Node, text: str) -> ir.Side | Problem:
        """Elaborate one side of a claim; ``text`` is the claim text the spans index."""
        self._text = text
        split = _prefactored(node)
        if split is not None:
            return self._prefactored_side(split[0], split[1], node, text)
        try:
            terms = _summands(node)
            trunc: Fraction | None = None
            dots = False
            kept: list[tuple[int, ast.Node]] = []
            printed_terms = [k for k, (_, t) in enumerate(terms) if not isinstance(t, ast.Dots | ast.BigO)]
            last_printed = printed_terms[-1] if printed_terms else -1
            for k, (sign, term) in enumerate(terms):
                if isinstance(term, ast.Dots) and k < last_printed:
                    raise _err(
                        "bad-expansion",
                        "\\cdots stands between printed terms",
                        "write the omitted terms, or put \\cdots at the end",
                        term,
                    )
                if isinstance(term, ast.Dots):
                    dots = True
                elif isinstance(term, ast.BigO):
                    m = _big_o_exponent(term) * self.nome
                    trunc = m if trunc is None else min(trunc, m)
                else:
                    kept.append((sign, term))
            if not kept:
                raise _err(
                    "bad-expansion",
                    "this side has only \\cdots or O(...)",
                    "write the printed terms",
                    node,
                )
            expr = self._sum_of(kept, text)
            if dots and not expr.typ.printed and not isinstance(expr, ir.Const):
                # f = g + \cdots with no power of q printed: "+ \cdots" then stands for omitted
                # terms of unknown kind, not for the tail of a q-expansion.
                raise _err(
                    "bad-expansion",
                    "\\cdots after terms with no power of q: the omitted terms are not a q-expansion's tail",
                    "write every term, or a q-expansion such as 1 + 240q + \\cdots, or g + O(q^m)",
                    node,
                )
            printed = expr.typ.printed or dots or trunc is not None
            return ir.Side(expr, printed, trunc, dots, degree(expr))
        except ElaborationError as exc:
            return exc.problem

    def _prefactored_side(
        self, factors: list[ast.Node], inner: ast.Node, node: ast.Node, text: str
    ) -> ir.Side | Problem:
        """``c q^e (1 + a_1 q + ... + \\cdots)``: a printed expansion behind a constant and a power of q.

        The inner expansion claims its printed range; the prefactor shifts it by e.
        """
        inside = self.side(inner, text)
        if isinstance(inside, Problem):
            return inside
        self._text = text
        try:
            pre = self.expr(_product_node(factors), text)
            src = text[node.span[0] : node.span[1]]
            expr = _mul(pre, inside.expr, src, node)
        except ElaborationError as exc:
            return exc.problem
        shift = degree(pre)
        big_o = None if inside.big_o is None else inside.big_o + shift
        return ir.Side(expr, True, big_o, inside.dots, degree(expr))

    def unread_definition(self, name: str, why: str) -> None:
        """The author defines ``name`` in a way that cannot be read: later uses are errors."""
        self.unread[name] = why
        self.definitions.pop(name, None)
        self.authored.pop(name, None)

    def forget(self, name: str) -> tuple[ir.Expr | None, str | None, str | None]:
        """Set aside the document's meaning of ``name`` (to compare with qreferee's own)."""
        return self.definitions.pop(name, None), self.unread.pop(name, None), self.authored.pop(name, None)

    def restore(self, name: str, saved: tuple[ir.Expr | None, str | None, str | None]) -> None:
        """Undo :meth:`forget`."""
        for table, value in zip((self.definitions, self.unread, self.authored), saved, strict=True):
            if value is not None:
                table[name] = value  # type: ignore[index]

    def define(self, name: str, node: ast.Node, text: str, author: str | None = None) -> Problem | None:
        """Record ``name := node``; returns a problem if the body does not elaborate.

        ``author`` is where an author's definition stands in the text; such a definition may
        give a built-in name the author's meaning (docs/method.md#author-definitions).
        """
        name = normal_name(name)
        family = re.fullmatch(r"([A-Za-z])_([a-z])", name)
        from verifier.elaborate.idiom import mentions

        if family is not None and mentions(node, family.group(2)):
            letter = family.group(1)
            if any(is_builtin(f"{letter}_{k}") for k in (1, 2, 4, 6)):
                return Problem(
                    "bad-define",
                    f"{letter}_k would redefine built-in forms such as {letter}_4",
                    "choose another letter for the family (f_k for (q^k;q^k)_\\infty)",
                    node.span,
                )
            # f_k = (q^k;q^k)_\infty: a family indexed by its subscript, read when f_3 is used
            # (docs/method.md#products).
            self.families[family.group(1)] = (family.group(2), node, text)
            return None
        if is_builtin(name) and author is None:
            return Problem(
                "bad-define",
                f"{name} is a built-in form and cannot be redefined",
                "choose another name (e.g. J for a renormalised j)",
                node.span,
            )
        result = self.side(node, text)
        if isinstance(result, Problem):
            return result
        if result.truncation is not None or result.printed:
            return Problem(
                "bad-define",
                "a definition cannot be a truncated expansion",
                "define a form",
                node.span,
            )
        self.definitions[name] = result.expr
        self.unread.pop(name, None)
        if author is not None:
            self.authored[name] = f"{name} as the author defines it at {author}"
        else:
            self.authored.pop(name, None)
        return None

    # -- expressions ----------------------------------------------------------------
    def _sum_of(self, terms: list[tuple[int, ast.Node]], text: str) -> ir.Expr:
        if len(terms) > BALANCE_FROM:
            return self._long_sum(terms, text)
        acc: ir.Expr | None = None
        for sign, node in terms:
            e = self.expr(node, text)
            acc = (e if sign > 0 else _neg(e)) if acc is None else self._plus(acc, e, sign, node)
        assert acc is not None
        return acc

    def _plus(self, acc: ir.Expr, e: ir.Expr, sign: int, node: ast.Node) -> ir.Expr:
        try:
            return _add(acc, e, sign, node)
        except ElaborationError as exc:
            if exc.problem.code != "mixed-weight" or not self.allow_mixed:
                raise
            # A claim about a generating function compares weight by weight (docs/method.md#quasimodular).
            from verifier.arith.genfun import add as mixed_add

            return mixed_add(acc, e, sign)

    def _long_sum(self, terms: list[tuple[int, ast.Node]], text: str) -> ir.Expr:
        """A long sum added pairwise, so that its expression tree stays shallow (depth log2 n)."""
        level: list[tuple[int, ir.Expr, ast.Node]] = [(s, self.expr(n, text), n) for s, n in terms]
        if level[0][0] < 0:
            level[0] = (1, _neg(level[0][1]), level[0][2])
        while len(level) > 1:
            paired: list[tuple[int, ir.Expr, ast.Node]] = []
            for i in range(0, len(level) - 1, 2):
                (sa, ea, _), (sb, eb, nb) = level[i], level[i + 1]
                paired.append((sa, self._plus(ea, eb, sa * sb, nb), nb))  # sa*ea + sb*eb = sa*(ea + sa*sb*eb)
            if len(level) % 2:
                paired.append(level[-1])
            level = paired
        return level[0][1]

    def expr(self, node: ast.Node, text: str) -> ir.Expr:
        """Elaborate an expression node (raises :class:`ElaborationError`)."""
        src = text[node.span[0] : node.span[1]]
        if isinstance(node, ast.Number):
            return ir.Const(ir.Typ(Fraction(0) if node.value else None), src, Fraction(node.value))
        if isinstance(node, ast.Decimal):
            raise _err(
                "not-exact",
                f"decimal number {node.text} is not exact",
                "write it as a fraction \\frac{a}{b}",
                node,
            )
        if isinstance(node, ast.Name):
            return self._name(node, src)
        if isinstance(node, ast.Neg):
            return _neg(self.expr(node.operand, text))
        if isinstance(node, ast.BinOp):
            if node.op in "+-":
                return self._sum_of(_summands(node), text)
            if node.op == "*":
                return self._product(node, text, src)
            left = self.expr(node.left, text)
            right = self.expr(node.right, text)
            return _div(left, right, src, node)
        if isinstance(node, ast.Prime):
            return _deriv(self.expr(node.operand, text), src, node)
        if isinstance(node, ast.Bracket):
            return self._bracket(node, text, src)
        if isinstance(node, ast.BigProd | ast.Pochhammer):
            return self._idiom_product(node, text, src)
        if isinstance(node, ast.BigSum):
            if node.kind in ("integers", "pair", "lattice") or (
                node.kind in ("at_least", "from") and node.upper is None
            ):
                special = self._idiom_sum(node, text, src)
                if special is not None:
                    return special
            return self._generating_sum(node, text)
        if isinstance(node, ast.Call):
            op = _operator(ast.Name(node.name_span, node.name))
            if op is not None:  # D(f g), T_2(f), \partial_4(f)
                return self._apply(op, self.expr(node.argument, text), src, node)
            # name(expr) for a form is a product: E_4(E_6 + 1), q(1 - q).
            return _mul(self._name(ast.Name(node.name_span, node.name), src), self.expr(node.argument, text), src, node)
        if isinstance(node, ast.Power):
            if (
                isinstance(node.base, ast.Call)
                and _operator(ast.Name(node.base.name_span, node.base.name)) is None
                and isinstance(node.exponent, Fraction)
            ):
                # E_4(E_6)^2 is E_4 times E_6^2, as LaTeX reads it: the power is on the bracket.
                call = node.base
                head = self._name(ast.Name(call.name_span, call.name), src)
                power = _pow(self.expr(call.argument, text), node.exponent, src, node)
                return _mul(head, power, src, node)
            if not isinstance(node.exponent, Fraction):
                raise _err(
                    "unsupported",
                    "a power with a variable exponent belongs in an arithmetic expression or after q in a sum",
                    "write q^n inside \\sum_{n \\ge 1} a(n) q^n",
                    node,
                )
            return _pow(self.expr(node.base, text), node.exponent, src, node)
        if isinstance(node, ast.Dots | ast.BigO):
            raise _err(
                "bad-expansion",
                "\\cdots and O(...) may only be added at the end of a side",
                "write them as the last summands, e.g. 1 + 240q + \\cdots",
                node,
            )
        raise _err("syntax", "this construction has no meaning here", "", node)

    def _product(self, node: ast.BinOp, text: str, src: str) -> ir.Expr:
        """A product, where the operators D, D^r and partial_k apply to the factor after them."""
        factors = ast.factors(node)
        out: ir.Expr | None = None
        pieces: list[ir.Expr] = []
        i = 0
        while i < len(factors):
            f = factors[i]
            op = _operator(f)
            if op is not None:
                if i + 1 == len(factors):
                    raise _err("syntax", "a derivative needs something to act on", "write D f or D(f + g)", f)
                operand = self.expr(factors[i + 1], text)
                piece = self._apply(op, operand, text[f.span[0] : factors[i + 1].span[1]], f)
                i += 2
            else:
                piece = self.expr(f, text)
                i += 1
            pieces.append(piece)
        if len(pieces) <= BALANCE_FROM:
            for piece in pieces:
                out = piece if out is None else _mul(out, piece, src, node)
            assert out is not None
            return out
        while len(pieces) > 1:  # a long product multiplied pairwise: a shallow tree
            pieces = [_mul(pieces[i], pieces[i + 1], src, node) for i in range(0, len(pieces) - 1, 2)] + (
                [pieces[-1]] if len(pieces) % 2 else []
            )
        return pieces[0]

    def _digits_hint(self, name: str, node: ast.Node) -> str | None:
        """``E_12`` reads as E_1 times 2: the hint names the form meant, ``E_{12}``."""
        if not re.fullmatch(r"\\?[A-Za-z]+_[0-9A-Za-z]", name):
            return None
        after = re.match(r"[0-9]+", self._text[node.span[1] :])
        if after is None:
            return None
        base, index = name.split("_", 1)
        meant = f"{base}_{{{index}{after.group(0)}}}"
        return f"write {meant}: in LaTeX {name}{after.group(0)} reads as {name} followed by {after.group(0)}"

    def _apply(self, op: tuple[str, int | Fraction | None], operand: ir.Expr, src: str, node: ast.Node) -> ir.Expr:
        kind, value = op
        if kind.startswith("hecke"):
            t = operand.typ
            if t.printed or t.depth or t.den_weight or t.mixed or t.weight is None:
                raise _err(
                    "unsupported",
                    "Hecke operators act here on modular forms (no E_2, quotients or expansions)",
                    "",
                    node,
                )
            if t.weight.denominator != 1:
                raise _err("unsupported", "Hecke operators of half-integral weight are not supported", "", node)
            return ir.Hecke(t, src, operand, int(value or 1), kind[-1])
        if kind == "D":
            for _ in range(int(value or 1)):
                operand = _deriv(operand, src, node)
            return operand
        # Serre derivative theta_k f = D f - (k/12) E_2 f (docs/method.md#derivatives).
        k = Fraction(value) if value is not None else operand.typ.weight
        if k is None:
            raise _err("syntax", "the weight of the Serre derivative is not known", "write \\partial_k f", node)
        # On a modular form a k other than its weight is almost always a slip, so it is an
        # error.  On quasimodular input (E_2 in it) every k is in use: theta_k f is then the
        # quasimodular form D f - (k/12) E_2 f of weight w + 2 (docs/method.md#derivatives).
        if operand.typ.weight is not None and operand.typ.weight != k and not operand.typ.depth:
            raise _err(
                "weight-mismatch",
                f"the Serre derivative of weight {k} is applied to a form of weight {operand.typ.weight}",
                "use the weight of the form",
                node,
            )
        e2 = _atom(AtomInfo("E2", Fraction(2), 1), Fraction(1), "E_2", node)
        correction = _mul(ir.Const(ir.Typ(Fraction(0)), "", -k / 12), _mul(e2, operand, src, node), src, node)
        return _add(_deriv(operand, src, node), correction, 1, node)

    def _generating_sum(self, node: ast.BigSum, text: str) -> ir.Expr:
        """``\\sum_{n \\ge L} a(n) q^n`` (L = 0 or 1) as a form: its generating function.

        See docs/method.md#generating-functions.  A factor q^{dn} (d a positive integer) in
        place of q^n gives the generating function at d tau.
        """
        if node.kind != "at_least" or node.lower is None:
            raise _err("unsupported", "a finite sum is an arithmetic expression, not a form", "", node)

        def step_of(f: ast.Node) -> int | None:
            """d for a factor q^{d n} (d a positive integer, 1 for q^n), else None."""
            if not (isinstance(f, ast.Power) and isinstance(f.base, ast.Name) and f.base.text == "q"):
                return None
            e = f.exponent
            if isinstance(e, ast.Name) and e.text == node.var:
                return 1
            if isinstance(e, ast.BinOp) and e.op == "*":
                pair = (e.left, e.right) if isinstance(e.left, ast.Number) else (e.right, e.left)
                d, v = pair
                if isinstance(d, ast.Number) and isinstance(v, ast.Name) and v.text == node.var and d.value >= 1:
                    return d.value if d.value <= 10_000 else None
            return None

        def is_q_to_var(f: ast.Node) -> bool:
            return step_of(f) is not None

        body_factors = ast.factors(node.body)
        qpow = [f for f in body_factors if is_q_to_var(f)]
        if not qpow and len(body_factors) == 1 and isinstance(body_factors[0], ast.BigSum):
            # \sum_{n\ge1}\sum_{d\mid n} w(d) q^n: the inner sum's body took q^n along (a sum's body
            # runs to the next + or -); q^n does not depend on d, so it stands outside.
            inner = body_factors[0]
            inner_factors = ast.factors(inner.body)
            found = [f for f in inner_factors if is_q_to_var(f)]
            if len(found) == 1 and inner.var != node.var:
                kept = [f for f in inner_factors if f is not found[0]]
                body = _product_node(kept) if kept else ast.Number(inner.span, 1)
                body_factors = [dataclasses.replace(inner, body=body), found[0]]
                qpow = found
        if len(qpow) != 1:
            raise _err(
                "unsupported-notation",
                f"not read: a sum over {node.var} whose summand is not a(n) times q^{node.var} "
                f"(or q^{{d{node.var}}}), nor a Lambert series",
                f"write \\sum_{{{node.var}\\ge1}} a({node.var}) q^{{{node.var}}}, or a Lambert series "
                f"\\sum_{{{node.var}\\ge1}} a({node.var}) \\frac{{q^{{{node.var}}}}}{{1-q^{{{node.var}}}}}",
                node,
            )
        rest = [f for f in body_factors if f is not qpow[0]]
        step = step_of(qpow[0]) or 1
        try:
            return rescale_expr(self._generating_sum_at(node, text, rest), step)  # sum a(n) q^{dn} = g(d tau)
        except ValueError as exc:  # a Hecke operator inside cannot be rescaled
            raise _err("unsupported", f"sum a(n) q^{{{step}n}}: {exc}", "write the sum with q^n", node) from exc

    def _generating_sum_at(self, node: ast.BigSum, text: str, rest: list[ast.Node]) -> ir.Expr:
        """The generating function sum a(n) q^n of the coefficient ``rest`` (see :meth:`_generating_sum`)."""
        from verifier.arith.elaborate import ArithmeticError_, to_arith
        from verifier.arith.genfun import Untranslatable, add, const, generating_function
        from verifier.arith.values import NotEvaluable, Values

        assert node.lower is not None
        try:
            lower = self.expr(node.lower, text)
            if not isinstance(lower, ir.Const) or lower.value not in (0, 1):
                raise _err("unsupported", "generating-function sums start at n = 0 or n = 1", "", node)
            coefficient: Any = rest[0] if rest else ast.Number(node.span, 1)
            arith = to_arith(coefficient, text, self.definitions, self.matrices, lambda f: f)
            for f in rest[1:]:
                arith = _arith_mul(arith, to_arith(f, text, self.definitions, self.matrices, lambda g: g))
            values = Values()
            g = generating_function(arith, node.var, values)
            if lower.value == 1:
                c0 = values.value(arith, {node.var: 0})
                if c0:
                    g = add(g, const(c0), -1)
            return g
        except ArithmeticError_ as exc:
            raise ElaborationError(Problem("unsupported", str(exc), exc.hint, exc.span)) from exc
        except Untranslatable:
            # No modular translation (sigma_k with k even, p(n), products of functions): the sum is
            # still an exact q-series, compared coefficient by coefficient (docs/method.md#series-only).
            from verifier.elaborate.idiom import series_atom

            try:
                for n in range(0, 4):
                    values.value(arith, {node.var: n})
            except (NotEvaluable, ZeroDivisionError, TypeError) as exc:
                raise _err("unsupported", f"no modular generating function: {exc}", "", node) from exc
            start = int(lower.value) if isinstance(lower, ir.Const) else 1
            return series_atom(("coeffs", arith, node.var, start), text[node.span[0] : node.span[1]])
        except NotEvaluable as exc:
            raise _err("unsupported", f"no modular generating function: {exc}", "", node) from exc

    # -- the q-series idiom (verifier/elaborate/idiom.py; docs/method.md#products) --------
    def _idiom_product(self, node: ast.BigProd | ast.Pochhammer, text: str, src: str) -> ir.Expr:
        from verifier.elaborate import idiom

        reader = idiom.ProductReader(text)
        try:
            ef = reader.product(node) if isinstance(node, ast.BigProd) else reader.pochhammer(node)
        except idiom.IdiomError as exc:
            raise _err(idiom.CODE, f"not read: {exc.construct}", exc.hint, exc.node) from exc

        out = idiom.product_expr(ef, src, node, lambda c, params: self.eta_expr(c, params, src, node))
        for extra in reader.outside:
            out = _mul(out, self.expr(extra, text), src, node)
        return out

    def eta_expr(self, c: Fraction, params: dict[Fraction, int], src: str, node: ast.Node) -> ir.Expr:
        """``c`` times the eta quotient prod eta(d tau)^{r_d}."""
        return _eta_expr(c, tuple(params.items()), src, node)

    def mul(self, a: ir.Expr, b: ir.Expr, src: str, node: ast.Node) -> ir.Expr:
        """The typed product a * b."""
        return _mul(a, b, src, node)

    def generating_sum(self, node: ast.BigSum, text: str) -> ir.Expr:
        """``sum_{n >= L} a(n) q^n`` (see :meth:`_generating_sum`)."""
        return self._generating_sum(node, text)

    def _idiom_sum(self, node: ast.BigSum, text: str, src: str) -> ir.Expr | None:
        """Sums over Z, one-sided sums with a quadratic exponent, Lambert and double sums; None: not idiom."""
        from verifier.elaborate import idiom

        try:
            return idiom.SumReader(self, text).read(node, src)
        except idiom.IdiomError as exc:
            raise _err(idiom.CODE, f"not read: {exc.construct}", exc.hint, exc.node) from exc

    def _bracket(self, node: ast.Bracket, text: str, src: str) -> ir.Expr:
        """[f, g]_n = sum_{r+s=n} (-1)^r C(n+k-1, s) C(n+l-1, r) D^r f D^s g (docs/method.md#rankin-cohen)."""
        f = self.expr(node.left, text)
        g = self.expr(node.right, text)
        k, wg = f.typ.weight, g.typ.weight
        if k is None or wg is None or f.typ.printed or g.typ.printed:
            raise _err("syntax", "a Rankin-Cohen bracket needs two forms of known weight", "", node)
        n = node.n
        total: ir.Expr | None = None
        for r in range(n + 1):
            s = n - r
            c = (-1) ** r * _binomial(n + k - 1, s) * _binomial(n + wg - 1, r)
            df, dg = f, g
            for _ in range(r):
                df = _deriv(df, src, node)
            for _ in range(s):
                dg = _deriv(dg, src, node)
            term = _mul(ir.Const(ir.Typ(Fraction(0)), "", c), _mul(df, dg, src, node), src, node)
            total = term if total is None else _add(total, term, 1, node)
        assert total is not None
        return total

    def _family_member(self, name: str) -> tuple[str, int] | None:
        """(letter, index) when ``name`` is f_3 or f_{16} of a family the author defined."""
        # normal_name keeps a brace around more than one character: f_16 is f_1 6.
        member = re.fullmatch(r"([A-Za-z])_(?:\{(\d+)\}|(\d+))", name)
        if member is None or member.group(1) not in self.families:
            return None
        return member.group(1), int(member.group(2) or member.group(3))

    def _elaborate_member(self, name: str) -> ir.Expr:
        """The author's f_k at this k, elaborated once and kept with the definitions."""
        from verifier.elaborate.idiom import substitute

        found = self._family_member(name)
        assert found is not None
        index, body, body_text = self.families[found[0]]
        self.definitions[name] = self.expr(substitute(body, {index: ast.Number(body.span, found[1])}), body_text)
        return self.definitions[name]

    def author_forms(self) -> AuthoredForms:
        """The author's meanings of names, for readers outside the elaborator (see AuthoredForms)."""
        return AuthoredForms(self)

    def _name(self, node: ast.Name, src: str) -> ir.Expr:
        name = normal_name(node.text)
        if node.arg == "tau+1/2":
            return _half_shift(self, node, name, src)
        scale = _scale_of(node)
        if name in self.unknowns and node.arg is None:
            value = self.unknowns[name]
            return ir.Const(ir.Typ(Fraction(0) if value else None), src, value)
        if name == "q":
            if node.arg is not None:
                raise _err("syntax", "q takes no argument", "", node)
            return ir.QPower(ir.Typ(None, printed=True), src, self.nome)
        if name in self.unread:
            raise _err(
                "unknown-symbol",
                self.unread[name],
                f"write the definition of {name} in notation qreferee reads (README)"
                + ("" if is_builtin(name) else f", or add %@define {name} = ..."),
                node,
            )
        if name not in self.definitions and self._family_member(name) is not None:
            try:
                self._elaborate_member(name)
            except ElaborationError as exc:
                raise _err(exc.problem.code, f"{name}: {exc.problem.message}", exc.problem.hint, node) from exc
        if name in self.definitions:
            if scale != 1:
                raise _err(
                    "unsupported",
                    f"{name}({scale}\\tau) of a defined form is not supported yet",
                    "define the rescaled form directly",
                    node,
                )
            return self.definitions[name]
        if name == "j":
            e4 = _atom(AtomInfo("E4", Fraction(4)), scale, "E_4", node)
            delta = _atom(AtomInfo("Delta", Fraction(12)), scale, "\\Delta", node)
            return _div(_pow(e4, 3, "E_4^3", node), delta, src, node)
        found = lookup(name, self.nome, self.matrices)
        if isinstance(found, AtomInfo):
            if name == "\\eta" and node.arg is None:
                raise _err("syntax", "write eta with its argument, eta(\\tau) or eta(d\\tau)", "", node)
            atom = _atom(found, scale, src, node)
            if found.factor != 1:
                return ir.Product(atom.typ, src, ir.Const(ir.Typ(Fraction(0)), str(found.factor), found.factor), atom)
            return atom
        if isinstance(found, Unknown):
            raise _err("unknown-symbol", found.message, self._digits_hint(name, node) or found.hint, node)
        if name in self.matrices:
            raise _err("unknown-symbol", f"{name} is a Gram matrix, not a form", f"write \\Theta_{name}", node)
        hint = (
            "known forms: E_2, E_4, ..., \\Delta, j, \\eta(d\\tau), \\theta, \\theta_2, \\theta_3, \\theta_4, \\Theta_Q"
        )
        if name in self.mentions:
            hint = (
                f"{name} = ... is written at {self.mentions[name]}, but not clearly as a definition; "
                f"if it is one, add %@define {name} = ... (or write {name} := ...)"
            )
        elif len(name) > 1 and name[1:2] == "_" and not name.endswith("}"):
            hint += "; " + (self._digits_hint(name, node) or f"write {name[:2]}{{..}} for a longer index")
        raise _err("unknown-symbol", f"unknown symbol {name}", hint, node)


def _half_shift(self: Elaborator, node: ast.Name, name: str, src: str) -> ir.Expr:
    """``f(\\tau + 1/2)``: q -> -q (docs/method.md#half-period-shift).

    Read for E_k (from sigma_{k-1}(2n) = (1 + 2^{k-1}) sigma_{k-1}(n) - 2^{k-1} sigma_{k-1}(n/2)) and
    for eta quotients whose q-expansion has integral exponents (eta(tau + 1/2) =
    e^{pi i/24} eta(2tau)^3 / (eta(tau) eta(4tau))); with exponents in (1/24)Z the shift multiplies
    by a root of unity that is not rational, and the claim is refused.
    """
    construct = f"{node.text}(\\tau+1/2)"
    nearest = "nearest forms read: \\theta(\\tau+1/2), \\Delta(\\tau+1/2), E_k(\\tau+1/2), eta quotients at \\tau+1/2"
    found = lookup(name, self.nome, self.matrices)
    if self.nome != 1 or name in self.definitions or name in self.unread or not isinstance(found, AtomInfo):
        raise _err(
            "unsupported-notation",
            f"{construct}: the shift tau -> tau + 1/2 is read only for built-in forms in q = e^{{2 pi i tau}}",
            nearest + "; or write the shifted series out",
            node,
        )
    key = found.key
    if key[:1] == "E" and key[1:].isdigit():
        k = int(key[1:])
        total: ir.Expr | None = None
        for c, d in ((-1, 1), (2 + 2**k, 2), (-(2**k), 4)):
            const = ir.Const(ir.Typ(Fraction(0)), str(c), Fraction(c))
            term = _mul(const, _atom(found, Fraction(d), src, node), src, node)
            total = term if total is None else _add(total, term, 1, node)
        assert total is not None
        return total
    if key == "Delta":
        exps: dict[Fraction, int] = {Fraction(1): 24}
    elif key == "eta":
        exps = {Fraction(d): int(r) for d, r in found.params}
    else:
        raise _err(
            "unsupported-notation", f"{construct}: the shift tau -> tau + 1/2 of {name} is not read", nearest, node
        )
    s = sum((delta * power for delta, power in exps.items()), Fraction(0))
    if any(delta.denominator != 1 for delta in exps) or s % 24:
        raise _err(
            "unsupported-notation",
            f"{construct}: {name} has q-exponents in {number_text(s / 24 % 1)} + Z, so tau -> tau + 1/2 multiplies "
            f"it by e^{{{number_text(s / 24 % 2)} pi i}}, a root of unity that is not rational",
            nearest + " (with integral exponents of q)",
            node,
        )
    shifted: dict[Fraction, int] = {}
    for delta, power in exps.items():
        odd = delta.numerator % 2
        moved = {delta * 2: 3 * power, delta: -power, delta * 4: -power} if odd else {delta: power}
        for dd, rr in moved.items():
            shifted[dd] = shifted.get(dd, 0) + rr
    value = found.factor * (-1 if (s // 24) % 2 else 1)
    atom = _atom(AtomInfo("eta", found.weight, params=eta_params(shifted)), Fraction(1), src, node)
    if value == 1:
        return atom
    return ir.Product(atom.typ, src, ir.Const(ir.Typ(Fraction(0)), number_text(value), value), atom)


def _arith_mul(a: Any, b: Any) -> Any:
    from verifier.arith import terms as t

    return t.Bin(f"{a.text} {b.text}", "*", a, b)


_HECKE = re.compile(r"^([TU])_(?:\{\s*(\d+)\s*\}|(\d))$")
_SERRE = re.compile(r"^\\partial(?:_(?:\{\s*(\d+(?:/\d+)?)\s*\}|(\d)))?$")


def _operator(node: ast.Node) -> tuple[str, int | Fraction | None] | None:
    """D, D^r (r >= 1), \\partial or \\partial_k, T_n or U_n: an operator; None otherwise."""
    if isinstance(node, ast.Name) and node.arg is None:
        if node.text == "D":
            return ("D", 1)
        m = _SERRE.match(node.text.replace(" ", ""))
        if m:
            value = m.group(1) or m.group(2)
            return ("serre", Fraction(value) if value else None)
        h = _HECKE.match(node.text.replace(" ", ""))
        if h and int(h.group(2) or h.group(3)) >= 1:
            return ("hecke" + h.group(1), int(h.group(2) or h.group(3)))
    if (
        isinstance(node, ast.Power)
        and isinstance(node.base, ast.Name)
        and node.base.text == "D"
        and isinstance(node.exponent, Fraction)
        and node.exponent.denominator == 1
        and node.exponent >= 1
    ):
        return ("D", int(node.exponent))
    return None


def _binomial(x: Fraction, m: int) -> Fraction:
    """x(x-1)...(x-m+1)/m!, also for half-integral x (docs/method.md#rankin-cohen)."""
    out = Fraction(1)
    for i in range(m):
        out = out * (x - i) / (i + 1)
    return out


def _deriv(e: ir.Expr, src: str, node: ast.Node) -> ir.Expr:
    """D e: weight + 2, E_2-depth + 1; a quotient's denominator is squared."""
    t = e.typ
    if isinstance(e, ir.Const):
        return ir.Const(ir.Typ(None), src, Fraction(0))
    weight = None if t.weight is None else t.weight + 2
    typ = ir.Typ(weight, t.depth + 1, t.level, t.den_weight * 2, t.printed, t.has_pole, t.mixed)
    return ir.Deriv(_check_size(typ, node), src, e)


def _scale_of(node: ast.Name) -> Fraction:
    """The d in f(d tau) (also f(tau/2)); 1 for (tau), (z), (q) or no argument."""
    arg = node.arg
    if arg in (None, "tau", "z", "q"):
        return Fraction(1)
    assert arg is not None
    m = re.fullmatch(r"(\d*)tau(?:/(\d+))?", arg)
    if not m or (m.group(1) and int(m.group(1)) == 0) or (m.group(2) and int(m.group(2)) == 0):
        raise _err("syntax", f"cannot read the argument ({arg})", "write (\\tau), (d\\tau) or (\\tau/d)", node)
    return Fraction(int(m.group(1) or 1), int(m.group(2) or 1))


def normal_name(text: str) -> str:
    """``H_{1}`` and ``H_1`` are one name."""
    return re.sub(r"_\{(\w)\}", r"_\1", text.replace(" ", ""))


def is_builtin(name: str) -> bool:
    """Names with a fixed meaning, which a define tag may not change."""
    return name in ("q", "j") or lookup(name) is not None


def _atom(info: AtomInfo, scale: Fraction, src: str, node: ast.Node) -> ir.Atom:
    typ = _check_size(ir.Typ(info.weight, info.depth, max(scale.numerator, 1)), node)
    if info.key == "eta":
        # The scale is folded into the deltas: eta quotients are always at scale 1.
        params = eta_params({d * scale: r for d, r in info.params})
        return ir.Atom(typ, src, "eta", Fraction(1), params)
    return ir.Atom(typ, src, info.key, scale, info.params)


def _summands(node: ast.Node) -> list[tuple[int, ast.Node]]:
    """Flatten a chain of + and - into signed terms."""
    out: list[tuple[int, ast.Node]] = []
    stack: list[tuple[int, ast.Node]] = [(1, node)]
    while stack:
        sign, n = stack.pop()
        if isinstance(n, ast.BinOp) and n.op in "+-":
            stack += [(-sign if n.op == "-" else sign, n.right), (sign, n.left)]
        elif isinstance(n, ast.Neg):
            stack.append((-sign, n.operand))
        else:
            out.append((sign, n))
    return out


def _prefactored(node: ast.Node) -> tuple[list[ast.Node], ast.Node] | None:
    """``c q^e (printed + \\cdots)`` as (the prefactor's factors, the printed expansion), or None.

    Only a product of numbers and powers of q may stand in front, and the last factor must be
    an expansion that ends in ``\\cdots`` or ``O(q^m)``.
    """
    factors = ast.factors(node)
    if len(factors) < 2:
        if len(factors) == 1 and isinstance(factors[0], ast.Call) and factors[0].name == "q":
            call = factors[0]
            factors = [ast.Name(call.name_span, "q"), call.argument]
        else:
            return None
    last = factors[-1]
    if isinstance(last, ast.Call) and last.name == "q":
        factors = [*factors[:-1], ast.Name(last.name_span, "q"), last.argument]
        last = factors[-1]
    if not any(isinstance(t, ast.Dots | ast.BigO) for _, t in _summands(last)):
        return None
    if not all(_is_monomial_factor(f) for f in factors[:-1]):
        return None
    return factors[:-1], last


def _is_monomial_factor(node: ast.Node) -> bool:
    if isinstance(node, ast.Number):
        return True
    if isinstance(node, ast.Name):
        return node.text == "q" and node.arg is None
    if isinstance(node, ast.Power):
        return isinstance(node.exponent, Fraction) and isinstance(node.base, ast.Name) and node.base.text == "q"
    if isinstance(node, ast.Neg):
        return _is_monomial_factor(node.operand)
    if isinstance(node, ast.BinOp) and node.op == "/":
        return isinstance(node.left, ast.Number) and isinstance(node.right, ast.Number)
    return False


def _product_node(factors: list[ast.Node]) -> ast.Node:
    out = factors[0]
    for f in factors[1:]:
        out = ast.BinOp((out.span[0], f.span[1]), "*", out, f)
    return out


def _big_o_exponent(node: ast.BigO) -> Fraction:
    inner = node.inner
    if isinstance(inner, ast.Name) and inner.text == "q":
        return Fraction(1)
    if (
        isinstance(inner, ast.Power)
        and isinstance(inner.base, ast.Name)
        and inner.base.text == "q"
        and isinstance(inner.exponent, Fraction)
    ):
        return inner.exponent
    raise _err("bad-expansion", "O(...) must contain a power of q", "write O(q^{m})", node)


def _err(code: str, message: str, hint: str, node: ast.Node) -> ElaborationError:
    return ElaborationError(Problem(code, message, hint, node.span))


def _lcm(a: int, b: int) -> int:
    return a * b // math.gcd(a, b)


def _check_size(typ: ir.Typ, node: ast.Node) -> ir.Typ:
    """Refuse expressions whose weight, E_2-depth or level would make the proof unbounded."""
    limits = (
        ("weight", abs(typ.weight) if typ.weight is not None else 0, MAX_WEIGHT),
        ("E_2-depth", typ.depth, MAX_DEPTH),
        ("level", typ.level, MAX_LEVEL),
    )
    for what, value, limit in limits:
        if value > limit:
            raise _err("too-large", f"{what} {number_text(value)} exceeds the limit {limit}", "split the claim", node)
    return typ


def _neg(e: ir.Expr) -> ir.Expr:
    return ir.Product(e.typ, "-" + e.text, ir.Const(ir.Typ(Fraction(0)), "-1", Fraction(-1)), e)


def _add(a: ir.Expr, b: ir.Expr, sign: int, node: ast.Node) -> ir.Expr:
    ta, tb = a.typ, b.typ
    mixed = ta.mixed or tb.mixed
    if ta.printed or tb.printed or _unequal_shifts(a, b):
        # Terms with different powers of q in front are compared as q-series (docs/method.md#series-only).
        weight = None
    elif mixed:
        # A generating function already mixes weights; the proof splits them anyway.
        weight = max((w for w in (ta.weight, tb.weight) if w is not None), default=None)
    elif ta.weight is None:
        weight = tb.weight
    elif tb.weight is None or ta.weight == tb.weight:
        weight = ta.weight
    else:
        raise ElaborationError(
            Problem(
                "mixed-weight",
                f"this sum adds weight {ta.weight} ({_short(a.text)}) and weight {tb.weight} ({_short(b.text)})",
                "every term of a sum must have the same weight; check exponents and factors",
                node.span,
            )
        )
    typ = ir.Typ(
        weight,
        max(ta.depth, tb.depth),
        _lcm(ta.level, tb.level),
        ta.den_weight + tb.den_weight,
        ta.printed or tb.printed,
        ta.has_pole or tb.has_pole,
        mixed,
    )
    op = "+" if sign > 0 else "-"
    return ir.Sum(typ, f"{a.text} {op} {b.text}", a, b, sign)


def _unequal_shifts(a: ir.Expr, b: ir.Expr) -> bool:
    from verifier.elaborate.shift import has_shift, shift_of

    if not (has_shift(a) or has_shift(b)):
        return False
    sa, sb = shift_of(a), shift_of(b)
    return sa is not None and sb is not None and sa != sb


def _short(text: str) -> str:
    text = " ".join(text.split())
    return text if len(text) <= 40 else text[:37] + "..."


def _unshift(e: ir.Expr) -> tuple[ir.Expr, Fraction] | None:
    """``q^c * base`` as (base, c) for a Shift node or a power of q; None otherwise."""
    if isinstance(e, ir.Shift):
        assert e.base is not None
        return e.base, e.exponent
    if isinstance(e, ir.QPower):
        return ir.Const(ir.Typ(Fraction(0)), "1", Fraction(1)), e.exponent
    if isinstance(e, ir.Product) and e.left is not None and e.right is not None:
        # 2q, q \cdot 3: a constant times a power of q.
        for c, p in ((e.left, e.right), (e.right, e.left)):
            if isinstance(c, ir.Const) and isinstance(p, ir.QPower):
                return ir.Const(ir.Typ(Fraction(0)), c.text, c.value), p.exponent
    return None


def _shift_product(a: ir.Expr, b: ir.Expr, sign: int, src: str, node: ast.Node) -> ir.Expr | None:
    """a * b (sign 1) or a / b (sign -1) when a shifted form is involved: the powers of q add."""
    ua, ub = _unshift(a), _unshift(b)
    if not isinstance(a, ir.Shift) and not isinstance(b, ir.Shift):
        # q^c times an unprinted form that came from a product is a shifted form, too.
        if not (ua is not None and ub is None and sign > 0 and _from_idiom(b)) and not (
            ub is not None and ua is None and _from_idiom(a)
        ):
            return None
    ba, ca = ua if ua is not None else (a, Fraction(0))
    bb, cb = ub if ub is not None else (b, Fraction(0))
    from verifier.elaborate.idiom import shifted

    inner = _mul(ba, bb, src, node) if sign > 0 else _div(ba, bb, src, node)
    return shifted(inner, ca + sign * cb, src)


def _from_idiom(e: ir.Expr) -> bool:
    """An unprinted, non-constant expression (a form or a product): q^c times it is a shifted form."""
    return not e.typ.printed and not isinstance(e, ir.Const | ir.QPower)


def _mul(a: ir.Expr, b: ir.Expr, src: str, node: ast.Node) -> ir.Expr:
    shifted = _shift_product(a, b, 1, src, node)
    if shifted is not None:
        return shifted
    ea, eb = _split_eta(a), _split_eta(b)
    if ea is not None and eb is not None:
        return _eta_expr(ea[0] * eb[0], ea[1] + eb[1], src, node)
    ta, tb = a.typ, b.typ
    printed = ta.printed or tb.printed
    if printed or ta.weight is None or tb.weight is None:
        # A printed expansion has no weight; a zero factor (weight None) makes the product 0.
        weight = None
    else:
        weight = ta.weight + tb.weight
    typ = ir.Typ(
        weight,
        ta.depth + tb.depth,
        _lcm(ta.level, tb.level),
        ta.den_weight + tb.den_weight,
        printed,
        ta.has_pole or tb.has_pole,
        ta.mixed or tb.mixed,
    )
    return ir.Product(_check_size(typ, node), src, a, b)


def _is_zero(e: ir.Expr) -> bool:
    return isinstance(e, ir.Const) and e.value == 0


def _div(a: ir.Expr, b: ir.Expr, src: str, node: ast.Node) -> ir.Expr:
    shifted = _shift_product(a, b, -1, src, node)
    if shifted is not None:
        return shifted
    ea, eb = _split_eta(a), _split_eta(b)
    if ea is not None and eb is not None and eb[0] != 0:
        return _eta_expr(ea[0] / eb[0], ea[1] + tuple((d, -r) for d, r in eb[1]), src, node)
    ta, tb = a.typ, b.typ
    if _is_zero(b):
        raise _err("zero-division", "division by 0", "", node)
    if tb.printed:
        raise _err("unsupported", "dividing by a printed expansion is not supported", "", node)
    printed = ta.printed
    if printed or _is_zero(a) or ta.weight is None or tb.weight is None:
        # A series-only factor (docs/method.md#series-only) has no weight either.
        weight = None
    else:
        weight = ta.weight - tb.weight
    den = tb.weight if tb.weight is not None and not isinstance(b, ir.Const) else Fraction(0)
    typ = ir.Typ(
        weight,
        ta.depth + tb.depth,
        _lcm(ta.level, tb.level),
        ta.den_weight + tb.den_weight + den,
        printed,
        ta.has_pole or not isinstance(b, ir.Const) or tb.has_pole,
        ta.mixed or tb.mixed,
    )
    if isinstance(a, ir.Const) and isinstance(b, ir.Const):
        return ir.Const(typ, src, a.value / b.value)
    return ir.Quotient(_check_size(typ, node), src, a, b)


def _pow(base: ir.Expr, exponent: Fraction | int, src: str, node: ast.Node) -> ir.Expr:
    if abs(Fraction(exponent)) > MAX_EXPONENT:
        raise _err("too-large", f"exponent {number_text(exponent)} exceeds the limit {MAX_EXPONENT}", "", node)
    tb = base.typ
    if isinstance(base, ir.QPower):
        return ir.QPower(tb, src, base.exponent * exponent)
    if isinstance(base, ir.Shift):
        from verifier.elaborate.idiom import shifted

        assert base.base is not None
        return shifted(_pow(base.base, exponent, src, node), base.exponent * exponent, src)
    if Fraction(exponent).denominator != 1:
        raise _err("unsupported", "only q may have a fractional exponent", "write integral powers of forms", node)
    e = int(exponent)
    eta = _split_eta(base)
    if eta is not None:
        c, params = eta
        if c == 0 and e < 0:
            raise _err("zero-division", "0 to a negative power", "", node)
        return _eta_expr(c**e, tuple((d, r * e) for d, r in params), src, node)
    if isinstance(base, ir.Const):
        if base.value == 0 and e < 0:
            raise _err("zero-division", "0 to a negative power", "", node)
        if abs(e) * max(abs(base.value.numerator), abs(base.value.denominator)).bit_length() > 200_000:
            raise _err("too-large", "this constant is too large", "", node)
        value = base.value**e
        return ir.Const(ir.Typ(None if value == 0 else Fraction(0)), src, value)
    weight = None if tb.weight is None else tb.weight * e
    if e >= 0:
        typ = ir.Typ(weight, tb.depth * e, tb.level, tb.den_weight * e, tb.printed, tb.has_pole, tb.mixed)
    else:
        if tb.printed:
            raise _err("unsupported", "negative powers of a printed expansion are not supported", "", node)
        den = (tb.weight or Fraction(0)) * (-e) + tb.den_weight * (-e)
        typ = ir.Typ(weight, tb.depth * (-e), tb.level, den, False, True, tb.mixed)
    return ir.Power(_check_size(typ, node), src, base, e)


def _split_eta(e: ir.Expr) -> tuple[Fraction, tuple[tuple[Fraction, int], ...]] | None:
    """``c * (eta quotient)`` as (c, params); None for anything else."""
    if isinstance(e, ir.Atom) and e.key == "eta":
        return Fraction(1), e.params
    if (
        isinstance(e, ir.Product)
        and isinstance(e.left, ir.Const)
        and isinstance(e.right, ir.Atom)
        and e.right.key == "eta"
    ):
        return e.left.value, e.right.params
    return None


def _eta_expr(c: Fraction, params: tuple[tuple[Fraction, int], ...], src: str, node: ast.Node) -> ir.Expr:
    """Products, quotients and powers of eta quotients are one eta quotient (no zeros on H)."""
    combined: dict[Fraction, int] = {}
    for d, r in params:
        combined[d] = combined.get(d, 0) + r
    canon = eta_params(combined)
    if abs(sum((abs(r) for _, r in canon), 0)) > MAX_EXPONENT:
        raise _err("too-large", f"eta exponents exceed the limit {MAX_EXPONENT}", "", node)
    if not canon:
        return ir.Const(ir.Typ(None if c == 0 else Fraction(0)), src, c)
    weight = Fraction(sum(r for _, r in canon), 2)
    atom = ir.Atom(_check_size(ir.Typ(weight), node), src, "eta", Fraction(1), canon)
    if c == 1:
        return atom
    return ir.Product(atom.typ if c else ir.Typ(None), src, ir.Const(ir.Typ(Fraction(0)), str(c), c), atom)


def degree(expr: ir.Expr) -> Fraction:
    """Highest power of q printed in ``expr`` (forms count as degree 0)."""
    if isinstance(expr, ir.QPower):
        return expr.exponent
    if isinstance(expr, ir.Const | ir.Atom):
        return Fraction(0)
    if isinstance(expr, ir.Sum):
        assert expr.left is not None and expr.right is not None
        return max(degree(expr.left), degree(expr.right))
    if isinstance(expr, ir.Product):
        assert expr.left is not None and expr.right is not None
        return degree(expr.left) + degree(expr.right)
    if isinstance(expr, ir.Quotient):
        assert expr.left is not None
        return degree(expr.left)
    if isinstance(expr, ir.Deriv | ir.Hecke):
        assert expr.base is not None
        return degree(expr.base)
    if isinstance(expr, ir.Power):
        assert expr.base is not None
        return degree(expr.base) * max(expr.exponent, 0)
    if isinstance(expr, ir.Shift):
        assert expr.base is not None
        return degree(expr.base) + max(expr.exponent, Fraction(0))
    return Fraction(0)


class AuthoredForms(Mapping[str, ir.Expr]):
    """The names the author gave a meaning, read-only: definitions, and every member f_k of
    a family the author defined (elaborated on first use).

    Readers outside the elaborator (the progression claims' product reader) look names up
    here before any built-in meaning, so an author's ``f_k := (q^{2k};q^{2k})_\\infty`` is never
    replaced by the usual shorthand.  A name whose definition could not be read is present,
    and looking it up raises :class:`ElaborationError`, so it is never read another way.
    """

    def __init__(self, elaborator: Elaborator) -> None:
        self._e = elaborator

    def __contains__(self, name: object) -> bool:
        if not isinstance(name, str):
            return False
        e = self._e
        return name in e.definitions or name in e.unread or e._family_member(name) is not None

    def __getitem__(self, name: str) -> ir.Expr:
        e = self._e
        if name in e.definitions:
            return e.definitions[name]
        if name in e.unread:
            hint = f"write the definition of {name} in notation qreferee reads"
            raise ElaborationError(Problem("unknown-symbol", e.unread[name], hint, (0, 0)))
        if e._family_member(name) is not None:
            return e._elaborate_member(name)
        raise KeyError(name)

    def __iter__(self) -> Iterator[str]:
        return iter(list(self._e.definitions))

    def __len__(self) -> int:
        return len(self._e.definitions)

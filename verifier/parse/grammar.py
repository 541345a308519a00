"""Load the claim grammar once and turn claim text into an AST.

The grammar file lives in the repository's ``grammar/`` folder and is shipped in the
wheel as ``verifier/_grammar/``.  Parsing is LALR(1); syntax errors become a
:class:`ParseFailure` with an offset, a message and a hint, never an exception.
"""

from __future__ import annotations

import functools
import math
import re
import threading
from dataclasses import dataclass
from fractions import Fraction
from pathlib import Path
from typing import Any

from verifier.limits import MAX_LITERAL_DIGITS, TooLarge
from verifier.parse import ast
from verifier.parse.shape import balance

GRAMMAR_FILE = "claim.lark"
MAX_BRACKET_INDEX = 1000
MAX_MODULUS_DIGITS = 40
_OPENERS = {"(": ")", "{": "}", "[": "]"}
_CLOSERS = {v: k for k, v in _OPENERS.items()}


def grammar_path() -> Path:
    """Where the grammar file is: inside the installed package, or in the source tree."""
    here = Path(__file__).resolve().parent.parent
    for candidate in (here / "_grammar" / GRAMMAR_FILE, here.parent / "grammar" / GRAMMAR_FILE):
        if candidate.is_file():
            return candidate
    raise FileNotFoundError(f"grammar file {GRAMMAR_FILE} not found next to {here}")


@functools.lru_cache(maxsize=1)
def _parser() -> Any:
    """The LALR parser, with :class:`_ToAst` run by the parser itself as it reduces (no parse tree)."""
    from lark import Lark

    parser = Lark(
        grammar_path().read_text(encoding="utf-8"),
        parser="lalr",
        lexer="contextual",
        start=["relation", "row", "definition", "definitions"],
        maybe_placeholders=False,
    )
    _install_reductions(parser, _TRANSFORMER)
    return parser


class _Reduced:
    """The value of one reduction and the text it covers (what a parse-tree node's meta gives).

    ``start_pos`` and ``end_pos`` include the brackets and keywords the grammar filters out,
    as lark's ``propagate_positions`` does; the transformer's methods read them as ``meta``.
    """

    __slots__ = ("end_pos", "start_pos", "value")

    def __init__(self, start_pos: int, end_pos: int) -> None:
        self.value: Any = None
        self.start_pos = start_pos
        self.end_pos = end_pos


def _install_reductions(parser: Any, impl: _ToAst) -> None:
    """Make every reduction of ``parser`` call the transformer's method for its rule.

    Lark builds a parse tree with one callback per grammar rule (filter the anonymous tokens,
    inline a ``?rule`` with one child, propagate positions).  These callbacks do the same and
    call :class:`_ToAst` at once, so no tree is built and walked a second time.  A method that
    raises :class:`_BadNumber` stops the transformation; the parse goes on, so that a syntax
    error later in the text is still reported first, as when the tree was transformed after
    parsing.
    """
    from lark import Tree

    table = parser._callbacks  # the dict the LALR parser reads its callbacks from
    replaced: dict[Any, Any] = {}
    for rule in parser.rules:
        if not rule.expansion:
            raise AssertionError(f"the grammar rule {rule} is empty: the reducer needs a position")
        name = rule.alias or rule.options.template_source or rule.origin.name
        keep = rule.options.keep_all_tokens
        # (index, whether the child is a rule lark inlines, such as the repetition in x (sep x)*)
        include = tuple(
            (i, not sym.is_term and sym.name.startswith("_"))
            for i, sym in enumerate(rule.expansion)
            if keep or not (sym.is_term and sym.filter_out)
        )
        inline = bool(rule.options.expand1 and not rule.alias)
        method = getattr(impl, str(name), None)
        replaced[rule] = _reduction(str(name), include, inline, method, impl, Tree)
    table.clear()
    table.update(replaced)


def _reduction(
    name: str, include: tuple[tuple[int, bool], ...], inline: bool, method: Any, impl: _ToAst, tree: Any
) -> Any:
    plain = tuple(i for i, _ in include) if not any(expand for _, expand in include) else None

    def reduce(children: list[Any]) -> _Reduced:
        out = _Reduced(children[0].start_pos, children[-1].end_pos)
        if impl.failed is not None:
            return out
        if plain is not None:
            items = [children[i] for i in plain]
            for k, c in enumerate(items):
                if type(c) is _Reduced:
                    items[k] = c.value
        else:
            items = []
            for i, expand in include:
                c = children[i]
                value = c.value if type(c) is _Reduced else c
                if expand:
                    items.extend(value.children)
                else:
                    items.append(value)
        if inline and len(items) == 1:
            out.value = items[0]
        elif method is None:
            out.value = tree(name, items)
        else:
            try:
                out.value = method(out, items)
            except _BadNumber as exc:
                impl.failed = exc
        return out

    return reduce


class _BadNumber(ValueError):
    def __init__(
        self, message: str, offset: int, code: str = "syntax", hint: str = "write a nonzero denominator"
    ) -> None:
        super().__init__(message)
        self.offset = offset
        self.code = code
        self.hint = hint


@dataclass(frozen=True)
class ParseFailure:
    """A syntax error at ``offset`` in the claim text."""

    code: str
    message: str
    hint: str
    offset: int


def parse_claim(text: str, exponentials: frozenset[str] = frozenset()) -> ast.Relation | ParseFailure:
    """Parse the body of a claim (``A = B``, ``A \\neq B``, chains)."""
    result = _parse(text, "relation", exponentials)
    assert isinstance(result, ast.Relation | ParseFailure)
    return result


def parse_row(text: str, exponentials: frozenset[str] = frozenset()) -> ast.Row | ParseFailure:
    """Parse one row of a display: statements, separators and qualifiers (docs/method.md#layout)."""
    result = _parse(text, "row", exponentials)
    assert isinstance(result, ast.Row | ParseFailure)
    return result


def parse_definition(text: str, exponentials: frozenset[str] = frozenset()) -> ast.Definition | ParseFailure:
    """Parse the body of a define tag (``NAME = expr`` or ``NAME(\\tau) = expr``)."""
    result = _parse(text, "definition", exponentials)
    assert isinstance(result, ast.Definition | ParseFailure)
    return result


def parse_definitions(
    text: str, exponentials: frozenset[str] = frozenset()
) -> tuple[ast.Definition, ...] | ParseFailure:
    """Parse the author's definitions of one row (``X = a, \\quad Y(\\tau) = b``)."""
    result = _parse(text, "definitions", exponentials)
    if isinstance(result, ParseFailure):
        return result
    assert isinstance(result, ast.Definitions)
    return result.items


def _modulus_value(text: str) -> int:
    """The modulus of a ``\\pmod`` token: an integer or a product of powers ``2^{8} \\cdot 3``.

    -1 when it has more than MAX_MODULUS_DIGITS digits (decided before any power is formed).
    """
    body = text[text.index("mod") + 3 :]
    value = 1
    for factor in re.split(r"\\cdot|\\times", body):
        numbers = re.findall(r"\d+", factor)
        base, exponent = int(numbers[0][: MAX_MODULUS_DIGITS + 1]), int(numbers[1]) if len(numbers) > 1 else 1
        if len(numbers[0]) > MAX_MODULUS_DIGITS or (base > 1 and exponent * math.log10(base) > MAX_MODULUS_DIGITS):
            return -1
        value *= base**exponent
        if len(str(value)) > MAX_MODULUS_DIGITS:
            return -1
    return value


MEMO_TEXT_LIMIT = 2000  # longer texts (machine-made claims) are parsed each time, not kept


def _parse(text: str, start: str, exponentials: frozenset[str] = frozenset()) -> ast.Node | ParseFailure:
    """The AST of ``text`` from rule ``start``; the same text is parsed once per process.

    Rows repeat within a manuscript and across the checks of an editor session; the result
    depends only on the arguments, and ASTs and failures are immutable, so they are shared.
    """
    if len(text) > MEMO_TEXT_LIMIT:
        return _parse_text(text, start, exponentials)
    return _parse_memo(text, start, exponentials)


def _parse_text(text: str, start: str, exponentials: frozenset[str]) -> ast.Node | ParseFailure:
    from lark.exceptions import UnexpectedCharacters, UnexpectedEOF, UnexpectedToken

    if not text.strip():
        return ParseFailure("empty-claim", "the tagged display is empty", "put the identity inside the display", 0)
    bad = _check_brackets(text)
    if bad is not None:
        return bad
    parser = _parser()
    with _LOCK:
        _TRANSFORMER.reset(text, exponentials)
        try:
            reduced = parser.parse(text, start=start)
        except UnexpectedCharacters as exc:
            pos = int(exc.pos_in_stream or 0)
            ch = text[pos] if pos < len(text) else ""
            return ParseFailure("syntax", f"unexpected character {ch!r}", _hint_for_char(ch), pos)
        except UnexpectedEOF:
            return _eof_failure(text, start)
        except UnexpectedToken as exc:
            if exc.token.type == "$END":
                return _eof_failure(text, start)
            pos = exc.token.start_pos if exc.token.start_pos is not None else 0
            return ParseFailure("syntax", f"unexpected {exc.token.value!r}", _hint_for_token(exc), pos)
        failed = _TRANSFORMER.failed
    if failed is not None:
        return _number_failure(failed)
    node = reduced.value
    assert isinstance(node, ast.Node)
    try:
        return balance(node)
    except TooLarge as exc:
        return ParseFailure("too-large", str(exc), "split the claim into smaller ones", 0)


_parse_memo = functools.lru_cache(maxsize=4096)(_parse_text)


def _number_failure(bad: _BadNumber) -> ParseFailure:
    return ParseFailure(bad.code, str(bad), bad.hint, bad.offset)


def _eof_failure(text: str, start: str) -> ParseFailure:
    stripped = text.rstrip()
    if start == "relation" and not any(r in text for r in ("=", "\\ne", "\\in")):
        return ParseFailure(
            "no-relation",
            "a claim needs '=' or '\\neq' between two sides",
            "write the identity as LEFT = RIGHT",
            len(stripped),
        )
    return ParseFailure(
        "incomplete",
        "the claim ends in the middle of an expression",
        "complete the last term",
        len(stripped),
    )


def _check_brackets(text: str) -> ParseFailure | None:
    """Unbalanced brackets get a message that points at the bracket itself."""
    stack: list[tuple[str, int]] = []
    i = 0
    while i < len(text):
        ch = text[i]
        if ch == "\\" and i + 1 < len(text) and text[i + 1] in "{}":
            i += 2
            continue
        if ch in _OPENERS:
            stack.append((ch, i))
        elif ch in _CLOSERS:
            if not stack or stack[-1][0] != _CLOSERS[ch]:
                return ParseFailure(
                    "brackets",
                    f"{ch!r} closes nothing",
                    "remove it or add the matching opening bracket",
                    i,
                )
            stack.pop()
        i += 1
    if stack:
        ch, pos = stack[-1]
        return ParseFailure("brackets", f"{ch!r} is never closed", f"add the matching {_OPENERS[ch]!r}", pos)
    return None


def _hint_for_char(ch: str) -> str:
    if ch == "&":
        return "'&' is only meaningful inside align-like environments"
    if ch in "<>":
        return "only '=' and '\\neq' relations are claims"
    if ch == "\\":
        return "a backslash must start a command such as \\frac or \\Delta"
    return "the claim language has numbers, forms, q, + - \\cdot / ^, \\frac, brackets, \\cdots and O(q^n)"


def _hint_for_token(exc: Any) -> str:
    expected = sorted(exc.expected) if getattr(exc, "expected", None) else []
    if exc.token.type == "DIGIT" or exc.token.type == "INT":
        return "a number must follow an operator or start a term"
    if "RBRACE" in expected or "RPAR" in expected:
        return "an expression is incomplete before the closing bracket"
    if exc.token.type in ("PLUS", "MINUS", "SLASH", "CIRCUMFLEX"):
        return "an operator is missing its operand"
    return "check the expression around this point"


def _constant(node: ast.Node) -> Fraction | None:
    """An exponent made of numbers only is folded at parse time (ast.constant_value)."""
    try:
        return ast.constant_value(node)
    except ZeroDivisionError as exc:
        raise _BadNumber("an exponent has denominator 0", node.span[0]) from exc
    except TooLarge as exc:
        raise _BadNumber(str(exc), node.span[0], "too-large", "exponents must stay small enough to compute") from exc


def _literal(digits: str, offset: int) -> int:
    """A number written in the claim, refused before conversion if it has too many digits."""
    if len(digits) > MAX_LITERAL_DIGITS:
        raise _BadNumber(
            f"a number of {len(digits)} digits is written here (the limit is {MAX_LITERAL_DIGITS})",
            offset,
            "too-large",
            "claims about numbers this large are not checked",
        )
    return int(digits)


def _symbol(tok: Any) -> str:
    """The name a NAME-like token stands for (the overpartition function in any spelling is ``\\pbar``)."""
    return ast.PBAR if tok.type == "OVERPARTITION" else str(tok)


def _span(meta: Any) -> ast.Span:
    return (meta.start_pos, meta.end_pos)


def _tok_span(tok: Any) -> ast.Span:
    return (tok.start_pos, tok.end_pos)


def _normal_arg(arg: str) -> str:
    """``(\\tau)``, ``(z)``, ``(w)``, ``(q)`` -> ``"tau"`` (``"z"``, ``"q"`` kept for messages);
    ``(2z)``, ``(q^2)`` -> ``"2tau"``; ``(\\tau/2)``, ``(\\frac{\\tau}{2})`` -> ``"tau/2"``."""
    inner = arg.strip()[1:-1].replace(" ", "").replace("\\tau", "tau")
    if inner in ("z", "w"):
        return "z"
    if "+" in inner:  # (\tau + 1/2), (z + \frac{1}{2}): the grammar's ARG admits only a half
        return "tau+1/2"
    m = re.fullmatch(r"q\^\{?(\d+)\}?", inner)
    if m:
        return f"{m.group(1)}tau"
    m = re.fullmatch(r"\\[dt]?frac\{(\d*)(?:tau|z|w)\}\{(\d+)\}", inner)
    if m:
        return f"{m.group(1)}tau/{m.group(2)}"
    return re.sub(r"(?<![a-z])[zw](?![a-z])", "tau", inner)


_TAU_NAMES = frozenset({"\\tau", "z", "w"})


def _letter(node: ast.Node) -> bool:
    return isinstance(node, ast.Name) and node.arg is None and len(node.text) == 1


def _arg_multiple(arg: str) -> Fraction | None:
    """The d of a normalised argument ``tau``, ``2tau``, ``tau/2`` (``z`` is tau); None otherwise."""
    top, _, bottom = ("tau" if arg == "z" else arg).partition("/")
    factor = top.removesuffix("tau")
    if factor == top or not (factor == "" or factor.isdigit()) or not (bottom == "" or bottom.isdigit()):
        return None
    if int(factor or 1) == 0 or int(bottom or 1) == 0:
        return None
    return Fraction(int(factor or 1), int(bottom or 1))


def _is_exponential(body: ast.Node, var: str) -> bool:
    """Whether ``body`` is ``e^{2 pi i var}`` or ``\\exp(2 pi i var)`` (the definition of e(x))."""
    if isinstance(body, ast.Power) and isinstance(body.base, ast.Name) and body.base.text == "e":
        inner = body.exponent
    elif isinstance(body, ast.Call) and body.name == "\\exp":
        inner = body.argument
    else:
        return False
    return isinstance(inner, ast.Node) and _multiple_of(inner, frozenset({var}), ("\\pi", "i"), Fraction(1, 2)) == 1


def _nome_exponent(node: ast.Node) -> ast.Node | Fraction | None:
    """The exponent of q in ``e^{2 pi i X tau}`` (``\\exp(...)``): X, or None if ``node`` is not of that form.

    ``node`` must be a product of rational constants, one ``\\pi``, one ``i``, one of
    \\tau, z, w, and optionally other letters (a summation variable), possibly divided by a
    constant and negated: e^{2 pi i n z} is q^n, e^{pi i tau/12} is q^{1/24}.
    """
    return _multiple_of(node, _TAU_NAMES, ("\\pi", "i"), Fraction(1, 2))


def _multiple_of(
    node: ast.Node, variables: frozenset[str], constants: tuple[str, ...], scale: Fraction
) -> ast.Node | Fraction | None:
    """X in ``node = X * v * constants`` (v one of ``variables``, each constant once), times ``scale``.

    X is a rational number, or a product of letters and their numeric powers times a rational;
    None when ``node`` is not of that form.
    """
    sign = 1
    while isinstance(node, ast.Neg):
        sign, node = -sign, node.operand
    scale *= sign
    if isinstance(node, ast.BinOp) and node.op == "/":
        den = ast.constant_value(node.right) if not isinstance(node.right, ast.Name) else None
        if not den:
            return None
        scale /= den
        node = node.left
    factors = ast.factors(node)
    names = [f.text for f in factors if isinstance(f, ast.Name)]
    if any(names.count(c) != 1 for c in constants) or sum(names.count(t) for t in variables) != 1:
        return None
    rest: list[ast.Node] = []
    for f in factors:
        if isinstance(f, ast.Name) and (f.text in constants or f.text in variables) and f.arg is None:
            continue
        value = ast.constant_value(f)
        if value is not None:
            scale *= value
        elif _letter(f) or (isinstance(f, ast.Power) and _letter(f.base) and isinstance(f.exponent, Fraction)):
            rest.append(f)  # a summation variable, or a power of one: e^{2 pi i n^2 tau} is q^{n^2}
        else:
            return None
    if not rest:
        return scale
    out: ast.Node = rest[0]
    for f in rest[1:]:
        out = ast.BinOp(out.span, "*", out, f)
    if scale != 1:
        c: ast.Node = ast.Number(out.span, abs(scale.numerator))
        if scale.denominator != 1:
            c = ast.BinOp(out.span, "/", c, ast.Number(out.span, scale.denominator))
        out = ast.BinOp(out.span, "*", c, out)
        if scale < 0:
            out = ast.Neg(out.span, out)
    return out


class _ToAst:
    """One method per grammar rule; each returns an AST node with its span."""

    def relation(self, meta: Any, items: list[Any]) -> ast.Relation:
        domain = None
        if items and getattr(items[-1], "type", "") == "DOMAIN":
            domain = " ".join(re.sub(r"^(,|\s|\\q?quad(?![A-Za-z]))*", "", str(items.pop())).split())
        sides = tuple(items[0::2])
        rels = tuple({"=": "=", "\\equiv": "≡"}.get(str(r), "!=") for r in items[1::2])
        return ast.Relation(_span(meta), sides, rels, domain)

    # -- claims about a space of forms ------------------------------------------
    def membership(self, meta: Any, items: list[Any]) -> ast.SpaceClaim:
        form, _, space = items
        return ast.SpaceClaim(_span(meta), "membership", form, str(space), space.start_pos)

    def dimension(self, meta: Any, items: list[Any]) -> ast.SpaceClaim:
        _, space, value = items
        return ast.SpaceClaim(_span(meta), "dimension", None, str(space), space.start_pos, int(str(value)))

    def eigenform(self, meta: Any, items: list[Any]) -> ast.SpaceClaim:
        return ast.SpaceClaim(_span(meta), "eigenform", items[0])

    # -- the layout of a row (docs/method.md#layout) -----------------------------
    def row(self, meta: Any, items: list[Any]) -> ast.Row:
        return _group_row(_span(meta), items)

    def row_next(self, meta: Any, items: list[Any]) -> tuple[str, Any]:
        return ("next", items[-1])

    def row_iff(self, meta: Any, items: list[Any]) -> tuple[str, Any]:
        return ("iff", items[-1])

    def row_qualifier(self, meta: Any, items: list[Any]) -> tuple[str, Any]:
        return ("qualifier", items[-1])

    def q_modulus(self, meta: Any, items: list[Any]) -> tuple[str, int]:
        # -1 stands for a modulus too large to check; 0 is reported as such (api._claim).
        return ("modulus", _modulus_value(str(items[0])))

    def q_range(self, meta: Any, items: list[Any]) -> tuple[str, tuple[str, int]]:
        m = _RANGE_PARTS.search(str(items[0]))
        assert m is not None
        return ("start", (m.group(1), int(m.group(2))))

    def q_range_bare(self, meta: Any, items: list[Any]) -> tuple[str, tuple[str, int]]:
        name = next(t for t in items if getattr(t, "type", "") == "NAME")
        return ("start", (str(name), items[-1]))

    def q_residues(self, meta: Any, items: list[Any]) -> tuple[str, tuple[str, tuple[int, ...]]]:
        name = next(t for t in items if getattr(t, "type", "") == "NAME")
        return ("residues", (str(name), items[-1]))

    def q_class(self, meta: Any, items: list[Any]) -> tuple[str, ast.NClass]:
        return ("class", _class_of(str(items[0]), meta.start_pos))

    def q_class_range(self, meta: Any, items: list[Any]) -> tuple[str, tuple[ast.NClass, tuple[str, int]]]:
        # (n \equiv 1 \pmod 8, \ n \ge 5): the class and the range, split by _grouped_row.
        text = str(items[0])
        found = _RANGE_INSIDE.search(text)
        assert found is not None, text
        rest = text[: found.start()] + text[found.end() :]
        return ("class+start", (_class_of(rest, meta.start_pos), (found.group(1), int(found.group(2)))))

    def residue_values(self, meta: Any, items: list[Any]) -> tuple[int, ...]:
        # In the author's order, without repeats.
        return tuple(dict.fromkeys(_literal(str(t), t.start_pos) for t in items))

    def signed_int(self, meta: Any, items: list[Any]) -> int:
        value = int(str(items[-1]))
        return -value if self.text[meta.start_pos : meta.end_pos].lstrip().startswith("-") else value

    def rel(self, meta: Any, items: list[Any]) -> str:
        return str(items[0])

    def expression(self, meta: Any, items: list[Any]) -> ast.Node:
        node: ast.Node = items[0]
        return node

    def definition(self, meta: Any, items: list[Any]) -> ast.Definition:
        name_tok = items[0]
        arg = _normal_arg(str(items[1])) if len(items) == 3 else None
        return ast.Definition(_span(meta), str(name_tok), _tok_span(name_tok), items[-1], arg)

    def definition_of_variable(self, meta: Any, items: list[Any]) -> ast.Definition:
        name_tok, var_tok, body = items
        var = str(var_tok)
        return ast.Definition(_span(meta), str(name_tok), _tok_span(name_tok), body, var, _is_exponential(body, var))

    def definitions(self, meta: Any, items: list[Any]) -> ast.Definitions:
        return ast.Definitions(_span(meta), tuple(i for i in items if isinstance(i, ast.Definition)))

    def neg(self, meta: Any, items: list[Any]) -> ast.Neg:
        return ast.Neg(_span(meta), items[0])

    def _bin(self, op: str, meta: Any, left: ast.Node, right: ast.Node) -> ast.BinOp:
        return ast.BinOp(_span(meta), op, left, right)

    def add(self, meta: Any, items: list[Any]) -> ast.BinOp:
        return self._bin("+", meta, items[0], items[1])

    def sub(self, meta: Any, items: list[Any]) -> ast.BinOp:
        return self._bin("-", meta, items[0], items[1])

    text: str = ""
    failed: _BadNumber | None = None

    exponentials: frozenset[str] = frozenset()

    def reset(self, text: str, exponentials: frozenset[str]) -> None:
        """Start on a new claim text; ``exponentials`` are the names the document defines as e(x) = e^{2 pi i x}."""
        self.text = text
        self.name_poch = set()
        self.failed = None
        self.exponentials = exponentials

    def _exponential(self, name: str, argument: ast.Node | str, meta: Any) -> ast.Node | None:
        """``e(n\\tau)`` as ``q^n`` where the document defines e(x) = e^{2 pi i x}; None for another name.

        Without that definition, ``e(...)`` of a multiple of tau is an error that asks for it
        (docs/method.md#exponential-notation): qreferee does not guess what e means.
        """
        if name not in self.exponentials and name != "e":
            return None
        if isinstance(argument, str):  # (\tau), (2\tau), (\tau/2), (q^2): the normalised ARG
            exponent: ast.Node | Fraction | None = _arg_multiple(argument)
        else:
            exponent = _multiple_of(argument, _TAU_NAMES, (), Fraction(1))
        if name not in self.exponentials:
            if exponent is None:
                return None
            raise _BadNumber(
                f"{name}(...) of a multiple of \\tau: the document does not say what {name} means",
                meta.start_pos,
                "unknown-symbol",
                f"define it before the claim, e.g. $\\mathbf{{{name}}}(x) := e^{{2\\pi i x}}$, or write q^n",
            )
        if exponent is None:
            raise _BadNumber(
                f"{name}(...) is read only at a multiple of \\tau ({name}(n\\tau) = q^n)",
                meta.start_pos,
                "unsupported-notation",
                f"write {name}(n\\tau), or the power of q it stands for",
            )
        return ast.Power(_span(meta), ast.Name(_span(meta), "q"), exponent)

    def imul(self, meta: Any, items: list[Any]) -> ast.Node:
        left, right = items
        if (
            isinstance(left, ast.Number)
            and isinstance(right, ast.Number)
            and not self.text[left.span[1] : right.span[0]].strip()
        ):
            # In math mode TeX ignores spaces: '196 884' and '196\,884' print one number.
            digits = "".join(self.text[left.span[0] : right.span[1]].split())
            return ast.Number((left.span[0], right.span[1]), _literal(digits, left.span[0]))
        return self._bin("*", meta, left, right)

    def mul(self, meta: Any, items: list[Any]) -> ast.BinOp:
        return self._bin("*", meta, items[0], items[-1])

    def div(self, meta: Any, items: list[Any]) -> ast.BinOp:
        return self._bin("/", meta, items[0], items[1])

    def frac(self, meta: Any, items: list[Any]) -> ast.BinOp:
        return self._bin("/", meta, items[-2], items[-1])

    def pow(self, meta: Any, items: list[Any]) -> ast.Node:
        base = items[0]
        if isinstance(base, ast.KroneckerSymbol):
            raise _BadNumber(
                "a power of a bracketed fraction: a Kronecker symbol or a fraction?",
                base.span[0],
                "ambiguous-notation",
                "write \\chi_{D}(n) for the symbol (D/n), or the fraction without brackets",
            )
        if isinstance(base, ast.Name) and base.text == "e" and isinstance(items[1], ast.Node):
            # e^{2\\pi i n z} is q^n (the author's variable; docs/method.md#products).
            exponent = _nome_exponent(items[1])
            if exponent is not None:
                return ast.Power(_span(meta), ast.Name(base.span, "q"), exponent)
        if isinstance(base, ast.BinOp) and base.span in self.name_poch:
            # q(q;q)_\infty^{24}: the power belongs to the symbol, as it is typeset.
            return ast.BinOp(_span(meta), "*", base.left, ast.Power(_span(meta), base.right, items[1]))
        return ast.Power(_span(meta), base, items[1])

    def pow_arg(self, meta: Any, items: list[Any]) -> ast.Node:
        # E_4^2(\tau): the argument belongs to the base, the power to the value.
        base = items[0]
        if isinstance(base, ast.Name) and base.arg is None:
            base = ast.Name(base.span, base.text, _normal_arg(str(items[2])))
        return ast.Power(_span(meta), base, items[1])

    def exp_digit(self, meta: Any, items: list[Any]) -> Fraction:
        return Fraction(int(str(items[0])))

    def paren(self, meta: Any, items: list[Any]) -> ast.Node:
        """``( expr )``; a bracketed ``\\frac`` of a number and a letter is a Kronecker symbol."""
        inner: ast.Node = items[0]
        symbol = _kronecker_symbol(self.text[meta.start_pos : meta.end_pos], _span(meta), meta.start_pos)
        return inner if symbol is None else symbol

    def call(self, meta: Any, items: list[Any]) -> ast.Node:
        if str(items[0]) == "\\exp":
            exponent = _nome_exponent(items[1])
            if exponent is not None:
                # \\exp(2\\pi i n\\tau) is q^n.
                return ast.Power(_span(meta), ast.Name(_tok_span(items[0]), "q"), exponent)
        name = _symbol(items[0])
        power = self._exponential(name, items[1], meta)
        if power is not None:
            return power
        return ast.Call(_span(meta), name, _tok_span(items[0]), items[1])

    def big_sum(self, meta: Any, items: list[Any]) -> ast.BigSum:
        index, upper = items[0]
        kind, var, lower = index[:3]
        extra = index[3:]
        if len(extra) >= 1 and extra[0] is not None:
            upper = extra[0]
        var2 = extra[1] if len(extra) > 1 else ""
        parity = extra[2] if len(extra) > 2 else ""
        coefficients = extra[3] if len(extra) > 3 else (1, 1)
        more = extra[4] if len(extra) > 4 else ()
        step = extra[5] if len(extra) > 5 else 0
        if kind == "from" and upper is None:
            kind = "at_least"  # \sum_{n=1}^{\infty}
        return ast.BigSum(_span(meta), kind, var, lower, upper, items[1], var2, parity, coefficients, more, step)

    def sum_op(self, meta: Any, items: list[Any]) -> tuple[tuple[Any, ...], ast.Node | None]:
        return tuple(items[0]), (items[1] if len(items) > 1 else None)

    def index_from(self, meta: Any, items: list[Any]) -> tuple[str, str, ast.Node]:
        return "from", str(items[0]), items[-1]

    def index_divides(self, meta: Any, items: list[Any]) -> tuple[str, str, ast.Node]:
        return "divides", str(items[0]), items[-1]

    def index_at_least(self, meta: Any, items: list[Any]) -> tuple[str, str, ast.Node]:
        return "at_least", str(items[0]), items[-1]

    def index_above(self, meta: Any, items: list[Any]) -> tuple[str, str, ast.Node]:
        """``n > a`` with an integer a is ``n >= a + 1``."""
        bound = items[-1]
        if not isinstance(bound, ast.Number):
            raise _BadNumber(
                "a sum over n > a needs an integer a", meta.start_pos, "unsupported-notation", "write \\sum_{n \\ge 1}"
            )
        return "at_least", str(items[0]), ast.Number(bound.span, bound.value + 1)

    def index_naturals(self, meta: Any, items: list[Any]) -> tuple[str, str, ast.Node]:
        var = str(items[0])
        raise _BadNumber(
            "a sum over the natural numbers: whether n = 0 is included differs between authors",
            meta.start_pos,
            "ambiguous-notation",
            f"write \\sum_{{{var} \\ge 1}} or \\sum_{{{var} \\ge 0}}",
        )

    # -- the q-series idiom (docs/method.md#products, #sums-over-z) -----------------
    def big_prod(self, meta: Any, items: list[Any]) -> ast.BigProd:
        index, upper = items[0]
        if index[0] not in ("from", "at_least"):
            raise _BadNumber("a product runs over n >= a or n = a .. b", meta.start_pos, hint="write \\prod_{n \\ge 1}")
        _, var, lower = index[:3]
        kind = "at_least" if upper is None else index[0]
        return ast.BigProd(_span(meta), kind, var, lower, upper, items[1])

    def prod_op(self, meta: Any, items: list[Any]) -> tuple[Any, ast.Node | None]:
        return items[0], (items[1] if len(items) > 1 else None)

    def pochhammer(self, meta: Any, items: list[Any]) -> ast.Pochhammer:
        sep = next(i for i, x in enumerate(items) if getattr(x, "type", "") == "SEP")
        if str(items[sep]).strip() != ";":
            raise _BadNumber(
                "a q-Pochhammer symbol is written (a;q)_n", items[sep].start_pos, hint="write (a;q)_\\infty"
            )
        bases, nome, length = items[:sep], items[sep + 1], items[sep + 2]
        return ast.Pochhammer(_span(meta), tuple(bases), nome, length)

    def name_pochhammer(self, meta: Any, items: list[Any]) -> ast.BinOp:
        # q(q;q)_\infty: a name before a q-Pochhammer symbol multiplies it.
        node = ast.BinOp(_span(meta), "*", ast.Name(_tok_span(items[0]), str(items[0])), items[1])
        self.name_poch.add(node.span)
        return node

    name_poch: set[ast.Span]

    def poch_infinite(self, meta: Any, items: list[Any]) -> None:
        return None

    def poch_digit(self, meta: Any, items: list[Any]) -> ast.Node:
        return ast.Number(_tok_span(items[0]), int(str(items[0])))

    def poch_name(self, meta: Any, items: list[Any]) -> ast.Node:
        return ast.Name(_tok_span(items[0]), str(items[0]))

    def poch_expr(self, meta: Any, items: list[Any]) -> ast.Node:
        node: ast.Node = items[0]
        return node

    def index_pass(self, meta: Any, items: list[Any]) -> tuple[Any, ...]:
        return tuple(items[0])

    def index_integers(self, meta: Any, items: list[Any]) -> tuple[Any, ...]:
        return ("integers", str(items[0]), None)

    def index_lattice(self, meta: Any, items: list[Any]) -> tuple[Any, ...]:
        """``x, y, z \\in \\mathbb Z`` (optionally ``\\mathbb Z^3``): a lattice sum in every variable."""
        names = [str(t) for t in items if getattr(t, "type", "") == "NAME"]
        power = [t for t in items if isinstance(t, int)]
        if power and power[0] != len(names):
            raise _BadNumber(
                f"{len(names)} variables summed over Z^{power[0]}",
                meta.start_pos,
                hint="write as many variables as the power of Z",
            )
        if len(set(names)) != len(names):
            raise _BadNumber("a variable is named twice in a lattice sum", meta.start_pos, hint="")
        return ("lattice", names[0], None, None, names[1], "", (1, 1), tuple(names[2:]))

    def index_pair_at_least(self, meta: Any, items: list[Any]) -> tuple[Any, ...]:
        return ("pair", str(items[0]), items[-1], None, str(items[1]))

    def index_between(self, meta: Any, items: list[Any]) -> tuple[Any, ...]:
        low = ast.Number(_tok_span(items[0]), int(str(items[0])))
        return ("between", str(items[2]), low, items[-1])

    def index_between_closed(self, meta: Any, items: list[Any]) -> tuple[Any, ...]:
        low = ast.Number(_tok_span(items[0]), int(str(items[0])))
        return ("between_closed", str(items[2]), low, items[-1])

    def index_below(self, meta: Any, items: list[Any]) -> tuple[Any, ...]:
        return ("below", str(items[0]), None, items[-1])

    def index_divides_parity(self, meta: Any, items: list[Any]) -> tuple[Any, ...]:
        var, _, target, var2, parity = items
        if str(var2) != str(var):
            raise _BadNumber(
                f"the condition names {var2}, not the summation variable {var}",
                meta.start_pos,
                hint=f"write \\sum_{{{var} \\mid n, {var} \\text{{ odd}}}}",
            )
        word = "odd" if "odd" in str(parity) else "even"
        return ("divides_parity", str(var), target, None, "", word)

    def index_divides_step(self, meta: Any, items: list[Any]) -> tuple[Any, ...]:
        """``d | n, M | d`` and ``d | n, M \\nmid d``; M = 2 is the parity condition (d even, d odd)."""
        var, _, target, step_tok, relation, var2 = items
        if str(var2) != str(var):
            raise _BadNumber(
                f"the condition names {var2}, not the summation variable {var}",
                meta.start_pos,
                hint=f"write \\sum_{{{var} \\mid n,\\ 4 \\nmid {var}}}",
            )
        step = _literal(str(step_tok), step_tok.start_pos)
        negated = relation.type == "NMID"
        if step < 1:
            raise _BadNumber("a divisibility condition needs a positive modulus", step_tok.start_pos)
        if step == 2:
            return ("divides_parity", str(var), target, None, "", "odd" if negated else "even")
        return ("divides_step", str(var), target, None, "", "not" if negated else "", (1, 1), (), step)

    def index_split(self, meta: Any, items: list[Any]) -> tuple[Any, ...]:
        a, b, total, c, d = (t for t in items if getattr(t, "type", "") == "NAME")
        low = items[-1]
        if {str(a), str(b)} != {str(c), str(d)}:
            raise _BadNumber(
                "the range must name the two summation variables",
                meta.start_pos,
                hint="write \\sum_{\\substack{a+b=n \\\\ a,b \\ge 1}}",
            )
        return ("split", str(a), low, ast.Name(_tok_span(total), str(total)), str(b))

    def index_linear(self, meta: Any, items: list[Any]) -> tuple[Any, ...]:
        (c1, v1), (c2, v2), total = items
        name = ast.Name(_tok_span(total), str(total))
        return ("linear", v1, None, name, v2, "", (c1, c2))

    def lin_var(self, meta: Any, items: list[Any]) -> tuple[int, str]:
        return (int(str(items[0])) if len(items) == 2 else 1), str(items[-1])

    def sum_upper(self, meta: Any, items: list[Any]) -> ast.Node | None:
        item = items[0]
        if getattr(item, "type", "") == "INFTY":
            return None
        if getattr(item, "type", "") == "DIGIT":
            return ast.Number(_tok_span(item), int(str(item)))
        if getattr(item, "type", "") == "NAME":
            return ast.Name(_tok_span(item), str(item))
        node: ast.Node = item
        return node

    def exp_name(self, meta: Any, items: list[Any]) -> ast.Node:
        return ast.Name(_tok_span(items[0]), str(items[0]))

    def exp_expr(self, meta: Any, items: list[Any]) -> Fraction | ast.Node:
        value = _constant(items[0])
        return value if value is not None else items[0]

    def integer(self, meta: Any, items: list[Any]) -> ast.Number:
        return ast.Number(_tok_span(items[0]), _literal(str(items[0]), items[0].start_pos))

    def decimal(self, meta: Any, items: list[Any]) -> ast.Decimal:
        return ast.Decimal(_tok_span(items[0]), str(items[0]))

    def name(self, meta: Any, items: list[Any]) -> ast.Name:
        return ast.Name(_tok_span(items[0]), _symbol(items[0]))

    def name_arg(self, meta: Any, items: list[Any]) -> ast.Node:
        arg = _normal_arg(str(items[1]))
        power = self._exponential(str(items[0]), arg, meta)
        if power is not None:
            return power
        return ast.Name(_span(meta), str(items[0]), arg)

    def prime(self, meta: Any, items: list[Any]) -> ast.Prime:
        return ast.Prime(_span(meta), items[0])

    def bracket(self, meta: Any, items: list[Any]) -> ast.Bracket:
        return ast.Bracket(_span(meta), items[0], items[1], items[2])

    def bracket_index(self, meta: Any, items: list[Any]) -> int:
        n = _literal(str(items[0]), items[0].start_pos)
        if n > MAX_BRACKET_INDEX:
            raise _BadNumber(
                f"a bracket of order {n} (the limit is {MAX_BRACKET_INDEX})", items[0].start_pos, "too-large", ""
            )
        return n

    def dots(self, meta: Any, items: list[Any]) -> ast.Dots:
        return ast.Dots(_span(meta))

    def big_o(self, meta: Any, items: list[Any]) -> ast.BigO:
        return ast.BigO(_span(meta), items[-1])


_CLASS_VAR = r"([a-z])"
_CLASS_PARITY = re.compile(r"(odd|even)")
_CLASS_RESIDUES = re.compile(r"([a-z])\s*\\equiv\s*(-?\d+(?:\s*,\s*-?\d+)*)")
_CLASS_GCD = re.compile(r"\(\s*(?:([a-z])\s*,\s*(\d+)|(\d+)\s*,\s*([a-z]))\s*\)\s*=")
_CLASS_NMID = re.compile(r"(\d+)\s*\\n?o?t?\s*\\?(?:nmid|mid|\|)?\s*([a-z])\s*\)?\s*$")
_CLASS_SYMBOL = re.compile(r"\{\s*([a-z])\s*\}\s*\{\s*(\d+)\s*\}\s*\)\s*=\s*([-+]?\s*1|0)")
MAX_CLASS_MODULUS = 10_000  # a class of n mod m is decided by its residues: m stays small


def _class_of(text: str, offset: int) -> ast.NClass:
    """The class of n a qualifier token states (grammar terminal NCLASS; docs/method.md#classes-of-n)."""
    from verifier.numbers import kronecker

    def modulus(digits: str | int) -> int:
        m = digits if isinstance(digits, int) else _literal(digits, offset)
        if not 2 <= m <= MAX_CLASS_MODULUS:
            raise _BadNumber(
                f"a class of n modulo {m} is not read (the modulus must lie between 2 and {MAX_CLASS_MODULUS})",
                offset,
                "unsupported",
                "write a class modulo a small integer m >= 2",
            )
        return m

    if "frac" in text:
        found = _CLASS_SYMBOL.search(text)
        assert found is not None
        value = found.group(3).replace(" ", "")
        var, m, sign = found.group(1), modulus(found.group(2)), -1 if value == "-1" else (0 if value == "0" else 1)
        if m % 2 == 0:
            raise _BadNumber(
                f"the symbol (n/{m}) is read for odd {m} only (the Jacobi symbol)",
                offset,
                "unsupported",
                "write the class as n \\equiv r \\pmod{m}",
            )
        kept = frozenset(r for r in range(m) if kronecker(r, m) == sign)
        return ast.NClass(var, m, kept, f"({var}/{m}) = {sign}")
    if "equiv" in text:
        found = _CLASS_RESIDUES.search(text)
        assert found is not None, text
        var, m = found.group(1), modulus(_modulus_value(text))  # \pmod{8}, \pmod{2^3}, (\bmod 8)
        listed = [
            _literal(x.strip().lstrip("-"), offset) * (-1 if x.strip().startswith("-") else 1)
            for x in found.group(2).split(",")
        ]
        kept = frozenset(r % m for r in listed)
        shown = ", ".join(str(r) for r in dict.fromkeys(r % m for r in listed))
        return ast.NClass(var, m, kept, f"{var} = {shown} mod {m}")
    parity = _CLASS_PARITY.search(text)
    if parity is not None and "equiv" not in text:
        var = re.findall(r"(?<![A-Za-z\\])([a-z])(?![A-Za-z])", re.sub(r"\\[A-Za-z]+|\{[^{}]*\}", " ", text))
        name = var[0] if var else "n"
        return ast.NClass(name, 2, frozenset({1 if parity.group(1) == "odd" else 0}), f"{name} {parity.group(1)}")
    found_gcd = _CLASS_GCD.search(text)
    if found_gcd is not None:
        var = found_gcd.group(1) or found_gcd.group(4)
        m = modulus(found_gcd.group(2) or found_gcd.group(3))
    else:
        found_nmid = _CLASS_NMID.search(text)
        assert found_nmid is not None, text
        var, m = found_nmid.group(2), modulus(found_nmid.group(1))
    return ast.NClass(var, m, frozenset(r for r in range(m) if math.gcd(r, m) == 1), f"({var}, {m}) = 1")


_RANGE_PARTS = re.compile(r"([a-z])\s*(?:\\geq?|>=|\\geqslant)\s*(-?\d+)\s*\)$")
_RANGE_INSIDE = re.compile(r"([a-z])\s*(?:\\geq?|>=|\\geqslant)(?![A-Za-z])\s*(-?\d+)")


_PAREN_FRAC = re.compile(r"^\(\s*\\[dt]?frac\s*\{\s*([^{}]*?)\s*\}\s*\{\s*([^{}]*?)\s*\}\s*\)$")
_SYMBOL_INT = re.compile(r"^[+-]?\s*\d{1,6}$")
_SYMBOL_VAR = re.compile(r"^[a-z](?:_(?:\{\s*\w+\s*\}|\w))?$")
_SYMBOL_LINEAR = re.compile(r"^[+-]?(?:\d*[a-z]|\d+)(?:[+-](?:\d*[a-z]|\d+))*$")


def _grouped(text: str) -> str:
    return f"({text})" if any(c in text for c in "+-") and not _SYMBOL_INT.match(text) else text


def _kronecker_symbol(text: str, span: ast.Span, offset: int) -> ast.Node | None:
    """``(\\frac{D}{d})`` and ``(\\frac{d}{p})`` as the Kronecker symbol, or None (a plain group).

    Number theorists write the Kronecker (Legendre, Jacobi) symbol as a fraction in brackets
    (docs/method.md#characters).  Read as a symbol: an integer D over a letter, (D/d) with D a
    fundamental discriminant, and a letter over an odd squarefree m > 0, (d/m) = chi_{m*}(d) with
    m* = (-1)^{(m-1)/2} m (quadratic reciprocity).  A bracketed fraction of a letter over a letter,
    or over another integer, could be either: it is refused rather than guessed.  Two integers
    stay a fraction.
    """
    m = _PAREN_FRAC.match(text)
    if m is None:
        return None
    top, bottom = m.group(1).replace(" ", ""), m.group(2).replace(" ", "")
    top_int, bottom_int = _SYMBOL_INT.match(top), _SYMBOL_INT.match(bottom)
    top_var, bottom_var = _SYMBOL_VAR.match(top), _SYMBOL_VAR.match(bottom)
    from verifier.numbers import is_fundamental_discriminant, squarefree_kernel

    ambiguous = _BadNumber(
        f"({_grouped(top)}/{_grouped(bottom)}) in brackets: a Kronecker symbol or a fraction?",
        offset,
        "ambiguous-notation",
        "write \\chi_{D}(n) for the Kronecker symbol (D/n), or the fraction without brackets",
    )
    # (12/(6n+1)) and ((n-3)/15) are symbols as often as fractions: refused, not read as fractions.
    linear_bottom = not bottom_var and _SYMBOL_LINEAR.match(bottom) and any(c.isalpha() for c in bottom)
    linear_top = not top_var and _SYMBOL_LINEAR.match(top) and any(c.isalpha() for c in top)
    if top_int and linear_bottom and int(top) != 1 and is_fundamental_discriminant(int(top)):
        raise ambiguous
    if bottom_int and linear_top:
        m_int = int(bottom)
        if m_int > 1 and m_int % 2 and squarefree_kernel(m_int) == m_int:
            raise ambiguous
    if not ((top_int or top_var) and (bottom_int or bottom_var)) or (top_int and bottom_int):
        return None
    arg_text = bottom if top_int else top
    if top_int and bottom_var:
        d = int(top)
        if not is_fundamental_discriminant(d):
            raise ambiguous
    elif top_var and bottom_int:
        p = int(bottom)
        if p <= 0 or p % 2 == 0 or squarefree_kernel(p) != p:
            raise ambiguous
        d = p if p % 4 == 1 else -p
    else:
        raise ambiguous
    start = span[0] + text.index(arg_text[0], text.index("{"))
    argument = ast.Name((start, start + len(arg_text)), arg_text)
    return ast.KroneckerSymbol(span, f"\\chi_{{{d}}}", span, argument)


def _group_row(span: ast.Span, items: list[Any]) -> ast.Row:
    """Statements with their qualifiers, from the flat list the grammar gives.

    A qualifier belongs to the relation before it.  Qualifiers after the last relation of a
    row also apply to the earlier relations that have none of their own: a modulus only to
    congruences (it would weaken an equation), a range and a residue set to every relation.
    """
    relations: list[ast.Relation | ast.SpaceClaim] = [items[0]]
    quals: list[dict[str, Any]] = [{}]
    iff = [False]
    for kind, value in items[1:]:
        if kind in ("next", "iff"):
            relations.append(value)
            quals.append({})
            iff.append(kind == "iff")
            if kind == "iff":
                iff[-2] = True
        else:
            key, payload = value
            if key == "class+start":  # a class and a range in one pair of parentheses
                payload, quals[-1]["start"] = payload
                key = "class"
            if key == "class" and "class" in quals[-1]:
                payload = quals[-1]["class"].meet(payload)  # two classes: n in both
            quals[-1][key] = payload
    trailing = quals[-1]
    for rel, q in zip(relations[:-1], quals[:-1], strict=True):
        if "modulus" in trailing and "modulus" not in q and isinstance(rel, ast.Relation) and "≡" in rel.rels:
            q["modulus"] = trailing["modulus"]
        if "start" in trailing and "start" not in q:
            q["start"] = trailing["start"]
        if "residues" in trailing and "residues" not in q:
            q["residues"] = trailing["residues"]
        if "class" in trailing and "class" not in q:
            q["class"] = trailing["class"]
    statements = tuple(
        ast.Statement(r.span, r, q.get("modulus"), q.get("start"), f, q.get("residues"), q.get("class"))
        for r, q, f in zip(relations, quals, iff, strict=True)
    )
    return ast.Row(span, statements)


_TRANSFORMER = _ToAst()
_LOCK = threading.Lock()  # the transformer holds the text of the claim being parsed

"""Reading the certificate's expression language (S-expressions; see the JSON contract).

``parse("(+ (E 4 1) 1/2)")`` gives ``["+", ["E", 4, 1], Fraction(1, 2)]``: lists for
parenthesised forms, Fractions for numbers, strings for operator and atom names.
"""

from __future__ import annotations

import re
from fractions import Fraction
from typing import Any

_TOKEN = re.compile(r"\s*(?:(\()|(\))|([^\s()]+))")
_NUMBER = re.compile(r"^-?\d+(?:/\d+)?$")
MAX_DEPTH = 400


class Malformed(Exception):
    """The text is not a well-formed expression."""


def parse(text: str) -> Any:
    """The tree of one expression."""
    tokens: list[str] = []
    pos = 0
    while pos < len(text):
        m = _TOKEN.match(text, pos)
        if m is None:
            if text[pos:].strip():
                raise Malformed(f"unexpected text at {pos}")
            break
        tokens.append(m.group(1) or m.group(2) or m.group(3))
        pos = m.end()
    tree, end = _read(tokens, 0, 0)
    if end != len(tokens):
        raise Malformed("text after the end of the expression")
    return tree


def _read(tokens: list[str], i: int, depth: int) -> tuple[Any, int]:
    if depth > MAX_DEPTH:
        raise Malformed("expression nested too deeply")
    if i >= len(tokens):
        raise Malformed("unexpected end of the expression")
    tok = tokens[i]
    if tok == ")":
        raise Malformed("unbalanced )")
    if tok != "(":
        if _NUMBER.match(tok):
            return Fraction(tok), i + 1
        return tok, i + 1
    items: list[Any] = []
    i += 1
    while i < len(tokens) and tokens[i] != ")":
        item, i = _read(tokens, i, depth + 1)
        items.append(item)
    if i >= len(tokens):
        raise Malformed("unbalanced (")
    return items, i + 1

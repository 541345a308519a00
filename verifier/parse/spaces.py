"""Spaces of modular forms as authors write them: ``M_k(\\Gamma_0(N), \\chi)``, ``S_2(\\Gamma_0(11))``.

The grammar recognises membership and dimension claims (rule ``space_claim``) and hands
over the space as one token; this module reads its inside (weight, group, character), a
small closed notation, by regular expressions.  Nothing is evaluated.
"""

from __future__ import annotations

import itertools
import re
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from verifier.options import parse_group, parse_weight
from verifier.scan.text import tokens_with_depth

_SPACE = re.compile(
    r"^\s*(?:\\mathcal\s*\{?\s*([MS])\s*\}?|\\mathrm\s*\{\s*([MS])\s*\}|([MS]))"
    r"\s*_\s*(\{[^{}]*(?:\{[^{}]*\}[^{}]*)*\}|\d)\s*\((.*)\)\s*$",
    re.S,
)


@dataclass(frozen=True)
class SpaceSpec:
    """``M`` or ``S``, a weight, a group (kind, level) and a character (or None: trivial)."""

    cusp: bool
    weight: Fraction
    group_kind: str  # "Gamma0" or "Gamma1"
    level: int
    character: Any  # a QuadraticCharacter, or None when not written

    def text(self) -> str:
        """How the report writes the space."""
        group = "SL2(Z)" if self.level == 1 else f"Gamma_{self.group_kind[-1]}({self.level})"
        chi = f", {self.character.name}" if self.character is not None and not self.character.is_trivial else ""
        return f"{'S' if self.cusp else 'M'}_{_fmt(self.weight)}({group}{chi})"


def _fmt(w: Fraction) -> str:
    return str(w.numerator) if w.denominator == 1 else f"{w.numerator}/{w.denominator}"


def parse_space(text: str) -> SpaceSpec | str:
    """A space, or a message saying what could not be read."""
    m = _SPACE.match(text)
    if not m:
        return "cannot read the space; write M_k(\\Gamma_0(N)) or S_k(\\Gamma_0(N), \\chi)"
    letter = m.group(1) or m.group(2) or m.group(3)
    weight_text = m.group(4).strip("{} ")
    weight = parse_weight(weight_text)
    if weight is None:
        return f"cannot read the weight {weight_text!r}"
    args = _split_top_level(m.group(5))
    if not args or len(args) > 2:
        return "write the group, and optionally a character, inside the parentheses"
    group_text = args[0].strip()
    if group_text.isdigit() and len(group_text) > 15:
        return "the level has more than 15 digits; no space of that level can be checked"
    if group_text.isdigit():
        group: tuple[str, int] | None = ("Gamma0", int(group_text))
    else:
        group = parse_group(group_text)
    if group is None or group[1] < 1:
        return f"cannot read the group {group_text!r}"
    character = None
    if len(args) == 2:
        from verifier.options import parse_character

        character = parse_character(args[1].strip())
        if character is None:
            return f"cannot read the character {args[1].strip()!r}"
    return SpaceSpec(letter == "S", weight, group[0], group[1], character)


def _split_top_level(text: str) -> list[str]:
    cuts = [i for i, tok, depth in tokens_with_depth(text) if tok == "," and depth == 0 and _paren_depth(text, i) == 0]
    bounds = [-1, *cuts, len(text)]
    return [text[a + 1 : b] for a, b in itertools.pairwise(bounds)]


def _paren_depth(text: str, i: int) -> int:
    return text[:i].count("(") - text[:i].count(")")

"""The named forms the claim language knows, with their weights and series builders.

Adding a family: give its LaTeX spellings in :func:`lookup`, its weight and level,
and a builder ``prec -> QSeries`` in :func:`build_series`.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from fractions import Fraction

from verifier.forms.delta import delta_series
from verifier.forms.eisenstein import eisenstein_series
from verifier.series.qseries import QSeries

MAX_EISENSTEIN_WEIGHT = 5000
_EIS = re.compile(r"^E_(?:\{\s*(\d+)\s*\}|(\d))$")


@dataclass(frozen=True)
class AtomInfo:
    """A named form: atom key, weight, E_2-depth (1 only for E_2)."""

    key: str
    weight: Fraction
    depth: int


@dataclass(frozen=True)
class Unknown:
    """Why a name is not a known form, with a hint."""

    message: str
    hint: str


def lookup(name: str) -> AtomInfo | Unknown | None:
    """The atom named by ``name``; None when the name is not a built-in at all."""
    m = _EIS.match(name)
    if m:
        k = int(m.group(1) or m.group(2))
        if k < 2 or k % 2:
            return Unknown(
                f"E_{k} is not defined: Eisenstein series E_k have even weight k >= 2 at level one",
                "write E_2, E_4, E_6, ...",
            )
        if k > MAX_EISENSTEIN_WEIGHT:
            return Unknown(f"E_{k} exceeds the weight limit {MAX_EISENSTEIN_WEIGHT}", "")
        return AtomInfo(f"E{k}", Fraction(k), 1 if k == 2 else 0)
    if name == "\\Delta":
        return AtomInfo("Delta", Fraction(12), 0)
    return None


def build_series(key: str, prec: int) -> QSeries:
    """Exact q-expansion of atom ``key`` (at tau) to precision ``prec``."""
    if key == "Delta":
        return delta_series(prec)
    if key.startswith("E"):
        return eisenstein_series(int(key[1:]), prec)
    raise KeyError(key)


def atom_label(key: str, scale: int = 1) -> str:
    """How an atom is written in messages: E_4, Delta, E_4(2tau)."""
    base = "Delta" if key == "Delta" else f"E_{key[1:]}"
    return base if scale == 1 else f"{base}({scale}tau)"

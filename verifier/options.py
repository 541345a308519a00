"""Meaning of the tag options ``weight=`` and ``group=`` (their syntax is in scan.options)."""

from __future__ import annotations

import re
from fractions import Fraction

# Digits are bounded (a weight of 10^9 or a level of 10^15 is already far past any proof),
# so that a hostile option never reaches a slow conversion or factorisation.
_WEIGHT = re.compile(r"^\s*(-?\d{1,9})\s*(?:/\s*(\d{1,9}))?\s*$")
_FRAC = re.compile(r"^\s*\\[dt]?frac\s*\{\s*(-?\d{1,9})\s*\}\s*\{\s*(\d{1,9})\s*\}\s*$")
_SL2 = re.compile(r"^(SL_?2|SL_?\{2\})\((Z)\)$", re.I)
_GAMMA = re.compile(r"^\\?Gamma_?\{?([01])\}?\((\d{1,15})\)$")


def parse_weight(value: str) -> Fraction | None:
    """``8``, ``1/2``, ``\\frac{1}{2}``; None if unreadable."""
    m = _WEIGHT.match(value) or _FRAC.match(value)
    if not m:
        return None
    den = int(m.group(2)) if m.group(2) else 1
    return None if den == 0 else Fraction(int(m.group(1)), den)


def parse_group(value: str) -> tuple[str, int] | None:
    """``SL_2(\\mathbb Z)``, ``SL2(Z)``, ``\\Gamma_0(4)``, ``\\Gamma_1(5)`` -> (kind, N)."""
    v = re.sub(r"\\(mathrm|mathbb|operatorname|text|mathbf|rm|bf)\b", "", value)
    v = v.replace(" ", "").replace("{", "").replace("}", "").replace("\\left", "").replace("\\right", "")
    v = re.sub(r"\(\\?Z\)", "(Z)", v)
    if _SL2.match(v):
        return ("Gamma0", 1)
    m = _GAMMA.match(v)
    if m and int(m.group(2)) >= 1:
        return ("Gamma" + m.group(1), int(m.group(2)))
    if v in ("\\Gamma(1)", "Gamma(1)"):
        return ("Gamma0", 1)
    return None


def parse_nome(value: str) -> Fraction | None:
    """``e^{2\\pi i\\tau}`` (the default, also when empty) -> 1; ``e^{\\pi i\\tau}`` -> 1/2.

    The result is the exponent of our q = e^{2 pi i tau} that the claim's q stands for.
    """
    v = re.sub(r"\\[,;:! ]|\\mathrm|\\operatorname|\\exp|[{}()\s]", "", value)
    if not v:
        return Fraction(1)
    v = v.replace("e^", "").replace("\\pi", "pi").replace("\\tau", "tau")
    letters = "".join(sorted(v.replace("pi", "P").replace("tau", "T")))
    if sorted(letters) == sorted("2iPT"):
        return Fraction(1)
    if sorted(letters) == sorted("iPT"):
        return Fraction(1, 2)
    return None

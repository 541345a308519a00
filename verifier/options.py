"""Meaning of what authors write for a weight, a group, a character, a range or unknowns (tag options, spaces).

The syntax of tag options is in scan.options; characters are read here by regular expressions
only, nothing is evaluated.
"""

from __future__ import annotations

import re
from fractions import Fraction

from verifier.numbers import TRIVIAL, QuadraticCharacter, is_fundamental_discriminant

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


# -- characters -------------------------------------------------------------------
# Integers are bounded so that factoring them is instantaneous.
_INT = r"[+-]?\d{1,18}"
# What stands for the argument of the character: \cdot, a bullet, a star, or one letter.
_VAR = r"(?:\\cdot|\\bullet|\\ast|\\star|\*|[A-Za-z])"
_FRAC_CMD = r"\\[dt]?frac"
_BRACED_INT = rf"(?:\{{({_INT})\}}|(\d))"

# \chi_{D} (D a fundamental discriminant, or 0 / 1 for the trivial character), optionally
# followed by its argument: \chi_{-4}(n). The backslash may be missing (plain text, and our own
# ``name``).
_CHI = re.compile(rf"\\?chi_{_BRACED_INT}(?:\({_VAR}\))?")
# (D/.) : the Kronecker symbol with the character's argument below.
_KRON_UPPER = re.compile(rf"\({_FRAC_CMD}\{{({_INT})\}}(?:\{{{_VAR}\}}|{_VAR})\)")
# (./m) : the Jacobi symbol with the argument on top, m odd and positive.
_KRON_LOWER = re.compile(rf"\({_FRAC_CMD}(?:\{{{_VAR}\}}|{_VAR})(?:\{{(\+?\d{{1,18}})\}}|(\d))\)")
_TRIVIAL_WORD = re.compile(
    r"(?:trivial|principal|1|\\mathbf\{1\}|\\mathbf1|\\mathbb\{1\}|\\mathbb1|\\mathbbm\{1\}|\\mathbbm1"
    r"|\\mathds\{1\}|\\mathds1|\\varepsilon)",
    re.IGNORECASE,
)
_EXPONENT = re.compile(rf"\^(?:\{{({_INT})\}}|(\d))")
_SEPARATOR = re.compile(r"\\cdot|\\times")

# Spacing commands and delimiter-size commands carry no meaning here.
_SPACING = re.compile(r"\\[,;:! ]|\\quad|\\qquad|~")
_SIZING = re.compile(r"\\(?:left|right|[bB]igg?[lr]?)(?=[()])")


def _normalise(text: str) -> str:
    s = text.strip()
    if len(s) >= 2 and s[0] == "$" and s[-1] == "$":
        s = s.strip("$")
    elif s.startswith("\\(") and s.endswith("\\)"):
        s = s[2:-2]
    s = s.replace("\u2212", "-")  # a typeset minus sign
    s = _SPACING.sub("", s)
    s = re.sub(r"\s+", "", s)
    return _SIZING.sub("", s)


def _factor(s: str, i: int) -> tuple[QuadraticCharacter, int] | None:
    """Read one factor at position i: the character and the position after it."""
    m = _CHI.match(s, i)
    if m:
        d = int(m.group(1) or m.group(2))
        if d == 0:
            # \chi_0: the principal character.
            return TRIVIAL, m.end()
        # Subscripts are read as discriminants (chi_D = (D/.)); anything else (\chi_3, \chi_4)
        # names a character by its modulus and is ambiguous.
        if not is_fundamental_discriminant(d):
            return None
        return QuadraticCharacter.from_integer(d), m.end()
    m = _KRON_UPPER.match(s, i)
    if m:
        d = int(m.group(1))
        if d == 0:
            return None
        return QuadraticCharacter.from_integer(d), m.end()
    m = _KRON_LOWER.match(s, i)
    if m:
        odd = int(m.group(1) or m.group(2))
        if odd <= 0 or odd % 2 == 0:
            return None
        # For odd m > 0, n -> (n/m) is the character chi_{m*}, m* = (-1)^((m-1)/2) m:
        # quadratic reciprocity gives (n/m) = (m*/n) for odd n > 0 prime to m.
        star = odd if odd % 4 == 1 else -odd
        return QuadraticCharacter.from_integer(star), m.end()
    m = _TRIVIAL_WORD.match(s, i)
    if m:
        return TRIVIAL, m.end()
    return None


def parse_character(text: str) -> QuadraticCharacter | None:
    """Read a quadratic character as authors write it; None if it is not readable.

    Accepted (with optional ``$...$``, spacing and ``\\left``/``\\right``/``\\bigl``... sizes):

    - ``\\chi_{D}`` or ``chi_{D}`` for a fundamental discriminant D (``\\chi_{-4}``, ``\\chi_{12}``, ``\\chi_5``);
    - ``\\left(\\frac{D}{\\cdot}\\right)`` with ``\\cdot``, ``\\bullet``, ``*`` or a letter below:
      the character agreeing with n -> (D/n) on n prime to 2D (``(-1/.)`` is chi_{-4});
    - ``\\left(\\frac{\\cdot}{m}\\right)`` for odd m > 0: n -> (n/m), which is chi_{m*};
    - the trivial character: ``trivial``, ``principal``, ``1``, ``\\mathbf 1``, ``\\chi_0``, ``\\varepsilon``;
    - products of these (juxtaposed or joined by ``\\cdot``/``\\times``) and integer powers ``^{e}``.

    Parsing is by regular expressions only; nothing is evaluated.
    """
    s = _normalise(text)
    if not s or len(s) > 400:
        return None
    i = 0
    result = TRIVIAL
    first = True
    while i < len(s):
        if not first:
            sep = _SEPARATOR.match(s, i)
            if sep:
                i = sep.end()
        got = _factor(s, i)
        if got is None:
            return None
        chi, i = got
        exp = _EXPONENT.match(s, i)
        if exp:
            chi = chi ** int(exp.group(1) or exp.group(2))
            i = exp.end()
        result = result * chi
        first = False
    return None if first else result


_RANGE = re.compile(r"^\s*([a-z])\s*(?:\\geq?|>=|\\geqslant)\s*(-?\d+)\s*$")


def parse_range(value: str) -> int | None:
    """The first n of the tag option ``for=n \\ge 1``; None if there is none or it is unreadable."""
    o = _RANGE.match(value)
    return int(o.group(2)) if o else None


def parse_unknowns(value: str) -> list[str]:
    """The unknowns of ``solve=a,b`` (or ``solve=a b``), in the author's order."""
    return [u.strip() for u in re.split(r"[,\s]+", value) if u.strip()]

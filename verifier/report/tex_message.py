r"""qreferee's messages as LaTeX text whose mathematics is typeset.

A message such as ``equal in M_4(Gamma_0(2), dim 2): Sturm bound 1, 2 coefficients
compared`` becomes ``equal in $M_{4}(\Gamma_0(2))$ (dimension 2): Sturm bound 1, ...``.
The pieces of mathematics that qreferee itself writes are recognised: spaces of forms,
groups, characters, powers of q and ranges of them, names of forms (``E_{4}^2``),
relations (``>=``, ``!=``).  Everything else is set as ordinary text with LaTeX's special
characters escaped, so any message (including text quoted from a manuscript) gives
valid LaTeX.  Only commands of the LaTeX kernel are used (no amssymb), and the result is
one line of printable ASCII.
"""

from __future__ import annotations

import re
import unicodedata

TEX_ESCAPES = {
    "\\": r"\textbackslash{}",
    "{": r"\{",
    "}": r"\}",
    "$": r"\$",
    "&": r"\&",
    "#": r"\#",
    "%": r"\%",
    "_": r"\_",
    "^": r"\textasciicircum{}",
    "~": r"\textasciitilde{}",
    "<": r"\textless{}",
    ">": r"\textgreater{}",
    "|": r"\textbar{}",
}
ASCII_FALLBACK = {
    "−": "-",
    "–": "-",
    "—": "-",
    "·": "*",
    "×": "x",
    "≠": "!=",
    "≤": "<=",
    "≥": ">=",
    "∈": " in ",
    "…": "...",
    "⋯": "...",
    "τ": "tau",
    "Γ": "Gamma",
    "Δ": "Delta",
    "Θ": "Theta",
    "η": "eta",
    "θ": "theta",
    "χ": "chi",
    "σ": "sigma",
}


def ascii_line(text: str) -> str:
    """``text`` on one line, in printable ASCII (other characters spelled out or replaced)."""
    out: list[str] = []
    for ch in " ".join(text.split()):
        if " " <= ch <= "~":
            out.append(ch)
            continue
        plain = ASCII_FALLBACK.get(ch)
        if plain is None:
            plain = unicodedata.normalize("NFKD", ch).encode("ascii", "ignore").decode("ascii") or "?"
        out.append("".join(p for p in plain if " " <= p <= "~"))
    return "".join(out)


def tex_escape(text: str) -> str:
    """``text`` as LaTeX text in the roman font: ASCII, one line, special characters escaped."""
    return "".join(TEX_ESCAPES.get(ch, ch) for ch in ascii_line(text))


def tt_escape(text: str) -> str:
    """``text`` for the typewriter font: special characters by their ASCII code (``\\char92{}``)."""
    return "".join(f"\\char{ord(ch)}{{}}" if ch in TEX_ESCAPES else ch for ch in ascii_line(text))


# In running text, characters that the default (OT1) roman font does not have are set in
# math (< > |), and words that carry TeX of their own (a backslash or a brace: text quoted
# from a manuscript) in the typewriter font, where every ASCII character exists.
_ROMAN_MISSING = {"<": "$<$", ">": "$>$", "|": "$|$"}
_TEX_WORD = re.compile(r"[^\s]*[\\{}][^\s]*")


def _running_text(text: str) -> str:
    out: list[str] = []
    last = 0
    for m in _TEX_WORD.finditer(text):
        out.append(_roman(text[last : m.start()]))
        out.append(f"\\texttt{{{tt_escape(m.group(0))}}}")
        last = m.end()
    out.append(_roman(text[last:]))
    return "".join(out)


def _roman(text: str) -> str:
    return "".join(_ROMAN_MISSING.get(ch) or TEX_ESCAPES.get(ch, ch) for ch in text)


_EXP = r"(?:\{-?\d+(?:/\d+)?\}|-?\d+)"
_GROUP = r"(?:SL2\(Z\)|Gamma_?[01]\(\d+\))"
_TOKEN = re.compile(
    rf"(?P<range>q\^{_EXP}\.\.q\^{_EXP})"
    rf"|(?P<space>(?P<name>QM|M\^!|M|S)_(?P<weight>\{{[^{{}}]*\}}|\d+(?:/\d+)?)"
    rf"\((?P<sgroup>{_GROUP})(?:, (?P<schi>chi_\{{-?\d+\}}))?(?:, dim (?P<dim>\d+))?\))"
    rf"|(?P<power>\bq\^{_EXP})"
    rf"|(?P<group>{_GROUP})"
    r"|(?P<chi>\bchi_\{-?\d+\})"
    r"|(?P<form>\b[ED]_(?:\{\d+\}|\d+)(?:\^(?:\{-?\d+\}|\d+))?)"
    r"|(?P<rel>>=|<=|!=)"
)
_RELATIONS = {">=": r"\geq", "<=": r"\leq", "!=": r"\neq"}


def group_tex(group: str) -> str:
    """``SL2(Z)``, ``Gamma0(4)`` or ``Gamma_0(4)`` in math mode notation."""
    if group == "SL2(Z)":
        return r"\mathrm{SL}_2(\mathbf{Z})"
    m = re.fullmatch(r"Gamma_?([01])\((\d+)\)", group)
    return rf"\Gamma_{m.group(1)}({m.group(2)})" if m else r"\mathrm{" + tex_escape(group) + "}"


def _exp(e: str) -> str:
    return e if e.startswith("{") else "{" + e + "}"


def _space(m: re.Match[str]) -> str:
    name = {"QM": r"\widetilde{M}", "M^!": "M^!", "M": "M", "S": "S"}[m.group("name")]
    chi = m.group("schi")
    inner = group_tex(m.group("sgroup")) + (", \\" + chi if chi else "")
    math = f"${name}_{_exp(m.group('weight'))}({inner})$"
    return math + (f" (dimension {m.group('dim')})" if m.group("dim") else "")


def _math(m: re.Match[str]) -> str:
    kind = m.lastgroup
    text = m.group(0)
    if kind == "range":
        low, high = text.split("..")
        return f"${low[:2]}{_exp(low[2:])}, \\dots, {high[:2]}{_exp(high[2:])}$"
    if kind == "space":
        return _space(m)
    if kind == "power":
        return f"$q^{_exp(text[2:])}$"
    if kind == "group":
        return f"${group_tex(text)}$"
    if kind == "chi":
        return f"$\\{text}$"
    if kind == "rel":
        return f"${_RELATIONS[text]}$"
    return f"${text}$"  # a form: E_{4}^2, D_2


def message_tex(message: str) -> str:
    """``message`` as one line of LaTeX text, its mathematics in math mode."""
    text = ascii_line(message)
    out: list[str] = []
    last = 0
    for m in _TOKEN.finditer(text):
        out.append(_running_text(text[last : m.start()]))
        out.append(_math(m))
        last = m.end()
    out.append(_running_text(text[last:]))
    return "".join(out)


# Commands that change what TeX reads or defines, or that cannot stand in a note.
_UNSAFE_COMMAND = re.compile(
    r"\\(?:if[A-Za-z]*|fi|else|or|csname|endcsname|catcode|[egx]?def|let|begin|end|label|tag|input|include"
    r"|(?:re|provide|new)command|write|immediate|open(?:out|in)|read|special|expandafter|noexpand|par)(?![A-Za-z])"
)
_SAFE_MATH = re.compile(r"[A-Za-z0-9 \\{}^_()+\-=*/.,;:!'\[\]|<>]*")


def reading_tex(reading: str) -> str | None:
    """A claim as the parser read it, in math mode, or None when it is not safe to set so.

    Safe means: printable ASCII, braces balanced, no alignment (``&``, ``\\\\``), no
    comment, parameter or dollar character, no environment, and not too long.
    """
    text = " ".join(reading.split())
    if not text or len(text) > 160 or not _SAFE_MATH.fullmatch(text):
        return None
    if "\\\\" in text or _UNSAFE_COMMAND.search(text):
        return None
    depth = 0
    for i, ch in enumerate(text):
        if ch in "{}" and i and text[i - 1] == "\\":
            continue
        depth += 1 if ch == "{" else -1 if ch == "}" else 0
        if depth < 0:
            return None
    if depth or text.endswith("\\"):
        return None
    return f"${text}$"

"""The author's own macros: collect definitions, expand them inside claims.

Supported: ``\\newcommand``, ``\\renewcommand``, ``\\providecommand`` (starred or not,
with ``[n]`` arguments and an optional ``[default]`` for the first),
``\\def\\name{...}`` and ``\\def\\name#1#2{...}`` (undelimited parameters only) and
``\\DeclareMathOperator{\\name}{text}``.  Expansion is bounded in depth and in size, so
a recursive or exploding definition is a diagnostic, not a hang.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from verifier.scan.text import MappedText, matching_brace

MAX_DEPTH = 32
MAX_EXPANDED = 200_000

_DEF_START = re.compile(
    r"\\(?P<cmd>newcommand|renewcommand|providecommand|DeclareMathOperator)\*?\s*"
    r"|\\def\s*(?=\\)"
)
_CONTROL_WORD = re.compile(r"\\([A-Za-z]+|.)")


@dataclass(frozen=True)
class Macro:
    """A user macro: ``nargs`` parameters, an optional default for the first, a body."""

    name: str
    nargs: int
    default: str | None
    body: str
    offset: int  # where it was defined (for diagnostics)


class MacroError(Exception):
    """Expansion failed (too deep, too large, missing argument)."""

    def __init__(self, message: str, origin: int) -> None:
        super().__init__(message)
        self.origin = origin  # offset in the source file (of the macro call)


@dataclass(frozen=True)
class DefinitionProblem:
    """A definition the scanner could not read; reported as a warning."""

    offset: int
    message: str


def find_definitions(text: str) -> list[tuple[int, Macro | DefinitionProblem]]:
    """All macro definitions in comment-free ``text``, with their offsets."""
    found: list[tuple[int, Macro | DefinitionProblem]] = []
    for m in _DEF_START.finditer(text):
        if m.group("cmd") == "DeclareMathOperator":
            found.append((m.start(), _read_operator(text, m.end(), m.start())))
        elif m.group("cmd"):
            found.append((m.start(), _read_newcommand(text, m.end(), m.start())))
        else:
            found.append((m.start(), _read_def(text, m.end(), m.start())))
    return found


def _read_name(text: str, i: int) -> tuple[str, int] | None:
    i = _skip_ws(text, i)
    if i < len(text) and text[i] == "{":
        close = matching_brace(text, i)
        if close < 0:
            return None
        name = text[i + 1 : close].strip()
        return (name, close + 1) if _CONTROL_WORD.fullmatch(name) else None
    m = _CONTROL_WORD.match(text, i)
    return (m.group(0), m.end()) if m else None


def _read_group(text: str, i: int) -> tuple[str, int] | None:
    i = _skip_ws(text, i)
    if i >= len(text) or text[i] != "{":
        return None
    close = matching_brace(text, i)
    if close < 0:
        return None
    return text[i + 1 : close], close + 1


def _skip_ws(text: str, i: int) -> int:
    while i < len(text) and text[i] in " \t\n\r":
        i += 1
    return i


def _read_newcommand(text: str, i: int, start: int) -> Macro | DefinitionProblem:
    got = _read_name(text, i)
    if got is None:
        return DefinitionProblem(start, "cannot read the name of this \\newcommand")
    name, i = got
    nargs = 0
    default: str | None = None
    j = _skip_ws(text, i)
    if j < len(text) and text[j] == "[":
        close = text.find("]", j)
        if close < 0 or not text[j + 1 : close].strip().isdigit():
            return DefinitionProblem(start, f"cannot read the argument count of {name}")
        nargs = int(text[j + 1 : close])
        i = close + 1
        j = _skip_ws(text, i)
        if j < len(text) and text[j] == "[":
            close = _matching_bracket(text, j)
            if close < 0:
                return DefinitionProblem(start, f"unclosed default argument of {name}")
            default = text[j + 1 : close]
            i = close + 1
    body = _read_group(text, i)
    if body is None:
        return DefinitionProblem(start, f"cannot read the body of {name}")
    return Macro(name, nargs, default, body[0], start)


def _matching_bracket(text: str, j: int) -> int:
    depth = 0
    for k in range(j, len(text)):
        if text[k] == "[":
            depth += 1
        elif text[k] == "]":
            depth -= 1
            if depth == 0:
                return k
    return -1


def _read_def(text: str, i: int, start: int) -> Macro | DefinitionProblem:
    m = _CONTROL_WORD.match(text, i)
    if not m:
        return DefinitionProblem(start, "cannot read the name of this \\def")
    name = m.group(0)
    params = re.match(r"(#\d)*", text[m.end() :])
    spec = params.group(0) if params else ""
    expected = "".join(f"#{k}" for k in range(1, len(spec) // 2 + 1))
    if spec != expected:
        return DefinitionProblem(start, f"\\def{name} has parameters out of order")
    i = m.end() + len(spec)
    if i < len(text) and text[i] != "{":
        return DefinitionProblem(start, f"\\def{name} uses delimited parameters, which are not expanded")
    body = _read_group(text, i)
    if body is None:
        return DefinitionProblem(start, f"cannot read the body of \\def{name}")
    return Macro(name, len(spec) // 2, None, body[0], start)


def _read_operator(text: str, i: int, start: int) -> Macro | DefinitionProblem:
    got = _read_name(text, i)
    if got is None:
        return DefinitionProblem(start, "cannot read the name of this \\DeclareMathOperator")
    name, i = got
    body = _read_group(text, i)
    if body is None:
        return DefinitionProblem(start, f"cannot read the text of operator {name}")
    return Macro(name, 0, None, "\\operatorname{" + body[0] + "}", start)


def expand(text: MappedText, macros: dict[str, Macro]) -> MappedText:
    """Expand every user macro in ``text``; raises :class:`MacroError`."""
    if not macros:
        return text
    budget = [MAX_EXPANDED]
    return _expand(text, macros, 0, budget)


def _expand(text: MappedText, macros: dict[str, Macro], depth: int, budget: list[int]) -> MappedText:
    s = text.text
    pieces: list[MappedText] = []
    pos = 0
    i = 0
    while i < len(s):
        if s[i] != "\\":
            i += 1
            continue
        m = _CONTROL_WORD.match(s, i)
        assert m is not None or i == len(s) - 1
        if m is None:
            break
        macro = macros.get(m.group(0))
        if macro is None:
            i = m.end()
            continue
        if depth >= MAX_DEPTH:
            raise MacroError(
                f"macro expansion deeper than {MAX_DEPTH} levels at {macro.name} (is it defined in terms of itself?)",
                text.origin(i),
            )
        args, end = _read_args(text, m.end(), macro)
        body = _substitute(macro, args, text, i)
        budget[0] -= len(body)
        if budget[0] < 0:
            raise MacroError(f"macro expansion grows beyond {MAX_EXPANDED} characters at {macro.name}", text.origin(i))
        pieces.append(text.slice(pos, i))
        pieces.append(_expand(body, macros, depth + 1, budget))
        pos = i = end
    pieces.append(text.slice(pos))
    return MappedText.concat(pieces, text.source)


def _read_args(text: MappedText, i: int, macro: Macro) -> tuple[list[MappedText], int]:
    s = text.text
    args: list[MappedText] = []
    need = macro.nargs
    if macro.default is not None and need:
        j = _skip_ws(s, i)
        if j < len(s) and s[j] == "[":
            close = _matching_bracket(s, j)
            if close < 0:
                raise MacroError(f"unclosed optional argument of {macro.name}", text.origin(j))
            args.append(text.slice(j + 1, close))
            i = close + 1
        else:
            args.append(MappedText(macro.default, [text.origin(i)] * len(macro.default), text.source))
        need -= 1
    for _ in range(need):
        j = _skip_ws(s, i)
        if j >= len(s):
            raise MacroError(f"{macro.name} expects {macro.nargs} argument(s)", text.origin(i))
        if s[j] == "{":
            close = matching_brace(s, j)
            if close < 0:
                raise MacroError(f"unclosed argument of {macro.name}", text.origin(j))
            args.append(text.slice(j + 1, close))
            i = close + 1
        else:
            m = _CONTROL_WORD.match(s, j)
            end = m.end() if m else j + 1
            args.append(text.slice(j, end))
            i = end
    return args, i


def _substitute(macro: Macro, args: list[MappedText], text: MappedText, call: int) -> MappedText:
    """The body with ``#k`` replaced; body characters map to the call site."""
    origin = text.origin(call)
    pieces: list[MappedText] = []
    body = macro.body
    pos = 0
    for m in re.finditer(r"#(\d)", body):
        pieces.append(MappedText(body[pos : m.start()], [origin] * (m.start() - pos), text.source))
        k = int(m.group(1))
        if 1 <= k <= len(args):
            # As in TeX, the argument's delimiting braces are dropped and nothing is
            # added around the argument or the whole expansion.
            pieces.append(args[k - 1])
        pos = m.end()
    pieces.append(MappedText(body[pos:], [origin] * (len(body) - pos), text.source))
    return MappedText.concat(pieces, text.source)

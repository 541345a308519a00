"""Options written after a tag: ``name=foo group={\\Gamma_0(4)} weight=8``."""

from __future__ import annotations

import difflib
import re
from dataclasses import dataclass

from verifier.scan.text import matching_brace

LIST_OPTIONS = ("solve",)
_MORE_NAMES = re.compile(r"\s*,\s*(\\?[A-Za-z](?:_\{?\w+\}?)?)(?![\w=])(?!\s*=)")
KNOWN_OPTIONS = ("name", "group", "weight", "character", "nome", "for", "solve")


@dataclass(frozen=True)
class OptionProblem:
    """A malformed or unknown option, at ``offset`` in the option text."""

    offset: int
    code: str
    message: str
    hint: str


def parse_options(text: str) -> tuple[dict[str, str], list[OptionProblem]]:
    """Read ``key=value`` pairs separated by spaces or commas.

    A value containing spaces or commas is wrapped in braces, as in LaTeX key-value
    lists; the braces are removed.
    """
    options: dict[str, str] = {}
    problems: list[OptionProblem] = []
    i = 0
    n = len(text)
    while i < n:
        while i < n and text[i] in " \t\r\n,":
            i += 1
        if i >= n:
            break
        start = i
        while i < n and (text[i].isalnum() or text[i] in "_-"):
            i += 1
        key = text[start:i]
        if not key:
            problems.append(
                OptionProblem(
                    start,
                    "bad-option",
                    f"cannot read an option at {text[start : start + 10]!r}",
                    "write options as key=value",
                )
            )
            break
        if i >= n or text[i] != "=":
            problems.append(OptionProblem(start, "bad-option", f"option {key!r} has no value", f"write {key}=VALUE"))
            while i < n and text[i] not in " \t\r\n,":
                i += 1
            continue
        i += 1
        if i < n and text[i] == "{":
            close = matching_brace(text, i)
            if close < 0:
                problems.append(
                    OptionProblem(
                        i,
                        "bad-option",
                        f"the value of {key!r} has an unclosed brace",
                        "close the brace",
                    )
                )
                break
            value = text[i + 1 : close]
            i = close + 1
        else:
            vstart = i
            depth = 0
            while i < n and (depth > 0 or text[i] not in " \t\r\n,"):
                if text[i] in "({[":
                    depth += 1
                elif text[i] in ")}]":
                    depth -= 1
                i += 1
            value = text[vstart:i]
            if key in LIST_OPTIONS:
                # solve=a,b: a list of names may go unbraced; it ends at the next key=value.
                while (m := _MORE_NAMES.match(text, i)) is not None:
                    value += "," + m.group(1)
                    i = m.end()
        if key not in KNOWN_OPTIONS:
            close_names = difflib.get_close_matches(key, KNOWN_OPTIONS, n=2)
            if close_names:
                hint = "did you mean " + " or ".join(repr(c) for c in close_names) + "?"
            else:
                hint = "known options: " + ", ".join(KNOWN_OPTIONS)
            problems.append(OptionProblem(start, "unknown-option", f"unknown option {key!r}", hint))
            continue
        if key in options:
            problems.append(OptionProblem(start, "bad-option", f"option {key!r} given twice", "keep one of them"))
        options[key] = value.strip()
    return options, problems

"""Which manuscript an open file belongs to.

A file that another file reads with ``\\input``/``\\include`` is checked as part of that
main file, so that its claims see the main file's macros and defines.  The main file is,
in order of preference:

1. the one a ``%!TEX root = main.tex`` line at the top of the file names (a convention
   many LaTeX editors share);
2. a main file whose last check read this file;
3. a ``.tex`` file in the same folder or the one above that ``\\input``s or ``\\include``s it;
4. the file itself.
"""

from __future__ import annotations

import re
from collections.abc import Iterable
from pathlib import Path

_ROOT = re.compile(r"^\s*%\s*!\s*TeX\s+root\s*=\s*(\S.*?)\s*$", re.I | re.M)
_INCLUDE = re.compile(r"\\(?:input|include|subfile)\s*\{\s*([^{}]+?)\s*\}")
# Only the first lines are searched for the root line, and only this many candidate files are read.
ROOT_LINES = 20
MAX_CANDIDATES = 200


def declared_root(path: Path, text: str) -> Path | None:
    """The file named by a ``%!TEX root`` line in the first lines of ``text``."""
    head = "\n".join(text.splitlines()[:ROOT_LINES])
    m = _ROOT.search(head)
    if m is None:
        return None
    target = (path.parent / m.group(1)).resolve()
    return target if target.is_file() and target != path.resolve() else None


def _names(main: Path, included: Path) -> set[str]:
    try:
        rel = included.resolve().relative_to(main.resolve().parent)
    except ValueError:
        return set()
    plain = rel.as_posix()
    return {plain, plain.removesuffix(".tex")}


def including_file(path: Path, texts: dict[Path, str] | None = None) -> Path | None:
    """A ``.tex`` file near ``path`` that reads it with ``\\input``/``\\include``."""
    resolved = path.resolve()
    folders = [resolved.parent, resolved.parent.parent]
    seen = 0
    for folder in folders:
        try:
            candidates = sorted(folder.glob("*.tex"))
        except OSError:
            continue
        for candidate in candidates:
            if candidate.resolve() == resolved or seen >= MAX_CANDIDATES:
                continue
            seen += 1
            text = (texts or {}).get(candidate.resolve())
            if text is None:
                try:
                    text = candidate.read_text(encoding="utf-8", errors="replace")
                except OSError:
                    continue
            names = _names(candidate, resolved)
            if any(m.group(1) in names for m in _INCLUDE.finditer(text)):
                return candidate.resolve()
    return None


def main_of(path: Path, text: str, known: Iterable[tuple[Path, Iterable[str]]] = ()) -> Path:
    """The main file to check when ``path`` (with buffer ``text``) changes.

    ``known`` gives, for each main file checked so far, the files its last check read.
    """
    resolved = path.resolve()
    declared = declared_root(resolved, text)
    if declared is not None:
        return declared
    for main, files in known:
        if main != resolved and str(resolved) in set(files):
            return main
    if resolved.suffix.lower() == ".tex":
        found = including_file(resolved)
        if found is not None:
            return found
    return resolved

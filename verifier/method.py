"""The method notes, ``docs/method.md``: where they are, their sections, and which section explains what.

``docs/method.md`` states the conventions, the theorems (with their published sources) and the
decision procedure of every kind of claim.  Each section starts with an HTML anchor
``<a id="NAME"></a>`` followed by a Markdown heading; ``NAME`` is stable, and code, messages,
``qreferee explain`` and the HTML report cite sections as ``docs/method.md#NAME``.

A wheel ships the file as ``verifier/_docs/method.md`` (see ``pyproject.toml``); a source
checkout has it at ``docs/method.md`` beside the package.  Without either, references are still
printed as ``docs/method.md#NAME``, only the section titles and texts are unavailable.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

DOC = "docs/method.md"

# Diagnostic and outcome codes -> the section that explains the mathematics behind them.
FOR_CODE: dict[str, str] = {
    "mixed-weight": "quasimodular",
    "not-exact": "q-expansions",
    "bad-expansion": "claim-expansion",
    "weight-mismatch": "claim-identity",
    "group-mismatch": "claim-identity",
    "character-mismatch": "characters",
    "not-modular": "eta-modularity",
    "unsupported": "unproven",
    "zero-division": "claim-identity",
    "budget": "unproven",
    "time-budget": "unproven",
    "no-witness": "witness",
    "unsupported-notation": "products",
    "ambiguous-notation": "characters",
    "series-only": "series-only",
}

# Claim kinds (``Outcome.kind``) -> the section that says how they are decided.
FOR_KIND: dict[str, str] = {
    "equality": "claim-identity",
    "inequality": "claim-identity",
    "prefix": "claim-expansion",
    "membership": "claim-membership",
    "dimension": "claim-dimension",
    "eigenform": "claim-eigenform",
    "arithmetic": "claim-arithmetic",
    "congruence": "claim-congruence",
    "value": "claim-value",
    "solve": "claim-solve",
}

# Proof methods (``Outcome.method``) -> the theorem or procedure they apply.
FOR_METHOD: dict[str, str] = {
    "sturm": "sturm-bound",
    "valence": "poles-at-cusps",
    "expansion": "claim-expansion",
    "witness": "witness",
    "cusp-orders": "claim-membership",
    "dimension-formula": "claim-dimension",
    "hecke": "claim-eigenform",
    "sturm-congruence": "congruences-sturm",
    "linear-algebra": "claim-solve",
    "computation": "claim-arithmetic",
    "series": "series-only",
}

_ANCHOR = re.compile(r'^<a id="([a-z0-9-]+)"></a>\s*$')
_HEADING = re.compile(r"^#+\s+(.*\S)\s*$")
_LINK = re.compile(r"\[([^\]]+)\]\(#[a-z0-9-]+\)")


@dataclass(frozen=True)
class Section:
    """One anchored section: its anchor, heading and text (up to the next anchor)."""

    anchor: str
    title: str
    text: str

    @property
    def reference(self) -> str:
        """``docs/method.md#NAME`` (NAME the anchor)."""
        return reference(self.anchor)

    def plain_text(self) -> str:
        """The text with in-document Markdown links reduced to their label."""
        return _LINK.sub(r"\1", self.text).strip()


def reference(anchor: str) -> str:
    """How the project cites a section: ``docs/method.md#NAME`` (NAME the anchor)."""
    return f"{DOC}#{anchor}"


def path() -> Path | None:
    """The method notes on this machine: the copy inside the package, else the checkout's."""
    package = Path(__file__).resolve().parent
    for candidate in (package / "_docs" / "method.md", package.parent / "docs" / "method.md"):
        if candidate.is_file():
            return candidate
    return None


def parse(text: str) -> dict[str, Section]:
    """The anchored sections of a method-notes text, in order."""
    lines = text.splitlines()
    starts: list[tuple[int, str]] = []
    for i, line in enumerate(lines):
        m = _ANCHOR.match(line)
        if m:
            starts.append((i, m.group(1)))
    out: dict[str, Section] = {}
    for k, (i, anchor) in enumerate(starts):
        end = starts[k + 1][0] if k + 1 < len(starts) else len(lines)
        body = lines[i + 1 : end]
        title = anchor
        if body:
            heading = _HEADING.match(body[0])
            if heading:
                title = heading.group(1).replace("`", "")
                body = body[1:]
        out[anchor] = Section(anchor, title, "\n".join(body).strip("\n"))
    return out


@lru_cache(maxsize=1)
def sections() -> dict[str, Section]:
    """The sections of the installed method notes; empty when the file is not found."""
    found = path()
    if found is None:
        return {}
    try:
        return parse(found.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError):
        return {}


def section(anchor: str | None) -> Section | None:
    """The section ``anchor``, when it exists in the installed notes."""
    return sections().get(anchor) if anchor else None


def for_code(code: str | None) -> str | None:
    """The anchor of the section behind a diagnostic or outcome code, if any."""
    return FOR_CODE.get(code) if code else None


def for_kind(kind: str | None) -> str | None:
    """The anchor of the section that says how claims of this kind are decided, if any."""
    return FOR_KIND.get(kind) if kind else None


def for_method(method: str | None) -> str | None:
    """The anchor of the section behind a proof method, if any."""
    return FOR_METHOD.get(method) if method else None


def describe(anchor: str) -> str:
    """One line for a terminal: the reference, the section title and where the file is."""
    sec = section(anchor)
    found = path()
    title = f" ({sec.title})" if sec is not None else ""
    where = f"; the file is at {found}" if found is not None else ""
    return f"see {reference(anchor)}{title}{where}"

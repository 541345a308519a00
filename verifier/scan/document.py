"""What the scanners produce: tagged blocks and definitions in reading order."""

from __future__ import annotations

from dataclasses import dataclass, field

from verifier.diagnostics import Diagnostic
from verifier.location import Location
from verifier.scan.display import Row
from verifier.scan.text import MappedText

MAX_FILE_BYTES = 20 * 1024 * 1024
MAX_FILES = 500
MAX_INCLUDE_DEPTH = 16


@dataclass
class ClaimBlock:
    """A ``claim`` tag and the display it tags."""

    tag: Location
    options: dict[str, str]
    rows: list[Row]
    environment: str
    problems: list[Diagnostic] = field(default_factory=list)
    # The author's text of the display (of the tag itself when no display follows), with
    # runs of white space squashed: the source of an error that concerns the whole block.
    source: str = ""
    # A definition the author made in the text (X := ...): its block checks it where X
    # already has a meaning (docs/method.md#author-definitions).
    definition: bool = False


@dataclass
class DefineTag:
    """A ``define`` tag: the text after the keyword (``NAME = expr``)."""

    tag: Location
    text: MappedText | None
    problems: list[Diagnostic] = field(default_factory=list)
    # "tag" (%@define, \qrdefine); or found in the author's text (docs/method.md#author-definitions):
    # "author" (X := ...), "prose" (where $X = ...$), "mention" (an inline X = ... that defines nothing).
    origin: str = "tag"


@dataclass
class ScannedDocument:
    """Everything the scanner found, in reading order (across \\input)."""

    items: list[ClaimBlock | DefineTag] = field(default_factory=list)
    diagnostics: list[Diagnostic] = field(default_factory=list)
    files: list[str] = field(default_factory=list)

"""The rows of displays already read, kept from one scan of a manuscript to the next.

An editor scans the same manuscript again after every edit, and most displays have not
changed.  A display's rows depend only on its environment, its text as the author wrote it
(comments included: a row's ``source_text`` keeps them) and the macros in force where it
stands, so the rows read last time are reused when all three are the same;
only their positions are moved to where the display stands now (the text before it may
have grown or shrunk).  A display whose reading failed (a macro that does not expand) is
never kept.  The memo keeps what the last scan used, so it grows no larger than a manuscript.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from verifier.scan.display import Row
from verifier.scan.text import MappedText, SourceFile


@dataclass(frozen=True)
class _Entry:
    base: int  # the source offset of the display's first character when the rows were read
    rows: list[Row]


class DisplayMemo:
    """Rows of displays by (environment, text, macros); see the module docstring."""

    def __init__(self) -> None:
        self._used: dict[Any, _Entry] = {}  # entries used or added in the scan under way
        self._kept: dict[Any, _Entry] = {}  # entries of the previous scan
        self.hits = 0
        self.misses = 0

    def get(self, key: Any, base: int, source: SourceFile) -> list[Row] | None:
        """The rows of the display ``key`` whose text starts at ``base`` in ``source``, or None."""
        entry = self._used.get(key)
        if entry is None:
            entry = self._kept.pop(key, None)
            if entry is None:
                self.misses += 1
                return None
            self._used[key] = entry
        self.hits += 1
        shift = base - entry.base
        return [
            Row(MappedText(r.text.text, _moved(r.text.origins, shift), source), r.label, r.source_text)
            for r in entry.rows
        ]

    def put(self, key: Any, base: int, rows: list[Row]) -> None:
        """Keep the rows read for the display ``key`` whose text starts at ``base``."""
        self._used[key] = _Entry(base, list(rows))

    def finish(self) -> None:
        """A scan ended: keep what it used for the next one, forget the rest."""
        self._kept, self._used = self._used, {}


def _moved(origins: list[int], shift: int) -> list[int]:
    """``origins`` moved by ``shift`` (always a new list)."""
    return origins[:] if shift == 0 else list(map(shift.__add__, origins))

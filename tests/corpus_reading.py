"""Run qreferee over the reading corpus and set each verdict against the brute-force truth.

Shared by ``tests/test_corpus_reading.py`` (the soundness check) and the ``reading``
section of ``bench/run.py`` (the figure of merit: decided claims per style).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

import corpus_truth

CORPUS = Path(__file__).parent / "data" / "manuscripts" / "styles"


@dataclass
class Seen:
    """What qreferee said about one claim of the corpus (``missing`` when it made no claim of it)."""

    verdict: str
    code: str | None = None
    message: str = ""


@dataclass
class StyleTally:
    total: int = 0
    counts: dict[str, int] = field(default_factory=dict)
    wrong: list[str] = field(default_factory=list)  # false proved or true refuted
    unknown: list[str] = field(default_factory=list)  # results with no reading in the table

    @property
    def decided(self) -> int:
        return self.counts.get("proved", 0) + self.counts.get("refuted", 0)


def verdicts(style: str) -> dict[str, Seen]:
    """Every claim qreferee reports for one style, keyed as ``corpus_truth.READINGS``."""
    from verifier import check_path
    from verifier.screen import screen

    main = CORPUS / corpus_truth.MAIN_FILES[style]
    if style in corpus_truth.UNTAGGED_STYLES:
        claims = screen(main.parent, untagged=True).report.claims
    else:
        claims = check_path(main).claims
    out: dict[str, Seen] = {}
    for c in claims:
        key = f"{style}/{c.name or c.label or f'line-{c.location.line}'}"
        out[key] = Seen(c.verdict, c.outcome.code, c.outcome.message)
    return out


def tally(truth: dict[str, bool], seen: dict[str, Seen], style: str) -> StyleTally:
    t = StyleTally()
    for key, ok in truth.items():
        if not key.startswith(style + "/"):
            continue
        t.total += 1
        s = seen.get(key, Seen("missing"))
        t.counts[s.verdict] = t.counts.get(s.verdict, 0) + 1
        if (s.verdict == "proved" and not ok) or (s.verdict == "refuted" and ok):
            t.wrong.append(f"{key}: {s.verdict}, but the brute-force truth is {ok}")
    t.unknown = [k for k in seen if k not in truth]
    return t

"""The reading corpus: 0 false ``proved`` and 0 false ``refuted`` over every house style.

The truth of each claim comes from ``tests/corpus_truth.py``, a brute-force computation
that does not use qreferee (each true claim names its published source there).  Claims
qreferee does not read (``error``, ``unproven``, or no claim made) are allowed here; how
many are decided is the figure ``python bench/run.py --skip ...`` prints in its
``reading`` section.
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))

import corpus_reading
import corpus_truth


@pytest.fixture(scope="module")
def truth() -> dict[str, bool]:
    return corpus_truth.expected()


def test_corpus_size(truth: dict[str, bool]) -> None:
    assert len(truth) >= 200
    assert len(corpus_truth.STYLES) >= 8
    for style in corpus_truth.STYLES:
        keys = [k for k in truth if k.startswith(style + "/")]
        assert any(truth[k] for k in keys) and not all(truth[k] for k in keys), style
    # Every true claim names its source; every false one is marked as a mutation.
    for key, reading in corpus_truth.READINGS.items():
        assert bool(reading.source) == truth[key], key


def test_truth_script_is_independent() -> None:
    text = (Path(__file__).parent / "corpus_truth.py").read_text(encoding="utf-8")
    assert "import verifier" not in text and "from verifier" not in text and "flint" not in text


@pytest.mark.parametrize("style", corpus_truth.STYLES)
def test_no_wrong_verdict(style: str, truth: dict[str, bool]) -> None:
    seen = corpus_reading.verdicts(style)
    t = corpus_reading.tally(truth, seen, style)
    assert t.wrong == []
    assert t.unknown == [], "claims in the corpus without a reading in tests/corpus_truth.py"

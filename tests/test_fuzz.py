"""Fuzz: random and malformed documents never crash, never run past the budget (common practice)."""

from __future__ import annotations

import time

from hypothesis import HealthCheck, given, settings
from tests.fuzz_documents import documents
from verifier.api import check_text
from verifier.limits import allow_exact_values

allow_exact_values()  # set before hypothesis records the recursion limit

BUDGET = 3.0


def check_one(text: str) -> None:
    start = time.perf_counter()
    report = check_text(text, max_seconds=BUDGET)
    elapsed = time.perf_counter() - start
    assert report.exit_code in (0, 1, 2)
    assert not [c.outcome.message for c in report.claims if c.outcome.code == "internal"]
    # Each block is read and decided under the budget; a few blocks, a little slack.
    assert elapsed < 4 * 2 * BUDGET + 5


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(documents())
def test_random_documents_end_cleanly(text: str) -> None:
    check_one(text)

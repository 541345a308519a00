"""Every JSON report the test suite builds is validated against the shipped report schema.

``Report.to_dict``, ``ClaimResult.to_dict`` and ``ScreenResult.to_dict`` are wrapped for
the whole session; reports read back from a subprocess are validated where they are
parsed (see ``tests/test_cli.py``).
"""

from __future__ import annotations

import os
from collections.abc import Callable, Iterator
from typing import Any

import pytest
from hypothesis import HealthCheck, settings
from verifier.api import ClaimResult, Report
from verifier.screen import ScreenResult

from report_contract import validate_claim, validate_report

# `qreferee check` keeps a verdict cache beside the manuscript.  Tests that patch the engine
# must not be answered from it, so it is off for the whole suite, subprocesses included;
# tests of the cache turn it back on (monkeypatch.delenv).
os.environ["QREFEREE_NO_CACHE"] = "1"

# Property-based tests (hypothesis): a small, repeatable profile for CI, and a long campaign
# for local runs with QREFEREE_HYPOTHESIS=large (DEVELOPERS.md, "Soundness campaigns").
settings.register_profile(
    "ci", max_examples=20, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow]
)
settings.register_profile(
    "large", max_examples=500, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much]
)
settings.load_profile(os.environ.get("QREFEREE_HYPOTHESIS", "ci"))


def _wrapped(
    original: Callable[[Any], dict[str, Any]], check: Callable[[Any], None]
) -> Callable[[Any], dict[str, Any]]:
    def to_dict(self: Any) -> dict[str, Any]:
        data = original(self)
        check(data)
        return data

    to_dict.__wrapped__ = original  # type: ignore[attr-defined]
    return to_dict


@pytest.fixture(autouse=True, scope="session")
def _validate_every_report() -> Iterator[None]:
    saved = [(cls, cls.to_dict) for cls in (Report, ClaimResult, ScreenResult)]
    Report.to_dict = _wrapped(Report.to_dict, validate_report)  # type: ignore[method-assign]
    ClaimResult.to_dict = _wrapped(ClaimResult.to_dict, validate_claim)  # type: ignore[method-assign]
    ScreenResult.to_dict = _wrapped(ScreenResult.to_dict, validate_report)  # type: ignore[method-assign]
    try:
        yield
    finally:
        for cls, original in saved:
            cls.to_dict = original  # type: ignore[method-assign]

"""Run the robustness fuzz campaign at scale: ``python bench/fuzz.py 100000``.

Generates random and malformed manuscripts (tests/fuzz_documents.py), checks each with a
time budget, and prints how many ended with each exit status, how many ended in an
``internal`` error or an exception (both must be 0), and the slowest document.
"""

from __future__ import annotations

import sys
import time
from collections import Counter
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from hypothesis import HealthCheck, given, settings
from tests.fuzz_documents import documents
from verifier.api import check_text
from verifier.limits import allow_exact_values

BUDGET = 3.0


def campaign(count: int) -> dict[str, object]:
    """Check ``count`` generated documents; returns the tallies."""
    allow_exact_values()
    statuses: Counter[int] = Counter()
    failures: list[str] = []
    slowest = (0.0, "")

    @settings(max_examples=count, deadline=None, database=None, suppress_health_check=list(HealthCheck))
    @given(documents())
    def one(text: str) -> None:
        nonlocal slowest
        start = time.perf_counter()
        try:
            report = check_text(text, max_seconds=BUDGET)
        except Exception as exc:  # counted, never raised: the campaign goes on
            failures.append(f"{type(exc).__name__}: {exc}: {text[:200]!r}")
            return
        elapsed = time.perf_counter() - start
        statuses[report.exit_code] += 1
        failures.extend(f"internal: {text[:200]!r}" for c in report.claims if c.outcome.code == "internal")
        slowest = max(slowest, (elapsed, text[:120]))

    start = time.perf_counter()
    one()
    return {
        "documents": sum(statuses.values()) + len([f for f in failures if not f.startswith("internal")]),
        "exit_status": dict(sorted(statuses.items())),
        "failures": failures,
        "slowest_seconds": round(slowest[0], 3),
        "slowest_document": slowest[1],
        "total_seconds": round(time.perf_counter() - start, 1),
    }


if __name__ == "__main__":
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 1000
    result = campaign(n)
    for key, value in result.items():
        print(f"{key}: {value}")
    sys.exit(1 if result["failures"] else 0)

"""Per-claim precision and parallel runs.

The identities used (Jacobi's four-square theorem in eta form theta^4 = eta(2t)^20 /
(eta(t)^8 eta(4t)^8), Rademacher, *Topics in Analytic Number Theory*, ch. 7; E_4^2 = E_8
and 691 E_12 = 441 E_4^3 + 250 E_6^2, Serre, *A Course in Arithmetic*, ch. VII §4) are only
vehicles here: what is checked is how much work each claim does, and that several
processes give the report one process gives.
"""

from __future__ import annotations

import time
from pathlib import Path
from typing import Any

import pytest
from verifier import check_text
from verifier.api import check_paths
from verifier.elaborate import ir
from verifier.parallel import map_in_order, run_length
from verifier.prove.evaluate import AtomTable
from verifier.prove.prover import Prover
from verifier.scan import scan_text

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = [ROOT / "sample_docs" / "paper.tex", ROOT / "sample_docs" / "note.md"]
DATA = ROOT / "tests" / "data" / "manuscripts"

HEAVY = r"E_4(1430\tau)^{6} E_6(2\tau)^4 = E_6(2\tau)^4 E_4(1430\tau)^{6}"  # weight 48 on Gamma_0(1430)
LIGHT = r"\theta(\tau)^4 = \frac{\eta(2\tau)^{20}}{\eta(\tau)^8\eta(4\tau)^8}"  # weight 2 on Gamma_0(4)


class RecordingTable(AtomTable):
    """An atom table that records every build: (key, params, precision)."""

    def __init__(self) -> None:
        super().__init__()
        self.builds: list[tuple[str, tuple[Any, ...], int]] = []

    def base(self, key: str, params: tuple[Any, ...], prec: int) -> Any:
        before = self.cached_precision(key, params)
        series = super().base(key, params, prec)
        after = self.cached_precision(key, params)
        if after != before:
            self.builds.append((key, params, after))
        return series


def _sides(text: str) -> tuple[ir.Side, ir.Side, str, Any]:
    """The pending sides of the single claim in ``text`` (through the library's own pipeline)."""
    from verifier.api import _block, _Pending
    from verifier.claims.sides import SidesReading
    from verifier.elaborate.elaborator import Elaborator
    from verifier.scan.document import ClaimBlock

    doc = scan_text(f"%@claim\n\\[ {text} \\]\n", "t.tex")
    pending: list[_Pending] = []
    report = check_text("", "empty.tex")
    (block,) = [item for item in doc.items if isinstance(item, ClaimBlock)]
    _block(block, Elaborator(), report, pending)
    (p,) = pending
    r = p.reading
    assert isinstance(r, SidesReading)
    return r.left, r.right, r.rel, r.unit


def test_a_light_claim_after_a_heavy_one_builds_only_what_it_needs() -> None:
    table = RecordingTable()
    prover = Prover(table)
    heavy, light = _sides(HEAVY), _sides(LIGHT)
    heavy_need = prover.precision_needed(heavy[0], heavy[1])
    light_need = prover.precision_needed(light[0], light[1])
    assert heavy_need > 100 * light_need  # the situation of the report: Sturm bounds 12096 and 1
    assert prover.decide(*heavy).verdict == "proved"
    table.builds.clear()
    assert prover.decide(*light).verdict == "proved"
    assert table.builds, "the light claim's atoms are its own"
    assert all(prec <= 2 * light_need + 8 for _, _, prec in table.builds), table.builds


def test_a_light_claim_beside_a_heavy_one_in_a_document_is_not_inflated(monkeypatch: pytest.MonkeyPatch) -> None:
    # Nothing is planned ahead of the claims: the light claim's forms (theta, eta), which
    # the heavy claim does not use, are built to the light claim's precision only.
    import verifier.api

    tables: list[RecordingTable] = []

    def recording() -> RecordingTable:
        tables.append(RecordingTable())
        return tables[-1]

    monkeypatch.setattr(verifier.api, "AtomTable", recording)
    report = check_text(f"%@claim\n\\[ {LIGHT} \\]\n%@claim\n\\[ {HEAVY} \\]\n", "t.tex")
    assert [c.verdict for c in report.claims] == ["proved", "proved"]
    light_builds = [b for t in tables for b in t.builds if b[0] in ("eta", "theta")]
    assert light_builds and all(prec <= 16 for _, _, prec in light_builds), light_builds
    assert max(prec for t in tables for _, _, prec in t.builds) > 1000  # the heavy claim's own


def test_the_cache_is_extended_only_when_a_claim_needs_more() -> None:
    # E_4 = 1 + 240 sum sigma_3(n) q^n (Serre, ch. VII §4.2): coefficients 1, 240, 2160, 6720.
    table = AtomTable()
    s = table.base("E4", (4,), 3)
    assert [s[n] for n in range(3)] == [1, 240, 2160]
    assert (table.computed, table.cached_precision("E4", (4,))) == (1, 3)
    table.base("E4", (4,), 2)  # less: a truncation of the cache
    assert table.computed == 1
    s = table.base("E4", (4,), 4)  # more: one extension, by at least half again
    assert table.computed == 2 and table.cached_precision("E4", (4,)) >= 4
    assert s.prec == 4 and s[3] == 6720
    # Asking a little more each time rebuilds only a logarithmic number of times.
    for prec in range(5, 200):
        table.base("E4", (4,), prec)
    assert table.computed <= 2 + 12


def test_a_claims_seconds_are_its_own_work() -> None:
    # The seconds of the claims are disjoint intervals of the run: together, never more
    # than the run itself (with one process).  This is a consistency check, not a timing.
    text = f"%@claim\n\\[ {HEAVY} \\]\n%@claim\n\\[ {LIGHT} \\]\n%@claim\n\\[ E_4^2 = E_8 \\]\n"
    start = time.perf_counter()
    report = check_text(text, "t.tex")
    wall = time.perf_counter() - start
    assert [c.verdict for c in report.claims] == ["proved"] * 3
    assert all(c.seconds > 0 for c in report.claims)
    assert sum(c.seconds for c in report.claims) <= wall


def _without_timing(report: Any) -> list[dict[str, Any]]:
    return [{k: v for k, v in c.items() if k != "seconds"} for c in report.to_dict()["claims"]]


@pytest.mark.parametrize("path", SAMPLES, ids=lambda p: p.name)
def test_claims_of_one_document_in_two_processes_match_one(path: Path) -> None:
    # The samples hold every kind of claim: identities, printed expansions, claims about
    # coefficients and spaces, refutations with suggested corrections.
    (one,) = check_paths([path], jobs=1)
    (two,) = check_paths([path], jobs=2)
    assert _without_timing(one) == _without_timing(two)
    assert [d.to_dict() for d in one.diagnostics] == [d.to_dict() for d in two.diagnostics]
    assert any(c.outcome.suggestion for c in one.claims)  # the corrections travel back too


def test_several_documents_in_two_processes_match_one() -> None:
    paths = [*SAMPLES, *sorted(DATA.glob("*.tex"))[:4], SAMPLES[0]]
    one = check_paths(paths, jobs=1)
    two = check_paths(paths, jobs=2)
    assert [r.files for r in one] == [r.files for r in two]
    assert [_without_timing(r) for r in one] == [_without_timing(r) for r in two]
    assert [r.exit_code for r in one] == [r.exit_code for r in two]


def test_results_come_back_in_order_whatever_the_split() -> None:
    offset = 7  # a closure: workers are forked, so they see it
    assert map_in_order(lambda i: i * i + offset, 23, 2) == [i * i + offset for i in range(23)]
    assert map_in_order(lambda i: i, 1, 4) == [0]
    assert map_in_order(lambda i: i, 0, 4) == []
    assert run_length(20, 2) == 2 and run_length(3, 2) == 1


def test_work_lost_with_a_worker_is_done_again_here() -> None:
    import os

    parent = os.getpid()

    def work(i: int) -> int:
        if i == 5 and os.getpid() != parent:
            os._exit(1)  # the worker dies (as if killed for its memory)
        return 10 * i

    assert map_in_order(work, 12, 2) == [10 * i for i in range(12)]

"""Budgets and parallel runs: same results with several processes; a claim over its time
budget becomes an error and the run goes on (the mathematics here is docs/method.md#eisenstein, the
identities E_8 = E_4^2 and 691 E_12 = 441 E_4^3 + 250 E_6^2)."""

from __future__ import annotations

from pathlib import Path

from verifier import check_path, check_text

MANUSCRIPT = Path(__file__).parent / "data" / "manuscripts" / "level_one.tex"


def _without_timing(report: object) -> list[dict[str, object]]:
    return [{k: v for k, v in c.items() if k != "seconds"} for c in report.to_dict()["claims"]]  # type: ignore[attr-defined]


def test_two_processes_give_the_same_report_as_one() -> None:
    one = check_path(MANUSCRIPT, jobs=1)
    two = check_path(MANUSCRIPT, jobs=2)
    assert _without_timing(one) == _without_timing(two)
    assert one.summary == two.summary


def test_a_claim_over_its_time_budget_is_an_error_and_the_rest_is_checked() -> None:
    text = (
        "%@claim name=heavy\n\\[ E_4^{2000} E_6^{1000} = E_6^{1000} E_4^{2000} \\]\n"
        "%@claim name=light\n\\[ E_4^2 = E_8 \\]\n"
    )
    report = check_text(text, "t.tex", max_seconds=0.02)
    heavy, light = report.claims
    assert (heavy.verdict, heavy.outcome.code) == ("error", "time-budget")
    assert light.verdict == "proved"

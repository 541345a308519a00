"""``file:line:col: severity: verdict: message`` lines, the shape editors and CI parse."""

from __future__ import annotations

from collections.abc import Collection

from verifier.api import VERDICTS, ClaimResult, Report

CAUTION = (
    "'proved' certifies each claim as qreferee read it, with q = e^{2 pi i tau} and E_k normalised "
    "to constant term 1; check that reading."
)
SEVERITY = {"proved": "note", "refuted": "error", "unproven": "warning", "error": "error"}


def claim_line(c: ClaimResult) -> str:
    """One line for one claim."""
    o = c.outcome
    label = f" [{c.name}]" if c.name else (f" ({c.label})" if c.label else "")
    code = f" [{o.code}]" if o.code else ""
    hint = f" (hint: {o.hint})" if o.hint else ""
    return f"{c.location}: {SEVERITY[o.verdict]}: {o.verdict}{label}: {o.message}{code}{hint}"


def _problems(report: Report) -> str:
    """``2 problems outside claims (1 error, 1 warning)``: every diagnostic of the run."""
    counts: dict[str, int] = {}
    for d in report.diagnostics:
        counts[d.severity] = counts.get(d.severity, 0) + 1
    n = len(report.diagnostics)
    parts = ", ".join(f"{k} {sev}{'s' if k != 1 else ''}" for sev, k in sorted(counts.items()))
    return f"{n} problem{'s' if n != 1 else ''} outside claims ({parts})"


def render(report: Report, verbose: bool = False, only: Collection[str] | None = None) -> str:
    """The whole terminal report: diagnostics, one line per claim, a summary.

    With ``only`` (a set of verdicts, as for ``--fail-on``), just the claims with those
    verdicts are listed, and the diagnostics of severity ``error`` if ``error`` is among them;
    the summary still counts everything, and a last line says how many claims were not shown.
    """
    lines: list[str] = []
    hidden = 0
    for d in report.diagnostics:
        if only is not None and not (d.severity == "error" and "error" in only):
            continue
        hint = f" (hint: {d.hint})" if d.hint else ""
        lines.append(f"{d.location}: {d.severity}: {d.message} [{d.code}]{hint}")
    for c in report.claims:
        if only is not None and c.verdict not in only:
            hidden += 1
            continue
        lines.append(claim_line(c))
        if verbose:
            lines.append(f"    claim: {c.source}")
    s = report.summary
    total = sum(s.values())
    summary = (
        f"qreferee: {total} claim{'s' if total != 1 else ''}: {s['proved']} proved, {s['refuted']} refuted, "
        f"{s['unproven']} unproven, {s['error']} error{'s' if s['error'] != 1 else ''}"
    )
    if report.diagnostics:
        summary += "; " + _problems(report)
    lines.append(summary)
    if only is not None:
        shown = ", ".join(v for v in VERDICTS if v in only) or "nothing"
        lines.append(f"qreferee: showing only {shown}; {hidden} claim{'s' if hidden != 1 else ''} not shown")
    if report.claims:
        lines.append(CAUTION)
    return "\n".join(lines) + "\n"

"""The library API: check a manuscript (path or text) and get one result per claim.

``check_path`` and ``check_text`` run the whole pipeline: scan -> parse -> elaborate ->
prove.  The command line only wraps them.
"""

from __future__ import annotations

import time
from collections.abc import Collection
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from verifier import __version__
from verifier.budget import DEFAULT_MAX_SECONDS, TimeExceeded, internal_error, time_limit
from verifier.claims import kinds
from verifier.claims import products as progression_products
from verifier.claims.kind import ClaimKind, ParsedClaim, Reading, Unread
from verifier.config import DEFAULT_FAIL_ON
from verifier.diagnostics import Diagnostic
from verifier.elaborate.elaborator import Elaborator, is_builtin, normal_name
from verifier.limits import TooLarge, allow_exact_values
from verifier.location import Location
from verifier.options import parse_range
from verifier.parallel import map_in_order
from verifier.parse import ast
from verifier.parse.grammar import (
    ParseFailure,
    parse_definition,
    parse_definitions,
    parse_row,
)
from verifier.parse.qualifiers import MatrixDefinition, cases_at, matrix_definition
from verifier.prove.evaluate import AtomTable
from verifier.prove.prover import DEFAULT_MAX_TERMS, Outcome, Prover
from verifier.scan import ScannedDocument, scan_path, scan_text
from verifier.scan.definitions import NEVER_DEFINED, defined_names
from verifier.scan.display import Row
from verifier.scan.document import ClaimBlock, DefineTag
from verifier.scan.text import MappedText

VERDICTS = ("proved", "refuted", "unproven", "error")


@dataclass
class ClaimResult:
    """The verdict on one claim, where it is, and its certificate or witness."""

    location: Location
    end: Location
    name: str | None
    label: str | None
    source: str
    outcome: Outcome
    seconds: float = 0.0
    reading: str = ""  # the claim as the parser saw it (after the author's macros were expanded)
    link: tuple[int, int] | None = None  # (i, n): the i-th link of a chain A = B = ... of n links
    note: str = ""  # how the claim was read, when it matters (one half of an equivalence)

    @property
    def verdict(self) -> str:
        """``proved``, ``refuted``, ``unproven`` or ``error``."""
        return self.outcome.verdict

    def to_dict(self) -> dict[str, Any]:
        """The JSON contract of one claim (fields are only ever added, never removed)."""
        o = self.outcome
        return {
            "file": self.location.file,
            "line": self.location.line,
            "column": self.location.column,
            "name": self.name,
            "label": self.label,
            "source": self.source,
            "kind": o.kind,
            "verdict": o.verdict,
            "message": o.message,
            "space": o.space,
            "method": o.method,
            "bound": o.bound,
            "terms_compared": o.terms_compared,
            "first_difference": o.first_difference,
            "seconds": round(self.seconds, 6),
            "end_line": self.end.line,
            "end_column": self.end.column,
            "code": o.code,
            "hint": o.hint,
            "components": o.components,
            "table": o.table,
            "suggestion": o.suggestion,
            "reading": self.reading,
            "certificate": self.certificate(),
            "progression": o.progression,
        }

    def certificate(self) -> dict[str, Any] | None:
        """The certificate of a proved claim as data (None for other verdicts)."""
        return kinds.KINDS[self.outcome.kind].certify(self.outcome)


@dataclass
class Report:
    """All results of one run."""

    claims: list[ClaimResult] = field(default_factory=list)
    diagnostics: list[Diagnostic] = field(default_factory=list)
    files: list[str] = field(default_factory=list)

    @property
    def summary(self) -> dict[str, int]:
        """How many claims got each verdict."""
        counts = dict.fromkeys(VERDICTS, 0)
        for c in self.claims:
            counts[c.verdict] += 1
        return counts

    @property
    def exit_code(self) -> int:
        """0 all proved, 1 some refuted/unproven or nothing checked, 2 some error or unreadable input."""
        return self.exit_status()

    def exit_status(self, fail_on: Collection[str] = DEFAULT_FAIL_ON) -> int:
        """The exit status when only the verdicts in ``fail_on`` count as failures.

        ``error`` covers claims with an error and problems outside claims (an unreadable
        file, a missing ``\\input``); it gives 2, ``refuted`` and ``unproven`` give 1.  A run
        that checked no claim at all gives 1 whatever ``fail_on`` says: nothing checked is no pass.
        """
        s = self.summary
        if "error" in fail_on and (s["error"] or any(d.severity == "error" for d in self.diagnostics)):
            return 2
        if any(s[v] for v in ("refuted", "unproven") if v in fail_on) or not self.claims:
            return 1
        return 0

    def to_dict(self) -> dict[str, Any]:
        """The JSON contract of a run."""
        return {
            "tool": "qreferee",
            "version": __version__,
            "claims": [c.to_dict() for c in self.claims],
            "summary": self.summary,
            "diagnostics": [d.to_dict() for d in self.diagnostics],
            "files": self.files,
        }


def check_path(
    path: str | Path,
    max_terms: int = DEFAULT_MAX_TERMS,
    jobs: int = 1,
    max_seconds: float | None = DEFAULT_MAX_SECONDS,
) -> Report:
    """Check every tagged claim of the manuscript at ``path`` (LaTeX, or Markdown by suffix)."""
    doc = scan_path(Path(path))
    return check_document(doc, max_terms=max_terms, jobs=jobs, max_seconds=max_seconds)


def check_paths(
    paths: list[str | Path],
    max_terms: int = DEFAULT_MAX_TERMS,
    jobs: int = 1,
    max_seconds: float | None = DEFAULT_MAX_SECONDS,
) -> list[Report]:
    """One report per manuscript, in order; ``jobs > 1`` shares the processes out.

    Several manuscripts are checked side by side, one process each at a time (each one's
    claims in order, with its own series cache); a single manuscript has its claims
    shared out instead.  Either way the reports are the ones a single process gives.
    """
    if len(paths) > 1 and jobs > 1:
        warm_up()
        return map_in_order(lambda i: check_path(paths[i], max_terms, 1, max_seconds), len(paths), jobs)
    return [check_path(p, max_terms=max_terms, jobs=jobs, max_seconds=max_seconds) for p in paths]


def warm_up() -> None:
    """Build the claim grammar once here, so that forked workers inherit it."""
    parse_row("1 = 1")


def check_text(
    text: str,
    filename: str = "<text>",
    markdown: bool | None = None,
    max_terms: int = DEFAULT_MAX_TERMS,
    jobs: int = 1,
    max_seconds: float | None = DEFAULT_MAX_SECONDS,
) -> Report:
    """Check a manuscript given as a string."""
    return check_document(scan_text(text, filename, markdown), max_terms=max_terms, jobs=jobs, max_seconds=max_seconds)


@dataclass
class _Pending:
    """A claim read and waiting for its decision: its result, its kind's module and the reading."""

    result: ClaimResult
    kind: ClaimKind
    reading: Reading


def check_document(
    doc: ScannedDocument,
    max_terms: int = DEFAULT_MAX_TERMS,
    jobs: int = 1,
    max_seconds: float | None = DEFAULT_MAX_SECONDS,
) -> Report:
    """Parse, elaborate and decide everything a scan found.

    ``jobs > 1`` decides claims in that many processes (same results, in document order);
    ``max_seconds`` bounds the time of each claim (see :mod:`verifier.budget`).
    """
    report = Report(diagnostics=list(doc.diagnostics), files=list(doc.files))
    if jobs > 1:
        warm_up()
    elaborator = Elaborator()
    prover = Prover(AtomTable(), max_terms=max_terms)
    pending: list[_Pending] = []
    allow_exact_values()
    for item in doc.items:
        # Reading a block (parsing, folding constants, elaborating) is under the time budget too.
        claims_before, pending_before = len(report.claims), len(pending)
        try:
            with time_limit(max_seconds):
                if isinstance(item, DefineTag):
                    _define(item, elaborator, report)
                else:
                    _block(item, elaborator, report, pending)
        except TimeExceeded:
            del report.claims[claims_before:], pending[pending_before:]
            report.claims.append(_unread(item, f"reading it took more than {max_seconds:g} s (the time budget)"))
            report.claims[-1].outcome.code = "time-budget"
        except (RecursionError, TooLarge, MemoryError) as exc:
            del report.claims[claims_before:], pending[pending_before:]
            report.claims.append(_unread(item, f"it is too large to read ({type(exc).__name__}: {exc})"))
    decided = map_in_order(lambda i: _decide(pending[i], prover, max_seconds), len(pending), jobs)
    for p, (outcome, seconds) in zip(pending, decided, strict=True):
        p.result.outcome = outcome
        p.result.seconds = seconds
    if not report.claims and not any(d.severity == "error" for d in report.diagnostics):
        report.diagnostics.append(no_claims_warning(report.files[0] if report.files else "<text>"))
    return report


NO_CLAIMS_HINT = (
    "tag each identity with a %@claim line (Markdown: <!-- @claim -->), "
    "or run 'qreferee screen --untagged FILE' to check the displays that carry no tag"
)


def no_claims_warning(file: str, hint: str = NO_CLAIMS_HINT) -> Diagnostic:
    """The warning of a run that found nothing to check (its exit status is 1, never 0)."""
    return Diagnostic(
        "no-claims", "warning", Location(file, 1, 1), f"no tagged claims in {file}; nothing was checked", hint
    )


def _decide(p: _Pending, prover: Prover, max_seconds: float | None) -> tuple[Outcome, float]:
    """Decide one pending claim (and look for a correction if it is refuted).

    Returns the outcome and the seconds this claim's own work took: its series, its proof
    or witness, and its suggestion.
    """
    start = time.perf_counter()
    try:
        with time_limit(max_seconds):
            outcome = p.kind.decide(p.reading, prover)
    except TimeExceeded:
        need = p.reading.over_budget(prover)
        outcome = Outcome(
            "error",
            p.reading.kind,
            f"stopped after {max_seconds:g} s (the time budget)" + (f"; {need}" if need else ""),
            code="time-budget",
            hint="raise --max-seconds if this is intended",
        )
    except Exception as exc:  # a bug in qreferee: this claim gets an error, the others are still checked
        outcome = internal_error(p.reading.crash_kind, exc)
    if outcome.verdict == "refuted" and outcome.kind == "equality":
        try:
            with time_limit(max_seconds):
                outcome.suggestion = p.reading.suggest(prover)
        except Exception:  # a suggestion is a courtesy; it never changes a verdict
            outcome.suggestion = None
        if outcome.suggestion:
            outcome.message += f"; suggestion: {outcome.suggestion}"
    if p.result.note:
        outcome.message += f"; {p.result.note}"
    return outcome, time.perf_counter() - start


def _unread(item: ClaimBlock | DefineTag, why: str) -> ClaimResult:
    """An error claim for a block (or definition) that could not be read within the limits."""
    what = "definition" if isinstance(item, DefineTag) else "claim"
    name = item.options.get("name") if isinstance(item, ClaimBlock) else None
    source = ""
    if isinstance(item, ClaimBlock) and item.rows:
        source = " ".join(item.rows[0].source_text.split())[:200]
    return _error(
        item.tag,
        "too-large",
        f"this {what} was not checked: {why}",
        "split it into smaller claims, or raise --max-seconds",
        source,
        name,
    )


def _define(item: DefineTag, elaborator: Elaborator, report: Report) -> None:
    report.diagnostics.extend(item.problems)
    if item.text is None:
        return
    if item.origin != "tag":
        _author_define(item, item.text, elaborator)
        return
    text = item.text
    matrix = matrix_definition(text.text)
    if matrix is not None:
        _define_matrix(matrix, text, elaborator, report)
        return
    parsed = parse_definition(text.text)
    if isinstance(parsed, ParseFailure):
        report.diagnostics.append(
            Diagnostic(
                "bad-define",
                "error",
                text.location(parsed.offset),
                f"cannot read this definition: {parsed.message}",
                "write NAME = expression",
            )
        )
        return
    if parsed.arg not in (None, "tau", "z", "q"):
        report.diagnostics.append(
            Diagnostic(
                "bad-define",
                "error",
                text.location(parsed.name_span[1]),
                "a definition names a function of \\tau; write NAME(\\tau) = ...",
                "",
            )
        )
        return
    name = parsed.name.replace(" ", "")
    try:
        reader = progression_products.Reader(elaborator.products, elaborator.author_forms())
        elaborator.products[normal_name(name)] = reader.read(parsed.body)
    except progression_products.NotProduct:
        elaborator.products.pop(normal_name(name), None)
    problem = elaborator.define(name, parsed.body, text.text)
    if problem is not None and normal_name(name) in elaborator.products:
        problem = None  # a product of f_k (docs/method.md#progressions), read by its own reader
    if problem is not None:
        report.diagnostics.append(
            Diagnostic(
                problem.code if problem.code != "syntax" else "bad-define",
                "error",
                text.location(problem.span[0]),
                problem.message,
                problem.hint,
            )
        )


def _author_define(item: DefineTag, text: MappedText, elaborator: Elaborator) -> None:
    """A definition found in the author's text (docs/method.md#author-definitions).

    From here on the name has the author's meaning.  A definition that cannot be read makes
    the name unusable (a later claim that uses it is an error that says where the definition
    is), so that no claim is ever decided with a meaning the author did not give.
    """
    where = f"{item.tag.file}:{item.tag.line}:{item.tag.column}"
    if item.origin == "mention":
        parsed_one = parse_definition(text.text)
        if not isinstance(parsed_one, ParseFailure):
            elaborator.mentions.setdefault(normal_name(parsed_one.name), where)
        return
    parsed = parse_definitions(text.text, frozenset(elaborator.exponentials))
    if isinstance(parsed, ParseFailure):
        for name in defined_names(text.text):
            elaborator.unread_definition(
                normal_name(name), f"{name} is defined at {where} in notation qreferee does not read ({parsed.message})"
            )
        return
    for d in parsed:
        name = normal_name(d.name)
        if d.exponential:  # e(x) := e^{2 pi i x}: e(n tau) is q^n from here on (parse/grammar.py)
            elaborator.exponentials.add(name)
            continue
        if name in NEVER_DEFINED or (is_builtin(name) and not _names_a_form(d.body, text.text)):
            continue  # the nome, or an index that shares a form's letter (j = 1)
        if d.arg not in (None, "tau", "z", "q"):
            elaborator.unread_definition(name, f"{name} is defined at {where} as a function of another variable")
            continue
        problem = elaborator.define(name, d.body, text.text, author=where)
        if problem is not None:
            elaborator.unread_definition(
                name, f"{name} is defined at {where}, but its definition cannot be used: {problem.message}"
            )


def _names_a_form(node: ast.Node, text: str) -> bool:
    """Whether an expression has q or a form in it (a definition of j must; 'j = 1' is an index)."""
    return any(
        isinstance(n, ast.Name | ast.Call | ast.BigSum) and not isinstance(n, ast.Number) for n in ast.walk(node)
    )


def _definition_block(block: ClaimBlock, elaborator: Elaborator, report: Report, pending: list[_Pending]) -> None:
    """Check the author's definition of a name qreferee already knows, against qreferee's meaning."""
    for row in block.rows:
        parsed = parse_definitions(row.text.text)
        if isinstance(parsed, ParseFailure):
            continue  # the define item that follows records it as unread
        for d in parsed:
            name = normal_name(d.name)
            if not is_builtin(name) or name in NEVER_DEFINED or not _names_a_form(d.body, row.text.text):
                continue
            if d.arg not in (None, "tau", "z", "q"):
                continue
            lhs = ast.Name(d.name_span, d.name, d.arg)
            saved = elaborator.forget(name)  # compare with qreferee's meaning, not an earlier author's
            try:
                claim = _claim(row.text, lhs, d.body, "=", d.span[0], row, None, block, elaborator)
            finally:
                elaborator.restore(name, saved)
            result = claim if isinstance(claim, ClaimResult) else claim.result
            result.note = f"the author's definition of {d.name}, compared with qreferee's {d.name}"
            if isinstance(claim, ClaimResult):
                result.outcome.message += f"; {result.note}"
            else:
                pending.append(claim)
            report.claims.append(result)


def _define_matrix(m: MatrixDefinition, text: MappedText, elaborator: Elaborator, report: Report) -> None:
    """``%@define Q = \\begin{pmatrix}...`` names a Gram matrix for ``\\Theta_Q``."""
    from verifier.forms.theta import QuadraticForm, parse_matrix

    rows = parse_matrix(m.matrix.strip())
    problem = rows if isinstance(rows, str) else QuadraticForm.from_rows(rows).validate()
    if problem is not None or isinstance(rows, str):
        report.diagnostics.append(
            Diagnostic(
                "bad-define",
                "error",
                text.location(m.at),
                f"cannot use this Gram matrix: {problem}",
                "give a symmetric positive-definite integer matrix with even diagonal",
            )
        )
        return
    name = normal_name(m.name)
    elaborator.matrices[name.removeprefix("\\")] = QuadraticForm.from_rows(rows)


def _error(
    loc: Location,
    code: str,
    message: str,
    hint: str,
    source: str = "",
    name: str | None = None,
    label: str | None = None,
    kind: str = "equality",
    end: Location | None = None,
) -> ClaimResult:
    """A claim whose verdict is ``error`` (it cannot be read or has no meaning)."""
    return ClaimResult(loc, end or loc, name, label, source, Outcome("error", kind, message, code=code, hint=hint))


def _block(
    block: ClaimBlock,
    elaborator: Elaborator,
    report: Report,
    pending: list[_Pending],
) -> None:
    name = block.options.get("name")
    fatal = [p for p in block.problems if p.code != "macro-expansion"]
    # An error about the whole block keeps the author's text of it.
    block_source = block.source or " ".join(row.source_text for row in block.rows)
    for p in block.problems:
        report.claims.append(_error(p.location, p.code, p.message, p.hint, block_source, name=name))
    if fatal:
        return
    if block.definition:
        _definition_block(block, elaborator, report, pending)
        return
    count = 0
    previous_side: MappedText | None = None
    chains: list[list[ClaimResult]] = []  # the claims of each chain A = B = C (rows continued by "&= D" too)
    for row in block.rows:
        text = row.text
        row_modulus, row_start = None, parse_range(block.options.get("for", ""))
        stripped = text.text.lstrip()
        continuation = stripped.startswith(("=", "\\ne", "\\not="))
        if not (continuation and previous_side is not None):
            chains.append([])
        offset = 0
        if continuation and previous_side is not None:
            offset = len(previous_side) + 1
            text = MappedText.concat(
                [
                    previous_side,
                    MappedText(" ", [previous_side.origin(len(previous_side))], text.source),
                    text,
                ],
                text.source,
            )
        cases = cases_at(text.text)
        if cases is not None:
            report.claims.append(
                _error(
                    text.location(cases),
                    "unsupported",
                    "a case distinction that gives a value is one piecewise definition, not a claim",
                    "tag each case as its own claim, e.g. f(n) = a \\quad (n \\ge 1)",
                    row.source_text,
                    name,
                    row.label,
                )
            )
            previous_side = None
            continue
        parsed_row = parse_row(text.text, frozenset(elaborator.exponentials))
        if isinstance(parsed_row, ParseFailure):
            report.claims.append(
                _error(
                    text.location(parsed_row.offset),
                    parsed_row.code,
                    parsed_row.message,
                    parsed_row.hint,
                    row.source_text,
                    name,
                    row.label,
                )
            )
            previous_side = None
            continue
        for k, statement in enumerate(parsed_row.statements):
            if k:
                chains.append([])  # each statement of a row is its own chain
            if isinstance(statement.relation, ast.SpaceClaim):
                count += 1
                claim_name = name if (name is None or count == 1) else f"{name}.{count}"
                about_space = _space_claim(text, statement.relation, row, claim_name, block, elaborator)
                if isinstance(about_space, ClaimResult):
                    report.claims.append(about_space)
                else:
                    report.claims.append(about_space.result)
                    pending.append(about_space)
                continue
            parsed = statement.relation
            claims_before = len(report.claims)
            modulus = statement.modulus if statement.modulus is not None else row_modulus
            start_n = statement.start[1] if statement.start is not None else row_start
            for i, rel in enumerate(parsed.rels):
                count += 1
                claim_name = name if (name is None or count == 1) else f"{name}.{count}"
                left_node, right_node = parsed.sides[i], parsed.sides[i + 1]
                start = left_node.span[0]
                if continuation and k == 0 and i == 0 and previous_side is not None:
                    start = offset + (len(text.text) - offset - len(stripped))
                pending_claim = _claim(
                    text,
                    left_node,
                    right_node,
                    rel,
                    start,
                    row,
                    claim_name,
                    block,
                    elaborator,
                    modulus,
                    start_n,
                    statement.residues,
                    statement.n_class,
                )
                result = pending_claim if isinstance(pending_claim, ClaimResult) else pending_claim.result
                if statement.iff:
                    result.note = _IFF_NOTE
                    if isinstance(pending_claim, ClaimResult):
                        result.outcome.message += f"; {_IFF_NOTE}"
                report.claims.append(result)
                chains[-1].append(result)
                if not isinstance(pending_claim, ClaimResult):
                    pending.append(pending_claim)
            if parsed.domain:
                for c in report.claims[claims_before:]:
                    c.reading += f" (read without '{parsed.domain}': it says where tau lives, not a claim)"
        final = parsed_row.statements[-1].relation
        if isinstance(final, ast.SpaceClaim):
            previous_side = None
            continue
        last = final.sides[-1]
        previous_side = text.slice(last.span[0], last.span[1])
    for chain in chains:
        if len(chain) > 1:
            for i, result in enumerate(chain, start=1):
                result.link = (i, len(chain))


# docs/method.md#layout: A = B \iff C = D is two claims; the equivalence is the author's.
_IFF_NOTE = "one side of an equivalence: each equation is checked, the equivalence itself is not"


def _claim(
    text: MappedText,
    left_node: ast.Node,
    right_node: ast.Node,
    rel: str,
    start: int,
    row: Row,
    name: str | None,
    block: ClaimBlock,
    elaborator: Elaborator,
    modulus: int | None = None,
    start_n: int | None = None,
    residues: tuple[str, tuple[int, ...]] | None = None,
    n_class: ast.NClass | None = None,
) -> _Pending | ClaimResult:
    """One relation of a row: the kind that takes it reads it (verifier/claims/kinds.py)."""
    loc = text.location(start)
    end = text.location(right_node.span[1] - 1)
    source = " ".join(
        text.source_slice(left_node.span[0], right_node.span[1]).replace("&", " ").replace("\\\\", " ").split()
    )
    claim = ParsedClaim(
        text,
        elaborator,
        block.options,
        left_node,
        right_node,
        rel,
        modulus=modulus,
        start_n=start_n,
        residues=residues,
        n_class=n_class,
    )
    return _read(claim, loc, end, source, row, name, block)


def _space_claim(
    text: MappedText, about: ast.SpaceClaim, row: Row, name: str | None, block: ClaimBlock, elaborator: Elaborator
) -> _Pending | ClaimResult:
    """A claim about a space (``\\dim M_k(...) = d``, ``f \\in S_k(...)``, ``f`` is an eigenform)."""
    lo, hi = about.span
    loc, end = text.location(lo), text.location(max(hi - 1, lo))
    source = " ".join(text.source_slice(lo, hi).replace("&", " ").split())
    claim = ParsedClaim(text, elaborator, block.options, space=about)
    return _read(claim, loc, end, source, row, name, block)


def _read(
    claim: ParsedClaim, loc: Location, end: Location, source: str, row: Row, name: str | None, block: ClaimBlock
) -> _Pending | ClaimResult:
    """The claim read by its kind: pending its decision, or an error result when it cannot be read."""
    found = kinds.read(claim)
    if isinstance(found, Unread):
        at = block.tag if found.at_tag else (loc if found.at is None else claim.text.location(found.at))
        return _error(at, found.code, found.message, found.hint, source, name, row.label, found.kind, end)
    kind, reading = found
    result = ClaimResult(loc, end, name, row.label, source, Outcome("error", reading.kind, "not decided"))
    result.reading = reading.shown
    return _Pending(result, kind, reading)

"""The library API: check a manuscript (path or text) and get one result per claim.

``check_path`` and ``check_text`` run the whole pipeline: scan -> parse -> elaborate ->
prove.  The command line only wraps them.
"""

from __future__ import annotations

import re
import time
from collections.abc import Callable, Collection
from dataclasses import dataclass, field
from fractions import Fraction
from pathlib import Path
from typing import Any

from verifier import __version__
from verifier.arith.elaborate import ArithmeticError_, to_arith, uses_arithmetic
from verifier.arith.terms import Fun as tFun
from verifier.arith.terms import Var as tVar
from verifier.arith.terms import free_variables
from verifier.arith.values import NotEvaluable, Values
from verifier.budget import DEFAULT_MAX_SECONDS, TimeExceeded, decide_timed, internal_error, time_limit
from verifier.claims import products as progression_products
from verifier.claims.progression import decide as decide_progression
from verifier.claims.progression import decide_dissection, decide_residues
from verifier.claims.reading import read as read_progression
from verifier.claims.reading import residue_set
from verifier.config import DEFAULT_FAIL_ON
from verifier.diagnostics import Diagnostic
from verifier.elaborate import ir
from verifier.elaborate.elaborator import Elaborator, Problem, is_builtin, normal_name
from verifier.elaborate.idiom import nome_letter, substitute
from verifier.elaborate.rescale import rescale_factor, rescale_side
from verifier.forms import registry
from verifier.forms.registry import NotModular
from verifier.limits import TooLarge, allow_exact_values
from verifier.location import Location
from verifier.options import parse_character, parse_group, parse_nome, parse_weight
from verifier.parallel import map_in_order
from verifier.parse import ast
from verifier.parse.grammar import (
    MAX_MODULUS_DIGITS,
    ParseFailure,
    parse_definition,
    parse_definitions,
    parse_row,
)
from verifier.parse.spaces import parse_space
from verifier.prove.arithmetic import ArithmeticClaim, decide_arithmetic
from verifier.prove.certificate import minimal as certificate_minimal
from verifier.prove.evaluate import AtomTable, laurent_to
from verifier.prove.membership import decide_dimension, decide_eigenform, decide_membership
from verifier.prove.prover import DEFAULT_MAX_TERMS, Outcome, Prover, claim_level
from verifier.prove.solve import decide_solve
from verifier.prove.suggest import suggestion
from verifier.scan import ScannedDocument, scan_path, scan_text
from verifier.scan.definitions import NEVER_DEFINED, defined_names
from verifier.scan.display import Row
from verifier.scan.document import ClaimBlock, DefineTag
from verifier.scan.text import MappedText

VERDICTS = ("proved", "refuted", "unproven", "error")
_NO_SIDE = ir.Side(ir.Const(ir.Typ(None), "0"), False)


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
        o = self.outcome
        if o.verdict != "proved":
            return None
        if o.certificate is not None:
            return o.certificate
        return certificate_minimal(o.method, o.kind, o.space, o.bound)


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
    result: ClaimResult
    left: ir.Side
    right: ir.Side
    rel: str
    unit: Fraction = Fraction(1)  # the author's exponent is the internal one divided by this
    character: str | None = None  # the tag's character= option
    task: Callable[[Prover], Outcome] | None = None  # claims about spaces are decided by this
    suggest: Callable[[Prover], str | None] | None = None  # a corrected claim, tried after a refutation


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
    if p.task is None:
        outcome, _ = decide_timed(prover, (p.left, p.right, p.rel, p.unit), max_seconds)
        outcome = _check_character(outcome, p.character)
    else:
        try:
            with time_limit(max_seconds):
                outcome = p.task(prover)
        except TimeExceeded:
            outcome = Outcome(
                "error",
                p.result.outcome.kind,
                f"stopped after {max_seconds:g} s (the time budget)",
                code="time-budget",
                hint="raise --max-seconds if this is intended",
            )
        except Exception as exc:  # a bug: this claim only
            outcome = internal_error(p.result.outcome.kind, exc)
    if p.suggest is not None and outcome.verdict == "refuted" and outcome.kind == "equality":
        try:
            with time_limit(max_seconds):
                outcome.suggestion = p.suggest(prover)
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
    matrix = _MATRIX_DEFINE.match(text.text)
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
    parsed = parse_definitions(text.text)
    if isinstance(parsed, ParseFailure):
        for name in defined_names(text.text):
            elaborator.unread_definition(
                normal_name(name), f"{name} is defined at {where} in notation qreferee does not read ({parsed.message})"
            )
        return
    for d in parsed:
        name = normal_name(d.name)
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


_MATRIX_DEFINE = re.compile(r"^\s*([A-Za-z](?:_\{?\w+\}?)?|\\[A-Za-z]+)\s*=\s*(\\begin\s*\{[bp]?matrix\}.*)$", re.S)


def _define_matrix(m: re.Match[str], text: MappedText, elaborator: Elaborator, report: Report) -> None:
    """``%@define Q = \\begin{pmatrix}...`` names a Gram matrix for ``\\Theta_Q``."""
    from verifier.forms.theta import QuadraticForm, parse_matrix

    rows = parse_matrix(m.group(2).strip())
    problem = rows if isinstance(rows, str) else QuadraticForm.from_rows(rows).validate()
    if problem is not None or isinstance(rows, str):
        report.diagnostics.append(
            Diagnostic(
                "bad-define",
                "error",
                text.location(m.start(2)),
                f"cannot use this Gram matrix: {problem}",
                "give a symmetric positive-definite integer matrix with even diagonal",
            )
        )
        return
    name = normal_name(m.group(1))
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
        text = _overline_p(row.text)
        text, residues = _residue_set(text)
        row_modulus, row_start = None, _range_option(block.options)
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
        if _CASES.search(text.text):
            report.claims.append(
                _error(
                    text.location(_CASES.search(text.text).start()),  # type: ignore[union-attr]
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
        parsed_row = parse_row(text.text)
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
                about_space = _space_claim(text, statement.relation, row, claim_name, elaborator)
                report.claims.append(about_space.result)
                if about_space.task is not None:
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
                    residues,
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


_CASES = re.compile(r"\\begin\s*\{d?cases\*?\}")
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
) -> _Pending | ClaimResult:
    loc = text.location(start)
    end = text.location(right_node.span[1] - 1)
    source = " ".join(
        text.source_slice(left_node.span[0], right_node.span[1]).replace("&", " ").replace("\\\\", " ").split()
    )
    kind = "equality" if rel == "=" else "inequality"
    if rel == "≡" and modulus is None:
        return _error(
            loc,
            "syntax",
            "a congruence needs its modulus",
            "write \\pmod{M}",
            source,
            name,
            row.label,
            "congruence",
            end,
        )
    if modulus is not None and modulus <= 0:
        return _error(
            loc,
            "too-large" if modulus < 0 else "syntax",
            f"the modulus has more than {MAX_MODULUS_DIGITS} digits" if modulus < 0 else "the modulus is 0",
            "a congruence needs a modulus of at least 1",
            source,
            name,
            row.label,
            "congruence",
            end,
        )
    if modulus is not None and rel == "=":
        rel = "≡"
    forms, matrices = elaborator.definitions, elaborator.matrices
    if _states_the_nome(left_node, right_node, text.text):
        return _error(
            loc,
            "unsupported-notation",
            "q = e^{2\\pi i\\tau} states the variable of the expansions; it is qreferee's own convention, not a claim",
            "remove the tag from this statement (e^{2\\pi i n\\tau} in claims is read as q^n)",
            source,
            name,
            row.label,
            kind,
            end,
        )
    # A claim written in another letter for q (\prod (1 - x^n)) is read with that letter as q.
    letter = nome_letter((left_node, right_node), set(forms) | set(matrices))
    if letter is not None:
        left_node, right_node = (substitute(n, {letter: ast.Name(n.span, "q")}) for n in (left_node, right_node))
    progression = _progression_claim(left_node, right_node, rel, text, elaborator, modulus, start_n, residues)
    if residues is not None and progression is None:
        return _error(
            loc,
            "unsupported",
            f"a residue set ({residues[0]} in a list) is read only after a congruence a(mn+{residues[0]}) "
            "\\equiv 0 \\pmod{M} of a partition-type function",
            "tag each residue class as its own claim",
            source,
            name,
            row.label,
            kind,
            end,
        )
    if progression is not None:
        kind = "congruence" if modulus is not None else ("equality" if progression[1] else "arithmetic")
        result = ClaimResult(loc, end, name, row.label, source, Outcome("error", kind, "not decided"))
        result.reading = " ".join(text.text[left_node.span[0] : right_node.span[1]].split())
        decide = progression[0]
        return _Pending(result, _NO_SIDE, _NO_SIDE, "=", task=lambda prover: decide())
    if rel == "≡" or any(uses_arithmetic(n, forms, matrices) for n in (left_node, right_node)):
        return _arithmetic_claim(
            text, left_node, right_node, rel, loc, end, source, row, name, elaborator, modulus, start_n
        )
    if "solve" in block.options:
        return _solve_claim(text, left_node, right_node, rel, loc, end, source, row, name, block, elaborator)
    nome = parse_nome(block.options.get("nome", ""))
    if nome is None:
        return _error(
            block.tag,
            "bad-option",
            f"cannot read nome={block.options['nome']}",
            "write nome={e^{\\pi i \\tau}} or nome={e^{2\\pi i \\tau}}",
            source,
            name,
            row.label,
            kind,
            end,
        )
    elaborator.nome = nome
    elaborator.allow_mixed = any(
        isinstance(n, ast.BigSum) and n.kind == "at_least" for side in (left_node, right_node) for n in ast.walk(side)
    )
    sides: list[ir.Side] = []
    try:
        for node in (left_node, right_node):
            side = elaborator.side(node, text.text)
            if isinstance(side, Problem):
                at = text.location(side.span[0])
                return _error(at, side.code, side.message, side.hint, source, name, row.label, kind, end)
            sides.append(side)
    finally:
        elaborator.nome = Fraction(1)
        elaborator.allow_mixed = False
    # q -> q^T makes every exponent integral (eta offsets, q^{1/24}, the nome); docs/method.md#eta-offset.
    t = rescale_factor(*sides)
    try:
        left, right = (rescale_side(s, t) for s in sides)
    except ValueError as exc:
        return _error(loc, "unsupported", str(exc), "", source, name, row.label, kind, end)
    if left.printed or right.printed:
        kind = "prefix"
    try:
        problem = _check_options(block.options, left, right, t)
    except NotModular as exc:
        problem = ("not-modular", f"not modular: {exc}", "")
    if problem is not None:
        code, message, hint = problem
        return _error(block.tag, code, message, hint, source, name, row.label, kind, end)
    result = ClaimResult(loc, end, name, row.label, source, Outcome("error", kind, "not decided"))
    result.reading = " ".join(text.text[left_node.span[0] : right_node.span[1]].split())
    redefined = sorted(
        {
            elaborator.authored[n]
            for node in (left_node, right_node)
            for n in _names_in(node)
            if n in elaborator.authored and is_builtin(n)
        }
    )
    if redefined:
        result.reading += " [" + "; ".join(redefined) + "]"
    if letter is not None:
        result.reading += f" (with {letter} read as q)"
    make_build = _side_builder(elaborator, text, nome)

    def suggest(prover: Prover) -> str | None:
        if left.printed or right.printed:
            return None
        return suggestion(prover, left_node, right_node, make_build)

    return _Pending(result, left, right, rel, Fraction(t) * nome, block.options.get("character"), suggest=suggest)


def _overline_p(text: MappedText) -> MappedText:
    """``\\overline{p}`` (overpartitions) as one control word, padded to keep every offset."""
    out = progression_products.OVERLINE_P.sub(
        lambda m: progression_products.PBAR + " " * (len(m.group(0)) - len(progression_products.PBAR)), text.text
    )
    return text if out == text.text else MappedText(out, text.origins, text.source)


def _residue_set(text: MappedText) -> tuple[MappedText, tuple[str, tuple[int, ...]] | None]:
    """A trailing residue set ``(t \\in \\{3, 5, 6\\})`` taken out (blanked, offsets kept)."""
    out, residues = residue_set(text.text)
    return (text if residues is None else MappedText(out, text.origins, text.source)), residues


def _progression_claim(
    left_node: ast.Node,
    right_node: ast.Node,
    rel: str,
    text: MappedText,
    elaborator: Elaborator,
    modulus: int | None,
    start_n: int | None,
    residues: tuple[str, tuple[int, ...]] | None = None,
) -> tuple[Callable[[], Outcome], bool] | None:
    """A claim about a progression a(mn+t) or a dissection (docs/method.md#progressions), or None.

    Returns the decision and whether the claim is a dissection.  A plain identity between
    products is read as a dissection only when the forms route cannot take it (a side it
    cannot read, or two sides of different weights).
    """

    def dissection_ok() -> bool:
        sides = [elaborator.side(n, text.text) for n in (left_node, right_node)]
        weights = [None if isinstance(s, Problem) else s.expr.typ.weight for s in sides]
        return any(isinstance(s, Problem) for s in sides) or weights[0] != weights[1]

    reading = read_progression(
        left_node,
        right_node,
        rel,
        modulus,
        start_n,
        elaborator.products,
        elaborator.author_forms(),
        dissection_ok,
        residues,
    )
    if reading is None:
        return None
    if reading.residues is not None:
        var, many = reading.residues[0], reading.claims
        return (lambda: decide_residues(var, many)), False
    if reading.dissection is not None:
        p, claims = reading.dissection, reading.claims
        return (lambda: decide_dissection(p, claims)), True
    claim = reading.claims[0]
    return (lambda: decide_progression(claim)), False


_RANGE_OPTION = re.compile(r"^\s*([a-z])\s*(?:\\geq?|>=|\\geqslant)\s*(-?\d+)\s*$")


def _range_option(options: dict[str, str]) -> int | None:
    """The first n of the tag option ``for=n \\ge 1``; a range written in the claim wins over it."""
    o = _RANGE_OPTION.match(options.get("for", ""))
    return int(o.group(2)) if o else None


def _states_the_nome(left: ast.Node, right: ast.Node, text: str) -> bool:
    """``q = e^{2 pi i tau}`` (either way round): the author names the variable."""
    for a, b in ((left, right), (right, left)):
        written = text[b.span[0] : b.span[1]].lstrip()
        if (
            isinstance(a, ast.Name)
            and a.text == "q"
            and a.arg is None
            and written.startswith(("e^", "\\exp"))
            and isinstance(b, ast.Power)
            and isinstance(b.base, ast.Name)
            and b.base.text == "q"
        ):
            return True
    return False


def _arithmetic_claim(
    text: MappedText,
    left_node: ast.Node,
    right_node: ast.Node,
    rel: str,
    loc: Location,
    end: Location,
    source: str,
    row: Row,
    name: str | None,
    elaborator: Elaborator,
    modulus: int | None,
    start_n: int | None,
) -> _Pending | ClaimResult:
    """A claim about arithmetic functions (or a congruence), decided by :mod:`verifier.prove.arithmetic`."""
    kind = "congruence" if modulus is not None else "arithmetic"
    forms, matrices = elaborator.definitions, elaborator.matrices
    sides: list[Any] = []
    for node in (left_node, right_node):
        if not uses_arithmetic(node, forms, matrices) and rel == "≡":
            # A form in a congruence stands for its sequence of coefficients.
            side = elaborator.side(node, text.text)
            if isinstance(side, Problem):
                return _error(
                    text.location(side.span[0]), side.code, side.message, side.hint, source, name, row.label, kind, end
                )
            if side.printed:
                return _error(
                    loc,
                    "unsupported",
                    "congruences with printed expansions are not supported",
                    "",
                    source,
                    name,
                    row.label,
                    kind,
                    end,
                )
            sides.append(t_Fun("coef", side.expr))
            continue
        try:
            sides.append(to_arith(node, text.text, forms, matrices, lambda f: f))
        except ArithmeticError_ as exc:
            return _error(
                text.location(exc.span[0]), "unsupported", str(exc), exc.hint, source, name, row.label, kind, end
            )
    free = set().union(*(free_variables(s) for s in sides))
    if len(free) > 1:
        return _error(
            loc,
            "syntax",
            f"the claim has several free variables ({', '.join(sorted(free))})",
            "a claim for all n has one free variable",
            source,
            name,
            row.label,
            kind,
            end,
        )
    var = next(iter(free)) if free else None
    if var is None and any(isinstance(s, tFun) and s.name == "coef" and isinstance(s.arg, tVar) for s in sides):
        var = "n"
    start = start_n if start_n is not None else (0 if rel == "≡" and not free else 1)
    claim = ArithmeticClaim(sides[0], sides[1], rel, var, start, modulus)
    result = ClaimResult(loc, end, name, row.label, source, Outcome("error", kind, "not decided"))

    def task(prover: Prover) -> Outcome:
        def series_of(form: ir.Expr, prec: int) -> Any:
            if rescale_factor(ir.Side(form, False)) != 1:
                raise NotEvaluable("the form has fractional exponents (q^{1/24}, ...); its a(n) is not defined")
            return laurent_to(form, prec, prover.table, prover.max_terms * 2)

        return decide_arithmetic(prover, claim, Values(series_of))

    return _Pending(result, _NO_SIDE, _NO_SIDE, "=", task=task)


def _names_in(node: ast.Node) -> set[str]:
    out = set()
    for n in ast.walk(node):
        if isinstance(n, ast.Name):
            out.add(normal_name(n.text))
        elif isinstance(n, ast.Call):
            out.add(normal_name(n.name))
    return out


def _side_builder(
    elaborator: Elaborator, text: MappedText, nome: Fraction
) -> Callable[[ast.Node, ast.Node, dict[str, Fraction]], Callable[[dict[str, Fraction]], Any]]:
    """Elaborate a claim's two sides again with values for unknown names (solve=, suggestions).

    The definitions and matrices known at this point of the document are captured now.
    """
    definitions, matrices = dict(elaborator.definitions), dict(elaborator.matrices)

    def make_build(
        lt: ast.Node, rt: ast.Node, fixed: dict[str, Fraction]
    ) -> Callable[[dict[str, Fraction]], tuple[ir.Side, ir.Side] | str]:
        def build(values: dict[str, Fraction]) -> tuple[ir.Side, ir.Side] | str:
            local = Elaborator(definitions)
            local.matrices, local.nome, local.unknowns = matrices, nome, {**values, **fixed}
            sides = []
            for node in (lt, rt):
                side = local.side(node, text.text)
                if isinstance(side, Problem):
                    return side.message
                sides.append(side)
            factor = rescale_factor(*sides)
            return rescale_side(sides[0], factor), rescale_side(sides[1], factor)

        return build

    return make_build


def _solve_claim(
    text: MappedText,
    left_node: ast.Node,
    right_node: ast.Node,
    rel: str,
    loc: Location,
    end: Location,
    source: str,
    row: Row,
    name: str | None,
    block: ClaimBlock,
    elaborator: Elaborator,
) -> _Pending | ClaimResult:
    """``solve=a,b``: find the values of the unknowns that make the identity true."""
    unknowns = [u.strip() for u in re.split(r"[,\s]+", block.options["solve"]) if u.strip()]
    if rel != "=" or not unknowns:
        return _error(
            loc,
            "bad-option",
            "solve= needs unknowns and an equality",
            "write solve=a,b",
            source,
            name,
            row.label,
            "solve",
            end,
        )
    build_sides = _side_builder(elaborator, text, Fraction(1))(left_node, right_node, {})

    def build(values: dict[str, Fraction]) -> tuple[ir.Side, ir.Side] | str:
        sides: tuple[ir.Side, ir.Side] | str = build_sides(values)
        if not isinstance(sides, str) and (sides[0].printed or sides[1].printed):
            return "solve= works on identities between forms, not printed expansions"
        return sides

    result = ClaimResult(loc, end, name, row.label, source, Outcome("error", "solve", "not decided"))
    return _Pending(result, _NO_SIDE, _NO_SIDE, "=", task=lambda prover: decide_solve(prover, build, unknowns))


def t_Fun(name: str, form: ir.Expr) -> tFun:
    """The coefficient sequence n -> a_n(form) as an arithmetic function of n."""
    return tFun(f"a({form.text})", name, None, tVar("n", "n"), form)


def _space_claim(
    text: MappedText, claim: ast.SpaceClaim, row: Row, name: str | None, elaborator: Elaborator
) -> _Pending:
    """A claim about a space (``\\dim M_k(...) = d``, ``f \\in S_k(...)``, ``f`` is an eigenform).

    The grammar has read its shape (rule ``space_claim``); the space's inside is read by
    :func:`verifier.parse.spaces.parse_space`.
    """
    body = text.text
    lo, hi = claim.span
    loc, end = text.location(lo), text.location(max(hi - 1, lo))
    source = " ".join(text.source_slice(lo, hi).replace("&", " ").split())
    kind = claim.kind

    def failed(at: int, code: str, message: str, hint: str = "") -> _Pending:
        result = _error(text.location(at), code, message, hint, source, name, row.label, kind, end)
        return _Pending(result, _NO_SIDE, _NO_SIDE, "=")

    spec = parse_space(claim.space) if claim.space is not None else None
    if isinstance(spec, str):
        return failed(claim.space_at, "syntax", spec)
    result = ClaimResult(loc, end, name, row.label, source, Outcome("error", kind, "not decided"))
    if kind == "dimension":
        assert spec is not None and claim.value is not None
        stated, dim_spec = claim.value, spec
        return _Pending(result, _NO_SIDE, _NO_SIDE, "=", task=lambda prover: decide_dimension(dim_spec, stated))
    assert claim.form is not None
    side = elaborator.side(claim.form, body)
    if isinstance(side, Problem):
        return failed(side.span[0], side.code, side.message, side.hint)
    if kind == "eigenform":
        return _Pending(result, side, side, "=", task=lambda prover: decide_eigenform(prover, side))
    assert spec is not None
    member_spec = spec
    return _Pending(result, side, side, "=", task=lambda prover: decide_membership(prover, side, member_spec))


def _check_options(options: dict[str, str], left: ir.Side, right: ir.Side, t: int) -> tuple[str, str, str] | None:
    if "weight" in options:
        stated = parse_weight(options["weight"])
        if stated is None:
            return (
                "bad-option",
                f"cannot read weight={options['weight']}",
                "write weight=8 or weight=1/2",
            )
        for side, which in ((left, "left"), (right, "right")):
            w = side.expr.typ.weight
            if not side.printed and w is not None and w != stated:
                return (
                    "weight-mismatch",
                    f"the tag states weight {stated}, but the {which} side ({_short(side.expr.text)}) has weight {w}",
                    "correct the tag or the claim",
                )
    if "character" in options and parse_character(options["character"]) is None:
        return ("bad-option", f"cannot read character={options['character']}", "write \\chi_{-4} or trivial")
    if "group" in options and t == 1:
        # (A rescaled claim lives at T times the author's level; its group is not compared.)
        group = parse_group(options["group"])
        if group is None:
            return (
                "bad-group",
                f"cannot read group={options['group']}",
                "write SL2(Z), \\Gamma_0(N) or \\Gamma_1(N)",
            )
        level = claim_level(left, right)
        if group[1] % level:
            needs = [
                (a.text, n)
                for s in (left, right)
                for a in ir.atoms_of(s.expr)
                if group[1] % (n := registry.level(a.key, int(a.scale), a.params))
            ]
            culprit = f" ({needs[0][0]} needs level {needs[0][1]})" if needs else ""
            return (
                "group-mismatch",
                f"the tag states level {group[1]}, but the claim needs level {level}{culprit}",
                "state a group the forms live on",
            )
    return None


def _check_character(outcome: Outcome, stated: str | None) -> Outcome:
    """A decided claim whose tag states another character than the one found is an error."""
    if stated is None or outcome.space is None or outcome.verdict == "error":
        return outcome
    chi = parse_character(stated)
    found = outcome.space.get("character")
    if chi is not None and found != chi.name:
        return Outcome(
            "error",
            outcome.kind,
            f"the tag states character {chi.name}, but the claim's forms have character {found}",
            outcome.space,
            code="character-mismatch",
            hint="correct the tag or the claim",
        )
    return outcome


def _short(text: str) -> str:
    text = " ".join(text.split())
    return text if len(text) <= 40 else text[:37] + "..."

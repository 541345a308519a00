"""The ``qreferee`` command: a thin layer over :mod:`verifier.api`.

Heavy imports (FLINT, lark) happen only when a command runs, so ``--help`` is instant.
"""

from __future__ import annotations

import argparse
import contextlib
import importlib
import os
import sys
import tempfile
from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from verifier.api import Report
    from verifier.config import Settings

EXIT_ALL_PROVED = 0
EXIT_FINDINGS = 1  # some claim refuted or unproven
EXIT_INPUT_ERROR = 2  # some claim has an error, or the document cannot be read
EXIT_INTERNAL = 3  # a bug in qreferee itself

DESCRIPTION = """\
Prove or refute the modular-form identities tagged in a LaTeX or Markdown manuscript.

Tag a display in LaTeX with a comment line '%@claim' (Markdown: '<!-- @claim -->')
and qreferee decides it exactly: 'proved' with a certificate (space, Sturm bound,
coefficients compared), 'refuted' with the first coefficient that differs,
'unproven' when no proof applies, 'error' when the claim cannot be read.
"""

EPILOG = """\
exit status: 0 every claim proved; 1 some claim refuted or unproven;
2 some claim has an error or a file cannot be read; 3 internal error;
4 (with --recheck, and for 'recheck') a certificate failed the independent re-check.

examples:
  qreferee check paper.tex
  qreferee check notes.md --format json
  qreferee check paper.tex --format html -o report.html
  qreferee check paper.tex --format sarif -o qreferee.sarif
  qreferee check paper.tex --annotate paper-checked.tex
  qreferee check paper.tex --format json -o report.json && qreferee recheck report.json
  qreferee check paper.tex --proof-tex proofs.tex
  qreferee check paper.tex --fail-on refuted,error --only-failures
  qreferee explain mixed-weight
"""

# Modules that add their own subcommands: each has register(subparsers), which adds a
# subparser with set_defaults(func=...), func(args) -> exit status.
PLUGIN_MODULES = ("verifier.watch", "verifier.screen", "verifier.lsp")

FORMATS = ("text", "json", "html", "sarif")

ANNOTATE_HELP = (
    "also write a copy of the manuscript (one FILE) to OUT with each claim's verdict next to it; "
    "if OUT ends with '/' or is a folder, a copy of every file of the paper (\\input files too) under OUT, "
    "at the same relative paths, so that the copy compiles as a whole. "
    "LaTeX: a coloured note after each tagged display, on the same line, so line numbers are kept; "
    "Markdown: a blockquote under each claim block, between blank lines. With a single OUT file only the claims "
    "of FILE itself are placed; claims in \\input files are counted in a summary. To get FILE back byte for byte, "
    "delete every span from \\iffalse<qreferee>\\fi to \\iffalse</qreferee>\\fi{} (LaTeX), or every line "
    "containing <!-- qreferee-note --> and the blank line before and after each group of them (Markdown)"
)


class UsageError(Exception):
    """A request the command refuses (exit status 2), with the message to print."""


def build_parser(plugins: bool = True) -> argparse.ArgumentParser:
    """The argument parser (exposed for tests and documentation).

    ``plugins=False`` leaves out the subcommands of :data:`PLUGIN_MODULES` (and their
    imports), for a command line that cannot need them (see :func:`_needs_plugins`).
    """
    from verifier import __version__
    from verifier.argtypes import positive_int, positive_seconds

    parser = argparse.ArgumentParser(
        prog="qreferee",
        description=DESCRIPTION,
        epilog=EPILOG,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    parser.add_argument("--version", action="version", version=f"qreferee {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    check = sub.add_parser(
        "check",
        help="check the tagged claims of one or more manuscripts",
        description="Check every tagged claim; \\input/\\include are followed.",
    )
    check.add_argument("files", nargs="+", metavar="FILE", help="a .tex (or other LaTeX) or .md file")
    check.add_argument(
        "--format",
        choices=FORMATS,
        default="text",
        help="text: one 'file:line:col: severity: verdict: message' line per claim; json: the full report; "
        "html: a self-contained page; sarif: SARIF 2.1.0 for code-scanning tools",
    )
    check.add_argument(
        "-o",
        "--output",
        metavar="FILE",
        default=None,
        help="write the report to FILE instead of standard output ('-'), atomically and never over an input",
    )
    check.add_argument("--annotate", metavar="OUT", default=None, help=ANNOTATE_HELP)
    check.add_argument(
        "--max-terms",
        type=positive_int,
        default=None,
        metavar="N",
        help="most coefficients one claim may compute (default 50000); over it the claim is an error",
    )
    check.add_argument(
        "--max-seconds",
        type=positive_seconds,
        default=None,
        metavar="S",
        help="time budget of one claim in seconds (default 60); over it the claim is an error",
    )
    check.add_argument(
        "--jobs",
        type=positive_int,
        default=None,
        metavar="N",
        help="decide claims in N processes (same results as one)",
    )
    check.add_argument("-v", "--verbose", action="store_true", help="also print each claim as it was read")
    check.add_argument(
        "--recheck",
        action="store_true",
        help="also re-verify every certificate with the independent checker (as 'qreferee recheck'); "
        "a certificate that does not hold up makes the exit status 4",
    )
    check.add_argument(
        "--proof-tex",
        metavar="OUT",
        default=None,
        help="also write OUT, a LaTeX file with one proof paragraph per proved claim and a bibliography",
    )
    add_control_arguments(check)
    recheck = sub.add_parser(
        "recheck",
        help="re-verify the certificates of a JSON report with an independent checker",
        description="Re-verify every certificate of a report written by 'qreferee check --format json', "
        "with a separate implementation (exact rationals, other algorithms). Exit status: 0 all confirmed; "
        "1 some not rechecked (construct or method not implemented); 4 some recheck-failed; 2 unreadable report.",
    )
    recheck.add_argument("report", metavar="REPORT.json", help="a JSON report of qreferee check")
    recheck.add_argument("--format", choices=("text", "json"), default="text", help="output format")
    explain = sub.add_parser("explain", help="describe a diagnostic code")
    explain.add_argument("code", nargs="?", help="a code such as mixed-weight; none lists all codes")
    for name in PLUGIN_MODULES if plugins else ():
        try:
            module = importlib.import_module(name)
        except ImportError:
            continue  # not installed (yet): the other commands work without it
        register = getattr(module, "register", None)
        if callable(register):
            register(sub)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit status."""
    parser = build_parser(plugins=_needs_plugins(sys.argv[1:] if argv is None else list(argv)))
    args = parser.parse_args(argv)
    if args.command is None:
        parser.print_help()
        return EXIT_INPUT_ERROR
    if args.command == "explain":
        return _explain(args.code)
    if args.command == "recheck":
        return _recheck(args.report, args.format)
    func = getattr(args, "func", None)
    try:
        if callable(func):
            return int(func(args))
        return _check(args)
    except UsageError as exc:
        print(f"qreferee: {exc}", file=sys.stderr)
        return EXIT_INPUT_ERROR
    except KeyboardInterrupt:
        return 130
    except Exception as exc:  # a bug, not a finding: say so distinctly
        print(f"qreferee: internal error: {type(exc).__name__}: {exc}", file=sys.stderr)
        return EXIT_INTERNAL


def _needs_plugins(argv: list[str]) -> bool:
    """False when ``argv`` names a built-in command or asks only for ``--version``.

    Then the plugin modules are not imported at all, so that ``qreferee --version`` and
    ``qreferee check`` (or ``explain``, ``recheck``) start without loading what ``watch`` and ``screen`` use.
    """
    words = [a for a in argv if not a.startswith("-")]
    if words:
        return words[0] not in ("check", "explain", "recheck")
    return not ("--version" in argv and not {"-h", "--help"} & set(argv))


def _explain(code: str | None) -> int:
    from verifier.diagnostics import CODES, explain

    if code is None:
        for c in CODES:
            print((explain(c) or c).splitlines()[0])  # one line per code; 'explain CODE' adds example and fix
        return EXIT_ALL_PROVED
    text = explain(code)
    if text is None:
        print(f"qreferee: no such code {code!r}; 'qreferee explain' lists them", file=sys.stderr)
        return EXIT_INPUT_ERROR
    print(text)
    from verifier import method

    anchor = method.for_code(code)
    if anchor is not None:
        print(method.describe(anchor))
    return EXIT_ALL_PROVED


def _recheck(path: str, fmt: str) -> int:
    from verifier.recheck.reader import Unreadable, read_report
    from verifier.recheck.run import EXIT_UNREADABLE, recheck_report, render_json, render_text

    try:
        data = read_report(path)
    except Unreadable as exc:
        print(f"qreferee: {exc}", file=sys.stderr)
        return EXIT_UNREADABLE
    done = recheck_report(data)
    sys.stdout.write(render_json(done) if fmt == "json" else render_text(done))
    return done.exit_code


def _recheck_combined(report: Report, to_stdout: bool) -> int | None:
    """Re-check a fresh report through its JSON form; the exit status if a certificate failed."""
    import json

    from verifier.recheck.run import EXIT_FAILED, recheck_report, render_text

    done = recheck_report(json.loads(json.dumps(report.to_dict())))
    (sys.stdout if to_stdout else sys.stderr).write(render_text(done))
    return EXIT_FAILED if done.exit_code == EXIT_FAILED else None


def _check(args: argparse.Namespace) -> int:
    from verifier.api import Report

    if args.annotate is not None and len(args.files) != 1:
        raise UsageError("--annotate takes exactly one manuscript")
    tree = args.annotate is not None and is_folder_target(args.annotate)  # a copy of every file of the paper
    inputs = [Path(f) for f in args.files]
    targets = [
        Path(t) for t in (args.output, None if tree else args.annotate, args.proof_tex) if t is not None and t != "-"
    ]
    _refuse_inputs(targets, inputs)
    if args.output is not None and args.annotate is not None and _same_file(Path(args.output), Path(args.annotate)):
        raise UsageError("--output and --annotate name the same file")

    annotate_source = _read_for_annotation(Path(args.files[0])) if args.annotate is not None and not tree else None

    combined = Report()
    status = EXIT_ALL_PROVED
    fail_on: frozenset[str] = frozenset()
    manuscripts = [Path(name) for name in args.files]
    all_settings = [resolve_settings(args, m) for m in manuscripts]
    for settings, report in zip(
        all_settings, check_manuscripts(manuscripts, all_settings, args.skip_files_without_tags), strict=True
    ):
        if report is None:
            continue
        status = max(status, report.exit_status(settings.fail_on))
        fail_on |= settings.fail_on
        combined.claims.extend(report.claims)
        combined.diagnostics.extend(report.diagnostics)
        combined.files.extend(report.files)
    # \input files are inputs too.
    _refuse_inputs(targets, [Path(f) for f in combined.files])

    if tree:
        write_paper_copies(combined, Path(args.files[0]).resolve().parent, Path(args.annotate))
    elif args.annotate is not None and annotate_source is not None:
        _annotate(Path(args.files[0]), annotate_source, Path(args.annotate), combined)
    if args.proof_tex is not None:
        from verifier.report import proof_tex

        write_atomic(Path(args.proof_tex), proof_tex.render(combined).encode("utf-8"))
    if args.only_failures and args.format == "text":
        from verifier.report import text

        rendered = text.render(combined, verbose=args.verbose, only=fail_on)
    else:
        rendered = render_report(combined, args.format, args.verbose)
    to_stdout = args.output is None or args.output == "-"
    if to_stdout:
        sys.stdout.write(rendered)
    else:
        write_atomic(Path(args.output), rendered.encode("utf-8"))
    if args.recheck:
        failed = _recheck_combined(combined, to_stdout and args.format == "text")
        if failed is not None:
            return failed
    return status


def add_control_arguments(parser: argparse.ArgumentParser) -> None:
    """The options that choose what fails, what is shown, the cache and the settings file."""
    parser.add_argument(
        "--fail-on",
        type=_fail_on,
        default=None,
        metavar="VERDICTS",
        help="comma-separated verdicts that give a non-zero exit status: refuted, unproven, error, or none "
        "(default refuted,unproven,error; 'error' includes unreadable files)",
    )
    parser.add_argument(
        "--only-failures",
        action="store_true",
        help="text output: print only the claims whose verdict is in --fail-on (and the summary)",
    )
    parser.add_argument(
        "--no-cache",
        action="store_true",
        default=None,
        help="decide every claim again: neither read nor write the verdict cache .qreferee-cache/ "
        "beside the manuscript (shared with 'watch')",
    )
    parser.add_argument(
        "--skip-files-without-tags",
        action="store_true",
        help="leave out, silently, every FILE in which the scan finds no tag and no problem "
        "(for hooks that pass every staged file)",
    )
    parser.add_argument(
        "--config",
        metavar="TOML",
        default=None,
        help="read project defaults from TOML (a qreferee.toml, or a pyproject.toml with [tool.qreferee]) "
        "instead of looking for one beside the manuscript and in its parent folders",
    )


def _fail_on(value: str) -> frozenset[str]:
    from verifier.config import parse_fail_on

    try:
        return parse_fail_on(value)
    except ValueError as exc:
        raise argparse.ArgumentTypeError(str(exc)) from exc


def resolve_settings(args: argparse.Namespace, manuscript: Path) -> Settings:
    """The command line's options over the project's settings file over the built-in defaults."""
    from verifier.config import ConfigError, resolve

    try:
        return resolve(
            manuscript,
            Path(args.config) if args.config else None,
            max_terms=args.max_terms or None,
            max_seconds=args.max_seconds,
            jobs=args.jobs,
            fail_on=args.fail_on,
            no_cache=bool(args.no_cache),
        )
    except ConfigError as exc:
        raise UsageError(str(exc)) from exc


def check_with_settings(manuscript: Path, settings: Settings, skip_without_tags: bool = False) -> Report | None:
    """Check one manuscript, through the verdict cache beside it unless the cache is off.

    None when ``skip_without_tags`` and the scan found neither a tag nor a problem.
    """
    from verifier.scan import scan_path

    doc = scan_path(manuscript)
    if skip_without_tags and not doc.items and not doc.diagnostics:
        return None
    if settings.cache:
        from verifier.cache import CachedChecker, default_cache_dir

        checker = CachedChecker(
            max_terms=settings.max_terms,
            run_options={"jobs": settings.jobs, "max_seconds": settings.max_seconds},
            tag_defaults=settings.tag_defaults,
        )
        return checker.check_document(doc, default_cache_dir(manuscript))
    from verifier.api import check_document
    from verifier.config import apply_tag_defaults

    apply_tag_defaults(doc, settings.tag_defaults)
    return check_document(doc, max_terms=settings.max_terms, jobs=settings.jobs, max_seconds=settings.max_seconds)


def check_manuscripts(
    manuscripts: list[Path], all_settings: list[Settings], skip_without_tags: bool = False
) -> list[Report | None]:
    """:func:`check_with_settings` for each manuscript, in order.

    With several manuscripts and ``--jobs N`` (N > 1), the manuscripts are checked side by
    side in N processes, each with its claims in order (see :mod:`verifier.parallel`);
    a single manuscript has its claims shared out instead.  The reports are the same.
    """
    jobs = max((s.jobs for s in all_settings), default=1)
    if len(manuscripts) < 2 or jobs < 2:
        return [check_with_settings(m, s, skip_without_tags) for m, s in zip(manuscripts, all_settings, strict=True)]
    import dataclasses

    from verifier.api import warm_up
    from verifier.parallel import map_in_order

    warm_up()
    one_each = [dataclasses.replace(s, jobs=1) for s in all_settings]
    return map_in_order(
        lambda i: check_with_settings(manuscripts[i], one_each[i], skip_without_tags), len(manuscripts), jobs
    )


def render_report(report: Report, fmt: str, verbose: bool) -> str:
    """The report in one of the output formats (text, json, html, sarif)."""
    if fmt == "json":
        from verifier.report import json_report

        return json_report.render(report)
    if fmt == "html":
        from verifier.report import html

        return html.render(report)
    if fmt == "sarif":
        from verifier.report import sarif

        return sarif.render(report)
    from verifier.report import text

    return text.render(report, verbose=verbose)


def _read_for_annotation(source: Path) -> str | None:
    """The manuscript's text for --annotate (None if unreadable: the check reports that)."""
    from verifier.annotate import has_annotations
    from verifier.scan import is_markdown

    try:
        data = source.read_bytes()
    except OSError:
        return None
    # surrogateescape keeps undecodable bytes, so the copy differs from the input only by the notes.
    text = data.decode("utf-8", errors="surrogateescape")
    markdown = is_markdown(source.name)
    if has_annotations(text, markdown=markdown):
        how = (
            "delete the lines containing <!-- qreferee-note -->"
            if markdown
            else "delete each span from \\iffalse<qreferee>\\fi to \\iffalse</qreferee>\\fi{}"
        )
        raise UsageError(f"{source} already contains qreferee annotations; strip them first ({how})")
    return text


def _annotate(source: Path, text: str, out: Path, report: Report) -> None:
    from verifier.annotate import annotate
    from verifier.scan import is_markdown

    if not report.files:
        raise UsageError(f"cannot annotate {source}: it could not be read")
    annotated = annotate(text, report, report.files[0], markdown=is_markdown(source.name))
    write_atomic(out, annotated.encode("utf-8", errors="surrogateescape"))


def is_folder_target(target: str) -> bool:
    """``--annotate OUT`` names a folder: it ends with a slash, or is an existing folder."""
    return target.endswith(("/", os.sep)) or Path(target).is_dir()


def write_paper_copies(report: Report, root: Path, out: Path) -> None:
    """An annotated copy of every file of the paper under ``out``, at its path relative to ``root``.

    Every target is checked before anything is written: none may be a file the run read.
    """
    from verifier.annotate import AlreadyAnnotated, paper_copies

    if not report.files:
        raise UsageError("cannot annotate: the manuscript could not be read")
    try:
        copies = paper_copies(report, root)
    except AlreadyAnnotated as exc:
        raise UsageError(str(exc)) from exc
    except (OSError, ValueError) as exc:
        raise UsageError(f"cannot annotate: {exc}") from exc
    targets = {out / rel: data for rel, data in copies.items()}
    _refuse_inputs(list(targets), [Path(f) for f in report.files])
    for target, data in targets.items():
        try:
            target.parent.mkdir(parents=True, exist_ok=True)
        except OSError as exc:
            raise UsageError(f"cannot write {target}: {exc.strerror or exc}") from exc
        write_atomic(target, data)


def _same_file(a: Path, b: Path) -> bool:
    try:
        if a.resolve() == b.resolve():
            return True
        return a.exists() and b.exists() and os.path.samefile(a, b)
    except OSError:
        return False


def _refuse_inputs(targets: list[Path], inputs: list[Path]) -> None:
    """Refuse to write any output over a file the run reads."""
    for target in targets:
        for source in inputs:
            if _same_file(target, source):
                raise UsageError(f"refusing to write {target}: it is the input {source}")


def write_atomic(path: Path, data: bytes) -> None:
    """Write ``data`` to ``path`` through a temporary file in the same folder and os.replace.

    Readers see the old file or the new one, never a half-written one.  A new file gets the
    usual permissions (0666 less the umask); an existing file keeps its permissions.
    """
    folder = path.parent if str(path.parent) else Path(".")
    try:
        mode = path.stat().st_mode & 0o7777
    except OSError:
        umask = os.umask(0)
        os.umask(umask)
        mode = 0o666 & ~umask
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=folder)
    except OSError as exc:
        raise UsageError(f"cannot write {path}: {exc.strerror or exc}") from exc
    try:
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
            handle.flush()
            os.fsync(handle.fileno())
        os.chmod(tmp, mode)
        os.replace(tmp, path)
    except BaseException as exc:
        with contextlib.suppress(OSError):
            os.unlink(tmp)
        if isinstance(exc, OSError):
            raise UsageError(f"cannot write {path}: {exc.strerror or exc}") from exc
        raise

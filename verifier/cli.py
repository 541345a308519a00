"""The ``qreferee`` command: a thin layer over :mod:`verifier.api`.

Heavy imports (FLINT, lark) happen only when a command runs, so ``--help`` is instant.
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Sequence

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
2 some claim has an error or a file cannot be read; 3 internal error.

examples:
  qreferee check paper.tex
  qreferee check notes.md --format json
  qreferee explain mixed-weight
"""


def build_parser() -> argparse.ArgumentParser:
    """The argument parser (exposed for tests and documentation)."""
    from verifier import __version__

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
        choices=("text", "json"),
        default="text",
        help="text: one 'file:line:col: severity: verdict: message' line per claim; json: the full report",
    )
    check.add_argument(
        "--max-terms",
        type=int,
        default=None,
        metavar="N",
        help="most coefficients one claim may compute (default 50000); over it the claim is an error",
    )
    check.add_argument("-v", "--verbose", action="store_true", help="also print each claim as it was read")
    explain = sub.add_parser("explain", help="describe a diagnostic code")
    explain.add_argument("code", nargs="?", help="a code such as mixed-weight; none lists all codes")
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit status."""
    parser = build_parser()
    args = parser.parse_args(argv)
    if args.command is None:
        parser.print_help()
        return EXIT_INPUT_ERROR
    if args.command == "explain":
        return _explain(args.code)
    try:
        return _check(args)
    except KeyboardInterrupt:
        return 130
    except Exception as exc:  # a bug, not a finding: say so distinctly
        print(f"qreferee: internal error: {type(exc).__name__}: {exc}", file=sys.stderr)
        return EXIT_INTERNAL


def _explain(code: str | None) -> int:
    from verifier.diagnostics import CODES, explain

    if code is None:
        for c in CODES:
            print(explain(c))
        return EXIT_ALL_PROVED
    text = explain(code)
    if text is None:
        print(f"qreferee: no such code {code!r}; 'qreferee explain' lists them", file=sys.stderr)
        return EXIT_INPUT_ERROR
    print(text)
    return EXIT_ALL_PROVED


def _check(args: argparse.Namespace) -> int:
    from verifier.api import Report, check_path
    from verifier.prove.prover import DEFAULT_MAX_TERMS

    max_terms = args.max_terms if args.max_terms else DEFAULT_MAX_TERMS
    combined = Report()
    for name in args.files:
        report = check_path(name, max_terms=max_terms)
        combined.claims.extend(report.claims)
        combined.diagnostics.extend(report.diagnostics)
        combined.files.extend(report.files)
    if args.format == "json":
        from verifier.report import json_report

        sys.stdout.write(json_report.render(combined))
    else:
        from verifier.report import text

        sys.stdout.write(text.render(combined, verbose=args.verbose))
    return combined.exit_code

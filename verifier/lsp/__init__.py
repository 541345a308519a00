"""``qreferee lsp``: a language server that puts verdicts, hovers and quick fixes in the editor.

Install with the extra ``qreferee[lsp]`` (pygls).  This module only registers the command;
pygls is imported when the server starts, so the other commands never load it.
"""

from __future__ import annotations

import argparse

# The time budget of one claim in the editor, in seconds, unless the command line says otherwise.
DEFAULT_SECONDS = 10.0

DESCRIPTION = """\
Start a language server on standard input and output, for editors that speak the Language
Server Protocol.  Open .tex and .md files are checked as you type (after a short pause) and
on save; only claims whose text, defines or macros changed are decided again (the verdict
cache shared with 'check' and 'watch').  Verdicts appear as diagnostics at each claim,
hovering a claim shows its reading, space, certificate or coefficient table, and quick fixes
apply a suggested correction, tag an untagged display or add a define line.  Needs the
optional dependency: pip install 'qreferee[lsp]'.
"""


def register(subparsers: argparse._SubParsersAction[argparse.ArgumentParser]) -> argparse.ArgumentParser:
    """Add the ``lsp`` subcommand."""
    parser = subparsers.add_parser(
        "lsp",
        help="run a language server on stdio (verdicts, hovers and quick fixes in the editor)",
        description=DESCRIPTION,
    )
    parser.add_argument(
        "--debounce",
        type=float,
        default=0.3,
        metavar="S",
        help="seconds of quiet after an edit before its manuscript is checked (default 0.3)",
    )
    parser.add_argument(
        "--max-seconds",
        type=float,
        default=DEFAULT_SECONDS,
        metavar="S",
        help=f"time budget of one claim in the server (default {DEFAULT_SECONDS:g}); over it the claim is an error",
    )
    parser.add_argument(
        "--max-terms", type=int, default=None, metavar="N", help="most coefficients one claim may compute"
    )
    parser.add_argument(
        "--no-cache", action="store_true", help="keep verdicts in memory only (no .qreferee-cache/ on disk)"
    )
    parser.add_argument("--config", metavar="TOML", default=None, help="project defaults from TOML, as for 'check'")
    parser.set_defaults(func=run)
    return parser


def run(args: argparse.Namespace) -> int:
    """Start the server (exit status 2 when pygls is not installed)."""
    import sys

    try:
        from verifier.lsp.server import Options, serve
    except ImportError as exc:
        print(
            f"qreferee: the language server needs pygls ({exc.name or exc}); install it with "
            "pip install 'qreferee[lsp]'",
            file=sys.stderr,
        )
        return 2
    return serve(
        Options(
            debounce=args.debounce,
            max_seconds=args.max_seconds,
            max_terms=args.max_terms,
            no_cache=args.no_cache,
            config=args.config,
        )
    )

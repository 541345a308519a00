"""Start-up: ``qreferee --version`` and ``qreferee check`` load nothing they do not use.

The time itself is measured in bench/ (section 5); here only *what* is imported is checked.
"""

from __future__ import annotations

import json
import subprocess
import sys

import pytest
from verifier import cli

HEAVY = ("flint", "lark", "verifier.api", "verifier.screen", "verifier.watch", "verifier.cache", "zipfile")


def _modules_after(argv: list[str]) -> set[str]:
    code = (
        "import sys, json, contextlib, io\n"
        "from verifier import cli\n"
        "with contextlib.redirect_stdout(io.StringIO()), contextlib.suppress(SystemExit):\n"
        f"    cli.main({argv!r})\n"
        "print(json.dumps(sorted(sys.modules)))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    return set(json.loads(out.splitlines()[-1]))


def test_version_imports_nothing_heavy() -> None:
    loaded = _modules_after(["--version"])
    assert not [m for m in HEAVY if m in loaded]


def test_check_help_does_not_load_the_plugins() -> None:
    loaded = _modules_after(["check", "--help"])
    assert not [m for m in ("verifier.screen", "verifier.watch") if m in loaded]


@pytest.mark.parametrize(
    ("argv", "needed"),
    [
        (["--version"], False),
        (["check", "paper.tex", "--format", "json"], False),
        (["explain", "syntax"], False),
        (["recheck", "report.json"], False),
        (["screen", "x.zip"], True),
        (["watch", "paper.tex"], True),
        (["--help"], True),
        (["--version", "--help"], True),
        ([], True),
    ],
)
def test_which_command_lines_load_the_plugins(argv: list[str], needed: bool) -> None:
    assert cli._needs_plugins(argv) is needed


def test_help_still_lists_every_command(capsys: pytest.CaptureFixture[str]) -> None:
    with pytest.raises(SystemExit):
        cli.main(["--help"])
    out = capsys.readouterr().out
    assert all(name in out for name in ("check", "explain", "screen", "watch"))

"""Controls for authors and CI: project defaults, --fail-on, --only-failures, the verdict cache, pre-commit.

Mathematical facts used, with their sources:

- E_4^2 = E_8 and E_4 E_6 = E_10 (dim M_8 = dim M_10 = 1 on SL2(Z): Serre, A Course in
  Arithmetic, VII.3.2); E_4 E_6 = E_12 is false (the weights differ).
- With Jacobi's thetas in the nome x = e^{pi i tau}, theta_2^8 + theta_3^8 + theta_4^8 = 2 E_4
  (from memory); the test checks it independently below with plain integer series.
"""

from __future__ import annotations

import argparse
import json
import re
import subprocess
import sys
from pathlib import Path
from typing import Any

import pytest
import sympy
from verifier import cache as cache_mod
from verifier import cli
from verifier.config import (
    DEFAULT_FAIL_ON,
    ConfigError,
    ProjectConfig,
    find_config,
    load_config,
    parse_fail_on,
    project_config,
)

from report_contract import validate_report

REPO = Path(__file__).resolve().parent.parent

TRUE = "%@claim name=a\n\\[ E_4^2 = E_8 \\]\n%@claim name=b\n\\[ E_4 E_6 = E_{10} \\]\n"
FALSE = "%@claim name=c\n\\[ E_4 E_6 = E_{12} \\]\n"
# True only when q and the thetas are read in the nome e^{pi i tau} (see the module docstring).
THETA = "%@claim name=th\n\\[ \\theta_2^8 + \\theta_3^8 + \\theta_4^8 = 2E_4 \\]\n"
JACOBI_NOME = "e^{\\pi i\\tau}"


def write(folder: Path, name: str, text: str) -> Path:
    path = folder / name
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text, encoding="utf-8")
    return path


def toml_string(value: str) -> str:
    return json.dumps(value)  # a JSON string is a valid TOML basic string


def run(*args: str, cwd: Path, env_cache: bool = False) -> subprocess.CompletedProcess[str]:
    import os

    env = dict(os.environ)
    if env_cache:
        env.pop("QREFEREE_NO_CACHE", None)
    return subprocess.run(
        [sys.executable, "-m", "verifier", *args], cwd=cwd, capture_output=True, text=True, timeout=120, env=env
    )


def main_json(args: list[str], capsys: pytest.CaptureFixture[str]) -> tuple[int, dict[str, Any]]:
    status = cli.main(["check", "--format", "json", *args])
    data = json.loads(capsys.readouterr().out)
    validate_report(data)
    return status, data


# -- the theta identity, checked independently ------------------------------------------


def _theta_series(terms: int) -> tuple[list[int], list[int], list[int]]:
    """theta_2, theta_3, theta_4 in x = e^{pi i tau}; theta_2 as x^{1/4} times a series in x."""
    t3, t4, t2 = [0] * terms, [0] * terms, [0] * terms
    for n in range(-terms, terms + 1):
        if n * n < terms:
            t3[n * n] += 1
            t4[n * n] += (-1) ** abs(n)
        k = n * n + n  # (n + 1/2)^2 = k + 1/4
        if 0 <= k < terms:
            t2[k] += 1
    return t2, t3, t4


def _mul(a: list[int], b: list[int]) -> list[int]:
    out = [0] * len(a)
    for i, x in enumerate(a):
        if x:
            for j in range(len(a) - i):
                out[i + j] += x * b[j]
    return out


def _pow(a: list[int], e: int) -> list[int]:
    out = [1] + [0] * (len(a) - 1)
    for _ in range(e):
        out = _mul(out, a)
    return out


def test_the_theta_identity_holds_in_the_nome_e_pi_i_tau() -> None:
    terms = 40
    t2, t3, t4 = _theta_series(terms)
    t2_8 = [0, 0, *_pow(t2, 8)[: terms - 2]]  # theta_2^8 = x^2 * (series)^8
    left = [a + b + c for a, b, c in zip(t2_8, _pow(t3, 8), _pow(t4, 8), strict=True)]
    # 2 E_4(q) with q = x^2: 2 + 480 sum sigma_3(n) x^{2n} (sigma_3 from sympy)
    right = [0] * terms
    right[0] = 2
    for n in range(1, terms // 2):
        right[2 * n] = 480 * int(sympy.divisor_sigma(n, 3))
    assert left == right


# -- project defaults --------------------------------------------------------------------


def test_find_config_prefers_qreferee_toml_and_stops_at_the_project_root(tmp_path: Path) -> None:
    project = tmp_path / "project"
    write(project, "pyproject.toml", "[tool.qreferee]\njobs = 2\n")
    paper = write(project, "papers/one/paper.tex", TRUE)
    assert find_config(paper) == project / "pyproject.toml"
    write(project, "papers/one/qreferee.toml", "jobs = 3\n")
    assert find_config(paper) == project / "papers/one/qreferee.toml"
    assert project_config(paper).jobs == 3
    # A pyproject.toml without [tool.qreferee] is the root of another project: the search stops.
    write(tmp_path, "pyproject.toml", "[tool.qreferee]\njobs = 4\n")
    other = write(tmp_path, "other/pyproject.toml", '[project]\nname = "x"\n')
    assert find_config(other.parent / "paper.tex") is None
    write(tmp_path, "repo/.git/HEAD", "ref: refs/heads/main\n")
    assert find_config(tmp_path / "repo" / "paper.tex") is None
    assert project_config(tmp_path / "repo" / "paper.tex") == ProjectConfig()


def test_load_config_reads_every_key(tmp_path: Path) -> None:
    path = write(
        tmp_path,
        "qreferee.toml",
        f"nome = {toml_string(JACOBI_NOME)}\ngroup = {toml_string(chr(92) + 'Gamma_0(4)')}\n"
        'max-seconds = 5\nmax_terms = 300\njobs = 2\nfail-on = ["refuted", "error"]\ncache = false\n',
    )
    config = load_config(path)
    assert config.nome == JACOBI_NOME and config.group == "\\Gamma_0(4)"
    assert (config.max_seconds, config.max_terms, config.jobs, config.cache) == (5.0, 300, 2, False)
    assert config.fail_on == {"refuted", "error"}
    assert config.tag_defaults() == {"nome": JACOBI_NOME, "group": "\\Gamma_0(4)"}


@pytest.mark.parametrize(
    "text",
    [
        "colour = 1\n",
        "jobs = 0\n",
        "jobs = true\n",
        "max-seconds = -1\n",
        "max-seconds = nan\n",
        "max-terms = 1.5\n",
        'fail-on = ["refuted", "sometimes"]\n',
        'nome = "e^{x}"\n',
        'group = "Gamma_7(3)"\n',
        'cache = "no"\n',
        "not toml at all [\n",
    ],
)
def test_bad_settings_are_refused(tmp_path: Path, text: str, capsys: pytest.CaptureFixture[str]) -> None:
    path = write(tmp_path, "qreferee.toml", text)
    with pytest.raises(ConfigError):
        load_config(path)
    paper = write(tmp_path, "paper.tex", TRUE)
    assert cli.main(["check", str(paper)]) == 2
    assert "qreferee.toml" in capsys.readouterr().err


def test_pyproject_table_is_read(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    write(tmp_path, "pyproject.toml", '[project]\nname = "paper"\n\n[tool.qreferee]\nfail-on = "error"\n')
    paper = write(tmp_path, "paper.tex", FALSE)
    assert cli.main(["check", str(paper)]) == 0  # a refutation does not fail this project
    assert cli.main(["check", str(paper), "--fail-on", "refuted"]) == 1  # the command line wins
    capsys.readouterr()


def test_project_nome_is_the_default_of_every_tag(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    paper = write(tmp_path, "paper.tex", THETA)
    status, data = main_json([str(paper)], capsys)
    assert (status, data["claims"][0]["verdict"]) == (1, "refuted")  # in the default nome it is false
    write(tmp_path, "qreferee.toml", f"nome = {toml_string(JACOBI_NOME)}\n")
    status, data = main_json([str(paper)], capsys)
    assert (status, data["claims"][0]["verdict"]) == (0, "proved")
    # The tag's own option wins over the project's default.
    write(tmp_path, "paper.tex", THETA.replace("name=th", "name=th nome={e^{2\\pi i\\tau}}"))
    status, data = main_json([str(paper)], capsys)
    assert data["claims"][0]["verdict"] == "refuted"


def test_project_group_is_the_default_of_every_tag(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # E_4(2 tau)^2 = E_8(2 tau) is E_4^2 = E_8 at tau -> 2 tau: it lives on Gamma_0(2), not SL2(Z).
    claim = "%@claim{opt}\n\\[ E_4(2\\tau)^2 = E_8(2\\tau) \\]\n"
    paper = write(tmp_path, "paper.tex", claim.format(opt=""))
    write(tmp_path, "qreferee.toml", 'group = "SL2(Z)"\n')
    status, data = main_json([str(paper)], capsys)
    assert (status, data["claims"][0]["code"]) == (2, "group-mismatch")
    write(tmp_path, "paper.tex", claim.format(opt=" group={\\Gamma_0(2)}"))
    status, data = main_json([str(paper)], capsys)
    assert (status, data["claims"][0]["verdict"]) == (0, "proved")


def test_project_budgets_and_command_line_overrides(tmp_path: Path) -> None:
    paper = write(tmp_path, "paper.tex", TRUE)
    write(tmp_path, "qreferee.toml", "max-terms = 300\nmax-seconds = 7\njobs = 2\n")
    parser = cli.build_parser()
    settings = cli.resolve_settings(parser.parse_args(["check", str(paper)]), paper)
    assert (settings.max_terms, settings.max_seconds, settings.jobs) == (300, 7.0, 2)
    assert settings.fail_on == DEFAULT_FAIL_ON
    given = parser.parse_args(["check", str(paper), "--max-terms", "900", "--max-seconds", "3", "--jobs", "1"])
    settings = cli.resolve_settings(given, paper)
    assert (settings.max_terms, settings.max_seconds, settings.jobs) == (900, 3.0, 1)


def test_project_max_terms_is_applied(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # Delta(11 tau) has weight 12 on Gamma_0(11): Sturm bound 12 * 12 / 12 = 12 (index 12).
    paper = write(tmp_path, "paper.tex", "%@claim\n\\[ \\Delta(11\\tau) = \\Delta(11\\tau) \\]\n")
    write(tmp_path, "qreferee.toml", "max-terms = 5\n")
    status, data = main_json([str(paper)], capsys)
    assert (status, data["claims"][0]["verdict"]) == (2, "error")
    status, data = main_json([str(paper), "--max-terms", "2000"], capsys)
    assert (status, data["claims"][0]["verdict"]) == (0, "proved")


def test_explicit_config_file(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    paper = write(tmp_path, "paper.tex", FALSE)
    settings = write(tmp_path, "ci/strict.toml", 'fail-on = ["error"]\n')
    assert cli.main(["check", str(paper), "--config", str(settings)]) == 0
    assert cli.main(["check", str(paper), "--config", str(tmp_path / "missing.toml")]) == 2
    capsys.readouterr()


# -- --fail-on and --only-failures -------------------------------------------------------


def test_parse_fail_on() -> None:
    assert parse_fail_on("refuted, error") == {"refuted", "error"}
    assert parse_fail_on("none") == frozenset()
    assert parse_fail_on(["Unproven"]) == {"unproven"}
    with pytest.raises(ValueError, match="refuted"):
        parse_fail_on("refuteed")
    with pytest.raises(ValueError):
        parse_fail_on("proved")


def test_fail_on_chooses_the_failing_verdicts(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    paper = write(tmp_path, "paper.tex", TRUE + FALSE)
    assert cli.main(["check", str(paper)]) == 1  # the documented default
    assert cli.main(["check", str(paper), "--fail-on", "error"]) == 0
    assert cli.main(["check", str(paper), "--fail-on", "none"]) == 0
    assert cli.main(["check", str(paper), "--fail-on", "refuted,unproven"]) == 1
    broken = write(tmp_path, "broken.tex", TRUE + "%@claim\n\\[ E_4 + E_6 = 0 \\]\n")  # mixed weights
    assert cli.main(["check", str(broken)]) == 2
    assert cli.main(["check", str(broken), "--fail-on", "refuted,unproven"]) == 0
    missing = tmp_path / "missing.tex"
    assert cli.main(["check", str(missing)]) == 2  # an unreadable file counts as an error
    assert cli.main(["check", str(missing), "--fail-on", "error"]) == 2
    capsys.readouterr()


def test_fail_on_unproven(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # mu(n) = mu(n) is trivially true (common practice), and the Moebius function has no modular
    # generating function, so qreferee leaves it unproven with the range checked.
    paper = write(tmp_path, "paper.tex", "%@claim\n\\[ \\mu(n) = \\mu(n) \\]\n")
    status, data = main_json([str(paper)], capsys)
    assert (status, data["claims"][0]["verdict"]) == (1, "unproven")
    assert cli.main(["check", str(paper), "--fail-on", "refuted,error"]) == 0
    assert cli.main(["check", str(paper), "--fail-on", "unproven"]) == 1
    capsys.readouterr()


def test_fail_on_is_checked_by_the_parser(tmp_path: Path) -> None:
    proc = run("check", "x.tex", "--fail-on", "refuted,maybe", cwd=tmp_path)
    assert proc.returncode == 2
    assert "maybe" in proc.stderr


def test_only_failures(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    paper = write(tmp_path, "paper.tex", TRUE + FALSE)
    assert cli.main(["check", str(paper)]) == 1
    full = capsys.readouterr().out
    assert cli.main(["check", str(paper), "--only-failures"]) == 1
    short = capsys.readouterr().out
    verdict_lines = [line for line in short.splitlines() if re.match(r"^\S+:\d+:\d+: ", line)]
    assert len(verdict_lines) == 1 and ": refuted [c]: " in verdict_lines[0]
    summary = "qreferee: 3 claims: 2 proved, 1 refuted, 0 unproven, 0 errors"
    assert summary in full and summary in short
    assert "2 claims not shown" in short
    # With --fail-on error, a refutation is not a failure and is not listed either.
    assert cli.main(["check", str(paper), "--only-failures", "--fail-on", "error"]) == 0
    assert not [line for line in capsys.readouterr().out.splitlines() if re.match(r"^\S+:\d+:\d+: ", line)]


def test_only_failures_leaves_other_formats_whole(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    paper = write(tmp_path, "paper.tex", TRUE + FALSE)
    status, data = main_json([str(paper), "--only-failures"], capsys)
    assert status == 1 and len(data["claims"]) == 3


# -- the verdict cache -------------------------------------------------------------------


class Counter:
    """Counts the tagged blocks that reach the engine."""

    def __init__(self, monkeypatch: pytest.MonkeyPatch) -> None:
        import verifier.api as api

        self.blocks: list[int] = []
        original = api.check_document

        def counting(doc: Any, *args: Any, **kwargs: Any) -> Any:
            self.blocks.append(sum(1 for item in doc.items if isinstance(item, cache_mod.ClaimBlock) and item.rows))
            return original(doc, *args, **kwargs)

        monkeypatch.setattr(api, "check_document", counting)

    def last(self) -> int:
        return self.blocks[-1] if self.blocks else 0


def _without_seconds(data: dict[str, Any]) -> list[dict[str, Any]]:
    return [{k: v for k, v in c.items() if k != "seconds"} for c in data["claims"]]


@pytest.fixture
def cache_on(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.delenv("QREFEREE_NO_CACHE", raising=False)


def test_check_reuses_verdicts_of_an_unchanged_paper(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch, cache_on: None
) -> None:
    counter = Counter(monkeypatch)
    paper = write(tmp_path, "paper.tex", TRUE + FALSE)
    status, first = main_json([str(paper)], capsys)
    assert counter.last() == 3 and (tmp_path / ".qreferee-cache").is_dir()
    status_again, again = main_json([str(paper)], capsys)
    assert counter.last() == 0  # nothing decided again
    assert status_again == status == 1
    assert _without_seconds(again) == _without_seconds(first)
    # An edit decides only the block that changed; lines added above move the others.
    write(tmp_path, "paper.tex", "% a new first line\n" + TRUE + FALSE.replace("E_{12}", "E_{10}"))
    status, edited = main_json([str(paper)], capsys)
    assert counter.last() == 1 and status == 0
    assert [c["line"] for c in edited["claims"]] == [c["line"] + 1 for c in first["claims"]]


def test_no_cache_decides_everything_and_writes_nothing(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch, cache_on: None
) -> None:
    counter = Counter(monkeypatch)
    paper = write(tmp_path, "paper.tex", TRUE)
    for _ in range(2):
        assert cli.main(["check", str(paper), "--no-cache"]) == 0
        assert counter.last() == 2
    assert not (tmp_path / ".qreferee-cache").exists()
    monkeypatch.setenv("QREFEREE_NO_CACHE", "1")
    assert cli.main(["check", str(paper)]) == 0
    assert not (tmp_path / ".qreferee-cache").exists()
    monkeypatch.delenv("QREFEREE_NO_CACHE")
    write(tmp_path, "qreferee.toml", "cache = false\n")
    assert cli.main(["check", str(paper)]) == 0
    assert not (tmp_path / ".qreferee-cache").exists()
    capsys.readouterr()


def test_the_cache_is_shared_with_watch(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch, cache_on: None
) -> None:
    paper = write(tmp_path, "paper.tex", TRUE + FALSE)
    assert cli.main(["check", str(paper)]) == 1
    capsys.readouterr()
    # The watcher's checker, built as `qreferee watch` builds it, finds every block.
    watcher_checker = cache_mod.CachedChecker(max_terms=None, tag_defaults=ProjectConfig().tag_defaults())
    report = watcher_checker.check_path(paper)
    assert watcher_checker.stats.hits == 3 and watcher_checker.stats.misses == 0
    assert [c.verdict for c in report.claims] == ["proved", "proved", "refuted"]
    # ...and the other way round: what watch stored, check reuses.
    other = write(tmp_path, "other.tex", TRUE)
    cache_mod.CachedChecker(max_terms=None).check_path(other)
    counter = Counter(monkeypatch)
    assert cli.main(["check", str(other)]) == 0
    assert counter.last() == 0
    capsys.readouterr()


def test_the_cache_key_has_everything_that_can_change_a_verdict(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch, cache_on: None
) -> None:
    counter = Counter(monkeypatch)
    paper = write(tmp_path, "paper.tex", THETA)
    status, data = main_json([str(paper)], capsys)
    assert (status, data["claims"][0]["verdict"]) == (1, "refuted")
    # A project default (a tag option) changes the key and the verdict.
    write(tmp_path, "qreferee.toml", f"nome = {toml_string(JACOBI_NOME)}\n")
    status, data = main_json([str(paper)], capsys)
    assert counter.last() == 1 and (status, data["claims"][0]["verdict"]) == (0, "proved")
    main_json([str(paper)], capsys)
    assert counter.last() == 0
    # The budget of terms, a define before the block, the tool's version and its code.
    main_json([str(paper), "--max-terms", "4000"], capsys)
    assert counter.last() == 1
    write(tmp_path, "paper.tex", "%@define F = E_4\n" + THETA)
    main_json([str(paper)], capsys)
    assert counter.last() == 1
    monkeypatch.setattr(cache_mod, "__version__", "0.0.0-other")
    main_json([str(paper)], capsys)
    assert counter.last() == 1
    monkeypatch.setattr(cache_mod, "engine_fingerprint", lambda: "another engine")
    main_json([str(paper)], capsys)
    assert counter.last() == 1
    # Budgets that cannot change a stored verdict (time, processes) keep it.
    main_json([str(paper), "--max-seconds", "30", "--jobs", "2"], capsys)
    assert counter.last() == 0


def test_check_with_cache_reports_unreadable_files(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], cache_on: None
) -> None:
    status, data = main_json([str(tmp_path / "missing.tex")], capsys)
    assert status == 2 and data["diagnostics"][0]["code"] == "unreadable"


# -- pre-commit --------------------------------------------------------------------------


def _hooks() -> list[dict[str, Any]]:
    """The entries of .pre-commit-hooks.yaml (a list of flat maps; lists written [a, b])."""
    hooks: list[dict[str, Any]] = []
    for raw in (REPO / ".pre-commit-hooks.yaml").read_text(encoding="utf-8").splitlines():
        line = raw.split(" #", 1)[0].rstrip()
        if not line or line.lstrip().startswith("#"):
            continue
        if line.startswith("- "):
            hooks.append({})
            line = "  " + line[2:]
        key, _, value = line.strip().partition(":")
        value = value.strip()
        if value.startswith("[") and value.endswith("]"):
            hooks[-1][key] = [v.strip() for v in value[1:-1].split(",") if v.strip()]
        else:
            hooks[-1][key] = {"true": True, "false": False}.get(value, value)
    return hooks


def test_pre_commit_hook_definition() -> None:
    (hook,) = _hooks()
    assert {"id", "name", "entry", "language"} <= set(hook)
    assert hook["language"] == "python"
    files = re.compile(hook["files"])
    assert files.search("paper/main.tex") and files.search("notes/draft.md")
    assert not files.search("setup.py") and not files.search("main.tex.bak")
    command, *options = hook["entry"].split()
    assert command == "qreferee"
    args = cli.build_parser().parse_args([*options, "staged.tex"])
    assert isinstance(args, argparse.Namespace) and args.command == "check"


def test_pre_commit_hook_runs_on_staged_files(tmp_path: Path) -> None:
    (hook,) = _hooks()
    _, *options = hook["entry"].split()
    write(tmp_path, "README.md", "# A project\n\nNo claims here.\n")
    write(tmp_path, "good.tex", TRUE)
    write(tmp_path, "bad.tex", FALSE)
    ok = run(*options, "README.md", "good.tex", cwd=tmp_path)
    assert ok.returncode == 0, ok.stdout + ok.stderr
    assert "README.md" not in ok.stdout
    failing = run(*options, "README.md", "good.tex", "bad.tex", cwd=tmp_path)
    assert failing.returncode == 1
    assert "bad.tex:2:4: error: refuted [c]" in failing.stdout
    assert "good.tex" not in failing.stdout  # --only-failures


def test_skip_files_without_tags_still_reports_problems(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    write(tmp_path, "plain.tex", "Just text.\n")
    write(tmp_path, "broken.tex", "\\input{missing}\n")
    assert cli.main(["check", str(tmp_path / "plain.tex"), "--skip-files-without-tags"]) == 0
    assert "0 claims" in capsys.readouterr().out
    assert cli.main(["check", str(tmp_path / "broken.tex"), "--skip-files-without-tags"]) == 2
    assert "include-missing" in capsys.readouterr().out


def test_a_second_run_answered_from_the_cache_is_not_an_empty_run(tmp_path: Path) -> None:
    # E_4^2 = E_8 (Serre, A Course in Arithmetic, ch. VII, §3.2).  The second run reads the verdict
    # back from the cache; it must not warn that nothing was checked, and it still passes.
    paper = write(tmp_path, "paper.tex", "%@claim\n\\[ E_4^2 = E_8 \\]\n")
    first = run("check", str(paper), cwd=tmp_path, env_cache=True)
    second = run("check", str(paper), cwd=tmp_path, env_cache=True)
    assert first.returncode == second.returncode == 0, second.stdout + second.stderr
    assert "no-claims" not in second.stdout + second.stderr
    assert "1 proved" in second.stdout

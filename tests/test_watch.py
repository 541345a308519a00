"""``qreferee watch`` and the cache of verdicts under it.

The watcher is driven the way editors save: writing a file in place, and writing a new
file then renaming it over the old one.  The identities are level-one relations from
Serre, *A Course in Arithmetic*, Ch. VII (E_4^2 = E_8, E_4 E_6 = E_10); E_4 E_6 = E_12
and E_4^2 = E_10 are deliberately false.
"""

from __future__ import annotations

import argparse
import json
import os
import queue
import threading
import time
from collections.abc import Callable, Iterator
from pathlib import Path
from typing import Any

import pytest
from verifier import cache as cache_mod
from verifier import watch
from verifier.api import Report, check_document, check_path
from verifier.cache import CachedChecker
from verifier.scan.document import ClaimBlock, ScannedDocument
from verifier.watch import Outputs, Watcher, WatchRun

MAIN = """\\documentclass{article}
\\begin{document}
%@claim name=a
\\[ E_4^2 = E_8 \\]
\\input{part}
\\end{document}
"""
PART = "%@claim name=b\n\\[ E_4 E_6 = E_{10} \\]\n"


def verdicts(report: Report) -> dict[str, str]:
    return {c.name or c.source: c.verdict for c in report.claims}


def plain(report: Report) -> list[dict[str, Any]]:
    return [{k: v for k, v in c.to_dict().items() if k != "seconds"} for c in report.claims]


@pytest.fixture
def paper(tmp_path: Path) -> Path:
    (tmp_path / "main.tex").write_text(MAIN, encoding="utf-8")
    (tmp_path / "part.tex").write_text(PART, encoding="utf-8")
    return tmp_path / "main.tex"


class Runs:
    """Collects the watcher's checks and messages, for waiting with a timeout."""

    def __init__(self) -> None:
        self.queue: queue.Queue[WatchRun] = queue.Queue()
        self.messages: list[str] = []

    def __call__(self, run: WatchRun) -> None:
        self.queue.put(run)

    def next(self, timeout: float = 10.0) -> WatchRun:
        return self.queue.get(timeout=timeout)

    def none(self, wait: float = 0.5) -> None:
        with pytest.raises(queue.Empty):
            self.queue.get(timeout=wait)


@pytest.fixture
def start(paper: Path) -> Iterator[Callable[..., tuple[Watcher, Runs]]]:
    started: list[Watcher] = []

    def go(polling: bool = True, **kwargs: Any) -> tuple[Watcher, Runs]:
        runs = Runs()
        kwargs.setdefault("debounce", 0.05)
        w = Watcher(paper, runs, polling=polling, poll_interval=0.05, on_message=runs.messages.append, **kwargs)
        w.start()
        started.append(w)
        return w, runs

    yield go
    for w in started:
        w.stop()


def write_in_place(path: Path, text: str) -> None:
    with path.open("w", encoding="utf-8") as f:
        f.write(text)


def write_and_rename(path: Path, text: str) -> None:
    tmp = path.with_name(f".{path.name}.swp")
    tmp.write_text(text, encoding="utf-8")
    os.replace(tmp, path)


def _native_observer_works() -> bool:
    try:
        from watchdog.observers import Observer

        o = Observer()
        o.start()
        o.stop()
        o.join(2)
    except Exception:
        return False
    return True


# -- watching -------------------------------------------------------------------------------


@pytest.mark.parametrize("polling", [True, False], ids=["polling", "native"])
def test_editor_saves_are_rechecked(start: Callable[..., tuple[Watcher, Runs]], paper: Path, polling: bool) -> None:
    if not polling and not _native_observer_works():
        pytest.skip("no native file notifications here")
    w, runs = start(polling=polling)
    first = runs.next()
    assert verdicts(first.report) == {"a": "proved", "b": "proved"}
    assert {p.name for p in first.files} == {"main.tex", "part.tex"}
    part = paper.with_name("part.tex")

    write_in_place(part, PART.replace("E_{10}", "E_{12}"))
    second = runs.next()
    assert [(c.name, c.verdict) for c in second.changed] == [("b", "refuted")]
    assert second.stats.misses == 1 and second.stats.hits == 1  # only the edited claim is decided
    assert second.lines[0].endswith("(was proved)") and "refuted [b]" in second.lines[0]
    assert second.lines[-1].split("] ", 1)[1].startswith("qreferee: 2 claims: 1 proved, 1 refuted")
    # The status line counts claims, not blocks (an inline definition is a block with no claim).
    assert second.lines[-1].endswith("1 changed (1 decided, 1 reused)")

    write_and_rename(paper, MAIN.replace("E_8", "E_{10}"))
    third = runs.next()
    assert [(c.name, c.verdict) for c in third.changed] == [("a", "refuted")]
    assert verdicts(third.report) == {"a": "refuted", "b": "refuted"}

    os.utime(part)  # same content: nothing to do
    write_in_place(part, PART.replace("E_{10}", "E_{12}"))
    runs.none()
    assert w.runs == 3


def test_half_typed_claim_is_an_error_and_watching_goes_on(
    start: Callable[..., tuple[Watcher, Runs]], paper: Path
) -> None:
    _, runs = start()
    runs.next()
    part = paper.with_name("part.tex")
    write_in_place(part, "%@claim name=b\n\\[ E_4 E_6 = \\]\n")
    run = runs.next()
    [claim] = run.changed
    assert (claim.name, claim.verdict, claim.outcome.code) == ("b", "error", "incomplete")
    write_in_place(part, PART)
    assert [(c.name, c.verdict) for c in runs.next().changed] == [("b", "proved")]


def test_file_that_vanishes_for_a_moment(start: Callable[..., tuple[Watcher, Runs]], paper: Path) -> None:
    _, runs = start(retry_seconds=2.0)
    runs.next()
    part = paper.with_name("part.tex")
    part.unlink()  # an editor that deletes, then writes
    threading.Timer(0.3, lambda: part.write_text(PART.replace("E_{10}", "E_{12}"), encoding="utf-8")).start()
    run = runs.next()
    assert run.report.diagnostics == []  # waited for it: no "not found"
    assert verdicts(run.report) == {"a": "proved", "b": "refuted"}


def test_main_file_missing_then_back(start: Callable[..., tuple[Watcher, Runs]], paper: Path) -> None:
    w, runs = start(retry_seconds=0.2)
    runs.next()
    paper.unlink()
    deadline = time.monotonic() + 5
    while not any("missing" in m for m in runs.messages) and time.monotonic() < deadline:
        time.sleep(0.05)
    assert any("missing" in m for m in runs.messages)
    assert w.running
    paper.write_text(MAIN.replace("E_8", "E_{10}"), encoding="utf-8")
    run = runs.next()
    assert verdicts(run.report)["a"] == "refuted"
    assert w.error is None


def test_new_input_file_is_picked_up(start: Callable[..., tuple[Watcher, Runs]], paper: Path) -> None:
    paper.write_text(MAIN.replace("\\input{part}", "\\input{part}\n\\input{later}"), encoding="utf-8")
    _, runs = start()
    first = runs.next()
    assert [d.code for d in first.report.diagnostics] == ["include-missing"]
    paper.with_name("later.tex").write_text("%@claim name=c\n\\[ E_4 E_{10} = E_{14} \\]\n", encoding="utf-8")
    run = runs.next()
    assert [(c.name, c.verdict) for c in run.changed] == [("c", "proved")]
    assert run.report.diagnostics == []
    assert {p.name for p in run.files} == {"main.tex", "part.tex", "later.tex"}


def test_outputs_are_refreshed(
    start: Callable[..., tuple[Watcher, Runs]], paper: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    calls: list[tuple[str, str, bool]] = []

    def fake_annotate(text: str, report: Report, main_file: str, markdown: bool) -> str:
        calls.append((main_file, text, markdown))
        return text + f"% {len(report.claims)} claims\n"

    real = watch._optional
    monkeypatch.setattr(watch, "_optional", lambda m, a: fake_annotate if m == "verifier.annotate" else real(m, a))
    out = paper.with_name("report.json")
    annotated = paper.with_name("annotated.tex")
    _, runs = start(outputs=Outputs(out, "json", annotated))
    runs.next()
    assert json.loads(out.read_text(encoding="utf-8"))["summary"]["proved"] == 2
    assert annotated.read_text(encoding="utf-8").endswith("% 2 claims\n")
    assert calls[0][0].endswith("main.tex") and calls[0][2] is False
    write_in_place(paper.with_name("part.tex"), PART.replace("E_{10}", "E_{12}"))
    runs.next()
    assert json.loads(out.read_text(encoding="utf-8"))["summary"]["refuted"] == 1
    runs.none(0.3)  # writing the outputs (in the watched folder) does not start another check


def test_outputs_never_overwrite_the_manuscript(paper: Path) -> None:
    messages: list[str] = []
    report = check_path(paper)
    watch.refresh_outputs(Outputs(report=paper), report, paper, messages.append)
    assert paper.read_text(encoding="utf-8") == MAIN
    assert "file of the manuscript" in messages[0]


def test_adapter_matches_parameters_by_name() -> None:
    def annotate(text: str, report: object, main_file: str, markdown: bool) -> str:
        return f"{text}|{main_file}|{markdown}"

    values = {"text": "T", "report": None, "main_name": "m.tex", "markdown": False, "out": Path("x")}
    assert watch.call_adapted(annotate, values) == ("T|m.tex|False", {"text", "report", "main_name", "markdown"})

    def needs_something(weird: int) -> None: ...

    with pytest.raises(watch._Unusable):
        watch.call_adapted(needs_something, values)


def _watch_cli(argv: list[str]) -> int:
    parser = argparse.ArgumentParser(prog="qreferee")
    watch.register(parser.add_subparsers(dest="command"))
    args = parser.parse_args(argv)
    return int(args.func(args))


def test_command_line(paper: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert _watch_cli(["watch", str(paper), "--poll", "--max-runs", "1"]) == 0
    out = capsys.readouterr().out
    assert "proved [a]" in out and "proved [b]" in out and "watching 2 files" in out
    assert _watch_cli(["watch", str(paper), "--format", "json", "--max-runs", "1", "--no-cache"]) == 0
    record = json.loads(capsys.readouterr().out)
    assert record["check"] == 1 and record["summary"]["proved"] == 2
    assert _watch_cli(["watch", str(paper), "--format", "html"]) == 2  # html needs -o


def test_command_line_is_wired() -> None:
    from verifier import cli

    if "verifier.watch" not in getattr(cli, "PLUGIN_MODULES", ()):
        pytest.skip("this CLI does not register the watch command")
    args = cli.build_parser().parse_args(["watch", "paper.tex", "--annotate", "out.tex"])
    assert args.func is watch.run_watch_args


# -- the cache ------------------------------------------------------------------------------


def counting(decided: list[int]) -> Callable[[ScannedDocument], Report]:
    """A checker that records how many tagged blocks it was asked to decide."""

    def check(doc: ScannedDocument) -> Report:
        decided.append(sum(1 for i in doc.items if isinstance(i, ClaimBlock) and i.rows))
        return check_document(doc)

    return check


DEFINES = """\\documentclass{article}
\\newcommand{\\Eis}[1]{E_{#1}}
\\begin{document}
%@claim name=before
\\[ \\Eis{4}^2 = E_8 \\]
%@define F = E_4 E_6
%@claim name=uses-f
\\[ F = E_{10} \\]
%@claim name=after
\\[ E_4 E_{10} = E_{14} \\]
\\end{document}
"""


def test_second_run_decides_nothing(tmp_path: Path) -> None:
    path = tmp_path / "paper.tex"
    path.write_text(DEFINES, encoding="utf-8")
    decided: list[int] = []
    first = CachedChecker(check=counting(decided)).check_path(path)
    assert decided == [3]
    assert sorted(p.name for p in (tmp_path / ".qreferee-cache").glob("*.json")) != []
    # A new checker (nothing in memory) reads the cache on disk.
    again = CachedChecker(check=counting(decided))
    second = again.check_path(path)
    assert decided == [3, 0]
    assert (again.stats.hits, again.stats.misses) == (3, 0)
    assert plain(second) == plain(first) == plain(check_path(path))


def test_changing_a_define_invalidates_the_claims_after_it(tmp_path: Path) -> None:
    path = tmp_path / "paper.tex"
    path.write_text(DEFINES, encoding="utf-8")
    checker = CachedChecker(cache_dir=tmp_path / "c")
    checker.check_path(path)
    path.write_text(DEFINES.replace("F = E_4 E_6", "F = E_4^2"), encoding="utf-8")
    report = checker.check_path(path)
    assert checker.stats.hits == 1  # "before" only
    assert checker.stats.misses == 2
    assert verdicts(report) == {"before": "proved", "uses-f": "refuted", "after": "proved"}
    assert plain(report) == plain(check_path(path))


def test_changing_a_macro_invalidates_the_claims_using_it(tmp_path: Path) -> None:
    path = tmp_path / "paper.tex"
    path.write_text(DEFINES, encoding="utf-8")
    checker = CachedChecker(cache_dir=tmp_path / "c")
    checker.check_path(path)
    path.write_text(DEFINES.replace("{E_{#1}}", "{2E_{#1}}"), encoding="utf-8")
    report = checker.check_path(path)
    assert (checker.stats.hits, checker.stats.misses) == (2, 1)
    assert verdicts(report)["before"] == "refuted"


def test_moved_claims_are_reported_where_they_now_are(tmp_path: Path) -> None:
    path = tmp_path / "paper.tex"
    path.write_text(DEFINES, encoding="utf-8")
    checker = CachedChecker(cache_dir=tmp_path / "c")
    checker.check_path(path)
    path.write_text(DEFINES.replace("\\begin{document}\n", "\\begin{document}\nSome new text.\n\n"), encoding="utf-8")
    report = checker.check_path(path)
    assert (checker.stats.hits, checker.stats.misses) == (3, 0)
    assert plain(report) == plain(check_path(path))
    assert report.claims[0].location.line == 7


def test_corrupt_entries_are_ignored(tmp_path: Path) -> None:
    path = tmp_path / "paper.tex"
    path.write_text(DEFINES, encoding="utf-8")
    folder = tmp_path / "c"
    CachedChecker(cache_dir=folder).check_path(path)
    entries = sorted(folder.glob("*.json"))
    entries[0].write_text("{not json", encoding="utf-8")
    entries[1].write_text(json.dumps({"format": cache_mod.CACHE_FORMAT, "key": entries[1].stem, "claims": [{}]}))
    checker = CachedChecker(cache_dir=folder)
    report = checker.check_path(path)
    assert (checker.stats.hits, checker.stats.misses) == (1, 2)
    assert plain(report) == plain(check_path(path))


def test_another_engine_version_decides_again(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    path = tmp_path / "paper.tex"
    path.write_text(DEFINES, encoding="utf-8")
    CachedChecker(cache_dir=tmp_path / "c").check_path(path)
    monkeypatch.setattr(cache_mod, "__version__", "999.0")
    checker = CachedChecker(cache_dir=tmp_path / "c")
    checker.check_path(path)
    assert checker.stats.hits == 0


def test_clock_dependent_outcomes_are_not_stored(tmp_path: Path) -> None:
    path = tmp_path / "paper.tex"
    path.write_text(DEFINES, encoding="utf-8")

    def out_of_time(doc: ScannedDocument) -> Report:
        report = check_document(doc)
        for c in report.claims:
            if c.name == "after":
                c.outcome.verdict, c.outcome.code = "error", "time-budget"
        return report

    checker = CachedChecker(cache_dir=tmp_path / "c", check=out_of_time)
    checker.check_path(path)
    assert checker.stats.uncacheable == 1
    again = CachedChecker(cache_dir=tmp_path / "c")
    assert verdicts(again.check_path(path))["after"] == "proved"
    assert (again.stats.hits, again.stats.misses) == (2, 1)


def test_unwritable_cache_folder_is_tolerated(tmp_path: Path) -> None:
    path = tmp_path / "paper.tex"
    path.write_text(DEFINES, encoding="utf-8")
    blocker = tmp_path / "file-not-folder"
    blocker.write_text("x", encoding="utf-8")
    checker = CachedChecker(cache_dir=blocker / "cache")
    assert verdicts(checker.check_path(path)) == verdicts(check_path(path))
    assert checker.stats.stored == 0


def test_a_half_written_file_is_read_again_before_it_is_checked(monkeypatch: pytest.MonkeyPatch) -> None:
    # An editor that saves in place truncates, then writes: the watcher waits until two readings
    # of the changed contents agree.  Here the contents read "", then the text twice.
    import threading
    import types

    from verifier import watch

    readings = iter(["empty", "full", "full", "never read"])
    monkeypatch.setattr(watch, "_fingerprint", lambda files: next(readings))
    fake = types.SimpleNamespace(_fp="before", _stop=threading.Event())
    assert watch.Watcher._settled(fake, set()) == "full"  # type: ignore[arg-type]
    assert next(readings) == "never read"
    # Unchanged contents are not read twice.
    monkeypatch.setattr(watch, "_fingerprint", lambda files: "before")
    assert watch.Watcher._settled(fake, set()) == "before"  # type: ignore[arg-type]

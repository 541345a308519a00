"""``qreferee watch``: re-check a manuscript whenever one of its files changes.

The folders of the main file and of every ``\\input``/``\\include``'d file are watched
(the set is worked out again after each check).  Created, moved and modified events are
treated alike, because many editors save by writing a new file and renaming it over the
old one.  Events are debounced (a quiet period, 300 ms by default), the files' contents
are hashed, and nothing is re-checked when the hashes are unchanged.  Checks go through
:class:`verifier.cache.CachedChecker`, so only the claims that changed are decided again.

After the first full report, only changes are printed: a line per claim whose verdict
changed (in the usual ``file:line:col: severity: verdict: message`` shape), a line per
claim that disappeared, and a summary line.  A half-typed claim is just an ``error``; a
file that vanishes for a moment (an editor replacing it) is waited for.

``watchdog`` is imported only when watching starts.
"""

from __future__ import annotations

import argparse
import contextlib
import functools
import hashlib
import importlib
import inspect
import json
import os
import stat
import sys
import tempfile
import threading
import time
from collections.abc import Callable, Iterable
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any

from verifier.cache import CACHE_DIRNAME, CachedChecker, CacheStats, default_cache_dir

if TYPE_CHECKING:
    from verifier.api import ClaimResult, Report
    from verifier.diagnostics import Diagnostic
    from verifier.scan.document import ScannedDocument

DEFAULT_DEBOUNCE = 0.3
# Events on files with these suffixes (or on a file of the manuscript) start a check.
SOURCE_SUFFIXES = (".tex", ".ltx", ".latex", ".md", ".markdown", ".mdown")
_EVENT_TYPES = ("created", "moved", "modified", "deleted", "closed")


@dataclass
class WatchRun:
    """One check made by the watcher, and what changed since the previous one."""

    number: int  # 1 for the first check
    report: Report
    changed: list[ClaimResult]  # claims that are new or whose verdict or message changed
    removed: list[str]  # claims that disappeared, as "file: name (was verdict)"
    new_diagnostics: list[Diagnostic]
    lines: list[str]  # what `qreferee watch` prints for this check
    stats: CacheStats
    files: list[Path] = field(default_factory=list)


@dataclass
class Outputs:
    """Files refreshed after every check."""

    report: Path | None = None  # -o REPORT
    report_format: str = "text"  # text | json | html
    annotate: Path | None = None  # --annotate OUT
    verbose: bool = False

    def paths(self) -> set[Path]:
        return {p.resolve() for p in (self.report, self.annotate) if p is not None}


# -- the differences between two reports -------------------------------------------------


def _state(c: ClaimResult) -> tuple[str, str | None, str]:
    return (c.verdict, c.outcome.code, c.outcome.message)


def _identities(claims: Iterable[ClaimResult]) -> list[tuple[str, str, int]]:
    """A claim's identity across edits: its file, its name (or label, or text), and which occurrence."""
    seen: dict[tuple[str, str], int] = {}
    out = []
    for c in claims:
        base = (c.location.file, c.name or c.label or " ".join(c.source.split()))
        seen[base] = seen.get(base, 0) + 1
        out.append((*base, seen[base]))
    return out


def diff_reports(
    old: Report | None, new: Report
) -> tuple[list[ClaimResult], list[tuple[ClaimResult, str | None]], list[str], list[Diagnostic]]:
    """Changed claims, each with its former verdict; removed claims; new diagnostics."""
    if old is None:
        return list(new.claims), [(c, None) for c in new.claims], [], list(new.diagnostics)
    before = dict(zip(_identities(old.claims), old.claims, strict=True))
    changed: list[ClaimResult] = []
    with_old: list[tuple[ClaimResult, str | None]] = []
    now = _identities(new.claims)
    for ident, c in zip(now, new.claims, strict=True):
        prev = before.get(ident)
        if prev is None or _state(prev) != _state(c):
            changed.append(c)
            with_old.append((c, prev.verdict if prev is not None else None))
    current = set(now)
    removed = [f"{i[0]}: {i[1]} (was {c.verdict})" for i, c in before.items() if i not in current]
    seen = {(d.code, d.location.file, d.message) for d in old.diagnostics}
    new_diags = [d for d in new.diagnostics if (d.code, d.location.file, d.message) not in seen]
    return changed, with_old, removed, new_diags


def _summary_line(report: Report, changed: int, stats: CacheStats) -> str:
    s = report.summary
    total = sum(s.values())
    return (
        f"[{time.strftime('%H:%M:%S')}] qreferee: {total} claim{'s' if total != 1 else ''}: {s['proved']} proved, "
        f"{s['refuted']} refuted, {s['unproven']} unproven, {s['error']} error{'s' if s['error'] != 1 else ''}; "
        f"{changed} changed ({stats.claims_decided} decided, {stats.claims_reused} reused)"
    )


def _diagnostic_line(d: Diagnostic) -> str:
    hint = f" (hint: {d.hint})" if d.hint else ""
    return f"{d.location}: {d.severity}: {d.message} [{d.code}]{hint}"


# -- refreshing the annotated copy and the HTML report (optional modules) ----------------


class _Unusable(Exception):
    pass


_ALIASES: dict[str, tuple[str, ...]] = {
    "report": ("report", "result", "results"),
    "text": ("text", "source_text", "content", "tex"),
    "main_name": ("main_file", "main_name", "display", "filename", "name"),
    "markdown": ("markdown", "is_markdown"),
    "source": ("path", "source", "main", "src", "manuscript", "source_path", "main_path", "file", "input"),
    "out": ("out", "output", "out_path", "output_path", "dest", "destination", "target"),
}


def call_adapted(function: Callable[..., Any], values: dict[str, Any]) -> tuple[Any, set[str]]:
    """Call ``function`` with the values its parameters ask for by name; returns (result, used roles)."""
    try:
        params = inspect.signature(function).parameters
    except (TypeError, ValueError) as exc:
        raise _Unusable(str(exc)) from exc
    args: list[Any] = []
    kwargs: dict[str, Any] = {}
    used: set[str] = set()
    for name, p in params.items():
        role = next((r for r, names in _ALIASES.items() if name in names and r in values), None)
        if role is None:
            if p.default is inspect.Parameter.empty and p.kind not in (p.VAR_POSITIONAL, p.VAR_KEYWORD):
                raise _Unusable(f"does not know what to pass as {name!r}")
            continue
        used.add(role)
        if p.kind is p.POSITIONAL_ONLY:
            args.append(values[role])
        else:
            kwargs[name] = values[role]
    return function(*args, **kwargs), used


def _optional(module: str, attribute: str) -> Callable[..., Any] | None:
    try:
        mod = importlib.import_module(module)
    except ImportError:
        return None
    found = getattr(mod, attribute, None)
    return found if callable(found) else None


@functools.lru_cache(maxsize=1)
def _umask() -> int:
    # Read once (the watcher primes it from the main thread): setting it is process-wide.
    umask = os.umask(0o022)
    os.umask(umask)
    return umask


def write_atomically(path: Path, text: str) -> None:
    """Write ``text`` to ``path`` through a temporary file renamed over it."""
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as f:
            f.write(text)
        # A temporary file is private; the output gets the usual permissions (or keeps its own).
        try:
            mode = stat.S_IMODE(path.stat().st_mode)
        except OSError:
            mode = 0o666 & ~_umask()
        os.chmod(tmp, mode)
        os.replace(tmp, path)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(tmp)
        raise


def render_report(report: Report, fmt: str, verbose: bool = False) -> str | None:
    """The full report as text, JSON or (when the HTML formatter is installed) HTML."""
    if fmt == "json":
        from verifier.report import json_report

        return json_report.render(report)
    if fmt == "html":
        render = _optional("verifier.report.html", "render")
        if render is None:
            return None
        result, _ = call_adapted(render, {"report": report})
        return result if isinstance(result, str) else None
    from verifier.report import text

    return text.render(report, verbose=verbose)


def refresh_outputs(
    outputs: Outputs, report: Report, main: Path, say: Callable[[str], None], protected: Iterable[Path] = ()
) -> None:
    """Rewrite the report file and the annotated copy; problems are reported, never raised.

    An output that would overwrite a file of the manuscript (``protected``) is refused.
    """
    sources = {p.resolve() for p in (main, *protected)}
    clash = [p for p in (outputs.report, outputs.annotate) if p is not None and p.resolve() in sources]
    if clash:
        say(f"qreferee: not writing {clash[0]}: it is a file of the manuscript")
        return
    if outputs.report is not None:
        try:
            rendered = render_report(report, outputs.report_format, outputs.verbose)
            if rendered is None:
                say(f"qreferee: the {outputs.report_format} report is not available in this installation; skipped")
            else:
                write_atomically(outputs.report, rendered)
        except (OSError, _Unusable) as exc:
            say(f"qreferee: cannot write {outputs.report}: {exc}")
    if outputs.annotate is not None:
        annotate = _optional("verifier.annotate", "annotate")
        if annotate is None:
            say("qreferee: annotated copies are not available in this installation; skipped")
            return
        try:
            from verifier.scan import is_markdown

            values = {
                "report": report,
                "source": main,
                "out": outputs.annotate,
                "text": main.read_text(encoding="utf-8", errors="replace"),
                "main_name": report.files[0] if report.files else str(main),
                "markdown": is_markdown(main.name),
            }
            result, used = call_adapted(annotate, values)
            if "out" not in used:
                if not isinstance(result, str):
                    raise _Unusable("it returned no text")
                write_atomically(outputs.annotate, result)
        except (OSError, _Unusable) as exc:
            say(f"qreferee: cannot write the annotated copy {outputs.annotate}: {exc}")
        except Exception as exc:  # the annotator is optional; a failure there must not stop watching
            say(f"qreferee: the annotated copy failed: {type(exc).__name__}: {exc}")


# -- the watcher ----------------------------------------------------------------------------


class _Handler:
    """Receives watchdog events (watchdog calls ``dispatch``)."""

    def __init__(self, notify: Callable[[list[str]], None]) -> None:
        self.notify = notify

    def dispatch(self, event: Any) -> None:
        if getattr(event, "is_directory", False) or getattr(event, "event_type", "") not in _EVENT_TYPES:
            return
        paths = [getattr(event, "src_path", ""), getattr(event, "dest_path", "")]
        self.notify([os.fsdecode(p) for p in paths if p])


def _fingerprint(files: Iterable[Path]) -> str:
    digest = hashlib.sha256()
    for path in sorted(set(files)):
        digest.update(os.fsencode(path) + b"\0")
        try:
            digest.update(hashlib.sha256(path.read_bytes()).digest())
        except OSError:
            digest.update(b"<missing>")
    return digest.hexdigest()


def _doc_paths(doc: ScannedDocument) -> set[Path]:
    out: set[Path] = set()
    for name in doc.files:
        if name.startswith("<"):
            continue
        with contextlib.suppress(OSError, RuntimeError):
            out.add(Path(name).resolve())
    return out


SETTLE_SECONDS = 0.05  # a changed file must read the same twice this far apart before it is checked


class Watcher:
    """Watches a manuscript and calls ``on_report`` after each check that found changed files.

    ``start()`` returns at once: the first check runs in the watcher's thread, then one
    after every change (debounced by ``debounce`` seconds).  ``stop()`` ends watching.
    ``polling=True`` uses the polling observer (network file systems; ``poll_interval``
    seconds between looks) instead of the operating system's notifications.
    """

    def __init__(
        self,
        path: str | Path,
        on_report: Callable[[WatchRun], None] | None = None,
        *,
        debounce: float = DEFAULT_DEBOUNCE,
        polling: bool = False,
        poll_interval: float = 0.5,
        checker: CachedChecker | None = None,
        outputs: Outputs | None = None,
        on_message: Callable[[str], None] | None = None,
        retry_seconds: float = 1.5,
        cache_dir: Path | None = None,
    ) -> None:
        self.path = Path(path).resolve()
        self._given = Path(path)  # scanned as given, so that reports name files as the author does
        _umask()
        self.on_report = on_report
        self.debounce = debounce
        self.polling = polling
        self.poll_interval = poll_interval
        self.checker = checker or CachedChecker()
        self.outputs = outputs or Outputs()
        self.on_message = on_message or (lambda line: print(line, file=sys.stderr, flush=True))
        self.retry_seconds = retry_seconds
        self.cache_dir = (cache_dir or default_cache_dir(self.path)).resolve()
        self.runs = 0
        self.report: Report | None = None
        self.error: BaseException | None = None
        self.observer_kind = ""
        self._files: set[Path] = {self.path}
        self._fp: str | None = None
        self._missing = False
        self._stop = threading.Event()
        self._wake = threading.Event()
        self._lock = threading.Lock()
        self._last_event = 0.0
        self._observer: Any = None
        self._handler = _Handler(self._notify)
        self._watches: dict[Path, Any] = {}
        self._thread: threading.Thread | None = None

    # -- life cycle ----------------------------------------------------------------------
    def start(self) -> None:
        """Start the observer and the checking thread."""
        self._observer = self._make_observer()
        self._reschedule({self.path.parent})
        self._observer.start()
        self._thread = threading.Thread(target=self._loop, name="qreferee-watch", daemon=True)
        self._thread.start()

    def stop(self, timeout: float = 5.0) -> None:
        """Stop watching and wait for the threads to end."""
        self._stop.set()
        self._wake.set()
        if self._observer is not None:
            with contextlib.suppress(Exception):
                self._observer.stop()
                self._observer.join(timeout)
        if self._thread is not None and self._thread is not threading.current_thread():
            self._thread.join(timeout)

    @property
    def running(self) -> bool:
        return self._thread is not None and self._thread.is_alive()

    def __enter__(self) -> Watcher:
        self.start()
        return self

    def __exit__(self, *exc: object) -> None:
        self.stop()

    def _make_observer(self) -> Any:
        from watchdog.observers.polling import PollingObserver

        if self.polling:
            self.observer_kind = "polling"
            return PollingObserver(timeout=self.poll_interval)
        try:
            from watchdog.observers import Observer

            observer = Observer()
            self.observer_kind = type(observer).__name__
            return observer
        except Exception as exc:  # no native notifications here: poll instead
            self.on_message(f"qreferee: file notifications unavailable ({exc}); polling instead")
            self.observer_kind = "polling"
            return PollingObserver(timeout=self.poll_interval)

    def _reschedule(self, folders: set[Path]) -> None:
        """Watch exactly ``folders`` (not recursively)."""
        for folder in set(self._watches) - folders:
            with contextlib.suppress(Exception):
                self._observer.unschedule(self._watches.pop(folder))
        for folder in folders - set(self._watches):
            if not folder.is_dir():
                continue
            try:
                self._watches[folder] = self._observer.schedule(self._handler, str(folder), recursive=False)
            except Exception as exc:  # e.g. the system's limit of watches
                if not self.polling:
                    self.on_message(f"qreferee: cannot watch {folder}: {exc}")

    # -- events --------------------------------------------------------------------------
    def _relevant(self, name: str) -> bool:
        path = Path(os.path.abspath(name))
        if path == self.cache_dir or self.cache_dir in path.parents or CACHE_DIRNAME in path.parts:
            return False
        if path in self.outputs.paths():
            return False
        if path in self._files:
            return True
        with contextlib.suppress(OSError, RuntimeError):
            if path.resolve() in self._files:
                return True
        return path.suffix.lower() in SOURCE_SUFFIXES

    def _notify(self, paths: list[str]) -> None:
        if any(self._relevant(p) for p in paths):
            with self._lock:
                self._last_event = time.monotonic()
            self._wake.set()

    def trigger(self) -> None:
        """Ask for a check as if a file had changed (it still runs only if contents changed)."""
        self._notify([str(self.path)])

    # -- the checking thread -------------------------------------------------------------
    def _loop(self) -> None:
        self._safe_cycle()
        last_try = time.monotonic()
        while not self._stop.is_set():
            if not self._wake.wait(0.25):
                # While the main file is missing, look for it now and then as well.
                if self._missing and time.monotonic() - last_try > 1.0:
                    last_try = time.monotonic()
                    self._safe_cycle()
                continue
            self._wake.clear()
            while not self._stop.is_set():
                with self._lock:
                    remaining = self._last_event + self.debounce - time.monotonic()
                if remaining <= 0:
                    break
                self._stop.wait(remaining)
            if self._stop.is_set():
                break
            last_try = time.monotonic()
            self._safe_cycle()

    def _safe_cycle(self) -> None:
        try:
            self._cycle()
        except Exception as exc:  # a bug must not end the watch; say it and go on
            self.error = exc
            self.on_message(f"qreferee: internal error while checking: {type(exc).__name__}: {exc}")

    def _wait_for(self, paths: Iterable[Path]) -> bool:
        """Wait (up to ``retry_seconds``) until every path exists; an editor may be replacing one."""
        deadline = time.monotonic() + self.retry_seconds
        paths = list(paths)
        while True:
            if all(p.exists() for p in paths):
                return True
            if time.monotonic() >= deadline or self._stop.wait(0.05):
                return False

    def _cycle(self) -> None:
        from verifier.scan import scan_path

        if not self._wait_for([self.path]):
            if not self._missing:
                self.on_message(f"qreferee: {self.path} is missing; waiting for it to come back")
            self._missing = True
            return
        if self._missing:
            self.on_message(f"qreferee: {self.path} is back")
        self._missing = False
        # Files of the previous check that are gone for a moment are waited for.
        self._wait_for(self._files)
        files = set(self._files) | {self.path}
        for _ in range(5):
            # The hash is taken before scanning: a change during the scan makes the next
            # check's hash differ, so it is never missed.
            fingerprint = self._settled(files)
            doc = scan_path(self._given)
            found = _doc_paths(doc) | {self.path}
            if found == files:
                break
            files = found
        self._files = files
        self._reschedule({p.parent for p in files})
        if self.report is not None and fingerprint == self._fp:
            return
        self._fp = fingerprint
        report = self.checker.check_document(doc, self.cache_dir)
        # The first report shown is the full one (even if the first try found no main file).
        self._publish(report, self.report is None)

    def _settled(self, files: set[Path]) -> str:
        """The files' fingerprint once it holds still for ``SETTLE_SECONDS``.

        An editor that saves in place truncates the file and then writes it: a check in
        between would report the claims of a half-written file.  When the contents changed,
        they are read again after a short pause until two readings agree (a few tries).
        """
        fingerprint = _fingerprint(files)
        if fingerprint == self._fp:
            return fingerprint
        for _ in range(10):
            if self._stop.wait(SETTLE_SECONDS):
                break
            again = _fingerprint(files)
            if again == fingerprint:
                break
            fingerprint = again
        return fingerprint

    def _publish(self, report: Report, first: bool) -> None:
        from verifier.report import text

        old = self.report
        changed, with_old, removed, new_diags = diff_reports(old, report)
        self.runs += 1
        self.report = report
        stats = self.checker.stats
        if first:
            lines = text.render(report, verbose=self.outputs.verbose).splitlines()
            lines.append(
                f"qreferee: watching {len(self._files)} file{'s' if len(self._files) != 1 else ''} "
                f"in {len(self._watches)} folder{'s' if len(self._watches) != 1 else ''} (Ctrl-C stops)"
            )
        else:
            lines = [_diagnostic_line(d) for d in new_diags]
            for c, was in with_old:
                line = text.claim_line(c)
                lines.append(line if was is None or was == c.verdict else f"{line} (was {was})")
            lines.extend(f"qreferee: claim gone: {r}" for r in removed)
            lines.append(_summary_line(report, len(changed) + len(removed), stats))
        refresh_outputs(self.outputs, report, self.path, self.on_message, self._files)
        run = WatchRun(self.runs, report, changed, removed, new_diags, lines, stats, sorted(self._files))
        if self.on_report is not None:
            self.on_report(run)


# -- the command line ------------------------------------------------------------------------


def register(subparsers: argparse._SubParsersAction[argparse.ArgumentParser]) -> argparse.ArgumentParser:
    """Add the ``watch`` command to the ``qreferee`` command line."""
    from verifier.argtypes import non_negative_seconds, positive_int

    parser = subparsers.add_parser(
        "watch",
        help="re-check a manuscript whenever it changes, printing only what changed",
        description=(
            "Check a manuscript, then watch its files (the main file and everything it \\input's or "
            "\\include's) and re-check after every save. Only claims whose verdict changed are printed, "
            "with a summary line. Verdicts of unchanged claims come from the cache in .qreferee-cache/ "
            "beside the main file (safe to delete). Ctrl-C stops."
        ),
    )
    parser.add_argument("file", metavar="FILE", help="the main .tex (or .md) file")
    parser.add_argument(
        "--format",
        choices=("text", "json", "html"),
        default="text",
        help="format of the report written with -o (html needs the HTML formatter); "
        "json without -o prints one JSON object per check",
    )
    parser.add_argument("-o", "--output", metavar="REPORT", help="rewrite the full report to REPORT after each check")
    parser.add_argument("--annotate", metavar="OUT", help="rewrite an annotated copy of the manuscript to OUT")
    parser.add_argument(
        "--debounce",
        type=non_negative_seconds,
        default=DEFAULT_DEBOUNCE,
        metavar="SECONDS",
        help=f"quiet period before re-checking (default {DEFAULT_DEBOUNCE})",
    )
    parser.add_argument(
        "--poll", action="store_true", help="poll the files instead of using notifications (network file systems)"
    )
    parser.add_argument(
        "--max-terms", type=positive_int, default=None, metavar="N", help="most coefficients one claim may use"
    )
    parser.add_argument("--no-cache", action="store_true", help="keep verdicts in memory only (no .qreferee-cache/)")
    parser.add_argument("-v", "--verbose", action="store_true", help="also print each claim as it was read")
    parser.add_argument("--max-runs", type=int, default=None, help=argparse.SUPPRESS)
    parser.set_defaults(func=run_watch_args)
    return parser


def run_watch_args(args: argparse.Namespace) -> int:
    """Run ``qreferee watch``; returns the exit status of the last check (0 if none ran)."""
    main = Path(args.file)
    if not main.is_file():
        print(f"qreferee: cannot read {main}", file=sys.stderr)
        return 2
    if args.format == "html" and not args.output:
        print("qreferee: --format html needs -o REPORT", file=sys.stderr)
        return 2
    outputs = Outputs(
        Path(args.output) if args.output else None,
        args.format,
        Path(args.annotate) if args.annotate else None,
        bool(args.verbose),
    )
    json_lines = args.format == "json" and not args.output
    done = threading.Event()
    max_runs = getattr(args, "max_runs", None)

    def show(run: WatchRun) -> None:
        if json_lines:
            record = {
                "check": run.number,
                "changed": [c.to_dict() for c in run.changed],
                "removed": run.removed,
                "diagnostics": [d.to_dict() for d in run.new_diagnostics],
                "summary": run.report.summary,
                "exit_code": run.report.exit_code,
            }
            print(json.dumps(record, ensure_ascii=False), flush=True)
        else:
            print("\n".join(run.lines), flush=True)
        if max_runs is not None and run.number >= max_runs:
            done.set()

    from verifier.config import ConfigError, cache_allowed, project_config

    try:
        config = project_config(main)
    except ConfigError as exc:
        print(f"qreferee: {exc}", file=sys.stderr)
        return 2
    # The same project defaults and cache key as `qreferee check`, so the two share verdicts.
    checker = CachedChecker(
        max_terms=args.max_terms or config.max_terms,
        tag_defaults=config.tag_defaults(),
        use_disk=cache_allowed(bool(args.no_cache), config),
    )
    watcher = Watcher(main, show, debounce=args.debounce, polling=args.poll, checker=checker, outputs=outputs)
    watcher.start()
    try:
        while watcher.running and not done.wait(0.2):
            pass
    except KeyboardInterrupt:
        pass
    finally:
        watcher.stop()
    return watcher.report.exit_code if watcher.report is not None else 0

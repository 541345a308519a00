"""A cache on disk of claim outcomes: re-checking an edited manuscript decides only what changed.

The cache lives in a folder ``.qreferee-cache/`` next to the main file, one small JSON file
per tagged block.  It is safe to delete at any time; a corrupt or unreadable entry is
ignored (the block is simply decided again).

A tagged block's verdicts are reused only when everything they can depend on is identical:

- the block's text after macro expansion and normalisation, row by row, with the offset of
  every character relative to the start of the block's first line (so a renamed macro with
  the same expansion, or a reflowed line, counts as a change);
- the author's raw text of the block (it gives the ``source`` field and the columns);
- the tag options and the display environment, and the problems the scanner found;
- the text of every define tag that precedes the block (defines change meanings);
- ``--max-terms`` and any other option that can change an outcome;
- ``verifier.__version__``, :data:`CACHE_FORMAT`, the fields of the result types, and a
  fingerprint of the engine's own source files (so a changed engine never reuses verdicts).

Locations are stored relative to the block, so a block that moved (lines added above it,
or it moved to another file) is reported at its new place.  Outcomes that depend on the
clock (a claim stopped by the time budget) are never stored.
"""

from __future__ import annotations

import contextlib
import dataclasses
import functools
import hashlib
import inspect
import json
import os
import tempfile
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any

from verifier import __version__
from verifier.config import apply_tag_defaults
from verifier.diagnostics import Diagnostic
from verifier.location import Location
from verifier.scan.document import ClaimBlock, DefineTag, ScannedDocument
from verifier.scan.text import SourceFile

if TYPE_CHECKING:
    from verifier.api import ClaimResult, Report

CACHE_FORMAT = 1
CACHE_DIRNAME = ".qreferee-cache"
# Entries beyond this many are pruned, least recently used first.
MAX_ENTRIES = 4000
# Outcome codes that may depend on the machine or the clock, not only on the claim.
UNCACHED_CODES = frozenset({"time-budget", "internal"})  # depend on the machine or are bugs

_SENTINEL_FILE = "<qreferee-cache-boundary>"
_SENTINEL_CODE = "orphan-tag"  # any fatal scan code: the block becomes one error result
_SENTINEL_MESSAGE = "qreferee cache boundary"
_README = """\
This folder is qreferee's cache of verdicts, keyed by a hash of each tagged claim, the
definitions before it and the engine version.  It is safe to delete; qreferee then
decides every claim again.
"""

Check = Callable[[ScannedDocument], "Report"]


@dataclass
class CacheStats:
    """What the last run did with each tagged block."""

    blocks: int = 0  # tagged blocks in the document
    hits: int = 0  # blocks whose verdicts came from the cache
    misses: int = 0  # blocks decided in this run
    stored: int = 0  # blocks whose verdicts were written to the cache
    uncacheable: int = 0  # blocks decided that cannot be cached (no rows, clock-dependent outcome)
    recomputed: list[str] = field(default_factory=list)  # "file:line" of each block decided
    claims_decided: int = 0  # claims of the blocks decided in this run
    claims_reused: int = 0  # claims whose verdicts came from the cache


def default_cache_dir(main: str | Path) -> Path:
    """Where the cache of the manuscript ``main`` lives: ``.qreferee-cache/`` beside it."""
    return Path(main).resolve().parent / CACHE_DIRNAME


@functools.lru_cache(maxsize=1)
def engine_fingerprint() -> str:
    """A hash of the engine's source files and grammar: verdicts are reused by one engine only."""
    package = Path(__file__).resolve().parent
    digest = hashlib.sha256()
    files = sorted(p for p in package.rglob("*.py") if "__pycache__" not in p.parts)
    with contextlib.suppress(Exception):
        from verifier.parse.grammar import grammar_path

        files.append(grammar_path())
    for path in files:
        try:
            data = path.read_bytes()
        except OSError:
            data = b"<unreadable>"
        digest.update(str(path.relative_to(package) if path.is_relative_to(package) else path.name).encode())
        digest.update(b"\0")
        digest.update(hashlib.sha256(data).digest())
    return digest.hexdigest()


def _schema() -> list[list[str]]:
    from verifier.api import ClaimResult
    from verifier.prove.prover import Outcome

    return [[f.name for f in dataclasses.fields(t)] for t in (ClaimResult, Outcome)]


class DiskCache:
    """JSON entries in a folder; every failure to read or write is tolerated."""

    def __init__(self, folder: Path) -> None:
        self.folder = folder
        self.writable = True

    def _path(self, key: str) -> Path:
        return self.folder / f"{key}.json"

    def get(self, key: str) -> list[dict[str, Any]] | None:
        """The stored claims of ``key``, or None (missing, corrupt, other format)."""
        path = self._path(key)
        try:
            data = json.loads(path.read_text(encoding="utf-8"))
        except (OSError, ValueError, UnicodeDecodeError):
            return None
        if not isinstance(data, dict) or data.get("format") != CACHE_FORMAT or data.get("key") != key:
            return None
        claims = data.get("claims")
        if not isinstance(claims, list) or not all(isinstance(c, dict) for c in claims):
            return None
        with contextlib.suppress(OSError):
            os.utime(path)  # least recently used entries are pruned first
        return claims

    def put(self, key: str, claims: list[dict[str, Any]]) -> bool:
        """Store an entry atomically; False if the folder cannot be written."""
        if not self.writable:
            return False
        try:
            self._prepare()
            text = json.dumps({"format": CACHE_FORMAT, "key": key, "claims": claims}, ensure_ascii=False)
            fd, tmp = tempfile.mkstemp(prefix=".tmp-", suffix=".json", dir=self.folder)
            try:
                with os.fdopen(fd, "w", encoding="utf-8") as f:
                    f.write(text)
                os.replace(tmp, self._path(key))
            except BaseException:
                with contextlib.suppress(OSError):
                    os.unlink(tmp)
                raise
        except OSError:
            self.writable = False
            return False
        return True

    def _prepare(self) -> None:
        if self.folder.is_dir():
            return
        self.folder.mkdir(parents=True, exist_ok=True)
        (self.folder / "README.txt").write_text(_README, encoding="utf-8")
        # Keep the cache out of version control and backups.
        (self.folder / ".gitignore").write_text("*\n", encoding="utf-8")
        (self.folder / "CACHEDIR.TAG").write_text(
            "Signature: 8a477f597d28d172789f06886806bc55\n# qreferee's cache of verdicts; safe to delete.\n",
            encoding="utf-8",
        )

    def prune(self, max_entries: int = MAX_ENTRIES) -> int:
        """Delete the least recently used entries beyond ``max_entries``; returns how many."""
        try:
            entries = [e for e in os.scandir(self.folder) if e.name.endswith(".json") and e.is_file()]
        except OSError:
            return 0
        if len(entries) <= max_entries:
            return 0

        def mtime(e: os.DirEntry[str]) -> float:
            try:
                return e.stat().st_mtime
            except OSError:
                return 0.0

        entries.sort(key=mtime)
        removed = 0
        for e in entries[: len(entries) - max_entries * 3 // 4]:
            with contextlib.suppress(OSError):
                os.unlink(e.path)
                removed += 1
        return removed


@dataclass
class _Region:
    """A block's span of its source: from the start of the tag's line to its last character."""

    source: SourceFile
    start: int
    end: int
    line_starts: list[int]

    def relative(self, loc: Location) -> int | None:
        """The offset of ``loc`` from the region's start, or None if it lies outside."""
        if loc.file != self.source.display or not 1 <= loc.line <= len(self.line_starts) or loc.column < 1:
            return None
        offset = self.line_starts[loc.line - 1] + loc.column - 1
        if not self.start <= offset <= self.end:
            return None
        return offset - self.start

    def location(self, relative: int) -> Location:
        line, col = self.source.line_col(self.start + relative)
        return Location(self.source.display, line, col)


def _region(block: ClaimBlock) -> _Region | None:
    if not block.rows:
        return None
    source = block.rows[0].text.source
    if source.display != block.tag.file or any(r.text.source is not source for r in block.rows):
        return None
    starts = source.line_starts
    if not 1 <= block.tag.line <= len(starts):
        return None
    start = starts[block.tag.line - 1]
    filled = [r.text.origins for r in block.rows if r.text.origins]
    if not filled or min(min(o) for o in filled) < start:
        return None
    return _Region(source, start, max(max(o) for o in filled) + 1, starts)


def _define_text(item: DefineTag) -> str:
    if item.text is not None:
        return item.origin + "=" + item.text.text
    return "!" + "\n".join(f"{p.code}:{p.message}" for p in item.problems)


def fixed_key(settings: dict[str, Any]) -> str:
    """A hash of what every block's key shares: the format, the engine, the result types, the settings."""
    material = {
        "format": CACHE_FORMAT,
        "version": __version__,
        "engine": engine_fingerprint(),
        "schema": _schema(),
        "settings": sorted((k, repr(v)) for k, v in settings.items()),
    }
    blob = json.dumps(material, ensure_ascii=False, sort_keys=True, separators=(",", ":"))
    return hashlib.sha256(blob.encode("utf-8")).hexdigest()


def block_key(
    block: ClaimBlock, region: _Region, defines: list[str], settings: dict[str, Any], fixed: str | None = None
) -> str:
    """The cache key of a block: a hash of everything its verdicts can depend on.

    ``fixed`` is :func:`fixed_key` of ``settings`` when the caller has it already.  The
    material is a tuple of strings, integers and None (in lists and tuples), whose ``repr``
    is unambiguous and much quicker to make than JSON.
    """
    start = -region.start
    material = (
        fixed if fixed is not None else fixed_key(settings),
        tuple(defines),
        tuple(sorted(block.options.items())),
        block.environment,
        tuple((p.code, p.severity, p.message, p.hint, region.relative(p.location)) for p in block.problems),
        region.relative(block.tag),
        tuple((r.text.text, list(map(start.__add__, r.text.origins)), r.label, r.source_text) for r in block.rows),
        region.source.text[region.start : region.end],
    )
    return hashlib.sha256(repr(material).encode("utf-8", "surrogatepass")).hexdigest()


def _encode(result: ClaimResult, region: _Region) -> dict[str, Any] | None:
    """A result relative to its block, as JSON data; None if it cannot be cached exactly."""
    outcome = result.outcome
    if outcome.code in UNCACHED_CODES:
        return None
    at, end = region.relative(result.location), region.relative(result.end)
    if at is None or end is None:
        return None
    entry = {
        "at": at,
        "end": end,
        "outcome": {f.name: getattr(outcome, f.name) for f in dataclasses.fields(outcome)},
        "fields": {
            f.name: getattr(result, f.name)
            for f in dataclasses.fields(result)
            if f.name not in ("location", "end", "outcome")
        },
    }
    try:
        # Only data that survives JSON unchanged (no tuples, Fractions, int keys) is cached.
        if json.loads(json.dumps(entry)) != entry:
            return None
    except (TypeError, ValueError):
        return None
    return entry


def _copy_data(value: Any) -> Any:
    """A copy of JSON data (dicts, lists and scalars) that shares no dict or list with it."""
    if isinstance(value, dict):
        return {k: _copy_data(v) for k, v in value.items()}
    if isinstance(value, list):
        return [_copy_data(v) for v in value]
    return value


def _decode(entry: dict[str, Any], region: _Region) -> ClaimResult:
    from verifier.api import ClaimResult
    from verifier.prove.prover import Outcome

    entry = _copy_data(entry)  # results never share mutable parts (space, components)
    outcome = Outcome(**entry["outcome"])
    at, end = entry["at"], entry["end"]
    if not (isinstance(at, int) and isinstance(end, int)):
        raise TypeError("bad location")
    if not (0 <= at <= region.end - region.start and 0 <= end <= region.end - region.start):
        raise ValueError("location outside the block")
    return ClaimResult(location=region.location(at), end=region.location(end), outcome=outcome, **entry["fields"])


def boundary_block() -> ClaimBlock:
    """A block that the checker turns into exactly one result: it marks where a block's results end."""
    loc = Location(_SENTINEL_FILE, 1, 1)
    return ClaimBlock(loc, {}, [], "", [Diagnostic(_SENTINEL_CODE, "error", loc, _SENTINEL_MESSAGE, "")])


def is_boundary(result: ClaimResult) -> bool:
    """Whether ``result`` is the one result of a :func:`boundary_block`."""
    return result.location.file == _SENTINEL_FILE and result.outcome.message == _SENTINEL_MESSAGE


def supported_options(function: Callable[..., Any], options: dict[str, Any]) -> tuple[dict[str, Any], list[str]]:
    """The options ``function`` accepts (by parameter name), and the names it does not."""
    try:
        params = inspect.signature(function).parameters
    except (TypeError, ValueError):
        return {}, sorted(options)
    takes_any = any(p.kind is inspect.Parameter.VAR_KEYWORD for p in params.values())
    accepted = {k: v for k, v in options.items() if takes_any or k in params}
    return accepted, sorted(k for k in options if k not in accepted)


class CachedChecker:
    """Checks documents, deciding only the tagged blocks whose cache key is new.

    ``options`` are passed to :func:`verifier.api.check_document` when it accepts them;
    they are part of the cache key.  ``run_options`` are passed the same way but are not
    part of the key: only options that cannot change a cached verdict belong there (``jobs``
    gives the same results; ``max_seconds`` changes only clock-dependent outcomes, which are
    never stored).  ``tag_defaults`` are tag options every block gets unless its tag sets
    them (project defaults); they reach the key through the block's options.  ``check``
    replaces the checker (tests count what is decided with it).  ``cache_dir=None`` puts the
    cache beside each main file; ``use_disk=False`` keeps it in memory only.

    ``keep_results=True`` (for a caller that checks the same manuscript again and again and
    never modifies the results, such as the language server) also keeps the results
    themselves: a block whose key, file and line are unchanged gets the very same
    :class:`~verifier.api.ClaimResult` objects as last time, not a fresh copy.
    """

    def __init__(
        self,
        cache_dir: Path | None = None,
        *,
        max_terms: int | None = None,
        options: dict[str, Any] | None = None,
        run_options: dict[str, Any] | None = None,
        tag_defaults: dict[str, str] | None = None,
        check: Check | None = None,
        use_disk: bool = True,
        keep_results: bool = False,
    ) -> None:
        from verifier.api import check_document
        from verifier.prove.prover import DEFAULT_MAX_TERMS

        self.cache_dir = cache_dir
        self.use_disk = use_disk
        self.tag_defaults = dict(tag_defaults or {})
        settings: dict[str, Any] = {"max_terms": max_terms or DEFAULT_MAX_TERMS, **(options or {})}
        self.settings = settings
        if check is None:
            accepted, self.ignored_options = supported_options(check_document, {**settings, **(run_options or {})})

            def default_check(doc: ScannedDocument) -> Report:
                return check_document(doc, **accepted)

            check = default_check
        else:
            self.ignored_options = []
        self._check = check
        self._fixed = fixed_key(settings)
        self._memory: dict[str, list[dict[str, Any]]] = {}
        self.keep_results = keep_results
        # (key, file, line of the tag) -> the results given last time (keep_results only)
        self._results: dict[tuple[str, str, int], list[ClaimResult]] = {}
        self._disks: dict[Path, DiskCache] = {}
        self.stats = CacheStats()

    def check_path(self, path: str | Path) -> Report:
        """Scan and check the manuscript at ``path`` with the cache beside it."""
        from verifier.scan import scan_path

        path = Path(path)
        return self.check_document(scan_path(path), self.cache_dir or default_cache_dir(path))

    def _disk(self, folder: Path | None) -> DiskCache | None:
        if folder is None or not self.use_disk:
            return None
        folder = folder.resolve()
        if folder not in self._disks:
            self._disks[folder] = DiskCache(folder)
        return self._disks[folder]

    def _lookup(self, key: str, disk: DiskCache | None) -> list[dict[str, Any]] | None:
        if key in self._memory:
            return self._memory[key]
        found = disk.get(key) if disk is not None else None
        if found is not None:
            self._remember(key, found)
        return found

    def _remember(self, key: str, claims: list[dict[str, Any]]) -> None:
        if len(self._memory) >= MAX_ENTRIES:
            self._memory.pop(next(iter(self._memory)))
        self._memory[key] = claims

    def _keep(self, key: str, block: ClaimBlock, results: list[ClaimResult]) -> None:
        if len(self._results) >= MAX_ENTRIES:
            self._results.pop(next(iter(self._results)))
        self._results[(key, block.tag.file, block.tag.line)] = results

    def check_document(self, doc: ScannedDocument, cache_dir: Path | None = None) -> Report:
        """Check ``doc``: cached blocks are re-located, the others decided in one run."""
        from verifier.api import Report

        apply_tag_defaults(doc, self.tag_defaults)
        disk = self._disk(cache_dir if cache_dir is not None else self.cache_dir)
        stats = self.stats = CacheStats()
        defines: list[str] = []
        # Per block: (block, region, key, cached results or None)
        plan: list[tuple[ClaimBlock, _Region | None, str | None, list[ClaimResult] | None]] = []
        for item in doc.items:
            if isinstance(item, DefineTag):
                defines.append(_define_text(item))
                continue
            stats.blocks += 1
            region = _region(item)
            key = block_key(item, region, list(defines), self.settings, self._fixed) if region is not None else None
            cached: list[ClaimResult] | None = None
            if key is not None and self.keep_results:
                cached = self._results.pop((key, item.tag.file, item.tag.line), None)
                if cached is not None:
                    self._results[(key, item.tag.file, item.tag.line)] = cached  # the most recently used last
            if cached is None and key is not None and region is not None:
                entry = self._lookup(key, disk)
                if entry is not None:
                    try:
                        cached = [_decode(e, region) for e in entry]
                    except (TypeError, ValueError, KeyError):
                        cached = None
                    if cached is not None and self.keep_results:
                        self._keep(key, item, cached)
            plan.append((item, region, key, cached))

        fresh = self._decide(doc, {id(b) for b, _, _, c in plan if c is None})
        report = Report(diagnostics=fresh.diagnostics, files=fresh.files)
        segments = iter(fresh.segments)
        stored = False
        for block, region, key, cached in plan:
            if cached is not None:
                stats.hits += 1
                stats.claims_reused += len(cached)
                report.claims.extend(cached)
                continue
            results = next(segments)
            stats.misses += 1
            stats.claims_decided += len(results)
            stats.recomputed.append(f"{block.tag.file}:{block.tag.line}")
            report.claims.extend(results)
            entries = [_encode(r, region) for r in results] if region is not None else [None]
            if key is None or any(e is None for e in entries):
                stats.uncacheable += 1
                continue
            clean = [e for e in entries if e is not None]
            self._remember(key, clean)
            if self.keep_results:
                self._keep(key, block, list(results))
            if disk is not None and disk.put(key, clean):
                stats.stored += 1
                stored = True
        if stored and disk is not None:
            disk.prune()
        if report.claims:
            # The fresh run saw only the blocks not found in the cache; claims read from the cache
            # count too, so its "nothing was checked" warning does not hold for the document.
            report.diagnostics = [d for d in report.diagnostics if d.code != "no-claims"]
        return report

    def _decide(self, doc: ScannedDocument, wanted: set[int]) -> _Fresh:
        """Decide the blocks in ``wanted`` (with every define, in reading order) in one run."""
        items: list[ClaimBlock | DefineTag] = []
        for item in doc.items:
            if isinstance(item, DefineTag):
                items.append(item)
            elif id(item) in wanted:
                items.extend([item, boundary_block()])
        report = self._check(ScannedDocument(items, list(doc.diagnostics), list(doc.files)))
        segments: list[list[ClaimResult]] = [[]]
        for c in report.claims:
            if is_boundary(c):
                segments.append([])
            else:
                segments[-1].append(c)
        if len(segments) == len(wanted) + 1 and not segments[-1]:
            return _Fresh(report.diagnostics, report.files, segments[:-1])
        # The checker did not keep blocks apart: decide each block on its own instead.
        per_block: list[list[ClaimResult]] = []
        before: list[ClaimBlock | DefineTag] = []
        for item in doc.items:
            if isinstance(item, DefineTag):
                before.append(item)
            elif id(item) in wanted:
                one = self._check(ScannedDocument([*before, item], [], list(doc.files)))
                per_block.append(list(one.claims))
        return _Fresh(report.diagnostics, report.files, per_block)


@dataclass
class _Fresh:
    diagnostics: list[Diagnostic]
    files: list[str]
    segments: list[list[ClaimResult]]

"""``qreferee screen``: check a whole submission (a folder, ``.zip`` or ``.tar.gz``) as an editor receives it.

Archives are untrusted.  They are unpacked into a fresh temporary folder, and a member is
refused when it has an absolute path or a ``..`` component, when it is a symbolic or hard
link, a device or a FIFO, or when its path would leave the folder.  The whole archive is
refused when it exceeds the limits on total size (100 MB), number of members (2000) or
compression ratio (100:1, per member and overall).  Links are never followed.

The main file is the ``.tex`` file with both ``\\documentclass`` and ``\\begin{document}``;
among several, one named ``main.tex``, ``paper.tex`` or ``ms.tex`` is preferred, else the
one no other file inputs.  The report says which was chosen and why.  ``\\input``,
``\\include`` and ``\\subfile`` are followed inside the submission only.

With ``--untagged`` every displayed equation without a tag is tried as well: if it reads
as a claim about modular forms (it names ``E_k``, ``\\Delta``, ``j``, ``\\eta``, a theta
function or ``\\Theta_Q``), it is checked and reported as untagged; displays that do not
read as such claims are ordinary mathematics and are skipped silently.
"""

from __future__ import annotations

import argparse
import bz2
import contextlib
import functools
import gzip
import json
import lzma
import math
import os
import re
import stat
import sys
import tarfile
import tempfile
import time
import zipfile
from collections.abc import Callable, Iterator, Mapping
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import IO, TYPE_CHECKING, Any, cast

from verifier.cache import boundary_block, is_boundary, supported_options
from verifier.location import Location
from verifier.scan.document import MAX_FILE_BYTES, ClaimBlock, DefineTag, ScannedDocument
from verifier.scan.latex import ENVIRONMENTS
from verifier.scan.text import MappedText, SourceFile, blank_comments

if TYPE_CHECKING:
    from verifier.api import ClaimResult, Report
    from verifier.diagnostics import Diagnostic
    from verifier.scan import macros as macro_mod

MB = 1024 * 1024
PREFERRED_NAMES = ("main.tex", "paper.tex", "ms.tex")
TEX_SUFFIXES = (".tex", ".ltx", ".latex")
UNTAGGED_PREFIX = "untagged:"
_CHUNK = 64 * 1024


# -- limits and refusals --------------------------------------------------------------------


@dataclass(frozen=True)
class Limits:
    """What an archive may hold."""

    max_bytes: int = 100 * MB  # total size once unpacked
    max_members: int = 2000  # files and folders
    max_ratio: float = 100.0  # unpacked size : packed size, per member and overall
    # Ratios are judged only past this many unpacked bytes: tiny members compress oddly.
    ratio_floor: int = 1 * MB


class UnsafeArchive(Exception):
    """The archive was refused; ``problems`` has one message per refusal."""

    def __init__(self, problems: list[str]) -> None:
        super().__init__("; ".join(problems))
        self.problems = problems


class NoMainFile(Exception):
    """No ``.tex`` file of the submission is a whole document."""


def _name_problem(name: str) -> str | None:
    """Why a member name is refused, or None."""
    if "\x00" in name:
        return "has a NUL character in its name"
    posix = name.replace("\\", "/")
    if posix.startswith("/") or re.match(r"^[A-Za-z]:", posix):
        return "has an absolute path"
    parts = [p for p in posix.split("/") if p not in ("", ".")]
    if ".." in parts:
        return "has a '..' component"
    if not parts:
        return "has an empty name"
    return None


def _target(dest: Path, name: str) -> Path:
    """Where a (checked) member goes; refuses a path that resolves outside ``dest``."""
    parts = [p for p in name.replace("\\", "/").split("/") if p not in ("", ".")]
    target = dest.joinpath(*parts)
    if not target.resolve().is_relative_to(dest.resolve()):
        raise UnsafeArchive([f"member {name!r} resolves outside the extraction folder; refused"])
    return target


class _Budget:
    """Counts unpacked bytes against the limits while members are written."""

    def __init__(self, limits: Limits, packed: Callable[[], int]) -> None:
        self.limits = limits
        self.packed = packed  # packed bytes read so far (whole archive)
        self.total = 0

    def add(self, name: str, n: int, member_out: int, member_packed: int | None) -> None:
        lim = self.limits
        self.total += n
        if self.total > lim.max_bytes:
            raise UnsafeArchive(
                [f"member {name!r}: the archive unpacks to more than {lim.max_bytes // MB} MB (the limit); refused"]
            )
        if member_packed is not None and member_out > lim.ratio_floor and member_out > lim.max_ratio * member_packed:
            raise UnsafeArchive(
                [
                    f"member {name!r} expands more than {lim.max_ratio:g}:1 "
                    f"({member_out} bytes from {member_packed}); refused as a compression bomb"
                ]
            )
        packed = max(self.packed(), 1)
        if self.total > lim.ratio_floor and self.total > lim.max_ratio * packed:
            raise UnsafeArchive(
                [
                    f"member {name!r}: the archive expands more than {lim.max_ratio:g}:1 overall "
                    f"({self.total} bytes from {packed}); refused as a compression bomb"
                ]
            )


def _write_member(target: Path, name: str, data: IO[bytes], budget: _Budget, packed: Callable[[], int | None]) -> None:
    try:
        target.parent.mkdir(parents=True, exist_ok=True)
        flags = os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_NOFOLLOW", 0) | getattr(os, "O_BINARY", 0)
        fd = os.open(target, flags, 0o600)
    except FileExistsError:
        raise UnsafeArchive([f"member {name!r} appears twice (or clashes with a folder); refused"]) from None
    except OSError as exc:
        raise UnsafeArchive([f"member {name!r} cannot be written: {exc.strerror or exc}"]) from None
    written = 0
    with os.fdopen(fd, "wb") as out:
        while chunk := data.read(_CHUNK):
            written += len(chunk)
            budget.add(name, len(chunk), written, packed())
            out.write(chunk)


def _zip_type_problem(info: zipfile.ZipInfo) -> str | None:
    mode = info.external_attr >> 16
    kind = stat.S_IFMT(mode)
    if kind == stat.S_IFLNK:
        return "is a symbolic link"
    if kind and kind not in (stat.S_IFREG, stat.S_IFDIR):
        return "is a device, FIFO or socket, not a regular file"
    if info.flag_bits & 0x1:
        return "is encrypted"
    return None


def _extract_zip(path: Path, dest: Path, limits: Limits, left_out: list[str] | None = None) -> int:
    archive_size = max(path.stat().st_size, 1)
    try:
        zf = zipfile.ZipFile(path)
    except (zipfile.BadZipFile, OSError) as exc:
        raise UnsafeArchive([f"{path.name} is not a readable zip archive: {exc}"]) from None
    with zf:
        infos = zf.infolist()
        problems: list[str] = []
        if len(infos) > limits.max_members:
            problems.append(f"the archive has {len(infos)} members, more than the limit of {limits.max_members}")
        declared = 0
        skipped: set[str] = set()
        for info in infos:
            why = _name_problem(info.filename) or _zip_type_problem(info)
            if why and left_out is not None:
                left_out.append(f"member {info.filename!r} {why}; refused, and the rest screened without it")
                skipped.add(info.filename)
            elif why:
                problems.append(f"member {info.filename!r} {why}; refused")
            elif left_out is not None and _is_archive_name(info.filename):
                left_out.append(f"member {info.filename!r} is an archive inside the archive; it was not opened")
            declared += info.file_size
            if info.file_size > limits.ratio_floor and info.file_size > limits.max_ratio * max(info.compress_size, 1):
                problems.append(
                    f"member {info.filename!r} expands more than {limits.max_ratio:g}:1 "
                    f"({info.file_size} bytes from {info.compress_size}); refused as a compression bomb"
                )
        if declared > limits.max_bytes:
            problems.append(
                f"the archive unpacks to {declared} bytes, more than the limit of {limits.max_bytes // MB} MB"
            )
        elif declared > limits.ratio_floor and declared > limits.max_ratio * archive_size:
            problems.append(
                f"the archive expands more than {limits.max_ratio:g}:1 overall ({declared} bytes from "
                f"{archive_size}); refused as a compression bomb"
            )
        if problems:
            raise UnsafeArchive(problems)
        # The sizes in the directory may lie: the limits are enforced again on what is read.
        # Packed bytes of the members read so far, the current one counted in full.
        packed = [0]
        budget = _Budget(limits, lambda: packed[0])
        for info in infos:
            packed[0] += info.compress_size
            if info.filename in skipped:
                continue
            target = _target(dest, info.filename)
            if info.is_dir():
                target.mkdir(parents=True, exist_ok=True)
                continue
            try:
                with zf.open(info) as data:
                    _write_member(target, info.filename, data, budget, functools.partial(_packed_of, info))
            except (zipfile.BadZipFile, zlib_error(), EOFError) as exc:
                raise UnsafeArchive([f"member {info.filename!r} is damaged: {exc}"]) from None
    return len(infos)


def _packed_of(info: zipfile.ZipInfo) -> int:
    return info.compress_size


def zlib_error() -> type[Exception]:
    import zlib

    return zlib.error


class _Counting:
    """A read-only file that counts the bytes read from it (the packed size consumed)."""

    def __init__(self, raw: IO[bytes]) -> None:
        self.raw = raw
        self.count = 0

    def read(self, n: int = -1, /) -> bytes:
        data = self.raw.read(n)
        self.count += len(data)
        return data

    def since(self, start: int) -> Callable[[], int]:
        """A function giving the bytes read since ``start``."""
        return lambda: self.count - start

    def readinto(self, b: Any) -> int:
        data = self.read(len(b))
        b[: len(data)] = data
        return len(data)

    def readable(self) -> bool:
        return True

    def close(self) -> None:
        self.raw.close()


def _tar_stream(path: Path, raw: _Counting) -> IO[bytes]:
    with path.open("rb") as f:
        magic = f.read(6)
    packed = cast(IO[bytes], raw)
    stream: IO[bytes]
    if magic.startswith(b"\x1f\x8b"):
        stream = cast(IO[bytes], gzip.GzipFile(fileobj=packed, mode="rb"))
    elif magic.startswith(b"BZh"):
        stream = bz2.BZ2File(packed)
    elif magic.startswith(b"\xfd7zXZ\x00"):
        stream = lzma.LZMAFile(packed)  # noqa: SIM115 (closed with the archive's file)
    else:
        stream = packed
    return stream


def _tar_type_problem(member: tarfile.TarInfo) -> str | None:
    if member.issym():
        return "is a symbolic link"
    if member.islnk():
        return "is a hard link"
    if member.isdev() or member.isfifo():
        return "is a device or FIFO, not a regular file"
    if not (member.isfile() or member.isdir()):
        return "is not a regular file or folder"
    return None


def _extract_tar(path: Path, dest: Path, limits: Limits, left_out: list[str] | None = None) -> int:
    problems: list[str] = []
    count = 0
    with path.open("rb") as f:
        raw = _Counting(f)
        stream = _tar_stream(path, raw)
        budget = _Budget(limits, lambda: raw.count)
        try:
            tf = tarfile.open(fileobj=stream, mode="r|")  # noqa: SIM115 (closed below)
        except (tarfile.TarError, OSError, EOFError, lzma.LZMAError) as exc:
            raise UnsafeArchive([f"{path.name} is not a readable tar archive: {exc}"]) from None
        try:
            for member in tf:
                count += 1
                if count > limits.max_members:
                    raise UnsafeArchive(
                        [*problems, f"the archive has more than {limits.max_members} members (the limit); refused"]
                    )
                why = _name_problem(member.name) or _tar_type_problem(member)
                if why and left_out is not None:
                    left_out.append(f"member {member.name!r} {why}; refused, and the rest screened without it")
                    budget.add(member.name, max(member.size, 0), 0, None)
                    continue
                if why:
                    problems.append(f"member {member.name!r} {why}; refused")
                    # Its data is skipped, but still counts: a refused member must not unpack a bomb.
                    budget.add(member.name, max(member.size, 0), 0, None)
                    continue
                if problems:
                    budget.add(member.name, max(member.size, 0), 0, None)
                    continue  # refused anyway: do not write more
                if left_out is not None and member.isfile() and _is_archive_name(member.name):
                    left_out.append(f"member {member.name!r} is an archive inside the archive; it was not opened")
                target = _target(dest, member.name)
                if member.isdir():
                    target.mkdir(parents=True, exist_ok=True)
                    continue
                data = tf.extractfile(member)
                if data is None:
                    continue
                with data:
                    _write_member(target, member.name, data, budget, raw.since(raw.count))
        except (tarfile.TarError, EOFError, OSError, lzma.LZMAError, zlib_error()) as exc:
            problems.append(f"the archive is damaged: {exc}")
        finally:
            with contextlib.suppress(Exception):
                tf.close()
    if problems:
        raise UnsafeArchive(problems)
    return count


def archive_kind(path: Path) -> str | None:
    """``zip``, ``tar`` or None (a folder or something else)."""
    if path.is_dir():
        return None
    name = path.name.lower()
    if name.endswith(".zip"):
        return "zip"
    if name.endswith((".tar", ".tar.gz", ".tgz", ".tar.bz2", ".tbz2", ".tar.xz", ".txz")):
        return "tar"
    try:
        with path.open("rb") as f:
            head = f.read(262 + 8)
    except OSError:
        return None
    if head.startswith((b"PK\x03\x04", b"PK\x05\x06")):
        return "zip"
    if head.startswith((b"\x1f\x8b", b"BZh", b"\xfd7zXZ\x00")) or head[257:262] == b"ustar":
        return "tar"
    return None


def extract_archive(path: Path, dest: Path, limits: Limits | None = None, left_out: list[str] | None = None) -> int:
    """Unpack an untrusted archive into the empty folder ``dest``; returns how many members it had.

    Raises :class:`UnsafeArchive` naming every refused member.  With a list ``left_out``,
    a member refused for itself (a link, an absolute or '..' path, a device, encryption) is
    skipped and described there instead, and so is a nested archive (written, never
    opened); limits on the whole archive (size, count, compression) still refuse it all.
    """
    limits = limits or Limits()
    kind = archive_kind(path)
    if kind == "zip":
        return _extract_zip(path, dest, limits, left_out)
    if kind == "tar":
        return _extract_tar(path, dest, limits, left_out)
    raise UnsafeArchive([f"{path.name} is neither a folder nor a .zip, .tar.gz or .tgz archive"])


_ARCHIVE_SUFFIXES = (".zip", ".tar", ".tar.gz", ".tgz", ".tar.bz2", ".tbz2", ".tar.xz", ".txz", ".gz", ".7z", ".rar")


def _is_archive_name(name: str) -> bool:
    return name.lower().endswith(_ARCHIVE_SUFFIXES)


@contextlib.contextmanager
def opened_submission(path: Path, limits: Limits | None = None, left_out: list[str] | None = None) -> Iterator[Path]:
    """The submission's folder: the folder itself, or a temporary one holding the unpacked archive."""
    if path.is_dir():
        yield path
        return
    with tempfile.TemporaryDirectory(prefix="qreferee-screen-") as tmp:
        dest = Path(tmp) / "submission"
        dest.mkdir()
        extract_archive(path, dest, limits, left_out)
        yield dest


# -- the main file --------------------------------------------------------------------------

_DOCUMENTCLASS = re.compile(r"\\documentclass(?![A-Za-z])")
_BEGIN_DOCUMENT = re.compile(r"\\begin\s*\{document\}")
_INCLUDE = re.compile(r"\\(?:input|include|subfile)(?![A-Za-z])\s*(?:\{([^{}]*)\}|([^\s{}\\%]+))")


@dataclass
class MainChoice:
    """The main file chosen, why, and the other candidates."""

    path: Path
    reason: str
    candidates: list[Path]


def _tex_files(root: Path) -> list[Path]:
    out: list[Path] = []
    for folder, dirs, files in os.walk(root, followlinks=False):
        dirs[:] = sorted(d for d in dirs if not d.startswith(".") and d != "__MACOSX")
        for name in sorted(files):
            p = Path(folder) / name
            if name.lower().endswith(TEX_SUFFIXES) and not name.startswith(".") and not p.is_symlink():
                out.append(p)
    return out


def _read_tex(path: Path) -> str:
    try:
        if path.stat().st_size > MAX_FILE_BYTES:
            return ""
        return blank_comments(path.read_text(encoding="utf-8", errors="replace"))
    except OSError:
        return ""


def _depth_order(root: Path) -> Callable[[Path], tuple[int, str]]:
    return lambda p: (len(p.relative_to(root).parts), str(p.relative_to(root)))


def find_main(root: Path) -> MainChoice:
    """The submission's main ``.tex`` file (raises :class:`NoMainFile` if there is none)."""
    tex = _tex_files(root)
    texts = {p: _read_tex(p) for p in tex}
    order = _depth_order(root)
    candidates = sorted(
        (p for p, t in texts.items() if _DOCUMENTCLASS.search(t) and _BEGIN_DOCUMENT.search(t)), key=order
    )
    if not candidates:
        raise NoMainFile("no .tex file has both \\documentclass and \\begin{document}")
    if len(candidates) == 1:
        return MainChoice(candidates[0], "the only file with \\documentclass and \\begin{document}", candidates)
    for name in PREFERRED_NAMES:
        named = [p for p in candidates if p.name.lower() == name]
        if named:
            return MainChoice(
                named[0], f"{len(candidates)} files are whole documents; this one is named {name}", candidates
            )
    referenced: set[Path] = set()
    for p, t in texts.items():
        for m in _INCLUDE.finditer(t):
            arg = (m.group(1) or m.group(2) or "").strip()
            for base in (root, p.parent):
                for target in (base / arg, base / f"{arg}.tex"):
                    with contextlib.suppress(OSError, ValueError):
                        referenced.add(target.resolve())
    free = [p for p in candidates if p.resolve() not in referenced]
    if len(free) == 1:
        return MainChoice(
            free[0],
            f"{len(candidates)} files are whole documents; this is the only one no other file inputs",
            candidates,
        )
    pool = free or candidates
    return MainChoice(
        pool[0],
        f"{len(candidates)} files are whole documents and none is clearly the main one; "
        "took the one nearest the top, first by name (use --main to choose)",
        candidates,
    )


# -- untagged displays ----------------------------------------------------------------------

_OPEN = re.compile(r"\\\[|\$\$|\\begin\s*\{(?P<env>(?:" + "|".join(ENVIRONMENTS) + r")\*?)\}")
_VERBATIM = re.compile(r"\\begin\s*\{(?P<env>verbatim\*?|Verbatim|lstlisting|minted|comment)\}")
_TAG_LINE = re.compile(r"^[ \t]*%@claim(?![A-Za-z]).*$", re.M)
# A display is about modular forms if it names one of the known forms.
_FORM_ATOM = re.compile(
    r"E_\s*\{?\s*\d|\\Delta(?![A-Za-z])|\\eta(?![A-Za-z])|\\(?:var)?theta(?![A-Za-z])|\\Theta_|(?<![A-Za-z\\])j\s*\("
)
# A bare j is often an index; it counts as the j-function only beside a q-expansion.
_BARE_J = re.compile(r"(?<![A-Za-z\\_^])j(?![A-Za-z])")
_Q = re.compile(r"(?<![A-Za-z\\])q(?![A-Za-z])")


# Coefficients and spaces: tau(n), sigma_k, p(5n+4) (a bare p(n) is too often another p), the
# overpartitions, r_k(n), dimensions.
_ARITHMETIC = re.compile(
    r"\\tau\s*\(\s*[a-z0-9]|\\sigma_\s*\{?\s*\d|(?<![A-Za-z\\])p\s*\(\s*\d+\s*[a-z]\s*\+\s*\d+\s*\)"
    r"|\\(?:overline|bar)\s*\{?\s*p(?![A-Za-z])|\\dim(?![A-Za-z])|(?<![A-Za-z\\])r_\s*\{?\s*\d+\s*\}?\s*\("
)
# q-series: a product, a q-Pochhammer symbol or a sum, beside q.
_Q_SERIES = re.compile(r"\\prod(?![A-Za-z])|;\s*q|\\sum(?![A-Za-z])")


def mentions_form(text: str) -> bool:
    """Whether normalised claim text names a known modular form, a coefficient of one, or a q-series."""
    if _FORM_ATOM.search(text) or _ARITHMETIC.search(text):
        return True
    return bool(_Q.search(text) and (_BARE_J.search(text) or _Q_SERIES.search(text)))


def _closer(bare: str, start: int, opener: re.Match[str]) -> tuple[int, int]:
    """(start, end) of the display's closing delimiter, or (-1, -1)."""
    env = opener.group("env")
    if env:
        m = re.compile(r"\\end\s*\{" + re.escape(env) + r"\}").search(bare, start)
        return (m.start(), m.end()) if m else (-1, -1)
    close = "\\]" if opener.group(0) == "\\[" else "$$"
    i = bare.find(close, start)
    return (i, i + 2) if i >= 0 else (-1, -1)


def _verbatim_ranges(bare: str) -> list[tuple[int, int]]:
    out = []
    for m in _VERBATIM.finditer(bare):
        end = bare.find(f"\\end{{{m.group('env')}}}", m.end())
        out.append((m.start(), len(bare) if end < 0 else end))
    return out


def untagged_blocks(doc: ScannedDocument, overlay: Mapping[Path, str] | None = None) -> list[ClaimBlock]:
    """A block for each untagged display of ``doc``'s LaTeX files that reads as a claim about forms.

    ``overlay`` gives texts that replace files on disk (by path), as for :func:`verifier.scan.scan_path`.
    """
    replaced = {p.resolve(): t for p, t in (overlay or {}).items()}
    from verifier.parse.grammar import ParseFailure, parse_row
    from verifier.scan import macros as macro_mod
    from verifier.scan.definitions import defined_names
    from verifier.scan.display import join_continued_rows, normalise_row, rows_of

    tagged: dict[str, set[int]] = {}
    # Names the author defines in the text (X := ...): a display that uses one is a claim too.
    authored: set[str] = set()
    for item in doc.items:
        if isinstance(item, ClaimBlock):
            for row in item.rows:
                tagged.setdefault(row.text.source.display, set()).update(row.text.origins)
        elif item.origin in ("author", "prose") and item.text is not None:
            authored.update(defined_names(item.text.text))
    uses_authored = (
        re.compile("|".join(re.escape(n) + r"(?![A-Za-z0-9])" for n in sorted(authored, key=len, reverse=True)))
        if authored
        else None
    )

    def about_forms(text: str) -> bool:
        return mentions_form(text) or (uses_authored is not None and uses_authored.search(text) is not None)

    macros: dict[str, macro_mod.Macro] = {}
    blocks: list[ClaimBlock] = []
    for display in dict.fromkeys(doc.files):
        if display.startswith("<") or display.lower().endswith((".md", ".markdown", ".mdown")):
            continue
        try:
            path = Path(display).resolve()
            data = replaced[path].encode("utf-8") if path in replaced else path.read_bytes()
        except OSError:
            continue
        if len(data) > MAX_FILE_BYTES:
            continue
        source = SourceFile(display, data.decode("utf-8", errors="replace"), path)
        bare = blank_comments(source.text)
        definitions = macro_mod.find_definitions(bare)
        skip = _verbatim_ranges(bare)
        tag_ends = [m.end() for m in _TAG_LINE.finditer(source.text)]
        origins = tagged.get(display, set())
        pos = 0
        while (opener := _OPEN.search(bare, pos)) is not None:
            close_start, close_end = _closer(bare, opener.end(), opener)
            if close_start < 0:
                break
            pos = close_end
            start = opener.start()
            definitions = _define_before(definitions, start, macros, bare)
            if any(a <= start < b for a, b in skip):
                continue
            if any(origin in origins for origin in range(opener.end(), close_start)):
                continue
            before = [e for e in tag_ends if e <= start]
            if before and not bare[before[-1] : start].strip():
                continue  # tagged (the scanner reported it, perhaps as an error)
            env = opener.group("env") or ("\\[" if opener.group(0) == "\\[" else "$$")
            content = MappedText(bare[opener.end() : close_start], list(range(opener.end(), close_start)), source)
            try:
                rows = join_continued_rows([normalise_row(r, macros) for r in rows_of(content, env)])
            except macro_mod.MacroError:
                continue
            if not any(about_forms(r.text.text) and not isinstance(parse_row(r.text.text), ParseFailure) for r in rows):
                continue
            line, col = source.line_col(start)
            blocks.append(ClaimBlock(Location(display, line, col), {}, rows, env))
        # Definitions after the last display still apply to the files read later.
        _define_before(definitions, len(bare) + 1, macros, bare)
    return blocks


def _define_before(
    definitions: list[tuple[int, macro_mod.Macro | macro_mod.DefinitionProblem]],
    offset: int,
    macros: dict[str, macro_mod.Macro],
    bare: str,
) -> list[tuple[int, macro_mod.Macro | macro_mod.DefinitionProblem]]:
    """Record the macro definitions before ``offset`` (as the scanner does); returns the rest."""
    from verifier.scan import macros as macro_mod

    for at, found in definitions:
        if at >= offset or not isinstance(found, macro_mod.Macro):
            continue
        # \providecommand does not replace an existing definition.
        if not (found.name in macros and bare.startswith("\\providecommand", at)):
            macros[found.name] = found
    return [(at, found) for at, found in definitions if at >= offset]


def _keep_untagged(result: ClaimResult) -> bool:
    """Untagged displays that fail to read or to mean a claim are ordinary mathematics."""
    from verifier.diagnostics import CODES

    if result.verdict != "error":
        return True
    stage = CODES.get(result.outcome.code or "", ("",))[0]
    return stage == "prove"


# -- progress -------------------------------------------------------------------------------


class _Progress:
    """A progress bar on stderr, shown only on a terminal and only once the run takes a while."""

    def __init__(self, total: int, stream: IO[str] | None = None, delay: float = 1.0) -> None:
        self.stream = stream or sys.stderr
        self.total = total
        self.enabled = total > 0 and bool(getattr(self.stream, "isatty", lambda: False)())
        self.start = time.monotonic()
        self.delay = delay
        self.shown = False

    def update(self, done: int) -> None:
        if not self.enabled or time.monotonic() - self.start < self.delay:
            return
        width = 30
        filled = width * done // max(self.total, 1)
        bar = "#" * filled + "-" * (width - filled)
        elapsed = time.monotonic() - self.start
        self.stream.write(f"\rqreferee: checking [{bar}] {done}/{self.total} blocks, {elapsed:.0f} s")
        self.stream.flush()
        self.shown = True

    def close(self) -> None:
        if self.shown:
            self.stream.write("\r" + " " * 72 + "\r")
            self.stream.flush()


# -- screening ------------------------------------------------------------------------------


@dataclass
class ScreenResult:
    """The report on a submission, with the choices made while screening it."""

    submission: str
    main: str
    main_reason: str
    candidates: list[str]
    report: Report
    untagged: list[bool]  # parallel to report.claims
    notes: list[str] = field(default_factory=list)
    untagged_tried: bool = False

    @property
    def exit_code(self) -> int:
        return self.report.exit_code

    def to_dict(self) -> dict[str, Any]:
        """The JSON report: the ``check`` contract, ``untagged`` on each claim, and a ``screen`` section."""
        data = self.report.to_dict()
        for claim, flag in zip(data["claims"], self.untagged, strict=True):
            claim["untagged"] = flag
        data["screen"] = {
            "submission": self.submission,
            "main": self.main,
            "main_reason": self.main_reason,
            "candidates": self.candidates,
            "untagged_tried": self.untagged_tried,
            "untagged_claims": sum(self.untagged),
            "notes": self.notes,
        }
        return data


def _run_checks(
    items: list[ClaimBlock | DefineTag],
    doc: ScannedDocument,
    check: Callable[[ScannedDocument], Report],
    progress: _Progress | None,
) -> Report:
    """One run, or (with a visible progress bar) up to ten runs over consecutive blocks."""
    blocks = [i for i in items if isinstance(i, ClaimBlock)]
    if progress is None or not progress.enabled or len(blocks) < 8:
        return check(ScannedDocument(items, list(doc.diagnostics), list(doc.files)))
    size = math.ceil(len(blocks) / 10)
    chunks = [blocks[k : k + size] for k in range(0, len(blocks), size)]
    merged: Report | None = None
    done = 0
    progress.update(0)
    for chunk in chunks:
        wanted = {id(b) for b in chunk}
        part = [i for i in items if isinstance(i, DefineTag) or id(i) in wanted]
        report = check(ScannedDocument(part, list(doc.diagnostics), list(doc.files)))
        if merged is None:
            merged = report
        else:
            merged.claims.extend(report.claims)
        done += len(chunk)
        progress.update(done)
    progress.close()
    assert merged is not None
    return merged


def _relabel(report: Report, root: Path, prefix: str) -> None:
    """Show files relative to the submission (never the temporary folder's path)."""
    roots = {str(root), str(root.resolve())}

    def name(file: str) -> str:
        for r in roots:
            with contextlib.suppress(ValueError):
                if Path(file).is_absolute():
                    return prefix + Path(file).relative_to(r).as_posix()
        with contextlib.suppress(ValueError, OSError):
            return prefix + Path(file).resolve().relative_to(root.resolve()).as_posix()
        return file

    def loc(location: Location) -> Location:
        return replace(location, file=name(location.file))

    def text(message: str) -> str:
        for r in sorted(roots, key=len, reverse=True):
            message = message.replace(r + os.sep, prefix)
        return message

    for c in report.claims:
        c.location, c.end = loc(c.location), loc(c.end)
        c.outcome.message = text(c.outcome.message)
    report.diagnostics[:] = [_relabel_diag(d, loc(d.location), text(d.message)) for d in report.diagnostics]
    report.files[:] = [name(f) for f in report.files]


def _shown(path: Path) -> str:
    try:
        return str(path.resolve().relative_to(Path.cwd()))
    except ValueError:
        return str(path.resolve())


def _relabel_diag(d: Diagnostic, location: Location, message: str) -> Diagnostic:
    return replace(d, location=location, message=message)


def screen(
    submission: str | Path,
    *,
    untagged: bool = False,
    jobs: int | None = None,
    max_terms: int | None = None,
    max_seconds: float | None = None,
    limits: Limits | None = None,
    main: str | None = None,
    progress_stream: IO[str] | None = None,
    check: Callable[[ScannedDocument], Report] | None = None,
    annotate_to: Path | None = None,
) -> ScreenResult:
    """Screen a submission (folder or archive).

    ``annotate_to``: a folder that gets an annotated copy of every file of the paper, at
    its path inside the submission (see :func:`verifier.cli.write_paper_copies`).

    Raises :class:`UnsafeArchive` if the archive is refused and :class:`NoMainFile` if no
    main file can be found.
    """
    from verifier.api import check_document
    from verifier.prove.prover import DEFAULT_MAX_TERMS
    from verifier.scan import scan_path

    submission = Path(submission)
    notes: list[str] = []
    options: dict[str, Any] = {"max_terms": max_terms or DEFAULT_MAX_TERMS}
    if jobs is not None:
        options["jobs"] = jobs
    if max_seconds is not None:
        options["max_seconds"] = max_seconds
    accepted, ignored = supported_options(check_document, options)
    if "jobs" in ignored:
        notes.append("--jobs is ignored: this version decides claims in one process")
    if "max_seconds" in ignored:
        notes.append("--max-seconds is ignored: this version has no time budget per claim")
    if check is None:

        def default_check(doc: ScannedDocument) -> Report:
            return check_document(doc, **accepted)

        check = default_check
    if submission.is_file() and submission.name.lower().endswith(TEX_SUFFIXES):
        # A single .tex file: its folder is the submission and it is the main file.
        main, submission = submission.name, submission.parent
    left_out: list[str] = []
    with opened_submission(submission, limits, left_out) as root:
        if main is not None:
            chosen = (root / main).resolve()
            if not chosen.is_relative_to(root.resolve()) or not chosen.is_file():
                raise NoMainFile(f"--main {main} is not a file of the submission")
            choice = MainChoice(chosen, "chosen with --main", [chosen])
        else:
            choice = find_main(root)
        doc = scan_path(choice.path)
        items: list[ClaimBlock | DefineTag] = list(doc.items)
        extra = untagged_blocks(doc) if untagged else []
        for block in extra:
            items.extend([boundary_block(), block])
        blocks = sum(isinstance(i, ClaimBlock) for i in items)
        report = _run_checks(items, doc, check, _Progress(blocks, progress_stream))
        segments: list[list[ClaimResult]] = [[]]
        for c in report.claims:
            if is_boundary(c):
                segments.append([])
            else:
                segments[-1].append(c)
        if len(segments) != len(extra) + 1:
            # The checker did not keep the blocks apart: check the untagged ones one by one.
            defines = [i for i in doc.items if isinstance(i, DefineTag)]
            report = check(doc)
            segments = [list(report.claims)]
            segments.extend(list(check(ScannedDocument([*defines, b], [], [])).claims) for b in extra)
        flags = [False] * len(segments[0])
        claims = list(segments[0])
        for segment in segments[1:]:
            for c in segment:
                if _keep_untagged(c):
                    c.name = UNTAGGED_PREFIX + (c.label or f"line-{c.location.line}")
                    claims.append(c)
                    flags.append(True)
        report.claims = claims
        if annotate_to is not None:
            from verifier.cli import write_paper_copies

            write_paper_copies(report, root, annotate_to)
        if submission.is_dir():
            label = str(submission)
            shown = [_shown(p) for p in (choice.path, *choice.candidates)]
        else:
            # Files of an archive are named "archive.zip:path/inside", never by the temporary folder.
            label = submission.name
            _relabel(report, root, f"{label}:")
            shown = [
                f"{label}:{p.resolve().relative_to(root.resolve()).as_posix()}"
                for p in (choice.path, *choice.candidates)
            ]
    from verifier.diagnostics import Diagnostic

    for item in left_out:
        notes.append(f"left out: {item}")
        report.diagnostics.append(
            Diagnostic("archive-member", "warning", Location(label, 1, 1), item, "ask the authors for a clean archive")
        )
    _explain_empty(report, untagged)
    return ScreenResult(label, shown[0], choice.reason, shown[1:], report, flags, notes, untagged)


def _explain_empty(report: Report, untagged: bool) -> None:
    """A submission with nothing checked says so (exit status 1), with the next step."""
    from verifier.api import no_claims_warning

    report.diagnostics[:] = [d for d in report.diagnostics if d.code != "no-claims"]
    if report.claims or any(d.severity == "error" for d in report.diagnostics):
        return
    where = report.files[0] if report.files else "the submission"
    if untagged:
        warning = no_claims_warning(where, "no display reads as an identity between modular forms; tag the claims")
        warning = replace(warning, message=f"no claims in {where}, tagged or untagged; nothing was checked")
    else:
        warning = no_claims_warning(
            where, "run 'qreferee screen --untagged' to check the displays without a tag, or tag the claims"
        )
    report.diagnostics.append(warning)


# -- the command line ------------------------------------------------------------------------


def render_text(result: ScreenResult, verbose: bool = False) -> str:
    """The terminal report: the main file chosen, notes, then the usual claim lines."""
    from verifier.report import text

    head = [f"qreferee screen: {result.submission}: main file {result.main} ({result.main_reason})"]
    if len(result.candidates) > 1:
        head.append(
            f"qreferee screen: other whole documents: {', '.join(c for c in result.candidates if c != result.main)}"
        )
    head.extend(f"qreferee screen: note: {n}" for n in result.notes)
    if result.untagged_tried:
        n = sum(result.untagged)
        head.append(
            f"qreferee screen: {n} claim{'s' if n != 1 else ''} from displays without a tag (marked [untagged:...])"
        )
    return "\n".join(head) + "\n" + text.render(result.report, verbose=verbose)


def register(subparsers: argparse._SubParsersAction[argparse.ArgumentParser]) -> argparse.ArgumentParser:
    """Add the ``screen`` command to the ``qreferee`` command line."""
    from verifier.argtypes import positive_int, positive_seconds, ratio

    parser = subparsers.add_parser(
        "screen",
        help="check a whole submission (folder, .zip or .tar.gz)",
        description=(
            "Unpack a submission safely, find its main .tex file, follow \\input/\\include/\\subfile inside "
            "it, and check every tagged claim; with --untagged also every display that reads as an "
            "identity between modular forms."
        ),
    )
    parser.add_argument(
        "submission", metavar="SUBMISSION", help="a folder, .zip, .tar.gz or .tgz (or the main .tex file itself)"
    )
    parser.add_argument(
        "--format",
        choices=("text", "json", "html", "sarif"),
        default="text",
        help="text lines, the JSON report, a self-contained HTML page, or SARIF 2.1.0",
    )
    parser.add_argument("-o", "--output", metavar="FILE", help="write the report to FILE instead of standard output")
    parser.add_argument("--untagged", action="store_true", help="also check displays that carry no tag")
    parser.add_argument("--jobs", type=positive_int, default=None, metavar="N", help="decide claims in N processes")
    parser.add_argument("--main", metavar="FILE", help="the main file, relative to the submission (skips detection)")
    parser.add_argument(
        "--max-terms", type=positive_int, default=None, metavar="N", help="most coefficients one claim may use"
    )
    parser.add_argument(
        "--max-seconds",
        type=positive_seconds,
        default=None,
        metavar="S",
        help="time budget of one claim (default: the engine's)",
    )
    parser.add_argument(
        "--max-size",
        type=positive_int,
        default=100,
        metavar="MB",
        help="largest unpacked size of an archive (default 100)",
    )
    parser.add_argument("--max-files", type=positive_int, default=2000, metavar="N", help="most members of an archive")
    parser.add_argument(
        "--max-ratio", type=ratio, default=100.0, metavar="R", help="largest compression ratio R:1 (default 100)"
    )
    parser.add_argument(
        "--annotate",
        metavar="OUTDIR",
        default=None,
        help="also write an annotated copy of every file of the paper under OUTDIR, at its path in the submission",
    )
    parser.add_argument("-v", "--verbose", action="store_true", help="also print each claim as it was read")
    parser.set_defaults(func=run_screen_args)
    return parser


def run_screen_args(args: argparse.Namespace) -> int:
    """Run ``qreferee screen``; exit status as for ``check``."""
    path = Path(args.submission)
    if not path.exists():
        print(f"qreferee: cannot read {path}", file=sys.stderr)
        return 2
    limits = Limits(max_bytes=args.max_size * MB, max_members=args.max_files, max_ratio=args.max_ratio)
    try:
        result = screen(
            path,
            untagged=args.untagged,
            jobs=args.jobs,
            max_terms=args.max_terms,
            max_seconds=args.max_seconds,
            limits=limits,
            main=args.main,
            annotate_to=Path(args.annotate) if args.annotate else None,
        )
    except UnsafeArchive as exc:
        print(f"qreferee: refused {path.name}:", file=sys.stderr)
        for problem in exc.problems:
            print(f"  {problem}", file=sys.stderr)
        return 2
    except NoMainFile as exc:
        print(f"qreferee: {path.name}: {exc}", file=sys.stderr)
        return 2
    if args.format == "json":
        out = json.dumps(result.to_dict(), indent=2, ensure_ascii=False) + "\n"
    elif args.format in ("html", "sarif"):
        from verifier.cli import render_report

        out = render_report(result.report, args.format, args.verbose)
    else:
        out = render_text(result, verbose=args.verbose)
    if args.output:
        from verifier.cli import write_atomic

        write_atomic(Path(args.output), out.encode("utf-8"))
    else:
        sys.stdout.write(out)
    return result.exit_code

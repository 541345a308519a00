"""``qreferee screen``: unpacking untrusted archives, finding the main file, untagged displays.

The verdicts asserted here are those of identities in the sample submission and in
``tests/data/screen/``: E_4^2 = E_8, E_4 E_6 = E_10, E_4^2 E_6 = E_14, 1728 Delta =
E_4^3 - E_6^2 and the first coefficients of E_4, Delta and j (Serre, *A Course in
Arithmetic*, Ch. VII); E_6^2 != E_12 and 1782 in place of 1728 are deliberate mistakes.
"""

from __future__ import annotations

import argparse
import io
import json
import os
import stat
import tarfile
import zipfile
from pathlib import Path

import pytest
from verifier import screen
from verifier.screen import Limits, NoMainFile, UnsafeArchive, extract_archive, find_main

REPO = Path(__file__).resolve().parent.parent
SUBMISSION = REPO / "sample_docs" / "submission"
DATA = REPO / "tests" / "data" / "screen"

TAGGED = {"weight8": "proved", "weight10": "proved", "disc": "proved", "square": "refuted", "defined-again": "proved"}
UNTAGGED = {"untagged:eq:e14": "proved", "untagged:eq:wrong-cusp": "refuted", "untagged:eq:jexp": "proved"}


def _members(root: Path) -> list[Path]:
    return sorted(p for p in root.rglob("*") if p.is_file())


@pytest.fixture
def submission_zip(tmp_path: Path) -> Path:
    """The sample submission zipped under a top folder, as authors send it."""
    out = tmp_path / "submission.zip"
    with zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as zf:
        for p in _members(SUBMISSION):
            zf.write(p, "paper/" + p.relative_to(SUBMISSION).as_posix())
    return out


@pytest.fixture
def submission_tgz(tmp_path: Path) -> Path:
    out = tmp_path / "submission.tar.gz"
    with tarfile.open(out, "w:gz") as tf:
        for p in _members(SUBMISSION):
            tf.add(p, p.relative_to(SUBMISSION).as_posix())
    return out


def verdicts(result: screen.ScreenResult) -> dict[str, str]:
    return {c.name or "": c.verdict for c in result.report.claims}


# -- whole submissions ----------------------------------------------------------------------


def test_zip_with_untagged_displays(submission_zip: Path) -> None:
    result = screen.screen(submission_zip, untagged=True)
    assert result.main == "submission.zip:paper/main.tex"
    assert verdicts(result) == TAGGED | UNTAGGED
    assert result.untagged == [c.name in UNTAGGED for c in result.report.claims]
    # Files are named inside the archive, never by the temporary folder.
    files = {c.location.file for c in result.report.claims}
    assert files == {"submission.zip:paper/sections/identities.tex", "submission.zip:paper/sections/appendix.tex"}
    assert all(f.startswith("submission.zip:") for f in result.report.files)
    data = result.to_dict()
    assert [c["untagged"] for c in data["claims"]] == result.untagged
    assert data["screen"]["main"] == "submission.zip:paper/main.tex"
    assert data["screen"]["untagged_claims"] == 3
    assert {c["name"]: c["verdict"] for c in data["claims"]} == TAGGED | UNTAGGED
    assert result.exit_code == 1


def test_tgz_tagged_only(submission_tgz: Path) -> None:
    result = screen.screen(submission_tgz)
    assert result.main == "submission.tar.gz:main.tex"
    assert verdicts(result) == TAGGED
    assert not any(result.untagged)


def test_folder_and_single_file() -> None:
    result = screen.screen(SUBMISSION, untagged=True, jobs=1)
    assert verdicts(result) == TAGGED | UNTAGGED
    assert not any("--jobs" in n for n in result.notes)  # check_document takes jobs
    single = screen.screen(SUBMISSION / "main.tex")
    assert verdicts(single) == TAGGED


def test_untagged_displays_of_every_kind() -> None:
    result = screen.screen(DATA / "untagged.tex", untagged=True)
    got = verdicts(result)
    assert got["tagged"] == "proved"
    assert got["half-typed"] == "error"  # tagged, so reported; not tried again as untagged
    untagged = {n: v for n, v in got.items() if n.startswith("untagged:")}
    assert untagged.pop("untagged:eq:prod") == "proved"
    assert untagged.pop("untagged:eq:chain1") == "proved"
    assert untagged.pop("untagged:eq:chain2") == "proved"
    # gather (two rows), $$ (refuted), multline: named by line
    assert sorted(untagged.values()) == ["proved", "proved", "proved", "refuted"]
    refuted = next(c for c in result.report.claims if c.name in untagged and c.verdict == "refuted")
    assert refuted.outcome.first_difference == {"n": 1, "left": "1728", "right": "1782"}
    # Nothing from ordinary mathematics, verbatim or comments.
    assert len(result.report.claims) == 2 + 3 + 4


def test_subfile_main_detection_and_following() -> None:
    result = screen.screen(DATA / "subfiles")
    assert result.main.endswith("thesis.tex")
    assert "no other file inputs" in result.main_reason
    assert verdicts(result) == {"in-subfile": "proved"}


# -- main file ------------------------------------------------------------------------------

DOC = "\\documentclass{article}\n\\begin{document}\n%s\n\\end{document}\n"


def _write(root: Path, files: dict[str, str]) -> None:
    for name, text in files.items():
        (root / name).parent.mkdir(parents=True, exist_ok=True)
        (root / name).write_text(text, encoding="utf-8")


@pytest.mark.parametrize(
    ("files", "expected"),
    [
        ({"a.tex": DOC % "x", "notes.tex": "no document here"}, "a.tex"),
        ({"draft.tex": DOC % "x", "main.tex": DOC % "y"}, "main.tex"),
        ({"zz.tex": DOC % "x", "paper.tex": DOC % "y", "sub/ms.tex": DOC % "z"}, "paper.tex"),
        ({"book.tex": DOC % "\\input{chap}", "chap.tex": DOC % "c"}, "book.tex"),
        # A \documentclass in a comment does not count.
        ({"real.tex": DOC % "x", "main.tex": "% \\documentclass{article}\n\\begin{document}"}, "real.tex"),
    ],
)
def test_main_file_detection(tmp_path: Path, files: dict[str, str], expected: str) -> None:
    _write(tmp_path, files)
    choice = find_main(tmp_path)
    assert choice.path.relative_to(tmp_path).as_posix() == expected
    assert choice.reason


def test_no_main_file(tmp_path: Path) -> None:
    _write(tmp_path, {"part.tex": "\\section{x}"})
    with pytest.raises(NoMainFile):
        find_main(tmp_path)
    with pytest.raises(NoMainFile):
        screen.screen(tmp_path)


# -- hostile archives -----------------------------------------------------------------------


def _zip(path: Path, members: list[tuple[zipfile.ZipInfo | str, bytes]]) -> Path:
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as zf:
        for info, data in members:
            zf.writestr(info, data)
    return path


def _zip_symlink(name: str, target: str) -> tuple[zipfile.ZipInfo, bytes]:
    info = zipfile.ZipInfo(name)
    info.create_system = 3
    info.external_attr = (stat.S_IFLNK | 0o777) << 16
    return info, target.encode()


def _tar(path: Path, members: list[tarfile.TarInfo], mode: str = "w:gz") -> Path:
    with tarfile.open(path, mode) as tf:
        for info in members:
            data = b"x" * info.size if info.isfile() else None
            tf.addfile(info, io.BytesIO(data) if data is not None else None)
    return path


def _tarinfo(name: str, kind: bytes = tarfile.REGTYPE, size: int = 0, link: str = "") -> tarfile.TarInfo:
    info = tarfile.TarInfo(name)
    info.type = kind
    info.size = size
    info.linkname = link
    return info


OK = ("main.tex", (DOC % "x").encode())

HOSTILE_ZIPS = {
    "absolute": ([("/etc/evil.tex", b"x"), OK], "/etc/evil.tex", "absolute path"),
    "dotdot": ([("paper/../../evil.tex", b"x"), OK], "paper/../../evil.tex", "'..'"),
    "windows-absolute": ([("C:\\evil.tex", b"x"), OK], "C:\\evil.tex", "absolute path"),
    "symlink": ([_zip_symlink("link.tex", "/etc/passwd"), OK], "link.tex", "symbolic link"),
}


@pytest.mark.parametrize("case", sorted(HOSTILE_ZIPS))
def test_hostile_zip_members_are_refused(tmp_path: Path, case: str) -> None:
    members, name, why = HOSTILE_ZIPS[case]
    archive = _zip(tmp_path / "evil.zip", members)
    dest = tmp_path / "out"
    dest.mkdir()
    with pytest.raises(UnsafeArchive) as exc:
        extract_archive(archive, dest)
    assert any(repr(name) in p and why in p for p in exc.value.problems), exc.value.problems
    assert not (tmp_path / "evil.tex").exists()
    assert _members(dest) == []  # refused before anything is written


HOSTILE_TARS = {
    "absolute": (_tarinfo("/tmp/evil.tex", size=3), "/tmp/evil.tex", "absolute path"),
    "dotdot": (_tarinfo("../evil.tex", size=3), "../evil.tex", "'..'"),
    "symlink": (_tarinfo("link.tex", tarfile.SYMTYPE, link="/etc/passwd"), "link.tex", "symbolic link"),
    "hardlink": (_tarinfo("hard.tex", tarfile.LNKTYPE, link="/etc/passwd"), "hard.tex", "hard link"),
    "device": (_tarinfo("dev.tex", tarfile.CHRTYPE), "dev.tex", "device"),
    "fifo": (_tarinfo("fifo.tex", tarfile.FIFOTYPE), "fifo.tex", "FIFO"),
}


@pytest.mark.parametrize("case", sorted(HOSTILE_TARS))
def test_hostile_tar_members_are_refused(tmp_path: Path, case: str) -> None:
    member, name, why = HOSTILE_TARS[case]
    archive = _tar(tmp_path / "evil.tgz", [member, _tarinfo("main.tex", size=10)])
    dest = tmp_path / "out"
    dest.mkdir()
    with pytest.raises(UnsafeArchive) as exc:
        extract_archive(archive, dest)
    assert any(repr(name) in p and why in p for p in exc.value.problems), exc.value.problems
    assert not (tmp_path / "evil.tex").exists()
    assert not any(p.is_symlink() for p in dest.rglob("*"))


def test_symlink_then_write_through_it_is_refused(tmp_path: Path) -> None:
    # The classic escape: a link to a folder outside, then a file "through" the link.
    archive = _tar(
        tmp_path / "evil.tar",
        [_tarinfo("sub", tarfile.SYMTYPE, link=str(tmp_path)), _tarinfo("sub/evil.tex", size=3)],
        "w",
    )
    dest = tmp_path / "out"
    dest.mkdir()
    with pytest.raises(UnsafeArchive) as exc:
        extract_archive(archive, dest)
    assert "'sub'" in exc.value.problems[0]
    assert not (tmp_path / "evil.tex").exists()


def test_zip_bomb_is_refused(tmp_path: Path) -> None:
    archive = _zip(tmp_path / "bomb.zip", [OK, ("zeros.tex", bytes(8 * 1024 * 1024))])
    dest = tmp_path / "out"
    dest.mkdir()
    with pytest.raises(UnsafeArchive) as exc:
        extract_archive(archive, dest)
    assert any("'zeros.tex'" in p and "compression bomb" in p for p in exc.value.problems)


def test_tar_bomb_is_refused_while_unpacking(tmp_path: Path) -> None:
    archive = _tar(tmp_path / "bomb.tar.gz", [_tarinfo("zeros.tex", size=8 * 1024 * 1024)])
    # (tarinfo data is b"x" repeated: it compresses about 1000:1)
    dest = tmp_path / "out"
    dest.mkdir()
    with pytest.raises(UnsafeArchive) as exc:
        extract_archive(archive, dest)
    assert any("'zeros.tex'" in p and "compression bomb" in p for p in exc.value.problems)
    assert sum(p.stat().st_size for p in _members(dest)) < 4 * 1024 * 1024  # stopped early


def test_size_and_count_limits(tmp_path: Path) -> None:
    many = _zip(tmp_path / "many.zip", [(f"f{i}.tex", b"%") for i in range(12)])
    with pytest.raises(UnsafeArchive) as exc:
        extract_archive(many, tmp_path / "a", Limits(max_members=10))
    assert "12 members" in exc.value.problems[0]
    big = _tar(tmp_path / "big.tar", [_tarinfo("big.tex", size=3000)], "w")
    (tmp_path / "b").mkdir()
    with pytest.raises(UnsafeArchive) as exc:
        extract_archive(big, tmp_path / "b", Limits(max_bytes=1000))
    assert "'big.tex'" in exc.value.problems[0]


def test_duplicate_member_is_refused(tmp_path: Path) -> None:
    archive = _tar(tmp_path / "dup.tar", [_tarinfo("a.tex", size=2), _tarinfo("a.tex", size=2)], "w")
    (tmp_path / "o").mkdir()
    with pytest.raises(UnsafeArchive) as exc:
        extract_archive(archive, tmp_path / "o")
    assert "twice" in exc.value.problems[0]


def test_ordinary_archive_unpacks(tmp_path: Path, submission_zip: Path) -> None:
    dest = tmp_path / "out"
    dest.mkdir()
    assert extract_archive(submission_zip, dest) == 4
    assert {p.relative_to(dest).as_posix() for p in _members(dest)} == {
        "paper/main.tex",
        "paper/sections/intro.tex",
        "paper/sections/identities.tex",
        "paper/sections/appendix.tex",
    }


# -- command line and progress --------------------------------------------------------------


def _run(argv: list[str]) -> int:
    parser = argparse.ArgumentParser(prog="qreferee")
    screen.register(parser.add_subparsers(dest="command"))
    args = parser.parse_args(argv)
    return int(args.func(args))


def test_command_line_json(submission_zip: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert _run(["screen", str(submission_zip), "--untagged", "--format", "json"]) == 1
    data = json.loads(capsys.readouterr().out)
    assert {c["name"]: c["untagged"] for c in data["claims"]} == {n: n in UNTAGGED for n in TAGGED | UNTAGGED}
    assert data["summary"] == {"proved": 6, "refuted": 2, "unproven": 0, "error": 0}


def test_command_line_text_and_refusal(
    tmp_path: Path, submission_zip: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    out = tmp_path / "report.txt"
    assert _run(["screen", str(submission_zip), "-o", str(out)]) == 1
    text = out.read_text(encoding="utf-8")
    assert text.startswith("qreferee screen: submission.zip: main file submission.zip:paper/main.tex")
    assert "refuted [square]" in text and "untagged" not in text
    # One bad member is left out alone; the rest is screened and the report names it.
    evil = _zip(tmp_path / "evil.zip", [("../x.tex", b"x"), OK])
    assert _run(["screen", str(evil)]) == 1  # nothing tagged in the rest: a warning, never success
    shown = capsys.readouterr().out
    assert "'../x.tex'" in shown and "[archive-member]" in shown


def test_command_line_is_wired() -> None:
    from verifier import cli

    if "verifier.screen" not in getattr(cli, "PLUGIN_MODULES", ()):
        pytest.skip("this CLI does not register the screen command")
    args = cli.build_parser().parse_args(["screen", "x.zip", "--untagged", "--jobs", "2"])
    assert args.func is screen.run_screen_args and args.jobs == 2


class _Terminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_progress_bar_only_on_a_terminal() -> None:
    plain = screen.screen(SUBMISSION, untagged=True)
    terminal = _Terminal()
    shown = screen.screen(SUBMISSION, untagged=True, progress_stream=terminal)
    # On a terminal claims are decided in batches; the results are the same.
    strip = [{k: v for k, v in c.to_dict().items() if k != "seconds"} for c in plain.report.claims]
    assert strip == [{k: v for k, v in c.to_dict().items() if k != "seconds"} for c in shown.report.claims]
    bar = screen._Progress(4, _Terminal(), delay=0)
    bar.update(2)
    assert "[" in bar.stream.getvalue() and "2/4" in bar.stream.getvalue()
    piped = io.StringIO()
    quiet = screen._Progress(4, piped, delay=0)
    quiet.update(2)
    assert piped.getvalue() == ""


def test_screening_never_writes_into_the_submission(tmp_path: Path) -> None:
    before = {p: p.stat().st_mtime_ns for p in _members(SUBMISSION)}
    screen.screen(SUBMISSION, untagged=True)
    assert {p: p.stat().st_mtime_ns for p in _members(SUBMISSION)} == before
    assert not any(name.startswith(".qreferee") for name in os.listdir(SUBMISSION))
